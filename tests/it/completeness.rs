//! behaviour.md, Completeness and presentation: no account vanishes (the
//! counts add up, and every account left out is named with the error that
//! kept it out, at the terminal, on Summary and on Problems; an account
//! whose statement row alone cannot be read is computed and counts as an
//! exception), and totals are by currency and side (a deposit is never
//! added to a loan), in one run and in a merge of its shards alike.
//!
//! The book: eight USD accounts of the sample book (three term deposits,
//! liabilities; five loans, assets), with one broken Accounts row, one
//! broken Movements row and one broken Statements row.

use std::path::{Path, PathBuf};

use calamine::Data;
use rust_decimal::Decimal;

use crate::common::{copy_dir, dec, ledgerate, sample_csv, sheet};

const DEPOSITS: [&str; 3] = ["HM-TD-001", "HM-TD-002", "HM-TD-003"];
const LOANS: [&str; 5] = [
    "HM-LN-001",
    "HM-LN-002",
    "HM-LN-003",
    "HM-LN-004",
    "HM-LN-005",
];

/// Keeps the header and the rows of the eight accounts of one CSV file of
/// `book`, then makes each `(from, to)` change, which must be there once.
fn keep_eight(book: &Path, file: &str, changes: &[(&str, &str)]) {
    let path = book.join(file);
    let text = std::fs::read_to_string(&path).unwrap();
    let mut lines = text.lines();
    let mut out = vec![lines.next().unwrap().to_string()];
    out.extend(
        lines
            .filter(|l| {
                let id = l.split(',').next().unwrap_or("");
                DEPOSITS.contains(&id) || LOANS.contains(&id)
            })
            .map(str::to_string),
    );
    let mut kept = out.join("\n") + "\n";
    for (from, to) in changes {
        assert_eq!(kept.matches(from).count(), 1, "{file}: {from}");
        kept = kept.replace(from, to);
    }
    std::fs::write(&path, kept).unwrap();
}

/// The eight-account book, under `dir`: HM-TD-003's opening balance, a
/// movement amount of HM-LN-002 and the posted amount of HM-LN-003's
/// statement row each hold a letter O for a zero.
fn eight_account_book(dir: &Path) -> PathBuf {
    let book = dir.join("book");
    copy_dir(&sample_csv(), &book);
    keep_eight(
        &book,
        "accounts.csv",
        &[("2026-06-15,100000.00", "2026-06-15,1OOOOO.OO")],
    );
    keep_eight(&book, "movements.csv", &[("-4200.00", "-42OO.00")]);
    keep_eight(&book, "statements.csv", &[("142.40", "142.4O")]);
    book
}

/// `run` of `book` to `out` (with any `more` options): its exit status and
/// standard output.
fn run(book: &Path, out: &Path, more: &[&str]) -> (i32, String) {
    let a = ledgerate()
        .arg("run")
        .arg(book)
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(out)
        .args(more)
        .assert();
    let output = a.get_output();
    (
        output.status.code().unwrap(),
        String::from_utf8(output.stdout.clone()).unwrap(),
    )
}

/// A number cell as an exact decimal.
fn number(d: &Data) -> Decimal {
    match d {
        Data::Float(f) => dec(&f.to_string()),
        other => panic!("not a number: {other:?}"),
    }
}

/// Column B of the Summary row whose column A is `label`.
fn summary_count(rows: &[Vec<Data>], label: &str) -> Decimal {
    let row = rows
        .iter()
        .find(|r| r[0] == Data::String(label.into()))
        .unwrap_or_else(|| panic!("no Summary row {label}"));
    number(&row[1])
}

/// The lines of the terminal summary from the one starting with `first`
/// up to the first that does not start with two spaces.
fn block<'t>(text: &'t str, first: &str) -> Vec<&'t str> {
    let mut lines = text.lines().skip_while(|l| !l.starts_with(first));
    let head = lines.next().into_iter();
    head.chain(lines.take_while(|l| l.starts_with("  ")))
        .collect()
}

