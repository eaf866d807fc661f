//! One JSON document in, one JSON document out: the contract shared by the
//! command line and the page.
//!
//! The input is a flat JSON object: the design's fields (DEVELOPERS.md,
//! "Families"), optionally `n`, `data` (summary data) and `curves`. Errors
//! name the field, its value and the rule; unknown fields are rejected so
//! that a typo (`alpah_max`) cannot silently drop a limit.

use super::curves::{Curves, curves};
use super::decision::{Decision, DecisionError, Summary, decide_at_level};
use super::design::{Design, DesignError, DesignSpec, Family};
use super::family;
use super::evaluate::{EvaluateError, Evaluation, evaluate};
use super::inverse::{SmallestEffect, smallest_effect};
use super::sample_size::{self, Found, GroupSizes, SampleSize, sample_size};
use super::context::{self, Context};
use super::simulate::{self, Plan, Simulation, SimulationError};
use super::threshold::Alternative;
use serde::Serialize;
use serde_json::{Map, Value};

/// The caution every result carries.
pub const CAUTION: &str = "Decision support only: Tern does not replace a pre-registered analysis plan, a qualified \
statistician, regulatory guidance or local law, least of all for clinical or personnel decisions.";

/// The fields that describe a design (what the page may keep, export or
/// share): `family`, `alternative` and every design field of the registry;
/// `n`, `data` and `curves` are the request's other fields.
pub fn design_fields() -> Vec<&'static str> {
    let mut v = vec!["family", "alternative"];
    v.extend(family::design_keys());
    v
}
const OTHER_FIELDS: [&str; 5] = ["n", "data", "curves", family::INTERVAL_LEVEL.key, "simulation"];

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
    #[error("the data file {file}: {message}")]
    DataFile { file: String, message: String },
    #[error(transparent)]
    Design(#[from] DesignError),
    #[error(transparent)]
    Decision(#[from] DecisionError),
    #[error(transparent)]
    Evaluate(#[from] EvaluateError),
    #[error(transparent)]
    Simulation(#[from] SimulationError),
}

/// A parsed request.
#[derive(Debug, Clone, PartialEq)]
pub struct Request {
    pub design: Design,
    pub n: Option<u64>,
    pub data: Option<Summary>,
    pub curves: bool,
    /// The design's words and dropout ([`context`]).
    pub context: Context,
    /// The decision's confidence level, when not the one that follows
    /// α_max (`interval_level`, in (0, 1)).
    pub interval_level: Option<f64>,
    /// The simulation check's block (`tern simulate`), unchecked numbers.
    pub simulation: Option<simulate::Spec>,
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
    /// With a dropout share: the number to enrol for the smallest
    /// conclusive n, ⌈n / (1 − dropout)⌉ per group.
    pub enrolment: Option<Enrolment>,
}

/// The number to enrol so that the smallest conclusive n remains.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Enrolment {
    pub dropout: f64,
    pub enrol: GroupSizes,
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
    let mut known = design_fields();
    known.extend(OTHER_FIELDS);
    known.extend(context::FIELDS);
    check_fields(obj, &known, "")?;
    let context = context::parse(obj)?;
    let family = match obj.get("family") {
        None | Some(Value::Null) => None,
        Some(Value::String(s)) => Some(Family::from_id(s).ok_or_else(|| RequestError::BadValue {
            field: "family".into(),
            shown: format!("\"{s}\""),
            rule: format!("one of {}", Family::ids()),
        })?),
        Some(v) => {
            return Err(RequestError::BadValue { field: "family".into(), shown: shown(v), rule: "a family name such as \"mean_t\"".into() });
        }
    };
    let alternative = match obj.get("alternative") {
        None | Some(Value::Null) => None,
        Some(Value::String(s)) => Some(Alternative::from_id(s).ok_or_else(|| RequestError::BadValue {
            field: "alternative".into(),
            shown: format!("\"{s}\""),
            rule: format!("one of {}", Alternative::ALL.map(Alternative::id).join(", ")),
        })?),
        Some(v) => return Err(RequestError::BadValue { field: "alternative".into(), shown: shown(v), rule: "greater, less or two_sided".into() }),
    };
    let mut spec = DesignSpec { family, alternative, values: Vec::new() };
    for key in family::design_keys() {
        spec.put(key, number(obj, key, "")?);
    }
    let design = Design::new(&spec)?;
    let n = match number(obj, "n", "")? {
        None => None,
        Some(x) => Some(sample_size_n(&design, x)?),
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
    let interval_level = interval_level(obj)?;
    let simulation = match obj.get("simulation") {
        None | Some(Value::Null) => None,
        Some(Value::Object(b)) => Some(simulation_block(b)?),
        Some(v) => return Err(RequestError::BadValue { field: "simulation".into(), shown: shown(v), rule: "an object such as {\"shape\": \"normal\", \"replicates\": 10000, \"seed\": 1}".into() }),
    };
    Ok(Request { design, n, data, curves, context, interval_level, simulation })
}

/// The `simulation` block: the shape's id and parameters, the number of
/// data sets and the seed (checked by `simulate::Plan::new`).
fn simulation_block(b: &Map<String, Value>) -> Result<simulate::Spec, RequestError> {
    let mut known = vec!["shape", "replicates", "seed"];
    known.extend(simulate::shape::param_keys());
    check_fields(b, &known, "simulation.")?;
    let id = match b.get("shape") {
        None | Some(Value::Null) => {
            return Err(SimulationError::Missing {
                field: "simulation.shape".into(),
                hint: format!("the population to draw from: one of {}", simulate::shape::SHAPES.iter().map(|s| s.id).collect::<Vec<_>>().join(", ")),
            }
            .into());
        }
        Some(Value::String(s)) => s.clone(),
        Some(v) => return Err(RequestError::BadValue { field: "simulation.shape".into(), shown: shown(v), rule: "a shape's name such as \"normal\"".into() }),
    };
    let mut params = Vec::new();
    for key in simulate::shape::param_keys() {
        if let Some(v) = number(b, key, "simulation.")? {
            params.push((key.to_string(), v));
        }
    }
    Ok(simulate::Spec {
        shape: simulate::shape::ShapeSpec { id, params, groups: None },
        replicates: number(b, "replicates", "simulation.")?,
        seed: number(b, "seed", "simulation.")?,
    })
}

/// What `tern simulate` prints.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SimulationAnswer {
    pub tern_version: &'static str,
    pub family: &'static str,
    pub family_title: &'static str,
    pub caution: &'static str,
    pub simulation: Simulation,
}

/// The plan of a request's simulation check: at the request's `n`, or
/// else at the smallest conclusive n; with the design's dropout; `groups`:
/// a data file's values per group, for the `resample` shape.
pub fn simulation_plan(req: &Request, groups: Option<Vec<Vec<f64>>>) -> Result<Plan, RequestError> {
    let mut spec = req.simulation.clone().ok_or_else(|| SimulationError::Missing {
        field: "simulation".into(),
        hint: "an object such as {\"shape\": \"normal\", \"replicates\": 10000, \"seed\": 1} saying what to draw".into(),
    })?;
    spec.shape.groups = groups;
    let n1 = match req.n {
        Some(n) => n,
        None => {
            // The block is checked before the search, which may take a while.
            Plan::new(req.design, req.design.n_min(), req.context.dropout, &spec)?;
            sample_size(&req.design)?.youden.map(|g| g.n1).ok_or_else(|| SimulationError::Missing {
                field: "n".into(),
                hint: "no conclusive sample size was found for this design, so state the n to check".into(),
            })?
        }
    };
    Ok(Plan::new(req.design, n1, req.context.dropout, &spec)?)
}

/// Run a request's simulation check in one thread.
pub fn simulate(req: &Request, groups: Option<Vec<Vec<f64>>>) -> Result<SimulationAnswer, RequestError> {
    let plan = simulation_plan(req, groups)?;
    let tally = plan.run();
    let simulation = plan.result(&tally)?;
    let design = &req.design;
    Ok(SimulationAnswer { tern_version: env!("CARGO_PKG_VERSION"), family: design.family.id(), family_title: design.family.title(), caution: CAUTION, simulation })
}

/// `interval_level`, if given: a number in (0, 1).
fn interval_level(obj: &Map<String, Value>) -> Result<Option<f64>, RequestError> {
    let field = &family::INTERVAL_LEVEL;
    match number(obj, field.key, "")? {
        Some(v) if !field.check.holds(v) => Err(RequestError::BadValue { field: field.key.into(), shown: format!("{v}"), rule: field.check.rule().into() }),
        v => Ok(v),
    }
}

/// A typed n checked against the design's range.
fn sample_size_n(design: &Design, x: f64) -> Result<u64, RequestError> {
    let (min, max) = (design.n_min(), design.n_max());
    if x.fract() != 0.0 || x < min as f64 || x > max as f64 {
        return Err(RequestError::BadValue { field: "n".into(), shown: format!("{x}"), rule: format!("a whole number from {min} to {max}") });
    }
    Ok(x as u64)
}

fn summary(d: &Map<String, Value>, family: Family) -> Result<Summary, RequestError> {
    let entry = family.entry();
    let keys: Vec<&str> = entry.data.iter().map(|f| f.key).collect();
    check_fields(d, &keys, "data.")?;
    let mut values = Vec::new();
    for f in entry.data {
        if let Some(v) = number(d, f.key, "data.")? {
            values.push((f.key, v));
        }
    }
    Ok(Summary::from_fields(family, &values)?)
}

/// Answer a parsed request whose design's sample-size search was already
/// run (the page's worker): its findings, for this very design.
pub fn answer_found(req: &Request, found: &Found) -> Result<Answer, RequestError> {
    answer_sized(req, decided(req)?, sample_size::finish(&req.design, found)?)
}

/// Answer a parsed request.
pub fn answer(req: &Request) -> Result<Answer, RequestError> {
    answer_with(req, decided(req)?)
}

/// The request's decision, when it has data.
fn decided(req: &Request) -> Result<Option<Decision>, RequestError> {
    Ok(match &req.data {
        Some(d) => Some(decide_at_level(&req.design, d, req.interval_level)?),
        None => None,
    })
}

/// Answer a request whose data, if any, are already decided.
fn answer_with(req: &Request, decision: Option<Decision>) -> Result<Answer, RequestError> {
    answer_sized(req, decision, sample_size(&req.design)?)
}

/// [`answer_with`] with the sample size already known (or pending).
fn answer_sized(req: &Request, decision: Option<Decision>, sample_size: SampleSize) -> Result<Answer, RequestError> {
    let design = &req.design;
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
    let enrolment = match (req.context.dropout, sample_size.youden) {
        (Some(dropout), Some(n)) => Some(Enrolment { dropout, enrol: context::enrolment(n, dropout) }),
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
        enrolment,
    })
}

/// What a caller holding typed values (the page) asks for one state of its
/// form: the design, and as typed, a sample size to check and summary data
/// by field name (without `data.`).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Ask {
    pub spec: DesignSpec,
    pub n: Option<f64>,
    pub data: Option<Vec<(&'static str, f64)>>,
    /// The design's words and dropout.
    pub context: Context,
    /// The decision's confidence level, when not the one that follows α_max.
    pub interval_level: Option<f64>,
}

/// A sample size checked on its own: the design there and the smallest
/// effect it makes conclusive.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Check {
    pub at_n: Evaluation,
    pub smallest_effect: SmallestEffect,
}

