//! Account life events: a close before or after maturity, the break penalty
//! of an early close, and what a balance does after maturity (behaviour.md,
//! Account life events).
//!
//! A close on X is run as a maturity on X (the account earns to the night of
//! X-1 and the last period, the closing posting, ends on X-1), paid on X
//! itself with no business-day move or payment delay. What the close then
//! works out (the balance paid out, the penalty and what of it is waived) is
//! [`Closing`]. It never reads a book, prints, or changes an account that
//! has no life event: such an account's terms and run are the day loop's own.

use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::causes::{ChangeKind, Found, LikelyCause};
use super::error::EngineError;
use super::inputs::Inputs;
use super::rates::{RateSchedule, RateSource, RateTable};
use super::reconcile::{variance_bp, Reconciled, Tolerance};
use super::run::{accrue, AccountResult, PostingRow, RunOptions};
use super::shared::Shared;
use super::terms::{AccountTerms, FloatingTerms};
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::names::{lookup, UnknownName};
use crate::conventions::schedule::{roll_months, Period, Posting};

/// How an early close is penalised (the Accounts column `break_penalty`).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub enum BreakPenalty {
    /// No penalty.
    #[default]
    None,
    /// N days' simple interest on the balance at the end of X-1.
    Days(u32),
    /// The current term re-priced at another schedule (its `rate_ref` and its tables).
    Rate(String, Arc<RateSchedule>),
    /// A fixed amount.
    Amount(Decimal),
}

/// The kinds of `break_penalty`, as written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PenaltyKind {
    /// `none`.
    None,
    /// `days`.
    Days,
    /// `rate`.
    Rate,
    /// `amount`.
    Amount,
}

impl PenaltyKind {
    /// Parses `none`, `days`, `rate` or `amount`.
    ///
    /// ```
    /// use ledgerate::engine::events::PenaltyKind;
    /// assert_eq!(PenaltyKind::parse("Days"), Ok(PenaltyKind::Days));
    /// assert!(PenaltyKind::parse("fee").is_err());
    /// ```
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<PenaltyKind, UnknownName> {
        lookup(
            "break penalty",
            s,
            &[
                ("none", PenaltyKind::None),
                ("days", PenaltyKind::Days),
                ("rate", PenaltyKind::Rate),
                ("amount", PenaltyKind::Amount),
            ],
            &["none", "days", "rate", "amount"],
        )
    }
}

/// What bounds a break penalty (the Accounts column `penalty_limit`).
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub enum PenaltyLimit {
    /// The penalty may reduce the principal.
    #[default]
    None,
    /// At most the interest the current term earned (closing posting included).
    Interest,
}

impl PenaltyLimit {
    /// Parses `none` or `interest`.
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<PenaltyLimit, UnknownName> {
        lookup(
            "penalty limit",
            s,
            &[
                ("none", PenaltyLimit::None),
                ("interest", PenaltyLimit::Interest),
            ],
            &["none", "interest"],
        )
    }
}

/// What a balance does from maturity on (the Accounts column `after_maturity`).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub enum AfterMaturity {
    /// It earns nothing.
    #[default]
    None,
    /// It earns a schedule, simple, posted only by the closing posting.
    Rate(String, Arc<RateSchedule>),
    /// A new term of `months` starts at each maturity, at the schedule's
    /// table in force on that maturity.
    Rollover {
        /// The new term's length.
        months: u32,
        /// The schedule's name.
        rate_ref: String,
        /// Its tables.
        rates: Arc<RateSchedule>,
    },
}

/// The kinds of `after_maturity`, as written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AfterKind {
    /// `none`.
    None,
    /// `rate`.
    Rate,
    /// `rollover`.
    Rollover,
}

impl AfterKind {
    /// Parses `none`, `rate` or `rollover`.
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<AfterKind, UnknownName> {
        lookup(
            "after maturity",
            s,
            &[
                ("none", AfterKind::None),
                ("rate", AfterKind::Rate),
                ("rollover", AfterKind::Rollover),
            ],
            &["none", "rate", "rollover"],
        )
    }
}

