//! The Trial balance sheet: general-ledger balances at the end of a day,
//! signed as a trial balance prints them (debit positive, credit negative),
//! for the tie-out of the journal to the general ledger.
//!
//! A row with a bad cell (an unknown currency code among them) is an error
//! on the row and left out, as is a second balance for one entity,
//! currency, GL account and day; no account depends on this sheet, so none
//! is kept out. Nothing here turns a balance to a side or compares it with
//! anything; [`dates_not_used`] only says, once the window is known, which
//! rows no run of that window uses.

use std::collections::HashMap;

use chrono::NaiveDate;

use super::accounts::unknown_currency_fix;
use super::booked::whole_row;
use super::model::{Book, TrialBalanceRow};
use super::sheet::Sheet;
use super::table::{Ctx, Fields, Table};
use crate::conventions::currency;
use crate::problem::{Problem, Severity};
use crate::schema::{column, TRIAL_BALANCE};

const ENTITY: usize = column!(TRIAL_BALANCE, "entity");
const CURRENCY: usize = column!(TRIAL_BALANCE, "currency");
const GL_ACCOUNT: usize = column!(TRIAL_BALANCE, "gl_account");
const DATE: usize = column!(TRIAL_BALANCE, "date");
const BALANCE: usize = column!(TRIAL_BALANCE, "balance");

/// Reads the Trial balance sheet: its good rows in sheet order (none when
/// the sheet cannot be read as a table; that is an error of its own).
pub(crate) fn read(
    ctx: Ctx<'_>,
    sheet: &Sheet,
    problems: &mut Vec<Problem>,
) -> Vec<TrialBalanceRow> {
    let Some(table) = Table::open(&ctx, sheet, TRIAL_BALANCE.columns, problems) else {
        return Vec::new();
    };
    let mut out = Vec::new();
    // The row holding each entity, currency, GL account and day so far.
    let mut seen: HashMap<(String, String, String, NaiveDate), u32> = HashMap::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let entity = f.required_text(ENTITY);
        let code = currency_of(&mut f);
        let gl_account = f.required_text(GL_ACCOUNT);
        let date = f.required_date(DATE);
        let balance = f.required_decimal(BALANCE);
        let (Some(entity), Some(code), Some(gl_account), Some(date), Some(balance), false) =
            (entity, code, gl_account, date, balance, f.failed)
        else {
            continue;
        };
        let key = (entity.clone(), code.clone(), gl_account.clone(), date);
        if let Some(first) = seen.get(&key) {
            let first = table.cell_ref(*first, GL_ACCOUNT);
            f.report(
                Severity::Error,
                GL_ACCOUNT,
                &gl_account,
                &format!("one balance of {gl_account} in {code} for {entity} on {date} (it is already in {first})"),
                "remove one of the two rows; this one is not used",
            );
            continue;
        }
        seen.insert(key, rec.row);
        let position = f.position(GL_ACCOUNT);
        out.push(TrialBalanceRow {
            entity,
            currency: code,
            gl_account,
            date,
            balance,
            position,
        });
    }
    out.shrink_to_fit();
    out
}

/// The row's ISO 4217 code, as the standard writes it; an unknown code is
/// an error on its cell, with the code probably meant.
fn currency_of(f: &mut Fields<'_, '_, '_>) -> Option<String> {
    let code = f.required_text(CURRENCY)?;
    if let Some(c) = currency::lookup(&code) {
        return Some(c.code.to_string());
    }
    let fix = format!("{}; the row is not used", unknown_currency_fix(&code));
    f.report(
        Severity::Error,
        CURRENCY,
        &code,
        "an ISO 4217 currency code",
        &fix,
    );
    None
}

/// The Trial balance rows of `book` that no run of the window
/// `window_start..=cutoff` uses, each a warning: a row dated neither the
/// day before the window (the opening) nor the cut-off (the general ledger
/// after this run's journal). The rows stay in the book.
///
/// ```
/// use ledgerate::book::{trial_balance, Book, TrialBalanceRow};
/// let day = |s: &str| s.parse().unwrap();
/// let row = |d: &str| TrialBalanceRow {
///     entity: "Harbourview Mutual".into(),
///     currency: "USD".into(),
///     gl_account: "2310-ACCR-INT".into(),
///     date: day(d),
///     balance: "-310.00".parse().unwrap(),
///     position: Default::default(),
/// };
/// let book = Book { trial_balance: vec![row("2026-10-31"), row("2026-11-29")], ..Book::default() };
/// let warned = trial_balance::dates_not_used(&book, day("2026-11-01"), day("2026-11-30"));
/// assert_eq!(warned.len(), 1);
/// assert_eq!(warned[0].found, "2026-11-29");
/// ```
pub fn dates_not_used(book: &Book, window_start: NaiveDate, cutoff: NaiveDate) -> Vec<Problem> {
    let opening = window_start.pred_opt().unwrap_or(window_start);
    book.trial_balance
        .iter()
        .filter(|r| r.date != opening && r.date != cutoff)
        .map(|r| Problem {
            severity: Severity::Warning,
            position: whole_row(&r.position),
            account: None,
            found: r.date.to_string(),
            expected: format!(
                "a trial balance dated {opening} (the day before the window, the opening) or {cutoff} (the cut-off, after this run's journal)"
            ),
            fix: "this run does not use the row; correct its date, or keep it for the run whose window it belongs to".to_string(),
            follows: None,
        })
        .collect()
}
