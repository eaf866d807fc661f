//! What a design says about itself, beside its numbers: the unit of the
//! measurements, where the planning values come from, why the limits are
//! what they are, the expected dropout and the study notes. None of it
//! enters a computation except the dropout, which turns the sample size
//! into the number to enrol.
//!
//! The unit, the source, the reason and the dropout are kept with a design
//! (and travel in its link); the study notes go only into a report.

use super::family::DROPOUT;
use super::request::RequestError;
use super::sample_size::GroupSizes;
use serde::Serialize;
use serde_json::{Map, Value};

/// The text fields of the JSON contract, with the longest text each takes
/// (in characters): enough for a paragraph, not for a data file.
pub const TEXT_FIELDS: [(&str, usize); 4] = [("unit", 40), ("planning_source", 2_000), ("limits_reason", 2_000), ("notes", 20_000)];

/// Every contract field of this module: the texts and the dropout share
/// ([`DROPOUT`], with its rule).
pub const FIELDS: [&str; 5] = ["unit", "planning_source", "limits_reason", "notes", DROPOUT.key];

/// The fields kept with a design and put in its link: all but the notes.
pub const KEPT: [&str; 4] = ["unit", "planning_source", "limits_reason", DROPOUT.key];

/// The design's own words and its dropout; empty text when not given.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct Context {
    /// The unit of the measurements ("days", "mmHg"); shown after
    /// estimates of families measured in a unit.
    pub unit: String,
    /// Where θ1 and the standard deviations come from (a pilot study, the
    /// literature, a registry).
    pub planning_source: String,
    /// Why the two limits were set where they are.
    pub limits_reason: String,
    /// The study notes (never kept with a design or put in a link).
    pub notes: String,
    /// The expected share of participants lost, in [0, 0.95].
    pub dropout: Option<f64>,
}

/// The number to enrol so that `n` remain after a dropout share `q`:
/// ⌈n / (1 − q)⌉ per group (common practice, no source).
pub fn enrolment(n: GroupSizes, q: f64) -> GroupSizes {
    let up = |n: u64| (n as f64 / (1.0 - q) - 1e-9 * n as f64).ceil().max(n as f64) as u64;
    let n1 = up(n.n1);
    let n2 = n.n2.map(up);
    GroupSizes { n1, n2, n_total: n1 + n2.unwrap_or(0) }
}

/// Read the context fields of a request object.
pub fn parse(obj: &Map<String, Value>) -> Result<Context, RequestError> {
    let mut c = Context::default();
    for (key, max) in TEXT_FIELDS {
        let text = match obj.get(key) {
            None | Some(Value::Null) => String::new(),
            Some(Value::String(s)) if s.chars().count() <= max => s.trim().to_string(),
            Some(Value::String(s)) => {
                return Err(RequestError::BadValue {
                    field: key.into(),
                    shown: format!("a text of {} characters", s.chars().count()),
                    rule: format!("a text of at most {max} characters"),
                });
            }
            Some(v) => return Err(RequestError::BadValue { field: key.into(), shown: v.to_string(), rule: "a text in quotes".into() }),
        };
        match key {
            "unit" => c.unit = text,
            "planning_source" => c.planning_source = text,
            "limits_reason" => c.limits_reason = text,
            _ => c.notes = text,
        }
    }
    c.dropout = match obj.get(DROPOUT.key) {
        None | Some(Value::Null) => None,
        Some(Value::Number(x)) => match x.as_f64() {
            Some(q) if DROPOUT.check.holds(q) => Some(q),
            _ => return Err(bad_dropout(x.to_string())),
        },
        Some(v) => return Err(bad_dropout(v.to_string())),
    };
    Ok(c)
}

fn bad_dropout(shown: String) -> RequestError {
    RequestError::BadValue { field: DROPOUT.key.into(), shown, rule: DROPOUT.check.rule().into() }
}

/// Write the fields of `c` that are given into a request object: the kept
/// ones (`KEPT`), and the notes too when `with_notes`.
pub fn put(c: &Context, obj: &mut Map<String, Value>, with_notes: bool) {
    for (key, text) in [("unit", &c.unit), ("planning_source", &c.planning_source), ("limits_reason", &c.limits_reason)] {
        if !text.is_empty() {
            obj.insert(key.into(), Value::String(text.clone()));
        }
    }
    if with_notes && !c.notes.is_empty() {
        obj.insert("notes".into(), Value::String(c.notes.clone()));
    }
    if let Some(q) = c.dropout {
        obj.insert(DROPOUT.key.into(), super::request::json_number(q));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ⌈n / (1 − q)⌉ by hand: 64 / 0.85 = 75.29 → 76; 100 / 0.8 = 125
    /// exactly (no rounding up past a whole number); 0 % keeps n.
    #[test]
    fn enrolment_rounds_up_per_group() {
        let g = |n1, n2: Option<u64>| GroupSizes { n1, n2, n_total: n1 + n2.unwrap_or(0) };
        assert_eq!(enrolment(g(64, None), 0.15), g(76, None));
        assert_eq!(enrolment(g(100, Some(100)), 0.2), g(125, Some(125)));
        assert_eq!(enrolment(g(100, Some(50)), 0.0), g(100, Some(50)));
        assert_eq!(enrolment(g(1, None), 0.95), g(20, None));
    }

    #[test]
    fn bad_context_names_the_field() {
        let obj = |t: &str| serde_json::from_str::<Map<String, Value>>(t).unwrap();
        let e = parse(&obj(r#"{"dropout": 1}"#)).unwrap_err().to_string();
        assert!(e.contains("dropout") && e.contains("0.95"), "{e}");
        let mut back = Map::new();
        put(&parse(&obj(r#"{"unit": "days", "notes": "n", "dropout": 0.2}"#)).unwrap(), &mut back, false);
        assert_eq!(serde_json::Value::Object(back).to_string(), r#"{"dropout":0.2,"unit":"days"}"#);
        let e = parse(&obj(r#"{"unit": 3}"#)).unwrap_err().to_string();
        assert!(e.starts_with("unit"), "{e}");
        let long = format!(r#"{{"limits_reason": "{}"}}"#, "x".repeat(2001));
        assert!(parse(&obj(&long)).unwrap_err().to_string().contains("at most 2000"));
        let c = parse(&obj(r#"{"unit": " days ", "dropout": 0.1}"#)).unwrap();
        assert_eq!((c.unit.as_str(), c.dropout), ("days", Some(0.1)));
    }
}
