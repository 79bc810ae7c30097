//! The input side of books that tie (behaviour.md, Knowledge date): the
//! Booked and Trial balance sheets, the Rates `booked`, Statements
//! `posting_date` and Accounts `gl_prior_period` columns, the as_at,
//! previous_as_at and settlement_lines settings, and what a run as at a day
//! leaves out. Books are Harbourview Mutual's (an invented credit union),
//! written here as CSV folders, and once as a workbook.
//!
//! DEP-1 is the deposit of the ledger's worked example A2: ACT/365F, simple,
//! monthly, capitalised, 3.65%, opened 2026-10-01 with 100,000.00 (10.00 a
//! night); October posts 310.00; +36,500.00 valued 2026-11-20 is booked on
//! 2026-12-03.

use std::fs;
use std::path::{Path, PathBuf};

use crate::common::{date, dec, ledgerate, sheet};
use calamine::Data;
use ledgerate::book::{booked, contract_violations, read_book, trial_balance, Book, ReadOptions};
use ledgerate::problem::{Problem, Severity};
use ledgerate::report::book_writer::{BookWriter, Value};
use ledgerate::schema::{
    layout, Layout, SheetKind, ACCOUNTS, BOOKED, RATES, SETTINGS, STATEMENTS, TRIAL_BALANCE,
};
use predicates::prelude::*;

const ACCOUNTS_CSV: &str = "\
account,currency,day_count,open_date,opening_balance,name,posting,capitalise,rate_ref,gl_accrued,gl_prior_period
DEP-1,USD,ACT/365F,2026-10-01,100000.00,Harbourview term saver,monthly,yes,HM-DEP,2310-ACCR-INT,5190-INT-PRIOR
DEP-2,USD,ACT/365F,2026-11-10,50000.00,Harbourview new saver,monthly,yes,HM-DEP,2310-ACCR-INT,
DEP-3,USD,ACT/365F,2026-10-01,20000.00,Harbourview easy saver,monthly,yes,HM-DEP,2310-ACCR-INT,
";

/// The 5% table takes effect on 25 November but was booked on 5 December.
const RATES_CSV: &str = "\
rate_ref,effective,rate_percent,booked
HM-DEP,2026-01-01,3.65,
HM-DEP,2026-11-25,5.00,2026-12-05
";

const MOVEMENTS_CSV: &str = "\
account,value_date,amount,booking_date,reference
DEP-1,2026-11-20,36500.00,2026-12-03,DEP-1-TOPUP
";

/// DEP-3's only statement row was posted on 4 December.
const STATEMENTS_CSV: &str = "\
account,period_start,period_end,posted_interest,reference,posting_date
DEP-1,2026-10-01,2026-10-31,310.00,ST-DEP-1-10,2026-11-01
DEP-1,2026-11-01,2026-11-30,300.93,ST-DEP-1-11,2026-12-01
DEP-3,2026-11-01,2026-11-30,60.18,ST-DEP-3-11,2026-12-04
";

const BOOKED_CSV: &str = "\
account,date,open_item
DEP-1,2026-10-31,310.00
";

const TRIAL_BALANCE_CSV: &str = "\
entity,currency,gl_account,date,balance
Harbourview Mutual,USD,2310-ACCR-INT,2026-10-31,-310.00
";

const SETTINGS_CSV: &str = "\
setting,value
cutoff,2026-11-30
entity,Harbourview Mutual
";

/// Writes a CSV book into `dir`: the November book above, with `changed`
/// files in place of its own or added to them.
fn csv_book(dir: &Path, changed: &[(&str, &str)]) -> PathBuf {
    let book = dir.join("book");
    fs::create_dir_all(&book).unwrap();
    for (name, text) in [
        ("accounts.csv", ACCOUNTS_CSV),
        ("rates.csv", RATES_CSV),
        ("movements.csv", MOVEMENTS_CSV),
        ("statements.csv", STATEMENTS_CSV),
        ("booked.csv", BOOKED_CSV),
        ("trial_balance.csv", TRIAL_BALANCE_CSV),
        ("settings.csv", SETTINGS_CSV),
    ] {
        let text = changed
            .iter()
            .find(|(n, _)| *n == name)
            .map_or(text, |(_, t)| t);
        fs::write(book.join(name), text).unwrap();
    }
    // Sheets the November book does not have.
    for (name, text) in changed {
        if !book.join(name).exists() {
            fs::write(book.join(name), text).unwrap();
        }
    }
    book
}

