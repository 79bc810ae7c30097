//! The reconciliation workbook: which sheets, in which order, with which
//! columns, and where each figure of a [`Report`] goes.
//!
//! Sheets: Summary, Accruals, Reconciliation (when there are reconciliation
//! rows), Accrued check (when Booked rows give the core system's open items
//! at cut-off), Tie-out (when the books have a trial balance), Journal,
//! Journal detail (when the report holds it), Daily (when asked for),
//! Problems, Run. Every list sheet has
//! a frozen header row and a filter over its header and data, and continues on
//! "Name 2", "Name 3"... past the spreadsheet's row limit, never truncated.
//!
//! The writer computes nothing but layout: it never adds, rounds or compares
//! figures (the totals and counts come in the report), reads no clock (the run
//! time is the report's) and writes its rows in order, so the same report
//! gives the same bytes.

use std::path::{Path, PathBuf};

use rust_xlsxwriter::{
    Chart, ChartAxisLabelPosition, ChartFormat, ChartRange, ChartSolidFill, ColNum, Color,
    DocProperties, Format, Note, RowNum, Workbook, Worksheet,
};

use super::cells::{Cells, FormatOrder, TextFigure, TextFigures, EXACT_DIGITS};
use super::error::ReportError;
use super::layout::{
    self, column_width, list_column_width, part_name, place, sheet_ref, Limits, Styles,
    MAX_FORMAT_DECIMALS, UNROUNDED_DECIMALS,
};
use super::model::{
    AccrualLine, CurrencyTotal, DailyLine, DetailRow, JournalDetail, JournalLine, LeftOutLine,
    ReconciliationLine, Report, RunFacts, StatusCount, TieOutLine, TieStatus, LEFT_OUT_SHOWN,
};
use super::output;
use crate::engine::reconcile::Status;
use crate::problem::{Position, Problem, Severity};

mod side_by_side;

/// Header labels of the Accruals sheet: the account and its interest, then
/// what the ledger holds for it (behaviour.md, Books that tie) and the GL
/// accounts its journal lines go to.
pub const ACCRUALS_HEADER: [&str; 22] = [
    "Account",
    "Name",
    "Currency",
    "Side",
    "Day count",
    "Compounding",
    "Balance at cut-off",
    "Accrued at cut-off",
    "Posted in window",
    "Interest for window",
    "Effective annual rate",
    "Window days' interest",
    "Booked opening",
    "Opening from",
    "Prior-period adjustment",
    "Open item at cut-off",
    "Settled in window",
    "Entity",
    "GL interest",
    "GL accrued",
    "GL settlement",
    "GL prior period",
];

/// A group of Accruals columns written after [`ACCRUALS_HEADER`] only when
/// some account of the run has it, in the order of [`AccrualGroup::ALL`]:
/// a run with none keeps the sheet as it was.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AccrualGroup {
    /// The account's status and current term (behaviour.md, Account life events).
    Life,
    /// Interest split into recognised and suspended (behaviour.md, Non-accrual
    /// and interest in suspense); Interest for window is then the recognised figure.
    Suspense,
    /// Tax withheld from the window's postings and their net (behaviour.md,
    /// Withholding tax).
    Tax,
}

impl AccrualGroup {
    /// Every group, in the order of its columns.
    pub const ALL: [AccrualGroup; 3] = [
        AccrualGroup::Life,
        AccrualGroup::Suspense,
        AccrualGroup::Tax,
    ];

    /// The group's header labels.
    pub fn header(self) -> &'static [&'static str] {
        match self {
            AccrualGroup::Life => &["Status", "Days since maturity", "Term start", "Maturity"],
            AccrualGroup::Suspense => &[
                "Accrual status",
                "Contractual for window",
                "Reversed in window",
                "Suspended in window",
                "Released in window",
                "Suspense at cut-off",
                "GL suspense",
            ],
            AccrualGroup::Tax => &["Tax withheld in window", "Net posted in window"],
        }
    }

    /// The widest each of its columns gets.
    fn caps(self) -> &'static [usize] {
        match self {
            AccrualGroup::Life => &[16, 12, 14, 14],
            AccrualGroup::Suspense => &[18, 24, 24, 24, 24, 24, 32],
            AccrualGroup::Tax => &[24, 24],
        }
    }

    /// Notes on its header cells, by place within the group.
    fn notes(self) -> &'static [(ColNum, &'static str)] {
        match self {
            AccrualGroup::Life => &[(0, STATUS_GLOSS)],
            AccrualGroup::Suspense => &[(5, SUSPENSE_GLOSS)],
            AccrualGroup::Tax => &[],
        }
    }

    /// Whether the account's line has the group.
    pub fn held_by(self, a: &AccrualLine) -> bool {
        match self {
            AccrualGroup::Life => a.life.as_ref().is_some_and(|l| l.shown),
            AccrualGroup::Suspense => a.suspense.is_some(),
            AccrualGroup::Tax => a.tax.is_some(),
        }
    }

    /// The groups some line of `rows` has.
    pub fn of(rows: &[AccrualLine]) -> Vec<AccrualGroup> {
        AccrualGroup::ALL
            .into_iter()
            .filter(|g| rows.iter().any(|a| g.held_by(a)))
            .collect()
    }

    /// The formats its columns carry, amounts in `units` decimals.
    fn formats(self, s: &Styles, units: u32) -> Vec<Option<&Format>> {
        let amount = Some(s.amount(units));
        match self {
            AccrualGroup::Life => vec![Some(&s.text), Some(&s.count), Some(&s.date), Some(&s.date)],
            AccrualGroup::Suspense => vec![
                Some(&s.text),
                amount,
                amount,
                amount,
                amount,
                amount,
                Some(&s.text),
            ],
            AccrualGroup::Tax => vec![amount, amount],
        }
    }

    /// Writes the group's cells of `a` from column `first`; an account
    /// without it has them blank (a life status) or accruing (the split,
    /// with no GL suspense: what tells a read-back line it had none).
    fn write(self, c: &mut Cells<'_>, a: &AccrualLine, first: ColNum) -> Result<(), ReportError> {
        let units = a.minor_units;
        let col = |i: ColNum| first.saturating_add(i);
        match self {
            AccrualGroup::Life => {
                if let Some(l) = &a.life {
                    c.text(col(0), &l.status)?;
                    if let Some(days) = l.days_since_maturity {
                        c.count(col(1), i128::from(days))?;
                    }
                    if let Some(d) = l.term_start {
                        c.date(col(2), d)?;
                    }
                    if let Some(d) = l.maturity {
                        c.date(col(3), d)?;
                    }
                }
            }
            AccrualGroup::Suspense => match &a.suspense {
                Some(s) => {
                    c.text(col(0), &s.status)?;
                    c.amount(col(1), s.contractual_for_window, units)?;
                    c.amount(col(2), s.reversed_in_window, units)?;
                    c.amount(col(3), s.suspended_in_window, units)?;
                    c.amount(col(4), s.released_in_window, units)?;
                    c.amount(col(5), s.suspense_at_cutoff, units)?;
                    c.text(col(6), &s.gl_suspense)?;
                }
                None => {
                    c.text(col(0), "accruing")?;
                    c.amount(col(1), a.interest_for_window, units)?;
                    for i in 2..=5 {
                        c.amount(col(i), rust_decimal::Decimal::ZERO, units)?;
                    }
                }
            },
            AccrualGroup::Tax => {
                // Blank for an account without tax.
                if let Some(tax) = &a.tax {
                    c.amount(col(0), tax.withheld, units)?;
                    c.amount(col(1), tax.net_posted, units)?;
                }
            }
        }
        Ok(())
    }
}

/// The Accruals' status, for the note of its header.
pub const STATUS_GLOSS: &str = "Status: open; closed (close_date on or before the cut-off); \
    matured unpaid (a balance left after maturity, with the days since); rolled over (a new \
    term started at maturity: Term start and Maturity are the current term's).";

/// The note on Interest for window when the Accruals carry the split.
const RECOGNISED_GLOSS: &str =
    "Interest recognised as income: contractual for window - reversed - suspended + released.";

/// The note on Suspense at cut-off.
const SUSPENSE_GLOSS: &str = "Interest held in suspense at the end of the cut-off: opening suspense + reversals + suspended - released, to the cut-off.";

/// Header labels of the Reconciliation sheet.
pub const RECONCILIATION_HEADER: [&str; 12] = [
    "Account",
    "Currency",
    "Period start",
    "Period end",
    "Days",
    "Balance-years",
    "Expected",
    "Posted",
    "Variance",
    "Variance (bp)",
    "Status",
    "Likely cause",
];

/// Header labels of the Reconciliation sheet of a run with withholding tax:
/// its columns, then the period's tax (behaviour.md, Withholding tax).
pub const RECONCILIATION_TAX_HEADER: [&str; 15] = [
    "Account",
    "Currency",
    "Period start",
    "Period end",
    "Days",
    "Balance-years",
    "Expected",
    "Posted",
    "Variance",
    "Variance (bp)",
    "Status",
    "Likely cause",
    "Expected tax",
    "Posted tax",
    "Tax variance",
];

/// Header labels of the Accrued check sheet: the Reconciliation's columns,
/// with the core system's booked open item in place of a posted amount
/// (behaviour.md, System accrued check).
pub const ACCRUED_CHECK_HEADER: [&str; 12] = [
    "Account",
    "Currency",
    "Accrual from",
    "Cut-off",
    "Days",
    "Balance-years",
    "Expected",
    "Booked",
    "Variance",
    "Variance (bp)",
    "Status",
    "Likely cause",
];

/// Header labels of the Tie-out sheet (behaviour.md, Tie-out).
pub const TIE_OUT_HEADER: [&str; 15] = [
    "Entity",
    "Currency",
    "GL account",
    "Side",
    "Accounts",
    "Opening per trial balance",
    "Opening per sub-ledger",
    "Opening difference",
    "Interest for window",
    "Settled in window",
    "Closing roll-forward",
    "Closing per sub-ledger",
    "Closing per trial balance",
    "Closing difference",
    "Status",
];

/// Header labels of the Journal sheet.
pub const JOURNAL_HEADER: [&str; 7] = [
    "Date",
    "Entity",
    "Currency",
    "GL account",
    "Debit",
    "Credit",
    "Memo",
];

/// The name of the Journal detail sheet (its continuations add a number).
pub const JOURNAL_DETAIL: &str = "Journal detail";

/// Header labels of the Journal detail sheet (and of its CSV file): the
/// five things a journal line is summed by, then the account and its share.
pub const JOURNAL_DETAIL_HEADER: [&str; 8] = [
    "Date",
    "Entity",
    "Currency",
    "GL account",
    "Memo",
    "Account",
    "Debit",
    "Credit",
];

/// Header labels of the Daily sheet.
pub const DAILY_HEADER: [&str; 8] = [
    "Account",
    "Date",
    "Balance",
    "Base",
    "Rate",
    "Day fraction",
    "Interest",
    "Accrued",
];

/// Header labels of the Problems sheet: the account a problem concerns
/// (the one it keeps out, for an error) is last.
pub const PROBLEMS_HEADER: [&str; 8] = [
    "Severity", "Book", "Sheet", "Cell", "Found", "Expected", "Fix", "Account",
];

/// Header labels of the Summary's totals by currency and side.
pub const TOTALS_HEADER: [&str; 8] = [
    "Currency",
    "Side",
    "Accounts",
    "Balance at cut-off",
    "Accrued at cut-off",
    "Posted in window",
    "Interest for window",
    "Prior-period adjustment",
];

