//! Each GL line traces to accounts, and the journal as an import file
//! (behaviour.md, Output workbook; user guide 5.5 and 5.6): the Journal
//! detail's rows add up to every Journal line exactly, in both journal
//! styles, as a sheet or as a CSV file beside the workbook; `--journal-csv`
//! writes the Journal sheet's lines as a plain CSV file; shards merged give
//! the single run's detail; and the options' misuses are usage errors.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use calamine::{Data, Reader};
use predicates::prelude::*;
use rust_decimal::Decimal;

use crate::common::{fixture, ledgerate, sample, sheet};

/// The detail's header, on the sheet and in its file.
const DETAIL_HEADER: [&str; 8] = [
    "Date",
    "Entity",
    "Currency",
    "GL account",
    "Memo",
    "Account",
    "Debit",
    "Credit",
];

/// The Journal sheet's header, which the import file keeps.
const JOURNAL_HEADER: [&str; 7] = [
    "Date",
    "Entity",
    "Currency",
    "GL account",
    "Debit",
    "Credit",
    "Memo",
];

/// What a journal line is summed by: date, entity, currency, GL account, memo.
type Key = (String, String, String, String, String);

fn run(book: &Path, out: &Path, extra: &[&str]) -> assert_cmd::assert::Assert {
    ledgerate()
        .arg("run")
        .arg(book)
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(out)
        .args(extra)
        .assert()
}

/// A cell as the text a CSV file holds: ISO dates, texts, numbers.
fn text(d: &Data) -> String {
    match d {
        Data::DateTime(t) => t.as_datetime().unwrap().date().to_string(),
        Data::Float(f) => f.to_string(),
        Data::String(s) => s.clone(),
        Data::Empty => String::new(),
        other => panic!("unexpected cell {other:?}"),
    }
}

/// An exact amount from a number cell (at most 15 digits: exact as written).
fn amount(d: &Data) -> Decimal {
    text(d).parse().unwrap()
}

/// Every data row of a list over its continuation sheets.
fn list(path: &Path, name: &str) -> Vec<Vec<Data>> {
    let names = calamine::open_workbook_auto(path).unwrap().sheet_names();
    let mut rows = Vec::new();
    for n in names {
        let continued = n
            .strip_prefix(name)
            .and_then(|r| r.strip_prefix(' '))
            .is_some_and(|k| k.parse::<u32>().is_ok());
        if n == name || continued {
            rows.extend(sheet(path, &n).into_iter().skip(1));
        }
    }
    rows
}

/// The Journal sheet's lines: key and debit less credit.
fn journal(path: &Path) -> BTreeMap<Key, Decimal> {
    list(path, "Journal")
        .iter()
        .map(|r| {
            let key = (
                text(&r[0]),
                text(&r[1]),
                text(&r[2]),
                text(&r[3]),
                text(&r[6]),
            );
            (key, amount(&r[4]) - amount(&r[5]))
        })
        .collect()
}

/// The Journal detail's rows: key, account, debit, credit.
fn detail(path: &Path) -> Vec<(Key, String, Decimal, Decimal)> {
    list(path, "Journal detail")
        .iter()
        .map(|r| {
            let key = (
                text(&r[0]),
                text(&r[1]),
                text(&r[2]),
                text(&r[3]),
                text(&r[4]),
            );
            (key, text(&r[5]), amount(&r[6]), amount(&r[7]))
        })
        .collect()
}

/// The rows of a CSV file the program wrote, header first.
fn csv_rows(path: &Path) -> Vec<Vec<String>> {
    let mut r = csv::ReaderBuilder::new()
        .has_headers(false)
        .from_path(path)
        .unwrap();
    r.records()
        .map(|rec| rec.unwrap().iter().map(str::to_string).collect())
        .collect()
}

