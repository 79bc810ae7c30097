//! One cell of a sheet, whatever file it came from, and the typed values a
//! column asks of it: text, an exact decimal, a whole number, a date, yes/no.
//!
//! Each conversion either gives the value or an [`Issue`] saying what was
//! found, what was expected and how to fix it. Conversions never guess a
//! day/month order, never read a plain number as a date (or a date as a
//! number), never accept a currency sign, and never touch a binary float:
//! spreadsheet floats become decimals in [`super::number`] before a `Cell`
//! exists.

use calamine::{Data, DataRef, ExcelDateTime};
use chrono::{Datelike, NaiveDate, NaiveDateTime, NaiveTime};
use rust_decimal::prelude::ToPrimitive;
use rust_decimal::Decimal;

use super::number::{date_serial_plausible, decimal_from_float};

/// The longest found value shown in a message, in characters.
const SHOWN_CHARS: usize = 60;

/// A cell's value, independent of the file format.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) enum Cell {
    /// Nothing (or only spaces).
    Empty,
    /// Text as typed (a CSV field is always text).
    Text(String),
    /// A numeric cell, already an exact decimal.
    Number(Decimal),
    /// A numeric cell that no exact decimal holds; the text shown is kept.
    BadNumber(String),
    /// A real date cell (a number with a date format, or an ODS date).
    Date(NaiveDate),
    /// A real date cell with a time of day.
    DateTime(NaiveDateTime),
    /// A date cell whose serial number is no calendar date (negative, or
    /// past 9999-12-31); the serial as stored is kept.
    BadDate(String),
    /// A duration cell (`[h]:mm:ss`).
    Duration(String),
    /// A boolean cell.
    Bool(bool),
    /// An error cell (`#DIV/0!`, `#N/A`, `#SPILL!`...).
    Error(String),
}

/// Why a cell does not hold what its column expects.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Issue {
    /// The value found, as the user would see it.
    pub found: String,
    /// What the column expects.
    pub expected: String,
    /// How to fix it.
    pub fix: String,
}

impl Issue {
    fn new(found: impl Into<String>, expected: impl Into<String>, fix: impl Into<String>) -> Issue {
        Issue {
            found: found.into(),
            expected: expected.into(),
            fix: fix.into(),
        }
    }
}

/// `s` cut to a length a message can show.
///
/// Long strings are fine in a book; only the message is shortened.
pub(crate) fn shown(s: &str) -> String {
    if s.chars().count() <= SHOWN_CHARS {
        s.to_string()
    } else {
        let mut out: String = s.chars().take(SHOWN_CHARS).collect();
        out.push('…');
        out
    }
}

/// A library's error text as a message quotes it: its first letter lower
/// case, the rest as written.
pub(crate) fn lower_first(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_lowercase().chain(c).collect(),
        None => String::new(),
    }
}

/// Error values as spreadsheets write them. ODS files (and CSV exports)
/// carry them as plain text, so text equal to one of these is an error cell.
const ERROR_TEXTS: &[&str] = &[
    "#DIV/0!",
    "#N/A",
    "#NAME?",
    "#NULL!",
    "#NUM!",
    "#REF!",
    "#VALUE!",
    "#SPILL!",
    "#CALC!",
    "#GETTING_DATA",
    "#FIELD!",
    "#BLOCKED!",
    "#CONNECT!",
    "#BUSY!",
    "#UNKNOWN!",
    "#EXTERNAL!",
    "#PYTHON!",
];

/// Whether text is a spreadsheet error value (`#N/A`, or LibreOffice's `Err:502`).
fn is_error_text(s: &str) -> bool {
    let t = s.trim();
    // Every CSV field comes here: look at the first byte before the list.
    match t.as_bytes().first() {
        Some(b'#') => ERROR_TEXTS.iter().any(|e| e.eq_ignore_ascii_case(t)),
        Some(b'E') => t
            .strip_prefix("Err:")
            .is_some_and(|n| !n.is_empty() && n.bytes().all(|b| b.is_ascii_digit())),
        _ => false,
    }
}

impl Cell {
    /// A text cell; error values written as text become error cells.
    pub(crate) fn text(s: &str) -> Cell {
        if s.trim().is_empty() {
            Cell::Empty
        } else if is_error_text(s) {
            Cell::Error(s.trim().to_string())
        } else {
            Cell::Text(s.to_string())
        }
    }

    /// Whether the cell is blank.
    pub(crate) fn is_empty(&self) -> bool {
        matches!(self, Cell::Empty)
    }

