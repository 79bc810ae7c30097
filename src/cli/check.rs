//! `ledgerate check BOOK...`: reads and validates the books and prints every
//! problem, writing nothing. With a cut-off (option or Settings sheet) it
//! also accrues every account with the settings a run would use, so
//! problems only the engine meets (a day without a rate, a statement after
//! the cut-off) are listed too, and cuts the books to what such a run knows
//! (an as-at date leaves rows out, with a note per sheet).

use std::io::Write;

use anyhow::Result;

use super::inputs::{check_books_exist, known_to_run};
use super::settings::{Given, KnowledgeArgs, Settings};
use super::{exit, read_books, BookArgs};
use crate::batch::run_books;
use crate::problem::{by_cause, counted, Listed, Problem, Severity};

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    books: BookArgs,
    /// Also accrue every account to this cut-off (else the Settings sheet's cutoff, if any).
    #[arg(long, value_name = "DATE")]
    cutoff: Option<String>,
    #[command(flatten)]
    knowledge: KnowledgeArgs,
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_books_exist(&args.books.books)?;
    let mut books = read_books(&args.books)?;
    let given = Given {
        cutoff: args.cutoff.as_deref(),
        decimal_comma: args.books.decimal_comma,
        ..Given::default()
    }
    .with_knowledge(&args.knowledge);
    // Settings that cannot be used stop the check after the books'
    // problems are listed; those that can cut the books first.
    let resolved = Settings::resolve(&books, &given);
    if let Ok(Some(settings)) = &resolved {
        known_to_run(&mut books, settings);
    }
    let mut errors = 0;
    let mut total = 0;
    let mut print = |problems: &[Problem], out: &mut dyn Write| -> Result<()> {
        let all: Vec<&Problem> = problems.iter().collect();
        for line in by_cause(&all) {
            writeln!(out, "  {line}")?;
            // The folded line's problems follow under it, one a line.
            if let Listed::Folded { problems, .. } = &line {
                for p in problems {
                    writeln!(out, "    {p}")?;
                }
            }
        }
        total += problems.len();
        errors += problems
            .iter()
            .filter(|p| p.severity == Severity::Error)
            .count();
        Ok(())
    };
    for b in &books {
        writeln!(
            out,
            "{}: {} ready, {}",
            b.path.display(),
            counted(b.accounts.len(), "account"),
            counted(b.problems.len(), "problem")
        )?;
        print(&b.problems, out)?;
    }
    if let Some(settings) = resolved? {
        let result = run_books(&books, &settings.batch(), &|| {});
        writeln!(
            out,
            "accrued to {}: {} computed, {}",
            settings.cutoff,
            counted(result.accounts_computed, "account"),
            counted(result.problems.len(), "problem")
        )?;
        print(&result.problems, out)?;
    }
    writeln!(
        out,
        "{}, {errors} of them {}",
        counted(total, "problem"),
        if errors == 1 { "an error" } else { "errors" }
    )?;
    // A file that is no book at all is a file error, not an account's.
    Ok(if books.iter().any(crate::book::Book::unreadable) {
        exit::USAGE
    } else if errors > 0 {
        exit::ACCOUNT_ERRORS
    } else {
        exit::OK
    })
}
