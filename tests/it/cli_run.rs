//! `ledgerate run`, `check` and `template` as a user runs them: the real
//! binary on the shipped sample books, the workbook read back with calamine,
//! and figures worked out by hand beside each check.

use std::path::{Path, PathBuf};

use crate::common::{copy_dir, ledgerate, sample, sample_csv, sheet};
use calamine::{open_workbook_auto, Data, DataType, Reader};
use predicates::prelude::*;

fn run_to(out: &Path, extra: &[&str]) -> assert_cmd::assert::Assert {
    ledgerate()
        .arg("run")
        .arg(sample())
        .args([
            "--cutoff",
            "2026-11-30",
            "--fixed-time",
            "2026-12-01T08:00:00",
            "--out",
        ])
        .arg(out)
        .args(extra)
        .assert()
}

/// A sheet as rows of cells.
/// The Accruals row of an account, by header label.
fn accrual(path: &Path, account: &str, column: &str) -> Data {
    let rows = sheet(path, "Accruals");
    let header = &rows[0];
    let col = header
        .iter()
        .position(|h| *h == column)
        .unwrap_or_else(|| panic!("no column {column}"));
    let row = rows
        .iter()
        .find(|r| r[0] == account)
        .unwrap_or_else(|| panic!("no account {account}"));
    row[col].clone()
}

fn number(d: &Data) -> String {
    match d {
        Data::Float(f) => f.to_string(),
        other => panic!("not a number: {other:?}"),
    }
}

#[test]
fn the_month_end_run_reproduces_hand_worked_figures() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("nov.xlsx");
    run_to(&out, &[])
        .success()
        .stdout(predicate::str::contains(
            "accounts: 47 read, 47 computed, 0 left out by errors",
        ))
        .stdout(predicate::str::contains("workbook:"));
    // 30E/360: 3,500,000.00 x 2.85% x 30/360 = 8,312.50.
    assert_eq!(
        number(&accrual(&out, "HM-EUR-001", "Interest for window")),
        "8312.5"
    );
    // 30/360, quarterly to 30 Nov: 5,000,000.00 x 4.80% x 90/360 = 60,000.00 posted;
    // the window's share is 30/360 of a year: 20,000.00.
    assert_eq!(
        number(&accrual(&out, "HM-IC-002", "Posted in window")),
        "60000"
    );
    assert_eq!(
        number(&accrual(&out, "HM-IC-002", "Interest for window")),
        "20000"
    );
    // Withholding tax at 20%, capitalised: 100,000.00 x 3.65% x 30/365 = 300.00
    // gross, 60.00 tax, 240.00 net credited; the balance takes the net.
    assert_eq!(
        number(&accrual(&out, "HM-SAV-T20", "Tax withheld in window")),
        "60"
    );
    assert_eq!(
        number(&accrual(&out, "HM-SAV-T20", "Net posted in window")),
        "240"
    );
    assert_eq!(
        number(&accrual(&out, "HM-SAV-T20", "Balance at cut-off")),
        "100240"
    );
    // Treaty rate 15% on an asset: 5,000,000.00 x 4.20% x 91/360 = 53,083.33;
    // 53,083.33 x 0.15 = 7,962.4995, 7,962.50 half-up; net 45,120.83.
    assert_eq!(
        number(&accrual(&out, "HM-IC-003", "Tax withheld in window")),
        "7962.5"
    );
    assert_eq!(
        number(&accrual(&out, "HM-IC-003", "Net posted in window")),
        "45120.83"
    );
    // ACT/365F in yen: 12,345,678 x 0.30% x 30/365 = 3,044.14, posted as 3,044.
    assert_eq!(
        number(&accrual(&out, "HM-JPY-001", "Interest for window")),
        "3044"
    );
    // ACT/360 in dinars: 45,678.123 x 4.125% x 30/360 = 157.0186, posted as 157.019.
    assert_eq!(
        number(&accrual(&out, "HM-KWD-001", "Interest for window")),
        "157.019"
    );
    // Term deposit maturing 20 Nov: 500,000.00 x 4.10% x 92/365 = 5,167.12 paid;
    // 4,100.00 of it (73 nights to 31 Oct) was accrued before the window.
    assert_eq!(
        number(&accrual(&out, "HM-TD-001", "Posted in window")),
        "5167.12"
    );
    assert_eq!(
        number(&accrual(&out, "HM-TD-001", "Interest for window")),
        "1067.12"
    );
    // Brought forward on 16 Nov with 246.67 accrued: 300,000.00 x 2% x 15/360 = 250.00 more.
    assert_eq!(
        number(&accrual(&out, "HM-BF-001", "Posted in window")),
        "496.67"
    );
    // Overdraft: 4,200 x 0.10% x 9/365 - 3,300 x 18% x 15/365 + 2,700 x 0.10% x 6/365 = -24.26.
    assert_eq!(
        number(&accrual(&out, "HM-CHK-001", "Interest for window")),
        "-24.26"
    );
    // Sheets in the order of the output contract.
    let wb = open_workbook_auto(&out).unwrap();
    assert_eq!(
        wb.sheet_names(),
        [
            "Summary",
            "Accruals",
            "Reconciliation",
            "Accrued check",
            "Tie-out",
            "Journal",
            "Journal detail",
            "Problems",
            "Run"
        ]
    );
}

