//! How the output looks: cell formats, the status palette, column widths and
//! the splitting of long lists over several sheets.
//!
//! Layout only. Nothing here reads or changes a figure; number formats say how
//! many decimals a spreadsheet shows, never what the value is.

use rust_xlsxwriter::{Color, Format, FormatAlign, FormatBorder, Worksheet, XlsxError};

use super::model::TieStatus;
use crate::engine::reconcile::Status;

/// Rows a worksheet holds, header included (the spreadsheet format's limit).
pub const SHEET_ROW_LIMIT: u32 = 1_048_576;

/// Largest number of decimals given a number format of its own. ISO 4217
/// minor units go up to 4; a currency with more shows this many (the cell
/// still holds every digit).
pub const MAX_FORMAT_DECIMALS: u32 = 8;

/// Decimals the Daily sheet shows of a day's interest and the running
/// accrued: both are unrounded (unless the account rounds daily), so they
/// show as many places as `explain` prints, and a column of them adds up to
/// what it shows.
pub const UNROUNDED_DECIMALS: u32 = 8;

/// Zip deflate level of the output. Level 3 saves about 1.8 times faster than
/// the default 6 for about 5% more bytes; saving dominates the time of a large
/// workbook, and the level never changes the bytes between two runs.
pub const ZIP_LEVEL: u8 = 3;

/// Limits that shape the workbook. Only tests change them.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Limits {
    /// Rows per list sheet, header included; a longer list continues on
    /// "Name 2", "Name 3"... with the header repeated.
    pub rows_per_sheet: u32,
    /// Bars at most in the Summary chart.
    pub chart_points: usize,
    /// Fill the list sheets after the Accruals one after another rather
    /// than side by side: the same file, slower (tests compare the two).
    pub fill_in_turn: bool,
}

impl Default for Limits {
    fn default() -> Limits {
        Limits {
            rows_per_sheet: SHEET_ROW_LIMIT,
            chart_points: 40,
            fill_in_turn: false,
        }
    }
}

impl Limits {
    /// Data rows per list sheet (at least one, so a list always advances).
    pub fn data_rows_per_sheet(&self) -> usize {
        usize::try_from(self.rows_per_sheet.saturating_sub(1))
            .unwrap_or(usize::MAX)
            .max(1)
    }
}

/// The name of part `index` (0-based) of a list sheet: the name itself, then
/// the name and a number.
///
/// ```
/// use ledgerate::report::layout::part_name;
/// assert_eq!(part_name("Daily", 0), "Daily");
/// assert_eq!(part_name("Daily", 1), "Daily 2");
/// ```
pub fn part_name(base: &str, index: usize) -> String {
    if index == 0 {
        base.to_string()
    } else {
        format!("{base} {}", index.saturating_add(1))
    }
}

/// Where a list row lands: the part (0-based) and the 0-based sheet row
/// (row 0 is the header).
///
/// ```
/// use ledgerate::report::layout::{place, Limits};
/// let small = Limits { rows_per_sheet: 4, ..Limits::default() };
/// assert_eq!(place(0, &small), (0, 1));
/// assert_eq!(place(3, &small), (1, 1));
/// ```
pub fn place(index: usize, limits: &Limits) -> (usize, u32) {
    let per = limits.data_rows_per_sheet();
    let row = u32::try_from(index % per).unwrap_or(u32::MAX);
    (index / per, row.saturating_add(1))
}

/// Print setup: landscape, optionally one page wide, and for a list the
/// header row repeated on each printed page.
pub fn print_setup(ws: &mut Worksheet, list: bool, one_page_wide: bool) -> Result<(), XlsxError> {
    ws.set_landscape();
    ws.set_paper_size(9); // A4; a letter-size printer scales it
    if one_page_wide {
        ws.set_print_fit_to_pages(1, 0);
    }
    if list {
        ws.set_repeat_rows(0, 0)?;
    }
    Ok(())
}

