//! Typed column storage: every cell once, as an `f64` (NaN when missing or
//! not a number) and, while the column has at most [`MAX_LEVELS`] distinct
//! texts, as a `u32` code into its list of levels.
//!
//! Invariant: memory per cell is 8 bytes for a measurement column (12 while
//! it could still be a factor), whatever the file's text was; no cell text is
//! kept beyond the first [`PROBLEMS_SHOWN`] bad cells per column, the
//! preview and the levels.

use super::cells::{CellReader, CellValue};
use super::{
    ColumnInfo, ColumnKind, DecimalMark, Format, Level, Problem, Problems, Table, TableError, LEVELS_SHOWN, MAX_LEVELS,
    PREVIEW_ROWS, PROBLEMS_SHOWN,
};
use std::collections::HashMap;

/// Code of a missing cell.
pub(crate) const MISSING: u32 = u32::MAX;

/// One column's cells.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct Column {
    pub name: String,
    /// Per data row: the number, or NaN when missing or not a number.
    pub values: Vec<f64>,
    /// Per data row: the code of the (trimmed) text, [`MISSING`] when
    /// missing; `None` once the column has more than [`MAX_LEVELS`]
    /// distinct texts.
    pub codes: Option<Vec<u32>>,
    /// Code → text and count (empty when `codes` is `None`).
    pub levels: Vec<Level>,
    pub numbers: usize,
    pub missing: usize,
    /// Non-missing cells that are not numbers.
    pub texts: usize,
    /// Data index of every non-number cell.
    pub text_rows: Vec<u32>,
    /// The first [`PROBLEMS_SHOWN`] non-number cells: data index and text.
    pub text_shown: Vec<(u32, String)>,
    /// Distinct texts seen, while counted.
    pub distinct: Option<usize>,
}

impl Column {
    fn new(name: String) -> Self {
        Column {
            name,
            values: Vec::new(),
            codes: Some(Vec::new()),
            levels: Vec::new(),
            numbers: 0,
            missing: 0,
            texts: 0,
            text_rows: Vec::new(),
            text_shown: Vec::new(),
            distinct: Some(0),
        }
    }

    pub fn kind(&self) -> ColumnKind {
        if self.numbers + self.texts == 0 {
            ColumnKind::Empty
        } else if self.numbers >= self.texts {
            ColumnKind::Numeric
        } else {
            ColumnKind::Categorical
        }
    }

    /// The code of a level's text, if the column has it.
    pub fn code_of(&self, text: &str) -> Option<u32> {
        let t = text.trim();
        self.levels.iter().position(|l| l.value == t).map(|i| i as u32)
    }
}

/// A cell as a reader hands it over.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Raw<'a> {
    Text(&'a str),
    /// A spreadsheet number (no text syntax involved).
    Number(f64),
    Empty,
}

/// Builds the columns row by row.
pub(crate) struct ColumnsBuilder {
    reader: CellReader,
    columns: Vec<Column>,
    dicts: Vec<HashMap<String, u32>>,
    row_numbers: Vec<u32>,
    preview: Vec<Vec<String>>,
    preview_rows: Vec<usize>,
    shape: Vec<Problem>,
    shape_total: usize,
    shape_rows: Vec<u32>,
}

impl ColumnsBuilder {
    pub fn new(names: Vec<String>, reader: CellReader) -> Self {
        let dicts = names.iter().map(|_| HashMap::new()).collect();
        let columns = names.into_iter().map(Column::new).collect();
        ColumnsBuilder {
            reader,
            columns,
            dicts,
            row_numbers: Vec::new(),
            preview: Vec::new(),
            preview_rows: Vec::new(),
            shape: Vec::new(),
            shape_total: 0,
            shape_rows: Vec::new(),
        }
    }

    /// Room for `rows` data rows in every column, allocated once.
    pub fn reserve(&mut self, rows: usize) {
        self.row_numbers.reserve_exact(rows);
        for c in &mut self.columns {
            c.values.reserve_exact(rows);
        }
    }

    pub fn rows(&self) -> usize {
        self.row_numbers.len()
    }

