//! ledgerate: month-end interest accrual, statement reconciliation and
//! variance audit in basis points, in exact decimal arithmetic.
//!
//! Bad input never panics: the library's code may not unwrap, expect,
//! panic or index unchecked (tests may; `cargo clippy` enforces it).
#![cfg_attr(
    not(test),
    deny(
        clippy::unwrap_used,
        clippy::expect_used,
        clippy::panic,
        clippy::indexing_slicing
    )
)]

pub mod batch;
pub mod book;
pub mod cli;
pub mod conventions;
pub mod engine;
pub mod explain;
pub mod panics;
pub mod pipeline;
pub mod problem;
pub mod report;
pub mod sample;
