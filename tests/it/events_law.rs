//! Laws of account life events (behaviour.md, Account life events), on
//! random accounts at the engine's level:
//!
//! - a close on X with no penalty gives the figures of a maturity on X:
//!   the same postings, and a payout equal to the matured balance plus any
//!   closing posting not capitalised;
//! - a rollover's second term is a fresh account opened on the maturity M
//!   with the rolled principal, maturing M rolled by the term, at the
//!   rollover table in force on M.

use std::sync::Arc;

use chrono::{Duration, NaiveDate};
use proptest::prelude::*;
use rust_decimal::Decimal;

use ledgerate::conventions::daycount::Basis;
use ledgerate::conventions::schedule::{roll_months, Posting};
use ledgerate::engine::events::{accrue_life, settle_close, AfterMaturity};
use ledgerate::engine::rates::RateSchedule;
use ledgerate::engine::run::{accrue, RunOptions};
use ledgerate::engine::{AccountTerms, Inputs};

use crate::common::date;

fn basis() -> impl Strategy<Value = Basis> {
    prop_oneof![
        Just(Basis::Act365F),
        Just(Basis::Act360),
        Just(Basis::Thirty360),
        Just(Basis::ActActIsda)
    ]
}

fn posting() -> impl Strategy<Value = Posting> {
    prop_oneof![
        Just(Posting::Monthly),
        Just(Posting::Quarterly),
        Just(Posting::Maturity)
    ]
}

fn terms(
    basis: Basis,
    open: NaiveDate,
    cents: i64,
    posting: Posting,
    capitalise: bool,
) -> AccountTerms {
    let mut t = AccountTerms::new("TD-LAW", "USD", 2, basis, open, Decimal::new(cents, 2));
    t.posting = posting;
    t.capitalise = capitalise;
    t
}

fn rates(bp: u32) -> RateSchedule {
    RateSchedule::from_rows([(
        date("2020-01-01"),
        Decimal::new(i64::from(bp), 4),
        Decimal::ZERO,
    )])
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn a_close_without_penalty_is_a_maturity_on_the_close_date(
        basis in basis(),
        posting in posting(),
        capitalise in any::<bool>(),
        cents in 100_000i64..100_000_000,
        bp in 1u32..900,
        open_day in 0i64..200,
        life in 1i64..300,
        after in 0i64..60,
    ) {
        let open = date("2026-01-01") + Duration::days(open_day);
        let x = open + Duration::days(life);
        let cutoff = x + Duration::days(after);
        let options = RunOptions::month_end(cutoff);
        let r = rates(bp);
        let inputs = Inputs::new(&r);

        let mut matures = terms(basis, open, cents, posting, capitalise);
        matures.maturity = Some(x);
        let by_maturity = accrue(&matures, inputs, options).unwrap();

        let mut closes = terms(basis, open, cents, posting, capitalise);
        closes.maturity = if posting == Posting::Maturity { Some(x + Duration::days(400)) } else { None };
        closes.events.close_date = Some(x);
        let life_run = accrue_life(&closes, inputs, options).unwrap();
        let mut result = life_run.result;
        let leg = life_run.legs.last().unwrap();
        let closing = settle_close(&closes, leg, &inputs, options, &mut result).unwrap().unwrap();

        let amounts = |ps: &[ledgerate::engine::PostingRow]| {
            ps.iter().map(|p| (p.start, p.end, p.posted)).collect::<Vec<_>>()
        };
        prop_assert_eq!(amounts(&result.postings), amounts(&by_maturity.postings));
        prop_assert_eq!(result.accrued_at_cutoff, by_maturity.accrued_at_cutoff);
        prop_assert_eq!(result.interest_for_window, by_maturity.interest_for_window);
        prop_assert_eq!(closing.penalty, Decimal::ZERO);
        let closing_posting = closing.closing_posting.as_ref().map_or(Decimal::ZERO, |p| p.posted);
        let paid_out = if capitalise { Decimal::ZERO } else { closing_posting };
        prop_assert_eq!(closing.payout, by_maturity.balance_at_cutoff + paid_out);
        prop_assert_eq!(result.balance_at_cutoff, Decimal::ZERO);
        prop_assert_eq!(closing.closing_posting.map(|p| p.payment), Some(x));
    }

    #[test]
    fn a_rollovers_second_term_is_a_fresh_account_on_the_rolled_principal(
        basis in basis(),
        posting in posting(),
        capitalise in any::<bool>(),
        cents in 100_000i64..100_000_000,
        bp in 1u32..900,
        roll_bp in 1u32..900,
        open_day in 0i64..200,
        months in 1u32..7,
        life in 20i64..300,
        after in 0i64..150,
    ) {
        let open = date("2026-01-01") + Duration::days(open_day);
        let m = open + Duration::days(life);
        let cutoff = m + Duration::days(after);
        let options = RunOptions::month_end(cutoff);
        let r = rates(bp);
        let roll = Arc::new(rates(roll_bp));
        let inputs = Inputs::new(&r);

        let mut rolls = terms(basis, open, cents, posting, capitalise);
        rolls.maturity = Some(m);
        rolls.events.after_maturity = AfterMaturity::Rollover { months, rate_ref: "ROLL".into(), rates: Arc::clone(&roll) };
        let life_run = accrue_life(&rolls, inputs, options).unwrap();

        let first = accrue(&rolls, inputs, RunOptions::month_end(m.pred_opt().unwrap())).unwrap();
        let rolled = roll_months(m, i32::try_from(months).unwrap()).unwrap();
        let mut fresh = terms(basis, m, 0, posting, capitalise);
        fresh.opening_balance = first.balance_at_cutoff;
        fresh.maturity = Some(rolled);
        let fresh_rates = RateSchedule::from_rows([(m, Decimal::new(i64::from(roll_bp), 4), Decimal::ZERO)]);
        let second = accrue(&fresh, Inputs::new(&fresh_rates), options).unwrap();

        let second_leg = life_run.legs.get(1).unwrap();
        prop_assert_eq!(second_leg.terms.open_date, m);
        prop_assert_eq!(second_leg.contract_maturity, Some(rolled));
        let in_second: Vec<_> = life_run.result.postings.iter().filter(|p| p.start >= m && p.end < rolled).cloned().collect();
        let fresh_postings: Vec<_> = second.postings.iter().filter(|p| p.end < rolled).cloned().collect();
        prop_assert_eq!(in_second, fresh_postings);
        if cutoff < rolled {
            prop_assert_eq!(life_run.result.accrued_at_cutoff, second.accrued_at_cutoff);
            prop_assert_eq!(life_run.result.balance_at_cutoff, second.balance_at_cutoff);
        }
    }
}