/// An account's life events (behaviour.md, Account life events). The
/// default is an account that only ends at its maturity.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct LifeEvents {
    /// X: the day the account is closed and paid out.
    pub close_date: Option<NaiveDate>,
    /// The penalty of a close before maturity.
    pub break_penalty: BreakPenalty,
    /// What bounds it.
    pub penalty_limit: PenaltyLimit,
    /// The GL account credited with the penalty; `None`: the interest GL.
    pub gl_penalty: Option<String>,
    /// What a balance does from maturity.
    pub after_maturity: AfterMaturity,
}

/// No life event, held once for every account that has none.
static NO_EVENTS: std::sync::LazyLock<Shared<LifeEvents>> =
    std::sync::LazyLock::new(|| Shared::new(LifeEvents::default()));

impl Default for Shared<LifeEvents> {
    /// No life event: one value shared by every account that has none.
    fn default() -> Shared<LifeEvents> {
        NO_EVENTS.clone()
    }
}

impl LifeEvents {
    /// Whether the account has no life event: it runs exactly as before.
    pub fn is_none(&self) -> bool {
        self.close_date.is_none() && self.after_maturity == AfterMaturity::None
    }
}

/// The close a run to `cutoff` makes: X when it is on or before the cut-off.
pub fn close_in_run(terms: &AccountTerms, cutoff: NaiveDate) -> Option<NaiveDate> {
    terms.events.close_date.filter(|x| *x <= cutoff)
}

/// The terms a run to `cutoff` computes: for a close on X by the cut-off and
/// before any maturity, the account matures on X. `None`: the terms as they are.
///
/// ```
/// use ledgerate::conventions::daycount::Basis;
/// use ledgerate::engine::events::run_terms;
/// use ledgerate::engine::AccountTerms;
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let mut t = AccountTerms::new("TD-1", "USD", 2, Basis::Act365F, d("2026-11-02"), "10000".parse().unwrap());
/// t.maturity = Some(d("2027-05-03"));
/// t.events.close_date = Some(d("2026-11-06"));
/// assert_eq!(run_terms(&t, d("2026-11-30")).unwrap().maturity, Some(d("2026-11-06")));
/// assert!(run_terms(&t, d("2026-11-05")).is_none()); // closed after the cut-off: nothing changes
/// ```
pub fn run_terms(terms: &AccountTerms, cutoff: NaiveDate) -> Option<AccountTerms> {
    let x = close_in_run(terms, cutoff)?;
    if terms.maturity.is_some_and(|m| m <= x) {
        return None;
    }
    Some(AccountTerms {
        maturity: Some(x),
        ..terms.clone()
    })
}

/// The closing period of a run whose terms close on X by the cut-off is
/// paid on X itself: no business-day move, no payment delay.
pub(crate) fn pay_on_close(periods: &mut [Period], terms: &AccountTerms, cutoff: NaiveDate) {
    let Some(x) = close_in_run(terms, cutoff) else {
        return;
    };
    if terms.maturity != Some(x) {
        return;
    }
    if let Some(p) = periods.last_mut().filter(|p| p.end.succ_opt() == Some(x)) {
        p.payment = x;
    }
}

/// What a close by the cut-off works out.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Closing {
    /// X.
    pub date: NaiveDate,
    /// The balance at the end of X-1.
    pub balance: Decimal,
    /// The closing posting (`None` when the account never posts, or when
    /// it matured before X).
    pub closing_posting: Option<PostingRow>,
    /// The penalty charged.
    pub penalty: Decimal,
    /// The penalty before `penalty_limit`, when a limit cut it.
    pub penalty_before_limit: Decimal,
    /// What `penalty_limit` waived.
    pub waived: Decimal,
    /// The interest of the term at the contract rate, closing posting included.
    pub term_interest: Decimal,
    /// For a `rate` penalty, the same at the break rate.
    pub break_interest: Option<Decimal>,
    /// Balance at the end of X-1 + closing posting - penalty - the closing
    /// posting's withholding tax.
    pub payout: Decimal,
    /// The movements valued on X: what was paid out.
    pub paid: Decimal,
    /// Whether any movement is valued on X.
    pub paid_given: bool,
    /// Whether the penalty applies (a close before maturity with a penalty).
    pub penalised: bool,
}

