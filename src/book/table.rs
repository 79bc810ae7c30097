//! A sheet as a table: finding its header row, matching column names, and
//! reading each row's cells as typed fields with a problem per bad cell.
//!
//! Header names match case-insensitively with spaces, `_` and `-` ignored;
//! columns come in any order. The header must be the first non-blank row.
//! This module knows column names but not what a sheet means; it never
//! drops a bad cell silently (each one is a problem naming its cell).

use std::borrow::Cow;
use std::collections::HashMap;
use std::sync::Arc;

use chrono::NaiveDate;
use rust_decimal::Decimal;

use super::cell::{self, shown, Cell, Issue, NumberStyle};
use super::row::{Row, Shape};
use super::sheet::Sheet;
use crate::conventions::names::{fold, UnknownName};
use crate::problem::{
    a1, a1_row, column_letters, FollowOn, Position, Problem, RowPosition, Severity,
};
use crate::schema::Column;

/// What every sheet reader needs: the book's name for positions, and how
/// it writes numbers.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Ctx<'a> {
    /// The book as given.
    pub book: &'a str,
    /// Decimal point or comma.
    pub style: NumberStyle,
}

impl Ctx<'_> {
    /// A position in this book.
    pub(crate) fn at(&self, sheet: &str, cell: String) -> Position {
        Position {
            book: self.book.to_string(),
            sheet: sheet.to_string(),
            cell,
            ..Position::default()
        }
    }

    /// A problem in this book.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn problem(
        &self,
        severity: Severity,
        sheet: &str,
        cell: String,
        account: Option<&str>,
        found: &str,
        expected: &str,
        fix: &str,
    ) -> Problem {
        Problem {
            severity,
            position: self.at(sheet, cell),
            account: account.map(str::to_string),
            found: found.to_string(),
            expected: expected.to_string(),
            fix: fix.to_string(),
            follows: None,
        }
    }
}

/// Whether `found` is probably a misspelling of `wanted` (both folded): a
/// letter or two off, or one name holding the other.
pub(crate) fn near_miss(found: &str, wanted: &str) -> bool {
    if found.is_empty() || found == wanted {
        return false;
    }
    let n = wanted.chars().count();
    let allowed = match n {
        0..=3 => 0,
        4..=7 => 1,
        _ => 2,
    };
    strsim::damerau_levenshtein(found, wanted) <= allowed
        || (found.chars().count() >= 4 && (found.contains(wanted) || wanted.contains(found)))
}

/// The longest header list shown in a message.
const SHOWN_HEADER_CHARS: usize = 200;

/// A sheet whose header row was matched to the columns asked for.
#[derive(Debug)]
pub(crate) struct Table<'s> {
    /// The sheet.
    pub sheet: &'s Sheet,
    columns: &'static [Column],
    header_row: u32,
    /// The sheet column of each asked-for column, when present.
    at: Vec<Option<u32>>,
    /// The asked-for column of each sheet column that has one.
    by_col: HashMap<u32, usize>,
    /// Rows left out (a ragged CSV record), by row index.
    skipped: Vec<u32>,
    /// The accounts those rows name, when their account field could be read.
    skipped_accounts: Vec<String>,
}

/// One data row, its cells in the order of the columns asked for.
#[derive(Debug)]
pub(crate) struct Record<'s> {
    /// 0-based row index.
    pub row: u32,
    cells: Vec<Option<Cow<'s, Cell>>>,
}

impl Record<'_> {
    /// The cell of column `i`, if present and not blank.
    pub(crate) fn get(&self, i: usize) -> Option<&Cell> {
        self.cells.get(i)?.as_deref()
    }
}

/// The text a header cell stands for, folded.
fn header_key(cell: &Cell) -> String {
    match cell {
        Cell::Text(s) => fold(s),
        other => fold(&other.shown()),
    }
}

/// Whether the row holds at least `n` of the wanted names.
fn names_in(row: &Row, wanted: &[String]) -> usize {
    row.cells
        .iter()
        .filter(|(_, c)| wanted.contains(&header_key(c)))
        .count()
}

fn joined(names: &[String]) -> String {
    let all = names.join(", ");
    if all.chars().count() <= SHOWN_HEADER_CHARS {
        all
    } else {
        let mut s: String = all.chars().take(SHOWN_HEADER_CHARS).collect();
        s.push('…');
        s
    }
}

