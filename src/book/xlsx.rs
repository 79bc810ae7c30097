//! The xlsx reader: each sheet streamed cell by cell, so a stray cell far
//! down and right costs one cell, not a dense grid up to it; the Accounts
//! sheet streams on one core while the other sheets stream on another, each
//! through its own reader of the file.
//!
//! Files are only opened for reading. Sheets and problems join in the
//! workbook's order whichever core read them, so the result never depends
//! on timing. This module never knows what a column means.

use std::fs::File;
use std::io::BufReader;
use std::path::Path;

use calamine::{open_workbook, Reader, Xlsx, XlsxError};

use super::cell::{lower_first, Cell};
use super::picking::pick_sheets;
use super::sheet::Loaded;
use super::workbook::{push_sheet, worksheet_names, Cells};
use crate::problem::{Position, Severity};
use crate::schema::SheetKind;

/// Reads every sheet of a known kind of an xlsx workbook; the `Err` is a
/// message about the file.
pub(crate) fn read(path: &Path, book: &str) -> Result<Loaded, String> {
    let mut loaded = Loaded::default();
    let mut wb: Xlsx<BufReader<File>> =
        open_workbook(path).map_err(|e: XlsxError| lower_first(&e.to_string()))?;
    let names = worksheet_names(wb.sheets_metadata());
    let picked = pick_sheets(book, &names, &mut loaded);
    // The Accounts sheet streams on one core, the other sheets on the
    // other, each through its own reader of the file; sheets and
    // problems then join in the workbook's order.
    let (accounts, others): (Vec<_>, Vec<_>) = picked
        .into_iter()
        .enumerate()
        .partition(|(_, (kind, _))| *kind == SheetKind::Accounts);
    let read_all = |wb: &mut Xlsx<BufReader<File>>, sheets: Vec<(usize, (SheetKind, String))>| {
        sheets
            .into_iter()
            .map(|(at, (kind, name))| {
                let mut own = Loaded::default();
                let cells = read_xlsx_sheet(wb, &name, book, &mut own);
                (at, kind, name, cells, own.problems)
            })
            .collect::<Vec<_>>()
    };
    let (mut read, rest) = rayon::join(
        || read_all(&mut wb, accounts),
        || match open_workbook::<Xlsx<BufReader<File>>, _>(path) {
            Ok(mut second) => read_all(&mut second, others),
            // The file opened a moment ago: a second reader that
            // cannot open it reads nothing, and says so per sheet.
            Err(_) => others
                .into_iter()
                .map(|(at, (kind, name))| (at, kind, name, None, Vec::new()))
                .collect(),
        },
    );
    read.extend(rest);
    read.sort_by_key(|(at, ..)| *at);
    for (_, kind, name, cells, problems) in read {
        loaded.problems.extend(problems);
        push_sheet(book, kind, name, cells, &mut loaded);
    }
    Ok(loaded)
}

/// The most error cells of an unknown kind one sheet may hold before the
/// reader stops: a guard against a stream that makes no progress.
const MAX_ERROR_CELLS: usize = 100_000;

/// Streams an xlsx sheet. An error cell whose kind calamine does not know
/// (`#SPILL!`, `#CALC!`...) arrives as an `Err` without a position; it is
/// counted in stream order and placed by a second pass over the cell
/// positions, so it becomes an error cell like `#DIV/0!`.
fn read_xlsx_sheet(
    wb: &mut Xlsx<BufReader<File>>,
    name: &str,
    book: &str,
    loaded: &mut Loaded,
) -> Option<Cells> {
    let mut cells = Cells::new();
    let mut unknown_errors: Vec<(usize, String)> = Vec::new();
    {
        let mut reader = wb.worksheet_cells_reader(name).ok()?;
        let mut seq = 0usize;
        loop {
            match reader.next_cell() {
                Ok(Some(c)) => {
                    let (r, col) = c.get_position();
                    let cell = Cell::from(c.get_value());
                    if !cell.is_empty() {
                        cells.push((r, col, cell));
                    }
                }
                Ok(None) => break,
                Err(XlsxError::CellError(e)) if unknown_errors.len() < MAX_ERROR_CELLS => {
                    unknown_errors.push((seq, e));
                }
                Err(_) => return None,
            }
            seq += 1;
        }
    }
    if unknown_errors.is_empty() {
        return Some(cells);
    }
    let mut positions: Vec<(u32, u32)> = Vec::new();
    if let Ok(mut reader) = wb.worksheet_cells_reader(name) {
        let wanted: Vec<usize> = unknown_errors.iter().map(|(i, _)| *i).collect();
        let mut seq = 0usize;
        let mut next = wanted.iter().peekable();
        while let (Ok(Some(c)), Some(&&want)) = (reader.next_formula(), next.peek()) {
            if seq == want {
                positions.push(c.get_position());
                next.next();
            }
            seq += 1;
        }
    }
    for (k, (_, e)) in unknown_errors.into_iter().enumerate() {
        match positions.get(k) {
            Some(&(r, c)) => cells.push((r, c, Cell::Error(e))),
            None => loaded.problem(
                Severity::Error,
                Position {
                    book: book.to_string(),
                    sheet: name.to_string(),
                    cell: String::new(),
                    ..Position::default()
                },
                &e,
                "a value, not an error cell",
                "find the error cell in the sheet and correct its formula or type the value",
            ),
        }
    }
    Some(cells)
}