/// Works out the close of `terms` (its own terms, not the run's) from the
/// run's `result`, and sets the run's figures from X on: the balance is 0.
///
/// # Errors
/// An [`EngineError`] when the re-priced term cannot be run, or a movement
/// is valued after X.
pub fn settle_close(
    terms: &AccountTerms,
    leg: &Leg,
    inputs: &Inputs,
    options: RunOptions,
    result: &mut AccountResult,
) -> Result<Option<Closing>, EngineError> {
    let Some(x) = close_in_run(terms, options.cutoff) else {
        return Ok(None);
    };
    let run = &leg.terms;
    let inputs = &leg.inputs(inputs);
    if let Some(m) = inputs.movements.iter().find(|m| m.value_date > x) {
        return Err(EngineError::Unsupported(format!(
            "a movement valued {} after the close_date {x}",
            m.value_date
        )));
    }
    let eve = x.pred_opt().unwrap_or(x);
    let closing_posting = if run.maturity == Some(x) {
        result.postings.iter().find(|p| p.end == eve).cloned()
    } else {
        None
    };
    let paid = sum(
        inputs
            .movements
            .iter()
            .filter(|m| m.value_date == x)
            .map(|m| m.amount),
        x,
    )?;
    // The day loop capitalised the closing posting's net (its tax never
    // reaches the customer): take out what it added.
    let capitalised = match &closing_posting {
        Some(p) if terms.capitalise => p.withheld.net,
        _ => Decimal::ZERO,
    };
    let balance = result
        .balance_at_cutoff
        .checked_sub(paid)
        .and_then(|b| b.checked_sub(capitalised))
        .ok_or(EngineError::Overflow {
            what: "the balance",
            date: x,
        })?;
    let term_start = run.open_date;
    let term_interest = sum(
        result
            .postings
            .iter()
            .filter(|p| p.start >= term_start && p.end <= eve)
            .map(|p| p.expected),
        x,
    )?;
    let penalised = leg.contract_maturity.is_some_and(|m| x < m)
        && leg.kind != LegKind::Matured
        && terms.events.break_penalty != BreakPenalty::None
        && closing_posting.is_some();
    let mut break_interest = None;
    let raw = if penalised {
        match &terms.events.break_penalty {
            BreakPenalty::None => Decimal::ZERO,
            BreakPenalty::Amount(a) => *a,
            BreakPenalty::Days(n) => days_penalty(run, inputs.rates, balance, eve, *n)?,
            BreakPenalty::Rate(_, schedule) => {
                let at_break = repriced(run, inputs, options, schedule, term_start, eve)?;
                break_interest = Some(at_break);
                term_interest
                    .checked_sub(at_break)
                    .unwrap_or(Decimal::ZERO)
                    .max(Decimal::ZERO)
            }
        }
    } else {
        Decimal::ZERO
    };
    let raw = terms.round_mode.round(raw, terms.minor_units);
    let penalty = match terms.events.penalty_limit {
        PenaltyLimit::Interest => raw.min(term_interest.max(Decimal::ZERO)),
        PenaltyLimit::None => raw,
    };
    let waived = raw - penalty;
    // The closing posting pays out net of its withholding tax (the gross for
    // an account without tax).
    let closing = closing_posting
        .as_ref()
        .map_or(Decimal::ZERO, |p| p.withheld.net);
    let payout = balance
        .checked_add(closing)
        .and_then(|b| b.checked_sub(penalty))
        .ok_or(EngineError::Overflow {
            what: "the payout",
            date: x,
        })?;
    result.balance_at_cutoff = Decimal::ZERO;
    Ok(Some(Closing {
        date: x,
        balance,
        closing_posting,
        penalty,
        penalty_before_limit: raw,
        waived,
        term_interest,
        break_interest,
        payout,
        paid,
        paid_given: inputs.movements.iter().any(|m| m.value_date == x),
        penalised,
    }))
}

