//! What an ods file's sheets span, read from the repeat counts of its
//! `content.xml` before the workbook library expands them: a row or cell
//! may say it repeats a million times, and the library builds each sheet
//! as a dense grid from the first to the last filled cell.
//!
//! This module streams the part once and keeps a few counters per sheet:
//! it never expands a repeat, never allocates from a count, and never
//! reads a cell's value (only whether it has one).

use std::fs::File;
use std::io::{BufReader, Read};
use std::path::Path;

use quick_xml::events::{BytesStart, Event};
use zip::ZipArchive;

use super::limits::TEXT_BUDGET;
use super::limits::{attribute, grouped, xml, Refusal, Spans, CELL_CHARS, DAMAGED};
use super::limits::{MAX_COLUMNS, MAX_ROWS};
use super::sniff::Format;

/// The filled extent of one sheet so far, in expanded rows and columns.
#[derive(Default)]
struct Sheet {
    name: String,
    /// Rows so far, repeats expanded.
    rows: u64,
    /// The first filled row, and the end of the last (exclusive).
    filled_rows: Option<(u64, u64)>,
    /// The first filled column and the end of the last (exclusive).
    filled_columns: Option<(u64, u64)>,
}

/// The row being read.
#[derive(Default)]
struct Row {
    repeats: u64,
    /// Columns so far, repeats expanded.
    columns: u64,
    /// The first filled column and the end of the last (exclusive).
    filled: Option<(u64, u64)>,
    /// Characters of cell text in the row, column repeats expanded.
    text: u64,
}

/// Checks the sheets of the ods file at `path` against the bounds: each
/// within 1,048,576 rows and 16,384 columns (the library drops what lies
/// past them), all within the cell budget, no cell text past what a cell
/// holds.
pub(crate) fn check(path: &Path) -> Result<(), Refusal> {
    let Ok(file) = File::open(path) else {
        return Ok(());
    };
    let Ok(mut zip) = ZipArchive::new(BufReader::new(file)) else {
        return Ok(());
    };
    let Ok(content) = zip.by_name("content.xml") else {
        return Ok(());
    };
    scan(content)
}

fn repeats(e: &BytesStart<'_>, key: &str) -> u64 {
    attribute(e, key)
        .and_then(|v| v.trim().parse::<u64>().ok())
        .unwrap_or(1)
}

/// Whether a cell element holds a value or a formula.
fn filled(e: &BytesStart<'_>) -> bool {
    e.attributes().with_checks(false).flatten().any(|a| {
        matches!(
            a.key.as_ref(),
            "office:value"
                | "office:value-type"
                | "office:string-value"
                | "office:date-value"
                | "office:time-value"
                | "office:boolean-value"
                | "table:formula"
        )
    })
}

/// Streams `content.xml`.
fn scan<R: Read>(content: R) -> Result<(), Refusal> {
    let mut reader = xml(BufReader::new(content));
    let mut spans = Spans::new(Format::Ods, MAX_ROWS, MAX_COLUMNS);
    let mut sheet: Option<Sheet> = None;
    let mut row: Option<Row> = None;
    // Spaces `text:s` elements ask for in the cell being read, and the
    // cell's column repeats.
    let mut spaces: Option<u64> = None;
    let mut cell_repeats = 1u64;
    // Characters of cell text in the workbook, repeats expanded (the
    // library copies a repeated cell's text into every cell).
    let mut text = 0u64;
    let mut buf = Vec::new();
    loop {
        buf.clear();
        let (e, empty) = match reader.read_event_into(&mut buf) {
            Ok(Event::Start(e)) => (e, false),
            Ok(Event::Empty(e)) => (e, true),
            Ok(Event::Text(t)) => {
                if let (Some(_), Some(row)) = (spaces, row.as_mut()) {
                    let n = u64::try_from(t.len()).unwrap_or(u64::MAX);
                    row.text = row.text.saturating_add(n.saturating_mul(cell_repeats));
                }
                continue;
            }
            Ok(Event::End(e)) => {
                match e.name().as_ref() {
                    "table:table-cell" | "table:covered-table-cell" => spaces = None,
                    "table:table-row" => {
                        if let Some(r) = row.as_ref().filter(|r| r.filled.is_some()) {
                            text = text.saturating_add(r.text.saturating_mul(r.repeats));
                        }
                        end_row(sheet.as_mut(), row.take())?;
                    }
                    "table:table" => end_sheet(sheet.take(), &mut spans, text)?,
                    _ => {}
                }
                continue;
            }
            // A damaged part: the library says so when it reads it.
            Ok(Event::Eof) | Err(_) => break,
            Ok(_) => continue,
        };
        match e.name().as_ref() {
            "table:table" => {
                end_sheet(sheet.take(), &mut spans, text)?;
                sheet = Some(Sheet {
                    name: attribute(&e, "table:name").unwrap_or_default(),
                    ..Sheet::default()
                });
                if empty {
                    end_sheet(sheet.take(), &mut spans, text)?;
                }
            }
            "table:table-row" if sheet.is_some() => {
                let new = Row {
                    repeats: repeats(&e, "table:number-rows-repeated"),
                    ..Row::default()
                };
                if empty {
                    end_row(sheet.as_mut(), Some(new))?;
                } else {
                    row = Some(new);
                }
            }
            "table:table-cell" | "table:covered-table-cell" => {
                if let Some(row) = row.as_mut() {
                    let n = repeats(&e, "table:number-columns-repeated");
                    let end = row.columns.saturating_add(n);
                    let values: u64 = e
                        .attributes()
                        .with_checks(false)
                        .flatten()
                        .map(|a| u64::try_from(a.value.len()).unwrap_or(u64::MAX))
                        .fold(0, u64::saturating_add);
                    row.text = row.text.saturating_add(values.saturating_mul(n));
                    cell_repeats = n;
                    if filled(&e) && n > 0 {
                        let (first, last) = row.filled.unwrap_or((row.columns, end));
                        row.filled = Some((first.min(row.columns), last.max(end)));
                    }
                    row.columns = end;
                    spaces = (!empty).then_some(0);
                }
            }
            "text:s" => {
                if let (Some(total), Some(row)) = (spaces.as_mut(), row.as_mut()) {
                    let n = repeats(&e, "text:c");
                    *total = total.saturating_add(n);
                    row.text = row.text.saturating_add(n.saturating_mul(cell_repeats));
                    if *total > CELL_CHARS {
                        let at = sheet.as_ref().map(|s| s.name.clone()).unwrap_or_default();
                        return Err(Refusal {
                            found: format!("a cell asking for {} spaces", grouped(*total)),
                            expected: format!(
                                "at most {} characters in a cell of sheet '{at}'",
                                grouped(CELL_CHARS)
                            ),
                            fix: DAMAGED.to_string(),
                        });
                    }
                }
            }
            _ => {}
        }
    }
    end_sheet(sheet.take(), &mut spans, text)
}

