//! The design form as a model: which inputs exist and which a family shows,
//! their labels (from the engine's family registry), reading the typed text
//! into the engine's typed request ([`Ask`]), and putting every engine
//! refusal next to the input at fault.
//!
//! Architecture invariant: no DOM here, and nothing the user typed is ever
//! rewritten: reading only reads, and a bad value is reported beside its
//! input and left as it is. The page shell (`web::form`) copies text in
//! and messages out; everything it shows is decided here.

use crate::engine::decision::DecisionError;
use crate::engine::design::{DesignError, DesignSpec, Family};
use crate::engine::evaluate::EvaluateError;
use crate::engine::context::{self, Context};
use crate::engine::request;
use crate::engine::family::{self, DROPOUT, Field, INTERVAL_LEVEL, Input, LIMITS, REGISTRY, SIZE};
use crate::engine::model::ModelError;
use crate::engine::request::{Ask, RequestError};
use crate::engine::threshold::Alternative;

/// Where an input belongs on the page.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Part {
    /// Step 1: the design (family-specific fields).
    Design,
    /// Step 1: the limits and the cost weight, shown for every family.
    Limits,
    /// Step 2: a sample size to check, and the expected dropout.
    Size,
    /// Step 3: summary figures.
    Data,
    /// Step 3: the confidence level of the decision's interval.
    Level,
}

/// The form's texts for the report, by input name (the JSON field of the
/// same name): the study notes, where the planning values come from and
/// why the limits. Kept as typed; only the report reads them.
pub const TEXTS: [&str; 3] = ["notes", "planning_source", "limits_reason"];

/// One input of the page: its name (`f-NAME` is its element), its part and
/// how its text is read.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PageInput {
    pub name: &'static str,
    pub part: Part,
    pub read: Input,
}

/// Every input the page has, each once: the registry's design and data
/// fields (by their page names), the limits and the sample size. Built
/// once (the page asks on every keystroke).
pub fn inputs() -> &'static [PageInput] {
    static INPUTS: std::sync::LazyLock<Vec<PageInput>> = std::sync::LazyLock::new(build_inputs);
    &INPUTS
}

fn build_inputs() -> Vec<PageInput> {
    let mut v: Vec<PageInput> = Vec::new();
    let mut push = |f: &Field, part: Part| {
        if !v.iter().any(|i| i.name == f.input) {
            v.push(PageInput { name: f.input, part, read: f.read });
        }
    };
    // Required inputs first, then the optional ones (the allocation ratio),
    // so that every family's inputs read in its own order on the page.
    for required in [true, false] {
        for f in REGISTRY.iter().flat_map(|e| e.design.iter()).filter(|f| f.required == required) {
            push(f, Part::Design);
        }
    }
    for f in &LIMITS {
        push(f, Part::Limits);
    }
    push(&SIZE, Part::Size);
    push(&DROPOUT, Part::Size);
    push(&INTERVAL_LEVEL, Part::Level);
    for e in &REGISTRY {
        for f in e.data.iter().filter(|f| f.required) {
            push(f, Part::Data);
        }
    }
    v
}

/// The fields of a family the page shows (design, then data), as
/// registry fields; the limits and `n` are always shown.
fn family_fields(f: Family) -> impl Iterator<Item = (&'static Field, Part)> {
    let e = f.entry();
    e.design.iter().map(|f| (f, Part::Design)).chain(e.data.iter().filter(|f| f.required).map(|f| (f, Part::Data)))
}

/// The inputs shown for a family (none of the family-specific ones when
/// no family is chosen).
pub fn shown(family: Option<Family>) -> Vec<&'static str> {
    let mut v: Vec<&'static str> = LIMITS.iter().map(|f| f.input).chain([SIZE.input, DROPOUT.input, INTERVAL_LEVEL.input]).collect();
    if let Some(f) = family {
        v.extend(family_fields(f).map(|(f, _)| f.input));
    }
    v
}

/// The labels of a family's inputs with the unit put in.
pub fn labels(family: Family, unit: &str) -> Vec<(&'static str, String)> {
    family_fields(family).map(|(f, _)| (f.input, family::label(f, unit))).collect()
}

/// A message for one input.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldMessage {
    /// The page's input name ("family", "alternative", "theta0", "data.n",
    /// "data" for the data as a whole, "" for the design as a whole).
    pub field: String,
    pub text: String,
    /// `true`: the value is wrong; `false`: the value is still missing.
    pub invalid: bool,
}

