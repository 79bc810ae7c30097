//! The settings in force for a command, resolved once: a command-line
//! option, else a book's Settings sheet, else the default, each recorded
//! with where it came from for the Run sheet.
//!
//! `run`, `check` and `explain` each hand what their command line gave
//! ([`Given`]) to [`Settings::resolve`] and read the one [`Settings`] value
//! it returns; the options they share ([`ToleranceArgs`]) are declared here
//! too. This module never reads a file, the clock or the environment, and
//! never applies a setting: the batch and the engine do.

use anyhow::{anyhow, bail, Result};
use chrono::{Datelike, NaiveDate};
use rust_decimal::Decimal;

use super::daycount::{parse_date_option, parse_iso_date};
use crate::batch::journal::JournalStyle;
use crate::batch::BatchSettings;
use crate::book::Book;
use crate::engine::floating::FixingFallback;
use crate::engine::ledger::SettlementLines;
use crate::engine::reconcile::Tolerance;
use crate::report::journal_csv::DetailOutput;
use crate::report::model::{Setting, SettingSource};

/// Reconciliation tolerances, as `run` and `explain` take them.
#[derive(Debug, Default, clap::Args)]
pub struct ToleranceArgs {
    /// Variance accepted, in units of each row's currency (default: one minor unit).
    #[arg(long, value_name = "AMOUNT", allow_hyphen_values = true)]
    pub tolerance_amount: Option<String>,
    /// Variance accepted as an annual rate gap in basis points (default: 0).
    #[arg(long, value_name = "BP", allow_hyphen_values = true)]
    pub tolerance_bp: Option<String>,
}

/// What a run knows, as `run`, `check` and `explain` take it (behaviour.md,
/// Knowledge date).
#[derive(Debug, Default, clap::Args)]
pub struct KnowledgeArgs {
    /// Use only what was booked by the end of this day: movements by
    /// booking_date, Rates by booked, Statements by posting_date (else the
    /// Settings sheet's as_at, else no limit). On or after the cut-off.
    #[arg(long, value_name = "DATE")]
    pub as_at: Option<String>,
    /// The as-at date of the previous close, from the day before the window
    /// to the as-at date (else the Settings sheet's previous_as_at).
    #[arg(long, value_name = "DATE")]
    pub previous_as_at: Option<String>,
}

/// What a command's options give. `None` (or `false`) for an option not
/// given, or one the command does not have.
#[derive(Debug, Clone, Copy, Default)]
pub struct Given<'a> {
    /// `--cutoff`.
    pub cutoff: Option<&'a str>,
    /// The cut-off date when neither the option nor a Settings sheet gives
    /// one (`explain`: the end of `--period`).
    pub cutoff_default: Option<NaiveDate>,
    /// `--window-start`.
    pub window_start: Option<&'a str>,
    /// `--entity`.
    pub entity: Option<&'a str>,
    /// `--journal-style`.
    pub journal_style: Option<&'a str>,
    /// `--journal-detail`.
    pub journal_detail: Option<&'a str>,
    /// `--tolerance-amount`.
    pub tolerance_amount: Option<&'a str>,
    /// `--tolerance-bp`.
    pub tolerance_bp: Option<&'a str>,
    /// `--fixing-fallback`.
    pub fixing_fallback: Option<&'a str>,
    /// `--as-at`.
    pub as_at: Option<&'a str>,
    /// `--previous-as-at`.
    pub previous_as_at: Option<&'a str>,
    /// `--settlement-lines`.
    pub settlement_lines: Option<&'a str>,
    /// `--shard`.
    pub shard: Option<&'a str>,
    /// `--daily`.
    pub daily: bool,
    /// `--decimal-comma`.
    pub decimal_comma: bool,
    /// `--fail-on-variance`.
    pub fail_on_variance: bool,
    /// `--no-fast-path`.
    pub no_fast_path: bool,
}

