//! Floating rates against the past-coupon cases of QuantLib's overnight
//! coupon test-suite (figures as listed in the conventions reference,
//! section 4.3), the computed daily factor table, and the rules of
//! behaviour.md, Floating rates that those cases do not pin.

use std::sync::Arc;

use super::*;
use crate::conventions::schedule::Posting;
use crate::engine::run::{accrue, AccountResult, RunOptions};
use crate::engine::terms::FloatingTerms;
use crate::engine::AccountTerms;
use crate::engine::Inputs;

fn d(s: &str) -> NaiveDate {
    s.parse().unwrap()
}

fn n(s: &str) -> Decimal {
    s.parse().unwrap()
}

/// Weekends plus the two holidays the reference cases fall around:
/// 4 July 2019 and Veterans Day, 11 November 2021.
fn overnight_calendar() -> Arc<Calendar> {
    Arc::new(Calendar::new("US-ON", [d("2019-07-04"), d("2021-11-11")]))
}

/// The fixings of the reference cases, in percent, for the index "SOFR".
/// Source: QuantLib test-suite/overnightindexedcoupon.cpp (fixings added to
/// the Sofr index), as listed in the conventions reference section 4.3.
fn reference_fixings() -> Fixings {
    let rows: &[(&str, &str)] = &[
        ("2019-06-21", "2.37"),
        ("2019-06-24", "2.39"),
        ("2019-06-25", "2.41"),
        ("2019-06-26", "2.43"),
        ("2019-06-27", "2.42"),
        ("2019-06-28", "2.50"),
        ("2019-07-01", "2.42"),
        ("2019-07-02", "2.51"),
        ("2019-07-03", "2.56"),
        ("2019-07-05", "2.59"),
        ("2019-07-08", "2.48"),
        ("2019-07-09", "2.45"),
        ("2019-07-10", "2.46"),
        ("2019-07-11", "2.41"),
        ("2019-07-12", "2.36"),
        ("2019-07-15", "2.46"),
        ("2019-07-16", "2.47"),
        ("2019-07-17", "2.47"),
        ("2019-07-18", "2.46"),
        ("2019-07-19", "2.41"),
        ("2019-07-22", "2.40"),
        ("2019-07-23", "2.40"),
        ("2019-07-24", "2.41"),
        ("2019-07-25", "2.42"),
        ("2019-07-26", "2.41"),
        ("2019-07-29", "2.40"),
        ("2019-07-30", "2.39"),
        ("2019-07-31", "2.55"),
        ("2019-08-01", "2.19"),
        ("2019-08-02", "2.19"),
        ("2019-08-05", "2.13"),
        ("2021-10-18", "0.08"),
        ("2021-10-19", "0.09"),
        ("2021-10-20", "0.08"),
        ("2021-10-21", "0.10"),
        ("2021-10-22", "0.12"),
        ("2021-10-25", "0.11"),
        ("2021-10-26", "0.13"),
        ("2021-10-27", "0.12"),
        ("2021-10-28", "0.12"),
        ("2021-10-29", "0.08"),
        ("2021-11-01", "0.09"),
        ("2021-11-02", "0.10"),
        ("2021-11-03", "0.11"),
        ("2021-11-04", "0.14"),
        ("2021-11-05", "0.13"),
        ("2021-11-08", "0.11"),
        ("2021-11-09", "0.09"),
        ("2021-11-10", "0.08"),
        ("2021-11-12", "0.07"),
        ("2021-11-15", "0.08"),
        ("2021-11-16", "0.08"),
        ("2021-11-17", "0.07"),
        ("2021-11-18", "0.09"),
        ("2021-11-19", "0.10"),
        ("2021-11-22", "0.09"),
    ];
    let series = rows
        .iter()
        .map(|(day, pct)| (d(day), n(pct) / Decimal::ONE_HUNDRED))
        .collect();
    BTreeMap::from([("SOFR".to_string(), series)])
}

