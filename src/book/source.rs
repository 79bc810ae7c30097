//! Opening a book and reading its sheets into plain rows of cells: a
//! workbook (xlsx, xlsm, xlsb, xls, ods) or a folder of CSV files named after
//! the sheets.
//!
//! Files are only ever opened for reading. A file that cannot be read, is
//! empty, truncated or not a workbook gives a problem, never a panic. xlsx and
//! xlsb sheets are streamed cell by cell, so a stray cell far down and right
//! costs one cell, not a dense grid up to it; an xlsx book's Accounts sheet
//! streams on one core while its other sheets stream on another. Nothing
//! here knows what a column means.

use std::borrow::Cow;
use std::fs::{self, File};
use std::io::{BufReader, Read};
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::Path;

use calamine::{
    open_workbook, Ods, OdsError, Reader, SheetType, Xls, XlsError, Xlsb, XlsbError, Xlsx,
    XlsxError,
};

use super::cell::{shown, Cell};
use super::table::near_miss;
use crate::conventions::names::fold;
pub(crate) use crate::problem::{a1, a1_row, column_letters};
use crate::problem::{Position, Problem, Severity};

/// The sheets a book may hold, as the book schema describes them.
pub(crate) use super::schema::SheetKind;

/// A row of a sheet: its 0-based index and its non-blank cells by column.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(crate) struct Row {
    /// 0-based row index in the sheet (a CSV file: its line number less one).
    pub index: u32,
    /// Non-blank cells, by 0-based column, ascending.
    pub cells: Vec<(u32, Cell)>,
    /// A CSV record's fields (a workbook row has none).
    pub shape: Option<Shape>,
}

/// How many fields a CSV record has, for the ragged-row check.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Shape {
    /// All fields.
    pub fields: u32,
    /// Fields up to the last non-blank one.
    pub filled: u32,
}

/// One sheet that was read.
#[derive(Debug, Clone)]
pub(crate) struct Sheet {
    /// What the sheet is.
    pub kind: SheetKind,
    /// The name to show in positions (a CSV file: its name without `.csv`).
    pub name: String,
    /// Rows with at least one non-blank cell, in order.
    pub rows: Rows,
}

/// Where a sheet's rows are: held as cells (a workbook sheet), or the text
/// of a CSV file that was checked when the book was opened and is parsed
/// again, a record at a time, on each pass over the rows. A CSV sheet so
/// costs its file's text, not a heap value per cell.
#[derive(Debug, Clone)]
pub(crate) enum Rows {
    /// Rows of cells.
    Held(Vec<Row>),
    /// The text of a CSV file that parses without a fault.
    Csv(String),
}

impl Sheet {
    /// The rows with at least one non-blank cell, in order.
    pub(crate) fn rows(&self) -> SheetRows<'_> {
        match &self.rows {
            Rows::Held(rows) => SheetRows::Held(rows.iter()),
            Rows::Csv(text) => SheetRows::Csv(CsvRows::new(text, true)),
        }
    }

    /// A CSV sheet's records with their shapes and no cells (cheaper when
    /// only the shapes matter); `None` for a workbook sheet.
    pub(crate) fn shapes(&self) -> Option<impl Iterator<Item = Row> + '_> {
        match &self.rows {
            Rows::Held(_) => None,
            Rows::Csv(text) => {
                let mut rows = CsvRows::new(text, false);
                Some(std::iter::from_fn(move || rows.next_row()?.ok()))
            }
        }
    }
}

/// The rows of a sheet, one at a time: borrowed when held, built from the
/// text when the sheet is a CSV file.
pub(crate) enum SheetRows<'a> {
    /// Held rows.
    Held(std::slice::Iter<'a, Row>),
    /// A CSV file's records.
    Csv(CsvRows<'a>),
}

impl<'a> Iterator for SheetRows<'a> {
    type Item = Cow<'a, Row>;

    fn next(&mut self) -> Option<Cow<'a, Row>> {
        match self {
            SheetRows::Held(rows) => rows.next().map(Cow::Borrowed),
            // The text parsed without a fault when the book was opened; a
            // fault now (never expected) ends the rows.
            SheetRows::Csv(rows) => rows.next_row()?.ok().map(Cow::Owned),
        }
    }
}