fn sum(xs: impl Iterator<Item = Decimal>, date: NaiveDate) -> Result<Decimal, EngineError> {
    let mut total = Decimal::ZERO;
    for x in xs {
        total = total.checked_add(x).ok_or(EngineError::Overflow {
            what: "a sum of postings",
            date,
        })?;
    }
    Ok(total)
}

/// The days of a year of `basis` for "N days' simple interest": 360 for
/// ACT/360 and the 30/360 bases, 252 for BUS/252 (N counts business days),
/// else 365.
///
/// ```
/// use ledgerate::conventions::daycount::Basis;
/// use ledgerate::engine::events::penalty_year;
/// assert_eq!(penalty_year(Basis::Act360), 360);
/// assert_eq!(penalty_year(Basis::ActActIsda), 365);
/// assert_eq!(penalty_year(Basis::Bus252), 252);
/// ```
pub fn penalty_year(basis: Basis) -> u32 {
    match basis {
        Basis::Act360
        | Basis::Thirty360
        | Basis::Thirty360Us
        | Basis::Thirty360E
        | Basis::Thirty360EIsda => 360,
        Basis::Bus252 => 252,
        Basis::Act365F | Basis::Act365L | Basis::ActActIsda | Basis::ActActIcma | Basis::Nl365 => {
            365
        }
    }
}

/// round(P x r x N / Y), r the rate (tier by P) of the table in force on X-1.
fn days_penalty(
    terms: &AccountTerms,
    rates: &RateSchedule,
    balance: Decimal,
    eve: NaiveDate,
    days: u32,
) -> Result<Decimal, EngineError> {
    if terms.floating.method.is_floating() {
        return Err(EngineError::Unsupported(
            "break_penalty days on a floating-rate account".into(),
        ));
    }
    let table = rates.table_on(eve).ok_or_else(|| EngineError::NoRate {
        date: eve,
        first: rates
            .first_effective()
            .map_or_else(|| "none".to_string(), |d| d.to_string()),
    })?;
    let mut pieces = Vec::new();
    table.pieces(balance, terms.tier_method, &mut pieces);
    let overflow = EngineError::Overflow {
        what: "the break penalty",
        date: eve,
    };
    let mut yearly = Decimal::ZERO;
    for (slice, rate) in pieces {
        yearly = slice
            .checked_mul(rate)
            .and_then(|x| yearly.checked_add(x))
            .ok_or_else(|| overflow.clone())?;
    }
    let penalty = yearly
        .checked_mul(Decimal::from(days))
        .and_then(|x| x.checked_div(Decimal::from(penalty_year(terms.basis))))
        .ok_or(overflow)?;
    Ok(terms
        .round_mode
        .round(penalty.max(Decimal::ZERO), terms.minor_units))
}

/// The term from `term_start` to X-1 run again at `schedule`, under the
/// same basis, compounding, posting and rounding: the sum of its postings.
fn repriced(
    run: &AccountTerms,
    inputs: &Inputs,
    options: RunOptions,
    schedule: &RateSchedule,
    term_start: NaiveDate,
    eve: NaiveDate,
) -> Result<Decimal, EngineError> {
    if run.floating.method.is_floating() {
        return Err(EngineError::Unsupported(
            "break_penalty rate on a floating-rate account".into(),
        ));
    }
    let again = Inputs {
        rates: schedule,
        debit_rates: inputs.debit_rates,
        movements: inputs.movements,
        actual: &[],
        breaks: &[],
        floating: None,
    };
    let opts = RunOptions {
        keep_days: false,
        keep_states: false,
        keep_spans: false,
        ..options
    };
    let r = accrue(run, again, opts)?;
    sum(
        r.postings
            .iter()
            .filter(|p| p.start >= term_start && p.end <= eve)
            .map(|p| p.expected),
        eve,
    )
}

/// Whether `posting` makes no closing posting (a warning with a close).
pub fn never_posts(terms: &AccountTerms) -> bool {
    terms.posting == Posting::None
}

/// What one term of an account is run as.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LegKind {
    /// The account's own term, from its `open_date`.
    Contract,
    /// A new term rolled over at a maturity.
    Rolled,
    /// A matured balance earning `matured_rate_ref`.
    Matured,
}

