//! What a run hands to the workbook writer: plain rows of figures, already
//! computed and rounded. The writer decides only how they look.

use std::borrow::Cow;

use chrono::{NaiveDate, NaiveDateTime};
use rust_decimal::Decimal;

use crate::engine::reconcile::Status;
pub use crate::ids::AccountIds;
use crate::problem::{Position, Problem};

/// A word of a row that is nearly always one of a few fixed names (a side, a
/// day-count basis, a compounding, a currency code): the fixed name
/// itself, shared by every row, or text read back from a workbook.
pub type Word = Cow<'static, str>;

/// One input file of the run, for the audit trail.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct InputFile {
    /// The path as given.
    pub path: String,
    /// Size in bytes (a CSV folder: the sum of its files).
    pub size: u64,
    /// SHA-256 in lower-case hex (a CSV folder: of its files' names and hashes, in name order).
    pub sha256: String,
}

/// Where a setting's value came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SettingSource {
    /// The program's default.
    Default,
    /// A book's Settings sheet.
    Book,
    /// A command-line option.
    Option,
}

impl SettingSource {
    /// The word written in the Run sheet.
    pub fn name(self) -> &'static str {
        match self {
            SettingSource::Default => "default",
            SettingSource::Book => "Settings sheet",
            SettingSource::Option => "command line",
        }
    }
}

/// One setting in force.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Setting {
    /// Its name, as in the Settings sheet (cutoff, window_start, ...).
    pub name: String,
    /// Its value as text.
    pub value: String,
    /// Where it came from.
    pub source: SettingSource,
}

/// Facts of the run (Summary and Run sheets).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RunFacts {
    /// Program name and version, e.g. `ledgerate 0.1.0`.
    pub program: String,
    /// The command line, without options that cannot change a figure.
    pub command_line: String,
    /// The input books.
    pub inputs: Vec<InputFile>,
    /// Every setting in force.
    pub settings: Vec<Setting>,
    /// When the run happened (or the pinned `--fixed-time`).
    pub run_time: NaiveDateTime,
    /// The cut-off date: the last day computed.
    pub cutoff: NaiveDate,
    /// The first day of the window (the window ends on the cut-off date).
    pub window_start: NaiveDate,
    /// Accounts in the books (of the shard, for a shard run): always
    /// computed + left out + failed (behaviour.md, Completeness and
    /// presentation).
    pub accounts_read: usize,
    /// Accounts computed.
    pub accounts_computed: usize,
    /// Accounts the reader left out by errors in the books.
    pub accounts_left_out: usize,
    /// Accounts the computation stopped on (an engine error).
    pub accounts_failed: usize,
}

impl RunFacts {
    /// Accounts left out by errors, in the books or in the computation.
    pub fn accounts_not_computed(&self) -> usize {
        self.accounts_left_out.saturating_add(self.accounts_failed)
    }
}

/// An account read but not computed, with the error that kept it out
/// (Summary sheet and terminal summary).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LeftOutLine {
    /// Account id.
    pub account: String,
    /// Where the error is (the cell of the Problems sheet's row).
    pub position: Position,
    /// The error in words: what was found, what was expected and the fix,
    /// or what the account is left out because of.
    pub error: String,
}

impl std::fmt::Display for LeftOutLine {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}: {}", self.account, self.position, self.error)
    }
}

/// How many accounts left out the terminal summary and the Summary sheet
/// name; the rest are counted (every one is on the Problems sheet).
pub const LEFT_OUT_SHOWN: usize = 10;

