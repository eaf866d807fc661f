//! From a request to a [`Report`]: the sections in reading order, each
//! written from the engine's answer.

use super::apa::{self, Inline, text};
use super::{Block, Report, Section, Table};
use crate::engine::decision::{Outcome, Summary};
use crate::engine::design::{Design, Effect};
use crate::engine::threshold::Alternative;
use crate::engine::evaluate::Evaluation;
use crate::engine::family::{self, Field};
use crate::engine::request::{self, Answer, Request, RequestError};
use crate::engine::simulate::Simulation;
use crate::page::charts::prep::DataViews;
use crate::page::charts::svg::{SvgError, data_charts, design_charts, simulation_chart};
use crate::page::charts::{histogram, quantile, realised_errors};
use crate::page::charts::table::design_numbers;
use crate::page::charts::{prep, prob, short};
use crate::page::results::{decide_card, rule_text, size_card, sizes, unit_of};
use crate::engine::sample_size::Found;
use serde_json::{Map, Value};

/// Who made the report and when: the version and build of Tern and the
/// date, given by the caller (the page's clock or the command line's), so
/// that the builder itself reads no clock.
#[derive(Debug, Clone, PartialEq)]
pub struct Stamp {
    pub version: &'static str,
    pub build: &'static str,
    /// The date as YYYY-MM-DD.
    pub date: String,
}

impl Stamp {
    /// This build's version and build id, on `date`.
    pub fn today(date: String) -> Stamp {
        Stamp { version: env!("CARGO_PKG_VERSION"), build: env!("TERN_BUILD"), date }
    }

    /// The date line, the one line in which two reports of the same request differ.
    pub fn line(&self) -> String {
        format!("Prepared with Tern {} (build {}) on {}.", self.version, self.build, self.date)
    }
}

/// Why no report could be made.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    #[error(transparent)]
    Request(#[from] RequestError),
    #[error("the design has no sample size to report on: give n, or limits that some n meets")]
    NoSampleSize,
    #[error("a chart could not be drawn: {0}")]
    Chart(String),
}

impl From<SvgError> for ReportError {
    fn from(e: SvgError) -> Self {
        ReportError::Chart(e.to_string())
    }
}

/// A report with what it was built from: the request as JSON, the
/// engine's answer and the simulation check's result when there was one
/// (the JSON format carries them all).
#[derive(Debug, Clone)]
pub struct Prepared {
    pub report: Report,
    pub request: Value,
    pub answer: Answer,
    pub simulation: Option<Simulation>,
}

impl Prepared {
    pub fn html(&self) -> String {
        super::html::html(&self.report)
    }

    pub fn markdown(&self) -> String {
        super::markdown::markdown(&self.report)
    }

    pub fn json(&self) -> String {
        super::json::json(&self.report, &self.request, &self.answer, self.simulation.as_ref())
    }
}

/// What a data file adds to a report when its figures decide: the views
/// of its histogram and quantile plot (none for a yes/no outcome) and the
/// notes on the data. Summaries only: no row of the file.
#[derive(Debug, Clone)]
pub struct DataPart {
    pub views: Option<DataViews>,
    pub notes: Vec<String>,
}

/// A design read with its data file (`engine::data_file::read_with_file`):
/// the request text with the file's summary figures as `data` (the role
/// and read fields taken out, so `tern run` reproduces it without the
/// file), and the file's part of the report.
pub fn data_part_from_file(text: &str, bytes: &[u8], name: &str) -> Result<(String, Option<DataPart>), ReportError> {
    let f = crate::engine::data_file::read_with_file(text, bytes, name)?;
    let unit = f.request.get("unit").and_then(Value::as_str).unwrap_or("").to_string();
    let paired = f.request.get("family").and_then(Value::as_str).and_then(crate::engine::design::Family::from_id).is_some_and(|fam| {
        fam.entry().shape == crate::engine::family::Shape::Paired
    });
    let views = (!f.values.is_empty()).then(|| prep::data_views(&f.summary, &f.values, paired, &unit));
    let text = serde_json::to_string_pretty(&Value::Object(f.request)).unwrap_or_default();
    Ok((text, Some(DataPart { views, notes: f.summary.notes })))
}