/// What matching a sheet's header needs: the book, the sheet, and the
/// columns asked for with their names.
struct Matching<'a, 'b> {
    ctx: &'a Ctx<'b>,
    sheet: &'a Sheet,
    columns: &'static [Column],
    /// Every column's name, folded, in the order asked for.
    known: Vec<String>,
    /// Every column's name as written.
    all_names: Vec<String>,
    /// The required columns' names as written.
    required_names: Vec<String>,
}

/// A header row matched to the columns asked for.
struct Header {
    /// The sheet column of each asked-for column, when present.
    at: Vec<Option<u32>>,
    /// The asked-for column of each sheet column that has one.
    by_col: HashMap<u32, usize>,
    /// Header cells that name no column asked for, with their text.
    unknown: Vec<(u32, String)>,
    /// Whether no column is given twice.
    once: bool,
}

impl<'a, 'b> Matching<'a, 'b> {
    fn new(ctx: &'a Ctx<'b>, sheet: &'a Sheet, columns: &'static [Column]) -> Self {
        Matching {
            ctx,
            sheet,
            columns,
            known: columns.iter().map(|c| fold(c.name)).collect(),
            all_names: columns.iter().map(|c| c.name.to_string()).collect(),
            required_names: columns
                .iter()
                .filter(|c| c.required)
                .map(|c| c.name.to_string())
                .collect(),
        }
    }

    /// The name of column `i`.
    fn name(&self, i: usize) -> &'static str {
        self.columns.get(i).map_or("", |c| c.name)
    }

    /// An error about the sheet's header.
    fn error(&self, cell: String, found: &str, expected: &str, fix: &str) -> Problem {
        self.ctx.problem(
            Severity::Error,
            &self.sheet.name,
            cell,
            None,
            found,
            expected,
            fix,
        )
    }

    /// The error for a sheet with no rows.
    fn empty(&self) -> Problem {
        self.error(
            String::new(),
            "an empty sheet",
            &format!(
                "a header row naming the columns ({})",
                joined(&self.required_names)
            ),
            "add a header row and the data below it, or remove the sheet",
        )
    }

    /// The error for a first row that names no column: the header is in a
    /// later row, or in none.
    fn header_not_first(&self, first: &Row, first_text: &[String]) -> Problem {
        let later = self
            .sheet
            .rows()
            .skip(1)
            .find(|r| names_in(r, &self.known) >= self.required_names.len().clamp(1, 2));
        match later {
            Some(h) => self.error(
                a1_row(first.index),
                &joined(first_text),
                &format!(
                    "the header row as the first non-blank row (row {})",
                    u64::from(first.index) + 1
                ),
                &format!(
                    "the header is in row {}: delete the rows above it",
                    u64::from(h.index) + 1
                ),
            ),
            None => self.error(
                a1_row(first.index),
                &joined(first_text),
                &format!(
                    "a header row naming the columns ({})",
                    joined(&self.required_names)
                ),
                "put the column names in the first row of the sheet",
            ),
        }
    }

    /// Matches each header cell to a column asked for; a column given
    /// twice is an error on the second.
    fn match_header(&self, first: &Row, problems: &mut Vec<Problem>) -> Header {
        let mut header = Header {
            at: vec![None; self.columns.len()],
            by_col: HashMap::new(),
            unknown: Vec::new(),
            once: true,
        };
        for (col, cell) in &first.cells {
            let key = header_key(cell);
            let Some(i) = self.known.iter().position(|k| *k == key) else {
                header.unknown.push((*col, cell.shown()));
                continue;
            };
            match header.at.get(i).copied().flatten() {
                Some(earlier) => {
                    header.once = false;
                    problems.push(self.error(
                        a1(first.index, *col),
                        &cell.shown(),
                        &format!(
                            "each column once ({} is column {})",
                            self.name(i),
                            column_letters(earlier)
                        ),
                        &format!(
                            "remove or rename one of the two {} columns ({} and {})",
                            self.name(i),
                            a1(first.index, earlier),
                            a1(first.index, *col)
                        ),
                    ));
                }
                None => {
                    if let Some(slot) = header.at.get_mut(i) {
                        *slot = Some(*col);
                    }
                    header.by_col.insert(*col, i);
                }
            }
        }
        header
    }

    /// An error for each absent required column and a warning for an
    /// absent optional one whose name an unknown header nearly is. Gives
    /// the sheet columns of the unknown headers those problems name.
    fn absent_columns(
        &self,
        header: &Header,
        first: &Row,
        first_text: &[String],
        problems: &mut Vec<Problem>,
    ) -> Vec<u32> {
        let near_of = |i: usize| -> Option<&(u32, String)> {
            let wanted = self.known.get(i)?;
            header
                .unknown
                .iter()
                .filter(|(_, h)| near_miss(&fold(h), wanted))
                .min_by_key(|(_, h)| strsim::damerau_levenshtein(&fold(h), wanted))
        };
        let mut explained: Vec<u32> = Vec::new();
        let absent = header
            .at
            .iter()
            .zip(self.columns)
            .enumerate()
            .filter(|(_, (at, _))| at.is_none());
        for (i, (_, column)) in absent {
            let near = near_of(i);
            if column.required {
                let fix = match near {
                    Some((c, h)) => {
                        explained.push(*c);
                        format!(
                            "did you mean '{}' ({})? rename that header to {}",
                            h,
                            a1(first.index, *c),
                            column.name
                        )
                    }
                    None => format!("add a column named {} to the header row", column.name),
                };
                problems.push(self.error(
                    a1_row(first.index),
                    &joined(first_text),
                    &format!(
                        "a column named {} (required: {})",
                        column.name,
                        joined(&self.required_names)
                    ),
                    &fix,
                ));
            } else if let Some((c, h)) = near {
                explained.push(*c);
                problems.push(self.ctx.problem(
                    Severity::Warning,
                    &self.sheet.name,
                    a1(first.index, *c),
                    None,
                    h,
                    &format!("a column named {}", column.name),
                    &format!("did you mean {}? rename the header if so; as it is, the column is kept out", column.name),
                ));
            }
        }
        explained
    }

    /// One note for the unknown headers no other problem names.
    fn unknown_columns(
        &self,
        header: &Header,
        explained: &[u32],
        header_row: u32,
        problems: &mut Vec<Problem>,
    ) {
        let rest: Vec<String> = header
            .unknown
            .iter()
            .filter(|(c, _)| !explained.contains(c))
            .map(|(_, h)| h.clone())
            .collect();
        if !rest.is_empty() {
            problems.push(self.ctx.problem(
                Severity::Note,
                &self.sheet.name,
                a1_row(header_row),
                None,
                &joined(&rest),
                &format!("the columns of the {} sheet ({})", self.sheet.name, joined(&self.all_names)),
                "these columns are kept out of the computation; nothing to do unless one should be a listed column",
            ));
        }
    }
}

