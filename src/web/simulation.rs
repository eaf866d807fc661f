//! "Check by simulation" on the page: the population shape, the number of
//! data sets and the seed, read from the panel; the engine's simulation
//! check run in Web Workers (one per core, at most four) that instantiate
//! the page's own module, with a progress bar, a cancel button and the
//! partial result as it comes.
//!
//! The workers are `web::workers`'. The work is shared out in chunks of whole blocks (`simulate::BLOCK`),
//! each chunk sized to take about [`CHUNK_MS`]; the tallies are merged in
//! block order, so the numbers are those of `tern simulate` with the same
//! seed, however many workers ran. Tallies cross as JavaScript objects
//! (structured clone), so every number arrives exactly.
//!
//! Architecture invariant: the figures and sentences are the engine's
//! (`Plan::result`); no borrow of the run's state is held across an engine
//! call; the panel's inputs never recompute the design; a change to the
//! design during a run marks the result as made for the design as it was.

use crate::page::form::capital;
use super::{dom, form, listen};
use crate::engine::request::{self, RequestError};
use crate::engine::simulate::shape::{Kind, SHAPES, param_keys};
use crate::engine::simulate::{Plan, Simulation, SimulationError, Tally};
use crate::page::charts::realised_errors::{self, RealisedErrorsView};
use crate::page::charts::svg;
use crate::page::form::request_json;
use serde_json::{Map, Value};
use std::cell::{Cell, RefCell};
use std::collections::BTreeMap;
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;
use super::workers::{self, Spawned};

/// The most workers a check starts.
const WORKERS_MAX: u32 = 4;
/// A chunk of blocks is sized to take about this long in a worker (ms),
/// so that progress comes several times a second.
const CHUNK_MS: f64 = 80.0;
/// The partial result is redrawn at most this often (ms).
const RENDER_MS: f64 = 150.0;
/// The most blocks in one chunk.
const CHUNK_MAX: u64 = 64;

struct Slot {
    worker: Spawned,
    /// Blocks per chunk, adapted to the worker's speed.
    chunk: u64,
}

struct Run {
    id: u32,
    request: String,
    groups: String,
    plan: Plan,
    total: u64,
    next: u64,
    done: u64,
    chunks: BTreeMap<u64, Tally>,
    slots: Vec<Slot>,
    started: f64,
    rendered: f64,
}

#[derive(Default)]
struct Panel {
    /// The size the check runs at (the typed n, else the smallest
    /// conclusive n), from the last answer.
    n: Option<u64>,
    /// What the design's answer says about the size, for the panel's line.
    size_line: String,
    kind: Option<Kind>,
}

thread_local! {
    static RUN: RefCell<Option<Run>> = const { RefCell::new(None) };
    static RUNS: Cell<u32> = const { Cell::new(0) };
    static PANEL: RefCell<Panel> = RefCell::new(Panel::default());
    /// The last result shown (complete or cancelled) and the request text
    /// it answers, for saving and tests.
    static LAST: RefCell<Option<(String, Simulation)>> = const { RefCell::new(None) };
    /// The workers of runs that ended, kept until the next run starts: a
    /// run ends inside one of their handlers, which must not be dropped
    /// while it runs.
    static RETIRED: RefCell<Vec<Slot>> = const { RefCell::new(Vec::new()) };
    /// The chart's view of the result shown, for redrawing and saving.
    static VIEW: RefCell<Option<RealisedErrorsView>> = const { RefCell::new(None) };
}

/// Draw the result's chart again (a resize; a new result).
pub fn redraw() {
    let view = VIEW.with(|v| v.borrow().clone());
    if let Some(v) = view {
        super::canvas::paint("chart-check", &|area, look| realised_errors::draw(area, &v, look));
        dom::set_attr("chart-check", "aria-label", Some(&v.caption()));
    }
}

