//! Which of several changes that reproduce a posted amount the
//! Reconciliation sheet names first: the one place that decides that order.
//!
//! The cause search ([`super::search`]) keeps its own order (closest first,
//! equally close ones in the order of behaviour.md, Likely causes), and
//! `explain` prints that whole list. This module ranks the same changes by
//! plausibility for a reader who sees one line per row. It never drops, adds
//! or rewords a change, and never re-runs anything.
//!
//! The rule (common practice, no source; docs/decisions.md, "Most plausible
//! cause first"), each step breaking the ties of the one before:
//!
//! 1. the closer change first (exact before merely within tolerance);
//! 2. by kind: a dated entry the account actually has (one of its rate
//!    changes or movements) moved or dropped; then the period a day off;
//!    then a floating-rate term of the account; then another day-count
//!    basis; then rounding; then compounding;
//! 3. within a kind: an entry dropped before one moved (when both give the
//!    same amount, the move took the entry out of the period, which is what
//!    dropping says), an entry moved by fewer days first; a basis closer in
//!    family to the account's first ([`basis_distance`]);
//! 4. the search's own order.

use super::{ChangeKind, Found, LikelyCause};
use crate::conventions::daycount::Basis;

/// The bases that count actual calendar days, nearest neighbours next to
/// each other: the fixed-year ones, then the actual/actual ones.
const ACTUAL_DAYS: [Basis; 6] = [
    Basis::Act360,
    Basis::Act365F,
    Basis::Act365L,
    Basis::Nl365,
    Basis::ActActIsda,
    Basis::ActActIcma,
];

/// The bases that count 30-day months, nearest neighbours next to each other.
const THIRTY_DAYS: [Basis; 4] = [
    Basis::Thirty360,
    Basis::Thirty360Us,
    Basis::Thirty360E,
    Basis::Thirty360EIsda,
];

/// How a basis counts the days of a period: its family.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Family {
    Actual,
    Thirty,
    Business,
}

/// A basis's family and its place in the family's row.
fn family(b: Basis) -> (Family, usize) {
    if let Some(i) = ACTUAL_DAYS.iter().position(|x| *x == b) {
        (Family::Actual, i)
    } else if let Some(i) = THIRTY_DAYS.iter().position(|x| *x == b) {
        (Family::Thirty, i)
    } else {
        (Family::Business, 0)
    }
}

/// How far basis `to` is from the account's basis `from`: first whether
/// they count days the same way (0), or in neighbouring ways (1: actual
/// days against 30-day months or business days), or not (2: 30-day months
/// against business days); then, in the same family, how many places apart
/// they stand in its row, else `to`'s place in its own row.
///
/// ```
/// use ledgerate::conventions::daycount::Basis;
/// use ledgerate::engine::causes::plausible::basis_distance;
/// let from = Basis::Act360;
/// assert!(basis_distance(from, Basis::Act365F) < basis_distance(from, Basis::Nl365));
/// assert!(basis_distance(from, Basis::Nl365) < basis_distance(from, Basis::ActActIsda));
/// assert!(basis_distance(from, Basis::ActActIcma) < basis_distance(from, Basis::Thirty360));
/// ```
pub fn basis_distance(from: Basis, to: Basis) -> (u8, usize) {
    let ((f, i), (g, j)) = (family(from), family(to));
    if f == g {
        return (0, i.abs_diff(j));
    }
    let apart = match (f, g) {
        (Family::Thirty, Family::Business) | (Family::Business, Family::Thirty) => 2,
        _ => 1,
    };
    (apart, j)
}

/// Step 2 of the rule: the rank of a kind of change.
fn kind_rank(kind: ChangeKind) -> u8 {
    match kind {
        ChangeKind::RateChange { .. } | ChangeKind::Movement { .. } | ChangeKind::BreakPenalty => 0,
        ChangeKind::Period => 1,
        ChangeKind::Floating => 2,
        ChangeKind::Basis(_) => 3,
        ChangeKind::Rounding => 4,
        ChangeKind::Compounding => 5,
    }
}

/// Step 3 of the rule: the order within a kind.
fn within(kind: ChangeKind, basis: Basis) -> (u64, usize) {
    match kind {
        ChangeKind::RateChange { days } | ChangeKind::Movement { days } => (days.unwrap_or(0), 0),
        ChangeKind::Basis(to) => {
            let (apart, places) = basis_distance(basis, to);
            (u64::from(apart), places)
        }
        _ => (0, 0),
    }
}

/// The changes of `cause`, most plausible first (the rule above). A stable
/// sort of the search's own list, so step 4 holds by itself.
pub fn ranked(cause: &LikelyCause) -> Vec<&Found> {
    let mut out: Vec<&Found> = cause.found.iter().collect();
    out.sort_by_key(|f| (f.gap, kind_rank(f.kind), within(f.kind, cause.basis)));
    out
}

