//! Combining the results of shard runs (`ledgerate run --shard K/N`) into
//! the report one run over all the accounts would have given.
//!
//! Takes the rows each shard's workbook holds (read back by
//! `report::readback`) once `split` has proven them one complete split of
//! one run, puts the rows back in book order and adds them up again through
//! the batch's own [`Totals`], [`StatusCounts`] and [`Journal`]. It never
//! changes a figure of a row, never reads or writes a file, and never keeps
//! a problem twice.

use std::collections::HashMap;

use chrono::NaiveDateTime;

use super::journal::Journal;
use super::sort_left_out;
use super::split::OneSplit;
use super::totals::{largest_variances, StatusCounts, Totals, LARGEST_PER_CURRENCY};
use crate::problem::{sort_problems, Problem};
use crate::report::model::{
    AccrualLine, DailyLine, LeftOutLine, ReconciliationLine, Report, RunFacts,
};
use crate::report::readback::RunRows;

/// Shards that cannot be combined.
#[derive(Debug, thiserror::Error, PartialEq, Eq)]
pub enum MergeError {
    /// Nothing to merge.
    #[error("no shard workbooks to merge")]
    NoShards,
    /// The workbooks are not one complete split of one run: each finding
    /// names its workbooks and what is missing, repeated or different.
    #[error("the shard workbooks are not one complete split of one run: {}; nothing was written", .0.join("; "))]
    NotOneSplit(Vec<String>),
}

/// Merges shards proven to be one split: rows put back in book order
/// (`order`: account id to its position across the books), totals, counts
/// and journal added up again, problems listed once each in the order every
/// report lists them. The account counts (read, left out, failed) are the
/// sums over the shards, and the accounts left out that the shards name
/// are listed in the order one run lists them: each shard names its first
/// ones, so the first of all are among them.
pub fn merge(
    split: OneSplit,
    order: &HashMap<String, usize>,
    run_time: NaiveDateTime,
    command_line: String,
) -> Report {
    let OneSplit {
        first,
        rest,
        settings,
    } = split;
    let facts = first.facts.clone();
    let mut rows = Combined::default();
    rows.add(first);
    for part in rest {
        rows.add(part);
    }
    rows.put_in_book_order(order);
    let books: Vec<String> = facts.inputs.iter().map(|i| i.path.clone()).collect();
    sort_problems(&mut rows.problems, &books);
    sort_left_out(&mut rows.left_out, &books);
    let totals = Totals::of(&rows.accruals);
    let mut counts = StatusCounts::default();
    for r in &rows.reconciliation {
        counts.add(r.status);
    }
    Report {
        totals: totals.rows(),
        status_counts: counts.rows(),
        largest_variances: largest_variances(&rows.reconciliation, LARGEST_PER_CURRENCY),
        facts: RunFacts {
            command_line,
            settings,
            run_time,
            accounts_read: rows.accounts_read,
            accounts_computed: rows.accruals.len(),
            accounts_left_out: rows.accounts_left_out,
            accounts_failed: rows.accounts_failed,
            ..facts
        },
        left_out: rows.left_out,
        accruals: rows.accruals,
        reconciliation: rows.reconciliation,
        journal: rows.journal.lines(),
        daily: rows.daily,
        problems: rows.problems,
    }
}

/// Every shard's rows together.
#[derive(Default)]
struct Combined {
    accruals: Vec<AccrualLine>,
    reconciliation: Vec<ReconciliationLine>,
    daily: Option<Vec<DailyLine>>,
    journal: Journal,
    problems: Vec<Problem>,
    left_out: Vec<LeftOutLine>,
    accounts_read: usize,
    accounts_left_out: usize,
    accounts_failed: usize,
}

impl Combined {
    fn add(&mut self, part: RunRows) {
        self.accounts_read += part.facts.accounts_read;
        self.accounts_left_out += part.facts.accounts_left_out;
        self.accounts_failed += part.facts.accounts_failed;
        self.left_out.extend(part.left_out);
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
