//! The messages an interest accountant reads at the terminal, each pinned
//! with what was found, what is expected and the fix: a missing sheet
//! before the accounts it keeps out, counts in the singular, the id meant
//! by `explain --account`, date options that are not ISO, RFC 3339 run
//! times, a CSV book's file and line.

use std::path::{Path, PathBuf};

use crate::common::{ledgerate, sample, sample_csv, sheet};
use calamine::Data;

/// A copy of the sample CSV book without its rates.csv.
fn book_without_rates(dir: &Path) -> PathBuf {
    let book = dir.join("book");
    std::fs::create_dir_all(&book).unwrap();
    for f in std::fs::read_dir(sample_csv()).unwrap() {
        let f = f.unwrap().path();
        if f.file_name().unwrap() != "rates.csv" {
            std::fs::copy(&f, book.join(f.file_name().unwrap())).unwrap();
        }
    }
    book
}

fn stdout_of(a: &assert_cmd::assert::Assert) -> String {
    String::from_utf8(a.get_output().stdout.clone()).unwrap()
}

fn stderr_of(a: &assert_cmd::assert::Assert) -> String {
    String::from_utf8(a.get_output().stderr.clone()).unwrap()
}

/// Found: without a Rates sheet, run printed ten rate_ref errors and
/// "... and 33 more errors", and never the missing sheet. Expected: the
/// missing sheet first, then one line for the accounts it keeps out;
/// every problem still on the Problems sheet.
#[test]
fn a_missing_rates_sheet_is_printed_first_and_its_accounts_on_one_line() {
    let dir = tempfile::tempdir().unwrap();
    let book = book_without_rates(dir.path());
    let out = dir.path().join("out.xlsx");
    let a = ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(&out)
        .assert()
        .code(1);
    let text = stdout_of(&a);
    // The error lines under "problems:" (the accounts left out are listed
    // above them, each with its error).
    let lines: Vec<&str> = text
        .lines()
        .skip_while(|l| !l.starts_with("problems:"))
        .filter(|l| l.starts_with("  "))
        .collect();
    assert_eq!(lines.len(), 2, "{text}");
    assert!(
        lines[0].contains("/book/rates.csv: found 'no such file'")
            && lines[0].contains("add rates.csv"),
        "{text}"
    );
    assert!(
        lines[1].starts_with(
            "  error: 47 accounts left out because rates.csv is missing: HM-SAV-001, HM-SAV-002, HM-SAV-003 and 44 more"
        ),
        "{text}"
    );
    assert!(!text.contains("more errors"), "{text}");
    // One account names a rate_ref and a debit_rate_ref: 48 on the sheet
    // besides the missing file.
    let rows = sheet(&out, "Problems");
    let follow_ons = rows
        .iter()
        .filter(|r| matches!(&r[5], Data::String(s) if s.contains("rate_ref with rows in the Rates sheet")))
        .count();
    assert_eq!(follow_ons, 48);
    assert!(rows.iter().any(|r| r[4] == "no such file"));
}

/// check prints the cause, the folded line, and each follow-on under it.
#[test]
fn check_lists_each_follow_on_under_its_folded_line() {
    let dir = tempfile::tempdir().unwrap();
    let book = book_without_rates(dir.path());
    let a = ledgerate().arg("check").arg(&book).assert().code(1);
    let text = stdout_of(&a);
    let lines: Vec<&str> = text.lines().collect();
    assert!(
        lines[1].contains("/book/rates.csv: found 'no such file'"),
        "{text}"
    );
    assert!(
        lines[2].starts_with("  error: 47 accounts left out"),
        "{text}"
    );
    assert!(
        lines[3].starts_with("    error: ")
            && lines[3].contains("add a Rates sheet with rows for SAVER"),
        "{text}"
    );
    assert_eq!(
        text.lines()
            .filter(|l| l.starts_with("    error: "))
            .count(),
        // 48 rate_ref rows and HM-TD-ROLL's rollover_rate_ref.
        49
    );
    assert!(text.ends_with("50 problems, 50 of them errors\n"), "{text}");
}

/// Found: "1 problems", "1 notes". Expected: the singular for one.
#[test]
fn one_problem_and_one_note_are_counted_in_the_singular() {
    let a = ledgerate().arg("check").arg(sample()).assert().code(0);
    let text = stdout_of(&a);
    assert!(text.contains("47 accounts computed, 1 problem\n"), "{text}");
    assert!(text.ends_with("1 problem, 0 of them errors\n"), "{text}");
    let dir = tempfile::tempdir().unwrap();
    let a = ledgerate()
        .arg("run")
        .arg(sample())
        .arg("--out")
        .arg(dir.path().join("o.xlsx"))
        .assert()
        .code(0);
    assert!(
        stdout_of(&a).contains("problems: 0 errors, 0 warnings, 1 note (all listed"),
        "{}",
        stdout_of(&a)
    );
}

