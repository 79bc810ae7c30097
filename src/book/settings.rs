//! The Settings sheet: one row per setting (cutoff, window_start,
//! tolerance_amount, tolerance_bp, entity, journal_style, statement_end),
//! each value checked against its type.
//!
//! Settings are book-wide: a bad one is an error of the book, not of an
//! account. This module never applies a setting except `statement_end`,
//! which only says how the Statements sheet is to be read.

use super::model::SettingRow;
use super::sheet::Sheet;
use super::table::{near_miss, required, Column, Ctx, Fields, Table};
use crate::conventions::names::{fold, lookup, UnknownName};
use crate::problem::{Problem, Severity};

const COLUMNS: &[Column] = &[required("setting"), required("value")];
const SETTING: usize = 0;
const VALUE: usize = 1;

/// How the Statements sheet writes a period's end.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub(crate) enum StatementEnd {
    /// period_end is the last day of the period.
    #[default]
    Inclusive,
    /// period_end is the first day after the period.
    Exclusive,
}

impl StatementEnd {
    fn name(self) -> &'static str {
        match self {
            StatementEnd::Inclusive => "inclusive",
            StatementEnd::Exclusive => "exclusive",
        }
    }

    fn parse(s: &str) -> Result<StatementEnd, UnknownName> {
        lookup(
            "statement end",
            s,
            &[
                ("inclusive", StatementEnd::Inclusive),
                ("exclusive", StatementEnd::Exclusive),
            ],
            &["inclusive", "exclusive"],
        )
    }
}

/// The journal styles a setting may name.
fn journal_style(s: &str) -> Result<&'static str, UnknownName> {
    lookup(
        "journal style",
        s,
        &[("incremental", "incremental"), ("reversing", "reversing")],
        &["incremental", "reversing"],
    )
}

/// The known settings, with what each value must be.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    Date,
    NonNegative,
    Text,
    JournalStyle,
    StatementEnd,
}

const KNOWN: &[(&str, Kind)] = &[
    ("cutoff", Kind::Date),
    ("window_start", Kind::Date),
    ("tolerance_amount", Kind::NonNegative),
    ("tolerance_bp", Kind::NonNegative),
    ("entity", Kind::Text),
    ("journal_style", Kind::JournalStyle),
    ("statement_end", Kind::StatementEnd),
];

/// What the Settings sheet says.
#[derive(Debug, Default)]
pub(crate) struct Settings {
    /// Valid rows, names folded.
    pub rows: Vec<SettingRow>,
    /// How to read Statements.
    pub statement_end: StatementEnd,
}

/// Reads the Settings sheet.
pub(crate) fn read(ctx: Ctx<'_>, sheet: &Sheet, problems: &mut Vec<Problem>) -> Settings {
    let mut out = Settings::default();
    let Some(table) = Table::open(&ctx, sheet, COLUMNS, problems) else {
        return out;
    };
    let mut seen: Vec<(String, String)> = Vec::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some(raw_name) = f.required_text(SETTING) else {
            continue;
        };
        let key = fold(&raw_name);
        let Some((name, kind)) = KNOWN.iter().find(|(n, _)| fold(n) == key).copied() else {
            let near = KNOWN
                .iter()
                .find(|(n, _)| near_miss(&key, &fold(n)))
                .map(|(n, _)| *n);
            let fix = match near {
                Some(n) => format!("did you mean {n}? the row is not used"),
                None => "the row is not used; remove it or correct the name".to_string(),
            };
            let names: Vec<&str> = KNOWN.iter().map(|(n, _)| *n).collect();
            f.report(
                Severity::Warning,
                SETTING,
                &raw_name,
                &format!("a setting name ({})", names.join(", ")),
                &fix,
            );
            continue;
        };
        let folded = fold(name);
        if let Some((_, first)) = seen.iter().find(|(n, _)| *n == folded) {
            let first = first.clone();
            f.report(
                Severity::Error,
                SETTING,
                &raw_name,
                &format!("each setting once ({name} is already set in {first})"),
                "remove one of the two rows",
            );
            continue;
        }
        seen.push((folded.clone(), f.cell_ref(SETTING)));
        f.subject = Some(name);
        let value = match kind {
            Kind::Date => f.date(VALUE).map(|d| d.to_string()),
            Kind::NonNegative => match f.decimal(VALUE) {
                Some(d) if d.is_sign_negative() && !d.is_zero() => {
                    f.report(
                        Severity::Error,
                        VALUE,
                        &d.to_string(),
                        &format!("a number of zero or more for {name}"),
                        "write the tolerance as a positive number",
                    );
                    None
                }
                other => other.map(|d| d.to_string()),
            },
            Kind::Text => f.text(VALUE),
            Kind::JournalStyle => f.named(VALUE, journal_style).map(str::to_string),
            Kind::StatementEnd => f.named(VALUE, StatementEnd::parse).map(|s| {
                out.statement_end = s;
                s.name().to_string()
            }),
        };
        match value {
            Some(value) => {
                let position = ctx.at(&sheet.name, f.cell_ref(VALUE));
                out.rows.push(SettingRow {
                    name: folded,
                    value,
                    position,
                });
            }
            None if !f.given(VALUE) => {
                f.report(
                    Severity::Error,
                    VALUE,
                    "",
                    &format!("a value for {name}"),
                    &format!("fill in the value of {name}, or remove the row"),
                );
            }
            None => {}
        }
    }
    out
}
