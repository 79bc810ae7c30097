//! Writing an input book row by row: a workbook (one constant-memory sheet
//! per book sheet) or a folder of CSV files named after the sheets. The
//! sample books of `ledgerate sample` are written here.
//!
//! Layout only: the writer puts the cells it is given into the sheet it is
//! told, in order, and never computes or changes a figure. Numbers go into a
//! workbook through [`super::cells`] (exact, or text when a spreadsheet number
//! cannot hold them). A workbook goes to a temporary file beside the target
//! and is renamed into place when complete; each CSV file likewise. The same
//! rows always give the same bytes.

use std::fs::File;
use std::io::BufWriter;
use std::path::{Path, PathBuf};

use chrono::NaiveDate;
use rust_decimal::Decimal;
use rust_xlsxwriter::{ColNum, DocProperties, Format, RowNum, Workbook};

use super::cells::{Cells, TextFigures};
use super::error::ReportError;
use super::layout::{self, Styles, MAX_FORMAT_DECIMALS, SHEET_ROW_LIMIT};
use super::output;
use crate::schema::{Layout, SheetKind};

/// One cell of a row to write.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Value {
    /// Text.
    Text(String),
    /// An exact number, written with its own decimals.
    Number(Decimal),
    /// A date.
    Date(NaiveDate),
    /// Nothing.
    Empty,
}

impl Value {
    /// The value as CSV text: numbers with their decimals, dates in ISO form.
    ///
    /// ```
    /// use ledgerate::report::book_writer::Value;
    /// use rust_decimal::Decimal;
    /// assert_eq!(Value::Number(Decimal::new(12050, 2)).csv_text(), "120.50");
    /// assert_eq!(Value::Date("2026-11-30".parse().unwrap()).csv_text(), "2026-11-30");
    /// assert_eq!(Value::Empty.csv_text(), "");
    /// ```
    pub fn csv_text(&self) -> String {
        match self {
            Value::Text(s) => s.clone(),
            Value::Number(d) => d.to_string(),
            Value::Date(d) => d.format("%Y-%m-%d").to_string(),
            Value::Empty => String::new(),
        }
    }
}

/// How many data rows a workbook sheet holds under its header.
///
/// ```
/// assert_eq!(ledgerate::report::book_writer::DATA_ROWS_PER_SHEET, 1_048_575);
/// ```
pub const DATA_ROWS_PER_SHEET: u64 = SHEET_ROW_LIMIT as u64 - 1;

/// A book being written.
pub struct BookWriter {
    /// The sheets, in the order they were given (and are in the book).
    sheets: Vec<Layout>,
    inner: Inner,
}

enum Inner {
    Xlsx(Box<XlsxBook>),
    Csv(CsvBook),
}

struct XlsxBook {
    wb: Workbook,
    target: PathBuf,
    dir: PathBuf,
    styles: Styles,
    /// Number formats by decimals shown.
    numbers: Vec<Format>,
    texts: TextFigures,
    /// The next row of each sheet.
    next: Vec<RowNum>,
}

struct CsvBook {
    files: Vec<CsvFile>,
}

struct CsvFile {
    target: PathBuf,
    tmp: tempfile::NamedTempFile,
    writer: Option<csv::Writer<BufWriter<File>>>,
}

fn io(action: &'static str, path: &Path) -> impl FnOnce(std::io::Error) -> ReportError {
    let path = path.to_path_buf();
    move |source| ReportError::Io {
        action,
        path,
        source,
    }
}

fn csv_error(path: &Path) -> impl FnOnce(csv::Error) -> ReportError {
    let path = path.to_path_buf();
    move |e| ReportError::Io {
        action: "write",
        path,
        source: std::io::Error::other(e.to_string()),
    }
}

/// The file name of a sheet in a CSV book: its name in lower case, spaces
/// as `_`.
///
/// ```
/// use ledgerate::report::book_writer::csv_name;
/// assert_eq!(csv_name("Movements"), "movements.csv");
/// assert_eq!(csv_name("Trial balance"), "trial_balance.csv");
/// ```
pub fn csv_name(sheet: &str) -> String {
    format!("{}.csv", sheet.to_lowercase().replace(' ', "_"))
}

