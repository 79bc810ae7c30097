//! Growth arithmetic for compounding: `e^x - 1`, fractional powers, the
//! growth factor of a rate over a term, effective annual rates
//! (behaviour.md, Cut-off figures) and the annual percentage yield of US
//! Regulation DD Appendix A.
//!
//! Everything is decimal ([`Decimal`]), good to about 26 significant digits,
//! and never passes through binary floating point. The `_m1` forms return the
//! growth less one, which is what a day's interest needs (balance times
//! growth less one). Overflow and arguments outside a function's domain are a
//! [`GrowthError`], never a panic.
//!
//! This module never reads files, prints, or looks at the clock or the
//! environment.

use rust_decimal::prelude::ToPrimitive;
use rust_decimal::{Decimal, MathematicalOps};

use super::compounding::Compounding;

/// Why a growth figure could not be computed.
///
/// ```
/// use ledgerate::conventions::growth::{pow_m1, GrowthError};
/// use rust_decimal::Decimal;
/// let e = pow_m1(Decimal::ZERO, Decimal::ONE).unwrap_err();
/// assert!(matches!(e, GrowthError::Domain { .. }));
/// assert_eq!(e.to_string(), "out of domain: the base of a power must be above zero");
/// ```
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum GrowthError {
    /// The result (or a step towards it) is beyond the range of [`Decimal`].
    #[error("overflow computing {what}; the rate or the term is too large")]
    Overflow {
        /// The figure being computed, for example `a power`.
        what: &'static str,
    },
    /// An argument outside the function's domain.
    #[error("out of domain: {what}")]
    Domain {
        /// The condition that was not met.
        what: &'static str,
    },
}

/// 0.5: below this magnitude `e^x - 1` is summed as a series (about 8 terms
/// for a day's rate, 23 at the limit); above it `e^x` is as good and quicker.
const SERIES_LIMIT: Decimal = Decimal::from_parts(5, 0, 0, false, 1);

/// 1e-28, the last place of a [`Decimal`] below 1: a series term whose size
/// relative to the first falls under it no longer changes the sum.
const LAST_PLACE: Decimal = Decimal::from_parts(1, 0, 0, false, 28);

/// More than the series ever needs below [`SERIES_LIMIT`] (23 terms).
const MAX_TERMS: u32 = 60;

/// The year of US Regulation DD Appendix A, used for daily compounding.
const DAYS_IN_YEAR: u32 = 365;

fn overflow(what: &'static str) -> GrowthError {
    GrowthError::Overflow { what }
}

fn domain(what: &'static str) -> GrowthError {
    GrowthError::Domain { what }
}

/// `e^x - 1`, accurate relative to the result even for a small `x`.
///
/// For `|x| < 0.5` the Taylor series is summed in Horner form,
/// `x (1 + x/2 (1 + x/3 (1 + ...)))`; every bracket stays near 1, so the
/// result is good to about a unit of its 28th decimal place. That is 26 or
/// more significant digits down to `|x|` near 0.01, and fewer below, where
/// the 28 places of [`Decimal`] hold fewer digits (about 18 at 1e-10).
/// Larger `x` go through `e^x`. Below about `x = -66`, `e^x` is under the
/// last decimal place and the result is exactly `-1`.
///
/// # Errors
/// [`GrowthError::Overflow`] when `e^x` exceeds the range of [`Decimal`]
/// (`x` above about 66).
///
/// ```
/// use ledgerate::conventions::growth::exp_m1;
/// use rust_decimal::Decimal;
/// let x: Decimal = "0.0000000001".parse().unwrap();
/// assert_eq!(exp_m1(x).unwrap().to_string(), "0.0000000001000000000050000000");
/// assert_eq!(exp_m1(Decimal::ZERO).unwrap(), Decimal::ZERO);
/// assert!(exp_m1(Decimal::from(1000)).is_err());
/// ```
pub fn exp_m1(x: Decimal) -> Result<Decimal, GrowthError> {
    if x.is_zero() {
        return Ok(Decimal::ZERO);
    }
    if x.abs() < SERIES_LIMIT {
        return exp_m1_series(x);
    }
    match x.checked_exp() {
        Some(e) => e.checked_sub(Decimal::ONE).ok_or(overflow("e^x")),
        // e^x of a very negative x only fails because 1 / e^-x overflows; the
        // true e^x is then below half of the last place.
        None if x.is_sign_negative() => Ok(Decimal::NEGATIVE_ONE),
        None => Err(overflow("e^x")),
    }
}

