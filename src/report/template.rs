//! The blank input book of `ledgerate template`: every sheet and column an
//! account book may have, a note on each header, drop-down lists for the
//! named choices, date and number formats, and one example row per sheet.
//!
//! The example is an invented credit union, Harbourview Mutual, with one
//! savings account. The template computes nothing: its example figures are
//! typed in here, and it never reads or changes another file.

use std::path::Path;

use chrono::NaiveDate;
use rust_decimal::Decimal;
use rust_xlsxwriter::{
    ColNum, DataValidation, DataValidationErrorStyle, DataValidationRule, DocProperties, Format,
    Note, RowNum, Workbook, Worksheet,
};

use super::cells::{Cells, TextFigures};
use super::error::ReportError;
use super::layout::{self, Styles};
use super::output;
use crate::conventions::calendar::BusinessDay;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::rounding::RoundMode;
use crate::conventions::schedule::{AnchorKind, Posting};
use crate::engine::terms::{RoundAt, Side, TierMethod};

/// A named choice with a drop-down list.
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
}

impl Choice {
    /// The canonical names offered, in their usual order.
    ///
    /// ```
    /// use ledgerate::report::template::Choice;
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
        }
    }
}

/// What a column holds, which decides its format and validation.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
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

/// An example value.
#[derive(Debug, Clone, Copy)]
enum Example {
    Blank,
    Text(&'static str),
    Date(i32, u32, u32),
    /// Mantissa and scale: (2500000, 2) is 25,000.00.
    Number(i64, u32),
}

struct Column {
    name: &'static str,
    kind: Kind,
    note: &'static str,
    example: Example,
}

const fn col(name: &'static str, kind: Kind, note: &'static str, example: Example) -> Column {
    Column {
        name,
        kind,
        note,
        example,
    }
}

use Example::{Blank, Date, Number, Text};
use Kind::{Amount, Bp, Id, Percent, Whole};

const ACCOUNTS: &[Column] = &[
    col("account", Id, "Account id (required). Unique across all the books of a run.", Text("HM-SAV-001")),
    col("currency", Id, "ISO 4217 currency code such as USD, EUR or JPY (required). Amounts are rounded to its minor unit.", Text("USD")),
    col("day_count", Kind::Choice(Choice::DayCount), "Day-count basis (required). Pick one from the list.", Text("ACT/365F")),
    col("open_date", Kind::Date, "First day the account earns (required). The opening figures are its state at the start of that day.", Date(2024, 1, 1)),
    col("opening_balance", Amount, "Balance at the start of open_date (required), positive in the account's normal direction: a deposit's credit, a loan's debit.", Number(2_500_000, 2)),
    col("name", Kind::Text, "Account name, shown in the output.", Text("Harbour Saver")),
    col("side", Kind::Choice(Choice::Side), "liability: a deposit, interest is an expense (default). asset: a loan, interest is income.", Text("liability")),
    col("compounding", Kind::Choice(Choice::Compounding), "When accrued interest starts to earn interest itself. Default simple.", Text("daily")),
    col("posting", Kind::Choice(Choice::Posting), "How often interest is posted. Default monthly; maturity needs a maturity date; none never posts.", Text("monthly")),
    col("posting_anchor", Kind::Date, "A date that fixes the posting schedule. Default: the last day of the month of period_start, else of open_date.", Date(2024, 1, 31)),
    col("anchor_kind", Kind::Choice(Choice::AnchorKind), "end: the anchor is the last earning day of a period (default). payment: the anchor is a payment date.", Text("end")),
    col("capitalise", Kind::Choice(Choice::YesNo), "yes: posted interest is added to the balance. no: it is paid out (default).", Text("yes")),
    col("round_at", Kind::Choice(Choice::RoundAt), "posting: only posted amounts are rounded (default). daily: each day's interest is rounded first.", Text("posting")),
    col("round_mode", Kind::Choice(Choice::RoundMode), "How amounts are rounded to the currency's minor unit. Default half-up.", Text("half-even")),
    col("round_places", Whole, "Decimals of the daily rounding when round_at is daily. Default: the currency's minor unit.", Blank),
    col("maturity", Kind::Date, "Maturity date. The night before it is the last that earns.", Blank),
    col("rate_ref", Id, "The Rates schedule the account earns. Default: the account id.", Text("HM-SAVER")),
    col("debit_rate_ref", Id, "Rates schedule for a balance of the opposite sign, such as an overdrawn deposit. Blank: it earns nothing.", Blank),
    col("tier_method", Kind::Choice(Choice::TierMethod), "whole: the whole balance earns the rate of the highest tier reached (default). banded: each slice earns its own tier's rate.", Text("whole")),
    col("calendar", Id, "Holiday calendar from the Holidays sheet. Needed by BUS/252, business-day rolls and index rates.", Text("HM-CAL")),
    col("business_day", Kind::Choice(Choice::BusinessDay), "How a payment date that is not a business day moves. Default unadjusted.", Text("unadjusted")),
    col("payment_delay_days", Whole, "Business days from the end of a period to its payment. Default 0.", Number(0, 0)),
    col("opening_accrued", Amount, "Interest accrued but not posted at the start of open_date. It is added to the first posting.", Number(0, 2)),
    col("period_start", Kind::Date, "Where the period open on open_date began (matters to 30/360 and ACT/ACT ICMA).", Blank),
    col("rate_method", Kind::Choice(Choice::RateMethod), "fixed (default), or for a rate on an index: simple-daily or compounded-in-arrears.", Text("fixed")),
    col("lookback_days", Whole, "Business days an index fixing is looked back.", Blank),
    col("observation_shift", Kind::Choice(Choice::YesNo), "yes: the observation period moves back with the lookback.", Blank),
    col("lockout_days", Whole, "Last business days of a period that reuse the fixing of the day before them.", Blank),
    col("spread_compounded", Kind::Choice(Choice::YesNo), "yes: the spread is compounded with the index. no: it is added afterwards (default).", Blank),
    col("floor_on", Kind::Text, "all-in: the floor and cap bound index plus spread. Blank: they bound the fixing alone.", Blank),
    col("gl_interest", Id, "GL account of the interest expense (liability side) or income (asset side).", Text("5100-INT-EXP")),
    col("gl_accrued", Id, "GL account of the accrued interest payable or receivable.", Text("2310-ACCR-INT")),
    col("gl_settlement", Id, "GL account where postings settle: the member's account, cash...", Text("2100-MBR-SAV")),
];

const RATES: &[Column] = &[
    col("rate_ref", Id, "Schedule name, as in the rate_ref of Accounts (required).", Text("HM-SAVER")),
    col("effective", Kind::Date, "Date from which this schedule's rows with this date apply, together as one complete table (required).", Date(2024, 1, 1)),
    col("rate_percent", Percent, "Annual nominal rate in percent: 4.25 means 4.25%. Fill rate_percent or rate_decimal, or name an index.", Number(325, 2)),
    col("rate_decimal", Kind::Decimal, "Annual nominal rate as a decimal: 0.0425 means 4.25%. Fill rate_percent or rate_decimal, or name an index.", Blank),
    col("tier_from", Amount, "Balance from which this row's rate applies. Default 0.", Number(0, 2)),
    col("index", Id, "Index name from the Fixings sheet, instead of a fixed rate.", Blank),
    col("spread_bp", Bp, "Basis points added to the index fixing.", Blank),
    col("floor_percent", Percent, "Lowest fixing used, in percent.", Blank),
    col("cap_percent", Percent, "Highest fixing used, in percent.", Blank),
];

const MOVEMENTS: &[Column] = &[
    col("account", Id, "Account id (required).", Text("HM-SAV-001")),
    col(
        "value_date",
        Kind::Date,
        "Date from which the amount is in the balance; it earns on that day (required).",
        Date(2024, 1, 15),
    ),
    col(
        "amount",
        Amount,
        "Amount (required). Positive raises the balance, negative lowers it.",
        Number(150_000, 2),
    ),
    col(
        "booking_date",
        Kind::Date,
        "Date the movement was booked, when later than its value date (back-valuation).",
        Date(2024, 1, 15),
    ),
    col(
        "reference",
        Kind::Text,
        "Your reference, kept for the audit trail.",
        Text("DEP-24-0115"),
    ),
];

const STATEMENTS: &[Column] = &[
    col("account", Id, "Account id (required).", Text("HM-SAV-001")),
    col("period_start", Kind::Date, "First day of the statement period (required).", Date(2024, 1, 1)),
    col("period_end", Kind::Date, "Last day of the statement period (required); the first day after it when statement_end is exclusive in Settings.", Date(2024, 1, 31)),
    col("posted_interest", Amount, "Interest actually posted for the period (required).", Number(7_137, 2)),
    col("reference", Kind::Text, "The statement's reference.", Text("STMT-2024-01")),
];

const FIXINGS: &[Column] = &[
    col(
        "index",
        Id,
        "Index name, as used in Rates.",
        Text("HM-OVERNIGHT"),
    ),
    col(
        "date",
        Kind::Date,
        "Business day the fixing applies to.",
        Date(2024, 1, 2),
    ),
    col(
        "rate_percent",
        Percent,
        "The fixing in percent: 5.31 means 5.31%.",
        Number(531, 2),
    ),
];

const HOLIDAYS: &[Column] = &[
    col(
        "calendar",
        Id,
        "Calendar name, as used in Accounts.",
        Text("HM-CAL"),
    ),
    col(
        "date",
        Kind::Date,
        "A day that is not a business day. Saturdays and Sundays never are.",
        Date(2024, 1, 1),
    ),
    col(
        "name",
        Kind::Text,
        "What the day is.",
        Text("New Year's Day"),
    ),
];

const SETTINGS: &[Column] = &[
    col(
        "setting",
        Kind::Text,
        "Setting name. Options given on the command line override these values.",
        Blank,
    ),
    col("value", Kind::Text, "The setting's value.", Blank),
];

/// The rows of the Settings sheet: name, example value, list, note.
const SETTING_ROWS: &[(&str, Example, Option<Choice>, &str)] = &[
    ("cutoff", Date(2024, 1, 31), None, "Cut-off date: the computation stops at the end of this day."),
    ("window_start", Date(2024, 1, 1), None, "First day of the reporting window. Default: the first day of the cut-off's month."),
    ("tolerance_amount", Number(1, 2), None, "Variance accepted, in units of each row's own currency. Default: one minor unit."),
    ("tolerance_bp", Number(50, 2), None, "Variance accepted, in basis points of rate."),
    ("entity", Text("Harbourview Mutual"), None, "Legal entity or ledger named on the journal."),
    ("journal_style", Text("incremental"), Some(Choice::JournalStyle), "incremental: the window's interest (default). reversing: the whole accrual, reversed the day after the cut-off."),
    ("statement_end", Text("inclusive"), Some(Choice::StatementEnd), "inclusive: period_end is the last day of the period (default). exclusive: it is the first day after it."),
];

/// The sheets of an account book, in order, with their columns.
const SHEETS: &[(&str, &[Column])] = &[
    ("Accounts", ACCOUNTS),
    ("Rates", RATES),
    ("Movements", MOVEMENTS),
    ("Statements", STATEMENTS),
    ("Fixings", FIXINGS),
    ("Holidays", HOLIDAYS),
    ("Settings", SETTINGS),
];

/// The sheet names and column names of an account book, as the template
/// writes them.
///
/// ```
/// let sheets = ledgerate::report::template::sheets();
/// assert_eq!(sheets[0].0, "Accounts");
/// assert_eq!(&sheets[0].1[..5], &["account", "currency", "day_count", "open_date", "opening_balance"]);
/// ```
pub fn sheets() -> Vec<(&'static str, Vec<&'static str>)> {
    SHEETS
        .iter()
        .map(|(name, cols)| (*name, cols.iter().map(|c| c.name).collect()))
        .collect()
}

/// Last row the validations and column formats cover.
const LAST_ROW: RowNum = layout::SHEET_ROW_LIMIT - 1;

/// Input formats of the template: show what is typed, hide no digit.
struct InputFormats {
    id: Format,
    date: Format,
    amount: Format,
    percent: Format,
    decimal: Format,
    bp: Format,
    whole: Format,
    plain: Format,
}

impl InputFormats {
    fn new() -> InputFormats {
        InputFormats {
            id: Format::new().set_num_format("@"),
            date: Format::new().set_num_format("yyyy-mm-dd"),
            amount: Format::new().set_num_format("#,##0.00##;-#,##0.00##"),
            percent: Format::new().set_num_format("0.00####"),
            decimal: Format::new().set_num_format("0.000000##"),
            bp: Format::new().set_num_format("0.00##"),
            whole: Format::new().set_num_format("0"),
            plain: Format::new(),
        }
    }

