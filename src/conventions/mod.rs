//! The conventions of the trade: day-count bases, business-day calendars,
//! posting schedules, currencies, rounding and compounding.
//!
//! Everything here is pure: no files, no clock, no environment, no terminal.
//! The engine and the command line build on these pieces; books and reports
//! never reach into them except through names and values.

pub mod calendar;
pub mod compounding;
pub mod currency;
pub mod daycount;
pub mod growth;
pub mod names;
pub mod ratio;
pub mod rounding;
pub mod schedule;
