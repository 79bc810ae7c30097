//! `ledgerate check BOOK...`: reads and validates the books and prints every
//! problem, writing nothing.

use std::io::Write;

use anyhow::Result;

use super::inputs::check_books_exist;
use super::{exit, read_books, BookArgs};
use crate::book::Severity;

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    books: BookArgs,
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_books_exist(&args.books.books)?;
    let books = read_books(&args.books)?;
    let mut errors = 0;
    let mut total = 0;
    for b in &books {
        writeln!(
            out,
            "{}: {} accounts ready, {} problems",
            b.path.display(),
            b.accounts.len(),
            b.problems.len()
        )?;
        for p in &b.problems {
            writeln!(out, "  {p}")?;
            total += 1;
            if p.severity == Severity::Error {
                errors += 1;
            }
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
