//! The Holidays sheet: named calendars, each a list of holiday dates, built
//! into shared [`Calendar`]s that accounts name in their `calendar` column.
//!
//! A calendar with a bad row is kept out (the accounts that name it get an
//! error), never used with a date missing.

use std::collections::BTreeMap;
use std::sync::Arc;

use chrono::NaiveDate;

use super::sheet::Sheet;
use super::table::{near_miss, Ctx, Fields, Table};
use crate::conventions::calendar::Calendar;
use crate::conventions::names::fold;
use crate::problem::Problem;
use crate::schema::{column, HOLIDAYS};

const CALENDAR: usize = column!(HOLIDAYS, "calendar");
const DATE: usize = column!(HOLIDAYS, "date");
const NAME: usize = column!(HOLIDAYS, "name");

/// The calendars of a book, by folded name.
#[derive(Debug, Default)]
pub(crate) struct Calendars {
    /// Usable calendars: the name as first written, and the calendar.
    good: BTreeMap<String, Arc<Calendar>>,
    /// Calendars with a bad row: the cell of the first bad row.
    broken: BTreeMap<String, String>,
    /// Whether a Holidays sheet was read as a table.
    pub read: bool,
}

/// What an account's `calendar` name resolves to.
#[derive(Debug)]
pub(crate) enum Lookup {
    /// The calendar.
    Found(Arc<Calendar>),
    /// It has a bad row in Holidays (the cell).
    Broken(String),
    /// No such calendar; the closest name, if any.
    Unknown(Option<String>),
}

impl Calendars {
    /// Resolves a calendar name (case, spaces, `_` and `-` ignored).
    pub(crate) fn lookup(&self, name: &str) -> Lookup {
        let key = fold(name);
        if let Some(cell) = self.broken.get(&key) {
            return Lookup::Broken(cell.clone());
        }
        match self.good.get(&key) {
            Some(c) => Lookup::Found(Arc::clone(c)),
            None => Lookup::Unknown(
                self.good
                    .iter()
                    .find(|(k, _)| near_miss(&key, k))
                    .map(|(_, c)| c.name().to_string()),
            ),
        }
    }
}

/// Reads the Holidays sheet.
pub(crate) fn read(ctx: Ctx<'_>, sheet: &Sheet, problems: &mut Vec<Problem>) -> Calendars {
    let mut out = Calendars::default();
    let Some(table) = Table::open(&ctx, sheet, HOLIDAYS.columns, problems) else {
        return out;
    };
    out.read = true;
    let mut dates: BTreeMap<String, (String, Vec<NaiveDate>)> = BTreeMap::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let calendar = f.required_text(CALENDAR);
        let date = f.required_date(DATE);
        let _ = f.text(NAME);
        let bad_cell = f.failed.then(|| f.cell_ref(DATE));
        let Some(calendar) = calendar else {
            continue;
        };
        let key = fold(&calendar);
        if let Some(cell) = bad_cell {
            out.broken.entry(key.clone()).or_insert(cell);
        }
        let entry = dates.entry(key).or_insert_with(|| (calendar, Vec::new()));
        if let Some(d) = date {
            entry.1.push(d);
        }
    }
    for (key, (name, days)) in dates {
        if !out.broken.contains_key(&key) {
            out.good.insert(key, Arc::new(Calendar::new(&name, days)));
        }
    }
    out
}
