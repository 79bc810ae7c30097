//! The life events' worked examples (behaviour.md, Account life events;
//! spec examples B1-B5): a close with its closing posting, break penalty and
//! payout, read from a CSV book and run through the pipeline and the batch
//! as `run` does, with every figure as the examples state it.

use std::fs;
use std::path::Path;

use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchResult, BatchSettings};
use ledgerate::book::{read_book, Book, ReadOptions};
use ledgerate::engine::events::figures_of;
use ledgerate::engine::ledger::SettlementLines;
use ledgerate::engine::reconcile::{Status, Tolerance};
use ledgerate::pipeline::{run_account, statements_of, AccountRun, BookAccount, Options};
use ledgerate::problem::Severity;

use crate::common::{date, dec};

const ACCOUNTS_HEAD: &str = "account,currency,day_count,open_date,opening_balance,compounding,posting,capitalise,maturity,close_date,break_penalty,break_days,break_rate_ref,break_amount,penalty_limit,gl_penalty,after_maturity,matured_rate_ref,rollover_months,rollover_rate_ref\n";

/// A CSV book of `accounts` rows (under [`ACCOUNTS_HEAD`]), `rates` rows and
/// optional movements and statements.
fn book(dir: &Path, accounts: &str, rates: &str, movements: &str, statements: &str) -> Book {
    fs::create_dir_all(dir).unwrap();
    fs::write(
        dir.join("accounts.csv"),
        format!("{ACCOUNTS_HEAD}{accounts}"),
    )
    .unwrap();
    fs::write(
        dir.join("rates.csv"),
        format!("rate_ref,effective,rate_percent\n{rates}"),
    )
    .unwrap();
    if !movements.is_empty() {
        fs::write(
            dir.join("movements.csv"),
            format!("account,value_date,amount\n{movements}"),
        )
        .unwrap();
    }
    if !statements.is_empty() {
        fs::write(
            dir.join("statements.csv"),
            format!("account,period_start,period_end,posted_interest\n{statements}"),
        )
        .unwrap();
    }
    read_book(dir, &ReadOptions::default())
}

fn good(book: Book) -> Book {
    assert!(!book.has_errors(), "{:?}", book.problems);
    book
}

fn options(cutoff: &str) -> Options {
    Options {
        window_start: date(cutoff).with_day0(0).unwrap(),
        cutoff: date(cutoff),
        tolerance: Tolerance::default(),
        fixing_fallback: Default::default(),
        keep_days: false,
        fast_path: true,
        previous_as_at: None,
        settlement_lines: SettlementLines::PaymentDate,
    }
}

use chrono::Datelike;

fn account_run(book: &Book, id: &str, cutoff: &str) -> AccountRun {
    let entry = book.accounts.iter().find(|a| a.terms.id == id).unwrap();
    let statements = statements_of(book, id);
    let account = BookAccount::from_book(book, entry, &statements);
    run_account(&account, &options(cutoff)).unwrap()
}

fn book_terms(book: &Book, id: &str) -> ledgerate::engine::AccountTerms {
    book.accounts
        .iter()
        .find(|a| a.terms.id == id)
        .unwrap()
        .terms
        .clone()
}

