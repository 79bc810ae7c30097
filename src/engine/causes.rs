//! The likely cause of a variance (behaviour.md, Likely causes): re-run the account
//! with one change at a time, from the state at the start of the period, and
//! keep the changes that reproduce the posted amount within tolerance.
//!
//! Floating accounts (behaviour.md, Floating rates) also try the lookback mis-set by
//! up to two business days, the observation shift and the spread's
//! compounding the other way, and a floor or cap not applied.
//!
//! Pure. The words it returns name what changed (the basis by its standard
//! name, the dates moved from and to, the movement's reference and amount)
//! so that a reviewer can check them against the contract.

use chrono::{Days, NaiveDate};
use rust_decimal::Decimal;

use super::floating::{FloatingRates, FloatingSchedule, IndexRate, TierRate};
use super::inputs::Inputs;
use super::rates::{RateSchedule, RateTable};
use super::reconcile::{expected_over, Reconciled, Tolerance};
use super::run::{resume, AccrualState, RunOptions};
use super::terms::{AccountTerms, FloatingTerms, FloorOn, Movement, RateMethod, RoundAt};
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::rounding::RoundMode;
use skip::Touch;

/// One change tried.
#[derive(Debug, Clone)]
struct Change {
    words: String,
    kind: ChangeKind,
    terms: Option<AccountTerms>,
    rates: Option<RateSchedule>,
    movements: Option<Vec<Movement>>,
    floating: Option<FloatingSchedule>,
    period: Option<(NaiveDate, NaiveDate)>,
    /// The earliest date the change touches (where the re-run must start).
    from: NaiveDate,
    /// Which inputs it alters, for [`skip`]'s rules.
    touch: Touch,
    /// An earlier change of the list that makes exactly the same inputs
    /// (its re-run is this one's).
    same_as: Option<usize>,
}

impl Change {
    /// A change of `kind` named `words` that touches nothing yet, from the period's start `from`.
    fn new(kind: ChangeKind, words: String, from: NaiveDate) -> Change {
        Change {
            words,
            kind,
            terms: None,
            rates: None,
            movements: None,
            floating: None,
            period: None,
            from,
            touch: Touch::Other,
            same_as: None,
        }
    }
}

fn money(x: Decimal, places: u32) -> String {
    let r = RoundMode::HalfUp.round(x, places);
    let s = r.abs().to_string();
    let (int, frac) = s
        .split_once('.')
        .map_or((s.as_str(), None), |(i, f)| (i, Some(f)));
    let mut grouped = String::new();
    for (i, c) in int.chars().enumerate() {
        if i > 0 && (int.len() - i) % 3 == 0 {
            grouped.push(',');
        }
        grouped.push(c);
    }
    let sign = if r.is_sign_negative() && !r.is_zero() {
        "-"
    } else {
        ""
    };
    match frac {
        Some(f) => format!("{sign}{grouped}.{f}"),
        None => format!("{sign}{grouped}"),
    }
}

fn percent(rate: Decimal) -> String {
    let mut p = (rate * Decimal::ONE_HUNDRED).round_dp(4).normalize();
    if p.scale() < 2 {
        p.rescale(2);
    }
    format!("{p}%")
}

fn shift(d: NaiveDate, k: i64) -> Option<NaiveDate> {
    if k >= 0 {
        d.checked_add_days(Days::new(k.unsigned_abs()))
    } else {
        d.checked_sub_days(Days::new(k.unsigned_abs()))
    }
}

fn first_rate(t: &RateTable) -> Decimal {
    t.tiers.first().map_or(Decimal::ZERO, |x| x.rate)
}

/// The changes of behaviour.md, Likely causes, in the order of its list.
fn changes(terms: &AccountTerms, inputs: &Inputs, row: &Reconciled) -> Vec<Change> {
    let mut out = Vec::new();
    term_changes(terms, row.start, &mut out);
    period_changes(row, &mut out);
    rate_changes(inputs.rates, row, &mut out);
    movement_changes(terms, inputs.movements, row, &mut out);
    if let Some(f) = inputs.floating {
        out.extend(floating_changes(terms, f.schedule, row.start));
    }
    out
}

