//! Reading one book into a typed [`Book`], and the checks across the books
//! of one run.
//!
//! [`read_book`] never fails: whatever is wrong with the file or its cells
//! is a [`Problem`] in the book, and an account with an error is kept out of
//! `accounts` with its rows of other sheets, and listed in `left_out` with
//! that error: no account of the Accounts sheet vanishes. A statement row
//! that cannot be read does not keep its account out (it is listed in
//! `unreadable_statements`). The input is only read.

use std::collections::{BTreeSet, HashMap, HashSet};
use std::path::Path;

use super::accounts::{self, Known, Others};
use super::accrual_status::{self, Statuses};
use super::booked::{self, Booked};
use super::cell::NumberStyle;
use super::fixings::{self, FixingsSheet};
use super::holidays::{self, Calendars};
use super::model::{AccountEntry, Book, LeftOut};
use super::open::load;
use super::rates::{self, Rates};
use super::settings::{self, Settings};
use super::sheet::{Rows, Sheet};
use super::table::Ctx;
use super::tax::{self, Taxes};
use super::{movements, statements, trial_balance};
use crate::problem::{a1_row, FollowOn, Position, Problem, Severity};
use crate::schema::SheetKind;

/// How to read a book.
///
/// ```
/// use std::path::Path;
/// use ledgerate::book::{read_book, ReadOptions};
///
/// // "1.234,56" is 1234.56 only when the book is read with a decimal comma.
/// let path = Path::new("tests/fixtures/books/decimal_comma_csv");
/// let with = read_book(path, &ReadOptions { decimal_comma: true });
/// assert_eq!(with.accounts[0].terms.opening_balance.to_string(), "1234.56");
/// let without = read_book(path, &ReadOptions::default());
/// assert!(without.accounts.is_empty() && without.has_errors());
/// ```
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct ReadOptions {
    /// Number text uses a decimal comma (`1.234,56`). Without it such text is
    /// an error that says to use this option.
    pub decimal_comma: bool,
}

/// Reads the book at `path`: a workbook (.xlsx, .xlsm, .xlsb, .xls, .ods,
/// chosen by extension, or by content when the extension is unknown) or a
/// folder of CSV files named after the sheets.
///
/// Never fails: a file that cannot be read gives a book with an error
/// problem and nothing else.
///
/// ```
/// use std::path::Path;
/// use ledgerate::book::{read_book, ReadOptions};
///
/// let book = read_book(Path::new("tests/fixtures/books/harbourview_good.xlsx"), &ReadOptions::default());
/// assert!(!book.has_errors());
/// let saver = book.accounts.iter().find(|a| a.terms.id == "HM-SAV-001").unwrap();
/// assert_eq!(saver.terms.currency, "USD");
///
/// let missing = read_book(Path::new("tests/fixtures/books/no_such_book.xlsx"), &ReadOptions::default());
/// assert!(missing.has_errors() && missing.accounts.is_empty());
/// ```
pub fn read_book(path: &Path, options: &ReadOptions) -> Book {
    let mut book = read_sheets(path, options);
    if path.is_dir() {
        mark_csv(&mut book);
    }
    book
}

/// Marks every position of a CSV folder's book, so that problems (and
/// those found later from its rows) name the file and line a user opens.
fn mark_csv(book: &mut Book) {
    for p in &mut book.problems {
        p.position.csv = true;
        if let Some(f) = &mut p.follows {
            f.cause.csv = true;
        }
    }
    let mut marked = Vec::new();
    for a in &mut book.accounts {
        a.position.mark_csv(&mut marked);
    }
    for s in &mut book.statements {
        s.position.mark_csv(&mut marked);
    }
    for u in &mut book.unreadable_statements {
        u.error.position.csv = true;
        if let Some(f) = &mut u.error.follows {
            f.cause.csv = true;
        }
    }
    for s in &mut book.settings {
        s.position.csv = true;
    }
    for b in &mut book.booked {
        b.position.csv = true;
    }
    for t in &mut book.trial_balance {
        t.position.csv = true;
    }
    for s in book.sheets.values_mut() {
        s.csv = true;
    }
}