/// The sheets of a book and the problems met opening it.
#[derive(Debug, Default)]
pub(crate) struct Loaded {
    /// Sheets of known kinds, at most one of each.
    pub sheets: Vec<Sheet>,
    /// Book- and sheet-level problems.
    pub problems: Vec<Problem>,
}

impl Loaded {
    fn problem(
        &mut self,
        severity: Severity,
        position: Position,
        found: &str,
        expected: &str,
        fix: &str,
    ) {
        self.problems.push(Problem {
            severity,
            position,
            account: None,
            found: shown(found),
            expected: expected.to_string(),
            fix: fix.to_string(),
        });
    }
}

/// What a file's first bytes say it is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Content {
    /// A zip archive: xlsx, xlsm, xlsb or ods.
    Zip,
    /// An OLE compound file: xls (or an encrypted xlsx).
    Ole,
    /// Anything else.
    Other,
}

fn sniff(head: &[u8]) -> Content {
    if head.starts_with(b"PK\x03\x04") {
        Content::Zip
    } else if head.starts_with(&[0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1]) {
        Content::Ole
    } else {
        Content::Other
    }
}

/// The workbook formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Format {
    Xlsx,
    Xlsb,
    Xls,
    Ods,
}

impl Format {
    fn name(self) -> &'static str {
        match self {
            Format::Xlsx => "xlsx",
            Format::Xlsb => "xlsb",
            Format::Xls => "xls",
            Format::Ods => "ods",
        }
    }

    fn content(self) -> Content {
        match self {
            Format::Xls => Content::Ole,
            _ => Content::Zip,
        }
    }
}

/// Reads the book at `path` (a workbook file or a CSV folder). `book` is the
/// name positions carry.
pub(crate) fn load(path: &Path, book: &str) -> Loaded {
    let mut loaded = Loaded::default();
    let at_book = || Position {
        book: book.to_string(),
        ..Position::default()
    };
    let meta = match fs::metadata(path) {
        Ok(m) => m,
        Err(e) => {
            loaded.problem(
                Severity::Error,
                at_book(),
                &path.display().to_string(),
                "a readable workbook file or folder of CSV files",
                &format!(
                    "check the path and that it may be read ({})",
                    lower_first(&e.to_string())
                ),
            );
            return loaded;
        }
    };
    if meta.is_dir() {
        read_csv_folder(path, book, &mut loaded);
        check_required(book, &mut loaded, true);
        return loaded;
    }
    let head = match read_head(path) {
        Ok(h) => h,
        Err(e) => {
            loaded.problem(
                Severity::Error,
                at_book(),
                &path.display().to_string(),
                "a readable workbook file",
                &format!(
                    "check that the file may be read ({})",
                    lower_first(&e.to_string())
                ),
            );
            return loaded;
        }
    };
    if head.is_empty() {
        loaded.problem(
            Severity::Error,
            at_book(),
            "an empty file",
            "a workbook (.xlsx, .xlsm, .xlsb, .xls, .ods) or a folder of CSV files",
            "the file has no bytes: save the book again from the spreadsheet program",
        );
        return loaded;
    }
    let extension = path
        .extension()
        .map(|e| e.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    let content = sniff(&head);
    let by_extension = match extension.as_str() {
        "xlsx" | "xlsm" | "xltx" | "xltm" | "xlam" => Some(Format::Xlsx),
        "xlsb" => Some(Format::Xlsb),
        "xls" | "xla" => Some(Format::Xls),
        "ods" => Some(Format::Ods),
        "csv" => {
            loaded.problem(
                Severity::Error,
                at_book(),
                &path.display().to_string(),
                "a workbook, or a folder of CSV files named after the sheets (accounts.csv, rates.csv...)",
                "put the CSV files in a folder and give the folder as the book",
            );
            return loaded;
        }
        _ => None,
    };
    let format = match (by_extension, content) {
        (Some(f), c) if f.content() == c => f,
        (Some(f), _) => {
            loaded.problem(
                Severity::Error,
                at_book(),
                &format!(
                    "a file named .{extension} that is not an {} workbook",
                    f.name()
                ),
                &format!("an {} workbook", f.name()),
                "save the book again from the spreadsheet program in the format its name says",
            );
            return loaded;
        }
        (None, Content::Zip) => zip_kind(path),
        (None, Content::Ole) => Format::Xls,
        (None, Content::Other) => {
            loaded.problem(
                Severity::Error,
                at_book(),
                &path.display().to_string(),
                "a workbook (.xlsx, .xlsm, .xlsb, .xls, .ods) or a folder of CSV files",
                "the file is not a workbook: give a workbook or a folder of CSV files",
            );
            return loaded;
        }
    };
    // calamine indexes into buffers of a malformed file in places; a panic
    // there must become a problem about the file, not end the run.
    let read = catch_unwind(AssertUnwindSafe(|| read_workbook(path, book, format)));
    match read {
        Ok(Ok(l)) => loaded = l,
        Ok(Err(message)) => {
            loaded.problem(
                Severity::Error,
                at_book(),
                &message,
                &format!("a complete {} workbook", format.name()),
                "the file is damaged or truncated: save the book again from the spreadsheet program",
            );
            return loaded;
        }
        Err(_) => {
            loaded.problem(
                Severity::Error,
                at_book(),
                "a workbook the reader could not take apart",
                &format!("a complete {} workbook", format.name()),
                "the file is damaged: save the book again from the spreadsheet program",
            );
            return loaded;
        }
    }
    check_required(book, &mut loaded, false);
    loaded
}

/// The first bytes of a file, for sniffing.
fn read_head(path: &Path) -> std::io::Result<Vec<u8>> {
    let mut head = Vec::with_capacity(8);
    File::open(path)?.take(8).read_to_end(&mut head)?;
    Ok(head)
}

/// Which zip-based format a file of unknown extension is: an ODS file names
/// its type first; an xlsb holds `xl/workbook.bin`; anything else is tried as xlsx.
fn zip_kind(path: &Path) -> Format {
    let Ok(bytes) = fs::read(path) else {
        return Format::Xlsx;
    };
    let has = |needle: &[u8]| bytes.windows(needle.len()).any(|w| w == needle);
    let start = bytes.get(..200).unwrap_or(&bytes);
    if start
        .windows(46)
        .any(|w| w == b"application/vnd.oasis.opendocument.spreadsheet")
    {
        Format::Ods
    } else if has(b"xl/workbook.bin") {
        Format::Xlsb
    } else {
        Format::Xlsx
    }
}

fn lower_first(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_lowercase().chain(c).collect(),
        None => String::new(),
    }
}