/// One row of the Accruals sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct AccrualLine {
    /// Account id.
    pub account: String,
    /// Account name.
    pub name: String,
    /// ISO 4217 code.
    pub currency: Word,
    /// Minor units of the currency (number format of the amounts).
    pub minor_units: u32,
    /// `asset` or `liability`.
    pub side: Word,
    /// Canonical basis name.
    pub day_count: Word,
    /// Canonical compounding name.
    pub compounding: Word,
    /// Balance at cut-off.
    pub balance_at_cutoff: Decimal,
    /// Accrued at cut-off (rounded).
    pub accrued_at_cutoff: Decimal,
    /// Posted in window.
    pub posted_in_window: Decimal,
    /// Interest for window.
    pub interest_for_window: Decimal,
    /// Effective annual rate as a decimal (0.0512 for 5.12%), blank when the account does not earn on the cut-off date.
    pub effective_annual_rate: Option<Decimal>,
    /// Its GL accounts and what the ledger holds for it (behaviour.md, Books that tie).
    pub ledger: LedgerLine,
    /// Its withholding tax in the window, for an account with a `tax_ref`
    /// (behaviour.md, Withholding tax); `None` without.
    pub tax: Option<TaxLine>,
    /// Its interest split into recognised and suspended, for an account
    /// with Accrual status rows, interest receipts or an opening suspense
    /// (behaviour.md, Non-accrual and interest in suspense); then
    /// `interest_for_window` is the recognised figure. Boxed: few accounts
    /// have it, and every Accruals line carries the field.
    pub suspense: Option<Box<SuspenseLine>>,
    /// Its status and current term (behaviour.md, Account life events);
    /// `None` when not worked out (a workbook read back without them).
    pub life: Option<LifeLine>,
}

/// A reconciled period's withholding tax (behaviour.md, Withholding tax).
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct TaxCheck {
    /// The tax due on the expected gross.
    pub expected: Decimal,
    /// The tax the statement rows show (`tax_withheld`), when they show it.
    pub posted: Option<Decimal>,
    /// posted - expected, when the statement shows the tax.
    pub variance: Option<Decimal>,
}

/// An account's withholding tax on the postings of the window (those counted
/// in Posted in window).
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct TaxLine {
    /// The tax withheld from them.
    pub withheld: Decimal,
    /// What they credited net of it.
    pub net_posted: Decimal,
}

/// An asset account's interest in suspense for the window.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct SuspenseLine {
    /// The accrual status on the cut-off.
    pub status: Word,
    /// The interest for window before the split (what the receivable takes).
    pub contractual_for_window: Decimal,
    /// Reversals on entries into non-accrual dated in the window.
    pub reversed_in_window: Decimal,
    /// Interest of the window held in suspense.
    pub suspended_in_window: Decimal,
    /// Suspense released to income by interest received in the window.
    pub released_in_window: Decimal,
    /// The suspense at the end of the day before the window.
    pub suspense_before_window: Decimal,
    /// The suspense at the end of the cut-off.
    pub suspense_at_cutoff: Decimal,
    /// The interest-in-suspense GL account.
    pub gl_suspense: Word,
}

/// An account's life at the cut-off, for the Accruals sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LifeLine {
    /// Whether the Accruals sheet shows these columns: the books of the run
    /// hold an account with a life-event term (close, penalty, after
    /// maturity), so every shard of them shows them too.
    pub shown: bool,
    /// `open`, `closed`, `matured unpaid` or `rolled over`.
    pub status: Word,
    /// C - M + 1 for a matured balance not paid out.
    pub days_since_maturity: Option<i64>,
    /// The first day of the current term.
    pub term_start: Option<NaiveDate>,
    /// The current term's maturity.
    pub maturity: Option<NaiveDate>,
}

/// An account's GL accounts (defaults resolved) and its ledger figures.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct LedgerLine {
    /// The entity that books it.
    pub entity: Word,
    /// Interest expense or income.
    pub gl_interest: Word,
    /// Accrued interest payable or receivable.
    pub gl_accrued: Word,
    /// Where postings settle.
    pub gl_settlement: Word,
    /// Where a prior-period adjustment is booked.
    pub gl_prior_period: Word,
    /// Posted in window + accrued at cut-off - accrued before the window, all known now.
    pub window_days_interest: Decimal,
    /// BO: the open item the books held at the end of the day before the window.
    pub booked_opening: Decimal,
    /// Where the booked opening came from.
    pub opening_source: Word,
    /// Prior-period adjustment: the open item before the window known now, less BO.
    pub prior_period: Decimal,
    /// O(C): the open item at cut-off.
    pub open_item: Decimal,
    /// Postings settled in the window, whichever run journals them.
    pub settled_in_window: Decimal,
}

