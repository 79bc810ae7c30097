//! The Tie-out: each accrued-interest GL account's trial balance against
//! the sub-ledger's open items, rolled forward through the window
//! (behaviour.md, Tie-out).
//!
//! Adds up figures already computed per account and the book's Trial
//! balance rows; it never rounds, and never decides an account's figure.
//! The roll-forward, the differences and the status are worked out in one
//! place ([`TieOut::rows_with`]), for a run and for a merge of shards alike.
//! A GL account that accounts of both sides use has no row: it is an error
//! ([`MixedSides::problem`]).

use std::collections::BTreeMap;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::book::TrialBalanceRow;
use crate::engine::reconcile::Tolerance;
use crate::problem::{Position, Problem, Severity};
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
    /// A note for each Trial balance row (at the opening `window_start - 1`
    /// or the `cutoff`) of a GL account no account added here uses.
    pub fn unused_row_notes(
        &self,
        tb: &[&TrialBalanceRow],
        window_start: NaiveDate,
        cutoff: NaiveDate,
    ) -> Vec<Problem> {
        let eve = window_start.pred_opt();
        tb.iter()
            .filter(|r| Some(r.date) == eve || r.date == cutoff)
            .filter(|r| {
                !self.rows.contains_key(&(
                    r.entity.clone(),
                    r.currency.clone(),
                    r.gl_account.clone(),
                ))
            })
            .map(|r| Problem {
                severity: Severity::Note,
                position: r.position.clone(),
                account: None,
                found: format!(
                    "a trial balance row for GL account {} ({}, {}) that no account of the books uses as its accrued-interest account",
                    r.gl_account, r.entity, r.currency
                ),
                expected: UNUSED_ROW_EXPECTED.to_string(),
                fix: "nothing to tie it to: it is not used; check the GL account, entity and currency if it should be".to_string(),
                follows: None,
            })
            .collect()
    }

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
        // The receivable takes the contractual figure; the suspense account
        // the part not recognised (behaviour.md, Non-accrual and interest
        // in suspense).
        let Some(susp) = &line.suspense else {
            s.interest += line.interest_for_window;
            s.settled += l.settled_in_window;
            s.closing += l.open_item;
            return;
        };
        s.interest += susp.contractual_for_window;
        s.settled += l.settled_in_window;
        s.closing += l.open_item;
        let key = (
            l.entity.to_string(),
            line.currency.to_string(),
            susp.gl_suspense.to_string(),
        );
        let s = self.rows.entry(key).or_default();
        s.minor_units = line.minor_units;
        let side = Word::Borrowed(SUSPENSE_SIDE);
        if !s.sides.contains(&side) {
            s.sides.push(side);
        }
        s.accounts += 1;
        s.opening += susp.suspense_before_window;
        s.interest += susp.reversed_in_window + susp.suspended_in_window;
        s.settled += susp.released_in_window;
        s.closing += susp.suspense_at_cutoff;
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
        let balance_on = |key: GlKey<'_>, date: NaiveDate| -> Option<Decimal> {
            let mut found = tb.iter().filter(|r| {
                r.date == date
                    && r.entity == key.entity
                    && r.currency == key.currency
                    && r.gl_account == key.gl_account
            });
            let first = found.next()?;
            Some(found.fold(first.balance, |sum, r| sum + r.balance))
        };
        self.rows_with(
            |key, side| {
                // A trial balance prints debits positive: a payable's normal
                // (credit) balance is the negative of its trial-balance figure.
                let normal = |tb: Decimal| {
                    if (side == "liability" || side == SUSPENSE_SIDE) && !tb.is_zero() {
                        -tb
                    } else {
                        tb
                    }
                };
                (
                    balance_on(key, eve).map(normal),
                    balance_on(key, cutoff).map(normal),
                )
            },
            tolerance,
        )
    }

    /// The Tie-out rows with the trial balance figures `balances` gives for
    /// a GL account and its side, already in the GL's normal direction:
    /// (opening, closing), each `None` without a row (an opening without a
    /// row counts as zero). The one place that rolls forward, takes the
    /// differences and decides the status.
    pub fn rows_with(
        self,
        balances: impl Fn(GlKey<'_>, &str) -> (Option<Decimal>, Option<Decimal>),
        tolerance: &Tolerance,
    ) -> (Vec<TieOutLine>, Vec<MixedSides>) {
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
            let gl = GlKey {
                entity: &key.0,
                currency: &key.1,
                gl_account: &key.2,
            };
            let (opening_tb, closing_tb) = balances(gl, side);
            let opening_tb = opening_tb.unwrap_or(Decimal::ZERO);
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

/// One accrued-interest GL account of an entity and currency: a Tie-out
/// row's key.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct GlKey<'a> {
    /// The entity.
    pub entity: &'a str,
    /// ISO 4217 code.
    pub currency: &'a str,
    /// The GL account.
    pub gl_account: &'a str,
}

impl MixedSides {
    /// The error on the Accounts sheet of `book` (the run's first book).
    pub fn problem(&self, book: &str) -> Problem {
        Problem {
            severity: Severity::Error,
            position: Position {
                book: book.to_string(),
                sheet: "Accounts".to_string(),
                ..Default::default()
            },
            account: None,
            found: format!(
                "GL account {} ({}, {}) is the accrued-interest account of both deposits (liability) and loans (asset)",
                self.gl_account, self.entity, self.currency
            ),
            expected: "one side per accrued-interest GL account: interest payable and receivable are separate accounts".to_string(),
            fix: "give the accounts of one side another gl_accrued; the Tie-out has no row for this GL account until then".to_string(),
            follows: None,
        }
    }
}

/// The side word of an interest-in-suspense GL account's Tie-out row: a
/// contra account of the receivable, credit normal. Its interest for window
/// is what was reversed and suspended, its settled what was released, its
/// open items the accounts' suspense.
pub const SUSPENSE_SIDE: &str = "suspense";

/// What the note on a Trial balance row no account uses expects.
const UNUSED_ROW_EXPECTED: &str =
    "the accrued-interest GL accounts (gl_accrued) of the accounts computed";

/// Whether `p` is a note of [`TieOut::unused_row_notes`]. A shard notes a row no
/// account of its own uses; the whole run notes it only when no shard's
/// account does, so a merge keeps the notes every shard has.
pub fn is_unused_row_note(p: &Problem) -> bool {
    p.severity == Severity::Note && p.expected == UNUSED_ROW_EXPECTED
}

#[cfg(test)]
mod tests {
    use super::*;
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
            tax: None,
            suspense: None,
            life: None,
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
