//! ISO 4217 currency codes: their numeric codes and minor units.
//!
//! The minor unit (the exponent) is the accounting precision of an amount:
//! posted interest and accrued figures are rounded to it (JPY 0, USD 2,
//! KWD 3). The table is ISO 4217 List One as published on 2024-06-25; codes
//! changed later (for example the Netherlands Antillean guilder) are not in it.
//! Codes with no minor unit (gold, SDR, the testing code...) are listed with
//! `minor_units: None`.
//!
//! This module is a pure table: it never reads files, prints, or looks at the
//! clock or the environment.

/// One active ISO 4217 code.
///
/// ```
/// use ledgerate::conventions::currency::lookup;
/// let clf = lookup("CLF").unwrap();
/// assert_eq!(format!("{} {:03} {:?} {}", clf.code, clf.numeric, clf.minor_units, clf.fund), "CLF 990 Some(4) true");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Currency {
    /// The alphabetic code, three upper-case letters.
    pub code: &'static str,
    /// The numeric code (printed with three digits: `008` for ALL).
    pub numeric: u16,
    /// Decimal places of the minor unit; `None` where ISO gives "N.A.".
    pub minor_units: Option<u32>,
    /// Whether ISO marks the code as a fund (an accounting unit such as CLF).
    pub fund: bool,
}

const fn cur(code: &'static str, numeric: u16, minor: u32) -> Currency {
    Currency {
        code,
        numeric,
        minor_units: Some(minor),
        fund: false,
    }
}

const fn fund(code: &'static str, numeric: u16, minor: u32) -> Currency {
    Currency {
        code,
        numeric,
        minor_units: Some(minor),
        fund: true,
    }
}

const fn na(code: &'static str, numeric: u16) -> Currency {
    Currency {
        code,
        numeric,
        minor_units: None,
        fund: false,
    }
}