/// Totals of one currency and side (Summary sheet): a deposit is never
/// added to a loan.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CurrencyTotal {
    /// ISO 4217 code.
    pub currency: String,
    /// `asset` or `liability`, as the accounts' lines give it.
    pub side: String,
    /// Minor units.
    pub minor_units: u32,
    /// Accounts computed in this currency and side.
    pub accounts: usize,
    /// Sum of balances at cut-off.
    pub balance_at_cutoff: Decimal,
    /// Sum of accrued at cut-off.
    pub accrued_at_cutoff: Decimal,
    /// Sum of posted in window.
    pub posted_in_window: Decimal,
    /// Sum of interest for window: interest expense on the liability side,
    /// interest income on the asset side.
    pub interest_for_window: Decimal,
    /// Sum of the prior-period adjustments.
    pub prior_period: Decimal,
    /// Sum of the withholding tax on the postings in the window, when an
    /// account of this currency and side has a `tax_ref` (behaviour.md,
    /// Withholding tax); `None` when none has.
    pub tax_withheld: Option<Decimal>,
}

/// One journal line (Journal sheet).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct JournalLine {
    /// Booking date.
    pub date: NaiveDate,
    /// Entity (legal entity or ledger) booking it.
    pub entity: String,
    /// ISO 4217 code.
    pub currency: String,
    /// Minor units.
    pub minor_units: u32,
    /// GL account code.
    pub gl_account: String,
    /// Debit amount (zero when a credit).
    pub debit: Decimal,
    /// Credit amount (zero when a debit).
    pub credit: Decimal,
    /// What the line is.
    pub memo: String,
}

/// The accounts that make up the journal lines (Journal detail): for every
/// line, one row per account with the account's share, netted to one side
/// the way the line is, so that the rows of a line add up to it exactly.
///
/// Compact for runs of a million accounts: a row is a line index, an
/// account index and an amount; the lines and account ids are held once.
///
/// ```
/// use ledgerate::report::model::{DetailLine, DetailRow, JournalDetail};
/// use rust_decimal::Decimal;
/// let mut detail = JournalDetail::default();
/// detail.lines.push(DetailLine {
///     date: "2026-11-30".parse().unwrap(),
///     entity: "HM".into(),
///     currency: "USD".into(),
///     minor_units: 2,
///     gl_account: "6100".into(),
///     memo: "interest accrued 2026-11-01..2026-11-30".into(),
/// });
/// let a = detail.accounts.push("DEP-1").unwrap();
/// let b = detail.accounts.push("DEP-2").unwrap();
/// detail.rows.push(DetailRow { line: 0, account: a, amount: Decimal::new(2000, 2) });
/// detail.rows.push(DetailRow { line: 0, account: b, amount: Decimal::new(-500, 2) });
/// // DEP-2 is on the credit side of a debit line: 20.00 - 5.00 is the line's 15.00.
/// let (dr, cr) = detail.rows[1].sides(2);
/// assert_eq!((dr.to_string(), cr.to_string()), ("0.00".to_string(), "5.00".to_string()));
/// assert_eq!(detail.account(&detail.rows[1]), "DEP-2");
/// ```
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct JournalDetail {
    /// The lines the rows belong to, in the Journal sheet's order. A line
    /// whose accounts net to nothing is here too, though the Journal sheet
    /// leaves it out.
    pub lines: Vec<DetailLine>,
    /// The account ids the rows name.
    pub accounts: AccountIds,
    /// One row per line and account, by line, then accounts in book order.
    pub rows: Vec<DetailRow>,
}

impl JournalDetail {
    /// The line a row belongs to.
    pub fn line(&self, row: &DetailRow) -> Option<&DetailLine> {
        self.lines.get(usize::try_from(row.line).ok()?)
    }

    /// The account id a row names (empty for an index out of range).
    pub fn account(&self, row: &DetailRow) -> &str {
        self.accounts.get(row.account)
    }
}

/// What names a journal line: the five things its amounts are summed by
/// (date, entity, currency, GL account, memo) and the currency's minor units.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct DetailLine {
    /// Booking date.
    pub date: NaiveDate,
    /// Entity booking it.
    pub entity: String,
    /// ISO 4217 code.
    pub currency: String,
    /// Minor units.
    pub minor_units: u32,
    /// GL account code.
    pub gl_account: String,
    /// What the line is.
    pub memo: String,
}

