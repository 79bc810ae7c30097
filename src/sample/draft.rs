//! One sample account before the engine sees it: its family, terms, rate
//! product and movements, all drawn from the account's own random stream.
//!
//! Pure and cheap (no engine run), so that a book's sheet sizes can be
//! counted before anything is written. Nothing here writes or reads a file.

use std::sync::Arc;

use chrono::{Days, Months, NaiveDate};
use rust_decimal::Decimal;

use super::catalogue::{shelf, Product, Shelf};
use super::life::{self, LifeKind};
use super::rng::Rng;
use super::tax::{Taxable, Taxes, NET_POSTINGS_PER_MILLE};
use super::{
    date, Calendars, RateRow, BOOKED_MISTAKES_PER_MILLE, CUTOFF, LATE_BOOKINGS_PER_MILLE,
    MISTAKES_PER_MILLE, WINDOW_START,
};
use crate::book::{AccountEntry, GlCodes};
use crate::conventions::calendar::BusinessDay;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::rounding::RoundMode;
use crate::conventions::schedule::{AnchorKind, Posting};
use crate::engine::{AccountTerms, Movement, RoundAt, Side, TierMethod};
use crate::problem::RowPosition;

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
    /// Whether the core system's open item at the cut-off is on the Booked
    /// sheet: a term deposit or loan in the middle of its posting period.
    pub booked_close: bool,
    /// The random stream of the day-off planted in that Booked row, when
    /// it gets one.
    pub booked_plant: Option<u64>,
    /// Its life event, if any (set on its terms).
    pub life: Option<LifeKind>,
    /// Whether its statement is planted net of tax, and if so whether at
    /// the rate no longer in force (`true`) or the one in force.
    pub net_plant: Option<bool>,
}

/// The kinds of account of the sample institution.
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
    Yen,
    Dinar,
    /// A term deposit running past the cut-off: nothing posts in November.
    TermRunning,
    /// A business loan posting quarterly, in the middle of its quarter at
    /// the cut-off.
    QuarterlyLoan,
}

impl Family {
    /// Whether the family's accounts are in the middle of a posting period
    /// at the cut-off, with no statement row in the window: the core
    /// system's accrued interest at the cut-off is checked on the Booked
    /// sheet instead (behaviour.md, System accrued check).
    fn booked_at_cutoff(self) -> bool {
        matches!(self, Family::TermRunning | Family::QuarterlyLoan)
    }
}

/// When an account of a family opened.
#[derive(Debug, Clone, Copy)]
enum Open {
    /// On 1 November, or for a new account later in the month.
    Month,
    /// On this day (accounts posting quarterly, half-yearly or yearly, brought
    /// in at the start of the period that ends in November).
    On(NaiveDate),
    /// On 15 October, the last payment day, or for a new loan a day later.
    Loan,
    /// A term before its maturity in November.
    Term,
    /// A term opened before the window that matures after the cut-off.
    Running,
}

/// What an account of a family looks like; draws pick among the choices.
struct Spec {
    family: Family,
    code: &'static str,
    /// The family's weight: accounts per 1,050 of the book (the sixteen
    /// families with a posting in November weigh 1,000, the two in the
    /// middle of a posting period at the cut-off 50).
    weight: u64,
    currency: &'static str,
    minor_units: u32,
    bases: &'static [Basis],
    compounding: &'static [Compounding],
    posting: Posting,
    anchor: Option<NaiveDate>,
    open: Open,
    /// Whole currency units, spread over orders of magnitude.
    balance: (i64, i64),
    /// Chance of the asset side, per thousand.
    asset: u64,
    capitalise: bool,
    /// The rate products it earns; `None`: a rate of its own.
    shelf: Option<Shelf>,
    flow: Flow,
    /// The account's name; `{}` stands for a place of the town.
    name: &'static str,
    gl: (&'static str, &'static str),
}

const SIMPLE: &[Compounding] = &[Compounding::Simple];
const NOV_30: Option<NaiveDate> = Some(date(2026, 11, 30));

