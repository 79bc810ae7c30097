//! Writer tests that need the internal limits: continuation sheets with a
//! small row limit, the chart's references, the text-figure note.

use std::str::FromStr;

use calamine::{open_workbook, Data, Reader, Xlsx};
use chrono::{Datelike, NaiveDate, NaiveDateTime};
use rust_decimal::Decimal;

use super::layout::{Limits, Styles};
use super::model::*;
use super::workbook::{
    write_report_with, AccrualsPlan, LineShape, Writer, DAILY_HEADER, JOURNAL_DETAIL_HEADER,
    JOURNAL_HEADER,
};
use super::ReportError;
use crate::engine::reconcile::Status;

fn dec(s: &str) -> Decimal {
    Decimal::from_str(s).unwrap()
}

fn day(d: u32) -> NaiveDate {
    NaiveDate::from_ymd_opt(2024, 3, d).unwrap()
}

fn facts() -> RunFacts {
    RunFacts {
        program: "ledgerate 0.1.0".into(),
        command_line: "ledgerate run book.xlsx".into(),
        inputs: vec![],
        settings: vec![],
        run_time: NaiveDateTime::parse_from_str("2024-04-01 09:30:00", "%Y-%m-%d %H:%M:%S")
            .unwrap(),
        cutoff: day(31),
        window_start: day(1),
        accounts_read: 1,
        accounts_computed: 1,
        accounts_left_out: 0,
        accounts_failed: 0,
    }
}

fn daily(n: u32) -> Vec<DailyLine> {
    (1..=n)
        .map(|d| DailyLine {
            account: "A-1".into(),
            minor_units: 2,
            date: day(d),
            balance: dec("1000.00"),
            base: dec("1000.00"),
            rate: dec("0.05"),
            day_fraction: Decimal::ONE / Decimal::from(360),
            interest: dec("0.1388888888888888888888888889"),
            accrued: Decimal::from(d) * dec("0.1388888888888888888888888889"),
        })
        .collect()
}

fn recon(status: &str, bp: Option<&str>) -> ReconciliationLine {
    let status = Status::ALL
        .into_iter()
        .find(|s| s.name() == status)
        .unwrap();
    if status == Status::StatementUnreadable {
        // No figures: the statement row's cells could not be read.
        return ReconciliationLine {
            account: "A-unreadable".into(),
            currency: "USD".into(),
            minor_units: 2,
            period_start: None,
            period_end: None,
            days: 0,
            balance_years: Decimal::ZERO,
            expected: Decimal::ZERO,
            posted: Decimal::ZERO,
            variance: Decimal::ZERO,
            variance_bp: None,
            status,
            likely_cause: "the statement row at Statements!C7 could not be read".into(),
            tax: None,
        };
    }
    ReconciliationLine {
        account: format!("A-{}", status.name()),
        currency: "USD".into(),
        minor_units: 2,
        period_start: Some(day(1)),
        period_end: Some(day(31)),
        days: 31,
        balance_years: dec("84.93"),
        expected: dec("4.25"),
        posted: dec("4.19"),
        variance: dec("-0.06"),
        variance_bp: bp.map(dec),
        status,
        likely_cause: String::new(),
        tax: None,
    }
}

fn report() -> Report {
    Report {
        facts: facts(),
        totals: vec![],
        left_out: vec![],
        accruals: vec![],
        reconciliation: vec![],
        accrued_check: vec![],
        tie_out: None,
        status_counts: vec![],
        largest_variances: vec![],
        journal: vec![],
        journal_detail: None,
        daily: None,
        problems: vec![],
    }
}

/// A Journal detail of two lines (USD and KWD) and `n` accounts on each,
/// every other account on the credit side.
fn detail(n: u32) -> JournalDetail {
    let line = |currency: &str, minor_units, gl: &str| DetailLine {
        date: day(31),
        entity: "HM".into(),
        currency: currency.into(),
        minor_units,
        gl_account: gl.into(),
        memo: "interest accrued 2024-03-01..2024-03-31".into(),
    };
    let mut d = JournalDetail {
        lines: vec![line("USD", 2, "6100"), line("KWD", 3, "2300")],
        ..JournalDetail::default()
    };
    for i in 0..n {
        d.accounts.push(&format!("A-{i}")).unwrap();
    }
    for (l, amount) in [(0, "12.50"), (1, "-0.125")] {
        for i in 0..n {
            let sign = if i % 2 == 0 { "" } else { "-" };
            d.rows.push(DetailRow {
                line: l,
                account: i,
                amount: dec(&format!("{sign}{}", amount.trim_start_matches('-'))),
            });
        }
    }
    d
}

fn sheet_names(path: &std::path::Path) -> Vec<String> {
    let wb: Xlsx<_> = open_workbook(path).unwrap();
    wb.sheet_names()
}

fn rows(path: &std::path::Path, sheet: &str) -> Vec<Vec<Data>> {
    let mut wb: Xlsx<_> = open_workbook(path).unwrap();
    let range = wb.worksheet_range(sheet).unwrap();
    range.rows().map(|r| r.to_vec()).collect()
}

fn header(rows: &[Vec<Data>]) -> Vec<String> {
    rows[0].iter().map(|d| d.to_string()).collect()
}

