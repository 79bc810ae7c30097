//! `ledgerate sample --accounts N [--seed S] [--format xlsx|csv] --out PATH`:
//! a synthetic book of any size for trying the program and measuring it.
//!
//! Wires the generator ([`crate::sample`]) to the book writer
//! ([`crate::report::book_writer`]): accounts are generated in parallel in
//! chunks and written in order, so memory stays flat whatever the size; the
//! Trial balance is summed as they go (one sum per GL account) and written
//! last. A workbook is refused before anything is written when a sheet would
//! pass the spreadsheet row limit. Holds no accrual rule and plants no
//! mistake of its own.

use std::collections::BTreeMap;
use std::io::Write;
use std::path::PathBuf;

use anyhow::{bail, Context, Result};

use super::exit;
use crate::report::book_writer::{csv_name, BookWriter, Value, DATA_ROWS_PER_SHEET};
use crate::sample::{Generator, MistakeKind, OpeningBalances, SheetCounts, SHEETS};
use crate::schema::SheetKind;

/// Accounts generated and written at a time.
const CHUNK: u64 = 4096;

/// The book's format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// One workbook (at most 1,048,575 rows on a sheet).
    Xlsx,
    /// A folder of CSV files, one per sheet (no row limit).
    Csv,
}

/// Arguments of `sample`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// How many accounts the book holds.
    #[arg(long, value_name = "N")]
    accounts: u64,
    /// The seed: the same seed and size give the same book, byte for byte.
    #[arg(long, value_name = "S", default_value_t = 2026)]
    seed: u64,
    /// A workbook, or a folder of CSV files.
    #[arg(long, value_enum, default_value_t = Format::Xlsx)]
    format: Format,
    /// The workbook file, or the folder for CSV files.
    #[arg(long, value_name = "PATH")]
    out: PathBuf,
    /// Replace an existing book (for a folder: its sheet files).
    #[arg(long)]
    force: bool,
}

/// Why a workbook cannot hold the book: the first sheet past the row limit,
/// in words with the way out; `None` when every sheet fits.
fn limit_message(counts: &SheetCounts, accounts: u64) -> Option<String> {
    let (sheet, rows) = SHEETS
        .iter()
        .map(|s| (s.name(), counts.get(s.sheet)))
        .find(|(_, rows)| *rows > DATA_ROWS_PER_SHEET)?;
    Some(format!(
        "a book of {accounts} accounts needs {rows} rows on its {sheet} sheet, more than the {} a worksheet holds under its header: write it with --format csv (CSV books have no row limit)",
        DATA_ROWS_PER_SHEET
    ))
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_target(args)?;
    let generator = Generator::new(args.seed, args.accounts);
    let mut writer = open_writer(args, &generator)?;
    let tally = write_rows(&generator, &mut writer, args.accounts)?;
    writer
        .finish()
        .with_context(|| format!("cannot write the book {}", args.out.display()))?;
    print_summary(args, &tally, out)?;
    Ok(exit::OK)
}

/// What was written: rows per sheet, planted mistakes by kind, and the
/// ledger side's counts.
#[derive(Debug, Default)]
struct Tally {
    written: SheetCounts,
    planted: BTreeMap<MistakeKind, u64>,
    /// Booked rows at the cut-off planted a day off.
    booked_planted: u64,
    /// Accounts with a prior-period adjustment.
    prior_period: u64,
}

/// Refuses a book of no accounts, an existing book without `--force`, and
/// a target of the wrong kind (a folder for a workbook, a file for CSV).
fn check_target(args: &Args) -> Result<()> {
    if args.accounts == 0 {
        bail!("--accounts 0: give the number of accounts the book should hold, 1 or more");
    }
    let target = &args.out;
    if target.exists() && !args.force {
        bail!(
            "{} exists already: choose another --out path, or add --force to replace it",
            target.display()
        );
    }
    match args.format {
        Format::Xlsx if target.is_dir() => bail!(
            "{} is a folder: give a workbook file name such as book.xlsx, or use --format csv",
            target.display()
        ),
        Format::Csv if target.is_file() => bail!(
            "{} is a file: a CSV book is a folder; give a folder path",
            target.display()
        ),
        _ => Ok(()),
    }
}

/// The book writer for the format asked, after refusing a workbook that a
/// sheet would overflow.
fn open_writer(args: &Args, generator: &Generator) -> Result<BookWriter> {
    let target = &args.out;
    if args.format == Format::Xlsx {
        // The Accounts sheet alone tells for the largest books, before any counting.
        let quick = SheetCounts::of(&[(SheetKind::Accounts, args.accounts)]);
        let refusal = limit_message(&quick, args.accounts)
            .or_else(|| limit_message(&generator.counts(), args.accounts));
        if let Some(m) = refusal {
            bail!("{m}");
        }
    }
    match args.format {
        Format::Xlsx => BookWriter::xlsx(
            target,
            &SHEETS,
            "Harbourview Mutual month-end books, November 2026 (invented sample)",
            crate::sample::CUTOFF
                .succ_opt()
                .unwrap_or(crate::sample::CUTOFF),
        ),
        Format::Csv => BookWriter::csv(target, &SHEETS),
    }
    .with_context(|| format!("cannot write the book {}", target.display()))
}

