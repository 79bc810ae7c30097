//! Journal entries for a window: the interest to book and each posting's
//! settlement, summed into GL lines (behaviour.md, Cut-off figures).
//!
//! Pure: it turns computed figures into balanced lines and never decides an
//! amount itself. Every entry it makes is balanced, so debits equal credits
//! per currency by construction (and a test checks it). Every entry goes
//! through [`Journal::entry`], which also keeps, when asked, each account's
//! share of each line (the Journal detail, [`super::detail`]).

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::detail::Shares;
use crate::book::GlCodes;
use crate::engine::Side;
use crate::report::model::{split_sides, DetailLine, JournalDetail, JournalLine, Word};

/// How accruals are booked.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum JournalStyle {
    /// The window's interest, and each posting settled against the accrual account.
    #[default]
    Incremental,
    /// The whole accrued at cut-off and its reversal on the next day; postings
    /// booked straight to interest expense or income.
    Reversing,
}

impl JournalStyle {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            JournalStyle::Incremental => "incremental",
            JournalStyle::Reversing => "reversing",
        }
    }

    /// Parses `incremental` or `reversing`.
    ///
    /// # Errors
    /// The closest name, as an [`crate::conventions::names::UnknownName`].
    pub fn parse(s: &str) -> Result<JournalStyle, crate::conventions::names::UnknownName> {
        crate::conventions::names::lookup(
            "journal style",
            s,
            &[
                ("incremental", JournalStyle::Incremental),
                ("reversing", JournalStyle::Reversing),
            ],
            &["incremental", "reversing"],
        )
    }
}

/// The GL accounts used when a book gives none (documented in the user guide).
pub mod defaults {
    /// Interest expense (liability side).
    pub const INTEREST_EXPENSE: &str = "INTEREST-EXPENSE";
    /// Interest income (asset side).
    pub const INTEREST_INCOME: &str = "INTEREST-INCOME";
    /// Accrued interest payable (liability side).
    pub const ACCRUED_PAYABLE: &str = "ACCRUED-INTEREST-PAYABLE";
    /// Accrued interest receivable (asset side).
    pub const ACCRUED_RECEIVABLE: &str = "ACCRUED-INTEREST-RECEIVABLE";
    /// Where postings settle: the customer or counterparty accounts.
    pub const SETTLEMENT: &str = "INTEREST-SETTLEMENT";
    /// Withholding tax owed to the tax authority (liability side).
    pub const TAX_PAYABLE: &str = "WITHHOLDING-TAX-PAYABLE";
    /// Withholding tax a borrower withheld, recoverable (asset side).
    pub const TAX_RECOVERABLE: &str = "WITHHOLDING-TAX-RECOVERABLE";
}

/// An account's GL accounts, the defaults filled in.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ResolvedGl {
    /// Interest expense (liability) or income (asset).
    pub interest: Word,
    /// Accrued interest payable (liability) or receivable (asset).
    pub accrued: Word,
    /// Where postings settle.
    pub settlement: Word,
    /// Where a prior-period adjustment is booked (default: `interest`).
    pub prior_period: Word,
    /// Withholding tax payable (liability) or recoverable (asset).
    pub tax: Word,
}

impl ResolvedGl {
    /// The book's GL codes for an account of `side`, defaults filled in.
    ///
    /// ```
    /// use ledgerate::batch::journal::ResolvedGl;
    /// use ledgerate::book::GlCodes;
    /// use ledgerate::engine::Side;
    /// let gl = GlCodes { interest: Some("6100".into()), ..GlCodes::default() };
    /// let r = ResolvedGl::of(Side::Liability, &gl);
    /// assert_eq!((r.interest.as_ref(), r.prior_period.as_ref()), ("6100", "6100"));
    /// assert_eq!(r.accrued, "ACCRUED-INTEREST-PAYABLE");
    /// ```
    pub fn of(side: Side, gl: &GlCodes) -> ResolvedGl {
        let liability = side == Side::Liability;
        let or = |given: &Option<String>, default: &'static str| -> Word {
            given
                .as_ref()
                .map_or(Word::Borrowed(default), |g| Word::Owned(g.clone()))
        };
        let interest = or(
            &gl.interest,
            if liability {
                defaults::INTEREST_EXPENSE
            } else {
                defaults::INTEREST_INCOME
            },
        );
        ResolvedGl {
            accrued: or(
                &gl.accrued,
                if liability {
                    defaults::ACCRUED_PAYABLE
                } else {
                    defaults::ACCRUED_RECEIVABLE
                },
            ),
            settlement: or(&gl.settlement, defaults::SETTLEMENT),
            prior_period: gl
                .prior_period
                .as_ref()
                .map_or_else(|| interest.clone(), |g| Word::Owned(g.clone())),
            interest,
            tax: or(
                &gl.tax,
                if liability {
                    defaults::TAX_PAYABLE
                } else {
                    defaults::TAX_RECOVERABLE
                },
            ),
        }
    }
}