    fn of(&self, kind: Kind) -> &Format {
        match kind {
            Kind::Id => &self.id,
            Kind::Date => &self.date,
            Kind::Amount => &self.amount,
            Kind::Percent => &self.percent,
            Kind::Decimal => &self.decimal,
            Kind::Bp => &self.bp,
            Kind::Whole => &self.whole,
            Kind::Text | Kind::Choice(_) => &self.plain,
        }
    }
}

/// Writes the blank input book to `target` (temporary file, then rename).
/// The same program version always writes the same bytes.
///
/// # Errors
/// [`ReportError::MissingDirectory`] when the target's folder does not exist,
/// and the writer's or the file system's errors.
///
/// # Examples
/// ```no_run
/// ledgerate::report::write_template(std::path::Path::new("book.xlsx"))?;
/// # Ok::<(), ledgerate::report::ReportError>(())
/// ```
pub fn write_template(target: &Path) -> Result<(), ReportError> {
    output::guarded(target, || write_template_unguarded(target))
}

fn write_template_unguarded(target: &Path) -> Result<(), ReportError> {
    let dir = output::target_dir(target)?;
    let mut wb = Workbook::new();
    wb.set_zip_compression_level(layout::ZIP_LEVEL);
    // A fixed creation time: the template depends on nothing but the program.
    let created = NaiveDate::from_ymd_opt(2024, 1, 1)
        .and_then(|d| d.and_hms_opt(0, 0, 0))
        .ok_or_else(|| ReportError::Internal("template creation time".into()))?;
    wb.set_properties(
        &DocProperties::new()
            .set_title("Account book")
            .set_subject("Input book for interest accrual and reconciliation")
            .set_creation_datetime(&created),
    );
    let styles = Styles::new();
    let formats = InputFormats::new();
    for (name, columns) in SHEETS {
        let ws = wb.add_worksheet();
        ws.set_name(*name)
            .map_err(|e| ReportError::sheet(name, e))?;
        write_sheet(ws, name, columns, &styles, &formats)?;
    }
    output::save_atomically(&mut wb, target, &dir)
}

fn write_sheet(
    ws: &mut Worksheet,
    name: &str,
    columns: &[Column],
    styles: &Styles,
    formats: &InputFormats,
) -> Result<(), ReportError> {
    let fail = |e| ReportError::sheet(name, e);
    ws.set_freeze_panes(1, 0).map_err(fail)?;
    // Many columns: printed across pages rather than shrunk to one.
    layout::print_setup(ws, true, false).map_err(fail)?;
    let mut scratch = TextFigures::default();
    for (c, column) in (0..).zip(columns) {
        ws.set_column_format(c, formats.of(column.kind))
            .map_err(fail)?;
        if let Kind::Choice(choice) = column.kind {
            ws.add_data_validation(1, c, LAST_ROW, c, &list(choice, column.name)?)
                .map_err(fail)?;
        }
        if column.kind == Kind::Whole {
            let rule = DataValidation::new()
                .allow_whole_number(DataValidationRule::GreaterThanOrEqualTo(0))
                .set_error_style(DataValidationErrorStyle::Warning)
                .set_error_message(format!("{} is a whole number, 0 or more.", column.name))
                .map_err(fail)?;
            ws.add_data_validation(1, c, LAST_ROW, c, &rule)
                .map_err(fail)?;
        }
        ws.insert_note(0, c, &note(column.note)).map_err(fail)?;
    }
    let mut cells = Cells::new(ws, name, styles, &mut scratch);
    let labels: Vec<&str> = columns.iter().map(|c| c.name).collect();
    cells.at(0).header(&labels, &[])?;
    let mut widths: Vec<usize> = Vec::new();
    if name == "Settings" {
        for (row, (setting, example, _, _)) in (1..).zip(SETTING_ROWS) {
            cells.at(row).text(0, setting)?;
            put(&mut cells, 1, *example, Kind::Text, formats)?;
        }
        widths.extend([cells.width(0), cells.width(1).max(20)]);
    } else {
        cells.at(1);
        for (c, column) in (0..).zip(columns) {
            put(&mut cells, c, column.example, column.kind, formats)?;
        }
        widths.extend((0..).zip(columns).map(|(c, _)| cells.width(c)));
    }
    for ((c, column), content) in (0..).zip(columns).zip(widths) {
        let width = column
            .name
            .chars()
            .count()
            .max(content)
            .saturating_add(3)
            .clamp(10, 40);
        ws.set_column_width(c, u16::try_from(width).unwrap_or(40))
            .map_err(fail)?;
    }
    if name == "Settings" {
        for (row, (_, _, choice, text)) in (1..).zip(SETTING_ROWS) {
            ws.insert_note(row, 0, &note(text)).map_err(fail)?;
            if let Some(choice) = choice {
                ws.add_data_validation(row, 1, row, 1, &list(*choice, "value")?)
                    .map_err(fail)?;
            }
        }
    }
    Ok(())
}

/// Writes one example value in the column's format.
fn put(
    cells: &mut Cells<'_>,
    c: ColNum,
    example: Example,
    kind: Kind,
    formats: &InputFormats,
) -> Result<(), ReportError> {
    match example {
        Example::Blank => Ok(()),
        Example::Text(t) => cells.text_as(c, t, formats.of(kind)),
        Example::Date(y, m, d) => {
            let date = NaiveDate::from_ymd_opt(y, m, d)
                .ok_or_else(|| ReportError::Internal(format!("example date {y}-{m}-{d}")))?;
            cells.date(c, date)
        }
        Example::Number(mantissa, scale) => {
            let d = Decimal::try_new(mantissa, scale)
                .map_err(|e| ReportError::Internal(format!("example number: {e}")))?;
            let format = match kind {
                Kind::Text => &formats.amount, // a Settings value: shown as typed
                other => formats.of(other),
            };
            cells.decimal_as(c, d, format)
        }
    }
}

/// The drop-down list of a choice. Another spelling is only warned about: the
/// books accept every spelling the program knows, case and dashes ignored.
fn list(choice: Choice, column: &str) -> Result<DataValidation, ReportError> {
    let names = choice.names();
    let fail = |e| ReportError::sheet(column, e);
    DataValidation::new()
        .allow_list_strings(&names)
        .map_err(fail)?
        .set_error_style(DataValidationErrorStyle::Warning)
        .set_error_title(format!("Not a listed {column}"))
        .map_err(fail)?
        .set_error_message(format!(
            "Usual names: {}. Other spellings are accepted only when the program knows them.",
            names.join(", ")
        ))
        .map_err(fail)
}

/// A header note sized to its text.
fn note(text: &str) -> Note {
    let lines = u32::try_from(text.chars().count() / 38)
        .unwrap_or(10)
        .saturating_add(1);
    Note::new(text)
        .set_author("ledgerate")
        .add_author_prefix(false)
        .set_width(260)
        .set_height(lines.saturating_mul(15).saturating_add(12))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_lists_offer_the_canonical_names() {
        assert_eq!(
            Choice::DayCount.names(),
            vec![
                "ACT/360",
                "ACT/365F",
                "ACT/365L",
                "ACT/ACT ISDA",
                "ACT/ACT ICMA",
                "NL/365",
                "30/360",
                "30/360 US",
                "30E/360",
                "30E/360 ISDA",
                "BUS/252"
            ]
        );
        assert_eq!(
            Choice::Compounding.names(),
            vec![
                "simple",
                "daily",
                "monthly",
                "quarterly",
                "semiannual",
                "annual",
                "continuous",
                "annual-effective"
            ]
        );
        assert_eq!(
            Choice::Posting.names(),
            vec![
                "monthly",
                "quarterly",
                "semiannual",
                "annual",
                "maturity",
                "none"
            ]
        );
        assert_eq!(
            Choice::BusinessDay.names(),
            vec![
                "unadjusted",
                "following",
                "modified-following",
                "preceding",
                "modified-preceding"
            ]
        );
        assert_eq!(
            Choice::RoundMode.names(),
            vec!["half-up", "half-even", "down", "up"]
        );
        assert_eq!(Choice::Side.names(), vec!["liability", "asset"]);
    }

    #[test]
    fn every_list_fits_the_spreadsheet_limit() {
        let all = [
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
        ];
        for choice in all {
            assert!(list(choice, "x").is_ok(), "{choice:?}");
        }
    }

    #[test]
    fn example_choices_are_among_the_listed_names() {
        for (_, columns) in SHEETS {
            for c in *columns {
                if let (Kind::Choice(choice), Example::Text(t)) = (c.kind, c.example) {
                    assert!(choice.names().contains(&t), "{}: {t}", c.name);
                }
            }
        }
        for (name, example, choice, _) in SETTING_ROWS {
            if let (Some(choice), Example::Text(t)) = (choice, example) {
                assert!(choice.names().contains(t), "{name}: {t}");
            }
        }
    }

    #[test]
    fn the_settings_sheet_lists_every_setting() {
        let names: Vec<&str> = SETTING_ROWS.iter().map(|r| r.0).collect();
        assert_eq!(
            names,
            vec![
                "cutoff",
                "window_start",
                "tolerance_amount",
                "tolerance_bp",
                "entity",
                "journal_style",
                "statement_end"
            ]
        );
    }
}
