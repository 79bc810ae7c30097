//! The reconciliation workbook and the template, written through the public
//! API and read back with calamine: sheet order, header labels, typed cells,
//! number formats, the 15-digit rule, byte identity and the atomic write.

use std::io::Read;
use std::path::Path;
use std::str::FromStr;

use calamine::{open_workbook, open_workbook_auto, Data, HorizontalAlignment, Reader, Xlsx};
use chrono::{NaiveDate, NaiveDateTime};
use ledgerate::engine::reconcile::Status;
use ledgerate::problem::{Position, Problem, Severity};
use ledgerate::report::model::*;
use ledgerate::report::{write_report, write_template, ReportError};
use ledgerate::schema::{SheetKind, SETTING_ROWS};
use rust_decimal::Decimal;
use sha2::{Digest, Sha256};

use crate::common::{date, dec};

/// A small report by hand: a USD savings account, a JPY deposit, a KWD loan
/// and a USD account with a balance beyond what a spreadsheet number holds.
fn report() -> Report {
    let facts = RunFacts {
        program: "ledgerate 0.1.0".into(),
        command_line: "ledgerate run harbourview.xlsx --cutoff 2024-03-31 -o out.xlsx".into(),
        inputs: vec![InputFile {
            path: "harbourview.xlsx".into(),
            size: 48_213,
            sha256: "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08".into(),
        }],
        settings: vec![
            Setting {
                name: "cutoff".into(),
                value: "2024-03-31".into(),
                source: SettingSource::Option,
            },
            Setting {
                name: "tolerance_amount".into(),
                value: "0.01".into(),
                source: SettingSource::Book,
            },
            Setting {
                name: "journal_style".into(),
                value: "incremental".into(),
                source: SettingSource::Default,
            },
        ],
        run_time: NaiveDateTime::parse_from_str("2024-04-02 07:45:10", "%Y-%m-%d %H:%M:%S")
            .unwrap(),
        cutoff: date("2024-03-31"),
        window_start: date("2024-03-01"),
        accounts_read: 5,
        accounts_computed: 4,
        accounts_left_out: 1,
        accounts_failed: 0,
    };
    let accrual =
        |account: &str, currency: &str, minor: u32, balance: &str, accrued: &str| AccrualLine {
            account: account.into(),
            name: format!("{account} name"),
            currency: currency.to_string().into(),
            minor_units: minor,
            side: "liability".into(),
            day_count: "ACT/365F".into(),
            compounding: "daily".into(),
            balance_at_cutoff: dec(balance),
            accrued_at_cutoff: dec(accrued),
            posted_in_window: dec("71.37"),
            interest_for_window: dec("-12.5"),
            effective_annual_rate: Some(dec("0.0330286")),
            ledger: Default::default(),
            tax: None,
            suspense: None,
            life: None,
        };
    let mut big = accrual("HM-BIG-001", "USD", 2, "1000000000000000.55", "0.00");
    big.effective_annual_rate = None;
    let recon = |account: &str,
                 expected: &str,
                 posted: &str,
                 variance: &str,
                 bp: Option<&str>,
                 status: &str| {
        ReconciliationLine {
            account: account.into(),
            currency: "USD".into(),
            minor_units: 2,
            period_start: Some(date("2024-03-01")),
            period_end: Some(date("2024-03-31")),
            days: 31,
            balance_years: dec("2.2054794520547945205479452055"),
            expected: dec(expected),
            posted: dec(posted),
            variance: dec(variance),
            variance_bp: bp.map(dec),
            status: Status::ALL
                .into_iter()
                .find(|s| s.name() == status)
                .unwrap(),
            likely_cause: if status == "under-posted" {
                "day count ACT/360 instead of ACT/365F reproduces the posted amount".into()
            } else {
                String::new()
            },
            tax: None,
        }
    };
    Report {
        facts,
        totals: vec![
            CurrencyTotal {
                currency: "JPY".into(),
                side: "liability".into(),
                minor_units: 0,
                accounts: 1,
                balance_at_cutoff: dec("5000000"),
                accrued_at_cutoff: dec("411"),
                posted_in_window: dec("0"),
                interest_for_window: dec("411"),
                prior_period: dec("0"),
                tax_withheld: None,
            },
            CurrencyTotal {
                currency: "USD".into(),
                side: "liability".into(),
                minor_units: 2,
                accounts: 2,
                balance_at_cutoff: dec("1000000000026500.55"),
                accrued_at_cutoff: dec("3.10"),
                posted_in_window: dec("71.37"),
                interest_for_window: dec("74.47"),
                prior_period: dec("-1.25"),
                tax_withheld: None,
            },
        ],
        left_out: vec![LeftOutLine {
            account: "HM-SAV-009".into(),
            position: Position {
                book: "harbourview.xlsx".into(),
                sheet: "Movements".into(),
                cell: "B7".into(),
                ..Position::default()
            },
            error: "found '2024-02-30'; expected a date; correct the value date".into(),
        }],
        accruals: vec![
            accrual("HM-SAV-001", "USD", 2, "26571.37", "3.10"),
            accrual("HM-TD-JPY", "JPY", 0, "5000000", "411"),
            accrual("HM-LN-KWD", "KWD", 3, "-1250.125", "-4.375"),
            big,
        ],
        reconciliation: vec![
            recon("HM-SAV-001", "71.37", "71.37", "0.00", Some("0"), "agrees"),
            recon(
                "HM-SAV-002",
                "45.20",
                "44.58",
                "-0.62",
                Some("-6.8493150684931506849315068493"),
                "under-posted",
            ),
            recon(
                "HM-SAV-003",
                "12.00",
                "12.01",
                "0.01",
                Some("0.45"),
                "within tolerance",
            ),
            recon(
                "HM-SAV-004",
                "10.00",
                "10.40",
                "0.40",
                Some("18.14"),
                "over-posted",
            ),
        ],
        accrued_check: vec![],
        tie_out: None,
        status_counts: vec![
            StatusCount {
                status: Status::Agrees,
                rows: 1,
            },
            StatusCount {
                status: Status::WithinTolerance,
                rows: 1,
            },
            StatusCount {
                status: Status::OverPosted,
                rows: 1,
            },
            StatusCount {
                status: Status::UnderPosted,
                rows: 1,
            },
        ],
        // USD rows outside tolerance, largest variance first.
        largest_variances: vec![1, 3],
        journal: vec![
            JournalLine {
                date: date("2024-03-31"),
                entity: "Harbourview Mutual".into(),
                currency: "USD".into(),
                minor_units: 2,
                gl_account: "5100-INT-EXP".into(),
                debit: dec("74.47"),
                credit: dec("0"),
                memo: "interest for March".into(),
            },
            JournalLine {
                date: date("2024-03-31"),
                entity: "Harbourview Mutual".into(),
                currency: "USD".into(),
                minor_units: 2,
                gl_account: "2310-ACCR-INT".into(),
                debit: dec("0"),
                credit: dec("74.47"),
                memo: "interest for March".into(),
            },
        ],
        journal_detail: None,
        daily: Some(vec![DailyLine {
            account: "HM-SAV-001".into(),
            minor_units: 2,
            date: date("2024-03-31"),
            balance: dec("26571.37"),
            base: dec("26574.4683561643835616438356"),
            rate: dec("0.0325"),
            day_fraction: Decimal::ONE / Decimal::from(365),
            interest: dec("2.3661432581699535516986712372"),
            accrued: dec("3.1012457"),
        }]),
        problems: vec![Problem {
            severity: Severity::Error,
            position: Position {
                book: "harbourview.xlsx".into(),
                sheet: "Accounts".into(),
                cell: "D7".into(),
                ..Position::default()
            },
            account: Some("HM-SAV-005".into()),
            found: "31/02/2024".into(),
            expected: "a date such as 2024-02-29".into(),
            fix: "type the date as YYYY-MM-DD or as a spreadsheet date".into(),
            follows: None,
        }],
    }
}

