//! The Journal detail as the journal gathers it: each account's share of
//! each journal line, netted per line and account as the entries come, then
//! put in the Journal sheet's order (behaviour.md, Output workbook; the
//! ledger contract's "each GL line traces to accounts").
//!
//! Pure and compact: a share is a line index, an account index and an
//! amount, and each account id is held once. It never decides an amount:
//! every share is a leg of an entry the journal made, or a row read back
//! from a shard's detail; and it never changes a line.

use rust_decimal::Decimal;

use crate::report::model::{AccountIds, DetailLine, DetailRow, JournalDetail};

/// Shares gathered so far, by the journal's own line ids.
#[derive(Debug, Default)]
pub(crate) struct Shares {
    accounts: AccountIds,
    /// Until [`Shares::finish`], `line` is the journal's id of the line.
    rows: Vec<DetailRow>,
    /// Where the rows of the account added last begin: an account's
    /// entries come one after another, so its shares net among these.
    current: usize,
    /// More accounts or lines than the indices hold: the detail is given up.
    full: bool,
}

impl Shares {
    /// No shares yet, with room for `rows`.
    pub(crate) fn with_room(rows: usize) -> Shares {
        Shares {
            rows: Vec::with_capacity(rows),
            ..Shares::default()
        }
    }

    /// Adds `amount` (debit positive) of `account` to line `line`, netted
    /// with the account's share of that line so far. Accounts come one after
    /// another: an id that is not the last one added starts a new account.
    pub(crate) fn add(&mut self, line: Option<u32>, account: &str, amount: Decimal) {
        if self.full || amount.is_zero() {
            return;
        }
        let Some(line) = line else {
            self.give_up();
            return;
        };
        if self.accounts.last() != Some(account) {
            if self.accounts.push(account).is_none() {
                self.give_up();
                return;
            }
            self.current = self.rows.len();
        }
        let index = u32::try_from(self.accounts.len().saturating_sub(1)).unwrap_or(u32::MAX);
        let mine = self.rows.get_mut(self.current..).unwrap_or_default();
        if let Some(share) = mine.iter_mut().find(|r| r.line == line) {
            share.amount += amount;
            return;
        }
        self.rows.push(DetailRow {
            line,
            account: index,
            amount,
        });
    }

    /// Too many accounts or lines: nothing of the detail is kept, rather
    /// than a part of it.
    fn give_up(&mut self) {
        self.full = true;
        self.rows = Vec::new();
        self.accounts = AccountIds::default();
    }

    /// The detail over `lines` (every line in the Journal sheet's order,
    /// those that net to nothing included), where `place[id]` is the place
    /// in `lines` of the journal's line `id`. Shares that net to nothing
    /// are left out; the rows of a line keep the order the accounts came
    /// in. `None` when the detail was given up.
    pub(crate) fn finish(self, lines: Vec<DetailLine>, place: &[u32]) -> Option<JournalDetail> {
        if self.full {
            return None;
        }
        let mut rows = self.rows;
        rows.retain(|r| !r.amount.is_zero());
        for r in &mut rows {
            let id = usize::try_from(r.line).unwrap_or(usize::MAX);
            r.line = place.get(id).copied().unwrap_or(u32::MAX);
        }
        // Account indices grow in the order the accounts came, and a line
        // has one share per account: this order is total.
        rows.sort_unstable_by_key(|r| (r.line, r.account));
        Some(JournalDetail {
            lines,
            accounts: self.accounts,
            rows,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn n(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    fn line(gl: &str) -> DetailLine {
        DetailLine {
            date: "2026-11-30".parse().unwrap(),
            entity: "HM".into(),
            currency: "USD".into(),
            minor_units: 2,
            gl_account: gl.into(),
            memo: "interest posted".into(),
        }
    }

    fn shown(d: &JournalDetail) -> Vec<(String, String, Decimal)> {
        d.rows
            .iter()
            .map(|r| {
                (
                    d.line(r).unwrap().gl_account.clone(),
                    d.account(r).to_string(),
                    r.amount,
                )
            })
            .collect()
    }

    /// An account's legs on one line net to one share, debit and credit
    /// alike, as the line nets them; a share that nets to nothing goes.
    #[test]
    fn an_accounts_legs_on_one_line_net_to_one_share() {
        let mut s = Shares::default();
        s.add(Some(0), "A", n("10.00"));
        s.add(Some(1), "A", n("-10.00"));
        s.add(Some(0), "A", n("-2.50"));
        s.add(Some(1), "A", n("2.50"));
        s.add(Some(1), "B", n("4.00"));
        s.add(Some(1), "B", n("-4.00"));
        let d = s.finish(vec![line("X"), line("Y")], &[0, 1]).unwrap();
        assert_eq!(
            shown(&d),
            vec![
                ("X".into(), "A".into(), n("7.50")),
                ("Y".into(), "A".into(), n("-7.50")),
            ]
        );
        assert_eq!(d.accounts.len(), 2);
    }

    /// Rows follow the lines' order, then the accounts' order, whatever
    /// order the lines were first used in.
    #[test]
    fn rows_follow_the_lines_then_the_accounts() {
        let mut s = Shares::default();
        s.add(Some(0), "A", n("1.00"));
        s.add(Some(1), "A", n("-1.00"));
        s.add(Some(1), "B", n("-2.00"));
        s.add(Some(0), "B", n("2.00"));
        s.add(Some(0), "C", n("3.00"));
        // Line id 1 sorts first.
        let d = s.finish(vec![line("Y"), line("X")], &[1, 0]).unwrap();
        let got: Vec<(String, String)> = shown(&d).into_iter().map(|(g, a, _)| (g, a)).collect();
        let want: Vec<(String, String)> =
            [("Y", "A"), ("Y", "B"), ("X", "A"), ("X", "B"), ("X", "C")]
                .iter()
                .map(|(g, a)| (g.to_string(), a.to_string()))
                .collect();
        assert_eq!(got, want);
    }

    #[test]
    fn a_line_without_an_id_gives_the_detail_up_whole() {
        let mut s = Shares::default();
        s.add(Some(0), "A", n("1.00"));
        s.add(None, "B", n("1.00"));
        s.add(Some(0), "C", n("1.00"));
        assert!(s.finish(vec![line("X")], &[0]).is_none());
    }
}
