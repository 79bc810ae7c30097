//! Floating rates against the past-coupon cases of QuantLib's overnight
//! coupon test-suite (figures as listed in the conventions reference,
//! section 4.3), the computed daily factor table, and the rules of semantics
//! section 10 that those cases do not pin.

use std::sync::Arc;

use super::*;
use crate::conventions::schedule::Posting;
use crate::engine::run::{accrue, AccountResult, RunOptions, Sources};
use crate::engine::terms::FloatingTerms;
use crate::engine::AccountTerms;

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
    let src = Sources {
        rates: &empty,
        debit_rates: None,
        movements: &[],
        actual: &[],
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
