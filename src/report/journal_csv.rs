//! The journal as plain CSV files: the import file of `--journal-csv` (the
//! Journal sheet's lines, in the layout a general-ledger upload takes) and
//! the Journal detail written beside the workbook (`--journal-detail csv`);
//! and that detail read back, for `ledgerate merge`.
//!
//! Layout only: one header row with the sheet's own labels, ISO dates,
//! amounts with a point and at least the currency's minor units, debit and
//! credit in separate columns (so no amount is ever negative), and a text
//! that a spreadsheet would take for a formula written with a leading
//! apostrophe ([`guarded`]). Each file goes to a temporary file beside the
//! target and is renamed into place when complete. This module never
//! computes, rounds or changes a figure, and never reads a file it did not
//! write.

use std::borrow::Cow;
use std::ffi::OsString;
use std::fs::File;
use std::io::BufReader;
use std::path::{Path, PathBuf};

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::error::ReportError;
use super::model::{DetailLine, InputFile, JournalDetail, JournalLine};
use super::output;
use super::readback::DetailRows;
use super::workbook::{JOURNAL_DETAIL_HEADER, JOURNAL_HEADER};
use crate::conventions::names::UnknownName;
use crate::problem::{Position, Problem, Severity};

/// Where a run puts the Journal detail.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum DetailOutput {
    /// A sheet of the workbook, "Journal detail", after Journal.
    #[default]
    Sheet,
    /// A CSV file beside the workbook ([`detail_csv_path`]), for runs too
    /// large for a sheet to be of use.
    Csv,
    /// Nowhere: the run keeps no detail.
    None,
}

impl DetailOutput {
    /// The canonical name.
    pub fn name(self) -> &'static str {
        match self {
            DetailOutput::Sheet => "sheet",
            DetailOutput::Csv => "csv",
            DetailOutput::None => "none",
        }
    }

    /// Parses `sheet`, `csv` or `none`.
    ///
    /// ```
    /// use ledgerate::report::journal_csv::DetailOutput;
    /// assert_eq!(DetailOutput::parse("CSV"), Ok(DetailOutput::Csv));
    /// assert!(DetailOutput::parse("file").is_err());
    /// ```
    ///
    /// # Errors
    /// The closest name, as an [`UnknownName`].
    pub fn parse(s: &str) -> Result<DetailOutput, UnknownName> {
        crate::conventions::names::lookup(
            "journal detail output",
            s,
            &[
                ("sheet", DetailOutput::Sheet),
                ("csv", DetailOutput::Csv),
                ("none", DetailOutput::None),
            ],
            &["sheet", "csv", "none"],
        )
    }
}

/// What the detail file's name adds to the workbook's name without its extension.
pub const DETAIL_FILE_SUFFIX: &str = ".journal-detail.csv";

/// The Journal detail file beside a workbook: the workbook's name without
/// its extension, then `.journal-detail.csv`.
///
/// ```
/// use ledgerate::report::journal_csv::detail_csv_path;
/// use std::path::Path;
/// assert_eq!(
///     detail_csv_path(Path::new("out/accruals-2026-11-30.xlsx")),
///     Path::new("out/accruals-2026-11-30.journal-detail.csv")
/// );
/// ```
pub fn detail_csv_path(workbook: &Path) -> PathBuf {
    let mut name: OsString = workbook
        .file_stem()
        .map(ToOwned::to_owned)
        .unwrap_or_default();
    name.push(DETAIL_FILE_SUFFIX);
    workbook.with_file_name(name)
}

/// Checks, before anything is written, that a CSV file can go to `target`:
/// its folder exists, and it is not a folder or anything but a file.
///
/// # Errors
/// [`ReportError::MissingDirectory`], [`ReportError::TargetIsDirectory`] or
/// [`ReportError::TargetNotFile`].
pub fn check_target(target: &Path) -> Result<(), ReportError> {
    output::target_dir(target).map(|_| ())
}

/// Characters that make a spreadsheet take a CSV cell for a formula when
/// they start it, and the apostrophe the guard itself puts in front (so that
/// a guarded cell reads back unambiguously).
const FORMULA_STARTS: [char; 7] = ['=', '+', '-', '@', '\t', '\r', '\''];