#[test]
fn a_long_list_continues_on_numbered_sheets_with_the_header_repeated() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let mut r = report();
    r.daily = Some(daily(7));
    let limits = Limits {
        rows_per_sheet: 4, // header + 3 rows
        ..Limits::default()
    };
    let outcome = write_report_with(&r, &target, &limits).unwrap();
    assert_eq!(
        sheet_names(&target),
        vec!["Summary", "Accruals", "Journal", "Daily", "Daily 2", "Daily 3", "Problems", "Run"]
    );
    let counts: Vec<(String, usize)> = outcome
        .sheets
        .iter()
        .map(|s| (s.name.clone(), s.rows))
        .collect();
    assert_eq!(
        &counts[3..6],
        &[
            ("Daily".into(), 3),
            ("Daily 2".into(), 3),
            ("Daily 3".into(), 1)
        ]
    );

    let mut dates = Vec::new();
    for sheet in ["Daily", "Daily 2", "Daily 3"] {
        let rows = rows(&target, sheet);
        assert_eq!(header(&rows), DAILY_HEADER, "{sheet}");
        for row in &rows[1..] {
            match &row[1] {
                Data::DateTime(d) => dates.push(d.as_datetime().unwrap().date()),
                other => panic!("{sheet}: date cell is {other:?}"),
            }
        }
    }
    // Every row once, in order: nothing truncated, nothing repeated.
    assert_eq!(dates, (1..=7).map(day).collect::<Vec<_>>());
}

/// The Journal detail comes right after Journal and continues on numbered
/// sheets like every long list; each row is a debit or a credit.
#[test]
fn the_journal_detail_follows_the_journal_and_continues_on_numbered_sheets() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let mut r = report();
    r.journal_detail = Some(detail(3));
    let limits = Limits {
        rows_per_sheet: 5, // header + 4 rows
        ..Limits::default()
    };
    write_report_with(&r, &target, &limits).unwrap();
    assert_eq!(
        sheet_names(&target),
        vec![
            "Summary",
            "Accruals",
            "Journal",
            "Journal detail",
            "Journal detail 2",
            "Problems",
            "Run"
        ]
    );
    let first = rows(&target, "Journal detail");
    assert_eq!(header(&first), JOURNAL_DETAIL_HEADER);
    assert_eq!(first.len(), 5);
    let second = rows(&target, "Journal detail 2");
    assert_eq!(header(&second), JOURNAL_DETAIL_HEADER);
    assert_eq!(second.len(), 3);
    // A-1 is on the credit side of the USD line: 12.50 in Credit, 0 in Debit.
    let a1 = &first[2];
    assert_eq!(a1[5], Data::String("A-1".into()));
    assert_eq!(
        (a1[6].clone(), a1[7].clone()),
        (Data::Float(0.0), Data::Float(12.5))
    );
    assert!(matches!(a1[0], Data::DateTime(_)), "{:?}", a1[0]);
}

#[test]
fn an_empty_list_still_gets_its_sheet_and_header() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let limits = Limits {
        rows_per_sheet: 4,
        ..Limits::default()
    };
    write_report_with(&report(), &target, &limits).unwrap();
    let journal = rows(&target, "Journal");
    assert_eq!(journal.len(), 1);
    assert_eq!(header(&journal), JOURNAL_HEADER);
}

#[test]
fn the_chart_takes_the_rows_outside_tolerance_of_the_first_sheet_that_has_them() {
    let lines = vec![
        recon("agrees", Some("0")),
        recon("under-posted", Some("-7.06")),
        recon("over-posted", Some("3.5")),
        recon("within tolerance", Some("0.2")),
        recon("under-posted", Some("-1.25")),
        recon("unexpected posting", None), // no bp: not charted
        recon("under-posted", Some("-2")),
    ];
    let limits = Limits::default();
    let plan = super::workbook::chart_plan_for_tests(&lines, &limits).unwrap();
    assert_eq!(plan.0, "Reconciliation");
    assert_eq!(
        plan.1,
        "=(Reconciliation!$J$3:$J$4,Reconciliation!$J$6,Reconciliation!$J$8)"
    );
    assert_eq!((plan.2, plan.3), (4, 4));

    // With three rows a sheet, the first outside row is on the first sheet and
    // the chart stays there.
    let small = Limits {
        rows_per_sheet: 4,
        chart_points: 40,
        fill_in_turn: false,
    };
    let plan = super::workbook::chart_plan_for_tests(&lines, &small).unwrap();
    assert_eq!(plan.1, "Reconciliation!$J$3:$J$4");
    assert_eq!((plan.2, plan.3), (2, 4));

    let capped = Limits {
        chart_points: 1,
        ..Limits::default()
    };
    let plan = super::workbook::chart_plan_for_tests(&lines, &capped).unwrap();
    assert_eq!(plan.1, "Reconciliation!$J$3");
    assert_eq!((plan.2, plan.3), (1, 4));

    assert!(super::workbook::chart_plan_for_tests(&lines[..1], &limits).is_none());
}

