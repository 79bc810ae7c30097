//! Writer tests that need the internal limits: continuation sheets with a
//! small row limit, the chart's references, the text-figure note.

use std::str::FromStr;

use calamine::{open_workbook, Data, Reader, Xlsx};
use chrono::{Datelike, NaiveDate, NaiveDateTime};
use rust_decimal::Decimal;

use super::layout::Limits;
use super::model::*;
use super::workbook::{write_report_with, DAILY_HEADER, JOURNAL_DETAIL_HEADER, JOURNAL_HEADER};
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
    ReconciliationLine {
        account: format!("A-{status}"),
        currency: "USD".into(),
        minor_units: 2,
        period_start: day(1),
        period_end: day(31),
        days: 31,
        balance_years: dec("84.93"),
        expected: dec("4.25"),
        posted: dec("4.19"),
        variance: dec("-0.06"),
        variance_bp: bp.map(dec),
        status: Status::ALL
            .into_iter()
            .find(|s| s.name() == status)
            .unwrap(),
        likely_cause: String::new(),
    }
}

fn report() -> Report {
    Report {
        facts: facts(),
        totals: vec![],
        accruals: vec![],
        reconciliation: vec![],
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
    r.facts.accounts_read = 5;
    r.facts.accounts_computed = 4;
    r.facts.accounts_failed = 1;
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
        account: None,
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
    assert_eq!(back.journal, r.journal);
    assert_eq!(back.journal_detail, r.journal_detail);
    assert_eq!(back.daily, r.daily);
    assert_eq!(back.problems, r.problems);
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
            "unexpected posting"
        ]
    );
    let plan = super::workbook::chart_plan_for_tests(&r.reconciliation, &Limits::default());
    // Rows 4 to 7 (over-posted .. unexpected posting) are charted.
    assert_eq!(plan.unwrap().1, "Reconciliation!$J$4:$J$7");
}
