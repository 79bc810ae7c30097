//! Reading account books (behaviour.md, Input books): the Harbourview Mutual books, an
//! invented credit union's, as real files in every supported form, and a
//! broken book with one planted fault of each kind.
//!
//! The fixtures under `tests/fixtures/books/` are written by
//! `cargo run --example book_fixtures` (ods and xls by LibreOffice).

use std::sync::Arc;
use std::time::{Duration, Instant};

use crate::common::{date, dec, fixture};
use chrono::NaiveDate;
use ledgerate::book::{check_unique_ids, read_book, AccountEntry, Book, ReadOptions};
use ledgerate::conventions::calendar::BusinessDay;
use ledgerate::conventions::compounding::Compounding;
use ledgerate::conventions::daycount::Basis;
use ledgerate::conventions::rounding::RoundMode;
use ledgerate::conventions::schedule::{AnchorKind, Posting};
use ledgerate::engine::rates::{RateSchedule, RateSource, Tier};
use ledgerate::engine::{Movement, RoundAt, Side, TierMethod};
use ledgerate::problem::{Problem, Severity};
use rust_decimal::Decimal;

fn read(name: &str) -> Book {
    read_book(&fixture(name), &ReadOptions::default())
}

fn account<'a>(book: &'a Book, id: &str) -> &'a AccountEntry {
    book.accounts
        .iter()
        .find(|a| a.terms.id == id)
        .unwrap_or_else(|| panic!("no account {id} in {:?}", ids(book)))
}

fn ids(book: &Book) -> Vec<&str> {
    book.accounts.iter().map(|a| a.terms.id.as_str()).collect()
}

fn all_problems(book: &Book) -> String {
    book.problems.iter().map(|p| format!("  {p}\n")).collect()
}

/// The one problem of `severity` at `sheet`!`cell`, which must mention
/// every word (in what was found, what was expected or the fix).
fn problem<'a>(
    book: &'a Book,
    severity: Severity,
    sheet: &str,
    cell: &str,
    words: &[&str],
) -> &'a Problem {
    let at: Vec<&Problem> = book
        .problems
        .iter()
        .filter(|p| p.severity == severity && p.position.sheet == sheet && p.position.cell == cell)
        .collect();
    assert_eq!(
        at.len(),
        1,
        "expected one {severity:?} at {sheet}!{cell}; all problems:\n{}",
        all_problems(book)
    );
    let p = at[0];
    let text = p.to_string();
    for w in words {
        assert!(
            text.contains(w),
            "{sheet}!{cell} should mention {w:?}: {text}"
        );
    }
    p
}

// ---------------------------------------------------------------- good book

const GOOD_IDS: [&str; 8] = [
    "HM-SAV-001",
    "HM-SAV-002",
    "HM-TD-003",
    "HM-LN-004",
    "HM-CHK-005",
    "HM-BUS-006",
    "HM-QTR-007",
    "HM-SAV-008",
];

#[test]
fn a_good_book_has_every_account_in_sheet_order_and_only_notes() {
    let book = read("harbourview_good.xlsx");
    assert_eq!(ids(&book), GOOD_IDS);
    assert!(!book.has_errors(), "{}", all_problems(&book));
    assert_eq!(book.problems.len(), 3, "{}", all_problems(&book));
    problem(&book, Severity::Note, "Notes", "", &["Notes", "not read"]);
    // The Fixings sheet is read: its one index and fixing are in the book.
    assert_eq!(
        book.fixings.keys().collect::<Vec<_>>(),
        ["HM-BASE"],
        "{:?}",
        book.fixings
    );
    let unknown = problem(&book, Severity::Note, "Accounts", "1:1", &["kept out"]);
    assert_eq!(unknown.found, "Branch");
    let bus = problem(
        &book,
        Severity::Note,
        "Accounts",
        "E8",
        &["BUS/252", "Saturdays and Sundays"],
    );
    assert_eq!(bus.account.as_deref(), Some("HM-BUS-006"));
}