impl<'s> Table<'s> {
    /// Finds the header row of `sheet` and matches it to `columns`. `None`
    /// (with error problems) when the sheet cannot be read as a table: no
    /// header, a required column missing, or a column given twice.
    pub(crate) fn open(
        ctx: &Ctx<'_>,
        sheet: &'s Sheet,
        columns: &'static [Column],
        problems: &mut Vec<Problem>,
    ) -> Option<Table<'s>> {
        let matching = Matching::new(ctx, sheet, columns);
        let Some(first) = sheet.rows().next() else {
            problems.push(matching.empty());
            return None;
        };
        let first_text: Vec<String> = first.cells.iter().map(|(_, c)| c.shown()).collect();
        if names_in(&first, &matching.known) == 0 {
            problems.push(matching.header_not_first(&first, &first_text));
            return None;
        }
        let header = matching.match_header(&first, problems);
        let explained = matching.absent_columns(&header, &first, &first_text, problems);
        matching.unknown_columns(&header, &explained, first.index, problems);
        let required_present = header
            .at
            .iter()
            .zip(columns)
            .all(|(at, c)| at.is_some() || !c.required);
        if !header.once || !required_present {
            return None;
        }
        let account_col = match columns.first() {
            Some(c) if c.name == "account" => header.at.first().copied().flatten(),
            _ => None,
        };
        let (skipped, skipped_accounts) =
            check_data_rows(ctx, sheet, &first, account_col, problems);
        Some(Table {
            sheet,
            columns,
            header_row: first.index,
            at: header.at,
            by_col: header.by_col,
            skipped,
            skipped_accounts,
        })
    }

    /// The accounts named by rows that were left out as ragged: a movement
    /// or statement row of theirs is missing, so they cannot be computed.
    pub(crate) fn skipped_accounts(&self) -> &[String] {
        &self.skipped_accounts
    }

    /// Whether column `i` is in the sheet.
    pub(crate) fn has(&self, i: usize) -> bool {
        self.at.get(i).copied().flatten().is_some()
    }

    /// The A1 name of column `i`'s header cell.
    pub(crate) fn header_cell(&self, i: usize) -> String {
        match self.at.get(i).copied().flatten() {
            Some(c) => a1(self.header_row, c),
            None => a1_row(self.header_row),
        }
    }

    /// The A1 name of the header row.
    pub(crate) fn header_row_ref(&self) -> String {
        a1_row(self.header_row)
    }

    /// The name of column `i`.
    pub(crate) fn name(&self, i: usize) -> &'static str {
        self.columns.get(i).map_or("", |c| c.name)
    }

    /// Where column `i` is (0-based), when the sheet has it.
    pub(crate) fn col(&self, i: usize) -> Option<u32> {
        self.at.get(i).copied().flatten()
    }

    /// The position of column `i` with no cell: what the compact positions
    /// of its rows share (see [`Fields::row_position`]).
    pub(crate) fn column_position(&self, ctx: &Ctx<'_>, i: usize) -> Arc<Position> {
        Arc::new(Position {
            column: self.name(i).to_string(),
            ..ctx.at(&self.sheet.name, String::new())
        })
    }

    /// The data rows below the header, blank rows (and rows with values
    /// only in unknown columns) skipped.
    pub(crate) fn records(&self) -> impl Iterator<Item = Record<'s>> + '_ {
        self.sheet
            .rows()
            .filter(|r| r.index > self.header_row && self.skipped.binary_search(&r.index).is_err())
            .filter_map(|r| {
                let mut cells: Vec<Option<Cow<'s, Cell>>> = vec![None; self.columns.len()];
                let mut any = false;
                let index = r.index;
                let mut put = |c: u32, cell: Cow<'s, Cell>| {
                    if let Some(slot) = self.by_col.get(&c).and_then(|i| cells.get_mut(*i)) {
                        *slot = Some(cell);
                        any = true;
                    }
                };
                match r {
                    Cow::Borrowed(row) => {
                        for (c, cell) in &row.cells {
                            put(*c, Cow::Borrowed(cell));
                        }
                    }
                    Cow::Owned(row) => {
                        for (c, cell) in row.cells {
                            put(c, Cow::Owned(cell));
                        }
                    }
                }
                any.then_some(Record { row: index, cells })
            })
    }

    /// The cell reference of column `i` in `row`; the whole row when the
    /// column is not in the sheet.
    pub(crate) fn cell_ref(&self, row: u32, i: usize) -> String {
        match self.at.get(i).copied().flatten() {
            Some(c) => a1(row, c),
            None => a1_row(row),
        }
    }
}