/// The simulation check a request text asks for with its `simulation`
/// block, run in one thread (`request::simulate`); with a data file's
/// bytes and name, as `tern simulate --data` runs it
/// (`data_file::simulate_with_file`: the `resample` shape draws from the
/// file's groups). None when the request has no block. The caller passes
/// the result to [`prepare`] (`tern report` does; the page passes the
/// result of its own run of the same block).
pub fn simulation_of(text: &str, file: Option<(&[u8], &str)>) -> Result<Option<Simulation>, ReportError> {
    let value: Value = serde_json::from_str(text).map_err(|e| RequestError::NotJson(e.to_string()))?;
    if value.get("simulation").is_none_or(Value::is_null) {
        return Ok(None);
    }
    let answer = match file {
        Some((bytes, name)) => crate::engine::data_file::simulate_with_file(text, bytes, name)?,
        None => request::simulate(&request::parse_value(&value)?, None)?,
    };
    Ok(Some(answer.simulation))
}

/// Parse a request document and build its report (charts included), with
/// a data file's part when its figures are the request's `data`, and the
/// section "Check by simulation" when a simulation check's result is
/// given (that of the request's own `simulation` block, which the design
/// block of the report then carries so that `tern simulate` reproduces
/// it; see [`simulation_of`]).
pub fn prepare(text: &str, stamp: Stamp, data: Option<&DataPart>, simulation: Option<&Simulation>) -> Result<Prepared, ReportError> {
    prepare_found(text, stamp, data, simulation, None)
}

/// [`prepare`] with the design's sample-size search already run (the
/// page's worker found it): the same report, without searching again.
pub fn prepare_found(text: &str, stamp: Stamp, data: Option<&DataPart>, simulation: Option<&Simulation>, found: Option<&Found>) -> Result<Prepared, ReportError> {
    let request: Value = serde_json::from_str(text).map_err(|e| RequestError::NotJson(e.to_string()))?;
    let mut req = request::parse_value(&request)?;
    req.curves = true;
    let answer = match found {
        Some(f) => request::answer_found(&req, f)?,
        None => request::answer(&req)?,
    };
    let report = build(&request, &req, &answer, stamp, data, simulation)?;
    Ok(Prepared { report, request, answer, simulation: simulation.cloned() })
}

/// The design as the reproducibility block shows it: the request's object
/// without the study notes and the `curves` switch, keys in order.
pub fn reproducible_json(value: &Value) -> String {
    let mut obj: Map<String, Value> = value.as_object().cloned().unwrap_or_default();
    obj.remove("notes");
    obj.remove("curves");
    serde_json::to_string_pretty(&Value::Object(obj)).unwrap_or_default()
}

