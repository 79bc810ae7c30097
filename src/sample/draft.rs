//! One sample account before the engine sees it: its family, terms, rate
//! product and movements, all drawn from the account's own random stream.
//!
//! Pure and cheap (no engine run), so that a book's sheet sizes can be
//! counted before anything is written. Nothing here writes or reads a file.

use std::sync::Arc;

use chrono::{Days, Months, NaiveDate};
use rust_decimal::Decimal;

use super::catalogue::{shelf, Product, Shelf};
use super::rng::Rng;
use super::{date, Calendars, RateRow, CUTOFF, MISTAKES_PER_MILLE};
use crate::book::{AccountEntry, GlCodes, Position};
use crate::conventions::calendar::BusinessDay;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::rounding::RoundMode;
use crate::conventions::schedule::{AnchorKind, Posting};
use crate::engine::{AccountTerms, Movement, RoundAt, Side, TierMethod};

/// An account before its statement is computed.
pub(crate) struct Draft {
    pub entry: AccountEntry,
    pub calendar: Option<&'static str>,
    /// The catalogue product it earns; `None`: rates of its own.
    pub product: Option<usize>,
    pub debit_product: Option<usize>,
    pub own_rates: Vec<RateRow>,
    pub movements: Vec<Movement>,
    /// The random stream of its planted mistake, when it gets one.
    pub plant: Option<u64>,
}

/// The kinds of account of the sample institution, with their share of the
/// book in accounts per thousand.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Family {
    Saver,
    Tiered,
    Loan,
    Term,
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
    Minor,
}

const FAMILIES: [(Family, u64); 15] = [
    (Family::Saver, 300),
    (Family::Tiered, 150),
    (Family::Loan, 150),
    (Family::Term, 100),
    (Family::Intercompany, 40),
    (Family::Euro, 60),
    (Family::Isda, 25),
    (Family::Icma, 25),
    (Family::NoLeap, 20),
    (Family::Act365L, 20),
    (Family::Continuous, 20),
    (Family::Long, 15),
    (Family::Real, 20),
    (Family::Current, 40),
    (Family::Minor, 15),
];

impl Family {
    fn code(self) -> &'static str {
        match self {
            Family::Saver => "SAV",
            Family::Tiered => "TSV",
            Family::Loan => "LN",
            Family::Term => "TD",
            Family::Intercompany => "IC",
            Family::Euro => "EUR",
            Family::Isda => "ISDA",
            Family::Icma => "ICMA",
            Family::NoLeap => "NL",
            Family::Act365L => "L",
            Family::Continuous => "CONT",
            Family::Long => "LTS",
            Family::Real => "BRL",
            Family::Current => "CHK",
            Family::Minor => "FX",
        }
    }

    fn pick(r: &mut Rng) -> Family {
        let total: u64 = FAMILIES.iter().map(|(_, w)| w).sum();
        let mut x = r.below(total);
        for (f, w) in FAMILIES {
            if x < w {
                return f;
            }
            x -= w;
        }
        Family::Saver
    }
}

/// Invented place names of the institution's town, for account names.
const PLACES: [&str; 16] = [
    "Marram Point",
    "Gull Street",
    "Quayside",
    "Lantern Row",
    "Tidewater",
    "Breakwater",
    "Pier Lane",
    "Saltmarsh",
    "Crabapple Court",
    "Dune Road",
    "Netmenders Yard",
    "Shingle Bank",
    "Rope Walk",
    "Kelp Hill",
    "Beacon Green",
    "Ferry Steps",
];

fn plus_days(d: NaiveDate, n: i64) -> NaiveDate {
    let step = Days::new(n.unsigned_abs());
    let moved = if n >= 0 {
        d.checked_add_days(step)
    } else {
        d.checked_sub_days(step)
    };
    moved.unwrap_or(d)
}

/// A day between `from` and `to` inclusive.
fn day_between(r: &mut Rng, from: NaiveDate, to: NaiveDate) -> NaiveDate {
    plus_days(from, r.between(0, (to - from).num_days()))
}

