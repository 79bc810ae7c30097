//! Reading a workbook this program wrote back into its rows: the Run
//! sheet's facts, the Accruals, Reconciliation, Accrued check, Tie-out,
//! Journal, Journal detail, Daily and Problems lists (with their
//! continuation sheets), the Summary's account counts and its list of the
//! accounts left out.
//! `ledgerate merge` combines shard runs from them.
//!
//! Sheets and columns are found by the writer's own header labels, and every
//! cell goes through the reader's conversions (`book::cell`): a figure reads
//! back exactly as it was written (a number of at most 15 significant
//! digits, or text holding every digit). This module never computes a figure
//! (totals and counts by status are the batch's to add), never guesses: a
//! sheet, label or cell that is not what the writer writes is an error that
//! names the workbook, sheet and cell, and it never reads a workbook it did
//! not write.

use std::collections::{BTreeMap, HashMap};
use std::fs::File;
use std::io::BufReader;
use std::path::{Path, PathBuf};

use calamine::{open_workbook, Data, DataType, Reader, Xlsx, XlsxError};
use chrono::{NaiveDate, NaiveDateTime};
use rust_decimal::Decimal;

use super::error::ReportError;
use super::layout::SHEET_ROW_LIMIT;
use super::model::{
    AccrualLine, DailyLine, DetailLine, DetailRow, InputFile, JournalDetail, JournalLine,
    LedgerLine, LeftOutLine, LifeLine, ReconciliationLine, RunFacts, Setting, SettingSource,
    SuspenseLine, TaxCheck, TaxLine, TieOutLine, TieStatus,
};
use super::workbook::{
    is_writer_note, AccrualGroup, ACCOUNTS_FAILED, ACCOUNTS_LEFT_OUT_BY_BOOKS, ACCOUNTS_READ,
    ACCRUALS_HEADER, ACCRUED_CHECK_HEADER, DAILY_HEADER, INPUTS_HEADER, JOURNAL_DETAIL_HEADER,
    JOURNAL_HEADER, LEFT_OUT_HEADER, LEFT_OUT_TITLE, PROBLEMS_HEADER, RECONCILIATION_HEADER,
    RECONCILIATION_TAX_HEADER, RUN_COMMAND_LINE, RUN_PROGRAM, RUN_TIME, SETTINGS_HEADER,
    SUMMARY_COLS, TIE_OUT_HEADER,
};
use crate::book::cell::{self, Cell, NumberStyle};
use crate::conventions::currency;
use crate::engine::reconcile::Status;
use crate::problem::{a1, a1_row, Position, Problem, Severity};

/// The run facts and rows of one workbook, read back. Totals and counts by
/// status are not read: they are sums of these rows.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RunRows {
    /// The Run sheet's facts, with the Summary's accounts read, left out by
    /// the books and failed (accounts computed: the Accruals rows).
    pub facts: RunFacts,
    /// The accounts left out that the Summary names (its first ones).
    pub left_out: Vec<LeftOutLine>,
    /// Accruals rows.
    pub accruals: Vec<AccrualLine>,
    /// Reconciliation rows (none without the sheet).
    pub reconciliation: Vec<ReconciliationLine>,
    /// Accrued check rows (none without the sheet).
    pub accrued_check: Vec<ReconciliationLine>,
    /// Tie-out rows, when the workbook has the sheet. A shard's rows sum
    /// only its own accounts.
    pub tie_out: Option<Vec<TieOutLine>>,
    /// Journal rows.
    pub journal: Vec<JournalLine>,
    /// The Journal detail, when the workbook has the sheet.
    pub journal_detail: Option<JournalDetail>,
    /// Daily rows, when the workbook has the sheet.
    pub daily: Option<Vec<DailyLine>>,
    /// Problems rows, without the writer's own notes.
    pub problems: Vec<Problem>,
}

/// Reads a workbook written by `ledgerate run` back into its rows.
///
/// # Errors
/// [`ReportError::Unreadable`] for a file that is no workbook,
/// [`ReportError::NotWritten`] for a sheet or cell that the writer would
/// not have written.
pub fn read_workbook(path: &Path) -> Result<RunRows, ReportError> {
    let mut book = Written::open(path)?;
    let facts = book.run_facts()?;
    let accruals = book.accruals()?;
    let reconciliation = book.checks("Reconciliation", &RECONCILIATION_HEADER)?;
    let accrued_check = book.checks("Accrued check", &ACCRUED_CHECK_HEADER)?;
    let tie_out = book.tie_out()?;
    let journal = book.journal()?;
    let journal_detail = book.journal_detail()?;
    let daily = book.daily(&accruals)?;
    let problems = book.problems()?;
    let counts = book.account_counts()?;
    Ok(RunRows {
        facts: RunFacts {
            accounts_read: counts.read,
            accounts_computed: accruals.len(),
            accounts_left_out: counts.left_out,
            accounts_failed: counts.failed,
            ..facts
        },
        left_out: counts.named,
        accruals,
        reconciliation,
        accrued_check,
        tie_out,
        journal,
        journal_detail,
        daily,
        problems,
    })
}

