//! The ledger's worked examples (behaviour.md, Books that tie; spec
//! examples A1-A3): booked opening, prior-period adjustment, open item,
//! journal lines, Tie-out and the system accrued check, on the books the
//! examples describe, run through the reader and the batch as `run` does.

use std::fs;
use std::path::Path;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchResult, BatchSettings};
use ledgerate::book::{read_book, Book, BookedRow, ReadOptions, TrialBalanceRow};
use ledgerate::engine::ledger::SettlementLines;
use ledgerate::engine::reconcile::{Status, Tolerance};
use ledgerate::problem::Position;
use ledgerate::report::model::{AccrualLine, JournalLine, TieStatus};

use crate::common::{date, dec};

/// DEP-1 of examples A1 and A2: a deposit of 100,000.00 at 3.65% on
/// ACT/365F, posting monthly and capitalised (10.00 a night), with `movement`.
fn deposit_book(dir: &Path, movement: &str) -> Book {
    fs::create_dir_all(dir).unwrap();
    let files = [
        (
            "accounts.csv",
            "account,currency,day_count,open_date,opening_balance,side,compounding,posting,capitalise,gl_accrued\n\
             DEP-1,USD,ACT/365F,2026-10-01,100000.00,liability,simple,monthly,yes,2300\n",
        ),
        ("rates.csv", "rate_ref,effective,rate_percent\nDEP-1,2026-01-01,3.65\n"),
        ("movements.csv", movement),
    ];
    for (name, text) in files {
        fs::write(dir.join(name), text).unwrap();
    }
    let book = read_book(dir, &ReadOptions::default());
    assert!(!book.has_errors(), "{:?}", book.problems);
    book
}

fn settings(window: (&str, &str), previous_as_at: Option<&str>) -> BatchSettings {
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
        previous_as_at: previous_as_at.map(date),
        settlement_lines: SettlementLines::PaymentDate,
        journal_detail: false,
    }
}

fn run(book: Book, s: &BatchSettings) -> BatchResult {
    run_books(&[book], s, &|| {})
}

fn line<'r>(r: &'r BatchResult, account: &str) -> &'r AccrualLine {
    r.accruals.iter().find(|a| a.account == account).unwrap()
}

