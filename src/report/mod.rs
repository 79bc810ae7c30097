//! Writing the output workbook from a [`model::Report`], and the blank input
//! book of `ledgerate template`.
//!
//! The writer only lays out figures it is given: it computes nothing but
//! layout and formats, reads no clock and no input book. It writes to a
//! temporary file beside the target and renames it into place only when
//! complete.
//!
//! * [`workbook`]: the sheets of the reconciliation workbook and where each
//!   figure goes; [`write_report`].
//! * [`cells`]: the one border where a decimal becomes a spreadsheet number
//!   (the only module that names `f64`), and the 15-digit rule.
//! * [`layout`]: formats, palette, column widths, continuation sheets.
//! * [`template`]: [`write_template`].
//! * [`output`] (private): temporary file, flush, rename.

pub mod cells;
mod error;
pub mod layout;
pub mod model;
mod output;
pub mod template;
pub mod workbook;

#[cfg(test)]
mod tests;

pub use cells::TextFigure;
pub use error::ReportError;
pub use template::write_template;
pub use workbook::{write_report, SheetRows, WriteOutcome};
