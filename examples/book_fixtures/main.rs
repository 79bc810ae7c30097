//! Writes the account-book fixtures of `tests/it/book_reader.rs` under
//! `tests/fixtures/books/`, and the bad-books corpus of `tests/it/bad_books.rs`
//! under `tests/bad-books/` (see [`bad_books`]): the Harbourview Mutual books (an invented credit
//! union) as xlsx, as a folder of CSV files, and (when LibreOffice is
//! installed) as ods and xls; a broken book with planted faults; and small
//! books for single cases (1904 dates, a #SPILL! cell, a stray far cell,
//! encodings, a decimal comma, damaged files).
//!
//! Run `cargo run --example book_fixtures` from the crate root and commit the
//! files. The xlsx and CSV output is deterministic (fixed document times);
//! ods and xls files are made only when missing. This program only writes
//! fixtures; it never reads a book.

use std::fs;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::Command;

use chrono::NaiveDate;
use rust_decimal::prelude::ToPrimitive;
use rust_decimal::Decimal;
use rust_xlsxwriter::{
    DocProperties, ExcelDateTime, Format, Formula, Workbook, Worksheet, XlsxError,
};

mod bad_books;

type Result<T> = std::result::Result<T, Box<dyn std::error::Error>>;

/// A cell of a fixture.
#[derive(Debug, Clone, Copy)]
enum V {
    /// Text.
    S(&'static str),
    /// A number, written as a spreadsheet number (from its decimal text).
    N(&'static str),
    /// A real date cell (ISO text here).
    D(&'static str),
    /// A formula with its cached numeric result.
    F(&'static str, &'static str),
    /// A formula whose cached result is an error value.
    E(&'static str, &'static str),
    /// A boolean cell.
    B(bool),
    /// Nothing.
    Blank,
}

use V::{Blank, B, D, E, F, N, S};

/// One sheet of a fixture: where its header starts, the header and the rows.
struct SheetData {
    name: &'static str,
    /// 0-based row and column of the header's first cell.
    origin: (u32, u16),
    /// Rows before the header (a title, say), at the origin's column.
    above: &'static [&'static [V]],
    header: &'static [&'static str],
    rows: &'static [&'static [V]],
}

const GOOD_ACCOUNTS_HEADER: &[&str] = &[
    "Account",
    "Name",
    "Open Date",
    "Currency",
    "Day Count",
    "Opening Balance",
    "Side",
    "Compounding",
    "Posting",
    "Posting Anchor",
    "Anchor-Kind",
    "Capitalise",
    "Round At",
    "Round Mode",
    "Round Places",
    "Maturity",
    "Rate Ref",
    "Debit Rate Ref",
    "Tier Method",
    "Calendar",
    "Business Day",
    "Payment Delay Days",
    "Opening Accrued",
    "Period Start",
    "GL Interest",
    "GL Accrued",
    "GL Settlement",
    "Branch",
];

const LONG_NAME: &str = "Harbourview Mutual community reinvestment saver, opened at the Quayside branch under the member-owned savings programme of the credit union, with interest credited monthly to the same account and statements sent by post to the registered member address on file at the branch";

