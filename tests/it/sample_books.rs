//! `ledgerate sample` as a user runs it: books of invented accounts that are
//! the same for the same seed, that the reader takes without an error, and
//! whose planted statement mistakes a month-end run finds and names; whose
//! Tie-out agrees, with prior-period adjustments, and whose planted Booked
//! rows the Accrued check finds and names; whose accounts with life events
//! and withholding tax run clean and merge from shards (the workbook read
//! back with calamine).

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use crate::common::{date, ledgerate, sheet};
use calamine::{open_workbook_auto, Data, Reader};
use chrono::NaiveDate;
use ledgerate::book::{read_book, ReadOptions};
use ledgerate::problem::Severity;
use ledgerate::report::book_writer::csv_name;
use ledgerate::sample::{BookedMistake, Generator, Mistake, MistakeKind, OpeningBalances, SHEETS};
use predicates::prelude::*;
use rust_decimal::Decimal;

fn sample(accounts: u64, seed: u64, format: &str, out: &Path) {
    ledgerate()
        .args(["sample", "--accounts", &accounts.to_string()])
        .args(["--seed", &seed.to_string(), "--format", format, "--out"])
        .arg(out)
        .assert()
        .success()
        .stdout(predicate::str::contains("sample book written"));
}

fn csv_bytes(dir: &Path) -> Vec<(String, Vec<u8>)> {
    SHEETS
        .iter()
        .map(|s| {
            let name = csv_name(s.name());
            let bytes = std::fs::read(dir.join(&name)).unwrap();
            (name, bytes)
        })
        .collect()
}

/// Common practice, no source: a seeded generator is reproducible, so a
/// benchmark or a bug report can name its book by size and seed.
#[test]
fn the_same_seed_gives_the_same_bytes_and_another_seed_another_book() {
    let dir = tempfile::tempdir().unwrap();
    let (a, b, c) = (
        dir.path().join("a"),
        dir.path().join("b"),
        dir.path().join("c"),
    );
    sample(400, 7, "csv", &a);
    sample(400, 7, "csv", &b);
    sample(400, 8, "csv", &c);
    assert_eq!(csv_bytes(&a), csv_bytes(&b));
    let (first, other) = (csv_bytes(&a), csv_bytes(&c));
    for sheet in [
        "accounts.csv",
        "movements.csv",
        "statements.csv",
        "rates.csv",
        "booked.csv",
        "trial_balance.csv",
    ] {
        let x = first.iter().find(|(n, _)| n == sheet).unwrap();
        let y = other.iter().find(|(n, _)| n == sheet).unwrap();
        assert_ne!(x.1, y.1, "{sheet} is the same for seeds 7 and 8");
    }

    let (x, y, z) = (
        dir.path().join("x.xlsx"),
        dir.path().join("y.xlsx"),
        dir.path().join("z.xlsx"),
    );
    sample(300, 7, "xlsx", &x);
    sample(300, 7, "xlsx", &y);
    sample(300, 8, "xlsx", &z);
    let bytes = |p: &PathBuf| std::fs::read(p).unwrap();
    assert_eq!(bytes(&x), bytes(&y));
    assert_ne!(bytes(&x), bytes(&z));
}