#[test]
fn a_chart_reference_never_passes_the_series_limit() {
    // Every other row outside tolerance: one run per row.
    let lines: Vec<ReconciliationLine> = (0..200)
        .map(|i| {
            if i % 2 == 0 {
                recon("under-posted", Some("-1"))
            } else {
                recon("agrees", Some("0"))
            }
        })
        .collect();
    let plan = super::workbook::chart_plan_for_tests(&lines, &Limits::default()).unwrap();
    assert!(plan.1.len() <= 255, "{}", plan.1.len());
    assert!(plan.2 > 5 && plan.2 < 100, "{}", plan.2);
    assert_eq!(plan.3, 100);
}

#[test]
fn the_workbook_with_a_chart_is_written_and_its_rows_read_back() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let mut r = report();
    r.reconciliation = vec![
        recon("under-posted", Some("-7.06")),
        recon("agrees", Some("0")),
        recon("over-posted", Some("3.5")),
    ];
    r.status_counts = vec![
        StatusCount {
            status: Status::Agrees,
            rows: 1,
        },
        StatusCount {
            status: Status::UnderPosted,
            rows: 1,
        },
        StatusCount {
            status: Status::OverPosted,
            rows: 1,
        },
    ];
    let limits = Limits {
        rows_per_sheet: 3,
        ..Limits::default()
    };
    write_report_with(&r, &target, &limits).unwrap();
    assert_eq!(
        sheet_names(&target),
        vec![
            "Summary",
            "Accruals",
            "Reconciliation",
            "Reconciliation 2",
            "Journal",
            "Problems",
            "Run"
        ]
    );
    let second = rows(&target, "Reconciliation 2");
    assert_eq!(second[1][10], Data::String("over-posted".into()));
    assert_eq!(second[1][9], Data::Float(3.5));
    // The chart is in the package and points at the first Reconciliation sheet.
    let bytes = std::fs::read(&target).unwrap();
    let mut zip = zip_entry(&bytes, "xl/charts/chart1.xml");
    assert!(zip.contains("Reconciliation!$J$2"), "{zip}");
    zip.clear();
}

/// The text of one member of an xlsx package (stored or deflated).
fn zip_entry(bytes: &[u8], name: &str) -> String {
    use std::io::Read;
    let mut archive = zip::ZipArchive::new(std::io::Cursor::new(bytes)).unwrap();
    let mut s = String::new();
    archive
        .by_name(name)
        .unwrap()
        .read_to_string(&mut s)
        .unwrap();
    s
}

#[test]
fn figures_written_as_text_are_noted_once_in_problems_and_counted_in_the_summary() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let mut r = report();
    let mut lines = daily(2);
    for l in &mut lines {
        l.balance = dec("1000000000000000.55");
    }
    r.daily = Some(lines);
    let outcome = write_report_with(&r, &target, &Limits::default()).unwrap();
    assert!(outcome.text_figure_count >= 2);
    assert_eq!(outcome.text_figures[0].sheet, "Daily");
    assert_eq!(outcome.text_figures[0].cell, "C2");
    assert_eq!(outcome.text_figures[0].text, "1,000,000,000,000,000.55");

    let problems = rows(&target, "Problems");
    assert_eq!(problems.len(), 2, "one note row");
    assert_eq!(problems[1][0], Data::String("warning".into()));
    assert_eq!(problems[1][1], Data::String("out.xlsx".into()));
    assert_eq!(problems[1][2], Data::String("Daily".into()));
    assert_eq!(problems[1][3], Data::String("C2".into()));
    assert_eq!(
        problems[1][4],
        Data::String("1,000,000,000,000,000.55".into())
    );
    let fix = problems[1][6].to_string();
    assert!(fix.contains("Daily!C2"), "{fix}");
    assert_eq!(
        outcome.text_figure_problem.as_ref().map(|p| p.fix.clone()),
        Some(fix)
    );

    let summary = rows(&target, "Summary");
    let value_of = |label: &str| {
        summary
            .iter()
            .find(|r| r[0] == Data::String(label.into()))
            .map(|r| r[1].clone())
            .unwrap()
    };
    assert_eq!(value_of("Problems: warnings"), Data::Float(1.0));
    assert_eq!(
        value_of("Figures written as text"),
        Data::Float(outcome.text_figure_count as f64)
    );
}

fn accrual(account: &str, currency: &'static str, minor_units: u32, balance: &str) -> AccrualLine {
    AccrualLine {
        account: account.into(),
        name: format!("account {account}"),
        currency: currency.into(),
        minor_units,
        side: "liability".into(),
        day_count: "ACT/365F".into(),
        compounding: "simple".into(),
        balance_at_cutoff: dec(balance),
        accrued_at_cutoff: dec("3.1"),
        posted_in_window: dec("-12"),
        interest_for_window: dec("0.25"),
        effective_annual_rate: Some(dec("0.0512")),
        ledger: Default::default(),
        tax: None,
        suspense: None,
        life: None,
    }
}