/// The cells of one sheet, as (row, column, cell), blank cells left out.
type Cells = Vec<(u32, u32, Cell)>;

/// Reads every sheet of a known kind; the `Err` is a message about the file.
fn read_workbook(path: &Path, book: &str, format: Format) -> Result<Loaded, String> {
    let mut loaded = Loaded::default();
    match format {
        Format::Xlsx => {
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
            let read_all = |wb: &mut Xlsx<BufReader<File>>,
                            sheets: Vec<(usize, (SheetKind, String))>| {
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
        }
        Format::Xlsb => {
            let mut wb: Xlsb<BufReader<File>> =
                open_workbook(path).map_err(|e: XlsbError| lower_first(&e.to_string()))?;
            let names = worksheet_names(wb.sheets_metadata());
            for (kind, name) in pick_sheets(book, &names, &mut loaded) {
                let cells = read_xlsb_sheet(&mut wb, &name);
                push_sheet(book, kind, name, cells, &mut loaded);
            }
        }
        Format::Xls => {
            let mut wb: Xls<BufReader<File>> =
                open_workbook(path).map_err(|e: XlsError| lower_first(&e.to_string()))?;
            let names = worksheet_names(wb.sheets_metadata());
            for (kind, name) in pick_sheets(book, &names, &mut loaded) {
                let cells = read_range(&mut wb, &name);
                push_sheet(book, kind, name, cells, &mut loaded);
            }
        }
        Format::Ods => {
            let mut wb: Ods<BufReader<File>> =
                open_workbook(path).map_err(|e: OdsError| lower_first(&e.to_string()))?;
            let names = worksheet_names(wb.sheets_metadata());
            for (kind, name) in pick_sheets(book, &names, &mut loaded) {
                let cells = read_range(&mut wb, &name);
                push_sheet(book, kind, name, cells, &mut loaded);
            }
        }
    }
    Ok(loaded)
}

/// Worksheet names in workbook order (chart and macro sheets left out).
fn worksheet_names(meta: &[calamine::Sheet]) -> Vec<String> {
    meta.iter()
        .filter(|s| s.typ == SheetType::WorkSheet)
        .map(|s| s.name.clone())
        .collect()
}

/// The sheets to read: one per known kind. Notes the sheets that are not
/// read; a second sheet of a kind is an error.
fn pick_sheets(book: &str, names: &[String], loaded: &mut Loaded) -> Vec<(SheetKind, String)> {
    let mut picked: Vec<(SheetKind, String)> = Vec::new();
    for name in names {
        let at = Position {
            book: book.to_string(),
            sheet: name.clone(),
            cell: String::new(),
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
fn unused_sheet(name: &str, at: Position, loaded: &mut Loaded) {
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
    loaded.problem(
        Severity::Note,
        at,
        name,
        "one of the sheets Accounts, Rates, Movements, Statements, Fixings, Holidays, Settings",
        &fix,
    );
}

/// Adds a sheet that was read.
fn push_sheet(
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
                },
                &e,
                "a value, not an error cell",
                "find the error cell in the sheet and correct its formula or type the value",
            ),
        }
    }
    Some(cells)
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

/// Errors for missing required sheets, naming a near miss when there is one.
fn check_required(book: &str, loaded: &mut Loaded, csv: bool) {
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
                sheet: kind.label().to_string(),
                cell: String::new(),
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

/// Reads a folder of CSV files. Each file named after a sheet becomes that
/// sheet; other CSV files are noted and other files ignored.
fn read_csv_folder(dir: &Path, book: &str, loaded: &mut Loaded) {
    let entries = match fs::read_dir(dir) {
        Ok(e) => e,
        Err(e) => {
            loaded.problem(
                Severity::Error,
                Position {
                    book: book.to_string(),
                    ..Position::default()
                },
                &dir.display().to_string(),
                "a readable folder of CSV files",
                &format!(
                    "check that the folder may be read ({})",
                    lower_first(&e.to_string())
                ),
            );
            return;
        }
    };
    let mut files: Vec<(String, std::path::PathBuf)> = entries
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.is_file())
        .filter(|p| p.extension().is_some_and(|x| x.eq_ignore_ascii_case("csv")))
        .filter_map(|p| Some((p.file_stem()?.to_string_lossy().into_owned(), p)))
        .collect();
    // Directory order differs between systems; name order keeps problems stable.
    files.sort();
    let mut picked: Vec<(SheetKind, String)> = Vec::new();
    for (stem, file) in files {
        let at = Position {
            book: book.to_string(),
            sheet: stem.clone(),
            cell: String::new(),
        };
        let Some(kind) = SheetKind::from_name(&stem) else {
            unused_sheet(&stem, at, loaded);
            continue;
        };
        if let Some((_, first)) = picked.iter().find(|(k, _)| *k == kind) {
            loaded.problem(
                Severity::Error,
                at,
                &format!("{stem}.csv"),
                &format!("one {} file", kind.label()),
                &format!(
                    "{first}.csv is already the {} sheet: merge the two or rename one",
                    kind.label()
                ),
            );
            continue;
        }
        picked.push((kind, stem.clone()));
        if let Some(text) = read_csv_file(&file, book, &stem, loaded) {
            loaded.sheets.push(Sheet {
                kind,
                name: stem,
                rows: Rows::Csv(text),
            });
        }
    }
}

/// The text of a CSV file: UTF-8 with or without a byte-order mark, or
/// UTF-16 with one. The `Err` is (found, fix).
fn decode_csv(bytes: &[u8]) -> Result<String, (String, String)> {
    const SAVE_UTF8: &str = "save the file as CSV UTF-8 (comma delimited)";
    if let Some(rest) = bytes.strip_prefix(&[0xEF, 0xBB, 0xBF]) {
        return utf8(rest).map_err(|f| (f, SAVE_UTF8.to_string()));
    }
    let utf16 = |rest: &[u8], little: bool| -> Result<String, (String, String)> {
        let chunks = rest.chunks_exact(2);
        if !chunks.remainder().is_empty() {
            return Err((
                "UTF-16 text with an odd number of bytes".to_string(),
                SAVE_UTF8.to_string(),
            ));
        }
        let units = chunks.map(|p| match p {
            [a, b] if little => u16::from_le_bytes([*a, *b]),
            [a, b] => u16::from_be_bytes([*a, *b]),
            _ => 0,
        });
        char::decode_utf16(units)
            .collect::<Result<String, _>>()
            .map_err(|_| {
                (
                    "UTF-16 text with a broken character".to_string(),
                    SAVE_UTF8.to_string(),
                )
            })
    };
    if let Some(rest) = bytes.strip_prefix(&[0xFF, 0xFE]) {
        return utf16(rest, true);
    }
    if let Some(rest) = bytes.strip_prefix(&[0xFE, 0xFF]) {
        return utf16(rest, false);
    }
    if bytes.contains(&0) {
        return Err((
            "text with NUL bytes (UTF-16 without a byte-order mark?)".to_string(),
            SAVE_UTF8.to_string(),
        ));
    }
    utf8(bytes).map_err(|f| (f, SAVE_UTF8.to_string()))
}

/// [`decode_csv`] on a file's bytes, without copying UTF-8 text. The `Err`
/// gives the bytes back with (found, fix).
fn decode_csv_owned(mut bytes: Vec<u8>) -> Result<String, (Vec<u8>, (String, String))> {
    const BOM: [u8; 3] = [0xEF, 0xBB, 0xBF];
    let plain = !bytes.starts_with(&[0xFF, 0xFE])
        && !bytes.starts_with(&[0xFE, 0xFF])
        && !bytes.contains(&0);
    if plain {
        let bom = bytes.starts_with(&BOM);
        if bom {
            bytes.drain(..BOM.len());
        }
        match String::from_utf8(bytes) {
            Ok(text) => return Ok(text),
            Err(e) => {
                bytes = e.into_bytes();
                if bom {
                    bytes.splice(0..0, BOM);
                }
            }
        }
    }
    match decode_csv(&bytes) {
        Ok(text) => Ok(text),
        Err(e) => Err((bytes, e)),
    }
}

fn utf8(bytes: &[u8]) -> Result<String, String> {
    utf8_at(bytes).map_err(|(_, found)| found)
}

/// UTF-8 text, or the line and a description of the first bad byte.
fn utf8_at(bytes: &[u8]) -> Result<String, (u64, String)> {
    match std::str::from_utf8(bytes) {
        Ok(s) => Ok(s.to_string()),
        Err(e) => {
            let at = e.valid_up_to();
            let line = bytes
                .get(..at)
                .map_or(0, |b| b.iter().filter(|&&c| c == b'\n').count())
                + 1;
            let byte = bytes.get(at).copied().unwrap_or(0);
            Err((
                u64::try_from(line).unwrap_or(0),
                format!("byte 0x{byte:02X} on line {line}, which is not UTF-8"),
            ))
        }
    }
}

/// Reads one CSV file and checks that it parses: its encoding, its quotes,
/// its separator. Gives the text, which is parsed again into rows when the
/// sheet is read.
fn read_csv_file(file: &Path, book: &str, stem: &str, loaded: &mut Loaded) -> Option<String> {
    let at = |cell: String| Position {
        book: book.to_string(),
        sheet: stem.to_string(),
        cell,
    };
    let bytes = match fs::read(file) {
        Ok(b) => b,
        Err(e) => {
            loaded.problem(
                Severity::Error,
                at(String::new()),
                &format!("{stem}.csv"),
                "a readable CSV file",
                &format!(
                    "check that the file may be read ({})",
                    lower_first(&e.to_string())
                ),
            );
            return None;
        }
    };
    let text = match decode_csv_owned(bytes) {
        Ok(t) => t,
        Err((bytes, (found, fix))) => {
            let line = utf8_at(bytes.strip_prefix(&[0xEF, 0xBB, 0xBF]).unwrap_or(&bytes))
                .err()
                .map_or(0, |(l, _)| l);
            loaded.problem(
                Severity::Error,
                at(line_ref(line)),
                &found,
                "UTF-8 text (with or without a byte-order mark) or UTF-16 with a byte-order mark",
                &fix,
            );
            return None;
        }
    };
    let mut rows = CsvRows::new(&text, false);
    while let Some(row) = rows.next_row() {
        if let Err(fault) = row {
            loaded.problem(
                Severity::Error,
                at(line_ref(fault.line)),
                &fault.found,
                fault.expected,
                &fault.fix,
            );
            return None;
        }
    }
    Some(text)
}

/// Why a CSV file cannot be read as rows.
#[derive(Debug)]
pub(crate) struct CsvFault {
    /// The 1-based line.
    line: u64,
    found: String,
    expected: &'static str,
    fix: String,
}

/// The records of a CSV file's text as rows, each with its number of
/// fields (the table checks them against the header). Blank records are
/// left out. A fault (a broken quote, a first line separated by something
/// other than commas) ends the rows.
pub(crate) struct CsvRows<'a> {
    reader: csv::Reader<&'a [u8]>,
    lines: LineCounter<'a>,
    record: csv::StringRecord,
    first: bool,
    done: bool,
    /// Whether to build the cells (a check of the file needs only the shape).
    cells: bool,
}