#[test]
fn the_journal_balances_per_currency() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("nov.xlsx");
    run_to(&out, &[]).success();
    let rows = sheet(&out, "Journal");
    assert_eq!(
        rows[0].iter().map(|c| c.to_string()).collect::<Vec<_>>(),
        [
            "Date",
            "Entity",
            "Currency",
            "GL account",
            "Debit",
            "Credit",
            "Memo"
        ]
    );
    let mut sums: std::collections::BTreeMap<
        String,
        (rust_decimal::Decimal, rust_decimal::Decimal),
    > = Default::default();
    for r in &rows[1..] {
        let dec = |d: &Data| match d {
            Data::Float(f) => f.to_string().parse::<rust_decimal::Decimal>().unwrap(),
            Data::Empty => rust_decimal::Decimal::ZERO,
            other => panic!("{other:?}"),
        };
        let e = sums.entry(r[2].to_string()).or_default();
        e.0 += dec(&r[4]);
        e.1 += dec(&r[5]);
    }
    assert_eq!(sums.len(), 6);
    for (ccy, (dr, cr)) in sums {
        assert_eq!(dr, cr, "{ccy}");
    }
}

#[test]
fn the_workbook_is_byte_identical_across_runs_and_thread_counts() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.xlsx");
    let b = dir.path().join("b.xlsx");
    let c = dir.path().join("c.xlsx");
    run_to(&a, &["--threads", "1", "--daily"]).success();
    run_to(&b, &["--threads", "2", "--daily"]).success();
    run_to(&c, &["--daily", "--threads=2"]).success();
    let bytes = |p: &Path| std::fs::read(p).unwrap();
    assert!(bytes(&a) == bytes(&b), "--threads 1 and --threads 2 differ");
    assert!(bytes(&a) == bytes(&c), "two runs differ");
    assert_eq!(
        open_workbook_auto(&a).unwrap().sheet_names(),
        [
            "Summary",
            "Accruals",
            "Reconciliation",
            "Accrued check",
            "Tie-out",
            "Journal",
            "Journal detail",
            "Daily",
            "Problems",
            "Run"
        ]
    );
}

#[test]
fn a_csv_folder_gives_the_same_figures_as_the_workbook() {
    let dir = tempfile::tempdir().unwrap();
    let x = dir.path().join("x.xlsx");
    let y = dir.path().join("y.xlsx");
    run_to(&x, &[]).success();
    ledgerate()
        .arg("run")
        .arg(sample_csv())
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(&y)
        .assert()
        .success();
    assert_eq!(sheet(&x, "Accruals"), sheet(&y, "Accruals"));
    assert_eq!(sheet(&x, "Journal"), sheet(&y, "Journal"));
}

