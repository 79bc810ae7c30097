//! Withholding tax on postings (behaviour.md, Withholding tax): the tax
//! tables of one `tax_ref` and the tax and net amount of one posting.
//!
//! The tax point is each posting: G is the posting's amount as posted, t the
//! rate of the table in force on its payment date, T = G x t rounded to the
//! minor unit with the table's mode, N = G - T. A posting of zero or less
//! bears no tax. The accrual itself stays gross: nothing here touches a
//! day's interest. This module never reads a book, and never takes a missing
//! table for a zero rate: no table in force is an error on the account.

use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::error::EngineError;
use crate::conventions::rounding::RoundMode;

/// One tax table: the rate in force from `effective` until the next table.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct TaxTable {
    /// The first day the table is in force.
    pub effective: NaiveDate,
    /// The rate as a fraction (0.20 for 20%), 0 to 1.
    pub rate: Decimal,
    /// How the tax of a posting is rounded to the minor unit.
    pub round_mode: RoundMode,
}

/// The tables of one `tax_ref`, by effective date.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct TaxSchedule {
    /// The schedule's name (the Tax sheet's `tax_ref`).
    pub tax_ref: String,
    /// Tables in effective-date order, one per date.
    tables: Vec<TaxTable>,
}

impl TaxSchedule {
    /// A schedule of `tables` (any order; the reader refuses two tables on
    /// one date, and of two here the later given wins).
    pub fn new(tax_ref: &str, tables: impl IntoIterator<Item = TaxTable>) -> TaxSchedule {
        let mut tables: Vec<TaxTable> = tables.into_iter().collect();
        tables.sort_by_key(|t| t.effective);
        tables.dedup_by(|later, earlier| {
            let same = later.effective == earlier.effective;
            if same {
                *earlier = *later;
            }
            same
        });
        TaxSchedule {
            tax_ref: tax_ref.to_string(),
            tables,
        }
    }

    /// The tables, by effective date.
    pub fn tables(&self) -> &[TaxTable] {
        &self.tables
    }

    /// The table in force on `day`: the last effective on or before it.
    pub fn in_force(&self, day: NaiveDate) -> Option<&TaxTable> {
        self.tables.iter().rev().find(|t| t.effective <= day)
    }
}

/// An account's withholding tax: its schedule (shared by the accounts that
/// name it).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TaxTerms {
    /// The tables of the account's `tax_ref`.
    pub schedule: Arc<TaxSchedule>,
}

/// The tax and net amount of one posting.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Withheld {
    /// T: the tax withheld.
    pub tax: Decimal,
    /// N = G - T: what the customer (or the lender) is credited.
    pub net: Decimal,
    /// t: the rate applied, as a fraction (0 without tax).
    pub rate: Decimal,
}

impl Withheld {
    /// No tax: the net is the gross.
    pub fn none(gross: Decimal) -> Withheld {
        Withheld {
            tax: Decimal::ZERO,
            net: gross,
            rate: Decimal::ZERO,
        }
    }
}

