//! Problems: what is wrong or worth saying about an input, where it is
//! (book, sheet, A1 cell), what was found, what was expected and how to fix
//! it; and the one order every report lists them in.
//!
//! Every layer reports through these types; this module only describes and
//! orders problems. It never reads a file, prints, or decides what a problem
//! means for the exit status (the command line does).

use std::fmt;

use crate::schema::SheetKind;

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

/// The A1 name of a 0-based cell: `(0, 0)` is `A1`, `(6, 27)` is `AB7`.
///
/// ```
/// use ledgerate::problem::a1;
/// assert_eq!(a1(0, 0), "A1");
/// assert_eq!(a1(6, 27), "AB7");
/// ```
pub fn a1(row: u32, col: u32) -> String {
    format!("{}{}", column_letters(col), u64::from(row) + 1)
}

/// The A1 name of a whole row: `7:7` for the 0-based row 6.
///
/// ```
/// assert_eq!(ledgerate::problem::a1_row(6), "7:7");
/// ```
pub fn a1_row(row: u32) -> String {
    let n = u64::from(row) + 1;
    format!("{n}:{n}")
}

/// Column letters of a 0-based column: 0 is `A`, 25 `Z`, 26 `AA`.
///
/// ```
/// use ledgerate::problem::column_letters;
/// assert_eq!(column_letters(0), "A");
/// assert_eq!(column_letters(25), "Z");
/// assert_eq!(column_letters(26), "AA");
/// assert_eq!(column_letters(16_383), "XFD");
/// ```
pub fn column_letters(col: u32) -> String {
    let mut n = u64::from(col) + 1;
    let mut letters = Vec::new();
    while n > 0 {
        let rem = (n - 1) % 26;
        letters.push(char::from(b'A' + u8::try_from(rem).unwrap_or(0)));
        n = (n - 1) / 26;
    }
    letters.iter().rev().collect()
}

/// The 1-based (row, column) of an A1 cell ("F12" is (12, 6)), of a row
/// reference ("7:7" is (7, 0)), or (0, 0) for anything else.
///
/// ```
/// use ledgerate::problem::parse_a1;
/// assert_eq!(parse_a1("F12"), (12, 6));
/// assert_eq!(parse_a1("AB7"), (7, 28));
/// assert_eq!(parse_a1("7:7"), (7, 0));
/// assert_eq!(parse_a1(""), (0, 0));
/// ```
pub fn parse_a1(cell: &str) -> (u64, u64) {
    let letters: String = cell.chars().take_while(char::is_ascii_alphabetic).collect();
    let rest = cell.get(letters.len()..).unwrap_or_default();
    let digits: String = rest.chars().take_while(char::is_ascii_digit).collect();
    let col = letters.chars().fold(0u64, |acc, c| {
        acc.saturating_mul(26)
            .saturating_add(u64::from(c.to_ascii_uppercase() as u8 - b'A' + 1))
    });
    (digits.parse().unwrap_or(0), col)
}

/// Sorts problems into the order every report lists them: by book (in the
/// order given), sheet (in the order of the book format), row and column,
/// keeping the order found among problems of one cell. A shard run and a
/// merge of shards list them the same way as one run.
pub fn sort_problems(problems: &mut [Problem], books: &[String]) {
    let key = |p: &Problem| {
        let book = books
            .iter()
            .position(|b| *b == p.position.book)
            .unwrap_or(books.len());
        let sheet = p.position.sheet.to_lowercase();
        // A sheet whose name begins with one of the book format's sheet
        // names ranks in the format's order; any other comes after them.
        let rank = SheetKind::ALL
            .iter()
            .position(|k| {
                let label = k.label();
                sheet
                    .get(..label.len())
                    .is_some_and(|start| start.eq_ignore_ascii_case(label))
            })
            .unwrap_or(SheetKind::ALL.len());
        let (row, col) = parse_a1(&p.position.cell);
        (book, rank, sheet, row, col)
    };
    problems.sort_by_cached_key(key);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a1_names() {
        assert_eq!(a1(0, 0), "A1");
        assert_eq!(a1(6, 27), "AB7");
        assert_eq!(a1(1_048_575, 16_383), "XFD1048576");
        assert_eq!(a1_row(6), "7:7");
    }

    fn at(book: &str, sheet: &str, cell: &str) -> Problem {
        Problem {
            severity: Severity::Error,
            position: Position {
                book: book.into(),
                sheet: sheet.into(),
                cell: cell.into(),
            },
            account: None,
            found: String::new(),
            expected: String::new(),
            fix: String::new(),
        }
    }

    /// Problems come by book as given, then sheet in the order of the book
    /// format (a CSV file's lower-case name too; other sheets last), then
    /// row and column.
    #[test]
    fn problems_sort_by_book_then_format_sheet_order_then_cell() {
        let mut problems = vec![
            at("b.xlsx", "Accounts", "A2"),
            at("a.xlsx", "Notes", "A1"),
            at("a.xlsx", "Settings", "B2"),
            at("a.xlsx", "holidays", "A3"),
            at("a.xlsx", "Accounts", "B10"),
            at("a.xlsx", "Accounts", "C9"),
            at("a.xlsx", "Rates", "A2"),
            at("a.xlsx", "Accounts", "A10"),
        ];
        sort_problems(&mut problems, &["a.xlsx".into(), "b.xlsx".into()]);
        let order: Vec<String> = problems
            .iter()
            .map(|p| {
                format!(
                    "{} {}!{}",
                    p.position.book, p.position.sheet, p.position.cell
                )
            })
            .collect();
        assert_eq!(
            order,
            [
                "a.xlsx Accounts!C9",
                "a.xlsx Accounts!A10",
                "a.xlsx Accounts!B10",
                "a.xlsx Rates!A2",
                "a.xlsx holidays!A3",
                "a.xlsx Settings!B2",
                "a.xlsx Notes!A1",
                "b.xlsx Accounts!A2",
            ]
        );
    }
}