/// One account's figures as the journal needs them.
#[derive(Debug, Clone)]
pub struct AccountEntries<'a> {
    /// The account's id, for the Journal detail.
    pub account: &'a str,
    /// Entity that books it.
    pub entity: &'a str,
    /// ISO 4217 code.
    pub currency: &'a str,
    /// Minor units.
    pub minor_units: u32,
    /// Asset or liability.
    pub side: Side,
    /// Its GL accounts.
    pub gl: &'a ResolvedGl,
    /// The window days' interest (incremental style).
    pub window_days_interest: Decimal,
    /// The prior-period adjustment (incremental style: its own line).
    pub prior_period: Decimal,
    /// The open item at cut-off (reversing style).
    pub open_item: Decimal,
    /// The postings this run settles: settlement date and amount.
    pub settlements: Vec<(NaiveDate, Decimal)>,
    /// The withholding tax of those postings: settlement date and tax
    /// (behaviour.md, Withholding tax); empty without tax.
    pub withheld: Vec<(NaiveDate, Decimal)>,
}

/// An asset account's interest-in-suspense entries for a window
/// (behaviour.md, Non-accrual and interest in suspense).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct SuspenseEntries {
    /// The interest-in-suspense GL account (default `INTEREST-IN-SUSPENSE`).
    pub gl_suspense: Word,
    /// Where a reversal is charged (default: the interest GL account).
    pub gl_reversal: Word,
    /// The window's interest held in suspense (taken out of income on C).
    pub suspended: Decimal,
    /// Reversals on entries into non-accrual in the window: date and amount.
    pub reversals: Vec<(NaiveDate, Decimal)>,
    /// Suspense released by interest received in the window: date and amount.
    pub releases: Vec<(NaiveDate, Decimal)>,
}

impl SuspenseEntries {
    /// The default interest-in-suspense GL account.
    pub const DEFAULT_GL: &'static str = "INTEREST-IN-SUSPENSE";

    /// The book's GL codes resolved: suspense and reversal accounts, the
    /// reversal's default the interest account `interest`.
    pub fn gl(gl: &GlCodes, interest: &Word) -> (Word, Word) {
        (
            gl.suspense
                .as_ref()
                .map_or(Word::Borrowed(Self::DEFAULT_GL), |g| Word::Owned(g.clone())),
            gl.reversal
                .as_ref()
                .map_or_else(|| interest.clone(), |g| Word::Owned(g.clone())),
        )
    }
}

/// The break penalty a run of the window `from..=to` journals for an
/// account: on the close date when it falls in the window, to `gl_penalty`
/// (default: the account's interest GL account `interest`).
pub fn penalty_entry(
    closing: Option<&crate::engine::events::Closing>,
    gl_penalty: Option<&str>,
    interest: &str,
    from: NaiveDate,
    to: NaiveDate,
) -> Option<(NaiveDate, Decimal, String)> {
    let c = closing?;
    if c.penalty.is_zero() || c.date < from || c.date > to {
        return None;
    }
    Some((
        c.date,
        c.penalty,
        gl_penalty.unwrap_or(interest).to_string(),
    ))
}

/// Where a line sorts within its date: accruals, then postings, then reversals.
fn purpose(memo: &str) -> u8 {
    if memo.starts_with("interest accrued") || memo.starts_with("prior-period") {
        0
    } else if memo.starts_with("reversal") {
        2
    } else {
        1
    }
}

#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord)]
struct LineKey {
    date: NaiveDate,
    entity: String,
    currency: String,
    order: u8,
    gl: String,
    memo: String,
}

/// Shares of the Journal detail an account gives, room is made for at once:
/// an accrual journal gives two to five (the sample books four on
/// average), and room beyond what is written costs nothing.
const SHARES_AN_ACCOUNT: usize = 6;

/// Sums entries into journal lines: one per date, entity, currency, GL account
/// and purpose, debits and credits netted to one side.
#[derive(Debug, Default)]
pub struct Journal {
    /// Each line's minor units, its sum so far (debit positive) and its id
    /// for the detail (`None` past `u32::MAX` lines).
    lines: BTreeMap<LineKey, (u32, Decimal, Option<u32>)>,
    /// Each account's share of each line, when the detail is kept.
    shares: Option<Shares>,
}

impl Journal {
    /// An empty journal.
    pub fn new() -> Journal {
        Journal::default()
    }