fn names(path: &Path) -> Vec<String> {
    let wb: Xlsx<_> = open_workbook(path).unwrap();
    wb.sheet_names()
}

fn sheet(path: &Path, name: &str) -> Vec<Vec<Data>> {
    let mut wb: Xlsx<_> = open_workbook(path).unwrap();
    let range = wb.worksheet_range(name).unwrap();
    assert_eq!(range.start(), Some((0, 0)), "{name} starts at A1");
    range.rows().map(|r| r.to_vec()).collect()
}

fn header(rows: &[Vec<Data>]) -> Vec<String> {
    rows[0].iter().map(|d| d.to_string()).collect()
}

/// A number cell read back as a decimal, the way a reader does it.
fn number(d: &Data) -> Decimal {
    match d {
        Data::Float(f) => Decimal::from_str(&f.to_string()).unwrap(),
        other => panic!("not a number: {other:?}"),
    }
}

fn day_of(d: &Data) -> NaiveDate {
    match d {
        Data::DateTime(x) if x.is_datetime() => x.as_datetime().unwrap().date(),
        other => panic!("not a date: {other:?}"),
    }
}

fn number_format(path: &Path, name: &str, row: u32, col: u32) -> String {
    let mut wb: Xlsx<_> = open_workbook(path).unwrap();
    let styles = wb.worksheet_style(name).unwrap();
    styles
        .get((row, col))
        .and_then(|s| s.number_format.clone())
        .map(|n| n.format_code)
        .unwrap_or_default()
}

