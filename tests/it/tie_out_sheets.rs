//! The ledger sheets of the output workbook on a small CSV book built here:
//! the Accruals' ledger columns, the Accrued check and the Tie-out
//! (behaviour.md, Books that tie: Tie-out; System accrued check), their
//! header labels and number formats, the Summary's line on the Tie-out, and
//! shards merged giving the single run's sheets.
//!
//! The book holds worked examples A1 (DEP-1, a deposit back-valued across
//! the close, its booked opening from a Booked row) and A3 (TD-3, a term
//! deposit posting at maturity, the core system's open item booked at
//! cut-off), each on an accrued-interest GL account of its own.
//!
//! The tests that run today read Accounts, Rates, Movements and Settings
//! from the CSV folder and give the batch the Booked and Trial balance rows
//! in code (the same rows as the CSV files below). The one marked `ignore`
//! runs the program on the folder with booked.csv and trial_balance.csv and
//! needs their readers.

use std::collections::HashMap;
use std::path::{Path, PathBuf};

use calamine::Data;
use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{merge, run_books, shard_of, split, BatchResult, BatchSettings};
use ledgerate::book::{read_book, Book, BookedRow, ReadOptions, TrialBalanceRow};
use ledgerate::engine::floating::FixingFallback;
use ledgerate::engine::reconcile::Tolerance;
use ledgerate::problem::{sort_problems, Position};
use ledgerate::report::model::{InputFile, Report, RunFacts, Setting, SettingSource};
use ledgerate::report::readback::read_workbook;
use ledgerate::report::write_report;

use crate::common::{date, dec, ledgerate, number, number_format, sheet};

const ACCOUNTS: &str = "\
account,name,currency,side,day_count,compounding,posting,capitalise,open_date,opening_balance,maturity,rate_ref,gl_accrued
DEP-1,Example deposit back-valued,USD,liability,ACT/365F,simple,monthly,yes,2026-10-01,100000.00,,R365,
TD-3,Example term deposit,USD,liability,ACT/365F,simple,maturity,no,2026-09-01,365000.00,2027-03-01,R365,2310
";

const RATES: &str = "\
rate_ref,effective,rate_percent
R365,2026-01-01,3.65
";

const MOVEMENTS: &str = "\
account,value_date,amount,booking_date
DEP-1,2026-10-20,36500.00,2026-11-05
";

const SETTINGS: &str = "\
setting,value
cutoff,2026-11-30
window_start,2026-11-01
entity,HM-TEST
";

/// DEP-1's books held 310.00 at the October close; TD-3's 61 nights of
/// 36.50; the core system holds 3,285.00 for TD-3 at the cut-off.
const BOOKED: &str = "\
account,date,open_item
DEP-1,2026-10-31,310.00
TD-3,2026-10-31,2226.50
TD-3,2026-11-30,3285.00
";

/// Credits print negative. GL 2310 at the cut-off holds the core system's
/// figure; 9999 is no account's.
const TRIAL_BALANCE: &str = "\
entity,currency,gl_account,date,balance
HM-TEST,USD,ACCRUED-INTEREST-PAYABLE,2026-10-31,-310.00
HM-TEST,USD,2310,2026-10-31,-2226.50
HM-TEST,USD,2310,2026-11-30,-3285.00
HM-TEST,USD,9999,2026-11-30,1.00
";

/// The CSV book in `dir`; with `ledger_sheets`, booked.csv and
/// trial_balance.csv too.
fn write_book(dir: &Path, ledger_sheets: bool) -> PathBuf {
    let book = dir.join("book");
    std::fs::create_dir_all(&book).unwrap();
    let mut files = vec![
        ("accounts.csv", ACCOUNTS),
        ("rates.csv", RATES),
        ("movements.csv", MOVEMENTS),
        ("settings.csv", SETTINGS),
    ];
    if ledger_sheets {
        files.push(("booked.csv", BOOKED));
        files.push(("trial_balance.csv", TRIAL_BALANCE));
    }
    for (name, text) in files {
        std::fs::write(book.join(name), text).unwrap();
    }
    book
}

