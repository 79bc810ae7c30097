//! Floating-rate accounts as a user runs them (behaviour.md, Floating rates): a
//! Harbourview Mutual book with a Fixings sheet of invented overnight
//! fixings, `ledgerate run` with and without `--fixing-fallback last`, the
//! workbook read back, and `explain` showing the fixing behind each day.
//! Figures are worked out beside each check from the formula of that
//! section.

use std::collections::BTreeMap;
use std::fs;
use std::path::Path;

use crate::common::{date as d, dec as n, ledgerate, sheet};
use calamine::Data;
use chrono::{Datelike, Days, NaiveDate, Weekday};
use predicates::prelude::*;
use rust_decimal::Decimal;

/// Invented HVM-ON fixings in percent; 26 November (a holiday of the
/// account's calendar) has a stray fixing, and 30 November none yet.
const FIXINGS: &[(&str, &str)] = &[
    ("2026-10-28", "4.28"),
    ("2026-10-29", "4.29"),
    ("2026-10-30", "4.31"),
    ("2026-11-02", "4.33"),
    ("2026-11-03", "4.30"),
    ("2026-11-04", "4.27"),
    ("2026-11-05", "4.30"),
    ("2026-11-06", "4.35"),
    ("2026-11-09", "4.32"),
    ("2026-11-10", "4.31"),
    ("2026-11-11", "4.30"),
    ("2026-11-12", "4.29"),
    ("2026-11-13", "4.28"),
    ("2026-11-16", "4.30"),
    ("2026-11-17", "4.31"),
    ("2026-11-18", "4.33"),
    ("2026-11-19", "4.32"),
    ("2026-11-20", "4.30"),
    ("2026-11-23", "4.29"),
    ("2026-11-24", "4.31"),
    ("2026-11-25", "4.30"),
    ("2026-11-26", "4.40"),
    ("2026-11-27", "4.28"),
];

fn write_book(dir: &Path) {
    let files: &[(&str, String)] = &[
        (
            "accounts.csv",
            "account,currency,day_count,open_date,opening_balance,name,side,posting,rate_ref,calendar,rate_method,lookback_days\n\
             HVM-FRN-01,USD,ACT/360,2026-11-02,1000000.00,Harbourview floating note,asset,monthly,HVM-ON-150,HVM,compounded-in-arrears,2\n\
             HVM-LN-02,USD,ACT/365F,2026-11-02,250000.00,Harbourview member loan,asset,monthly,HVM-ON-225,HVM,simple-daily,0\n"
                .to_string(),
        ),
        (
            "rates.csv",
            "rate_ref,effective,index,spread_bp,floor_percent,cap_percent\n\
             HVM-ON-150,2026-01-01,HVM-ON,150,0,\n\
             HVM-ON-225,2026-01-01,HVM-ON,225,0,8\n"
                .to_string(),
        ),
        (
            "holidays.csv",
            "calendar,date,name\nHVM,2026-11-26,Thanksgiving\n".to_string(),
        ),
        (
            "fixings.csv",
            std::iter::once("index,date,rate_percent\n".to_string())
                .chain(FIXINGS.iter().map(|(day, r)| format!("HVM-ON,{day},{r}\n")))
                .collect(),
        ),
    ];
    fs::create_dir_all(dir).unwrap();
    for (name, text) in files {
        fs::write(dir.join(name), text).unwrap();
    }
}

fn fixings() -> BTreeMap<NaiveDate, Decimal> {
    FIXINGS
        .iter()
        .map(|(day, r)| (d(day), n(r) / Decimal::ONE_HUNDRED))
        .collect()
}

fn business(day: NaiveDate) -> bool {
    !matches!(day.weekday(), Weekday::Sat | Weekday::Sun) && day != d("2026-11-26")
}

fn business_days_back(mut day: NaiveDate, k: u32) -> NaiveDate {
    for _ in 0..k {
        day = day - Days::new(1);
        while !business(day) {
            day = day - Days::new(1);
        }
    }
    day
}

fn text(rows: &[Vec<Data>]) -> String {
    rows.iter()
        .map(|r| {
            r.iter()
                .map(|c| c.to_string())
                .collect::<Vec<_>>()
                .join(" | ")
        })
        .collect::<Vec<_>>()
        .join("\n")
}

fn posted(path: &Path, account: &str) -> Decimal {
    let rows = sheet(path, "Accruals");
    let col = rows[0]
        .iter()
        .position(|h| *h == "Posted in window")
        .unwrap();
    let row = rows.iter().find(|r| r[0] == account).unwrap();
    match &row[col] {
        Data::Float(f) => n(&f.to_string()),
        other => panic!("not a number: {other:?}"),
    }
}

