//! Floating rates (behaviour.md, Floating rates): rate tables whose tiers name an
//! index, the fixings that fill them, and their resolution into the plain
//! day-by-day rates the day loop accrues.
//!
//! A floating account's rates depend on its calendar, its posting periods
//! and its lookback, shift and lockout terms, so they are resolved once per
//! run ([`resolve`]) into an ordinary [`RateSchedule`]: the day loop, the
//! exact accumulator and the one-step fast path then treat them like any
//! fixed schedule. Simple-daily rates get one table per change, so a weekend
//! is still one step; compounded rates one table per day, so the fast path
//! takes their days singly (see `Resolver::push`).
//!
//! Simple-daily: day D earns the fixing of the business day on or before D,
//! looked back, bounded by any floor and cap, plus the spread.
//!
//! Compounded-in-arrears: day D earns `CF x r(D) + spread` a year, where CF is
//! the cumulative compounded factor of the period before the business day
//! whose fixing covers D and r(D) that fixing; one calendar day of a business
//! day's weight is 1/den of a year, so a business day's increase of the
//! factor is spread evenly over the days it covers and, at a constant base,
//! the days add up to `B x (prod(1 + r_i n_i / den) - 1) + B x spread x days /
//! den`. With an observation shift every day of the period earns the
//! period's annualised compounded rate.
//!
//! The factor has no finite decimal expansion (each step divides by 360 or
//! 365); it is carried to the 28 significant digits of a decimal, so the
//! interest is good to well over 20. Nothing here rounds an amount, reads a
//! file or guesses a missing fixing: a missing fixing is an error naming the
//! index and the date unless the caller chose the `last` fallback, and then
//! each substitution is returned as a warning.

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::error::EngineError;
use super::rates::{RateSchedule, RateSource, RateTable, Tier};
use super::terms::{AccountTerms, FloorOn, RateMethod};
use crate::conventions::calendar::Calendar;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::names::{lookup, UnknownName};
use crate::conventions::schedule::Period;

/// Index fixings: index name, then the business day a fixing applies to,
/// then the annual rate as a decimal (0.0531 for 5.31%).
pub type Fixings = BTreeMap<String, BTreeMap<NaiveDate, Decimal>>;

/// A tier rate that follows an index.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct IndexRate {
    /// The index name, as in the Fixings sheet.
    pub index: String,
    /// The spread as a decimal rate (`spread_bp` / 10,000).
    pub spread: Decimal,
    /// The lowest rate allowed, as a decimal.
    pub floor: Option<Decimal>,
    /// The highest rate allowed, as a decimal.
    pub cap: Option<Decimal>,
}

/// What one tier of a floating table earns.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum TierRate {
    /// A rate given outright.
    Fixed(Decimal),
    /// An index plus a spread, within any floor and cap.
    Index(IndexRate),
}

/// One tier of a floating table: what the base earns from `from` upward.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FloatingTier {
    /// The threshold of the base where the tier starts.
    pub from: Decimal,
    /// The tier's rate.
    pub rate: TierRate,
}

/// A complete floating table, in force from `effective` on.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FloatingTable {
    /// The first day of the table.
    pub effective: NaiveDate,
    /// Tiers by ascending threshold.
    pub tiers: Vec<FloatingTier>,
}

/// A rate schedule whose tables may name an index: the table for a day is
/// the one with the latest effective date on or before it, as for fixed rates.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct FloatingSchedule {
    tables: Vec<FloatingTable>,
}

impl FloatingSchedule {
    /// The schedule without the tables whose effective date `drop` says to
    /// leave out (tables not yet booked at a knowledge date).
    pub fn without(&self, drop: impl Fn(NaiveDate) -> bool) -> FloatingSchedule {
        FloatingSchedule {
            tables: self
                .tables
                .iter()
                .filter(|t| !drop(t.effective))
                .cloned()
                .collect(),
        }
    }

