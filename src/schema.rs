//! The format of an input book, described once: each sheet (its name and
//! whether a book needs it), each column (name, required or optional, what
//! it holds, what a blank cell means, and the note and example value of the
//! template) and the rows of the Settings sheet.
//!
//! Everything that knows the format takes it from here: the sheet readers
//! look their columns up by name when the program is built ([`column!`]),
//! `ledgerate template` writes every sheet and column in this order, the
//! sample generator and the book writer lay out their sheets by it
//! ([`Layout`]), and problems are listed in its sheet order.
//!
//! It describes and nothing more: it never reads or writes a file, never
//! types a cell and never applies a default. What a column means is the
//! reader's code; a default written here is checked against the reader by
//! the reader's tests.

use crate::conventions::calendar::BusinessDay;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::names::fold;
use crate::conventions::rounding::RoundMode;
use crate::conventions::schedule::{AnchorKind, Posting};
use crate::engine::ledger::SettlementLines;
use crate::engine::suspense::AccrualStatus;
use crate::engine::terms::{RoundAt, Side, TierMethod};

/// The sheets a book may hold.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum SheetKind {
    /// One row per account.
    Accounts,
    /// Rate tables.
    Rates,
    /// Balance movements.
    Movements,
    /// Postings as statements show them.
    Statements,
    /// The open item the institution's books held for an account at the end of a day.
    Booked,
    /// General-ledger balances at the end of a day.
    TrialBalance,
    /// Index fixings (floating rates).
    Fixings,
    /// Holiday calendars.
    Holidays,
    /// Run settings.
    Settings,
    /// Withholding tax tables.
    Tax,
    /// Non-accrual and credit-impaired status of asset accounts by date.
    AccrualStatus,
}

impl SheetKind {
    /// Every sheet, in the order of the book format (the template's order,
    /// and the order problems are listed in).
    pub const ALL: [SheetKind; 11] = [
        SheetKind::Accounts,
        SheetKind::Rates,
        SheetKind::Movements,
        SheetKind::Statements,
        SheetKind::Booked,
        SheetKind::TrialBalance,
        SheetKind::Fixings,
        SheetKind::Holidays,
        SheetKind::Settings,
        SheetKind::Tax,
        SheetKind::AccrualStatus,
    ];

    /// The sheet's description.
    pub const fn spec(self) -> &'static SheetSpec {
        match self {
            SheetKind::Accounts => &ACCOUNTS,
            SheetKind::Rates => &RATES,
            SheetKind::Movements => &MOVEMENTS,
            SheetKind::Statements => &STATEMENTS,
            SheetKind::Booked => &BOOKED,
            SheetKind::TrialBalance => &TRIAL_BALANCE,
            SheetKind::Fixings => &FIXINGS,
            SheetKind::Holidays => &HOLIDAYS,
            SheetKind::Settings => &SETTINGS,
            SheetKind::Tax => &TAX,
            SheetKind::AccrualStatus => &ACCRUAL_STATUS,
        }
    }

    /// The sheet's name as books.md writes it.
    ///
    /// ```
    /// use ledgerate::schema::SheetKind;
    /// assert_eq!(SheetKind::Statements.label(), "Statements");
    /// ```
    pub fn label(self) -> &'static str {
        self.spec().name
    }

    /// Whether a book must have it.
    pub fn required(self) -> bool {
        self.spec().required
    }

    /// The sheet a name stands for (case, spaces, `_` and `-` ignored).
    ///
    /// ```
    /// use ledgerate::schema::SheetKind;
    /// assert_eq!(SheetKind::from_name("hol-i_days"), Some(SheetKind::Holidays));
    /// assert_eq!(SheetKind::from_name("trial_balance"), Some(SheetKind::TrialBalance));
    /// assert_eq!(SheetKind::from_name("Accounts 2"), None);
    /// ```
    pub fn from_name(name: &str) -> Option<SheetKind> {
        let key = fold(name);
        SheetKind::ALL.into_iter().find(|k| fold(k.label()) == key)
    }
}

/// A sheet of the book format.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SheetSpec {
    /// Which sheet it is.
    pub kind: SheetKind,
    /// Its name (a CSV book's file is this in lower case, spaces as `_`,
    /// plus `.csv`).
    pub name: &'static str,
    /// Whether a book must have it.
    pub required: bool,
    /// Its columns, in the template's order.
    pub columns: &'static [Column],
}

impl SheetSpec {
    /// The place of column `name` (exactly as written here) in
    /// [`columns`](Self::columns). Readers take their column places from
    /// [`column!`], which calls this when the program is built.
    ///
    /// ```
    /// use ledgerate::schema::SheetKind;
    /// let rates = SheetKind::Rates.spec();
    /// assert_eq!(rates.position("effective"), Some(1));
    /// assert_eq!(rates.position("Effective"), None);
    /// ```
    pub const fn position(&self, name: &str) -> Option<usize> {
        let mut rest = self.columns;
        let mut i = 0;
        while let Some((column, tail)) = rest.split_first() {
            if same(column.name, name) {
                return Some(i);
            }
            rest = tail;
            i += 1;
        }
        None
    }

