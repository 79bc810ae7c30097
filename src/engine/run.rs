//! The day loop: accrue one account night by night from its opening (or a
//! saved period start) to the cut-off, posting at each period end.
//!
//! behaviour.md, Days and value dates to Brought-forward accounts. Day D earns
//! on the balance standing at its end; a movement valued V earns from V; a
//! posting at the end of E capitalises from E+1. The loop keeps exact
//! numerators ([`Accrual`]) and rounds only what is posted or reported.

use std::rc::Rc;

use chrono::{Datelike, NaiveDate};
use rust_decimal::Decimal;

use super::accrual::{Accrual, Overflow};
use super::error::EngineError;
use super::floating::{resolve, FixingUsed, FixingWarning, Resolved};
use super::inputs::Inputs;
use super::rates::{RateSource, RateTable};
use super::tax::{withhold, Withheld};
use super::terms::{AccountTerms, ActualPosting, Movement, RoundAt, TierMethod};
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::{DayFraction, PeriodBasis};
use crate::conventions::growth;
use crate::conventions::schedule::{Period, PeriodKind};
use plan::Plan;
pub(crate) use plan::{last_day, schedule_terms};

/// What to compute besides the postings.
#[derive(Debug, Clone, Copy)]
pub struct RunOptions {
    /// F: the first day of the window (behaviour.md, Cut-off figures).
    pub window_start: NaiveDate,
    /// C: the cut-off, the last day computed.
    pub cutoff: NaiveDate,
    /// Keep one [`DayRow`] per computed day.
    pub keep_days: bool,
    /// Keep an [`AccrualState`] at the start of every posting period.
    pub keep_states: bool,
    /// Keep one [`Span`] per run of days accrued together (per day when
    /// `keep_days` is set or the fast path is off): what reconciliation sums
    /// over a statement period.
    pub keep_spans: bool,
    /// Accrue runs of days over which nothing changes in one step (the same
    /// exact numerators, summed at once). Off: the plain day loop, for audits.
    pub fast_path: bool,
}

impl RunOptions {
    /// The window from the first day of the cut-off's month to the cut-off.
    pub fn month_end(cutoff: NaiveDate) -> RunOptions {
        RunOptions {
            window_start: cutoff.with_day(1).unwrap_or(cutoff),
            cutoff,
            keep_days: false,
            keep_states: false,
            keep_spans: false,
            fast_path: true,
        }
    }
}

/// Days `first..=last` accrued together: one base and one day-fraction
/// denominator throughout, so the sums over the span are single products.
/// With day rows or without the fast path every span is one day.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Span {
    /// First day.
    pub first: NaiveDate,
    /// Last day (inclusive).
    pub last: NaiveDate,
    /// B(D) on every day of the span.
    pub base: Decimal,
    /// The sum of f(D) over the span (one denominator).
    pub fraction: DayFraction,
    /// The span's interest exactly, as `interest_num / interest_den`.
    pub interest_num: Decimal,
    /// See `interest_num`.
    pub interest_den: u32,
}

/// One computed day.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DayRow {
    /// D.
    pub date: NaiveDate,
    /// The balance standing at the end of D (all value-dated movements).
    pub balance: Decimal,
    /// B(D): balance plus compounded-unposted interest, less movements not
    /// yet booked when the period posts.
    pub base: Decimal,
    /// The annual rate the base earned (blended over bands).
    pub rate: Decimal,
    /// f(D).
    pub fraction: DayFraction,
    /// i(D), unrounded unless the account rounds daily.
    pub interest: Decimal,
    /// i(D) exactly, as `interest_num / interest_den` (`interest_den` 1 when
    /// it is already a decimal: rounded daily, or exponential).
    pub interest_num: Decimal,
    /// See `interest_num`.
    pub interest_den: u32,
    /// Interest of back-valued movements earned on D, added to a later posting.
    pub back_value: Decimal,
    /// Accrued since the last posting, unrounded, after D's interest.
    pub accrued: Decimal,
    /// The amount posted at the end of D, if a period ends on D.
    pub posted: Option<Decimal>,
    /// The index fixing behind D's rate (floating rates; after lookback and lockout).
    pub fixing: Option<FixingUsed>,
}

/// One posting period's result.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PostingRow {
    /// First day of the period.
    pub start: NaiveDate,
    /// Last earning day; the posting is at its end.
    pub end: NaiveDate,
    /// Payment (and journal) date.
    pub payment: NaiveDate,
    /// Regular or stub.
    pub kind: PeriodKind,
    /// The period's interest before rounding (with any opening accrued).
    pub interest: Decimal,
    /// The back-value adjustment added to this posting, rounded.
    pub back_value: Decimal,
    /// What the engine expects to be posted: rounded interest plus the adjustment.
    pub expected: Decimal,
    /// What counts as posted: the actual amount where a statement gives one, else `expected`.
    pub posted: Decimal,
    /// Whether `posted` came from a statement.
    pub actual_given: bool,
    /// The withholding tax on `posted` and the net credited (behaviour.md,
    /// Withholding tax); no tax and the net `posted` for an account without one.
    pub withheld: Withheld,
}

/// The account's state at the start of a posting period: enough to run the
/// account again from there, with any term changed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct AccrualState {
    /// The first day still to compute.
    pub day: NaiveDate,
    /// The balance at the start of `day` (movements valued before it included).
    pub balance: Decimal,
    /// Compounded interest not yet posted, in the base.
    pub compounded: Decimal,
    /// Opening accrued not yet posted.
    pub opening_pending: Decimal,
    /// Opening accrued still to join the base at the next compounding end.
    pub opening_to_join: Decimal,
    /// Back-value interest owed per movement (index into the movements), not yet posted.
    pub back_value_owed: Vec<(usize, Accrual)>,
}