/// Every row the writer writes reads back as it was: continuation sheets,
/// figures written as text, statuses, dates, problems and the Run sheet.
#[test]
fn a_written_workbook_reads_back_into_the_rows_it_was_written_from() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("shard.xlsx");
    let mut r = report();
    r.facts.inputs = vec![InputFile {
        path: "book.xlsx".into(),
        size: 12_345,
        sha256: "ab".repeat(32),
    }];
    r.facts.settings = vec![
        Setting {
            name: "cutoff".into(),
            value: "2024-03-31".into(),
            source: SettingSource::Option,
        },
        Setting {
            name: "window_start".into(),
            value: "2024-03-01".into(),
            source: SettingSource::Default,
        },
        Setting {
            name: "entity".into(),
            value: "HM".into(),
            source: SettingSource::Book,
        },
    ];
    r.facts.accounts_read = 7;
    r.facts.accounts_computed = 4;
    r.facts.accounts_left_out = 2;
    r.facts.accounts_failed = 1;
    let at = |sheet: &str, cell: &str| crate::problem::Position {
        book: "book.xlsx".into(),
        sheet: sheet.into(),
        cell: cell.into(),
        ..Default::default()
    };
    r.left_out = vec![
        crate::report::model::LeftOutLine {
            account: "A-5".into(),
            position: at("Accounts", "D6"),
            error: "found '31/02/2024'; expected a date; correct the date".into(),
        },
        crate::report::model::LeftOutLine {
            account: "A-6".into(),
            position: at("Movements", "C3"),
            error: "found 'x'; expected an amount; correct the amount".into(),
        },
        crate::report::model::LeftOutLine {
            account: "A-7".into(),
            position: at("Accounts", "A8"),
            error: "found 'no Rates rows'; expected rates; add them".into(),
        },
    ];
    let mut text_figure = accrual("A-BIG", "USD", 2, "1000000000000000.55");
    text_figure.effective_annual_rate = None;
    r.accruals = vec![
        accrual("A-1", "USD", 2, "1000.00"),
        accrual("A-2", "JPY", 0, "5000000"),
        accrual("A-3", "KWD", 3, "-1250.125"),
        text_figure,
    ];
    r.reconciliation = Status::ALL
        .iter()
        .map(|s| recon(s.name(), Some("-7.06")))
        .collect();
    r.journal = vec![JournalLine {
        date: day(31),
        entity: "HM".into(),
        currency: "USD".into(),
        minor_units: 2,
        gl_account: "2100".into(),
        debit: dec("0"),
        credit: dec("4.25"),
        memo: "interest accrued".into(),
    }];
    // Intermediates of at most 15 digits: longer ones are shown rounded.
    let mut days = daily(5);
    for l in &mut days {
        l.day_fraction = dec("0.002777777777778");
        l.interest = dec("0.138888888888889");
        l.accrued = l.interest * Decimal::from(l.date.day0() + 1);
    }
    r.daily = Some(days);
    r.journal_detail = Some(detail(2));
    r.problems = vec![crate::problem::Problem {
        severity: crate::problem::Severity::Warning,
        position: crate::problem::Position {
            book: "book.xlsx".into(),
            sheet: "Accounts".into(),
            cell: "C7".into(),
            ..Default::default()
        },
        account: Some("A-1".into()),
        found: "'x'".into(),
        expected: "a name".into(),
        fix: "type one".into(),
        follows: None,
    }];
    let limits = Limits {
        rows_per_sheet: 3,
        ..Limits::default()
    };
    let outcome = write_report_with(&r, &target, &limits).unwrap();
    assert!(
        outcome.text_figure_count > 0,
        "the writer's note is left out"
    );

    let back = super::readback::read_workbook(&target).unwrap();
    assert_eq!(back.facts, r.facts);
    assert_eq!(back.accruals, r.accruals);
    assert_eq!(back.reconciliation, r.reconciliation);
    assert_eq!(back.accrued_check, []);
    assert_eq!(back.tie_out, None);
    assert_eq!(back.journal, r.journal);
    assert_eq!(back.journal_detail, r.journal_detail);
    assert_eq!(back.daily, r.daily);
    assert_eq!(back.problems, r.problems);
    assert_eq!(back.left_out, r.left_out);
    // Amounts come back with the currency's places, as the totals add them.
    assert_eq!(back.accruals[0].balance_at_cutoff.to_string(), "1000.00");
    assert_eq!(back.accruals[2].accrued_at_cutoff.to_string(), "3.100");
}

#[test]
fn a_workbook_the_writer_did_not_write_is_refused_naming_the_sheet() {
    let dir = tempfile::tempdir().unwrap();
    let template = dir.path().join("template.xlsx");
    super::write_template(&template).unwrap();
    let err = super::readback::read_workbook(&template).unwrap_err();
    match &err {
        super::ReportError::NotWritten { sheet, found, .. } => {
            assert_eq!((sheet.as_str(), found.as_str()), ("Run", "no such sheet"));
        }
        other => panic!("{other}"),
    }
    assert!(err
        .to_string()
        .contains("merge only takes workbooks written by"));

    // A status word the writer never writes names its cell.
    let target = dir.path().join("shard.xlsx");
    let mut r = report();
    r.facts.settings = ["cutoff", "window_start"]
        .iter()
        .map(|name| Setting {
            name: (*name).into(),
            value: "2024-03-31".into(),
            source: SettingSource::Option,
        })
        .collect();
    r.reconciliation = vec![recon("agrees", None)];
    write_report_with(&r, &target, &Limits::default()).unwrap();
    let shard = std::fs::read(&target).unwrap();
    let edited = replace_in_zip(&shard, "agrees", "agreed");
    std::fs::write(&target, edited).unwrap();
    let err = super::readback::read_workbook(&target).unwrap_err();
    match &err {
        super::ReportError::NotWritten {
            sheet, cell, found, ..
        } => assert_eq!(
            (sheet.as_str(), cell.as_str(), found.as_str()),
            ("Reconciliation", "K2", "agreed")
        ),
        other => panic!("{other}"),
    }
}

