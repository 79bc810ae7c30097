//! The Booked sheet: the open item the institution's books held for an
//! account at the end of a day (behaviour.md, Knowledge date): at the day
//! before the window it is the opening the last close booked, at the
//! cut-off the core system's own accrued interest.
//!
//! A row naming an account the Accounts sheet does not have is an error on
//! the row and left out. A row with a bad cell, or a second row for one
//! account and day, keeps its account out: its opening would otherwise come
//! from a figure nobody gave. Which day a row is used for is the ledger's
//! business; this module only says, once the window is known, which rows no
//! run of that window uses ([`dates_not_used`]). It never changes an amount.

use std::collections::HashMap;

use chrono::NaiveDate;

use super::accounts::Known;
use super::model::{Book, BookedRow};
use super::sheet::Sheet;
use super::table::{Ctx, Fields, Table};
use crate::problem::{parse_a1, Position, Problem, Severity};
use crate::schema::{column, BOOKED};

const ACCOUNT: usize = column!(BOOKED, "account");
const DATE: usize = column!(BOOKED, "date");
const OPEN_ITEM: usize = column!(BOOKED, "open_item");

/// What the Booked sheet gives.
#[derive(Debug, Default)]
pub(crate) struct Booked {
    /// Good rows, in sheet order (at most one per account and day).
    pub rows: Vec<BookedRow>,
    /// Accounts with a bad row, or two rows for one day.
    pub spoiled: Vec<String>,
}

/// Reads the Booked sheet; `None` when the sheet cannot be read as a table.
pub(crate) fn read(
    ctx: Ctx<'_>,
    sheet: &Sheet,
    accounts: &Known,
    problems: &mut Vec<Problem>,
) -> Option<Booked> {
    let table = Table::open(&ctx, sheet, BOOKED.columns, problems)?;
    let mut out = Booked::default();
    // A ragged row of an account is missing from its opening.
    out.spoiled.extend(table.skipped_accounts().iter().cloned());
    // The row holding each account and day so far.
    let mut seen: HashMap<(String, NaiveDate), u32> = HashMap::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some((id, _)) = accounts.of_row(&mut f, ACCOUNT) else {
            continue;
        };
        let date = f.required_date(DATE);
        let open_item = f.required_decimal(OPEN_ITEM);
        let (Some(date), Some(open_item), false) = (date, open_item, f.failed) else {
            out.spoiled.push(id);
            continue;
        };
        if let Some(first) = seen.get(&(id.clone(), date)) {
            let first = table.cell_ref(*first, DATE);
            f.report(
                Severity::Error,
                DATE,
                &date.to_string(),
                &format!("one Booked row for {id} on {date} (it is already in {first})"),
                "remove one of the two rows: the books held one open item for the account that day; the account is not computed until then",
            );
            out.spoiled.push(id);
            continue;
        }
        seen.insert((id.clone(), date), rec.row);
        let position = f.position(ACCOUNT);
        out.rows.push(BookedRow {
            account: id,
            date,
            open_item,
            position,
        });
    }
    out.rows.shrink_to_fit();
    Some(out)
}

/// The whole row of the cell at `p` (`Booked!A7` is `Booked!7:7`), for a
/// problem about the row rather than one of its cells.
pub(crate) fn whole_row(p: &Position) -> Position {
    let (row, _) = parse_a1(&p.cell);
    Position {
        cell: if row == 0 {
            String::new()
        } else {
            format!("{row}:{row}")
        },
        column: String::new(),
        ..p.clone()
    }
}

/// The Booked rows of `book` that no run of the window
/// `window_start..=cutoff` uses, each a warning: a row dated neither the day
/// before the window nor the cut-off, and a row dated the day before the
/// window for an account that opens in the window (its opening is its own
/// opening figures). Each names the row's whole row. The rows stay in the
/// book; the ledger never reads them.
///
/// ```
/// use ledgerate::book::{booked, Book, BookedRow};
/// let day = |s: &str| s.parse().unwrap();
/// let mut book = Book::default();
/// for d in ["2026-10-31", "2026-11-15", "2026-11-30"] {
///     book.booked.push(BookedRow {
///         account: "HM-SAV-001".into(),
///         date: day(d),
///         open_item: "310.00".parse().unwrap(),
///         position: Default::default(),
///     });
/// }
/// let warned = booked::dates_not_used(&book, day("2026-11-01"), day("2026-11-30"));
/// assert_eq!(warned.len(), 1);
/// assert_eq!(warned[0].found, "2026-11-15");
/// ```
pub fn dates_not_used(book: &Book, window_start: NaiveDate, cutoff: NaiveDate) -> Vec<Problem> {
    let opening = window_start.pred_opt().unwrap_or(window_start);
    let open_dates: HashMap<&str, NaiveDate> = book
        .accounts
        .iter()
        .map(|a| (a.terms.id.as_str(), a.terms.open_date))
        .collect();
    let mut out = Vec::new();
    for row in &book.booked {
        let warn = |expected: String, fix: &str| Problem {
            severity: Severity::Warning,
            position: whole_row(&row.position),
            account: Some(row.account.clone()),
            found: row.date.to_string(),
            expected,
            fix: fix.to_string(),
            follows: None,
        };
        if row.date != opening && row.date != cutoff {
            out.push(warn(
                format!("a Booked row dated {opening} (the day before the window, the opening) or {cutoff} (the cut-off)"),
                "this run does not use the row; correct its date, or keep it for the run whose window it belongs to",
            ));
            continue;
        }
        let opens = open_dates.get(row.account.as_str());
        if let Some(open) = opens.filter(|o| row.date == opening && **o >= window_start) {
            out.push(warn(
                format!("no Booked opening for an account that opens in the window (open_date {open}, on or after {window_start})"),
                "the account's opening is its own opening figures (opening_balance, opening_accrued), so the row is not used; remove it, or correct the account's open_date",
            ));
        }
    }
    out
}