#[test]
fn account_terms_are_typed_with_the_defaults_of_books_md() {
    let book = read("harbourview_good.xlsx");

    let saver = account(&book, "HM-SAV-001");
    let t = &saver.terms;
    assert_eq!(saver.name, "Everyday Saver");
    assert_eq!((t.currency.as_str(), t.minor_units), ("USD", 2));
    assert_eq!(t.basis, Basis::Act365F);
    assert_eq!(t.open_date, date("2026-01-01"));
    assert_eq!(t.opening_balance, dec("12500.00"));
    assert_eq!(t.side, Side::Liability);
    assert_eq!(t.compounding, Compounding::Monthly);
    assert_eq!(t.posting, Posting::Monthly);
    assert_eq!(t.anchor, Some(date("2026-01-31")));
    assert_eq!(t.anchor_kind, AnchorKind::End);
    assert!(t.capitalise);
    assert_eq!(
        (t.round_at, t.round_mode, t.round_places),
        (RoundAt::Posting, RoundMode::HalfUp, None)
    );
    assert_eq!(t.maturity, None);
    assert_eq!(saver.rate_ref, "SAV-STD");
    assert_eq!(saver.debit_rate_ref, None);
    assert_eq!(t.tier_method, TierMethod::Whole);
    assert_eq!(t.calendar.name(), "HM-HOLIDAYS");
    assert_eq!(
        t.calendar.holidays().collect::<Vec<_>>(),
        vec![date("2026-01-01"), date("2026-07-03"), date("2026-12-25")]
    );
    assert_eq!(t.business_day, BusinessDay::Unadjusted);
    assert_eq!(t.payment_delay_days, 0);
    assert_eq!(t.opening_accrued, Decimal::ZERO);
    assert_eq!(t.period_start, None);
    assert_eq!(saver.gl.interest.as_deref(), Some("5100"));
    assert_eq!(saver.gl.accrued.as_deref(), Some("2100"));
    assert_eq!(saver.gl.settlement.as_deref(), Some("1001-HM-SAV-001"));
    assert_eq!(saver.position.sheet().sheet, "Accounts");
    assert_eq!(saver.position.to_position().cell, "A2");

    // Text cells: an ISO date, a number with a thousands separator, names in any case.
    let bonus = account(&book, "HM-SAV-002");
    let t = &bonus.terms;
    assert_eq!(t.currency, "USD");
    assert_eq!(t.basis, Basis::Act360);
    assert_eq!(t.open_date, date("2026-01-01"));
    assert_eq!(t.opening_balance, dec("1234.56"));
    assert_eq!(t.compounding, Compounding::Daily);
    assert!(!t.capitalise);
    assert_eq!(
        (t.round_at, t.round_mode, t.round_places),
        (RoundAt::Daily, RoundMode::HalfEven, Some(4))
    );
    assert_eq!(t.tier_method, TierMethod::Banded);
    // No calendar named: weekends only.
    assert_eq!(t.calendar.name(), "");
    assert_eq!(t.calendar.holidays().count(), 0);
    assert_eq!(*bonus.gl, Default::default());

    let deposit = account(&book, "HM-TD-003");
    let t = &deposit.terms;
    assert_eq!((t.currency.as_str(), t.basis), ("EUR", Basis::Thirty360E));
    assert_eq!(t.posting, Posting::Maturity);
    assert_eq!(t.maturity, Some(date("2027-02-15")));
    assert_eq!(t.opening_balance, dec("50000"));
    // rate_ref defaults to the account id.
    assert_eq!(deposit.rate_ref, "HM-TD-003");

    let loan = account(&book, "HM-LN-004");
    let t = &loan.terms;
    assert_eq!(t.side, Side::Asset);
    assert_eq!(
        (t.anchor, t.anchor_kind),
        (Some(date("2026-01-15")), AnchorKind::Payment)
    );
    assert_eq!(t.business_day, BusinessDay::ModifiedFollowing);
    assert_eq!(t.payment_delay_days, 2);
    assert_eq!(t.maturity, Some(date("2045-12-15")));
    assert_eq!(t.opening_balance, dec("250000.00"));

    // "(250.00)" is a negative: an overdrawn cheque account with a debit rate.
    let cheque = account(&book, "HM-CHK-005");
    assert_eq!(cheque.terms.opening_balance, dec("-250.00"));
    assert_eq!(cheque.terms.basis, Basis::Act365F);
    assert_eq!(cheque.debit_rate_ref.as_deref(), Some("OD-RATE"));

    let bus = account(&book, "HM-BUS-006");
    assert_eq!(
        (bus.terms.currency.as_str(), bus.terms.basis),
        ("BRL", Basis::Bus252)
    );
    assert_eq!(bus.terms.compounding, Compounding::AnnualEffective);
    assert_eq!(bus.terms.calendar.holidays().count(), 0);

    let quarterly = account(&book, "HM-QTR-007");
    let t = &quarterly.terms;
    assert_eq!((t.currency.as_str(), t.minor_units), ("KWD", 3));
    assert_eq!(t.basis, Basis::ActActIsda);
    assert_eq!(t.opening_balance, dec("7500.125"));
    assert_eq!(t.opening_accrued, dec("3.210"));
    assert_eq!(t.period_start, Some(date("2026-01-01")));
    assert_eq!(
        (t.compounding, t.posting),
        (Compounding::Quarterly, Posting::Quarterly)
    );

    // A formula's cached value is used; a long name is kept whole; a calendar
    // name matches whatever its case and spacing, and the calendar is shared.
    let late = account(&book, "HM-SAV-008");
    assert_eq!(late.terms.opening_balance, dec("1234.56"));
    assert_eq!(late.name.chars().count(), 274);
    assert!(late
        .name
        .starts_with("Harbourview Mutual community reinvestment saver"));
    assert!(Arc::ptr_eq(&late.terms.calendar, &saver_calendar(&book)));
}

fn saver_calendar(book: &Book) -> Arc<ledgerate::conventions::calendar::Calendar> {
    Arc::clone(&account(book, "HM-SAV-001").terms.calendar)
}

