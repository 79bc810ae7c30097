//! The bad-books corpus (`tests/bad-books/`): the real binary's `check` and
//! `run --cutoff 2026-11-30` on every book, against the problems, exit
//! statuses and figures that `tests/bad-books/expected.tsv` gives for it.
//!
//! The books are Harbourview Mutual's (an invented credit union), written by
//! `cargo run --example book_fixtures`. A book without an expectation, or an
//! expectation without a book, fails the test; so does any error or warning
//! that the expectations do not list.

use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

use assert_cmd::Command;
use calamine::{open_workbook_auto, Data, Reader};
use rust_decimal::Decimal;

fn corpus() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/bad-books")
}

/// Where a line's problem must appear.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum On {
    Both,
    Check,
    Run,
}

impl On {
    fn check(self) -> bool {
        matches!(self, On::Both | On::Check)
    }
    fn run(self) -> bool {
        matches!(self, On::Both | On::Run)
    }
}

/// One line of expected.tsv.
#[derive(Debug, Clone)]
struct Line {
    number: usize,
    check: i32,
    run: i32,
    on: On,
    kind: String,
    sheet: String,
    cell: String,
    words: Vec<String>,
}

/// The expectations, by book, in file order.
fn expectations() -> BTreeMap<String, Vec<Line>> {
    let text = std::fs::read_to_string(corpus().join("expected.tsv")).unwrap();
    let mut out: BTreeMap<String, Vec<Line>> = BTreeMap::new();
    for (i, raw) in text.lines().enumerate() {
        let number = i + 1;
        if raw.trim().is_empty() || raw.starts_with('#') {
            continue;
        }
        let f: Vec<&str> = raw.split('\t').collect();
        assert!(
            f.len() >= 5 && f.len() <= 8,
            "expected.tsv line {number}: {} fields: {raw:?}",
            f.len()
        );
        let field = |k: usize| f.get(k).copied().unwrap_or("").trim().to_string();
        let on = match field(3).as_str() {
            "both" => On::Both,
            "check" => On::Check,
            "run" => On::Run,
            other => panic!("expected.tsv line {number}: on '{other}'"),
        };
        let kind = field(4);
        assert!(
            ["error", "warning", "note", "none", "figure"].contains(&kind.as_str()),
            "expected.tsv line {number}: kind '{kind}'"
        );
        let words: Vec<String> = field(7)
            .split(" | ")
            .map(str::trim)
            .filter(|w| !w.is_empty())
            .map(str::to_string)
            .collect();
        if kind != "none" {
            assert!(!words.is_empty(), "expected.tsv line {number}: no words");
        }
        out.entry(field(0)).or_default().push(Line {
            number,
            check: field(1).parse().unwrap(),
            run: field(2).parse().unwrap(),
            on,
            kind,
            sheet: field(5),
            cell: field(6),
            words,
        });
    }
    out
}

/// The books of the folder: every file and folder but expected.tsv.
fn books() -> BTreeSet<String> {
    std::fs::read_dir(corpus())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n != "expected.tsv")
        .collect()
}

#[test]
fn every_book_has_an_expectation_and_every_expectation_a_book() {
    let books = books();
    let expected: BTreeSet<String> = expectations().into_keys().collect();
    let without: Vec<&String> = books.difference(&expected).collect();
    let orphans: Vec<&String> = expected.difference(&books).collect();
    assert!(
        without.is_empty(),
        "books without expectations: {without:?}"
    );
    assert!(
        orphans.is_empty(),
        "expectations without books: {orphans:?}"
    );
    // The corpus covers the faults it was made for, one book each at least.
    assert!(books.len() >= 40, "only {} books", books.len());
}

/// A problem as both outputs give it.
#[derive(Debug, Clone)]
struct Seen {
    kind: String,
    sheet: String,
    cell: String,
    text: String,
}

