//! Day counts and year fractions compared, pair by pair, with the answers of
//! the reference library.
//!
//! Source: QuantLib 1.44 from PyPI. `tests/quantlib/daycount_vectors.py`
//! draws random date pairs with a fixed seed, asks the library for each
//! pair's day count and year fraction and writes them to
//! `tests/fixtures/quantlib_daycount.tsv` (the file's header names the class
//! used for every basis). `LEDGERATE_QL_VECTORS` points the test at another
//! copy of the file, such as the one `tests/quantlib/check.sh` regenerates
//! live.
//!
//! Day counts must agree exactly; ledgerate's exact fraction, as a decimal,
//! must agree with the library's binary float to 1e-12 (relative above 1,
//! absolute below). NL/365 pairs with a 29 February end point differ by
//! design (behaviour.md, Day count: ledgerate drops the night of 29 February,
//! the library the night of 28 February in leap years); they are left out
//! of the comparison and counted, and each must differ by exactly one day
//! per 29 February end point, as behaviour.md, Day count says.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::PathBuf;
use std::str::FromStr;

use chrono::{Datelike, NaiveDate};
use ledgerate::conventions::calendar::Calendar;
use ledgerate::conventions::daycount::{day_count, year_fraction, Basis, Terms};
use rust_decimal::Decimal;

/// Fewer compared pairs than this for any basis fails the test, so a short
/// or empty file cannot pass.
const MIN_PAIRS_PER_BASIS: usize = 2000;

/// Mismatches shown in the failure message.
const SHOWN: usize = 25;

/// The bases the reference library implements, in the file's order.
const COMPARED: [Basis; 10] = [
    Basis::Act360,
    Basis::Act365F,
    Basis::ActActIsda,
    Basis::ActActIcma,
    Basis::Nl365,
    Basis::Thirty360,
    Basis::Thirty360Us,
    Basis::Thirty360E,
    Basis::Thirty360EIsda,
    Basis::Bus252,
];

const LEFT_OUT_NOTE: &str = "left-out:29-feb-end-point";

#[derive(Debug, Clone)]
enum Extra {
    None,
    Termination(NaiveDate),
    Icma {
        frequency: u32,
        reference: (NaiveDate, NaiveDate),
    },
}

#[derive(Debug, Clone)]
struct Row {
    line: usize,
    basis: Basis,
    d1: NaiveDate,
    d2: NaiveDate,
    extra: Extra,
    ql_days: i64,
    ql_fraction_text: String,
    ql_fraction: Decimal,
    left_out: bool,
}

#[derive(Debug, Default)]
struct Vectors {
    holidays: Vec<NaiveDate>,
    rows: Vec<Row>,
}

fn date(s: &str, line: usize) -> Result<NaiveDate, String> {
    s.parse()
        .map_err(|e| format!("line {line}: bad date {s:?}: {e}"))
}

/// The float text of Python's repr(), as a decimal: plain ("0.5",
/// "-0.002777777777777778") or scientific ("5e-05").
fn float_text(s: &str, line: usize) -> Result<Decimal, String> {
    let parsed = if s.contains(['e', 'E']) {
        Decimal::from_scientific(s)
    } else {
        Decimal::from_str(s)
    };
    parsed.map_err(|e| format!("line {line}: bad year fraction {s:?}: {e}"))
}

fn parse_extra(basis: Basis, s: &str, line: usize) -> Result<Extra, String> {
    match basis {
        Basis::Thirty360EIsda => {
            let t = s.strip_prefix("termination=").ok_or_else(|| {
                format!("line {line}: 30E/360 ISDA needs termination=, got {s:?}")
            })?;
            Ok(Extra::Termination(date(t, line)?))
        }
        Basis::ActActIcma => {
            let bad =
                || format!("line {line}: ACT/ACT ICMA needs frequency=F;reference=A..B, got {s:?}");
            let (f, r) = s.split_once(';').ok_or_else(bad)?;
            let frequency = f
                .strip_prefix("frequency=")
                .and_then(|f| f.parse().ok())
                .ok_or_else(bad)?;
            let (a, b) = r
                .strip_prefix("reference=")
                .and_then(|r| r.split_once(".."))
                .ok_or_else(bad)?;
            Ok(Extra::Icma {
                frequency,
                reference: (date(a, line)?, date(b, line)?),
            })
        }
        _ if s == "-" => Ok(Extra::None),
        _ => Err(format!("line {line}: unexpected extra {s:?} for {basis}")),
    }
}

