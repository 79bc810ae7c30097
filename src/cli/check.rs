//! `ledgerate check BOOK...`: reads and validates the books and prints every
//! problem, writing nothing. With a cut-off (option or Settings sheet) it
//! also accrues every account with the settings a run would use, so
//! problems only the engine meets (a day without a rate, a statement after
//! the cut-off) are listed too.

use std::io::Write;

use anyhow::Result;

use super::inputs::check_books_exist;
use super::settings::{Given, Settings};
use super::{exit, read_books, BookArgs};
use crate::batch::run_books;
use crate::problem::{Problem, Severity};

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    books: BookArgs,
    /// Also accrue every account to this cut-off (else the Settings sheet's cutoff, if any).
    #[arg(long, value_name = "DATE")]
    cutoff: Option<String>,
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_books_exist(&args.books.books)?;
    let books = read_books(&args.books)?;
    let mut errors = 0;
    let mut total = 0;
    let mut print = |p: &Problem, out: &mut dyn Write| -> Result<()> {
        writeln!(out, "  {p}")?;
        total += 1;
        if p.severity == Severity::Error {
            errors += 1;
        }
        Ok(())
    };
    for b in &books {
        writeln!(
            out,
            "{}: {} accounts ready, {} problems",
            b.path.display(),
            b.accounts.len(),
            b.problems.len()
        )?;
        for p in &b.problems {
            print(p, out)?;
        }
    }
    let given = Given {
        cutoff: args.cutoff.as_deref(),
        decimal_comma: args.books.decimal_comma,
        ..Given::default()
    };
    if let Some(settings) = Settings::resolve(&books, &given)? {
        let result = run_books(&books, &settings.batch(), &|| {});
        writeln!(
            out,
            "accrued to {}: {} accounts computed, {} problems",
            settings.cutoff,
            result.accounts_computed,
            result.problems.len()
        )?;
        for p in &result.problems {
            print(p, out)?;
        }
    }
    writeln!(out, "{total} problems, {errors} of them errors")?;
    // A file that is no book at all is a file error, not an account's.
    Ok(if books.iter().any(crate::book::Book::unreadable) {
        exit::USAGE
    } else if errors > 0 {
        exit::ACCOUNT_ERRORS
    } else {
        exit::OK
    })
}