    /// The column named `name` (exactly as written here).
    pub fn column(&self, name: &str) -> Option<&'static Column> {
        self.columns.iter().find(|c| c.name == name)
    }
}

/// Whether two texts are the same, byte for byte, in a constant.
const fn same(a: &str, b: &str) -> bool {
    let (mut a, mut b) = (a.as_bytes(), b.as_bytes());
    loop {
        match (a.split_first(), b.split_first()) {
            (Some((x, a_rest)), Some((y, b_rest))) => {
                if *x != *y {
                    return false;
                }
                a = a_rest;
                b = b_rest;
            }
            (None, None) => return true,
            _ => return false,
        }
    }
}

/// The place of a column in a sheet's [`SheetSpec::columns`], found when
/// the program is built, for a reader's constants: a name the schema does
/// not list stops the build rather than a run.
///
/// ```
/// use ledgerate::schema::{column, ACCOUNTS};
/// const OPEN_DATE: usize = column!(ACCOUNTS, "open_date");
/// assert_eq!(OPEN_DATE, 3);
/// ```
///
/// ```compile_fail
/// use ledgerate::schema::{column, ACCOUNTS};
/// const OPEN_DATE: usize = column!(ACCOUNTS, "open_dte");
/// ```
#[doc(hidden)]
#[macro_export]
macro_rules! schema_column {
    ($sheet:expr, $name:literal) => {
        const {
            match $sheet.position($name) {
                Some(i) => i,
                None => panic!(concat!("the book schema lists no column ", $name)),
            }
        }
    };
}
#[doc(inline)]
pub use crate::schema_column as column;

/// A [`Layout`] of some of a sheet's columns, in the order given, each
/// found when the program is built (see [`column!`]).
///
/// ```
/// use ledgerate::schema::{layout, Layout, RATES};
/// const RATE_ROWS: Layout = layout!(RATES, "rate_ref", "effective", "tier_from");
/// assert_eq!(RATE_ROWS.labels(), vec!["rate_ref", "effective", "tier_from"]);
/// ```
#[doc(hidden)]
#[macro_export]
macro_rules! schema_layout {
    ($sheet:expr $(, $name:literal)+ $(,)?) => {
        $crate::schema::Layout::only(
            $sheet.kind,
            &[$($crate::schema::column!($sheet, $name)),+],
        )
    };
}
#[doc(inline)]
pub use crate::schema_layout as layout;

/// A column of a sheet.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Column {
    /// The name as books.md writes it (the header label).
    pub name: &'static str,
    /// Whether the sheet is unusable without it.
    pub required: bool,
    /// What it holds: its format and drop-down list in the template.
    pub kind: Kind,
    /// What a blank cell (or a missing optional column) means.
    pub if_blank: IfBlank,
    /// The note on the template's header cell.
    pub note: &'static str,
    /// The template's example value.
    pub example: Example,
}

/// What a column holds, which decides its format and validation in the
/// template.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// An identifier kept as text (leading zeros stay).
    Id,
    /// Free text.
    Text,
    /// A date.
    Date,
    /// An amount.
    Amount,
    /// A rate in percent (4.25 for 4.25%).
    Percent,
    /// A rate as a decimal (0.0425).
    Decimal,
    /// Basis points.
    Bp,
    /// A whole number of days or places, 0 or more.
    Whole,
    /// One of a list of names.
    Choice(Choice),
}

/// What a blank cell of an optional column means.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum IfBlank {
    /// Nothing: the term is left out (a required column: a blank is an error).
    Nothing,
    /// The same as this value written in the cell.
    Means(&'static str),
    /// A value worked out from the rest of the row or the run, as said.
    Derived(&'static str),
}

/// An example value of the template.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Example {
    /// No example.
    Blank,
    /// Text.
    Text(&'static str),
    /// A date: year, month, day.
    Date(i32, u32, u32),
    /// Mantissa and scale: (2500000, 2) is 25,000.00.
    Number(i64, u32),
}

/// A named choice with a drop-down list in the template.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Choice {
    /// asset / liability.
    Side,
    /// The compounding rules.
    Compounding,
    /// The posting frequencies.
    Posting,
    /// end / payment.
    AnchorKind,
    /// yes / no.
    YesNo,
    /// posting / daily.
    RoundAt,
    /// The rounding modes.
    RoundMode,
    /// whole / banded.
    TierMethod,
    /// The business-day conventions.
    BusinessDay,
    /// The day-count bases.
    DayCount,
    /// fixed / simple-daily / compounded-in-arrears.
    RateMethod,
    /// incremental / reversing.
    JournalStyle,
    /// inclusive / exclusive.
    StatementEnd,
    /// payment-date / in-window / period-end.
    SettlementLines,
    /// gross / net.
    StatementAmounts,
    /// accruing / non-accrual / credit-impaired.
    AccrualStatus,
    /// principal / interest.
    AppliesTo,
}