/// The tax of a posting of `gross` paid on `payment`, rounded to
/// `minor_units` places with the table's mode.
///
/// # Errors
/// [`EngineError::NoTaxTable`] when no table of the schedule is in force on
/// `payment`; [`EngineError::Overflow`] when the product leaves the decimal
/// range.
///
/// Spec example D1 (savings at 20%): November's 300.00 bears 60.00 and
/// credits 240.00; December's 310.74 bears 62.148, 62.15 half-up (net
/// 248.59), 62.14 down (net 248.60).
///
/// ```
/// use ledgerate::conventions::rounding::RoundMode;
/// use ledgerate::engine::tax::{withhold, TaxSchedule, TaxTable};
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let n = |s: &str| s.parse::<rust_decimal::Decimal>().unwrap();
/// let at = |mode| TaxSchedule::new("SAV-20", [TaxTable { effective: d("2026-01-01"), rate: n("0.20"), round_mode: mode }]);
/// let nov = withhold(&at(RoundMode::HalfUp), n("300.00"), d("2026-11-30"), 2).unwrap();
/// assert_eq!((nov.tax.to_string().as_str(), nov.net.to_string().as_str()), ("60.00", "240.00"));
/// let dec = withhold(&at(RoundMode::HalfUp), n("310.74"), d("2026-12-31"), 2).unwrap();
/// assert_eq!((dec.tax.to_string().as_str(), dec.net.to_string().as_str()), ("62.15", "248.59"));
/// let down = withhold(&at(RoundMode::Down), n("310.74"), d("2026-12-31"), 2).unwrap();
/// assert_eq!((down.tax.to_string().as_str(), down.net.to_string().as_str()), ("62.14", "248.60"));
/// // No table in force on the payment date is an error, never a zero rate.
/// assert!(withhold(&at(RoundMode::HalfUp), n("300.00"), d("2025-12-31"), 2).is_err());
/// ```
///
/// Spec example D2 (backup withholding at 24%; Source: Internal Revenue Code
/// section 3406): 1,234.57 bears 296.2968, 296.30 half-up (net 938.27),
/// 296.29 down.
///
/// ```
/// use ledgerate::conventions::rounding::RoundMode;
/// use ledgerate::engine::tax::{withhold, TaxSchedule, TaxTable};
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let n = |s: &str| s.parse::<rust_decimal::Decimal>().unwrap();
/// let at = |mode| TaxSchedule::new("US-BACKUP", [TaxTable { effective: d("2018-01-01"), rate: n("0.24"), round_mode: mode }]);
/// let w = withhold(&at(RoundMode::HalfUp), n("1234.57"), d("2026-11-30"), 2).unwrap();
/// assert_eq!((w.tax.to_string().as_str(), w.net.to_string().as_str()), ("296.30", "938.27"));
/// assert_eq!(withhold(&at(RoundMode::Down), n("1234.57"), d("2026-11-30"), 2).unwrap().tax.to_string(), "296.29");
/// // A posting of zero or less bears no tax.
/// assert!(withhold(&at(RoundMode::HalfUp), n("-5.00"), d("2026-11-30"), 2).unwrap().tax.is_zero());
/// ```
pub fn withhold(
    schedule: &TaxSchedule,
    gross: Decimal,
    payment: NaiveDate,
    minor_units: u32,
) -> Result<Withheld, EngineError> {
    let table = schedule
        .in_force(payment)
        .ok_or_else(|| EngineError::NoTaxTable {
            tax_ref: schedule.tax_ref.clone(),
            date: payment,
            first: schedule
                .tables
                .first()
                .map_or_else(|| "none".to_string(), |t| t.effective.to_string()),
        })?;
    if gross <= Decimal::ZERO {
        return Ok(Withheld {
            rate: table.rate,
            ..Withheld::none(gross)
        });
    }
    let overflow = EngineError::Overflow {
        what: "the withholding tax",
        date: payment,
    };
    let product = gross.checked_mul(table.rate).ok_or(overflow.clone())?;
    let tax = table.round_mode.round(product, minor_units);
    let net = gross.checked_sub(tax).ok_or(overflow)?;
    Ok(Withheld {
        tax,
        net,
        rate: table.rate,
    })
}

/// A rate as a percentage in plain words: 0.2 is "20", 0.155 is "15.5".
fn percent(rate: Decimal) -> String {
    (rate * Decimal::ONE_HUNDRED).normalize().to_string()
}

/// The tax of `gross` under each other table of the schedule than the one in
/// force on `payment`, once per rate: (rate, tax).
fn other_rates(
    schedule: &TaxSchedule,
    gross: Decimal,
    payment: NaiveDate,
    minor_units: u32,
) -> Vec<(Decimal, Decimal)> {
    let in_force = schedule.in_force(payment).map(|t| t.rate);
    let mut out: Vec<(Decimal, Decimal)> = Vec::new();
    for t in &schedule.tables {
        if Some(t.rate) == in_force || out.iter().any(|(r, _)| *r == t.rate) {
            continue;
        }
        if let Some(product) = gross.checked_mul(t.rate) {
            out.push((t.rate, t.round_mode.round(product, minor_units)));
        }
    }
    out
}

