//! The exact accumulator shared by every accrual path.
//!
//! Interest of a day is base x rate x n / den for a day fraction n/den that
//! rarely terminates (1/360, 1/365...). Dividing each day would round 28-digit
//! values and can push a true tie (1.875) to the wrong side, so the
//! accumulator keeps the exact numerators per denominator and divides once,
//! over a common denominator, when a figure is read. Amounts that are already
//! decimals (a rounded daily amount, an exponential) add to a plain part.

use rust_decimal::Decimal;

/// Denominators kept apart before folding into the plain part; a period
/// rarely needs more than two (365 and 366 across a year end).
const SLOTS: usize = 4;

/// An exact running sum of interest.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Accrual {
    plain: Decimal,
    parts: [(u32, Decimal); SLOTS],
    used: usize,
}

/// An accumulator figure past the exact decimal range.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Overflow;

impl Accrual {
    /// An empty sum.
    pub fn new() -> Accrual {
        Accrual::default()
    }

    /// Adds an amount that is already a decimal.
    ///
    /// # Errors
    /// [`Overflow`] past the decimal range.
    pub fn add_amount(&mut self, x: Decimal) -> Result<(), Overflow> {
        self.plain = self.plain.checked_add(x).ok_or(Overflow)?;
        Ok(())
    }

    /// Adds `num / den`, keeping `num` exact.
    ///
    /// ```
    /// use ledgerate::engine::accrual::Accrual;
    /// use rust_decimal::Decimal;
    /// let mut a = Accrual::new();
    /// // 1,000.00 at 2.25% for 30 days of 30/360, one day at a time.
    /// for _ in 0..30 {
    ///     a.add_fraction("22.5000".parse().unwrap(), 360).unwrap();
    /// }
    /// assert_eq!(a.value().unwrap(), "1.875".parse::<Decimal>().unwrap());
    /// ```
    ///
    /// # Errors
    /// [`Overflow`] past the decimal range.
    pub fn add_fraction(&mut self, num: Decimal, den: u32) -> Result<(), Overflow> {
        if den == 1 {
            return self.add_amount(num);
        }
        for slot in self.parts.iter_mut().take(self.used) {
            if slot.0 == den {
                slot.1 = slot.1.checked_add(num).ok_or(Overflow)?;
                return Ok(());
            }
        }
        if let Some(slot) = self.parts.get_mut(self.used) {
            *slot = (den, num);
            self.used += 1;
            return Ok(());
        }
        // More denominators than slots: fold this one in by division.
        let q = num.checked_div(Decimal::from(den)).ok_or(Overflow)?;
        self.add_amount(q)
    }

    /// Adds another accumulator.
    ///
    /// # Errors
    /// [`Overflow`] past the decimal range.
    pub fn add(&mut self, other: &Accrual) -> Result<(), Overflow> {
        self.add_amount(other.plain)?;
        for (den, num) in other.parts.iter().take(other.used) {
            self.add_fraction(*num, *den)?;
        }
        Ok(())
    }

    /// Whether nothing was added (or everything added cancelled in every part).
    pub fn is_zero(&self) -> bool {
        self.plain.is_zero() && self.parts.iter().take(self.used).all(|p| p.1.is_zero())
    }

    /// The sum, divided once over the common denominator: exact whenever the
    /// true value terminates within 28 significant digits.
    ///
    /// # Errors
    /// [`Overflow`] past the decimal range.
    pub fn value(&self) -> Result<Decimal, Overflow> {
        let parts = self.parts.get(..self.used).unwrap_or(&self.parts);
        match parts {
            [] => Ok(self.plain),
            [(den, num)] => self
                .plain
                .checked_add(num.checked_div(Decimal::from(*den)).ok_or(Overflow)?)
                .ok_or(Overflow),
            _ => {
                let lcm = parts.iter().try_fold(1u64, |l, (d, _)| {
                    let d = u64::from(*d);
                    l.checked_mul(d / gcd(l, d))
                });
                let common = lcm.and_then(|l| {
                    let total = parts.iter().try_fold(Decimal::ZERO, |acc, (d, n)| {
                        acc.checked_add(n.checked_mul(Decimal::from(l / u64::from(*d)))?)
                    })?;
                    total.checked_div(Decimal::from(l))
                });
                let fractional = match common {
                    Some(v) => v,
                    // The common numerator does not fit: divide part by part.
                    None => parts.iter().try_fold(Decimal::ZERO, |acc, (d, n)| {
                        acc.checked_add(n.checked_div(Decimal::from(*d)).ok_or(Overflow)?)
                            .ok_or(Overflow)
                    })?,
                };
                self.plain.checked_add(fractional).ok_or(Overflow)
            }
        }
    }
}

fn gcd(mut a: u64, mut b: u64) -> u64 {
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a.max(1)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    /// A sum over two denominators whose total terminates is exact: 1/365 of
    /// 365 and 1/366 of 366 add to exactly 2.
    #[test]
    fn mixed_denominators_divide_once() {
        let mut a = Accrual::new();
        a.add_fraction(d("365"), 365).unwrap();
        a.add_fraction(d("366"), 366).unwrap();
        assert_eq!(a.value().unwrap(), d("2"));
        let mut b = Accrual::new();
        b.add_fraction(d("182.5"), 365).unwrap();
        b.add_fraction(d("0.75"), 1).unwrap();
        assert_eq!(b.value().unwrap(), d("1.25"));
    }

    #[test]
    fn more_denominators_than_slots_still_sum() {
        let mut a = Accrual::new();
        for den in [360, 365, 366, 252, 372] {
            a.add_fraction(Decimal::from(den), den).unwrap();
        }
        assert_eq!(a.value().unwrap(), d("5"));
    }

    #[test]
    fn overflow_is_an_error_not_a_panic() {
        let mut a = Accrual::new();
        a.add_amount(Decimal::MAX).unwrap();
        assert_eq!(a.add_amount(Decimal::MAX), Err(Overflow));
    }
}
