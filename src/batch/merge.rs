//! Combining the results of shard runs (`ledgerate run --shard K/N`) into
//! the report one run over all the accounts would have given.
//!
//! Takes the rows each shard's workbook holds (read back by
//! `report::readback`) once `split` has proven them one complete split of
//! one run, puts the rows back in book order and adds them up again through
//! the batch's own [`Totals`], [`StatusCounts`], [`Journal`] and [`TieOut`]
//! (the Tie-out's sub-ledger sums from the merged Accruals rows, its trial
//! balance figures from the shards' Tie-out rows, which all read the same
//! books; the Journal detail from the shards' detail rows, when every shard
//! has one). It never changes a figure of a row, never reads or writes a
//! file, and never keeps a problem twice.

use std::collections::HashMap;

use chrono::NaiveDateTime;
use rust_decimal::Decimal;

use super::journal::Journal;
use super::sort_left_out;
use super::split::OneSplit;
use super::tie_out::{is_unused_row_note, GlKey, TieOut};
use super::totals::{largest_variances, StatusCounts, Totals, LARGEST_PER_CURRENCY};
use crate::engine::reconcile::Tolerance;
use crate::problem::{sort_problems, Problem};
use crate::report::model::{
    AccrualLine, DailyLine, JournalDetail, JournalLine, LeftOutLine, ReconciliationLine, Report,
    RunFacts, Setting, TieOutLine,
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
/// (`order`: account id to its position across the books), totals, counts,
/// journal and Tie-out added up again, problems listed once each in the
/// order every report lists them. The account counts (read, left out,
/// failed) are the sums over the shards, and the accounts left out that the
/// shards name are listed in the order one run lists them: each shard names
/// its first ones, so the first of all are among them.
/// The report has a Journal detail when every shard has one: their rows,
/// each line's accounts in book order.
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
    let tie_out = rows.tie_out(&settings, books.first().map_or("", String::as_str));
    rows.keep_unused_row_notes_of_every_shard();
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
        accrued_check: rows.accrued_check,
        tie_out,
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
    accrued_check: Vec<ReconciliationLine>,
    /// The shards' Tie-out rows, `None` when no shard has the sheet.
    tie_out: Option<Vec<TieOutLine>>,
    daily: Option<Vec<DailyLine>>,
    journal: Journal,
    /// The journal's lines, once [`Combined::add_detail`] has finished it.
    journal_lines: Vec<JournalLine>,
    /// Each shard's Journal detail; `None` once a shard has none.
    details: Option<Vec<JournalDetail>>,
    problems: Vec<Problem>,
    /// Each note on a trial balance row no account uses, with how many
    /// shards have it.
    unused_row_notes: Vec<(Problem, usize)>,
    shards: usize,
    left_out: Vec<LeftOutLine>,
    accounts_read: usize,
    accounts_left_out: usize,
    accounts_failed: usize,
}

impl Default for Combined {
    fn default() -> Combined {
        Combined {
            accruals: Vec::new(),
            reconciliation: Vec::new(),
            accrued_check: Vec::new(),
            tie_out: None,
            daily: None,
            journal: Journal::keeping_detail(),
            journal_lines: Vec::new(),
            details: Some(Vec::new()),
            problems: Vec::new(),
            unused_row_notes: Vec::new(),
            shards: 0,
            left_out: Vec::new(),
            accounts_read: 0,
            accounts_left_out: 0,
            accounts_failed: 0,
        }
    }
}

impl Combined {
    fn add(&mut self, part: RunRows) {
        self.shards += 1;
        self.accounts_read += part.facts.accounts_read;
        self.accounts_left_out += part.facts.accounts_left_out;
        self.accounts_failed += part.facts.accounts_failed;
        self.left_out.extend(part.left_out);
        self.accruals.extend(part.accruals);
        self.reconciliation.extend(part.reconciliation);
        self.accrued_check.extend(part.accrued_check);
        if let Some(t) = part.tie_out {
            self.tie_out.get_or_insert_with(Vec::new).extend(t);
        }
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
        let mut noted: Vec<Problem> = Vec::new();
        // Book problems are in every shard; each is kept once.
        for q in part.problems {
            if is_unused_row_note(&q) {
                if !noted.contains(&q) {
                    noted.push(q);
                }
            } else if !self.problems.contains(&q) {
                self.problems.push(q);
            }
        }
        for q in noted {
            match self.unused_row_notes.iter_mut().find(|(p, _)| *p == q) {
                Some((_, shards)) => *shards += 1,
                None => self.unused_row_notes.push((q, 1)),
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
        self.accrued_check.sort_by_key(|r| rank(&r.account));
        if let Some(d) = self.daily.as_mut() {
            d.sort_by_key(|r| rank(&r.account));
        }
    }

    /// The whole run's Tie-out (when the shards have one): the sub-ledger
    /// summed from every shard's Accruals rows through [`TieOut`], the trial
    /// balance figures of each GL account from a shard that has its row,
    /// the status against the run's tolerance amount. A GL account whose
    /// accounts of both sides fell in different shards has no row, and its
    /// error (on the Accounts sheet of `first_book`) is added as the single
    /// run adds it.
    fn tie_out(&mut self, settings: &[Setting], first_book: &str) -> Option<Vec<TieOutLine>> {
        let shard_rows = self.tie_out.take()?;
        let mut sums = TieOut::default();
        for line in &self.accruals {
            sums.add(line);
        }
        let balances = |key: GlKey<'_>, _side: &str| {
            shard_rows
                .iter()
                .find(|t| {
                    t.entity == key.entity
                        && t.currency == key.currency
                        && t.gl_account == key.gl_account
                })
                .map_or((None, None), |t| (Some(t.opening_tb), t.closing_tb))
        };
        let tolerance = Tolerance {
            amount: tolerance_amount(settings),
            bp: Decimal::ZERO,
        };
        let (lines, mixed) = sums.rows_with(balances, &tolerance);
        for m in mixed {
            let p = m.problem(first_book);
            if !self.problems.contains(&p) {
                self.problems.push(p);
            }
        }
        Some(lines)
    }

    /// The notes on trial balance rows that every shard has: a row no
    /// account of the whole run uses (a shard notes also the rows that only
    /// other shards' accounts use).
    fn keep_unused_row_notes_of_every_shard(&mut self) {
        let shards = self.shards;
        let notes = std::mem::take(&mut self.unused_row_notes);
        self.problems.extend(
            notes
                .into_iter()
                .filter(|(_, n)| *n == shards)
                .map(|(p, _)| p),
        );
    }
}

/// The run's tolerance amount as the Run sheet records it: a decimal, or
/// words for the default (one minor unit of each row's currency).
fn tolerance_amount(settings: &[Setting]) -> Option<Decimal> {
    settings
        .iter()
        .find(|s| s.name == "tolerance_amount")
        .and_then(|s| s.value.trim().parse().ok())
}
