//! `ledgerate run BOOK... --cutoff DATE`: the month-end accrual run. Reads
//! the books, accrues every account in parallel, writes the workbook and
//! prints a short summary. While it works, a terminal on standard error
//! shows which step it is in (see [`super::progress`]).

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{anyhow, Context, Result};
use chrono::NaiveDateTime;

use super::inputs::{
    check_books_exist, check_other_output, check_output_is_not_an_input, fingerprint, known_to_run,
};
use super::settings::{Given, KnowledgeArgs, Settings, ToleranceArgs};
use super::summary::print_summary;
use super::{exit, progress, read_books_showing, refuse_unreadable, run_time, BookArgs};
use crate::batch::totals::{largest_variances, LARGEST_PER_CURRENCY};
use crate::batch::{line_shapes, run_books, run_books_releasing, BatchResult};
use crate::book::Book;
use crate::problem::{Problem, Severity};
use crate::report::journal_csv::{self, DetailOutput};
use crate::report::layout::{Limits, Styles};
use crate::report::model::{AccrualLine, InputFile, JournalDetail, Report, RunFacts};
use crate::report::workbook::{AccrualsPlan, Writer};
use crate::report::ReportError;

/// Arguments of `run`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    books: BookArgs,
    /// The cut-off date: the last day computed (else the Settings sheet's cutoff).
    #[arg(long, value_name = "DATE")]
    cutoff: Option<String>,
    /// The first day of the window (default: the first day of the cut-off's month).
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
    /// Where the Journal detail (each journal line's accounts and amounts)
    /// goes: sheet (after Journal), csv (a file beside the workbook, for
    /// very large runs) or none.
    #[arg(long, value_name = "WHERE")]
    journal_detail: Option<String>,
    /// Also write the journal lines to FILE as CSV, for a general-ledger upload.
    #[arg(long, value_name = "FILE")]
    journal_csv: Option<PathBuf>,
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
    #[command(flatten)]
    knowledge: KnowledgeArgs,
    /// When the journal settles a posting: payment-date (the default),
    /// in-window or period-end (else the Settings sheet's settlement_lines).
    #[arg(long, value_name = "WORD")]
    settlement_lines: Option<String>,
}

impl Args {
    /// What the options give for the settings.
    fn given(&self) -> Given<'_> {
        Given {
            cutoff: self.cutoff.as_deref(),
            window_start: self.window_start.as_deref(),
            entity: self.entity.as_deref(),
            journal_style: self.journal_style.as_deref(),
            journal_detail: self.journal_detail.as_deref(),
            fixing_fallback: self.fixing_fallback.as_deref(),
            settlement_lines: self.settlement_lines.as_deref(),
            shard: self.shard.as_deref(),
            daily: self.daily,
            decimal_comma: self.books.decimal_comma,
            fail_on_variance: self.fail_on_variance,
            no_fast_path: self.no_fast_path,
            ..Given::default()
        }
        .with_tolerance(&self.tolerance)
        .with_knowledge(&self.knowledge)
    }
}

/// The command line as the Run sheet shows it: without the options that
/// cannot change a figure (threads, output paths).
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
        if a == "--threads" || a == "--out" || a == "--journal-csv" {
            skip_next = true;
            continue;
        }
        if a.starts_with("--threads=") || a.starts_with("--out=") || a.starts_with("--journal-csv=")
        {
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

/// Runs the command: every step (reading, accruing, writing) on the run's
/// worker threads, `--threads` of them when given.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    let mut summary = Vec::new();
    let status = in_pool(args.threads, || run_steps(args, &mut summary))??;
    out.write_all(&summary)?;
    Ok(status)
}

