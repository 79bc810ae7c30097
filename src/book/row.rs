//! A row of a sheet as read: its index, its non-blank cells by column and,
//! for a CSV record, how many fields it has.
//!
//! Plain data shared by every reader and the table. This module never reads
//! a file and never interprets a cell.

use super::cell::Cell;

/// A row of a sheet: its 0-based index and its non-blank cells by column.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Row {
    /// 0-based row index in the sheet (a CSV file: its line number less one).
    pub index: u32,
    /// Non-blank cells, by 0-based column, ascending.
    pub cells: Vec<(u32, Cell)>,
    /// A CSV record's fields (a workbook row has none).
    pub shape: Option<Shape>,
}

/// How many fields a CSV record has, for the ragged-row check.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Shape {
    /// All fields.
    pub fields: u32,
    /// Fields up to the last non-blank one.
    pub filled: u32,
}