/// Journal detail rows read back one at a time, gathered into a
/// [`JournalDetail`] with each line and account id held once.
#[derive(Debug, Default)]
pub(crate) struct DetailRows {
    detail: JournalDetail,
    lines: HashMap<DetailLine, u32>,
    accounts: HashMap<String, u32>,
}

impl DetailRows {
    /// Adds one row: `account`'s share `amount` (debit positive) of `line`.
    /// `None` past [`u32::MAX`] lines or accounts.
    pub(crate) fn push(&mut self, line: DetailLine, account: &str, amount: Decimal) -> Option<()> {
        let line = match self.lines.get(&line) {
            Some(i) => *i,
            None => {
                let i = u32::try_from(self.detail.lines.len())
                    .ok()
                    .filter(|i| *i < u32::MAX)?;
                self.lines.insert(line.clone(), i);
                self.detail.lines.push(line);
                i
            }
        };
        let account = match self.accounts.get(account) {
            Some(i) => *i,
            None => {
                let i = self.detail.accounts.push(account)?;
                self.accounts.insert(account.to_string(), i);
                i
            }
        };
        self.detail.rows.push(DetailRow {
            line,
            account,
            amount,
        });
        Some(())
    }

    /// The detail gathered.
    pub(crate) fn finish(self) -> JournalDetail {
        self.detail
    }
}

/// The Journal detail sheet's name (its continuations add a number).
const JOURNAL_DETAIL: &str = super::workbook::JOURNAL_DETAIL;

/// Columns the writer writes on the Run sheet: those of its widest table.
const RUN_COLUMNS: u32 = if INPUTS_HEADER.len() > SETTINGS_HEADER.len() {
    INPUTS_HEADER.len() as u32
} else {
    SETTINGS_HEADER.len() as u32
};

/// An open workbook that ledgerate wrote.
struct Written {
    path: PathBuf,
    sheets: Xlsx<BufReader<File>>,
}

/// The non-blank rows of one sheet, in row order: each 0-based row with its
/// cells from column A (blank cells as [`Data::Empty`]). A row the sheet
/// skips is blank.
type SheetRows = Vec<(u32, Vec<Data>)>;

/// One data row of a list sheet: where it is and its cells.
struct Row<'a> {
    path: &'a Path,
    sheet: &'a str,
    /// 0-based row of its sheet.
    row: u32,
    cells: &'a [Data],
}

/// The data rows of one list over its sheets ("Daily", "Daily 2"...).
struct List {
    /// Sheet names, in order.
    sheets: Vec<String>,
    /// (index into `sheets`, 0-based row, cells) of each non-blank data row.
    rows: Vec<(usize, u32, Vec<Data>)>,
}

impl List {
    fn rows<'a>(&'a self, path: &'a Path) -> impl Iterator<Item = Row<'a>> + 'a {
        self.rows.iter().map(move |(sheet, row, cells)| Row {
            path,
            sheet: self.sheets.get(*sheet).map_or("", String::as_str),
            row: *row,
            cells,
        })
    }
}

impl Written {
    fn open(path: &Path) -> Result<Written, ReportError> {
        let sheets: Xlsx<BufReader<File>> =
            open_workbook(path).map_err(|e: XlsxError| ReportError::Unreadable {
                path: path.to_path_buf(),
                why: e.to_string(),
            })?;
        Ok(Written {
            path: path.to_path_buf(),
            sheets,
        })
    }