fn index(spread_bp: &str) -> TierRate {
    TierRate::Index(IndexRate {
        index: "SOFR".into(),
        spread: n(spread_bp) / Decimal::from(10_000),
        floor: None,
        cap: None,
    })
}

fn schedule(rate: TierRate) -> FloatingSchedule {
    FloatingSchedule::from_rows([(d("2019-01-01"), rate, Decimal::ZERO)])
}

/// A notional of 10,000 earning from `start` to `end` (one posting at the
/// end of `end` - 1), compounded in arrears on ACT/360.
fn coupon(start: &str, end: &str, floating: FloatingTerms) -> AccountTerms {
    let mut t = AccountTerms::new("HVM-FRN", "USD", 2, Basis::Act360, d(start), n("10000"));
    t.calendar = overnight_calendar();
    t.posting = Posting::Maturity;
    t.maturity = Some(d(end));
    t.floating = FloatingTerms {
        method: RateMethod::CompoundedInArrears,
        ..floating
    };
    t
}

fn run(t: &AccountTerms, s: &FloatingSchedule, fixings: &Fixings, cutoff: &str) -> AccountResult {
    let empty = RateSchedule::default();
    let src = Inputs {
        rates: &empty,
        debit_rates: None,
        movements: &[],
        actual: &[],
        breaks: &[],
        floating: Some(FloatingRates {
            schedule: s,
            fixings,
            fallback: FixingFallback::None,
        }),
    };
    let o = RunOptions {
        window_start: d(cutoff),
        cutoff: d(cutoff),
        keep_days: true,
        keep_states: false,
        keep_spans: false,
        fast_path: true,
    };
    accrue(t, src, o).unwrap()
}

/// The coupon rate a period's unrounded interest amounts to:
/// interest / notional x 360 / days.
fn coupon_rate(t: &AccountTerms, s: &FloatingSchedule) -> Decimal {
    let end = t.maturity.unwrap();
    let r = run(
        t,
        s,
        &reference_fixings(),
        &end.pred_opt().unwrap().to_string(),
    );
    let days = Decimal::from((end - t.open_date).num_days());
    r.postings[0].interest / n("10000") * Decimal::from(360) / days
}

