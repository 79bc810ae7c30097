//! Matching the plain names a book or a command line uses for a convention
//! (a basis, a compounding, a rounding mode...) to the engine's own values.
//!
//! Names match case-insensitively with spaces, `_` and `-` ignored, so
//! `act/365 fixed`, `ACT/365FIXED` and `Act/365-Fixed` are one name. An unknown
//! name is an [`UnknownName`] that lists the accepted names and the closest one.
//! This module never reads files or prints.

use std::fmt;

/// A name that matched none of the accepted ones.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct UnknownName {
    /// What kind of name it was, for example `day-count basis`.
    pub kind: &'static str,
    /// The text found.
    pub found: String,
    /// The canonical names accepted, in their usual order.
    pub accepted: Vec<&'static str>,
    /// The accepted name closest to what was found, when one is close enough.
    pub suggestion: Option<&'static str>,
}

impl fmt::Display for UnknownName {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "unknown {} '{}'", self.kind, self.found)?;
        if let Some(s) = self.suggestion {
            write!(f, "; did you mean '{s}'?")?;
        }
        write!(f, " (accepted: {})", self.accepted.join(", "))
    }
}

impl std::error::Error for UnknownName {}

/// Folds a name for matching: lower case, without spaces, `_` or `-`.
///
/// ```
/// use ledgerate::conventions::names::fold;
/// assert_eq!(fold(" ACT/365 Fixed "), "act/365fixed");
/// assert_eq!(fold("modified_following"), "modifiedfollowing");
/// ```
pub fn fold(name: &str) -> String {
    folded(name).collect()
}

/// Whether `fold(name) == key`, for a `key` already folded. Table names are
/// ASCII, compared byte by byte (UTF-8 bytes are equal exactly when the
/// characters are); any other name goes through [`fold`]'s own steps.
fn folds_to(name: &str, key: &str) -> bool {
    if !name.is_ascii() {
        return folded(name).eq(key.chars());
    }
    let mut rest = key.bytes();
    for b in name.bytes() {
        // The ASCII characters `char::is_whitespace` is true for, and `_`, `-`.
        if matches!(b, b' ' | b'\t' | b'\n' | 0x0B | 0x0C | b'\r' | b'_' | b'-') {
            continue;
        }
        if rest.next() != Some(b.to_ascii_lowercase()) {
            return false;
        }
    }
    rest.next().is_none()
}

/// The characters of `fold(name)`, without building the string.
fn folded(name: &str) -> impl Iterator<Item = char> + '_ {
    name.chars()
        .filter(|c| !c.is_whitespace() && *c != '_' && *c != '-')
        .flat_map(char::to_lowercase)
}

