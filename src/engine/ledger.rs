//! What the general ledger should hold for one account: the open item, the
//! booked opening, the prior-period adjustment and what settles in a window
//! (behaviour.md, Books that tie).
//!
//! Pure arithmetic on an account's computed postings and accrued figures:
//! it runs no account itself, reads no book and never rounds (every amount
//! it adds is already in minor units).

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::run::{AccountResult, PostingRow};
use crate::conventions::names::{lookup, UnknownName};

/// When a posting is settled against the accrual account, and so which
/// postings a run journals (behaviour.md, Journal dates and lines).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SettlementLines {
    /// The postings whose period ends in the window, on their payment date.
    #[default]
    PaymentDate,
    /// The postings whose payment date falls in the window, whatever their period.
    InWindow,
    /// The postings whose period ends in the window, on their end date.
    PeriodEnd,
}

impl SettlementLines {
    /// Every choice, in the order the help lists them.
    pub const ALL: [SettlementLines; 3] = [
        SettlementLines::PaymentDate,
        SettlementLines::InWindow,
        SettlementLines::PeriodEnd,
    ];

    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            SettlementLines::PaymentDate => "payment-date",
            SettlementLines::InWindow => "in-window",
            SettlementLines::PeriodEnd => "period-end",
        }
    }

    /// Parses `payment-date`, `in-window` or `period-end`.
    ///
    /// # Errors
    /// The closest name, as an [`UnknownName`].
    pub fn parse(s: &str) -> Result<SettlementLines, UnknownName> {
        lookup(
            "settlement lines",
            s,
            &[
                ("payment-date", SettlementLines::PaymentDate),
                ("in-window", SettlementLines::InWindow),
                ("period-end", SettlementLines::PeriodEnd),
            ],
            &["payment-date", "in-window", "period-end"],
        )
    }

    /// The day `p` is settled against the accrual account; `None` for a
    /// posting that was not made (it stays in the open item).
    pub fn settlement_date(self, p: &LedgerPosting) -> Option<NaiveDate> {
        if !p.made {
            return None;
        }
        Some(match self {
            SettlementLines::PeriodEnd => p.end,
            SettlementLines::PaymentDate | SettlementLines::InWindow => p.payment,
        })
    }

    /// Whether this run's journal settles `p`, for the window `from..=to`.
    pub fn journals(self, p: &LedgerPosting, from: NaiveDate, to: NaiveDate) -> bool {
        match self {
            _ if !p.made => false,
            SettlementLines::PaymentDate | SettlementLines::PeriodEnd => {
                p.end >= from && p.end <= to
            }
            SettlementLines::InWindow => p.payment >= from && p.payment <= to,
        }
    }
}

/// One posting as the ledger sees it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LedgerPosting {
    /// First day of the period.
    pub start: NaiveDate,
    /// Last day of the period.
    pub end: NaiveDate,
    /// Its payment date.
    pub payment: NaiveDate,
    /// The amount: as posted when made, else the amount expected (which
    /// stays accrued).
    pub amount: Decimal,
    /// Whether the posting was made: false when the account has statement
    /// rows and none covers this period (behaviour.md, Completeness and
    /// presentation).
    pub made: bool,
}

impl LedgerPosting {
    /// The engine's posting, made or not.
    pub fn of(p: &PostingRow, made: bool) -> LedgerPosting {
        LedgerPosting {
            start: p.start,
            end: p.end,
            payment: p.payment,
            amount: if made { p.posted } else { p.expected },
            made,
        }
    }
}

/// The open item at the end of `day`: `accrued` (the rounded accrued at the
/// end of that day) plus every posting whose period ends on or before it
/// and that is not settled by then.
///
/// ```
/// use ledgerate::engine::ledger::{open_item, LedgerPosting, SettlementLines};
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// // October posts 310.00, paid on 1 November: the payable holds it at 31 October.
/// let october = LedgerPosting { start: d("2026-10-01"), end: d("2026-10-31"),
///     payment: d("2026-11-01"), amount: Decimal::new(31000, 2), made: true };
/// let at = |mode| open_item(Decimal::new(4380, 2), &[october], d("2026-10-31"), mode);
/// assert_eq!(at(SettlementLines::PaymentDate), Decimal::new(35380, 2));
/// // Settled on its end date, it is out of the open item at once.
/// assert_eq!(at(SettlementLines::PeriodEnd), Decimal::new(4380, 2));
/// ```
pub fn open_item(
    accrued: Decimal,
    postings: &[LedgerPosting],
    day: NaiveDate,
    mode: SettlementLines,
) -> Decimal {
    postings
        .iter()
        .filter(|p| p.end <= day && mode.settlement_date(p).is_none_or(|s| s > day))
        .fold(accrued, |sum, p| sum + p.amount)
}

