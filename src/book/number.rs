//! The border where a spreadsheet's binary float becomes an exact decimal.
//!
//! Workbooks store numbers as binary floats (an xlsx cell is always one). A
//! float is turned into a decimal here and only here, by its shortest
//! round-trip text: the digits the spreadsheet shows and wrote, so 0.1 stays
//! 0.1 and 1234.5678901234567 keeps every digit. This module must never
//! expand the binary value (`Decimal::from_f64` would give 84 wrong cents in
//! 30 million), never do arithmetic on a float, and no other module of the
//! crate may name the float type: this is the border.

use rust_decimal::Decimal;

/// The exact decimal a spreadsheet float stands for, or `None` when no
/// decimal of at most 28 places and 96 bits holds it (NaN, infinities,
/// 1e29, 1e-30).
pub(crate) fn decimal_from_float(value: f64) -> Option<Decimal> {
    if !value.is_finite() {
        return None;
    }
    // `Display` gives the shortest text that reads back as the same float,
    // written out in full (no exponent). When that text has more places than
    // a decimal can hold, the exponent form of the same shortest digits
    // decides whether the value fits at all.
    let plain = value.to_string();
    let parsed = match Decimal::from_str_exact(&plain) {
        Ok(d) => d,
        // More places than a decimal holds: the exponent form of the same
        // shortest digits decides whether the value fits at all.
        Err(_) => Decimal::from_scientific(&format!("{value:e}")).ok()?,
    };
    // A float is never more precise than its shortest text; a negative zero
    // is a spreadsheet artefact, never an amount.
    Some(if parsed.is_zero() {
        Decimal::ZERO
    } else {
        parsed
    })
}

/// The largest date serial of a workbook: 9999-12-31 in the 1900 system
/// (the 1904 system's last serial is smaller, and the date check after the
/// conversion catches the days between).
const LAST_SERIAL: f64 = 2_958_465.0;

/// Whether a date cell's serial number can be a calendar date at all: from
/// 0 up to 9999-12-31's serial plus its last second. Anything else (negative,
/// millions of days, NaN) is no date, and is refused before any calendar
/// arithmetic sees it.
pub(crate) fn date_serial_plausible(value: f64) -> bool {
    value.is_finite() && (0.0..LAST_SERIAL + 1.0).contains(&value)
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::str::FromStr;

    fn d(s: &str) -> Decimal {
        Decimal::from_str(s).unwrap()
    }

    #[test]
    fn date_serials_past_the_calendar_are_not_plausible() {
        assert!(date_serial_plausible(46_022.0)); // 2025-12-31
        assert!(date_serial_plausible(2_958_465.5));
        assert!(!date_serial_plausible(2_958_466.0));
        assert!(!date_serial_plausible(3_000_000.0));
        assert!(!date_serial_plausible(-1.0));
        assert!(!date_serial_plausible(-1e300));
        assert!(!date_serial_plausible(f64::NAN));
    }

    #[test]
    fn a_tenth_stays_a_tenth() {
        let got = decimal_from_float(0.1).unwrap();
        assert_eq!(got.to_string(), "0.1");
    }

    #[test]
    fn every_shown_digit_is_kept() {
        assert_eq!(
            decimal_from_float(1_234.567_890_123_456_7)
                .unwrap()
                .to_string(),
            "1234.5678901234567"
        );
        assert_eq!(
            decimal_from_float(98_765_432_109_876.55)
                .unwrap()
                .to_string(),
            "98765432109876.55"
        );
        assert_eq!(
            decimal_from_float(4_503_599_627_370_495.5)
                .unwrap()
                .to_string(),
            "4503599627370495.5"
        );
    }

    #[test]
    fn a_sum_the_spreadsheet_got_wrong_keeps_its_own_digits() {
        // 0.1 + 0.2 is stored as 0.30000000000000004; that is what the cell holds.
        assert_eq!(
            decimal_from_float(0.1 + 0.2).unwrap(),
            d("0.30000000000000004")
        );
    }

    #[test]
    fn whole_numbers_have_no_places() {
        assert_eq!(decimal_from_float(365.0).unwrap().to_string(), "365");
        assert_eq!(decimal_from_float(-12.0).unwrap().to_string(), "-12");
    }

    #[test]
    fn a_negative_zero_is_zero() {
        let z = decimal_from_float(-0.0).unwrap();
        assert!(z.is_zero());
        assert!(!z.is_sign_negative());
        assert_eq!(z.to_string(), "0");
    }

    #[test]
    fn tiny_and_huge_values_and_non_numbers_are_refused() {
        assert_eq!(decimal_from_float(1e29), None);
        assert_eq!(decimal_from_float(1e-30), None);
        assert_eq!(decimal_from_float(f64::NAN), None);
        assert_eq!(decimal_from_float(f64::INFINITY), None);
    }

    #[test]
    fn small_values_with_few_digits_are_exact() {
        assert_eq!(
            decimal_from_float(1e-20).unwrap(),
            d("0.00000000000000000001")
        );
        assert_eq!(
            decimal_from_float(1e28).unwrap(),
            d("10000000000000000000000000000")
        );
    }
}
