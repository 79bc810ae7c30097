//! An exact rational number for year fractions.
//!
//! Year fractions such as 61/365 + 121/366 have no finite decimal expansion;
//! they are kept as reduced ratios of integers and turned into a decimal only
//! when a figure is reported. This module never reads files or prints.

use std::fmt;

use rust_decimal::Decimal;

/// A reduced fraction `num / den` with `den > 0`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Ratio {
    num: i128,
    den: i128,
}

fn gcd(mut a: i128, mut b: i128) -> i128 {
    a = a.abs();
    b = b.abs();
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a
}

impl Ratio {
    /// Zero.
    pub const ZERO: Ratio = Ratio { num: 0, den: 1 };

    /// `num / den`, reduced; `None` when `den` is 0.
    ///
    /// ```
    /// use ledgerate::conventions::ratio::Ratio;
    /// let r = Ratio::new(30, 360).unwrap();
    /// assert_eq!((r.numer(), r.denom()), (1, 12));
    /// ```
    pub fn new(num: i128, den: i128) -> Option<Ratio> {
        if den == 0 {
            return None;
        }
        let g = gcd(num, den).max(1);
        let sign = if den < 0 { -1 } else { 1 };
        Some(Ratio {
            num: sign * num / g,
            den: sign * den / g,
        })
    }

    /// A whole number.
    pub fn from_int(n: i128) -> Ratio {
        Ratio { num: n, den: 1 }
    }

    /// The numerator (sign carrier).
    pub fn numer(self) -> i128 {
        self.num
    }

    /// The denominator, always positive.
    pub fn denom(self) -> i128 {
        self.den
    }

    /// Exact sum; `None` on overflow of the 128-bit parts.
    pub fn checked_add(self, other: Ratio) -> Option<Ratio> {
        let g = gcd(self.den, other.den).max(1);
        let den = (self.den / g).checked_mul(other.den)?;
        let num = self
            .num
            .checked_mul(other.den / g)?
            .checked_add(other.num.checked_mul(self.den / g)?)?;
        Ratio::new(num, den)
    }

    /// Exact difference; `None` on overflow.
    pub fn checked_sub(self, other: Ratio) -> Option<Ratio> {
        self.checked_add(Ratio {
            num: other.num.checked_neg()?,
            den: other.den,
        })
    }

    /// The value as a decimal: exact when it terminates within 28 digits,
    /// otherwise correctly rounded to 28 significant digits. `None` when it
    /// does not fit a decimal.
    ///
    /// ```
    /// use ledgerate::conventions::ratio::Ratio;
    /// assert_eq!(Ratio::new(15, 8).unwrap().to_decimal().unwrap().to_string(), "1.875");
    /// assert_eq!(Ratio::new(1, 3).unwrap().to_decimal().unwrap().to_string(), "0.3333333333333333333333333333");
    /// ```
    pub fn to_decimal(self) -> Option<Decimal> {
        let n = Decimal::try_from_i128_with_scale(self.num, 0).ok()?;
        let d = Decimal::try_from_i128_with_scale(self.den, 0).ok()?;
        n.checked_div(d).map(|x| x.normalize())
    }
}

impl fmt::Display for Ratio {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.den == 1 {
            write!(f, "{}", self.num)
        } else {
            write!(f, "{}/{}", self.num, self.den)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sums_are_exact_and_reduced() {
        let a = Ratio::new(61, 365).unwrap();
        let b = Ratio::new(121, 366).unwrap();
        let s = a.checked_add(b).unwrap();
        assert_eq!(s.to_string(), "66491/133590");
        assert_eq!(s.checked_sub(b), Some(a));
        assert_eq!(Ratio::new(3, -6).unwrap().to_string(), "-1/2");
        assert_eq!(Ratio::new(1, 0), None);
    }
}
