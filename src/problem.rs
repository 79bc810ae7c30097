//! Problems: what is wrong or worth saying about an input, where it is
//! (book, sheet, A1 cell), what was found, what was expected and how to fix
//! it; and the one order every report lists them in.
//!
//! Every layer reports through these types; this module only describes and
//! orders problems. It never reads a file, prints, or decides what a problem
//! means for the exit status (the command line does).

use std::fmt;
use std::sync::Arc;

use crate::conventions::names::fold;
use crate::schema::SheetKind;

/// Where something is in the input: book file, sheet, cell.
///
/// A workbook's position reads `BOOK Accounts!F3`. A CSV folder's reads as
/// the file and line a user opens: `BOOK/accounts.csv, line 3, column
/// opening_balance`; the reader marks the positions of a CSV folder.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub struct Position {
    /// The book as given on the command line.
    pub book: String,
    /// The sheet (for a CSV folder, the file name without `.csv`).
    pub sheet: String,
    /// The cell in A1 notation, or empty for a whole sheet or file.
    pub cell: String,
    /// Whether the sheet is a CSV file of a folder, shown as a file and line.
    pub csv: bool,
    /// The header of the cell's column, where known (shown for a CSV file).
    pub column: String,
}

impl Position {
    /// The sheet as reports show it: a CSV sheet as its file name.
    ///
    /// ```
    /// use ledgerate::problem::Position;
    /// let p = Position { book: "book".into(), sheet: "accounts".into(), cell: "F3".into(), csv: true, column: "opening_balance".into() };
    /// assert_eq!(p.sheet_shown(), "accounts.csv");
    /// assert_eq!(p.cell_shown(), "line 3, column opening_balance");
    /// assert_eq!(p.to_string(), "book/accounts.csv, line 3, column opening_balance");
    /// ```
    pub fn sheet_shown(&self) -> String {
        if self.csv && !self.sheet.is_empty() {
            format!("{}.csv", self.sheet)
        } else {
            self.sheet.clone()
        }
    }

    /// The cell as reports show it: a CSV cell as its line (a CSV file's
    /// line is the sheet's row) and, where known, its column's header.
    pub fn cell_shown(&self) -> String {
        if !self.csv || self.cell.is_empty() {
            return self.cell.clone();
        }
        let (line, _) = parse_a1(&self.cell);
        if self.column.is_empty() {
            format!("line {line}")
        } else {
            format!("line {line}, column {}", self.column)
        }
    }

    /// The position a report row shows (book, [`Self::sheet_shown`],
    /// [`Self::cell_shown`]), read back: a CSV line becomes its whole row.
    ///
    /// ```
    /// use ledgerate::problem::Position;
    /// let p = Position::from_shown("book", "accounts.csv", "line 3, column opening_balance");
    /// assert_eq!((p.sheet.as_str(), p.cell.as_str(), p.csv), ("accounts", "3:3", true));
    /// assert_eq!(p.to_string(), "book/accounts.csv, line 3, column opening_balance");
    /// let q = Position::from_shown("book.xlsx", "Accounts", "F3");
    /// assert_eq!(q.to_string(), "book.xlsx Accounts!F3");
    /// ```
    pub fn from_shown(book: &str, sheet: &str, cell: &str) -> Position {
        let plain = || Position {
            book: book.to_string(),
            sheet: sheet.to_string(),
            cell: cell.to_string(),
            ..Position::default()
        };
        let Some(stem) = sheet.strip_suffix(".csv") else {
            return plain();
        };
        let (line, column) = match cell.strip_prefix("line ") {
            Some(rest) => match rest.split_once(", column ") {
                Some((n, c)) => (n, c),
                None => (rest, ""),
            },
            None if cell.is_empty() => ("", ""),
            None => return plain(),
        };
        let cell = match line.parse::<u64>() {
            Ok(n) => format!("{n}:{n}"),
            Err(_) if line.is_empty() => String::new(),
            Err(_) => return plain(),
        };
        Position {
            book: book.to_string(),
            sheet: stem.to_string(),
            cell,
            csv: true,
            column: column.to_string(),
        }
    }
}