/// Header label of the Summary's totals column added after
/// [`TOTALS_HEADER`] when an account of the run has withholding tax.
pub const TOTALS_TAX_HEADER: &str = "Tax withheld in window";

/// Label of the Summary's line on the Tie-out.
pub const TIE_OUT_LABEL: &str = "Tie-out";

/// The title of the Summary's totals.
pub const TOTALS_TITLE: &str = "Totals by currency and side";

/// What the totals' interest is, under their table.
pub const TOTALS_GLOSS: &str = "Interest for window is interest expense on a liability row \
    and interest income on an asset row; deposits and loans are never added together.";

/// Labels of the Summary's account counts: read = computed + left out, and
/// left out = by errors in the books + by errors in the computation.
pub const ACCOUNTS_READ: &str = "Accounts read";
/// See [`ACCOUNTS_READ`].
pub const ACCOUNTS_COMPUTED: &str = "Accounts computed";
/// See [`ACCOUNTS_READ`].
pub const ACCOUNTS_LEFT_OUT: &str = "Accounts left out by errors";
/// See [`ACCOUNTS_READ`].
pub const ACCOUNTS_LEFT_OUT_BY_BOOKS: &str = "of which by errors in the books";
/// See [`ACCOUNTS_READ`].
pub const ACCOUNTS_FAILED: &str = "of which by errors in the computation";

/// The title of the Summary's list of the accounts left out.
pub const LEFT_OUT_TITLE: &str = "Accounts left out, with the error that kept each out";

/// Header labels of the Summary's list of the accounts left out.
pub const LEFT_OUT_HEADER: [&str; 5] = ["Account", "Book", "Sheet", "Cell", "Error"];

/// Labels of the Run sheet's first rows: the program, the command line and
/// the time of the run.
pub const RUN_PROGRAM: &str = "Program version";
/// See [`RUN_PROGRAM`].
pub const RUN_COMMAND_LINE: &str = "Command line";
/// See [`RUN_PROGRAM`].
pub const RUN_TIME: &str = "Time of the run";

/// Header labels of the Run sheet's inputs.
pub const INPUTS_HEADER: [&str; 3] = ["Input", "Size (bytes)", "SHA-256"];

/// Header labels of the Run sheet's settings.
pub const SETTINGS_HEADER: [&str; 3] = ["Setting", "Value", "Source"];

/// The caution printed at the top of the Summary.
pub const CAUTION: &str = "Caution: every figure here is worked out from the terms and data \
    in the input books, as the program read them. Before any of it is booked, posted or sent \
    to a customer, qualified staff must check it against the terms of each contract and \
    against the accounting standards and regulations that apply to the institution. The \
    program helps with that review; it does not replace it, nor the judgement of the people \
    responsible for the books.";

/// What balance-years are, in one line: on the Summary, in the note of the
/// Reconciliation sheet's Balance-years header and in the footer of its
/// printed pages.
pub const BALANCE_YEARS_GLOSS: &str = "Balance-years: each day's interest-bearing balance \
    times that day's fraction of a year, summed over the period (10,000 held for half a year \
    is 5,000); expected interest is rate x balance-years, and Variance (bp) is variance / \
    balance-years x 10,000.";

/// [`BALANCE_YEARS_GLOSS`] short enough for the footer of a printed page.
pub const BALANCE_YEARS_FOOTER: &str = "Balance-years: each day's balance x its fraction of a \
    year, summed over the period. Variance (bp) = variance / balance-years x 10,000.";

/// What a variance in basis points is, for the note of its header.
pub const VARIANCE_BP_GLOSS: &str = "Variance (bp): the variance as a gap in the annual rate, \
    variance / balance-years x 10,000. A small miss on a small balance is many basis points; \
    the Summary ranks the misses in money too.";

/// The Likely cause column, for the note of its header.
pub const LIKELY_CAUSE_GLOSS: &str = "Likely cause: the most plausible single change that \
    reproduces the posted amount (rule in the user guide), and how many do; \
    ledgerate explain --account ID lists them all.";

/// The Accrued check's Likely cause column, for the note of its header.
pub const BOOKED_CAUSE_GLOSS: &str = "Likely cause: the most plausible single change that \
    reproduces the booked amount (rule in the user guide), and how many do; \
    ledgerate explain --account ID lists them all.";

/// What the Accrued check's Expected and Booked are, for the note of the
/// Expected header.
pub const ACCRUED_CHECK_GLOSS: &str = "Expected: our open item at the cut-off, the interest \
    accrued since the last posting plus postings not yet settled. Booked: the core system's \
    figure for the same day, from the Booked sheet. Accrual from is the day after the last \
    posting period ended (else the open date).";

/// The Accruals' window days' interest, for the note of its header.
pub const WINDOW_DAYS_GLOSS: &str = "Window days' interest: the interest of the window's own \
    days, posted in window + accrued at cut-off - accrued the day before the window, all as \
    known now. Interest for window adds the prior-period adjustment.";

/// The Accruals' booked opening, for the note of its header.
pub const BOOKED_OPENING_GLOSS: &str = "Booked opening: what the books held for the account \
    (accrued interest plus postings not yet settled) at the end of the day before the \
    window. Opening from says where it came from: a Booked row, the previous close re-run as \
    it was, the books as known now, or none (the account opens in the window).";

/// The Accruals' prior-period adjustment, for the note of its header.
pub const PRIOR_PERIOD_GLOSS: &str = "Prior-period adjustment: the open item at the day before \
    the window as known now, less the booked opening: interest for days before the window \
    that reached the books only now (a back-valued movement, say). It is booked in this \
    window on a line of its own.";

/// The Accruals' open item, for the note of its header.
pub const OPEN_ITEM_GLOSS: &str = "Open item at cut-off: what the accrued-interest GL account \
    should hold for the account at the cut-off, accrued at cut-off plus postings of the \
    window not yet settled.";

/// The Tie-out's opening difference, for the note of its header.
pub const OPENING_DIFFERENCE_GLOSS: &str = "Opening difference: the trial balance at the day \
    before the window less the sum of the accounts' booked openings. Not zero: the GL held \
    at the last close something the sub-ledger does not explain.";

/// The Tie-out's roll-forward, for the note of its header.
pub const ROLL_FORWARD_GLOSS: &str = "Closing roll-forward: opening per trial balance + \
    interest for window - settled in window, where this run's journal takes the GL. Less \
    closing per sub-ledger it is always the opening difference.";

/// The Tie-out's closing difference, for the note of its header.
pub const CLOSING_DIFFERENCE_GLOSS: &str = "Closing difference: closing per trial balance \
    (the roll-forward when there is no trial balance row at the cut-off) less closing per \
    sub-ledger. One other than the opening difference comes from GL lines this run did not \
    make.";

/// Printed under each page of the Tie-out.
pub const TIE_OUT_FOOTER: &str = "Amounts in each GL account's normal direction: interest \
    payable (deposits) a credit, receivable (loans) a debit, both shown positive.";

/// One sheet of the written workbook.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SheetRows {
    /// The sheet's name, e.g. `Daily 2`.
    pub name: String,
    /// List rows below the header (list sheets); rows used (Summary and Run).
    pub rows: usize,
}

/// What [`write_report`] wrote.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct WriteOutcome {
    /// The workbook's path (the target).
    pub path: PathBuf,
    /// The sheets, in workbook order.
    pub sheets: Vec<SheetRows>,
    /// Figures written as text because a spreadsheet number cannot hold them
    /// exactly (the first [`super::cells::LISTED_TEXT_FIGURES`]).
    pub text_figures: Vec<TextFigure>,
    /// How many figures were written as text in all.
    pub text_figure_count: usize,
    /// The warning the writer added as the last row of the Problems sheet
    /// when some figure was written as text. The sheet already holds it, so
    /// the run must not add it to the report again; it may print it.
    pub text_figure_problem: Option<Problem>,
    /// The warning the writer added when some text (a name, a reference) was
    /// longer than a cell holds and was cut; like the one above, already on
    /// the Problems sheet.
    pub cut_text_problem: Option<Problem>,
}

/// Writes the reconciliation workbook of `report` to `target`.
///
/// The workbook is written to a temporary file beside `target`, flushed to
/// disk and renamed into place only when complete: `target` is either left as
/// it was or replaced whole. The same report gives a byte-identical file.
///
/// # Errors
/// [`ReportError::MissingDirectory`] when the target's folder does not exist,
/// [`ReportError::TargetIsDirectory`] / [`ReportError::TargetIsInput`] for an
/// unusable target, and the writer's or the file system's errors, with the
/// sheet and row where they happened.
///
/// # Examples
/// ```no_run
/// # fn demo(report: &ledgerate::report::model::Report) -> Result<(), ledgerate::report::ReportError> {
/// let outcome = ledgerate::report::write_report(report, std::path::Path::new("out/jan.xlsx"))?;
/// for sheet in &outcome.sheets {
///     println!("{}: {} rows", sheet.name, sheet.rows);
/// }
/// # Ok(()) }
/// ```
pub fn write_report(report: &Report, target: &Path) -> Result<WriteOutcome, ReportError> {
    write_report_with(report, target, &Limits::default())
}

/// [`write_report`] with other limits (tests use a small row limit): the
/// report's Accruals lines are one part of a [`Writer`].
pub(crate) fn write_report_with(
    report: &Report,
    target: &Path,
    limits: &Limits,
) -> Result<WriteOutcome, ReportError> {
    let styles = Styles::report();
    let plan = AccrualsPlan::of(&report.accruals, limits);
    let mut writer = Writer::start(target, &report.facts, plan, &styles, limits)?;
    writer.accruals(&report.accruals)?;
    writer.finish(report)
}

/// The shape of one Accruals line, as far as the sheet's layout goes: its
/// minor units and which column groups it holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LineShape {
    /// The minor units of its currency.
    pub minor_units: u32,
    /// It shows a status and term ([`AccrualGroup::Life`]).
    pub life: bool,
    /// It splits interest into recognised and suspended ([`AccrualGroup::Suspense`]).
    pub suspense: bool,
    /// It has withholding tax ([`AccrualGroup::Tax`]).
    pub tax: bool,
}

impl LineShape {
    /// The shape of line `a`.
    pub fn of(a: &AccrualLine) -> LineShape {
        LineShape {
            minor_units: a.minor_units,
            life: AccrualGroup::Life.held_by(a),
            suspense: AccrualGroup::Suspense.held_by(a),
            tax: AccrualGroup::Tax.held_by(a),
        }
    }

    fn holds(self, g: AccrualGroup) -> bool {
        match g {
            AccrualGroup::Life => self.life,
            AccrualGroup::Suspense => self.suspense,
            AccrualGroup::Tax => self.tax,
        }
    }
}