#[test]
fn the_output_may_not_be_an_input() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("book.xlsx");
    std::fs::copy(sample(), &book).unwrap();
    ledgerate()
        .arg("run")
        .arg(&book)
        .arg("--out")
        .arg(&book)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("would overwrite the input"));
    assert_eq!(
        std::fs::read(&book).unwrap(),
        std::fs::read(sample()).unwrap()
    );
}

#[test]
fn a_missing_book_or_cutoff_is_a_usage_error() {
    ledgerate()
        .args(["run", "no-such-book.xlsx", "--cutoff", "2026-11-30"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("does not exist"));
    ledgerate()
        .args(["run"])
        .arg(sample())
        .args(["--cutoff", "30/11/2026"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains(
            "--cutoff '30/11/2026' is not an ISO date (YYYY-MM-DD): write 2026-11-30 if that is the date meant",
        ));
}

#[test]
fn check_reads_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    ledgerate()
        .current_dir(dir.path())
        .arg("check")
        .arg(sample())
        .assert()
        .success()
        .stdout(predicate::str::contains("47 accounts ready, 0 problems"));
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
}

#[test]
fn the_template_is_a_book_the_reader_accepts() {
    let dir = tempfile::tempdir().unwrap();
    let t = dir.path().join("book.xlsx");
    ledgerate()
        .arg("template")
        .arg("--out")
        .arg(&t)
        .assert()
        .success();
    let wb = open_workbook_auto(&t).unwrap();
    for s in [
        "Accounts",
        "Rates",
        "Movements",
        "Statements",
        "Holidays",
        "Settings",
    ] {
        assert!(wb.sheet_names().iter().any(|n| n == s), "no sheet {s}");
    }
    ledgerate()
        .arg("template")
        .arg("--out")
        .arg(&t)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--force"));
    ledgerate()
        .arg("check")
        .arg(&t)
        .assert()
        .stdout(predicate::str::contains("1 account ready, 0 problems"));
}

/// The sample statements carry planted mistakes; each is flagged and its
/// cause named first.
#[test]
fn the_planted_statement_mistakes_are_found_and_explained() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("nov.xlsx");
    run_to(&out, &[])
        .success()
        .stdout(predicate::str::contains("1 not posted"));
    let rows = sheet(&out, "Reconciliation");
    let header: Vec<String> = rows[0].iter().map(|c| c.to_string()).collect();
    assert_eq!(
        header,
        [
            "Account",
            "Currency",
            "Period start",
            "Period end",
            "Days",
            "Balance-years",
            "Expected",
            "Posted",
            "Variance",
            "Variance (bp)",
            "Status",
            "Likely cause",
            // The book has taxed accounts: the tax columns come last.
            "Expected tax",
            "Posted tax",
            "Tax variance"
        ]
    );
    let find = |account: &str, end: &str| -> (String, String) {
        let r = rows
            .iter()
            .find(|r| {
                r[0] == account && r[3].as_date().map(|d| d.to_string()).as_deref() == Some(end)
            })
            .unwrap_or_else(|| panic!("no row {account} {end}"));
        (r[10].to_string(), r[11].to_string())
    };
    let cases = [
        (
            "HM-LN-003",
            "2026-11-15",
            "under-posted",
            "interest on ACT/365F instead of ACT/360",
        ),
        (
            "HM-SAV-004",
            "2026-11-30",
            "under-posted",
            "movement WDL-1120 of -9,000.00 valued 2026-11-20 taken from 2026-11-17 instead",
        ),
        (
            "HM-SAV-002",
            "2026-11-30",
            "over-posted",
            "rate change of 2026-11-16 (2.10% to 1.95%) not applied",
        ),
        (
            "HM-NL-001",
            "2026-11-30",
            "under-posted",
            "period start a day late",
        ),
        (
            "HM-LN-005",
            "2026-11-15",
            "over-posted",
            "no single change reproduces the posted amount; it implies a rate of",
        ),
        (
            "HM-SAV-006",
            "2026-11-30",
            "not posted",
            "no statement row covers this posting period",
        ),
        ("HM-TW-002", "2026-11-30", "within tolerance", ""),
        ("HM-SAV-001", "2026-10-31", "agrees", ""),
        ("HM-BF-001", "2026-11-30", "agrees", ""),
        // Floating-rate loans compounded in arrears, 5-day lookback and 5-day shift.
        ("HM-FLN-001", "2026-11-30", "agrees", ""),
        ("HM-FLN-002", "2026-11-30", "agrees", ""),
        // Withholding tax: the gross with its tax agrees; the net as
        // posted_interest (120.00 of 150.00) is the net of 20% tax.
        ("HM-SAV-T20", "2026-11-30", "agrees", ""),
        (
            "HM-SAV-T20N",
            "2026-11-30",
            "under-posted",
            "posted net of 20% tax (30.00)",
        ),
        ("HM-IC-003", "2026-11-30", "agrees", ""),
    ];
    for (account, end, status, cause) in cases {
        let (s, c) = find(account, end);
        assert_eq!(s, status, "{account}");
        assert!(c.starts_with(cause), "{account}: {c}");
    }
    // ACT/360 posted as ACT/365F: 26,350.00 x 6.25%/6.00% for 32 nights on both bases.
    let problems = sheet(&out, "Problems");
    assert!(problems.iter().any(|r| r[4]
        .to_string()
        .contains("2 statement rows for 2026-10-01..2026-10-31")));
}

