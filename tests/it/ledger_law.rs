//! The law the ledger keeps (behaviour.md, Books that tie), on random books
//! closed month after month, each close built on the previous one's booked
//! state (its as-at date given as the next close's previous as-at):
//!
//! - per account, interest for window = open item at C - booked opening +
//!   settled in window;
//! - per accrued-interest GL account, the opening trial balance plus every
//!   journal line dated up to C (this run's and earlier runs') equals the
//!   sub-ledger's open items at C, in both journal styles and every
//!   settlement mode, with movements booked late across the closes, and
//!   with random withholding tax tables (behaviour.md, Withholding tax):
//!   a posting settles the accrual by its gross whatever its tax;
//! - a zero-rate tax table leaves every figure and journal line as without
//!   tax.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::fs;

use chrono::{Duration, NaiveDate};
use proptest::prelude::*;
use rust_decimal::Decimal;

use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchSettings};
use ledgerate::book::{known, read_book, Book, ReadOptions};
use ledgerate::engine::ledger::SettlementLines;
use ledgerate::engine::reconcile::Tolerance;
use ledgerate::report::model::JournalLine;

use crate::common::date;

#[derive(Debug, Clone)]
struct Account {
    asset: bool,
    basis: &'static str,
    rate_bp: u32,
    balance_cents: i64,
    open_day: i64,
    posting: &'static str,
    capitalise: bool,
    delay: u32,
    /// Withholding tax: the rate in hundredths of a percent from 2026-01-01,
    /// the rate from a later day, that day's offset, and the rounding mode.
    tax: Option<(u32, u32, i64, &'static str)>,
}

#[derive(Debug, Clone)]
struct Move {
    account: usize,
    value_day: i64,
    late_days: i64,
    cents: i64,
}

fn account() -> impl Strategy<Value = Account> {
    (
        any::<bool>(),
        prop_oneof![Just("ACT/365F"), Just("ACT/360"), Just("30/360")],
        1u32..900,
        100_000i64..100_000_000,
        0i64..60,
        prop_oneof![Just("monthly"), Just("quarterly")],
        any::<bool>(),
        0u32..3,
        prop::option::of((
            0u32..=10_000,
            0u32..=10_000,
            0i64..150,
            prop_oneof![Just("half-up"), Just("down"), Just("up"), Just("half-even")],
        )),
    )
        .prop_map(
            |(asset, basis, rate_bp, balance_cents, open_day, posting, capitalise, delay, tax)| {
                Account {
                    tax,
                    asset,
                    basis,
                    rate_bp,
                    balance_cents,
                    open_day,
                    posting,
                    capitalise,
                    delay,
                }
            },
        )
}

fn movement(accounts: usize) -> impl Strategy<Value = Move> {
    (0..accounts, 0i64..150, 0i64..25, -5_000_000i64..5_000_000).prop_map(
        |(account, value_day, late_days, cents)| Move {
            account,
            value_day,
            late_days,
            cents,
        },
    )
}

/// The first day accounts may open, and of the first close.
const START: &str = "2026-08-01";

fn day(offset: i64) -> NaiveDate {
    date(START) + Duration::days(offset)
}

fn money(cents: i64) -> String {
    Decimal::new(cents, 2).to_string()
}

/// Which tax the accounts of a book bear.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Taxed {
    /// Each account's own random tables, or none.
    AsDrawn,
    /// Every account a table of 0%.
    Zero,
    /// No Tax sheet and no tax_ref.
    Never,
}

/// Writes the book as a CSV folder and reads it back as `run` would.
fn write_book(dir: &std::path::Path, accounts: &[Account], moves: &[Move], taxed: Taxed) -> Book {
    let mut a = String::from(
        "account,currency,day_count,open_date,opening_balance,side,compounding,posting,posting_anchor,capitalise,payment_delay_days,tax_ref\n",
    );
    let mut r = String::from("rate_ref,effective,rate_percent\n");
    let mut t = String::from("tax_ref,effective,rate_percent,round_mode\n");
    for (i, x) in accounts.iter().enumerate() {
        writeln!(
            a,
            "A{i},USD,{},{},{},{},simple,{},2026-08-31,{},{},{}",
            x.basis,
            day(x.open_day),
            money(x.balance_cents),
            if x.asset { "asset" } else { "liability" },
            x.posting,
            if x.capitalise { "yes" } else { "no" },
            x.delay,
            match (taxed, x.tax) {
                (Taxed::AsDrawn, Some(_)) | (Taxed::Zero, _) => format!("T{i}"),
                _ => String::new(),
            }
        )
        .unwrap();
        match (taxed, x.tax) {
            (Taxed::AsDrawn, Some((first, later, from, mode))) => {
                let p = |h: u32| Decimal::new(i64::from(h), 2);
                writeln!(t, "T{i},2026-01-01,{},{mode}", p(first)).unwrap();
                writeln!(t, "T{i},{},{},{mode}", day(from), p(later)).unwrap();
            }
            (Taxed::Zero, _) => writeln!(t, "T{i},2026-01-01,0,half-up").unwrap(),
            _ => {}
        }
        writeln!(
            r,
            "A{i},2026-01-01,{}",
            Decimal::new(i64::from(x.rate_bp), 2)
        )
        .unwrap();
    }
    let mut m = String::from("account,value_date,amount,booking_date,reference\n");
    for (k, x) in moves.iter().enumerate() {
        let value = day(x.value_day.max(accounts[x.account].open_day));
        writeln!(
            m,
            "A{},{value},{},{},M{k}",
            x.account,
            money(x.cents),
            value + Duration::days(x.late_days)
        )
        .unwrap();
    }
    fs::write(dir.join("accounts.csv"), a).unwrap();
    fs::write(dir.join("rates.csv"), r).unwrap();
    fs::write(dir.join("movements.csv"), m).unwrap();
    if taxed != Taxed::Never {
        fs::write(dir.join("tax.csv"), t).unwrap();
    }
    read_book(dir, &ReadOptions::default())
}