/// The series of [`exp_m1`] for `0 < |x| < 0.5`.
fn exp_m1_series(x: Decimal) -> Result<Decimal, GrowthError> {
    let err = || overflow("e^x");
    let ax = x.abs();
    // The number of terms n: |x|^(n-1) / n!, the last term relative to the
    // first, has fallen under the last place.
    let mut n: u32 = 1;
    let mut relative = Decimal::ONE;
    while relative > LAST_PLACE && n < MAX_TERMS {
        n += 1;
        relative = relative
            .checked_mul(ax)
            .and_then(|t| t.checked_div(Decimal::from(n)))
            .ok_or_else(err)?;
    }
    // Horner from the innermost bracket out; every bracket stays near 1, so
    // each step rounds in the 28th significant digit.
    let mut s = Decimal::ONE;
    for k in (2..=n).rev() {
        s = s
            .checked_mul(x)
            .and_then(|t| t.checked_div(Decimal::from(k)))
            .and_then(|t| t.checked_add(Decimal::ONE))
            .ok_or_else(err)?;
    }
    x.checked_mul(s).ok_or_else(err)
}

/// `base^exponent - 1` for a positive `base` and any `exponent`.
///
/// An integer exponent is a repeated product (exact whenever the result fits
/// in 28 decimal places, so `1.02^4 - 1` is exactly `0.08243216`); any other
/// exponent goes through `exp_m1(exponent x ln(base))`.
///
/// # Errors
/// [`GrowthError::Domain`] for `base <= 0` (checked before anything else);
/// [`GrowthError::Overflow`] when the power exceeds the range of [`Decimal`].
///
/// ```
/// use ledgerate::conventions::growth::pow_m1;
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<Decimal>().unwrap();
/// assert_eq!(pow_m1(d("1.02"), d("4")).unwrap(), d("0.08243216"));
/// assert_eq!(pow_m1(d("1.05"), d("0.5")).unwrap().round_dp(10), d("0.0246950766"));
/// assert_eq!(pow_m1(d("1.05"), Decimal::ZERO).unwrap(), Decimal::ZERO);
/// assert!(pow_m1(Decimal::ZERO, d("0.5")).is_err());
/// ```
pub fn pow_m1(base: Decimal, exponent: Decimal) -> Result<Decimal, GrowthError> {
    if base <= Decimal::ZERO {
        return Err(domain("the base of a power must be above zero"));
    }
    if exponent.is_zero() || base == Decimal::ONE {
        return Ok(Decimal::ZERO);
    }
    if exponent.is_integer() {
        // When the product leaves the range (a huge exponent), the logarithm
        // below tells an overflow from a result that rounds to -1.
        if let Some(p) = exponent.to_i64().and_then(|n| base.checked_powi(n)) {
            return p.checked_sub(Decimal::ONE).ok_or(overflow("a power"));
        }
    }
    let ln = base
        .checked_ln()
        .ok_or(domain("the base of a power must be above zero"))?;
    let y = exponent.checked_mul(ln).ok_or(overflow("a power"))?;
    exp_m1(y).map_err(|_| overflow("a power"))
}

/// What 1 unit grows to at nominal annual `rate` over `years` under
/// compounding `c`:
///
/// * simple: `1 + r t`;
/// * daily, monthly, quarterly, semiannual, annual: `(1 + r/n)^(n t)` with
///   `n` = 365, 12, 4, 2, 1 (a 365-day year, as in US Regulation DD
///   Appendix A), fractional periods included;
/// * continuous: `e^(r t)`;
/// * annual-effective: `(1 + r)^t`, the rate being an effective yield.
///
/// A negative `years` discounts.
///
/// # Errors
/// [`GrowthError::Domain`] when the rate per period is at or below -100%
/// (periodic and annual-effective); [`GrowthError::Overflow`] when the
/// factor exceeds the range of [`Decimal`].
///
/// ```
/// use ledgerate::conventions::{compounding::Compounding, growth::growth_factor};
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<Decimal>().unwrap();
/// assert_eq!(growth_factor(Compounding::Semiannual, d("0.05"), Decimal::ONE).unwrap(), d("1.050625"));
/// assert_eq!(growth_factor(Compounding::Simple, d("0.05"), d("0.5")).unwrap(), d("1.025"));
/// ```
pub fn growth_factor(
    c: Compounding,
    rate: Decimal,
    years: Decimal,
) -> Result<Decimal, GrowthError> {
    growth_m1(c, rate, years)?
        .checked_add(Decimal::ONE)
        .ok_or(overflow("a growth factor"))
}