/// Print setup of a sheet of the output workbook: A4 landscape, fitted to
/// one page wide and as many pages tall as it takes, narrow margins, for a
/// list the header row repeated on every page, and a footer with the
/// sheet's name and page number, after `note` (a gloss of its terms) when
/// there is one.
pub fn report_page_setup(
    ws: &mut Worksheet,
    list: bool,
    note: Option<&str>,
) -> Result<(), XlsxError> {
    ws.set_landscape();
    ws.set_paper_size(9); // A4; a letter-size printer scales it
    ws.set_print_fit_to_pages(1, 0);
    ws.set_margins(0.4, 0.4, 0.5, 0.6, 0.3, 0.3);
    if list {
        ws.set_repeat_rows(0, 0)?;
    }
    let place = "&R&8&A, page &P of &N";
    ws.set_footer(match note {
        Some(note) => format!("&L&8{}{place}", note.replace('&', "&&")),
        None => place.to_string(),
    });
    Ok(())
}

/// A sheet name as a formula reference: quoted when it holds anything but
/// letters, digits and `_`.
///
/// ```
/// use ledgerate::report::layout::sheet_ref;
/// assert_eq!(sheet_ref("Reconciliation"), "Reconciliation");
/// assert_eq!(sheet_ref("Reconciliation 2"), "'Reconciliation 2'");
/// ```
pub fn sheet_ref(name: &str) -> String {
    if name.chars().all(|c| c.is_ascii_alphanumeric() || c == '_') {
        name.to_string()
    } else {
        format!("'{}'", name.replace('\'', "''"))
    }
}

/// A fixed column width from the longest content: the header plus room for the
/// filter button, or the widest value, plus padding, within `min..=cap`.
/// Widths depend only on the content, so the same report gives the same file.
///
/// ```
/// use ledgerate::report::layout::column_width;
/// assert_eq!(column_width("Date", 10, 60), 12); // the widest value, plus padding
/// assert_eq!(column_width("Balance at cut-off", 4, 60), 23); // the header and its filter button
/// assert_eq!(column_width("Memo", 500, 60), 60);
/// ```
pub fn column_width(header: &str, content: usize, cap: usize) -> u16 {
    let header = header.chars().count().saturating_add(3); // filter button
    let width = header.max(content).saturating_add(2).clamp(8, cap.max(8));
    u16::try_from(width).unwrap_or(u16::MAX)
}

/// The width of a list column whose header wraps onto a second line when
/// its figures are narrower: room for the longest word of the header and
/// the filter button, or the widest value, plus padding, within `min..=cap`.
///
/// ```
/// use ledgerate::report::layout::list_column_width;
/// assert_eq!(list_column_width("Balance at cut-off", 9, 60), 12); // "Balance" and its filter button
/// assert_eq!(list_column_width("Likely cause", 300, 48), 48); // wraps at its cap
/// ```
pub fn list_column_width(header: &str, content: usize, cap: usize) -> u16 {
    let word = header
        .split_whitespace()
        .map(|w| w.chars().count())
        .max()
        .unwrap_or(0)
        .saturating_add(3); // filter button
    let width = word.max(content).saturating_add(2).clamp(8, cap.max(8));
    u16::try_from(width).unwrap_or(u16::MAX)
}

/// Colours of the workbook: light tints of a colour-blind-safe palette, so that
/// black text stays readable and no meaning rests on red against green. The
/// word in the cell always carries the meaning; the fill only helps the eye.
pub mod palette {
    /// Header rows.
    pub const HEADER: u32 = 0xE4EAF1;
    /// Header underline.
    pub const RULE: u32 = 0x7F8C99;
    /// The caution paragraph.
    pub const CAUTION: u32 = 0xFCF6DC;
    /// agrees (sky-blue tint).
    pub const AGREES: u32 = 0xDCEEFA;
    /// within tolerance (bluish-green tint).
    pub const WITHIN: u32 = 0xD4EEE6;
    /// over-posted (orange tint).
    pub const OVER: u32 = 0xFBEBC8;
    /// under-posted (vermilion tint).
    pub const UNDER: u32 = 0xF6DDCB;
    /// not posted (reddish-purple tint).
    pub const MISSING: u32 = 0xF1E0EC;
    /// unexpected posting (yellow tint).
    pub const UNEXPECTED: u32 = 0xF8F3C4;
    /// statement unreadable (grey).
    pub const UNREADABLE: u32 = 0xE3E3E3;
    /// error rows of Problems.
    pub const ERROR: u32 = 0xF6DDCB;
    /// warning rows of Problems.
    pub const WARNING: u32 = 0xFBEBC8;
    /// Bars of the variance chart (blue), and negative bars (vermilion).
    pub const BAR: u32 = 0x0072B2;
    /// Negative bars.
    pub const BAR_NEGATIVE: u32 = 0xD55E00;
}