/// The refusal for more cell text than the budget.
fn too_much_text(text: u64, sheet: &str) -> Refusal {
    Refusal {
        found: format!("{} characters of cell text in all", grouped(text)),
        expected: format!(
            "at most {} characters of cell text, repeated cells counted each time, in an ods workbook, which is read whole (passed in sheet '{sheet}')",
            grouped(TEXT_BUDGET)
        ),
        fix: "remove the repeated cells of long text, or save the book as xlsx, which is read cell by cell".to_string(),
    }
}

/// Adds a row that was read to its sheet.
fn end_row(sheet: Option<&mut Sheet>, row: Option<Row>) -> Result<(), Refusal> {
    let (Some(sheet), Some(row)) = (sheet, row) else {
        return Ok(());
    };
    // A filled row repeated 0 times is still held once by the library.
    let end = sheet.rows.saturating_add(row.repeats.max(1));
    if let Some((first, last)) = row.filled {
        let (top, _) = sheet.filled_rows.unwrap_or((sheet.rows, end));
        sheet.filled_rows = Some((top, end));
        let (left, right) = sheet.filled_columns.unwrap_or((first, last));
        sheet.filled_columns = Some((left.min(first), right.max(last)));
        let right = sheet.filled_columns.map_or(last, |(_, r)| r);
        if end > MAX_ROWS || right > MAX_COLUMNS {
            return Err(past_bounds(sheet, end, right));
        }
    }
    sheet.rows = sheet.rows.saturating_add(row.repeats);
    Ok(())
}

/// The refusal for a sheet whose filled cells reach past the rows or
/// columns a sheet holds (the library would drop them).
fn past_bounds(sheet: &Sheet, bottom: u64, right: u64) -> Refusal {
    Refusal {
        found: format!(
            "filled cells reaching row {} and column {}",
            grouped(bottom),
            grouped(right)
        ),
        expected: format!(
            "at most {} rows and {} columns in sheet '{}', as an ods sheet holds",
            grouped(MAX_ROWS),
            grouped(MAX_COLUMNS),
            sheet.name
        ),
        fix: DAMAGED.to_string(),
    }
}

/// Adds a sheet that was read to the spans, then checks the cell text of
/// the workbook so far (`text`) against its budget.
fn end_sheet(sheet: Option<Sheet>, spans: &mut Spans, text: u64) -> Result<(), Refusal> {
    let Some(sheet) = sheet else {
        return Ok(());
    };
    if let (Some((top, bottom)), Some((left, right))) = (sheet.filled_rows, sheet.filled_columns) {
        spans.add(
            &sheet.name,
            bottom.saturating_sub(top),
            right.saturating_sub(left),
        )?;
    }
    if text > TEXT_BUDGET {
        return Err(too_much_text(text, &sheet.name));
    }
    Ok(())
}
