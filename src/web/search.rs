//! A long sample-size search in a Web Worker, so that no input freezes the
//! page. Every update asks the engine for a quick search
//! (`request::Search::Quick`); when that runs out of its small budget the
//! answer's sample size is pending, and the page starts the whole search
//! (`sample_size::search`, through `tern_search`) in a worker of its own
//! (`web::workers`) for that design, shows where it stands (stage, n,
//! share done when known) with a Stop button, and when the scans' findings
//! come back recomputes with them (`request::Search::Done`), which
//! finishes the answer with a few solves. A changed design stops the
//! worker of the old one; Stop ends the search for this design until a
//! value changes.
//!
//! Invariant: findings are used only for the exact design they were
//! searched for (the key is the design's own JSON); nothing here computes
//! a statistic.

use super::dom;
use crate::page::form::capital;
use super::workers::{self, Spawned};
use crate::engine::request::{Ask, Search, design_json};
use crate::engine::sample_size::{Found, QUICK_WORK};
use serde_json::Value;
use std::cell::{Cell, RefCell};
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;

#[derive(Default)]
struct State {
    /// The design the worker searches (its JSON) and the worker.
    running: Option<(String, Spawned)>,
    /// Findings for a design.
    found: Option<(String, Found)>,
    /// A design whose search the user stopped.
    stopped: Option<String>,
    /// Workers that ended inside their own handler, dropped later.
    retired: Vec<Spawned>,
}

thread_local! {
    static STATE: RefCell<State> = RefCell::new(State::default());
    static JOBS: Cell<u32> = const { Cell::new(0) };
}

/// The design's key: its fields as the JSON contract writes them.
fn key(ask: &Ask) -> String {
    Value::Object(design_json(&ask.spec, None)).to_string()
}

/// How the next reply should search: with the findings if this design's
/// are in; not at all while its worker runs or after Stop (another field
/// typed meanwhile must not repeat the quick search); else quickly.
pub fn mode(ask: &Ask) -> Search {
    let k = key(ask);
    STATE.with(|s| {
        let s = s.borrow();
        match &s.found {
            Some((fk, f)) if *fk == k => Search::Done(*f),
            _ if s.running.as_ref().is_some_and(|(rk, _)| *rk == k) || s.stopped.as_deref() == Some(k.as_str()) => Search::Elsewhere,
            _ => Search::Quick(QUICK_WORK),
        }
    })
}

/// This design's findings, if its search ran in a worker (for the
/// report, which then need not search again); `Err` while that search
/// still runs or was stopped.
pub fn found_for(ask: &Ask) -> Result<Option<Found>, ()> {
    let k = key(ask);
    STATE.with(|s| {
        let s = s.borrow();
        match &s.found {
            Some((fk, f)) if *fk == k => Ok(Some(*f)),
            _ if s.running.as_ref().is_some_and(|(rk, _)| *rk == k) || s.stopped.as_deref() == Some(k.as_str()) => Err(()),
            _ => Ok(None),
        }
    })
}

/// After a reply: `pending` when its search ran out here. Starts the
/// worker for this design (stopping another design's), or stops a worker
/// no longer needed.
pub fn after_reply(ask: &Ask, pending: bool) {
    let k = key(ask);
    let stale = STATE.with(|s| {
        let mut s = s.borrow_mut();
        let keep = pending && s.running.as_ref().is_some_and(|(rk, _)| *rk == k);
        if keep { None } else { s.running.take().map(|(_, w)| w) }
    });
    if let Some(w) = stale {
        w.stop();
    }
    let stopped = STATE.with(|s| s.borrow().stopped.as_deref() == Some(k.as_str()));
    let running = STATE.with(|s| s.borrow().running.is_some());
    if !pending {
        dom::set_hidden("size-search", true);
        return;
    }
    dom::set_hidden("size-search", false);
    if stopped {
        show_stopped();
        return;
    }
    if !running {
        start(k);
    }
}

