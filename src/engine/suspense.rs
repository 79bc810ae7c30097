//! Non-accrual, interest in suspense and credit-impaired loans
//! (behaviour.md, Non-accrual and interest in suspense): from the engine's
//! day rows of an asset account and its accrual status rows, each day's
//! contractual interest split into the part recognised as income and the
//! part held in suspense; per posting period, at the window's eve and at the
//! cut-off the same split of the rounded figures; the reversal on each entry
//! into non-accrual; the release of suspense by each interest receipt; and
//! the suspense balance.
//!
//! It never changes contractual interest, a posting, a balance or a
//! statement figure: it only splits what the day loop computed. It is pure:
//! no files, clock or terminal, and it never approximates: a split it
//! cannot make exactly is an [`EngineError::Unsupported`] naming why.
//!
//! # Example (the arithmetic spec)
//!
//! 250,000.00 at 7.30%, ACT/365F, posting monthly: 50.00 a night. On
//! non-accrual from 11 November with 1,550.00 billed and unpaid: the
//! reversal is the 500.00 accrued to 10 November plus the 1,550.00; the
//! November posting of 1,500.00 is 500.00 recognised and 1,000.00 suspended;
//! the suspense at cut-off is 3,050.00.
//!
//! ```
//! use ledgerate::conventions::daycount::Basis;
//! use ledgerate::conventions::schedule::Posting;
//! use ledgerate::engine::rates::RateSchedule;
//! use ledgerate::engine::run::{accrue, RunOptions};
//! use ledgerate::engine::suspense::{split, AccrualStatus, StatusRow, SuspenseInputs};
//! use ledgerate::engine::{AccountTerms, Inputs, Side};
//! use rust_decimal::Decimal;
//! let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
//! let n = |s: &str| s.parse::<Decimal>().unwrap();
//! let mut terms = AccountTerms::new("LN-NA", "USD", 2, Basis::Act365F, d("2026-10-01"), n("250000.00"));
//! terms.side = Side::Asset;
//! terms.posting = Posting::Monthly;
//! let rates = RateSchedule::from_rows([(d("2026-01-01"), n("0.073"), Decimal::ZERO)]);
//! let inputs = Inputs { rates: &rates, debit_rates: None, movements: &[], actual: &[], breaks: &[], floating: None };
//! let mut options = RunOptions::month_end(d("2026-11-30"));
//! options.keep_days = true;
//! let run = accrue(&terms, inputs, options).unwrap();
//! let statuses = [StatusRow {
//!     from: d("2026-11-11"),
//!     status: AccrualStatus::NonAccrual,
//!     unpaid_interest: n("1550.00"),
//!     allowance: Decimal::ZERO,
//!     cash_basis: false,
//! }];
//! let s = split(&terms, &run, &SuspenseInputs { statuses: &statuses, receipts: &[], opening_suspense: Decimal::ZERO },
//!     d("2026-11-01"), d("2026-11-30")).unwrap();
//! assert_eq!(s.reversals[0].amount, n("2050.00"));
//! assert_eq!((s.periods[1].recognised, s.periods[1].suspended), (n("500.00"), n("1000.00")));
//! assert_eq!(s.reversed_in_window, n("2050.00"));
//! assert_eq!(s.suspended_in_window, n("1000.00"));
//! assert_eq!(s.suspense_at_cutoff, n("3050.00"));
//! assert_eq!(s.recognised_for_window(run.interest_for_window), Some(n("-1550.00")));
//! ```

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::accrual::Accrual;
use super::error::EngineError;
use super::run::{AccountResult, DayRow};
use super::terms::{AccountTerms, Movement, Side};
use crate::conventions::names::{lookup, UnknownName};

/// Where an asset account stands for recognising its interest.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum AccrualStatus {
    /// Interest is income as it accrues (an account with no status row).
    #[default]
    Accruing,
    /// No interest is income; what accrues is held in suspense.
    NonAccrual,
    /// Interest is income on the balance less the loss allowance.
    CreditImpaired,
}

impl AccrualStatus {
    /// Every status, in the template's order.
    pub const ALL: [AccrualStatus; 3] = [
        AccrualStatus::Accruing,
        AccrualStatus::NonAccrual,
        AccrualStatus::CreditImpaired,
    ];

    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            AccrualStatus::Accruing => "accruing",
            AccrualStatus::NonAccrual => "non-accrual",
            AccrualStatus::CreditImpaired => "credit-impaired",
        }
    }

    /// Parses a status name (case, spaces, `_` and `-` ignored).
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<AccrualStatus, UnknownName> {
        lookup(
            "accrual status",
            s,
            &[
                ("accruing", AccrualStatus::Accruing),
                ("non-accrual", AccrualStatus::NonAccrual),
                ("credit-impaired", AccrualStatus::CreditImpaired),
            ],
            &["accruing", "non-accrual", "credit-impaired"],
        )
    }
}

