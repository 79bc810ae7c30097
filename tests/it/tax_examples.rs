//! Withholding tax's worked examples (behaviour.md, Withholding tax; spec
//! examples D1-D3), on the books the examples describe, run through the
//! reader and the batch as `run` does, and the Tax sheet's errors.

use std::fs;
use std::path::Path;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchResult, BatchSettings};
use ledgerate::book::{read_book, Book, ReadOptions};
use ledgerate::engine::ledger::SettlementLines;
use ledgerate::engine::reconcile::{Status, Tolerance};
use ledgerate::problem::Severity;

use crate::common::{date, dec};

/// A CSV book of `files` (name, text) read as `run` reads it.
fn book(dir: &Path, files: &[(&str, &str)]) -> Book {
    fs::create_dir_all(dir).unwrap();
    for (name, text) in files {
        fs::write(dir.join(name), text).unwrap();
    }
    read_book(dir, &ReadOptions::default())
}

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
        journal_detail: false,
    }
}

fn run(book: Book, s: &BatchSettings) -> BatchResult {
    assert!(!book.has_errors(), "{:?}", book.problems);
    run_books(&[book], s, &|| {})
}

/// The journal's "interest posted" lines to `gl`, as (date, debit, credit).
fn posted(r: &BatchResult, gl: &str) -> Vec<(NaiveDate, Decimal, Decimal)> {
    r.journal
        .iter()
        .filter(|l| l.gl_account == gl && l.memo == "interest posted")
        .map(|l| (l.date, l.debit, l.credit))
        .collect()
}

const D1_ACCOUNTS: &str = "account,currency,day_count,open_date,opening_balance,side,compounding,posting,capitalise,tax_ref\n\
     SAV-1,USD,ACT/365F,2026-11-01,100000.00,liability,simple,monthly,yes,SAVINGS-20\n";
const D1_RATES: &str = "rate_ref,effective,rate_percent\nSAV-1,2026-01-01,3.65\n";

fn d1_tax(mode: &str) -> String {
    format!("tax_ref,effective,rate_percent,round_mode\nSAVINGS-20,2026-01-01,20,{mode}\n")
}

/// Spec example D1, November: G 300.00, T 60.00, N 240.00; the balance
/// takes the net, 100,240.00 from 1 December; the journal credits the
/// member 240.00 and the tax account 60.00 against the payable's 300.00.
#[test]
fn spec_example_d1_november_the_balance_takes_the_net() {
    let dir = tempfile::tempdir().unwrap();
    let tax = d1_tax("half-up");
    let b = book(
        dir.path(),
        &[
            ("accounts.csv", D1_ACCOUNTS),
            ("rates.csv", D1_RATES),
            ("tax.csv", &tax),
        ],
    );
    let r = run(b, &settings(("2026-11-01", "2026-11-30")));
    let a = &r.accruals[0];
    assert_eq!(a.balance_at_cutoff, dec("100240.00"));
    // The accrual stays gross.
    assert_eq!(a.interest_for_window, dec("300.00"));
    assert_eq!(a.posted_in_window, dec("300.00"));
    let tax = a.tax.unwrap();
    assert_eq!(
        (tax.withheld, tax.net_posted),
        (dec("60.00"), dec("240.00"))
    );
    // Paid the day after the period's end.
    let pay = date("2026-12-01");
    assert_eq!(
        posted(&r, "ACCRUED-INTEREST-PAYABLE"),
        [(pay, dec("300.00"), dec("0"))]
    );
    assert_eq!(
        posted(&r, "INTEREST-SETTLEMENT"),
        [(pay, dec("0"), dec("240.00"))]
    );
    assert_eq!(
        posted(&r, "WITHHOLDING-TAX-PAYABLE"),
        [(pay, dec("0"), dec("60.00"))]
    );
}