/// One pass over the data rows below the header `first`: ragged CSV
/// records (each an error, left out), then the first value under no header
/// at all (a note). Gives the rows left out and the accounts they name.
fn check_data_rows(
    ctx: &Ctx<'_>,
    sheet: &Sheet,
    first: &Row,
    account_col: Option<u32>,
    problems: &mut Vec<Problem>,
) -> (Vec<u32>, Vec<String>) {
    let headed: Vec<u32> = first.cells.iter().map(|(c, _)| *c).collect();
    let mut skipped = Vec::new();
    let mut skipped_accounts = Vec::new();
    let mut unheaded: Option<(u32, u32)> = None;
    let suspects = shape_suspects(sheet, first, &headed);
    let none_suspect = suspects.as_ref().is_some_and(Vec::is_empty);
    let rows = sheet
        .rows()
        .skip(1)
        .take_while(|_| !none_suspect)
        .filter(|r| r.index > first.index)
        .filter(|r| {
            suspects
                .as_ref()
                .is_none_or(|s| s.binary_search(&r.index).is_ok())
        });
    for row in rows {
        if let Some(head) = first.shape {
            if let Some(account) = ragged(ctx, sheet, head, account_col, &row, problems) {
                skipped.push(row.index);
                skipped_accounts.extend(account);
                continue;
            }
        }
        if unheaded.is_none() {
            unheaded = row
                .cells
                .iter()
                .find(|(c, _)| !headed.contains(c))
                .map(|(c, _)| (row.index, *c));
        }
    }
    if let Some((r, c)) = unheaded {
        problems.push(ctx.problem(
            Severity::Note,
            &sheet.name,
            a1(r, c),
            None,
            "values in a column without a header",
            "a header name above every column that holds values",
            "those values are kept out; give the column a header if it should be read",
        ));
    }
    (skipped, skipped_accounts)
}