/// Another basis, compounding, rounding point, rounding mode, or daily
/// rounding to another number of places.
fn term_changes(t: &AccountTerms, s: NaiveDate, out: &mut Vec<Change>) {
    let with = |kind: ChangeKind, words: String, terms: AccountTerms| Change {
        terms: Some(terms),
        ..Change::new(kind, words, s)
    };
    for b in Basis::ALL.into_iter().filter(|b| *b != t.basis) {
        out.push(Change {
            touch: Touch::Basis(b),
            ..with(
                ChangeKind::Basis(b),
                format!("interest on {} instead of {}", b.name(), t.basis.name()),
                AccountTerms {
                    basis: b,
                    ..t.clone()
                },
            )
        });
    }
    for k in Compounding::ALL.into_iter().filter(|k| *k != t.compounding) {
        out.push(Change {
            touch: Touch::Compounding(k),
            ..with(
                ChangeKind::Compounding,
                format!(
                    "compounding {} instead of {}",
                    k.name(),
                    t.compounding.name()
                ),
                AccountTerms {
                    compounding: k,
                    ..t.clone()
                },
            )
        });
    }
    let other_point = match t.round_at {
        RoundAt::Posting => RoundAt::Daily,
        RoundAt::Daily => RoundAt::Posting,
    };
    let point_at = out.len();
    out.push(with(
        ChangeKind::Rounding,
        format!(
            "interest rounded {} instead of at {}",
            round_point_words(other_point, t),
            t.round_at.name()
        ),
        AccountTerms {
            round_at: other_point,
            ..t.clone()
        },
    ));
    for m in RoundMode::ALL.into_iter().filter(|m| *m != t.round_mode) {
        out.push(with(
            ChangeKind::Rounding,
            format!("rounded {} instead of {}", m.name(), t.round_mode.name()),
            AccountTerms {
                round_mode: m,
                ..t.clone()
            },
        ));
    }
    let current_places = t.round_places.unwrap_or(t.minor_units);
    for places in (t.minor_units..=t.minor_units + 4)
        .filter(|p| t.round_at != RoundAt::Daily || *p != current_places)
    {
        // Rounded daily to the places an account rounding at posting would
        // round to daily is the point change above: the engine reads the
        // places only as `round_places` or else the minor units.
        let same_as =
            (t.round_at == RoundAt::Posting && places == current_places).then_some(point_at);
        out.push(Change {
            same_as,
            ..with(
                ChangeKind::Rounding,
                format!("each day's interest rounded to {places} places"),
                AccountTerms {
                    round_at: RoundAt::Daily,
                    round_places: Some(places),
                    ..t.clone()
                },
            )
        });
    }
}

/// The period a day early or late at either end.
fn period_changes(row: &Reconciled, out: &mut Vec<Change>) {
    let s = row.start;
    for (words, ps, pe) in [
        ("period start a day early", shift(s, -1), Some(row.end)),
        ("period start a day late", shift(s, 1), Some(row.end)),
        ("period end a day early", Some(s), shift(row.end, -1)),
        ("period end a day late", Some(s), shift(row.end, 1)),
    ] {
        if let (Some(ps), Some(pe)) = (ps, pe) {
            if ps <= pe {
                let mut c = Change::new(
                    ChangeKind::Period,
                    format!("{words}: {ps}..{pe} instead of {s}..{}", row.end),
                    ps.min(s),
                );
                c.period = Some((ps, pe));
                out.push(c);
            }
        }
    }
}

/// Whether `d` lies within five days of the period.
fn near(row: &Reconciled, d: NaiveDate) -> bool {
    shift(row.start, -5).is_some_and(|lo| d >= lo) && shift(row.end, 5).is_some_and(|hi| d <= hi)
}

/// Each rate change near the period applied up to five days early or late,
/// or not at all.
fn rate_changes(rates: &RateSchedule, row: &Reconciled, out: &mut Vec<Change>) {
    let s = row.start;
    let tables = rates.tables();
    for (i, table) in tables.iter().enumerate().skip(1) {
        if !near(row, table.effective) {
            continue;
        }
        let before = tables.get(i - 1).map_or(Decimal::ZERO, first_rate);
        let what = format!(
            "rate change of {} ({} to {})",
            table.effective,
            percent(before),
            percent(first_rate(table))
        );
        for k in (-5i64..=5).filter(|k| *k != 0) {
            let Some(moved) = shift(table.effective, k) else {
                continue;
            };
            let mut moved_tables = tables.to_vec();
            if let Some(m) = moved_tables.get_mut(i) {
                m.effective = moved;
            }
            let mut c = Change::new(
                ChangeKind::RateChange {
                    days: Some(k.unsigned_abs()),
                },
                format!("{what} applied from {moved} instead"),
                moved.min(table.effective).min(s),
            );
            c.rates = Some(RateSchedule::from_tables(moved_tables));
            c.touch = Touch::Rate {
                index: i,
                moved: true,
                lo: moved.min(table.effective),
                hi: Some(moved.max(table.effective)),
            };
            out.push(c);
        }
        let mut without = tables.to_vec();
        without.remove(i);
        let mut c = Change::new(
            ChangeKind::RateChange { days: None },
            format!("{what} not applied"),
            table.effective.min(s),
        );
        c.rates = Some(RateSchedule::from_tables(without));
        c.touch = Touch::Rate {
            index: i,
            moved: false,
            lo: table.effective,
            hi: tables.get(i + 1).map(|next| next.effective),
        };
        out.push(c);
    }
}

