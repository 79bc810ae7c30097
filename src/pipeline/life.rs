//! The notes and warnings of an account's close (behaviour.md, Account life
//! events): a payout that differs from the movements valued on the close
//! date, and a close that makes no closing posting. It computes no figure.

use crate::book::AccountEntry;
use crate::engine::events::{never_posts, Closing};
use crate::engine::reconcile::Tolerance;
use crate::problem::{Problem, Severity};

/// What a close says about itself.
pub(super) fn life_notes(
    entry: &AccountEntry,
    closing: &Closing,
    tolerance: &Tolerance,
) -> Vec<Problem> {
    let t = &entry.terms;
    let id = &t.id;
    let x = closing.date;
    let mut notes = Vec::new();
    let problem = |severity: Severity, found: String, expected: String, fix: &str| Problem {
        severity,
        position: entry.position.to_position(),
        account: Some(id.clone()),
        found,
        expected,
        fix: fix.to_string(),
        follows: None,
    };
    if closing.closing_posting.is_none() && never_posts(t) {
        notes.push(problem(
            Severity::Warning,
            format!("account {id}: close_date {x} with posting none"),
            "a posting frequency, so that the close posts the interest earned".to_string(),
            "no closing posting is made: the interest earned stays accrued until it is booked by hand; give a posting frequency to post it on the close",
        ));
    }
    if closing.paid_given {
        let gap = (closing.paid + closing.payout).abs();
        if gap > tolerance.amount_for(t.minor_units) {
            notes.push(problem(
                Severity::Warning,
                format!(
                    "account {id}: movements valued on the close_date {x} total {}, the payout is {}",
                    closing.paid, closing.payout
                ),
                format!("movements on {x} totalling -{} (the payout: balance + closing posting - penalty - tax)", closing.payout),
                "check the payout movement, the penalty and the closing posting; movements valued on the close_date are taken as the payout and not applied",
            ));
        }
    }
    notes
}
