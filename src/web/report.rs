//! The report on the page: "Prepare the report" builds it from the form
//! (the same request text `tern report` reads, through the same builder),
//! shows it below the page, prints it alone, and saves it as HTML,
//! Markdown or JSON through Blob URLs. Nothing leaves the machine.
//!
//! Architecture invariant: the report's text, numbers and charts are the
//! report module's; this shell only moves them into the page, the print
//! dialog or a download.

use super::{dom, form, listen};
use crate::page::form::request_json;
use crate::report::{self, Prepared, Stamp};
use serde_json::Value;
use std::cell::RefCell;
use wasm_bindgen::prelude::*;

thread_local! {
    /// The report last prepared, until the form changes it.
    static PREPARED: RefCell<Option<Prepared>> = const { RefCell::new(None) };
}

/// Wire the buttons, and let the page style a report as the file does.
pub fn setup() -> Result<(), JsValue> {
    adopt_report_style();
    let on_click = |id: &str, f: fn()| -> Result<(), JsValue> {
        match dom::by_id(id) {
            Some(b) => listen(&b, "click", move |_| f()),
            None => Ok(()),
        }
    };
    on_click("report-prepare", prepare)?;
    on_click("report-print", print)?;
    on_click("report-html", || save("html"))?;
    on_click("report-md", || save("md"))?;
    on_click("report-json", || save("json"))?;
    on_click("report-close", close)?;
    Ok(())
}

/// The report's style sheet, adopted through the CSS object model (the
/// page's policy allows no inline style; it does not govern this).
fn adopt_report_style() {
    let Some(doc) = dom::document() else { return };
    let Ok(sheet) = web_sys::CssStyleSheet::new() else { return };
    if sheet.replace_sync(report::html::STYLE).is_ok() {
        let sheets = doc.adopted_style_sheets();
        sheets.push(&sheet);
        doc.set_adopted_style_sheets(&sheets);
    }
}

/// Today's date (UTC), as the command line writes it.
fn today() -> String {
    let iso: String = js_sys::Date::new_0().to_iso_string().into();
    iso.chars().take(10).collect()
}

fn say(text: &str) {
    dom::set_text("report-msg", text);
}

/// Build the report from the form and show it.
fn prepare() {
    let reading = form::read();
    if !reading.design_ready() {
        return say(&if reading.still_needed.is_empty() {
            "Correct the values marked above first.".to_string()
        } else {
            format!("Complete the design first; still needed: {}.", reading.still_needed.join(", "))
        });
    }
    // A long search runs in a worker: the report waits for its findings.
    let Ok(found) = super::search::found_for(&reading.ask) else {
        return say("The search for the sample size is still running (or was stopped): prepare the report once step 2 shows the sample size.");
    };
    let mut request = request_json(&reading.ask);
    // A finished simulation check of this design goes in, with its block,
    // so that `tern report` on the same text draws the same data sets.
    let checked = super::simulation::for_report();
    if let Some((block, _)) = &checked {
        request.insert("simulation".into(), block.clone());
    }
    let text = serde_json::to_string_pretty(&Value::Object(request)).unwrap_or_default();
    let part = super::datafile::report_part();
    match report::prepare_found(&text, Stamp::today(today()), part.as_ref(), checked.as_ref().map(|(_, s)| s), found.as_ref()) {
        Ok(p) => {
            dom::set_html("report-body", &report::html::content(&p.report));
            PREPARED.with(|s| *s.borrow_mut() = Some(p));
            dom::set_hidden("report-view", false);
            dom::set_class_on_body("report-open", true);
            say("The report is below. Print it (or save it as PDF from the print dialog), or save it as a file.");
            if let Some(h) = dom::by_id("report-title").and_then(|e| wasm_bindgen::JsCast::dyn_into::<web_sys::HtmlElement>(e).ok()) {
                let _ = h.set_attribute("tabindex", "-1");
                let _ = h.focus();
            }
        }
        Err(e) => say(&format!("The report could not be prepared: {e}.")),
    }
}

fn print() {
    if let Some(w) = dom::window() {
        let _ = w.print();
    }
}

/// Save the prepared report in one format, named by its date.
fn save(format: &str) {
    let doc = PREPARED.with(|s| {
        s.borrow().as_ref().map(|p| match format {
            "md" => (p.markdown(), "text/markdown", format!("tern-report-{}.md", p.report.stamp.date)),
            "json" => (p.json(), "application/json", format!("tern-report-{}.json", p.report.stamp.date)),
            _ => (p.html(), "text/html", format!("tern-report-{}.html", p.report.stamp.date)),
        })
    });
    let Some((text, mime, name)) = doc else {
        return say("Prepare the report first.");
    };
    match dom::download(&name, &text, mime) {
        Ok(()) => say(&format!("Saved {name}.")),
        Err(_) => say("The browser did not let the page save a file."),
    }
}

fn close() {
    PREPARED.with(|s| *s.borrow_mut() = None);
    dom::set_html("report-body", "");
    dom::set_hidden("report-view", true);
    dom::set_class_on_body("report-open", false);
    say("");
}

/// A change of the form makes a shown report out of date: close it.
pub fn form_changed() {
    if PREPARED.with(|s| s.borrow().is_some()) {
        close();
        say("The design changed, so the report was closed. Prepare it again to see the new one.");
    }
}
