//! The conventions of the trade: day-count bases, business-day calendars,
//! posting schedules, currencies, rounding and compounding.
//!
//! Everything here is pure: no files, no clock, no environment, no terminal.
//! The engine and the command line build on these pieces; books and reports
//! never reach into them except through names and values.

pub mod compounding;
pub mod currency;
pub mod growth;
pub mod names;
pub mod rounding;