    /// Builds a schedule from rows of (effective date, tier rate, tier
    /// threshold). Rows with the same effective date form one table.
    ///
    /// ```
    /// use ledgerate::engine::floating::{FloatingSchedule, IndexRate, TierRate};
    /// use rust_decimal::Decimal;
    /// let sofr = TierRate::Index(IndexRate { index: "HVM-ON".into(), spread: "0.0125".parse().unwrap(), floor: None, cap: None });
    /// let s = FloatingSchedule::from_rows([("2026-01-01".parse().unwrap(), sofr, Decimal::ZERO)]);
    /// assert!(s.table_on("2026-06-30".parse().unwrap()).is_some());
    /// assert!(s.table_on("2025-12-31".parse().unwrap()).is_none());
    /// ```
    pub fn from_rows(
        rows: impl IntoIterator<Item = (NaiveDate, TierRate, Decimal)>,
    ) -> FloatingSchedule {
        let mut rows: Vec<_> = rows.into_iter().collect();
        rows.sort_by(|a, b| a.0.cmp(&b.0).then(a.2.cmp(&b.2)));
        let mut tables: Vec<FloatingTable> = Vec::new();
        for (effective, rate, from) in rows {
            let tier = FloatingTier { from, rate };
            match tables.last_mut() {
                Some(t) if t.effective == effective => t.tiers.push(tier),
                _ => tables.push(FloatingTable {
                    effective,
                    tiers: vec![tier],
                }),
            }
        }
        FloatingSchedule { tables }
    }

    /// A fixed schedule seen as floating tables of fixed tiers.
    pub fn from_fixed(schedule: &RateSchedule) -> FloatingSchedule {
        FloatingSchedule {
            tables: schedule
                .tables()
                .iter()
                .map(|t| FloatingTable {
                    effective: t.effective,
                    tiers: t
                        .tiers
                        .iter()
                        .map(|x| FloatingTier {
                            from: x.from,
                            rate: TierRate::Fixed(x.rate),
                        })
                        .collect(),
                })
                .collect(),
        }
    }

    /// The tables, by effective date.
    pub fn tables(&self) -> &[FloatingTable] {
        &self.tables
    }

    /// The table in force on `day`.
    pub fn table_on(&self, day: NaiveDate) -> Option<&FloatingTable> {
        let i = self.tables.partition_point(|t| t.effective <= day);
        i.checked_sub(1).and_then(|i| self.tables.get(i))
    }

    /// The first effective date, for messages.
    pub fn first_effective(&self) -> Option<NaiveDate> {
        self.tables.first().map(|t| t.effective)
    }

    /// The indices the schedule names, each once.
    pub fn indices(&self) -> Vec<&str> {
        let mut v: Vec<&str> = self
            .tables
            .iter()
            .flat_map(|t| t.tiers.iter())
            .filter_map(|t| match &t.rate {
                TierRate::Index(i) => Some(i.index.as_str()),
                TierRate::Fixed(_) => None,
            })
            .collect();
        v.sort_unstable();
        v.dedup();
        v
    }
}

/// What to do when a fixing the account needs is not in the fixings.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum FixingFallback {
    /// A missing fixing is an error naming the index and the date.
    #[default]
    None,
    /// Use the last fixing published before the date, and say so.
    Last,
}

impl FixingFallback {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            FixingFallback::None => "none",
            FixingFallback::Last => "last",
        }
    }

    /// Parses `none` or `last`.
    ///
    /// ```
    /// use ledgerate::engine::floating::FixingFallback;
    /// assert_eq!(FixingFallback::parse("Last"), Ok(FixingFallback::Last));
    /// assert!(FixingFallback::parse("previous").is_err());
    /// ```
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<FixingFallback, UnknownName> {
        lookup(
            "fixing fallback",
            s,
            &[
                ("none", FixingFallback::None),
                ("last", FixingFallback::Last),
            ],
            &["none", "last"],
        )
    }
}

/// A floating account's rates: its schedule, the fixings, and the fallback.
#[derive(Debug, Clone, Copy)]
pub struct FloatingRates<'a> {
    /// The account's tables.
    pub schedule: &'a FloatingSchedule,
    /// Every index's fixings.
    pub fixings: &'a Fixings,
    /// What to do about a missing fixing.
    pub fallback: FixingFallback,
}

/// The fixing a day's rate came from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FixingUsed {
    /// The index.
    pub index: String,
    /// The business day of the fixing, after lookback and lockout.
    pub date: NaiveDate,
    /// The fixing, before floor, cap and spread.
    pub rate: Decimal,
    /// When the fixing of `date` was missing: the date whose fixing stood in.
    pub stand_in: Option<NaiveDate>,
}

