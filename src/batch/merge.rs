//! Combining the results of shard runs (`ledgerate run --shard K/N`) into
//! the report one run over all the accounts would have given.
//!
//! Takes the rows each shard's workbook holds (read back by
//! `report::readback`), checks that the shards come from the same books and
//! settings, puts the rows back in book order and adds them up again through
//! the batch's own [`Totals`], [`StatusCounts`] and [`Journal`]. It never
//! changes a figure of a row, never reads or writes a file, and never keeps
//! a problem twice.

use std::collections::HashMap;

use chrono::NaiveDateTime;

use super::journal::Journal;
use super::totals::{largest_variances, StatusCounts, Totals, LARGEST_PER_CURRENCY};
use crate::problem::{sort_problems, Problem};
use crate::report::model::{AccrualLine, DailyLine, ReconciliationLine, Report, RunFacts, Setting};
use crate::report::readback::RunRows;

/// Shards that cannot be combined.
#[derive(Debug, thiserror::Error, PartialEq, Eq)]
pub enum MergeError {
    /// Nothing to merge.
    #[error("no shard workbooks to merge")]
    NoShards,
    /// Shards of different books.
    #[error(
        "the shards were run on different books (paths or SHA-256 differ on their Run sheets)"
    )]
    DifferentBooks,
    /// Shards run with different settings.
    #[error("the shards were run with different settings (see their Run sheets)")]
    DifferentSettings,
}

/// Merges shard results: rows put back in book order (`order`: account id
/// to its position across the books), totals, counts and journal added up
/// again, problems listed once each in the order every report lists them.
/// `accounts_read` and `accounts_failed` are the sums over the shards.
///
/// # Errors
/// [`MergeError`] when there are no shards, or they come from different
/// books or settings.
pub fn merge(
    parts: Vec<RunRows>,
    order: &HashMap<String, usize>,
    run_time: NaiveDateTime,
    command_line: String,
) -> Result<Report, MergeError> {
    let (facts, settings) = same_run(&parts)?;
    let mut rows = Combined::default();
    for part in parts {
        rows.add(part);
    }
    rows.put_in_book_order(order);
    let books: Vec<String> = facts.inputs.iter().map(|i| i.path.clone()).collect();
    sort_problems(&mut rows.problems, &books);
    let totals = Totals::of(&rows.accruals);
    let mut counts = StatusCounts::default();
    for r in &rows.reconciliation {
        counts.add(r.status);
    }
    Ok(Report {
        totals: totals.rows(),
        status_counts: counts.rows(),
        largest_variances: largest_variances(&rows.reconciliation, LARGEST_PER_CURRENCY),
        facts: RunFacts {
            command_line,
            settings,
            run_time,
            accounts_read: rows.accounts_read,
            accounts_computed: rows.accruals.len(),
            accounts_failed: rows.accounts_failed,
            ..facts
        },
        accruals: rows.accruals,
        reconciliation: rows.reconciliation,
        journal: rows.journal.lines(),
        daily: rows.daily,
        problems: rows.problems,
    })
}

/// The first shard's facts and its settings without `shard`, once every
/// shard is known to share the books and those settings.
fn same_run(parts: &[RunRows]) -> Result<(RunFacts, Vec<Setting>), MergeError> {
    let without_shard = |s: &[Setting]| -> Vec<Setting> {
        s.iter().filter(|x| x.name != "shard").cloned().collect()
    };
    let first = parts.first().ok_or(MergeError::NoShards)?;
    let settings = without_shard(&first.facts.settings);
    for p in parts.iter().skip(1) {
        if p.facts.inputs != first.facts.inputs {
            return Err(MergeError::DifferentBooks);
        }
        if without_shard(&p.facts.settings) != settings {
            return Err(MergeError::DifferentSettings);
        }
    }
    Ok((first.facts.clone(), settings))
}

/// Every shard's rows together.
#[derive(Default)]
struct Combined {
    accruals: Vec<AccrualLine>,
    reconciliation: Vec<ReconciliationLine>,
    daily: Option<Vec<DailyLine>>,
    journal: Journal,
    problems: Vec<Problem>,
    accounts_read: usize,
    accounts_failed: usize,
}

impl Combined {
    fn add(&mut self, part: RunRows) {
        self.accounts_read += part.facts.accounts_read;
        self.accounts_failed += part.facts.accounts_failed;
        self.accruals.extend(part.accruals);
        self.reconciliation.extend(part.reconciliation);
        if let Some(d) = part.daily {
            self.daily.get_or_insert_with(Vec::new).extend(d);
        }
        for line in &part.journal {
            self.journal.add_line(line);
        }
        // Book problems are in every shard; each is kept once.
        for q in part.problems {
            if !self.problems.contains(&q) {
                self.problems.push(q);
            }
        }
    }

    /// Account rows sorted by the account's place in the books (stable: an
    /// account's own rows keep their order).
    fn put_in_book_order(&mut self, order: &HashMap<String, usize>) {
        let rank = |id: &str| order.get(id).copied().unwrap_or(usize::MAX);
        self.accruals.sort_by_key(|a| rank(&a.account));
        self.reconciliation.sort_by_key(|r| rank(&r.account));
        if let Some(d) = self.daily.as_mut() {
            d.sort_by_key(|r| rank(&r.account));
        }
    }
}
