//! The batch on hand-built books: journal balance, book order, determinism
//! across thread counts, and reconciliation wiring.

use std::collections::BTreeMap;

use super::totals::largest_variances;
use super::*;
use crate::book::GlCodes;
use crate::conventions::daycount::Basis;
use crate::engine::rates::RateSchedule;
use crate::engine::{AccountTerms, Movement, Side};
use crate::problem::{Position, RowPosition, Severity};
use crate::report::model::TieStatus;

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
        gl: GlCodes::default().into(),
        position: RowPosition::parse(Position {
            book: "test.xlsx".into(),
            sheet: "Accounts".into(),
            cell: "A2".into(),
            ..Default::default()
        })
        .unwrap(),
        opening_suspense: Decimal::ZERO,
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
        as_at: None,
        previous_as_at: None,
        settlement_lines: Default::default(),
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

/// Each currency and side's totals are the sums of its accounts' rounded
/// amounts (Completeness and presentation: totals by currency and side),
/// and adding the accrual lines one by one into [`Totals`] gives the batch's.
#[test]
fn totals_are_the_sum_of_the_accounts() {
    let r = run_books(&[book(30)], &settings(), &|| {});
    // Three currencies, each with deposits (liability) and loans (asset).
    let keys: Vec<(&str, &str)> = r
        .totals
        .iter()
        .map(|t| (t.currency.as_str(), t.side.as_str()))
        .collect();
    assert_eq!(
        keys,
        [
            ("JPY", "asset"),
            ("JPY", "liability"),
            ("KWD", "asset"),
            ("KWD", "liability"),
            ("USD", "asset"),
            ("USD", "liability")
        ]
    );
    for t in &r.totals {
        let lines: Vec<&AccrualLine> = r
            .accruals
            .iter()
            .filter(|a| a.currency == t.currency && a.side == t.side)
            .collect();
        let sum = |f: fn(&AccrualLine) -> Decimal| lines.iter().map(|a| f(a)).sum::<Decimal>();
        assert_eq!(t.accounts, 5);
        assert_eq!(t.accounts, lines.len());
        assert_eq!(t.balance_at_cutoff, sum(|a| a.balance_at_cutoff));
        assert_eq!(t.accrued_at_cutoff, sum(|a| a.accrued_at_cutoff));
        assert_eq!(t.posted_in_window, sum(|a| a.posted_in_window));
        assert_eq!(t.interest_for_window, sum(|a| a.interest_for_window));
        assert_eq!(t.prior_period, sum(|a| a.ledger.prior_period));
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
    // Completeness and presentation: read = computed + left out + failed,
    // and the account the computation stopped on is named with its error.
    assert_eq!(
        (r.accounts_read, r.accounts_left_out, r.accounts_failed),
        (2, 0, 1)
    );
    assert_eq!(r.left_out.len(), 1);
    assert_eq!(r.left_out[0].account, "B-0001");
    assert!(r.left_out[0]
        .error
        .contains("no Rates rows for rate_ref 'MISSING'"));
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
        tax_withheld: None,
        position: RowPosition::parse(Position {
            book: "test.xlsx".into(),
            sheet: "Statements".into(),
            cell: "A2".into(),
            ..Default::default()
        })
        .unwrap(),
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
            account: a.terms.id.clone().into(),
            period_start: d("2026-11-01"),
            period_end: d("2026-11-30"),
            posted: n(posted),
            reference: None,
            posting_date: None,
            tax_withheld: None,
            position: RowPosition::parse(Position {
                book: "test.xlsx".into(),
                sheet: "Statements".into(),
                cell: "A2".into(),
                ..Default::default()
            })
            .unwrap(),
        })
        .collect();
    b
}

/// `b` with accounts the reader left out: `count` more ids, each with an
/// error on its own Accounts row (in sheet order, after the kept ones).
fn with_left_out(mut b: Book, count: usize) -> Book {
    for i in 0..count {
        let id = format!("L-{i:03}");
        b.left_out.push(crate::book::LeftOut {
            account: id.clone(),
            problem: b.problems.len(),
        });
        b.problems.push(Problem {
            severity: Severity::Error,
            position: Position {
                book: "test.xlsx".into(),
                sheet: "Accounts".into(),
                cell: format!("E{}", 1000 + i),
                ..Default::default()
            },
            account: Some(id),
            found: "31/02/2026".into(),
            expected: "a date".into(),
            fix: "correct the date".into(),
            follows: None,
        });
    }
    b
}

