//! The page: reads the design from the DOM, asks the engine, shows the
//! answer as text and as four canvas charts, live on every input.
//!
//! Architecture invariant: this module owns every side effect of the page
//! (DOM, events, canvas) and none of the statistics. It never holds a
//! borrow of its state across a call into the engine or a chart, so that
//! if a panic ever trapped one computation the next input still works; the
//! panic hook tells the user so in the page.

mod canvas;
mod datafile;
mod demo;
mod dom;
mod form;
mod offline;
mod page_canvas;
mod report;
mod saved;
mod search;
mod simulation;
mod view;
mod workers;

use crate::engine::{request, simulate};
use crate::page::charts::prep::{self, Views};
use crate::page::form as page_form;
use serde::Serialize;
use serde_json::Value;
use std::cell::RefCell;
use std::rc::Rc;
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;

/// What the charts show now, kept so that a resize can redraw without
/// recomputing.
#[derive(Default)]
struct State {
    views: Option<Rc<Views>>,
    frame_pending: bool,
    redraw: Option<js_sys::Function>,
}

thread_local! {
    static STATE: RefCell<State> = RefCell::new(State::default());
}

/// Entry point, called once by trunk's bootstrap. In a Web Worker (the
/// simulation check's, which instantiates the same module) there is no
/// window and nothing to set up.
#[wasm_bindgen(start)]
pub fn start() {
    if web_sys::window().is_none() {
        return;
    }
    install_panic_hook();
    if let Err(e) = setup() {
        web_sys::console::error_1(&e);
        dom::set_text("page-alert", "The page could not start its controls. Reload the page to try again.");
        dom::set_hidden("page-alert", false);
    }
}

fn install_panic_hook() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        std::panic::set_hook(Box::new(|info| {
            console_error_panic_hook::hook(info);
            // Only DOM calls here: never the page's state.
            dom::set_text(
                "page-alert",
                "Something went wrong while computing this design. Everything you typed is kept; change any value to try again.",
            );
            dom::set_hidden("page-alert", false);
        }));
    });
}

fn listen(target: &web_sys::EventTarget, event: &str, f: impl FnMut(web_sys::Event) + 'static) -> Result<(), JsValue> {
    let cb = Closure::<dyn FnMut(web_sys::Event)>::new(f);
    target.add_event_listener_with_callback(event, cb.as_ref().unchecked_ref())?;
    // The listeners live as long as the page.
    cb.forget();
    Ok(())
}

fn setup() -> Result<(), JsValue> {
    let window = dom::window().ok_or("no window")?;
    form::build()?;
    let form_el = dom::by_id("tern-form").ok_or("the form #tern-form is missing")?;
    listen(&form_el, "input", |_| {
        report::form_changed();
        simulation::form_changed();
        recompute();
    })?;
    listen(&form_el, "submit", |e| e.prevent_default())?;
    if let Some(b) = dom::by_id("new-design") {
        listen(&b, "click", |_| {
            demo::clear();
            recompute();
            if let Some(e) = dom::by_id("step-design").and_then(|e| e.dyn_into::<web_sys::HtmlElement>().ok()) {
                let _ = e.focus();
            }
        })?;
    }
    if let Some(b) = dom::by_id("use-balancing-weight") {
        listen(&b, "click", |_| {
            let w = dom::by_id("use-balancing-weight").and_then(|e| e.get_attribute("data-weight"));
            if let Some(w) = w {
                dom::set_value(&form::input_id("weight"), &w);
                recompute();
            }
        })?;
    }
    if let Some(b) = dom::by_id("size-search-stop") {
        listen(&b, "click", |_| search::stop())?;
    }
    if let Some(b) = dom::by_id("load-demo") {
        listen(&b, "click", |_| {
            demo::load_demo();
            recompute();
        })?;
    }
    let redraw = Closure::<dyn FnMut()>::new(|| {
        STATE.with(|s| s.borrow_mut().frame_pending = false);
        redraw_charts();
        simulation::redraw();
    });
    let redraw_fn: js_sys::Function = redraw.as_ref().unchecked_ref::<js_sys::Function>().clone();
    redraw.forget();
    STATE.with(|s| s.borrow_mut().redraw = Some(redraw_fn));
    listen(&window, "resize", |_| schedule_redraw())?;
    // A chart's numbers table is written when its <details> opens ("toggle"
    // does not bubble, so each one listens).
    for id in ["table-sampling", "table-by-n", "table-tradeoff", "table-total"] {
        if let Some(details) = dom::by_id(id).and_then(|t| t.parent_element()) {
            listen(&details, "toggle", |_| {
                let views = STATE.with(|s| s.borrow().views.clone());
                canvas::fill_tables(views.as_deref(), true);
            })?;
        }
    }
    offline::setup()?;
    saved::setup()?;
    report::setup()?;
    datafile::setup()?;
    simulation::setup()?;
    if !saved::open_from_link() {
        demo::load_demo();
    }
    recompute();
    dom::set_attr("app", "data-ready", Some("true"));
    // Milliseconds from navigation start to the demo drawn (read by the
    // browser test).
    dom::set_attr("app", "data-ready-ms", Some(&format!("{:.1}", dom::now_ms())));
    Ok(())
}