/// The effective annual rate of nominal annual `rate` under compounding `c`
/// (behaviour.md, Cut-off figures): `(1 + r/n)^n - 1` for the periodic rules (n = 365
/// for daily), `e^r - 1` for continuous, `r` itself for simple and
/// annual-effective.
///
/// # Errors
/// As [`growth_factor`] over one year.
///
/// ```
/// use ledgerate::conventions::{compounding::Compounding, growth::effective_annual_rate};
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<Decimal>().unwrap();
/// assert_eq!(effective_annual_rate(Compounding::Quarterly, d("0.08")).unwrap(), d("0.08243216"));
/// assert_eq!(effective_annual_rate(Compounding::Simple, d("0.08")).unwrap(), d("0.08"));
/// ```
pub fn effective_annual_rate(c: Compounding, rate: Decimal) -> Result<Decimal, GrowthError> {
    growth_m1(c, rate, Decimal::ONE)
}

/// The growth factor less one, computed without forming the factor.
fn growth_m1(c: Compounding, rate: Decimal, years: Decimal) -> Result<Decimal, GrowthError> {
    let err = || overflow("a growth factor");
    match c {
        Compounding::Simple => rate.checked_mul(years).ok_or_else(err),
        Compounding::Continuous => {
            exp_m1(rate.checked_mul(years).ok_or_else(err)?).map_err(|_| err())
        }
        Compounding::AnnualEffective => {
            let base = Decimal::ONE.checked_add(rate).ok_or_else(err)?;
            if base <= Decimal::ZERO {
                return Err(domain("an effective annual rate must be above -100%"));
            }
            pow_m1(base, years)
        }
        Compounding::Daily => periodic_m1(rate, years, DAYS_IN_YEAR),
        Compounding::Monthly => periodic_m1(rate, years, 12),
        Compounding::Quarterly => periodic_m1(rate, years, 4),
        Compounding::Semiannual => periodic_m1(rate, years, 2),
        Compounding::Annual => periodic_m1(rate, years, 1),
    }
}

/// `(1 + r/n)^(n t) - 1`.
fn periodic_m1(rate: Decimal, years: Decimal, n: u32) -> Result<Decimal, GrowthError> {
    let err = || overflow("a growth factor");
    let n = Decimal::from(n);
    let base = rate
        .checked_div(n)
        .and_then(|r| r.checked_add(Decimal::ONE))
        .ok_or_else(err)?;
    if base <= Decimal::ZERO {
        return Err(domain(
            "the rate per compounding period must be above -100%",
        ));
    }
    pow_m1(base, n.checked_mul(years).ok_or_else(err)?)
}

