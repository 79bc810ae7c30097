//! What can stop the engine computing an account.
//!
//! Engine errors say what went wrong with the account's terms or figures; they
//! carry no file positions (the reader adds those where a term came from).

use chrono::NaiveDate;

use crate::conventions::daycount::DayCountError;
use crate::conventions::growth::GrowthError;
use crate::conventions::schedule::ScheduleError;

/// An account that cannot be computed.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum EngineError {
    /// No rate table is in force on a day the account earns.
    #[error("no rate is in force on {date} (the earliest rate takes effect on {first})")]
    NoRate {
        /// The day without a rate.
        date: NaiveDate,
        /// The first effective date of the schedule, if any.
        first: String,
    },
    /// A figure grew past what exact decimals can hold.
    #[error("{what} overflowed the exact decimal range on {date}")]
    Overflow {
        /// Which figure.
        what: &'static str,
        /// The day it happened.
        date: NaiveDate,
    },
    /// A combination of terms the engine does not support.
    #[error("unsupported terms: {0}")]
    Unsupported(String),
    /// A floating rate needs a fixing the fixings do not hold.
    #[error("no {index} fixing for {date}")]
    MissingFixing {
        /// The index.
        index: String,
        /// The business day whose fixing is missing.
        date: NaiveDate,
    },
    /// A day-count basis lacks a term it needs.
    #[error("{0}")]
    DayCount(#[from] DayCountError),
    /// The posting schedule cannot be built.
    #[error("{0}")]
    Schedule(#[from] ScheduleError),
    /// Growth arithmetic failed (continuous or annual-effective compounding).
    #[error("{0}")]
    Growth(#[from] GrowthError),
    /// A resumed state does not start a posting period of the account.
    #[error("the saved state on {0} does not start a posting period")]
    BadState(NaiveDate),
    /// Reconciliation met a run of days crossing a statement period's
    /// boundary: the run was made without that period's breaks.
    #[error("the run of days from {0} crosses a statement period boundary")]
    UnbrokenSpan(NaiveDate),
    /// No table of the account's withholding tax is in force on a posting's
    /// payment date (behaviour.md, Withholding tax): never taken as a zero rate.
    #[error("no {tax_ref} tax table is in force on the payment date {date} (its first table takes effect on {first})")]
    NoTaxTable {
        /// The account's tax_ref.
        tax_ref: String,
        /// The payment date.
        date: NaiveDate,
        /// The first effective date of the schedule, or "none".
        first: String,
    },
}
