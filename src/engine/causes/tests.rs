//! Planted causes: each test posts an amount computed with exactly one
//! mistake and checks that the search names that mistake first.

use super::*;
use crate::engine::reconcile::{reconcile, StatementPeriod, Status};
use crate::engine::run::accrue;

fn d(s: &str) -> NaiveDate {
    s.parse().unwrap()
}

fn n(s: &str) -> Decimal {
    s.parse().unwrap()
}

struct Case {
    terms: AccountTerms,
    rates: RateSchedule,
    movements: Vec<Movement>,
}

fn contract() -> Case {
    let terms = AccountTerms::new(
        "PL-1",
        "USD",
        2,
        Basis::Act360,
        d("2026-10-01"),
        n("1000000.00"),
    );
    let rates = RateSchedule::from_rows([
        (d("2026-01-01"), n("0.0310"), Decimal::ZERO),
        (d("2026-11-20"), n("0.0335"), Decimal::ZERO),
    ]);
    let movements = vec![Movement {
        value_date: d("2026-11-09"),
        amount: n("250000.00"),
        booking_date: Some(d("2026-11-12")),
        reference: Some("DEP-77".into()),
    }];
    Case {
        terms,
        rates,
        movements,
    }
}

fn options() -> RunOptions {
    RunOptions {
        window_start: d("2026-11-01"),
        cutoff: d("2026-11-30"),
        keep_days: true,
        keep_states: true,
        keep_spans: false,
        fast_path: true,
    }
}

/// The November posting the contract's terms give under `mistake`.
fn posted_with(
    c: &Case,
    terms: &AccountTerms,
    rates: &RateSchedule,
    movements: &[Movement],
    period: Option<(NaiveDate, NaiveDate)>,
) -> Decimal {
    let src = Inputs {
        rates,
        debit_rates: None,
        movements,
        actual: &[],
        breaks: &[],
        floating: None,
    };
    let r = accrue(terms, src, options()).unwrap();
    match period {
        Some((s, e)) => expected_over(terms, &r, s, e).unwrap().amount,
        None => {
            let _ = c;
            r.postings
                .iter()
                .find(|p| p.end == d("2026-11-30"))
                .unwrap()
                .expected
        }
    }
}

/// Reconciles the November statement posting `posted` and returns the status and cause.
fn explain(c: &Case, posted: Decimal, tolerance: Tolerance) -> (Status, String) {
    let src = Inputs {
        rates: &c.rates,
        debit_rates: None,
        movements: &c.movements,
        actual: &[],
        breaks: &[],
        floating: None,
    };
    let r = accrue(&c.terms, src, options()).unwrap();
    let st = [StatementPeriod {
        start: d("2026-11-01"),
        end: d("2026-11-30"),
        posted,
        rows: 1,
    }];
    let rows = reconcile(
        &c.terms,
        &r,
        &st,
        d("2026-11-01"),
        d("2026-11-30"),
        &tolerance,
    )
    .unwrap();
    let row = &rows[0];
    (
        row.status,
        likely_cause(&c.terms, &src, &r.states, row, &tolerance),
    )
}

fn assert_first(cause: &str, words: &str) {
    assert!(
        cause.starts_with(words),
        "expected the cause to start with '{words}', got: {cause}"
    );
}

#[test]
fn planted_other_basis() {
    let c = contract();
    let posted = posted_with(
        &c,
        &AccountTerms {
            basis: Basis::Act365F,
            ..c.terms.clone()
        },
        &c.rates,
        &c.movements,
        None,
    );
    let (status, cause) = explain(&c, posted, Tolerance::default());
    assert_eq!(status, Status::UnderPosted);
    assert_first(
        &cause,
        "interest on ACT/365F instead of ACT/360 (reproduces the posted amount exactly)",
    );
    // ACT/365F and NL/365 agree away from 29 February: both named, in list order.
    assert!(
        cause.contains("; or interest on NL/365 instead of ACT/360"),
        "{cause}"
    );
}