const SPECS: [Spec; 18] = [
    Spec {
        family: Family::Saver,
        code: "SAV",
        weight: 300,
        currency: "GBP",
        minor_units: 2,
        bases: &[Basis::Act365F],
        compounding: &[Compounding::Daily],
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (100, 250_000),
        asset: 0,
        capitalise: true,
        shelf: Some(Shelf::Saver),
        flow: Flow::Savings,
        name: "{} saver",
        gl: ("5110", "2210"),
    },
    Spec {
        family: Family::Tiered,
        code: "TSV",
        weight: 150,
        currency: "GBP",
        minor_units: 2,
        bases: &[Basis::Act365F],
        compounding: &[Compounding::Simple, Compounding::Monthly],
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (1_000, 400_000),
        asset: 0,
        capitalise: true,
        shelf: Some(Shelf::TierWhole),
        flow: Flow::Savings,
        name: "{} tiered saver",
        gl: ("5120", "2210"),
    },
    Spec {
        family: Family::Loan,
        code: "LN",
        weight: 150,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Act360],
        compounding: SIMPLE,
        posting: Posting::Monthly,
        anchor: Some(date(2026, 1, 15)),
        open: Open::Loan,
        balance: (2_000, 600_000),
        asset: 1000,
        capitalise: false,
        shelf: Some(Shelf::Loan),
        flow: Flow::Lending,
        name: "{} member loan",
        gl: ("4110", "1310"),
    },
    Spec {
        family: Family::Term,
        code: "TD",
        weight: 100,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Act365F],
        compounding: SIMPLE,
        posting: Posting::Maturity,
        anchor: None,
        open: Open::Term,
        balance: (5_000, 2_000_000),
        asset: 0,
        capitalise: false,
        shelf: None,
        flow: Flow::Fixed,
        name: "Harbourview fixed-term deposit",
        gl: ("5130", "2220"),
    },
    Spec {
        family: Family::Intercompany,
        code: "IC",
        weight: 40,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Thirty360, Basis::Thirty360Us],
        compounding: SIMPLE,
        posting: Posting::Quarterly,
        anchor: NOV_30,
        open: Open::On(date(2026, 9, 1)),
        balance: (500_000, 20_000_000),
        asset: 500,
        capitalise: false,
        shelf: Some(Shelf::Intercompany),
        flow: Flow::Treasury,
        name: "Borrowing from Harbourview Group Holdings",
        gl: ("5210", "2310"),
    },
    Spec {
        family: Family::Euro,
        code: "EUR",
        weight: 60,
        currency: "EUR",
        minor_units: 2,
        bases: &[Basis::Thirty360E, Basis::Thirty360EIsda],
        compounding: SIMPLE,
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (1_000, 5_000_000),
        asset: 500,
        capitalise: false,
        shelf: Some(Shelf::Euro),
        flow: Flow::Savings,
        name: "{} euro deposit",
        gl: ("5140", "2230"),
    },
    Spec {
        family: Family::Isda,
        code: "ISDA",
        weight: 25,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::ActActIsda],
        compounding: &[Compounding::Quarterly],
        posting: Posting::Semiannual,
        anchor: NOV_30,
        open: Open::On(date(2026, 6, 1)),
        balance: (50_000, 5_000_000),
        asset: 1000,
        capitalise: true,
        shelf: Some(Shelf::Isda),
        flow: Flow::Treasury,
        name: "Dollar interbank placement",
        gl: ("4220", "1330"),
    },
    Spec {
        family: Family::Icma,
        code: "ICMA",
        weight: 25,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::ActActIcma],
        compounding: SIMPLE,
        posting: Posting::Semiannual,
        anchor: NOV_30,
        open: Open::On(date(2026, 6, 1)),
        balance: (10_000, 2_000_000),
        asset: 1000,
        capitalise: false,
        shelf: Some(Shelf::Icma),
        flow: Flow::Fixed,
        name: "Harbour bond holding (semiannual)",
        gl: ("4230", "1340"),
    },
    Spec {
        family: Family::NoLeap,
        code: "NL",
        weight: 20,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Nl365],
        compounding: SIMPLE,
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (500, 300_000),
        asset: 0,
        capitalise: false,
        shelf: Some(Shelf::NoLeap),
        flow: Flow::Savings,
        name: "{} club deposit",
        gl: ("5150", "2240"),
    },
    Spec {
        family: Family::Act365L,
        code: "L",
        weight: 20,
        currency: "GBP",
        minor_units: 2,
        bases: &[Basis::Act365L],
        compounding: SIMPLE,
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (1_000, 500_000),
        asset: 0,
        capitalise: false,
        shelf: Some(Shelf::Act365L),
        flow: Flow::Savings,
        name: "{} notice account",
        gl: ("5160", "2210"),
    },
    Spec {
        family: Family::Continuous,
        code: "CONT",
        weight: 20,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Act365F],
        compounding: &[Compounding::Continuous],
        posting: Posting::Quarterly,
        anchor: NOV_30,
        open: Open::On(date(2026, 9, 1)),
        balance: (10_000, 3_000_000),
        asset: 0,
        capitalise: false,
        shelf: Some(Shelf::Continuous),
        flow: Flow::Fixed,
        name: "Continuously compounded reserve",
        gl: ("5170", "2250"),
    },
    Spec {
        family: Family::Long,
        code: "LTS",
        weight: 15,
        currency: "GBP",
        minor_units: 2,
        bases: &[Basis::Act365F],
        compounding: &[Compounding::Semiannual, Compounding::Annual],
        posting: Posting::Annual,
        anchor: NOV_30,
        open: Open::On(date(2025, 12, 1)),
        balance: (1_000, 200_000),
        asset: 0,
        capitalise: true,
        shelf: Some(Shelf::Long),
        flow: Flow::Fixed,
        name: "{} long-term saver",
        gl: ("5180", "2210"),
    },
    Spec {
        family: Family::Real,
        code: "BRL",
        weight: 20,
        currency: "BRL",
        minor_units: 2,
        bases: &[Basis::Bus252],
        compounding: &[Compounding::AnnualEffective],
        posting: Posting::Monthly,
        anchor: None,
        open: Open::On(date(2026, 11, 1)),
        balance: (10_000, 10_000_000),
        asset: 1000,
        capitalise: false,
        shelf: Some(Shelf::Real),
        flow: Flow::Treasury,
        name: "Real-denominated placement",
        gl: ("4240", "1350"),
    },
    Spec {
        family: Family::Current,
        code: "CHK",
        weight: 40,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Act365F],
        compounding: SIMPLE,
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (200, 40_000),
        asset: 0,
        capitalise: false,
        shelf: Some(Shelf::Current),
        flow: Flow::Current,
        name: "{} current account",
        gl: ("5190", "2260"),
    },
    Spec {
        family: Family::Yen,
        code: "JPY",
        weight: 8,
        currency: "JPY",
        minor_units: 0,
        bases: &[Basis::Act365F],
        compounding: SIMPLE,
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (100_000, 90_000_000),
        asset: 0,
        capitalise: false,
        shelf: Some(Shelf::Yen),
        flow: Flow::Savings,
        name: "Yen settlement deposit",
        gl: ("5200", "2270"),
    },
    Spec {
        family: Family::Dinar,
        code: "KWD",
        weight: 7,
        currency: "KWD",
        minor_units: 3,
        bases: &[Basis::Act360],
        compounding: SIMPLE,
        posting: Posting::Monthly,
        anchor: None,
        open: Open::Month,
        balance: (500, 900_000),
        asset: 0,
        capitalise: false,
        shelf: Some(Shelf::Dinar),
        flow: Flow::Savings,
        name: "Dinar call deposit",
        gl: ("5200", "2270"),
    },
    Spec {
        family: Family::TermRunning,
        code: "FTD",
        weight: 30,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Act365F],
        compounding: SIMPLE,
        posting: Posting::Maturity,
        anchor: None,
        open: Open::Running,
        balance: (5_000, 2_000_000),
        asset: 0,
        capitalise: false,
        shelf: None,
        flow: Flow::Fixed,
        name: "Harbourview fixed-term deposit",
        gl: ("5130", "2220"),
    },
    Spec {
        family: Family::QuarterlyLoan,
        code: "QLN",
        weight: 20,
        currency: "USD",
        minor_units: 2,
        bases: &[Basis::Act360],
        compounding: SIMPLE,
        posting: Posting::Quarterly,
        anchor: Some(date(2026, 12, 31)),
        open: Open::On(date(2026, 7, 1)),
        balance: (20_000, 3_000_000),
        asset: 1000,
        capitalise: false,
        shelf: Some(Shelf::Loan),
        flow: Flow::Lending,
        name: "{} business loan",
        gl: ("4120", "1310"),
    },
];

