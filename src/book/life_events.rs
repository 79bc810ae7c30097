//! The Accounts columns of an account's life events (behaviour.md, Account
//! life events): `close_date`, the break penalty, `after_maturity` and their
//! companions, typed into [`LifeEvents`] and checked against the account's
//! own dates and the Rates sheet.
//!
//! It never applies a term that is not used: a combination the contract
//! leaves out is a note or warning naming it, and the term is dropped.

use std::sync::Arc;

use super::rates::Rates;
use super::table::Fields;
use crate::engine::events::{
    AfterKind, AfterMaturity, BreakPenalty, LifeEvents, PenaltyKind, PenaltyLimit,
};
use crate::engine::rates::RateSchedule;
use crate::engine::AccountTerms;
use crate::problem::{FollowOn, Severity};
use crate::schema::{column, SheetKind, ACCOUNTS};

const OPEN_DATE: usize = column!(ACCOUNTS, "open_date");
const CLOSE_DATE: usize = column!(ACCOUNTS, "close_date");
const BREAK_PENALTY: usize = column!(ACCOUNTS, "break_penalty");
const BREAK_DAYS: usize = column!(ACCOUNTS, "break_days");
const BREAK_RATE_REF: usize = column!(ACCOUNTS, "break_rate_ref");
const BREAK_AMOUNT: usize = column!(ACCOUNTS, "break_amount");
const PENALTY_LIMIT: usize = column!(ACCOUNTS, "penalty_limit");
const GL_PENALTY: usize = column!(ACCOUNTS, "gl_penalty");
const AFTER_MATURITY: usize = column!(ACCOUNTS, "after_maturity");
const MATURED_RATE_REF: usize = column!(ACCOUNTS, "matured_rate_ref");
const ROLLOVER_MONTHS: usize = column!(ACCOUNTS, "rollover_months");
const ROLLOVER_RATE_REF: usize = column!(ACCOUNTS, "rollover_rate_ref");

/// The most days of simple interest a `days` penalty may charge.
const MAX_BREAK_DAYS: u32 = 3650;

/// The longest rollover term, in months.
const MAX_ROLLOVER_MONTHS: u32 = 120;

/// The life-event columns of one row, read and checked against `terms`
/// (already read) and the book's `rates`. An error marks the row failed.
pub(crate) fn read(
    f: &mut Fields<'_, '_, '_>,
    terms: &AccountTerms,
    rate_ref: &str,
    rates: &Rates,
) -> LifeEvents {
    let close_date = f.date(CLOSE_DATE);
    let kind = f.named(BREAK_PENALTY, PenaltyKind::parse);
    let break_days = f.whole(BREAK_DAYS, 1, MAX_BREAK_DAYS);
    let break_rate_ref = f.text(BREAK_RATE_REF);
    let break_amount = f.decimal(BREAK_AMOUNT);
    let penalty_limit = f
        .named(PENALTY_LIMIT, PenaltyLimit::parse)
        .unwrap_or_default();
    let gl_penalty = f.text(GL_PENALTY);
    let after = f.named(AFTER_MATURITY, AfterKind::parse);
    let matured_rate_ref = f.text(MATURED_RATE_REF);
    let rollover_months = f.whole(ROLLOVER_MONTHS, 1, MAX_ROLLOVER_MONTHS);
    let rollover_rate_ref = f.text(ROLLOVER_RATE_REF);

    let open_cell = f.cell_ref(OPEN_DATE);
    if let Some(x) = close_date {
        if x <= terms.open_date {
            f.report(
                Severity::Error,
                CLOSE_DATE,
                &x.to_string(),
                &format!("a close_date after the open_date {} ({open_cell})", terms.open_date),
                "the account earns until the night before its close_date: correct the close_date or the open_date",
            );
        }
    }

    let break_penalty = match kind.unwrap_or(PenaltyKind::None) {
        PenaltyKind::None => BreakPenalty::None,
        PenaltyKind::Days => match break_days {
            Some(n) => BreakPenalty::Days(n),
            None => missing(
                f,
                "days",
                "break_days",
                "the number of days' simple interest charged (1 to 3650)",
            ),
        },
        PenaltyKind::Amount => match break_amount {
            Some(a) if a.is_sign_negative() && !a.is_zero() => {
                f.report(
                    Severity::Error,
                    BREAK_AMOUNT,
                    &a.to_string(),
                    "a break_amount of 0 or more",
                    "write the penalty as a positive amount: the customer pays it",
                );
                BreakPenalty::None
            }
            Some(a) => BreakPenalty::Amount(a),
            None => missing(f, "amount", "break_amount", "the fixed penalty"),
        },
        PenaltyKind::Rate => match break_rate_ref {
            Some(r) => match schedule(f, BREAK_RATE_REF, &r, rates) {
                Some(s) => BreakPenalty::Rate(r, s),
                None => BreakPenalty::None,
            },
            None => missing(
                f,
                "rate",
                "break_rate_ref",
                "the Rates schedule the term is re-priced at",
            ),
        },
    };

    if break_penalty != BreakPenalty::None {
        let unused = match (terms.maturity, close_date) {
            (None, _) => Some("the account has no maturity".to_string()),
            (Some(m), Some(x)) if x >= m => Some(format!(
                "the close_date {x} is on or after the maturity {m}"
            )),
            _ => None,
        };
        if let Some(why) = unused {
            let shown = f.raw(BREAK_PENALTY).map(|c| c.shown()).unwrap_or_default();
            f.report(
                Severity::Note,
                BREAK_PENALTY,
                &shown,
                "a break penalty on a close before maturity",
                &format!("{why}, so no penalty is charged: clear break_penalty if that is meant"),
            );
        }
    }

    let after_maturity = match after.unwrap_or(AfterKind::None) {
        AfterKind::None => AfterMaturity::None,
        _ if terms.maturity.is_none() => {
            let shown = f.raw(AFTER_MATURITY).map(|c| c.shown()).unwrap_or_default();
            f.report(
                Severity::Warning,
                AFTER_MATURITY,
                &shown,
                "a maturity for after_maturity rate or rollover",
                "the account has no maturity, so after_maturity is not used: fill in maturity, or clear after_maturity",
            );
            AfterMaturity::None
        }
        AfterKind::Rate => match matured_rate_ref {
            Some(r) => match schedule(f, MATURED_RATE_REF, &r, rates) {
                Some(s) => AfterMaturity::Rate(r, s),
                None => AfterMaturity::None,
            },
            None => missing_after(
                f,
                "rate",
                "matured_rate_ref",
                "the Rates schedule a matured balance earns",
            ),
        },
        AfterKind::Rollover => match rollover_months {
            Some(months) => {
                let r = rollover_rate_ref.unwrap_or_else(|| rate_ref.to_string());
                let col = if f.given(ROLLOVER_RATE_REF) {
                    ROLLOVER_RATE_REF
                } else {
                    AFTER_MATURITY
                };
                match schedule(f, col, &r, rates) {
                    Some(s) => AfterMaturity::Rollover {
                        months,
                        rate_ref: r,
                        rates: s,
                    },
                    None => AfterMaturity::None,
                }
            }
            None => missing_after(
                f,
                "rollover",
                "rollover_months",
                "the months of each new term (1 to 120)",
            ),
        },
    };
    LifeEvents {
        close_date,
        break_penalty,
        penalty_limit,
        gl_penalty,
        after_maturity,
    }
}

