//! The CSV folder reader: a folder of CSV files named after the sheets,
//! each file decoded (UTF-8 with or without a byte-order mark, or UTF-16
//! with one) and checked to parse once, then read again when its sheet is
//! typed: a book holds the text of the sheets being typed, not of all.
//!
//! Only regular files (or links to them) are opened, and only for reading;
//! a sheet file that is a FIFO, a device or a link to nothing is an error
//! naming it. Files are read in name order so problems come out
//! the same on every system. A file that cannot be decoded or parsed gives
//! one problem naming its line, never a panic and never a partial sheet.
//! This module never knows what a column means.

use std::fs;
use std::path::{Path, PathBuf};

use super::cell::lower_first;
use super::csv_records::{line_breaks, CsvRows};
use super::picking::unused_sheet;
use super::sheet::{Loaded, Rows, Sheet};
use crate::problem::{Position, Severity};
use crate::schema::SheetKind;

/// Reads a folder of CSV files. Each file named after a sheet becomes that
/// sheet; other CSV files are noted and other files ignored.
pub(crate) fn read_csv_folder(dir: &Path, book: &str, loaded: &mut Loaded) {
    let entries = match fs::read_dir(dir) {
        Ok(e) => e,
        Err(e) => {
            loaded.problem(
                Severity::Error,
                Position {
                    book: book.to_string(),
                    ..Position::default()
                },
                &dir.display().to_string(),
                "a readable folder of CSV files",
                &format!(
                    "check that the folder may be read ({})",
                    lower_first(&e.to_string())
                ),
            );
            return;
        }
    };
    // Every entry named .csv, whatever it is: a sheet file that is not a
    // regular file is an error naming it, never an absent sheet.
    let mut files: Vec<(String, std::path::PathBuf)> = entries
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x.eq_ignore_ascii_case("csv")))
        .filter_map(|p| Some((p.file_stem()?.to_string_lossy().into_owned(), p)))
        .collect();
    // Directory order differs between systems; name order keeps problems stable.
    files.sort();
    let mut picked: Vec<(SheetKind, String)> = Vec::new();
    for (stem, file) in files {
        let at = Position {
            book: book.to_string(),
            sheet: stem.clone(),
            cell: String::new(),
            ..Position::default()
        };
        let Some(kind) = SheetKind::from_name(&stem) else {
            // Only regular files are noted; nothing else is opened.
            if file.is_file() {
                unused_sheet(&stem, at, loaded);
            }
            continue;
        };
        if let Some(what) = not_a_regular_file(&file) {
            loaded.problem(
                Severity::Error,
                at,
                &format!("{stem}.csv, {what}"),
                &format!("a {} file that can be read", kind.label()),
                &format!(
                    "put the CSV file itself in the folder as {stem}.csv (only regular files, or links to them, are read)"
                ),
            );
            continue;
        }
        if let Some((_, first)) = picked.iter().find(|(k, _)| *k == kind) {
            loaded.problem(
                Severity::Error,
                at,
                &format!("{stem}.csv"),
                &format!("one {} file", kind.label()),
                &format!(
                    "{first}.csv is already the {} sheet: merge the two or rename one",
                    kind.label()
                ),
            );
            continue;
        }
        picked.push((kind, stem.clone()));
        if let Some(checked) = read_csv_file(&file, book, &stem, loaded) {
            loaded.sheets.push(Sheet {
                kind,
                name: stem,
                rows: Rows::CsvFile(checked),
            });
        }
    }
}

/// A CSV file that decodes and parses without a fault, as checked when
/// the book was opened; its text is read again when its sheet is typed.
#[derive(Debug, Clone)]
pub(crate) struct CheckedCsv {
    /// The file.
    path: PathBuf,
    /// Its length in bytes when checked.
    len: usize,
    /// A digest of its bytes when checked.
    digest: u64,
}

impl CheckedCsv {
    /// The file's text, read again; `None` when it can no longer be read
    /// or is not the file that was checked (changed since).
    pub(crate) fn text(&self) -> Option<String> {
        // A FIFO or device put in its place is never opened: it could block.
        if not_a_regular_file(&self.path).is_some() {
            return None;
        }
        let bytes = fs::read(&self.path).ok()?;
        if bytes.len() != self.len || digest(&bytes) != self.digest {
            return None;
        }
        decode_csv_owned(bytes).ok()
    }
}