#[test]
fn rates_become_schedules_of_complete_tables_with_percents_as_exact_decimals() {
    let book = read("harbourview_good.xlsx");
    let keys: Vec<&str> = book.rates.keys().map(String::as_str).collect();
    assert_eq!(
        keys,
        [
            "BUS-RATE",
            "CHK-RATE",
            "HM-TD-003",
            "LN-STD",
            "OD-RATE",
            "QTR-RATE",
            "SAV-BAND",
            "SAV-STD"
        ]
    );
    let std = &book.rates["SAV-STD"];
    assert_eq!(
        std,
        &RateSchedule::from_rows([
            (date("2026-01-01"), dec("0.025"), dec("0")),
            (date("2026-01-01"), dec("0.03"), dec("10000")),
            (date("2026-06-01"), dec("0.0275"), dec("0")),
            (date("2026-06-01"), dec("0.0325"), dec("10000")),
        ])
    );
    let june = std.table_on(date("2026-06-30")).unwrap();
    assert_eq!(
        june.tiers[1],
        Tier {
            from: dec("10000"),
            rate: dec("0.0325")
        }
    );
    // rate_decimal is taken as it is; a tier threshold written "5,000" is 5000.
    let band = book.rates["SAV-BAND"].table_on(date("2026-01-01")).unwrap();
    assert_eq!(
        band.tiers,
        vec![
            Tier {
                from: dec("0"),
                rate: dec("0.02")
            },
            Tier {
                from: dec("5000"),
                rate: dec("0.025")
            }
        ]
    );
    // tier_from defaults to 0; 6.875% is exactly 0.06875.
    let loan = book.rates["LN-STD"].table_on(date("2025-12-01")).unwrap();
    assert_eq!(
        loan.tiers,
        vec![Tier {
            from: Decimal::ZERO,
            rate: dec("0.06875")
        }]
    );
    assert_eq!(loan.tiers[0].rate.to_string(), "0.06875");
}

#[test]
fn movements_keep_sheet_order_exact_amounts_and_booking_dates() {
    let book = read("harbourview_good.xlsx");
    assert_eq!(
        book.movements["HM-SAV-001"],
        vec![
            Movement {
                value_date: date("2026-03-10"),
                amount: dec("2500.00"),
                booking_date: None,
                reference: Some("DEP-0001".into())
            },
            Movement {
                value_date: date("2026-04-05"),
                amount: dec("-1000.00"),
                booking_date: Some(date("2026-04-20")),
                reference: Some("WDL-0002".into()),
            },
        ]
    );
    assert_eq!(book.movements["HM-LN-004"][0].amount, dec("-1850.00"));
    // A spreadsheet float is its shortest text: 0.1 stays 0.1, every digit is kept.
    let bonus = &book.movements["HM-SAV-002"];
    assert_eq!(bonus[0].amount.to_string(), "0.1");
    assert_eq!(bonus[1].amount.to_string(), "1234.5678901234567");
    assert_eq!(book.movements.len(), 4);
}

#[test]
fn statement_ends_written_exclusive_are_read_as_the_last_day_and_repeated_periods_stay_separate() {
    let book = read("harbourview_good.xlsx");
    let rows: Vec<(&str, NaiveDate, NaiveDate, Decimal, Option<&str>)> = book
        .statements
        .iter()
        .map(|s| {
            (
                &*s.account,
                s.period_start,
                s.period_end,
                s.posted,
                s.reference.as_deref(),
            )
        })
        .collect();
    assert_eq!(
        rows,
        vec![
            (
                "HM-SAV-001",
                date("2026-01-01"),
                date("2026-01-31"),
                dec("26.54"),
                Some("ST-01")
            ),
            (
                "HM-SAV-001",
                date("2026-02-01"),
                date("2026-02-28"),
                dec("24.00"),
                Some("ST-02A")
            ),
            (
                "HM-SAV-001",
                date("2026-02-01"),
                date("2026-02-28"),
                dec("-24.00"),
                Some("ST-02B")
            ),
            (
                "HM-SAV-001",
                date("2026-02-01"),
                date("2026-02-28"),
                dec("24.05"),
                Some("ST-02C")
            ),
            (
                "HM-LN-004",
                date("2025-12-15"),
                date("2026-01-14"),
                dec("1480.21"),
                Some("ST-L1")
            ),
        ]
    );
    assert_eq!(book.statements[0].position.to_position().cell, "A2");
}

#[test]
fn settings_are_typed_and_named_by_their_folded_names() {
    let book = read("harbourview_good.xlsx");
    let rows: Vec<(&str, &str, &str)> = book
        .settings
        .iter()
        .map(|s| (s.name.as_str(), s.value.as_str(), s.position.cell.as_str()))
        .collect();
    assert_eq!(
        rows,
        vec![
            ("cutoff", "2026-11-30", "B2"),
            ("windowstart", "2026-11-01", "B3"),
            ("toleranceamount", "0.01", "B4"),
            ("tolerancebp", "0.5", "B5"),
            ("entity", "Harbourview Mutual", "B6"),
            ("journalstyle", "incremental", "B7"),
            ("statementend", "exclusive", "B8"),
        ]
    );
}

