//! The same book in every format the reader takes gives the same workbook
//! figures: the real binary on .xlsx, .xls, .ods (converted with
//! LibreOffice), a CSV folder and an unknown extension, read back with
//! calamine, with figures worked out by hand.

use std::path::Path;

use crate::common::fixture;
use assert_cmd::Command;
use calamine::{open_workbook_auto, Data, Reader};

fn run(book: &Path, out: &Path) {
    Command::cargo_bin("ledgerate")
        .unwrap()
        .arg("run")
        .arg(book)
        .args([
            "--cutoff",
            "2026-11-30",
            "--fixed-time",
            "2026-12-01T00:00:00",
            "--out",
        ])
        .arg(out)
        .assert()
        .success();
}

fn accruals(path: &Path) -> Vec<Vec<Data>> {
    let mut wb = open_workbook_auto(path).unwrap();
    wb.worksheet_range("Accruals")
        .unwrap()
        .rows()
        .map(|r| r.to_vec())
        .collect()
}

fn row<'a>(rows: &'a [Vec<Data>], account: &str) -> &'a [Data] {
    rows.iter()
        .find(|r| r[0] == Data::String(account.into()))
        .unwrap_or_else(|| panic!("no {account}"))
}

#[test]
fn every_format_gives_the_same_accruals() {
    let dir = tempfile::tempdir().unwrap();
    let reference = dir.path().join("xlsx.xlsx");
    run(&fixture("harbourview_good.xlsx"), &reference);
    let want = accruals(&reference);
    for (name, book) in [
        ("xls", fixture("harbourview_good.xls")),
        ("csv", fixture("harbourview_good_csv")),
        ("unknown extension", fixture("harbourview_good.book")),
        ("upper-case extension", fixture("HARBOURVIEW_UPPER.XLSX")),
    ] {
        let out = dir.path().join(format!("{}.xlsx", name.replace(' ', "-")));
        run(&book, &out);
        assert_eq!(accruals(&out), want, "{name}");
    }
    // LibreOffice keeps 15 significant digits in .ods, so a movement of
    // 1234.5678901234567 arrives as 1234.56789012346 there; every account
    // without it agrees exactly.
    let ods = dir.path().join("ods.xlsx");
    run(&fixture("harbourview_good.ods"), &ods);
    let got = accruals(&ods);
    for account in ["HM-TD-003", "HM-SAV-001", "HM-LN-004"] {
        assert_eq!(row(&got, account), row(&want, account), "ods {account}");
    }
}

/// 30E/360 term deposit: 50,000.00 EUR at 3.10% from 15 Feb 2026.
/// November: 50,000 x 3.10% x 30/360 = 129.17. Accrued at cut-off: 30E/360
/// days from 15 Feb to 1 Dec = 10 x 30 - 14 = 286: 50,000 x 3.10% x 286/360 = 1,231.39.
#[test]
fn hand_worked_figures_of_the_fixture_book() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out.xlsx");
    run(&fixture("harbourview_good.xls"), &out);
    let rows = accruals(&out);
    let td = row(&rows, "HM-TD-003");
    assert_eq!(td[9], Data::Float(129.17));
    assert_eq!(td[7], Data::Float(1231.39));
}