/// Save the chart as SVG (the report's figure).
fn save_svg() {
    let view = VIEW.with(|v| v.borrow().clone());
    match view.map(|v| svg::simulation_chart(&v)) {
        Some(Ok(text)) => {
            if dom::download("tern-chart-simulation.svg", &text, "image/svg+xml").is_err() {
                say("The file could not be saved.");
            }
        }
        Some(Err(e)) => say(&format!("The chart could not be written: {e}")),
        None => say("Run the check first."),
    }
}

/// The finished check for the report: the `simulation` block to add to
/// the report's request text (so that `tern report` draws the same data
/// sets) and the result; None while a run goes on, after a cancelled run
/// or when the design has changed since.
pub fn for_report() -> Option<(Value, Simulation)> {
    if RUN.with(|r| r.borrow().is_some()) || dom::by_id("sim-stale").is_some_and(|e| !e.has_attribute("hidden")) {
        return None;
    }
    LAST.with(|l| {
        let l = l.borrow();
        let (request, sim) = l.as_ref()?;
        (sim.replicates_done == sim.replicates).then_some(())?;
        let block = serde_json::from_str::<Value>(request).ok()?.get("simulation")?.clone();
        Some((block, sim.clone()))
    })
}

/// A refusal or a failure, in the panel's alert line.
fn say(text: &str) {
    dom::set_text("sim-msg", text);
}

/// How the run goes, in the panel's status line.
fn status(text: &str) {
    dom::set_text("sim-status", text);
}

/// Build the shape chooser and the parameter fields, wire the buttons.
pub fn setup() -> Result<(), JsValue> {
    let Some(panel) = dom::by_id("simulation") else { return Ok(()) };
    // The panel's inputs are the check's, not the design's.
    listen(&panel, "input", |e| {
        e.stop_propagation();
        show_params();
    })?;
    if let Some(list) = dom::by_id("sim-shapes") {
        list.set_text_content(None);
        for s in SHAPES {
            let Some(label) = dom::element("label", "") else { continue };
            label.set_id(&format!("sim-shape-w-{}", s.id));
            label.set_class_name("chip");
            let Some(radio) = dom::element("input", "") else { continue };
            for (k, v) in [("type", "radio"), ("name", "sim-shape"), ("value", s.id)] {
                radio.set_attribute(k, v)?;
            }
            label.append_child(&radio)?;
            let span = dom::add(&label, "span", "").ok_or("no document")?;
            dom::add(&span, "b", s.label).ok_or("no document")?;
            list.append_child(&label)?;
        }
    }
    if let Some(params) = dom::by_id("sim-params") {
        params.set_text_content(None);
        for key in param_keys() {
            let Some(p) = SHAPES.iter().flat_map(|s| s.params).find(|p| p.key == key) else { continue };
            let Some(w) = dom::element("div", "") else { continue };
            w.set_class_name("field");
            w.set_id(&format!("sim-w-{key}"));
            let label = dom::add(&w, "label", p.label).ok_or("no document")?;
            label.set_attribute("for", &format!("sim-{key}"))?;
            let input = dom::add(&w, "input", "").ok_or("no document")?;
            input.set_id(&format!("sim-{key}"));
            input.set_attribute("inputmode", if p.whole { "numeric" } else { "decimal" })?;
            input.set_attribute("value", &format!("{}", p.suggested))?;
            input.set_attribute("aria-describedby", &format!("sim-m-{key}"))?;
            let m = dom::add(&w, "p", "").ok_or("no document")?;
            m.set_id(&format!("sim-m-{key}"));
            m.set_class_name("msg");
            params.append_child(&w)?;
        }
    }
    dom::check_radio("sim-shape", Some("normal"));
    show_params();
    let on_click = |id: &str, f: fn()| -> Result<(), JsValue> {
        match dom::by_id(id) {
            Some(b) => listen(&b, "click", move |_| f()),
            None => Ok(()),
        }
    };
    on_click("sim-run", start)?;
    on_click("sim-cancel", cancel)?;
    on_click("sim-save", save)?;
    on_click("sim-save-svg", save_svg)?;
    Ok(())
}

