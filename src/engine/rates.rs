//! Rate schedules and tiers: which annual rates a day's base earns.
//!
//! The engine asks a [`RateSource`] for the table in force on each day. Fixed
//! schedules from a book's Rates sheet fill it now; index fixings can fill it
//! the same way, one table per day. Pure: no files, no printing.

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::terms::TierMethod;

/// One tier: the rate earned from `from` upward.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Tier {
    /// The threshold of the interest-bearing base where the tier starts.
    pub from: Decimal,
    /// Annual nominal rate as a decimal (0.0425 for 4.25%).
    pub rate: Decimal,
}

/// A complete rate table: every tier in force from `effective` on.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RateTable {
    /// The first day of the table.
    pub effective: NaiveDate,
    /// Tiers by ascending threshold.
    pub tiers: Vec<Tier>,
}

impl RateTable {
    /// The pieces of `base` and the rate each earns. Tiers apply to the size of
    /// the base; the pieces carry its sign. A base below the lowest threshold
    /// earns nothing.
    ///
    /// ```
    /// use ledgerate::engine::rates::{RateTable, Tier};
    /// use ledgerate::engine::TierMethod;
    /// use rust_decimal::Decimal;
    /// let d = |s: &str| s.parse::<Decimal>().unwrap();
    /// let t = RateTable { effective: "2026-01-01".parse().unwrap(), tiers: vec![
    ///     Tier { from: d("0"), rate: d("0.01") }, Tier { from: d("10000"), rate: d("0.02") }] };
    /// let mut whole = Vec::new();
    /// t.pieces(d("20000"), TierMethod::Whole, &mut whole);
    /// assert_eq!(whole, vec![(d("20000"), d("0.02"))]);
    /// let mut banded = Vec::new();
    /// t.pieces(d("20000"), TierMethod::Banded, &mut banded);
    /// assert_eq!(banded, vec![(d("10000"), d("0.01")), (d("10000"), d("0.02"))]);
    /// ```
    pub fn pieces(&self, base: Decimal, method: TierMethod, out: &mut Vec<(Decimal, Decimal)>) {
        out.clear();
        let size = base.abs();
        let signed = |x: Decimal| if base.is_sign_negative() { -x } else { x };
        match method {
            TierMethod::Whole => {
                if let Some(t) = self.tiers.iter().rev().find(|t| t.from <= size) {
                    out.push((base, t.rate));
                }
            }
            TierMethod::Banded => {
                for (i, t) in self.tiers.iter().enumerate() {
                    if t.from >= size {
                        break;
                    }
                    let top = self.tiers.get(i + 1).map_or(size, |n| n.from.min(size));
                    if top > t.from {
                        out.push((signed(top - t.from), t.rate));
                    }
                }
            }
        }
    }
}

/// Where the engine finds the rates of each day.
pub trait RateSource: Sync {
    /// The table in force on `day`, or `None` when no table is.
    fn table_on(&self, day: NaiveDate) -> Option<&RateTable>;

    /// The first effective date, for messages.
    fn first_effective(&self) -> Option<NaiveDate>;

    /// The first day after `day` whose table may differ from `day`'s;
    /// `None` when no later change is known. The engine accrues the days in
    /// between in one step. A source that cannot tell says the next day.
    fn next_change_after(&self, day: NaiveDate) -> Option<NaiveDate> {
        day.succ_opt()
    }
}

/// A fixed schedule: tables by effective date; the table for a day is the one
/// with the latest effective date on or before it (nothing is inherited from
/// older tables).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct RateSchedule {
    tables: Vec<RateTable>,
}