impl<'a> CsvRows<'a> {
    fn new(text: &'a str, cells: bool) -> Self {
        CsvRows {
            reader: csv::ReaderBuilder::new()
                .has_headers(false)
                .flexible(true)
                .from_reader(text.as_bytes()),
            lines: LineCounter::new(text.as_bytes()),
            record: csv::StringRecord::new(),
            first: true,
            done: false,
            cells,
        }
    }

    /// The next non-blank record, or the fault that ends the file.
    fn next_row(&mut self) -> Option<Result<Row, CsvFault>> {
        loop {
            if self.done {
                return None;
            }
            match self.reader.read_record(&mut self.record) {
                Ok(true) => {}
                Ok(false) => {
                    self.done = true;
                    return None;
                }
                Err(e) => {
                    self.done = true;
                    let line = e.position().map_or(0, |p| self.lines.line_at(p.byte()));
                    return Some(Err(CsvFault {
                        line,
                        found: lower_first(&e.to_string()),
                        expected: "comma-separated fields",
                        fix: "check the quotes on this line; the rest of the file is not read"
                            .to_string(),
                    }));
                }
            }
            let record = &self.record;
            let line = self
                .lines
                .line_at(record.position().map_or(0, csv::Position::byte));
            let index = u32::try_from(line.saturating_sub(1)).unwrap_or(u32::MAX);
            let filled = record
                .iter()
                .enumerate()
                .filter(|(_, f)| !f.trim().is_empty())
                .last()
                .map(|(i, _)| i + 1);
            let Some(filled) = filled else {
                continue;
            };
            if self.first {
                self.first = false;
                let sep = (record.len() == 1)
                    .then(|| {
                        record
                            .get(0)
                            .and_then(|f| [';', '\t', '|'].into_iter().find(|c| f.contains(*c)))
                    })
                    .flatten();
                if let Some(sep) = sep {
                    self.done = true;
                    return Some(Err(CsvFault {
                        line,
                        found: record.get(0).unwrap_or("").to_string(),
                        expected: "fields separated by commas",
                        fix: format!(
                            "the fields are separated by '{}': save the file as CSV with commas",
                            sep.escape_default()
                        ),
                    }));
                }
            }
            let shape = Some(Shape {
                fields: u32::try_from(record.len()).unwrap_or(u32::MAX),
                filled: u32::try_from(filled).unwrap_or(u32::MAX),
            });
            let cells = if self.cells {
                record
                    .iter()
                    .enumerate()
                    .filter_map(|(c, f)| {
                        let cell = Cell::text(f);
                        let c = u32::try_from(c).ok()?;
                        (!cell.is_empty()).then_some((c, cell))
                    })
                    .collect()
            } else {
                Vec::new()
            };
            return Some(Ok(Row {
                index,
                cells,
                shape,
            }));
        }
    }
}