    /// Every non-blank row of one sheet, streamed cell by cell: a cell
    /// costs itself, never a grid up to it. A cell at or right of column
    /// `width` (the columns the writer writes on this sheet), or below the
    /// last row a sheet can hold, is refused by its place.
    fn sheet_rows(&mut self, name: &str, width: u32) -> Result<SheetRows, ReportError> {
        let mut rows: BTreeMap<u32, Vec<Data>> = BTreeMap::new();
        let mut far: Option<(u32, u32)> = None;
        {
            let mut reader =
                self.sheets
                    .worksheet_cells_reader(name)
                    .map_err(|e| ReportError::Unreadable {
                        path: self.path.clone(),
                        why: format!("sheet {name}: {e}"),
                    })?;
            loop {
                let cell = match reader.next_cell() {
                    Ok(Some(c)) => c,
                    Ok(None) => break,
                    Err(e) => {
                        return Err(ReportError::Unreadable {
                            path: self.path.clone(),
                            why: format!("sheet {name}: {e}"),
                        })
                    }
                };
                let (r, c) = cell.get_position();
                if c >= width || r >= SHEET_ROW_LIMIT {
                    far = Some((r, c));
                    break;
                }
                let value = Data::from(cell.get_value().clone());
                if matches!(value, Data::Empty) {
                    continue;
                }
                let row = rows.entry(r).or_default();
                let at = usize::try_from(c).unwrap_or(usize::MAX);
                if row.len() <= at {
                    row.resize(at.saturating_add(1), Data::Empty);
                }
                if let Some(slot) = row.get_mut(at) {
                    *slot = value;
                }
            }
        }
        if let Some((r, c)) = far {
            return Err(self.far_cell(name, width, r, c));
        }
        Ok(rows.into_iter().collect())
    }

    /// A cell where the writer never writes one.
    fn far_cell(&self, sheet: &str, width: u32, row: u32, col: u32) -> ReportError {
        let last = a1(0, width.saturating_sub(1));
        let last_col = last.trim_end_matches(|c: char| c.is_ascii_digit());
        let expected = if col >= width {
            format!("nothing right of column {last_col} (the writer writes {width} columns on this sheet)")
        } else {
            format!("nothing below row {SHEET_ROW_LIMIT} (the last row a sheet holds)")
        };
        self.not_written(sheet, &a1(row, col), "a cell", &expected)
    }

    fn not_written(&self, sheet: &str, cell: &str, found: &str, expected: &str) -> ReportError {
        ReportError::NotWritten {
            path: self.path.clone(),
            sheet: sheet.to_string(),
            cell: cell.to_string(),
            found: found.to_string(),
            expected: expected.to_string(),
        }
    }

    fn missing(&self, sheet: &str) -> ReportError {
        self.not_written(sheet, "", "no such sheet", &format!("a {sheet} sheet"))
    }

    /// The list `base` over its continuation sheets, each header checked
    /// against `header`; `None` when the workbook has no such sheet.
    fn list(&mut self, base: &str, header: &[&str]) -> Result<Option<List>, ReportError> {
        let sheets: Vec<String> = self
            .sheets
            .sheet_names()
            .into_iter()
            .filter(|n| is_part_of(n, base))
            .collect();
        if sheets.is_empty() {
            return Ok(None);
        }
        let mut rows = Vec::new();
        for (index, name) in sheets.iter().enumerate() {
            let width = u32::try_from(header.len()).unwrap_or(u32::MAX);
            let mut sheet = self.sheet_rows(name, width)?.into_iter().peekable();
            let found: Vec<String> = sheet
                .next_if(|(row, _)| *row == 0)
                .map(|(_, r)| r.iter().map(ToString::to_string).collect())
                .unwrap_or_default();
            if found.iter().map(String::as_str).ne(header.iter().copied()) {
                return Err(self.not_written(
                    name,
                    &a1_row(0),
                    &found.join(", "),
                    &header.join(", "),
                ));
            }
            rows.extend(sheet.map(|(row, cells)| (index, row, cells)));
        }
        Ok(Some(List { sheets, rows }))
    }

    /// A list every workbook has.
    fn required_list(&mut self, base: &str, header: &[&str]) -> Result<List, ReportError> {
        self.list(base, header)?.ok_or_else(|| self.missing(base))
    }