impl fmt::Display for Position {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.csv && !self.sheet.is_empty() {
            // The file a user opens, then its line.
            let file = std::path::Path::new(&self.book).join(self.sheet_shown());
            write!(f, "{}", file.display())?;
            if !self.cell.is_empty() {
                write!(f, ", {}", self.cell_shown())?;
            }
            return Ok(());
        }
        match (self.sheet.is_empty(), self.cell.is_empty()) {
            (true, _) => write!(f, "{}", self.book),
            (false, true) => write!(f, "{} sheet {}", self.book, self.sheet),
            (false, false) => write!(f, "{} {}!{}", self.book, self.sheet, self.cell),
        }
    }
}

/// Where a typed row is, compact: its book, sheet and column held once
/// for every row of the sheet, its cell as numbers. It shows exactly as
/// the [`Position`] it stands for (see [`RowPosition::to_position`]).
///
/// ```
/// use std::sync::Arc;
/// use ledgerate::problem::{Position, RowPosition};
/// let sheet = Arc::new(Position { book: "b.xlsx".into(), sheet: "Accounts".into(), column: "account".into(), ..Position::default() });
/// let at = RowPosition::new(Arc::clone(&sheet), 2, Some(0));
/// assert_eq!(at.to_position().cell, "A3");
/// assert_eq!(at.to_string(), "b.xlsx Accounts!A3");
/// assert_eq!(RowPosition::new(sheet, 6, None).to_position().cell, "7:7");
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RowPosition {
    /// The book, sheet and column (the cell empty), shared by the sheet's rows.
    sheet: Arc<Position>,
    /// The 0-based row.
    row: u32,
    /// The 0-based column; [`WHOLE_ROW`]: the whole row (a number, not an
    /// `Option`, keeps a row's position at 16 bytes).
    col: u32,
}

/// The column of a [`RowPosition`] that stands for a whole row: no sheet
/// has that many columns.
const WHOLE_ROW: u32 = u32::MAX;

impl Default for RowPosition {
    fn default() -> RowPosition {
        RowPosition::new(Arc::default(), 0, None)
    }
}

impl RowPosition {
    /// Row `row` (0-based) at column `col` (0-based; `None`: the whole
    /// row) of `sheet`, a position whose cell is empty.
    pub fn new(sheet: Arc<Position>, row: u32, col: Option<u32>) -> RowPosition {
        RowPosition {
            sheet,
            row,
            col: col.unwrap_or(WHOLE_ROW),
        }
    }

    /// The 0-based column, `None` for a whole row.
    fn column(&self) -> Option<u32> {
        (self.col != WHOLE_ROW).then_some(self.col)
    }

    /// A position in A1 notation (`F3`, or `7:7` for a whole row) held
    /// compactly; `None` when its cell is neither.
    ///
    /// ```
    /// use ledgerate::problem::{Position, RowPosition};
    /// let p = Position { book: "b.xlsx".into(), sheet: "Accounts".into(), cell: "AB7".into(), ..Position::default() };
    /// assert_eq!(RowPosition::parse(p.clone()).map(|r| r.to_position()), Some(p));
    /// assert_eq!(RowPosition::parse(Position::default()), None);
    /// ```
    pub fn parse(mut position: Position) -> Option<RowPosition> {
        let (row, col) = parse_a1(&position.cell);
        let row = u32::try_from(row.checked_sub(1)?).ok()?;
        let col = match col.checked_sub(1) {
            Some(c) => Some(u32::try_from(c).ok()?),
            None => None,
        };
        let at = RowPosition::new(Arc::default(), row, col);
        if at.to_position().cell != position.cell {
            return None;
        }
        position.cell = String::new();
        Some(RowPosition::new(Arc::new(position), row, col))
    }

    /// The book, sheet and column it is in (its cell empty).
    pub fn sheet(&self) -> &Position {
        &self.sheet
    }

    /// The position it stands for, its cell in A1 notation.
    pub fn to_position(&self) -> Position {
        Position {
            cell: match self.column() {
                Some(c) => a1(self.row, c),
                None => a1_row(self.row),
            },
            ..(*self.sheet).clone()
        }
    }