/// An amount of `units` whole currency units and random minor units.
fn money(r: &mut Rng, lo: i64, hi: i64, minor_units: u32) -> Decimal {
    let scale = 10i64.pow(minor_units);
    let whole = r.between(lo, hi);
    Decimal::new(
        whole.saturating_mul(scale) + r.between(0, scale - 1),
        minor_units,
    )
}

/// A balance spread over orders of magnitude: `lo` to `hi` whole units, as
/// real books are (many small, few large).
fn balance(r: &mut Rng, lo: i64, hi: i64, minor_units: u32) -> Decimal {
    let mut top = lo.max(1);
    let mut tops = Vec::new();
    while top < hi {
        top = top.saturating_mul(10).min(hi);
        tops.push(top);
    }
    let cap = r.pick(&tops).copied().unwrap_or(hi);
    money(r, lo, cap, minor_units)
}

struct Base {
    id: String,
    currency: &'static str,
    minor_units: u32,
    basis: Basis,
    open: NaiveDate,
    balance: Decimal,
}

fn terms(b: &Base) -> AccountTerms {
    AccountTerms::new(&b.id, b.currency, b.minor_units, b.basis, b.open, b.balance)
}

/// The opening of an account posting at month ends: 1 November, or for a
/// new account a day later in the month.
fn month_open(r: &mut Rng) -> NaiveDate {
    if r.chance(60) {
        day_between(r, date(2026, 11, 2), date(2026, 11, 25))
    } else {
        date(2026, 11, 1)
    }
}

/// How balances move in an account family.
#[derive(Clone, Copy)]
enum Flow {
    /// Deposits and withdrawals that keep the balance positive.
    Savings,
    /// Repayments, now and then a further drawing.
    Lending,
    /// Cheques and deposits that may overdraw.
    Current,
    /// Large drawings and repayments between group companies.
    Treasury,
    /// Fixed: no movements.
    Fixed,
}

fn movements(r: &mut Rng, flow: Flow, t: &AccountTerms, last: NaiveDate) -> Vec<Movement> {
    if matches!(flow, Flow::Fixed) {
        return Vec::new();
    }
    let count = r.below(7);
    let minor = t.minor_units;
    let size = t.opening_balance.abs();
    let scale = Decimal::new(1, minor);
    let mut out = Vec::new();
    let mut balance = t.opening_balance;
    let mut dates: Vec<NaiveDate> = (0..count)
        .map(|_| day_between(r, t.open_date, last))
        .collect();
    dates.sort_unstable();
    for (n, value_date) in dates.into_iter().enumerate() {
        // A share of the balance in per mille, as an amount of minor units.
        let share = |r: &mut Rng, lo: i64, hi: i64| {
            let per_mille = Decimal::from(r.between(lo, hi));
            let x = (size * per_mille / Decimal::ONE_THOUSAND).round_dp(minor);
            x.max(scale)
        };
        let (amount, kind) = match flow {
            Flow::Savings => {
                if r.chance(550) {
                    (money(r, 20, 3000, minor), "DEP")
                } else {
                    let w = share(r, 10, 300).min(balance.abs()).max(scale);
                    (-w, "WDL")
                }
            }
            Flow::Lending => {
                if r.chance(800) {
                    (-share(r, 8, 40), "REPAY")
                } else {
                    (share(r, 50, 200), "DRAW")
                }
            }
            Flow::Current => {
                if r.chance(500) {
                    (money(r, 50, 4000, minor), "DEP")
                } else {
                    (-share(r, 100, 900), "CHQ")
                }
            }
            Flow::Treasury => {
                let x = share(r, 20, 150);
                if r.chance(500) {
                    (x, "DRAW")
                } else {
                    (-x, "REPAY")
                }
            }
            Flow::Fixed => (Decimal::ZERO, "ADJ"),
        };
        balance += amount;
        // A few are booked after their value date (back-valued).
        let booking_date = if r.chance(50) {
            Some(plus_days(value_date, r.between(1, 4)).min(CUTOFF)).filter(|b| *b > value_date)
        } else {
            None
        };
        out.push(Movement {
            value_date,
            amount,
            booking_date,
            reference: Some(format!(
                "{kind}-{}{:02}-{}",
                value_date.format("%m%d"),
                n + 1,
                t.id.rsplit('-').next().unwrap_or_default()
            )),
        });
    }
    out
}