    /// The value as the user would see it in a message.
    pub(crate) fn shown(&self) -> String {
        match self {
            Cell::Empty => String::new(),
            Cell::Text(s) => shown(s.trim()),
            Cell::Number(d) => d.to_string(),
            Cell::BadNumber(s) | Cell::BadDate(s) | Cell::Duration(s) | Cell::Error(s) => shown(s),
            Cell::Date(d) => d.to_string(),
            Cell::DateTime(d) => d.format("%Y-%m-%d %H:%M:%S").to_string(),
            Cell::Bool(true) => "TRUE".to_string(),
            Cell::Bool(false) => "FALSE".to_string(),
        }
    }
}

/// A spreadsheet date-time as a cell: a date, or a date with a time of day.
fn date_cell(dt: NaiveDateTime) -> Cell {
    if dt.time() == NaiveTime::MIN {
        Cell::Date(dt.date())
    } else {
        Cell::DateTime(dt)
    }
}

/// A calamine date cell. Only a number with a date format is a date; a
/// duration is not. The workbook's 1900 or 1904 system is inside the value.
fn excel_date_cell(d: &ExcelDateTime) -> Cell {
    if d.is_datetime() {
        // The calendar arithmetic is only asked about serials that can be
        // dates: a huge one would overflow it.
        if !date_serial_plausible(d.as_f64()) {
            return Cell::BadDate(d.to_string());
        }
        // Serial 60 of the 1900 system is 29 February 1900, a day the
        // spreadsheet calendar counts but that never existed; the text
        // 1900-02-29 is refused too.
        if matches!(d.to_ymd_hms_milli(), (1900, 2, 29, ..)) {
            return Cell::BadDate(format!("{d} (29 February 1900, a day that never existed)"));
        }
        match d.as_datetime() {
            Some(dt) if (1900..=9999).contains(&dt.year()) => date_cell(dt),
            _ => Cell::BadDate(d.to_string()),
        }
    } else {
        Cell::Duration(d.to_string())
    }
}

/// An ODS date as text: `2024-02-29` or `2024-02-29T13:45:30`.
fn iso_date_cell(s: &str) -> Cell {
    if let Ok(d) = NaiveDate::parse_from_str(s, "%Y-%m-%d") {
        return Cell::Date(d);
    }
    match NaiveDateTime::parse_from_str(s, "%Y-%m-%dT%H:%M:%S%.f") {
        Ok(dt) => date_cell(dt),
        Err(_) => Cell::BadNumber(s.to_string()),
    }
}

impl From<&DataRef<'_>> for Cell {
    fn from(v: &DataRef<'_>) -> Cell {
        match v {
            DataRef::Empty => Cell::Empty,
            DataRef::Int(i) => Cell::Number(Decimal::from(*i)),
            DataRef::Float(f) => match decimal_from_float(*f) {
                Some(d) => Cell::Number(d),
                None => Cell::BadNumber(f.to_string()),
            },
            DataRef::String(s) => Cell::text(s),
            DataRef::SharedString(s) => Cell::text(s),
            DataRef::Bool(b) => Cell::Bool(*b),
            DataRef::DateTime(d) => excel_date_cell(d),
            DataRef::DateTimeIso(s) => iso_date_cell(s),
            DataRef::DurationIso(s) => Cell::Duration(s.clone()),
            DataRef::Error(e) => Cell::Error(e.to_string()),
        }
    }
}

impl From<&Data> for Cell {
    fn from(v: &Data) -> Cell {
        match v {
            Data::Empty => Cell::Empty,
            Data::Int(i) => Cell::Number(Decimal::from(*i)),
            Data::Float(f) => match decimal_from_float(*f) {
                Some(d) => Cell::Number(d),
                None => Cell::BadNumber(f.to_string()),
            },
            Data::String(s) => Cell::text(s),
            Data::Bool(b) => Cell::Bool(*b),
            Data::DateTime(d) => excel_date_cell(d),
            Data::DateTimeIso(s) => iso_date_cell(s),
            Data::DurationIso(s) => Cell::Duration(s.clone()),
            Data::Error(e) => Cell::Error(e.to_string()),
        }
    }
}

/// The issue of an error cell.
fn error_cell(e: &str) -> Issue {
    Issue::new(
        e,
        "a value, not an error cell",
        "correct the formula or type the value; the cached error cannot be used",
    )
}