const GOOD_ACCOUNTS: &[&[V]] = &[
    &[
        S("HM-SAV-001"),
        S("Everyday Saver"),
        D("2026-01-01"),
        S("USD"),
        S("ACT/365F"),
        N("12500.00"),
        S("liability"),
        S("monthly"),
        S("monthly"),
        D("2026-01-31"),
        S("end"),
        S("yes"),
        S("posting"),
        S("half-up"),
        Blank,
        Blank,
        S("SAV-STD"),
        Blank,
        S("whole"),
        S("HM-HOLIDAYS"),
        Blank,
        Blank,
        Blank,
        Blank,
        N("5100"),
        N("2100"),
        S("1001-HM-SAV-001"),
        S("Harbour Street"),
    ],
    &[
        S("HM-SAV-002"),
        S("Bonus Saver"),
        S("2026-01-01"),
        S("usd"),
        S("act/360"),
        S("1,234.56"),
        Blank,
        S("daily"),
        S("Monthly"),
        Blank,
        Blank,
        B(false),
        S("daily"),
        S("half_even"),
        N("4"),
        Blank,
        S("SAV-BAND"),
        Blank,
        S("banded"),
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        S("Quayside"),
    ],
    &[
        S("HM-TD-003"),
        S("12-month term deposit"),
        D("2026-02-15"),
        S("EUR"),
        S("30E/360"),
        N("50000"),
        Blank,
        S("simple"),
        S("maturity"),
        Blank,
        Blank,
        S("no"),
        Blank,
        Blank,
        Blank,
        D("2027-02-15"),
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
    ],
    &[],
    &[
        S("HM-LN-004"),
        S("Home loan"),
        D("2025-12-15"),
        S("USD"),
        S("ACT/360"),
        N("250000.00"),
        S("asset"),
        S("simple"),
        S("monthly"),
        D("2026-01-15"),
        S("payment"),
        S("no"),
        Blank,
        Blank,
        Blank,
        D("2045-12-15"),
        S("LN-STD"),
        Blank,
        Blank,
        S("HM-HOLIDAYS"),
        S("modified following"),
        N("2"),
        Blank,
        Blank,
        N("4200"),
        N("1300"),
        S("2000-HM-LN-004"),
        Blank,
    ],
    &[
        S("HM-CHK-005"),
        S("Everyday cheque"),
        D("2026-01-01"),
        S("USD"),
        S("ACT/365 Fixed"),
        S("(250.00)"),
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        S("CHK-RATE"),
        S("OD-RATE"),
    ],
    &[
        S("HM-BUS-006"),
        S("Real saver"),
        D("2026-01-02"),
        S("BRL"),
        S("BUS/252"),
        N("10000"),
        Blank,
        S("annual-effective"),
        S("monthly"),
        Blank,
        Blank,
        S("yes"),
        Blank,
        Blank,
        Blank,
        Blank,
        S("BUS-RATE"),
    ],
    &[
        S("HM-QTR-007"),
        S("Quarterly saver"),
        D("2026-02-15"),
        S("KWD"),
        S("ACT/ACT ISDA"),
        N("7500.125"),
        Blank,
        S("quarterly"),
        S("quarterly"),
        D("2026-03-31"),
        Blank,
        S("yes"),
        Blank,
        Blank,
        Blank,
        Blank,
        S("QTR-RATE"),
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        N("3.210"),
        D("2026-01-01"),
    ],
    &[
        S("HM-SAV-008"),
        S(LONG_NAME),
        D("2026-03-01"),
        S("USD"),
        S("ACT/365F"),
        F("=1000+234.56", "1234.56"),
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        Blank,
        S("SAV-STD"),
        Blank,
        Blank,
        S("hm holidays"),
    ],
];

const GOOD_RATES: &[&[V]] = &[
    &[S("SAV-STD"), D("2026-01-01"), N("2.50"), Blank, N("0")],
    &[S("SAV-STD"), D("2026-01-01"), N("3.00"), Blank, N("10000")],
    &[S("SAV-STD"), D("2026-06-01"), N("2.75"), Blank, N("0")],
    &[S("SAV-STD"), D("2026-06-01"), N("3.25"), Blank, N("10000")],
    &[S("SAV-BAND"), D("2026-01-01"), Blank, N("0.02"), N("0")],
    &[
        S("SAV-BAND"),
        D("2026-01-01"),
        Blank,
        N("0.025"),
        S("5,000"),
    ],
    &[S("HM-TD-003"), D("2026-02-01"), N("3.10")],
    &[S("LN-STD"), D("2025-12-01"), N("6.875")],
    &[S("CHK-RATE"), D("2025-01-01"), N("0.10")],
    &[S("OD-RATE"), D("2025-01-01"), N("18.00")],
    &[S("BUS-RATE"), D("2026-01-01"), N("10.75")],
    &[S("QTR-RATE"), D("2026-01-01"), N("1.5")],
];

const GOOD_MOVEMENTS: &[&[V]] = &[
    &[
        S("HM-SAV-001"),
        D("2026-03-10"),
        N("2500.00"),
        Blank,
        S("DEP-0001"),
    ],
    &[
        S("HM-SAV-001"),
        D("2026-04-05"),
        N("-1000.00"),
        D("2026-04-20"),
        S("WDL-0002"),
    ],
    &[
        S("HM-LN-004"),
        D("2026-01-15"),
        S("(1,850.00)"),
        Blank,
        S("PMT-0001"),
    ],
    &[
        S("HM-CHK-005"),
        D("2026-02-01"),
        N("500"),
        Blank,
        S("DEP-0003"),
    ],
    &[
        S("HM-SAV-002"),
        D("2026-01-15"),
        N("0.1"),
        Blank,
        S("DEP-0004"),
    ],
    &[
        S("HM-SAV-002"),
        D("2026-01-16"),
        N("1234.5678901234567"),
        Blank,
        S("DEP-0005"),
    ],
];

const GOOD_STATEMENTS: &[&[V]] = &[
    &[
        S("HM-SAV-001"),
        D("2026-01-01"),
        D("2026-02-01"),
        N("26.54"),
        S("ST-01"),
    ],
    &[
        S("HM-SAV-001"),
        D("2026-02-01"),
        D("2026-03-01"),
        N("24.00"),
        S("ST-02A"),
    ],
    &[
        S("HM-SAV-001"),
        D("2026-02-01"),
        D("2026-03-01"),
        N("-24.00"),
        S("ST-02B"),
    ],
    &[
        S("HM-SAV-001"),
        D("2026-02-01"),
        D("2026-03-01"),
        N("24.05"),
        S("ST-02C"),
    ],
    &[
        S("HM-LN-004"),
        D("2025-12-15"),
        D("2026-01-15"),
        N("1480.21"),
        S("ST-L1"),
    ],
];

