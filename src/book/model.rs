//! The typed contents of account books, and the problems found reading them.
//!
//! Readers fill these; the run turns them into engine inputs. Every row keeps
//! the position it came from so that any later problem can name its cell.

use std::collections::BTreeMap;
use std::fmt;
use std::path::PathBuf;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::engine::floating::{Fixings, FloatingSchedule};
use crate::engine::rates::RateSchedule;
use crate::engine::{AccountTerms, Movement};

/// Where something is in the input: book file, sheet, cell.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub struct Position {
    /// The book as given on the command line.
    pub book: String,
    /// The sheet (for a CSV folder, the file name without `.csv`).
    pub sheet: String,
    /// The cell in A1 notation, or empty for a whole sheet or file.
    pub cell: String,
}

impl fmt::Display for Position {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match (self.sheet.is_empty(), self.cell.is_empty()) {
            (true, _) => write!(f, "{}", self.book),
            (false, true) => write!(f, "{} sheet {}", self.book, self.sheet),
            (false, false) => write!(f, "{} {}!{}", self.book, self.sheet, self.cell),
        }
    }
}

/// How serious a problem is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Severity {
    /// The account (or the book) cannot be computed; the exit status is non-zero.
    Error,
    /// Computed, but worth a look.
    Warning,
    /// For information (unknown columns kept out, summed statement rows...).
    Note,
}

impl Severity {
    /// The word written in reports.
    pub fn name(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
            Severity::Note => "note",
        }
    }
}

/// One problem: where, what was found, what was expected, how to fix it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    /// Error, warning or note.
    pub severity: Severity,
    /// Where it is.
    pub position: Position,
    /// The account it keeps out (or concerns), when there is one.
    pub account: Option<String>,
    /// The value found, as the user would see it.
    pub found: String,
    /// What was expected there.
    pub expected: String,
    /// How to fix it.
    pub fix: String,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{}: {}: found {}; expected {}; {}",
            self.severity.name(),
            self.position,
            if self.found.is_empty() {
                "nothing".to_string()
            } else {
                format!("'{}'", self.found)
            },
            self.expected,
            self.fix
        )
    }
}

/// General-ledger accounts of an account's journal lines.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct GlCodes {
    /// Interest expense (liability side) or income (asset side).
    pub interest: Option<String>,
    /// Accrued interest payable (liability) or receivable (asset).
    pub accrued: Option<String>,
    /// Where postings settle (the customer account, cash...).
    pub settlement: Option<String>,
}

/// One row of the Accounts sheet, resolved.
#[derive(Debug, Clone)]
pub struct AccountEntry {
    /// The engine's terms. The calendar is already resolved from Holidays.
    pub terms: AccountTerms,
    /// The account's name, if given.
    pub name: String,
    /// Which Rates schedule it earns (default: its own id).
    pub rate_ref: String,
    /// The schedule for a base of the opposite sign, if any.
    pub debit_rate_ref: Option<String>,
    /// GL codes from the sheet (defaults are the journal's business).
    pub gl: GlCodes,
    /// The row's position (cell of the account id).
    pub position: Position,
}

/// One row of the Statements sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StatementRow {
    /// The account id.
    pub account: String,
    /// First day of the period (inclusive).
    pub period_start: NaiveDate,
    /// Last day of the period (inclusive, after any `statement_end` exclusive setting is applied).
    pub period_end: NaiveDate,
    /// Interest actually posted.
    pub posted: Decimal,
    /// The statement's reference.
    pub reference: Option<String>,
    /// The row's position (cell of the account id).
    pub position: Position,
}

/// One row of the Settings sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SettingRow {
    /// The setting name, folded (lower case, no spaces, `_` or `-`).
    pub name: String,
    /// The value as text (dates as ISO text, numbers as decimal text).
    pub value: String,
    /// Where the value is.
    pub position: Position,
}

/// A book that was read: every account that could be typed, plus the
/// problems found. Accounts with an error problem are left out of
/// `accounts` (their problems name them).
#[derive(Debug, Clone, Default)]
pub struct Book {
    /// The path given.
    pub path: PathBuf,
    /// Accounts in sheet order.
    pub accounts: Vec<AccountEntry>,
    /// Fixed rate schedules by rate_ref.
    pub rates: BTreeMap<String, RateSchedule>,
    /// Floating rate schedules (a row names an index) by rate_ref.
    pub floating_rates: BTreeMap<String, FloatingSchedule>,
    /// Index fixings from the Fixings sheet: index, date, rate as a decimal.
    pub fixings: Fixings,
    /// Movements by account id, in sheet order.
    pub movements: BTreeMap<String, Vec<Movement>>,
    /// Statement rows in sheet order.
    pub statements: Vec<StatementRow>,
    /// Settings rows in sheet order.
    pub settings: Vec<SettingRow>,
    /// Everything found wrong or worth saying.
    pub problems: Vec<Problem>,
}

impl Book {
    /// Whether any problem is an error.
    pub fn has_errors(&self) -> bool {
        self.problems.iter().any(|p| p.severity == Severity::Error)
    }

    /// Whether the file itself could not be read as a book (not a workbook,
    /// empty, truncated, unreadable): an error that names no sheet.
    pub fn unreadable(&self) -> bool {
        self.problems
            .iter()
            .any(|p| p.severity == Severity::Error && p.position.sheet.is_empty())
    }
}
