//! Synthetic account books of any size: the month end of Harbourview Mutual,
//! an invented credit union, closing November 2026.
//!
//! A [`Generator`] makes the rows of every sheet of a book (Accounts, Rates,
//! Movements, Statements, Booked, Trial balance, Holidays, Settings, Tax) from a
//! seed and a number of accounts. The mix is meant to look like a real book:
//! every day-count basis and every compounding rule the engine supports,
//! whole and banded tiers, 0 to 6 movements and 0 to 2 rate changes per
//! account, and one statement row per account for its posting period that
//! ends in the November window. The statement amounts come from the engine
//! itself ([`crate::pipeline::run_account`] on the generated account), then
//! about 2% of them get a planted mistake of a kind the likely-cause search
//! knows ([`MistakeKind`]).
//!
//! The ledger side ([`ledger`]): about 1 account in 200 has a movement valued
//! in October and booked after the October close (Settings
//! `previous_as_at`), so the run books a prior-period adjustment for it; the
//! Trial balance sheet holds, per accrued-interest GL account, the sum of the
//! accounts' booked openings, so the run's Tie-out agrees; and term deposits
//! and quarterly loans in the middle of their posting period (no statement
//! row in November) have the core system's open item at the cut-off on the
//! Booked sheet, about 15% of them a day of interest off ([`BookedMistake`]).
//!
//! Life events and tax (`life.rs`, `tax.rs`): about 2% of the accounts have a
//! life event ([`LifeKind`]: savers closed in the month, their payout on
//! the close date being the run's own figure; term deposits broken early
//! with each penalty kind, matured unpaid, earning a rate after maturity or
//! rolled over), and about 4% name a tax_ref of the Tax sheet, about 8% of
//! their statement rows planted posted net of tax. They draw last in each
//! account's stream, so every other account is as it was.
//!
//! Pure generation: this module never writes a file, reads the clock or asks
//! the operating system for randomness. Each account draws from its own
//! stream of a small deterministic generator ([`rng::Rng`]) mixed from the
//! seed and the account's number, so the same seed always gives the same rows
//! whatever the order or the thread count; writing them is the report layer's
//! ([`crate::report::book_writer`]). Every name and figure is invented.

mod catalogue;
mod draft;
pub mod ledger;
mod life;
mod plant;
pub mod rng;
mod tax;

use std::collections::{BTreeMap, BTreeSet};
use std::ops::Range;
use std::sync::Arc;

use chrono::NaiveDate;
use rayon::prelude::*;
use rust_decimal::Decimal;

use crate::batch::journal::ResolvedGl;
use crate::book::AccountEntry;
use crate::conventions::calendar::Calendar;
use crate::engine::events::{AfterMaturity, BreakPenalty, PenaltyLimit};
use crate::engine::floating::{FixingFallback, Fixings};
use crate::engine::ledger::SettlementLines;
use crate::engine::rates::RateSchedule;
use crate::engine::reconcile::Tolerance;
use crate::engine::{EngineError, Movement, RoundAt, TierMethod};
use crate::pipeline::{run_account, BookAccount, Options};
use crate::report::book_writer::Value;
use crate::schema::{layout, Layout, SheetKind, ACCOUNTS, MOVEMENTS, RATES, STATEMENTS};

use catalogue::Product;
use draft::Draft;
pub use ledger::{
    BookedMistake, MixedSides, OpeningBalances, SampleBooked, SampleLedger, OPENING_DAY,
    PREVIOUS_AS_AT,
};
pub use life::{LifeKind, SAVER_CLOSES_PER_MILLE, TERM_EVENTS_PER_MILLE};
pub use plant::{Mistake, MistakeKind};
use tax::Taxes;
pub use tax::{NET_POSTINGS_PER_MILLE, TAXED_SAVERS_PER_MILLE, TREATY_LOANS_PER_MILLE};

/// The cut-off of the sample books (the Settings sheet's `cutoff`).
pub const CUTOFF: NaiveDate = date(2026, 11, 30);

/// The first day of the window: the cut-off's month.
pub const WINDOW_START: NaiveDate = date(2026, 11, 1);

/// The entity booking the journal (the Settings sheet's `entity`).
pub const ENTITY: &str = "HARBOURVIEW-MUTUAL";

/// How many accounts in a thousand get a planted statement mistake.
pub const MISTAKES_PER_MILLE: u64 = 20;

