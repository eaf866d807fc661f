//! The version line, and the service worker that keeps the served edition
//! for offline use and tells the user when a new build is deployed.
//!
//! The build id and the edition come from `<meta name="tern-build">` and
//! `<meta name="tern-edition">`, written by `scripts/finish-page.mjs`. The
//! service worker (`sw.js`, from `www/sw.js`) is registered only by the
//! served edition over http(s): the one-file edition has none, and works
//! from `file://` without it.
//!
//! Architecture invariant: the page itself never asks the network for
//! anything here; the browser fetches `sw.js` when the page registers it
//! (during load), and a new build is noticed at the next visit, never by
//! polling.

use super::{dom, listen};
use std::cell::RefCell;
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;
use web_sys::{ServiceWorker, ServiceWorkerContainer, ServiceWorkerRegistration, ServiceWorkerState};

/// The message `sw.js` answers with `skipWaiting()`.
const TAKE_UPDATE: &str = "tern: take the update";

thread_local! {
    static REGISTRATION: RefCell<Option<ServiceWorkerRegistration>> = const { RefCell::new(None) };
}

fn meta(name: &str) -> Option<String> {
    let el = dom::document()?.query_selector(&format!("meta[name=\"{name}\"]")).ok()??;
    el.get_attribute("content").filter(|c| !c.is_empty())
}

/// Show the version and, in the served edition, register the service worker.
pub fn setup() -> Result<(), JsValue> {
    let build = meta("tern-build").unwrap_or_else(|| "unknown".into());
    let edition = meta("tern-edition").unwrap_or_default();
    let label = if edition == "single" { "; one-file edition" } else { "" };
    set_version(&format!("Tern {}, build {build}{label}", env!("CARGO_PKG_VERSION")), "");
    if let Some(b) = dom::by_id("update-reload") {
        listen(&b, "click", |_| take_update())?;
    }
    if edition == "served"
        && let Some(container) = container()
    {
        register(&container);
    }
    Ok(())
}

fn set_version(text: &str, offline: &str) {
    let current = dom::by_id("version").and_then(|e| e.get_attribute("data-version"));
    let text = if text.is_empty() { current.unwrap_or_default() } else { text.to_string() };
    dom::set_attr("version", "data-version", Some(&text));
    dom::set_text("version", &format!("{text}{offline}."));
}

/// The page's service-worker container, when the browser offers one here
/// (http(s) pages in a secure context; not `file://`).
fn container() -> Option<ServiceWorkerContainer> {
    let w = dom::window()?;
    if !w.is_secure_context() {
        return None;
    }
    let nav = w.navigator();
    let sw = js_sys::Reflect::get(&nav, &"serviceWorker".into()).ok()?;
    if sw.is_undefined() || sw.is_null() {
        return None;
    }
    Some(nav.service_worker())
}

fn register(container: &ServiceWorkerContainer) {
    let options = web_sys::RegistrationOptions::new();
    options.set_scope("./");
    let registered = Closure::once(|reg: JsValue| {
        let Ok(reg) = reg.dyn_into::<ServiceWorkerRegistration>() else {
            return;
        };
        if reg.waiting().is_some() && has_controller() {
            show_update();
        }
        let watched = reg.clone();
        let found = Closure::<dyn FnMut()>::new(move || {
            if let Some(worker) = watched.installing() {
                watch(&worker);
            }
        });
        reg.set_onupdatefound(Some(found.as_ref().unchecked_ref()));
        found.forget();
        REGISTRATION.with(|r| *r.borrow_mut() = Some(reg));
    });
    let refused = Closure::once(|e: JsValue| {
        web_sys::console::warn_2(&"Tern: the page could not be kept for offline use:".into(), &e);
    });
    let _ = container.register_with_options("./sw.js", &options).then2(&registered, &refused);
    registered.forget();
    refused.forget();
    // Ready: a worker of this build or an earlier one is active, so the
    // page opens without the network from now on.
    if let Ok(ready) = container.ready() {
        let done = Closure::once(|_: JsValue| {
            dom::set_attr("app", "data-offline", Some("ready"));
            set_version("", "; kept in this browser for offline use");
        });
        let _ = ready.then(&done);
        done.forget();
    }
}

fn has_controller() -> bool {
    container().and_then(|c| c.controller()).is_some()
}

/// A newly installing worker: once installed while an older one controls
/// the page, a new build is waiting.
fn watch(worker: &ServiceWorker) {
    let w = worker.clone();
    let changed = Closure::<dyn FnMut()>::new(move || {
        if w.state() == ServiceWorkerState::Installed && has_controller() {
            show_update();
        }
    });
    worker.set_onstatechange(Some(changed.as_ref().unchecked_ref()));
    changed.forget();
}

fn show_update() {
    dom::set_hidden("update-note", false);
    dom::set_attr("app", "data-update", Some("waiting"));
}

/// The user asked for the new build: let the waiting worker take over and
/// reload once it controls the page.
fn take_update() {
    let waiting = REGISTRATION.with(|r| r.borrow().as_ref().and_then(|reg| reg.waiting()));
    let reload = || {
        if let Some(w) = dom::window() {
            let _ = w.location().reload();
        }
    };
    let (Some(worker), Some(container)) = (waiting, container()) else {
        return reload();
    };
    let once = std::cell::Cell::new(false);
    let _ = listen(&container, "controllerchange", move |_| {
        if !once.replace(true) {
            reload();
        }
    });
    let _ = worker.post_message(&JsValue::from_str(TAKE_UPDATE));
}
