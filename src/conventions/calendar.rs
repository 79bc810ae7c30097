//! Business days: a holiday calendar (Saturdays, Sundays and a list of dates)
//! and the business-day conventions that move a date off a non-business day.
//!
//! Pure: the holiday list comes from the caller (a book's Holidays sheet or a
//! file the command line read); this module never reads files or prints.

use std::collections::BTreeSet;

use chrono::{Datelike, Days, NaiveDate, Weekday};

use super::names::{lookup, UnknownName};

/// Weekends (Saturday and Sunday) plus a set of holiday dates.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Calendar {
    name: String,
    holidays: BTreeSet<NaiveDate>,
}

impl Calendar {
    /// A calendar with weekends only.
    pub fn weekends_only() -> Calendar {
        Calendar::default()
    }

    /// A named calendar with weekends and the given holidays.
    ///
    /// ```
    /// use chrono::NaiveDate;
    /// use ledgerate::conventions::calendar::Calendar;
    /// let d = |s: &str| s.parse::<NaiveDate>().unwrap();
    /// let cal = Calendar::new("ZA", [d("2015-04-03"), d("2015-04-06")]);
    /// assert!(!cal.is_business_day(d("2015-04-03"))); // a holiday
    /// assert!(!cal.is_business_day(d("2015-04-04"))); // a Saturday
    /// assert!(cal.is_business_day(d("2015-04-07")));
    /// ```
    pub fn new(name: &str, holidays: impl IntoIterator<Item = NaiveDate>) -> Calendar {
        Calendar {
            name: name.to_string(),
            holidays: holidays.into_iter().collect(),
        }
    }

    /// The calendar's name (empty for weekends only).
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The holidays, in date order.
    pub fn holidays(&self) -> impl Iterator<Item = NaiveDate> + '_ {
        self.holidays.iter().copied()
    }

    /// Whether `d` is neither a Saturday, a Sunday nor a holiday.
    pub fn is_business_day(&self, d: NaiveDate) -> bool {
        !matches!(d.weekday(), Weekday::Sat | Weekday::Sun) && !self.holidays.contains(&d)
    }

    /// Moves `d` by `convention`; `None` only past the end of the date range.
    ///
    /// ```
    /// use chrono::NaiveDate;
    /// use ledgerate::conventions::calendar::{BusinessDay, Calendar};
    /// let d = |s: &str| s.parse::<NaiveDate>().unwrap();
    /// let cal = Calendar::weekends_only();
    /// // Saturday 31 January 2015: following crosses into February, modified following does not.
    /// assert_eq!(cal.adjust(d("2015-01-31"), BusinessDay::Following), Some(d("2015-02-02")));
    /// assert_eq!(cal.adjust(d("2015-01-31"), BusinessDay::ModifiedFollowing), Some(d("2015-01-30")));
    /// ```
    pub fn adjust(&self, d: NaiveDate, convention: BusinessDay) -> Option<NaiveDate> {
        match convention {
            BusinessDay::Unadjusted => Some(d),
            BusinessDay::Following => self.step_to_business_day(d, true),
            BusinessDay::Preceding => self.step_to_business_day(d, false),
            BusinessDay::ModifiedFollowing => {
                let f = self.step_to_business_day(d, true)?;
                if f.month() == d.month() {
                    Some(f)
                } else {
                    self.step_to_business_day(d, false)
                }
            }
            BusinessDay::ModifiedPreceding => {
                let p = self.step_to_business_day(d, false)?;
                if p.month() == d.month() {
                    Some(p)
                } else {
                    self.step_to_business_day(d, true)
                }
            }
        }
    }

    fn step_to_business_day(&self, mut d: NaiveDate, forward: bool) -> Option<NaiveDate> {
        while !self.is_business_day(d) {
            d = if forward {
                d.succ_opt()?
            } else {
                d.pred_opt()?
            };
        }
        Some(d)
    }

    /// The date `n` business days after `d` (`n` = 0 gives `d` itself, even on a
    /// holiday); `None` past the end of the date range.
    pub fn add_business_days(&self, mut d: NaiveDate, n: u32) -> Option<NaiveDate> {
        for _ in 0..n {
            d = self.step_to_business_day(d.succ_opt()?, true)?;
        }
        Some(d)
    }

    /// The business day `n` business days before `d` (`n` = 0: the business day
    /// on or before `d`).
    pub fn sub_business_days(&self, d: NaiveDate, n: u32) -> Option<NaiveDate> {
        let mut d = self.step_to_business_day(d, false)?;
        for _ in 0..n {
            d = self.step_to_business_day(d.pred_opt()?, false)?;
        }
        Some(d)
    }

    /// Business days in `[d1, d2)`, negative when `d2 < d1`.
    ///
    /// ```
    /// use chrono::NaiveDate;
    /// use ledgerate::conventions::calendar::Calendar;
    /// let d = |s: &str| s.parse::<NaiveDate>().unwrap();
    /// // Monday to the next Monday.
    /// assert_eq!(Calendar::weekends_only().business_days_between(d("2026-11-02"), d("2026-11-09")), 5);
    /// ```
    pub fn business_days_between(&self, d1: NaiveDate, d2: NaiveDate) -> i64 {
        if d2 < d1 {
            return -self.business_days_between(d2, d1);
        }
        let total = (d2 - d1).num_days();
        // Whole weeks hold five weekdays each; walk only the remainder.
        let weeks = total / 7;
        let mut count = weeks * 5;
        let mut d = d1 + Days::new(u64::try_from(weeks * 7).unwrap_or(0));
        while d < d2 {
            if !matches!(d.weekday(), Weekday::Sat | Weekday::Sun) {
                count += 1;
            }
            match d.succ_opt() {
                Some(n) => d = n,
                None => break,
            }
        }
        let holidays_on_weekdays = self
            .holidays
            .range(d1..d2)
            .filter(|h| !matches!(h.weekday(), Weekday::Sat | Weekday::Sun))
            .count();
        count - i64::try_from(holidays_on_weekdays).unwrap_or(0)
    }
}

