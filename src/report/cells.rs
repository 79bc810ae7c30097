//! The one border where a decimal becomes a spreadsheet number.
//!
//! This is the only module of the crate that names `f64`: a spreadsheet
//! number is a binary float, so every figure, date and count that the output
//! shows as a number is converted here and nowhere else. The rules:
//!
//! * A posted or reported figure (balances, accrued, posted, expected,
//!   variances, totals, journal amounts) is written as a number only when the
//!   number reads back as the very same decimal: at most 15 significant digits.
//!   Otherwise it is written as text holding every digit, right-aligned, and
//!   recorded as a [`TextFigure`] so that the workbook can say so once.
//! * Rates, day fractions, basis points, balance-years and other unrounded
//!   intermediates are not posted figures: they are rounded to 15 significant
//!   digits for display. An unrounded amount (a day's interest before
//!   rounding) is rounded the same way as long as that keeps the currency's
//!   minor units; when it would not, it is written as text like a posted figure.
//!
//! This module never computes a figure and never decides a layout: it puts
//! the value it is given into the cell it is told, in the format it is given.

use chrono::{NaiveDate, NaiveDateTime};
use rust_decimal::Decimal;
use rust_xlsxwriter::{ColNum, Format, RowNum, Worksheet};

use super::error::ReportError;
use super::layout::Styles;

/// Significant digits that a spreadsheet number (an IEEE double) always
/// holds exactly: any decimal with at most this many digits converts to the
/// nearest double and back to itself.
pub const EXACT_DIGITS: u32 = 15;

/// Text figures listed one by one in a [`TextFigures`]; beyond this only the
/// count grows, so a huge sheet of them cannot exhaust memory.
pub const LISTED_TEXT_FIGURES: usize = 1_000;

/// A figure written as text because a spreadsheet number cannot hold it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TextFigure {
    /// The sheet it is on.
    pub sheet: String,
    /// Its cell in A1 notation.
    pub cell: String,
    /// The text written.
    pub text: String,
}

/// The most characters a spreadsheet cell holds; a longer text is cut.
pub const MAX_CELL_CHARS: usize = 32_767;

/// The figures written as text so far, and the texts cut to fit a cell.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct TextFigures {
    /// The first [`LISTED_TEXT_FIGURES`] of them, in writing order.
    pub listed: Vec<TextFigure>,
    /// How many there are in all.
    pub count: usize,
    /// Texts longer than [`MAX_CELL_CHARS`], cut to fit: the first
    /// [`LISTED_TEXT_FIGURES`], each with the start of its text.
    pub cut: Vec<TextFigure>,
    /// How many texts were cut in all.
    pub cut_count: usize,
}

impl TextFigures {
    fn record(&mut self, sheet: &str, row: RowNum, col: ColNum, text: &str) {
        self.count = self.count.saturating_add(1);
        if self.listed.len() < LISTED_TEXT_FIGURES {
            self.listed.push(TextFigure {
                sheet: sheet.to_string(),
                cell: rust_xlsxwriter::utility::row_col_to_cell(row, col),
                text: text.to_string(),
            });
        }
    }

    /// Adds `later`'s figures after these, as if they had been written
    /// after them: what sheets filled side by side give back in sheet order.
    pub fn absorb(&mut self, later: TextFigures) {
        let room = LISTED_TEXT_FIGURES.saturating_sub(self.listed.len());
        self.listed.extend(later.listed.into_iter().take(room));
        self.count = self.count.saturating_add(later.count);
        let room = LISTED_TEXT_FIGURES.saturating_sub(self.cut.len());
        self.cut.extend(later.cut.into_iter().take(room));
        self.cut_count = self.cut_count.saturating_add(later.cut_count);
    }

    fn record_cut(&mut self, sheet: &str, row: RowNum, col: ColNum, text: &str) {
        self.cut_count = self.cut_count.saturating_add(1);
        if self.cut.len() < LISTED_TEXT_FIGURES {
            self.cut.push(TextFigure {
                sheet: sheet.to_string(),
                cell: rust_xlsxwriter::utility::row_col_to_cell(row, col),
                text: text.chars().take(60).collect(),
            });
        }
    }
}