/// One Accrual status row: the status from a day on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct StatusRow {
    /// The first day in the status.
    pub from: NaiveDate,
    /// The status.
    pub status: AccrualStatus,
    /// Billed and unpaid interest at the end of `from`-1, reversed on an
    /// entry into non-accrual (0 otherwise).
    pub unpaid_interest: Decimal,
    /// The loss allowance in force from `from` (credit-impaired; 0 otherwise).
    pub allowance: Decimal,
    /// Non-accrual: interest received is income.
    pub cash_basis: bool,
}

impl StatusRow {
    /// The status of an account with no row in force: accruing.
    pub const ACCRUING: StatusRow = StatusRow {
        from: NaiveDate::MIN,
        status: AccrualStatus::Accruing,
        unpaid_interest: Decimal::ZERO,
        allowance: Decimal::ZERO,
        cash_basis: false,
    };
}

/// What the split needs besides the engine's run.
#[derive(Debug, Clone, Copy)]
pub struct SuspenseInputs<'a> {
    /// The account's status rows, in date order, at most one per day.
    pub statuses: &'a [StatusRow],
    /// Interest receipts (negative amounts), in any order.
    pub receipts: &'a [Movement],
    /// Suspended interest brought forward at the start of `open_date`.
    pub opening_suspense: Decimal,
}

/// One day split.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SplitDay {
    /// D.
    pub date: NaiveDate,
    /// The status of D.
    pub status: AccrualStatus,
    /// i(D), the contractual interest, unrounded.
    pub contractual: Decimal,
    /// The part recognised as income, unrounded.
    pub recognised: Decimal,
    /// contractual - recognised (each of the three a decimal of at most 28
    /// significant digits, so the last digit may differ; the posting's split
    /// comes from exact sums).
    pub suspended: Decimal,
}

/// One posting period's posting split.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PeriodSplit {
    /// The period's last day (the posting is at its end).
    pub end: NaiveDate,
    /// What was posted.
    pub posted: Decimal,
    /// round(sum of recognised i(D)); the whole posting when every day of
    /// the period was accruing.
    pub recognised: Decimal,
    /// posted - recognised.
    pub suspended: Decimal,
}

/// A reversal on an entry into non-accrual.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Reversal {
    /// S, the first day in non-accrual.
    pub date: NaiveDate,
    /// The recognised part of the accrued at the end of S-1, rounded.
    pub accrued: Decimal,
    /// The billed and unpaid interest of the status row.
    pub unpaid: Decimal,
    /// accrued + unpaid.
    pub amount: Decimal,
}

/// Suspense released to income by an interest receipt.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Release {
    /// The receipt's value date.
    pub date: NaiveDate,
    /// What was received (positive).
    pub received: Decimal,
    /// What it released: up to the suspense balance, 0 unless the day is
    /// accruing, or non-accrual on a cash basis.
    pub amount: Decimal,
}

/// An account's contractual interest split into recognised and suspended.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Suspense {
    /// Every computed day, split.
    pub days: Vec<SplitDay>,
    /// Every posting of the run, split, in date order.
    pub periods: Vec<PeriodSplit>,
    /// Reversals to the cut-off, in date order.
    pub reversals: Vec<Reversal>,
    /// Receipts to the cut-off and what each released, in date order.
    pub releases: Vec<Release>,
    /// The status on the cut-off.
    pub status_at_cutoff: AccrualStatus,
    /// The suspended part of the accrued at the end of F-1, rounded.
    pub suspended_accrued_before_window: Decimal,
    /// The suspended part of the accrued at cut-off, rounded.
    pub suspended_accrued_at_cutoff: Decimal,
    /// Reversals dated in F..C.
    pub reversed_in_window: Decimal,
    /// Suspended parts of postings ending in F..C, plus the suspended
    /// accrued at C, less that at F-1.
    pub suspended_in_window: Decimal,
    /// Releases dated in F..C.
    pub released_in_window: Decimal,
    /// The suspense at the end of F-1.
    pub suspense_before_window: Decimal,
    /// The suspense at the end of C: opening + reversals + suspended -
    /// releases, to C.
    pub suspense_at_cutoff: Decimal,
}

impl Suspense {
    /// Interest for window as recognised: `contractual` - reversed -
    /// suspended + released; `None` on overflow.
    pub fn recognised_for_window(&self, contractual: Decimal) -> Option<Decimal> {
        contractual
            .checked_sub(self.reversed_in_window)?
            .checked_sub(self.suspended_in_window)?
            .checked_add(self.released_in_window)
    }

    /// What the suspense account takes in F..C on its credit side:
    /// reversed + suspended.
    pub fn credited_in_window(&self) -> Option<Decimal> {
        self.reversed_in_window
            .checked_add(self.suspended_in_window)
    }
}

