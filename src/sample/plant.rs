//! Planted statement mistakes: what an institution's system might have posted
//! instead of the contract's interest, one mistake per affected row, each of a
//! kind the likely-cause search can name.
//!
//! The wrong amount is computed by the engine on the changed account (another
//! basis, a rate change left out or moved, a movement moved or left out), or
//! from the right run over a period a day off, or is the right amount plus an
//! amount no single change explains. A mistake whose amount would land within
//! a few minor units of the right one is not planted; the next kind is tried.
//! Pure: nothing here reads or writes a file.

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::rng::Rng;
use super::{run_options, CUTOFF};
use crate::book::AccountEntry;
use crate::conventions::daycount::Basis;
use crate::engine::rates::RateSchedule;
use crate::engine::reconcile::expected_over;
use crate::engine::run::{AccountResult, PostingRow};
use crate::engine::{AccountTerms, EngineError, Movement};
use crate::pipeline::{run_account, BookAccount};

/// The kinds of planted mistake.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum MistakeKind {
    /// Interest on another day-count basis.
    OtherBasis,
    /// A rate change of the period left out.
    RateChangeNotApplied,
    /// A rate change applied a few days early or late.
    RateChangeMoved,
    /// A movement taken a few days early or late.
    MovementMoved,
    /// A movement left out.
    MovementLeftOut,
    /// The period counted from a day late or to a day early.
    PeriodADayOff,
    /// The right amount plus an amount no single change explains.
    UnexplainedAmount,
    /// The right gross less the tax withheld from it, on a statement of
    /// gross amounts (planted only on taxed accounts).
    PostedNetOfTax,
}

impl MistakeKind {
    /// Every kind: the seven tried on any account, then the one of taxed
    /// accounts.
    pub const ALL: [MistakeKind; 8] = [
        MistakeKind::OtherBasis,
        MistakeKind::RateChangeNotApplied,
        MistakeKind::RateChangeMoved,
        MistakeKind::MovementMoved,
        MistakeKind::MovementLeftOut,
        MistakeKind::PeriodADayOff,
        MistakeKind::UnexplainedAmount,
        MistakeKind::PostedNetOfTax,
    ];

    /// The kind in words.
    ///
    /// ```
    /// use ledgerate::sample::MistakeKind;
    /// assert_eq!(MistakeKind::PeriodADayOff.name(), "period a day off");
    /// ```
    pub fn name(self) -> &'static str {
        match self {
            MistakeKind::OtherBasis => "other basis",
            MistakeKind::RateChangeNotApplied => "rate change not applied",
            MistakeKind::RateChangeMoved => "rate change moved",
            MistakeKind::MovementMoved => "movement moved",
            MistakeKind::MovementLeftOut => "movement left out",
            MistakeKind::PeriodADayOff => "period a day off",
            MistakeKind::UnexplainedAmount => "unexplained amount",
            MistakeKind::PostedNetOfTax => "posted net of tax",
        }
    }
}

/// One planted mistake.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Mistake {
    /// Posted on `used` instead of the account's basis.
    OtherBasis {
        /// The basis the posting used.
        used: Basis,
    },
    /// Posted without the rate change effective on `effective`.
    RateChangeNotApplied {
        /// The change left out.
        effective: NaiveDate,
    },
    /// Posted with the change of `effective` applied from `applied`.
    RateChangeMoved {
        /// The change's real date.
        effective: NaiveDate,
        /// The date the posting used.
        applied: NaiveDate,
    },
    /// Posted with the movement `reference` valued `value_date` taken from `taken`.
    MovementMoved {
        /// The movement's reference.
        reference: String,
        /// Its value date.
        value_date: NaiveDate,
        /// The date the posting used.
        taken: NaiveDate,
    },
    /// Posted without the movement `reference`.
    MovementLeftOut {
        /// The movement's reference.
        reference: String,
    },
    /// Posted for the period from its second day.
    PeriodStartADayLate,
    /// Posted for the period to its last day but one.
    PeriodEndADayEarly,
    /// Posted with `extra` more than the right amount (negative: less).
    UnexplainedAmount {
        /// The amount added.
        extra: Decimal,
    },
    /// Posted as the gross less `tax` withheld at `percent`.
    PostedNetOfTax {
        /// The tax rate used, in percent (22 for 22%).
        percent: Decimal,
        /// The tax taken off the gross.
        tax: Decimal,
    },
}

