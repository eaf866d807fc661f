//! Deciding from the user's own data file: paste, drop or choose a file
//! (or load the example), see how it was read, pick the columns, get the
//! summary per group with its charts, and decide with the figures filled
//! into the summary-figure fields.
//!
//! Architecture invariant: the statistics and the parsing are the engine's
//! (`engine::table`); this module reads bytes from the browser, keeps the
//! user's choices and shows what the engine says. Every text from the file
//! reaches the page through `textContent` (dom::element, dom::text_table),
//! never as markup. No borrow of the state is held across an `await`, an
//! engine call or a redraw. Nothing leaves the page: files are read with
//! `Blob.arrayBuffer()` in chunks, no request is made.

mod fill;
mod sheets;
mod show;

use crate::page::form::capital;
use super::{dom, listen};
use crate::engine::design::Family;
use crate::engine::table::{self, DataSummary, DecimalMark, ReadOptions, Table, TableBuilder};
use crate::page::charts::prep::{DataViews, data_views};
use fill::Fill;
use crate::engine::family::{Role, Shape};
use crate::engine::table::roles::{self as mapping, Choice};
use std::cell::RefCell;
use std::rc::Rc;
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;
use wasm_bindgen_futures::JsFuture;

/// The invented raw data of the worked example, embedded in the build.
const DEMO_CSV: &str = include_str!("../../../examples/clinic-recovery-data.csv");
const DEMO_NAME: &str = "clinic-recovery-data.csv";
/// Bytes read from a file per step; the page yields to the browser between steps.
const CHUNK: f64 = 1024.0 * 1024.0;
/// Show the progress bar once reading has taken this long (ms).
const PROGRESS_AFTER_MS: f64 = 200.0;

/// Where the table came from (kept so that it can be read again with other
/// options).
#[derive(Clone)]
enum Source {
    File(web_sys::File),
    Text(Rc<String>),
    Demo,
}

#[derive(Default)]
struct DataState {
    /// Bumped by every new read; an older read that sees a newer number stops.
    generation: u64,
    source: Option<(String, Source)>,
    table: Option<Rc<Table>>,
    /// The user's overrides (None: detect).
    opts: ReadOptions,
    family: Option<Family>,
    choice: Choice,
    /// Leave out the rows with problems.
    exclude: bool,
    summary: Option<Rc<DataSummary>>,
    charts: Option<Rc<DataViews>>,
    fill: Fill,
}

thread_local! {
    static DATA: RefCell<DataState> = RefCell::new(DataState { fill: Fill { active: true, ..Fill::default() }, ..DataState::default() });
}

fn with<R>(f: impl FnOnce(&mut DataState) -> R) -> R {
    DATA.with(|s| f(&mut s.borrow_mut()))
}

/// The data file's part of a report, when its figures are the ones that
/// decide: every summary figure of the family still holds the file's
/// value (a figure typed over makes the decision the user's own, and the
/// file's charts would no longer describe it).
pub fn report_part() -> Option<crate::report::DataPart> {
    with(|s| {
        let (family, summary) = (s.family?, s.summary.clone()?);
        let needed = fill::fields(family, &summary.summary).len();
        (needed > 0 && s.fill.shown() == needed)
            .then(|| crate::report::DataPart { views: s.charts.as_deref().cloned(), notes: summary.notes.clone() })
    })
}

/// Each group's values of the loaded file as the current choice maps them
/// (problem rows left out when the user chose so), for the simulation
/// check's `resample` shape; None without a file, a complete mapping or
/// measurements.
pub fn group_values() -> Option<Vec<Vec<f64>>> {
    let (t, family, choice, exclude) = with(|s| s.table.clone().map(|t| (t, s.family, s.choice.clone(), s.exclude)))?;
    let sh = family?.entry().shape;
    if sh.binary() {
        return None;
    }
    let m = mapping::to_mapping(&t, sh, &choice).ok()?;
    let rows: &[usize] = if exclude { &t.problems.rows } else { &[] };
    table::group_values(&t, &m, rows).ok()
}