/// The data rows of one of the CSV texts above, split at commas.
fn records(csv: &str) -> Vec<Vec<&str>> {
    csv.lines()
        .skip(1)
        .map(|l| l.split(',').collect())
        .collect()
}

/// The book read from its folder, with the Booked and Trial balance rows
/// of the CSV texts above.
fn book_with_ledger_rows(dir: &Path) -> Book {
    let path = write_book(dir, false);
    let mut book = read_book(&path, &ReadOptions::default());
    let at = |sheet: &str| Position {
        book: path.display().to_string(),
        sheet: sheet.into(),
        ..Position::default()
    };
    book.booked = records(BOOKED)
        .into_iter()
        .map(|r| BookedRow {
            account: r[0].into(),
            date: date(r[1]),
            open_item: dec(r[2]),
            position: at("Booked"),
        })
        .collect();
    book.trial_balance = records(TRIAL_BALANCE)
        .into_iter()
        .map(|r| TrialBalanceRow {
            entity: r[0].into(),
            currency: r[1].into(),
            gl_account: r[2].into(),
            date: date(r[3]),
            balance: dec(r[4]),
            position: at("Trial balance"),
        })
        .collect();
    book
}

fn batch_settings(shard: Option<(u32, u32)>) -> BatchSettings {
    BatchSettings {
        cutoff: date("2026-11-30"),
        window_start: date("2026-11-01"),
        daily: false,
        journal_style: JournalStyle::Incremental,
        entities: vec!["HM-TEST".into()],
        tolerance: Tolerance::default(),
        fast_path: true,
        shard,
        fixing_fallback: FixingFallback::None,
        as_at: None,
        previous_as_at: None,
        settlement_lines: Default::default(),
        journal_detail: false,
    }
}

/// The workbook's report of a batch, as `run` makes it: the books'
/// problems and the batch's, in the one order; shard K/N recorded.
fn report(books: &[Book], batch: BatchResult, shard: Option<(u32, u32)>) -> Report {
    let names: Vec<String> = books.iter().map(|b| b.path.display().to_string()).collect();
    let mut problems: Vec<_> = books.iter().flat_map(|b| b.problems.clone()).collect();
    problems.extend(batch.problems);
    sort_problems(&mut problems, &names);
    let setting = |name: &str, value: String| Setting {
        name: name.into(),
        value,
        source: SettingSource::Book,
    };
    let mut settings = vec![
        setting("cutoff", "2026-11-30".into()),
        setting("window_start", "2026-11-01".into()),
    ];
    if let Some((k, n)) = shard {
        settings.push(setting("shard", format!("{k}/{n}")));
    }
    Report {
        facts: RunFacts {
            program: "ledgerate test".into(),
            command_line: "ledgerate run book".into(),
            inputs: names
                .iter()
                .map(|path| InputFile {
                    path: path.clone(),
                    size: 1,
                    sha256: "00".into(),
                })
                .collect(),
            settings,
            run_time: date("2026-12-01").and_hms_opt(8, 0, 0).unwrap(),
            cutoff: date("2026-11-30"),
            window_start: date("2026-11-01"),
            accounts_read: batch.accounts_read,
            accounts_computed: batch.accounts_computed,
            accounts_left_out: batch.accounts_left_out,
            accounts_failed: batch.accounts_failed,
        },
        left_out: batch.left_out,
        totals: batch.totals,
        accruals: batch.accruals,
        reconciliation: batch.reconciliation,
        accrued_check: batch.accrued_check,
        tie_out: batch.tie_out,
        status_counts: batch.status_counts,
        largest_variances: vec![],
        journal: batch.journal,
        journal_detail: batch.journal_detail,
        daily: batch.daily,
        problems,
    }
}

