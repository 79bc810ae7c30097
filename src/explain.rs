//! One account explained: what `ledgerate explain` shows (the account's
//! terms, its days, its postings, its statement periods with expected,
//! posted, variance, status and likely cause, its statement rows that could
//! not be read, its notes, and the accrued interest at the cut-off), built
//! from the pipeline's run of the account, and the printer that lays it out
//! as text.
//!
//! The figures are the pipeline's, the same the month-end run reports. This
//! module reads no file, resolves no setting and looks for no account (the
//! command line does all three); it writes only to the writer it is given.

use std::io::{self, Write};

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::book::{AccountEntry, Book, UnreadableStatement};
use crate::engine::causes::LikelyCause;
use crate::engine::events::{LegKind, Life};
use crate::engine::floating::FixingUsed;
use crate::engine::ledger::LedgerFigures;
use crate::engine::reconcile::Status;
use crate::engine::suspense::Suspense;
use crate::engine::{DayRow, FloorOn, PostingRow};
use crate::pipeline::{
    run_account, statements_of, AccountRun, BookAccount, CheckedRow, Failed, Options,
};
use crate::problem::Problem;

/// One account's explanation: the figures of the days shown.
#[derive(Debug, Clone)]
pub struct Explanation {
    /// The account's terms, the days shown and the cut-off.
    pub header: Header,
    /// The days shown, one row each.
    pub days: Vec<DayRow>,
    /// The posting periods that overlap the days shown.
    pub postings: Vec<PostingRow>,
    /// The reconciled statement periods (and posting periods no statement
    /// covers) that overlap the days shown, each with its likely cause when
    /// it is over- or under-posted.
    pub statements: Vec<CheckedRow>,
    /// Whether the account has statement rows for periods ending by the cut-off.
    pub has_statements: bool,
    /// Its statement rows that could not be read (the run's "statement
    /// unreadable" rows), in sheet order.
    pub unreadable: Vec<UnreadableStatement>,
    /// The pipeline's notes and warnings on the account.
    pub notes: Vec<Problem>,
    /// Interest earned since the last posting and not posted, rounded.
    pub accrued_at_cutoff: Decimal,
    /// Posting periods no statement row covers: not made, so they stay in
    /// the open item.
    pub not_made: Vec<(NaiveDate, NaiveDate)>,
    /// The booked opening, the prior-period adjustment, the open item.
    pub ledger: LedgerFigures,
    /// The first day of the window.
    pub window_start: NaiveDate,
    /// The core system's open item at cut-off checked against ours, when a
    /// Booked row gives it.
    pub accrued_check: Option<CheckedRow>,
    /// The split of its interest into recognised and suspended (its days
    /// cut to the days shown), for an account with Accrual status rows,
    /// interest receipts or an opening suspense.
    pub suspense: Option<Suspense>,
    /// Its terms one after another, its close and penalty (behaviour.md,
    /// Account life events), when it has life events.
    pub life: Option<Life>,
}

/// The account's terms as explain's first lines name them.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Header {
    /// The account id.
    pub id: String,
    /// Its name (may be empty).
    pub name: String,
    /// Its currency code.
    pub currency: String,
    /// Asset or liability.
    pub side: &'static str,
    /// The day-count basis.
    pub basis: &'static str,
    /// The compounding rule.
    pub compounding: &'static str,
    /// The posting frequency.
    pub posting: &'static str,
    /// Whether postings join the balance.
    pub capitalised: bool,
    /// A floating account's rate terms.
    pub floating: Option<FloatingHeader>,
    /// The first and last days shown.
    pub shown: (NaiveDate, NaiveDate),
    /// The cut-off.
    pub cutoff: NaiveDate,
    /// The currency's minor units (amounts are shown to these places).
    pub minor_units: u32,
    /// The account's withholding tax (its `tax_ref`), when it bears one.
    pub tax_ref: Option<String>,
}