#[test]
fn fail_on_variance_makes_a_scheduled_run_exit_3() {
    let dir = tempfile::tempdir().unwrap();
    run_to(&dir.path().join("a.xlsx"), &["--fail-on-variance"]).code(3);
    // A wide tolerance accepts every variance, but a missing posting is never
    // within tolerance: the run still exits 3, with every other row accepted
    // (HM-SAV-T20N's net posting, 73 bp under, among them).
    run_to(
        &dir.path().join("b.xlsx"),
        &["--fail-on-variance", "--tolerance-bp", "500"],
    )
    .code(3)
    .stdout(predicate::str::contains(
        "statement rows: 52 agrees, 7 within tolerance, 1 not posted",
    ));
    // Without the option, variances do not change the exit status.
    run_to(&dir.path().join("c.xlsx"), &[]).code(0);
}

/// The one-step accrual of unchanging days gives the same workbook, byte for
/// byte, as the plain day loop that `--no-fast-path` keeps for audits.
#[test]
fn no_fast_path_gives_the_same_workbook() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("fast.xlsx");
    let b = dir.path().join("plain.xlsx");
    run_to(&a, &[]).success();
    run_to(&b, &["--no-fast-path"]).success();
    assert!(std::fs::read(&a).unwrap() == std::fs::read(&b).unwrap());
}

/// `--timings` reports each step on standard error and leaves the workbook
/// as it is without it (the Run sheet does not list the option).
#[test]
fn timings_go_to_standard_error_and_not_into_the_workbook() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("quiet.xlsx");
    let b = dir.path().join("timed.xlsx");
    run_to(&a, &[])
        .success()
        .stderr(predicate::str::contains("timings:").not());
    let timed = run_to(&b, &["--timings"]).success();
    let stderr = String::from_utf8(timed.get_output().stderr.clone()).unwrap();
    for step in [
        "read and check the books",
        "fingerprint the inputs",
        // The Accruals are written while the accounts are accrued.
        "accrue and reconcile (Accruals written alongside)",
        "write the rest of the workbook",
        "total",
    ] {
        assert!(
            stderr
                .lines()
                .any(|l| l.starts_with("timings: ") && l.contains(step) && l.ends_with(" s")),
            "no '{step}' line in {stderr}"
        );
    }
    assert!(std::fs::read(&a).unwrap() == std::fs::read(&b).unwrap());
}