impl Mistake {
    /// Its kind.
    pub fn kind(&self) -> MistakeKind {
        match self {
            Mistake::OtherBasis { .. } => MistakeKind::OtherBasis,
            Mistake::RateChangeNotApplied { .. } => MistakeKind::RateChangeNotApplied,
            Mistake::RateChangeMoved { .. } => MistakeKind::RateChangeMoved,
            Mistake::MovementMoved { .. } => MistakeKind::MovementMoved,
            Mistake::MovementLeftOut { .. } => MistakeKind::MovementLeftOut,
            Mistake::PeriodStartADayLate | Mistake::PeriodEndADayEarly => {
                MistakeKind::PeriodADayOff
            }
            Mistake::UnexplainedAmount { .. } => MistakeKind::UnexplainedAmount,
            Mistake::PostedNetOfTax { .. } => MistakeKind::PostedNetOfTax,
        }
    }
}

/// The account and its right run.
pub(crate) struct Job<'a> {
    /// The account as its book holds it (no statement rows yet).
    pub account: &'a BookAccount<'a>,
    /// Its rates (the account's, never absent for a sample account).
    pub rates: &'a RateSchedule,
    /// Run with day rows kept.
    pub right: &'a AccountResult,
    /// The posting of the statement row.
    pub posting: &'a PostingRow,
}

impl Job<'_> {
    fn terms(&self) -> &AccountTerms {
        &self.account.entry.terms
    }

    fn movements(&self) -> &[Movement] {
        self.account.movements
    }
}

/// The kinds planted on any account, in the order they are tried (a
/// statement posted net of tax is planted by the sample's tax module).
const TRIED: [MistakeKind; 7] = [
    MistakeKind::OtherBasis,
    MistakeKind::RateChangeNotApplied,
    MistakeKind::RateChangeMoved,
    MistakeKind::MovementMoved,
    MistakeKind::MovementLeftOut,
    MistakeKind::PeriodADayOff,
    MistakeKind::UnexplainedAmount,
];

/// A mistake must move the amount by at least this many minor units, so
/// that the row is outside the default tolerance (one minor unit).
const LEAST_GAP_UNITS: i64 = 3;

/// Plants one mistake in the posting of `job`, drawing from `stream`.
///
/// # Errors
/// An [`EngineError`] when the right run's figures overflow (the changed runs
/// that fail are simply not planted).
pub(crate) fn plant(job: &Job, stream: u64) -> Result<(Mistake, Decimal), EngineError> {
    let mut r = Rng::stream(stream, 0x5EED);
    let first = usize::try_from(r.below(TRIED.len() as u64)).unwrap_or(0);
    let least = Decimal::new(LEAST_GAP_UNITS, job.terms().minor_units);
    let right = job.posting.expected;
    for k in 0..TRIED.len() {
        let Some(kind) = TRIED.get((first + k) % TRIED.len()) else {
            continue;
        };
        if let Some((m, amount)) = attempt(*kind, job, &mut r)? {
            if (amount - right).abs() >= least {
                return Ok((m, amount));
            }
        }
    }
    Ok(unexplained(job, &mut r))
}

/// The posting the changed account would make for the same period: the
/// account with `terms` (when given), `rates` and `movements` in place of
/// its own.
fn rerun(
    job: &Job,
    terms: Option<&AccountTerms>,
    rates: &RateSchedule,
    movements: &[Movement],
) -> Option<Decimal> {
    let changed_entry;
    let entry = match terms {
        Some(t) => {
            changed_entry = AccountEntry {
                terms: t.clone(),
                ..job.account.entry.clone()
            };
            &changed_entry
        }
        None => job.account.entry,
    };
    let account = BookAccount {
        entry,
        rates: Some(rates),
        movements,
        ..*job.account
    };
    let run = run_account(&account, &run_options(false)).ok()?;
    run.result
        .postings
        .iter()
        .find(|w| w.start == job.posting.start && w.end == job.posting.end)
        .map(|w| w.expected)
}

