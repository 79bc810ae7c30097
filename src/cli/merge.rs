//! `ledgerate merge SHARD... --out FILE`: one workbook from the workbooks of
//! shard runs (`run --shard K/N`), equal in every figure to one run over all
//! the accounts. The input books must still be where the shards read them
//! (on shared storage, say): merge re-reads them for the order of accounts
//! and checks their SHA-256 against the shards' Run sheets. Before any book is
//! re-read or any file written, the shards are proven one complete split of
//! one run (`batch::split`): same books, settings and N, each K once. The
//! Journal detail is merged from the shards' own: their Journal detail
//! sheets, or the detail files beside them when they were run with
//! `--journal-detail csv`, and goes where theirs went.

use std::collections::HashMap;
use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{anyhow, bail, Context, Result};

use super::inputs::{check_output_is_not_an_input, fingerprint};
use super::run::Files;
use super::summary::print_summary;
use super::{exit, run_time};
use crate::batch::merge::merge;
use crate::batch::split::{self, Shard};
use crate::book::{read_book, ReadOptions};
use crate::problem::Severity;
use crate::report::journal_csv::{self, DetailOutput};
use crate::report::model::{RunFacts, Setting};
use crate::report::readback::read_workbook;

/// Arguments of `merge`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The shard workbooks, in any order.
    #[arg(required = true, value_name = "SHARD")]
    shards: Vec<PathBuf>,
    /// Where to write the merged workbook.
    #[arg(long, value_name = "FILE")]
    out: PathBuf,
    /// Pin the run time written in the workbook (YYYY-MM-DDTHH:MM:SS).
    #[arg(long, value_name = "TIMESTAMP")]
    fixed_time: Option<String>,
    /// Also write the merged journal lines to FILE as CSV, for a general-ledger upload.
    #[arg(long, value_name = "FILE")]
    journal_csv: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_output_is_not_an_input(&args.out, &args.shards)?;
    // Proven one complete split before any book is re-read or a file written.
    let split = split::check(read_shards(&args.shards)?).map_err(|e| anyhow!("{e}"))?;
    let books: Vec<PathBuf> = split
        .facts()
        .inputs
        .iter()
        .map(|i| PathBuf::from(&i.path))
        .collect();
    check_output_is_not_an_input(&args.out, &books)?;
    let detail_output = detail_output(&split.facts().settings);
    let mut taken = books.clone();
    taken.extend(args.shards.iter().cloned());
    let files = Files::beside(
        &args.out,
        detail_output,
        args.journal_csv.as_deref(),
        &taken,
    )?;
    let order = book_order(split.facts())?;
    let shards: Vec<String> = args
        .shards
        .iter()
        .map(|s| s.display().to_string())
        .collect();
    let mut report = merge(
        split,
        &order,
        run_time(args.fixed_time.as_deref())?,
        format!("ledgerate merge {}", shards.join(" ")),
    );
    let csv_detail = match detail_output {
        DetailOutput::Csv => report.journal_detail.take(),
        DetailOutput::Sheet | DetailOutput::None => None,
    };
    files.note_guarded_cells(&mut report, csv_detail.as_ref());
    let written = crate::report::write_report(&report, &args.out)
        .with_context(|| format!("cannot write the workbook {}", args.out.display()))?;
    let written_files = files.write(&report, csv_detail.as_ref())?;
    print_summary(out, &report, &written, &written_files)?;
    Ok(
        if report
            .problems
            .iter()
            .any(|p| p.severity == Severity::Error)
        {
            exit::ACCOUNT_ERRORS
        } else {
            exit::OK
        },
    )
}

/// Every shard workbook read back, in the order given.
fn read_shards(shards: &[PathBuf]) -> Result<Vec<Shard>> {
    shards
        .iter()
        .map(|s| {
            if let Some(kind) = crate::files::special_kind(s) {
                bail!(
                    "the shard workbook {} is {kind}: give the .xlsx files that `ledgerate run --shard K/N` wrote",
                    s.display()
                );
            }
            if !s.exists() {
                bail!("the shard workbook {} does not exist", s.display());
            }
            if s.is_dir() {
                bail!(
                    "the shard workbook {} is a folder: give the .xlsx files that `ledgerate run --shard K/N` wrote",
                    s.display()
                );
            }
            let mut rows = read_workbook(s).map_err(|e| anyhow!("{e}"))?;
            match detail_output(&rows.facts.settings) {
                DetailOutput::Sheet if rows.journal_detail.is_none() => bail!(
                    "the shard workbook {} has no Journal detail sheet, though its Run sheet says \
                     journal_detail sheet: run that shard again",
                    s.display()
                ),
                DetailOutput::Csv => {
                    let file = journal_csv::detail_csv_path(s);
                    if !file.is_file() {
                        bail!(
                            "the shard workbook {} was run with --journal-detail csv, but its \
                             Journal detail file {} is not there: put it back beside the \
                             workbook, or run that shard again",
                            s.display(),
                            file.display()
                        );
                    }
                    let detail =
                        journal_csv::read_detail_csv(&file).map_err(|e| anyhow!("{e}"))?;
                    rows.journal_detail = Some(detail);
                }
                _ => {}
            }
            Ok(Shard {
                file: s.display().to_string(),
                rows,
            })
        })
        .collect()
}

/// Where the shards put their Journal detail, by their Run sheet's
/// `journal_detail` setting (none for a workbook written before it existed).
fn detail_output(settings: &[Setting]) -> DetailOutput {
    settings
        .iter()
        .find(|s| s.name == "journal_detail")
        .and_then(|s| DetailOutput::parse(&s.value).ok())
        .unwrap_or(DetailOutput::None)
}

/// Each account's place across the input books the shards read, once each
/// book is found unchanged (same SHA-256 as on the shards' Run sheets).
fn book_order(facts: &RunFacts) -> Result<HashMap<String, usize>> {
    let decimal_comma = facts
        .settings
        .iter()
        .any(|s| s.name == "decimal_comma" && s.value == "true");
    let mut order: HashMap<String, usize> = HashMap::new();
    for input in &facts.inputs {
        let path = Path::new(&input.path);
        let now = fingerprint(path).with_context(|| {
            format!(
                "merge re-reads the input books for the order of the accounts: {} is not there",
                input.path
            )
        })?;
        if now.sha256 != input.sha256 {
            bail!(
                "the book {} changed since the shards read it (SHA-256 {} on the Run sheets, {} now): run the shards again",
                input.path,
                input.sha256,
                now.sha256
            );
        }
        let book = read_book(path, &ReadOptions { decimal_comma });
        for a in &book.accounts {
            let next = order.len();
            order.entry(a.terms.id.clone()).or_insert(next);
        }
    }
    Ok(order)
}
