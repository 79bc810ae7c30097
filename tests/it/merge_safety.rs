//! `merge` only combines one complete split of one run: a shard given twice,
//! a whole run, a missing shard, shards of two splits, of other books or of
//! other settings, and a doctored shard with a cell far out of the writer's
//! columns are each refused with exit status 2, a message naming the
//! workbooks, and no output file.

use std::io::{Read, Write};
use std::path::{Path, PathBuf};

use crate::common::{ledgerate, sample};
use predicates::prelude::*;

const TIME: [&str; 2] = ["--fixed-time", "2026-12-01T08:00:00"];

/// `run` on `book` with `extra` options, written to `dir/name`.
fn run(dir: &Path, book: &Path, name: &str, extra: &[&str]) -> PathBuf {
    let out = dir.join(name);
    ledgerate()
        .arg("run")
        .arg(book)
        .args(TIME)
        .args(extra)
        .arg("--out")
        .arg(&out)
        .assert()
        .success();
    out
}

/// Shard `k` of `n` of the sample book, written to `dir/name`.
fn shard(dir: &Path, name: &str, k: u32, n: u32) -> PathBuf {
    run(dir, &sample(), name, &["--shard", &format!("{k}/{n}")])
}

/// `merge` of `shards` must fail with status 2, say each of `said`, and
/// leave no output.
fn refused(dir: &Path, shards: &[&PathBuf], said: &[&str]) {
    let out = dir.join("merged.xlsx");
    let mut assert = ledgerate()
        .arg("merge")
        .args(shards)
        .args(TIME)
        .arg("--out")
        .arg(&out)
        .assert()
        .code(2);
    for s in said {
        assert = assert.stderr(predicate::str::contains(*s));
    }
    assert!(!out.exists(), "merge wrote {}", out.display());
}

fn shown(p: &Path) -> String {
    p.display().to_string()
}

#[test]
fn the_same_shard_twice_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let a = shard(dir.path(), "a.xlsx", 2, 3);
    let b = shard(dir.path(), "b.xlsx", 2, 3);
    let one = shard(dir.path(), "one.xlsx", 1, 3);
    let three = shard(dir.path(), "three.xlsx", 3, 3);
    refused(
        dir.path(),
        &[&one, &a, &b, &three],
        &[
            "not one complete split of one run",
            &format!("shard 2/3 given twice: {} and {}", shown(&a), shown(&b)),
        ],
    );
    // The very same file twice.
    refused(
        dir.path(),
        &[&one, &a, &a, &three],
        &[&format!(
            "shard 2/3 given twice: {} and {}",
            shown(&a),
            shown(&a)
        )],
    );
}

#[test]
fn a_whole_run_is_not_a_shard() {
    let dir = tempfile::tempdir().unwrap();
    let whole = run(dir.path(), &sample(), "whole.xlsx", &[]);
    let again = run(dir.path(), &sample(), "again.xlsx", &[]);
    refused(
        dir.path(),
        &[&whole, &again],
        &[
            &format!("{} is a whole run, not a shard", shown(&whole)),
            &format!("{} is a whole run, not a shard", shown(&again)),
        ],
    );
    refused(
        dir.path(),
        &[&whole],
        &[&format!("{} is a whole run, not a shard", shown(&whole))],
    );
}

#[test]
fn a_missing_shard_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let one = shard(dir.path(), "one.xlsx", 1, 3);
    let two = shard(dir.path(), "two.xlsx", 2, 3);
    refused(dir.path(), &[&one, &two], &["shard 3/3 missing"]);
}

#[test]
fn shards_of_two_splits_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let thirds: Vec<PathBuf> = (1..=3)
        .map(|k| shard(dir.path(), &format!("{k}-of-3.xlsx"), k, 3))
        .collect();
    let half = shard(dir.path(), "1-of-2.xlsx", 1, 2);
    let mut given: Vec<&PathBuf> = thirds.iter().collect();
    given.push(&half);
    refused(
        dir.path(),
        &given,
        &[&format!(
            "{} is shard 1/2 but the others are of 3",
            shown(&half)
        )],
    );
}

#[test]
fn shards_of_other_books_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let copy = dir.path().join("other-book.xlsx");
    std::fs::copy(sample(), &copy).unwrap();
    let one = shard(dir.path(), "one.xlsx", 1, 2);
    let two = run(dir.path(), &copy, "two.xlsx", &["--shard", "2/2"]);
    refused(
        dir.path(),
        &[&one, &two],
        &[&format!(
            "{} was run on other books than {}: it read {}",
            shown(&two),
            shown(&one),
            shown(&copy)
        )],
    );
}

#[test]
fn shards_of_other_settings_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let one = shard(dir.path(), "one.xlsx", 1, 2);
    let two = run(
        dir.path(),
        &sample(),
        "two.xlsx",
        &["--shard", "2/2", "--journal-style", "reversing"],
    );
    refused(
        dir.path(),
        &[&one, &two],
        &[&format!(
            "{} was run with other settings than {}: journal_style is reversing (command line) there",
            shown(&two),
            shown(&one)
        )],
    );
}

/// Adds a cell at `cell` (a number) to every worksheet of an xlsx file and
/// declares it in the sheet's dimension.
fn plant_cell(path: &Path, cell: &str, row: u32) {
    let data = std::fs::read(path).unwrap();
    let mut archive = zip::ZipArchive::new(std::io::Cursor::new(data)).unwrap();
    let mut parts = Vec::new();
    for i in 0..archive.len() {
        let mut entry = archive.by_index(i).unwrap();
        let mut content = Vec::new();
        entry.read_to_end(&mut content).unwrap();
        let name = entry.name().unwrap().to_string();
        if name.starts_with("xl/worksheets/sheet") {
            let xml = String::from_utf8(content).unwrap();
            let planted =
                format!("<row r=\"{row}\"><c r=\"{cell}\"><v>1</v></c></row></sheetData>");
            let start = xml.find("<dimension ref=\"").unwrap() + "<dimension ref=\"".len();
            let end = start + xml[start..].find('"').unwrap();
            let dimension = format!("A1:{cell}");
            let xml = format!("{}{}{}", &xml[..start], dimension, &xml[end..])
                .replace("</sheetData>", &planted);
            assert!(xml.contains(&planted), "{name}");
            content = xml.into_bytes();
        }
        parts.push((name, content));
    }
    let mut out = zip::ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let options = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated);
    for (name, content) in &parts {
        out.start_file(name.as_str(), options).unwrap();
        out.write_all(content).unwrap();
    }
    std::fs::write(path, out.finish().unwrap().into_inner()).unwrap();
}

#[test]
fn a_far_cell_is_refused_by_its_place_not_read_as_a_grid() {
    let dir = tempfile::tempdir().unwrap();
    let one = shard(dir.path(), "one.xlsx", 1, 2);
    let two = shard(dir.path(), "two.xlsx", 2, 2);
    plant_cell(&two, "XFD1000000", 1_000_000);
    refused(
        dir.path(),
        &[&one, &two],
        &[&format!(
            "{} Run!XFD1000000: found a cell; expected nothing right of column C",
            shown(&two)
        )],
    );
}

#[test]
fn a_cell_below_the_last_row_of_a_sheet_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let one = shard(dir.path(), "one.xlsx", 1, 2);
    let two = shard(dir.path(), "two.xlsx", 2, 2);
    plant_cell(&two, "A2000000", 2_000_000);
    refused(
        dir.path(),
        &[&one, &two],
        &[&format!("{} Run!A2000000: found a cell", shown(&two))],
    );
}