/// Floating rates: a missing fixing is an error naming the index and the date,
/// and keeps only that account out; a fixing on a holiday is a warning.
#[test]
fn a_missing_fixing_keeps_the_account_out_and_says_which() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("harbourview-floating");
    write_book(&book);
    let out = dir.path().join("nov.xlsx");
    ledgerate()
        .arg("run")
        .arg(&book)
        .args([
            "--cutoff",
            "2026-11-30",
            "--fixed-time",
            "2026-12-01T08:00:00",
            "--out",
        ])
        .arg(&out)
        .assert()
        .code(1)
        .stdout(predicate::str::contains("2 read, 1 computed"));
    let problems = text(&sheet(&out, "Problems"));
    assert!(
        problems.contains("no HVM-ON fixing for 2026-11-30"),
        "{problems}"
    );
    assert!(problems.contains("--fixing-fallback last"), "{problems}");
    assert!(
        problems.contains("a HVM-ON fixing for 2026-11-26"),
        "{problems}"
    );
}

/// Floating rates, compounded in arrears with a two-day lookback, and simple
/// daily with the last fixing standing in for 30 November: each posting is
/// the formula's figure to the cent, and the stand-in is a warning.
#[test]
fn floating_postings_match_the_formula() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("harbourview-floating");
    write_book(&book);
    let out = dir.path().join("nov.xlsx");
    ledgerate()
        .arg("run")
        .arg(&book)
        .args([
            "--cutoff",
            "2026-11-30",
            "--fixed-time",
            "2026-12-01T08:00:00",
            "--fixing-fallback",
            "last",
            "--out",
        ])
        .arg(&out)
        .assert()
        .success()
        .stdout(predicate::str::contains("2 read, 2 computed"));
    let fx = fixings();
    let end = d("2026-12-01");

    // Compounded in arrears, ACT/360: 1,000,000 x (prod(1 + r_i n_i / 360) - 1)
    // + 1,000,000 x 1.50% x 29 / 360, r_i the fixing two business days back.
    let mut product = Decimal::ONE;
    let mut day = d("2026-11-02");
    while day < end {
        let mut next = day + Days::new(1);
        while next < end && !business(next) {
            next = next + Days::new(1);
        }
        let r = fx[&business_days_back(day, 2)].max(Decimal::ZERO);
        let weight = Decimal::from((next - day).num_days());
        product *= Decimal::ONE + r * weight / Decimal::from(360);
        day = next;
    }
    let frn = n("1000000") * (product - Decimal::ONE)
        + n("1000000") * n("0.015") * Decimal::from(29) / Decimal::from(360);
    assert_eq!(posted(&out, "HVM-FRN-01"), frn.round_dp(2));

    // Simple daily, ACT/365F: each day the fixing of the business day on or
    // before it (30 November: the last published, 27 November) + 2.25%.
    let mut simple = Decimal::ZERO;
    let mut day = d("2026-11-02");
    while day < end {
        let mut b = day;
        while !business(b) {
            b = b - Days::new(1);
        }
        let r = fx
            .range(..=b)
            .next_back()
            .map(|(_, r)| *r)
            .unwrap()
            .max(Decimal::ZERO);
        simple += n("250000") * (r + n("0.0225")) / Decimal::from(365);
        day = day + Days::new(1);
    }
    assert_eq!(posted(&out, "HVM-LN-02"), simple.round_dp(2));

    let problems = text(&sheet(&out, "Problems"));
    assert!(
        problems.contains("1 missing HVM-ON fixing: 2026-11-30 (used 2026-11-27)"),
        "{problems}"
    );
    let run = text(&sheet(&out, "Run"));
    assert!(run.contains("fixing_fallback"), "{run}");
}

/// `explain` shows the fixing each day used, on its own date after the
/// lookback: 2 November uses 29 October's, the weekend Friday's lookback.
#[test]
fn explain_shows_the_fixing_behind_each_day() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("harbourview-floating");
    write_book(&book);
    let assert = ledgerate()
        .arg("explain")
        .arg(&book)
        .args([
            "--account",
            "HVM-FRN-01",
            "--cutoff",
            "2026-11-27",
            "--period",
            "2026-11-02..2026-11-09",
        ])
        .assert()
        .success();
    let stdout = String::from_utf8(assert.get_output().stdout.clone()).unwrap();
    assert!(
        stdout.contains("floating: compounded-in-arrears on HVM-ON, lookback 2 business days"),
        "{stdout}"
    );
    let line = |day: &str| {
        stdout
            .lines()
            .find(|l| l.starts_with(day))
            .unwrap_or_else(|| panic!("no line for {day}: {stdout}"))
            .to_string()
    };
    assert!(line("2026-11-02").ends_with("HVM-ON 2026-10-29 4.2900%"));
    assert!(line("2026-11-07").ends_with("HVM-ON 2026-11-04 4.2700%"));
    assert!(line("2026-11-09").ends_with("HVM-ON 2026-11-05 4.3000%"));
}
