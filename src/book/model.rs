//! The typed contents of account books.
//!
//! Readers fill these; the run turns them into engine inputs. Every row keeps
//! the position it came from so that any later problem can name its cell.

use std::collections::BTreeMap;
use std::path::PathBuf;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::engine::floating::{Fixings, FloatingSchedule};
use crate::engine::rates::RateSchedule;
use crate::engine::shared::Shared;
use crate::engine::suspense::StatusRow;
use crate::engine::{AccountTerms, Movement};
use crate::problem::{Position, Problem, RowPosition, Severity};
use crate::schema::SheetKind;

/// General-ledger accounts of an account's journal lines.
#[derive(Debug, Clone, PartialEq, Eq, Hash, Default)]
pub struct GlCodes {
    /// Interest expense (liability side) or income (asset side).
    pub interest: Option<String>,
    /// Accrued interest payable (liability) or receivable (asset).
    pub accrued: Option<String>,
    /// Where postings settle (the customer account, cash...).
    pub settlement: Option<String>,
    /// Where a prior-period interest adjustment is booked (default: `interest`).
    pub prior_period: Option<String>,
    /// GL account of the withholding tax (`gl_tax`).
    pub tax: Option<String>,
    /// Asset side: interest in suspense (default `INTEREST-IN-SUSPENSE`).
    pub suspense: Option<String>,
    /// Asset side: where a reversal on non-accrual is charged (default: `interest`).
    pub reversal: Option<String>,
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
    /// GL codes from the sheet (defaults are the journal's business), held
    /// once for every account that names the same codes.
    pub gl: Shared<GlCodes>,
    /// The row's position (cell of the account id).
    pub position: RowPosition,
    /// Asset side: interest held in suspense at the start of `open_date`.
    pub opening_suspense: Decimal,
}

/// What a book says about recognising an asset account's interest
/// (behaviour.md, Non-accrual and interest in suspense): its Accrual status
/// rows and its interest receipts (Movements rows that apply to interest,
/// kept apart from the balance movements).
#[derive(Debug, Clone, Default)]
pub struct AccrualRows {
    /// Status rows by account id, in date order (one per day).
    pub statuses: BTreeMap<String, Vec<StatusRow>>,
    /// Interest receipts by account id, in sheet order.
    pub receipts: BTreeMap<String, Vec<Movement>>,
}

impl AccrualRows {
    /// Whether account `id` goes through the suspense split: it has a status
    /// row or an interest receipt (its opening suspense is on its entry).
    pub fn touches(&self, id: &str) -> bool {
        self.statuses.contains_key(id) || self.receipts.contains_key(id)
    }

    /// Keeps the rows of the accounts `keep` says yes to.
    pub fn retain(&mut self, keep: impl Fn(&str) -> bool) {
        self.statuses.retain(|id, _| keep(id));
        self.receipts.retain(|id, _| keep(id));
    }
}

/// One row of the Statements sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StatementRow {
    /// The account id.
    pub account: Box<str>,
    /// First day of the period (inclusive).
    pub period_start: NaiveDate,
    /// Last day of the period (inclusive, after any `statement_end` exclusive setting is applied).
    pub period_end: NaiveDate,
    /// Interest actually posted.
    pub posted: Decimal,
    /// The statement's reference.
    pub reference: Option<Box<str>>,
    /// The day the posting was booked to the customer's account, if given
    /// (a row is known to a run as at A when this is on or before A).
    pub posting_date: Option<NaiveDate>,
    /// The withholding tax the row shows (`tax_withheld`), when given;
    /// `posted` is gross all the same (behaviour.md, Withholding tax).
    pub tax_withheld: Option<Decimal>,
    /// The row's position (cell of the account id).
    pub position: RowPosition,
}

/// An account of the Accounts sheet that the reader kept out of `accounts`,
/// and the error that kept it out (behaviour.md, Completeness and
/// presentation: no account vanishes).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LeftOut {
    /// The account id.
    pub account: String,
    /// The index in the book's `problems` of the first error naming it: on
    /// its Accounts row (a Rates schedule it needs is named there), on a
    /// Movements row, or the sheet it needs that cannot be read.
    pub problem: usize,
}