/// Everything a book holds, as text that ignores how a value was stored
/// (a float 24 and a text 24.00 are the same amount).
fn contents(book: &Book) -> Vec<String> {
    let n = |d: Decimal| d.normalize().to_string();
    let mut out = Vec::new();
    for a in &book.accounts {
        let t = &a.terms;
        out.push(format!(
            "{} {} {} {} {} {:?} {:?} {:?} {:?} {:?} {:?} {} {:?} {:?} {:?} {:?} {:?} {} {:?} {:?} {} {} {} {:?} {} {:?} {:?} {:?}",
            t.id,
            a.name,
            t.currency,
            t.minor_units,
            t.basis,
            t.side,
            t.compounding,
            t.posting,
            t.anchor,
            t.anchor_kind,
            t.round_at,
            t.capitalise,
            t.round_mode,
            t.round_places,
            t.maturity,
            t.tier_method,
            t.business_day,
            t.payment_delay_days,
            t.calendar.name(),
            t.calendar.holidays().collect::<Vec<_>>(),
            t.open_date,
            n(t.opening_balance),
            n(t.opening_accrued),
            t.period_start,
            a.rate_ref,
            a.debit_rate_ref,
            a.gl,
            a.position.to_position().cell,
        ));
    }
    for (k, s) in &book.rates {
        for t in s.tables() {
            for tier in &t.tiers {
                out.push(format!(
                    "rate {k} {} {} {}",
                    t.effective,
                    n(tier.rate),
                    n(tier.from)
                ));
            }
        }
    }
    for (k, ms) in &book.movements {
        for m in ms {
            out.push(format!(
                "movement {k} {} {} {:?} {:?}",
                m.value_date,
                n(m.amount),
                m.booking_date,
                m.reference
            ));
        }
    }
    for s in &book.statements {
        out.push(format!(
            "statement {} {} {} {} {:?} {}",
            s.account,
            s.period_start,
            s.period_end,
            n(s.posted),
            s.reference,
            s.position.to_position().cell
        ));
    }
    for s in &book.settings {
        out.push(format!(
            "setting {} {} {}",
            s.name, s.value, s.position.cell
        ));
    }
    for p in &book.problems {
        out.push(format!(
            "problem {:?} {} {} {:?} {}",
            p.severity,
            p.position.sheet.to_lowercase(),
            p.position.cell,
            p.account,
            // A CSV file is named in lower case where a workbook's sheet is capitalised.
            p.found.to_lowercase()
        ));
    }
    out
}

#[test]
fn the_same_book_as_ods_xls_csv_an_unknown_extension_or_an_upper_case_one_reads_the_same() {
    let xlsx = contents(&read("harbourview_good.xlsx"));
    for other in [
        "harbourview_good.ods",
        "harbourview_good.xls",
        "harbourview_good_csv",
        "harbourview_good.book",
        "HARBOURVIEW_UPPER.XLSX",
    ] {
        let mut got = contents(&read(other));
        let mut a = xlsx.clone();
        if other.ends_with(".ods") {
            // LibreOffice saves numbers to 15 significant digits: the ods file
            // itself holds 1234.56789012346, and that is what is read.
            let precise =
                "movement HM-SAV-002 2026-01-16 1234.5678901234567 None Some(\"DEP-0005\")";
            let saved = "movement HM-SAV-002 2026-01-16 1234.56789012346 None Some(\"DEP-0005\")";
            assert!(got.iter().any(|l| l == saved), "{got:?}");
            got.retain(|l| l != saved);
            a.retain(|l| l != precise);
        }
        // A CSV folder lists its files in name order, a workbook its sheets in tab order.
        let mut b = got;
        a.sort();
        b.sort();
        assert_eq!(a, b, "{other} differs from the xlsx");
    }
}

#[test]
fn a_workbook_with_an_unknown_extension_is_known_by_its_content() {
    let dir = tempfile::tempdir().unwrap();
    for (from, to) in [
        ("harbourview_good.ods", "book-a.data"),
        ("harbourview_good.xls", "book-b.data"),
    ] {
        let copy = dir.path().join(to);
        std::fs::copy(fixture(from), &copy).unwrap();
        let book = read_book(&copy, &ReadOptions::default());
        assert_eq!(ids(&book), GOOD_IDS, "{from}: {}", all_problems(&book));
        assert!(!book.has_errors());
    }
}

#[test]
fn a_single_csv_file_is_not_a_book() {
    let book = read("harbourview_good_csv/accounts.csv");
    assert!(book.accounts.is_empty());
    assert_eq!(book.problems.len(), 1);
    problem(&book, Severity::Error, "", "", &["folder of CSV files"]);
}

#[test]
fn sheet_names_fold_and_a_missing_required_sheet_names_its_near_miss() {
    let book = read("misnamed_sheets.xlsx");
    assert!(book.accounts.is_empty());
    problem(
        &book,
        Severity::Note,
        "Acounts",
        "",
        &["rename it to Accounts"],
    );
    problem(
        &book,
        Severity::Error,
        "Accounts",
        "",
        &["no such sheet", "rename 'Acounts' to Accounts"],
    );
    problem(
        &book,
        Severity::Error,
        "Rate-s",
        "",
        &["one Rates sheet", "'Rates' is already the Rates sheet"],
    );
    assert_eq!(book.problems.len(), 3, "{}", all_problems(&book));
    // The first Rates sheet is still read.
    assert!(book.rates.contains_key("HM-SAV-201"));
}

#[test]
fn a_csv_file_with_semicolons_between_fields_is_refused_with_a_fix() {
    let book = read("semicolon_csv");
    problem(
        &book,
        Severity::Error,
        "accounts",
        "1:1",
        &["separated by ';'", "save the file as CSV with commas"],
    );
    // The file is there: no second error sends the user looking for it.
    assert_eq!(book.problems.len(), 1, "{}", all_problems(&book));
}

