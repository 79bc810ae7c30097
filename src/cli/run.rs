//! `ledgerate run BOOK... --cutoff DATE`: the month-end accrual run. Reads
//! the books, accrues every account in parallel, writes the workbook and
//! prints a short summary.

use std::io::{IsTerminal, Write};
use std::path::PathBuf;

use anyhow::{anyhow, bail, Context, Result};
use chrono::NaiveDateTime;

use super::inputs::{check_books_exist, check_output_is_not_an_input, fingerprint};
use super::settings::{self, month_start, Settings};
use super::{exit, read_books, refuse_unreadable, BookArgs};
use crate::batch::journal::JournalStyle;
use crate::batch::{run_books, BatchSettings};
use crate::engine::floating::FixingFallback;
use crate::engine::reconcile::Tolerance;
use crate::problem::{Problem, Severity};
use crate::report::model::{Report, RunFacts, SettingSource};
use rust_decimal::Decimal;

/// Arguments of `run`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    books: BookArgs,
    /// C, the cut-off: the last day computed (else the Settings sheet's cutoff).
    #[arg(long, value_name = "DATE")]
    cutoff: Option<String>,
    /// F, the first day of the window (default: the first day of the cut-off's month).
    #[arg(long, value_name = "DATE")]
    window_start: Option<String>,
    /// Where to write the workbook (default: accruals-CUTOFF.xlsx here).
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
    /// Add the Daily sheet: one row per account and day.
    #[arg(long)]
    daily: bool,
    /// Pin the run time written in the workbook (YYYY-MM-DDTHH:MM:SS), for audits and tests.
    #[arg(long, value_name = "TIMESTAMP")]
    fixed_time: Option<String>,
    /// Worker threads (default: one per core). Does not change any figure.
    #[arg(long, value_name = "N")]
    threads: Option<usize>,
    /// The entity booking the journal (else the Settings sheet's entity, else "default").
    #[arg(long, value_name = "NAME")]
    entity: Option<String>,
    /// How the journal books accruals: incremental or reversing.
    #[arg(long, value_name = "STYLE")]
    journal_style: Option<String>,
    #[command(flatten)]
    tolerance: ToleranceArgs,
    /// Exit with status 3 when any statement row is outside tolerance (for scheduled runs).
    #[arg(long)]
    fail_on_variance: bool,
    /// Accrue every day one by one (the same figures, slower), for audits.
    #[arg(long)]
    no_fast_path: bool,
    /// Print how long reading, accruing and writing took, on standard error
    /// (never in the workbook, which stays the same from run to run).
    #[arg(long)]
    timings: bool,
    /// Only the accounts of shard K of N (K from 1), for a run split across
    /// machines; combine the shard workbooks with `ledgerate merge`.
    #[arg(long, value_name = "K/N")]
    shard: Option<String>,
    /// A missing index fixing: none (an error on the account, the default) or
    /// last (use the last published fixing, with a warning).
    #[arg(long, value_name = "FALLBACK")]
    fixing_fallback: Option<String>,
}

/// Parses `K/N` with 1 <= K <= N.
fn parse_shard(s: &str) -> Result<(u32, u32)> {
    let bad =
        || anyhow!("--shard '{s}' is not K/N: write it like 2/8 (shard 2 of 8, counting from 1)");
    let (k, n) = s.split_once('/').ok_or_else(bad)?;
    let (k, n): (u32, u32) = (
        k.trim().parse().map_err(|_| bad())?,
        n.trim().parse().map_err(|_| bad())?,
    );
    if k == 0 || n == 0 || k > n {
        return Err(bad());
    }
    Ok((k, n))
}

/// The `--fixing-fallback` in force, recorded for the Run sheet.
pub(crate) fn fixing_fallback(
    given: Option<&str>,
    listed: &mut Settings,
) -> Result<FixingFallback> {
    let fallback = match given {
        Some(v) => FixingFallback::parse(v).map_err(|e| anyhow!("--fixing-fallback: {e}"))?,
        None => FixingFallback::None,
    };
    listed.record(
        "fixing_fallback",
        &settings::Resolved {
            value: fallback.name(),
            source: if given.is_some() {
                crate::report::model::SettingSource::Option
            } else {
                crate::report::model::SettingSource::Default
            },
        },
    );
    Ok(fallback)
}

/// Reconciliation tolerances.
#[derive(Debug, clap::Args)]
pub struct ToleranceArgs {
    /// Variance accepted, in units of each row's currency (default: one minor unit).
    #[arg(long, value_name = "AMOUNT", allow_hyphen_values = true)]
    pub tolerance_amount: Option<String>,
    /// Variance accepted as an annual rate gap in basis points (default: 0).
    #[arg(long, value_name = "BP", allow_hyphen_values = true)]
    pub tolerance_bp: Option<String>,
}