/// A floating account's rate terms.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FloatingHeader {
    /// The rate method.
    pub method: &'static str,
    /// The indices its tables name.
    pub indices: Vec<String>,
    /// Lookback in business days.
    pub lookback_days: u32,
    /// Whether the lookback moves the weights too.
    pub observation_shift: bool,
    /// Lockout in business days.
    pub lockout_days: u32,
    /// Whether the spread is compounded with the fixings.
    pub spread_compounded: bool,
    /// Whether floor and cap bound the all-in rate.
    pub floor_on_all_in: bool,
}

/// Explains account `entry` of `book`: runs it through the pipeline with
/// day rows kept and keeps what falls in `period` (default: the statement
/// periods that end in the window, else the window).
///
/// # Errors
/// [`Failed`] when the account cannot be computed, as the month-end run
/// reports it.
pub fn explain(
    book: &Book,
    entry: &AccountEntry,
    options: &Options,
    period: Option<(NaiveDate, NaiveDate)>,
) -> Result<Explanation, Box<Failed>> {
    let id = &entry.terms.id;
    let statements = statements_of(book, id);
    let booked_on = |day: Option<NaiveDate>| {
        book.booked
            .iter()
            .find(|b| &b.account == id && Some(b.date) == day)
    };
    let unreadable: Vec<&UnreadableStatement> = book
        .unreadable_statements
        .iter()
        .filter(|u| &u.account == id)
        .collect();
    let account = BookAccount::from_book(book, entry, &statements)
        .with_booked_opening(booked_on(options.window_start.pred_opt()))
        .with_booked_close(booked_on(Some(options.cutoff)))
        .with_unreadable(&unreadable);
    let options = Options {
        keep_days: true,
        ..*options
    };
    let run = run_account(&account, &options)?;
    let mut x = Explanation::new(&account, run, &options, period);
    x.unreadable = unreadable.into_iter().cloned().collect();
    // As in the run: a posting period whose statement row could not be
    // read is not "not posted".
    let unreadable = &x.unreadable;
    x.statements.retain(|c| {
        c.row.status != Status::NotPosted
            || !unreadable.iter().any(|u| u.covers(c.row.start, c.row.end))
    });
    Ok(x)
}

impl Explanation {
    /// The explanation of `account`'s `run` over `period` (default: the
    /// statement periods that end in the window, else the window).
    pub fn new(
        account: &BookAccount,
        run: AccountRun,
        options: &Options,
        period: Option<(NaiveDate, NaiveDate)>,
    ) -> Explanation {
        let shown = period.unwrap_or_else(|| {
            let in_window = run.periods.iter().filter(|p| p.end >= options.window_start);
            match (
                in_window.clone().map(|p| p.start).min(),
                in_window.map(|p| p.end).max(),
            ) {
                (Some(a), Some(b)) => (a, b),
                _ => (options.window_start, options.cutoff),
            }
        });
        let r = run.result;
        Explanation {
            header: header(account, shown, options.cutoff),
            days: r
                .days
                .into_iter()
                .filter(|d| d.date >= shown.0 && d.date <= shown.1)
                .collect(),
            postings: r
                .postings
                .into_iter()
                .filter(|p| p.end >= shown.0 && p.start <= shown.1)
                .collect(),
            statements: run
                .rows
                .into_iter()
                .filter(|c| c.row.end >= shown.0 && c.row.start <= shown.1)
                .collect(),
            has_statements: !run.periods.is_empty(),
            unreadable: Vec::new(),
            notes: run.notes,
            accrued_at_cutoff: r.accrued_at_cutoff,
            not_made: run.not_made,
            ledger: run.ledger,
            window_start: options.window_start,
            accrued_check: run.accrued_check,
            suspense: run.suspense.map(|mut s| {
                s.days.retain(|d| d.date >= shown.0 && d.date <= shown.1);
                s
            }),
            life: run.life,
        }
    }
}

