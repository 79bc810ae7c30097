//! Tests of the generator: the mix a book holds, the planted mistakes, and
//! that the same seed gives the same rows.

use std::collections::BTreeSet;

use super::*;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::schedule::Posting;

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

/// 0 to 6 movements and 0 to 2 rate changes per account, each count seen;
/// one statement row for a period ending in the window.
#[test]
fn movements_rate_changes_and_statements_per_account() {
    let g = Generator::new(2026, 3000);
    let accounts = book(2026, 3000);
    let moves: BTreeSet<usize> = accounts.iter().map(|a| a.movements.len()).collect();
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
        let s = a.statement.as_ref().unwrap();
        assert!(
            s.end >= WINDOW_START && s.end <= CUTOFF,
            "{}",
            a.entry.terms.id
        );
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
    for a in &accounts {
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
    for a in book(3, 200) {
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
    let g = Generator::new(3, 1);
    for sheet in [SheetKind::Rates, SheetKind::Holidays, SheetKind::Settings] {
        for r in g.fixed_rows(sheet) {
            assert_eq!(r.len(), width(sheet));
        }
    }
    assert!(HOLIDAY_ROWS.iter().all(|(_, d, _)| *d != NaiveDate::MIN));
    assert!([CUTOFF, WINDOW_START].iter().all(|d| *d != NaiveDate::MIN));
}

/// Every sheet of the generated book is a sheet of the book format, once,
/// in the format's order; the Fixings sheet and the ledger's Booked and
/// Trial balance sheets are the ones left out.
#[test]
fn the_sheets_follow_the_book_format() {
    let kinds: Vec<SheetKind> = SHEETS.iter().map(|s| s.sheet).collect();
    let expected: Vec<SheetKind> = SheetKind::ALL
        .into_iter()
        .filter(|k| {
            ![
                SheetKind::Fixings,
                SheetKind::Booked,
                SheetKind::TrialBalance,
            ]
            .contains(k)
        })
        .collect();
    assert_eq!(kinds, expected);
    assert_eq!(
        SHEETS[0].labels()[..5],
        ["account", "name", "currency", "side", "day_count"]
    );
}