/// The package with the cell text `from` replaced by `to` on every sheet.
fn replace_in_zip(bytes: &[u8], from: &str, to: &str) -> Vec<u8> {
    use std::io::{Read, Write};
    let mut archive = zip::ZipArchive::new(std::io::Cursor::new(bytes)).unwrap();
    let mut out = zip::ZipWriter::new(std::io::Cursor::new(Vec::new()));
    for i in 0..archive.len() {
        let mut entry = archive.by_index(i).unwrap();
        let name = entry.name().unwrap().to_string();
        let mut content = Vec::new();
        entry.read_to_end(&mut content).unwrap();
        if name.ends_with(".xml") {
            content = String::from_utf8(content)
                .unwrap()
                .replace(&format!(">{from}<"), &format!(">{to}<"))
                .into_bytes();
        }
        out.start_file(name, zip::write::SimpleFileOptions::default())
            .unwrap();
        out.write_all(&content).unwrap();
    }
    out.finish().unwrap().into_inner()
}

/// The words of the statuses in the workbook (semantics section 9), each
/// with its own fill, and which of them the chart counts as outside tolerance.
#[test]
fn each_status_is_written_as_its_word() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let mut r = report();
    r.reconciliation = Status::ALL
        .iter()
        .map(|s| recon(s.name(), Some("1")))
        .collect();
    write_report_with(&r, &target, &Limits::default()).unwrap();
    let words: Vec<String> = rows(&target, "Reconciliation")[1..]
        .iter()
        .map(|row| row[10].to_string())
        .collect();
    assert_eq!(
        words,
        [
            "agrees",
            "within tolerance",
            "over-posted",
            "under-posted",
            "not posted",
            "unexpected posting",
            "statement unreadable"
        ]
    );
    // The unreadable statement row has no figures: its cells are blank.
    let last = rows(&target, "Reconciliation").pop().unwrap();
    assert!(
        (2..=9).all(|col| last.get(col).is_none_or(|d| *d == Data::Empty)),
        "{last:?}"
    );
    let plan = super::workbook::chart_plan_for_tests(&r.reconciliation, &Limits::default());
    // Rows 4 to 7 (over-posted .. unexpected posting) are charted.
    assert_eq!(plan.unwrap().1, "Reconciliation!$J$4:$J$7");
}

/// An account's ledger figures and GL codes, as the batch gives them.
fn ledger(entity: &str, gl: &str, opening: &str, open_item: &str) -> LedgerLine {
    LedgerLine {
        entity: entity.to_string().into(),
        gl_interest: "INTEREST-EXPENSE".into(),
        gl_accrued: gl.to_string().into(),
        gl_settlement: "CUSTOMER-DEPOSITS".into(),
        gl_prior_period: "PRIOR-PERIOD-INTEREST".into(),
        window_days_interest: dec("410.43"),
        booked_opening: dec(opening),
        opening_source: "previous close".into(),
        prior_period: dec("43.8"),
        open_item: dec(open_item),
        settled_in_window: dec("310"),
    }
}

/// One Tie-out row: opening per TB and sub-ledger, interest, settled,
/// closing per sub-ledger and per TB; the rest follows from them.
fn tie(
    gl: &str,
    currency: &str,
    minor_units: u32,
    figures: [&str; 5],
    closing_tb: Option<&str>,
) -> TieOutLine {
    let [tb, sub, interest, settled, closing] = figures.map(dec);
    let roll = tb + interest - settled;
    let closing_tb = closing_tb.map(dec);
    let difference = closing_tb.unwrap_or(roll) - closing;
    TieOutLine {
        entity: "Harbourview Mutual".into(),
        currency: currency.into(),
        minor_units,
        gl_account: gl.into(),
        side: "liability".into(),
        accounts: 3,
        opening_tb: tb,
        opening_sub_ledger: sub,
        opening_difference: tb - sub,
        interest_for_window: interest,
        settled_in_window: settled,
        closing_roll_forward: roll,
        closing_sub_ledger: closing,
        closing_tb,
        closing_difference: difference,
        status: if difference.is_zero() {
            TieStatus::Agrees
        } else {
            TieStatus::Differs
        },
    }
}

/// An accrued check row (behaviour.md, example A3): TD-3's open item at
/// cut-off, booked 3,285.00 against 3,321.50 expected.
fn accrued_check() -> ReconciliationLine {
    ReconciliationLine {
        account: "TD-3".into(),
        currency: "USD".into(),
        minor_units: 2,
        period_start: Some(NaiveDate::from_ymd_opt(2026, 9, 1).unwrap()),
        period_end: Some(NaiveDate::from_ymd_opt(2026, 11, 30).unwrap()),
        days: 91,
        balance_years: dec("91000"),
        expected: dec("3321.50"),
        posted: dec("3285.00"),
        variance: dec("-36.50"),
        variance_bp: Some(dec("-4.011")),
        status: Status::UnderPosted,
        likely_cause: "period start a day late: 2026-09-02..2026-11-30 instead of \
                       2026-09-01..2026-11-30 (reproduces the booked amount exactly)"
            .into(),
        tax: None,
    }
}