/// The book at `path`, its positions as the sheets name them.
fn read_sheets(path: &Path, options: &ReadOptions) -> Book {
    let name = path.display().to_string();
    let loaded = load(path, &name);
    let mut book = Book {
        path: path.to_path_buf(),
        problems: loaded.problems,
        ..Book::default()
    };
    let ctx = Ctx {
        book: &name,
        style: NumberStyle {
            decimal_comma: options.decimal_comma,
        },
    };
    // A CSV sheet's text is read when the sheet is typed and dropped as
    // soon as it is typed: it is the largest thing the reader holds.
    let mut sheets = loaded.sheets;
    let mut changed: Vec<Problem> = Vec::new();
    book.sheets = sheets
        .iter()
        .map(|s| (s.kind, ctx.at(&s.name, String::new())))
        .collect();
    let mut sheet = |kind: SheetKind| {
        let i = sheets.iter().position(|s| s.kind == kind)?;
        match sheets.swap_remove(i).read_text() {
            Ok(s) => Some(s),
            // Typed as a sheet with no rows: what needs it is left out.
            Err(s) => {
                changed.push(changed_file(ctx, &s));
                Some(Sheet {
                    rows: Rows::Held(Vec::new()),
                    ..s
                })
            }
        }
    };
    let problems = &mut book.problems;

    let settings = sheet(SheetKind::Settings)
        .map_or_else(Settings::default, |s| settings::read(ctx, &s, problems));
    let calendars = sheet(SheetKind::Holidays)
        .map_or_else(Calendars::default, |s| holidays::read(ctx, &s, problems));
    let rates =
        sheet(SheetKind::Rates).map_or_else(Rates::default, |s| rates::read(ctx, &s, problems));
    let fixings = sheet(SheetKind::Fixings)
        .map_or_else(FixingsSheet::default, |s| fixings::read(ctx, &s, problems));
    let taxes = sheet(SheetKind::Tax).map_or_else(Taxes::default, |s| tax::read(ctx, &s, problems));
    let others = Others {
        rates: &rates,
        calendars: &calendars,
        fixings: &fixings,
        taxes: &taxes,
    };
    let accounts_sheet = sheet(SheetKind::Accounts);
    let found = accounts_sheet
        .as_ref()
        .and_then(|s| accounts::read(ctx, s, &others, problems));
    let Some(found) = found else {
        // The Trial balance names no account: it is read all the same.
        book.trial_balance = sheet(SheetKind::TrialBalance)
            .map(|s| trial_balance::read(ctx, &s, problems))
            .unwrap_or_default();
        book.problems.append(&mut changed);
        keep_tables(&mut book, rates, fixings, settings);
        return book;
    };
    if let Some(s) = accounts_sheet.filter(|s| s.rows().take(2).count() == 1) {
        no_account_rows(&name, &s, problems);
    }
    let mut rejected: BTreeSet<String> = found.rejected;
    let mut entries = found.entries;
    // Movements, then Statements: each sheet's text is dropped once it is
    // typed, so the two texts (the largest after the Accounts') are never
    // held together beside the typed rows.
    let moved = sheet(SheetKind::Movements).map(|s| {
        let mut met = Vec::new();
        let typed = movements::read(ctx, &s, &found.known, &mut met);
        (s, typed, met)
    });
    if let Some(m) = take_typed(moved, &entries, problems, &mut rejected) {
        rejected.extend(m.spoiled);
        book.movements = m.by_account;
        book.accrual.receipts = m.interest;
    }
    let stated = sheet(SheetKind::Statements).map(|s| {
        let mut met = Vec::new();
        let typed = statements::read(
            ctx,
            &s,
            &found.known,
            settings.statement_end,
            settings.statement_amounts,
            &mut met,
        );
        (s, typed, met)
    });
    if let Some(st) = take_typed(stated, &entries, problems, &mut rejected) {
        book.statements = st.rows;
        book.unreadable_statements = st.unreadable;
    }
    let booked_sheet = sheet(SheetKind::Booked).map(|s| {
        let mut met = Vec::new();
        let typed = booked::read(ctx, &s, &found.known, &mut met);
        (s, typed, met)
    });
    if let Some(b) = take_typed::<Booked>(booked_sheet, &entries, problems, &mut rejected) {
        rejected.extend(b.spoiled);
        book.booked = b.rows;
    }
    book.trial_balance = sheet(SheetKind::TrialBalance)
        .map(|s| trial_balance::read(ctx, &s, problems))
        .unwrap_or_default();
    let status_sheet = sheet(SheetKind::AccrualStatus).map(|s| {
        let mut met = Vec::new();
        let typed = accrual_status::read(ctx, &s, &found.known, &mut met);
        (s, typed, met)
    });
    if let Some(st) = take_typed::<Statuses>(status_sheet, &entries, problems, &mut rejected) {
        rejected.extend(st.spoiled);
        book.accrual.statuses = st.by_account;
    }

    entries.retain(|e| !rejected.contains(&e.terms.id));
    book.left_out = left_out(&rejected, &found.known, problems);
    let kept: HashSet<&str> = entries.iter().map(|e| e.terms.id.as_str()).collect();
    book.movements.retain(|id, _| kept.contains(id.as_str()));
    book.statements.retain(|s| kept.contains(&*s.account));
    book.booked.retain(|b| kept.contains(b.account.as_str()));
    book.accrual.retain(|id| kept.contains(id));
    book.unreadable_statements
        .retain(|s| kept.contains(&*s.account));
    fixing_holiday_warnings(ctx, &entries, &rates, &fixings, problems);
    book.accounts = entries;
    book.problems.append(&mut changed);
    keep_tables(&mut book, rates, fixings, settings);
    book
}