/// The annual percentage yield of US Regulation DD (12 CFR 1030) Appendix A,
/// in percent and unrounded:
/// `APY = 100 x ((1 + interest / principal)^(365 / days) - 1)`.
///
/// Part I uses the interest over the term of an account and its principal;
/// Part II (APY earned on a statement) uses the interest earned in the period
/// and the average daily balance. For a 365-day term it reduces to
/// `100 x interest / principal`, exactly. The regulation discloses the figure
/// rounded to two decimals; that rounding is the caller's.
///
/// # Errors
/// [`GrowthError::Domain`] when `principal <= 0`, `days == 0`, or the
/// interest loses the whole principal; [`GrowthError::Overflow`] when the
/// yield exceeds the range of [`Decimal`].
///
/// ```
/// use ledgerate::conventions::growth::apy_from_interest;
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<Decimal>().unwrap();
/// assert_eq!(apy_from_interest(d("61.68"), d("1000"), 365).unwrap(), d("6.168"));
/// let six_months = apy_from_interest(d("30.37"), d("1000"), 182).unwrap();
/// assert_eq!(six_months.round_dp(2), d("6.18"));
/// ```
pub fn apy_from_interest(
    interest: Decimal,
    principal: Decimal,
    days: u32,
) -> Result<Decimal, GrowthError> {
    let err = || overflow("an annual percentage yield");
    if principal <= Decimal::ZERO {
        return Err(domain("the principal or balance must be above zero"));
    }
    if days == 0 {
        return Err(domain("the term must be at least one day"));
    }
    let base = interest
        .checked_div(principal)
        .and_then(|x| x.checked_add(Decimal::ONE))
        .ok_or_else(err)?;
    if base <= Decimal::ZERO {
        return Err(domain("the interest must not lose the whole principal"));
    }
    let exponent = Decimal::from(DAYS_IN_YEAR)
        .checked_div(Decimal::from(days))
        .ok_or_else(err)?;
    pow_m1(base, exponent)
        .map_err(|_| err())?
        .checked_mul(Decimal::ONE_HUNDRED)
        .ok_or_else(err)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::conventions::rounding::RoundMode;
    use proptest::prelude::*;
    use Compounding::*;

    fn d(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    fn frac(num: i64, den: i64) -> Decimal {
        Decimal::from(num) / Decimal::from(den)
    }

    /// |got - reference| / |reference|. The reference is a mantissa with an
    /// optional negative power of ten (`1.05e-10`), and `got` is scaled by it
    /// before the comparison, so a tiny reference keeps all its digits. A
    /// reference without a power is read to 28 places; for the values used
    /// (all above 1e-4) that costs under 1e-24 of relative error.
    fn rel_err(got: Decimal, reference: &str) -> Decimal {
        let (mantissa, places) = match reference.split_once('e') {
            Some((m, e)) => (d(m), e.strip_prefix('-').unwrap().parse::<u32>().unwrap()),
            None => (d(reference), 0),
        };
        let scale = Decimal::from_i128_with_scale(10i128.pow(places), 0);
        let scaled = got.checked_mul(scale).unwrap();
        ((scaled - mantissa) / mantissa).abs()
    }

    fn assert_20_digits(got: Decimal, reference: &str) {
        let e = rel_err(got, reference);
        assert!(
            e < d("1e-20"),
            "got {got}, reference {reference}, relative error {e}"
        );
    }

    fn pct2(x: Decimal) -> Decimal {
        RoundMode::HalfUp.round(x, 2)
    }

    // reference value: Python decimal, prec 50
    #[test]
    fn exp_m1_agrees_to_20_digits() {
        let rows = [
            (
                "0.0000000001",
                "1.000000000050000000001666666666708333333e-10",
            ),
            (
                "0.0001369863",
                "0.0001369956830516387962113252188333684136273829568",
            ),
            (
                "0.05",
                "0.0512710963760240396975176363356452201748212960551",
            ),
            (
                "-0.05",
                "-0.04877057549928599090857468022034783934291255065963",
            ),
            ("1", "1.7182818284590452353602874713526624977572470937000"),
            (
                "-0.005",
                "-0.00498752080731768664743575376749581461409156402768",
            ),
        ];
        for (x, reference) in rows {
            assert_20_digits(exp_m1(d(x)).unwrap(), reference);
        }
    }

    // reference value: Python decimal, prec 50
    #[test]
    fn pow_m1_agrees_to_20_digits() {
        assert_20_digits(
            pow_m1(d("1.05"), frac(1, 252)).unwrap(),
            "0.0001936305065440798742591239584701652739834373373",
        );
        assert_20_digits(
            pow_m1(d("1.05"), frac(30, 365)).unwrap(),
            "0.0040182018919749210421469820488934919614815743960",
        );
        assert_20_digits(
            pow_m1(d("1.05"), d("0.5")).unwrap(),
            "0.0246950765959598383221038680521051990735032663455",
        );
    }

    // Exact arithmetic: integer powers and degenerate arguments (common
    // practice, no source).
    #[test]
    fn pow_m1_exact_cases() {
        assert_eq!(pow_m1(d("1.02"), d("4")).unwrap(), d("0.08243216"));
        assert_eq!(
            pow_m1(d("1.0125"), d("4.000")).unwrap(),
            d("0.0509453369140625")
        );
        assert_eq!(pow_m1(d("2"), d("-2")).unwrap(), d("-0.75"));
        assert_eq!(pow_m1(d("1.05"), d("1")).unwrap(), d("0.05"));
        assert_eq!(pow_m1(d("1.05"), Decimal::ZERO).unwrap(), Decimal::ZERO);
        assert_eq!(pow_m1(Decimal::ONE, d("0.3")).unwrap(), Decimal::ZERO);
    }

    // Source: common practice, no source (5% a year on 1).
    #[test]
    fn five_percent_a_year() {
        let r = d("0.05");
        assert_eq!(growth_factor(Annual, r, Decimal::ONE).unwrap(), d("1.05"));
        assert_eq!(
            growth_factor(Semiannual, r, Decimal::ONE).unwrap(),
            d("1.050625")
        );
        let quarterly = growth_factor(Quarterly, r, Decimal::ONE).unwrap();
        assert_eq!(quarterly.round_dp(7), d("1.0509453"));
        // 1.0125^4 terminates, so it is exact (exact arithmetic).
        assert_eq!(quarterly, d("1.0509453369140625"));
        let continuous = growth_factor(Continuous, r, Decimal::ONE).unwrap();
        assert_eq!(continuous.round_dp(7), d("1.0512711"));
        assert_eq!(growth_factor(Simple, r, d("2")).unwrap(), d("1.10"));
        assert_eq!(
            growth_factor(AnnualEffective, r, d("2")).unwrap(),
            d("1.1025")
        );
    }

    // Source: conventions reference 3.2, EAR of a 5% nominal rate (computed
    // there with exact fractions from EAR = (1 + r/n)^n - 1 and e^r - 1).
    #[test]
    fn effective_annual_rate_of_five_percent() {
        let r = d("0.05");
        let rows = [
            (Annual, "0.0500000000"),
            (Semiannual, "0.0506250000"),
            (Quarterly, "0.0509453369"),
            (Monthly, "0.0511618979"),
            (Daily, "0.0512674965"),
            (Continuous, "0.0512710964"),
        ];
        for (c, ear) in rows {
            let got = effective_annual_rate(c, r).unwrap();
            assert_eq!(got.round_dp(10), d(ear), "{c:?}");
        }
        // behaviour.md, Cut-off figures: the rate itself for simple and annual-effective.
        assert_eq!(effective_annual_rate(Simple, r).unwrap(), r);
        assert_eq!(effective_annual_rate(AnnualEffective, r).unwrap(), r);
    }

    // reference value: Python decimal, prec 50
    #[test]
    fn effective_annual_rate_to_20_digits() {
        let r = d("0.05");
        let rows = [
            (
                Monthly,
                "0.0511618978817331898048738909608000985268885538223",
            ),
            (Daily, "0.0512674964674625504549681497737954610215309986607"),
            (
                Continuous,
                "0.0512710963760240396975176363356452201748212960551",
            ),
        ];
        for (c, reference) in rows {
            assert_20_digits(effective_annual_rate(c, r).unwrap(), reference);
        }
        // A negative rate shrinks the balance.
        assert_20_digits(
            effective_annual_rate(Monthly, d("-0.005")).unwrap(),
            "-0.00498855756610875529395164457518632629022599363217",
        );
    }

    // Source: QuantLib test-suite/interestrates.cpp testConversions, data from
    // Haug, Option Pricing Formulas, pp. 181-182 (4 places in the test); the
    // 10-place values are computed in the conventions reference 3.2.
    #[test]
    fn haug_rate_conversions() {
        let one = Decimal::ONE;
        // 12% continuous is 12.75% annual.
        let cont = effective_annual_rate(Continuous, d("0.12")).unwrap();
        assert_eq!(cont.round_dp(4), d("0.1275"));
        assert_eq!(cont.round_dp(10), d("0.1274968516"));
        // 8% quarterly is 8.24% annual ...
        let quarterly = effective_annual_rate(Quarterly, d("0.08")).unwrap();
        assert_eq!(quarterly, d("0.08243216"));
        assert_eq!(quarterly.round_dp(10), d("0.0824321600"));
        // ... and 7.92% continuous (4 ln 1.02 = 0.0792105092).
        let back = effective_annual_rate(Continuous, d("0.0792105092")).unwrap();
        assert_eq!(back.round_dp(9), d("0.082432160"));
        // 7% quarterly is 7.06125% semiannual: 1.0175^2 = 1.03530625 exactly.
        assert_eq!(
            growth_factor(Quarterly, d("0.07"), one).unwrap(),
            growth_factor(Semiannual, d("0.0706125"), one).unwrap()
        );
        // Over one period a compounded rate equals the simple rate.
        let same = [
            (Annual, "0.01", one),
            (Semiannual, "0.03", d("0.5")),
            (Quarterly, "0.05", d("0.25")),
        ];
        for (c, r, t) in same {
            assert_eq!(
                growth_factor(c, d(r), t).unwrap(),
                growth_factor(Simple, d(r), t).unwrap(),
                "{c:?}"
            );
        }
        // A month is 1/12, which has no exact decimal: agreement to 20 places.
        for r in ["0.09", "0.10"] {
            let t = frac(1, 12);
            let gap =
                growth_factor(Monthly, d(r), t).unwrap() - growth_factor(Simple, d(r), t).unwrap();
            assert!(gap.abs() < d("1e-20"), "{r}: {gap}");
        }
    }

    // Source: US Regulation DD (12 CFR 1030) Appendix A, Part I general
    // formula; "for a 365-day term this reduces to 100 x interest / principal".
    #[test]
    fn apy_formula_over_a_year_is_the_plain_ratio() {
        assert_eq!(
            apy_from_interest(d("61.68"), d("1000"), 365).unwrap(),
            d("6.168")
        );
        assert_eq!(
            apy_from_interest(d("0"), d("1000"), 30).unwrap(),
            Decimal::ZERO
        );
        // 73 days divide the year: an integer power, exact.
        let exact = apy_from_interest(d("10"), d("1000"), 73).unwrap();
        assert_eq!(exact, d("5.10100501"));
    }

    // Source: US Regulation DD (12 CFR 1030) Appendix A, Part I examples, seen
    // only as secondary quotations of the regulation text (conventions
    // reference 3.3: likely but not primary-confirmed; figures recomputed there).
    #[test]
    fn reg_dd_part_one_examples() {
        // $61.68 on $1,000 over 365 days: 6.17%.
        let a = apy_from_interest(d("61.68"), d("1000"), 365).unwrap();
        assert_eq!(pct2(a), d("6.17"));
        // $30.37 on a $1,000 six-month certificate of 182 days: 6.18%.
        let b = apy_from_interest(d("30.37"), d("1000"), 182).unwrap();
        assert_eq!(pct2(b), d("6.18"));
        // reference value: Python decimal, prec 50
        assert_20_digits(b, "6.1836871972666675559701474407985017054665050938100");
    }

    // Source: US Regulation DD (12 CFR 1030) Appendix A, Part II formula (APY
    // earned), consumerfinance.gov commentary to Appendix A; the figures are
    // the conventions reference's computed example, not the regulation's.
    #[test]
    fn reg_dd_part_two_apy_earned_computed() {
        // $3.82 on an average daily balance of $1,500 over 31 days: 3.04%.
        let a = apy_from_interest(d("3.82"), d("1500"), 31).unwrap();
        assert_eq!(pct2(a), d("3.04"));
        // reference value: Python decimal, prec 50
        assert_20_digits(a, "3.0399746249681625751600618660149970803336109910500");
    }

    // Source: US Regulation DD (12 CFR 1030) Appendix A, Part II example, seen
    // only as a secondary quotation of the regulation (conventions reference 3.3).
    #[test]
    fn reg_dd_part_two_apy_earned_quoted() {
        // $5.25 on an average daily balance of $1,000 over 30 days: 6.58%.
        let a = apy_from_interest(d("5.25"), d("1000"), 30).unwrap();
        assert_eq!(pct2(a), d("6.58"));
    }

    // Source: US Regulation DD (12 CFR 1030) Appendix A, tiering Method A
    // example (ecfr.io), daily compounding over 365 days; the unrounded
    // interest is computed in the conventions reference 3.3.
    #[test]
    fn reg_dd_tiering_method_a() {
        let rows = [
            ("1000", "0.0525", "53.8986", "53.90", "5.39"),
            ("8000", "0.0550", "452.2899", "452.29", "5.65"),
            ("20000", "0.0575", "1183.6095", "1183.61", "5.92"),
        ];
        for (balance, rate, unrounded, interest, apy) in rows {
            let factor = growth_factor(Daily, d(rate), Decimal::ONE).unwrap();
            let earned = d(balance) * (factor - Decimal::ONE);
            assert_eq!(earned.round_dp(4), d(unrounded), "{balance}");
            let posted = RoundMode::HalfUp.round(earned, 2);
            assert_eq!(posted, d(interest), "{balance}");
            let yield_pct = apy_from_interest(posted, d(balance), 365).unwrap();
            assert_eq!(pct2(yield_pct), d(apy), "{balance}");
        }
    }

    // Source: US Regulation DD (12 CFR 1030) Appendix A stepped-rate example,
    // from memory (unconfirmed wording, conventions reference 3.3): $1,000 for
    // 91 days at 5.00% then 92 days at 5.50%, daily compounding.
    #[test]
    fn reg_dd_stepped_rate_from_memory() {
        let first = growth_factor(Daily, d("0.05"), frac(91, 365)).unwrap();
        let second = growth_factor(Daily, d("0.055"), frac(92, 365)).unwrap();
        let earned = d("1000") * (first * second - Decimal::ONE);
        // reference value: Python decimal, prec 50
        assert_20_digits(
            earned,
            "26.676482361924301956317818256910010445856274960300",
        );
        let posted = RoundMode::HalfUp.round(earned, 2);
        assert_eq!(posted, d("26.68"));
        let apy = apy_from_interest(posted, d("1000"), 183).unwrap();
        assert_eq!(pct2(apy), d("5.39"));
    }

    #[test]
    fn overflow_is_an_error_not_a_panic() {
        let e = exp_m1(d("1000")).unwrap_err();
        assert_eq!(e, GrowthError::Overflow { what: "e^x" });
        assert_eq!(
            e.to_string(),
            "overflow computing e^x; the rate or the term is too large"
        );
        assert!(exp_m1(d("67")).is_err());
        assert!(exp_m1(d("66")).is_ok());
        assert_eq!(
            pow_m1(d("2"), d("1000")),
            Err(GrowthError::Overflow { what: "a power" })
        );
        assert_eq!(
            pow_m1(d("2"), d("1000.5")),
            Err(GrowthError::Overflow { what: "a power" })
        );
        assert_eq!(
            growth_factor(Continuous, d("100"), Decimal::ONE),
            Err(GrowthError::Overflow {
                what: "a growth factor"
            })
        );
        assert!(growth_factor(Daily, Decimal::MAX, Decimal::ONE).is_err());
        assert!(growth_factor(Simple, Decimal::MAX, d("2")).is_err());
        assert!(apy_from_interest(d("1000000"), d("0.01"), 1).is_err());
    }

    // e^x below the last place: the result is -1 exactly (common practice, no source).
    #[test]
    fn vanishing_growth_rounds_to_minus_one() {
        assert_eq!(exp_m1(d("-1000")).unwrap(), Decimal::NEGATIVE_ONE);
        assert_eq!(pow_m1(d("0.5"), d("1000")).unwrap(), Decimal::NEGATIVE_ONE);
        assert_eq!(
            pow_m1(d("0.5"), d("1000.5")).unwrap(),
            Decimal::NEGATIVE_ONE
        );
    }

    #[test]
    fn domain_errors() {
        let base = GrowthError::Domain {
            what: "the base of a power must be above zero",
        };
        assert_eq!(pow_m1(Decimal::ZERO, d("0.5")), Err(base.clone()));
        assert_eq!(pow_m1(d("-1.05"), d("0.5")), Err(base.clone()));
        assert_eq!(pow_m1(d("-2"), d("2")), Err(base.clone()));
        assert_eq!(pow_m1(Decimal::ZERO, Decimal::ZERO), Err(base.clone()));
        assert_eq!(
            base.to_string(),
            "out of domain: the base of a power must be above zero"
        );
        assert_eq!(
            growth_factor(Monthly, d("-12"), Decimal::ONE),
            Err(GrowthError::Domain {
                what: "the rate per compounding period must be above -100%"
            })
        );
        assert!(growth_factor(Daily, d("-400"), d("0.5")).is_err());
        assert_eq!(
            growth_factor(AnnualEffective, d("-1"), d("0.5")),
            Err(GrowthError::Domain {
                what: "an effective annual rate must be above -100%"
            })
        );
        assert_eq!(
            apy_from_interest(d("1"), Decimal::ZERO, 30),
            Err(GrowthError::Domain {
                what: "the principal or balance must be above zero"
            })
        );
        assert!(apy_from_interest(d("1"), d("-1000"), 30).is_err());
        assert_eq!(
            apy_from_interest(d("1"), d("1000"), 0),
            Err(GrowthError::Domain {
                what: "the term must be at least one day"
            })
        );
        assert_eq!(
            apy_from_interest(d("-1000"), d("1000"), 30),
            Err(GrowthError::Domain {
                what: "the interest must not lose the whole principal"
            })
        );
    }

    // A negative term discounts: growing back undoes it (common practice, no source).
    #[test]
    fn negative_terms_discount() {
        let up = growth_factor(Daily, d("0.05"), Decimal::ONE).unwrap();
        let down = growth_factor(Daily, d("0.05"), Decimal::NEGATIVE_ONE).unwrap();
        assert!((up * down - Decimal::ONE).abs() < d("1e-25"));
    }

    // Both sides of the switch from the series to e^x (at |x| = 0.5) stay in
    // order: the steps are far above the rounding of either method.
    #[test]
    fn exp_m1_is_increasing_across_the_series_limit() {
        for centre in ["0.5", "-0.5"] {
            let step = d("1e-22");
            let mut x = d(centre) - step * Decimal::from(5);
            let mut last = exp_m1(x).unwrap();
            for _ in 0..10 {
                x += step;
                let next = exp_m1(x).unwrap();
                assert!(next > last, "at {x}");
                last = next;
            }
        }
    }

    proptest! {
        // exp_m1 + 1 is e^x (the library's exp, good to about 28 digits here).
        #[test]
        fn exp_m1_plus_one_is_exp(n in -3_000_000_000i64..3_000_000_000i64) {
            let x = Decimal::new(n, 9);
            let e = x.checked_exp().unwrap();
            let m = exp_m1(x).unwrap();
            prop_assert!((m + Decimal::ONE - e).abs() < d("1e-24"), "x = {}", x);
        }

        #[test]
        fn exp_m1_is_increasing(a in -3_000_000_000i64..3_000_000_000i64,
                                b in -3_000_000_000i64..3_000_000_000i64) {
            prop_assume!(a != b);
            let (lo, hi) = (Decimal::new(a.min(b), 9), Decimal::new(a.max(b), 9));
            prop_assert!(exp_m1(lo).unwrap() < exp_m1(hi).unwrap(), "{} < {}", lo, hi);
        }

        // Growing over t1 then t2 is growing over t1 + t2.
        #[test]
        fn growth_over_consecutive_terms_multiplies(
            c in prop::sample::select(vec![Daily, Monthly, Quarterly, Continuous, AnnualEffective]),
            bp in -500i64..2_000,
            d1 in 0i64..3_650,
            d2 in 0i64..3_650,
        ) {
            let r = Decimal::new(bp, 4);
            let (t1, t2) = (frac(d1, 365), frac(d2, 365));
            let whole = growth_factor(c, r, t1 + t2).unwrap();
            let parts = growth_factor(c, r, t1).unwrap() * growth_factor(c, r, t2).unwrap();
            prop_assert!(((whole - parts) / whole).abs() < d("1e-20"), "{:?} {} {} {}", c, r, t1, t2);
        }
    }
}
