//! The Statements sheet: interest actually posted, one row per account and
//! period, as the reconciliation compares it with the engine's figures.
//!
//! Rows of one account with the same period are kept as separate rows (the
//! reconciliation sums them); other overlaps are errors. With the
//! `statement_end` setting `exclusive`, a period_end is the first day after
//! the period and one day is taken off. A row of a known account that cannot
//! be read (or used) is kept as unreadable, with its first error: the
//! account is still computed and its reconciliation says the row could not
//! be read. Nothing here reconciles.

use std::collections::HashMap;

use chrono::NaiveDate;

use super::accounts::Known;
use super::model::{StatementRow, UnreadableStatement};
use super::settings::{StatementAmounts, StatementEnd};
use super::sheet::Sheet;
use super::table::{Ctx, Fields, Table};
use crate::problem::{Problem, Severity};
use crate::schema::{column, STATEMENTS};

const ACCOUNT: usize = column!(STATEMENTS, "account");
const PERIOD_START: usize = column!(STATEMENTS, "period_start");
const PERIOD_END: usize = column!(STATEMENTS, "period_end");
const POSTED: usize = column!(STATEMENTS, "posted_interest");
const REFERENCE: usize = column!(STATEMENTS, "reference");
const POSTING_DATE: usize = column!(STATEMENTS, "posting_date");
const TAX_WITHHELD: usize = column!(STATEMENTS, "tax_withheld");

/// What the Statements sheet gives.
#[derive(Debug, Default)]
pub(crate) struct Statements {
    /// Rows to reconcile, in sheet order.
    pub rows: Vec<StatementRow>,
    /// Rows of known accounts that could not be read, in sheet order.
    pub unreadable: Vec<UnreadableStatement>,
}

/// Reads the Statements sheet; `None` when it cannot be read as a table.
/// A kept row's period and row: start, end, 0-based row.
type Period = (NaiveDate, NaiveDate, u32);

