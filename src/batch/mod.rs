//! A month-end batch: every account of the books accrued in parallel, then
//! the totals, the journal and the daily lines, in book order; and every
//! account read counted once, as computed, left out by the books' errors or
//! failed in the computation (behaviour.md, Completeness and presentation).
//!
//! Takes books already read and returns report rows; it reads no file and
//! prints nothing (the command line does both). Results are collected in book
//! order whatever the thread count, and every total is a sum of rounded
//! amounts, so the output is the same on one thread or many. It never
//! decides which accounts the reader left out: the books say so.

mod detail;
pub mod journal;
pub mod merge;
pub mod split;
pub mod tie_out;
pub mod totals;

use std::collections::{BTreeMap, HashMap};

use chrono::NaiveDate;
use rayon::prelude::*;
use rust_decimal::Decimal;

use crate::book::{
    AccountEntry, Book, BookedRow, StatementRow, TrialBalanceRow, UnreadableStatement,
};
use crate::engine::causes::{plausible, LikelyCause};
use crate::engine::floating::FixingFallback;
use crate::engine::ledger::{LedgerPosting, SettlementLines};
use crate::engine::reconcile::{Reconciled, Status, Tolerance};
use crate::engine::suspense::Suspense;
use crate::engine::{Movement, PostingRow};
use crate::pipeline::{run_account, AccountRun, BookAccount, Options};
use crate::problem::{report_order, Position, Problem};
use crate::report::model::{
    AccrualLine, CurrencyTotal, DailyLine, JournalDetail, JournalLine, LedgerLine, LeftOutLine,
    ReconciliationLine, StatusCount, SuspenseLine, TaxLine, TieOutLine, Word,
};
use crate::report::workbook::LineShape;
use journal::{AccountEntries, Journal, JournalStyle, ResolvedGl, SuspenseEntries};
use tie_out::TieOut;
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
    /// The knowledge date A (behaviour.md, Knowledge date): the books are
    /// already cut to what was booked by its end; `None` for no limit.
    pub as_at: Option<NaiveDate>,
    /// P, the as-at date of the previous close, when given.
    pub previous_as_at: Option<NaiveDate>,
    /// When the journal settles a posting against the accrual account.
    pub settlement_lines: SettlementLines,
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
    /// Totals by currency and side, in code order, asset before liability.
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
    /// The core system's open items at cut-off checked against ours (Booked
    /// rows dated the cut-off), by account in book order.
    pub accrued_check: Vec<ReconciliationLine>,
    /// The Tie-out, when a book has Trial balance rows.
    pub tie_out: Option<Vec<TieOutLine>>,
    /// Problems the engine found (book problems stay with their books).
    pub problems: Vec<Problem>,
    /// Accounts in the books (of the shard), counting those the reader
    /// left out: computed + left out + failed.
    pub accounts_read: usize,
    /// Accounts computed.
    pub accounts_computed: usize,
    /// Accounts the reader left out by errors in the books.
    pub accounts_left_out: usize,
    /// Accounts the computation stopped on.
    pub accounts_failed: usize,
    /// Every account left out or failed, with its error, in the order of
    /// the Problems sheet (then by id).
    pub left_out: Vec<LeftOutLine>,
}

/// Accounts accrued together before their rows are added up: enough for
/// every thread of the pool to stay busy, few enough to hold at once.
const PART: usize = 4096;

/// One account's outcome.
struct Outcome {
    line: AccrualLine,
    /// Its GL accounts.
    gl: ResolvedGl,
    /// The postings this run settles: settlement date and amount.
    settlements: Vec<(NaiveDate, Decimal)>,
    /// Their withholding tax: settlement date and tax.
    withheld: Vec<(NaiveDate, Decimal)>,
    daily: Vec<DailyLine>,
    reconciliation: Vec<(Status, ReconciliationLine)>,
    /// The core system's open item checked against ours, when a Booked row gives it.
    accrued_check: Option<ReconciliationLine>,
    notes: Vec<Problem>,
    /// Its interest-in-suspense entries, when it has a split.
    suspense: Option<SuspenseEntries>,
    /// A break penalty this run journals: its date, amount and GL account.
    penalty: Option<(NaiveDate, Decimal, String)>,
}

