//! Fixed-point arithmetic for the day loop's common case: a sum or a
//! product of decimals done on their 96-bit mantissas as 128-bit integers
//! at one known scale, with no rust_decimal operation.
//!
//! docs/decisions.md, Fixed-point sums in the day loop. Every function here
//! gives exactly what the rust_decimal operation gives (the same value, the
//! same scale, the same sign) or `None`, and the caller then does the
//! decimal operation. It applies only where the integer result is exact by
//! construction: operands of one scale (a sum of two integers of scale s is
//! an integer of scale s; a product by a day count keeps the scale), a
//! nonzero result (so no zero's sign is decided here) and a magnitude
//! under 2^96 (a decimal's own limit, where rust_decimal would start to
//! round). This module never rounds, divides or approximates, and never
//! overflows silently: every step is checked.

use rust_decimal::Decimal;

/// The first magnitude a decimal's mantissa cannot hold.
const LIMIT: u128 = 1 << 96;

/// `a + b`, when the integers give it exactly: both nonzero at one scale
/// (or `b` a zero of no larger scale than a nonzero `a`), the sum nonzero
/// and within 96 bits.
///
/// ```
/// use ledgerate::engine::fixed::add;
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<Decimal>().unwrap();
/// assert_eq!(add(d("1.875"), d("0.125")).map(|x| x.to_string()), Some("2.000".to_string()));
/// assert_eq!(add(d("1.8"), d("0.25")), None); // two scales: the decimal sum decides
/// assert_eq!(add(d("1.25"), d("-1.25")), None); // zero: the decimal sum decides its sign
/// ```
#[inline]
pub fn add(a: Decimal, b: Decimal) -> Option<Decimal> {
    if b.is_zero() {
        return (!a.is_zero() && b.scale() <= a.scale()).then_some(a);
    }
    if a.scale() != b.scale() || a.is_zero() {
        return None;
    }
    // Each mantissa is under 2^96 in magnitude: the i128 sum cannot overflow.
    exact(a.mantissa().checked_add(b.mantissa())?, a.scale())
}

/// `a - b` on the same terms as [`add`].
#[inline]
pub fn sub(a: Decimal, b: Decimal) -> Option<Decimal> {
    add(a, -b)
}

/// `a x n` for an integer `n` (a count of days, a day-count numerator),
/// when the product is nonzero and within 96 bits at `a`'s scale.
///
/// ```
/// use ledgerate::engine::fixed::mul_int;
/// use rust_decimal::Decimal;
/// let x: Decimal = "22.5000".parse().unwrap();
/// assert_eq!(mul_int(x, 30).map(|x| x.to_string()), Some("675.0000".to_string()));
/// assert_eq!(mul_int(x, 0), None);
/// ```
#[inline]
pub fn mul_int(a: Decimal, n: i64) -> Option<Decimal> {
    if a.is_zero() || n == 0 {
        return None;
    }
    exact(a.mantissa().checked_mul(i128::from(n))?, a.scale())
}

/// The decimal of mantissa `m` at `scale`, when nonzero and within 96 bits.
#[inline]
fn exact(m: i128, scale: u32) -> Option<Decimal> {
    if m == 0 || m.unsigned_abs() >= LIMIT {
        return None;
    }
    Decimal::try_from_i128_with_scale(m, scale).ok()
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Any decimal: mantissas up to the 96-bit limit (and small ones, and
    /// zeros of every scale and sign), scales 0 to 28.
    fn any_decimal() -> impl Strategy<Value = Decimal> {
        let mantissa = prop_oneof![
            -1_000_000_000i128..1_000_000_000,
            -(1i128 << 96) + 1..(1i128 << 96),
            Just(0i128),
            Just((1i128 << 96) - 1),
            Just(-(1i128 << 96) + 1),
        ];
        (mantissa, prop_oneof![0u32..4, 0u32..=28], any::<bool>()).prop_map(|(m, s, neg)| {
            let mut x = Decimal::from_i128_with_scale(m, s);
            if m == 0 && neg {
                x.set_sign_negative(true);
            }
            x
        })
    }

    /// Two decimals agree to the last bit: value, scale and sign.
    fn same(a: Decimal, b: Decimal) -> bool {
        a.serialize() == b.serialize()
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(4000))]

        /// The integer sum is the decimal sum, to the last digit, scale and sign.
        #[test]
        fn the_integer_sum_is_the_decimal_sum(a in any_decimal(), b in any_decimal(), same_scale in any::<bool>()) {
            let b = if same_scale { Decimal::from_i128_with_scale(b.mantissa(), a.scale()) } else { b };
            if let Some(x) = add(a, b) {
                let want = a.checked_add(b);
                prop_assert!(want.is_some_and(|w| same(x, w)), "{a:?} + {b:?}: {x:?} vs {want:?}");
            }
            if let Some(x) = sub(a, b) {
                let want = a.checked_sub(b);
                prop_assert!(want.is_some_and(|w| same(x, w)), "{a:?} - {b:?}: {x:?} vs {want:?}");
            }
        }

        /// The integer product by a day count is the decimal product.
        #[test]
        fn the_integer_product_is_the_decimal_product(a in any_decimal(), n in prop_oneof![-400i64..400, any::<i64>()]) {
            if let Some(x) = mul_int(a, n) {
                let want = a.checked_mul(Decimal::from(n));
                prop_assert!(want.is_some_and(|w| same(x, w)), "{a:?} x {n}: {x:?} vs {want:?}");
            }
        }
    }

    /// The common case does take the integer path (the law above is not
    /// met by always declining).
    #[test]
    fn the_common_case_is_integer() {
        let d = |s: &str| s.parse::<Decimal>().unwrap();
        assert!(add(d("1234567.89"), d("0.01")).is_some());
        assert!(sub(d("1234567.89"), Decimal::ZERO).is_some());
        assert!(mul_int(d("1234567.890000"), 365).is_some());
    }
}