const GOOD_HOLIDAYS: &[&[V]] = &[
    &[S("HM-HOLIDAYS"), D("2026-01-01"), S("New Year's Day")],
    &[S("HM-HOLIDAYS"), D("2026-07-03"), S("Harbour Day")],
    &[S("HM-HOLIDAYS"), D("2026-12-25"), S("Christmas Day")],
];

const GOOD_SETTINGS: &[&[V]] = &[
    &[S("cutoff"), D("2026-11-30")],
    &[S("Window Start"), S("2026-11-01")],
    &[S("tolerance_amount"), N("0.01")],
    &[S("tolerance_bp"), N("0.5")],
    &[S("entity"), S("Harbourview Mutual")],
    &[S("journal_style"), S("Incremental")],
    &[S("statement_end"), S("exclusive")],
];

const GOOD_FIXINGS: &[&[V]] = &[&[S("HM-BASE"), D("2026-01-02"), N("4.30")]];

const NOTES: &[&[V]] = &[&[S(
    "Month-end book of Harbourview Mutual, prepared by the finance office",
)]];

fn good_book() -> Vec<SheetData> {
    vec![
        SheetData {
            name: "Accounts",
            origin: (0, 0),
            above: &[],
            header: GOOD_ACCOUNTS_HEADER,
            rows: GOOD_ACCOUNTS,
        },
        SheetData {
            name: "Rates",
            origin: (0, 0),
            above: &[],
            header: &[
                "Rate Ref",
                "Effective",
                "Rate Percent",
                "Rate Decimal",
                "Tier From",
            ],
            rows: GOOD_RATES,
        },
        SheetData {
            name: "Movements",
            origin: (2, 1),
            above: &[],
            header: &[
                "Account",
                "Value Date",
                "Amount",
                "Booking Date",
                "Reference",
            ],
            rows: GOOD_MOVEMENTS,
        },
        SheetData {
            name: "Statements",
            origin: (0, 0),
            above: &[],
            header: &[
                "account",
                "period_start",
                "period_end",
                "posted_interest",
                "reference",
            ],
            rows: GOOD_STATEMENTS,
        },
        SheetData {
            name: "Holidays",
            origin: (0, 0),
            above: &[],
            header: &["Calendar", "Date", "Name"],
            rows: GOOD_HOLIDAYS,
        },
        SheetData {
            name: "Settings",
            origin: (0, 0),
            above: &[],
            header: &["Setting", "Value"],
            rows: GOOD_SETTINGS,
        },
        SheetData {
            name: "Fixings",
            origin: (0, 0),
            above: &[],
            header: &["index", "date", "rate_percent"],
            rows: GOOD_FIXINGS,
        },
        SheetData {
            name: "Notes",
            origin: (0, 0),
            above: &[],
            header: &["Note"],
            rows: NOTES,
        },
    ]
}

const BROKEN_ACCOUNTS_HEADER: &[&str] = &[
    "account",
    "name",
    "currency",
    "day_count",
    "open_date",
    "opening_balance",
    "posting",
    "compounding",
    "maturity",
    "rate_ref",
    "debit_rate_ref",
    "calendar",
    "round_places",
    "payment_delay_days",
    "capitalise",
    "rate_method",
    "period_start",
    "posting_anchor",
    "opening_acrued",
];

/// A row of the broken Accounts sheet: id, currency, basis, open date, balance,
/// then (column, value) pairs from G on.
macro_rules! broken {
    ($id:expr, $cur:expr, $basis:expr, $open:expr, $bal:expr $(, $col:literal => $v:expr)*) => {{
        let mut row = [Blank; 19];
        row[0] = S($id);
        row[1] = S("Planted fault");
        row[2] = $cur;
        row[3] = $basis;
        row[4] = $open;
        row[5] = $bal;
        row[9] = S("STD");
        $( row[$col] = $v; )*
        row
    }};
}

const ROW_101: [V; 19] = broken!(
    "HM-SAV-101",
    S("USDD"),
    S("ACT/365F"),
    D("2026-01-01"),
    N("1000")
);
const ROW_102: [V; 19] = broken!(
    "HM-SAV-102",
    S("USD"),
    S("ACT/36"),
    D("2026-01-01"),
    N("1000")
);
const ROW_103: [V; 19] = broken!(
    "HM-SAV-103",
    S("USD"),
    S("ACT/365F"),
    S("31/01/2026"),
    N("1000")
);
const ROW_104: [V; 19] = broken!(
    "HM-SAV-104",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    S("1.234,56")
);
const ROW_105: [V; 19] = broken!("HM-SAV-105", S("USD"), S("ACT/365F"), N("46023"), N("1000"));
const ROW_106: [V; 19] = broken!(
    "HM-SAV-106",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    E("=1/0", "#DIV/0!")
);
const ROW_107: [V; 19] = broken!("HM-SAV-107", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 8 => D("2025-12-31"));
const ROW_108: [V; 19] =
    broken!("HM-SAV-108", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 6 => S("maturity"));