/// The record-shape shortcut for a CSV sheet whose header `first` names
/// columns A, B, C... without a gap (`headed`): a record is ragged, or
/// holds a value under no header, only when its shape says so, so only the
/// records whose shapes say so (none in a good book) need reading as
/// cells. Gives their row indexes, in order; `None` when the shortcut does
/// not apply (a workbook sheet, or a header with a gap) and every data row
/// must be read.
fn shape_suspects(sheet: &Sheet, first: &Row, headed: &[u32]) -> Option<Vec<u32>> {
    let width = u32::try_from(headed.len()).unwrap_or(u32::MAX);
    let gapless = headed
        .iter()
        .enumerate()
        .all(|(i, c)| usize::try_from(*c).is_ok_and(|c| c == i));
    match (first.shape, sheet.shapes()) {
        (Some(head), Some(shapes)) if gapless => Some(
            shapes
                .filter(|r| r.index > first.index)
                .filter(|r| {
                    r.shape.is_some_and(|s| {
                        s.fields < head.filled || s.filled > head.fields || s.filled > width
                    })
                })
                .map(|r| r.index)
                .collect(),
        ),
        _ => None,
    }
}

/// A CSV record with fewer fields than the header names, or values beyond
/// its last field: an error naming the file and row, and the row is left
/// out (its values cannot be put in their columns with certainty). `Some`
/// (with the account it names, when its account field can be read) when
/// the row is ragged.
fn ragged(
    ctx: &Ctx<'_>,
    sheet: &Sheet,
    head: Shape,
    account_col: Option<u32>,
    row: &Row,
    problems: &mut Vec<Problem>,
) -> Option<Option<String>> {
    let shape = row.shape?;
    if shape.fields >= head.filled && shape.filled <= head.fields {
        return None;
    }
    let account = account_col
        .and_then(|c| row.cells.iter().find(|(col, _)| *col == c))
        .and_then(|(_, cell)| cell::text(cell).ok().flatten());
    problems.push(ctx.problem(
        Severity::Error,
        &sheet.name,
        a1_row(row.index),
        account.as_deref(),
        &format!("{} fields", shape.fields),
        &format!("{} fields, as in the header row", head.fields),
        "give the row one field per header column (quote a field that holds a comma); the row is not read",
    ));
    Some(account)
}

/// Reading one record's fields, collecting a problem for each bad cell.
/// Every problem names the record's account once it is known.
pub(crate) struct Fields<'t, 's, 'p> {
    ctx: Ctx<'t>,
    table: &'t Table<'s>,
    rec: &'t Record<'s>,
    problems: &'p mut Vec<Problem>,
    /// The account the row belongs to, for the problems' `account`.
    pub account: Option<String>,
    /// Whether an error was found in the row.
    pub failed: bool,
    /// What the row's values are named by in messages, when not the
    /// column's name (a setting's value is named by the setting).
    pub subject: Option<&'static str>,
}

impl<'t, 's, 'p> Fields<'t, 's, 'p> {
    /// Starts reading `rec`.
    pub(crate) fn new(
        ctx: Ctx<'t>,
        table: &'t Table<'s>,
        rec: &'t Record<'s>,
        problems: &'p mut Vec<Problem>,
    ) -> Self {
        Fields {
            ctx,
            table,
            rec,
            problems,
            account: None,
            failed: false,
            subject: None,
        }
    }

    /// The cell reference of column `i` in this row.
    pub(crate) fn cell_ref(&self, i: usize) -> String {
        self.table.cell_ref(self.rec.row, i)
    }

    /// The position of column `i` in this row.
    pub(crate) fn position(&self, i: usize) -> Position {
        Position {
            column: self.table.name(i).to_string(),
            ..self.ctx.at(&self.table.sheet.name, self.cell_ref(i))
        }
    }

    /// The compact position of column `i` in this row; `sheet` is
    /// [`Table::column_position`] of `i`, made once for every row.
    pub(crate) fn row_position(&self, i: usize, sheet: &Arc<Position>) -> RowPosition {
        RowPosition::new(Arc::clone(sheet), self.rec.row, self.table.col(i))
    }

    /// The raw cell of column `i`.
    pub(crate) fn raw(&self, i: usize) -> Option<&Cell> {
        self.rec.get(i)
    }