/// What the Accruals' layout is decided from, counted line by line: the
/// column groups some line holds, and for each sheet of the list (the
/// spreadsheet's row limit splits it) how many lines have each minor units,
/// the one most of them have being the usual format of its amount columns.
/// Counting lines as they pass gives the same decisions as looking at them
/// all at once.
///
/// ```
/// use ledgerate::report::layout::Limits;
/// use ledgerate::report::workbook::{AccrualsPlan, LineShape};
/// let limits = Limits { rows_per_sheet: 3, ..Limits::default() }; // 2 lines a sheet
/// let line = |minor_units| LineShape { minor_units, life: false, suspense: false, tax: false };
/// let mut plan = AccrualsPlan::new(&limits);
/// for units in [0, 2, 2, 3, 0] {
///     plan.add(line(units));
/// }
/// // A tie goes to the fewer decimals: 0 on the first sheet, 2 on the
/// // second, 0 on the third.
/// assert_eq!(plan.usual_units(), vec![0, 2, 0]);
/// ```
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct AccrualsPlan {
    per_sheet: usize,
    lines: usize,
    groups: [bool; 3],
    /// Per sheet, lines by minor units (capped at the formats' most decimals).
    units: Vec<[usize; MAX_FORMAT_DECIMALS as usize + 1]>,
}

impl AccrualsPlan {
    /// No line yet, sheets of `limits`.
    pub fn new(limits: &Limits) -> AccrualsPlan {
        AccrualsPlan {
            per_sheet: limits.data_rows_per_sheet(),
            lines: 0,
            groups: [false; 3],
            units: Vec::new(),
        }
    }

    /// The plan of `rows`, all at once.
    pub fn of(rows: &[AccrualLine], limits: &Limits) -> AccrualsPlan {
        let mut plan = AccrualsPlan::new(limits);
        for a in rows {
            plan.add(LineShape::of(a));
        }
        plan
    }

    /// Counts the next line.
    pub fn add(&mut self, line: LineShape) {
        for (held, g) in self.groups.iter_mut().zip(AccrualGroup::ALL) {
            *held |= line.holds(g);
        }
        let sheet = self.lines / self.per_sheet.max(1);
        if self.units.len() <= sheet {
            self.units
                .resize(sheet + 1, [0; MAX_FORMAT_DECIMALS as usize + 1]);
        }
        let i = line.minor_units.min(MAX_FORMAT_DECIMALS) as usize;
        if let Some(n) = self.units.get_mut(sheet).and_then(|c| c.get_mut(i)) {
            *n += 1;
        }
        self.lines += 1;
    }

    /// The column groups the sheet shows: those some line holds (none
    /// without lines), in the order of [`AccrualGroup::ALL`].
    pub fn groups(&self) -> Vec<AccrualGroup> {
        AccrualGroup::ALL
            .into_iter()
            .zip(self.groups)
            .filter(|(_, held)| *held)
            .map(|(g, _)| g)
            .collect()
    }

    /// The usual minor units of each sheet's amounts (a sheet without lines
    /// gets 0, as [`usual_units`] gives for no rows); at least one sheet.
    pub fn usual_units(&self) -> Vec<u32> {
        let mut units: Vec<u32> = self.units.iter().map(|c| most_units(c)).collect();
        if units.is_empty() {
            units.push(0);
        }
        units
    }

    /// The usual units of sheet `index`.
    fn units_of(&self, index: usize) -> u32 {
        self.units.get(index).map_or(0, |c| most_units(c))
    }

    /// Whether the lines counted in `got` are laid out as this plan lays
    /// them out: the same groups, and each sheet they fill the same usual units.
    fn lays_out(&self, got: &AccrualsPlan) -> bool {
        self.groups() == got.groups()
            && (0..got.units.len().max(1)).all(|i| self.units_of(i) == got.units_of(i))
    }
}

/// The minor units with the most lines in `counts` (the fewest decimals of a tie).
fn most_units(counts: &[usize]) -> u32 {
    let mut best = (0u32, 0usize);
    for (u, &n) in (0u32..).zip(counts.iter()) {
        if n > best.1 {
            best = (u, n);
        }
    }
    best.0
}

/// A workbook written while the run still computes: the Accruals lines
/// come part by part as the batch adds them up ([`Writer::accruals`]),
/// then the rest of the report once the batch is done ([`Writer::finish`]).
/// The Accruals' layout is decided before the first line from an
/// [`AccrualsPlan`] of the lines to come; the same lines written part by
/// part or all at once give the same bytes.
pub struct Writer<'s> {
    wb: Workbook,
    target: PathBuf,
    dir: PathBuf,
    ctx: Ctx<'s>,
    accruals: AccrualsSheet<'s>,
}

impl<'s> Writer<'s> {
    /// Starts the workbook for `target`: its document properties (from
    /// `facts`' program, cut-off and run time), the Summary's place (filled
    /// last) and the first Accruals sheet with its header, laid out by `plan`.
    ///
    /// # Errors
    /// As [`write_report`]: an unusable target, or the writer's errors.
    pub fn start(
        target: &Path,
        facts: &RunFacts,
        plan: AccrualsPlan,
        styles: &'s Styles,
        limits: &Limits,
    ) -> Result<Writer<'s>, ReportError> {
        output::guarded(target, || {
            let dir = output::target_dir(target)?;
            output::check_not_input(target, &facts.inputs)?;
            let mut wb = new_workbook(facts, target, &dir)?;
            let mut ctx = Ctx {
                styles,
                texts: TextFigures::default(),
                limits: *limits,
                sheets: Vec::new(),
            };
            // Summary comes first but is filled last, once every text figure is known:
            // it is an ordinary (random-access) sheet; the lists are written strictly
            // in row order in constant memory.
            wb.add_worksheet()
                .set_name("Summary")
                .map_err(|e| ReportError::sheet("Summary", e))?;
            ctx.sheets.push(SheetRows {
                name: "Summary".into(),
                rows: 0,
            });
            let accruals = AccrualsSheet::start(&mut wb, plan, &mut ctx)?;
            Ok(Writer {
                wb,
                target: target.to_path_buf(),
                dir,
                ctx,
                accruals,
            })
        })
    }

    /// Writes the next Accruals lines, in book order, continuing on a
    /// numbered sheet at the row limit.
    ///
    /// # Errors
    /// The writer's errors, with the sheet and row.
    pub fn accruals(&mut self, lines: &[AccrualLine]) -> Result<(), ReportError> {
        let Writer {
            wb,
            target,
            ctx,
            accruals,
            ..
        } = self;
        output::guarded(target, || accruals.write(wb, lines, ctx))
    }

    /// Writes the rest of `report` (its Accruals lines are the ones given
    /// to [`Writer::accruals`]; `report.accruals` is not read) and puts the
    /// workbook in place.
    ///
    /// # Errors
    /// [`ReportError::PlanMissed`] when the lines given are not laid out as
    /// planned (nothing is written: write the workbook again from all the
    /// lines at once); else as [`write_report`].
    pub fn finish(self, report: &Report) -> Result<WriteOutcome, ReportError> {
        let Writer {
            mut wb,
            target,
            dir,
            mut ctx,
            accruals,
        } = self;
        output::guarded(&target, || {
            accruals.finish(&mut wb, &target, &mut ctx)?;
            write_rest(wb, report, &target, &dir, ctx)
        })
    }
}

/// The Accruals being written: its columns ([`ACCRUALS`], then the groups
/// of the plan), the sheet open for lines, and the lines counted so far.
struct AccrualsSheet<'s> {
    header: Vec<&'static str>,
    caps: Vec<usize>,
    notes: Vec<(ColNum, &'static str)>,
    /// Each group with its first column.
    placed: Vec<(AccrualGroup, ColNum)>,
    plan: AccrualsPlan,
    got: AccrualsPlan,
    /// The sheet being written: its index among the list's sheets, its
    /// column formats and its rows.
    index: usize,
    formats: Vec<Option<&'s Format>>,
    open: OpenPart,
}

impl<'s> AccrualsSheet<'s> {
    fn start(
        wb: &mut Workbook,
        plan: AccrualsPlan,
        ctx: &mut Ctx<'s>,
    ) -> Result<AccrualsSheet<'s>, ReportError> {
        let mut header: Vec<&str> = ACCRUALS.header.to_vec();
        let mut caps: Vec<usize> = ACCRUALS.caps.to_vec();
        let mut notes: Vec<(ColNum, &str)> = ACCRUALS.notes.to_vec();
        let mut placed = Vec::new();
        for g in plan.groups() {
            let first = ColNum::try_from(header.len()).unwrap_or(ColNum::MAX);
            if g == AccrualGroup::Suspense {
                notes.push((9, RECOGNISED_GLOSS));
            }
            notes.extend(
                g.notes()
                    .iter()
                    .map(|(i, n)| (first.saturating_add(*i), *n)),
            );
            header.extend_from_slice(g.header());
            caps.extend_from_slice(g.caps());
            placed.push((g, first));
        }
        notes.sort_by_key(|(col, _)| *col);
        let got = AccrualsPlan::new(&ctx.limits);
        let mut sheet = AccrualsSheet {
            header,
            caps,
            notes,
            placed,
            plan,
            got,
            index: 0,
            formats: Vec::new(),
            open: OpenPart {
                name: String::new(),
                rows: 0,
                widths: Vec::new(),
            },
        };
        sheet.open(wb, 0, ctx)?;
        Ok(sheet)
    }

    fn shape(&self) -> Shape<'_> {
        Shape {
            name: ACCRUALS.name,
            header: &self.header,
            caps: &self.caps,
            notes: &self.notes,
            footer: ACCRUALS.footer,
        }
    }

    /// Opens sheet `index` of the list, its formats from the plan.
    fn open(
        &mut self,
        wb: &mut Workbook,
        index: usize,
        ctx: &mut Ctx<'s>,
    ) -> Result<(), ReportError> {
        let styles = ctx.styles;
        let units = self.plan.units_of(index);
        let mut formats = accrual_formats(styles, units);
        for (g, _) in &self.placed {
            formats.extend(g.formats(styles, units));
        }
        self.open = open_part(wb, &self.shape(), index, &formats, ctx)?;
        self.formats = formats;
        self.index = index;
        Ok(())
    }

    /// Writes `lines` below the ones written, opening the next sheet at the row limit.
    fn write(
        &mut self,
        wb: &mut Workbook,
        mut lines: &[AccrualLine],
        ctx: &mut Ctx<'s>,
    ) -> Result<(), ReportError> {
        let per = ctx.limits.data_rows_per_sheet();
        while !lines.is_empty() {
            if self.open.rows >= per {
                let full = std::mem::replace(
                    &mut self.open,
                    OpenPart {
                        name: String::new(),
                        rows: 0,
                        widths: Vec::new(),
                    },
                );
                close_part(wb, &self.shape(), full, ctx)?;
                self.open(wb, self.index + 1, ctx)?;
            }
            let (now, later) = lines.split_at(lines.len().min(per - self.open.rows));
            for a in now {
                self.got.add(LineShape::of(a));
            }
            let placed = &self.placed;
            let row = |c: &mut Cells<'_>, a: &AccrualLine| {
                accrual_row(c, a)?;
                for (g, first) in placed {
                    g.write(c, a, *first)?;
                }
                Ok(())
            };
            let shape = Shape {
                name: ACCRUALS.name,
                header: &self.header,
                caps: &self.caps,
                notes: &self.notes,
                footer: ACCRUALS.footer,
            };
            write_part_rows(wb, &shape, &mut self.open, &self.formats, now, row, ctx)?;
            lines = later;
        }
        Ok(())
    }

    /// Closes the last sheet, once the lines written are known to be laid
    /// out as planned.
    fn finish(
        self,
        wb: &mut Workbook,
        target: &Path,
        ctx: &mut Ctx<'s>,
    ) -> Result<(), ReportError> {
        if !self.plan.lays_out(&self.got) {
            return Err(ReportError::PlanMissed(target.to_path_buf()));
        }
        let shape = Shape {
            name: ACCRUALS.name,
            header: &self.header,
            caps: &self.caps,
            notes: &self.notes,
            footer: ACCRUALS.footer,
        };
        close_part(wb, &shape, self.open, ctx)
    }
}

