//! The settings in force for a run: a command-line option, else a book's
//! Settings sheet, else the default, each recorded with where it came from.

use anyhow::{bail, Result};
use chrono::{Datelike, NaiveDate};

use super::daycount::parse_iso_date;
use crate::book::Book;
use crate::report::model::{Setting, SettingSource};

/// One resolved setting value with its source.
#[derive(Debug, Clone)]
pub struct Resolved<T> {
    /// The value.
    pub value: T,
    /// Where it came from.
    pub source: SettingSource,
}

/// Every setting of the run.
#[derive(Debug, Clone, Default)]
pub struct Settings {
    /// What the Run sheet lists.
    pub listed: Vec<Setting>,
}

impl Settings {
    /// Records a setting for the Run sheet.
    pub fn record<T: ToString>(&mut self, name: &str, r: &Resolved<T>) {
        self.listed.push(Setting {
            name: name.to_string(),
            value: r.value.to_string(),
            source: r.source,
        });
    }
}

/// The one value the books' Settings sheets give for `name` (folded), with
/// an error when two books disagree.
pub fn from_books(books: &[Book], name: &str) -> Result<Option<String>> {
    let mut found: Option<(String, String)> = None;
    for b in books {
        for s in b.settings.iter().filter(|s| s.name == name) {
            match &found {
                Some((v, at)) if *v != s.value => bail!(
                    "the books disagree on the setting {name}: '{v}' at {at} and '{}' at {}; give --{} on the command line or make them agree",
                    s.value,
                    s.position,
                    name.replace('_', "-")
                ),
                Some(_) => {}
                None => found = Some((s.value.clone(), s.position.to_string())),
            }
        }
    }
    Ok(found.map(|(v, _)| v))
}

/// A date setting: the option, else the books, else `default`.
pub fn date(
    books: &[Book],
    name: &str,
    option: Option<&str>,
    default: Option<NaiveDate>,
) -> Result<Option<Resolved<NaiveDate>>> {
    let flag = format!("--{}", name.replace('_', "-"));
    if let Some(o) = option {
        let Some(d) = parse_iso_date(o) else {
            bail!(
                "{flag} '{o}' is not an ISO date: write it as YYYY-MM-DD, for example 2026-11-30"
            );
        };
        return Ok(Some(Resolved {
            value: d,
            source: SettingSource::Option,
        }));
    }
    if let Some(v) = from_books(books, &name.replace('_', ""))? {
        let Some(d) = parse_iso_date(&v) else {
            bail!("the Settings sheet's {name} '{v}' is not an ISO date: write it as YYYY-MM-DD");
        };
        return Ok(Some(Resolved {
            value: d,
            source: SettingSource::Book,
        }));
    }
    Ok(default.map(|value| Resolved {
        value,
        source: SettingSource::Default,
    }))
}

/// A text setting: the option, else the books, else `default`.
pub fn text(
    books: &[Book],
    name: &str,
    option: Option<&str>,
    default: &str,
) -> Result<Resolved<String>> {
    if let Some(o) = option {
        return Ok(Resolved {
            value: o.to_string(),
            source: SettingSource::Option,
        });
    }
    if let Some(v) = from_books(books, &name.replace('_', ""))? {
        return Ok(Resolved {
            value: v,
            source: SettingSource::Book,
        });
    }
    Ok(Resolved {
        value: default.to_string(),
        source: SettingSource::Default,
    })
}

/// The first day of `d`'s month.
pub fn month_start(d: NaiveDate) -> NaiveDate {
    d.with_day(1).unwrap_or(d)
}