/// Each status's fill. The word in the cell is [`Status::name`].
const STATUS_FILLS: [(Status, u32); 7] = [
    (Status::Agrees, palette::AGREES),
    (Status::WithinTolerance, palette::WITHIN),
    (Status::OverPosted, palette::OVER),
    (Status::UnderPosted, palette::UNDER),
    (Status::NotPosted, palette::MISSING),
    (Status::UnexpectedPosting, palette::UNEXPECTED),
    (Status::StatementUnreadable, palette::UNREADABLE),
];

/// Each Tie-out status's fill: those of the statement statuses that mean
/// the same, and a vermilion tint for a GL account that differs. The word
/// in the cell is [`TieStatus::name`].
const TIE_FILLS: [(TieStatus, u32); 3] = [
    (TieStatus::Agrees, palette::AGREES),
    (TieStatus::WithinTolerance, palette::WITHIN),
    (TieStatus::Differs, palette::UNDER),
];

/// The amount format for `decimals` places: thousands separated, a minus sign
/// for negatives (`#,##0.00;-#,##0.00`). With `blank_zero`, zero shows as an
/// empty cell (the other column of a journal line); the cell still holds 0.
///
/// ```
/// use ledgerate::report::layout::amount_format_code;
/// assert_eq!(amount_format_code(2, false), "#,##0.00;-#,##0.00");
/// assert_eq!(amount_format_code(0, true), "#,##0;-#,##0;");
/// ```
pub fn amount_format_code(decimals: u32, blank_zero: bool) -> String {
    let body = if decimals == 0 {
        "#,##0".to_string()
    } else {
        format!("#,##0.{}", "0".repeat(decimals as usize))
    };
    if blank_zero {
        format!("{body};-{body};")
    } else {
        format!("{body};-{body}")
    }
}

/// The formats of the output workbook, built once.
#[derive(Debug, Clone)]
pub struct Styles {
    /// Header cells of a list.
    pub header: Format,
    /// Header cells over figures: right-aligned like the figures.
    pub header_right: Format,
    /// Header cells of an output list: they wrap onto a second line over a
    /// column narrower than the label.
    pub list_header: Format,
    /// Long text that wraps within its column (Problems).
    pub wrap: Format,
    /// Title of the Summary.
    pub title: Format,
    /// Section headings of Summary and Run.
    pub section: Format,
    /// Labels of Summary and Run.
    pub label: Format,
    /// The caution paragraph.
    pub caution: Format,
    /// Plain text (top-aligned).
    pub text: Format,
    /// A figure written as text: right-aligned like a number.
    pub text_figure: Format,
    /// `yyyy-mm-dd`.
    pub date: Format,
    /// `yyyy-mm-dd hh:mm:ss`.
    pub datetime: Format,
    /// Whole numbers (days, counts, sizes).
    pub count: Format,
    /// Rates as percentages with 4 decimals.
    pub percent: Format,
    /// Day fractions with 12 decimals.
    pub day_fraction: Format,
    /// Basis points with 2 decimals.
    pub bp: Format,
    amounts: Vec<Format>,
    ledger: Vec<Format>,
    balance_years: Vec<Format>,
    statuses: Vec<(Status, Format)>,
    tie_statuses: Vec<(TieStatus, Format)>,
    error_row: Format,
    warning_row: Format,
}

impl Default for Styles {
    fn default() -> Styles {
        Styles::new()
    }
}