    /// The Run sheet: program, command line, time of the run, inputs and settings.
    fn run_facts(&mut self) -> Result<RunFacts, ReportError> {
        const RUN: &str = "Run";
        if !self.sheets.sheet_names().iter().any(|n| n == RUN) {
            return Err(self.not_written(
                RUN,
                "",
                "no such sheet",
                "the Run sheet of a ledgerate workbook",
            ));
        }
        let rows = self.sheet_rows(RUN, RUN_COLUMNS)?;
        let absent = |what: &str| {
            self.not_written(
                RUN,
                "",
                &format!("no {what}"),
                "the Run sheet of a ledgerate workbook",
            )
        };
        let value = |label: &str| labelled(&rows, label).cloned();
        let program = value(RUN_PROGRAM)
            .map(|d| d.to_string())
            .ok_or_else(|| absent("program version"))?;
        let command_line = value(RUN_COMMAND_LINE)
            .map(|d| d.to_string())
            .unwrap_or_default();
        let run_time: NaiveDateTime = value(RUN_TIME)
            .and_then(|d| d.as_datetime())
            .ok_or_else(|| absent("time of the run"))?;
        let inputs = table(&rows, &INPUTS_HEADER)
            .iter()
            .map(|r| InputFile {
                path: text(r, 0),
                size: whole(r, 1).unwrap_or(0),
                sha256: text(r, 2),
            })
            .collect();
        let settings = table(&rows, &SETTINGS_HEADER)
            .iter()
            .map(|r| self.setting(r))
            .collect::<Result<Vec<Setting>, ReportError>>()?;
        let date_setting = |name: &str| {
            settings
                .iter()
                .find(|s| s.name == name)
                .and_then(|s| cell::parse_iso_date(&s.value))
                .ok_or_else(|| absent(&format!("{name} setting")))
        };
        Ok(RunFacts {
            program,
            command_line,
            inputs,
            cutoff: date_setting("cutoff")?,
            window_start: date_setting("window_start")?,
            settings,
            run_time,
            accounts_read: 0,
            accounts_computed: 0,
            accounts_left_out: 0,
            accounts_failed: 0,
        })
    }

    /// The column groups the Accruals carry after [`ACCRUALS_HEADER`], from
    /// its first sheet's header (none without the sheet).
    fn accrual_groups(&mut self) -> Result<Vec<AccrualGroup>, ReportError> {
        const ACCRUALS: &str = "Accruals";
        if !self.sheets.sheet_names().iter().any(|n| n == ACCRUALS) {
            return Ok(Vec::new());
        }
        let widest = ACCRUALS_HEADER.len()
            + AccrualGroup::ALL
                .iter()
                .map(|g| g.header().len())
                .sum::<usize>();
        let width = u32::try_from(widest).unwrap_or(u32::MAX);
        let labels: Vec<String> = self
            .sheet_rows(ACCRUALS, width)?
            .into_iter()
            .next()
            .filter(|(row, _)| *row == 0)
            .map(|(_, r)| r.iter().map(ToString::to_string).collect())
            .unwrap_or_default();
        let mut at = ACCRUALS_HEADER.len();
        let mut groups = Vec::new();
        for g in AccrualGroup::ALL {
            let h = g.header();
            let here = labels.get(at..at + h.len());
            if here.is_some_and(|l| l.iter().map(String::as_str).eq(h.iter().copied())) {
                groups.push(g);
                at += h.len();
            }
        }
        Ok(groups)
    }

    /// One row of the Run sheet's settings.
    fn setting(&self, r: &[Data]) -> Result<Setting, ReportError> {
        let word = text(r, 2);
        let sources = [
            SettingSource::Default,
            SettingSource::Book,
            SettingSource::Option,
        ];
        let source = sources
            .into_iter()
            .find(|s| s.name() == word)
            .ok_or_else(|| {
                self.not_written(
                    "Run",
                    "",
                    &format!("setting source '{word}'"),
                    "default, Settings sheet or command line",
                )
            })?;
        Ok(Setting {
            name: text(r, 0),
            value: text(r, 1),
            source,
        })
    }

    fn accruals(&mut self) -> Result<Vec<AccrualLine>, ReportError> {
        // A run with life events, interest in suspense or withholding tax has
        // their columns after the usual ones.
        let groups = self.accrual_groups()?;
        let mut header: Vec<&str> = ACCRUALS_HEADER.to_vec();
        let mut place = Vec::new();
        for g in &groups {
            place.push((*g, header.len()));
            header.extend_from_slice(g.header());
        }
        let at = |g: AccrualGroup| place.iter().find(|(h, _)| *h == g).map(|(_, c)| *c);
        let (life_at, suspense_at, tax_at) = (
            at(AccrualGroup::Life),
            at(AccrualGroup::Suspense),
            at(AccrualGroup::Tax),
        );
        let list = self.required_list("Accruals", &header)?;
        list.rows(&self.path)
            .map(|r| {
                let currency = r.text(2);
                let places = minor_units(&currency);
                Ok(AccrualLine {
                    account: r.text(0),
                    name: r.text(1),
                    currency: currency.into(),
                    minor_units: places,
                    side: r.text(3).into(),
                    day_count: r.text(4).into(),
                    compounding: r.text(5).into(),
                    balance_at_cutoff: r.amount(6, places)?,
                    accrued_at_cutoff: r.amount(7, places)?,
                    posted_in_window: r.amount(8, places)?,
                    interest_for_window: r.amount(9, places)?,
                    effective_annual_rate: r.decimal(10)?,
                    ledger: LedgerLine {
                        window_days_interest: r.amount(11, places)?,
                        booked_opening: r.amount(12, places)?,
                        opening_source: r.text(13).into(),
                        prior_period: r.amount(14, places)?,
                        open_item: r.amount(15, places)?,
                        settled_in_window: r.amount(16, places)?,
                        entity: r.text(17).into(),
                        gl_interest: r.text(18).into(),
                        gl_accrued: r.text(19).into(),
                        gl_settlement: r.text(20).into(),
                        gl_prior_period: r.text(21).into(),
                    },
                    tax: match tax_at {
                        Some(c) if !r.text(c).is_empty() => Some(TaxLine {
                            withheld: r.amount(c, places)?,
                            net_posted: r.amount(c + 1, places)?,
                        }),
                        _ => None,
                    },
                    suspense: match suspense_at {
                        // A line without the split has no GL suspense.
                        Some(c) if !r.text(c + 6).is_empty() => {
                            Some(Box::new(suspense_line(&r, c, places)?))
                        }
                        _ => None,
                    },
                    life: match life_at {
                        Some(c) => Some(LifeLine {
                            shown: true,
                            status: r.text(c).into(),
                            days_since_maturity: r.optional_count(c + 1)?,
                            term_start: r.optional_date(c + 2)?,
                            maturity: r.optional_date(c + 3)?,
                        }),
                        None => None,
                    },
                })
            })
            .collect()
    }