/// Spec example D1, the statement: 240.00 under `gross` is under-posted by
/// 60.00; with `tax_withheld` 60.00 and `net` it agrees.
#[test]
fn spec_example_d1_a_net_statement_reconciles_with_its_tax() {
    let tax = d1_tax("half-up");
    let dir = tempfile::tempdir().unwrap();
    let b = book(
        dir.path(),
        &[
            ("accounts.csv", D1_ACCOUNTS),
            ("rates.csv", D1_RATES),
            ("tax.csv", &tax),
            (
                "statements.csv",
                "account,period_start,period_end,posted_interest\nSAV-1,2026-11-01,2026-11-30,240.00\n",
            ),
        ],
    );
    let r = run(b, &settings(("2026-11-01", "2026-11-30")));
    let row = &r.reconciliation[0];
    assert_eq!((row.expected, row.posted), (dec("300.00"), dec("240.00")));
    assert_eq!(row.variance, dec("-60.00"));
    assert_eq!(row.status, Status::UnderPosted);
    assert_eq!(row.likely_cause, "posted net of 20% tax (60.00)");
    // No tax column: the tax due, and blank posted tax and variance.
    let due = row.tax.as_deref().copied().unwrap();
    assert_eq!(
        (due.expected, due.posted, due.variance),
        (dec("60.00"), None, None)
    );

    let dir = tempfile::tempdir().unwrap();
    let b = book(
        dir.path(),
        &[
            ("accounts.csv", D1_ACCOUNTS),
            ("rates.csv", D1_RATES),
            ("tax.csv", &tax),
            (
                "statements.csv",
                "account,period_start,period_end,posted_interest,tax_withheld\nSAV-1,2026-11-01,2026-11-30,240.00,60.00\n",
            ),
            ("settings.csv", "setting,value\nstatement_amounts,net\n"),
        ],
    );
    let r = run(b, &settings(("2026-11-01", "2026-11-30")));
    let row = &r.reconciliation[0];
    assert_eq!((row.expected, row.posted), (dec("300.00"), dec("300.00")));
    assert_eq!(row.status, Status::Agrees);
    let due = row.tax.as_deref().copied().unwrap();
    assert_eq!(
        (due.expected, due.posted, due.variance),
        (dec("60.00"), Some(dec("60.00")), Some(dec("0.00")))
    );
    assert_eq!(r.accruals[0].balance_at_cutoff, dec("100240.00"));
}

/// Spec example D1, December: G = 100,240.00 x 0.0365 x 31/365 = 310.744,
/// posts 310.74 (on the net balance); T = 62.148: half-up 62.15 (N
/// 248.59), down 62.14 (N 248.60).
#[test]
fn spec_example_d1_december_rounds_the_tax_by_the_tables_mode() {
    for (mode, tax, net) in [("half-up", "62.15", "248.59"), ("down", "62.14", "248.60")] {
        let dir = tempfile::tempdir().unwrap();
        let t = d1_tax(mode);
        let b = book(
            dir.path(),
            &[
                ("accounts.csv", D1_ACCOUNTS),
                ("rates.csv", D1_RATES),
                ("tax.csv", &t),
            ],
        );
        let r = run(b, &settings(("2026-12-01", "2026-12-31")));
        let pay = date("2027-01-01");
        assert_eq!(r.accruals[0].posted_in_window, dec("310.74"), "{mode}");
        assert_eq!(
            posted(&r, "INTEREST-SETTLEMENT"),
            [(pay, dec("0"), dec(net))],
            "{mode}"
        );
        assert_eq!(
            posted(&r, "WITHHOLDING-TAX-PAYABLE"),
            [(pay, dec("0"), dec(tax))],
            "{mode}"
        );
        assert_eq!(r.accruals[0].balance_at_cutoff, dec("100240.00") + dec(net));
    }
}

