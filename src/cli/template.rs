//! `ledgerate template [--out FILE]`: a blank input book with every sheet
//! and column, notes on the headers, drop-down lists and one example row.

use std::io::Write;
use std::path::PathBuf;

use anyhow::{bail, Context, Result};

use super::exit;

/// Arguments of `template`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Where to write it (default: ledgerate-book.xlsx here).
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
    /// Replace the file if it exists.
    #[arg(long)]
    force: bool,
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    let target = args
        .out
        .clone()
        .unwrap_or_else(|| PathBuf::from("ledgerate-book.xlsx"));
    if target.exists() && !args.force {
        bail!(
            "{} exists already: choose another --out path, or add --force to replace it",
            target.display()
        );
    }
    crate::report::write_template(&target)
        .with_context(|| format!("cannot write the template {}", target.display()))?;
    writeln!(out, "template written: {}", target.display())?;
    Ok(exit::OK)
}