const ROW_109: [V; 19] =
    broken!("HM-SAV-109", S("USD"), S("ACT/ACT ICMA"), D("2026-01-01"), N("1000"), 6 => S("none"));
const ROW_110: [V; 19] =
    broken!("HM-SAV-110", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 12 => N("13"));
const ROW_111: [V; 19] =
    broken!("HM-SAV-111", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 13 => N("-1"));
const ROW_112: [V; 19] =
    broken!("HM-SAV-112", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 14 => S("perhaps"));
const ROW_113: [V; 19] = broken!("HM-SAV-113", S("USD"), S("ACT/360"), D("2026-01-01"), N("1000"), 15 => S("compounded-in-arrears"));
const ROW_114: [V; 19] = broken!("HM-SAV-114", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 11 => S("HM-HOLIDAY"));
const ROW_101_AGAIN: [V; 19] = broken!(
    "HM-SAV-101",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    N("2000")
);
const ROW_116: [V; 19] = broken!("HM-SAV-116", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 9 => S("NO-SUCH-RATE"));
const ROW_117: [V; 19] =
    broken!("HM-SAV-117", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 9 => S("LATE-RATE"));
const ROW_118: [V; 19] = broken!("HM-SAV-118", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 10 => S("NO-OD-RATE"));
const ROW_119: [V; 19] = broken!("HM-SAV-119", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 16 => D("2026-02-01"));
const ROW_120: [V; 19] =
    broken!("HM-SAV-120", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 6 => S("quarterly"));
const ROW_121: [V; 19] =
    broken!("HM-SAV-121", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 7 => S("annual"));
const ROW_122: [V; 19] = broken!(
    "HM-SAV-122",
    S("BRL"),
    S("BUS/252"),
    D("2026-01-02"),
    N("1000")
);
const ROW_123: [V; 19] =
    broken!("HM-SAV-123", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 6 => S("montly"));
const ROW_124: [V; 19] = broken!(
    "HM-SAV-124",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    S("$1,000.00")
);
const ROW_125: [V; 19] =
    broken!("HM-SAV-125", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 9 => S("TIER-BAD"));
const ROW_126: [V; 19] =
    broken!("HM-SAV-126", S("USD"), S("ACT/360"), D("2026-01-01"), N("1000"), 9 => S("FLOAT-IDX"));
const ROW_127: [V; 19] = broken!("HM-SAV-127", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 8 => D("2026-12-31"));
const ROW_128: [V; 19] = broken!(
    "HM-SAV-128",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    N("1000")
);
const ROW_129: [V; 19] = broken!(
    "HM-SAV-129",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    N("1000")
);
const ROW_130: [V; 19] = broken!(
    "HM-SAV-130",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    N("1000")
);
const ROW_131: [V; 19] = broken!(
    "HM-SAV-131",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    N("1000")
);
const ROW_132: [V; 19] = broken!(
    "HM-SAV-132",
    S("USD"),
    S("ACT/365F"),
    D("2026-01-01"),
    N("1000")
);
const ROW_133: [V; 19] = broken!("HM-SAV-133", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 11 => S("HM-BROKEN"));
const ROW_134: [V; 19] =
    broken!("HM-SAV-134", S("USD"), S("ACT/365F"), D("2026-01-01"), N("1000"), 18 => N("5.00"));

const BROKEN_ACCOUNTS: &[&[V]] = &[
    &ROW_101,
    &ROW_102,
    &ROW_103,
    &ROW_104,
    &ROW_105,
    &ROW_106,
    &ROW_107,
    &ROW_108,
    &ROW_109,
    &ROW_110,
    &ROW_111,
    &ROW_112,
    &ROW_113,
    &ROW_114,
    &ROW_101_AGAIN,
    &ROW_116,
    &ROW_117,
    &ROW_118,
    &ROW_119,
    &ROW_120,
    &ROW_121,
    &ROW_122,
    &ROW_123,
    &ROW_124,
    &ROW_125,
    &ROW_126,
    &ROW_127,
    &ROW_128,
    &ROW_129,
    &ROW_130,
    &ROW_131,
    &ROW_132,
    &ROW_133,
    &ROW_134,
];