/// Spec example D3: an intercompany loan at a treaty rate of 15% (Source:
/// OECD Model Tax Convention, Article 11(2)). G = 5,000,000 x 0.042 x
/// 92/360 = 53,666.67; T = 8,050.00; N = 45,616.67. On the payment date:
/// Dr settlement 45,616.67 / Dr withholding tax recoverable 8,050.00 / Cr
/// accrued receivable 53,666.67.
#[test]
fn spec_example_d3_the_lender_recovers_the_tax_withheld() {
    let dir = tempfile::tempdir().unwrap();
    let b = book(
        dir.path(),
        &[
            (
                "accounts.csv",
                "account,currency,day_count,open_date,opening_balance,side,posting,posting_anchor,tax_ref\n\
                 IC-LOAN-1,EUR,ACT/360,2026-10-01,5000000.00,asset,quarterly,2026-12-31,TREATY-15\n",
            ),
            ("rates.csv", "rate_ref,effective,rate_percent\nIC-LOAN-1,2026-01-01,4.20\n"),
            ("tax.csv", "tax_ref,effective,rate_percent\nTREATY-15,2020-01-01,15\n"),
        ],
    );
    let r = run(b, &settings(("2026-12-01", "2026-12-31")));
    let pay = date("2027-01-01");
    assert_eq!(r.accruals[0].posted_in_window, dec("53666.67"));
    assert_eq!(
        posted(&r, "INTEREST-SETTLEMENT"),
        [(pay, dec("45616.67"), dec("0"))]
    );
    assert_eq!(
        posted(&r, "WITHHOLDING-TAX-RECOVERABLE"),
        [(pay, dec("8050.00"), dec("0"))]
    );
    assert_eq!(
        posted(&r, "ACCRUED-INTEREST-RECEIVABLE"),
        [(pay, dec("0"), dec("53666.67"))]
    );
}

/// An account without tax_ref books as before: no tax line at all.
#[test]
fn withholding_tax_an_account_without_tax_ref_has_no_tax_line() {
    let dir = tempfile::tempdir().unwrap();
    let b = book(
        dir.path(),
        &[
            ("accounts.csv", &D1_ACCOUNTS.replace(",SAVINGS-20", ",")),
            ("rates.csv", D1_RATES),
            ("tax.csv", &d1_tax("half-up")),
        ],
    );
    let r = run(b, &settings(("2026-11-01", "2026-11-30")));
    assert_eq!(r.accruals[0].balance_at_cutoff, dec("100300.00"));
    assert!(r.journal.iter().all(|l| !l.gl_account.contains("TAX")));
}

/// The errors of a book's tax inputs (behaviour.md, Withholding tax): each
/// names the sheet and cell, what was found and how to fix it.
fn errors_of(files: &[(&str, &str)]) -> Vec<ledgerate::problem::Problem> {
    let dir = tempfile::tempdir().unwrap();
    let b = book(dir.path(), files);
    b.problems
        .into_iter()
        .filter(|p| p.severity == Severity::Error)
        .collect()
}

#[test]
fn withholding_tax_an_unknown_tax_ref_keeps_the_account_out() {
    let e = errors_of(&[
        (
            "accounts.csv",
            &D1_ACCOUNTS.replace("SAVINGS-20", "SAVINGS-2O"),
        ),
        ("rates.csv", D1_RATES),
        ("tax.csv", &d1_tax("half-up")),
    ]);
    assert_eq!(e.len(), 1, "{e:?}");
    assert_eq!(
        (e[0].position.sheet.as_str(), e[0].position.column.as_str()),
        ("accounts", "tax_ref")
    );
    assert_eq!(e[0].found, "SAVINGS-2O");
    assert!(e[0].fix.contains("did you mean SAVINGS-20"), "{}", e[0].fix);
}

#[test]
fn withholding_tax_a_rate_outside_0_to_100_is_an_error_on_its_cell() {
    let e = errors_of(&[
        ("accounts.csv", D1_ACCOUNTS),
        ("rates.csv", D1_RATES),
        (
            "tax.csv",
            "tax_ref,effective,rate_percent\nSAVINGS-20,2026-01-01,120\n",
        ),
    ]);
    assert_eq!(e.len(), 2, "{e:?}");
    assert_eq!(e[0].position.cell, "C2");
    assert_eq!(e[0].found, "120");
    assert!(e[0].expected.contains("from 0 to 100"));
    // The account naming the broken table is kept out, pointing at its row.
    assert_eq!(e[1].position.column, "tax_ref");
    assert!(e[1].expected.contains("Tax!A2"), "{}", e[1].expected);
}