    /// An empty journal that keeps each account's share of each line for
    /// the Journal detail ([`Journal::finish`]).
    pub fn keeping_detail() -> Journal {
        Journal::keeping_detail_of(0)
    }

    /// As [`Journal::keeping_detail`], with room at once for the shares of
    /// about `accounts` accounts (a few each), so that the list of shares is
    /// not grown by doubling: at a million accounts a doubling would hold
    /// the old room and the new together for a moment, about a hundred
    /// megabytes. Room never written takes no memory.
    pub fn keeping_detail_of(accounts: usize) -> Journal {
        Journal {
            shares: Some(Shares::with_room(
                accounts.saturating_mul(SHARES_AN_ACCOUNT),
            )),
            ..Journal::default()
        }
    }

    /// The line of `key`, made with a zero sum when new.
    fn slot(&mut self, key: LineKey, minor_units: u32) -> &mut (u32, Decimal, Option<u32>) {
        let id = u32::try_from(self.lines.len()).ok();
        self.lines
            .entry(key)
            .or_insert((minor_units, Decimal::ZERO, id))
    }

    /// Adds a balanced entry of `account`: `amount` debited to `debit_gl`
    /// and credited to `credit_gl` (a negative amount swaps the sides).
    #[allow(clippy::too_many_arguments)]
    fn entry(
        &mut self,
        account: &str,
        date: NaiveDate,
        entity: &str,
        currency: &str,
        minor_units: u32,
        debit_gl: &str,
        credit_gl: &str,
        memo: &str,
        amount: Decimal,
    ) {
        if amount.is_zero() {
            return;
        }
        for (gl, signed) in [(debit_gl, amount), (credit_gl, -amount)] {
            let key = LineKey {
                date,
                entity: entity.to_string(),
                currency: currency.to_string(),
                order: purpose(memo),
                gl: gl.to_string(),
                memo: memo.to_string(),
            };
            let slot = self.slot(key, minor_units);
            // Amounts are rounded to minor units, so these sums are exact in any order.
            slot.1 += signed;
            let id = slot.2;
            if let Some(shares) = self.shares.as_mut() {
                shares.add(id, account, signed);
            }
        }
    }

    /// Adds a line already summed elsewhere (a shard's journal), netting it
    /// with the lines of the same date, entity, currency, GL account and memo.
    pub fn add_line(&mut self, line: &JournalLine) {
        let key = LineKey {
            date: line.date,
            entity: line.entity.clone(),
            currency: line.currency.clone(),
            order: purpose(&line.memo),
            gl: line.gl_account.clone(),
            memo: line.memo.clone(),
        };
        let slot = self.slot(key, line.minor_units);
        slot.1 += line.debit - line.credit;
    }

    /// Adds one account's share of a line to the detail only (a row of a
    /// shard's Journal detail), `amount` debit positive. The line's sum is
    /// left alone: it comes from the shard's Journal ([`Journal::add_line`]).
    pub fn add_detail(&mut self, line: &DetailLine, account: &str, amount: Decimal) {
        if self.shares.is_none() {
            return;
        }
        let key = LineKey {
            date: line.date,
            entity: line.entity.clone(),
            currency: line.currency.clone(),
            order: purpose(&line.memo),
            gl: line.gl_account.clone(),
            memo: line.memo.clone(),
        };
        let id = self.slot(key, line.minor_units).2;
        if let Some(shares) = self.shares.as_mut() {
            shares.add(id, account, amount);
        }
    }