/// Text: ids, names, codes. Numbers are accepted as their digits (an id
/// typed as 1001 is `1001`); `None` for a blank cell.
pub(crate) fn text(cell: &Cell) -> Result<Option<String>, Issue> {
    match cell {
        Cell::Empty => Ok(None),
        Cell::Text(s) => Ok(Some(s.trim().to_string())),
        Cell::Number(d) => Ok(Some(d.normalize().to_string())),
        Cell::Error(e) => Err(error_cell(e)),
        other => Err(Issue::new(other.shown(), "text", "type the value as text")),
    }
}

/// How a book writes numbers as text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct NumberStyle {
    /// `1.234,56`: a comma before the decimals and points between thousands.
    pub decimal_comma: bool,
}

/// An exact decimal: a numeric cell or number text; `None` for a blank cell.
pub(crate) fn decimal(cell: &Cell, style: NumberStyle) -> Result<Option<Decimal>, Issue> {
    match cell {
        Cell::Empty => Ok(None),
        Cell::Number(d) => Ok(Some(*d)),
        Cell::Text(s) => parse_number_text(s, style).map(Some),
        Cell::BadNumber(s) => Err(Issue::new(
            s.as_str(),
            "a number of at most 28 significant digits",
            "check the value; it is too large, too small or not a number",
        )),
        Cell::Date(_) | Cell::DateTime(_) | Cell::BadDate(_) => Err(Issue::new(
            cell.shown(),
            "a number, not a date",
            "format the cell as a number (it holds a date format)",
        )),
        Cell::Error(e) => Err(error_cell(e)),
        other => Err(Issue::new(
            other.shown(),
            "a number",
            "type a number such as 1234.56",
        )),
    }
}

/// A whole number in `min..=max`; `None` for a blank cell.
pub(crate) fn whole(
    cell: &Cell,
    style: NumberStyle,
    min: u32,
    max: u32,
) -> Result<Option<u32>, Issue> {
    let Some(d) = decimal(cell, style)? else {
        return Ok(None);
    };
    let expected = format!("a whole number from {min} to {max}");
    let n = if d.fract().is_zero() {
        d.to_u32()
    } else {
        None
    };
    match n {
        Some(n) if (min..=max).contains(&n) => Ok(Some(n)),
        _ => Err(Issue::new(
            cell.shown(),
            expected,
            format!("write a whole number from {min} to {max}"),
        )),
    }
}

/// A date: a real date cell or ISO text (YYYY-MM-DD); `None` for a blank
/// cell. A plain number is refused: it may be a date without a date format,
/// but which date depends on the workbook, so it is never guessed.
pub(crate) fn date(cell: &Cell) -> Result<Option<NaiveDate>, Issue> {
    const EXPECTED: &str = "a date cell or a date written as YYYY-MM-DD";
    match cell {
        Cell::Empty => Ok(None),
        Cell::Date(d) => Ok(Some(*d)),
        Cell::Text(s) => match parse_iso_date(s.trim()) {
            Some(d) => Ok(Some(d)),
            None => Err(Issue::new(shown(s.trim()), EXPECTED, date_text_fix(s.trim()))),
        },
        Cell::Number(d) => Err(Issue::new(
            d.to_string(),
            EXPECTED,
            "this may be a date without a date format: format the cell as a date, or write it as YYYY-MM-DD",
        )),
        Cell::DateTime(_) => Err(Issue::new(
            cell.shown(),
            "a date without a time of day",
            "remove the time of day, or write the date as YYYY-MM-DD",
        )),
        Cell::BadDate(serial) => Err(Issue::new(
            format!("date serial {}", shown(serial)),
            "a date from 1900-01-01 to 9999-12-31",
            "the cell's date number is outside the spreadsheet calendar, so it is no date: type the date again, or write it as YYYY-MM-DD",
        )),
        Cell::Error(e) => Err(error_cell(e)),
        other => Err(Issue::new(other.shown(), EXPECTED, "write the date as YYYY-MM-DD, for example 2026-01-31")),
    }
}

