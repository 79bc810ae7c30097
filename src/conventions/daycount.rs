//! Day-count bases: the year fraction between two dates, and the fraction each
//! single day earns inside a posting period.
//!
//! Definitions follow the ISDA 2006 Definitions section 4.16 (and ICMA Rule
//! 251 for ACT/ACT ICMA, through ISDA 4.16(c)). Every fraction is an exact
//! [`Ratio`]; nothing here rounds. Pure: no files, no printing.

use std::fmt;

use chrono::{Datelike, NaiveDate};

use super::calendar::Calendar;
use super::names::{lookup, UnknownName};
use super::ratio::Ratio;
use super::schedule::roll_months;

/// A day-count basis (behaviour.md, Day count).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Basis {
    /// Actual days / 360 (ISDA 4.16(e)).
    Act360,
    /// Actual days / 365 (ISDA 4.16(d)).
    Act365F,
    /// Actual days / 365, or 366 when the period end falls in a leap year (ISDA 4.16(i)).
    Act365L,
    /// Days in leap years / 366 + days in other years / 365 (ISDA 4.16(b)).
    ActActIsda,
    /// Days / (frequency x days of the reference period) (ISDA 4.16(c), ICMA Rule 251).
    ActActIcma,
    /// Actual days less any 29 February, / 365.
    Nl365,
    /// 30/360 bond basis (ISDA 4.16(f)).
    Thirty360,
    /// 30/360 US with the February end-of-month rules.
    Thirty360Us,
    /// 30E/360, Eurobond basis (ISDA 4.16(g)).
    Thirty360E,
    /// 30E/360 (ISDA) (ISDA 4.16(h)).
    Thirty360EIsda,
    /// Business days of a calendar / 252.
    Bus252,
}

const SPELLINGS: &[(&str, Basis)] = &[
    ("ACT/360", Basis::Act360),
    ("ACTUAL/360", Basis::Act360),
    ("A/360", Basis::Act360),
    ("ACT/365F", Basis::Act365F),
    ("ACT/365 FIXED", Basis::Act365F),
    ("ACTUAL/365 FIXED", Basis::Act365F),
    ("ACT/365 (FIXED)", Basis::Act365F),
    ("A/365F", Basis::Act365F),
    ("ACT/365L", Basis::Act365L),
    ("ACTUAL/365L", Basis::Act365L),
    ("ACT/ACT ISDA", Basis::ActActIsda),
    ("ACT/ACT (ISDA)", Basis::ActActIsda),
    ("ACTUAL/ACTUAL ISDA", Basis::ActActIsda),
    ("ACTUAL/ACTUAL (ISDA)", Basis::ActActIsda),
    ("ACT/ACT", Basis::ActActIsda),
    ("ACTUAL/ACTUAL", Basis::ActActIsda),
    ("ACT/ACT ICMA", Basis::ActActIcma),
    ("ACT/ACT (ICMA)", Basis::ActActIcma),
    ("ACTUAL/ACTUAL ICMA", Basis::ActActIcma),
    ("ACTUAL/ACTUAL (ICMA)", Basis::ActActIcma),
    ("ACT/ACT ISMA", Basis::ActActIcma),
    ("NL/365", Basis::Nl365),
    ("ACT/365 NO LEAP", Basis::Nl365),
    ("30/360", Basis::Thirty360),
    ("30/360 ISDA", Basis::Thirty360),
    ("360/360", Basis::Thirty360),
    ("BOND BASIS", Basis::Thirty360),
    ("30/360 US", Basis::Thirty360Us),
    ("30U/360", Basis::Thirty360Us),
    ("30/360 SIA", Basis::Thirty360Us),
    ("30E/360", Basis::Thirty360E),
    ("EUROBOND BASIS", Basis::Thirty360E),
    ("30/360 ICMA", Basis::Thirty360E),
    ("30E/360 ISDA", Basis::Thirty360EIsda),
    ("30E/360 (ISDA)", Basis::Thirty360EIsda),
    ("BUS/252", Basis::Bus252),
];

impl Basis {
    /// Every basis, in the order of behaviour.md, Day count.
    pub const ALL: [Basis; 11] = [
        Basis::Act360,
        Basis::Act365F,
        Basis::Act365L,
        Basis::ActActIsda,
        Basis::ActActIcma,
        Basis::Nl365,
        Basis::Thirty360,
        Basis::Thirty360Us,
        Basis::Thirty360E,
        Basis::Thirty360EIsda,
        Basis::Bus252,
    ];

