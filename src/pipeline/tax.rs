//! Withholding tax in an account's reconciliation (behaviour.md, Withholding
//! tax): the likely cause of a statement amount that is the net of the tax,
//! and a warning for each statement period whose `tax_withheld` is not the
//! tax due. It only reads the run and the statement rows; it never changes
//! a figure or a status.

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::book::StatementRow;
use crate::engine::causes::LikelyCause;
use crate::engine::reconcile::Reconciled;
use crate::engine::tax::{net_posting_cause, stated_tax_cause, withhold};
use crate::engine::{AccountResult, AccountTerms};
use crate::problem::{Problem, Severity};
use crate::report::model::TaxCheck;

/// The payment date of the engine's posting for the period `start..=end`.
fn payment_of(result: &AccountResult, start: NaiveDate, end: NaiveDate) -> Option<NaiveDate> {
    result
        .postings
        .iter()
        .find(|p| p.end == end && p.start <= start)
        .or_else(|| result.postings.iter().find(|p| p.end == end))
        .map(|p| p.payment)
}

/// The likely cause of an over- or under-posted row of a taxed account when
/// its posted amount is the expected gross less the tax (at the rate in force
/// or another of the tax_ref): it reproduces the amount exactly, so it stands
/// instead of the cause search.
pub(super) fn net_cause(
    t: &AccountTerms,
    result: &AccountResult,
    row: &Reconciled,
) -> Option<LikelyCause> {
    let tax = t.tax.as_ref()?;
    let payment = payment_of(result, row.start, row.end)?;
    let words = net_posting_cause(
        &tax.schedule,
        row.expected,
        row.posted,
        payment,
        t.minor_units,
    )?;
    Some(LikelyCause {
        basis: t.basis,
        found: Vec::new(),
        implied: Some(words),
    })
}

/// One warning per statement period of a taxed account whose rows give a
/// `tax_withheld` other than the tax due on the period's posted gross.
pub(super) fn stated_tax_warnings(
    t: &AccountTerms,
    result: &AccountResult,
    statements: &[&StatementRow],
    cutoff: NaiveDate,
) -> Vec<Problem> {
    let Some(tax) = t.tax.as_ref() else {
        return Vec::new();
    };
    // Per period: posted gross, tax stated (when any row gives it), first row.
    let mut periods: BTreeMap<(NaiveDate, NaiveDate), (Decimal, Option<Decimal>, &StatementRow)> =
        BTreeMap::new();
    for &s in statements.iter().filter(|s| s.period_end <= cutoff) {
        let e = periods
            .entry((s.period_start, s.period_end))
            .or_insert((Decimal::ZERO, None, s));
        e.0 += s.posted;
        if let Some(w) = s.tax_withheld {
            e.1 = Some(e.1.unwrap_or_default() + w);
        }
    }
    let mut out = Vec::new();
    for ((start, end), (gross, stated, row)) in periods {
        let Some(stated) = stated else { continue };
        let Some(payment) = payment_of(result, start, end) else {
            continue;
        };
        let Some(cause) = stated_tax_cause(&tax.schedule, gross, stated, payment, t.minor_units)
        else {
            continue;
        };
        out.push(Problem {
            severity: Severity::Warning,
            position: row.position.to_position(),
            account: Some(t.id.clone()),
            found: format!("tax_withheld {stated} for {start}..{end}: {cause}"),
            expected: format!(
                "the {} tax due on the posted gross {gross}, paid {payment}",
                tax.schedule.tax_ref
            ),
            fix: "check the statement's tax against the Tax sheet's table in force on the payment date; the gross reconciles on its own".to_string(),
            follows: None,
        });
    }
    out
}

/// A statement period's tax: the tax due on its expected gross, and the tax
/// its rows show when any row gives `tax_withheld`, with the difference.
/// `None` for an account without tax, or a period no posting ends with.
pub(super) fn check(
    t: &AccountTerms,
    result: &AccountResult,
    statements: &[&StatementRow],
    row: &Reconciled,
) -> Option<TaxCheck> {
    let tax = t.tax.as_ref()?;
    let payment = payment_of(result, row.start, row.end)?;
    let expected = withhold(&tax.schedule, row.expected, payment, t.minor_units)
        .ok()?
        .tax;
    let posted = statements
        .iter()
        .filter(|s| (s.period_start, s.period_end) == (row.start, row.end))
        .filter_map(|s| s.tax_withheld)
        .fold(None, |sum: Option<Decimal>, w| {
            Some(sum.unwrap_or_default() + w)
        });
    Some(TaxCheck {
        expected,
        posted,
        variance: posted.map(|p| p - expected),
    })
}