/// Output workbook: Accrued check right after Reconciliation, then the
/// Tie-out, before the Journal; each only when it has something to show.
#[test]
fn the_accrued_check_and_tie_out_sheets_come_after_reconciliation_when_there_is_something_to_show()
{
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let mut r = report();
    r.reconciliation = vec![recon("agrees", Some("0"))];
    r.accrued_check = vec![accrued_check()];
    r.tie_out = Some(vec![tie(
        "ACCRUED-INTEREST-PAYABLE",
        "USD",
        2,
        ["310.00", "310.00", "454.23", "310.00", "454.23"],
        None,
    )]);
    write_report_with(&r, &target, &Limits::default()).unwrap();
    assert_eq!(
        sheet_names(&target),
        vec![
            "Summary",
            "Accruals",
            "Reconciliation",
            "Accrued check",
            "Tie-out",
            "Journal",
            "Problems",
            "Run"
        ]
    );
    let check = rows(&target, "Accrued check");
    assert_eq!(header(&check), super::workbook::ACCRUED_CHECK_HEADER);
    assert_eq!(check[1][7], Data::Float(3285.0));
    assert_eq!(check[1][10], Data::String("under-posted".into()));
    let tie_out = rows(&target, "Tie-out");
    assert_eq!(header(&tie_out), super::workbook::TIE_OUT_HEADER);
    assert_eq!(
        tie_out[1][12],
        Data::Empty,
        "no closing trial balance: blank"
    );
    assert_eq!(tie_out[1][14], Data::String("agrees".into()));

    // No Booked row at the cut-off, no trial balance: neither sheet.
    r.accrued_check.clear();
    r.tie_out = None;
    write_report_with(&r, &target, &Limits::default()).unwrap();
    let names = sheet_names(&target);
    assert!(
        !names.iter().any(|n| n == "Accrued check" || n == "Tie-out"),
        "{names:?}"
    );

    // A trial balance that no account's GL account meets: the sheet and its header.
    r.tie_out = Some(vec![]);
    write_report_with(&r, &target, &Limits::default()).unwrap();
    assert_eq!(
        header(&rows(&target, "Tie-out")),
        super::workbook::TIE_OUT_HEADER
    );
}

/// The Summary says in one line how the Tie-out stands.
#[test]
fn the_summary_says_how_the_tie_out_stands() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let mut r = report();
    let agrees = ["310.00", "310.00", "454.23", "310.00", "454.23"];
    r.tie_out = Some(vec![
        tie("2300", "USD", 2, agrees, None),
        tie("2310", "USD", 2, agrees, Some("454.24")),
        tie("2320", "USD", 2, agrees, None),
    ]);
    write_report_with(&r, &target, &Limits::default()).unwrap();
    let summary = rows(&target, "Summary");
    let line = |label: &str| {
        summary
            .iter()
            .find(|row| row[0] == Data::String(label.into()))
            .map(|row| row[1].clone())
    };
    assert_eq!(
        line("Tie-out"),
        Some(Data::String("3 GL accounts: 1 differs, 2 agree".into()))
    );
    // The counts around it are still labelled and filled in.
    assert_eq!(line("Accounts left out by errors"), Some(Data::Float(0.0)));
    assert_eq!(line("Problems: errors"), Some(Data::Float(0.0)));
    r.tie_out = None;
    write_report_with(&r, &target, &Limits::default()).unwrap();
    assert_eq!(
        rows(&target, "Summary")
            .iter()
            .find(|row| row[0] == Data::String("Tie-out".into())),
        None
    );
}