    /// The canonical name, as written in books and output.
    pub fn name(self) -> &'static str {
        match self {
            Basis::Act360 => "ACT/360",
            Basis::Act365F => "ACT/365F",
            Basis::Act365L => "ACT/365L",
            Basis::ActActIsda => "ACT/ACT ISDA",
            Basis::ActActIcma => "ACT/ACT ICMA",
            Basis::Nl365 => "NL/365",
            Basis::Thirty360 => "30/360",
            Basis::Thirty360Us => "30/360 US",
            Basis::Thirty360E => "30E/360",
            Basis::Thirty360EIsda => "30E/360 ISDA",
            Basis::Bus252 => "BUS/252",
        }
    }

    /// Every other spelling accepted for this basis.
    pub fn aliases(self) -> impl Iterator<Item = &'static str> {
        SPELLINGS
            .iter()
            .filter(move |(n, b)| *b == self && *n != self.name())
            .map(|(n, _)| *n)
    }

    /// Parses a basis name: case-insensitive, spaces, `_` and `-` optional.
    ///
    /// # Errors
    /// [`UnknownName`] listing the accepted names and the closest one.
    ///
    /// ```
    /// use ledgerate::conventions::daycount::Basis;
    /// assert_eq!(Basis::parse("act/365 fixed"), Ok(Basis::Act365F));
    /// assert_eq!(Basis::parse("30e/360isda"), Ok(Basis::Thirty360EIsda));
    /// let e = Basis::parse("ACT/36").unwrap_err();
    /// assert_eq!(e.suggestion, Some("ACT/360"));
    /// ```
    pub fn parse(name: &str) -> Result<Basis, UnknownName> {
        let accepted: Vec<&str> = Basis::ALL.iter().map(|b| b.name()).collect();
        lookup("day-count basis", name, SPELLINGS, &accepted)
    }

    /// The 30/360 variant this basis is, if it is one.
    pub fn thirty(self) -> Option<Thirty> {
        match self {
            Basis::Thirty360 => Some(Thirty::BondBasis),
            Basis::Thirty360Us => Some(Thirty::Us),
            Basis::Thirty360E => Some(Thirty::Eurobond),
            Basis::Thirty360EIsda => Some(Thirty::EIsda),
            _ => None,
        }
    }
}

impl fmt::Display for Basis {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// A term a basis needs that was not given, or dates it cannot measure.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum DayCountError {
    /// BUS/252 without a calendar.
    #[error("BUS/252 counts business days and needs a calendar")]
    NeedsCalendar,
    /// ACT/ACT ICMA without a posting frequency.
    #[error("ACT/ACT ICMA needs a posting frequency (monthly, quarterly, semiannual or annual)")]
    NeedsFrequency,
    /// ACT/ACT ICMA with a frequency that does not divide a year into whole months.
    #[error("a frequency of {0} a year does not divide the year into whole months (use 1, 2, 3, 4, 6 or 12)")]
    BadFrequency(u32),
    /// ACT/ACT ICMA with a reference period that is empty or reversed.
    #[error("the reference period {0}..{1} is empty or reversed")]
    BadReference(NaiveDate, NaiveDate),
    /// A figure too large for exact arithmetic.
    #[error("the year fraction overflowed")]
    Overflow,
}

/// What a basis may need besides the two dates.
#[derive(Debug, Clone, Copy, Default)]
pub struct Terms<'a> {
    /// 30E/360 ISDA: the termination (maturity) date.
    pub termination: Option<NaiveDate>,
    /// ACT/ACT ICMA: periods a year.
    pub frequency: Option<u32>,
    /// ACT/ACT ICMA: the regular reference period holding the dates.
    pub reference: Option<(NaiveDate, NaiveDate)>,
    /// BUS/252: the business-day calendar.
    pub calendar: Option<&'a Calendar>,
}

/// The 30/360 variants, which differ only in how D1 and D2 are adjusted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Thirty {
    /// ISDA 4.16(f).
    BondBasis,
    /// 30/360 US (February end-of-month rules).
    Us,
    /// ISDA 4.16(g).
    Eurobond,
    /// ISDA 4.16(h).
    EIsda,
}

fn is_last_of_february(d: NaiveDate) -> bool {
    d.month() == 2 && d.succ_opt().is_some_and(|n| n.month() == 3)
}