    /// Whether column `i` has a value in this row.
    pub(crate) fn given(&self, i: usize) -> bool {
        self.rec.get(i).is_some()
    }

    /// Records a problem at column `i` of this row.
    pub(crate) fn report(
        &mut self,
        severity: Severity,
        i: usize,
        found: &str,
        expected: &str,
        fix: &str,
    ) {
        if severity == Severity::Error {
            self.failed = true;
        }
        let p = self.ctx.problem(
            severity,
            &self.table.sheet.name,
            self.cell_ref(i),
            self.account.as_deref(),
            found,
            expected,
            fix,
        );
        let column = self.table.name(i).to_string();
        self.problems.push(Problem {
            position: Position {
                column,
                ..p.position
            },
            ..p
        });
    }

    /// Marks the problem just reported as following from another problem
    /// of this book, built from the book's name.
    pub(crate) fn follows(&mut self, cause: impl FnOnce(&str) -> FollowOn) {
        let follow_on = cause(self.ctx.book);
        if let Some(p) = self.problems.last_mut() {
            p.follows = Some(follow_on);
        }
    }

    fn issue(&mut self, i: usize, issue: Issue) {
        let name = self.subject.unwrap_or_else(|| self.table.name(i));
        let expected = format!("{name} as {}", issue.expected);
        self.report(Severity::Error, i, &issue.found, &expected, &issue.fix);
    }

    fn missing(&mut self, i: usize) {
        let name = self.table.name(i);
        self.report(
            Severity::Error,
            i,
            "",
            &format!("a value in {name}"),
            &format!("fill in {name}; it is required"),
        );
    }

    fn take<T>(
        &mut self,
        i: usize,
        convert: impl FnOnce(&Cell) -> Result<Option<T>, Issue>,
    ) -> Option<T> {
        let cell = self.rec.get(i)?;
        match convert(cell) {
            Ok(v) => v,
            Err(issue) => {
                self.issue(i, issue);
                None
            }
        }
    }

    fn need<T>(&mut self, i: usize, v: Option<T>) -> Option<T> {
        if v.is_none() && !self.given(i) {
            self.missing(i);
        }
        v
    }

    /// A required convention name.
    pub(crate) fn required_named<T>(
        &mut self,
        i: usize,
        parse: impl FnOnce(&str) -> Result<T, UnknownName>,
    ) -> Option<T> {
        let v = self.named(i, parse);
        self.need(i, v)
    }

    /// Optional text.
    pub(crate) fn text(&mut self, i: usize) -> Option<String> {
        self.take(i, cell::text)
    }

    /// Required text.
    pub(crate) fn required_text(&mut self, i: usize) -> Option<String> {
        let v = self.text(i);
        self.need(i, v)
    }

    /// An optional exact decimal.
    pub(crate) fn decimal(&mut self, i: usize) -> Option<Decimal> {
        let style = self.ctx.style;
        self.take(i, |c| cell::decimal(c, style))
    }

    /// A required exact decimal.
    pub(crate) fn required_decimal(&mut self, i: usize) -> Option<Decimal> {
        let v = self.decimal(i);
        self.need(i, v)
    }

    /// An optional date.
    pub(crate) fn date(&mut self, i: usize) -> Option<NaiveDate> {
        self.take(i, cell::date)
    }

    /// A required date.
    pub(crate) fn required_date(&mut self, i: usize) -> Option<NaiveDate> {
        let v = self.date(i);
        self.need(i, v)
    }

    /// Optional yes/no.
    pub(crate) fn yes_no(&mut self, i: usize) -> Option<bool> {
        self.take(i, cell::yes_no)
    }

    /// An optional whole number in `min..=max`.
    pub(crate) fn whole(&mut self, i: usize, min: u32, max: u32) -> Option<u32> {
        let style = self.ctx.style;
        self.take(i, |c| cell::whole(c, style, min, max))
    }

