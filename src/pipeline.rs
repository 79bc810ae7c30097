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

use chrono::Datelike;

use crate::book::{known, AccountEntry, Book, BookedRow, StatementRow, UnreadableStatement};
use crate::engine::causes::{search, LikelyCause};
use crate::engine::events::{self, Life};
use crate::engine::floating::{
    FixingFallback, FixingWarning, Fixings, FloatingRates, FloatingSchedule,
};
use crate::engine::ledger::{
    figures, ledger_postings, open_item, LedgerFigures, LedgerPosting, OpeningSource,
    SettlementLines,
};
use crate::engine::rates::RateSchedule;
use crate::engine::reconcile::{
    expected_over, reconcile, variance_bp, Reconciled, StatementPeriod, Status, Tolerance,
};
use crate::engine::run::{accrue, AccountResult, RunOptions};
use crate::engine::suspense::{split, Suspense, SuspenseInputs};
use crate::engine::{ActualPosting, EngineError, Inputs, Movement};
use crate::problem::{Position, Problem, Severity};
use crate::report::model::TaxCheck;

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
    /// Its Booked row dated the day before the window, if any.
    pub booked_opening: Option<&'a BookedRow>,
    /// Its Booked row dated the cut-off, if any: the core system's open
    /// item, checked against ours.
    pub booked_close: Option<&'a BookedRow>,
    /// Its statement rows that could not be read: a posting period one of
    /// them was for is not taken as "not made".
    pub unreadable: &'a [&'a UnreadableStatement],
    /// When the tables of its `rate_ref` and `debit_rate_ref` were booked,
    /// where later than they took effect (effective, booked).
    pub rate_bookings: [&'a [(NaiveDate, NaiveDate)]; 2],
    /// Its Accrual status rows, interest receipts and opening suspense, when
    /// it has any (behaviour.md, Non-accrual and interest in suspense):
    /// only such an account keeps its day rows to be split.
    pub suspense: Option<SuspenseInputs<'a>>,
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
            booked_opening: None,
            booked_close: None,
            unreadable: &[],
            rate_bookings: [
                known::bookings_of(book, &entry.rate_ref),
                entry
                    .debit_rate_ref
                    .as_ref()
                    .map_or(&[][..], |r| known::bookings_of(book, r)),
            ],
            suspense: suspense_of(book, entry),
        }
    }

    /// The same account with `row` as the books' open item at the end of
    /// the day before the window.
    pub fn with_booked_opening(self, row: Option<&'a BookedRow>) -> BookAccount<'a> {
        BookAccount {
            booked_opening: row,
            ..self
        }
    }

    /// The same account with `rows` as its statement rows that could not be read.
    pub fn with_unreadable(self, rows: &'a [&'a UnreadableStatement]) -> BookAccount<'a> {
        BookAccount {
            unreadable: rows,
            ..self
        }
    }

    /// The same account with `row` as the core system's open item at the
    /// end of the cut-off.
    pub fn with_booked_close(self, row: Option<&'a BookedRow>) -> BookAccount<'a> {
        BookAccount {
            booked_close: row,
            ..self
        }
    }

    /// The account's rows as known at the end of `day`, or `None` when it
    /// knew them all by then.
    fn known_at(&self, day: NaiveDate) -> Option<KnownRows<'a>> {
        let [own, debit] = self.rate_bookings;
        let later = !self.movements.iter().all(|m| known::movement_known(m, day))
            || !self
                .statements
                .iter()
                .all(|s| known::statement_known(s, day))
            || known::booked_after(own, day)
            || known::booked_after(debit, day);
        later.then(|| KnownRows {
            movements: self
                .movements
                .iter()
                .filter(|m| known::movement_known(m, day))
                .cloned()
                .collect(),
            statements: self
                .statements
                .iter()
                .copied()
                .filter(|s| known::statement_known(s, day))
                .collect(),
            rates: self
                .rates
                .map(|r| r.without(|e| !known::table_known(own, e, day))),
            debit_rates: self
                .debit_rates
                .map(|r| r.without(|e| !known::table_known(debit, e, day))),
            floating: self
                .floating
                .map(|r| r.without(|e| !known::table_known(own, e, day))),
        })
    }
}