    /// Marks it as in a CSV file (see [`Position::csv`]). `marked` holds
    /// the sheets already marked, each with its marked copy, so that the
    /// rows of one sheet go on sharing one.
    pub fn mark_csv(&mut self, marked: &mut Vec<(Arc<Position>, Arc<Position>)>) {
        if let Some((_, m)) = marked.iter().find(|(s, _)| Arc::ptr_eq(s, &self.sheet)) {
            self.sheet = Arc::clone(m);
            return;
        }
        let mut csv = (*self.sheet).clone();
        csv.csv = true;
        let csv = Arc::new(csv);
        marked.push((std::mem::replace(&mut self.sheet, Arc::clone(&csv)), csv));
    }
}

impl fmt::Display for RowPosition {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        self.to_position().fmt(f)
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
    /// The problem this one only follows from, when there is one: the
    /// terminal lists the cause and folds its follow-ons into one line.
    pub follows: Option<FollowOn>,
}

/// Why a problem only follows from another: an account left out because a
/// sheet it needs is missing or cannot be read. Fixing the cause fixes it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FollowOn {
    /// The book and sheet of the cause (the cell is empty).
    pub cause: Position,
    /// The kind of sheet, as the book format names it (`Rates`).
    pub label: String,
    /// Whether the sheet is missing (else it cannot be read).
    pub missing: bool,
}

impl FollowOn {
    /// Follows from a required sheet the book does not have.
    pub fn missing_sheet(book: &str, label: &str) -> FollowOn {
        FollowOn {
            cause: Position {
                book: book.to_string(),
                sheet: label.to_string(),
                ..Position::default()
            },
            label: label.to_string(),
            missing: true,
        }
    }

    /// Follows from a sheet of kind `label` (named `name` in the book) that
    /// cannot be read as a table.
    pub fn unreadable_sheet(book: &str, label: &str, name: &str) -> FollowOn {
        FollowOn {
            cause: Position {
                book: book.to_string(),
                sheet: name.to_string(),
                ..Position::default()
            },
            label: label.to_string(),
            missing: false,
        }
    }

    /// What completes "left out because ...": `the Rates sheet is missing`,
    /// or for a CSV folder `rates.csv is missing`.
    ///
    /// ```
    /// use ledgerate::problem::FollowOn;
    /// let mut f = FollowOn::missing_sheet("book", "Rates");
    /// assert_eq!(f.because(), "the Rates sheet is missing");
    /// f.cause.csv = true;
    /// assert_eq!(f.because(), "rates.csv is missing");
    /// let g = FollowOn::unreadable_sheet("book.xlsx", "Rates", "rate table");
    /// assert_eq!(g.because(), "the Rates sheet (rate table) cannot be read");
    /// ```
    pub fn because(&self) -> String {
        let what = if self.cause.csv {
            let name = if self.missing {
                self.label.to_lowercase()
            } else {
                self.cause.sheet.clone()
            };
            format!("{name}.csv")
        } else if self.cause.sheet == self.label || self.missing {
            format!("the {} sheet", self.label)
        } else {
            format!("the {} sheet ({})", self.label, self.cause.sheet)
        };
        if self.missing {
            format!("{what} is missing")
        } else {
            format!("{what} cannot be read")
        }
    }
}

