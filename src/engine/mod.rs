//! The accrual engine: one account's terms, rate schedule and movements in,
//! its day-by-day timeline, postings and cut-off figures out.
//!
//! A pure function of its inputs. It never reads files, looks at the clock,
//! prints, or knows what a spreadsheet is; books are read into
//! [`terms::AccountTerms`] elsewhere and results are written elsewhere.
//! Every amount is an exact [`rust_decimal::Decimal`]; interest is summed as
//! exact numerators per day-count denominator ([`accrual::Accrual`]) and
//! divided once per reported figure, so true terminating values (a 30/360
//! month of 1,000.00 at 2.25% is 1.875) round the right way.

pub mod accrual;
pub mod causes;
pub mod error;
pub mod events;
pub mod floating;
pub mod inputs;
pub mod ledger;
pub mod rates;
pub mod reconcile;
pub mod run;
pub mod suspense;
pub mod tax;
pub mod terms;

pub use error::EngineError;
pub use inputs::Inputs;
pub use run::{accrue, resume, AccountResult, AccrualState, DayRow, PostingRow, RunOptions};
pub use terms::{
    AccountTerms, ActualPosting, FloatingTerms, FloorOn, Movement, RateMethod, RoundAt, Side,
    TierMethod,
};
