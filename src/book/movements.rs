//! The Movements sheet: balance movements by account (a positive amount
//! raises the balance), each with its value date and, for a back-valued
//! movement, the date it was booked.
//!
//! A movement row with an error keeps its account out (its balance would be
//! wrong without it); a row of an unknown account is an error and left out.
//! Movements are kept in sheet order; nothing here sums or sorts them.

use std::collections::BTreeMap;

use super::accounts::Known;
use super::sheet::Sheet;
use super::table::{Ctx, Fields, Table};
use crate::engine::{Movement, Side};
use crate::problem::{Problem, Severity};
use crate::schema::{column, MOVEMENTS};
use rust_decimal::Decimal;

const ACCOUNT: usize = column!(MOVEMENTS, "account");
const VALUE_DATE: usize = column!(MOVEMENTS, "value_date");
const AMOUNT: usize = column!(MOVEMENTS, "amount");
const BOOKING_DATE: usize = column!(MOVEMENTS, "booking_date");
const REFERENCE: usize = column!(MOVEMENTS, "reference");
const APPLIES_TO: usize = column!(MOVEMENTS, "applies_to");

/// What a movement applies to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum AppliesTo {
    Principal,
    Interest,
}

fn applies_to(s: &str) -> Result<AppliesTo, crate::conventions::names::UnknownName> {
    crate::conventions::names::lookup(
        "applies_to",
        s,
        &[
            ("principal", AppliesTo::Principal),
            ("interest", AppliesTo::Interest),
        ],
        &["principal", "interest"],
    )
}

/// What the Movements sheet gives.
#[derive(Debug, Default)]
pub(crate) struct Movements {
    /// Good movements by account, in sheet order.
    pub by_account: BTreeMap<String, Vec<Movement>>,
    /// Accounts with a bad movement row.
    pub spoiled: Vec<String>,
    /// Interest receipts (`applies_to` interest) by account, in sheet order:
    /// they never move the balance.
    pub interest: BTreeMap<String, Vec<Movement>>,
}

/// Reads the Movements sheet; `None` when the sheet cannot be read as a table.
pub(crate) fn read(
    ctx: Ctx<'_>,
    sheet: &Sheet,
    accounts: &Known,
    problems: &mut Vec<Problem>,
) -> Option<Movements> {
    let table = Table::open(&ctx, sheet, MOVEMENTS.columns, problems)?;
    let mut out = Movements::default();
    // A ragged row of an account is missing from its figures.
    out.spoiled.extend(table.skipped_accounts().iter().cloned());
    // Rows usually come grouped by account: a run of rows of one account is
    // gathered here and kept as one list, in the rows' order.
    // The account of the current run of rows, and its movements so far.
    let mut current: Option<String> = None;
    let mut run: Vec<Movement> = Vec::new();
    let mut runs: Vec<(String, Vec<Movement>)> = Vec::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some((id, life)) = accounts.of_row(&mut f, ACCOUNT) else {
            continue;
        };
        let value_date = f.required_date(VALUE_DATE);
        let amount = f.required_decimal(AMOUNT);
        let booking_date = f.date(BOOKING_DATE);
        let reference = f.text(REFERENCE).map(String::into_boxed_str);
        let applies = f
            .named(APPLIES_TO, applies_to)
            .unwrap_or(AppliesTo::Principal);
        let (Some(value_date), Some(amount), false) = (value_date, amount, f.failed) else {
            out.spoiled.push(id);
            continue;
        };
        if applies == AppliesTo::Interest {
            let problem = if life.side == Some(Side::Liability) {
                Some((
                    "interest".to_string(),
                    "applies_to interest only on an asset account (a receipt of billed loan interest)",
                    "write principal (or leave it blank) for a deposit's movement; the account is not computed until then",
                ))
            } else if amount > Decimal::ZERO {
                Some((
                    amount.to_string(),
                    "a negative amount for a receipt of interest (applies_to interest)",
                    "write the receipt as a negative amount, or applies_to principal if it moves the balance; the account is not computed until then",
                ))
            } else {
                None
            };
            if let Some((found, expected, fix)) = problem {
                let col = if found == "interest" {
                    APPLIES_TO
                } else {
                    AMOUNT
                };
                f.report(Severity::Error, col, &found, expected, fix);
                out.spoiled.push(id);
                continue;
            }
            out.interest.entry(id).or_default().push(Movement {
                value_date,
                amount,
                booking_date,
                reference,
            });
            continue;
        }
        if let Some(open) = life.open {
            if value_date < open {
                f.report(
                    Severity::Warning,
                    VALUE_DATE,
                    &value_date.to_string(),
                    &format!("a value date on or after the account's open_date {open}"),
                    "the opening balance is taken to include this movement, which is not applied again; remove the row if that is so",
                );
            }
        }
        if let Some(x) = life.close {
            if value_date > x {
                f.report(
                    Severity::Error,
                    VALUE_DATE,
                    &value_date.to_string(),
                    &format!("a value date on or before the account's close_date {x} (the account is closed)"),
                    "correct the value date or the close_date; a payout is valued on the close_date itself",
                );
                out.spoiled.push(id);
                continue;
            }
        }
        if life.penalised
            && amount.is_sign_negative()
            && life.maturity.is_some_and(|m| value_date < m)
            && life.close.is_none_or(|x| value_date < x)
        {
            f.report(
                Severity::Note,
                AMOUNT,
                &amount.to_string(),
                "a withdrawal before maturity on an account with a break penalty",
                "partial withdrawals before maturity carry no penalty: only a close does",
            );
        }
        let movement = Movement {
            value_date,
            amount,
            booking_date,
            reference,
        };
        if current.as_deref() != Some(id.as_str()) {
            if let Some(done) = current.replace(id) {
                runs.push((done, exact(&mut run)));
            }
        }
        run.push(movement);
    }
    if let Some(done) = current {
        runs.push((done, exact(&mut run)));
    }
    out.by_account = by_account(runs);
    Some(out)
}

/// The movements of `run` in a list of exactly their length (most accounts
/// have a few: no room is kept for more), emptying `run` for the next.
fn exact(run: &mut Vec<Movement>) -> Vec<Movement> {
    let mut list = Vec::with_capacity(run.len());
    list.append(run);
    list
}

/// Runs of rows, each of one account in sheet order, as the map by account:
/// an account's runs joined in sheet order.
///
/// The map is built at once from the runs in id order (already so when the
/// sheet is sorted by account), which fills its nodes; a map grown one id at
/// a time in that order leaves them about half empty, some fifty megabytes
/// at a million accounts.
fn by_account(mut runs: Vec<(String, Vec<Movement>)>) -> BTreeMap<String, Vec<Movement>> {
    // Stable: an account's runs stay in sheet order.
    runs.sort_by(|a, b| a.0.cmp(&b.0));
    // A later run of an account joins the end of its first.
    runs.dedup_by(|later, first| {
        if later.0 != first.0 {
            return false;
        }
        first.1.reserve_exact(later.1.len());
        first.1.append(&mut later.1);
        true
    });
    runs.into_iter().collect()
}
