//! `ledgerate manual [--out DIR]`: the manual pages, in roff: `ledgerate.1`
//! for the program and `ledgerate-COMMAND.1` for each command. With `--out`
//! they are written into DIR (made if missing), else printed one after
//! another to standard output.
//!
//! The pages come from the command line's own description (clap), the same
//! text as `--help`, so the two never disagree. They carry no date, so the
//! same program always writes the same pages.

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{Context, Result};
use clap::CommandFactory;
use clap_mangen::roff::{roman, Roff};
use clap_mangen::Man;

use super::{exit, Cli};

/// Arguments of `manual`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The folder to write the pages into, for example ~/.local/share/man/man1
    /// (default: print them to standard output).
    #[arg(long, value_name = "DIR")]
    out: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    let pages = pages()?;
    match &args.out {
        None => {
            for (_, text) in &pages {
                out.write_all(text)?;
            }
        }
        Some(dir) => {
            write_pages(dir, &pages)?;
            for (name, _) in &pages {
                writeln!(out, "manual page written: {}", dir.join(name).display())?;
            }
        }
    }
    Ok(exit::OK)
}

/// Every page as (file name, roff text): the program's first, then each
/// command's in the order of `--help`.
fn pages() -> Result<Vec<(String, Vec<u8>)>> {
    let mut top = Cli::command().disable_help_subcommand(true);
    top.build();
    let mut pages = vec![page(top.clone())?];
    for command in top.get_subcommands().filter(|c| !c.is_hide_set()) {
        pages.push(page(command.clone())?);
    }
    Ok(pages)
}

/// One command's page. After building, a command's display name is its
/// page name (`ledgerate-run`).
fn page(command: clap::Command) -> Result<(String, Vec<u8>)> {
    let mut text = Vec::new();
    render(&command, &mut text).context("cannot render a manual page")?;
    Ok((Man::new(command).get_filename(), text))
}

/// The sections clap_mangen renders, with the help's closing text as
/// sections of their own (EXAMPLES, EXIT STATUS) in place of its single
/// filled EXTRA section, so that example lines stay one per line.
fn render(command: &clap::Command, w: &mut dyn Write) -> std::io::Result<()> {
    let after = command
        .get_after_long_help()
        .or_else(|| command.get_after_help())
        .map(|t| t.to_string());
    let man = Man::new(
        command
            .clone()
            .after_help(None::<&str>)
            .after_long_help(None::<&str>),
    )
    .source(format!("ledgerate {}", env!("CARGO_PKG_VERSION")));
    man.render_title(w)?;
    man.render_name_section(w)?;
    man.render_synopsis_section(w)?;
    man.render_description_section(w)?;
    if command.get_arguments().any(|a| !a.is_hide_set()) {
        man.render_options_section(w)?;
    }
    if command.get_subcommands().any(|c| !c.is_hide_set()) {
        man.render_subcommands_section(w)?;
    }
    if let Some(text) = after {
        closing_sections(&text).to_writer(w)?;
    }
    if command.get_version().is_some() {
        man.render_version_section(w)?;
    }
    Ok(())
}

/// The help's closing text in roff: each paragraph that opens with a
/// heading line (`Examples:`) becomes a section of that name, its lines
/// kept as they are; any other paragraph is filled as running text.
fn closing_sections(text: &str) -> Roff {
    let mut roff = Roff::new();
    for block in text.split("\n\n") {
        let mut lines = block.lines();
        let heading = block
            .lines()
            .next()
            .filter(|l| !l.starts_with(' '))
            .and_then(|l| l.strip_suffix(':'));
        match heading {
            Some(heading) => {
                lines.next();
                roff.control("SH", [heading.to_uppercase().as_str()]);
                roff.control("nf", []);
                for line in lines {
                    roff.text([roman(line.strip_prefix("  ").unwrap_or(line))]);
                }
                roff.control("fi", []);
            }
            None => {
                roff.control("PP", []);
                roff.text([roman(block.lines().collect::<Vec<_>>().join(" "))]);
            }
        }
    }
    roff
}

fn write_pages(dir: &Path, pages: &[(String, Vec<u8>)]) -> Result<()> {
    std::fs::create_dir_all(dir)
        .with_context(|| format!("cannot make the folder {}", dir.display()))?;
    for (name, text) in pages {
        let path = dir.join(name);
        std::fs::write(&path, text)
            .with_context(|| format!("cannot write the manual page {}", path.display()))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn there_is_one_page_for_the_program_and_one_for_each_command() {
        let names: Vec<String> = pages()
            .unwrap_or_default()
            .into_iter()
            .map(|(n, _)| n)
            .collect();
        assert_eq!(names.first().map(String::as_str), Some("ledgerate.1"));
        for command in ["run", "check", "merge", "explain", "completions", "manual"] {
            assert!(
                names.contains(&format!("ledgerate-{command}.1")),
                "no page for {command} in {names:?}"
            );
        }
        assert!(!names.iter().any(|n| n == "ledgerate-help.1"));
    }
}