fn pick_spec(r: &mut Rng) -> &'static Spec {
    let total: u64 = SPECS.iter().map(|s| s.weight).sum();
    let mut x = r.below(total);
    for s in &SPECS {
        if x < s.weight {
            return s;
        }
        x -= s.weight;
    }
    &SPECS[0]
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

pub(super) fn plus_days(d: NaiveDate, n: i64) -> NaiveDate {
    let step = Days::new(n.unsigned_abs());
    let moved = if n >= 0 {
        d.checked_add_days(step)
    } else {
        d.checked_sub_days(step)
    };
    moved.unwrap_or(d)
}

/// A day between `from` and `to` inclusive.
pub(super) fn day_between(r: &mut Rng, from: NaiveDate, to: NaiveDate) -> NaiveDate {
    plus_days(from, r.between(0, (to - from).num_days()))
}

/// An amount of `units` whole currency units and random minor units.
pub(super) fn money(r: &mut Rng, lo: i64, hi: i64, minor_units: u32) -> Decimal {
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

/// A share of `size` of `lo` to `hi` per mille, in whole minor units, at
/// least one minor unit.
fn share(r: &mut Rng, size: Decimal, minor_units: u32, lo: i64, hi: i64) -> Decimal {
    let per_mille = Decimal::from(r.between(lo, hi));
    let x = (size * per_mille / Decimal::ONE_THOUSAND).round_dp(minor_units);
    x.max(Decimal::new(1, minor_units))
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
        let share = |r: &mut Rng, lo: i64, hi: i64| share(r, size, minor, lo, hi);
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
            reference: Some(reference(kind, value_date, n + 1, &t.id).into()),
        });
    }
    out
}

