//! Which changes the cause search need not re-run: those that provably give
//! the period the figures the unchanged account gives (behaviour.md, Likely
//! causes). Each rule below says why its change cannot move the period.
//!
//! A change that cannot move the period either gives the unchanged account's
//! gap and balance-years or fails to compute; the search uses a rule only when
//! the unchanged account's own re-run computes and is outside tolerance, so in
//! both cases the change is not found, as the full re-run would say. When the
//! unchanged account computes within tolerance (or not at all), every change
//! is re-run.
//!
//! Never decides a cause or its words, and never skips a change it cannot
//! prove unmoving: a rule that is not sure says "re-run".

use chrono::{Datelike, NaiveDate};

use super::Change;
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::engine::run::{last_day, schedule_terms, AccountResult, AccrualState};
use crate::engine::terms::{AccountTerms, Movement};
use crate::engine::{inputs::Inputs, reconcile::Reconciled};

/// Which inputs a change alters, for the rules of this module.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Touch {
    /// Anything else: always re-run.
    Other,
    /// The day-count basis, changed to this one.
    Basis(Basis),
    /// The compounding, changed to this one.
    Compounding(Compounding),
    /// Rate table `index` (of the account's rate tables) moved, or not
    /// applied (then `hi` is the next table's effective date, or `None`):
    /// the table in force differs on the days `lo` up to `hi` (exclusive;
    /// `None`: every later day).
    Rate {
        index: usize,
        moved: bool,
        lo: NaiveDate,
        hi: Option<NaiveDate>,
    },
    /// Movement `index` moved (the balance differs on the days `lo` up to
    /// `hi`, exclusive) or left out (`hi` is `None`: every day from `lo`).
    Movement {
        index: usize,
        lo: NaiveDate,
        hi: Option<NaiveDate>,
    },
}

/// What the rules need of the unchanged account re-run over the row from
/// the state the term changes start from.
pub(super) struct Unchanged {
    /// The posting ends the unchanged account reaches.
    pub(super) posting_ends: Vec<NaiveDate>,
}

impl Unchanged {
    /// The rules' view of the unchanged account's re-run `result`.
    pub(super) fn new(result: &AccountResult) -> Unchanged {
        Unchanged {
            posting_ends: result.postings.iter().map(|p| p.end).collect(),
        }
    }

    /// Whether every one of `days` is a posting end of the unchanged account.
    pub(super) fn posts_on(&self, days: &[NaiveDate]) -> bool {
        days.iter().all(|d| self.posting_ends.contains(d))
    }
}

/// Whether the change touching `touch` provably leaves `row`'s period with
/// the unchanged account's figures (when it computes at all), re-run from
/// the saved state `start` as the term changes are: `None` when it may move
/// the period; else the days that must be posting ends of the unchanged
/// account ([`Unchanged::posts_on`]) for the proof to hold (often none).
pub(super) fn cannot_move(
    touch: Touch,
    terms: &AccountTerms,
    inputs: &Inputs,
    row: &Reconciled,
    start: &AccrualState,
) -> Option<Vec<NaiveDate>> {
    let proved = |yes: bool| yes.then(Vec::new);
    match touch {
        Touch::Other => None,
        Touch::Basis(to) => proved(same_fractions(terms.basis, to, start.day, row.end)),
        Touch::Compounding(to) => compounding_cannot_move(terms, to, row, start),
        Touch::Rate {
            index,
            moved,
            lo,
            hi,
        } => {
            // Days after the period are never run: a re-run stops at the
            // period's end (its cut-off), and a rate table is only looked up
            // for a day being run (the next change is looked up only to end a
            // run of days, which the cut-off ends anyway). Every re-run of a
            // rate change starts from the unchanged account's state.
            proved(
                lo > row.end
                    || (hi.is_some_and(|hi| {
                        hi <= row.start && (!moved || keeps_its_place(inputs, index, lo, hi))
                    }) && nothing_carries(terms, inputs)),
            )
        }
        Touch::Movement { index, lo, hi } => match hi {
            // A movement valued after the period's end joins no balance the
            // re-run computes (a movement is taken only on its value date,
            // and only taken movements can be unbooked). Moved, it keeps its
            // index; left out, the later movements' indices shift down one,
            // which changes nothing only when the start state owes no
            // back-value to any of them. Moved within the days before the
            // period, it leaves the balance on the period's first day as it
            // was, but only when both its dates are on or after the open
            // date: a movement valued before it is not applied (the opening
            // balance is taken to hold it), so a move across the open date
            // changes that balance.
            None => proved(lo > row.end && start.back_value_owed.iter().all(|(i, _)| *i < index)),
            Some(hi) => proved(
                lo > row.end
                    || (hi <= row.start && lo >= terms.open_date && nothing_carries(terms, inputs)),
            ),
        },
    }
}