#[test]
fn planted_other_compounding() {
    let c = contract();
    let posted = posted_with(
        &c,
        &AccountTerms {
            compounding: Compounding::Daily,
            ..c.terms.clone()
        },
        &c.rates,
        &c.movements,
        None,
    );
    let (status, cause) = explain(&c, posted, Tolerance::default());
    assert_eq!(status, Status::OverPosted);
    assert_first(&cause, "compounding daily instead of simple");
}

#[test]
fn planted_daily_rounding() {
    // Without the deposit: 86.1111 a day to the 19th (rounded down daily),
    // then 93.0556 (rounded up): about three cents over the month.
    let c = Case {
        movements: vec![],
        ..contract()
    };
    let wrong = AccountTerms {
        round_at: RoundAt::Daily,
        ..c.terms.clone()
    };
    let posted = posted_with(&c, &wrong, &c.rates, &c.movements, None);
    let (status, cause) = explain(&c, posted, Tolerance::default());
    assert_eq!(status, Status::OverPosted, "{cause}");
    assert_first(
        &cause,
        "interest rounded daily to 2 places instead of at posting",
    );
}

#[test]
fn planted_rounding_mode_on_a_tie() {
    // 1,000.00 at 1.95% for a regular 30/360 month is exactly 1.625.
    let terms = AccountTerms::new(
        "PL-2",
        "USD",
        2,
        Basis::Thirty360,
        d("2026-11-01"),
        n("1000.00"),
    );
    let rates = RateSchedule::from_rows([(d("2026-01-01"), n("0.0195"), Decimal::ZERO)]);
    let c = Case {
        terms,
        rates,
        movements: vec![],
    };
    let exact = Tolerance {
        amount: Some(Decimal::ZERO),
        bp: Decimal::ZERO,
    };
    let (status, cause) = explain(&c, n("1.62"), exact);
    assert_eq!(status, Status::UnderPosted);
    assert_first(&cause, "rounded half-even instead of half-up");
    assert!(
        cause.contains("; or rounded down instead of half-up"),
        "{cause}"
    );
}

#[test]
fn planted_daily_rounding_places() {
    let c = contract();
    let mut terms = c.terms.clone();
    terms.round_at = RoundAt::Daily;
    terms.round_places = Some(4);
    terms.round_mode = RoundMode::Down;
    let c = Case {
        terms: terms.clone(),
        ..c
    };
    let wrong = AccountTerms {
        round_places: Some(2),
        ..terms
    };
    let posted = posted_with(&c, &wrong, &c.rates, &c.movements, None);
    let (_, cause) = explain(&c, posted, Tolerance::default());
    assert_first(&cause, "each day's interest rounded to 2 places");
}

#[test]
fn planted_period_end_a_day_early() {
    let c = contract();
    let posted = posted_with(
        &c,
        &c.terms,
        &c.rates,
        &c.movements,
        Some((d("2026-11-01"), d("2026-11-29"))),
    );
    let (status, cause) = explain(&c, posted, Tolerance::default());
    assert_eq!(status, Status::UnderPosted);
    assert_first(
        &cause,
        "period end a day early: 2026-11-01..2026-11-29 instead of 2026-11-01..2026-11-30",
    );
}

#[test]
fn planted_period_start_a_day_late() {
    let c = contract();
    let posted = posted_with(
        &c,
        &c.terms,
        &c.rates,
        &c.movements,
        Some((d("2026-11-02"), d("2026-11-30"))),
    );
    let (_, cause) = explain(&c, posted, Tolerance::default());
    assert_first(&cause, "period start a day late");
}

#[test]
fn planted_rate_change_moved() {
    let c = contract();
    let moved = RateSchedule::from_rows([
        (d("2026-01-01"), n("0.0310"), Decimal::ZERO),
        (d("2026-11-23"), n("0.0335"), Decimal::ZERO),
    ]);
    let posted = posted_with(&c, &c.terms, &moved, &c.movements, None);
    let (_, cause) = explain(&c, posted, Tolerance::default());
    assert_first(
        &cause,
        "rate change of 2026-11-20 (3.10% to 3.35%) applied from 2026-11-23 instead",
    );
}

