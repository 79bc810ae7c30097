//! ISO 4217 currency codes and their minor units (placeholder, being filled).

/// Minor units (decimal places) of an ISO 4217 code, `None` when unknown.
pub fn minor_units(code: &str) -> Option<u32> {
    match code {
        "USD" | "EUR" | "GBP" => Some(2),
        "JPY" => Some(0),
        "KWD" => Some(3),
        _ => None,
    }
}
