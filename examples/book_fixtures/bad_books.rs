//! The bad-books corpus under `tests/bad-books/`: small Harbourview Mutual
//! books, each a good two-account book with one fault planted (or one hard
//! case that must read correctly), as xlsx files, CSV folders and raw bytes.
//! `tests/it/bad_books.rs` runs the real binary on every one against
//! `tests/bad-books/expected.tsv`.
//!
//! Every file is written the same way on every run (fixed document times,
//! no random bytes), so regenerating changes nothing. This module only
//! writes books; it never reads one back.

use std::fs;
use std::path::Path;

use rust_decimal::prelude::ToPrimitive;
use rust_decimal::Decimal;
use rust_xlsxwriter::{DocProperties, ExcelDateTime, Format, Formula, Workbook};

use super::{csv_field, date, fresh_dir, patch_zip, serial_1904, utf16_bytes, Result};

/// A cell of a corpus book.
#[derive(Debug, Clone)]
enum C {
    /// Text.
    S(String),
    /// A spreadsheet number, from its decimal text.
    N(&'static str),
    /// A spreadsheet number given as a float (one no decimal holds).
    Float(f64),
    /// A real date cell (ISO text here).
    D(&'static str),
    /// A number with a date format: a date serial as stored.
    Serial(f64),
    /// A date cell with a time of day (`YYYY-MM-DDTHH:MM:SS`).
    At(&'static str),
    /// A formula and its cached result (a number or an error value).
    F(&'static str, &'static str),
    /// Nothing.
    Blank,
}

use C::{At, Blank, Float, Serial, D, F, N};

fn s(text: &str) -> C {
    C::S(text.to_string())
}

/// One sheet: the first row is usually the header.
#[derive(Debug, Clone)]
struct Sheet {
    name: String,
    rows: Vec<Vec<C>>,
}

type Book = Vec<Sheet>;

fn sheet(name: &str, header: &[&str], rows: Vec<Vec<C>>) -> Sheet {
    let mut all = vec![header.iter().map(|h| s(h)).collect::<Vec<_>>()];
    all.extend(rows);
    Sheet {
        name: name.to_string(),
        rows: all,
    }
}

/// The good book every fault is planted in: two savers, their rates, a
/// deposit in November and November's statement, all consistent.
/// 10,000.00 at 2% ACT/365F for 15 nights and 10,500.00 for 15 more is
/// 16.85 for November.
fn base() -> Book {
    vec![
        sheet(
            "Accounts",
            &[
                "account",
                "name",
                "currency",
                "day_count",
                "open_date",
                "opening_balance",
            ],
            vec![
                vec![
                    s("HM-SAV-701"),
                    s("Harbour saver"),
                    s("USD"),
                    s("ACT/365F"),
                    D("2026-01-01"),
                    N("10000.00"),
                ],
                vec![
                    s("HM-SAV-702"),
                    s("Quay saver"),
                    s("USD"),
                    s("ACT/360"),
                    D("2026-03-01"),
                    N("2500.00"),
                ],
            ],
        ),
        sheet(
            "Rates",
            &["rate_ref", "effective", "rate_percent"],
            vec![
                vec![s("HM-SAV-701"), D("2026-01-01"), N("2.00")],
                vec![s("HM-SAV-702"), D("2026-03-01"), N("1.50")],
            ],
        ),
        sheet(
            "Movements",
            &["account", "value_date", "amount", "reference"],
            vec![vec![
                s("HM-SAV-701"),
                D("2026-11-16"),
                N("500.00"),
                s("DEP-7001"),
            ]],
        ),
        sheet(
            "Statements",
            &[
                "account",
                "period_start",
                "period_end",
                "posted_interest",
                "reference",
            ],
            vec![vec![
                s("HM-SAV-701"),
                D("2026-11-01"),
                D("2026-11-30"),
                N("16.85"),
                s("ST-7011"),
            ]],
        ),
    ]
}

fn find<'a>(book: &'a mut Book, name: &str) -> Result<&'a mut Sheet> {
    book.iter_mut()
        .find(|s| s.name == name)
        .ok_or_else(|| format!("no sheet {name}").into())
}

fn column(sheet: &Sheet, header: &str) -> Result<usize> {
    sheet
        .rows
        .first()
        .and_then(|h| h.iter().position(|c| matches!(c, C::S(t) if t == header)))
        .ok_or_else(|| format!("no column {header} in {}", sheet.name).into())
}

/// Sets a cell of data row `row` (1 is the first row under the header).
fn set(book: &mut Book, sheet: &str, row: usize, header: &str, value: C) -> Result<()> {
    let sh = find(book, sheet)?;
    let col = column(sh, header)?;
    let cells = sh.rows.get_mut(row).ok_or("no such row")?;
    if cells.len() <= col {
        cells.resize(col + 1, Blank);
    }
    cells[col] = value;
    Ok(())
}

/// Adds a column with a value for each data row (missing ones blank).
fn add_column(book: &mut Book, sheet: &str, header: &str, values: Vec<C>) -> Result<()> {
    let sh = find(book, sheet)?;
    let width = sh.rows.first().map_or(0, Vec::len);
    let mut values = values.into_iter();
    for (i, row) in sh.rows.iter_mut().enumerate() {
        row.resize(width, Blank);
        row.push(if i == 0 {
            s(header)
        } else {
            values.next().unwrap_or(Blank)
        });
    }
    Ok(())
}

fn drop_column(book: &mut Book, sheet: &str, header: &str) -> Result<()> {
    let sh = find(book, sheet)?;
    let col = column(sh, header)?;
    for row in &mut sh.rows {
        if col < row.len() {
            row.remove(col);
        }
    }
    Ok(())
}

fn add_row(book: &mut Book, sheet: &str, row: Vec<C>) -> Result<()> {
    find(book, sheet)?.rows.push(row);
    Ok(())
}

fn drop_sheet(book: &mut Book, name: &str) {
    book.retain(|s| s.name != name);
}

fn with(change: impl FnOnce(&mut Book) -> Result<()>) -> Result<Book> {
    let mut book = base();
    change(&mut book)?;
    Ok(book)
}

/// Writes `book` as an xlsx workbook; dates in the 1904 system when asked.
fn xlsx(path: &Path, book: &Book, epoch_1904: bool) -> Result<()> {
    let mut wb = Workbook::new();
    wb.set_properties(
        &DocProperties::new()
            .set_author("Harbourview Mutual finance office")
            .set_creation_datetime(&ExcelDateTime::from_ymd(2026, 11, 30)?),
    );
    let date_format = Format::new().set_num_format("yyyy-mm-dd");
    let time_format = Format::new().set_num_format("yyyy-mm-dd hh:mm");
    if book.is_empty() {
        wb.add_worksheet();
    }
    for sh in book {
        let ws = wb.add_worksheet();
        ws.set_name(&sh.name)?;
        for (r, row) in sh.rows.iter().enumerate() {
            let r = u32::try_from(r)?;
            for (c, v) in row.iter().enumerate() {
                let c = u16::try_from(c)?;
                match v {
                    C::S(t) => {
                        ws.write_string(r, c, t)?;
                    }
                    N(t) => {
                        let x = t.parse::<Decimal>()?.to_f64().ok_or("not a number")?;
                        ws.write_number(r, c, x)?;
                    }
                    Float(x) => {
                        ws.write_number(r, c, *x)?;
                    }
                    D(t) if epoch_1904 => {
                        let serial = u32::try_from(serial_1904(date(t)?)?)?;
                        ws.write_number_with_format(r, c, serial, &date_format)?;
                    }
                    D(t) => {
                        ws.write_datetime_with_format(r, c, date(t)?, &date_format)?;
                    }
                    Serial(x) => {
                        ws.write_number_with_format(r, c, *x, &date_format)?;
                    }
                    At(t) => {
                        let dt = chrono::NaiveDateTime::parse_from_str(t, "%Y-%m-%dT%H:%M:%S")?;
                        ws.write_datetime_with_format(r, c, dt, &time_format)?;
                    }
                    F(formula, result) => {
                        ws.write_formula(r, c, Formula::new(*formula).set_result(*result))?;
                    }
                    Blank => {}
                }
            }
        }
    }
    wb.save(path)?;
    if epoch_1904 {
        patch_zip(path, |name, text| {
            if name == "xl/workbook.xml" {
                text.replacen("<workbookPr", "<workbookPr date1904=\"1\"", 1)
            } else {
                text
            }
        })?;
    }
    Ok(())
}

/// A cell as CSV text.
fn csv_text(v: &C) -> String {
    match v {
        C::S(t) => t.clone(),
        N(t) | D(t) => (*t).to_string(),
        F(_, r) => (*r).to_string(),
        Float(x) | Serial(x) => x.to_string(),
        At(t) => t.replace('T', " "),
        Blank => String::new(),
    }
}

/// A sheet as CSV text, lines ended by CRLF as spreadsheet programs save them.
fn csv_sheet(sh: &Sheet) -> String {
    let width = sh.rows.first().map_or(0, Vec::len);
    let mut text = String::new();
    for row in &sh.rows {
        let mut fields: Vec<String> = row.iter().map(|v| csv_field(&csv_text(v))).collect();
        fields.resize(width.max(fields.len()), String::new());
        text.push_str(&fields.join(","));
        text.push_str("\r\n");
    }
    text
}

/// Writes `book` as a folder of CSV files, each file's bytes made by `encode`.
fn csv_folder(dir: &Path, book: &Book, encode: impl Fn(&str, String) -> Vec<u8>) -> Result<()> {
    fresh_dir(dir)?;
    for sh in book {
        let file = format!("{}.csv", sh.name.to_lowercase());
        fs::write(dir.join(&file), encode(&file, csv_sheet(sh)))?;
    }
    Ok(())
}

fn plain(_: &str, text: String) -> Vec<u8> {
    text.into_bytes()
}

/// Text of `n` characters: a member note repeated.
fn long_text(n: usize) -> String {
    "Harbourview Mutual member note; "
        .chars()
        .cycle()
        .take(n)
        .collect()
}

/// Writes the whole corpus into `root` (emptied first, `expected.tsv` kept).
pub(crate) fn write(root: &Path) -> Result<()> {
    fs::create_dir_all(root)?;
    for entry in fs::read_dir(root)? {
        let path = entry?.path();
        if path.file_name().is_some_and(|n| n == "expected.tsv") {
            continue;
        }
        if path.is_dir() {
            fs::remove_dir_all(&path)?;
        } else {
            fs::remove_file(&path)?;
        }
    }
    let x = |name: &str, book: Book| xlsx(&root.join(name), &book, false);
    let c = |name: &str, book: Book| csv_folder(&root.join(name), &book, plain);

    // Sheets and columns.
    x(
        "missing_accounts_sheet.xlsx",
        with(|b| {
            drop_sheet(b, "Accounts");
            Ok(())
        })?,
    )?;
    x(
        "missing_rates_sheet.xlsx",
        with(|b| {
            drop_sheet(b, "Rates");
            Ok(())
        })?,
    )?;
    x(
        "misnamed_accounts_sheet.xlsx",
        with(|b| {
            find(b, "Accounts")?.name = "Acounts".to_string();
            Ok(())
        })?,
    )?;
    x(
        "two_rates_sheets.xlsx",
        with(|b| {
            let mut again = find(b, "Rates")?.clone();
            again.name = "Rates_".to_string();
            b.push(again);
            Ok(())
        })?,
    )?;
    x(
        "missing_currency_column.xlsx",
        with(|b| drop_column(b, "Accounts", "currency"))?,
    )?;
    x(
        "duplicated_balance_column.xlsx",
        with(|b| {
            add_column(
                b,
                "Accounts",
                "Opening Balance",
                vec![N("10000.00"), N("2500.00")],
            )
        })?,
    )?;
    x(
        "header_not_in_first_row.xlsx",
        with(|b| {
            let sh = find(b, "Accounts")?;
            sh.rows.insert(0, vec![]);
            sh.rows
                .insert(0, vec![s("Harbourview Mutual accounts, November 2026")]);
            Ok(())
        })?,
    )?;
    x(
        "header_only_accounts.xlsx",
        with(|b| {
            find(b, "Accounts")?.rows.truncate(1);
            drop_sheet(b, "Movements");
            drop_sheet(b, "Statements");
            Ok(())
        })?,
    )?;
    x(
        "empty_accounts_sheet.xlsx",
        with(|b| {
            find(b, "Accounts")?.rows.clear();
            Ok(())
        })?,
    )?;
    x(
        "duplicate_account_id.xlsx",
        with(|b| {
            add_row(
                b,
                "Accounts",
                vec![
                    s("HM-SAV-701"),
                    s("Harbour saver (again)"),
                    s("USD"),
                    s("ACT/365F"),
                    D("2026-02-01"),
                    N("750.00"),
                ],
            )
        })?,
    )?;

    // Numbers.
    x(
        "text_in_amount.xlsx",
        with(|b| {
            set(
                b,
                "Accounts",
                2,
                "opening_balance",
                s("two thousand five hundred"),
            )
        })?,
    )?;
    c(
        "decimal_comma_without_option_csv",
        with(|b| set(b, "Accounts", 1, "opening_balance", s("10.000,00")))?,
    )?;
    x(
        "currency_sign_in_amount.xlsx",
        with(|b| set(b, "Movements", 1, "amount", s("$500.00")))?,
    )?;
    x(
        "percent_sign_in_rate.xlsx",
        with(|b| set(b, "Rates", 1, "rate_percent", s("2.00%")))?,
    )?;
    x(
        "rate_decimal_holding_percent.xlsx",
        with(|b| {
            drop_column(b, "Rates", "rate_percent")?;
            add_column(b, "Rates", "rate_decimal", vec![N("0.02"), N("1.5")])
        })?,
    )?;
    x(
        "rate_percent_and_decimal.xlsx",
        with(|b| add_column(b, "Rates", "rate_decimal", vec![N("0.02")]))?,
    )?;
    x(
        "negative_payment_delay.xlsx",
        with(|b| add_column(b, "Accounts", "payment_delay_days", vec![Blank, N("-1")]))?,
    )?;
    x(
        "error_cell_div0.xlsx",
        with(|b| set(b, "Accounts", 1, "opening_balance", F("=1/0", "#DIV/0!")))?,
    )?;
    x(
        "error_cell_na.xlsx",
        with(|b| set(b, "Movements", 1, "value_date", F("=NA()", "#N/A")))?,
    )?;
    x(
        "formula_cached_values.xlsx",
        with(|b| {
            set(
                b,
                "Accounts",
                1,
                "opening_balance",
                F("=9000+1000", "10000"),
            )?;
            set(b, "Movements", 1, "amount", F("=250*2", "500"))
        })?,
    )?;
    x(
        "amount_beyond_decimal_range.xlsx",
        with(|b| set(b, "Accounts", 2, "opening_balance", Float(1e30)))?,
    )?;
    c(
        "amount_beyond_decimal_range_csv",
        with(|b| {
            set(
                b,
                "Accounts",
                2,
                "opening_balance",
                s("123456789012345678901234567890.00"),
            )
        })?,
    )?;
    // 10^15 at 100%: 1,000,000,000,000,000.00 x 100% x 30/365 = 82,191,780,821,917.81
    // for November; more digits than a spreadsheet number holds exactly.
    x(
        "balance_1e15_rate_100.xlsx",
        with(|b| {
            find(b, "Accounts")?.rows.truncate(2);
            set(
                b,
                "Accounts",
                1,
                "opening_balance",
                s("1,000,000,000,000,000.00"),
            )?;
            find(b, "Rates")?.rows.truncate(2);
            set(b, "Rates", 1, "rate_percent", N("100"))?;
            drop_sheet(b, "Movements");
            drop_sheet(b, "Statements");
            Ok(())
        })?,
    )?;
    // The largest balance the reader takes, at 100%: its interest for a
    // month still fits, its balance-days do not.
    c(
        "balance_at_decimal_limit_csv",
        with(|b| {
            find(b, "Accounts")?.rows.truncate(2);
            set(
                b,
                "Accounts",
                1,
                "opening_balance",
                s("9999999999999999999999999999"),
            )?;
            find(b, "Rates")?.rows.truncate(2);
            set(b, "Rates", 1, "rate_percent", N("100"))?;
            drop_sheet(b, "Movements");
            drop_sheet(b, "Statements");
            Ok(())
        })?,
    )?;

    // Dates.
    x(
        "date_in_day_month_order.xlsx",
        with(|b| set(b, "Accounts", 1, "open_date", s("31/01/2026")))?,
    )?;
    x(
        "date_in_ambiguous_order.xlsx",
        with(|b| set(b, "Movements", 1, "value_date", s("11/03/2026")))?,
    )?;
    x(
        "date_that_does_not_exist.xlsx",
        with(|b| set(b, "Accounts", 2, "open_date", s("2026-02-30")))?,
    )?;
    x(
        "date_serial_out_of_range.xlsx",
        with(|b| set(b, "Accounts", 2, "open_date", Serial(3_000_000.0)))?,
    )?;
    // So far before 1900 that the calendar arithmetic itself would overflow.
    x(
        "date_serial_negative.xlsx",
        with(|b| set(b, "Movements", 1, "value_date", Serial(-1e300)))?,
    )?;
    x(
        "date_with_time_of_day.xlsx",
        with(|b| set(b, "Statements", 1, "period_end", At("2026-11-30T17:30:00")))?,
    )?;
    xlsx(&root.join("dates_1904.xlsx"), &base(), true)?;

    // Terms.
    x(
        "unknown_day_count.xlsx",
        with(|b| set(b, "Accounts", 2, "day_count", s("ACT/36")))?,
    )?;
    x(
        "unknown_compounding.xlsx",
        with(|b| add_column(b, "Accounts", "compounding", vec![s("montly")]))?,
    )?;
    x(
        "unknown_currency.xlsx",
        with(|b| set(b, "Accounts", 1, "currency", s("USDD")))?,
    )?;
    x(
        "unknown_round_mode.xlsx",
        with(|b| add_column(b, "Accounts", "round_mode", vec![Blank, s("half-upp")]))?,
    )?;
    x(
        "rate_starts_after_open.xlsx",
        with(|b| set(b, "Rates", 2, "effective", D("2026-04-01")))?,
    )?;
    x(
        "tiers_out_of_order.xlsx",
        with(|b| {
            add_column(b, "Rates", "tier_from", vec![N("0"), N("0")])?;
            add_row(
                b,
                "Rates",
                vec![s("HM-SAV-701"), D("2026-01-01"), N("3.00"), N("50000")],
            )?;
            add_row(
                b,
                "Rates",
                vec![s("HM-SAV-701"), D("2026-01-01"), N("2.50"), N("10000")],
            )
        })?,
    )?;
    x(
        "floating_rate_index.xlsx",
        with(|b| add_column(b, "Rates", "index", vec![Blank, s("HM-BASE")]))?,
    )?;
    x(
        "holiday_date_in_day_month_order.xlsx",
        with(|b| {
            add_column(b, "Accounts", "calendar", vec![s("HM-HOLIDAYS")])?;
            b.push(sheet(
                "Holidays",
                &["calendar", "date", "name"],
                vec![
                    vec![s("HM-HOLIDAYS"), D("2026-07-03"), s("Harbour Day")],
                    vec![s("HM-HOLIDAYS"), s("25/12/2026"), s("Christmas Day")],
                ],
            ));
            Ok(())
        })?,
    )?;

    // Movements and statements.
    x(
        "movement_before_open.xlsx",
        with(|b| {
            add_row(
                b,
                "Movements",
                vec![s("HM-SAV-702"), D("2026-02-15"), N("100.00"), s("DEP-7002")],
            )
        })?,
    )?;
    x(
        "movement_unknown_account.xlsx",
        with(|b| {
            add_row(
                b,
                "Movements",
                vec![s("HM-SAV-790"), D("2026-11-02"), N("100.00"), s("DEP-7003")],
            )
        })?,
    )?;
    x(
        "statement_unknown_account.xlsx",
        with(|b| {
            add_row(
                b,
                "Statements",
                vec![
                    s("HM-SAV-799"),
                    D("2026-11-01"),
                    D("2026-11-30"),
                    N("3.10"),
                    s("ST-7991"),
                ],
            )
        })?,
    )?;
    x(
        "period_ends_before_start.xlsx",
        with(|b| {
            add_row(
                b,
                "Statements",
                vec![
                    s("HM-SAV-702"),
                    D("2026-11-30"),
                    D("2026-11-01"),
                    N("3.13"),
                    s("ST-7021"),
                ],
            )
        })?,
    )?;
    x(
        "overlapping_statements.xlsx",
        with(|b| {
            add_row(
                b,
                "Statements",
                vec![
                    s("HM-SAV-701"),
                    D("2026-11-16"),
                    D("2026-12-15"),
                    N("8.63"),
                    s("ST-7012"),
                ],
            )
        })?,
    )?;

    // Settings.
    x(
        "setting_cutoff_in_day_month_order.xlsx",
        with(|b| {
            b.push(sheet(
                "Settings",
                &["setting", "value"],
                vec![vec![s("cutoff"), s("30/11/2026")]],
            ));
            Ok(())
        })?,
    )?;
    x(
        "unknown_setting.xlsx",
        with(|b| {
            b.push(sheet(
                "Settings",
                &["setting", "value"],
                vec![vec![s("tolerence_bp"), N("0.5")]],
            ));
            Ok(())
        })?,
    )?;

    // Files that are not (whole) workbooks.
    xlsx(&root.join("empty_workbook.xlsx"), &Vec::new(), false)?;
    fs::write(root.join("empty_file.xlsx"), b"")?;
    fs::write(
        root.join("not_a_workbook.xlsx"),
        b"Harbourview Mutual accounts\naccount,currency\nHM-SAV-701,USD\n",
    )?;
    let whole = root.join("whole.tmp");
    xlsx(&whole, &base(), false)?;
    let bytes = fs::read(&whole)?;
    fs::remove_file(&whole)?;
    fs::write(
        root.join("truncated.xlsx"),
        bytes.get(..bytes.len() / 2).unwrap_or_default(),
    )?;
    fs::write(root.join("xlsx_named_xls.xls"), &bytes)?;
    // A zip archive with no workbook in it.
    let mut zip = zip::ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let options = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated)
        .last_modified_time(zip::DateTime::default());
    zip.start_file("notes.txt", options)?;
    std::io::Write::write_all(&mut zip, b"Harbourview Mutual board minutes\n")?;
    fs::write(
        root.join("zip_without_workbook.xlsx"),
        zip.finish()?.into_inner(),
    )?;

