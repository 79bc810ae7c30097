//! The cheaper search names exactly what re-running every change names: one
//! test per rule that it skips what it should and keeps what it must, and a
//! property test on random accounts with random planted mistakes.

use std::sync::Arc;

use chrono::{Datelike, Days};
use proptest::prelude::*;
use rust_decimal::Decimal;

use super::super::{
    changes, rerun, search_with, state_for, unchanged, Change, ChangeKind, Effort, LikelyCause,
};
use super::*;
use crate::conventions::calendar::Calendar;
use crate::conventions::daycount::Basis;
use crate::conventions::schedule::Posting;
use crate::engine::rates::RateSchedule;
use crate::engine::reconcile::{reconcile, StatementPeriod, Tolerance};
use crate::engine::run::{accrue, RunOptions};
use crate::engine::terms::RoundAt;

fn d(s: &str) -> NaiveDate {
    s.parse().unwrap()
}

fn n(s: &str) -> Decimal {
    s.parse().unwrap()
}

/// One account with its rates and movements, reconciled over statement periods.
#[derive(Debug)]
struct Book {
    terms: AccountTerms,
    rates: RateSchedule,
    movements: Vec<Movement>,
    cutoff: NaiveDate,
}

impl Book {
    fn inputs<'a>(&'a self, breaks: &'a [NaiveDate]) -> Inputs<'a> {
        Inputs {
            rates: &self.rates,
            debit_rates: None,
            movements: &self.movements,
            actual: &[],
            breaks,
            floating: None,
        }
    }

    /// The rows of `periods` (first day, last day, posted) as the pipeline
    /// makes them, with the states the search starts from.
    fn rows(
        &self,
        periods: &[(NaiveDate, NaiveDate, Decimal)],
    ) -> (Vec<Reconciled>, Vec<AccrualState>) {
        let breaks: Vec<NaiveDate> = periods
            .iter()
            .flat_map(|(s, e, _)| [s.pred_opt().unwrap(), *e])
            .collect();
        let window = self.cutoff.with_day0(0).unwrap();
        let options = RunOptions {
            window_start: window,
            cutoff: self.cutoff,
            keep_days: false,
            keep_states: true,
            keep_spans: true,
            fast_path: true,
        };
        let r = accrue(&self.terms, self.inputs(&breaks), options).unwrap();
        let statements: Vec<StatementPeriod> = periods
            .iter()
            .map(|&(start, end, posted)| StatementPeriod {
                start,
                end,
                posted,
                rows: 1,
            })
            .collect();
        let rows = reconcile(
            &self.terms,
            &r,
            &statements,
            window,
            self.cutoff,
            &Tolerance::default(),
        )
        .unwrap();
        (rows, r.states)
    }

    /// The cheaper and the full search's findings for each row.
    fn both(&self, periods: &[(NaiveDate, NaiveDate, Decimal)]) -> Vec<(LikelyCause, LikelyCause)> {
        let (rows, states) = self.rows(periods);
        let inputs = self.inputs(&[]);
        let t = Tolerance::default();
        rows.iter()
            .map(|row| {
                (
                    search_with(&self.terms, &inputs, &states, row, &t, Effort::Cheaper),
                    search_with(&self.terms, &inputs, &states, row, &t, Effort::Full),
                )
            })
            .collect()
    }

    /// Whether the change named `words` is one the rules skip for the row
    /// of `period`.
    fn skips(&self, period: (NaiveDate, NaiveDate), words: &str) -> bool {
        let (rows, states) = self.rows(&[(period.0, period.1, Decimal::ONE_HUNDRED)]);
        let row = &rows[0];
        let inputs = self.inputs(&[]);
        let start = state_for(&states, &self.terms, row.start);
        let base = unchanged(&self.terms, &inputs, &states, row, &Tolerance::default())
            .expect("the unchanged account is outside tolerance");
        let change = changes(&self.terms, &inputs, row)
            .into_iter()
            .find(|c| c.words.starts_with(words))
            .unwrap_or_else(|| panic!("no change '{words}'"));
        cannot_move(change.touch, &self.terms, &inputs, row, &start)
            .is_some_and(|days| base.posts_on(&days))
    }
}

/// A deposit of 100,000.00 at 3.10%, 3.35% from 20 November; a deposit of
/// 25,000.00 valued 9 November; monthly postings at month ends.
fn deposit() -> Book {
    let mut terms = AccountTerms::new(
        "SK-1",
        "USD",
        2,
        Basis::Act360,
        d("2026-09-01"),
        n("100000.00"),
    );
    terms.capitalise = true;
    Book {
        terms,
        rates: RateSchedule::from_rows([
            (d("2026-01-01"), n("0.0310"), Decimal::ZERO),
            (d("2026-11-20"), n("0.0335"), Decimal::ZERO),
            (d("2026-12-03"), n("0.0350"), Decimal::ZERO),
        ]),
        movements: vec![
            Movement {
                value_date: d("2026-10-29"),
                amount: n("5000.00"),
                booking_date: None,
                reference: Some("DEP-1".into()),
            },
            Movement {
                value_date: d("2026-12-02"),
                amount: n("25000.00"),
                booking_date: None,
                reference: Some("DEP-2".into()),
            },
        ],
        cutoff: d("2026-12-31"),
    }
}