fn parse(text: &str) -> Result<Vectors, String> {
    let mut v = Vectors::default();
    let mut header_seen = false;
    for (i, raw) in text.lines().enumerate() {
        let line = i + 1;
        if raw.is_empty() || raw.starts_with('#') {
            continue;
        }
        let cols: Vec<&str> = raw.split('\t').collect();
        if !header_seen {
            match cols.as_slice() {
                ["holiday", d] => v.holidays.push(date(d, line)?),
                ["basis", "d1", "d2", "extra", "ql_day_count", "ql_year_fraction", "note"] => {
                    header_seen = true
                }
                _ => {
                    return Err(format!(
                        "line {line}: expected a holiday or the header: {raw:?}"
                    ))
                }
            }
            continue;
        }
        let [basis, d1, d2, extra, days, fraction, note] = cols.as_slice() else {
            return Err(format!("line {line}: expected 7 columns: {raw:?}"));
        };
        let basis = Basis::parse(basis).map_err(|e| format!("line {line}: {e}"))?;
        if basis.name() != *cols.first().unwrap_or(&"") {
            return Err(format!(
                "line {line}: {:?} is not the canonical name {:?}",
                cols[0],
                basis.name()
            ));
        }
        let left_out = match *note {
            "-" => false,
            LEFT_OUT_NOTE if basis == Basis::Nl365 => true,
            other => return Err(format!("line {line}: unexpected note {other:?}")),
        };
        v.rows.push(Row {
            line,
            basis,
            d1: date(d1, line)?,
            d2: date(d2, line)?,
            extra: parse_extra(basis, extra, line)?,
            ql_days: days
                .parse()
                .map_err(|e| format!("line {line}: bad day count {days:?}: {e}"))?,
            ql_fraction_text: fraction.to_string(),
            ql_fraction: float_text(fraction, line)?,
            left_out,
        });
    }
    if !header_seen {
        return Err("no header line".into());
    }
    Ok(v)
}

fn is_feb29(d: NaiveDate) -> bool {
    d.month() == 2 && d.day() == 29
}

fn terms<'a>(row: &Row, calendar: &'a Calendar) -> Terms<'a> {
    let mut t = Terms::default();
    match row.extra {
        Extra::None => {}
        Extra::Termination(d) => t.termination = Some(d),
        Extra::Icma {
            frequency,
            reference,
        } => {
            t.frequency = Some(frequency);
            t.reference = Some(reference);
        }
    }
    if row.basis == Basis::Bus252 {
        t.calendar = Some(calendar);
    }
    t
}

fn describe(row: &Row) -> String {
    let extra = match row.extra {
        Extra::None => String::new(),
        Extra::Termination(d) => format!(" termination {d}"),
        Extra::Icma {
            frequency,
            reference: (a, b),
        } => format!(" frequency {frequency} reference {a}..{b}"),
    };
    format!(
        "line {}: {} {} -> {}{extra}",
        row.line, row.basis, row.d1, row.d2
    )
}

/// Why ledgerate and the library disagree on `row`, if they do.
fn compare(row: &Row, calendar: &Calendar) -> Option<String> {
    let t = terms(row, calendar);
    let days = day_count(row.basis, row.d1, row.d2, &t);
    let fraction = year_fraction(row.basis, row.d1, row.d2, &t);
    let shown = || {
        format!(
            "{}: day count ledgerate {} vs QuantLib {}; year fraction ledgerate {} vs QuantLib {}",
            describe(row),
            match &days {
                Ok(n) => n.to_string(),
                Err(e) => format!("error ({e})"),
            },
            row.ql_days,
            match &fraction {
                Ok(f) => format!(
                    "{f} = {}",
                    f.to_decimal()
                        .map_or("(no decimal)".into(), |d| d.to_string())
                ),
                Err(e) => format!("error ({e})"),
            },
            row.ql_fraction_text
        )
    };
    if row.left_out {
        // Differs by design: one day per 29 February end point, the library
        // counting one more night from a 29 February start and one fewer to
        // a 29 February end (behaviour.md, Day count).
        let offset = i64::from(is_feb29(row.d1)) - i64::from(is_feb29(row.d2));
        return match days {
            Ok(n) if row.ql_days - n == offset => None,
            _ => Some(format!(
                "{} (left out, expected QuantLib - ledgerate = {offset})",
                shown()
            )),
        };
    }
    let ours = fraction.as_ref().ok().and_then(|f| f.to_decimal());
    let tolerance = Decimal::new(1, 12) * Decimal::ONE.max(row.ql_fraction.abs());
    let fraction_ok = ours.is_some_and(|f| (f - row.ql_fraction).abs() <= tolerance);
    if days.as_ref().ok() == Some(&row.ql_days) && fraction_ok {
        None
    } else {
        Some(shown())
    }
}