/// The tolerances in force, recorded for the Run sheet.
pub(crate) fn tolerance(
    books: &[crate::book::Book],
    args: &ToleranceArgs,
    listed: &mut Settings,
) -> Result<Tolerance> {
    let parse = |what: &str, v: &str| -> Result<Decimal> {
        let d: Decimal = v
            .trim()
            .parse()
            .map_err(|_| anyhow!("{what} '{v}' is not a decimal number: write it like 0.05"))?;
        if d.is_sign_negative() {
            bail!("{what} '{v}' is negative: a tolerance is a size, write it without a sign");
        }
        Ok(d)
    };
    let amount = settings::text(
        books,
        "tolerance_amount",
        args.tolerance_amount.as_deref(),
        "",
    )?;
    let bp = settings::text(books, "tolerance_bp", args.tolerance_bp.as_deref(), "0")?;
    let tol = Tolerance {
        amount: if amount.value.is_empty() {
            None
        } else {
            Some(parse("the tolerance amount", &amount.value)?)
        },
        bp: parse("the tolerance in basis points", &bp.value)?,
    };
    let shown = settings::Resolved {
        value: if amount.value.is_empty() {
            "one minor unit of each row's currency".to_string()
        } else {
            amount.value.clone()
        },
        source: amount.source,
    };
    listed.record("tolerance_amount", &shown);
    listed.record("tolerance_bp", &bp);
    Ok(tol)
}

/// A yes/no option: on only from the command line.
fn switch(on: bool) -> settings::Resolved<bool> {
    settings::Resolved {
        value: on,
        source: if on {
            crate::report::model::SettingSource::Option
        } else {
            crate::report::model::SettingSource::Default
        },
    }
}

/// How the books' Statements sheets write a period's end, as the reader
/// applied it. Each book has its own setting, so books may differ; the Run
/// sheet then names each book's.
fn statement_end(books: &[crate::book::Book]) -> settings::Resolved<String> {
    let of = |b: &crate::book::Book| {
        b.settings
            .iter()
            .find(|s| s.name == "statementend")
            .map(|s| s.value.to_ascii_lowercase())
    };
    let given: Vec<Option<String>> = books.iter().map(of).collect();
    let source = if given.iter().any(Option::is_some) {
        crate::report::model::SettingSource::Book
    } else {
        crate::report::model::SettingSource::Default
    };
    let values: Vec<String> = given
        .into_iter()
        .map(|v| v.unwrap_or_else(|| "inclusive".to_string()))
        .collect();
    let value = match values.first() {
        Some(first) if values.iter().all(|v| v == first) => first.clone(),
        None => "inclusive".to_string(),
        Some(_) => books
            .iter()
            .zip(&values)
            .map(|(b, v)| format!("{}: {v}", b.path.display()))
            .collect::<Vec<_>>()
            .join("; "),
    };
    settings::Resolved { value, source }
}

/// The command line as the Run sheet shows it: without the options that
/// cannot change a figure (threads, output path).
fn audited_command_line() -> String {
    let mut out = Vec::new();
    let mut skip_next = false;
    for a in std::env::args().skip(1) {
        if skip_next {
            skip_next = false;
            continue;
        }
        // Options that cannot change a figure stay out of the audit trail.
        if a == "--no-fast-path" || a == "--timings" {
            continue;
        }
        if a == "--threads" || a == "--out" {
            skip_next = true;
            continue;
        }
        if a.starts_with("--threads=") || a.starts_with("--out=") {
            continue;
        }
        out.push(if a.contains(' ') {
            format!("\"{a}\"")
        } else {
            a
        });
    }
    format!("ledgerate {}", out.join(" "))
}

pub(crate) fn run_time(fixed: Option<&str>) -> Result<NaiveDateTime> {
    match fixed {
        Some(t) => NaiveDateTime::parse_from_str(t, "%Y-%m-%dT%H:%M:%S")
            .or_else(|_| NaiveDateTime::parse_from_str(&format!("{t}T00:00:00"), "%Y-%m-%dT%H:%M:%S"))
            .map_err(|_| anyhow!("--fixed-time '{t}' is not a timestamp: write it as YYYY-MM-DDTHH:MM:SS, for example 2026-12-01T09:00:00")),
        // Whole seconds: the workbook has no finer time.
        None => Ok(chrono::Local::now().naive_local().with_nanosecond_zero()),
    }
}

trait NoNanos {
    fn with_nanosecond_zero(self) -> Self;
}

