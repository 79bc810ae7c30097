//! The typed terms of one account, as the engine needs them.
//!
//! Readers build these from books; tests build them directly. Nothing here
//! knows where a term came from.

use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::events::LifeEvents;
use super::shared::Shared;
use crate::conventions::calendar::{BusinessDay, Calendar};
use crate::conventions::compounding::Compounding;
use crate::conventions::daycount::Basis;
use crate::conventions::names::{lookup, UnknownName};
use crate::conventions::rounding::RoundMode;
use crate::conventions::schedule::{AnchorKind, Posting};

use super::tax::TaxTerms;

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

/// How an account's rate is found for each day (behaviour.md, Input books:
/// Accounts column `rate_method`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum RateMethod {
    /// The Rates rows give the rate itself.
    #[default]
    Fixed,
    /// Each day earns its looked-back fixing plus the spread, over f(D).
    SimpleDaily,
    /// The fixings of a period's business days compound (ACT/360 or ACT/365F).
    CompoundedInArrears,
}

impl RateMethod {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            RateMethod::Fixed => "fixed",
            RateMethod::SimpleDaily => "simple-daily",
            RateMethod::CompoundedInArrears => "compounded-in-arrears",
        }
    }

    /// Parses `fixed`, `simple-daily` or `compounded-in-arrears`.
    ///
    /// ```
    /// use ledgerate::engine::terms::RateMethod;
    /// assert_eq!(RateMethod::parse("Compounded-In-Arrears"), Ok(RateMethod::CompoundedInArrears));
    /// assert!(RateMethod::parse("compounded").is_err());
    /// ```
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<RateMethod, UnknownName> {
        lookup(
            "rate method",
            s,
            &[
                ("fixed", RateMethod::Fixed),
                ("simple-daily", RateMethod::SimpleDaily),
                ("compounded-in-arrears", RateMethod::CompoundedInArrears),
            ],
            &["fixed", "simple-daily", "compounded-in-arrears"],
        )
    }

    /// Whether the rate comes from index fixings.
    pub fn is_floating(self) -> bool {
        self != RateMethod::Fixed
    }
}

/// What a floor and a cap bound (behaviour.md, Input books: Accounts column
/// `floor_on`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum FloorOn {
    /// Each looked-back fixing, before the spread is added.
    #[default]
    Index,
    /// The index plus the spread.
    AllIn,
}

impl FloorOn {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            FloorOn::Index => "index",
            FloorOn::AllIn => "all-in",
        }
    }

    /// Parses `index` or `all-in`.
    ///
    /// # Errors
    /// [`UnknownName`] with the closest name.
    pub fn parse(s: &str) -> Result<FloorOn, UnknownName> {
        lookup(
            "floor basis",
            s,
            &[("index", FloorOn::Index), ("all-in", FloorOn::AllIn)],
            &["index", "all-in"],
        )
    }
}

/// The floating-rate terms of an account (behaviour.md, Floating rates). The
/// default is a fixed-rate account.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub struct FloatingTerms {
    /// How the day's rate is found.
    pub method: RateMethod,
    /// Business days each fixing is looked back.
    pub lookback_days: u32,
    /// Compounded-in-arrears: take the business days and weights from the
    /// observation period moved back `lookback_days` business days.
    pub observation_shift: bool,
    /// The last business days of a period that use the fixing of the business
    /// day before them.
    pub lockout_days: u32,
    /// Compounded-in-arrears: the spread compounds with the fixings (else it
    /// is added after compounding).
    pub spread_compounded: bool,
    /// What a floor and a cap bound.
    pub floor_on: FloorOn,
}

/// The terms of one account (behaviour.md, Input books: the Accounts sheet).
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
    /// Posting anchor; `None` takes the default of behaviour.md, Posting schedule.
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
    /// How the rate of each day is found (behaviour.md, Floating rates); fixed by
    /// default.
    pub floating: FloatingTerms,
    /// Withholding tax on postings (behaviour.md, Withholding tax); `None`: no tax.
    pub tax: Option<TaxTerms>,
    /// Closure, break penalty and what happens after maturity (behaviour.md,
    /// Account life events); none by default. Shared by every account
    /// without a life event, so it costs such an account one pointer.
    pub events: Shared<LifeEvents>,
}

impl AccountTerms {
    /// An account with the defaults of behaviour.md, Input books: liability, simple,
    /// monthly postings paid out, rounded at posting half-up, whole tiers,
    /// unadjusted.
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
            floating: FloatingTerms::default(),
            tax: None,
            events: Shared::default(),
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
    pub reference: Option<Box<str>>,
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
