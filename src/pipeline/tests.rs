//! One account through the pipeline on hand-built book rows: missing rate
//! schedules, statement rows grouped by period with their notes, causes
//! only for rows outside tolerance, and the fixing-fallback warning.

use std::collections::BTreeMap;

use super::*;
use crate::book::GlCodes;
use crate::conventions::daycount::Basis;
use crate::engine::floating::{IndexRate, TierRate};
use crate::engine::{AccountTerms, FloatingTerms, RateMethod};
use crate::problem::RowPosition;

fn d(s: &str) -> NaiveDate {
    s.parse().unwrap()
}

fn n(s: &str) -> Decimal {
    s.parse().unwrap()
}

fn entry() -> AccountEntry {
    AccountEntry {
        terms: AccountTerms::new(
            "PL-1",
            "USD",
            2,
            Basis::Act360,
            d("2026-10-01"),
            n("1000.00"),
        ),
        name: "pipeline account".into(),
        rate_ref: "R".into(),
        debit_rate_ref: None,
        gl: GlCodes::default().into(),
        position: RowPosition::parse(Position {
            book: "test.xlsx".into(),
            sheet: "Accounts".into(),
            cell: "A2".into(),
            ..Default::default()
        })
        .unwrap(),
        opening_suspense: Decimal::ZERO,
    }
}

fn rates() -> RateSchedule {
    RateSchedule::from_rows([(d("2026-01-01"), n("0.0425"), Decimal::ZERO)])
}

fn row(start: &str, end: &str, posted: &str, cell: &str) -> StatementRow {
    StatementRow {
        account: "PL-1".into(),
        period_start: d(start),
        period_end: d(end),
        posted: n(posted),
        reference: None,
        posting_date: None,
        tax_withheld: None,
        position: RowPosition::parse(Position {
            book: "test.xlsx".into(),
            sheet: "Statements".into(),
            cell: cell.into(),
            ..Default::default()
        })
        .unwrap(),
    }
}

fn options() -> Options {
    Options {
        window_start: d("2026-11-01"),
        cutoff: d("2026-11-30"),
        tolerance: Tolerance::default(),
        fixing_fallback: FixingFallback::None,
        keep_days: false,
        fast_path: true,
        previous_as_at: None,
        settlement_lines: Default::default(),
    }
}

fn account<'a>(
    entry: &'a AccountEntry,
    rates: &'a RateSchedule,
    fixings: &'a Fixings,
    statements: &'a [&'a StatementRow],
) -> BookAccount<'a> {
    BookAccount {
        entry,
        rates: Some(rates),
        debit_rates: None,
        floating: None,
        fixings,
        movements: &[],
        statements,
        booked_opening: None,
        booked_close: None,
        unreadable: &[],
        rate_bookings: [&[], &[]],
        suspense: None,
    }
}

/// A debit_rate_ref without Rates rows stops the account, as a missing
/// rate_ref does: the debit rates are never quietly taken as none.
#[test]
fn an_unknown_debit_rate_ref_stops_the_account() {
    let mut e = entry();
    e.debit_rate_ref = Some("OVERDRAFT".into());
    let (r, f) = (rates(), Fixings::new());
    let failed = run_account(&account(&e, &r, &f, &[]), &options()).unwrap_err();
    assert!(
        failed
            .problem
            .found
            .contains("no Rates rows for debit_rate_ref 'OVERDRAFT'"),
        "{}",
        failed.problem
    );
    assert_eq!(failed.problem.severity, Severity::Error);
    assert_eq!(failed.problem.position.cell, "A2");
    assert!(matches!(failed.error, EngineError::Unsupported(_)));

    let mut plain = account(&e, &r, &f, &[]);
    plain.rates = None;
    let failed = run_account(&plain, &options()).unwrap_err();
    assert!(
        failed
            .problem
            .found
            .contains("no Rates rows for rate_ref 'R'"),
        "{}",
        failed.problem
    );
}