/// The sample book is a book the reader takes whole: no problem of any
/// severity, every account typed with the terms the generator gave it.
#[test]
fn the_book_reads_back_with_no_problem_and_the_generated_terms() {
    let dir = tempfile::tempdir().unwrap();
    let generator = Generator::new(11, 600);
    for (format, path) in [
        ("csv", dir.path().join("book")),
        ("xlsx", dir.path().join("book.xlsx")),
    ] {
        sample(600, 11, format, &path);
        let book = read_book(&path, &ReadOptions::default());
        let errors: Vec<String> = book
            .problems
            .iter()
            .filter(|p| p.severity == Severity::Error)
            .map(|p| p.to_string())
            .collect();
        assert!(errors.is_empty(), "{format}: {errors:#?}");
        assert!(
            book.problems.is_empty(),
            "{format}: {:#?}",
            book.problems.iter().take(5).collect::<Vec<_>>()
        );
        assert_eq!(book.accounts.len(), 600);
        for (i, read) in (0..).zip(&book.accounts) {
            let made = generator.account(i).unwrap();
            let (r, m) = (&read.terms, &made.entry.terms);
            assert_eq!(r.id, m.id);
            assert_eq!(
                (r.basis, r.compounding, r.posting, r.side, r.tier_method),
                (m.basis, m.compounding, m.posting, m.side, m.tier_method),
                "{}",
                m.id
            );
            assert_eq!(
                (r.anchor, r.anchor_kind, r.maturity, r.open_date),
                (m.anchor, m.anchor_kind, m.maturity, m.open_date),
                "{}",
                m.id
            );
            assert_eq!(
                (r.capitalise, r.round_at, r.round_mode, r.round_places),
                (m.capitalise, m.round_at, m.round_mode, m.round_places),
                "{}",
                m.id
            );
            assert_eq!(r.opening_balance, m.opening_balance, "{}", m.id);
            assert_eq!(r.business_day, m.business_day, "{}", m.id);
            assert_eq!(
                r.calendar.holidays().collect::<Vec<_>>(),
                m.calendar.holidays().collect::<Vec<_>>(),
                "{}",
                m.id
            );
            assert_eq!(read.rate_ref, made.entry.rate_ref);
            assert_eq!(read.debit_rate_ref, made.entry.debit_rate_ref);
            let moved = book.movements.get(&m.id).cloned().unwrap_or_default();
            assert_eq!(moved, made.movements, "{}", m.id);
        }
        let made: Vec<_> = (0..600).map(|i| generator.account(i).unwrap()).collect();
        let with_statement = made.iter().filter(|a| a.statement.is_some()).count();
        assert_eq!(
            book.statements.len(),
            with_statement,
            "{format}: one statement row per account with a posting in the window"
        );
        let booked: Vec<(String, NaiveDate, Decimal)> = book
            .booked
            .iter()
            .map(|b| (b.account.clone(), b.date, b.open_item))
            .collect();
        let expected: Vec<(String, NaiveDate, Decimal)> = made
            .iter()
            .filter_map(|a| {
                a.booked
                    .as_ref()
                    .map(|b| (a.entry.terms.id.clone(), date("2026-11-30"), b.open_item))
            })
            .collect();
        assert!(!expected.is_empty());
        assert_eq!(booked, expected, "{format}: the Booked rows");
        assert_eq!(book.accounts.len(), with_statement + expected.len());
        let mut opening = OpeningBalances::default();
        for a in &made {
            opening.add(a).unwrap();
        }
        assert_eq!(book.trial_balance.len(), opening.len());
        assert!(book
            .trial_balance
            .iter()
            .all(|r| r.date == date("2026-10-31") && r.entity == "HARBOURVIEW-MUTUAL"));
    }
}

/// What the Likely cause column says for each planted kind (the wording of
/// the cause search, behaviour.md, Likely causes).
fn named(mistake: &Mistake, cause: &str) -> bool {
    match mistake {
        Mistake::OtherBasis { used } => {
            cause.contains(&format!("interest on {} instead of", used.name()))
        }
        Mistake::RateChangeNotApplied { effective } => {
            cause.contains(&format!("rate change of {effective}")) && cause.contains("not applied")
        }
        Mistake::RateChangeMoved { effective, applied } => {
            cause.contains(&format!("rate change of {effective}"))
                && cause.contains(&format!("applied from {applied} instead"))
        }
        Mistake::MovementMoved {
            reference, taken, ..
        } => {
            cause.contains(&format!("movement {reference} "))
                && cause.contains(&format!("taken from {taken} instead"))
        }
        Mistake::MovementLeftOut { reference } => {
            cause.contains(&format!("movement {reference} ")) && cause.contains("left out")
        }
        Mistake::PeriodStartADayLate => cause.contains("period start a day late"),
        Mistake::PeriodEndADayEarly => cause.contains("period end a day early"),
        Mistake::UnexplainedAmount { .. } => {
            cause.starts_with("no single change reproduces the posted amount")
        }
        Mistake::PostedNetOfTax { percent, tax } => {
            cause.contains("posted net of")
                && cause.contains(&format!("{percent}%"))
                && cause.contains(&format!("({tax}"))
        }
    }
}

/// The likely cause `explain` prints for `account`: every change found.
fn explained_cause(book: &std::path::Path, account: &str) -> String {
    let out = ledgerate()
        .arg("explain")
        .arg(book)
        .args(["--account", account])
        .output()
        .unwrap();
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .find_map(|l| {
            l.trim_start()
                .strip_prefix("likely cause: ")
                .map(str::to_string)
        })
        .unwrap_or_default()
}