/// Every sheet after the Accruals, the Summary and the Run; then the
/// workbook is put in place.
fn write_rest(
    mut wb: Workbook,
    report: &Report,
    target: &Path,
    dir: &Path,
    mut ctx: Ctx<'_>,
) -> Result<WriteOutcome, ReportError> {
    let styles = ctx.styles;
    let recon_parts = write_lists(&mut wb, report, &mut ctx)?;
    let chart = (recon_parts > 0)
        .then(|| chart_plan(&report.reconciliation, &ctx.limits))
        .flatten();
    let summary = write_summary(
        summary_sheet(&mut wb)?,
        report,
        chart.as_ref(),
        styles,
        &mut ctx.texts,
    )?;

    // Run goes last but is built now, so that its figures join the note.
    let (run, run_rows) = run_sheet(report, styles, &mut ctx.texts)?;

    // Every figure is written by now: say once which ones are text, and
    // which texts were too long for a cell.
    let note = text_figure_problem(&ctx.texts, target);
    let cut_note = cut_text_problem(&ctx.texts, target);
    let problems: Vec<&Problem> = report
        .problems
        .iter()
        .chain(note.as_ref())
        .chain(cut_note.as_ref())
        .collect();
    write_list(&mut wb, &problems_sheet(), &problems, &mut ctx)?;

    finish_summary(
        summary_sheet(&mut wb)?,
        &summary,
        &problems,
        &ctx.texts,
        styles,
    )?;
    if let Some(s) = ctx.sheets.first_mut() {
        s.rows = usize::try_from(summary.rows_used).unwrap_or(usize::MAX);
    }
    wb.push_worksheet(run);
    ctx.sheets.push(SheetRows {
        name: "Run".into(),
        rows: usize::try_from(run_rows).unwrap_or(usize::MAX),
    });

    output::save_atomically(&mut wb, target, dir)?;
    Ok(WriteOutcome {
        path: target.to_path_buf(),
        sheets: ctx.sheets,
        text_figures: ctx.texts.listed,
        text_figure_count: ctx.texts.count,
        text_figure_problem: note,
        cut_text_problem: cut_note,
    })
}

/// An empty workbook with the run's document properties, spilling its
/// big sheets to scratch files in `dir` (the target's folder).
fn new_workbook(facts: &RunFacts, target: &Path, dir: &Path) -> Result<Workbook, ReportError> {
    let mut wb = Workbook::new();
    wb.set_tempdir(dir).map_err(|e| ReportError::Save {
        path: target.to_path_buf(),
        source: e,
    })?;
    wb.set_zip_compression_level(layout::ZIP_LEVEL);
    wb.set_properties(
        &DocProperties::new()
            .set_title("Interest accrual and reconciliation")
            .set_author(facts.program.as_str())
            .set_comment(format!("Cut-off {}", facts.cutoff))
            // The run time is the only time in the file: no clock is read.
            .set_creation_datetime(&facts.run_time),
    );
    Ok(wb)
}

/// The Reconciliation (when there are rows), Accrued check (when there are
/// rows), Tie-out (when the books have a trial balance), Journal, Journal
/// detail (when the report holds it) and Daily (when asked for) lists,
/// after the Accruals, filled side by side ([`side_by_side`]); returns how
/// many Reconciliation sheets there are.
fn write_lists(
    wb: &mut Workbook,
    report: &Report,
    ctx: &mut Ctx<'_>,
) -> Result<usize, ReportError> {
    let styles = ctx.styles;
    let per = ctx.limits.data_rows_per_sheet();
    let mut parts: Vec<side_by_side::Part<'_>> = Vec::new();
    let recon_parts = if report.reconciliation.is_empty() {
        0
    } else {
        let taxed = report.reconciliation.iter().any(|r| r.tax.is_some());
        let sheet = if taxed {
            &RECONCILIATION_TAX
        } else {
            &RECONCILIATION
        };
        list_parts(&mut parts, sheet, &report.reconciliation, styles, per)
    };
    if !report.accrued_check.is_empty() {
        list_parts(
            &mut parts,
            &ACCRUED_CHECK,
            &report.accrued_check,
            styles,
            per,
        );
    }
    if let Some(tie_out) = &report.tie_out {
        list_parts(&mut parts, &TIE_OUT, tie_out, styles, per);
    }
    list_parts(&mut parts, &JOURNAL, &report.journal, styles, per);
    if let Some(detail) = &report.journal_detail {
        add_parts(
            &mut parts,
            JOURNAL_DETAIL_SHAPE,
            &detail.rows,
            |s, part| detail_columns(s, detail, part),
            move |c: &mut Cells<'_>, r: &DetailRow| detail_row(c, detail, r),
            styles,
            per,
        );
    }
    if let Some(daily) = &report.daily {
        list_parts(&mut parts, &DAILY, daily, styles, per);
    }
    side_by_side::write_parts(wb, &parts, ctx)?;
    Ok(recon_parts)
}

/// Adds the parts of `list` holding `rows` to `parts`; returns how many.
fn list_parts<'r, T: Sync>(
    parts: &mut Vec<side_by_side::Part<'r>>,
    list: &'r ListSheet<T>,
    rows: &'r [T],
    styles: &'r Styles,
    per: usize,
) -> usize {
    add_parts(
        parts,
        list.shape(),
        rows,
        list.columns,
        list.row,
        styles,
        per,
    )
}

/// Adds to `parts` the sheets of `shape` that `rows` need (at least one),
/// each with its column formats from `columns` and its rows written by
/// `row`; returns how many.
fn add_parts<'r, T, C, R>(
    parts: &mut Vec<side_by_side::Part<'r>>,
    shape: Shape<'r>,
    rows: &'r [T],
    columns: C,
    row: R,
    styles: &'r Styles,
    per: usize,
) -> usize
where
    T: Sync,
    C: Fn(&'r Styles, &[T]) -> Vec<Option<&'r Format>>,
    R: Fn(&mut Cells<'_>, &T) -> Result<(), ReportError> + Sync + Copy + 'r,
{
    let mut chunks: Vec<&[T]> = rows.chunks(per.max(1)).collect();
    if chunks.is_empty() {
        chunks.push(&[]); // an empty list still gets its sheet and header
    }
    let count = chunks.len();
    for (index, chunk) in chunks.into_iter().enumerate() {
        parts.push(side_by_side::Part {
            shape,
            index,
            formats: columns(styles, chunk),
            rows: Box::new(side_by_side::RowsBy { rows: chunk, row }),
        });
    }
    count
}

/// The Summary, the workbook's first sheet.
fn summary_sheet(wb: &mut Workbook) -> Result<&mut Worksheet, ReportError> {
    wb.worksheet_from_index(0)
        .map_err(|e| ReportError::sheet("Summary", e))
}

/// State shared by the sheets of one workbook.
struct Ctx<'s> {
    styles: &'s Styles,
    texts: TextFigures,
    limits: Limits,
    sheets: Vec<SheetRows>,
}

/// What a list sheet is besides its rows: its name, its columns (label and
/// widest width), the notes on its header and its footer.
#[derive(Clone, Copy)]
struct Shape<'a> {
    name: &'a str,
    header: &'a [&'a str],
    caps: &'a [usize],
    notes: &'a [(ColNum, &'a str)],
    footer: Option<&'a str>,
}

/// A list sheet: its name, its columns (label and widest width) and how one
/// row is written.
struct ListSheet<T> {
    name: &'static str,
    header: &'static [&'static str],
    /// The widest each column gets; a column of long text (written in the
    /// wrapping format) is that wide when any of its texts is longer, and
    /// they wrap within it.
    caps: &'static [usize],
    /// Notes on header cells: what the column means.
    notes: &'static [(ColNum, &'static str)],
    /// Printed under each page, before the page number.
    footer: Option<&'static str>,
    row: fn(&mut Cells<'_>, &T) -> Result<(), ReportError>,
    /// The format each column carries as a whole, by column, for the rows of
    /// one part: the one most of its cells have (none where they differ).
    columns: for<'s> fn(&'s Styles, &[T]) -> Vec<Option<&'s Format>>,
}

const ACCRUALS: ListSheet<AccrualLine> = ListSheet {
    name: "Accruals",
    header: &ACCRUALS_HEADER,
    // GL codes: room for the longest default, ACCRUED-INTEREST-RECEIVABLE.
    caps: &[
        24, 32, 10, 12, 16, 18, 24, 24, 24, 24, 22, 24, 24, 18, 24, 24, 24, 24, 32, 32, 32, 32,
    ],
    notes: &[
        (11, WINDOW_DAYS_GLOSS),
        (12, BOOKED_OPENING_GLOSS),
        (14, PRIOR_PERIOD_GLOSS),
        (15, OPEN_ITEM_GLOSS),
    ],
    footer: None,
    row: accrual_row,
    columns: accrual_columns,
};

/// Widest widths of the Reconciliation's columns, and of the Accrued
/// check's, laid out alike.
const RECONCILIATION_CAPS: [usize; 12] = [24, 10, 14, 14, 10, 24, 24, 24, 24, 16, 20, 48];

const RECONCILIATION: ListSheet<ReconciliationLine> = ListSheet {
    name: "Reconciliation",
    header: &RECONCILIATION_HEADER,
    caps: &RECONCILIATION_CAPS,
    notes: &[
        (5, BALANCE_YEARS_GLOSS),
        (9, VARIANCE_BP_GLOSS),
        (11, LIKELY_CAUSE_GLOSS),
    ],
    footer: Some(BALANCE_YEARS_FOOTER),
    row: reconciliation_row,
    columns: reconciliation_columns,
};

/// The Reconciliation of a run with withholding tax: three columns more.
const RECONCILIATION_TAX: ListSheet<ReconciliationLine> = ListSheet {
    header: &RECONCILIATION_TAX_HEADER,
    caps: &[24, 10, 14, 14, 10, 24, 24, 24, 24, 16, 20, 48, 20, 20, 20],
    columns: reconciliation_tax_columns,
    ..RECONCILIATION
};

/// The Reconciliation's layout and row writer under the Accrued check's
/// labels: a row is the account's open item at cut-off, booked against expected.
const ACCRUED_CHECK: ListSheet<ReconciliationLine> = ListSheet {
    name: "Accrued check",
    header: &ACCRUED_CHECK_HEADER,
    notes: &[
        (5, BALANCE_YEARS_GLOSS),
        (6, ACCRUED_CHECK_GLOSS),
        (9, VARIANCE_BP_GLOSS),
        (11, BOOKED_CAUSE_GLOSS),
    ],
    ..RECONCILIATION
};

const TIE_OUT: ListSheet<TieOutLine> = ListSheet {
    name: "Tie-out",
    header: &TIE_OUT_HEADER,
    caps: &[24, 10, 32, 12, 10, 24, 24, 24, 24, 24, 24, 24, 24, 24, 18],
    notes: &[
        (7, OPENING_DIFFERENCE_GLOSS),
        (10, ROLL_FORWARD_GLOSS),
        (13, CLOSING_DIFFERENCE_GLOSS),
    ],
    footer: Some(TIE_OUT_FOOTER),
    row: tie_out_row,
    columns: tie_out_columns,
};