/// One term of an account's life: the terms it is run with (a close by the
/// cut-off as its maturity) and the schedule it earns.
#[derive(Debug, Clone)]
pub struct Leg {
    /// The terms run.
    pub terms: AccountTerms,
    /// Its own schedule (a rolled term's fixed table, a matured balance's
    /// schedule); `None`: the account's rates.
    pub rates: Option<Arc<RateSchedule>>,
    /// The term's maturity by contract (before any close).
    pub contract_maturity: Option<NaiveDate>,
    /// What the term is.
    pub kind: LegKind,
}

impl Leg {
    /// The account's inputs with this term's schedule.
    pub fn inputs<'a>(&'a self, inputs: &Inputs<'a>) -> Inputs<'a> {
        match &self.rates {
            Some(r) => Inputs {
                rates: r,
                floating: None,
                ..*inputs
            },
            None => *inputs,
        }
    }
}

/// An account's status at the cut-off (behaviour.md, Account life events).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LifeStatus {
    /// Earning, or matured and paid out.
    Open,
    /// Closed by the cut-off.
    Closed,
    /// Matured with a balance not paid out.
    MaturedUnpaid,
    /// Rolled over at least once.
    RolledOver,
}

impl LifeStatus {
    /// The word the Accruals sheet shows.
    pub fn word(self) -> &'static str {
        match self {
            LifeStatus::Open => "open",
            LifeStatus::Closed => "closed",
            LifeStatus::MaturedUnpaid => "matured unpaid",
            LifeStatus::RolledOver => "rolled over",
        }
    }
}

/// An account's life run to the cut-off: its terms one after another and
/// their figures joined into one result.
#[derive(Debug, Clone)]
pub struct LifeRun {
    /// The joined result: postings of every term, the cut-off figures of
    /// the last, the window's eve figures of the term that holds it.
    pub result: AccountResult,
    /// The terms, in order; never empty.
    pub legs: Vec<Leg>,
}

/// An account's life at the cut-off: its terms, its close and what the
/// Accruals sheet shows of it.
#[derive(Debug, Clone)]
pub struct Life {
    /// The terms run, in order.
    pub legs: Vec<Leg>,
    /// Its close by the cut-off, when it has one.
    pub closing: Option<Closing>,
    /// Its status and current term.
    pub figures: LifeFigures,
}

impl Life {
    /// The account's status, days since maturity, current term start and
    /// maturity at the cut-off, from its terms and joined `result`.
    pub fn figures(
        own: &AccountTerms,
        legs: &[Leg],
        result: &AccountResult,
        cutoff: NaiveDate,
    ) -> LifeFigures {
        let last = legs.last();
        let term_start = Some(last.map_or(own.open_date, |l| l.terms.open_date));
        let maturity = last.map_or(own.maturity, |l| l.contract_maturity);
        let first_maturity = own.maturity.filter(|m| *m <= cutoff);
        let status = if close_in_run(own, cutoff).is_some() {
            LifeStatus::Closed
        } else if legs.iter().any(|l| l.kind == LegKind::Rolled) {
            LifeStatus::RolledOver
        } else if first_maturity.is_some() && !result.balance_at_cutoff.is_zero() {
            LifeStatus::MaturedUnpaid
        } else {
            LifeStatus::Open
        };
        let days_since_maturity = match (status, first_maturity) {
            (LifeStatus::MaturedUnpaid, Some(m)) => Some((cutoff - m).num_days() + 1),
            _ => None,
        };
        LifeFigures {
            status,
            days_since_maturity,
            term_start,
            maturity,
        }
    }
}

/// The life figures of an account: its own when it has life events, else
/// those of its terms and run alone (a matured balance not paid out).
pub fn figures_of(
    own: &AccountTerms,
    life: Option<&Life>,
    result: &AccountResult,
    cutoff: NaiveDate,
) -> LifeFigures {
    match life {
        Some(l) => l.figures,
        None => Life::figures(own, &[], result, cutoff),
    }
}

