//! The Rates sheet: rate schedules by `rate_ref`, each a list of complete
//! tables by effective date, with tiers.
//!
//! A rate in `rate_percent` is divided by 100 exactly (a shift of the
//! decimal point, never a rounding). A schedule with a bad row, or one that
//! names an index (a floating rate, not supported yet), is kept out of the
//! book; the accounts that use it get an error. Nothing here decides which
//! table applies on a day; that is the engine's.

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::model::{Problem, Severity};
use super::source::Sheet;
use super::table::{optional, required, Column, Ctx, Fields, Table};
use crate::engine::rates::RateSchedule;

const COLUMNS: &[Column] = &[
    required("rate_ref"),
    required("effective"),
    optional("rate_percent"),
    optional("rate_decimal"),
    optional("tier_from"),
    optional("index"),
    optional("spread_bp"),
    optional("floor_percent"),
    optional("cap_percent"),
];
const RATE_REF: usize = 0;
const EFFECTIVE: usize = 1;
const PERCENT: usize = 2;
const DECIMAL: usize = 3;
const TIER_FROM: usize = 4;
const INDEX: usize = 5;
/// Floating-rate columns: index, spread_bp, floor_percent, cap_percent.
const FLOATING: [usize; 4] = [INDEX, 6, 7, 8];

/// A percent column whose every value is below this (in size) may hold decimals.
const PERCENT_LOOKS_DECIMAL: Decimal = Decimal::from_parts(2, 0, 0, false, 1);

/// What the Rates sheet gives the accounts.
#[derive(Debug, Default)]
pub(crate) struct Rates {
    /// Usable schedules.
    pub schedules: BTreeMap<String, RateSchedule>,
    /// The first effective date of each usable schedule and its cell.
    pub first: BTreeMap<String, (NaiveDate, String)>,
    /// Schedules with a bad row: the cell of the first one.
    pub broken: BTreeMap<String, String>,
    /// Schedules that name an index: what was found and where.
    pub floating: BTreeMap<String, (String, String)>,
    /// Whether the sheet was read as a table.
    pub read: bool,
}

/// One good row, kept for the tier checks.
struct RateRow {
    effective: NaiveDate,
    rate: Decimal,
    tier_from: Decimal,
    tier_cell: String,
    effective_cell: String,
}

