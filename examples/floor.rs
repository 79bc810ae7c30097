//! The floor of a month-end run: the time to only read a book, and to only
//! write a workbook of the same rows and columns as a run's output, with the
//! same libraries and settings the program uses. `scripts/bench` compares
//! `ledgerate run` against the sum of the two.
//!
//! ```sh
//! cargo run --release --example floor -- read BOOK
//! cargo run --release --example floor -- write LIKE.xlsx OUT.xlsx
//! ```
//!
//! `read` opens every sheet of a workbook (streamed cell by cell with
//! calamine, as the reader does) or every CSV file of a folder (csv byte
//! records) and counts the non-empty cells: no typing, no checking. `write`
//! first loads the output workbook LIKE.xlsx (not timed), then writes every
//! one of its cells again to OUT.xlsx with rust_xlsxwriter in constant-memory
//! mode at the writer's zip level (timed), one sheet at a time so memory
//! holds one sheet. Each prints one line: `floor <phase> <seconds> s <cells>
//! cells`. Timing is the only place floats appear here.

use std::path::Path;
use std::time::{Duration, Instant};

use calamine::{open_workbook, open_workbook_auto, Data, Reader, Xlsx};
use rust_xlsxwriter::{Format, Workbook};

type Failure = Box<dyn std::error::Error>;

fn read_floor(book: &Path) -> Result<(Duration, u64), Failure> {
    let started = Instant::now();
    let mut cells = 0u64;
    if book.is_dir() {
        let mut files: Vec<_> = std::fs::read_dir(book)?
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|p| p.extension().is_some_and(|x| x == "csv"))
            .collect();
        files.sort();
        for f in files {
            let mut reader = csv::ReaderBuilder::new()
                .has_headers(false)
                .flexible(true)
                .from_path(&f)?;
            let mut record = csv::ByteRecord::new();
            while reader.read_byte_record(&mut record)? {
                cells += record.iter().filter(|x| !x.is_empty()).count() as u64;
            }
        }
    } else {
        let mut wb: Xlsx<_> = open_workbook(book)?;
        for name in wb.sheet_names() {
            let mut reader = wb.worksheet_cells_reader(&name)?;
            while let Some(c) = reader.next_cell()? {
                if !matches!(c.get_value(), calamine::DataRef::Empty) {
                    cells += 1;
                }
            }
        }
    }
    Ok((started.elapsed(), cells))
}

fn write_floor(like: &Path, out: &Path) -> Result<(Duration, u64), Failure> {
    let mut source = open_workbook_auto(like)?;
    let mut wb = Workbook::new();
    if let Some(dir) = out.parent().filter(|p| !p.as_os_str().is_empty()) {
        wb.set_tempdir(dir)?;
    }
    // The output writer's level (src/report/layout.rs, ZIP_LEVEL).
    wb.set_zip_compression_level(ledgerate::report::layout::ZIP_LEVEL);
    let date = Format::new().set_num_format("yyyy-mm-dd");
    let number = Format::new().set_num_format("#,##0.00");
    let mut spent = Duration::ZERO;
    let mut cells = 0u64;
    for name in source.sheet_names() {
        let range = source.worksheet_range(&name)?;
        let (r0, c0) = range.start().unwrap_or((0, 0));
        let started = Instant::now();
        let ws = wb.add_worksheet_with_constant_memory()?;
        ws.set_name(&name)?;
        for (ri, row) in (r0..).zip(range.rows()) {
            for (ci, v) in (c0..).zip(row.iter()) {
                let col = u16::try_from(ci)?;
                match v {
                    Data::Empty => continue,
                    Data::String(s) => {
                        ws.write_string(ri, col, s)?;
                    }
                    Data::Float(x) => {
                        ws.write_number_with_format(ri, col, *x, &number)?;
                    }
                    Data::Int(x) => {
                        ws.write_number_with_format(ri, col, *x as f64, &number)?;
                    }
                    Data::DateTime(d) => {
                        ws.write_number_with_format(ri, col, d.as_f64(), &date)?;
                    }
                    other => {
                        ws.write_string(ri, col, other.to_string())?;
                    }
                }
                cells += 1;
            }
        }
        spent += started.elapsed();
    }
    let started = Instant::now();
    wb.save(out)?;
    spent += started.elapsed();
    Ok((spent, cells))
}

fn main() -> Result<(), Failure> {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let (phase, (took, cells)) = match args.as_slice() {
        [p, book] if p == "read" => ("read", read_floor(Path::new(book))?),
        [p, like, out] if p == "write" => ("write", write_floor(Path::new(like), Path::new(out))?),
        _ => {
            eprintln!("usage: floor read BOOK | floor write LIKE.xlsx OUT.xlsx");
            std::process::exit(2);
        }
    };
    println!("floor {phase} {:.3} s {cells} cells", took.as_secs_f64());
    Ok(())
}