impl DetailLine {
    /// The names of a journal line.
    pub fn of(line: &JournalLine) -> DetailLine {
        DetailLine {
            date: line.date,
            entity: line.entity.clone(),
            currency: line.currency.clone(),
            minor_units: line.minor_units,
            gl_account: line.gl_account.clone(),
            memo: line.memo.clone(),
        }
    }
}

/// One account's share of one journal line.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct DetailRow {
    /// Index into [`JournalDetail::lines`].
    pub line: u32,
    /// Index into [`JournalDetail::accounts`].
    pub account: u32,
    /// The account's share, debit positive, credit negative (never zero).
    pub amount: Decimal,
}

impl DetailRow {
    /// Debit and credit, one of them zero (with the currency's `minor_units`
    /// places), as a journal line shows them.
    pub fn sides(&self, minor_units: u32) -> (Decimal, Decimal) {
        split_sides(self.amount, minor_units)
    }
}

/// A signed amount as debit and credit: a positive amount is a debit, a
/// negative one a credit of its size; the other side is a zero with the
/// currency's `minor_units` places.
///
/// ```
/// use ledgerate::report::model::split_sides;
/// use rust_decimal::Decimal;
/// assert_eq!(split_sides(Decimal::new(-1250, 2), 2), (Decimal::new(0, 2), Decimal::new(1250, 2)));
/// assert_eq!(split_sides(Decimal::new(300, 0), 0), (Decimal::new(300, 0), Decimal::ZERO));
/// ```
pub fn split_sides(amount: Decimal, minor_units: u32) -> (Decimal, Decimal) {
    let mut zero = Decimal::ZERO;
    zero.rescale(minor_units);
    if amount.is_sign_negative() && !amount.is_zero() {
        (zero, -amount)
    } else {
        (amount, zero)
    }
}

/// One account-day (Daily sheet).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DailyLine {
    /// Account id.
    pub account: String,
    /// Minor units of the account's currency.
    pub minor_units: u32,
    /// The day.
    pub date: NaiveDate,
    /// Balance at the end of the day.
    pub balance: Decimal,
    /// Interest-bearing base.
    pub base: Decimal,
    /// Annual rate as a decimal.
    pub rate: Decimal,
    /// The day's fraction of a year (exact value rounded to 28 digits).
    pub day_fraction: Decimal,
    /// The day's interest, unrounded unless the account rounds daily.
    pub interest: Decimal,
    /// Accrued since the last posting, unrounded.
    pub accrued: Decimal,
}

/// One row of the Reconciliation sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ReconciliationLine {
    /// Account id.
    pub account: String,
    /// ISO 4217 code.
    pub currency: Word,
    /// Minor units.
    pub minor_units: u32,
    /// First day of the statement period (`None` for a statement row whose
    /// dates could not be read).
    pub period_start: Option<NaiveDate>,
    /// Last day of the statement period (`None` as above).
    pub period_end: Option<NaiveDate>,
    /// Days in the period.
    pub days: i64,
    /// Balance-years: the sum of base x day fraction.
    pub balance_years: Decimal,
    /// Expected interest.
    pub expected: Decimal,
    /// Posted interest (zero for a missing posting). Expected, posted and
    /// variance are zero, and written blank, on a row whose statement row
    /// could not be read ([`Status::StatementUnreadable`]).
    pub posted: Decimal,
    /// posted - expected.
    pub variance: Decimal,
    /// The variance as an annual rate gap in basis points; blank when balance-years is zero.
    pub variance_bp: Option<Decimal>,
    /// The status; the writer writes its word ([`Status::name`]).
    pub status: Status,
    /// The likely cause, in plain words (empty when agreed or within tolerance).
    pub likely_cause: String,
    /// The period's withholding tax, for a taxed account's statement period
    /// (boxed: most rows have none, and a row is held for every period).
    pub tax: Option<Box<TaxCheck>>,
}