/// Days between `d1` and `d2` under a 30/360 variant:
/// 360 (Y2 - Y1) + 30 (M2 - M1) + (D2 - D1) after the variant's adjustments.
///
/// `february_d2_rules` turns on the adjustments that move a D2 on the last
/// day of February (30/360 US and 30E/360 ISDA); the engine applies them only
/// when `d2` is a period end. `termination` is 30E/360 ISDA's termination
/// date, on which a February D2 stays as it is.
///
/// ```
/// use chrono::NaiveDate;
/// use ledgerate::conventions::daycount::{thirty_days, Thirty};
/// let d = |s: &str| s.parse::<NaiveDate>().unwrap();
/// // ISDA's worked examples: 31 Aug 2007 to 29 Feb 2008.
/// assert_eq!(thirty_days(Thirty::BondBasis, d("2007-08-31"), d("2008-02-29"), true, None), 179);
/// assert_eq!(thirty_days(Thirty::EIsda, d("2007-08-31"), d("2008-02-29"), true, None), 180);
/// ```
pub fn thirty_days(
    kind: Thirty,
    d1: NaiveDate,
    d2: NaiveDate,
    february_d2_rules: bool,
    termination: Option<NaiveDate>,
) -> i64 {
    let (y1, m1, mut dd1) = (
        i64::from(d1.year()),
        i64::from(d1.month()),
        i64::from(d1.day()),
    );
    let (y2, m2, mut dd2) = (
        i64::from(d2.year()),
        i64::from(d2.month()),
        i64::from(d2.day()),
    );
    match kind {
        Thirty::BondBasis => {
            if dd1 == 31 {
                dd1 = 30;
            }
            if dd2 == 31 && dd1 > 29 {
                dd2 = 30;
            }
        }
        Thirty::Us => {
            // The order of these checks matters.
            let d1_feb = is_last_of_february(d1);
            if february_d2_rules && d1_feb && is_last_of_february(d2) {
                dd2 = 30;
            }
            if d1_feb {
                dd1 = 30;
            }
            if dd2 == 31 && dd1 >= 30 {
                dd2 = 30;
            }
            if dd1 == 31 {
                dd1 = 30;
            }
        }
        Thirty::Eurobond => {
            if dd1 == 31 {
                dd1 = 30;
            }
            if dd2 == 31 {
                dd2 = 30;
            }
        }
        Thirty::EIsda => {
            if dd1 == 31 || is_last_of_february(d1) {
                dd1 = 30;
            }
            if dd2 == 31 {
                dd2 = 30;
            }
            if february_d2_rules && is_last_of_february(d2) && termination != Some(d2) {
                dd2 = 30;
            }
        }
    }
    360 * (y2 - y1) + 30 * (m2 - m1) + (dd2 - dd1)
}

fn days_in_year(y: i32) -> i64 {
    if NaiveDate::from_ymd_opt(y, 2, 29).is_some() {
        366
    } else {
        365
    }
}

/// 29 Februaries in `[d1, d2)`.
fn leap_days_in(d1: NaiveDate, d2: NaiveDate) -> i64 {
    (d1.year()..=d2.year())
        .filter_map(|y| NaiveDate::from_ymd_opt(y, 2, 29))
        .filter(|f| *f >= d1 && *f < d2)
        .count() as i64
}

/// The basis's own day count from `d1` to `d2`: actual days, 30/360 days,
/// days less leap days (NL/365) or business days (BUS/252).
///
/// # Errors
/// [`DayCountError::NeedsCalendar`] for BUS/252 without a calendar.
pub fn day_count(
    basis: Basis,
    d1: NaiveDate,
    d2: NaiveDate,
    terms: &Terms,
) -> Result<i64, DayCountError> {
    if d2 < d1 {
        return day_count(basis, d2, d1, terms).map(|n| -n);
    }
    Ok(match basis {
        Basis::Nl365 => (d2 - d1).num_days() - leap_days_in(d1, d2),
        Basis::Bus252 => terms
            .calendar
            .ok_or(DayCountError::NeedsCalendar)?
            .business_days_between(d1, d2),
        b => match b.thirty() {
            Some(kind) => thirty_days(kind, d1, d2, true, terms.termination),
            None => (d2 - d1).num_days(),
        },
    })
}

fn ratio(num: i64, den: i64) -> Result<Ratio, DayCountError> {
    Ratio::new(i128::from(num), i128::from(den)).ok_or(DayCountError::Overflow)
}

