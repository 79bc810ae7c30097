//! Bounds on what a workbook file declares, checked before the workbook
//! library sees the file: the library sizes buffers from counts the file
//! states (a shared-string count, a sheet's dimensions, a row repeated to
//! the end of the sheet) and parses xls and ods files whole into dense
//! grids, so a damaged or hostile file of a kilobyte could ask for
//! terabytes and end the process.
//!
//! This module only reads, and never allocates from a size a file
//! declares: each part is streamed, and a count is trusted only once the
//! bytes that hold it are seen. A file past a bound is one problem naming
//! the file and, where known, the sheet. It never reads a cell's value.

use std::fs::File;
use std::io::{self, BufRead, BufReader, Read};
use std::path::Path;

use quick_xml::events::{BytesStart, Event};
use quick_xml::Reader as XmlReader;
use zip::ZipArchive;

use super::sniff::Format;
use super::{biff, ods_span};

/// The rows of an xlsx or ods sheet.
pub(crate) const MAX_ROWS: u64 = 1_048_576;
/// The columns of an xlsx or ods sheet.
pub(crate) const MAX_COLUMNS: u64 = 16_384;
/// The rows of an xls sheet.
pub(crate) const XLS_ROWS: u64 = 65_536;
/// The columns of an xls sheet.
pub(crate) const XLS_COLUMNS: u64 = 256;
/// The most cells the sheets of a workbook parsed whole (xls, ods) may
/// span in all: one full xls sheet. The library holds each sheet as a
/// dense grid of values and one of formulas, about 56 bytes a cell, so
/// this is about 0.9 GB at most.
pub(crate) const CELL_BUDGET: u64 = XLS_ROWS * XLS_COLUMNS;
/// The most characters of cell text an ods workbook may hold, repeated
/// cells counted each time (the library copies the text into each).
pub(crate) const TEXT_BUDGET: u64 = 1 << 28;
/// The most characters a cell holds.
pub(crate) const CELL_CHARS: u64 = 32_767;
/// The fewest bytes one shared string takes in its part (`<si/>`).
const SHARED_STRING_BYTES: u64 = 5;
/// Deflate's largest ratio of output to input bytes.
const DEFLATE_RATIO: u64 = 1_032;
/// Past this many declared shared strings the part is decompressed to
/// count its bytes before the count is trusted (below it, the library's
/// reservation is at most 24 MiB).
const SHARED_STRINGS_TRUSTED: u64 = 1 << 20;

/// Why a file is refused before it is read: what its one problem says.
/// The problem is about the file (none of it is read); the sheet, where
/// known, is named in what was expected.
#[derive(Debug, PartialEq, Eq)]
pub(crate) struct Refusal {
    /// What was found (short: a message shows 60 characters of it).
    pub found: String,
    /// What was expected.
    pub expected: String,
    /// How to fix it.
    pub fix: String,
}

/// The fix for a file whose structure is damaged.
pub(crate) const DAMAGED: &str =
    "the file is damaged or was not written by a spreadsheet program: save the book again from the spreadsheet program";

impl Refusal {
    pub(crate) fn damaged(format: Format, found: String) -> Self {
        Refusal {
            found,
            expected: format!("a complete {} workbook", format.name()),
            fix: DAMAGED.to_string(),
        }
    }
}

/// Checks what the workbook at `path` declares against the bounds, before
/// the workbook library reads it. A file that cannot be opened or taken
/// apart here passes: the library then says what is wrong with it.
pub(crate) fn check(path: &Path, format: Format) -> Result<(), Refusal> {
    match format {
        Format::Xlsx => shared_strings(path),
        Format::Ods => ods_span::check(path),
        Format::Xls => biff::check(path),
        // xlsb sheets are streamed and its counts are capped by the library.
        Format::Xlsb => Ok(()),
    }
}

/// A number with thousands separators, for messages.
pub(crate) fn grouped(n: u64) -> String {
    let digits = n.to_string();
    let mut out = String::with_capacity(digits.len() + digits.len() / 3);
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(',');
        }
        out.push(c);
    }
    out
}

/// The cells the sheets of one workbook span, added up sheet by sheet
/// against the bounds of its format.
pub(crate) struct Spans {
    format: Format,
    rows: u64,
    columns: u64,
    used: u64,
}

impl Spans {
    /// Spans for sheets of at most `rows` by `columns`.
    pub(crate) fn new(format: Format, rows: u64, columns: u64) -> Self {
        Spans {
            format,
            rows,
            columns,
            used: 0,
        }
    }

