//! What an xls file's sheets span, from its BIFF records, before the
//! workbook library reads it: the library reserves room for the rows and
//! columns a sheet's DIMENSIONS record declares, and builds each sheet as a
//! dense grid from its first to its last cell, so one far cell or one
//! false count in a file of a kilobyte could ask for terabytes.
//!
//! This module walks the records of the workbook stream once and keeps a
//! few numbers per sheet: it never allocates from a count the file states
//! and never reads a cell's value (only where the cell is).

use std::path::Path;

use super::limits::{grouped, Refusal, Spans, DAMAGED, XLS_COLUMNS, XLS_ROWS};
use super::ole::{u16_at, u32_at, workbook_stream};
use super::sniff::Format;

const BOF: u16 = 0x0809;
const EOF: u16 = 0x000A;
const BOUND_SHEET: u16 = 0x0085;
const DIMENSIONS: u16 = 0x0200;
const MUL_RK: u16 = 0x00BD;
/// The records the library turns into cells, each starting with the
/// cell's row and column (u16 each): Number, Label, RString, BoolErr, RK,
/// LabelSst, Formula, and MulRk (whose last column ends the record).
const CELLS: [u16; 8] = [
    0x0203, 0x0204, 0x00D6, 0x0205, 0x027E, 0x00FD, 0x0006, MUL_RK,
];

/// The records of a stream from its start: (type, data). A record cut
/// short ends them (the library then says the file is damaged).
fn records(stream: &[u8]) -> impl Iterator<Item = (u16, &[u8])> {
    let mut at = 0usize;
    std::iter::from_fn(move || {
        let typ = u16_at(stream, at);
        let len = usize::from(u16_at(stream, at + 2));
        let data = stream.get(at + 4..at + 4 + len)?;
        at += 4 + len;
        Some((typ, data))
    })
}

/// Checks the sheets of the xls file at `path` against the bounds.
pub(crate) fn check(path: &Path) -> Result<(), Refusal> {
    let Ok(file) = std::fs::read(path) else {
        return Ok(());
    };
    let stream = match workbook_stream(&file) {
        Ok(Some(s)) => s,
        Ok(None) => return Ok(()),
        Err(why) => {
            return Err(Refusal::damaged(
                Format::Xls,
                format!("an xls file with {why}"),
            ))
        }
    };
    let mut spans = Spans::new(Format::Xls, XLS_ROWS, XLS_COLUMNS);
    for (at, name) in sheets(&stream) {
        let Some(records) = stream.get(at..) else {
            continue;
        };
        let (rows, columns) = sheet_span(records, &name)?;
        spans.add(&name, rows, columns)?;
    }
    Ok(())
}

/// The sheets the workbook globals list: where each starts, and its name.
fn sheets(stream: &[u8]) -> Vec<(usize, String)> {
    let mut biff8 = true;
    let mut out = Vec::new();
    for (typ, data) in records(stream) {
        match typ {
            BOF => biff8 = u16_at(data, 0) == 0x0600,
            BOUND_SHEET => {
                let at = usize::try_from(u32_at(data, 0)).unwrap_or(usize::MAX);
                out.push((at, sheet_name(data, biff8)));
            }
            EOF => break,
            _ => {}
        }
    }
    out
}

/// A BoundSheet8 record's sheet name (for messages).
fn sheet_name(data: &[u8], biff8: bool) -> String {
    let count = usize::from(data.get(6).copied().unwrap_or(0));
    if !biff8 {
        let bytes = data.get(7..).unwrap_or_default();
        return bytes.iter().take(count).map(|&b| char::from(b)).collect();
    }
    let wide = data.get(7).is_some_and(|f| f & 1 == 1);
    let chars = data.get(8..).unwrap_or_default();
    if wide {
        let units: Vec<u16> = chars
            .chunks_exact(2)
            .take(count)
            .map(|c| u16_at(c, 0))
            .collect();
        String::from_utf16_lossy(&units)
    } else {
        chars.iter().take(count).map(|&b| char::from(b)).collect()
    }
}