/// An account's rows as known at an earlier day.
struct KnownRows<'a> {
    movements: Vec<Movement>,
    statements: Vec<&'a StatementRow>,
    rates: Option<RateSchedule>,
    debit_rates: Option<RateSchedule>,
    floating: Option<FloatingSchedule>,
}

impl<'a> KnownRows<'a> {
    /// The account as it stood with these rows.
    fn account<'k>(&'k self, now: &BookAccount<'k>) -> BookAccount<'k> {
        BookAccount {
            entry: now.entry,
            rates: self.rates.as_ref(),
            debit_rates: self.debit_rates.as_ref(),
            floating: self.floating.as_ref(),
            fixings: now.fixings,
            movements: &self.movements,
            statements: &self.statements,
            booked_opening: None,
            booked_close: None,
            unreadable: now.unreadable,
            rate_bookings: [&[], &[]],
            suspense: None,
        }
    }
}

/// Whether `entry` of `book` has Accrual status rows, interest receipts or
/// an opening suspense: an account whose computed run splits its interest
/// into recognised and suspended.
pub fn splits_interest(book: &Book, entry: &AccountEntry) -> bool {
    book.accrual.touches(&entry.terms.id) || !entry.opening_suspense.is_zero()
}

/// The Accrual status rows, interest receipts and opening suspense of
/// `entry` in `book`; `None` for an account with none of them, which is
/// accruing and keeps the fast path.
fn suspense_of<'b>(book: &'b Book, entry: &'b AccountEntry) -> Option<SuspenseInputs<'b>> {
    let id = entry.terms.id.as_str();
    splits_interest(book, entry).then(|| SuspenseInputs {
        statuses: book.accrual.statuses.get(id).map_or(&[][..], Vec::as_slice),
        receipts: book.accrual.receipts.get(id).map_or(&[][..], Vec::as_slice),
        opening_suspense: entry.opening_suspense,
    })
}

/// The statement rows of account `id` in `book`, in sheet order.
pub fn statements_of<'b>(book: &'b Book, id: &str) -> Vec<&'b StatementRow> {
    book.statements
        .iter()
        .filter(|s| &*s.account == id)
        .collect()
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
    /// The period's withholding tax, for a taxed account (behaviour.md,
    /// Withholding tax).
    pub tax: Option<TaxCheck>,
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
    /// one posting, fixings a fallback stood in for, back-value interest
    /// the booked opening assumes.
    pub notes: Vec<Problem>,
    /// Posting periods no statement row covers: not made.
    pub not_made: Vec<(NaiveDate, NaiveDate)>,
    /// The postings to the cut-off as the ledger sees them (made or not).
    pub postings: Vec<LedgerPosting>,
    /// What the ledger books and holds for the account.
    pub ledger: LedgerFigures,
    /// The core system's open item at cut-off (a Booked row) checked
    /// against ours: expected O(C), "posted" the booked figure.
    pub accrued_check: Option<CheckedRow>,
    /// Its contractual interest split into recognised and suspended, for an
    /// account with Accrual status rows, interest receipts or an opening
    /// suspense.
    pub suspense: Option<Suspense>,
    /// Its life events at the cut-off: terms, close, status (behaviour.md,
    /// Account life events); `None` for an account without any.
    pub life: Option<Life>,
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
/// reconciliation with the likely cause of each row outside tolerance, its
/// ledger figures (behaviour.md, Books that tie) and its notes.
///
/// # Errors
/// [`Failed`] when the account's rates are missing or the engine stops.
pub fn run_account(account: &BookAccount, options: &Options) -> Result<AccountRun, Box<Failed>> {
    let entry = account.entry;
    let fail = |error: EngineError| {
        Box::new(Failed {
            problem: engine_problem(entry, &error),
            error,
        })
    };
    let mut close = close(account, options).map_err(fail)?;
    let opening = booked_opening(account, options, &close).map_err(fail)?;
    let postings = ledger_postings(&close.result, &close.not_made);
    let r = &close.result;
    let ledger = figures(
        &postings,
        r.accrued_before_window,
        r.accrued_at_cutoff,
        options.window_start,
        options.cutoff,
        options.settlement_lines,
        opening.figure,
    );
    close.notes.extend(opening.notes);
    let suspense = match &account.suspense {
        Some(inputs) => Some(
            split(
                &entry.terms,
                &close.result,
                inputs,
                options.window_start,
                options.cutoff,
            )
            .map_err(fail)?,
        ),
        None => None,
    };
    Ok(AccountRun {
        result: close.result,
        periods: close.periods,
        rows: close.rows,
        notes: close.notes,
        not_made: close.not_made,
        postings,
        ledger,
        accrued_check: close.accrued_check,
        suspense,
        life: close.life,
    })
}

