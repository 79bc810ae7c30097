//! Spec examples: the 25 worked examples of the behaviour contract
//! (behaviour.md, Worked examples; every figure in fixtures/spec_examples.json),
//! each run through the engine and compared figure by figure.
//!
//! These are the project's own conformance tests on invented accounts, not
//! outside checks.

use std::sync::Arc;

use chrono::NaiveDate;
use ledgerate::conventions::calendar::Calendar;
use ledgerate::conventions::compounding::Compounding;
use ledgerate::conventions::currency;
use ledgerate::conventions::daycount::Basis;
use ledgerate::conventions::rounding::RoundMode;
use ledgerate::conventions::schedule::Posting;
use ledgerate::engine::rates::RateSchedule;
use ledgerate::engine::reconcile::{reconcile, StatementPeriod, Tolerance};
use ledgerate::engine::run::{accrue, AccountResult, RunOptions};
use ledgerate::engine::{AccountTerms, ActualPosting, Inputs, Movement, RoundAt, Side, TierMethod};
use rust_decimal::Decimal;
use serde_json::Value;

fn date(v: &Value) -> NaiveDate {
    v.as_str().unwrap().parse().unwrap()
}

fn dec(v: &Value) -> Decimal {
    v.as_str().unwrap().parse().unwrap()
}

fn examples() -> Vec<Value> {
    let text = include_str!("../fixtures/spec_examples.json");
    serde_json::from_str::<Value>(text)
        .unwrap()
        .as_array()
        .unwrap()
        .clone()
}

/// The account of an example, with the defaults of behaviour.md, Input books, for
/// unset fields.
fn terms(a: &Value) -> AccountTerms {
    let ccy = a["currency"].as_str().unwrap();
    let mut t = AccountTerms::new(
        a["account"].as_str().unwrap(),
        ccy,
        currency::minor_units(ccy).unwrap(),
        Basis::parse(a["day_count"].as_str().unwrap()).unwrap(),
        date(&a["open_date"]),
        dec(&a["opening_balance"]),
    );
    let s = |k: &str| a.get(k).and_then(Value::as_str);
    if let Some(v) = s("compounding") {
        t.compounding = Compounding::parse(v).unwrap();
    }
    if let Some(v) = s("posting") {
        t.posting = Posting::parse(v).unwrap();
    }
    if let Some(v) = s("posting_anchor") {
        t.anchor = Some(v.parse().unwrap());
    }
    if let Some(v) = a.get("capitalise").and_then(Value::as_bool) {
        t.capitalise = v;
    }
    if let Some(v) = s("round_at") {
        t.round_at = RoundAt::parse(v).unwrap();
    }
    if let Some(v) = s("round_mode") {
        t.round_mode = RoundMode::parse(v).unwrap();
    }
    if let Some(v) = a.get("round_places") {
        t.round_places = Some(
            v.as_u64()
                .map(|n| n as u32)
                .unwrap_or_else(|| v.as_str().unwrap().parse().unwrap()),
        );
    }
    if let Some(v) = s("maturity") {
        t.maturity = Some(v.parse().unwrap());
    }
    if let Some(v) = s("tier_method") {
        t.tier_method = TierMethod::parse(v).unwrap();
    }
    if let Some(v) = s("opening_accrued") {
        t.opening_accrued = v.parse().unwrap();
    }
    if let Some(v) = s("side") {
        t.side = Side::parse(v).unwrap();
    }
    t.calendar = Arc::new(Calendar::weekends_only());
    t
}

fn run(ex: &Value) -> AccountResult {
    let t = terms(&ex["account"]);
    let rates = RateSchedule::from_rows(ex["rates"].as_array().unwrap().iter().map(|r| {
        let pct = dec(&r["rate_percent"]);
        (
            date(&r["effective"]),
            pct / Decimal::ONE_HUNDRED,
            dec(&r["tier_from"]),
        )
    }));
    let movements: Vec<Movement> = ex["movements"]
        .as_array()
        .unwrap()
        .iter()
        .map(|m| Movement {
            value_date: date(&m["value_date"]),
            amount: dec(&m["amount"]),
            booking_date: m.get("booking_date").map(date),
            reference: None,
        })
        .collect();
    let actual: Vec<ActualPosting> = ex["statements"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| ActualPosting {
            start: date(&s["period_start"]),
            end: date(&s["period_end"]),
            amount: dec(&s["posted_interest"]),
        })
        .collect();
    let options = RunOptions {
        window_start: date(&ex["window_start"]),
        cutoff: date(&ex["cutoff"]),
        keep_days: true,
        keep_states: false,
        keep_spans: false,
        fast_path: true,
    };
    let sources = Inputs {
        rates: &rates,
        debit_rates: None,
        movements: &movements,
        actual: &actual,
        breaks: &[],
        floating: None,
    };
    accrue(&t, sources, options).unwrap_or_else(|e| panic!("{}: {e}", ex["name"]))
}

