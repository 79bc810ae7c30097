//! Combining the workbooks of shard runs (`ledgerate run --shard K/N`) into
//! the workbook one run over all the accounts would have written.
//!
//! Reads the sheets of our own workbooks back by their header labels (the
//! figures are exact: at most 15 significant digits as numbers, longer ones
//! as text), checks that the shards come from the same books and settings,
//! and re-sums totals, status counts and the journal. It never changes a
//! figure, and never reads a workbook it did not write.

use std::collections::{BTreeMap, HashMap};
use std::path::{Path, PathBuf};

use calamine::{open_workbook_auto, Data, DataType, Reader};
use chrono::{NaiveDate, NaiveDateTime};
use rust_decimal::Decimal;

use crate::batch::journal::Journal;
use crate::conventions::currency;
use crate::engine::reconcile::Status;
use crate::problem::sort_problems;
use crate::problem::{Position, Problem, Severity};
use crate::report::model::{
    AccrualLine, CurrencyTotal, DailyLine, InputFile, JournalLine, ReconciliationLine, Report,
    RunFacts, Setting, SettingSource, StatusCount,
};
use crate::report::workbook::{
    ACCRUALS_HEADER, DAILY_HEADER, JOURNAL_HEADER, PROBLEMS_HEADER, RECONCILIATION_HEADER,
};

/// A shard workbook that cannot be merged.
#[derive(Debug, thiserror::Error)]
pub enum MergeError {
    /// The file cannot be opened as a workbook.
    #[error("cannot open {path} as a workbook: {why}")]
    Open {
        /// The shard.
        path: PathBuf,
        /// What went wrong.
        why: String,
    },
    /// A sheet or cell is not what ledgerate writes.
    #[error("{path} {sheet}!{cell}: found {found}; expected {expected}: merge only takes workbooks written by `ledgerate run --shard`")]
    Cell {
        /// The shard.
        path: PathBuf,
        /// The sheet.
        sheet: String,
        /// The cell (A1) or row.
        cell: String,
        /// What was there.
        found: String,
        /// What was expected.
        expected: String,
    },
    /// Shards of different runs.
    #[error("{0}")]
    Mismatch(String),
}

fn a1(row: usize, col: usize) -> String {
    let mut letters = String::new();
    let mut c = col + 1;
    while c > 0 {
        let r = (c - 1) % 26;
        letters.insert(0, char::from(b'A' + u8::try_from(r).unwrap_or(0)));
        c = (c - 1) / 26;
    }
    format!("{letters}{}", row + 1)
}

/// The rows of one list sheet and its continuation sheets ("Daily", "Daily 2"...), headers checked.
struct Sheet<'a> {
    path: &'a Path,
    name: String,
    rows: Vec<(usize, Vec<Data>)>,
}

impl Sheet<'_> {
    fn err(&self, row: usize, col: usize, found: &Data, expected: &str) -> MergeError {
        MergeError::Cell {
            path: self.path.to_path_buf(),
            sheet: self.name.clone(),
            cell: a1(row, col),
            found: format!("{found:?}"),
            expected: expected.to_string(),
        }
    }
}

fn list_sheets<'a>(
    path: &'a Path,
    book: &mut calamine::Sheets<std::io::BufReader<std::fs::File>>,
    base: &str,
    header: &[&str],
) -> Result<Option<Sheet<'a>>, MergeError> {
    let names: Vec<String> = book
        .sheet_names()
        .into_iter()
        .filter(|n| {
            n == base
                || n.strip_prefix(base)
                    .and_then(|r| r.strip_prefix(' '))
                    .is_some_and(|k| k.parse::<u32>().is_ok())
        })
        .collect();
    if names.is_empty() {
        return Ok(None);
    }
    let mut rows = Vec::new();
    for name in &names {
        let range = book.worksheet_range(name).map_err(|e| MergeError::Open {
            path: path.to_path_buf(),
            why: e.to_string(),
        })?;
        let mut it = range.rows().enumerate();
        let found: Vec<String> = it
            .next()
            .map(|(_, r)| r.iter().map(|c| c.to_string()).collect())
            .unwrap_or_default();
        if found.iter().map(String::as_str).collect::<Vec<_>>() != header {
            return Err(MergeError::Cell {
                path: path.to_path_buf(),
                sheet: name.clone(),
                cell: "1:1".into(),
                found: found.join(", "),
                expected: header.join(", "),
            });
        }
        rows.extend(
            it.filter(|(_, r)| r.iter().any(|c| !matches!(c, Data::Empty)))
                .map(|(i, r)| (i, r.to_vec())),
        );
    }
    Ok(Some(Sheet {
        path,
        name: base.to_string(),
        rows,
    }))
}

