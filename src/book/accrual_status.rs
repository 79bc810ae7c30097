//! The Accrual status sheet: from which day an asset account is accruing,
//! on non-accrual or credit-impaired (behaviour.md, Non-accrual and
//! interest in suspense), with the billed and unpaid interest reversed on
//! an entry into non-accrual, the loss allowance of a credit-impaired loan
//! and whether interest received on non-accrual is income.
//!
//! A row naming an account the Accounts sheet does not have is an error on
//! the row and left out. A row with a bad cell, a row of a liability
//! account, a second row for one account and day, a negative allowance or
//! unpaid interest, or an allowance on a status other than credit-impaired
//! keeps its account out: its income would otherwise rest on a guess.
//! Unpaid interest on a status other than non-accrual is a warning and not
//! used. It never changes an amount and never reads another sheet's rows.

use std::collections::{BTreeMap, HashMap};

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::accounts::Known;
use super::sheet::Sheet;
use super::table::{Ctx, Fields, Table};
use crate::engine::suspense::{AccrualStatus, StatusRow};
use crate::engine::Side;
use crate::problem::{Problem, Severity};
use crate::schema::{column, ACCRUAL_STATUS};

const ACCOUNT: usize = column!(ACCRUAL_STATUS, "account");
const FROM: usize = column!(ACCRUAL_STATUS, "from");
const STATUS: usize = column!(ACCRUAL_STATUS, "status");
const UNPAID_INTEREST: usize = column!(ACCRUAL_STATUS, "unpaid_interest");
const ALLOWANCE: usize = column!(ACCRUAL_STATUS, "allowance");
const CASH_BASIS: usize = column!(ACCRUAL_STATUS, "cash_basis");

/// What the Accrual status sheet gives.
#[derive(Debug, Default)]
pub(crate) struct Statuses {
    /// Good rows by account, in date order (one per day).
    pub by_account: BTreeMap<String, Vec<StatusRow>>,
    /// Accounts with a bad row.
    pub spoiled: Vec<String>,
}

/// Reads the Accrual status sheet; `None` when the sheet cannot be read as
/// a table.
pub(crate) fn read(
    ctx: Ctx<'_>,
    sheet: &Sheet,
    accounts: &Known,
    problems: &mut Vec<Problem>,
) -> Option<Statuses> {
    let table = Table::open(&ctx, sheet, ACCRUAL_STATUS.columns, problems)?;
    let mut out = Statuses::default();
    out.spoiled.extend(table.skipped_accounts().iter().cloned());
    let mut seen: HashMap<(String, NaiveDate), u32> = HashMap::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some((id, life)) = accounts.of_row(&mut f, ACCOUNT) else {
            continue;
        };
        let side = life.side;
        let from = f.required_date(FROM);
        let status = f.required_named(STATUS, AccrualStatus::parse);
        let unpaid = f.decimal(UNPAID_INTEREST);
        let allowance = f.decimal(ALLOWANCE);
        let cash_basis = f.yes_no(CASH_BASIS).unwrap_or(false);
        let (Some(from), Some(status), false) = (from, status, f.failed) else {
            out.spoiled.push(id);
            continue;
        };
        let mut bad = false;
        if side == Some(Side::Liability) {
            f.report(
                Severity::Error,
                ACCOUNT,
                &id,
                "an asset account (a loan): interest in suspense is asset side only",
                "remove the row, or correct the account's side to asset on the Accounts sheet; the account is not computed until then",
            );
            bad = true;
        }
        if let Some(first) = seen.get(&(id.clone(), from)) {
            let first = table.cell_ref(*first, FROM);
            f.report(
                Severity::Error,
                FROM,
                &from.to_string(),
                &format!("one Accrual status row for {id} from {from} (it is already in {first})"),
                "remove one of the two rows: an account has one status a day; the account is not computed until then",
            );
            bad = true;
        }
        for (col, value, what) in [
            (ALLOWANCE, allowance, "allowance"),
            (UNPAID_INTEREST, unpaid, "unpaid_interest"),
        ] {
            if let Some(v) = value.filter(|v| v.is_sign_negative() && !v.is_zero()) {
                f.report(
                    Severity::Error,
                    col,
                    &v.to_string(),
                    &format!("an {what} of 0 or more"),
                    &format!("write the {what} as a positive amount; the account is not computed until then"),
                );
                bad = true;
            }
        }
        let allowance = allowance.unwrap_or(Decimal::ZERO);
        if !allowance.is_zero() && status != AccrualStatus::CreditImpaired {
            f.report(
                Severity::Error,
                ALLOWANCE,
                &allowance.to_string(),
                &format!("no allowance on a {} row (an allowance is for credit-impaired)", status.name()),
                "clear the allowance, or write credit-impaired in status; the account is not computed until then",
            );
            bad = true;
        }
        let mut unpaid = unpaid.unwrap_or(Decimal::ZERO);
        if !unpaid.is_zero() && status != AccrualStatus::NonAccrual {
            f.report(
                Severity::Warning,
                UNPAID_INTEREST,
                &unpaid.to_string(),
                &format!("no unpaid_interest on a {} row (it is reversed on an entry into non-accrual)", status.name()),
                "the amount is not used; clear it, or write non-accrual in status if the account stopped accruing",
            );
            unpaid = Decimal::ZERO;
        }
        if bad {
            out.spoiled.push(id);
            continue;
        }
        seen.insert((id.clone(), from), rec.row);
        out.by_account.entry(id).or_default().push(StatusRow {
            from,
            status,
            unpaid_interest: unpaid,
            allowance,
            cash_basis,
        });
    }
    for rows in out.by_account.values_mut() {
        rows.sort_by_key(|r| r.from);
    }
    Some(out)
}