impl NoNanos for NaiveDateTime {
    fn with_nanosecond_zero(self) -> Self {
        use chrono::Timelike;
        self.with_nanosecond(0).unwrap_or(self)
    }
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_books_exist(&args.books.books)?;
    let mut clock = Timings::start(args.timings);
    let books = read_books(&args.books)?;
    clock.lap("read and check the books");
    refuse_unreadable(&books)?;
    let cutoff =
        settings::date(&books, "cutoff", args.cutoff.as_deref(), None)?.ok_or_else(|| {
            anyhow!(
                "no cut-off: give --cutoff YYYY-MM-DD (or a cutoff row on a book's Settings sheet)"
            )
        })?;
    let window = settings::date(
        &books,
        "window_start",
        args.window_start.as_deref(),
        Some(month_start(cutoff.value)),
    )?
    .ok_or_else(|| anyhow!("no window start"))?;
    if window.value > cutoff.value {
        bail!(
            "the window starts on {} after the cut-off {}: the window must end on the cut-off",
            window.value,
            cutoff.value
        );
    }
    let style = settings::text(
        &books,
        "journal_style",
        args.journal_style.as_deref(),
        "incremental",
    )?;
    let journal_style = JournalStyle::parse(&style.value).map_err(|e| anyhow!("{e}"))?;
    // Each book books its own entity (its Settings sheet), unless --entity names one for all.
    let entities: Vec<settings::Resolved<String>> = books
        .iter()
        .map(
            |b| match (&args.entity, b.settings.iter().find(|s| s.name == "entity")) {
                (Some(e), _) => settings::Resolved {
                    value: e.clone(),
                    source: SettingSource::Option,
                },
                (None, Some(s)) => settings::Resolved {
                    value: s.value.clone(),
                    source: SettingSource::Book,
                },
                (None, None) => settings::Resolved {
                    value: "default".to_string(),
                    source: SettingSource::Default,
                },
            },
        )
        .collect();
    let mut listed = Settings::default();
    listed.record("cutoff", &cutoff);
    listed.record("window_start", &window);
    for (b, e) in books.iter().zip(&entities) {
        let name = if books.len() == 1 {
            "entity".to_string()
        } else {
            format!("entity of {}", b.path.display())
        };
        listed.record(&name, e);
    }
    listed.record("journal_style", &style);
    listed.record("daily", &switch(args.daily));
    listed.record("decimal_comma", &switch(args.books.decimal_comma));

    listed.record("statement_end", &statement_end(&books));
    listed.record("fail_on_variance", &switch(args.fail_on_variance));

    let tolerance = tolerance(&books, &args.tolerance, &mut listed)?;
    let shard = args.shard.as_deref().map(parse_shard).transpose()?;
    if let Some((k, n)) = shard {
        listed.record(
            "shard",
            &settings::Resolved {
                value: format!("{k}/{n}"),
                source: SettingSource::Option,
            },
        );
    }
    let fixing_fallback = fixing_fallback(args.fixing_fallback.as_deref(), &mut listed)?;
    let target = args
        .out
        .clone()
        .unwrap_or_else(|| PathBuf::from(format!("accruals-{}.xlsx", cutoff.value)));
    check_output_is_not_an_input(&target, &args.books.books)?;
    let run_time = run_time(args.fixed_time.as_deref())?;
    let inputs = args
        .books
        .books
        .iter()
        .map(|b| fingerprint(b))
        .collect::<Result<Vec<_>>>()?;
    clock.lap("fingerprint the inputs");

    let batch_settings = BatchSettings {
        cutoff: cutoff.value,
        window_start: window.value,
        daily: args.daily,
        journal_style,
        entities: entities.into_iter().map(|e| e.value).collect(),
        tolerance,
        fast_path: !args.no_fast_path,
        shard,
        fixing_fallback,
    };
    let total: usize = books.iter().map(|b| b.accounts.len()).sum();
    let bar = progress_bar(total);
    let tick = || bar.inc(1);
    let batch = match args.threads {
        Some(n) => {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(n.max(1))
                .build()
                .context("cannot start the worker threads")?;
            pool.install(|| run_books(&books, &batch_settings, &tick))
        }
        None => run_books(&books, &batch_settings, &tick),
    };
    bar.finish_and_clear();
    clock.lap("accrue and reconcile");

