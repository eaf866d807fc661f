//! Tern's spreadsheet reader: the chosen sheet (the first by default) of an
//! .xlsx or .ods file as a plain [`Grid`] of cells, through `calamine`.
//!
//! It is its own crate so that the page can load it as a second
//! WebAssembly module: calamine, zip, inflate and the text encodings
//! quick-xml links are about half of the page's WebAssembly. Natively the
//! engine calls [`read_sheet`] directly (its `spreadsheets` feature); on the
//! page the main module receives the same [`Grid`] as JSON from this
//! crate's module (`read_sheet_json`). Either way the engine's
//! `table::read_grid` turns the grid into a table: one path.
//!
//! Invariant: no I/O, no panic on any input (every failure is a
//! [`SheetError`]); numbers stored as numbers stay numbers; dates, booleans
//! and error cells become their text; nothing else is interpreted here.

use serde::{Deserialize, Serialize};

/// Which kind of spreadsheet the archive is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Kind {
    Xlsx,
    Ods,
}

impl Kind {
    /// The kind as a user knows it, for messages.
    pub fn label(self) -> &'static str {
        match self {
            Kind::Xlsx => "Excel workbook (.xlsx)",
            Kind::Ods => "OpenDocument spreadsheet (.ods)",
        }
    }
}

/// One cell of the used range.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum Cell {
    /// A number stored as a number (integers included).
    Number(f64),
    /// Anything else but an empty cell, as the spreadsheet shows it.
    Text(String),
    /// An empty cell (JSON `null`).
    Empty,
}

/// The used range of one sheet.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Grid {
    pub kind: Kind,
    /// Sheet names in workbook order.
    pub sheets: Vec<String>,
    /// The sheet read.
    pub sheet: String,
    /// 0-based row of the first used row (rows above it are empty).
    pub first_row: u32,
    /// Columns of the used range; every row has exactly this many cells.
    pub width: usize,
    pub rows: Vec<Vec<Cell>>,
}

/// Why a workbook could not be read.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub enum SheetError {
    /// The archive is not a readable spreadsheet of this kind (calamine's words).
    Damaged { kind: Kind, detail: String },
    /// No sheet of that name; the names there are.
    NoSuchSheet {
        wanted: String,
        available: Vec<String>,
    },
    /// A workbook without sheets.
    NoSheets,
}

#[cfg(feature = "read")]
mod read;
#[cfg(feature = "read")]
pub use read::read_sheet;

/// The page's entry point: [`read_sheet`]'s result as JSON,
/// `{"Ok": grid}` or `{"Err": error}`.
#[cfg(all(feature = "read", target_arch = "wasm32"))]
#[wasm_bindgen::prelude::wasm_bindgen]
pub fn read_sheet_json(bytes: &[u8], sheet: Option<String>) -> String {
    let result = read_sheet(bytes, sheet.as_deref());
    serde_json::to_string(&result).unwrap_or_else(|e| {
        format!("{{\"Err\":{{\"Damaged\":{{\"kind\":\"xlsx\",\"detail\":\"{e}\"}}}}}}")
    })
}