/// Whether a text needs [`guarded`].
pub fn needs_guard(text: &str) -> bool {
    text.starts_with(FORMULA_STARTS)
}

/// A text as a CSV cell: with a leading apostrophe when it starts with a
/// character that makes a spreadsheet take it for a formula (`=`, `+`, `-`,
/// `@`, a tab or a carriage return) or with an apostrophe itself; a
/// spreadsheet shows the cell as the text, and never runs it.
///
/// ```
/// use ledgerate::report::journal_csv::guarded;
/// assert_eq!(guarded("=SUM(A1:A9)"), "'=SUM(A1:A9)");
/// assert_eq!(guarded("-4100"), "'-4100");
/// assert_eq!(guarded("'quoted"), "''quoted");
/// assert_eq!(guarded("INTEREST-EXPENSE"), "INTEREST-EXPENSE");
/// ```
pub fn guarded(text: &str) -> Cow<'_, str> {
    if needs_guard(text) {
        Cow::Owned(format!("'{text}"))
    } else {
        Cow::Borrowed(text)
    }
}

/// A cell read back: the guard's apostrophe taken off.
fn unguarded(text: &str) -> &str {
    text.strip_prefix('\'').unwrap_or(text)
}

/// An amount as CSV text: a point, no thousands separator, at least the
/// currency's minor units; more places only when the amount itself has more
/// (a posted amount finer than the currency), never rounded.
///
/// ```
/// use ledgerate::report::journal_csv::amount_text;
/// use rust_decimal::Decimal;
/// assert_eq!(amount_text(Decimal::new(12345678, 2), 2), "123456.78");
/// assert_eq!(amount_text(Decimal::new(5, 0), 2), "5.00");
/// assert_eq!(amount_text(Decimal::new(30440, 1), 0), "3044");
/// assert_eq!(amount_text(Decimal::new(157019, 3), 3), "157.019");
/// assert_eq!(amount_text(Decimal::new(12345, 3), 2), "12.345");
/// ```
pub fn amount_text(amount: Decimal, minor_units: u32) -> String {
    let mut d = amount;
    if d.scale() > minor_units {
        d = d.normalize();
    }
    if d.scale() < minor_units {
        d.rescale(minor_units);
    }
    d.to_string()
}

/// An ISO date.
fn date_text(d: NaiveDate) -> String {
    d.format("%Y-%m-%d").to_string()
}

fn csv_error(path: &Path) -> impl Fn(csv::Error) -> ReportError + '_ {
    move |e| ReportError::Io {
        action: "write",
        path: path.to_path_buf(),
        source: std::io::Error::other(e.to_string()),
    }
}

/// Writes the journal lines as the import file: the Journal sheet's columns
/// (Date, Entity, Currency, GL account, Debit, Credit, Memo), one line a
/// row, through a temporary file renamed into place.
///
/// # Errors
/// The target's folder is missing, the target is a folder, something other
/// than a file, or one of `inputs`; or the file system's error.
pub fn write_journal_csv(
    lines: &[JournalLine],
    target: &Path,
    inputs: &[InputFile],
) -> Result<(), ReportError> {
    let dir = output::target_dir(target)?;
    output::check_not_input(target, inputs)?;
    output::write_atomically(target, &dir, "rename the finished CSV file to", |out| {
        let mut w = csv::Writer::from_writer(out);
        let e = csv_error(target);
        w.write_record(JOURNAL_HEADER).map_err(&e)?;
        for l in lines {
            w.write_record([
                date_text(l.date).as_str(),
                guarded(&l.entity).as_ref(),
                guarded(&l.currency).as_ref(),
                guarded(&l.gl_account).as_ref(),
                amount_text(l.debit, l.minor_units).as_str(),
                amount_text(l.credit, l.minor_units).as_str(),
                guarded(&l.memo).as_ref(),
            ])
            .map_err(&e)?;
        }
        w.flush().map_err(|source| ReportError::Io {
            action: "write",
            path: target.to_path_buf(),
            source,
        })
    })
}