/// How many in a thousand of the accounts open before the window, with
/// movements, get one more movement valued in October and booked after the
/// previous close (about a quarter of the book is such an account: about 1
/// account in 200).
pub const LATE_BOOKINGS_PER_MILLE: u64 = 20;

/// How many in a thousand of the Booked rows at the cut-off are planted a
/// day of interest off.
pub const BOOKED_MISTAKES_PER_MILLE: u64 = 150;

/// A date known to exist; `NaiveDate::MIN` would only stand in for a typo in
/// this file, and the tests read every constant back.
const fn date(y: i32, m: u32, d: u32) -> NaiveDate {
    match NaiveDate::from_ymd_opt(y, m, d) {
        Some(x) => x,
        None => NaiveDate::MIN,
    }
}

fn text(s: &str) -> Value {
    Value::Text(s.to_string())
}

fn opt_date(d: Option<NaiveDate>) -> Value {
    d.map_or(Value::Empty, Value::Date)
}

/// The sheets of a generated book, in book order, each with the columns its
/// rows fill, in their order (the row builders below make the cells in it).
///
/// ```
/// use ledgerate::schema::SheetKind;
/// use ledgerate::sample::SHEETS;
/// assert_eq!(SHEETS[3].sheet, SheetKind::Statements);
/// assert_eq!(SHEETS[3].labels()[3], "posted_interest");
/// assert_eq!(SHEETS[5].labels(), ["entity", "currency", "gl_account", "date", "balance"]);
/// ```
pub const SHEETS: [Layout; 9] = [
    layout!(
        ACCOUNTS,
        "account",
        "name",
        "currency",
        "side",
        "day_count",
        "compounding",
        "posting",
        "posting_anchor",
        "anchor_kind",
        "capitalise",
        "round_at",
        "round_mode",
        "round_places",
        "maturity",
        "open_date",
        "opening_balance",
        "rate_ref",
        "debit_rate_ref",
        "tier_method",
        "calendar",
        "business_day",
        "gl_interest",
        "gl_accrued",
        "tax_ref",
        "close_date",
        "break_penalty",
        "break_days",
        "break_rate_ref",
        "break_amount",
        "penalty_limit",
        "after_maturity",
        "matured_rate_ref",
        "rollover_months",
        "rollover_rate_ref",
    ),
    layout!(RATES, "rate_ref", "effective", "rate_percent", "tier_from"),
    layout!(
        MOVEMENTS,
        "account",
        "value_date",
        "amount",
        "booking_date",
        "reference"
    ),
    layout!(
        STATEMENTS,
        "account",
        "period_start",
        "period_end",
        "posted_interest",
        "reference"
    ),
    Layout::every(SheetKind::Booked),
    Layout::every(SheetKind::TrialBalance),
    Layout::every(SheetKind::Holidays),
    Layout::every(SheetKind::Settings),
    Layout::every(SheetKind::Tax),
];

/// One row of the Rates sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RateRow {
    /// The schedule it belongs to.
    pub rate_ref: String,
    /// The first day of its table.
    pub effective: NaiveDate,
    /// The annual rate in percent (2.10 for 2.10%).
    pub percent: Decimal,
    /// The tier threshold, for tiered tables.
    pub tier_from: Option<Decimal>,
}

impl RateRow {
    /// The row's cells.
    pub fn cells(&self) -> Vec<Value> {
        vec![
            Value::Text(self.rate_ref.clone()),
            Value::Date(self.effective),
            Value::Number(self.percent),
            self.tier_from.map_or(Value::Empty, Value::Number),
        ]
    }
}

/// The statement row of an account: what the institution posted for one
/// posting period ending in the window.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SampleStatement {
    /// First day of the period.
    pub start: NaiveDate,
    /// Last day of the period.
    pub end: NaiveDate,
    /// What the row says was posted (the expected amount unless a mistake was planted).
    pub posted: Decimal,
    /// What the engine expects for the period.
    pub expected: Decimal,
    /// The statement's reference.
    pub reference: String,
}