/// A missing fixing replaced by the last one published before it.
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord)]
pub struct FixingWarning {
    /// The index.
    pub index: String,
    /// The date whose fixing was missing.
    pub date: NaiveDate,
    /// The date of the fixing used instead.
    pub used: NaiveDate,
}

/// A floating account's rates resolved for the days of one run.
#[derive(Debug, Clone, Default)]
pub struct Resolved {
    /// One table per change of the day rate.
    pub schedule: RateSchedule,
    /// The fixing behind each day's rate (days of fixed tiers have none).
    pub fixings: BTreeMap<NaiveDate, FixingUsed>,
    /// Missing fixings replaced under [`FixingFallback::Last`], by index and date.
    pub warnings: Vec<FixingWarning>,
}

impl RateSource for Resolved {
    fn table_on(&self, day: NaiveDate) -> Option<&RateTable> {
        self.schedule.table_on(day)
    }

    fn first_effective(&self) -> Option<NaiveDate> {
        self.schedule.first_effective()
    }

    fn next_change_after(&self, day: NaiveDate) -> Option<NaiveDate> {
        self.schedule.next_change_after(day)
    }
}

/// The day-count denominator of compounded-in-arrears, or the error naming
/// the unsupported basis.
fn compounding_denominator(basis: Basis) -> Result<u32, EngineError> {
    match basis {
        Basis::Act360 => Ok(360),
        Basis::Act365F => Ok(365),
        other => Err(EngineError::Unsupported(format!(
            "rate_method compounded-in-arrears on {}: it is computed on ACT/360 or ACT/365F only",
            other.name()
        ))),
    }
}

/// Checks the combination of terms before any day is resolved.
fn check_terms(terms: &AccountTerms, periods: &[Period]) -> Result<(), EngineError> {
    let fl = terms.floating;
    let unsupported = |what: String| Err(EngineError::Unsupported(what));
    match fl.method {
        RateMethod::Fixed => {
            return unsupported(
                "rate_method fixed with rates that name an index: set rate_method simple-daily or compounded-in-arrears".into(),
            )
        }
        RateMethod::SimpleDaily => {
            if fl.observation_shift {
                return unsupported(
                    "observation_shift with rate_method simple-daily: a shift applies to compounded-in-arrears only".into(),
                );
            }
            if fl.spread_compounded {
                return unsupported(
                    "spread_compounded with rate_method simple-daily: nothing compounds".into(),
                );
            }
        }
        RateMethod::CompoundedInArrears => {
            compounding_denominator(terms.basis)?;
            if terms.compounding != Compounding::Simple {
                return unsupported(format!(
                    "compounding {} with rate_method compounded-in-arrears: the rate already compounds; set compounding simple",
                    terms.compounding.name()
                ));
            }
            if fl.floor_on == FloorOn::AllIn && !fl.spread_compounded {
                return unsupported(
                    "floor_on all-in with rate_method compounded-in-arrears and the spread added after compounding: bound the index, or compound the spread".into(),
                );
            }
            if fl.observation_shift && periods.is_empty() {
                return unsupported(format!(
                    "observation_shift with posting {}: a shift needs a period end",
                    terms.posting.name()
                ));
            }
        }
    }
    if fl.lockout_days > 0 && periods.is_empty() {
        return unsupported(format!(
            "lockout_days with posting {}: a lockout needs a period end",
            terms.posting.name()
        ));
    }
    Ok(())
}

/// The business day `n` business days before `d`, counted strictly before it
/// (`n` = 0 gives `d`, even on a holiday): how a period boundary is shifted.
fn shift_back(cal: &Calendar, d: NaiveDate, n: u32) -> Option<NaiveDate> {
    if n == 0 {
        return Some(d);
    }
    cal.sub_business_days(d.pred_opt()?, n - 1)
}

/// The next business day after `d`.
fn next_business_day(cal: &Calendar, d: NaiveDate) -> Option<NaiveDate> {
    cal.add_business_days(d, 1)
}

fn out_of_range() -> EngineError {
    EngineError::Unsupported("a date out of range".into())
}

/// Fixing lookups with the fallback and its warnings.
struct Lookup<'a> {
    fixings: &'a Fixings,
    fallback: FixingFallback,
    warnings: BTreeMap<(String, NaiveDate), NaiveDate>,
}