/// The Accruals' ledger columns, the Accrued check and the Tie-out read
/// back as they were written, over continuation sheets, a blank closing
/// trial balance and a figure written as text.
#[test]
fn ledger_columns_accrued_check_and_tie_out_read_back_as_written() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("shard.xlsx");
    let mut r = report();
    r.facts.settings = ["cutoff", "window_start"]
        .iter()
        .map(|name| Setting {
            name: (*name).into(),
            value: "2024-03-31".into(),
            source: SettingSource::Option,
        })
        .collect();
    let mut usd = accrual("A-1", "USD", 2, "136810.00");
    usd.ledger = ledger("HM", "ACCRUED-INTEREST-PAYABLE", "310.00", "454.23");
    let mut kwd = accrual("A-2", "KWD", 3, "-1250.125");
    kwd.ledger = ledger("HM Gulf", "1400", "1.125", "2.250");
    kwd.ledger.opening_source = "Booked row".into();
    let mut jpy = accrual("A-3", "JPY", 0, "5000000");
    jpy.ledger = ledger("HM", "2300", "0", "411");
    jpy.ledger.opening_source = "opens in window".into();
    jpy.ledger.prior_period = dec("0");
    r.accruals = vec![usd, kwd, jpy];
    r.facts.accounts_computed = 3;
    r.facts.accounts_read = 3;
    let mut second = accrued_check();
    second.account = "TD-4".into();
    second.status = Status::Agrees;
    second.likely_cause = String::new();
    r.accrued_check = vec![accrued_check(), second.clone(), second];
    r.tie_out = Some(vec![
        tie(
            "ACCRUED-INTEREST-PAYABLE",
            "USD",
            2,
            ["310.00", "310.00", "454.23", "310.00", "454.23"],
            Some("454.23"),
        ),
        tie("2300", "JPY", 0, ["0", "0", "411", "0", "411"], None),
        tie(
            "2300",
            "USD",
            2,
            ["1000000000000000.55", "0.00", "1.00", "0.00", "1.00"],
            None,
        ),
    ]);
    let limits = Limits {
        rows_per_sheet: 3,
        ..Limits::default()
    };
    let outcome = write_report_with(&r, &target, &limits).unwrap();
    let names: Vec<&str> = outcome.sheets.iter().map(|s| s.name.as_str()).collect();
    assert!(
        names.contains(&"Accrued check 2") && names.contains(&"Tie-out 2"),
        "{names:?}"
    );
    assert!(outcome
        .text_figures
        .iter()
        .any(|t| t.sheet == "Tie-out 2" && t.text == "1,000,000,000,000,000.55"));

    let back = super::readback::read_workbook(&target).unwrap();
    assert_eq!(back.accruals, r.accruals);
    assert_eq!(back.accrued_check, r.accrued_check);
    assert_eq!(back.tie_out, r.tie_out);
    // Amounts come back with the currency's places.
    assert_eq!(back.accruals[1].ledger.booked_opening.to_string(), "1.125");
    assert_eq!(
        back.accruals[0].ledger.settled_in_window.to_string(),
        "310.00"
    );
}

/// A Tie-out status word the writer never writes names its cell.
#[test]
fn a_tie_out_status_the_writer_never_writes_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("shard.xlsx");
    let mut r = report();
    r.facts.settings = ["cutoff", "window_start"]
        .iter()
        .map(|name| Setting {
            name: (*name).into(),
            value: "2024-03-31".into(),
            source: SettingSource::Option,
        })
        .collect();
    r.tie_out = Some(vec![tie(
        "2300",
        "USD",
        2,
        ["1.00", "1.00", "0.00", "0.00", "1.00"],
        None,
    )]);
    write_report_with(&r, &target, &Limits::default()).unwrap();
    let edited = replace_in_zip(&std::fs::read(&target).unwrap(), "agrees", "ties");
    std::fs::write(&target, edited).unwrap();
    match super::readback::read_workbook(&target).unwrap_err() {
        super::ReportError::NotWritten {
            sheet, cell, found, ..
        } => assert_eq!(
            (sheet.as_str(), cell.as_str(), found.as_str()),
            ("Tie-out", "O2", "ties")
        ),
        other => panic!("{other}"),
    }
}

/// Accruals lines of mixed minor units (so that each sheet's usual format
/// differs), some with a status and term and some taxed.
fn mixed_accruals() -> Vec<AccrualLine> {
    [
        ("USD", 2),
        ("JPY", 0),
        ("JPY", 0),
        ("KWD", 3),
        ("USD", 2),
        ("USD", 2),
        ("JPY", 0),
    ]
    .into_iter()
    .enumerate()
    .map(|(i, (currency, units))| {
        // A long figure early on the first sheet: its column stays that
        // wide when the sheet's later lines come in another part.
        let balance = if i == 1 { "123456789.5" } else { "1000" };
        let mut a = accrual(&format!("A-{i}"), currency, units, balance);
        a.life = Some(LifeLine {
            shown: true,
            status: "open".into(),
            days_since_maturity: None,
            term_start: Some(day(1)),
            maturity: (i % 2 == 0).then(|| day(30)),
        });
        if i % 3 == 0 {
            a.tax = Some(TaxLine {
                withheld: dec("2.40"),
                net_posted: dec("9.60"),
            });
        }
        a
    })
    .collect()
}

/// Write while accruing: a workbook whose Accruals lines come part by part
/// (parts that end inside a sheet and across the row limit) is byte for
/// byte the one written from all of them at once.
#[test]
fn accruals_written_part_by_part_give_the_workbook_written_whole() {
    let dir = tempfile::tempdir().unwrap();
    let limits = Limits {
        rows_per_sheet: 4, // header + 3 lines: Accruals, Accruals 2, Accruals 3
        ..Limits::default()
    };
    let mut r = report();
    r.accruals = mixed_accruals();
    let whole = dir.path().join("whole.xlsx");
    let outcome = write_report_with(&r, &whole, &limits).unwrap();

    let parted = dir.path().join("parted.xlsx");
    let styles = Styles::report();
    let mut plan = AccrualsPlan::new(&limits);
    for a in &r.accruals {
        plan.add(LineShape::of(a));
    }
    let mut writer = Writer::start(&parted, &r.facts, plan, &styles, &limits).unwrap();
    for part in [
        &r.accruals[..2],
        &r.accruals[2..2],
        &r.accruals[2..5],
        &r.accruals[5..],
    ] {
        writer.accruals(part).unwrap();
    }
    let lines = std::mem::take(&mut r.accruals);
    let parted_outcome = writer.finish(&r).unwrap();

    assert_eq!(
        std::fs::read(&whole).unwrap(),
        std::fs::read(&parted).unwrap()
    );
    assert_eq!(outcome.sheets[1..4], parted_outcome.sheets[1..4]);
    let names: Vec<&str> = outcome.sheets.iter().map(|s| s.name.as_str()).collect();
    assert_eq!(names[1..4], ["Accruals", "Accruals 2", "Accruals 3"]);
    // Each sheet's amounts carry the format most of its lines have: JPY's
    // none on the first (USD, JPY, JPY), USD's two on the second (KWD, USD,
    // USD), JPY's none on the third.
    assert_eq!(
        AccrualsPlan::of(&lines, &limits).usual_units(),
        vec![0, 2, 0]
    );
    let accounts: Vec<String> = ["Accruals", "Accruals 2", "Accruals 3"]
        .iter()
        .flat_map(|s| rows(&parted, s).into_iter().skip(1))
        .map(|row| row[0].to_string())
        .collect();
    assert_eq!(
        accounts,
        (0..7).map(|i| format!("A-{i}")).collect::<Vec<_>>()
    );
}

