//! The Rates sheet: rate schedules by `rate_ref`, each a list of complete
//! tables by effective date, with tiers.
//!
//! A rate in `rate_percent` is divided by 100 exactly (a shift of the
//! decimal point, never a rounding). A row may name an `index` instead of a
//! rate (a floating rate: the index's fixing plus `spread_bp`, within
//! `floor_percent` and `cap_percent`); a schedule with such a row is a
//! floating schedule, its other rows fixed tiers of it. A schedule with a bad
//! row is kept out of the book; the accounts that use it get an error.
//! A table is booked whole: its rows share one `booked` date (blank means
//! its effective date), and rows that do not are an error on the schedule.
//! Nothing here decides which table applies on a day (the engine's), nor
//! which tables a run knows (`known`'s).

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::sheet::Sheet;
use super::table::{Ctx, Fields, Table};
use crate::engine::floating::{FloatingSchedule, IndexRate, TierRate};
use crate::engine::rates::RateSchedule;
use crate::problem::{Problem, Severity};
use crate::schema::{column, RATES};

const RATE_REF: usize = column!(RATES, "rate_ref");
const EFFECTIVE: usize = column!(RATES, "effective");
const PERCENT: usize = column!(RATES, "rate_percent");
const DECIMAL: usize = column!(RATES, "rate_decimal");
const TIER_FROM: usize = column!(RATES, "tier_from");
const INDEX: usize = column!(RATES, "index");
const SPREAD_BP: usize = column!(RATES, "spread_bp");
const FLOOR_PERCENT: usize = column!(RATES, "floor_percent");
const CAP_PERCENT: usize = column!(RATES, "cap_percent");
const BOOKED: usize = column!(RATES, "booked");

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
    /// Floating schedules (a row names an index), by rate_ref.
    pub floating: BTreeMap<String, FloatingSchedule>,
    /// The cell of the first index of each floating schedule.
    pub floating_cell: BTreeMap<String, String>,
    /// Whether the sheet was read as a table.
    pub read: bool,
    /// The name of the sheet, when the book has one.
    pub sheet: Option<String>,
    /// Per usable schedule, each table booked on another day than its
    /// effective date: (effective, booked).
    pub bookings: BTreeMap<String, Vec<(NaiveDate, NaiveDate)>>,
}

/// One good row, kept for the tier checks.
struct RateRow {
    effective: NaiveDate,
    rate: TierRate,
    tier_from: Decimal,
    tier_cell: String,
    effective_cell: String,
    /// The day the row's table was booked (its effective date when blank).
    booked: NaiveDate,
    booked_cell: String,
}

/// Reads the Rates sheet.
pub(crate) fn read(ctx: Ctx<'_>, sheet: &Sheet, problems: &mut Vec<Problem>) -> Rates {
    let mut out = Rates {
        sheet: Some(sheet.name.clone()),
        ..Rates::default()
    };
    let Some(table) = Table::open(&ctx, sheet, RATES.columns, problems) else {
        return out;
    };
    if !table.has(PERCENT) && !table.has(DECIMAL) && !table.has(INDEX) {
        problems.push(ctx.problem(
            Severity::Error,
            &sheet.name,
            table.header_row_ref(),
            None,
            "no rate column",
            "a column named rate_percent (4.25 means 4.25%), rate_decimal (0.0425) or index",
            "add a rate_percent or rate_decimal column (or an index column for floating rates) to the header row",
        ));
        return out;
    }
    out.read = true;
    let mut rows: BTreeMap<String, Vec<RateRow>> = BTreeMap::new();
    let mut percents: Vec<(Decimal, String)> = Vec::new();
    let mut decimals: Vec<Decimal> = Vec::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        read_row(
            &mut f,
            &table,
            &mut out,
            &mut rows,
            &mut percents,
            &mut decimals,
        );
    }
    unit_warnings(ctx, &table, &percents, &decimals, problems);
    for (rate_ref, rows) in rows {
        if let Some(cell) = check_tiers(ctx, &sheet.name, &rate_ref, &rows, problems) {
            out.broken.entry(rate_ref).or_insert(cell);
            continue;
        }
        if let Some(cell) = check_booked(ctx, &sheet.name, &rate_ref, &rows, problems) {
            out.broken.entry(rate_ref).or_insert(cell);
            continue;
        }
        add_schedule(&mut out, rate_ref, rows);
    }
    out
}

