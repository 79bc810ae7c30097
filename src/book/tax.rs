//! The Tax sheet: withholding tax tables by `tax_ref`, one row per table
//! (behaviour.md, Withholding tax).
//!
//! A rate in `rate_percent` is divided by 100 exactly. A schedule with a bad
//! row (a rate outside 0..100, two tables on one date, a cell that cannot be
//! read) is kept out of the book; the accounts that name it get an error.
//! Tax tables are not filtered by a knowledge date: a table is the law in
//! force, known from its effective date. Nothing here decides which table
//! applies to a posting (the engine's), and no missing table ever stands
//! for a zero rate.

use std::collections::{BTreeMap, HashMap};
use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::rates::percent_to_decimal;
use super::sheet::Sheet;
use super::table::{Ctx, Fields, Table};
use crate::conventions::rounding::RoundMode;
use crate::engine::tax::{TaxSchedule, TaxTable};
use crate::problem::{Problem, Severity};
use crate::schema::{column, TAX};

const TAX_REF: usize = column!(TAX, "tax_ref");
const EFFECTIVE: usize = column!(TAX, "effective");
const RATE_PERCENT: usize = column!(TAX, "rate_percent");
const ROUND_MODE: usize = column!(TAX, "round_mode");

/// What the Tax sheet gives the accounts.
#[derive(Debug, Default)]
pub(crate) struct Taxes {
    /// Usable schedules.
    pub schedules: BTreeMap<String, Arc<TaxSchedule>>,
    /// Schedules with a bad row: the cell of the first one.
    pub broken: BTreeMap<String, String>,
    /// Whether the book has a Tax sheet read as a table.
    pub read: bool,
}

/// Reads the Tax sheet.
pub(crate) fn read(ctx: Ctx<'_>, sheet: &Sheet, problems: &mut Vec<Problem>) -> Taxes {
    let mut out = Taxes::default();
    let Some(table) = Table::open(&ctx, sheet, TAX.columns, problems) else {
        return out;
    };
    out.read = true;
    let mut tables: BTreeMap<String, Vec<TaxTable>> = BTreeMap::new();
    // The row of each tax_ref and date so far.
    let mut seen: HashMap<(String, NaiveDate), u32> = HashMap::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some(tax_ref) = f.required_text(TAX_REF) else {
            continue;
        };
        let effective = f.required_date(EFFECTIVE);
        let percent = f.required_decimal(RATE_PERCENT);
        let round_mode = f.named(ROUND_MODE, RoundMode::parse).unwrap_or_default();
        let rate = percent.and_then(|p| rate_of(&mut f, p));
        let (Some(effective), Some(rate), false) = (effective, rate, f.failed) else {
            out.broken
                .entry(tax_ref)
                .or_insert_with(|| f.cell_ref(TAX_REF));
            continue;
        };
        if let Some(first) = seen.get(&(tax_ref.clone(), effective)) {
            let first = table.cell_ref(*first, EFFECTIVE);
            f.report(
                Severity::Error,
                EFFECTIVE,
                &effective.to_string(),
                &format!("one Tax row for {tax_ref} effective {effective} (it is already in {first})"),
                "remove one of the two rows: a tax table is one rate from its effective date; the accounts that name the tax_ref are not computed until then",
            );
            out.broken
                .entry(tax_ref)
                .or_insert_with(|| f.cell_ref(EFFECTIVE));
            continue;
        }
        seen.insert((tax_ref.clone(), effective), rec.row);
        tables.entry(tax_ref).or_default().push(TaxTable {
            effective,
            rate,
            round_mode,
        });
    }
    for (tax_ref, rows) in tables {
        if out.broken.contains_key(&tax_ref) {
            continue;
        }
        out.schedules
            .insert(tax_ref.clone(), Arc::new(TaxSchedule::new(&tax_ref, rows)));
    }
    out
}

/// A `rate_percent` of 0 to 100 as a fraction, exactly; else an error on the cell.
fn rate_of(f: &mut Fields<'_, '_, '_>, percent: Decimal) -> Option<Decimal> {
    let in_range = percent >= Decimal::ZERO && percent <= Decimal::ONE_HUNDRED;
    let rate = percent_to_decimal(percent).filter(|_| in_range);
    if rate.is_none() {
        f.report(
            Severity::Error,
            RATE_PERCENT,
            &percent.to_string(),
            "a tax rate_percent from 0 to 100 (20 means 20% of the gross interest; 0 is an exemption)",
            "correct the rate; the accounts that name this tax_ref are not computed until then",
        );
    }
    rate
}
