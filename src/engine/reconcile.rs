//! Statement reconciliation (behaviour.md, Reconciliation): each statement
//! period's expected interest, balance-years, variance in money and basis
//! points, and status; and a "not posted" row for each posting the statements miss.
//!
//! Pure: works on an [`AccountResult`] computed with spans (or day rows),
//! broken at the statement periods' boundaries. The search
//! for a likely cause lives in [`super::causes`].

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::accrual::Accrual;
use super::run::AccountResult;
use super::terms::AccountTerms;
use super::EngineError;

/// How far a posted amount may be from the expected one and still be accepted.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Tolerance {
    /// In units of the row's currency; `None`: one minor unit.
    pub amount: Option<Decimal>,
    /// As an annual rate gap in basis points.
    pub bp: Decimal,
}

impl Tolerance {
    /// The amount tolerance for a currency with `minor_units` places.
    pub fn amount_for(&self, minor_units: u32) -> Decimal {
        self.amount.unwrap_or_else(|| Decimal::new(1, minor_units))
    }

    /// Whether a variance is within tolerance: by amount, or by unrounded basis points.
    pub fn accepts(
        &self,
        variance: Decimal,
        variance_bp: Option<Decimal>,
        minor_units: u32,
    ) -> bool {
        variance.abs() <= self.amount_for(minor_units)
            || variance_bp.is_some_and(|bp| bp.abs() <= self.bp)
    }
}

/// The status of a statement row, first that applies (behaviour.md, Reconciliation).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Status {
    /// Something was posted for a period in which no day had a base.
    UnexpectedPosting,
    /// Posted equals expected.
    Agrees,
    /// The variance is within tolerance.
    WithinTolerance,
    /// More was posted than expected.
    OverPosted,
    /// Less was posted than expected.
    UnderPosted,
    /// A posting period with interest that no statement row covers.
    NotPosted,
    /// A statement row of the account that could not be read: its figures
    /// are unknown, so it counts as an exception (behaviour.md, Reconciliation).
    StatementUnreadable,
}

impl Status {
    /// Every status, in the order a summary lists them.
    pub const ALL: [Status; 7] = [
        Status::Agrees,
        Status::WithinTolerance,
        Status::OverPosted,
        Status::UnderPosted,
        Status::NotPosted,
        Status::UnexpectedPosting,
        Status::StatementUnreadable,
    ];

    /// The word written in reports.
    pub fn name(self) -> &'static str {
        match self {
            Status::UnexpectedPosting => "unexpected posting",
            Status::Agrees => "agrees",
            Status::WithinTolerance => "within tolerance",
            Status::OverPosted => "over-posted",
            Status::UnderPosted => "under-posted",
            Status::NotPosted => "not posted",
            Status::StatementUnreadable => "statement unreadable",
        }
    }

    /// The status of a variance (posted - expected, and in basis points):
    /// agrees, within tolerance, or over- or under-posted.
    pub fn of_variance(
        variance: Decimal,
        variance_bp: Option<Decimal>,
        tolerance: &Tolerance,
        minor_units: u32,
    ) -> Status {
        if variance.is_zero() {
            Status::Agrees
        } else if tolerance.accepts(variance, variance_bp, minor_units) {
            Status::WithinTolerance
        } else if variance.is_sign_positive() {
            Status::OverPosted
        } else {
            Status::UnderPosted
        }
    }

    /// Whether a row of this status is outside tolerance and needs
    /// explaining: every status but `agrees` and `within tolerance`. The
    /// workbook's variance chart and `--fail-on-variance` both ask this one
    /// question.
    ///
    /// ```
    /// use ledgerate::engine::reconcile::Status;
    /// let outside: Vec<&str> = Status::ALL
    ///     .iter()
    ///     .filter(|s| s.outside_tolerance())
    ///     .map(|s| s.name())
    ///     .collect();
    /// assert_eq!(
    ///     outside,
    ///     ["over-posted", "under-posted", "not posted", "unexpected posting", "statement unreadable"]
    /// );
    /// assert!(!Status::Agrees.outside_tolerance());
    /// assert!(!Status::WithinTolerance.outside_tolerance());
    /// ```
    pub fn outside_tolerance(self) -> bool {
        !matches!(self, Status::Agrees | Status::WithinTolerance)
    }
}

