//! ledgerate's integration tests, in one test binary: the real program on
//! real files (sample books, fixture books, the broken-book corpus), the
//! behaviour contract's worked examples, and the checks against outside
//! references (QuantLib vectors). Helpers shared by several files live in
//! [`common`].
//!
//! Run one file's tests with `cargo test --test it FILE::` (for example
//! `cargo test --test it cli_run::`).

mod common;

mod bad_books;
mod book_reader;
mod cli_conventions;
mod cli_daycount;
mod cli_floating;
mod cli_formats;
mod cli_many_accounts;
mod cli_run;
mod cli_shards;
mod completeness;
mod events_examples;
mod events_law;
mod explain_matches_run;
mod hostile_books;
mod hostile_inputs;
mod journal_detail;
mod layers;
mod ledger_examples;
mod ledger_inputs;
mod ledger_law;
mod merge_safety;
mod messages;
mod output_safety;
mod quantlib_daycount;
mod quantlib_overnight;
mod reader_mutations;
mod report_writer;
mod sample_books;
mod spec_examples;
mod suspense_examples;
mod suspense_law;
mod tax_examples;
mod tie_out_sheets;
mod write_while_accruing;