/// The run's steps, on the current pool of worker threads; the printed
/// summary goes to `out`.
fn run_steps(args: &Args, out: &mut (dyn Write + Send)) -> Result<u8> {
    check_books_exist(&args.books.books)?;
    let mut clock = Timings::start(args.timings);
    let reading = progress::step("reading the books");
    let mut books = read_books_showing(&args.books, &reading)?;
    reading.finish_and_clear();
    clock.lap("read and check the books");
    refuse_unreadable(&books)?;
    let settings = Settings::resolve(&books, &args.given())?.ok_or_else(|| {
        anyhow!("no cut-off: give --cutoff YYYY-MM-DD (or a cutoff row on a book's Settings sheet)")
    })?;
    known_to_run(&mut books, &settings);
    let target = args
        .out
        .clone()
        .unwrap_or_else(|| PathBuf::from(format!("accruals-{}.xlsx", settings.cutoff)));
    check_output_is_not_an_input(&target, &args.books.books)?;
    let files = Files::of(
        &target,
        &settings,
        args.journal_csv.as_deref(),
        &args.books.books,
    )?;
    let run_time = run_time(args.fixed_time.as_deref())?;
    let fingerprinting = progress::step("fingerprinting the books (SHA-256)");
    let inputs = args
        .books
        .books
        .iter()
        .map(|b| fingerprint(b))
        .collect::<Result<Vec<_>>>()?;
    fingerprinting.finish_and_clear();
    clock.lap("fingerprint the inputs");

    // The Accruals are written while the accounts are accrued: each part's
    // lines go to the writer's thread as the batch adds them up, and the
    // rest of the workbook follows once the batch is done.
    let fail_on_variance = settings.fail_on_variance;
    let detail_output = settings.journal_detail;
    let facts = facts(&settings, inputs, run_time);
    let styles = Styles::report();
    let limits = Limits::default();
    let mut plan = AccrualsPlan::new(&limits);
    for shape in line_shapes(&books, &settings.batch()) {
        plan.add(shape);
    }
    let cannot_write = || format!("cannot write the workbook {}", target.display());
    let writer =
        Writer::start(&target, &facts, plan, &styles, &limits).with_context(cannot_write)?;
    // The batch takes the books' movements and statement rows, dropping each
    // account's once it is accrued.
    let (batch, writer) = accrue_writing(&mut books, &settings, writer)?;
    let batch = batch.with_context(cannot_write)?;
    clock.lap("accrue and reconcile (Accruals written alongside)");

    let (mut report, mut csv_detail) =
        assemble(&books, batch, facts.clone(), detail_output, &files);
    // The report holds all the rest of the workbook needs.
    drop(books);
    let writing = progress::step(format!("writing the workbook {}", target.display()));
    let mut last_step = "write the rest of the workbook";
    let written = match writer.finish(&report) {
        Err(ReportError::PlanMissed(_)) => {
            // Some account's computation stopped and changed the Accruals'
            // layout decided before the run: read the books again, accrue
            // again keeping every line, and write the workbook from them all
            // at once.
            writing.finish_and_clear();
            let books = read_again(&args.books, &settings, &facts.inputs)?;
            let batch = accrue(&books, &settings);
            clock.lap("accrue again (layout changed)");
            (report, csv_detail) = assemble(&books, batch, facts, detail_output, &files);
            last_step = "write the workbook";
            let writing = progress::step(format!("writing the workbook {}", target.display()));
            let written = crate::report::write_report(&report, &target);
            writing.finish_and_clear();
            written
        }
        other => other,
    }
    .with_context(cannot_write)?;
    writing.finish_and_clear();
    let written_files = files.write(&report, csv_detail.as_ref())?;
    clock.lap(last_step);
    clock.report();
    print_summary(out, &report, &written, &written_files)?;
    Ok(exit_status(&report, fail_on_variance))
}

/// The workbook's report from the batch's figures: the Journal detail on
/// its sheet, or returned for its CSV file, or left out, and the warnings
/// of the files beside the workbook.
fn assemble(
    books: &[Book],
    mut batch: BatchResult,
    facts: RunFacts,
    detail_output: DetailOutput,
    files: &Files,
) -> (Report, Option<JournalDetail>) {
    let detail = batch.journal_detail.take();
    let (sheet_detail, csv_detail) = match detail_output {
        DetailOutput::Sheet => (detail, None),
        DetailOutput::Csv => (None, detail),
        DetailOutput::None => (None, None),
    };
    let mut report = report(books, batch, facts);
    report.journal_detail = sheet_detail;
    files.note_guarded_cells(&mut report, csv_detail.as_ref());
    (report, csv_detail)
}

/// The CSV files a run or a merge writes beside its workbook: the Journal
/// detail (`--journal-detail csv`) and the import file (`--journal-csv`).
pub(super) struct Files {
    /// The Journal detail file, when the detail goes to one.
    pub(super) detail: Option<PathBuf>,
    /// The import file.
    pub(super) journal: Option<PathBuf>,
}

impl Files {
    /// The files of a run writing `workbook`, each checked to be none of
    /// the `books` and not another output (status 2 otherwise).
    pub(super) fn of(
        workbook: &Path,
        settings: &Settings,
        journal: Option<&Path>,
        books: &[PathBuf],
    ) -> Result<Files> {
        Files::beside(workbook, settings.journal_detail, journal, books)
    }