/// A movement's reference: its kind, value date (month and day), number
/// in the account and the account's serial number.
pub(super) fn reference(kind: &str, value_date: NaiveDate, n: usize, id: &str) -> String {
    format!(
        "{kind}-{}{n:02}-{}",
        value_date.format("%m%d"),
        id.rsplit('-').next().unwrap_or_default()
    )
}

/// The first and last day a movement booked after the previous close is
/// booked on: a few days into the window, after `previous_as_at`.
const LATE_BOOKED: (NaiveDate, NaiveDate) = (date(2026, 11, 3), date(2026, 11, 10));

/// A movement valued in the month before the window and booked after the
/// previous close (behaviour.md, The booked opening): the previous close
/// did not know it, so its interest for the October days is the November
/// run's prior-period adjustment. `None` for an account that opened in the
/// window or has no movements. Its number in the account is 00, which no
/// other movement has.
fn booked_late(r: &mut Rng, flow: Flow, t: &AccountTerms) -> Option<Movement> {
    let eve = plus_days(WINDOW_START, -1);
    let first = t.open_date.max(date(2026, 10, 1));
    if first > eve {
        return None;
    }
    let (size, minor) = (t.opening_balance.abs(), t.minor_units);
    let (amount, kind) = match flow {
        Flow::Fixed => return None,
        Flow::Lending => (-share(r, size, minor, 8, 40), "REPAY"),
        Flow::Treasury => {
            let x = share(r, size, minor, 20, 150);
            if r.chance(500) {
                (x, "DRAW")
            } else {
                (-x, "REPAY")
            }
        }
        Flow::Savings | Flow::Current => (money(r, 20, 3000, minor), "DEP"),
    };
    let value_date = day_between(r, first, eve);
    let booking_date = day_between(r, LATE_BOOKED.0, LATE_BOOKED.1);
    Some(Movement {
        value_date,
        amount,
        booking_date: Some(booking_date),
        reference: Some(reference(kind, value_date, 0, &t.id).into()),
    })
}