/// One generated account with everything the book holds for it.
#[derive(Debug, Clone)]
pub struct SampleAccount {
    /// The account's 0-based number in the book.
    pub index: u64,
    /// Its terms as the reader resolves them.
    pub entry: AccountEntry,
    /// The calendar named on its row, if any.
    pub calendar: Option<&'static str>,
    /// Its movements, in sheet order.
    pub movements: Vec<Movement>,
    /// Rates rows of its own (rate_ref is the account id), after the shared products.
    pub own_rates: Vec<RateRow>,
    /// Its statement row, when a posting period ends in the window.
    pub statement: Option<SampleStatement>,
    /// The mistake planted in the statement row, if any.
    pub mistake: Option<Mistake>,
    /// What the general ledger holds for it.
    pub ledger: SampleLedger,
    /// Its Booked row at the cut-off: a term deposit or loan in the middle
    /// of its posting period.
    pub booked: Option<SampleBooked>,
    /// Its life event, if any (the terms hold it).
    pub life: Option<LifeKind>,
}

impl SampleAccount {
    /// The Accounts row, in the columns of the Accounts layout of [`SHEETS`].
    pub fn account_row(&self) -> Vec<Value> {
        let t = &self.entry.terms;
        let default_ref = self.entry.rate_ref == t.id;
        let mut row = vec![
            text(&t.id),
            text(&self.entry.name),
            text(&t.currency),
            text(t.side.name()),
            text(t.basis.name()),
            text(t.compounding.name()),
            text(t.posting.name()),
            opt_date(t.anchor),
            match t.anchor_kind {
                crate::conventions::schedule::AnchorKind::Payment => text(t.anchor_kind.name()),
                crate::conventions::schedule::AnchorKind::End => Value::Empty,
            },
            text(if t.capitalise { "yes" } else { "no" }),
            match t.round_at {
                RoundAt::Daily => text(t.round_at.name()),
                RoundAt::Posting => Value::Empty,
            },
            text(t.round_mode.name()),
            t.round_places
                .map_or(Value::Empty, |p| Value::Number(Decimal::from(p))),
            opt_date(t.maturity),
            Value::Date(t.open_date),
            Value::Number(t.opening_balance),
            if default_ref {
                Value::Empty
            } else {
                text(&self.entry.rate_ref)
            },
            self.entry
                .debit_rate_ref
                .as_deref()
                .map_or(Value::Empty, text),
            text(match t.tier_method {
                TierMethod::Whole => "whole",
                TierMethod::Banded => "banded",
            }),
            self.calendar.map_or(Value::Empty, text),
            text(t.business_day.name()),
            self.entry.gl.interest.as_deref().map_or(Value::Empty, text),
            self.entry.gl.accrued.as_deref().map_or(Value::Empty, text),
            t.tax
                .as_ref()
                .map_or(Value::Empty, |x| text(&x.schedule.tax_ref)),
        ];
        row.extend(self.life_cells());
        row
    }

    /// The life-event cells of the Accounts row: close_date to
    /// rollover_rate_ref.
    fn life_cells(&self) -> [Value; 10] {
        let e = &self.entry.terms.events;
        let number = |n: u32| Value::Number(Decimal::from(n));
        let (penalty, days, break_ref, amount) = match &e.break_penalty {
            BreakPenalty::None => (Value::Empty, Value::Empty, Value::Empty, Value::Empty),
            BreakPenalty::Days(n) => (text("days"), number(*n), Value::Empty, Value::Empty),
            BreakPenalty::Rate(r, _) => (text("rate"), Value::Empty, text(r), Value::Empty),
            BreakPenalty::Amount(a) => (
                text("amount"),
                Value::Empty,
                Value::Empty,
                Value::Number(*a),
            ),
        };
        let (after, matured_ref, months, roll_ref) = match &e.after_maturity {
            AfterMaturity::None if self.life == Some(LifeKind::MaturedUnpaid) => {
                (text("none"), Value::Empty, Value::Empty, Value::Empty)
            }
            AfterMaturity::None => (Value::Empty, Value::Empty, Value::Empty, Value::Empty),
            AfterMaturity::Rate(r, _) => (text("rate"), text(r), Value::Empty, Value::Empty),
            AfterMaturity::Rollover {
                months, rate_ref, ..
            } => (
                text("rollover"),
                Value::Empty,
                number(*months),
                text(rate_ref),
            ),
        };
        [
            opt_date(e.close_date),
            penalty,
            days,
            break_ref,
            amount,
            match e.penalty_limit {
                PenaltyLimit::Interest => text("interest"),
                PenaltyLimit::None => Value::Empty,
            },
            after,
            matured_ref,
            months,
            roll_ref,
        ]
    }