    /// The Reconciliation, or the Accrued check laid out like it (`base`
    /// and its `header`); no rows without the sheet.
    fn checks(
        &mut self,
        base: &str,
        header: &[&str],
    ) -> Result<Vec<ReconciliationLine>, ReportError> {
        // A run with withholding tax has three Reconciliation columns more.
        let taxed = match (header == RECONCILIATION_HEADER.as_slice())
            .then(|| self.list(base, &RECONCILIATION_TAX_HEADER))
        {
            Some(Ok(Some(list))) => Some(list),
            _ => None,
        };
        let is_taxed = taxed.is_some();
        let list = match taxed {
            Some(list) => list,
            None => match self.list(base, header)? {
                Some(list) => list,
                None => return Ok(Vec::new()),
            },
        };
        list.rows(&self.path)
            .map(|r| {
                let currency = r.text(1);
                let places = minor_units(&currency);
                let status = r.status(10)?;
                // A statement row that could not be read has its period when
                // it was readable, and no figures (blank cells, zero here).
                let unreadable = status == Status::StatementUnreadable;
                let date = |col: usize| {
                    if unreadable {
                        r.optional_date(col)
                    } else {
                        r.date(col).map(Some)
                    }
                };
                let amount = |col: usize| {
                    if unreadable {
                        Ok(r.decimal(col)?.unwrap_or_default())
                    } else {
                        r.amount(col, places)
                    }
                };
                Ok(ReconciliationLine {
                    account: r.text(0),
                    currency: currency.into(),
                    minor_units: places,
                    period_start: date(2)?,
                    period_end: date(3)?,
                    days: r
                        .decimal(4)?
                        .and_then(|d| i64::try_from(d.mantissa()).ok().filter(|_| d.scale() == 0))
                        .unwrap_or_default(),
                    balance_years: r.decimal(5)?.unwrap_or_default(),
                    expected: amount(6)?,
                    posted: amount(7)?,
                    variance: amount(8)?,
                    variance_bp: r.decimal(9)?,
                    status,
                    likely_cause: r.text(11),
                    tax: match (is_taxed, r.decimal(12)?) {
                        (true, Some(expected)) => {
                            let posted = r.decimal(13)?;
                            Some(Box::new(TaxCheck {
                                expected,
                                posted,
                                variance: posted.and(r.decimal(14)?),
                            }))
                        }
                        _ => None,
                    },
                })
            })
            .collect()
    }

    /// The Tie-out rows; `None` without the sheet.
    fn tie_out(&mut self) -> Result<Option<Vec<TieOutLine>>, ReportError> {
        let Some(list) = self.list("Tie-out", &TIE_OUT_HEADER)? else {
            return Ok(None);
        };
        list.rows(&self.path)
            .map(|r| {
                let currency = r.text(1);
                let places = minor_units(&currency);
                Ok(TieOutLine {
                    entity: r.text(0),
                    currency,
                    minor_units: places,
                    gl_account: r.text(2),
                    side: r.text(3).into(),
                    accounts: r.count(4)?,
                    opening_tb: r.amount(5, places)?,
                    opening_sub_ledger: r.amount(6, places)?,
                    opening_difference: r.amount(7, places)?,
                    interest_for_window: r.amount(8, places)?,
                    settled_in_window: r.amount(9, places)?,
                    closing_roll_forward: r.amount(10, places)?,
                    closing_sub_ledger: r.amount(11, places)?,
                    closing_tb: r.optional_amount(12, places)?,
                    closing_difference: r.amount(13, places)?,
                    status: r.tie_status(14)?,
                })
            })
            .collect::<Result<_, _>>()
            .map(Some)
    }