/// Each movement near the period taken up to five days early or late,
/// from its booking date, or left out.
fn movement_changes(
    t: &AccountTerms,
    movements: &[Movement],
    row: &Reconciled,
    out: &mut Vec<Change>,
) {
    let s = row.start;
    for (i, m) in movements.iter().enumerate() {
        if !near(row, m.value_date) || m.value_date < t.open_date {
            continue;
        }
        let what = format!(
            "movement {}of {} valued {}",
            m.reference
                .as_deref()
                .map(|r| format!("{r} "))
                .unwrap_or_default(),
            money(m.amount, t.minor_units),
            m.value_date
        );
        let with = |v: NaiveDate| {
            let mut ms = movements.to_vec();
            if let Some(x) = ms.get_mut(i) {
                x.value_date = v;
                x.booking_date = None;
            }
            ms
        };
        // Where each day the movement was moved to stands in the list.
        let mut moved_to: Vec<(NaiveDate, usize)> = Vec::new();
        let touch = |v: NaiveDate| Touch::Movement {
            index: i,
            lo: v.min(m.value_date),
            hi: Some(v.max(m.value_date)),
        };
        for k in (-5i64..=5).filter(|k| *k != 0) {
            let Some(v) = shift(m.value_date, k) else {
                continue;
            };
            if v < t.open_date {
                continue;
            }
            moved_to.push((v, out.len()));
            let mut c = Change::new(
                ChangeKind::Movement {
                    days: Some(k.unsigned_abs()),
                },
                format!("{what} taken from {v} instead"),
                v.min(m.value_date).min(s),
            );
            c.movements = Some(with(v));
            c.touch = touch(v);
            out.push(c);
        }
        if let Some(b) = m.booking_date.filter(|b| *b != m.value_date) {
            let mut c = Change::new(
                ChangeKind::Movement {
                    days: Some(
                        b.signed_duration_since(m.value_date)
                            .num_days()
                            .unsigned_abs(),
                    ),
                },
                format!("{what} taken from its booking date {b} instead"),
                b.min(m.value_date).min(s),
            );
            c.movements = Some(with(b));
            c.touch = touch(b);
            // Taken from its booking date within five days is taken from
            // that day: the same movements, from the same day.
            c.same_as = moved_to.iter().find(|(v, _)| *v == b).map(|(_, at)| *at);
            out.push(c);
        }
        let mut left = movements.to_vec();
        left.remove(i);
        let mut c = Change::new(
            ChangeKind::Movement { days: None },
            format!("{what} left out"),
            m.value_date.min(s),
        );
        c.movements = Some(left);
        c.touch = Touch::Movement {
            index: i,
            lo: m.value_date,
            hi: None,
        };
        out.push(c);
    }
}