fn header(account: &BookAccount, shown: (NaiveDate, NaiveDate), cutoff: NaiveDate) -> Header {
    let t = &account.entry.terms;
    let fl = t.floating;
    Header {
        id: t.id.clone(),
        name: account.entry.name.clone(),
        currency: t.currency.clone(),
        side: t.side.name(),
        basis: t.basis.name(),
        compounding: t.compounding.name(),
        posting: t.posting.name(),
        capitalised: t.capitalise,
        floating: account.floating.map(|s| FloatingHeader {
            method: fl.method.name(),
            indices: s.indices().into_iter().map(str::to_string).collect(),
            lookback_days: fl.lookback_days,
            observation_shift: fl.observation_shift,
            lockout_days: fl.lockout_days,
            spread_compounded: fl.spread_compounded,
            floor_on_all_in: fl.floor_on == FloorOn::AllIn,
        }),
        shown,
        cutoff,
        minor_units: t.minor_units,
        tax_ref: t.tax.as_ref().map(|x| x.schedule.tax_ref.clone()),
    }
}

/// Prints `x` as text: the account, one line per day, per posting and per
/// statement period (with the likely cause of a variance), the notes, and
/// the accrued interest at the cut-off.
///
/// # Errors
/// The writer's.
pub fn print(x: &Explanation, out: &mut dyn Write) -> io::Result<()> {
    print_header(&x.header, out)?;
    print_days(x, out)?;
    print_postings(x, out)?;
    print_statements(x, out)?;
    if let Some(life) = &x.life {
        print_life(life, x.header.minor_units, out)?;
    }
    for n in &x.notes {
        writeln!(out, "{n}")?;
    }
    writeln!(
        out,
        "accrued at cut-off {}",
        fmt_amount(x.accrued_at_cutoff, x.header.minor_units)
    )?;
    print_ledger(x, out)?;
    print_suspense(x, out)
}

/// The split into recognised and suspended (behaviour.md, Non-accrual and
/// interest in suspense): per day shown, then the reversals, the releases
/// and the window's figures.
fn print_suspense(x: &Explanation, out: &mut dyn Write) -> io::Result<()> {
    let Some(s) = &x.suspense else {
        return Ok(());
    };
    let a = |v: Decimal| fmt_amount(v, x.header.minor_units);
    writeln!(
        out,
        "accrual status at cut-off {}; per day: date, status, contractual, recognised, suspended",
        s.status_at_cutoff.name()
    )?;
    for d in &s.days {
        writeln!(
            out,
            "  {} {} {} {} {}",
            d.date,
            d.status.name(),
            d.contractual.normalize(),
            d.recognised.normalize(),
            d.suspended.normalize()
        )?;
    }
    for r in &s.reversals {
        writeln!(
            out,
            "reversed on {} (entry into non-accrual): {} = accrued {} + unpaid {}",
            r.date,
            a(r.amount),
            a(r.accrued),
            a(r.unpaid)
        )?;
    }
    for r in &s.releases {
        writeln!(
            out,
            "interest received on {}: {}, released from suspense {}",
            r.date,
            a(r.received),
            a(r.amount)
        )?;
    }
    writeln!(
        out,
        "suspense at {} {}; reversed in window {}; suspended in window {}; released in window {}; suspense at cut-off {}",
        x.window_start.pred_opt().unwrap_or(x.window_start),
        a(s.suspense_before_window),
        a(s.reversed_in_window),
        a(s.suspended_in_window),
        a(s.released_in_window),
        a(s.suspense_at_cutoff)
    )?;
    if let Some(recognised) = s.recognised_for_window(x.ledger.interest_for_window) {
        writeln!(
            out,
            "interest for window recognised {} (contractual {})",
            a(recognised),
            a(x.ledger.interest_for_window)
        )?;
    }
    Ok(())
}

