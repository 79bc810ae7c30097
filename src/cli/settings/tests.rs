//! Settings resolution: the command line, else a book's Settings sheet, else
//! the default; each setting listed for the Run sheet with where it came from.

use super::*;
use crate::book::SettingRow;
use crate::problem::Position;

fn day(s: &str) -> NaiveDate {
    s.parse().unwrap()
}

/// A book whose Settings sheet has `rows` (names folded, as the reader keeps them).
fn book(path: &str, rows: &[(&str, &str)]) -> Book {
    Book {
        path: path.into(),
        settings: rows
            .iter()
            .zip(2..)
            .map(|((name, value), row)| SettingRow {
                name: (*name).into(),
                value: (*value).into(),
                position: Position {
                    book: path.into(),
                    sheet: "Settings".into(),
                    cell: format!("B{row}"),
                    ..Default::default()
                },
            })
            .collect(),
        ..Book::default()
    }
}

fn resolve(books: &[Book], given: Given<'_>) -> Settings {
    Settings::resolve(books, &given).unwrap().unwrap()
}

fn listed(s: &Settings, name: &str) -> (String, SettingSource) {
    let found = s.listed.iter().find(|x| x.name == name).unwrap();
    (found.value.clone(), found.source)
}

#[test]
fn the_command_line_comes_before_the_settings_sheet() {
    let books = [book(
        "a.xlsx",
        &[
            ("cutoff", "2026-11-30"),
            ("windowstart", "2026-11-15"),
            ("journalstyle", "reversing"),
            ("tolerancebp", "2"),
            ("entity", "HM"),
        ],
    )];
    let s = resolve(
        &books,
        Given {
            cutoff: Some("2026-10-31"),
            window_start: Some("2026-10-01"),
            journal_style: Some("incremental"),
            tolerance_bp: Some("0.5"),
            entity: Some("GROUP"),
            ..Given::default()
        },
    );
    assert_eq!(s.cutoff, day("2026-10-31"));
    assert_eq!(s.window_start, day("2026-10-01"));
    assert_eq!(s.journal_style, JournalStyle::Incremental);
    assert_eq!(s.tolerance.bp, "0.5".parse::<Decimal>().unwrap());
    assert_eq!(s.entities, ["GROUP"]);
    for name in [
        "cutoff",
        "window_start",
        "journal_style",
        "tolerance_bp",
        "entity",
    ] {
        assert_eq!(listed(&s, name).1, SettingSource::Option, "{name}");
    }
}

#[test]
fn the_settings_sheet_comes_before_the_default() {
    let books = [book(
        "a.xlsx",
        &[
            ("cutoff", "2026-11-30"),
            ("windowstart", "2026-11-15"),
            ("journalstyle", "reversing"),
            ("toleranceamount", "0.05"),
            ("entity", "HM"),
        ],
    )];
    let s = resolve(&books, Given::default());
    assert_eq!(s.cutoff, day("2026-11-30"));
    assert_eq!(s.window_start, day("2026-11-15"));
    assert_eq!(s.journal_style, JournalStyle::Reversing);
    assert_eq!(s.tolerance.amount, Some("0.05".parse().unwrap()));
    assert_eq!(s.entities, ["HM"]);
    assert_eq!(
        listed(&s, "cutoff"),
        ("2026-11-30".into(), SettingSource::Book)
    );
    assert_eq!(listed(&s, "entity"), ("HM".into(), SettingSource::Book));
    assert_eq!(
        listed(&s, "tolerance_amount"),
        ("0.05".into(), SettingSource::Book)
    );
    // A cut-off default (explain's period end) does not outrank the sheet.
    let s = resolve(
        &books,
        Given {
            cutoff_default: Some(day("2026-10-31")),
            ..Given::default()
        },
    );
    assert_eq!(s.cutoff, day("2026-11-30"));
}

#[test]
fn without_either_the_default_holds_and_is_listed_as_such() {
    let books = [book("a.xlsx", &[])];
    let s = resolve(
        &books,
        Given {
            cutoff: Some("2026-11-30"),
            ..Given::default()
        },
    );
    assert_eq!(s.window_start, day("2026-11-01"), "the cut-off's month");
    assert_eq!(s.journal_style, JournalStyle::Incremental);
    assert_eq!(s.tolerance, Tolerance::default());
    assert_eq!(s.fixing_fallback, FixingFallback::None);
    assert_eq!(s.entities, ["default"]);
    assert!(s.fast_path && !s.daily && !s.fail_on_variance);
    assert_eq!(s.shard, None);
    let names: Vec<(&str, &str)> = s
        .listed
        .iter()
        .map(|x| (x.name.as_str(), x.source.name()))
        .collect();
    // The Run sheet's order.
    assert_eq!(
        names,
        [
            ("cutoff", "command line"),
            ("window_start", "default"),
            ("entity", "default"),
            ("journal_style", "default"),
            ("journal_detail", "default"),
            ("daily", "default"),
            ("decimal_comma", "default"),
            ("statement_end", "default"),
            ("fail_on_variance", "default"),
            ("tolerance_amount", "default"),
            ("tolerance_bp", "default"),
            ("fixing_fallback", "default"),
        ]
    );
    assert_eq!(
        listed(&s, "tolerance_amount").0,
        "one minor unit of each row's currency"
    );
}