impl AccrualState {
    /// The state at the start of `open_date` (behaviour.md, Brought-forward accounts).
    pub fn opening(terms: &AccountTerms) -> AccrualState {
        let a = terms.opening_accrued;
        AccrualState {
            day: terms.open_date,
            balance: terms.opening_balance,
            compounded: if terms.compounding.joins_daily() {
                a
            } else {
                Decimal::ZERO
            },
            opening_pending: a,
            opening_to_join: if terms.compounding.months().is_some() {
                a
            } else {
                Decimal::ZERO
            },
            back_value_owed: Vec::new(),
        }
    }
}

/// Everything the engine computed for one account.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct AccountResult {
    /// Postings whose period ends on or before the cut-off, in date order.
    pub postings: Vec<PostingRow>,
    /// Balance after any posting at the end of C.
    pub balance_at_cutoff: Decimal,
    /// Interest earned since the last posting and not posted, rounded.
    pub accrued_at_cutoff: Decimal,
    /// The same at the end of F-1.
    pub accrued_before_window: Decimal,
    /// Of that, the back-value interest owed per movement (an index into
    /// the movements) at the end of F-1, each rounded.
    pub back_value_before_window: Vec<(usize, Decimal)>,
    /// Postings whose end lies in F..C.
    pub posted_in_window: Decimal,
    /// posted in window + accrued at cut-off - accrued before window.
    pub interest_for_window: Decimal,
    /// The rate in force at the cut-off, when the account earns on C.
    pub rate_at_cutoff: Option<Decimal>,
    /// Its yield under the account's compounding (behaviour.md, Cut-off figures).
    pub effective_annual_rate: Option<Decimal>,
    /// The days computed, when asked for.
    pub days: Vec<DayRow>,
    /// The runs of days computed, when asked for (or when days are kept).
    pub spans: Vec<Span>,
    /// The state at the start of each posting period, when asked for.
    pub states: Vec<AccrualState>,
    /// Missing fixings replaced by the last published one (`last` fallback).
    pub fixing_warnings: Vec<FixingWarning>,
}

/// Accrues `terms` from its opening to the cut-off.
///
/// # Errors
/// An [`EngineError`] naming what stops the account being computed.
///
/// ```
/// use ledgerate::conventions::daycount::Basis;
/// use ledgerate::engine::rates::RateSchedule;
/// use ledgerate::engine::run::{accrue, RunOptions};
/// use ledgerate::engine::{AccountTerms, Inputs};
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let n = |s: &str| s.parse::<Decimal>().unwrap();
/// // 1,000.00 at 2.25% over a regular 30/360 month is exactly 1.875: it posts 1.88.
/// let terms = AccountTerms::new("EX-01", "USD", 2, Basis::Thirty360, d("2026-11-01"), n("1000.00"));
/// let rates = RateSchedule::from_rows([(d("2026-01-01"), n("0.0225"), Decimal::ZERO)]);
/// let inputs = Inputs { rates: &rates, debit_rates: None, movements: &[], actual: &[], breaks: &[], floating: None };
/// let r = accrue(&terms, inputs, RunOptions::month_end(d("2026-11-30"))).unwrap();
/// assert_eq!(r.postings[0].interest.to_string(), "1.875");
/// assert_eq!(r.postings[0].posted.to_string(), "1.88");
/// ```
pub fn accrue(
    terms: &AccountTerms,
    inputs: Inputs,
    options: RunOptions,
) -> Result<AccountResult, EngineError> {
    resume(terms, inputs, options, &AccrualState::opening(terms))
}

/// Runs `terms` again from a saved state (the start of a posting period).
/// Postings before the state are not repeated; the window figures count only
/// what this run computed.
///
/// # Errors
/// An [`EngineError`]; [`EngineError::BadState`] when the state does not start a period.
pub fn resume(
    terms: &AccountTerms,
    inputs: Inputs,
    options: RunOptions,
    state: &AccrualState,
) -> Result<AccountResult, EngineError> {
    let plan = Plan::new(terms, &options)?;
    let resolved: Option<Resolved> = match (inputs.floating, terms.floating.method.is_floating()) {
        (Some(f), _) => Some(resolve(terms, &f, &plan.periods, state.day, plan.last_day)?),
        (None, true) => {
            return Err(EngineError::Unsupported(format!(
                "rate_method {} without floating rates and fixings",
                terms.floating.method.name()
            )))
        }
        (None, false) => None,
    };
    let mut result = Loop::new(terms, inputs, options, state, plan, resolved.as_ref())?.run()?;
    if let Some(r) = resolved {
        result.fixing_warnings = r.warnings;
    }
    Ok(result)
}

fn overflow(what: &'static str, date: NaiveDate) -> impl Fn(Overflow) -> EngineError {
    move |_| EngineError::Overflow { what, date }
}

fn checked(
    x: Option<Decimal>,
    what: &'static str,
    date: NaiveDate,
) -> Result<Decimal, EngineError> {
    x.ok_or(EngineError::Overflow { what, date })
}