#[test]
fn planted_rate_change_not_applied() {
    let c = contract();
    let flat = RateSchedule::from_rows([(d("2026-01-01"), n("0.0310"), Decimal::ZERO)]);
    let posted = posted_with(&c, &c.terms, &flat, &c.movements, None);
    let (_, cause) = explain(&c, posted, Tolerance::default());
    assert_first(
        &cause,
        "rate change of 2026-11-20 (3.10% to 3.35%) not applied",
    );
}

#[test]
fn planted_movement_moved() {
    let c = contract();
    let mut moved = c.movements.clone();
    moved[0].value_date = d("2026-11-06");
    moved[0].booking_date = None;
    let posted = posted_with(&c, &c.terms, &c.rates, &moved, None);
    let (_, cause) = explain(&c, posted, Tolerance::default());
    assert_first(
        &cause,
        "movement DEP-77 of 250,000.00 valued 2026-11-09 taken from 2026-11-06 instead",
    );
}

#[test]
fn planted_movement_on_its_booking_date() {
    let c = contract();
    let mut booked = c.movements.clone();
    booked[0].value_date = d("2026-11-12");
    booked[0].booking_date = None;
    let posted = posted_with(&c, &c.terms, &c.rates, &booked, None);
    let (_, cause) = explain(&c, posted, Tolerance::default());
    // Moving it 3 days and taking its booking date are the same change here;
    // the move comes first in the list.
    assert!(
        cause.contains("taken from its booking date 2026-11-12 instead"),
        "{cause}"
    );
    assert_first(
        &cause,
        "movement DEP-77 of 250,000.00 valued 2026-11-09 taken from 2026-11-12 instead",
    );
}

#[test]
fn planted_movement_left_out() {
    let c = contract();
    let posted = posted_with(&c, &c.terms, &c.rates, &[], None);
    let (_, cause) = explain(&c, posted, Tolerance::default());
    assert_first(
        &cause,
        "movement DEP-77 of 250,000.00 valued 2026-11-09 left out",
    );
}

/// When nothing reproduces the amount, the implied rate is reported: an
/// ACT/360 month on 1,000,000.00 posted 50.00 high is 50 / (1e6 x 30/360)
/// x 10,000 = 6.00 bp.
#[test]
fn nothing_reproduces_it_so_the_implied_rate_is_given() {
    let terms = AccountTerms::new(
        "PL-3",
        "USD",
        2,
        Basis::Act360,
        d("2026-11-01"),
        n("1000000.00"),
    );
    let rates = RateSchedule::from_rows([(d("2026-01-01"), n("0.03"), Decimal::ZERO)]);
    let c = Case {
        terms,
        rates,
        movements: vec![],
    };
    let (status, cause) = explain(&c, n("2550.00"), Tolerance::default());
    assert_eq!(status, Status::OverPosted);
    assert_eq!(
        cause,
        "no single change reproduces the posted amount; it implies a rate of 3.06% a year against the contract's 3.00% (6.00 bp)"
    );
}

/// A Harbourview Mutual floating note: 10,000,000 compounded in arrears on
/// the invented index HVM-ON, lookback 2, spread 150 bp added after
/// compounding, floored at zero; invented fixings from -0.20% to 0.69%.
struct FloatingCase {
    terms: AccountTerms,
    schedule: FloatingSchedule,
    fixings: crate::engine::floating::Fixings,
}

fn floating_case() -> FloatingCase {
    let mut terms = AccountTerms::new(
        "HVM-FRN-09",
        "USD",
        2,
        Basis::Act360,
        d("2026-10-01"),
        n("10000000.00"),
    );
    terms.floating = FloatingTerms {
        method: RateMethod::CompoundedInArrears,
        lookback_days: 2,
        ..FloatingTerms::default()
    };
    let schedule = FloatingSchedule::from_rows([(
        d("2026-01-01"),
        TierRate::Index(IndexRate {
            index: "HVM-ON".into(),
            spread: n("0.015"),
            floor: Some(Decimal::ZERO),
            cap: None,
        }),
        Decimal::ZERO,
    )]);
    let mut series = std::collections::BTreeMap::new();
    let mut day = d("2026-09-15");
    let mut k = 0i64;
    while day <= d("2026-12-10") {
        if terms.calendar.is_business_day(day) {
            series.insert(day, Decimal::new((k * 37) % 90 - 20, 4));
            k += 1;
        }
        day = day.succ_opt().unwrap();
    }
    FloatingCase {
        terms,
        schedule,
        fixings: std::collections::BTreeMap::from([("HVM-ON".to_string(), series)]),
    }
}

