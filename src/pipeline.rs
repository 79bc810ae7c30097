//! One account from its book's rows to its checked figures: the statement
//! rows grouped into periods, the engine's run broken at their ends,
//! reconciliation, the likely cause of each row outside tolerance, and the
//! notes and warnings worth reporting.
//!
//! Every command computes an account here (`run` and `check` through the
//! batch, `explain`, and the `sample` generator for its statement amounts),
//! so no two of them can set an account up differently.
//!
//! It reads no file and prints nothing: it takes rows a book already holds
//! and returns values; the batch turns them into report rows and `explain`
//! into text. It looks nothing up in a book beyond [`BookAccount::from_book`].

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::book::{AccountEntry, Book, StatementRow};
use crate::engine::causes::{search, LikelyCause};
use crate::engine::floating::{
    FixingFallback, FixingWarning, Fixings, FloatingRates, FloatingSchedule,
};
use crate::engine::ledger::SettlementLines;
use crate::engine::rates::RateSchedule;
use crate::engine::reconcile::{reconcile, Reconciled, StatementPeriod, Status, Tolerance};
use crate::engine::run::{accrue, AccountResult, RunOptions};
use crate::engine::{ActualPosting, EngineError, Inputs, Movement};
use crate::problem::{Position, Problem, Severity};

/// One account's rows as a book holds them.
#[derive(Debug, Clone, Copy)]
pub struct BookAccount<'a> {
    /// The Accounts row: terms, name, rate references, position.
    pub entry: &'a AccountEntry,
    /// The Rates rows of its `rate_ref`, if any.
    pub rates: Option<&'a RateSchedule>,
    /// The Rates rows of its `debit_rate_ref`, if it names one and they exist.
    pub debit_rates: Option<&'a RateSchedule>,
    /// The index rows of its `rate_ref`, for a floating account.
    pub floating: Option<&'a FloatingSchedule>,
    /// Every index's fixings.
    pub fixings: &'a Fixings,
    /// Its movements, in sheet order.
    pub movements: &'a [Movement],
    /// Its statement rows, in sheet order.
    pub statements: &'a [&'a StatementRow],
}

impl<'a> BookAccount<'a> {
    /// The rows of `book` for `entry`, with `statements` its statement rows
    /// (the caller finds them: the batch indexes a book's rows once).
    pub fn from_book(
        book: &'a Book,
        entry: &'a AccountEntry,
        statements: &'a [&'a StatementRow],
    ) -> BookAccount<'a> {
        BookAccount {
            entry,
            rates: book.rates.get(&entry.rate_ref),
            debit_rates: entry
                .debit_rate_ref
                .as_ref()
                .and_then(|r| book.rates.get(r)),
            floating: book.floating_rates.get(&entry.rate_ref),
            fixings: &book.fixings,
            movements: book
                .movements
                .get(&entry.terms.id)
                .map_or(&[][..], Vec::as_slice),
            statements,
        }
    }
}

/// The statement rows of account `id` in `book`, in sheet order.
pub fn statements_of<'b>(book: &'b Book, id: &str) -> Vec<&'b StatementRow> {
    book.statements.iter().filter(|s| s.account == id).collect()
}

/// How to compute an account.
#[derive(Debug, Clone, Copy)]
pub struct Options {
    /// F, the first day of the window.
    pub window_start: NaiveDate,
    /// C, the cut-off.
    pub cutoff: NaiveDate,
    /// Reconciliation tolerances.
    pub tolerance: Tolerance,
    /// What a floating account does about a missing fixing.
    pub fixing_fallback: FixingFallback,
    /// Keep one row per day (and so compute day by day).
    pub keep_days: bool,
    /// Accrue unchanging runs of days in one step (identical figures).
    pub fast_path: bool,
    /// P, the as-at date of the previous close, when given (behaviour.md,
    /// Knowledge date).
    pub previous_as_at: Option<NaiveDate>,
    /// When the journal settles a posting against the accrual account.
    pub settlement_lines: SettlementLines,
}

/// One reconciled statement period and, when it is over- or under-posted,
/// the cause search's finding.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CheckedRow {
    /// The period's figures and status.
    pub row: Reconciled,
    /// The likely cause, for a row over- or under-posted (else `None`).
    pub likely_cause: Option<LikelyCause>,
}

/// One account computed.
#[derive(Debug, Clone)]
pub struct AccountRun {
    /// The engine's run.
    pub result: AccountResult,
    /// The statement periods ending by the cut-off, rows of a period summed,
    /// in period order.
    pub periods: Vec<StatementPeriod>,
    /// The reconciliation: statement periods in order, then the posting
    /// periods no statement covers.
    pub rows: Vec<CheckedRow>,
    /// Notes and warnings: rows ending after the cut-off, rows summed into
    /// one posting, fixings a fallback stood in for.
    pub notes: Vec<Problem>,
}