    /// Adds a sheet spanning `rows` by `columns` (as the library would
    /// hold it); the `Err` names the sheet and the bound it passes.
    pub(crate) fn add(&mut self, sheet: &str, rows: u64, columns: u64) -> Result<(), Refusal> {
        let name = self.format.name();
        if rows > self.rows || columns > self.columns {
            return Err(Refusal {
                found: format!("{} rows by {} columns", grouped(rows), grouped(columns)),
                expected: format!(
                    "at most {} rows and {} columns in sheet '{sheet}', as an {name} sheet holds",
                    grouped(self.rows),
                    grouped(self.columns)
                ),
                fix: DAMAGED.to_string(),
            });
        }
        self.used = self.used.saturating_add(rows.saturating_mul(columns));
        if self.used > CELL_BUDGET {
            return Err(Refusal {
                found: format!("sheets spanning {} cells in all", grouped(self.used)),
                expected: format!(
                    "at most {} cells across the sheets of an {name} workbook, which is read whole (sheet '{sheet}' spans {} rows by {} columns)",
                    grouped(CELL_BUDGET),
                    grouped(rows),
                    grouped(columns)
                ),
                fix: "remove stray cells far below or right of the data (or rows repeated to the end of the sheet), or save the book as xlsx, which is read cell by cell".to_string(),
            });
        }
        Ok(())
    }
}

/// An XML reader over a part, lenient as the workbook library is.
pub(crate) fn xml<R: BufRead>(part: R) -> XmlReader<R> {
    let mut reader = XmlReader::from_reader(part);
    let config = reader.config_mut();
    config.check_end_names = false;
    config.check_comments = false;
    config.trim_text(false);
    reader
}

/// The value of attribute `key` of an element, as text.
pub(crate) fn attribute(e: &BytesStart<'_>, key: &str) -> Option<String> {
    e.attributes()
        .with_checks(false)
        .filter_map(Result::ok)
        .find(|a| a.key.as_ref() == key)
        .map(|a| a.value.into_owned())
}

/// An xlsx shared-strings part may declare no more strings
/// (`uniqueCount`, which the library reserves room for) than its bytes
/// can hold.
fn shared_strings(path: &Path) -> Result<(), Refusal> {
    let Ok(file) = File::open(path) else {
        return Ok(());
    };
    let file_len = file.metadata().map_or(0, |m| m.len());
    let Ok(mut zip) = ZipArchive::new(BufReader::new(file)) else {
        return Ok(());
    };
    let parts: Vec<String> = zip
        .file_names()
        .filter_map(Result::ok)
        .filter(|n| n.to_ascii_lowercase().ends_with("sharedstrings.xml"))
        .map(|n| n.into_owned())
        .collect();
    for part in parts {
        let Ok(member) = zip.by_name(&part) else {
            continue;
        };
        // The sizes the archive states are claims too: deflate cannot
        // expand its input more than DEFLATE_RATIO times.
        let packed = member.compressed_size().min(file_len);
        let room = member.size().min(packed.saturating_mul(DEFLATE_RATIO));
        let Some(declared) = unique_count(member) else {
            continue;
        };
        let refuse = |bytes: u64| {
            Refusal {
            found: format!("{} shared strings declared", grouped(declared)),
            expected: format!(
                "no more shared strings (uniqueCount) than the {} bytes of {part} hold, {SHARED_STRING_BYTES} bytes each at least",
                grouped(bytes)
            ),
            fix: DAMAGED.to_string(),
        }
        };
        let needed = declared.saturating_mul(SHARED_STRING_BYTES);
        if needed > room {
            return Err(refuse(room));
        }
        if declared > SHARED_STRINGS_TRUSTED {
            // A large count is trusted once the bytes are there.
            let seen = zip
                .by_name(&part)
                .ok()
                .and_then(|m| io::copy(&mut m.take(needed), &mut io::sink()).ok());
            match seen {
                Some(seen) if seen >= needed => {}
                Some(seen) => return Err(refuse(seen)),
                None => return Err(refuse(0)),
            }
        }
    }
    Ok(())
}

/// The `uniqueCount` of a shared-strings part's `sst` element, when it
/// states one within the part's first MiB.
fn unique_count<R: Read>(part: R) -> Option<u64> {
    let mut reader = xml(BufReader::new(part.take(1 << 20)));
    let mut buf = Vec::new();
    loop {
        buf.clear();
        match reader.read_event_into(&mut buf) {
            Ok(Event::Start(e) | Event::Empty(e)) if e.local_name().as_ref() == "sst" => {
                return attribute(&e, "uniqueCount")?.parse().ok();
            }
            Ok(Event::Eof) | Err(_) => return None,
            Ok(_) => {}
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_in_messages_are_grouped_in_thousands() {
        assert_eq!(grouped(0), "0");
        assert_eq!(grouped(999), "999");
        assert_eq!(grouped(1_000), "1,000");
        assert_eq!(grouped(4_294_967_295), "4,294,967,295");
    }

    #[test]
    fn sheets_past_the_rows_columns_or_cells_of_their_format_are_refused() {
        let mut spans = Spans::new(Format::Xls, XLS_ROWS, XLS_COLUMNS);
        assert!(spans.add("Accounts", 65_536, 256).is_ok());
        let over = spans.add("Rates", 1, 1).unwrap_err();
        assert!(over.expected.contains("sheet 'Rates'"), "{}", over.expected);
        assert!(over.found.contains("16,777,217 cells"), "{}", over.found);
        let mut spans = Spans::new(Format::Ods, MAX_ROWS, MAX_COLUMNS);
        let wide = spans.add("Accounts", 1, 16_385).unwrap_err();
        assert!(
            wide.expected.contains("16,384 columns"),
            "{}",
            wide.expected
        );
    }
}