/// The working state of one run.
struct Loop<'a> {
    terms: &'a AccountTerms,
    /// The table source in force: the account's rates, or for a floating
    /// account its tables resolved day by day.
    rates: &'a dyn RateSource,
    /// Rates for a base of the opposite sign.
    debit_rates: Option<&'a dyn RateSource>,
    /// Balance movements, in the order given.
    movements: &'a [Movement],
    /// Amounts actually posted, from statements.
    actual: &'a [ActualPosting],
    options: RunOptions,
    /// Posting periods; empty when the account never posts.
    periods: Vec<Period>,
    /// Compounding ends and reference periods, shared by the product.
    shared: Rc<plan::Shared>,
    /// Movement indices by value date.
    order: Vec<usize>,
    /// The last day that earns.
    last_day: NaiveDate,
    state: AccrualState,
    period_acc: Accrual,
    since_compounding: Accrual,
    /// The fixing behind each day's rate, for a floating account.
    fixings: Option<&'a std::collections::BTreeMap<NaiveDate, FixingUsed>>,
    /// Growth factors already computed, by (rate, day fraction): an
    /// exponential account meets the same pair day after day.
    growth: GrowthCache,
    /// `Inputs::breaks`, sorted.
    breaks: Vec<NaiveDate>,
    /// Whether runs of days may be accrued in one step.
    fast: bool,
    /// The table found last and the days it holds for (rate tables change
    /// rarely; the lookup is skipped until the next change).
    last_table: std::cell::Cell<Option<TableHit<'a>>>,
    /// The day before the window, when there is one.
    window_eve: Option<NaiveDate>,
    /// An empty buffer for the tier pieces, reused from an earlier run.
    spare_pieces: Vec<(Decimal, Decimal)>,
}

/// A rate table and the days `from..until` (`until` exclusive; `None`: no
/// later change known) over which its source gives the same table.
#[derive(Clone, Copy)]
struct TableHit<'a> {
    debit: bool,
    from: NaiveDate,
    until: Option<NaiveDate>,
    table: &'a RateTable,
}

/// What a run reports as it goes: postings, day rows, spans, period-start
/// states, and the figures of the window's eve and the cut-off.
#[derive(Default)]
struct Report {
    postings: Vec<PostingRow>,
    days: Vec<DayRow>,
    spans: Vec<Span>,
    states: Vec<AccrualState>,
    accrued_before_window: Option<Decimal>,
    back_value_before_window: Vec<(usize, Decimal)>,
    rate_at_cutoff: Option<Decimal>,
}

/// Where a run stands in the account's schedule.
struct Cursor {
    /// The first day of the run (the saved state's).
    resume_day: NaiveDate,
    /// The current posting period.
    pi: usize,
    /// The next movement, by value date (an index into `Loop::order`).
    mi: usize,
    /// The next compounding end.
    ci: usize,
    /// Movements in the balance that the current period's base leaves out.
    unbooked: Vec<usize>,
    /// The current period's day-fraction terms: its start and the day after its end.
    basis: Option<(NaiveDate, Option<NaiveDate>)>,
    /// The current period's last day.
    period_end: Option<NaiveDate>,
    /// The tier pieces of the last base and table.
    pieces: Pieces,
}

/// One run of days accrued together (a single day off the fast path).
#[derive(Clone, Copy)]
struct Step {
    /// Its last day.
    last: NaiveDate,
    /// B(D) on each of its days.
    base: Decimal,
    /// Its day fraction.
    fraction: DayFraction,
    /// Its interest, exactly.
    interest: DayInterest,
    /// The interest as a decimal, when day rows or daily compounding need it.
    value: Decimal,
    /// The annual rate the base earned.
    rate: Decimal,
}

/// The last few growth factors of an exponential account, by the rate as
/// written (mantissa and scale: 0.05 and 0.050 may round differently deep in
/// the series) and the day fraction's numerator and denominator.
#[derive(Default)]
struct GrowthCache {
    entries: Vec<(GrowthKey, Decimal)>,
    next: usize,
}

type GrowthKey = (i128, u32, i64, u32);

impl GrowthCache {
    const SIZE: usize = 8;

    fn get_or(
        &mut self,
        key: GrowthKey,
        compute: impl FnOnce() -> Result<Decimal, EngineError>,
    ) -> Result<Decimal, EngineError> {
        if let Some((_, g)) = self.entries.iter().find(|(k, _)| *k == key) {
            return Ok(*g);
        }
        let g = compute()?;
        if self.entries.len() < Self::SIZE {
            self.entries.push((key, g));
        } else if let Some(slot) = self.entries.get_mut(self.next) {
            *slot = (key, g);
        }
        self.next = (self.next + 1) % Self::SIZE;
        Ok(g)
    }
}