/// How a Tie-out row's closing difference stands.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TieStatus {
    /// No difference.
    Agrees,
    /// A difference within the tolerance amount.
    WithinTolerance,
    /// A difference beyond it.
    Differs,
}

impl TieStatus {
    /// Every status, in the order a reader meets them.
    pub const ALL: [TieStatus; 3] = [
        TieStatus::Agrees,
        TieStatus::WithinTolerance,
        TieStatus::Differs,
    ];

    /// The word written in reports.
    pub fn name(self) -> &'static str {
        match self {
            TieStatus::Agrees => "agrees",
            TieStatus::WithinTolerance => "within tolerance",
            TieStatus::Differs => "differs",
        }
    }
}

/// One row of the Tie-out sheet: an accrued-interest GL account of one
/// entity and currency, its trial balance against the sub-ledger
/// (behaviour.md, Tie-out). Amounts are in the GL's normal direction.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TieOutLine {
    /// The entity.
    pub entity: String,
    /// ISO 4217 code.
    pub currency: String,
    /// Minor units.
    pub minor_units: u32,
    /// The accrued-interest GL account.
    pub gl_account: String,
    /// The side of its accounts (`liability`: payable, credit normal; `asset`: receivable).
    pub side: Word,
    /// Accounts of the sub-ledger in it.
    pub accounts: usize,
    /// Trial balance at the day before the window (zero without a row).
    pub opening_tb: Decimal,
    /// Sum of the accounts' booked openings.
    pub opening_sub_ledger: Decimal,
    /// Opening per trial balance less per sub-ledger.
    pub opening_difference: Decimal,
    /// Sum of interest for window (prior-period adjustment included).
    pub interest_for_window: Decimal,
    /// Sum of postings settled in the window, whichever run journals them.
    pub settled_in_window: Decimal,
    /// Opening per trial balance + interest for window - settled in window.
    pub closing_roll_forward: Decimal,
    /// Sum of the accounts' open items at cut-off.
    pub closing_sub_ledger: Decimal,
    /// Trial balance at cut-off, when a row gives it.
    pub closing_tb: Option<Decimal>,
    /// Closing per trial balance (else roll-forward) less per sub-ledger.
    pub closing_difference: Decimal,
    /// How the closing difference stands.
    pub status: TieStatus,
}

/// Counts of one status (Summary sheet).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct StatusCount {
    /// The status; the writer writes its word.
    pub status: Status,
    /// Rows with it.
    pub rows: usize,
}

/// Everything one output workbook holds.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Report {
    /// Run facts.
    pub facts: RunFacts,
    /// Totals by currency and side, in code order, asset before liability.
    pub totals: Vec<CurrencyTotal>,
    /// Accounts left out by errors, in the order of the Problems sheet: all
    /// of them after a run, at least the first [`LEFT_OUT_SHOWN`] after a
    /// merge (each shard's Summary lists its first ones).
    pub left_out: Vec<LeftOutLine>,
    /// One line per computed account, in book order.
    pub accruals: Vec<AccrualLine>,
    /// Reconciliation rows (empty without statements).
    pub reconciliation: Vec<ReconciliationLine>,
    /// The core system's open items at cut-off against ours, one row per
    /// account with a Booked row dated the cut-off (behaviour.md, System
    /// accrued check): period start is "Accrual from", period end the
    /// cut-off, posted the booked figure, expected our open item.
    pub accrued_check: Vec<ReconciliationLine>,
    /// The Tie-out, when the books have Trial balance rows.
    pub tie_out: Option<Vec<TieOutLine>>,
    /// Counts by status (empty without statements).
    pub status_counts: Vec<StatusCount>,
    /// The Summary's largest variances in money: indices into
    /// `reconciliation`, by currency in code order, largest first.
    pub largest_variances: Vec<usize>,
    /// Journal lines.
    pub journal: Vec<JournalLine>,
    /// The accounts of each journal line, when the workbook holds them
    /// (the Journal detail sheet).
    pub journal_detail: Option<JournalDetail>,
    /// Daily lines, when asked for.
    pub daily: Option<Vec<DailyLine>>,
    /// Problems of the books and the run.
    pub problems: Vec<Problem>,
}