/// A month-end run on a 2,000-account sample: the unplanted rows agree, the
/// planted ones (about 2%) are exceptions, and the cause search names each
/// planted mistake, every kind among them.
#[test]
fn a_run_on_a_2000_account_sample_finds_and_names_the_planted_mistakes() {
    let dir = tempfile::tempdir().unwrap();
    let book = dir.path().join("book.xlsx");
    let out = dir.path().join("nov.xlsx");
    sample(2000, 2026, "xlsx", &book);
    ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(&out)
        .assert()
        .success()
        .stdout(predicate::str::contains(
            "accounts: 2000 read, 2000 computed, 0 left out by errors",
        ));

    let mut wb = open_workbook_auto(&out).unwrap();
    let rows: Vec<Vec<Data>> = wb
        .worksheet_range("Reconciliation")
        .unwrap()
        .rows()
        .map(|r| r.to_vec())
        .collect();
    let header: Vec<String> = rows[0].iter().map(|c| c.to_string()).collect();
    let col = |label: &str| header.iter().position(|h| h == label).unwrap();
    let (account, status, cause) = (col("Account"), col("Status"), col("Likely cause"));
    let by_account: BTreeMap<String, (String, String)> = rows[1..]
        .iter()
        .map(|r| {
            (
                r[account].to_string(),
                (r[status].to_string(), r[cause].to_string()),
            )
        })
        .collect();
    let generator = Generator::new(2026, 2000);
    let accounts: Vec<_> = (0..2000)
        .map(|i| generator.account(i).unwrap())
        .filter(|a| a.statement.is_some())
        .collect();
    assert_eq!(
        by_account.len(),
        accounts.len(),
        "one reconciliation row per account with a statement row"
    );
    let mut kinds: BTreeMap<MistakeKind, usize> = BTreeMap::new();
    let mut exceptions = 0;
    for a in accounts {
        let (st, why) = &by_account[&a.entry.terms.id];
        let exception = !matches!(st.as_str(), "agrees" | "within tolerance");
        exceptions += usize::from(exception);
        match &a.mistake {
            None => assert_eq!(st, "agrees", "{}: {why}", a.entry.terms.id),
            Some(m) => {
                let id = &a.entry.terms.id;
                assert!(exception, "{id} planted {m:?} but {st}");
                // The column names the most plausible change; when another
                // one reproduces the amount too and comes first by the rule,
                // the column says how many there are and explain lists the
                // planted one among them.
                if !named(m, why) {
                    assert!(
                        why.contains("The most plausible of "),
                        "{id} planted {m:?}; the cause says: {why}"
                    );
                    let all = explained_cause(&book, id);
                    assert!(named(m, &all), "{id} planted {m:?}; explain says: {all}");
                }
                *kinds.entry(m.kind()).or_insert(0) += 1;
            }
        }
    }
    // About 2%: 40 of 2,000, give or take what chance does to a sample.
    assert!((20..=60).contains(&exceptions), "{exceptions} exceptions");
    for kind in MistakeKind::ALL {
        assert!(
            kinds.contains_key(&kind),
            "no {} planted: {kinds:?}",
            kind.name()
        );
    }
}

/// The rows of `name` in `book` as text, keyed by their header labels.
fn labelled_rows(book: &Path, name: &str) -> Vec<BTreeMap<String, String>> {
    let rows = sheet(book, name);
    let header: Vec<String> = rows[0].iter().map(|c| c.to_string()).collect();
    rows[1..]
        .iter()
        .map(|r| {
            header
                .iter()
                .cloned()
                .zip(r.iter().map(|c| c.to_string()))
                .collect()
        })
        .collect()
}

