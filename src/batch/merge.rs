//! Combining the results of shard runs (`ledgerate run --shard K/N`) into
//! the report one run over all the accounts would have given.
//!
//! Takes the rows each shard's workbook holds (read back by
//! `report::readback`) once `split` has proven them one complete split of
//! one run, puts the rows back in book order and adds them up again through
//! the batch's own [`Totals`], [`StatusCounts`] and [`Journal`] (the Journal
//! detail too, from the shards' detail rows, when every shard has one). It never
//! changes a figure of a row, never reads or writes a file, and never keeps
//! a problem twice.

use std::collections::HashMap;

use chrono::NaiveDateTime;

use super::journal::Journal;
use super::split::OneSplit;
use super::totals::{largest_variances, StatusCounts, Totals, LARGEST_PER_CURRENCY};
use crate::problem::{sort_problems, Problem};
use crate::report::model::{
    AccrualLine, DailyLine, JournalDetail, JournalLine, ReconciliationLine, Report, RunFacts,
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
/// report lists them. `accounts_read` and `accounts_failed` are the sums
/// over the shards. The report has a Journal detail when every shard has
/// one: their rows, each line's accounts in book order.
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
    let journal_detail = rows.add_detail(order);
    let books: Vec<String> = facts.inputs.iter().map(|i| i.path.clone()).collect();
    sort_problems(&mut rows.problems, &books);
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
            accounts_failed: rows.accounts_failed,
            ..facts
        },
        accruals: rows.accruals,
        reconciliation: rows.reconciliation,
        journal: rows.journal_lines,
        journal_detail,
        daily: rows.daily,
        problems: rows.problems,
    }
}

/// Every shard's rows together.
struct Combined {
    accruals: Vec<AccrualLine>,
    reconciliation: Vec<ReconciliationLine>,
    daily: Option<Vec<DailyLine>>,
    journal: Journal,
    /// The journal's lines, once [`Combined::add_detail`] has finished it.
    journal_lines: Vec<JournalLine>,
    /// Each shard's Journal detail; `None` once a shard has none.
    details: Option<Vec<JournalDetail>>,
    problems: Vec<Problem>,
    accounts_read: usize,
    accounts_failed: usize,
}

impl Default for Combined {
    fn default() -> Combined {
        Combined {
            accruals: Vec::new(),
            reconciliation: Vec::new(),
            daily: None,
            journal: Journal::keeping_detail(),
            journal_lines: Vec::new(),
            details: Some(Vec::new()),
            problems: Vec::new(),
            accounts_read: 0,
            accounts_failed: 0,
        }
    }
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
        match (part.journal_detail, self.details.as_mut()) {
            (Some(d), Some(all)) => all.push(d),
            _ => self.details = None,
        }
        // Book problems are in every shard; each is kept once.
        for q in part.problems {
            if !self.problems.contains(&q) {
                self.problems.push(q);
            }
        }
    }

    /// The shards' detail rows added to the journal, accounts in book order
    /// (each account's rows together, in its shard's order), then the
    /// journal finished: its lines, and the detail when every shard had one.
    fn add_detail(&mut self, order: &HashMap<String, usize>) -> Option<JournalDetail> {
        let complete = self.details.take();
        let details = complete.as_deref().unwrap_or_default();
        let rank = |id: &str| order.get(id).copied().unwrap_or(usize::MAX);
        let mut rows: Vec<(usize, usize, u32, usize)> = Vec::new();
        for (s, d) in details.iter().enumerate() {
            for (i, r) in d.rows.iter().enumerate() {
                rows.push((rank(d.account(r)), s, r.account, i));
            }
        }
        rows.sort_unstable();
        for (_, s, _, i) in rows {
            let Some(d) = details.get(s) else { continue };
            let Some(r) = d.rows.get(i) else { continue };
            if let Some(line) = d.line(r) {
                self.journal.add_detail(line, d.account(r), r.amount);
            }
        }
        let journal = std::mem::take(&mut self.journal);
        let (lines, detail) = journal.finish();
        self.journal_lines = lines;
        detail.filter(|_| complete.is_some())
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