#[derive(Debug, Default)]
struct Tally {
    compared: usize,
    mismatches: usize,
    left_out: usize,
}

fn vectors_path() -> PathBuf {
    match std::env::var_os("LEDGERATE_QL_VECTORS") {
        Some(p) if !p.is_empty() => PathBuf::from(p),
        _ => PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/quantlib_daycount.tsv"),
    }
}

#[test]
fn day_counts_agree_with_the_reference_library() {
    let path = vectors_path();
    let text = std::fs::read_to_string(&path)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
    let vectors = parse(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    assert!(
        !vectors.holidays.is_empty(),
        "{}: no BUS/252 holidays",
        path.display()
    );
    let calendar = Calendar::new("vectors", vectors.holidays.iter().copied());

    let mut tally: BTreeMap<&'static str, Tally> = BTreeMap::new();
    let mut failures = Vec::new();
    for row in &vectors.rows {
        let t = tally.entry(row.basis.name()).or_default();
        if row.left_out {
            t.left_out += 1;
        } else {
            t.compared += 1;
        }
        if let Some(why) = compare(row, &calendar) {
            if !row.left_out {
                t.mismatches += 1;
            }
            failures.push(why);
        }
    }

    println!("vectors: {}", path.display());
    let mut short = Vec::new();
    for basis in COMPARED {
        let t = tally.remove(basis.name()).unwrap_or_default();
        println!(
            "{}: {} pairs, {} mismatches",
            basis.name(),
            t.compared,
            t.mismatches
        );
        if basis == Basis::Nl365 {
            println!(
                "NL/365: {} pairs with a 29 February end point left out (differ by design)",
                t.left_out
            );
        }
        if t.compared < MIN_PAIRS_PER_BASIS {
            short.push(format!("{}: {} pairs", basis.name(), t.compared));
        }
    }
    assert!(
        tally.is_empty(),
        "bases the comparison does not expect: {:?}",
        tally.keys().collect::<Vec<_>>()
    );
    assert!(
        short.is_empty(),
        "fewer than {MIN_PAIRS_PER_BASIS} compared pairs: {}",
        short.join(", ")
    );
    if !failures.is_empty() {
        let mut msg = format!(
            "{} of {} rows disagree with the reference library; the first {}:\n",
            failures.len(),
            vectors.rows.len(),
            failures.len().min(SHOWN)
        );
        for f in failures.iter().take(SHOWN) {
            let _ = writeln!(msg, "  {f}");
        }
        panic!("{msg}");
    }
}

/// The comparison itself must catch a wrong day count, a wrong fraction and
/// a left-out pair whose difference is not the one the spec describes.
#[test]
fn a_doctored_row_is_reported() {
    let good = "holiday\t2026-12-25\n\
        basis\td1\td2\textra\tql_day_count\tql_year_fraction\tnote\n\
        ACT/ACT ISDA\t2003-11-01\t2004-05-01\t-\t182\t0.49772438056740775\t-\n\
        BUS/252\t2026-12-21\t2026-12-28\t-\t4\t0.015873015873015872\t-\n\
        30E/360 ISDA\t2007-08-31\t2008-02-29\ttermination=2008-02-29\t179\t0.49722222222222223\t-\n\
        ACT/ACT ICMA\t2000-01-30\t2000-06-30\tfrequency=2;reference=2000-01-30..2000-07-30\t152\t0.4175824175824176\t-\n\
        NL/365\t2007-12-28\t2008-02-29\t-\t62\t0.16986301369863013\tleft-out:29-feb-end-point\n";
    let v = parse(good).unwrap();
    let cal = Calendar::new("t", v.holidays.iter().copied());
    for row in &v.rows {
        assert_eq!(compare(row, &cal), None, "{row:?}");
    }
    let doctored = [
        good.replace("\t182\t", "\t183\t"),
        good.replace("0.49772438056740775", "0.49772438057740775"),
        good.replace("termination=2008-02-29\t179", "termination=2008-03-01\t179"),
        good.replace("\t62\t0.1698", "\t63\t0.1698"),
    ];
    for text in doctored {
        let v = parse(&text).unwrap();
        assert!(
            v.rows.iter().any(|r| compare(r, &cal).is_some()),
            "not caught:\n{text}"
        );
    }
}
