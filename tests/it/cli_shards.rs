//! Shards merged equal the single run: `run --shard K/N` on every K, then
//! `merge`, gives the same sheets, cell for cell, as one `run` over all the
//! accounts (the Run sheet differs only in the command line).

use std::path::Path;

use crate::common::{ledgerate, sample};
use calamine::{open_workbook_auto, Data, Reader};
use predicates::prelude::*;

fn sheets(path: &Path) -> Vec<(String, Vec<Vec<Data>>)> {
    let mut wb = open_workbook_auto(path).unwrap();
    wb.sheet_names()
        .into_iter()
        .map(|n| {
            let rows = wb
                .worksheet_range(&n)
                .unwrap()
                .rows()
                .map(|r| r.to_vec())
                .collect();
            (n, rows)
        })
        .collect()
}

/// Runs `book` whole and in `n` shards, merges the shards and checks every
/// sheet equals the single run's; the merge prints `counts`.
fn shards_merge_to_the_single_run(book: &Path, n: usize, counts: &str) {
    let dir = tempfile::tempdir().unwrap();
    let time = ["--fixed-time", "2026-12-01T08:00:00", "--daily"];
    let single = dir.path().join("single.xlsx");
    ledgerate()
        .arg("run")
        .arg(book)
        .args(time)
        .arg("--out")
        .arg(&single)
        .assert()
        .success();
    let mut shards = Vec::new();
    for k in 1..=n {
        let out = dir.path().join(format!("shard-{k}.xlsx"));
        ledgerate()
            .arg("run")
            .arg(book)
            .args(time)
            .args(["--shard", &format!("{k}/{n}"), "--out"])
            .arg(&out)
            .assert()
            .success();
        shards.push(out);
    }
    shards.reverse();
    let merged = dir.path().join("merged.xlsx");
    ledgerate()
        .arg("merge")
        .args(&shards)
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(&merged)
        .assert()
        .success()
        .stdout(predicate::str::contains(counts));
    let (a, b) = (sheets(&single), sheets(&merged));
    assert_eq!(
        a.iter().map(|s| &s.0).collect::<Vec<_>>(),
        b.iter().map(|s| &s.0).collect::<Vec<_>>()
    );
    for ((name, x), (_, y)) in a.iter().zip(&b) {
        if name == "Run" {
            // Same inputs and settings; only the command line differs.
            let without_command = |rows: &Vec<Vec<Data>>| -> Vec<Vec<Data>> {
                rows.iter()
                    .filter(|r| r.first() != Some(&Data::String("Command line".into())))
                    .cloned()
                    .collect()
            };
            assert_eq!(without_command(x), without_command(y), "Run");
            continue;
        }
        assert_eq!(x, y, "sheet {name}");
    }
}

#[test]
fn shards_merged_equal_the_single_run() {
    shards_merge_to_the_single_run(&sample(), 4, "accounts: 47 read, 47 computed");
}

/// Interest in suspense survives the merge: the Accruals' split, the
/// suspense GL account's Tie-out row and the journal's suspense lines.
#[test]
fn shards_of_loans_with_interest_in_suspense_merge_to_the_single_run() {
    let book =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-books/harbourview-loans-2026-11.xlsx");
    shards_merge_to_the_single_run(&book, 2, "accounts: 2 read, 2 computed");
}

#[test]
fn a_bad_shard_option_or_a_foreign_workbook_is_refused() {
    ledgerate()
        .arg("run")
        .arg(sample())
        .args(["--shard", "5/4"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("is not K/N"));
    let dir = tempfile::tempdir().unwrap();
    ledgerate()
        .arg("merge")
        .arg(sample())
        .arg("--out")
        .arg(dir.path().join("m.xlsx"))
        .assert()
        .code(2)
        .stderr(predicate::str::contains(
            "merge only takes workbooks written by",
        ));
}
