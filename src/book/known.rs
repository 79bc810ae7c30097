//! What a run knows as at a day (behaviour.md, Knowledge date): a movement
//! by its booking date, a rate table by its `booked` date, a statement row
//! by its posting date.
//!
//! The one place these rules are written: the book's rows known at the
//! run's as-at date ([`keep_known`]) and an account's rows known at the
//! previous close both come through here. It never drops a row silently:
//! [`keep_known`] counts what it leaves out, one note per sheet, and the
//! predicates only decide. Fixings are never filtered.

use std::collections::BTreeMap;

use chrono::NaiveDate;

use super::model::{Book, StatementRow};
use crate::engine::Movement;
use crate::problem::{Problem, Severity};
use crate::schema::SheetKind;

/// Whether movement `m` was booked by the end of `day` (a movement without
/// a booking date is booked on its value date).
pub fn movement_known(m: &Movement, day: NaiveDate) -> bool {
    m.booking_date.unwrap_or(m.value_date) <= day
}

/// Whether statement row `s` was posted by the end of `day` (known when its
/// posting date is blank).
pub fn statement_known(s: &StatementRow, day: NaiveDate) -> bool {
    s.posting_date.is_none_or(|p| p <= day)
}

/// Whether the rate table of `rate_ref` effective on `effective` was booked
/// by the end of `day` (a table without a `booked` date is booked on its
/// effective date).
pub fn rate_table_known(book: &Book, rate_ref: &str, effective: NaiveDate, day: NaiveDate) -> bool {
    table_known(bookings_of(book, rate_ref), effective, day)
}

/// Whether any rate table of `rate_ref` was booked after the end of `day`.
pub fn rates_booked_after(book: &Book, rate_ref: &str, day: NaiveDate) -> bool {
    booked_after(bookings_of(book, rate_ref), day)
}

/// The (effective, booked) dates of the tables of `rate_ref` booked later
/// than they took effect.
pub fn bookings_of<'b>(book: &'b Book, rate_ref: &str) -> &'b [(NaiveDate, NaiveDate)] {
    book.rate_bookings.get(rate_ref).map_or(&[], Vec::as_slice)
}

/// Whether the table effective on `effective` was booked by the end of
/// `day`, given the `bookings` of its schedule.
pub fn table_known(
    bookings: &[(NaiveDate, NaiveDate)],
    effective: NaiveDate,
    day: NaiveDate,
) -> bool {
    bookings
        .iter()
        .find(|(e, _)| *e == effective)
        .map_or(effective, |(_, booked)| *booked)
        <= day
}

/// Whether any table of a schedule with `bookings` was booked after the end of `day`.
pub fn booked_after(bookings: &[(NaiveDate, NaiveDate)], day: NaiveDate) -> bool {
    bookings.iter().any(|(_, booked)| *booked > day)
}

/// Leaves out of `book` every row not known at the end of `as_at`
/// (behaviour.md, Knowledge date): movements booked after it, statement
/// rows posted after it, and whole rate tables, fixed and floating, booked
/// after it. Returns one note per sheet that lost rows, counting them
/// ("2 movements booked after 2026-12-02 are left out"); none when every
/// row is known. Fixings and the other sheets are left as they are.
///
/// ```
/// use ledgerate::book::{known::keep_known, Book};
/// use ledgerate::engine::Movement;
/// let day = |s: &str| s.parse().unwrap();
/// let moved = |value: &str, booked: &str| Movement {
///     value_date: day(value),
///     amount: "36500.00".parse().unwrap(),
///     booking_date: Some(day(booked)),
///     reference: None,
/// };
/// let mut book = Book::default();
/// book.movements.insert(
///     "DEP-1".into(),
///     vec![moved("2026-10-20", "2026-11-05"), moved("2026-11-20", "2026-12-03")],
/// );
/// let notes = keep_known(&mut book, day("2026-12-02"));
/// assert_eq!(book.movements["DEP-1"].len(), 1);
/// assert_eq!(notes.len(), 1);
/// assert_eq!(notes[0].found, "1 movement booked after 2026-12-02 is left out");
/// ```
pub fn keep_known(book: &mut Book, as_at: NaiveDate) -> Vec<Problem> {
    let mut moved = 0;
    for list in book
        .movements
        .values_mut()
        .chain(book.accrual.receipts.values_mut())
    {
        let before = list.len();
        list.retain(|m| movement_known(m, as_at));
        moved += before - list.len();
    }
    let before = book.statements.len();
    book.statements.retain(|s| statement_known(s, as_at));
    let stated = before - book.statements.len();
    let tables = keep_known_tables(book, as_at);
    let mut notes = Vec::new();
    for (kind, count, one, many) in [
        (SheetKind::Movements, moved, "movement", "movements"),
        (
            SheetKind::Statements,
            stated,
            "statement row",
            "statement rows",
        ),
        (SheetKind::Rates, tables, "rate table", "rate tables"),
    ] {
        if count == 0 {
            continue;
        }
        let (noun, verb) = if count == 1 {
            (one, "is")
        } else {
            (many, "are")
        };
        notes.push(Problem {
            severity: Severity::Note,
            position: book.sheet_position(kind),
            account: None,
            found: format!("{count} {noun} booked after {as_at} {verb} left out"),
            expected: format!("rows booked by the end of the as-at date {as_at}"),
            fix: format!(
                "the run is as at {as_at}, so they take no part in any figure (balance, back-value, postings, reconciliation); nothing to do unless as_at is wrong"
            ),
            follows: None,
        });
    }
    notes
}

