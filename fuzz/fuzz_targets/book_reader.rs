//! Fuzzes `read_book` on a workbook file: the bytes are written to a file
//! without an extension, so the reader picks the format by content (xlsx,
//! xlsb, ods or xls) and then reads every sheet it finds.

#![no_main]

use ledgerate::book::{read_book, ReadOptions};
use libfuzzer_sys::fuzz_target;

#[path = "common.rs"]
mod common;

fuzz_target!(|data: &[u8]| {
    common::install_panic_rule();
    let path = common::scratch("book").join("book");
    if std::fs::write(&path, data).is_err() {
        return;
    }
    let book = read_book(&path, &ReadOptions::default());
    common::check_contract(&book);
});