    // CSV folders.
    let ragged = root.join("ragged_row_csv");
    csv_folder(&ragged, &base(), |file, text| {
        if file == "accounts.csv" {
            // The second account's record loses its last two fields.
            text.replace(",2026-03-01,2500.00", "").into_bytes()
        } else {
            text.into_bytes()
        }
    })?;
    // A movement record short of fields: the account's balance is unknown.
    csv_folder(
        &root.join("ragged_movement_row_csv"),
        &base(),
        |file, text| {
            if file == "movements.csv" {
                text.replace(",500.00,DEP-7001", "").into_bytes()
            } else {
                text.into_bytes()
            }
        },
    )?;
    csv_folder(&root.join("utf16_csv"), &base(), |file, text| {
        utf16_bytes(&text, file != "rates.csv")
    })?;
    csv_folder(&root.join("utf8_bom_csv"), &base(), |_, text| {
        [&[0xEF, 0xBB, 0xBF][..], text.as_bytes()].concat()
    })?;
    csv_folder(
        &root.join("latin1_csv"),
        &with(|b| set(b, "Accounts", 2, "name", s("Quay caf\u{e9} saver")))?,
        |_, text| {
            text.chars()
                .map(|ch| u8::try_from(ch).unwrap_or(b'?'))
                .collect()
        },
    )?;
    let semicolon = root.join("semicolon_csv");
    csv_folder(&semicolon, &base(), |file, text| {
        if file == "accounts.csv" {
            text.replace(',', ";").into_bytes()
        } else {
            text.into_bytes()
        }
    })?;
    let no_csv = root.join("folder_without_csv");
    fresh_dir(&no_csv)?;
    fs::write(
        no_csv.join("readme.txt"),
        "Harbourview Mutual: the November books go here\r\n",
    )?;
    c(
        "very_long_strings_csv",
        with(|b| {
            set(b, "Accounts", 1, "name", C::S(long_text(40_000)))?;
            set(b, "Movements", 1, "reference", C::S(long_text(50_000)))
        })?,
    )?;
    // The longest text an xlsx cell holds.
    x(
        "very_long_strings.xlsx",
        with(|b| set(b, "Accounts", 2, "name", C::S(long_text(32_767))))?,
    )?;
    Ok(())
}