    /// As [`Files::of`], for a detail that goes to `detail`.
    pub(super) fn beside(
        workbook: &Path,
        detail: DetailOutput,
        journal: Option<&Path>,
        books: &[PathBuf],
    ) -> Result<Files> {
        let detail = (detail == DetailOutput::Csv).then(|| journal_csv::detail_csv_path(workbook));
        if let Some(d) = &detail {
            check_other_output(
                d,
                "the Journal detail file",
                "choose another --out path (the detail file is named after the workbook)",
                &[("the workbook", workbook)],
                books,
            )?;
            journal_csv::check_target(d)
                .with_context(|| format!("cannot write the Journal detail file {}", d.display()))?;
        }
        if let Some(j) = journal {
            let mut others = vec![("the workbook (--out)", workbook)];
            if let Some(d) = &detail {
                others.push(("the Journal detail file", d.as_path()));
            }
            check_other_output(
                j,
                "the --journal-csv file",
                "give --journal-csv a path of its own",
                &others,
                books,
            )?;
            journal_csv::check_target(j)
                .with_context(|| format!("cannot write the journal CSV file {}", j.display()))?;
        }
        Ok(Files {
            detail,
            journal: journal.map(Path::to_path_buf),
        })
    }

    /// Adds to the report's problems one warning per file whose cells a
    /// spreadsheet would take for a formula (written with an apostrophe),
    /// in the order every report lists problems.
    pub(super) fn note_guarded_cells(&self, report: &mut Report, detail: Option<&JournalDetail>) {
        let mut notes = Vec::new();
        if let (Some(path), Some(d)) = (&self.detail, detail) {
            notes.extend(journal_csv::guard_note(
                path,
                &journal_csv::guarded_in_detail(d),
            ));
        }
        if let Some(path) = &self.journal {
            notes.extend(journal_csv::guard_note(
                path,
                &journal_csv::guarded_in_journal(&report.journal),
            ));
        }
        if notes.is_empty() {
            return;
        }
        report.problems.extend(notes);
        let names: Vec<String> = report.facts.inputs.iter().map(|i| i.path.clone()).collect();
        crate::problem::sort_problems(&mut report.problems, &names);
    }

    /// Writes the files (the detail when there is one to write); returns
    /// what was written, for the printed summary.
    pub(super) fn write<'f>(
        &'f self,
        report: &Report,
        detail: Option<&JournalDetail>,
    ) -> Result<Vec<(&'static str, &'f Path)>> {
        let mut written = Vec::new();
        if let (Some(path), Some(d)) = (&self.detail, detail) {
            let writing = progress::step(format!("writing the Journal detail {}", path.display()));
            journal_csv::write_detail_csv(d, path, &report.facts.inputs).with_context(|| {
                format!("cannot write the Journal detail file {}", path.display())
            })?;
            writing.finish_and_clear();
            written.push(("journal detail", path.as_path()));
        }
        if let Some(path) = &self.journal {
            journal_csv::write_journal_csv(&report.journal, path, &report.facts.inputs)
                .with_context(|| format!("cannot write the journal CSV file {}", path.display()))?;
            written.push(("journal CSV", path.as_path()));
        }
        Ok(written)
    }
}

/// Parts of Accruals lines waiting for the writer at most: the batch
/// goes on accruing while the writer catches up, and memory stays bounded.
const PARTS_IN_FLIGHT: usize = 2;

/// Every account accrued on the current pool's worker threads, with a
/// progress bar on a terminal for a long run.
fn accrue(books: &[Book], settings: &Settings) -> BatchResult {
    let batch_settings = settings.batch();
    let total: usize = books.iter().map(|b| b.accounts.len()).sum();
    let bar = progress::accruing(total);
    let tick = || bar.inc(1);
    let batch = run_books(books, &batch_settings, &tick);
    bar.finish_and_clear();
    batch
}

/// As [`accrue`], handing each part's Accruals lines to `writer` on a
/// thread of its own as the batch adds them up (in book order); returns
/// the batch (without its lines) and the writer, or the writer's error.
fn accrue_writing<'s>(
    books: &mut [Book],
    settings: &Settings,
    mut writer: Writer<'s>,
) -> Result<(Result<BatchResult, ReportError>, Writer<'s>)> {
    let batch_settings = settings.batch();
    let total: usize = books.iter().map(|b| b.accounts.len()).sum();
    let bar = progress::accruing(total);
    let tick = || bar.inc(1);
    let (batch, writer) = std::thread::scope(|scope| {
        let (send, receive) = std::sync::mpsc::sync_channel::<Vec<AccrualLine>>(PARTS_IN_FLIGHT);
        let writing = scope.spawn(move || {
            let mut stopped = None;
            for lines in receive {
                // After an error the writer takes no more lines; the batch
                // still finishes, and the error is returned.
                if stopped.is_none() {
                    stopped = writer.accruals(&lines).err();
                }
            }
            (stopped, writer)
        });
        let mut hand_on = move |lines: Vec<AccrualLine>| {
            // Only fails once the writer's thread is gone, which the join reports.
            let _ = send.send(lines);
        };
        let batch = run_books_releasing(books, &batch_settings, &tick, &mut hand_on);
        drop(hand_on);
        let written = writing
            .join()
            .map_err(|_| anyhow!("the workbook writer stopped unexpectedly"));
        (batch, written)
    });
    bar.finish_and_clear();
    let (stopped, writer) = writer?;
    Ok((stopped.map_or(Ok(batch), Err), writer))
}

