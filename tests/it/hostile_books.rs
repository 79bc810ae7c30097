//! Workbook files of a few kilobytes whose declared sizes would make the
//! workbook library ask for terabytes: a shared-strings count in the
//! trillions (xlsx), a row repeated past the end of the sheet or a filled
//! row repeated thousands of times across every column (ods), a cell
//! asking for two billion spaces (ods), a DIMENSIONS record of four
//! billion rows and a cell in the last row and column a BIFF record can
//! name (xls). Each is made here from a good fixture by patching bytes.
//! Each must be one error naming the book (and the sheet, where the file
//! says it), read in process and by the real program, which must end with
//! an exit status, not a signal, inside a memory limit.

use std::path::{Path, PathBuf};
use std::process::Command as Process;
use std::time::Duration;

use ledgerate::book::{read_book, Book, ReadOptions};
use ledgerate::problem::Severity;

use crate::common::{fixture, rezip, unzip};

/// The fixture `name` with its part `part` edited by `edit`, written as
/// `out` in `dir`.
fn patched_part(
    dir: &Path,
    name: &str,
    part: &str,
    out: &str,
    edit: impl Fn(&str) -> String,
) -> PathBuf {
    let mut parts = unzip(&std::fs::read(fixture(name)).unwrap());
    let (_, content) = parts.iter_mut().find(|(n, _)| n == part).unwrap();
    let before = String::from_utf8(content.clone()).unwrap();
    let after = edit(&before);
    assert_ne!(before, after, "the patch of {part} changed nothing");
    *content = after.into_bytes();
    let path = dir.join(out);
    std::fs::write(&path, rezip(&parts)).unwrap();
    path
}

/// `text` with `with` inserted right after the first `after` that follows
/// the first `anchor`.
fn insert_after(text: &str, anchor: &str, after: &str, with: &str) -> String {
    let from = text.find(anchor).unwrap();
    let at = from + text[from..].find(after).unwrap() + after.len();
    format!("{}{with}{}", &text[..at], &text[at..])
}

/// The good xls fixture with the bytes at `offset` from the first record
/// starting `record` replaced by `bytes`.
fn patched_xls(dir: &Path, out: &str, record: &[u8], offset: usize, bytes: &[u8]) -> PathBuf {
    let mut data = std::fs::read(fixture("harbourview_good.xls")).unwrap();
    let at = data
        .windows(record.len())
        .position(|w| w == record)
        .unwrap()
        + offset;
    data[at..at + bytes.len()].copy_from_slice(bytes);
    let path = dir.join(out);
    std::fs::write(&path, data).unwrap();
    path
}

/// The book's one problem: an error about the whole file (none of it is
/// read), whose words include each of `words`; no accounts.
fn refused(book: &Book, words: &[&str]) {
    let all: Vec<String> = book.problems.iter().map(ToString::to_string).collect();
    assert_eq!(book.problems.len(), 1, "{all:#?}");
    let p = &book.problems[0];
    assert_eq!(p.severity, Severity::Error, "{all:#?}");
    assert_eq!(p.position.book, book.path.display().to_string());
    assert_eq!(p.position.sheet, "", "{all:#?}");
    let text = format!("{} {} {}", p.found, p.expected, p.fix);
    for w in words {
        assert!(text.contains(w), "no '{w}' in: {text}");
    }
    assert!(book.accounts.is_empty());
}

/// Runs `ledgerate check` on `path` in a 4 GiB address space with a
/// deadline: it must end with an exit status (no abort, no signal) and
/// name the file and each of `words`.
fn check_survives(path: &Path, words: &[&str]) {
    let program = env!("CARGO_BIN_EXE_ledgerate");
    let mut child = Process::new("sh")
        .arg("-c")
        .arg("ulimit -v 4194304; exec \"$0\" check \"$1\"")
        .arg(program)
        .arg(path)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    let deadline = std::time::Instant::now() + Duration::from_secs(120);
    while child.try_wait().unwrap().is_none() {
        assert!(
            std::time::Instant::now() < deadline,
            "check of {} hangs",
            path.display()
        );
        std::thread::sleep(Duration::from_millis(50));
    }
    let out = child.wait_with_output().unwrap();
    let text = format!(
        "{}{}",
        String::from_utf8_lossy(&out.stdout),
        String::from_utf8_lossy(&out.stderr)
    );
    assert_eq!(out.status.code(), Some(2), "{:?}: {text}", out.status);
    assert!(text.contains(&path.display().to_string()), "{text}");
    for w in words {
        assert!(text.contains(w), "no '{w}' in: {text}");
    }
}