#[test]
fn a_1904_date_system_workbook_reads_its_dates_correctly() {
    let book = read("dates_1904.xlsx");
    assert!(book.problems.is_empty(), "{}", all_problems(&book));
    assert_eq!(
        account(&book, "HM-SAV-201").terms.open_date,
        date("2024-02-29")
    );
    assert_eq!(
        book.rates["HM-SAV-201"].first_effective(),
        Some(date("2024-01-01"))
    );
}

#[test]
fn a_stray_cell_in_the_last_row_and_column_costs_one_cell_not_a_grid() {
    let start = Instant::now();
    let book = read("stray_far_cell.xlsx");
    assert!(start.elapsed() < Duration::from_secs(10));
    assert_eq!(ids(&book), ["HM-SAV-201"]);
    assert_eq!(book.problems.len(), 1, "{}", all_problems(&book));
    problem(
        &book,
        Severity::Note,
        "Accounts",
        "XFD1048576",
        &["without a header"],
    );
}

#[test]
fn csv_files_in_utf16_with_a_byte_order_mark_are_decoded() {
    let book = read("utf16_csv");
    assert!(book.problems.is_empty(), "{}", all_problems(&book));
    let a = account(&book, "HM-SAV-201");
    assert_eq!(
        (a.terms.open_date, a.terms.opening_balance),
        (date("2024-02-29"), dec("800.00"))
    );
}

/// The good CSV book copied into `dir` with every line ending as `end`.
fn csv_book_with_line_ends(dir: &std::path::Path, end: &str) -> std::path::PathBuf {
    let folder = dir.join(format!("book_{}", end.escape_default()));
    std::fs::create_dir(&folder).unwrap();
    for entry in std::fs::read_dir(fixture("harbourview_good_csv")).unwrap() {
        let path = entry.unwrap().path();
        let bytes = std::fs::read(&path).unwrap();
        let text = String::from_utf8(bytes).unwrap();
        let text = text
            .replace("\r\n", "\n")
            .replace('\r', "\n")
            .replace('\n', end);
        std::fs::write(folder.join(path.file_name().unwrap()), text).unwrap();
    }
    folder
}

#[test]
fn a_csv_book_with_lf_crlf_or_lone_cr_line_ends_reads_the_same() {
    let dir = tempfile::tempdir().unwrap();
    let lf = read_book(
        &csv_book_with_line_ends(dir.path(), "\n"),
        &ReadOptions::default(),
    );
    assert_eq!(lf.accounts.len(), 8, "{}", all_problems(&lf));
    assert!(!lf.has_errors(), "{}", all_problems(&lf));
    for end in ["\r\n", "\r"] {
        let folder = csv_book_with_line_ends(dir.path(), end);
        assert!(std::fs::read(folder.join("movements.csv"))
            .unwrap()
            .ends_with(end.as_bytes()));
        let other = read_book(&folder, &ReadOptions::default());
        assert_eq!(
            contents(&lf),
            contents(&other),
            "line ends {:?} read differently",
            end
        );
    }
}

#[test]
fn a_decimal_comma_is_read_only_with_the_option() {
    let with = read_book(
        &fixture("decimal_comma_csv"),
        &ReadOptions {
            decimal_comma: true,
        },
    );
    assert!(with.problems.is_empty(), "{}", all_problems(&with));
    let a = account(&with, "HM-SAV-301");
    assert_eq!(a.terms.opening_balance, dec("1234.56"));
    assert_eq!(a.terms.opening_accrued, dec("-0.75"));
    assert_eq!(
        with.rates["HM-SAV-301"].tables()[0].tiers[0].rate,
        dec("0.025")
    );

    let without = read("decimal_comma_csv");
    assert!(without.accounts.is_empty());
    let p = problem(
        &without,
        Severity::Error,
        "accounts",
        "E2",
        &["1.234,56", "--decimal-comma"],
    );
    assert_eq!(p.account.as_deref(), Some("HM-SAV-301"));
    problem(
        &without,
        Severity::Error,
        "accounts",
        "F2",
        &["(0,75)", "--decimal-comma"],
    );
    problem(
        &without,
        Severity::Error,
        "rates",
        "C2",
        &["2,50", "--decimal-comma"],
    );
}

#[test]
fn unreadable_empty_truncated_and_foreign_files_are_one_book_error_each() {
    for (name, words) in [
        (
            "no_such_book.xlsx",
            &["no_such_book.xlsx", "check the path"][..],
        ),
        ("empty.xlsx", &["empty file"][..]),
        ("truncated.xlsx", &["damaged or truncated"][..]),
        ("not_a_workbook.xlsx", &["not an xlsx workbook"][..]),
    ] {
        let book = read(name);
        assert!(book.accounts.is_empty() && book.rates.is_empty(), "{name}");
        assert_eq!(book.problems.len(), 1, "{name}: {}", all_problems(&book));
        let p = problem(&book, Severity::Error, "", "", words);
        assert_eq!(p.position.book, fixture(name).display().to_string());
    }
}

#[test]
fn reading_never_changes_the_input() {
    let path = fixture("harbourview_good.xlsx");
    let before = std::fs::read(&path).unwrap();
    let modified = std::fs::metadata(&path).unwrap().modified().unwrap();
    let _ = read_book(&path, &ReadOptions::default());
    assert_eq!(std::fs::read(&path).unwrap(), before);
    assert_eq!(
        std::fs::metadata(&path).unwrap().modified().unwrap(),
        modified
    );
}