/// Every active code of List One, sorted by code (the lookup is a binary search).
static TABLE: [Currency; 179] = [
    cur("AED", 784, 2),
    cur("AFN", 971, 2),
    cur("ALL", 8, 2),
    cur("AMD", 51, 2),
    cur("ANG", 532, 2),
    cur("AOA", 973, 2),
    cur("ARS", 32, 2),
    cur("AUD", 36, 2),
    cur("AWG", 533, 2),
    cur("AZN", 944, 2),
    cur("BAM", 977, 2),
    cur("BBD", 52, 2),
    cur("BDT", 50, 2),
    cur("BGN", 975, 2),
    cur("BHD", 48, 3),
    cur("BIF", 108, 0),
    cur("BMD", 60, 2),
    cur("BND", 96, 2),
    cur("BOB", 68, 2),
    fund("BOV", 984, 2),
    cur("BRL", 986, 2),
    cur("BSD", 44, 2),
    cur("BTN", 64, 2),
    cur("BWP", 72, 2),
    cur("BYN", 933, 2),
    cur("BZD", 84, 2),
    cur("CAD", 124, 2),
    cur("CDF", 976, 2),
    fund("CHE", 947, 2),
    cur("CHF", 756, 2),
    fund("CHW", 948, 2),
    fund("CLF", 990, 4),
    cur("CLP", 152, 0),
    cur("CNY", 156, 2),
    cur("COP", 170, 2),
    fund("COU", 970, 2),
    cur("CRC", 188, 2),
    cur("CUC", 931, 2),
    cur("CUP", 192, 2),
    cur("CVE", 132, 2),
    cur("CZK", 203, 2),
    cur("DJF", 262, 0),
    cur("DKK", 208, 2),
    cur("DOP", 214, 2),
    cur("DZD", 12, 2),
    cur("EGP", 818, 2),
    cur("ERN", 232, 2),
    cur("ETB", 230, 2),
    cur("EUR", 978, 2),
    cur("FJD", 242, 2),
    cur("FKP", 238, 2),
    cur("GBP", 826, 2),
    cur("GEL", 981, 2),
    cur("GHS", 936, 2),
    cur("GIP", 292, 2),
    cur("GMD", 270, 2),
    cur("GNF", 324, 0),
    cur("GTQ", 320, 2),
    cur("GYD", 328, 2),
    cur("HKD", 344, 2),
    cur("HNL", 340, 2),
    cur("HTG", 332, 2),
    cur("HUF", 348, 2),
    cur("IDR", 360, 2),
    cur("ILS", 376, 2),
    cur("INR", 356, 2),
    cur("IQD", 368, 3),
    cur("IRR", 364, 2),
    cur("ISK", 352, 0),
    cur("JMD", 388, 2),
    cur("JOD", 400, 3),
    cur("JPY", 392, 0),
    cur("KES", 404, 2),
    cur("KGS", 417, 2),
    cur("KHR", 116, 2),
    cur("KMF", 174, 0),
    cur("KPW", 408, 2),
    cur("KRW", 410, 0),
    cur("KWD", 414, 3),
    cur("KYD", 136, 2),
    cur("KZT", 398, 2),
    cur("LAK", 418, 2),
    cur("LBP", 422, 2),
    cur("LKR", 144, 2),
    cur("LRD", 430, 2),
    cur("LSL", 426, 2),
    cur("LYD", 434, 3),
    cur("MAD", 504, 2),
    cur("MDL", 498, 2),
    cur("MGA", 969, 2),
    cur("MKD", 807, 2),
    cur("MMK", 104, 2),
    cur("MNT", 496, 2),
    cur("MOP", 446, 2),
    cur("MRU", 929, 2),
    cur("MUR", 480, 2),
    cur("MVR", 462, 2),
    cur("MWK", 454, 2),
    cur("MXN", 484, 2),
    fund("MXV", 979, 2),
    cur("MYR", 458, 2),
    cur("MZN", 943, 2),
    cur("NAD", 516, 2),
    cur("NGN", 566, 2),
    cur("NIO", 558, 2),
    cur("NOK", 578, 2),
    cur("NPR", 524, 2),
    cur("NZD", 554, 2),
    cur("OMR", 512, 3),
    cur("PAB", 590, 2),
    cur("PEN", 604, 2),
    cur("PGK", 598, 2),
    cur("PHP", 608, 2),
    cur("PKR", 586, 2),
    cur("PLN", 985, 2),
    cur("PYG", 600, 0),
    cur("QAR", 634, 2),
    cur("RON", 946, 2),
    cur("RSD", 941, 2),
    cur("RUB", 643, 2),
    cur("RWF", 646, 0),
    cur("SAR", 682, 2),
    cur("SBD", 90, 2),
    cur("SCR", 690, 2),
    cur("SDG", 938, 2),
    cur("SEK", 752, 2),
    cur("SGD", 702, 2),
    cur("SHP", 654, 2),
    cur("SLE", 925, 2),
    cur("SOS", 706, 2),
    cur("SRD", 968, 2),
    cur("SSP", 728, 2),
    cur("STN", 930, 2),
    cur("SVC", 222, 2),
    cur("SYP", 760, 2),
    cur("SZL", 748, 2),
    cur("THB", 764, 2),
    cur("TJS", 972, 2),
    cur("TMT", 934, 2),
    cur("TND", 788, 3),
    cur("TOP", 776, 2),
    cur("TRY", 949, 2),
    cur("TTD", 780, 2),
    cur("TWD", 901, 2),
    cur("TZS", 834, 2),
    cur("UAH", 980, 2),
    cur("UGX", 800, 0),
    cur("USD", 840, 2),
    fund("USN", 997, 2),
    fund("UYI", 940, 0),
    cur("UYU", 858, 2),
    cur("UYW", 927, 4),
    cur("UZS", 860, 2),
    cur("VED", 926, 2),
    cur("VES", 928, 2),
    cur("VND", 704, 0),
    cur("VUV", 548, 0),
    cur("WST", 882, 2),
    cur("XAF", 950, 0),
    na("XAG", 961),
    na("XAU", 959),
    na("XBA", 955),
    na("XBB", 956),
    na("XBC", 957),
    na("XBD", 958),
    cur("XCD", 951, 2),
    na("XDR", 960),
    cur("XOF", 952, 0),
    na("XPD", 964),
    cur("XPF", 953, 0),
    na("XPT", 962),
    na("XSU", 994),
    na("XTS", 963),
    na("XUA", 965),
    na("XXX", 999),
    cur("YER", 886, 2),
    cur("ZAR", 710, 2),
    cur("ZMW", 967, 2),
    cur("ZWG", 924, 2),
];

/// Every active code, sorted by alphabetic code.
///
/// ```
/// use ledgerate::conventions::currency;
/// let all = currency::all();
/// assert!(all.windows(2).all(|w| w[0].code < w[1].code));
/// assert!(all.iter().any(|c| c.code == "EUR"));
/// ```
pub fn all() -> &'static [Currency] {
    &TABLE
}

/// The currency of a three-letter code; surrounding spaces and letter case
/// are ignored. `None` for anything that is not an active code.
///
/// ```
/// use ledgerate::conventions::currency;
/// let eur = currency::lookup(" eur ").unwrap();
/// assert_eq!((eur.code, eur.numeric, eur.minor_units), ("EUR", 978, Some(2)));
/// assert!(currency::lookup("EURO").is_none());
/// ```
pub fn lookup(code: &str) -> Option<&'static Currency> {
    let key = code.trim();
    if key.len() != 3 || !key.is_ascii() {
        return None;
    }
    let mut upper = [0u8; 3];
    for (u, b) in upper.iter_mut().zip(key.bytes()) {
        *u = b.to_ascii_uppercase();
    }
    let at = TABLE
        .binary_search_by(|c| c.code.as_bytes().cmp(&upper[..]))
        .ok()?;
    TABLE.get(at)
}

