//! Small, failure-tolerant DOM helpers. A missing element is not a reason to
//! stop the page: every helper that looks an element up does nothing (or
//! returns `None`) when it is absent, so a stale id costs one blank spot,
//! never a panic.

use wasm_bindgen::{JsCast, JsValue};
use web_sys::{Document, Element, HtmlCanvasElement, HtmlElement, HtmlInputElement, Window};

pub fn window() -> Option<Window> {
    web_sys::window()
}

pub fn document() -> Option<Document> {
    window()?.document()
}

pub fn by_id(id: &str) -> Option<Element> {
    document()?.get_element_by_id(id)
}

pub fn input(id: &str) -> Option<HtmlInputElement> {
    by_id(id)?.dyn_into::<HtmlInputElement>().ok()
}

pub fn canvas(id: &str) -> Option<HtmlCanvasElement> {
    by_id(id)?.dyn_into::<HtmlCanvasElement>().ok()
}

/// The trimmed text of an input (or textarea through `value`), empty when
/// the element is missing.
pub fn value(id: &str) -> String {
    if let Some(i) = input(id) {
        return i.value();
    }
    by_id(id).and_then(|e| js_sys::Reflect::get(&e, &"value".into()).ok()).and_then(|v| v.as_string()).unwrap_or_default()
}

pub fn set_value(id: &str, v: &str) {
    if let Some(i) = input(id) {
        i.set_value(v);
    } else if let Some(e) = by_id(id) {
        let _ = js_sys::Reflect::set(&e, &"value".into(), &v.into());
    }
}

pub fn set_text(id: &str, text: &str) {
    if let Some(e) = by_id(id) {
        e.set_text_content(Some(text));
    }
}

/// Replace an element's children with trusted markup built by this crate
/// (every piece of user or engine text in it went through [`escape`]).
pub fn set_html(id: &str, html: &str) {
    if let Some(e) = by_id(id) {
        e.set_inner_html(html);
    }
}

pub fn set_hidden(id: &str, hidden: bool) {
    if let Some(e) = by_id(id).and_then(|e| e.dyn_into::<HtmlElement>().ok()) {
        e.set_hidden(hidden);
    }
}

pub fn set_attr(id: &str, name: &str, v: Option<&str>) {
    if let Some(e) = by_id(id) {
        let _ = match v {
            Some(v) => e.set_attribute(name, v),
            None => e.remove_attribute(name),
        };
    }
}

pub fn set_class(id: &str, class: &str, on: bool) {
    if let Some(e) = by_id(id) {
        let _ = e.class_list().toggle_with_force(class, on);
    }
}

/// The value of the checked radio button of a group, if any.
pub fn checked_radio(name: &str) -> Option<String> {
    let doc = document()?;
    let el = doc.query_selector(&format!("input[name=\"{name}\"]:checked")).ok()??;
    el.dyn_into::<HtmlInputElement>().ok().map(|i| i.value())
}

/// Check the radio button of `name` whose value is `value`; `None` clears
/// the group.
pub fn check_radio(name: &str, value: Option<&str>) {
    let Some(doc) = document() else { return };
    let Ok(list) = doc.query_selector_all(&format!("input[name=\"{name}\"]")) else { return };
    for i in 0..list.length() {
        if let Some(r) = list.item(i).and_then(|n| n.dyn_into::<HtmlInputElement>().ok()) {
            r.set_checked(Some(r.value().as_str()) == value);
        }
    }
}

/// Milliseconds since the page started (for the redraw timing).
pub fn now_ms() -> f64 {
    window().and_then(|w| w.performance()).map_or(0.0, |p| p.now())
}

/// Escape text for inclusion in markup.
pub use crate::page::html::escape;

// Building elements from text that is not ours (cell text, column names,
// file names). Everything below sets `textContent` or attributes, never
// markup, so a header such as `<img src=x onerror=alert(1)>` stays text.

/// A new element with `text` as its only content (`None` when the document
/// is missing).
pub fn element(tag: &str, text: &str) -> Option<Element> {
    let e = document()?.create_element(tag).ok()?;
    if !text.is_empty() {
        e.set_text_content(Some(text));
    }
    Some(e)
}

/// Append a child element holding `text`; returns the child.
pub fn add(parent: &Element, tag: &str, text: &str) -> Option<Element> {
    let e = element(tag, text)?;
    parent.append_child(&e).ok()?;
    Some(e)
}

/// Replace the children of `id` with `child` (or nothing).
pub fn replace(id: &str, child: Option<&Element>) {
    if let Some(e) = by_id(id) {
        e.set_text_content(None);
        if let Some(c) = child {
            let _ = e.append_child(c);
        }
    }
}

/// A table whose every cell is text: a caption, column heads and rows;
/// the first cell of a row is its row head when `row_heads` is true.
pub fn text_table(caption: &str, head: &[&str], rows: &[Vec<String>], row_heads: bool) -> Option<Element> {
    let table = element("table", "")?;
    if !caption.is_empty() {
        add(&table, "caption", caption)?;
    }
    if !head.is_empty() {
        let tr = add(&add(&table, "thead", "")?, "tr", "")?;
        for h in head {
            add(&tr, "th", h)?.set_attribute("scope", "col").ok()?;
        }
    }
    let body = add(&table, "tbody", "")?;
    for r in rows {
        let tr = add(&body, "tr", "")?;
        for (i, c) in r.iter().enumerate() {
            if i == 0 && row_heads {
                add(&tr, "th", c)?.set_attribute("scope", "row").ok()?;
            } else {
                add(&tr, "td", c)?;
            }
        }
    }
    Some(table)
}

/// Save `text` as a file named `name` of type `mime` ([`download_blob`]).
pub fn download(name: &str, text: &str, mime: &str) -> Result<(), JsValue> {
    let options = web_sys::BlobPropertyBag::new();
    options.set_type(mime);
    let parts = js_sys::Array::of1(&JsValue::from_str(text));
    let blob = web_sys::Blob::new_with_str_sequence_and_options(&parts, &options)?;
    download_blob(name, &blob)
}

/// Hand `blob` to the browser's download as `name`: through a Blob URL on
/// a link that is clicked and removed at once, the URL revoked
/// `REVOKE_AFTER_MS` after the click, once the browser has read the Blob.
/// Nothing leaves the machine and no data: URL is made.
pub fn download_blob(name: &str, blob: &web_sys::Blob) -> Result<(), JsValue> {
    let doc = document().ok_or("no document")?;
    let url = web_sys::Url::create_object_url_with_blob(blob)?;
    let a: web_sys::HtmlAnchorElement = doc.create_element("a")?.dyn_into()?;
    a.set_href(&url);
    a.set_download(name);
    let body = doc.body().ok_or("no body")?;
    body.append_child(&a)?;
    a.click();
    body.remove_child(&a)?;
    // Revoked a little later, not at once: the browser reads the Blob after
    // the click returns, and a URL revoked first can lose the download.
    let revoke = wasm_bindgen::closure::Closure::once_into_js(move || {
        let _ = web_sys::Url::revoke_object_url(&url);
    });
    window().ok_or("no window")?.set_timeout_with_callback_and_timeout_and_arguments_0(revoke.unchecked_ref(), REVOKE_AFTER_MS)?;
    Ok(())
}

/// How long a download's Blob URL lives (milliseconds).
const REVOKE_AFTER_MS: i32 = 10_000;

/// Add or remove a class on the page's body.
pub fn set_class_on_body(class: &str, on: bool) {
    if let Some(body) = document().and_then(|d| d.body()) {
        let list = body.class_list();
        let _ = if on { list.add_1(class) } else { list.remove_1(class) };
    }
}
