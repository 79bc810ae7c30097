//! Helpers shared by the integration tests: the program, the shipped books,
//! and reading a written workbook back. Tests only; they may unwrap.

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
