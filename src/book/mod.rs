//! Reading account books (workbooks or CSV folders) into typed [`model::Book`]s
//! plus problems.
//!
//! Readers never change an input file, never guess a day/month order, and
//! never turn a spreadsheet float into a decimal except by its shortest
//! round-trip text. They know nothing of the engine's arithmetic: they type
//! terms and report where each came from.

pub mod model;

pub use model::{
    AccountEntry, Book, GlCodes, Position, Problem, SettingRow, Severity, StatementRow,
};