/// Found: `--account hm-ln-003` found nothing and suggested nothing.
/// Expected: the id meant, the same but for letter case; else one a
/// letter or two off; nothing for an id far from every one.
#[test]
fn explain_suggests_the_account_id_meant() {
    let cases = [
        ("hm-ln-003", Some("did you mean 'HM-LN-003'?")),
        ("HM-LN-03", Some("did you mean 'HM-LN-003'?")),
        ("NO-SUCH-ACCOUNT", None),
    ];
    for (id, suggestion) in cases {
        let a = ledgerate()
            .arg("explain")
            .arg(sample())
            .args(["--account", id])
            .assert()
            .code(2);
        let err = stderr_of(&a);
        assert!(
            err.contains(&format!("no account '{id}' in the books")),
            "{err}"
        );
        match suggestion {
            Some(s) => assert!(
                err.contains(s) && err.contains("give --account HM-LN-003"),
                "{err}"
            ),
            None => assert!(
                !err.contains("did you mean") && err.contains("check the id on the Accounts sheet"),
                "{err}"
            ),
        }
    }
}

/// Found: `--cutoff 31/03/2027` was refused without 2027-03-31. Expected:
/// the ISO form when the text reads one way (a day above 12, or the year
/// first); both readings, unpicked, when day and month are both 12 or below.
#[test]
fn a_date_option_that_is_not_iso_suggests_the_iso_form_only_when_plain() {
    let cases = [
        ("31/03/2027", "write 2027-03-31 if that is the date meant"),
        ("2027/3/31", "write 2027-03-31 if that is the date meant"),
        (
            "03/04/2027",
            "reads as 2027-04-03 (day first) or 2027-03-04 (month first); the order is never guessed",
        ),
        ("next month", "write it as YYYY-MM-DD, for example 2026-11-30"),
    ];
    for (given, says) in cases {
        let a = ledgerate()
            .arg("check")
            .arg(sample())
            .args(["--cutoff", given])
            .assert()
            .code(2);
        let err = stderr_of(&a);
        assert!(
            err.contains(&format!("--cutoff '{given}' is not an ISO date")) && err.contains(says),
            "{err}"
        );
    }
}

/// Found: `--fixed-time 2026-12-01T09:30:00Z` was refused. Expected: RFC
/// 3339 with `Z` or an offset is taken, and the Run sheet shows the time
/// as written (09:30:00), never moved to another zone.
#[test]
fn fixed_time_takes_rfc_3339_and_keeps_the_time_written() {
    let dir = tempfile::tempdir().unwrap();
    for t in [
        "2026-12-01T09:30:00Z",
        "2026-12-01T09:30:00+02:00",
        "2026-12-01T09:30:00-05:00",
    ] {
        let out = dir.path().join("o.xlsx");
        ledgerate()
            .arg("run")
            .arg(sample())
            .args(["--fixed-time", t, "--out"])
            .arg(&out)
            .assert()
            .code(0);
        let rows = sheet(&out, "Run");
        let at = rows
            .iter()
            .find(|r| r[0] == "Time of the run")
            .map(|r| r[1].clone())
            .unwrap();
        let written = match at {
            Data::DateTime(d) => d.as_datetime().unwrap().to_string(),
            other => other.to_string(),
        };
        assert_eq!(written, "2026-12-01 09:30:00", "{t}");
    }
    let a = ledgerate()
        .arg("run")
        .arg(sample())
        .args(["--fixed-time", "2026-12-01T09:30:00.250Z", "--out"])
        .arg(dir.path().join("p.xlsx"))
        .assert()
        .code(2);
    assert!(
        stderr_of(&a).contains("is not a timestamp"),
        "{}",
        stderr_of(&a)
    );
}

/// Found: a CSV book's problem read `book accounts!E3`, a sheet and cell
/// of no file the user has. Expected: the file and line a user opens and
/// the column's header, the same at the terminal and on the Problems
/// sheet.
#[test]
fn a_csv_book_names_the_file_and_line_on_the_terminal_and_the_problems_sheet() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("book");
    std::fs::create_dir_all(&book).unwrap();
    for f in std::fs::read_dir(sample_csv()).unwrap() {
        let f = f.unwrap().path();
        std::fs::copy(&f, book.join(f.file_name().unwrap())).unwrap();
    }
    let accounts = std::fs::read_to_string(book.join("accounts.csv")).unwrap();
    // The second account's day count, on line 3 of the file.
    let mut lines: Vec<String> = accounts.lines().map(str::to_string).collect();
    lines[2] = lines[2].replacen("ACT/365F", "ACT/365", 1);
    std::fs::write(book.join("accounts.csv"), lines.join("\n") + "\n").unwrap();
    let out = dir.path().join("out.xlsx");
    let a = ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(&out)
        .assert()
        .code(1);
    let text = stdout_of(&a);
    let at = format!(
        "{}, line 3, column day_count: found 'ACT/365'",
        book.join("accounts.csv").display()
    );
    assert!(text.contains(&format!("  error: {at}")), "{text}");
    let rows = sheet(&out, "Problems");
    let row = rows.iter().find(|r| r[4] == "ACT/365").unwrap();
    assert_eq!(row[2], "accounts.csv");
    assert_eq!(row[3], "line 3, column day_count");
    let a = ledgerate().arg("check").arg(&book).assert().code(1);
    assert!(stdout_of(&a).contains(&at), "{}", stdout_of(&a));
}