/// The file line a CSV record starts on. The csv crate's own line numbers
/// drift on CRLF files and blank lines, and its byte offsets can point at
/// the line break before a record; so lines are counted here from the
/// offsets, skipping the breaks.
struct LineCounter<'a> {
    text: &'a [u8],
    pos: usize,
    line: u64,
}

impl<'a> LineCounter<'a> {
    fn new(text: &'a [u8]) -> Self {
        LineCounter {
            text,
            pos: 0,
            line: 1,
        }
    }

    /// The 1-based line of a record whose reported start is `byte` (offsets
    /// must not decrease between calls).
    fn line_at(&mut self, byte: u64) -> u64 {
        let mut start = usize::try_from(byte).unwrap_or(usize::MAX).max(self.pos);
        while matches!(self.text.get(start), Some(b'\r' | b'\n')) {
            start += 1;
        }
        let end = start.min(self.text.len());
        let skipped = self.text.get(self.pos..end).unwrap_or_default();
        self.line += u64::try_from(skipped.iter().filter(|&&b| b == b'\n').count()).unwrap_or(0);
        self.pos = end;
        self.line
    }
}

/// A 1-based line as an A1 row reference.
fn line_ref(line: u64) -> String {
    if line == 0 {
        String::new()
    } else {
        format!("{line}:{line}")
    }
}