impl BookWriter {
    /// Starts a workbook at `target` with `sheets` (headers written, rows to
    /// follow), titled `title` and dated `created` in its properties.
    ///
    /// # Errors
    /// [`ReportError`] when the target's folder is missing or a sheet cannot be set up.
    ///
    /// ```no_run
    /// use ledgerate::schema::{Layout, SheetKind};
    /// use ledgerate::report::book_writer::{BookWriter, Value};
    /// let sheets = [Layout::every(SheetKind::Settings)];
    /// let mut w = BookWriter::xlsx(std::path::Path::new("book.xlsx"), &sheets, "A book", "2026-12-01".parse().unwrap())?;
    /// w.row(SheetKind::Settings, &[Value::Text("cutoff".into()), Value::Date("2026-11-30".parse().unwrap())])?;
    /// w.finish()?;
    /// # Ok::<(), ledgerate::report::ReportError>(())
    /// ```
    pub fn xlsx(
        target: &Path,
        sheets: &[Layout],
        title: &str,
        created: NaiveDate,
    ) -> Result<BookWriter, ReportError> {
        let dir = output::target_dir(target)?;
        let mut wb = Workbook::new();
        wb.set_tempdir(&dir).map_err(|e| ReportError::Save {
            path: target.to_path_buf(),
            source: e,
        })?;
        wb.set_zip_compression_level(layout::ZIP_LEVEL);
        let created = created
            .and_hms_opt(0, 0, 0)
            .ok_or_else(|| ReportError::Internal("book creation time".into()))?;
        wb.set_properties(
            &DocProperties::new()
                .set_title(title)
                .set_creation_datetime(&created),
        );
        let styles = Styles::new();
        let mut texts = TextFigures::default();
        for s in sheets {
            let (name, labels) = (s.name(), s.labels());
            let ws = wb
                .add_worksheet_with_constant_memory()
                .map_err(|e| ReportError::sheet(name, e))?;
            ws.set_name(name).map_err(|e| ReportError::sheet(name, e))?;
            ws.set_freeze_panes(1, 0)
                .map_err(|e| ReportError::sheet(name, e))?;
            for (col, label) in (0..).zip(labels.iter()) {
                let width = u16::try_from(label.len().max(10) + 4).unwrap_or(14);
                ws.set_column_width(col, width)
                    .map_err(|e| ReportError::sheet(name, e))?;
            }
            let mut cells = Cells::new(ws, name, &styles, &mut texts);
            cells.at(0).header(&labels, &[])?;
        }
        let numbers = (0..=MAX_FORMAT_DECIMALS)
            .map(|d| {
                let code = if d == 0 {
                    "#,##0".to_string()
                } else {
                    format!("#,##0.{}", "0".repeat(d as usize))
                };
                Format::new().set_num_format(code)
            })
            .collect();
        Ok(BookWriter {
            sheets: sheets.to_vec(),
            inner: Inner::Xlsx(Box::new(XlsxBook {
                wb,
                target: target.to_path_buf(),
                dir,
                styles,
                numbers,
                texts,
                next: vec![1; sheets.len()],
            })),
        })
    }

    /// Starts a CSV book in the folder `dir` (created when missing): one
    /// file per sheet, header first. Files of other names in the folder are
    /// left alone.
    ///
    /// # Errors
    /// [`ReportError::Io`] when the folder or a file cannot be made.
    pub fn csv(dir: &Path, sheets: &[Layout]) -> Result<BookWriter, ReportError> {
        std::fs::create_dir_all(dir).map_err(io("create the folder", dir))?;
        let mut files = Vec::new();
        for s in sheets {
            let target = dir.join(csv_name(s.name()));
            let mut builder = tempfile::Builder::new();
            builder.prefix(".ledgerate-").suffix(".partial");
            if let Some(p) = output::output_permissions(&target) {
                builder.permissions(p);
            }
            let tmp = builder
                .tempfile_in(dir)
                .map_err(io("create a temporary file in", dir))?;
            let file = tmp.reopen().map_err(io("open a temporary file in", dir))?;
            let mut writer = csv::Writer::from_writer(BufWriter::with_capacity(1 << 20, file));
            writer
                .write_record(s.labels())
                .map_err(csv_error(&target))?;
            files.push(CsvFile {
                target,
                tmp,
                writer: Some(writer),
            });
        }
        Ok(BookWriter {
            sheets: sheets.to_vec(),
            inner: Inner::Csv(CsvBook { files }),
        })
    }

