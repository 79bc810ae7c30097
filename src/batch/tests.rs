//! The batch on hand-built books: journal balance, book order, determinism
//! across thread counts, and reconciliation wiring.

use std::collections::BTreeMap;

use super::*;
use crate::book::GlCodes;
use crate::conventions::daycount::Basis;
use crate::engine::rates::RateSchedule;
use crate::engine::{AccountTerms, Movement, Side};
use crate::problem::Position;

fn d(s: &str) -> NaiveDate {
    s.parse().unwrap()
}

fn n(s: &str) -> Decimal {
    s.parse().unwrap()
}

fn entry(id: &str, ccy: &str, minor: u32, side: Side, basis: Basis, balance: &str) -> AccountEntry {
    let mut terms = AccountTerms::new(id, ccy, minor, basis, d("2026-10-01"), n(balance));
    terms.side = side;
    AccountEntry {
        terms,
        name: format!("account {id}"),
        rate_ref: "R".into(),
        debit_rate_ref: None,
        gl: GlCodes::default(),
        position: Position {
            book: "test.xlsx".into(),
            sheet: "Accounts".into(),
            cell: "A2".into(),
            ..Default::default()
        },
    }
}

fn book(count: usize) -> Book {
    let mut b = Book::default();
    let mut rates = BTreeMap::new();
    rates.insert(
        "R".to_string(),
        RateSchedule::from_rows([
            (d("2026-01-01"), n("0.0425"), Decimal::ZERO),
            (d("2026-11-16"), n("0.04"), Decimal::ZERO),
        ]),
    );
    b.rates = rates;
    for i in 0..count {
        let (ccy, minor) = [("USD", 2), ("JPY", 0), ("KWD", 3)][i % 3];
        let side = if i % 2 == 0 {
            Side::Liability
        } else {
            Side::Asset
        };
        let basis = Basis::ALL[i % 4];
        let bal = format!("{}.{:02}", 1000 + i * 7919, i % 100);
        let bal = if minor == 0 {
            format!("{}", 100_000 + i * 7919)
        } else {
            bal
        };
        let e = entry(&format!("B-{i:04}"), ccy, minor, side, basis, &bal);
        b.movements.insert(
            e.terms.id.clone(),
            vec![Movement {
                value_date: d("2026-11-10"),
                amount: Decimal::from(i as i64 * 13),
                booking_date: None,
                reference: None,
            }],
        );
        b.accounts.push(e);
    }
    b
}

fn settings() -> BatchSettings {
    BatchSettings {
        fixing_fallback: crate::engine::floating::FixingFallback::None,
        cutoff: d("2026-11-30"),
        window_start: d("2026-11-01"),
        daily: false,
        journal_style: JournalStyle::Incremental,
        journal_detail: true,
        entities: vec!["HM".into()],
        tolerance: Tolerance::default(),
        fast_path: true,
        shard: None,
    }
}

/// Debits equal credits per currency (behaviour.md, Output workbook).
#[test]
fn journal_debits_equal_credits_per_currency() {
    for style in [JournalStyle::Incremental, JournalStyle::Reversing] {
        let s = BatchSettings {
            journal_style: style,
            ..settings()
        };
        let r = run_books(&[book(60)], &s, &|| {});
        assert_eq!(r.accounts_computed, 60);
        let mut sums: BTreeMap<String, (Decimal, Decimal)> = BTreeMap::new();
        for l in &r.journal {
            let e = sums.entry(l.currency.clone()).or_default();
            e.0 += l.debit;
            e.1 += l.credit;
        }
        assert_eq!(sums.len(), 3);
        for (c, (dr, cr)) in sums {
            assert_eq!(dr, cr, "{style:?} {c}");
        }
    }
}

/// Results come in book order and are the same on one thread or several.
#[test]
fn results_do_not_depend_on_the_thread_count() {
    let books = [book(300)];
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap()
        .install(|| run_books(&books, &settings(), &|| {}));
    let two = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .unwrap()
        .install(|| run_books(&books, &settings(), &|| {}));
    assert_eq!(one.accruals, two.accruals);
    assert_eq!(one.journal, two.journal);
    assert_eq!(one.totals, two.totals);
    let ids: Vec<&str> = one.accruals.iter().map(|a| a.account.as_str()).collect();
    let mut sorted = ids.clone();
    sorted.sort_unstable();
    assert_eq!(ids, sorted);
}