/// The floating-rate changes: the lookback mis-set by up to two business
/// days, the observation shift and the compounding of the spread the other
/// way, and any floor or cap not applied.
fn floating_changes(t: &AccountTerms, schedule: &FloatingSchedule, s: NaiveDate) -> Vec<Change> {
    let base = |words: String| Change::new(ChangeKind::Floating, words, s);
    let mut out = Vec::new();
    let fl = t.floating;
    let with = |floating: FloatingTerms| AccountTerms {
        floating,
        ..t.clone()
    };
    for k in fl.lookback_days.saturating_sub(2)..=fl.lookback_days + 2 {
        if k == fl.lookback_days {
            continue;
        }
        let mut c = base(format!(
            "a lookback of {k} business days instead of {}",
            fl.lookback_days
        ));
        c.terms = Some(with(FloatingTerms {
            lookback_days: k,
            ..fl
        }));
        out.push(c);
    }
    if fl.method == RateMethod::CompoundedInArrears {
        let mut c = base(if fl.observation_shift {
            "no observation shift (the lookback moves only the fixings)".to_string()
        } else {
            "an observation shift (the lookback moves the weights too)".to_string()
        });
        c.terms = Some(with(FloatingTerms {
            observation_shift: !fl.observation_shift,
            ..fl
        }));
        out.push(c);
        let spreads = schedule
            .tables()
            .iter()
            .flat_map(|x| x.tiers.iter())
            .any(|x| matches!(&x.rate, TierRate::Index(i) if !i.spread.is_zero()));
        if spreads && fl.floor_on == FloorOn::Index {
            let mut c = base(if fl.spread_compounded {
                "the spread added after compounding instead of compounded".to_string()
            } else {
                "the spread compounded with the fixings instead of added after".to_string()
            });
            c.terms = Some(with(FloatingTerms {
                spread_compounded: !fl.spread_compounded,
                ..fl
            }));
            out.push(c);
        }
    }
    for (words, drop_floor) in [("floor", true), ("cap", false)] {
        let mut found = false;
        let tables = schedule
            .tables()
            .iter()
            .flat_map(|x| {
                x.tiers.iter().map(move |tier| {
                    let rate = match &tier.rate {
                        TierRate::Index(i) => TierRate::Index(IndexRate {
                            floor: if drop_floor { None } else { i.floor },
                            cap: if drop_floor { i.cap } else { None },
                            ..i.clone()
                        }),
                        fixed => fixed.clone(),
                    };
                    (x.effective, rate, tier.from)
                })
            })
            .collect::<Vec<_>>();
        for tier in schedule.tables().iter().flat_map(|x| x.tiers.iter()) {
            if let TierRate::Index(i) = &tier.rate {
                found |= if drop_floor {
                    i.floor.is_some()
                } else {
                    i.cap.is_some()
                };
            }
        }
        if found {
            let mut c = base(format!("the {words} not applied"));
            c.floating = Some(FloatingSchedule::from_rows(tables));
            out.push(c);
        }
    }
    out
}

fn round_point_words(point: RoundAt, t: &AccountTerms) -> String {
    match point {
        RoundAt::Daily => format!(
            "daily to {} places",
            t.round_places.unwrap_or(t.minor_units)
        ),
        RoundAt::Posting => "at posting".to_string(),
    }
}

/// The latest saved state at or before `from` (the opening state of `terms`
/// when that is the account's opening).
fn state_for(states: &[AccrualState], terms: &AccountTerms, from: NaiveDate) -> AccrualState {
    match states.iter().rev().find(|s| s.day <= from) {
        Some(s) if s.day != terms.open_date => s.clone(),
        _ => AccrualState::opening(terms),
    }
}

/// What kind of change reproduced an amount: what [`plausible`] ranks by.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ChangeKind {
    /// Interest on this other basis.
    Basis(Basis),
    /// Another compounding.
    Compounding,
    /// Rounding at the other point, in another mode or to other places.
    Rounding,
    /// The period's start or end a day off.
    Period,
    /// A rate change of the account moved by `days`, or not applied (`None`).
    RateChange {
        /// Days moved; `None` when not applied at all.
        days: Option<u64>,
    },
    /// A movement of the account moved by `days` (to its booking date or
    /// another day), or left out (`None`).
    Movement {
        /// Days moved; `None` when left out.
        days: Option<u64>,
    },
    /// A floating-rate term: the lookback, the observation shift, the
    /// spread's compounding, a floor or cap.
    Floating,
    /// The closing posting shown net of the break penalty.
    BreakPenalty,
}

/// One change that reproduces the posted amount within tolerance.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Found {
    /// The change and how close it comes, in plain words.
    pub words: String,
    /// |posted - expected with the change|.
    pub gap: Decimal,
    /// What kind of change it is.
    pub kind: ChangeKind,
}

/// The cause search's finding for one row.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LikelyCause {
    /// The account's own basis (what a basis change is measured from).
    pub basis: Basis,
    /// Every change that reproduces the posted amount, in the search's own
    /// order: closest first, equally close ones in the order of
    /// behaviour.md, Likely causes.
    pub found: Vec<Found>,
    /// When no change does: the implied rate, in plain words.
    pub implied: Option<String>,
}