impl RateSchedule {
    /// Builds a schedule from rows of (effective date, rate as a decimal,
    /// tier threshold). Rows with the same effective date form one table.
    ///
    /// ```
    /// use ledgerate::engine::rates::{RateSchedule, RateSource};
    /// use rust_decimal::Decimal;
    /// let d = |s: &str| s.parse::<Decimal>().unwrap();
    /// let s = RateSchedule::from_rows([
    ///     ("2026-01-01".parse().unwrap(), d("0.0310"), Decimal::ZERO),
    ///     ("2026-11-20".parse().unwrap(), d("0.0335"), Decimal::ZERO),
    /// ]);
    /// assert_eq!(s.table_on("2026-11-19".parse().unwrap()).unwrap().tiers[0].rate, d("0.0310"));
    /// assert_eq!(s.table_on("2026-11-20".parse().unwrap()).unwrap().tiers[0].rate, d("0.0335"));
    /// assert!(s.table_on("2025-12-31".parse().unwrap()).is_none());
    /// ```
    pub fn from_rows(
        rows: impl IntoIterator<Item = (NaiveDate, Decimal, Decimal)>,
    ) -> RateSchedule {
        let mut rows: Vec<_> = rows.into_iter().collect();
        rows.sort_by(|a, b| a.0.cmp(&b.0).then(a.2.cmp(&b.2)));
        let mut tables: Vec<RateTable> = Vec::new();
        for (effective, rate, from) in rows {
            match tables.last_mut() {
                Some(t) if t.effective == effective => t.tiers.push(Tier { from, rate }),
                _ => tables.push(RateTable {
                    effective,
                    tiers: vec![Tier { from, rate }],
                }),
            }
        }
        RateSchedule { tables }
    }

    /// The tables, by effective date.
    pub fn tables(&self) -> &[RateTable] {
        &self.tables
    }

    /// The schedule without the tables whose effective date `drop` says to
    /// leave out (tables not yet booked at a knowledge date).
    pub fn without(&self, drop: impl Fn(NaiveDate) -> bool) -> RateSchedule {
        RateSchedule {
            tables: self
                .tables
                .iter()
                .filter(|t| !drop(t.effective))
                .cloned()
                .collect(),
        }
    }

    /// A schedule of whole tables (sorted here by effective date; of two
    /// tables on one date, the later in the list wins).
    pub fn from_tables(mut tables: Vec<RateTable>) -> RateSchedule {
        tables.sort_by_key(|t| t.effective);
        RateSchedule { tables }
    }
}

impl RateSource for RateSchedule {
    fn table_on(&self, day: NaiveDate) -> Option<&RateTable> {
        let i = self.tables.partition_point(|t| t.effective <= day);
        i.checked_sub(1).and_then(|i| self.tables.get(i))
    }

    fn first_effective(&self) -> Option<NaiveDate> {
        self.tables.first().map(|t| t.effective)
    }

    fn next_change_after(&self, day: NaiveDate) -> Option<NaiveDate> {
        let i = self.tables.partition_point(|t| t.effective <= day);
        self.tables.get(i).map(|t| t.effective)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    fn table() -> RateTable {
        RateTable {
            effective: "2026-01-01".parse().unwrap(),
            tiers: vec![
                Tier {
                    from: d("1000"),
                    rate: d("0.01"),
                },
                Tier {
                    from: d("5000"),
                    rate: d("0.02"),
                },
                Tier {
                    from: d("20000"),
                    rate: d("0.03"),
                },
            ],
        }
    }

    /// Rates and tiers: a base below the lowest threshold earns nothing.
    #[test]
    fn below_the_lowest_threshold_earns_nothing() {
        let mut out = Vec::new();
        table().pieces(d("999.99"), TierMethod::Whole, &mut out);
        assert!(out.is_empty());
        table().pieces(d("999.99"), TierMethod::Banded, &mut out);
        assert!(out.is_empty());
    }

    /// Regulation DD Appendix A tiering methods A (whole) and B (banded), as
    /// summarised in the conventions reference section 8.
    #[test]
    fn whole_and_banded_tiers() {
        let mut out = Vec::new();
        table().pieces(d("8000"), TierMethod::Whole, &mut out);
        assert_eq!(out, vec![(d("8000"), d("0.02"))]);
        table().pieces(d("25000"), TierMethod::Banded, &mut out);
        assert_eq!(
            out,
            vec![
                (d("4000"), d("0.01")),
                (d("15000"), d("0.02")),
                (d("5000"), d("0.03"))
            ]
        );
        // A debit base keeps its sign.
        table().pieces(d("-6000"), TierMethod::Banded, &mut out);
        assert_eq!(out, vec![(d("-4000"), d("0.01")), (d("-1000"), d("0.02"))]);
    }
}
