//! The sheets a book may hold, by kind, and the names they go by.
//!
//! This module only names sheets: it never opens a file, reads a cell or
//! decides what a missing sheet means (`picking.rs` does).

use crate::conventions::names::fold;

/// The sheets a book may hold.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub(crate) enum SheetKind {
    /// One row per account.
    Accounts,
    /// Rate tables.
    Rates,
    /// Balance movements.
    Movements,
    /// Postings as statements show them.
    Statements,
    /// Index fixings (floating rates).
    Fixings,
    /// Holiday calendars.
    Holidays,
    /// Run settings.
    Settings,
}

impl SheetKind {
    /// Every sheet, in the order behaviour.md, Input books lists them.
    pub(crate) const ALL: [SheetKind; 7] = [
        SheetKind::Accounts,
        SheetKind::Rates,
        SheetKind::Movements,
        SheetKind::Statements,
        SheetKind::Fixings,
        SheetKind::Holidays,
        SheetKind::Settings,
    ];

    /// The sheet's name as written in behaviour.md, Input books.
    pub(crate) fn label(self) -> &'static str {
        match self {
            SheetKind::Accounts => "Accounts",
            SheetKind::Rates => "Rates",
            SheetKind::Movements => "Movements",
            SheetKind::Statements => "Statements",
            SheetKind::Fixings => "Fixings",
            SheetKind::Holidays => "Holidays",
            SheetKind::Settings => "Settings",
        }
    }

    /// Whether a book must have it.
    pub(crate) fn required(self) -> bool {
        matches!(self, SheetKind::Accounts | SheetKind::Rates)
    }

    /// The sheet a name stands for (case, spaces, `_` and `-` ignored).
    pub(crate) fn from_name(name: &str) -> Option<SheetKind> {
        let key = fold(name);
        SheetKind::ALL.into_iter().find(|k| fold(k.label()) == key)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sheet_names_fold() {
        assert_eq!(
            SheetKind::from_name(" ACCOUNTS "),
            Some(SheetKind::Accounts)
        );
        assert_eq!(
            SheetKind::from_name("hol-i_days"),
            Some(SheetKind::Holidays)
        );
        assert_eq!(SheetKind::from_name("Accounts 2"), None);
    }
}