    fn journal(&mut self) -> Result<Vec<JournalLine>, ReportError> {
        let list = self.required_list("Journal", &JOURNAL_HEADER)?;
        list.rows(&self.path)
            .map(|r| {
                let currency = r.text(2);
                let places = minor_units(&currency);
                Ok(JournalLine {
                    date: r.date(0)?,
                    entity: r.text(1),
                    currency,
                    minor_units: places,
                    gl_account: r.text(3),
                    debit: r.amount(4, places)?,
                    credit: r.amount(5, places)?,
                    memo: r.text(6),
                })
            })
            .collect()
    }

    /// The Journal detail sheets, when the workbook has them.
    fn journal_detail(&mut self) -> Result<Option<JournalDetail>, ReportError> {
        let Some(list) = self.list(JOURNAL_DETAIL, &JOURNAL_DETAIL_HEADER)? else {
            return Ok(None);
        };
        let mut rows = DetailRows::default();
        for r in list.rows(&self.path) {
            let currency = r.text(2);
            let places = minor_units(&currency);
            let (debit, credit) = (r.amount(6, places)?, r.amount(7, places)?);
            if debit.is_zero() == credit.is_zero()
                || debit < Decimal::ZERO
                || credit < Decimal::ZERO
            {
                return Err(r.error(
                    6,
                    &format!("Debit {debit} and Credit {credit}"),
                    "an amount in one of Debit and Credit, and zero in the other",
                ));
            }
            let line = DetailLine {
                date: r.date(0)?,
                entity: r.text(1),
                currency,
                minor_units: places,
                gl_account: r.text(3),
                memo: r.text(4),
            };
            rows.push(line, &r.text(5), debit - credit).ok_or_else(|| {
                r.error(
                    5,
                    "more than 4,294,967,295 accounts or lines",
                    "a Journal detail a merge can count",
                )
            })?;
        }
        Ok(Some(rows.finish()))
    }

    /// Daily rows take their minor units from the account's Accruals row.
    fn daily(&mut self, accruals: &[AccrualLine]) -> Result<Option<Vec<DailyLine>>, ReportError> {
        let Some(list) = self.list("Daily", &DAILY_HEADER)? else {
            return Ok(None);
        };
        let places_of: HashMap<&str, u32> = accruals
            .iter()
            .map(|a| (a.account.as_str(), a.minor_units))
            .collect();
        list.rows(&self.path)
            .map(|r| {
                let account = r.text(0);
                let places = places_of.get(account.as_str()).copied().unwrap_or(2);
                Ok(DailyLine {
                    minor_units: places,
                    date: r.date(1)?,
                    balance: r.amount(2, places)?,
                    base: r.amount(3, places)?,
                    rate: r.decimal(4)?.unwrap_or_default(),
                    day_fraction: r.decimal(5)?.unwrap_or_default(),
                    interest: r.decimal(6)?.unwrap_or_default(),
                    accrued: r.decimal(7)?.unwrap_or_default(),
                    account,
                })
            })
            .collect::<Result<_, _>>()
            .map(Some)
    }

    /// The Problems rows, without the notes the writer makes anew.
    fn problems(&mut self) -> Result<Vec<Problem>, ReportError> {
        let list = self.required_list("Problems", &PROBLEMS_HEADER)?;
        let mut problems = Vec::new();
        for r in list.rows(&self.path) {
            let p = Problem {
                severity: r.severity(0)?,
                position: Position::from_shown(&r.text(1), &r.text(2), &r.text(3)),
                account: Some(r.text(7)).filter(|a| !a.is_empty()),
                found: r.text(4),
                expected: r.text(5),
                fix: r.text(6),
                follows: None,
            };
            // Notes the writer and the CSV files make anew on every run.
            if !is_writer_note(&p) && p.expected != super::journal_csv::guard_expected() {
                problems.push(p);
            }
        }
        Ok(problems)
    }

