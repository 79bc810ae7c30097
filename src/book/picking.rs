//! Picking a book's sheets by name: one sheet (or CSV file) per kind, a
//! note for each one that is not part of a book, an error for a second one
//! of a kind and for a missing required one, naming a near miss.
//!
//! This module only compares names and reports: it never opens a file and
//! never reads a cell.

use super::sheet::Loaded;
use super::table::near_miss;
use crate::conventions::names::fold;
use crate::problem::{Position, Severity};
use crate::schema::SheetKind;

/// The sheets to read: one per known kind. Notes the sheets that are not
/// read; a second sheet of a kind is an error.
pub(crate) fn pick_sheets(
    book: &str,
    names: &[String],
    loaded: &mut Loaded,
) -> Vec<(SheetKind, String)> {
    let mut picked: Vec<(SheetKind, String)> = Vec::new();
    for name in names {
        let at = Position {
            book: book.to_string(),
            sheet: name.clone(),
            cell: String::new(),
            ..Position::default()
        };
        match SheetKind::from_name(name) {
            Some(kind) => {
                if let Some((_, first)) = picked.iter().find(|(k, _)| *k == kind) {
                    loaded.problem(
                        Severity::Error,
                        at,
                        name,
                        &format!("one {} sheet", kind.label()),
                        &format!(
                            "sheet '{first}' is already the {} sheet: merge the two or rename one",
                            kind.label()
                        ),
                    );
                } else {
                    picked.push((kind, name.clone()));
                }
            }
            None => unused_sheet(name, at, loaded),
        }
    }
    picked
}

/// A note for a sheet (or CSV file) that is not part of a book, unless it is
/// a near miss for a missing required sheet (that error names it).
pub(crate) fn unused_sheet(name: &str, at: Position, loaded: &mut Loaded) {
    let near = SheetKind::ALL
        .into_iter()
        .find(|k| near_miss(&fold(name), &fold(k.label())));
    let fix = match near {
        Some(k) => format!(
            "it is not read; rename it to {} if it is that sheet",
            k.label()
        ),
        None => "it is not read; nothing to do if it is not part of the book".to_string(),
    };
    let sheets: Vec<&str> = SheetKind::ALL.iter().map(|k| k.label()).collect();
    loaded.problem(
        Severity::Note,
        at,
        name,
        &format!("one of the sheets {}", sheets.join(", ")),
        &fix,
    );
}

/// Errors for missing required sheets, naming a near miss when there is one.
pub(crate) fn check_required(book: &str, loaded: &mut Loaded, csv: bool) {
    for kind in SheetKind::ALL.into_iter().filter(|k| k.required()) {
        if loaded.sheets.iter().any(|s| s.kind == kind) {
            continue;
        }
        // A sheet or file that is there but could not be read already has
        // its error; "no such sheet" would send the user looking for it.
        let unreadable = loaded.problems.iter().any(|p| {
            p.severity == Severity::Error && SheetKind::from_name(&p.position.sheet) == Some(kind)
        });
        if unreadable {
            continue;
        }
        let wanted = if csv {
            format!("{}.csv", kind.label().to_lowercase())
        } else {
            kind.label().to_string()
        };
        let near = loaded
            .problems
            .iter()
            .find(|p| {
                p.severity == Severity::Note && near_miss(&fold(&p.found), &fold(kind.label()))
            })
            .map(|p| p.found.clone());
        let fix = match near {
            Some(n) => format!("rename '{n}' to {wanted}"),
            None if csv => format!("add {wanted} to the folder"),
            None => format!("add a sheet named {wanted}"),
        };
        let found = if csv {
            "no such file".to_string()
        } else {
            "no such sheet".to_string()
        };
        loaded.problem(
            Severity::Error,
            Position {
                book: book.to_string(),
                // A missing CSV file is named as its file would be.
                sheet: if csv {
                    kind.label().to_lowercase()
                } else {
                    kind.label().to_string()
                },
                cell: String::new(),
                ..Position::default()
            },
            &found,
            &format!(
                "{} {} {}",
                if wanted.starts_with(['A', 'a']) {
                    "an"
                } else {
                    "a"
                },
                wanted,
                if csv { "file" } else { "sheet" }
            ),
            &fix,
        );
    }
}
