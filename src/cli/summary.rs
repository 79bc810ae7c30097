//! The plain-text summary `run` and `merge` print on standard output: the
//! window, the account counts (read = computed + left out), the first
//! accounts left out with the error that kept each out, the totals by
//! currency and side, the statement rows by status, the problem counts and
//! the first errors.
//!
//! It only prints figures the report already holds: it never adds, rounds
//! beyond padding an amount to its currency's places, or reads a file.

use std::io::Write;

use anyhow::Result;
use rust_decimal::Decimal;

use crate::problem::{by_cause, counted, Problem, Severity};
use crate::report::model::{Report, LEFT_OUT_SHOWN};
use crate::report::WriteOutcome;

/// The plain-text summary on standard output; `files` are the files
/// written beside the workbook, each with what it is ("journal detail").
pub(crate) fn print_summary(
    out: &mut dyn Write,
    report: &Report,
    written: &WriteOutcome,
    files: &[(&str, &std::path::Path)],
) -> Result<()> {
    let f = &report.facts;
    let target = &written.path;
    // The writer's own warnings (figures written as text, text cut to fit)
    // are rows of the Problems sheet too: the counts printed are the sheet's.
    let from_writer = [&written.text_figure_problem, &written.cut_text_problem];
    let count = |s: Severity| {
        report.problems.iter().filter(|p| p.severity == s).count()
            + from_writer
                .iter()
                .filter(|p| p.as_ref().is_some_and(|p| p.severity == s))
                .count()
    };
    writeln!(
        out,
        "cut-off {}, window {}..{}",
        f.cutoff, f.window_start, f.cutoff
    )?;
    // Read = computed + left out; where they were left out, when any were.
    let split = if f.accounts_not_computed() > 0 {
        format!(
            " ({} in the books, {} in the computation)",
            f.accounts_left_out, f.accounts_failed
        )
    } else {
        String::new()
    };
    writeln!(
        out,
        "accounts: {} read, {} computed, {} left out by errors{split}",
        f.accounts_read,
        f.accounts_computed,
        f.accounts_not_computed(),
    )?;
    print_left_out(out, report)?;
    if !report.totals.is_empty() {
        writeln!(
            out,
            "{:<8} {:<9} {:>8} {:>22} {:>18} {:>18} {:>20} {:>18}",
            "currency",
            "side",
            "accounts",
            "balance at cut-off",
            "accrued at cut-off",
            "posted in window",
            "interest for window",
            "prior-period adj."
        )?;
        for t in &report.totals {
            let m = |x: Decimal| {
                let mut r = x;
                if r.scale() < t.minor_units {
                    r.rescale(t.minor_units);
                }
                r
            };
            writeln!(
                out,
                "{:<8} {:<9} {:>8} {:>22} {:>18} {:>18} {:>20} {:>18}",
                t.currency,
                t.side,
                t.accounts,
                m(t.balance_at_cutoff),
                m(t.accrued_at_cutoff),
                m(t.posted_in_window),
                m(t.interest_for_window),
                m(t.prior_period)
            )?;
        }
    }
    if !report.status_counts.is_empty() {
        let counts: Vec<String> = report
            .status_counts
            .iter()
            .map(|c| format!("{} {}", c.rows, c.status.name()))
            .collect();
        writeln!(out, "statement rows: {}", counts.join(", "))?;
    }
    if !report.accrued_check.is_empty() {
        let mut counts = crate::batch::totals::StatusCounts::default();
        for row in &report.accrued_check {
            counts.add(row.status);
        }
        let counts: Vec<String> = counts
            .rows()
            .iter()
            .map(|c| format!("{} {}", c.rows, c.status.name()))
            .collect();
        writeln!(out, "accrued check: {}", counts.join(", "))?;
    }
    if let Some(lines) = &report.tie_out {
        let statuses: Vec<_> = lines.iter().map(|l| l.status).collect();
        writeln!(
            out,
            "tie-out: {}",
            crate::report::workbook::tie_out_words(&statuses)
        )?;
    }
    writeln!(
        out,
        "problems: {}, {}, {} (all listed on the Problems sheet)",
        counted(count(Severity::Error), "error"),
        counted(count(Severity::Warning), "warning"),
        counted(count(Severity::Note), "note")
    )?;
    print_errors(out, &report.problems)?;
    writeln!(out, "workbook: {}", target.display())?;
    for (what, path) in files {
        writeln!(out, "{what}: {}", path.display())?;
    }
    writeln!(out, "review these figures against the contract terms and the applicable standards before booking them")?;
    Ok(())
}

/// The first accounts left out, each with the error that kept it out, then
/// how many more (every one is on the Problems sheet and counted above).
fn print_left_out(out: &mut dyn Write, report: &Report) -> Result<()> {
    let total = report.facts.accounts_not_computed();
    if total == 0 {
        return Ok(());
    }
    writeln!(out, "left out:")?;
    let shown: Vec<_> = report.left_out.iter().take(LEFT_OUT_SHOWN).collect();
    for l in &shown {
        writeln!(out, "  {l}")?;
    }
    let more = total.saturating_sub(shown.len());
    if more > 0 {
        writeln!(
            out,
            "  ... and {more} more (each an error row of the Problems sheet, with its id in the Account column)"
        )?;
    }
    Ok(())
}

/// How many lines of errors the summary prints; the rest are on the
/// Problems sheet.
const ERROR_LINES_SHOWN: usize = 10;

/// The first errors, root causes first and the accounts that only follow
/// from one folded into one line, then how many more there are.
fn print_errors(out: &mut dyn Write, problems: &[Problem]) -> Result<()> {
    let errors: Vec<&Problem> = problems
        .iter()
        .filter(|p| p.severity == Severity::Error)
        .collect();
    let lines = by_cause(&errors);
    for line in lines.iter().take(ERROR_LINES_SHOWN) {
        writeln!(out, "  {line}")?;
    }
    let more: usize = lines.iter().skip(ERROR_LINES_SHOWN).map(|l| l.len()).sum();
    if more > 0 {
        writeln!(out, "  ... and {} more", counted(more, "error"))?;
    }
    Ok(())
}
