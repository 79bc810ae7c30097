//! Helpers shared by the integration tests: the program, the shipped books,
//! and reading a written workbook back. Tests only; they may unwrap.

use std::io::{Read, Write};
use std::path::{Path, PathBuf};

use assert_cmd::Command;
use calamine::{open_workbook_auto, Data, Reader};
use chrono::NaiveDate;
use rust_decimal::Decimal;

/// The `ledgerate` binary built for these tests.
pub fn ledgerate() -> Command {
    Command::cargo_bin("ledgerate").unwrap()
}

/// A fixture book under `tests/fixtures/books/`.
pub fn fixture(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/books")
        .join(name)
}

/// The sample month-end book as a workbook.
pub fn sample() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-books/harbourview-2026-11.xlsx")
}

/// The same sample book as a folder of CSV files.
pub fn sample_csv() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-books/harbourview-2026-11-csv")
}

/// Every row of one sheet of a workbook, as calamine reads it.
pub fn sheet(path: &Path, name: &str) -> Vec<Vec<Data>> {
    let mut wb = open_workbook_auto(path).unwrap();
    let range = wb.worksheet_range(name).unwrap();
    range.rows().map(|r| r.to_vec()).collect()
}

/// An exact decimal from its text.
pub fn dec(s: &str) -> Decimal {
    s.parse().unwrap()
}

/// A date from ISO text.
pub fn date(s: &str) -> NaiveDate {
    s.parse().unwrap()
}

/// The parts of a zip archive (an xlsx or ods workbook), by name, in
/// archive order.
pub fn unzip(data: &[u8]) -> Vec<(String, Vec<u8>)> {
    let mut archive = zip::ZipArchive::new(std::io::Cursor::new(data)).unwrap();
    (0..archive.len())
        .map(|i| {
            let mut entry = archive.by_index(i).unwrap();
            let mut content = Vec::new();
            entry.read_to_end(&mut content).unwrap();
            (entry.name().unwrap().to_string(), content)
        })
        .collect()
}

/// A zip archive of `parts`, in their order, with fixed times so that the
/// same parts give the same bytes.
pub fn rezip(parts: &[(String, Vec<u8>)]) -> Vec<u8> {
    let mut out = zip::ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let options = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated)
        .last_modified_time(zip::DateTime::default());
    for (name, content) in parts {
        out.start_file(name.as_str(), options).unwrap();
        out.write_all(content).unwrap();
    }
    out.finish().unwrap().into_inner()
}

/// Copies every file of the folder `from` into `to` (made if missing): a
/// CSV book to change or break without touching the shipped one.
pub fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let p = e.unwrap().path();
        std::fs::copy(&p, to.join(p.file_name().unwrap())).unwrap();
    }
}

/// The number format of one cell of a written workbook (empty when it has
/// none), 0-based row and column.
pub fn number_format(path: &Path, name: &str, row: u32, col: u32) -> String {
    let mut wb: calamine::Xlsx<_> = calamine::open_workbook(path).unwrap();
    let styles = wb.worksheet_style(name).unwrap();
    styles
        .get((row, col))
        .and_then(|s| s.number_format.clone())
        .map(|n| n.format_code)
        .unwrap_or_default()
}

/// The exact value of a number cell.
pub fn number(d: &Data) -> Decimal {
    match d {
        Data::Float(f) => f.to_string().parse().unwrap(),
        other => panic!("not a number: {other:?}"),
    }
}

/// The sheet names of a workbook, in order.
pub fn sheet_names(path: &Path) -> Vec<String> {
    open_workbook_auto(path).unwrap().sheet_names()
}