/// Completeness and presentation: an account the reader left out is read
/// and not computed, named with its error; shards count only their own.
#[test]
fn accounts_left_out_by_the_books_are_counted_and_named() {
    let books = [with_left_out(book(4), 3)];
    let r = run_books(&books, &settings(), &|| {});
    assert_eq!(
        (
            r.accounts_read,
            r.accounts_computed,
            r.accounts_left_out,
            r.accounts_failed
        ),
        (7, 4, 3, 0)
    );
    let named: Vec<String> = r.left_out.iter().map(ToString::to_string).collect();
    assert_eq!(
        named[0],
        "L-000: test.xlsx Accounts!E1000: found '31/02/2026'; expected a date; correct the date"
    );
    assert_eq!(named.len(), 3);
    let mut read = 0;
    let mut left = Vec::new();
    for k in 1..=2 {
        let s = BatchSettings {
            shard: Some((k, 2)),
            ..settings()
        };
        let part = run_books(&books, &s, &|| {});
        assert_eq!(
            part.accounts_read,
            part.accounts_computed + part.accounts_left_out + part.accounts_failed
        );
        assert!(part.left_out.iter().all(|l| shard_of(&l.account, 2) == k));
        read += part.accounts_read;
        left.extend(part.left_out);
    }
    assert_eq!(read, 7);
    assert_eq!(left.len(), 3);
}

/// Completeness and presentation: an account whose statement row alone
/// could not be read is computed; its reconciliation has a row saying so,
/// an exception without figures, which takes the place of the "not posted"
/// row of the period it was for.
#[test]
fn an_unreadable_statement_row_is_an_exception_of_a_computed_account() {
    let mut b = book(1);
    b.accounts[0].terms.basis = Basis::Act360;
    b.movements.clear();
    let error = Problem {
        severity: Severity::Error,
        position: Position {
            book: "test.xlsx".into(),
            sheet: "Statements".into(),
            cell: "D3".into(),
            ..Default::default()
        },
        account: Some("B-0000".into()),
        found: "3.4O".into(),
        expected: "a number".into(),
        fix: "correct the amount".into(),
        follows: None,
    };
    b.statements = vec![StatementRow {
        account: "B-0000".into(),
        period_start: d("2026-10-01"),
        period_end: d("2026-10-31"),
        posted: n("3.66"),
        reference: None,
        posting_date: None,
        position: RowPosition::parse(error.position.clone()).unwrap(),
        tax_withheld: None,
    }];
    b.unreadable_statements = vec![UnreadableStatement {
        account: "B-0000".into(),
        period: Some((d("2026-11-01"), d("2026-11-30"))),
        error: error.clone(),
    }];
    b.problems.push(error);
    let r = run_books(&[b.clone()], &settings(), &|| {});
    assert_eq!(r.accounts_computed, 1);
    let statuses: Vec<Status> = r.reconciliation.iter().map(|l| l.status).collect();
    // October agrees; November's posting is not "not posted": its row is unreadable.
    assert_eq!(statuses, [Status::Agrees, Status::StatementUnreadable]);
    let line = &r.reconciliation[1];
    assert_eq!(
        (line.period_start, line.period_end),
        (Some(d("2026-11-01")), Some(d("2026-11-30")))
    );
    assert_eq!(
        (line.expected, line.posted, line.variance, line.variance_bp),
        (Decimal::ZERO, Decimal::ZERO, Decimal::ZERO, None)
    );
    assert_eq!(
        line.likely_cause,
        "the statement row at Statements!D3 could not be read, so this period is not reconciled: \
         found '3.4O'; expected a number; correct the amount"
    );
    assert!(line.status.outside_tolerance());
    // Counted by status, never ranked by money.
    assert_eq!(
        r.status_counts.last().map(|c| c.status),
        Some(Status::StatementUnreadable)
    );
    assert!(largest_variances(&r.reconciliation, 5)
        .iter()
        .all(|&i| i != 1));
    // A row whose dates could not be read does not stand for a period.
    b.unreadable_statements[0].period = None;
    let r = run_books(&[b], &settings(), &|| {});
    let statuses: Vec<Status> = r.reconciliation.iter().map(|l| l.status).collect();
    assert_eq!(
        statuses,
        [
            Status::Agrees,
            Status::NotPosted,
            Status::StatementUnreadable
        ]
    );
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
            accounts_left_out: r.accounts_left_out,
            accounts_failed: r.accounts_failed,
        },
        left_out: r.left_out,
        accruals: r.accruals,
        reconciliation: r.reconciliation,
        accrued_check: r.accrued_check,
        tie_out: r.tie_out,
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