/// The postings settled in `from..=to` (as posted), whichever run journals them.
pub fn settled_in(
    postings: &[LedgerPosting],
    from: NaiveDate,
    to: NaiveDate,
    mode: SettlementLines,
) -> Decimal {
    postings
        .iter()
        .filter(|p| {
            mode.settlement_date(p)
                .is_some_and(|s| s >= from && s <= to)
        })
        .map(|p| p.amount)
        .sum()
}

/// Where an account's booked opening came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OpeningSource {
    /// A Booked row dated the day before the window.
    BookedRow,
    /// The previous close re-run as known at `previous_as_at`.
    PreviousClose,
    /// The figure known now (no Booked row and no previous as-at): the books
    /// are assumed to hold it already.
    KnownNow,
    /// The account opens in the window: nothing was booked before it.
    OpensInWindow,
}

impl OpeningSource {
    /// The words `explain` and the Accruals sheet use.
    pub fn words(self) -> &'static str {
        match self {
            OpeningSource::BookedRow => "Booked row",
            OpeningSource::PreviousClose => "previous close",
            OpeningSource::KnownNow => "known now",
            OpeningSource::OpensInWindow => "opens in window",
        }
    }
}

/// One account's figures as the ledger books them for the window F..C.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LedgerFigures {
    /// Posted in window (the expected amount of a posting not made) +
    /// accrued at C - accrued at F-1, all known now.
    pub window_days_interest: Decimal,
    /// O(F-1) known now.
    pub open_item_before: Decimal,
    /// BO: what the books held at F-1.
    pub booked_opening: Decimal,
    /// Where BO came from.
    pub opening_source: OpeningSource,
    /// O(F-1) known now - BO.
    pub prior_period: Decimal,
    /// Window days' interest + the prior-period adjustment: what the
    /// journal books to interest expense or income.
    pub interest_for_window: Decimal,
    /// O(C).
    pub open_item: Decimal,
    /// Postings settled in F..C, whichever run journals them.
    pub settled_in_window: Decimal,
}

/// The ledger's figures for one account: `postings` are the engine's
/// postings to C as made or not, `opening` BO and its source (the caller
/// decides them; a BO of `None` is O(F-1) known now).
///
/// Interest for window = O(C) - BO + settled in window, whatever the
/// settlement mode (a test checks it on every example).
///
/// ```
/// use ledgerate::engine::ledger::*;
/// use rust_decimal::Decimal;
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let n = |s: &str| s.parse::<Decimal>().unwrap();
/// // behaviour.md example A1: October 310.00 paid 1 November; November
/// // 454.23 (410.43 of November days and 43.80 of October back-value).
/// let posts = [
///     LedgerPosting { start: d("2026-10-01"), end: d("2026-10-31"), payment: d("2026-11-01"), amount: n("310.00"), made: true },
///     LedgerPosting { start: d("2026-11-01"), end: d("2026-11-30"), payment: d("2026-12-01"), amount: n("454.23"), made: true },
/// ];
/// let f = figures(&posts, n("43.80"), n("0.00"), d("2026-11-01"), d("2026-11-30"),
///     SettlementLines::PaymentDate, (Some(n("310.00")), OpeningSource::PreviousClose));
/// assert_eq!(f.prior_period, n("43.80"));
/// assert_eq!(f.window_days_interest, n("410.43"));
/// assert_eq!(f.interest_for_window, n("454.23"));
/// assert_eq!(f.open_item, n("454.23"));
/// assert_eq!(f.settled_in_window, n("310.00"));
/// assert_eq!(f.interest_for_window, f.open_item - f.booked_opening + f.settled_in_window);
/// ```
pub fn figures(
    postings: &[LedgerPosting],
    accrued_before_window: Decimal,
    accrued_at_cutoff: Decimal,
    from: NaiveDate,
    to: NaiveDate,
    mode: SettlementLines,
    opening: (Option<Decimal>, OpeningSource),
) -> LedgerFigures {
    let eve = from.pred_opt().unwrap_or(from);
    let in_window: Decimal = postings
        .iter()
        .filter(|p| p.end >= from && p.end <= to)
        .map(|p| p.amount)
        .sum();
    let window_days_interest = in_window + accrued_at_cutoff - accrued_before_window;
    let open_item_before = open_item(accrued_before_window, postings, eve, mode);
    let (booked_opening, opening_source) = (opening.0.unwrap_or(open_item_before), opening.1);
    let prior_period = open_item_before - booked_opening;
    LedgerFigures {
        window_days_interest,
        open_item_before,
        booked_opening,
        opening_source,
        prior_period,
        interest_for_window: window_days_interest + prior_period,
        open_item: open_item(accrued_at_cutoff, postings, to, mode),
        settled_in_window: settled_in(postings, from, to, mode),
    }
}

