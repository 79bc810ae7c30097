//! What a long run shows while it works: a spinner while it reads the books
//! and while it writes the workbook, a bar while it accrues.
//!
//! Everything here draws on standard error, and only when standard error
//! is a terminal: never on standard output (the summary, which scripts
//! read), never in a workbook, and nothing at all when the output goes to a
//! file or a pipe.

use std::borrow::Cow;
use std::io::IsTerminal;
use std::time::Duration;

use indicatif::{ProgressBar, ProgressStyle};

/// Accounts from which accruing shows a bar: below it the step is over
/// before a bar would be read.
const BAR_FROM_ACCOUNTS: usize = 20_000;

/// A bar for accruing `total` accounts, hidden for a short run or off a
/// terminal. The caller moves it with `inc` and ends it with
/// `finish_and_clear`.
pub fn accruing(total: usize) -> ProgressBar {
    if total < BAR_FROM_ACCOUNTS || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    // ProgressBar::new draws on standard error.
    let bar = ProgressBar::new(total as u64);
    if let Ok(style) =
        ProgressStyle::with_template("accruing {bar:40} {pos}/{len} accounts, {eta} left")
    {
        bar.set_style(style);
    }
    bar
}

/// A spinner with `message` and the time spent, for a step with no count
/// to show (reading a book, writing the workbook); hidden off a terminal.
/// It turns by itself until `finish_and_clear` (or until dropped), which
/// leaves the terminal line as it found it.
pub fn step(message: impl Into<Cow<'static, str>>) -> ProgressBar {
    if !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    // ProgressBar::new_spinner draws on standard error.
    let spinner = ProgressBar::new_spinner();
    if let Ok(style) = ProgressStyle::with_template("{spinner} {msg} ({elapsed})") {
        spinner.set_style(style);
    }
    spinner.set_message(message);
    spinner.enable_steady_tick(Duration::from_millis(120));
    spinner
}
