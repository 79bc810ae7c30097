//! Writes the demo month-end books under `sample-books/`: an invented
//! credit union, Harbourview Mutual, closing November 2026.
//!
//! Run `cargo run --example sample_books` to regenerate them. The same
//! definitions give the CSV folder and the workbook, so the two always agree.
//! Every name, account and figure here is invented.

use std::path::Path;

use chrono::{Datelike, NaiveDate};
use ledgerate::batch::journal::JournalStyle;
use ledgerate::batch::{run_books, BatchSettings};
use ledgerate::book::{read_book, ReadOptions};
use ledgerate::conventions::daycount::Basis;
use ledgerate::engine::events::accrue_life;
use ledgerate::engine::floating::{FixingFallback, FloatingRates};
use ledgerate::engine::ledger::SettlementLines;
use ledgerate::engine::rates::{RateSchedule, RateTable};
use ledgerate::engine::reconcile::expected_over;
use ledgerate::engine::reconcile::Tolerance;
use ledgerate::engine::run::RunOptions;
use ledgerate::engine::{AccountTerms, Inputs, Movement};
use ledgerate::schema::{
    layout, Layout, ACCOUNTS, ACCRUAL_STATUS, BOOKED, FIXINGS, HOLIDAYS, MOVEMENTS, RATES,
    SETTINGS, STATEMENTS, TAX, TRIAL_BALANCE,
};
use rust_decimal::Decimal;
use rust_xlsxwriter::{Format, Workbook};
use std::collections::BTreeMap;

/// A cell of a sample sheet.
#[derive(Clone)]
enum Cell {
    Text(String),
    Number(String),
    Date(NaiveDate),
    Empty,
}

fn t(s: &str) -> Cell {
    if s.is_empty() {
        Cell::Empty
    } else {
        Cell::Text(s.to_string())
    }
}

fn num(s: &str) -> Cell {
    Cell::Number(s.to_string())
}

fn date(s: &str) -> Cell {
    if s.is_empty() {
        Cell::Empty
    } else {
        Cell::Date(s.parse().expect("sample dates are ISO"))
    }
}

struct Sheet {
    name: &'static str,
    columns: Vec<&'static str>,
    rows: Vec<Vec<Cell>>,
}

/// The Accounts columns the demo book fills, checked against the book schema
/// when the example is built.
const ACCOUNT_LAYOUT: Layout = layout!(
    ACCOUNTS,
    "account",
    "name",
    "currency",
    "side",
    "day_count",
    "compounding",
    "posting",
    "posting_anchor",
    "anchor_kind",
    "capitalise",
    "open_date",
    "opening_balance",
    "opening_accrued",
    "period_start",
    "maturity",
    "rate_ref",
    "debit_rate_ref",
    "tier_method",
    "calendar",
    "business_day",
    "gl_interest",
    "gl_accrued",
    "rate_method",
    "lookback_days",
    "observation_shift",
    "close_date",
    "break_penalty",
    "break_days",
    "after_maturity",
    "rollover_months",
    "rollover_rate_ref",
    "tax_ref",
    "gl_tax",
);

/// One account row: the columns of `ACCOUNT_LAYOUT`, by name.
fn account(fields: &[(&str, Cell)]) -> Vec<Cell> {
    ACCOUNT_LAYOUT
        .labels()
        .into_iter()
        .map(|c| {
            fields
                .iter()
                .find(|(k, _)| *k == c)
                .map_or(Cell::Empty, |(_, v)| v.clone())
        })
        .collect()
}

