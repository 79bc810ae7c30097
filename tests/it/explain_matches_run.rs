//! `explain` tells the month-end run's figures, never figures of its own:
//! for every account of every test book (the sample books, and the fixture
//! books a run accepts), the explanation's accrued interest at the cut-off,
//! its postings and its statement rows (expected, posted, variance, status)
//! equal the run's Accruals and Reconciliation rows, and its printed lines
//! show them; an account the run cannot compute cannot be explained either,
//! for the same reason.

use std::path::{Path, PathBuf};

use chrono::{Datelike, NaiveDate};
use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchResult, BatchSettings};
use ledgerate::book::{read_book, AccountEntry, Book, ReadOptions};
use ledgerate::engine::floating::FixingFallback;
use ledgerate::engine::reconcile::{Status, Tolerance};
use ledgerate::explain::{explain, fmt_amount, print, Explanation};
use ledgerate::pipeline::Options;
use ledgerate::problem::Severity;
use ledgerate::report::model::{AccrualLine, ReconciliationLine};
use rust_decimal::Decimal;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// The sample books, then every fixture book a run does not refuse as
/// unreadable (a folder named for its decimal comma is read with it).
fn test_books() -> Vec<Book> {
    let mut paths: Vec<PathBuf> = ["harbourview-2026-11.xlsx", "harbourview-2026-11-csv"]
        .iter()
        .map(|b| root().join("sample-books").join(b))
        .collect();
    let mut fixtures: Vec<PathBuf> = std::fs::read_dir(root().join("tests/fixtures/books"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    fixtures.sort();
    paths.extend(fixtures);
    paths
        .iter()
        .map(|p| {
            let name = p.file_name().unwrap().to_string_lossy();
            let options = ReadOptions {
                decimal_comma: name.contains("decimal_comma"),
            };
            read_book(p, &options)
        })
        .filter(|b| !b.unreadable())
        .collect()
}

/// A date setting of the book's Settings sheet, if it has a usable one.
fn setting(book: &Book, name: &str) -> Option<NaiveDate> {
    book.settings
        .iter()
        .find(|s| s.name == name)
        .and_then(|s| s.value.parse().ok())
}

/// The book's cut-off (its Settings sheet's, else the sample month's end)
/// and window start (its Settings sheet's, else the cut-off's month).
fn options(book: &Book) -> Options {
    let cutoff =
        setting(book, "cutoff").unwrap_or_else(|| NaiveDate::from_ymd_opt(2026, 11, 30).unwrap());
    let window_start = setting(book, "windowstart").unwrap_or_else(|| cutoff.with_day(1).unwrap());
    Options {
        window_start,
        cutoff,
        tolerance: Tolerance::default(),
        fixing_fallback: FixingFallback::None,
        keep_days: false,
        fast_path: true,
        previous_as_at: None,
        settlement_lines: Default::default(),
    }
}

fn batch(book: &Book, o: &Options) -> BatchResult {
    let settings = BatchSettings {
        cutoff: o.cutoff,
        window_start: o.window_start,
        daily: false,
        journal_style: JournalStyle::Incremental,
        journal_detail: false,
        entities: vec!["TEST".into()],
        tolerance: o.tolerance,
        fast_path: o.fast_path,
        shard: None,
        fixing_fallback: o.fixing_fallback,
        as_at: None,
        previous_as_at: o.previous_as_at,
        settlement_lines: o.settlement_lines,
    };
    run_books(std::slice::from_ref(book), &settings, &|| {})
}

/// The explanation's statement row for `line`'s period equals the run's.
fn same_row(x: &Explanation, line: &ReconciliationLine, what: &str) {
    let c = x
        .statements
        .iter()
        .find(|c| Some(c.row.start) == line.period_start && Some(c.row.end) == line.period_end)
        .unwrap_or_else(|| panic!("{what}: explain has no row for {line:?}"));
    let got = (
        c.row.expected,
        c.row.posted,
        c.row.variance,
        c.row.status.name().to_string(),
    );
    let want = (
        line.expected,
        line.posted,
        line.variance,
        line.status.name().to_string(),
    );
    assert_eq!(
        got, want,
        "{what}: {:?}..{:?}",
        line.period_start, line.period_end
    );
}

/// Every figure the explanation of the whole history shows against the run's rows.
fn compare(
    x: &Explanation,
    line: &AccrualLine,
    rows: &[&ReconciliationLine],
    o: &Options,
    what: &str,
) {
    assert_eq!(
        x.accrued_at_cutoff, line.accrued_at_cutoff,
        "{what}: accrued at cut-off"
    );
    // One explanation row per run row, in the run's order.
    let periods: Vec<(Option<NaiveDate>, Option<NaiveDate>)> = x
        .statements
        .iter()
        .map(|c| (Some(c.row.start), Some(c.row.end)))
        .collect();
    let run_periods: Vec<(Option<NaiveDate>, Option<NaiveDate>)> = rows
        .iter()
        .map(|l| (l.period_start, l.period_end))
        .collect();
    assert_eq!(periods, run_periods, "{what}: statement periods");
    for l in rows {
        same_row(x, l, what);
    }
    // Postings: what they post in the window adds up to the run's figure,
    // and a posting reconciled on its own period shows the run's expected
    // (and the statement's amount when one was given).
    let in_window =
        |p: &&ledgerate::engine::PostingRow| p.end >= o.window_start && p.end <= o.cutoff;
    let made = |p: &&ledgerate::engine::PostingRow| !x.not_made.contains(&(p.start, p.end));
    let posted: Decimal = x
        .postings
        .iter()
        .filter(in_window)
        .filter(made)
        .map(|p| p.posted)
        .sum();
    assert_eq!(posted, line.posted_in_window, "{what}: posted in window");
    for p in &x.postings {
        if let Some(l) = rows
            .iter()
            .find(|l| l.period_start == Some(p.start) && l.period_end == Some(p.end))
        {
            assert_eq!(
                p.expected, l.expected,
                "{what}: posting {}..{}",
                p.start, p.end
            );
            if p.actual_given {
                assert_eq!(p.posted, l.posted, "{what}: posting {}..{}", p.start, p.end);
            }
        }
    }
}

/// What explain prints shows the run's figures.
fn printed_lines_show(
    x: &Explanation,
    line: &AccrualLine,
    rows: &[&ReconciliationLine],
    what: &str,
) {
    let mut out = Vec::new();
    print(x, &mut out).unwrap();
    let text = String::from_utf8(out).unwrap();
    let places = line.minor_units;
    let accrued = format!(
        "accrued at cut-off {}\n",
        fmt_amount(line.accrued_at_cutoff, places)
    );
    assert!(text.contains(&accrued), "{what}: {text}");
    let ledger = format!(
        "interest for window {} (window days {} + prior-period {}); settled in window {}; open item at cut-off {}\n",
        fmt_amount(line.interest_for_window, places),
        fmt_amount(line.ledger.window_days_interest, places),
        fmt_amount(line.ledger.prior_period, places),
        fmt_amount(line.ledger.settled_in_window, places),
        fmt_amount(line.ledger.open_item, places)
    );
    assert!(text.contains(&ledger), "{what}: {text}");
    for c in &x.statements {
        let l = rows
            .iter()
            .find(|l| l.period_start == Some(c.row.start) && l.period_end == Some(c.row.end))
            .unwrap_or_else(|| panic!("{what}: the run has no row for {:?}", c.row));
        let shown = format!(
            "statement {}..{}: posted {}, expected {}, variance {} (",
            c.row.start,
            c.row.end,
            fmt_amount(l.posted, places),
            fmt_amount(l.expected, places),
            fmt_amount(l.variance, places)
        );
        let status = format!(" bp): {}\n", l.status.name());
        assert!(
            text.lines()
                .any(|t| t.starts_with(&shown) && format!("{t}\n").ends_with(&status)),
            "{what}: no line '{shown}...{status}' in\n{text}"
        );
    }
}

/// An account's Accruals line, reconciled rows and rows of statement rows
/// that could not be read.
type AccountRows<'r> = (
    &'r AccrualLine,
    Vec<&'r ReconciliationLine>,
    Vec<&'r ReconciliationLine>,
);

/// The run's rows of one account (its reconciled rows, then its rows of
/// statement rows that could not be read), or the problem that kept it out.
fn run_rows<'r>(result: &'r BatchResult, entry: &AccountEntry) -> Option<AccountRows<'r>> {
    let id = entry.terms.id.as_str();
    let line = result.accruals.iter().find(|a| a.account == id)?;
    let (unreadable, rows) = result
        .reconciliation
        .iter()
        .filter(|l| l.account == id)
        .partition(|l| l.status == Status::StatementUnreadable);
    Some((line, rows, unreadable))
}