/// An account closed for one window: its run, statement periods,
/// reconciliation and notes, and the posting periods no statement covers.
struct Close {
    result: AccountResult,
    periods: Vec<StatementPeriod>,
    rows: Vec<CheckedRow>,
    notes: Vec<Problem>,
    not_made: Vec<(NaiveDate, NaiveDate)>,
    accrued_check: Option<CheckedRow>,
    life: Option<Life>,
}

/// Runs and reconciles `account` for the window of `options`. A posting
/// period of an account with statement rows that no row covers is not made
/// (behaviour.md, Completeness and presentation): a capitalising account is
/// run again with nothing posted for it, so its balance never takes it.
fn close(account: &BookAccount, options: &Options) -> Result<Close, EngineError> {
    let entry = account.entry;
    let own = &entry.terms;
    let closed = events::run_terms(own, options.cutoff);
    let t = closed.as_ref().unwrap_or(own);
    let actual = actual_postings(account.statements);
    let with_nothing_posted: Vec<ActualPosting>;
    let (periods, mut notes) = statement_periods(account.statements, entry, options.cutoff);
    // Reconciliation sums spans of days broken at each statement period's
    // ends; states let the cause search re-run a period.
    let checked = !periods.is_empty() || account.booked_close.is_some();
    let run_options = RunOptions {
        window_start: options.window_start,
        cutoff: options.cutoff,
        keep_days: options.keep_days || account.suspense.is_some(),
        keep_states: checked,
        keep_spans: checked,
        fast_path: options.fast_path,
    };
    let breaks: Vec<NaiveDate> = periods
        .iter()
        .flat_map(|p| [p.start.pred_opt(), Some(p.end)])
        .flatten()
        .collect();
    let empty = RateSchedule::default();
    let rates = rates_of(account, &empty)?;
    let mut inputs = Inputs {
        rates,
        debit_rates: debit_rates_of(account)?,
        movements: account.movements,
        actual: &actual,
        breaks: &breaks,
        floating: account.floating.map(|schedule| FloatingRates {
            schedule,
            fixings: account.fixings,
            fallback: options.fixing_fallback,
        }),
    };
    let reconcile_with = |result: &AccountResult| {
        reconcile(
            t,
            result,
            &periods,
            options.window_start,
            options.cutoff,
            &options.tolerance,
        )
    };
    let mut legs = None;
    let mut result = life_accrue(own, t, inputs, run_options, &mut legs)?;
    let mut reconciled = reconcile_with(&result)?;
    let not_made: Vec<(NaiveDate, NaiveDate)> = reconciled
        .iter()
        .filter(|r| r.status == Status::NotPosted)
        .filter(|r| !account.unreadable.iter().any(|u| u.covers(r.start, r.end)))
        .map(|r| (r.start, r.end))
        .collect();
    if t.capitalise && !not_made.is_empty() {
        with_nothing_posted = actual
            .iter()
            .copied()
            .chain(not_made.iter().map(|&(start, end)| ActualPosting {
                start,
                end,
                amount: Decimal::ZERO,
            }))
            .collect();
        inputs.actual = &with_nothing_posted;
        result = life_accrue(own, t, inputs, run_options, &mut legs)?;
        reconciled = reconcile_with(&result)?;
    }
    let mut rows: Vec<CheckedRow> = reconciled
        .into_iter()
        .map(|row| CheckedRow {
            tax: tax::check(t, &result, account.statements, &row),
            likely_cause: matches!(row.status, Status::OverPosted | Status::UnderPosted).then(
                || {
                    tax::net_cause(t, &result, &row).unwrap_or_else(|| {
                        search(t, &inputs, &result.states, &row, &options.tolerance)
                    })
                },
            ),
            row,
        })
        .collect();
    notes.extend(fixing_warnings(entry, &result.fixing_warnings));
    notes.extend(tax::stated_tax_warnings(
        t,
        &result,
        account.statements,
        options.cutoff,
    ));
    let life = match legs {
        Some(legs) => {
            let closing = match legs.last() {
                Some(leg) => events::settle_close(own, leg, &inputs, run_options, &mut result)?,
                None => None,
            };
            if let Some(c) = &closing {
                notes.extend(life_notes(entry, c, &options.tolerance));
                for r in &mut rows {
                    if let Some(cause) = r.likely_cause.as_mut() {
                        let places = t.minor_units;
                        events::net_of_penalty(c, &r.row, &options.tolerance, places, cause);
                    }
                }
            }
            let figures = Life::figures(own, &legs, &result, options.cutoff);
            Some(Life {
                legs,
                closing,
                figures,
            })
        }
        None => None,
    };
    let accrued_check = match account.booked_close {
        Some(booked) => Some(check_accrued(
            t, &inputs, &result, &not_made, booked, options,
        )?),
        None => None,
    };
    Ok(Close {
        result,
        periods,
        rows,
        notes,
        not_made,
        accrued_check,
        life,
    })
}