fn cell(row: &[Data], col: usize) -> &Data {
    row.get(col).unwrap_or(&Data::Empty)
}

fn text(row: &[Data], col: usize) -> String {
    match cell(row, col) {
        Data::Empty => String::new(),
        d => d.to_string(),
    }
}

fn decimal(s: &Sheet, row: &(usize, Vec<Data>), col: usize) -> Result<Option<Decimal>, MergeError> {
    let c = cell(&row.1, col);
    match c {
        Data::Empty => Ok(None),
        Data::Float(f) => crate::book::number::decimal_from_float(*f)
            .map(Some)
            .ok_or_else(|| s.err(row.0, col, c, "a number")),
        Data::Int(i) => Ok(Some(Decimal::from(*i))),
        Data::String(t) => t
            .replace(',', "")
            .trim()
            .parse()
            .map(Some)
            .map_err(|_| s.err(row.0, col, c, "a number")),
        _ => Err(s.err(row.0, col, c, "a number")),
    }
}

fn amount(
    s: &Sheet,
    row: &(usize, Vec<Data>),
    col: usize,
    places: u32,
) -> Result<Decimal, MergeError> {
    let mut x =
        decimal(s, row, col)?.ok_or_else(|| s.err(row.0, col, &Data::Empty, "an amount"))?;
    if x.scale() < places {
        x.rescale(places);
    }
    Ok(x)
}

fn date(s: &Sheet, row: &(usize, Vec<Data>), col: usize) -> Result<NaiveDate, MergeError> {
    let c = cell(&row.1, col);
    let d = match c {
        Data::DateTime(_) | Data::DateTimeIso(_) => c.as_date(),
        Data::String(t) => t.parse().ok(),
        _ => None,
    };
    d.ok_or_else(|| s.err(row.0, col, c, "a date"))
}

fn minor(code: &str) -> u32 {
    currency::minor_units(code).unwrap_or(2)
}

