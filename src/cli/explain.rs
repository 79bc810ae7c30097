//! `ledgerate explain BOOK... --account ID`: one account's period day by day
//! at the terminal, expected against posted, and the cause search's findings.

use std::io::Write;

use anyhow::{anyhow, bail, Result};
use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::daycount::parse_iso_date;
use super::inputs::check_books_exist;
use super::settings::{Given, Settings, ToleranceArgs};
use super::{exit, read_books, refuse_unreadable, BookArgs};
use crate::engine::causes::{likely_cause, Account};
use crate::engine::floating::{FixingUsed, FloatingRates};
use crate::engine::rates::RateSource;
use crate::engine::reconcile::{reconcile, StatementPeriod, Status};
use crate::engine::run::{accrue, RunOptions, Sources};
use crate::engine::ActualPosting;

/// Arguments of `explain`.
#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(flatten)]
    books: BookArgs,
    /// The account to explain.
    #[arg(long, value_name = "ID")]
    account: String,
    /// The days to show, START..END (default: the statement periods in the window, else the window).
    #[arg(long, value_name = "START..END")]
    period: Option<String>,
    /// The cut-off date (else the Settings sheet's cutoff, else the period's end).
    #[arg(long, value_name = "DATE")]
    cutoff: Option<String>,
    /// The first day of the window (else the Settings sheet's window_start, else the cut-off's month).
    #[arg(long, value_name = "DATE")]
    window_start: Option<String>,
    #[command(flatten)]
    tolerance: ToleranceArgs,
    /// A missing index fixing: none (an error, the default) or last (use the
    /// last published fixing, with a warning).
    #[arg(long, value_name = "FALLBACK")]
    fixing_fallback: Option<String>,
}

fn parse_period(s: &str) -> Result<(NaiveDate, NaiveDate)> {
    let bad = || anyhow!("--period '{s}' is not START..END: write it like 2026-11-01..2026-11-30");
    let (a, b) = s.split_once("..").ok_or_else(bad)?;
    let (a, b) = (
        parse_iso_date(a).ok_or_else(bad)?,
        parse_iso_date(b).ok_or_else(bad)?,
    );
    if b < a {
        bail!("--period '{s}' ends before it starts");
    }
    Ok((a, b))
}

fn fmt_amount(x: Decimal, places: u32) -> String {
    let mut r = x.round_dp(places);
    r.rescale(places);
    r.to_string()
}