/// Build the report of a parsed request and its answer. `value` is the
/// request as JSON (for the reproducibility block); `simulation` the
/// simulation check's result, if any.
pub fn build(value: &Value, req: &Request, ans: &Answer, stamp: Stamp, data: Option<&DataPart>, simulation: Option<&Simulation>) -> Result<Report, ReportError> {
    let design = &ans.design;
    let entry = design.family.entry();
    let unit = req.context.unit.as_str();
    let at = ans.at_n.as_ref().ok_or(ReportError::NoSampleSize)?;
    let mut sections = Vec::new();
    if !req.context.notes.is_empty() {
        let blocks = req.context.notes.split("\n\n").map(|p| Block::Paragraph(vec![text(p.trim())])).collect();
        sections.push(Section { id: "study", title: "The study".into(), blocks });
    }
    sections.push(design_section(value, req, ans));
    sections.push(threshold_section(ans, at, unit));
    sections.push(size_section(req, ans, unit));
    // The check of the planned size by simulation reads as the sample
    // size's sequel: what the planned design does with data the model
    // does not assume, before any data are decided.
    if let Some(sim) = simulation {
        sections.push(simulation_section(value, sim)?);
    }
    if let Some(mut s) = decision_section(req, ans, unit) {
        if let Some(d) = data.filter(|d| !d.notes.is_empty()) {
            s.blocks.push(Block::Paragraph(vec![text("Notes on the data (advice; the test is not changed by them):")]));
            s.blocks.push(Block::List(d.notes.clone()));
        }
        sections.push(s);
    }
    if let Some(curves) = &ans.curves {
        let observed = ans.decision.as_ref().map(|d| d.statistic);
        let views = prep::views(design, at, curves, ans.sample_size.youden.map(|g| g.n1), observed, unit);
        let numbers = design_numbers(&views);
        let titles = [
            ("sampling", "The two sampling curves and the threshold"),
            ("by-n", "α* and β* against the sample size"),
            ("tradeoff", "Power against α as the threshold moves"),
            ("total", "Total error against the threshold"),
        ];
        let mut blocks = Vec::new();
        for ((id, svg), (_, n)) in design_charts(&views)?.into_iter().zip(numbers) {
            let title = titles.iter().find(|t| t.0 == id).map_or(id, |t| t.1).to_string();
            blocks.push(Block::Figure { id, title, svg, numbers: Table { caption: n.caption, head: n.head, rows: n.rows } });
        }
        if let Some(views) = data.and_then(|d| d.views.as_ref()) {
            let numbers = [histogram::numbers(&views.histogram), quantile::numbers(&views.quantile)];
            let titles = ["The data: histogram of each group", "The data: normal quantile plot"];
            for (((id, svg), (caption, head, rows)), title) in data_charts(views)?.into_iter().zip(numbers).zip(titles) {
                let numbers = Table { caption, head: head.into_iter().map(String::from).collect(), rows };
                blocks.push(Block::Figure { id, title: title.to_string(), svg, numbers });
            }
        }
        sections.push(Section { id: "charts", title: "Charts".into(), blocks });
    }
    sections.push(reproduce_section(value, &stamp, simulation.is_some()));
    Ok(Report { title: format!("Tern report: {}", entry.title), stamp, caution: ans.caution.to_string(), sections })
}

/// A limit or a power as journals print it: no leading zero, two decimals
/// (three or more when the value needs them): .10, .05, .025.
fn limit(x: f64) -> String {
    let decimals = (2..=6).find(|&d| (x * 10f64.powi(d as i32)).fract().abs() < 1e-9).unwrap_or(6);
    apa::no_leading_zero(x, decimals)
}

fn sided(a: Alternative) -> &'static str {
    match a {
        Alternative::TwoSided => "two-sided",
        _ => "one-sided",
    }
}

fn with_unit(x: f64, unit: &str) -> String {
    format!("{}{unit}", short(x))
}

/// H0 and H1 in symbols: "H0: μ1 − μ2 = 0 days; H1: μ1 − μ2 < 0 days".
fn hypotheses(design: &Design, unit: &str) -> String {
    let entry = design.family.entry();
    let (theta0, _) = design.effect.thetas();
    let p = entry.parameter;
    let rel = match design.alternative {
        Alternative::Greater => ">",
        Alternative::Less => "<",
        Alternative::TwoSided => "≠",
    };
    match entry.null_words {
        Some(words) => format!("H0: {p} = 0 ({words}); H1: {p} {rel} 0"),
        None => format!("H0: {p} = {}; H1: {p} {rel} {}", with_unit(theta0, unit), with_unit(theta0, unit)),
    }
}

/// The design's stated values with their labels, in registry order.
fn design_facts(value: &Value, design: &Design, unit: &str) -> Vec<(String, Vec<Inline>)> {
    let entry = design.family.entry();
    let obj = value.as_object();
    let get = |k: &str| obj.and_then(|o| o.get(k)).and_then(Value::as_f64);
    let mut facts = Vec::new();
    let fields: Vec<&Field> = entry.design.iter().chain([&family::STANDARDISED]).chain(family::LIMITS.iter()).collect();
    for f in fields {
        if let Some(v) = get(f.key) {
            facts.push((family::label(f, if entry.in_unit { unit } else { "" }), vec![text(short(v))]));
        }
    }
    if get("weight").is_none() {
        facts.push(("Cost weight w".into(), vec![text("0.5 (both errors count alike: the threshold minimises α + β)")]));
    }
    facts
}