/// The rows and columns the library would hold for the sheet whose records
/// start `records`: the larger of what its DIMENSIONS record declares and
/// what its cells span. A DIMENSIONS record past the sheet's bounds, or
/// one ending before it starts, is refused here.
fn sheet_span(records_from: &[u8], name: &str) -> Result<(u64, u64), Refusal> {
    let mut declared = (0u64, 0u64);
    let mut cells: Option<(u64, u64, u64, u64)> = None;
    let mut seen_bof = false;
    let mut depth = 0usize;
    for (typ, data) in records(records_from) {
        if depth > 0 {
            match typ {
                BOF => depth += 1,
                EOF => depth -= 1,
                _ => {}
            }
            continue;
        }
        match typ {
            BOF if seen_bof => depth += 1,
            BOF => seen_bof = true,
            EOF => break,
            DIMENSIONS => declared = dimensions(data, name)?,
            t if CELLS.contains(&t) && data.len() >= 4 => {
                let row = u64::from(u16_at(data, 0));
                let first = u64::from(u16_at(data, 2));
                let last = if t == MUL_RK {
                    first.max(u64::from(u16_at(data, data.len() - 2)))
                } else {
                    first
                };
                if last >= XLS_COLUMNS {
                    return Err(Refusal {
                        found: format!(
                            "a cell in row {}, column {}",
                            grouped(row + 1),
                            grouped(last + 1)
                        ),
                        expected: format!(
                            "cells within the {} columns an xls sheet holds (sheet '{name}')",
                            grouped(XLS_COLUMNS)
                        ),
                        fix: DAMAGED.to_string(),
                    });
                }
                let (r0, r1, c0, c1) = cells.unwrap_or((row, row, first, last));
                cells = Some((r0.min(row), r1.max(row), c0.min(first), c1.max(last)));
            }
            _ => {}
        }
    }
    let (rows, columns) = cells.map_or((0, 0), |(r0, r1, c0, c1)| (r1 - r0 + 1, c1 - c0 + 1));
    Ok((declared.0.max(rows), declared.1.max(columns)))
}

/// The rows and columns a DIMENSIONS record declares, read as the library
/// reads them (BIFF8: u32 rows; BIFF5: u16; the last row and column stored
/// one past the end).
fn dimensions(data: &[u8], name: &str) -> Result<(u64, u64), Refusal> {
    let (first_row, end_row, first_col, end_col) = match data.len() {
        10 => (
            u64::from(u16_at(data, 0)),
            u64::from(u16_at(data, 2)),
            u64::from(u16_at(data, 4)),
            u64::from(u16_at(data, 6)),
        ),
        14 | 16 => (
            u64::from(u32_at(data, 0)),
            u64::from(u32_at(data, 4)),
            u64::from(u16_at(data, 8)),
            u64::from(u16_at(data, 10)),
        ),
        // The library refuses any other length.
        _ => return Ok((0, 0)),
    };
    let first_col = if first_col > 0xFF || end_col < first_col {
        0
    } else {
        first_col
    };
    if end_row == 0 || end_col == 0 {
        return Ok((1, 1));
    }
    let refuse = |found: String| {
        Refusal {
        found,
        expected: format!(
            "a DIMENSIONS record within the {} rows and {} columns an xls sheet holds (sheet '{name}')",
            grouped(XLS_ROWS),
            grouped(XLS_COLUMNS)
        ),
        fix: DAMAGED.to_string(),
    }
    };
    if end_col <= first_col {
        return Err(refuse(
            "a DIMENSIONS record whose columns end before they start".to_string(),
        ));
    }
    if end_row <= first_row {
        return Err(refuse(
            "a DIMENSIONS record whose rows end before they start".to_string(),
        ));
    }
    let (rows, columns) = (end_row - first_row, end_col - first_col);
    if end_row > XLS_ROWS || end_col > XLS_COLUMNS {
        return Err(refuse(format!(
            "a DIMENSIONS record of {} rows by {} columns",
            grouped(rows),
            grouped(columns)
        )));
    }
    Ok((rows, columns))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_good_xls_fixture_lists_its_sheets_and_their_spans() {
        let file = std::fs::read("tests/fixtures/books/harbourview_good.xls").unwrap();
        let stream = workbook_stream(&file).unwrap().unwrap();
        let sheets = sheets(&stream);
        let names: Vec<&str> = sheets.iter().map(|(_, n)| n.as_str()).collect();
        assert!(names.contains(&"Accounts"), "{names:?}");
        let (at, _) = sheets.iter().find(|(_, n)| n == "Accounts").unwrap();
        let (rows, columns) = sheet_span(&stream[*at..], "Accounts").unwrap();
        assert!(
            (9..100).contains(&rows) && (20..=40).contains(&columns),
            "{rows} x {columns}"
        );
    }

    #[test]
    fn dimensions_read_as_the_library_reads_them() {
        let biff8 = |r0: u32, r1: u32, c0: u16, c1: u16| {
            let mut d = Vec::new();
            d.extend(r0.to_le_bytes());
            d.extend(r1.to_le_bytes());
            d.extend(c0.to_le_bytes());
            d.extend(c1.to_le_bytes());
            d.extend([0, 0]);
            dimensions(&d, "S")
        };
        assert_eq!(biff8(0, 10, 0, 5), Ok((10, 5)));
        assert_eq!(biff8(0, 0, 0, 0), Ok((1, 1)));
        assert!(biff8(5, 3, 0, 5)
            .unwrap_err()
            .found
            .contains("rows end before"));
        assert!(biff8(0, 65_537, 0, 5).is_err());
        assert!(biff8(0, 10, 0, 257).is_err());
    }
}