/// The error on a CSV file that changed (or went) between the check when
/// the book was opened and the typing of its sheet: the sheet is typed as
/// having no rows, so no account is computed from what it was.
fn changed_file(ctx: Ctx<'_>, sheet: &Sheet) -> Problem {
    Problem {
        severity: Severity::Error,
        position: ctx.at(&sheet.name, String::new()),
        account: None,
        found: format!("{}.csv changed while the book was read", sheet.name),
        expected: format!(
            "a {} file that stays as it is while the book is read",
            sheet.kind.label()
        ),
        fix: "run again once the file is saved; this run does not read it".to_string(),
        follows: None,
    }
}

/// The accounts of the Accounts sheet in `rejected`, in sheet order, each
/// with the first error that names it (an id only other sheets name is no
/// account of the book).
fn left_out(rejected: &BTreeSet<String>, known: &Known, problems: &[Problem]) -> Vec<LeftOut> {
    let mut first: HashMap<&str, usize> = HashMap::new();
    for (i, p) in problems.iter().enumerate() {
        if p.severity != Severity::Error {
            continue;
        }
        if let Some(id) = p.account.as_deref().filter(|id| rejected.contains(*id)) {
            first.entry(id).or_insert(i);
        }
    }
    let mut out: Vec<(u32, LeftOut)> = rejected
        .iter()
        .filter_map(|id| {
            let place = known.place(id)?;
            let problem = *first.get(id.as_str())?;
            Some((
                place,
                LeftOut {
                    account: id.clone(),
                    problem,
                },
            ))
        })
        .collect();
    out.sort_by_key(|(place, _)| *place);
    out.into_iter().map(|(_, l)| l).collect()
}

/// The book's rate schedules, fixings and settings, as read.
fn keep_tables(book: &mut Book, rates: Rates, fixings: FixingsSheet, settings: Settings) {
    book.rates = rates.schedules;
    book.floating_rates = rates.floating;
    book.fixings = fixings.fixings;
    book.settings = settings.rows;
    book.rate_bookings = rates.bookings;
}

/// A typed sheet: the sheet, what it gives (`None` when it cannot be read
/// as a table), and the problems found typing it.
type Typed<T> = (Sheet, Option<T>, Vec<Problem>);

/// What a typed Movements, Statements or Booked sheet gives, its problems added to
/// the book's; a sheet that cannot be read as a table keeps every account
/// out.
fn take_typed<T>(
    typed: Option<Typed<T>>,
    entries: &[AccountEntry],
    problems: &mut Vec<Problem>,
    rejected: &mut BTreeSet<String>,
) -> Option<T> {
    let (s, typed, mut found) = typed?;
    problems.append(&mut found);
    if typed.is_none() {
        unusable_sheet(&s, entries, problems, rejected);
    }
    typed
}

/// A fixing dated on a day that is not a business day of an account's
/// calendar is never used for it: a warning, once per calendar.
fn fixing_holiday_warnings(
    ctx: Ctx<'_>,
    entries: &[AccountEntry],
    rates: &Rates,
    fixings: &FixingsSheet,
    problems: &mut Vec<Problem>,
) {
    let mut seen = BTreeSet::new();
    for e in entries {
        if let Some(schedule) = rates.floating.get(&e.rate_ref) {
            for index in schedule.indices() {
                fixings.holiday_warnings(
                    ctx,
                    index,
                    &e.terms.calendar,
                    &e.terms.id,
                    &mut seen,
                    problems,
                );
            }
        }
    }
}