impl Choice {
    /// Every choice.
    pub const ALL: [Choice; 17] = [
        Choice::Side,
        Choice::Compounding,
        Choice::Posting,
        Choice::AnchorKind,
        Choice::YesNo,
        Choice::RoundAt,
        Choice::RoundMode,
        Choice::TierMethod,
        Choice::BusinessDay,
        Choice::DayCount,
        Choice::RateMethod,
        Choice::JournalStyle,
        Choice::StatementEnd,
        Choice::SettlementLines,
        Choice::StatementAmounts,
        Choice::AccrualStatus,
        Choice::AppliesTo,
    ];

    /// The canonical names offered, in their usual order.
    ///
    /// ```
    /// use ledgerate::schema::Choice;
    /// assert_eq!(Choice::DayCount.names().len(), 11);
    /// assert_eq!(Choice::TierMethod.names(), vec!["whole", "banded"]);
    /// ```
    pub fn names(self) -> Vec<&'static str> {
        match self {
            Choice::Side => vec![Side::Liability.name(), Side::Asset.name()],
            Choice::Compounding => Compounding::ALL.iter().map(|c| c.name()).collect(),
            Choice::Posting => Posting::ALL.iter().map(|c| c.name()).collect(),
            Choice::AnchorKind => vec![AnchorKind::End.name(), AnchorKind::Payment.name()],
            Choice::YesNo => vec!["yes", "no"],
            Choice::RoundAt => vec![RoundAt::Posting.name(), RoundAt::Daily.name()],
            Choice::RoundMode => RoundMode::ALL.iter().map(|c| c.name()).collect(),
            Choice::TierMethod => vec![TierMethod::Whole.name(), TierMethod::Banded.name()],
            Choice::BusinessDay => BusinessDay::ALL.iter().map(|c| c.name()).collect(),
            Choice::DayCount => Basis::ALL.iter().map(|c| c.name()).collect(),
            Choice::RateMethod => vec!["fixed", "simple-daily", "compounded-in-arrears"],
            Choice::JournalStyle => vec!["incremental", "reversing"],
            Choice::StatementEnd => vec!["inclusive", "exclusive"],
            Choice::SettlementLines => SettlementLines::ALL.iter().map(|c| c.name()).collect(),
            Choice::StatementAmounts => vec!["gross", "net"],
            Choice::AccrualStatus => AccrualStatus::ALL.iter().map(|c| c.name()).collect(),
            Choice::AppliesTo => vec!["principal", "interest"],
        }
    }
}

/// A row of the Settings sheet: a setting's name, what its value holds, the
/// template's note and example value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SettingSpec {
    /// The setting's name, in the sheet's `setting` column.
    pub name: &'static str,
    /// What the `value` column holds for it.
    pub kind: Kind,
    /// The template's note on the row.
    pub note: &'static str,
    /// The template's example value.
    pub example: Example,
}

/// Some or all of a sheet's columns, in the order a writer puts them: the
/// sheet description of [`crate::report::book_writer`].
///
/// ```
/// use ledgerate::schema::{Layout, SheetKind};
/// let holidays = Layout::every(SheetKind::Holidays);
/// assert_eq!(holidays.labels(), vec!["calendar", "date", "name"]);
/// assert_eq!(Layout::only(SheetKind::Rates, &[0, 2]).labels(), vec!["rate_ref", "rate_percent"]);
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Layout {
    /// The sheet.
    pub sheet: SheetKind,
    /// The places of the columns written, in [`SheetSpec::columns`]; `None`
    /// for every column in the schema's order.
    pick: Option<&'static [usize]>,
}

impl Layout {
    /// Every column of `sheet`, in the schema's order.
    pub const fn every(sheet: SheetKind) -> Layout {
        Layout { sheet, pick: None }
    }

    /// The columns of `sheet` at places `columns`, in that order. Build it
    /// by name with [`layout!`], which checks every name when the program is
    /// built; a place past the sheet's columns would be left out.
    pub const fn only(sheet: SheetKind, columns: &'static [usize]) -> Layout {
        Layout {
            sheet,
            pick: Some(columns),
        }
    }

    /// The sheet's name.
    pub fn name(&self) -> &'static str {
        self.sheet.label()
    }

    /// The columns written, in order.
    pub fn columns(&self) -> Vec<&'static Column> {
        let all = self.sheet.spec().columns;
        match self.pick {
            None => all.iter().collect(),
            Some(places) => places.iter().filter_map(|&i| all.get(i)).collect(),
        }
    }

    /// The header labels, in order.
    pub fn labels(&self) -> Vec<&'static str> {
        self.columns().into_iter().map(|c| c.name).collect()
    }
}