fn schedule_redraw() {
    let f = STATE.with(|s| {
        let mut s = s.borrow_mut();
        if s.frame_pending {
            None
        } else {
            s.frame_pending = true;
            s.redraw.clone()
        }
    });
    if let (Some(f), Some(w)) = (f, dom::window())
        && w.request_animation_frame(&f).is_err()
    {
        STATE.with(|s| s.borrow_mut().frame_pending = false);
    }
}

/// Read the form, ask the engine once, show everything. Runs on every input.
pub(crate) fn recompute() {
    let t0 = dom::now_ms();
    dom::set_hidden("page-alert", true);
    // The data file's figures follow the family before the form is read.
    datafile::sync(dom::checked_radio("family").and_then(|id| crate::engine::design::Family::from_id(&id)));
    let reading = form::read();
    form::show_fields(reading.family, &reading.unit);
    let mut messages = reading.messages.clone();
    if !reading.design_ready() {
        search::after_reply(&reading.ask, false);
        form::show_messages(&messages);
        view::show_incomplete(&reading.still_needed);
        set_views(None);
        canvas::clear_all();
        finish(t0);
        return;
    }
    // One call: a refused n or refused data come back beside an answer
    // computed without them.
    let reply = request::reply_searching(&reading.ask, search::mode(&reading.ask));
    search::after_reply(&reading.ask, reply.answer.as_ref().is_some_and(|a| a.sample_size.pending));
    for err in &reply.errors {
        let m = page_form::engine_message(reading.family, err);
        if !messages.contains(&m) {
            messages.push(m);
        }
    }
    form::show_messages(&messages);
    let Some(answer) = reply.answer else {
        view::show_incomplete(&[]);
        set_views(None);
        canvas::clear_all();
        finish(t0);
        return;
    };
    view::show_answer(&answer, &reading.unit);
    let typed = reading.ask.n.filter(|x| x.fract() == 0.0 && *x >= 1.0 && *x <= 1e7).map(|x| x as u64);
    let sim_n = typed.or(answer.sample_size.youden.map(|g| g.n1));
    let kind = if answer.design.family.entry().shape.binary() { simulate::shape::Kind::Outcomes } else { simulate::shape::Kind::Measurements };
    simulation::design_shown(sim_n, sim_n.and_then(|n| answer.design.n2(n)), reading.ask.context.dropout, Some(kind));
    if answer.decision.is_none() && reading.data_started {
        view::show_no_decision("Complete or correct the summary figures marked above to decide.");
    }
    view::show_check(reply.check.as_ref());
    let views = match (&answer.at_n, &answer.curves) {
        (Some(at), Some(curves)) => {
            let observed = answer.decision.as_ref().map(|d| d.statistic);
            let youden_n = answer.sample_size.youden.map(|g| g.n1);
            Some(Rc::new(prep::views(&answer.design, at, curves, youden_n, observed, &reading.unit)))
        }
        _ => None,
    };
    let searching = views.is_none() && answer.sample_size.pending;
    set_views(views);
    let t1 = dom::now_ms();
    if searching {
        canvas::clear_all_saying("The charts follow once the sample size is found.", "Empty: the search for the sample size is still running.");
    } else {
        redraw_charts();
    }
    dom::set_attr("app", "data-engine-ms", Some(&format!("{:.2}", t1 - t0)));
    dom::set_attr("app", "data-draw-ms", Some(&format!("{:.2}", dom::now_ms() - t1)));
    finish(t0);
}

fn set_views(v: Option<Rc<Views>>) {
    STATE.with(|s| s.borrow_mut().views = v);
}

