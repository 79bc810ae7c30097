//! Write while accruing: `run` writes the Accruals while the accounts are
//! accrued, laid out (column groups, usual formats) from the accounts
//! before any is computed. When an account's computation stops and the
//! lines that came need another layout, the run accrues again and writes
//! the workbook from all the lines: the workbook is the one a whole write
//! gives either way.

use std::fs;
use std::path::Path;

use calamine::Data;

use crate::common::{ledgerate, sheet};

/// Two savings accounts; SAV-1 has withholding tax (behaviour.md,
/// Withholding tax), SAV-2 none.
const ACCOUNTS: &str = "account,currency,day_count,open_date,opening_balance,side,compounding,posting,capitalise,tax_ref\n\
     SAV-1,USD,ACT/365F,2026-11-01,100000.00,liability,simple,monthly,yes,SAVINGS-20\n\
     SAV-2,USD,ACT/365F,2026-11-01,50000.00,liability,simple,monthly,yes,\n";
const RATES: &str =
    "rate_ref,effective,rate_percent\nSAV-1,2026-01-01,3.65\nSAV-2,2026-01-01,3.65\n";

/// Runs the book whose tax table takes effect on `effective`; returns the
/// exit status, standard error and the Accruals' header and accounts.
fn run(dir: &Path, effective: &str) -> (i32, String, Vec<String>, Vec<String>) {
    let book = dir.join("book");
    fs::create_dir_all(&book).unwrap();
    fs::write(book.join("accounts.csv"), ACCOUNTS).unwrap();
    fs::write(book.join("rates.csv"), RATES).unwrap();
    fs::write(
        book.join("tax.csv"),
        format!("tax_ref,effective,rate_percent\nSAVINGS-20,{effective},20\n"),
    )
    .unwrap();
    let out = dir.join("out.xlsx");
    let done = ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--timings", "--out"])
        .arg(&out)
        .output()
        .unwrap();
    let rows = sheet(&out, "Accruals");
    let header = rows[0].iter().map(Data::to_string).collect();
    let accounts = rows[1..].iter().map(|r| r[0].to_string()).collect();
    (
        done.status.code().unwrap(),
        String::from_utf8(done.stderr).unwrap(),
        header,
        accounts,
    )
}

#[test]
fn accruals_laid_out_before_the_run_keep_their_tax_columns() {
    let dir = tempfile::tempdir().unwrap();
    let (status, stderr, header, accounts) = run(dir.path(), "2026-01-01");
    assert_eq!(status, 0, "{stderr}");
    assert!(
        stderr.contains("accrue and reconcile (Accruals written alongside)"),
        "{stderr}"
    );
    assert!(!stderr.contains("accrue again"), "{stderr}");
    assert!(header.contains(&"Tax withheld in window".to_string()));
    assert_eq!(accounts, ["SAV-1", "SAV-2"]);
}

/// No tax table in force on SAV-1's payment date stops its computation
/// (an error for the account), so no line holds tax: the layout planned
/// with tax columns does not fit, and the run writes the workbook again,
/// without them, as a whole write of its lines does.
#[test]
fn an_account_that_stops_and_changes_the_layout_has_the_workbook_written_again() {
    let dir = tempfile::tempdir().unwrap();
    let (status, stderr, header, accounts) = run(dir.path(), "2026-12-02");
    assert_eq!(status, 1, "{stderr}");
    assert!(stderr.contains("accrue again (layout changed)"), "{stderr}");
    assert!(!header.contains(&"Tax withheld in window".to_string()));
    assert_eq!(accounts, ["SAV-2"]);
    let left: Vec<String> = fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    let mut left = left;
    left.sort();
    assert_eq!(left, ["book", "out.xlsx"], "no scratch file left behind");
}