impl Styles {
    /// The formats of the input books (template and sample books).
    pub fn new() -> Styles {
        Styles::build(false)
    }

    /// The formats of the output workbook: like [`Styles::new`], but every
    /// cell sits at the top of its row, so that the figures of a row line
    /// up with the first line of a text that wraps beside them.
    pub fn report() -> Styles {
        Styles::build(true)
    }

    fn build(top: bool) -> Styles {
        let decimals = 0..=MAX_FORMAT_DECIMALS;
        let cell = || {
            if top {
                Format::new().set_align(FormatAlign::Top)
            } else {
                Format::new()
            }
        };
        Styles {
            header: Format::new()
                .set_bold()
                .set_background_color(Color::RGB(palette::HEADER))
                .set_border_bottom(FormatBorder::Thin)
                .set_border_bottom_color(Color::RGB(palette::RULE)),
            header_right: Format::new()
                .set_bold()
                .set_align(FormatAlign::Right)
                .set_background_color(Color::RGB(palette::HEADER))
                .set_border_bottom(FormatBorder::Thin)
                .set_border_bottom_color(Color::RGB(palette::RULE)),
            list_header: Format::new()
                .set_bold()
                .set_text_wrap()
                .set_align(FormatAlign::Top)
                .set_background_color(Color::RGB(palette::HEADER))
                .set_border_bottom(FormatBorder::Thin)
                .set_border_bottom_color(Color::RGB(palette::RULE)),
            wrap: Format::new()
                .set_text_wrap()
                .set_align(FormatAlign::Top)
                .set_indent(1),
            title: Format::new().set_bold().set_font_size(14),
            section: Format::new()
                .set_bold()
                .set_border_bottom(FormatBorder::Thin)
                .set_border_bottom_color(Color::RGB(palette::RULE)),
            label: Format::new().set_align(FormatAlign::Top),
            caution: Format::new()
                .set_text_wrap()
                .set_align(FormatAlign::Top)
                .set_background_color(Color::RGB(palette::CAUTION))
                .set_border(FormatBorder::Thin)
                .set_border_color(Color::RGB(palette::RULE)),
            text: Format::new().set_align(FormatAlign::Top),
            text_figure: cell().set_align(FormatAlign::Right),
            date: cell().set_num_format("yyyy-mm-dd"),
            datetime: cell().set_num_format("yyyy-mm-dd hh:mm:ss"),
            count: cell().set_num_format("#,##0"),
            percent: cell().set_num_format("0.0000%"),
            day_fraction: cell().set_num_format("0.000000000000"),
            bp: cell().set_num_format("#,##0.00;-#,##0.00"),
            amounts: decimals
                .clone()
                .map(|d| cell().set_num_format(amount_format_code(d, false)))
                .collect(),
            ledger: decimals
                .clone()
                .map(|d| cell().set_num_format(amount_format_code(d, true)))
                .collect(),
            // Balance-years are currency-years: two more places than the currency shows.
            balance_years: decimals
                .map(|d| {
                    cell().set_num_format(amount_format_code(
                        d.saturating_add(2).min(MAX_FORMAT_DECIMALS),
                        false,
                    ))
                })
                .collect(),
            statuses: STATUS_FILLS
                .iter()
                .map(|(s, c)| (*s, status_fill(cell(), *c, top)))
                .collect(),
            tie_statuses: TIE_FILLS
                .iter()
                .map(|(s, c)| (*s, status_fill(cell(), *c, top)))
                .collect(),
            error_row: Format::new()
                .set_align(FormatAlign::Top)
                .set_background_color(Color::RGB(palette::ERROR)),
            warning_row: Format::new()
                .set_align(FormatAlign::Top)
                .set_background_color(Color::RGB(palette::WARNING)),
        }
    }

    /// The amount format of a currency with `minor_units` decimals.
    pub fn amount(&self, minor_units: u32) -> &Format {
        pick(&self.amounts, minor_units, &self.text)
    }

    /// The journal's amount format: zero shows blank.
    pub fn ledger(&self, minor_units: u32) -> &Format {
        pick(&self.ledger, minor_units, &self.text)
    }