/// Whether bases `a` and `b` give every day from `from` to `to` the same
/// day fraction, numerator and denominator (behaviour.md, Day count): the
/// basis reaches a re-run only through its day fractions, so two bases
/// that agree on every day run alike. ACT/365F, NL/365 and ACT/ACT ISDA all
/// give a day 1/365 in a year that is not a leap year (NL/365 differs only
/// on 29 February, ACT/ACT ISDA only in a leap year's 1/366).
fn same_fractions(a: Basis, b: Basis, from: NaiveDate, to: NaiveDate) -> bool {
    const ONE_IN_365: [Basis; 3] = [Basis::Act365F, Basis::Nl365, Basis::ActActIsda];
    let leap = |y: i32| NaiveDate::from_ymd_opt(y, 2, 29).is_some();
    a == b
        || (ONE_IN_365.contains(&a)
            && ONE_IN_365.contains(&b)
            && !(from.year()..=to.year()).any(leap))
}

/// Marks each basis change whose day fractions from `from` (the start
/// state's day) to `to` (the period's end) are those of an earlier basis
/// change in `list` as the same re-run ([`same_fractions`]).
pub(super) fn same_fractions_as_earlier(list: &mut [Change], from: NaiveDate, to: NaiveDate) {
    let mut bases: Vec<(Basis, usize)> = Vec::new();
    for (at, change) in list.iter_mut().enumerate() {
        if let Touch::Basis(b) = change.touch {
            match bases.iter().find(|(e, _)| same_fractions(*e, b, from, to)) {
                Some((_, earlier)) => change.same_as = change.same_as.or(Some(*earlier)),
                None => bases.push((b, at)),
            }
        }
    }
}

/// Whether what a change does to days before the period stays out of the
/// period. Before it, only the interest accrued differs (the balance on the
/// period's first day is the same once both dates have passed). Accrued
/// interest reaches the period's figure only by joining the balance (a
/// capitalised posting), joining the base (compounding), or as back-value
/// owed to a later posting; the period counts only its own days and the
/// postings wholly inside it. So it stays out when the account does not
/// capitalise, compounds simply, and no movement before the period is
/// booked after its value date (none can be unbooked, so none is owed
/// back-value); floating accounts, whose rate may weigh the whole period, are
/// always re-run.
fn nothing_carries(terms: &AccountTerms, inputs: &Inputs) -> bool {
    let booked_late = |m: &Movement| m.booking_date.is_some_and(|b| b > m.value_date);
    !terms.capitalise
        && terms.compounding == Compounding::Simple
        && inputs.floating.is_none()
        && !inputs.movements.iter().any(booked_late)
}

/// Whether rate table `index` moved between `lo` and `hi` keeps its place
/// among the account's tables (no other table takes effect on a day from
/// `lo` to `hi`), so that every day from `hi` on finds the same table in
/// force.
fn keeps_its_place(inputs: &Inputs, index: usize, lo: NaiveDate, hi: NaiveDate) -> bool {
    inputs
        .rates
        .tables()
        .iter()
        .enumerate()
        .all(|(i, t)| i == index || t.effective < lo || t.effective > hi)
}

/// Whether compounding `to` instead of the account's gives the period the
/// same figures, given that the days returned are posting ends. Simple and
/// periodic compounding accrue the same day interest; a periodic one differs
/// only at a compounding end that is not a posting end (where the posting
/// takes the interest and clears what was compounded instead), from the next
/// day on. So when every compounding end of the account's compounding and of
/// `to` from the start state to the day before the period's end is a posting
/// end, the re-run's figures are the unchanged ones (an opening state's
/// opening accrued waiting to join is also taken by a posting or joined only
/// at such an end). Daily, continuous and annual-effective compounding change
/// every day and are always re-run.
fn compounding_cannot_move(
    terms: &AccountTerms,
    to: Compounding,
    row: &Reconciled,
    start: &AccrualState,
) -> Option<Vec<NaiveDate>> {
    let periodic = |c: Compounding| c == Compounding::Simple || c.months().is_some();
    if !periodic(terms.compounding) || !periodic(to) {
        return None;
    }
    let mut days = Vec::new();
    for months in [terms.compounding, to]
        .into_iter()
        .filter_map(Compounding::months)
    {
        let ends = compounding_ends(terms, months, row.end)?;
        days.extend(ends.into_iter().filter(|e| start.day <= *e && *e < row.end));
    }
    Some(days)
}

/// The compounding ends of a `months` compounding, as a re-run to `cutoff`
/// schedules them (the engine's plan: the same anchor, horizon and
/// calendar); `None` when they cannot be computed.
fn compounding_ends(
    terms: &AccountTerms,
    months: u32,
    cutoff: NaiveDate,
) -> Option<Vec<NaiveDate>> {
    let open = terms.open_date;
    let schedule = schedule_terms(terms)?;
    let last_day = last_day(terms, cutoff);
    schedule
        .compounding_ends(months, open, last_day.max(open), &terms.calendar)
        .ok()
}

#[cfg(test)]
mod tests;