/// Decimal places of a code's minor unit: `None` for an unknown code and for
/// a code without a minor unit (XAU, XDR, XXX...), so that a caller must
/// decide what to do instead of rounding to a guessed precision.
///
/// ```
/// use ledgerate::conventions::currency::minor_units;
/// assert_eq!(minor_units("USD"), Some(2));
/// assert_eq!(minor_units("JPY"), Some(0));
/// assert_eq!(minor_units("KWD"), Some(3));
/// assert_eq!(minor_units("XAU"), None);
/// assert_eq!(minor_units("ABC"), None);
/// ```
pub fn minor_units(code: &str) -> Option<u32> {
    lookup(code).and_then(|c| c.minor_units)
}

/// The known code closest to `code`, for a "did you mean" in a message; `None`
/// when no code is within one edit (a wrong, missing, extra or swapped letter).
///
/// A known code suggests itself. Among equally close codes the one sharing the
/// longer prefix wins (the first two letters are the country), then the first
/// in code order.
///
/// ```
/// use ledgerate::conventions::currency::suggest;
/// assert_eq!(suggest("UDS"), Some("USD"));
/// assert_eq!(suggest("euro"), Some("EUR"));
/// assert_eq!(suggest("QQQQQ"), None);
/// ```
pub fn suggest(code: &str) -> Option<&'static str> {
    let key = code.trim().to_ascii_uppercase();
    if key.is_empty() {
        return None;
    }
    TABLE
        .iter()
        .map(|c| {
            let distance = strsim::damerau_levenshtein(&key, c.code);
            let prefix = key
                .bytes()
                .zip(c.code.bytes())
                .take_while(|(a, b)| a == b)
                .count();
            (distance, prefix, c.code)
        })
        .filter(|(distance, _, _)| *distance <= 1)
        // Smallest distance, then longest shared prefix, then code order.
        .min_by(|a, b| a.0.cmp(&b.0).then(b.1.cmp(&a.1)).then(a.2.cmp(b.2)))
        .map(|(_, _, code)| code)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The codes of the table whose minor unit is `minor`, in code order.
    fn codes_with(minor: Option<u32>) -> Vec<&'static str> {
        all()
            .iter()
            .filter(|c| c.minor_units == minor)
            .map(|c| c.code)
            .collect()
    }

    // Source: ISO 4217 List One (SIX, published 2024-06-25), as transcribed
    // in the conventions reference section 5 (requested currencies).
    #[test]
    fn requested_currencies() {
        let rows = [
            ("USD", 840, 2),
            ("EUR", 978, 2),
            ("GBP", 826, 2),
            ("JPY", 392, 0),
            ("CHF", 756, 2),
            ("CAD", 124, 2),
            ("AUD", 36, 2),
            ("KWD", 414, 3),
            ("BHD", 48, 3),
            ("OMR", 512, 3),
            ("JOD", 400, 3),
            ("TND", 788, 3),
            ("CLF", 990, 4),
            ("UYW", 927, 4),
            ("ISK", 352, 0),
            ("KRW", 410, 0),
            ("VND", 704, 0),
            ("XAF", 950, 0),
        ];
        for (code, numeric, minor) in rows {
            let c = lookup(code).unwrap_or_else(|| panic!("{code} missing"));
            assert_eq!(c.numeric, numeric, "{code}");
            assert_eq!(c.minor_units, Some(minor), "{code}");
            assert_eq!(minor_units(code), Some(minor), "{code}");
        }
        assert!(lookup("CLF").unwrap().fund);
        assert!(!lookup("UYW").unwrap().fund);
    }

    // Source: ISO 4217 List One (SIX, published 2024-06-25), conventions
    // reference section 5: the complete lists of 3-, 4- and 0-decimal codes,
    // checked both ways against the table.
    #[test]
    fn every_code_with_three_four_or_no_decimals() {
        assert_eq!(
            codes_with(Some(3)),
            ["BHD", "IQD", "JOD", "KWD", "LYD", "OMR", "TND"]
        );
        assert_eq!(codes_with(Some(4)), ["CLF", "UYW"]);
        assert_eq!(
            codes_with(Some(0)),
            [
                "BIF", "CLP", "DJF", "GNF", "ISK", "JPY", "KMF", "KRW", "PYG", "RWF", "UGX", "UYI",
                "VND", "VUV", "XAF", "XOF", "XPF"
            ]
        );
        let zero_numerics = [
            ("BIF", 108),
            ("CLP", 152),
            ("DJF", 262),
            ("GNF", 324),
            ("KMF", 174),
            ("PYG", 600),
            ("RWF", 646),
            ("UGX", 800),
            ("UYI", 940),
            ("VUV", 548),
            ("XOF", 952),
            ("XPF", 953),
            ("IQD", 368),
            ("LYD", 434),
        ];
        for (code, numeric) in zero_numerics {
            assert_eq!(lookup(code).map(|c| c.numeric), Some(numeric), "{code}");
        }
        // Everything else has two decimals: 179 codes less 17 + 7 + 2 + 13.
        assert_eq!(codes_with(Some(2)).len(), 140);
    }

    // Source: ISO 4217 List One (SIX, published 2024-06-25), conventions
    // reference section 5: the "N.A." codes have no minor unit.
    #[test]
    fn codes_without_a_minor_unit() {
        let na = [
            ("XAG", 961),
            ("XAU", 959),
            ("XBA", 955),
            ("XBB", 956),
            ("XBC", 957),
            ("XBD", 958),
            ("XDR", 960),
            ("XPD", 964),
            ("XPT", 962),
            ("XSU", 994),
            ("XTS", 963),
            ("XUA", 965),
            ("XXX", 999),
        ];
        let codes: Vec<&str> = na.iter().map(|(c, _)| *c).collect();
        assert_eq!(codes_with(None), codes);
        for (code, numeric) in na {
            assert_eq!(lookup(code).map(|c| c.numeric), Some(numeric), "{code}");
            assert_eq!(minor_units(code), None, "{code}");
        }
    }

    // Source: ISO 4217 List One (SIX, published 2024-06-25), conventions
    // reference section 5: 166 codes with a minor unit plus 13 N.A. codes;
    // the fund codes are those marked IsFund.
    #[test]
    fn the_whole_table() {
        assert_eq!(all().len(), 179);
        assert!(all().windows(2).all(|w| w[0].code < w[1].code));
        let mut numerics: Vec<u16> = all().iter().map(|c| c.numeric).collect();
        numerics.sort_unstable();
        numerics.dedup();
        assert_eq!(numerics.len(), all().len(), "numeric codes are unique");
        for c in all() {
            assert!(c.code.len() == 3 && c.code.bytes().all(|b| b.is_ascii_uppercase()));
            assert!((1..=999).contains(&c.numeric), "{}", c.code);
            assert_eq!(lookup(c.code), Some(c));
        }
        let funds: Vec<&str> = all().iter().filter(|c| c.fund).map(|c| c.code).collect();
        assert_eq!(
            funds,
            ["BOV", "CHE", "CHW", "CLF", "COU", "MXV", "USN", "UYI"]
        );
    }

    // Source: ISO 4217 List One (SIX, published 2024-06-25), conventions
    // reference section 5 (first, last and zero-led numeric codes).
    #[test]
    fn numeric_codes() {
        let rows = [
            ("AED", 784),
            ("ALL", 8),
            ("DZD", 12),
            ("SLE", 925),
            ("VED", 926),
            ("ZWG", 924),
            ("ZMW", 967),
            ("XCD", 951),
        ];
        for (code, numeric) in rows {
            assert_eq!(lookup(code).map(|c| c.numeric), Some(numeric), "{code}");
        }
    }

    // HRK was withdrawn before the 2024-06-25 list and XCG replaces ANG only in
    // a later amendment (from memory, unconfirmed): neither is in the table.
    #[test]
    fn unknown_and_malformed_codes() {
        for code in ["ABC", "EURO", "EU", "", "   ", "US D", "ÉUR", "HRK", "XCG"] {
            assert_eq!(lookup(code), None, "{code:?}");
            assert_eq!(minor_units(code), None, "{code:?}");
        }
        assert_eq!(lookup(" usd\t").map(|c| c.code), Some("USD"));
        assert_eq!(minor_units("jpy"), Some(0));
    }

    // The suggestion policy of this module (common practice, no source).
    #[test]
    fn suggestions_are_one_edit_away() {
        assert_eq!(suggest("USD"), Some("USD"));
        assert_eq!(suggest("UDS"), Some("USD"), "swapped letters");
        assert_eq!(suggest("US"), Some("USD"), "missing letter; USD before USN");
        assert_eq!(
            suggest("EUD"),
            Some("EUR"),
            "same country prefix wins over AUD"
        );
        assert_eq!(suggest("gpb"), Some("GBP"));
        assert_eq!(suggest(" EURO "), Some("EUR"));
        assert_eq!(suggest("QQQ"), None);
        assert_eq!(suggest("DOLLAR"), None);
        assert_eq!(suggest(""), None);
    }
}