/// Reads a shard workbook back into a [`Report`].
///
/// # Errors
/// [`MergeError`] for a file that is not a workbook ledgerate wrote.
pub fn read_workbook(path: &Path) -> Result<Report, MergeError> {
    let mut book = open_workbook_auto(path).map_err(|e| MergeError::Open {
        path: path.to_path_buf(),
        why: e.to_string(),
    })?;
    let missing = |sheet: &str| MergeError::Cell {
        path: path.to_path_buf(),
        sheet: sheet.into(),
        cell: String::new(),
        found: "no such sheet".into(),
        expected: format!("a {sheet} sheet"),
    };
    let facts = read_run(path, &mut book)?;

    let s = list_sheets(path, &mut book, "Accruals", &ACCRUALS_HEADER)?
        .ok_or_else(|| missing("Accruals"))?;
    let mut accruals = Vec::new();
    for r in &s.rows {
        let ccy = text(&r.1, 2);
        let places = minor(&ccy);
        accruals.push(AccrualLine {
            account: text(&r.1, 0),
            name: text(&r.1, 1),
            currency: ccy.into(),
            minor_units: places,
            side: text(&r.1, 3).into(),
            day_count: text(&r.1, 4).into(),
            compounding: text(&r.1, 5).into(),
            balance_at_cutoff: amount(&s, r, 6, places)?,
            accrued_at_cutoff: amount(&s, r, 7, places)?,
            posted_in_window: amount(&s, r, 8, places)?,
            interest_for_window: amount(&s, r, 9, places)?,
            effective_annual_rate: decimal(&s, r, 10)?,
        });
    }
    let places_of: HashMap<String, u32> = accruals
        .iter()
        .map(|a| (a.account.clone(), a.minor_units))
        .collect();

    let mut reconciliation = Vec::new();
    if let Some(s) = list_sheets(path, &mut book, "Reconciliation", &RECONCILIATION_HEADER)? {
        for r in &s.rows {
            let ccy = text(&r.1, 1);
            let places = minor(&ccy);
            reconciliation.push(ReconciliationLine {
                account: text(&r.1, 0),
                currency: ccy.into(),
                minor_units: places,
                period_start: date(&s, r, 2)?,
                period_end: date(&s, r, 3)?,
                days: decimal(&s, r, 4)?
                    .and_then(|d| i64::try_from(d.mantissa()).ok().filter(|_| d.scale() == 0))
                    .unwrap_or_default(),
                balance_years: decimal(&s, r, 5)?.unwrap_or_default(),
                expected: amount(&s, r, 6, places)?,
                posted: amount(&s, r, 7, places)?,
                variance: amount(&s, r, 8, places)?,
                variance_bp: decimal(&s, r, 9)?,
                status: text(&r.1, 10).into(),
                likely_cause: text(&r.1, 11),
            });
        }
    }

    let s = list_sheets(path, &mut book, "Journal", &JOURNAL_HEADER)?
        .ok_or_else(|| missing("Journal"))?;
    let mut journal = Vec::new();
    for r in &s.rows {
        let ccy = text(&r.1, 2);
        let places = minor(&ccy);
        journal.push(JournalLine {
            date: date(&s, r, 0)?,
            entity: text(&r.1, 1),
            currency: ccy,
            minor_units: places,
            gl_account: text(&r.1, 3),
            debit: amount(&s, r, 4, places)?,
            credit: amount(&s, r, 5, places)?,
            memo: text(&r.1, 6),
        });
    }

    let daily = match list_sheets(path, &mut book, "Daily", &DAILY_HEADER)? {
        None => None,
        Some(s) => {
            let mut lines = Vec::new();
            for r in &s.rows {
                let account = text(&r.1, 0);
                let places = places_of.get(&account).copied().unwrap_or(2);
                lines.push(DailyLine {
                    minor_units: places,
                    date: date(&s, r, 1)?,
                    balance: amount(&s, r, 2, places)?,
                    base: amount(&s, r, 3, places)?,
                    rate: decimal(&s, r, 4)?.unwrap_or_default(),
                    day_fraction: decimal(&s, r, 5)?.unwrap_or_default(),
                    interest: decimal(&s, r, 6)?.unwrap_or_default(),
                    accrued: decimal(&s, r, 7)?.unwrap_or_default(),
                    account,
                });
            }
            Some(lines)
        }
    };

    let s = list_sheets(path, &mut book, "Problems", &PROBLEMS_HEADER)?
        .ok_or_else(|| missing("Problems"))?;
    let mut problems = Vec::new();
    for r in &s.rows {
        let severity = match text(&r.1, 0).as_str() {
            "error" => Severity::Error,
            "warning" => Severity::Warning,
            _ => Severity::Note,
        };
        let expected = text(&r.1, 5);
        // The writer's own note on figures written as text is made again for the merged workbook.
        if expected.starts_with("a figure of at most") {
            continue;
        }
        problems.push(Problem {
            severity,
            position: Position {
                book: text(&r.1, 1),
                sheet: text(&r.1, 2),
                cell: text(&r.1, 3),
            },
            account: None,
            found: text(&r.1, 4),
            expected,
            fix: text(&r.1, 6),
        });
    }
    let summary = book
        .worksheet_range("Summary")
        .map_err(|_| missing("Summary"))?;
    let count = |label: &str| -> usize {
        summary
            .rows()
            .find(|r| text(r, 0) == label)
            .and_then(|r| match cell(r, 1) {
                Data::Float(f) => crate::book::number::decimal_from_float(*f)
                    .and_then(|d| usize::try_from(d.mantissa()).ok()),
                Data::Int(i) => usize::try_from(*i).ok(),
                _ => None,
            })
            .unwrap_or(0)
    };
    let (read, failed) = (count("Accounts read"), count("Accounts left out by errors"));
    Ok(Report {
        totals: totals(&accruals),
        status_counts: status_counts(&reconciliation),
        facts: RunFacts {
            accounts_read: read,
            accounts_computed: accruals.len(),
            accounts_failed: failed,
            ..facts
        },
        accruals,
        reconciliation,
        journal,
        daily,
        problems,
    })
}

