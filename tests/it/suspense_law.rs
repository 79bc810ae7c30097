//! The laws interest in suspense keeps (behaviour.md, Non-accrual and
//! interest in suspense), on random loans with random Accrual status rows
//! and interest receipts, closed month after month:
//!
//! - contractual interest (the interest for window without status rows),
//!   postings and reconciliation are the same with and without them;
//! - every day, recognised + suspended = contractual;
//! - suspense at cut-off = suspense before the window + reversed +
//!   suspended - released, and each close starts where the last one ended;
//! - interest for window = contractual - reversed - suspended + released;
//! - per GL account (the receivable and the suspense account), every
//!   journal line dated up to C, of this close and earlier ones, plus the
//!   opening equals the sub-ledger at C, in both journal styles.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::fs;

use chrono::{Duration, NaiveDate};
use proptest::prelude::*;
use rust_decimal::Decimal;

use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchResult, BatchSettings};
use ledgerate::book::{read_book, Book, ReadOptions};
use ledgerate::engine::ledger::SettlementLines;
use ledgerate::engine::reconcile::Tolerance;

use crate::common::date;

#[derive(Debug, Clone)]
struct Loan {
    basis: &'static str,
    rate_bp: u32,
    balance_cents: i64,
    open_day: i64,
    posting: &'static str,
    capitalise: bool,
    opening_suspense_cents: i64,
    statuses: Vec<(i64, u8, i64, bool)>,
    receipts: Vec<(i64, i64)>,
    repayment: Option<(i64, i64)>,
}

fn loan() -> impl Strategy<Value = Loan> {
    (
        prop_oneof![Just("ACT/365F"), Just("ACT/360"), Just("30/360")],
        1u32..1500,
        1_000_000i64..100_000_000,
        0i64..20,
        prop_oneof![Just("monthly"), Just("quarterly")],
        any::<bool>(),
        prop_oneof![Just(0i64), 0i64..500_000],
        proptest::collection::vec((0i64..92, 0u8..3, 0i64..2_000_000, any::<bool>()), 0..4),
        proptest::collection::vec((0i64..92, 1i64..800_000), 0..3),
        proptest::option::of((1i64..92, 1i64..500_000)),
    )
        .prop_map(
            |(
                basis,
                rate_bp,
                balance_cents,
                open_day,
                posting,
                capitalise,
                opening,
                statuses,
                receipts,
                repayment,
            )| Loan {
                basis,
                rate_bp,
                balance_cents,
                open_day,
                posting,
                capitalise,
                opening_suspense_cents: opening,
                statuses,
                receipts,
                repayment,
            },
        )
}

const START: &str = "2026-10-01";

fn day(k: i64) -> NaiveDate {
    date(START) + Duration::days(k)
}

fn cents(c: i64) -> Decimal {
    Decimal::new(c, 2)
}

/// Writes the loans as a CSV book (with or without their status rows).
fn write_book(dir: &std::path::Path, loans: &[Loan], with_status: bool) -> Book {
    fs::create_dir_all(dir).unwrap();
    let mut accounts = String::from("account,currency,day_count,open_date,opening_balance,side,compounding,posting,capitalise,opening_suspense\n");
    let mut rates = String::from("rate_ref,effective,rate_percent\n");
    let mut moves = String::from("account,value_date,amount,applies_to\n");
    let mut status = String::from("account,from,status,unpaid_interest,allowance,cash_basis\n");
    for (i, l) in loans.iter().enumerate() {
        let id = format!("LN-{i}");
        let opening = if with_status {
            cents(l.opening_suspense_cents)
        } else {
            Decimal::ZERO
        };
        writeln!(
            accounts,
            "{id},USD,{},{},{},asset,simple,{},{},{opening}",
            l.basis,
            day(l.open_day),
            cents(l.balance_cents),
            l.posting,
            if l.capitalise { "yes" } else { "no" }
        )
        .unwrap();
        writeln!(
            rates,
            "{id},2026-01-01,{}",
            Decimal::new(i64::from(l.rate_bp), 2)
        )
        .unwrap();
        if let Some((d, c)) = l.repayment {
            writeln!(
                moves,
                "{id},{},{},principal",
                day(l.open_day + d),
                cents(-c)
            )
            .unwrap();
        }
        if !with_status {
            continue;
        }
        for (d, c) in &l.receipts {
            writeln!(moves, "{id},{},{},interest", day(l.open_day + d), cents(-c)).unwrap();
        }
        let mut seen = std::collections::BTreeSet::new();
        for (d, kind, amount, cash) in &l.statuses {
            if !seen.insert(*d) {
                continue;
            }
            let (name, unpaid, allowance) = match kind {
                0 => ("accruing", String::new(), String::new()),
                1 => ("non-accrual", cents(*amount).to_string(), String::new()),
                _ => (
                    "credit-impaired",
                    String::new(),
                    cents(*amount * 20).to_string(),
                ),
            };
            let cash = if *cash { "yes" } else { "no" };
            writeln!(
                status,
                "{id},{},{name},{unpaid},{allowance},{cash}",
                day(*d)
            )
            .unwrap();
        }
    }
    fs::write(dir.join("accounts.csv"), accounts).unwrap();
    fs::write(dir.join("rates.csv"), rates).unwrap();
    fs::write(dir.join("movements.csv"), moves).unwrap();
    if with_status {
        fs::write(dir.join("accrual_status.csv"), status).unwrap();
    }
    let book = read_book(dir, &ReadOptions::default());
    assert!(!book.has_errors(), "{:?}", book.problems);
    book
}

