//! Non-accrual, interest in suspense and credit-impaired loans (behaviour.md,
//! Non-accrual and interest in suspense; spec examples C1 and C2), on the
//! books the examples describe, run through the reader and the batch as
//! `run` does; and the Accrual status sheet's problems.

use std::fs;
use std::path::Path;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchResult, BatchSettings};
use ledgerate::book::{read_book, Book, ReadOptions, TrialBalanceRow};
use ledgerate::engine::ledger::SettlementLines;
use ledgerate::engine::reconcile::{Status, Tolerance};
use ledgerate::problem::{Position, Severity};
use ledgerate::report::model::{AccrualLine, JournalLine, TieStatus};

use crate::common::{date, dec};

const ACCOUNTS_HEADER: &str =
    "account,currency,day_count,open_date,opening_balance,side,compounding,posting,capitalise\n";

/// Writes a CSV book of `files` (name, text) under `dir` and reads it.
fn book(dir: &Path, files: &[(&str, &str)]) -> Book {
    fs::create_dir_all(dir).unwrap();
    for (name, text) in files {
        fs::write(dir.join(name), text).unwrap();
    }
    read_book(dir, &ReadOptions::default())
}

/// LN-NA of example C1: 250,000.00 at 7.30% on ACT/365F, monthly, not
/// capitalised (50.00 a night), open since 1 October.
fn c1_book(dir: &Path, status: Option<&str>, movements: Option<&str>) -> Book {
    let accounts = format!(
        "{ACCOUNTS_HEADER}LN-NA,USD,ACT/365F,2026-10-01,250000.00,asset,simple,monthly,no\n"
    );
    let mut files = vec![
        ("accounts.csv", accounts.as_str()),
        ("rates.csv", "rate_ref,effective,rate_percent\nLN-NA,2026-01-01,7.30\n"),
        (
            "statements.csv",
            "account,period_start,period_end,posted_interest\nLN-NA,2026-11-01,2026-11-30,1500.00\n",
        ),
    ];
    if let Some(s) = status {
        files.push(("accrual_status.csv", s));
    }
    if let Some(m) = movements {
        files.push(("movements.csv", m));
    }
    let b = book(dir, &files);
    assert!(!b.has_errors(), "{:?}", b.problems);
    b
}

const C1_STATUS: &str =
    "account,from,status,unpaid_interest,cash_basis\nLN-NA,2026-11-11,non-accrual,1550.00,no\n";

fn settings(window: (&str, &str)) -> BatchSettings {
    BatchSettings {
        cutoff: date(window.1),
        window_start: date(window.0),
        daily: false,
        journal_style: JournalStyle::Incremental,
        entities: vec!["HM".to_string()],
        tolerance: Tolerance::default(),
        fast_path: true,
        shard: None,
        fixing_fallback: Default::default(),
        as_at: None,
        previous_as_at: None,
        settlement_lines: SettlementLines::PaymentDate,
        journal_detail: true,
    }
}

fn november() -> BatchSettings {
    settings(("2026-11-01", "2026-11-30"))
}

fn run(book: Book, s: &BatchSettings) -> BatchResult {
    run_books(&[book], s, &|| {})
}

fn line<'r>(r: &'r BatchResult, account: &str) -> &'r AccrualLine {
    r.accruals.iter().find(|a| a.account == account).unwrap()
}

/// The journal's lines to `gl` with memo `memo`, as (date, debit, credit).
fn journal(r: &BatchResult, gl: &str, memo: &str) -> Vec<(NaiveDate, Decimal, Decimal)> {
    r.journal
        .iter()
        .filter(|l: &&JournalLine| l.gl_account == gl && l.memo == memo)
        .map(|l| (l.date, l.debit, l.credit))
        .collect()
}

fn tb(gl: &str, day: &str, balance: &str) -> TrialBalanceRow {
    TrialBalanceRow {
        entity: "HM".into(),
        currency: "USD".into(),
        gl_account: gl.into(),
        date: date(day),
        balance: dec(balance),
        position: Position::default(),
    }
}

const NOVEMBER: &str = "interest accrued 2026-11-01..2026-11-30";