/// Writes the shared rows, then every account's rows in chunks generated in
/// parallel, then the Trial balance their booked openings add up to;
/// returns what was written and planted.
fn write_rows(generator: &Generator, writer: &mut BookWriter, accounts: u64) -> Result<Tally> {
    let mut written = SheetCounts::default();
    let mut add = |w: &mut BookWriter, sheet: SheetKind, rows: Vec<Vec<Value>>| {
        for r in rows {
            w.row(sheet, &r)?;
            written.add(sheet, 1);
        }
        Ok::<(), crate::report::ReportError>(())
    };
    for sheet in [
        SheetKind::Rates,
        SheetKind::Holidays,
        SheetKind::Settings,
        SheetKind::Tax,
    ] {
        add(writer, sheet, generator.fixed_rows(sheet))?;
    }
    let mut planted: BTreeMap<MistakeKind, u64> = BTreeMap::new();
    let (mut booked_planted, mut prior_period) = (0, 0);
    let mut opening = OpeningBalances::default();
    let mut start = 0;
    while start < accounts {
        let end = start.saturating_add(CHUNK).min(accounts);
        for account in generator.accounts_in(start..end) {
            let a = account?;
            add(writer, SheetKind::Accounts, vec![a.account_row()])?;
            add(writer, SheetKind::Rates, a.rate_rows())?;
            add(writer, SheetKind::Movements, a.movement_rows())?;
            add(writer, SheetKind::Statements, a.statement_rows())?;
            add(writer, SheetKind::Booked, a.booked_rows())?;
            if let Some(m) = &a.mistake {
                *planted.entry(m.kind()).or_insert(0) += 1;
            }
            booked_planted += u64::from(a.booked.as_ref().is_some_and(|b| b.mistake.is_some()));
            prior_period += u64::from(!a.ledger.prior_period.is_zero());
            opening.add(&a)?;
        }
        start = end;
    }
    add(writer, SheetKind::TrialBalance, opening.rows())?;
    Ok(Tally {
        written,
        planted,
        booked_planted,
        prior_period,
    })
}

/// What was written, the mistakes planted, and how to run the book.
fn print_summary(args: &Args, tally: &Tally, out: &mut dyn Write) -> Result<()> {
    let (written, planted) = (&tally.written, &tally.planted);
    let target = &args.out;
    let shown = match args.format {
        Format::Xlsx => target.display().to_string(),
        Format::Csv => format!(
            "{} ({})",
            target.display(),
            SHEETS
                .iter()
                .map(|s| csv_name(s.name()))
                .collect::<Vec<_>>()
                .join(", ")
        ),
    };
    writeln!(out, "sample book written: {shown}")?;
    let n = |sheet: SheetKind| written.get(sheet);
    writeln!(
        out,
        "{} accounts, {} rates rows, {} movements, {} statement rows (seed {}, cut-off {})",
        n(SheetKind::Accounts),
        n(SheetKind::Rates),
        n(SheetKind::Movements),
        n(SheetKind::Statements),
        args.seed,
        crate::sample::CUTOFF
    )?;
    let total: u64 = planted.values().sum();
    let kinds: Vec<String> = planted
        .iter()
        .map(|(k, n)| format!("{n} {}", k.name()))
        .collect();
    writeln!(
        out,
        "planted statement mistakes: {total}{}",
        if kinds.is_empty() {
            String::new()
        } else {
            format!(" ({})", kinds.join(", "))
        }
    )?;
    writeln!(
        out,
        "ledger: {} booked rows at the cut-off ({} planted a day of interest off), {} trial balance rows at {}, {} accounts with a prior-period adjustment (previous close as at {})",
        n(SheetKind::Booked),
        tally.booked_planted,
        n(SheetKind::TrialBalance),
        crate::sample::OPENING_DAY,
        tally.prior_period,
        crate::sample::PREVIOUS_AS_AT
    )?;
    writeln!(
        out,
        "every name and figure is invented; run it with: ledgerate run {}",
        target.display()
    )?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The spreadsheet format's limit: 1,048,576 rows, one of them the header.
    #[test]
    fn a_sheet_past_the_row_limit_is_refused_with_the_way_out() {
        let counts = |movements: u64| {
            SheetCounts::of(&[
                (SheetKind::Accounts, 10),
                (SheetKind::Rates, 5),
                (SheetKind::Movements, movements),
                (SheetKind::Statements, 10),
                (SheetKind::Booked, 1),
                (SheetKind::TrialBalance, 3),
                (SheetKind::Holidays, 7),
                (SheetKind::Settings, 3),
            ])
        };
        let fits = counts(1_048_575);
        assert_eq!(limit_message(&fits, 10), None);
        let big = counts(1_048_576);
        let m = limit_message(&big, 10).unwrap();
        assert!(m.contains("Movements sheet"), "{m}");
        assert!(m.contains("--format csv"), "{m}");
    }
}