/// The Likely cause cell of the Reconciliation sheet: the most plausible
/// change, then how many single changes reproduce the posted amount and,
/// when there are more, where to see them all. Without any, the implied
/// rate as the search gave it.
pub fn sheet_words(cause: &LikelyCause, account: &str) -> String {
    let ranked = ranked(cause);
    let Some(first) = ranked.first() else {
        return cause.text();
    };
    match ranked.len() {
        1 => format!(
            "{}. The only single change that reproduces the posted amount within tolerance",
            first.words
        ),
        n => format!(
            "{}. The most plausible of {n} single changes that reproduce the posted amount \
             within tolerance; all {n}: ledgerate explain --account {account}",
            first.words
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use rust_decimal::Decimal;

    fn found(words: &str, gap: i64, kind: ChangeKind) -> Found {
        Found {
            words: words.to_string(),
            gap: Decimal::new(gap, 2),
            kind,
        }
    }

    fn cause(basis: Basis, found: Vec<Found>) -> LikelyCause {
        LikelyCause {
            basis,
            found,
            implied: None,
        }
    }

    fn words(c: &LikelyCause) -> Vec<&str> {
        ranked(c).iter().map(|f| f.words.as_str()).collect()
    }

    /// An ACT/360 account: the fixed-year actual bases first, the
    /// actual/actual ones next, 30-day months after them.
    #[test]
    fn other_bases_go_nearest_family_first() {
        let bases = [
            Basis::Act365F,
            Basis::Act365L,
            Basis::ActActIsda,
            Basis::ActActIcma,
            Basis::Nl365,
            Basis::Thirty360,
            Basis::Bus252,
        ];
        // The search's order: the list order of behaviour.md.
        let c = cause(
            Basis::Act360,
            bases
                .iter()
                .map(|b| found(b.name(), 0, ChangeKind::Basis(*b)))
                .collect(),
        );
        assert_eq!(
            words(&c),
            [
                "ACT/365F",
                "ACT/365L",
                "NL/365",
                "ACT/ACT ISDA",
                "ACT/ACT ICMA",
                "30/360",
                "BUS/252"
            ]
        );
    }

    #[test]
    fn a_dated_entry_of_the_account_comes_before_a_convention() {
        let c = cause(
            Basis::Act360,
            vec![
                found("basis", 0, ChangeKind::Basis(Basis::Act365F)),
                found("compounding", 0, ChangeKind::Compounding),
                found("rounding", 0, ChangeKind::Rounding),
                found("left out", 0, ChangeKind::Movement { days: None }),
                found("period", 0, ChangeKind::Period),
                found("moved 3", 0, ChangeKind::Movement { days: Some(3) }),
                found("rate 1", 0, ChangeKind::RateChange { days: Some(1) }),
                found("floating", 0, ChangeKind::Floating),
            ],
        );
        assert_eq!(
            words(&c),
            [
                "left out",
                "rate 1",
                "moved 3",
                "period",
                "floating",
                "basis",
                "rounding",
                "compounding"
            ]
        );
    }

    #[test]
    fn an_exact_change_comes_before_a_closer_kind_that_only_comes_within() {
        let c = cause(
            Basis::Act360,
            vec![
                found("basis", 0, ChangeKind::Basis(Basis::Act365F)),
                found("period", 1, ChangeKind::Period),
            ],
        );
        assert_eq!(words(&c), ["basis", "period"]);
    }

    #[test]
    fn the_sheet_names_the_first_and_counts_them_all() {
        let c = cause(
            Basis::Act360,
            vec![
                found("x (exact)", 0, ChangeKind::Basis(Basis::ActActIsda)),
                found("y (exact)", 0, ChangeKind::Basis(Basis::Act365F)),
            ],
        );
        assert_eq!(
            sheet_words(&c, "A-1"),
            "y (exact). The most plausible of 2 single changes that reproduce the posted \
             amount within tolerance; all 2: ledgerate explain --account A-1"
        );
        // The search's own list, for explain, is untouched.
        assert_eq!(c.text(), "x (exact); or y (exact)");
        let one = cause(Basis::Act360, vec![found("z", 0, ChangeKind::Period)]);
        assert_eq!(
            sheet_words(&one, "A-1"),
            "z. The only single change that reproduces the posted amount within tolerance"
        );
        let none = LikelyCause {
            basis: Basis::Act360,
            found: Vec::new(),
            implied: Some("no single change reproduces the posted amount".into()),
        };
        assert_eq!(
            sheet_words(&none, "A-1"),
            "no single change reproduces the posted amount"
        );
    }
}