/// The books read again as the run first read them, for a second batch
/// (the first took their movements and statement rows); an error when an
/// input no longer has the fingerprint the workbook records.
fn read_again(args: &BookArgs, settings: &Settings, inputs: &[InputFile]) -> Result<Vec<Book>> {
    let reading = progress::step("reading the books again");
    let mut books = read_books_showing(args, &reading)?;
    reading.finish_and_clear();
    for (path, first) in args.books.iter().zip(inputs) {
        if fingerprint(path)? != *first {
            return Err(anyhow!(
                "the book {} changed during the run: run again once it is no longer being changed",
                path.display()
            ));
        }
    }
    known_to_run(&mut books, settings);
    Ok(books)
}

/// `work` on a pool of `threads` worker threads, else on the default pool.
fn in_pool<T: Send>(threads: Option<usize>, work: impl FnOnce() -> T + Send) -> Result<T> {
    match threads {
        Some(n) => {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(n.max(1))
                .build()
                .context("cannot start the worker threads")?;
            Ok(pool.install(work))
        }
        None => Ok(work()),
    }
}

/// The run's facts before any account is accrued (the counts follow from
/// the batch, see [`report`]).
fn facts(settings: &Settings, inputs: Vec<InputFile>, run_time: NaiveDateTime) -> RunFacts {
    RunFacts {
        program: format!("ledgerate {}", env!("CARGO_PKG_VERSION")),
        command_line: audited_command_line(),
        inputs,
        settings: settings.listed.clone(),
        run_time,
        cutoff: settings.cutoff,
        window_start: settings.window_start,
        accounts_read: 0,
        accounts_computed: 0,
        accounts_left_out: 0,
        accounts_failed: 0,
    }
}

/// The workbook's report: the batch's rows, the books' problems and the
/// run's facts with the batch's counts.
fn report(books: &[Book], batch: BatchResult, facts: RunFacts) -> Report {
    let mut problems: Vec<Problem> = books
        .iter()
        .flat_map(|b| b.problems.iter().cloned())
        .collect();
    problems.extend(batch.problems);
    let book_names: Vec<String> = books.iter().map(|b| b.path.display().to_string()).collect();
    crate::problem::sort_problems(&mut problems, &book_names);
    Report {
        facts: RunFacts {
            accounts_read: batch.accounts_read,
            accounts_computed: batch.accounts_computed,
            accounts_left_out: batch.accounts_left_out,
            accounts_failed: batch.accounts_failed,
            ..facts
        },
        totals: batch.totals,
        left_out: batch.left_out,
        accruals: batch.accruals,
        largest_variances: largest_variances(&batch.reconciliation, LARGEST_PER_CURRENCY),
        reconciliation: batch.reconciliation,
        accrued_check: batch.accrued_check,
        tie_out: batch.tie_out,
        status_counts: batch.status_counts,
        journal: batch.journal,
        journal_detail: None,
        daily: batch.daily,
        problems,
    }
}

/// 1 when an account was left out by an error; else 3 with
/// `--fail-on-variance` when a statement row is outside tolerance; else 0.
fn exit_status(report: &Report, fail_on_variance: bool) -> u8 {
    if report
        .problems
        .iter()
        .any(|p| p.severity == Severity::Error)
    {
        exit::ACCOUNT_ERRORS
    } else if fail_on_variance
        && report
            .reconciliation
            .iter()
            .any(|l| l.status.outside_tolerance())
    {
        exit::VARIANCE
    } else {
        exit::OK
    }
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
        let width = self.laps.iter().map(|(s, _)| s.len()).max().unwrap_or(0);
        for (step, d) in &self.laps {
            eprintln!("timings: {step:<width$} {:>9.3} s", d.as_secs_f64());
        }
        eprintln!(
            "timings: {:<width$} {:>9.3} s",
            "total",
            total.as_secs_f64()
        );
    }
}