const BROKEN_RATES: &[&[V]] = &[
    &[S("STD"), D("2026-01-01"), N("0.025"), N("0")],
    &[S("TIER-BAD"), D("2026-01-01"), N("0.01"), N("0")],
    &[S("TIER-BAD"), D("2026-01-01"), N("0.02"), N("5000")],
    &[S("TIER-BAD"), D("2026-01-01"), N("0.015"), N("1000")],
    &[S("TIER-DUP"), D("2026-01-01"), N("0.01"), N("0")],
    &[S("TIER-DUP"), D("2026-01-01"), N("0.02"), N("0")],
    &[S("LATE-RATE"), D("2026-03-01"), N("0.03"), N("0")],
    &[S("FLOAT-IDX"), D("2026-01-01"), Blank, N("0"), S("SOFR")],
    &[S("BAD-DATE"), S("2026-13-01"), N("0.02"), N("0")],
];

const BROKEN_MOVEMENTS: &[&[V]] = &[
    &[S("HM-SAV-999"), D("2026-02-01"), N("100")],
    &[S("HM-SAV-127"), D("2025-12-15"), N("50")],
    &[S("HM-SAV-129"), D("2026-02-01"), S("£40.00")],
    &[S("HM-SAV-130"), E("=NA()", "#N/A"), N("40")],
    &[
        S("HM-SAV-128"),
        D("2026-02-01"),
        E("=SEQUENCE(2)", "#GETTING_DATA"),
    ],
    &[S("hm-sav-127"), D("2026-02-01"), N("10")],
];

const BROKEN_STATEMENTS: &[&[V]] = &[
    &[S("HM-SAV-998"), D("2026-01-01"), D("2026-01-31"), N("1.00")],
    &[S("HM-SAV-131"), D("2026-02-28"), D("2026-02-01"), N("1.00")],
    &[S("HM-SAV-127"), D("2025-01-01"), D("2025-01-31"), N("1.00")],
    &[S("HM-SAV-127"), D("2026-01-01"), D("2026-01-31"), N("2.00")],
    &[
        S("HM-SAV-127"),
        D("2026-01-01"),
        D("2026-01-31"),
        N("-2.00"),
    ],
    &[S("HM-SAV-132"), D("2026-01-01"), D("2026-01-31"), N("2.00")],
    &[S("HM-SAV-132"), D("2026-01-15"), D("2026-02-14"), N("2.00")],
    &[S("HM-SAV-127"), D("2027-01-01"), D("2027-01-31"), N("2.00")],
];

const BROKEN_HOLIDAYS: &[&[V]] = &[
    &[S("HM-HOLIDAYS"), D("2026-01-01"), S("New Year's Day")],
    &[S("HM-BROKEN"), S("Jan 5 2026"), S("Founders' Day")],
];

const BROKEN_SETTINGS: &[&[V]] = &[
    &[S("cut_of"), D("2026-11-30")],
    &[S("tolerance_bp"), S("abc")],
    &[S("journal_style"), S("reverse")],
    &[S("statement_end"), S("inclusive")],
];

fn broken_book() -> Vec<SheetData> {
    vec![
        SheetData {
            name: "Accounts",
            origin: (0, 0),
            above: &[],
            header: BROKEN_ACCOUNTS_HEADER,
            rows: BROKEN_ACCOUNTS,
        },
        SheetData {
            name: "Rates",
            origin: (0, 0),
            above: &[],
            header: &[
                "rate_ref",
                "effective",
                "rate_percent",
                "tier_from",
                "index",
            ],
            rows: BROKEN_RATES,
        },
        SheetData {
            name: "Movements",
            origin: (0, 0),
            above: &[],
            header: &[
                "account",
                "value_date",
                "amount",
                "booking_date",
                "reference",
            ],
            rows: BROKEN_MOVEMENTS,
        },
        SheetData {
            name: "Statements",
            origin: (0, 0),
            above: &[],
            header: &["account", "period_start", "period_end", "posted_interest"],
            rows: BROKEN_STATEMENTS,
        },
        SheetData {
            name: "Holidays",
            origin: (0, 0),
            above: &[],
            header: &["calendar", "date", "name"],
            rows: BROKEN_HOLIDAYS,
        },
        SheetData {
            name: "Settings",
            origin: (0, 0),
            above: &[],
            header: &["setting", "value"],
            rows: BROKEN_SETTINGS,
        },
    ]
}

/// A small good book: one account and its rates.
const SMALL_ACCOUNTS: &[&[V]] = &[&[
    S("HM-SAV-201"),
    S("USD"),
    S("ACT/365F"),
    D("2024-02-29"),
    N("800.00"),
]];
const SMALL_RATES: &[&[V]] = &[&[S("HM-SAV-201"), D("2024-01-01"), N("1.25")]];

fn small_book(accounts: &'static [&'static [V]]) -> Vec<SheetData> {
    vec![
        SheetData {
            name: "Accounts",
            origin: (0, 0),
            above: &[],
            header: &[
                "account",
                "currency",
                "day_count",
                "open_date",
                "opening_balance",
            ],
            rows: accounts,
        },
        SheetData {
            name: "Rates",
            origin: (0, 0),
            above: &[],
            header: &["rate_ref", "effective", "rate_percent"],
            rows: SMALL_RATES,
        },
    ]
}