#[test]
fn no_cut_off_anywhere_resolves_to_nothing_and_a_default_fills_in() {
    let books = [book("a.xlsx", &[("entity", "HM")])];
    assert!(Settings::resolve(&books, &Given::default())
        .unwrap()
        .is_none());
    let s = resolve(
        &books,
        Given {
            cutoff_default: Some(day("2026-10-31")),
            ..Given::default()
        },
    );
    assert_eq!(s.cutoff, day("2026-10-31"));
    assert_eq!(listed(&s, "cutoff").1, SettingSource::Default);
}

#[test]
fn each_book_books_its_own_entity_unless_the_command_line_names_one() {
    let books = [
        book("a.xlsx", &[("cutoff", "2026-11-30"), ("entity", "NORTH")]),
        book("b.xlsx", &[("cutoff", "2026-11-30")]),
    ];
    let s = resolve(&books, Given::default());
    assert_eq!(s.entities, ["NORTH", "default"]);
    assert_eq!(
        listed(&s, "entity of a.xlsx"),
        ("NORTH".into(), SettingSource::Book)
    );
    assert_eq!(
        listed(&s, "entity of b.xlsx"),
        ("default".into(), SettingSource::Default)
    );
    let s = resolve(
        &books,
        Given {
            entity: Some("GROUP"),
            ..Given::default()
        },
    );
    assert_eq!(s.entities, ["GROUP", "GROUP"]);
}

#[test]
fn books_that_disagree_need_the_command_line() {
    let books = [
        book("a.xlsx", &[("cutoff", "2026-11-30")]),
        book("b.xlsx", &[("cutoff", "2026-10-31")]),
    ];
    let err = Settings::resolve(&books, &Given::default()).unwrap_err();
    assert_eq!(
        err.to_string(),
        "the books disagree on the setting cutoff: '2026-11-30' at a.xlsx Settings!B2 and \
         '2026-10-31' at b.xlsx Settings!B2; give --cutoff on the command line or make them agree"
    );
    let s = resolve(
        &books,
        Given {
            cutoff: Some("2026-11-30"),
            ..Given::default()
        },
    );
    assert_eq!(s.cutoff, day("2026-11-30"));
}

#[test]
fn bad_values_are_refused_with_the_way_to_write_them() {
    let books = [book("a.xlsx", &[])];
    let err = |given: Given<'_>| Settings::resolve(&books, &given).unwrap_err().to_string();
    let cutoff = |extra: Given<'static>| Given {
        cutoff: Some("2026-11-30"),
        ..extra
    };
    assert_eq!(
        err(Given {
            cutoff: Some("30/11/2026"),
            ..Given::default()
        }),
        "--cutoff '30/11/2026' is not an ISO date (YYYY-MM-DD): write 2026-11-30 if that is the date meant"
    );
    assert_eq!(
        err(cutoff(Given {
            window_start: Some("2026-12-01"),
            ..Given::default()
        })),
        "the window starts on 2026-12-01 after the cut-off 2026-11-30: the window must end on the cut-off"
    );
    assert!(err(cutoff(Given {
        tolerance_bp: Some("-1"),
        ..Given::default()
    }))
    .contains("is negative"));
    assert!(err(cutoff(Given {
        shard: Some("5/4"),
        ..Given::default()
    }))
    .contains("is not K/N"));
    assert!(err(cutoff(Given {
        fixing_fallback: Some("sometimes"),
        ..Given::default()
    }))
    .starts_with("--fixing-fallback: "));
}

#[test]
fn a_shard_is_listed_and_handed_to_the_batch() {
    let books = [book("a.xlsx", &[])];
    let s = resolve(
        &books,
        Given {
            cutoff: Some("2026-11-30"),
            shard: Some("2/8"),
            daily: true,
            no_fast_path: true,
            ..Given::default()
        },
    );
    assert_eq!(listed(&s, "shard"), ("2/8".into(), SettingSource::Option));
    let batch = s.batch();
    assert_eq!(batch.shard, Some((2, 8)));
    assert!(batch.daily && !batch.fast_path);
    assert_eq!(
        (batch.cutoff, batch.window_start),
        (day("2026-11-30"), day("2026-11-01"))
    );
}