fn sheets() -> Vec<Sheet> {
    let mut accounts = Vec::new();
    let mut rates: Vec<Vec<Cell>> = Vec::new();
    let mut movements: Vec<Vec<Cell>> = Vec::new();
    let rate = |r: &str, eff: &str, pct: &str, tier: &str| {
        vec![
            t(r),
            date(eff),
            num(pct),
            if tier.is_empty() {
                Cell::Empty
            } else {
                num(tier)
            },
        ]
    };
    let mv = |a: &str, value: &str, amount: &str, booked: &str, reference: &str| {
        vec![t(a), date(value), num(amount), date(booked), t(reference)]
    };

    // Everyday savers: daily compounding, credited monthly; the saver rate is cut on 16 November.
    rates.push(rate("SAVER", "2026-01-01", "2.10", ""));
    rates.push(rate("SAVER", "2026-11-16", "1.95", ""));
    let savers = [
        ("HM-SAV-001", "Marram Point household saver", "18250.00"),
        ("HM-SAV-002", "Gull Street youth saver", "2405.17"),
        ("HM-SAV-003", "Quayside bakery reserve", "64000.00"),
        ("HM-SAV-004", "Lantern Row holiday fund", "9120.55"),
        ("HM-SAV-005", "Tidewater school PTA", "33780.00"),
        ("HM-SAV-006", "Breakwater rowing club", "5210.40"),
    ];
    for (id, name, bal) in savers {
        accounts.push(account(&[
            ("account", t(id)),
            ("name", t(name)),
            ("currency", t("GBP")),
            ("side", t("liability")),
            ("day_count", t("ACT/365F")),
            ("compounding", t("daily")),
            ("posting", t("monthly")),
            ("capitalise", t("yes")),
            ("open_date", date("2026-10-01")),
            ("opening_balance", num(bal)),
            ("rate_ref", t("SAVER")),
            ("gl_interest", t("5110")),
            ("gl_accrued", t("2210")),
            // The school PTA is exempt from the tax on savings interest.
            ("tax_ref", t(if id == "HM-SAV-005" { "EXEMPT" } else { "" })),
        ]));
    }
    movements.push(mv("HM-SAV-001", "2026-11-09", "1500.00", "", "DEP-1109"));
    movements.push(mv("HM-SAV-001", "2026-11-23", "-750.00", "", "WDL-1123"));
    movements.push(mv(
        "HM-SAV-003",
        "2026-10-28",
        "12000.00",
        "2026-11-03",
        "DEP-1028-LATE",
    ));
    movements.push(mv("HM-SAV-004", "2026-11-20", "-9000.00", "", "WDL-1120"));
    movements.push(mv("HM-SAV-005", "2026-10-15", "2200.00", "", "DEP-1015"));

    // Tiered savers: whole-balance and banded tiers on one table.
    for r in ["TIER-W", "TIER-B"] {
        rates.push(rate(r, "2026-01-01", "0.50", "0"));
        rates.push(rate(r, "2026-01-01", "1.25", "10000"));
        rates.push(rate(r, "2026-01-01", "2.00", "50000"));
    }
    let tiered = [
        ("HM-TW-001", "whole", "TIER-W", "8500.00"),
        ("HM-TW-002", "whole", "TIER-W", "27500.00"),
        ("HM-TW-003", "whole", "TIER-W", "120000.00"),
        ("HM-TB-001", "banded", "TIER-B", "8500.00"),
        ("HM-TB-002", "banded", "TIER-B", "27500.00"),
        ("HM-TB-003", "banded", "TIER-B", "120000.00"),
    ];
    for (id, method, r, bal) in tiered {
        accounts.push(account(&[
            ("account", t(id)),
            ("name", t(&format!("Harbour tiered saver ({method})"))),
            ("currency", t("GBP")),
            ("day_count", t("ACT/365F")),
            ("compounding", t("simple")),
            ("posting", t("monthly")),
            ("capitalise", t("yes")),
            ("open_date", date("2026-10-01")),
            ("opening_balance", num(bal)),
            ("rate_ref", t(r)),
            ("tier_method", t(method)),
            ("gl_interest", t("5120")),
            ("gl_accrued", t("2210")),
        ]));
    }
    movements.push(mv("HM-TW-001", "2026-11-12", "2500.00", "", "DEP-1112"));
    movements.push(mv("HM-TB-001", "2026-11-12", "2500.00", "", "DEP-1112"));

    // Term deposits: interest paid once, at maturity.
    let deposits = [
        ("HM-TD-001", "2026-08-20", "2026-11-20", "500000.00", "4.10"),
        ("HM-TD-002", "2026-09-01", "2027-03-01", "250000.00", "4.35"),
        ("HM-TD-003", "2026-06-15", "2027-06-15", "100000.00", "4.50"),
        ("HM-TD-004", "2026-11-10", "2027-02-10", "75000.00", "4.05"),
        (
            "HM-TD-005",
            "2026-05-04",
            "2026-12-04",
            "1200000.00",
            "4.25",
        ),
    ];
    for (id, open, maturity, bal, pct) in deposits {
        accounts.push(account(&[
            ("account", t(id)),
            ("name", t("Harbourview fixed-term deposit")),
            ("currency", t("USD")),
            ("day_count", t("ACT/365F")),
            ("posting", t("maturity")),
            ("open_date", date(open)),
            ("opening_balance", num(bal)),
            ("maturity", date(maturity)),
            ("gl_interest", t("5130")),
            ("gl_accrued", t("2220")),
        ]));
        rates.push(rate(id, "2026-01-01", pct, ""));
    }

    // Life events: a saver closed on 18 November and paid out, a term deposit
    // broken on 12 November with 30 days' interest as penalty, and one rolled
    // over for three months at its 31 October maturity.
    accounts.push(account(&[
        ("account", t("HM-SAV-CLS")),
        ("name", t("Driftwood Lane joint saver")),
        ("currency", t("USD")),
        ("day_count", t("ACT/365F")),
        ("open_date", date("2026-10-01")),
        ("opening_balance", num("42000.00")),
        ("close_date", date("2026-11-18")),
        ("gl_interest", t("5110")),
        ("gl_accrued", t("2210")),
    ]));
    rates.push(rate("HM-SAV-CLS", "2026-01-01", "2.40", ""));
    // 42,000.00 + 17 nights at 2.40% (46.95) paid out on the close date.
    movements.push(mv("HM-SAV-CLS", "2026-11-18", "-42046.95", "", "CLS-1118"));
    accounts.push(account(&[
        ("account", t("HM-TD-BRK")),
        ("name", t("Harbourview fixed-term deposit, broken early")),
        ("currency", t("USD")),
        ("day_count", t("ACT/365F")),
        ("posting", t("maturity")),
        ("open_date", date("2026-09-15")),
        ("opening_balance", num("60000.00")),
        ("maturity", date("2027-03-15")),
        ("close_date", date("2026-11-12")),
        ("break_penalty", t("days")),
        ("break_days", num("30")),
        ("gl_interest", t("5130")),
        ("gl_accrued", t("2220")),
    ]));
    rates.push(rate("HM-TD-BRK", "2026-01-01", "4.20", ""));
    // 60,000.00 + 58 nights at 4.20% (400.44) - 30 days' interest (207.12).
    movements.push(mv("HM-TD-BRK", "2026-11-12", "-60193.32", "", "BRK-1112"));
    accounts.push(account(&[
        ("account", t("HM-TD-ROLL")),
        ("name", t("Harbourview rolling term deposit")),
        ("currency", t("USD")),
        ("day_count", t("ACT/365F")),
        ("posting", t("maturity")),
        ("capitalise", t("yes")),
        ("open_date", date("2026-08-31")),
        ("opening_balance", num("150000.00")),
        ("maturity", date("2026-10-31")),
        ("after_maturity", t("rollover")),
        ("rollover_months", num("3")),
        ("rollover_rate_ref", t("TD-ROLL")),
        ("gl_interest", t("5130")),
        ("gl_accrued", t("2220")),
    ]));
    rates.push(rate("HM-TD-ROLL", "2026-01-01", "4.00", ""));
    rates.push(rate("TD-ROLL", "2026-10-01", "3.75", ""));

    // Member loans on ACT/360, paying on the 15th; the lending rate falls on 5 November.
    rates.push(rate("LOAN-BASE", "2026-01-01", "6.25", ""));
    rates.push(rate("LOAN-BASE", "2026-11-05", "6.00", ""));
    let loans = [
        ("HM-LN-001", "Pier Lane car loan", "18400.00"),
        ("HM-LN-002", "Saltmarsh boatyard equipment", "142000.00"),
        ("HM-LN-003", "Crabapple Court home improvement", "26350.00"),
        ("HM-LN-004", "Lighthouse cafe refit", "61000.00"),
        ("HM-LN-005", "Netmenders co-op working capital", "88000.00"),
        ("HM-LN-006", "Dune Road solar panels", "12750.00"),
    ];
    for (id, name, bal) in loans {
        accounts.push(account(&[
            ("account", t(id)),
            ("name", t(name)),
            ("currency", t("USD")),
            ("side", t("asset")),
            ("day_count", t("ACT/360")),
            ("posting", t("monthly")),
            ("posting_anchor", date("2026-01-15")),
            ("anchor_kind", t("payment")),
            ("business_day", t("modified-following")),
            ("calendar", t("HARBOUR")),
            ("open_date", date("2026-10-15")),
            ("opening_balance", num(bal)),
            ("rate_ref", t("LOAN-BASE")),
            ("gl_interest", t("4110")),
            ("gl_accrued", t("1310")),
        ]));
    }
    movements.push(mv("HM-LN-001", "2026-11-16", "-650.00", "", "REPAY-1116"));
    movements.push(mv("HM-LN-002", "2026-11-16", "-4200.00", "", "REPAY-1116"));
    movements.push(mv("HM-LN-004", "2026-11-03", "9000.00", "", "DRAW-1103"));

    // Intercompany: a loan to the group's services company and a borrowing
    // from the group holding, both on 30/360, interest paid quarterly.
    accounts.push(account(&[
        ("account", t("HM-IC-001")),
        ("name", t("Loan to Harbourview Services Ltd")),
        ("currency", t("USD")),
        ("side", t("asset")),
        ("day_count", t("30/360")),
        ("posting", t("quarterly")),
        ("posting_anchor", date("2026-12-31")),
        ("open_date", date("2026-10-01")),
        ("opening_balance", num("2000000.00")),
        ("rate_ref", t("IC-LEND")),
        ("gl_interest", t("4210")),
        ("gl_accrued", t("1320")),
    ]));
    rates.push(rate("IC-LEND", "2026-01-01", "5.10", ""));
    accounts.push(account(&[
        ("account", t("HM-IC-002")),
        ("name", t("Borrowing from Harbourview Group Holdings")),
        ("currency", t("USD")),
        ("day_count", t("30/360")),
        ("posting", t("quarterly")),
        ("posting_anchor", date("2026-11-30")),
        ("open_date", date("2026-09-01")),
        ("opening_balance", num("5000000.00")),
        ("rate_ref", t("IC-BORROW")),
        ("gl_interest", t("5210")),
        ("gl_accrued", t("2310")),
    ]));
    rates.push(rate("IC-BORROW", "2026-01-01", "4.80", ""));

    // Withholding tax: two personal savers taxed at 20% and credited monthly
    // (the balance takes the net), and a euro loan to a group company whose
    // interest the borrower pays net of a 15% treaty rate; the tax it
    // withholds is recoverable. The tables are invented: the rates a book
    // uses come from the institution's tax function.
    for (id, name, bal) in [
        ("HM-SAV-T20", "Seawall Terrace personal saver", "100000.00"),
        ("HM-SAV-T20N", "Kelp Lane personal saver", "50000.00"),
    ] {
        accounts.push(account(&[
            ("account", t(id)),
            ("name", t(name)),
            ("currency", t("GBP")),
            ("side", t("liability")),
            ("day_count", t("ACT/365F")),
            ("compounding", t("simple")),
            ("posting", t("monthly")),
            ("capitalise", t("yes")),
            ("open_date", date("2026-11-01")),
            ("opening_balance", num(bal)),
            ("rate_ref", t("SAVER-TAXED")),
            ("gl_interest", t("5110")),
            ("gl_accrued", t("2210")),
            ("tax_ref", t("SAVINGS-20")),
            ("gl_tax", t("2410")),
        ]));
    }
    rates.push(rate("SAVER-TAXED", "2026-01-01", "3.65", ""));
    accounts.push(account(&[
        ("account", t("HM-IC-003")),
        ("name", t("Loan to Harbourview Services Europe")),
        ("currency", t("EUR")),
        ("side", t("asset")),
        ("day_count", t("ACT/360")),
        ("posting", t("quarterly")),
        ("posting_anchor", date("2026-11-30")),
        ("open_date", date("2026-09-01")),
        ("opening_balance", num("5000000.00")),
        ("rate_ref", t("IC-LEND-EUR")),
        ("gl_interest", t("4210")),
        ("gl_accrued", t("1320")),
        ("tax_ref", t("TREATY-15")),
        ("gl_tax", t("1330")),
    ]));
    rates.push(rate("IC-LEND-EUR", "2026-01-01", "4.20", ""));
    let tax = vec![
        vec![t("SAVINGS-20"), date("2026-01-01"), num("20")],
        vec![t("EXEMPT"), date("2026-01-01"), num("0")],
        vec![t("TREATY-15"), date("2026-01-01"), num("15")],
    ];

    // Currencies without two minor units.
    accounts.push(account(&[
        ("account", t("HM-JPY-001")),
        ("name", t("Yen settlement deposit")),
        ("currency", t("JPY")),
        ("day_count", t("ACT/365F")),
        ("open_date", date("2026-11-01")),
        ("opening_balance", num("12345678")),
        ("rate_ref", t("JPY-DEP")),
    ]));
    rates.push(rate("JPY-DEP", "2026-01-01", "0.30", ""));
    accounts.push(account(&[
        ("account", t("HM-KWD-001")),
        ("name", t("Dinar call deposit")),
        ("currency", t("KWD")),
        ("day_count", t("ACT/360")),
        ("open_date", date("2026-11-01")),
        ("opening_balance", num("45678.123")),
        ("rate_ref", t("KWD-DEP")),
    ]));
    rates.push(rate("KWD-DEP", "2026-01-01", "4.125", ""));

    // One account per remaining basis, each on its own rate.
    let others = [
        (
            "HM-EUR-001",
            "Euro treasury placement",
            "EUR",
            "asset",
            "30E/360",
            "3500000.00",
            "2.85",
        ),
        (
            "HM-EUR-002",
            "Euro correspondent deposit",
            "EUR",
            "liability",
            "30E/360 ISDA",
            "820000.00",
            "2.40",
        ),
        (
            "HM-ISDA-001",
            "Dollar interbank placement",
            "USD",
            "asset",
            "ACT/ACT ISDA",
            "1000000.00",
            "4.60",
        ),
        (
            "HM-NL-001",
            "No-leap club deposit",
            "USD",
            "liability",
            "NL/365",
            "40000.00",
            "3.00",
        ),
        (
            "HM-US-001",
            "Municipal note holding",
            "USD",
            "asset",
            "30/360 US",
            "250000.00",
            "4.00",
        ),
        (
            "HM-L-001",
            "Sterling notice account",
            "GBP",
            "liability",
            "ACT/365L",
            "150000.00",
            "3.65",
        ),
    ];
    for (id, name, ccy, side, basis, bal, pct) in others {
        accounts.push(account(&[
            ("account", t(id)),
            ("name", t(name)),
            ("currency", t(ccy)),
            ("side", t(side)),
            ("day_count", t(basis)),
            ("open_date", date("2026-10-01")),
            ("opening_balance", num(bal)),
            ("rate_ref", t(id)),
        ]));
        rates.push(rate(id, "2026-01-01", pct, ""));
    }
    accounts.push(account(&[
        ("account", t("HM-ICMA-001")),
        ("name", t("Harbour bond holding (semiannual)")),
        ("currency", t("USD")),
        ("side", t("asset")),
        ("day_count", t("ACT/ACT ICMA")),
        ("posting", t("semiannual")),
        ("posting_anchor", date("2026-06-30")),
        ("open_date", date("2026-07-01")),
        ("opening_balance", num("500000.00")),
        ("rate_ref", t("HM-ICMA-001")),
    ]));
    rates.push(rate("HM-ICMA-001", "2026-01-01", "4.75", ""));
    accounts.push(account(&[
        ("account", t("HM-CONT-001")),
        ("name", t("Continuously compounded reserve")),
        ("currency", t("USD")),
        ("day_count", t("ACT/365F")),
        ("compounding", t("continuous")),
        ("posting", t("annual")),
        ("posting_anchor", date("2026-12-31")),
        ("open_date", date("2026-01-01")),
        ("opening_balance", num("300000.00")),
        ("rate_ref", t("HM-CONT-001")),
    ]));
    rates.push(rate("HM-CONT-001", "2025-01-01", "3.90", ""));
    accounts.push(account(&[
        ("account", t("HM-MQ-001")),
        ("name", t("Quarterly bonus saver")),
        ("currency", t("GBP")),
        ("day_count", t("ACT/365F")),
        ("compounding", t("monthly")),
        ("posting", t("quarterly")),
        ("posting_anchor", date("2026-03-31")),
        ("capitalise", t("yes")),
        ("open_date", date("2026-10-01")),
        ("opening_balance", num("80000.00")),
        ("rate_ref", t("HM-MQ-001")),
    ]));
    rates.push(rate("HM-MQ-001", "2026-01-01", "4.80", ""));
    accounts.push(account(&[
        ("account", t("HM-BRL-001")),
        ("name", t("Real-denominated placement")),
        ("currency", t("BRL")),
        ("side", t("asset")),
        ("day_count", t("BUS/252")),
        ("compounding", t("annual-effective")),
        ("calendar", t("BR-2026")),
        ("open_date", date("2026-11-01")),
        ("opening_balance", num("2500000.00")),
        ("rate_ref", t("HM-BRL-001")),
    ]));
    rates.push(rate("HM-BRL-001", "2026-01-01", "13.65", ""));
    accounts.push(account(&[
        ("account", t("HM-CHK-001")),
        ("name", t("Harbour cafe current account")),
        ("currency", t("USD")),
        ("day_count", t("ACT/365F")),
        ("open_date", date("2026-11-01")),
        ("opening_balance", num("4200.00")),
        ("rate_ref", t("CHK-CREDIT")),
        ("debit_rate_ref", t("OVERDRAFT")),
    ]));
    rates.push(rate("CHK-CREDIT", "2026-01-01", "0.10", ""));
    rates.push(rate("OVERDRAFT", "2026-01-01", "18.00", ""));
    movements.push(mv("HM-CHK-001", "2026-11-10", "-7500.00", "", "CHQ-4471"));
    movements.push(mv("HM-CHK-001", "2026-11-25", "6000.00", "", "DEP-1125"));
    accounts.push(account(&[
        ("account", t("HM-BF-001")),
        ("name", t("Migrated member saver")),
        ("currency", t("USD")),
        ("day_count", t("ACT/360")),
        ("open_date", date("2026-11-16")),
        ("opening_balance", num("300000.00")),
        ("opening_accrued", num("246.67")),
        ("period_start", date("2026-11-01")),
        ("rate_ref", t("HM-BF-001")),
    ]));
    rates.push(rate("HM-BF-001", "2026-01-01", "2.00", ""));

    // Two loans on an invented overnight index, compounded in arrears: one
    // looks each fixing back five business days, one shifts the whole
    // observation period back five business days.
    let floating = [
        (
            "HM-FLN-001",
            "Marina development loan (index, 5-day lookback)",
            "1500000.00",
            "no",
        ),
        (
            "HM-FLN-002",
            "Ferry terminal facility (index, observation shift)",
            "2250000.00",
            "yes",
        ),
    ];
    for (id, name, bal, shift) in floating {
        accounts.push(account(&[
            ("account", t(id)),
            ("name", t(name)),
            ("currency", t("USD")),
            ("side", t("asset")),
            ("day_count", t("ACT/360")),
            ("posting", t("monthly")),
            ("calendar", t("HARBOUR")),
            ("open_date", date("2026-10-01")),
            ("opening_balance", num(bal)),
            ("rate_ref", t("HBR-ON-175")),
            ("gl_interest", t("4120")),
            ("gl_accrued", t("1310")),
            ("rate_method", t("compounded-in-arrears")),
            ("lookback_days", num("5")),
            ("observation_shift", t(shift)),
        ]));
    }
    rates.push(vec![
        t("HBR-ON-175"),
        date("2026-01-01"),
        Cell::Empty,
        Cell::Empty,
        t("HBR-ON"),
        num("175"),
        num("0"),
    ]);
    let fixings = harbour_overnight_fixings();
    let holidays = vec![
        vec![t("HARBOUR"), date("2026-11-26"), t("Harvest Thanksgiving")],
        vec![t("HARBOUR"), date("2026-12-25"), t("Christmas Day")],
        vec![t("HARBOUR"), date("2027-01-01"), t("New Year's Day")],
        vec![t("BR-2026"), date("2026-11-02"), t("All Souls' Day")],
        vec![t("BR-2026"), date("2026-11-20"), t("Black Awareness Day")],
        vec![t("BR-2026"), date("2026-12-25"), t("Christmas Day")],
    ];
    // The October close was run on 2 November: DEP-1028-LATE, booked on
    // 3 November, reaches the books as a prior-period adjustment.
    let settings = vec![
        vec![t("cutoff"), date("2026-11-30")],
        vec![t("entity"), t("HARBOURVIEW-MUTUAL")],
        vec![t("previous_as_at"), date("2026-11-02")],
        vec![t("statement_amounts"), t("gross")],
    ];
    vec![
        Sheet {
            name: "Accounts",
            columns: ACCOUNT_LAYOUT.labels(),
            rows: accounts,
        },
        Sheet {
            name: "Rates",
            columns: layout!(
                RATES,
                "rate_ref",
                "effective",
                "rate_percent",
                "tier_from",
                "index",
                "spread_bp",
                "floor_percent",
            )
            .labels(),
            rows: rates,
        },
        Sheet {
            name: "Fixings",
            columns: layout!(FIXINGS, "index", "date", "rate_percent").labels(),
            rows: fixings,
        },
        Sheet {
            name: "Movements",
            columns: layout!(
                MOVEMENTS,
                "account",
                "value_date",
                "amount",
                "booking_date",
                "reference",
            )
            .labels(),
            rows: movements,
        },
        Sheet {
            name: "Holidays",
            columns: layout!(HOLIDAYS, "calendar", "date", "name").labels(),
            rows: holidays,
        },
        Sheet {
            name: "Settings",
            columns: layout!(SETTINGS, "setting", "value").labels(),
            rows: settings,
        },
        Sheet {
            name: "Tax",
            columns: layout!(TAX, "tax_ref", "effective", "rate_percent").labels(),
            rows: tax,
        },
    ]
}

