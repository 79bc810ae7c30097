//! The book reader on damaged real books: bytes of the Harbourview Mutual
//! fixtures (xlsx archives, the XML parts inside them, ods and xls files,
//! CSV text) mutated at random by proptest, and each mutant read. Whatever
//! the bytes, `read_book` must return a book, without a panic escaping, and
//! keep its contract (`contract_violations` is empty).
//!
//! Case counts are modest so that the test runs in seconds; the fuzz targets
//! under `fuzz/` run the same reader for as long as one likes. Inputs that
//! once broke a promise are kept under `tests/fixtures/fuzz/` and read here.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::{Path, PathBuf};

use ledgerate::book::{contract_violations, read_book, Book, ReadOptions};
use ledgerate::problem::Severity;
use proptest::prelude::*;

use crate::common::{rezip, unzip};

fn fixture(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

fn bytes(rel: &str) -> Vec<u8> {
    std::fs::read(fixture(rel)).unwrap()
}

/// One change to a byte string; positions wrap around its length.
#[derive(Debug, Clone)]
enum Mutation {
    Flip { at: usize, bit: u8 },
    Set { at: usize, to: u8 },
    Insert { at: usize, what: Vec<u8> },
    Delete { at: usize, len: usize },
    Truncate { at: usize },
    Repeat { at: usize, len: usize },
}

fn mutation() -> impl Strategy<Value = Mutation> {
    // Bytes that matter to the formats: digits, separators, quotes, markup.
    let interesting = prop::sample::select(vec![
        b'0', b'9', b'-', b'.', b',', b';', b'"', b'\n', b'\r', b'<', b'>', b'/', b'=', b'#', 0x00,
        0xFF, 0xEF, 0xBB, 0xBF, 0xFE,
    ]);
    prop_oneof![
        (any::<usize>(), 0u8..8).prop_map(|(at, bit)| Mutation::Flip { at, bit }),
        (any::<usize>(), interesting.clone()).prop_map(|(at, to)| Mutation::Set { at, to }),
        (any::<usize>(), prop::collection::vec(interesting, 1..6))
            .prop_map(|(at, what)| Mutation::Insert { at, what }),
        (any::<usize>(), 1usize..64).prop_map(|(at, len)| Mutation::Delete { at, len }),
        any::<usize>().prop_map(|at| Mutation::Truncate { at }),
        (any::<usize>(), 1usize..256).prop_map(|(at, len)| Mutation::Repeat { at, len }),
    ]
}

fn apply(data: &mut Vec<u8>, m: &Mutation) {
    if data.is_empty() {
        if let Mutation::Insert { what, .. } = m {
            data.extend_from_slice(what);
        }
        return;
    }
    let n = data.len();
    match m {
        Mutation::Flip { at, bit } => data[at % n] ^= 1 << bit,
        Mutation::Set { at, to } => data[at % n] = *to,
        Mutation::Insert { at, what } => {
            let at = at % (n + 1);
            data.splice(at..at, what.iter().copied());
        }
        Mutation::Delete { at, len } => {
            let at = at % n;
            data.drain(at..(at + len).min(n));
        }
        Mutation::Truncate { at } => data.truncate(at % n),
        Mutation::Repeat { at, len } => {
            let at = at % n;
            let piece: Vec<u8> = data[at..(at + len).min(n)].to_vec();
            data.splice(at..at, piece);
        }
    }
}

/// Reads `path`; fails the case if a panic escapes or a promise is broken.
fn read_survives(path: &Path, options: &ReadOptions) -> Result<Book, TestCaseError> {
    let book = catch_unwind(AssertUnwindSafe(|| read_book(path, options)))
        .map_err(|_| TestCaseError::fail(format!("read_book panicked on {}", path.display())))?;
    let broken = contract_violations(&book);
    prop_assert!(broken.is_empty(), "{}", broken.join("\n"));
    Ok(book)
}

const WORKBOOKS: &[&str] = &[
    "tests/fixtures/books/harbourview_good.xlsx",
    "tests/fixtures/books/harbourview_broken.xlsx",
    "tests/fixtures/books/dates_1904.xlsx",
    "tests/fixtures/books/harbourview_good.ods",
    "tests/fixtures/books/harbourview_good.xls",
    "tests/bad-books/formula_cached_values.xlsx",
];

const CSV_FOLDERS: &[&str] = &[
    "tests/fixtures/books/harbourview_good_csv",
    "tests/fixtures/books/harbourview_broken_csv",
    "tests/bad-books/utf16_csv",
    "tests/bad-books/decimal_comma_without_option_csv",
];

proptest! {
    #![proptest_config(ProptestConfig { cases: 128, ..ProptestConfig::default() })]

    /// Whole workbook files damaged byte by byte, read under their own name
    /// and under no extension (the reader then goes by content).
    #[test]
    fn a_damaged_workbook_file_is_a_problem_never_a_panic(
        which in 0..WORKBOOKS.len(),
        mutations in prop::collection::vec(mutation(), 1..6),
        by_content in any::<bool>(),
    ) {
        let source = WORKBOOKS[which];
        let mut data = bytes(source);
        for m in &mutations {
            apply(&mut data, m);
        }
        let dir = tempfile::tempdir().unwrap();
        let name = if by_content {
            "book".to_string()
        } else {
            Path::new(source).file_name().unwrap().to_string_lossy().into_owned()
        };
        let path = dir.path().join(name);
        std::fs::write(&path, &data).unwrap();
        read_survives(&path, &ReadOptions::default())?;
    }

    /// One XML part of a good xlsx (a sheet, the shared strings, the styles
    /// or the workbook) damaged, the archive made whole again: the damage
    /// reaches the sheet parser and the cells, not only the zip layer.
    #[test]
    fn a_damaged_part_inside_a_whole_archive_is_a_problem_never_a_panic(
        which in 0..3usize,
        part in any::<prop::sample::Index>(),
        mutations in prop::collection::vec(mutation(), 1..8),
    ) {
        let mut parts = unzip(&bytes(WORKBOOKS[which]));
        let xml: Vec<usize> = parts
            .iter()
            .enumerate()
            .filter(|(_, (n, _))| n.starts_with("xl/") && n.ends_with(".xml"))
            .map(|(i, _)| i)
            .collect();
        let target = xml[part.index(xml.len())];
        for m in &mutations {
            apply(&mut parts[target].1, m);
        }
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("book.xlsx");
        std::fs::write(&path, rezip(&parts)).unwrap();
        read_survives(&path, &ReadOptions::default())?;
    }

    /// One CSV file of a folder damaged, read with and without a decimal comma.
    #[test]
    fn a_damaged_csv_file_is_a_problem_never_a_panic(
        which in 0..CSV_FOLDERS.len(),
        file in any::<prop::sample::Index>(),
        mutations in prop::collection::vec(mutation(), 1..8),
    ) {
        let source = fixture(CSV_FOLDERS[which]);
        let dir = tempfile::tempdir().unwrap();
        let mut names: Vec<PathBuf> = std::fs::read_dir(&source)
            .unwrap()
            .map(|e| e.unwrap().path())
            .collect();
        names.sort();
        let target = file.index(names.len());
        for (i, p) in names.iter().enumerate() {
            let mut data = std::fs::read(p).unwrap();
            if i == target {
                for m in &mutations {
                    apply(&mut data, m);
                }
            }
            std::fs::write(dir.path().join(p.file_name().unwrap()), data).unwrap();
        }
        for decimal_comma in [false, true] {
            read_survives(dir.path(), &ReadOptions { decimal_comma })?;
        }
    }
}

/// Found by the book_reader fuzz target: the good book as xls, whose mutated Accounts
/// sheet repeats HM-BUS-006 on the next row. The reader was right (the first
/// row stands, the second is an error); the fuzz contract was too strict and
/// now allows exactly this.
#[test]
fn fuzz_crash_259cdb93_a_repeated_account_row_keeps_the_first() {
    let path = fixture("tests/fixtures/fuzz/crash-259cdb93-duplicate-id-row.xls");
    let book = read_book(&path, &ReadOptions::default());
    assert_eq!(contract_violations(&book), Vec::<String>::new());
    let repeat = book
        .problems
        .iter()
        .find(|p| p.severity == Severity::Error && p.found == "HM-BUS-006")
        .expect("the repeated row is an error");
    assert_eq!(repeat.position.cell, "A8");
    assert!(repeat.expected.contains("already in A7"), "{repeat}");
    let kept = book
        .accounts
        .iter()
        .find(|a| a.terms.id == "HM-BUS-006")
        .expect("the first row stands");
    assert_eq!(kept.position.to_position().cell, "A7");
}

/// A date cell holding -1e300 once made the calendar arithmetic of the xlsx
/// library panic inside the reader's guard, and the whole book was reported
/// as a damaged file. Now it is one bad cell.
#[test]
fn a_hugely_negative_date_serial_is_one_bad_cell_not_a_lost_book() {
    let path = fixture("tests/bad-books/date_serial_negative.xlsx");
    let book = read_book(&path, &ReadOptions::default());
    let errors: Vec<_> = book
        .problems
        .iter()
        .filter(|p| p.severity == Severity::Error)
        .collect();
    assert_eq!(errors.len(), 1, "{errors:?}");
    assert_eq!(
        (
            errors[0].position.sheet.as_str(),
            errors[0].position.cell.as_str()
        ),
        ("Movements", "B2")
    );
    assert!(!book.unreadable());
    assert_eq!(book.accounts.len(), 1);
}

/// Found by the CSV mutations: a movement record short of fields was left
/// out with an error, but its account was still computed, on a balance
/// missing that movement. Now the account is kept out, as for any bad
/// movement row.
#[test]
fn mutation_ragged_movement_row_keeps_its_account_out() {
    let path = fixture("tests/bad-books/ragged_movement_row_csv");
    let book = read_book(&path, &ReadOptions::default());
    assert_eq!(contract_violations(&book), Vec::<String>::new());
    let ragged = book
        .problems
        .iter()
        .find(|p| p.severity == Severity::Error && p.position.cell == "2:2")
        .expect("the short record is an error");
    assert_eq!(ragged.account.as_deref(), Some("HM-SAV-701"));
    let ids: Vec<&str> = book.accounts.iter().map(|a| a.terms.id.as_str()).collect();
    assert_eq!(ids, ["HM-SAV-702"]);
    assert!(!book.movements.contains_key("HM-SAV-701"));
}