/// The status row in force on `day` (accruing when none is).
///
/// ```
/// use ledgerate::engine::suspense::{status_on, AccrualStatus, StatusRow};
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let rows = [StatusRow { from: d("2026-11-11"), status: AccrualStatus::NonAccrual, ..StatusRow::ACCRUING }];
/// assert_eq!(status_on(&rows, d("2026-11-10")).status, AccrualStatus::Accruing);
/// assert_eq!(status_on(&rows, d("2026-11-11")).status, AccrualStatus::NonAccrual);
/// ```
pub fn status_on(statuses: &[StatusRow], day: NaiveDate) -> StatusRow {
    statuses
        .iter()
        .rev()
        .find(|s| s.from <= day)
        .copied()
        .unwrap_or(StatusRow::ACCRUING)
}

/// The exact split of one day: (contractual, recognised) as exact
/// accumulators.
fn split_day(row: &DayRow, status: &StatusRow) -> Result<(Accrual, Accrual), EngineError> {
    let over = |_| EngineError::Overflow {
        what: "the recognised interest",
        date: row.date,
    };
    let mut contractual = Accrual::new();
    contractual
        .add_fraction(row.interest_num, row.interest_den)
        .map_err(over)?;
    let recognised = match status.status {
        AccrualStatus::Accruing => contractual,
        AccrualStatus::NonAccrual => Accrual::new(),
        AccrualStatus::CreditImpaired => {
            let mut r = Accrual::new();
            let net = row
                .base
                .checked_sub(status.allowance)
                .ok_or(EngineError::Overflow {
                    what: "the net carrying amount",
                    date: row.date,
                })?;
            if net > Decimal::ZERO && row.fraction.num != 0 {
                let f = Decimal::from(row.fraction.num);
                let full = row
                    .base
                    .checked_mul(row.rate)
                    .and_then(|x| x.checked_mul(f));
                // Interest on the net amount at the same rate and fraction is
                // exact only where the day's interest is base x rate x fraction.
                if full != Some(row.interest_num) || row.interest_den != row.fraction.den {
                    return Err(EngineError::Unsupported(format!(
                        "credit-impaired on {}: the day's interest is not base x rate x day fraction (daily rounding, exponential compounding or banded tiers), so interest on the net carrying amount cannot be worked out exactly",
                        row.date
                    )));
                }
                let num = net
                    .checked_mul(row.rate)
                    .and_then(|x| x.checked_mul(f))
                    .ok_or(EngineError::Overflow {
                        what: "the recognised interest",
                        date: row.date,
                    })?;
                r.add_fraction(num, row.fraction.den).map_err(over)?;
            }
            r
        }
    };
    Ok((contractual, recognised))
}

