//! `ledgerate daycount BASIS FROM TO`: the days and year fraction between two
//! dates, for the user who wants to check one period by hand.

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{anyhow, bail, Context, Result};
use chrono::NaiveDate;

use super::exit;
use crate::conventions::calendar::Calendar;
use crate::conventions::daycount::{day_count, months_per_period, year_fraction, Basis, Terms};

/// Arguments of `daycount`.
#[derive(Debug, clap::Args)]
#[command(
    after_help = "Bases: ACT/360, ACT/365F, ACT/365L, ACT/ACT ISDA, ACT/ACT ICMA, NL/365, 30/360, \
30/360 US, 30E/360, 30E/360 ISDA, BUS/252 (case and spaces do not matter: act/act-isda works).\n\n\
Examples:\n  ledgerate daycount ACT/360 2026-11-01 2026-12-01\n  \
ledgerate daycount \"30E/360 ISDA\" 2011-08-31 2012-02-29 --maturity 2012-02-29\n  \
ledgerate daycount \"ACT/ACT ICMA\" 2003-11-01 2004-05-01 --frequency 2 \
--reference-start 2003-11-01 --reference-end 2004-05-01 --json"
)]
pub struct Args {
    /// Day-count basis, for example ACT/360 or "30E/360 ISDA".
    basis: String,
    /// First date (ISO, YYYY-MM-DD).
    from: String,
    /// Second date (ISO, YYYY-MM-DD); the period is FROM up to but not including TO.
    to: String,
    /// 30E/360 ISDA: the maturity (termination) date.
    #[arg(long, value_name = "DATE")]
    maturity: Option<String>,
    /// ACT/ACT ICMA: periods a year (1, 2, 3, 4, 6 or 12).
    #[arg(long, value_name = "N")]
    frequency: Option<u32>,
    /// ACT/ACT ICMA: start of the regular reference period.
    #[arg(long, value_name = "DATE", requires = "reference_end")]
    reference_start: Option<String>,
    /// ACT/ACT ICMA: end of the regular reference period.
    #[arg(long, value_name = "DATE", requires = "reference_start")]
    reference_end: Option<String>,
    /// BUS/252: holiday file, one ISO date a line (# starts a comment; an empty file means weekends only).
    #[arg(long, value_name = "FILE")]
    calendar: Option<PathBuf>,
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

fn date(what: &str, s: &str) -> Result<NaiveDate> {
    parse_date_option(what, s)
}

/// A date given on the command line (`what` is the option or argument):
/// strict ISO only. Other text is refused with what was found and, when it
/// reads one way only (the year first, or a day above 12), the ISO form;
/// when day and month are both 12 or below, both readings, unpicked.
pub(crate) fn parse_date_option(what: &str, s: &str) -> Result<NaiveDate> {
    if let Some(d) = parse_iso_date(s) {
        return Ok(d);
    }
    let readings = crate::book::cell::date_readings(s);
    match readings.as_slice() {
        [d] => bail!("{what} '{s}' is not an ISO date (YYYY-MM-DD): write {d} if that is the date meant"),
        [a, b] => bail!(
            "{what} '{s}' is not an ISO date (YYYY-MM-DD), and it reads as {a} (day first) or {b} (month first); the order is never guessed: write the one meant as YYYY-MM-DD"
        ),
        _ => bail!("{what} '{s}' is not an ISO date: write it as YYYY-MM-DD, for example 2026-11-30"),
    }
}

/// Parses a strict ISO date (YYYY-MM-DD), nothing before or after.
pub(crate) fn parse_iso_date(s: &str) -> Option<NaiveDate> {
    // The same strict ISO rule the book reader applies to date text.
    crate::book::cell::parse_iso_date(s.trim())
}

/// The largest holiday file read, in bytes: a century of holidays of several
/// markets takes a few tens of kilobytes.
const CALENDAR_LIMIT: u64 = 1 << 20;

/// Reads a holiday file: one ISO date a line, blank lines and `#` comments
/// skipped. Only a regular file of at most [`CALENDAR_LIMIT`] bytes is read.
pub(crate) fn read_calendar(path: &Path) -> Result<Calendar> {
    use std::io::Read;
    let meta = std::fs::metadata(path)
        .with_context(|| format!("cannot read the calendar file {}", path.display()))?;
    if !meta.is_file() {
        let kind = crate::files::special_kind(path).unwrap_or("a folder");
        bail!(
            "the calendar file {} is {kind}, not a file: give a text file with one ISO date a line",
            path.display()
        );
    }
    let mut text = String::new();
    std::fs::File::open(path)
        .and_then(|f| f.take(CALENDAR_LIMIT + 1).read_to_string(&mut text))
        .with_context(|| {
            format!(
                "cannot read the calendar file {} as UTF-8 text",
                path.display()
            )
        })?;
    if text.len() as u64 > CALENDAR_LIMIT {
        bail!(
            "the calendar file {} is larger than {} KiB: a holiday list is one ISO date a line; check that this is the right file",
            path.display(),
            CALENDAR_LIMIT / 1024
        );
    }
    let mut dates = Vec::new();
    for (i, line) in text.lines().enumerate() {
        let content = line.split('#').next().unwrap_or("").trim();
        if content.is_empty() {
            continue;
        }
        match parse_iso_date(content) {
            Some(d) => dates.push(d),
            None => bail!(
                "{} line {}: found '{}', expected one ISO date (YYYY-MM-DD); fix the line or start it with #",
                path.display(),
                i + 1,
                content
            ),
        }
    }
    let name = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    Ok(Calendar::new(&name, dates))
}

/// Runs the command; writes the answer to `out`.
pub fn run(args: &Args, out: &mut dyn Write) -> Result<u8> {
    let basis = Basis::parse(&args.basis).map_err(|e| anyhow!("{e}"))?;
    let from = date("FROM", &args.from)?;
    let to = date("TO", &args.to)?;
    let maturity = args
        .maturity
        .as_deref()
        .map(|m| date("--maturity", m))
        .transpose()?;
    let reference = match (&args.reference_start, &args.reference_end) {
        (Some(s), Some(e)) => Some((date("--reference-start", s)?, date("--reference-end", e)?)),
        _ => None,
    };
    if let Some(f) = args.frequency {
        months_per_period(f).map_err(|e| anyhow!("--frequency: {e}"))?;
    }
    let calendar = args.calendar.as_deref().map(read_calendar).transpose()?;
    if basis == Basis::Bus252 && calendar.is_none() {
        bail!("BUS/252 counts business days and needs a calendar: give --calendar FILE (one ISO date a line; an empty file means weekends only)");
    }
    if basis == Basis::ActActIcma && args.frequency.is_none() {
        bail!("ACT/ACT ICMA needs --frequency N (periods a year: 1, 2, 3, 4, 6 or 12) and usually --reference-start/--reference-end");
    }
    let terms = Terms {
        termination: maturity,
        frequency: args.frequency,
        reference,
        calendar: calendar.as_ref(),
    };
    let days = day_count(basis, from, to, &terms).map_err(|e| anyhow!("{e}"))?;
    let exact = year_fraction(basis, from, to, &terms).map_err(|e| anyhow!("{e}"))?;
    let fraction = exact
        .to_decimal()
        .ok_or_else(|| anyhow!("the year fraction is too large to print as a decimal"))?;
    if args.json {
        let mut obj = serde_json::json!({
            "basis": basis.name(),
            "from": from.to_string(),
            "to": to.to_string(),
            "days": days,
            "fraction": fraction.to_string(),
            "exact": exact.to_string(),
        });
        if let (Some(m), Some(map)) = (maturity, obj.as_object_mut()) {
            map.insert("maturity".into(), m.to_string().into());
        }
        writeln!(out, "{obj}")?;
    } else {
        let unit = match basis {
            Basis::Bus252 => "business days",
            Basis::Nl365 => "days (29 February nights left out)",
            b if b.thirty().is_some() => "days (30/360 count)",
            _ => "days",
        };
        writeln!(out, "basis     {}", basis.name())?;
        writeln!(
            out,
            "period    {from} to {to} (the first date earns, the second does not)"
        )?;
        writeln!(out, "days      {days} {unit}")?;
        writeln!(out, "fraction  {fraction}")?;
        if exact.denom() != 1 && fraction.scale() >= 28 {
            writeln!(
                out,
                "exact     {exact} (the decimal above is rounded at 28 digits)"
            )?;
        } else {
            writeln!(out, "exact     {exact}")?;
        }
    }
    Ok(exit::OK)
}