    /// Adds one account's entries for the window `from..=to`
    /// (behaviour.md, Journal dates and lines).
    pub fn add_account(
        &mut self,
        a: &AccountEntries,
        style: JournalStyle,
        from: NaiveDate,
        to: NaiveDate,
    ) {
        let liability = a.side == Side::Liability;
        let gl = a.gl;
        let (accrue_dr, accrue_cr): (&str, &str) = if liability {
            (&gl.interest, &gl.accrued)
        } else {
            (&gl.accrued, &gl.interest)
        };
        let mut book = |date: NaiveDate, dr: &str, cr: &str, memo: &str, amount: Decimal| {
            self.account_entry(a, date, dr, cr, memo, amount);
        };
        // Incremental books the window days' interest and the prior-period
        // adjustment, and settles postings against the accrual account;
        // reversing books the open item, reverses it the next day, and books
        // postings straight to interest expense or income.
        let postings_against: &str = match style {
            JournalStyle::Incremental => {
                book(
                    to,
                    accrue_dr,
                    accrue_cr,
                    &format!("interest accrued {from}..{to}"),
                    a.window_days_interest,
                );
                let (dr, cr): (&str, &str) = if liability {
                    (&gl.prior_period, &gl.accrued)
                } else {
                    (&gl.accrued, &gl.prior_period)
                };
                let eve = from.pred_opt().unwrap_or(from);
                book(
                    to,
                    dr,
                    cr,
                    &format!("prior-period interest adjustment to {eve}"),
                    a.prior_period,
                );
                &gl.accrued
            }
            JournalStyle::Reversing => {
                book(
                    to,
                    accrue_dr,
                    accrue_cr,
                    &format!("interest accrued at {to}"),
                    a.open_item,
                );
                if let Some(next) = to.succ_opt() {
                    book(
                        next,
                        accrue_cr,
                        accrue_dr,
                        &format!("reversal of interest accrued at {to}"),
                        a.open_item,
                    );
                }
                &gl.interest
            }
        };
        // A posting: liability Dr (payable or expense) / Cr settlement; asset the other way.
        let (dr, cr): (&str, &str) = if liability {
            (postings_against, &gl.settlement)
        } else {
            (&gl.settlement, postings_against)
        };
        for (date, amount) in &a.settlements {
            book(*date, dr, cr, "interest posted", *amount);
        }
        // Its tax: the settlement takes the net, the tax account the rest.
        // Liability: Dr settlement T / Cr tax T (so Cr settlement N, Cr tax T);
        // asset: Dr tax T / Cr settlement T (so Dr settlement N, Dr tax T).
        let (dr, cr): (&str, &str) = if liability {
            (&gl.settlement, &gl.tax)
        } else {
            (&gl.tax, &gl.settlement)
        };
        for (date, tax) in &a.withheld {
            book(*date, dr, cr, "interest posted", *tax);
        }
    }

    /// Adds an asset account's interest-in-suspense entries for the window
    /// `from..=to`: on `to` the suspended interest out of income into
    /// suspense (incremental style: on the accrual's own line, so the
    /// receivable takes the contractual figure and income the recognised
    /// part); each reversal Dr `gl_reversal` / Cr suspense on its date; each
    /// release Dr suspense / Cr income on the receipt's date.
    pub fn add_suspense(
        &mut self,
        a: &AccountEntries,
        s: &SuspenseEntries,
        style: JournalStyle,
        from: NaiveDate,
        to: NaiveDate,
    ) {
        let mut book = |date: NaiveDate, dr: &str, cr: &str, memo: &str, amount: Decimal| {
            self.account_entry(a, date, dr, cr, memo, amount);
        };
        let memo = match style {
            JournalStyle::Incremental => format!("interest accrued {from}..{to}"),
            JournalStyle::Reversing => format!("interest suspended {from}..{to}"),
        };
        book(to, &a.gl.interest, &s.gl_suspense, &memo, s.suspended);
        for (date, amount) in &s.reversals {
            book(
                *date,
                &s.gl_reversal,
                &s.gl_suspense,
                "interest reversed on non-accrual",
                *amount,
            );
        }
        for (date, amount) in &s.releases {
            book(
                *date,
                &s.gl_suspense,
                &a.gl.interest,
                "suspended interest received",
                *amount,
            );
        }
    }

    /// Adds an account's break penalty on the close date (behaviour.md,
    /// Account life events): Dr settlement / Cr the penalty's GL account,
    /// memo `break penalty`; the customer pays it on either side.
    pub fn add_penalty(
        &mut self,
        a: &AccountEntries,
        gl_penalty: &str,
        date: NaiveDate,
        amount: Decimal,
    ) {
        self.account_entry(
            a,
            date,
            &a.gl.settlement,
            gl_penalty,
            "break penalty",
            amount,
        );
    }

    /// One balanced entry of the account `a`.
    fn account_entry(
        &mut self,
        a: &AccountEntries,
        date: NaiveDate,
        dr: &str,
        cr: &str,
        memo: &str,
        amount: Decimal,
    ) {
        self.entry(
            a.account,
            date,
            a.entity,
            a.currency,
            a.minor_units,
            dr,
            cr,
            memo,
            amount,
        );
    }

    /// The journal lines, by date, entity, currency and purpose.
    pub fn lines(self) -> Vec<JournalLine> {
        self.finish().0
    }

