//! The inputs of one account besides its terms: its rates and debit rates,
//! its movements, the amounts its statements posted, the days its runs of
//! days must end on, and a floating account's tables and fixings.
//!
//! The day loop ([`super::run`]) and the cause search ([`super::causes`])
//! take this same bundle, so a re-run sees exactly what the first run saw.
//! It only borrows: it never owns, changes or looks anything up.

use chrono::NaiveDate;

use super::floating::FloatingRates;
use super::rates::RateSchedule;
use super::terms::{ActualPosting, Movement};

/// Everything an account's run reads besides its terms.
#[derive(Debug, Clone, Copy)]
pub struct Inputs<'a> {
    /// The account's rates (the cause search moves their tables).
    pub rates: &'a RateSchedule,
    /// Rates for a base of the opposite sign, when the account has them.
    pub debit_rates: Option<&'a RateSchedule>,
    /// Balance movements, in any order.
    pub movements: &'a [Movement],
    /// Amounts actually posted, from statements.
    pub actual: &'a [ActualPosting],
    /// Days a run of days must end on (in any order): the last days of
    /// statement periods and the eves of their first days, so that spans sum
    /// exactly over each statement period.
    pub breaks: &'a [NaiveDate],
    /// A floating account's tables and fixings (behaviour.md, Floating rates). When
    /// given, the account's rates are resolved from them for each day of the
    /// run and `rates` is not consulted; a fixed-rate account leaves it `None`.
    pub floating: Option<FloatingRates<'a>>,
}

impl<'a> Inputs<'a> {
    /// An account that earns `rates` and has nothing else: no debit rates,
    /// movements, statements or breaks, and a fixed rate.
    ///
    /// ```
    /// use ledgerate::engine::rates::RateSchedule;
    /// use ledgerate::engine::Inputs;
    /// let rates = RateSchedule::default();
    /// let inputs = Inputs::new(&rates);
    /// assert!(inputs.movements.is_empty() && inputs.floating.is_none());
    /// ```
    pub fn new(rates: &'a RateSchedule) -> Inputs<'a> {
        Inputs {
            rates,
            debit_rates: None,
            movements: &[],
            actual: &[],
            breaks: &[],
            floating: None,
        }
    }
}