    /// An optional convention name, parsed by `parse`; an unknown name is an
    /// error that suggests the closest valid one.
    pub(crate) fn named<T>(
        &mut self,
        i: usize,
        parse: impl FnOnce(&str) -> Result<T, UnknownName>,
    ) -> Option<T> {
        let text = self.text(i)?;
        match parse(&text) {
            Ok(v) => Some(v),
            Err(e) => {
                let fix = match e.suggestion {
                    Some(s) => format!("did you mean '{s}'? write one of the accepted names"),
                    None => "write one of the accepted names".to_string(),
                };
                let expected = format!("a {} ({})", e.kind, e.accepted.join(", "));
                self.report(Severity::Error, i, &shown(&text), &expected, &fix);
                None
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::book::sheet::Rows;
    use crate::schema::SheetKind;
    use crate::schema::{Example, IfBlank, Kind};

    const fn col(name: &'static str, required: bool) -> Column {
        Column {
            name,
            required,
            kind: Kind::Text,
            if_blank: IfBlank::Nothing,
            note: "",
            example: Example::Blank,
        }
    }

    const COLUMNS: &[Column] = &[
        col("account", true),
        col("open_date", true),
        col("maturity", false),
        col("name", false),
    ];

    fn sheet(rows: &[(u32, &[(u32, &str)])]) -> Sheet {
        Sheet {
            kind: SheetKind::Accounts,
            name: "Accounts".into(),
            rows: Rows::Held(
                rows.iter()
                    .map(|(r, cells)| Row {
                        index: *r,
                        cells: cells.iter().map(|(c, s)| (*c, Cell::text(s))).collect(),
                        shape: None,
                    })
                    .collect(),
            ),
        }
    }

    fn ctx() -> Ctx<'static> {
        Ctx {
            book: "book.xlsx",
            style: NumberStyle {
                decimal_comma: false,
            },
        }
    }

    /// A CSV text as a sheet both ways: parsed a record at a time, and held
    /// as rows of cells with the same shapes.
    fn csv_both_ways(text: &str) -> [Sheet; 2] {
        let csv = Sheet {
            kind: SheetKind::Accounts,
            name: "accounts".into(),
            rows: Rows::Csv(text.to_string()),
        };
        let held = Sheet {
            rows: Rows::Held(csv.rows().map(std::borrow::Cow::into_owned).collect()),
            ..csv.clone()
        };
        [csv, held]
    }

    fn opened(s: &Sheet) -> Vec<(Severity, String, String)> {
        let mut problems = Vec::new();
        Table::open(&ctx(), s, COLUMNS, &mut problems);
        problems
            .into_iter()
            .map(|p| (p.severity, p.position.cell, p.found))
            .collect()
    }

    /// The CSV pass that looks only at record shapes finds what the pass over
    /// every cell finds: values under no header (after a trailing blank
    /// header, or in a gap of the header) and ragged records.
    #[test]
    fn csv_shapes_find_what_the_cells_find() {
        let texts = [
            // Two blank header fields at the end; a value under the second one.
            "account,open_date,,\nA-1,2026-01-01,,\nA-2,2026-01-01,,x\n",
            // A gap in the header; a value under it.
            "account,,open_date\nA-1,y,2026-01-01\n",
            // Ragged records, short and long, around a good one.
            "account,open_date\nA-1\nA-2,2026-01-01\nA-3,2026-01-01,extra\n",
            // Nothing wrong.
            "account,open_date\nA-1,2026-01-01\n",
        ];
        let expected: [&[(Severity, &str, &str)]; 4] = [
            &[(Severity::Note, "D3", "values in a column without a header")],
            &[(Severity::Note, "B2", "values in a column without a header")],
            &[
                (Severity::Error, "2:2", "1 fields"),
                (Severity::Error, "4:4", "3 fields"),
            ],
            &[],
        ];
        for (text, want) in texts.iter().zip(expected) {
            let want: Vec<(Severity, String, String)> = want
                .iter()
                .map(|(s, c, f)| (*s, c.to_string(), f.to_string()))
                .collect();
            for s in csv_both_ways(text) {
                assert_eq!(opened(&s), want, "{text:?}");
            }
        }
    }

    /// The shape shortcut names only the records whose shapes break the
    /// header's, and stands aside for a header with a gap and for a sheet
    /// held as cells.
    #[test]
    fn the_shape_shortcut_names_only_records_whose_shape_is_off() {
        let suspects = |s: &Sheet| {
            let first = s.rows().next().unwrap();
            let headed: Vec<u32> = first.cells.iter().map(|(c, _)| *c).collect();
            shape_suspects(s, &first, &headed)
        };
        let [csv, held] = csv_both_ways("account,open_date\nA-1\nA-2,2026-01-01\nA-3,x,y\n");
        assert_eq!(suspects(&csv), Some(vec![1, 3]));
        assert_eq!(suspects(&held), None);
        let [good, _] = csv_both_ways("account,open_date\nA-1,2026-01-01\n");
        assert_eq!(suspects(&good), Some(vec![]));
        let [gap, _] = csv_both_ways("account,,open_date\nA-1,y,2026-01-01\n");
        assert_eq!(suspects(&gap), None);
    }

    #[test]
    fn headers_match_whatever_the_case_spaces_and_dashes_in_any_order() {
        let s = sheet(&[
            (0, &[(0, "Open Date"), (1, "ACCOUNT"), (2, "na-me")]),
            (1, &[(0, "2026-01-01"), (1, "HM-SAV-001")]),
        ]);
        let mut problems = Vec::new();
        let t = Table::open(&ctx(), &s, COLUMNS, &mut problems).unwrap();
        assert!(problems.is_empty(), "{problems:?}");
        let recs: Vec<_> = t.records().collect();
        assert_eq!(recs.len(), 1);
        assert_eq!(recs[0].get(0), Some(&Cell::text("HM-SAV-001")));
        assert!(t.has(3) && !t.has(2));
    }

    #[test]
    fn a_header_below_blank_rows_is_found() {
        // Blank rows are never stored, so the header is simply the first row held.
        let s = sheet(&[
            (4, &[(2, "account"), (3, "open_date")]),
            (5, &[(2, "HM-SAV-001"), (3, "2026-01-01")]),
        ]);
        let mut problems = Vec::new();
        let t = Table::open(&ctx(), &s, COLUMNS, &mut problems).unwrap();
        assert_eq!(t.header_cell(0), "C5");
        assert_eq!(t.cell_ref(5, 1), "D6");
    }

    #[test]
    fn a_title_above_the_header_says_where_the_header_was_expected() {
        let s = sheet(&[
            (0, &[(0, "Harbourview Mutual accounts")]),
            (2, &[(0, "account"), (1, "open_date")]),
        ]);
        let mut problems = Vec::new();
        assert!(Table::open(&ctx(), &s, COLUMNS, &mut problems).is_none());
        assert_eq!(problems.len(), 1);
        let p = &problems[0];
        assert_eq!(p.severity, Severity::Error);
        assert_eq!(p.position.cell, "1:1");
        assert!(p.expected.contains("row 1"), "{p:?}");
        assert!(p.fix.contains("row 3"), "{p:?}");
    }

    #[test]
    fn a_missing_required_column_suggests_a_near_miss() {
        let s = sheet(&[(0, &[(0, "account"), (1, "open_dte"), (2, "notes")])]);
        let mut problems = Vec::new();
        assert!(Table::open(&ctx(), &s, COLUMNS, &mut problems).is_none());
        let e = problems
            .iter()
            .find(|p| p.severity == Severity::Error)
            .unwrap();
        assert_eq!(e.position.cell, "1:1");
        assert!(e.expected.contains("open_date"));
        assert!(e.fix.contains("'open_dte' (B1)"), "{}", e.fix);
        let note = problems
            .iter()
            .find(|p| p.severity == Severity::Note)
            .unwrap();
        assert_eq!(note.found, "notes");
    }

    #[test]
    fn a_duplicate_column_is_an_error() {
        let s = sheet(&[(0, &[(0, "account"), (1, "open_date"), (2, "Account")])]);
        let mut problems = Vec::new();
        assert!(Table::open(&ctx(), &s, COLUMNS, &mut problems).is_none());
        assert_eq!(problems[0].position.cell, "C1");
        assert!(problems[0].fix.contains("A1 and C1"), "{}", problems[0].fix);
    }

    #[test]
    fn a_near_miss_of_an_optional_column_is_a_warning() {
        let s = sheet(&[(0, &[(0, "account"), (1, "open_date"), (2, "maturty")])]);
        let mut problems = Vec::new();
        assert!(Table::open(&ctx(), &s, COLUMNS, &mut problems).is_some());
        assert_eq!(problems.len(), 1);
        assert_eq!(problems[0].severity, Severity::Warning);
        assert_eq!(problems[0].position.cell, "C1");
    }

    #[test]
    fn near_misses() {
        assert!(near_miss("openingbalnce", "openingbalance"));
        assert!(near_miss("postedinterst", "postedinterest"));
        assert!(!near_miss("branch", "maturity"));
        assert!(!near_miss("side", "name"));
    }
}
