//! Rounding modes for posted amounts and daily interest.
//!
//! Every mode rounds an exact [`Decimal`] to a number of decimal places. Halves
//! are decided on the exact value, so a true 1.875 rounds to 1.88 under
//! half-up. This module never reads files or prints.

use rust_decimal::{Decimal, RoundingStrategy};

use super::names::{lookup, UnknownName};

/// How an amount is rounded to its places.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default)]
pub enum RoundMode {
    /// Nearest; halves away from zero (-1.875 gives -1.88).
    #[default]
    HalfUp,
    /// Nearest; halves to the even neighbour (1.625 gives 1.62).
    HalfEven,
    /// Toward zero (truncation).
    Down,
    /// Away from zero (any remainder rounds up in magnitude).
    Up,
}

const SPELLINGS: &[(&str, RoundMode)] = &[
    ("half-up", RoundMode::HalfUp),
    ("half-away-from-zero", RoundMode::HalfUp),
    ("half-even", RoundMode::HalfEven),
    ("bankers", RoundMode::HalfEven),
    ("down", RoundMode::Down),
    ("truncate", RoundMode::Down),
    ("toward-zero", RoundMode::Down),
    ("up", RoundMode::Up),
    ("away-from-zero", RoundMode::Up),
];

impl RoundMode {
    /// Every mode, in the order the documentation lists them.
    pub const ALL: [RoundMode; 4] = [Self::HalfUp, Self::HalfEven, Self::Down, Self::Up];