    /// Adds one row to sheet `kind` (one of the sheets given at the start),
    /// after its previous rows, its values in the order of the sheet's
    /// columns.
    ///
    /// # Errors
    /// [`ReportError`] for a sheet not given at the start, a sheet past the
    /// row limit, or a write the writer refused.
    pub fn row(&mut self, kind: SheetKind, values: &[Value]) -> Result<(), ReportError> {
        let sheet = self
            .sheets
            .iter()
            .position(|s| s.sheet == kind)
            .ok_or_else(|| ReportError::Internal(format!("no {} sheet", kind.label())))?;
        match &mut self.inner {
            Inner::Xlsx(x) => x.row(sheet, kind.label(), values),
            Inner::Csv(c) => {
                let file = c
                    .files
                    .get_mut(sheet)
                    .ok_or_else(|| ReportError::Internal(format!("no sheet number {sheet}")))?;
                let target = file.target.clone();
                let writer = file
                    .writer
                    .as_mut()
                    .ok_or_else(|| ReportError::Internal("a finished CSV file".into()))?;
                writer
                    .write_record(values.iter().map(Value::csv_text))
                    .map_err(csv_error(&target))
            }
        }
    }

    /// Finishes the book: saves the workbook, or flushes every CSV file, and
    /// renames each into place.
    ///
    /// # Errors
    /// [`ReportError`] when saving, flushing or renaming fails (nothing
    /// partial is left under a target's name).
    pub fn finish(self) -> Result<(), ReportError> {
        match self.inner {
            Inner::Xlsx(mut x) => output::save_atomically(&mut x.wb, &x.target, &x.dir),
            Inner::Csv(c) => {
                for mut f in c.files {
                    if let Some(w) = f.writer.take() {
                        let buffered = w.into_inner().map_err(|e| ReportError::Io {
                            action: "write",
                            path: f.target.clone(),
                            source: std::io::Error::other(e.to_string()),
                        })?;
                        let file = buffered.into_inner().map_err(|e| ReportError::Io {
                            action: "write",
                            path: f.target.clone(),
                            source: std::io::Error::other(e.to_string()),
                        })?;
                        file.sync_all().map_err(io("flush", &f.target))?;
                    }
                    f.tmp
                        .persist(&f.target)
                        .map_err(|e| io("rename the finished file to", &f.target)(e.error))?;
                }
                Ok(())
            }
        }
    }
}

impl XlsxBook {
    fn row(&mut self, sheet: usize, name: &str, values: &[Value]) -> Result<(), ReportError> {
        let next = self
            .next
            .get_mut(sheet)
            .ok_or_else(|| ReportError::Internal(format!("no sheet number {sheet}")))?;
        let row = *next;
        if row >= SHEET_ROW_LIMIT {
            return Err(ReportError::Sheet {
                sheet: name.to_string(),
                row: Some(row.saturating_add(1)),
                source: rust_xlsxwriter::XlsxError::RowColumnLimitError,
            });
        }
        *next = row.saturating_add(1);
        let index =
            u16::try_from(sheet).map_err(|_| ReportError::Internal("sheet index".into()))?;
        let ws = self
            .wb
            .worksheet_from_index(usize::from(index))
            .map_err(|e| ReportError::sheet(name, e))?;
        let mut cells = Cells::new(ws, name, &self.styles, &mut self.texts);
        cells.at(row);
        for (col, v) in (0..).zip(values.iter()) {
            let col: ColNum = col;
            match v {
                Value::Text(s) => cells.text(col, s)?,
                Value::Number(d) => {
                    let shown = d.scale().min(MAX_FORMAT_DECIMALS);
                    let format = self
                        .numbers
                        .get(shown as usize)
                        .ok_or_else(|| ReportError::Internal("number format".into()))?;
                    cells.decimal_as(col, *d, format)?;
                }
                Value::Date(d) => cells.date(col, *d)?,
                Value::Empty => {}
            }
        }
        Ok(())
    }
}