/// Each currency's totals are the sums of its accounts' rounded amounts, and
/// adding the accrual lines one by one into [`Totals`] gives the batch's.
#[test]
fn totals_are_the_sum_of_the_accounts() {
    let r = run_books(&[book(30)], &settings(), &|| {});
    assert_eq!(r.totals.len(), 3);
    for t in &r.totals {
        let lines: Vec<&AccrualLine> = r
            .accruals
            .iter()
            .filter(|a| a.currency == t.currency)
            .collect();
        let sum = |f: fn(&AccrualLine) -> Decimal| lines.iter().map(|a| f(a)).sum::<Decimal>();
        assert_eq!(t.accounts, 10);
        assert_eq!(t.accounts, lines.len());
        assert_eq!(t.balance_at_cutoff, sum(|a| a.balance_at_cutoff));
        assert_eq!(t.accrued_at_cutoff, sum(|a| a.accrued_at_cutoff));
        assert_eq!(t.posted_in_window, sum(|a| a.posted_in_window));
        assert_eq!(t.interest_for_window, sum(|a| a.interest_for_window));
        assert!(lines.iter().all(|a| a.minor_units == t.minor_units));
    }
    let mut by_line = Totals::default();
    for line in r.accruals.iter().rev() {
        by_line.add(line);
    }
    assert_eq!(by_line.rows(), r.totals);
}

#[test]
fn an_account_without_rates_is_a_problem_on_its_row() {
    let mut b = book(2);
    b.accounts[1].rate_ref = "MISSING".into();
    let r = run_books(&[b], &settings(), &|| {});
    assert_eq!(r.accounts_computed, 1);
    assert_eq!(r.problems.len(), 1);
    assert_eq!(r.problems[0].position.cell, "A2");
    assert!(
        r.problems[0]
            .found
            .contains("no Rates rows for rate_ref 'MISSING'"),
        "{}",
        r.problems[0]
    );
}

/// Statement rows for one period are summed, reconciled and explained; a
/// posting period that no row covers is "not posted".
#[test]
fn statements_are_reconciled_with_causes() {
    let mut b = book(1);
    b.accounts[0].terms.basis = Basis::Act360;
    b.movements.clear();
    let row = |start: &str, end: &str, posted: &str| StatementRow {
        account: "B-0000".into(),
        period_start: d(start),
        period_end: d(end),
        posted: n(posted),
        reference: None,
        posting_date: None,
        position: Position {
            book: "test.xlsx".into(),
            sheet: "Statements".into(),
            cell: "A2".into(),
            ..Default::default()
        },
    };
    // 1,000.00 at 4.25% on ACT/360 for November to the 15th and 4% after: 1.7708 + 1.6667.
    b.statements = vec![
        row("2026-11-01", "2026-11-30", "3.00"),
        row("2026-11-01", "2026-11-30", "0.40"),
    ];
    let r = run_books(&[b.clone()], &settings(), &|| {});
    assert_eq!(r.reconciliation.len(), 1, "{:?}", r.reconciliation);
    let line = &r.reconciliation[0];
    assert_eq!(line.posted, n("3.40"));
    assert_eq!(line.expected, n("3.44"));
    assert_eq!(line.status, Status::UnderPosted);
    assert!(!line.likely_cause.is_empty());
    assert!(r
        .problems
        .iter()
        .any(|p| p.severity == Severity::Note && p.found.contains("2 statement rows")));
    // Only October on the statement: November is not posted.
    b.statements = vec![row("2026-10-01", "2026-10-31", "3.66")];
    let r = run_books(&[b], &settings(), &|| {});
    let statuses: Vec<Status> = r.reconciliation.iter().map(|l| l.status).collect();
    assert_eq!(statuses, [Status::Agrees, Status::NotPosted]);
    assert_eq!(r.status_counts.len(), 2);
}