fn settings(cutoff: &str) -> BatchSettings {
    let o = options(cutoff);
    BatchSettings {
        cutoff: o.cutoff,
        window_start: o.window_start,
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

fn batch(book: Book, cutoff: &str) -> BatchResult {
    run_books(&[book], &settings(cutoff), &|| {})
}

/// The journal lines whose memo starts with `memo`, as (date, GL, debit,
/// credit), amounts without trailing zeros.
fn journal(r: &BatchResult, memo: &str) -> Vec<(String, String, String, String)> {
    r.journal
        .iter()
        .filter(|l| l.memo.starts_with(memo))
        .map(|l| {
            (
                l.date.to_string(),
                l.gl_account.clone(),
                l.debit.normalize().to_string(),
                l.credit.normalize().to_string(),
            )
        })
        .collect()
}

const B1: &str = "TD-B1,USD,ACT/365F,2026-11-02,10000.00,simple,maturity,no,2027-05-03,2026-11-06,days,7,,,{limit},,,,,\n";

fn b1(dir: &Path, limit: &str) -> Book {
    good(book(
        dir,
        &B1.replace("{limit}", limit),
        "TD-B1,2026-01-01,4.00\n",
        "",
        "",
    ))
}

/// Spec example B1: the minimum penalty of seven days' simple interest.
#[test]
fn spec_example_b1_minimum_penalty_on_a_time_deposit() {
    let dir = tempfile::tempdir().unwrap();
    let book = b1(dir.path(), "none");
    let run = account_run(&book, "TD-B1", "2026-11-30");
    let c = run.life.as_ref().unwrap().closing.as_ref().unwrap();
    let closing = c.closing_posting.as_ref().unwrap();
    // 4 nights: 10,000 x 0.04 x 4/365 = 320/73 = 4.3835...
    assert_eq!(
        (closing.start, closing.end),
        (date("2026-11-02"), date("2026-11-05"))
    );
    assert_eq!(closing.posted, dec("4.38"));
    assert_eq!(closing.payment, date("2026-11-06"));
    // 10,000 x 0.04 x 7/365 = 560/73 = 7.6712...
    assert_eq!(c.penalty, dec("7.67"));
    assert_eq!(c.waived, dec("0"));
    assert_eq!(c.payout, dec("9996.71"));
    assert_eq!(run.result.balance_at_cutoff, dec("0"));
    assert_eq!(run.result.accrued_at_cutoff, dec("0"));

    let limited = tempfile::tempdir().unwrap();
    let book = b1(limited.path(), "interest");
    let run = account_run(&book, "TD-B1", "2026-11-30");
    let c = run.life.as_ref().unwrap().closing.as_ref().unwrap();
    assert_eq!(c.penalty, dec("4.38"));
    assert_eq!(c.waived, dec("3.29"));
    assert_eq!(c.payout, dec("10000.00"));
}

/// Spec example B1 in the journal: the closing posting and the penalty on X.
#[test]
fn spec_example_b1_journal_on_the_close_date() {
    let dir = tempfile::tempdir().unwrap();
    let r = batch(b1(dir.path(), "none"), "2026-11-30");
    assert_eq!(
        journal(&r, "interest posted"),
        vec![
            (
                "2026-11-06".into(),
                "ACCRUED-INTEREST-PAYABLE".into(),
                "4.38".into(),
                "0".into()
            ),
            (
                "2026-11-06".into(),
                "INTEREST-SETTLEMENT".into(),
                "0".into(),
                "4.38".into()
            ),
        ]
    );
    assert_eq!(
        journal(&r, "break penalty"),
        vec![
            (
                "2026-11-06".into(),
                "INTEREST-EXPENSE".into(),
                "0".into(),
                "7.67".into()
            ),
            (
                "2026-11-06".into(),
                "INTEREST-SETTLEMENT".into(),
                "7.67".into(),
                "0".into()
            ),
        ]
    );
}

fn b2(dir: &Path) -> Book {
    good(book(
        dir,
        "TD-B2,USD,ACT/360,2026-08-01,250000.00,simple,maturity,no,2027-02-01,2026-11-16,rate,,TD-BREAK,,,7400-PENALTY,,,,\n",
        "TD-B2,2026-01-01,5.00\nTD-BREAK,2026-01-01,2.00\n",
        "",
        "",
    ))
}

/// Spec example B2: the break re-priced at the rate for the term held.
#[test]
fn spec_example_b2_break_repriced_at_the_rate_for_the_term_held() {
    let dir = tempfile::tempdir().unwrap();
    let book = b2(dir.path());
    let run = account_run(&book, "TD-B2", "2026-11-30");
    let c = run.life.as_ref().unwrap().closing.as_ref().unwrap();
    // 250,000 x 0.05 x 107/360 = 66,875/18 = 3,715.2777...
    assert_eq!(c.closing_posting.as_ref().unwrap().posted, dec("3715.28"));
    assert_eq!(c.term_interest, dec("3715.28"));
    // 250,000 x 0.02 x 107/360 = 13,375/9 = 1,486.1111...
    assert_eq!(c.break_interest, Some(dec("1486.11")));
    assert_eq!(c.penalty, dec("2229.17"));
    assert_eq!(c.payout, dec("251486.11"));
    let r = &run.result;
    // Accrued at 31 Oct (92 nights) = 28,750/9 = 3,194.44.
    assert_eq!(r.accrued_before_window, dec("3194.44"));
    assert_eq!(r.interest_for_window, dec("520.84"));
    assert_eq!(r.accrued_at_cutoff, dec("0"));
    assert_eq!(r.balance_at_cutoff, dec("0"));

    let b = batch(b2(tempfile::tempdir().unwrap().path()), "2026-11-30");
    assert_eq!(
        journal(&b, "break penalty"),
        vec![
            (
                "2026-11-16".into(),
                "7400-PENALTY".into(),
                "0".into(),
                "2229.17".into()
            ),
            (
                "2026-11-16".into(),
                "INTEREST-SETTLEMENT".into(),
                "2229.17".into(),
                "0".into()
            ),
        ]
    );
    let line = b.accruals.iter().find(|a| a.account == "TD-B2").unwrap();
    assert_eq!(line.interest_for_window, dec("520.84"));
    assert_eq!(line.ledger.open_item, dec("0"));
}

const B5: &str =
    "SAV-B5,USD,ACT/365F,2026-10-01,100000.00,simple,monthly,no,,2026-11-15,,,,,,,,,,\n";

/// Spec example B5: a savings account closed mid-month posts for
/// 1..14 November and journals it on 15 November; a statement row for
/// exactly that period is the closing posting.
#[test]
fn spec_example_b5_a_savings_account_closed_mid_month() {
    let dir = tempfile::tempdir().unwrap();
    let book = good(book(
        dir.path(),
        B5,
        "SAV-B5,2026-01-01,3.65\n",
        "SAV-B5,2026-11-15,-100140.00\n",
        "SAV-B5,2026-10-01,2026-10-31,310.00\nSAV-B5,2026-11-01,2026-11-14,140.00\n",
    ));
    let run = account_run(&book, "SAV-B5", "2026-11-30");
    let c = run.life.as_ref().unwrap().closing.as_ref().unwrap();
    let closing = c.closing_posting.as_ref().unwrap();
    assert_eq!(
        (closing.start, closing.end),
        (date("2026-11-01"), date("2026-11-14"))
    );
    assert_eq!(closing.posted, dec("140.00"));
    assert_eq!(closing.payment, date("2026-11-15"));
    assert_eq!(c.payout, dec("100140.00"));
    assert_eq!(c.paid, dec("-100140.00"));
    assert!(
        run.notes.iter().all(|n| n.severity != Severity::Warning),
        "{:?}",
        run.notes
    );
    let row = run
        .rows
        .iter()
        .find(|r| r.row.end == date("2026-11-14"))
        .unwrap();
    assert_eq!(
        (row.row.start, row.row.status),
        (date("2026-11-01"), Status::Agrees)
    );
    assert_eq!(run.result.balance_at_cutoff, dec("0"));

    let r = batch(book, "2026-11-30");
    assert_eq!(
        journal(&r, "interest posted")
            .into_iter()
            .filter(|l| l.1 == "INTEREST-SETTLEMENT")
            .collect::<Vec<_>>(),
        vec![(
            "2026-11-15".into(),
            "INTEREST-SETTLEMENT".into(),
            "0".into(),
            "140".into()
        ),]
    );
}

/// A movement valued before the close and booked on the close date: its
/// back-value interest joins the closing posting (no posting follows it), so
/// nothing stays accrued on the closed account. 36,500.00 valued 2026-11-05
/// earns 36,500 x 0.0365 / 365 = 3.65 a night for the 10 nights 5..14
/// November: 36.50 on top of the 140.00 of the original balance.
#[test]
fn back_value_booked_on_the_close_date_joins_the_closing_posting() {
    let dir = tempfile::tempdir().unwrap();
    good(book(dir.path(), B5, "SAV-B5,2026-01-01,3.65\n", "", ""));
    fs::write(
        dir.path().join("movements.csv"),
        "account,value_date,amount,booking_date\nSAV-B5,2026-11-05,36500.00,2026-11-15\nSAV-B5,2026-11-15,-136676.50,\n",
    )
    .unwrap();
    let book = good(read_book(dir.path(), &ReadOptions::default()));
    let run = account_run(&book, "SAV-B5", "2026-11-30");
    let c = run.life.as_ref().unwrap().closing.as_ref().unwrap();
    let closing = c.closing_posting.as_ref().unwrap();
    assert_eq!(closing.back_value, dec("36.50"));
    assert_eq!(closing.expected, dec("176.50"));
    assert_eq!(c.payout, dec("136676.50"));
    assert_eq!(run.result.accrued_at_cutoff, dec("0"));
    assert_eq!(run.result.balance_at_cutoff, dec("0"));
    assert!(
        run.notes.iter().all(|n| n.severity != Severity::Warning),
        "{:?}",
        run.notes
    );
}

/// A payout movement that differs from balance + closing posting -
/// penalty beyond the tolerance is a warning naming both figures.
#[test]
fn a_payout_that_differs_is_a_warning_naming_both_figures() {
    let dir = tempfile::tempdir().unwrap();
    let book = good(book(
        dir.path(),
        B5,
        "SAV-B5,2026-01-01,3.65\n",
        "SAV-B5,2026-11-15,-100000.00\n",
        "",
    ));
    let run = account_run(&book, "SAV-B5", "2026-11-30");
    let w: Vec<_> = run
        .notes
        .iter()
        .filter(|n| n.severity == Severity::Warning)
        .collect();
    assert_eq!(w.len(), 1, "{:?}", run.notes);
    assert!(
        w[0].found.contains("-100000.00") && w[0].found.contains("100140.00"),
        "{}",
        w[0].found
    );
}

/// A close after the cut-off changes nothing in this run.
#[test]
fn a_close_after_the_cutoff_changes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let closed = good(book(
        dir.path(),
        &B5.replace("2026-11-15", "2026-12-15"),
        "SAV-B5,2026-01-01,3.65\n",
        "",
        "",
    ));
    let open_dir = tempfile::tempdir().unwrap();
    let open = good(book(
        open_dir.path(),
        &B5.replace("2026-11-15", ""),
        "SAV-B5,2026-01-01,3.65\n",
        "",
        "",
    ));
    let a = account_run(&closed, "SAV-B5", "2026-11-30");
    let b = account_run(&open, "SAV-B5", "2026-11-30");
    assert!(a.life.unwrap().closing.is_none());
    assert_eq!(a.result, b.result);
}

/// The reader's problems for life-event columns that cannot be used.
#[test]
fn bad_life_event_columns_are_problems_naming_the_cell() {
    let rates = "TD,2026-01-01,4.00\n";
    let cases: [(&str, &str, Severity, &str); 10] = [
        (
            "TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,2026-11-02,,,,,,,,,,\n",
            "J2",
            Severity::Error,
            "close_date after the open_date",
        ),
        (
            "TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,,days,,,,,,,,,\n",
            "K2",
            Severity::Error,
            "break_days with break_penalty days",
        ),
        (
            "TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,,rate,,NOPE,,,,,,,\n",
            "M2",
            Severity::Error,
            "a schedule of the Rates sheet for break_rate_ref",
        ),
        (
            "TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,,,,,,,,,rollover,,3,\n",
            "Q2",
            Severity::Warning,
            "a maturity for after_maturity",
        ),
        (
            "TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,,,amount,,,50,,,,,,\n",
            "K2",
            Severity::Note,
            "a break penalty on a close before maturity",
        ),
        (
            "TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,,amount,,,,,,,,,\n",
            "K2",
            Severity::Error,
            "break_amount with break_penalty amount",
        ),
        ("TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,,rate,,,,,,,,,\n", "K2", Severity::Error, "break_rate_ref with break_penalty rate"),
        ("TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,2027-05-10,days,7,,,,,,,,\n", "K2", Severity::Note, "a break penalty on a close before maturity"),
        ("TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,,,,,,,,rate,,,\n", "Q2", Severity::Error, "matured_rate_ref with after_maturity rate"),
        ("TD,USD,ACT/365F,2026-11-02,10000,simple,monthly,no,2027-05-03,,,,,,,,rollover,,,NOPE\n", "Q2", Severity::Error, "rollover_months with after_maturity rollover"),
    ];
    for (row, cell, severity, expected) in cases {
        let dir = tempfile::tempdir().unwrap();
        let b = book(dir.path(), row, rates, "", "");
        let p = b
            .problems
            .iter()
            .find(|p| p.expected.contains(expected))
            .unwrap_or_else(|| panic!("{expected}: {:?}", b.problems));
        assert_eq!(p.severity, severity, "{p:?}");
        assert!(
            p.position.cell.ends_with(cell),
            "{expected}: {:?}",
            p.position
        );
        assert!(!p.fix.is_empty());
    }
}

/// A movement valued after the close date keeps the account out, with an
/// error on the movement's value date.
#[test]
fn a_movement_after_the_close_date_is_an_error_for_the_account() {
    let dir = tempfile::tempdir().unwrap();
    let b = book(
        dir.path(),
        B5,
        "SAV-B5,2026-01-01,3.65\n",
        "SAV-B5,2026-11-20,-5.00\n",
        "",
    );
    let p = b
        .problems
        .iter()
        .find(|p| p.expected.contains("close_date 2026-11-15"))
        .unwrap_or_else(|| panic!("{:?}", b.problems));
    assert_eq!(p.severity, Severity::Error);
    assert!(p.position.cell.ends_with("B2"), "{:?}", p.position);
    let r = batch(b, "2026-11-30");
    assert!(r.accruals.iter().all(|a| a.account != "SAV-B5"));
}

fn b3(dir: &Path, after: &str) -> Book {
    good(book(
        dir,
        &format!("TD-B3,USD,ACT/365F,2026-08-20,500000.00,simple,maturity,no,2026-11-20,,,,,,,,{after},,\n"),
        "TD-B3,2026-01-01,3.65\nTD-MATURED,2026-01-01,0.10\n",
        "",
        "",
    ))
}

/// Spec example B3: a matured balance not paid out, earning nothing or the
/// matured rate.
#[test]
fn spec_example_b3_matured_not_paid_out() {
    let dir = tempfile::tempdir().unwrap();
    let run = account_run(&b3(dir.path(), "none,"), "TD-B3", "2026-11-30");
    let r = &run.result;
    // Interest at maturity 92 x 50.00 = 4,600.00, paid out.
    assert_eq!(r.postings.last().unwrap().posted, dec("4600.00"));
    assert_eq!(r.balance_at_cutoff, dec("500000.00"));
    assert_eq!(r.accrued_at_cutoff, dec("0"));
    let terms = &book_terms(&b3(tempfile::tempdir().unwrap().path(), "none,"), "TD-B3");
    let life = figures_of(terms, run.life.as_ref(), r, date("2026-11-30"));
    assert_eq!(life.status.word(), "matured unpaid");
    assert_eq!(life.days_since_maturity, Some(11));

    let dir = tempfile::tempdir().unwrap();
    let run = account_run(&b3(dir.path(), "rate,TD-MATURED"), "TD-B3", "2026-11-30");
    // 11 nights (20..30 Nov): 500,000 x 0.001 x 11/365 = 1,100/73 = 15.0684...
    assert_eq!(run.result.accrued_at_cutoff, dec("15.07"));
    assert_eq!(run.result.balance_at_cutoff, dec("500000.00"));
    assert_eq!(run.result.posted_in_window, dec("4600.00"));
    assert_eq!(
        run.life.as_ref().unwrap().figures.status.word(),
        "matured unpaid"
    );
}

/// Spec example B4: a capitalised term deposit rolled over for three months
/// at the rollover schedule's rate on the maturity.
#[test]
fn spec_example_b4_rollover() {
    let dir = tempfile::tempdir().unwrap();
    let book = good(book(
        dir.path(),
        "TD-B4,USD,ACT/365F,2026-08-31,100000.00,simple,maturity,yes,2026-11-30,,,,,,,,rollover,,3,TD-ROLL\n",
        "TD-B4,2026-01-01,4.00\nTD-ROLL,2026-01-01,3.00\nTD-ROLL,2026-11-30,3.50\nTD-ROLL,2026-12-15,9.00\n",
        "",
        "",
    ));
    let run = account_run(&book, "TD-B4", "2026-11-30");
    let r = &run.result;
    // 91 nights: 100,000 x 0.04 x 91/365 = 72,800/73 = 997.2602...
    let first = &r.postings[0];
    assert_eq!(
        (first.end, first.posted),
        (date("2026-11-29"), dec("997.26"))
    );
    assert_eq!(r.balance_at_cutoff, dec("100997.26"));
    // The night of 30 Nov at 3.50%: 100,997.26 x 0.035/365 = 9.68466...
    assert_eq!(r.accrued_at_cutoff, dec("9.68"));
    let life = run.life.as_ref().unwrap();
    assert_eq!(life.figures.status.word(), "rolled over");
    assert_eq!(life.figures.term_start, Some(date("2026-11-30")));
    assert_eq!(life.figures.maturity, Some(date("2027-02-28")));
    // The rate is fixed for the term: the table of 15 December does not apply.
    let later = account_run(&book, "TD-B4", "2026-12-31");
    // 32 nights at 3.50% on 100,997.26 = 309.9090...
    assert_eq!(later.result.accrued_at_cutoff, dec("309.91"));
}

/// A statement that shows the closing posting net of the penalty is
/// reconciled against the closing posting before it, and the cause search
/// names the penalty.
#[test]
fn a_closing_row_net_of_the_penalty_names_it_as_the_likely_cause() {
    let dir = tempfile::tempdir().unwrap();
    let book = good(book(
        dir.path(),
        "TD-B2,USD,ACT/360,2026-08-01,250000.00,simple,maturity,no,2027-02-01,2026-11-16,rate,,TD-BREAK,,,,,,,\n",
        "TD-B2,2026-01-01,5.00\nTD-BREAK,2026-01-01,2.00\n",
        "",
        "TD-B2,2026-08-01,2026-11-15,1486.11\n",
    ));
    let run = account_run(&book, "TD-B2", "2026-11-30");
    let row = run
        .rows
        .iter()
        .find(|r| r.row.end == date("2026-11-15"))
        .unwrap();
    assert_eq!(row.row.expected, dec("3715.28"));
    assert_eq!(row.row.status, Status::UnderPosted);
    let cause = row.likely_cause.as_ref().unwrap().text();
    assert!(
        cause.starts_with("interest posted net of the break penalty (2026-11-16)"),
        "{cause}"
    );
}

/// A withdrawal before maturity on an account with a break penalty is a
/// note: it carries no penalty.
#[test]
fn a_partial_withdrawal_before_maturity_is_a_note() {
    let dir = tempfile::tempdir().unwrap();
    let b = book(
        dir.path(),
        "TD,USD,ACT/365F,2026-11-02,10000,simple,maturity,no,2027-05-03,,days,7,,,,,,,,\n",
        "TD,2026-01-01,4.00\n",
        "TD,2026-11-20,-500.00\n",
        "",
    );
    let p = b
        .problems
        .iter()
        .find(|p| p.expected.contains("a withdrawal before maturity"))
        .unwrap_or_else(|| panic!("{:?}", b.problems));
    assert_eq!(p.severity, Severity::Note);
    assert!(p.position.cell.ends_with("C2"), "{:?}", p.position);
    assert!(!b.has_errors(), "{:?}", b.problems);
}

/// A book of `accounts` rows under [`ACCOUNTS_HEAD`] with a `tax_ref`
/// column of `tax_ref` on every row, a 20% SAVINGS-20 table and
/// optional movements.
fn taxed(dir: &Path, accounts: &str, rates: &str, movements: &str) -> Book {
    fs::create_dir_all(dir).unwrap();
    let rows: String = accounts
        .lines()
        .map(|l| format!("{l},SAVINGS-20\n"))
        .collect();
    fs::write(
        dir.join("accounts.csv"),
        format!("{},tax_ref\n{rows}", ACCOUNTS_HEAD.trim_end()),
    )
    .unwrap();
    fs::write(
        dir.join("rates.csv"),
        format!("rate_ref,effective,rate_percent\n{rates}"),
    )
    .unwrap();
    fs::write(
        dir.join("tax.csv"),
        "tax_ref,effective,rate_percent\nSAVINGS-20,2026-01-01,20\n",
    )
    .unwrap();
    if !movements.is_empty() {
        fs::write(
            dir.join("movements.csv"),
            format!("account,value_date,amount\n{movements}"),
        )
        .unwrap();
    }
    good(read_book(dir, &ReadOptions::default()))
}

/// Spec example B1 with a 20% tax table: the closing posting's tax is
/// withheld from the payout (behaviour.md, Account life events, Payout).
#[test]
fn spec_example_b1_with_tax_pays_out_net_of_the_closing_postings_tax() {
    let dir = tempfile::tempdir().unwrap();
    // The payout movement: 10,000.00 + 4.38 - 7.67 - 0.88 = 9,995.83.
    let book = taxed(
        dir.path(),
        &B1.replace("{limit}", "none"),
        "TD-B1,2026-01-01,4.00\n",
        "TD-B1,2026-11-06,-9995.83\n",
    );
    let run = account_run(&book, "TD-B1", "2026-11-30");
    let c = run.life.as_ref().unwrap().closing.as_ref().unwrap();
    let closing = c.closing_posting.as_ref().unwrap();
    // 10,000 x 0.04 x 4/365 = 4.3835..., posts 4.38; 4.38 x 0.20 = 0.876,
    // 0.88 half-up; net 3.50. Worked with Python's decimal module:
    // Decimal("10000") + Decimal("4.38") - Decimal("7.67") - Decimal("0.88")
    // == Decimal("9995.83").
    assert_eq!(closing.posted, dec("4.38"));
    assert_eq!(closing.withheld.tax, dec("0.88"));
    assert_eq!(closing.withheld.net, dec("3.50"));
    assert_eq!(c.penalty, dec("7.67"));
    assert_eq!(c.payout, dec("9995.83"));
    assert_eq!(c.paid, dec("-9995.83"));
    // The payout movement matches: no warning.
    assert!(
        run.notes.iter().all(|n| n.severity != Severity::Warning),
        "{:?}",
        run.notes
    );
    assert_eq!(run.result.balance_at_cutoff, dec("0"));

    // The journal settles the closing posting as net and tax on X.
    let r = batch(book, "2026-11-30");
    let mut posted = journal(&r, "interest posted");
    posted.sort();
    assert_eq!(
        posted,
        vec![
            (
                "2026-11-06".into(),
                "ACCRUED-INTEREST-PAYABLE".into(),
                "4.38".into(),
                "0".into()
            ),
            (
                "2026-11-06".into(),
                "INTEREST-SETTLEMENT".into(),
                "0".into(),
                "3.5".into()
            ),
            (
                "2026-11-06".into(),
                "WITHHOLDING-TAX-PAYABLE".into(),
                "0".into(),
                "0.88".into()
            ),
        ]
    );
}

/// A payout movement of the gross payout (the tax not withheld) differs
/// from the payout by the tax: a warning naming both figures.
#[test]
fn a_payout_that_ignores_the_tax_is_a_warning() {
    let dir = tempfile::tempdir().unwrap();
    let book = taxed(
        dir.path(),
        &B1.replace("{limit}", "none"),
        "TD-B1,2026-01-01,4.00\n",
        "TD-B1,2026-11-06,-9996.71\n",
    );
    let run = account_run(&book, "TD-B1", "2026-11-30");
    let w: Vec<_> = run
        .notes
        .iter()
        .filter(|n| n.severity == Severity::Warning)
        .collect();
    assert_eq!(w.len(), 1, "{:?}", run.notes);
    assert!(
        w[0].found.contains("-9996.71") && w[0].found.contains("9995.83"),
        "{}",
        w[0].found
    );
}

/// A capitalised saver closed mid-month with tax: the balance at the end of
/// X-1 holds October's net, and the payout adds the closing posting's net.
#[test]
fn a_capitalised_taxed_saver_closed_pays_out_its_balance_and_the_net() {
    let dir = tempfile::tempdir().unwrap();
    let book = taxed(
        dir.path(),
        &B5.replace(",monthly,no,", ",monthly,yes,"),
        "SAV-B5,2026-01-01,3.65\n",
        "",
    );
    let run = account_run(&book, "SAV-B5", "2026-11-30");
    let c = run.life.as_ref().unwrap().closing.as_ref().unwrap();
    // October: 100,000 x 0.0365 x 31/365 = 310.00, tax 62.00, net 248.00
    // capitalised: 100,248.00 from 1 November.
    assert_eq!(c.balance, dec("100248.00"));
    // 1..14 November: 100,248 x 0.0365 x 14/365 = 140.3472, posts 140.35;
    // 140.35 x 0.20 = 28.07; net 112.28; payout 100,248.00 + 112.28 = 100,360.28.
    let closing = c.closing_posting.as_ref().unwrap();
    assert_eq!(closing.posted, dec("140.35"));
    assert_eq!(closing.withheld.tax, dec("28.07"));
    assert_eq!(c.payout, dec("100360.28"));
    assert_eq!(run.result.balance_at_cutoff, dec("0"));
}