/// Draws account `index` of the book of `seed`.
pub(crate) fn draft(seed: u64, index: u64, products: &[Product], cals: &Calendars) -> Draft {
    let mut r = Rng::stream(seed, index.saturating_add(1));
    let family = Family::pick(&mut r);
    let id = format!("HM-{}-{:07}", family.code(), index.saturating_add(1));
    let place = r.pick(&PLACES).copied().unwrap_or("Harbour");
    let product_of = |r: &mut Rng, s: Shelf| r.pick(&shelf(products, s)).copied();
    let mut calendar = None;
    let mut debit_product = None;
    let mut own_rates = Vec::new();
    let mut flow = Flow::Savings;
    let mut last = CUTOFF;
    let (mut t, name, product, gl) = match family {
        Family::Saver => {
            let mut t = terms(&Base {
                id,
                currency: "GBP",
                minor_units: 2,
                basis: Basis::Act365F,
                open: month_open(&mut r),
                balance: balance(&mut r, 100, 250_000, 2),
            });
            t.compounding = Compounding::Daily;
            t.capitalise = true;
            (
                t,
                format!("{place} saver"),
                product_of(&mut r, Shelf::Saver),
                ("5110", "2210"),
            )
        }
        Family::Tiered => {
            let banded = r.chance(500);
            let mut t = terms(&Base {
                id,
                currency: "GBP",
                minor_units: 2,
                basis: Basis::Act365F,
                open: month_open(&mut r),
                balance: balance(&mut r, 1_000, 400_000, 2),
            });
            t.compounding = if r.chance(500) {
                Compounding::Monthly
            } else {
                Compounding::Simple
            };
            t.capitalise = true;
            t.tier_method = if banded {
                TierMethod::Banded
            } else {
                TierMethod::Whole
            };
            let s = if banded {
                Shelf::TierBanded
            } else {
                Shelf::TierWhole
            };
            (
                t,
                format!("{place} tiered saver"),
                product_of(&mut r, s),
                ("5120", "2210"),
            )
        }
        Family::Loan => {
            let open = if r.chance(50) {
                day_between(&mut r, date(2026, 10, 16), date(2026, 11, 10))
            } else {
                date(2026, 10, 15)
            };
            let mut t = terms(&Base {
                id,
                currency: "USD",
                minor_units: 2,
                basis: Basis::Act360,
                open,
                balance: balance(&mut r, 2_000, 600_000, 2),
            });
            t.side = Side::Asset;
            t.anchor = Some(date(2026, 1, 15));
            t.anchor_kind = AnchorKind::Payment;
            t.business_day = BusinessDay::ModifiedFollowing;
            t.calendar = Arc::clone(&cals.harbour);
            calendar = Some("HARBOUR");
            if r.chance(250) {
                t.round_at = RoundAt::Daily;
                t.round_mode = RoundMode::HalfEven;
                t.round_places = Some(4);
            }
            flow = Flow::Lending;
            (
                t,
                format!("{place} member loan"),
                product_of(&mut r, Shelf::Loan),
                ("4110", "1310"),
            )
        }
        Family::Term => {
            let euro = r.chance(300);
            let months = *r.pick(&[3u32, 6, 6, 12, 12, 24]).unwrap_or(&6);
            let maturity = day_between(&mut r, date(2026, 11, 2), date(2026, 12, 1));
            let open = maturity
                .checked_sub_months(Months::new(months))
                .unwrap_or(maturity);
            let (currency, basis) = if euro {
                ("EUR", Basis::Act360)
            } else {
                ("USD", Basis::Act365F)
            };
            let mut t = terms(&Base {
                id,
                currency,
                minor_units: 2,
                basis,
                open,
                balance: balance(&mut r, 5_000, 2_000_000, 2),
            });
            t.posting = Posting::Maturity;
            t.maturity = Some(maturity);
            if months > 12 {
                t.compounding = Compounding::Annual;
            }
            own_rates.push(RateRow {
                rate_ref: t.id.clone(),
                effective: open,
                percent: Decimal::new(r.between(250, 500), 2).normalize(),
                tier_from: None,
            });
            flow = Flow::Fixed;
            last = plus_days(maturity, -1);
            (
                t,
                "Harbourview fixed-term deposit".to_string(),
                None,
                ("5130", "2220"),
            )
        }
        Family::Intercompany => {
            let lend = r.chance(500);
            let mut t = terms(&Base {
                id,
                currency: "USD",
                minor_units: 2,
                basis: if r.chance(500) {
                    Basis::Thirty360
                } else {
                    Basis::Thirty360Us
                },
                open: date(2026, 9, 1),
                balance: balance(&mut r, 500_000, 20_000_000, 2),
            });
            t.posting = Posting::Quarterly;
            t.anchor = Some(date(2026, 11, 30));
            t.side = if lend { Side::Asset } else { Side::Liability };
            flow = Flow::Treasury;
            let (name, gl) = if lend {
                ("Loan to Harbourview Services Ltd", ("4210", "1320"))
            } else {
                (
                    "Borrowing from Harbourview Group Holdings",
                    ("5210", "2310"),
                )
            };
            (
                t,
                name.to_string(),
                product_of(&mut r, Shelf::Intercompany),
                gl,
            )
        }
        Family::Euro => {
            let mut t = terms(&Base {
                id,
                currency: "EUR",
                minor_units: 2,
                basis: if r.chance(500) {
                    Basis::Thirty360E
                } else {
                    Basis::Thirty360EIsda
                },
                open: month_open(&mut r),
                balance: balance(&mut r, 1_000, 5_000_000, 2),
            });
            if r.chance(500) {
                t.side = Side::Asset;
            }
            if r.chance(300) {
                t.round_mode = RoundMode::HalfEven;
            }
            (
                t,
                format!("{place} euro deposit"),
                product_of(&mut r, Shelf::Euro),
                ("5140", "2230"),
            )
        }
        Family::Isda => {
            let mut t = terms(&Base {
                id,
                currency: "USD",
                minor_units: 2,
                basis: Basis::ActActIsda,
                open: date(2026, 6, 1),
                balance: balance(&mut r, 50_000, 5_000_000, 2),
            });
            t.side = Side::Asset;
            t.compounding = Compounding::Quarterly;
            t.posting = Posting::Semiannual;
            t.anchor = Some(date(2026, 11, 30));
            t.capitalise = true;
            flow = Flow::Treasury;
            (
                t,
                "Dollar interbank placement".to_string(),
                product_of(&mut r, Shelf::Isda),
                ("4220", "1330"),
            )
        }
        Family::Icma => {
            let mut t = terms(&Base {
                id,
                currency: "USD",
                minor_units: 2,
                basis: Basis::ActActIcma,
                open: date(2026, 6, 1),
                balance: balance(&mut r, 10_000, 2_000_000, 2),
            });
            t.side = Side::Asset;
            t.posting = Posting::Semiannual;
            t.anchor = Some(date(2026, 11, 30));
            flow = Flow::Fixed;
            (
                t,
                "Harbour bond holding (semiannual)".to_string(),
                product_of(&mut r, Shelf::Icma),
                ("4230", "1340"),
            )
        }
        Family::NoLeap => {
            let t = terms(&Base {
                id,
                currency: "USD",
                minor_units: 2,
                basis: Basis::Nl365,
                open: month_open(&mut r),
                balance: balance(&mut r, 500, 300_000, 2),
            });
            (
                t,
                format!("{place} club deposit"),
                product_of(&mut r, Shelf::NoLeap),
                ("5150", "2240"),
            )
        }
        Family::Act365L => {
            let t = terms(&Base {
                id,
                currency: "GBP",
                minor_units: 2,
                basis: Basis::Act365L,
                open: month_open(&mut r),
                balance: balance(&mut r, 1_000, 500_000, 2),
            });
            (
                t,
                format!("{place} notice account"),
                product_of(&mut r, Shelf::Act365L),
                ("5160", "2210"),
            )
        }
        Family::Continuous => {
            let mut t = terms(&Base {
                id,
                currency: "USD",
                minor_units: 2,
                basis: Basis::Act365F,
                open: date(2026, 9, 1),
                balance: balance(&mut r, 10_000, 3_000_000, 2),
            });
            t.compounding = Compounding::Continuous;
            t.posting = Posting::Quarterly;
            t.anchor = Some(date(2026, 11, 30));
            flow = Flow::Fixed;
            (
                t,
                "Continuously compounded reserve".to_string(),
                product_of(&mut r, Shelf::Continuous),
                ("5170", "2250"),
            )
        }
        Family::Long => {
            let mut t = terms(&Base {
                id,
                currency: "GBP",
                minor_units: 2,
                basis: Basis::Act365F,
                open: date(2025, 12, 1),
                balance: balance(&mut r, 1_000, 200_000, 2),
            });
            t.compounding = if r.chance(500) {
                Compounding::Semiannual
            } else {
                Compounding::Annual
            };
            t.posting = Posting::Annual;
            t.anchor = Some(date(2026, 11, 30));
            t.capitalise = true;
            flow = Flow::Fixed;
            (
                t,
                format!("{place} long-term saver"),
                product_of(&mut r, Shelf::Long),
                ("5180", "2210"),
            )
        }
        Family::Real => {
            let mut t = terms(&Base {
                id,
                currency: "BRL",
                minor_units: 2,
                basis: Basis::Bus252,
                open: date(2026, 11, 1),
                balance: balance(&mut r, 10_000, 10_000_000, 2),
            });
            t.side = Side::Asset;
            t.compounding = Compounding::AnnualEffective;
            t.calendar = Arc::clone(&cals.brazil);
            calendar = Some("BR-2026");
            flow = Flow::Treasury;
            (
                t,
                "Real-denominated placement".to_string(),
                product_of(&mut r, Shelf::Real),
                ("4240", "1350"),
            )
        }
        Family::Current => {
            let t = terms(&Base {
                id,
                currency: "USD",
                minor_units: 2,
                basis: Basis::Act365F,
                open: month_open(&mut r),
                balance: balance(&mut r, 200, 40_000, 2),
            });
            debit_product = product_of(&mut r, Shelf::Overdraft);
            flow = Flow::Current;
            (
                t,
                format!("{place} current account"),
                product_of(&mut r, Shelf::Current),
                ("5190", "2260"),
            )
        }
        Family::Minor => {
            let yen = r.chance(500);
            let t = if yen {
                terms(&Base {
                    id,
                    currency: "JPY",
                    minor_units: 0,
                    basis: Basis::Act365F,
                    open: month_open(&mut r),
                    balance: balance(&mut r, 100_000, 90_000_000, 0),
                })
            } else {
                terms(&Base {
                    id,
                    currency: "KWD",
                    minor_units: 3,
                    basis: Basis::Act360,
                    open: month_open(&mut r),
                    balance: balance(&mut r, 500, 900_000, 3),
                })
            };
            let (name, s) = if yen {
                ("Yen settlement deposit", Shelf::Yen)
            } else {
                ("Dinar call deposit", Shelf::Dinar)
            };
            (t, name.to_string(), product_of(&mut r, s), ("5200", "2270"))
        }
    };
    if t.round_at == RoundAt::Posting && r.chance(100) {
        t.round_mode = RoundMode::HalfEven;
    }
    if calendar.is_none() {
        t.calendar = Arc::clone(&cals.weekends);
    }
    let moves = movements(&mut r, flow, &t, last);
    let rate_ref = product
        .and_then(|p| products.get(p))
        .map_or_else(|| t.id.clone(), |p| p.rate_ref.clone());
    let debit_rate_ref = debit_product
        .and_then(|p| products.get(p))
        .map(|p| p.rate_ref.clone());
    let plant = r.chance(MISTAKES_PER_MILLE).then(|| r.next_u64());
    Draft {
        entry: AccountEntry {
            name,
            rate_ref,
            debit_rate_ref,
            gl: GlCodes {
                interest: Some(gl.0.to_string()),
                accrued: Some(gl.1.to_string()),
                settlement: None,
            },
            position: Position::default(),
            terms: t,
        },
        calendar,
        product,
        debit_product,
        own_rates,
        movements: moves,
        plant,
    }
}
