//! `ledgerate completions SHELL`: the shell's completion script for every
//! command and option, printed to standard output.
//!
//! The script comes from the command line's own description (clap), so it
//! never lists an option the program does not have. It never writes a file.

use std::io::Write;

use anyhow::Result;
use clap::CommandFactory;
use clap_complete::Shell;

use super::{exit, Cli};

/// Arguments of `completions`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The shell to complete in.
    #[arg(value_enum, value_name = "SHELL")]
    shell: Shell,
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    out.write_all(&script(args.shell))?;
    Ok(exit::OK)
}

/// The completion script for `shell`. Made in memory: the generator
/// cannot report a failed write, so the write to standard output is ours.
fn script(shell: Shell) -> Vec<u8> {
    let mut command = Cli::command();
    let mut buffer = Vec::new();
    clap_complete::generate(shell, &mut command, "ledgerate", &mut buffer);
    buffer
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_shell_gets_a_script_that_names_the_program_and_its_commands() {
        for shell in [
            Shell::Bash,
            Shell::Zsh,
            Shell::Fish,
            Shell::PowerShell,
            Shell::Elvish,
        ] {
            let text = String::from_utf8(script(shell)).unwrap_or_default();
            // fish names options without their dashes (-l cutoff).
            for word in ["ledgerate", "merge", "explain", "daycount", "cutoff"] {
                assert!(text.contains(word), "{shell}: no {word} in the script");
            }
        }
    }
}
