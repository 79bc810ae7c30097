//! The typed terms of one account, as the engine needs them.
//!
//! Readers build these from books; tests build them directly. Nothing here
//! knows where a term came from.

use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use crate::conventions::calendar::{BusinessDay, Calendar};
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::names::{lookup, UnknownName};
use crate::conventions::rounding::RoundMode;
use crate::conventions::schedule::{AnchorKind, Posting};

/// Which side of the balance sheet the account is on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum Side {
    /// A deposit or borrowing: interest is an expense.
    #[default]
    Liability,
    /// A loan or placement: interest is income.
    Asset,
}

impl Side {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            Side::Liability => "liability",
            Side::Asset => "asset",
        }
    }

    /// Parses `asset` or `liability`.
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<Side, UnknownName> {
        lookup(
            "side",
            s,
            &[("liability", Side::Liability), ("asset", Side::Asset)],
            &["liability", "asset"],
        )
    }
}

/// Where daily interest is rounded.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum RoundAt {
    /// Only posted and reported amounts are rounded; days keep full precision.
    #[default]
    Posting,
    /// Each day's interest is rounded before it is added anywhere.
    Daily,
}

impl RoundAt {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            RoundAt::Posting => "posting",
            RoundAt::Daily => "daily",
        }
    }

    /// Parses `posting` or `daily`.
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<RoundAt, UnknownName> {
        lookup(
            "rounding point",
            s,
            &[("posting", RoundAt::Posting), ("daily", RoundAt::Daily)],
            &["posting", "daily"],
        )
    }
}

/// How tiers apply to the base.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum TierMethod {
    /// The whole base earns the rate of the highest tier reached.
    #[default]
    Whole,
    /// Each slice of the base earns its own tier's rate.
    Banded,
}

impl TierMethod {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            TierMethod::Whole => "whole",
            TierMethod::Banded => "banded",
        }
    }

    /// Parses `whole` or `banded`.
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<TierMethod, UnknownName> {
        lookup(
            "tier method",
            s,
            &[("whole", TierMethod::Whole), ("banded", TierMethod::Banded)],
            &["whole", "banded"],
        )
    }
}

/// The terms of one account (books.md, Accounts sheet).
#[derive(Debug, Clone)]
pub struct AccountTerms {
    /// The account id.
    pub id: String,
    /// ISO 4217 code.
    pub currency: String,
    /// Decimal places of the currency's minor unit.
    pub minor_units: u32,
    /// Asset or liability.
    pub side: Side,
    /// Day-count basis.
    pub basis: Basis,
    /// Compounding rule.
    pub compounding: Compounding,
    /// Posting frequency.
    pub posting: Posting,
    /// Posting anchor; `None` takes the default of semantics section 2.
    pub anchor: Option<NaiveDate>,
    /// What the anchor is.
    pub anchor_kind: AnchorKind,
    /// Whether postings join the balance.
    pub capitalise: bool,
    /// Where daily interest is rounded.
    pub round_at: RoundAt,
    /// How amounts are rounded.
    pub round_mode: RoundMode,
    /// Places for daily rounding; `None`: the currency's minor unit.
    pub round_places: Option<u32>,
    /// Maturity M; the night of M-1 is the last that earns.
    pub maturity: Option<NaiveDate>,
    /// How tiers apply.
    pub tier_method: TierMethod,
    /// The account's business-day calendar.
    pub calendar: Arc<Calendar>,
    /// How payment dates move off non-business days.
    pub business_day: BusinessDay,
    /// Business days from period end to payment.
    pub payment_delay_days: u32,
    /// O: the first day the account earns (or the day it was brought forward).
    pub open_date: NaiveDate,
    /// The balance at the start of `open_date`.
    pub opening_balance: Decimal,
    /// Interest accrued and not posted at the start of `open_date`.
    pub opening_accrued: Decimal,
    /// Where the period open on `open_date` began, when before it.
    pub period_start: Option<NaiveDate>,
}

impl AccountTerms {
    /// An account with the defaults of books.md: liability, simple, monthly
    /// postings paid out, rounded at posting half-up, whole tiers, unadjusted.
    ///
    /// ```
    /// use ledgerate::conventions::daycount::Basis;
    /// use ledgerate::engine::AccountTerms;
    /// let t = AccountTerms::new("SAV-1", "USD", 2, Basis::Act365F, "2026-11-01".parse().unwrap(), "1000.00".parse().unwrap());
    /// assert_eq!(t.posting.name(), "monthly");
    /// assert!(!t.capitalise);
    /// ```
    pub fn new(
        id: &str,
        currency: &str,
        minor_units: u32,
        basis: Basis,
        open_date: NaiveDate,
        opening_balance: Decimal,
    ) -> AccountTerms {
        AccountTerms {
            id: id.to_string(),
            currency: currency.to_string(),
            minor_units,
            side: Side::Liability,
            basis,
            compounding: Compounding::Simple,
            posting: Posting::Monthly,
            anchor: None,
            anchor_kind: AnchorKind::End,
            capitalise: false,
            round_at: RoundAt::Posting,
            round_mode: RoundMode::HalfUp,
            round_places: None,
            maturity: None,
            tier_method: TierMethod::Whole,
            calendar: Arc::new(Calendar::weekends_only()),
            business_day: BusinessDay::Unadjusted,
            payment_delay_days: 0,
            open_date,
            opening_balance,
            opening_accrued: Decimal::ZERO,
            period_start: None,
        }
    }

    /// The first day of the period open on `open_date`.
    pub fn first_period_start(&self) -> NaiveDate {
        self.period_start.unwrap_or(self.open_date)
    }
}

/// A balance movement: `amount` (positive raises the balance) in the balance
/// from `value_date` on.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Movement {
    /// The first day the movement is in the balance.
    pub value_date: NaiveDate,
    /// Signed amount.
    pub amount: Decimal,
    /// When it was booked, if after the value date (back-valuation).
    pub booking_date: Option<NaiveDate>,
    /// The book's reference for it.
    pub reference: Option<String>,
}

/// An amount actually posted for one posting period (from a statement).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ActualPosting {
    /// First day of the period.
    pub start: NaiveDate,
    /// Last day of the period.
    pub end: NaiveDate,
    /// What was posted.
    pub amount: Decimal,
}
