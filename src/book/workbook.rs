//! The workbook readers for xlsb, xls and ods (through calamine), and what
//! every workbook reader shares: worksheet names, and a sheet's sparse
//! cells grouped into rows.
//!
//! xlsb sheets are streamed cell by cell, so a stray cell far down and right
//! costs one cell, not a dense grid up to it; xls and ods files are parsed
//! whole when opened. Files are only opened for reading. This module never
//! decides which sheets a book holds (`picking.rs` does) and never knows
//! what a column means.

use std::fmt::Display;
use std::fs::File;
use std::io::BufReader;
use std::path::Path;

use calamine::{open_workbook, Reader, SheetType, Xlsb, XlsbError};

use super::cell::{lower_first, Cell};
use super::picking::pick_sheets;
use super::row::Row;
use super::sheet::{Loaded, Rows, Sheet};
use crate::problem::{Position, Severity};
use crate::schema::SheetKind;

/// The cells of one sheet, as (row, column, cell), blank cells left out.
pub(crate) type Cells = Vec<(u32, u32, Cell)>;

/// Reads every sheet of a known kind of an xlsb workbook; the `Err` is a
/// message about the file.
pub(crate) fn read_xlsb(path: &Path, book: &str) -> Result<Loaded, String> {
    let mut loaded = Loaded::default();
    let mut wb: Xlsb<BufReader<File>> =
        open_workbook(path).map_err(|e: XlsbError| lower_first(&e.to_string()))?;
    let names = worksheet_names(wb.sheets_metadata());
    for (kind, name) in pick_sheets(book, &names, &mut loaded) {
        let cells = read_xlsb_sheet(&mut wb, &name);
        push_sheet(book, kind, name, cells, &mut loaded);
    }
    Ok(loaded)
}

/// Reads every sheet of a known kind of a workbook parsed whole when opened
/// (`R` is xls or ods); the `Err` is a message about the file.
pub(crate) fn read_parsed<R>(path: &Path, book: &str) -> Result<Loaded, String>
where
    R: Reader<BufReader<File>>,
    R::Error: Display,
{
    let mut loaded = Loaded::default();
    let mut wb: R = open_workbook(path).map_err(|e: R::Error| lower_first(&e.to_string()))?;
    let names = worksheet_names(wb.sheets_metadata());
    for (kind, name) in pick_sheets(book, &names, &mut loaded) {
        let cells = read_range(&mut wb, &name);
        push_sheet(book, kind, name, cells, &mut loaded);
    }
    Ok(loaded)
}

/// Worksheet names in workbook order (chart and macro sheets left out).
pub(crate) fn worksheet_names(meta: &[calamine::Sheet]) -> Vec<String> {
    meta.iter()
        .filter(|s| s.typ == SheetType::WorkSheet)
        .map(|s| s.name.clone())
        .collect()
}

/// Adds a sheet that was read.
pub(crate) fn push_sheet(
    book: &str,
    kind: SheetKind,
    name: String,
    cells: Option<Cells>,
    loaded: &mut Loaded,
) {
    let at = Position {
        book: book.to_string(),
        sheet: name.clone(),
        cell: String::new(),
        ..Position::default()
    };
    let Some(cells) = cells else {
        loaded.problem(
            Severity::Error,
            at,
            &name,
            "a sheet that can be read",
            "the sheet is damaged: save the book again from the spreadsheet program",
        );
        return;
    };
    loaded.sheets.push(Sheet {
        kind,
        name,
        rows: Rows::Held(group_rows(cells)),
    });
}

/// Sparse cells grouped into rows, in row and column order.
fn group_rows(mut cells: Cells) -> Vec<Row> {
    cells.sort_by_key(|(r, c, _)| (*r, *c));
    let mut rows: Vec<Row> = Vec::new();
    for (r, c, cell) in cells {
        match rows.last_mut() {
            Some(row) if row.index == r => row.cells.push((c, cell)),
            _ => rows.push(Row {
                index: r,
                cells: vec![(c, cell)],
                shape: None,
            }),
        }
    }
    rows
}

/// Streams an xlsb sheet.
fn read_xlsb_sheet(wb: &mut Xlsb<BufReader<File>>, name: &str) -> Option<Cells> {
    let mut cells = Cells::new();
    let mut reader = wb.worksheet_cells_reader(name).ok()?;
    while let Some(c) = reader.next_cell().ok()? {
        let (r, col) = c.get_position();
        let cell = Cell::from(c.get_value());
        if !cell.is_empty() {
            cells.push((r, col, cell));
        }
    }
    Some(cells)
}

/// Reads an xls or ods sheet: these formats are parsed whole when opened,
/// so the range costs no more than the file already did.
fn read_range<R: Reader<BufReader<File>>>(wb: &mut R, name: &str) -> Option<Cells> {
    let range = wb.worksheet_range(name).ok()?;
    // The range starts at its first used cell, not at A1.
    let (r0, c0) = range.start().unwrap_or((0, 0));
    let mut cells = Cells::new();
    for (r, c, v) in range.used_cells() {
        let cell = Cell::from(v);
        if cell.is_empty() {
            continue;
        }
        let (Ok(r), Ok(c)) = (u32::try_from(r), u32::try_from(c)) else {
            continue;
        };
        cells.push((r0.saturating_add(r), c0.saturating_add(c), cell));
    }
    Some(cells)
}