/// Writes the Journal detail as a CSV file with the sheet's columns (Date,
/// Entity, Currency, GL account, Memo, Account, Debit, Credit), one row per
/// line and account, through a temporary file renamed into place.
///
/// # Errors
/// As [`write_journal_csv`].
pub fn write_detail_csv(
    detail: &JournalDetail,
    target: &Path,
    inputs: &[InputFile],
) -> Result<(), ReportError> {
    let dir = output::target_dir(target)?;
    output::check_not_input(target, inputs)?;
    // Each line's cells once: a line has many rows.
    let lines: Vec<[String; 5]> = detail
        .lines
        .iter()
        .map(|l| {
            [
                date_text(l.date),
                guarded(&l.entity).into_owned(),
                guarded(&l.currency).into_owned(),
                guarded(&l.gl_account).into_owned(),
                guarded(&l.memo).into_owned(),
            ]
        })
        .collect();
    output::write_atomically(target, &dir, "rename the finished CSV file to", |out| {
        let mut w = csv::Writer::from_writer(out);
        let e = csv_error(target);
        w.write_record(JOURNAL_DETAIL_HEADER).map_err(&e)?;
        for r in &detail.rows {
            let (Some(line), Some(cells)) = (
                detail.line(r),
                usize::try_from(r.line).ok().and_then(|i| lines.get(i)),
            ) else {
                return Err(ReportError::Internal(format!(
                    "a Journal detail row names line {} of {}",
                    r.line,
                    lines.len()
                )));
            };
            let (dr, cr) = r.sides(line.minor_units);
            for cell in cells {
                w.write_field(cell).map_err(&e)?;
            }
            w.write_field(guarded(detail.account(r)).as_ref())
                .map_err(&e)?;
            w.write_field(amount_text(dr, line.minor_units))
                .map_err(&e)?;
            w.write_field(amount_text(cr, line.minor_units))
                .map_err(&e)?;
            w.write_record(None::<&[u8]>).map_err(&e)?;
        }
        w.flush().map_err(|source| ReportError::Io {
            action: "write",
            path: target.to_path_buf(),
            source,
        })
    })
}

/// Reads back a Journal detail file that [`write_detail_csv`] wrote (a
/// shard's, for `ledgerate merge`).
///
/// # Errors
/// [`ReportError::Unreadable`] when the file cannot be opened or parsed as
/// CSV; [`ReportError::NotWrittenCsv`] for a header, row or cell the writer
/// would not have written.
pub fn read_detail_csv(path: &Path) -> Result<JournalDetail, ReportError> {
    let unreadable = |why: String| ReportError::Unreadable {
        path: path.to_path_buf(),
        why,
    };
    let file = File::open(path).map_err(|e| unreadable(e.to_string()))?;
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .from_reader(BufReader::with_capacity(1 << 20, file));
    let not_written = |row: u64, found: String, expected: String| ReportError::NotWrittenCsv {
        path: path.to_path_buf(),
        row,
        found,
        expected,
    };
    let mut rows = DetailRows::default();
    let mut record = csv::StringRecord::new();
    let mut row: u64 = 0;
    loop {
        match reader.read_record(&mut record) {
            Ok(true) => {}
            Ok(false) => break,
            Err(e) => return Err(unreadable(e.to_string())),
        }
        row += 1;
        if row == 1 {
            if record.iter().ne(JOURNAL_DETAIL_HEADER.iter().copied()) {
                return Err(not_written(
                    row,
                    record.iter().collect::<Vec<_>>().join(", "),
                    JOURNAL_DETAIL_HEADER.join(", "),
                ));
            }
            continue;
        }
        if record.len() != JOURNAL_DETAIL_HEADER.len() {
            return Err(not_written(
                row,
                format!("{} cells", record.len()),
                format!("{} cells, as the header", JOURNAL_DETAIL_HEADER.len()),
            ));
        }
        let cell = |i: usize| record.get(i).unwrap_or_default();
        let date = crate::book::cell::parse_iso_date(cell(0))
            .ok_or_else(|| not_written(row, format!("Date '{}'", cell(0)), "an ISO date".into()))?;
        let currency = unguarded(cell(2)).to_string();
        let minor_units = crate::conventions::currency::minor_units(&currency).unwrap_or(2);
        let amount = |i: usize| -> Result<Decimal, ReportError> {
            let label = JOURNAL_DETAIL_HEADER.get(i).copied().unwrap_or_default();
            cell(i)
                .parse::<Decimal>()
                .ok()
                .filter(|d| !d.is_sign_negative())
                .ok_or_else(|| {
                    not_written(
                        row,
                        format!("{label} '{}'", cell(i)),
                        "an amount with a point and no sign".into(),
                    )
                })
        };
        let (debit, credit) = (amount(6)?, amount(7)?);
        if debit.is_zero() == credit.is_zero() {
            return Err(not_written(
                row,
                format!("Debit '{}' and Credit '{}'", cell(6), cell(7)),
                "an amount in one of Debit and Credit, and zero in the other".into(),
            ));
        }
        let line = DetailLine {
            date,
            entity: unguarded(cell(1)).to_string(),
            currency,
            minor_units,
            gl_account: unguarded(cell(3)).to_string(),
            memo: unguarded(cell(4)).to_string(),
        };
        rows.push(line, unguarded(cell(5)), debit - credit)
            .ok_or_else(|| {
                not_written(
                    row,
                    "more than 4,294,967,295 accounts or lines".into(),
                    "a Journal detail a merge can count".into(),
                )
            })?;
    }
    if row == 0 {
        return Err(not_written(
            1,
            "an empty file".into(),
            JOURNAL_DETAIL_HEADER.join(", "),
        ));
    }
    Ok(rows.finish())
}

