//! Tests of the book schema: its sheets and columns agree with books.md and
//! with themselves (unique names, defaults and examples of the column's kind).

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::*;

fn all_columns() -> impl Iterator<Item = (&'static SheetSpec, &'static Column)> {
    SheetKind::ALL
        .into_iter()
        .map(SheetKind::spec)
        .flat_map(|s| s.columns.iter().map(move |c| (s, c)))
}

/// Whether `value` is a value a cell of kind `kind` may hold.
fn fits(kind: Kind, value: &str) -> bool {
    match kind {
        Kind::Id | Kind::Text => !value.trim().is_empty(),
        Kind::Date => NaiveDate::parse_from_str(value, "%Y-%m-%d").is_ok(),
        Kind::Amount | Kind::Percent | Kind::Decimal | Kind::Bp => value.parse::<Decimal>().is_ok(),
        Kind::Whole => value.parse::<u32>().is_ok(),
        Kind::Choice(choice) => choice.names().contains(&value),
    }
}

/// Whether an example value is one a cell of kind `kind` may hold.
fn example_fits(kind: Kind, example: Example) -> bool {
    match example {
        Example::Blank => true,
        Example::Text(t) => fits(kind, t) && !matches!(kind, Kind::Date | Kind::Whole),
        Example::Date(y, m, d) => kind == Kind::Date && NaiveDate::from_ymd_opt(y, m, d).is_some(),
        Example::Number(mantissa, scale) => {
            Decimal::try_new(mantissa, scale).is_ok()
                && matches!(
                    kind,
                    Kind::Amount | Kind::Percent | Kind::Decimal | Kind::Bp | Kind::Whole
                )
        }
    }
}

/// books.md: the sheets of a book, in its order; only Accounts and Rates
/// are required.
#[test]
fn the_sheets_are_those_of_books_md_in_order() {
    let names: Vec<&str> = SheetKind::ALL.iter().map(|k| k.label()).collect();
    assert_eq!(
        names,
        [
            "Accounts",
            "Rates",
            "Movements",
            "Statements",
            "Booked",
            "Trial balance",
            "Fixings",
            "Holidays",
            "Settings",
            "Tax",
            "Accrual status"
        ]
    );
    let required: Vec<SheetKind> = SheetKind::ALL
        .into_iter()
        .filter(|k| k.required())
        .collect();
    assert_eq!(required, [SheetKind::Accounts, SheetKind::Rates]);
    for kind in SheetKind::ALL {
        assert_eq!(kind.spec().kind, kind, "{kind:?}");
        assert_eq!(
            SheetKind::from_name(&kind.label().to_uppercase()),
            Some(kind)
        );
    }
}

/// books.md: the required columns of each sheet (Rates needs a rate column
/// too, but any one of three, so none of them is required alone).
#[test]
fn the_required_columns_are_those_of_books_md() {
    let required = |kind: SheetKind| -> Vec<&str> {
        kind.spec()
            .columns
            .iter()
            .filter(|c| c.required)
            .map(|c| c.name)
            .collect()
    };
    assert_eq!(
        required(SheetKind::Accounts),
        [
            "account",
            "currency",
            "day_count",
            "open_date",
            "opening_balance"
        ]
    );
    assert_eq!(required(SheetKind::Rates), ["rate_ref", "effective"]);
    assert_eq!(
        required(SheetKind::Movements),
        ["account", "value_date", "amount"]
    );
    assert_eq!(
        required(SheetKind::Statements),
        ["account", "period_start", "period_end", "posted_interest"]
    );
    assert_eq!(
        required(SheetKind::Booked),
        ["account", "date", "open_item"]
    );
    assert_eq!(
        required(SheetKind::TrialBalance),
        ["entity", "currency", "gl_account", "date", "balance"]
    );
    assert_eq!(
        required(SheetKind::Fixings),
        ["index", "date", "rate_percent"]
    );
    assert_eq!(required(SheetKind::Holidays), ["calendar", "date"]);
    assert_eq!(required(SheetKind::Settings), ["setting", "value"]);
}

/// Headers match with case, spaces, `_` and `-` ignored, so no two columns
/// of a sheet may fold to the same name; each is found at its own place.
#[test]
fn each_column_is_one_header_and_found_at_its_place() {
    for kind in SheetKind::ALL {
        let spec = kind.spec();
        for (i, c) in spec.columns.iter().enumerate() {
            assert_eq!(spec.position(c.name), Some(i), "{}.{}", spec.name, c.name);
            assert_eq!(spec.column(c.name), Some(c));
            let alike = spec
                .columns
                .iter()
                .filter(|o| fold(o.name) == fold(c.name))
                .count();
            assert_eq!(alike, 1, "{}.{}", spec.name, c.name);
        }
        assert_eq!(spec.position("no_such_column"), None);
    }
}