/// One account to accrue: its book's index, the book, the book's rows by
/// account, and the account.
type Work<'b> = (usize, &'b Book, &'b Rows<'b>, &'b AccountEntry);

/// A book's rows found once per book rather than per account: statement
/// rows and unreadable statement rows by account (each account's in sheet
/// order), the Booked rows of each account dated the day before the window
/// and the cut-off, and the book's entity.
struct Rows<'b> {
    statements: HashMap<&'b str, Vec<&'b StatementRow>>,
    unreadable: HashMap<&'b str, Vec<&'b UnreadableStatement>>,
    booked_opening: HashMap<&'b str, &'b BookedRow>,
    booked_close: HashMap<&'b str, &'b BookedRow>,
    entity: &'b str,
}

impl<'b> Rows<'b> {
    fn of(book: &'b Book, entity: &'b str, window_start: NaiveDate, cutoff: NaiveDate) -> Rows<'b> {
        let mut statements: HashMap<&str, Vec<&StatementRow>> = HashMap::new();
        for s in &book.statements {
            statements.entry(&*s.account).or_default().push(s);
        }
        let mut unreadable: HashMap<&str, Vec<&UnreadableStatement>> = HashMap::new();
        for u in &book.unreadable_statements {
            unreadable.entry(u.account.as_str()).or_default().push(u);
        }
        let on = |day: Option<NaiveDate>| -> HashMap<&'b str, &'b BookedRow> {
            book.booked
                .iter()
                .filter(|b| Some(b.date) == day)
                .map(|b| (b.account.as_str(), b))
                .collect()
        };
        Rows {
            statements,
            unreadable,
            booked_opening: on(window_start.pred_opt()),
            booked_close: on(Some(cutoff)),
            entity,
        }
    }
}

/// Accrues every account of `books` (in parallel on rayon's pool) and sums
/// the results. `tick` is called once per account, from any thread, for a
/// progress display.
pub fn run_books(
    books: &[Book],
    settings: &BatchSettings,
    tick: &(dyn Fn() + Sync),
) -> BatchResult {
    let mut accruals: Vec<AccrualLine> = Vec::new();
    let mut result = run_books_in_parts(books, settings, tick, &mut |part| {
        if accruals.is_empty() {
            // Every account gives one line: room for them all at once, not by doubling.
            accruals.reserve_exact(accounts_to_accrue(books, settings.shard).count());
        }
        accruals.extend(part);
    });
    result.accruals = accruals;
    result
}

/// [`run_books`], handing the Accruals lines to `part` as each part of
/// accounts is added up, in book order (a few thousand lines at a time,
/// whatever the thread count), rather than keeping them: the result's
/// `accruals` is empty. Everything else the result holds is the same.
/// `part` is called on the calling thread.
pub fn run_books_in_parts(
    books: &[Book],
    settings: &BatchSettings,
    tick: &(dyn Fn() + Sync),
    part: &mut dyn FnMut(Vec<AccrualLine>),
) -> BatchResult {
    in_parts(books, Vec::new(), settings, tick, part)
}

/// [`run_books_in_parts`], taking each book's movements and statement rows
/// out of it and dropping an account's once its part is added up, so that
/// the rows already accrued no longer take room beside the batch's growing
/// results. The books are left without movements and statement rows; all
/// else they hold (accounts, problems, the other sheets) stays. The result is
/// the same as [`run_books_in_parts`] gives.
pub fn run_books_releasing(
    books: &mut [Book],
    settings: &BatchSettings,
    tick: &(dyn Fn() + Sync),
    part: &mut dyn FnMut(Vec<AccrualLine>),
) -> BatchResult {
    let released: Vec<Released> = books
        .iter_mut()
        .map(|b| Released::take_from(b, settings.shard))
        .collect();
    in_parts(books, released, settings, tick, part)
}

/// A book's movements and statement rows, taken out of the book for
/// [`run_books_releasing`]: each account's are taken in turn, in book order,
/// and dropped once its part of the batch is added up.
struct Released {
    movements: BTreeMap<String, Vec<Movement>>,
    /// The statement rows of the accounts to accrue, last account first
    /// (each account's rows last row first): the next account's rows are at
    /// the end.
    statements: Vec<StatementRow>,
}