/// Cells of a CSV file that [`guarded`] changed: how many, and the first
/// (its row, 1 being the header, its column's label and its text).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Guarded {
    /// How many cells.
    pub count: usize,
    /// The first of them.
    pub first: Option<(u64, &'static str, String)>,
}

impl Guarded {
    fn saw(&mut self, row: usize, column: &'static str, text: &str) {
        if !needs_guard(text) {
            return;
        }
        self.count += 1;
        if self.first.is_none() {
            let row = u64::try_from(row).unwrap_or(u64::MAX).saturating_add(2);
            self.first = Some((row, column, text.to_string()));
        }
    }
}

/// The cells of the import file that are written guarded.
pub fn guarded_in_journal(lines: &[JournalLine]) -> Guarded {
    let mut g = Guarded::default();
    for (i, l) in lines.iter().enumerate() {
        g.saw(i, "Entity", &l.entity);
        g.saw(i, "Currency", &l.currency);
        g.saw(i, "GL account", &l.gl_account);
        g.saw(i, "Memo", &l.memo);
    }
    g
}

/// The cells of the detail file that are written guarded.
pub fn guarded_in_detail(detail: &JournalDetail) -> Guarded {
    let line_guarded: Vec<bool> = detail
        .lines
        .iter()
        .map(|l| {
            [&l.entity, &l.currency, &l.gl_account, &l.memo]
                .iter()
                .any(|t| needs_guard(t))
        })
        .collect();
    let mut g = Guarded::default();
    for (i, r) in detail.rows.iter().enumerate() {
        let flagged = usize::try_from(r.line)
            .ok()
            .and_then(|l| line_guarded.get(l))
            .copied()
            .unwrap_or(false);
        if flagged {
            if let Some(l) = detail.line(r) {
                g.saw(i, "Entity", &l.entity);
                g.saw(i, "Currency", &l.currency);
                g.saw(i, "GL account", &l.gl_account);
                g.saw(i, "Memo", &l.memo);
            }
        }
        g.saw(i, "Account", detail.account(r));
    }
    g
}

/// What the guard note expects (readback knows the note by it).
pub(crate) fn guard_expected() -> String {
    "a text that does not start with =, +, -, @, a tab, a carriage return or an apostrophe"
        .to_string()
}