/// A digest of a file's bytes that tells an accidental change (an edit, a
/// save over it) from the file as checked.
fn digest(bytes: &[u8]) -> u64 {
    let mut words = bytes.chunks_exact(8);
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for w in &mut words {
        let mut b = [0u8; 8];
        b.copy_from_slice(w);
        h = (h ^ u64::from_le_bytes(b)).wrapping_mul(0x0100_0000_01b3);
        h ^= h >> 29;
    }
    for &b in words.remainder() {
        h = (h ^ u64::from(b)).wrapping_mul(0x0100_0000_01b3);
    }
    h
}

/// What a path is when it is not a regular file (or a link to one), in
/// words: it is never opened, since a FIFO or a device could block or
/// never end.
fn not_a_regular_file(path: &Path) -> Option<&'static str> {
    if fs::symlink_metadata(path).is_err() {
        return Some("a file that cannot be looked at");
    }
    if path.is_dir() {
        return Some("a folder");
    }
    crate::files::special_kind(path)
}

/// The text of a CSV file: UTF-8 with or without a byte-order mark, or
/// UTF-16 with one. The `Err` is (found, fix).
fn decode_csv(bytes: &[u8]) -> Result<String, (String, String)> {
    const SAVE_UTF8: &str = "save the file as CSV UTF-8 (comma delimited)";
    if let Some(rest) = bytes.strip_prefix(&[0xEF, 0xBB, 0xBF]) {
        return utf8(rest).map_err(|f| (f, SAVE_UTF8.to_string()));
    }
    let utf16 = |rest: &[u8], little: bool| -> Result<String, (String, String)> {
        let chunks = rest.chunks_exact(2);
        if !chunks.remainder().is_empty() {
            return Err((
                "UTF-16 text with an odd number of bytes".to_string(),
                SAVE_UTF8.to_string(),
            ));
        }
        let units = chunks.map(|p| match p {
            [a, b] if little => u16::from_le_bytes([*a, *b]),
            [a, b] => u16::from_be_bytes([*a, *b]),
            _ => 0,
        });
        char::decode_utf16(units)
            .collect::<Result<String, _>>()
            .map_err(|_| {
                (
                    "UTF-16 text with a broken character".to_string(),
                    SAVE_UTF8.to_string(),
                )
            })
    };
    if let Some(rest) = bytes.strip_prefix(&[0xFF, 0xFE]) {
        return utf16(rest, true);
    }
    if let Some(rest) = bytes.strip_prefix(&[0xFE, 0xFF]) {
        return utf16(rest, false);
    }
    if bytes.contains(&0) {
        return Err((
            "text with NUL bytes (UTF-16 without a byte-order mark?)".to_string(),
            SAVE_UTF8.to_string(),
        ));
    }
    utf8(bytes).map_err(|f| (f, SAVE_UTF8.to_string()))
}

/// [`decode_csv`] on a file's bytes, without copying UTF-8 text. The `Err`
/// gives the bytes back with (found, fix).
fn decode_csv_owned(mut bytes: Vec<u8>) -> Result<String, (Vec<u8>, (String, String))> {
    const BOM: [u8; 3] = [0xEF, 0xBB, 0xBF];
    let plain = !bytes.starts_with(&[0xFF, 0xFE])
        && !bytes.starts_with(&[0xFE, 0xFF])
        && !bytes.contains(&0);
    if plain {
        let bom = bytes.starts_with(&BOM);
        if bom {
            bytes.drain(..BOM.len());
        }
        match String::from_utf8(bytes) {
            Ok(text) => return Ok(text),
            Err(e) => {
                bytes = e.into_bytes();
                if bom {
                    bytes.splice(0..0, BOM);
                }
            }
        }
    }
    match decode_csv(&bytes) {
        Ok(text) => Ok(text),
        Err(e) => Err((bytes, e)),
    }
}

fn utf8(bytes: &[u8]) -> Result<String, String> {
    utf8_at(bytes).map_err(|(_, found)| found)
}

/// UTF-8 text, or the line and a description of the first bad byte.
fn utf8_at(bytes: &[u8]) -> Result<String, (u64, String)> {
    match std::str::from_utf8(bytes) {
        Ok(s) => Ok(s.to_string()),
        Err(e) => {
            let at = e.valid_up_to();
            let line = bytes.get(..at).map_or(0, line_breaks) + 1;
            let byte = bytes.get(at).copied().unwrap_or(0);
            Err((
                line,
                format!("byte 0x{byte:02X} on line {line}, which is not UTF-8"),
            ))
        }
    }
}