const JOURNAL: ListSheet<JournalLine> = ListSheet {
    name: "Journal",
    header: &JOURNAL_HEADER,
    // GL account: room for the longest default code, ACCRUED-INTEREST-RECEIVABLE.
    caps: &[14, 24, 10, 32, 24, 24, 48],
    notes: &[],
    footer: None,
    row: journal_row,
    columns: journal_columns,
};

const DAILY: ListSheet<DailyLine> = ListSheet {
    name: "Daily",
    header: &DAILY_HEADER,
    caps: &[24, 14, 24, 24, 12, 16, 24, 24],
    notes: &[(6, DAILY_INTEREST_GLOSS), (7, DAILY_ACCRUED_GLOSS)],
    footer: Some(DAILY_FOOTER),
    row: daily_row,
    columns: daily_columns,
};

const JOURNAL_DETAIL_SHAPE: Shape<'static> = Shape {
    name: JOURNAL_DETAIL,
    header: &JOURNAL_DETAIL_HEADER,
    caps: &[14, 24, 10, 32, 48, 24, 24, 24],
    notes: &[],
    footer: None,
};

/// The Daily sheet's interest, for the note of its header.
pub const DAILY_INTEREST_GLOSS: &str = "Interest: the day's interest, unrounded (unless the \
    account rounds each day), shown to 8 places so that a column of them adds up to what it \
    shows; postings round the sum.";

/// The Daily sheet's accrued, for the note of its header.
pub const DAILY_ACCRUED_GLOSS: &str = "Accrued: interest accrued since the last posting, \
    unrounded, shown to 8 places; the posting rounds it to the currency's minor units.";

/// Printed under each page of the Daily sheet.
pub const DAILY_FOOTER: &str = "Interest and Accrued are unrounded, shown to 8 places; \
    postings round them to the currency's minor units.";

/// The Problems list (a function: its rows borrow the report).
fn problems_sheet<'p>() -> ListSheet<&'p Problem> {
    ListSheet {
        name: "Problems",
        header: &PROBLEMS_HEADER,
        caps: &[10, 28, 16, 10, 36, 36, 48, 24],
        notes: &[],
        footer: None,
        row: problem_row,
        columns: problem_columns,
    }
}

impl<T> ListSheet<T> {
    /// What the list is besides its rows.
    fn shape(&self) -> Shape<'static> {
        Shape {
            name: self.name,
            header: self.header,
            caps: self.caps,
            notes: self.notes,
            footer: self.footer,
        }
    }
}

/// The height of one line of text in points (the default row's).
const LINE_HEIGHT: u32 = 15;

/// Writes a list over as many sheets as it needs; returns how many.
fn write_list<T: Sync>(
    wb: &mut Workbook,
    list: &ListSheet<T>,
    rows: &[T],
    ctx: &mut Ctx<'_>,
) -> Result<usize, ReportError> {
    let mut parts = Vec::new();
    let per = ctx.limits.data_rows_per_sheet();
    let count = list_parts(&mut parts, list, rows, ctx.styles, per);
    side_by_side::write_parts(wb, &parts, ctx)?;
    Ok(count)
}

/// A sheet of a list open for rows: its name, the rows written so far and
/// the widest cell of each column.
struct OpenPart {
    name: String,
    rows: usize,
    widths: Vec<usize>,
}

/// Adds part `index` of `list` (its sheet, settings, column formats and
/// header); its rows follow by [`write_part_rows`].
fn open_part(
    wb: &mut Workbook,
    list: &Shape,
    index: usize,
    formats: &[Option<&Format>],
    ctx: &mut Ctx<'_>,
) -> Result<OpenPart, ReportError> {
    open_part_first(wb, list, index, formats, None, ctx)
}

/// [`open_part`], giving the workbook the styles of `first` (every format
/// the part's writing will use, in order of first use: see
/// [`FormatOrder`]) before anything else, so that the part's rows may be
/// written later, beside another sheet's, and still number their styles
/// as when written one sheet after another.
fn open_part_first(
    wb: &mut Workbook,
    list: &Shape,
    index: usize,
    formats: &[Option<&Format>],
    first: Option<&FormatOrder>,
    ctx: &mut Ctx<'_>,
) -> Result<OpenPart, ReportError> {
    let name = part_name(list.name, index);
    let ws = wb
        .add_worksheet_with_constant_memory()
        .map_err(|e| ReportError::sheet(&name, e))?;
    ws.set_name(&name)
        .map_err(|e| ReportError::sheet(&name, e))?;
    // Sheet-wide settings first: the header row is flushed once row 1 starts.
    ws.set_freeze_panes(1, 0)
        .map_err(|e| ReportError::sheet(&name, e))?;
    layout::report_page_setup(ws, true, list.footer).map_err(|e| ReportError::sheet(&name, e))?;
    // A blank cell in each format takes the format's style number in turn;
    // the header then writes over the cell.
    for format in first.into_iter().flat_map(FormatOrder::formats) {
        ws.write_blank(0, 0, format)
            .map_err(|e| ReportError::sheet(&name, e))?;
    }
    let mut cells = Cells::new(ws, &name, ctx.styles, &mut ctx.texts);
    for (col, format) in (0..).zip(formats) {
        if let Some(format) = format {
            cells.column_format(col, format)?;
        }
    }
    // Left-aligned: a filter button sits at the right of each header cell.
    cells.at(0).list_header(list.header)?;
    for (col, gloss) in list.notes {
        let note = Note::new(*gloss)
            .add_author_prefix(false)
            .set_width(360)
            .set_height(110);
        cells
            .sheet()
            .insert_note(0, *col, &note)
            .map_err(|e| ReportError::sheet(&name, e))?;
    }
    // Every header row two lines tall: a label wraps over a column of
    // narrower figures (the spreadsheet does not size rows itself).
    cells
        .sheet()
        .set_row_height(0, 2 * LINE_HEIGHT)
        .map_err(|e| ReportError::sheet(&name, e))?;
    let widths = cells.into_widths();
    Ok(OpenPart {
        name,
        rows: 0,
        widths,
    })
}

/// Writes `rows` below the rows `part` has, each by `row`; `formats` are
/// the ones its columns were given when it opened.
fn write_part_rows<T, R>(
    wb: &mut Workbook,
    list: &Shape,
    part: &mut OpenPart,
    formats: &[Option<&Format>],
    rows: &[T],
    row: R,
    ctx: &mut Ctx<'_>,
) -> Result<(), ReportError>
where
    R: Fn(&mut Cells<'_>, &T) -> Result<(), ReportError>,
{
    let OpenPart {
        name,
        rows: written,
        widths,
    } = part;
    let ws = wb
        .worksheet_from_name(name)
        .map_err(|e| ReportError::sheet(name, e))?;
    let mut cells =
        Cells::new(ws, name, ctx.styles, &mut ctx.texts).with_widths(std::mem::take(widths));
    fill_rows(&mut cells, list, formats, rows, &row, written)?;
    *widths = cells.into_widths();
    Ok(())
}

/// Writes `rows` with `cells` below the `written` rows of its sheet, each
/// by `row`, counting them in `written`; `formats` are the ones its
/// columns were given when it opened.
fn fill_rows<'f, T, R>(
    cells: &mut Cells<'f>,
    list: &Shape,
    formats: &[Option<&'f Format>],
    rows: &[T],
    row: &R,
    written: &mut usize,
) -> Result<(), ReportError>
where
    R: Fn(&mut Cells<'_>, &T) -> Result<(), ReportError>,
{
    for (col, format) in (0..).zip(formats) {
        if let Some(format) = format {
            cells.carry(col, format);
        }
    }
    for (col, cap) in (0..).zip(list.caps.iter()) {
        // Prose is narrower than the digits a width counts: about 6
        // letters take the room of 5 digits.
        cells.wrap_at(col, cap.saturating_add(cap / 5));
    }
    for item in rows {
        let row_number = RowNum::try_from(*written)
            .unwrap_or(RowNum::MAX)
            .saturating_add(1);
        cells.at(row_number);
        row(cells, item)?;
        // A row with a wrapped text is as tall as its lines.
        let lines = cells.lines();
        if lines > 1 && !cells.is_recording() {
            let name = cells.sheet_name();
            cells
                .sheet()
                .set_row_height(row_number, lines.saturating_mul(LINE_HEIGHT))
                .map_err(|e| ReportError::sheet(name, e))?;
        }
        *written += 1;
    }
    Ok(())
}

/// Ends `part`: its filter over header and rows, its column widths, and
/// its entry among the workbook's sheets.
fn close_part(
    wb: &mut Workbook,
    list: &Shape,
    part: OpenPart,
    ctx: &mut Ctx<'_>,
) -> Result<(), ReportError> {
    let name = part.name;
    let ws = wb
        .worksheet_from_name(&name)
        .map_err(|e| ReportError::sheet(&name, e))?;
    let last_row = RowNum::try_from(part.rows).unwrap_or(RowNum::MAX);
    let last_col = ColNum::try_from(list.header.len().saturating_sub(1)).unwrap_or(0);
    ws.autofilter(0, 0, last_row, last_col)
        .map_err(|e| ReportError::sheet(&name, e))?;
    for (col, (label, cap)) in (0..).zip(list.header.iter().zip(list.caps.iter())) {
        let width = part.widths.get(usize::from(col)).copied().unwrap_or(0);
        ws.set_column_width(col, list_column_width(label, width, *cap))
            .map_err(|e| ReportError::sheet(&name, e))?;
    }
    ctx.sheets.push(SheetRows {
        name,
        rows: part.rows,
    });
    Ok(())
}

/// The minor units most rows of a part have (the fewest decimals of a tie),
/// for the formats its amount columns carry.
fn usual_units<T>(rows: &[T], units: impl Fn(&T) -> u32) -> u32 {
    let mut counts = [0usize; MAX_FORMAT_DECIMALS as usize + 1];
    for r in rows {
        let i = units(r).min(MAX_FORMAT_DECIMALS) as usize;
        if let Some(n) = counts.get_mut(i) {
            *n += 1;
        }
    }
    most_units(&counts)
}

fn accrual_columns<'s>(s: &'s Styles, rows: &[AccrualLine]) -> Vec<Option<&'s Format>> {
    accrual_formats(s, usual_units(rows, |r| r.minor_units))
}

/// The Accruals' column formats (before its groups), amounts in `units` decimals.
fn accrual_formats(s: &Styles, units: u32) -> Vec<Option<&Format>> {
    let amount = Some(s.amount(units));
    let text = Some(&s.text);
    let wrap = Some(&s.wrap);
    vec![
        text,
        wrap,
        text,
        text,
        text,
        text,
        amount,
        amount,
        amount,
        amount,
        Some(&s.percent),
        amount,
        amount,
        text,
        amount,
        amount,
        amount,
        wrap,
        text,
        text,
        text,
        text,
    ]
}

fn reconciliation_columns<'s>(
    s: &'s Styles,
    rows: &[ReconciliationLine],
) -> Vec<Option<&'s Format>> {
    let units = usual_units(rows, |r| r.minor_units);
    let amount = Some(s.amount(units));
    let text = Some(&s.text);
    vec![
        text,
        text,
        Some(&s.date),
        Some(&s.date),
        Some(&s.count),
        Some(s.balance_years(units)),
        amount,
        amount,
        amount,
        Some(&s.bp),
        None, // each status has its own fill
        Some(&s.wrap),
    ]
}

