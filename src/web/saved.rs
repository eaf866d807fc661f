//! Designs kept in this browser, exported to and imported from a JSON file,
//! and shared as a link: the design alone, never data.
//!
//! A design here is the engine's request without `data` and `curves`: the
//! fields of [`request::design_fields`], `n` (a sample size to check), and
//! the design's own words ([`context::KEPT`]: the unit, where the planning
//! values come from, why the limits, the dropout), with the engine's field
//! names, so an exported file runs as it is with `tern run`. Every design that comes in (a file, a link, a kept entry) is
//! checked by the engine's own parser first, and a refusal names the field.
//!
//! Architecture invariant: what leaves the form here is built by
//! [`design_only`] from the design fields and those words alone; summary
//! figures, the study notes and any data file never reach local storage, a
//! file or a link.
//! Nothing is written to local storage unless the user asks.

use crate::page::form::capital;
use super::{dom, form, listen, recompute};
use crate::engine::design::Family;
use crate::engine::context;
use crate::engine::family::DROPOUT;
use crate::engine::request;
use serde::{Deserialize, Serialize};
use serde_json::{Map, Value};
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;

/// The local-storage key of the kept designs (a JSON array of [`Kept`]).
const STORE_KEY: &str = "tern.designs";
/// What starts a design link's fragment: `#design:family=mean_t&...`.
const LINK_MARK: &str = "design:";
/// A design file is a few hundred bytes; anything far larger is not one.
const MAX_FILE_BYTES: f64 = 100_000.0;

/// One kept design.
#[derive(Serialize, Deserialize)]
struct Kept {
    name: String,
    /// When it was kept, "YYYY-MM-DD HH:MM UTC".
    kept: String,
    design: Map<String, Value>,
}

/// Wire the panel's buttons and show the kept designs.
pub fn setup() -> Result<(), JsValue> {
    let on_click = |id: &str, f: fn()| -> Result<(), JsValue> {
        match dom::by_id(id) {
            Some(b) => listen(&b, "click", move |_| f()),
            None => Ok(()),
        }
    };
    on_click("keep-save", keep)?;
    on_click("keep-export", export)?;
    on_click("keep-share", share)?;
    on_click("share-copy", copy_link)?;
    if let Some(list) = dom::by_id("keep-list") {
        listen(&list, "click", |e| {
            let Some(button) = e.target().and_then(|t| t.dyn_into::<web_sys::Element>().ok()) else {
                return;
            };
            let index = |attr: &str| button.get_attribute(attr).and_then(|s| s.parse::<usize>().ok());
            if let Some(i) = index("data-open") {
                open_kept(i);
            } else if let Some(i) = index("data-delete") {
                delete_kept(i);
            }
        })?;
    }
    if let Some(input) = dom::by_id("keep-import") {
        listen(&input, "change", |_| import())?;
    }
    if let Some(w) = dom::window() {
        listen(&w, "hashchange", |_| {
            if open_from_link() {
                recompute();
            }
        })?;
    }
    show_list();
    Ok(())
}

/// Open the design in the page's address (`#design:...`), if there is one.
/// Returns true when a design was put into the form.
pub fn open_from_link() -> bool {
    let hash = dom::window().and_then(|w| w.location().hash().ok()).unwrap_or_default();
    let Some(params) = hash.strip_prefix('#').and_then(|h| h.strip_prefix(LINK_MARK)) else {
        return false;
    };
    let design = from_link(params);
    match check(&design) {
        Ok(()) => {
            form::fill(&[]);
            form::set_design_json(&design);
            note("This design was opened from a link. A link holds the design only: add your own summary figures to decide.");
            true
        }
        Err(e) => {
            note(&format!("The design in this link could not be opened: {e}. The worked example is shown instead."));
            false
        }
    }
}

/// The design fields of the form, as the engine names them, checked by the
/// engine; or what is still missing, in words.
fn design_only() -> Result<Map<String, Value>, String> {
    let reading = form::read();
    if !reading.design_ready() {
        return Err(if reading.still_needed.is_empty() {
            "Correct the values marked in step 1 first.".into()
        } else {
            format!("Complete the design first; still needed: {}.", reading.still_needed.join(", "))
        });
    }
    let mut design = request::design_json(&reading.ask.spec, reading.ask.n);
    context::put(&reading.ask.context, &mut design, false);
    check(&design).map_err(|e| format!("This design cannot be kept as it is: {e}."))?;
    Ok(design)
}

/// The engine's verdict on a design: Ok, or its message naming the field.
fn check(design: &Map<String, Value>) -> Result<(), String> {
    request::parse_value(&Value::Object(design.clone())).map(|_| ()).map_err(|e| e.to_string())
}

fn say(text: &str) {
    dom::set_text("keep-msg", text);
}