/// The text of a cell, "" when blank.
fn text(d: &Data) -> String {
    match d {
        Data::Empty => String::new(),
        other => other.to_string(),
    }
}

/// The row of `rows` whose cell in column `col` shows `value`.
fn row<'r>(rows: &'r [Vec<Data>], col: usize, value: &str) -> &'r [Data] {
    rows.iter()
        .find(|r| r.get(col).map(text).as_deref() == Some(value))
        .unwrap_or_else(|| panic!("no row with {value} in column {col}"))
}

/// Amounts of a row, columns `cols`, as exact decimals (blank: None).
fn amounts(r: &[Data], cols: std::ops::RangeInclusive<usize>) -> Vec<Option<String>> {
    cols.map(|c| match &r[c] {
        Data::Empty => None,
        d => Some(number(d).to_string()),
    })
    .collect()
}

/// Examples A1 and A3 on the workbook: DEP-1's ledger columns on Accruals,
/// TD-3's open item on the Accrued check, and each GL account on the
/// Tie-out, rolled forward from the trial balance.
#[test]
fn the_new_sheets_show_examples_a1_and_a3() {
    let dir = tempfile::tempdir().unwrap();
    let books = [book_with_ledger_rows(dir.path())];
    let batch = run_books(&books, &batch_settings(None), &|| {});
    let target = dir.path().join("run.xlsx");
    write_report(&report(&books, batch, None), &target).unwrap();

    let accruals = sheet(&target, "Accruals");
    let labels: Vec<String> = accruals[0].iter().map(text).collect();
    assert_eq!(
        labels[11..],
        [
            "Window days' interest",
            "Booked opening",
            "Opening from",
            "Prior-period adjustment",
            "Open item at cut-off",
            "Settled in window",
            "Entity",
            "GL interest",
            "GL accrued",
            "GL settlement",
            "GL prior period",
        ]
    );
    // Example A1 with a Booked row for the October close: 410.43 for
    // November's days, 43.80 of October's reaching the books now.
    let dep = row(&accruals, 0, "DEP-1");
    assert_eq!(number(&dep[9]), dec("454.23"), "interest for window");
    assert_eq!(number(&dep[11]), dec("410.43"));
    assert_eq!(number(&dep[12]), dec("310.00"));
    assert_eq!(text(&dep[13]), "Booked row");
    assert_eq!(number(&dep[14]), dec("43.80"));
    assert_eq!(number(&dep[15]), dec("454.23"));
    assert_eq!(number(&dep[16]), dec("310.00"));
    let words: Vec<String> = dep[17..].iter().map(text).collect();
    assert_eq!(
        words,
        [
            "HM-TEST",
            "INTEREST-EXPENSE",
            "ACCRUED-INTEREST-PAYABLE",
            "INTEREST-SETTLEMENT",
            "INTEREST-EXPENSE",
        ]
    );
    let td = row(&accruals, 0, "TD-3");
    assert_eq!(text(&td[19]), "2310");
    for col in [11, 12, 14, 15, 16] {
        assert_eq!(
            number_format(&target, "Accruals", 1, col),
            "#,##0.00;-#,##0.00",
            "Accruals column {col}"
        );
    }

    // Example A3: expected 91 nights x 36.50, booked 3,285.00.
    let check = sheet(&target, "Accrued check");
    let labels: Vec<String> = check[0].iter().map(text).collect();
    assert_eq!(
        labels,
        [
            "Account",
            "Currency",
            "Accrual from",
            "Cut-off",
            "Days",
            "Balance-years",
            "Expected",
            "Booked",
            "Variance",
            "Variance (bp)",
            "Status",
            "Likely cause",
        ]
    );
    assert_eq!(check.len(), 2, "one row: TD-3's Booked row at the cut-off");
    let td = &check[1];
    assert_eq!(text(&td[0]), "TD-3");
    assert_eq!(number_format(&target, "Accrued check", 1, 2), "yyyy-mm-dd");
    assert_eq!(number(&td[4]), dec("91"));
    assert_eq!(number(&td[5]), dec("91000"));
    assert_eq!(
        amounts(td, 6..=9),
        [
            Some("3321.5".into()),
            Some("3285".into()),
            Some("-36.5".into()),
            Some("-4.011".into())
        ]
    );
    assert_eq!(text(&td[10]), "under-posted");
    assert!(text(&td[11]).contains("booked amount"), "{}", text(&td[11]));
    assert_eq!(
        number_format(&target, "Accrued check", 1, 7),
        "#,##0.00;-#,##0.00"
    );
    assert_eq!(
        number_format(&target, "Accrued check", 1, 9),
        "#,##0.00;-#,##0.00",
        "bp to two decimals"
    );

    let tie_out = sheet(&target, "Tie-out");
    let labels: Vec<String> = tie_out[0].iter().map(text).collect();
    assert_eq!(
        labels,
        [
            "Entity",
            "Currency",
            "GL account",
            "Side",
            "Accounts",
            "Opening per trial balance",
            "Opening per sub-ledger",
            "Opening difference",
            "Interest for window",
            "Settled in window",
            "Closing roll-forward",
            "Closing per sub-ledger",
            "Closing per trial balance",
            "Closing difference",
            "Status",
        ]
    );
    assert_eq!(tie_out.len(), 3, "one row per GL account used");
    // TD-3's GL: the trial balance at the cut-off holds the core system's
    // 3,285.00, 36.50 short of the sub-ledger.
    let td = row(&tie_out, 2, "2310");
    let words: Vec<String> = td[..4].iter().map(text).collect();
    assert_eq!(words, ["HM-TEST", "USD", "2310", "liability"]);
    assert_eq!(number(&td[4]), dec("1"));
    let some = |s: &str| Some(dec(s).normalize().to_string());
    assert_eq!(
        amounts(td, 5..=13),
        [
            some("2226.50"),
            some("2226.50"),
            some("0"),
            some("1095.00"),
            some("0"),
            some("3321.50"),
            some("3321.50"),
            some("3285.00"),
            some("-36.50"),
        ]
    );
    assert_eq!(text(&td[14]), "differs");
    // Example A1's tie-out: + 454.23 - 310.00 from 310.00 is the
    // sub-ledger's 454.23; no trial balance row at the cut-off.
    let dep = row(&tie_out, 2, "ACCRUED-INTEREST-PAYABLE");
    assert_eq!(
        amounts(dep, 5..=13),
        [
            some("310.00"),
            some("310.00"),
            some("0"),
            some("454.23"),
            some("310.00"),
            some("454.23"),
            some("454.23"),
            None,
            some("0"),
        ]
    );
    assert_eq!(text(&dep[14]), "agrees");
    for col in 5..=13 {
        assert_eq!(
            number_format(&target, "Tie-out", 1, col),
            "#,##0.00;-#,##0.00",
            "Tie-out column {col}"
        );
    }

    let names: Vec<String> = crate::common::sheet_names(&target);
    assert_eq!(
        names[..6],
        [
            "Summary",
            "Accruals",
            "Accrued check",
            "Tie-out",
            "Journal",
            "Problems"
        ]
    );
    let summary = sheet(&target, "Summary");
    assert_eq!(
        text(&row(&summary, 0, "Tie-out")[1]),
        "2 GL accounts: 1 differs, 1 agrees"
    );
    // The trial balance row of a GL account no account uses is a note.
    let problems = sheet(&target, "Problems");
    assert!(
        problems
            .iter()
            .any(|r| text(&r[0]) == "note" && text(&r[4]).contains("GL account 9999")),
        "{problems:?}"
    );
}