/// A sheet of text cells, row by row from A1, for tests.
#[cfg(test)]
pub(crate) fn text_sheet(kind: SheetKind, rows: &[&[&str]]) -> Sheet {
    Sheet {
        kind,
        name: kind.label().to_string(),
        rows: Rows::Held(
            rows.iter()
                .zip(0u32..)
                .map(|(cells, r)| Row {
                    index: r,
                    cells: cells
                        .iter()
                        .zip(0u32..)
                        .map(|(s, c)| (c, Cell::text(s)))
                        .filter(|(_, c)| !c.is_empty())
                        .collect(),
                    shape: None,
                })
                .filter(|r| !r.cells.is_empty())
                .collect(),
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a1_names() {
        assert_eq!(a1(0, 0), "A1");
        assert_eq!(a1(6, 27), "AB7");
        assert_eq!(a1(1_048_575, 16_383), "XFD1048576");
        assert_eq!(a1_row(6), "7:7");
    }

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

    #[test]
    fn csv_text_in_utf8_utf8_with_bom_and_utf16_with_bom() {
        assert_eq!(decode_csv(b"a,b\n").unwrap(), "a,b\n");
        assert_eq!(decode_csv(b"\xEF\xBB\xBFa,b\n").unwrap(), "a,b\n");
        let le: Vec<u8> = [0xFF, 0xFE]
            .into_iter()
            .chain("a,é\n".encode_utf16().flat_map(u16::to_le_bytes))
            .collect();
        assert_eq!(decode_csv(&le).unwrap(), "a,é\n");
        let be: Vec<u8> = [0xFE, 0xFF]
            .into_iter()
            .chain("a,é\n".encode_utf16().flat_map(u16::to_be_bytes))
            .collect();
        assert_eq!(decode_csv(&be).unwrap(), "a,é\n");
    }

    #[test]
    fn csv_lines_are_counted_across_crlf_blank_lines_and_quoted_breaks() {
        let text = "a,b\r\nHM,1\r\n\r\n\"X\ny\",2\nZ,3\r\n";
        let mut reader = csv::ReaderBuilder::new()
            .has_headers(false)
            .flexible(true)
            .from_reader(text.as_bytes());
        let mut lines = LineCounter::new(text.as_bytes());
        let got: Vec<u64> = reader
            .records()
            .map(|r| lines.line_at(r.unwrap().position().unwrap().byte()))
            .collect();
        assert_eq!(got, vec![1, 2, 4, 6]);
    }

    #[test]
    fn csv_text_in_other_encodings_is_refused_with_a_fix() {
        let (found, fix) = decode_csv(b"account\nHM-SAV-001,Caf\xE9\n").unwrap_err();
        assert!(found.contains("line 2"), "{found}");
        assert!(fix.contains("UTF-8"));
        let no_bom: Vec<u8> = "a,b".encode_utf16().flat_map(u16::to_le_bytes).collect();
        assert!(decode_csv(&no_bom).unwrap_err().0.contains("UTF-16"));
        assert!(decode_csv(&[0xFF, 0xFE, 0x41])
            .unwrap_err()
            .0
            .contains("odd"));
    }
}
