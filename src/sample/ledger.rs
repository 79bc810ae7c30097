//! The ledger side of a sample book (behaviour.md, Books that tie): what the
//! general ledger held for each account at the previous close, summed into
//! the Trial balance sheet so that the run's Tie-out agrees, and the core
//! system's open item at the cut-off on the Booked sheet, now and then a
//! day of interest off so that the Accrued check has something to find.
//!
//! Every figure comes from the account's own pipeline run, made with the
//! options the book's Settings give a run; this module only adds them up
//! (exactly, in book order, one GL account at a time) and moves a booked
//! figure by what the engine says a day is worth. It never rounds, never
//! runs an account, and never writes a file.

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::rng::Rng;
use super::{date, SampleAccount, CUTOFF, ENTITY};
use crate::engine::reconcile::expected_over;
use crate::engine::{AccountTerms, EngineError, Side};
use crate::pipeline::AccountRun;
use crate::report::book_writer::Value;

/// The as-at date of the October close (the Settings sheet's
/// `previous_as_at`): movements booked after it are the prior-period
/// adjustments of the November run.
pub const PREVIOUS_AS_AT: NaiveDate = date(2026, 11, 2);

/// The day before the window: the Trial balance sheet's opening.
pub const OPENING_DAY: NaiveDate = date(2026, 10, 31);

/// What the general ledger holds for one account, as the November run
/// with the book's settings works it out.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SampleLedger {
    /// The accrued-interest GL account (defaults included).
    pub gl_accrued: String,
    /// Payable or receivable.
    pub side: Side,
    /// BO: the open item the October close booked, in the account's
    /// normal direction.
    pub booked_opening: Decimal,
    /// O(F-1) known now less BO.
    pub prior_period: Decimal,
    /// O(C): the open item at the cut-off.
    pub open_item: Decimal,
}

impl SampleLedger {
    /// The account's figures from its run.
    pub(crate) fn of(run: &AccountRun, side: Side, gl_accrued: String) -> SampleLedger {
        SampleLedger {
            gl_accrued,
            side,
            booked_opening: run.ledger.booked_opening,
            prior_period: run.ledger.prior_period,
            open_item: run.ledger.open_item,
        }
    }
}

/// How a planted Booked row is off: the core system's accrual counted from
/// a day late or a day early.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum BookedMistake {
    /// Accrued from the day after the accrual should start: a day short.
    StartADayLate,
    /// Accrued from the day before: a day too many.
    StartADayEarly,
}

impl BookedMistake {
    /// The mistake in words, as the likely-cause search names it.
    ///
    /// ```
    /// use ledgerate::sample::BookedMistake;
    /// assert_eq!(BookedMistake::StartADayLate.name(), "period start a day late");
    /// ```
    pub fn name(self) -> &'static str {
        match self {
            BookedMistake::StartADayLate => "period start a day late",
            BookedMistake::StartADayEarly => "period start a day early",
        }
    }

    /// The day the core system's accrual starts from, for `from` the day
    /// it should.
    fn start(self, from: NaiveDate) -> Option<NaiveDate> {
        match self {
            BookedMistake::StartADayLate => from.succ_opt(),
            BookedMistake::StartADayEarly => from.pred_opt(),
        }
    }
}

/// The Booked row of an account at the cut-off.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SampleBooked {
    /// The open item the row says the core system holds.
    pub open_item: Decimal,
    /// O(C), the open item the run expects.
    pub expected: Decimal,
    /// The first day of the accrual checked: the day after the last
    /// posting end on or before the cut-off, else the open date.
    pub accrual_from: NaiveDate,
    /// The day-off planted, if any.
    pub mistake: Option<BookedMistake>,
}

impl SampleBooked {
    /// The Booked sheet's row for account `id`: account, date, open item.
    pub fn cells(&self, id: &str) -> Vec<Value> {
        vec![
            Value::Text(id.to_string()),
            Value::Date(CUTOFF),
            Value::Number(self.open_item),
        ]
    }
}

/// A planted row must be off by at least this many minor units, outside the
/// default tolerance of one.
const LEAST_GAP_UNITS: i64 = 3;