/// Shards written, read back and merged give the single run's Accruals,
/// Accrued check, Tie-out and Problems cell for cell (the two accounts in
/// different shards).
#[test]
fn shards_merged_give_the_single_runs_ledger_sheets() {
    let dir = tempfile::tempdir().unwrap();
    let books = [book_with_ledger_rows(dir.path())];
    let n = (2..=8)
        .find(|&n| shard_of("DEP-1", n) != shard_of("TD-3", n))
        .unwrap();
    let single = dir.path().join("single.xlsx");
    let batch = run_books(&books, &batch_settings(None), &|| {});
    write_report(&report(&books, batch, None), &single).unwrap();

    let mut parts = Vec::new();
    for k in (1..=n).rev() {
        let shard = Some((k, n));
        let batch = run_books(&books, &batch_settings(shard), &|| {});
        let file = dir.path().join(format!("shard-{k}.xlsx"));
        write_report(&report(&books, batch, shard), &file).unwrap();
        parts.push(split::Shard {
            file: file.display().to_string(),
            rows: read_workbook(&file).unwrap(),
        });
    }
    let order: HashMap<String, usize> = books[0]
        .accounts
        .iter()
        .enumerate()
        .map(|(i, a)| (a.terms.id.clone(), i))
        .collect();
    let merged_report = merge::merge(
        split::check(parts).unwrap(),
        &order,
        date("2026-12-01").and_hms_opt(8, 0, 0).unwrap(),
        "ledgerate merge".into(),
    );
    let merged = dir.path().join("merged.xlsx");
    write_report(&merged_report, &merged).unwrap();

    for name in ["Accruals", "Accrued check", "Tie-out", "Problems"] {
        assert_eq!(sheet(&single, name), sheet(&merged, name), "sheet {name}");
    }
    let tie_out_line = |path: &Path| text(&row(&sheet(path, "Summary"), 0, "Tie-out")[1]);
    assert_eq!(tie_out_line(&single), tie_out_line(&merged));
}