    /// The balance-years format of a currency.
    pub fn balance_years(&self, minor_units: u32) -> &Format {
        pick(&self.balance_years, minor_units, &self.text)
    }

    /// The fill of a status's cell.
    pub fn status(&self, status: Status) -> &Format {
        self.statuses
            .iter()
            .find(|(s, _)| *s == status)
            .map_or(&self.text, |(_, f)| f)
    }

    /// The fill of a Tie-out status's cell.
    pub fn tie_status(&self, status: TieStatus) -> &Format {
        self.tie_statuses
            .iter()
            .find(|(s, _)| *s == status)
            .map_or(&self.text, |(_, f)| f)
    }

    /// The fill of a Problems severity cell, if it has one.
    pub fn severity(&self, severity: crate::problem::Severity) -> Option<&Format> {
        match severity {
            crate::problem::Severity::Error => Some(&self.error_row),
            crate::problem::Severity::Warning => Some(&self.warning_row),
            crate::problem::Severity::Note => None,
        }
    }
}

/// A status cell of `colour`; in the output workbook set apart from the
/// figure on its left.
fn status_fill(cell: Format, colour: u32, top: bool) -> Format {
    let fill = cell.set_background_color(Color::RGB(colour));
    if top {
        fill.set_align(FormatAlign::Left).set_indent(1)
    } else {
        fill
    }
}

/// The format for `decimals`, the largest one when there are more.
fn pick<'a>(formats: &'a [Format], decimals: u32, fallback: &'a Format) -> &'a Format {
    let i = decimals.min(MAX_FORMAT_DECIMALS) as usize;
    formats.get(i).or(formats.last()).unwrap_or(fallback)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn list_rows_fill_each_part_then_move_to_the_next() {
        let limits = Limits {
            rows_per_sheet: 3,
            ..Limits::default()
        };
        let places: Vec<(usize, u32)> = (0..5).map(|i| place(i, &limits)).collect();
        assert_eq!(places, vec![(0, 1), (0, 2), (1, 1), (1, 2), (2, 1)]);
        let full = Limits::default();
        assert_eq!(place(1_048_574, &full), (0, 1_048_575));
        assert_eq!(place(1_048_575, &full), (1, 1));
    }

    #[test]
    fn a_one_row_limit_still_leaves_room_for_data() {
        let limits = Limits {
            rows_per_sheet: 1,
            ..Limits::default()
        };
        assert_eq!(limits.data_rows_per_sheet(), 1);
    }

    #[test]
    fn every_status_has_its_own_fill() {
        let styles = Styles::new();
        let mut colours: Vec<u32> = Vec::new();
        for status in Status::ALL {
            let (_, colour) = STATUS_FILLS
                .iter()
                .find(|(s, _)| *s == status)
                .unwrap_or_else(|| panic!("no fill for {}", status.name()));
            colours.push(*colour);
            assert_eq!(
                *styles.status(status),
                Format::new().set_background_color(Color::RGB(*colour)),
                "{}",
                status.name()
            );
        }
        colours.sort_unstable();
        colours.dedup();
        assert_eq!(colours.len(), Status::ALL.len());
    }

    #[test]
    fn every_tie_out_status_has_a_fill() {
        let styles = Styles::report();
        for status in TieStatus::ALL {
            assert_ne!(*styles.tie_status(status), styles.text, "{}", status.name());
        }
        assert_eq!(
            *styles.tie_status(TieStatus::Agrees),
            *styles.status(Status::Agrees)
        );
        assert_ne!(
            *styles.tie_status(TieStatus::Differs),
            *styles.tie_status(TieStatus::WithinTolerance)
        );
    }

    #[test]
    fn amount_formats_follow_the_minor_units() {
        assert_eq!(amount_format_code(3, false), "#,##0.000;-#,##0.000");
        assert_eq!(amount_format_code(4, false), "#,##0.0000;-#,##0.0000");
        assert_eq!(amount_format_code(2, true), "#,##0.00;-#,##0.00;");
    }
}