/// Yes or no: a boolean cell, 1 or 0, or yes/no/true/false/y/n as text;
/// `None` for a blank cell.
pub(crate) fn yes_no(cell: &Cell) -> Result<Option<bool>, Issue> {
    match cell {
        Cell::Empty => Ok(None),
        Cell::Bool(b) => Ok(Some(*b)),
        // A spreadsheet boolean is often stored as the number 1 or 0 with a
        // TRUE/FALSE format (LibreOffice does so), which is unambiguous.
        Cell::Number(d) if *d == Decimal::ONE => Ok(Some(true)),
        Cell::Number(d) if d.is_zero() => Ok(Some(false)),
        Cell::Text(s) => match s.trim().to_ascii_lowercase().as_str() {
            "yes" | "y" | "true" | "1" => Ok(Some(true)),
            "no" | "n" | "false" | "0" => Ok(Some(false)),
            _ => Err(Issue::new(shown(s.trim()), "yes or no", "write yes or no")),
        },
        Cell::Error(e) => Err(error_cell(e)),
        other => Err(Issue::new(other.shown(), "yes or no", "write yes or no")),
    }
}

/// Strict ISO text: four-digit year, two-digit month and day.
pub(crate) fn parse_iso_date(s: &str) -> Option<NaiveDate> {
    let b = s.as_bytes();
    let shape = b.len() == 10
        && b.iter().enumerate().all(|(i, c)| {
            if i == 4 || i == 7 {
                *c == b'-'
            } else {
                c.is_ascii_digit()
            }
        });
    if !shape {
        return None;
    }
    // Digits in place: read them directly (what `%Y-%m-%d` reads, without
    // parsing the pattern for every cell).
    let number = |from: usize, to: usize| {
        b.get(from..to)
            .into_iter()
            .flatten()
            .fold(0u32, |n, c| n * 10 + u32::from(c - b'0'))
    };
    let year = i32::try_from(number(0, 4)).ok()?;
    NaiveDate::from_ymd_opt(year, number(5, 7), number(8, 10))
}

/// The dates a non-ISO date text (`31/03/2027`, `2027/3/31`) can be read
/// as: one when the order is plain (year first, or a day above 12), two
/// when day and month are both 12 or below (the order is never guessed),
/// none when it is no date. A two-digit year is never read. `31/03/2027`
/// is 2027-03-31; `03/04/2027` is 2027-04-03 or 2027-03-04, day first.
pub(crate) fn date_readings(s: &str) -> Vec<NaiveDate> {
    let parts: Vec<&str> = s.trim().split(['/', '.', '-']).collect();
    let [a, b, c] = parts.as_slice() else {
        return Vec::new();
    };
    let (Ok(a), Ok(b), Ok(c)) = (a.parse::<u32>(), b.parse::<u32>(), c.parse::<u32>()) else {
        return Vec::new();
    };
    let ymd = |y: u32, m: u32, d: u32| {
        i32::try_from(y)
            .ok()
            .filter(|y| *y >= 1000)
            .and_then(|y| NaiveDate::from_ymd_opt(y, m, d))
    };
    if a >= 1000 {
        return ymd(a, b, c).into_iter().collect();
    }
    let day_first = ymd(c, b, a);
    let month_first = ymd(c, a, b);
    match (day_first, month_first) {
        (Some(d), Some(m)) if d == m => vec![d],
        (d, m) => d.into_iter().chain(m).collect(),
    }
}

/// The fix for date text that is not ISO. When the text can only be read
/// one way (a day above 12, or the year first), the message shows the ISO
/// form; otherwise it says that the order is not guessed.
fn date_text_fix(s: &str) -> String {
    if let [d] = date_readings(s).as_slice() {
        return format!("write the date as YYYY-MM-DD ({d} if that is the date meant); day/month order is never guessed");
    }
    if parse_loose_iso(s) {
        return "write the date as YYYY-MM-DD with a real day of the month, for example 2026-01-31"
            .to_string();
    }
    "write the date as YYYY-MM-DD, for example 2026-01-31; day/month order is never guessed"
        .to_string()
}

/// Whether `s` has the ISO shape but not a real date (2026-02-30, 2026-13-01).
fn parse_loose_iso(s: &str) -> bool {
    let b = s.as_bytes();
    b.len() == 10 && b.get(4) == Some(&b'-') && b.get(7) == Some(&b'-')
}

/// Currency signs a number may not carry. Amounts take their currency from
/// the account, so a sign in a cell is refused rather than stripped.
fn is_currency_sign(c: char) -> bool {
    matches!(
        c,
        '$' | '£'
            | '€'
            | '¥'
            | '¢'
            | '¤'
            | '₹'
            | '₽'
            | '₩'
            | '₪'
            | '₫'
            | '₺'
            | '₦'
            | '₱'
            | '₴'
            | '₸'
            | '₿'
            | '฿'
            | '₡'
            | '₲'
            | '₵'
            | '₭'
            | '₮'
            | '₼'
            | '₾'
    ) || ('\u{20A0}'..='\u{20CF}').contains(&c)
}

