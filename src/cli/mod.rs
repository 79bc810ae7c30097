//! The command line: argument parsing, one module per command, exit codes.
//!
//! Commands only wire the layers together (read books, call the engine,
//! write workbooks, print a summary); they hold no accrual rules.

use std::ffi::OsString;
use std::io::Write;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

mod check;
mod completions;
mod daycount;
mod explain;
mod help;
mod inputs;
mod manual;
mod merge;
mod progress;
mod run;
mod sample;
mod settings;
mod summary;
mod template;

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
#[command(
    name = "ledgerate",
    version,
    about,
    long_about = None,
    after_help = help::TOP,
    after_long_help = help::top_long()
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Month-end run: accrue every account of the books and write the workbook.
    #[command(after_help = help::RUN)]
    Run(run::Args),
    /// Read and validate the books; print every problem, write nothing.
    #[command(after_help = help::CHECK)]
    Check(check::Args),
    /// Combine the workbooks of shard runs (run --shard K/N) into one.
    #[command(after_help = help::MERGE)]
    Merge(merge::Args),
    /// One account day by day: expected against posted, and the likely cause of a variance.
    #[command(after_help = help::EXPLAIN)]
    Explain(explain::Args),
    /// Write a blank input book with every sheet and column.
    #[command(after_help = help::TEMPLATE)]
    Template(template::Args),
    /// Write a synthetic book of any size (invented accounts, planted statement mistakes).
    #[command(after_help = help::SAMPLE)]
    Sample(sample::Args),
    /// Days and year fraction between two dates under a day-count basis.
    #[command(after_help = help::DAYCOUNT)]
    Daycount(daycount::Args),
    /// Print the shell completion script for bash, zsh, fish, powershell or elvish.
    #[command(after_help = help::COMPLETIONS)]
    Completions(completions::Args),
    /// Write the manual pages (ledgerate.1 and one per command), or print them.
    #[command(after_help = help::MANUAL)]
    Manual(manual::Args),
}

/// The books of a command and how to read them.
#[derive(Debug, clap::Args)]
pub struct BookArgs {
    /// Account books: workbooks (.xlsx, .xlsm, .xlsb, .xls, .ods) or folders of CSV files.
    #[arg(required = true, value_name = "BOOK")]
    books: Vec<std::path::PathBuf>,
    /// Read "1.234,56" as 1234.56 (decimal comma); without it such text is an error.
    #[arg(long)]
    decimal_comma: bool,
}

/// Refuses books whose file could not be read at all (not a workbook,
/// empty, truncated): a run on them would compute nothing from that file,
/// so it stops with their problems instead of writing a workbook.
fn refuse_unreadable(books: &[crate::book::Book]) -> anyhow::Result<()> {
    let lines: Vec<String> = books
        .iter()
        .filter(|b| b.unreadable())
        .flat_map(|b| b.problems.iter().filter(|p| p.position.sheet.is_empty()))
        .map(|p| format!("  {p}"))
        .collect();
    if lines.is_empty() {
        return Ok(());
    }
    anyhow::bail!(
        "cannot read {} as a book, so nothing was written:\n{}",
        if lines.len() == 1 {
            "this file"
        } else {
            "these files"
        },
        lines.join("\n")
    )
}

/// Reads every book and checks that account ids are unique across them.
fn read_books(args: &BookArgs) -> anyhow::Result<Vec<crate::book::Book>> {
    read_books_showing(args, &indicatif::ProgressBar::hidden())
}

/// [`read_books`], naming on `progress` the book being read.
fn read_books_showing(
    args: &BookArgs,
    progress: &indicatif::ProgressBar,
) -> anyhow::Result<Vec<crate::book::Book>> {
    let options = crate::book::ReadOptions {
        decimal_comma: args.decimal_comma,
    };
    let count = args.books.len();
    let mut books = Vec::with_capacity(count);
    for (i, path) in args.books.iter().enumerate() {
        progress.set_message(if count == 1 {
            format!("reading {}", path.display())
        } else {
            format!("reading {} ({} of {count})", path.display(), i + 1)
        });
        books.push(crate::book::read_book(path, &options));
    }
    progress.set_message("checking the account ids across the books");
    crate::book::check_unique_ids(&mut books);
    Ok(books)
}

/// The run time written in a workbook: `--fixed-time` (a timestamp, an
/// RFC 3339 timestamp with `Z` or an offset, or a date at midnight), else
/// the clock to the whole second.
fn run_time(fixed: Option<&str>) -> anyhow::Result<chrono::NaiveDateTime> {
    use chrono::{NaiveDateTime, Timelike};
    match fixed {
        Some(t) => NaiveDateTime::parse_from_str(t, "%Y-%m-%dT%H:%M:%S")
            .or_else(|_| NaiveDateTime::parse_from_str(&format!("{t}T00:00:00"), "%Y-%m-%dT%H:%M:%S"))
            .or_else(|_| settings::rfc3339_wall_time(t))
            .map_err(|_| anyhow::anyhow!("--fixed-time '{t}' is not a timestamp: write it as YYYY-MM-DDTHH:MM:SS, for example 2026-12-01T09:00:00 (or 2026-12-01T09:00:00Z, or with an offset such as +01:00)")),
        // Whole seconds: the workbook has no finer time.
        None => {
            let now = chrono::Local::now().naive_local();
            Ok(now.with_nanosecond(0).unwrap_or(now))
        }
    }
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
        Command::Run(a) => run::run(&a, &mut out),
        Command::Check(a) => check::run(&a, &mut out),
        Command::Merge(a) => merge::run(&a, &mut out),
        Command::Explain(a) => explain::run(&a, &mut out),
        Command::Template(a) => template::run(&a, &mut out),
        Command::Sample(a) => sample::run(&a, &mut out),
        Command::Daycount(a) => daycount::run(&a, &mut out),
        Command::Completions(a) => completions::run(&a, &mut out),
        Command::Manual(a) => manual::run(&a, &mut out),
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