#[test]
fn a_csv_book_gives_a_byte_identical_workbook_across_runs_and_thread_counts() {
    let dir = tempfile::tempdir().unwrap();
    let run = |out: &Path, threads: &str| {
        ledgerate()
            .arg("run")
            .arg(sample_csv())
            .args([
                "--cutoff",
                "2026-11-30",
                "--daily",
                "--fixed-time",
                "2026-12-01T08:00:00",
                "--threads",
                threads,
                "--out",
            ])
            .arg(out)
            .assert()
            .success();
        std::fs::read(out).unwrap()
    };
    let a = run(&dir.path().join("a.xlsx"), "1");
    let b = run(&dir.path().join("b.xlsx"), "2");
    let c = run(&dir.path().join("c.xlsx"), "2");
    assert!(a == b, "--threads 1 and --threads 2 differ");
    assert!(b == c, "two runs differ");
}

/// Rows of cells as text.
type Table = Vec<Vec<String>>;

/// The Run sheet: its (item, value) facts, its Input rows and its Setting rows.
fn run_sheet(path: &Path) -> (Vec<(String, String)>, Table, Table) {
    let rows: Table = sheet(path, "Run")
        .iter()
        .map(|r| r.iter().map(|c| c.to_string()).collect())
        .collect();
    let block = |title: &str| -> Table {
        rows.iter()
            .skip_while(|r| r.first().map(String::as_str) != Some(title))
            .skip(1)
            .take_while(|r| r.first().is_some_and(|c| !c.is_empty()))
            .cloned()
            .collect()
    };
    let facts = rows
        .iter()
        .skip(1)
        .take_while(|r| r.first().is_some_and(|c| !c.is_empty()))
        .map(|r| (r[0].clone(), r.get(1).cloned().unwrap_or_default()))
        .collect();
    (facts, block("Input"), block("Setting"))
}

#[test]
fn the_run_sheet_is_an_audit_trail_of_program_command_inputs_settings_and_time() {
    use sha2::{Digest, Sha256};
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("nov.xlsx");
    run_to(
        &out,
        &[
            "--threads",
            "2",
            "--tolerance-bp",
            "0.5",
            "--entity=Harbourview Mutual",
        ],
    )
    .success();
    let (facts, inputs, settings) = run_sheet(&out);
    let fact = |name: &str| {
        facts
            .iter()
            .find(|(n, _)| n == name)
            .map(|(_, v)| v.clone())
            .unwrap_or_else(|| panic!("no {name} in {facts:?}"))
    };
    assert_eq!(
        fact("Program version"),
        format!("ledgerate {}", env!("CARGO_PKG_VERSION"))
    );
    // Every option that can change a figure, none of those that cannot.
    let command = fact("Command line");
    assert!(command.starts_with("ledgerate run "), "{command}");
    for part in [
        "--cutoff 2026-11-30",
        "--fixed-time 2026-12-01T08:00:00",
        "--tolerance-bp 0.5",
        "\"--entity=Harbourview Mutual\"",
        "harbourview-2026-11.xlsx",
    ] {
        assert!(command.contains(part), "{part} missing from {command}");
    }
    for absent in ["--threads", "--out", "nov.xlsx"] {
        assert!(!command.contains(absent), "{absent} in {command}");
    }
    let time = sheet(&out, "Run")
        .iter()
        .find(|r| r[0] == "Time of the run")
        .and_then(|r| r[1].as_datetime())
        .map(|t| t.to_string());
    assert_eq!(time.as_deref(), Some("2026-12-01 08:00:00"));

    // Each input: path, size and SHA-256 as computed here.
    let bytes = std::fs::read(sample()).unwrap();
    let sha: String = Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    assert_eq!(
        inputs,
        [vec![
            sample().display().to_string(),
            bytes.len().to_string(),
            sha
        ]]
    );

    // Every setting in force, with where it came from.
    let got: std::collections::BTreeMap<&str, (&str, &str)> = settings
        .iter()
        .map(|r| (r[0].as_str(), (r[1].as_str(), r[2].as_str())))
        .collect();
    let want = [
        ("cutoff", "2026-11-30", "command line"),
        ("window_start", "2026-11-01", "default"),
        ("entity", "Harbourview Mutual", "command line"),
        ("journal_style", "incremental", "default"),
        ("journal_detail", "sheet", "default"),
        ("daily", "false", "default"),
        ("decimal_comma", "false", "default"),
        ("statement_end", "inclusive", "default"),
        ("fail_on_variance", "false", "default"),
        (
            "tolerance_amount",
            "one minor unit of each row's currency",
            "default",
        ),
        ("tolerance_bp", "0.5", "command line"),
        ("fixing_fallback", "none", "default"),
        ("as_at", "no limit: every row is known", "default"),
        ("previous_as_at", "2026-11-02", "Settings sheet"),
        ("settlement_lines", "payment-date", "default"),
        ("statement_amounts", "gross", "Settings sheet"),
    ];
    for (name, value, source) in want {
        assert_eq!(
            got.get(name),
            Some(&(value, source)),
            "setting {name}: {got:?}"
        );
    }
    assert_eq!(got.len(), want.len(), "{got:?}");
}