/// A note at the top of the page (and in the panel) about an opened link.
fn note(text: &str) {
    say(text);
    dom::set_text("link-note", text);
    dom::set_hidden("link-note", false);
}

fn storage() -> Result<web_sys::Storage, String> {
    dom::window()
        .and_then(|w| w.local_storage().ok().flatten())
        .ok_or_else(|| "this browser does not let the page keep anything (local storage is switched off)".to_string())
}

fn read_kept() -> Result<Vec<Kept>, String> {
    let text = storage()?.get_item(STORE_KEY).map_err(|_| "local storage could not be read".to_string())?;
    match text {
        None => Ok(Vec::new()),
        Some(t) => serde_json::from_str(&t).map_err(|e| format!("the kept designs could not be read ({e})")),
    }
}

fn write_kept(list: &[Kept]) -> Result<(), String> {
    let text = serde_json::to_string(list).map_err(|e| e.to_string())?;
    storage()?.set_item(STORE_KEY, &text).map_err(|_| "local storage refused to keep it (it may be full or switched off)".to_string())
}

fn now_text() -> String {
    let iso: String = js_sys::Date::new_0().to_iso_string().into();
    format!("{} UTC", iso.get(..16).unwrap_or(&iso).replace('T', " "))
}

fn family_title(design: &Map<String, Value>) -> &'static str {
    design.get("family").and_then(Value::as_str).and_then(Family::from_id).map_or("a design", |f| f.title())
}

/// Keep the form's design under the typed name (a kept design of the same
/// name is replaced).
fn keep() {
    let design = match design_only() {
        Ok(d) => d,
        Err(e) => return say(&e),
    };
    let typed = dom::value("keep-name").trim().to_string();
    let kept = now_text();
    let name = if typed.is_empty() { format!("{} ({kept})", family_title(&design)) } else { typed };
    let result = read_kept().and_then(|mut list| {
        list.retain(|k| k.name != name);
        list.push(Kept { name: name.clone(), kept, design });
        write_kept(&list)
    });
    match result {
        Ok(()) => say(&format!("Kept “{name}” in this browser (the design only).")),
        Err(e) => say(&format!("Not kept: {e}.")),
    }
    show_list();
}

fn show_list() {
    let list = match read_kept() {
        Ok(l) => l,
        Err(e) => {
            dom::set_html("keep-list", &format!("<li class=\"msg\">{}</li>", dom::escape(&capital(&e))));
            return;
        }
    };
    let mut html = String::new();
    for (i, k) in list.iter().enumerate() {
        html.push_str(&format!(
            "<li><span class=\"kept-name\">{}</span> <span class=\"aside\">{}, kept {}</span> \
<button type=\"button\" class=\"quiet small\" data-open=\"{i}\">Open</button> \
<button type=\"button\" class=\"quiet small\" data-delete=\"{i}\">Delete</button></li>",
            dom::escape(&k.name),
            dom::escape(family_title(&k.design)),
            dom::escape(&k.kept)
        ));
    }
    dom::set_html("keep-list", &html);
    dom::set_hidden("keep-none", !list.is_empty());
}

fn open_kept(i: usize) {
    let list = match read_kept() {
        Ok(l) => l,
        Err(e) => return say(&capital(&e)),
    };
    let Some(k) = list.get(i) else {
        return show_list();
    };
    match check(&k.design) {
        Ok(()) => {
            form::set_design_json(&k.design);
            recompute();
            say(&format!("Opened “{}”. Summary figures and notes were left as they were.", k.name));
        }
        Err(e) => say(&format!("“{}” could not be opened: {e}.", k.name)),
    }
}

fn delete_kept(i: usize) {
    let result = read_kept().and_then(|mut list| {
        if i >= list.len() {
            return Ok(None);
        }
        let gone = list.remove(i);
        write_kept(&list).map(|()| Some(gone.name))
    });
    match result {
        Ok(Some(name)) => say(&format!("Deleted “{name}” from this browser.")),
        Ok(None) => {}
        Err(e) => say(&format!("Not deleted: {e}.")),
    }
    show_list();
}

/// A file name from the typed name: letters, digits and dashes.
fn file_name() -> String {
    let typed = dom::value("keep-name");
    let mut stem: String = typed.trim().chars().map(|c| if c.is_alphanumeric() { c.to_ascii_lowercase() } else { '-' }).collect();
    while stem.contains("--") {
        stem = stem.replace("--", "-");
    }
    let stem = stem.trim_matches('-');
    if stem.is_empty() { "tern-design.json".into() } else { format!("{stem}.json") }
}