#[test]
fn account_ids_must_be_unique_across_the_books_of_a_run() {
    let mut books = vec![
        read("harbourview_good.xlsx"),
        read("harbourview_good_csv"),
        read("dates_1904.xlsx"),
    ];
    check_unique_ids(&mut books);
    assert_eq!(ids(&books[0]), GOOD_IDS);
    assert!(books[1].accounts.is_empty());
    assert!(books[1].movements.is_empty() && books[1].statements.is_empty());
    assert_eq!(ids(&books[2]), ["HM-SAV-201"]);
    let p = problem(
        &books[1],
        Severity::Error,
        "accounts",
        "A2",
        &["unique across the books", "Accounts!A2"],
    );
    assert_eq!(p.account.as_deref(), Some("HM-SAV-001"));
    assert_eq!(
        books[1]
            .problems
            .iter()
            .filter(|p| p.severity == Severity::Error)
            .count(),
        8
    );
}

// -------------------------------------------------------------- broken book

#[test]
fn a_broken_book_reports_each_planted_fault_where_it_is() {
    use Severity::{Error, Note, Warning};
    let book = read("harbourview_broken.xlsx");
    let expected: &[(Severity, &str, &str, &[&str])] = &[
        // Settings: an unknown name, a value of the wrong type, an unknown style.
        (
            Warning,
            "Settings",
            "A2",
            &["cut_of", "did you mean cutoff"],
        ),
        (
            Error,
            "Settings",
            "B3",
            &["abc", "tolerance_bp as a number"],
        ),
        (
            Error,
            "Settings",
            "B4",
            &["reverse", "did you mean 'reversing'"],
        ),
        // Holidays: date text that is not ISO.
        (
            Error,
            "Holidays",
            "B3",
            &["Jan 5 2026", "YYYY-MM-DD", "never guessed"],
        ),
        // Rates: a bad date, tiers out of order and duplicated, percents that look like decimals.
        (
            Error,
            "Rates",
            "B10",
            &["2026-13-01", "real day of the month"],
        ),
        (
            Warning,
            "Rates",
            "C1",
            &["values from 0.01 to 0.03", "rate_decimal"],
        ),
        (
            Error,
            "Rates",
            "D5",
            &["1000", "out of order", "5000 in D4"],
        ),
        (Error, "Rates", "D7", &["duplicated", "0 in D6"]),
        // Accounts: a near-miss header for an optional column.
        (
            Warning,
            "Accounts",
            "S1",
            &["opening_acrued", "did you mean opening_accrued"],
        ),
        (
            Error,
            "Accounts",
            "C2",
            &["USDD", "ISO 4217", "did you mean USD"],
        ),
        (
            Error,
            "Accounts",
            "D3",
            &["ACT/36", "did you mean 'ACT/360'"],
        ),
        (
            Error,
            "Accounts",
            "E4",
            &[
                "31/01/2026",
                "YYYY-MM-DD",
                "2026-01-31 if that is the date meant",
            ],
        ),
        (Error, "Accounts", "F5", &["1.234,56", "--decimal-comma"]),
        (
            Error,
            "Accounts",
            "E6",
            &["46023", "date without a date format"],
        ),
        (Error, "Accounts", "F7", &["#DIV/0!", "not an error cell"]),
        (
            Error,
            "Accounts",
            "I8",
            &["2025-12-31", "maturity after the open_date 2026-01-01 (E8)"],
        ),
        (Error, "Accounts", "G9", &["maturity", "fill in maturity"]),
        (Error, "Accounts", "D10", &["ACT/ACT ICMA", "posting none"]),
        (
            Error,
            "Accounts",
            "M11",
            &["13", "whole number from 0 to 12"],
        ),
        (Error, "Accounts", "N12", &["-1", "whole number from 0"]),
        (Error, "Accounts", "O13", &["perhaps", "yes or no"]),
        (
            Error,
            "Accounts",
            "P14",
            &[
                "compounded-in-arrears",
                "Rates rows name an index",
                "gives fixed rates only",
            ],
        ),
        (
            Error,
            "Accounts",
            "L15",
            &["HM-HOLIDAY", "did you mean HM-HOLIDAYS"],
        ),
        (
            Error,
            "Accounts",
            "A16",
            &["HM-SAV-101", "each account once", "A2"],
        ),
        (
            Error,
            "Accounts",
            "J17",
            &["NO-SUCH-RATE", "add rows for NO-SUCH-RATE"],
        ),
        (
            Error,
            "Accounts",
            "E18",
            &[
                "a rate that starts after the account opens",
                "(E18)",
                "Rates!B8",
                "2026-03-01",
            ],
        ),
        (Error, "Accounts", "K19", &["NO-OD-RATE", "debit_rate_ref"]),
        (
            Error,
            "Accounts",
            "Q20",
            &["2026-02-01", "period_start on or before the open_date"],
        ),
        (
            Warning,
            "Accounts",
            "G21",
            &["quarterly", "posting_anchor", "anchor 2026-01-31"],
        ),
        (
            Warning,
            "Accounts",
            "H22",
            &[
                "annual",
                "compounding at least as often as posting (monthly)",
            ],
        ),
        (
            Note,
            "Accounts",
            "D23",
            &["BUS/252", "Saturdays and Sundays"],
        ),
        (
            Error,
            "Accounts",
            "G24",
            &["montly", "did you mean 'monthly'"],
        ),
        (
            Error,
            "Accounts",
            "F25",
            &["$1,000.00", "without a currency sign"],
        ),
        (Error, "Accounts", "J26", &["TIER-BAD", "Rates!D5"]),
        (
            Error,
            "Accounts",
            "P27",
            &[
                "FLOAT-IDX",
                "rate_method simple-daily or compounded-in-arrears",
                "Rates!E9",
            ],
        ),
        (Error, "Accounts", "L34", &["HM-BROKEN", "Holidays!B3"]),
        // Movements: an unknown account, a movement before the opening, a currency sign, error cells.
        (
            Error,
            "Movements",
            "A2",
            &["HM-SAV-999", "an account of the Accounts sheet"],
        ),
        (
            Warning,
            "Movements",
            "B3",
            &["2025-12-15", "opening balance is taken to include"],
        ),
        (
            Error,
            "Movements",
            "C4",
            &["£40.00", "without a currency sign"],
        ),
        (Error, "Movements", "B5", &["#N/A", "not an error cell"]),
        (Error, "Movements", "C6", &["#SPILL!", "not an error cell"]),
        (
            Error,
            "Movements",
            "A7",
            &["hm-sav-127", "did you mean HM-SAV-127"],
        ),
        // Statements: an unknown account, an end before the start, rows outside the account's life, an overlap.
        (Error, "Statements", "A2", &["HM-SAV-998"]),
        (
            Error,
            "Statements",
            "C3",
            &["2026-02-01", "on or after the period_start 2026-02-28"],
        ),
        (
            Warning,
            "Statements",
            "B4",
            &["2025-01-01 to 2025-01-31", "not reconciled"],
        ),
        (
            Error,
            "Statements",
            "B8",
            &[
                "2026-01-15 to 2026-02-14",
                "does not overlap the period 2026-01-01 to 2026-01-31 (B7)",
            ],
        ),
        (
            Warning,
            "Statements",
            "B9",
            &["2027-01-01 to 2027-01-31", "not reconciled"],
        ),
    ];
    for (severity, sheet, cell, words) in expected {
        problem(&book, *severity, sheet, cell, words);
    }
    assert_eq!(
        book.problems.len(),
        expected.len(),
        "unexpected problems:\n{}",
        all_problems(&book)
    );

    // Problems of an account name it; book-level ones do not.
    assert_eq!(
        problem(&book, Error, "Accounts", "C2", &[])
            .account
            .as_deref(),
        Some("HM-SAV-101")
    );
    assert_eq!(
        problem(&book, Error, "Movements", "C6", &[])
            .account
            .as_deref(),
        Some("HM-SAV-128")
    );
    assert_eq!(problem(&book, Error, "Settings", "B3", &[]).account, None);

    // Accounts with only warnings and notes are kept, and so are those whose
    // only fault is a statement row (Completeness and presentation: their
    // reconciliation says the row could not be read); every other one is out,
    // with its movements and statements, and rows outside an account's life are not reconciled.
    assert_eq!(
        ids(&book),
        [
            "HM-SAV-120",
            "HM-SAV-121",
            "HM-SAV-122",
            "HM-SAV-127",
            "HM-SAV-131",
            "HM-SAV-132",
            "HM-SAV-134"
        ]
    );
    let unreadable: Vec<(&str, &str, &str)> = book
        .unreadable_statements
        .iter()
        .map(|u| {
            (
                u.account.as_str(),
                u.error.position.sheet.as_str(),
                u.error.position.cell.as_str(),
            )
        })
        .collect();
    assert_eq!(
        unreadable,
        [
            ("HM-SAV-131", "Statements", "C3"),
            ("HM-SAV-132", "Statements", "B8")
        ]
    );
    // The overlapping row's own period is known; an end before the start is none.
    assert_eq!(book.unreadable_statements[0].period, None);
    assert!(book.unreadable_statements[1].period.is_some());
    // Every other account of the sheet is left out, by id, in sheet order,
    // with the first error that names it (the duplicate row of HM-SAV-101
    // is no account of its own).
    let left_out: Vec<(&str, String)> = book
        .left_out
        .iter()
        .map(|l| {
            let p = book.left_out_error(l).unwrap();
            assert_eq!(p.severity, Error);
            assert_eq!(p.account.as_deref(), Some(l.account.as_str()));
            (
                l.account.as_str(),
                format!("{}!{}", p.position.sheet, p.position.cell),
            )
        })
        .collect();
    assert_eq!(left_out.len(), 26, "{left_out:?}");
    assert_eq!(left_out[0].0, "HM-SAV-101");
    assert!(left_out.contains(&("HM-SAV-128", "Movements!C6".to_string())));
    assert!(left_out.contains(&("HM-SAV-125", "Accounts!J26".to_string())));
    assert_eq!(
        left_out.len() + book.accounts.len(),
        33,
        "every account of the sheet once: HM-SAV-101 to 134, whose row 16 gives HM-SAV-101 again"
    );
    assert_eq!(book.movements.keys().collect::<Vec<_>>(), ["HM-SAV-127"]);
    let kept: Vec<(&str, Decimal)> = book
        .statements
        .iter()
        .map(|s| (&*s.account, s.posted))
        .collect();
    // HM-SAV-132's first row stands; its overlapping second row is unreadable.
    assert_eq!(
        kept,
        vec![
            ("HM-SAV-127", dec("2.00")),
            ("HM-SAV-127", dec("-2.00")),
            ("HM-SAV-132", dec("2"))
        ]
    );
    // Schedules with an error are kept out; one that names an index is a
    // floating schedule.
    assert_eq!(book.rates.keys().collect::<Vec<_>>(), ["LATE-RATE", "STD"]);
    assert_eq!(
        book.floating_rates.keys().collect::<Vec<_>>(),
        ["FLOAT-IDX"]
    );
    assert_eq!(book.settings.len(), 1);
}