    /// The journal lines, by date, entity, currency and purpose, and the
    /// Journal detail when it was kept: for every line, each account's
    /// share, the shares of a line adding up to it exactly. A line that
    /// nets to nothing is not a journal line, but stays in the detail's
    /// lines, its accounts' shares adding up to zero. `None` for a
    /// journal that keeps no detail, or one with more accounts or lines
    /// than its indices hold.
    pub fn finish(self) -> (Vec<JournalLine>, Option<JournalDetail>) {
        let keep = self.shares.is_some();
        let mut lines = Vec::new();
        let mut all = Vec::new();
        let mut place = vec![u32::MAX; if keep { self.lines.len() } else { 0 }];
        for (k, (minor_units, amount, id)) in self.lines {
            let (debit, credit) = split_sides(amount, minor_units);
            let line = JournalLine {
                date: k.date,
                entity: k.entity,
                currency: k.currency,
                minor_units,
                gl_account: k.gl,
                debit,
                credit,
                memo: k.memo,
            };
            if keep {
                if let Some(slot) = id
                    .and_then(|id| usize::try_from(id).ok())
                    .and_then(|id| place.get_mut(id))
                {
                    *slot = u32::try_from(all.len()).unwrap_or(u32::MAX);
                }
                all.push(DetailLine::of(&line));
            }
            if !amount.is_zero() {
                lines.push(line);
            }
        }
        let detail = self.shares.and_then(|s| s.finish(all, &place));
        (lines, detail)
    }
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

    fn balanced(lines: &[JournalLine]) {
        let mut by_ccy: BTreeMap<&str, (Decimal, Decimal)> = BTreeMap::new();
        for l in lines {
            let e = by_ccy.entry(&l.currency).or_default();
            e.0 += l.debit;
            e.1 += l.credit;
        }
        for (c, (dr, cr)) in by_ccy {
            assert_eq!(dr, cr, "{c}: debits {dr} credits {cr}");
        }
    }

    /// Accounting textbook rule (conventions reference section 7): liability
    /// side Dr interest expense / Cr accrued payable; asset side Dr accrued
    /// receivable / Cr interest income; postings settle the accrual account.
    #[test]
    fn incremental_entries_by_side() {
        let gl = ResolvedGl::of(Side::Liability, &GlCodes::default());
        let loan_gl = ResolvedGl::of(Side::Asset, &GlCodes::default());
        let mut j = Journal::new();
        let deposit = AccountEntries {
            account: "DEP-1",
            entity: "HM",
            currency: "USD",
            minor_units: 2,
            side: Side::Liability,
            gl: &gl,
            window_days_interest: n("222.91"),
            prior_period: Decimal::ZERO,
            open_item: n("111.63"),
            settlements: vec![(d("2026-11-16"), n("229.99"))],
            withheld: vec![],
        };
        let loan = AccountEntries {
            account: "LN-1",
            side: Side::Asset,
            gl: &loan_gl,
            window_days_interest: n("20.00"),
            settlements: vec![],
            withheld: vec![],
            ..deposit.clone()
        };
        j.add_account(
            &deposit,
            JournalStyle::Incremental,
            d("2026-11-01"),
            d("2026-11-30"),
        );
        j.add_account(
            &loan,
            JournalStyle::Incremental,
            d("2026-11-01"),
            d("2026-11-30"),
        );
        let lines = j.lines();
        balanced(&lines);
        let find = |gl: &str, date: &str| {
            lines
                .iter()
                .find(|l| l.gl_account == gl && l.date == d(date))
                .unwrap()
                .clone()
        };
        assert_eq!(
            find(defaults::INTEREST_EXPENSE, "2026-11-30").debit,
            n("222.91")
        );
        assert_eq!(
            find(defaults::ACCRUED_PAYABLE, "2026-11-30").credit,
            n("222.91")
        );
        assert_eq!(
            find(defaults::ACCRUED_RECEIVABLE, "2026-11-30").debit,
            n("20.00")
        );
        assert_eq!(
            find(defaults::INTEREST_INCOME, "2026-11-30").credit,
            n("20.00")
        );
        assert_eq!(
            find(defaults::ACCRUED_PAYABLE, "2026-11-16").debit,
            n("229.99")
        );
        assert_eq!(find(defaults::SETTLEMENT, "2026-11-16").credit, n("229.99"));
    }

    #[test]
    fn lines_are_summed_by_gl_and_negative_amounts_swap_sides() {
        let gl = ResolvedGl::of(
            Side::Liability,
            &GlCodes {
                interest: Some("6100".into()),
                accrued: Some("2300".into()),
                settlement: None,
                prior_period: None,
                tax: None,
                suspense: None,
                reversal: None,
            },
        );
        let mut j = Journal::new();
        for amount in ["10.00", "15.50", "-30.00"] {
            let a = AccountEntries {
                account: amount,
                entity: "HM",
                currency: "EUR",
                minor_units: 2,
                side: Side::Liability,
                gl: &gl,
                window_days_interest: n(amount),
                prior_period: Decimal::ZERO,
                open_item: Decimal::ZERO,
                settlements: vec![],
                withheld: vec![],
            };
            j.add_account(
                &a,
                JournalStyle::Incremental,
                d("2026-11-01"),
                d("2026-11-30"),
            );
        }
        let lines = j.lines();
        balanced(&lines);
        assert_eq!(lines.len(), 2);
        let expense = lines.iter().find(|l| l.gl_account == "6100").unwrap();
        assert_eq!((expense.debit, expense.credit), (n("0.00"), n("4.50")));
    }