/// What the form holds, as text: the chosen family and direction, the
/// unit, the text of every input by name, and the report's texts
/// ([`TEXTS`]) by name.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct FormText {
    pub family: Option<String>,
    pub alternative: Option<String>,
    pub unit: String,
    pub values: Vec<(String, String)>,
    pub texts: Vec<(String, String)>,
}

impl FormText {
    fn get(&self, name: &str) -> &str {
        self.values.iter().find(|(k, _)| k == name).map_or("", |(_, v)| v.as_str())
    }
}

/// The form read: the engine's typed request and what to say beside the
/// inputs before the engine is asked.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Reading {
    pub family: Option<Family>,
    pub ask: Ask,
    /// Messages for inputs that are missing or not numbers.
    pub messages: Vec<FieldMessage>,
    /// Plain names of what is still needed before the design can be computed.
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
        self.still_needed.is_empty()
            && !self.messages.iter().any(|m| m.invalid && matches!(part_of(&m.field), Some(Part::Design | Part::Limits)))
    }
}

fn part_of(name: &str) -> Option<Part> {
    match name {
        "family" | "alternative" | "" => Some(Part::Design),
        "data" => Some(Part::Data),
        _ => inputs().iter().find(|i| i.name == name).map(|i| i.part),
    }
}

/// True when a message has an input of its own on the page (else it goes
/// to the general line).
pub fn has_input(name: &str) -> bool {
    matches!(name, "family" | "alternative" | "data") || inputs().iter().any(|i| i.name == name)
}

/// Parse a number the way people type it: spaces ignored, the Unicode
/// minus accepted, "%" for rates. A comma is refused rather than guessed
/// (it could be a decimal or a thousands separator).
pub fn parse(raw: &str, read: Input) -> Result<f64, String> {
    let mut s: String = raw.chars().filter(|c| !c.is_whitespace()).collect();
    s = s.replace('\u{2212}', "-");
    if s.contains(',') {
        return Err("use a point for decimals, such as 0.05, and no thousands separator".into());
    }
    let percent = read == Input::Rate && s.ends_with('%');
    if percent {
        s.pop();
    }
    let v: f64 = s.parse().map_err(|_| match read {
        Input::Rate => "must be a number such as 0.05 (or 5%)".to_string(),
        Input::Whole => "must be a whole number such as 40".to_string(),
        Input::Number => "must be a number, such as 6.5 or -3".to_string(),
    })?;
    if !v.is_finite() {
        return Err("must be a finite number".into());
    }
    let v = if percent { v / 100.0 } else { v };
    if read == Input::Whole && v.fract() != 0.0 {
        return Err(format!("{v} is not a whole number"));
    }
    Ok(v)
}

fn missing_text(field: &Field) -> String {
    match field.key {
        "alpha_max" => "Needed: how often may the test raise a false alarm? Between 0 and 0.5; see the guide.".into(),
        "beta_max" => "Needed: how often may the test miss an effect of size θ1? Between 0 and 0.5; see the guide.".into(),
        _ => "Needed for this design.".into(),
    }
}

