//! Fuzzes `read_book` on a folder of CSV files. The input is split at each
//! 0x1E byte (the ASCII record separator) into accounts.csv, rates.csv,
//! movements.csv, statements.csv, settings.csv and holidays.csv, in that
//! order; each folder is read with and without the decimal-comma option.

#![no_main]

use ledgerate::book::{read_book, ReadOptions};
use libfuzzer_sys::fuzz_target;

#[path = "common.rs"]
mod common;

const FILES: [&str; 6] = [
    "accounts.csv",
    "rates.csv",
    "movements.csv",
    "statements.csv",
    "settings.csv",
    "holidays.csv",
];

fuzz_target!(|data: &[u8]| {
    common::install_panic_rule();
    let dir = common::scratch("csv").join("book");
    let _ = std::fs::remove_dir_all(&dir);
    if std::fs::create_dir_all(&dir).is_err() {
        return;
    }
    for (name, part) in FILES.iter().zip(data.split(|b| *b == 0x1E)) {
        if std::fs::write(dir.join(name), part).is_err() {
            return;
        }
    }
    for decimal_comma in [false, true] {
        let book = read_book(&dir, &ReadOptions { decimal_comma });
        common::check_contract(&book);
    }
});