/// How a reply's sample-size search runs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Search {
    /// All of it, here.
    Here,
    /// At most this much work here (`sample_size::QUICK_WORK`); past it the
    /// answer's sample size is pending and the caller runs
    /// `sample_size::search` elsewhere.
    Quick(usize),
    /// Already run elsewhere for this very design.
    Done(Found),
    /// Running (or stopped) elsewhere for this very design: the sample size
    /// is pending, with no quick search to repeat.
    Elsewhere,
}

/// Everything the page shows for one [`Ask`], with every refusal at once.
#[derive(Debug, Clone, PartialEq)]
pub struct Reply {
    /// None when the design itself is refused or cannot be computed.
    pub answer: Option<Answer>,
    /// The typed n, checked on its own while the data's n leads the answer
    /// and its charts.
    pub check: Option<Check>,
    /// Every refusal: the design's (then nothing else is computed), the
    /// typed n's and the data's (the rest is still answered without them).
    pub errors: Vec<RequestError>,
}

/// Answer an [`Ask`] in one pass: the sample-size search runs once, a
/// refused n or refused data are reported beside an answer computed
/// without them, and the charts follow the data's n when data decide
/// (else the typed n, else the Youden n).
pub fn reply(ask: &Ask) -> Reply {
    reply_searching(ask, Search::Here)
}