/// Show the shapes of the design's kind of data and the chosen shape's
/// parameters.
fn show_params() {
    let kind = PANEL.with(|p| p.borrow().kind);
    let mut chosen = dom::checked_radio("sim-shape");
    for s in SHAPES {
        let fits = kind.is_none_or(|k| k == s.kind);
        dom::set_hidden(&format!("sim-shape-w-{}", s.id), !fits);
        if !fits && chosen.as_deref() == Some(s.id) {
            chosen = None;
        }
    }
    if chosen.is_none()
        && let Some(first) = SHAPES.iter().find(|s| kind.is_none_or(|k| k == s.kind))
    {
        dom::check_radio("sim-shape", Some(first.id));
        chosen = Some(first.id.to_string());
    }
    let entry = chosen.as_deref().and_then(crate::engine::simulate::shape::entry);
    for key in param_keys() {
        let used = entry.is_some_and(|e| e.params.iter().any(|p| p.key == key));
        dom::set_hidden(&format!("sim-w-{key}"), !used);
    }
}

/// The design's answer was shown: the size the check would run at.
pub fn design_shown(n: Option<u64>, n2: Option<u64>, dropout: Option<f64>, kind: Option<Kind>) {
    let line = match n {
        Some(n) => {
            let size = match n2 {
                Some(m) => format!("n1 = {n}, n2 = {m}"),
                None => format!("n = {n}"),
            };
            match dropout.filter(|q| *q > 0.0) {
                Some(q) => format!(
                    "The check runs at {size} (the size you check in step 2, else the smallest conclusive one), with your expected dropout of {}%: each data set's analysed size is drawn from those enrolled.",
                    crate::engine::evaluate::sig3(q * 100.0)
                ),
                None => format!("The check runs at {size} (the size you check in step 2, else the smallest conclusive one)."),
            }
        }
        None => "Complete the design first: the check runs at a size that step 2 checks or finds.".into(),
    };
    dom::set_text("sim-size", &line);
    let kind_changed = PANEL.with(|p| {
        let mut p = p.borrow_mut();
        p.n = n;
        p.size_line = line;
        let changed = p.kind != kind;
        p.kind = kind;
        changed
    });
    if kind_changed {
        show_params();
    }
}

/// The form changed: a result on screen no longer describes the design.
pub fn form_changed() {
    let shown = LAST.with(|l| l.borrow().is_some()) || RUN.with(|r| r.borrow().is_some());
    if shown {
        dom::set_hidden("sim-stale", false);
    }
}

/// A number typed in one of the panel's fields: None when empty, the
/// refusal's words when it is not a number (a comma is refused, not
/// guessed).
fn number(id: &str) -> Result<Option<f64>, String> {
    let text = dom::value(id);
    let t = text.trim();
    if t.is_empty() {
        return Ok(None);
    }
    t.parse::<f64>().map(Some).map_err(|_| format!("\"{t}\" is not a number; write it with digits and a decimal point, without separators"))
}

fn clear_messages() {
    for key in param_keys().into_iter().chain(["replicates", "seed"]) {
        dom::set_text(&format!("sim-m-{key}"), "");
        dom::set_class(&format!("sim-w-{key}"), "has-error", false);
    }
    say("");
    status("");
}

/// The request text of the check: the design as the form states it, at
/// the panel's size, with the `simulation` block; or the refusal, placed.
fn request_text() -> Option<String> {
    clear_messages();
    let reading = form::read();
    if !reading.design_ready() {
        say(&if reading.still_needed.is_empty() {
            "Correct the values marked above first.".to_string()
        } else {
            format!("Complete the design first; still needed: {}.", reading.still_needed.join(", "))
        });
        return None;
    }
    let Some(n) = PANEL.with(|p| p.borrow().n) else {
        say("No size to check yet: step 2 has found no conclusive sample size; type one to check there.");
        return None;
    };
    let mut obj = request_json(&reading.ask);
    obj.remove("data");
    obj.remove("notes");
    obj.insert("n".into(), Value::from(n));
    let mut block = Map::new();
    let shape = dom::checked_radio("sim-shape").unwrap_or_default();
    block.insert("shape".into(), Value::String(shape.clone()));
    let entry = crate::engine::simulate::shape::entry(&shape);
    let mut ok = true;
    let fields = entry.map(|e| e.params.iter().map(|p| p.key).collect::<Vec<_>>()).unwrap_or_default();
    for key in fields.into_iter().chain(["replicates", "seed"]) {
        match number(&format!("sim-{key}")) {
            Ok(Some(v)) => {
                block.insert(key.into(), request::json_number(v));
            }
            Ok(None) => {}
            Err(m) => {
                dom::set_text(&format!("sim-m-{key}"), &m);
                dom::set_class(&format!("sim-w-{key}"), "has-error", true);
                ok = false;
            }
        }
    }
    if !ok {
        return None;
    }
    obj.insert("simulation".into(), Value::Object(block));
    Some(Value::Object(obj).to_string())
}

