//! The list sheets after the Accruals, filled side by side on the
//! machine's cores, giving the same file as filling them one after another.
//!
//! The spreadsheet library numbers the workbook's cell styles in the order
//! they are first used. So before any row is written, every part of every
//! list but the last is measured once without writing, side by side
//! ([`Cells::recording`]): the formats it will use, in order of first use.
//! Each part then opens in sheet order and takes its formats' numbers
//! first; only the last part can meet a format not yet numbered, and it
//! numbers it exactly as it would after the others. The rows are then
//! written on as many threads as there are parts, each into its own sheet,
//! and the parts close in sheet order, their text figures added in that order.
//!
//! This module never reorders, drops or changes a row or a cell: it only
//! decides when each sheet's rows are written.

use rayon::prelude::*;
use rust_xlsxwriter::{Format, Worksheet};

use super::{
    close_part, fill_rows, open_part_first, part_name, Cells, Ctx, OpenPart, ReportError, Shape,
    TextFigures,
};
use crate::report::cells::FormatOrder;
use crate::report::layout::Styles;

/// The rows of one part of a list and how each is written, whatever the
/// rows' type.
pub(super) trait PartRows: Sync {
    /// Writes every row with `cells` (see [`fill_rows`]).
    fn fill<'f>(
        &self,
        cells: &mut Cells<'f>,
        list: &Shape,
        formats: &[Option<&'f Format>],
        written: &mut usize,
    ) -> Result<(), ReportError>;
}

/// Rows written one by one by `row`.
pub(super) struct RowsBy<'r, T, R> {
    pub rows: &'r [T],
    pub row: R,
}

impl<T, R> PartRows for RowsBy<'_, T, R>
where
    T: Sync,
    R: Fn(&mut Cells<'_>, &T) -> Result<(), ReportError> + Sync,
{
    fn fill<'f>(
        &self,
        cells: &mut Cells<'f>,
        list: &Shape,
        formats: &[Option<&'f Format>],
        written: &mut usize,
    ) -> Result<(), ReportError> {
        fill_rows(cells, list, formats, self.rows, &self.row, written)
    }
}

/// One sheet of a list, to be filled: its list's shape, its index among
/// the list's sheets, its column formats and its rows.
pub(super) struct Part<'r> {
    pub shape: Shape<'r>,
    pub index: usize,
    pub formats: Vec<Option<&'r Format>>,
    pub rows: Box<dyn PartRows + 'r>,
}

/// What filling one sheet gave back: its rows, widest cells and text figures.
struct Filled {
    rows: usize,
    widths: Vec<usize>,
    texts: TextFigures,
}

/// Writes `parts` (in sheet order) into `wb`, filling their rows side by
/// side; with [`Limits::fill_in_turn`](crate::report::layout::Limits) one
/// part after another (each then the last of its own batch), which must
/// give the same file byte for byte.
pub(super) fn write_parts(
    wb: &mut rust_xlsxwriter::Workbook,
    parts: &[Part<'_>],
    ctx: &mut Ctx<'_>,
) -> Result<(), ReportError> {
    if ctx.limits.fill_in_turn {
        for part in parts {
            fill_side_by_side(wb, std::slice::from_ref(part), ctx)?;
        }
        return Ok(());
    }
    fill_side_by_side(wb, parts, ctx)
}

/// Writes `parts`, every one but the last numbering its styles first.
fn fill_side_by_side<'r>(
    wb: &mut rust_xlsxwriter::Workbook,
    parts: &[Part<'r>],
    ctx: &mut Ctx<'_>,
) -> Result<(), ReportError> {
    let styles = ctx.styles;
    let last = parts.len().saturating_sub(1);
    // Measured side by side too: only the numbering must go in sheet order.
    // (The first error in sheet order is the one reported, as in turn.)
    let measured: Vec<Result<Option<FormatOrder>, ReportError>> = parts
        .par_iter()
        .enumerate()
        .map(|(i, part)| (i < last).then(|| formats_of(part, styles)).transpose())
        .collect();
    let firsts = measured.into_iter().collect::<Result<Vec<_>, _>>()?;
    let mut open = Vec::with_capacity(parts.len());
    for (part, first) in parts.iter().zip(&firsts) {
        open.push(open_part_first(
            wb,
            &part.shape,
            part.index,
            &part.formats,
            first.as_ref(),
            ctx,
        )?);
    }

    // Each part's sheet, by name (sheet names are unique in a workbook).
    let mut sheets: Vec<Option<&mut Worksheet>> = Vec::new();
    sheets.resize_with(parts.len(), || None);
    for ws in wb.worksheets_mut().iter_mut() {
        let name = ws.name();
        if let Some(i) = open.iter().position(|o| o.name == name) {
            if let Some(slot) = sheets.get_mut(i) {
                *slot = Some(ws);
            }
        }
    }
    let jobs: Vec<(&Part<'r>, &OpenPart, &mut Worksheet)> = parts
        .iter()
        .zip(&open)
        .zip(sheets)
        .map(|((p, o), ws)| {
            ws.map(|ws| (p, o, ws))
                .ok_or_else(|| ReportError::Internal(format!("the sheet {} went missing", o.name)))
        })
        .collect::<Result<_, _>>()?;
    let filled: Vec<Result<Filled, ReportError>> = jobs
        .into_par_iter()
        .map(|(part, o, ws)| {
            let mut texts = TextFigures::default();
            let mut cells =
                Cells::new(ws, &o.name, styles, &mut texts).with_widths(o.widths.clone());
            let mut rows = 0;
            part.rows
                .fill(&mut cells, &part.shape, &part.formats, &mut rows)?;
            let widths = cells.into_widths();
            Ok(Filled {
                rows,
                widths,
                texts,
            })
        })
        .collect();

    for ((part, o), filled) in parts.iter().zip(open).zip(filled) {
        let filled = filled?;
        ctx.texts.absorb(filled.texts);
        let done = OpenPart {
            name: o.name,
            rows: filled.rows,
            widths: filled.widths,
        };
        close_part(wb, &part.shape, done, ctx)?;
    }
    Ok(())
}

/// The formats writing `part` will use, in order of first use: its column
/// formats, its header's, then its rows', measured without writing.
fn formats_of(part: &Part<'_>, styles: &Styles) -> Result<FormatOrder, ReportError> {
    let mut order = FormatOrder::default();
    let mut texts = TextFigures::default();
    let mut unused = Worksheet::new();
    let name = part_name(part.shape.name, part.index);
    let mut cells = Cells::new(&mut unused, &name, styles, &mut texts).recording(&mut order);
    for (col, format) in (0..).zip(&part.formats) {
        if let Some(format) = format {
            cells.column_format(col, format)?;
        }
    }
    cells.at(0).list_header(part.shape.header)?;
    let mut rows = 0;
    part.rows
        .fill(&mut cells, &part.shape, &part.formats, &mut rows)?;
    drop(cells);
    Ok(order)
}