fn date(s: &str) -> Result<NaiveDate> {
    Ok(NaiveDate::parse_from_str(s, "%Y-%m-%d")?)
}

/// The workbook date number of `d` in the 1904 system.
fn serial_1904(d: NaiveDate) -> Result<i64> {
    Ok((d - date("1904-01-01")?).num_days())
}

fn write_cell(
    ws: &mut Worksheet,
    r: u32,
    c: u16,
    v: V,
    date_format: &Format,
    epoch_1904: bool,
) -> Result<()> {
    match v {
        S(s) => {
            ws.write_string(r, c, s)?;
        }
        N(s) => {
            let x = s
                .parse::<Decimal>()?
                .to_f64()
                .ok_or("not a spreadsheet number")?;
            ws.write_number(r, c, x)?;
        }
        D(s) if epoch_1904 => {
            let serial = u32::try_from(serial_1904(date(s)?)?)?;
            ws.write_number_with_format(r, c, serial, date_format)?;
        }
        D(s) => {
            ws.write_datetime_with_format(r, c, date(s)?, date_format)?;
        }
        F(formula, result) | E(formula, result) => {
            ws.write_formula(r, c, Formula::new(formula).set_result(result))?;
        }
        B(b) => {
            ws.write_boolean(r, c, b)?;
        }
        Blank => {}
    }
    Ok(())
}

fn write_xlsx(
    path: &Path,
    sheets: &[SheetData],
    epoch_1904: bool,
    extra: impl FnOnce(&mut Workbook) -> std::result::Result<(), XlsxError>,
) -> Result<()> {
    let mut wb = Workbook::new();
    wb.set_properties(
        &DocProperties::new()
            .set_author("Harbourview Mutual finance office")
            .set_creation_datetime(&ExcelDateTime::from_ymd(2026, 1, 1)?),
    );
    let date_format = Format::new().set_num_format("yyyy-mm-dd");
    for sheet in sheets {
        let ws = wb.add_worksheet();
        ws.set_name(sheet.name)?;
        let (r0, c0) = sheet.origin;
        let mut r = r0;
        for row in sheet.above {
            for (i, v) in row.iter().enumerate() {
                write_cell(ws, r, c0 + u16::try_from(i)?, *v, &date_format, epoch_1904)?;
            }
            r += 2;
        }
        for (i, h) in sheet.header.iter().enumerate() {
            ws.write_string(r, c0 + u16::try_from(i)?, *h)?;
        }
        for row in sheet.rows {
            r += 1;
            for (i, v) in row.iter().enumerate() {
                write_cell(ws, r, c0 + u16::try_from(i)?, *v, &date_format, epoch_1904)?;
            }
        }
    }
    extra(&mut wb)?;
    wb.save(path)?;
    Ok(())
}

/// Rewrites parts of a saved xlsx: what no writer produces on request (a
/// 1904 date system, an error kind such as #SPILL!).
fn patch_zip(path: &Path, patch: impl Fn(&str, String) -> String) -> Result<()> {
    let bytes = fs::read(path)?;
    let mut archive = zip::ZipArchive::new(std::io::Cursor::new(bytes))?;
    let mut out = zip::ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let options = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated)
        .last_modified_time(zip::DateTime::default());
    for i in 0..archive.len() {
        let mut entry = archive.by_index(i)?;
        let name = entry.name()?.to_string();
        let mut text = String::new();
        entry.read_to_string(&mut text)?;
        out.start_file(name.as_str(), options)?;
        out.write_all(patch(&name, text).as_bytes())?;
    }
    let written = out.finish()?.into_inner();
    fs::write(path, written)?;
    Ok(())
}

/// Text as UTF-16 with a byte-order mark, little- or big-endian.
fn utf16_bytes(text: &str, little: bool) -> Vec<u8> {
    let mut bytes: Vec<u8> = if little {
        vec![0xFF, 0xFE]
    } else {
        vec![0xFE, 0xFF]
    };
    for unit in text.encode_utf16() {
        bytes.extend_from_slice(&if little {
            unit.to_le_bytes()
        } else {
            unit.to_be_bytes()
        });
    }
    bytes
}

/// A CSV field, quoted when it must be.
fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

fn csv_text(v: V) -> String {
    match v {
        S(s) | N(s) | D(s) => s.to_string(),
        F(_, r) | E(_, r) => r.to_string(),
        B(true) => "yes".to_string(),
        B(false) => "no".to_string(),
        Blank => String::new(),
    }
}

