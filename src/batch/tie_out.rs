//! The Tie-out: each accrued-interest GL account's trial balance against
//! the sub-ledger's open items, rolled forward through the window
//! (behaviour.md, Tie-out).
//!
//! Adds up figures already computed per account and the book's Trial
//! balance rows; it never rounds, and never decides an account's figure.
//! A GL account that accounts of both sides use has no row: the caller
//! reports it as an error.

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::book::TrialBalanceRow;
use crate::engine::reconcile::Tolerance;
use crate::report::model::{AccrualLine, TieOutLine, TieStatus, Word};

/// (entity, currency, GL account).
type Key = (String, String, String);

/// The sub-ledger's sums per accrued-interest GL account, added one
/// account's line at a time.
#[derive(Debug, Default, Clone)]
pub struct TieOut {
    rows: BTreeMap<Key, Sums>,
}

#[derive(Debug, Default, Clone)]
struct Sums {
    minor_units: u32,
    sides: Vec<Word>,
    accounts: usize,
    opening: Decimal,
    interest: Decimal,
    settled: Decimal,
    closing: Decimal,
}

/// A GL account that accounts of both sides use: it cannot tie to either.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct MixedSides {
    /// The entity.
    pub entity: String,
    /// ISO 4217 code.
    pub currency: String,
    /// The GL account.
    pub gl_account: String,
}

impl TieOut {
    /// Adds one account's line to its GL account's sums.
    pub fn add(&mut self, line: &AccrualLine) {
        let l = &line.ledger;
        let key = (
            l.entity.to_string(),
            line.currency.to_string(),
            l.gl_accrued.to_string(),
        );
        let s = self.rows.entry(key).or_default();
        s.minor_units = line.minor_units;
        if !s.sides.contains(&line.side) {
            s.sides.push(line.side.clone());
        }
        s.accounts += 1;
        s.opening += l.booked_opening;
        s.interest += line.interest_for_window;
        s.settled += l.settled_in_window;
        s.closing += l.open_item;
    }