/// The detail rows add up to each Journal line, and to nothing where the
/// Journal has no line; each row is a debit or a credit, never both, never
/// negative; each account's rows of a day net to nothing (every entry is
/// balanced); every account named is an account of the Accruals sheet.
fn assert_traces(out: &Path, what: &str) {
    let lines = journal(out);
    let rows = detail(out);
    assert!(!lines.is_empty() && !rows.is_empty(), "{what}");
    let mut sums: BTreeMap<Key, Decimal> = BTreeMap::new();
    let mut by_account_day: BTreeMap<(String, String, String), Decimal> = BTreeMap::new();
    for (key, account, dr, cr) in &rows {
        assert!(
            !dr.is_sign_negative() && !cr.is_sign_negative() && (dr.is_zero() != cr.is_zero()),
            "{what}: {key:?} {account} {dr} {cr}"
        );
        *sums.entry(key.clone()).or_default() += dr - cr;
        *by_account_day
            .entry((account.clone(), key.0.clone(), key.2.clone()))
            .or_default() += dr - cr;
    }
    for (key, amount) in &lines {
        assert_eq!(sums.get(key), Some(amount), "{what}: line {key:?}");
    }
    for (key, sum) in &sums {
        if !lines.contains_key(key) {
            assert!(sum.is_zero(), "{what}: {key:?} sums to {sum} with no line");
        }
    }
    for (k, sum) in by_account_day {
        assert!(sum.is_zero(), "{what}: {k:?} nets to {sum}");
    }
    let accounts: Vec<String> = list(out, "Accruals").iter().map(|r| text(&r[0])).collect();
    for (_, account, _, _) in &rows {
        assert!(accounts.contains(account), "{what}: {account}");
    }
}

#[test]
fn the_detail_adds_up_to_every_journal_line_in_both_styles() {
    let dir = tempfile::tempdir().unwrap();
    for (name, book) in [
        ("sample", sample()),
        ("fixture", fixture("harbourview_good.xlsx")),
    ] {
        for style in ["incremental", "reversing"] {
            let out = dir.path().join(format!("{name}-{style}.xlsx"));
            run(&book, &out, &["--journal-style", style]).success();
            assert_traces(&out, &format!("{name} {style}"));
        }
    }
}

/// Every account of the sample with interest in the window has its share
/// of the window's accrual line (its window days' interest: a prior-period
/// adjustment is a line of its own), on the interest GL account it books to.
#[test]
fn every_account_with_interest_is_on_the_accrual_lines() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("nov.xlsx");
    run(&sample(), &out, &[]).success();
    let accruals = list(&out, "Accruals");
    let rows = detail(&out);
    let mut with_interest = 0;
    for a in &accruals {
        let (account, interest) = (text(&a[0]), amount(&a[11]));
        if interest.is_zero() {
            continue;
        }
        with_interest += 1;
        let shares: Vec<Decimal> = rows
            .iter()
            .filter(|(k, acc, _, _)| *acc == account && k.4.starts_with("interest accrued"))
            .map(|(_, _, dr, cr)| dr - cr)
            .collect();
        // One debit and one credit of the window's interest.
        assert_eq!(shares.len(), 2, "{account}");
        assert_eq!(shares.iter().copied().sum::<Decimal>(), Decimal::ZERO);
        assert!(shares.contains(&interest.abs()), "{account}: {shares:?}");
    }
    assert!(with_interest > 30, "{with_interest}");
}

/// `--journal-detail csv` writes the same rows beside the workbook instead
/// of the sheet; `none` writes neither; the Run sheet says which.
#[test]
fn the_detail_as_a_csv_file_holds_the_sheets_rows() {
    let dir = tempfile::tempdir().unwrap();
    let with_sheet = dir.path().join("sheet.xlsx");
    run(&sample(), &with_sheet, &["--journal-style", "reversing"]).success();
    let with_file = dir.path().join("file.xlsx");
    let file = dir.path().join("file.journal-detail.csv");
    run(
        &sample(),
        &with_file,
        &["--journal-style", "reversing", "--journal-detail", "csv"],
    )
    .success()
    .stdout(predicate::str::contains(format!(
        "journal detail: {}",
        file.display()
    )));
    let csv = csv_rows(&file);
    assert_eq!(csv[0], DETAIL_HEADER);
    let sheet_header: Vec<String> = sheet(&with_sheet, "Journal detail")[0]
        .iter()
        .map(text)
        .collect();
    assert_eq!(sheet_header, DETAIL_HEADER);
    let from_sheet: Vec<Vec<String>> = list(&with_sheet, "Journal detail")
        .iter()
        .map(|r| r.iter().map(text).collect())
        .collect();
    assert_eq!(csv.len() - 1, from_sheet.len());
    for (c, s) in csv[1..].iter().zip(&from_sheet) {
        assert_eq!(c[..6], s[..6]);
        for i in 6..8 {
            assert_eq!(
                c[i].parse::<Decimal>().unwrap(),
                s[i].parse::<Decimal>().unwrap()
            );
        }
    }
    let names = |p: &Path| calamine::open_workbook_auto(p).unwrap().sheet_names();
    assert!(!names(&with_file)
        .iter()
        .any(|n| n.starts_with("Journal detail")));
    let run_sheet = sheet(&with_file, "Run");
    assert!(run_sheet.iter().any(|r| r.len() > 1
        && r[0] == Data::String("journal_detail".into())
        && r[1] == Data::String("csv".into())));

    let without = dir.path().join("none.xlsx");
    run(&sample(), &without, &["--journal-detail", "none"]).success();
    assert!(!names(&without)
        .iter()
        .any(|n| n.starts_with("Journal detail")));
    assert!(!dir.path().join("none.journal-detail.csv").exists());
}