fn redraw_charts() {
    let views = STATE.with(|s| s.borrow().views.clone());
    match views {
        Some(v) => canvas::draw_all(&v),
        None => canvas::clear_all(),
    }
}

/// Record how long the update took (read by the browser test).
fn finish(t0: f64) {
    let ms = dom::now_ms() - t0;
    dom::set_attr("app", "data-last-update-ms", Some(&format!("{ms:.2}")));
    let count = dom::by_id("app").and_then(|e| e.get_attribute("data-updates")).and_then(|s| s.parse::<u64>().ok()).unwrap_or(0);
    dom::set_attr("app", "data-updates", Some(&(count + 1).to_string()));
}

/// The engine's JSON contract, as the command line's `tern run`: one JSON
/// document in, one out.
#[wasm_bindgen]
pub fn tern_run(request: &str) -> Result<String, JsValue> {
    request::run(request).map_err(|e| JsValue::from_str(&e.to_string()))
}

/// The same contract with a JavaScript object in and out (plain objects and
/// arrays, as JSON would give).
#[wasm_bindgen]
pub fn tern_answer(request: JsValue) -> Result<JsValue, JsValue> {
    let value: Value = serde_wasm_bindgen::from_value(request).map_err(|e| JsValue::from_str(&e.to_string()))?;
    let req = request::parse_value(&value).map_err(|e| JsValue::from_str(&e.to_string()))?;
    let ans = request::answer(&req).map_err(|e| JsValue::from_str(&e.to_string()))?;
    ans.serialize(&serde_wasm_bindgen::Serializer::json_compatible()).map_err(|e| JsValue::from_str(&e.to_string()))
}

/// Panic on purpose, so that the browser test can check that the page
/// survives one and keeps computing. Never called by the page itself, and
/// only in test builds (the `selftest` feature, off by default): the page
/// users get has no such export (scripts/test-page checks dist/).
#[cfg(feature = "selftest")]
#[wasm_bindgen]
pub fn tern_selftest_panic() {
    panic!("deliberate panic from tern_selftest_panic (browser test)");
}

/// A worker's share of a simulation check (run in the page's Web Workers,
/// `web::simulation`): the blocks `first..last` of the request's
/// `simulation` block, with a data file's groups for `resample` (JSON
/// text, or empty), as the engine's `Tally`, a JavaScript object whose
/// numbers cross to the page exactly (structured clone, no text).
#[wasm_bindgen]
pub fn tern_simulate_blocks(request: &str, groups: &str, first: f64, last: f64) -> Result<JsValue, JsValue> {
    let req = request::parse(request).map_err(|e| JsValue::from_str(&e.to_string()))?;
    let groups: Option<Vec<Vec<f64>>> = if groups.is_empty() { None } else { serde_json::from_str(groups).map_err(|e| JsValue::from_str(&e.to_string()))? };
    let plan = request::simulation_plan(&req, groups).map_err(|e| JsValue::from_str(&e.to_string()))?;
    let tally = plan.run_blocks(first.max(0.0) as u64..last.max(0.0) as u64);
    serde_wasm_bindgen::to_value(&tally).map_err(|e| JsValue::from_str(&e.to_string()))
}

/// A worker's sample-size search (`web::search`): the whole search of the
/// request's design (`sample_size::search`), telling `progress` where it
/// stands (every 64th n: the worker passes on one in 100 ms), as the
/// findings, a JavaScript object.
#[wasm_bindgen]
pub fn tern_search(request: &str, progress: &js_sys::Function) -> Result<JsValue, JsValue> {
    let req = request::parse(request).map_err(|e| JsValue::from_str(&e.to_string()))?;
    let mut count = 0u32;
    let mut tell = |p: crate::engine::sample_size::Progress| {
        count = count.wrapping_add(1);
        if count % 64 == 1
            && let Ok(v) = serde_wasm_bindgen::to_value(&p)
        {
            let _ = progress.call1(&JsValue::NULL, &v);
        }
    };
    match crate::engine::sample_size::search(&req.design, None, &mut tell) {
        Ok(Some(found)) => serde_wasm_bindgen::to_value(&found).map_err(|e| JsValue::from_str(&e.to_string())),
        Ok(None) => Err(JsValue::from_str("the search did not finish")),
        Err(e) => Err(JsValue::from_str(&e.to_string())),
    }
}