fn zip_text(path: &Path, member: &str) -> String {
    let file = std::fs::File::open(path).unwrap();
    let mut zip = zip::ZipArchive::new(file).unwrap();
    let mut s = String::new();
    zip.by_name(member).unwrap().read_to_string(&mut s).unwrap();
    s
}

fn sha256(path: &Path) -> String {
    Sha256::digest(std::fs::read(path).unwrap())
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

fn write(report: &Report) -> (tempfile::TempDir, std::path::PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("reconciliation.xlsx");
    write_report(report, &target).unwrap();
    (dir, target)
}

#[test]
fn sheets_come_in_order_with_the_header_labels_of_the_spec() {
    let (_dir, target) = write(&report());
    assert_eq!(
        names(&target),
        vec![
            "Summary",
            "Accruals",
            "Reconciliation",
            "Journal",
            "Daily",
            "Problems",
            "Run"
        ]
    );
    let expect = [
        (
            "Accruals",
            vec![
                "Account",
                "Name",
                "Currency",
                "Side",
                "Day count",
                "Compounding",
                "Balance at cut-off",
                "Accrued at cut-off",
                "Posted in window",
                "Interest for window",
                "Effective annual rate",
                "Window days' interest",
                "Booked opening",
                "Opening from",
                "Prior-period adjustment",
                "Open item at cut-off",
                "Settled in window",
                "Entity",
                "GL interest",
                "GL accrued",
                "GL settlement",
                "GL prior period",
            ],
        ),
        (
            "Reconciliation",
            vec![
                "Account",
                "Currency",
                "Period start",
                "Period end",
                "Days",
                "Balance-years",
                "Expected",
                "Posted",
                "Variance",
                "Variance (bp)",
                "Status",
                "Likely cause",
            ],
        ),
        (
            "Journal",
            vec![
                "Date",
                "Entity",
                "Currency",
                "GL account",
                "Debit",
                "Credit",
                "Memo",
            ],
        ),
        (
            "Daily",
            vec![
                "Account",
                "Date",
                "Balance",
                "Base",
                "Rate",
                "Day fraction",
                "Interest",
                "Accrued",
            ],
        ),
        (
            "Problems",
            vec![
                "Severity", "Book", "Sheet", "Cell", "Found", "Expected", "Fix", "Account",
            ],
        ),
    ];
    for (name, labels) in expect {
        assert_eq!(header(&sheet(&target, name)), labels, "{name}");
        // Frozen header row and a filter over header and data.
        let xml = zip_text(
            &target,
            &format!("xl/worksheets/sheet{}.xml", sheet_index(&target, name)),
        );
        assert!(
            xml.contains(r#"ySplit="1""#) && xml.contains(r#"state="frozen""#),
            "{name} frozen"
        );
        assert!(xml.contains("<autoFilter ref=\"A1:"), "{name} filter");
        assert!(xml.contains("<cols>"), "{name} widths");
    }
}

/// 1-based position of a sheet in the package.
fn sheet_index(path: &Path, name: &str) -> usize {
    names(path).iter().position(|n| n == name).unwrap() + 1
}

#[test]
fn reconciliation_and_daily_sheets_appear_only_when_there_is_something_to_show() {
    let mut r = report();
    r.reconciliation.clear();
    r.status_counts.clear();
    r.daily = None;
    let (_dir, target) = write(&r);
    assert_eq!(
        names(&target),
        vec!["Summary", "Accruals", "Journal", "Problems", "Run"]
    );
    // Without rows outside tolerance there is no chart.
    let zip = zip::ZipArchive::new(std::fs::File::open(&target).unwrap()).unwrap();
    assert!(!zip
        .file_names()
        .any(|n| n.unwrap().starts_with("xl/charts/")));
}

#[test]
fn figures_arrive_typed_and_exact() {
    let (_dir, target) = write(&report());
    let acc = sheet(&target, "Accruals");
    assert_eq!(acc[1][0], Data::String("HM-SAV-001".into()));
    assert_eq!(number(&acc[1][6]), dec("26571.37"));
    assert_eq!(number(&acc[1][9]), dec("-12.5"));
    assert_eq!(number(&acc[1][10]), dec("0.0330286"));
    assert_eq!(number(&acc[2][6]), dec("5000000"));
    assert_eq!(number(&acc[3][6]), dec("-1250.125"));
    assert_eq!(number(&acc[3][7]), dec("-4.375"));
    // 10^15 with cents: 18 significant digits, so text with every digit.
    assert_eq!(acc[4][6], Data::String("1,000,000,000,000,000.55".into()));
    assert_eq!(acc[4][10], Data::Empty, "no rate: blank");

    let rec = sheet(&target, "Reconciliation");
    assert_eq!(day_of(&rec[2][2]), date("2024-03-01"));
    assert_eq!(day_of(&rec[2][3]), date("2024-03-31"));
    assert_eq!(number(&rec[2][4]), dec("31"));
    assert_eq!(number(&rec[2][8]), dec("-0.62"));
    // Basis points are not posted figures: shown to 15 significant digits.
    assert_eq!(number(&rec[2][9]), dec("-6.84931506849315"));
    assert_eq!(number(&rec[2][5]), dec("2.20547945205479"));
    assert_eq!(rec[2][10], Data::String("under-posted".into()));
    assert!(rec[2][11].to_string().contains("ACT/360"));
    assert_eq!(rec[1][11], Data::Empty);

    let journal = sheet(&target, "Journal");
    assert_eq!(day_of(&journal[1][0]), date("2024-03-31"));
    assert_eq!(number(&journal[1][4]), dec("74.47"));
    assert_eq!(number(&journal[1][5]), dec("0"));
    assert_eq!(number(&journal[2][5]), dec("74.47"));

    let daily = sheet(&target, "Daily");
    assert_eq!(day_of(&daily[1][1]), date("2024-03-31"));
    assert_eq!(number(&daily[1][2]), dec("26571.37"));
    assert_eq!(number(&daily[1][3]), dec("26574.4683561644"));
    assert_eq!(number(&daily[1][4]), dec("0.0325"));
    assert_eq!(number(&daily[1][5]), dec("0.00273972602739726"));
    assert_eq!(number(&daily[1][6]), dec("2.36614325816995"));
    assert_eq!(number(&daily[1][7]), dec("3.1012457"));

    let problems = sheet(&target, "Problems");
    assert_eq!(problems[1][0], Data::String("error".into()));
    assert_eq!(problems[1][3], Data::String("D7".into()));
    assert_eq!(problems[1][4], Data::String("31/02/2024".into()));
}

#[test]
fn number_formats_follow_the_currency_and_the_kind_of_figure() {
    let (_dir, target) = write(&report());
    assert_eq!(
        number_format(&target, "Accruals", 1, 6),
        "#,##0.00;-#,##0.00"
    );
    assert_eq!(number_format(&target, "Accruals", 2, 6), "#,##0;-#,##0");
    assert_eq!(
        number_format(&target, "Accruals", 3, 6),
        "#,##0.000;-#,##0.000"
    );
    assert_eq!(number_format(&target, "Accruals", 1, 10), "0.0000%");
    assert_eq!(number_format(&target, "Reconciliation", 1, 2), "yyyy-mm-dd");
    assert_eq!(
        number_format(&target, "Reconciliation", 2, 9),
        "#,##0.00;-#,##0.00"
    );
    assert_eq!(number_format(&target, "Daily", 1, 5), "0.000000000000");
    // The journal's other column shows blank, but holds 0.
    assert_eq!(
        number_format(&target, "Journal", 1, 5),
        "#,##0.00;-#,##0.00;"
    );

    // The text figure is right-aligned like the numbers around it.
    let mut wb: Xlsx<_> = open_workbook(&target).unwrap();
    let styles = wb.worksheet_style("Accruals").unwrap();
    let align = styles
        .get((4, 6))
        .and_then(|s| s.alignment.clone())
        .map(|a| a.horizontal);
    assert_eq!(align, Some(HorizontalAlignment::Right));
}

#[test]
fn a_text_figure_is_noted_once_in_problems() {
    let (_dir, target) = write(&report());
    let problems = sheet(&target, "Problems");
    let notes: Vec<&Vec<Data>> = problems
        .iter()
        .filter(|r| r[6].to_string().contains("written as text"))
        .collect();
    assert_eq!(notes.len(), 1);
    assert_eq!(notes[0][0], Data::String("warning".into()));
    let fix = notes[0][6].to_string();
    // The Accruals balance and the Summary's USD total.
    assert!(fix.starts_with("2 figures are written as text"), "{fix}");
    assert!(
        fix.contains("Accruals!G5") && fix.contains("Summary!D"),
        "{fix}"
    );
}

#[test]
fn the_summary_holds_the_facts_totals_counts_chart_and_caution() {
    let (_dir, target) = write(&report());
    let rows = sheet(&target, "Summary");
    let find = |label: &str| -> Vec<Data> {
        rows.iter()
            .find(|r| r[0] == Data::String(label.into()))
            .cloned()
            .unwrap_or_else(|| panic!("no row {label}"))
    };
    assert_eq!(day_of(&find("Cut-off")[1]), date("2024-03-31"));
    assert_eq!(day_of(&find("Window from")[1]), date("2024-03-01"));
    assert_eq!(number(&find("Books")[1]), dec("1"));
    assert_eq!(find("Book")[1], Data::String("harbourview.xlsx".into()));
    assert_eq!(number(&find("Accounts read")[1]), dec("5"));
    assert_eq!(number(&find("Accounts computed")[1]), dec("4"));
    assert_eq!(number(&find("Accounts left out by errors")[1]), dec("1"));
    assert_eq!(
        number(&find("of which by errors in the books")[1]),
        dec("1")
    );
    assert_eq!(
        number(&find("of which by errors in the computation")[1]),
        dec("0")
    );
    // Each account left out, by id, with the error that kept it out.
    let left = find("HM-SAV-009");
    assert_eq!(
        left[..5]
            .iter()
            .map(ToString::to_string)
            .collect::<Vec<_>>(),
        [
            "HM-SAV-009",
            "harbourview.xlsx",
            "Movements",
            "B7",
            "found '2024-02-30'; expected a date; correct the value date"
        ]
    );
    assert_eq!(number(&find("Problems: errors")[1]), dec("1"));
    // The writer's own note about text figures is a warning.
    assert_eq!(number(&find("Problems: warnings")[1]), dec("1"));
    assert_eq!(number(&find("Problems: notes")[1]), dec("0"));

    let totals_header = rows
        .iter()
        .position(|r| r[0] == Data::String("Currency".into()))
        .unwrap();
    assert_eq!(
        header(&rows[totals_header..]),
        vec![
            "Currency",
            "Side",
            "Accounts",
            "Balance at cut-off",
            "Accrued at cut-off",
            "Posted in window",
            "Interest for window",
            "Prior-period adjustment"
        ]
    );
    let jpy = &rows[totals_header + 1];
    assert_eq!(jpy[0], Data::String("JPY".into()));
    assert_eq!(jpy[1], Data::String("liability".into()));
    assert_eq!(number(&jpy[3]), dec("5000000"));
    let usd = &rows[totals_header + 2];
    assert_eq!(usd[3], Data::String("1,000,000,000,026,500.55".into()));
    assert_eq!(number(&usd[6]), dec("74.47"));
    assert_eq!(number(&usd[7]), dec("-1.25"));

    assert_eq!(number(&find("under-posted")[1]), dec("1"));
    assert_eq!(number(&find("agrees")[1]), dec("1"));

    let caution = rows
        .iter()
        .flat_map(|r| r.iter())
        .map(|d| d.to_string())
        .find(|s| s.starts_with("Caution"))
        .expect("a caution paragraph");
    for words in [
        "qualified staff",
        "contract",
        "accounting standards",
        "regulations",
        "does not replace",
    ] {
        assert!(caution.contains(words), "caution mentions {words}");
    }

    // The chart plots the rows outside tolerance straight from the Reconciliation sheet.
    let chart = zip_text(&target, "xl/charts/chart1.xml");
    assert!(chart.contains("<c:barChart>") && chart.contains(r#"<c:barDir val="col"/>"#));
    assert!(
        chart.contains("(Reconciliation!$J$3,Reconciliation!$J$5)"),
        "{chart}"
    );
    assert!(
        chart.contains("(Reconciliation!$A$3,Reconciliation!$A$5)"),
        "{chart}"
    );
}

#[test]
fn the_run_sheet_records_program_command_inputs_settings_and_time() {
    let (_dir, target) = write(&report());
    let rows = sheet(&target, "Run");
    let find = |label: &str| -> Vec<Data> {
        rows.iter()
            .find(|r| r[0] == Data::String(label.into()))
            .cloned()
            .unwrap_or_else(|| panic!("no row {label}"))
    };
    assert_eq!(
        find("Program version")[1],
        Data::String("ledgerate 0.1.0".into())
    );
    assert!(find("Command line")[1]
        .to_string()
        .contains("--cutoff 2024-03-31"));
    match &find("Time of the run")[1] {
        Data::DateTime(t) => assert_eq!(
            t.as_datetime().unwrap(),
            NaiveDateTime::parse_from_str("2024-04-02 07:45:10", "%Y-%m-%d %H:%M:%S").unwrap()
        ),
        other => panic!("run time is {other:?}"),
    }
    let input = find("harbourview.xlsx");
    assert_eq!(number(&input[1]), dec("48213"));
    assert_eq!(input[2].to_string().len(), 64);
    assert_eq!(find("cutoff")[2], Data::String("command line".into()));
    assert_eq!(
        find("tolerance_amount")[2],
        Data::String("Settings sheet".into())
    );
    assert_eq!(find("journal_style")[2], Data::String("default".into()));
    // The document's creation time is the run time, not the clock.
    assert!(zip_text(&target, "docProps/core.xml").contains("2024-04-02T07:45:10Z"));
}

#[test]
fn the_same_report_gives_the_same_bytes() {
    let r = report();
    let (_a, first) = write(&r);
    let (_b, second) = write(&r);
    assert_eq!(sha256(&first), sha256(&second));
    // And a different run time gives different bytes: the time is really in the file.
    let mut later = r.clone();
    later.facts.run_time += chrono::Duration::seconds(1);
    let (_c, third) = write(&later);
    assert_ne!(sha256(&first), sha256(&third));
}

#[test]
fn the_workbook_replaces_the_target_whole_and_leaves_no_temporary_file() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("reconciliation.xlsx");
    std::fs::write(&target, b"last month's file").unwrap();
    let outcome = write_report(&report(), &target).unwrap();
    assert_eq!(outcome.path, target);
    let left: Vec<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(left, vec!["reconciliation.xlsx"]);
    assert_eq!(names(&target)[0], "Summary");
    let rows: Vec<(String, usize)> = outcome
        .sheets
        .iter()
        .map(|s| (s.name.clone(), s.rows))
        .collect();
    assert_eq!(rows[1], ("Accruals".to_string(), 4));
    assert_eq!(rows[2], ("Reconciliation".to_string(), 4));
    assert_eq!(rows[5], ("Problems".to_string(), 2));
    assert_eq!(outcome.text_figure_count, 2);
}

#[test]
fn a_missing_output_folder_is_refused_and_nothing_is_written() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("no-such-folder").join("out.xlsx");
    let e = write_report(&report(), &target).unwrap_err();
    assert!(matches!(e, ReportError::MissingDirectory(_)), "{e}");
    assert!(e.to_string().contains("does not exist"));
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
    assert!(matches!(
        write_template(&target),
        Err(ReportError::MissingDirectory(_))
    ));
}

#[test]
fn an_input_book_is_never_overwritten() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("harbourview.xlsx");
    std::fs::write(&book, b"the input book").unwrap();
    let mut r = report();
    r.facts.inputs[0].path = book.display().to_string();
    let e = write_report(&r, &dir.path().join(".").join("harbourview.xlsx")).unwrap_err();
    assert!(matches!(e, ReportError::TargetIsInput(_)), "{e}");
    assert_eq!(std::fs::read(&book).unwrap(), b"the input book");
    let e = write_report(&r, dir.path()).unwrap_err();
    assert!(matches!(e, ReportError::TargetIsDirectory(_)), "{e}");
}

#[test]
fn the_template_has_every_sheet_and_column_of_an_account_book() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("book.xlsx");
    write_template(&target).unwrap();
    // Every sheet and column of the book schema, in its order.
    let expected: Vec<(&str, Vec<&str>)> = SheetKind::ALL
        .iter()
        .map(|k| {
            let spec = k.spec();
            (spec.name, spec.columns.iter().map(|c| c.name).collect())
        })
        .collect();
    assert_eq!(
        names(&target),
        expected
            .iter()
            .map(|(n, _)| n.to_string())
            .collect::<Vec<_>>()
    );
    for (name, columns) in &expected {
        let rows = sheet(&target, name);
        assert_eq!(&header(&rows), columns, "{name}");
        // The example account is a deposit, and an Accrual status row is
        // for a loan only: that sheet's example row is blank.
        if *name != "Accrual status" {
            assert!(rows.len() >= 2, "{name} has an example row");
        }
        // A note on every header cell: the schema's note on the column.
        let comments = zip_text(
            &target,
            &format!("xl/comments{}.xml", sheet_index(&target, name)),
        );
        assert!(
            comments.matches("<comment ref=").count() >= columns.len(),
            "{name} notes"
        );
        let spec = SheetKind::from_name(name).unwrap().spec();
        for c in spec.columns {
            let note = c.note.replace('&', "&amp;");
            assert!(
                comments.contains(&format!("<t>{note}</t>")),
                "{name}.{}",
                c.name
            );
        }
    }

    let accounts = sheet(&target, "Accounts");
    assert_eq!(accounts[1][0], Data::String("HM-SAV-001".into()));
    assert_eq!(day_of(&accounts[1][3]), date("2024-01-01"));
    assert_eq!(number(&accounts[1][4]), dec("25000"));
    let statements = sheet(&target, "Statements");
    assert_eq!(number(&statements[1][3]), dec("71.37"));
    let settings = sheet(&target, "Settings");
    let setting_names: Vec<String> = settings[1..].iter().map(|r| r[0].to_string()).collect();
    assert_eq!(
        setting_names,
        SETTING_ROWS.iter().map(|s| s.name).collect::<Vec<_>>()
    );
    assert_eq!(day_of(&settings[1][1]), date("2024-01-31"));

    // Drop-down lists for the named choices.
    let xml = zip_text(&target, "xl/worksheets/sheet1.xml");
    assert!(xml.contains("ACT/360,ACT/365F,ACT/365L,ACT/ACT ISDA,ACT/ACT ICMA,NL/365,30/360,30/360 US,30E/360,30E/360 ISDA,BUS/252"));
    assert!(xml
        .contains("simple,daily,monthly,quarterly,semiannual,annual,continuous,annual-effective"));
    assert!(xml.contains("monthly,quarterly,semiannual,annual,maturity,none"));
    assert!(xml.contains("unadjusted,following,modified-following,preceding,modified-preceding"));
    assert!(xml.contains("fixed,simple-daily,compounded-in-arrears"));
    assert!(xml.contains("half-up,half-even,down,up"));
    let settings_xml = zip_text(
        &target,
        &format!(
            "xl/worksheets/sheet{}.xml",
            sheet_index(&target, "Settings")
        ),
    );
    assert!(settings_xml.contains("incremental,reversing"));
    assert!(settings_xml.contains("inclusive,exclusive"));
    assert!(settings_xml.contains("payment-date,in-window,period-end"));
    assert_eq!(number_format(&target, "Accounts", 1, 3), "yyyy-mm-dd");

    // The template is the same bytes every time.
    let again = dir.path().join("again.xlsx");
    write_template(&again).unwrap();
    assert_eq!(sha256(&target), sha256(&again));
}

