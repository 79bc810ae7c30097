//! Tests of the generator: the mix a book holds, the planted mistakes, and
//! that the same seed gives the same rows.

use std::collections::{BTreeMap, BTreeSet};

use super::*;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::schedule::Posting;
use crate::engine::Side;

/// A movement valued before the window and booked after the previous
/// close: the October close did not know it.
fn booked_late(m: &Movement) -> bool {
    m.value_date < WINDOW_START && m.booking_date.is_some_and(|b| b > PREVIOUS_AS_AT)
}

fn book(seed: u64, n: u64) -> Vec<SampleAccount> {
    Generator::new(seed, n)
        .accounts_in(0..n)
        .into_iter()
        .map(|a| a.unwrap())
        .collect()
}

#[test]
fn the_same_seed_gives_the_same_rows_in_any_order() {
    let g = Generator::new(5, 300);
    let forward: Vec<_> = g.accounts_in(0..300);
    let one_by_one: Vec<_> = (0..300).rev().map(|i| g.account(i)).collect();
    for (a, b) in forward.iter().zip(one_by_one.iter().rev()) {
        let (a, b) = (a.as_ref().unwrap(), b.as_ref().unwrap());
        assert_eq!(a.account_row(), b.account_row());
        assert_eq!(a.movement_rows(), b.movement_rows());
        assert_eq!(a.statement_rows(), b.statement_rows());
    }
    let other = Generator::new(6, 300).account(0).unwrap();
    let first = g.account(0).unwrap();
    assert_ne!(
        (first.account_row(), first.movement_rows()),
        (other.account_row(), other.movement_rows())
    );
}

/// The mix: every basis and compounding rule of the engine, both tier
/// methods, every periodic posting and posting at maturity.
#[test]
fn a_book_holds_every_basis_compounding_rule_and_tier_method() {
    let accounts = book(2026, 3000);
    let bases: BTreeSet<&str> = accounts
        .iter()
        .map(|a| a.entry.terms.basis.name())
        .collect();
    let all: BTreeSet<&str> = Basis::ALL.iter().map(|b| b.name()).collect();
    assert_eq!(bases, all);
    let rules: BTreeSet<&str> = accounts
        .iter()
        .map(|a| a.entry.terms.compounding.name())
        .collect();
    let all: BTreeSet<&str> = Compounding::ALL.iter().map(|c| c.name()).collect();
    assert_eq!(rules, all);
    let tiers: BTreeSet<&str> = accounts
        .iter()
        .map(|a| a.entry.terms.tier_method.name())
        .collect();
    assert_eq!(tiers, BTreeSet::from(["banded", "whole"]));
    let postings: BTreeSet<&str> = accounts
        .iter()
        .map(|a| a.entry.terms.posting.name())
        .collect();
    let all: BTreeSet<&str> = Posting::ALL
        .iter()
        .filter(|p| **p != Posting::None)
        .map(|p| p.name())
        .collect();
    assert_eq!(postings, all);
}

/// 0 to 6 movements (7 with one booked after the previous close) and 0 to 2
/// rate changes per account, each count seen; one statement row for a
/// period ending in the window, or, in the middle of a posting period, a
/// Booked row at the cut-off instead.
#[test]
fn movements_rate_changes_and_statements_per_account() {
    let g = Generator::new(2026, 3000);
    let accounts = book(2026, 3000);
    let moves: BTreeSet<usize> = accounts
        .iter()
        .map(|a| a.movements.iter().filter(|m| !booked_late(m)).count())
        .collect();
    assert_eq!(moves, (0..=6).collect());
    let changes: BTreeSet<usize> = accounts
        .iter()
        .map(|a| {
            g.products
                .iter()
                .find(|p| p.rate_ref == a.entry.rate_ref)
                .map_or(0, |p| p.schedule.tables().len() - 1)
        })
        .collect();
    assert_eq!(changes, BTreeSet::from([0, 1, 2]));
    for a in &accounts {
        let id = &a.entry.terms.id;
        if a.booked.is_some() {
            assert!(a.statement.is_none(), "{id}: no posting ends in the window");
            continue;
        }
        let s = a.statement.as_ref().unwrap();
        assert!(s.end >= WINDOW_START && s.end <= CUTOFF, "{id}");
        assert!(s.start <= s.end);
        for m in &a.movements {
            assert!(m.value_date >= a.entry.terms.open_date && m.value_date <= CUTOFF);
        }
    }
    let counts = g.counts();
    assert_eq!(
        counts.get(SheetKind::Movements),
        accounts
            .iter()
            .map(|a| a.movements.len() as u64)
            .sum::<u64>()
    );
    assert_eq!(counts.get(SheetKind::Accounts), 3000);
}