/// Looks `found` up in `table` (each entry: a spelling and its value). The
/// canonical names of the values, in their usual order, are `accepted`; each
/// must also appear as a spelling in `table`.
///
/// # Errors
/// [`UnknownName`] with the closest accepted name as a suggestion.
pub fn lookup<T: Copy + PartialEq>(
    kind: &'static str,
    found: &str,
    table: &[(&'static str, T)],
    accepted: &[&'static str],
) -> Result<T, UnknownName> {
    let key = fold(found);
    // Every cell of a names column comes here: compare without allocating.
    if let Some((_, v)) = table.iter().find(|(n, _)| folds_to(n, &key)) {
        return Ok(*v);
    }
    Err(UnknownName {
        kind,
        found: found.trim().to_string(),
        accepted: accepted.to_vec(),
        suggestion: closest(&key, table, accepted),
    })
}

/// The canonical name of the value whose spelling is nearest to the folded key.
fn closest<T: Copy + PartialEq>(
    key: &str,
    table: &[(&'static str, T)],
    accepted: &[&'static str],
) -> Option<&'static str> {
    if key.is_empty() {
        return None;
    }
    // Similarity scores only rank candidates for a message; they are never a figure.
    let (score, value) = table
        .iter()
        .enumerate()
        .map(|(i, (n, v))| (strsim::jaro_winkler(key, &fold(n)), i, *v))
        // Highest score; on a tie, the earlier entry.
        .max_by(|a, b| a.0.total_cmp(&b.0).then(b.1.cmp(&a.1)))
        .map(|(s, _, v)| (s, v))?;
    if score < 0.75 {
        return None;
    }
    accepted
        .iter()
        .copied()
        .find(|a| table.iter().any(|(n, v)| fold(n) == fold(a) && *v == value))
}

/// The most edits (letters added, removed or changed, letter case aside)
/// between an id typed and an id of the books for [`closest_id`] to
/// suggest it. Common practice, no source.
pub const ID_EDITS_SUGGESTED: usize = 2;

/// The id among `ids` that `found` most likely means, for a message: one
/// equal to it but for letter case first; else the one fewest edits away
/// (letter case aside), when at most [`ID_EDITS_SUGGESTED`]; on a tie the
/// earlier one. Ids themselves always match exactly; this only suggests.
///
/// ```
/// use ledgerate::conventions::names::closest_id;
/// let ids = ["HM-LN-003", "HM-LN-030", "HM-SAV-001"];
/// assert_eq!(closest_id("hm-ln-003", ids), Some("HM-LN-003"));
/// assert_eq!(closest_id("HM-LN-03", ids), Some("HM-LN-003"));
/// assert_eq!(closest_id("XX-99", ids), None);
/// ```
pub fn closest_id<'a>(found: &str, ids: impl IntoIterator<Item = &'a str>) -> Option<&'a str> {
    let key = found.trim().to_lowercase();
    if key.is_empty() {
        return None;
    }
    let mut best: Option<(usize, &'a str)> = None;
    for id in ids {
        let folded = id.to_lowercase();
        if folded == key {
            return Some(id);
        }
        let d = strsim::levenshtein(&key, &folded);
        if d <= ID_EDITS_SUGGESTED && best.is_none_or(|(b, _)| d < b) {
            best = Some((d, id));
        }
    }
    best.map(|(_, id)| id)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(Clone, Copy, PartialEq, Debug)]
    enum Colour {
        Red,
        Green,
    }
    const TABLE: &[(&str, Colour)] = &[
        ("red", Colour::Red),
        ("scarlet", Colour::Red),
        ("green", Colour::Green),
    ];

    /// The byte comparison agrees with folding both sides, on ASCII names
    /// against keys with tabs, form feeds, non-ASCII letters and case.
    #[test]
    fn the_ascii_comparison_agrees_with_folding() {
        let names = [
            "ACT/365 Fixed",
            "act-360",
            "30E/360 ISDA",
            "half_up",
            "k",
            "x y",
        ];
        let found = [
            "act/365fixed",
            "ACT 360",
            "act\u{0B}360",
            "30e/360\u{0C}isda",
            "HALFUP",
            "\u{212A}",
            "K",
            "x\ty",
            "xy ",
            "act/365 fixe",
            "",
            "\u{e9}",
        ];
        for n in names {
            for f in found {
                assert_eq!(
                    folds_to(n, &fold(f)),
                    fold(n) == fold(f),
                    "{n:?} against {f:?}"
                );
            }
        }
    }

    #[test]
    fn names_match_whatever_the_case_spaces_and_dashes() {
        assert_eq!(
            lookup("colour", " R-e_D ", TABLE, &["red", "green"]),
            Ok(Colour::Red)
        );
        assert_eq!(
            lookup("colour", "SCARLET", TABLE, &["red", "green"]),
            Ok(Colour::Red)
        );
    }

    #[test]
    fn an_unknown_name_suggests_the_canonical_name_of_the_closest_spelling() {
        let e = lookup("colour", "scarlett", TABLE, &["red", "green"]).unwrap_err();
        assert_eq!(e.suggestion, Some("red"));
        assert_eq!(
            e.to_string(),
            "unknown colour 'scarlett'; did you mean 'red'? (accepted: red, green)"
        );
        let far = lookup("colour", "purple", TABLE, &["red", "green"]).unwrap_err();
        assert_eq!(far.suggestion, None);
    }
}