/// Spec example C1: on non-accrual from 11 November with 1,550.00 billed
/// and unpaid.
#[test]
fn spec_example_c1_non_accrual() {
    let dir = tempfile::tempdir().unwrap();
    let r = run(c1_book(dir.path(), Some(C1_STATUS), None), &november());
    let a = line(&r, "LN-NA");
    let s = a.suspense.as_ref().unwrap();
    assert_eq!(s.status, "non-accrual");
    // R = 10 x 50.00 + 1,550.00; 11..30 Nov 20 x 50.00 suspended.
    assert_eq!(s.contractual_for_window, dec("1500.00"));
    assert_eq!(s.reversed_in_window, dec("2050.00"));
    assert_eq!(s.suspended_in_window, dec("1000.00"));
    assert_eq!(s.released_in_window, dec("0.00"));
    assert_eq!(a.interest_for_window, dec("-1550.00"));
    assert_eq!(s.suspense_at_cutoff, dec("3050.00"));
    assert_eq!(a.posted_in_window, dec("1500.00"));
    // The statement of 1,500.00 agrees: postings are unchanged.
    assert!(r
        .reconciliation
        .iter()
        .all(|l| l.account != "LN-NA" || l.status == Status::Agrees));
    let c = date("2026-11-30");
    let zero = dec("0.00");
    assert_eq!(
        journal(&r, "ACCRUED-INTEREST-RECEIVABLE", NOVEMBER),
        [(c, dec("1500.00"), zero)]
    );
    assert_eq!(
        journal(&r, "INTEREST-INCOME", NOVEMBER),
        [(c, zero, dec("500.00"))]
    );
    assert_eq!(
        journal(&r, "INTEREST-IN-SUSPENSE", NOVEMBER),
        [(c, zero, dec("1000.00"))]
    );
    let s11 = date("2026-11-11");
    let reversed = "interest reversed on non-accrual";
    assert_eq!(
        journal(&r, "INTEREST-INCOME", reversed),
        [(s11, dec("2050.00"), zero)]
    );
    assert_eq!(
        journal(&r, "INTEREST-IN-SUSPENSE", reversed),
        [(s11, zero, dec("2050.00"))]
    );
    let paid = date("2026-12-01");
    assert_eq!(
        journal(&r, "INTEREST-SETTLEMENT", "interest posted"),
        [(paid, dec("1500.00"), zero)]
    );
    assert_eq!(
        journal(&r, "ACCRUED-INTEREST-RECEIVABLE", "interest posted"),
        [(paid, zero, dec("1500.00"))]
    );
    // Every entry balances.
    let (dr, cr) = r
        .journal
        .iter()
        .fold((Decimal::ZERO, Decimal::ZERO), |(d, c), l| {
            (d + l.debit, c + l.credit)
        });
    assert_eq!(dr, cr);
}

/// Spec example C1, "today": without the Accrual status row November's
/// income is the whole 1,500.00 and nothing is reversed.
#[test]
fn spec_example_c1_without_a_status_row_is_accruing() {
    let dir = tempfile::tempdir().unwrap();
    let r = run(c1_book(dir.path(), None, None), &november());
    let a = line(&r, "LN-NA");
    assert!(a.suspense.is_none());
    assert_eq!(a.interest_for_window, dec("1500.00"));
    assert!(r
        .journal
        .iter()
        .all(|l| l.gl_account != "INTEREST-IN-SUSPENSE"));
}

const C1_RECEIPT: &str =
    "account,value_date,amount,applies_to\nLN-NA,2026-12-15,-1000.00,interest\n";

fn c1_december(cash_basis: &str) -> BatchResult {
    let dir = tempfile::tempdir().unwrap();
    let status = format!(
        "account,from,status,unpaid_interest,cash_basis\nLN-NA,2026-11-11,non-accrual,1550.00,{cash_basis}\n"
    );
    let b = c1_book(dir.path(), Some(&status), Some(C1_RECEIPT));
    // The receipt does not move the balance.
    assert!(!b.movements.contains_key("LN-NA"));
    assert_eq!(b.accrual.receipts["LN-NA"].len(), 1);
    run(b, &settings(("2026-12-01", "2026-12-31")))
}