    /// The Movements rows.
    pub fn movement_rows(&self) -> Vec<Vec<Value>> {
        self.movements
            .iter()
            .map(|m| {
                vec![
                    text(&self.entry.terms.id),
                    Value::Date(m.value_date),
                    Value::Number(m.amount),
                    opt_date(m.booking_date),
                    m.reference.as_deref().map_or(Value::Empty, text),
                ]
            })
            .collect()
    }

    /// The Statements rows (none or one).
    pub fn statement_rows(&self) -> Vec<Vec<Value>> {
        self.statement
            .iter()
            .map(|s| {
                vec![
                    text(&self.entry.terms.id),
                    Value::Date(s.start),
                    Value::Date(s.end),
                    Value::Number(s.posted),
                    text(&s.reference),
                ]
            })
            .collect()
    }

    /// The account's own Rates rows.
    pub fn rate_rows(&self) -> Vec<Vec<Value>> {
        self.own_rates.iter().map(RateRow::cells).collect()
    }

    /// The Booked rows (none or one, dated the cut-off).
    pub fn booked_rows(&self) -> Vec<Vec<Value>> {
        self.booked
            .iter()
            .map(|b| b.cells(&self.entry.terms.id))
            .collect()
    }
}

/// An account the generator could not finish (a defect of the generator:
/// every account it makes should be computable).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("the sample account {account} cannot be computed: {source}")]
pub struct SampleError {
    /// The account id.
    pub account: String,
    /// What the engine said.
    #[source]
    pub source: EngineError,
}

/// How many data rows (header not counted) each sheet of a book gets.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct SheetCounts {
    rows: BTreeMap<SheetKind, u64>,
}

impl SheetCounts {
    /// The counts given, the other sheets none.
    ///
    /// ```
    /// use ledgerate::schema::SheetKind;
    /// use ledgerate::sample::SheetCounts;
    /// let c = SheetCounts::of(&[(SheetKind::Accounts, 10)]);
    /// assert_eq!((c.get(SheetKind::Accounts), c.get(SheetKind::Rates)), (10, 0));
    /// ```
    pub fn of(counts: &[(SheetKind, u64)]) -> SheetCounts {
        let mut out = SheetCounts::default();
        for (sheet, n) in counts {
            out.add(*sheet, *n);
        }
        out
    }

    /// The data rows of `sheet`.
    pub fn get(&self, sheet: SheetKind) -> u64 {
        self.rows.get(&sheet).copied().unwrap_or(0)
    }

    /// Counts `n` more rows on `sheet`.
    pub fn add(&mut self, sheet: SheetKind, n: u64) {
        let count = self.rows.entry(sheet).or_insert(0);
        *count = count.saturating_add(n);
    }
}

/// Makes the rows of a sample book of `accounts` accounts from `seed`.
///
/// ```
/// use ledgerate::sample::Generator;
/// let g = Generator::new(42, 10);
/// let a = g.account(0).unwrap();
/// assert!(a.entry.terms.id.starts_with("HM-"));
/// // The same seed and number give the same account.
/// assert_eq!(format!("{:?}", a.account_row()), format!("{:?}", g.account(0).unwrap().account_row()));
/// assert!(a.statement.is_some());
/// ```
#[derive(Debug, Clone)]
pub struct Generator {
    seed: u64,
    accounts: u64,
    products: Vec<Product>,
    calendars: Calendars,
    taxes: Taxes,
}

/// The calendars of the book's Holidays sheet.
#[derive(Debug, Clone)]
struct Calendars {
    weekends: Arc<Calendar>,
    harbour: Arc<Calendar>,
    brazil: Arc<Calendar>,
}

/// The Holidays sheet: calendar, date, name.
const HOLIDAY_ROWS: [(&str, NaiveDate, &str); 7] = [
    ("HARBOUR", date(2026, 11, 26), "Harvest Thanksgiving"),
    ("HARBOUR", date(2026, 12, 25), "Christmas Day"),
    ("HARBOUR", date(2027, 1, 1), "New Year's Day"),
    ("BR-2026", date(2026, 11, 2), "All Souls' Day"),
    ("BR-2026", date(2026, 11, 20), "Black Awareness Day"),
    ("BR-2026", date(2026, 12, 25), "Christmas Day"),
    ("BR-2027", date(2027, 1, 1), "New Year's Day"),
];

fn calendar(name: &str) -> Calendar {
    Calendar::new(
        name,
        HOLIDAY_ROWS
            .iter()
            .filter(|(c, _, _)| *c == name)
            .map(|(_, d, _)| *d),
    )
}

