//! The Settings sheet: one row per setting (cutoff, window_start,
//! tolerance_amount, tolerance_bp, entity, journal_style, statement_end,
//! as_at, previous_as_at, settlement_lines, as the book schema lists them),
//! each value checked against its kind.
//!
//! Settings are book-wide: a bad one is an error of the book, not of an
//! account. This module never applies a setting except `statement_end`,
//! which only says how the Statements sheet is to be read.

use super::model::SettingRow;
use super::sheet::Sheet;
use super::table::{near_miss, Ctx, Fields, Table};
use crate::conventions::names::{fold, lookup, UnknownName};
use crate::engine::ledger::SettlementLines;
use crate::problem::{Problem, Severity};
use crate::schema::{column, Choice, Kind, SETTINGS, SETTING_ROWS};

const SETTING: usize = column!(SETTINGS, "setting");
const VALUE: usize = column!(SETTINGS, "value");

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

/// What a Statements row's `posted_interest` is (behaviour.md, Withholding tax).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub(crate) enum StatementAmounts {
    /// Before withholding tax.
    #[default]
    Gross,
    /// What was credited after tax; `tax_withheld` gives the tax.
    Net,
}

impl StatementAmounts {
    fn name(self) -> &'static str {
        match self {
            StatementAmounts::Gross => "gross",
            StatementAmounts::Net => "net",
        }
    }

    fn parse(s: &str) -> Result<StatementAmounts, UnknownName> {
        lookup(
            "statement amounts",
            s,
            &[
                ("gross", StatementAmounts::Gross),
                ("net", StatementAmounts::Net),
            ],
            &["gross", "net"],
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

/// What the Settings sheet says.
#[derive(Debug, Default)]
pub(crate) struct Settings {
    /// Valid rows, names folded.
    pub rows: Vec<SettingRow>,
    /// How to read Statements.
    pub statement_end: StatementEnd,
    /// Whether Statements amounts are before or after withholding tax.
    pub statement_amounts: StatementAmounts,
}

/// Reads the Settings sheet.
pub(crate) fn read(ctx: Ctx<'_>, sheet: &Sheet, problems: &mut Vec<Problem>) -> Settings {
    let mut out = Settings::default();
    let Some(table) = Table::open(&ctx, sheet, SETTINGS.columns, problems) else {
        return out;
    };
    let mut seen: Vec<(String, String)> = Vec::new();
    for rec in table.records() {
        let mut f = Fields::new(ctx, &table, &rec, problems);
        let Some(raw_name) = f.required_text(SETTING) else {
            continue;
        };
        let key = fold(&raw_name);
        let Some((name, kind)) = SETTING_ROWS
            .iter()
            .find(|s| fold(s.name) == key)
            .map(|s| (s.name, s.kind))
        else {
            let near = SETTING_ROWS
                .iter()
                .find(|s| near_miss(&key, &fold(s.name)))
                .map(|s| s.name);
            let fix = match near {
                Some(n) => format!("did you mean {n}? the row is not used"),
                None => "the row is not used; remove it or correct the name".to_string(),
            };
            let names: Vec<&str> = SETTING_ROWS.iter().map(|s| s.name).collect();
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
        // A kind without a check of its own here is read as text.
        let value = match kind {
            Kind::Date => f.date(VALUE).map(|d| d.to_string()),
            Kind::Amount | Kind::Bp => match f.decimal(VALUE) {
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
            Kind::Choice(Choice::JournalStyle) => f.named(VALUE, journal_style).map(str::to_string),
            Kind::Choice(Choice::SettlementLines) => f
                .named(VALUE, SettlementLines::parse)
                .map(|s| s.name().to_string()),
            Kind::Choice(Choice::StatementEnd) => f.named(VALUE, StatementEnd::parse).map(|s| {
                out.statement_end = s;
                s.name().to_string()
            }),
            Kind::Choice(Choice::StatementAmounts) => {
                f.named(VALUE, StatementAmounts::parse).map(|s| {
                    out.statement_amounts = s;
                    s.name().to_string()
                })
            }
            _ => f.text(VALUE),
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::book::cell::NumberStyle;
    use crate::book::sheet::text_sheet;
    use crate::schema::Example;
    use crate::schema::SheetKind;

    fn ctx() -> Ctx<'static> {
        Ctx {
            book: "book.xlsx",
            style: NumberStyle {
                decimal_comma: false,
            },
        }
    }

    fn read_one(name: &str, value: &str) -> (Settings, Vec<Problem>) {
        let sheet = text_sheet(
            SheetKind::Settings,
            &[&["setting", "value"], &[name, value]],
        );
        let mut problems = Vec::new();
        let settings = read(ctx(), &sheet, &mut problems);
        (settings, problems)
    }

    /// Every setting of the book schema is read: its template example is
    /// taken, and a value of another kind is an error on its cell unless the
    /// setting holds free text.
    #[test]
    fn every_setting_of_the_schema_is_checked_by_its_kind() {
        for spec in SETTING_ROWS {
            let example = match spec.example {
                Example::Text(t) => t.to_string(),
                Example::Date(y, m, d) => format!("{y:04}-{m:02}-{d:02}"),
                Example::Number(mantissa, scale) => {
                    rust_decimal::Decimal::new(mantissa, scale).to_string()
                }
                Example::Blank => panic!("{} has no example", spec.name),
            };
            let (settings, problems) = read_one(spec.name, &example);
            assert!(problems.is_empty(), "{}: {problems:?}", spec.name);
            assert_eq!(settings.rows.len(), 1, "{}", spec.name);

            let (settings, problems) = read_one(spec.name, "not a value?");
            if spec.kind == Kind::Text {
                assert!(problems.is_empty(), "{}: {problems:?}", spec.name);
            } else {
                assert!(settings.rows.is_empty(), "{}", spec.name);
                assert_eq!(problems.len(), 1, "{}: {problems:?}", spec.name);
                assert_eq!(problems[0].position.cell, "B2");
                assert_eq!(problems[0].severity, Severity::Error);
            }
        }
    }

    #[test]
    fn a_statement_end_setting_says_how_statements_are_read() {
        let (settings, problems) = read_one("Statement End", "exclusive");
        assert!(problems.is_empty(), "{problems:?}");
        assert_eq!(settings.statement_end, StatementEnd::Exclusive);
        assert_eq!(settings.rows[0].name, "statementend");
    }
}
