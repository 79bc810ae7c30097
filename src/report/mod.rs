//! Writing the output workbook from a [`model::Report`] (and reading it
//! back), the blank input book of `ledgerate template`, and the sample books
//! of `ledgerate sample`.
//!
//! The writer only lays out figures it is given: it computes nothing but
//! layout and formats, reads no clock and no input book. It writes to a
//! temporary file beside the target and renames it into place only when
//! complete.
//!
//! * [`workbook`] holds the sheets of the reconciliation workbook and where
//!   each figure goes ([`write_report`]).
//! * [`cells`] is the one border where a decimal becomes a spreadsheet number
//!   (the only module that names `f64`), with the 15-digit rule.
//! * [`layout`] has the formats, palette, column widths and continuation sheets.
//! * [`template`] writes the blank input book ([`write_template`]).
//! * [`book_writer`] writes input books row by row, as a workbook or a CSV
//!   folder (the sample books of `ledgerate sample`).
//! * [`readback`] reads a workbook the writer wrote back into its rows, by
//!   the writer's own header labels (for `ledgerate merge`).
//! * [`journal_csv`] writes the journal as CSV files (the import file of
//!   `--journal-csv`, the Journal detail of `--journal-detail csv`) and
//!   reads that detail back.
//! * `output` (private) does the temporary file, flush and rename.

pub mod book_writer;
pub mod cells;
mod error;
pub mod journal_csv;
pub mod layout;
pub mod model;
mod output;
pub mod readback;
pub mod template;
pub mod workbook;

#[cfg(test)]
mod tests;

pub use cells::TextFigure;
pub use error::ReportError;
pub use template::write_template;
pub use workbook::{write_report, SheetRows, WriteOutcome};
