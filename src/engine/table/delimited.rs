//! Delimited text (CSV, TSV, any of `,` `;` tab `|`) with RFC 4180 quoting,
//! read incrementally by `csv_core` (the I/O-free core of the `csv` crate).
//!
//! Invariant: the whole file is never held as text: chunks are parsed as
//! they come, each record goes straight into the typed columns, and only the
//! first [`SAMPLE_BYTES`] are kept until detection is done. Rows are
//! numbered by the line where the record starts (1-based), as an editor
//! shows them, also when quoted fields span lines.

use super::cells::CellReader;
use super::columns::{ColumnsBuilder, Raw};
use super::sniff::{self, SAMPLE_BYTES};
use super::{DecimalMark, Format, Problem, ReadOptions, Table, TableError};
use csv_core::ReadRecordResult;

/// Reads delimited text chunk by chunk, so that a page can show progress.
///
/// ```
/// use tern::engine::table::{ReadOptions, TableBuilder};
/// let mut b = TableBuilder::new(ReadOptions::default());
/// b.push(b"group,score\nA,1")?;
/// b.push(b"2\nB,15\n")?;
/// let table = b.finish()?;
/// assert_eq!(table.n_rows, 2);
/// # Ok::<(), tern::engine::table::TableError>(())
/// ```
pub struct TableBuilder {
    opts: ReadOptions,
    /// Total file size, if the caller knows it.
    total: Option<u64>,
    state: State,
    /// Bytes pushed so far.
    pushed: u64,
}

enum State {
    /// Collecting the sample.
    Sampling(Vec<u8>),
    /// A zip archive (a spreadsheet) pushed in chunks: kept whole.
    Zip(Vec<u8>),
    Parsing(Box<Parser>),
    /// An error was returned; further calls return it again.
    Failed(TableError),
}

struct Parser {
    rdr: csv_core::Reader,
    out: Vec<u8>,
    out_len: usize,
    ends: Vec<usize>,
    ends_len: usize,
    /// The header record is still to come.
    header_pending: bool,
    header: bool,
    delimiter: u8,
    width: usize,
    reader: CellReader,
    columns: Option<ColumnsBuilder>,
    /// Line numbers come from record counts (a file with only CR endings).
    cr_only: bool,
    records: u64,
    /// The last byte csv_core consumed.
    last_byte: u8,
    /// Quote characters seen so far (odd at the end: an unclosed quote).
    quotes: u64,
    /// Where the last record started and whether it spans lines.
    last_start: usize,
    last_multiline: bool,
    /// First cell that was not UTF-8 (line, column name).
    latin1: Option<(usize, usize)>,
    latin1_cells: usize,
    /// Cells of the current record that needed decoding.
    fields: Vec<String>,
    /// Expected data rows (from the size hint), to allocate columns once.
    rows_hint: usize,
    extra: Vec<Problem>,
}

impl TableBuilder {
    pub fn new(opts: ReadOptions) -> Self {
        TableBuilder { opts, total: None, state: State::Sampling(Vec::new()), pushed: 0 }
    }

    /// The file's total size in bytes, when known (a dropped file's size):
    /// the columns are then allocated once for the rows the sample
    /// predicts, instead of growing by doubling (which briefly needs three
    /// times a column's memory, and a WebAssembly memory never shrinks).
    pub fn size_hint(&mut self, total_bytes: u64) {
        self.total = Some(total_bytes);
    }

    /// Bytes pushed so far (for a progress bar).
    pub fn bytes_read(&self) -> u64 {
        self.pushed
    }

    /// Data rows read so far.
    pub fn rows_read(&self) -> usize {
        match &self.state {
            State::Parsing(p) => p.columns.as_ref().map_or(0, |c| c.rows()),
            _ => 0,
        }
    }

    /// Feed the next chunk of the file.
    pub fn push(&mut self, chunk: &[u8]) -> Result<(), TableError> {
        self.pushed += chunk.len() as u64;
        let result = match &mut self.state {
            State::Failed(e) => return Err(e.clone()),
            State::Zip(buf) => {
                buf.extend_from_slice(chunk);
                Ok(())
            }
            State::Sampling(buf) => {
                buf.extend_from_slice(chunk);
                if buf.len() >= SAMPLE_BYTES {
                    let sample = std::mem::take(buf);
                    self.start(sample, false)
                } else {
                    Ok(())
                }
            }
            State::Parsing(p) => p.feed(chunk, false),
        };
        if let Err(e) = &result {
            self.state = State::Failed(e.clone());
        }
        result
    }