/// A sheet as CSV lines, laid out as in the workbook (blank lines and
/// leading empty fields for the origin).
fn csv_lines(sheet: &SheetData) -> Vec<String> {
    let (r0, c0) = sheet.origin;
    let lead = ",".repeat(usize::from(c0));
    let mut lines: Vec<String> = (0..r0).map(|_| String::new()).collect();
    for row in sheet.above {
        lines.push(format!(
            "{lead}{}",
            row.iter()
                .map(|v| csv_field(&csv_text(*v)))
                .collect::<Vec<_>>()
                .join(",")
        ));
        lines.push(String::new());
    }
    lines.push(format!(
        "{lead}{}",
        sheet
            .header
            .iter()
            .map(|h| csv_field(h))
            .collect::<Vec<_>>()
            .join(",")
    ));
    let width = sheet.header.len();
    for row in sheet.rows {
        if row.is_empty() {
            lines.push(String::new());
            continue;
        }
        let mut fields: Vec<String> = row.iter().map(|v| csv_field(&csv_text(*v))).collect();
        fields.resize(width, String::new());
        lines.push(format!("{lead}{}", fields.join(",")));
    }
    lines
}

fn write_csv(dir: &Path, sheet: &SheetData, bom: bool) -> Result<()> {
    let mut text = csv_lines(sheet).join("\r\n");
    text.push_str("\r\n");
    let mut bytes = Vec::new();
    if bom {
        bytes.extend_from_slice(&[0xEF, 0xBB, 0xBF]);
    }
    bytes.extend_from_slice(text.as_bytes());
    fs::write(
        dir.join(format!("{}.csv", sheet.name.to_lowercase())),
        bytes,
    )?;
    Ok(())
}

fn fresh_dir(dir: &Path) -> Result<()> {
    if dir.exists() {
        fs::remove_dir_all(dir)?;
    }
    fs::create_dir_all(dir)?;
    Ok(())
}

/// Converts with LibreOffice when it is installed; says so when it is not.
/// LibreOffice stamps each file it saves, so an existing conversion is kept
/// (delete it to make it again).
fn convert(file: &Path, to: &str, out_dir: &Path) -> Result<bool> {
    let target = out_dir.join(file.with_extension(to).file_name().unwrap_or_default());
    if target.exists() {
        return Ok(true);
    }
    let profile = std::env::temp_dir().join("ledgerate-fixtures-office-profile");
    let status = Command::new("soffice")
        .arg(format!(
            "-env:UserInstallation=file://{}",
            profile.display()
        ))
        .args(["--headless", "--convert-to", to, "--outdir"])
        .arg(out_dir)
        .arg(file)
        .status();
    match status {
        Ok(s) if s.success() => Ok(true),
        Ok(s) => Err(format!("soffice failed converting {} to {to}: {s}", file.display()).into()),
        Err(_) => {
            eprintln!(
                "soffice is not installed: no {to} fixture for {}",
                file.display()
            );
            Ok(false)
        }
    }
}