#[test]
fn withholding_tax_two_tables_of_one_tax_ref_on_one_date_are_an_error() {
    let e = errors_of(&[
        ("accounts.csv", D1_ACCOUNTS),
        ("rates.csv", D1_RATES),
        (
            "tax.csv",
            "tax_ref,effective,rate_percent\nSAVINGS-20,2026-01-01,20\nSAVINGS-20,2026-01-01,25\n",
        ),
    ]);
    assert_eq!(e.len(), 2, "{e:?}");
    assert_eq!(e[0].position.cell, "B3");
    assert!(e[0].expected.contains("already in B2"), "{}", e[0].expected);
    assert_eq!(e[1].position.column, "tax_ref");
}

/// No table in force on a payment date is an error for the account, never
/// a zero rate.
#[test]
fn withholding_tax_no_table_in_force_on_a_payment_date_is_an_error_for_the_account() {
    let dir = tempfile::tempdir().unwrap();
    let b = book(
        dir.path(),
        &[
            ("accounts.csv", D1_ACCOUNTS),
            ("rates.csv", D1_RATES),
            (
                "tax.csv",
                "tax_ref,effective,rate_percent\nSAVINGS-20,2026-12-02,20\n",
            ),
        ],
    );
    let r = run(b, &settings(("2026-11-01", "2026-11-30")));
    assert_eq!(r.accounts_failed, 1, "{:?}", r.problems);
    assert!(r.accruals.is_empty());
    let p = r
        .problems
        .iter()
        .find(|p| p.severity == Severity::Error)
        .unwrap();
    assert!(
        p.found
            .contains("no SAVINGS-20 tax table is in force on the payment date 2026-12-01"),
        "{}",
        p.found
    );
    assert!(p.fix.contains("add a Tax row"), "{}", p.fix);
}

#[test]
fn withholding_tax_net_amounts_without_a_tax_column_are_refused() {
    let e = errors_of(&[
        ("accounts.csv", D1_ACCOUNTS),
        ("rates.csv", D1_RATES),
        ("tax.csv", &d1_tax("half-up")),
        (
            "statements.csv",
            "account,period_start,period_end,posted_interest\nSAV-1,2026-11-01,2026-11-30,240.00\n",
        ),
        ("settings.csv", "setting,value\nstatement_amounts,net\n"),
    ]);
    assert!(!e.is_empty());
    assert!(e[0].found.contains("no tax_withheld column"), "{:?}", e[0]);
}

/// Under `net`, a statement that withheld no tax reconciles its gross, and a
/// warning names the tax not withheld; one at another rate of the tax_ref
/// names that rate.
#[test]
fn withholding_tax_a_statements_tax_other_than_the_tax_due_is_a_warning() {
    for (net, withheld, words) in [
        ("300.00", "0", "tax of 60.00 not withheld"),
        (
            "225.00",
            "75.00",
            "tax at 25% instead of 20% (75.00 instead of 60.00)",
        ),
    ] {
        let dir = tempfile::tempdir().unwrap();
        let statements = format!(
            "account,period_start,period_end,posted_interest,tax_withheld\nSAV-1,2026-11-01,2026-11-30,{net},{withheld}\n"
        );
        let b = book(
            dir.path(),
            &[
                ("accounts.csv", D1_ACCOUNTS),
                ("rates.csv", D1_RATES),
                (
                    "tax.csv",
                    "tax_ref,effective,rate_percent\nSAVINGS-20,2025-01-01,25\nSAVINGS-20,2026-01-01,20\n",
                ),
                ("statements.csv", &statements),
                ("settings.csv", "setting,value\nstatement_amounts,net\n"),
            ],
        );
        let r = run(b, &settings(("2026-11-01", "2026-11-30")));
        assert_eq!(r.reconciliation[0].status, Status::Agrees, "{words}");
        let w: Vec<_> = r
            .problems
            .iter()
            .filter(|p| p.severity == Severity::Warning)
            .collect();
        assert_eq!(w.len(), 1, "{w:?}");
        assert!(w[0].found.contains(words), "{}", w[0].found);
    }
}