/// Draws account `index` of the book of `seed`: its family and name, its
/// opening, its terms, what its family adds, its rate product and its
/// movements, in that order from the account's own stream.
pub(crate) fn draft(
    seed: u64,
    index: u64,
    products: &[Product],
    cals: &Calendars,
    taxes: &Taxes,
) -> Draft {
    let mut r = Rng::stream(seed, index.saturating_add(1));
    let spec = pick_spec(&mut r);
    let id = format!("HM-{}-{:07}", spec.code, index.saturating_add(1));
    let place = r.pick(&PLACES).copied().unwrap_or("Harbour");
    let basis = r.pick(spec.bases).copied().unwrap_or(Basis::Act365F);
    let (open, maturity) = opening(&mut r, spec.open);
    let mut t = spec_terms(&mut r, spec, &id, basis, open, cals);
    let mut more = Particulars {
        name: spec.name.replace("{}", place),
        gl: spec.gl,
        shelf: spec.shelf,
        calendar: None,
        debit_product: None,
        own_rates: Vec::new(),
        last: CUTOFF,
    };
    family_terms(
        &mut r,
        spec.family,
        &mut t,
        &mut more,
        maturity,
        products,
        cals,
    );
    let product = more.shelf.and_then(|s| product_of(&mut r, products, s));
    if t.round_at == RoundAt::Posting && r.chance(100) {
        t.round_mode = RoundMode::HalfEven;
    }
    let mut moves = movements(&mut r, spec.flow, &t, more.last);
    let rate_ref = product
        .and_then(|p| products.get(p))
        .map_or_else(|| t.id.clone(), |p| p.rate_ref.clone());
    let debit_rate_ref = more
        .debit_product
        .and_then(|p| products.get(p))
        .map(|p| p.rate_ref.clone());
    let plant = r.chance(MISTAKES_PER_MILLE).then(|| r.next_u64());
    // The ledger side draws last, so the draws above stay as they were.
    if r.chance(LATE_BOOKINGS_PER_MILLE) {
        if let Some(late) = booked_late(&mut r, spec.flow, &t) {
            let at = moves.partition_point(|m| m.value_date <= late.value_date);
            moves.insert(at, late);
        }
    }
    let booked_close = spec.family.booked_at_cutoff();
    let booked_plant = (booked_close && r.chance(BOOKED_MISTAKES_PER_MILLE)).then(|| r.next_u64());
    // Life events and tax draw after the ledger side, so the accounts
    // without them stay as they were.
    let life = match spec.family {
        Family::Saver => life::saver(&mut r, &mut t, &mut moves),
        Family::Term => life::term(&mut r, &mut t, products),
        _ => None,
    };
    let taxable = match spec.family {
        Family::Saver if life.is_none() => Some(Taxable::Saver),
        Family::Intercompany if t.side == Side::Asset => Some(Taxable::Treaty),
        _ => None,
    };
    t.tax = taxable.and_then(|x| taxes.draw(&mut r, x));
    let net_plant = (t.tax.is_some() && r.chance(NET_POSTINGS_PER_MILLE)).then(|| r.chance(500));
    // A life event's account or a statement posted net of tax gets no
    // other mistake.
    let plant = plant.filter(|_| life.is_none() && net_plant.is_none());
    Draft {
        entry: AccountEntry {
            name: more.name,
            rate_ref,
            debit_rate_ref,
            gl: GlCodes {
                interest: Some(more.gl.0.to_string()),
                accrued: Some(more.gl.1.to_string()),
                settlement: None,
                prior_period: None,
                tax: None,
                suspense: None,
                reversal: None,
            }
            .into(),
            position: RowPosition::default(),
            terms: t,
            opening_suspense: Decimal::ZERO,
        },
        calendar: more.calendar,
        product,
        debit_product: more.debit_product,
        own_rates: more.own_rates,
        movements: moves,
        plant,
        booked_close,
        booked_plant,
        life,
        net_plant,
    }
}

/// The day an account opens and, for a term, its maturity and term in
/// months.
fn opening(r: &mut Rng, open: Open) -> (NaiveDate, Option<(NaiveDate, u32)>) {
    match open {
        Open::Month => (month_open(r), None),
        Open::On(d) => (d, None),
        Open::Loan if r.chance(50) => {
            (day_between(r, date(2026, 10, 16), date(2026, 11, 10)), None)
        }
        Open::Loan => (date(2026, 10, 15), None),
        Open::Term => {
            let months = *r.pick(&[3u32, 6, 6, 12, 12, 24]).unwrap_or(&6);
            let m = day_between(r, date(2026, 11, 2), date(2026, 12, 1));
            let open = m.checked_sub_months(Months::new(months)).unwrap_or(m);
            (open, Some((m, months)))
        }
        Open::Running => {
            // Maturity on 2 December or later, so its posting ends after
            // the cut-off; opened before the window, at most a year before.
            let months = *r.pick(&[3u32, 6, 6, 12, 12, 24]).unwrap_or(&6);
            let first_maturity = date(2026, 12, 2);
            let earliest = first_maturity
                .checked_sub_months(Months::new(months))
                .unwrap_or(first_maturity)
                .max(date(2025, 12, 1));
            let open = day_between(r, earliest, date(2026, 10, 31));
            let m = open
                .checked_add_months(Months::new(months))
                .unwrap_or(first_maturity)
                .max(first_maturity);
            (open, Some((m, months)))
        }
    }
}