/// The account's life: each term after the first, its close with the
/// closing posting, the penalty and what a limit waived, and the payout.
fn print_life(life: &Life, places: u32, out: &mut dyn Write) -> io::Result<()> {
    let a = |v: Decimal| fmt_amount(v, places);
    for leg in life.legs.iter().filter(|l| l.kind != LegKind::Contract) {
        let t = &leg.terms;
        let rate = leg
            .rates
            .as_ref()
            .and_then(|r| r.tables().first())
            .and_then(|t| t.tiers.first())
            .map_or_else(String::new, |x| {
                format!(" at {}%", (x.rate * Decimal::ONE_HUNDRED).normalize())
            });
        match leg.kind {
            LegKind::Rolled => writeln!(
                out,
                "rolled over on {}: principal {}{rate}, fixed for the term, maturity {}",
                t.open_date,
                a(t.opening_balance),
                leg.contract_maturity
                    .map_or_else(String::new, |m| m.to_string())
            )?,
            _ => writeln!(
                out,
                "matured on {}: balance {} earns the matured rate from then, simple{rate}",
                t.open_date,
                a(t.opening_balance)
            )?,
        }
    }
    let Some(c) = &life.closing else {
        return Ok(());
    };
    let x = c.date;
    match &c.closing_posting {
        Some(p) => writeln!(
            out,
            "closed on {x}: closing posting {} for {}..{} paid on {}; balance at the end of {} {}",
            a(p.posted),
            p.start,
            p.end,
            p.payment,
            p.end,
            a(c.balance)
        )?,
        None => writeln!(
            out,
            "closed on {x}: no closing posting; balance {}",
            a(c.balance)
        )?,
    }
    if c.penalised {
        let how = match c.break_interest {
            Some(b) => format!(
                " (term interest {} less {} at the break rate)",
                a(c.term_interest),
                a(b)
            ),
            None => String::new(),
        };
        writeln!(out, "break penalty {}{how}", a(c.penalty_before_limit))?;
        if !c.waived.is_zero() {
            writeln!(
                out,
                "penalty limited to the term's interest {}: {} waived, {} charged",
                a(c.term_interest),
                a(c.waived),
                a(c.penalty)
            )?;
        }
    }
    let paid = if c.paid_given {
        format!("movements on {x} {}", a(c.paid))
    } else {
        format!("no movement on {x}")
    };
    let tax = c
        .closing_posting
        .as_ref()
        .map_or(Decimal::ZERO, |p| p.withheld.tax);
    if tax.is_zero() {
        writeln!(
            out,
            "payout {} (balance + closing posting - penalty); {paid}",
            a(c.payout)
        )
    } else {
        writeln!(
            out,
            "payout {} (balance + closing posting - penalty - tax {}); {paid}",
            a(c.payout),
            a(tax)
        )
    }
}

/// The ledger's figures: the booked opening and where it came from, the
/// prior-period adjustment, the interest for the window and the open item.
fn print_ledger(x: &Explanation, out: &mut dyn Write) -> io::Result<()> {
    let l = &x.ledger;
    let a = |v: Decimal| fmt_amount(v, x.header.minor_units);
    let eve = x.window_start.pred_opt().unwrap_or(x.window_start);
    writeln!(
        out,
        "booked opening at {eve} {} ({}); open item at {eve} known now {}; prior-period adjustment {}",
        a(l.booked_opening),
        l.opening_source.words(),
        a(l.open_item_before),
        a(l.prior_period)
    )?;
    writeln!(
        out,
        "interest for window {} (window days {} + prior-period {}); settled in window {}; open item at cut-off {}",
        a(l.interest_for_window),
        a(l.window_days_interest),
        a(l.prior_period),
        a(l.settled_in_window),
        a(l.open_item)
    )?;
    if let Some(c) = &x.accrued_check {
        let row = &c.row;
        let bp = row
            .variance_bp
            .map_or_else(|| "n/a".to_string(), |b| format!("{:.2}", b.round_dp(2)));
        writeln!(
            out,
            "accrued check {}..{}: booked {}, expected open item {}, variance {} ({bp} bp): {}",
            row.start,
            row.end,
            a(row.posted),
            a(row.expected),
            a(row.variance),
            row.status.name()
        )?;
        if let Some(cause) = &c.likely_cause {
            writeln!(
                out,
                "  likely cause: {}",
                cause.text().replace("posted amount", "booked amount")
            )?;
        }
    }
    Ok(())
}