/// Reads one row: a good one joins its schedule's `rows`; a bad one marks
/// its schedule broken. The rates given in percent and in decimals are
/// gathered for the unit warnings.
fn read_row(
    f: &mut Fields<'_, '_, '_>,
    table: &Table<'_>,
    out: &mut Rates,
    rows: &mut BTreeMap<String, Vec<RateRow>>,
    percents: &mut Vec<(Decimal, String)>,
    decimals: &mut Vec<Decimal>,
) {
    let Some(rate_ref) = f.required_text(RATE_REF) else {
        return;
    };
    let effective = f.required_date(EFFECTIVE);
    let index = f.text(INDEX);
    let percent = f.decimal(PERCENT);
    let decimal = f.decimal(DECIMAL);
    let rate = if let Some(index) = index {
        if let Some(col) = [PERCENT, DECIMAL].into_iter().find(|&i| f.given(i)) {
            let shown = f.raw(col).map(|c| c.shown()).unwrap_or_default();
            f.report(
                Severity::Error,
                col,
                &shown,
                &format!("a rate or an index, not both (the row names the index {index})"),
                "clear the rate for a floating rate, or the index for a fixed one",
            );
        }
        out.floating_cell
            .entry(rate_ref.clone())
            .or_insert_with(|| f.cell_ref(INDEX));
        index_rate(f, index)
    } else {
        for col in [SPREAD_BP, FLOOR_PERCENT, CAP_PERCENT] {
            if f.given(col) {
                let shown = f.raw(col).map(|c| c.shown()).unwrap_or_default();
                f.report(
                    Severity::Error,
                    col,
                    &shown,
                    &format!("{} only on a row that names an index", table.name(col)),
                    "name the index in the index column, or clear the cell",
                );
            }
        }
        fixed_rate(f, percent, decimal, percents, decimals).map(TierRate::Fixed)
    };
    let booked = f.date(BOOKED);
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
        return;
    }
    if let (Some(effective), Some(rate)) = (effective, rate) {
        rows.entry(rate_ref).or_default().push(RateRow {
            effective,
            rate,
            tier_from,
            tier_cell: f.cell_ref(TIER_FROM),
            effective_cell: f.cell_ref(EFFECTIVE),
            booked: booked.unwrap_or(effective),
            booked_cell: f.cell_ref(BOOKED),
        });
    }
}

/// Adds the schedule of `rate_ref`, from rows whose tiers were checked, to
/// the floating or the fixed schedules, unless a bad row broke it.
fn add_schedule(out: &mut Rates, rate_ref: String, rows: Vec<RateRow>) {
    if out.broken.contains_key(&rate_ref) {
        return;
    }
    let mut bookings: Vec<(NaiveDate, NaiveDate)> = rows
        .iter()
        .filter(|r| r.booked != r.effective)
        .map(|r| (r.effective, r.booked))
        .collect();
    bookings.sort();
    bookings.dedup();
    if !bookings.is_empty() {
        out.bookings.insert(rate_ref.clone(), bookings);
    }
    if let Some(first) = rows.iter().min_by_key(|r| r.effective) {
        out.first.insert(
            rate_ref.clone(),
            (first.effective, first.effective_cell.clone()),
        );
    }
    if out.floating_cell.contains_key(&rate_ref) {
        let schedule = FloatingSchedule::from_rows(
            rows.into_iter().map(|r| (r.effective, r.rate, r.tier_from)),
        );
        out.floating.insert(rate_ref, schedule);
        return;
    }
    let schedule = RateSchedule::from_rows(rows.iter().filter_map(|r| match r.rate {
        TierRate::Fixed(rate) => Some((r.effective, rate, r.tier_from)),
        TierRate::Index(_) => None,
    }));
    out.schedules.insert(rate_ref, schedule);
}

/// A row's index rate: the spread in basis points, the floor and cap in percent.
fn index_rate(f: &mut Fields<'_, '_, '_>, index: String) -> Option<TierRate> {
    let spread_bp = f.decimal(SPREAD_BP).unwrap_or(Decimal::ZERO);
    let spread = basis_points_to_decimal(spread_bp).or_else(|| {
        f.report(
            Severity::Error,
            SPREAD_BP,
            &spread_bp.to_string(),
            "a spread in basis points with at most 24 decimal places",
            "shorten the spread",
        );
        None
    })?;
    let mut bound = |col: usize| {
        let p = f.decimal(col)?;
        percent_to_decimal(p).or_else(|| {
            f.report(
                Severity::Error,
                col,
                &p.to_string(),
                "a percent rate with at most 26 decimal places",
                "shorten the rate",
            );
            None
        })
    };
    let floor = bound(FLOOR_PERCENT);
    let cap = bound(CAP_PERCENT);
    if let (Some(lo), Some(hi)) = (floor, cap) {
        if lo > hi {
            let shown = f.raw(FLOOR_PERCENT).map(|c| c.shown()).unwrap_or_default();
            let cap_shown = f.raw(CAP_PERCENT).map(|c| c.shown()).unwrap_or_default();
            f.report(
                Severity::Error,
                FLOOR_PERCENT,
                &shown,
                &format!(
                    "a floor at or below the cap of {cap_shown}% ({})",
                    f.cell_ref(CAP_PERCENT)
                ),
                "correct the floor or the cap: a floor above the cap leaves no rate",
            );
        }
    }
    Some(TierRate::Index(IndexRate {
        index,
        spread,
        floor,
        cap,
    }))
}

