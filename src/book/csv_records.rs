//! The CSV parser: a CSV file's text as rows, a record at a time, each with
//! its shape (how many fields it has) and the line it starts on.
//!
//! Records are parsed from text already in memory and decoded; this module
//! never opens a file, never holds more than one record, and never decides
//! what a fault means for the book (the CSV folder reader reports it).

use super::cell::{lower_first, Cell};
use super::row::{Row, Shape};

/// Why a CSV file cannot be read as rows.
#[derive(Debug)]
pub(crate) struct CsvFault {
    /// The 1-based line.
    pub line: u64,
    /// What is wrong, as found.
    pub found: String,
    /// What was expected there.
    pub expected: &'static str,
    /// How to fix it.
    pub fix: String,
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
    /// The records of `text`; with `cells` false, only their shapes.
    pub(crate) fn new(text: &'a str, cells: bool) -> Self {
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
    pub(crate) fn next_row(&mut self) -> Option<Result<Row, CsvFault>> {
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
        self.line += line_breaks(skipped);
        self.pos = end;
        self.line
    }
}

/// How many line breaks `bytes` holds: LF, CRLF and a lone CR (the line
/// end some spreadsheet programs still save) each count once, as the csv
/// crate's record terminator takes them.
pub(crate) fn line_breaks(bytes: &[u8]) -> u64 {
    let lf = bytes.iter().filter(|&&b| b == b'\n').count();
    // Most files have no CR at all, or CRLF only: one more pass finds out.
    let lone_cr = if bytes.contains(&b'\r') {
        let cr = bytes.iter().filter(|&&b| b == b'\r').count();
        let crlf = bytes.windows(2).filter(|w| *w == b"\r\n").count();
        cr.saturating_sub(crlf)
    } else {
        0
    };
    u64::try_from(lf + lone_cr).unwrap_or(u64::MAX)
}

#[cfg(test)]
mod tests {
    use super::*;

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

    fn lines_of(text: &str) -> Vec<u64> {
        let mut rows = CsvRows::new(text, false);
        std::iter::from_fn(|| rows.next_row())
            .map(|r| u64::from(r.unwrap().index) + 1)
            .collect()
    }

    #[test]
    fn records_start_on_the_same_lines_with_lf_crlf_or_lone_cr_line_ends() {
        let lf = "a,b\nHM,1\n\n\"X\ny\",2\nZ,3\n";
        assert_eq!(lines_of(lf), vec![1, 2, 4, 6]);
        assert_eq!(lines_of(&lf.replace('\n', "\r\n")), vec![1, 2, 4, 6]);
        assert_eq!(lines_of(&lf.replace('\n', "\r")), vec![1, 2, 4, 6]);
    }

    #[test]
    fn line_breaks_count_lf_crlf_and_lone_cr_once_each() {
        assert_eq!(line_breaks(b"a\nb\r\nc\rd"), 3);
        assert_eq!(line_breaks(b"\r\r\n\n\r"), 4);
        assert_eq!(line_breaks(b"no break"), 0);
    }
}