/// Read the whole form. Never fails: problems become messages.
pub fn read(text: &FormText) -> Reading {
    let mut r = Reading { unit: text.unit.trim().to_string(), ..Reading::default() };
    let family = text.family.as_deref().and_then(Family::from_id);
    let alternative = text.alternative.as_deref().and_then(Alternative::from_id);
    r.family = family;
    if family.is_none() {
        r.still_needed.push("what you are comparing".into());
        r.messages.push(FieldMessage { field: "family".into(), text: "Choose what you are comparing.".into(), invalid: false });
    }
    if alternative.is_none() {
        r.still_needed.push("which direction counts as an effect".into());
        r.messages.push(FieldMessage { field: "alternative".into(), text: "Choose which direction counts as an effect.".into(), invalid: false });
    }
    let mut spec = DesignSpec { family, alternative, values: Vec::new() };
    let design_fields: Vec<&'static Field> = LIMITS.iter().chain(family.map_or(&[][..], |f| f.entry().design)).collect();
    for field in design_fields {
        let raw = text.get(field.input);
        if raw.trim().is_empty() {
            if field.required {
                r.still_needed.push(field.needed.to_string());
                r.messages.push(FieldMessage { field: field.input.into(), text: missing_text(field), invalid: false });
            }
            continue;
        }
        match parse(raw, field.read) {
            Ok(v) => spec.set(field.key, v),
            Err(t) => r.messages.push(FieldMessage { field: field.input.into(), text: capital(&t), invalid: true }),
        }
    }
    // The dropout and the interval's level: optional, each with its rule.
    for field in [&DROPOUT, &INTERVAL_LEVEL] {
        let raw = text.get(field.input);
        if raw.trim().is_empty() {
            continue;
        }
        match parse(raw, field.read) {
            Ok(v) if field.check.holds(v) => {
                if field.key == DROPOUT.key {
                    r.ask.context.dropout = Some(v);
                } else {
                    r.ask.interval_level = Some(v);
                }
            }
            Ok(_) => r.messages.push(FieldMessage { field: field.input.into(), text: format!("Must be {}.", field.check.rule()), invalid: true }),
            Err(t) => r.messages.push(FieldMessage { field: field.input.into(), text: capital(&t), invalid: true }),
        }
    }
    let said = |name: &str| text.texts.iter().find(|(k, _)| k == name).map_or(String::new(), |(_, v)| v.trim().to_string());
    r.ask.context = Context {
        unit: r.unit.clone(),
        planning_source: said("planning_source"),
        limits_reason: said("limits_reason"),
        notes: said("notes"),
        dropout: r.ask.context.dropout,
    };
    let raw_n = text.get(SIZE.input);
    if !raw_n.trim().is_empty() {
        match parse(raw_n, SIZE.read) {
            Ok(v) => r.ask.n = Some(v),
            Err(t) => r.messages.push(FieldMessage { field: SIZE.input.into(), text: capital(&t), invalid: true }),
        }
    }
    if let Some(f) = family {
        let mut data = Vec::new();
        let mut missing = Vec::new();
        let mut bad = false;
        for field in f.entry().data.iter().filter(|f| f.required) {
            let raw = text.get(field.input);
            if raw.trim().is_empty() {
                missing.push(field.input);
                continue;
            }
            r.data_started = true;
            match parse(raw, field.read) {
                Ok(v) => data.push((field.key, v)),
                Err(t) => {
                    bad = true;
                    r.messages.push(FieldMessage { field: field.input.into(), text: capital(&t), invalid: true });
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
            r.ask.data = Some(data);
        }
    }
    r.ask.spec = spec;
    r
}

/// The form as a request document, as `tern run` and `tern report` read
/// it: the design (`request::design_json`), the context with the study
/// notes, the summary figures under `data` and the interval's level. The
/// page's report is built from exactly this text, so the command line
/// builds the same report from it.
pub fn request_json(ask: &Ask) -> serde_json::Map<String, serde_json::Value> {
    let mut obj = request::design_json(&ask.spec, ask.n);
    context::put(&ask.context, &mut obj, true);
    if let Some(data) = &ask.data {
        let d: serde_json::Map<String, serde_json::Value> = data.iter().map(|(k, v)| (k.to_string(), request::json_number(*v))).collect();
        obj.insert("data".into(), serde_json::Value::Object(d));
    }
    if let Some(level) = ask.interval_level {
        obj.insert(INTERVAL_LEVEL.key.into(), request::json_number(level));
    }
    obj
}

/// A message's first letter in upper case (engine messages start lower
/// case, to read well inside a sentence); the one such helper of the page.
pub fn capital(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().collect::<String>() + c.as_str(),
        None => String::new(),
    }
}

/// The page's input for an engine field name (a proportion's θ0 is `p0`;
/// a standardised `d` is shown in θ1's input).
pub fn input_for(family: Option<Family>, engine: &str) -> String {
    if let Some(field) = family.and_then(|f| f.entry().design_field(engine)) {
        return field.input.to_string();
    }
    match engine {
        "d" => "theta1".into(),
        other => other.into(),
    }
}

/// Where an engine refusal belongs and what to say there.
pub fn engine_message(family: Option<Family>, err: &RequestError) -> FieldMessage {
    let at = |field: &str, text: String| FieldMessage { field: input_for(family, field), text, invalid: true };
    let general = |text: String| FieldMessage { field: String::new(), text, invalid: true };
    match err {
        RequestError::NotNumber { field, .. } => at(field, "Must be a number.".into()),
        RequestError::BadValue { field, rule, .. } => at(field, format!("Must be {rule}.")),
        RequestError::Design(e) => match e {
            DesignError::Missing { field, hint } => FieldMessage { field: input_for(family, field), text: format!("Needed: {hint}."), invalid: false },
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
            DesignError::OneOf { first, .. } => at(first, format!("{}.", capital(&e.to_string()))),
            other => general(other.to_string()),
        },
        RequestError::Decision(e) => match e {
            DecisionError::Value { field, value, rule } => at(field, format!("{} is not possible here: it must be {rule}.", show(*value))),
            DecisionError::Missing { field, hint } => FieldMessage { field: input_for(family, field), text: format!("Needed: {hint}."), invalid: false },
            DecisionError::Evaluate(inner) => evaluate_message(family, inner, "data"),
            other => FieldMessage { field: "data".into(), text: capital(&other.to_string()), invalid: true },
        },
        RequestError::Evaluate(inner) => evaluate_message(family, inner, ""),
        other => general(capital(&other.to_string())),
    }
}

fn evaluate_message(family: Option<Family>, err: &EvaluateError, fallback: &str) -> FieldMessage {
    match err {
        EvaluateError::Model(ModelError::SampleSize { field, value, min, max }) => FieldMessage {
            field: input_for(family, field),
            text: format!("{} is not possible here: it must be a whole number from {min} to {max}.", show(*value)),
            invalid: true,
        },
        EvaluateError::Model(ModelError::Scale { field, .. }) => {
            FieldMessage { field: input_for(family, field), text: format!("{}.", capital(&err.to_string())), invalid: true }
        }
        other => FieldMessage { field: fallback.into(), text: format!("This could not be computed: {other}."), invalid: true },
    }
}

/// A number as a person would write it back.
pub fn show(v: f64) -> String {
    if v.fract() == 0.0 && v.abs() < 1e15 { format!("{}", v as i64) } else { format!("{v}") }
}

/// A design given by the engine's field names (a kept design, a file, a
/// link) as (input, text) pairs for the form: a standardised `d` becomes
/// θ0 = 0, σ = 1, θ1 = d, as the engine reads it.
pub fn design_inputs(family: Option<Family>, values: &[(String, f64)]) -> Vec<(String, String)> {
    let mut out = Vec::new();
    for (key, v) in values {
        if key == "d" {
            out.push(("theta0".to_string(), "0".to_string()));
            out.push(("sigma".to_string(), "1".to_string()));
        }
        out.push((input_for(family, key), number_text(*v)));
    }
    out
}

/// A number as the contract writes it (so that what comes back is what
/// was kept).
fn number_text(v: f64) -> String {
    match crate::engine::request::json_number(v) {
        serde_json::Value::Null => v.to_string(),
        x => x.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn text(family: &str, alternative: &str, values: &[(&str, &str)]) -> FormText {
        FormText {
            family: Some(family.into()),
            alternative: Some(alternative.into()),
            unit: "days".into(),
            values: values.iter().map(|(k, v)| (k.to_string(), v.to_string())).collect(),
            texts: vec![("planning_source".into(), " pilot ".into())],
        }
    }

    /// The dropout and the interval's level are read with their rules, and
    /// the texts go to the context as typed (trimmed).
    #[test]
    fn dropout_level_and_texts_are_read() {
        let base = [("theta0", "0"), ("theta1", "1"), ("sigma", "2"), ("alpha_max", "0.05"), ("beta_max", "0.2")];
        let mut v = base.to_vec();
        v.extend([("dropout", "15%"), ("interval_level", "0.9")]);
        let r = read(&text("mean_t", "greater", &v));
        assert_eq!((r.ask.context.dropout, r.ask.interval_level), (Some(0.15), Some(0.9)));
        assert_eq!((r.ask.context.planning_source.as_str(), r.ask.context.unit.as_str()), ("pilot", "days"));
        let mut v = base.to_vec();
        v.extend([("dropout", "0.97"), ("interval_level", "1")]);
        let r = read(&text("mean_t", "greater", &v));
        let at = |f: &str| r.messages.iter().find(|m| m.field == f).map(|m| m.text.clone()).unwrap_or_default();
        assert!(at("dropout").contains("from 0 to 0.95"), "{}", at("dropout"));
        assert!(at("interval_level").contains("between 0 and 1"), "{}", at("interval_level"));
        assert!(r.design_ready(), "a bad dropout does not stop the design");
    }

    #[test]
    fn a_complete_form_reads_into_the_engines_request() {
        let t = text("proportion_exact", "greater", &[("p0", "50%"), ("p_alt", "0.7"), ("alpha_max", "5%"), ("beta_max", "0.2")]);
        let r = read(&t);
        assert!(r.design_ready(), "{:?}", r.messages);
        assert_eq!(r.ask.spec.get("theta0"), Some(0.5));
        assert_eq!(r.ask.spec.get("theta1"), Some(0.7));
        assert_eq!(r.ask.spec.get("alpha_max"), Some(0.05));
        assert_eq!(r.ask.spec.get("weight"), None);
        assert!(!r.data_started);
    }

    #[test]
    fn bad_text_is_reported_beside_its_input_and_left_alone() {
        let t = text("mean_t", "greater", &[("theta0", "1,5"), ("theta1", "2"), ("sigma", "1"), ("alpha_max", "0.05")]);
        let r = read(&t);
        assert!(!r.design_ready());
        assert!(r.messages.iter().any(|m| m.field == "theta0" && m.invalid && m.text.contains("point for decimals")));
        assert!(r.messages.iter().any(|m| m.field == "beta_max" && !m.invalid));
        assert!(r.still_needed.iter().any(|s| s.contains("miss rate")));
    }

    #[test]
    fn every_family_input_exists_once_and_has_a_part() {
        for e in &REGISTRY {
            for f in e.design.iter().chain(e.data.iter().filter(|f| f.required)) {
                assert_eq!(inputs().iter().filter(|i| i.name == f.input).count(), 1, "{}", f.input);
            }
            assert!(!labels(e.family, "").is_empty());
        }
    }

    #[test]
    fn partial_data_ask_for_the_rest_and_do_not_decide() {
        let t = text("two_means_pooled", "less", &[("d", ""), ("data.n1", "20"), ("data.mean1", "5")]);
        let r = read(&t);
        assert!(r.data_started && !r.data_complete);
        assert!(r.ask.data.is_none());
        assert!(r.messages.iter().any(|m| m.field == "data.sd2" && m.text.contains("decide")));
    }

    #[test]
    fn every_refusal_comes_back_at_once_beside_its_input() {
        // A design the engine refuses: the message sits at the page's own
        // input for the field (a proportion's θ0 is shown as p0).
        let t = text("proportion_exact", "greater", &[("p0", "0.8"), ("p_alt", "0.7"), ("alpha_max", "0.05"), ("beta_max", "0.2")]);
        let r = read(&t);
        let reply = crate::engine::request::reply(&r.ask);
        assert!(reply.answer.is_none());
        let m: Vec<FieldMessage> = reply.errors.iter().map(|e| engine_message(r.family, e)).collect();
        assert_eq!(m.len(), 1);
        assert_eq!(m[0].field, "p_alt", "{m:?}");
        // A refused n and refused data in one answer: both placed, the
        // design still answered without them.
        let t = text(
            "mean_t",
            "greater",
            &[("d", ""), ("theta0", "0"), ("theta1", "0.5"), ("sigma", "1"), ("alpha_max", "0.05"), ("beta_max", "0.2"), ("n", "1"), ("data.n", "10"), ("data.mean", "1"), ("data.sd", "0")],
        );
        let r = read(&t);
        let reply = crate::engine::request::reply(&r.ask);
        assert!(reply.answer.is_some());
        let fields: Vec<String> = reply.errors.iter().map(|e| engine_message(r.family, e).field).collect();
        assert!(fields.contains(&"n".to_string()) && fields.contains(&"data.sd".to_string()), "{fields:?}");
    }

    #[test]
    fn each_familys_inputs_stand_in_its_own_order() {
        let order: Vec<&str> = inputs().iter().map(|i| i.name).collect();
        for e in &REGISTRY {
            let mine: Vec<usize> = e.design.iter().map(|f| order.iter().position(|n| *n == f.input).unwrap()).collect();
            assert!(mine.windows(2).all(|w| w[0] < w[1]), "{}: {:?}", e.id, mine);
        }
    }
}