/// A fixed row's rate, from rate_percent or rate_decimal.
fn fixed_rate(
    f: &mut Fields<'_, '_, '_>,
    percent: Option<Decimal>,
    decimal: Option<Decimal>,
    percents: &mut Vec<(Decimal, String)>,
    decimals: &mut Vec<Decimal>,
) -> Option<Decimal> {
    match (percent, decimal, f.given(PERCENT), f.given(DECIMAL)) {
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
            percents.push((p, f.cell_ref(PERCENT)));
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
                "a rate in rate_percent or rate_decimal, or an index",
                "fill in the row's rate",
            );
            None
        }
        _ => None,
    }
}

/// 4.25 (percent) as 0.0425: the decimal point moves two places, exactly.
pub(crate) fn percent_to_decimal(p: Decimal) -> Option<Decimal> {
    let mut d = p;
    d.set_scale(p.scale().checked_add(2)?).ok()?;
    Some(d)
}

/// 125 (basis points) as 0.0125: the decimal point moves four places, exactly.
fn basis_points_to_decimal(bp: Decimal) -> Option<Decimal> {
    let mut d = bp;
    d.set_scale(bp.scale().checked_add(4)?).ok()?;
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

/// Every row of one table (one effective date) must have the table's
/// booked date: a table is known to a run whole or not at all. Returns the
/// cell of the first row that differs, after reporting each.
fn check_booked(
    ctx: Ctx<'_>,
    sheet: &str,
    rate_ref: &str,
    rows: &[RateRow],
    problems: &mut Vec<Problem>,
) -> Option<String> {
    let mut first: BTreeMap<NaiveDate, &RateRow> = BTreeMap::new();
    let mut first_bad = None;
    for r in rows {
        let table = *first.entry(r.effective).or_insert(r);
        if r.booked == table.booked {
            continue;
        }
        problems.push(ctx.problem(
            Severity::Error,
            sheet,
            r.booked_cell.clone(),
            None,
            &r.booked.to_string(),
            &format!(
                "the booked date of the other rows of the {rate_ref} table effective {}: {} ({}; a blank booked is the effective date)",
                r.effective, table.booked, table.booked_cell
            ),
            &format!(
                "a table is booked whole: give every row of {rate_ref} effective {} the same booked date; the schedule is not used until then",
                r.effective
            ),
        ));
        first_bad.get_or_insert_with(|| r.booked_cell.clone());
    }
    first_bad
}

/// A percent column that only holds tiny values probably holds decimals,
/// and a decimal column with values of 1 or more probably holds percents.
/// Among ordinary percents, one rate typed as a decimal is warned at its
/// cell (see [`decimal_among_percents`]).
fn unit_warnings(
    ctx: Ctx<'_>,
    table: &Table<'_>,
    percents: &[(Decimal, String)],
    decimals: &[Decimal],
    problems: &mut Vec<Problem>,
) {
    let range = |v: &[Decimal]| {
        let lo = v.iter().min().copied().unwrap_or_default();
        let hi = v.iter().max().copied().unwrap_or_default();
        format!("values from {lo} to {hi}")
    };
    let values: Vec<Decimal> = percents.iter().map(|(p, _)| *p).collect();
    if values.iter().any(|p| !p.is_zero()) && values.iter().all(|p| p.abs() < PERCENT_LOOKS_DECIMAL)
    {
        problems.push(ctx.problem(
            Severity::Warning,
            &table.sheet.name,
            table.header_cell(PERCENT),
            None,
            &range(&values),
            "annual rates in percent (4.25 means 4.25%)",
            "every rate is below 0.2%: if 0.0425 means 4.25%, rename the column to rate_decimal",
        ));
    } else {
        let (mid, suspects) = decimal_among_percents(percents);
        for (p, cell) in suspects {
            let meant = (p * Decimal::ONE_HUNDRED).normalize();
            problems.push(ctx.problem(
                Severity::Warning,
                &table.sheet.name,
                cell.clone(),
                None,
                &p.to_string(),
                &format!(
                    "a rate in percent like the others of the sheet (it reads as {p}%, far below their median of {mid}%)"
                ),
                &format!(
                    "if {p} means {meant}%, write {meant} (rate_percent holds 4.25 for 4.25%); if {p}% is meant, leave it"
                ),
            ));
        }
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

/// A positive rate_percent below 1 that is below this share of the
/// sheet's median positive rate was probably typed as a decimal (0.031 for
/// 3.1%). Common practice, no source.
const FAR_BELOW_MEDIAN: Decimal = Decimal::from_parts(5, 0, 0, false, 2);

/// Decimal places a rate in percent is quoted to (hundredths of a percent,
/// one basis point). A smaller percent below 1 with more places (0.031,
/// 0.0425) reads better as a decimal (3.1%, 4.25%); one with as many (0.05)
/// is as likely a low savings rate, and is not warned. Common practice, no
/// source.
const PERCENT_PLACES: u32 = 2;

/// The percent rates (with their cells) that look typed as decimals: above
/// zero, below 1, with more than [`PERCENT_PLACES`] decimal places, and
/// below [`FAR_BELOW_MEDIAN`] of the median of the positive rates, with that median. A negative rate is never one:
/// negative rates are real.
fn decimal_among_percents(percents: &[(Decimal, String)]) -> (Decimal, Vec<&(Decimal, String)>) {
    let looks_positive = |p: &Decimal| p.is_sign_positive() && !p.is_zero();
    let positive: Vec<Decimal> = percents
        .iter()
        .map(|(p, _)| *p)
        .filter(looks_positive)
        .collect();
    let Some(mid) = median(&positive) else {
        return (Decimal::ZERO, Vec::new());
    };
    let limit = mid * FAR_BELOW_MEDIAN;
    let suspects = percents
        .iter()
        .filter(|(p, _)| {
            looks_positive(p)
                && *p < Decimal::ONE
                && *p < limit
                && p.normalize().scale() > PERCENT_PLACES
        })
        .collect();
    (mid, suspects)
}

/// The median of the values (the lower middle one of an even count), or
/// `None` for none.
fn median(values: &[Decimal]) -> Option<Decimal> {
    let mut v = values.to_vec();
    v.sort();
    v.get(v.len().saturating_sub(1) / 2).copied()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::book::cell::NumberStyle;
    use crate::book::sheet::text_sheet;
    use crate::schema::IfBlank;
    use crate::schema::SheetKind;

    fn ctx() -> Ctx<'static> {
        Ctx {
            book: "book.xlsx",
            style: NumberStyle {
                decimal_comma: false,
            },
        }
    }

    /// A blank cell means what the book schema says: rows written with every
    /// defaulted column at its default give the same schedules as rows that
    /// leave those columns out (an index schedule, and a fixed one, which
    /// takes no spread).
    #[test]
    fn blank_cells_mean_the_schema_defaults() {
        let defaults: Vec<(&str, &str)> = RATES
            .columns
            .iter()
            .filter_map(|c| match c.if_blank {
                IfBlank::Means(v) => Some((c.name, v)),
                _ => None,
            })
            .collect();
        assert_eq!(defaults.len(), 2, "{defaults:?}");
        let read_rows = |extra: &[(&str, &str)]| {
            let mut header = vec!["rate_ref", "effective", "rate_percent", "index"];
            header.extend(extra.iter().map(|d| d.0));
            // A spread belongs on an index row only.
            let mut fixed = vec!["STD", "2026-01-01", "2.5", ""];
            fixed.extend(
                extra
                    .iter()
                    .map(|(name, v)| if *name == "spread_bp" { "" } else { *v }),
            );
            let mut floating = vec!["FLT", "2026-01-01", "", "HVM-ON"];
            floating.extend(extra.iter().map(|d| d.1));
            let sheet = text_sheet(SheetKind::Rates, &[&header, &fixed, &floating]);
            let mut problems = Vec::new();
            let rates = read(ctx(), &sheet, &mut problems);
            assert!(problems.is_empty(), "{problems:?}");
            format!("{:?} {:?}", rates.schedules, rates.floating)
        };
        assert_eq!(read_rows(&[]), read_rows(&defaults));
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

    /// Found: 0.031 among rates of 3 to 4.5 in rate_percent passed without
    /// a word, though it accrues at 0.031%. Expected: a warning at the cell
    /// saying it reads as 0.031% and how to write 3.1%. A low savings rate
    /// quoted in hundredths (0.05) and a negative rate are not warned.
    #[test]
    fn one_rate_typed_as_a_decimal_among_percents_is_warned_at_its_cell() {
        let sheet = text_sheet(
            SheetKind::Rates,
            &[
                &["rate_ref", "effective", "rate_percent"],
                &["STD", "2026-01-01", "3"],
                &["STD", "2026-06-01", "0.031"],
                &["BONUS", "2026-01-01", "4.5"],
                &["EASY", "2026-01-01", "0.05"],
                &["EUR-NEG", "2026-01-01", "-0.25"],
                &["TERM", "2026-01-01", "3.75"],
            ],
        );
        let mut problems = Vec::new();
        let rates = read(ctx(), &sheet, &mut problems);
        assert_eq!(rates.schedules.len(), 5, "a warning keeps the row");
        assert_eq!(problems.len(), 1, "{problems:#?}");
        let p = &problems[0];
        assert_eq!(
            (p.severity, p.position.cell.as_str()),
            (Severity::Warning, "C3")
        );
        assert_eq!(p.found, "0.031");
        assert!(p.expected.contains("it reads as 0.031%"), "{}", p.expected);
        assert!(p.expected.contains("median of 3%"), "{}", p.expected);
        assert!(
            p.fix.starts_with("if 0.031 means 3.1%, write 3.1"),
            "{}",
            p.fix
        );
    }

    #[test]
    fn the_far_below_share_is_a_twentieth_and_percents_have_two_places() {
        assert_eq!(FAR_BELOW_MEDIAN.to_string(), "0.05");
        assert_eq!(PERCENT_PLACES, 2);
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

    /// Input books, Rates: a row may name an index with a spread in basis
    /// points, a floor and a cap in percent; fixed rows of the same rate_ref
    /// become fixed tiers of its floating schedule.
    #[test]
    fn an_index_row_makes_a_floating_schedule() {
        let sheet = text_sheet(
            SheetKind::Rates,
            &[
                &[
                    "rate_ref",
                    "effective",
                    "rate_percent",
                    "index",
                    "spread_bp",
                    "floor_percent",
                    "cap_percent",
                ],
                &["HVM-FLT", "2026-01-01", "4.5", "", "", "", ""],
                &["HVM-FLT", "2026-07-01", "", "HVM-ON", "125", "0", "8"],
            ],
        );
        let mut problems = Vec::new();
        let rates = read(ctx(), &sheet, &mut problems);
        assert!(problems.is_empty(), "{problems:?}");
        assert!(rates.schedules.is_empty());
        let s = &rates.floating["HVM-FLT"];
        assert_eq!(s.indices(), ["HVM-ON"]);
        let tiers = |day: &str| {
            s.table_on(day.parse().unwrap()).unwrap().tiers[0]
                .rate
                .clone()
        };
        assert_eq!(
            tiers("2026-03-01"),
            TierRate::Fixed("0.045".parse().unwrap())
        );
        assert_eq!(
            tiers("2026-07-01"),
            TierRate::Index(IndexRate {
                index: "HVM-ON".into(),
                spread: "0.0125".parse().unwrap(),
                floor: Some("0.00".parse().unwrap()),
                cap: Some("0.08".parse().unwrap()),
            })
        );
    }

    /// Floating rates: a floor above the cap, a rate and an index on one row,
    /// or a spread without an index are errors that spoil the schedule.
    #[test]
    fn floating_rows_that_cannot_be_used() {
        let sheet = text_sheet(
            SheetKind::Rates,
            &[
                &[
                    "rate_ref",
                    "effective",
                    "rate_percent",
                    "index",
                    "spread_bp",
                    "floor_percent",
                    "cap_percent",
                ],
                &["A", "2026-01-01", "", "HVM-ON", "0", "3", "2"],
                &["B", "2026-01-01", "4", "HVM-ON", "", "", ""],
                &["C", "2026-01-01", "4", "", "25", "", ""],
            ],
        );
        let mut problems = Vec::new();
        let rates = read(ctx(), &sheet, &mut problems);
        let cells: Vec<&str> = problems.iter().map(|p| p.position.cell.as_str()).collect();
        assert_eq!(cells, ["F2", "C3", "E4"]);
        assert!(problems[0].expected.contains("at or below the cap"));
        assert!(rates.floating.is_empty() && rates.schedules.is_empty());
        assert_eq!(rates.broken.len(), 3);
    }
}