/// What the Accruals sheet shows of an account's life.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LifeFigures {
    /// Its status at the cut-off.
    pub status: LifeStatus,
    /// C - M + 1 for a matured balance not paid out.
    pub days_since_maturity: Option<i64>,
    /// The first day of the current term.
    pub term_start: Option<NaiveDate>,
    /// The current term's maturity.
    pub maturity: Option<NaiveDate>,
}

/// Runs `own` to the cut-off term by term (behaviour.md, Account life
/// events): its own term, then from a maturity before the cut-off either a
/// matured balance earning `matured_rate_ref` or a new term at each
/// maturity; a close by the cut-off ends the term it falls in.
///
/// # Errors
/// An [`EngineError`] from a term's run, or no rollover table in force on a maturity.
pub fn accrue_life(
    own: &AccountTerms,
    inputs: Inputs,
    options: RunOptions,
) -> Result<LifeRun, EngineError> {
    let c = options.cutoff;
    let x = close_in_run(own, c);
    let mut leg = Leg {
        terms: with_close(own.clone(), own.maturity, x),
        rates: None,
        contract_maturity: own.maturity,
        kind: LegKind::Contract,
    };
    let mut legs: Vec<Leg> = Vec::new();
    let mut results: Vec<AccountResult> = Vec::new();
    loop {
        // The term matures by the cut-off, before any close, and something follows.
        let next_at = leg
            .contract_maturity
            .filter(|m| *m <= c && x.is_none_or(|x| *m < x))
            .filter(|_| own.events.after_maturity != AfterMaturity::None);
        let Some(m) = next_at else {
            let r = accrue(&leg.terms, leg.inputs(&inputs), options)?;
            results.push(r);
            legs.push(leg);
            break;
        };
        let eve = m
            .pred_opt()
            .ok_or(EngineError::Unsupported("a date out of range".into()))?;
        let r = accrue(
            &leg.terms,
            leg.inputs(&inputs),
            RunOptions {
                cutoff: eve,
                ..options
            },
        )?;
        let principal = r.balance_at_cutoff;
        results.push(r);
        let next = next_leg(own, &leg, m, principal, x)?;
        legs.push(std::mem::replace(&mut leg, next));
    }
    Ok(LifeRun {
        result: join(&legs, results, options)?,
        legs,
    })
}

/// `terms` with a close on X by the cut-off as its maturity, when before `maturity`.
fn with_close(
    mut terms: AccountTerms,
    maturity: Option<NaiveDate>,
    x: Option<NaiveDate>,
) -> AccountTerms {
    terms.maturity = match (maturity, x) {
        (Some(m), Some(x)) if x < m => Some(x),
        (None, Some(x)) => Some(x),
        _ => maturity,
    };
    terms
}

/// The term that starts at the maturity `m` of `leg`, on `principal`.
fn next_leg(
    own: &AccountTerms,
    leg: &Leg,
    m: NaiveDate,
    principal: Decimal,
    x: Option<NaiveDate>,
) -> Result<Leg, EngineError> {
    let base = AccountTerms {
        open_date: m,
        opening_balance: principal,
        opening_accrued: Decimal::ZERO,
        period_start: None,
        floating: FloatingTerms::default(),
        ..leg.terms.clone()
    };
    match &own.events.after_maturity {
        AfterMaturity::Rate(_, schedule) => Ok(Leg {
            terms: AccountTerms {
                compounding: Compounding::Simple,
                posting: if x.is_some() {
                    Posting::Maturity
                } else {
                    Posting::None
                },
                anchor: None,
                maturity: x,
                ..base
            },
            rates: Some(Arc::clone(schedule)),
            contract_maturity: None,
            kind: LegKind::Matured,
        }),
        AfterMaturity::Rollover { months, rates, .. } => {
            let months = i32::try_from(*months)
                .map_err(|_| EngineError::Unsupported("a rollover term too long".into()))?;
            let rolled = roll_months(m, months).ok_or(EngineError::Unsupported(
                "a rolled maturity out of range".into(),
            ))?;
            let table = rates.table_on(m).ok_or_else(|| EngineError::NoRate {
                date: m,
                first: rates
                    .first_effective()
                    .map_or_else(|| "none".to_string(), |d| d.to_string()),
            })?;
            let fixed = RateSchedule::from_tables(vec![RateTable {
                effective: m,
                tiers: table.tiers.clone(),
            }]);
            Ok(Leg {
                terms: with_close(base, Some(rolled), x),
                rates: Some(Arc::new(fixed)),
                contract_maturity: Some(rolled),
                kind: LegKind::Rolled,
            })
        }
        AfterMaturity::None => Err(EngineError::Unsupported(
            "a new term without after_maturity".into(),
        )),
    }
}