const fn required(name: &'static str, kind: Kind, note: &'static str, example: Example) -> Column {
    Column {
        name,
        required: true,
        kind,
        if_blank: IfBlank::Nothing,
        note,
        example,
    }
}

const fn optional(
    name: &'static str,
    kind: Kind,
    if_blank: IfBlank,
    note: &'static str,
    example: Example,
) -> Column {
    Column {
        name,
        required: false,
        kind,
        if_blank,
        note,
        example,
    }
}

use Example::{Blank, Date, Number, Text};
use IfBlank::{Derived, Means, Nothing};
use Kind::{Amount, Bp, Id, Percent, Whole};

/// The Accounts sheet: one row per account.
pub const ACCOUNTS: SheetSpec = SheetSpec {
    kind: SheetKind::Accounts,
    name: "Accounts",
    required: true,
    columns: &[
        required(
            "account",
            Id,
            "Account id (required). Unique across all the books of a run.",
            Text("HM-SAV-001"),
        ),
        required(
            "currency",
            Id,
            "ISO 4217 currency code such as USD, EUR or JPY (required). Amounts are rounded to its minor unit.",
            Text("USD"),
        ),
        required(
            "day_count",
            Kind::Choice(Choice::DayCount),
            "Day-count basis (required). Pick one from the list.",
            Text("ACT/365F"),
        ),
        required(
            "open_date",
            Kind::Date,
            "First day the account earns (required). The opening figures are its state at the start of that day.",
            Date(2024, 1, 1),
        ),
        required(
            "opening_balance",
            Amount,
            "Balance at the start of open_date (required), positive in the account's normal direction: a deposit's credit, a loan's debit.",
            Number(2_500_000, 2),
        ),
        optional(
            "name",
            Kind::Text,
            Nothing,
            "Account name, shown in the output.",
            Text("Harbour Saver"),
        ),
        optional(
            "side",
            Kind::Choice(Choice::Side),
            Means("liability"),
            "liability: a deposit, interest is an expense (default). asset: a loan, interest is income.",
            Text("liability"),
        ),
        optional(
            "compounding",
            Kind::Choice(Choice::Compounding),
            Means("simple"),
            "When accrued interest starts to earn interest itself. Default simple.",
            Text("daily"),
        ),
        optional(
            "posting",
            Kind::Choice(Choice::Posting),
            Means("monthly"),
            "How often interest is posted. Default monthly; maturity needs a maturity date; none never posts.",
            Text("monthly"),
        ),
        optional(
            "posting_anchor",
            Kind::Date,
            Derived("the last day of the month of period_start, else of open_date"),
            "A date that fixes the posting schedule. Default: the last day of the month of period_start, else of open_date.",
            Date(2024, 1, 31),
        ),
        optional(
            "anchor_kind",
            Kind::Choice(Choice::AnchorKind),
            Means("end"),
            "end: the anchor is the last earning day of a period (default). payment: the anchor is a payment date.",
            Text("end"),
        ),
        optional(
            "capitalise",
            Kind::Choice(Choice::YesNo),
            Means("no"),
            "yes: posted interest is added to the balance. no: it is paid out (default).",
            Text("yes"),
        ),
        optional(
            "round_at",
            Kind::Choice(Choice::RoundAt),
            Means("posting"),
            "posting: only posted amounts are rounded (default). daily: each day's interest is rounded first.",
            Text("posting"),
        ),
        optional(
            "round_mode",
            Kind::Choice(Choice::RoundMode),
            Means("half-up"),
            "How amounts are rounded to the currency's minor unit. Default half-up.",
            Text("half-even"),
        ),
        optional(
            "round_places",
            Whole,
            Derived("the currency's minor unit"),
            "Decimals of the daily rounding when round_at is daily. Default: the currency's minor unit.",
            Blank,
        ),
        optional(
            "maturity",
            Kind::Date,
            Nothing,
            "Maturity date. The night before it is the last that earns.",
            Blank,
        ),
        optional(
            "rate_ref",
            Id,
            Derived("the account id"),
            "The Rates schedule the account earns. Default: the account id.",
            Text("HM-SAVER"),
        ),
        optional(
            "debit_rate_ref",
            Id,
            Nothing,
            "Rates schedule for a balance of the opposite sign, such as an overdrawn deposit. Blank: it earns nothing.",
            Blank,
        ),
        optional(
            "tier_method",
            Kind::Choice(Choice::TierMethod),
            Means("whole"),
            "whole: the whole balance earns the rate of the highest tier reached (default). banded: each slice earns its own tier's rate.",
            Text("whole"),
        ),
        optional(
            "calendar",
            Id,
            Derived("no holidays: only Saturdays and Sundays are not business days"),
            "Holiday calendar from the Holidays sheet. Needed by BUS/252, business-day rolls and index rates.",
            Text("HM-CAL"),
        ),
        optional(
            "business_day",
            Kind::Choice(Choice::BusinessDay),
            Means("unadjusted"),
            "How a payment date that is not a business day moves. Default unadjusted.",
            Text("unadjusted"),
        ),
        optional(
            "payment_delay_days",
            Whole,
            Means("0"),
            "Business days from the end of a period to its payment. Default 0.",
            Number(0, 0),
        ),
        optional(
            "opening_accrued",
            Amount,
            Means("0"),
            "Interest accrued but not posted at the start of open_date. It is added to the first posting.",
            Number(0, 2),
        ),
        optional(
            "period_start",
            Kind::Date,
            Derived("the open_date"),
            "Where the period open on open_date began (matters to 30/360 and ACT/ACT ICMA).",
            Blank,
        ),
        optional(
            "rate_method",
            Kind::Choice(Choice::RateMethod),
            Means("fixed"),
            "fixed (default), or for a rate on an index: simple-daily or compounded-in-arrears.",
            Text("fixed"),
        ),
        optional(
            "lookback_days",
            Whole,
            Means("0"),
            "Business days an index fixing is looked back.",
            Blank,
        ),
        optional(
            "observation_shift",
            Kind::Choice(Choice::YesNo),
            Means("no"),
            "yes: the observation period moves back with the lookback.",
            Blank,
        ),
        optional(
            "lockout_days",
            Whole,
            Means("0"),
            "Last business days of a period that reuse the fixing of the day before them.",
            Blank,
        ),
        optional(
            "spread_compounded",
            Kind::Choice(Choice::YesNo),
            Means("no"),
            "yes: the spread is compounded with the index. no: it is added afterwards (default).",
            Blank,
        ),
        optional(
            "floor_on",
            Kind::Text,
            Means("index"),
            "all-in: the floor and cap bound index plus spread. Blank: they bound the fixing alone.",
            Blank,
        ),
        optional(
            "gl_interest",
            Id,
            Derived("the journal's interest expense (liability side) or income (asset side) account"),
            "GL account of the interest expense (liability side) or income (asset side).",
            Text("5100-INT-EXP"),
        ),
        optional(
            "gl_accrued",
            Id,
            Derived("the journal's accrued interest payable (liability side) or receivable (asset side) account"),
            "GL account of the accrued interest payable or receivable.",
            Text("2310-ACCR-INT"),
        ),
        optional(
            "gl_settlement",
            Id,
            Derived("the journal's interest settlement account"),
            "GL account where postings settle: the member's account, cash...",
            Text("2100-MBR-SAV"),
        ),
        optional(
            "gl_prior_period",
            Id,
            Derived("the account's interest GL account (gl_interest, else the journal's)"),
            "GL account of a prior-period interest adjustment: interest of days before the window that the last close did not book. Default: the interest GL account.",
            Text("5190-INT-PRIOR"),
        ),
        optional(
            "tax_ref",
            Id,
            Nothing,
            "Withholding tax on postings: a tax_ref of the Tax sheet. Blank: no tax.",
            Blank,
        ),
        optional(
            "gl_tax",
            Id,
            Derived("WITHHOLDING-TAX-PAYABLE (liability side) or WITHHOLDING-TAX-RECOVERABLE (asset side)"),
            "GL account of the tax withheld: payable to the tax authority (liability side) or recoverable (asset side).",
            Blank,
        ),
        optional(
            "gl_suspense",
            Id,
            Derived("INTEREST-IN-SUSPENSE"),
            "Asset side: GL account of interest in suspense, the contra account of the receivable that holds interest accrued but not recognised (Accrual status).",
            Text("1390-INT-SUSP"),
        ),
        optional(
            "gl_reversal",
            Id,
            Derived("the account's interest GL account (gl_interest, else the journal's)"),
            "Asset side: GL account charged with the interest reversed on an entry into non-accrual. Default: the interest GL account.",
            Text("4100-INT-INC"),
        ),
        optional(
            "opening_suspense",
            Amount,
            Means("0"),
            "Asset side: interest held in suspense at the start of open_date (brought forward).",
            Number(0, 2),
        ),
        optional(
            "close_date",
            Kind::Date,
            Nothing,
            "The day the account is closed and paid out; it earns until the night before. Blank: not closed.",
            Blank,
        ),
        optional(
            "break_penalty",
            Kind::Text,
            Means("none"),
            "Penalty on a close before maturity: none (default), days (break_days' simple interest), rate (the term re-priced at break_rate_ref) or amount (break_amount).",
            Blank,
        ),
        optional(
            "break_days",
            Whole,
            Nothing,
            "Days of simple interest charged, for break_penalty days (1 to 3650).",
            Blank,
        ),
        optional(
            "break_rate_ref",
            Id,
            Nothing,
            "Rates schedule the term is re-priced at, for break_penalty rate.",
            Blank,
        ),
        optional(
            "break_amount",
            Amount,
            Nothing,
            "Fixed penalty, for break_penalty amount.",
            Blank,
        ),
        optional(
            "penalty_limit",
            Kind::Text,
            Means("none"),
            "none: the penalty may reduce the principal (default). interest: at most the interest the current term earned.",
            Blank,
        ),
        optional(
            "gl_penalty",
            Id,
            Derived("the account's interest GL account (gl_interest, else the journal's)"),
            "GL account credited with a break penalty. Default: the interest GL account.",
            Blank,
        ),
        optional(
            "after_maturity",
            Kind::Text,
            Means("none"),
            "What a balance does from maturity: none (earns nothing, default), rate (earns matured_rate_ref), rollover (a new term of rollover_months).",
            Blank,
        ),
        optional(
            "matured_rate_ref",
            Id,
            Nothing,
            "Rates schedule a matured balance earns, simple, for after_maturity rate.",
            Blank,
        ),
        optional(
            "rollover_months",
            Whole,
            Nothing,
            "Months of each new term, for after_maturity rollover (1 to 120).",
            Blank,
        ),
        optional(
            "rollover_rate_ref",
            Id,
            Derived("the rate_ref"),
            "Rates schedule of a new term's rate (its table in force on the maturity, fixed for the term). Default: the rate_ref.",
            Blank,
        ),
    ],
};