/// The year fraction DCF(d1, d2) of `basis`, exact; negative when `d2 < d1`.
///
/// # Errors
/// A [`DayCountError`] when the basis needs a term that `terms` lacks.
///
/// ```
/// use chrono::NaiveDate;
/// use ledgerate::conventions::daycount::{year_fraction, Basis, Terms};
/// let d = |s: &str| s.parse::<NaiveDate>().unwrap();
/// // ISDA's semiannual example, 1 Nov 2003 to 1 May 2004: 61/365 + 121/366.
/// let f = year_fraction(Basis::ActActIsda, d("2003-11-01"), d("2004-05-01"), &Terms::default()).unwrap();
/// assert_eq!(f.to_string(), "66491/133590");
/// ```
pub fn year_fraction(
    basis: Basis,
    d1: NaiveDate,
    d2: NaiveDate,
    terms: &Terms,
) -> Result<Ratio, DayCountError> {
    if d2 < d1 {
        let r = year_fraction(basis, d2, d1, terms)?;
        return Ratio::ZERO.checked_sub(r).ok_or(DayCountError::Overflow);
    }
    match basis {
        Basis::Act360 => ratio((d2 - d1).num_days(), 360),
        Basis::Act365F => ratio((d2 - d1).num_days(), 365),
        Basis::Act365L => ratio((d2 - d1).num_days(), days_in_year(d2.year())),
        Basis::Nl365 | Basis::Bus252 => ratio(
            day_count(basis, d1, d2, terms)?,
            if basis == Basis::Bus252 { 252 } else { 365 },
        ),
        Basis::ActActIsda => act_act_isda(d1, d2),
        Basis::ActActIcma => act_act_icma(d1, d2, terms),
        b => match b.thirty() {
            Some(kind) => ratio(thirty_days(kind, d1, d2, true, terms.termination), 360),
            None => Err(DayCountError::Overflow),
        },
    }
}

fn act_act_isda(d1: NaiveDate, d2: NaiveDate) -> Result<Ratio, DayCountError> {
    let (y1, y2) = (d1.year(), d2.year());
    if y1 == y2 {
        return ratio((d2 - d1).num_days(), days_in_year(y1));
    }
    let jan1 = |y: i32| NaiveDate::from_ymd_opt(y, 1, 1).ok_or(DayCountError::Overflow);
    let first = ratio((jan1(y1 + 1)? - d1).num_days(), days_in_year(y1))?;
    let last = ratio((d2 - jan1(y2)?).num_days(), days_in_year(y2))?;
    let whole = Ratio::from_int(i128::from(y2 - y1 - 1));
    whole
        .checked_add(first)
        .and_then(|r| r.checked_add(last))
        .ok_or(DayCountError::Overflow)
}

/// Months in one period of `frequency` periods a year.
pub fn months_per_period(frequency: u32) -> Result<u32, DayCountError> {
    match frequency {
        1 | 2 | 3 | 4 | 6 | 12 => Ok(12 / frequency),
        f => Err(DayCountError::BadFrequency(f)),
    }
}

/// ACT/ACT ICMA: inside the reference period, days / (F x reference days);
/// outside it, the span is cut into quasi-periods rolled back from its start
/// and forward from its end, each measured against its own length.
fn act_act_icma(d1: NaiveDate, d2: NaiveDate, terms: &Terms) -> Result<Ratio, DayCountError> {
    let f = terms.frequency.ok_or(DayCountError::NeedsFrequency)?;
    let months = months_per_period(f)?;
    let (rs, re) = match terms.reference {
        Some(r) => r,
        None => (
            d1,
            roll_months(d1, months as i32).ok_or(DayCountError::Overflow)?,
        ),
    };
    if re <= rs {
        return Err(DayCountError::BadReference(rs, re));
    }
    let mut total = Ratio::ZERO;
    let mut add =
        |s: NaiveDate, e: NaiveDate, ps: NaiveDate, pe: NaiveDate| -> Result<(), DayCountError> {
            let lo = s.max(ps);
            let hi = e.min(pe);
            if hi > lo {
                let part = ratio((hi - lo).num_days(), i64::from(f) * (pe - ps).num_days())?;
                total = total.checked_add(part).ok_or(DayCountError::Overflow)?;
            }
            Ok(())
        };
    add(d1, d2, rs, re)?;
    // Quasi-periods before the reference period.
    let mut k = 1;
    let mut end = rs;
    while d1 < end {
        let start = roll_months(rs, -(months as i32) * k).ok_or(DayCountError::Overflow)?;
        add(d1, d2, start, end)?;
        end = start;
        k += 1;
    }
    // Quasi-periods after it.
    let mut k = 1;
    let mut start = re;
    while d2 > start {
        let end = roll_months(re, months as i32 * k).ok_or(DayCountError::Overflow)?;
        add(d1, d2, start, end)?;
        start = end;
        k += 1;
    }
    Ok(total)
}

