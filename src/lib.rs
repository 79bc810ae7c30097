//! ledgerate: month-end interest accrual, statement reconciliation and
//! variance audit in basis points, in exact decimal arithmetic.
//!
//! # The map of the crate
//!
//! Data flows one way: **read books, validate, accrue (in parallel),
//! reconcile, book the journal, write the workbook**. The modules below are
//! listed in that order; each one's own documentation says what it holds and
//! what it must never do. What the program must compute is in
//! `docs/behaviour.md`, cited by section name throughout.
//!
//! The pure core, with no file, clock, environment or terminal (a test reads
//! its source and fails if it reaches any):
//!
//! - [`conventions`]: the market's conventions on their own: day-count bases,
//!   business-day calendars, posting schedules, ISO 4217 currencies, rounding,
//!   compounding and growth arithmetic, exact ratios, and name matching with
//!   suggestions.
//! - [`engine`]: one account's accrual from its terms and one bundle of inputs
//!   ([`engine::Inputs`]): the day loop and its one-step fast path, the cut-off
//!   figures, statement reconciliation and the likely-cause search, and an
//!   account's life events (a close, its break penalty, new terms after a
//!   maturity) run term by term.
//!
//! The description of the input, and what goes wrong with it:
//!
//! - [`schema`]: the input book's format, described once: every sheet and
//!   column, its kind, default, note and example. The reader, the template, the
//!   sample generator and the book writer all take it from here.
//! - [`problem`]: a problem about an input (where: book, sheet, A1 cell; what
//!   was found; what was expected; how to fix it), and the one order every
//!   report lists problems in.
//! - [`files`]: what a path is on disk (a FIFO, a device, a link to
//!   nothing), so that only regular files and folders are read or replaced.
//! - [`panics`]: a panic inside a library turned into an error the program
//!   reports itself, without the library's panic text.
//!
//! Reading, computing, writing:
//!
//! - [`book`]: workbooks and CSV folders read into typed [`book::Book`]s plus
//!   problems; an input is never changed.
//! - [`pipeline`]: one account from its book rows to its checked figures; the
//!   only place an account is set up and run, for every command.
//! - [`batch`]: the month-end batch: every account through the pipeline in
//!   parallel, in book order; totals, the journal, shards and their merge.
//! - [`explain`]: one account explained day by day, as a value and its printer.
//! - [`report`]: the output workbook, the input template and the book writer;
//!   reading our own workbooks back for a merge. It computes no figure.
//! - [`sample`]: synthetic books of any size, with planted statement mistakes,
//!   seeded so that the same seed gives the same book.
//! - [`cli`]: the command line: arguments, settings resolved once, one file
//!   per command, exit statuses. It wires the layers and holds no accrual rule.
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
pub mod files;
pub mod ids;
pub mod panics;
pub mod pipeline;
pub mod problem;
pub mod report;
pub mod sample;
pub mod schema;