/// A `break_penalty` kind without its companion column: an error.
fn missing(f: &mut Fields<'_, '_, '_>, kind: &str, column: &str, what: &str) -> BreakPenalty {
    f.report(
        Severity::Error,
        BREAK_PENALTY,
        kind,
        &format!("{column} with break_penalty {kind}: {what}"),
        &format!("fill in {column}, or choose another break_penalty"),
    );
    BreakPenalty::None
}

/// An `after_maturity` kind without its companion column: an error.
fn missing_after(
    f: &mut Fields<'_, '_, '_>,
    kind: &str,
    column: &str,
    what: &str,
) -> AfterMaturity {
    f.report(
        Severity::Error,
        AFTER_MATURITY,
        kind,
        &format!("{column} with after_maturity {kind}: {what}"),
        &format!("fill in {column}, or choose another after_maturity"),
    );
    AfterMaturity::None
}

/// The fixed schedule `name` of the Rates sheet; an error naming the column when
/// it does not exist, is broken or gives index rates.
fn schedule(
    f: &mut Fields<'_, '_, '_>,
    col: usize,
    name: &str,
    rates: &Rates,
) -> Option<Arc<RateSchedule>> {
    let which = ACCOUNTS.columns.get(col).map_or("", |c| c.name);
    if let Some(cell) = rates.broken.get(name) {
        f.report(
            Severity::Error,
            col,
            name,
            &format!("a rate schedule without errors (see Rates!{cell})"),
            "correct the schedule's rows in the Rates sheet",
        );
        return None;
    }
    if rates.floating.contains_key(name) {
        f.report(
            Severity::Error,
            col,
            name,
            &format!("a Rates schedule of fixed rates for {which}"),
            "life events re-price or earn at fixed rates: name a schedule of rate_percent or rate_decimal rows",
        );
        return None;
    }
    match rates.schedules.get(name) {
        Some(s) => Some(Arc::new(s.clone())),
        None => {
            let fix = if rates.sheet.is_none() {
                format!("add a Rates sheet with rows for {name}")
            } else {
                format!("add rows for {name} to the Rates sheet, or correct {which}")
            };
            f.report(
                Severity::Error,
                col,
                name,
                &format!("a schedule of the Rates sheet for {which}"),
                &fix,
            );
            if !rates.read {
                // The Rates sheet's own problem is the one to fix.
                let label = SheetKind::Rates.label();
                f.follows(|book| match &rates.sheet {
                    Some(sheet) => FollowOn::unreadable_sheet(book, label, sheet),
                    None => FollowOn::missing_sheet(book, label),
                });
            }
            None
        }
    }
}