/// Lines that do not fit the layout decided before they came (here the
/// plan counted a taxed line that never came) leave no workbook and say
/// so, for the run to write it again whole.
#[test]
fn accruals_laid_out_for_lines_that_never_came_are_not_written() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("out.xlsx");
    let limits = Limits::default();
    let styles = Styles::report();
    let mut r = report();
    let lines = mixed_accruals();
    let plan = AccrualsPlan::of(&lines, &limits);
    let mut writer = Writer::start(&target, &r.facts, plan, &styles, &limits).unwrap();
    let untaxed: Vec<AccrualLine> = lines.into_iter().filter(|a| a.tax.is_none()).collect();
    writer.accruals(&untaxed).unwrap();
    r.facts.accounts_computed = untaxed.len();
    match writer.finish(&r) {
        Err(ReportError::PlanMissed(path)) => assert_eq!(path, target),
        other => panic!("expected the plan to miss, got {other:?}"),
    }
    assert!(!target.exists());
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
}

/// The list sheets after the Accruals are filled side by side, yet the
/// file is the one filling them one after another gives, byte for byte:
/// the spreadsheet numbers cell styles in order of first use, and here the
/// formats of later sheets (KWD's three decimals, JPY's none, the text
/// figure's) are first used deep in earlier sheets and again in the detail.
#[test]
fn list_sheets_filled_side_by_side_give_the_file_filled_in_turn() {
    let dir = tempfile::tempdir().unwrap();
    let mut r = report();
    let in_currency = |currency: &'static str, minor_units, expected: &str| ReconciliationLine {
        account: format!("A-{currency}"),
        currency: currency.into(),
        minor_units,
        expected: dec(expected),
        ..recon("agrees", Some("0.5"))
    };
    r.reconciliation = vec![
        recon("agrees", Some("0.5")),
        recon("under-posted", Some("-12.25")),
        recon("agrees", None),
        in_currency("KWD", 3, "4.125"),
        in_currency("JPY", 0, "425"),
        // Too many digits for a number: written as text and noted.
        in_currency("USD", 2, "1234567890123456.78"),
    ];
    let journal = |currency: &'static str, minor_units, amount: &str| JournalLine {
        date: day(31),
        entity: "HM".into(),
        currency: currency.into(),
        minor_units,
        gl_account: "6100".into(),
        debit: dec(amount),
        credit: Decimal::ZERO,
        memo: "interest accrued".into(),
    };
    r.journal = vec![
        journal("USD", 2, "12.50"),
        journal("JPY", 0, "425"),
        journal("KWD", 3, "4.125"),
    ];
    let mut d = detail(3);
    d.rows.push(DetailRow {
        line: 0,
        account: 0,
        amount: dec("98765432109876543.21"),
    });
    r.journal_detail = Some(d);
    r.daily = Some(daily(5));

    let mut outcomes = Vec::new();
    for fill_in_turn in [false, true] {
        let limits = Limits {
            rows_per_sheet: 3, // header + 2 rows
            fill_in_turn,
            ..Limits::default()
        };
        // The same file name both times: the Problems sheet names it.
        let folder = dir.path().join(format!("in-turn-{fill_in_turn}"));
        std::fs::create_dir(&folder).unwrap();
        let target = folder.join("out.xlsx");
        let outcome = write_report_with(&r, &target, &limits).unwrap();
        outcomes.push((std::fs::read(&target).unwrap(), outcome));
    }
    let (side_by_side, in_turn) = (&outcomes[0], &outcomes[1]);
    assert_eq!(side_by_side.1.sheets, in_turn.1.sheets);
    assert_eq!(side_by_side.1.text_figures, in_turn.1.text_figures);
    assert_eq!(side_by_side.1.text_figure_count, 2);
    let names: Vec<&str> = side_by_side
        .1
        .sheets
        .iter()
        .map(|s| s.name.as_str())
        .collect();
    assert!(names.contains(&"Reconciliation 3"), "{names:?}");
    assert!(names.contains(&"Journal detail 4"), "{names:?}");
    assert!(side_by_side.0 == in_turn.0, "the two files differ");
}