const NOVEMBER: (&str, &str) = ("2026-11-01", "2026-11-30");

fn november() -> (NaiveDate, NaiveDate) {
    (d(NOVEMBER.0), d(NOVEMBER.1))
}

#[test]
fn a_rate_change_after_the_period_in_both_places_is_skipped() {
    let b = deposit();
    assert!(b.skips(
        november(),
        "rate change of 2026-12-03 (3.35% to 3.50%) applied from 2026-12-01"
    ));
    assert!(b.skips(
        november(),
        "rate change of 2026-12-03 (3.35% to 3.50%) not applied"
    ));
    // Moved into the period, it moves the period.
    assert!(!b.skips(
        november(),
        "rate change of 2026-12-03 (3.35% to 3.50%) applied from 2026-11-30"
    ));
}

#[test]
fn a_movement_after_the_period_in_both_places_is_skipped() {
    let b = deposit();
    assert!(b.skips(
        november(),
        "movement DEP-2 of 25,000.00 valued 2026-12-02 taken from 2026-12-07"
    ));
    assert!(b.skips(
        november(),
        "movement DEP-2 of 25,000.00 valued 2026-12-02 left out"
    ));
    assert!(!b.skips(
        november(),
        "movement DEP-2 of 25,000.00 valued 2026-12-02 taken from 2026-11-30"
    ));
}

#[test]
fn a_movement_left_out_after_the_period_is_re_run_when_a_later_one_is_owed_back_value() {
    // LATE, valued in October and booked in December, is owed October's
    // back-value at November's start. Leaving out DEP-2, listed before it,
    // shifts LATE's place in the list, which the owed back-value is kept by.
    let mut b = deposit();
    b.movements = vec![
        b.movements[1].clone(),
        Movement {
            value_date: d("2026-10-20"),
            amount: n("40000.00"),
            booking_date: Some(d("2026-12-15")),
            reference: Some("LATE".into()),
        },
    ];
    let left_out = "movement DEP-2 of 25,000.00 valued 2026-12-02 left out";
    assert!(!b.skips(november(), left_out));
    assert!(b.skips(
        november(),
        "movement DEP-2 of 25,000.00 valued 2026-12-02 taken from 2026-12-07"
    ));
    // Listed after LATE, leaving it out shifts nothing that is owed.
    b.movements.reverse();
    assert!(b.skips(november(), left_out));
}

#[test]
fn a_move_before_the_period_carries_into_it_when_the_account_capitalises() {
    let mut b = deposit();
    let words = "movement DEP-1 of 5,000.00 valued 2026-10-29 taken from 2026-10-27";
    // The October posting capitalises October's interest: November's balance differs.
    assert!(!b.skips(november(), words));
    b.terms.capitalise = false;
    assert!(b.skips(november(), words));
    // Moved into the period, the balance of its first day differs.
    assert!(!b.skips(
        november(),
        "movement DEP-1 of 5,000.00 valued 2026-10-29 taken from 2026-11-02"
    ));
    // Under periodic compounding the interest joins the base.
    b.terms.compounding = Compounding::Monthly;
    assert!(!b.skips(november(), words));
}

#[test]
fn a_move_before_the_period_carries_when_a_movement_is_booked_late() {
    let mut b = deposit();
    b.terms.capitalise = false;
    b.movements[0].booking_date = Some(d("2026-11-03"));
    // The October base leaves the deposit out; its back-value posts in November.
    assert!(!b.skips(
        november(),
        "movement DEP-1 of 5,000.00 valued 2026-10-29 taken from 2026-10-27"
    ));
}