/// Decimals of an amount's text, checking it has only digits and at most one point.
fn places(amount: &str) -> usize {
    assert!(
        amount.chars().all(|c| c.is_ascii_digit() || c == '.') && !amount.starts_with('.'),
        "{amount}"
    );
    amount.split_once('.').map_or(0, |(_, f)| f.len())
}

/// The import file holds the Journal sheet's lines: one header row, ISO
/// dates, amounts with a point and exactly the currency's minor units,
/// never negative, debit and credit apart.
#[test]
fn the_journal_csv_holds_the_journal_sheets_lines() {
    let dir = tempfile::tempdir().unwrap();
    let minor_units = |ccy: &str| match ccy {
        "JPY" => 0,
        "KWD" => 3,
        _ => 2,
    };
    for style in ["incremental", "reversing"] {
        let out = dir.path().join(format!("{style}.xlsx"));
        let file = dir.path().join(format!("{style}-upload.csv"));
        run(
            &sample(),
            &out,
            &[
                "--journal-style",
                style,
                "--journal-csv",
                file.to_str().unwrap(),
            ],
        )
        .success()
        .stdout(predicate::str::contains(format!(
            "journal CSV: {}",
            file.display()
        )));
        let csv = csv_rows(&file);
        assert_eq!(csv[0], JOURNAL_HEADER);
        let sheet_rows = list(&out, "Journal");
        assert_eq!(csv.len() - 1, sheet_rows.len(), "{style}");
        for (c, r) in csv[1..].iter().zip(&sheet_rows) {
            assert_eq!(c[0], text(&r[0]), "{style}: ISO date");
            assert_eq!(c[1..4], [text(&r[1]), text(&r[2]), text(&r[3])]);
            assert_eq!(c[6], text(&r[6]));
            let mu = minor_units(&c[2]);
            for (i, col) in [(4, 4), (5, 5)] {
                assert_eq!(places(&c[i]), mu, "{style}: {c:?}");
                assert_eq!(
                    c[i].parse::<Decimal>().unwrap(),
                    amount(&r[col]),
                    "{style}: {c:?}"
                );
            }
        }
        // The import file's path is an output path: not in the audit trail.
        let command_line = sheet(&out, "Run")
            .into_iter()
            .find(|r| r[0] == Data::String("Command line".into()))
            .unwrap();
        assert!(
            !text(&command_line[1]).contains("upload.csv"),
            "{command_line:?}"
        );
    }
}