/// `explain` shows each posting's gross, tax and net (spec example D1).
#[test]
fn withholding_tax_explain_shows_gross_tax_and_net() {
    let dir = tempfile::tempdir().unwrap();
    let tax = d1_tax("half-up");
    book(
        dir.path(),
        &[
            ("accounts.csv", D1_ACCOUNTS),
            ("rates.csv", D1_RATES),
            ("tax.csv", &tax),
        ],
    );
    let out = crate::common::ledgerate()
        .args(["explain", "--account", "SAV-1", "--cutoff", "2026-11-30"])
        .arg(dir.path())
        .output()
        .unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("tax SAVINGS-20: gross 300.00 tax 60.00 (20%) net 240.00"),
        "{text}{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

/// The Accruals sheet of a run with tax gains Tax withheld in window and Net
/// posted in window at its end; `merge` reads them back.
#[test]
fn withholding_tax_the_accruals_sheet_ends_with_the_tax_columns() {
    let dir = tempfile::tempdir().unwrap();
    let tax = d1_tax("half-up");
    let src = dir.path().join("book");
    book(
        &src,
        &[
            ("accounts.csv", D1_ACCOUNTS),
            ("rates.csv", D1_RATES),
            ("tax.csv", &tax),
            (
                "statements.csv",
                "account,period_start,period_end,posted_interest,tax_withheld\nSAV-1,2026-11-01,2026-11-30,245.00,55.00\n",
            ),
            ("settings.csv", "setting,value\nstatement_amounts,net\n"),
        ],
    );
    let out = dir.path().join("out.xlsx");
    let status = crate::common::ledgerate()
        .args(["run", "--cutoff", "2026-11-30", "--out"])
        .arg(&out)
        .arg(&src)
        .output()
        .unwrap();
    assert!(
        status.status.success(),
        "{}",
        String::from_utf8_lossy(&status.stderr)
    );
    let rows = crate::common::sheet(&out, "Accruals");
    let header: Vec<String> = rows[0].iter().map(ToString::to_string).collect();
    assert_eq!(
        header[header.len() - 2..],
        ["Tax withheld in window", "Net posted in window"]
    );
    assert_eq!(crate::common::number(&rows[1][22]), dec("60.00"));
    assert_eq!(crate::common::number(&rows[1][23]), dec("240.00"));
    let shards: Vec<_> = (1..=2)
        .map(|k| {
            let shard = dir.path().join(format!("shard-{k}.xlsx"));
            let status = crate::common::ledgerate()
                .args([
                    "run",
                    "--cutoff",
                    "2026-11-30",
                    "--shard",
                    &format!("{k}/2"),
                    "--out",
                ])
                .arg(&shard)
                .arg(&src)
                .output()
                .unwrap();
            assert!(
                status.status.success(),
                "{}",
                String::from_utf8_lossy(&status.stderr)
            );
            shard
        })
        .collect();
    let merged = dir.path().join("merged.xlsx");
    let status = crate::common::ledgerate()
        .args(["merge", "--out"])
        .arg(&merged)
        .args(&shards)
        .output()
        .unwrap();
    assert!(
        status.status.success(),
        "{}",
        String::from_utf8_lossy(&status.stderr)
    );
    let again = crate::common::sheet(&merged, "Accruals");
    assert_eq!(again[0].len(), 24);
    assert_eq!(crate::common::number(&again[1][23]), dec("240.00"));
    // The Reconciliation ends with Expected tax, Posted tax and Tax variance.
    for path in [&out, &merged] {
        let recon = crate::common::sheet(path, "Reconciliation");
        assert_eq!(recon[0].len(), 15);
        assert_eq!(recon[0][14].to_string(), "Tax variance");
        let tax: Vec<Decimal> = recon[1][12..15].iter().map(crate::common::number).collect();
        assert_eq!(tax, [dec("60.00"), dec("55.00"), dec("-5.00")]);
    }
}
