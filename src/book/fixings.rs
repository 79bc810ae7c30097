//! The Fixings sheet: each index's fixings by the business day they apply
//! to, for floating rates (behaviour.md, Floating rates).
//!
//! `rate_percent` is divided by 100 exactly. An index with a bad row, or
//! with two fixings for one date, is kept out (the accounts that use it get
//! an error), never used with a fixing missing or guessed. Index names match
//! exactly as written, like account ids; a near miss is suggested. Whether a
//! fixing date is a business day depends on the account, so that check is
//! made with each account's calendar ([`FixingsSheet::holiday_warnings`]).

use std::collections::{BTreeMap, BTreeSet};

use chrono::NaiveDate;

use super::rates::percent_to_decimal;
use super::sheet::Sheet;
use super::table::{near_miss, Ctx, Fields, Table};
use crate::conventions::calendar::Calendar;
use crate::conventions::names::fold;
use crate::engine::floating::Fixings;
use crate::problem::{Problem, Severity};
use crate::schema::{column, FIXINGS};

const INDEX: usize = column!(FIXINGS, "index");
const DATE: usize = column!(FIXINGS, "date");
const RATE: usize = column!(FIXINGS, "rate_percent");

/// What the Fixings sheet gives the accounts.
#[derive(Debug, Default)]
pub(crate) struct FixingsSheet {
    /// Usable indices' fixings.
    pub fixings: Fixings,
    /// The cell of each usable fixing, by index and date.
    cells: BTreeMap<(String, NaiveDate), String>,
    /// Indices with a bad row: the cell of the first one.
    pub broken: BTreeMap<String, String>,
    /// The sheet's name, as found.
    sheet: String,
    /// Whether a Fixings sheet was read as a table.
    pub read: bool,
}

/// What an index name resolves to.
#[derive(Debug, PartialEq, Eq)]
pub(crate) enum IndexLookup {
    /// Its fixings can be used.
    Found,
    /// It has a bad row (the cell).
    Broken(String),
    /// No such index; the closest name, if any.
    Unknown(Option<String>),
}

impl FixingsSheet {
    /// Resolves an index name of the Rates sheet.
    pub(crate) fn lookup(&self, index: &str) -> IndexLookup {
        if let Some(cell) = self.broken.get(index) {
            return IndexLookup::Broken(cell.clone());
        }
        if self.fixings.contains_key(index) {
            return IndexLookup::Found;
        }
        let key = fold(index);
        IndexLookup::Unknown(
            self.fixings
                .keys()
                .find(|k| fold(k) == key || near_miss(&key, &fold(k)))
                .cloned(),
        )
    }

    /// A warning for each fixing of `index` dated on a day that is not a
    /// business day of `calendar`, each (index, date, calendar) once.
    pub(crate) fn holiday_warnings(
        &self,
        ctx: Ctx<'_>,
        index: &str,
        calendar: &Calendar,
        account: &str,
        seen: &mut BTreeSet<(String, NaiveDate, String)>,
        problems: &mut Vec<Problem>,
    ) {
        let Some(series) = self.fixings.get(index) else {
            return;
        };
        for day in series.keys().filter(|d| !calendar.is_business_day(**d)) {
            let key = (index.to_string(), *day, calendar.name().to_string());
            if !seen.insert(key) {
                continue;
            }
            let cell = self
                .cells
                .get(&(index.to_string(), *day))
                .cloned()
                .unwrap_or_default();
            let calendar_words = if calendar.name().is_empty() {
                "weekends only".to_string()
            } else {
                format!("calendar {}", calendar.name())
            };
            problems.push(ctx.problem(
                Severity::Warning,
                &self.sheet,
                cell,
                Some(account),
                &format!("a {index} fixing for {day}"),
                &format!(
                    "fixings on business days of account {account}'s calendar ({calendar_words}); {day} is not one"
                ),
                "the fixing is never used for this account (days that are not business days take the fixing of the business day before): check the date, or add the day to the account's calendar if it is not a holiday",
            ));
        }
    }
}