fn design_section(value: &Value, req: &Request, ans: &Answer) -> Section {
    let design = &ans.design;
    let entry = design.family.entry();
    let u = unit_of(design.family, &req.context.unit);
    let (_, theta1) = design.effect.thetas();
    let mut s = format!("A {} {}", sided(design.alternative), entry.test);
    if let Some(a) = entry.approximation {
        s.push_str(&format!(" ({a})"));
    }
    s.push_str(&format!("; {}; the smallest effect worth finding: {} = {}.", hypotheses(design, &u), entry.parameter, with_unit(theta1, &u)));
    let mut blocks = vec![Block::Paragraph(vec![text(s)]), Block::Facts(design_facts(value, design, &u))];
    let source = if req.context.planning_source.is_empty() { "Not stated." } else { req.context.planning_source.as_str() };
    blocks.push(Block::Paragraph(vec![text(format!("Where the planning values come from: {source}"))]));
    let reason = if req.context.limits_reason.is_empty() { "Not stated." } else { req.context.limits_reason.as_str() };
    blocks.push(Block::Paragraph(vec![text(format!(
        "The limits: a false alarm (type I error) at most {} of the time, a missed effect (type II error) at most {} (power at least {}). Why these limits: {reason}",
        limit(design.alpha_max),
        limit(design.beta_max),
        limit(1.0 - design.beta_max),
    ))]));
    Section { id: "design", title: "The design".into(), blocks }
}

fn threshold_section(ans: &Answer, at: &Evaluation, unit: &str) -> Section {
    let fam = ans.design.family;
    let mut facts = vec![
        ("sample size".to_string(), vec![text(sizes(at.n1, at.n2))]),
        ("threshold".to_string(), vec![text(rule_text(&at.rule, at.statistic, fam, unit))]),
        ("α*, the false-alarm rate at the threshold".to_string(), vec![text(prob(at.alpha))]),
        ("β*, the miss rate at the threshold".to_string(), vec![text(prob(at.beta))]),
        ("power, 1 − β*".to_string(), vec![text(prob(at.power))]),
        ("Youden's index J = 1 − α* − β*".to_string(), vec![text(prob(at.youden_j))]),
    ];
    if let Some(df) = at.df {
        facts.push(("degrees of freedom".to_string(), vec![text(apa::df(df))]));
    }
    if at.ties.len() > 1 {
        facts.push(("rules with the same total error".to_string(), vec![text(format!("{} (the one with the smallest α* is shown)", at.ties.len()))]));
    }
    let blocks = vec![Block::Paragraph(vec![text(at.verdict.clone())]), Block::Facts(facts)];
    Section { id: "threshold", title: format!("The threshold at n = {}", sizes(at.n1, at.n2)), blocks }
}

fn size_section(req: &Request, ans: &Answer, unit: &str) -> Section {
    let card = size_card(ans, unit);
    let mut blocks = vec![Block::Paragraph(vec![text(format!("{}. {}", card.headline, card.detail))])];
    if !card.conventional.is_empty() {
        blocks.push(Block::Paragraph(vec![text(card.conventional.clone())]));
    }
    if let Some(e) = &ans.enrolment {
        blocks.push(Block::Paragraph(vec![text(format!(
            "Allowing for an expected dropout of {} (⌈n / (1 − dropout)⌉ per group): enrol {}.",
            apa::percent(e.dropout),
            sizes(e.enrol.n1, e.enrol.n2)
        ))]));
    }
    if !card.notes.is_empty() {
        blocks.push(Block::List(card.notes.clone()));
    }
    if let Some(p) = justification(req, ans) {
        blocks.push(Block::Paragraph(vec![text("Sample-size justification, for a protocol:")]));
        blocks.push(Block::Paragraph(p));
    }
    Section { id: "sample-size", title: "The sample size".into(), blocks }
}

