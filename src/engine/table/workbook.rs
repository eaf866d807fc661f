//! Spreadsheets (.xlsx, .ods) through `calamine`: the chosen sheet (the
//! first by default) as rows of cells, then the same columns as text files.
//!
//! Invariant: numbers stored as numbers in the sheet are taken as they are
//! (no decimal-mark guessing); text cells follow the text rules; dates,
//! booleans and error cells are text; rows are numbered as the spreadsheet
//! program shows them (1-based, counting rows above the first used one).

use super::cells::CellReader;
use super::columns::{ColumnsBuilder, Raw};
use super::sniff::detect_header;
use super::{DecimalMark, Format, ReadOptions, Table, TableError};
use calamine::{Data, Ods, Range, Reader, Xlsx};
use std::io::Cursor;

/// Read the sheet `opts.sheet` (or the first) of an .xlsx or .ods file.
pub(crate) fn read_workbook(bytes: &[u8], opts: &ReadOptions) -> Result<Table, TableError> {
    let (format, sheets, range) = open(bytes, opts.sheet.as_deref())?;
    let sheet = range.0;
    let mut table = read_range(&range.1, format, opts)?;
    table.sheets = sheets;
    table.sheet = Some(sheet);
    Ok(table)
}

type Named = (String, Range<Data>);

const ODS_MIME: &[u8] = b"application/vnd.oasis.opendocument.spreadsheet";

fn open(bytes: &[u8], wanted: Option<&str>) -> Result<(Format, Vec<String>, Named), TableError> {
    // An .ods archive names its type in its first entry, "mimetype",
    // stored uncompressed near the start.
    let head = &bytes[..bytes.len().min(400)];
    let ods = head.windows(ODS_MIME.len()).any(|w| w == ODS_MIME);
    if ods {
        let mut wb = Ods::new(Cursor::new(bytes)).map_err(|e| damaged("OpenDocument spreadsheet (.ods)", &e.to_string()))?;
        let names = wb.sheet_names();
        let name = pick(&names, wanted)?;
        let range = wb.worksheet_range(&name).map_err(|e| damaged("OpenDocument spreadsheet (.ods)", &e.to_string()))?;
        Ok((Format::Ods, names, (name, range)))
    } else {
        let mut wb = Xlsx::new(Cursor::new(bytes)).map_err(|e| damaged("Excel workbook (.xlsx)", &e.to_string()))?;
        let names = wb.sheet_names();
        let name = pick(&names, wanted)?;
        let range = wb.worksheet_range(&name).map_err(|e| damaged("Excel workbook (.xlsx)", &e.to_string()))?;
        Ok((Format::Xlsx, names, (name, range)))
    }
}

fn damaged(kind: &str, detail: &str) -> TableError {
    TableError::Spreadsheet(format!(
        "this zip archive could not be read as an {kind} ({detail}): it may be damaged or cut short, or another kind of archive; open and save it again, or export the sheet as CSV"
    ))
}

fn pick(names: &[String], wanted: Option<&str>) -> Result<String, TableError> {
    match wanted {
        Some(w) => names.iter().find(|n| n.as_str() == w).cloned().ok_or_else(|| TableError::NoSuchSheet {
            wanted: w.to_string(),
            available: names.iter().map(|n| format!("\"{n}\"")).collect::<Vec<_>>().join(", "),
        }),
        None => names.first().cloned().ok_or_else(|| TableError::Spreadsheet("the workbook has no sheets".into())),
    }
}

/// A cell as text for detection and display.
fn text_of(d: &Data) -> String {
    match d {
        Data::Empty => String::new(),
        Data::Float(v) => format!("{v}"),
        Data::Int(v) => format!("{v}"),
        other => other.to_string(),
    }
}

fn read_range(range: &Range<Data>, format: Format, opts: &ReadOptions) -> Result<Table, TableError> {
    let Some((row0, _col0)) = range.start() else { return Err(TableError::Empty) };
    let (height, width) = range.get_size();
    if height == 0 || width == 0 {
        return Err(TableError::Empty);
    }
    // Detection looks at the first rows as text, like a text file.
    let sample: Vec<Vec<String>> = range.rows().take(1000).map(|r| r.iter().map(text_of).collect()).collect();
    let header = opts.header.unwrap_or_else(|| detect_header(&sample, opts));
    let decimal = opts.decimal.unwrap_or_else(|| text_decimal(range, header));
    let mut rows = range.rows();
    let names: Vec<String> = if header {
        let first = rows.next().unwrap_or_default();
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
    let first_data = row0 as usize + 1 + usize::from(header);
    let mut texts: Vec<String> = Vec::with_capacity(width);
    for (i, row) in rows.enumerate() {
        texts.clear();
        texts.extend(row.iter().map(|d| match d {
            Data::Float(_) | Data::Int(_) | Data::Empty => String::new(),
            other => other.to_string(),
        }));
        let cells: Vec<Raw<'_>> = row
            .iter()
            .zip(&texts)
            .map(|(d, t)| match d {
                Data::Float(v) => Raw::Number(*v),
                Data::Int(v) => Raw::Number(*v as f64),
                Data::Empty => Raw::Empty,
                _ => Raw::Text(t.as_str()),
            })
            .collect();
        // Blank rows inside the used range carry no data.
        if cells.iter().all(|c| matches!(c, Raw::Empty)) {
            continue;
        }
        builder.push_row(first_data + i, &cells)?;
    }
    builder.finish(format, header, Vec::new(), Vec::new())
}

/// The decimal mark of numbers typed as text in the sheet (rare; numbers
/// stored as numbers need none).
fn text_decimal(range: &Range<Data>, header: bool) -> DecimalMark {
    let (mut point, mut comma) = (0usize, 0usize);
    for row in range.rows().skip(usize::from(header)).take(1000) {
        for d in row {
            if let Data::String(s) = d {
                match super::cells::decimal_evidence(s) {
                    Some(DecimalMark::Point) => point += 1,
                    Some(DecimalMark::Comma) => comma += 1,
                    None => {}
                }
            }
        }
    }
    if comma > point { DecimalMark::Comma } else { DecimalMark::Point }
}