fn read_run(
    path: &Path,
    book: &mut calamine::Sheets<std::io::BufReader<std::fs::File>>,
) -> Result<RunFacts, MergeError> {
    if !book.sheet_names().iter().any(|n| n == "Run") {
        return Err(MergeError::Cell {
            path: path.to_path_buf(),
            sheet: "Run".into(),
            cell: String::new(),
            found: "no such sheet".into(),
            expected: "the Run sheet of a ledgerate workbook".into(),
        });
    }
    let range = book.worksheet_range("Run").map_err(|e| MergeError::Open {
        path: path.to_path_buf(),
        why: e.to_string(),
    })?;
    let rows: Vec<Vec<Data>> = range.rows().map(|r| r.to_vec()).collect();
    let bad = |what: &str| MergeError::Cell {
        path: path.to_path_buf(),
        sheet: "Run".into(),
        cell: String::new(),
        found: format!("no {what}"),
        expected: "the Run sheet of a ledgerate workbook".into(),
    };
    let value = |label: &str| {
        rows.iter()
            .find(|r| text(r, 0) == label)
            .map(|r| cell(r, 1).clone())
    };
    let program = value("Program version")
        .map(|d| d.to_string())
        .ok_or_else(|| bad("program version"))?;
    let command_line = value("Command line")
        .map(|d| d.to_string())
        .unwrap_or_default();
    let run_time: NaiveDateTime = value("Time of the run")
        .and_then(|d| d.as_datetime())
        .ok_or_else(|| bad("time of the run"))?;
    let table = |title: &str| -> Vec<Vec<Data>> {
        rows.iter()
            .skip_while(|r| text(r, 0) != title)
            .skip(1)
            .take_while(|r| r.iter().any(|c| !matches!(c, Data::Empty)))
            .cloned()
            .collect()
    };
    let inputs = table("Input")
        .iter()
        .map(|r| InputFile {
            path: text(r, 0),
            size: match cell(r, 1) {
                Data::Float(f) => crate::book::number::decimal_from_float(*f)
                    .and_then(|d| u64::try_from(d.mantissa()).ok())
                    .unwrap_or(0),
                Data::Int(i) => u64::try_from(*i).unwrap_or(0),
                _ => 0,
            },
            sha256: text(r, 2),
        })
        .collect();
    let settings: Vec<Setting> = table("Setting")
        .iter()
        .map(|r| Setting {
            name: text(r, 0),
            value: text(r, 1),
            source: match text(r, 2).as_str() {
                "Settings sheet" => SettingSource::Book,
                "command line" => SettingSource::Option,
                _ => SettingSource::Default,
            },
        })
        .collect();
    let setting = |n: &str| {
        settings
            .iter()
            .find(|s| s.name == n)
            .and_then(|s| s.value.parse::<NaiveDate>().ok())
    };
    let cutoff = setting("cutoff").ok_or_else(|| bad("cutoff setting"))?;
    let window_start = setting("window_start").ok_or_else(|| bad("window_start setting"))?;
    Ok(RunFacts {
        program,
        command_line,
        inputs,
        settings,
        run_time,
        cutoff,
        window_start,
        accounts_read: 0,
        accounts_computed: 0,
        accounts_failed: 0,
    })
}