/// Reads the Fixings sheet.
pub(crate) fn read(ctx: Ctx<'_>, sheet: &Sheet, problems: &mut Vec<Problem>) -> FixingsSheet {
    let mut out = FixingsSheet {
        sheet: sheet.name.clone(),
        ..FixingsSheet::default()
    };
    let Some(table) = Table::open(&ctx, sheet, FIXINGS.columns, problems) else {
        return out;
    };
    out.read = true;
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some(index) = f.required_text(INDEX) else {
            continue;
        };
        let date = f.required_date(DATE);
        let percent = f.required_decimal(RATE);
        let rate = percent.and_then(|p| {
            percent_to_decimal(p).or_else(|| {
                f.report(
                    Severity::Error,
                    RATE,
                    &p.to_string(),
                    "a fixing in percent with at most 26 decimal places",
                    "shorten the fixing",
                );
                None
            })
        });
        if let Some(day) = date {
            if let Some(first) = out.cells.get(&(index.clone(), day)).cloned() {
                f.report(
                    Severity::Error,
                    DATE,
                    &day.to_string(),
                    &format!("one {index} fixing per date (the fixing of {day} is already in {first})"),
                    "remove one of the two rows; the index is not used until it has one fixing per date",
                );
            }
        }
        if f.failed {
            out.broken.entry(index).or_insert_with(|| f.cell_ref(INDEX));
            continue;
        }
        if let (Some(day), Some(rate)) = (date, rate) {
            out.cells.insert((index.clone(), day), f.cell_ref(RATE));
            out.fixings.entry(index).or_default().insert(day, rate);
        }
    }
    let broken: Vec<String> = out.broken.keys().cloned().collect();
    for index in broken {
        out.fixings.remove(&index);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::book::cell::NumberStyle;
    use crate::book::sheet::text_sheet;
    use crate::schema::SheetKind;

    fn ctx() -> Ctx<'static> {
        Ctx {
            book: "book.xlsx",
            style: NumberStyle {
                decimal_comma: false,
            },
        }
    }

    fn d(s: &str) -> NaiveDate {
        s.parse().unwrap()
    }

    /// Input books, Fixings sheet: index, date, rate_percent; the percent
    /// becomes a decimal exactly.
    #[test]
    fn fixings_by_index_and_date() {
        let sheet = text_sheet(
            SheetKind::Fixings,
            &[
                &["index", "date", "rate_percent"],
                &["HVM-ON", "2026-11-02", "4.31"],
                &["HVM-ON", "2026-11-03", "-0.05"],
                &["HVM-TERM", "2026-11-02", "4.5"],
            ],
        );
        let mut problems = Vec::new();
        let fx = read(ctx(), &sheet, &mut problems);
        assert!(problems.is_empty(), "{problems:?}");
        assert_eq!(fx.fixings["HVM-ON"][&d("2026-11-02")].to_string(), "0.0431");
        assert_eq!(
            fx.fixings["HVM-ON"][&d("2026-11-03")].to_string(),
            "-0.0005"
        );
        assert_eq!(fx.lookup("HVM-TERM"), IndexLookup::Found);
        assert_eq!(
            fx.lookup("hvm-on"),
            IndexLookup::Unknown(Some("HVM-ON".into()))
        );
    }

    /// Two fixings for one date, or a bad one, keep the index out.
    #[test]
    fn a_duplicated_or_bad_fixing_spoils_its_index() {
        let sheet = text_sheet(
            SheetKind::Fixings,
            &[
                &["index", "date", "rate_percent"],
                &["HVM-ON", "2026-11-02", "4.31"],
                &["HVM-ON", "2026-11-02", "4.32"],
                &["HVM-TERM", "2026-11-02", "four"],
                &["HVM-6M", "2026-11-02", "4.6"],
            ],
        );
        let mut problems = Vec::new();
        let fx = read(ctx(), &sheet, &mut problems);
        let cells: Vec<&str> = problems.iter().map(|p| p.position.cell.as_str()).collect();
        assert_eq!(cells, ["B3", "C4"]);
        assert_eq!(fx.lookup("HVM-ON"), IndexLookup::Broken("A3".into()));
        assert_eq!(fx.lookup("HVM-TERM"), IndexLookup::Broken("A4".into()));
        assert_eq!(fx.fixings.keys().collect::<Vec<_>>(), ["HVM-6M"]);
    }

    /// Floating rates, Fixings: one fixing per business day of the account's
    /// calendar; a fixing on a holiday of it is a warning, once.
    #[test]
    fn a_fixing_on_a_holiday_is_a_warning() {
        let sheet = text_sheet(
            SheetKind::Fixings,
            &[
                &["index", "date", "rate_percent"],
                &["HVM-ON", "2026-11-25", "4.31"],
                &["HVM-ON", "2026-11-26", "4.30"],
                &["HVM-ON", "2026-11-28", "4.29"],
            ],
        );
        let mut problems = Vec::new();
        let fx = read(ctx(), &sheet, &mut problems);
        let cal = Calendar::new("HVM", [d("2026-11-26")]);
        let mut seen = BTreeSet::new();
        for account in ["HVM-L1", "HVM-L2"] {
            fx.holiday_warnings(ctx(), "HVM-ON", &cal, account, &mut seen, &mut problems);
        }
        let found: Vec<(Severity, &str)> = problems
            .iter()
            .map(|p| (p.severity, p.position.cell.as_str()))
            .collect();
        assert_eq!(
            found,
            [(Severity::Warning, "C3"), (Severity::Warning, "C4")]
        );
        assert!(problems[0].expected.contains("calendar HVM"));
    }
}