/// An account's run: the day loop itself for an account without life
/// events, else its terms one after another (`legs` set to them).
fn life_accrue(
    own: &crate::engine::AccountTerms,
    t: &crate::engine::AccountTerms,
    inputs: Inputs,
    options: RunOptions,
    legs: &mut Option<Vec<events::Leg>>,
) -> Result<AccountResult, EngineError> {
    if own.events.is_none() {
        return accrue(t, inputs, options);
    }
    let life = events::accrue_life(own, inputs, options)?;
    *legs = Some(life.legs);
    Ok(life.result)
}

/// The core system's open item at cut-off checked against ours
/// (behaviour.md, System accrued check): over the days since the last
/// posting, with status and likely cause as a statement row's, the booked
/// figure in place of the posted one.
fn check_accrued(
    t: &crate::engine::AccountTerms,
    inputs: &Inputs,
    result: &AccountResult,
    not_made: &[(NaiveDate, NaiveDate)],
    booked: &BookedRow,
    options: &Options,
) -> Result<CheckedRow, EngineError> {
    let c = options.cutoff;
    // A posting ending on the cut-off is still in the open item: the row
    // covers its period rather than an empty span after it.
    let from = result
        .postings
        .iter()
        .filter(|p| p.end < c)
        .map(|p| p.end)
        .max()
        .and_then(|e| e.succ_opt())
        .unwrap_or(t.open_date);
    let postings = ledger_postings(result, not_made);
    let expected = open_item(
        result.accrued_at_cutoff,
        &postings,
        c,
        options.settlement_lines,
    );
    let e = expected_over(t, result, from, c)?;
    let variance = booked.open_item - expected;
    let variance_bp = variance_bp(variance, e.balance_years);
    let status = Status::of_variance(variance, variance_bp, &options.tolerance, t.minor_units);
    // The cause search compares like with like: the days' interest it
    // re-runs against the booked figure less what is not accrual.
    let searched = Reconciled {
        start: from,
        end: c,
        days: (c - from).num_days() + 1,
        balance_years: e.balance_years,
        expected: e.amount,
        posted: e.amount + variance,
        variance,
        variance_bp,
        status,
        rows: 1,
    };
    let likely_cause = status
        .outside_tolerance()
        .then(|| search(t, inputs, &result.states, &searched, &options.tolerance));
    Ok(CheckedRow {
        tax: None,
        row: Reconciled {
            expected,
            posted: booked.open_item,
            ..searched
        },
        likely_cause,
    })
}

/// The booked opening and the notes it gives.
struct Opening {
    /// BO (`None`: O(F-1) known now) and its source.
    figure: (Option<Decimal>, OpeningSource),
    notes: Vec<Problem>,
}