#[test]
fn the_broken_book_as_ods_reports_the_same_faults_with_error_cells_held_as_text() {
    let xlsx = read("harbourview_broken.xlsx");
    let ods = read("harbourview_broken.ods");
    let at = |b: &Book| {
        b.problems
            .iter()
            .map(|p| {
                (
                    p.severity,
                    p.position.sheet.clone(),
                    p.position.cell.clone(),
                )
            })
            .collect::<Vec<_>>()
    };
    assert_eq!(at(&xlsx), at(&ods));
    // LibreOffice stores error results as text; they are still error cells.
    problem(
        &ods,
        Severity::Error,
        "Accounts",
        "F7",
        &["#DIV/0!", "not an error cell"],
    );
    problem(
        &ods,
        Severity::Error,
        "Movements",
        "B5",
        &["#N/A", "not an error cell"],
    );
    assert_eq!(ids(&xlsx), ids(&ods));
}

#[test]
fn a_broken_csv_folder_reports_file_and_sheet_faults() {
    use Severity::Error;
    let book = read("harbourview_broken_csv");
    let expected: &[(Severity, &str, &str, &[&str])] = &[
        (
            Error,
            "holidays",
            "2:2",
            &["0xE9", "line 2", "save the file as CSV UTF-8"],
        ),
        (
            Error,
            "settings",
            "1:1",
            &["first non-blank row (row 1)", "the header is in row 3"],
        ),
        (
            Error,
            "accounts",
            "3:3",
            &["6 fields", "5 fields, as in the header row"],
        ),
        (Error, "movements", "D1", &["Amount", "C1 and D1"]),
        (
            Error,
            "statements",
            "1:1",
            &["posted_interest", "did you mean 'posted_intrest' (D1)"],
        ),
    ];
    for (severity, sheet, cell, words) in expected {
        problem(&book, *severity, sheet, cell, words);
    }
    // A ragged row names its account; it is not read.
    assert_eq!(
        problem(&book, Error, "accounts", "3:3", &[])
            .account
            .as_deref(),
        Some("HM-SAV-402")
    );
    // Without readable Movements and Statements sheets no account can be computed.
    let sheet_errors: Vec<(&str, &str)> = book
        .problems
        .iter()
        .filter(|p| p.position.sheet == "accounts" && p.position.cell != "3:3")
        .map(|p| (p.position.cell.as_str(), p.expected.as_str()))
        .collect();
    assert_eq!(
        sheet_errors,
        vec![
            ("A2", "a Movements sheet that can be read"),
            ("A4", "a Movements sheet that can be read"),
            ("A2", "a Statements sheet that can be read"),
            ("A4", "a Statements sheet that can be read"),
        ]
    );
    assert_eq!(
        book.problems.len(),
        expected.len() + 4,
        "{}",
        all_problems(&book)
    );
    assert!(book.accounts.is_empty());
    // The rates file carries a byte-order mark and is read.
    assert_eq!(book.rates.len(), 3);
}