    /// The end of the file: the finished table.
    pub fn finish(mut self) -> Result<Table, TableError> {
        if let State::Sampling(buf) = &mut self.state {
            let sample = std::mem::take(buf);
            if sample.is_empty() {
                return Err(TableError::Empty);
            }
            self.start(sample, true)?;
        }
        match self.state {
            State::Failed(e) => Err(e),
            State::Zip(bytes) => super::read_zip(&bytes, &self.opts),
            State::Sampling(_) => Err(TableError::Empty),
            State::Parsing(mut p) => {
                p.feed(&[], true)?;
                p.into_table()
            }
        }
    }

    /// Detect from the sample, then parse it.
    fn start(&mut self, sample: Vec<u8>, complete: bool) -> Result<(), TableError> {
        if sniff::is_zip(&sample) {
            self.state = State::Zip(sample);
            return Ok(());
        }
        sniff::check_text(&sample)?;
        if let Some(d) = self.opts.delimiter
            && (!d.is_ascii() || matches!(d, b'"' | b'\n' | b'\r'))
        {
            return Err(TableError::BadDelimiter(d as char));
        }
        let body = sample.strip_prefix(b"\xEF\xBB\xBF".as_slice()).unwrap_or(&sample);
        if body.iter().all(|b| b.is_ascii_whitespace()) && complete {
            return Err(TableError::Empty);
        }
        let (sn, recs) = match sniff::sniff_text(body, complete, &self.opts) {
            // Not one whole record yet (a first line longer than the
            // sample): keep collecting.
            Err(TableError::Empty) if !complete => {
                self.state = State::Sampling(sample);
                return Ok(());
            }
            other => other?,
        };
        // Rows expected from the sample's bytes per record, 2 % spare.
        let rows_hint = match self.total {
            Some(total) if !complete && !recs.is_empty() => {
                ((total as f64 / body.len().max(1) as f64 * recs.len() as f64 * 1.02) as usize).min(50_000_000)
            }
            _ => 0,
        };
        let reader = CellReader::new(sn.decimal, &self.opts.missing);
        let cr_only = !body.contains(&b'\n') && body.contains(&b'\r');
        let mut p = Box::new(Parser {
            rdr: csv_core::ReaderBuilder::new().delimiter(sn.delimiter).build(),
            out: vec![0; 4096],
            out_len: 0,
            ends: vec![0; 64],
            ends_len: 0,
            header_pending: sn.header,
            header: sn.header,
            delimiter: sn.delimiter,
            width: sn.width,
            reader,
            columns: None,
            cr_only,
            records: 0,
            last_byte: 0,
            quotes: 0,
            last_start: 0,
            last_multiline: false,
            latin1: None,
            latin1_cells: 0,
            fields: Vec::new(),
            rows_hint,
            extra: Vec::new(),
        });
        if !sn.header {
            let names = (1..=sn.width).map(|k| format!("Column {k}")).collect();
            let mut builder = ColumnsBuilder::new(names, p.reader.clone());
            builder.reserve(rows_hint);
            p.columns = Some(builder);
        }
        p.feed(&sample, false)?;
        self.state = State::Parsing(p);
        Ok(())
    }
}

impl Parser {
    fn feed(&mut self, mut input: &[u8], eof: bool) -> Result<(), TableError> {
        self.quotes += input.iter().filter(|&&b| b == b'"').count() as u64;
        loop {
            let (res, nin, nout, nend) =
                self.rdr.read_record(input, &mut self.out[self.out_len..], &mut self.ends[self.ends_len..]);
            if nin > 0 {
                self.last_byte = input[nin - 1];
            }
            input = &input[nin..];
            self.out_len += nout;
            self.ends_len += nend;
            match res {
                // At the end of the file csv_core is called with empty
                // input until it reports `End`.
                ReadRecordResult::InputEmpty if !eof => return Ok(()),
                ReadRecordResult::InputEmpty => {}
                ReadRecordResult::OutputFull => {
                    let l = self.out.len();
                    self.out.resize(l * 2, 0);
                }
                ReadRecordResult::OutputEndsFull => {
                    let l = self.ends.len();
                    self.ends.resize(l * 2, 0);
                }
                ReadRecordResult::Record => {
                    // csv_core reports a record on its terminator: '\n' is
                    // then counted already, a '\r' (of CRLF) not yet; a
                    // record reported on empty input had no terminator.
                    let counted = nin > 0 && self.last_byte == b'\n';
                    self.record(counted)?;
                    self.out_len = 0;
                    self.ends_len = 0;
                }
                ReadRecordResult::End => return Ok(()),
            }
        }
    }