/// `text` as a cell can hold it: unchanged, or cut to [`MAX_CELL_CHARS`]
/// with an ellipsis as its last character so that the cut shows.
fn fitted(text: &str) -> Option<String> {
    // A text of at most the limit in bytes has at most as many characters
    // (the usual case, decided without walking it); else counting stops
    // one past the limit: a huge text is not walked twice.
    if text.len() <= MAX_CELL_CHARS {
        return None;
    }
    text.chars().nth(MAX_CELL_CHARS)?;
    let mut cut: String = text.chars().take(MAX_CELL_CHARS - 1).collect();
    cut.push('…');
    Some(cut)
}

/// How one decimal goes into a cell.
#[derive(Debug, Clone, PartialEq)]
enum Figure {
    /// A number that is the decimal, or its display rounding.
    Number(f64),
    /// Every digit, as text.
    Text(String),
}

/// The significant digits of a decimal: its digits without leading or
/// trailing zeros (0 for zero).
///
/// ```
/// use ledgerate::report::cells::significant_digits;
/// use rust_decimal::Decimal;
/// assert_eq!(significant_digits(Decimal::new(1_234_500, 2)), 5); // 12345.00
/// assert_eq!(significant_digits(Decimal::new(100_000_000_000_000_055, 2)), 18);
/// assert_eq!(significant_digits(Decimal::ZERO), 0);
/// ```
pub fn significant_digits(d: Decimal) -> u32 {
    let (m, _) = stripped(d);
    digits(m)
}

/// The decimal as `m x 10^e` with `m` free of trailing zeros.
fn stripped(d: Decimal) -> (u128, i32) {
    let mut m = d.mantissa().unsigned_abs();
    let scale = i32::try_from(d.scale()).unwrap_or(i32::MAX);
    let mut e = 0i32.saturating_sub(scale);
    if m == 0 {
        return (0, 0);
    }
    while m.is_multiple_of(10) {
        m /= 10;
        e = e.saturating_add(1);
    }
    (m, e)
}

/// Decimal digits of an integer (0 for zero).
fn digits(mut m: u128) -> u32 {
    let mut n = 0;
    while m > 0 {
        m /= 10;
        n += 1;
    }
    n
}

/// Powers of ten that doubles hold exactly (10^22 is the last).
const POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// The double nearest to a decimal of at most [`EXACT_DIGITS`] significant
/// digits, or `None` for a longer one. Such a double reads back (by its
/// shortest round-trip text, as the file stores it) as the same decimal.
fn exact_number(d: Decimal) -> Option<f64> {
    let (m, e) = stripped(d);
    if m == 0 {
        return Some(0.0); // never -0: it would show as "-0.00"
    }
    if digits(m) > EXACT_DIGITS {
        return None;
    }
    // m < 10^15 < 2^53 is exact as a double, and so is 10^k for k <= 22: one
    // correctly rounded multiplication or division then gives the nearest double.
    let mf = u64::try_from(m).ok()? as f64;
    let k = usize::try_from(e.unsigned_abs()).ok()?;
    let magnitude = match POW10.get(k) {
        Some(p) if e >= 0 => mf * p,
        Some(p) => mf / p,
        // Beyond 10^22 the standard library's correctly rounded parser does it.
        None => format!("{m}e{e}").parse::<f64>().ok()?,
    };
    Some(if d.is_sign_negative() {
        -magnitude
    } else {
        magnitude
    })
}

/// The display value of an intermediate: rounded to 15 significant digits
/// (it is not a posted figure), then converted exactly.
fn display_number(d: Decimal) -> f64 {
    d.round_sf(EXACT_DIGITS)
        .and_then(exact_number)
        // round_sf refuses only at the very top of the decimal range; the
        // parser then gives the nearest double of the full value.
        .or_else(|| d.to_string().parse::<f64>().ok())
        .unwrap_or(0.0)
}

/// A posted figure: a number when exact, else text.
fn posted(d: Decimal, minor_units: u32) -> Figure {
    match exact_number(d) {
        Some(n) => Figure::Number(n),
        None => Figure::Text(grouped(d, minor_units)),
    }
}