    /// Add one data row found at `file_row` (1-based, as the user sees it).
    pub fn push_row(&mut self, file_row: usize, cells: &[Raw<'_>]) -> Result<(), TableError> {
        let index = u32::try_from(self.row_numbers.len()).map_err(|_| TableError::TooManyRows(u32::MAX as usize))?;
        let file_row32 = u32::try_from(file_row).map_err(|_| TableError::TooManyRows(u32::MAX as usize))?;
        self.row_numbers.push(file_row32);
        let width = self.columns.len();
        if self.preview.len() < PREVIEW_ROWS {
            let mut shown: Vec<String> = cells.iter().take(width).map(|c| raw_text(c)).collect();
            shown.resize(width, String::new());
            self.preview.push(shown);
            self.preview_rows.push(file_row);
        }
        // Rows of another length: located, never silently shifted.
        let extra_filled = cells.iter().skip(width).any(|c| !matches!(c, Raw::Empty) && !matches!(c, Raw::Text(t) if t.trim().is_empty()));
        if cells.len() < width || extra_filled {
            self.shape_total += 1;
            self.shape_rows.push(index);
            if self.shape.len() < PROBLEMS_SHOWN {
                let (column, message) = if cells.len() < width {
                    (
                        self.columns[cells.len()].name.clone(),
                        format!("this row has {} field(s) but the table has {width} columns; the cells from this column on are read as missing", cells.len()),
                    )
                } else {
                    (
                        format!("after column {width}"),
                        format!("this row has {} field(s) but the table has {width} columns; the extra fields are not read", cells.len()),
                    )
                };
                let value = cells.iter().skip(width.min(cells.len())).map(|c| raw_text(c)).collect::<Vec<_>>().join(" | ");
                self.shape.push(Problem { row: file_row, column, value, message });
            }
        }
        for c in 0..width {
            let raw = cells.get(c).copied().unwrap_or(Raw::Empty);
            self.push_cell(c, index, raw);
        }
        Ok(())
    }

    fn push_cell(&mut self, c: usize, index: u32, raw: Raw<'_>) {
        let number_text: String;
        let (value, text): (CellValue, &str) = match raw {
            Raw::Empty => (if self.reader.is_missing("") { CellValue::Missing } else { CellValue::Text }, ""),
            Raw::Text(t) => (self.reader.read(t), t.trim()),
            Raw::Number(v) => {
                // Spreadsheet numbers need their text only for the levels.
                number_text = if self.columns[c].codes.is_some() || !v.is_finite() { format!("{v}") } else { String::new() };
                (if v.is_finite() { CellValue::Number(v) } else { CellValue::Text }, number_text.as_str())
            }
        };
        let col = &mut self.columns[c];
        match value {
            CellValue::Number(v) => {
                col.numbers += 1;
                col.values.push(v);
            }
            CellValue::Missing => {
                col.missing += 1;
                col.values.push(f64::NAN);
            }
            CellValue::Text => {
                col.texts += 1;
                col.values.push(f64::NAN);
                col.text_rows.push(index);
                if col.text_shown.len() < PROBLEMS_SHOWN {
                    col.text_shown.push((index, text.to_string()));
                }
            }
        }
        // Codes: the texts of a factor.
        let Some(codes) = col.codes.as_mut() else { return };
        if value == CellValue::Missing {
            codes.push(MISSING);
            return;
        }
        let dict = &mut self.dicts[c];
        let code = match dict.get(text) {
            Some(&k) => k,
            None => {
                if col.levels.len() >= MAX_LEVELS {
                    // Too many distinct texts for a factor: stop keeping codes.
                    col.codes = None;
                    col.levels = Vec::new();
                    col.distinct = None;
                    *dict = HashMap::new();
                    return;
                }
                let k = col.levels.len() as u32;
                dict.insert(text.to_string(), k);
                col.levels.push(Level { value: text.to_string(), count: 0 });
                col.distinct = Some(col.levels.len());
                k
            }
        };
        codes.push(code);
        col.levels[code as usize].count += 1;
    }

    /// The finished table.
    pub fn finish(self, format: Format, header: bool, extra: Vec<Problem>, notices: Vec<String>) -> Result<Table, TableError> {
        let ColumnsBuilder { reader, mut columns, row_numbers, preview, preview_rows, shape, shape_total, shape_rows, .. } = self;
        // Only a numeric column's non-numbers are problems: a text column
        // need not keep where its texts are.
        for col in columns.iter_mut().filter(|c| c.kind() != ColumnKind::Numeric) {
            col.text_rows = Vec::new();
        }
        if row_numbers.is_empty() {
            return Err(if header { TableError::HeaderOnly } else { TableError::Empty });
        }
        let decimal = reader.decimal;
        let mut shown: Vec<(usize, usize, Problem)> = Vec::new();
        let mut total = shape_total + extra.len();
        let mut rows: Vec<u32> = shape_rows;
        for p in shape.into_iter().chain(extra) {
            shown.push((p.row, usize::MAX, p));
        }
        let mark = match decimal {
            DecimalMark::Point => "a decimal point",
            DecimalMark::Comma => "a decimal comma",
        };
        for (ci, col) in columns.iter().enumerate() {
            if col.kind() != ColumnKind::Numeric {
                continue;
            }
            total += col.texts;
            rows.extend_from_slice(&col.text_rows);
            for (i, text) in &col.text_shown {
                let row = row_numbers[*i as usize] as usize;
                let message = format!(
                    "not a number (read with {mark}) and not a missing-value token, in a column of numbers; it is left out of the summaries"
                );
                shown.push((row, ci, Problem { row, column: col.name.clone(), value: text.clone(), message }));
            }
        }
        shown.sort_by_key(|(row, ci, _)| (*row, *ci));
        shown.truncate(super::PROBLEMS_SHOWN);
        let mut rows: Vec<usize> = rows.into_iter().map(|i| row_numbers.get(i as usize).copied().unwrap_or(i) as usize).collect();
        rows.sort_unstable();
        rows.dedup();
        let infos = columns
            .iter()
            .enumerate()
            .map(|(index, col)| {
                let kind = col.kind();
                ColumnInfo {
                    index,
                    name: col.name.clone(),
                    kind,
                    count: col.numbers + col.texts,
                    missing: col.missing,
                    bad: if kind == ColumnKind::Numeric { col.texts } else { 0 },
                    levels: col.levels.iter().take(LEVELS_SHOWN).cloned().collect(),
                    distinct: col.distinct,
                }
            })
            .collect();
        Ok(Table {
            format,
            sheets: Vec::new(),
            sheet: None,
            header,
            decimal,
            n_rows: row_numbers.len(),
            columns: infos,
            preview,
            preview_rows,
            problems: Problems { shown: shown.into_iter().map(|(_, _, p)| p).collect(), total, rows },
            notices,
            data: columns,
            row_numbers,
        })
    }
}

/// The text of a cell as the user would see it.
pub(crate) fn raw_text(c: &Raw<'_>) -> String {
    match c {
        Raw::Text(t) => t.to_string(),
        Raw::Number(v) => format!("{v}"),
        Raw::Empty => String::new(),
    }
}