/// The book as known at the end of `as_at`: movements booked after it left out.
fn known_at(book: &Book, as_at: NaiveDate) -> Book {
    let mut b = book.clone();
    for list in b.movements.values_mut() {
        list.retain(|m| known::movement_known(m, as_at));
    }
    b
}

/// A GL account's balance in its normal direction (payable: credit;
/// receivable: debit) from the journal lines dated up to `to`.
fn gl_balance(lines: &[JournalLine], gl: &str, to: NaiveDate) -> Decimal {
    let credit_normal = gl.contains("PAYABLE");
    lines
        .iter()
        .filter(|l| l.gl_account == gl && l.date <= to)
        .map(|l| {
            if credit_normal {
                l.credit - l.debit
            } else {
                l.debit - l.credit
            }
        })
        .sum()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 32, ..ProptestConfig::default() })]

    #[test]
    fn consecutive_closes_tie_the_journal_to_the_open_items(
        accounts in prop::collection::vec(account(), 1..4),
        moves in prop::collection::vec(movement(3), 0..6),
        lags in prop::collection::vec(1i64..6, 5),
        reversing in any::<bool>(),
        mode in prop_oneof![
            Just(SettlementLines::PaymentDate),
            Just(SettlementLines::InWindow),
            Just(SettlementLines::PeriodEnd),
        ],
    ) {
        let moves: Vec<Move> = moves.into_iter().filter(|m| m.account < accounts.len()).collect();
        let dir = tempfile::tempdir().unwrap();
        let book = write_book(dir.path(), &accounts, &moves, Taxed::AsDrawn);
        prop_assert!(!book.has_errors(), "{:?}", book.problems);
        // Accounts open in the first window or later, so the books hold
        // nothing before it.
        let closes = [
            ("2026-08-01", "2026-08-31"),
            ("2026-09-01", "2026-09-30"),
            ("2026-10-01", "2026-10-31"),
            ("2026-11-01", "2026-11-30"),
            ("2026-12-01", "2026-12-31"),
        ];
        let style = if reversing { JournalStyle::Reversing } else { JournalStyle::Incremental };
        // Every run's journal lines.
        let mut lines: Vec<JournalLine> = Vec::new();
        let mut previous_as_at: Option<NaiveDate> = None;
        for (m, (from, to)) in closes.iter().enumerate() {
            let (from, to) = (date(from), date(to));
            let as_at = to + Duration::days(lags[m]);
            let settings = BatchSettings {
                cutoff: to,
                window_start: from,
                daily: false,
                journal_style: style,
                entities: vec!["HM".to_string()],
                tolerance: Tolerance::default(),
                fast_path: true,
                shard: None,
                fixing_fallback: Default::default(),
                as_at: Some(as_at),
                previous_as_at,
                settlement_lines: mode,
                journal_detail: false,
            };
            let r = run_books(&[known_at(&book, as_at)], &settings, &|| {});
            prop_assert_eq!(r.accruals.len(), accounts.len(), "{:?}", r.problems);
            let mut sub_ledger: BTreeMap<String, Decimal> = BTreeMap::new();
            for a in &r.accruals {
                let l = &a.ledger;
                prop_assert_eq!(
                    a.interest_for_window,
                    l.open_item - l.booked_opening + l.settled_in_window,
                    "{} in {}..{}", a.account, from, to
                );
                if m == 0 {
                    prop_assert_eq!(l.booked_opening, Decimal::ZERO);
                }
                *sub_ledger.entry(l.gl_accrued.to_string()).or_default() += l.open_item;
            }
            // Every entry balances, tax lines included.
            let debits: Decimal = r.journal.iter().map(|l| l.debit).sum();
            let credits: Decimal = r.journal.iter().map(|l| l.credit).sum();
            prop_assert_eq!(debits, credits);
            lines.extend(r.journal);
            for (gl, open_items) in &sub_ledger {
                let gl_now = gl_balance(&lines, gl, to);
                prop_assert_eq!(gl_now, *open_items, "{} at {} ({:?}, {:?})", gl, to, style, mode);
            }
            previous_as_at = Some(as_at);
        }
    }

    /// Withholding tax: a table of 0% changes no figure and adds no journal
    /// line; the gross figures are those of the account without tax.
    #[test]
    fn a_zero_rate_tax_table_leaves_the_gross_figures_alone(
        accounts in prop::collection::vec(account(), 1..4),
        moves in prop::collection::vec(movement(3), 0..6),
    ) {
        let moves: Vec<Move> = moves.into_iter().filter(|m| m.account < accounts.len()).collect();
        let settings = BatchSettings {
            cutoff: date("2026-12-31"),
            window_start: date("2026-12-01"),
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
        };
        let run = |taxed| {
            let dir = tempfile::tempdir().unwrap();
            let book = write_book(dir.path(), &accounts, &moves, taxed);
            run_books(&[book], &settings, &|| {})
        };
        let (mut zero, never) = (run(Taxed::Zero), run(Taxed::Never));
        // Only the tax columns tell the two apart: no tax, the net the gross.
        for a in &mut zero.accruals {
            let tax = a.tax.take().unwrap();
            prop_assert_eq!((tax.withheld, tax.net_posted), (Decimal::ZERO, a.posted_in_window));
        }
        prop_assert_eq!(&zero.accruals, &never.accruals);
        prop_assert_eq!(&zero.journal, &never.journal);
        prop_assert_eq!(&zero.reconciliation, &never.reconciliation);
    }
}