/// Runs the command.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    check_books_exist(&args.books.books)?;
    let books = read_books(&args.books)?;
    refuse_unreadable(&books)?;
    let (book, entry) = books
        .iter()
        .find_map(|b| {
            b.accounts
                .iter()
                .find(|a| a.terms.id == args.account)
                .map(|a| (b, a))
        })
        .ok_or_else(|| {
            let problems: Vec<String> = books
                .iter()
                .flat_map(|b| b.problems.iter())
                .filter(|p| p.account.as_deref() == Some(args.account.as_str()))
                .map(|p| format!("  {p}"))
                .collect();
            if problems.is_empty() {
                anyhow!(
                    "no account '{}' in the books: check the id on the Accounts sheet",
                    args.account
                )
            } else {
                anyhow!(
                    "the account '{}' cannot be computed:\n{}",
                    args.account,
                    problems.join("\n")
                )
            }
        })?;
    let period = args.period.as_deref().map(parse_period).transpose()?;
    let given = Given {
        cutoff: args.cutoff.as_deref(),
        cutoff_default: period.map(|p| p.1),
        window_start: args.window_start.as_deref(),
        fixing_fallback: args.fixing_fallback.as_deref(),
        decimal_comma: args.books.decimal_comma,
        ..Given::default()
    }
    .with_tolerance(&args.tolerance);
    let settings = Settings::resolve(&books, &given)?
        .ok_or_else(|| anyhow!("no cut-off: give --cutoff YYYY-MM-DD or --period START..END"))?;
    let (cutoff, window_start) = (settings.cutoff, settings.window_start);
    let (tol, fallback) = (settings.tolerance, settings.fixing_fallback);
    let t = &entry.terms;
    let floating_schedule = book.floating_rates.get(&entry.rate_ref);
    let floating = floating_schedule.map(|s| FloatingRates {
        schedule: s,
        fixings: &book.fixings,
        fallback,
    });
    let empty = crate::engine::rates::RateSchedule::default();
    let rates = match (book.rates.get(&entry.rate_ref), floating) {
        (_, Some(_)) => &empty,
        (Some(r), None) => r,
        (None, None) => bail!("no Rates rows for rate_ref '{}'", entry.rate_ref),
    };
    let debit = entry
        .debit_rate_ref
        .as_ref()
        .and_then(|r| book.rates.get(r));
    let movements = book.movements.get(&t.id).map_or(&[][..], Vec::as_slice);
    let mut periods: Vec<StatementPeriod> = Vec::new();
    for s in book
        .statements
        .iter()
        .filter(|s| s.account == t.id && s.period_end <= cutoff)
    {
        match periods
            .iter_mut()
            .find(|p| p.start == s.period_start && p.end == s.period_end)
        {
            Some(p) => {
                p.posted += s.posted;
                p.rows += 1;
            }
            None => periods.push(StatementPeriod {
                start: s.period_start,
                end: s.period_end,
                posted: s.posted,
                rows: 1,
            }),
        }
    }
    let actual: Vec<ActualPosting> = periods
        .iter()
        .map(|p| ActualPosting {
            start: p.start,
            end: p.end,
            amount: p.posted,
        })
        .collect();
    let sources = Sources {
        rates,
        debit_rates: debit.map(|d| d as &dyn RateSource),
        movements,
        actual: &actual,
        breaks: &[],
        floating,
    };
    let options = RunOptions {
        window_start,
        cutoff,
        keep_days: true,
        keep_states: true,
        keep_spans: false,
        fast_path: true,
    };
    let r = accrue(t, sources, options).map_err(|e| anyhow!("account {}: {e}", t.id))?;
    let shown = period.unwrap_or_else(|| {
        let in_window: Vec<&StatementPeriod> =
            periods.iter().filter(|p| p.end >= window_start).collect();
        match (
            in_window.iter().map(|p| p.start).min(),
            in_window.iter().map(|p| p.end).max(),
        ) {
            (Some(a), Some(b)) => (a, b),
            _ => (window_start, cutoff),
        }
    });
    let places = t.minor_units;
    writeln!(
        out,
        "account {}{}: {} {}, {}, {} compounding, {} posting{}",
        t.id,
        if entry.name.is_empty() {
            String::new()
        } else {
            format!(" ({})", entry.name)
        },
        t.currency,
        t.side.name(),
        t.basis.name(),
        t.compounding.name(),
        t.posting.name(),
        if t.capitalise { ", capitalised" } else { "" }
    )?;
    if let Some(s) = floating_schedule {
        let fl = t.floating;
        writeln!(
            out,
            "floating: {} on {}, lookback {} business days{}{}, spread {}{}",
            fl.method.name(),
            s.indices().join(", "),
            fl.lookback_days,
            if fl.observation_shift {
                " with observation shift"
            } else {
                ""
            },
            if fl.lockout_days > 0 {
                format!(", lockout {} business days", fl.lockout_days)
            } else {
                String::new()
            },
            if fl.spread_compounded {
                "compounded"
            } else {
                "added"
            },
            if fl.floor_on == crate::engine::FloorOn::AllIn {
                ", floor and cap on the all-in rate"
            } else {
                ""
            },
        )?;
    }
    writeln!(out, "days {}..{} (cut-off {cutoff})", shown.0, shown.1)?;
    writeln!(
        out,
        "{:<10} {:>18} {:>18} {:>9} {:>9} {:>16} {:>16}{}",
        "date",
        "balance",
        "base",
        "rate",
        "fraction",
        "interest",
        "accrued",
        if floating.is_some() {
            "  fixing used"
        } else {
            ""
        }
    )?;
    for d in r
        .days
        .iter()
        .filter(|d| d.date >= shown.0 && d.date <= shown.1)
    {
        let mut rate = (d.rate * Decimal::ONE_HUNDRED).round_dp(4);
        rate.rescale(4);
        writeln!(
            out,
            "{:<10} {:>18} {:>18} {:>8}% {:>9} {:>16} {:>16}{}{}",
            d.date,
            fmt_amount(d.balance, places),
            fmt_amount(d.base, places),
            rate,
            format!("{}/{}", d.fraction.num, d.fraction.den),
            fmt_amount(d.interest, places + 6),
            fmt_amount(d.accrued, places + 6),
            d.fixing.as_ref().map(fixing_words).unwrap_or_default(),
            d.posted
                .map(|p| format!("  posted {}", fmt_amount(p, places)))
                .unwrap_or_default()
        )?;
    }
    for p in r
        .postings
        .iter()
        .filter(|p| p.end >= shown.0 && p.start <= shown.1)
    {
        writeln!(
            out,
            "posting {}..{} paid {}: interest {} expected {}{}{}",
            p.start,
            p.end,
            p.payment,
            fmt_amount(p.interest, places + 6),
            fmt_amount(p.expected, places),
            if p.back_value.is_zero() {
                String::new()
            } else {
                format!(
                    " (of which back-value {})",
                    fmt_amount(p.back_value, places)
                )
            },
            if p.actual_given {
                format!(", statement posted {}", fmt_amount(p.posted, places))
            } else {
                String::new()
            }
        )?;
    }
    let rows =
        reconcile(t, &r, &periods, window_start, cutoff, &tol).map_err(|e| anyhow!("{e}"))?;
    let account = Account {
        terms: t,
        rates,
        debit_rates: debit,
        movements,
        actual: &actual,
        states: &r.states,
        floating,
    };
    for row in rows
        .iter()
        .filter(|x| x.end >= shown.0 && x.start <= shown.1)
    {
        let bp = row
            .variance_bp
            .map_or_else(|| "n/a".to_string(), |b| format!("{:.2}", b.round_dp(2)));
        writeln!(
            out,
            "statement {}..{}: posted {}, expected {}, variance {} ({bp} bp): {}",
            row.start,
            row.end,
            fmt_amount(row.posted, places),
            fmt_amount(row.expected, places),
            fmt_amount(row.variance, places),
            row.status.name()
        )?;
        if matches!(row.status, Status::OverPosted | Status::UnderPosted) {
            writeln!(out, "  likely cause: {}", likely_cause(&account, row, &tol))?;
        }
    }
    if periods.is_empty() {
        writeln!(out, "no statement rows for this account")?;
    }
    for w in &r.fixing_warnings {
        writeln!(
            out,
            "warning: no {} fixing for {}: the {} fixing stood in (--fixing-fallback last)",
            w.index, w.date, w.used
        )?;
    }
    writeln!(
        out,
        "accrued at cut-off {}",
        fmt_amount(r.accrued_at_cutoff, places)
    )?;
    Ok(exit::OK)
}

/// A day's fixing as explain shows it: index, the fixing's own date (after
/// lookback and lockout) and rate in percent, and any stand-in.
fn fixing_words(f: &FixingUsed) -> String {
    let mut pct = (f.rate * Decimal::ONE_HUNDRED).normalize();
    if pct.scale() < 4 {
        pct.rescale(4);
    }
    format!(
        "  {} {} {pct}%{}",
        f.index,
        f.date,
        f.stand_in
            .map(|s| format!(" (not published: the {s} fixing stood in)"))
            .unwrap_or_default()
    )
}