/// Shards run with `--journal-detail csv`, merged, give the single run's
/// detail file and import file byte for byte (the sheet is compared cell by
/// cell in cli_shards); a shard whose detail file is missing is refused.
#[test]
fn shards_merged_give_the_single_runs_detail_file() {
    let dir = tempfile::tempdir().unwrap();
    let p = |name: &str| dir.path().join(name);
    let as_str = |p: &PathBuf| p.to_str().unwrap().to_string();
    let single = p("single.xlsx");
    let detail = ["--journal-detail", "csv", "--journal-style", "reversing"];
    let single_csv = as_str(&p("single.csv"));
    let mut args = detail.to_vec();
    args.extend(["--journal-csv", &single_csv]);
    run(&sample(), &single, &args).success();
    let mut shards = Vec::new();
    for k in 1..=3 {
        let out = p(&format!("shard-{k}.xlsx"));
        let shard = format!("{k}/3");
        let mut args = detail.to_vec();
        args.extend(["--shard", &shard]);
        run(&sample(), &out, &args).success();
        shards.push(out);
    }
    shards.reverse();
    let merged = p("merged.xlsx");
    ledgerate()
        .arg("merge")
        .args(&shards)
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(&merged)
        .arg("--journal-csv")
        .arg(p("merged.csv"))
        .assert()
        .success()
        .stdout(predicate::str::contains("journal detail: "));
    let bytes = |p: PathBuf| std::fs::read(p).unwrap();
    assert!(bytes(p("single.journal-detail.csv")) == bytes(p("merged.journal-detail.csv")));
    assert!(bytes(p("single.csv")) == bytes(p("merged.csv")));

    std::fs::remove_file(p("shard-2.journal-detail.csv")).unwrap();
    ledgerate()
        .arg("merge")
        .args(&shards)
        .args(["--out"])
        .arg(p("again.xlsx"))
        .assert()
        .code(2)
        .stderr(predicate::str::contains(
            "shard-2.journal-detail.csv is not there",
        ));
    assert!(!p("again.xlsx").exists());
}

/// The import file may be neither the workbook, nor an input, nor the
/// detail file, nor in a missing folder: each is a usage error (status 2)
/// before anything is written; an unknown `--journal-detail` likewise.
#[test]
fn misused_journal_options_are_usage_errors() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("book.xlsx");
    std::fs::copy(sample(), &book).unwrap();
    let before = std::fs::read(&book).unwrap();
    let out = dir.path().join("out.xlsx");
    let out_str = out.to_str().unwrap();
    let detail_file = dir.path().join("out.journal-detail.csv");
    let missing = dir.path().join("no/such/folder/j.csv");
    let cases: Vec<(Vec<&str>, &str)> = vec![
        (vec!["--journal-csv", out_str], "is the workbook (--out)"),
        (
            vec!["--journal-csv", book.to_str().unwrap()],
            "would overwrite the input",
        ),
        (
            vec![
                "--journal-detail",
                "csv",
                "--journal-csv",
                detail_file.to_str().unwrap(),
            ],
            "is the Journal detail file",
        ),
        (
            vec!["--journal-csv", missing.to_str().unwrap()],
            "does not exist",
        ),
        (
            vec!["--journal-csv", dir.path().to_str().unwrap()],
            "is a folder",
        ),
        (
            vec!["--journal-detail", "sheets"],
            "unknown journal detail output 'sheets'; did you mean 'sheet'?",
        ),
    ];
    for (args, says) in cases {
        run(&book, &out, &args)
            .code(2)
            .stderr(predicate::str::contains(says));
        assert!(!out.exists(), "{args:?}: nothing is written");
        assert!(!detail_file.exists(), "{args:?}");
    }
    assert!(
        std::fs::read(&book).unwrap() == before,
        "the input is unchanged"
    );
}

/// Source: CWE-1236 (MITRE): a CSV cell starting with =, +, - or @ is taken
/// for a formula by a spreadsheet; a leading apostrophe keeps it text. Such
/// cells are written so, and one warning per file says where.
#[test]
fn a_cell_a_spreadsheet_would_run_is_written_as_text_with_a_warning() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out.xlsx");
    let file = dir.path().join("upload.csv");
    run(
        &sample(),
        &out,
        &[
            "--entity",
            "=HYPERLINK(\"x\")",
            "--journal-detail",
            "csv",
            "--journal-csv",
            file.to_str().unwrap(),
        ],
    )
    .success()
    .stdout(predicate::str::contains("2 warnings"));
    let journal = csv_rows(&file);
    assert!(journal[1..].iter().all(|r| r[1] == "'=HYPERLINK(\"x\")"));
    let detail = csv_rows(&dir.path().join("out.journal-detail.csv"));
    assert!(detail[1..].iter().all(|r| r[1] == "'=HYPERLINK(\"x\")"));
    let problems = sheet(&out, "Problems");
    let warnings: Vec<String> = problems
        .iter()
        .filter(|r| r[0] == Data::String("warning".into()))
        .map(|r| text(&r[6]))
        .collect();
    assert_eq!(warnings.len(), 2, "{warnings:?}");
    let n = journal.len() - 1;
    assert!(
        warnings
            .iter()
            .any(|w| w.starts_with(&format!("{n} cells are written with a leading apostrophe"))),
        "{warnings:?}"
    );
}