/// The fraction one day earns: `num / den`, kept unreduced so that days of a
/// period share a denominator (360, 365, 366, 252, or frequency x reference days).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct DayFraction {
    /// Numerator; 0 for a day that earns nothing (a weekend under BUS/252, a 31st under 30/360...).
    pub num: i64,
    /// Denominator.
    pub den: u32,
}

impl DayFraction {
    /// As an exact ratio.
    pub fn ratio(self) -> Ratio {
        Ratio::new(i128::from(self.num), i128::from(self.den)).unwrap_or(Ratio::ZERO)
    }
}

/// Everything needed to give each day of one posting period its fraction
/// f(D) = DCF(P, D+1) - DCF(P, D) (behaviour.md, Day count).
#[derive(Debug, Clone, Copy)]
pub struct PeriodBasis<'a> {
    /// The basis.
    pub basis: Basis,
    /// P, the start of the posting period.
    pub start: NaiveDate,
    /// E+1, the day after the period's last earning day; `None` when nothing is ever posted.
    pub end: Option<NaiveDate>,
    /// The account's maturity (30E/360 ISDA's termination date).
    pub maturity: Option<NaiveDate>,
    /// ACT/ACT ICMA: postings a year.
    pub frequency: Option<u32>,
    /// ACT/ACT ICMA: the reference periods `[start, end)` covering the period.
    pub references: &'a [(NaiveDate, NaiveDate)],
    /// BUS/252: the account's calendar.
    pub calendar: &'a Calendar,
}