/// About 2% of statement rows carry a mistake, each far enough from the
/// right amount to be outside the default tolerance; the others are right.
#[test]
fn about_two_percent_of_rows_carry_a_mistake() {
    let accounts = book(99, 5000);
    let mut planted = 0;
    let mut kinds = BTreeSet::new();
    for a in accounts.iter().filter(|a| a.booked.is_none()) {
        let s = a.statement.as_ref().unwrap();
        match &a.mistake {
            None => assert_eq!(s.posted, s.expected, "{}", a.entry.terms.id),
            Some(m) => {
                planted += 1;
                kinds.insert(m.kind());
                let least = Decimal::new(3, a.entry.terms.minor_units);
                assert!(
                    (s.posted - s.expected).abs() >= least,
                    "{} {m:?}",
                    a.entry.terms.id
                );
            }
        }
    }
    // 2% of 5,000 is 100.
    assert!((70..=130).contains(&planted), "{planted}");
    assert_eq!(kinds, MistakeKind::ALL.into_iter().collect());
}

/// The width of a sheet of the generated book: the columns of its layout.
fn width(sheet: SheetKind) -> usize {
    SHEETS
        .iter()
        .find(|s| s.sheet == sheet)
        .map(|s| s.labels().len())
        .unwrap()
}

#[test]
fn every_row_has_a_cell_per_column() {
    let mut tb = OpeningBalances::default();
    for a in book(3, 200) {
        tb.add(&a).unwrap();
        for r in a.booked_rows() {
            assert_eq!(r.len(), width(SheetKind::Booked));
        }
        assert_eq!(a.account_row().len(), width(SheetKind::Accounts));
        for r in a.movement_rows() {
            assert_eq!(r.len(), width(SheetKind::Movements));
        }
        for r in a.statement_rows() {
            assert_eq!(r.len(), width(SheetKind::Statements));
        }
        for r in a.rate_rows() {
            assert_eq!(r.len(), width(SheetKind::Rates));
        }
    }
    for r in tb.rows() {
        assert_eq!(r.len(), width(SheetKind::TrialBalance));
    }
    let g = Generator::new(3, 1);
    for sheet in [SheetKind::Rates, SheetKind::Holidays, SheetKind::Settings] {
        for r in g.fixed_rows(sheet) {
            assert_eq!(r.len(), width(sheet));
        }
    }
    assert!(HOLIDAY_ROWS.iter().all(|(_, d, _)| *d != NaiveDate::MIN));
    assert!([CUTOFF, WINDOW_START, OPENING_DAY, PREVIOUS_AS_AT]
        .iter()
        .all(|d| *d != NaiveDate::MIN));
    // The Trial balance's day is the day before the window, and the
    // previous close was made in F-1..C (behaviour.md, Knowledge date).
    assert_eq!(WINDOW_START.pred_opt(), Some(OPENING_DAY));
    assert!(PREVIOUS_AS_AT >= OPENING_DAY && PREVIOUS_AS_AT <= CUTOFF);
}

/// Every sheet of the generated book is a sheet of the book format, once,
/// in the format's order; the Fixings and Accrual status sheets are left
/// out.
#[test]
fn the_sheets_follow_the_book_format() {
    let kinds: Vec<SheetKind> = SHEETS.iter().map(|s| s.sheet).collect();
    let expected: Vec<SheetKind> = SheetKind::ALL
        .into_iter()
        .filter(|k| !matches!(*k, SheetKind::Fixings | SheetKind::AccrualStatus))
        .collect();
    assert_eq!(kinds, expected);
    assert_eq!(
        SHEETS[0].labels()[..5],
        ["account", "name", "currency", "side", "day_count"]
    );
}