impl Released {
    fn take_from(book: &mut Book, shard: Option<(u32, u32)>) -> Released {
        let mut rows = std::mem::take(&mut book.statements);
        rows.retain(|s| in_shard(&s.account, shard));
        if !in_book_order(&book.accounts, &rows) {
            by_book_order(&book.accounts, &mut rows);
        }
        rows.reverse();
        Released {
            movements: std::mem::take(&mut book.movements),
            statements: rows,
        }
    }

    /// Account `id`'s rows, which the book no longer holds; accounts are
    /// taken in book order.
    fn take(&mut self, id: &str) -> Taken {
        let mut statements = Vec::new();
        while self.statements.last().is_some_and(|s| &*s.account == id) {
            statements.extend(self.statements.pop());
        }
        Taken {
            movements: self.movements.remove(id).unwrap_or_default(),
            statements,
        }
    }

    /// Gives back the room of the rows taken so far, once they are three
    /// quarters of it. Giving it back copies the rows left into new room
    /// while the old is still held: at half, that copy was the batch's peak
    /// at a million accounts (46 MB for a moment); at a quarter it is 23 MB,
    /// at a time the batch holds less.
    fn shrink(&mut self) {
        let rows = &mut self.statements;
        if rows.capacity() > 4096 && rows.len() < rows.capacity() / 4 {
            rows.shrink_to_fit();
        }
    }
}

/// Whether statement `rows` come account by account in the order of
/// `accounts` (each account's rows together), as most books give them.
fn in_book_order(accounts: &[AccountEntry], rows: &[StatementRow]) -> bool {
    let mut rest = rows;
    for a in accounts {
        while rest.first().is_some_and(|s| *s.account == *a.terms.id) {
            rest = rest.get(1..).unwrap_or_default();
        }
    }
    rest.is_empty()
}

/// Sorts statement `rows` into the order of their accounts in `accounts`,
/// each account's rows in sheet order, rows of no account last.
fn by_book_order(accounts: &[AccountEntry], rows: &mut [StatementRow]) {
    let mut places: Vec<(&str, u32)> = accounts
        .iter()
        .enumerate()
        .map(|(i, a)| (a.terms.id.as_str(), u32::try_from(i).unwrap_or(u32::MAX)))
        .collect();
    places.sort_unstable();
    let place = |id: &str| {
        places
            .binary_search_by(|(k, _)| (*k).cmp(id))
            .ok()
            .and_then(|i| places.get(i))
            .map_or(u32::MAX, |(_, p)| *p)
    };
    // Stable: each account's rows stay in sheet order.
    rows.sort_by_cached_key(|s| place(&s.account));
}

/// One account's movements and statement rows, taken out of its book.
struct Taken {
    movements: Vec<Movement>,
    statements: Vec<StatementRow>,
}