#[test]
fn bases_that_give_every_day_a_365th_run_alike_outside_leap_years() {
    let (a, b) = (d("2026-11-01"), d("2027-12-31"));
    assert!(same_fractions(Basis::Act365F, Basis::Nl365, a, b));
    assert!(same_fractions(Basis::Nl365, Basis::ActActIsda, a, b));
    // A leap year in the run: 29 February and 1/366 tell them apart.
    assert!(!same_fractions(
        Basis::Act365F,
        Basis::ActActIsda,
        a,
        d("2028-01-01")
    ));
    assert!(!same_fractions(Basis::Act365F, Basis::Act360, a, b));
    assert!(!same_fractions(Basis::Act365F, Basis::Act365L, a, b));

    // An ACT/360 account in 2026: NL/365 and ACT/ACT ISDA repeat ACT/365F's re-run.
    let book = deposit();
    let (rows, states) = book.rows(&[(november().0, november().1, Decimal::ONE_HUNDRED)]);
    let start = state_for(&states, &book.terms, rows[0].start);
    let mut list = changes(&book.terms, &book.inputs(&[]), &rows[0]);
    same_fractions_as_earlier(&mut list, start.day, rows[0].end);
    let at = |words: &str| {
        list.iter()
            .position(|c| c.words.starts_with(words))
            .unwrap()
    };
    let act365f = at("interest on ACT/365F");
    assert_eq!(list[at("interest on NL/365")].same_as, Some(act365f));
    assert_eq!(list[at("interest on ACT/ACT ISDA")].same_as, Some(act365f));
    assert_eq!(list[at("interest on ACT/365L")].same_as, None);
    // An ACT/365F account: the other two are the unchanged account.
    let mut book = deposit();
    book.terms.basis = Basis::Act365F;
    assert!(book.skips(november(), "interest on NL/365 instead of ACT/365F"));
    assert!(!book.skips(november(), "interest on ACT/360 instead of ACT/365F"));
}

#[test]
fn daily_rounding_to_the_minor_unit_is_the_rounding_point_change() {
    let book = deposit();
    let (rows, _) = book.rows(&[(november().0, november().1, Decimal::ONE_HUNDRED)]);
    let list = changes(&book.terms, &book.inputs(&[]), &rows[0]);
    let at = |words: &str| {
        list.iter()
            .position(|c| c.words.starts_with(words))
            .unwrap()
    };
    let point = at("interest rounded daily to 2 places instead of at posting");
    assert_eq!(
        list[at("each day's interest rounded to 2 places")].same_as,
        Some(point)
    );
    assert_eq!(
        list[at("each day's interest rounded to 3 places")].same_as,
        None
    );
}

#[test]
fn compounding_whose_ends_are_all_posting_ends_is_skipped() {
    let b = deposit();
    // Monthly postings: every quarter end is a posting end.
    assert!(b.skips(november(), "compounding quarterly instead of simple"));
    assert!(b.skips(november(), "compounding monthly instead of simple"));
    assert!(!b.skips(november(), "compounding daily instead of simple"));
    let mut q = deposit();
    q.terms.posting = Posting::Quarterly;
    // Quarterly postings at 31 December: 31 October is a compounding end inside.
    let period = (d("2026-10-01"), d("2026-12-31"));
    assert!(!q.skips(period, "compounding monthly instead of simple"));
    assert!(q.skips(period, "compounding quarterly instead of simple"));
}

#[test]
fn a_skipped_change_still_counts_when_the_unchanged_account_is_within_tolerance() {
    // The unchanged account posts exactly: every change is re-run, and those
    // that cannot move the period are found with it.
    let b = deposit();
    let (rows, _) = b.rows(&[(november().0, november().1, Decimal::ZERO)]);
    let expected = rows[0].expected;
    // (The first row is November's; the rest are postings no statement covers.)
    let found = b.both(&[(november().0, november().1, expected)]);
    assert!(found.iter().all(|(cheaper, full)| cheaper == full));
    if let Some((cheaper, _)) = found.first() {
        assert!(
            cheaper
                .text()
                .contains("compounding quarterly instead of simple (reproduces"),
            "{}",
            cheaper.text()
        );
    }
}