/// About 1 account in 200 has a movement valued in October and booked
/// 2026-11-03..2026-11-10, after the previous close of 2026-11-02; those
/// accounts, and only accounts with a movement the previous close did not
/// know, have a prior-period adjustment (behaviour.md, The booked opening).
#[test]
fn movements_booked_after_the_previous_close_make_the_prior_period_adjustments() {
    let accounts = book(2026, 3000);
    let late: Vec<&SampleAccount> = accounts
        .iter()
        .filter(|a| {
            a.movements.iter().any(|m| {
                m.reference.as_deref().is_some_and(|r| r.contains("00-"))
                    && m.value_date >= date(2026, 10, 1)
                    && m.value_date < WINDOW_START
                    && m.booking_date
                        .is_some_and(|b| b >= date(2026, 11, 3) && b <= date(2026, 11, 10))
            })
        })
        .collect();
    // 1 in 200 of 3,000 is 15.
    assert!((6..=30).contains(&late.len()), "{}", late.len());
    for a in &late {
        assert!(
            a.entry.terms.open_date < WINDOW_START,
            "{}",
            a.entry.terms.id
        );
    }
    let adjusted = late
        .iter()
        .filter(|a| !a.ledger.prior_period.is_zero())
        .count();
    assert!(
        adjusted * 4 >= late.len() * 3,
        "{adjusted} of {}",
        late.len()
    );
    for a in &accounts {
        if !a.ledger.prior_period.is_zero() {
            assert!(
                a.movements.iter().any(booked_late),
                "{}: a prior-period adjustment of {} without a late booking",
                a.entry.terms.id,
                a.ledger.prior_period
            );
        }
    }
}

/// Term deposits and quarterly loans in the middle of their posting period
/// have a Booked row at the cut-off: most hold our open item O(C); about
/// 15% are a day of interest off (a start a day late or early), far enough
/// to be outside the default tolerance.
#[test]
fn booked_rows_at_the_cut_off_hold_the_open_item_or_a_day_off() {
    let accounts = book(77, 3000);
    let mut rows = 0;
    let mut kinds = BTreeSet::new();
    for a in &accounts {
        let Some(b) = &a.booked else {
            continue;
        };
        rows += 1;
        let id = &a.entry.terms.id;
        assert_eq!(b.expected, a.ledger.open_item, "{id}");
        assert!(b.accrual_from <= CUTOFF, "{id}: accrues over the cut-off");
        assert!(
            matches!(
                a.entry.terms.posting,
                Posting::Maturity | Posting::Quarterly
            ),
            "{id}"
        );
        match b.mistake {
            None => assert_eq!(b.open_item, b.expected, "{id}"),
            Some(m) => {
                kinds.insert(m);
                let gap = b.open_item - b.expected;
                assert!(gap.abs() >= Decimal::new(3, 2), "{id}: {gap}");
                // A day late is a day short; a day early a day too many.
                assert_eq!(
                    gap.is_sign_negative(),
                    m == BookedMistake::StartADayLate,
                    "{id}: {m:?} {gap}"
                );
            }
        }
    }
    let planted = accounts
        .iter()
        .filter(|a| a.booked.as_ref().is_some_and(|b| b.mistake.is_some()))
        .count();
    // 50 in 1,050 of 3,000 is about 143 rows; 15% of them about 21.
    assert!((100..=190).contains(&rows), "{rows}");
    assert!((8..=40).contains(&planted), "{planted}");
    assert_eq!(
        kinds,
        BTreeSet::from([BookedMistake::StartADayLate, BookedMistake::StartADayEarly])
    );
}

/// The Trial balance holds, per currency and accrued-interest GL account,
/// the sum of the accounts' booked openings, a payable's printed as a
/// credit (negative); no GL account serves both sides.
#[test]
fn the_trial_balance_is_the_sum_of_the_booked_openings() {
    let accounts = book(2026, 3000);
    let mut tb = OpeningBalances::default();
    let mut sums: BTreeMap<(String, String), (Side, Decimal)> = BTreeMap::new();
    for a in &accounts {
        tb.add(a).unwrap();
        let key = (a.entry.terms.currency.clone(), a.ledger.gl_accrued.clone());
        let e = sums.entry(key).or_insert((a.ledger.side, Decimal::ZERO));
        assert_eq!(e.0, a.ledger.side, "{}", a.entry.terms.id);
        e.1 += a.ledger.booked_opening;
    }
    let rows = tb.rows();
    assert_eq!(rows.len(), sums.len());
    assert_eq!(
        rows.len() as u64,
        Generator::new(2026, 3000)
            .counts()
            .get(SheetKind::TrialBalance)
    );
    for (row, ((currency, gl), (side, sum))) in rows.iter().zip(&sums) {
        let printed = if *side == Side::Liability {
            -*sum
        } else {
            *sum
        };
        assert_eq!(
            row,
            &vec![
                Value::Text(ENTITY.into()),
                Value::Text(currency.clone()),
                Value::Text(gl.clone()),
                Value::Date(OPENING_DAY),
                Value::Number(printed),
            ]
        );
    }
    // Payables hold a credit at the close: the savers' GL prints negative.
    let savers = rows
        .iter()
        .find(|r| r[1] == Value::Text("GBP".into()) && r[2] == Value::Text("2210".into()))
        .unwrap();
    assert!(matches!(savers[4], Value::Number(x) if x.is_sign_negative()));

    let mut mixed = OpeningBalances::default();
    let mut a = accounts[0].clone();
    mixed.add(&a).unwrap();
    a.ledger.side = match a.ledger.side {
        Side::Asset => Side::Liability,
        Side::Liability => Side::Asset,
    };
    assert_eq!(mixed.add(&a).unwrap_err().gl_account, a.ledger.gl_accrued);
}