fn shifted(d: NaiveDate, k: i64) -> Option<NaiveDate> {
    let days = chrono::Days::new(k.unsigned_abs());
    if k >= 0 {
        d.checked_add_days(days)
    } else {
        d.checked_sub_days(days)
    }
}

/// A few days either way: 1 to 5, early or late.
fn offset(r: &mut Rng) -> i64 {
    let k = r.between(1, 5);
    if r.chance(500) {
        -k
    } else {
        k
    }
}

/// Bases an account's posting might wrongly use, most likely first.
fn other_bases(b: Basis) -> &'static [Basis] {
    match b {
        Basis::Act360 => &[Basis::Act365F, Basis::ActActIsda],
        Basis::Act365F | Basis::Act365L | Basis::Nl365 | Basis::ActActIcma => {
            &[Basis::Act360, Basis::ActActIsda]
        }
        Basis::ActActIsda => &[Basis::Act360, Basis::Act365F],
        Basis::Thirty360 | Basis::Thirty360Us | Basis::Thirty360E | Basis::Thirty360EIsda => {
            &[Basis::Act365F, Basis::Act360]
        }
        Basis::Bus252 => &[Basis::Act365F, Basis::Act360],
    }
}

/// The posting under one mistake of `kind`, drawing from `r`; `None` when
/// the account offers no such mistake or the changed account cannot be
/// computed.
fn attempt(
    kind: MistakeKind,
    job: &Job,
    r: &mut Rng,
) -> Result<Option<(Mistake, Decimal)>, EngineError> {
    Ok(match kind {
        MistakeKind::OtherBasis => other_basis(job),
        MistakeKind::RateChangeNotApplied => rate_change_not_applied(job, r),
        MistakeKind::RateChangeMoved => rate_change_moved(job, r),
        MistakeKind::MovementMoved => movement_moved(job, r),
        MistakeKind::MovementLeftOut => movement_left_out(job, r),
        MistakeKind::PeriodADayOff => period_a_day_off(job, r)?,
        MistakeKind::UnexplainedAmount => Some(unexplained(job, r)),
        MistakeKind::PostedNetOfTax => None,
    })
}

/// Rate changes that fall inside the posting's period (the first table is
/// not a change), by table index.
fn changes_in_period(job: &Job) -> Vec<usize> {
    let p = job.posting;
    let tables = job.rates.tables();
    (1..tables.len())
        .filter(|&i| {
            tables
                .get(i)
                .is_some_and(|x| x.effective > p.start && x.effective <= p.end)
        })
        .collect()
}

/// Movements valued inside the posting's period, by index.
fn moves_in_period(job: &Job) -> Vec<usize> {
    let p = job.posting;
    let movements = job.movements();
    (0..movements.len())
        .filter(|&i| {
            movements
                .get(i)
                .is_some_and(|m| m.value_date >= p.start && m.value_date <= p.end)
        })
        .collect()
}

/// The first other basis that moves the posting far enough.
fn other_basis(job: &Job) -> Option<(Mistake, Decimal)> {
    let t = job.terms();
    let least = Decimal::new(LEAST_GAP_UNITS, t.minor_units);
    let far_enough = |x: Decimal| (x - job.posting.expected).abs() >= least;
    other_bases(t.basis).iter().find_map(|b| {
        let wrong = AccountTerms {
            basis: *b,
            ..t.clone()
        };
        rerun(job, Some(&wrong), job.rates, job.movements())
            .filter(|x| far_enough(*x))
            .map(|x| (Mistake::OtherBasis { used: *b }, x))
    })
}

/// A rate change of the period left out.
fn rate_change_not_applied(job: &Job, r: &mut Rng) -> Option<(Mistake, Decimal)> {
    let &i = r.pick(&changes_in_period(job))?;
    let mut kept = job.rates.tables().to_vec();
    let effective = kept.remove(i).effective;
    rerun(job, None, &RateSchedule::from_tables(kept), job.movements())
        .map(|x| (Mistake::RateChangeNotApplied { effective }, x))
}