/// Number text: `1234.56`, `1,234.56`, `-12`, `(12.00)` for a negative,
/// surrounding spaces; with a decimal comma `1.234,56`.
pub(crate) fn parse_number_text(raw: &str, style: NumberStyle) -> Result<Decimal, Issue> {
    let s = raw.trim();
    let found = shown(s);
    if s.chars().any(is_currency_sign) || has_currency_code(s) {
        return Err(Issue::new(
            found,
            "a number without a currency sign or code",
            "remove the currency; an amount is in its account's currency",
        ));
    }
    if s.contains('%') {
        return Err(Issue::new(
            found,
            "a number without a % sign",
            "remove the % sign; the column header says the unit",
        ));
    }
    if let Some(d) = parse_plain(s, style.decimal_comma) {
        return Ok(d);
    }
    let other = parse_plain(s, !style.decimal_comma).is_some();
    let (expected, fix) = match (style.decimal_comma, other) {
        (false, true) => (
            "a number with a decimal point, such as 1,234.56",
            "this looks like a decimal comma: write 1234.56, or read the book with the decimal-comma option (--decimal-comma)",
        ),
        (true, true) => (
            "a number with a decimal comma, such as 1.234,56",
            "the book is read with the decimal-comma option: write 1234,56, or read it without the option",
        ),
        (_, false) => ("a number, such as 1234.56 or (12.00) for a negative", "type a number"),
    };
    match digit_count(s) {
        n if n > 28 => Err(Issue::new(
            found,
            "a number of at most 28 significant digits",
            "shorten the number; exact decimals hold at most 28 digits",
        )),
        _ => Err(Issue::new(found, expected, fix)),
    }
}

fn digit_count(s: &str) -> usize {
    s.bytes().filter(u8::is_ascii_digit).count()
}

/// Whether `s` carries a three-letter currency code next to its digits
/// (`USD 12.00`, `12.00 EUR`).
fn has_currency_code(s: &str) -> bool {
    let letters: String = s.chars().filter(|c| c.is_ascii_alphabetic()).collect();
    letters.len() == 3
        && digit_count(s) > 0
        && crate::conventions::currency::lookup(&letters).is_some()
        && (s.starts_with(letters.as_str()) || s.ends_with(letters.as_str()))
}

/// Number text in one style, or `None`.
fn parse_plain(s: &str, decimal_comma: bool) -> Option<Decimal> {
    let (point, group) = if decimal_comma {
        (',', '.')
    } else {
        ('.', ',')
    };
    // (12.00) is a negative in accounting layouts.
    let (paren, body) = match s.strip_prefix('(').and_then(|t| t.strip_suffix(')')) {
        Some(inner) => (true, inner.trim()),
        None => (false, s),
    };
    let (negative, unsigned) = match (body.strip_prefix('-'), body.strip_prefix('+')) {
        (Some(rest), _) => (true, rest),
        (None, Some(rest)) => (false, rest),
        (None, None) => (false, body),
    };
    if paren && unsigned.len() != body.len() {
        return None;
    }
    let magnitude = parse_unsigned(unsigned, point, group)?;
    let value = if paren || negative {
        -magnitude
    } else {
        magnitude
    };
    // "-0.00" is zero; an amount never means a negative zero.
    Some(if value.is_zero() { value.abs() } else { value })
}

/// Digits with optional grouping and decimals, or an exponent form
/// (`1.5E-3`, as some exports write floats).
fn parse_unsigned(s: &str, point: char, group: char) -> Option<Decimal> {
    if let Some((mantissa, exponent)) = s.split_once(['e', 'E']) {
        let exp_ok = {
            let e = exponent.strip_prefix(['+', '-']).unwrap_or(exponent);
            !e.is_empty() && e.bytes().all(|b| b.is_ascii_digit())
        };
        let m_ok = mantissa
            .split_once('.')
            .map_or(all_digits(mantissa), |(i, f)| {
                (all_digits(i) || i.is_empty()) && all_digits(f)
            });
        if point != '.' || !exp_ok || !m_ok {
            return None;
        }
        return Decimal::from_scientific(s).ok();
    }
    let mut parts = s.split(point);
    let int = parts.next()?;
    let frac = parts.next();
    if parts.next().is_some() {
        return None;
    }
    let int_digits: String = if int.contains(group) {
        let mut groups = int.split(group);
        let first = groups.next()?;
        if first.is_empty() || first.len() > 3 || !all_digits(first) {
            return None;
        }
        let mut out = first.to_string();
        for g in groups {
            if g.len() != 3 || !all_digits(g) {
                return None;
            }
            out.push_str(g);
        }
        out
    } else {
        if !int.is_empty() && !all_digits(int) {
            return None;
        }
        int.to_string()
    };
    let frac = frac.unwrap_or("");
    if !frac.is_empty() && !all_digits(frac) {
        return None;
    }
    if int_digits.is_empty() && frac.is_empty() {
        return None;
    }
    let text = if frac.is_empty() {
        int_digits
    } else {
        format!("{int_digits}.{frac}")
    };
    Decimal::from_str_exact(&text).ok()
}