fn main() -> Result<()> {
    let root = PathBuf::from("tests/fixtures/books");
    fs::create_dir_all(&root)?;

    // The good book, in every form.
    let good = good_book();
    let good_xlsx = root.join("harbourview_good.xlsx");
    write_xlsx(&good_xlsx, &good, false, |_| Ok(()))?;
    fs::copy(&good_xlsx, root.join("harbourview_good.book"))?;
    fs::copy(&good_xlsx, root.join("HARBOURVIEW_UPPER.XLSX"))?;
    let csv_dir = root.join("harbourview_good_csv");
    fresh_dir(&csv_dir)?;
    for (i, sheet) in good.iter().enumerate() {
        // One file with a byte-order mark, as spreadsheet programs save "CSV UTF-8".
        write_csv(&csv_dir, sheet, i == 1)?;
    }
    convert(&good_xlsx, "ods", &root)?;
    convert(&good_xlsx, "xls", &root)?;

    // The broken book: planted faults, one per kind.
    let broken_xlsx = root.join("harbourview_broken.xlsx");
    write_xlsx(&broken_xlsx, &broken_book(), false, |_| Ok(()))?;
    patch_zip(&broken_xlsx, |name, text| {
        if name.starts_with("xl/worksheets/") {
            text.replace("<v>#GETTING_DATA</v>", "<v>#SPILL!</v>")
        } else {
            text
        }
    })?;
    convert(&broken_xlsx, "ods", &root)?;

    // Sheet-level and file-level faults of a CSV folder.
    broken_csv(&root.join("harbourview_broken_csv"))?;

    // 1904 date system: the same day has another serial number.
    let d1904 = root.join("dates_1904.xlsx");
    write_xlsx(&d1904, &small_book(SMALL_ACCOUNTS), true, |_| Ok(()))?;
    patch_zip(&d1904, |name, text| {
        if name == "xl/workbook.xml" {
            text.replacen("<workbookPr", "<workbookPr date1904=\"1\"", 1)
        } else {
            text
        }
    })?;

    // A stray cell in the last row and column of Accounts.
    let stray = root.join("stray_far_cell.xlsx");
    write_xlsx(&stray, &small_book(SMALL_ACCOUNTS), false, |wb| {
        let ws = wb.worksheet_from_name("Accounts")?;
        ws.write_string(1_048_575, 16_383, "x")?;
        Ok(())
    })?;

    // Sheet names: a near miss for Accounts, and two sheets that are both Rates.
    let mut misnamed = small_book(SMALL_ACCOUNTS);
    if let Some(first) = misnamed.first_mut() {
        first.name = "Acounts";
    }
    misnamed.push(SheetData {
        name: "Rate-s",
        origin: (0, 0),
        above: &[],
        header: &["rate_ref", "effective", "rate_percent"],
        rows: SMALL_RATES,
    });
    write_xlsx(&root.join("misnamed_sheets.xlsx"), &misnamed, false, |_| {
        Ok(())
    })?;

    // A CSV folder saved with semicolons between fields.
    let semicolon = root.join("semicolon_csv");
    fresh_dir(&semicolon)?;
    fs::write(
        semicolon.join("accounts.csv"),
        "account;currency;day_count;open_date;opening_balance\r\nHM-SAV-501;EUR;ACT/360;2026-01-01;100,00\r\n",
    )?;
    fs::write(
        semicolon.join("rates.csv"),
        "rate_ref,effective,rate_percent\r\nHM-SAV-501,2026-01-01,1.00\r\n",
    )?;

    // Damaged files.
    let good_bytes = fs::read(&good_xlsx)?;
    fs::write(
        root.join("truncated.xlsx"),
        good_bytes.get(..good_bytes.len() / 2).unwrap_or_default(),
    )?;
    fs::write(root.join("empty.xlsx"), b"")?;
    fs::write(
        root.join("not_a_workbook.xlsx"),
        b"account,currency\nHM-SAV-001,USD\n",
    )?;

    // Encodings and a decimal comma.
    let utf16 = root.join("utf16_csv");
    fresh_dir(&utf16)?;
    let small = small_book(SMALL_ACCOUNTS);
    for (sheet, little) in small.iter().zip([true, false]) {
        let text = csv_lines(sheet).join("\r\n") + "\r\n";
        let bytes = utf16_bytes(&text, little);
        fs::write(
            utf16.join(format!("{}.csv", sheet.name.to_lowercase())),
            bytes,
        )?;
    }
    let comma = root.join("decimal_comma_csv");
    fresh_dir(&comma)?;
    fs::write(
        comma.join("accounts.csv"),
        "account,currency,day_count,open_date,opening_balance,opening_accrued\r\n\
         HM-SAV-301,EUR,ACT/360,2026-01-01,\"1.234,56\",\"(0,75)\"\r\n",
    )?;
    fs::write(
        comma.join("rates.csv"),
        "rate_ref,effective,rate_percent\r\nHM-SAV-301,2026-01-01,\"2,50\"\r\n",
    )?;

    bad_books::write(Path::new("tests/bad-books"))?;
    Ok(())
}

/// The CSV book whose faults are of the sheets and files themselves.
fn broken_csv(dir: &Path) -> Result<()> {
    fresh_dir(dir)?;
    fs::write(
        dir.join("accounts.csv"),
        "account,currency,day_count,open_date,opening_balance\r\n\
         HM-SAV-401,USD,ACT/365F,2026-01-01,1000.00\r\n\
         HM-SAV-402,USD,ACT/365F,2026-01-01,1,000.00\r\n\
         HM-SAV-403,USD,ACT/365F,2026-01-01,500.00\r\n",
    )?;
    // With a byte-order mark.
    fs::write(
        dir.join("rates.csv"),
        [&[0xEF, 0xBB, 0xBF][..], b"rate_ref,effective,rate_percent\r\nHM-SAV-401,2026-01-01,2.00\r\nHM-SAV-402,2026-01-01,2.00\r\nHM-SAV-403,2026-01-01,2.00\r\n"].concat(),
    )?;
    fs::write(
        dir.join("movements.csv"),
        "account,value_date,amount,Amount\r\nHM-SAV-401,2026-02-01,10.00,10.00\r\n",
    )?;
    fs::write(
        dir.join("statements.csv"),
        "account,period_start,period_end,posted_intrest\r\nHM-SAV-401,2026-01-01,2026-01-31,1.70\r\n",
    )?;
    fs::write(
        dir.join("settings.csv"),
        "Harbourview Mutual run settings\r\n\r\nsetting,value\r\ncutoff,2026-11-30\r\n",
    )?;
    // Latin-1, not UTF-8: "Café" with a single byte for the accented letter.
    fs::write(
        dir.join("holidays.csv"),
        b"calendar,date,name\r\nHM-HOLIDAYS,2026-01-01,Caf\xE9 closed\r\n",
    )?;
    fs::write(
        dir.join("fixings.csv"),
        "index,date,rate_percent\r\nHM-BASE,2026-01-02,4.30\r\n",
    )?;
    fs::write(dir.join("readme.txt"), "not a sheet\r\n")?;
    Ok(())
}