/// A Statements row of a kept account that could not be read (or used):
/// the account is still computed, and its reconciliation gets a row saying
/// the statement row could not be read.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct UnreadableStatement {
    /// The account id.
    pub account: String,
    /// The row's period, when both its dates could be read as one.
    pub period: Option<(NaiveDate, NaiveDate)>,
    /// The first error found on the row (its position names the row).
    pub error: Problem,
}

impl UnreadableStatement {
    /// Whether the row was for the period `start..=end`: a posting period
    /// it covers is not "not posted", the row could not be read.
    pub fn covers(&self, start: NaiveDate, end: NaiveDate) -> bool {
        self.period == Some((start, end))
    }
}

/// One row of the Booked sheet: the open item the institution's books held
/// for an account at the end of a day.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BookedRow {
    /// The account id.
    pub account: String,
    /// The day.
    pub date: NaiveDate,
    /// The open item, in the account's normal direction.
    pub open_item: Decimal,
    /// The row's position (cell of the account id).
    pub position: Position,
}

/// One row of the Trial balance sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TrialBalanceRow {
    /// The entity whose ledger it is.
    pub entity: String,
    /// ISO 4217 code.
    pub currency: String,
    /// The GL account.
    pub gl_account: String,
    /// The day the balance stands at the end of.
    pub date: NaiveDate,
    /// Signed as a trial balance prints it: debit positive, credit negative.
    pub balance: Decimal,
    /// The row's position (cell of the GL account).
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
/// `accounts` and listed in `left_out` (their problems name them).
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
    /// Statement rows of kept accounts that could not be read, in sheet order.
    pub unreadable_statements: Vec<UnreadableStatement>,
    /// Settings rows in sheet order.
    pub settings: Vec<SettingRow>,
    /// Booked rows in sheet order (at most one per account and date).
    pub booked: Vec<BookedRow>,
    /// Trial balance rows in sheet order.
    pub trial_balance: Vec<TrialBalanceRow>,
    /// Per rate_ref, the effective date of each rate table booked later than
    /// it took effect, with its booking date (the `booked` column).
    pub rate_bookings: BTreeMap<String, Vec<(NaiveDate, NaiveDate)>>,
    /// Where each sheet read is (book, sheet name as the book writes it,
    /// no cell), for a problem about a whole sheet.
    pub sheets: BTreeMap<SheetKind, Position>,
    /// Everything found wrong or worth saying.
    pub problems: Vec<Problem>,
    /// Accounts of the Accounts sheet kept out of `accounts` by an error, in
    /// sheet order (then those a later book holds again, see
    /// [`crate::book::check_unique_ids`]). Every account id of the sheet is
    /// in `accounts` or here, once.
    pub left_out: Vec<LeftOut>,
    /// Accrual status rows and interest receipts of kept accounts.
    pub accrual: AccrualRows,
}

impl Book {
    /// Whether any problem is an error.
    pub fn has_errors(&self) -> bool {
        self.problems.iter().any(|p| p.severity == Severity::Error)
    }

    /// The error that kept `left` out.
    pub fn left_out_error(&self, left: &LeftOut) -> Option<&Problem> {
        self.problems.get(left.problem)
    }

    /// Whether the file itself could not be read as a book (not a workbook,
    /// empty, truncated, unreadable): an error that names no sheet.
    pub fn unreadable(&self) -> bool {
        self.problems
            .iter()
            .any(|p| p.severity == Severity::Error && p.position.sheet.is_empty())
    }

    /// Where the sheet of kind `kind` is, for a problem about the whole
    /// sheet: as read, else as the book format names it.
    pub fn sheet_position(&self, kind: SheetKind) -> Position {
        self.sheets.get(&kind).cloned().unwrap_or_else(|| Position {
            book: self.path.display().to_string(),
            sheet: kind.label().to_string(),
            ..Position::default()
        })
    }
}