/// Shards of a run, merged in any order, give the single run's rows, totals
/// (by currency and side), counts by status, journal, account counts and
/// accounts left out.
#[test]
fn shards_merged_equal_the_single_run() {
    let books = [with_left_out(book_with_statements(120), 14)];
    let single = run_books(&books, &settings(), &|| {});
    // Deposits and loans of each currency stay apart.
    assert_eq!(single.totals.len(), 6);
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
    assert_eq!(merged.facts.accounts_left_out, single.accounts_left_out);
    assert_eq!(merged.facts.accounts_failed, single.accounts_failed);
    assert_eq!(single.accounts_read, 134);
    assert_eq!(merged.left_out, single.left_out);
    assert_eq!(merged.facts.run_time, time);
    assert!(merged.facts.settings.iter().all(|s| s.name != "shard"));
}

/// A book whose accounts tie to a trial balance: Booked rows at the day
/// before the window and at the cut-off, a GL account that deposits and
/// loans share (their accounts in different shards of 3), a GL account of
/// one account only, a trial balance row no account uses, and a closing
/// row one minor unit off.
fn book_that_ties() -> Book {
    let mut b = book_with_statements(120);
    b.path = "test.xlsx".into();
    let position = |sheet: &str| Position {
        book: "test.xlsx".into(),
        sheet: sheet.into(),
        cell: "A2".into(),
        ..Default::default()
    };
    let booked = |account: &str, date: &str, open_item: &str| BookedRow {
        account: account.into(),
        date: d(date),
        open_item: n(open_item),
        position: position("Booked"),
    };
    for (i, a) in b.accounts.iter().enumerate().step_by(5) {
        let id = a.terms.id.clone();
        b.booked.push(booked(&id, "2026-10-31", "0"));
        if i % 10 == 0 {
            b.booked.push(booked(&id, "2026-11-30", "1"));
        }
    }
    // Account 0 is a USD deposit; 3, 9, 15... are USD loans.
    let liability = 0;
    let shard = |i: usize| shard_of(&b.accounts[i].terms.id, 3);
    let asset = (3..b.accounts.len())
        .step_by(6)
        .find(|&i| shard(i) != shard(liability))
        .unwrap();
    for i in [liability, asset] {
        b.accounts[i].gl.accrued = Some("MIXED".into());
    }
    b.accounts[6].gl.accrued = Some("ONLY-ONE".into());
    let tb = |ccy: &str, gl: &str, date: &str, balance: &str| TrialBalanceRow {
        entity: "HM".into(),
        currency: ccy.into(),
        gl_account: gl.into(),
        date: d(date),
        balance: n(balance),
        position: position("Trial balance"),
    };
    b.trial_balance = vec![
        tb(
            "USD",
            journal::defaults::ACCRUED_PAYABLE,
            "2026-10-31",
            "-12.34",
        ),
        tb(
            "JPY",
            journal::defaults::ACCRUED_RECEIVABLE,
            "2026-10-31",
            "56",
        ),
        tb("USD", "ONLY-ONE", "2026-10-31", "-1.00"),
        tb("USD", "NOBODY", "2026-11-30", "5.00"),
    ];
    b
}

