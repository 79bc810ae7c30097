//! The command line: argument parsing, one module per command, exit codes.
//!
//! Commands only wire the layers together (read books, call the engine,
//! write workbooks, print a summary); they hold no accrual rules.

use std::ffi::OsString;
use std::io::Write;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

mod daycount;

/// Exit statuses, declared in one place.
pub mod exit {
    /// Every account was computed.
    pub const OK: u8 = 0;
    /// Some account had an error and was left out.
    pub const ACCOUNT_ERRORS: u8 = 1;
    /// The command line or a file could not be used.
    pub const USAGE: u8 = 2;
    /// `--fail-on-variance`: some statement row is outside tolerance.
    pub const VARIANCE: u8 = 3;
}

/// Month-end interest accrual, statement reconciliation and variance audit in
/// basis points, in exact decimal arithmetic.
#[derive(Debug, Parser)]
#[command(name = "ledgerate", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Days and year fraction between two dates under a day-count basis.
    Daycount(daycount::Args),
}

/// An error of the command line layer: what went wrong, in words for the user.
#[derive(Debug, thiserror::Error)]
pub enum CliError {
    /// Bad arguments or an unusable input file.
    #[error("{0}")]
    Usage(String),
}

/// Runs the command line on `args` and returns the exit status.
pub fn main_with<I, T>(args: I) -> ExitCode
where
    I: IntoIterator<Item = T>,
    T: Into<OsString> + Clone,
{
    let cli = match Cli::try_parse_from(args) {
        Ok(c) => c,
        Err(e) => {
            // clap prints help and version to stdout with success, usage errors to stderr.
            let _ = e.print();
            return ExitCode::from(if e.use_stderr() {
                exit::USAGE
            } else {
                exit::OK
            });
        }
    };
    let mut out = std::io::stdout().lock();
    let result = match cli.command {
        Command::Daycount(a) => daycount::run(&a, &mut out),
    };
    match result {
        Ok(code) => ExitCode::from(code),
        Err(e) => {
            if is_broken_pipe(&e) {
                return ExitCode::from(exit::OK);
            }
            let _ = out.flush();
            eprintln!("ledgerate: {e:#}");
            ExitCode::from(exit::USAGE)
        }
    }
}

fn is_broken_pipe(e: &anyhow::Error) -> bool {
    e.chain().any(|c| {
        c.downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}