/// Spec example C1, December: a receipt of 1,000.00 of interest on 15
/// December releases 1,000.00 of suspense on a cash basis.
#[test]
fn spec_example_c1_a_receipt_on_a_cash_basis_releases_suspense() {
    let r = c1_december("yes");
    let a = line(&r, "LN-NA");
    let s = a.suspense.as_ref().unwrap();
    assert_eq!(s.released_in_window, dec("1000.00"));
    assert_eq!(s.suspense_before_window, dec("3050.00"));
    // December: 31 x 50.00 contractual, all suspended, 1,000.00 released.
    assert_eq!(s.contractual_for_window, dec("1550.00"));
    assert_eq!(s.suspended_in_window, dec("1550.00"));
    assert_eq!(a.interest_for_window, dec("1000.00"));
    assert_eq!(s.suspense_at_cutoff, dec("3600.00"));
    let received = "suspended interest received";
    let d = date("2026-12-15");
    assert_eq!(
        journal(&r, "INTEREST-IN-SUSPENSE", received),
        [(d, dec("1000.00"), dec("0.00"))]
    );
    assert_eq!(
        journal(&r, "INTEREST-INCOME", received),
        [(d, dec("0.00"), dec("1000.00"))]
    );
}

/// Spec example C1, December: without cash basis the receipt releases nothing.
#[test]
fn spec_example_c1_a_receipt_without_cash_basis_releases_nothing() {
    let r = c1_december("no");
    let a = line(&r, "LN-NA");
    let s = a.suspense.as_ref().unwrap();
    assert_eq!(s.released_in_window, dec("0.00"));
    assert_eq!(a.interest_for_window, dec("0.00"));
    assert_eq!(s.suspense_at_cutoff, dec("4600.00"));
    assert!(journal(&r, "INTEREST-IN-SUSPENSE", "suspended interest received").is_empty());
}

fn c2(movements: Option<&str>) -> BatchResult {
    let dir = tempfile::tempdir().unwrap();
    let accounts = format!(
        "{ACCOUNTS_HEADER}LN-CI,USD,ACT/360,2026-11-01,120000.00,asset,simple,monthly,no\n"
    );
    let mut files = vec![
        ("accounts.csv", accounts.as_str()),
        (
            "rates.csv",
            "rate_ref,effective,rate_percent\nLN-CI,2026-01-01,6.00\n",
        ),
        (
            "accrual_status.csv",
            "account,from,status,allowance\nLN-CI,2026-11-01,credit-impaired,45000.00\n",
        ),
    ];
    if let Some(m) = movements {
        files.push(("movements.csv", m));
    }
    let b = book(dir.path(), &files);
    assert!(!b.has_errors(), "{:?}", b.problems);
    run(b, &november())
}

/// Spec example C2: credit-impaired from 1 November with an allowance of
/// 45,000.00 on 120,000.00.
#[test]
fn spec_example_c2_credit_impaired() {
    let r = c2(None);
    let a = line(&r, "LN-CI");
    let s = a.suspense.as_ref().unwrap();
    assert_eq!(s.status, "credit-impaired");
    assert_eq!(s.contractual_for_window, dec("600.00"));
    assert_eq!(a.interest_for_window, dec("375.00"));
    assert_eq!(s.suspended_in_window, dec("225.00"));
    assert_eq!(s.reversed_in_window, dec("0.00"));
    let c = date("2026-11-30");
    let zero = dec("0.00");
    assert_eq!(
        journal(&r, "ACCRUED-INTEREST-RECEIVABLE", NOVEMBER),
        [(c, dec("600.00"), zero)]
    );
    assert_eq!(
        journal(&r, "INTEREST-INCOME", NOVEMBER),
        [(c, zero, dec("375.00"))]
    );
    assert_eq!(
        journal(&r, "INTEREST-IN-SUSPENSE", NOVEMBER),
        [(c, zero, dec("225.00"))]
    );
}

/// Spec example C2 with a repayment of 20,000.00 valued 16 November.
#[test]
fn spec_example_c2_with_a_repayment() {
    let r = c2(Some(
        "account,value_date,amount\nLN-CI,2026-11-16,-20000.00\n",
    ));
    let a = line(&r, "LN-CI");
    let s = a.suspense.as_ref().unwrap();
    assert_eq!(s.contractual_for_window, dec("550.00"));
    assert_eq!(a.interest_for_window, dec("325.00"));
    assert_eq!(s.suspended_in_window, dec("225.00"));
}