/// Reads one CSV file and checks that it parses: its encoding, its quotes,
/// its separator. Gives the file as checked, read again into rows when the
/// sheet is typed.
fn read_csv_file(file: &Path, book: &str, stem: &str, loaded: &mut Loaded) -> Option<CheckedCsv> {
    let at = |cell: String| Position {
        book: book.to_string(),
        sheet: stem.to_string(),
        cell,
        ..Position::default()
    };
    let bytes = match fs::read(file) {
        Ok(b) => b,
        Err(e) => {
            loaded.problem(
                Severity::Error,
                at(String::new()),
                &format!("{stem}.csv"),
                "a readable CSV file",
                &format!(
                    "check that the file may be read ({})",
                    lower_first(&e.to_string())
                ),
            );
            return None;
        }
    };
    let (len, sum) = (bytes.len(), digest(&bytes));
    let text = match decode_csv_owned(bytes) {
        Ok(t) => t,
        Err((bytes, (found, fix))) => {
            let line = utf8_at(bytes.strip_prefix(&[0xEF, 0xBB, 0xBF]).unwrap_or(&bytes))
                .err()
                .map_or(0, |(l, _)| l);
            loaded.problem(
                Severity::Error,
                at(line_ref(line)),
                &found,
                "UTF-8 text (with or without a byte-order mark) or UTF-16 with a byte-order mark",
                &fix,
            );
            return None;
        }
    };
    let mut rows = CsvRows::new(&text, false);
    while let Some(row) = rows.next_row() {
        if let Err(fault) = row {
            loaded.problem(
                Severity::Error,
                at(line_ref(fault.line)),
                &fault.found,
                fault.expected,
                &fault.fix,
            );
            return None;
        }
    }
    Some(CheckedCsv {
        path: file.to_path_buf(),
        len,
        digest: sum,
    })
}

/// A 1-based line as an A1 row reference.
fn line_ref(line: u64) -> String {
    if line == 0 {
        String::new()
    } else {
        format!("{line}:{line}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn csv_text_in_utf8_utf8_with_bom_and_utf16_with_bom() {
        assert_eq!(decode_csv(b"a,b\n").unwrap(), "a,b\n");
        assert_eq!(decode_csv(b"\xEF\xBB\xBFa,b\n").unwrap(), "a,b\n");
        let le: Vec<u8> = [0xFF, 0xFE]
            .into_iter()
            .chain("a,é\n".encode_utf16().flat_map(u16::to_le_bytes))
            .collect();
        assert_eq!(decode_csv(&le).unwrap(), "a,é\n");
        let be: Vec<u8> = [0xFE, 0xFF]
            .into_iter()
            .chain("a,é\n".encode_utf16().flat_map(u16::to_be_bytes))
            .collect();
        assert_eq!(decode_csv(&be).unwrap(), "a,é\n");
    }

    /// A file is typed from the text that was checked: changed (or gone)
    /// after the check, it is not read at all.
    #[test]
    fn a_checked_file_is_read_again_only_while_it_is_unchanged() {
        let dir = tempfile::tempdir().unwrap();
        let file = dir.path().join("accounts.csv");
        fs::write(&file, "\u{FEFF}account,currency\nHM-1,USD\n").unwrap();
        let mut loaded = Loaded::default();
        let checked = read_csv_file(&file, "book", "accounts", &mut loaded).unwrap();
        assert!(loaded.problems.is_empty());
        assert_eq!(
            checked.text().as_deref(),
            Some("account,currency\nHM-1,USD\n")
        );
        fs::write(&file, "account,currency\nHM-2,USD\n").unwrap();
        assert_eq!(checked.text(), None);
        fs::remove_file(&file).unwrap();
        assert_eq!(checked.text(), None);
    }

    #[test]
    fn the_digest_tells_one_byte_changed_or_moved() {
        let a = digest(b"HM-1,USD,100.00\nHM-2,EUR,200.00\n");
        assert_ne!(a, digest(b"HM-1,USD,100.00\nHM-2,EUR,200.01\n"));
        assert_ne!(a, digest(b"HM-2,EUR,200.00\nHM-1,USD,100.00\n"));
        assert_eq!(a, digest(b"HM-1,USD,100.00\nHM-2,EUR,200.00\n"));
    }

    #[test]
    fn csv_text_in_other_encodings_is_refused_with_a_fix() {
        let (found, fix) = decode_csv(b"account\nHM-SAV-001,Caf\xE9\n").unwrap_err();
        assert!(found.contains("line 2"), "{found}");
        assert!(fix.contains("UTF-8"));
        let no_bom: Vec<u8> = "a,b".encode_utf16().flat_map(u16::to_le_bytes).collect();
        assert!(decode_csv(&no_bom).unwrap_err().0.contains("UTF-16"));
        assert!(decode_csv(&[0xFF, 0xFE, 0x41])
            .unwrap_err()
            .0
            .contains("odd"));
    }
}