impl Generator {
    /// A generator of `accounts` accounts from `seed`.
    pub fn new(seed: u64, accounts: u64) -> Generator {
        Generator {
            seed,
            accounts,
            products: catalogue::products(seed),
            calendars: Calendars {
                weekends: Arc::new(Calendar::weekends_only()),
                harbour: Arc::new(calendar("HARBOUR")),
                brazil: Arc::new(calendar("BR-2026")),
            },
            taxes: Taxes::new(),
        }
    }

    /// The number of accounts.
    pub fn accounts(&self) -> u64 {
        self.accounts
    }

    /// The seed.
    pub fn seed(&self) -> u64 {
        self.seed
    }

    /// The rows of a small sheet (Holidays or Settings) or the shared
    /// products' Rates rows; the per-account sheets give none here.
    pub fn fixed_rows(&self, sheet: SheetKind) -> Vec<Vec<Value>> {
        match sheet {
            SheetKind::Rates => self
                .products
                .iter()
                .flat_map(|p| p.rows.iter().map(RateRow::cells))
                .collect(),
            SheetKind::Holidays => HOLIDAY_ROWS
                .iter()
                .map(|(c, d, n)| vec![text(c), Value::Date(*d), text(n)])
                .collect(),
            SheetKind::Settings => vec![
                vec![text("cutoff"), Value::Date(CUTOFF)],
                vec![text("entity"), text(ENTITY)],
                vec![text("previous_as_at"), Value::Date(PREVIOUS_AS_AT)],
                vec![text("statement_amounts"), text("gross")],
            ],
            SheetKind::Tax => Taxes::rows(),
            _ => Vec::new(),
        }
    }

    /// The data rows each sheet will get, counted without running the
    /// engine (a statement row is counted for every account without a
    /// Booked row; an account without a posting period in the window has
    /// none, so that count is an upper bound).
    pub fn counts(&self) -> SheetCounts {
        type Tally = (u64, u64, u64, BTreeSet<(String, String)>);
        let (movements, own_rates, booked, gls) = (0..self.accounts)
            .into_par_iter()
            .fold(
                || (0, 0, 0, BTreeSet::new()),
                |mut t: Tally, i| {
                    let d = self.draft(i);
                    // A closed account's payout movement is added after its run.
                    t.0 += d.movements.len() as u64
                        + u64::from(d.entry.terms.events.close_date.is_some());
                    t.1 += d.own_rates.len() as u64;
                    t.2 += u64::from(d.booked_close);
                    let gl = ResolvedGl::of(d.entry.terms.side, &d.entry.gl).accrued;
                    if !t
                        .3
                        .iter()
                        .any(|(c, g)| *c == d.entry.terms.currency && *g == gl)
                    {
                        t.3.insert((d.entry.terms.currency, gl.to_string()));
                    }
                    t
                },
            )
            .reduce(
                || (0, 0, 0, BTreeSet::new()),
                |mut a, b| {
                    a.3.extend(b.3);
                    (a.0 + b.0, a.1 + b.1, a.2 + b.2, a.3)
                },
            );
        let fixed = |s: SheetKind| self.fixed_rows(s).len() as u64;
        SheetCounts::of(&[
            (SheetKind::Accounts, self.accounts),
            (SheetKind::Rates, fixed(SheetKind::Rates) + own_rates),
            (SheetKind::Movements, movements),
            (SheetKind::Statements, self.accounts.saturating_sub(booked)),
            (SheetKind::Booked, booked),
            (SheetKind::TrialBalance, gls.len() as u64),
            (SheetKind::Holidays, fixed(SheetKind::Holidays)),
            (SheetKind::Settings, fixed(SheetKind::Settings)),
            (SheetKind::Tax, fixed(SheetKind::Tax)),
        ])
    }

    fn draft(&self, index: u64) -> Draft {
        draft::draft(
            self.seed,
            index,
            &self.products,
            &self.calendars,
            &self.taxes,
        )
    }