fn assert_close(got: Decimal, want: &str, within: &str) {
    let gap = (got - n(want)).abs();
    assert!(gap <= n(within), "{got} against {want}: off by {gap}");
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp, testPastCouponRate.
#[test]
fn a_past_coupon_without_options() {
    let t = coupon("2021-10-18", "2021-11-18", FloatingTerms::default());
    assert_close(
        coupon_rate(&t, &schedule(index("0"))),
        "0.000987136104",
        "1e-12",
    );
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testPastSpreadedCouponRate (spread of 1 bp compounded daily).
#[test]
fn a_spread_compounded_with_the_fixings() {
    let t = coupon(
        "2021-10-18",
        "2021-11-18",
        FloatingTerms {
            spread_compounded: true,
            ..FloatingTerms::default()
        },
    );
    let rate = coupon_rate(&t, &schedule(index("1")));
    assert_close(rate, "0.0010871445057780704", "1e-12");
    // The product's exact rational value (computed with exact fractions, no
    // source) is 0.00108714450578936186212011717...: the engine holds 25
    // digits of it; the reference figure, in binary floating point, about 12.
    assert_close(rate, "0.0010871445057893618621201172", "1e-25");
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testPastSpreadedCouponRate (spread of 1 bp added after compounding).
#[test]
fn a_spread_added_after_compounding() {
    let t = coupon("2021-10-18", "2021-11-18", FloatingTerms::default());
    let rate = coupon_rate(&t, &schedule(index("1")));
    assert_close(rate, "0.0010871361040194164", "1e-12");
    // Exactly the unspreaded rate plus 1 bp: 0.00108713610402492796204861511...
    // by exact fractions (computed, no source).
    assert_close(rate, "0.0010871361040249279620486151", "1e-25");
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testPastCouponRateWithLookback (5 business days, no shift).
#[test]
fn a_lookback_without_shift() {
    let t = coupon(
        "2019-07-01",
        "2019-07-15",
        FloatingTerms {
            lookback_days: 5,
            ..FloatingTerms::default()
        },
    );
    assert_close(
        coupon_rate(&t, &schedule(index("0"))),
        "0.024781644454",
        "1e-12",
    );
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testPastCouponRateWithLookbackAndObservationShift (observation period
/// 2019-06-24 to 2019-07-24).
#[test]
fn a_lookback_with_observation_shift() {
    let t = coupon(
        "2019-07-01",
        "2019-07-31",
        FloatingTerms {
            lookback_days: 5,
            observation_shift: true,
            ..FloatingTerms::default()
        },
    );
    assert_close(
        coupon_rate(&t, &schedule(index("0"))),
        "0.024603611707",
        "1e-12",
    );
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testPastCouponRateWithLookbackObservationShiftAndLockout.
#[test]
fn a_lookback_with_shift_and_lockout() {
    let t = coupon(
        "2019-07-01",
        "2019-07-31",
        FloatingTerms {
            lookback_days: 5,
            observation_shift: true,
            lockout_days: 3,
            ..FloatingTerms::default()
        },
    );
    assert_close(
        coupon_rate(&t, &schedule(index("0"))),
        "0.024693783702",
        "1e-12",
    );
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testPastCouponRateWithLockout: with a lockout of 3 the last four fixing
/// dates of the July 2019 coupon are all 2019-07-25.
#[test]
fn a_lockout_freezes_the_last_fixings() {
    let t = coupon(
        "2019-07-01",
        "2019-07-31",
        FloatingTerms {
            lockout_days: 3,
            ..FloatingTerms::default()
        },
    );
    let r = run(
        &t,
        &schedule(index("0")),
        &reference_fixings(),
        "2019-07-30",
    );
    let dates: Vec<(NaiveDate, NaiveDate)> = r
        .days
        .iter()
        .filter(|x| x.date >= d("2019-07-24"))
        .map(|x| (x.date, x.fixing.as_ref().unwrap().date))
        .collect();
    let want = [
        ("2019-07-24", "2019-07-24"),
        ("2019-07-25", "2019-07-25"),
        ("2019-07-26", "2019-07-25"),
        ("2019-07-27", "2019-07-25"),
        ("2019-07-28", "2019-07-25"),
        ("2019-07-29", "2019-07-25"),
        ("2019-07-30", "2019-07-25"),
    ];
    assert_eq!(dates, want.map(|(a, b)| (d(a), d(b))));
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testAccruedAmountInThePast: a coupon of 2021-10-18 to 2022-01-18 accrued
/// to 2021-11-18 holds 10000 x 0.000987136104 x 31/360.
#[test]
fn accrued_part_way_through_a_coupon() {
    let mut t = coupon("2021-10-18", "2022-01-18", FloatingTerms::default());
    t.posting = Posting::Quarterly;
    t.anchor = Some(d("2022-01-17"));
    let r = run(
        &t,
        &schedule(index("0")),
        &reference_fixings(),
        "2021-11-17",
    );
    let accrued = r.days.last().unwrap().accrued;
    let want = n("10000") * n("0.000987136104") * Decimal::from(31) / Decimal::from(360);
    assert_close(accrued, &want.to_string(), "1e-8");
}

/// Source: QuantLib test-suite/overnightindexedcoupon.cpp,
/// testAccruedAmountOnPastHoliday: accrued to Saturday 2021-11-13 the
/// Friday fixing counts one day, and the amount is 10000 x 0.000074724810.
#[test]
fn accrued_to_a_weekend_counts_the_days_to_it() {
    let mut t = coupon("2021-10-18", "2022-01-18", FloatingTerms::default());
    t.posting = Posting::Quarterly;
    t.anchor = Some(d("2022-01-17"));
    let r = run(
        &t,
        &schedule(index("0")),
        &reference_fixings(),
        "2021-11-12",
    );
    assert_close(r.days.last().unwrap().accrued, "0.74724810", "1e-8");
}

/// The daily cumulative factors of the first case (computed, conventions
/// reference section 4.3): each business day's amount is
/// 10,000 x (CF after it - CF before it), to 8 decimal places.
#[test]
fn the_daily_factor_table_of_the_first_case() {
    let table: &[(&str, &str)] = &[
        ("2021-10-18", "0.02222222"),
        ("2021-10-19", "0.02500006"),
        ("2021-10-20", "0.02222233"),
        ("2021-10-21", "0.02777797"),
        ("2021-10-22", "0.10000097"),
        ("2021-10-25", "0.03055616"),
        ("2021-10-26", "0.03611193"),
        ("2021-10-27", "0.03333421"),
        ("2021-10-28", "0.03333432"),
        ("2021-10-29", "0.06666887"),
        ("2021-11-01", "0.02500099"),
        ("2021-11-02", "0.02777895"),
        ("2021-11-03", "0.03055693"),
        ("2021-11-04", "0.03889076"),
        ("2021-11-05", "0.10833896"),
        ("2021-11-08", "0.03055747"),
        ("2021-11-09", "0.02500165"),
        ("2021-11-10", "0.04444748"),
        ("2021-11-12", "0.05833758"),
        ("2021-11-15", "0.02222397"),
        ("2021-11-16", "0.02222402"),
        ("2021-11-17", "0.01944606"),
    ];
    let t = coupon("2021-10-18", "2021-11-18", FloatingTerms::default());
    let r = run(
        &t,
        &schedule(index("0")),
        &reference_fixings(),
        "2021-11-17",
    );
    for (i, (day, amount)) in table.iter().enumerate() {
        let to = table.get(i + 1).map_or(d("2021-11-18"), |x| d(x.0));
        let sum: Decimal = r
            .days
            .iter()
            .filter(|x| x.date >= d(day) && x.date < to)
            .map(|x| x.interest)
            .sum();
        assert_eq!(sum.round_dp(8), n(amount), "business day {day}");
    }
    // Final factor 1.000085003386735: the period's interest is 0.85003387 to 8 places.
    assert_close(r.postings[0].interest, "0.8500338673", "1e-10");
}

/// Harbourview Mutual's invented overnight index "HVM-ON" over November
/// 2026, in percent: weekdays only (the account's calendar has weekends only
/// plus 26 November), with negative prints in the first week.
fn harbourview_fixings() -> Fixings {
    let rows: &[(&str, &str)] = &[
        ("2026-10-29", "-0.12"),
        ("2026-10-30", "-0.10"),
        ("2026-11-02", "-0.05"),
        ("2026-11-03", "-0.02"),
        ("2026-11-04", "0.01"),
        ("2026-11-05", "0.15"),
        ("2026-11-06", "0.40"),
        ("2026-11-09", "4.95"),
        ("2026-11-10", "5.05"),
        ("2026-11-11", "5.31"),
        ("2026-11-12", "5.12"),
        ("2026-11-13", "4.98"),
        ("2026-11-16", "4.90"),
    ];
    let series = rows
        .iter()
        .map(|(day, pct)| (d(day), n(pct) / Decimal::ONE_HUNDRED))
        .collect();
    BTreeMap::from([("HVM-ON".to_string(), series)])
}

fn harbourview_rate(spread_bp: &str, floor: Option<&str>, cap: Option<&str>) -> FloatingSchedule {
    let pct = |s: &str| n(s) / Decimal::ONE_HUNDRED;
    schedule(TierRate::Index(IndexRate {
        index: "HVM-ON".into(),
        spread: n(spread_bp) / Decimal::from(10_000),
        floor: floor.map(pct),
        cap: cap.map(pct),
    }))
}

fn harbourview_loan(method: RateMethod) -> AccountTerms {
    let mut t = AccountTerms::new(
        "HVM-L7",
        "USD",
        2,
        Basis::Act360,
        d("2026-11-02"),
        n("250000"),
    );
    t.calendar = Arc::new(Calendar::new("HVM", [d("2026-11-26")]));
    t.floating.method = method;
    t
}

fn day_rate(r: &AccountResult, day: &str) -> Decimal {
    r.days.iter().find(|x| x.date == d(day)).unwrap().rate
}

/// Floating rates: a floor bounds each looked-back fixing before the spread: a
/// negative fixing floored at zero earns the spread alone.
#[test]
fn a_floor_at_zero_on_a_negative_fixing() {
    let t = harbourview_loan(RateMethod::SimpleDaily);
    let fx = harbourview_fixings();
    let floored = run(
        &t,
        &harbourview_rate("150", Some("0"), None),
        &fx,
        "2026-11-06",
    );
    assert_eq!(day_rate(&floored, "2026-11-02"), n("0.015"));
    assert_eq!(day_rate(&floored, "2026-11-04"), n("0.0151"));
    let bare = run(&t, &harbourview_rate("150", None, None), &fx, "2026-11-06");
    assert_eq!(day_rate(&bare, "2026-11-02"), n("0.0145"));
    // 250,000 x 1.50% x 1/360 on 2 November, exactly.
    let first = floored.days.first().unwrap();
    assert_eq!(
        (first.interest_num, first.interest_den),
        (n("3750.000"), 360)
    );
    // floor_on all-in bounds index plus spread: -0.05% + 0.03% is floored to 0.
    let mut all_in = t.clone();
    all_in.floating.floor_on = FloorOn::AllIn;
    let r = run(
        &all_in,
        &harbourview_rate("3", Some("0"), None),
        &fx,
        "2026-11-06",
    );
    assert_eq!(day_rate(&r, "2026-11-02"), Decimal::ZERO);
    assert_eq!(day_rate(&r, "2026-11-05"), n("0.0018"));
}

/// Floating rates: a cap bounds the fixing before the spread.
#[test]
fn a_cap_bounds_the_fixing() {
    let t = harbourview_loan(RateMethod::SimpleDaily);
    let r = run(
        &t,
        &harbourview_rate("25", None, Some("5")),
        &harbourview_fixings(),
        "2026-11-13",
    );
    assert_eq!(day_rate(&r, "2026-11-09"), n("0.052"));
    assert_eq!(day_rate(&r, "2026-11-11"), n("0.0525"));
    assert_eq!(day_rate(&r, "2026-11-13"), n("0.0523"));
}

/// Floating rates: a floor under compounding bounds each fixing before it
/// compounds: the period equals the same period on the floored fixings.
#[test]
fn a_floor_under_compounding_bounds_each_fixing() {
    let t = harbourview_loan(RateMethod::CompoundedInArrears);
    let fx = harbourview_fixings();
    let floored = run(
        &t,
        &harbourview_rate("0", Some("0"), None),
        &fx,
        "2026-11-13",
    );
    let mut by_hand = fx.clone();
    for r in by_hand.values_mut().flat_map(|s| s.values_mut()) {
        *r = (*r).max(Decimal::ZERO);
    }
    let plain = run(
        &t,
        &harbourview_rate("0", None, None),
        &by_hand,
        "2026-11-13",
    );
    assert_eq!(floored.accrued_at_cutoff, plain.accrued_at_cutoff);
    let figures = |r: &AccountResult| -> Vec<(NaiveDate, Decimal, Decimal)> {
        r.days.iter().map(|x| (x.date, x.rate, x.accrued)).collect()
    };
    assert_eq!(figures(&floored), figures(&plain));
    // The day shows the fixing as published, before the floor.
    assert_eq!(floored.days[0].fixing.as_ref().unwrap().rate, n("-0.0005"));
}

/// Floating rates, simple-daily: a weekend day earns the Friday fixing, looked
/// back two business days.
#[test]
fn simple_daily_lookback_over_a_weekend() {
    let mut t = harbourview_loan(RateMethod::SimpleDaily);
    t.floating.lookback_days = 2;
    let r = run(
        &t,
        &harbourview_rate("0", None, None),
        &harbourview_fixings(),
        "2026-11-09",
    );
    let used = |day: &str| {
        let x = r.days.iter().find(|x| x.date == d(day)).unwrap();
        (x.fixing.as_ref().unwrap().date, x.rate)
    };
    assert_eq!(used("2026-11-02"), (d("2026-10-29"), n("-0.0012")));
    assert_eq!(used("2026-11-07"), (d("2026-11-04"), n("0.0001")));
    assert_eq!(used("2026-11-08"), (d("2026-11-04"), n("0.0001")));
    assert_eq!(used("2026-11-09"), (d("2026-11-05"), n("0.0015")));
}

/// Floating rates: a missing fixing is an error naming the index and the date;
/// with the `last` fallback the last published fixing stands in, and the
/// substitution is reported.
#[test]
fn a_missing_fixing_names_the_index_and_date() {
    let t = harbourview_loan(RateMethod::SimpleDaily);
    let s = harbourview_rate("0", None, None);
    let fx = harbourview_fixings();
    let empty = RateSchedule::default();
    let go = |fallback| {
        let src = Inputs {
            rates: &empty,
            debit_rates: None,
            movements: &[],
            actual: &[],
            breaks: &[],
            floating: Some(FloatingRates {
                schedule: &s,
                fixings: &fx,
                fallback,
            }),
        };
        let mut o = RunOptions::month_end(d("2026-11-18"));
        o.keep_days = true;
        accrue(&t, src, o)
    };
    let e = go(FixingFallback::None).unwrap_err();
    assert_eq!(
        e,
        EngineError::MissingFixing {
            index: "HVM-ON".into(),
            date: d("2026-11-17")
        }
    );
    assert_eq!(e.to_string(), "no HVM-ON fixing for 2026-11-17");
    let r = go(FixingFallback::Last).unwrap();
    let want: Vec<FixingWarning> = ["2026-11-17", "2026-11-18"]
        .iter()
        .map(|x| FixingWarning {
            index: "HVM-ON".into(),
            date: d(x),
            used: d("2026-11-16"),
        })
        .collect();
    assert_eq!(r.fixing_warnings, want);
    let last = r.days.last().unwrap();
    assert_eq!(last.rate, n("0.049"));
    assert_eq!(
        last.fixing.as_ref().unwrap().stand_in,
        Some(d("2026-11-16"))
    );
}

/// Floating rates: compounded-in-arrears is computed on ACT/360 and ACT/365F
/// only; any other basis is an error that names it.
#[test]
fn compounding_on_another_basis_is_an_error_naming_it() {
    let mut t = harbourview_loan(RateMethod::CompoundedInArrears);
    t.basis = Basis::Thirty360;
    let s = harbourview_rate("0", None, None);
    let fx = harbourview_fixings();
    let empty = RateSchedule::default();
    let src = Inputs {
        rates: &empty,
        debit_rates: None,
        movements: &[],
        actual: &[],
        breaks: &[],
        floating: Some(FloatingRates {
            schedule: &s,
            fixings: &fx,
            fallback: FixingFallback::None,
        }),
    };
    let e = accrue(&t, src, RunOptions::month_end(d("2026-11-13"))).unwrap_err();
    let words = e.to_string();
    assert!(matches!(e, EngineError::Unsupported(_)), "{words}");
    assert!(
        words.contains("30/360") && words.contains("ACT/360"),
        "{words}"
    );
}

/// The factors of a period compound to the ratio of an index built from
/// them: with I(t) the product of (1 + r_i n_i / 360) from 18 October 2021,
/// a coupon from 25 October to 15 November earns 10,000 x (I(15 Nov) /
/// I(25 Oct) - 1) (computed, no source).
#[test]
fn compounding_a_period_equals_the_ratio_of_an_index() {
    let fx = reference_fixings();
    let series = &fx["SOFR"];
    let cal = overnight_calendar();
    let mut level = BTreeMap::new();
    let mut i = Decimal::ONE;
    let mut day = d("2021-10-18");
    level.insert(day, i);
    while day < d("2021-11-18") {
        let next = cal.add_business_days(day, 1).unwrap();
        let days = Decimal::from((next - day).num_days());
        i *= Decimal::ONE + series[&day] * days / Decimal::from(360);
        level.insert(next, i);
        day = next;
    }
    let t = coupon("2021-10-25", "2021-11-15", FloatingTerms::default());
    let r = run(&t, &schedule(index("0")), &fx, "2021-11-14");
    let from_index =
        n("10000") * (level[&d("2021-11-15")] / level[&d("2021-10-25")] - Decimal::ONE);
    assert_close(r.postings[0].interest, &from_index.to_string(), "1e-22");
}

/// Floating rates: when the base changes inside the period each day earns its
/// own base times the factor's increase over the day, so a deposit on a
/// business day splits the period's interest at that day's factor.
#[test]
fn a_base_change_inside_the_period_splits_at_the_factor() {
    let fx = reference_fixings();
    let t = coupon("2021-10-18", "2021-11-18", FloatingTerms::default());
    let s = schedule(index("0"));
    let empty = RateSchedule::default();
    let moves = [crate::engine::Movement {
        value_date: d("2021-11-01"),
        amount: n("5000"),
        booking_date: None,
        reference: None,
    }];
    let src = Inputs {
        rates: &empty,
        debit_rates: None,
        movements: &moves,
        actual: &[],
        breaks: &[],
        floating: Some(FloatingRates {
            schedule: &s,
            fixings: &fx,
            fallback: FixingFallback::None,
        }),
    };
    let r = accrue(&t, src, RunOptions::month_end(d("2021-11-17"))).unwrap();
    // Factors after 29 October and after 17 November, from the table of the
    // conventions reference section 4.3 (12 digits).
    let (cf_oct, cf_end) = (n("1.000039722905"), n("1.000085003387"));
    let want = n("10000") * (cf_end - Decimal::ONE) + n("5000") * (cf_end - cf_oct);
    assert_close(r.postings[0].interest, &want.to_string(), "1e-8");
}

/// Floating rates: a period that starts on a non-business day takes the
/// preceding business day's fixing up to the first business day.
#[test]
fn a_period_starting_on_a_holiday_uses_the_preceding_fixing() {
    let t = coupon("2021-10-23", "2021-10-27", FloatingTerms::default());
    let r = run(
        &t,
        &schedule(index("0")),
        &reference_fixings(),
        "2021-10-26",
    );
    let fixing_dates: Vec<NaiveDate> = r
        .days
        .iter()
        .map(|x| x.fixing.as_ref().unwrap().date)
        .collect();
    assert_eq!(
        fixing_dates,
        ["2021-10-22", "2021-10-22", "2021-10-25", "2021-10-26"].map(d)
    );
    // 10,000 x ((1 + 0.12% x 2/360)(1 + 0.11%/360)(1 + 0.13%/360) - 1).
    let f = |pct: &str, days: i64| {
        Decimal::ONE + n(pct) / Decimal::ONE_HUNDRED * Decimal::from(days) / Decimal::from(360)
    };
    let want = n("10000") * (f("0.12", 2) * f("0.11", 1) * f("0.13", 1) - Decimal::ONE);
    assert_close(r.postings[0].interest, &want.to_string(), "1e-22");
}