#[test]
fn the_counts_add_up_and_each_account_left_out_is_named_with_its_error() {
    let dir = tempfile::tempdir().unwrap();
    let book = eight_account_book(dir.path());
    let out = dir.path().join("run.xlsx");
    let (code, text) = run(&book, &out, &[]);
    // Errors in the books: exit status 1, the workbook written all the same.
    assert_eq!(code, 1, "{text}");

    // Read = computed + left out: the broken Accounts and Movements rows keep
    // their accounts out; the broken Statements row does not.
    assert!(
        text.contains(
            "accounts: 8 read, 6 computed, 2 left out by errors (2 in the books, 0 in the computation)"
        ),
        "{text}"
    );
    let left = block(&text, "left out:");
    let accounts_csv = book.join("accounts.csv").display().to_string();
    let movements_csv = book.join("movements.csv").display().to_string();
    assert_eq!(left.len(), 3, "{text}");
    // In the order of the Problems sheet: the Accounts sheet before Movements.
    assert!(
        left[1].starts_with(&format!(
            "  HM-TD-003: {accounts_csv}, line 4, column opening_balance: found '1OOOOO.OO'"
        )),
        "{text}"
    );
    assert!(
        left[2].starts_with(&format!(
            "  HM-LN-002: {movements_csv}, line 3, column amount: found '-42OO.00'"
        )),
        "{text}"
    );

    // Summary: the same counts, and the same accounts with their errors.
    let summary = sheet(&out, "Summary");
    assert_eq!(summary_count(&summary, "Accounts read"), dec("8"));
    assert_eq!(summary_count(&summary, "Accounts computed"), dec("6"));
    assert_eq!(
        summary_count(&summary, "Accounts left out by errors"),
        dec("2")
    );
    assert_eq!(
        summary_count(&summary, "of which by errors in the books"),
        dec("2")
    );
    assert_eq!(
        summary_count(&summary, "of which by errors in the computation"),
        dec("0")
    );
    let named: Vec<(String, String, String)> = summary
        .iter()
        .filter(|r| r[0] == "HM-TD-003" || r[0] == "HM-LN-002")
        .map(|r| (r[0].to_string(), r[2].to_string(), r[4].to_string()))
        .collect();
    assert_eq!(named.len(), 2, "{named:?}");
    assert_eq!(
        (named[0].0.as_str(), named[0].1.as_str()),
        ("HM-TD-003", "accounts.csv")
    );
    assert!(named[0].2.starts_with("found '1OOOOO.OO'"), "{named:?}");
    assert_eq!(
        (named[1].0.as_str(), named[1].1.as_str()),
        ("HM-LN-002", "movements.csv")
    );
    assert!(named[1].2.starts_with("found '-42OO.00'"), "{named:?}");

    // Problems: each error row carries the id of the account it concerns.
    let problems = sheet(&out, "Problems");
    assert_eq!(problems[0][7], "Account");
    let error_of = |id: &str| -> Vec<String> {
        problems
            .iter()
            .filter(|r| r[0] == "error" && r[7] == id)
            .map(|r| format!("{} {} {}", r[2], r[3], r[4]))
            .collect()
    };
    assert_eq!(
        error_of("HM-TD-003"),
        ["accounts.csv line 4, column opening_balance 1OOOOO.OO"]
    );
    assert_eq!(
        error_of("HM-LN-002"),
        ["movements.csv line 3, column amount -42OO.00"]
    );
    assert_eq!(
        error_of("HM-LN-003"),
        ["statements.csv line 5, column posted_interest 142.4O"]
    );

    // The account whose statement row alone is unreadable is computed, and
    // its reconciliation row says so: an exception, with no figures.
    let accruals = sheet(&out, "Accruals");
    let computed: Vec<String> = accruals[1..].iter().map(|r| r[0].to_string()).collect();
    assert_eq!(
        computed,
        [
            "HM-TD-001",
            "HM-TD-002",
            "HM-LN-001",
            "HM-LN-003",
            "HM-LN-004",
            "HM-LN-005"
        ]
    );
    let recon = sheet(&out, "Reconciliation");
    let row = recon
        .iter()
        .find(|r| r[0] == "HM-LN-003")
        .expect("a Reconciliation row for HM-LN-003");
    assert_eq!(row[10], "statement unreadable");
    assert!(
        (4..=9).all(|c| row[c] == Data::Empty),
        "no figures: {row:?}"
    );
    let cause = row[11].to_string();
    assert!(
        cause.starts_with(
            "the statement row at statements.csv, line 5, column posted_interest could not be read"
        ) && cause.contains("found '142.4O'"),
        "{cause}"
    );
    assert!(text.contains("1 statement unreadable"), "{text}");
    assert_eq!(
        summary_count(&summary, "statement unreadable"),
        dec("1"),
        "counted by status"
    );
}