impl LikelyCause {
    /// The whole finding as one text: every change found, in the search's
    /// own order, joined by "; or " (or the implied rate). `explain` prints it.
    pub fn text(&self) -> String {
        match &self.implied {
            Some(words) if self.found.is_empty() => words.clone(),
            _ => self
                .found
                .iter()
                .map(|f| f.words.as_str())
                .collect::<Vec<_>>()
                .join("; or "),
        }
    }
}

/// The changes that reproduce `row`'s posted amount, closest first (equally
/// close ones in list order), as plain words; or, when none does, the implied
/// rate and its gap to the contract rate in basis points.
///
/// `inputs` are those of the original run and `states` the period-start
/// states it kept ([`RunOptions::keep_states`]): each change is re-run from
/// the latest state before the first day it touches.
pub fn likely_cause(
    terms: &AccountTerms,
    inputs: &Inputs,
    states: &[AccrualState],
    row: &Reconciled,
    tolerance: &Tolerance,
) -> String {
    search(terms, inputs, states, row, tolerance).text()
}

/// [`likely_cause`] as a finding: each change found with its kind and gap,
/// for [`plausible`] to rank.
///
/// Changes that provably cannot move the period ([`skip`]) and changes that
/// repeat an earlier one's inputs are not re-run; the finding is the one
/// re-running every change gives (a property test holds the two equal).
pub fn search(
    terms: &AccountTerms,
    inputs: &Inputs,
    states: &[AccrualState],
    row: &Reconciled,
    tolerance: &Tolerance,
) -> LikelyCause {
    search_with(terms, inputs, states, row, tolerance, Effort::Cheaper)
}

/// How much of the change list a search re-runs.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Effort {
    /// Every change, each on its own: what the cheaper search must equal.
    #[cfg(test)]
    Full,
    /// Only the changes that could move the period, each set of inputs once.
    Cheaper,
}

/// The unchanged account re-run over `row` from where the term changes
/// start, for [`skip`]'s rules; `None` when it does not compute or
/// computes within tolerance (then the rules are not used).
fn unchanged(
    terms: &AccountTerms,
    inputs: &Inputs,
    states: &[AccrualState],
    row: &Reconciled,
    tolerance: &Tolerance,
) -> Option<skip::Unchanged> {
    let same = Change::new(ChangeKind::Period, String::new(), row.start);
    let (result, _) = rerun_result(terms, inputs, states, row, &same)?;
    let (gap, balance_years) = outcome(terms, row, &same, &result)?;
    let bp = super::reconcile::variance_bp(gap, balance_years);
    if tolerance.accepts(gap, bp, terms.minor_units) {
        return None;
    }
    Some(skip::Unchanged::new(&result))
}

/// Whether `change` goes without a re-run: [`skip`]'s rules prove it cannot
/// move the period from `start` (the state the term changes start from),
/// and the unchanged account (re-run once for the whole search, into
/// `base`, when a rule first proves a change unmoving) is outside tolerance
/// and posts on the days the proof needs.
#[allow(clippy::too_many_arguments)]
fn skipped(
    change: &Change,
    terms: &AccountTerms,
    inputs: &Inputs,
    states: &[AccrualState],
    row: &Reconciled,
    tolerance: &Tolerance,
    start: &AccrualState,
    base: &mut Option<Option<skip::Unchanged>>,
) -> bool {
    let Some(posting_ends) = skip::cannot_move(change.touch, terms, inputs, row, start) else {
        return false;
    };
    base.get_or_insert_with(|| unchanged(terms, inputs, states, row, tolerance))
        .as_ref()
        .is_some_and(|b| b.posts_on(&posting_ends))
}