/// Reads the Rates sheet.
pub(crate) fn read(ctx: Ctx<'_>, sheet: &Sheet, problems: &mut Vec<Problem>) -> Rates {
    let mut out = Rates::default();
    let Some(table) = Table::open(&ctx, sheet, COLUMNS, problems) else {
        return out;
    };
    if !table.has(PERCENT) && !table.has(DECIMAL) && !table.has(INDEX) {
        problems.push(ctx.problem(
            Severity::Error,
            &sheet.name,
            table.header_row_ref(),
            None,
            "no rate column",
            "a column named rate_percent (4.25 means 4.25%) or rate_decimal (0.0425)",
            "add a rate_percent or rate_decimal column to the header row",
        ));
        return out;
    }
    out.read = true;
    let mut rows: BTreeMap<String, Vec<RateRow>> = BTreeMap::new();
    let mut percents: Vec<Decimal> = Vec::new();
    let mut decimals: Vec<Decimal> = Vec::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some(rate_ref) = f.required_text(RATE_REF) else {
            continue;
        };
        let effective = f.required_date(EFFECTIVE);
        if let Some(&col) = FLOATING.iter().find(|&&i| f.given(i)) {
            let found = format!(
                "{} {}",
                table.name(col),
                f.raw(col).map(|c| c.shown()).unwrap_or_default()
            );
            out.floating
                .entry(rate_ref)
                .or_insert((found, f.cell_ref(col)));
            continue;
        }
        let percent = f.decimal(PERCENT);
        let decimal = f.decimal(DECIMAL);
        let rate = match (percent, decimal, f.given(PERCENT), f.given(DECIMAL)) {
            (_, _, true, true) => {
                f.report(
                    Severity::Error,
                    DECIMAL,
                    &format!(
                        "{} and {}",
                        f.raw(PERCENT).map(|c| c.shown()).unwrap_or_default(),
                        f.raw(DECIMAL).map(|c| c.shown()).unwrap_or_default()
                    ),
                    "one rate per row, in rate_percent or in rate_decimal",
                    "clear one of the two cells",
                );
                None
            }
            (Some(p), _, _, _) => {
                percents.push(p);
                percent_to_decimal(p).or_else(|| {
                    f.report(
                        Severity::Error,
                        PERCENT,
                        &p.to_string(),
                        "a percent rate with at most 26 decimal places",
                        "shorten the rate",
                    );
                    None
                })
            }
            (_, Some(d), _, _) => {
                decimals.push(d);
                Some(d)
            }
            (None, None, false, false) => {
                f.report(
                    Severity::Error,
                    PERCENT,
                    "",
                    "a rate in rate_percent or rate_decimal",
                    "fill in the row's rate",
                );
                None
            }
            _ => None,
        };
        let tier_from = f.decimal(TIER_FROM).unwrap_or(Decimal::ZERO);
        if tier_from.is_sign_negative() && !tier_from.is_zero() {
            f.report(
                Severity::Error,
                TIER_FROM,
                &tier_from.to_string(),
                "a tier threshold of zero or more",
                "tiers apply to the size of the base: write the threshold as a positive amount",
            );
        }
        if f.failed {
            out.broken
                .entry(rate_ref)
                .or_insert_with(|| f.cell_ref(RATE_REF));
            continue;
        }
        if let (Some(effective), Some(rate)) = (effective, rate) {
            rows.entry(rate_ref).or_default().push(RateRow {
                effective,
                rate,
                tier_from,
                tier_cell: f.cell_ref(TIER_FROM),
                effective_cell: f.cell_ref(EFFECTIVE),
            });
        }
    }
    unit_warnings(ctx, &table, &percents, &decimals, problems);
    for (rate_ref, rows) in rows {
        if out.floating.contains_key(&rate_ref) {
            continue;
        }
        if let Some(cell) = check_tiers(ctx, &sheet.name, &rate_ref, &rows, problems) {
            out.broken.entry(rate_ref).or_insert(cell);
            continue;
        }
        if out.broken.contains_key(&rate_ref) {
            continue;
        }
        if let Some(first) = rows.iter().min_by_key(|r| r.effective) {
            out.first.insert(
                rate_ref.clone(),
                (first.effective, first.effective_cell.clone()),
            );
        }
        let schedule =
            RateSchedule::from_rows(rows.iter().map(|r| (r.effective, r.rate, r.tier_from)));
        out.schedules.insert(rate_ref, schedule);
    }
    out
}

/// 4.25 (percent) as 0.0425: the decimal point moves two places, exactly.
fn percent_to_decimal(p: Decimal) -> Option<Decimal> {
    let mut d = p;
    d.set_scale(p.scale().checked_add(2)?).ok()?;
    Some(d)
}

/// Tiers of one table must rise in sheet order. Returns the cell of the
/// first bad row, after reporting each.
fn check_tiers(
    ctx: Ctx<'_>,
    sheet: &str,
    rate_ref: &str,
    rows: &[RateRow],
    problems: &mut Vec<Problem>,
) -> Option<String> {
    let mut last: BTreeMap<NaiveDate, (Decimal, &str)> = BTreeMap::new();
    let mut first_bad = None;
    for r in rows {
        if let Some((prev, prev_cell)) = last.get(&r.effective).copied() {
            let what = if r.tier_from == prev {
                "duplicated"
            } else {
                "out of order"
            };
            if r.tier_from <= prev {
                problems.push(ctx.problem(
                    Severity::Error,
                    sheet,
                    r.tier_cell.clone(),
                    None,
                    &r.tier_from.to_string(),
                    &format!(
                        "tier thresholds of {rate_ref} from {} rising, each once (the row above has {prev} in {prev_cell})",
                        r.effective
                    ),
                    &format!("the tier threshold is {what}: list the tiers of one table from the lowest threshold up, each once"),
                ));
                first_bad.get_or_insert_with(|| r.tier_cell.clone());
                continue;
            }
        }
        last.insert(r.effective, (r.tier_from, r.tier_cell.as_str()));
    }
    first_bad
}