fn print_header(h: &Header, out: &mut dyn Write) -> io::Result<()> {
    writeln!(
        out,
        "account {}{}: {} {}, {}, {} compounding, {} posting{}",
        h.id,
        if h.name.is_empty() {
            String::new()
        } else {
            format!(" ({})", h.name)
        },
        h.currency,
        h.side,
        h.basis,
        h.compounding,
        h.posting,
        if h.capitalised { ", capitalised" } else { "" }
    )?;
    if let Some(fl) = &h.floating {
        writeln!(
            out,
            "floating: {} on {}, lookback {} business days{}{}, spread {}{}",
            fl.method,
            fl.indices.join(", "),
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
            if fl.floor_on_all_in {
                ", floor and cap on the all-in rate"
            } else {
                ""
            },
        )?;
    }
    writeln!(
        out,
        "days {}..{} (cut-off {})",
        h.shown.0, h.shown.1, h.cutoff
    )
}

fn print_days(x: &Explanation, out: &mut dyn Write) -> io::Result<()> {
    let places = x.header.minor_units;
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
        if x.header.floating.is_some() {
            "  fixing used"
        } else {
            ""
        }
    )?;
    for d in &x.days {
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
    Ok(())
}

fn print_postings(x: &Explanation, out: &mut dyn Write) -> io::Result<()> {
    let places = x.header.minor_units;
    for p in &x.postings {
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
            if x.not_made.contains(&(p.start, p.end)) {
                ", not made: no statement row covers it, so it stays in the open item and is not settled".to_string()
            } else if p.actual_given {
                format!(", statement posted {}", fmt_amount(p.posted, places))
            } else {
                String::new()
            }
        )?;
        // Withholding tax: the posting's gross, its tax and the net credited.
        if let Some(tax_ref) = &x.header.tax_ref {
            let w = &p.withheld;
            writeln!(
                out,
                "  tax {tax_ref}: gross {} tax {} ({}%) net {}",
                fmt_amount(p.posted, places),
                fmt_amount(w.tax, places),
                (w.rate * rust_decimal::Decimal::ONE_HUNDRED).normalize(),
                fmt_amount(w.net, places)
            )?;
        }
    }
    Ok(())
}

fn print_statements(x: &Explanation, out: &mut dyn Write) -> io::Result<()> {
    let places = x.header.minor_units;
    for c in &x.statements {
        let row = &c.row;
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
            writeln!(
                out,
                "  likely cause: {}",
                c.likely_cause
                    .as_ref()
                    .map(LikelyCause::text)
                    .unwrap_or_default()
            )?;
        }
    }
    for u in &x.unreadable {
        writeln!(
            out,
            "statement row {} could not be read: {}: {}",
            u.error.position,
            u.error.words(),
            Status::StatementUnreadable.name()
        )?;
    }
    if !x.has_statements && x.unreadable.is_empty() {
        writeln!(out, "no statement rows for this account")?;
    }
    Ok(())
}

/// `x` to `places` decimals, trailing zeros kept, as explain shows amounts.
///
/// ```
/// use ledgerate::explain::fmt_amount;
/// use rust_decimal::Decimal;
/// assert_eq!(fmt_amount(Decimal::new(15, 1), 2), "1.50");
/// assert_eq!(fmt_amount(Decimal::new(-3, 0), 0), "-3");
/// ```
pub fn fmt_amount(x: Decimal, places: u32) -> String {
    let mut r = x.round_dp(places);
    r.rescale(places);
    r.to_string()
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