impl PeriodBasis<'_> {
    /// Checks the terms this basis needs once, before any day is measured.
    ///
    /// # Errors
    /// [`DayCountError::NeedsFrequency`] for ACT/ACT ICMA without a posting frequency.
    pub fn validate(&self) -> Result<(), DayCountError> {
        if self.basis == Basis::ActActIcma && self.frequency.is_none() {
            return Err(DayCountError::NeedsFrequency);
        }
        Ok(())
    }

    fn thirty_cum(&self, kind: Thirty, x: NaiveDate, at_end: bool) -> i64 {
        if x == self.start {
            return 0;
        }
        thirty_days(
            kind,
            self.start,
            x,
            at_end,
            if at_end { self.maturity } else { None },
        )
    }

    /// The last day from `d` on over which every day's fraction has the same
    /// denominator, so that [`PeriodBasis::span`] can sum them: the year end
    /// for ACT/ACT ISDA (and ACT/365L without a period end), the reference
    /// period's last day for ACT/ACT ICMA; `None` when it does not end.
    pub fn same_denominator_until(&self, d: NaiveDate) -> Option<NaiveDate> {
        let year_end = || NaiveDate::from_ymd_opt(d.year(), 12, 31);
        match self.basis {
            Basis::ActActIsda => year_end(),
            Basis::Act365L if self.end.is_none() => year_end(),
            Basis::ActActIcma => self
                .references
                .iter()
                .find(|(s, e)| *s <= d && d < *e)
                .and_then(|(_, e)| e.pred_opt()),
            _ => None,
        }
    }

    /// The sum of the fractions of the days `a..b` (b exclusive), in one
    /// step: the same numerators the day-by-day fractions add up to, over
    /// their common denominator. The caller keeps `a..b` inside one period
    /// and within [`PeriodBasis::same_denominator_until`].
    ///
    /// # Errors
    /// [`DayCountError`] when the basis lacks a term.
    ///
    /// ```
    /// use chrono::NaiveDate;
    /// use ledgerate::conventions::calendar::Calendar;
    /// use ledgerate::conventions::daycount::{Basis, PeriodBasis};
    /// let d = |s: &str| s.parse::<NaiveDate>().unwrap();
    /// let cal = Calendar::weekends_only();
    /// let jan = PeriodBasis { basis: Basis::Thirty360, start: d("2026-01-01"), end: Some(d("2026-02-01")),
    ///     maturity: None, frequency: Some(12), references: &[], calendar: &cal };
    /// // 30/360: the 31st earns nothing, so 1..31 January sum to 30/360.
    /// assert_eq!(jan.span(d("2026-01-01"), d("2026-02-01")).unwrap().num, 30);
    /// let by_day: i64 = d("2026-01-01").iter_days().take(31).map(|x| jan.day(x).unwrap().num).sum();
    /// assert_eq!(by_day, 30);
    /// ```
    pub fn span(&self, a: NaiveDate, b: NaiveDate) -> Result<DayFraction, DayCountError> {
        let days = (b - a).num_days();
        let den = |n: i64| n as u32;
        Ok(match self.basis {
            Basis::Act360 => DayFraction {
                num: days,
                den: 360,
            },
            Basis::Act365F => DayFraction {
                num: days,
                den: 365,
            },
            Basis::ActActIsda => DayFraction {
                num: days,
                den: den(days_in_year(a.year())),
            },
            Basis::Act365L => {
                let year = self.end.map_or(a.year(), |e| e.year());
                DayFraction {
                    num: days,
                    den: den(days_in_year(year)),
                }
            }
            Basis::Nl365 => DayFraction {
                num: days - leap_days_in(a, b),
                den: 365,
            },
            Basis::Bus252 => DayFraction {
                num: self.calendar.business_days_between(a, b),
                den: 252,
            },
            Basis::ActActIcma => {
                let first = self.day(a)?;
                DayFraction {
                    num: days,
                    den: first.den,
                }
            }
            other => {
                let kind = other.thirty().ok_or(DayCountError::Overflow)?;
                let at_end = self.end == Some(b);
                let num = self.thirty_cum(kind, b, at_end) - self.thirty_cum(kind, a, false);
                DayFraction { num, den: 360 }
            }
        })
    }

    /// The fraction day `d` earns (`d` inside the period).
    ///
    /// # Errors
    /// [`DayCountError`] when the basis lacks a term or `d` has no reference period.
    ///
    /// ```
    /// use chrono::NaiveDate;
    /// use ledgerate::conventions::calendar::Calendar;
    /// use ledgerate::conventions::daycount::{Basis, PeriodBasis};
    /// let d = |s: &str| s.parse::<NaiveDate>().unwrap();
    /// let cal = Calendar::weekends_only();
    /// let feb = PeriodBasis { basis: Basis::Thirty360EIsda, start: d("2026-02-01"), end: Some(d("2026-03-01")),
    ///     maturity: None, frequency: Some(12), references: &[], calendar: &cal };
    /// // February's extra days fall on its last day.
    /// assert_eq!(feb.day(d("2026-02-27")).unwrap().num, 1);
    /// assert_eq!(feb.day(d("2026-02-28")).unwrap().num, 3);
    /// ```
    pub fn day(&self, d: NaiveDate) -> Result<DayFraction, DayCountError> {
        let next = d.succ_opt().ok_or(DayCountError::Overflow)?;
        let one = |den: i64| DayFraction {
            num: 1,
            den: den as u32,
        };
        Ok(match self.basis {
            Basis::Act360 => one(360),
            Basis::Act365F => one(365),
            Basis::ActActIsda => one(days_in_year(d.year())),
            Basis::Act365L => {
                let year = self.end.map_or(d.year(), |e| e.year());
                one(days_in_year(year))
            }
            Basis::Nl365 => {
                if d.month() == 2 && d.day() == 29 {
                    DayFraction { num: 0, den: 365 }
                } else {
                    one(365)
                }
            }
            Basis::Bus252 => DayFraction {
                num: i64::from(self.calendar.is_business_day(d)),
                den: 252,
            },
            Basis::ActActIcma => {
                let f = self.frequency.ok_or(DayCountError::NeedsFrequency)?;
                let (rs, re) = self
                    .references
                    .iter()
                    .copied()
                    .find(|(s, e)| *s <= d && d < *e)
                    .ok_or(DayCountError::BadReference(d, next))?;
                DayFraction {
                    num: 1,
                    den: f * (re - rs).num_days() as u32,
                }
            }
            b => {
                let kind = b.thirty().ok_or(DayCountError::Overflow)?;
                let at_end = self.end == Some(next);
                let num = self.thirty_cum(kind, next, at_end) - self.thirty_cum(kind, d, false);
                DayFraction { num, den: 360 }
            }
        })
    }
}

#[cfg(test)]
mod tests;
