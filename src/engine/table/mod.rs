//! The user's own data: read a delimited text file or a spreadsheet into typed
//! columns, map columns to a design, summarise them for a decision.
//!
//! ```
//! use tern::engine::table::{read_table, summarise, Mapping, ReadOptions};
//! let table = read_table(b"dose;weight\n1;12,5\n2;13,1\n3;11,9\n", Some("clinic.csv"), &ReadOptions::default()).unwrap();
//! assert_eq!(table.n_rows, 3);
//! let data = summarise(&table, &Mapping::OneColumn { column: 1 }, &[]).unwrap();
//! assert!((data.groups[0].mean - 12.5).abs() < 1e-12);
//! ```
//!
//! Reading happens in three steps: `sniff` looks at the start of the file
//! (format, delimiter, decimal mark, header), `delimited` or `workbook` turn
//! records into rows of cells, and `columns` stores every cell once, as an
//! `f64` when it reads as a number (`cells` knows the number syntax) and as a
//! code into a small dictionary of distinct texts while there are few of them.
//! `mapping` picks the values a design needs, `summary` computes one-pass
//! moments, `notes` words the strain on the model and `charts_data` prepares
//! the histogram and the normal quantile plot.
//!
//! Architecture invariant: no I/O and no web types; every function a user's
//! file can reach returns a `Result` or records a located [`Problem`], never
//! panics; nothing the user loaded is rewritten (cell text is kept verbatim,
//! HTML included: escaping is the page's job).

mod cells;
mod charts_data;
mod columns;
mod delimited;
mod mapping;
mod notes;
pub mod roles;
mod sniff;
mod summary;
mod workbook;

pub use cells::{parse_number, CellValue};
pub use charts_data::{histogram, normal_quantile_points, Histogram, QQ_MAX_POINTS};
pub use delimited::TableBuilder;
pub use mapping::{group_values, right_wrong, right_wrong_column, summarise, DataSummary, Mapping, MappingError};
pub use summary::{GroupStats, Moments};
pub use tern_sheets::{Cell as SheetCell, Grid as SheetGrid, SheetError};
pub use workbook::{read_grid, sheet_error};

use columns::Column;
use serde::{Deserialize, Serialize};

/// How many problems a [`Table`] lists in full (all are counted).
pub const PROBLEMS_SHOWN: usize = 100;
/// How many data rows the preview holds.
pub const PREVIEW_ROWS: usize = 20;
/// How many levels of a categorical column [`ColumnInfo::levels`] lists.
pub const LEVELS_SHOWN: usize = 50;
/// Above this many distinct texts a column is not kept as codes, so it
/// cannot serve as a group or outcome column (it is an identifier or a
/// measurement, not a factor).
pub const MAX_LEVELS: usize = 1000;

/// Decimal mark of numbers written as text.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum DecimalMark {
    /// `1234.5`, `1,234.5`
    Point,
    /// `1234,5`, `1.234,5`
    Comma,
}

/// What the user may fix instead of letting the reader detect it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct ReadOptions {
    /// Field delimiter of text files; `None`: detect among `,` `;` tab `|`.
    pub delimiter: Option<u8>,
    /// `None`: detect from the cells that only one mark can explain.
    pub decimal: Option<DecimalMark>,
    /// Is the first row a header? `None`: detect.
    pub header: Option<bool>,
    /// Cell texts (after trimming spaces, compared ignoring case) read as
    /// missing values. Default: empty, `NA`, `N/A`, `NaN`, `.`, `-`.
    pub missing: Vec<String>,
    /// Spreadsheets: the sheet to read; `None`: the first sheet.
    pub sheet: Option<String>,
}

impl Default for ReadOptions {
    fn default() -> Self {
        ReadOptions {
            delimiter: None,
            decimal: None,
            header: None,
            missing: DEFAULT_MISSING.iter().map(|s| s.to_string()).collect(),
            sheet: None,
        }
    }
}

/// The default missing-value tokens.
pub const DEFAULT_MISSING: [&str; 6] = ["", "NA", "N/A", "NaN", ".", "-"];

/// The file's format as read.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Format {
    /// CSV, TSV or any delimited text; `delimiter` as a character.
    Delimited { delimiter: char },
    Xlsx,
    Ods,
}

/// What a column holds, decided over the whole file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ColumnKind {
    /// More cells read as numbers than as other text: a measurement.
    Numeric,
    /// A factor (groups, outcomes) or free text.
    Categorical,
    /// Every cell is missing.
    Empty,
}

/// One distinct cell text and how often it occurs.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Level {
    pub value: String,
    pub count: usize,
}