    /// One complete record is in `out`/`ends`.
    fn record(&mut self, newline_counted: bool) -> Result<(), TableError> {
        self.records += 1;
        let bytes = &self.out[..self.out_len];
        let newlines_inside = bytes.iter().filter(|&&b| b == b'\n').count();
        let line = if self.cr_only {
            self.records as usize
        } else {
            // csv_core counts '\n' read so far, starting at 1.
            let after = self.rdr.line() as usize;
            after.saturating_sub(newlines_inside + usize::from(newline_counted)).max(1)
        };
        self.last_start = line;
        self.last_multiline = newlines_inside > 0 || bytes.contains(&b'\r');
        // Fields borrow the record buffer when it is UTF-8 (the usual
        // case: no copy); a cell that is not is decoded as Windows-1252.
        let whole = std::str::from_utf8(bytes).ok();
        self.fields.clear();
        let mut start = 0;
        let mut spans: Vec<Result<(usize, usize), usize>> = Vec::with_capacity(self.ends_len);
        for (i, &e) in self.ends[..self.ends_len].iter().enumerate() {
            let span = (start, e);
            start = e;
            match whole.and_then(|w| w.get(span.0..span.1)) {
                Some(_) => spans.push(Ok(span)),
                None => {
                    let raw = &self.out[span.0..span.1];
                    let text = match std::str::from_utf8(raw) {
                        Ok(t) => t.to_string(),
                        Err(_) => {
                            self.latin1_cells += 1;
                            if self.latin1.is_none() {
                                self.latin1 = Some((line, i));
                            }
                            super::cells::windows_1252(raw)
                        }
                    };
                    spans.push(Err(self.fields.len()));
                    self.fields.push(text);
                }
            }
        }
        let text_of = |sp: &Result<(usize, usize), usize>| -> &str {
            match sp {
                Ok((a, b)) => whole.and_then(|w| w.get(*a..*b)).unwrap_or(""),
                Err(k) => self.fields.get(*k).map_or("", String::as_str),
            }
        };
        if self.header_pending {
            let names: Vec<String> = (0..self.width.max(1))
                .map(|k| match spans.get(k).map(|sp| text_of(sp).trim()) {
                    Some(n) if !n.is_empty() => n.to_string(),
                    _ => format!("Column {}", k + 1),
                })
                .collect();
            self.header_pending = false;
            let mut builder = ColumnsBuilder::new(names, self.reader.clone());
            builder.reserve(self.rows_hint);
            self.columns = Some(builder);
            return Ok(());
        }
        let cells: Vec<Raw<'_>> = spans.iter().map(|sp| Raw::Text(text_of(sp))).collect();
        match self.columns.as_mut() {
            Some(c) => c.push_row(line, &cells),
            None => Ok(()),
        }
    }

    fn into_table(self) -> Result<Table, TableError> {
        let Parser { columns, header, delimiter, quotes, last_start, last_multiline, latin1, latin1_cells, mut extra, reader, .. } =
            self;
        let Some(columns) = columns else {
            return Err(if header { TableError::HeaderOnly } else { TableError::Empty });
        };
        if quotes % 2 == 1 && last_multiline {
            extra.push(Problem {
                row: last_start,
                column: String::new(),
                value: String::new(),
                message: "a quoted field that starts on this line is never closed, so the rest of the file was read into it: add the missing quote character (\")".into(),
            });
        }
        let mut notices = Vec::new();
        if let Some((line, col)) = latin1 {
            notices.push(format!(
                "{latin1_cells} cell(s) are not valid UTF-8 and were read as Windows-1252 (Latin-1), the first on line {line}, field {}: if letters look wrong, save the file as CSV in UTF-8",
                col + 1
            ));
        }
        let _ = reader.decimal == DecimalMark::Point;
        columns.finish(Format::Delimited { delimiter: delimiter as char }, header, extra, notices)
    }
}