impl Lookup<'_> {
    fn fixing(&mut self, index: &str, date: NaiveDate) -> Result<FixingUsed, EngineError> {
        let missing = || EngineError::MissingFixing {
            index: index.to_string(),
            date,
        };
        let series = self.fixings.get(index).ok_or_else(missing)?;
        if let Some(r) = series.get(&date) {
            return Ok(FixingUsed {
                index: index.to_string(),
                date,
                rate: *r,
                stand_in: None,
            });
        }
        if self.fallback != FixingFallback::Last {
            return Err(missing());
        }
        let (used, r) = series.range(..date).next_back().ok_or_else(missing)?;
        self.warnings.insert((index.to_string(), date), *used);
        Ok(FixingUsed {
            index: index.to_string(),
            date,
            rate: *r,
            stand_in: Some(*used),
        })
    }
}

fn add(
    a: Decimal,
    b: Decimal,
    what: &'static str,
    date: NaiveDate,
) -> Result<Decimal, EngineError> {
    a.checked_add(b).ok_or(EngineError::Overflow { what, date })
}

fn mul(
    a: Decimal,
    b: Decimal,
    what: &'static str,
    date: NaiveDate,
) -> Result<Decimal, EngineError> {
    a.checked_mul(b).ok_or(EngineError::Overflow { what, date })
}

fn bound(x: Decimal, floor: Option<Decimal>, cap: Option<Decimal>) -> Decimal {
    let x = floor.map_or(x, |f| x.max(f));
    cap.map_or(x, |c| x.min(c))
}

/// One tier's rate for a fixing date: (the rate that compounds or applies,
/// the spread added after compounding, the fixing used).
fn tier_rate(
    rate: &TierRate,
    fixing_date: NaiveDate,
    terms: &AccountTerms,
    lookup: &mut Lookup<'_>,
    day: NaiveDate,
) -> Result<(Decimal, Decimal, Option<FixingUsed>), EngineError> {
    let fl = terms.floating;
    match rate {
        TierRate::Fixed(r) => Ok((*r, Decimal::ZERO, None)),
        TierRate::Index(ix) => {
            if let (Some(f), Some(c)) = (ix.floor, ix.cap) {
                if f > c {
                    return Err(EngineError::Unsupported(format!(
                        "a floor of {f} above a cap of {c} on {}",
                        ix.index
                    )));
                }
            }
            let used = lookup.fixing(&ix.index, fixing_date)?;
            let fix = used.rate;
            let inside = fl.method == RateMethod::SimpleDaily || fl.spread_compounded;
            let (r, after) = match (fl.floor_on, inside) {
                (FloorOn::AllIn, true) => (
                    bound(add(fix, ix.spread, "the rate", day)?, ix.floor, ix.cap),
                    Decimal::ZERO,
                ),
                (FloorOn::Index, true) => (
                    add(bound(fix, ix.floor, ix.cap), ix.spread, "the rate", day)?,
                    Decimal::ZERO,
                ),
                // Checked before: all-in bounds need the spread inside.
                (_, false) => (bound(fix, ix.floor, ix.cap), ix.spread),
            };
            Ok((r, after, Some(used)))
        }
    }
}

