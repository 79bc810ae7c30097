//! The sample institution's rate products: shared rate schedules that many
//! accounts earn, by shelf (savers, tiered savers, loans...), each with 0 to 2
//! rate changes around the November window.
//!
//! Pure: the products follow from the seed alone (stream 0 of [`Rng`]).
//! Nothing here knows about accounts or files.

use std::sync::Arc;

use chrono::{Days, NaiveDate};
use rust_decimal::Decimal;

use super::rng::Rng;
use super::{date, RateRow};
use crate::engine::rates::RateSchedule;

/// A kind of product; accounts of a family pick among its shelf.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Shelf {
    Saver,
    TierWhole,
    TierBanded,
    Loan,
    Intercompany,
    Euro,
    Isda,
    Icma,
    NoLeap,
    Act365L,
    Continuous,
    Long,
    Real,
    Current,
    Overdraft,
    Yen,
    Dinar,
    /// The break rate of term deposits closed early with a `rate` penalty.
    Break,
    /// What matured term deposits earn until paid out.
    Matured,
    /// The rate card new terms of rolled-over deposits take.
    Rollover,
}

/// One shelf of the catalogue: products, reference prefix, base rate range
/// in basis points, whether tiered, and the days in which rates change.
struct ShelfSpec {
    shelf: Shelf,
    prefix: &'static str,
    products: u32,
    bp: (i64, i64),
    tiered: bool,
    changes: (NaiveDate, NaiveDate),
}

/// Where tiers start.
const TIERS: [i64; 3] = [0, 10_000, 50_000];

/// November rate changes for accounts posting at the month end.
const NOVEMBER: (NaiveDate, NaiveDate) = (date(2026, 11, 2), date(2026, 11, 28));
/// Loans pay on the 15th: their period is mid-October to mid-November.
const LOAN_PERIOD: (NaiveDate, NaiveDate) = (date(2026, 10, 19), date(2026, 11, 12));

const SHELVES: [ShelfSpec; 20] = [
    spec(Shelf::Saver, "HM-SAVER", 12, (150, 350), false, NOVEMBER),
    spec(Shelf::TierWhole, "HM-TIER-W", 6, (40, 120), true, NOVEMBER),
    spec(Shelf::TierBanded, "HM-TIER-B", 6, (40, 120), true, NOVEMBER),
    spec(Shelf::Loan, "HM-LOAN", 10, (500, 850), false, LOAN_PERIOD),
    spec(Shelf::Intercompany, "HM-IC", 4, (400, 550), false, NOVEMBER),
    spec(Shelf::Euro, "HM-EUR", 6, (200, 320), false, NOVEMBER),
    spec(Shelf::Isda, "HM-ISDA", 3, (400, 500), false, NOVEMBER),
    spec(Shelf::Icma, "HM-ICMA", 3, (400, 500), false, NOVEMBER),
    spec(Shelf::NoLeap, "HM-NL", 2, (250, 350), false, NOVEMBER),
    spec(Shelf::Act365L, "HM-365L", 2, (300, 380), false, NOVEMBER),
    spec(Shelf::Continuous, "HM-CONT", 3, (350, 420), false, NOVEMBER),
    spec(Shelf::Long, "HM-LONG", 3, (300, 450), false, NOVEMBER),
    spec(Shelf::Real, "HM-BRL", 2, (1200, 1400), false, NOVEMBER),
    spec(Shelf::Current, "HM-CHK", 2, (5, 25), false, NOVEMBER),
    spec(Shelf::Overdraft, "HM-OD", 2, (1500, 2100), false, NOVEMBER),
    spec(Shelf::Yen, "HM-JPY", 1, (10, 40), false, NOVEMBER),
    spec(Shelf::Dinar, "HM-KWD", 1, (350, 450), false, NOVEMBER),
    // Drawn after the shelves above, so their products stay as they were.
    spec(Shelf::Break, "HM-BREAK", 1, (50, 150), false, NOVEMBER),
    spec(Shelf::Matured, "HM-MATURED", 1, (25, 75), false, NOVEMBER),
    spec(Shelf::Rollover, "HM-ROLL", 2, (250, 450), false, NOVEMBER),
];