#[test]
fn an_xlsx_declaring_trillions_of_shared_strings_is_refused_naming_the_count() {
    let dir = tempfile::tempdir().unwrap();
    let path = patched_part(
        dir.path(),
        "harbourview_good.xlsx",
        "xl/sharedStrings.xml",
        "sst.xlsx",
        |t| {
            t.replace(
                "count=\"185\" uniqueCount=\"140\"",
                "count=\"9999999999999\" uniqueCount=\"9999999999999\"",
            )
        },
    );
    assert!(std::fs::metadata(&path).unwrap().len() < 20_000);
    let book = read_book(&path, &ReadOptions::default());
    refused(
        &book,
        &[
            "9,999,999,999,999 shared strings",
            "uniqueCount",
            "xl/sharedStrings.xml",
            "save the book again",
        ],
    );
    check_survives(&path, &["9,999,999,999,999 shared strings"]);
}

#[test]
fn an_ods_row_repeated_past_the_last_row_is_refused_naming_the_sheet() {
    let dir = tempfile::tempdir().unwrap();
    let path = patched_part(
        dir.path(),
        "harbourview_good.ods",
        "content.xml",
        "rows.ods",
        |t| {
            insert_after(
                t,
                "table:name=\"Accounts\"",
                "<table:table-row",
                " table:number-rows-repeated=\"4000000000\"",
            )
        },
    );
    let book = read_book(&path, &ReadOptions::default());
    refused(
        &book,
        &["row 4,000,000,000", "1,048,576 rows", "sheet 'Accounts'"],
    );
    check_survives(&path, &["row 4,000,000,000", "sheet 'Accounts'"]);
}

#[test]
fn an_ods_filled_row_repeated_thousands_of_times_across_every_column_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let path = patched_part(
        dir.path(),
        "harbourview_good.ods",
        "content.xml",
        "wide.ods",
        |t| {
            let t = insert_after(
                t,
                "table:name=\"Accounts\"",
                "<table:table-row",
                " table:number-rows-repeated=\"5000\"",
            );
            insert_after(
                &t,
                "table:name=\"Accounts\"",
                "<table:table-cell",
                " table:number-columns-repeated=\"16000\"",
            )
        },
    );
    let book = read_book(&path, &ReadOptions::default());
    refused(
        &book,
        &[
            "cells in all",
            "16,777,216 cells",
            "sheet 'Accounts'",
            "save the book as xlsx",
        ],
    );
    check_survives(&path, &["16,777,216 cells"]);
}

#[test]
fn an_ods_cell_asking_for_two_billion_spaces_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let path = patched_part(
        dir.path(),
        "harbourview_good.ods",
        "content.xml",
        "spaces.ods",
        |t| {
            insert_after(
                t,
                "table:name=\"Accounts\"",
                "<text:p>",
                "<text:s text:c=\"2000000000\"/>",
            )
        },
    );
    let book = read_book(&path, &ReadOptions::default());
    refused(
        &book,
        &[
            "2,000,000,000 spaces",
            "32,767 characters",
            "sheet 'Accounts'",
        ],
    );
    check_survives(&path, &["2,000,000,000 spaces"]);
}

#[test]
fn an_xls_dimensions_record_of_four_billion_rows_is_refused_naming_the_sheet() {
    let dir = tempfile::tempdir().unwrap();
    // DIMENSIONS: type 0x0200, 14 bytes; the row past the last at +8.
    let path = patched_xls(
        dir.path(),
        "dims.xls",
        &[0x00, 0x02, 0x0E, 0x00],
        8,
        &[0xFF; 4],
    );
    let book = read_book(&path, &ReadOptions::default());
    refused(
        &book,
        &[
            "DIMENSIONS",
            "4,294,967,295 rows",
            "65,536 rows",
            "sheet 'Accounts'",
        ],
    );
    check_survives(&path, &["4,294,967,295 rows"]);
}

#[test]
fn an_xls_cell_in_the_last_row_and_column_a_record_can_name_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    // LabelSst: type 0x00FD, 10 bytes; row and column at +4 and +6.
    let path = patched_xls(
        dir.path(),
        "far.xls",
        &[0xFD, 0x00, 0x0A, 0x00],
        4,
        &[0xFF; 4],
    );
    let book = read_book(&path, &ReadOptions::default());
    refused(
        &book,
        &[
            "row 65,536, column 65,536",
            "256 columns",
            "sheet 'Accounts'",
        ],
    );
    check_survives(&path, &["column 65,536"]);
}

#[test]
fn an_ods_cell_of_long_text_repeated_across_rows_and_columns_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let path = patched_part(
        dir.path(),
        "harbourview_good.ods",
        "content.xml",
        "text.ods",
        |t| {
            let t = insert_after(
                t,
                "table:name=\"Accounts\"",
                "<table:table-row",
                " table:number-rows-repeated=\"1000\"",
            );
            let t = insert_after(
                &t,
                "table:name=\"Accounts\"",
                "<table:table-cell",
                " table:number-columns-repeated=\"1000\"",
            );
            insert_after(
                &t,
                "table:name=\"Accounts\"",
                "<text:p>",
                "<text:s text:c=\"30000\"/>",
            )
        },
    );
    let book = read_book(&path, &ReadOptions::default());
    refused(
        &book,
        &[
            "characters of cell text",
            "sheet 'Accounts'",
            "save the book as xlsx",
        ],
    );
    check_survives(&path, &["characters of cell text"]);
}