/// The engine's postings as the ledger sees them.
pub fn ledger_postings(
    result: &AccountResult,
    not_made: &[(NaiveDate, NaiveDate)],
) -> Vec<LedgerPosting> {
    result
        .postings
        .iter()
        .map(|p| LedgerPosting::of(p, !not_made.contains(&(p.start, p.end))))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d(s: &str) -> NaiveDate {
        s.parse().unwrap()
    }
    fn n(s: &str) -> Decimal {
        s.parse().unwrap()
    }
    fn post(start: &str, end: &str, pay: &str, amount: &str, made: bool) -> LedgerPosting {
        LedgerPosting {
            start: d(start),
            end: d(end),
            payment: d(pay),
            amount: n(amount),
            made,
        }
    }

    /// Interest for window = O(C) - BO + settled, in every settlement mode,
    /// with a posting paid before the window, one paid after it, and one not made.
    #[test]
    fn interest_for_window_is_the_open_items_movement_plus_what_settled() {
        let posts = [
            post("2026-09-01", "2026-09-30", "2026-10-01", "7.00", true),
            post("2026-10-01", "2026-10-31", "2026-11-02", "12.00", true),
            post("2026-11-01", "2026-11-15", "2026-11-16", "5.00", false),
            post("2026-11-16", "2026-11-30", "2026-12-03", "6.50", true),
        ];
        for mode in SettlementLines::ALL {
            for bo in [
                (None, OpeningSource::KnownNow),
                (Some(n("1.00")), OpeningSource::BookedRow),
            ] {
                let f = figures(
                    &posts,
                    n("0.40"),
                    n("0.90"),
                    d("2026-11-01"),
                    d("2026-11-30"),
                    mode,
                    bo,
                );
                assert_eq!(
                    f.interest_for_window,
                    f.open_item - f.booked_opening + f.settled_in_window,
                    "{mode:?} {bo:?}"
                );
                assert_eq!(f.window_days_interest, n("11.50") + n("0.90") - n("0.40"));
            }
        }
    }

    #[test]
    fn a_posting_not_made_stays_in_the_open_item_and_never_settles() {
        let p = [post(
            "2026-11-01",
            "2026-11-30",
            "2026-11-30",
            "5.00",
            false,
        )];
        for mode in SettlementLines::ALL {
            assert_eq!(open_item(n("0"), &p, d("2026-12-31"), mode), n("5.00"));
            assert_eq!(
                settled_in(&p, d("2026-11-01"), d("2026-12-31"), mode),
                n("0")
            );
            assert!(!mode.journals(&p[0], d("2026-11-01"), d("2026-11-30")));
        }
    }

    #[test]
    fn in_window_journals_by_payment_date_and_the_others_by_period_end() {
        let p = post("2026-10-01", "2026-10-31", "2026-11-01", "3.00", true);
        let (f, c) = (d("2026-11-01"), d("2026-11-30"));
        assert!(SettlementLines::InWindow.journals(&p, f, c));
        assert!(!SettlementLines::PaymentDate.journals(&p, f, c));
        assert!(!SettlementLines::PeriodEnd.journals(&p, f, c));
        assert_eq!(
            SettlementLines::PeriodEnd.settlement_date(&p),
            Some(d("2026-10-31"))
        );
    }

    #[test]
    fn names_parse_back() {
        for m in SettlementLines::ALL {
            assert_eq!(SettlementLines::parse(m.name()).unwrap(), m);
        }
        assert!(SettlementLines::parse("paydate").is_err());
    }
}