#[test]
fn a_text_longer_than_a_cell_is_cut_with_one_warning_not_a_failed_write() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("reconciliation.xlsx");
    let mut r = report();
    // Longer than a spreadsheet cell holds (32,767 characters).
    r.journal[1].memo = "Harbourview Mutual memo ".repeat(2_000);
    let outcome = write_report(&r, &target).unwrap();
    let note = outcome
        .cut_text_problem
        .expect("a warning for the cut text");
    assert_eq!(note.severity, Severity::Warning);
    assert_eq!(
        (note.position.sheet.as_str(), note.position.cell.as_str()),
        ("Journal", "G3")
    );
    assert!(note.fix.starts_with("1 text is cut to fit"), "{}", note.fix);
    let mut wb = open_workbook_auto(&target).unwrap();
    let journal = wb.worksheet_range("Journal").unwrap();
    let memo = journal.get_value((2, 6)).unwrap().to_string();
    assert_eq!(memo.chars().count(), 32_767);
    assert!(memo.ends_with('…') && memo.starts_with("Harbourview Mutual memo "));
    let problems = wb.worksheet_range("Problems").unwrap();
    assert!(problems
        .rows()
        .any(|row| row[2] == "Journal" && row[3] == "G3"));
    // Only the workbook: no temporary file is left beside it.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
}