fn in_parts(
    books: &[Book],
    mut released: Vec<Released>,
    settings: &BatchSettings,
    tick: &(dyn Fn() + Sync),
    part: &mut dyn FnMut(Vec<AccrualLine>),
) -> BatchResult {
    let options = Options {
        window_start: settings.window_start,
        cutoff: settings.cutoff,
        tolerance: settings.tolerance,
        fixing_fallback: settings.fixing_fallback,
        keep_days: settings.daily,
        fast_path: settings.fast_path,
        previous_as_at: settings.previous_as_at,
        settlement_lines: settings.settlement_lines,
    };
    let rows: Vec<Rows> = books
        .iter()
        .enumerate()
        .map(|(bi, b)| {
            let entity = settings.entities.get(bi).map_or("default", String::as_str);
            Rows::of(b, entity, settings.window_start, settings.cutoff)
        })
        .collect();
    let work = work_in_book_order(books, &rows, settings.shard);
    let left_out = left_out_by_books(books, settings.shard);
    let mut sums = Sums::new(settings, work.len() + left_out.len());
    // Room for a reconciliation row a statement row at once: a list grown
    // by doubling holds its old and its new room together for a moment,
    // which at a million accounts is the batch's peak (room never written
    // takes no memory).
    let statement_rows: usize = released.iter().map(|r| r.statements.len()).sum();
    sums.result.reconciliation.reserve(statement_rows);
    sums.result.accounts_left_out = left_out.len();
    sums.result.left_out = left_out;
    // Every shard of books with a life event shows the status columns.
    let life_shown = shows_life(books);
    // Accounts go through in parts of book order: each part accrued in
    // parallel, then added to the sums and its lines handed on, so that
    // only one part's outcomes (day rows, postings, notes) are held at a time.
    for chunk in work.chunks(PART) {
        let taken: Vec<Option<Taken>> = chunk
            .iter()
            .map(|&(bi, _, _, entry)| released.get_mut(bi).map(|r| r.take(&entry.terms.id)))
            .collect();
        released.iter_mut().for_each(Released::shrink);
        let outcomes = accrue_part(chunk, &taken, &options, life_shown, tick);
        drop(taken);
        let mut lines = Vec::with_capacity(chunk.len());
        for (&(_, _, _, entry), outcome) in chunk.iter().zip(outcomes) {
            match outcome {
                Ok(o) => lines.push(sums.add(entry, o)),
                Err(p) => sums.failed(&entry.terms.id, *p),
            }
        }
        part(lines);
    }
    let names: Vec<String> = books.iter().map(|b| b.path.display().to_string()).collect();
    sort_left_out(&mut sums.result.left_out, &names);
    sums.finish(books)
}

/// Whether the Accruals show every account's status and term: when some
/// account of the books (of any shard) has a life event.
fn shows_life(books: &[Book]) -> bool {
    books
        .iter()
        .any(|b| b.accounts.iter().any(|a| !a.terms.events.is_none()))
}

/// The shape of each Accruals line the batch gives for `books`, in book
/// order, known before any account is accrued: its minor units and the
/// column groups it holds, as if no account failed (an account the
/// computation stops on gives no line). A writer decides the Accruals'
/// layout from them before the first line arrives.
pub fn line_shapes<'b>(
    books: &'b [Book],
    settings: &BatchSettings,
) -> impl Iterator<Item = LineShape> + 'b {
    let life = shows_life(books);
    let shard = settings.shard;
    books
        .iter()
        .flat_map(|b| b.accounts.iter().map(move |a| (b, a)))
        .filter(move |(_, a)| in_shard(&a.terms.id, shard))
        .map(move |(b, a)| LineShape {
            minor_units: a.terms.minor_units,
            life,
            suspense: crate::pipeline::splits_interest(b, a),
            tax: a.terms.tax.is_some(),
        })
}

/// Every account of the books (of the shard, if any), in book order.
fn accounts_to_accrue(
    books: &[Book],
    shard: Option<(u32, u32)>,
) -> impl Iterator<Item = &AccountEntry> {
    books
        .iter()
        .flat_map(|b| &b.accounts)
        .filter(move |a| in_shard(&a.terms.id, shard))
}

/// The accounts each book's reader left out (of the shard, if any), each
/// with the error that kept it out.
fn left_out_by_books(books: &[Book], shard: Option<(u32, u32)>) -> Vec<LeftOutLine> {
    books
        .iter()
        .flat_map(|b| {
            b.left_out
                .iter()
                .filter(move |l| in_shard(&l.account, shard))
                .map(move |l| match b.left_out_error(l) {
                    Some(p) => left_out_line(&l.account, p),
                    // Never the case for a book the reader returned, but an
                    // account left out is counted and named all the same.
                    None => LeftOutLine {
                        account: l.account.clone(),
                        position: Position {
                            book: b.path.display().to_string(),
                            ..Position::default()
                        },
                        error: "left out by an error of the book".to_string(),
                    },
                })
        })
        .collect()
}

/// An account left out, with the words of the error that kept it out: what
/// the error only follows from (a sheet missing or unreadable), else what
/// it found, expected and how to fix it.
pub fn left_out_line(account: &str, p: &Problem) -> LeftOutLine {
    LeftOutLine {
        account: account.to_string(),
        position: p.position.clone(),
        error: match &p.follows {
            Some(f) => format!("left out because {}", f.because()),
            None => p.words(),
        },
    }
}

