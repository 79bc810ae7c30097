//! Opening a book at a path: a folder of CSV files, or a workbook file
//! (xlsx, xlsm, xlsb, xls, ods) read by the reader for its format; then the
//! check that the required sheets are there.
//!
//! Files are only ever opened for reading. A path that cannot be read, or a
//! file that is empty, truncated or not a workbook, gives one problem about
//! the book, never a panic: a panic inside the workbook library becomes a
//! problem about the file. This module never reads a cell itself and never
//! knows what a column means.

use std::fs::{self, File};
use std::io::BufReader;
use std::path::Path;

use calamine::{Ods, Xls};

use super::cell::lower_first;
use super::csv_folder::read_csv_folder;
use super::limits::{self, Refusal};
use super::picking::check_required;
use super::sheet::Loaded;
use super::sniff::{workbook_format, Format, Unreadable};
use super::{workbook, xlsx};
use crate::problem::{Position, Severity};

/// Reads the book at `path` (a workbook file or a CSV folder). `book` is the
/// name positions carry.
pub(crate) fn load(path: &Path, book: &str) -> Loaded {
    let mut loaded = Loaded::default();
    let at_book = || Position {
        book: book.to_string(),
        ..Position::default()
    };
    let meta = match fs::metadata(path) {
        Ok(m) => m,
        Err(e) => {
            loaded.problem(
                Severity::Error,
                at_book(),
                &path.display().to_string(),
                "a readable workbook file or folder of CSV files",
                &format!(
                    "check the path and that it may be read ({})",
                    lower_first(&e.to_string())
                ),
            );
            return loaded;
        }
    };
    if meta.is_dir() {
        read_csv_folder(path, book, &mut loaded);
        check_required(book, &mut loaded, true);
        return loaded;
    }
    let format = match workbook_format(path) {
        Ok(f) => f,
        Err(e) => {
            loaded.problem(Severity::Error, at_book(), &e.found, &e.expected, &e.fix);
            return loaded;
        }
    };
    // What the file declares is bounded before the workbook library
    // allocates from it; a panic in the archive or XML parsers under the
    // check is a damaged file, as it is in the library.
    let bounded = crate::panics::quietly(|| limits::check(path, format)).unwrap_or_else(|_| {
        Err(Refusal::damaged(
            format,
            "a workbook the reader could not take apart".to_string(),
        ))
    });
    if let Err(r) = bounded {
        loaded.problem(Severity::Error, at_book(), &r.found, &r.expected, &r.fix);
        return loaded;
    }
    match read_workbook(path, book, format) {
        Ok(l) => loaded = l,
        Err(e) => {
            loaded.problem(Severity::Error, at_book(), &e.found, &e.expected, &e.fix);
            return loaded;
        }
    }
    check_required(book, &mut loaded, false);
    loaded
}

/// Reads every sheet of a known kind of a workbook in `format`. A file the
/// reader cannot take apart (damaged, truncated) is the `Err`.
fn read_workbook(path: &Path, book: &str, format: Format) -> Result<Loaded, Unreadable> {
    // calamine indexes into buffers of a malformed file in places; a panic
    // there must become a problem about the file, not end the run, and
    // print nothing of its own.
    let read = crate::panics::quietly(|| match format {
        Format::Xlsx => xlsx::read(path, book),
        Format::Xlsb => workbook::read_xlsb(path, book),
        Format::Xls => workbook::read_parsed::<Xls<BufReader<File>>>(path, book),
        Format::Ods => workbook::read_parsed::<Ods<BufReader<File>>>(path, book),
    });
    match read {
        Ok(Ok(loaded)) => Ok(loaded),
        Ok(Err(message)) => Err(Unreadable {
            found: message,
            expected: format!("a complete {} workbook", format.name()),
            fix:
                "the file is damaged or truncated: save the book again from the spreadsheet program"
                    .to_string(),
        }),
        Err(_) => Err(Unreadable {
            found: "a workbook the reader could not take apart".to_string(),
            expected: format!("a complete {} workbook", format.name()),
            fix: "the file is damaged: save the book again from the spreadsheet program"
                .to_string(),
        }),
    }
}