/// The journal's line to `gl` whose memo starts with `memo`, as (date, debit, credit).
fn journal(r: &BatchResult, gl: &str, memo: &str) -> Vec<(NaiveDate, Decimal, Decimal)> {
    r.journal
        .iter()
        .filter(|l: &&JournalLine| l.gl_account == gl && l.memo.starts_with(memo))
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

const A1_MOVEMENT: &str =
    "account,value_date,amount,booking_date,reference\nDEP-1,2026-10-20,36500.00,2026-11-05,MOV-1\n";

/// Spec example A1: a deposit valued 20 October and booked 5 November,
/// after the October close run on 3 November.
#[test]
fn spec_example_a1_a_deposit_back_valued_across_the_close() {
    let dir = tempfile::tempdir().unwrap();
    let mut book = deposit_book(dir.path(), A1_MOVEMENT);
    book.trial_balance.push(tb("2300", "2026-10-31", "-310.00"));
    let r = run(
        book,
        &settings(("2026-11-01", "2026-11-30"), Some("2026-11-03")),
    );
    let a = line(&r, "DEP-1");
    let l = &a.ledger;
    // Back-value 20..31 Oct = 36,500 x 0.0365 x 12/365 = 43.80; November
    // days = 136,810.00 x 0.0365 x 30/365 = 410.43; posting 454.23.
    assert_eq!(l.window_days_interest, dec("410.43"));
    assert_eq!(l.booked_opening, dec("310.00"));
    assert_eq!(l.opening_source, "previous close");
    assert_eq!(l.prior_period, dec("43.80"));
    assert_eq!(a.interest_for_window, dec("454.23"));
    assert_eq!(a.posted_in_window, dec("454.23"));
    assert_eq!(l.open_item, dec("454.23"));
    assert_eq!(l.settled_in_window, dec("310.00"));
    assert_eq!(
        a.interest_for_window,
        l.open_item - l.booked_opening + l.settled_in_window
    );
    // Journal: 30 Nov Dr expense 410.43 and Dr 43.80 (prior period), Cr
    // payable; 1 Dec Dr payable 454.23 / Cr settlement.
    let c = date("2026-11-30");
    assert_eq!(
        journal(
            &r,
            "INTEREST-EXPENSE",
            "interest accrued 2026-11-01..2026-11-30"
        ),
        [(c, dec("410.43"), dec("0.00"))]
    );
    assert_eq!(
        journal(
            &r,
            "INTEREST-EXPENSE",
            "prior-period interest adjustment to 2026-10-31"
        ),
        [(c, dec("43.80"), dec("0.00"))]
    );
    assert_eq!(
        journal(&r, "2300", "interest posted"),
        [(date("2026-12-01"), dec("454.23"), dec("0.00"))]
    );
    // Tie-out: 310.00 + 454.23 - 310.00 = 454.23, difference 0.00.
    let t = &r.tie_out.as_ref().unwrap()[0];
    assert_eq!(
        (t.opening_tb, t.opening_sub_ledger, t.opening_difference),
        (dec("310.00"), dec("310.00"), dec("0.00"))
    );
    assert_eq!(
        (t.closing_roll_forward, t.closing_sub_ledger),
        (dec("454.23"), dec("454.23"))
    );
    assert_eq!(
        (t.closing_difference, t.status),
        (dec("0.00"), TieStatus::Agrees)
    );
}

/// Example A1 with a Booked row at 31 October instead of a previous as-at:
/// the same opening, from the books.
#[test]
fn spec_example_a1_with_the_opening_from_a_booked_row() {
    let dir = tempfile::tempdir().unwrap();
    let mut book = deposit_book(dir.path(), A1_MOVEMENT);
    book.booked.push(BookedRow {
        account: "DEP-1".into(),
        date: date("2026-10-31"),
        open_item: dec("310.00"),
        position: Position::default(),
    });
    let r = run(book, &settings(("2026-11-01", "2026-11-30"), None));
    let l = &line(&r, "DEP-1").ledger;
    assert_eq!(
        (l.booked_opening, l.prior_period),
        (dec("310.00"), dec("43.80"))
    );
    assert_eq!(l.opening_source, "Booked row");
    assert!(r.problems.is_empty(), "{:?}", r.problems);
}

/// Example A1 without a previous as-at or a Booked row: the opening is the
/// figure known now, no prior-period line, and a warning names the
/// back-value interest the opening assumes the books held.
#[test]
fn spec_example_a1_without_a_previous_close_warns() {
    let dir = tempfile::tempdir().unwrap();
    let book = deposit_book(dir.path(), A1_MOVEMENT);
    let r = run(book, &settings(("2026-11-01", "2026-11-30"), None));
    let a = line(&r, "DEP-1");
    assert_eq!(
        (a.ledger.booked_opening, a.ledger.prior_period),
        (dec("353.80"), dec("0.00"))
    );
    assert_eq!(a.interest_for_window, dec("410.43"));
    assert!(journal(&r, "INTEREST-EXPENSE", "prior-period").is_empty());
    let w: Vec<&str> = r.problems.iter().map(|p| p.found.as_str()).collect();
    assert_eq!(
        w,
        ["account DEP-1: the opening assumes the books at 2026-10-31 already held 43.80 of back-value interest for movement MOV-1 booked 2026-11-05"]
    );
}

/// Spec example A2, the December run: the movement valued 20 November and
/// booked 3 December, after the November close run on 2 December.
#[test]
fn spec_example_a2_the_december_run_books_novembers_back_value() {
    let dir = tempfile::tempdir().unwrap();
    let book = deposit_book(
        dir.path(),
        "account,value_date,amount,booking_date\nDEP-1,2026-11-20,36500.00,2026-12-03\n",
    );
    let r = run(
        book,
        &settings(("2026-12-01", "2026-12-31"), Some("2026-12-02")),
    );
    let a = line(&r, "DEP-1");
    let l = &a.ledger;
    // BO = O(30 Nov) known at 2 Dec = 300.93; known now 341.08; PPA 40.15.
    assert_eq!(l.booked_opening, dec("300.93"));
    assert_eq!(l.prior_period, dec("40.15"));
    // December days 137,110.93 x 0.0365 x 31/365 = 425.043883, posts 425.04;
    // the posting carries the back-value: 465.19.
    assert_eq!(l.window_days_interest, dec("425.04"));
    assert_eq!(a.posted_in_window, dec("465.19"));
    assert_eq!(a.interest_for_window, dec("465.19"));
}

/// Spec example A3: a term deposit posting at maturity, checked against the
/// core system's accrued interest at the cut-off.
#[test]
fn spec_example_a3_system_accrued_check_on_a_term_deposit() {
    let check = |booked: &str| {
        let dir = tempfile::tempdir().unwrap();
        fs::write(
            dir.path().join("accounts.csv"),
            "account,currency,day_count,open_date,opening_balance,side,compounding,posting,maturity\n\
             TD-3,USD,ACT/365F,2026-09-01,365000.00,liability,simple,maturity,2027-03-01\n",
        )
        .unwrap();
        fs::write(
            dir.path().join("rates.csv"),
            "rate_ref,effective,rate_percent\nTD-3,2026-01-01,3.65\n",
        )
        .unwrap();
        let mut book = read_book(dir.path(), &ReadOptions::default());
        book.booked.push(BookedRow {
            account: "TD-3".into(),
            date: date("2026-11-30"),
            open_item: dec(booked),
            position: Position::default(),
        });
        let r = run(book, &settings(("2026-11-01", "2026-11-30"), None));
        assert_eq!(r.accrued_check.len(), 1);
        r.accrued_check[0].clone()
    };
    let row = check("3285.00");
    // 91 nights x 36.50 = 3,321.50; balance-years 365,000 x 91/365 = 91,000.
    assert_eq!(
        (row.period_start, row.period_end),
        (Some(date("2026-09-01")), Some(date("2026-11-30")))
    );
    assert_eq!(row.days, 91);
    assert_eq!(row.balance_years, dec("91000"));
    assert_eq!(
        (row.expected, row.posted, row.variance),
        (dec("3321.50"), dec("3285.00"), dec("-36.50"))
    );
    // -36.50 / 91,000 x 10,000 = -365/91 = -4.0110 bp.
    assert_eq!(row.variance_bp, Some(dec("-4.0110")));
    assert_eq!(row.status, Status::UnderPosted);
    assert!(
        row.likely_cause.contains(
            "period start a day late: 2026-09-02..2026-11-30 instead of 2026-09-01..2026-11-30"
        ) && row
            .likely_cause
            .contains("reproduces the booked amount exactly"),
        "{}",
        row.likely_cause
    );
    let row = check("3300.00");
    assert_eq!(row.variance, dec("-21.50"));
    assert_eq!(row.variance_bp, Some(dec("-2.3626")));
    assert!(
        row.likely_cause.contains("implies a rate"),
        "{}",
        row.likely_cause
    );
}