fn all_digits(s: &str) -> bool {
    !s.is_empty() && s.bytes().all(|b| b.is_ascii_digit())
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::str::FromStr;

    const POINT: NumberStyle = NumberStyle {
        decimal_comma: false,
    };
    const COMMA: NumberStyle = NumberStyle {
        decimal_comma: true,
    };

    fn d(s: &str) -> Decimal {
        Decimal::from_str(s).unwrap()
    }

    fn num(s: &str) -> Result<Decimal, Issue> {
        parse_number_text(s, POINT)
    }

    #[test]
    fn xlsx_floats_keep_their_shortest_digits() {
        assert_eq!(Cell::from(&Data::Float(0.1)), Cell::Number(d("0.1")));
        assert_eq!(
            Cell::from(&Data::Float(1_234.567_890_123_456_7)),
            Cell::Number(d("1234.5678901234567"))
        );
        assert_eq!(Cell::from(&Data::Int(365)), Cell::Number(d("365")));
        let Cell::Number(x) = Cell::from(&DataRef::Float(0.1)) else {
            panic!("not a number")
        };
        assert_eq!(x.to_string(), "0.1");
    }

    #[test]
    fn number_text_with_thousands_separators_parentheses_and_spaces() {
        assert_eq!(num("1,234.56").unwrap(), d("1234.56"));
        assert_eq!(num("  1234.56 ").unwrap(), d("1234.56"));
        assert_eq!(num("1,234,567").unwrap(), d("1234567"));
        assert_eq!(num("-0.5").unwrap(), d("-0.5"));
        assert_eq!(num("+7").unwrap(), d("7"));
        assert_eq!(num(".25").unwrap(), d("0.25"));
    }

    #[test]
    fn parentheses_mean_a_negative_and_keep_the_places() {
        let v = num("(12.00)").unwrap();
        assert_eq!(v, d("-12.00"));
        assert_eq!(v.to_string(), "-12.00");
        assert_eq!(num("( 1,000.5 )").unwrap(), d("-1000.5"));
        assert!(num("(-12.00)").is_err());
    }

    #[test]
    fn a_decimal_comma_without_the_option_is_refused_and_names_the_option() {
        let e = num("1.234,56").unwrap_err();
        assert_eq!(e.found, "1.234,56");
        assert!(e.fix.contains("--decimal-comma"), "{}", e.fix);
        let e = num("12,5").unwrap_err();
        assert!(e.fix.contains("decimal-comma"), "{}", e.fix);
    }

    #[test]
    fn a_decimal_comma_with_the_option_is_read() {
        assert_eq!(parse_number_text("1.234,56", COMMA).unwrap(), d("1234.56"));
        assert_eq!(parse_number_text("(0,75)", COMMA).unwrap(), d("-0.75"));
        let e = parse_number_text("1,234.56", COMMA).unwrap_err();
        assert!(e.fix.contains("without the option"), "{}", e.fix);
    }

    #[test]
    fn currency_signs_codes_and_percent_signs_are_refused() {
        for s in ["$1,200.00", "£40.00", "12.00 €", "USD 12.00", "12.00EUR"] {
            let e = num(s).unwrap_err();
            assert!(e.expected.contains("currency"), "{s}: {e:?}");
        }
        let e = num("4.25%").unwrap_err();
        assert!(e.expected.contains('%'));
    }

    #[test]
    fn malformed_grouping_and_words_are_refused() {
        for s in ["1,23,456", "12.34.56", "ten", "1 234", "--5", "1e", "0x10"] {
            assert!(num(s).is_err(), "{s}");
        }
    }

    #[test]
    fn exponent_text_is_read_exactly() {
        assert_eq!(num("1.5E-3").unwrap(), d("0.0015"));
        assert_eq!(num("2e3").unwrap(), d("2000"));
    }

    #[test]
    fn too_many_digits_is_refused_not_rounded() {
        let e = num("0.12345678901234567890123456789").unwrap_err();
        assert!(e.expected.contains("28"), "{e:?}");
    }

    proptest::proptest! {
        /// The strict ISO reading agrees with chrono's `%Y-%m-%d` on every
        /// text of its shape, real dates and impossible ones alike
        /// (month 00 or 13, 31 April, 29 February of a common year).
        #[test]
        fn strict_iso_dates_read_as_chrono_reads_them(
            y in 0u32..10_000, m in 0u32..100, d in 0u32..100,
        ) {
            let text = format!("{y:04}-{m:02}-{d:02}");
            proptest::prop_assert_eq!(
                parse_iso_date(&text),
                NaiveDate::parse_from_str(&text, "%Y-%m-%d").ok()
            );
        }
    }

    #[test]
    fn iso_date_text_is_read() {
        assert_eq!(
            date(&Cell::text("2026-01-31")).unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 31)
        );
        assert_eq!(
            date(&Cell::text(" 2026-01-31 ")).unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 31)
        );
        assert_eq!(date(&Cell::Empty).unwrap(), None);
    }

    /// Found: year-first text such as 2027/3/31 got no ISO suggestion.
    /// Expected: year first, or a day above 12, reads one way; day and
    /// month both 12 or below read two ways and are never picked.
    #[test]
    fn date_text_reads_one_way_only_with_the_year_first_or_a_day_above_12() {
        let d = |s: &str| NaiveDate::parse_from_str(s, "%Y-%m-%d").unwrap();
        assert_eq!(date_readings("31/03/2027"), [d("2027-03-31")]);
        assert_eq!(date_readings("3.31.2027"), [d("2027-03-31")]);
        assert_eq!(date_readings("2027/3/31"), [d("2027-03-31")]);
        assert_eq!(date_readings("05/05/2027"), [d("2027-05-05")]);
        assert_eq!(
            date_readings("03/04/2027"),
            [d("2027-04-03"), d("2027-03-04")]
        );
        assert!(date_readings("31/03/27").is_empty());
        assert!(date_readings("2027-02-30").is_empty());
        assert!(date_readings("March 31").is_empty());
        assert!(date_text_fix("2027/3/31").contains("2027-03-31 if that is the date meant"));
    }

    #[test]
    fn other_date_text_is_refused_and_shows_the_cell_value_and_the_fix() {
        let e = date(&Cell::text("31/01/2026")).unwrap_err();
        assert_eq!(e.found, "31/01/2026");
        assert!(e.expected.contains("YYYY-MM-DD"));
        assert!(e.fix.contains("2026-01-31"), "{}", e.fix);
        let e = date(&Cell::text("01/02/2026")).unwrap_err();
        assert!(e.fix.contains("never guessed"), "{}", e.fix);
        let e = date(&Cell::text("2026-02-30")).unwrap_err();
        assert!(e.fix.contains("real day"), "{}", e.fix);
        assert!(date(&Cell::text("2026-1-5")).is_err());
    }

    #[test]
    fn a_plain_number_in_a_date_column_may_be_a_date_without_a_format() {
        let e = date(&Cell::Number(d("46023"))).unwrap_err();
        assert_eq!(e.found, "46023");
        assert!(e.fix.contains("date without a date format"), "{}", e.fix);
    }

    #[test]
    fn serial_60_of_the_1900_system_is_no_date() {
        // Source: the 1900 date system counts 1900 as a leap year, so serial
        // 60 is 29 February 1900, which never existed; 59 and 61 are the
        // days either side (common practice of spreadsheet programs, no
        // published standard).
        use calamine::ExcelDateTimeType::DateTime;
        let day = |serial: f64, is_1904: bool| {
            Cell::from(&Data::DateTime(ExcelDateTime::new(
                serial, DateTime, is_1904,
            )))
        };
        assert!(
            matches!(day(60.0, false), Cell::BadDate(ref s) if s.contains("29 February 1900")),
            "{:?}",
            day(60.0, false)
        );
        assert!(matches!(day(60.5, false), Cell::BadDate(_)));
        assert_eq!(
            day(59.0, false),
            Cell::Date(NaiveDate::from_ymd_opt(1900, 2, 28).unwrap())
        );
        assert_eq!(
            day(61.0, false),
            Cell::Date(NaiveDate::from_ymd_opt(1900, 3, 1).unwrap())
        );
        // In the 1904 system serial 60 is an ordinary day.
        assert_eq!(
            day(60.0, true),
            Cell::Date(NaiveDate::from_ymd_opt(1904, 3, 1).unwrap())
        );
    }

    #[test]
    fn real_date_cells_are_dates_in_either_epoch() {
        use calamine::ExcelDateTimeType;
        // 45351 is 2024-02-29 in the 1900 system; 43889 is the same day in the 1904 system.
        let d1900 = ExcelDateTime::new(45351.0, ExcelDateTimeType::DateTime, false);
        let d1904 = ExcelDateTime::new(43889.0, ExcelDateTimeType::DateTime, true);
        let leap = NaiveDate::from_ymd_opt(2024, 2, 29).unwrap();
        assert_eq!(Cell::from(&Data::DateTime(d1900)), Cell::Date(leap));
        assert_eq!(Cell::from(&Data::DateTime(d1904)), Cell::Date(leap));
        let ods = Cell::from(&Data::DateTimeIso("2024-02-29".into()));
        assert_eq!(ods, Cell::Date(leap));
        let duration = ExcelDateTime::new(1.5, ExcelDateTimeType::TimeDelta, false);
        assert!(matches!(
            Cell::from(&Data::DateTime(duration)),
            Cell::Duration(_)
        ));
    }

    #[test]
    fn a_date_with_a_time_of_day_is_refused() {
        let c = Cell::from(&Data::DateTimeIso("2024-02-29T13:45:30".into()));
        let e = date(&c).unwrap_err();
        assert!(e.expected.contains("time of day"));
    }

    #[test]
    fn error_cells_are_errors_whether_typed_or_text() {
        assert_eq!(
            Cell::from(&Data::Error(calamine::CellErrorType::Div0)),
            Cell::Error("#DIV/0!".into())
        );
        assert_eq!(Cell::text("#N/A"), Cell::Error("#N/A".into()));
        assert_eq!(Cell::text("Err:502"), Cell::Error("Err:502".into()));
        let e = decimal(&Cell::text("#DIV/0!"), POINT).unwrap_err();
        assert_eq!(e.found, "#DIV/0!");
        assert!(text(&Cell::Error("#SPILL!".into())).is_err());
    }

    #[test]
    fn yes_and_no_in_words_or_booleans() {
        assert_eq!(yes_no(&Cell::text("Yes")).unwrap(), Some(true));
        assert_eq!(yes_no(&Cell::text("n")).unwrap(), Some(false));
        assert_eq!(yes_no(&Cell::Bool(true)).unwrap(), Some(true));
        assert_eq!(yes_no(&Cell::Number(d("1"))).unwrap(), Some(true));
        assert_eq!(yes_no(&Cell::Number(d("0"))).unwrap(), Some(false));
        assert!(yes_no(&Cell::text("perhaps")).is_err());
        assert!(yes_no(&Cell::Number(d("2"))).is_err());
    }

    #[test]
    fn whole_numbers_in_range() {
        assert_eq!(whole(&Cell::Number(d("4")), POINT, 0, 12).unwrap(), Some(4));
        assert_eq!(whole(&Cell::text("12"), POINT, 0, 12).unwrap(), Some(12));
        assert!(whole(&Cell::Number(d("13")), POINT, 0, 12).is_err());
        assert!(whole(&Cell::Number(d("2.5")), POINT, 0, 12).is_err());
        assert!(whole(&Cell::Number(d("-1")), POINT, 0, 12).is_err());
    }

    #[test]
    fn numeric_ids_read_as_their_digits() {
        assert_eq!(
            text(&Cell::Number(d("1001"))).unwrap().as_deref(),
            Some("1001")
        );
        assert_eq!(
            text(&Cell::text("  HM-SAV-001 ")).unwrap().as_deref(),
            Some("HM-SAV-001")
        );
    }

    #[test]
    fn long_values_are_cut_only_in_messages() {
        let long = "x".repeat(5000);
        let e = date(&Cell::text(&long)).unwrap_err();
        assert!(e.found.chars().count() <= SHOWN_CHARS + 1);
        assert_eq!(
            text(&Cell::text(&long)).unwrap().map(|s| s.len()),
            Some(5000)
        );
    }
}
