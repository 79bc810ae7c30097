//! Reading account books (workbooks or CSV folders) into typed [`model::Book`]s
//! plus [`crate::problem::Problem`]s.
//!
//! Readers never change an input file, never guess a day/month order, and
//! never turn a spreadsheet float into a decimal except by its shortest
//! round-trip text (in `number`, the one border between the two). They
//! know nothing of the engine's arithmetic: they type terms and report where
//! each came from.
//!
//! [`schema`] describes the book format once (sheets, columns, settings);
//! the sheet readers take their columns from it.

mod accounts;
mod accrual_status;
mod biff;
pub mod booked;
pub(crate) mod cell;
mod csv_folder;
mod csv_records;
mod fixings;
mod holidays;
pub mod known;
mod life_events;
mod limits;
pub mod model;
mod movements;
pub(crate) mod number;
mod ods_span;
mod ole;
mod open;
mod picking;
mod rates;
mod read;
mod row;
mod settings;
mod sheet;
mod sniff;
mod statements;
mod table;
mod tax;
pub mod trial_balance;
mod workbook;
mod xlsx;

pub use model::{
    AccountEntry, Book, BookedRow, GlCodes, LeftOut, SettingRow, StatementRow, TrialBalanceRow,
    UnreadableStatement,
};
pub use read::{check_unique_ids, contract_violations, read_book, ReadOptions};