impl<'a> Loop<'a> {
    fn new(
        terms: &'a AccountTerms,
        inputs: Inputs<'a>,
        options: RunOptions,
        state: &AccrualState,
        plan: Plan,
        resolved: Option<&'a Resolved>,
    ) -> Result<Loop<'a>, EngineError> {
        let Plan {
            periods,
            shared,
            last_day,
            buffers,
        } = plan;
        let mut order = buffers.order;
        order.extend(0..inputs.movements.len());
        order.sort_by_key(|&i| inputs.movements.get(i).map(|m| m.value_date));
        let mut breaks = inputs.breaks.to_vec();
        breaks.sort_unstable();
        // The one-step path needs a base that stays put between events: no
        // daily compounding, no daily rounding, no day rows to keep.
        let fast = options.fast_path
            && !options.keep_days
            && !terms.compounding.joins_daily()
            && terms.round_at == RoundAt::Posting;
        let rates: &'a dyn RateSource = match resolved {
            Some(r) => r,
            None => inputs.rates,
        };
        Ok(Loop {
            terms,
            rates,
            debit_rates: inputs.debit_rates.map(|r| r as &dyn RateSource),
            movements: inputs.movements,
            actual: inputs.actual,
            options,
            periods,
            shared,
            order,
            last_day,
            state: state.clone(),
            period_acc: Accrual::new(),
            since_compounding: Accrual::new(),
            fixings: resolved.map(|r| &r.fixings),
            growth: GrowthCache::default(),
            breaks,
            fast,
            last_table: std::cell::Cell::new(None),
            window_eve: options.window_start.pred_opt(),
            spare_pieces: buffers.pieces,
        })
    }

    fn movement(&self, i: usize) -> Option<&'a Movement> {
        self.movements.get(i)
    }

    /// Whether movement `i` is excluded from the base of a period ending on `end`:
    /// it is booked after the period posts.
    fn unbooked(&self, i: usize, end: Option<NaiveDate>) -> bool {
        match (self.movement(i).and_then(|m| m.booking_date), end) {
            (Some(b), Some(e)) => b > e,
            _ => false,
        }
    }

    /// `x` rounded to the account's minor units.
    fn round(&self, x: Decimal) -> Decimal {
        self.terms.round_mode.round(x, self.terms.minor_units)
    }

    /// The run, day by day (or run of days by run of days) from the saved
    /// state to the last earning day, then the cut-off figures.
    fn run(mut self) -> Result<AccountResult, EngineError> {
        let mut report = self.start_report();
        let mut at = self.locate()?;
        let mut d = at.resume_day;
        while d <= self.last_day {
            let period = self.periods.get(at.pi).copied();
            self.open_period(d, period, &mut at, &mut report);
            self.take_movements(d, &mut at)?;
            let step = self.step(d, period, &mut at, &mut report)?;
            d = step.last;
            let back_value = self.owe_back_value(d, &step, &at.unbooked)?;
            let posted = self.end_day(d, &step, period, &mut at, &mut report)?;
            self.record_day(d, &step, back_value, posted, &mut report)?;
            d = match d.succ_opt() {
                Some(n) => n,
                None => break,
            };
        }
        self.finish(&mut at, report)
    }

    /// Phase 1: the report before the first day, with the opening's accrued
    /// as the figure before the window when the window starts at the opening.
    fn start_report(&self) -> Report {
        let mut report = Report::default();
        if self.options.window_start <= self.terms.open_date {
            report.accrued_before_window = Some(self.round(self.state.opening_pending));
        }
        report
    }

    /// Phase 2: where the saved state sits in the schedule: its posting
    /// period, its next movement and its next compounding end.
    fn locate(&mut self) -> Result<Cursor, EngineError> {
        let resume_day = self.state.day;
        let pi = self
            .periods
            .iter()
            .position(|p| p.end >= resume_day)
            .unwrap_or(self.periods.len());
        if resume_day != self.terms.open_date
            && self.periods.get(pi).is_none_or(|p| p.start != resume_day)
        {
            return Err(EngineError::BadState(resume_day));
        }
        // Movements before the resume day are already in the balance; before
        // the opening they are in the opening balance.
        let mi = self
            .order
            .iter()
            .position(|&i| self.movement(i).is_some_and(|m| m.value_date >= resume_day))
            .unwrap_or(self.order.len());
        let ci = self
            .shared
            .compounding_ends
            .partition_point(|e| *e < resume_day);
        Ok(Cursor {
            resume_day,
            pi,
            mi,
            ci,
            unbooked: Vec::new(),
            basis: None,
            period_end: None,
            pieces: Pieces {
                list: std::mem::take(&mut self.spare_pieces),
                ..Pieces::default()
            },
        })
    }

    /// Phase 3: on the first day of a posting period (or of the run), fix
    /// its day-fraction terms, save the state, and note which movements its
    /// base leaves out.
    #[inline]
    fn open_period(
        &self,
        d: NaiveDate,
        period: Option<Period>,
        at: &mut Cursor,
        report: &mut Report,
    ) {
        if at.basis.is_some() && period.is_none_or(|p| p.start != d) {
            return;
        }
        let (p_start, end_excl) = match period {
            Some(p) => (p.start, p.end.succ_opt()),
            None => (self.terms.first_period_start(), None),
        };
        at.period_end = period.map(|p| p.end);
        at.basis = Some((p_start, end_excl));
        if self.options.keep_states {
            let mut s = self.state.clone();
            s.day = d;
            report.states.push(s);
        }
        let end = at.period_end;
        at.unbooked = self
            .order
            .iter()
            .take(at.mi)
            .copied()
            .filter(|&i| self.unbooked(i, end))
            .collect();
    }

    /// Phase 4: the movements valued on `d` join the balance.
    #[inline]
    fn take_movements(&mut self, d: NaiveDate, at: &mut Cursor) -> Result<(), EngineError> {
        while let Some(&i) = self.order.get(at.mi) {
            let Some(m) = self.movement(i) else { break };
            if m.value_date > d {
                break;
            }
            self.state.balance =
                checked(self.state.balance.checked_add(m.amount), "the balance", d)?;
            if self.unbooked(i, at.period_end) {
                at.unbooked.push(i);
            }
            at.mi += 1;
        }
        Ok(())
    }

    /// Phase 5: the base of `d`, how far from `d` it can be accrued in one
    /// step, and the interest of that run of days, added to the period.
    #[inline]
    fn step(
        &mut self,
        d: NaiveDate,
        period: Option<Period>,
        at: &mut Cursor,
        report: &mut Report,
    ) -> Result<Step, EngineError> {
        let terms = self.terms;
        let opts = self.options;
        let base = self.base(d, &at.unbooked)?;
        // Days over which nothing changes are accrued in one step: the
        // numerators the day loop would add, summed at once.
        let table = self.table_for(base, d)?;
        let (last, fraction) = self.reach(d, period, at, base, table)?;

        // The run's interest on the base.
        let day_interest = self.interest(base, table, fraction, d, &mut at.pieces)?;
        if opts.keep_spans || opts.keep_days {
            report.spans.push(Span {
                first: d,
                last,
                base,
                fraction,
                interest_num: day_interest.numerator(),
                interest_den: day_interest.denominator(),
            });
        }
        let rate = blended_rate(base, &at.pieces.list, table, terms.tier_method);
        day_interest
            .add_to(&mut self.period_acc)
            .map_err(overflow("the accrued interest", last))?;
        if terms.compounding.months().is_some() {
            day_interest
                .add_to(&mut self.since_compounding)
                .map_err(overflow("the accrued interest", last))?;
        }
        let need_value = opts.keep_days || terms.compounding.joins_daily();
        let value = if need_value {
            day_interest
                .value()
                .map_err(overflow("the daily interest", last))?
        } else {
            Decimal::ZERO
        };
        Ok(Step {
            last,
            base,
            fraction,
            interest: day_interest,
            value,
            rate,
        })
    }

    /// B(D): the balance, less the movements the period's base leaves out,
    /// plus compounded interest not yet posted.
    #[inline]
    fn base(&self, d: NaiveDate, unbooked: &[usize]) -> Result<Decimal, EngineError> {
        let mut excluded = Decimal::ZERO;
        for &i in unbooked {
            if let Some(m) = self.movement(i) {
                excluded = checked(excluded.checked_add(m.amount), "the base", d)?;
            }
        }
        checked(
            self.state
                .balance
                .checked_sub(excluded)
                .and_then(|b| b.checked_add(self.state.compounded)),
            "the base",
            d,
        )
    }

    /// The last day of the run of days from `d` accrued in one step, and
    /// its day fraction: `d` alone off the fast path, or when one product
    /// would not equal the day loop's sum.
    #[inline]
    fn reach(
        &self,
        d: NaiveDate,
        period: Option<Period>,
        at: &mut Cursor,
        base: Decimal,
        table: Option<&RateTable>,
    ) -> Result<(NaiveDate, DayFraction), EngineError> {
        let terms = self.terms;
        let (p_start, end_excl) = at.basis.unwrap_or((d, None));
        let pb = PeriodBasis {
            basis: terms.basis,
            start: p_start,
            end: end_excl,
            maturity: terms.maturity,
            frequency: terms.posting.per_year(),
            references: &self.shared.references,
            calendar: &terms.calendar,
        };
        // Compounded interest makes the base a 28-digit quotient whose
        // running sums round; such days stay single. So do the days of a
        // movement valued but not yet booked: its back-value is worked out
        // on the base with it, whose rate source (credit or debit) and
        // changes the run's end does not follow.
        let last = if self.fast && self.state.compounded.is_zero() && at.unbooked.is_empty() {
            self.run_end(d, period, at.ci, at.mi, base, &pb)
        } else {
            d
        };
        if let Some(after) = last.succ_opt().filter(|_| last > d) {
            let f = pb.span(d, after)?;
            // One product must equal the day loop's sum to the last
            // digit: only when it needs no rounding (a 28-digit
            // compounded base falls back to single days).
            if self.exact_product(base, table, f.num, &mut at.pieces) {
                return Ok((last, f));
            }
        }
        Ok((d, pb.day(d)?))
    }

    /// Phase 6: back-valued movements. The interest they earn in a period
    /// that posts before they are booked is owed to a later posting; returns
    /// the run's share of it when day rows are kept (else zero).
    #[inline]
    fn owe_back_value(
        &mut self,
        d: NaiveDate,
        step: &Step,
        unbooked: &[usize],
    ) -> Result<Decimal, EngineError> {
        let mut back_value_today = Decimal::ZERO;
        for &i in unbooked {
            let Some(m) = self.movement(i) else { continue };
            let with = checked(step.base.checked_add(m.amount), "the base", d)?;
            let mut scratch = Pieces::default();
            let t = self.table_for(with, d)?;
            let full = self.interest(with, t, step.fraction, d, &mut scratch)?;
            let mut diff = full;
            diff.subtract(&step.interest)
                .map_err(overflow("the back-value interest", d))?;
            let owed = match self.state.back_value_owed.iter_mut().find(|(j, _)| *j == i) {
                Some((_, a)) => a,
                None => {
                    self.state.back_value_owed.push((i, Accrual::new()));
                    match self.state.back_value_owed.last_mut() {
                        Some((_, a)) => a,
                        None => continue,
                    }
                }
            };
            diff.add_to(owed)
                .map_err(overflow("the back-value interest", d))?;
            if self.options.keep_days {
                let v = diff
                    .value()
                    .map_err(overflow("the back-value interest", d))?;
                back_value_today = checked(
                    back_value_today.checked_add(v),
                    "the back-value interest",
                    d,
                )?;
            }
        }
        Ok(back_value_today)
    }

    /// Phase 7: the end of `d`: daily compounding joins the base, then a
    /// posting if a period ends, else a compounding end. Returns the amount
    /// posted, if any.
    #[inline]
    fn end_day(
        &mut self,
        d: NaiveDate,
        step: &Step,
        period: Option<Period>,
        at: &mut Cursor,
        report: &mut Report,
    ) -> Result<Option<Decimal>, EngineError> {
        let terms = self.terms;
        if terms.compounding.joins_daily() {
            self.state.compounded =
                checked(self.state.compounded.checked_add(step.value), "the base", d)?;
        }
        let mut posted_today = None;
        let is_compounding_end = self.shared.compounding_ends.get(at.ci) == Some(&d);
        if is_compounding_end {
            at.ci += 1;
        }
        if let Some(p) = period.filter(|p| p.end == d) {
            let row = self.post(p, d)?;
            if terms.capitalise {
                // The balance takes the net: the tax never reaches the customer.
                self.state.balance = checked(
                    self.state.balance.checked_add(row.withheld.net),
                    "the balance",
                    d,
                )?;
            }
            posted_today = Some(row.posted);
            report.postings.push(row);
            at.pi += 1;
        } else if is_compounding_end {
            let joined = self
                .since_compounding
                .value()
                .map_err(overflow("the compounded interest", d))?;
            self.state.compounded = checked(
                self.state
                    .compounded
                    .checked_add(joined)
                    .and_then(|c| c.checked_add(self.state.opening_to_join)),
                "the base",
                d,
            )?;
            self.state.opening_to_join = Decimal::ZERO;
            self.since_compounding = Accrual::new();
        }
        Ok(posted_today)
    }

    /// Phase 8: what the report keeps of `d`: the accrued at the window's
    /// eve, the day row, and the rate at the cut-off.
    #[inline]
    fn record_day(
        &self,
        d: NaiveDate,
        step: &Step,
        back_value: Decimal,
        posted: Option<Decimal>,
        report: &mut Report,
    ) -> Result<(), EngineError> {
        let opts = self.options;
        let is_window_eve = self.window_eve == Some(d);
        if opts.keep_days || is_window_eve || d == opts.cutoff {
            let accrued = self.accrued(d)?;
            if is_window_eve {
                report.accrued_before_window = Some(self.round(accrued));
                for (i, owed) in &self.state.back_value_owed {
                    let v = owed
                        .value()
                        .map_err(overflow("the back-value interest", d))?;
                    report.back_value_before_window.push((*i, self.round(v)));
                }
            }
            if opts.keep_days {
                report.days.push(DayRow {
                    date: d,
                    balance: self.state.balance,
                    base: step.base,
                    rate: step.rate,
                    fraction: step.fraction,
                    interest: step.value,
                    interest_num: step.interest.numerator(),
                    interest_den: step.interest.denominator(),
                    back_value,
                    accrued,
                    posted,
                    fixing: self.fixings.and_then(|f| f.get(&d)).cloned(),
                });
            }
        }
        if d == opts.cutoff {
            report.rate_at_cutoff = Some(step.rate);
        }
        Ok(())
    }

    /// Phase 9: movements after the last earning day still reach the
    /// balance; then the cut-off and window figures.
    fn finish(mut self, at: &mut Cursor, report: Report) -> Result<AccountResult, EngineError> {
        let terms = self.terms;
        let opts = self.options;
        let open = terms.open_date;
        while let Some(&i) = self.order.get(at.mi) {
            let Some(m) = self.movement(i) else { break };
            if m.value_date > opts.cutoff {
                break;
            }
            if m.value_date >= at.resume_day {
                self.state.balance = checked(
                    self.state.balance.checked_add(m.amount),
                    "the balance",
                    m.value_date,
                )?;
            }
            at.mi += 1;
        }

        let accrued_at_cutoff = if opts.cutoff < open {
            Decimal::ZERO
        } else {
            self.round(self.accrued(opts.cutoff)?)
        };
        let mut posted_in_window = Decimal::ZERO;
        for p in report
            .postings
            .iter()
            .filter(|p| p.end >= opts.window_start && p.end <= opts.cutoff)
        {
            posted_in_window = checked(
                posted_in_window.checked_add(p.posted),
                "the posted total",
                p.end,
            )?;
        }
        let before = report.accrued_before_window.unwrap_or(Decimal::ZERO);
        let interest_for_window = checked(
            posted_in_window
                .checked_add(accrued_at_cutoff)
                .and_then(|x| x.checked_sub(before)),
            "the interest for the window",
            opts.cutoff,
        )?;
        let effective_annual_rate = match report.rate_at_cutoff {
            Some(r) => Some(growth::effective_annual_rate(terms.compounding, r)?),
            None => None,
        };
        let balance_at_cutoff = if opts.cutoff < open {
            Decimal::ZERO
        } else {
            self.state.balance
        };
        Plan::recycle(plan::Buffers {
            periods: std::mem::take(&mut self.periods),
            pieces: std::mem::take(&mut at.pieces.list),
            order: std::mem::take(&mut self.order),
        });
        Ok(AccountResult {
            postings: report.postings,
            balance_at_cutoff,
            accrued_at_cutoff,
            accrued_before_window: before,
            back_value_before_window: report.back_value_before_window,
            posted_in_window,
            interest_for_window,
            rate_at_cutoff: report.rate_at_cutoff,
            effective_annual_rate,
            days: report.days,
            spans: report.spans,
            states: report.states,
            fixing_warnings: Vec::new(),
        })
    }

    /// The last day of the run from `d` over which base, rate table and
    /// day-fraction denominator stay the same and no posting, compounding,
    /// movement or reported figure falls inside.
    fn run_end(
        &self,
        d: NaiveDate,
        period: Option<Period>,
        ci: usize,
        mi: usize,
        base: Decimal,
        pb: &PeriodBasis,
    ) -> NaiveDate {
        let mut stop = self.last_day;
        let mut before = |x: Option<NaiveDate>| {
            if let Some(x) = x {
                stop = stop.min(x);
            }
        };
        before(period.map(|p| p.end));
        before(self.shared.compounding_ends.get(ci).copied());
        before(
            self.order
                .get(mi)
                .and_then(|&i| self.movement(i))
                .and_then(|m| m.value_date.pred_opt()),
        );
        let source = if base.is_sign_negative() && !base.is_zero() {
            self.debit_rates
        } else {
            Some(self.rates)
        };
        before(
            source
                .and_then(|s| s.next_change_after(d))
                .and_then(|n| n.pred_opt()),
        );
        before(self.window_eve.filter(|eve| d <= *eve));
        before(Some(self.options.cutoff));
        let breaks = &self.breaks;
        before(breaks.get(breaks.partition_point(|b| *b < d)).copied());
        before(pb.same_denominator_until(d));
        stop.max(d)
    }

    /// Whether base x rate x `num` is exact in a decimal, far enough from
    /// the 96-bit limit that the accumulator's sums stay exact too, so that
    /// one product equals the day loop's `num` additions to the last digit.
    /// A 28-digit compounded base fails it and falls back to single days.
    fn exact_product(
        &self,
        base: Decimal,
        table: Option<&RateTable>,
        num: i64,
        pieces: &mut Pieces,
    ) -> bool {
        let Some(table) = table else { return true };
        let Some(br) = pieces.fill(base, table, self.terms.tier_method).1 else {
            return false;
        };
        const LIMIT: u128 = 1 << 95;
        br.mantissa()
            .unsigned_abs()
            .checked_mul(u128::from(num.unsigned_abs()))
            .is_some_and(|m| m < LIMIT)
    }

    /// The table that applies to `base` on `d`: the account's rates, or the
    /// debit rates for a base of the opposite sign (`None`: it earns nothing).
    fn table_for(&self, base: Decimal, d: NaiveDate) -> Result<Option<&'a RateTable>, EngineError> {
        let debit = base.is_sign_negative() && !base.is_zero();
        if let Some(hit) = self.last_table.get() {
            if hit.debit == debit && hit.from <= d && hit.until.is_none_or(|u| d < u) {
                return Ok(Some(hit.table));
            }
        }
        let source = if debit {
            match self.debit_rates {
                Some(s) => s,
                None => return Ok(None),
            }
        } else {
            self.rates
        };
        let t = source.table_on(d).ok_or_else(|| EngineError::NoRate {
            date: d,
            first: source
                .first_effective()
                .map_or_else(|| "no rates at all".to_string(), |f| f.to_string()),
        })?;
        self.last_table.set(Some(TableHit {
            debit,
            from: d,
            until: source.next_change_after(d),
            table: t,
        }));
        Ok(Some(t))
    }

    /// i(D) for `base` (behaviour.md, Daily interest and compounding), as an exact sum.
    fn interest(
        &mut self,
        base: Decimal,
        table: Option<&RateTable>,
        f: DayFraction,
        d: NaiveDate,
        pieces: &mut Pieces,
    ) -> Result<DayInterest, EngineError> {
        let Some(table) = table else {
            pieces.clear();
            return Ok(DayInterest::Fraction(Decimal::ZERO, f.den.max(1)));
        };
        let terms = self.terms;
        let (list, br) = pieces.fill(base, table, terms.tier_method);
        let raw = match terms.compounding {
            Compounding::Continuous | Compounding::AnnualEffective => {
                let years = checked(
                    Decimal::from(f.num).checked_div(Decimal::from(f.den.max(1))),
                    "the day fraction",
                    d,
                )?;
                let mut total = Decimal::ZERO;
                for &(slice, rate) in list {
                    let growth = self.growth.get_or(
                        (rate.mantissa(), rate.scale(), f.num, f.den),
                        || {
                            Ok(if terms.compounding == Compounding::Continuous {
                                growth::exp_m1(checked(
                                    rate.checked_mul(years),
                                    "the exponent",
                                    d,
                                )?)?
                            } else {
                                growth::pow_m1(
                                    checked(Decimal::ONE.checked_add(rate), "the rate", d)?,
                                    years,
                                )?
                            })
                        },
                    )?;
                    total = checked(
                        slice.checked_mul(growth).and_then(|x| total.checked_add(x)),
                        "the daily interest",
                        d,
                    )?;
                }
                DayInterest::Amount(total)
            }
            _ => {
                let num = checked(br, "the daily interest", d)?;
                let num = checked(
                    num.checked_mul(Decimal::from(f.num)),
                    "the daily interest",
                    d,
                )?;
                DayInterest::Fraction(num, f.den)
            }
        };
        if terms.round_at == RoundAt::Daily {
            let places = terms.round_places.unwrap_or(terms.minor_units);
            let v = raw.value().map_err(overflow("the daily interest", d))?;
            return Ok(DayInterest::Amount(terms.round_mode.round(v, places)));
        }
        Ok(raw)
    }

    /// Accrued since the last posting at the end of `d`, unrounded: the
    /// period's interest, any opening accrued and any back-value owed.
    fn accrued(&self, d: NaiveDate) -> Result<Decimal, EngineError> {
        let mut a = self.period_acc;
        a.add_amount(self.state.opening_pending)
            .map_err(overflow("the accrued interest", d))?;
        for (_, owed) in &self.state.back_value_owed {
            a.add(owed).map_err(overflow("the accrued interest", d))?;
        }
        a.value().map_err(overflow("the accrued interest", d))
    }

    /// The posting at the end of period `p` (behaviour.md, Postings and capitalisation).
    fn post(&mut self, p: Period, d: NaiveDate) -> Result<PostingRow, EngineError> {
        let terms = self.terms;
        let round = |x: Decimal| terms.round_mode.round(x, terms.minor_units);
        let mut acc = self.period_acc;
        acc.add_amount(self.state.opening_pending)
            .map_err(overflow("the posting", d))?;
        let interest = acc.value().map_err(overflow("the posting", d))?.normalize();
        // Back-value owed for movements booked by now joins this posting, as its own figure;
        // the account's last posting (at maturity or a close) takes what was booked by its
        // payment, since no posting follows it.
        let last = terms.maturity.and_then(|m| m.pred_opt()) == Some(p.end);
        let booked_by = if last { p.payment.max(p.end) } else { p.end };
        let mut owed = Accrual::new();
        let mut keep = Vec::new();
        for (i, a) in std::mem::take(&mut self.state.back_value_owed) {
            let booked = self
                .movement(i)
                .and_then(|m| m.booking_date)
                .is_none_or(|b| b <= booked_by);
            if booked {
                owed.add(&a)
                    .map_err(overflow("the back-value interest", d))?;
            } else {
                keep.push((i, a));
            }
        }
        self.state.back_value_owed = keep;
        let back_value = round(
            owed.value()
                .map_err(overflow("the back-value interest", d))?,
        );
        let expected = checked(round(interest).checked_add(back_value), "the posting", d)?;
        let first = self.periods.first().is_some_and(|f| f.start == p.start);
        let actual = self.actual.iter().find(|a| {
            a.end == p.end && (a.start == p.start || (first && a.start == terms.open_date))
        });
        self.period_acc = Accrual::new();
        self.since_compounding = Accrual::new();
        self.state.compounded = Decimal::ZERO;
        self.state.opening_pending = Decimal::ZERO;
        self.state.opening_to_join = Decimal::ZERO;
        let posted = actual.map_or(expected, |a| a.amount);
        let withheld = match &terms.tax {
            None => Withheld::none(posted),
            Some(tax) => withhold(&tax.schedule, posted, p.payment, terms.minor_units)?,
        };
        Ok(PostingRow {
            start: p.start,
            end: p.end,
            payment: p.payment,
            kind: p.kind,
            interest,
            back_value,
            expected,
            posted,
            actual_given: actual.is_some(),
            withheld,
        })
    }
}