    let mut problems: Vec<Problem> = books
        .iter()
        .flat_map(|b| b.problems.iter().cloned())
        .collect();
    problems.extend(batch.problems.iter().cloned());
    let book_names: Vec<String> = books.iter().map(|b| b.path.display().to_string()).collect();
    crate::problem::sort_problems(&mut problems, &book_names);
    let failed = batch.accounts_read.saturating_sub(batch.accounts_computed);
    let report = Report {
        facts: RunFacts {
            program: format!("ledgerate {}", env!("CARGO_PKG_VERSION")),
            command_line: audited_command_line(),
            inputs,
            settings: listed.listed,
            run_time,
            cutoff: cutoff.value,
            window_start: window.value,
            accounts_read: batch.accounts_read,
            accounts_computed: batch.accounts_computed,
            accounts_failed: failed,
        },
        totals: batch.totals.clone(),
        accruals: batch.accruals,
        reconciliation: batch.reconciliation,
        status_counts: batch.status_counts,
        journal: batch.journal,
        daily: batch.daily,
        problems,
    };
    crate::report::write_report(&report, &target)
        .with_context(|| format!("cannot write the workbook {}", target.display()))?;
    clock.lap("write the workbook");
    clock.report();
    print_summary(out, &report, &target)?;
    let outside = report
        .reconciliation
        .iter()
        .any(|l| l.status.outside_tolerance());
    Ok(
        if report
            .problems
            .iter()
            .any(|p| p.severity == Severity::Error)
        {
            exit::ACCOUNT_ERRORS
        } else if args.fail_on_variance && outside {
            exit::VARIANCE
        } else {
            exit::OK
        },
    )
}

/// Wall-clock time of each step of a run, for `--timings`.
struct Timings {
    on: bool,
    last: std::time::Instant,
    laps: Vec<(&'static str, std::time::Duration)>,
}

impl Timings {
    fn start(on: bool) -> Timings {
        Timings {
            on,
            last: std::time::Instant::now(),
            laps: Vec::new(),
        }
    }

    fn lap(&mut self, step: &'static str) {
        let now = std::time::Instant::now();
        self.laps.push((step, now - self.last));
        self.last = now;
    }

    /// One line per step on standard error, then the total.
    fn report(&self) {
        if !self.on {
            return;
        }
        let total: std::time::Duration = self.laps.iter().map(|(_, d)| *d).sum();
        for (step, d) in &self.laps {
            eprintln!("timings: {step:<26} {:>9.3} s", d.as_secs_f64());
        }
        eprintln!("timings: {:<26} {:>9.3} s", "total", total.as_secs_f64());
    }
}

fn progress_bar(total: usize) -> indicatif::ProgressBar {
    // Only a long run on a terminal earns a bar; indicatif hides itself off a terminal too.
    if total < 20_000 || !std::io::stderr().is_terminal() {
        return indicatif::ProgressBar::hidden();
    }
    let bar = indicatif::ProgressBar::new(total as u64);
    if let Ok(style) = indicatif::ProgressStyle::with_template(
        "accruing {bar:40} {pos}/{len} accounts, {eta} left",
    ) {
        bar.set_style(style);
    }
    bar
}

/// The plain-text summary on standard output.
pub(crate) fn print_summary(
    out: &mut dyn Write,
    report: &Report,
    target: &std::path::Path,
) -> Result<()> {
    let f = &report.facts;
    let count = |s: Severity| report.problems.iter().filter(|p| p.severity == s).count();
    writeln!(
        out,
        "cut-off {}, window {}..{}",
        f.cutoff, f.window_start, f.cutoff
    )?;
    writeln!(
        out,
        "accounts: {} read, {} computed, {} left out by errors",
        f.accounts_read, f.accounts_computed, f.accounts_failed
    )?;
    if !report.totals.is_empty() {
        writeln!(
            out,
            "{:<8} {:>8} {:>22} {:>18} {:>18} {:>20}",
            "currency",
            "accounts",
            "balance at cut-off",
            "accrued at cut-off",
            "posted in window",
            "interest for window"
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
                "{:<8} {:>8} {:>22} {:>18} {:>18} {:>20}",
                t.currency,
                t.accounts,
                m(t.balance_at_cutoff),
                m(t.accrued_at_cutoff),
                m(t.posted_in_window),
                m(t.interest_for_window)
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
    writeln!(
        out,
        "problems: {} errors, {} warnings, {} notes (all listed on the Problems sheet)",
        count(Severity::Error),
        count(Severity::Warning),
        count(Severity::Note)
    )?;
    for p in report
        .problems
        .iter()
        .filter(|p| p.severity == Severity::Error)
        .take(10)
    {
        writeln!(out, "  {p}")?;
    }
    if count(Severity::Error) > 10 {
        writeln!(out, "  ... and {} more errors", count(Severity::Error) - 10)?;
    }
    writeln!(out, "workbook: {}", target.display())?;
    writeln!(out, "review these figures against the contract terms and the applicable standards before booking them")?;
    Ok(())
}