    /// Reversing entries (conventions reference section 7): the accrual at the
    /// cut-off is reversed on the first day of the next period.
    #[test]
    fn reversing_style_books_and_reverses_the_accrued() {
        let gl = ResolvedGl::of(Side::Asset, &GlCodes::default());
        let mut j = Journal::new();
        let a = AccountEntries {
            account: "LN-2",
            entity: "HM",
            currency: "JPY",
            minor_units: 0,
            side: Side::Asset,
            gl: &gl,
            window_days_interest: n("900"),
            prior_period: n("7"),
            open_item: n("500"),
            settlements: vec![(d("2026-11-15"), n("400"))],
            withheld: vec![],
        };
        j.add_account(
            &a,
            JournalStyle::Reversing,
            d("2026-11-01"),
            d("2026-11-30"),
        );
        let lines = j.lines();
        balanced(&lines);
        let rev = lines
            .iter()
            .find(|l| l.date == d("2026-12-01") && l.gl_account == defaults::INTEREST_INCOME)
            .unwrap();
        assert_eq!(rev.debit, n("500"));
        let posted = lines
            .iter()
            .find(|l| l.date == d("2026-11-15") && l.gl_account == defaults::INTEREST_INCOME)
            .unwrap();
        assert_eq!(posted.credit, n("400"));
    }

    /// behaviour.md example A1: the window days' interest and the
    /// prior-period adjustment are two lines on the cut-off, the second to
    /// the prior-period GL account; the posting settles the payable when paid.
    #[test]
    fn the_prior_period_adjustment_is_its_own_line() {
        let gl = ResolvedGl::of(
            Side::Liability,
            &GlCodes {
                prior_period: Some("6190".into()),
                ..GlCodes::default()
            },
        );
        let mut j = Journal::new();
        let a = AccountEntries {
            account: "A-1",
            entity: "HM",
            currency: "USD",
            minor_units: 2,
            side: Side::Liability,
            gl: &gl,
            window_days_interest: n("410.43"),
            prior_period: n("43.80"),
            open_item: n("454.23"),
            settlements: vec![(d("2026-12-01"), n("454.23"))],
            withheld: vec![],
        };
        j.add_account(
            &a,
            JournalStyle::Incremental,
            d("2026-11-01"),
            d("2026-11-30"),
        );
        let lines = j.lines();
        balanced(&lines);
        let line = |gl: &str, memo: &str| {
            lines
                .iter()
                .find(|l| l.gl_account == gl && l.memo.starts_with(memo))
                .unwrap()
        };
        assert_eq!(
            line(defaults::INTEREST_EXPENSE, "interest accrued").debit,
            n("410.43")
        );
        let ppa = line("6190", "prior-period");
        assert_eq!((ppa.debit, ppa.date), (n("43.80"), d("2026-11-30")));
        assert_eq!(ppa.memo, "prior-period interest adjustment to 2026-10-31");
        assert_eq!(
            line(defaults::ACCRUED_PAYABLE, "prior-period").credit,
            n("43.80")
        );
        let settled = line(defaults::ACCRUED_PAYABLE, "interest posted");
        assert_eq!(
            (settled.debit, settled.date),
            (n("454.23"), d("2026-12-01"))
        );
    }

    /// Reversing: the accrual on the cut-off is the open item, so a posting
    /// that ends on the cut-off and is paid the next day is the window's
    /// expense (the reversal and the posting cancel on the next day).
    #[test]
    fn reversing_books_the_open_item() {
        let gl = ResolvedGl::of(Side::Liability, &GlCodes::default());
        let mut j = Journal::new();
        let a = AccountEntries {
            account: "A-1",
            entity: "HM",
            currency: "USD",
            minor_units: 2,
            side: Side::Liability,
            gl: &gl,
            window_days_interest: n("410.43"),
            prior_period: n("43.80"),
            open_item: n("454.23"),
            settlements: vec![(d("2026-12-01"), n("454.23"))],
            withheld: vec![],
        };
        j.add_account(
            &a,
            JournalStyle::Reversing,
            d("2026-11-01"),
            d("2026-11-30"),
        );
        let lines = j.lines();
        balanced(&lines);
        let on = |date: &str| -> Decimal {
            lines
                .iter()
                .filter(|l| l.gl_account == defaults::INTEREST_EXPENSE && l.date == d(date))
                .map(|l| l.debit - l.credit)
                .sum()
        };
        assert_eq!(on("2026-11-30"), n("454.23"));
        assert_eq!(on("2026-12-01"), n("0.00"));
        assert!(lines.iter().all(|l| !l.memo.starts_with("prior-period")));
    }