/// The book of [`book`] with a statement for every third account, posting
/// far too little or far too much for November, so that rows of several
/// statuses appear.
fn book_with_statements(count: usize) -> Book {
    let mut b = book(count);
    b.statements = b
        .accounts
        .iter()
        .step_by(3)
        .zip(["1.00", "99999999.00"].iter().cycle())
        .map(|(a, posted)| StatementRow {
            account: a.terms.id.clone(),
            period_start: d("2026-11-01"),
            period_end: d("2026-11-30"),
            posted: n(posted),
            reference: None,
            posting_date: None,
            position: Position {
                book: "test.xlsx".into(),
                sheet: "Statements".into(),
                cell: "A2".into(),
                ..Default::default()
            },
        })
        .collect();
    b
}

/// What shard `k` of `n` (a whole run for `None`) gives back of a batch,
/// from the workbook `file`.
fn read_back(file: &str, shard: Option<(u32, u32)>, r: BatchResult) -> split::Shard {
    use crate::report::model::{InputFile, RunFacts, Setting, SettingSource};
    let mut settings = vec![Setting {
        name: "cutoff".into(),
        value: "2026-11-30".into(),
        source: SettingSource::Option,
    }];
    if let Some((k, n)) = shard {
        settings.push(Setting {
            name: "shard".into(),
            value: format!("{k}/{n}"),
            source: SettingSource::Option,
        });
    }
    let rows = crate::report::readback::RunRows {
        facts: RunFacts {
            program: "ledgerate test".into(),
            command_line: "ledgerate run test.xlsx".into(),
            inputs: vec![InputFile {
                path: "test.xlsx".into(),
                size: 1,
                sha256: "00".into(),
            }],
            settings,
            run_time: d("2026-12-01").and_hms_opt(9, 0, 0).unwrap(),
            cutoff: d("2026-11-30"),
            window_start: d("2026-11-01"),
            accounts_read: r.accounts_read,
            accounts_computed: r.accounts_computed,
            accounts_failed: r.accounts_read - r.accounts_computed,
        },
        accruals: r.accruals,
        reconciliation: r.reconciliation,
        journal: r.journal,
        journal_detail: r.journal_detail,
        daily: r.daily,
        problems: r.problems,
    };
    split::Shard {
        file: file.into(),
        rows,
    }
}

/// Shard `k` of `n` of `books`, read back from `file`.
fn shard_of_books(books: &[Book], file: &str, k: u32, n: u32) -> split::Shard {
    let s = BatchSettings {
        shard: Some((k, n)),
        ..settings()
    };
    read_back(file, Some((k, n)), run_books(books, &s, &|| {}))
}

/// Shards of a run, merged in any order, give the single run's rows, totals,
/// counts by status and journal.
#[test]
fn shards_merged_equal_the_single_run() {
    let books = [book_with_statements(120)];
    let single = run_books(&books, &settings(), &|| {});
    assert!(single.status_counts.len() > 1, "{:?}", single.status_counts);
    let mut parts: Vec<_> = (1..=3)
        .map(|k| shard_of_books(&books, &format!("s{k}.xlsx"), k, 3))
        .collect();
    for p in &parts {
        let computed = p.rows.facts.accounts_computed;
        assert!(computed > 0 && computed < single.accounts_computed);
    }
    parts.reverse();
    let order: HashMap<String, usize> = books[0]
        .accounts
        .iter()
        .enumerate()
        .map(|(i, a)| (a.terms.id.clone(), i))
        .collect();
    let time = d("2026-12-02").and_hms_opt(8, 0, 0).unwrap();
    let merged = merge::merge(
        split::check(parts).unwrap(),
        &order,
        time,
        "ledgerate merge".into(),
    );
    assert_eq!(merged.accruals, single.accruals);
    assert_eq!(merged.totals, single.totals);
    assert_eq!(merged.reconciliation, single.reconciliation);
    assert_eq!(merged.status_counts, single.status_counts);
    assert_eq!(merged.journal, single.journal);
    assert_eq!(merged.journal_detail, single.journal_detail);
    assert_eq!(merged.facts.accounts_read, single.accounts_read);
    assert_eq!(merged.facts.accounts_computed, single.accounts_computed);
    assert_eq!(merged.facts.run_time, time);
    assert!(merged.facts.settings.iter().all(|s| s.name != "shard"));
}

