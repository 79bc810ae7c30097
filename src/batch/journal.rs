//! Journal entries for a window: the interest to book and each posting's
//! settlement, summed into GL lines (behaviour.md, Cut-off figures).
//!
//! Pure: it turns computed figures into balanced lines and never decides an
//! amount itself. Every entry it makes is balanced, so debits equal credits
//! per currency by construction (and a test checks it).

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::book::GlCodes;
use crate::engine::Side;
use crate::report::model::JournalLine;

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
}

/// One account's figures as the journal needs them.
#[derive(Debug, Clone)]
pub struct AccountEntries<'a> {
    /// Entity that books it.
    pub entity: &'a str,
    /// ISO 4217 code.
    pub currency: &'a str,
    /// Minor units.
    pub minor_units: u32,
    /// Asset or liability.
    pub side: Side,
    /// GL codes from the book.
    pub gl: &'a GlCodes,
    /// Interest for the window (incremental style).
    pub interest_for_window: Decimal,
    /// Accrued at cut-off (reversing style).
    pub accrued_at_cutoff: Decimal,
    /// Postings in the window: payment date and amount.
    pub postings: Vec<(NaiveDate, Decimal)>,
}

/// Where a line sorts within its date: accruals, then postings, then reversals.
fn purpose(memo: &str) -> u8 {
    if memo.starts_with("interest accrued") {
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

/// Sums entries into journal lines: one per date, entity, currency, GL account
/// and purpose, debits and credits netted to one side.
#[derive(Debug, Default)]
pub struct Journal {
    lines: BTreeMap<LineKey, (u32, Decimal)>,
}

impl Journal {
    /// An empty journal.
    pub fn new() -> Journal {
        Journal::default()
    }

    /// Adds a balanced entry: `amount` debited to `debit_gl` and credited to
    /// `credit_gl` (a negative amount swaps the sides).
    #[allow(clippy::too_many_arguments)]
    fn entry(
        &mut self,
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
            let slot = self
                .lines
                .entry(key)
                .or_insert((minor_units, Decimal::ZERO));
            // Amounts are rounded to minor units, so these sums are exact in any order.
            slot.1 += signed;
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
        let slot = self
            .lines
            .entry(key)
            .or_insert((line.minor_units, Decimal::ZERO));
        slot.1 += line.debit - line.credit;
    }

    /// Adds one account's entries for the window `from..=to`.
    pub fn add_account(
        &mut self,
        a: &AccountEntries,
        style: JournalStyle,
        from: NaiveDate,
        to: NaiveDate,
    ) {
        let liability = a.side == Side::Liability;
        let interest_gl = a.gl.interest.clone().unwrap_or_else(|| {
            if liability {
                defaults::INTEREST_EXPENSE
            } else {
                defaults::INTEREST_INCOME
            }
            .to_string()
        });
        let accrued_gl = a.gl.accrued.clone().unwrap_or_else(|| {
            if liability {
                defaults::ACCRUED_PAYABLE
            } else {
                defaults::ACCRUED_RECEIVABLE
            }
            .to_string()
        });
        let settle_gl =
            a.gl.settlement
                .clone()
                .unwrap_or_else(|| defaults::SETTLEMENT.to_string());
        // Liability: Dr expense / Cr payable. Asset: Dr receivable / Cr income.
        let (accrue_dr, accrue_cr) = if liability {
            (&interest_gl, &accrued_gl)
        } else {
            (&accrued_gl, &interest_gl)
        };
        // Incremental books the window's interest and settles postings against the
        // accrual account; reversing books the whole accrued, reverses it the next
        // day, and books postings straight to interest expense or income.
        let (accrued, memo, postings_against) = match style {
            JournalStyle::Incremental => (
                a.interest_for_window,
                format!("interest accrued {from}..{to}"),
                &accrued_gl,
            ),
            JournalStyle::Reversing => (
                a.accrued_at_cutoff,
                format!("interest accrued at {to}"),
                &interest_gl,
            ),
        };
        self.entry(
            to,
            a.entity,
            a.currency,
            a.minor_units,
            accrue_dr,
            accrue_cr,
            &memo,
            accrued,
        );
        if style == JournalStyle::Reversing {
            if let Some(next) = to.succ_opt() {
                self.entry(
                    next,
                    a.entity,
                    a.currency,
                    a.minor_units,
                    accrue_cr,
                    accrue_dr,
                    &format!("reversal of interest accrued at {to}"),
                    accrued,
                );
            }
        }
        // A posting: liability Dr (payable or expense) / Cr settlement; asset the other way.
        let (dr, cr) = if liability {
            (postings_against, &settle_gl)
        } else {
            (&settle_gl, postings_against)
        };
        for (date, amount) in &a.postings {
            self.entry(
                *date,
                a.entity,
                a.currency,
                a.minor_units,
                dr,
                cr,
                "interest posted",
                *amount,
            );
        }
    }

    /// The journal lines, by date, entity, currency and purpose.
    pub fn lines(self) -> Vec<JournalLine> {
        self.lines
            .into_iter()
            .filter(|(_, (_, amount))| !amount.is_zero())
            .map(|(k, (minor_units, amount))| {
                let zero = crate::conventions::rounding::RoundMode::HalfUp
                    .round(Decimal::ZERO, minor_units);
                let (debit, credit) = if amount.is_sign_positive() {
                    (amount, zero)
                } else {
                    (zero, -amount)
                };
                JournalLine {
                    date: k.date,
                    entity: k.entity,
                    currency: k.currency,
                    minor_units,
                    gl_account: k.gl,
                    debit,
                    credit,
                    memo: k.memo,
                }
            })
            .collect()
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
        let gl = GlCodes::default();
        let mut j = Journal::new();
        let deposit = AccountEntries {
            entity: "HM",
            currency: "USD",
            minor_units: 2,
            side: Side::Liability,
            gl: &gl,
            interest_for_window: n("222.91"),
            accrued_at_cutoff: n("111.63"),
            postings: vec![(d("2026-11-16"), n("229.99"))],
        };
        let loan = AccountEntries {
            side: Side::Asset,
            interest_for_window: n("20.00"),
            postings: vec![],
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
        let gl = GlCodes {
            interest: Some("6100".into()),
            accrued: Some("2300".into()),
            settlement: None,
            prior_period: None,
        };
        let mut j = Journal::new();
        for amount in ["10.00", "15.50", "-30.00"] {
            let a = AccountEntries {
                entity: "HM",
                currency: "EUR",
                minor_units: 2,
                side: Side::Liability,
                gl: &gl,
                interest_for_window: n(amount),
                accrued_at_cutoff: Decimal::ZERO,
                postings: vec![],
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
        let gl = GlCodes::default();
        let mut j = Journal::new();
        let a = AccountEntries {
            entity: "HM",
            currency: "JPY",
            minor_units: 0,
            side: Side::Asset,
            gl: &gl,
            interest_for_window: n("900"),
            accrued_at_cutoff: n("500"),
            postings: vec![(d("2026-11-15"), n("400"))],
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
}