/// An account the engine could not compute.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Failed {
    /// What the engine said.
    pub error: EngineError,
    /// The same as a problem on the account's row, with a fix.
    pub problem: Problem,
}

/// Computes one account: its statement periods, its run (broken at every
/// period's ends, with the states the cause search needs), its
/// reconciliation with the likely cause of each row outside tolerance, and
/// its notes.
///
/// # Errors
/// [`Failed`] when the account's rates are missing or the engine stops.
pub fn run_account(account: &BookAccount, options: &Options) -> Result<AccountRun, Box<Failed>> {
    let entry = account.entry;
    let t = &entry.terms;
    let fail = |error: EngineError| {
        Box::new(Failed {
            problem: engine_problem(entry, &error),
            error,
        })
    };
    let actual = actual_postings(account.statements);
    let (periods, mut notes) = statement_periods(account.statements, entry, options.cutoff);
    // Reconciliation sums spans of days broken at each statement period's
    // ends; states let the cause search re-run a period.
    let run_options = RunOptions {
        window_start: options.window_start,
        cutoff: options.cutoff,
        keep_days: options.keep_days,
        keep_states: !periods.is_empty(),
        keep_spans: !periods.is_empty(),
        fast_path: options.fast_path,
    };
    let breaks: Vec<NaiveDate> = periods
        .iter()
        .flat_map(|p| [p.start.pred_opt(), Some(p.end)])
        .flatten()
        .collect();
    let empty = RateSchedule::default();
    let rates = rates_of(account, &empty).map_err(fail)?;
    let inputs = Inputs {
        rates,
        debit_rates: debit_rates_of(account).map_err(fail)?,
        movements: account.movements,
        actual: &actual,
        breaks: &breaks,
        floating: account.floating.map(|schedule| FloatingRates {
            schedule,
            fixings: account.fixings,
            fallback: options.fixing_fallback,
        }),
    };
    let result = accrue(t, inputs, run_options).map_err(fail)?;
    let reconciled = reconcile(
        t,
        &result,
        &periods,
        options.window_start,
        options.cutoff,
        &options.tolerance,
    )
    .map_err(fail)?;
    let rows = reconciled
        .into_iter()
        .map(|row| CheckedRow {
            likely_cause: matches!(row.status, Status::OverPosted | Status::UnderPosted)
                .then(|| search(t, &inputs, &result.states, &row, &options.tolerance)),
            row,
        })
        .collect();
    notes.extend(fixing_warnings(entry, &result.fixing_warnings));
    Ok(AccountRun {
        result,
        periods,
        rows,
        notes,
    })
}

/// The table the account earns: its Rates rows, or `empty` for a floating
/// account (whose rates come from its index rows).
fn rates_of<'a>(
    account: &BookAccount<'a>,
    empty: &'a RateSchedule,
) -> Result<&'a RateSchedule, EngineError> {
    match (account.rates, account.floating) {
        (_, Some(_)) => Ok(empty),
        (Some(r), None) => Ok(r),
        (None, None) => Err(EngineError::Unsupported(format!(
            "no Rates rows for rate_ref '{}'",
            account.entry.rate_ref
        ))),
    }
}

/// The debit rates the account names, if it names any.
fn debit_rates_of<'a>(account: &BookAccount<'a>) -> Result<Option<&'a RateSchedule>, EngineError> {
    match (&account.entry.debit_rate_ref, account.debit_rates) {
        (None, _) => Ok(None),
        (Some(_), Some(r)) => Ok(Some(r)),
        (Some(r), None) => Err(EngineError::Unsupported(format!(
            "no Rates rows for debit_rate_ref '{r}'"
        ))),
    }
}

/// Amounts actually posted by an account's statement rows, summed per
/// period (rows for the same period are one posting: a correction and its
/// reversal, say), in period order.
fn actual_postings(rows: &[&StatementRow]) -> Vec<ActualPosting> {
    let mut sums: BTreeMap<(NaiveDate, NaiveDate), Decimal> = BTreeMap::new();
    for s in rows {
        *sums.entry((s.period_start, s.period_end)).or_default() += s.posted;
    }
    sums.into_iter()
        .map(|((start, end), amount)| ActualPosting { start, end, amount })
        .collect()
}