/// A percent column that only holds tiny values probably holds decimals,
/// and a decimal column with values of 1 or more probably holds percents.
fn unit_warnings(
    ctx: Ctx<'_>,
    table: &Table<'_>,
    percents: &[Decimal],
    decimals: &[Decimal],
    problems: &mut Vec<Problem>,
) {
    let range = |v: &[Decimal]| {
        let lo = v.iter().min().copied().unwrap_or_default();
        let hi = v.iter().max().copied().unwrap_or_default();
        format!("values from {lo} to {hi}")
    };
    if percents.iter().any(|p| !p.is_zero())
        && percents.iter().all(|p| p.abs() < PERCENT_LOOKS_DECIMAL)
    {
        problems.push(ctx.problem(
            Severity::Warning,
            &table.sheet.name,
            table.header_cell(PERCENT),
            None,
            &range(percents),
            "annual rates in percent (4.25 means 4.25%)",
            "every rate is below 0.2%: if 0.0425 means 4.25%, rename the column to rate_decimal",
        ));
    }
    if decimals.iter().any(|d| d.abs() >= Decimal::ONE) {
        problems.push(ctx.problem(
            Severity::Warning,
            &table.sheet.name,
            table.header_cell(DECIMAL),
            None,
            &range(decimals),
            "annual rates as decimals (0.0425 means 4.25%)",
            "a rate of 1 or more is 100% or more: if 4.25 means 4.25%, rename the column to rate_percent",
        ));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::book::cell::NumberStyle;
    use crate::book::source::{text_sheet, SheetKind};

    fn ctx() -> Ctx<'static> {
        Ctx {
            book: "book.xlsx",
            style: NumberStyle {
                decimal_comma: false,
            },
        }
    }

    #[test]
    fn a_rates_sheet_needs_a_rate_column() {
        let sheet = text_sheet(
            SheetKind::Rates,
            &[&["rate_ref", "effective"], &["STD", "2026-01-01"]],
        );
        let mut problems = Vec::new();
        let rates = read(ctx(), &sheet, &mut problems);
        assert!(!rates.read && rates.schedules.is_empty());
        assert_eq!(problems.len(), 1);
        assert_eq!(problems[0].position.cell, "1:1");
        assert!(problems[0].expected.contains("rate_percent"));
    }

    #[test]
    fn a_row_with_both_units_or_no_rate_spoils_its_schedule() {
        let sheet = text_sheet(
            SheetKind::Rates,
            &[
                &["rate_ref", "effective", "rate_percent", "rate_decimal"],
                &["BOTH", "2026-01-01", "2.5", "0.025"],
                &["NONE", "2026-01-01", "", ""],
                &["GOOD", "2026-01-01", "", "0.025"],
            ],
        );
        let mut problems = Vec::new();
        let rates = read(ctx(), &sheet, &mut problems);
        assert_eq!(rates.broken.get("BOTH").map(String::as_str), Some("A2"));
        assert_eq!(rates.broken.get("NONE").map(String::as_str), Some("A3"));
        assert_eq!(rates.schedules.keys().collect::<Vec<_>>(), ["GOOD"]);
        let cells: Vec<&str> = problems.iter().map(|p| p.position.cell.as_str()).collect();
        assert_eq!(cells, ["D2", "C3"]);
    }

    #[test]
    fn a_decimal_column_holding_percents_is_a_warning() {
        let sheet = text_sheet(
            SheetKind::Rates,
            &[
                &["rate_ref", "effective", "rate_decimal"],
                &["STD", "2026-01-01", "4.25"],
            ],
        );
        let mut problems = Vec::new();
        let rates = read(ctx(), &sheet, &mut problems);
        assert_eq!(rates.schedules.len(), 1);
        assert_eq!(problems.len(), 1);
        assert_eq!(
            (problems[0].severity, problems[0].position.cell.as_str()),
            (Severity::Warning, "C1")
        );
        assert!(problems[0].fix.contains("rate_percent"));
    }

    #[test]
    fn a_percent_becomes_a_decimal_exactly() {
        let p: Decimal = "4.25".parse().unwrap();
        assert_eq!(percent_to_decimal(p).unwrap().to_string(), "0.0425");
        let p: Decimal = "-0.5".parse().unwrap();
        assert_eq!(percent_to_decimal(p).unwrap().to_string(), "-0.005");
        let p: Decimal = "3".parse().unwrap();
        assert_eq!(percent_to_decimal(p).unwrap().to_string(), "0.03");
    }

    #[test]
    fn the_decimal_threshold_is_point_two() {
        assert_eq!(PERCENT_LOOKS_DECIMAL.to_string(), "0.2");
    }
}