/// The terms' results joined: every posting, the cut-off figures of the
/// last term, the window's eve figures of the term that holds the eve.
fn join(
    legs: &[Leg],
    mut results: Vec<AccountResult>,
    options: RunOptions,
) -> Result<AccountResult, EngineError> {
    if results.len() == 1 {
        if let Some(r) = results.pop() {
            return Ok(r);
        }
    }
    let f = options.window_start;
    let eve = f.pred_opt().unwrap_or(f);
    // The term whose days hold F-1: the last that opened on or before it.
    let holder = legs
        .iter()
        .rposition(|l| l.terms.open_date <= eve)
        .unwrap_or(0);
    let mut iter = results.into_iter().enumerate();
    let Some((_, mut joined)) = iter.next() else {
        return Err(EngineError::Unsupported("an account with no term".into()));
    };
    let mut before = if holder == 0 {
        Some((
            joined.accrued_before_window,
            std::mem::take(&mut joined.back_value_before_window),
        ))
    } else {
        None
    };
    for (i, r) in iter {
        if i == holder {
            before = Some((r.accrued_before_window, r.back_value_before_window));
        }
        joined.postings.extend(r.postings);
        joined.days.extend(r.days);
        joined.spans.extend(r.spans);
        joined.fixing_warnings.extend(r.fixing_warnings);
        joined.balance_at_cutoff = r.balance_at_cutoff;
        joined.accrued_at_cutoff = r.accrued_at_cutoff;
        joined.rate_at_cutoff = r.rate_at_cutoff;
        joined.effective_annual_rate = r.effective_annual_rate;
    }
    let (accrued_before, back_value) = before.unwrap_or_default();
    joined.accrued_before_window = accrued_before;
    joined.back_value_before_window = back_value;
    let c = options.cutoff;
    joined.posted_in_window = sum(
        joined
            .postings
            .iter()
            .filter(|p| p.end >= f && p.end <= c)
            .map(|p| p.posted),
        c,
    )?;
    joined.interest_for_window = joined
        .posted_in_window
        .checked_add(joined.accrued_at_cutoff)
        .and_then(|x| x.checked_sub(joined.accrued_before_window))
        .ok_or(EngineError::Overflow {
            what: "the interest for the window",
            date: c,
        })?;
    Ok(joined)
}

/// The cause search's finding for the closing period's statement row, with
/// "interest posted net of the break penalty (X)" first when the row shows
/// the closing posting less the penalty (behaviour.md, Account life events).
pub fn net_of_penalty(
    closing: &Closing,
    row: &Reconciled,
    tolerance: &Tolerance,
    places: u32,
    cause: &mut LikelyCause,
) {
    let x = closing.date;
    if closing.penalty.is_zero() || row.end.succ_opt() != Some(x) {
        return;
    }
    let Some(gap) = row
        .expected
        .checked_sub(closing.penalty)
        .and_then(|net| row.posted.checked_sub(net))
    else {
        return;
    };
    if !tolerance.accepts(gap, variance_bp(gap, row.balance_years), places) {
        return;
    }
    let how = if gap.is_zero() {
        "reproduces the posted amount exactly".to_string()
    } else {
        format!("comes within {}", gap.abs())
    };
    cause.found.insert(
        0,
        Found {
            words: format!("interest posted net of the break penalty ({x}) ({how})"),
            gap: gap.abs(),
            kind: ChangeKind::BreakPenalty,
        },
    );
    cause.implied = None;
}
