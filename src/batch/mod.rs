//! A month-end batch: every account of the books accrued in parallel, then
//! the totals, the journal and the daily lines, in book order.
//!
//! Takes books already read and returns report rows; it reads no file and
//! prints nothing (the command line does both). Results are collected in book
//! order whatever the thread count, and every total is a sum of rounded
//! amounts, so the output is the same on one thread or many.

mod detail;
pub mod journal;
pub mod merge;
pub mod split;
pub mod totals;

use std::collections::HashMap;

use chrono::NaiveDate;
use rayon::prelude::*;
use rust_decimal::Decimal;

use crate::book::{AccountEntry, Book, StatementRow};
use crate::engine::causes::{plausible, LikelyCause};
use crate::engine::floating::FixingFallback;
use crate::engine::reconcile::{Reconciled, Status, Tolerance};
use crate::pipeline::{run_account, AccountRun, BookAccount, Options};
use crate::problem::{Problem, Severity};
use crate::report::model::{
    AccrualLine, CurrencyTotal, DailyLine, JournalDetail, JournalLine, ReconciliationLine,
    StatusCount, Word,
};
use journal::{AccountEntries, Journal, JournalStyle};
use totals::{StatusCounts, Totals};

/// What the batch needs besides the books.
#[derive(Debug, Clone)]
pub struct BatchSettings {
    /// The cut-off date: the last day computed.
    pub cutoff: NaiveDate,
    /// The first day of the window (the window ends on the cut-off date).
    pub window_start: NaiveDate,
    /// Keep the day-by-day lines.
    pub daily: bool,
    /// How the journal books accruals.
    pub journal_style: JournalStyle,
    /// Keep each account's share of each journal line (the Journal detail).
    pub journal_detail: bool,
    /// The entity of each book, by book index.
    pub entities: Vec<String>,
    /// Reconciliation tolerances.
    pub tolerance: Tolerance,
    /// Accrue unchanging runs of days in one step (identical figures); off for audits.
    pub fast_path: bool,
    /// Only the accounts of shard K of N (`(K, N)`, K from 1), for runs split across machines.
    pub shard: Option<(u32, u32)>,
    /// What a floating account does about a missing fixing.
    pub fixing_fallback: FixingFallback,
}

/// The shard (1..=N) an account id belongs to: a stable hash of the id, the
/// same on every machine, so shards split any set of books the same way.
///
/// ```
/// use ledgerate::batch::shard_of;
/// assert_eq!(shard_of("HM-SAV-001", 1), 1);
/// assert!((1..=4).contains(&shard_of("HM-SAV-001", 4)));
/// assert_eq!(shard_of("HM-SAV-001", 4), shard_of("HM-SAV-001", 4));
/// ```
pub fn shard_of(account: &str, shards: u32) -> u32 {
    use sha2::{Digest, Sha256};
    let digest = Sha256::digest(account.as_bytes());
    let mut first = [0u8; 8];
    for (slot, byte) in first.iter_mut().zip(digest.iter()) {
        *slot = *byte;
    }
    let n = u64::from_be_bytes(first) % u64::from(shards.max(1));
    u32::try_from(n).unwrap_or(0) + 1
}

fn in_shard(id: &str, shard: Option<(u32, u32)>) -> bool {
    shard.is_none_or(|(k, n)| shard_of(id, n) == k)
}

/// The batch's figures, ready for the report.
#[derive(Debug, Clone, Default)]
pub struct BatchResult {
    /// One line per computed account, in book order.
    pub accruals: Vec<AccrualLine>,
    /// Totals by currency, in code order.
    pub totals: Vec<CurrencyTotal>,
    /// Journal lines.
    pub journal: Vec<JournalLine>,
    /// Each account's share of each journal line, when asked for.
    pub journal_detail: Option<JournalDetail>,
    /// Daily lines, when asked for.
    pub daily: Option<Vec<DailyLine>>,
    /// Reconciliation rows, by account in book order.
    pub reconciliation: Vec<ReconciliationLine>,
    /// Rows by status, in the order of [`Status::ALL`] (statuses with rows only).
    pub status_counts: Vec<StatusCount>,
    /// Problems the engine found (book problems stay with their books).
    pub problems: Vec<Problem>,
    /// Accounts in the books, counting those the reader left out.
    pub accounts_read: usize,
    /// Accounts computed.
    pub accounts_computed: usize,
}

