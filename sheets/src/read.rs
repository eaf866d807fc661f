//! The calamine side: open the archive, pick the sheet, copy its used range.

use super::{Cell, Grid, Kind, SheetError};
use calamine::{Data, Ods, Range, Reader, Xlsx};
use std::io::Cursor;

const ODS_MIME: &[u8] = b"application/vnd.oasis.opendocument.spreadsheet";

/// Read the sheet `wanted` (or the first) of an .xlsx or .ods file.
pub fn read_sheet(bytes: &[u8], wanted: Option<&str>) -> Result<Grid, SheetError> {
    // An .ods archive names its type in its first entry, "mimetype",
    // stored uncompressed near the start.
    let head = &bytes[..bytes.len().min(400)];
    let ods = head.windows(ODS_MIME.len()).any(|w| w == ODS_MIME);
    let (kind, (sheets, sheet, range)) = if ods {
        (Kind::Ods, open::<Ods<_>>(Kind::Ods, bytes, wanted)?)
    } else {
        (Kind::Xlsx, open::<Xlsx<_>>(Kind::Xlsx, bytes, wanted)?)
    };
    Ok(grid(kind, sheets, sheet, &range))
}

/// Open the archive as `R`, then the sheet's names, the chosen one and its used range.
fn open<'a, R>(
    kind: Kind,
    bytes: &'a [u8],
    wanted: Option<&str>,
) -> Result<(Vec<String>, String, Range<Data>), SheetError>
where
    R: Reader<Cursor<&'a [u8]>>,
    R::Error: std::fmt::Display,
{
    let mut wb = R::new(Cursor::new(bytes)).map_err(|e| damaged(kind, e))?;
    let names = wb.sheet_names();
    let name = pick(&names, wanted)?;
    let range = wb.worksheet_range(&name).map_err(|e| damaged(kind, e))?;
    Ok((names, name, range))
}

fn damaged(kind: Kind, e: impl std::fmt::Display) -> SheetError {
    SheetError::Damaged {
        kind,
        detail: e.to_string(),
    }
}

fn pick(names: &[String], wanted: Option<&str>) -> Result<String, SheetError> {
    match wanted {
        Some(w) => names
            .iter()
            .find(|n| n.as_str() == w)
            .cloned()
            .ok_or_else(|| SheetError::NoSuchSheet {
                wanted: w.to_string(),
                available: names.to_vec(),
            }),
        None => names.first().cloned().ok_or(SheetError::NoSheets),
    }
}

fn grid(kind: Kind, sheets: Vec<String>, sheet: String, range: &Range<Data>) -> Grid {
    let first_row = range.start().map_or(0, |(r, _)| r);
    let width = range.get_size().1;
    let rows = range.rows().map(|r| r.iter().map(cell).collect()).collect();
    Grid {
        kind,
        sheets,
        sheet,
        first_row,
        width,
        rows,
    }
}

fn cell(d: &Data) -> Cell {
    match d {
        Data::Empty => Cell::Empty,
        Data::Float(v) => Cell::Number(*v),
        // Integers beyond 2^53 lose digits, as they do in the spreadsheet program.
        Data::Int(v) => Cell::Number(*v as f64),
        other => Cell::Text(other.to_string()),
    }
}