fn floating_sources<'a>(
    c: &'a FloatingCase,
    schedule: &'a FloatingSchedule,
    empty: &'a RateSchedule,
) -> Inputs<'a> {
    Inputs {
        rates: empty,
        debit_rates: None,
        movements: &[],
        actual: &[],
        breaks: &[],
        floating: Some(FloatingRates {
            schedule,
            fixings: &c.fixings,
            fallback: crate::engine::floating::FixingFallback::None,
        }),
    }
}

/// The November posting under `terms` and `schedule`, and the cause the
/// search gives for it against the contract.
fn floating_cause(c: &FloatingCase, terms: &AccountTerms, schedule: &FloatingSchedule) -> String {
    let empty = RateSchedule::default();
    let wrong = accrue(terms, floating_sources(c, schedule, &empty), options()).unwrap();
    let posted = wrong
        .postings
        .iter()
        .find(|p| p.end == d("2026-11-30"))
        .unwrap()
        .expected;
    let sources = floating_sources(c, &c.schedule, &empty);
    let r = accrue(&c.terms, sources, options()).unwrap();
    let st = [StatementPeriod {
        start: d("2026-11-01"),
        end: d("2026-11-30"),
        posted,
        rows: 1,
    }];
    let tolerance = Tolerance::default();
    let rows = reconcile(
        &c.terms,
        &r,
        &st,
        d("2026-11-01"),
        d("2026-11-30"),
        &tolerance,
    )
    .unwrap();
    assert!(
        matches!(rows[0].status, Status::OverPosted | Status::UnderPosted),
        "{:?}",
        rows[0]
    );
    likely_cause(&c.terms, &sources, &r.states, &rows[0], &tolerance)
}

/// Likely causes with Floating rates: a lookback mis-set by a business day is found.
#[test]
fn a_floating_lookback_mis_set_is_found() {
    let c = floating_case();
    let mut wrong = c.terms.clone();
    wrong.floating.lookback_days = 3;
    let cause = floating_cause(&c, &wrong, &c.schedule);
    assert_first(
        &cause,
        "a lookback of 3 business days instead of 2 (reproduces",
    );
}

/// Likely causes with Floating rates: an observation shift applied by mistake is found.
#[test]
fn a_floating_observation_shift_is_found() {
    let c = floating_case();
    let mut wrong = c.terms.clone();
    wrong.floating.observation_shift = true;
    let cause = floating_cause(&c, &wrong, &c.schedule);
    assert_first(
        &cause,
        "an observation shift (the lookback moves the weights too) (reproduces",
    );
}

/// Likely causes with Floating rates: the spread compounded instead of added after is found.
#[test]
fn a_floating_spread_compounded_is_found() {
    let c = floating_case();
    let mut wrong = c.terms.clone();
    wrong.floating.spread_compounded = true;
    let cause = floating_cause(&c, &wrong, &c.schedule);
    assert_first(
        &cause,
        "the spread compounded with the fixings instead of added after",
    );
}

/// Likely causes with Floating rates: a floor left out is found.
#[test]
fn a_floating_floor_not_applied_is_found() {
    let c = floating_case();
    let unfloored = FloatingSchedule::from_rows([(
        d("2026-01-01"),
        TierRate::Index(IndexRate {
            index: "HVM-ON".into(),
            spread: n("0.015"),
            floor: None,
            cap: None,
        }),
        Decimal::ZERO,
    )]);
    let cause = floating_cause(&c, &c.terms, &unfloored);
    assert_first(&cause, "the floor not applied (reproduces");
}