    /// The canonical name, as written in books and output.
    pub fn name(self) -> &'static str {
        match self {
            Self::HalfUp => "half-up",
            Self::HalfEven => "half-even",
            Self::Down => "down",
            Self::Up => "up",
        }
    }

    /// Parses a mode name (case, spaces, `_` and `-` ignored).
    ///
    /// # Errors
    /// [`UnknownName`] listing the accepted names and the closest one.
    ///
    /// ```
    /// use ledgerate::conventions::rounding::RoundMode;
    /// assert_eq!(RoundMode::parse("Half_Even"), Ok(RoundMode::HalfEven));
    /// assert_eq!(RoundMode::parse("half-upp").unwrap_err().suggestion, Some("half-up"));
    /// ```
    pub fn parse(name: &str) -> Result<Self, UnknownName> {
        let accepted: Vec<&str> = Self::ALL.iter().map(|m| m.name()).collect();
        lookup("rounding mode", name, SPELLINGS, &accepted)
    }

    /// Rounds `x` to `places` decimal places under this mode.
    ///
    /// ```
    /// use ledgerate::conventions::rounding::RoundMode;
    /// use rust_decimal::Decimal;
    /// let x: Decimal = "1.875".parse().unwrap();
    /// assert_eq!(RoundMode::HalfUp.round(x, 2).to_string(), "1.88");
    /// assert_eq!(RoundMode::HalfEven.round(x, 2).to_string(), "1.88");
    /// assert_eq!(RoundMode::Down.round(x, 2).to_string(), "1.87");
    /// assert_eq!(RoundMode::HalfUp.round(-x, 2).to_string(), "-1.88");
    /// ```
    pub fn round(self, x: Decimal, places: u32) -> Decimal {
        if x.scale() <= places {
            // Nothing to round: only the scale is fixed.
            let mut r = x;
            r.rescale(places);
            return r;
        }
        let strategy = match self {
            Self::HalfUp => RoundingStrategy::MidpointAwayFromZero,
            Self::HalfEven => RoundingStrategy::MidpointNearestEven,
            Self::Down => RoundingStrategy::ToZero,
            Self::Up => RoundingStrategy::AwayFromZero,
        };
        // Fixed scale, so that 1.5 rounded to 2 places prints as 1.50.
        let mut r = x.round_dp_with_strategy(places, strategy);
        r.rescale(places);
        r
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    #[test]
    fn names_round_trip() {
        for m in RoundMode::ALL {
            assert_eq!(RoundMode::parse(m.name()), Ok(m));
        }
    }

    /// Source: QuantLib test-suite/rounding.cpp vectors; QuantLib's Closest is
    /// half away from zero, Up is away from zero, Down is truncation.
    #[test]
    fn quantlib_rounding_vectors() {
        let rows = [
            ("0.86313513", 5, "0.86314", "0.86314", "0.86313"),
            ("0.86313", 5, "0.86313", "0.86313", "0.86313"),
            ("-7.64555346", 1, "-7.6", "-7.7", "-7.6"),
            ("0.13961605", 2, "0.14", "0.14", "0.13"),
            ("0.14344179", 4, "0.1434", "0.1435", "0.1434"),
            ("-4.74315016", 2, "-4.74", "-4.75", "-4.74"),
            ("-7.82772074", 5, "-7.82772", "-7.82773", "-7.82772"),
            ("2.74137947", 3, "2.741", "2.742", "2.741"),
            ("2.13056714", 1, "2.1", "2.2", "2.1"),
            ("-1.06228670", 1, "-1.1", "-1.1", "-1.0"),
            ("8.29234094", 4, "8.2923", "8.2924", "8.2923"),
            ("7.90185598", 2, "7.90", "7.91", "7.90"),
            ("-0.26738058", 1, "-0.3", "-0.3", "-0.2"),
            ("1.78128713", 1, "1.8", "1.8", "1.7"),
            ("4.23537260", 1, "4.2", "4.3", "4.2"),
            ("3.64369953", 4, "3.6437", "3.6437", "3.6436"),
            ("6.34542470", 2, "6.35", "6.35", "6.34"),
            ("-0.84754962", 4, "-0.8475", "-0.8476", "-0.8475"),
            ("4.60998652", 1, "4.6", "4.7", "4.6"),
            ("6.28794223", 3, "6.288", "6.288", "6.287"),
            ("7.89428221", 2, "7.89", "7.90", "7.89"),
        ];
        for (x, p, closest, up, down) in rows {
            assert_eq!(RoundMode::HalfUp.round(d(x), p), d(closest), "{x} closest");
            assert_eq!(RoundMode::Up.round(d(x), p), d(up), "{x} up");
            assert_eq!(RoundMode::Down.round(d(x), p), d(down), "{x} down");
        }
    }

    /// Ties decided on the exact value (common practice, no source; the
    /// half-even rule is the rust_decimal MidpointNearestEven documentation).
    #[test]
    fn ties_half_up_and_half_even() {
        assert_eq!(RoundMode::HalfUp.round(d("0.125"), 2), d("0.13"));
        assert_eq!(RoundMode::HalfEven.round(d("0.125"), 2), d("0.12"));
        assert_eq!(RoundMode::HalfEven.round(d("0.135"), 2), d("0.14"));
        assert_eq!(RoundMode::HalfUp.round(d("-0.125"), 2), d("-0.13"));
        assert_eq!(RoundMode::HalfEven.round(d("-0.125"), 2), d("-0.12"));
        assert_eq!(RoundMode::HalfEven.round(d("1.625"), 2), d("1.62"));
        assert_eq!(RoundMode::Up.round(d("1.621"), 2), d("1.63"));
        assert_eq!(RoundMode::Down.round(d("-1.629"), 2), d("-1.62"));
        assert_eq!(RoundMode::HalfUp.round(d("3044.5"), 0), d("3045"));
        assert_eq!(RoundMode::HalfUp.round(d("157.0185"), 3), d("157.019"));
    }

    #[test]
    fn results_carry_the_fixed_scale() {
        assert_eq!(RoundMode::HalfUp.round(d("1.5"), 2).to_string(), "1.50");
        assert_eq!(RoundMode::HalfUp.round(d("2000"), 2).to_string(), "2000.00");
    }
}