/// An Accounts sheet with a header and nothing under it: the book computes
/// nothing, which is worth a warning (a filter or a wrong sheet saved?).
fn no_account_rows(book: &str, sheet: &Sheet, problems: &mut Vec<Problem>) {
    let below = sheet.rows().next().map_or(1, |h| h.index.saturating_add(1));
    problems.push(Problem {
        severity: Severity::Warning,
        position: Position {
            book: book.to_string(),
            sheet: sheet.name.clone(),
            cell: a1_row(below),
            ..Position::default()
        },
        account: None,
        found: "a header row and no account rows".to_string(),
        expected: "one row per account under the header".to_string(),
        fix: "add the accounts (check the sheet was not saved filtered), or leave this book out of the run".to_string(),
        follows: None,
    });
}

/// A Movements, Statements or Booked sheet that cannot be read as a table
/// leaves every account's balance, postings or opening unknown: each account
/// gets an error.
fn unusable_sheet(
    sheet: &Sheet,
    entries: &[AccountEntry],
    problems: &mut Vec<Problem>,
    rejected: &mut BTreeSet<String>,
) {
    for e in entries {
        problems.push(Problem {
            severity: Severity::Error,
            position: e.position.to_position(),
            account: Some(e.terms.id.clone()),
            found: e.terms.id.clone(),
            expected: format!("a {} sheet that can be read", sheet.kind.label()),
            fix: format!(
                "the {} sheet ({}) cannot be read, so this account cannot be computed: correct that sheet",
                sheet.kind.label(),
                sheet.name
            ),
            follows: Some(FollowOn::unreadable_sheet(
                &e.position.sheet().book,
                sheet.kind.label(),
                &sheet.name,
            )),
        });
        rejected.insert(e.terms.id.clone());
    }
}

/// The row number of an A1 cell (`F12`) or row (`12:12`); `None` for a
/// whole sheet or file.
fn row_of(cell: &str) -> Option<&str> {
    let row = cell
        .split(':')
        .next()?
        .trim_start_matches(|c: char| c.is_ascii_uppercase());
    (!row.is_empty()).then_some(row)
}

/// What [`read_book`] promises about any book it returns, checked: every
/// problem names the book it was given; an account that an error names is
/// not in `accounts`, except for the error on a second row with its id (the
/// first row stands) and the error on a statement row listed as unreadable;
/// every account left out is not in `accounts`, once, with an error that
/// names it; movements, statement rows, unreadable statement rows and Booked
/// rows belong to kept accounts. Returns one line per broken promise, so
/// fuzzing and tests can assert the list is empty.
///
/// ```
/// use std::path::Path;
/// use ledgerate::book::{contract_violations, read_book, ReadOptions};
///
/// let book = read_book(Path::new("tests/fixtures/books/harbourview_broken.xlsx"), &ReadOptions::default());
/// assert!(book.has_errors());
/// assert_eq!(contract_violations(&book), Vec::<String>::new());
/// ```
pub fn contract_violations(book: &Book) -> Vec<String> {
    let mut out = Vec::new();
    let name = book.path.display().to_string();
    for p in book.problems.iter().filter(|p| p.position.book != name) {
        out.push(format!("a problem names another book: {p}"));
    }
    let kept: HashMap<&str, Position> = book
        .accounts
        .iter()
        .map(|a| (a.terms.id.as_str(), a.position.to_position()))
        .collect();
    for p in book
        .problems
        .iter()
        .filter(|p| p.severity == Severity::Error)
    {
        let Some(at) = p.account.as_deref().and_then(|id| kept.get(id)) else {
            continue;
        };
        let duplicate_row =
            p.position.sheet == at.sheet && row_of(&p.position.cell) != row_of(&at.cell);
        let unreadable_statement = book.unreadable_statements.iter().any(|u| {
            u.error.position.sheet == p.position.sheet
                && row_of(&u.error.position.cell) == row_of(&p.position.cell)
        });
        if !duplicate_row && !unreadable_statement {
            out.push(format!("an account is kept despite: {p}"));
        }
    }
    let mut listed: HashSet<&str> = HashSet::new();
    for left in &book.left_out {
        let id = left.account.as_str();
        if kept.contains_key(id) {
            out.push(format!("an account both kept and left out: {id}"));
        }
        if !listed.insert(id) {
            out.push(format!("an account left out twice: {id}"));
        }
        let named = book
            .left_out_error(left)
            .is_some_and(|p| p.severity == Severity::Error && p.account.as_deref() == Some(id));
        if !named {
            out.push(format!("an account left out without its error: {id}"));
        }
    }
    for u in book
        .unreadable_statements
        .iter()
        .filter(|u| !kept.contains_key(u.account.as_str()))
    {
        out.push(format!(
            "an unreadable statement row of an account left out: {}",
            u.account
        ));
    }
    for id in book
        .movements
        .keys()
        .filter(|id| !kept.contains_key(id.as_str()))
    {
        out.push(format!("movements of an account left out: {id}"));
    }
    for s in book
        .statements
        .iter()
        .filter(|s| !kept.contains_key(&*s.account))
    {
        out.push(format!(
            "a statement row of an account left out: {}",
            s.account
        ));
    }
    for b in book
        .booked
        .iter()
        .filter(|b| !kept.contains_key(b.account.as_str()))
    {
        out.push(format!(
            "a Booked row of an account left out: {}",
            b.account
        ));
    }
    for id in book
        .accrual
        .statuses
        .keys()
        .chain(book.accrual.receipts.keys())
        .filter(|id| !kept.contains_key(id.as_str()))
    {
        out.push(format!(
            "an Accrual status row or interest receipt of an account left out: {id}"
        ));
    }
    out
}

