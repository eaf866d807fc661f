//! One JSON document in, one JSON document out: the contract shared by the
//! command line and the page.
//!
//! The input is a flat JSON object: the design's fields (DEVELOPERS.md,
//! "Families"), optionally `n`, `data` (summary data) and `curves`. Errors
//! name the field, its value and the rule; unknown fields are rejected so
//! that a typo (`alpah_max`) cannot silently drop a limit.

use super::curves::{Curves, curves};
use super::decision::{Decision, DecisionError, Summary, decide};
use super::design::{Design, DesignError, DesignSpec, Family};
use super::evaluate::{EvaluateError, Evaluation, evaluate};
use super::inverse::{SmallestEffect, smallest_effect};
use super::sample_size::{SampleSize, sample_size};
use super::threshold::Alternative;
use serde::Serialize;
use serde_json::{Map, Value};

/// The caution every result carries.
pub const CAUTION: &str = "Decision support only: Tern does not replace a pre-registered analysis plan, a qualified \
statistician, regulatory guidance or local law, least of all for clinical or personnel decisions.";

/// The fields that describe a design (what the page may keep, export or
/// share); `n`, `data` and `curves` are the request's other fields.
pub const DESIGN_FIELDS: [&str; 14] = [
    "family", "alternative", "theta0", "theta1", "sigma", "sigma1", "sigma2", "d", "p1", "p2", "ratio", "alpha_max", "beta_max",
    "weight",
];
const OTHER_FIELDS: [&str; 3] = ["n", "data", "curves"];

/// What is wrong with a request.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RequestError {
    #[error("the input is not valid JSON: {0}")]
    NotJson(String),
    #[error("the input must be a JSON object of design fields, such as {{\"family\": \"mean_t\", ...}}")]
    NotObject,
    #[error("{field} is not a known field{hint}; the known fields are {known}")]
    UnknownField { field: String, hint: String, known: String },
    #[error("{field} is {shown}, but must be a number")]
    NotNumber { field: String, shown: String },
    #[error("{field} is {shown}, but must be {rule}")]
    BadValue { field: String, shown: String, rule: String },
    #[error(transparent)]
    Design(#[from] DesignError),
    #[error(transparent)]
    Decision(#[from] DecisionError),
    #[error(transparent)]
    Evaluate(#[from] EvaluateError),
}

/// A parsed request.
#[derive(Debug, Clone, PartialEq)]
pub struct Request {
    pub design: Design,
    pub n: Option<u64>,
    pub data: Option<Summary>,
    pub curves: bool,
}

/// The full answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Answer {
    pub tern_version: &'static str,
    pub family: &'static str,
    pub family_title: &'static str,
    pub design: Design,
    pub caution: &'static str,
    /// The design at the requested n, or at the Youden n when none was given.
    pub at_n: Option<Evaluation>,
    pub sample_size: SampleSize,
    /// Given n: the smallest effect it makes conclusive.
    pub smallest_effect: Option<SmallestEffect>,
    pub decision: Option<Decision>,
    pub curves: Option<Curves>,
}

fn shown(v: &Value) -> String {
    match v {
        Value::String(s) => format!("\"{s}\" (text)"),
        other => other.to_string(),
    }
}

fn number(obj: &Map<String, Value>, field: &str, prefix: &str) -> Result<Option<f64>, RequestError> {
    match obj.get(field) {
        None | Some(Value::Null) => Ok(None),
        Some(Value::Number(x)) => Ok(x.as_f64()),
        Some(v) => Err(RequestError::NotNumber { field: format!("{prefix}{field}"), shown: shown(v) }),
    }
}

fn closest<'a>(field: &str, known: &[&'a str]) -> Option<&'a str> {
    // A field one or two edits away is almost certainly a typo of it.
    known.iter().copied().map(|k| (edit_distance(field, k), k)).filter(|(d, _)| *d <= 2).min().map(|(_, k)| k)
}

fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut prev = row[0];
        row[0] = i + 1;
        for j in 0..b.len() {
            let cur = row[j + 1];
            row[j + 1] = if ca == b[j] { prev } else { 1 + prev.min(row[j]).min(row[j + 1]) };
            prev = cur;
        }
    }
    row[b.len()]
}

fn check_fields(obj: &Map<String, Value>, known: &[&str], prefix: &str) -> Result<(), RequestError> {
    for key in obj.keys() {
        if !known.contains(&key.as_str()) {
            let hint = closest(key, known).map_or(String::new(), |k| format!(" (did you mean {prefix}{k}?)"));
            return Err(RequestError::UnknownField { field: format!("{prefix}{key}"), hint, known: known.join(", ") });
        }
    }
    Ok(())
}

/// Parse a request document.
pub fn parse(text: &str) -> Result<Request, RequestError> {
    let value: Value = serde_json::from_str(text).map_err(|e| RequestError::NotJson(e.to_string()))?;
    parse_value(&value)
}

/// Parse a request already read as JSON.
pub fn parse_value(value: &Value) -> Result<Request, RequestError> {
    let obj = value.as_object().ok_or(RequestError::NotObject)?;
    let known: Vec<&str> = DESIGN_FIELDS.iter().chain(OTHER_FIELDS.iter()).copied().collect();
    check_fields(obj, &known, "")?;
    let family = match obj.get("family") {
        None | Some(Value::Null) => None,
        Some(Value::String(s)) => Some(Family::from_id(s).ok_or_else(|| RequestError::BadValue {
            field: "family".into(),
            shown: format!("\"{s}\""),
            rule: format!("one of {}", Family::ALL.map(|f| f.id()).join(", ")),
        })?),
        Some(v) => {
            return Err(RequestError::BadValue { field: "family".into(), shown: shown(v), rule: "a family name such as \"mean_t\"".into() });
        }
    };
    let alternative = match obj.get("alternative") {
        None | Some(Value::Null) => None,
        Some(Value::String(s)) => Some(match s.as_str() {
            "greater" => Alternative::Greater,
            "less" => Alternative::Less,
            "two_sided" => Alternative::TwoSided,
            _ => {
                return Err(RequestError::BadValue {
                    field: "alternative".into(),
                    shown: format!("\"{s}\""),
                    rule: "one of greater, less, two_sided".into(),
                });
            }
        }),
        Some(v) => return Err(RequestError::BadValue { field: "alternative".into(), shown: shown(v), rule: "greater, less or two_sided".into() }),
    };
    let f = |name: &str| number(obj, name, "");
    let spec = DesignSpec {
        family,
        alternative,
        theta0: f("theta0")?,
        theta1: f("theta1")?,
        sigma: f("sigma")?,
        sigma1: f("sigma1")?,
        sigma2: f("sigma2")?,
        d: f("d")?,
        p1: f("p1")?,
        p2: f("p2")?,
        ratio: f("ratio")?,
        alpha_max: f("alpha_max")?,
        beta_max: f("beta_max")?,
        weight: f("weight")?,
    };
    let design = Design::new(&spec)?;
    let n = match f("n")? {
        None => None,
        Some(x) => {
            let min = design.n_min();
            let max = design.n_max();
            if x.fract() != 0.0 || x < min as f64 || x > max as f64 {
                return Err(RequestError::BadValue {
                    field: "n".into(),
                    shown: format!("{x}"),
                    rule: format!("a whole number from {min} to {max}"),
                });
            }
            Some(x as u64)
        }
    };
    let data = match obj.get("data") {
        None | Some(Value::Null) => None,
        Some(Value::Object(d)) => Some(summary(d, design.family)?),
        Some(v) => return Err(RequestError::BadValue { field: "data".into(), shown: shown(v), rule: "an object of summary figures".into() }),
    };
    let curves = match obj.get("curves") {
        None | Some(Value::Null) => false,
        Some(Value::Bool(b)) => *b,
        Some(v) => return Err(RequestError::BadValue { field: "curves".into(), shown: shown(v), rule: "true or false".into() }),
    };
    Ok(Request { design, n, data, curves })
}

