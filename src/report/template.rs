//! The blank input book of `ledgerate template`: every sheet and column an
//! account book may have, a note on each header, drop-down lists for the
//! named choices, date and number formats, and one example row per sheet,
//! all as the book schema ([`crate::schema`]) describes them.
//!
//! The example is an invented credit union, Harbourview Mutual, with one
//! savings account. The template computes nothing: its example figures are
//! the schema's, and it never reads or changes another file.

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
use crate::schema::{Choice, Column, Example, Kind, SheetKind, SETTING_ROWS};

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
    for kind in SheetKind::ALL {
        let spec = kind.spec();
        let ws = wb.add_worksheet();
        ws.set_name(spec.name)
            .map_err(|e| ReportError::sheet(spec.name, e))?;
        write_sheet(ws, spec.name, spec.columns, &styles, &formats)?;
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
    if name == SheetKind::Settings.label() {
        for (row, setting) in (1..).zip(SETTING_ROWS) {
            cells.at(row).text(0, setting.name)?;
            put(&mut cells, 1, setting.example, Kind::Text, formats)?;
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
    if name == SheetKind::Settings.label() {
        for (row, setting) in (1..).zip(SETTING_ROWS) {
            ws.insert_note(row, 0, &note(setting.note)).map_err(fail)?;
            if let Kind::Choice(choice) = setting.kind {
                ws.add_data_validation(row, 1, row, 1, &list(choice, "value")?)
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
    fn every_list_fits_the_spreadsheet_limit() {
        for choice in Choice::ALL {
            assert!(list(choice, "x").is_ok(), "{choice:?}");
        }
    }
}