/// Makes account ids unique across the books of a run: the second and later
/// books holding an id get an error on that account, which is dropped from
/// them with its movements, statements and Booked rows and listed as left
/// out. The first book keeps it.
///
/// ```
/// use std::path::Path;
/// use ledgerate::book::{check_unique_ids, read_book, ReadOptions};
///
/// let path = Path::new("tests/fixtures/books/harbourview_good.xlsx");
/// let mut books = vec![read_book(path, &ReadOptions::default()), read_book(path, &ReadOptions::default())];
/// let count = books[0].accounts.len();
/// check_unique_ids(&mut books);
/// assert_eq!(books[0].accounts.len(), count);
/// assert!(books[1].accounts.is_empty());
/// assert!(books[1].has_errors());
/// assert_eq!(books[1].left_out.len(), count);
/// ```
pub fn check_unique_ids(books: &mut [Book]) {
    // The first holder of each id, by (book, account) index: the ids are
    // borrowed, never copied. A book holds an id once (its reader keeps the
    // first row of an id), so the last book's ids are only looked up: a run
    // of one book builds no index.
    let held = books
        .split_last()
        .map_or(0, |(_, rest)| rest.iter().map(|b| b.accounts.len()).sum());
    let mut seen: HashMap<&str, (usize, usize)> = HashMap::with_capacity(held);
    let mut found: Vec<(usize, Problem)> = Vec::new();
    let last = books.len().saturating_sub(1);
    for (b, book) in books.iter().enumerate() {
        for (a, entry) in book.accounts.iter().enumerate() {
            let id = entry.terms.id.as_str();
            match seen.get(id) {
                Some(&(fb, fa)) => {
                    let first = books
                        .get(fb)
                        .and_then(|f| f.accounts.get(fa))
                        .map(|f| f.position.to_string())
                        .unwrap_or_default();
                    found.push((b, Problem {
                        severity: Severity::Error,
                        position: entry.position.to_position(),
                        account: Some(id.to_string()),
                        found: id.to_string(),
                        expected: format!("account ids unique across the books of a run (it is also in {first})"),
                        fix: "remove the account from one of the books, or give it its own id; this one is not used".to_string(),
                        follows: None,
                    }));
                }
                None if b < last => {
                    seen.insert(id, (b, a));
                }
                None => {}
            }
        }
    }
    drop(seen);
    let mut found = found.into_iter().peekable();
    for (b, book) in books.iter_mut().enumerate() {
        let mut dropped: BTreeSet<String> = BTreeSet::new();
        while let Some((_, p)) = found.next_if(|(fb, _)| *fb == b) {
            if let Some(id) = &p.account {
                if dropped.insert(id.clone()) {
                    book.left_out.push(LeftOut {
                        account: id.clone(),
                        problem: book.problems.len(),
                    });
                }
            }
            book.problems.push(p);
        }
        if dropped.is_empty() {
            continue;
        }
        book.accounts.retain(|e| !dropped.contains(&e.terms.id));
        book.movements.retain(|id, _| !dropped.contains(id));
        book.statements.retain(|s| !dropped.contains(&*s.account));
        book.booked.retain(|b| !dropped.contains(&b.account));
        book.accrual.retain(|id| !dropped.contains(id));
        book.unreadable_statements
            .retain(|s| !dropped.contains(&*s.account));
    }
}