fn reconciliation_tax_columns<'s>(
    s: &'s Styles,
    rows: &[ReconciliationLine],
) -> Vec<Option<&'s Format>> {
    let mut columns = reconciliation_columns(s, rows);
    let amount = Some(s.amount(usual_units(rows, |r| r.minor_units)));
    columns.extend([amount; 3]);
    columns
}

fn tie_out_columns<'s>(s: &'s Styles, rows: &[TieOutLine]) -> Vec<Option<&'s Format>> {
    let amount = Some(s.amount(usual_units(rows, |r| r.minor_units)));
    let text = Some(&s.text);
    let mut columns = vec![Some(&s.wrap), text, text, text, Some(&s.count)];
    columns.extend([amount; 9]);
    columns.push(None); // each status has its own fill
    columns
}

fn journal_columns<'s>(s: &'s Styles, rows: &[JournalLine]) -> Vec<Option<&'s Format>> {
    let ledger = Some(s.ledger(usual_units(rows, |r| r.minor_units)));
    let text = Some(&s.text);
    let wrap = Some(&s.wrap);
    vec![Some(&s.date), wrap, text, text, ledger, ledger, wrap]
}

fn detail_columns<'s>(
    s: &'s Styles,
    detail: &JournalDetail,
    rows: &[DetailRow],
) -> Vec<Option<&'s Format>> {
    let units = usual_units(rows, |r| detail.line(r).map_or(2, |l| l.minor_units));
    let ledger = Some(s.ledger(units));
    let text = Some(&s.text);
    let wrap = Some(&s.wrap);
    vec![Some(&s.date), wrap, text, text, wrap, text, ledger, ledger]
}

fn daily_columns<'s>(s: &'s Styles, rows: &[DailyLine]) -> Vec<Option<&'s Format>> {
    let amount = Some(s.amount(usual_units(rows, |r| r.minor_units)));
    let unrounded = Some(s.amount(UNROUNDED_DECIMALS));
    vec![
        Some(&s.text),
        Some(&s.date),
        amount,
        amount,
        Some(&s.percent),
        Some(&s.day_fraction),
        unrounded,
        unrounded,
    ]
}

/// Problems: a short list, every cell in its own format.
fn problem_columns<'s>(_: &'s Styles, _: &[&Problem]) -> Vec<Option<&'s Format>> {
    Vec::new()
}

fn accrual_row(c: &mut Cells<'_>, a: &AccrualLine) -> Result<(), ReportError> {
    c.text(0, &a.account)?;
    c.text_as(1, &a.name, &c.styles().wrap)?;
    c.text(2, &a.currency)?;
    c.text(3, &a.side)?;
    c.text(4, &a.day_count)?;
    c.text(5, &a.compounding)?;
    c.amount(6, a.balance_at_cutoff, a.minor_units)?;
    c.amount(7, a.accrued_at_cutoff, a.minor_units)?;
    c.amount(8, a.posted_in_window, a.minor_units)?;
    c.amount(9, a.interest_for_window, a.minor_units)?;
    if let Some(rate) = a.effective_annual_rate {
        c.rate(10, rate)?;
    }
    let l = &a.ledger;
    let units = a.minor_units;
    c.amount(11, l.window_days_interest, units)?;
    c.amount(12, l.booked_opening, units)?;
    c.text(13, &l.opening_source)?;
    c.amount(14, l.prior_period, units)?;
    c.amount(15, l.open_item, units)?;
    c.amount(16, l.settled_in_window, units)?;
    c.text_as(17, &l.entity, &c.styles().wrap)?;
    c.text(18, &l.gl_interest)?;
    c.text(19, &l.gl_accrued)?;
    c.text(20, &l.gl_settlement)?;
    c.text(21, &l.gl_prior_period)?;
    Ok(())
}

fn tie_out_row(c: &mut Cells<'_>, t: &TieOutLine) -> Result<(), ReportError> {
    let styles = c.styles();
    let units = t.minor_units;
    c.text_as(0, &t.entity, &styles.wrap)?;
    c.text(1, &t.currency)?;
    c.text(2, &t.gl_account)?;
    c.text(3, &t.side)?;
    c.count(4, int(t.accounts))?;
    c.amount(5, t.opening_tb, units)?;
    c.amount(6, t.opening_sub_ledger, units)?;
    c.amount(7, t.opening_difference, units)?;
    c.amount(8, t.interest_for_window, units)?;
    c.amount(9, t.settled_in_window, units)?;
    c.amount(10, t.closing_roll_forward, units)?;
    c.amount(11, t.closing_sub_ledger, units)?;
    // Blank without a trial balance row at the cut-off.
    if let Some(tb) = t.closing_tb {
        c.amount(12, tb, units)?;
    }
    c.amount(13, t.closing_difference, units)?;
    c.text_as(14, t.status.name(), styles.tie_status(t.status))?;
    Ok(())
}

fn reconciliation_row(c: &mut Cells<'_>, r: &ReconciliationLine) -> Result<(), ReportError> {
    let styles = c.styles();
    c.text(0, &r.account)?;
    c.text(1, &r.currency)?;
    if let Some(d) = r.period_start {
        c.date(2, d)?;
    }
    if let Some(d) = r.period_end {
        c.date(3, d)?;
    }
    // A statement row that could not be read has no figures: blank, not 0.
    if r.status != Status::StatementUnreadable {
        c.count(4, i128::from(r.days))?;
        c.balance_years(5, r.balance_years, r.minor_units)?;
        c.amount(6, r.expected, r.minor_units)?;
        c.amount(7, r.posted, r.minor_units)?;
        c.amount(8, r.variance, r.minor_units)?;
    }
    if let Some(bp) = r.variance_bp {
        c.bp(9, bp)?;
    }
    c.text_as(10, r.status.name(), styles.status(r.status))?;
    c.text_as(11, &r.likely_cause, &styles.wrap)?;
    // Withholding tax: posted tax and variance blank without tax_withheld.
    if let Some(tax) = &r.tax {
        c.amount(12, tax.expected, r.minor_units)?;
        if let (Some(posted), Some(variance)) = (tax.posted, tax.variance) {
            c.amount(13, posted, r.minor_units)?;
            c.amount(14, variance, r.minor_units)?;
        }
    }
    Ok(())
}

fn journal_row(c: &mut Cells<'_>, j: &JournalLine) -> Result<(), ReportError> {
    c.date(0, j.date)?;
    c.text_as(1, &j.entity, &c.styles().wrap)?;
    c.text(2, &j.currency)?;
    c.text(3, &j.gl_account)?;
    c.ledger_amount(4, j.debit, j.minor_units)?;
    c.ledger_amount(5, j.credit, j.minor_units)?;
    c.text_as(6, &j.memo, &c.styles().wrap)?;
    Ok(())
}

/// One account's share of one journal line, debit or credit as the line
/// nets it.
fn detail_row(c: &mut Cells<'_>, detail: &JournalDetail, r: &DetailRow) -> Result<(), ReportError> {
    let Some(line) = detail.line(r) else {
        return Err(ReportError::Internal(format!(
            "a Journal detail row names line {} of {}",
            r.line,
            detail.lines.len()
        )));
    };
    let wrap = &c.styles().wrap;
    c.date(0, line.date)?;
    c.text_as(1, &line.entity, wrap)?;
    c.text(2, &line.currency)?;
    c.text(3, &line.gl_account)?;
    c.text_as(4, &line.memo, wrap)?;
    c.text(5, detail.account(r))?;
    let (debit, credit) = r.sides(line.minor_units);
    c.ledger_amount(6, debit, line.minor_units)?;
    c.ledger_amount(7, credit, line.minor_units)?;
    Ok(())
}

fn daily_row(c: &mut Cells<'_>, d: &DailyLine) -> Result<(), ReportError> {
    c.text(0, &d.account)?;
    c.date(1, d.date)?;
    c.amount(2, d.balance, d.minor_units)?;
    c.unrounded_amount(3, d.base, d.minor_units)?;
    c.rate(4, d.rate)?;
    c.day_fraction(5, d.day_fraction)?;
    c.unrounded_amount_shown(6, d.interest, d.minor_units, UNROUNDED_DECIMALS)?;
    c.unrounded_amount_shown(7, d.accrued, d.minor_units, UNROUNDED_DECIMALS)?;
    Ok(())
}

fn problem_row(c: &mut Cells<'_>, p: &&Problem) -> Result<(), ReportError> {
    let styles = c.styles();
    let severity = p.severity.name();
    c.text_as(
        0,
        severity,
        styles.severity(p.severity).unwrap_or(&styles.text),
    )?;
    c.text_as(1, &p.position.book, &styles.wrap)?;
    // A CSV book's file and line, as the terminal shows them.
    c.text(2, &p.position.sheet_shown())?;
    c.text(3, &p.position.cell_shown())?;
    // Long explanations wrap inside their capped columns.
    c.text_as(4, &p.found, &styles.wrap)?;
    c.text_as(5, &p.expected, &styles.wrap)?;
    c.text_as(6, &p.fix, &styles.wrap)?;
    if let Some(account) = &p.account {
        c.text(7, account)?;
    }
    Ok(())
}

/// Cells of the text figures named in the note, at most.
const NOTE_CELLS: usize = 10;

/// The one Problems row that says which figures are text.
fn text_figure_problem(texts: &TextFigures, target: &Path) -> Option<Problem> {
    let first = texts.listed.first()?;
    let cells = named_cells(&texts.listed, texts.count);
    Some(Problem {
        severity: Severity::Warning,
        position: Position {
            book: output_name(target),
            sheet: first.sheet.clone(),
            cell: first.cell.clone(),
            ..Position::default()
        },
        account: None,
        found: first.text.clone(),
        expected: text_figure_expected(),
        fix: format!(
            "{} figure{} written as text, right-aligned, so that no digit is lost ({}); \
             spreadsheet sums skip text cells, so add these figures separately",
            texts.count,
            if texts.count == 1 { " is" } else { "s are" },
            cells.join(", ")
        ),
        follows: None,
    })
}

/// The one Problems row that says which texts were cut to fit a cell. Texts
/// of the Problems sheet itself are written after it and are not listed.
fn cut_text_problem(texts: &TextFigures, target: &Path) -> Option<Problem> {
    let first = texts.cut.first()?;
    let cells = named_cells(&texts.cut, texts.cut_count);
    Some(Problem {
        severity: Severity::Warning,
        position: Position {
            book: output_name(target),
            sheet: first.sheet.clone(),
            cell: first.cell.clone(),
            ..Position::default()
        },
        account: None,
        found: format!("{}…", first.text),
        expected: cut_text_expected(),
        fix: format!(
            "{} text{} cut to fit, ending in … ({}); the input keeps the whole text, so shorten it there if the cut matters",
            texts.cut_count,
            if texts.cut_count == 1 { " is" } else { "s are" },
            cells.join(", ")
        ),
        follows: None,
    })
}

fn text_figure_expected() -> String {
    format!(
        "a figure of at most {EXACT_DIGITS} significant digits, which a spreadsheet number holds exactly"
    )
}

fn cut_text_expected() -> String {
    format!(
        "a text of at most {} characters, which a spreadsheet cell holds",
        super::cells::MAX_CELL_CHARS
    )
}

/// Whether a problem is one of the notes the writer adds to the Problems
/// sheet itself (figures written as text, texts cut to fit): a workbook
/// read back leaves them out, since writing it again makes them anew.
pub(crate) fn is_writer_note(p: &Problem) -> bool {
    p.expected == text_figure_expected() || p.expected == cut_text_expected()
}