/// What the split check says of a set of shards (empty when it passes).
fn findings(parts: Vec<split::Shard>) -> Vec<String> {
    match split::check(parts) {
        Ok(_) => Vec::new(),
        Err(merge::MergeError::NotOneSplit(found)) => found,
        Err(e) => vec![e.to_string()],
    }
}

#[test]
fn only_one_complete_split_of_one_run_is_merged() {
    let books = [book(12)];
    let part = |file: &str, k, n| shard_of_books(&books, file, k, n);
    assert_eq!(
        split::check(vec![]).map(|_| ()),
        Err(merge::MergeError::NoShards)
    );
    assert!(findings(vec![part("a", 1, 2), part("b", 2, 2)]).is_empty());
    assert!(findings(vec![part("a", 1, 1)]).is_empty());
    assert_eq!(
        findings(vec![part("a", 1, 3), part("b", 2, 3), part("c", 2, 3)]),
        ["shard 2/3 given twice: b and c", "shard 3/3 missing"]
    );
    assert_eq!(
        findings(vec![
            part("a", 1, 3),
            part("b", 2, 3),
            part("c", 3, 3),
            part("d", 1, 2)
        ]),
        ["d is shard 1/2 but the others are of 3"]
    );
    assert_eq!(
        findings(vec![part("a", 1, 3), part("d", 1, 2)]),
        ["d is shard 1/2 but a is of 3", "shards 2/3 and 3/3 missing"]
    );
    let whole = |file: &str| read_back(file, None, run_books(&books, &settings(), &|| {}));
    let found = findings(vec![whole("a"), whole("b")]);
    assert_eq!(found.len(), 2, "{found:?}");
    assert!(
        found[0].starts_with("a is a whole run, not a shard"),
        "{found:?}"
    );
    assert!(
        found[1].starts_with("b is a whole run, not a shard"),
        "{found:?}"
    );
    let mut other_book = part("b", 2, 2);
    other_book.rows.facts.inputs[0].sha256 = "ff".into();
    let found = findings(vec![part("a", 1, 2), other_book]);
    assert_eq!(found.len(), 1, "{found:?}");
    assert!(
        found[0].starts_with("b was run on other books than a: test.xlsx had SHA-256 ff"),
        "{found:?}"
    );
    let mut other_cutoff = part("b", 2, 2);
    other_cutoff.rows.facts.settings[0].value = "2026-11-29".into();
    let found = findings(vec![part("a", 1, 2), other_cutoff]);
    assert_eq!(found.len(), 1, "{found:?}");
    assert!(
        found[0].starts_with(
            "b was run with other settings than a: cutoff is 2026-11-29 (command line) there \
             and 2026-11-30 (command line) in a"
        ),
        "{found:?}"
    );
}

#[test]
fn a_shard_holding_another_shards_account_is_refused() {
    let books = [book(12)];
    let mut first = shard_of_books(&books, "a", 1, 2);
    let second = shard_of_books(&books, "b", 2, 2);
    let moved = second.rows.accruals[0].clone();
    first.rows.accruals.push(moved.clone());
    assert_eq!(
        findings(vec![first, second]),
        [format!(
            "a is shard 1/2 but holds account {}, which is in shard 2/2",
            moved.account
        )]
    );
}

#[test]
fn many_missing_shards_are_counted_not_listed() {
    let books = [book(2)];
    let found = findings(vec![shard_of_books(&books, "a", 2, 4_000_000_000)]);
    assert_eq!(
        found,
        [
            "shards 1/4000000000, 3/4000000000, 4/4000000000, 5/4000000000, 6/4000000000, \
          7/4000000000, 8/4000000000, 9/4000000000, 10/4000000000 and 11/4000000000 \
          and 3999999989 more missing"
        ]
    );
}