/// Movements keep the sheet's order within each account, whether the rows
/// come grouped by account or interleaved.
#[test]
fn movements_keep_their_order_within_an_account_when_rows_interleave() {
    let dir = tempfile::tempdir().unwrap();
    let book_dir = dir.path().join("interleaved");
    std::fs::create_dir(&book_dir).unwrap();
    let write = |name: &str, text: &str| std::fs::write(book_dir.join(name), text).unwrap();
    write(
        "accounts.csv",
        "account,currency,day_count,open_date,opening_balance,rate_ref\n\
         IL-A,USD,ACT/360,2026-01-01,100.00,STD\n\
         IL-B,USD,ACT/360,2026-01-01,100.00,STD\n",
    );
    write(
        "rates.csv",
        "rate_ref,effective,rate_percent\nSTD,2026-01-01,2\n",
    );
    write(
        "movements.csv",
        "account,value_date,amount,reference\n\
         IL-A,2026-11-20,1.00,A-1\n\
         IL-A,2026-11-03,2.00,A-2\n\
         IL-B,2026-11-05,3.00,B-1\n\
         IL-A,2026-11-10,4.00,A-3\n\
         IL-B,2026-11-01,5.00,B-2\n\
         IL-A,2026-11-02,6.00,A-4\n",
    );
    let book = read_book(&book_dir, &ReadOptions::default());
    assert!(!book.has_errors(), "{}", all_problems(&book));
    let refs = |id: &str| -> Vec<String> {
        book.movements[id]
            .iter()
            .map(|m| m.reference.as_deref().unwrap().to_string())
            .collect()
    };
    assert_eq!(refs("IL-A"), ["A-1", "A-2", "A-3", "A-4"]);
    assert_eq!(refs("IL-B"), ["B-1", "B-2"]);
}