/// The terms every account of a spec has: its opening balance, one of its
/// compounding rules, its posting, and its side.
fn spec_terms(
    r: &mut Rng,
    spec: &Spec,
    id: &str,
    basis: Basis,
    open: NaiveDate,
    cals: &Calendars,
) -> AccountTerms {
    let balance = balance(r, spec.balance.0, spec.balance.1, spec.minor_units);
    let mut t = AccountTerms::new(id, spec.currency, spec.minor_units, basis, open, balance);
    t.compounding = r.pick(spec.compounding).copied().unwrap_or_default();
    t.posting = spec.posting;
    t.anchor = spec.anchor;
    t.capitalise = spec.capitalise;
    t.calendar = Arc::clone(&cals.weekends);
    if r.chance(spec.asset) {
        t.side = Side::Asset;
    }
    t
}

/// What an account holds beyond its terms, as its family makes it.
struct Particulars {
    name: String,
    /// Interest and accrued GL codes.
    gl: (&'static str, &'static str),
    /// The rate products it earns; `None`: rates of its own.
    shelf: Option<Shelf>,
    /// The calendar named on its row.
    calendar: Option<&'static str>,
    debit_product: Option<usize>,
    own_rates: Vec<RateRow>,
    /// The last day a movement may take value.
    last: NaiveDate,
}

/// The terms and particulars that set a family apart: banded tiers, a
/// loan's payment dates and calendar, a term's maturity and own rate, and
/// so on.
fn family_terms(
    r: &mut Rng,
    family: Family,
    t: &mut AccountTerms,
    more: &mut Particulars,
    maturity: Option<(NaiveDate, u32)>,
    products: &[Product],
    cals: &Calendars,
) {
    match family {
        Family::Tiered if r.chance(500) => {
            t.tier_method = TierMethod::Banded;
            more.shelf = Some(Shelf::TierBanded);
        }
        Family::Loan => {
            t.anchor_kind = AnchorKind::Payment;
            t.business_day = BusinessDay::ModifiedFollowing;
            t.calendar = Arc::clone(&cals.harbour);
            more.calendar = Some("HARBOUR");
            if r.chance(250) {
                t.round_at = RoundAt::Daily;
                t.round_mode = RoundMode::HalfEven;
                t.round_places = Some(4);
            }
        }
        Family::Term | Family::TermRunning => {
            if r.chance(300) {
                t.currency = "EUR".to_string();
                t.basis = Basis::Act360;
            }
            if let Some((m, months)) = maturity {
                t.maturity = Some(m);
                more.last = plus_days(m, -1);
                if months > 12 {
                    t.compounding = Compounding::Annual;
                }
            }
            more.own_rates.push(RateRow {
                rate_ref: t.id.clone(),
                effective: t.open_date,
                percent: Decimal::new(r.between(250, 500), 2).normalize(),
                tier_from: None,
            });
        }
        Family::Intercompany if t.side == Side::Asset => {
            more.name = "Loan to Harbourview Services Ltd".to_string();
            more.gl = ("4210", "1320");
        }
        Family::Euro => {
            if r.chance(300) {
                t.round_mode = RoundMode::HalfEven;
            }
            // Interest receivable and payable are separate GL accounts.
            if t.side == Side::Asset {
                more.gl = ("4250", "1360");
            }
        }
        Family::Real => {
            t.calendar = Arc::clone(&cals.brazil);
            more.calendar = Some("BR-2026");
        }
        Family::Current => more.debit_product = product_of(r, products, Shelf::Overdraft),
        _ => {}
    }
}

fn product_of(r: &mut Rng, products: &[Product], s: Shelf) -> Option<usize> {
    r.pick(&shelf(products, s)).copied()
}