fn totals(accruals: &[AccrualLine]) -> Vec<CurrencyTotal> {
    let mut by: BTreeMap<String, CurrencyTotal> = BTreeMap::new();
    for a in accruals {
        let t = by
            .entry(a.currency.to_string())
            .or_insert_with(|| CurrencyTotal {
                currency: a.currency.to_string(),
                minor_units: a.minor_units,
                accounts: 0,
                balance_at_cutoff: Decimal::ZERO,
                accrued_at_cutoff: Decimal::ZERO,
                posted_in_window: Decimal::ZERO,
                interest_for_window: Decimal::ZERO,
            });
        t.accounts += 1;
        t.balance_at_cutoff += a.balance_at_cutoff;
        t.accrued_at_cutoff += a.accrued_at_cutoff;
        t.posted_in_window += a.posted_in_window;
        t.interest_for_window += a.interest_for_window;
    }
    by.into_values().collect()
}

fn status_counts(rows: &[ReconciliationLine]) -> Vec<StatusCount> {
    Status::ALL
        .iter()
        .filter_map(|st| {
            let n = rows.iter().filter(|r| r.status == st.name()).count();
            (n > 0).then(|| StatusCount {
                status: st.name().to_string(),
                rows: n,
            })
        })
        .collect()
}

/// Merges shard reports: rows put back in book order (`order`: account id to
/// its position across the books), totals, counts and journal re-summed,
/// problems listed once each. `accounts_read` and `accounts_failed` are the
/// totals over the shards as given by `counts` (read, failed) per shard.
///
/// # Errors
/// [`MergeError::Mismatch`] when the shards come from different books or settings.
pub fn merge(
    parts: Vec<Report>,
    order: &HashMap<String, usize>,
    run_time: NaiveDateTime,
    command_line: String,
) -> Result<Report, MergeError> {
    let mut parts = parts.into_iter();
    let first = parts
        .next()
        .ok_or_else(|| MergeError::Mismatch("no shard workbooks to merge".into()))?;
    let without_shard = |s: &[Setting]| {
        s.iter()
            .filter(|x| x.name != "shard")
            .cloned()
            .collect::<Vec<_>>()
    };
    let settings = without_shard(&first.facts.settings);
    let facts = first.facts.clone();
    let mut all = vec![first];
    for p in parts {
        if p.facts.inputs != facts.inputs {
            return Err(MergeError::Mismatch(
                "the shards were run on different books (paths or SHA-256 differ on their Run sheets)".into(),
            ));
        }
        if without_shard(&p.facts.settings) != settings {
            return Err(MergeError::Mismatch(
                "the shards were run with different settings (see their Run sheets)".into(),
            ));
        }
        all.push(p);
    }
    let rank = |id: &str| order.get(id).copied().unwrap_or(usize::MAX);
    let mut accruals: Vec<AccrualLine> = Vec::new();
    let mut reconciliation: Vec<ReconciliationLine> = Vec::new();
    let mut daily: Option<Vec<DailyLine>> = None;
    let mut journal = Journal::new();
    let mut problems: Vec<Problem> = Vec::new();
    let mut read = 0;
    let mut failed = 0;
    for p in all {
        read += p.facts.accounts_read;
        failed += p.facts.accounts_failed;
        accruals.extend(p.accruals);
        reconciliation.extend(p.reconciliation);
        if let Some(d) = p.daily {
            daily.get_or_insert_with(Vec::new).extend(d);
        }
        for l in &p.journal {
            journal.add_line(l);
        }
        for q in p.problems {
            if !problems.contains(&q) {
                problems.push(q);
            }
        }
    }
    accruals.sort_by_key(|a| rank(&a.account));
    reconciliation.sort_by_key(|r| rank(&r.account));
    if let Some(d) = daily.as_mut() {
        d.sort_by_key(|r| rank(&r.account));
    }
    let books: Vec<String> = facts.inputs.iter().map(|i| i.path.clone()).collect();
    sort_problems(&mut problems, &books);
    Ok(Report {
        totals: totals(&accruals),
        status_counts: status_counts(&reconciliation),
        facts: RunFacts {
            command_line,
            settings,
            run_time,
            accounts_read: read,
            accounts_computed: accruals.len(),
            accounts_failed: failed,
            ..facts
        },
        accruals,
        reconciliation,
        journal: journal.lines(),
        daily,
        problems,
    })
}