fn read(path: &Path) -> Book {
    read_book(path, &ReadOptions::default())
}

/// Runs the month end of `book` into `out` with `extra` options.
fn run(book: &Path, out: &Path, extra: &[&str]) -> assert_cmd::assert::Assert {
    ledgerate()
        .arg("run")
        .arg(book)
        .args(["--fixed-time", "2026-12-05T08:00:00", "--out"])
        .arg(out)
        .args(extra)
        .assert()
}

/// The Accruals cell of `account` under the header `column`, as text.
fn accrual(out: &Path, account: &str, column: &str) -> String {
    let rows = sheet(out, "Accruals");
    let col = rows[0].iter().position(|h| *h == column).unwrap();
    let row = rows.iter().find(|r| r[0] == account).unwrap();
    match &row[col] {
        Data::Float(f) => format!("{f:.2}"),
        other => other.to_string(),
    }
}

/// The Problems sheet's rows as (severity, sheet, found).
fn problems_sheet(out: &Path) -> Vec<(String, String, String)> {
    let rows = sheet(out, "Problems");
    let col = |name: &str| rows[0].iter().position(|h| *h == name).unwrap();
    let (severity, at, found) = (col("Severity"), col("Sheet"), col("Found"));
    rows[1..]
        .iter()
        .map(|r| {
            (
                r[severity].to_string(),
                r[at].to_string(),
                r[found].to_string(),
            )
        })
        .collect()
}

/// The notes of the Problems sheet that say rows were left out.
fn left_out(out: &Path) -> Vec<(String, String, String)> {
    problems_sheet(out)
        .into_iter()
        .filter(|(_, _, found)| found.contains("left out"))
        .collect()
}

fn note(sheet: &str, found: &str) -> (String, String, String) {
    ("note".into(), sheet.into(), found.into())
}

/// The one problem of `severity` at `sheet`!`cell`.
fn problem_at<'a>(
    problems: &'a [Problem],
    severity: Severity,
    sheet: &str,
    cell: &str,
) -> &'a Problem {
    let at: Vec<&Problem> = problems
        .iter()
        .filter(|p| p.severity == severity && p.position.sheet == sheet && p.position.cell == cell)
        .collect();
    assert_eq!(
        at.len(),
        1,
        "one {severity:?} at {sheet}!{cell} in {problems:#?}"
    );
    at[0]
}

/// Knowledge date, spec example A2: as at 2026-12-02 the top-up booked on
/// 3 December is not known, nor the 5% table booked on 5 December, nor
/// DEP-3's statement row posted on 4 December. DEP-1's November posting is
/// 100,310.00 x 0.0365 x 30/365 = 300.93 exactly, its balance at cut-off
/// 100,610.93 and nothing is accrued; one note per sheet counts what was
/// left out.
#[test]
fn knowledge_date_as_at_leaves_out_what_was_booked_later_with_one_note_per_sheet() {
    let dir = tempfile::tempdir().unwrap();
    let book = csv_book(dir.path(), &[]);
    let out = dir.path().join("as-at.xlsx");
    run(&book, &out, &["--as-at", "2026-12-02"]).code(0);
    assert_eq!(accrual(&out, "DEP-1", "Balance at cut-off"), "100610.93");
    assert_eq!(accrual(&out, "DEP-1", "Accrued at cut-off"), "0.00");
    assert_eq!(accrual(&out, "DEP-1", "Posted in window"), "300.93");
    assert_eq!(
        left_out(&out),
        [
            note(
                "rates.csv",
                "1 rate table booked after 2026-12-02 is left out"
            ),
            note(
                "movements.csv",
                "1 movement booked after 2026-12-02 is left out"
            ),
            note(
                "statements.csv",
                "1 statement row booked after 2026-12-02 is left out"
            ),
        ]
    );
    // DEP-3's statement row takes no part in the reconciliation.
    let reconciled = sheet(&out, "Reconciliation");
    assert!(
        !reconciled
            .iter()
            .any(|r| r[0] == "DEP-3" && r.iter().any(|c| *c == 60.18)),
        "{reconciled:?}"
    );
}