/// The likely cause of a gross statement amount `posted` against the
/// `expected` gross when it is a net amount (behaviour.md, Withholding tax):
/// "posted net of t% tax (T)", or the net under another table's rate of the
/// same tax_ref, "posted net of tax at t'% instead of t% (T' instead of T)".
///
/// ```
/// use ledgerate::conventions::rounding::RoundMode;
/// use ledgerate::engine::tax::{net_posting_cause, TaxSchedule, TaxTable};
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let n = |s: &str| s.parse::<rust_decimal::Decimal>().unwrap();
/// let s = TaxSchedule::new("SAV", [
///     TaxTable { effective: d("2025-01-01"), rate: n("0.25"), round_mode: RoundMode::HalfUp },
///     TaxTable { effective: d("2026-01-01"), rate: n("0.20"), round_mode: RoundMode::HalfUp },
/// ]);
/// // Spec example D1: 240.00 posted against 300.00 under gross.
/// let cause = net_posting_cause(&s, n("300.00"), n("240.00"), d("2026-12-01"), 2);
/// assert_eq!(cause.as_deref(), Some("posted net of 20% tax (60.00)"));
/// let old = net_posting_cause(&s, n("300.00"), n("225.00"), d("2026-12-01"), 2);
/// assert_eq!(old.as_deref(), Some("posted net of tax at 25% instead of 20% (75.00 instead of 60.00)"));
/// assert_eq!(net_posting_cause(&s, n("300.00"), n("250.00"), d("2026-12-01"), 2), None);
/// ```
pub fn net_posting_cause(
    schedule: &TaxSchedule,
    expected: Decimal,
    posted: Decimal,
    payment: NaiveDate,
    minor_units: u32,
) -> Option<String> {
    let w = withhold(schedule, expected, payment, minor_units).ok()?;
    if w.tax.is_zero() || expected <= Decimal::ZERO {
        return None;
    }
    if posted == w.net {
        return Some(format!(
            "posted net of {}% tax ({})",
            percent(w.rate),
            w.tax
        ));
    }
    other_rates(schedule, expected, payment, minor_units)
        .into_iter()
        .find(|(_, tax)| expected - *tax == posted)
        .map(|(rate, tax)| {
            format!(
                "posted net of tax at {}% instead of {}% ({tax} instead of {})",
                percent(rate),
                percent(w.rate),
                w.tax
            )
        })
}