#[cfg(unix)]
#[test]
fn a_new_workbook_is_readable_like_any_new_file() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    let plain = dir.path().join("plain");
    std::fs::write(&plain, b"").unwrap();
    let (_d, target) = write(&report());
    let mode = |p: &Path| std::fs::metadata(p).unwrap().permissions().mode() & 0o777;
    assert_eq!(mode(&target), mode(&plain));
}

/// The XML of the `index`th sheet (0-based, workbook order).
fn sheet_xml(path: &Path, index: usize) -> String {
    zip_text(path, &format!("xl/worksheets/sheet{}.xml", index + 1))
}

/// The width of 1-based column `col` in a sheet's XML.
fn col_width(xml: &str, col: u32) -> f64 {
    let attr = |tag: &str, name: &str| -> String {
        let key = format!(r#"{name}=""#);
        let at = tag.find(&key).unwrap() + key.len();
        tag[at..].split('"').next().unwrap().to_string()
    };
    xml.split("<col ")
        .skip(1)
        .find(|tag| {
            let (min, max): (u32, u32) = (
                attr(tag, "min").parse().unwrap(),
                attr(tag, "max").parse().unwrap(),
            );
            (min..=max).contains(&col)
        })
        .map(|tag| attr(tag, "width").parse().unwrap())
        .unwrap_or_else(|| panic!("no width for column {col}"))
}

/// Every sheet prints landscape on A4, one page wide, with a footer naming
/// it and its page; every list repeats its header row on each page.
#[test]
fn every_sheet_prints_one_page_wide_and_lists_repeat_their_header() {
    let (_dir, target) = write(&report());
    let sheets = names(&target);
    let workbook = zip_text(&target, "xl/workbook.xml");
    for (i, name) in sheets.iter().enumerate() {
        let xml = sheet_xml(&target, i);
        assert!(xml.contains(r#"<pageSetUpPr fitToPage="1"/>"#), "{name}");
        assert!(
            xml.contains(r#"paperSize="9" fitToHeight="0" orientation="landscape""#),
            "{name}: {xml}"
        );
        assert!(xml.contains("&amp;A, page &amp;P of &amp;N"), "{name}");
        let titles = format!(r#"<definedName name="_xlnm.Print_Titles" localSheetId="{i}">"#);
        let list = !matches!(name.as_str(), "Summary" | "Run");
        assert_eq!(workbook.contains(&titles), list, "{name}");
    }
}

/// The Reconciliation sheet: the likely cause wraps in a column of fixed
/// width and the row is tall enough for it; the figures keep narrow columns;
/// the header row is two lines tall, and balance-years is glossed in its
/// header's note and in the printed footer.
#[test]
fn the_reconciliation_sheet_wraps_its_causes_and_glosses_balance_years() {
    let mut r = report();
    r.reconciliation[1].likely_cause = "interest on ACT/360 instead of ACT/365F (reproduces the \
        posted amount exactly). The most plausible of 3 single changes that reproduce the posted \
        amount within tolerance; all 3: ledgerate explain --account HM-SAV-002"
        .into();
    let (_dir, target) = write(&r);
    let index = sheet_index(&target, "Reconciliation") - 1;
    let xml = sheet_xml(&target, index);
    let cause = col_width(&xml, 12);
    assert!((45.0..50.0).contains(&cause), "{cause}");
    for col in 3..=11 {
        let w = col_width(&xml, col);
        assert!(w <= 20.0, "column {col} is {w} wide");
    }
    assert!(xml.contains(r#"<row r="1" "#) && xml.contains(r#"ht="30" customHeight="1""#));
    // Row 3 holds the long cause: more than one line tall.
    let row3 = xml.split(r#"<row r="3" "#).nth(1).unwrap();
    let height: f64 = row3
        .split(r#"ht=""#)
        .nth(1)
        .unwrap()
        .split('"')
        .next()
        .unwrap()
        .parse()
        .unwrap();
    assert!(height >= 45.0, "{height}");
    assert!(
        xml.contains("Balance-years: each day&apos;s balance x its fraction of a year")
            || xml.contains("Balance-years: each day's balance x its fraction of a year")
    );
    let wraps = number_wraps(&target, "Reconciliation", 2, 11);
    assert!(wraps, "the cause wraps");
    // The sheet's notes: the comments part its relationships name.
    let rels = zip_text(
        &target,
        &format!("xl/worksheets/_rels/sheet{}.xml.rels", index + 1),
    );
    let comments = rels
        .split("Target=\"../")
        .skip(1)
        .map(|t| t.split('"').next().unwrap())
        .find(|t| t.starts_with("comments"))
        .unwrap();
    let notes = zip_text(&target, &format!("xl/{comments}"));
    assert!(
        notes.contains("Balance-years: each day") && notes.contains("Variance (bp): the variance"),
        "{notes}"
    );
}

fn number_wraps(path: &Path, name: &str, row: u32, col: u32) -> bool {
    let mut wb: Xlsx<_> = open_workbook(path).unwrap();
    let styles = wb.worksheet_style(name).unwrap();
    styles
        .get((row, col))
        .and_then(|s| s.alignment.clone())
        .is_some_and(|a| a.wrap_text)
}

/// Daily shows a day's interest and the accrued to 8 places, so that a
/// column of them adds up to what it shows.
#[test]
fn daily_interest_and_accrued_show_eight_places() {
    let (_dir, target) = write(&report());
    for col in [6, 7] {
        assert_eq!(
            number_format(&target, "Daily", 1, col),
            "#,##0.00000000;-#,##0.00000000"
        );
    }
    assert_eq!(number_format(&target, "Daily", 1, 2), "#,##0.00;-#,##0.00");
}

/// The GL account column holds the longest default code on one line.
#[test]
fn the_gl_column_fits_the_default_codes() {
    let mut r = report();
    r.journal[0].gl_account = "ACCRUED-INTEREST-RECEIVABLE".into();
    let (_dir, target) = write(&r);
    let xml = sheet_xml(&target, sheet_index(&target, "Journal") - 1);
    assert!(col_width(&xml, 4) >= 29.0, "{}", col_width(&xml, 4));
}

/// The Summary ranks the variances in money, by currency, beside the
/// basis-point chart, and says what balance-years are.
#[test]
fn the_summary_lists_the_largest_variances_in_money_and_glosses_balance_years() {
    let (_dir, target) = write(&report());
    let rows = sheet(&target, "Summary");
    let title = rows
        .iter()
        .position(|r| r[0] == Data::String("Largest variances in money, by currency".into()))
        .expect("the table's title");
    assert_eq!(
        header(&rows[title + 1..])[..6],
        [
            "Currency",
            "Account",
            "Period end",
            "Variance",
            "Variance (bp)",
            "Status"
        ]
    );
    let listed: Vec<(String, Decimal)> = rows[title + 2..title + 4]
        .iter()
        .map(|r| (r[1].to_string(), number(&r[3])))
        .collect();
    assert_eq!(
        listed,
        [
            ("HM-SAV-002".to_string(), dec("-0.62")),
            ("HM-SAV-004".to_string(), dec("0.40"))
        ]
    );
    assert!(rows[title + 4].iter().all(|c| c == &Data::Empty) || rows.len() == title + 4);
    assert!(rows.iter().flat_map(|r| r.iter()).any(|c| c
        .to_string()
        .starts_with("Balance-years: each day's interest-bearing balance")));
}