/// The whole close on a generated book (behaviour.md, Books that tie): its
/// Trial balance is what the October close booked, so every Tie-out row
/// agrees; the movements booked after the previous close give prior-period
/// adjustments; every Booked row at the cut-off is on the Accrued check,
/// the unplanted ones agreeing and the planted ones under- or over-booked
/// by a day, the likely cause naming the day. The same for the CSV book and
/// the workbook.
#[test]
fn a_run_on_a_generated_book_ties_out_and_checks_the_booked_accruals() {
    let dir = tempfile::tempdir().unwrap();
    let (accounts, seed) = (500, 41);
    let generator = Generator::new(seed, accounts);
    let made: Vec<_> = (0..accounts)
        .map(|i| generator.account(i).unwrap())
        .collect();
    for (format, book) in [
        ("csv", dir.path().join("book")),
        ("xlsx", dir.path().join("book.xlsx")),
    ] {
        sample(accounts, seed, format, &book);
        let out = dir.path().join(format!("nov-{format}.xlsx"));
        ledgerate()
            .arg("run")
            .arg(&book)
            .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
            .arg(&out)
            .assert()
            .success()
            .stdout(predicate::str::contains(format!(
                "accounts: {accounts} read, {accounts} computed, 0 left out by errors"
            )))
            .stdout(predicate::str::contains("problems: 0 errors, 0 warnings"));

        let tie_out = labelled_rows(&out, "Tie-out");
        assert!(
            tie_out.len() >= 10,
            "{format}: {} GL accounts",
            tie_out.len()
        );
        for row in &tie_out {
            assert_eq!(row["Status"], "agrees", "{format}: {row:?}");
            assert_eq!(row["Opening difference"], "0", "{format}: {row:?}");
            assert_eq!(row["Closing difference"], "0", "{format}: {row:?}");
        }
        let summary = sheet(&out, "Summary");
        let line = summary
            .iter()
            .find(|r| r[0] == Data::String("Tie-out".into()))
            .map(|r| r[1].to_string())
            .unwrap();
        assert_eq!(line, format!("{} GL accounts, all agree", tie_out.len()));

        let accruals = labelled_rows(&out, "Accruals");
        let adjusted: Vec<&str> = accruals
            .iter()
            .filter(|r| !matches!(r["Prior-period adjustment"].as_str(), "0" | ""))
            .map(|r| r["Account"].as_str())
            .collect();
        assert!(!adjusted.is_empty(), "{format}: no prior-period adjustment");
        for id in &adjusted {
            let a = made.iter().find(|a| a.entry.terms.id == *id).unwrap();
            assert!(!a.ledger.prior_period.is_zero(), "{id}");
        }

        let check = labelled_rows(&out, "Accrued check");
        let booked: Vec<_> = made.iter().filter(|a| a.booked.is_some()).collect();
        assert_eq!(
            check.len(),
            booked.len(),
            "{format}: one row per Booked row"
        );
        let mut planted = 0;
        for (row, a) in check.iter().zip(&booked) {
            let id = &a.entry.terms.id;
            assert_eq!(&row["Account"], id);
            let b = a.booked.as_ref().unwrap();
            match b.mistake {
                None => assert_eq!(row["Status"], "agrees", "{id}: {row:?}"),
                Some(m) => {
                    planted += 1;
                    let status = match m {
                        BookedMistake::StartADayLate => "under-posted",
                        BookedMistake::StartADayEarly => "over-posted",
                    };
                    assert_eq!(row["Status"], status, "{id}: {row:?}");
                    assert!(
                        row["Likely cause"].contains(m.name()),
                        "{id} planted {m:?}; the cause says: {}",
                        row["Likely cause"]
                    );
                }
            }
        }
        assert!(planted >= 2, "{format}: {planted} planted Booked rows");
    }
}

#[test]
fn a_book_past_a_sheet_is_refused_as_a_workbook_with_the_way_out() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("big.xlsx");
    ledgerate()
        .args(["sample", "--accounts", "1048576", "--out"])
        .arg(&out)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--format csv"))
        .stderr(predicate::str::contains("Accounts sheet"));
    assert!(!out.exists());
}

#[test]
fn an_existing_book_is_not_replaced_without_force() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("b.xlsx");
    std::fs::write(&out, b"keep me").unwrap();
    ledgerate()
        .args(["sample", "--accounts", "5", "--out"])
        .arg(&out)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--force"));
    assert_eq!(std::fs::read(&out).unwrap(), b"keep me");
    ledgerate()
        .args(["sample", "--accounts", "5", "--force", "--out"])
        .arg(&out)
        .assert()
        .success();
    assert_ne!(std::fs::read(&out).unwrap(), b"keep me");
}

/// Every sheet of a workbook, by name, as calamine reads it.
fn all_sheets(path: &Path) -> Vec<(String, Vec<Vec<Data>>)> {
    let mut wb = open_workbook_auto(path).unwrap();
    wb.sheet_names()
        .into_iter()
        .map(|n| {
            let rows = wb
                .worksheet_range(&n)
                .unwrap()
                .rows()
                .map(|r| r.to_vec())
                .collect();
            (n, rows)
        })
        .collect()
}