/// Splits the run `result` of the asset account `terms` (its day rows kept,
/// from the open date) by its status rows, and works out the reversals,
/// releases and suspense for the window `window_start..=cutoff`.
///
/// # Errors
/// [`EngineError::Unsupported`] for a liability account, a run without its
/// day rows, or a credit-impaired day whose interest is not base x rate x
/// day fraction; [`EngineError::Overflow`].
pub fn split(
    terms: &AccountTerms,
    result: &AccountResult,
    inputs: &SuspenseInputs,
    window_start: NaiveDate,
    cutoff: NaiveDate,
) -> Result<Suspense, EngineError> {
    if terms.side != Side::Asset {
        return Err(EngineError::Unsupported(
            "accrual status on a liability account (asset side only)".to_string(),
        ));
    }
    if result.days.is_empty() && cutoff >= terms.open_date {
        return Err(EngineError::Unsupported(
            "interest in suspense needs the run's day rows".to_string(),
        ));
    }
    let round = |x: Decimal| terms.round_mode.round(x, terms.minor_units);
    let overflow = |what: &'static str, date: NaiveDate| EngineError::Overflow { what, date };
    let add = |a: Decimal, b: Decimal, what: &'static str, date: NaiveDate| {
        a.checked_add(b).ok_or(overflow(what, date))
    };
    let eve = window_start.pred_opt().unwrap_or(window_start);
    let mut out = Suspense {
        status_at_cutoff: status_on(inputs.statuses, cutoff).status,
        ..Suspense::default()
    };
    let mut receipts: Vec<&Movement> = inputs
        .receipts
        .iter()
        .filter(|m| m.value_date >= terms.open_date && m.value_date <= cutoff)
        .collect();
    receipts.sort_by_key(|m| m.value_date);
    let mut receipts = receipts.into_iter().peekable();
    // Running figures: the recognised interest since the last posting, and
    // whether every day since then was accruing.
    let mut since_rec = Accrual::new();
    let mut all_accruing = true;
    // The suspense to date, without the suspended part of the unposted accrued.
    let mut booked = inputs.opening_suspense;
    let mut previous: Option<StatusRow> = None;
    // The recognised part of the accrued at the end of the day before, rounded.
    let mut recognised_unposted = Decimal::ZERO;
    for row in &result.days {
        let d = row.date;
        let status = status_on(inputs.statuses, d);
        // Entry into non-accrual on d (not on the open date: what was held
        // in suspense then is the opening suspense).
        if status.status == AccrualStatus::NonAccrual
            && previous.is_some_and(|p| p.status != AccrualStatus::NonAccrual)
        {
            let rec_accrued = recognised_unposted;
            let amount = add(rec_accrued, status.unpaid_interest, "the reversal", d)?;
            out.reversals.push(Reversal {
                date: d,
                accrued: rec_accrued,
                unpaid: status.unpaid_interest,
                amount,
            });
            booked = add(booked, amount, "the suspense", d)?;
            if d >= window_start && d <= cutoff {
                out.reversed_in_window = add(out.reversed_in_window, amount, "the reversal", d)?;
            }
        }
        previous = Some(status);
        let (contractual, recognised) = split_day(row, &status)?;
        let c = contractual
            .value()
            .map_err(|_| overflow("the contractual interest", d))?;
        let r = recognised
            .value()
            .map_err(|_| overflow("the recognised interest", d))?;
        out.days.push(SplitDay {
            date: d,
            status: status.status,
            contractual: c,
            recognised: r,
            suspended: c
                .checked_sub(r)
                .ok_or(overflow("the suspended interest", d))?,
        });
        since_rec
            .add(&recognised)
            .map_err(|_| overflow("the recognised interest", d))?;
        all_accruing &= status.status == AccrualStatus::Accruing;
        // The posting at the end of d, split.
        if let Some(posted) = row.posted {
            let rec = if all_accruing {
                posted
            } else {
                round(
                    since_rec
                        .value()
                        .map_err(|_| overflow("the recognised interest", d))?,
                )
            };
            let susp = posted
                .checked_sub(rec)
                .ok_or(overflow("the suspended interest", d))?;
            out.periods.push(PeriodSplit {
                end: d,
                posted,
                recognised: rec,
                suspended: susp,
            });
            booked = add(booked, susp, "the suspense", d)?;
            if d >= window_start && d <= cutoff {
                out.suspended_in_window = add(out.suspended_in_window, susp, "the suspense", d)?;
            }
            since_rec = Accrual::new();
            all_accruing = true;
        }
        // The suspended part of the accrued at the end of d.
        let unposted = if row.posted.is_some() {
            recognised_unposted = Decimal::ZERO;
            Decimal::ZERO
        } else {
            let accrued = round(row.accrued);
            recognised_unposted = if all_accruing {
                accrued
            } else {
                round(
                    since_rec
                        .value()
                        .map_err(|_| overflow("the recognised interest", d))?,
                )
            };
            accrued
                .checked_sub(recognised_unposted)
                .ok_or(overflow("the suspended interest", d))?
        };
        // Receipts of d release up to the suspense balance.
        while let Some(m) = receipts.next_if(|m| m.value_date <= d) {
            let received = -m.amount;
            let releases = match status.status {
                AccrualStatus::Accruing => true,
                AccrualStatus::NonAccrual => status.cash_basis,
                AccrualStatus::CreditImpaired => false,
            };
            let balance = add(booked, unposted, "the suspense", d)?;
            let amount = if releases && balance > Decimal::ZERO && received > Decimal::ZERO {
                received.min(balance)
            } else {
                Decimal::ZERO
            };
            out.releases.push(Release {
                date: d,
                received,
                amount,
            });
            booked = booked
                .checked_sub(amount)
                .ok_or(overflow("the suspense", d))?;
            if d >= window_start {
                out.released_in_window = add(out.released_in_window, amount, "the release", d)?;
            }
        }
        if d == eve {
            out.suspended_accrued_before_window = unposted;
            out.suspense_before_window = add(booked, unposted, "the suspense", d)?;
        }
        if d == cutoff {
            out.suspended_accrued_at_cutoff = unposted;
            out.suspense_at_cutoff = add(booked, unposted, "the suspense", d)?;
        }
    }
    if eve < terms.open_date {
        out.suspense_before_window = inputs.opening_suspense;
    }
    if cutoff < terms.open_date {
        out.suspense_at_cutoff = inputs.opening_suspense;
    }
    out.suspended_in_window = out
        .suspended_in_window
        .checked_add(out.suspended_accrued_at_cutoff)
        .and_then(|x| x.checked_sub(out.suspended_accrued_before_window))
        .ok_or(overflow("the suspended interest", cutoff))?;
    Ok(out)
}

#[cfg(test)]
mod tests;