/// Leaves out the rate tables, fixed and floating, booked after `as_at`,
/// and returns how many.
fn keep_known_tables(book: &mut Book, as_at: NaiveDate) -> usize {
    let mut dropped = 0;
    let mut fixed = BTreeMap::new();
    for (rate_ref, schedule) in &book.rates {
        let unknown = |effective| !rate_table_known(book, rate_ref, effective, as_at);
        let count = schedule
            .tables()
            .iter()
            .filter(|t| unknown(t.effective))
            .count();
        if count > 0 {
            dropped += count;
            fixed.insert(rate_ref.clone(), schedule.without(unknown));
        }
    }
    let mut floating = BTreeMap::new();
    for (rate_ref, schedule) in &book.floating_rates {
        let unknown = |effective| !rate_table_known(book, rate_ref, effective, as_at);
        let count = schedule
            .tables()
            .iter()
            .filter(|t| unknown(t.effective))
            .count();
        if count > 0 {
            dropped += count;
            floating.insert(rate_ref.clone(), schedule.without(unknown));
        }
    }
    book.rates.extend(fixed);
    book.floating_rates.extend(floating);
    dropped
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::rates::RateSchedule;
    use crate::problem::RowPosition;
    use rust_decimal::Decimal;

    fn day(s: &str) -> NaiveDate {
        s.parse().unwrap()
    }

    fn stated(posting_date: Option<&str>) -> StatementRow {
        StatementRow {
            account: "DEP-1".into(),
            period_start: day("2026-11-01"),
            period_end: day("2026-11-30"),
            posted: Decimal::new(30093, 2),
            reference: None,
            posting_date: posting_date.map(day),
            position: RowPosition::default(),
            tax_withheld: None,
        }
    }

    /// Knowledge date: a statement row without a posting date is known to
    /// every run; a rate table without a booked date is booked on its
    /// effective date, so one taking effect after the as-at date is not
    /// known either.
    #[test]
    fn blank_dates_take_their_defaults() {
        let mut book = Book {
            statements: vec![stated(None), stated(Some("2026-12-03"))],
            ..Book::default()
        };
        let rate = Decimal::new(365, 4);
        book.rates.insert(
            "HM-DEP".into(),
            RateSchedule::from_rows([
                (day("2026-01-01"), rate, Decimal::ZERO),
                (day("2026-12-10"), rate, Decimal::ZERO),
            ]),
        );
        let notes = keep_known(&mut book, day("2026-12-02"));
        assert_eq!(book.statements, [stated(None)]);
        assert_eq!(book.rates["HM-DEP"].tables().len(), 1);
        let found: Vec<&str> = notes.iter().map(|n| n.found.as_str()).collect();
        assert_eq!(
            found,
            [
                "1 statement row booked after 2026-12-02 is left out",
                "1 rate table booked after 2026-12-02 is left out"
            ]
        );
        assert_eq!(notes[0].position.sheet, "Statements");
        // Known at a later day, nothing more is left out.
        assert!(keep_known(&mut book, day("2026-12-31")).is_empty());
    }
}