impl<'a> Given<'a> {
    /// The knowledge-date options of `args`.
    pub fn with_knowledge(self, args: &'a KnowledgeArgs) -> Given<'a> {
        Given {
            as_at: args.as_at.as_deref(),
            previous_as_at: args.previous_as_at.as_deref(),
            ..self
        }
    }

    /// The tolerance options of `args`.
    pub fn with_tolerance(self, args: &'a ToleranceArgs) -> Given<'a> {
        Given {
            tolerance_amount: args.tolerance_amount.as_deref(),
            tolerance_bp: args.tolerance_bp.as_deref(),
            ..self
        }
    }
}

/// Every setting of a command, resolved.
#[derive(Debug, Clone)]
pub struct Settings {
    /// The cut-off date: the last day computed.
    pub cutoff: NaiveDate,
    /// The first day of the window (the window ends on the cut-off date).
    pub window_start: NaiveDate,
    /// How the journal books accruals.
    pub journal_style: JournalStyle,
    /// Where the Journal detail goes: a sheet, a CSV file or nowhere.
    pub journal_detail: DetailOutput,
    /// The entity booking each book's journal lines, by book index.
    pub entities: Vec<String>,
    /// Reconciliation tolerances.
    pub tolerance: Tolerance,
    /// What a floating account does about a missing fixing.
    pub fixing_fallback: FixingFallback,
    /// The knowledge date A: only rows booked by its end are known (`None`:
    /// no limit, every row is known).
    pub as_at: Option<NaiveDate>,
    /// The as-at date of the previous close, in F-1..A.
    pub previous_as_at: Option<NaiveDate>,
    /// When the journal settles a posting against the accrual account.
    pub settlement_lines: SettlementLines,
    /// Only the accounts of shard K of N (`(K, N)`, K from 1).
    pub shard: Option<(u32, u32)>,
    /// Keep the day-by-day lines.
    pub daily: bool,
    /// Accrue unchanging runs of days in one step (the same figures).
    pub fast_path: bool,
    /// A statement row outside tolerance makes the exit status 3.
    pub fail_on_variance: bool,
    /// Every setting in force with where it came from, in the Run sheet's order.
    pub listed: Vec<Setting>,
}

impl Settings {
    /// Resolves every setting from `given`, else the books' Settings sheets,
    /// else the defaults; `None` when no cut-off date is given anywhere.
    ///
    /// # Errors
    /// A value that does not parse, books that disagree on a setting, a
    /// window that starts after the cut-off, an as-at date before the
    /// cut-off, or a previous as-at date outside the day before the window
    /// to the as-at date.
    pub fn resolve(books: &[Book], given: &Given<'_>) -> Result<Option<Settings>> {
        let Some(cutoff) = date(books, "cutoff", given.cutoff, given.cutoff_default)? else {
            return Ok(None);
        };
        let window = date(
            books,
            "window_start",
            given.window_start,
            Some(month_start(cutoff.value)),
        )?
        .ok_or_else(|| anyhow!("no window start"))?;
        if window.value > cutoff.value {
            bail!(
                "the window starts on {} after the cut-off {}: the window must end on the cut-off",
                window.value,
                cutoff.value
            );
        }
        let style = text(books, "journal_style", given.journal_style, "incremental")?;
        let journal_style = JournalStyle::parse(&style.value).map_err(|e| anyhow!("{e}"))?;
        let entities = entities(books, given.entity);

        let mut listed = Listed::default();
        listed.record("cutoff", &cutoff);
        listed.record("window_start", &window);
        for (b, e) in books.iter().zip(&entities) {
            let name = if books.len() == 1 {
                "entity".to_string()
            } else {
                format!("entity of {}", b.path.display())
            };
            listed.record(&name, e);
        }
        listed.record("journal_style", &style);
        let journal_detail = journal_detail(given.journal_detail, &mut listed)?;
        listed.record("daily", &switch(given.daily));
        listed.record("decimal_comma", &switch(given.decimal_comma));
        listed.record("statement_end", &statement_end(books));
        listed.record("fail_on_variance", &switch(given.fail_on_variance));
        let tolerance = tolerance(books, given, &mut listed)?;
        let shard = given.shard.map(parse_shard).transpose()?;
        if let Some((k, n)) = shard {
            listed.record(
                "shard",
                &Resolved {
                    value: format!("{k}/{n}"),
                    source: SettingSource::Option,
                },
            );
        }
        let fixing_fallback = fixing_fallback(given.fixing_fallback, &mut listed)?;
        let known = knowledge(books, given, window.value, cutoff.value, &mut listed)?;
        let settlement_lines = settlement_lines(books, given.settlement_lines, &mut listed)?;
        listed.record("statement_amounts", &statement_amounts(books));
        Ok(Some(Settings {
            cutoff: cutoff.value,
            window_start: window.value,
            journal_style,
            journal_detail,
            entities: entities.into_iter().map(|e| e.value).collect(),
            tolerance,
            fixing_fallback,
            as_at: known.as_at,
            previous_as_at: known.previous_as_at,
            settlement_lines,
            shard,
            daily: given.daily,
            fast_path: !given.no_fast_path,
            fail_on_variance: given.fail_on_variance,
            listed: listed.0,
        }))
    }

    /// What the batch needs of them.
    pub fn batch(&self) -> BatchSettings {
        BatchSettings {
            cutoff: self.cutoff,
            window_start: self.window_start,
            daily: self.daily,
            journal_style: self.journal_style,
            journal_detail: self.journal_detail != DetailOutput::None,
            entities: self.entities.clone(),
            tolerance: self.tolerance,
            fast_path: self.fast_path,
            shard: self.shard,
            fixing_fallback: self.fixing_fallback,
            as_at: self.as_at,
            previous_as_at: self.previous_as_at,
            settlement_lines: self.settlement_lines,
        }
    }
}

/// One resolved setting value with its source.
#[derive(Debug, Clone, PartialEq, Eq)]
struct Resolved<T> {
    value: T,
    source: SettingSource,
}

/// The settings listed so far, for the Run sheet.
#[derive(Debug, Default)]
struct Listed(Vec<Setting>);

impl Listed {
    fn record<T: ToString>(&mut self, name: &str, r: &Resolved<T>) {
        self.0.push(Setting {
            name: name.to_string(),
            value: r.value.to_string(),
            source: r.source,
        });
    }
}

/// The one value the books' Settings sheets give for `name` (folded), with
/// an error when two books disagree.
fn from_books(books: &[Book], name: &str) -> Result<Option<String>> {
    Ok(from_books_at(books, name)?.map(|(v, _)| v))
}

/// [`from_books`], with the cell the value was found in.
fn from_books_at(books: &[Book], name: &str) -> Result<Option<(String, String)>> {
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
    Ok(found)
}

/// A date setting: the option, else the books, else `default`.
fn date(
    books: &[Book],
    name: &str,
    option: Option<&str>,
    default: Option<NaiveDate>,
) -> Result<Option<Resolved<NaiveDate>>> {
    let flag = format!("--{}", name.replace('_', "-"));
    if let Some(o) = option {
        let d = parse_date_option(&flag, o)?;
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
fn text(
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

/// The entity of each book: `--entity` for all, else each book's own
/// Settings sheet, else "default".
fn entities(books: &[Book], option: Option<&str>) -> Vec<Resolved<String>> {
    books
        .iter()
        .map(
            |b| match (option, b.settings.iter().find(|s| s.name == "entity")) {
                (Some(e), _) => Resolved {
                    value: e.to_string(),
                    source: SettingSource::Option,
                },
                (None, Some(s)) => Resolved {
                    value: s.value.clone(),
                    source: SettingSource::Book,
                },
                (None, None) => Resolved {
                    value: "default".to_string(),
                    source: SettingSource::Default,
                },
            },
        )
        .collect()
}

/// A yes/no option: on only from the command line.
fn switch(on: bool) -> Resolved<bool> {
    Resolved {
        value: on,
        source: if on {
            SettingSource::Option
        } else {
            SettingSource::Default
        },
    }
}

/// How the books' Statements sheets write a period's end, as the reader
/// applied it. Each book has its own setting, so books may differ; the Run
/// sheet then names each book's.
fn statement_end(books: &[Book]) -> Resolved<String> {
    book_reading(books, "statementend", "inclusive")
}

/// Whether the books' Statements sheets give amounts before or after
/// withholding tax, as the reader applied it; per book, like
/// [`statement_end`].
fn statement_amounts(books: &[Book]) -> Resolved<String> {
    book_reading(books, "statementamounts", "gross")
}

/// A setting that says how each book is read (`key` as the Settings sheet's
/// names are matched, `default` when a book does not give it): one value
/// when the books agree, else each book's.
fn book_reading(books: &[Book], key: &str, default: &str) -> Resolved<String> {
    let of = |b: &Book| {
        b.settings
            .iter()
            .find(|s| s.name == key)
            .map(|s| s.value.to_ascii_lowercase())
    };
    let given: Vec<Option<String>> = books.iter().map(of).collect();
    let source = if given.iter().any(Option::is_some) {
        SettingSource::Book
    } else {
        SettingSource::Default
    };
    let values: Vec<String> = given
        .into_iter()
        .map(|v| v.unwrap_or_else(|| default.to_string()))
        .collect();
    let value = match values.first() {
        Some(first) if values.iter().all(|v| v == first) => first.clone(),
        None => default.to_string(),
        Some(_) => books
            .iter()
            .zip(&values)
            .map(|(b, v)| format!("{}: {v}", b.path.display()))
            .collect::<Vec<_>>()
            .join("; "),
    };
    Resolved { value, source }
}

/// The tolerances in force, recorded for the Run sheet.
fn tolerance(books: &[Book], given: &Given<'_>, listed: &mut Listed) -> Result<Tolerance> {
    let parse = |what: &str, v: &str| -> Result<Decimal> {
        let d: Decimal = v
            .trim()
            .parse()
            .map_err(|_| anyhow!("{what} '{v}' is not a decimal number: write it like 0.05"))?;
        if d.is_sign_negative() {
            bail!("{what} '{v}' is negative: a tolerance is a size, write it without a sign");
        }
        Ok(d)
    };
    let amount = text(books, "tolerance_amount", given.tolerance_amount, "")?;
    let bp = text(books, "tolerance_bp", given.tolerance_bp, "0")?;
    let tol = Tolerance {
        amount: if amount.value.is_empty() {
            None
        } else {
            Some(parse("the tolerance amount", &amount.value)?)
        },
        bp: parse("the tolerance in basis points", &bp.value)?,
    };
    let shown = Resolved {
        value: if amount.value.is_empty() {
            "one minor unit of each row's currency".to_string()
        } else {
            amount.value.clone()
        },
        source: amount.source,
    };
    listed.record("tolerance_amount", &shown);
    listed.record("tolerance_bp", &bp);
    Ok(tol)
}

/// Parses `K/N` with 1 <= K <= N.
fn parse_shard(s: &str) -> Result<(u32, u32)> {
    let bad =
        || anyhow!("--shard '{s}' is not K/N: write it like 2/8 (shard 2 of 8, counting from 1)");
    let (k, n) = s.split_once('/').ok_or_else(bad)?;
    let (k, n): (u32, u32) = (
        k.trim().parse().map_err(|_| bad())?,
        n.trim().parse().map_err(|_| bad())?,
    );
    if k == 0 || n == 0 || k > n {
        return Err(bad());
    }
    Ok((k, n))
}

/// The `--fixing-fallback` in force (the command line only), recorded for
/// the Run sheet.
fn fixing_fallback(given: Option<&str>, listed: &mut Listed) -> Result<FixingFallback> {
    let fallback = match given {
        Some(v) => FixingFallback::parse(v).map_err(|e| anyhow!("--fixing-fallback: {e}"))?,
        None => FixingFallback::None,
    };
    listed.record(
        "fixing_fallback",
        &Resolved {
            value: fallback.name(),
            source: if given.is_some() {
                SettingSource::Option
            } else {
                SettingSource::Default
            },
        },
    );
    Ok(fallback)
}

/// What a run knows: the as-at date and the previous close's.
#[derive(Debug, Clone, Copy)]
struct Knowledge {
    as_at: Option<NaiveDate>,
    previous_as_at: Option<NaiveDate>,
}

/// A date setting given by the option or the books (no default), with
/// where it was given, for a message: `--as-at`, or the Settings cell.
fn given_date(
    books: &[Book],
    name: &str,
    option: Option<&str>,
) -> Result<Option<(Resolved<NaiveDate>, String)>> {
    let Some(r) = date(books, name, option, None)? else {
        return Ok(None);
    };
    let place = match r.source {
        SettingSource::Option => format!("--{}", name.replace('_', "-")),
        _ => match from_books_at(books, &name.replace('_', ""))? {
            Some((_, at)) => format!("the Settings sheet's {name} ({at})"),
            None => format!("the Settings sheet's {name}"),
        },
    };
    Ok(Some((r, place)))
}

/// The as-at date A and the previous close's P, checked against the window
/// F..C (behaviour.md, Knowledge date): A on or after C, P in F-1..A (A
/// unlimited when not given). Recorded for the Run sheet.
fn knowledge(
    books: &[Book],
    given: &Given<'_>,
    window_start: NaiveDate,
    cutoff: NaiveDate,
    listed: &mut Listed,
) -> Result<Knowledge> {
    let as_at = given_date(books, "as_at", given.as_at)?;
    if let Some((a, place)) = &as_at {
        if a.value < cutoff {
            bail!(
                "{place}: the as-at date {} is before the cut-off {cutoff}: a close cannot know less than its period; give an as-at date on or after {cutoff}, or leave it out to use every row",
                a.value
            );
        }
    }
    let previous = given_date(books, "previous_as_at", given.previous_as_at)?;
    let opening = window_start.pred_opt().unwrap_or(window_start);
    if let Some((p, place)) = &previous {
        let upto = as_at.as_ref().map(|(a, _)| a.value);
        if p.value < opening || upto.is_some_and(|a| p.value > a) {
            let range = match upto {
                Some(a) => format!("{opening}..{a} (the day before the window to the as-at date)"),
                None => format!("{opening} or later (the day before the window onwards)"),
            };
            bail!(
                "{place}: the previous as-at date {} is outside {range}: the previous close was made at the earliest on the day before this window and cannot know more than this run; give a date in that range, or leave it out",
                p.value
            );
        }
    }
    let shown = |r: &Option<(Resolved<NaiveDate>, String)>, none: &str| match r {
        Some((r, _)) => Resolved {
            value: r.value.to_string(),
            source: r.source,
        },
        None => Resolved {
            value: none.to_string(),
            source: SettingSource::Default,
        },
    };
    listed.record("as_at", &shown(&as_at, "no limit: every row is known"));
    listed.record("previous_as_at", &shown(&previous, "none"));
    Ok(Knowledge {
        as_at: as_at.map(|(a, _)| a.value),
        previous_as_at: previous.map(|(p, _)| p.value),
    })
}

/// When the journal settles a posting: the option, else the books, else
/// `payment-date`; recorded for the Run sheet.
fn settlement_lines(
    books: &[Book],
    option: Option<&str>,
    listed: &mut Listed,
) -> Result<SettlementLines> {
    let r = text(
        books,
        "settlement_lines",
        option,
        SettlementLines::default().name(),
    )?;
    let lines = SettlementLines::parse(&r.value).map_err(|e| match r.source {
        SettingSource::Option => anyhow!("--settlement-lines: {e}"),
        _ => anyhow!("the Settings sheet's settlement_lines: {e}"),
    })?;
    listed.record(
        "settlement_lines",
        &Resolved {
            value: lines.name(),
            source: r.source,
        },
    );
    Ok(lines)
}

/// The `--journal-detail` in force (the command line only), recorded for
/// the Run sheet.
fn journal_detail(given: Option<&str>, listed: &mut Listed) -> Result<DetailOutput> {
    let output = match given {
        Some(v) => DetailOutput::parse(v).map_err(|e| anyhow!("--journal-detail: {e}"))?,
        None => DetailOutput::default(),
    };
    listed.record(
        "journal_detail",
        &Resolved {
            value: output.name(),
            source: if given.is_some() {
                SettingSource::Option
            } else {
                SettingSource::Default
            },
        },
    );
    Ok(output)
}

/// The first day of `d`'s month.
fn month_start(d: NaiveDate) -> NaiveDate {
    d.with_day(1).unwrap_or(d)
}

#[cfg(test)]
mod tests;

/// The wall-clock time of an RFC 3339 timestamp (`2026-12-01T09:00:00Z`,
/// `2026-12-01T09:00:00+01:00`) as written: 09:00:00 in both, the offset
/// dropped and never converted to another zone, as a run's own clock time
/// is the local time. Only whole seconds: the workbook keeps no finer time.
///
/// # Errors
/// When `t` is not RFC 3339, or has a fraction of a second.
pub(crate) fn rfc3339_wall_time(t: &str) -> Result<chrono::NaiveDateTime> {
    use chrono::Timelike;
    let at = chrono::DateTime::parse_from_rfc3339(t)?.naive_local();
    if at.nanosecond() != 0 {
        bail!("a fraction of a second in '{t}'");
    }
    Ok(at)
}
