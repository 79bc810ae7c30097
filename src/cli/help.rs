//! The text `--help` and the manual pages show after the options: the
//! examples of each command and the exit statuses.
//!
//! Every example is a whole command line on the shipped sample book
//! (`sample-books/harbourview-2026-11.xlsx`, cut-off 2026-11-30), indented
//! four spaces and starting with `ledgerate `, so that the tests can pick
//! the lines out and run them. An example here must never name an option a
//! command does not have, nor a file the sample book does not ship.

use super::exit;

/// `ledgerate -h`: a first look at the program.
pub const TOP: &str = "\
Examples:
  Check the sample book, then run its November month end into november.xlsx:
    ledgerate check sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --out november.xlsx
  One account day by day:
    ledgerate explain sample-books/harbourview-2026-11.xlsx --account HM-LN-003

'ledgerate COMMAND --help' shows a command's options and examples;
'ledgerate manual --out DIR' writes the manual pages, 'ledgerate completions SHELL'
prints the completions for a shell.";

/// `ledgerate --help`: the examples, then the exit statuses.
pub fn top_long() -> String {
    format!(
        "{TOP}

Exit status:
  {ok}  every account was computed (check: no error)
  {errors}  some account had an error and was left out, or some book has an error
     (run still writes the workbook)
  {usage}  the command line or a file could not be used: a bad option or date, a
     missing book, an output that would overwrite an input, no cut-off, an as-at
     date before the cut-off
  {variance}  run --fail-on-variance: some statement row is outside tolerance and
     there is no error",
        ok = exit::OK,
        errors = exit::ACCOUNT_ERRORS,
        usage = exit::USAGE,
        variance = exit::VARIANCE,
    )
}

/// `ledgerate run --help`.
pub const RUN: &str = "\
Examples:
  The November month end of the sample book, into november.xlsx:
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --out november.xlsx
  With the Daily sheet; exit status 3 when a statement row is outside tolerance:
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --daily --fail-on-variance --out november-daily.xlsx
  Accept up to half a basis point, and book reversing journal entries:
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --tolerance-bp 0.5 --journal-style reversing --out november-reversing.xlsx
  What was known at the close on 3 December, postings settled on their end dates:
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --as-at 2026-12-03 --settlement-lines period-end --out november-as-at.xlsx
  The journal lines as a CSV file for the general ledger, and the Journal detail
  (each line's accounts) as a CSV file beside the workbook instead of a sheet:
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --journal-csv november-journal.csv --journal-detail csv --out november.xlsx
  Shard 1 of 2 of a month end split across machines (combine with 'ledgerate merge'):
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --shard 1/2 --out shard-1.xlsx";

/// `ledgerate check --help`.
pub const CHECK: &str = "\
Examples:
  Every problem of reading the sample book:
    ledgerate check sample-books/harbourview-2026-11.xlsx
  Also what accruing every account to the cut-off finds:
    ledgerate check sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30
  The same with only what was booked by 3 December:
    ledgerate check sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --as-at 2026-12-03";

/// `ledgerate merge --help`.
pub const MERGE: &str = "\
Examples:
  Two shards of the sample book's month end, then one workbook equal to a single run:
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --shard 1/2 --out shard-1.xlsx
    ledgerate run sample-books/harbourview-2026-11.xlsx --cutoff 2026-11-30 --shard 2/2 --out shard-2.xlsx
    ledgerate merge shard-1.xlsx shard-2.xlsx --out november.xlsx";

/// `ledgerate explain --help`.
pub const EXPLAIN: &str = "\
Examples:
  A loan posted on the wrong basis, over its statement period:
    ledgerate explain sample-books/harbourview-2026-11.xlsx --account HM-LN-003
  A savings account over November:
    ledgerate explain sample-books/harbourview-2026-11.xlsx --account HM-SAV-002 --cutoff 2026-11-30 --period 2026-11-01..2026-11-30";

/// `ledgerate template --help`.
pub const TEMPLATE: &str = "\
Examples:
  A blank book to fill in, as ledgerate-book.xlsx here:
    ledgerate template
  Under another name, replacing it if it exists:
    ledgerate template --out december-book.xlsx --force";

/// `ledgerate sample --help`.
pub const SAMPLE: &str = "\
Examples:
  A workbook of 1,000 invented accounts (cut-off 2026-11-30), then its month end:
    ledgerate sample --accounts 1000 --out sample-1k.xlsx
    ledgerate run sample-1k.xlsx --cutoff 2026-11-30 --out sample-1k-accruals.xlsx
  The same accounts as a folder of CSV files, from another seed:
    ledgerate sample --accounts 1000 --seed 7 --format csv --out sample-1k-csv";

/// `ledgerate daycount --help`.
pub const DAYCOUNT: &str = "\
Examples:
  November 2026 on ACT/360:
    ledgerate daycount ACT/360 2026-11-01 2026-12-01
  30E/360 ISDA up to a February maturity, as JSON:
    ledgerate daycount \"30E/360 ISDA\" 2026-11-30 2027-02-28 --maturity 2027-02-28 --json
  ACT/ACT ICMA, a regular half-year period:
    ledgerate daycount \"ACT/ACT ICMA\" 2026-11-01 2026-12-01 --frequency 2 --reference-start 2026-07-01 --reference-end 2027-01-01";

/// `ledgerate completions --help`.
pub const COMPLETIONS: &str = "\
Examples:
  bash: save the script, then 'source ledgerate.bash' from ~/.bashrc (or save it as
  ~/.local/share/bash-completion/completions/ledgerate):
    ledgerate completions bash > ledgerate.bash
  zsh: save it as _ledgerate in a folder of your fpath:
    ledgerate completions zsh > _ledgerate
  fish: save it as ~/.config/fish/completions/ledgerate.fish:
    ledgerate completions fish > ledgerate.fish
  PowerShell: save it, then load it from your profile ($PROFILE) with . ledgerate.ps1:
    ledgerate completions powershell > ledgerate.ps1";

/// `ledgerate manual --help`.
pub const MANUAL: &str = "\
Examples:
  The pages into a folder of your MANPATH (it is made if missing), then 'man ledgerate-run':
    ledgerate manual --out man/man1
  Read every page at once, without installing them:
    ledgerate manual | man -l -";

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_long_help_names_every_exit_status_with_its_number() {
        let text = top_long();
        for (code, words) in [
            (exit::OK, "every account was computed"),
            (exit::ACCOUNT_ERRORS, "some account had an error"),
            (exit::USAGE, "the command line or a file could not be used"),
            (exit::VARIANCE, "run --fail-on-variance"),
        ] {
            assert!(
                text.contains(&format!("  {code}  {words}")),
                "status {code} ({words}) missing from:\n{text}"
            );
        }
    }
}