/// Knowledge date, spec example A2 ("today"): once the top-up is known, the
/// balance at cut-off is 137,110.93 and its back-value for 20..30 November,
/// 36,500 x 0.0365 x 11/365 = 40.15, is accrued. The 5% table, booked on
/// 5 December, is still left out as at the 4th.
#[test]
fn knowledge_date_a_movement_known_at_as_at_enters_every_figure() {
    let dir = tempfile::tempdir().unwrap();
    let book = csv_book(dir.path(), &[]);
    let out = dir.path().join("as-at.xlsx");
    run(&book, &out, &["--as-at", "2026-12-04"]).code(0);
    assert_eq!(accrual(&out, "DEP-1", "Balance at cut-off"), "137110.93");
    assert_eq!(accrual(&out, "DEP-1", "Accrued at cut-off"), "40.15");
    assert_eq!(
        left_out(&out),
        [note(
            "rates.csv",
            "1 rate table booked after 2026-12-04 is left out"
        )]
    );
}

/// Knowledge date: without as_at every row is known and nothing is said;
/// the Run sheet lists the three settings with their defaults.
#[test]
fn knowledge_date_without_as_at_nothing_is_left_out() {
    let dir = tempfile::tempdir().unwrap();
    let book = csv_book(dir.path(), &[]);
    let out = dir.path().join("all.xlsx");
    run(&book, &out, &[]).code(0);
    assert_eq!(left_out(&out), []);
    // DEP-3's statement row, posted on 4 December, is reconciled.
    assert!(sheet(&out, "Reconciliation")
        .iter()
        .any(|r| r[0] == "DEP-3" && r.iter().any(|c| *c == 60.18)));
    let later = dir.path().join("later.xlsx");
    run(&book, &later, &["--as-at", "2026-12-31"]).code(0);
    assert_eq!(left_out(&later), []);
    for column in [
        "Balance at cut-off",
        "Accrued at cut-off",
        "Posted in window",
    ] {
        for account in ["DEP-1", "DEP-2", "DEP-3"] {
            assert_eq!(
                accrual(&out, account, column),
                accrual(&later, account, column),
                "{account} {column}"
            );
        }
    }
    let settings: Vec<(String, String)> = sheet(&out, "Run")
        .iter()
        .map(|r| (r[0].to_string(), r[1].to_string()))
        .collect();
    for (name, value) in [
        ("as_at", "no limit: every row is known"),
        ("previous_as_at", "none"),
        ("settlement_lines", "payment-date"),
    ] {
        assert!(
            settings.contains(&(name.to_string(), value.to_string())),
            "{name} {value} not in {settings:?}"
        );
    }
}

/// Knowledge date: the as_at, previous_as_at and settlement_lines rows of a
/// Settings sheet are in force like the options, and listed as such.
#[test]
fn knowledge_date_the_settings_sheet_gives_as_at_like_the_option() {
    let dir = tempfile::tempdir().unwrap();
    let settings = format!(
        "{SETTINGS_CSV}as_at,2026-12-02\nprevious_as_at,2026-11-03\nsettlement_lines,period-end\n"
    );
    let book = csv_book(dir.path(), &[("settings.csv", &settings)]);
    let out = dir.path().join("as-at.xlsx");
    run(&book, &out, &[]).code(0);
    assert_eq!(accrual(&out, "DEP-1", "Balance at cut-off"), "100610.93");
    assert_eq!(left_out(&out).len(), 3);
    let run_sheet: Vec<(String, String, String)> = sheet(&out, "Run")
        .iter()
        .filter(|r| r.len() >= 3)
        .map(|r| (r[0].to_string(), r[1].to_string(), r[2].to_string()))
        .collect();
    for (name, value) in [
        ("as_at", "2026-12-02"),
        ("previous_as_at", "2026-11-03"),
        ("settlement_lines", "period-end"),
    ] {
        let row = (
            name.to_string(),
            value.to_string(),
            "Settings sheet".to_string(),
        );
        assert!(run_sheet.contains(&row), "{row:?} not in {run_sheet:?}");
    }
    // check and explain read the same settings, and leave out the same rows.
    ledgerate()
        .arg("check")
        .arg(&book)
        .assert()
        .code(0)
        .stdout(predicate::str::contains(
            "1 movement booked after 2026-12-02 is left out",
        ));
    ledgerate()
        .args(["explain", "--account", "DEP-1"])
        .arg(&book)
        .assert()
        .code(0)
        .stdout(predicate::str::contains("100,610.93").or(predicate::str::contains("100610.93")))
        .stdout(predicate::str::contains("137,110.93").not())
        .stdout(predicate::str::contains("137110.93").not());
}