/// A random account around one statement period: rate changes and
/// movements within days of its ends, capitalised or not, simple or periodic
/// compounding, any posting frequency and anchor.
#[allow(clippy::type_complexity)]
fn any_book() -> impl Strategy<Value = (Book, (NaiveDate, NaiveDate))> {
    let near = || (0u8..2, -8i64..9);
    (
        (
            prop::sample::select(vec![
                Basis::Act360,
                Basis::Act365F,
                Basis::Nl365,
                Basis::Thirty360,
                Basis::ActActIsda,
            ]),
            prop::sample::select(vec![
                Compounding::Simple,
                Compounding::Simple,
                Compounding::Monthly,
                Compounding::Quarterly,
                Compounding::Daily,
            ]),
            prop::sample::select(vec![
                Posting::Monthly,
                Posting::Monthly,
                Posting::Quarterly,
                Posting::Semiannual,
                Posting::None,
            ]),
            prop::option::of(0i64..28),
            any::<bool>(),
            0u8..10,
        ),
        (
            0i64..60,
            1i64..100_000_000,
            20i64..120,
            0i64..100,
            any::<bool>(),
        ),
        prop::collection::vec((near(), 0i64..900), 0..4),
        prop::collection::vec(
            (
                near(),
                -5_000_000i64..5_000_000,
                prop::option::of(-3i64..60),
            ),
            0..5,
        ),
    )
        .prop_map(
            |(
                (basis, compounding, posting, anchor, capitalise, daily),
                (from, cents, len, tail, aligned),
                changes,
                moves,
            )| {
                // Half the accounts run into 2028, a leap year.
                let open = if daily >= 5 {
                    d("2027-10-01")
                } else {
                    d("2026-03-01")
                };
                let start = open + Days::new(from as u64 + 20);
                // Half the periods start a calendar month, as month-end postings do.
                let start = if aligned {
                    start.with_day(1).unwrap()
                } else {
                    start
                };
                let end = start + Days::new(len as u64);
                let at = |(which, k): (u8, i64)| {
                    let x = if which == 0 { start } else { end };
                    if k >= 0 {
                        x + Days::new(k as u64)
                    } else {
                        x - Days::new(k.unsigned_abs())
                    }
                };
                let mut terms =
                    AccountTerms::new("SK-P", "USD", 2, basis, open, Decimal::new(cents, 2));
                terms.compounding = compounding;
                terms.posting = posting;
                terms.anchor = anchor.map(|a| d("2026-01-01") + Days::new(a as u64));
                terms.capitalise = capitalise;
                if daily == 0 {
                    terms.round_at = RoundAt::Daily;
                }
                terms.calendar = Arc::new(Calendar::new("X", [d("2026-12-24"), d("2027-01-04")]));
                let mut rows = vec![(d("2020-01-01"), n("0.0325"), Decimal::ZERO)];
                for (day, bp) in changes {
                    rows.push((at(day), Decimal::new(bp, 4), Decimal::ZERO));
                }
                let movements = moves
                    .into_iter()
                    .enumerate()
                    .map(|(i, (day, cents, booked))| {
                        let v = at(day).max(open);
                        Movement {
                            value_date: v,
                            amount: Decimal::new(cents, 2),
                            booking_date: booked.map(|k| {
                                if k >= 0 {
                                    v + Days::new(k as u64)
                                } else {
                                    v - Days::new(k.unsigned_abs())
                                }
                            }),
                            reference: Some(format!("M-{i}").into()),
                        }
                    })
                    .collect();
                let cutoff = end + Days::new(tail as u64);
                let book = Book {
                    terms,
                    rates: RateSchedule::from_rows(rows),
                    movements,
                    cutoff,
                };
                (book, (start, end))
            },
        )
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// Whatever the planted mistake (one of the search's own changes, off by
    /// up to two cents; or none), the cheaper search's finding is the full
    /// search's: the same changes, words and order, or the same implied rate.
    #[test]
    fn the_cheaper_search_finds_what_the_full_search_finds(
        (book, (start, end)) in any_book(),
        plant in any::<prop::sample::Index>(),
        off in -2i64..3,
        none in 0u8..6,
    ) {
        let (rows, states) = book.rows(&[(start, end, Decimal::ZERO)]);
        let row = &rows[0];
        let inputs = book.inputs(&[]);
        let list = changes(&book.terms, &inputs, row);
        let planted = if none == 0 || list.is_empty() {
            Some(row.expected)
        } else {
            let change = &list[plant.index(list.len())];
            rerun(&book.terms, &inputs, &states, row, change).map(|(gap, _)| -gap)
        };
        let posted = planted.unwrap_or(row.expected) + Decimal::new(off, 2);
        for (cheaper, full) in book.both(&[(start, end, posted)]) {
            prop_assert_eq!(cheaper, full);
        }
    }

    /// Every change the rules skip re-runs to the unchanged account's gap
    /// and balance-years, or does not compute: the rules' proofs, checked
    /// change by change whatever the posted amount.
    #[test]
    fn every_skipped_change_reruns_to_the_unchanged_figures((book, (start, end)) in any_book()) {
        let (rows, states) = book.rows(&[(start, end, Decimal::ZERO)]);
        let row = &rows[0];
        let inputs = book.inputs(&[]);
        let Some(base) = unchanged(&book.terms, &inputs, &states, row, &Tolerance::default()) else {
            return Ok(());
        };
        let same = Change::new(ChangeKind::Period, String::new(), row.start);
        let figures = rerun(&book.terms, &inputs, &states, row, &same);
        prop_assert!(figures.is_some());
        for change in changes(&book.terms, &inputs, row) {
            let start = state_for(&states, &book.terms, row.start);
            if cannot_move(change.touch, &book.terms, &inputs, row, &start).is_some_and(|days| base.posts_on(&days)) {
                let again = rerun(&book.terms, &inputs, &states, row, &change);
                prop_assert!(again.is_none() || again == figures, "{}: {:?} against {:?}", change.words, again, figures);
            }
        }
    }
}