/// The Tie-out has a row for the suspense GL account, rolled forward like
/// the receivable's, and the receivable's still takes the contractual figure.
#[test]
fn the_tie_out_rolls_the_suspense_account_forward() {
    let dir = tempfile::tempdir().unwrap();
    let mut b = c1_book(dir.path(), Some(C1_STATUS), None);
    // October posted 1,550.00 on 31 October, paid 1 November.
    b.trial_balance
        .push(tb("ACCRUED-INTEREST-RECEIVABLE", "2026-10-31", "1550.00"));
    b.trial_balance
        .push(tb("INTEREST-IN-SUSPENSE", "2026-10-31", "0.00"));
    b.trial_balance
        .push(tb("INTEREST-IN-SUSPENSE", "2026-11-30", "-3050.00"));
    let r = run(b, &november());
    let tie = r.tie_out.as_ref().unwrap();
    let susp = tie
        .iter()
        .find(|t| t.gl_account == "INTEREST-IN-SUSPENSE")
        .unwrap();
    assert_eq!(susp.side, "suspense");
    assert_eq!(susp.opening_sub_ledger, dec("0.00"));
    assert_eq!(susp.interest_for_window, dec("3050.00"));
    assert_eq!(susp.closing_sub_ledger, dec("3050.00"));
    assert_eq!(susp.closing_tb, Some(dec("3050.00")));
    assert_eq!(susp.status, TieStatus::Agrees);
    let recv = tie
        .iter()
        .find(|t| t.gl_account == "ACCRUED-INTEREST-RECEIVABLE")
        .unwrap();
    assert_eq!(recv.interest_for_window, dec("1500.00"));
    assert_eq!(recv.closing_difference, recv.opening_difference);
    assert_eq!(recv.status, TieStatus::Agrees);
}

/// The Accrual status sheet's problems (behaviour.md, Non-accrual and
/// interest in suspense): each names the sheet and cell, what was found
/// and expected, and keeps the account out (an error) or is not used (a
/// warning).
fn status_problems(rows: &str, movements: Option<&str>) -> Book {
    let dir = tempfile::tempdir().unwrap();
    let accounts = format!(
        "{ACCOUNTS_HEADER}LN-1,USD,ACT/360,2026-11-01,1000.00,asset,simple,monthly,no\nDP-1,USD,ACT/360,2026-11-01,1000.00,liability,simple,monthly,no\n"
    );
    let status = format!("account,from,status,unpaid_interest,allowance,cash_basis\n{rows}");
    let mut files = vec![
        ("accounts.csv", accounts.as_str()),
        (
            "rates.csv",
            "rate_ref,effective,rate_percent\nLN-1,2026-01-01,6.00\nDP-1,2026-01-01,2.00\n",
        ),
        ("accrual_status.csv", status.as_str()),
    ];
    if let Some(m) = movements {
        files.push(("movements.csv", m));
    }
    book(dir.path(), &files)
}

fn only_problem(b: &Book, severity: Severity) -> &ledgerate::problem::Problem {
    let found: Vec<_> = b
        .problems
        .iter()
        .filter(|p| p.severity == severity)
        .collect();
    assert_eq!(found.len(), 1, "{:?}", b.problems);
    found[0]
}

fn kept(b: &Book, id: &str) -> bool {
    b.accounts.iter().any(|a| a.terms.id == id)
}

#[test]
fn a_status_row_for_an_unknown_account_is_an_error_on_the_row() {
    let b = status_problems("LN-9,2026-11-10,non-accrual,,,\n", None);
    let p = only_problem(&b, Severity::Error);
    assert_eq!(p.position.sheet, "accrual_status");
    assert_eq!(p.found, "LN-9");
    assert!(kept(&b, "LN-1"));
    assert!(b.accrual.statuses.is_empty());
}

#[test]
fn a_status_row_for_a_liability_account_is_an_error() {
    let b = status_problems("DP-1,2026-11-10,non-accrual,,,\n", None);
    let p = only_problem(&b, Severity::Error);
    assert!(p.expected.contains("asset account"), "{p}");
    assert!(!kept(&b, "DP-1"));
    assert_eq!(b.left_out.len(), 1);
}

