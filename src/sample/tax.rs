//! Withholding tax in a sample book (behaviour.md, Withholding tax): the Tax
//! sheet's three tax_refs, which accounts name them, and the statements
//! planted net of tax under `statement_amounts` gross.
//!
//! Savings tax at 20% that rose to 22% in the window (savers), an exemption
//! at 0% (savers), and a treaty rate of 15% on interest from the group's
//! asset-side intercompany loans. Drawn from the account's own stream after
//! everything else, so that the accounts without tax stay as they were. The
//! tax itself is the engine's figure ([`withhold`]); this module never
//! rounds a tax of its own, runs an account or writes a file.

use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::date;
use super::plant::Mistake;
use super::rng::Rng;
use crate::conventions::rounding::RoundMode;
use crate::engine::run::PostingRow;
use crate::engine::tax::{withhold, TaxSchedule, TaxTable, TaxTerms};
use crate::engine::EngineError;
use crate::report::book_writer::Value;

/// How many savers in a thousand have tax withheld (savers are about 29%
/// of a book: about 3 accounts in 100).
pub const TAXED_SAVERS_PER_MILLE: u64 = 100;

/// How many asset-side intercompany loans in a thousand name the treaty
/// rate (about 1 account in 100 of a book).
pub const TREATY_LOANS_PER_MILLE: u64 = 500;

/// How many statement rows of taxed accounts in a thousand are posted net
/// of tax (the statements are gross).
pub const NET_POSTINGS_PER_MILLE: u64 = 80;

/// The Tax sheet: tax_ref, effective, rate in percent, rounding mode
/// (`None`: blank, half-up).
const TAX_ROWS: [(&str, NaiveDate, i64, Option<RoundMode>); 4] = [
    ("SAVINGS-TAX", date(2025, 4, 6), 20, None),
    ("SAVINGS-TAX", date(2026, 11, 16), 22, None),
    ("TAX-EXEMPT", date(2020, 1, 1), 0, None),
    ("TREATY-15", date(2024, 1, 1), 15, Some(RoundMode::Down)),
];

/// Which of the book's tax_refs an account may name.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Taxable {
    /// A saver: savings tax, or now and then the exemption.
    Saver,
    /// A loan to a group company: the treaty rate.
    Treaty,
}

/// The tax schedules of the Tax sheet, shared by the accounts naming them.
#[derive(Debug, Clone)]
pub(crate) struct Taxes {
    savings: Arc<TaxSchedule>,
    exempt: Arc<TaxSchedule>,
    treaty: Arc<TaxSchedule>,
}

fn schedule(tax_ref: &str) -> Arc<TaxSchedule> {
    Arc::new(TaxSchedule::new(
        tax_ref,
        TAX_ROWS
            .iter()
            .filter(|(r, ..)| *r == tax_ref)
            .map(|(_, effective, percent, mode)| TaxTable {
                effective: *effective,
                rate: Decimal::new(*percent, 2),
                round_mode: mode.unwrap_or(RoundMode::HalfUp),
            }),
    ))
}

impl Taxes {
    pub(crate) fn new() -> Taxes {
        Taxes {
            savings: schedule("SAVINGS-TAX"),
            exempt: schedule("TAX-EXEMPT"),
            treaty: schedule("TREATY-15"),
        }
    }

    /// The Tax sheet's rows.
    pub(crate) fn rows() -> Vec<Vec<Value>> {
        TAX_ROWS
            .iter()
            .map(|(tax_ref, effective, percent, mode)| {
                vec![
                    Value::Text((*tax_ref).to_string()),
                    Value::Date(*effective),
                    Value::Number(Decimal::from(*percent)),
                    mode.map_or(Value::Empty, |m| Value::Text(m.name().to_string())),
                ]
            })
            .collect()
    }

    /// The tax of an account that may be taxed, some of the time.
    pub(crate) fn draw(&self, r: &mut Rng, taxable: Taxable) -> Option<TaxTerms> {
        let schedule = match taxable {
            Taxable::Saver if r.chance(TAXED_SAVERS_PER_MILLE) => {
                if r.chance(200) {
                    &self.exempt
                } else {
                    &self.savings
                }
            }
            Taxable::Treaty if r.chance(TREATY_LOANS_PER_MILLE) => &self.treaty,
            _ => return None,
        };
        Some(TaxTerms {
            schedule: Arc::clone(schedule),
        })
    }
}

/// The statement amount of `posting` posted net of tax: the tax in force
/// on its payment date, or with `earlier` the tax of the schedule's first
/// table (a rate no longer in force). `None` when that tax is under three
/// minor units, or no other table's tax differs from the one in force:
/// nothing is planted.
///
/// # Errors
/// An [`EngineError`] when no table is in force.
pub(crate) fn posted_net(
    tax: &TaxTerms,
    posting: &PostingRow,
    minor_units: u32,
    earlier: bool,
) -> Result<Option<(Mistake, Decimal)>, EngineError> {
    let gross = posting.expected;
    let due = withhold(&tax.schedule, gross, posting.payment, minor_units)?;
    let first = tax.schedule.tables().first().map(|t| t.effective);
    let used = match first {
        Some(day) if earlier => withhold(&tax.schedule, gross, day, minor_units)?,
        _ => due,
    };
    if used.tax < Decimal::new(3, minor_units) || (earlier && used.tax == due.tax) {
        return Ok(None);
    }
    let percent = (used.rate * Decimal::ONE_HUNDRED).normalize();
    Ok(Some((
        Mistake::PostedNetOfTax {
            percent,
            tax: used.tax,
        },
        gross - used.tax,
    )))
}