#[test]
fn settings_from_a_books_settings_sheet_are_recorded_as_such() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("good.xlsx");
    let book =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/books/harbourview_good.xlsx");
    ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(&out)
        .assert()
        .code(predicate::in_iter([0, 1]));
    let (_, _, settings) = run_sheet(&out);
    let got: std::collections::BTreeMap<&str, (&str, &str)> = settings
        .iter()
        .map(|r| (r[0].as_str(), (r[1].as_str(), r[2].as_str())))
        .collect();
    for (name, value) in [
        ("cutoff", "2026-11-30"),
        ("window_start", "2026-11-01"),
        ("tolerance_amount", "0.01"),
        ("tolerance_bp", "0.5"),
        ("entity", "Harbourview Mutual"),
        ("statement_end", "exclusive"),
    ] {
        assert_eq!(
            got.get(name),
            Some(&(value, "Settings sheet")),
            "setting {name}: {got:?}"
        );
    }
}

/// HM-LN-003 (ACT/360) was posted on ACT/365F; four bases reproduce the
/// amount. The Reconciliation sheet leads with the basis nearest in family
/// and says how many there are; `explain` keeps the search's whole list.
#[test]
fn the_sheet_leads_with_the_most_plausible_cause_and_counts_them() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("nov.xlsx");
    run_to(&out, &[]).success();
    let rows = sheet(&out, "Reconciliation");
    let cause = |account: &str| -> String {
        rows.iter()
            .filter(|r| r[0] == account)
            .map(|r| r[11].to_string())
            .find(|c| !c.is_empty())
            .unwrap_or_else(|| panic!("no cause for {account}"))
    };
    assert_eq!(
        cause("HM-LN-003"),
        "interest on ACT/365F instead of ACT/360 (reproduces the posted amount exactly). \
         The most plausible of 4 single changes that reproduce the posted amount within \
         tolerance; all 4: ledgerate explain --account HM-LN-003"
    );
    // An exact change leads one that only comes within a cent.
    assert!(cause("HM-SAV-002").starts_with(
        "rate change of 2026-11-16 (2.10% to 1.95%) not applied (reproduces the posted amount exactly). \
         The most plausible of 2 single changes"
    ));
    assert!(cause("HM-SAV-004")
        .ends_with("The only single change that reproduces the posted amount within tolerance"));
    let explained = ledgerate()
        .args([
            "explain",
            "sample-books/harbourview-2026-11.xlsx",
            "--account",
            "HM-LN-003",
        ])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .output()
        .unwrap();
    let text = String::from_utf8(explained.stdout).unwrap();
    let line = text
        .lines()
        .find(|l| l.trim_start().starts_with("likely cause:"))
        .expect("a likely cause line");
    for basis in ["ACT/365F", "ACT/365L", "ACT/ACT ISDA", "NL/365"] {
        assert!(
            line.contains(&format!("interest on {basis} instead of ACT/360")),
            "{line}"
        );
    }
}

/// Copies the sample CSV book into `dir`, with `edit` applied to accounts.csv.
fn sample_csv_edited(dir: &Path, edit: impl Fn(&str) -> String) -> PathBuf {
    let book = dir.join("book");
    copy_dir(&sample_csv(), &book);
    let accounts = book.join("accounts.csv");
    let text = std::fs::read_to_string(&accounts).unwrap();
    std::fs::write(&accounts, edit(&text)).unwrap();
    book
}