/// What is wrong with the tax a statement shows, `stated`, on a posting of
/// `gross` (behaviour.md, Withholding tax); `None` when it is the tax due.
/// "tax of T not withheld" when it shows none, "tax at t'% instead of t%"
/// when it is another table's rate of the same tax_ref, else the two amounts.
///
/// ```
/// use ledgerate::conventions::rounding::RoundMode;
/// use ledgerate::engine::tax::{stated_tax_cause, TaxSchedule, TaxTable};
/// let d = |s: &str| s.parse::<chrono::NaiveDate>().unwrap();
/// let n = |s: &str| s.parse::<rust_decimal::Decimal>().unwrap();
/// let s = TaxSchedule::new("SAV", [
///     TaxTable { effective: d("2025-01-01"), rate: n("0.25"), round_mode: RoundMode::HalfUp },
///     TaxTable { effective: d("2026-01-01"), rate: n("0.20"), round_mode: RoundMode::HalfUp },
/// ]);
/// let pay = d("2026-12-01");
/// assert_eq!(stated_tax_cause(&s, n("300.00"), n("60.00"), pay, 2), None);
/// assert_eq!(stated_tax_cause(&s, n("300.00"), n("0"), pay, 2).as_deref(), Some("tax of 60.00 not withheld"));
/// assert_eq!(stated_tax_cause(&s, n("300.00"), n("75.00"), pay, 2).as_deref(), Some("tax at 25% instead of 20% (75.00 instead of 60.00)"));
/// assert_eq!(stated_tax_cause(&s, n("300.00"), n("61.00"), pay, 2).as_deref(), Some("tax withheld 61.00 instead of 60.00 (20% of 300.00)"));
/// ```
pub fn stated_tax_cause(
    schedule: &TaxSchedule,
    gross: Decimal,
    stated: Decimal,
    payment: NaiveDate,
    minor_units: u32,
) -> Option<String> {
    let w = withhold(schedule, gross, payment, minor_units).ok()?;
    if stated == w.tax {
        return None;
    }
    if stated.is_zero() {
        return Some(format!("tax of {} not withheld", w.tax));
    }
    if gross > Decimal::ZERO {
        let other = other_rates(schedule, gross, payment, minor_units)
            .into_iter()
            .find(|(_, tax)| *tax == stated);
        if let Some((rate, tax)) = other {
            return Some(format!(
                "tax at {}% instead of {}% ({tax} instead of {})",
                percent(rate),
                percent(w.rate),
                w.tax
            ));
        }
    }
    Some(format!(
        "tax withheld {stated} instead of {} ({}% of {gross})",
        w.tax,
        percent(w.rate)
    ))
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

    #[test]
    fn spec_example_d3_treaty_rate_on_a_quarter() {
        // Source: OECD Model Tax Convention, Article 11(2) caps the source
        // state's tax as a percentage of the gross interest; here 15%.
        let s = TaxSchedule::new(
            "TREATY-15",
            [TaxTable {
                effective: d("2026-01-01"),
                rate: n("0.15"),
                round_mode: RoundMode::HalfUp,
            }],
        );
        let w = withhold(&s, n("53666.67"), d("2026-12-31"), 2).unwrap();
        assert_eq!(w.tax, n("8050.00"));
        assert_eq!(w.net, n("45616.67"));
    }

    #[test]
    fn withholding_tax_the_table_in_force_on_the_payment_date_applies() {
        let s = TaxSchedule::new(
            "T",
            [
                TaxTable {
                    effective: d("2026-12-01"),
                    rate: n("0.25"),
                    round_mode: RoundMode::HalfUp,
                },
                TaxTable {
                    effective: d("2026-01-01"),
                    rate: n("0.20"),
                    round_mode: RoundMode::HalfUp,
                },
            ],
        );
        // The period ends in November, but it is paid on 1 December.
        assert_eq!(
            withhold(&s, n("100.00"), d("2026-11-30"), 2).unwrap().tax,
            n("20.00")
        );
        assert_eq!(
            withhold(&s, n("100.00"), d("2026-12-01"), 2).unwrap().tax,
            n("25.00")
        );
        let e = withhold(&s, n("100.00"), d("2025-06-30"), 2).unwrap_err();
        assert!(e.to_string().contains("2025-06-30"), "{e}");
    }

    #[test]
    fn withholding_tax_a_zero_rate_is_an_exemption() {
        let s = TaxSchedule::new(
            "EXEMPT",
            [TaxTable {
                effective: d("2026-01-01"),
                rate: Decimal::ZERO,
                round_mode: RoundMode::Up,
            }],
        );
        let w = withhold(&s, n("123.45"), d("2026-11-30"), 2).unwrap();
        assert_eq!((w.tax, w.net), (Decimal::ZERO, n("123.45")));
    }

    /// Withholding tax: T + N = G for every posting, every mode and rate,
    /// and T is never more than G (the rate is at most 100%).
    #[test]
    fn withholding_tax_tax_and_net_add_up_to_the_gross() {
        for mode in RoundMode::ALL {
            for rate in ["0", "0.15", "0.2", "0.24", "0.333333", "1"] {
                let s = TaxSchedule::new(
                    "T",
                    [TaxTable {
                        effective: d("2026-01-01"),
                        rate: n(rate),
                        round_mode: mode,
                    }],
                );
                for cents in (0..5000).step_by(7) {
                    let g = Decimal::new(cents * 13 + 1, 2);
                    let w = withhold(&s, g, d("2026-11-30"), 2).unwrap();
                    assert_eq!(w.tax + w.net, g, "{g} at {rate} {mode:?}");
                    assert!(w.tax >= Decimal::ZERO && w.tax <= g, "{g} at {rate}");
                    assert!(w.tax.scale() <= 2, "{}", w.tax);
                }
            }
        }
    }
}