    /// The Tie-out rows against the trial balance `tb` (rows dated
    /// `window_start - 1` are the opening, rows dated `cutoff` the closing;
    /// other rows are not used), and the GL accounts used by both sides.
    pub fn rows(
        self,
        tb: &[&TrialBalanceRow],
        window_start: NaiveDate,
        cutoff: NaiveDate,
        tolerance: &Tolerance,
    ) -> (Vec<TieOutLine>, Vec<MixedSides>) {
        let eve = window_start.pred_opt().unwrap_or(window_start);
        let balance_on = |key: &Key, date: NaiveDate| -> Option<Decimal> {
            let mut found = tb.iter().filter(|r| {
                r.date == date && r.entity == key.0 && r.currency == key.1 && r.gl_account == key.2
            });
            let first = found.next()?;
            Some(found.fold(first.balance, |sum, r| sum + r.balance))
        };
        let mut lines = Vec::new();
        let mut mixed = Vec::new();
        for (key, s) in self.rows {
            let [side] = s.sides.as_slice() else {
                mixed.push(MixedSides {
                    entity: key.0,
                    currency: key.1,
                    gl_account: key.2,
                });
                continue;
            };
            // A trial balance prints debits positive: a payable's normal
            // (credit) balance is the negative of its trial-balance figure.
            let normal = |tb: Decimal| if side == "liability" { -tb } else { tb };
            let opening_tb = balance_on(&key, eve).map_or(Decimal::ZERO, normal);
            let closing_tb = balance_on(&key, cutoff).map(normal);
            let roll_forward = opening_tb + s.interest - s.settled;
            let closing_difference = closing_tb.unwrap_or(roll_forward) - s.closing;
            let status = if closing_difference.is_zero() {
                TieStatus::Agrees
            } else if closing_difference.abs() <= tolerance.amount_for(s.minor_units) {
                TieStatus::WithinTolerance
            } else {
                TieStatus::Differs
            };
            lines.push(TieOutLine {
                side: side.clone(),
                entity: key.0,
                currency: key.1,
                minor_units: s.minor_units,
                gl_account: key.2,
                accounts: s.accounts,
                opening_tb,
                opening_sub_ledger: s.opening,
                opening_difference: opening_tb - s.opening,
                interest_for_window: s.interest,
                settled_in_window: s.settled,
                closing_roll_forward: roll_forward,
                closing_sub_ledger: s.closing,
                closing_tb,
                closing_difference,
                status,
            });
        }
        (lines, mixed)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::problem::Position;
    use crate::report::model::LedgerLine;

    fn d(s: &str) -> NaiveDate {
        s.parse().unwrap()
    }
    fn n(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    fn line(
        side: &'static str,
        gl: &'static str,
        bo: &str,
        ifw: &str,
        settled: &str,
        oc: &str,
    ) -> AccrualLine {
        AccrualLine {
            account: "A".into(),
            name: String::new(),
            currency: "USD".into(),
            minor_units: 2,
            side: side.into(),
            day_count: "ACT/365F".into(),
            compounding: "simple".into(),
            balance_at_cutoff: Decimal::ZERO,
            accrued_at_cutoff: Decimal::ZERO,
            posted_in_window: Decimal::ZERO,
            interest_for_window: n(ifw),
            effective_annual_rate: None,
            ledger: LedgerLine {
                entity: "HM".into(),
                gl_accrued: gl.into(),
                booked_opening: n(bo),
                settled_in_window: n(settled),
                open_item: n(oc),
                ..LedgerLine::default()
            },
        }
    }

    fn tb(gl: &str, date: &str, balance: &str) -> TrialBalanceRow {
        TrialBalanceRow {
            entity: "HM".into(),
            currency: "USD".into(),
            gl_account: gl.into(),
            date: d(date),
            balance: n(balance),
            position: Position::default(),
        }
    }

    /// behaviour.md example A1: opening 310.00 per TB (printed -310.00, a
    /// credit) and per sub-ledger; + 454.23 - 310.00 rolls forward to the
    /// sub-ledger's 454.23.
    #[test]
    fn example_a1_ties() {
        let mut t = TieOut::default();
        t.add(&line(
            "liability",
            "2300",
            "310.00",
            "454.23",
            "310.00",
            "454.23",
        ));
        let opening = tb("2300", "2026-10-31", "-310.00");
        let (rows, mixed) = t.rows(
            &[&opening],
            d("2026-11-01"),
            d("2026-11-30"),
            &Tolerance::default(),
        );
        assert!(mixed.is_empty());
        let r = &rows[0];
        assert_eq!(
            (r.opening_tb, r.opening_sub_ledger, r.opening_difference),
            (n("310.00"), n("310.00"), n("0.00"))
        );
        assert_eq!(
            (r.closing_roll_forward, r.closing_sub_ledger),
            (n("454.23"), n("454.23"))
        );
        assert_eq!(
            (r.closing_difference, r.status),
            (n("0.00"), TieStatus::Agrees)
        );
    }

    /// Roll-forward less sub-ledger is always the opening difference; a
    /// closing trial balance that differs shows GL lines this run did not make.
    #[test]
    fn a_closing_difference_other_than_the_opening_one_comes_from_the_gl() {
        let mut t = TieOut::default();
        t.add(&line("asset", "1400", "100.00", "50.00", "80.00", "70.00"));
        let rows = |closing: Option<&str>| {
            let mut tbs = vec![tb("1400", "2026-10-31", "99.00")];
            tbs.extend(closing.map(|c| tb("1400", "2026-11-30", c)));
            let refs: Vec<&TrialBalanceRow> = tbs.iter().collect();
            t.clone()
                .rows(
                    &refs,
                    d("2026-11-01"),
                    d("2026-11-30"),
                    &Tolerance::default(),
                )
                .0
        };
        let r = &rows(None)[0];
        assert_eq!(r.opening_difference, n("-1.00"));
        assert_eq!(
            r.closing_roll_forward - r.closing_sub_ledger,
            r.opening_difference
        );
        assert_eq!(
            (r.closing_difference, r.status),
            (n("-1.00"), TieStatus::Differs)
        );
        let r = &rows(Some("75.00"))[0];
        assert_eq!(
            (r.closing_difference, r.status),
            (n("5.00"), TieStatus::Differs)
        );
    }

    #[test]
    fn a_gl_account_of_both_sides_has_no_row() {
        let mut t = TieOut::default();
        t.add(&line("asset", "1400", "0", "1", "0", "1"));
        t.add(&line("liability", "1400", "0", "1", "0", "1"));
        let (rows, mixed) = t.rows(&[], d("2026-11-01"), d("2026-11-30"), &Tolerance::default());
        assert!(rows.is_empty());
        assert_eq!(mixed[0].gl_account, "1400");
    }
}