/// Invented fixings of the invented "HBR-ON" overnight index: every Harbour
/// business day from September to November 2026, near 3.80% and 25 bp lower
/// from 6 November.
fn harbour_overnight_fixings() -> Vec<Vec<Cell>> {
    let start: NaiveDate = "2026-09-01".parse().expect("date");
    let end: NaiveDate = "2026-11-30".parse().expect("date");
    let holiday: NaiveDate = "2026-11-26".parse().expect("date");
    let cut: NaiveDate = "2026-11-06".parse().expect("date");
    start
        .iter_days()
        .take_while(|d| *d <= end)
        .filter(|d| d.weekday().number_from_monday() <= 5 && *d != holiday)
        .map(|d| {
            let wobble = i64::from(d.ordinal() * 7 % 9) - 4;
            let bp = 380 + wobble - if d >= cut { 25 } else { 0 };
            vec![
                t("HBR-ON"),
                Cell::Date(d),
                num(&format!("{}.{:02}", bp / 100, bp % 100)),
            ]
        })
        .collect()
}

fn write_xlsx(sheets: &[Sheet], path: &Path) -> Result<(), rust_xlsxwriter::XlsxError> {
    let mut wb = Workbook::new();
    let bold = Format::new().set_bold();
    let day = Format::new().set_num_format("yyyy-mm-dd");
    wb.set_properties(
        &rust_xlsxwriter::DocProperties::new()
            .set_title("Harbourview Mutual month-end books, November 2026 (invented)")
            .set_creation_datetime(&rust_xlsxwriter::ExcelDateTime::from_ymd(2026, 12, 1)?),
    );
    for s in sheets {
        let ws = wb.add_worksheet();
        ws.set_name(s.name)?;
        for (c, h) in s.columns.iter().enumerate() {
            ws.write_string_with_format(0, c as u16, *h, &bold)?;
            ws.set_column_width(c as u16, (h.len().max(12) + 2) as f64)?;
        }
        for (r, row) in s.rows.iter().enumerate() {
            let r = r as u32 + 1;
            for (c, cell) in row.iter().enumerate() {
                let c = c as u16;
                match cell {
                    Cell::Text(v) => {
                        ws.write_string(r, c, v)?;
                    }
                    Cell::Number(v) => {
                        ws.write_number(r, c, v.parse::<f64>().expect("sample numbers parse"))?;
                    }
                    Cell::Date(d) => {
                        ws.write_datetime_with_format(r, c, d, &day)?;
                    }
                    Cell::Empty => {}
                }
            }
        }
        ws.set_freeze_panes(1, 0)?;
    }
    wb.save(path)
}