fn check(name: &str) {
    let ex = examples()
        .into_iter()
        .find(|e| e["name"] == name)
        .unwrap_or_else(|| panic!("no example {name}"));
    let r = run(&ex);
    let want = &ex["expected"];
    let got: Vec<(String, String, String)> = r
        .postings
        .iter()
        .map(|p| {
            (
                p.start.to_string(),
                p.end.to_string(),
                p.expected.to_string(),
            )
        })
        .collect();
    let expected: Vec<(String, String, String)> = want["postings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| {
            (
                p["period_start"].as_str().unwrap().to_string(),
                p["period_end"].as_str().unwrap().to_string(),
                p["posted"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    assert_eq!(got, expected, "{name}: postings");
    assert_eq!(
        r.balance_at_cutoff,
        dec(&want["balance_at_cutoff"]),
        "{name}: balance at cut-off"
    );
    assert_eq!(
        r.accrued_at_cutoff,
        dec(&want["accrued_at_cutoff"]),
        "{name}: accrued at cut-off"
    );
    assert_eq!(
        r.posted_in_window,
        dec(&want["posted_in_window"]),
        "{name}: posted in window"
    );
    assert_eq!(
        r.interest_for_window,
        dec(&want["interest_for_window"]),
        "{name}: interest for window"
    );

    // Reconciliation of the example's statement rows, default tolerance.
    let statements: Vec<StatementPeriod> = ex["statements"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| StatementPeriod {
            start: date(&s["period_start"]),
            end: date(&s["period_end"]),
            posted: dec(&s["posted_interest"]),
            rows: 1,
        })
        .collect();
    let rows = reconcile(
        &terms(&ex["account"]),
        &r,
        &statements,
        date(&ex["window_start"]),
        date(&ex["cutoff"]),
        &Tolerance::default(),
    )
    .unwrap();
    let got: Vec<[String; 5]> = rows
        .iter()
        .map(|x| {
            let mut bp = x.variance_bp.unwrap().round_dp(4);
            bp.rescale(4);
            [
                x.start.to_string(),
                x.expected.to_string(),
                x.variance.to_string(),
                bp.to_string(),
                x.status.name().to_string(),
            ]
        })
        .collect();
    let expected: Vec<[String; 5]> = want["reconciliation"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| {
            [
                "period_start",
                "expected",
                "variance",
                "variance_bp",
                "status",
            ]
            .map(|k| x[k].as_str().unwrap().to_string())
        })
        .collect();
    assert_eq!(got, expected, "{name}: reconciliation");
}

macro_rules! spec_examples {
    ($($test:ident => $name:literal,)*) => {
        $(
            #[test]
            fn $test() {
                check($name);
            }
        )*

        #[test]
        fn every_spec_example_has_a_test() {
            let named = [$($name),*];
            for ex in examples() {
                let n = ex["name"].as_str().unwrap();
                assert!(named.contains(&n), "spec example {n} has no test");
            }
        }
    };
}

spec_examples! {
    spec_example_tie_30_360 => "tie-30-360",
    spec_example_tie_with_movements => "tie-with-movements",
    spec_example_act360_movement_rate_change => "act360-movement-rate-change",
    spec_example_daily_compounding_capitalised => "daily-compounding-capitalised",
    spec_example_actact_isda_year_end => "actact-isda-year-end",
    spec_example_nl365_leap_night => "nl365-leap-night",
    spec_example_30e360_isda_february => "30e360-isda-february",
    spec_example_tiers_whole => "tiers-whole",
    spec_example_tiers_banded => "tiers-banded",
    spec_example_tier_table_restated => "tier-table-restated",
    spec_example_minimum_balance => "minimum-balance",
    spec_example_overdrawn_earns_nothing => "overdrawn-earns-nothing",
    spec_example_monthly_compounding_quarterly_posting => "monthly-compounding-quarterly-posting",
    spec_example_continuous_year => "continuous-year",
    spec_example_semiannual_year => "semiannual-year",
    spec_example_daily_rounding_4dp => "daily-rounding-4dp",
    spec_example_half_even_tie => "half-even-tie",
    spec_example_half_even_tie_down => "half-even-tie-down",
    spec_example_yen_no_minor_unit => "yen-no-minor-unit",
    spec_example_dinar_three_places => "dinar-three-places",
    spec_example_brought_forward => "brought-forward",
    spec_example_anniversary_posting => "anniversary-posting",
    spec_example_term_deposit_maturity => "term-deposit-maturity",
    spec_example_reconcile_rows => "reconcile-rows",
    spec_example_reconcile_basis_gap => "reconcile-basis-gap",
}

/// The tie examples are exact before rounding: 1.875, never 1.8749...
#[test]
fn spec_example_ties_are_exact_before_rounding() {
    for name in ["tie-30-360", "tie-with-movements", "half-even-tie"] {
        let ex = examples().into_iter().find(|e| e["name"] == name).unwrap();
        assert_eq!(run(&ex).postings[0].interest.to_string(), "1.875", "{name}");
    }
}