/// An unrounded amount: exact if it can be; else rounded to 15 significant
/// digits when that keeps the minor units; else text.
fn unrounded(d: Decimal, minor_units: u32) -> Figure {
    if let Some(n) = exact_number(d) {
        return Figure::Number(n);
    }
    let (m, e) = stripped(d);
    let whole_digits = i64::from(digits(m)).saturating_add(i64::from(e)).max(1);
    if whole_digits.saturating_add(i64::from(minor_units)) <= i64::from(EXACT_DIGITS) {
        Figure::Number(display_number(d))
    } else {
        Figure::Text(grouped(d, minor_units))
    }
}

/// A decimal as text with thousands separators and at least `min_decimals`
/// decimals, every digit kept.
///
/// ```
/// use ledgerate::report::cells::grouped;
/// use rust_decimal::Decimal;
/// assert_eq!(grouped(Decimal::new(100_000_000_000_000_055, 2), 2), "1,000,000,000,000,000.55");
/// assert_eq!(grouped(Decimal::new(-12345, 0), 2), "-12,345.00");
/// assert_eq!(grouped(Decimal::new(5, 1), 0), "0.5");
/// ```
pub fn grouped(d: Decimal, min_decimals: u32) -> String {
    let mut d = d;
    if d.scale() < min_decimals {
        d.rescale(min_decimals.min(28)); // adds zeros only
    }
    let text = d.abs().to_string();
    let (whole, fraction) = match text.split_once('.') {
        Some((w, f)) => (w, Some(f)),
        None => (text.as_str(), None),
    };
    let mut out = String::with_capacity(text.len() + text.len() / 3 + 2);
    if d.is_sign_negative() && !d.is_zero() {
        out.push('-');
    }
    let n = whole.chars().count();
    for (i, c) in whole.chars().enumerate() {
        if i > 0 && (n - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    if let Some(f) = fraction {
        out.push('.');
        out.push_str(f);
    }
    out
}

/// Characters a number shows with `decimals` places and thousands separators.
fn shown_len(d: Decimal, decimals: u32) -> usize {
    let (m, e) = stripped(d);
    let whole = i64::from(digits(m)).saturating_add(i64::from(e)).max(1);
    let whole = usize::try_from(whole).unwrap_or(usize::MAX);
    let commas = whole.saturating_sub(1) / 3;
    let fraction = if decimals == 0 {
        0
    } else {
        decimals as usize + 1
    };
    whole + commas + fraction + usize::from(d.is_sign_negative())
}

/// First day a spreadsheet date holds faithfully (the 1900 date system counts
/// a 29 February 1900 that never was, so earlier serials are ambiguous in some
/// readers), and the last day it can show.
fn sheet_date_range() -> (NaiveDate, NaiveDate) {
    (
        NaiveDate::from_ymd_opt(1900, 3, 1).unwrap_or(NaiveDate::MIN),
        NaiveDate::from_ymd_opt(9999, 12, 31).unwrap_or(NaiveDate::MAX),
    )
}

/// Maps a writer error to the sheet and 0-based row it happened on.
fn at(sheet: &str, row: RowNum) -> impl FnOnce(rust_xlsxwriter::XlsxError) -> ReportError + '_ {
    move |e| ReportError::cell(sheet, row, e)
}

/// One row of one sheet being written: puts values into cells, keeps the
/// widest content of each column, and records figures written as text.
pub struct Cells<'a> {
    ws: &'a mut Worksheet,
    sheet: &'a str,
    styles: &'a Styles,
    texts: &'a mut TextFigures,
    widths: Vec<usize>,
    /// The format given to each column as a whole, if any: a cell in that
    /// format is written without one and takes the column's (the same style
    /// in the file, without looking the format up again for every cell).
    column_formats: Vec<Option<&'a Format>>,
    /// The width, in characters, at which the text of a column wraps.
    wrap_widths: Vec<Option<usize>>,
    /// Lines the tallest wrapped text of the current row takes.
    lines: u32,
    row: RowNum,
    /// When set, nothing is written: each format a write would give a cell
    /// of its own is noted instead, in order of first use (see [`FormatOrder`]).
    recording: Option<&'a mut FormatOrder>,
}

/// The formats a stretch of writing gives cells of their own (not through
/// their column's format), each once, in order of first use: what the
/// spreadsheet library numbers the workbook's cell styles by. Noting them
/// before writing lets sheets be filled side by side and still number
/// their styles as one sheet after another would.
#[derive(Debug, Default, Clone)]
pub struct FormatOrder {
    /// Each format's address (formats are told apart as [`Cells`] tells a
    /// column's own format: the same [`Styles`] entry) and the format.
    seen: Vec<(usize, Format)>,
}