impl Problem {
    /// What the problem says, without its severity and position: `found
    /// 'x'; expected y; fix`.
    ///
    /// ```
    /// use ledgerate::problem::{Position, Problem, Severity};
    /// let p = Problem {
    ///     severity: Severity::Error,
    ///     position: Position { book: "b.xlsx".into(), sheet: "Movements".into(), cell: "C5".into(), ..Position::default() },
    ///     account: Some("SAV-1".into()),
    ///     found: "12,5O".into(),
    ///     expected: "an amount".into(),
    ///     fix: "correct the amount".into(),
    ///     follows: None,
    /// };
    /// assert_eq!(p.words(), "found '12,5O'; expected an amount; correct the amount");
    /// assert_eq!(p.to_string(), "error: b.xlsx Movements!C5: found '12,5O'; expected an amount; correct the amount");
    /// ```
    pub fn words(&self) -> String {
        format!(
            "found {}; expected {}; {}",
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

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{}: {}: {}",
            self.severity.name(),
            self.position,
            self.words()
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
    problems.sort_by_cached_key(|p| report_order(&p.position, books));
}

/// Where a position comes in the order every report lists problems (see
/// [`sort_problems`]): by book (in the order of `books`), sheet (in the
/// order of the book format), row and column. Lists that follow the
/// Problems sheet (the accounts left out) sort by it too.
pub fn report_order(position: &Position, books: &[String]) -> (usize, usize, String, u64, u64) {
    let book = books
        .iter()
        .position(|b| *b == position.book)
        .unwrap_or(books.len());
    let sheet = position.sheet.to_lowercase();
    // A sheet whose name begins with one of the book format's sheet
    // names (case, spaces, `_` and `-` ignored) ranks in the format's
    // order; any other comes after them.
    let folded = fold(&sheet);
    let rank = SheetKind::ALL
        .iter()
        .position(|k| folded.starts_with(fold(k.label()).as_str()))
        .unwrap_or(SheetKind::ALL.len());
    let (row, col) = parse_a1(&position.cell);
    (book, rank, sheet, row, col)
}

/// `n` and the noun, plural unless `n` is 1: `1 problem`, `3 problems`,
/// `0 notes`. For the nouns of printed summaries, which all take an `s`.
///
/// ```
/// use ledgerate::problem::counted;
/// assert_eq!(counted(1, "problem"), "1 problem");
/// assert_eq!(counted(0, "note"), "0 notes");
/// assert_eq!(counted(33, "account"), "33 accounts");
/// ```
pub fn counted(n: usize, noun: &str) -> String {
    if n == 1 {
        format!("1 {noun}")
    } else {
        format!("{n} {noun}s")
    }
}

/// One line of a problem listing at the terminal.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Listed<'p> {
    /// A problem on its own line.
    One(&'p Problem),
    /// The follow-ons of one cause, folded into one line.
    Folded {
        /// What the accounts are left out because of.
        cause: &'p FollowOn,
        /// The follow-on problems, in report order.
        problems: Vec<&'p Problem>,
    },
}

impl Listed<'_> {
    /// How many problems the line stands for.
    pub fn len(&self) -> usize {
        match self {
            Listed::One(_) => 1,
            Listed::Folded { problems, .. } => problems.len(),
        }
    }

    /// Whether the line stands for no problem (never, for a line of [`by_cause`]).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
}

/// How many account ids a folded line names before "and N more".
const FOLDED_IDS_SHOWN: usize = 3;

impl fmt::Display for Listed<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Listed::One(p) => write!(f, "{p}"),
            Listed::Folded { cause, problems } => {
                let mut ids: Vec<&str> = Vec::new();
                for p in problems {
                    let id = p.account.as_deref().unwrap_or(&p.found);
                    if !ids.contains(&id) {
                        ids.push(id);
                    }
                }
                let severity = problems.first().map_or(Severity::Error, |p| p.severity);
                write!(
                    f,
                    "{}: {} left out because {}: ",
                    severity.name(),
                    counted(ids.len(), "account"),
                    cause.because()
                )?;
                let shown: Vec<&str> = ids.iter().take(FOLDED_IDS_SHOWN).copied().collect();
                write!(f, "{}", shown.join(", "))?;
                if ids.len() > shown.len() {
                    write!(f, " and {} more", ids.len() - shown.len())?;
                }
                Ok(())
            }
        }
    }
}

