//! The account life events of sample accounts (behaviour.md, Account life
//! events): savers closed in the middle of the month, term deposits broken
//! early with each kind of penalty, matured and unpaid, earning a rate after
//! maturity, or rolled over.
//!
//! Drawn from the account's own stream after everything else, so that the
//! accounts without a life event stay as they were. This module only sets
//! terms and drops the movements a close leaves behind; the payout that a
//! closed account's movement on the close date carries is the pipeline's
//! figure, added by the generator after the run. It never runs the engine
//! and never writes a file.

use std::sync::Arc;

use chrono::NaiveDate;

use super::catalogue::{shelf, Product, Shelf, BASE_EFFECTIVE};
use super::draft::{day_between, money, plus_days};
use super::rng::Rng;
use super::{date, CUTOFF};
use crate::engine::events::{AfterMaturity, BreakPenalty, PenaltyLimit};
use crate::engine::{AccountTerms, Movement};

/// How many savers in a thousand are closed in the middle of the month
/// (savers are about 29% of a book: about 1 account in 330).
pub const SAVER_CLOSES_PER_MILLE: u64 = 12;

/// How many term deposits maturing around the cut-off in a thousand get a
/// life event (they are about 10% of a book: about 1 account in 50).
pub const TERM_EVENTS_PER_MILLE: u64 = 200;

/// The first and last day a saver is closed on.
const SAVER_CLOSE: (NaiveDate, NaiveDate) = (date(2026, 11, 5), date(2026, 11, 28));

/// The first day a term deposit is broken on: its closing posting, ending
/// the day before, ends in the window.
const FIRST_BREAK: NaiveDate = date(2026, 11, 2);

/// What happened to a sample account in its life.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum LifeKind {
    /// Closed before any maturity, without a penalty (a saver).
    Closed,
    /// A term deposit closed before its maturity, paying `days`' interest.
    BrokenDays,
    /// Broken, its term re-priced at the break rate.
    BrokenRate,
    /// Broken, paying a fixed amount.
    BrokenAmount,
    /// Matured and not paid out (`after_maturity` none).
    MaturedUnpaid,
    /// Earning the matured rate from maturity.
    MaturedRate,
    /// Rolled into a new term at maturity.
    Rollover,
}

impl LifeKind {
    /// The life event in words.
    ///
    /// ```
    /// use ledgerate::sample::LifeKind;
    /// assert_eq!(LifeKind::BrokenRate.name(), "broken early, rate penalty");
    /// ```
    pub fn name(self) -> &'static str {
        match self {
            LifeKind::Closed => "closed",
            LifeKind::BrokenDays => "broken early, days penalty",
            LifeKind::BrokenRate => "broken early, rate penalty",
            LifeKind::BrokenAmount => "broken early, amount penalty",
            LifeKind::MaturedUnpaid => "matured unpaid",
            LifeKind::MaturedRate => "rate after maturity",
            LifeKind::Rollover => "rolled over",
        }
    }
}

/// A saver closed on a day in the month, some of the time: its movements
/// valued or booked from that day on are dropped (the payout on the close day is added once
/// the run has worked it out).
pub(crate) fn saver(
    r: &mut Rng,
    t: &mut AccountTerms,
    moves: &mut Vec<Movement>,
) -> Option<LifeKind> {
    if !r.chance(SAVER_CLOSES_PER_MILLE) {
        return None;
    }
    let first = plus_days(t.open_date, 2).max(SAVER_CLOSE.0);
    let x = day_between(r, first.min(SAVER_CLOSE.1), SAVER_CLOSE.1);
    // A movement booked on the close date or later, even valued before it,
    // is left out too: its back-valued interest has no posting left to
    // join (the account has closed).
    moves.retain(|m| m.booking_date.unwrap_or(m.value_date) < x);
    t.events.close_date = Some(x);
    Some(LifeKind::Closed)
}

/// A term deposit's life event, some of the time: broken early (four in
/// ten, each penalty kind alike, four in ten of them limited to the
/// interest), matured unpaid, earning a rate after maturity, or rolled over.
pub(crate) fn term(r: &mut Rng, t: &mut AccountTerms, products: &[Product]) -> Option<LifeKind> {
    if !r.chance(TERM_EVENTS_PER_MILLE) {
        return None;
    }
    let maturity = t.maturity?;
    let pick = |r: &mut Rng, s: Shelf| {
        r.pick(&shelf(products, s))
            .and_then(|i| products.get(*i))
            .map(|p| (p.rate_ref.clone(), Arc::clone(&p.schedule)))
    };
    let kind = r.below(10);
    let broken = kind < 4 && maturity > plus_days(FIRST_BREAK, 1);
    if broken {
        let x = day_between(r, FIRST_BREAK, plus_days(maturity, -1));
        let e = &mut t.events;
        e.close_date = Some(x);
        let (penalty, life) = match r.below(3) {
            0 => (
                BreakPenalty::Days(*r.pick(&[30u32, 60, 90]).unwrap_or(&30)),
                LifeKind::BrokenDays,
            ),
            // The break rate card starts in 2025: a term opened before
            // it pays days' interest instead.
            1 => match pick(r, Shelf::Break).filter(|_| t.open_date >= BASE_EFFECTIVE) {
                Some((name, rates)) => (BreakPenalty::Rate(name, rates), LifeKind::BrokenRate),
                None => (BreakPenalty::Days(30), LifeKind::BrokenDays),
            },
            _ => (
                BreakPenalty::Amount(money(r, 25, 400, t.minor_units)),
                LifeKind::BrokenAmount,
            ),
        };
        e.break_penalty = penalty;
        if r.chance(400) {
            e.penalty_limit = PenaltyLimit::Interest;
        }
        return Some(life);
    }
    if maturity > CUTOFF {
        return None;
    }
    match kind {
        0..=4 => Some(LifeKind::MaturedUnpaid),
        5..=6 => {
            let (name, rates) = pick(r, Shelf::Matured)?;
            t.events.after_maturity = AfterMaturity::Rate(name, rates);
            Some(LifeKind::MaturedRate)
        }
        _ => {
            let months = *r.pick(&[3u32, 6]).unwrap_or(&3);
            let (rate_ref, rates) = pick(r, Shelf::Rollover)?;
            t.events.after_maturity = AfterMaturity::Rollover {
                months,
                rate_ref,
                rates,
            };
            Some(LifeKind::Rollover)
        }
    }
}