    type Key = (NaiveDate, String, String, String, String);

    fn key(l: &DetailLine) -> Key {
        (
            l.date,
            l.entity.clone(),
            l.currency.clone(),
            l.gl_account.clone(),
            l.memo.clone(),
        )
    }

    /// The detail's rows summed per date, entity, currency, GL account and memo.
    fn detail_sums(d: &JournalDetail) -> BTreeMap<Key, Decimal> {
        let mut sums = BTreeMap::new();
        for r in &d.rows {
            *sums.entry(key(d.line(r).unwrap())).or_default() += r.amount;
        }
        sums
    }

    /// Liability and asset accounts with postings, one of them two postings
    /// paid the same day and one with negative interest, in both styles.
    fn accounts<'g>(liability: &'g ResolvedGl, asset: &'g ResolvedGl) -> Vec<AccountEntries<'g>> {
        let base = AccountEntries {
            account: "DEP-1",
            entity: "HM",
            currency: "USD",
            minor_units: 2,
            side: Side::Liability,
            gl: liability,
            window_days_interest: n("222.91"),
            prior_period: n("1.10"),
            open_item: n("111.63"),
            settlements: vec![(d("2026-11-16"), n("229.99"))],
            withheld: vec![],
        };
        vec![
            base.clone(),
            AccountEntries {
                account: "DEP-2",
                window_days_interest: n("-3.10"),
                prior_period: Decimal::ZERO,
                open_item: n("-1.05"),
                settlements: vec![(d("2026-12-01"), n("5.00")), (d("2026-12-01"), n("7.25"))],
                withheld: vec![],
                ..base.clone()
            },
            AccountEntries {
                account: "LN-1",
                side: Side::Asset,
                gl: asset,
                window_days_interest: n("20.00"),
                prior_period: Decimal::ZERO,
                open_item: n("20.00"),
                settlements: vec![(d("2026-11-16"), n("15.40"))],
                withheld: vec![],
                ..base.clone()
            },
            AccountEntries {
                account: "LN-2",
                side: Side::Asset,
                gl: asset,
                currency: "JPY",
                minor_units: 0,
                window_days_interest: n("900"),
                prior_period: Decimal::ZERO,
                open_item: n("500"),
                settlements: vec![(d("2026-11-15"), n("400"))],
                withheld: vec![],
                ..base
            },
        ]
    }

    fn run(style: JournalStyle, gl: &GlCodes) -> (Vec<JournalLine>, JournalDetail) {
        let liability = ResolvedGl::of(Side::Liability, gl);
        let asset = ResolvedGl::of(Side::Asset, gl);
        let mut j = Journal::keeping_detail();
        for a in accounts(&liability, &asset) {
            j.add_account(&a, style, d("2026-11-01"), d("2026-11-30"));
        }
        let (lines, detail) = j.finish();
        (lines, detail.unwrap())
    }

    /// Each GL line traces to accounts: the detail's rows add up, per date,
    /// entity, currency, GL account and memo, to every journal line exactly,
    /// debit and credit netted as the line is, in both styles.
    #[test]
    fn the_detail_adds_up_to_every_line_in_both_styles() {
        let gl = GlCodes::default();
        for style in [JournalStyle::Incremental, JournalStyle::Reversing] {
            let (lines, detail) = run(style, &gl);
            balanced(&lines);
            let sums = detail_sums(&detail);
            let want: BTreeMap<Key, Decimal> = lines
                .iter()
                .map(|l| (key(&DetailLine::of(l)), l.debit - l.credit))
                .collect();
            assert_eq!(sums, want, "{style:?}");
            // The detail's lines are the journal's, in the same order.
            let named: Vec<DetailLine> = lines.iter().map(DetailLine::of).collect();
            assert_eq!(detail.lines, named, "{style:?}");
            // Each row is one side: debit or credit, never both.
            for r in &detail.rows {
                let (dr, cr) = r.sides(detail.line(r).unwrap().minor_units);
                assert!(dr.is_zero() != cr.is_zero(), "{style:?} {r:?}");
            }
        }
    }

