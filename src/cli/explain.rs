//! `ledgerate explain BOOK... --account ID`: one account's period day by day
//! at the terminal, expected against posted, and the cause search's findings.
//!
//! Resolves the options and finds the account; the figures come from the
//! pipeline through [`crate::explain`], which also prints them. Holds no
//! accrual or reconciliation rule.

use std::io::Write;

use anyhow::{anyhow, bail, Result};
use chrono::NaiveDate;

use super::daycount::parse_date_option;
use super::inputs::{check_books_exist, known_to_run};
use super::settings::{Given, KnowledgeArgs, Settings, ToleranceArgs};
use super::{exit, read_books, refuse_unreadable, BookArgs};
use crate::book::{AccountEntry, Book};
use crate::conventions::names::closest_id;
use crate::explain::{explain, print};
use crate::pipeline::Options;

/// Arguments of `explain`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    books: BookArgs,
    /// The account to explain.
    #[arg(long, value_name = "ID")]
    account: String,
    /// The days to show, START..END (default: the statement periods in the window, else the window).
    #[arg(long, value_name = "START..END")]
    period: Option<String>,
    /// The cut-off date (else the Settings sheet's cutoff, else the period's end).
    #[arg(long, value_name = "DATE")]
    cutoff: Option<String>,
    /// The first day of the window (else the Settings sheet's window_start, else the cut-off's month).
    #[arg(long, value_name = "DATE")]
    window_start: Option<String>,
    #[command(flatten)]
    tolerance: ToleranceArgs,
    /// A missing index fixing: none (an error, the default) or last (use the
    /// last published fixing, with a warning).
    #[arg(long, value_name = "FALLBACK")]
    fixing_fallback: Option<String>,
    #[command(flatten)]
    knowledge: KnowledgeArgs,
    /// When the journal settles a posting: payment-date (the default),
    /// in-window or period-end (else the Settings sheet's settlement_lines).
    #[arg(long, value_name = "WORD")]
    settlement_lines: Option<String>,
}

fn parse_period(s: &str) -> Result<(NaiveDate, NaiveDate)> {
    let bad = || anyhow!("--period '{s}' is not START..END: write it like 2026-11-01..2026-11-30");
    let (a, b) = s.split_once("..").ok_or_else(bad)?;
    let (a, b) = (
        parse_date_option("--period START", a)?,
        parse_date_option("--period END", b)?,
    );
    if b < a {
        bail!("--period '{s}' ends before it starts");
    }
    Ok((a, b))
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_books_exist(&args.books.books)?;
    let mut books = read_books(&args.books)?;
    refuse_unreadable(&books)?;
    find_account(&books, &args.account)?;
    let period = args.period.as_deref().map(parse_period).transpose()?;
    let settings = settings(args, &books, period)?;
    // What the run knows leaves rows out; the account itself stays.
    known_to_run(&mut books, &settings);
    let (book, entry) = find_account(&books, &args.account)?;
    let options = Options {
        window_start: settings.window_start,
        cutoff: settings.cutoff,
        tolerance: settings.tolerance,
        fixing_fallback: settings.fixing_fallback,
        keep_days: true,
        fast_path: true,
        previous_as_at: settings.previous_as_at,
        settlement_lines: settings.settlement_lines,
    };
    let x = explain(book, entry, &options, period).map_err(|f| anyhow!("{}", f.problem))?;
    print(&x, out)?;
    Ok(exit::OK)
}

/// The account `id` and its book; when it is missing, the problems that
/// kept it out, if any.
fn find_account<'b>(books: &'b [Book], id: &str) -> Result<(&'b Book, &'b AccountEntry)> {
    books
        .iter()
        .find_map(|b| b.accounts.iter().find(|a| a.terms.id == id).map(|a| (b, a)))
        .ok_or_else(|| {
            let problems: Vec<String> = books
                .iter()
                .flat_map(|b| b.problems.iter())
                .filter(|p| p.account.as_deref() == Some(id))
                .map(|p| format!("  {p}"))
                .collect();
            if problems.is_empty() {
                no_such_account(books, id)
            } else {
                anyhow!(
                    "the account '{id}' cannot be computed:\n{}",
                    problems.join("\n")
                )
            }
        })
}

/// The error for an id no book has, suggesting the id most likely meant
/// (the same but for letter case, else a letter or two off).
fn no_such_account(books: &[Book], id: &str) -> anyhow::Error {
    let ids = books.iter().flat_map(|b| {
        b.accounts
            .iter()
            .map(|a| a.terms.id.as_str())
            .chain(b.problems.iter().filter_map(|p| p.account.as_deref()))
    });
    match closest_id(id, ids) {
        Some(near) => anyhow!(
            "no account '{id}' in the books; did you mean '{near}'? ids match exactly, letter case too: give --account {near}"
        ),
        None => anyhow!("no account '{id}' in the books: check the id on the Accounts sheet"),
    }
}

/// The window, cut-off, tolerances, fixing fallback and knowledge dates in
/// force, resolved as for a run (command line, else the books' Settings
/// sheets, else the default; the cut-off defaults to the end of `--period`).
fn settings(
    args: &Args,
    books: &[Book],
    period: Option<(NaiveDate, NaiveDate)>,
) -> Result<Settings> {
    let given = Given {
        cutoff: args.cutoff.as_deref(),
        cutoff_default: period.map(|p| p.1),
        window_start: args.window_start.as_deref(),
        fixing_fallback: args.fixing_fallback.as_deref(),
        settlement_lines: args.settlement_lines.as_deref(),
        decimal_comma: args.books.decimal_comma,
        ..Given::default()
    }
    .with_tolerance(&args.tolerance)
    .with_knowledge(&args.knowledge);
    Settings::resolve(books, &given)?
        .ok_or_else(|| anyhow!("no cut-off: give --cutoff YYYY-MM-DD or --period START..END"))
}