/// One statement period of an account: the rows with the same period, summed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StatementPeriod {
    /// First day (inclusive).
    pub start: NaiveDate,
    /// Last day (inclusive).
    pub end: NaiveDate,
    /// Interest posted (the sum of the rows).
    pub posted: Decimal,
    /// How many rows were summed.
    pub rows: usize,
}

/// The expected side of a period: the engine's figures over S..E.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Expected {
    /// The postings inside S..E plus the rounded interest of uncovered days.
    pub amount: Decimal,
    /// Balance-years Y = sum of B(D) x f(D).
    pub balance_years: Decimal,
    /// Whether any day of S..E had a non-zero base.
    pub any_base: bool,
}

/// The engine's expected interest and balance-years over `start..=end`.
///
/// # Errors
/// [`EngineError::Overflow`] past the decimal range.
pub fn expected_over(
    terms: &AccountTerms,
    result: &AccountResult,
    start: NaiveDate,
    end: NaiveDate,
) -> Result<Expected, EngineError> {
    let overflow = |_| EngineError::Overflow {
        what: "the expected interest",
        date: end,
    };
    let inside: Vec<_> = result
        .postings
        .iter()
        .filter(|p| p.start >= start && p.end <= end)
        .collect();
    let mut amount = Decimal::ZERO;
    for p in &inside {
        amount = amount
            .checked_add(p.expected)
            .ok_or(EngineError::Overflow {
                what: "the expected interest",
                date: p.end,
            })?;
    }
    let mut uncovered = Accrual::new();
    let mut years = Accrual::new();
    let mut any_base = false;
    for span in result
        .spans
        .iter()
        .filter(|x| x.last >= start && x.first <= end)
    {
        // Runs of days end at every statement boundary (`Inputs::breaks`),
        // so a span lies wholly inside the period or wholly outside it.
        if span.first < start || span.last > end {
            return Err(EngineError::UnbrokenSpan(span.first));
        }
        if !span.base.is_zero() {
            any_base = true;
        }
        let by = span
            .base
            .checked_mul(Decimal::from(span.fraction.num))
            .ok_or(EngineError::Overflow {
                what: "the balance-years",
                date: span.first,
            })?;
        years
            .add_fraction(by, span.fraction.den)
            .map_err(overflow)?;
        // A span never crosses a posting period's end, so one day tells for all.
        if !inside
            .iter()
            .any(|p| p.start <= span.first && span.first <= p.end)
        {
            uncovered
                .add_fraction(span.interest_num, span.interest_den)
                .map_err(overflow)?;
        }
    }
    let rest = terms
        .round_mode
        .round(uncovered.value().map_err(overflow)?, terms.minor_units);
    Ok(Expected {
        amount: amount.checked_add(rest).ok_or(EngineError::Overflow {
            what: "the expected interest",
            date: end,
        })?,
        balance_years: years.value().map_err(overflow)?,
        any_base,
    })
}

/// One reconciled row.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Reconciled {
    /// First day.
    pub start: NaiveDate,
    /// Last day.
    pub end: NaiveDate,
    /// Days in the period.
    pub days: i64,
    /// Balance-years.
    pub balance_years: Decimal,
    /// Expected interest.
    pub expected: Decimal,
    /// Posted interest (zero when not posted).
    pub posted: Decimal,
    /// posted - expected.
    pub variance: Decimal,
    /// variance / |Y| x 10,000, unrounded; `None` when Y is zero.
    pub variance_bp: Option<Decimal>,
    /// The status.
    pub status: Status,
    /// Statement rows summed into it.
    pub rows: usize,
}

/// The variance in basis points: the annual rate gap it amounts to.
///
/// ```
/// use ledgerate::engine::reconcile::variance_bp;
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<Decimal>().unwrap();
/// // 1 bp a year on 100.00 is 0.01 (common practice, no source).
/// assert_eq!(variance_bp(d("0.01"), d("100")), Some(d("1")));
/// assert_eq!(variance_bp(d("0.01"), Decimal::ZERO), None);
/// ```
pub fn variance_bp(variance: Decimal, balance_years: Decimal) -> Option<Decimal> {
    if balance_years.is_zero() {
        return None;
    }
    variance
        .checked_mul(Decimal::from(10_000))
        .and_then(|v| v.checked_div(balance_years.abs()))
}