/// A required column has no default: a blank cell in it is an error.
#[test]
fn a_required_column_has_no_default() {
    for (sheet, c) in all_columns().filter(|(_, c)| c.required) {
        assert_eq!(c.if_blank, IfBlank::Nothing, "{}.{}", sheet.name, c.name);
    }
}

/// A default is a value the column could hold: a listed name of its
/// choice, a whole number, a number, a date.
#[test]
fn every_default_is_a_value_of_its_column_kind() {
    let mut seen = 0;
    for (sheet, c) in all_columns() {
        if let IfBlank::Means(value) = c.if_blank {
            seen += 1;
            assert!(fits(c.kind, value), "{}.{}: {value}", sheet.name, c.name);
        }
    }
    assert!(seen >= 10, "{seen} defaults");
    // The test itself tells a bad default from a good one.
    assert!(!fits(Kind::Choice(Choice::Posting), "weekly"));
    assert!(!fits(Kind::Whole, "-1"));
    assert!(!fits(Kind::Amount, "ten"));
}

/// The template's examples are values their columns could hold, and a
/// choice's example is one of its listed names.
#[test]
fn every_example_is_a_value_of_its_column_kind() {
    for (sheet, c) in all_columns() {
        assert!(
            example_fits(c.kind, c.example),
            "{}.{}: {:?}",
            sheet.name,
            c.name,
            c.example
        );
    }
    for s in SETTING_ROWS {
        assert!(
            example_fits(s.kind, s.example),
            "{}: {:?}",
            s.name,
            s.example
        );
    }
    assert!(!example_fits(
        Kind::Choice(Choice::Side),
        Example::Text("deposit")
    ));
    assert!(!example_fits(Kind::Amount, Example::Date(2024, 1, 1)));
}

/// books.md: the rows of the Settings sheet.
#[test]
fn the_settings_are_those_of_books_md() {
    let names: Vec<&str> = SETTING_ROWS.iter().map(|s| s.name).collect();
    assert_eq!(
        names,
        [
            "cutoff",
            "window_start",
            "tolerance_amount",
            "tolerance_bp",
            "entity",
            "journal_style",
            "statement_end",
            "as_at",
            "previous_as_at",
            "settlement_lines",
            "statement_amounts"
        ]
    );
}

#[test]
fn the_lists_offer_the_canonical_names() {
    assert_eq!(
        Choice::DayCount.names(),
        vec![
            "ACT/360",
            "ACT/365F",
            "ACT/365L",
            "ACT/ACT ISDA",
            "ACT/ACT ICMA",
            "NL/365",
            "30/360",
            "30/360 US",
            "30E/360",
            "30E/360 ISDA",
            "BUS/252"
        ]
    );
    assert_eq!(
        Choice::Compounding.names(),
        vec![
            "simple",
            "daily",
            "monthly",
            "quarterly",
            "semiannual",
            "annual",
            "continuous",
            "annual-effective"
        ]
    );
    assert_eq!(
        Choice::Posting.names(),
        vec![
            "monthly",
            "quarterly",
            "semiannual",
            "annual",
            "maturity",
            "none"
        ]
    );
    assert_eq!(
        Choice::BusinessDay.names(),
        vec![
            "unadjusted",
            "following",
            "modified-following",
            "preceding",
            "modified-preceding"
        ]
    );
    assert_eq!(
        Choice::RoundMode.names(),
        vec!["half-up", "half-even", "down", "up"]
    );
    assert_eq!(Choice::Side.names(), vec!["liability", "asset"]);
    assert_eq!(
        Choice::SettlementLines.names(),
        vec!["payment-date", "in-window", "period-end"]
    );
}

#[test]
fn a_layout_writes_the_columns_it_names_in_its_order() {
    const SOME: Layout = layout!(ACCOUNTS, "opening_balance", "account", "gl_settlement");
    assert_eq!(
        SOME.labels(),
        ["opening_balance", "account", "gl_settlement"]
    );
    assert_eq!(SOME.name(), "Accounts");
    let every = Layout::every(SheetKind::Statements);
    let all: Vec<&str> = STATEMENTS.columns.iter().map(|c| c.name).collect();
    assert_eq!(every.labels(), all);
}
