//! Overnight-rate coupons compared, one by one, with the answers of the
//! reference library (behaviour.md, Floating rates).
//!
//! Source: QuantLib 1.44 from PyPI, ql.OvernightIndexedCoupon on a ql.Sofr
//! index. `tests/quantlib/overnight_vectors.py` draws random fixings on the
//! library's SOFR calendar and random past coupons over them (compounded in
//! arrears with lookback, observation shift, lockout and a spread compounded
//! or added after; or simply averaged), and writes the library's coupon
//! rates and accrued amounts to `tests/fixtures/quantlib_overnight.tsv`.
//! `LEDGERATE_QL_OVERNIGHT` points the test at another copy of the file,
//! such as the one `tests/quantlib/overnight_check.sh` regenerates live.
//!
//! Each coupon is an account of the nominal from its start to its end (one
//! posting at the end), ACT/360, on the file's calendar. Its rate,
//! unrounded interest / nominal x 360 / days, must agree with the library's
//! to 1e-12; an accrued amount to 1e-6 (1e-12 of the nominal). Accrued
//! amounts are drawn for unshifted coupons only: with an observation shift
//! ledgerate earns the period's annualised rate on every day (behaviour.md,
//! Floating rates), where the library compounds the observation days so far, so
//! the two differ inside the period by design and agree at its end.

use std::collections::BTreeMap;
use std::path::PathBuf;
use std::sync::Arc;

use chrono::NaiveDate;
use ledgerate::conventions::calendar::Calendar;
use ledgerate::conventions::daycount::Basis;
use ledgerate::conventions::schedule::Posting;
use ledgerate::engine::floating::{
    FixingFallback, Fixings, FloatingRates, FloatingSchedule, IndexRate, TierRate,
};
use ledgerate::engine::rates::RateSchedule;
use ledgerate::engine::run::{accrue, RunOptions};
use ledgerate::engine::{AccountTerms, FloatingTerms, Inputs, RateMethod};
use rust_decimal::Decimal;

/// Fewer coupons than this fails the test, so a short or empty file cannot pass.
const MIN_COUPONS: usize = 300;
const RATE_TOLERANCE: &str = "1e-12";
const ACCRUED_TOLERANCE: &str = "1e-6";

struct Coupon {
    line: usize,
    id: String,
    terms: FloatingTerms,
    start: NaiveDate,
    end: NaiveDate,
    spread: Decimal,
    nominal: Decimal,
    ql_rate: Decimal,
    accrued: Option<(NaiveDate, Decimal)>,
}

fn vectors_path() -> PathBuf {
    match std::env::var_os("LEDGERATE_QL_OVERNIGHT") {
        Some(p) => PathBuf::from(p),
        None => {
            PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/quantlib_overnight.tsv")
        }
    }
}

/// A float's repr as an exact decimal (scientific notation allowed).
fn float_text(s: &str) -> Decimal {
    Decimal::from_scientific(s)
        .or_else(|_| s.parse())
        .unwrap_or_else(|e| panic!("'{s}' is not a number: {e}"))
}

fn read() -> (Vec<NaiveDate>, Fixings, Vec<Coupon>) {
    let path = vectors_path();
    let text = std::fs::read_to_string(&path)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
    let mut holidays = Vec::new();
    let mut series = BTreeMap::new();
    let mut coupons = Vec::new();
    let date = |s: &str| s.parse::<NaiveDate>().unwrap();
    for (i, line) in text.lines().enumerate() {
        let f: Vec<&str> = line.split('\t').collect();
        match f.as_slice() {
            ["holiday", d] => holidays.push(date(d)),
            ["fixing", d, r] => {
                series.insert(date(d), r.parse::<Decimal>().unwrap());
            }
            ["coupon", id, method, start, end, lookback, shift, lockout, spread, compounded, nominal, rate, accrued_date, accrued] =>
            {
                coupons.push(Coupon {
                    line: i + 1,
                    id: id.to_string(),
                    terms: FloatingTerms {
                        method: RateMethod::parse(method).unwrap(),
                        lookback_days: lookback.parse().unwrap(),
                        observation_shift: *shift == "yes",
                        lockout_days: lockout.parse().unwrap(),
                        spread_compounded: *compounded == "yes",
                        ..FloatingTerms::default()
                    },
                    start: date(start),
                    end: date(end),
                    spread: spread.parse().unwrap(),
                    nominal: nominal.parse().unwrap(),
                    ql_rate: float_text(rate),
                    accrued: (*accrued_date != "-")
                        .then(|| (date(accrued_date), float_text(accrued))),
                });
            }
            _ if line.starts_with('#') || line.is_empty() => {}
            _ => panic!("{}:{}: unreadable line '{line}'", path.display(), i + 1),
        }
    }
    (
        holidays,
        BTreeMap::from([("SOFR".to_string(), series)]),
        coupons,
    )
}