impl FormatOrder {
    fn note(&mut self, format: &Format) {
        let at = std::ptr::from_ref(format).addr();
        if !self.seen.iter().any(|(a, _)| *a == at) {
            self.seen.push((at, format.clone()));
        }
    }

    /// The formats noted, in order of first use.
    pub fn formats(&self) -> impl Iterator<Item = &Format> {
        self.seen.iter().map(|(_, f)| f)
    }
}

/// Lines a text takes when wrapped at `width` characters, word by word (a
/// word longer than the width is broken). Counting every character as wide
/// as a digit errs towards a row a little too tall, never one too short.
///
/// ```
/// use ledgerate::report::cells::wrapped_lines;
/// assert_eq!(wrapped_lines("period start a day late", 12), 2);
/// assert_eq!(wrapped_lines("short", 12), 1);
/// assert_eq!(wrapped_lines("", 12), 1);
/// ```
pub fn wrapped_lines(text: &str, width: usize) -> u32 {
    let width = width.max(1);
    let mut lines: u32 = 0;
    for paragraph in text.split('\n') {
        lines = lines.saturating_add(1);
        let mut used = 0usize;
        for word in paragraph.split(' ') {
            let w = word.chars().count();
            if used == 0 {
                used = w;
            } else if used + 1 + w <= width {
                used += 1 + w;
            } else {
                lines = lines.saturating_add(1);
                used = w;
            }
            while used > width {
                lines = lines.saturating_add(1);
                used -= width;
            }
        }
    }
    lines.max(1)
}

