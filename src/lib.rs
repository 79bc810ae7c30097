//! ledgerate: month-end interest accrual, statement reconciliation and
//! variance audit in basis points, in exact decimal arithmetic.

pub mod batch;
pub mod book;
pub mod cli;
pub mod conventions;
pub mod engine;
pub mod report;
pub mod sample;