const CLOSES: [(&str, &str); 3] = [
    ("2026-10-01", "2026-10-31"),
    ("2026-11-01", "2026-11-30"),
    ("2026-12-01", "2026-12-31"),
];

fn close(book: &Book, window: (&str, &str), style: JournalStyle) -> BatchResult {
    let s = BatchSettings {
        cutoff: date(window.1),
        window_start: date(window.0),
        daily: false,
        journal_style: style,
        entities: vec!["HM".to_string()],
        tolerance: Tolerance::default(),
        fast_path: true,
        shard: None,
        fixing_fallback: Default::default(),
        as_at: None,
        previous_as_at: None,
        settlement_lines: SettlementLines::PaymentDate,
        journal_detail: false,
    };
    run_books(std::slice::from_ref(book), &s, &|| {})
}

fn check(loans: &[Loan], style: JournalStyle) -> Result<(), TestCaseError> {
    let dir = tempfile::tempdir().unwrap();
    let with = write_book(&dir.path().join("with"), loans, true);
    let without = write_book(&dir.path().join("without"), loans, false);
    let opening_suspense: Decimal = loans.iter().map(|l| cents(l.opening_suspense_cents)).sum();
    // GL -> (date, debit - credit) of every line of every close so far.
    let mut lines: Vec<(String, NaiveDate, Decimal)> = Vec::new();
    let mut last_suspense: BTreeMap<String, Decimal> = BTreeMap::new();
    for window in CLOSES {
        let a = close(&with, window, style);
        let b = close(&without, window, style);
        prop_assert!(
            a.problems
                .iter()
                .all(|p| p.severity != ledgerate::problem::Severity::Error),
            "{:?}",
            a.problems
        );
        prop_assert_eq!(a.accruals.len(), loans.len());
        prop_assert_eq!(&a.reconciliation, &b.reconciliation);
        let cutoff = date(window.1);
        let mut open_items = Decimal::ZERO;
        let mut suspense = Decimal::ZERO;
        for (x, y) in a.accruals.iter().zip(&b.accruals) {
            prop_assert_eq!(x.posted_in_window, y.posted_in_window);
            prop_assert_eq!(x.ledger.open_item, y.ledger.open_item);
            open_items += x.ledger.open_item;
            // A loan without status rows, receipts or opening suspense is accruing.
            let Some(s) = x.suspense.as_ref() else {
                prop_assert_eq!(x.interest_for_window, y.interest_for_window);
                continue;
            };
            prop_assert_eq!(s.contractual_for_window, y.interest_for_window);
            prop_assert_eq!(
                x.interest_for_window,
                s.contractual_for_window - s.reversed_in_window - s.suspended_in_window
                    + s.released_in_window
            );
            prop_assert_eq!(
                s.suspense_at_cutoff,
                s.suspense_before_window + s.reversed_in_window + s.suspended_in_window
                    - s.released_in_window
            );
            if let Some(before) = last_suspense.get(&x.account) {
                prop_assert_eq!(*before, s.suspense_before_window);
            }
            last_suspense.insert(x.account.clone(), s.suspense_at_cutoff);
            suspense += s.suspense_at_cutoff;
        }
        lines.extend(
            a.journal
                .iter()
                .map(|l| (l.gl_account.clone(), l.date, l.debit - l.credit)),
        );
        let sum = |gl: &str| -> Decimal {
            lines
                .iter()
                .filter(|(g, d, _)| g == gl && *d <= cutoff)
                .map(|(_, _, x)| *x)
                .sum()
        };
        // The receivable (debit normal) and the suspense account (credit normal).
        prop_assert_eq!(
            sum("ACCRUED-INTEREST-RECEIVABLE"),
            open_items,
            "receivable at {}",
            cutoff
        );
        prop_assert_eq!(
            opening_suspense - sum("INTEREST-IN-SUSPENSE"),
            suspense,
            "suspense at {}",
            cutoff
        );
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    #[test]
    fn suspense_keeps_the_ledger_law(loans in proptest::collection::vec(loan(), 1..4), reversing in any::<bool>()) {
        let style = if reversing { JournalStyle::Reversing } else { JournalStyle::Incremental };
        check(&loans, style)?;
    }
}