/// Rows of one period are one posting, summed, with a note on the first
/// row; periods come in date order whatever the sheet order; a row ending
/// after the cut-off is a warning and is not reconciled.
#[test]
fn statement_rows_are_grouped_by_period_in_date_order() {
    let (e, r, f) = (entry(), rates(), Fixings::new());
    // 1,000.00 at 4.25% on ACT/360: October 3.66, November 3.54.
    let rows = [
        row("2026-11-01", "2026-11-30", "3.00", "A2"),
        row("2026-10-01", "2026-10-31", "3.66", "A3"),
        row("2026-11-01", "2026-11-30", "0.54", "A4"),
        row("2026-12-01", "2026-12-31", "3.66", "A5"),
    ];
    let refs: Vec<&StatementRow> = rows.iter().collect();
    let run = run_account(&account(&e, &r, &f, &refs), &options()).unwrap();
    let periods: Vec<(NaiveDate, NaiveDate, Decimal, usize)> = run
        .periods
        .iter()
        .map(|p| (p.start, p.end, p.posted, p.rows))
        .collect();
    assert_eq!(
        periods,
        [
            (d("2026-10-01"), d("2026-10-31"), n("3.66"), 1),
            (d("2026-11-01"), d("2026-11-30"), n("3.54"), 2),
        ]
    );
    let statuses: Vec<Status> = run.rows.iter().map(|c| c.row.status).collect();
    assert_eq!(statuses, [Status::Agrees, Status::Agrees]);
    assert!(run.rows.iter().all(|c| c.likely_cause.is_none()));
    let notes: Vec<(Severity, &str, &str)> = run
        .notes
        .iter()
        .map(|p| (p.severity, p.position.cell.as_str(), p.found.as_str()))
        .collect();
    assert_eq!(
        notes,
        [
            (
                Severity::Warning,
                "A5",
                "a statement period 2026-12-01..2026-12-31 ending after the cut-off 2026-11-30"
            ),
            (
                Severity::Note,
                "A2",
                "2 statement rows for 2026-11-01..2026-11-30"
            ),
        ]
    );
}

/// Section 9: only rows over- or under-posted get a likely cause.
#[test]
fn only_rows_outside_tolerance_get_a_likely_cause() {
    let (e, r, f) = (entry(), rates(), Fixings::new());
    let rows = [
        row("2026-10-01", "2026-10-31", "3.66", "A2"),
        row("2026-11-01", "2026-11-30", "3.40", "A3"),
    ];
    let refs: Vec<&StatementRow> = rows.iter().collect();
    let run = run_account(&account(&e, &r, &f, &refs), &options()).unwrap();
    assert_eq!(run.rows.len(), 2);
    assert_eq!(run.rows[0].row.status, Status::Agrees);
    assert_eq!(run.rows[0].likely_cause, None);
    assert_eq!(run.rows[1].row.status, Status::UnderPosted);
    let cause = run.rows[1].likely_cause.as_ref().unwrap().text();
    assert!(!cause.is_empty());
}

/// Section 10: a fixing the `last` fallback stood in for is a warning on
/// the account's row, naming the date and the fixing used.
#[test]
fn a_fixing_stood_in_for_is_a_warning() {
    let mut e = entry();
    e.terms.floating = FloatingTerms {
        method: RateMethod::SimpleDaily,
        ..FloatingTerms::default()
    };
    let schedule = FloatingSchedule::from_rows([(
        d("2026-01-01"),
        TierRate::Index(IndexRate {
            index: "HVM-ON".into(),
            spread: n("0.01"),
            floor: None,
            cap: None,
        }),
        Decimal::ZERO,
    )]);
    // Fixings up to Friday 27 November: the weekend takes Friday's, and
    // Monday 30 November's is not published yet.
    let mut series = BTreeMap::new();
    let mut day = d("2026-09-01");
    while day <= d("2026-11-27") {
        series.insert(day, n("0.04"));
        day = day.succ_opt().unwrap();
    }
    let fixings = Fixings::from([("HVM-ON".to_string(), series)]);
    let empty = RateSchedule::default();
    let mut a = account(&e, &empty, &fixings, &[]);
    a.rates = None;
    a.floating = Some(&schedule);
    let failed = run_account(&a, &options()).unwrap_err();
    assert!(
        matches!(failed.error, EngineError::MissingFixing { .. }),
        "{:?}",
        failed.error
    );
    let last = Options {
        fixing_fallback: FixingFallback::Last,
        ..options()
    };
    let run = run_account(&a, &last).unwrap();
    assert_eq!(run.notes.len(), 1, "{:?}", run.notes);
    let w = &run.notes[0];
    assert_eq!(w.severity, Severity::Warning);
    assert!(
        w.found
            .starts_with("account PL-1: 1 missing HVM-ON fixing: 2026-11-30 (used 2026-11-27)"),
        "{w}"
    );
}