/// The problems (already in report order, see [`sort_problems`]) as the
/// terminal lists them, root causes first: for each sheet that other
/// problems follow from, that sheet's own problems, then one line folding
/// the problems that follow from it; then every other problem in order.
/// Nothing is left out: every problem is on exactly one line.
pub fn by_cause<'p>(problems: &[&'p Problem]) -> Vec<Listed<'p>> {
    // A missing sheet's error names the kind, in its own case.
    let same_sheet =
        |a: &Position, b: &Position| a.book == b.book && a.sheet.eq_ignore_ascii_case(&b.sheet);
    let mut causes: Vec<&Position> = Vec::new();
    let mut groups: Vec<(&'p FollowOn, Vec<&'p Problem>)> = Vec::new();
    for p in problems {
        let Some(fo) = &p.follows else { continue };
        if !causes.iter().any(|c| same_sheet(c, &fo.cause)) {
            causes.push(&fo.cause);
        }
        match groups.iter_mut().find(|(g, _)| *g == fo) {
            Some((_, members)) => members.push(p),
            None => groups.push((fo, vec![p])),
        }
    }
    let mut listed = Vec::with_capacity(problems.len());
    let mut shown = vec![false; problems.len()];
    for cause in causes {
        for (i, p) in problems.iter().enumerate() {
            if p.follows.is_none() && same_sheet(&p.position, cause) {
                listed.push(Listed::One(p));
                if let Some(s) = shown.get_mut(i) {
                    *s = true;
                }
            }
        }
        for (fo, members) in groups.iter().filter(|(fo, _)| same_sheet(&fo.cause, cause)) {
            listed.push(Listed::Folded {
                cause: fo,
                problems: members.clone(),
            });
        }
    }
    for (p, done) in problems.iter().zip(shown) {
        if !done && p.follows.is_none() {
            listed.push(Listed::One(p));
        }
    }
    listed
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
                ..Default::default()
            },
            account: None,
            found: String::new(),
            expected: String::new(),
            fix: String::new(),
            follows: None,
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

    fn follow_on(book: &str, cell: &str, id: &str) -> Problem {
        let mut p = at(book, "Accounts", cell);
        p.account = Some(id.into());
        p.found = id.into();
        p.follows = Some(FollowOn::missing_sheet(book, "Rates"));
        p
    }

    /// Found: a missing Rates sheet listed after 33 rate_ref errors, so the
    /// first ten lines never said what to fix. Expected: the cause first,
    /// then one line for the 33 accounts, then the other errors. Fix:
    /// `by_cause` orders causes first and folds their follow-ons.
    #[test]
    fn a_missing_sheet_comes_first_and_its_follow_ons_fold_into_one_line() {
        let mut problems: Vec<Problem> = (0..33)
            .map(|i| {
                follow_on(
                    "b.xlsx",
                    &format!("A{}", i + 2),
                    &format!("SAV-{:02}", i + 1),
                )
            })
            .collect();
        problems.push(at("b.xlsx", "Accounts", "C40"));
        problems.push(at("b.xlsx", "Rates", ""));
        sort_problems(&mut problems, &["b.xlsx".into()]);
        let all: Vec<&Problem> = problems.iter().collect();
        let lines = by_cause(&all);
        assert_eq!(lines.len(), 3);
        assert_eq!(lines.iter().map(Listed::len).sum::<usize>(), 35);
        let shown: Vec<String> = lines.iter().map(ToString::to_string).collect();
        assert!(
            shown[0].starts_with("error: b.xlsx sheet Rates: "),
            "{}",
            shown[0]
        );
        assert_eq!(
            shown[1],
            "error: 33 accounts left out because the Rates sheet is missing: SAV-01, SAV-02, SAV-03 and 30 more"
        );
        assert!(
            shown[2].starts_with("error: b.xlsx Accounts!C40: "),
            "{}",
            shown[2]
        );
    }

    /// One account naming two refs of a missing sheet counts once, in the
    /// singular; problems without follow-ons keep their order.
    #[test]
    fn a_folded_line_counts_accounts_once_in_the_singular() {
        let problems = [
            at("b.xlsx", "Accounts", "B2"),
            follow_on("b.xlsx", "A3", "SAV-1"),
            follow_on("b.xlsx", "Q3", "SAV-1"),
            at("b.xlsx", "Rates", ""),
        ];
        let all: Vec<&Problem> = problems.iter().collect();
        let shown: Vec<String> = by_cause(&all).iter().map(ToString::to_string).collect();
        assert_eq!(
            shown[1],
            "error: 1 account left out because the Rates sheet is missing: SAV-1"
        );
        assert!(shown[2].contains("Accounts!B2"));
        let plain: Vec<&Problem> = vec![&problems[0], &problems[3]];
        assert_eq!(
            by_cause(&plain),
            vec![Listed::One(&problems[0]), Listed::One(&problems[3])]
        );
    }

    #[test]
    fn counts_are_singular_only_for_one() {
        assert_eq!(counted(1, "error"), "1 error");
        assert_eq!(counted(0, "error"), "0 errors");
        assert_eq!(counted(2, "warning"), "2 warnings");
    }
}