#[test]
fn a_deposit_and_a_loan_in_one_currency_give_two_total_rows() {
    let dir = tempfile::tempdir().unwrap();
    let book = eight_account_book(dir.path());
    let out = dir.path().join("run.xlsx");
    let (_, text) = run(&book, &out, &[]);

    // Two rows of USD at the terminal, asset before liability.
    let usd: Vec<Vec<&str>> = text
        .lines()
        .filter(|l| l.starts_with("USD "))
        .map(|l| l.split_whitespace().collect())
        .collect();
    assert_eq!(usd.len(), 2, "{text}");
    assert_eq!((usd[0][1], usd[0][2]), ("asset", "4"));
    assert_eq!((usd[1][1], usd[1][2]), ("liability", "2"));

    // On Summary, each row is the sum of its side's Accruals rows only.
    let summary = sheet(&out, "Summary");
    let header = summary
        .iter()
        .position(|r| r[0] == "Currency" && r[1] == "Side")
        .expect("the totals' header");
    let accruals = sheet(&out, "Accruals");
    for (i, side, ids) in [(1, "asset", &LOANS[..]), (2, "liability", &DEPOSITS[..])] {
        let row = &summary[header + i];
        assert_eq!(
            (row[0].to_string(), row[1].to_string()),
            ("USD".into(), side.into())
        );
        let lines: Vec<&Vec<Data>> = accruals[1..].iter().filter(|r| r[3] == side).collect();
        assert!(lines
            .iter()
            .all(|r| ids.contains(&r[0].to_string().as_str())));
        assert_eq!(number(&row[2]), Decimal::from(lines.len()), "{side}");
        // Balance, accrued, posted and interest for window: columns G..J of
        // Accruals, D..G of the totals.
        for (total_col, line_col) in [(3, 6), (4, 7), (5, 8), (6, 9)] {
            let sum: Decimal = lines.iter().map(|r| number(&r[line_col])).sum();
            assert_eq!(number(&row[total_col]), sum, "{side} column {total_col}");
        }
        // The prior-period adjustment is summed per side too (zero here).
        assert_eq!(number(&row[7]), Decimal::ZERO);
    }
    assert!(
        summary.iter().any(|r| r[0]
            .to_string()
            .starts_with("Interest for window is interest expense on a liability row")),
        "the gloss under the totals"
    );
}

#[test]
fn shards_merged_give_the_single_runs_counts_accounts_left_out_and_totals() {
    let dir = tempfile::tempdir().unwrap();
    let book = eight_account_book(dir.path());
    let single = dir.path().join("single.xlsx");
    let (_, single_text) = run(&book, &single, &[]);
    let mut shards = Vec::new();
    let mut read = 0;
    for k in 1..=3 {
        let out = dir.path().join(format!("shard-{k}.xlsx"));
        let (code, text) = run(&book, &out, &["--shard", &format!("{k}/3")]);
        assert_eq!(code, 1, "{text}");
        // Each shard counts only its own accounts, and they add up.
        let summary = sheet(&out, "Summary");
        let shard_read = summary_count(&summary, "Accounts read");
        assert_eq!(
            shard_read,
            summary_count(&summary, "Accounts computed")
                + summary_count(&summary, "Accounts left out by errors"),
            "shard {k}"
        );
        read += shard_read.mantissa();
        shards.push(out);
    }
    assert_eq!(read, 8);
    let merged = dir.path().join("merged.xlsx");
    let a = ledgerate()
        .arg("merge")
        .args(&shards)
        .args(["--fixed-time", "2026-12-01T08:00:00", "--out"])
        .arg(&merged)
        .assert()
        .code(1);
    let merged_text = String::from_utf8(a.get_output().stdout.clone()).unwrap();
    // The same counts, accounts left out and totals at the terminal...
    for first in ["accounts:", "left out:", "currency "] {
        assert_eq!(
            block(&merged_text, first),
            block(&single_text, first),
            "{merged_text}"
        );
    }
    let totals = |t: &str| -> Vec<String> {
        t.lines()
            .filter(|l| l.starts_with("USD "))
            .map(str::to_string)
            .collect()
    };
    assert_eq!(totals(&merged_text), totals(&single_text));
    // ... and the same Summary, Reconciliation and Problems, cell for cell.
    for name in ["Summary", "Accruals", "Reconciliation", "Problems"] {
        assert_eq!(sheet(&merged, name), sheet(&single, name), "{name}");
    }
}