/// The first cells of `listed` as `Sheet!A1`, and how many more of `count`.
fn named_cells(listed: &[TextFigure], count: usize) -> Vec<String> {
    let mut cells: Vec<String> = listed
        .iter()
        .take(NOTE_CELLS)
        .map(|t| format!("{}!{}", sheet_ref(&t.sheet), t.cell))
        .collect();
    if count > cells.len() {
        cells.push(format!("and {} more", count - cells.len()));
    }
    cells
}

/// The output's file name, as the Problems sheet's Book column shows it.
fn output_name(target: &Path) -> String {
    target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| target.display().to_string())
}

/// The bars of the Summary chart: rows outside tolerance with a variance in
/// basis points, on the first Reconciliation sheet that has any.
struct ChartPlan {
    sheet: String,
    /// Runs of consecutive 0-based sheet rows.
    runs: Vec<(RowNum, RowNum)>,
    shown: usize,
    total: usize,
}

/// The longest reference a chart series may use (the spreadsheet's limit).
const MAX_SERIES_REF: usize = 255;

fn chart_plan(rows: &[ReconciliationLine], limits: &Limits) -> Option<ChartPlan> {
    let outside: Vec<usize> = rows
        .iter()
        .enumerate()
        .filter(|(_, r)| r.status.outside_tolerance() && r.variance_bp.is_some())
        .map(|(i, _)| i)
        .collect();
    let total = outside.len();
    let first_part = place(*outside.first()?, limits).0;
    let sheet = part_name("Reconciliation", first_part);
    let mut runs: Vec<(RowNum, RowNum)> = Vec::new();
    let mut shown = 0;
    for &i in &outside {
        let (part, row) = place(i, limits);
        if part != first_part || shown >= limits.chart_points {
            break;
        }
        let mut next = runs.clone();
        match next.last_mut() {
            Some((_, last)) if last.saturating_add(1) == row => *last = row,
            _ => next.push((row, row)),
        }
        if series_ref(&sheet, &next, 9).len() > MAX_SERIES_REF {
            break;
        }
        runs = next;
        shown += 1;
    }
    Some(ChartPlan {
        sheet,
        runs,
        shown,
        total,
    })
}

/// The chart plan as (sheet, value reference, bars shown, rows outside tolerance).
#[cfg(test)]
pub(crate) fn chart_plan_for_tests(
    rows: &[ReconciliationLine],
    limits: &Limits,
) -> Option<(String, String, usize, usize)> {
    chart_plan(rows, limits).map(|p| {
        let reference = series_ref(&p.sheet, &p.runs, 9);
        (p.sheet, reference, p.shown, p.total)
    })
}

/// A series reference over the runs of column `col`: a plain range for one
/// run, a union `=(A,B,...)` for several.
fn series_ref(sheet: &str, runs: &[(RowNum, RowNum)], col: ColNum) -> String {
    let name = sheet_ref(sheet);
    let column = rust_xlsxwriter::utility::column_number_to_name(col);
    let parts: Vec<String> = runs
        .iter()
        .map(|(a, b)| {
            if a == b {
                format!("{name}!${column}${}", a.saturating_add(1))
            } else {
                format!(
                    "{name}!${column}${}:${column}${}",
                    a.saturating_add(1),
                    b.saturating_add(1)
                )
            }
        })
        .collect();
    if parts.len() == 1 {
        parts.concat()
    } else {
        format!("=({})", parts.join(","))
    }
}

fn chart_range(plan: &ChartPlan, col: ColNum) -> ChartRange {
    match plan.runs.as_slice() {
        [(a, b)] => ChartRange::new_from_range(&plan.sheet, *a, col, *b, col),
        runs => ChartRange::new_from_string(&series_ref(&plan.sheet, runs, col)),
    }
}

/// Where the Summary's late cells go.
struct SummaryPlaces {
    errors: RowNum,
    warnings: RowNum,
    notes: RowNum,
    text_figures: RowNum,
    rows_used: RowNum,
}

pub(crate) const SUMMARY_COLS: ColNum = 8;

/// The Summary's columns: one more for the tax withheld in a run with
/// withholding tax.
fn summary_cols(taxed: bool) -> ColNum {
    if taxed {
        SUMMARY_COLS + 1
    } else {
        SUMMARY_COLS
    }
}

/// The Summary: title and caution, the run's facts, the accounts left out,
/// totals by currency and side, counts by status, widths and the variance
/// chart. The problem and text
/// figure counts are left to [`finish_summary`]; their places are returned.
fn write_summary(
    ws: &mut Worksheet,
    report: &Report,
    chart: Option<&ChartPlan>,
    styles: &Styles,
    texts: &mut TextFigures,
) -> Result<SummaryPlaces, ReportError> {
    layout::report_page_setup(ws, false, None).map_err(|e| ReportError::sheet("Summary", e))?;
    let mut c = Cells::new(ws, "Summary", styles, texts);
    summary_title(&mut c)?;
    let mut places = summary_facts(&mut c, &report.facts, report.tie_out.as_deref())?;
    let row = summary_left_out(&mut c, places.text_figures, report)?;
    let row = summary_totals(&mut c, row, &report.totals)?;
    let row = summary_status_counts(&mut c, row, &report.status_counts)?;
    let row = summary_largest_variances(&mut c, row, report)?;
    summary_widths(
        &mut c,
        report.totals.iter().any(|t| t.tax_withheld.is_some()),
    )?;
    // The chart goes under the tables, within their width, so that the
    // printed page keeps its size.
    if let Some(plan) = chart {
        c.sheet()
            .insert_chart(row.saturating_add(2), 0, &variance_chart(plan))
            .map_err(|e| ReportError::sheet("Summary", e))?;
    }
    places.rows_used = row.saturating_add(1);
    Ok(places)
}

/// The title and the caution under it.
fn summary_title(c: &mut Cells<'_>) -> Result<(), ReportError> {
    let styles = c.styles();
    c.at(0).text_spilling(
        0,
        "Interest accrual and reconciliation: summary",
        &styles.title,
    )?;
    c.sheet()
        .merge_range(1, 0, 4, SUMMARY_COLS - 1, CAUTION, &styles.caution)
        .map_err(|e| ReportError::sheet("Summary", e))?;
    Ok(())
}

/// The Run section: the window, the books and the account counts, how the
/// Tie-out stands (when there is one), and the labels of the counts
/// [`finish_summary`] fills in. `rows_used` is the last row written.
fn summary_facts(
    c: &mut Cells<'_>,
    facts: &RunFacts,
    tie_out: Option<&[TieOutLine]>,
) -> Result<SummaryPlaces, ReportError> {
    let styles = c.styles();
    let mut row: RowNum = 6;
    section(c, row, "Run", SUMMARY_COLS)?;
    row += 1;
    let label = |c: &mut Cells<'_>, row: RowNum, text: &str| -> Result<(), ReportError> {
        c.at(row).text_as(0, text, &styles.label)
    };
    label(c, row, "Cut-off")?;
    c.date(1, facts.cutoff)?;
    row += 1;
    label(c, row, "Window from")?;
    c.date(1, facts.window_start)?;
    row += 1;
    label(c, row, "Window to")?;
    c.date(1, facts.cutoff)?;
    row += 1;
    label(c, row, "Books")?;
    c.count(1, int(facts.inputs.len()))?;
    for input in &facts.inputs {
        row += 1;
        label(c, row, "Book")?;
        c.text_spilling(1, &input.path, &styles.text)?;
    }
    row += 1;
    label(c, row, ACCOUNTS_READ)?;
    c.count(1, int(facts.accounts_read))?;
    row += 1;
    label(c, row, ACCOUNTS_COMPUTED)?;
    c.count(1, int(facts.accounts_computed))?;
    row += 1;
    label(c, row, ACCOUNTS_LEFT_OUT)?;
    c.count(1, int(facts.accounts_not_computed()))?;
    row += 1;
    label(c, row, ACCOUNTS_LEFT_OUT_BY_BOOKS)?;
    c.count(1, int(facts.accounts_left_out))?;
    row += 1;
    label(c, row, ACCOUNTS_FAILED)?;
    c.count(1, int(facts.accounts_failed))?;
    if let Some(lines) = tie_out {
        row += 1;
        label(c, row, TIE_OUT_LABEL)?;
        c.text_spilling(1, &tie_out_in_words(lines), &styles.text)?;
    }
    let mut late = |text: &str| -> Result<RowNum, ReportError> {
        row += 1;
        label(c, row, text)?;
        Ok(row)
    };
    let errors = late("Problems: errors")?;
    let warnings = late("Problems: warnings")?;
    let notes = late("Problems: notes")?;
    let text_figures = late("Figures written as text")?;
    Ok(SummaryPlaces {
        errors,
        warnings,
        notes,
        text_figures,
        rows_used: text_figures,
    })
}

/// How the Tie-out stands, in a few words: how many GL accounts, and how
/// many of them differ or are within tolerance.
///
/// ```
/// use ledgerate::report::workbook::tie_out_words;
/// use ledgerate::report::model::TieStatus::*;
/// assert_eq!(tie_out_words(&[Agrees, Agrees, Agrees]), "3 GL accounts, all agree");
/// assert_eq!(tie_out_words(&[Agrees]), "1 GL account, agrees");
/// assert_eq!(
///     tie_out_words(&[Differs, WithinTolerance, Agrees]),
///     "3 GL accounts: 1 differs, 1 within tolerance, 1 agrees"
/// );
/// assert_eq!(
///     tie_out_words(&[Differs, Agrees, Differs, Agrees]),
///     "4 GL accounts: 2 differ, 2 agree"
/// );
/// assert_eq!(tie_out_words(&[]), "no GL account to tie");
/// ```
pub fn tie_out_words(statuses: &[TieStatus]) -> String {
    let n = statuses.len();
    if n == 0 {
        return "no GL account to tie".to_string();
    }
    let accounts = format!("{n} GL account{}", if n == 1 { "" } else { "s" });
    if statuses.iter().all(|s| *s == TieStatus::Agrees) {
        let all = if n == 1 { "agrees" } else { "all agree" };
        return format!("{accounts}, {all}");
    }
    // The ones to look at first.
    let counts: Vec<String> = [
        TieStatus::Differs,
        TieStatus::WithinTolerance,
        TieStatus::Agrees,
    ]
    .into_iter()
    .filter_map(|status| {
        let k = statuses.iter().filter(|s| **s == status).count();
        let word = match (status, k) {
            (TieStatus::Differs, 2..) => "differ",
            (TieStatus::Agrees, 2..) => "agree",
            _ => status.name(),
        };
        (k > 0).then(|| format!("{k} {word}"))
    })
    .collect();
    format!("{accounts}: {}", counts.join(", "))
}

fn tie_out_in_words(lines: &[TieOutLine]) -> String {
    let statuses: Vec<TieStatus> = lines.iter().map(|l| l.status).collect();
    tie_out_words(&statuses)
}