/// The sample-size justification in plain sentences, with every element a
/// reviewer looks for (CONSORT 2010 statement, item 7a): the target
/// difference and its source, the spread assumed for a continuous outcome,
/// the test and its sidedness, α and β (power), the n per group, the
/// dropout allowance and the number to enrol. None when no n is conclusive.
pub fn justification(req: &Request, ans: &Answer) -> Option<Vec<Inline>> {
    let design = &ans.design;
    let entry = design.family.entry();
    let g = ans.sample_size.youden?;
    let at = ans.sample_size.at_youden.as_ref()?;
    let u = unit_of(design.family, &req.context.unit);
    let (theta0, theta1) = design.effect.thetas();
    let source = if req.context.planning_source.is_empty() { String::new() } else { format!(" (source: {})", req.context.planning_source) };
    let mut s = format!(
        "The sample size was planned for a {} {}{}. It tests H0: {} = {} against the smallest effect worth finding, {} = {}{source}",
        sided(design.alternative),
        entry.test,
        entry.approximation.map_or(String::new(), |a| format!(" ({a})")),
        entry.parameter,
        with_unit(theta0, &u),
        entry.parameter,
        with_unit(theta1, &u),
    );
    let spreads: Vec<String> = entry
        .design
        .iter()
        .filter(|f| f.key.starts_with("sigma"))
        .filter_map(|f| {
            let v = match (f.key, design.effect) {
                ("sigma", Effect::Mean { sigma, .. } | Effect::CrossVal { sigma, .. }) => sigma,
                ("sigma1", Effect::Welch { sigma1, .. }) => sigma1,
                ("sigma2", Effect::Welch { sigma2, .. }) => sigma2,
                _ => return None,
            };
            let words = f.needed.replace(" (σ)", "").replace(" (σ1)", "").replace(" (σ2)", "").replacen("the planning ", "a ", 1);
            Some(format!("{words} of {}", with_unit(v, &u)))
        })
        .collect();
    if !spreads.is_empty() {
        s.push_str(&format!(", assuming {}", spreads.join(" and ")));
    }
    if let Effect::CrossVal { rho, .. } = design.effect {
        let folds = 1.0 / rho + 1.0;
        let k = if (folds - folds.round()).abs() < 1e-9 { format!(", as in {}-fold cross-validation", folds.round()) } else { String::new() };
        s.push_str(&format!(" and {} test items per training item in each split{k}", crate::engine::evaluate::sig3(rho)));
    }
    s.push_str(&format!(
        ". Limits of α = {} for the type I error and β = {} for the type II error (power {}) were set in advance; ",
        limit(design.alpha_max),
        limit(design.beta_max),
        limit(1.0 - design.beta_max),
    ));
    s.push_str(&format!(
        "the smallest sample that keeps both within them is n = {}, where the threshold minimising the total error gives α* = {} and β* = {} (power {}).",
        sizes(g.n1, g.n2),
        prob(at.alpha),
        prob(at.beta),
        prob(at.power)
    ));
    if let Some(c) = ans.sample_size.conventional {
        s.push_str(&format!(" A conventional test at the same α and power would need n = {}.", sizes(c.n1, c.n2)));
    }
    if let Some(e) = &ans.enrolment {
        s.push_str(&format!(
            " Allowing for an expected dropout of {}, {} will be enrolled.",
            apa::percent(e.dropout),
            match e.enrol.n2 {
                Some(n2) => format!("{} and {} participants ({} in all)", e.enrol.n1, n2, e.enrol.n_total),
                None => format!("{} participants", e.enrol.n1),
            }
        ));
    } else {
        s.push_str(" No dropout allowance was stated.");
    }
    Some(vec![text(s)])
}

