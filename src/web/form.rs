//! The design form's shell: builds the inputs and the family chooser from
//! the engine's registry at start, copies the form's text into the page
//! model ([`crate::page::form`]) and writes its labels, visibility and
//! messages back.
//!
//! Architecture invariant: only DOM reads and writes here; what is shown,
//! how text is read and where a message goes are the model's. Nothing the
//! user typed is ever rewritten.

use super::dom;
use crate::engine::design::Family;
use crate::engine::family::{DROPOUT, Input, Kind, REGISTRY};
use crate::page::form::{self as model, FieldMessage, FormText, Part, Reading};
use wasm_bindgen::JsValue;

/// The DOM id of an input, its wrapper, label and message.
pub fn input_id(name: &str) -> String {
    format!("f-{}", name.replace('.', "-"))
}
fn wrap_id(name: &str) -> String {
    format!("w-{}", name.replace('.', "-"))
}
fn label_id(name: &str) -> String {
    format!("l-{}", name.replace('.', "-"))
}
fn msg_id(name: &str) -> String {
    format!("m-{}", name.replace('.', "-"))
}

/// Build what the registry describes and the markup does not hold: the
/// family chooser's chips (in `#family-chips`, grouped by kind) and the
/// wrapper, label, input and message of every family input (design inputs
/// in `#design-fields`, summary figures in `#w-data`, before its message).
pub fn build() -> Result<(), JsValue> {
    let doc = dom::document().ok_or("no document")?;
    if let Some(chips) = dom::by_id("family-chips") {
        for kind in Kind::ALL {
            let group = dom::add(&chips, "div", "").ok_or("no div")?;
            group.set_attribute("class", "chip-group")?;
            group.set_attribute("role", "group")?;
            group.set_attribute("aria-label", kind.title())?;
            let head = dom::add(&group, "span", kind.title()).ok_or("no span")?;
            head.set_attribute("class", "chip-head")?;
            head.set_attribute("aria-hidden", "true")?;
            for e in REGISTRY.iter().filter(|e| e.kind == kind) {
                let label = dom::add(&group, "label", "").ok_or("no label")?;
                label.set_attribute("class", "chip")?;
                let radio = dom::add(&label, "input", "").ok_or("no input")?;
                radio.set_attribute("type", "radio")?;
                radio.set_attribute("name", "family")?;
                radio.set_attribute("value", e.id)?;
                let span = dom::add(&label, "span", "").ok_or("no span")?;
                dom::add(&span, "b", e.chip).ok_or("no b")?;
                dom::add(&span, "small", e.chip_note).ok_or("no small")?;
            }
        }
    }
    for input in model::inputs() {
        if doc.get_element_by_id(&wrap_id(input.name)).is_some() {
            continue;
        }
        let (parent, before) = match input.part {
            Part::Design => (dom::by_id("design-fields"), None),
            Part::Data => (dom::by_id("w-data"), dom::by_id("m-data")),
            Part::Limits | Part::Size | Part::Level => continue,
        };
        let Some(parent) = parent else { continue };
        let wrap = dom::element("div", "").ok_or("no div")?;
        wrap.set_attribute("class", "field")?;
        wrap.set_attribute("id", &wrap_id(input.name))?;
        wrap.set_attribute("hidden", "")?;
        let label = dom::add(&wrap, "label", "").ok_or("no label")?;
        label.set_attribute("id", &label_id(input.name))?;
        label.set_attribute("for", &input_id(input.name))?;
        let field = dom::add(&wrap, "input", "").ok_or("no input")?;
        field.set_attribute("id", &input_id(input.name))?;
        field.set_attribute("inputmode", if input.read == Input::Whole { "numeric" } else { "decimal" })?;
        field.set_attribute("aria-describedby", &msg_id(input.name))?;
        if input.name == "ratio" {
            field.set_attribute("placeholder", "1")?;
        }
        let msg = dom::add(&wrap, "p", "").ok_or("no p")?;
        msg.set_attribute("class", "msg")?;
        msg.set_attribute("id", &msg_id(input.name))?;
        msg.set_attribute("aria-live", "polite")?;
        match before {
            Some(b) => parent.insert_before(&wrap, Some(&b))?,
            None => parent.append_child(&wrap)?,
        };
    }
    Ok(())
}