/// Accounts accrued together before their rows are added up: enough for
/// every thread of the pool to stay busy, few enough to hold at once.
const PART: usize = 4096;

/// One account's outcome.
struct Outcome {
    line: AccrualLine,
    /// Postings in the window: payment date and amount.
    postings: Vec<(NaiveDate, Decimal)>,
    daily: Vec<DailyLine>,
    reconciliation: Vec<(Status, ReconciliationLine)>,
    notes: Vec<Problem>,
}

/// One account to accrue: its book's index, the book, the book's statement
/// rows by account, and the account.
type Work<'b> = (
    usize,
    &'b Book,
    &'b HashMap<&'b str, Vec<&'b StatementRow>>,
    &'b AccountEntry,
);

/// Accrues every account of `books` (in parallel on rayon's pool) and sums
/// the results. `tick` is called once per account, from any thread, for a
/// progress display.
pub fn run_books(
    books: &[Book],
    settings: &BatchSettings,
    tick: &(dyn Fn() + Sync),
) -> BatchResult {
    let options = Options {
        window_start: settings.window_start,
        cutoff: settings.cutoff,
        tolerance: settings.tolerance,
        fixing_fallback: settings.fixing_fallback,
        keep_days: settings.daily,
        fast_path: settings.fast_path,
    };
    // Each account's statement rows, found once per book rather than per account.
    let rows: Vec<HashMap<&str, Vec<&StatementRow>>> =
        books.iter().map(statements_by_account).collect();
    let work = work_in_book_order(books, &rows, settings.shard);
    let accounts_read = work.len()
        + books
            .iter()
            .map(|b| left_out_accounts(b, settings.shard))
            .sum::<usize>();
    let mut sums = Sums::new(settings, accounts_read, work.len());
    // Accounts go through in parts of book order: each part accrued in
    // parallel, then added to the rows and sums, so that only one part's
    // outcomes (day rows, postings, notes) are held at a time.
    for part in work.chunks(PART) {
        let outcomes = accrue_part(part, &options, tick);
        for (&(bi, _, _, entry), outcome) in part.iter().zip(outcomes) {
            match outcome {
                Ok(o) => sums.add(bi, entry, o),
                Err(p) => sums.result.problems.push(*p),
            }
        }
    }
    sums.finish()
}

/// Every account of the books (of the shard, if any), in book order.
fn work_in_book_order<'b>(
    books: &'b [Book],
    rows: &'b [HashMap<&'b str, Vec<&'b StatementRow>>],
    shard: Option<(u32, u32)>,
) -> Vec<Work<'b>> {
    books
        .iter()
        .zip(rows)
        .enumerate()
        .flat_map(|(bi, (b, rows))| b.accounts.iter().map(move |a| (bi, b, rows, a)))
        .filter(|(_, _, _, a)| in_shard(&a.terms.id, shard))
        .collect()
}

/// One part's accounts accrued in parallel; outcomes in the part's order.
fn accrue_part(
    part: &[Work<'_>],
    options: &Options,
    tick: &(dyn Fn() + Sync),
) -> Vec<Result<Outcome, Box<Problem>>> {
    part.par_iter()
        .with_min_len(64)
        .map(|&(_, book, rows, entry)| {
            let r = accrue_one(
                book,
                entry,
                rows.get(entry.terms.id.as_str())
                    .map_or(&[][..], Vec::as_slice),
                options,
            );
            tick();
            r
        })
        .collect()
}

/// The batch's rows and sums so far, added to one account at a time in book order.
struct Sums<'s> {
    settings: &'s BatchSettings,
    result: BatchResult,
    journal: Journal,
    totals: Totals,
    counts: StatusCounts,
    daily: Vec<DailyLine>,
}