/// The account's statement rows grouped by period (rows with the same
/// period are one posting), leaving out rows that end after the cut-off.
fn statement_periods(
    statements: &[&StatementRow],
    entry: &AccountEntry,
    cutoff: NaiveDate,
) -> (Vec<StatementPeriod>, Vec<Problem>) {
    let mut groups: BTreeMap<(NaiveDate, NaiveDate), (Decimal, Vec<&StatementRow>)> =
        BTreeMap::new();
    let mut notes = Vec::new();
    for &s in statements {
        if s.period_end > cutoff {
            notes.push(Problem {
                severity: Severity::Warning,
                position: s.position.clone(),
                account: Some(s.account.clone()),
                found: format!(
                    "a statement period {}..{} ending after the cut-off {cutoff}",
                    s.period_start, s.period_end
                ),
                expected: "statement periods that end on or before the cut-off".to_string(),
                fix: "run with a later --cutoff to reconcile it; this row is not reconciled"
                    .to_string(),
                follows: None,
            });
            continue;
        }
        let g = groups
            .entry((s.period_start, s.period_end))
            .or_insert((Decimal::ZERO, Vec::new()));
        g.0 += s.posted;
        g.1.push(s);
    }
    let periods = groups
        .into_iter()
        .map(|((start, end), (posted, rows))| {
            if rows.len() > 1 {
                let first: Position = rows.first().map(|r| r.position.clone()).unwrap_or_default();
                notes.push(Problem {
                    severity: Severity::Note,
                    position: first,
                    account: Some(entry.terms.id.clone()),
                    found: format!("{} statement rows for {start}..{end}", rows.len()),
                    expected: "one row per posting period".to_string(),
                    fix: format!("they are summed into one posting of {posted} (a correction and its reversal, say)"),
                    follows: None,
                });
            }
            StatementPeriod { start, end, posted, rows: rows.len() }
        })
        .collect();
    (periods, notes)
}

/// One warning per index for the missing fixings the `last` fallback
/// replaced, naming the dates and the fixings used.
fn fixing_warnings(entry: &AccountEntry, warnings: &[FixingWarning]) -> Vec<Problem> {
    let mut by_index: BTreeMap<&str, Vec<&FixingWarning>> = BTreeMap::new();
    for w in warnings {
        by_index.entry(w.index.as_str()).or_default().push(w);
    }
    by_index
        .into_iter()
        .map(|(index, ws)| {
            let dates: Vec<String> = ws
                .iter()
                .map(|w| format!("{} (used {})", w.date, w.used))
                .collect();
            Problem {
                severity: Severity::Warning,
                position: entry.position.clone(),
                account: Some(entry.terms.id.clone()),
                found: format!(
                    "account {}: {} missing {index} fixing{}: {}",
                    entry.terms.id,
                    ws.len(),
                    if ws.len() == 1 { "" } else { "s" },
                    dates.join(", ")
                ),
                expected: format!("a {index} fixing for every business day the account needs"),
                fix: format!("the last published {index} fixing stood in (--fixing-fallback last): add the fixings to the Fixings sheet and run again for final figures"),
                follows: None,
            }
        })
        .collect()
}

/// An engine error as a problem on the account's row, with a fix.
fn engine_problem(entry: &AccountEntry, e: &EngineError) -> Problem {
    let (expected, fix) = match e {
        EngineError::NoRate { date, .. } => (
            format!("a rate in force on {date}"),
            format!(
                "add a Rates row for rate_ref '{}' effective on or before {date}, or move the account's open_date",
                entry.rate_ref
            ),
        ),
        EngineError::Overflow { .. } => (
            "figures within the exact decimal range (28 significant digits)".to_string(),
            "check the balance, movements and rates of this account for a typing error".to_string(),
        ),
        EngineError::Unsupported(_) => (
            "terms the engine supports".to_string(),
            "change the account's terms; see docs/user-guide.md for the supported combinations".to_string(),
        ),
        EngineError::MissingFixing { index, date } => (
            format!("a {index} fixing for {date} on the Fixings sheet"),
            format!("add the {index} fixing for {date} to the Fixings sheet, or run with --fixing-fallback last to use the last one published"),
        ),
        EngineError::DayCount(_) | EngineError::Schedule(_) => (
            "terms the basis and schedule need".to_string(),
            "give the missing term on the account's row".to_string(),
        ),
        EngineError::Growth(_) => (
            "a rate and term that compounding can compute".to_string(),
            "check the rate for a typing error".to_string(),
        ),
        EngineError::BadState(_) => ("a period start".to_string(), "report this as a defect".to_string()),
        EngineError::UnbrokenSpan(_) => ("runs of days that end at every statement boundary".to_string(), "report this as a defect; --no-fast-path computes the account day by day".to_string()),
    };
    Problem {
        severity: Severity::Error,
        position: entry.position.clone(),
        account: Some(entry.terms.id.clone()),
        found: format!("account {}: {e}", entry.terms.id),
        expected,
        fix,
        follows: None,
    }
}

#[cfg(test)]
mod tests;