/// The tier pieces of one base under one table, and the sum of slice x
/// rate over them, kept while base and table stay the same (most days).
#[derive(Default)]
struct Pieces {
    list: Vec<(Decimal, Decimal)>,
    /// `None` when the sum overflows.
    sum: Option<Decimal>,
    /// The base (mantissa and scale, so the pieces' scales match too) and
    /// the table's address the pieces were built for.
    key: Option<(i128, u32, usize)>,
}

impl Pieces {
    fn clear(&mut self) {
        self.list.clear();
        self.sum = Some(Decimal::ZERO);
        self.key = None;
    }

    /// The pieces of `base` under `table`, built only when either changed.
    fn fill(
        &mut self,
        base: Decimal,
        table: &RateTable,
        method: TierMethod,
    ) -> (&[(Decimal, Decimal)], Option<Decimal>) {
        let key = (
            base.mantissa(),
            base.scale(),
            std::ptr::from_ref(table) as usize,
        );
        if self.key != Some(key) {
            table.pieces(base, method, &mut self.list);
            self.sum = self
                .list
                .iter()
                .try_fold(Decimal::ZERO, |acc, (slice, rate)| {
                    slice.checked_mul(*rate).and_then(|x| acc.checked_add(x))
                });
            self.key = Some(key);
        }
        (&self.list, self.sum)
    }
}