/// A column as the whole file shows it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ColumnInfo {
    /// 0-based position; [`Mapping`] refers to columns by it.
    pub index: usize,
    /// Header text verbatim, or `Column k` (1-based) without a header.
    pub name: String,
    pub kind: ColumnKind,
    /// Non-missing cells.
    pub count: usize,
    /// Cells matching a missing-value token (or absent in a short row).
    pub missing: usize,
    /// Numeric column: non-missing cells that are not numbers (each is a
    /// [`Problem`]). Other kinds: 0.
    pub bad: usize,
    /// Distinct non-missing texts with counts, in order of first
    /// appearance, at most [`LEVELS_SHOWN`].
    pub levels: Vec<Level>,
    /// Number of distinct non-missing texts; `None` when more than
    /// [`MAX_LEVELS`] (then the column cannot be a group column).
    pub distinct: Option<usize>,
}

/// A located problem: the row as the user sees it in the file (1-based
/// line of a text file where the record starts, 1-based row of a sheet),
/// the column name, the cell text verbatim, and what is wrong.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Problem {
    pub row: usize,
    pub column: String,
    pub value: String,
    pub message: String,
}

/// The first [`PROBLEMS_SHOWN`] problems in file order, and how many there are.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct Problems {
    pub shown: Vec<Problem>,
    pub total: usize,
    /// Every row (file numbering, ascending, no repeats) with at least one
    /// problem: what "exclude those rows" passes to [`summarise`].
    pub rows: Vec<usize>,
}

/// A file read into typed columns.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Table {
    pub format: Format,
    /// Sheet names of a spreadsheet, in workbook order; empty for text.
    pub sheets: Vec<String>,
    /// The sheet read.
    pub sheet: Option<String>,
    pub header: bool,
    pub decimal: DecimalMark,
    /// Data rows (header excluded).
    pub n_rows: usize,
    pub columns: Vec<ColumnInfo>,
    /// The first [`PREVIEW_ROWS`] data rows, cell text as read (trimmed of
    /// nothing, HTML kept verbatim), padded to the column count.
    pub preview: Vec<Vec<String>>,
    /// The file row of each preview row (same numbering as [`Problem::row`]).
    pub preview_rows: Vec<usize>,
    pub problems: Problems,
    /// Plain sentences about how the file was read (encoding fallback,
    /// detection choices worth knowing).
    pub notices: Vec<String>,
    /// Cell values, not serialised.
    #[serde(skip)]
    pub(crate) data: Vec<Column>,
    /// File row of each data row (ascending).
    #[serde(skip)]
    pub(crate) row_numbers: Vec<u32>,
}

impl Table {
    /// The data index (0-based, header excluded) of a file row, if that
    /// row holds data.
    pub fn data_index(&self, file_row: usize) -> Option<usize> {
        let r = u32::try_from(file_row).ok()?;
        self.row_numbers.binary_search(&r).ok()
    }

    /// The file row of a data index.
    pub fn file_row(&self, data_index: usize) -> Option<usize> {
        self.row_numbers.get(data_index).map(|&r| r as usize)
    }
}

/// Why a file could not be read at all. Problems within a readable file are
/// [`Problem`]s, not errors.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TableError {
    #[error("the file is empty")]
    Empty,
    #[error("the file has a header row but no data rows")]
    HeaderOnly,
    #[error("{0}")]
    NotText(String),
    #[error("{0}")]
    Spreadsheet(String),
    #[error("the workbook has no sheet named \"{wanted}\"; its sheets are: {available}")]
    NoSuchSheet { wanted: String, available: String },
    #[error("the delimiter {0:?} cannot separate fields (use , ; | or a tab)")]
    BadDelimiter(char),
    #[error("the file has more than {0} rows; split it or summarise it first")]
    TooManyRows(usize),
}

/// Read a whole file (CSV/TSV text, .xlsx, .ods) or pasted text. `name`
/// (file name, `None` for pasted text) helps pick the format; the bytes are
/// sniffed too (a zip signature means a spreadsheet).
pub fn read_table(bytes: &[u8], name: Option<&str>, opts: &ReadOptions) -> Result<Table, TableError> {
    match sniff::format_of(bytes, name)? {
        sniff::Container::Text => {
            let mut b = TableBuilder::new(opts.clone());
            b.push(bytes)?;
            b.finish()
        }
        sniff::Container::Zip => read_zip(bytes, opts),
    }
}

/// Whether [`read_table`] would take these bytes as a spreadsheet (a zip
/// archive): the page then reads the sheet with its spreadsheet module and
/// passes the grid to [`read_grid`].
pub fn is_spreadsheet(bytes: &[u8], name: Option<&str>) -> bool {
    matches!(sniff::format_of(bytes, name), Ok(sniff::Container::Zip))
}

/// A zip archive: a spreadsheet when this build reads them.
fn read_zip(bytes: &[u8], opts: &ReadOptions) -> Result<Table, TableError> {
    #[cfg(feature = "spreadsheets")]
    return workbook::read_workbook(bytes, opts);
    #[cfg(not(feature = "spreadsheets"))]
    {
        let _ = (bytes, opts);
        Err(TableError::Spreadsheet(
            "this is a spreadsheet or another zip archive, and this edition reads text only: save the sheet as CSV (UTF-8) and load that".into(),
        ))
    }
}