    /// The Summary's account counts and the accounts left out it names.
    fn account_counts(&mut self) -> Result<AccountCounts, ReportError> {
        const SUMMARY: &str = "Summary";
        if !self.sheets.sheet_names().iter().any(|n| n == SUMMARY) {
            return Err(self.missing(SUMMARY));
        }
        // The widest the writer writes: a run with withholding tax adds the
        // totals' Tax withheld in window column.
        let rows = self.sheet_rows(SUMMARY, (SUMMARY_COLS + 1).into())?;
        let count = |label: &str| {
            rows.iter()
                .find(|(_, r)| text(r, 0) == label)
                .and_then(|(_, r)| whole(r, 1))
                .unwrap_or(0)
        };
        let named = self.left_out(&rows)?;
        Ok(AccountCounts {
            read: count(ACCOUNTS_READ),
            left_out: count(ACCOUNTS_LEFT_OUT_BY_BOOKS),
            failed: count(ACCOUNTS_FAILED),
            named,
        })
    }

    /// The Summary's list of the accounts left out: the rows under its
    /// title and header, up to the first blank row (none without the list).
    fn left_out(&self, rows: &SheetRows) -> Result<Vec<LeftOutLine>, ReportError> {
        let mut below = rows
            .iter()
            .skip_while(|(_, r)| text(r, 0) != LEFT_OUT_TITLE)
            .skip(1);
        let Some((header_row, header)) = below.next() else {
            return Ok(Vec::new());
        };
        let found: Vec<String> = header.iter().map(ToString::to_string).collect();
        if found
            .iter()
            .map(String::as_str)
            .ne(LEFT_OUT_HEADER.iter().copied())
        {
            return Err(self.not_written(
                "Summary",
                &a1_row(*header_row),
                &found.join(", "),
                &LEFT_OUT_HEADER.join(", "),
            ));
        }
        let mut last = *header_row;
        Ok(below
            .take_while(|(row, _)| {
                let next = last.checked_add(1) == Some(*row);
                last = *row;
                next
            })
            .map(|(_, r)| LeftOutLine {
                account: text(r, 0),
                position: Position::from_shown(&text(r, 1), &text(r, 2), &text(r, 3)),
                error: text(r, 4),
            })
            .collect())
    }
}

/// The Summary's account counts, and the accounts left out it names.
struct AccountCounts {
    read: usize,
    left_out: usize,
    failed: usize,
    named: Vec<LeftOutLine>,
}

/// Whether `name` is the list sheet `base` or one of its continuations
/// (`base 2`, `base 3`...).
fn is_part_of(name: &str, base: &str) -> bool {
    name == base
        || name
            .strip_prefix(base)
            .and_then(|r| r.strip_prefix(' '))
            .is_some_and(|k| k.parse::<u32>().is_ok())
}

/// Column B of the row whose column A is `label`.
fn labelled<'r>(rows: &'r SheetRows, label: &str) -> Option<&'r Data> {
    rows.iter()
        .find(|(_, r)| text(r, 0) == label)
        .map(|(_, r)| r.get(1).unwrap_or(&Data::Empty))
}

/// The rows under the table whose header starts with `header`'s first
/// label, up to the first blank row (a row the sheet skips).
fn table<'r>(rows: &'r SheetRows, header: &[&str]) -> Vec<&'r [Data]> {
    let title = header.first().copied().unwrap_or_default();
    let mut below = rows.iter().skip_while(|(_, r)| text(r, 0) != title);
    let Some((mut last, _)) = below.next() else {
        return Vec::new();
    };
    below
        .take_while(|(row, _)| {
            let next = last.checked_add(1) == Some(*row);
            last = *row;
            next
        })
        .map(|(_, r)| r.as_slice())
        .collect()
}

/// A cell as the text it shows (empty for a blank cell).
fn text(row: &[Data], col: usize) -> String {
    match row.get(col) {
        None | Some(Data::Empty) => String::new(),
        Some(d) => d.to_string(),
    }
}

/// A whole number of a count cell, if it holds one.
fn whole<T: TryFrom<i128>>(row: &[Data], col: usize) -> Option<T> {
    match row.get(col).map(Cell::from) {
        Some(Cell::Number(d)) => {
            let d = d.normalize();
            (d.scale() == 0)
                .then(|| T::try_from(d.mantissa()).ok())
                .flatten()
        }
        _ => None,
    }
}

/// The minor units of a currency code as the writer formatted it.
fn minor_units(code: &str) -> u32 {
    currency::minor_units(code).unwrap_or(2)
}