/// [`reply`] with the sample-size search run as `search` says.
pub fn reply_searching(ask: &Ask, search: Search) -> Reply {
    let mut errors = Vec::new();
    let design = match Design::new(&ask.spec) {
        Ok(d) => d,
        Err(e) => return Reply { answer: None, check: None, errors: vec![e.into()] },
    };
    let n = ask.n.and_then(|x| sample_size_n(&design, x).map_err(|e| errors.push(e)).ok());
    let summary = ask.data.as_ref().and_then(|d| Summary::from_fields(design.family, d).map_err(|e| errors.push(e.into())).ok());
    let mut decision = None;
    if let Some(s) = &summary {
        match decide_at_level(&design, s, ask.interval_level) {
            Ok(d) => decision = Some(d),
            Err(e) => errors.push(e.into()),
        }
    }
    let req = Request { design, n: if decision.is_some() { None } else { n }, data: None, curves: true, context: ask.context.clone(), interval_level: ask.interval_level, simulation: None };
    let sized = match search {
        Search::Here => sample_size(&design),
        Search::Quick(work) => sample_size::search(&design, Some(work), &mut |_| {})
            .and_then(|f| f.map_or_else(|| Ok(SampleSize::pending(&design)), |f| sample_size::finish(&design, &f))),
        Search::Done(found) => sample_size::finish(&design, &found),
        Search::Elsewhere => Ok(SampleSize::pending(&design)),
    };
    let answer = match sized.map_err(RequestError::from).and_then(|s| answer_sized(&req, decision, s)) {
        Ok(a) => a,
        Err(e) => {
            errors.push(e);
            return Reply { answer: None, check: None, errors };
        }
    };
    let check = match (n, answer.decision.is_some()) {
        (Some(n), true) => match (evaluate(&design, n), smallest_effect(&design, n)) {
            (Ok(at_n), Ok(smallest_effect)) => Some(Check { at_n, smallest_effect }),
            (Err(e), _) => {
                errors.push(e.into());
                None
            }
            (_, Err(e)) => {
                errors.push(e.into());
                None
            }
        },
        (Some(_), false) => match (&answer.at_n, &answer.smallest_effect) {
            (Some(at_n), Some(se)) => Some(Check { at_n: at_n.clone(), smallest_effect: se.clone() }),
            _ => None,
        },
        _ => None,
    };
    Reply { answer: Some(answer), check, errors }
}