#[test]
fn the_printed_problem_counts_are_the_problems_sheets_including_the_writers_own_warnings() {
    // A balance of 19 significant digits is written as text (a spreadsheet
    // number holds 15 exactly); the writer adds a warning row for it.
    let dir = tempfile::tempdir().unwrap();
    let book = sample_csv_edited(dir.path(), |t| {
        t.replacen(",18250.00,", ",1000000000000000.55,", 1)
    });
    let out = dir.path().join("out.xlsx");
    let assert = ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(&out)
        .assert();
    let stdout = String::from_utf8_lossy(&assert.get_output().stdout).into_owned();
    let problems = sheet(&out, "Problems");
    let on_sheet = |word: &str| {
        problems
            .iter()
            .skip(1)
            .filter(|r| r.first().is_some_and(|c| *c == word))
            .count()
    };
    let warnings = on_sheet("warning");
    assert!(
        warnings >= 1,
        "the writer's warning is on the sheet: {problems:?}"
    );
    let plural = |n: usize, word: &str| {
        if n == 1 {
            format!("{n} {word}")
        } else {
            format!("{n} {word}s")
        }
    };
    let line = format!(
        "problems: {}, {}, {}",
        plural(on_sheet("error"), "error"),
        plural(warnings, "warning"),
        plural(on_sheet("note"), "note")
    );
    assert!(stdout.contains(&line), "expected '{line}' in:\n{stdout}");
}

/// The Summary's totals by currency and side, as (currency, side) and the
/// cells from Accounts on, from the row under its header.
fn summary_totals(path: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    let rows = sheet(path, "Summary");
    let start = rows
        .iter()
        .position(|r| r[0] == "Currency" && r[1] == "Side")
        .expect("the totals header");
    let header = rows[start].iter().map(|c| c.to_string()).collect();
    let body = rows[start + 1..]
        .iter()
        .take_while(|r| r[1] == "asset" || r[1] == "liability")
        .map(|r| r.iter().map(|c| c.to_string()).collect())
        .collect();
    (header, body)
}

/// A run with withholding tax adds Tax withheld in window to the Summary's
/// totals, summed by currency and side; a currency and side without a taxed
/// account leaves it blank.
#[test]
fn the_summary_totals_carry_the_tax_withheld_by_currency_and_side() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("nov.xlsx");
    run_to(&out, &[]).success();
    let (header, body) = summary_totals(&out);
    assert_eq!(header[7], "Prior-period adjustment");
    assert_eq!(header[8], "Tax withheld in window");
    let tax = |currency: &str, side: &str| {
        body.iter()
            .find(|r| r[0] == currency && r[1] == side)
            .map(|r| r[8].clone())
            .unwrap_or_else(|| panic!("no row {currency} {side}"))
    };
    // HM-IC-003: 53,083.33 x 15% = 7,962.4995, 7,962.50.
    assert_eq!(tax("EUR", "asset"), "7962.5");
    // HM-SAV-T20 60.00 (300.00 x 20%), HM-SAV-T20N 24.00 (its 120.00 as
    // posted x 20%), HM-SAV-005 exempt 0.00: 84.00.
    assert_eq!(tax("GBP", "liability"), "84");
    assert_eq!(tax("USD", "asset"), "");
    assert_eq!(tax("EUR", "liability"), "");
}

/// A run without withholding tax writes the totals as before: eight columns.
#[test]
fn a_run_without_tax_keeps_the_summary_totals_eight_columns_wide() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("loans.xlsx");
    ledgerate()
        .arg("run")
        .arg(
            Path::new(env!("CARGO_MANIFEST_DIR"))
                .join("sample-books/harbourview-loans-2026-11.xlsx"),
        )
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(&out)
        .assert()
        .success();
    let (header, body) = summary_totals(&out);
    assert_eq!(header[7], "Prior-period adjustment");
    assert_eq!(header.get(8).map(String::as_str).unwrap_or(""), "");
    assert!(body
        .iter()
        .all(|r| r.get(8).map(String::as_str).unwrap_or("").is_empty()));
}