/// Put a refusal next to the panel's field it names, else in the panel's
/// message line.
fn place(e: &RequestError) {
    let field = match e {
        RequestError::Simulation(SimulationError::Value { field, .. } | SimulationError::Missing { field, .. } | SimulationError::Unknown { field, .. }) => {
            field.strip_prefix("simulation.").map(str::to_string)
        }
        RequestError::Simulation(SimulationError::Budget { .. }) => Some("replicates".into()),
        _ => None,
    };
    let text = capital(&e.to_string());
    match field.filter(|f| dom::by_id(&format!("sim-m-{f}")).is_some()) {
        Some(f) => {
            dom::set_text(&format!("sim-m-{f}"), &text);
            dom::set_class(&format!("sim-w-{f}"), "has-error", true);
            say("Correct the value marked below to run the check.");
        }
        None => say(&text),
    }
}


/// Check the request on this thread (every refusal at once, at its
/// field), then start the workers.
fn start() {
    if RUN.with(|r| r.borrow().is_some()) {
        return;
    }
    RETIRED.with(|r| r.borrow_mut().clear());
    let Some(text) = request_text() else { return };
    let shape = dom::checked_radio("sim-shape").unwrap_or_default();
    let needs_data = crate::engine::simulate::shape::entry(&shape).is_some_and(|e| e.needs_data);
    let groups = if needs_data { super::datafile::group_values() } else { None };
    if needs_data && groups.is_none() {
        say("Resampling draws from your data file: load one in step 3 (and choose its columns) first.");
        return;
    }
    let plan = match request::parse(&text).and_then(|req| request::simulation_plan(&req, groups.clone())) {
        Ok(p) => p,
        Err(e) => return place(&e),
    };
    let groups_text = groups.map(|g| serde_json::to_string(&g).unwrap_or_default()).unwrap_or_default();
    let total = plan.blocks();
    let cores = dom::window().map_or(2.0, |w| w.navigator().hardware_concurrency());
    let count = (cores.clamp(1.0, f64::from(WORKERS_MAX)) as u64).min(total).max(1) as usize;
    let id = RUNS.with(|c| {
        c.set(c.get() + 1);
        c.get()
    });
    let mut slots = Vec::new();
    for i in 0..count {
        match workers::spawn(move |data| received(id, i, &data), move |why| fail(id, &format!("a background worker stopped ({why})"))) {
            Ok(worker) => slots.push(Slot { worker, chunk: 1 }),
            Err(why) => {
                for s in &slots {
                    s.worker.stop();
                }
                say(&format!("The check could not start: {why}. The command line's tern simulate does the same work."));
                return;
            }
        }
    }
    LAST.with(|l| *l.borrow_mut() = None);
    let now = dom::now_ms();
    RUN.with(|r| {
        *r.borrow_mut() = Some(Run {
            id,
            request: text,
            groups: groups_text,
            plan,
            total,
            next: 0,
            done: 0,
            chunks: BTreeMap::new(),
            slots,
            started: now,
            rendered: now,
        })
    });
    dom::set_hidden("sim-stale", true);
    dom::set_hidden("sim-cancel", false);
    dom::set_attr("sim-run", "disabled", Some(""));
    dom::set_hidden("sim-progress-box", false);
    dom::set_attr("simulation", "data-state", Some("running"));
    progress(0, total);
    status("Running in the background; the page stays usable. Partial results appear below as they come.");
    for i in 0..count {
        assign(id, i);
    }
}