/// The program on the CSV book with booked.csv and trial_balance.csv: the
/// Tie-out and Accrued check as above, and `merge` of its shards equal to
/// the single run on every sheet.
#[test]
fn the_program_writes_and_merges_the_ledger_sheets_of_a_csv_book() {
    let dir = tempfile::tempdir().unwrap();
    let book = write_book(dir.path(), true);
    let time = ["--fixed-time", "2026-12-01T08:00:00"];
    let single = dir.path().join("single.xlsx");
    ledgerate()
        .arg("run")
        .arg(&book)
        .args(time)
        .arg("--out")
        .arg(&single)
        .assert()
        .success();
    let tie_out = sheet(&single, "Tie-out");
    assert_eq!(tie_out.len(), 3);
    assert_eq!(text(&row(&tie_out, 2, "2310")[14]), "differs");
    let dep = row(&tie_out, 2, "ACCRUED-INTEREST-PAYABLE");
    assert_eq!(number(&dep[11]), dec("454.23"));
    assert_eq!(text(&dep[14]), "agrees");
    let check = sheet(&single, "Accrued check");
    assert_eq!(number(&row(&check, 0, "TD-3")[8]), dec("-36.50"));

    let n = (2..=8)
        .find(|&n| shard_of("DEP-1", n) != shard_of("TD-3", n))
        .unwrap();
    let mut shards = Vec::new();
    for k in 1..=n {
        let out = dir.path().join(format!("shard-{k}.xlsx"));
        ledgerate()
            .arg("run")
            .arg(&book)
            .args(time)
            .args(["--shard", &format!("{k}/{n}"), "--out"])
            .arg(&out)
            .assert()
            .success();
        shards.push(out);
    }
    let merged = dir.path().join("merged.xlsx");
    ledgerate()
        .arg("merge")
        .args(&shards)
        .args(time)
        .arg("--out")
        .arg(&merged)
        .assert()
        .success();
    let names = crate::common::sheet_names(&single);
    assert_eq!(names, crate::common::sheet_names(&merged));
    for name in names.iter().filter(|n| *n != "Run") {
        assert_eq!(sheet(&single, name), sheet(&merged, name), "sheet {name}");
    }
}
