//! What can stop a workbook being written, or one of our workbooks being
//! read back.
//!
//! Every error says where it happened (the target path, or the sheet and row
//! being written or read) and how to get past it. Nothing here decides a figure.

use std::path::PathBuf;

/// A workbook that could not be written (no partial file is left behind: the
/// output only appears under its name once it is complete), or could not be
/// read back.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    /// The folder the workbook should go into does not exist.
    #[error("the output folder '{}' does not exist; create it or write the workbook elsewhere", .0.display())]
    MissingDirectory(PathBuf),
    /// The target names a folder, not a file.
    #[error("the output '{}' is a folder; give a file name such as '{}'", .0.display(), .0.join("reconciliation.xlsx").display())]
    TargetIsDirectory(PathBuf),
    /// The target is one of the run's input books.
    #[error("the output '{}' is one of the input books; write the workbook to another file so that no input is changed", .0.display())]
    TargetIsInput(PathBuf),
    /// A cell, sheet or workbook setting was refused by the spreadsheet writer.
    #[error("could not write sheet {sheet}{}: {source}", row_text(*.row))]
    Sheet {
        /// The sheet being written.
        sheet: String,
        /// The spreadsheet row (1-based), when one was being written.
        row: Option<u32>,
        /// What the writer said.
        #[source]
        source: rust_xlsxwriter::XlsxError,
    },
    /// The workbook could not be assembled or saved.
    #[error("could not assemble the workbook '{}': {source}", .path.display())]
    Save {
        /// The target path.
        path: PathBuf,
        /// What the writer said.
        #[source]
        source: rust_xlsxwriter::XlsxError,
    },
    /// The file system refused a step (temporary file, flush, rename).
    #[error("could not {action} '{}': {source}; check the folder exists, is writable and has free space", .path.display())]
    Io {
        /// What was being done, e.g. `create a temporary file beside`.
        action: &'static str,
        /// The path concerned.
        path: PathBuf,
        /// The operating system's error.
        #[source]
        source: std::io::Error,
    },
    /// The target exists and is not a regular file (a device, a FIFO, a
    /// socket, or a link to nothing): replacing it would destroy it.
    #[error("the output '{}' is {kind}, not a regular file; give the path of a file to create or replace", .path.display())]
    TargetNotFile {
        /// The target path.
        path: PathBuf,
        /// What it is, in words ("a device", "a FIFO"...).
        kind: &'static str,
    },
    /// The spreadsheet writer stopped while writing (it stops this way when
    /// the disk is full or a file size limit is reached).
    #[error("the spreadsheet writer stopped writing '{}': {message}; check that the output folder is writable and has free space, then run again (any earlier file of that name is unchanged)", .path.display())]
    Stopped {
        /// The target path.
        path: PathBuf,
        /// What the writer said.
        message: String,
    },
    /// The Accruals' layout (its column groups and the usual format of its
    /// amounts) was decided from the accounts before they were accrued, and
    /// the lines that came differ from that plan (some account's computation
    /// stopped): the workbook is left unwritten, and is written again from
    /// the whole list of lines.
    #[error("the Accruals of '{}' were laid out for accounts whose computation stopped; write the workbook again from the whole run", .0.display())]
    PlanMissed(PathBuf),
    /// A workbook to read back cannot be opened as a workbook.
    #[error("cannot open {path} as a workbook: {why}")]
    Unreadable {
        /// The workbook.
        path: PathBuf,
        /// What went wrong.
        why: String,
    },
    /// A sheet or cell of a workbook read back is not what the writer writes.
    #[error("{path} {sheet}!{cell}: found {found}; expected {expected}: merge only takes workbooks written by `ledgerate run --shard`")]
    NotWritten {
        /// The workbook.
        path: PathBuf,
        /// The sheet.
        sheet: String,
        /// The cell (A1), the row (`1:1`), or empty for the whole sheet.
        cell: String,
        /// What was there.
        found: String,
        /// What the writer writes there.
        expected: String,
    },
    /// A row or cell of a CSV file read back is not what the writer writes.
    #[error("{} row {row}: found {found}; expected {expected}: merge only takes the Journal detail files written by `ledgerate run --shard K/N --journal-detail csv`", .path.display())]
    NotWrittenCsv {
        /// The file.
        path: PathBuf,
        /// The row (1 is the header).
        row: u64,
        /// What was there.
        found: String,
        /// What the writer writes there.
        expected: String,
    },
    /// A fixed value of the writer itself is out of range (a defect of the program).
    #[error("internal error in the workbook writer: {0}; please report it")]
    Internal(String),
}

/// ` row 12` or nothing, for messages.
fn row_text(row: Option<u32>) -> String {
    row.map(|r| format!(" row {r}")).unwrap_or_default()
}

impl ReportError {
    /// A writer error on a whole sheet (no particular row).
    pub(crate) fn sheet(sheet: &str, source: rust_xlsxwriter::XlsxError) -> ReportError {
        ReportError::Sheet {
            sheet: sheet.to_string(),
            row: None,
            source,
        }
    }

    /// A writer error on a 0-based row of a sheet (reported 1-based, as a
    /// spreadsheet shows it).
    pub(crate) fn cell(sheet: &str, row: u32, source: rust_xlsxwriter::XlsxError) -> ReportError {
        ReportError::Sheet {
            sheet: sheet.to_string(),
            row: Some(row.saturating_add(1)),
            source,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn messages_name_the_place_and_the_way_out() {
        let e = ReportError::cell(
            "Daily",
            9,
            rust_xlsxwriter::XlsxError::MaxStringLengthExceeded,
        );
        assert!(e
            .to_string()
            .starts_with("could not write sheet Daily row 10: "));
        let e = ReportError::MissingDirectory(PathBuf::from("/no/such"));
        assert_eq!(
            e.to_string(),
            "the output folder '/no/such' does not exist; create it or write the workbook elsewhere"
        );
    }
}