    /// Two postings of one account paid the same day are one row of the
    /// settlement line: the account's share of that line.
    #[test]
    fn an_accounts_postings_on_one_day_are_one_row() {
        let gl = GlCodes::default();
        let (_, detail) = run(JournalStyle::Incremental, &gl);
        let rows: Vec<(&str, Decimal)> = detail
            .rows
            .iter()
            .filter(|r| {
                let l = detail.line(r).unwrap();
                l.date == d("2026-12-01") && l.gl_account == defaults::SETTLEMENT
            })
            .map(|r| (detail.account(r), r.amount))
            .collect();
        assert_eq!(rows, vec![("DEP-2", n("-12.25"))]);
    }

    /// Rows of a line come in the order the accounts were added (book order).
    #[test]
    fn a_lines_rows_keep_the_accounts_order() {
        let gl = GlCodes::default();
        let (_, detail) = run(JournalStyle::Incremental, &gl);
        let payable: Vec<&str> = detail
            .rows
            .iter()
            .filter(|r| {
                let l = detail.line(r).unwrap();
                l.date == d("2026-11-30")
                    && l.gl_account == defaults::ACCRUED_PAYABLE
                    && l.memo.starts_with("interest accrued")
            })
            .map(|r| detail.account(r))
            .collect();
        assert_eq!(payable, vec!["DEP-1", "DEP-2"]);
    }

    /// A line whose accounts net to nothing is no journal line; its accounts
    /// stay in the detail, on a line with both sides zero, adding up to it.
    #[test]
    fn a_line_that_nets_to_nothing_keeps_its_accounts_in_the_detail() {
        let gl = GlCodes::default();
        let (lg, ag) = (
            ResolvedGl::of(Side::Liability, &gl),
            ResolvedGl::of(Side::Asset, &gl),
        );
        let deposit = accounts(&lg, &ag).swap_remove(0);
        let mut j = Journal::keeping_detail();
        for (id, amount) in [("DEP-1", "10.00"), ("DEP-2", "-10.00")] {
            let a = AccountEntries {
                account: id,
                window_days_interest: n(amount),
                prior_period: Decimal::ZERO,
                settlements: vec![],
                withheld: vec![],
                ..deposit.clone()
            };
            j.add_account(
                &a,
                JournalStyle::Incremental,
                d("2026-11-01"),
                d("2026-11-30"),
            );
        }
        let (lines, detail) = j.finish();
        let detail = detail.unwrap();
        assert!(lines.is_empty());
        assert_eq!(detail.lines.len(), 2);
        assert_eq!(detail.rows.len(), 4);
        assert!(detail_sums(&detail).values().all(Decimal::is_zero));
    }

    /// A merge's journal: the shards' lines and detail rows added back give
    /// the single journal's lines and detail.
    #[test]
    fn lines_and_detail_rows_added_back_give_the_same_journal() {
        let gl = GlCodes::default();
        let (lg, ag) = (
            ResolvedGl::of(Side::Liability, &gl),
            ResolvedGl::of(Side::Asset, &gl),
        );
        for style in [JournalStyle::Incremental, JournalStyle::Reversing] {
            let all = accounts(&lg, &ag);
            let (single_lines, single) = run(style, &gl);
            let mut merged = Journal::keeping_detail();
            let mut shard_details = Vec::new();
            for part in [&all[..2], &all[2..]] {
                let mut j = Journal::keeping_detail();
                for a in part {
                    j.add_account(a, style, d("2026-11-01"), d("2026-11-30"));
                }
                let (lines, detail) = j.finish();
                for l in &lines {
                    merged.add_line(l);
                }
                shard_details.push(detail.unwrap());
            }
            // A merge adds each account's rows together, accounts in book order.
            for detail in &shard_details {
                let mut rows = detail.rows.clone();
                rows.sort_by_key(|r| r.account);
                for r in &rows {
                    merged.add_detail(detail.line(r).unwrap(), detail.account(r), r.amount);
                }
            }
            let (lines, detail) = merged.finish();
            assert_eq!(lines, single_lines, "{style:?}");
            assert_eq!(detail.unwrap(), single, "{style:?}");
        }
    }

    #[test]
    fn a_journal_without_detail_keeps_none() {
        let gl = GlCodes::default();
        let (lg, ag) = (
            ResolvedGl::of(Side::Liability, &gl),
            ResolvedGl::of(Side::Asset, &gl),
        );
        let mut j = Journal::new();
        for a in accounts(&lg, &ag) {
            j.add_account(
                &a,
                JournalStyle::Incremental,
                d("2026-11-01"),
                d("2026-11-30"),
            );
        }
        let (lines, detail) = j.finish();
        assert!(!lines.is_empty());
        assert!(detail.is_none());
    }
}