/// A rate change of the period applied a few days early or late (still
/// after the table before it and before the one after it).
fn rate_change_moved(job: &Job, r: &mut Rng) -> Option<(Mistake, Decimal)> {
    let &i = r.pick(&changes_in_period(job))?;
    let tables = job.rates.tables();
    let (prev, this) = (tables.get(i - 1)?, tables.get(i)?);
    let next = tables.get(i + 1).map(|x| x.effective);
    let k = offset(r);
    let applied = shifted(this.effective, k)
        .filter(|d| *d > prev.effective && next.is_none_or(|n| *d < n))?;
    let mut moved = tables.to_vec();
    if let Some(x) = moved.get_mut(i) {
        x.effective = applied;
    }
    rerun(
        job,
        None,
        &RateSchedule::from_tables(moved),
        job.movements(),
    )
    .map(|x| {
        (
            Mistake::RateChangeMoved {
                effective: this.effective,
                applied,
            },
            x,
        )
    })
}

/// A movement of the period without a booking date taken a few days early
/// or late (within the account's life and the window).
fn movement_moved(job: &Job, r: &mut Rng) -> Option<(Mistake, Decimal)> {
    let t = job.terms();
    let movements = job.movements();
    let plain: Vec<usize> = moves_in_period(job)
        .into_iter()
        .filter(|&i| movements.get(i).is_some_and(|m| m.booking_date.is_none()))
        .collect();
    let &i = r.pick(&plain)?;
    let m = movements.get(i)?;
    let k = offset(r);
    let taken = shifted(m.value_date, k)
        .filter(|d| *d >= t.open_date && *d <= CUTOFF && t.maturity.is_none_or(|x| *d < x))?;
    let mut changed = movements.to_vec();
    if let Some(x) = changed.get_mut(i) {
        x.value_date = taken;
    }
    rerun(job, None, job.rates, &changed).map(|x| {
        (
            Mistake::MovementMoved {
                reference: m.reference.as_deref().unwrap_or_default().to_string(),
                value_date: m.value_date,
                taken,
            },
            x,
        )
    })
}

/// A movement of the period left out.
fn movement_left_out(job: &Job, r: &mut Rng) -> Option<(Mistake, Decimal)> {
    let &i = r.pick(&moves_in_period(job))?;
    let mut left = job.movements().to_vec();
    let m = left.remove(i);
    rerun(job, None, job.rates, &left).map(|x| {
        (
            Mistake::MovementLeftOut {
                reference: m.reference.as_deref().unwrap_or_default().to_string(),
            },
            x,
        )
    })
}

/// The right run's interest from the period's second day, or to its last
/// day but one.
fn period_a_day_off(job: &Job, r: &mut Rng) -> Result<Option<(Mistake, Decimal)>, EngineError> {
    let p = job.posting;
    let late = r.chance(500);
    let (from, to) = if late {
        (shifted(p.start, 1), Some(p.end))
    } else {
        (Some(p.start), shifted(p.end, -1))
    };
    let (Some(from), Some(to)) = (from, to) else {
        return Ok(None);
    };
    if from > to {
        return Ok(None);
    }
    let amount = expected_over(job.terms(), job.right, from, to)?.amount;
    let m = if late {
        Mistake::PeriodStartADayLate
    } else {
        Mistake::PeriodEndADayEarly
    };
    Ok(Some((m, amount)))
}

/// The right amount plus 30% to 60% of it (at least ten currency units), a
/// gap no single change of the cause search comes near.
fn unexplained(job: &Job, r: &mut Rng) -> (Mistake, Decimal) {
    let places = job.terms().minor_units;
    let right = job.posting.expected;
    let share = Decimal::new(r.between(30, 60), 2);
    let floor = Decimal::TEN;
    let size = (right.abs() * share).round_dp(places).max(floor);
    let extra = if r.chance(500) { -size } else { size };
    (Mistake::UnexplainedAmount { extra }, right + extra)
}
