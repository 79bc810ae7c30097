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
            ("as_at", "default"),
            ("previous_as_at", "default"),
            ("settlement_lines", "default"),
            ("statement_amounts", "default"),
        ]
    );
    assert_eq!(s.as_at, None);
    assert_eq!(s.previous_as_at, None);
    assert_eq!(s.settlement_lines, SettlementLines::PaymentDate);
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

/// Knowledge date: the as-at date and the previous close's come from the
/// command line, else the Settings sheet, and are listed with their source.
#[test]
fn the_knowledge_dates_and_settlement_lines_resolve_like_any_setting() {
    let books = [book(
        "a.xlsx",
        &[
            ("cutoff", "2026-11-30"),
            ("asat", "2026-12-03"),
            ("previousasat", "2026-11-03"),
            ("settlementlines", "period-end"),
        ],
    )];
    let s = resolve(&books, Given::default());
    assert_eq!(s.as_at, Some(day("2026-12-03")));
    assert_eq!(s.previous_as_at, Some(day("2026-11-03")));
    assert_eq!(s.settlement_lines, SettlementLines::PeriodEnd);
    assert_eq!(
        listed(&s, "as_at"),
        ("2026-12-03".into(), SettingSource::Book)
    );
    assert_eq!(
        listed(&s, "settlement_lines"),
        ("period-end".into(), SettingSource::Book)
    );
    let s = resolve(
        &books,
        Given {
            as_at: Some("2026-12-05"),
            previous_as_at: Some("2026-10-31"),
            settlement_lines: Some("in-window"),
            ..Given::default()
        },
    );
    assert_eq!(s.as_at, Some(day("2026-12-05")));
    assert_eq!(s.previous_as_at, Some(day("2026-10-31")), "F-1 itself");
    assert_eq!(s.settlement_lines, SettlementLines::InWindow);
    let batch = s.batch();
    assert_eq!(
        (batch.as_at, batch.previous_as_at, batch.settlement_lines),
        (s.as_at, s.previous_as_at, s.settlement_lines)
    );
    assert_eq!(
        listed(&s, "previous_as_at"),
        ("2026-10-31".into(), SettingSource::Option)
    );
}

/// Knowledge date: an as-at date before the cut-off is a usage error naming
/// the option or the Settings cell: a close cannot know less than its period.
#[test]
fn an_as_at_date_before_the_cutoff_is_refused_where_it_was_given() {
    let books = [book("a.xlsx", &[("cutoff", "2026-11-30")])];
    let e = Settings::resolve(
        &books,
        &Given {
            as_at: Some("2026-11-29"),
            ..Given::default()
        },
    )
    .unwrap_err()
    .to_string();
    assert!(
        e.starts_with("--as-at: the as-at date 2026-11-29 is before the cut-off 2026-11-30"),
        "{e}"
    );
    assert!(
        e.contains("a close cannot know less than its period"),
        "{e}"
    );
    assert!(e.contains("on or after 2026-11-30"), "{e}");

    let books = [book(
        "a.xlsx",
        &[("cutoff", "2026-11-30"), ("asat", "2026-11-15")],
    )];
    let e = Settings::resolve(&books, &Given::default())
        .unwrap_err()
        .to_string();
    assert!(
        e.starts_with("the Settings sheet's as_at (a.xlsx Settings!B3): the as-at date 2026-11-15"),
        "{e}"
    );
    // The cut-off itself is a close on its own last day.
    let s = resolve(
        &books,
        Given {
            as_at: Some("2026-11-30"),
            ..Given::default()
        },
    );
    assert_eq!(s.as_at, Some(day("2026-11-30")));
}

/// Knowledge date: the previous close's as-at date lies in F-1..A; without
/// an as-at date only F-1 bounds it.
#[test]
fn a_previous_as_at_date_outside_the_day_before_the_window_to_as_at_is_refused() {
    let books = [book("a.xlsx", &[("cutoff", "2026-11-30")])];
    let try_with = |previous: &'static str, as_at: Option<&'static str>| {
        Settings::resolve(
            &books,
            &Given {
                previous_as_at: Some(previous),
                as_at,
                ..Given::default()
            },
        )
        .map(|s| s.unwrap().previous_as_at)
        .map_err(|e| e.to_string())
    };
    let early = try_with("2026-10-30", None).unwrap_err();
    assert!(
        early.starts_with(
            "--previous-as-at: the previous as-at date 2026-10-30 is outside 2026-10-31 or later"
        ),
        "{early}"
    );
    let late = try_with("2026-12-04", Some("2026-12-03")).unwrap_err();
    assert!(
        late.contains(
            "is outside 2026-10-31..2026-12-03 (the day before the window to the as-at date)"
        ),
        "{late}"
    );
    assert!(late.contains("leave it out"), "{late}");
    assert_eq!(
        try_with("2026-10-31", Some("2026-12-03")),
        Ok(Some(day("2026-10-31")))
    );
    assert_eq!(
        try_with("2026-12-03", Some("2026-12-03")),
        Ok(Some(day("2026-12-03")))
    );
    assert_eq!(try_with("2027-03-01", None), Ok(Some(day("2027-03-01"))));
}

#[test]
fn an_unknown_settlement_lines_word_names_the_option_and_the_words() {
    let books = [book("a.xlsx", &[("cutoff", "2026-11-30")])];
    let e = Settings::resolve(
        &books,
        &Given {
            settlement_lines: Some("payment"),
            ..Given::default()
        },
    )
    .unwrap_err()
    .to_string();
    assert!(e.starts_with("--settlement-lines: "), "{e}");
    for word in ["payment-date", "in-window", "period-end"] {
        assert!(e.contains(word), "{word} missing from {e}");
    }
}