/// The Rates sheet: rate schedules by `rate_ref`, one complete table per
/// effective date.
pub const RATES: SheetSpec = SheetSpec {
    kind: SheetKind::Rates,
    name: "Rates",
    required: true,
    columns: &[
        required(
            "rate_ref",
            Id,
            "Schedule name, as in the rate_ref of Accounts (required).",
            Text("HM-SAVER"),
        ),
        required(
            "effective",
            Kind::Date,
            "Date from which this schedule's rows with this date apply, together as one complete table (required).",
            Date(2024, 1, 1),
        ),
        optional(
            "rate_percent",
            Percent,
            Nothing,
            "Annual nominal rate in percent: 4.25 means 4.25%. Fill rate_percent or rate_decimal, or name an index.",
            Number(325, 2),
        ),
        optional(
            "rate_decimal",
            Kind::Decimal,
            Nothing,
            "Annual nominal rate as a decimal: 0.0425 means 4.25%. Fill rate_percent or rate_decimal, or name an index.",
            Blank,
        ),
        optional(
            "tier_from",
            Amount,
            Means("0"),
            "Balance from which this row's rate applies. Default 0.",
            Number(0, 2),
        ),
        optional(
            "index",
            Id,
            Nothing,
            "Index name from the Fixings sheet, instead of a fixed rate.",
            Blank,
        ),
        optional(
            "spread_bp",
            Bp,
            Means("0"),
            "Basis points added to the index fixing.",
            Blank,
        ),
        optional(
            "floor_percent",
            Percent,
            Nothing,
            "Lowest fixing used, in percent.",
            Blank,
        ),
        optional(
            "cap_percent",
            Percent,
            Nothing,
            "Highest fixing used, in percent.",
            Blank,
        ),
        optional(
            "booked",
            Kind::Date,
            Derived("the row's effective date"),
            "Date the table was booked, when not its effective date. A run as at an earlier day leaves the whole table out; every row of one table has the same date. Default: effective.",
            Date(2024, 1, 1),
        ),
    ],
};

