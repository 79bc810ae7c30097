//! The Summary's sums: totals by currency and side and rows by status,
//! added one line at a time; and its choice of the largest variances in
//! money.
//!
//! The batch adds each account's line as it is computed; a merge of shard
//! workbooks adds the lines it read back. Both go through these two types,
//! so a merged run's totals are the single run's to the last digit. They
//! only add what they are given: they never round, convert or skip a line,
//! never add a deposit to a loan (behaviour.md, Completeness and
//! presentation), and never look at anything but the line's currency, side,
//! its amounts and the row's status.

use std::collections::BTreeMap;

use rust_decimal::Decimal;

use crate::engine::reconcile::Status;
use crate::report::model::{AccrualLine, CurrencyTotal, ReconciliationLine, StatusCount, Word};

/// Totals by currency and side: accounts, balance at cut-off, accrued at
/// cut-off, posted in window, interest for window (expense on the liability
/// side, income on the asset side), prior-period adjustment and, where an
/// account has withholding tax, the tax withheld in the window, each the sum
/// of the accounts' rounded amounts.
///
/// ```
/// use ledgerate::batch::totals::Totals;
/// use ledgerate::report::model::AccrualLine;
/// use rust_decimal::Decimal;
///
/// let line = |ccy: &'static str, side: &'static str, accrued: i64| AccrualLine {
///     account: format!("{ccy}-{side}-{accrued}"),
///     name: String::new(),
///     currency: ccy.into(),
///     minor_units: 2,
///     side: side.into(),
///     day_count: "ACT/365F".into(),
///     compounding: "simple".into(),
///     balance_at_cutoff: Decimal::new(100_000, 2),
///     accrued_at_cutoff: Decimal::new(accrued, 2),
///     posted_in_window: Decimal::ZERO,
///     interest_for_window: Decimal::new(accrued, 2),
///     effective_annual_rate: None,
///     ledger: Default::default(),
///     tax: None,
///     suspense: None,
///     life: None,
/// };
/// let mut totals = Totals::default();
/// totals.add(&line("USD", "liability", 125));
/// totals.add(&line("EUR", "liability", 300));
/// totals.add(&line("USD", "liability", 1));
/// totals.add(&line("USD", "asset", 40));
/// let rows = totals.rows();
/// // In currency-code order, asset before liability: the USD loan is not
/// // added to the USD deposits.
/// let keys: Vec<(&str, &str, usize)> =
///     rows.iter().map(|t| (t.currency.as_str(), t.side.as_str(), t.accounts)).collect();
/// assert_eq!(keys, [("EUR", "liability", 1), ("USD", "asset", 1), ("USD", "liability", 2)]);
/// assert_eq!(rows[2].accrued_at_cutoff, Decimal::new(126, 2));
/// assert_eq!(rows[2].balance_at_cutoff, Decimal::new(200_000, 2));
/// assert_eq!(rows[1].interest_for_window, Decimal::new(40, 2));
/// ```
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Totals {
    by_key: BTreeMap<(Word, u8, Word), CurrencyTotal>,
}

/// Where a side's totals go within a currency: asset, then liability (the
/// order of a balance sheet), then any other word read back.
fn side_rank(side: &str) -> u8 {
    match side {
        "asset" => 0,
        "liability" => 1,
        _ => 2,
    }
}

impl Totals {
    /// Adds one account's line to its currency and side's totals.
    pub fn add(&mut self, line: &AccrualLine) {
        let key = (
            line.currency.clone(),
            side_rank(&line.side),
            line.side.clone(),
        );
        let t = self.by_key.entry(key).or_insert_with(|| CurrencyTotal {
            currency: line.currency.to_string(),
            side: line.side.to_string(),
            minor_units: line.minor_units,
            accounts: 0,
            balance_at_cutoff: Decimal::ZERO,
            accrued_at_cutoff: Decimal::ZERO,
            posted_in_window: Decimal::ZERO,
            interest_for_window: Decimal::ZERO,
            prior_period: Decimal::ZERO,
            tax_withheld: None,
        });
        t.accounts += 1;
        t.balance_at_cutoff += line.balance_at_cutoff;
        t.accrued_at_cutoff += line.accrued_at_cutoff;
        t.posted_in_window += line.posted_in_window;
        t.interest_for_window += line.interest_for_window;
        t.prior_period += line.ledger.prior_period;
        if let Some(tax) = &line.tax {
            *t.tax_withheld.get_or_insert(Decimal::ZERO) += tax.withheld;
        }
    }

