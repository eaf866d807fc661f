//! Spreadsheets (.xlsx, .ods) through `calamine`: the chosen sheet (the
//! first by default) as rows of cells, then the same columns as text files.
//!
//! Invariant: numbers stored as numbers in the sheet are taken as they are
//! (no decimal-mark guessing); text cells follow the text rules; rows are
//! numbered as the spreadsheet program shows them (1-based, counting rows
//! above the first used one).

use super::{ReadOptions, Table, TableError};

pub(crate) fn read_workbook(_bytes: &[u8], _opts: &ReadOptions) -> Result<Table, TableError> {
    Err(TableError::Spreadsheet("spreadsheets are not read yet".into()))
}