fn summary_rows(s: &Summary) -> Table {
    let head = ["group", "n", "mean", "SD"].map(String::from).to_vec();
    let f = |x: f64| short(x);
    let rows = match *s {
        Summary::OneGroup { n, mean, sd } => vec![vec!["sample".into(), f(n), f(mean), sd.map_or("—".into(), f)]],
        Summary::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 } => {
            vec![vec!["group 1".into(), f(n1), f(mean1), f(sd1)], vec!["group 2".into(), f(n2), f(mean2), f(sd2)]]
        }
        Summary::Proportion { successes, trials } => {
            return Table {
                caption: "Summary of the data".into(),
                head: ["group", "successes", "trials", "proportion"].map(String::from).to_vec(),
                rows: vec![vec!["sample".into(), f(successes), f(trials), f(successes / trials)]],
            };
        }
        Summary::TwoProportions { successes1, trials1, successes2, trials2 } => {
            return Table {
                caption: "Summary of the data".into(),
                head: ["group", "successes", "trials", "proportion"].map(String::from).to_vec(),
                rows: vec![
                    vec!["group 1".into(), f(successes1), f(trials1), f(successes1 / trials1)],
                    vec!["group 2".into(), f(successes2), f(trials2), f(successes2 / trials2)],
                ],
            };
        }
        Summary::Classifiers { both_right, only_first_right, only_second_right, both_wrong } => {
            return Table {
                caption: "The two classifiers on the same test items".into(),
                head: ["", "classifier 2 right", "classifier 2 wrong"].map(String::from).to_vec(),
                rows: vec![
                    vec!["classifier 1 right".into(), f(both_right), f(only_first_right)],
                    vec!["classifier 1 wrong".into(), f(only_second_right), f(both_wrong)],
                ],
            };
        }
    };
    Table { caption: "Summary of the data".into(), head, rows }
}

fn decision_section(req: &Request, ans: &Answer, unit: &str) -> Option<Section> {
    let d = ans.decision.as_ref()?;
    let card = decide_card(ans, unit)?;
    let at = &d.at_n;
    let u = unit_of(ans.design.family, unit);
    let outcome = match d.outcome {
        Outcome::RejectH0 => "reject H0",
        Outcome::DoNotRejectH0 => "do not reject H0",
        Outcome::Inconclusive => "inconclusive",
    };
    let mut p = vec![text(format!("Outcome: {outcome}. {} The observed {} was {} (", d.reading, ans.design.family.entry().estimate.trim_start_matches("the "), with_unit(d.estimate, &u)))];
    p.extend(apa::statistic(at.statistic, at.df, d.statistic));
    p.push(text(", "));
    p.extend(apa::p_value(d.conventional.p_value));
    if let Some(ci) = &d.interval {
        let places = apa::decimals_for(ci.high - ci.low);
        let why = match (req.interval_level, ans.design.alternative) {
            (Some(_), _) => "the level chosen".to_string(),
            (None, Alternative::TwoSided) => "the level 1 − α that matches the two-sided test".to_string(),
            (None, _) => "the level 1 − 2α whose bound matches the one-sided test".to_string(),
        };
        p.push(text(format!("; {}{u}, {why}", apa::interval(ci.level, ci.low, ci.high, places))));
    }
    if let Some(es) = &d.effect_size {
        p.push(text("; "));
        p.push(apa::symbol(es.symbol));
        p.push(text(format!(" = {}", apa::fixed(es.value, 2))));
    }
    p.push(text(format!(
        "). The conventional test at level α = {} {} H0.",
        limit(ans.design.alpha_max),
        if d.conventional.rejects_at_alpha_max { "rejects" } else { "does not reject" }
    )));
    // The card's rows already hold the interval, the effect size and why
    // either is missing; the paragraph above says why the level is what it is.
    let facts: Vec<(String, Vec<Inline>)> = card.rows.into_iter().map(|(k, v)| (k, vec![text(v)])).collect();
    let mut blocks = vec![Block::Paragraph(p), Block::Facts(facts)];
    if let Some(s) = &req.data {
        blocks.push(Block::Table(summary_rows(s)));
    }
    Some(Section { id: "decision", title: "The decision".into(), blocks })
}

/// The commands that reproduce a report's numbers from its design block.
pub const RUN_COMMAND: &str = "tern run design.json";
pub const SIMULATE_COMMAND: &str = "tern simulate design.json";