/// The Booked row at the cut-off of the account with `terms` and `run`:
/// O(C), or with `plant` (a random stream) O(C) moved by a day of interest
/// at the start of the accrual, late or early, whichever first moves it by
/// at least three minor units (none does: nothing is planted). `run` must
/// keep its day rows when a day-off is planted.
///
/// # Errors
/// An [`EngineError`] when the figures overflow.
pub(crate) fn booked_at_cutoff(
    terms: &AccountTerms,
    run: &AccountRun,
    plant: Option<u64>,
) -> Result<SampleBooked, EngineError> {
    let expected = run.ledger.open_item;
    let accrual_from = run
        .result
        .postings
        .iter()
        .filter(|p| p.end <= CUTOFF)
        .map(|p| p.end)
        .max()
        .and_then(|e| e.succ_opt())
        .unwrap_or(terms.open_date);
    let mut booked = SampleBooked {
        open_item: expected,
        expected,
        accrual_from,
        mistake: None,
    };
    let Some(stream) = plant else {
        return Ok(booked);
    };
    let mut r = Rng::stream(stream, 0xB00C);
    let kinds = if r.chance(500) {
        [BookedMistake::StartADayLate, BookedMistake::StartADayEarly]
    } else {
        [BookedMistake::StartADayEarly, BookedMistake::StartADayLate]
    };
    let right = expected_over(terms, &run.result, accrual_from, CUTOFF)?.amount;
    let least = Decimal::new(LEAST_GAP_UNITS, terms.minor_units);
    for kind in kinds {
        let Some(start) = kind.start(accrual_from).filter(|s| *s <= CUTOFF) else {
            continue;
        };
        let gap = expected_over(terms, &run.result, start, CUTOFF)?.amount - right;
        if gap.abs() >= least {
            booked.open_item = expected + gap;
            booked.mistake = Some(kind);
            break;
        }
    }
    Ok(booked)
}

/// A GL account the generator gave accounts of both sides: a defect of the
/// generator, since the run's Tie-out has no row for it.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("the sample's accrued-interest GL account {gl_account} ({currency}) is used by deposits and loans alike; the generator must give each side its own")]
pub struct MixedSides {
    /// ISO 4217 code.
    pub currency: String,
    /// The GL account.
    pub gl_account: String,
}

/// The Trial balance at the day before the window, summed an account at a
/// time: per currency and accrued-interest GL account, the sum of the
/// accounts' booked openings. Memory holds one sum per GL account, whatever
/// the number of accounts.
#[derive(Debug, Clone, Default)]
pub struct OpeningBalances {
    by_gl: BTreeMap<(String, String), (Side, Decimal)>,
}

impl OpeningBalances {
    /// Adds one account's booked opening to its GL account's sum.
    ///
    /// # Errors
    /// [`MixedSides`] when an account of the other side has used the GL
    /// account already.
    pub fn add(&mut self, account: &SampleAccount) -> Result<(), MixedSides> {
        let l = &account.ledger;
        let key = (account.entry.terms.currency.clone(), l.gl_accrued.clone());
        let (side, sum) = self.by_gl.entry(key).or_insert((l.side, Decimal::ZERO));
        if *side != l.side {
            return Err(MixedSides {
                currency: account.entry.terms.currency.clone(),
                gl_account: l.gl_accrued.clone(),
            });
        }
        *sum += l.booked_opening;
        Ok(())
    }

    /// The Trial balance sheet's rows, by currency and GL account: entity,
    /// currency, GL account, the day before the window and the balance
    /// signed as a trial balance prints it (debit positive: a receivable's
    /// balance as it is, a payable's negated).
    ///
    /// ```
    /// use ledgerate::sample::{Generator, OpeningBalances};
    /// use ledgerate::report::book_writer::Value;
    /// let g = Generator::new(7, 40);
    /// let mut tb = OpeningBalances::default();
    /// for a in g.accounts_in(0..40) {
    ///     tb.add(&a.unwrap()).unwrap();
    /// }
    /// let rows = tb.rows();
    /// assert!(!rows.is_empty());
    /// assert!(rows.iter().all(|r| r[3] == Value::Date("2026-10-31".parse().unwrap())));
    /// ```
    pub fn rows(&self) -> Vec<Vec<Value>> {
        self.by_gl
            .iter()
            .map(|((currency, gl), (side, sum))| {
                let mut balance = match side {
                    Side::Asset => *sum,
                    Side::Liability => -*sum,
                };
                if balance.is_zero() {
                    balance.set_sign_positive(true);
                }
                vec![
                    Value::Text(ENTITY.to_string()),
                    Value::Text(currency.clone()),
                    Value::Text(gl.clone()),
                    Value::Date(OPENING_DAY),
                    Value::Number(balance),
                ]
            })
            .collect()
    }

    /// The number of rows [`rows`](Self::rows) gives.
    pub fn len(&self) -> usize {
        self.by_gl.len()
    }

    /// Whether no account was added.
    pub fn is_empty(&self) -> bool {
        self.by_gl.is_empty()
    }
}
