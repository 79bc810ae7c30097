//! Format sniffing: which workbook format a file is, from its extension and
//! what its first bytes say it is, or why it is no workbook at all.
//!
//! This module only looks at a file (its first bytes; a zip of unknown
//! extension, whole, for its kind): it never reads a sheet, never opens a
//! file for writing, and never guesses a format the bytes contradict.

use std::fs::{self, File};
use std::io::Read;
use std::path::Path;

use super::cell::lower_first;

/// What a file's first bytes say it is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Content {
    /// A zip archive: xlsx, xlsm, xlsb or ods.
    Zip,
    /// An OLE compound file: xls (or an encrypted xlsx).
    Ole,
    /// Anything else.
    Other,
}

fn sniff(head: &[u8]) -> Content {
    if head.starts_with(b"PK\x03\x04") {
        Content::Zip
    } else if head.starts_with(&[0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1]) {
        Content::Ole
    } else {
        Content::Other
    }
}

/// The workbook formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Format {
    Xlsx,
    Xlsb,
    Xls,
    Ods,
}

impl Format {
    /// The format's name in messages.
    pub(crate) fn name(self) -> &'static str {
        match self {
            Format::Xlsx => "xlsx",
            Format::Xlsb => "xlsb",
            Format::Xls => "xls",
            Format::Ods => "ods",
        }
    }

    fn content(self) -> Content {
        match self {
            Format::Xls => Content::Ole,
            _ => Content::Zip,
        }
    }

    /// The format a (lower-case) extension names, if any.
    fn named_by(extension: &str) -> Option<Format> {
        match extension {
            "xlsx" | "xlsm" | "xltx" | "xltm" | "xlam" => Some(Format::Xlsx),
            "xlsb" => Some(Format::Xlsb),
            "xls" | "xla" => Some(Format::Xls),
            "ods" => Some(Format::Ods),
            _ => None,
        }
    }
}

/// Why a file cannot be read as a book: what its one problem says.
#[derive(Debug)]
pub(crate) struct Unreadable {
    /// What was found.
    pub found: String,
    /// What was expected.
    pub expected: String,
    /// How to fix it.
    pub fix: String,
}

impl Unreadable {
    fn new(found: &str, expected: &str, fix: &str) -> Self {
        Unreadable {
            found: found.to_string(),
            expected: expected.to_string(),
            fix: fix.to_string(),
        }
    }
}

/// The workbook format of the file at `path` (not a folder): the one its
/// extension names when its first bytes agree, else the one its first bytes
/// say when the extension names none.
pub(crate) fn workbook_format(path: &Path) -> Result<Format, Unreadable> {
    let head = read_head(path).map_err(|e| {
        Unreadable::new(
            &path.display().to_string(),
            "a readable workbook file",
            &format!(
                "check that the file may be read ({})",
                lower_first(&e.to_string())
            ),
        )
    })?;
    if head.is_empty() {
        return Err(Unreadable::new(
            "an empty file",
            "a workbook (.xlsx, .xlsm, .xlsb, .xls, .ods) or a folder of CSV files",
            "the file has no bytes: save the book again from the spreadsheet program",
        ));
    }
    let extension = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    if extension == "csv" {
        return Err(Unreadable::new(
            &path.display().to_string(),
            "a workbook, or a folder of CSV files named after the sheets (accounts.csv, rates.csv...)",
            "put the CSV files in a folder and give the folder as the book",
        ));
    }
    match (Format::named_by(&extension), sniff(&head)) {
        (Some(f), c) if f.content() == c => Ok(f),
        (Some(f), _) => Err(Unreadable::new(
            &format!(
                "a file named .{extension} that is not an {} workbook",
                f.name()
            ),
            &format!("an {} workbook", f.name()),
            "save the book again from the spreadsheet program in the format its name says",
        )),
        (None, Content::Zip) => Ok(zip_kind(path)),
        (None, Content::Ole) => Ok(Format::Xls),
        (None, Content::Other) => Err(Unreadable::new(
            &path.display().to_string(),
            "a workbook (.xlsx, .xlsm, .xlsb, .xls, .ods) or a folder of CSV files",
            "the file is not a workbook: give a workbook or a folder of CSV files",
        )),
    }
}

/// The first bytes of a file, for sniffing.
fn read_head(path: &Path) -> std::io::Result<Vec<u8>> {
    let mut head = Vec::with_capacity(8);
    File::open(path)?.take(8).read_to_end(&mut head)?;
    Ok(head)
}

/// Which zip-based format a file of unknown extension is: an ODS file names
/// its type first; an xlsb holds `xl/workbook.bin`; anything else is tried as xlsx.
fn zip_kind(path: &Path) -> Format {
    let Ok(bytes) = fs::read(path) else {
        return Format::Xlsx;
    };
    let has = |needle: &[u8]| bytes.windows(needle.len()).any(|w| w == needle);
    let start = bytes.get(..200).unwrap_or(&bytes);
    if start
        .windows(46)
        .any(|w| w == b"application/vnd.oasis.opendocument.spreadsheet")
    {
        Format::Ods
    } else if has(b"xl/workbook.bin") {
        Format::Xlsb
    } else {
        Format::Xlsx
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn first_bytes_say_zip_ole_or_neither() {
        assert_eq!(sniff(b"PK\x03\x04rest"), Content::Zip);
        assert_eq!(
            sniff(&[0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1, 0]),
            Content::Ole
        );
        assert_eq!(sniff(b"account,currency\n"), Content::Other);
        assert_eq!(sniff(b"PK"), Content::Other);
    }

    #[test]
    fn extensions_name_formats_that_agree_with_their_bytes() {
        assert_eq!(Format::named_by("xlsm"), Some(Format::Xlsx));
        assert_eq!(Format::named_by("xla"), Some(Format::Xls));
        assert_eq!(Format::named_by("csv"), None);
        assert_eq!(Format::Xls.content(), Content::Ole);
        assert_eq!(Format::Ods.content(), Content::Zip);
    }
}