/// The problems that `check` (or run's refusal on standard error) prints, as
/// `  error: BOOK SHEET!CELL: found ...`, `  error: BOOK sheet SHEET: ...` or
/// `  error: BOOK: ...`.
fn printed(output: &str, book: &str) -> Vec<Seen> {
    let mut out = Vec::new();
    for line in output.lines() {
        // A problem that follows from another is indented under the
        // line that folds it.
        let Some(rest) = line
            .strip_prefix("    ")
            .or_else(|| line.strip_prefix("  "))
        else {
            continue;
        };
        let Some((kind, rest)) = rest.split_once(": ") else {
            continue;
        };
        if !["error", "warning", "note"].contains(&kind) {
            continue;
        }
        let Some(rest) = rest.strip_prefix(book) else {
            continue;
        };
        // A CSV folder's problems name the file and line:
        // `BOOK/accounts.csv, line 3, column balance: found ...`.
        let csv_file = rest
            .strip_prefix(std::path::MAIN_SEPARATOR)
            .and_then(|r| r.split_once(": "))
            .filter(|(at, _)| at.ends_with(".csv") || at.contains(".csv, line "));
        let (sheet, cell, text) = if let Some((at, text)) = csv_file {
            let (file, line) = at.split_once(", ").unwrap_or((at, ""));
            (file.to_string(), line.to_string(), text)
        } else if let Some(text) = rest.strip_prefix(": ") {
            (String::new(), String::new(), text)
        } else if let Some(r) = rest.strip_prefix(" sheet ") {
            let (sheet, text) = r.split_once(": ").unwrap();
            (sheet.to_string(), String::new(), text)
        } else {
            let r = rest.strip_prefix(' ').unwrap();
            let (at, text) = r.split_once(": ").unwrap();
            let (sheet, cell) = at.rsplit_once('!').unwrap();
            (sheet.to_string(), cell.to_string(), text)
        };
        out.push(Seen {
            kind: kind.to_string(),
            sheet,
            cell,
            text: text.to_string(),
        });
    }
    out
}

/// The rows of a sheet of the run's workbook.
fn sheet_rows(path: &Path, name: &str) -> Vec<Vec<Data>> {
    let mut wb = open_workbook_auto(path).unwrap();
    let range = wb.worksheet_range(name).unwrap();
    range.rows().map(<[Data]>::to_vec).collect()
}

/// The Problems sheet: Severity, Book, Sheet, Cell, Found, Expected, Fix.
fn problems_sheet(path: &Path) -> Vec<Seen> {
    sheet_rows(path, "Problems")
        .iter()
        .skip(1)
        .map(|r| {
            let col = |i: usize| r.get(i).map(|d| d.to_string()).unwrap_or_default();
            Seen {
                kind: col(0),
                sheet: col(2),
                cell: col(3),
                text: format!("{}; {}; {}", col(4), col(5), col(6)),
            }
        })
        .collect()
}

/// Checks `seen` against the lines of one output; returns the failures.
fn compare(book: &str, what: &str, seen: &[Seen], lines: &[&Line]) -> Vec<String> {
    let mut failures = Vec::new();
    let problems: Vec<&&Line> = lines
        .iter()
        .filter(|l| ["error", "warning", "note"].contains(&l.kind.as_str()))
        .collect();
    for l in &problems {
        let matching = seen.iter().any(|s| {
            s.kind == l.kind
                && s.sheet == l.sheet
                && s.cell == l.cell
                && l.words.iter().all(|w| s.text.contains(w.as_str()))
        });
        if !matching {
            failures.push(format!(
                "{book} ({what}): no {} at '{}'!'{}' with {:?} (line {})",
                l.kind, l.sheet, l.cell, l.words, l.number
            ));
        }
    }
    // Nothing serious that the expectations do not name.
    for s in seen
        .iter()
        .filter(|s| s.kind == "error" || s.kind == "warning")
    {
        let listed = problems
            .iter()
            .any(|l| l.kind == s.kind && l.sheet == s.sheet && l.cell == s.cell);
        if !listed {
            failures.push(format!(
                "{book} ({what}): unexpected {} at '{}'!'{}': {}",
                s.kind, s.sheet, s.cell, s.text
            ));
        }
    }
    failures
}