/// Wire the data-file controls. Their input events stay here: they must not
/// recompute the design on every keystroke of a pasted table.
pub fn setup() -> Result<(), JsValue> {
    let Some(root) = dom::by_id("datafile") else { return Ok(()) };
    listen(&root, "input", |e| e.stop_propagation())?;
    if let Some(zone) = dom::by_id("drop-zone") {
        // Without cancelling these the browser opens the dropped file itself.
        listen(&zone, "dragover", |e| {
            e.prevent_default();
            dom::set_class("drop-zone", "dragging", true);
        })?;
        listen(&zone, "dragleave", |_| dom::set_class("drop-zone", "dragging", false))?;
        listen(&zone, "drop", |e| {
            e.prevent_default();
            dom::set_class("drop-zone", "dragging", false);
            let file = e.dyn_ref::<web_sys::DragEvent>().and_then(|d| d.data_transfer()).and_then(|t| t.files()).and_then(|f| f.get(0));
            if let Some(f) = file {
                start(f.name(), Source::File(f));
            }
        })?;
    }
    // A file dropped beside the zone must not replace the page either.
    if let Some(w) = dom::window() {
        listen(&w, "dragover", |e| e.prevent_default())?;
        listen(&w, "drop", |e| e.prevent_default())?;
        listen(&w, "resize", |_| draw_charts())?;
    }
    if let Some(input) = dom::by_id("data-file") {
        listen(&input, "change", |_| {
            let Some(i) = dom::input("data-file") else { return };
            if let Some(f) = i.files().and_then(|l| l.get(0)) {
                start(f.name(), Source::File(f));
            }
            // The same file chosen again must fire again.
            i.set_value("");
        })?;
    }
    if let Some(b) = dom::by_id("data-demo") {
        listen(&b, "click", |_| start(DEMO_NAME.into(), Source::Demo))?;
    }
    if let Some(b) = dom::by_id("data-paste-read") {
        listen(&b, "click", |_| {
            let text = dom::value("data-paste");
            if text.trim().is_empty() {
                show::alert("The paste box is empty: paste the rows of your table, the column names first.");
                return;
            }
            start("the pasted table".into(), Source::Text(Rc::new(text)));
        })?;
    }
    if let Some(el) = dom::by_id("data-read") {
        listen(&el, "change", |e| on_read_option(&e))?;
    }
    if let Some(el) = dom::by_id("data-missing") {
        listen(&el, "change", |_| {
            let tokens: Vec<String> = std::iter::once(String::new())
                .chain(dom::value("data-missing").lines().map(|l| l.trim().to_string()).filter(|l| !l.is_empty()))
                .collect();
            with(|s| s.opts.missing = tokens);
            reread();
        })?;
    }
    if let Some(el) = dom::by_id("data-mapping") {
        listen(&el, "change", |e| on_mapping(&e))?;
    }
    if let Some(el) = dom::by_id("data-problems") {
        listen(&el, "change", |_| {
            let on = dom::input("data-exclude").is_some_and(|i| i.checked());
            with(|s| s.exclude = on);
            resummarise(true);
        })?;
    }
    if let Some(b) = dom::by_id("data-fill-undo") {
        listen(&b, "click", |_| {
            with(|s| {
                s.fill.put_back();
                s.fill.active = false;
            });
            show_fill_note();
            super::recompute();
        })?;
    }
    if let Some(b) = dom::by_id("data-fill-use") {
        listen(&b, "click", |_| {
            with(|s| s.fill.active = true);
            resummarise(true);
        })?;
    }
    dom::set_value("data-missing", &table::DEFAULT_MISSING.iter().filter(|t| !t.is_empty()).copied().collect::<Vec<_>>().join("\n"));
    Ok(())
}

/// Called at the start of every recompute: follow a change of family (the
/// mapping depends on it) and keep the "from the file" marks true.
pub fn sync(family: Option<Family>) {
    let (changed, has_table) = with(|s| (s.family != family, s.table.is_some()));
    if changed {
        with(|s| s.family = family);
        if has_table {
            remap();
            resummarise(false);
        }
    }
    with(|s| s.fill.mark());
    show_fill_note();
}

/// A new source: forget the overrides that belonged to the old file.
fn start(name: String, source: Source) {
    with(|s| {
        let missing = std::mem::take(&mut s.opts.missing);
        s.opts = ReadOptions { missing, ..ReadOptions::default() };
        s.source = Some((name, source));
        s.exclude = false;
    });
    reread();
}