fn reproduce_section(value: &Value, stamp: &Stamp, simulated: bool) -> Section {
    let (words, commands) = if simulated {
        ("The commands that reproduce every number in this report (the second, the check by simulation):", format!("{RUN_COMMAND}\n{SIMULATE_COMMAND}"))
    } else {
        ("The command that reproduces every number in this report:", RUN_COMMAND.to_string())
    };
    let blocks = vec![
        Block::Paragraph(vec![text(stamp.line())]),
        Block::Paragraph(vec![text("The design as JSON (save it as design.json):")]),
        Block::Code { language: "json", text: reproducible_json(value) },
        Block::Paragraph(vec![text(words)]),
        Block::Code { language: "sh", text: commands },
    ];
    Section { id: "reproduce", title: "Reproduce these numbers".into(), blocks }
}

/// "Check by simulation": what was drawn (population, size, dropout,
/// replicates, seed), the chart of the realised error rates against the
/// limits and the model with its table, each outcome's share under H0 and
/// θ1 (the operating characteristics of the neutral zone, method.md §7b),
/// the engine's readings and how to reproduce it. Every figure is the
/// engine's `Simulation`, formatted.
fn simulation_section(value: &Value, sim: &Simulation) -> Result<Section, ReportError> {
    let view = realised_errors::prep(sim);
    let mut blocks = vec![Block::Paragraph(vec![text(format!(
        "The analytic α* and β* assume the model. To see what the planned design does with data from another population, \
         data sets were drawn under H0 and under the alternative θ1 and each was sent through the whole decision (the statistic \
         from the data, the threshold for its analysed size, inconclusive when the design there is not conclusive), beside the \
         conventional rule (reject H0 when p ≤ {}).",
        crate::engine::shown::Num(sim.alpha_max)
    ))])];
    let mut facts = vec![
        ("population".to_string(), vec![text(sim.population.clone())]),
        ("sample size (planned, analysed)".to_string(), vec![text(sizes(sim.n1, sim.n2))]),
    ];
    facts.push(match (sim.dropout, sim.enrol) {
        (Some(q), Some(e)) => (
            "dropout".to_string(),
            vec![text(format!(
                "{}: {} enrolled, each lost with probability {}, so the analysed size varies from one data set to the next",
                apa::percent(q),
                sizes(e.n1, e.n2),
                apa::percent(q)
            ))],
        ),
        _ => ("dropout".to_string(), vec![text("none: every data set has the planned size")]),
    });
    let drawn = if sim.replicates_done < sim.replicates {
        format!("{} of the {} planned (the check was stopped early)", sim.replicates_done, sim.replicates)
    } else {
        sim.replicates_done.to_string()
    };
    facts.push(("data sets drawn under each hypothesis".to_string(), vec![text(drawn)]));
    facts.push(("seed".to_string(), vec![text(sim.seed.to_string())]));
    blocks.push(Block::Facts(facts));
    let numbers = realised_errors::numbers(&view);
    blocks.push(Block::Figure {
        id: "simulation",
        title: "Realised error rates against your limits and the model".into(),
        svg: simulation_chart(&view)?,
        numbers: Table { caption: numbers.caption, head: numbers.head, rows: numbers.rows },
    });
    blocks.push(Block::Paragraph(vec![text(
        "How often each outcome occurs, under H0 and under θ1: the operating characteristics of the neutral zone. \
         Realised α is the share of H0 data sets rejected; realised β the share of θ1 data sets not rejected, inconclusive included.",
    )]));
    let shares = realised_errors::shares(&view);
    blocks.push(Block::Table(Table { caption: shares.caption, head: shares.head, rows: shares.rows }));
    blocks.push(Block::Paragraph(vec![text("What the figures say:")]));
    blocks.push(Block::List(sim.readings.clone()));
    let resample = value.get("simulation").and_then(|b| b.get("shape")).and_then(Value::as_str) == Some("resample");
    let again = if resample {
        format!("{SIMULATE_COMMAND} --data with the data file the values were resampled from")
    } else {
        SIMULATE_COMMAND.to_string()
    };
    blocks.push(Block::Paragraph(vec![text(format!(
        "Reproducible: {again}, on the design block below (its simulation block holds the shape, the replicates and the seed {}), \
         gives these numbers again, on any machine and on the page: the seed fixes every draw.",
        sim.seed
    ))]));
    Ok(Section { id: "simulation", title: "Check by simulation".into(), blocks })
}