/// Accounts left out in the order of the Problems sheet (book, sheet, row,
/// column of their error), then by id: the order one run and a merge of its
/// shards both give.
pub fn sort_left_out(lines: &mut [LeftOutLine], books: &[String]) {
    lines.sort_by_cached_key(|l| (report_order(&l.position, books), l.account.clone()));
}

/// Every account of the books (of the shard, if any), in book order.
fn work_in_book_order<'b>(
    books: &'b [Book],
    rows: &'b [Rows<'b>],
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
    taken: &[Option<Taken>],
    options: &Options,
    life_shown: bool,
    tick: &(dyn Fn() + Sync),
) -> Vec<Result<Outcome, Box<Problem>>> {
    part.par_iter()
        .with_min_len(64)
        .enumerate()
        .map(|(i, &(_, book, rows, entry))| {
            let taken = taken.get(i).and_then(Option::as_ref);
            let r = accrue_one(book, rows, entry, taken, options, life_shown);
            tick();
            r
        })
        .collect()
}

/// The batch's sums so far, added to one account at a time in book order.
struct Sums<'s> {
    settings: &'s BatchSettings,
    result: BatchResult,
    journal: Journal,
    totals: Totals,
    counts: StatusCounts,
    tie_out: TieOut,
    daily: Vec<DailyLine>,
}