/// Read the current source with the current options, then show it.
fn reread() {
    let Some((token, (name, source), opts)) = with(|s| {
        s.generation += 1;
        s.source.clone().map(|src| (s.generation, src, s.opts.clone()))
    }) else {
        return;
    };
    show::alert("");
    dom::set_attr("app", "data-file-state", Some("reading"));
    wasm_bindgen_futures::spawn_local(async move {
        let t0 = dom::now_ms();
        let result = read(&source, &name, &opts, token).await;
        if with(|s| s.generation) != token {
            return; // a newer read took over
        }
        let parse_ms = dom::now_ms() - t0;
        match result {
            Ok(t) => {
                if parse_ms > PROGRESS_AFTER_MS {
                    show::progress(Some((1.0, format!("“{name}” is read; summarising the columns you chose"))));
                    pause().await;
                    if with(|s| s.generation) != token {
                        return;
                    }
                }
                let t = Rc::new(t);
                with(|s| s.table = Some(t.clone()));
                show::table(&name, &t, &opts, with(|s| s.exclude));
                remap();
                resummarise(false);
                show::progress(None);
                dom::set_attr("app", "data-file-state", Some("ready"));
            }
            Err(msg) => {
                show::progress(None);
                // The previous table (if any) and every typed figure stay.
                show::alert(&format!("“{name}” could not be read: {msg}. Nothing else on the page has changed."));
                dom::set_attr("app", "data-file-state", Some("error"));
            }
        }
        let total = dom::now_ms() - t0;
        dom::set_attr("app", "data-file-parse-ms", Some(&format!("{parse_ms:.1}")));
        dom::set_attr("app", "data-file-ms", Some(&format!("{total:.1}")));
        let n = dom::by_id("app").and_then(|e| e.get_attribute("data-file-loads")).and_then(|s| s.parse::<u64>().ok()).unwrap_or(0);
        dom::set_attr("app", "data-file-loads", Some(&(n + 1).to_string()));
        super::recompute();
    });
}

/// Read a source into a table. Text files go through the engine's
/// incremental reader in chunks, with a pause for the browser between
/// chunks and a progress bar once it takes longer than a moment.
async fn read(source: &Source, name: &str, opts: &ReadOptions, token: u64) -> Result<Table, String> {
    match source {
        Source::Demo => table::read_table(DEMO_CSV.as_bytes(), Some(DEMO_NAME), opts).map_err(|e| e.to_string()),
        Source::Text(t) => table::read_table(t.as_bytes(), None, opts).map_err(|e| e.to_string()),
        Source::File(f) => {
            let size = f.size();
            let lower = name.to_lowercase();
            let head = bytes(f, 0.0, size.min(4.0)).await?;
            let zip = head.starts_with(b"PK\x03\x04") || lower.ends_with(".xlsx") || lower.ends_with(".ods");
            if zip {
                // Spreadsheets are zip archives: read whole, after a word
                // on screen.
                show::progress(Some((0.0, format!("Reading the spreadsheet “{name}”"))));
                pause().await;
                let all = bytes(f, 0.0, size).await?;
                if table::is_spreadsheet(&all, Some(name)) {
                    return sheets::read_workbook(&all, name, opts).await;
                }
                return table::read_table(&all, Some(name), opts).map_err(|e| e.to_string());
            }
            let t0 = dom::now_ms();
            let mut last_yield = t0;
            let mut builder = TableBuilder::new(opts.clone());
            // Columns sized once for the whole file (wasm memory never shrinks).
            builder.size_hint(size as u64);
            let mut at = 0.0;
            // Time inside the engine's reader (the rest is the browser
            // reading the file and painting), for the benchmark.
            let mut engine_ms = 0.0;
            let mut chunk: Vec<u8> = Vec::new();
            // The browser reads the next slice while the engine parses this
            // one: the read is started before the push.
            let mut next = Some(slice(f, 0.0, CHUNK.min(size))?);
            while let Some(pending) = next.take() {
                let end = (at + CHUNK).min(size);
                let buf = JsFuture::from(pending).await.map_err(|_| UNREADABLE.to_string())?;
                if end < size {
                    next = Some(slice(f, end, (end + CHUNK).min(size))?);
                }
                let view = js_sys::Uint8Array::new(&buf);
                chunk.resize(view.length() as usize, 0);
                view.copy_to(&mut chunk);
                let p0 = dom::now_ms();
                builder.push(&chunk).map_err(|e| e.to_string())?;
                engine_ms += dom::now_ms() - p0;
                at = end;
                let now = dom::now_ms();
                if now - t0 > PROGRESS_AFTER_MS {
                    show::progress(Some((at / size, format!("Reading “{name}”: {:.0} of {:.0} MB", at / 1e6, size / 1e6))));
                }
                // Reading a chunk already returns to the browser's event
                // loop; a real pause every 200 ms makes sure it paints.
                if now - last_yield > 200.0 {
                    pause().await;
                    last_yield = dom::now_ms();
                }
                if with(|s| s.generation) != token {
                    return Err("a newer file replaced it".into());
                }
            }
            if dom::now_ms() - t0 > PROGRESS_AFTER_MS {
                show::progress(Some((1.0, format!("Reading “{name}”: checking every column"))));
                pause().await;
            }
            let p0 = dom::now_ms();
            let t = builder.finish().map_err(|e| e.to_string());
            engine_ms += dom::now_ms() - p0;
            dom::set_attr("app", "data-file-engine-ms", Some(&format!("{engine_ms:.1}")));
            t
        }
    }
}