/// A figure of the Accruals sheet as a decimal (numbers and text figures alike).
fn figure(d: &Data) -> Option<Decimal> {
    match d {
        Data::Float(f) => f.to_string().parse().ok(),
        Data::Int(i) => Some(Decimal::from(*i)),
        Data::String(s) => s.replace(',', "").parse().ok(),
        _ => None,
    }
}

fn compare_figures(book: &str, out: &Path, lines: &[&Line]) -> Vec<String> {
    let mut failures = Vec::new();
    let figures: Vec<&&Line> = lines.iter().filter(|l| l.kind == "figure").collect();
    if figures.is_empty() {
        return failures;
    }
    let rows = sheet_rows(out, "Accruals");
    let header: Vec<String> = rows
        .first()
        .map(|r| r.iter().map(|c| c.to_string()).collect())
        .unwrap_or_default();
    for l in figures {
        let words = l.words.join(" | ");
        let (column, value) = words.split_once(" = ").unwrap();
        let want: Decimal = value.parse().unwrap();
        let col = header.iter().position(|h| h == column);
        let row = rows
            .iter()
            .find(|r| r.first().map(|c| c.to_string()).as_deref() == Some(l.cell.as_str()));
        let got = match (row, col) {
            (Some(r), Some(c)) => r.get(c).and_then(figure),
            _ => None,
        };
        if got != Some(want) {
            failures.push(format!(
                "{book}: Accruals {} {column}: got {got:?}, expected {want} (line {})",
                l.cell, l.number
            ));
        }
    }
    failures
}

fn exit_code(output: &std::process::Output) -> i32 {
    output.status.code().unwrap_or(-1)
}

#[test]
fn every_book_gets_its_expected_problems_exit_statuses_and_figures() {
    let expected = expectations();
    let scratch = tempfile::tempdir().unwrap();
    let mut failures: Vec<String> = Vec::new();
    for (book, lines) in &expected {
        let first = &lines[0];
        for l in lines {
            assert_eq!(
                (l.check, l.run),
                (first.check, first.run),
                "{book}: lines {} and {} give other exit statuses",
                first.number,
                l.number
            );
        }

        // check
        let out = Command::cargo_bin("ledgerate")
            .unwrap()
            .current_dir(corpus())
            .args(["check", book])
            .output()
            .unwrap();
        let stdout = String::from_utf8_lossy(&out.stdout);
        if exit_code(&out) != first.check {
            failures.push(format!(
                "{book}: check exited {}, expected {}\n{stdout}",
                exit_code(&out),
                first.check
            ));
        }
        let on_check: Vec<&Line> = lines.iter().filter(|l| l.on.check()).collect();
        failures.extend(compare(book, "check", &printed(&stdout, book), &on_check));

        // run
        let target = scratch.path().join(format!("{book}.xlsx"));
        let out = Command::cargo_bin("ledgerate")
            .unwrap()
            .current_dir(corpus())
            .args(["run", book, "--cutoff", "2026-11-30", "--out"])
            .arg(&target)
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&out.stderr);
        if exit_code(&out) != first.run {
            failures.push(format!(
                "{book}: run exited {}, expected {}\n{stderr}",
                exit_code(&out),
                first.run
            ));
            continue;
        }
        let on_run: Vec<&Line> = lines.iter().filter(|l| l.on.run()).collect();
        if first.run == 2 {
            if target.exists() {
                failures.push(format!("{book}: run exited 2 but wrote {target:?}"));
            }
            failures.extend(compare(book, "run", &printed(&stderr, book), &on_run));
            continue;
        }
        failures.extend(compare(book, "run", &problems_sheet(&target), &on_run));
        failures.extend(compare_figures(book, &target, &on_run));
    }
    assert!(
        failures.is_empty(),
        "{} failures:\n{}",
        failures.len(),
        failures.join("\n")
    );
}