/// The split of an Accruals row whose suspense columns start at `c`; the
/// suspense before the window follows from the others (suspense at cut-off =
/// before + reversed + suspended - released).
fn suspense_line(r: &Row<'_>, c: usize, places: u32) -> Result<SuspenseLine, ReportError> {
    let reversed_in_window = r.amount(c + 2, places)?;
    let suspended_in_window = r.amount(c + 3, places)?;
    let released_in_window = r.amount(c + 4, places)?;
    let suspense_at_cutoff = r.amount(c + 5, places)?;
    Ok(SuspenseLine {
        status: r.text(c).into(),
        contractual_for_window: r.amount(c + 1, places)?,
        reversed_in_window,
        suspended_in_window,
        released_in_window,
        suspense_before_window: suspense_at_cutoff - reversed_in_window - suspended_in_window
            + released_in_window,
        suspense_at_cutoff,
        gl_suspense: r.text(c + 6).into(),
    })
}

impl Row<'_> {
    fn error(&self, col: usize, found: &str, expected: &str) -> ReportError {
        ReportError::NotWritten {
            path: self.path.to_path_buf(),
            sheet: self.sheet.to_string(),
            cell: a1(self.row, u32::try_from(col).unwrap_or(u32::MAX)),
            found: found.to_string(),
            expected: expected.to_string(),
        }
    }

    fn issue(&self, col: usize, issue: &cell::Issue) -> ReportError {
        self.error(col, &issue.found, &issue.expected)
    }

    fn cell(&self, col: usize) -> Cell {
        self.cells.get(col).map_or(Cell::Empty, Cell::from)
    }

    fn text(&self, col: usize) -> String {
        text(self.cells, col)
    }

    /// An exact decimal, `None` for a blank cell. Text figures carry
    /// thousands separators and a decimal point.
    fn decimal(&self, col: usize) -> Result<Option<Decimal>, ReportError> {
        const WRITTEN: NumberStyle = NumberStyle {
            decimal_comma: false,
        };
        cell::decimal(&self.cell(col), WRITTEN).map_err(|i| self.issue(col, &i))
    }

    /// An amount, with at least the currency's `places` decimals (a number
    /// cell drops trailing zeros).
    fn amount(&self, col: usize, places: u32) -> Result<Decimal, ReportError> {
        self.optional_amount(col, places)?
            .ok_or_else(|| self.error(col, "a blank cell", "an amount"))
    }

    /// An amount the writer leaves blank when there is none.
    fn optional_amount(&self, col: usize, places: u32) -> Result<Option<Decimal>, ReportError> {
        Ok(self.decimal(col)?.map(|mut x| {
            if x.scale() < places {
                x.rescale(places);
            }
            x
        }))
    }

    /// A count: a whole number, not negative.
    fn count(&self, col: usize) -> Result<usize, ReportError> {
        whole(self.cells, col).ok_or_else(|| {
            let found = match self.text(col) {
                t if t.is_empty() => "a blank cell".to_string(),
                t => t,
            };
            self.error(col, &found, "a count (a whole number)")
        })
    }

    /// A count the writer leaves blank when there is none.
    fn optional_count(&self, col: usize) -> Result<Option<i64>, ReportError> {
        if self.text(col).is_empty() {
            return Ok(None);
        }
        self.count(col).map(|n| i64::try_from(n).ok())
    }

    fn tie_status(&self, col: usize) -> Result<TieStatus, ReportError> {
        let word = self.text(col);
        TieStatus::ALL
            .into_iter()
            .find(|s| s.name() == word)
            .ok_or_else(|| {
                let words: Vec<&str> = TieStatus::ALL.iter().map(|s| s.name()).collect();
                self.error(col, &word, &format!("a status ({})", words.join(", ")))
            })
    }

    /// A date, `None` for a blank cell.
    fn optional_date(&self, col: usize) -> Result<Option<NaiveDate>, ReportError> {
        cell::date(&self.cell(col)).map_err(|i| self.issue(col, &i))
    }

    fn date(&self, col: usize) -> Result<NaiveDate, ReportError> {
        cell::date(&self.cell(col))
            .map_err(|i| self.issue(col, &i))?
            .ok_or_else(|| self.error(col, "a blank cell", "a date"))
    }

    fn status(&self, col: usize) -> Result<Status, ReportError> {
        let word = self.text(col);
        Status::ALL
            .into_iter()
            .find(|s| s.name() == word)
            .ok_or_else(|| {
                let words: Vec<&str> = Status::ALL.iter().map(|s| s.name()).collect();
                self.error(col, &word, &format!("a status ({})", words.join(", ")))
            })
    }

    fn severity(&self, col: usize) -> Result<Severity, ReportError> {
        let word = self.text(col);
        [Severity::Error, Severity::Warning, Severity::Note]
            .into_iter()
            .find(|s| s.name() == word)
            .ok_or_else(|| self.error(col, &word, "error, warning or note"))
    }
}