const UNREADABLE: &str = "the browser could not read the file (was it moved or deleted?)";

/// Start reading the bytes `start..end` of a file.
fn slice(f: &web_sys::File, start: f64, end: f64) -> Result<js_sys::Promise, String> {
    let blob = f.slice_with_f64_and_f64(start, end).map_err(|_| "the browser could not slice the file".to_string())?;
    Ok(blob.array_buffer())
}

/// The bytes `start..end` of a file.
async fn bytes(f: &web_sys::File, start: f64, end: f64) -> Result<Vec<u8>, String> {
    let buf = JsFuture::from(slice(f, start, end)?).await.map_err(|_| UNREADABLE.to_string())?;
    Ok(js_sys::Uint8Array::new(&buf).to_vec())
}

/// Give the browser a turn (a zero-delay timer).
async fn pause() {
    let p = js_sys::Promise::new(&mut |resolve, _| {
        if let Some(w) = dom::window() {
            let _ = w.set_timeout_with_callback_and_timeout_and_arguments_0(&resolve, 0);
        } else {
            let _ = resolve.call0(&JsValue::NULL);
        }
    });
    let _ = JsFuture::from(p).await;
}

/// The user changed how the table is read (delimiter, decimal mark, header, sheet).
fn on_read_option(e: &web_sys::Event) {
    let Some(input) = e.target().and_then(|t| t.dyn_into::<web_sys::HtmlInputElement>().ok()) else { return };
    let v = input.value();
    with(|s| match input.name().as_str() {
        "dr-delimiter" => s.opts.delimiter = v.bytes().next().map(|b| if v == "tab" { b'\t' } else { b }),
        "dr-decimal" => s.opts.decimal = Some(if v == "comma" { DecimalMark::Comma } else { DecimalMark::Point }),
        "dr-header" => s.opts.header = Some(v == "yes"),
        "dr-sheet" => s.opts.sheet = Some(v),
        _ => {}
    });
    reread();
}

/// The user picked a column or a level.
fn on_mapping(e: &web_sys::Event) {
    let Some(input) = e.target().and_then(|t| t.dyn_into::<web_sys::HtmlInputElement>().ok()) else { return };
    let Some(role) = input.name().strip_prefix("dm-").and_then(Role::from_key) else { return };
    let v = input.value();
    with(|s| {
        s.choice.set(role, v);
        // A new group or outcome column brings its own levels.
        match role {
            Role::Group => s.choice.picks.retain(|(r, _)| !matches!(r, Role::Level1 | Role::Level2)),
            Role::Outcome => s.choice.picks.retain(|(r, _)| *r != Role::Success),
            _ => {}
        }
    });
    remap();
    resummarise(true);
}