/// Reconciles an account's statement periods, then adds a "not posted" row for
/// each posting period ending in `window_start..=cutoff` with a non-zero
/// expected amount and no statement period overlapping it.
///
/// # Errors
/// [`EngineError::Overflow`] past the decimal range.
pub fn reconcile(
    terms: &AccountTerms,
    result: &AccountResult,
    statements: &[StatementPeriod],
    window_start: NaiveDate,
    cutoff: NaiveDate,
    tolerance: &Tolerance,
) -> Result<Vec<Reconciled>, EngineError> {
    let mut out = Vec::new();
    for s in statements {
        let e = expected_over(terms, result, s.start, s.end)?;
        let variance = s
            .posted
            .checked_sub(e.amount)
            .ok_or(EngineError::Overflow {
                what: "the variance",
                date: s.end,
            })?;
        let bp = variance_bp(variance, e.balance_years);
        let status = if !s.posted.is_zero() && !e.any_base {
            Status::UnexpectedPosting
        } else {
            Status::of_variance(variance, bp, tolerance, terms.minor_units)
        };
        out.push(Reconciled {
            start: s.start,
            end: s.end,
            days: (s.end - s.start).num_days() + 1,
            balance_years: e.balance_years,
            expected: e.amount,
            posted: s.posted,
            variance,
            variance_bp: bp,
            status,
            rows: s.rows,
        });
    }
    if !statements.is_empty() {
        for p in result
            .postings
            .iter()
            .filter(|p| p.end >= window_start && p.end <= cutoff && !p.expected.is_zero())
        {
            let covered = statements
                .iter()
                .any(|s| s.start <= p.end && p.start <= s.end);
            if covered {
                continue;
            }
            let e = expected_over(terms, result, p.start, p.end)?;
            let zero = terms.round_mode.round(Decimal::ZERO, terms.minor_units);
            let variance = zero - e.amount;
            out.push(Reconciled {
                start: p.start,
                end: p.end,
                days: (p.end - p.start).num_days() + 1,
                balance_years: e.balance_years,
                expected: e.amount,
                posted: zero,
                variance,
                variance_bp: variance_bp(variance, e.balance_years),
                status: Status::NotPosted,
                rows: 0,
            });
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::conventions::daycount::Basis;
    use crate::conventions::schedule::Posting;
    use crate::engine::rates::RateSchedule;
    use crate::engine::run::{accrue, RunOptions};
    use crate::engine::ActualPosting;
    use crate::engine::Inputs;

    fn d(s: &str) -> NaiveDate {
        s.parse().unwrap()
    }

    fn n(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    fn run(
        terms: &AccountTerms,
        rate: &str,
        actual: &[ActualPosting],
        from: &str,
        to: &str,
    ) -> AccountResult {
        let rates = RateSchedule::from_rows([(d("2000-01-01"), n(rate), Decimal::ZERO)]);
        let src = Inputs {
            rates: &rates,
            debit_rates: None,
            movements: &[],
            actual,
            breaks: &[],
            floating: None,
        };
        let o = RunOptions {
            window_start: d(from),
            cutoff: d(to),
            keep_days: true,
            keep_states: true,
            keep_spans: false,
            fast_path: true,
        };
        accrue(terms, src, o).unwrap()
    }

    fn one(
        terms: &AccountTerms,
        r: &AccountResult,
        start: &str,
        end: &str,
        posted: Decimal,
    ) -> Reconciled {
        let st = [StatementPeriod {
            start: d(start),
            end: d(end),
            posted,
            rows: 1,
        }];
        reconcile(terms, r, &st, d(start), d(end), &Tolerance::default())
            .unwrap()
            .remove(0)
    }

    proptest! {
        /// An ACT/360 contract posted on ACT/365F at 5% is under-posted by
        /// 5% x (360/365 - 1) x 10,000 = -6.85 bp, whatever the balance
        /// (arithmetic of the ISDA 2006 section 4.16(d) and (e) definitions;
        /// from 1,000,000.00 up the rounding of the posted cents moves it by
        /// under 0.001 bp).
        #[test]
        fn act_360_posted_as_act_365f_is_minus_6_85_bp(cents in 100_000_000i64..100_000_000_000_000) {
            let t = AccountTerms::new("G-1", "USD", 2, Basis::Act360, d("2026-11-01"), Decimal::new(cents, 2));
            let r = run(&t, "0.05", &[], "2026-11-01", "2026-11-30");
            let wrong = AccountTerms { basis: Basis::Act365F, ..t.clone() };
            let posted = run(&wrong, "0.05", &[], "2026-11-01", "2026-11-30").postings[0].expected;
            let row = one(&t, &r, "2026-11-01", "2026-11-30", posted);
            prop_assert_eq!(row.status, Status::UnderPosted);
            prop_assert_eq!(row.variance_bp.unwrap().round_dp(2), n("-6.85"));
        }
    }

    /// A 25 bp rise takes 3.00% to 3.25% (common practice, no source): a year
    /// posted at 3.25% against a 3.00% contract shows +25.00 bp.
    #[test]
    fn a_25_bp_rate_gap_reads_as_25_bp() {
        let mut t = AccountTerms::new(
            "G-2",
            "USD",
            2,
            Basis::Act365F,
            d("2025-01-01"),
            n("100000.00"),
        );
        t.posting = Posting::Annual;
        t.anchor = Some(d("2025-12-31"));
        let r = run(&t, "0.03", &[], "2025-12-01", "2025-12-31");
        let posted = run(&t, "0.0325", &[], "2025-12-01", "2025-12-31").postings[0].expected;
        let row = one(&t, &r, "2025-01-01", "2025-12-31", posted);
        assert_eq!(row.expected, n("3000.00"));
        assert_eq!(row.variance, n("250.00"));
        assert_eq!(row.variance_bp, Some(n("25")));
        assert_eq!(row.balance_years, n("100000"));
    }

    /// Postings and capitalisation with Reconciliation: a wrong posting feeds
    /// the balance as posted, so the next period agrees instead of inheriting
    /// the error.
    #[test]
    fn a_wrong_posting_does_not_turn_the_next_period_red() {
        let mut t = AccountTerms::new(
            "G-3",
            "USD",
            2,
            Basis::Act360,
            d("2026-10-01"),
            n("360000.00"),
        );
        t.capitalise = true;
        // October expected 360,000 x 3% x 31/360 = 930.00; the bank posted 980.00.
        let actual = [ActualPosting {
            start: d("2026-10-01"),
            end: d("2026-10-31"),
            amount: n("980.00"),
        }];
        let r = run(&t, "0.03", &actual, "2026-11-01", "2026-11-30");
        let oct = one(&t, &r, "2026-10-01", "2026-10-31", n("980.00"));
        assert_eq!(
            (oct.expected, oct.status),
            (n("930.00"), Status::OverPosted)
        );
        // November on 360,980.00 (as posted): 360,980 x 3% x 30/360 = 902.45.
        let nov = one(&t, &r, "2026-11-01", "2026-11-30", n("902.45"));
        assert_eq!(nov.status, Status::Agrees);
    }

    /// Reconciliation: something posted for a period with no earning base.
    #[test]
    fn a_posting_without_any_base_is_unexpected() {
        let t = AccountTerms::new("G-4", "USD", 2, Basis::Act360, d("2026-11-01"), n("0"));
        let r = run(&t, "0.03", &[], "2026-11-01", "2026-11-30");
        let row = one(&t, &r, "2026-11-01", "2026-11-30", n("4.00"));
        assert_eq!(row.status, Status::UnexpectedPosting);
        assert_eq!(row.variance_bp, None);
    }

    /// Reconciliation: a row may start before the account opened; those days earn
    /// nothing.
    #[test]
    fn days_before_opening_earn_nothing() {
        let t = AccountTerms::new(
            "G-5",
            "USD",
            2,
            Basis::Act360,
            d("2026-11-16"),
            n("36000.00"),
        );
        let r = run(&t, "0.10", &[], "2026-11-01", "2026-11-30");
        // 15 nights: 36,000 x 10% x 15/360 = 150.00.
        let row = one(&t, &r, "2026-11-01", "2026-11-30", n("150.00"));
        assert_eq!(
            (row.expected, row.status, row.days),
            (n("150.00"), Status::Agrees, 30)
        );
    }

    /// Tolerances: by amount (one minor unit by default, or as given) or by basis points.
    #[test]
    fn tolerance_by_amount_or_basis_points() {
        let tol = Tolerance::default();
        assert!(tol.accepts(n("0.01"), None, 2));
        assert!(!tol.accepts(n("0.011"), None, 2));
        assert!(tol.accepts(n("-1"), None, 0));
        let bp = Tolerance {
            amount: Some(Decimal::ZERO),
            bp: n("0.5"),
        };
        assert!(bp.accepts(n("3"), Some(n("-0.49")), 2));
        assert!(!bp.accepts(n("3"), Some(n("0.51")), 2));
    }
}