/// Give worker `index` its next chunk, if blocks are left.
fn assign(id: u32, index: usize) {
    let job = RUN.with(|r| {
        let mut r = r.borrow_mut();
        let run = r.as_mut().filter(|run| run.id == id)?;
        if run.next >= run.total {
            return None;
        }
        let size = run.slots.get(index)?.chunk;
        let (first, last) = (run.next, (run.next + size).min(run.total));
        run.next = last;
        let msg = js_sys::Object::new();
        let set = |k: &str, v: JsValue| js_sys::Reflect::set(&msg, &k.into(), &v).is_ok();
        let ok = set("job", JsValue::from(id))
            && set("first", JsValue::from(first as f64))
            && set("last", JsValue::from(last as f64))
            && set("request", JsValue::from_str(&run.request))
            && set("groups", JsValue::from_str(&run.groups));
        ok.then(|| (run.slots[index].worker.worker.clone(), msg))
    });
    if let Some((worker, msg)) = job
        && worker.post_message(&msg).is_err()
    {
        fail(id, "a background worker could not be given its work");
    }
}

/// A worker's answer: a chunk's tally (merged, and the worker given the
/// next chunk) or its error.
fn received(id: u32, index: usize, data: &JsValue) {
    let get = |k: &str| workers::field(data, k);
    if get("job").and_then(|j| j.as_f64()) != Some(f64::from(id)) {
        return;
    }
    if let Some(e) = get("error") {
        return fail(id, &e.as_string().unwrap_or_default());
    }
    let (Some(first), Some(last), Some(value)) = (get("first").and_then(|v| v.as_f64()), get("last").and_then(|v| v.as_f64()), get("tally")) else {
        return fail(id, "a background worker answered without its figures");
    };
    let tally: Tally = match serde_wasm_bindgen::from_value(value) {
        Ok(t) => t,
        Err(e) => return fail(id, &format!("a background worker's figures could not be read ({e})")),
    };
    let ms = get("ms").and_then(|v| v.as_f64()).unwrap_or(CHUNK_MS);
    let (finished, due, done, total) = RUN.with(|r| {
        let mut r = r.borrow_mut();
        let Some(run) = r.as_mut().filter(|run| run.id == id) else { return (false, false, 0, 0) };
        let blocks = (last - first).max(1.0);
        run.chunks.insert(first as u64, tally);
        run.done += blocks as u64;
        if let Some(slot) = run.slots.get_mut(index) {
            // Aim the next chunk at CHUNK_MS from this one's pace.
            let per_block = (ms / blocks).max(0.01);
            slot.chunk = ((CHUNK_MS / per_block).floor() as u64).clamp(1, CHUNK_MAX);
        }
        let now = dom::now_ms();
        let finished = run.done >= run.total;
        let due = finished || now - run.rendered >= RENDER_MS;
        if due {
            run.rendered = now;
        }
        (finished, due, run.done, run.total)
    });
    if total > 0 {
        progress(done, total);
    }
    if finished {
        finish(id, None);
    } else {
        assign(id, index);
        if due {
            render(id, None);
        }
    }
}

/// The run's figures so far, merged in block order: what the engine says
/// of them.
fn render(id: u32, closing: Option<&str>) {
    let Some((plan, request, tally, done, total, started)) = RUN.with(|r| {
        let r = r.borrow();
        let run = r.as_ref().filter(|run| run.id == id)?;
        let mut tally = Tally::default();
        for t in run.chunks.values() {
            tally.merge(t);
        }
        Some((run.plan.clone(), run.request.clone(), tally, run.done, run.total, run.started))
    }) else {
        return;
    };
    progress(done, total);
    dom::set_attr("simulation", "data-elapsed-ms", Some(&format!("{:.0}", dom::now_ms() - started)));
    if tally.h0.replicates == 0 {
        return;
    }
    match plan.result(&tally) {
        Ok(sim) => {
            show(&sim, closing);
            LAST.with(|l| *l.borrow_mut() = Some((request, sim)));
        }
        Err(e) => say(&capital(&e.to_string())),
    }
}