/// Shards merged give the single run's Tie-out, Accrued check and the
/// problems about both (behaviour.md, Tie-out; System accrued check): the
/// sub-ledger summed anew, the trial balance taken from the shards, a GL
/// account shared by sides across shards refused, and a trial balance row
/// noted only when no account of the whole run uses it.
#[test]
fn shards_merged_give_the_single_runs_tie_out_and_accrued_check() {
    let mut books = [book_that_ties()];
    // The closing trial balance of the USD payable one cent off the sub-ledger.
    let first = run_books(&books, &settings(), &|| {});
    let payable = first
        .tie_out
        .unwrap()
        .into_iter()
        .find(|t| t.currency == "USD" && t.gl_account == journal::defaults::ACCRUED_PAYABLE)
        .unwrap();
    let mut closing = books[0].trial_balance[0].clone();
    closing.date = d("2026-11-30");
    closing.balance = -(payable.closing_sub_ledger + n("0.01"));
    books[0].trial_balance.push(closing);

    let single = run_books(&books, &settings(), &|| {});
    let tie_out = single.tie_out.clone().unwrap();
    let statuses: Vec<TieStatus> = tie_out.iter().map(|t| t.status).collect();
    assert!(
        statuses.contains(&TieStatus::WithinTolerance),
        "{tie_out:?}"
    );
    assert!(statuses.contains(&TieStatus::Differs), "{tie_out:?}");
    assert!(tie_out.iter().any(|t| t.gl_account == "ONLY-ONE"));
    assert!(!tie_out.iter().any(|t| t.gl_account == "MIXED"));
    assert!(single.accrued_check.len() > 1, "{:?}", single.accrued_check);
    let found = |p: &[Problem], what: &str| p.iter().filter(|p| p.found.contains(what)).count();
    assert_eq!(found(&single.problems, "GL account MIXED"), 1);
    assert_eq!(found(&single.problems, "GL account NOBODY"), 1);
    assert_eq!(found(&single.problems, "GL account ONLY-ONE"), 0);

    let parts: Vec<_> = (1..=3)
        .map(|k| shard_of_books(&books, &format!("s{k}.xlsx"), k, 3))
        .collect();
    // Each shard alone sees neither the shared GL account nor every use.
    for p in &parts {
        assert_eq!(found(&p.rows.problems, "GL account MIXED"), 0);
    }
    assert_eq!(
        parts
            .iter()
            .filter(|p| found(&p.rows.problems, "GL account ONLY-ONE") == 1)
            .count(),
        2
    );
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
    assert_eq!(merged.tie_out, single.tie_out);
    assert_eq!(merged.accrued_check, single.accrued_check);
    let mut problems = single.problems.clone();
    crate::problem::sort_problems(&mut problems, &["test.xlsx".to_string()]);
    assert_eq!(merged.problems, problems);
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

/// Write while accruing: the lines come part by part in book order, the
/// parts together are the lines of a whole run, and every other figure is
/// the same; the shapes known before the run are the lines' own.
#[test]
fn lines_handed_on_part_by_part_are_the_whole_run_in_book_order() {
    let books = [book(PART + 4)];
    let whole = run_books(&books, &settings(), &|| {});
    let mut parts: Vec<Vec<AccrualLine>> = Vec::new();
    let parted = rayon::ThreadPoolBuilder::new()
        .num_threads(2)
        .build()
        .unwrap()
        .install(|| run_books_in_parts(&books, &settings(), &|| {}, &mut |p| parts.push(p)));
    assert_eq!(
        parts.iter().map(Vec::len).collect::<Vec<_>>(),
        vec![PART, 4]
    );
    assert!(parted.accruals.is_empty());
    let lines: Vec<AccrualLine> = parts.into_iter().flatten().collect();
    assert_eq!(lines, whole.accruals);
    assert_eq!(parted.journal, whole.journal);
    assert_eq!(parted.totals, whole.totals);
    assert_eq!(parted.reconciliation, whole.reconciliation);
    assert_eq!(parted.accounts_computed, PART + 4);
    let shapes: Vec<LineShape> = line_shapes(&books, &settings()).collect();
    assert_eq!(shapes, lines.iter().map(LineShape::of).collect::<Vec<_>>());
}

/// The batch that drops what it has accrued gives what the batch that keeps
/// the books gives, whole or by shard, with statement rows out of the
/// accounts' order (each account's rows in their sheet order) and in it; the
/// books are left without movements and statement rows.
#[test]
fn releasing_the_accrued_rows_gives_the_same_batch() {
    let mut b = book_with_statements(PART + 40);
    let october: Vec<StatementRow> = b
        .statements
        .iter()
        .step_by(2)
        .map(|s| StatementRow {
            period_start: d("2026-10-01"),
            period_end: d("2026-10-31"),
            ..s.clone()
        })
        .collect();
    b.statements.extend(october);
    assert!(!b.movements.is_empty());
    let shuffled = {
        let mut s = b.clone();
        s.statements.reverse();
        s
    };
    for books in [[b], [shuffled]] {
        for shard in [None, Some((1, 2)), Some((2, 2))] {
            let s = BatchSettings {
                shard,
                ..settings()
            };
            let kept = run_books(&books, &s, &|| {});
            assert!(!kept.reconciliation.is_empty());
            let mut taken = books.clone();
            let mut lines: Vec<AccrualLine> = Vec::new();
            let released = run_books_releasing(&mut taken, &s, &|| {}, &mut |p| lines.extend(p));
            assert_eq!(lines, kept.accruals);
            assert_eq!(released.reconciliation, kept.reconciliation);
            assert_eq!(released.journal, kept.journal);
            assert_eq!(released.totals, kept.totals);
            assert_eq!(released.accounts_computed, kept.accounts_computed);
            assert!(taken[0].statements.is_empty() && taken[0].movements.is_empty());
            assert_eq!(taken[0].accounts.len(), books[0].accounts.len());
        }
    }
}