const fn spec(
    shelf: Shelf,
    prefix: &'static str,
    products: u32,
    bp: (i64, i64),
    tiered: bool,
    changes: (NaiveDate, NaiveDate),
) -> ShelfSpec {
    ShelfSpec {
        shelf,
        prefix,
        products,
        bp,
        tiered,
        changes,
    }
}

/// The first table of every product: in force well before any account opens.
pub(crate) const BASE_EFFECTIVE: NaiveDate = date(2025, 1, 1);

/// One product: its Rates rows and the schedule they make.
#[derive(Debug, Clone)]
pub(crate) struct Product {
    pub shelf: Shelf,
    pub rate_ref: String,
    pub rows: Vec<RateRow>,
    pub schedule: Arc<RateSchedule>,
}

/// The catalogue of `seed`.
pub(crate) fn products(seed: u64) -> Vec<Product> {
    let mut r = Rng::stream(seed, 0);
    let mut out = Vec::new();
    for s in &SHELVES {
        for n in 1..=s.products {
            out.push(product(s, n, &mut r));
        }
    }
    out
}

fn product(s: &ShelfSpec, n: u32, r: &mut Rng) -> Product {
    let rate_ref = format!("{}-{n:02}", s.prefix);
    // Rates of each tier in basis points: rising with the tier.
    let mut tiers: Vec<i64> = Vec::new();
    let mut bp = r.between(s.bp.0, s.bp.1);
    for _ in 0..(if s.tiered { TIERS.len() } else { 1 }) {
        tiers.push(bp);
        bp += r.between(40, 90);
    }
    let mut tables = vec![(BASE_EFFECTIVE, tiers.clone())];
    let changes = match r.below(10) {
        0..=3 => 0,
        4..=7 => 1,
        _ => 2,
    };
    let span = (s.changes.1 - s.changes.0).num_days().max(1);
    let mut days: Vec<i64> = Vec::new();
    while days.len() < changes {
        let d = r.between(0, span);
        // At least three days between two changes of one product.
        if days.iter().all(|x| (x - d).abs() >= 3) {
            days.push(d);
        }
    }
    days.sort_unstable();
    for d in days {
        let step = r.between(10, 50) * if r.chance(600) { -1 } else { 1 };
        for t in &mut tiers {
            *t = (*t + step).max(5);
        }
        let effective = s
            .changes
            .0
            .checked_add_days(Days::new(d.unsigned_abs()))
            .unwrap_or(s.changes.0);
        tables.push((effective, tiers.clone()));
    }
    let mut rows = Vec::new();
    for (effective, rates) in &tables {
        for (i, bp) in rates.iter().enumerate() {
            rows.push(RateRow {
                rate_ref: rate_ref.clone(),
                effective: *effective,
                // Written as a spreadsheet shows it (2.1, not 2.10).
                percent: Decimal::new(*bp, 2).normalize(),
                tier_from: s
                    .tiered
                    .then(|| TIERS.get(i).map_or(Decimal::ZERO, |t| Decimal::from(*t))),
            });
        }
    }
    let schedule = RateSchedule::from_rows(rows.iter().map(|x| {
        (
            x.effective,
            percent_to_rate(x.percent),
            x.tier_from.unwrap_or(Decimal::ZERO),
        )
    }));
    Product {
        shelf: s.shelf,
        rate_ref,
        rows,
        schedule: Arc::new(schedule),
    }
}

/// The catalogue indices of a shelf's products.
pub(crate) fn shelf(products: &[Product], shelf: Shelf) -> Vec<usize> {
    products
        .iter()
        .enumerate()
        .filter(|(_, p)| p.shelf == shelf)
        .map(|(i, _)| i)
        .collect()
}

/// 2.1 (percent) as 0.021: the decimal point moves two places, as the reader
/// moves it, so the engine sees the very decimal a book gives it.
pub(crate) fn percent_to_rate(p: Decimal) -> Decimal {
    let mut d = p;
    match d.set_scale(p.scale().saturating_add(2)) {
        Ok(()) => d,
        Err(_) => p / Decimal::ONE_HUNDRED,
    }
}