fn write_csv(sheets: &[Sheet], dir: &Path) -> std::io::Result<()> {
    std::fs::create_dir_all(dir)?;
    for s in sheets {
        let mut w =
            csv::Writer::from_path(dir.join(ledgerate::report::book_writer::csv_name(s.name)))?;
        w.write_record(&s.columns)?;
        for row in &s.rows {
            // Rows shorter than the header are padded: a CSV row must have every field.
            let fields: Vec<String> = row
                .iter()
                .chain(std::iter::repeat(&Cell::Empty))
                .take(s.columns.len())
                .map(|c| match c {
                    Cell::Text(v) | Cell::Number(v) => v.clone(),
                    Cell::Date(d) => d.to_string(),
                    Cell::Empty => String::new(),
                })
                .collect();
            w.write_record(&fields)?;
        }
        w.flush()?;
    }
    Ok(())
}

/// A change to an account's terms, rates or movements.
type Change = Box<dyn Fn(&mut AccountTerms, &mut RateSchedule, &mut Vec<Movement>)>;

/// What a statement row of the sample shows for an account's posting.
enum Planted {
    /// Posted as the contract says.
    Right,
    /// Posted under other terms, other rates or other movements.
    Other(Change),
    /// Posted as the contract says plus a fixed amount.
    Plus(&'static str),
    /// The interest of a period a day shorter at the start, on a row for the whole period.
    StartADayLate,
    /// Not on the statement.
    Missing,
    /// October on two rows: the right amount plus a correction, and the correction reversed.
    CorrectedTwice(&'static str),
    /// The net of the withholding tax as posted_interest, the gross reading's mistake.
    Net,
}

/// The planted mistakes of the sample statements (November periods).
fn planted(account: &str) -> Planted {
    match account {
        "HM-LN-003" => Planted::Other(Box::new(|t, _, _| t.basis = Basis::Act365F)),
        "HM-SAV-004" => Planted::Other(Box::new(|_, _, m| {
            for x in m
                .iter_mut()
                .filter(|x| x.reference.as_deref() == Some("WDL-1120"))
            {
                x.value_date = "2026-11-17".parse().expect("date");
            }
        })),
        "HM-SAV-002" => Planted::Other(Box::new(|_, r, _| {
            let first: Vec<RateTable> = r.tables().iter().take(1).cloned().collect();
            *r = RateSchedule::from_tables(first);
        })),
        "HM-TW-002" => Planted::Plus("0.01"),
        "HM-LN-005" => Planted::Plus("25.00"),
        "HM-NL-001" => Planted::StartADayLate,
        "HM-SAV-006" => Planted::Missing,
        "HM-SAV-001" => Planted::CorrectedTwice("10.00"),
        "HM-SAV-T20N" => Planted::Net,
        _ => Planted::Right,
    }
}

/// Statement rows for the October and November postings of every account,
/// computed by the engine from the book itself, with the planted mistakes.
fn statements(book_dir: &Path) -> Result<Vec<Vec<Cell>>, Box<dyn std::error::Error>> {
    let book = read_book(book_dir, &ReadOptions::default());
    if book.has_errors() {
        return Err(format!("the sample book has problems: {:?}", book.problems).into());
    }
    let options = RunOptions {
        window_start: "2026-10-01".parse()?,
        cutoff: "2026-11-30".parse()?,
        keep_days: true,
        keep_states: false,
        keep_spans: false,
        fast_path: true,
    };
    let november: NaiveDate = "2026-11-01".parse()?;
    let mut rows = Vec::new();
    for entry in &book.accounts {
        let id = entry.terms.id.as_str();
        let empty = RateSchedule::default();
        let floating = book
            .floating_rates
            .get(&entry.rate_ref)
            .map(|schedule| FloatingRates {
                schedule,
                fixings: &book.fixings,
                fallback: FixingFallback::None,
            });
        let rates = match (&floating, book.rates.get(&entry.rate_ref)) {
            (Some(_), _) => &empty,
            (None, Some(r)) => r,
            (None, None) => return Err(format!("no rates for {id}").into()),
        };
        let debit = entry
            .debit_rate_ref
            .as_ref()
            .and_then(|r| book.rates.get(r));
        let movements = book.movements.get(id).cloned().unwrap_or_default();
        let run = |t: &AccountTerms, r: &RateSchedule, m: &[Movement]| {
            let src = Inputs {
                rates: r,
                debit_rates: debit,
                movements: m,
                actual: &[],
                breaks: &[],
                floating,
            };
            // An account's life events (a close, new terms) shape its postings.
            accrue_life(t, src, options).map(|l| l.result)
        };
        let right = run(&entry.terms, rates, &movements)?;
        let mistake = planted(id);
        for p in right
            .postings
            .iter()
            .filter(|p| p.end >= options.window_start)
        {
            let in_november = p.end >= november;
            let start = p.start;
            let posted = match (&mistake, in_november) {
                (Planted::Missing, true) => continue,
                (Planted::Other(change), true) => {
                    let (mut t, mut r, mut m) =
                        (entry.terms.clone(), rates.clone(), movements.clone());
                    change(&mut t, &mut r, &mut m);
                    let wrong = run(&t, &r, &m)?;
                    wrong
                        .postings
                        .iter()
                        .find(|w| w.end == p.end)
                        .map_or(p.expected, |w| w.expected)
                }
                (Planted::Plus(x), true) => p.expected + x.parse::<Decimal>()?,
                (Planted::Net, true) => p.withheld.net,
                (Planted::StartADayLate, true) => {
                    let late = start.succ_opt().ok_or("date")?;
                    expected_over(&entry.terms, &right, late, p.end)?.amount
                }
                _ => p.expected,
            };
            // A taxed account's statement gives the tax withheld beside the
            // gross (the book reads statement amounts gross), except the
            // planted net posting, which gives neither.
            let tax_withheld = match (&entry.terms.tax, &mistake) {
                (Some(_), Planted::Net) | (None, _) => Cell::Empty,
                (Some(_), _) => num(&p.withheld.tax.to_string()),
            };
            let row = |amount: Decimal, reference: &str| {
                vec![
                    t(id),
                    date(&start.to_string()),
                    date(&p.end.to_string()),
                    num(&amount.to_string()),
                    t(reference),
                    tax_withheld.clone(),
                ]
            };
            let reference = format!(
                "ST-{}-{}",
                id.trim_start_matches("HM-"),
                p.end.format("%Y%m")
            );
            match (&mistake, in_november) {
                (Planted::CorrectedTwice(x), false) => {
                    let fix: Decimal = x.parse()?;
                    rows.push(row(posted + fix, &reference));
                    rows.push(row(-fix, &format!("{reference}-REV")));
                }
                _ => rows.push(row(posted, &reference)),
            }
        }
    }
    Ok(rows)
}

/// The Booked and Trial balance sheets, from a run of the book as the
/// November close makes it: the trial balance at 31 October holds what the
/// October close booked (the accounts' booked openings, by entity, currency
/// and accrued-interest GL account), so the Tie-out agrees; the Booked rows
/// at the cut-off are the core system's accrued interest on the two
/// intercompany accounts, one of them accrued from a day late.
type Rows = Vec<Vec<Cell>>;
fn ledger_sheets(book_dir: &Path) -> Result<(Rows, Rows), Box<dyn std::error::Error>> {
    let book = read_book(book_dir, &ReadOptions::default());
    if book.has_errors() {
        return Err(format!("the sample book has problems: {:?}", book.problems).into());
    }
    let settings = BatchSettings {
        cutoff: "2026-11-30".parse()?,
        window_start: "2026-11-01".parse()?,
        daily: false,
        journal_style: JournalStyle::Incremental,
        entities: vec!["HARBOURVIEW-MUTUAL".to_string()],
        tolerance: Tolerance::default(),
        fast_path: true,
        shard: None,
        fixing_fallback: FixingFallback::None,
        as_at: None,
        previous_as_at: Some("2026-11-02".parse()?),
        settlement_lines: SettlementLines::PaymentDate,
        journal_detail: false,
    };
    let result = run_books(std::slice::from_ref(&book), &settings, &|| {});
    let mut opening: BTreeMap<(String, String), Decimal> = BTreeMap::new();
    for a in &result.accruals {
        let l = &a.ledger;
        // A trial balance prints a payable's credit balance negative.
        let printed = if a.side == "liability" && !l.booked_opening.is_zero() {
            -l.booked_opening
        } else {
            l.booked_opening
        };
        *opening
            .entry((a.currency.to_string(), l.gl_accrued.to_string()))
            .or_default() += printed;
    }
    let trial_balance = opening
        .into_iter()
        .map(|((currency, gl), balance)| {
            vec![
                t("HARBOURVIEW-MUTUAL"),
                t(&currency),
                t(&gl),
                date("2026-10-31"),
                num(&balance.to_string()),
            ]
        })
        .collect();
    let open_item = |id: &str| -> Result<Decimal, String> {
        result
            .accruals
            .iter()
            .find(|a| a.account == id)
            .map(|a| a.ledger.open_item)
            .ok_or(format!("{id} was not computed"))
    };
    // HM-IC-001 accrued from 2 October in the core system: 59 days of
    // 30/360 on 2,000,000.00 at 5.10% instead of 60.
    let late = (Decimal::new(2_000_000, 0) * Decimal::new(51, 3) * Decimal::from(59)
        / Decimal::from(360))
    .round_dp(2);
    let booked = vec![
        vec![t("HM-IC-001"), date("2026-11-30"), num(&late.to_string())],
        vec![
            t("HM-IC-002"),
            date("2026-11-30"),
            num(&open_item("HM-IC-002")?.to_string()),
        ],
    ];
    Ok((booked, trial_balance))
}

/// The loans book: two invented Harbourview loans that stop accruing
/// interest into income (docs/user-guide.md, 2.13): LN-NA on non-accrual from
/// 11 November with October's 1,550.00 billed and unpaid, LN-CI
/// credit-impaired from 1 November with an allowance of 45,000.00 and a
/// repayment of 20,000.00 on 16 November. The statements post the
/// contractual interest, as the loans' terms say.
fn loan_sheets() -> Vec<Sheet> {
    const LOAN_LAYOUT: Layout = layout!(
        ACCOUNTS,
        "account",
        "name",
        "currency",
        "side",
        "day_count",
        "compounding",
        "posting",
        "capitalise",
        "open_date",
        "opening_balance",
        "gl_interest",
        "gl_accrued",
        "gl_suspense",
    );
    let loan = |id: &str, name: &str, basis: &str, open: &str, balance: &str| {
        vec![
            t(id),
            t(name),
            t("USD"),
            t("asset"),
            t(basis),
            t("simple"),
            t("monthly"),
            t("no"),
            date(open),
            num(balance),
            t("4110"),
            t("1310"),
            t("1390-INT-SUSP"),
        ]
    };
    vec![
        Sheet {
            name: "Accounts",
            columns: LOAN_LAYOUT.labels(),
            rows: vec![
                loan(
                    "LN-NA",
                    "Dockside Joinery term loan",
                    "ACT/365F",
                    "2026-10-01",
                    "250000.00",
                ),
                loan(
                    "LN-CI",
                    "Gullhaven Cannery loan",
                    "ACT/360",
                    "2026-11-01",
                    "120000.00",
                ),
            ],
        },
        Sheet {
            name: "Rates",
            columns: layout!(RATES, "rate_ref", "effective", "rate_percent").labels(),
            rows: vec![
                vec![t("LN-NA"), date("2026-01-01"), num("7.30")],
                vec![t("LN-CI"), date("2026-01-01"), num("6.00")],
            ],
        },
        Sheet {
            name: "Movements",
            columns: layout!(MOVEMENTS, "account", "value_date", "amount", "reference").labels(),
            rows: vec![vec![
                t("LN-CI"),
                date("2026-11-16"),
                num("-20000.00"),
                t("REPAY-1116"),
            ]],
        },
        Sheet {
            name: "Statements",
            columns: layout!(
                STATEMENTS,
                "account",
                "period_start",
                "period_end",
                "posted_interest"
            )
            .labels(),
            rows: vec![
                vec![
                    t("LN-NA"),
                    date("2026-10-01"),
                    date("2026-10-31"),
                    num("1550.00"),
                ],
                vec![
                    t("LN-NA"),
                    date("2026-11-01"),
                    date("2026-11-30"),
                    num("1500.00"),
                ],
                vec![
                    t("LN-CI"),
                    date("2026-11-01"),
                    date("2026-11-30"),
                    num("550.00"),
                ],
            ],
        },
        Sheet {
            name: "Settings",
            columns: layout!(SETTINGS, "setting", "value").labels(),
            rows: vec![
                vec![t("cutoff"), date("2026-11-30")],
                vec![t("entity"), t("HARBOURVIEW-MUTUAL")],
            ],
        },
        Sheet {
            name: "Accrual status",
            columns: layout!(
                ACCRUAL_STATUS,
                "account",
                "from",
                "status",
                "unpaid_interest",
                "allowance",
                "cash_basis"
            )
            .labels(),
            rows: vec![
                vec![
                    t("LN-NA"),
                    date("2026-11-11"),
                    t("non-accrual"),
                    num("1550.00"),
                    Cell::Empty,
                    t("no"),
                ],
                vec![
                    t("LN-CI"),
                    date("2026-11-01"),
                    t("credit-impaired"),
                    Cell::Empty,
                    num("45000.00"),
                    Cell::Empty,
                ],
            ],
        },
    ]
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-books");
    let loans = loan_sheets();
    write_xlsx(&loans, &root.join("harbourview-loans-2026-11.xlsx"))?;
    write_csv(&loans, &root.join("harbourview-loans-2026-11-csv"))?;
    let csv_dir = root.join("harbourview-2026-11-csv");
    let mut sheets = sheets();
    // First the books without statements, so the engine can work out what should post.
    let _ = std::fs::remove_file(csv_dir.join("statements.csv"));
    write_csv(&sheets, &csv_dir)?;
    let rows = statements(&csv_dir)?;
    let statement_rows = rows.len();
    sheets.insert(
        3,
        Sheet {
            name: "Statements",
            columns: layout!(
                STATEMENTS,
                "account",
                "period_start",
                "period_end",
                "posted_interest",
                "reference",
                "tax_withheld",
            )
            .labels(),
            rows,
        },
    );
    // Then the ledger's own sheets, from the books with their statements.
    write_csv(&sheets, &csv_dir)?;
    let (booked, trial_balance) = ledger_sheets(&csv_dir)?;
    sheets.insert(
        4,
        Sheet {
            name: "Booked",
            columns: layout!(BOOKED, "account", "date", "open_item").labels(),
            rows: booked,
        },
    );
    sheets.insert(
        5,
        Sheet {
            name: "Trial balance",
            columns: layout!(
                TRIAL_BALANCE,
                "entity",
                "currency",
                "gl_account",
                "date",
                "balance"
            )
            .labels(),
            rows: trial_balance,
        },
    );
    write_xlsx(&sheets, &root.join("harbourview-2026-11.xlsx"))?;
    write_csv(&sheets, &csv_dir)?;
    let accounts = sheets.first().map_or(0, |s| s.rows.len());
    println!(
        "sample books written under {} ({accounts} accounts, {statement_rows} statement rows)",
        root.display()
    );
    Ok(())
}