#[test]
fn overnight_coupons_agree_with_the_reference_library() {
    let (holidays, fixings, coupons) = read();
    assert!(
        coupons.len() >= MIN_COUPONS,
        "only {} coupons in {}",
        coupons.len(),
        vectors_path().display()
    );
    let calendar = Arc::new(Calendar::new("US-SOFR", holidays));
    let rate_tolerance: Decimal = RATE_TOLERANCE.parse().unwrap();
    let accrued_tolerance: Decimal = ACCRUED_TOLERANCE.parse().unwrap();
    let empty = RateSchedule::default();
    let mut failures = Vec::new();
    let (mut worst_rate, mut worst_accrued) = (Decimal::ZERO, Decimal::ZERO);
    let mut accrued_compared = 0;
    for c in &coupons {
        let mut t = AccountTerms::new(&c.id, "USD", 2, Basis::Act360, c.start, c.nominal);
        t.calendar = Arc::clone(&calendar);
        t.posting = Posting::Maturity;
        t.maturity = Some(c.end);
        t.floating = c.terms;
        let schedule = FloatingSchedule::from_rows([(
            NaiveDate::from_ymd_opt(2000, 1, 1).unwrap(),
            TierRate::Index(IndexRate {
                index: "SOFR".into(),
                spread: c.spread,
                floor: None,
                cap: None,
            }),
            Decimal::ZERO,
        )]);
        let sources = Inputs {
            rates: &empty,
            debit_rates: None,
            movements: &[],
            actual: &[],
            breaks: &[],
            floating: Some(FloatingRates {
                schedule: &schedule,
                fixings: &fixings,
                fallback: FixingFallback::None,
            }),
        };
        let cutoff = c.end.pred_opt().unwrap();
        let options = RunOptions {
            window_start: cutoff,
            cutoff,
            keep_days: c.accrued.is_some(),
            keep_states: false,
            keep_spans: false,
            fast_path: true,
        };
        let r = match accrue(&t, sources, options) {
            Ok(r) => r,
            Err(e) => {
                failures.push(format!("line {} {}: {e}", c.line, c.id));
                continue;
            }
        };
        let days = Decimal::from((c.end - c.start).num_days());
        let ours = r.postings[0].interest / c.nominal * Decimal::from(360) / days;
        let gap = (ours - c.ql_rate).abs();
        worst_rate = worst_rate.max(gap);
        if gap > rate_tolerance {
            failures.push(format!(
                "line {} {} ({:?}, {}..{}): rate {ours} against {} (off by {gap})",
                c.line, c.id, c.terms, c.start, c.end, c.ql_rate
            ));
        }
        if let Some((to, ql_accrued)) = c.accrued {
            let day = to.pred_opt().unwrap();
            let ours = r
                .days
                .iter()
                .find(|d| d.date == day)
                .map(|d| d.accrued)
                .unwrap_or_else(|| panic!("{}: no day {day}", c.id));
            let gap = (ours - ql_accrued).abs();
            worst_accrued = worst_accrued.max(gap);
            accrued_compared += 1;
            if gap > accrued_tolerance {
                failures.push(format!(
                    "line {} {}: accrued to {to} {ours} against {ql_accrued} (off by {gap})",
                    c.line, c.id
                ));
            }
        }
    }
    println!(
        "{} coupons compared: largest rate gap {worst_rate}; {accrued_compared} accrued amounts, largest gap {worst_accrued}",
        coupons.len()
    );
    assert!(
        accrued_compared >= 50,
        "only {accrued_compared} accrued amounts compared"
    );
    assert!(
        failures.is_empty(),
        "{} of {} coupons disagree:\n{}",
        failures.len(),
        coupons.len(),
        failures
            .iter()
            .take(25)
            .cloned()
            .collect::<Vec<_>>()
            .join("\n")
    );
}