/// The Movements sheet: balance movements by account.
pub const MOVEMENTS: SheetSpec = SheetSpec {
    kind: SheetKind::Movements,
    name: "Movements",
    required: false,
    columns: &[
        required("account", Id, "Account id (required).", Text("HM-SAV-001")),
        required(
            "value_date",
            Kind::Date,
            "Date from which the amount is in the balance; it earns on that day (required).",
            Date(2024, 1, 15),
        ),
        required(
            "amount",
            Amount,
            "Amount (required). Positive raises the balance, negative lowers it.",
            Number(150_000, 2),
        ),
        optional(
            "booking_date",
            Kind::Date,
            Nothing,
            "Date the movement was booked, when later than its value date (back-valuation).",
            Date(2024, 1, 15),
        ),
        optional(
            "reference",
            Kind::Text,
            Nothing,
            "Your reference, kept for the audit trail.",
            Text("DEP-24-0115"),
        ),
        optional(
            "applies_to",
            Kind::Choice(Choice::AppliesTo),
            Means("principal"),
            "principal: the amount moves the balance (default). interest: a receipt of billed interest (a negative amount on an asset account); it leaves the balance alone and may release interest in suspense.",
            Text("principal"),
        ),
    ],
};

/// The Statements sheet: interest actually posted, by account and period.
pub const STATEMENTS: SheetSpec = SheetSpec {
    kind: SheetKind::Statements,
    name: "Statements",
    required: false,
    columns: &[
        required(
            "account",
            Id,
            "Account id (required).",
            Text("HM-SAV-001"),
        ),
        required(
            "period_start",
            Kind::Date,
            "First day of the statement period (required).",
            Date(2024, 1, 1),
        ),
        required(
            "period_end",
            Kind::Date,
            "Last day of the statement period (required); the first day after it when statement_end is exclusive in Settings.",
            Date(2024, 1, 31),
        ),
        required(
            "posted_interest",
            Amount,
            "Interest actually posted for the period (required).",
            Number(7_137, 2),
        ),
        optional(
            "reference",
            Kind::Text,
            Nothing,
            "The statement's reference.",
            Text("STMT-2024-01"),
        ),
        optional(
            "posting_date",
            Kind::Date,
            Nothing,
            "Date the posting was booked to the customer's account. A run as at an earlier day leaves the row out. Blank: known to every run.",
            Date(2024, 1, 31),
        ),
        optional(
            "tax_withheld",
            Amount,
            Nothing,
            "Withholding tax the statement shows for the period, when it shows it (summed like posted_interest).",
            Blank,
        ),
    ],
};

