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
use super::rates::{RateSchedule, RateTable};
use super::reconcile::{expected_over, Reconciled, Tolerance};
use super::run::{resume, AccrualState, RunOptions, Sources};
use super::terms::{
    AccountTerms, ActualPosting, FloatingTerms, FloorOn, Movement, RateMethod, RoundAt,
};
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::rounding::RoundMode;

/// Everything a re-run needs.
#[derive(Clone, Copy)]
pub struct Account<'a> {
    /// The account's terms.
    pub terms: &'a AccountTerms,
    /// Its rate schedule (the cause search moves its tables).
    pub rates: &'a RateSchedule,
    /// Debit rates, if any.
    pub debit_rates: Option<&'a RateSchedule>,
    /// Its movements.
    pub movements: &'a [Movement],
    /// Amounts actually posted.
    pub actual: &'a [ActualPosting],
    /// States saved at each period start by the original run.
    pub states: &'a [AccrualState],
    /// A floating account's tables and fixings (then `rates` is not used).
    pub floating: Option<FloatingRates<'a>>,
}

/// One change tried.
#[derive(Debug, Clone)]
struct Change {
    words: String,
    terms: Option<AccountTerms>,
    rates: Option<RateSchedule>,
    movements: Option<Vec<Movement>>,
    floating: Option<FloatingSchedule>,
    period: Option<(NaiveDate, NaiveDate)>,
    /// The earliest date the change touches (where the re-run must start).
    from: NaiveDate,
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
fn changes(a: &Account, row: &Reconciled) -> Vec<Change> {
    let t = a.terms;
    let s = row.start;
    let base = |words: String| Change {
        words,
        terms: None,
        rates: None,
        movements: None,
        floating: None,
        period: None,
        from: s,
    };
    let mut out = Vec::new();
    for b in Basis::ALL.into_iter().filter(|b| *b != t.basis) {
        let mut c = base(format!(
            "interest on {} instead of {}",
            b.name(),
            t.basis.name()
        ));
        c.terms = Some(AccountTerms {
            basis: b,
            ..t.clone()
        });
        out.push(c);
    }
    for k in Compounding::ALL.into_iter().filter(|k| *k != t.compounding) {
        let mut c = base(format!(
            "compounding {} instead of {}",
            k.name(),
            t.compounding.name()
        ));
        c.terms = Some(AccountTerms {
            compounding: k,
            ..t.clone()
        });
        out.push(c);
    }
    let other_point = match t.round_at {
        RoundAt::Posting => RoundAt::Daily,
        RoundAt::Daily => RoundAt::Posting,
    };
    let mut c = base(format!(
        "interest rounded {} instead of at {}",
        round_point_words(other_point, t),
        t.round_at.name()
    ));
    c.terms = Some(AccountTerms {
        round_at: other_point,
        ..t.clone()
    });
    out.push(c);
    for m in RoundMode::ALL.into_iter().filter(|m| *m != t.round_mode) {
        let mut c = base(format!(
            "rounded {} instead of {}",
            m.name(),
            t.round_mode.name()
        ));
        c.terms = Some(AccountTerms {
            round_mode: m,
            ..t.clone()
        });
        out.push(c);
    }
    let current_places = t.round_places.unwrap_or(t.minor_units);
    for places in (t.minor_units..=t.minor_units + 4)
        .filter(|p| t.round_at != RoundAt::Daily || *p != current_places)
    {
        let mut c = base(format!("each day's interest rounded to {places} places"));
        c.terms = Some(AccountTerms {
            round_at: RoundAt::Daily,
            round_places: Some(places),
            ..t.clone()
        });
        out.push(c);
    }
    for (words, ps, pe) in [
        ("period start a day early", shift(s, -1), Some(row.end)),
        ("period start a day late", shift(s, 1), Some(row.end)),
        ("period end a day early", Some(s), shift(row.end, -1)),
        ("period end a day late", Some(s), shift(row.end, 1)),
    ] {
        if let (Some(ps), Some(pe)) = (ps, pe) {
            if ps <= pe {
                let mut c = base(format!("{words}: {ps}..{pe} instead of {s}..{}", row.end));
                c.period = Some((ps, pe));
                c.from = ps.min(s);
                out.push(c);
            }
        }
    }
    let tables = a.rates.tables();
    let near = |d: NaiveDate| {
        shift(s, -5).is_some_and(|lo| d >= lo) && shift(row.end, 5).is_some_and(|hi| d <= hi)
    };
    for (i, table) in tables.iter().enumerate().skip(1) {
        if !near(table.effective) {
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
            let mut c = base(format!("{what} applied from {moved} instead"));
            c.rates = Some(RateSchedule::from_tables(moved_tables));
            c.from = moved.min(table.effective).min(s);
            out.push(c);
        }
        let mut without = tables.to_vec();
        without.remove(i);
        let mut c = base(format!("{what} not applied"));
        c.rates = Some(RateSchedule::from_tables(without));
        c.from = table.effective.min(s);
        out.push(c);
    }
    for (i, m) in a.movements.iter().enumerate() {
        if !near(m.value_date) || m.value_date < t.open_date {
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
            let mut ms = a.movements.to_vec();
            if let Some(x) = ms.get_mut(i) {
                x.value_date = v;
                x.booking_date = None;
            }
            ms
        };
        for k in (-5i64..=5).filter(|k| *k != 0) {
            let Some(v) = shift(m.value_date, k) else {
                continue;
            };
            if v < t.open_date {
                continue;
            }
            let mut c = base(format!("{what} taken from {v} instead"));
            c.movements = Some(with(v));
            c.from = v.min(m.value_date).min(s);
            out.push(c);
        }
        if let Some(b) = m.booking_date.filter(|b| *b != m.value_date) {
            let mut c = base(format!("{what} taken from its booking date {b} instead"));
            c.movements = Some(with(b));
            c.from = b.min(m.value_date).min(s);
            out.push(c);
        }
        let mut left = a.movements.to_vec();
        left.remove(i);
        let mut c = base(format!("{what} left out"));
        c.movements = Some(left);
        c.from = m.value_date.min(s);
        out.push(c);
    }
    if let Some(f) = a.floating {
        out.extend(floating_changes(t, f.schedule, &base));
    }
    out
}

/// The floating-rate changes: the lookback mis-set by up to two business
/// days, the observation shift and the compounding of the spread the other
/// way, and any floor or cap not applied.
fn floating_changes(
    t: &AccountTerms,
    schedule: &FloatingSchedule,
    base: &dyn Fn(String) -> Change,
) -> Vec<Change> {
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
fn state_for(a: &Account, terms: &AccountTerms, from: NaiveDate) -> AccrualState {
    match a.states.iter().rev().find(|s| s.day <= from) {
        Some(s) if s.day != terms.open_date => s.clone(),
        _ => AccrualState::opening(terms),
    }
}

/// The changes that reproduce `row`'s posted amount, closest first (equally
/// close ones in list order), as plain words; or, when none does, the implied
/// rate and its gap to the contract rate in basis points.
pub fn likely_cause(a: &Account, row: &Reconciled, tolerance: &Tolerance) -> String {
    let places = a.terms.minor_units;
    let mut found: Vec<(Decimal, usize, String)> = Vec::new();
    for (order, change) in changes(a, row).into_iter().enumerate() {
        let terms = change.terms.as_ref().unwrap_or(a.terms);
        let rates = change.rates.as_ref().unwrap_or(a.rates);
        let movements = change.movements.as_deref().unwrap_or(a.movements);
        let (ps, pe) = change.period.unwrap_or((row.start, row.end));
        // The re-run's spans must end where the period tried does.
        let breaks = [ps.pred_opt().unwrap_or(ps), pe];
        let state = state_for(a, terms, change.from);
        let floating = a.floating.map(|f| FloatingRates {
            schedule: change.floating.as_ref().unwrap_or(f.schedule),
            ..f
        });
        let sources = Sources {
            rates,
            debit_rates: a.debit_rates.map(|r| r as &dyn super::rates::RateSource),
            movements,
            actual: a.actual,
            breaks: &breaks,
            floating,
        };
        let options = RunOptions {
            window_start: ps,
            cutoff: pe.max(row.end),
            keep_days: false,
            keep_states: false,
            keep_spans: true,
            fast_path: true,
        };
        let Ok(result) = resume(terms, sources, options, &state) else {
            continue;
        };
        let Ok(e) = expected_over(terms, &result, ps, pe) else {
            continue;
        };
        let gap = row.posted - e.amount;
        let bp = super::reconcile::variance_bp(gap, e.balance_years);
        if tolerance.accepts(gap, bp, places) {
            let how = if gap.is_zero() {
                "reproduces the posted amount exactly".to_string()
            } else {
                format!("comes within {}", money(gap.abs(), places))
            };
            found.push((gap.abs(), order, format!("{} ({how})", change.words)));
        }
    }
    if found.is_empty() {
        return implied_rate(row);
    }
    found.sort_by(|x, y| x.0.cmp(&y.0).then(x.1.cmp(&y.1)));
    found
        .into_iter()
        .map(|(_, _, w)| w)
        .collect::<Vec<_>>()
        .join("; or ")
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

#[cfg(test)]
mod tests;
