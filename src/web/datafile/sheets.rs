//! The bridge to the page's second WebAssembly module, the spreadsheet
//! reader (the `tern-sheets` crate, built by scripts/build-sheets and
//! started by its own boot script during page load, which sets
//! `globalThis.ternSheets` to a promise of its exports). The main module
//! stays small; a spreadsheet arrives here as tern-sheets' grid (JSON) and
//! becomes a table through the engine's `read_grid`, as natively.
//!
//! Invariant: no request is made here (the module came with the page);
//! whatever goes wrong in the reader ends as a message, never a panic.

use super::{pause, show};
use crate::engine::table::{self, ReadOptions, SheetError, SheetGrid, Table};
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;
use wasm_bindgen_futures::JsFuture;

/// How long to wait for the reader's boot script to run (ms): it is
/// listed in the page, so only a file dropped in the first moment waits.
const WAIT_MS: f64 = 10_000.0;

const NOT_HERE: &str = "the spreadsheet reader did not come with this page (a file of the page is missing): save the sheet as CSV (UTF-8) and load that";

/// Read the sheet `opts.sheet` (or the first) of an .xlsx or .ods file.
pub(super) async fn read_workbook(
    bytes: &[u8],
    name: &str,
    opts: &ReadOptions,
) -> Result<Table, String> {
    let exports = reader(name).await?;
    let read = js_sys::Reflect::get(&exports, &JsValue::from_str("read_sheet_json"))
        .ok()
        .and_then(|f| f.dyn_into::<js_sys::Function>().ok())
        .ok_or_else(|| NOT_HERE.to_string())?;
    let sheet = opts
        .sheet
        .as_deref()
        .map_or(JsValue::UNDEFINED, JsValue::from_str);
    let json = read
        .call2(&JsValue::NULL, &js_sys::Uint8Array::from(bytes), &sheet)
        .ok()
        .and_then(|v| v.as_string())
        .ok_or_else(|| "the spreadsheet reader stopped on this file (it may be damaged or too large): export the sheet as CSV (UTF-8) and load that".to_string())?;
    let result: Result<SheetGrid, SheetError> =
        serde_json::from_str(&json).map_err(|e| format!("the spreadsheet reader answered in a form this page does not know ({e}): reload the page"))?;
    let grid = result.map_err(|e| table::sheet_error(e).to_string())?;
    table::read_grid(&grid, opts).map_err(|e| e.to_string())
}

/// The reader's exports, once its module has started.
async fn reader(name: &str) -> Result<JsValue, String> {
    let key = JsValue::from_str("ternSheets");
    let t0 = super::dom::now_ms();
    let mut said = false;
    let promise = loop {
        let p = js_sys::Reflect::get(&js_sys::global(), &key).unwrap_or(JsValue::UNDEFINED);
        if !p.is_undefined() {
            break p;
        }
        if super::dom::now_ms() - t0 > WAIT_MS {
            return Err(NOT_HERE.into());
        }
        if !said {
            show::progress(Some((
                0.0,
                format!(
                    "Reading the spreadsheet “{name}”: waiting for the spreadsheet reader to start"
                ),
            )));
            said = true;
        }
        pause().await;
    };
    let promise = promise
        .dyn_into::<js_sys::Promise>()
        .map_err(|_| NOT_HERE.to_string())?;
    JsFuture::from(promise).await.map_err(|e| {
        let why = e.as_string().or_else(|| js_sys::Reflect::get(&e, &JsValue::from_str("message")).ok().and_then(|m| m.as_string())).unwrap_or_default();
        format!("the spreadsheet reader could not start in this browser ({why}): save the sheet as CSV (UTF-8) and load that")
    })
}
