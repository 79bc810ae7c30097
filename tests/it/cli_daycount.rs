//! `ledgerate daycount` as a user runs it: the real binary, its output and
//! exit status.

use crate::common::ledgerate;
use predicates::prelude::*;

/// ISDA 2006 section 4.16(b): 1 Nov 2003 to 1 May 2004 is 61/365 + 121/366.
#[test]
fn act_act_isda_prints_days_and_the_exact_fraction() {
    ledgerate()
        .args(["daycount", "act/act isda", "2003-11-01", "2004-05-01"])
        .assert()
        .success()
        .stdout(predicate::str::contains("days      182 days"))
        .stdout(predicate::str::contains("66491/133590"));
}

#[test]
fn json_output_has_basis_days_and_fraction() {
    let out = ledgerate()
        .args([
            "daycount",
            "30e/360isda",
            "2011-08-31",
            "2012-02-29",
            "--maturity",
            "2012-02-29",
            "--json",
        ])
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).unwrap();
    assert_eq!(v["basis"], "30E/360 ISDA");
    // ISDA 30E/360 (ISDA) worked example: a February end on the termination date stays 29.
    assert_eq!(v["days"], 179);
    assert_eq!(v["exact"], "179/360");
    assert!(v["fraction"]
        .as_str()
        .unwrap()
        .starts_with("0.49722222222222222222"));
}

/// ICMA Rule 251 through ISDA 4.16(c): a regular semiannual period is 1/2.
#[test]
fn act_act_icma_uses_frequency_and_reference_period() {
    ledgerate()
        .args([
            "daycount",
            "ACT/ACT ICMA",
            "2003-11-01",
            "2004-05-01",
            "--frequency",
            "2",
            "--reference-start",
            "2003-11-01",
            "--reference-end",
            "2004-05-01",
            "--json",
        ])
        .assert()
        .success()
        .stdout(predicate::str::contains("\"fraction\":\"0.5\""));
}

#[test]
fn bus_252_reads_a_holiday_file() {
    let dir = tempfile::tempdir().unwrap();
    let cal = dir.path().join("holidays.txt");
    std::fs::write(&cal, "# year-end holidays\n2026-12-25\n\n2027-01-01\n").unwrap();
    // 21 Dec 2026 to 4 Jan 2027: ten weekdays less two holidays.
    ledgerate()
        .args([
            "daycount",
            "BUS/252",
            "2026-12-21",
            "2027-01-04",
            "--calendar",
        ])
        .arg(&cal)
        .args(["--json"])
        .assert()
        .success()
        .stdout(predicate::str::contains("\"days\":8"))
        .stdout(predicate::str::contains("\"exact\":\"2/63\""));
}

#[test]
fn a_bad_holiday_line_names_the_file_and_line() {
    let dir = tempfile::tempdir().unwrap();
    let cal = dir.path().join("holidays.txt");
    std::fs::write(&cal, "2026-12-25\n25/12/2026\n").unwrap();
    ledgerate()
        .args([
            "daycount",
            "BUS/252",
            "2026-12-21",
            "2027-01-04",
            "--calendar",
        ])
        .arg(&cal)
        .assert()
        .code(2)
        .stderr(predicate::str::contains(
            "holidays.txt line 2: found '25/12/2026', expected one ISO date",
        ));
}

#[test]
fn an_unknown_basis_suggests_the_closest() {
    ledgerate()
        .args(["daycount", "ACT/36", "2026-11-01", "2026-12-01"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("did you mean 'ACT/360'?"));
}

#[test]
fn missing_terms_are_errors_that_say_how_to_fix_them() {
    ledgerate()
        .args(["daycount", "BUS/252", "2026-11-01", "2026-12-01"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("give --calendar FILE"));
    ledgerate()
        .args(["daycount", "ACT/ACT ICMA", "2026-11-01", "2026-12-01"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("needs --frequency N"));
    ledgerate()
        .args(["daycount", "ACT/360", "01/11/2026", "2026-12-01"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains(
            "reads as 2026-11-01 (day first) or 2026-01-11 (month first); the order is never guessed: write the one meant as YYYY-MM-DD",
        ));
}

#[test]
fn every_spec_basis_answers() {
    for basis in [
        "ACT/360",
        "ACT/365F",
        "ACT/365L",
        "ACT/ACT ISDA",
        "NL/365",
        "30/360",
        "30/360 US",
        "30E/360",
        "30E/360 ISDA",
    ] {
        ledgerate()
            .args(["daycount", basis, "2028-01-31", "2028-03-31"])
            .assert()
            .success();
    }
}