/// Resolves a floating account's rates for the days `from..=to` of a run,
/// given the account's posting periods (empty when it never posts).
///
/// ```
/// use std::collections::BTreeMap;
/// use ledgerate::conventions::daycount::Basis;
/// use ledgerate::engine::floating::{resolve, FixingFallback, FloatingRates, FloatingSchedule, IndexRate, TierRate};
/// use ledgerate::engine::rates::RateSource;
/// use ledgerate::engine::terms::RateMethod;
/// use ledgerate::engine::AccountTerms;
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let n = |s: &str| s.parse::<Decimal>().unwrap();
/// let mut t = AccountTerms::new("HVM-L1", "USD", 2, Basis::Act360, d("2026-11-02"), n("1000000"));
/// t.floating.method = RateMethod::SimpleDaily;
/// let ix = TierRate::Index(IndexRate { index: "HVM-ON".into(), spread: n("0.0150"), floor: Some(n("0")), cap: None });
/// let schedule = FloatingSchedule::from_rows([(d("2026-01-01"), ix, Decimal::ZERO)]);
/// let mut fixings = BTreeMap::new();
/// fixings.insert("HVM-ON".to_string(), BTreeMap::from([(d("2026-11-02"), n("0.0402")), (d("2026-11-03"), n("-0.001"))]));
/// let rates = FloatingRates { schedule: &schedule, fixings: &fixings, fallback: FixingFallback::None };
/// let r = resolve(&t, &rates, &[], d("2026-11-02"), d("2026-11-03")).unwrap();
/// assert_eq!(r.table_on(d("2026-11-02")).unwrap().tiers[0].rate, n("0.0552"));
/// // A negative fixing is floored at zero before the spread.
/// assert_eq!(r.table_on(d("2026-11-03")).unwrap().tiers[0].rate, n("0.0150"));
/// ```
///
/// # Errors
/// [`EngineError::Unsupported`] naming a combination of terms not computed,
/// [`EngineError::MissingFixing`] naming the index and date (without the
/// `last` fallback), [`EngineError::NoRate`] for a day without a table.
pub fn resolve(
    terms: &AccountTerms,
    rates: &FloatingRates<'_>,
    periods: &[Period],
    from: NaiveDate,
    to: NaiveDate,
) -> Result<Resolved, EngineError> {
    check_terms(terms, periods)?;
    let mut r = Resolver {
        terms,
        schedule: rates.schedule,
        cal: &terms.calendar,
        lookup: Lookup {
            fixings: rates.fixings,
            fallback: rates.fallback,
            warnings: BTreeMap::new(),
        },
        tables: Vec::new(),
        used: BTreeMap::new(),
    };
    // Each period [P, E+1) that holds a day of the run; without postings,
    // one period from the first start that never ends.
    let spans: Vec<(NaiveDate, Option<NaiveDate>)> = if periods.is_empty() {
        vec![(terms.first_period_start(), None)]
    } else {
        periods
            .iter()
            .filter(|p| p.end >= from && p.start <= to)
            .map(|p| (p.start, p.end.succ_opt()))
            .collect()
    };
    for (start, end) in spans {
        let first = start.max(from);
        let last = match end.and_then(|e| e.pred_opt()) {
            Some(e) => e.min(to),
            None => to,
        };
        if first > last {
            continue;
        }
        match terms.floating.method {
            RateMethod::CompoundedInArrears if terms.floating.observation_shift => {
                r.shifted_period(start, end, first, last)?
            }
            RateMethod::CompoundedInArrears => r.compounded_period(start, end, first, last)?,
            _ => r.simple_period(start, end, first, last)?,
        }
    }
    let warnings = r
        .lookup
        .warnings
        .into_iter()
        .map(|((index, date), used)| FixingWarning { index, date, used })
        .collect();
    Ok(Resolved {
        schedule: RateSchedule::from_tables(r.tables),
        fixings: r.used,
        warnings,
    })
}

struct Resolver<'a> {
    terms: &'a AccountTerms,
    schedule: &'a FloatingSchedule,
    cal: &'a Calendar,
    lookup: Lookup<'a>,
    tables: Vec<RateTable>,
    used: BTreeMap<NaiveDate, FixingUsed>,
}