/// The Booked sheet: the open item the institution's books held for an
/// account at the end of a day (the day before the window, or the cut-off).
pub const BOOKED: SheetSpec = SheetSpec {
    kind: SheetKind::Booked,
    name: "Booked",
    required: false,
    columns: &[
        required(
            "account",
            Id,
            "Account id (required).",
            Text("HM-SAV-001"),
        ),
        required(
            "date",
            Kind::Date,
            "The day the open item stands at the end of (required): the day before the window (the opening the last close booked) or the cut-off (the core system's accrued interest). Other days are not used.",
            Date(2024, 1, 31),
        ),
        required(
            "open_item",
            Amount,
            "Accrued interest plus postings not yet settled, as the books held it, positive in the account's normal direction (required).",
            Number(7_137, 2),
        ),
    ],
};

/// The Trial balance sheet: GL balances at the end of a day, as the general
/// ledger prints them.
pub const TRIAL_BALANCE: SheetSpec = SheetSpec {
    kind: SheetKind::TrialBalance,
    name: "Trial balance",
    required: false,
    columns: &[
        required(
            "entity",
            Kind::Text,
            "Legal entity or ledger, as the journal names it (required).",
            Text("Harbourview Mutual"),
        ),
        required(
            "currency",
            Id,
            "ISO 4217 currency code of the balance (required).",
            Text("USD"),
        ),
        required(
            "gl_account",
            Id,
            "GL account, as in the Accounts sheet's gl_accrued (required).",
            Text("2310-ACCR-INT"),
        ),
        required(
            "date",
            Kind::Date,
            "The day the balance stands at the end of (required): the day before the window (the opening) or the cut-off (after this run's journal is booked). Other days are not used.",
            Date(2024, 1, 31),
        ),
        required(
            "balance",
            Amount,
            "The balance as a trial balance prints it (required): debit positive, credit negative.",
            Number(-7_137, 2),
        ),
    ],
};

/// The Accrual status sheet: when an asset account stops accruing interest
/// into income, or is credit-impaired, and when it returns. The template's
/// example account is a deposit, so the sheet's example row is blank.
pub const ACCRUAL_STATUS: SheetSpec = SheetSpec {
    kind: SheetKind::AccrualStatus,
    name: "Accrual status",
    required: false,
    columns: &[
        required(
            "account",
            Id,
            "Account id of an asset account (required).",
            Blank,
        ),
        required(
            "from",
            Kind::Date,
            "The first day in the status (required). It stays in force until the account's next row.",
            Blank,
        ),
        required(
            "status",
            Kind::Choice(Choice::AccrualStatus),
            "accruing: interest is income. non-accrual: none is; what accrues is held in suspense. credit-impaired: income is interest on the balance less the allowance (required).",
            Blank,
        ),
        optional(
            "unpaid_interest",
            Amount,
            Means("0"),
            "non-accrual: interest billed and not paid at the end of the day before from; it is reversed with the accrued interest.",
            Blank,
        ),
        optional(
            "allowance",
            Amount,
            Means("0"),
            "credit-impaired: the loss allowance in force from from, 0 or more.",
            Blank,
        ),
        optional(
            "cash_basis",
            Kind::Choice(Choice::YesNo),
            Means("no"),
            "non-accrual: yes means interest received releases interest in suspense to income. Default: no.",
            Blank,
        ),
    ],
};

/// The Fixings sheet: index fixings by business day.
pub const FIXINGS: SheetSpec = SheetSpec {
    kind: SheetKind::Fixings,
    name: "Fixings",
    required: false,
    columns: &[
        required(
            "index",
            Id,
            "Index name, as used in Rates.",
            Text("HM-OVERNIGHT"),
        ),
        required(
            "date",
            Kind::Date,
            "Business day the fixing applies to.",
            Date(2024, 1, 2),
        ),
        required(
            "rate_percent",
            Percent,
            "The fixing in percent: 5.31 means 5.31%.",
            Number(531, 2),
        ),
    ],
};