/// One day's interest: an exact numerator over a day-count denominator, or an
/// amount that is already a decimal (rounded daily, or exponential).
#[derive(Debug, Clone, Copy)]
enum DayInterest {
    Fraction(Decimal, u32),
    Amount(Decimal),
}

impl DayInterest {
    fn add_to(self, acc: &mut Accrual) -> Result<(), Overflow> {
        match self {
            DayInterest::Fraction(n, den) => acc.add_fraction(n, den),
            DayInterest::Amount(x) => acc.add_amount(x),
        }
    }

    fn numerator(self) -> Decimal {
        match self {
            DayInterest::Fraction(n, _) | DayInterest::Amount(n) => n,
        }
    }

    fn denominator(self) -> u32 {
        match self {
            DayInterest::Fraction(_, d) => d,
            DayInterest::Amount(_) => 1,
        }
    }

    fn value(self) -> Result<Decimal, Overflow> {
        match self {
            DayInterest::Fraction(n, den) => n.checked_div(Decimal::from(den)).ok_or(Overflow),
            DayInterest::Amount(x) => Ok(x),
        }
    }

    /// self -= other, as an exact difference.
    fn subtract(&mut self, other: &DayInterest) -> Result<(), Overflow> {
        *self = match (*self, *other) {
            (DayInterest::Fraction(a, da), DayInterest::Fraction(b, db)) if da == db => {
                DayInterest::Fraction(a.checked_sub(b).ok_or(Overflow)?, da)
            }
            (a, b) => DayInterest::Amount(a.value()?.checked_sub(b.value()?).ok_or(Overflow)?),
        };
        Ok(())
    }
}

/// The single annual rate a day's base earned: the tier's rate, or over bands
/// the interest-weighted average.
fn blended_rate(
    base: Decimal,
    pieces: &[(Decimal, Decimal)],
    table: Option<&RateTable>,
    method: TierMethod,
) -> Decimal {
    match pieces {
        [] => {
            // Nothing earned: report the rate a zero base would get, if any.
            match (table, method) {
                (Some(t), _) if base.is_zero() => t
                    .tiers
                    .iter()
                    .rev()
                    .find(|t| t.from <= Decimal::ZERO)
                    .map_or(Decimal::ZERO, |t| t.rate),
                _ => Decimal::ZERO,
            }
        }
        [(_, r)] if method == TierMethod::Whole => *r,
        many => {
            let total = many.iter().try_fold(Decimal::ZERO, |acc, (s, r)| {
                acc.checked_add(s.checked_mul(*r)?)
            });
            match total.and_then(|t| t.checked_div(base)) {
                Some(r) => r,
                None => Decimal::ZERO,
            }
        }
    }
}

mod plan;
#[cfg(test)]
mod tests;
