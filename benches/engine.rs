//! The engine's day loop in account-days per second, by convention: ACT/360
//! simple, 30/360 simple, ACT/365F with daily and with monthly compounding,
//! continuous and annual-effective compounding (exp and power based, reported
//! apart), and banded tiers.
//!
//! Each measurement accrues a batch of invented accounts (balances spread
//! over orders of magnitude, a rate change mid-window for half of them, a
//! movement for a third) over the 31-day window of October 2026 with
//! [`ledgerate::engine::accrue`], one thread, nothing kept but the figures.
//! Criterion reports the throughput in elements per second: one element is
//! one account-day. Sample sizes are small so the suite stays near a minute
//! on two cores: `cargo bench --bench engine`.
//!
//! This file measures; it asserts nothing about speed (targets live in
//! docs/performance.md).

use std::hint::black_box;
use std::time::Duration;

use chrono::NaiveDate;
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion, Throughput};
use ledgerate::conventions::compounding::Compounding;
use ledgerate::conventions::daycount::Basis;
use ledgerate::engine::rates::RateSchedule;
use ledgerate::engine::run::{accrue, RunOptions};
use ledgerate::engine::{AccountTerms, Inputs, Movement, TierMethod};
use rust_decimal::Decimal;

/// Accounts in one measured batch.
const ACCOUNTS: usize = 200;
/// The window: 1 to 31 October 2026.
const DAYS: u64 = 31;

fn day(s: &str) -> NaiveDate {
    s.parse().expect("bench dates are ISO")
}

/// One convention's batch.
struct Case {
    name: &'static str,
    basis: Basis,
    compounding: Compounding,
    tiers: TierMethod,
}

const CASES: [Case; 7] = [
    case(
        "ACT-360 simple",
        Basis::Act360,
        Compounding::Simple,
        TierMethod::Whole,
    ),
    case(
        "30-360 simple",
        Basis::Thirty360,
        Compounding::Simple,
        TierMethod::Whole,
    ),
    case(
        "ACT-365F daily compounding",
        Basis::Act365F,
        Compounding::Daily,
        TierMethod::Whole,
    ),
    case(
        "ACT-365F monthly compounding",
        Basis::Act365F,
        Compounding::Monthly,
        TierMethod::Whole,
    ),
    case(
        "ACT-365F banded tiers",
        Basis::Act365F,
        Compounding::Simple,
        TierMethod::Banded,
    ),
    case(
        "ACT-365F continuous (exp)",
        Basis::Act365F,
        Compounding::Continuous,
        TierMethod::Whole,
    ),
    case(
        "ACT-365F annual-effective (power)",
        Basis::Act365F,
        Compounding::AnnualEffective,
        TierMethod::Whole,
    ),
];

const fn case(
    name: &'static str,
    basis: Basis,
    compounding: Compounding,
    tiers: TierMethod,
) -> Case {
    Case {
        name,
        basis,
        compounding,
        tiers,
    }
}

struct Batch {
    terms: Vec<AccountTerms>,
    movements: Vec<Vec<Movement>>,
    rates: Vec<RateSchedule>,
}

fn batch(c: &Case) -> Batch {
    let mut terms = Vec::new();
    let mut movements = Vec::new();
    let mut rates = Vec::new();
    for i in 0..ACCOUNTS {
        let i64 = i as i64;
        // 1,000.00 to about 10 million, in steps that touch every tier.
        let cents = 100_000 + (i64 * i64 * 2_531) % 1_000_000_000;
        let mut t = AccountTerms::new(
            &format!("BENCH-{i:04}"),
            "USD",
            2,
            c.basis,
            day("2026-10-01"),
            Decimal::new(cents, 2),
        );
        t.compounding = c.compounding;
        t.tier_method = c.tiers;
        t.capitalise = true;
        terms.push(t);
        movements.push(if i % 3 == 0 {
            vec![Movement {
                value_date: day("2026-10-12"),
                amount: Decimal::new(cents / 4, 2),
                booking_date: None,
                reference: Some(format!("DEP-{i}").into()),
            }]
        } else {
            Vec::new()
        });
        let mut rows = vec![
            (
                day("2026-01-01"),
                Decimal::new(250 + i64 % 50, 4),
                Decimal::ZERO,
            ),
            (
                day("2026-01-01"),
                Decimal::new(300 + i64 % 50, 4),
                Decimal::from(10_000),
            ),
            (
                day("2026-01-01"),
                Decimal::new(350 + i64 % 50, 4),
                Decimal::from(50_000),
            ),
        ];
        if i % 2 == 0 {
            rows.push((day("2026-10-16"), Decimal::new(240, 4), Decimal::ZERO));
            rows.push((
                day("2026-10-16"),
                Decimal::new(290, 4),
                Decimal::from(10_000),
            ));
            rows.push((
                day("2026-10-16"),
                Decimal::new(340, 4),
                Decimal::from(50_000),
            ));
        }
        rates.push(RateSchedule::from_rows(rows));
    }
    Batch {
        terms,
        movements,
        rates,
    }
}

fn run(b: &Batch, options: RunOptions) -> Decimal {
    let mut total = Decimal::ZERO;
    for ((t, m), r) in b.terms.iter().zip(&b.movements).zip(&b.rates) {
        let sources = Inputs {
            rates: r,
            debit_rates: None,
            movements: m,
            actual: &[],
            breaks: &[],
            floating: None,
        };
        let result = accrue(t, sources, options).expect("bench accounts compute");
        total += result.interest_for_window;
    }
    total
}

fn day_loop(c: &mut Criterion) {
    // The plain day loop (what --no-fast-path keeps) and the one-step fast path.
    let fast = RunOptions::month_end(day("2026-10-31"));
    let plain = RunOptions {
        fast_path: false,
        ..fast
    };
    for (group_name, options) in [
        ("account-days (day loop)", plain),
        ("account-days (fast path)", fast),
    ] {
        let mut group = c.benchmark_group(group_name);
        group
            .sample_size(15)
            .warm_up_time(Duration::from_millis(800))
            .measurement_time(Duration::from_secs(3))
            .throughput(Throughput::Elements(ACCOUNTS as u64 * DAYS));
        for case in &CASES {
            let b = batch(case);
            group.bench_with_input(BenchmarkId::from_parameter(case.name), &b, |bench, b| {
                bench.iter(|| run(black_box(b), options));
            });
        }
        group.finish();
    }
}

criterion_group!(benches, day_loop);
criterion_main!(benches);