impl<'s> Sums<'s> {
    fn new(settings: &'s BatchSettings, accounts_read: usize) -> Sums<'s> {
        let result = BatchResult {
            accounts_read,
            ..BatchResult::default()
        };
        Sums {
            settings,
            result,
            journal: if settings.journal_detail {
                Journal::keeping_detail_of(accounts_read)
            } else {
                Journal::new()
            },
            totals: Totals::default(),
            counts: StatusCounts::default(),
            tie_out: TieOut::default(),
            daily: Vec::new(),
        }
    }

    /// Adds one computed account: its totals, journal lines, day rows,
    /// reconciliation rows and notes; returns its accrual line.
    fn add(&mut self, entry: &AccountEntry, o: Outcome) -> AccrualLine {
        let settings = self.settings;
        self.totals.add(&o.line);
        let l = &o.line.ledger;
        let entries = AccountEntries {
            account: &entry.terms.id,
            entity: &l.entity,
            currency: &o.line.currency,
            minor_units: o.line.minor_units,
            side: entry.terms.side,
            gl: &o.gl,
            window_days_interest: l.window_days_interest,
            prior_period: l.prior_period,
            open_item: l.open_item,
            settlements: o.settlements,
            withheld: o.withheld,
        };
        self.journal.add_account(
            &entries,
            settings.journal_style,
            settings.window_start,
            settings.cutoff,
        );
        if let Some(s) = &o.suspense {
            self.journal.add_suspense(
                &entries,
                s,
                settings.journal_style,
                settings.window_start,
                settings.cutoff,
            );
        }
        if let Some((date, amount, gl_penalty)) = &o.penalty {
            self.journal
                .add_penalty(&entries, gl_penalty, *date, *amount);
        }
        self.daily.extend(o.daily);
        for (_, line) in o.reconciliation {
            self.counts.add(line.status);
            self.result.reconciliation.push(line);
        }
        self.result.problems.extend(o.notes);
        self.result.accrued_check.extend(o.accrued_check);
        self.tie_out.add(&o.line);
        self.result.accounts_computed += 1;
        o.line
    }

    /// Counts an account the computation stopped on, with its problem.
    fn failed(&mut self, account: &str, p: Problem) {
        self.result.left_out.push(left_out_line(account, &p));
        self.result.problems.push(p);
        self.result.accounts_failed += 1;
    }

    fn finish(self, books: &[Book]) -> BatchResult {
        let settings = self.settings;
        let tb: Vec<&TrialBalanceRow> = books.iter().flat_map(|b| &b.trial_balance).collect();
        let (journal, journal_detail) = self.journal.finish();
        let mut result = self.result;
        if settings.journal_detail && journal_detail.is_none() {
            result.problems.push(detail_given_up());
        }
        if !tb.is_empty() {
            // With accounts left out, a GL account only they use is not
            // "unused": their errors already say why nothing ties to it.
            if result.accounts_left_out + result.accounts_failed == 0 {
                result.problems.extend(self.tie_out.unused_row_notes(
                    &tb,
                    settings.window_start,
                    settings.cutoff,
                ));
            }
            let (lines, mixed) = self.tie_out.rows(
                &tb,
                settings.window_start,
                settings.cutoff,
                &settings.tolerance,
            );
            let first_book = books
                .first()
                .map(|b| b.path.display().to_string())
                .unwrap_or_default();
            result
                .problems
                .extend(mixed.iter().map(|m| m.problem(&first_book)));
            result.tie_out = Some(lines);
        }
        BatchResult {
            totals: self.totals.rows(),
            status_counts: self.counts.rows(),
            journal,
            journal_detail,
            daily: settings.daily.then_some(self.daily),
            ..result
        }
    }
}

/// The warning for a Journal detail too large to index: more than
/// 4,294,967,295 accounts or journal lines (no run comes near it).
fn detail_given_up() -> Problem {
    Problem {
        severity: crate::problem::Severity::Warning,
        position: crate::problem::Position::default(),
        account: None,
        found: "more than 4,294,967,295 accounts or journal lines".into(),
        expected: "a Journal detail whose accounts and lines can be counted".into(),
        fix: "the Journal detail is left out whole; split the run with --shard K/N".into(),
        follows: None,
    }
}

/// One account through the pipeline, turned into the batch's rows.
fn accrue_one(
    book: &Book,
    rows: &Rows,
    entry: &AccountEntry,
    taken: Option<&Taken>,
    options: &Options,
    life_shown: bool,
) -> Result<Outcome, Box<Problem>> {
    let id = entry.terms.id.as_str();
    let own: Vec<&StatementRow>;
    let statements = match taken {
        Some(t) => {
            own = t.statements.iter().collect();
            &own[..]
        }
        None => rows.statements.get(id).map_or(&[][..], Vec::as_slice),
    };
    let unreadable = rows.unreadable.get(id).map_or(&[][..], Vec::as_slice);
    let mut account = BookAccount::from_book(book, entry, statements);
    if let Some(t) = taken {
        account.movements = &t.movements;
    }
    let account = account
        .with_booked_opening(rows.booked_opening.get(id).copied())
        .with_booked_close(rows.booked_close.get(id).copied())
        .with_unreadable(unreadable);
    let run = run_account(&account, options).map_err(|f| Box::new(f.problem))?;
    Ok(outcome(
        entry,
        rows.entity,
        run,
        unreadable,
        options,
        life_shown,
    ))
}

/// The rows of an account computed: its accrual line, the postings of the
/// window for the journal, its day lines when kept, its reconciliation
/// lines (a row for each statement row that could not be read last) and
/// its notes.
fn outcome(
    entry: &AccountEntry,
    entity: &str,
    run: AccountRun,
    unreadable: &[&UnreadableStatement],
    options: &Options,
    life_shown: bool,
) -> Outcome {
    let t = &entry.terms;
    let r = run.result;
    let accrued_check = run.accrued_check.as_ref().map(|c| {
        let mut line = reconciliation_line(entry, &c.row, c.likely_cause.clone());
        line.likely_cause = line.likely_cause.replace("posted amount", "booked amount");
        line
    });
    // A posting period whose statement row could not be read is not "not
    // posted": the unreadable row's own line stands for it.
    let covered = |c: &crate::pipeline::CheckedRow| {
        c.row.status == Status::NotPosted
            && unreadable.iter().any(|u| u.covers(c.row.start, c.row.end))
    };
    let reconciliation = run
        .rows
        .into_iter()
        .filter(|c| !covered(c))
        .map(|c| {
            (
                c.row.status,
                ReconciliationLine {
                    tax: c.tax.map(Box::new),
                    ..reconciliation_line(entry, &c.row, c.likely_cause)
                },
            )
        })
        .chain(
            unreadable
                .iter()
                .map(|u| (Status::StatementUnreadable, unreadable_line(entry, u))),
        )
        .collect();
    let mode = options.settlement_lines;
    let settlements = run
        .postings
        .iter()
        .filter(|p| mode.journals(p, options.window_start, options.cutoff))
        .filter_map(|p| Some((mode.settlement_date(p)?, p.amount)))
        .collect();
    let withheld = withheld_of(&run.postings, &r.postings, options);
    let gl = ResolvedGl::of(t.side, &entry.gl);
    let penalty = journal::penalty_entry(
        run.life.as_ref().and_then(|l| l.closing.as_ref()),
        t.events.gl_penalty.as_deref(),
        &gl.interest,
        options.window_start,
        options.cutoff,
    );
    let f = &run.ledger;
    let (suspense_line, suspense_entries) = suspense_figures(
        entry,
        run.suspense.as_ref(),
        &gl,
        f.interest_for_window,
        options,
    );
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
            posted_in_window: run
                .postings
                .iter()
                .filter(|p| p.made && p.end >= options.window_start && p.end <= options.cutoff)
                .map(|p| p.amount)
                .sum(),
            interest_for_window: suspense_line.as_ref().map_or(f.interest_for_window, |s| {
                s.contractual_for_window - s.reversed_in_window - s.suspended_in_window
                    + s.released_in_window
            }),
            effective_annual_rate: r.effective_annual_rate,
            ledger: LedgerLine {
                entity: Word::Owned(entity.to_string()),
                gl_interest: gl.interest.clone(),
                gl_accrued: gl.accrued.clone(),
                gl_settlement: gl.settlement.clone(),
                gl_prior_period: gl.prior_period.clone(),
                window_days_interest: f.window_days_interest,
                booked_opening: f.booked_opening,
                opening_source: Word::Borrowed(f.opening_source.words()),
                prior_period: f.prior_period,
                open_item: f.open_item,
                settled_in_window: f.settled_in_window,
            },
            tax: t
                .tax
                .as_ref()
                .map(|_| tax_line(&run.postings, &r.postings, options)),
            suspense: suspense_line.map(Box::new),
            life: Some(life_line(
                t,
                run.life.as_ref(),
                &r,
                options.cutoff,
                life_shown,
            )),
        },
        gl,
        settlements,
        withheld,
        daily,
        reconciliation,
        accrued_check,
        notes: run.notes,
        suspense: suspense_entries,
        penalty,
    }
}