fn start(k: String) {
    let job = JOBS.with(|c| {
        c.set(c.get() + 1);
        c.get()
    });
    STATE.with(|s| s.borrow_mut().retired.clear());
    dom::set_attr("size-search-stop", "disabled", None);
    say("Starting…", None);
    let design = k.clone();
    let spawned = workers::spawn(move |data| received(job, &design, &data), move |why| failed(job, &why));
    let w = match spawned {
        Ok(w) => w,
        Err(why) => return say(&format!("The search could not start: {why}."), None),
    };
    let msg = js_sys::Object::new();
    let ok = js_sys::Reflect::set(&msg, &"job".into(), &JsValue::from(job)).is_ok()
        && js_sys::Reflect::set(&msg, &"search".into(), &JsValue::from_str(&k)).is_ok()
        && w.post(&msg);
    if !ok {
        w.stop();
        return say("The search could not start: the worker refused its work.", None);
    }
    dom::set_attr("size-card", "data-search-job", Some(&job.to_string()));
    STATE.with(|s| s.borrow_mut().running = Some((k, w)));
}

/// The progress line: words and, where known, the share done.
fn say(text: &str, fraction: Option<f64>) {
    dom::set_text("size-search-text", text);
    if let Some(bar) = dom::by_id("size-search-bar") {
        match fraction {
            Some(f) => {
                let _ = bar.set_attribute("max", "1");
                let _ = bar.set_attribute("value", &format!("{:.4}", f.clamp(0.0, 1.0)));
            }
            // No value: the bar shows that work goes on, of unknown length.
            None => {
                let _ = bar.remove_attribute("value");
            }
        }
    }
}

fn show_stopped() {
    say("Stopped. Change a value to search again.", Some(0.0));
    dom::set_attr("size-search-stop", "disabled", Some(""));
}

/// Is this job the one running now?
fn current(job: u32) -> bool {
    dom::by_id("size-card").and_then(|e| e.get_attribute("data-search-job")).and_then(|j| j.parse::<u32>().ok()) == Some(job)
        && STATE.with(|s| s.borrow().running.is_some())
}

fn received(job: u32, design: &str, data: &JsValue) {
    if !current(job) {
        return;
    }
    if let Some(p) = workers::field(data, "progress") {
        let stage = workers::field(&p, "stage").and_then(|v| v.as_string()).unwrap_or_default();
        let n = workers::field(&p, "n").and_then(|v| v.as_f64()).unwrap_or(0.0);
        let fraction = workers::field(&p, "fraction").and_then(|v| v.as_f64());
        let share = fraction.map_or(String::new(), |f| format!(", {:.0}%", f * 100.0));
        say(&format!("{}: n = {}{share}", capital(&stage), n as u64), fraction);
        return;
    }
    if let Some(e) = workers::field(data, "error") {
        return failed(job, &e.as_string().unwrap_or_default());
    }
    let Some(found) = workers::field(data, "found").and_then(|f| serde_wasm_bindgen::from_value::<Found>(f).ok()) else {
        return failed(job, "the worker answered without its findings");
    };
    // The worker ends inside its own handler: keep it until the next start.
    STATE.with(|s| {
        let mut s = s.borrow_mut();
        if let Some((_, w)) = s.running.take() {
            w.stop();
            s.retired.push(w);
        }
        s.found = Some((design.to_string(), found));
    });
    dom::set_attr("size-card", "data-search-job", None);
    // Recompute after this handler returns, never inside it.
    let later = Closure::once_into_js(super::recompute);
    if let Some(w) = dom::window() {
        let _ = w.set_timeout_with_callback(later.unchecked_ref());
    }
}

fn failed(job: u32, why: &str) {
    if !current(job) {
        return;
    }
    STATE.with(|s| {
        let mut s = s.borrow_mut();
        if let Some((k, w)) = s.running.take() {
            w.stop();
            s.retired.push(w);
            s.stopped = Some(k);
        }
    });
    say(&format!("The search stopped: {why}. Change a value to search again."), Some(0.0));
}

/// The Stop button: end this design's search.
pub fn stop() {
    let w = STATE.with(|s| {
        let mut s = s.borrow_mut();
        let taken = s.running.take();
        if let Some((k, _)) = &taken {
            s.stopped = Some(k.clone());
        }
        taken.map(|(_, w)| w)
    });
    if let Some(w) = w {
        w.stop();
    }
    dom::set_attr("size-card", "data-search-job", None);
    show_stopped();
}