/// The account's booked opening BO (behaviour.md, The booked opening): its
/// Booked row at F-1, else the previous close re-run as known at
/// `previous_as_at`, else the open item known now, with a warning for each
/// movement booked in or after the window whose back-value interest for the
/// days before it the books are assumed to hold already.
fn booked_opening(
    account: &BookAccount,
    options: &Options,
    close: &Close,
) -> Result<Opening, EngineError> {
    let t = &account.entry.terms;
    let f = options.window_start;
    let eve = f.pred_opt().unwrap_or(f);
    let mut notes = Vec::new();
    if t.open_date >= f {
        return Ok(Opening {
            figure: (None, OpeningSource::OpensInWindow),
            notes,
        });
    }
    if let Some(row) = account.booked_opening {
        return Ok(Opening {
            figure: (Some(row.open_item), OpeningSource::BookedRow),
            notes,
        });
    }
    if let Some(p) = options.previous_as_at {
        // An account that knew at P all it knows now needs no re-run: its
        // opening is O(F-1) known now, which the figures work out anyway.
        let bo = match account.known_at(p) {
            None => None,
            Some(known) => {
                let then = known.account(account);
                let previous = Options {
                    window_start: month_start(eve),
                    cutoff: eve,
                    keep_days: false,
                    ..*options
                };
                let c = self::close(&then, &previous).map_err(|e| previous_close_error(p, &e))?;
                let postings = ledger_postings(&c.result, &c.not_made);
                Some(open_item(
                    c.result.accrued_at_cutoff,
                    &postings,
                    eve,
                    options.settlement_lines,
                ))
            }
        };
        return Ok(Opening {
            figure: (bo, OpeningSource::PreviousClose),
            notes,
        });
    }
    for &(i, owed) in &close.result.back_value_before_window {
        let Some(m) = account.movements.get(i) else {
            continue;
        };
        let booked = m.booking_date.unwrap_or(m.value_date);
        if booked >= f && !owed.is_zero() {
            notes.push(assumed_back_value(account.entry, m, owed, eve));
        }
    }
    Ok(Opening {
        figure: (None, OpeningSource::KnownNow),
        notes,
    })
}

/// The first day of `day`'s month: the start of the previous close's
/// window when it is re-run (a monthly close; docs/decisions.md).
fn month_start(day: NaiveDate) -> NaiveDate {
    day.with_day(1).unwrap_or(day)
}

fn previous_close_error(previous_as_at: NaiveDate, e: &EngineError) -> EngineError {
    EngineError::Unsupported(format!(
        "the previous close as known at {previous_as_at} (previous_as_at) cannot be computed: {e}"
    ))
}

/// The warning that the booked opening assumes the books already held a
/// movement's back-value interest for the days before the window.
fn assumed_back_value(
    entry: &AccountEntry,
    m: &Movement,
    owed: Decimal,
    eve: NaiveDate,
) -> Problem {
    let reference = m.reference.as_deref().map_or_else(
        || format!("{} valued {}", m.amount, m.value_date),
        str::to_string,
    );
    let booked = m.booking_date.unwrap_or(m.value_date);
    Problem {
        severity: Severity::Warning,
        position: entry.position.to_position(),
        account: Some(entry.terms.id.clone()),
        found: format!(
            "account {}: the opening assumes the books at {eve} already held {owed} of back-value interest for movement {reference} booked {booked}",
            entry.terms.id
        ),
        expected: format!("what the books held for the account at the end of {eve}"),
        fix: format!("give previous_as_at (the day the previous close was run) or a Booked row for {eve}, so that the back-value interest is booked as a prior-period adjustment"),
        follows: None,
    }
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
                position: s.position.to_position(),
                account: Some(s.account.to_string()),
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
                let first: Position = rows.first().map(|r| r.position.to_position()).unwrap_or_default();
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
                position: entry.position.to_position(),
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
        EngineError::NoTaxTable { tax_ref, date, .. } => (
            format!("a {tax_ref} table of the Tax sheet in force on the payment date {date}"),
            format!("add a Tax row for tax_ref '{tax_ref}' effective on or before {date} (a rate_percent of 0 for an exemption); the account is not computed until then"),
        ),
    };
    Problem {
        severity: Severity::Error,
        position: entry.position.to_position(),
        account: Some(entry.terms.id.clone()),
        found: format!("account {}: {e}", entry.terms.id),
        expected,
        fix,
        follows: None,
    }
}

mod life;
mod tax;
use life::life_notes;

#[cfg(test)]
mod tests;