fn progress(done: u64, total: u64) {
    if let Some(p) = dom::by_id("sim-progress").and_then(|e| e.dyn_into::<web_sys::HtmlProgressElement>().ok()) {
        p.set_max(total.max(1) as f64);
        p.set_value(done as f64);
    }
    let pct = if total == 0 { 100.0 } else { (done as f64 / total as f64 * 100.0).floor() };
    dom::set_text("sim-progress-text", &format!("{pct}% of the data sets drawn"));
}

/// Write a result: the chart, its numbers, the outcome shares and the
/// sentences.
fn show(sim: &Simulation, closing: Option<&str>) {
    dom::set_hidden("sim-result", false);
    if let Some(list) = dom::element("ul", "") {
        for r in &sim.readings {
            let _ = dom::add(&list, "li", r);
        }
        dom::replace("sim-readings", Some(&list));
    }
    let view = realised_errors::prep(sim);
    dom::set_html("sim-table", &realised_errors::numbers(&view).html());
    dom::set_html("sim-shares", &realised_errors::shares(&view).html());
    VIEW.with(|v| *v.borrow_mut() = Some(view));
    redraw();
    dom::set_text("sim-closing", closing.unwrap_or(""));
}

/// The run is over (all blocks in, or cancelled, or failed): stop the
/// workers and show the last figures.
fn finish(id: u32, closing: Option<&str>) {
    render(id, closing);
    let run = RUN.with(|r| {
        let mut r = r.borrow_mut();
        if r.as_ref().is_some_and(|run| run.id == id) { r.take() } else { None }
    });
    let Some(mut run) = run else { return };
    for s in &run.slots {
        s.worker.stop();
    }
    let slots = std::mem::take(&mut run.slots);
    dom::set_hidden("sim-cancel", true);
    dom::set_attr("sim-run", "disabled", None);
    dom::set_attr("simulation", "data-state", Some(if closing.is_some() { "stopped" } else { "done" }));
    if closing.is_none() {
        status(&format!(
            "Done: {} data sets under each hypothesis in {:.1} s.",
            run.plan.replicates,
            (dom::now_ms() - run.started) / 1000.0
        ));
    }
    // The handlers' closures outlive this call (it may run inside one).
    RETIRED.with(|r| r.borrow_mut().extend(slots));
}

fn fail(id: u32, why: &str) {
    say(&format!("The check stopped: {why}. The figures below, if any, are from the data sets drawn before it stopped."));
    finish(id, Some("Stopped before the end: these figures are from the data sets drawn so far."));
}

fn cancel() {
    let Some(id) = RUN.with(|r| r.borrow().as_ref().map(|run| run.id)) else { return };
    status("Cancelled. The figures below are from the data sets drawn before you cancelled.");
    finish(id, Some("Cancelled before the end: these figures are from the data sets drawn so far."));
}

/// The last result as JSON: `request`, the design with its `simulation`
/// block (what `tern simulate` reads to give the same numbers), and
/// `simulation`, the engine's result.
fn last_json(pretty: bool) -> Option<String> {
    LAST.with(|l| {
        let l = l.borrow();
        let (request, sim) = l.as_ref()?;
        let v = serde_json::json!({ "request": serde_json::from_str::<Value>(request).ok()?, "simulation": sim });
        if pretty { serde_json::to_string_pretty(&v).ok() } else { serde_json::to_string(&v).ok() }
    })
}

/// Save the last result as JSON ([`last_json`]).
fn save() {
    let text = last_json(true);
    match text {
        Some(t) => {
            if dom::download("tern-simulation.json", &t, "application/json").is_err() {
                say("The file could not be saved.");
            }
        }
        None => say("Run the check first."),
    }
}

/// The last result shown, as the saved file holds it (for the browser
/// tests), or null.
#[wasm_bindgen]
pub fn tern_last_simulation() -> Option<String> {
    last_json(false)
}