/// The form's text, as the model reads it.
/// The form's text, as the model reads it: the inputs the chosen family
/// shows (the others are hidden and not read).
pub fn text() -> FormText {
    let family = dom::checked_radio("family");
    let shown = model::shown(family.as_deref().and_then(Family::from_id));
    FormText {
        family,
        alternative: dom::checked_radio("alternative"),
        unit: dom::value("f-unit"),
        values: shown.iter().map(|name| (name.to_string(), dom::value(&input_id(name)))).collect(),
        texts: model::TEXTS.iter().map(|name| (name.to_string(), dom::value(&input_id(name)))).collect(),
    }
}

/// Read the whole form through the model.
pub fn read() -> Reading {
    model::read(&text())
}

/// Show the inputs of `family` (all hidden but the limits and n when none
/// is chosen) and give them the family's labels.
pub fn show_fields(family: Option<Family>, unit: &str) {
    let shown = model::shown(family);
    for input in model::inputs() {
        dom::set_hidden(&wrap_id(input.name), !shown.contains(&input.name));
    }
    if let Some(f) = family {
        for (name, text) in model::labels(f, unit) {
            dom::set_text(&label_id(name), &text);
        }
    }
    dom::set_hidden("no-family-data", family.is_some());
}

/// Clear every input's message, then show `messages`; a message with no
/// input of its own goes to the general line.
pub fn show_messages(messages: &[FieldMessage]) {
    dom::set_text("general-msg", "");
    for name in model::inputs().iter().map(|i| i.name).chain(["family", "alternative", "data"]) {
        dom::set_text(&msg_id(name), "");
        dom::set_class(&wrap_id(name), "has-error", false);
        dom::set_class(&wrap_id(name), "needs-value", false);
        dom::set_attr(&input_id(name), "aria-invalid", None);
    }
    for m in messages {
        if m.field.is_empty() || !model::has_input(&m.field) {
            dom::set_text("general-msg", &m.text);
            continue;
        }
        dom::set_text(&msg_id(&m.field), &m.text);
        dom::set_class(&wrap_id(&m.field), if m.invalid { "has-error" } else { "needs-value" }, true);
        if m.invalid {
            dom::set_attr(&input_id(&m.field), "aria-invalid", Some("true"));
        }
    }
}

/// Set every input of the form from (input name, text) pairs; inputs not
/// named are emptied.
pub fn fill(values: &[(&str, &str)]) {
    for i in model::inputs() {
        let v = values.iter().find(|(k, _)| *k == i.name).map_or("", |(_, v)| *v);
        dom::set_value(&input_id(i.name), v);
    }
    let get = |k: &str| values.iter().find(|(n, _)| *n == k).map(|(_, v)| *v);
    dom::check_radio("family", get("family"));
    dom::check_radio("alternative", get("alternative"));
    dom::set_value("f-unit", get("unit").unwrap_or(""));
    for name in model::TEXTS {
        dom::set_value(&input_id(name), get(name).unwrap_or(""));
    }
}

/// Put a design (the engine's field names, as `tern run` reads them) into
/// the form: the design inputs and `n`; the summary figures, the unit and
/// the notes stay as they are.
pub fn set_design(family: Option<&str>, alternative: Option<&str>, values: &[(String, f64)]) {
    for i in model::inputs().iter().filter(|i| !matches!(i.part, Part::Data | Part::Level)) {
        dom::set_value(&input_id(i.name), "");
    }
    dom::check_radio("family", family);
    dom::check_radio("alternative", alternative);
    for (input, text) in model::design_inputs(family.and_then(Family::from_id), values) {
        dom::set_value(&input_id(&input), &text);
    }
}

/// The same from the contract's flat JSON object (kept designs, files,
/// links): its numbers are design values; the unit, the source of the
/// planning values, the reason for the limits and the dropout it keeps
/// replace the form's (emptied when the design has none).
pub fn set_design_json(design: &serde_json::Map<String, serde_json::Value>) {
    let text = |k: &str| design.get(k).and_then(serde_json::Value::as_str);
    let values: Vec<(String, f64)> =
        design.iter().filter(|(k, _)| k.as_str() != DROPOUT.key).filter_map(|(k, v)| v.as_f64().map(|x| (k.clone(), x))).collect();
    set_design(text("family"), text("alternative"), &values);
    dom::set_value("f-unit", text("unit").unwrap_or(""));
    dom::set_value(&input_id("planning_source"), text("planning_source").unwrap_or(""));
    dom::set_value(&input_id("limits_reason"), text("limits_reason").unwrap_or(""));
    let dropout = design.get(DROPOUT.key).and_then(serde_json::Value::as_f64).map_or(String::new(), |q| q.to_string());
    dom::set_value(&input_id(DROPOUT.input), &dropout);
}