fn unit() -> String {
    dom::value("f-unit")
}

/// Complete the choice for the table and the family, and show the questions.
fn remap() {
    let Some((t, family, old)) = with(|s| s.table.clone().map(|t| (t, s.family, s.choice.clone()))) else { return };
    match family {
        Some(f) => {
            let sh = f.entry().shape;
            let c = mapping::complete(&t, sh, &old, &unit());
            show::mapping(&t, sh, &c);
            with(|s| s.choice = c);
        }
        None => show::mapping_waiting(),
    }
}

/// Summarise with the current choice, show it, fill the figures; with
/// `and_recompute` also recompute the decision (not from inside one).
fn resummarise(and_recompute: bool) {
    let Some((t, family, choice, exclude)) = with(|s| s.table.clone().map(|t| (t, s.family, s.choice.clone(), s.exclude))) else {
        return;
    };
    let outcome = family.ok_or("Choose what you are comparing (step 1) to summarise the file.".to_string()).and_then(|f| {
        let sh = f.entry().shape;
        let m = mapping::to_mapping(&t, sh, &choice).map_err(|q| format!("Still to choose: {q}"))?;
        let rows: &[usize] = if exclude { &t.problems.rows } else { &[] };
        let t0 = dom::now_ms();
        let sum = table::summarise(&t, &m, rows).map_err(|e| capital(&e.to_string()))?;
        dom::set_attr("app", "data-summarise-ms", Some(&format!("{:.1}", dom::now_ms() - t0)));
        let values = if sh.binary() { None } else { table::group_values(&t, &m, rows).ok() };
        Ok((sh, sum, values))
    });
    match outcome {
        Ok((sh, sum, values)) => {
            let t0 = dom::now_ms();
            let views = values.map(|v| Rc::new(data_views(&sum, &v, sh == Shape::Paired, &unit())));
            dom::set_attr("app", "data-chart-prep-ms", Some(&format!("{:.1}", dom::now_ms() - t0)));
            show::summary(&sum, sh);
            let sum = Rc::new(sum);
            with(|s| {
                s.summary = Some(sum.clone());
                s.charts = views;
                if let Some(f) = s.family {
                    s.fill.write(f, &sum.summary);
                }
            });
        }
        Err(msg) => {
            show::summary_message(&msg);
            with(|s| {
                s.summary = None;
                s.charts = None;
                // The figures go back to what they were: stale file figures
                // must not stay marked as the file's.
                s.fill.put_back();
            });
        }
    }
    let t0 = dom::now_ms();
    draw_charts();
    dom::set_attr("app", "data-chart-draw-ms", Some(&format!("{:.1}", dom::now_ms() - t0)));
    show_fill_note();
    if and_recompute {
        super::recompute();
    }
}

fn draw_charts() {
    let v = with(|s| s.charts.clone());
    show::charts(v.as_deref());
}

fn show_fill_note() {
    let (active, shown, source, family, choice) =
        with(|s| (s.fill.active, s.fill.shown(), s.source.as_ref().map(|x| x.0.clone()), s.family, s.choice.clone()));
    let Some(name) = source else {
        dom::set_hidden("data-fill", true);
        return;
    };
    dom::set_hidden("data-fill", false);
    let text = if !active {
        format!("The summary figures below are yours, not the file’s: “{name}” is read but not used for the decision.")
    } else if shown > 0 {
        let how = family.map(|f| mapping::describe(f.entry().shape, &choice)).unwrap_or_default();
        format!(
            "The summary figures below marked ▣ come from “{name}” ({how}). Type over any of them to use your own figure instead; the file will not change it again."
        )
    } else {
        format!("None of the summary figures below comes from “{name}” at the moment.")
    };
    dom::set_text("data-fill-text", &text);
    dom::set_hidden("data-fill-undo", !active);
    dom::set_hidden("data-fill-use", active);
}


/// Bytes of WebAssembly memory now (it only grows, so after a load this is
/// its peak); read by the data-file benchmark (tests/browser/bench-data.mjs).
#[wasm_bindgen]
pub fn tern_memory_bytes() -> f64 {
    core::arch::wasm32::memory_size(0) as f64 * 65536.0
}