/// Knowledge date and A.7 Problems: an as-at date before the cut-off, a
/// previous as-at date outside F-1..A and an unknown settlement_lines word
/// are usage errors (status 2) naming the option or the Settings cell, and
/// nothing is written.
#[test]
fn knowledge_date_settings_that_cannot_hold_are_usage_errors_and_nothing_is_written() {
    let dir = tempfile::tempdir().unwrap();
    let book = csv_book(dir.path(), &[]);
    let out = dir.path().join("never.xlsx");
    for (options, words) in [
        (
            &["--as-at", "2026-11-29"][..],
            &[
                "--as-at",
                "before the cut-off 2026-11-30",
                "a close cannot know less than its period",
                "on or after 2026-11-30",
            ][..],
        ),
        (
            &["--previous-as-at", "2026-10-30"][..],
            &["--previous-as-at", "2026-10-31 or later", "leave it out"][..],
        ),
        (
            &["--as-at", "2026-12-03", "--previous-as-at", "2026-12-04"][..],
            &["--previous-as-at", "outside 2026-10-31..2026-12-03"][..],
        ),
        (
            &["--settlement-lines", "on-payment"][..],
            &[
                "--settlement-lines",
                "payment-date",
                "in-window",
                "period-end",
            ][..],
        ),
    ] {
        let mut err = predicate::str::contains("ledgerate: ").boxed();
        for w in words {
            err = err.and(predicate::str::contains(*w)).boxed();
        }
        run(&book, &out, options).code(2).stderr(err);
        assert!(!out.exists(), "{options:?} wrote the workbook");
    }
    // check and explain refuse them alike.
    ledgerate()
        .arg("check")
        .arg(&book)
        .args(["--as-at", "2026-11-29"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains(
            "a close cannot know less than its period",
        ));
    ledgerate()
        .args([
            "explain",
            "--account",
            "DEP-1",
            "--previous-as-at",
            "2026-10-01",
        ])
        .arg(&book)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--previous-as-at"));

    // From the Settings sheet: the message names its file and line.
    let settings = format!("{SETTINGS_CSV}as_at,2026-11-20\n");
    let other = tempfile::tempdir().unwrap();
    let book = csv_book(other.path(), &[("settings.csv", &settings)]);
    run(&book, &out, &[])
        .code(2)
        .stderr(predicate::str::contains("the Settings sheet's as_at ("))
        .stderr(predicate::str::contains("settings.csv, line 4"))
        .stderr(predicate::str::contains(
            "a close cannot know less than its period",
        ));
    assert!(!out.exists());
    let names: Vec<_> = fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(names, ["book"], "nothing but the book in {:?}", dir.path());
}

/// A.7 Problems, Booked: an unknown account is an error on the row (the row
/// is not used); two rows for one account and day, or a row whose open item
/// is not a number, an error on the account, which is left out with its
/// rows; the other accounts are read.
#[test]
fn booked_rows_that_cannot_be_used_are_errors_on_the_row_or_the_account() {
    let dir = tempfile::tempdir().unwrap();
    let accounts = format!(
        "{ACCOUNTS_CSV}DEP-4,USD,ACT/365F,2026-10-01,10000.00,Harbourview junior saver,monthly,yes,HM-DEP,,\n"
    );
    let booked_rows = "\
account,date,open_item
DEP-1,2026-10-31,310.00
DEP-9,2026-10-31,12.00
DEP-3,2026-10-31,62.00
DEP-3,2026-10-31,62.05
DEP-4,2026-10-31,thirty
";
    let book = csv_book(
        dir.path(),
        &[("accounts.csv", &accounts), ("booked.csv", booked_rows)],
    );
    let b = read(&book);
    assert_eq!(contract_violations(&b), Vec::<String>::new());
    let ids: Vec<&str> = b.accounts.iter().map(|a| a.terms.id.as_str()).collect();
    assert_eq!(ids, ["DEP-1", "DEP-2"]);

    let unknown = problem_at(&b.problems, Severity::Error, "booked", "A3");
    assert_eq!(unknown.found, "DEP-9");
    assert_eq!(unknown.position.column, "account");
    assert_eq!(unknown.expected, "an account of the Accounts sheet");
    assert!(
        unknown.fix.contains("the row is not used"),
        "{}",
        unknown.fix
    );

    let twice = problem_at(&b.problems, Severity::Error, "booked", "B5");
    assert_eq!(twice.account.as_deref(), Some("DEP-3"));
    assert_eq!(twice.found, "2026-10-31");
    assert!(
        twice
            .expected
            .contains("one Booked row for DEP-3 on 2026-10-31 (it is already in B4)"),
        "{}",
        twice.expected
    );
    assert!(
        twice.fix.contains("remove one of the two rows"),
        "{}",
        twice.fix
    );

    let not_a_number = problem_at(&b.problems, Severity::Error, "booked", "C6");
    assert_eq!(not_a_number.account.as_deref(), Some("DEP-4"));
    assert_eq!(not_a_number.found, "thirty");

    // Only DEP-1's row is kept; its open item is exact.
    assert_eq!(b.booked.len(), 1);
    assert_eq!(
        (
            b.booked[0].account.as_str(),
            b.booked[0].date,
            b.booked[0].open_item
        ),
        ("DEP-1", date("2026-10-31"), dec("310.00"))
    );

    // The terminal says the same, file and line, and the status is 1.
    ledgerate()
        .arg("check")
        .arg(&book)
        .assert()
        .code(1)
        .stdout(predicate::str::contains(
            "booked.csv, line 3, column account: found 'DEP-9'",
        ))
        .stdout(predicate::str::contains(
            "booked.csv, line 5, column date: found '2026-10-31'",
        ));
}

/// A.7 Problems and A.3: a Booked row dated neither the day before the
/// window nor the cut-off is a warning and not used; so is a row at the day
/// before the window for an account that opens in the window. Rows at F-1
/// and C of an account open before the window are used without a word.
#[test]
fn booked_rows_of_other_days_are_warned_as_not_used() {
    let dir = tempfile::tempdir().unwrap();
    let booked_rows = "\
account,date,open_item
DEP-1,2026-10-31,310.00
DEP-1,2026-11-15,150.00
DEP-2,2026-10-31,0.00
DEP-1,2026-11-30,300.93
";
    let book = csv_book(dir.path(), &[("booked.csv", booked_rows)]);
    let b = read(&book);
    assert_eq!(b.booked.len(), 4, "the reader keeps every good row");
    let warned = booked::dates_not_used(&b, date("2026-11-01"), date("2026-11-30"));
    assert_eq!(warned.len(), 2, "{warned:#?}");
    let mid = problem_at(&warned, Severity::Warning, "booked", "3:3");
    assert_eq!(mid.found, "2026-11-15");
    assert!(
        mid.expected.contains(
            "dated 2026-10-31 (the day before the window, the opening) or 2026-11-30 (the cut-off)"
        ),
        "{}",
        mid.expected
    );
    assert!(
        mid.fix.starts_with("this run does not use the row"),
        "{}",
        mid.fix
    );
    let opens_in_window = problem_at(&warned, Severity::Warning, "booked", "4:4");
    assert_eq!(opens_in_window.account.as_deref(), Some("DEP-2"));
    assert!(
        opens_in_window.expected.contains("open_date 2026-11-10"),
        "{}",
        opens_in_window.expected
    );
    assert!(
        opens_in_window.fix.contains("not used"),
        "{}",
        opens_in_window.fix
    );

    // check names the row, file and line; a run reports them on its
    // Problems sheet, and still computes.
    ledgerate()
        .arg("check")
        .arg(&book)
        .assert()
        .code(0)
        .stdout(predicate::str::contains(
            "booked.csv, line 3: found '2026-11-15'; expected a Booked row dated 2026-10-31",
        ));
    let out = dir.path().join("nov.xlsx");
    run(&book, &out, &[]).code(0);
    let warnings: Vec<(String, String, String)> = problems_sheet(&out)
        .into_iter()
        .filter(|(severity, _, _)| severity == "warning")
        .collect();
    assert_eq!(
        warnings,
        [
            ("warning".into(), "booked.csv".into(), "2026-11-15".into()),
            ("warning".into(), "booked.csv".into(), "2026-10-31".into()),
        ]
    );
}

/// A.5 Tie-out, its input: a trial balance row needs a known ISO 4217 code
/// (an error on the row, which is not used, with the code probably meant);
/// a row dated neither the day before the window nor the cut-off is a
/// warning and not used; a second balance of one GL account, currency,
/// entity and day is an error on the row. No account is kept out.
#[test]
fn trial_balance_rows_are_checked_and_dated() {
    let dir = tempfile::tempdir().unwrap();
    let tb = "\
entity,currency,gl_account,date,balance
Harbourview Mutual,USD,2310-ACCR-INT,2026-10-31,-310.00
Harbourview Mutual,USX,2310-ACCR-INT,2026-11-30,-454.23
Harbourview Mutual,usd,2310-ACCR-INT,2026-11-29,-400.00
Harbourview Mutual,USD,2310-ACCR-INT,2026-10-31,-300.00
Harbourview Mutual,USD,2310-ACCR-INT,2026-11-30,1.5e
";
    let book = csv_book(dir.path(), &[("trial_balance.csv", tb)]);
    let b = read(&book);
    assert_eq!(b.accounts.len(), 3, "no account depends on the sheet");
    let code = problem_at(&b.problems, Severity::Error, "trial_balance", "B3");
    assert_eq!(code.found, "USX");
    assert_eq!(code.expected, "an ISO 4217 currency code");
    assert!(code.fix.starts_with("did you mean USD?"), "{}", code.fix);
    let twice = problem_at(&b.problems, Severity::Error, "trial_balance", "C5");
    assert!(
        twice.expected.contains("it is already in C2"),
        "{}",
        twice.expected
    );
    let amount = problem_at(&b.problems, Severity::Error, "trial_balance", "E6");
    assert_eq!(amount.found, "1.5e");
    let kept: Vec<(String, String)> = b
        .trial_balance
        .iter()
        .map(|r| (r.currency.clone(), r.balance.to_string()))
        .collect();
    assert_eq!(
        kept,
        [
            ("USD".into(), "-310.00".into()),
            ("USD".into(), "-400.00".into())
        ],
        "the code as ISO writes it; debit positive, credit negative, as given"
    );
    let warned = trial_balance::dates_not_used(&b, date("2026-11-01"), date("2026-11-30"));
    assert_eq!(warned.len(), 1, "{warned:#?}");
    let day = problem_at(&warned, Severity::Warning, "trial_balance", "4:4");
    assert_eq!(day.found, "2026-11-29");
    assert!(day.fix.contains("does not use the row"), "{}", day.fix);
}

/// Knowledge date, Rates: a table is booked whole. Rows of one table with
/// different booked dates (a blank is the effective date) are an error on
/// the schedule, at the cell that differs; the accounts that earn it are
/// left out. Tables booked after their effective date are recorded, fixed
/// and floating alike.
#[test]
fn a_rate_table_booked_on_two_days_is_an_error_on_the_schedule() {
    let dir = tempfile::tempdir().unwrap();
    let accounts = format!(
        "{ACCOUNTS_CSV}DEP-5,USD,ACT/365F,2026-10-01,150000.00,Harbourview tiered saver,monthly,yes,HM-TIER,,\n"
    );
    let rates = "\
rate_ref,effective,rate_percent,tier_from,booked
HM-DEP,2026-01-01,3.65,0,
HM-DEP,2026-11-25,5.00,0,2026-12-05
HM-TIER,2026-01-01,3.00,0,
HM-TIER,2026-11-01,3.50,0,2026-11-03
HM-TIER,2026-11-01,4.00,100000,
";
    let book = csv_book(
        dir.path(),
        &[("accounts.csv", &accounts), ("rates.csv", rates)],
    );
    let b = read(&book);
    let split = problem_at(&b.problems, Severity::Error, "rates", "E6");
    assert_eq!(split.found, "2026-11-01");
    assert!(
        split
            .expected
            .contains("the booked date of the other rows of the HM-TIER table effective 2026-11-01: 2026-11-03 (E5"),
        "{}",
        split.expected
    );
    assert!(
        split.fix.contains("a table is booked whole"),
        "{}",
        split.fix
    );
    let left = b
        .problems
        .iter()
        .find(|p| p.account.as_deref() == Some("DEP-5"))
        .unwrap();
    assert!(
        left.expected
            .contains("a rate schedule without errors (see Rates!E6)"),
        "{left}"
    );
    assert!(!b.accounts.iter().any(|a| a.terms.id == "DEP-5"));
    assert!(!b.rates.contains_key("HM-TIER"));
    assert_eq!(
        b.rate_bookings.get("HM-DEP"),
        Some(&vec![(date("2026-11-25"), date("2026-12-05"))])
    );
    assert!(!b.rate_bookings.contains_key("HM-TIER"));
}

/// Knowledge date: a floating table is left out whole like a fixed one.
#[test]
fn knowledge_date_a_floating_table_booked_later_is_left_out_whole() {
    let dir = tempfile::tempdir().unwrap();
    let accounts = "\
account,currency,day_count,open_date,opening_balance,name,side,posting,rate_ref,rate_method
DEP-1,USD,ACT/365F,2026-10-01,100000.00,Harbourview term saver,liability,monthly,HM-DEP,fixed
DEP-3,USD,ACT/365F,2026-10-01,20000.00,Harbourview easy saver,liability,monthly,HM-DEP,fixed
LN-1,USD,ACT/360,2026-11-02,250000.00,Harbourview member loan,asset,monthly,HM-FLT,simple-daily
";
    let rates = "\
rate_ref,effective,rate_percent,index,spread_bp,booked
HM-DEP,2026-01-01,3.65,,,
HM-DEP,2026-11-25,5.00,,,2026-12-05
HM-FLT,2026-01-01,,HM-ON,150,
HM-FLT,2026-11-16,,HM-ON,175,2026-12-04
";
    let mut fixings = String::from("index,date,rate_percent\n");
    for d in [
        2, 3, 4, 5, 6, 9, 10, 11, 12, 13, 16, 17, 18, 19, 20, 23, 24, 25, 26, 27, 30,
    ] {
        fixings.push_str(&format!("HM-ON,2026-11-{d:02},4.00\n"));
    }
    let book = csv_book(
        dir.path(),
        &[
            ("accounts.csv", accounts),
            ("rates.csv", rates),
            ("fixings.csv", &fixings),
        ],
    );
    let mut b = read(&book);
    assert!(!b.has_errors(), "{:#?}", b.problems);
    assert_eq!(b.floating_rates["HM-FLT"].tables().len(), 2);
    let notes = ledgerate::book::known::keep_known(&mut b, date("2026-12-02"));
    assert_eq!(b.floating_rates["HM-FLT"].tables().len(), 1);
    assert_eq!(
        b.floating_rates["HM-FLT"].tables()[0].effective,
        date("2026-01-01")
    );
    assert_eq!(b.rates["HM-DEP"].tables().len(), 1);
    let found: Vec<&str> = notes.iter().map(|n| n.found.as_str()).collect();
    assert_eq!(
        found,
        [
            "1 movement booked after 2026-12-02 is left out",
            "1 statement row booked after 2026-12-02 is left out",
            "2 rate tables booked after 2026-12-02 are left out",
        ]
    );
    assert!(notes.iter().all(|n| n.severity == Severity::Note));
    assert_eq!(notes[2].position.sheet, "rates");
    assert_eq!(
        notes[2].position.to_string(),
        book.join("rates.csv").display().to_string()
    );
    // Fixings are never filtered.
    assert_eq!(b.fixings, read(&book).fixings);
}

/// Input books: the Booked and Trial balance sheets and the new columns
/// read the same from a workbook as from a CSV folder (booked.csv,
/// trial_balance.csv), cells typed as numbers and dates or as text.
#[test]
fn a_csv_folder_and_a_workbook_give_the_same_ledger_inputs() {
    let dir = tempfile::tempdir().unwrap();
    let csv = csv_book(dir.path(), &[]);
    for name in ["booked.csv", "trial_balance.csv"] {
        assert!(csv.join(name).is_file());
    }
    let xlsx = dir.path().join("book.xlsx");
    write_workbook(&xlsx);
    let (from_csv, from_xlsx) = (read(&csv), read(&xlsx));
    for b in [&from_csv, &from_xlsx] {
        assert!(b.problems.is_empty(), "{:#?}", b.problems);
    }
    assert_eq!(
        from_xlsx.sheets[&SheetKind::TrialBalance].sheet,
        "Trial balance"
    );
    assert_eq!(
        from_csv.sheets[&SheetKind::TrialBalance].sheet,
        "trial_balance"
    );

    let booked = |b: &Book| {
        b.booked
            .iter()
            .map(|r| (r.account.clone(), r.date, r.open_item))
            .collect::<Vec<_>>()
    };
    assert_eq!(booked(&from_xlsx), booked(&from_csv));
    assert_eq!(
        booked(&from_csv),
        [("DEP-1".into(), date("2026-10-31"), dec("310.00"))]
    );
    let tb = |b: &Book| {
        b.trial_balance
            .iter()
            .map(|r| {
                (
                    r.entity.clone(),
                    r.currency.clone(),
                    r.gl_account.clone(),
                    r.date,
                    r.balance,
                )
            })
            .collect::<Vec<_>>()
    };
    assert_eq!(tb(&from_xlsx), tb(&from_csv));
    assert_eq!(tb(&from_csv)[0].4, dec("-310.00"));
    assert_eq!(from_xlsx.rate_bookings, from_csv.rate_bookings);
    assert_eq!(
        from_csv.rate_bookings["HM-DEP"],
        [(date("2026-11-25"), date("2026-12-05"))]
    );
    let posted = |b: &Book| {
        b.statements
            .iter()
            .map(|s| s.posting_date)
            .collect::<Vec<_>>()
    };
    assert_eq!(posted(&from_xlsx), posted(&from_csv));
    assert_eq!(
        posted(&from_csv),
        [
            Some(date("2026-11-01")),
            Some(date("2026-12-01")),
            Some(date("2026-12-04"))
        ]
    );
    let prior = |b: &Book| {
        b.accounts
            .iter()
            .map(|a| a.gl.prior_period.clone())
            .collect::<Vec<_>>()
    };
    assert_eq!(prior(&from_xlsx), prior(&from_csv));
    assert_eq!(
        prior(&from_csv),
        [Some("5190-INT-PRIOR".into()), None, None]
    );
    let settings = |b: &Book| {
        b.settings
            .iter()
            .map(|s| (s.name.clone(), s.value.clone()))
            .collect::<Vec<_>>()
    };
    assert_eq!(settings(&from_xlsx), settings(&from_csv));
}

/// The CSV book above as a workbook, numbers and dates as real cells.
fn write_workbook(target: &Path) {
    const SHEETS: [Layout; 7] = [
        layout!(
            ACCOUNTS,
            "account",
            "currency",
            "day_count",
            "open_date",
            "opening_balance",
            "name",
            "posting",
            "capitalise",
            "rate_ref",
            "gl_accrued",
            "gl_prior_period"
        ),
        layout!(RATES, "rate_ref", "effective", "rate_percent", "booked"),
        Layout::every(SheetKind::Movements),
        layout!(
            STATEMENTS,
            "account",
            "period_start",
            "period_end",
            "posted_interest",
            "reference",
            "posting_date"
        ),
        Layout::every(BOOKED.kind),
        Layout::every(TRIAL_BALANCE.kind),
        Layout::every(SETTINGS.kind),
    ];
    let mut w = BookWriter::xlsx(target, &SHEETS, "Ledger inputs", date("2026-12-01")).unwrap();
    let files = [
        ACCOUNTS_CSV,
        RATES_CSV,
        MOVEMENTS_CSV,
        STATEMENTS_CSV,
        BOOKED_CSV,
        TRIAL_BALANCE_CSV,
        SETTINGS_CSV,
    ];
    for (layout, text) in SHEETS.iter().zip(files) {
        for line in text.lines().skip(1) {
            let cells: Vec<Value> = line.split(',').map(typed).collect();
            w.row(layout.sheet, &cells).unwrap();
        }
    }
    w.finish().unwrap();
}

/// A CSV field as a spreadsheet cell: a date, a number, text or nothing.
fn typed(field: &str) -> Value {
    if field.is_empty() {
        Value::Empty
    } else if let Ok(d) = field.parse() {
        Value::Date(d)
    } else if let Ok(n) = field.parse() {
        Value::Number(n)
    } else {
        Value::Text(field.to_string())
    }
}