/// An account's status and current term at the cut-off (behaviour.md,
/// Account life events), shown when the account has a life event or
/// `shown` says the books have one.
fn life_line(
    t: &crate::engine::AccountTerms,
    life: Option<&crate::engine::events::Life>,
    result: &crate::engine::AccountResult,
    cutoff: NaiveDate,
    shown: bool,
) -> crate::report::model::LifeLine {
    let f = crate::engine::events::figures_of(t, life, result, cutoff);
    crate::report::model::LifeLine {
        shown: shown || life.is_some(),
        status: f.status.word().into(),
        days_since_maturity: f.days_since_maturity,
        term_start: f.term_start,
        maturity: f.maturity,
    }
}

/// The tax withheld from the postings counted in Posted in window, and
/// their net (behaviour.md, Withholding tax).
fn tax_line(postings: &[LedgerPosting], rows: &[PostingRow], options: &Options) -> TaxLine {
    let mut line = TaxLine::default();
    for (_, r) in postings
        .iter()
        .zip(rows)
        .filter(|(p, _)| p.made && p.end >= options.window_start && p.end <= options.cutoff)
    {
        line.withheld += r.withheld.tax;
        line.net_posted += r.withheld.net;
    }
    line
}

/// The withholding tax of the postings this run settles, with their
/// settlement dates (behaviour.md, Withholding tax): the ledger's postings
/// are the engine's, one for one and in order. Empty for an account without
/// tax, so its journal is as before.
fn withheld_of(
    postings: &[LedgerPosting],
    rows: &[PostingRow],
    options: &Options,
) -> Vec<(NaiveDate, Decimal)> {
    let mode = options.settlement_lines;
    postings
        .iter()
        .zip(rows)
        .filter(|(_, r)| !r.withheld.tax.is_zero())
        .filter(|(p, _)| mode.journals(p, options.window_start, options.cutoff))
        .filter_map(|(p, r)| Some((mode.settlement_date(p)?, r.withheld.tax)))
        .collect()
}