impl<'a> Cells<'a> {
    /// Starts writing `sheet` (the worksheet's name) at row 0.
    pub fn new(
        ws: &'a mut Worksheet,
        sheet: &'a str,
        styles: &'a Styles,
        texts: &'a mut TextFigures,
    ) -> Cells<'a> {
        Cells {
            ws,
            sheet,
            styles,
            texts,
            widths: Vec::new(),
            column_formats: Vec::new(),
            wrap_widths: Vec::new(),
            lines: 1,
            row: 0,
            recording: None,
        }
    }

    /// Writes nothing from here on: notes in `order` each format a write
    /// would give a cell of its own (column formats included), in order.
    /// What is measured (widths, wrapped lines) is measured as when writing;
    /// text figures go to the [`TextFigures`] given as ever.
    #[must_use]
    pub fn recording(mut self, order: &'a mut FormatOrder) -> Self {
        self.recording = Some(order);
        self
    }

    /// Whether this writes nothing (see [`Cells::recording`]).
    pub fn is_recording(&self) -> bool {
        self.recording.is_some()
    }

    /// In a recording, notes `format` when the cell is written in it (not
    /// through column `col`'s format) and says so: the caller writes nothing.
    fn recorded(&mut self, col: Option<ColNum>, format: &Format) -> bool {
        // Writing (the usual case) decides nothing here.
        if self.recording.is_none() {
            return false;
        }
        let carried = col.is_some_and(|c| self.carried(c, format));
        if let Some(order) = self.recording.as_deref_mut().filter(|_| !carried) {
            order.note(format);
        }
        true
    }

    /// Text written to column `col` in the wrapping format wraps at `width`
    /// characters: [`Cells::lines`] counts its lines.
    pub fn wrap_at(&mut self, col: ColNum, width: usize) {
        let i = usize::from(col);
        if self.wrap_widths.len() <= i {
            self.wrap_widths.resize(i + 1, None);
        }
        if let Some(slot) = self.wrap_widths.get_mut(i) {
            *slot = Some(width);
        }
    }

    /// Lines the tallest wrapped text of the current row takes (1 when none wraps).
    pub fn lines(&self) -> u32 {
        self.lines
    }

    /// Gives column `col` the format `format` as a whole: the cells written
    /// in that very format (the same [`Styles`] entry) then carry it through
    /// their column. Cells in any other format keep their own, and so does
    /// every header cell. Set it before the column's first cell.
    pub fn column_format(&mut self, col: ColNum, format: &'a Format) -> Result<(), ReportError> {
        if !self.recorded(None, format) {
            self.ws
                .set_column_format(col, format)
                .map_err(at(self.sheet, self.row))?;
        }
        self.carry(col, format);
        Ok(())
    }

    /// Column `col` already carries `format` (given by [`Cells::column_format`]
    /// when the sheet was started): cells in that very format are written
    /// without one again.
    pub fn carry(&mut self, col: ColNum, format: &'a Format) {
        let i = usize::from(col);
        if self.column_formats.len() <= i {
            self.column_formats.resize(i + 1, None);
        }
        if let Some(slot) = self.column_formats.get_mut(i) {
            *slot = Some(format);
        }
    }

    /// Goes on from the widest cells `widths` of an earlier stretch of the
    /// same sheet (see [`Cells::into_widths`]).
    pub fn with_widths(mut self, widths: Vec<usize>) -> Self {
        self.widths = widths;
        self
    }

    /// The widest cell of each column so far, in characters: what
    /// [`Cells::width`] reads, kept for a later stretch of the same sheet.
    pub fn into_widths(self) -> Vec<usize> {
        self.widths
    }

    /// Whether `format` is the one column `col` already carries.
    fn carried(&self, col: ColNum, format: &Format) -> bool {
        self.column_formats
            .get(usize::from(col))
            .copied()
            .flatten()
            .is_some_and(|f| std::ptr::eq(f, format))
    }

    /// Moves to a 0-based row.
    pub fn at(&mut self, row: RowNum) -> &mut Self {
        self.row = row;
        self.lines = 1;
        self
    }

    /// The current 0-based row.
    pub fn row(&self) -> RowNum {
        self.row
    }

    /// The name of the sheet written.
    pub fn sheet_name(&self) -> &'a str {
        self.sheet
    }

    /// The worksheet, for whole-sheet settings.
    pub fn sheet(&mut self) -> &mut Worksheet {
        self.ws
    }

    /// The formats.
    pub fn styles(&self) -> &'a Styles {
        self.styles
    }

    /// The widest content seen in column `col`, in characters.
    pub fn width(&self, col: ColNum) -> usize {
        self.widths.get(usize::from(col)).copied().unwrap_or(0)
    }

    fn seen(&mut self, col: ColNum, len: usize) {
        let i = usize::from(col);
        if self.widths.len() <= i {
            self.widths.resize(i + 1, 0);
        }
        if let Some(w) = self.widths.get_mut(i) {
            *w = (*w).max(len);
        }
    }

    /// Text in the given format (nothing is written for an empty string).
    pub fn text_as(&mut self, col: ColNum, text: &str, format: &Format) -> Result<(), ReportError> {
        if text.is_empty() {
            return Ok(());
        }
        let row = self.row;
        let cut = fitted(text);
        if cut.is_some() {
            self.texts.record_cut(self.sheet, row, col, text);
        }
        let text = cut.as_deref().unwrap_or(text);
        self.seen(col, text.chars().count());
        if let Some(width) = self.wrap_widths.get(usize::from(col)).copied().flatten() {
            if std::ptr::eq(format, &self.styles.wrap) {
                self.lines = self.lines.max(wrapped_lines(text, width));
            }
        }
        if self.recorded(Some(col), format) {
            return Ok(());
        }
        if self.carried(col, format) {
            self.ws.write_string(row, col, text)
        } else {
            self.ws.write_string_with_format(row, col, text, format)
        }
        .map_err(at(self.sheet, row))?;
        Ok(())
    }

    /// Header labels from column 0 of the current row; the columns listed in
    /// `figures` are right-aligned over their figures. Their widths are left
    /// to [`super::layout::column_width`], which adds room for the filter button.
    pub fn header(&mut self, labels: &[&str], figures: &[ColNum]) -> Result<(), ReportError> {
        let styles = self.styles;
        let row = self.row;
        for (col, label) in (0..).zip(labels) {
            let format = if figures.contains(&col) {
                &styles.header_right
            } else {
                &styles.header
            };
            if self.recorded(None, format) {
                continue;
            }
            self.ws
                .write_string_with_format(row, col, *label, format)
                .map_err(at(self.sheet, row))?;
        }
        Ok(())
    }

    /// Header labels of an output list from column 0 of the current row, in
    /// a format that wraps a label longer than its column.
    pub fn list_header(&mut self, labels: &[&str]) -> Result<(), ReportError> {
        let styles = self.styles;
        let row = self.row;
        for (col, label) in (0..).zip(labels) {
            if self.recorded(None, &styles.list_header) {
                continue;
            }
            self.ws
                .write_string_with_format(row, col, *label, &styles.list_header)
                .map_err(at(self.sheet, row))?;
        }
        Ok(())
    }

    /// Text that may run on over the empty cells to its right: it does not
    /// widen its column.
    pub fn text_spilling(
        &mut self,
        col: ColNum,
        text: &str,
        format: &Format,
    ) -> Result<(), ReportError> {
        if text.is_empty() {
            return Ok(());
        }
        let row = self.row;
        let cut = fitted(text);
        if cut.is_some() {
            self.texts.record_cut(self.sheet, row, col, text);
        }
        let text = cut.as_deref().unwrap_or(text);
        if self.recorded(None, format) {
            return Ok(());
        }
        self.ws
            .write_string_with_format(row, col, text, format)
            .map_err(at(self.sheet, row))?;
        Ok(())
    }

    /// Plain text.
    pub fn text(&mut self, col: ColNum, text: &str) -> Result<(), ReportError> {
        let styles = self.styles;
        self.text_as(col, text, &styles.text)
    }

    /// A figure as text, right-aligned, recorded as a text figure.
    fn text_figure(&mut self, col: ColNum, text: &str) -> Result<(), ReportError> {
        let styles = self.styles;
        self.text_as(col, text, &styles.text_figure)?;
        self.texts.record(self.sheet, self.row, col, text);
        Ok(())
    }

    fn number(
        &mut self,
        col: ColNum,
        n: f64,
        format: &Format,
        len: usize,
    ) -> Result<(), ReportError> {
        self.seen(col, len);
        let row = self.row;
        if self.recorded(Some(col), format) {
            return Ok(());
        }
        if self.carried(col, format) {
            self.ws.write_number(row, col, n)
        } else {
            self.ws.write_number_with_format(row, col, n, format)
        }
        .map_err(at(self.sheet, row))?;
        Ok(())
    }

    fn figure(
        &mut self,
        col: ColNum,
        f: Figure,
        format: &Format,
        len: usize,
    ) -> Result<(), ReportError> {
        match f {
            Figure::Number(n) => self.number(col, n, format, len),
            Figure::Text(t) => self.text_figure(col, &t),
        }
    }

    /// A posted or reported amount of a currency with `minor_units` decimals:
    /// a number when exact, else text.
    pub fn amount(&mut self, col: ColNum, d: Decimal, minor_units: u32) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d, minor_units);
        self.figure(col, posted(d, minor_units), styles.amount(minor_units), len)
    }

    /// A journal amount: like [`Cells::amount`], but zero shows blank.
    pub fn ledger_amount(
        &mut self,
        col: ColNum,
        d: Decimal,
        minor_units: u32,
    ) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d, minor_units);
        self.figure(col, posted(d, minor_units), styles.ledger(minor_units), len)
    }

    /// An unrounded amount (a day's interest, a base with compounded interest).
    pub fn unrounded_amount(
        &mut self,
        col: ColNum,
        d: Decimal,
        minor_units: u32,
    ) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d, minor_units);
        self.figure(
            col,
            unrounded(d, minor_units),
            styles.amount(minor_units),
            len,
        )
    }

    /// An unrounded amount shown with `decimals` places (the Daily sheet's
    /// interest and accrued); the cell holds the same number as
    /// [`Cells::unrounded_amount`] would.
    pub fn unrounded_amount_shown(
        &mut self,
        col: ColNum,
        d: Decimal,
        minor_units: u32,
        decimals: u32,
    ) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d, decimals);
        self.figure(col, unrounded(d, minor_units), styles.amount(decimals), len)
    }

    /// A rate given as a decimal (0.0512), shown as a percentage.
    pub fn rate(&mut self, col: ColNum, d: Decimal) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d.saturating_mul(Decimal::ONE_HUNDRED), 4).saturating_add(1);
        self.number(col, display_number(d), &styles.percent, len)
    }

    /// A day's fraction of a year.
    pub fn day_fraction(&mut self, col: ColNum, d: Decimal) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d, 12);
        self.number(col, display_number(d), &styles.day_fraction, len)
    }

    /// Basis points.
    pub fn bp(&mut self, col: ColNum, d: Decimal) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d, 2);
        self.number(col, display_number(d), &styles.bp, len)
    }

    /// Balance-years of a currency.
    pub fn balance_years(
        &mut self,
        col: ColNum,
        d: Decimal,
        minor_units: u32,
    ) -> Result<(), ReportError> {
        let styles = self.styles;
        let len = shown_len(d, minor_units.saturating_add(2));
        self.number(
            col,
            display_number(d),
            styles.balance_years(minor_units),
            len,
        )
    }

    /// A decimal example value (the template): exact, shown with `format`.
    pub fn decimal_as(
        &mut self,
        col: ColNum,
        d: Decimal,
        format: &Format,
    ) -> Result<(), ReportError> {
        let len = shown_len(d, d.scale());
        self.figure(col, posted(d, d.scale()), format, len)
    }

    /// A whole number (days, counts, sizes): a number up to 15 digits, else text.
    pub fn count(&mut self, col: ColNum, n: i128) -> Result<(), ReportError> {
        let styles = self.styles;
        let d = Decimal::try_from_i128_with_scale(n, 0).ok();
        match d {
            Some(d) => {
                let len = shown_len(d, 0);
                self.figure(col, posted(d, 0), &styles.count, len)
            }
            None => self.text_figure(col, &n.to_string()),
        }
    }

    /// A real date (`yyyy-mm-dd`). A date a spreadsheet cannot show (before
    /// March 1900 or after 9999) is written as ISO text and recorded.
    pub fn date(&mut self, col: ColNum, d: NaiveDate) -> Result<(), ReportError> {
        let (first, last) = sheet_date_range();
        if d < first || d > last {
            return self.text_figure(col, &d.format("%Y-%m-%d").to_string());
        }
        let styles = self.styles;
        self.seen(col, 10);
        let row = self.row;
        if self.recorded(Some(col), &styles.date) {
            return Ok(());
        }
        if self.carried(col, &styles.date) {
            self.ws.write_datetime(row, col, d)
        } else {
            self.ws
                .write_datetime_with_format(row, col, d, &styles.date)
        }
        .map_err(at(self.sheet, row))?;
        Ok(())
    }

    /// A real date and time (`yyyy-mm-dd hh:mm:ss`), or ISO text outside the
    /// spreadsheet's range.
    pub fn datetime(&mut self, col: ColNum, t: NaiveDateTime) -> Result<(), ReportError> {
        let (first, last) = sheet_date_range();
        if t.date() < first || t.date() > last {
            return self.text_figure(col, &t.format("%Y-%m-%d %H:%M:%S").to_string());
        }
        let styles = self.styles;
        self.seen(col, 19);
        let row = self.row;
        if self.recorded(None, &styles.datetime) {
            return Ok(());
        }
        self.ws
            .write_datetime_with_format(row, col, t, &styles.datetime)
            .map_err(at(self.sheet, row))?;
        Ok(())
    }

    /// A blank cell carrying a format (the template's empty example cells).
    pub fn blank(&mut self, col: ColNum, format: &Format) -> Result<(), ReportError> {
        let row = self.row;
        if self.recorded(None, format) {
            return Ok(());
        }
        self.ws
            .write_blank(row, col, format)
            .map_err(at(self.sheet, row))?;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;
    use std::str::FromStr;

    fn dec(s: &str) -> Decimal {
        Decimal::from_str(s).unwrap()
    }

    /// What a reader does with a number cell: shortest round-trip text.
    fn read_back(n: f64) -> Decimal {
        Decimal::from_str(&n.to_string()).unwrap()
    }

    #[test]
    fn figures_of_fifteen_digits_read_back_exactly() {
        for s in [
            "0.1",
            "1234.56",
            "-98765432109.87",
            "999999999999999",
            "99999999999999.9",
            "0.000000000000000000000000001",
            "123456789012345000000000000",
            "1000000000000000.00",
            "4296596706.02",
            "0.0500000000000000000000000000",
        ] {
            let d = dec(s);
            let n = exact_number(d).unwrap_or_else(|| panic!("{s} is exact"));
            assert_eq!(read_back(n), d, "{s}");
        }
    }

    #[test]
    fn sixteen_digits_or_more_are_never_numbers() {
        for s in [
            "1000000000000000.55",
            "1234567890123456",
            "0.1234567890123456",
        ] {
            assert_eq!(exact_number(dec(s)), None, "{s}");
        }
        assert_eq!(
            posted(dec("1000000000000000.55"), 2),
            Figure::Text("1,000,000,000,000,000.55".to_string())
        );
        assert_eq!(
            posted(dec("-1234567890123456.7"), 2),
            Figure::Text("-1,234,567,890,123,456.70".to_string())
        );
    }

    #[test]
    fn a_text_is_cut_only_past_the_cell_limit_in_characters_not_bytes() {
        // Two bytes a character: twice the limit in bytes, the limit in characters.
        let at_limit = "é".repeat(MAX_CELL_CHARS);
        assert_eq!(fitted(&at_limit), None);
        assert_eq!(fitted(&"a".repeat(MAX_CELL_CHARS)), None);
        let over = "é".repeat(MAX_CELL_CHARS + 1);
        let cut = fitted(&over).unwrap();
        assert_eq!(cut.chars().count(), MAX_CELL_CHARS);
        assert!(cut.ends_with('…'));
        let cut = fitted(&"a".repeat(MAX_CELL_CHARS + 1)).unwrap();
        assert_eq!(cut.chars().count(), MAX_CELL_CHARS);
    }

    #[test]
    fn zero_is_never_negative() {
        assert_eq!(
            exact_number(dec("-0.00")).map(f64::to_bits),
            Some(0.0f64.to_bits())
        );
    }

    #[test]
    fn intermediates_are_rounded_to_fifteen_digits_for_display() {
        let fraction = Decimal::ONE / Decimal::from(360);
        assert_eq!(
            read_back(display_number(fraction)),
            dec("0.00277777777777778")
        );
        let rate = dec("0.0525000000000000000000000001");
        assert_eq!(read_back(display_number(rate)), dec("0.0525"));
        assert_eq!(
            read_back(display_number(Decimal::MAX)),
            dec("79228162514264300000000000000")
        );
    }

    #[test]
    fn an_unrounded_amount_keeps_its_minor_units_or_becomes_text() {
        // 13 whole digits + 2 decimals fit the 15 digits shown.
        let small = dec("1234567890123.456789");
        assert_eq!(unrounded(small, 2), Figure::Number(1234567890123.46));
        let big = dec("12345678901234.456789");
        assert_eq!(
            unrounded(big, 2),
            Figure::Text("12,345,678,901,234.456789".into())
        );
    }

    #[test]
    fn shown_lengths_count_signs_separators_and_decimals() {
        assert_eq!(shown_len(dec("-1234567.8"), 2), "-1,234,567.80".len());
        assert_eq!(shown_len(dec("0.5"), 0), 1);
        assert_eq!(shown_len(dec("100"), 2), "100.00".len());
    }

    proptest! {
        #[test]
        fn every_decimal_of_at_most_fifteen_digits_round_trips(
            m in -999_999_999_999_999i64..=999_999_999_999_999i64,
            scale in 0u32..=28,
        ) {
            let d = Decimal::new(m, scale);
            let n = exact_number(d).expect("at most 15 digits");
            prop_assert_eq!(read_back(n), d);
            // The same double the standard library's correctly rounded parser gives.
            prop_assert_eq!(n.to_bits(), d.to_string().parse::<f64>().unwrap().to_bits());
        }

        #[test]
        fn amounts_are_numbers_exactly_when_they_fit(
            m in proptest::num::i128::ANY,
            scale in 0u32..=4,
        ) {
            let m = m % 10i128.pow(24);
            let d = Decimal::from_i128_with_scale(m, scale);
            match posted(d, scale) {
                Figure::Number(n) => {
                    prop_assert!(significant_digits(d) <= 15);
                    prop_assert_eq!(read_back(n), d);
                }
                Figure::Text(t) => {
                    prop_assert!(significant_digits(d) > 15);
                    prop_assert_eq!(Decimal::from_str(&t.replace(',', "")).unwrap(), d);
                }
            }
        }
    }
}
