//! A book of a few hundred accounts, written by the test, run through the
//! real binary, and every account's figure compared with the arithmetic
//! done here by hand: (B1 x nights before the movement + B2 x nights after)
//! x rate / denominator, rounded half-up to the currency's minor unit.

use std::fmt::Write as _;
use std::path::Path;

use assert_cmd::Command;
use calamine::{open_workbook_auto, Data, Reader};
use rust_decimal::{Decimal, RoundingStrategy};

const ACCOUNTS: usize = 300;

struct Case {
    id: String,
    currency: &'static str,
    places: u32,
    basis: &'static str,
    den: i64,
    balance: Decimal,
    movement_day: u32,
    movement: Decimal,
    rate_percent: Decimal,
}

fn cases() -> Vec<Case> {
    // November 2026 has 30 nights on every basis below (no 31st, no February,
    // no leap day), so each night earns 1/den.
    let bases = [
        ("ACT/360", 360),
        ("ACT/365F", 365),
        ("30/360", 360),
        ("30E/360", 360),
        ("ACT/ACT ISDA", 365),
        ("NL/365", 365),
    ];
    let currencies = [("USD", 2), ("JPY", 0), ("KWD", 3), ("EUR", 2)];
    (0..ACCOUNTS)
        .map(|i| {
            let (basis, den) = bases[i % bases.len()];
            let (currency, places) = currencies[i % currencies.len()];
            let balance = Decimal::new(1_000_000 + (i as i64) * 7_654_321, places);
            let movement = Decimal::new(((i as i64) % 7 - 3) * 123_457, places);
            Case {
                id: format!("HM-BULK-{i:04}"),
                currency,
                places,
                basis,
                den,
                balance,
                movement_day: 2 + (i as u32 % 28),
                movement,
                rate_percent: Decimal::new(50 + (i as i64 % 40) * 11, 2),
            }
        })
        .collect()
}

fn expected(c: &Case) -> Decimal {
    let before = Decimal::from(c.movement_day - 1);
    let after = Decimal::from(31 - c.movement_day);
    let rate = c.rate_percent / Decimal::ONE_HUNDRED;
    let exact =
        (c.balance * before + (c.balance + c.movement) * after) * rate / Decimal::from(c.den);
    exact.round_dp_with_strategy(c.places, RoundingStrategy::MidpointAwayFromZero)
}

fn write_book(dir: &Path, cases: &[Case]) {
    let mut accounts = String::from("account,currency,day_count,open_date,opening_balance\n");
    let mut rates = String::from("rate_ref,effective,rate_percent\n");
    let mut movements = String::from("account,value_date,amount\n");
    for c in cases {
        writeln!(
            accounts,
            "{},{},{},2026-11-01,{}",
            c.id, c.currency, c.basis, c.balance
        )
        .unwrap();
        writeln!(rates, "{},2026-01-01,{}", c.id, c.rate_percent).unwrap();
        writeln!(
            movements,
            "{},2026-11-{:02},{}",
            c.id, c.movement_day, c.movement
        )
        .unwrap();
    }
    std::fs::write(dir.join("accounts.csv"), accounts).unwrap();
    std::fs::write(dir.join("rates.csv"), rates).unwrap();
    std::fs::write(dir.join("movements.csv"), movements).unwrap();
}

#[test]
fn a_few_hundred_accounts_match_the_hand_arithmetic_to_the_minor_unit() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("bulk");
    std::fs::create_dir(&book).unwrap();
    let cases = cases();
    write_book(&book, &cases);
    let out = dir.path().join("out.xlsx");
    Command::cargo_bin("ledgerate")
        .unwrap()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(&out)
        .assert()
        .success();
    let mut wb = open_workbook_auto(&out).unwrap();
    let rows: Vec<Vec<Data>> = wb
        .worksheet_range("Accruals")
        .unwrap()
        .rows()
        .map(|r| r.to_vec())
        .collect();
    assert_eq!(rows.len(), ACCOUNTS + 1);
    for (c, r) in cases.iter().zip(&rows[1..]) {
        assert_eq!(r[0], Data::String(c.id.clone()));
        let got: Decimal = match &r[9] {
            Data::Float(f) => f.to_string().parse().unwrap(),
            other => panic!("{}: {other:?}", c.id),
        };
        let posted: Decimal = match &r[8] {
            Data::Float(f) => f.to_string().parse().unwrap(),
            other => panic!("{}: {other:?}", c.id),
        };
        assert_eq!(got, expected(c), "{} on {}", c.id, c.basis);
        assert_eq!(posted, expected(c), "{} posted", c.id);
    }
}