impl<'s> Sums<'s> {
    fn new(settings: &'s BatchSettings, accounts_read: usize, accounts: usize) -> Sums<'s> {
        let mut result = BatchResult {
            accounts_read,
            ..BatchResult::default()
        };
        // Every account gives one line: room for them all at once, not by doubling.
        result.accruals.reserve_exact(accounts);
        Sums {
            settings,
            result,
            journal: if settings.journal_detail {
                Journal::keeping_detail()
            } else {
                Journal::new()
            },
            totals: Totals::default(),
            counts: StatusCounts::default(),
            daily: Vec::new(),
        }
    }

    /// Adds one computed account of book `bi`: its totals, journal lines,
    /// day rows, reconciliation rows, notes and accrual line.
    fn add(&mut self, bi: usize, entry: &AccountEntry, o: Outcome) {
        let settings = self.settings;
        self.totals.add(&o.line);
        let entity = settings.entities.get(bi).map_or("default", String::as_str);
        self.journal.add_account(
            &AccountEntries {
                account: &entry.terms.id,
                entity,
                currency: &o.line.currency,
                minor_units: o.line.minor_units,
                side: entry.terms.side,
                gl: &entry.gl,
                interest_for_window: o.line.interest_for_window,
                accrued_at_cutoff: o.line.accrued_at_cutoff,
                postings: o.postings,
            },
            settings.journal_style,
            settings.window_start,
            settings.cutoff,
        );
        self.daily.extend(o.daily);
        for (_, line) in o.reconciliation {
            self.counts.add(line.status);
            self.result.reconciliation.push(line);
        }
        self.result.problems.extend(o.notes);
        self.result.accruals.push(o.line);
        self.result.accounts_computed += 1;
    }

    fn finish(self) -> BatchResult {
        let (journal, journal_detail) = self.journal.finish();
        let mut result = self.result;
        if self.settings.journal_detail && journal_detail.is_none() {
            result.problems.push(detail_given_up());
        }
        BatchResult {
            totals: self.totals.rows(),
            status_counts: self.counts.rows(),
            journal,
            journal_detail,
            daily: self.settings.daily.then_some(self.daily),
            ..result
        }
    }
}

/// The warning for a Journal detail too large to index: more than
/// 4,294,967,295 accounts or journal lines (no run comes near it).
fn detail_given_up() -> Problem {
    Problem {
        severity: Severity::Warning,
        position: crate::problem::Position::default(),
        account: None,
        found: "more than 4,294,967,295 accounts or journal lines".into(),
        expected: "a Journal detail whose accounts and lines can be counted".into(),
        fix: "the Journal detail is left out whole; split the run with --shard K/N".into(),
        follows: None,
    }
}

/// Accounts the reader kept out because of errors (each error names its account).
fn left_out_accounts(book: &Book, shard: Option<(u32, u32)>) -> usize {
    let mut ids: Vec<&str> = book
        .problems
        .iter()
        .filter(|p| {
            p.severity == Severity::Error && p.position.sheet.eq_ignore_ascii_case("accounts")
        })
        .filter_map(|p| p.account.as_deref())
        .collect();
    ids.sort_unstable();
    ids.dedup();
    ids.retain(|id| in_shard(id, shard) && !book.accounts.iter().any(|a| a.terms.id == *id));
    ids.len()
}

/// One account through the pipeline, turned into the batch's rows.
fn accrue_one(
    book: &Book,
    entry: &AccountEntry,
    statements: &[&StatementRow],
    options: &Options,
) -> Result<Outcome, Box<Problem>> {
    let account = BookAccount::from_book(book, entry, statements);
    let run = run_account(&account, options).map_err(|f| Box::new(f.problem))?;
    Ok(outcome(entry, run, options))
}

/// The rows of an account computed: its accrual line, the postings of the
/// window for the journal, its day lines when kept, its reconciliation
/// lines and its notes.
fn outcome(entry: &AccountEntry, run: AccountRun, options: &Options) -> Outcome {
    let t = &entry.terms;
    let r = run.result;
    let reconciliation = run
        .rows
        .into_iter()
        .map(|c| {
            (
                c.row.status,
                reconciliation_line(entry, &c.row, c.likely_cause),
            )
        })
        .collect();
    let postings = r
        .postings
        .iter()
        .filter(|p| p.end >= options.window_start && p.end <= options.cutoff)
        .map(|p| (p.payment, p.posted))
        .collect();
    let daily = r
        .days
        .iter()
        .filter(|_| options.keep_days)
        .map(|d| DailyLine {
            account: t.id.clone(),
            minor_units: t.minor_units,
            date: d.date,
            balance: d.balance,
            base: d.base,
            rate: d.rate,
            day_fraction: d.fraction.ratio().to_decimal().unwrap_or(Decimal::ZERO),
            interest: d.interest,
            accrued: d.accrued,
        })
        .collect();
    Outcome {
        line: AccrualLine {
            account: t.id.clone(),
            name: entry.name.clone(),
            currency: currency_word(&t.currency),
            minor_units: t.minor_units,
            side: t.side.name().into(),
            day_count: t.basis.name().into(),
            compounding: t.compounding.name().into(),
            balance_at_cutoff: r.balance_at_cutoff,
            accrued_at_cutoff: r.accrued_at_cutoff,
            posted_in_window: r.posted_in_window,
            interest_for_window: r.interest_for_window,
            effective_annual_rate: r.effective_annual_rate,
            ledger: crate::report::model::LedgerLine::default(),
        },
        postings,
        daily,
        reconciliation,
        notes: run.notes,
    }
}

/// A book's statement rows by account, each account's in sheet order.
fn statements_by_account(book: &Book) -> HashMap<&str, Vec<&StatementRow>> {
    let mut out: HashMap<&str, Vec<&StatementRow>> = HashMap::new();
    for s in &book.statements {
        out.entry(s.account.as_str()).or_default().push(s);
    }
    out
}

fn reconciliation_line(
    entry: &AccountEntry,
    row: &Reconciled,
    likely_cause: Option<LikelyCause>,
) -> ReconciliationLine {
    let t = &entry.terms;
    let cause = match row.status {
        Status::Agrees | Status::WithinTolerance => String::new(),
        Status::NotPosted => "no statement row covers this posting period".to_string(),
        Status::UnexpectedPosting => {
            "no day of the period had a balance earning interest".to_string()
        }
        // The most plausible change leads; explain prints the search's whole list.
        Status::OverPosted | Status::UnderPosted => likely_cause
            .map(|c| plausible::sheet_words(&c, &t.id))
            .unwrap_or_default(),
    };
    ReconciliationLine {
        account: t.id.clone(),
        currency: currency_word(&t.currency),
        minor_units: t.minor_units,
        period_start: row.start,
        period_end: row.end,
        days: row.days,
        balance_years: row.balance_years,
        expected: row.expected,
        posted: row.posted,
        variance: row.variance,
        variance_bp: row.variance_bp.map(|bp| bp.round_dp(4)),
        status: row.status,
        likely_cause: cause,
    }
}

/// The account's currency code as a row holds it: the table's own code when
/// it is exactly that, else a copy.
fn currency_word(code: &str) -> Word {
    match crate::conventions::currency::lookup(code) {
        Some(c) if c.code == code => Word::Borrowed(c.code),
        _ => Word::Owned(code.to_string()),
    }
}

#[cfg(test)]
mod tests;