/// The accounts left out (none without any), from two rows below `row`:
/// the first [`LEFT_OUT_SHOWN`], each with the error that kept it out, then
/// how many more there are; returns the last row written.
fn summary_left_out(
    c: &mut Cells<'_>,
    row: RowNum,
    report: &Report,
) -> Result<RowNum, ReportError> {
    let total = report.facts.accounts_not_computed();
    if total == 0 {
        return Ok(row);
    }
    let styles = c.styles();
    let mut row = row + 2;
    section(c, row, LEFT_OUT_TITLE, SUMMARY_COLS)?;
    row += 1;
    c.at(row).header(&LEFT_OUT_HEADER, &[])?;
    let shown: Vec<&LeftOutLine> = report.left_out.iter().take(LEFT_OUT_SHOWN).collect();
    for l in &shown {
        row += 1;
        c.at(row).text(0, &l.account)?;
        c.text(1, &l.position.book)?;
        c.text(2, &l.position.sheet_shown())?;
        c.text(3, &l.position.cell_shown())?;
        c.text_spilling(4, &l.error, &styles.text)?;
    }
    let more = total.saturating_sub(shown.len());
    row += 2;
    let every = if more > 0 {
        format!(
            "and {more} more: every account left out is an error row of the Problems sheet, with its id in the Account column"
        )
    } else {
        "Every one is an error row of the Problems sheet, with its id in the Account column."
            .to_string()
    };
    c.at(row).text_spilling(0, &every, &styles.text)?;
    Ok(row)
}

/// Totals by currency and side, from two rows below `row`; returns the last
/// row written.
fn summary_totals(
    c: &mut Cells<'_>,
    row: RowNum,
    totals: &[CurrencyTotal],
) -> Result<RowNum, ReportError> {
    let styles = c.styles();
    let mut row = row + 2;
    // A run with withholding tax adds the tax column after the others; a
    // run without writes the table as before.
    let taxed = totals.iter().any(|t| t.tax_withheld.is_some());
    section(c, row, TOTALS_TITLE, summary_cols(taxed))?;
    row += 1;
    if taxed {
        let mut header = TOTALS_HEADER.to_vec();
        header.push(TOTALS_TAX_HEADER);
        c.at(row).header(&header, &[2, 3, 4, 5, 6, 7, 8])?;
    } else {
        c.at(row).header(&TOTALS_HEADER, &[2, 3, 4, 5, 6, 7])?;
    }
    for t in totals {
        row += 1;
        c.at(row).text(0, &t.currency)?;
        c.text(1, &t.side)?;
        c.count(2, int(t.accounts))?;
        c.amount(3, t.balance_at_cutoff, t.minor_units)?;
        c.amount(4, t.accrued_at_cutoff, t.minor_units)?;
        c.amount(5, t.posted_in_window, t.minor_units)?;
        c.amount(6, t.interest_for_window, t.minor_units)?;
        c.amount(7, t.prior_period, t.minor_units)?;
        if let Some(tax) = t.tax_withheld {
            c.amount(8, tax, t.minor_units)?;
        }
    }
    if !totals.is_empty() {
        row += 1;
        c.at(row).text_spilling(0, TOTALS_GLOSS, &styles.text)?;
    }
    Ok(row)
}

/// Counts by status (none without statement rows), from two rows below
/// `row`; returns the last row written.
fn summary_status_counts(
    c: &mut Cells<'_>,
    row: RowNum,
    counts: &[StatusCount],
) -> Result<RowNum, ReportError> {
    if counts.is_empty() {
        return Ok(row);
    }
    let styles = c.styles();
    let mut row = row + 2;
    section(c, row, "Counts by status", 2)?;
    row += 1;
    c.at(row).header(&["Status", "Rows"], &[1])?;
    for s in counts {
        row += 1;
        c.at(row)
            .text_as(0, s.status.name(), styles.status(s.status))?;
        c.count(1, int(s.rows))?;
    }
    Ok(row)
}

/// Header labels of the Summary's largest variances in money.
pub const LARGEST_VARIANCES_HEADER: [&str; 6] = [
    "Currency",
    "Account",
    "Period end",
    "Variance",
    "Variance (bp)",
    "Status",
];

/// The title of the Summary's largest variances in money.
pub const LARGEST_VARIANCES_TITLE: &str = "Largest variances in money, by currency";

/// The largest variances in money by currency, as the report chose them,
/// and the gloss of balance-years (none without reconciliation rows), from
/// two rows below `row`; returns the last row written.
fn summary_largest_variances(
    c: &mut Cells<'_>,
    row: RowNum,
    report: &Report,
) -> Result<RowNum, ReportError> {
    if report.reconciliation.is_empty() {
        return Ok(row);
    }
    let styles = c.styles();
    let mut row = row + 2;
    // The table, the gloss and the chart print together on a page of their own.
    c.sheet()
        .set_page_breaks(&[row])
        .map_err(|e| ReportError::sheet("Summary", e))?;
    section(c, row, LARGEST_VARIANCES_TITLE, SUMMARY_COLS)?;
    if report.largest_variances.is_empty() {
        row += 1;
        c.at(row)
            .text_spilling(0, "No row is outside tolerance.", &styles.text)?;
    } else {
        row += 1;
        c.at(row).header(&LARGEST_VARIANCES_HEADER, &[2, 3, 4])?;
        for r in report
            .largest_variances
            .iter()
            .filter_map(|&i| report.reconciliation.get(i))
        {
            row += 1;
            c.at(row).text(0, &r.currency)?;
            c.text(1, &r.account)?;
            if let Some(d) = r.period_end {
                c.date(2, d)?;
            }
            c.amount(3, r.variance, r.minor_units)?;
            if let Some(bp) = r.variance_bp {
                c.bp(4, bp)?;
            }
            c.text_as(5, r.status.name(), styles.status(r.status))?;
        }
    }
    row += 2;
    c.sheet()
        .merge_range(
            row,
            0,
            row.saturating_add(1),
            SUMMARY_COLS - 1,
            BALANCE_YEARS_GLOSS,
            &styles.wrap,
        )
        .map_err(|e| ReportError::sheet("Summary", e))?;
    Ok(row.saturating_add(1))
}

/// Widths: labels and codes in A, figures in B..F (and I, the tax withheld,
/// in a `taxed` run); and the caution's rows tall enough for its lines at
/// these widths.
fn summary_widths(c: &mut Cells<'_>, taxed: bool) -> Result<(), ReportError> {
    let widths: Vec<u16> =
        (0..summary_cols(taxed))
            .map(|col| {
                let header = TOTALS_HEADER.get(usize::from(col)).copied().unwrap_or(
                    if col == SUMMARY_COLS {
                        TOTALS_TAX_HEADER
                    } else {
                        ""
                    },
                );
                let floor = if col == 0 { 28 } else { 14 };
                column_width(header, c.width(col).max(floor), 40)
            })
            .collect();
    for (col, width) in (0..).zip(widths) {
        c.sheet()
            .set_column_width(col, width)
            .map_err(|e| ReportError::sheet("Summary", e))?;
    }
    for r in 1..=4 {
        c.sheet()
            .set_row_height(r, 18)
            .map_err(|e| ReportError::sheet("Summary", e))?;
    }
    Ok(())
}

/// The column chart of the variances (bp) of the rows outside tolerance.
fn variance_chart(plan: &ChartPlan) -> Chart {
    let mut ch = Chart::new_column();
    let series = ch.add_series();
    series
        .set_categories(&chart_range(plan, 0))
        .set_values(&chart_range(plan, 9))
        .set_name("Variance (bp)")
        .set_format(
            ChartFormat::new()
                .set_solid_fill(ChartSolidFill::new().set_color(Color::RGB(layout::palette::BAR))),
        )
        .set_invert_if_negative()
        .set_invert_if_negative_color(Color::RGB(layout::palette::BAR_NEGATIVE));
    let title = if plan.shown == plan.total {
        "Variance (bp) of the rows outside tolerance (in money: the table above)".to_string()
    } else {
        format!(
            "Variance (bp): the first {} of {} rows outside tolerance",
            plan.shown, plan.total
        )
    };
    ch.title().set_name(&title);
    ch.x_axis()
        .set_name("Account")
        .set_label_position(ChartAxisLabelPosition::Low);
    ch.y_axis().set_name("Basis points").set_num_format("0.00");
    ch.legend().set_hidden();
    ch.set_width(640).set_height(320);
    ch
}

/// A section heading underlined over `cols` columns.
fn section(c: &mut Cells<'_>, row: RowNum, title: &str, cols: ColNum) -> Result<(), ReportError> {
    let styles = c.styles();
    c.at(row).text_spilling(0, title, &styles.section)?;
    for col in 1..cols {
        c.blank(col, &styles.section)?;
    }
    Ok(())
}

/// The Summary's counts that depend on the Problems sheet.
fn finish_summary(
    ws: &mut Worksheet,
    places: &SummaryPlaces,
    problems: &[&Problem],
    texts: &TextFigures,
    styles: &Styles,
) -> Result<(), ReportError> {
    let count = |s: Severity| int(problems.iter().filter(|p| p.severity == s).count());
    let mut scratch = TextFigures::default();
    let mut c = Cells::new(ws, "Summary", styles, &mut scratch);
    c.at(places.errors).count(1, count(Severity::Error))?;
    c.at(places.warnings).count(1, count(Severity::Warning))?;
    c.at(places.notes).count(1, count(Severity::Note))?;
    c.at(places.text_figures).count(1, int(texts.count))?;
    Ok(())
}

/// The Run sheet, built apart from the workbook (it is pushed last), and
/// the rows it uses.
fn run_sheet(
    report: &Report,
    styles: &Styles,
    texts: &mut TextFigures,
) -> Result<(Worksheet, RowNum), ReportError> {
    let mut run = Worksheet::new();
    run.set_name("Run")
        .map_err(|e| ReportError::sheet("Run", e))?;
    let rows = write_run(&mut run, report, styles, texts)?;
    Ok((run, rows))
}

fn write_run(
    ws: &mut Worksheet,
    report: &Report,
    styles: &Styles,
    texts: &mut TextFigures,
) -> Result<RowNum, ReportError> {
    let facts = &report.facts;
    layout::report_page_setup(ws, false, None).map_err(|e| ReportError::sheet("Run", e))?;
    let mut c = Cells::new(ws, "Run", styles, texts);
    c.at(0).header(&["Item", "Value"], &[])?;
    c.at(1).text(0, RUN_PROGRAM)?;
    c.text(1, &facts.program)?;
    c.at(2).text(0, RUN_COMMAND_LINE)?;
    c.text_spilling(1, &facts.command_line, &styles.text)?;
    c.at(3).text(0, RUN_TIME)?;
    c.datetime(1, facts.run_time)?;

    let mut row: RowNum = 5;
    c.at(row).header(&INPUTS_HEADER, &[1])?;
    for input in &facts.inputs {
        row += 1;
        c.at(row).text(0, &input.path)?;
        c.count(1, i128::from(input.size))?;
        c.text(2, &input.sha256)?;
    }
    row += 2;
    c.at(row).header(&SETTINGS_HEADER, &[])?;
    for s in &facts.settings {
        row += 1;
        c.at(row).text(0, &s.name)?;
        c.text(1, &s.value)?;
        c.text(2, s.source.name())?;
    }
    let widths = [
        column_width(RUN_TIME, c.width(0), 60),
        column_width("Size (bytes)", c.width(1).max(20), 40),
        column_width("SHA-256", c.width(2), 70),
    ];
    for (col, width) in (0..).zip(widths) {
        c.sheet()
            .set_column_width(col, width)
            .map_err(|e| ReportError::sheet("Run", e))?;
    }
    Ok(row.saturating_add(1))
}

/// A count as the border's integer.
fn int(n: usize) -> i128 {
    i128::try_from(n).unwrap_or(i128::MAX)
}