impl Resolver<'_> {
    fn table(&self, day: NaiveDate) -> Result<&FloatingTable, EngineError> {
        self.schedule
            .table_on(day)
            .ok_or_else(|| EngineError::NoRate {
                date: day,
                first: self
                    .schedule
                    .first_effective()
                    .map_or_else(|| "no rates at all".to_string(), |f| f.to_string()),
            })
    }

    /// The single tier compounded-in-arrears needs.
    fn single_tier(&self, day: NaiveDate) -> Result<FloatingTier, EngineError> {
        let t = self.table(day)?;
        match t.tiers.as_slice() {
            [one] => Ok(one.clone()),
            _ => Err(EngineError::Unsupported(format!(
                "tiers with rate_method compounded-in-arrears (the table effective {} has {})",
                t.effective,
                t.tiers.len()
            ))),
        }
    }

    /// Adds the day's table. Simple-daily rates (a fixing plus a spread, as
    /// short as a fixed rate) merge with the previous day's when equal, so a
    /// run of equal days is one step of the fast path. Compounded rates carry
    /// the factor's 28 digits, and summing several days of them at once would
    /// round differently from the day loop: each day keeps its own table, and
    /// the fast path takes them one day at a time.
    fn push(&mut self, day: NaiveDate, tiers: Vec<Tier>, used: Option<FixingUsed>) {
        if let Some(u) = used {
            self.used.insert(day, u);
        }
        let merge = self.terms.floating.method == RateMethod::SimpleDaily;
        let same = merge
            && self
                .tables
                .last()
                .is_some_and(|t| t.tiers == tiers && t.effective < day);
        if !same {
            self.tables.push(RateTable {
                effective: day,
                tiers,
            });
        }
    }

    /// The last day whose business day uses its own fixing: business days
    /// after it (the last `lockout_days` of the period) use its fixing.
    fn lock_day(&self, end: Option<NaiveDate>) -> Result<Option<NaiveDate>, EngineError> {
        let l = self.terms.floating.lockout_days;
        match end {
            Some(e) if l > 0 => {
                let last_bd = self
                    .cal
                    .sub_business_days(e.pred_opt().ok_or_else(out_of_range)?, 0);
                let last_bd = last_bd.ok_or_else(out_of_range)?;
                Ok(Some(
                    shift_back(self.cal, last_bd, l).ok_or_else(out_of_range)?,
                ))
            }
            _ => Ok(None),
        }
    }

    /// The fixing date for business day `b` (or the business day before a
    /// non-business period start): lockout first, then the lookback.
    fn fixing_date(
        &self,
        b: NaiveDate,
        lock: Option<NaiveDate>,
        lookback: u32,
    ) -> Result<NaiveDate, EngineError> {
        let b = match lock {
            Some(l) if b > l => l,
            _ => b,
        };
        self.cal
            .sub_business_days(b, lookback)
            .ok_or_else(out_of_range)
    }

    fn simple_period(
        &mut self,
        _start: NaiveDate,
        end: Option<NaiveDate>,
        first: NaiveDate,
        last: NaiveDate,
    ) -> Result<(), EngineError> {
        let lock = self.lock_day(end)?;
        let lookback = self.terms.floating.lookback_days;
        let mut d = first;
        while d <= last {
            let b = self.cal.sub_business_days(d, 0).ok_or_else(out_of_range)?;
            let fixing_date = self.fixing_date(b, lock, lookback)?;
            let table = self.table(d)?.clone();
            let mut tiers = Vec::with_capacity(table.tiers.len());
            let mut shown = None;
            for t in &table.tiers {
                let (rate, _, used) =
                    tier_rate(&t.rate, fixing_date, self.terms, &mut self.lookup, d)?;
                tiers.push(Tier { from: t.from, rate });
                shown = shown.or(used);
            }
            self.push(d, tiers, shown);
            d = d.succ_opt().ok_or_else(out_of_range)?;
        }
        Ok(())
    }

    /// The compounding intervals of `[start, end)`: each business day (and a
    /// non-business start) with the day its weight runs to. Without an end,
    /// intervals stop after the one holding `last`.
    fn intervals(
        &self,
        start: NaiveDate,
        end: Option<NaiveDate>,
        last: NaiveDate,
    ) -> Result<Vec<(NaiveDate, NaiveDate)>, EngineError> {
        let mut out = Vec::new();
        let mut s = start;
        loop {
            let next = next_business_day(self.cal, s).ok_or_else(out_of_range)?;
            let e = match end {
                Some(e) => next.min(e),
                None => next,
            };
            out.push((s, e));
            if end.is_some_and(|x| e >= x) || (end.is_none() && e > last) {
                break;
            }
            s = e;
        }
        Ok(out)
    }

    /// Compounded in arrears over the interest period: the fixing of each
    /// business day, looked back, compounds over its calendar days.
    fn compounded_period(
        &mut self,
        start: NaiveDate,
        end: Option<NaiveDate>,
        first: NaiveDate,
        last: NaiveDate,
    ) -> Result<(), EngineError> {
        let den = Decimal::from(compounding_denominator(self.terms.basis)?);
        let lock = self.lock_day(end)?;
        let lookback = self.terms.floating.lookback_days;
        let mut factor = Decimal::ONE;
        for (s, e) in self.intervals(start, end, last)? {
            if s > last {
                break;
            }
            let b = self.cal.sub_business_days(s, 0).ok_or_else(out_of_range)?;
            let fixing_date = self.fixing_date(b, lock, lookback)?;
            let mut growth = Decimal::ZERO;
            let mut d = s;
            while d < e {
                let tier = self.single_tier(d)?;
                let (r, after, used) =
                    tier_rate(&tier.rate, fixing_date, self.terms, &mut self.lookup, d)?;
                let compounding = mul(factor, r, "the compounded factor", d)?;
                if d >= first && d <= last {
                    let rate = add(compounding, after, "the rate", d)?;
                    self.push(
                        d,
                        vec![Tier {
                            from: tier.from,
                            rate,
                        }],
                        used,
                    );
                }
                growth = add(growth, compounding, "the compounded factor", d)?;
                d = d.succ_opt().ok_or_else(out_of_range)?;
            }
            // CF x (1 + r n / den), one day of the weight at a time.
            let step = growth.checked_div(den).ok_or(EngineError::Overflow {
                what: "the compounded factor",
                date: s,
            })?;
            factor = add(factor, step, "the compounded factor", s)?;
        }
        Ok(())
    }

    /// Compounded in arrears with an observation shift: the period's rate is
    /// compounded over the observation period moved back `lookback_days`
    /// business days, annualised over its days, and earned on every day of
    /// the interest period.
    fn shifted_period(
        &mut self,
        start: NaiveDate,
        end: Option<NaiveDate>,
        first: NaiveDate,
        last: NaiveDate,
    ) -> Result<(), EngineError> {
        let Some(end) = end else {
            return Err(EngineError::Unsupported(
                "observation_shift without a period end".into(),
            ));
        };
        let den = Decimal::from(compounding_denominator(self.terms.basis)?);
        let p = self.terms.floating.lookback_days;
        let obs_start = shift_back(self.cal, start, p).ok_or_else(out_of_range)?;
        let obs_end = shift_back(self.cal, end, p).ok_or_else(out_of_range)?;
        let lock = self.lock_day(Some(obs_end))?;
        let mut factor = Decimal::ONE;
        // The fixing behind each business day of the observation period, to show
        // against the interest day it corresponds to.
        let mut by_obs_day: BTreeMap<NaiveDate, FixingUsed> = BTreeMap::new();
        let obs_days = (obs_end - obs_start).num_days();
        if obs_days <= 0 {
            return Err(EngineError::Unsupported(format!(
                "observation_shift on the period from {start} to the day before {end}: it holds no business day, so its observation period ({obs_start} to {obs_end}) has no days"
            )));
        }
        for (s, e) in self.intervals(obs_start, Some(obs_end), last)? {
            let b = self.cal.sub_business_days(s, 0).ok_or_else(out_of_range)?;
            let fixing_date = self.fixing_date(b, lock, 0)?;
            // The table of the interest day the observation day stands for.
            let interest_day = self
                .cal
                .add_business_days(s, p)
                .ok_or_else(out_of_range)?
                .max(start);
            let tier = self.single_tier(interest_day)?;
            let (r, _, used) = tier_rate(
                &tier.rate,
                fixing_date,
                self.terms,
                &mut self.lookup,
                interest_day,
            )?;
            if let Some(u) = used {
                by_obs_day.insert(s, u);
            }
            let n = Decimal::from((e - s).num_days());
            let step = mul(
                factor,
                mul(r, n, "the compounded factor", s)?,
                "the compounded factor",
                s,
            )?
            .checked_div(den)
            .ok_or(EngineError::Overflow {
                what: "the compounded factor",
                date: s,
            })?;
            factor = add(factor, step, "the compounded factor", s)?;
        }
        let growth = factor - Decimal::ONE;
        let annual = mul(growth, den, "the compounded rate", start)?
            .checked_div(Decimal::from(obs_days))
            .ok_or(EngineError::Overflow {
                what: "the compounded rate",
                date: start,
            })?;
        let mut d = first;
        while d <= last {
            let tier = self.single_tier(d)?;
            let after = match (&tier.rate, self.terms.floating.spread_compounded) {
                (TierRate::Index(ix), false) => ix.spread,
                _ => Decimal::ZERO,
            };
            let rate = add(annual, after, "the rate", d)?;
            let b = self.cal.sub_business_days(d, 0).ok_or_else(out_of_range)?;
            let obs_day = shift_back(self.cal, b, p)
                .ok_or_else(out_of_range)?
                .max(obs_start);
            let shown = by_obs_day
                .range(..=obs_day)
                .next_back()
                .map(|(_, u)| u.clone());
            self.push(
                d,
                vec![Tier {
                    from: tier.from,
                    rate,
                }],
                shown,
            );
            d = d.succ_opt().ok_or_else(out_of_range)?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests;