/// Explain names each statement row the run could not read, as the run's
/// row for it does.
fn unreadable_rows_show(x: &Explanation, unreadable: &[&ReconciliationLine], what: &str) {
    assert_eq!(x.unreadable.len(), unreadable.len(), "{what}");
    let mut out = Vec::new();
    print(x, &mut out).unwrap();
    let text = String::from_utf8(out).unwrap();
    for (u, l) in x.unreadable.iter().zip(unreadable) {
        assert_eq!(
            (l.period_start, l.period_end),
            (u.period.map(|p| p.0), u.period.map(|p| p.1)),
            "{what}"
        );
        let shown = format!(
            "statement row {} could not be read: {}: statement unreadable",
            u.error.position,
            u.error.words()
        );
        assert!(
            text.contains(&shown),
            "{what}: no line '{shown}' in\n{text}"
        );
    }
}

#[test]
fn explain_shows_the_run_figures_for_every_account_of_every_test_book() {
    let books = test_books();
    let mut compared = 0;
    for book in &books {
        let o = options(book);
        let result = batch(book, &o);
        for entry in &book.accounts {
            let what = format!("{} {}", book.path.display(), entry.terms.id);
            let explained = explain(book, entry, &o, None);
            let Some((line, rows, unreadable)) = run_rows(&result, entry) else {
                // The run left it out: explain stops on the same problem.
                let failed = explained
                    .err()
                    .unwrap_or_else(|| panic!("{what}: explained, but the run did not compute it"));
                assert_eq!(failed.problem.severity, Severity::Error);
                assert!(
                    result.problems.contains(&failed.problem),
                    "{what}: {}",
                    failed.problem
                );
                continue;
            };
            let x = explained.unwrap_or_else(|f| panic!("{what}: {}", f.problem));
            unreadable_rows_show(&x, &unreadable, &what);
            // The default view: the statement periods in the window.
            for c in &x.statements {
                let l = rows
                    .iter()
                    .find(|l| {
                        l.period_start == Some(c.row.start) && l.period_end == Some(c.row.end)
                    })
                    .unwrap_or_else(|| panic!("{what}: the run has no row for {:?}", c.row));
                same_row(&x, l, &what);
            }
            printed_lines_show(&x, line, &rows, &what);
            // The whole history: every run row and every posting.
            let first = rows
                .iter()
                .filter_map(|l| l.period_start)
                .chain([entry.terms.open_date])
                .min()
                .unwrap();
            let all = explain(book, entry, &o, Some((first, o.cutoff)))
                .unwrap_or_else(|f| panic!("{what}: {}", f.problem));
            compare(&all, line, &rows, &o, &what);
            printed_lines_show(&all, line, &rows, &what);
            compared += 1;
        }
    }
    // The sample books alone hold 44 accounts each, the fixtures more.
    assert!(compared >= 100, "only {compared} accounts compared");
}

/// An account naming debit rates the book does not hold is left out of the
/// run with an error on its row; explain stops on the same problem instead
/// of computing it without them.
#[test]
fn an_unknown_debit_rate_ref_stops_explain_as_it_stops_the_run() {
    let mut book = read_book(
        &root().join("sample-books/harbourview-2026-11-csv"),
        &ReadOptions::default(),
    );
    let o = options(&book);
    let entry = book.accounts.first_mut().unwrap();
    entry.debit_rate_ref = Some("NO-SUCH-OVERDRAFT".into());
    let id = entry.terms.id.clone();
    let result = batch(&book, &o);
    assert!(result.accruals.iter().all(|a| a.account != id));
    let problem = result
        .problems
        .iter()
        .find(|p| p.account.as_deref() == Some(id.as_str()))
        .unwrap();
    assert!(
        problem
            .found
            .contains("no Rates rows for debit_rate_ref 'NO-SUCH-OVERDRAFT'"),
        "{problem}"
    );
    let entry = book.accounts.first().unwrap();
    let failed = explain(&book, entry, &o, None).unwrap_err();
    assert_eq!(&failed.problem, problem);
}