/// The Holidays sheet: named calendars of holiday dates.
pub const HOLIDAYS: SheetSpec = SheetSpec {
    kind: SheetKind::Holidays,
    name: "Holidays",
    required: false,
    columns: &[
        required(
            "calendar",
            Id,
            "Calendar name, as used in Accounts.",
            Text("HM-CAL"),
        ),
        required(
            "date",
            Kind::Date,
            "A day that is not a business day. Saturdays and Sundays never are.",
            Date(2024, 1, 1),
        ),
        optional(
            "name",
            Kind::Text,
            Nothing,
            "What the day is.",
            Text("New Year's Day"),
        ),
    ],
};

/// The Settings sheet: one row per setting ([`SETTING_ROWS`]).
pub const SETTINGS: SheetSpec = SheetSpec {
    kind: SheetKind::Settings,
    name: "Settings",
    required: false,
    columns: &[
        required(
            "setting",
            Kind::Text,
            "Setting name. Options given on the command line override these values.",
            Blank,
        ),
        required("value", Kind::Text, "The setting's value.", Blank),
    ],
};

/// The settings a Settings sheet may set, in the template's order.
pub const SETTING_ROWS: &[SettingSpec] = &[
    SettingSpec {
        name: "cutoff",
        kind: Kind::Date,
        note: "Cut-off date: the computation stops at the end of this day.",
        example: Date(2024, 1, 31),
    },
    SettingSpec {
        name: "window_start",
        kind: Kind::Date,
        note: "First day of the reporting window. Default: the first day of the cut-off's month.",
        example: Date(2024, 1, 1),
    },
    SettingSpec {
        name: "tolerance_amount",
        kind: Amount,
        note: "Variance accepted, in units of each row's own currency. Default: one minor unit.",
        example: Number(1, 2),
    },
    SettingSpec {
        name: "tolerance_bp",
        kind: Bp,
        note: "Variance accepted, in basis points of rate.",
        example: Number(50, 2),
    },
    SettingSpec {
        name: "entity",
        kind: Kind::Text,
        note: "Legal entity or ledger named on the journal.",
        example: Text("Harbourview Mutual"),
    },
    SettingSpec {
        name: "journal_style",
        kind: Kind::Choice(Choice::JournalStyle),
        note: "incremental: the window's interest (default). reversing: the whole accrual, reversed the day after the cut-off.",
        example: Text("incremental"),
    },
    SettingSpec {
        name: "statement_end",
        kind: Kind::Choice(Choice::StatementEnd),
        note: "inclusive: period_end is the last day of the period (default). exclusive: it is the first day after it.",
        example: Text("inclusive"),
    },
    SettingSpec {
        name: "as_at",
        kind: Kind::Date,
        note: "Knowledge date: the run uses only what was booked by the end of this day (movements by booking_date, Rates by booked, Statements by posting_date). On or after the cut-off. Default: no limit.",
        example: Date(2024, 2, 3),
    },
    SettingSpec {
        name: "previous_as_at",
        kind: Kind::Date,
        note: "The as_at of the last close: the opening of the window is worked out with what was booked by then, unless a Booked row gives it. From the day before the window to as_at.",
        example: Date(2024, 1, 3),
    },
    SettingSpec {
        name: "settlement_lines",
        kind: Kind::Choice(Choice::SettlementLines),
        note: "When the journal settles a posting: payment-date (default: postings ending in the window, on their payment date), in-window (postings paid in the window) or period-end (on their end date).",
        example: Text("payment-date"),
    },
    SettingSpec {
        name: "statement_amounts",
        kind: Kind::Choice(Choice::StatementAmounts),
        note: "gross: posted_interest is before withholding tax (default). net: it is what was credited after tax; tax_withheld gives the tax.",
        example: Text("gross"),
    },
];

/// The Tax sheet: withholding tax tables by `tax_ref`, one row per table.
pub const TAX: SheetSpec = SheetSpec {
    kind: SheetKind::Tax,
    name: "Tax",
    required: false,
    columns: &[
        required(
            "tax_ref",
            Id,
            "Tax table name, as in the tax_ref of Accounts (required).",
            Text("SAVINGS-20"),
        ),
        required(
            "effective",
            Kind::Date,
            "Date from which the rate applies to postings paid on or after it (required).",
            Date(2024, 1, 1),
        ),
        required(
            "rate_percent",
            Percent,
            "Tax rate in percent, 0 to 100: 20 means 20% of the gross interest; 0 is an exemption (required).",
            Number(20, 0),
        ),
        optional(
            "round_mode",
            Kind::Choice(Choice::RoundMode),
            Means("half-up"),
            "How the tax of each posting is rounded to the minor unit.",
            Blank,
        ),
    ],
};

#[cfg(test)]
mod tests;