    /// The totals of every line of `lines`.
    pub fn of<'a>(lines: impl IntoIterator<Item = &'a AccrualLine>) -> Totals {
        let mut totals = Totals::default();
        for line in lines {
            totals.add(line);
        }
        totals
    }

    /// One row per currency and side, in code order, asset before liability.
    pub fn rows(&self) -> Vec<CurrencyTotal> {
        self.by_key.values().cloned().collect()
    }
}

/// Statement rows counted by status.
///
/// ```
/// use ledgerate::batch::totals::StatusCounts;
/// use ledgerate::engine::reconcile::Status;
///
/// let mut counts = StatusCounts::default();
/// for s in [Status::NotPosted, Status::Agrees, Status::Agrees] {
///     counts.add(s);
/// }
/// let rows: Vec<(Status, usize)> = counts.rows().iter().map(|c| (c.status, c.rows)).collect();
/// // In the order of `Status::ALL`, statuses with rows only.
/// assert_eq!(rows, [(Status::Agrees, 2), (Status::NotPosted, 1)]);
/// ```
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct StatusCounts {
    by_status: BTreeMap<Status, usize>,
}

impl StatusCounts {
    /// Counts one row of `status`.
    pub fn add(&mut self, status: Status) {
        *self.by_status.entry(status).or_insert(0) += 1;
    }

    /// One count per status that has rows, in the order of [`Status::ALL`].
    pub fn rows(&self) -> Vec<StatusCount> {
        Status::ALL
            .iter()
            .filter_map(|&status| {
                self.by_status
                    .get(&status)
                    .map(|&rows| StatusCount { status, rows })
            })
            .collect()
    }
}

/// Rows of each currency named in the Summary's table of the largest
/// variances in money.
pub const LARGEST_PER_CURRENCY: usize = 5;

/// The Summary's largest variances in money: for each currency (in code
/// order), up to `per_currency` rows outside tolerance, the largest
/// |variance| first and equal ones in row order. Indices into `rows`. A row
/// whose statement could not be read has no variance to rank and is left
/// out (it is counted by status and listed on Reconciliation).
///
/// A variance in basis points makes a small miss on a small balance look
/// large; this table ranks the misses in money, within one currency, where
/// amounts compare.
///
/// ```
/// use ledgerate::batch::totals::largest_variances;
/// use ledgerate::engine::reconcile::Status;
/// use ledgerate::report::model::ReconciliationLine;
/// use rust_decimal::Decimal;
///
/// let day = chrono::NaiveDate::from_ymd_opt(2026, 11, 30).unwrap();
/// let row = |ccy: &'static str, variance: i64, status: Status| ReconciliationLine {
///     account: format!("{ccy}{variance}"),
///     currency: ccy.into(),
///     minor_units: 2,
///     period_start: Some(day),
///     period_end: Some(day),
///     days: 1,
///     balance_years: Decimal::ONE,
///     expected: Decimal::ZERO,
///     posted: Decimal::new(variance, 2),
///     variance: Decimal::new(variance, 2),
///     variance_bp: None,
///     status,
///     likely_cause: String::new(),
///     tax: None,
/// };
/// let rows = [
///     row("USD", 2500, Status::OverPosted),
///     row("GBP", -869, Status::UnderPosted),
///     row("USD", -4000, Status::UnderPosted),
///     row("USD", 1, Status::WithinTolerance),
///     row("USD", 0, Status::StatementUnreadable),
/// ];
/// // GBP before USD; -40.00 before 25.00; the row within tolerance and the
/// // unreadable statement row are left out.
/// assert_eq!(largest_variances(&rows, 5), [1, 2, 0]);
/// assert_eq!(largest_variances(&rows, 1), [1, 2]);
/// ```
pub fn largest_variances(rows: &[ReconciliationLine], per_currency: usize) -> Vec<usize> {
    let mut by_currency: BTreeMap<&str, Vec<usize>> = BTreeMap::new();
    for (i, r) in rows.iter().enumerate() {
        if r.status.outside_tolerance() && r.status != Status::StatementUnreadable {
            by_currency.entry(&r.currency).or_default().push(i);
        }
    }
    let size = |i: &usize| rows.get(*i).map_or(Decimal::ZERO, |r| r.variance.abs());
    by_currency
        .into_values()
        .flat_map(|mut indices| {
            // Stable: equal variances stay in row order.
            indices.sort_by_key(|i| std::cmp::Reverse(size(i)));
            indices.truncate(per_currency);
            indices
        })
        .collect()
}
