//! What a run knows as at a day (behaviour.md, Knowledge date): a movement
//! by its booking date, a rate table by its `booked` date, a statement row
//! by its posting date.
//!
//! The one place these rules are written: the book's rows known at the
//! run's as-at date and an account's rows known at the previous close both
//! come through here. It only decides; it never drops a row silently (the
//! caller counts what it leaves out and says so).

use chrono::NaiveDate;

use super::model::{Book, StatementRow};
use crate::engine::Movement;

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
