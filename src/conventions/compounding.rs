//! When accrued interest joins the interest-bearing base.
//!
//! The names and their meaning only; the growth arithmetic (exp, fractional
//! powers, effective annual rates) lives in [`super::growth`]. This module never
//! reads files or prints.

use super::names::{lookup, UnknownName};

/// A compounding rule (behaviour.md, Daily interest and compounding).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum Compounding {
    /// Never, until a capitalising posting.
    #[default]
    Simple,
    /// Each day's interest joins the base from the next day.
    Daily,
    /// At the end of each month rolled from the posting anchor.
    Monthly,
    /// At the end of each quarter rolled from the posting anchor.
    Quarterly,
    /// At the end of each half-year rolled from the posting anchor.
    Semiannual,
    /// At the end of each year rolled from the posting anchor.
    Annual,
    /// i(D) = B x (exp(r x f) - 1), joining daily.
    Continuous,
    /// i(D) = B x ((1 + r)^f - 1), joining daily: a rate quoted as an effective yield.
    AnnualEffective,
}

const SPELLINGS: &[(&str, Compounding)] = &[
    ("simple", Compounding::Simple),
    ("none", Compounding::Simple),
    ("daily", Compounding::Daily),
    ("monthly", Compounding::Monthly),
    ("quarterly", Compounding::Quarterly),
    ("semiannual", Compounding::Semiannual),
    ("semiannually", Compounding::Semiannual),
    ("half-yearly", Compounding::Semiannual),
    ("annual", Compounding::Annual),
    ("annually", Compounding::Annual),
    ("yearly", Compounding::Annual),
    ("continuous", Compounding::Continuous),
    ("annual-effective", Compounding::AnnualEffective),
    ("effective", Compounding::AnnualEffective),
];

impl Compounding {
    /// Every rule, in the order of behaviour.md, Daily interest and compounding.
    pub const ALL: [Compounding; 8] = [
        Self::Simple,
        Self::Daily,
        Self::Monthly,
        Self::Quarterly,
        Self::Semiannual,
        Self::Annual,
        Self::Continuous,
        Self::AnnualEffective,
    ];

    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            Self::Simple => "simple",
            Self::Daily => "daily",
            Self::Monthly => "monthly",
            Self::Quarterly => "quarterly",
            Self::Semiannual => "semiannual",
            Self::Annual => "annual",
            Self::Continuous => "continuous",
            Self::AnnualEffective => "annual-effective",
        }
    }

    /// Parses a compounding name (case, spaces, `_` and `-` ignored).
    ///
    /// # Errors
    /// [`UnknownName`] listing the accepted names and the closest one.
    ///
    /// ```
    /// use ledgerate::conventions::compounding::Compounding;
    /// assert_eq!(Compounding::parse("Semi-Annual"), Ok(Compounding::Semiannual));
    /// assert!(Compounding::parse("quartely").unwrap_err().to_string().contains("did you mean 'quarterly'"));
    /// ```
    pub fn parse(name: &str) -> Result<Self, UnknownName> {
        let accepted: Vec<&str> = Self::ALL.iter().map(|c| c.name()).collect();
        lookup("compounding", name, SPELLINGS, &accepted)
    }

    /// Months between compounding ends for the periodic rules, else `None`.
    pub fn months(self) -> Option<u32> {
        match self {
            Self::Monthly => Some(1),
            Self::Quarterly => Some(3),
            Self::Semiannual => Some(6),
            Self::Annual => Some(12),
            _ => None,
        }
    }

    /// Whether interest joins the base every day (daily, continuous, annual-effective).
    pub fn joins_daily(self) -> bool {
        matches!(self, Self::Daily | Self::Continuous | Self::AnnualEffective)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip() {
        for c in Compounding::ALL {
            assert_eq!(Compounding::parse(c.name()), Ok(c));
        }
    }

    #[test]
    fn periodic_rules_know_their_months() {
        assert_eq!(Compounding::Quarterly.months(), Some(3));
        assert_eq!(Compounding::Daily.months(), None);
        assert!(Compounding::Continuous.joins_daily());
        assert!(!Compounding::Monthly.joins_daily());
    }
}