pub(crate) fn read(
    ctx: Ctx<'_>,
    sheet: &Sheet,
    accounts: &Known,
    end: StatementEnd,
    amounts: StatementAmounts,
    problems: &mut Vec<Problem>,
) -> Option<Statements> {
    let opened = problems.len();
    let table = Table::open(&ctx, sheet, STATEMENTS.columns, problems)?;
    let row_at = table.column_position(&ctx, ACCOUNT);
    if amounts == StatementAmounts::Net && !table.has(TAX_WITHHELD) {
        // Net amounts without the tax: the gross each posting stands for is
        // not given, and is never guessed.
        problems.push(ctx.problem(
            Severity::Error,
            &sheet.name,
            table.header_row_ref(),
            None,
            "statement_amounts net and no tax_withheld column",
            "a tax_withheld column beside net posted_interest amounts (posted gross = posted_interest + tax_withheld)",
            "add a tax_withheld column (blank or 0 where no tax was withheld), or set statement_amounts to gross; reconciling net amounts without the tax is not supported",
        ));
        return None;
    }
    let mut out = Statements {
        rows: Vec::with_capacity(sheet.rows_hint()),
        ..Statements::default()
    };
    // A ragged row naming an account is not read: the error on it (which
    // names the account) stands for the row.
    out.unreadable.extend(
        problems
            .iter()
            .skip(opened)
            .filter(|p| p.severity == Severity::Error)
            .filter_map(|p| {
                let account = p.account.clone()?;
                accounts.get(&account)?;
                Some(UnreadableStatement {
                    account,
                    period: None,
                    error: p.clone(),
                })
            }),
    );
    // Per account, by its place among the sheet's ids: (start, end, row) of
    // the rows kept so far, the first in `first` (most accounts have one
    // row) and any later ones in `more`.
    let mut first: Vec<Option<Period>> = Vec::new();
    let mut more: HashMap<u32, Vec<Period>> = HashMap::new();
    for rec in table.records() {
        let before = problems.len();
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some((id, life)) = accounts.of_row(&mut f, ACCOUNT) else {
            continue;
        };
        let start = f.required_date(PERIOD_START);
        let written_end = f.required_date(PERIOD_END);
        let posted = f.required_decimal(POSTED);
        let reference = f.text(REFERENCE);
        let posting_date = f.date(POSTING_DATE);
        let tax_withheld = f.decimal(TAX_WITHHELD);
        // Net amounts: the posting's gross is what was credited plus the tax.
        let posted = match (amounts, posted, tax_withheld) {
            (StatementAmounts::Net, Some(p), Some(t)) => p.checked_add(t),
            _ => posted,
        };
        let period_end = written_end.and_then(|e| match end {
            StatementEnd::Inclusive => Some(e),
            StatementEnd::Exclusive => e.pred_opt(),
        });
        let (Some(start), Some(written_end), Some(posted), false) =
            (start, written_end, posted, f.failed)
        else {
            let period = start.zip(period_end).filter(|(s, e)| e >= s);
            let at = f.position(ACCOUNT);
            out.unreadable
                .push(unreadable(problems, before, id, period, at));
            continue;
        };
        let Some(period_end) = period_end.filter(|e| *e >= start) else {
            let expected = match end {
                StatementEnd::Inclusive => format!("a period_end on or after the period_start {start}"),
                StatementEnd::Exclusive => format!(
                    "a period_end after the period_start {start} (statement_end is exclusive: period_end is the first day after the period)"
                ),
            };
            f.report(
                Severity::Error,
                PERIOD_END,
                &written_end.to_string(),
                &expected,
                "correct the period's dates",
            );
            let at = f.position(ACCOUNT);
            out.unreadable
                .push(unreadable(problems, before, id, None, at));
            continue;
        };
        let before_open = life.open.is_some_and(|o| period_end < o);
        let after_maturity = life.maturity.is_some_and(|m| start >= m);
        if before_open || after_maturity {
            let expected = match (life.open, life.maturity) {
                (Some(o), Some(m)) => {
                    format!("a period that overlaps the account's life ({o} to {m})")
                }
                (Some(o), None) => format!("a period that overlaps the account's life (from {o})"),
                _ => "a period that overlaps the account's life".to_string(),
            };
            f.report(
                Severity::Warning,
                PERIOD_START,
                &format!("{start} to {period_end}"),
                &expected,
                "the row is entirely outside the account's life and is not reconciled: check the account or the dates",
            );
            continue;
        }
        let place = accounts.place(&id).unwrap_or(u32::MAX);
        let slot = usize::try_from(place).unwrap_or(usize::MAX);
        if first.len() <= slot && slot < usize::MAX {
            first.resize(slot + 1, None);
        }
        let kept = first
            .get(slot)
            .copied()
            .flatten()
            .into_iter()
            .chain(more.get(&place).into_iter().flatten().copied());
        let overlapped = kept
            .into_iter()
            .find(|(s, e, _)| (*s, *e) != (start, period_end) && *s <= period_end && start <= *e);
        if let Some((s, e, row)) = overlapped {
            let cell = table.cell_ref(row, PERIOD_START);
            f.report(
                Severity::Error,
                PERIOD_START,
                &format!("{start} to {period_end}"),
                &format!("a period that does not overlap the period {s} to {e} ({cell})"),
                "rows of one account may repeat a period (they are summed) but not overlap: correct the dates",
            );
            let at = f.position(ACCOUNT);
            let period = Some((start, period_end));
            out.unreadable
                .push(unreadable(problems, before, id, period, at));
            continue;
        }
        let kept = (start, period_end, rec.row);
        match first.get_mut(slot) {
            Some(f @ None) => *f = Some(kept),
            _ => more.entry(place).or_default().push(kept),
        }
        let position = f.row_position(ACCOUNT, &row_at);
        out.rows.push(StatementRow {
            account: id.into_boxed_str(),
            period_start: start,
            period_end,
            posted,
            reference: reference.map(String::into_boxed_str),
            posting_date,
            position,
            tax_withheld,
        });
    }
    out.rows.shrink_to_fit();
    Some(out)
}

/// The unreadable row of account `id` whose problems start at `before`: its
/// first error (a row is only unreadable through one, so the stand-in at
/// `at` is never needed in practice, but a row is never lost).
fn unreadable(
    problems: &[Problem],
    before: usize,
    account: String,
    period: Option<(NaiveDate, NaiveDate)>,
    at: crate::problem::Position,
) -> UnreadableStatement {
    let error = problems
        .iter()
        .skip(before)
        .find(|p| p.severity == Severity::Error)
        .cloned()
        .unwrap_or_else(|| Problem {
            severity: Severity::Error,
            position: at,
            account: Some(account.clone()),
            found: account.clone(),
            expected: "a statement row that can be read".to_string(),
            fix: "correct the row".to_string(),
            follows: None,
        });
    UnreadableStatement {
        account,
        period,
        error,
    }
}