/// A design (and a sample size to check) as the contract's flat JSON
/// object: what a kept design, an exported file or a share link holds.
/// Whole numbers are written as integers, so counts read back exactly.
pub fn design_json(spec: &DesignSpec, n: Option<f64>) -> Map<String, Value> {
    let mut m = Map::new();
    if let Some(f) = spec.family {
        m.insert("family".into(), Value::String(f.id().into()));
    }
    if let Some(a) = spec.alternative {
        m.insert("alternative".into(), Value::String(a.id().into()));
    }
    for key in design_fields() {
        if let Some(v) = spec.get(key) {
            m.insert(key.into(), json_number(v));
        }
    }
    if let Some(n) = n {
        m.insert("n".into(), json_number(n));
    }
    m
}

/// A number as the contract writes it: whole numbers (below 2^53) as
/// integers, so counts read back exactly; a non-finite value as null.
pub fn json_number(v: f64) -> Value {
    if v.fract() == 0.0 && v.abs() < 9.0e15 { Value::from(v as i64) } else { serde_json::Number::from_f64(v).map_or(Value::Null, Value::Number) }
}

/// Parse, answer and serialise: the whole contract in one call.
pub fn run(text: &str) -> Result<String, RequestError> {
    let req = parse(text)?;
    let ans = answer(&req)?;
    serde_json::to_string_pretty(&ans).map_err(|e| RequestError::NotJson(e.to_string()))
}

/// Parse, run the simulation check and serialise (`tern simulate`).
pub fn run_simulation(text: &str) -> Result<String, RequestError> {
    let req = parse(text)?;
    let ans = simulate(&req, None)?;
    serde_json::to_string_pretty(&ans).map_err(|e| RequestError::NotJson(e.to_string()))
}
