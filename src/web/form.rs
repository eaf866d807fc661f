//! The design form: which fields each family shows, their plain labels,
//! reading and checking what the user typed, and turning an engine error
//! into a message next to the field at fault.
//!
//! Architecture invariant: nothing the user typed is ever rewritten here.
//! Reading the form only reads; a bad value is reported beside its field
//! and left as it is, so the user can correct it.

use super::dom;
use crate::engine::decision::DecisionError;
use crate::engine::design::{DesignError, Family};
use crate::engine::evaluate::EvaluateError;
use crate::engine::model::ModelError;
use crate::engine::request::RequestError;
use serde_json::{Map, Value};

/// How a field's text is read.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Kind {
    /// Any finite number.
    Number,
    /// A probability or rate: "0.05" or "5%".
    Rate,
    /// A whole number (sample sizes, counts).
    Whole,
}

/// Where a field belongs.
#[derive(Clone, Copy, PartialEq, Eq)]
pub enum Part {
    Design,
    Size,
    Data,
}

struct Field {
    /// The engine's name (`data.` prefix for summary data).
    name: &'static str,
    kind: Kind,
    part: Part,
}

const FIELDS: &[Field] = &[
    Field { name: "theta0", kind: Kind::Number, part: Part::Design },
    Field { name: "theta1", kind: Kind::Number, part: Part::Design },
    Field { name: "sigma", kind: Kind::Number, part: Part::Design },
    Field { name: "sigma1", kind: Kind::Number, part: Part::Design },
    Field { name: "sigma2", kind: Kind::Number, part: Part::Design },
    Field { name: "p0", kind: Kind::Rate, part: Part::Design },
    Field { name: "p_alt", kind: Kind::Rate, part: Part::Design },
    Field { name: "p1", kind: Kind::Rate, part: Part::Design },
    Field { name: "p2", kind: Kind::Rate, part: Part::Design },
    Field { name: "ratio", kind: Kind::Number, part: Part::Design },
    Field { name: "alpha_max", kind: Kind::Rate, part: Part::Design },
    Field { name: "beta_max", kind: Kind::Rate, part: Part::Design },
    Field { name: "weight", kind: Kind::Rate, part: Part::Design },
    Field { name: "n", kind: Kind::Whole, part: Part::Size },
    Field { name: "data.n", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.mean", kind: Kind::Number, part: Part::Data },
    Field { name: "data.sd", kind: Kind::Number, part: Part::Data },
    Field { name: "data.n1", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.mean1", kind: Kind::Number, part: Part::Data },
    Field { name: "data.sd1", kind: Kind::Number, part: Part::Data },
    Field { name: "data.n2", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.mean2", kind: Kind::Number, part: Part::Data },
    Field { name: "data.sd2", kind: Kind::Number, part: Part::Data },
    Field { name: "data.successes", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.trials", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.successes1", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.trials1", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.successes2", kind: Kind::Whole, part: Part::Data },
    Field { name: "data.trials2", kind: Kind::Whole, part: Part::Data },
];

fn all_fields() -> impl Iterator<Item = &'static Field> {
    FIELDS.iter()
}

/// The DOM id of a field's input, its wrapper, label and message.
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

/// Proportion families use θ0, θ1 in the engine; the page shows them as
/// p0 and "p under the alternative" with their own inputs (rates accept
/// "%"), and maps them back here.
fn engine_name(family: Family, name: &'static str) -> &'static str {
    match (family, name) {
        (Family::ProportionExact | Family::ProportionNormal, "p0") => "theta0",
        (Family::ProportionExact | Family::ProportionNormal, "p_alt") => "theta1",
        _ => name,
    }
}

/// The page's field for an engine field name.
fn page_name(family: Option<Family>, engine: &str) -> String {
    match (family, engine) {
        (Some(Family::ProportionExact | Family::ProportionNormal), "theta0") => "p0".into(),
        (Some(Family::ProportionExact | Family::ProportionNormal), "theta1") => "p_alt".into(),
        (_, "d") => "theta1".into(),
        (_, "family") => "family".into(),
        _ => engine.into(),
    }
}

/// The design fields a family uses (required unless `optional`).
fn design_fields(f: Family) -> &'static [&'static str] {
    match f {
        Family::MeanZ | Family::MeanT | Family::PairedT => &["theta0", "theta1", "sigma"],
        Family::TwoMeansPooled => &["theta0", "theta1", "sigma", "ratio"],
        Family::TwoMeansWelch => &["theta0", "theta1", "sigma1", "sigma2", "ratio"],
        Family::ProportionExact | Family::ProportionNormal => &["p0", "p_alt"],
        Family::TwoProportions => &["p1", "p2", "ratio"],
    }
}

fn data_fields(f: Family) -> &'static [&'static str] {
    match f {
        Family::MeanZ => &["data.n", "data.mean"],
        Family::MeanT | Family::PairedT => &["data.n", "data.mean", "data.sd"],
        Family::TwoMeansPooled | Family::TwoMeansWelch => &["data.n1", "data.mean1", "data.sd1", "data.n2", "data.mean2", "data.sd2"],
        Family::ProportionExact | Family::ProportionNormal => &["data.successes", "data.trials"],
        Family::TwoProportions => &["data.successes1", "data.trials1", "data.successes2", "data.trials2"],
    }
}

const OPTIONAL: [&str; 3] = ["ratio", "n", "weight"];

/// Show the fields of `family` (all hidden but the limits when none is
/// chosen) and give them the family's plain labels.
pub fn show_fields(family: Option<Family>, unit: &str) {
    let visible: Vec<&str> = match family {
        Some(f) => design_fields(f).iter().chain(data_fields(f).iter()).copied().collect(),
        None => Vec::new(),
    };
    for field in all_fields() {
        let always = matches!(field.name, "alpha_max" | "beta_max" | "weight" | "n");
        dom::set_hidden(&wrap_id(field.name), !(always || visible.contains(&field.name)));
    }
    let u = if unit.trim().is_empty() { String::new() } else { format!(" ({})", unit.trim()) };
    if let Some(f) = family {
        for (name, text) in labels(f, &u) {
            dom::set_text(&label_id(name), &text);
        }
    }
    dom::set_hidden("no-family-data", family.is_some());
}

fn labels(f: Family, u: &str) -> Vec<(&'static str, String)> {
    let mut l: Vec<(&'static str, String)> = Vec::new();
    match f {
        Family::MeanZ | Family::MeanT => {
            l.push(("theta0", format!("Mean if nothing has changed, θ0{u}")));
            l.push(("theta1", format!("Smallest change worth finding, as the mean θ1{u}")));
            let sd = if f == Family::MeanZ {
                "Known standard deviation of one measurement, σ"
            } else {
                "Expected standard deviation of one measurement, σ"
            };
            l.push(("sigma", format!("{sd}{u}")));
            l.push(("data.n", "Number of measurements".into()));
            l.push(("data.mean", format!("Mean{u}")));
            l.push(("data.sd", format!("Standard deviation{u}")));
        }
        Family::PairedT => {
            l.push(("theta0", format!("Mean difference if nothing has changed, θ0{u}")));
            l.push(("theta1", format!("Smallest mean difference worth finding, θ1{u}")));
            l.push(("sigma", format!("Expected standard deviation of the differences, σ{u}")));
            l.push(("data.n", "Number of pairs".into()));
            l.push(("data.mean", format!("Mean of the differences{u}")));
            l.push(("data.sd", format!("Standard deviation of the differences{u}")));
        }
        Family::TwoMeansPooled | Family::TwoMeansWelch => {
            l.push(("theta0", format!("Difference (group 1 − group 2) if nothing has changed, θ0{u}")));
            l.push(("theta1", format!("Smallest difference worth finding, θ1{u}")));
            l.push(("sigma", format!("Expected standard deviation within each group, σ{u}")));
            l.push(("sigma1", format!("Expected standard deviation in group 1, σ1{u}")));
            l.push(("sigma2", format!("Expected standard deviation in group 2, σ2{u}")));
            l.push(("ratio", "Size of group 2 for each person in group 1 (1 = equal groups)".into()));
            for g in ["1", "2"] {
                l.push((if g == "1" { "data.n1" } else { "data.n2" }, format!("Group {g}: number of measurements")));
                l.push((if g == "1" { "data.mean1" } else { "data.mean2" }, format!("Group {g}: mean{u}")));
                l.push((if g == "1" { "data.sd1" } else { "data.sd2" }, format!("Group {g}: standard deviation{u}")));
            }
        }
        Family::ProportionExact | Family::ProportionNormal => {
            l.push(("p0", "Proportion if nothing has changed, p0 (e.g. 0.75 or 75%)".into()));
            l.push(("p_alt", "Smallest proportion worth finding, p1".into()));
            l.push(("data.successes", "Successes".into()));
            l.push(("data.trials", "Trials".into()));
        }
        Family::TwoProportions => {
            l.push(("p1", "Rate in group 1 that would matter, p1 (e.g. 0.30 or 30%)".into()));
            l.push(("p2", "Rate in group 2, p2 (the null hypothesis says both are equal)".into()));
            l.push(("ratio", "Size of group 2 for each person in group 1 (1 = equal groups)".into()));
            l.push(("data.successes1", "Group 1: successes".into()));
            l.push(("data.trials1", "Group 1: trials".into()));
            l.push(("data.successes2", "Group 2: successes".into()));
            l.push(("data.trials2", "Group 2: trials".into()));
        }
    }
    l
}

/// A message for one field.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldMessage {
    /// The page's field name ("family", "alternative", "theta0", "data.n", ...).
    pub field: String,
    pub text: String,
    /// `true`: the value is wrong; `false`: the value is still missing.
    pub invalid: bool,
}

/// What the form holds, checked field by field.
#[derive(Debug, Clone, Default)]
pub struct Reading {
    pub family: Option<Family>,
    /// The request for the engine (design fields, `n`, `data`, `curves`).
    pub request: Map<String, Value>,
    /// Messages for fields that are missing or not numbers.
    pub messages: Vec<FieldMessage>,
    /// Human names of what is still needed before the design can be computed.
    pub still_needed: Vec<String>,
    /// Some summary figures were typed (the user means to decide).
    pub data_started: bool,
    /// Every summary figure the family needs is present and readable.
    pub data_complete: bool,
    pub unit: String,
}

impl Reading {
    /// True when the design itself can go to the engine.
    pub fn design_ready(&self) -> bool {
        self.still_needed.is_empty() && !self.messages.iter().any(|m| m.invalid && part_of(&m.field) == Some(Part::Design))
    }
}

fn part_of(name: &str) -> Option<Part> {
    match name {
        "family" | "alternative" => Some(Part::Design),
        _ => all_fields().find(|f| f.name == name).map(|f| f.part),
    }
}

/// Parse a number the way people type it: spaces ignored, the Unicode
/// minus accepted, "%" for rates. A comma is refused rather than guessed
/// (it could be a decimal or a thousands separator).
fn parse(raw: &str, kind: Kind) -> Result<f64, String> {
    let mut s: String = raw.chars().filter(|c| !c.is_whitespace()).collect();
    s = s.replace('\u{2212}', "-");
    if s.contains(',') {
        return Err("use a point for decimals, such as 0.05, and no thousands separator".into());
    }
    let percent = kind == Kind::Rate && s.ends_with('%');
    if percent {
        s.pop();
    }
    let v: f64 = s.parse().map_err(|_| match kind {
        Kind::Rate => "must be a number such as 0.05 (or 5%)".to_string(),
        Kind::Whole => "must be a whole number such as 40".to_string(),
        Kind::Number => "must be a number, such as 6.5 or -3".to_string(),
    })?;
    if !v.is_finite() {
        return Err("must be a finite number".into());
    }
    let v = if percent { v / 100.0 } else { v };
    if kind == Kind::Whole && v.fract() != 0.0 {
        return Err(format!("{v} is not a whole number"));
    }
    Ok(v)
}

fn needed_name(f: Option<Family>, name: &str) -> String {
    match name {
        "family" => "what you are comparing".into(),
        "alternative" => "which direction counts as an effect".into(),
        "alpha_max" => "the largest false-alarm rate you accept (α limit)".into(),
        "beta_max" => "the largest miss rate you accept (β limit)".into(),
        "theta0" if matches!(f, Some(Family::TwoMeansPooled | Family::TwoMeansWelch)) => {
            "the difference if nothing has changed (θ0)".into()
        }
        "theta0" => "the value if nothing has changed (θ0)".into(),
        "theta1" => "the smallest effect worth finding (θ1)".into(),
        "sigma" => "the expected standard deviation (σ)".into(),
        "sigma1" => "the expected standard deviation of group 1 (σ1)".into(),
        "sigma2" => "the expected standard deviation of group 2 (σ2)".into(),
        "p0" => "the proportion if nothing has changed (p0)".into(),
        "p_alt" => "the smallest proportion worth finding (p1)".into(),
        "p1" => "the rate in group 1 (p1)".into(),
        "p2" => "the rate in group 2 (p2)".into(),
        other => other.into(),
    }
}

/// Read the whole form. Never fails: problems become messages.
pub fn read() -> Reading {
    let mut r = Reading { unit: dom::value("f-unit").trim().to_string(), ..Reading::default() };
    let family = dom::checked_radio("family").and_then(|id| Family::from_id(&id));
    r.family = family;
    match family {
        Some(f) => {
            r.request.insert("family".into(), Value::String(f.id().into()));
        }
        None => {
            r.still_needed.push(needed_name(None, "family"));
            r.messages.push(FieldMessage { field: "family".into(), text: "Choose what you are comparing.".into(), invalid: false });
        }
    }
    match dom::checked_radio("alternative") {
        Some(a) => {
            r.request.insert("alternative".into(), Value::String(a));
        }
        None => {
            r.still_needed.push(needed_name(family, "alternative"));
            r.messages.push(FieldMessage {
                field: "alternative".into(),
                text: "Choose which direction counts as an effect.".into(),
                invalid: false,
            });
        }
    }
    let mut wanted: Vec<&'static str> = vec!["alpha_max", "beta_max", "weight", "n"];
    if let Some(f) = family {
        wanted.extend(design_fields(f));
    }
    for name in wanted {
        let Some(field) = all_fields().find(|x| x.name == name) else { continue };
        let raw = dom::value(&input_id(name));
        if raw.trim().is_empty() {
            if !OPTIONAL.contains(&name) {
                r.still_needed.push(needed_name(family, name));
                let text = match name {
                    "alpha_max" => "Needed: how often may the test raise a false alarm? Between 0 and 0.5; see the guide.".to_string(),
                    "beta_max" => "Needed: how often may the test miss an effect of size θ1? Between 0 and 0.5; see the guide.".to_string(),
                    _ => "Needed for this design.".to_string(),
                };
                r.messages.push(FieldMessage { field: name.into(), text, invalid: false });
            }
            continue;
        }
        match parse(&raw, field.kind) {
            Ok(v) => {
                let key = family.map_or(name, |f| engine_name(f, name));
                r.request.insert(key.into(), number(v));
            }
            Err(text) => r.messages.push(FieldMessage { field: name.into(), text: capital(&text), invalid: true }),
        }
    }
    if let Some(f) = family {
        let mut data = Map::new();
        let mut missing = Vec::new();
        let mut bad = false;
        for &name in data_fields(f) {
            let Some(field) = all_fields().find(|x| x.name == name) else { continue };
            let raw = dom::value(&input_id(name));
            if raw.trim().is_empty() {
                missing.push(name);
                continue;
            }
            r.data_started = true;
            match parse(&raw, field.kind) {
                Ok(v) => {
                    data.insert(name.trim_start_matches("data.").into(), number(v));
                }
                Err(text) => {
                    bad = true;
                    r.messages.push(FieldMessage { field: name.into(), text: capital(&text), invalid: true });
                }
            }
        }
        if r.data_started {
            for name in &missing {
                r.messages.push(FieldMessage { field: (*name).into(), text: "Needed to decide from the data.".into(), invalid: false });
            }
        }
        r.data_complete = r.data_started && missing.is_empty() && !bad;
        if r.data_complete {
            r.request.insert("data".into(), Value::Object(data));
        }
    }
    r.request.insert("curves".into(), Value::Bool(true));
    r
}

fn number(v: f64) -> Value {
    // Whole numbers go as integers so that the engine's count checks see
    // exactly what was typed.
    if v.fract() == 0.0 && v.abs() < 9.0e15 {
        Value::from(v as i64)
    } else {
        serde_json::Number::from_f64(v).map_or(Value::Null, Value::Number)
    }
}

fn capital(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}

/// Clear every field message, then show `messages`.
pub fn show_messages(messages: &[FieldMessage]) {
    for name in all_fields().map(|f| f.name).chain(["family", "alternative"]) {
        dom::set_text(&msg_id(name), "");
        dom::set_class(&wrap_id(name), "has-error", false);
        dom::set_class(&wrap_id(name), "needs-value", false);
        dom::set_attr(&input_id(name), "aria-invalid", None);
    }
    for m in messages {
        dom::set_text(&msg_id(&m.field), &m.text);
        dom::set_class(&wrap_id(&m.field), if m.invalid { "has-error" } else { "needs-value" }, true);
        if m.invalid {
            dom::set_attr(&input_id(&m.field), "aria-invalid", Some("true"));
        }
    }
}

/// Where an engine error belongs and what to say there.
pub fn engine_message(family: Option<Family>, err: &RequestError) -> FieldMessage {
    let at = |field: &str, text: String| FieldMessage { field: page_name(family, field), text, invalid: true };
    let general = |text: String| FieldMessage { field: String::new(), text, invalid: true };
    match err {
        RequestError::NotNumber { field, .. } => at(field, "Must be a number.".into()),
        RequestError::BadValue { field, rule, .. } => at(field, format!("Must be {rule}.")),
        RequestError::Design(e) => match e {
            DesignError::Missing { field, hint } => {
                FieldMessage { field: page_name(family, field), text: format!("Needed: {hint}."), invalid: false }
            }
            DesignError::OutOfRange { field, value, rule } => at(field, format!("{} is out of range: it must be {rule}.", show(*value))),
            DesignError::NotApplicable { field, hint, .. } => at(field, format!("Not used here: {hint}.")),
            DesignError::Direction { field, value, alternative, rule } => {
                let dir = match *alternative {
                    "greater" => "“larger than if nothing changed”",
                    "less" => "“smaller than if nothing changed”",
                    _ => "“a difference either way”",
                };
                let rule = rule.replace("theta0", "θ0");
                at(field, format!("{} does not fit the direction {dir}: it must be {rule}.", show(*value)))
            }
            DesignError::EffectTwice => general(e.to_string()),
        },
        RequestError::Decision(e) => match e {
            DecisionError::Value { field, value, rule } => at(field, format!("{} is not possible here: it must be {rule}.", show(*value))),
            DecisionError::Missing { field, hint } => {
                FieldMessage { field: page_name(family, field), text: format!("Needed: {hint}."), invalid: false }
            }
            DecisionError::WrongKind { .. } | DecisionError::Undefined(_) => {
                FieldMessage { field: "data".into(), text: capital(&e.to_string()), invalid: true }
            }
            DecisionError::Evaluate(inner) => evaluate_message(family, inner, "data"),
        },
        RequestError::Evaluate(inner) => evaluate_message(family, inner, ""),
        RequestError::NotJson(_) | RequestError::NotObject | RequestError::UnknownField { .. } => general(capital(&err.to_string())),
    }
}

fn evaluate_message(family: Option<Family>, err: &EvaluateError, fallback: &str) -> FieldMessage {
    match err {
        EvaluateError::Model(ModelError::SampleSize { field, value, min, max }) => FieldMessage {
            field: page_name(family, field),
            text: format!("{} is not possible here: it must be a whole number from {min} to {max}.", show(*value)),
            invalid: true,
        },
        other => FieldMessage { field: fallback.into(), text: format!("This could not be computed: {other}."), invalid: true },
    }
}

/// A number as a person would write it back.
fn show(v: f64) -> String {
    if v.fract() == 0.0 && v.abs() < 1e15 { format!("{}", v as i64) } else { format!("{v}") }
}

/// The part of the form a message belongs to (None: general).
pub fn part(message: &FieldMessage) -> Option<Part> {
    if message.field == "data" {
        return Some(Part::Data);
    }
    part_of(&message.field)
}

/// True when a page field is shown for this family (or always shown).
pub fn is_field(name: &str) -> bool {
    name == "family" || name == "alternative" || name == "data" || all_fields().any(|f| f.name == name)
}

/// Set every field of the form from (page name, text) pairs; fields not
/// named are emptied.
pub fn fill(values: &[(&str, &str)]) {
    for f in all_fields() {
        let v = values.iter().find(|(k, _)| *k == f.name).map_or("", |(_, v)| *v);
        dom::set_value(&input_id(f.name), v);
    }
    let get = |k: &str| values.iter().find(|(n, _)| *n == k).map(|(_, v)| *v);
    dom::check_radio("family", get("family"));
    dom::check_radio("alternative", get("alternative"));
    dom::set_value("f-unit", get("unit").unwrap_or(""));
    dom::set_value("f-notes", get("notes").unwrap_or(""));
}

/// Put a design (the engine's field names, as `tern run` reads them) into
/// the form: the design fields and `n`; the summary figures, the unit and
/// the notes stay as they are. A standardised `d` becomes θ0 = 0, σ = 1,
/// θ1 = d, as the engine reads it.
pub fn set_design(design: &Map<String, Value>) {
    let family = design.get("family").and_then(Value::as_str).and_then(Family::from_id);
    for f in all_fields().filter(|f| f.part != Part::Data) {
        dom::set_value(&input_id(f.name), "");
    }
    for key in ["family", "alternative"] {
        dom::check_radio(key, design.get(key).and_then(Value::as_str));
    }
    for (key, value) in design {
        let Value::Number(x) = value else { continue };
        if key == "d" {
            dom::set_value(&input_id("theta0"), "0");
            dom::set_value(&input_id("sigma"), "1");
        }
        dom::set_value(&input_id(&page_name(family, key)), &x.to_string());
    }
}
