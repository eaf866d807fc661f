//! Spreadsheets (.xlsx, .ods): a sheet's [`Grid`] (from `tern_sheets`,
//! in-process with the `spreadsheets` feature or from the page's second
//! WebAssembly module) becomes a table with the same columns as text files.
//!
//! Invariant: numbers stored as numbers in the sheet are taken as they are
//! (no decimal-mark guessing); text cells follow the text rules; dates,
//! booleans and error cells are text; rows are numbered as the spreadsheet
//! program shows them (1-based, counting rows above the first used one).

use super::cells::CellReader;
use super::columns::{ColumnsBuilder, Raw};
use super::sniff::detect_header;
use super::{DecimalMark, Format, ReadOptions, Table, TableError};
use tern_sheets::{Cell, Grid, Kind, SheetError};

/// Read the sheet `opts.sheet` (or the first) of an .xlsx or .ods file.
#[cfg(feature = "spreadsheets")]
pub(crate) fn read_workbook(bytes: &[u8], opts: &ReadOptions) -> Result<Table, TableError> {
    let grid = tern_sheets::read_sheet(bytes, opts.sheet.as_deref()).map_err(sheet_error)?;
    read_grid(&grid, opts)
}

/// A spreadsheet reader's failure as the engine words it.
pub fn sheet_error(e: SheetError) -> TableError {
    match e {
        SheetError::Damaged { kind, detail } => TableError::Spreadsheet(format!(
            "this zip archive could not be read as an {} ({detail}): it may be damaged or cut short, or another kind of archive; open and save it again, or export the sheet as CSV",
            kind.label()
        )),
        SheetError::NoSuchSheet { wanted, available } => TableError::NoSuchSheet {
            wanted,
            available: available
                .iter()
                .map(|n| format!("\"{n}\""))
                .collect::<Vec<_>>()
                .join(", "),
        },
        SheetError::NoSheets => TableError::Spreadsheet("the workbook has no sheets".into()),
    }
}

/// A cell as text for detection and display.
fn text_of(c: &Cell) -> String {
    match c {
        Cell::Empty => String::new(),
        Cell::Number(v) => format!("{v}"),
        Cell::Text(t) => t.clone(),
    }
}

/// Build a table from a sheet's grid (see the module's invariant); the
/// read options' header, decimal mark and missing-value list apply as for
/// text; `opts.sheet` was the grid reader's business.
pub fn read_grid(grid: &Grid, opts: &ReadOptions) -> Result<Table, TableError> {
    let width = grid.width;
    if grid.rows.is_empty() || width == 0 {
        return Err(TableError::Empty);
    }
    let format = match grid.kind {
        Kind::Xlsx => Format::Xlsx,
        Kind::Ods => Format::Ods,
    };
    // Detection looks at the first rows as text, like a text file.
    let sample: Vec<Vec<String>> = grid
        .rows
        .iter()
        .take(1000)
        .map(|r| r.iter().map(text_of).collect())
        .collect();
    let header = opts.header.unwrap_or_else(|| detect_header(&sample, opts));
    let decimal = opts.decimal.unwrap_or_else(|| text_decimal(grid, header));
    let mut rows = grid.rows.iter();
    let names: Vec<String> = if header {
        let first = rows.next().map(Vec::as_slice).unwrap_or_default();
        (0..width)
            .map(|k| match first.get(k).map(text_of) {
                Some(n) if !n.trim().is_empty() => n.trim().to_string(),
                _ => format!("Column {}", k + 1),
            })
            .collect()
    } else {
        (1..=width).map(|k| format!("Column {k}")).collect()
    };
    let mut builder = ColumnsBuilder::new(names, CellReader::new(decimal, &opts.missing));
    let first_data = grid.first_row as usize + 1 + usize::from(header);
    for (i, row) in rows.enumerate() {
        let cells: Vec<Raw<'_>> = row
            .iter()
            .map(|c| match c {
                Cell::Number(v) => Raw::Number(*v),
                Cell::Empty => Raw::Empty,
                Cell::Text(t) => Raw::Text(t.as_str()),
            })
            .collect();
        // Blank rows inside the used range carry no data.
        if cells.iter().all(|c| matches!(c, Raw::Empty)) {
            continue;
        }
        builder.push_row(first_data + i, &cells)?;
    }
    let mut table = builder.finish(format, header, Vec::new(), Vec::new())?;
    table.sheets = grid.sheets.clone();
    table.sheet = Some(grid.sheet.clone());
    Ok(table)
}

/// The decimal mark of numbers typed as text in the sheet (rare; numbers
/// stored as numbers need none).
fn text_decimal(grid: &Grid, header: bool) -> DecimalMark {
    let (mut point, mut comma) = (0usize, 0usize);
    for row in grid.rows.iter().skip(usize::from(header)).take(1000) {
        for c in row {
            if let Cell::Text(s) = c {
                match super::cells::decimal_evidence(s) {
                    Some(DecimalMark::Point) => point += 1,
                    Some(DecimalMark::Comma) => comma += 1,
                    None => {}
                }
            }
        }
    }
    if comma > point {
        DecimalMark::Comma
    } else {
        DecimalMark::Point
    }
}