fn summary(d: &Map<String, Value>, family: Family) -> Result<Summary, RequestError> {
    let req = |name: &'static str| -> Result<f64, RequestError> {
        number(d, name, "data.")?.ok_or(RequestError::Decision(DecisionError::Missing { field: leak(name), hint: "a summary figure of the data" }))
    };
    let s = match family {
        Family::MeanZ | Family::MeanT | Family::PairedT => {
            check_fields(d, &["n", "mean", "sd"], "data.")?;
            Summary::OneGroup { n: req("n")?, mean: req("mean")?, sd: number(d, "sd", "data.")? }
        }
        Family::TwoMeansPooled | Family::TwoMeansWelch => {
            check_fields(d, &["n1", "mean1", "sd1", "n2", "mean2", "sd2"], "data.")?;
            Summary::TwoGroups {
                n1: req("n1")?,
                mean1: req("mean1")?,
                sd1: req("sd1")?,
                n2: req("n2")?,
                mean2: req("mean2")?,
                sd2: req("sd2")?,
            }
        }
        Family::ProportionExact | Family::ProportionNormal => {
            check_fields(d, &["successes", "trials"], "data.")?;
            Summary::Proportion { successes: req("successes")?, trials: req("trials")? }
        }
        Family::TwoProportions => {
            check_fields(d, &["successes1", "trials1", "successes2", "trials2"], "data.")?;
            Summary::TwoProportions {
                successes1: req("successes1")?,
                trials1: req("trials1")?,
                successes2: req("successes2")?,
                trials2: req("trials2")?,
            }
        }
    };
    Ok(s)
}

/// Field names of summary data, with their "data." prefix, as static text.
fn leak(name: &'static str) -> &'static str {
    match name {
        "n" => "data.n",
        "mean" => "data.mean",
        "sd" => "data.sd",
        "n1" => "data.n1",
        "mean1" => "data.mean1",
        "sd1" => "data.sd1",
        "n2" => "data.n2",
        "mean2" => "data.mean2",
        "sd2" => "data.sd2",
        "successes" => "data.successes",
        "trials" => "data.trials",
        "successes1" => "data.successes1",
        "trials1" => "data.trials1",
        "successes2" => "data.successes2",
        "trials2" => "data.trials2",
        _ => "data",
    }
}

/// Answer a parsed request.
pub fn answer(req: &Request) -> Result<Answer, RequestError> {
    let design = &req.design;
    let sample_size = sample_size(design)?;
    let decision = match &req.data {
        Some(d) => Some(decide(design, d)?),
        None => None,
    };
    let at_n = match (req.n, decision.as_ref(), &sample_size.at_youden) {
        (Some(n), _, _) => Some(evaluate(design, n)?),
        (None, Some(d), _) => Some(d.at_n.clone()),
        (None, None, y) => y.clone(),
    };
    let smallest = match req.n {
        Some(n) => Some(smallest_effect(design, n)?),
        None => None,
    };
    let curves = match (&at_n, req.curves) {
        (Some(at), true) => {
            let n_hi = sample_size.youden.map_or(at.n1, |g| g.n1).max(at.n1).saturating_mul(2).min(design.n_max());
            Some(curves(design, at, n_hi)?)
        }
        _ => None,
    };
    Ok(Answer {
        tern_version: env!("CARGO_PKG_VERSION"),
        family: design.family.id(),
        family_title: design.family.title(),
        design: *design,
        caution: CAUTION,
        at_n,
        sample_size,
        smallest_effect: smallest,
        decision,
        curves,
    })
}

/// Parse, answer and serialise: the whole contract in one call.
pub fn run(text: &str) -> Result<String, RequestError> {
    let req = parse(text)?;
    let ans = answer(&req)?;
    serde_json::to_string_pretty(&ans).map_err(|e| RequestError::NotJson(e.to_string()))
}