fn search_with(
    terms: &AccountTerms,
    inputs: &Inputs,
    states: &[AccrualState],
    row: &Reconciled,
    tolerance: &Tolerance,
    effort: Effort,
) -> LikelyCause {
    let places = terms.minor_units;
    let cheaper = effort == Effort::Cheaper;
    let mut found: Vec<(usize, Found)> = Vec::new();
    // Each change's re-run, by its place in the list (for `same_as`).
    let mut outcomes: Vec<Option<(Decimal, Decimal)>> = Vec::new();
    let mut base: Option<Option<skip::Unchanged>> = None;
    let start = state_for(states, terms, row.start);
    let mut list = changes(terms, inputs, row);
    if cheaper {
        skip::same_fractions_as_earlier(&mut list, start.day, row.end);
    }
    for (order, change) in list.into_iter().enumerate() {
        let repeated = change
            .same_as
            .filter(|_| cheaper)
            .and_then(|at| outcomes.get(at).copied());
        let result = match repeated {
            Some(r) => r,
            // Outside tolerance as the unchanged account is, or not
            // computed: not found either way (module `skip`).
            None if cheaper
                && skipped(
                    &change, terms, inputs, states, row, tolerance, &start, &mut base,
                ) =>
            {
                None
            }
            None => rerun(terms, inputs, states, row, &change),
        };
        outcomes.push(result);
        let Some((gap, balance_years)) = result else {
            continue;
        };
        let bp = super::reconcile::variance_bp(gap, balance_years);
        if tolerance.accepts(gap, bp, places) {
            let how = if gap.is_zero() {
                "reproduces the posted amount exactly".to_string()
            } else {
                format!("comes within {}", money(gap.abs(), places))
            };
            found.push((
                order,
                Found {
                    words: format!("{} ({how})", change.words),
                    gap: gap.abs(),
                    kind: change.kind,
                },
            ));
        }
    }
    found.sort_by(|x, y| x.1.gap.cmp(&y.1.gap).then(x.0.cmp(&y.0)));
    let found: Vec<Found> = found.into_iter().map(|(_, f)| f).collect();
    LikelyCause {
        basis: terms.basis,
        implied: found.is_empty().then(|| implied_rate(row)),
        found,
    }
}

/// The account re-run with `change` over the period it tries: the gap
/// between `row`'s posted amount and what the changed account expects, and
/// the period's balance-years; `None` when the changed account cannot be
/// computed.
fn rerun(
    terms: &AccountTerms,
    inputs: &Inputs,
    states: &[AccrualState],
    row: &Reconciled,
    change: &Change,
) -> Option<(Decimal, Decimal)> {
    let (result, _) = rerun_result(terms, inputs, states, row, change)?;
    outcome(terms, row, change, &result)
}

/// The gap and balance-years of `change`'s re-run `result`.
fn outcome(
    terms: &AccountTerms,
    row: &Reconciled,
    change: &Change,
    result: &super::run::AccountResult,
) -> Option<(Decimal, Decimal)> {
    let terms = change.terms.as_ref().unwrap_or(terms);
    let (ps, pe) = change.period.unwrap_or((row.start, row.end));
    let e = expected_over(terms, result, ps, pe).ok()?;
    Some((row.posted - e.amount, e.balance_years))
}

/// The account re-run with `change`, and the state it started from.
fn rerun_result(
    terms: &AccountTerms,
    inputs: &Inputs,
    states: &[AccrualState],
    row: &Reconciled,
    change: &Change,
) -> Option<(super::run::AccountResult, AccrualState)> {
    let terms = change.terms.as_ref().unwrap_or(terms);
    let (ps, pe) = change.period.unwrap_or((row.start, row.end));
    // The re-run's spans must end where the period tried does.
    let breaks = [ps.pred_opt().unwrap_or(ps), pe];
    let state = state_for(states, terms, change.from);
    let changed = Inputs {
        rates: change.rates.as_ref().unwrap_or(inputs.rates),
        movements: change.movements.as_deref().unwrap_or(inputs.movements),
        breaks: &breaks,
        floating: inputs.floating.map(|f| FloatingRates {
            schedule: change.floating.as_ref().unwrap_or(f.schedule),
            ..f
        }),
        ..*inputs
    };
    let options = RunOptions {
        window_start: ps,
        cutoff: pe.max(row.end),
        keep_days: false,
        keep_states: false,
        keep_spans: true,
        fast_path: true,
    };
    let result = resume(terms, changed, options, &state).ok()?;
    Some((result, state))
}

/// The parallel shift of the contract rates that the posted amount implies.
fn implied_rate(row: &Reconciled) -> String {
    let y = row.balance_years.abs();
    if y.is_zero() {
        return "no single change reproduces the posted amount, and no balance earned interest in the period".to_string();
    }
    let contract = row.expected.checked_div(y).unwrap_or_default();
    let implied = row.posted.checked_div(y).unwrap_or_default();
    let gap = row.variance_bp.unwrap_or_default().round_dp(2);
    format!(
        "no single change reproduces the posted amount; it implies a rate of {} a year against the contract's {} ({} bp)",
        percent(implied),
        percent(contract),
        gap
    )
}

pub mod plausible;
mod skip;

#[cfg(test)]
mod tests;