#[test]
fn two_status_rows_for_one_day_are_an_error() {
    let b = status_problems(
        "LN-1,2026-11-10,non-accrual,,,\nLN-1,2026-11-10,accruing,,,\n",
        None,
    );
    let p = only_problem(&b, Severity::Error);
    assert!(
        p.expected.contains("one Accrual status row for LN-1"),
        "{p}"
    );
    assert!(p.position.cell.starts_with('B'), "{p}");
    assert!(!kept(&b, "LN-1"));
}

#[test]
fn a_negative_allowance_is_an_error() {
    let b = status_problems("LN-1,2026-11-10,credit-impaired,,-5.00,\n", None);
    let p = only_problem(&b, Severity::Error);
    assert_eq!(p.found, "-5.00");
    assert!(!kept(&b, "LN-1"));
}

#[test]
fn an_allowance_on_non_accrual_is_an_error() {
    let b = status_problems("LN-1,2026-11-10,non-accrual,,500.00,\n", None);
    let p = only_problem(&b, Severity::Error);
    assert!(
        p.expected.contains("no allowance on a non-accrual row"),
        "{p}"
    );
    assert!(!kept(&b, "LN-1"));
}

#[test]
fn unpaid_interest_on_credit_impaired_is_a_warning_and_not_used() {
    let b = status_problems("LN-1,2026-11-10,credit-impaired,20.00,,\n", None);
    let p = only_problem(&b, Severity::Warning);
    assert_eq!(p.found, "20.00");
    assert!(p.fix.contains("not used"));
    assert!(kept(&b, "LN-1"));
    assert_eq!(b.accrual.statuses["LN-1"][0].unpaid_interest, Decimal::ZERO);
}

#[test]
fn an_unknown_status_is_an_error_naming_the_choices() {
    let b = status_problems("LN-1,2026-11-10,nonaccruing,,,\n", None);
    let p = only_problem(&b, Severity::Error);
    assert!(p.expected.contains("non-accrual"), "{p}");
    assert!(!kept(&b, "LN-1"));
}

#[test]
fn an_interest_receipt_must_be_negative_and_on_an_asset_account() {
    let b = status_problems(
        "",
        Some("account,value_date,amount,applies_to\nLN-1,2026-11-10,25.00,interest\nDP-1,2026-11-10,-25.00,interest\n"),
    );
    let errors: Vec<_> = b
        .problems
        .iter()
        .filter(|p| p.severity == Severity::Error)
        .collect();
    assert_eq!(errors.len(), 2, "{:?}", b.problems);
    assert!(!kept(&b, "LN-1") && !kept(&b, "DP-1"));
}

/// The demo loans book (sample-books/harbourview-loans-2026-11*): examples
/// C1 and C2 as a user opens them, in both forms, statements agreeing.
#[test]
fn the_demo_loans_book_shows_examples_c1_and_c2() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-books");
    for name in [
        "harbourview-loans-2026-11.xlsx",
        "harbourview-loans-2026-11-csv",
    ] {
        let b = read_book(&root.join(name), &ReadOptions::default());
        assert!(b.problems.is_empty(), "{name}: {:?}", b.problems);
        let r = run(b, &november());
        assert!(r.reconciliation.iter().all(|l| l.status == Status::Agrees));
        let na = line(&r, "LN-NA");
        assert_eq!(na.interest_for_window, dec("-1550.00"), "{name}");
        assert_eq!(
            na.suspense.as_ref().unwrap().suspense_at_cutoff,
            dec("3050.00")
        );
        let ci = line(&r, "LN-CI");
        assert_eq!(ci.interest_for_window, dec("325.00"), "{name}");
        assert_eq!(
            ci.suspense.as_ref().unwrap().suspended_in_window,
            dec("225.00")
        );
        let susp = r
            .journal
            .iter()
            .filter(|l| l.gl_account == "1390-INT-SUSP")
            .map(|l| l.credit - l.debit)
            .sum::<Decimal>();
        assert_eq!(susp, dec("3275.00"), "{name}");
    }
}