    /// The account numbered `index` (0-based), with its statement row
    /// computed by the engine and any planted mistake.
    ///
    /// # Errors
    /// [`SampleError`] when the engine cannot compute the generated account.
    pub fn account(&self, index: u64) -> Result<SampleAccount, SampleError> {
        let d = self.draft(index);
        let fail = |source: EngineError| SampleError {
            account: d.entry.terms.id.clone(),
            source,
        };
        let own;
        let rates: &RateSchedule = match d.product {
            Some(p) => self
                .products
                .get(p)
                .map(|p| &*p.schedule)
                .ok_or_else(|| fail(EngineError::Unsupported("no rate product".into())))?,
            None => {
                own = RateSchedule::from_rows(d.own_rates.iter().map(|r| {
                    (
                        r.effective,
                        catalogue::percent_to_rate(r.percent),
                        Decimal::ZERO,
                    )
                }));
                &own
            }
        };
        let debit = d
            .debit_product
            .and_then(|p| self.products.get(p))
            .map(|p| &*p.schedule);
        let fixings = Fixings::new();
        let inputs = BookAccount {
            entry: &d.entry,
            rates: Some(rates),
            debit_rates: debit,
            floating: None,
            fixings: &fixings,
            movements: &d.movements,
            statements: &[],
            booked_opening: None,
            booked_close: None,
            unreadable: &[],
            rate_bookings: [&[], &[]],
            suspense: None,
        };
        let keep_days = d.plant.is_some() || d.booked_plant.is_some();
        let options = Options {
            previous_as_at: Some(PREVIOUS_AS_AT),
            ..run_options(keep_days)
        };
        let run = run_account(&inputs, &options).map_err(|f| fail(f.error))?;
        let booked = if d.booked_close {
            Some(ledger::booked_at_cutoff(&d.entry.terms, &run, d.booked_plant).map_err(fail)?)
        } else {
            None
        };
        let gl_accrued = ResolvedGl::of(d.entry.terms.side, &d.entry.gl)
            .accrued
            .to_string();
        let ledger = SampleLedger::of(&run, d.entry.terms.side, gl_accrued);
        let right = run.result;
        let posting = right
            .postings
            .iter()
            .rev()
            .find(|p| p.end >= WINDOW_START && p.end <= CUTOFF);
        let mut statement = None;
        let mut mistake = None;
        if let Some(p) = posting {
            let mut posted = p.expected;
            if let Some(stream) = d.plant {
                let job = plant::Job {
                    account: &inputs,
                    rates,
                    right: &right,
                    posting: p,
                };
                let (m, amount) = plant::plant(&job, stream).map_err(fail)?;
                posted = amount;
                mistake = Some(m);
            }
            if let (Some(earlier), Some(tax)) = (d.net_plant, &d.entry.terms.tax) {
                let minor = d.entry.terms.minor_units;
                if let Some((m, amount)) = tax::posted_net(tax, p, minor, earlier).map_err(fail)? {
                    posted = amount;
                    mistake = Some(m);
                }
            }
            statement = Some(SampleStatement {
                start: p.start,
                end: p.end,
                posted,
                expected: p.expected,
                reference: format!("ST-{}-{}", d.entry.terms.id, p.end.format("%Y%m")),
            });
        }
        let mut movements = d.movements;
        // A close's payout, valued on the close date, as the run works it out.
        if let Some(c) = run.life.as_ref().and_then(|l| l.closing.as_ref()) {
            let n = movements.len().saturating_add(1);
            movements.push(Movement {
                value_date: c.date,
                amount: -c.payout,
                booking_date: None,
                reference: Some(draft::reference("PAYOUT", c.date, n, &d.entry.terms.id).into()),
            });
        }
        Ok(SampleAccount {
            index,
            entry: d.entry,
            calendar: d.calendar,
            movements,
            own_rates: d.own_rates,
            statement,
            mistake,
            ledger,
            booked,
            life: d.life,
        })
    }

    /// The accounts numbered `range`, generated in parallel on rayon's pool
    /// and returned in order.
    pub fn accounts_in(&self, range: Range<u64>) -> Vec<Result<SampleAccount, SampleError>> {
        let end = range.end.min(self.accounts);
        (range.start.min(end)..end)
            .into_par_iter()
            .map(|i| self.account(i))
            .collect()
    }
}

/// How a sample account is computed: the book's window, day rows kept
/// when a mistake is to be planted. The account's own run adds the book's
/// `previous_as_at`; a planted mistake's re-runs need only the postings.
fn run_options(keep_days: bool) -> Options {
    Options {
        window_start: WINDOW_START,
        cutoff: CUTOFF,
        tolerance: Tolerance::default(),
        fixing_fallback: FixingFallback::None,
        keep_days,
        fast_path: true,
        previous_as_at: None,
        settlement_lines: SettlementLines::default(),
    }
}

#[cfg(test)]
mod tests;