/// A generated book with account life events and withholding tax
/// (behaviour.md, Account life events; Withholding tax): every status of
/// an account's life is on the Accruals sheet, taxed accounts have tax
/// withheld in the window, the run has no errors and its Tie-out agrees,
/// a statement planted net of tax is found and named, and the book's
/// shards merged equal the single run.
#[test]
fn a_generated_book_with_life_events_and_tax_runs_clean_and_its_shards_merge() {
    let dir = tempfile::tempdir().unwrap();
    let (accounts, seed) = (500, 3);
    let book = dir.path().join("book.xlsx");
    sample(accounts, seed, "xlsx", &book);
    let time = ["--fixed-time", "2026-12-01T08:00:00"];
    let single = dir.path().join("single.xlsx");
    ledgerate()
        .arg("run")
        .arg(&book)
        .args(time)
        .arg("--out")
        .arg(&single)
        .assert()
        .success()
        .stdout(predicate::str::contains(format!(
            "accounts: {accounts} read, {accounts} computed, 0 left out by errors"
        )))
        .stdout(predicate::str::contains("problems: 0 errors"))
        .stdout(predicate::str::contains("all agree"));
    for row in labelled_rows(&single, "Tie-out") {
        assert_eq!(row["Status"], "agrees", "{row:?}");
    }
    let problems = labelled_rows(&single, "Problems");
    assert!(
        problems.iter().all(|r| r.values().all(|v| v != "error")),
        "{problems:?}"
    );

    let generator = Generator::new(seed, accounts);
    let made: Vec<_> = (0..accounts)
        .map(|i| generator.account(i).unwrap())
        .collect();
    let accruals = labelled_rows(&single, "Accruals");
    let statuses: std::collections::BTreeSet<&str> =
        accruals.iter().map(|r| r["Status"].as_str()).collect();
    for status in ["open", "closed", "matured unpaid", "rolled over"] {
        assert!(statuses.contains(status), "no {status}: {statuses:?}");
    }
    let mut taxed = 0;
    for r in &accruals {
        let a = made
            .iter()
            .find(|a| a.entry.terms.id == r["Account"])
            .unwrap();
        let closed = a.entry.terms.events.close_date.is_some();
        assert_eq!(r["Status"] == "closed", closed, "{r:?}");
        if closed {
            assert_eq!(r["Balance at cut-off"], "0", "{r:?}");
            assert_eq!(r["Accrued at cut-off"], "0", "{r:?}");
        }
        match &a.entry.terms.tax {
            Some(t) if t.schedule.tax_ref != "TAX-EXEMPT" => {
                taxed += 1;
                assert_ne!(r["Tax withheld in window"], "0", "{r:?}");
            }
            _ => assert!(
                matches!(r["Tax withheld in window"].as_str(), "" | "0"),
                "{r:?}"
            ),
        }
    }
    assert!(taxed >= 5, "{taxed} taxed accounts");
    let reconciliation = labelled_rows(&single, "Reconciliation");
    let net: Vec<_> = made
        .iter()
        .filter(|a| matches!(a.mistake, Some(Mistake::PostedNetOfTax { .. })))
        .collect();
    assert!(!net.is_empty());
    for a in net {
        let row = reconciliation
            .iter()
            .find(|r| r["Account"] == a.entry.terms.id)
            .unwrap();
        assert_eq!(row["Status"], "under-posted", "{row:?}");
        assert!(
            named(a.mistake.as_ref().unwrap(), &row["Likely cause"]),
            "{row:?}"
        );
    }

    let mut shards = Vec::new();
    for k in 1..=3 {
        let out = dir.path().join(format!("shard-{k}.xlsx"));
        ledgerate()
            .arg("run")
            .arg(&book)
            .args(time)
            .args(["--shard", &format!("{k}/3"), "--out"])
            .arg(&out)
            .assert()
            .success();
        shards.push(out);
    }
    let merged = dir.path().join("merged.xlsx");
    ledgerate()
        .arg("merge")
        .args(&shards)
        .args(time)
        .arg("--out")
        .arg(&merged)
        .assert()
        .success();
    let (a, b) = (all_sheets(&single), all_sheets(&merged));
    assert_eq!(
        a.iter().map(|s| &s.0).collect::<Vec<_>>(),
        b.iter().map(|s| &s.0).collect::<Vec<_>>()
    );
    for ((name, x), (_, y)) in a.iter().zip(&b) {
        if name == "Run" {
            continue; // the same settings; the command lines differ
        }
        assert_eq!(x, y, "sheet {name}");
    }
}
