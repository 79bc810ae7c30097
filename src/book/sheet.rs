//! The sheet model: a sheet that was read (its kind, its name and its rows,
//! held as cells or as a CSV file's text), and the sheets of a book with the
//! problems met opening it.
//!
//! This module never knows what a column means, and opens a file only to
//! read again a CSV file checked when the book was opened; a CSV sheet's
//! rows are parsed from its text on each pass, so a sheet costs its text,
//! not a heap value per cell, and only while it is typed.

use std::borrow::Cow;

use super::cell::shown;
use super::csv_folder::CheckedCsv;
use super::csv_records::{line_breaks, CsvRows};
use super::row::Row;
use crate::problem::{Position, Problem, Severity};
use crate::schema::SheetKind;

/// One sheet that was read.
#[derive(Debug, Clone)]
pub(crate) struct Sheet {
    /// What the sheet is.
    pub kind: SheetKind,
    /// The name to show in positions (a CSV file: its name without `.csv`).
    pub name: String,
    /// Rows with at least one non-blank cell, in order.
    pub rows: Rows,
}

/// Where a sheet's rows are: held as cells (a workbook sheet), or the text
/// of a CSV file that was checked when the book was opened and is parsed
/// again, a record at a time, on each pass over the rows. A CSV sheet so
/// costs its file's text, not a heap value per cell.
#[derive(Debug, Clone)]
pub(crate) enum Rows {
    /// Rows of cells.
    Held(Vec<Row>),
    /// The text of a CSV file that parses without a fault.
    Csv(String),
    /// A CSV file checked when the book was opened, its text not yet read
    /// again (see [`Sheet::read_text`]): it has no rows until then.
    CsvFile(CheckedCsv),
}

impl Sheet {
    /// The sheet ready to type: a checked CSV file's text read again. The
    /// `Err` gives the sheet back when the file is no longer the one checked.
    pub(crate) fn read_text(mut self) -> Result<Sheet, Sheet> {
        if let Rows::CsvFile(checked) = &self.rows {
            match checked.text() {
                Some(text) => self.rows = Rows::Csv(text),
                None => return Err(self),
            }
        }
        Ok(self)
    }

    /// The rows with at least one non-blank cell, in order.
    pub(crate) fn rows(&self) -> SheetRows<'_> {
        match &self.rows {
            Rows::Held(rows) => SheetRows::Held(rows.iter()),
            Rows::Csv(text) => SheetRows::Csv(CsvRows::new(text, true)),
            // Never typed before its text is read again.
            Rows::CsvFile(_) => SheetRows::Held([].iter()),
        }
    }

    /// At least as many as the sheet's rows (a CSV sheet's lines), to make
    /// room for its typed rows at once rather than by doubling: room never
    /// written takes no memory.
    pub(crate) fn rows_hint(&self) -> usize {
        match &self.rows {
            Rows::Held(rows) => rows.len(),
            Rows::Csv(text) => usize::try_from(line_breaks(text.as_bytes()))
                .unwrap_or(0)
                .saturating_add(1),
            Rows::CsvFile(_) => 0,
        }
    }

    /// A CSV sheet's records with their shapes and no cells (cheaper when
    /// only the shapes matter); `None` for a workbook sheet.
    pub(crate) fn shapes(&self) -> Option<impl Iterator<Item = Row> + '_> {
        match &self.rows {
            Rows::Held(_) | Rows::CsvFile(_) => None,
            Rows::Csv(text) => {
                let mut rows = CsvRows::new(text, false);
                Some(std::iter::from_fn(move || rows.next_row()?.ok()))
            }
        }
    }
}

/// The rows of a sheet, one at a time: borrowed when held, built from the
/// text when the sheet is a CSV file.
pub(crate) enum SheetRows<'a> {
    /// Held rows.
    Held(std::slice::Iter<'a, Row>),
    /// A CSV file's records.
    Csv(CsvRows<'a>),
}

impl<'a> Iterator for SheetRows<'a> {
    type Item = Cow<'a, Row>;

    fn next(&mut self) -> Option<Cow<'a, Row>> {
        match self {
            SheetRows::Held(rows) => rows.next().map(Cow::Borrowed),
            // The text parsed without a fault when the book was opened; a
            // fault now (never expected) ends the rows.
            SheetRows::Csv(rows) => rows.next_row()?.ok().map(Cow::Owned),
        }
    }
}

/// The sheets of a book and the problems met opening it.
#[derive(Debug, Default)]
pub(crate) struct Loaded {
    /// Sheets of known kinds, at most one of each.
    pub sheets: Vec<Sheet>,
    /// Book- and sheet-level problems.
    pub problems: Vec<Problem>,
}

impl Loaded {
    /// Records a book- or sheet-level problem; `found` is cut to a length a
    /// message can show.
    pub(crate) fn problem(
        &mut self,
        severity: Severity,
        position: Position,
        found: &str,
        expected: &str,
        fix: &str,
    ) {
        self.problems.push(Problem {
            severity,
            position,
            account: None,
            found: shown(found),
            expected: expected.to_string(),
            fix: fix.to_string(),
            follows: None,
        });
    }
}

/// A sheet of text cells, row by row from A1, for tests.
#[cfg(test)]
pub(crate) fn text_sheet(kind: SheetKind, rows: &[&[&str]]) -> Sheet {
    Sheet {
        kind,
        name: kind.label().to_string(),
        rows: Rows::Held(
            rows.iter()
                .zip(0u32..)
                .map(|(cells, r)| Row {
                    index: r,
                    cells: cells
                        .iter()
                        .zip(0u32..)
                        .map(|(s, c)| (c, super::cell::Cell::text(s)))
                        .filter(|(_, c)| !c.is_empty())
                        .collect(),
                    shape: None,
                })
                .filter(|r| !r.cells.is_empty())
                .collect(),
        ),
    }
}