/// An account's interest-in-suspense line for Accruals and its journal
/// entries for the window (behaviour.md, Non-accrual and interest in
/// suspense); `None` for an account without a split.
fn suspense_figures(
    entry: &AccountEntry,
    split: Option<&Suspense>,
    gl: &ResolvedGl,
    contractual: Decimal,
    options: &Options,
) -> (Option<SuspenseLine>, Option<SuspenseEntries>) {
    let Some(s) = split else {
        return (None, None);
    };
    let (gl_suspense, gl_reversal) = SuspenseEntries::gl(&entry.gl, &gl.interest);
    let within = |d: NaiveDate| d >= options.window_start && d <= options.cutoff;
    let line = SuspenseLine {
        status: Word::Borrowed(s.status_at_cutoff.name()),
        contractual_for_window: contractual,
        reversed_in_window: s.reversed_in_window,
        suspended_in_window: s.suspended_in_window,
        released_in_window: s.released_in_window,
        suspense_before_window: s.suspense_before_window,
        suspense_at_cutoff: s.suspense_at_cutoff,
        gl_suspense: gl_suspense.clone(),
    };
    let entries = SuspenseEntries {
        gl_suspense,
        gl_reversal,
        suspended: s.suspended_in_window,
        reversals: s
            .reversals
            .iter()
            .filter(|r| within(r.date))
            .map(|r| (r.date, r.amount))
            .collect(),
        releases: s
            .releases
            .iter()
            .filter(|r| within(r.date))
            .map(|r| (r.date, r.amount))
            .collect(),
    };
    (Some(line), Some(entries))
}

/// The Reconciliation line of a statement row that could not be read: its
/// period when its dates could be read, no figures, and the error in the
/// likely cause (behaviour.md, Completeness and presentation).
fn unreadable_line(entry: &AccountEntry, u: &UnreadableStatement) -> ReconciliationLine {
    let t = &entry.terms;
    ReconciliationLine {
        account: t.id.clone(),
        currency: currency_word(&t.currency),
        minor_units: t.minor_units,
        period_start: u.period.map(|(s, _)| s),
        period_end: u.period.map(|(_, e)| e),
        days: 0,
        balance_years: Decimal::ZERO,
        expected: Decimal::ZERO,
        posted: Decimal::ZERO,
        variance: Decimal::ZERO,
        variance_bp: None,
        status: Status::StatementUnreadable,
        likely_cause: format!(
            "the statement row at {} could not be read, so this period is not reconciled: {}",
            row_named(&u.error.position),
            u.error.words()
        ),
        tax: None,
    }
}

/// A row of a sheet as a reader finds it: `Statements!C7`, or
/// `statements.csv, line 7, column posted_interest`.
fn row_named(p: &Position) -> String {
    if p.csv {
        format!("{}, {}", p.sheet_shown(), p.cell_shown())
    } else {
        format!("{}!{}", p.sheet, p.cell)
    }
}

fn reconciliation_line(
    entry: &AccountEntry,
    row: &Reconciled,
    likely_cause: Option<LikelyCause>,
) -> ReconciliationLine {
    let t = &entry.terms;
    let cause = match row.status {
        Status::Agrees | Status::WithinTolerance => String::new(),
        Status::NotPosted => "no statement row covers this posting period: treated as not made (it stays in the open item and no journal line settles it)".to_string(),
        Status::UnexpectedPosting => {
            "no day of the period had a balance earning interest".to_string()
        }
        // The most plausible change leads; explain prints the search's whole list.
        Status::OverPosted | Status::UnderPosted => likely_cause
            .map(|c| plausible::sheet_words(&c, &t.id))
            .unwrap_or_default(),
        // Made by `unreadable_line`, never by the reconciliation.
        Status::StatementUnreadable => "the statement row could not be read".to_string(),
    };
    ReconciliationLine {
        account: t.id.clone(),
        currency: currency_word(&t.currency),
        minor_units: t.minor_units,
        period_start: Some(row.start),
        period_end: Some(row.end),
        days: row.days,
        balance_years: row.balance_years,
        expected: row.expected,
        posted: row.posted,
        variance: row.variance,
        variance_bp: row.variance_bp.map(|bp| bp.round_dp(4)),
        status: row.status,
        likely_cause: cause,
        tax: None,
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
