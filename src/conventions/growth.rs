//! Growth arithmetic (provisional version; the full module replaces it).

use rust_decimal::{Decimal, MathematicalOps};

use super::compounding::Compounding;

/// A growth figure that cannot be computed.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum GrowthError {
    /// Too large for a decimal.
    #[error("{what} overflowed")]
    Overflow { what: &'static str },
    /// Outside the function's domain.
    #[error("{what} is outside the domain")]
    Domain { what: &'static str },
}

/// e^x - 1.
pub fn exp_m1(x: Decimal) -> Result<Decimal, GrowthError> {
    x.checked_exp()
        .map(|e| e - Decimal::ONE)
        .ok_or(GrowthError::Overflow { what: "exp" })
}

/// base^exponent - 1.
pub fn pow_m1(base: Decimal, exponent: Decimal) -> Result<Decimal, GrowthError> {
    if base <= Decimal::ZERO {
        return Err(GrowthError::Domain { what: "power" });
    }
    base.checked_powd(exponent)
        .map(|p| p - Decimal::ONE)
        .ok_or(GrowthError::Overflow { what: "power" })
}

/// The effective annual rate of a nominal rate.
pub fn effective_annual_rate(c: Compounding, rate: Decimal) -> Result<Decimal, GrowthError> {
    let n: u32 = match c {
        Compounding::Simple | Compounding::AnnualEffective => return Ok(rate),
        Compounding::Continuous => return exp_m1(rate),
        Compounding::Daily => 365,
        other => 12 / other.months().unwrap_or(12),
    };
    let per = rate / Decimal::from(n);
    (Decimal::ONE + per)
        .checked_powu(u64::from(n))
        .map(|p| p - Decimal::ONE)
        .ok_or(GrowthError::Overflow { what: "power" })
}