/// A few percent of a book has a life event and a few percent has tax
/// withheld (behaviour.md, Account life events; Withholding tax): savers
/// closed in the month with their payout on the close date, term deposits
/// broken early with each penalty kind, matured unpaid, earning a rate
/// after maturity or rolled over; savers at the savings tax or exempt, and
/// asset-side intercompany loans at the treaty rate.
#[test]
fn a_few_percent_of_accounts_have_life_events_or_tax() {
    let n = 5000;
    let accounts = book(2026, n);
    let mut lives: BTreeMap<LifeKind, u64> = BTreeMap::new();
    let mut taxes: BTreeMap<String, u64> = BTreeMap::new();
    for a in &accounts {
        let t = &a.entry.terms;
        if let Some(l) = a.life {
            *lives.entry(l).or_insert(0) += 1;
        }
        if let Some(x) = &t.tax {
            *taxes.entry(x.schedule.tax_ref.clone()).or_insert(0) += 1;
            assert!(a.life.is_none(), "{}: taxed and closed", t.id);
            if x.schedule.tax_ref == "TREATY-15" {
                assert_eq!(t.side, Side::Asset, "{}", t.id);
            }
        }
        match (a.life, t.events.close_date) {
            (
                Some(
                    LifeKind::Closed
                    | LifeKind::BrokenDays
                    | LifeKind::BrokenRate
                    | LifeKind::BrokenAmount,
                ),
                Some(x),
            ) => {
                // The payout is the last movement, on the close date, out of the account.
                let last = a.movements.last().unwrap();
                assert_eq!(last.value_date, x, "{}", t.id);
                assert!(last.amount < Decimal::ZERO, "{}", t.id);
                assert!(
                    a.movements[..a.movements.len() - 1]
                        .iter()
                        .all(|m| m.value_date < x),
                    "{}",
                    t.id
                );
                assert!(x >= WINDOW_START && x <= CUTOFF, "{}", t.id);
                assert!(t.maturity.is_none_or(|m| x < m), "{}", t.id);
                // Its closing posting ends the day before, in the window.
                assert_eq!(a.statement.as_ref().unwrap().end.succ_opt(), Some(x));
            }
            (None | Some(_), None) => {
                assert!(!matches!(a.life, Some(LifeKind::Closed)), "{}", t.id);
            }
            (other, Some(_)) => panic!("{}: a close date with {other:?}", t.id),
        }
        if a.life == Some(LifeKind::MaturedUnpaid) || a.life == Some(LifeKind::Rollover) {
            assert!(t.maturity.is_some_and(|m| m <= CUTOFF), "{}", t.id);
        }
    }
    let every: BTreeSet<LifeKind> = lives.keys().copied().collect();
    assert_eq!(
        every,
        BTreeSet::from([
            LifeKind::Closed,
            LifeKind::BrokenDays,
            LifeKind::BrokenRate,
            LifeKind::BrokenAmount,
            LifeKind::MaturedUnpaid,
            LifeKind::MaturedRate,
            LifeKind::Rollover,
        ]),
        "{lives:?}"
    );
    assert_eq!(
        taxes.keys().map(String::as_str).collect::<Vec<_>>(),
        ["SAVINGS-TAX", "TAX-EXEMPT", "TREATY-15"]
    );
    // About 1 in 330 savers closed and 1 in 50 terms with an event: 2.3%;
    // 3% savers and 1% loans taxed: 4%.
    let (life, taxed): (u64, u64) = (lives.values().sum(), taxes.values().sum());
    assert!((n / 100..=n * 4 / 100).contains(&life), "{life} {lives:?}");
    assert!(
        (n * 2 / 100..=n * 6 / 100).contains(&taxed),
        "{taxed} {taxes:?}"
    );
}