/// A business-day convention (ISDA 2006 section 4.12; modified preceding and
/// unadjusted as in common use).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum BusinessDay {
    /// No adjustment.
    #[default]
    Unadjusted,
    /// The first following business day.
    Following,
    /// The first following business day, unless it is in the next month; then the first preceding.
    ModifiedFollowing,
    /// The first preceding business day.
    Preceding,
    /// The first preceding business day, unless it is in the previous month; then the first following.
    ModifiedPreceding,
}

const SPELLINGS: &[(&str, BusinessDay)] = &[
    ("unadjusted", BusinessDay::Unadjusted),
    ("none", BusinessDay::Unadjusted),
    ("following", BusinessDay::Following),
    ("modified-following", BusinessDay::ModifiedFollowing),
    ("modfollowing", BusinessDay::ModifiedFollowing),
    ("modified", BusinessDay::ModifiedFollowing),
    ("preceding", BusinessDay::Preceding),
    ("modified-preceding", BusinessDay::ModifiedPreceding),
    ("modpreceding", BusinessDay::ModifiedPreceding),
];

impl BusinessDay {
    /// Every convention.
    pub const ALL: [BusinessDay; 5] = [
        Self::Unadjusted,
        Self::Following,
        Self::ModifiedFollowing,
        Self::Preceding,
        Self::ModifiedPreceding,
    ];

    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            Self::Unadjusted => "unadjusted",
            Self::Following => "following",
            Self::ModifiedFollowing => "modified-following",
            Self::Preceding => "preceding",
            Self::ModifiedPreceding => "modified-preceding",
        }
    }

    /// Parses a convention name.
    ///
    /// # Errors
    /// [`UnknownName`] listing the accepted names and the closest one.
    pub fn parse(name: &str) -> Result<Self, UnknownName> {
        let accepted: Vec<&str> = Self::ALL.iter().map(|c| c.name()).collect();
        lookup("business-day convention", name, SPELLINGS, &accepted)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::Months;

    fn d(s: &str) -> NaiveDate {
        s.parse().unwrap()
    }

    /// The 2015 South African holidays that QuantLib's business-day test uses
    /// (Good Friday, Family Day, Freedom Day, Workers' Day).
    fn za_2015() -> Calendar {
        Calendar::new(
            "ZA",
            ["2015-04-03", "2015-04-06", "2015-04-27", "2015-05-01"].map(d),
        )
    }

    /// Source: QuantLib test-suite/businessdayconventions.cpp (South Africa
    /// calendar, end-of-month off): a date rolled by whole months, then adjusted.
    #[test]
    fn quantlib_business_day_vectors() {
        use BusinessDay::*;
        let cal = za_2015();
        let rows = [
            (Following, "2015-02-03", 1, "2015-03-03"),
            (Following, "2015-01-31", 1, "2015-03-02"),
            (ModifiedFollowing, "2015-02-03", 1, "2015-03-03"),
            (ModifiedFollowing, "2015-01-31", 1, "2015-02-27"),
            (ModifiedFollowing, "2015-03-25", 1, "2015-04-28"),
            (ModifiedFollowing, "2015-02-07", 1, "2015-03-09"),
            (Preceding, "2015-03-03", -1, "2015-02-03"),
            (Preceding, "2015-03-01", -1, "2015-01-30"),
            (ModifiedPreceding, "2015-03-03", -1, "2015-02-03"),
            (ModifiedPreceding, "2015-03-01", -1, "2015-02-02"),
            (Unadjusted, "2015-02-03", 1, "2015-03-03"),
            (Unadjusted, "2015-01-31", 1, "2015-02-28"),
        ];
        for (conv, start, months, want) in rows {
            let rolled = if months > 0 {
                d(start) + Months::new(1)
            } else {
                d(start) - Months::new(1)
            };
            assert_eq!(cal.adjust(rolled, conv), Some(d(want)), "{conv:?} {start}");
        }
    }

    /// Source: QuantLib test-suite/businessdayconventions.cpp: business days
    /// counted forward and back (3 Feb 2015 + 4 = 9 Feb; - 2 = 30 Jan).
    #[test]
    fn business_day_steps() {
        let cal = za_2015();
        assert_eq!(
            cal.add_business_days(d("2015-02-03"), 4),
            Some(d("2015-02-09"))
        );
        assert_eq!(
            cal.sub_business_days(d("2015-02-03"), 2),
            Some(d("2015-01-30"))
        );
        // Thursday 2 April 2015 + 1: Friday and Monday are holidays.
        assert_eq!(
            cal.add_business_days(d("2015-04-02"), 1),
            Some(d("2015-04-07"))
        );
    }

    #[test]
    fn counting_matches_walking_day_by_day() {
        let cal = za_2015();
        let start = d("2015-01-01");
        for len in 0..140 {
            let end = start + Days::new(len);
            let walked = start
                .iter_days()
                .take_while(|x| *x < end)
                .filter(|x| cal.is_business_day(*x))
                .count();
            assert_eq!(
                cal.business_days_between(start, end),
                walked as i64,
                "{end}"
            );
            assert_eq!(cal.business_days_between(end, start), -(walked as i64));
        }
    }

    #[test]
    fn convention_names_round_trip() {
        for c in BusinessDay::ALL {
            assert_eq!(BusinessDay::parse(c.name()), Ok(c));
        }
        assert_eq!(
            BusinessDay::parse("Modified Following"),
            Ok(BusinessDay::ModifiedFollowing)
        );
    }
}