/// Save the design as a JSON file, through the browser's download.
fn export() {
    let design = match design_only() {
        Ok(d) => d,
        Err(e) => return say(&e),
    };
    let text = serde_json::to_string_pretty(&Value::Object(design)).unwrap_or_default() + "\n";
    let name = file_name();
    match dom::download(&name, &text, "application/json") {
        Ok(()) => say(&format!("Exported the design as {name}. It runs as it is with `tern run {name}`.")),
        Err(_) => say("The browser did not let the page save a file."),
    }
}


/// Read the chosen file and put its design into the form.
fn import() {
    let Some(input) = dom::input("keep-import") else {
        return;
    };
    let Some(file) = input.files().and_then(|l| l.get(0)) else {
        return;
    };
    // The same file may be chosen again after a fix.
    input.set_value("");
    let name = file.name();
    if file.size() > MAX_FILE_BYTES {
        return say(&format!("{name} was not imported: it is {} bytes, far more than a design file.", file.size()));
    }
    let ok = Closure::once(move |text: JsValue| import_text(&name, &text.as_string().unwrap_or_default()));
    let failed = Closure::once(|_: JsValue| say("The file could not be read."));
    let _ = file.text().then2(&ok, &failed);
    ok.forget();
    failed.forget();
}

fn import_text(name: &str, text: &str) {
    let value: Value = match serde_json::from_str(text) {
        Ok(v) => v,
        Err(e) => return say(&format!("{name} was not imported: it is not JSON ({e}).")),
    };
    let Value::Object(mut design) = value else {
        return say(&format!("{name} was not imported: it must hold one JSON object of design fields, as `tern run` reads."));
    };
    let had_data = design.remove("data").is_some();
    design.remove("curves");
    if let Err(e) = check(&design) {
        return say(&format!("{name} was not imported: {e}."));
    }
    form::set_design_json(&design);
    recompute();
    let left_out = if had_data { " Its summary data were left out: only designs are imported." } else { "" };
    say(&format!("Imported the design from {name}.{left_out}"));
}

/// The link to this page with the design in the fragment, field by field
/// in plain text, so anyone can read what it carries.
fn share() {
    let design = match design_only() {
        Ok(d) => d,
        Err(e) => return say(&e),
    };
    let here = dom::window().and_then(|w| w.location().href().ok()).unwrap_or_default();
    let base = here.split('#').next().unwrap_or_default();
    let link = format!("{base}#{LINK_MARK}{}", to_link(&design));
    dom::set_value("share-link", &link);
    dom::set_hidden("share-box", false);
    say("The link is below. It carries the design only, never summary figures, notes or data files.");
}

fn to_link(design: &Map<String, Value>) -> String {
    let mut parts = Vec::new();
    for key in request::design_fields().into_iter().chain(["n"]).chain(context::KEPT) {
        let text = match design.get(key) {
            Some(Value::Number(x)) => x.to_string(),
            Some(Value::String(s)) => s.clone(),
            _ => continue,
        };
        parts.push(format!("{key}={}", String::from(js_sys::encode_uri_component(&text))));
    }
    parts.join("&")
}

/// The fields of a link; text that is not a number stays text, so that
/// the engine names the field it refuses.
fn from_link(params: &str) -> Map<String, Value> {
    let mut design = Map::new();
    for pair in params.split('&').filter(|p| !p.is_empty()) {
        let (key, raw) = pair.split_once('=').unwrap_or((pair, ""));
        let text: String = js_sys::decode_uri_component(raw).map(String::from).unwrap_or_else(|_| raw.to_string());
        let value = if key == "family" || key == "alternative" || (context::KEPT.contains(&key) && key != DROPOUT.key) {
            Value::String(text)
        } else if let Ok(i) = text.parse::<i64>() {
            Value::from(i)
        } else if let Some(x) = text.parse::<f64>().ok().and_then(serde_json::Number::from_f64) {
            Value::Number(x)
        } else {
            Value::String(text)
        };
        design.insert(key.to_string(), value);
    }
    design
}

fn copy_link() {
    let link = dom::value("share-link");
    if let Some(i) = dom::input("share-link") {
        i.select();
    }
    const BY_HAND: &str = "The link is selected: copy it with Ctrl+C (⌘C on a Mac).";
    let Some(nav) = dom::window().map(|w| w.navigator()) else {
        return;
    };
    // Pages served over plain http (not localhost) have no clipboard.
    if !js_sys::Reflect::get(&nav, &"clipboard".into()).is_ok_and(|c| !c.is_undefined()) {
        return say(BY_HAND);
    }
    let ok = Closure::once(|_: JsValue| say("Link copied. It carries the design only."));
    let failed = Closure::once(|_: JsValue| say(BY_HAND));
    let _ = nav.clipboard().write_text(&link).then2(&ok, &failed);
    ok.forget();
    failed.forget();
}