/// The one warning that says which cells of a CSV file were written with
/// a leading apostrophe; `None` when there are none.
pub fn guard_note(file: &Path, guarded: &Guarded) -> Option<Problem> {
    let (row, column, text) = guarded.first.as_ref()?;
    let n = guarded.count;
    Some(Problem {
        severity: Severity::Warning,
        position: Position {
            book: file.display().to_string(),
            ..Position::default()
        },
        account: None,
        found: format!("{column} '{text}' on row {row}"),
        expected: guard_expected(),
        fix: format!(
            "{n} cell{} written with a leading apostrophe, so that a spreadsheet shows the \
             text and never runs it as a formula; an upload reads the apostrophe too, so change \
             the code or name in the book if the upload must take it as it is",
            if n == 1 { " is" } else { "s are" }
        ),
        follows: None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::model::{AccountIds, DetailRow};

    fn n(s: &str) -> Decimal {
        s.parse().unwrap()
    }

    /// Source: CWE-1236 (MITRE, "Improper Neutralization of Formula Elements
    /// in a CSV File"): a cell starting with =, +, - or @ is taken for a
    /// formula, and a leading apostrophe stops it. The tab and the carriage
    /// return: common practice, no source.
    #[test]
    fn formula_starts_get_an_apostrophe_and_read_back_whole() {
        for text in ["=1+2", "+1", "-1", "@SUM(A1)", "\tx", "\rx", "'x", "''x"] {
            let g = guarded(text);
            assert!(g.starts_with('\''), "{text:?}");
            assert_eq!(unguarded(&g), text);
        }
        for text in ["4100", "HM-SAV-001", "interest posted", " =x", ""] {
            assert_eq!(guarded(text), text);
            assert_eq!(unguarded(text), text);
        }
    }

    fn detail() -> JournalDetail {
        let mut accounts = AccountIds::default();
        let a = accounts.push("DEP-1").unwrap();
        let b = accounts.push("-DEP-2").unwrap();
        JournalDetail {
            lines: vec![DetailLine {
                date: "2026-11-30".parse().unwrap(),
                entity: "=HM".into(),
                currency: "KWD".into(),
                minor_units: 3,
                gl_account: "2300".into(),
                memo: "interest accrued 2026-11-01..2026-11-30".into(),
            }],
            accounts,
            rows: vec![
                DetailRow {
                    line: 0,
                    account: a,
                    amount: n("-157.019"),
                },
                DetailRow {
                    line: 0,
                    account: b,
                    amount: n("2.5"),
                },
            ],
        }
    }

    #[test]
    fn the_detail_file_reads_back_as_written() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("d.csv");
        let d = detail();
        write_detail_csv(&d, &path, &[]).unwrap();
        let text = std::fs::read_to_string(&path).unwrap();
        assert_eq!(
            text,
            "Date,Entity,Currency,GL account,Memo,Account,Debit,Credit\n\
             2026-11-30,'=HM,KWD,2300,interest accrued 2026-11-01..2026-11-30,DEP-1,0.000,157.019\n\
             2026-11-30,'=HM,KWD,2300,interest accrued 2026-11-01..2026-11-30,'-DEP-2,2.500,0.000\n"
        );
        let back = read_detail_csv(&path).unwrap();
        assert_eq!(back.lines, d.lines);
        let rows: Vec<(&str, Decimal)> = back
            .rows
            .iter()
            .map(|r| (back.account(r), r.amount))
            .collect();
        assert_eq!(rows, [("DEP-1", n("-157.019")), ("-DEP-2", n("2.500"))]);
        let g = guarded_in_detail(&d);
        assert_eq!(g.count, 3);
        assert_eq!(g.first, Some((2, "Entity", "=HM".to_string())));
        let note = guard_note(&path, &g).unwrap();
        assert!(note
            .fix
            .starts_with("3 cells are written with a leading apostrophe"));
    }

    #[test]
    fn a_detail_file_the_writer_did_not_write_is_refused_by_its_row() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("d.csv");
        let header = "Date,Entity,Currency,GL account,Memo,Account,Debit,Credit\n";
        for (body, found) in [
            ("", "an empty file"),
            ("Date,Entity\n", "Date, Entity"),
            (
                "2026-11-30,HM,USD,2300,m,A,1.00,1.00\n",
                "Debit '1.00' and Credit '1.00'",
            ),
            ("2026-11-30,HM,USD,2300,m,A,-1.00,0.00\n", "Debit '-1.00'"),
            (
                "30/11/2026,HM,USD,2300,m,A,1.00,0.00\n",
                "Date '30/11/2026'",
            ),
            ("2026-11-30,HM,USD\n", "3 cells"),
        ] {
            let text = if body.starts_with("Date") || body.is_empty() {
                body.to_string()
            } else {
                format!("{header}{body}")
            };
            std::fs::write(&path, text).unwrap();
            let e = read_detail_csv(&path).unwrap_err().to_string();
            assert!(e.contains(&format!("found {found}")), "{e}");
        }
    }
}
