//! Decision from summary data: the observed statistic, the threshold for the
//! actual n, the three-way outcome with a plain sentence, and the
//! conventional figures (p-value, critical value, power) for reviewers.
//!
//! Rules (DEVELOPERS.md, "Decision from summary data"): inconclusive when
//! the design at the actual n is not conclusive; otherwise reject H0 when the
//! observed statistic lies in the rejection region of c*.

use super::design::{Design, Effect, Family};
use super::family::Shape;
use super::dist::{Continuous, Discrete};
use super::family::{Check, INTERVAL_LEVEL};
use super::interval::{EffectSize, Interval, check_level, confidence_interval, default_level, effect_size};
use super::evaluate::{EvaluateError, Evaluation, evaluate_observed, sig3};
use super::model::{Model, Observed, Sampling};
use super::threshold::{Alternative, distance_tolerance};
use serde::Serialize;

/// Summary data, as a user reads them off a report or a spreadsheet.
/// Serialised untagged, as the JSON contract's `data` object
/// (`{"n": 20, "mean": 5.1, "sd": 1.2}`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(untagged)]
pub enum Summary {
    /// One group of observations (or of paired differences). `sd` is not
    /// used by the z test (σ known) and required by the t tests.
    OneGroup {
        n: f64,
        mean: f64,
        #[serde(skip_serializing_if = "Option::is_none")]
        sd: Option<f64>,
    },
    TwoGroups { n1: f64, mean1: f64, sd1: f64, n2: f64, mean2: f64, sd2: f64 },
    Proportion { successes: f64, trials: f64 },
    TwoProportions { successes1: f64, trials1: f64, successes2: f64, trials2: f64 },
    /// Two classifiers' 2 × 2 table over the same items.
    Classifiers { both_right: f64, only_first_right: f64, only_second_right: f64, both_wrong: f64 },
}

impl Summary {
    /// Build the summary a family decides from out of its registry fields,
    /// given by name (without `data.`): a required field that is absent is
    /// `Missing`, named with its `data.` prefix.
    pub fn from_fields(family: Family, values: &[(&str, f64)]) -> Result<Summary, DecisionError> {
        let entry = family.entry();
        let get = |key: &str| values.iter().find(|(k, _)| *k == key).map(|(_, v)| *v);
        for f in entry.data.iter().filter(|f| f.required) {
            if get(f.key).is_none() {
                return Err(DecisionError::Missing { field: f.input, hint: f.hint });
            }
        }
        let v = |key: &str| get(key).unwrap_or(f64::NAN);
        Ok(match entry.shape {
            Shape::One | Shape::Paired => Summary::OneGroup { n: v("n"), mean: v("mean"), sd: get("sd") },
            Shape::TwoGroups => {
                Summary::TwoGroups { n1: v("n1"), mean1: v("mean1"), sd1: v("sd1"), n2: v("n2"), mean2: v("mean2"), sd2: v("sd2") }
            }
            Shape::Binary => Summary::Proportion { successes: v("successes"), trials: v("trials") },
            Shape::TwoGroupsBinary => {
                Summary::TwoProportions { successes1: v("successes1"), trials1: v("trials1"), successes2: v("successes2"), trials2: v("trials2") }
            }
            Shape::PairedBinary => Summary::Classifiers {
                both_right: v("both_right"),
                only_first_right: v("only_first_right"),
                only_second_right: v("only_second_right"),
                both_wrong: v("both_wrong"),
            },
        })
    }

    /// The figures by field name (without `data.`), as the JSON contract
    /// and the page's fields name them.
    pub fn fields(&self) -> Vec<(&'static str, f64)> {
        match *self {
            Summary::OneGroup { n, mean, sd } => {
                let mut v = vec![("n", n), ("mean", mean)];
                v.extend(sd.map(|s| ("sd", s)));
                v
            }
            Summary::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 } => {
                vec![("n1", n1), ("mean1", mean1), ("sd1", sd1), ("n2", n2), ("mean2", mean2), ("sd2", sd2)]
            }
            Summary::Proportion { successes, trials } => vec![("successes", successes), ("trials", trials)],
            Summary::TwoProportions { successes1, trials1, successes2, trials2 } => {
                vec![("successes1", successes1), ("trials1", trials1), ("successes2", successes2), ("trials2", trials2)]
            }
            Summary::Classifiers { both_right, only_first_right, only_second_right, both_wrong } => vec![
                ("both_right", both_right),
                ("only_first_right", only_first_right),
                ("only_second_right", only_second_right),
                ("both_wrong", both_wrong),
            ],
        }
    }
}

/// The three outcomes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Outcome {
    RejectH0,
    DoNotRejectH0,
    Inconclusive,
}

/// What a reviewer used to p-values expects to see.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ConventionalReading {
    pub p_value: f64,
    /// Would the conventional test at level α_max reject?
    pub rejects_at_alpha_max: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Decision {
    pub outcome: Outcome,
    /// One plain-language sentence.
    pub reading: String,
    /// The observed statistic (z, t, or the count X).
    pub statistic: f64,
    /// The observed estimate: a mean, a difference or a proportion.
    pub estimate: f64,
    /// The design at the actual sample size.
    pub at_n: Evaluation,
    pub conventional: ConventionalReading,
    /// The estimate's two-sided confidence interval (`interval`); its level
    /// follows α_max unless the request names one. None only when it is
    /// not a finite number, and `omitted` says why.
    pub interval: Option<Interval>,
    /// The family's standardised effect size (`interval::effect_size`);
    /// None only when undefined, and `omitted` says why.
    pub effect_size: Option<EffectSize>,
    /// Why `interval` or `effect_size` is None, one sentence each (empty
    /// when both are given).
    pub omitted: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DecisionError {
    #[error("{field} is {value_shown}, but must be {rule}", value_shown = crate::engine::shown::Num(*value))]
    Value { field: &'static str, value: f64, rule: &'static str },
    #[error("{field} is missing: {hint}")]
    Missing { field: &'static str, hint: &'static str },
    #[error("the data give {given}, but the family {family} needs {needs}")]
    WrongKind { given: &'static str, family: &'static str, needs: String },
    #[error("{0}")]
    Undefined(&'static str),
    #[error(transparent)]
    Evaluate(#[from] EvaluateError),
}

pub(super) fn count(field: &'static str, v: f64, min: f64) -> Result<u64, DecisionError> {
    if v.is_finite() && v.fract() == 0.0 && v >= min && v <= 1e7 {
        Ok(v as u64)
    } else {
        let rule = if min >= 2.0 { "a whole number from 2 to 10000000" } else { "a whole number from 1 to 10000000" };
        Err(DecisionError::Value { field, value: v, rule })
    }
}

pub(super) fn finite(field: &'static str, v: f64) -> Result<f64, DecisionError> {
    if v.is_finite() { Ok(v) } else { Err(DecisionError::Value { field, value: v, rule: "a finite number" }) }
}

pub(super) fn sd(field: &'static str, v: f64) -> Result<f64, DecisionError> {
    if v.is_finite() && v > 0.0 {
        Ok(v)
    } else {
        Err(DecisionError::Value { field, value: v, rule: "a finite number > 0 (with sd = 0 the t statistic is undefined)" })
    }
}

/// A count of successes: a whole number from 0 to the `n` trials.
pub(super) fn successes(field: &'static str, x: f64, n: u64) -> Result<u64, DecisionError> {
    if x.is_finite() && x.fract() == 0.0 && x >= 0.0 && x <= n as f64 {
        Ok(x as u64)
    } else {
        Err(DecisionError::Value { field, value: x, rule: "a whole number from 0 to the number of trials" })
    }
}

/// The refusal of data of another shape than the family decides from.
pub(super) fn wrong_kind(family: Family, data: &Summary) -> DecisionError {
    DecisionError::WrongKind { given: kind(data), family: family.id(), needs: family.entry().data_keys() }
}

fn kind(s: &Summary) -> &'static str {
    match s {
        Summary::OneGroup { .. } => "one group (n, mean, sd)",
        Summary::TwoGroups { .. } => "two groups (n1, mean1, sd1, n2, mean2, sd2)",
        Summary::Proportion { .. } => "successes and trials",
        Summary::TwoProportions { .. } => "successes and trials per group",
        Summary::Classifiers { .. } => "the four cells of two classifiers' table",
    }
}

/// Two classifiers' table, checked: (both right, only 1 right = b, only 2
/// right = c, both wrong), each a whole number from 0, n = their sum ≥ 1.
pub(super) fn classifier_cells(both_right: f64, b: f64, c: f64, both_wrong: f64) -> Result<[u64; 4], DecisionError> {
    let cell = |field: &'static str, v: f64| -> Result<u64, DecisionError> {
        if v.is_finite() && v.fract() == 0.0 && (0.0..=1e7).contains(&v) {
            Ok(v as u64)
        } else {
            Err(DecisionError::Value { field, value: v, rule: "a whole number from 0 to 10000000" })
        }
    };
    let cells = [
        cell("data.both_right", both_right)?,
        cell("data.only_first_right", b)?,
        cell("data.only_second_right", c)?,
        cell("data.both_wrong", both_wrong)?,
    ];
    let n: u64 = cells.iter().sum();
    if n == 0 {
        return Err(DecisionError::Undefined("the four cells are all 0: there is no test item to decide from"));
    }
    if n > 10_000_000 {
        return Err(DecisionError::Value { field: "data.both_wrong", value: both_wrong, rule: "such that the four cells add up to at most 10000000 items" });
    }
    Ok(cells)
}

/// What a decision reads off summary data: the statistic, the estimate,
/// the group sizes and the observed spreads the model takes.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Observation {
    /// The observed statistic (z, t, or the count X).
    pub statistic: f64,
    /// A mean, a difference or a proportion.
    pub estimate: f64,
    pub n1: u64,
    pub n2: Option<u64>,
    pub observed: Observed,
}

/// The statistic and the rest of an [`Observation`] from summary data, by
/// the family's definition (DEVELOPERS.md, "Families"); the one place a
/// statistic is computed from data (decisions and the simulation check).
pub fn observe(design: &Design, data: &Summary) -> Result<Observation, DecisionError> {
    let (theta0, _) = design.effect.thetas();
    let family = design.family;
    let wrong = || wrong_kind(family, data);
    // Statistic, estimate, group sizes and observed spreads.
    let (statistic, estimate, n1, n2, observed) = match (family, *data) {
        (Family::MeanZ, Summary::OneGroup { n, mean, .. }) => {
            let n = count("data.n", n, 1.0)?;
            let mean = finite("data.mean", mean)?;
            let Effect::Mean { sigma, .. } = design.effect else { return Err(wrong()) };
            // A standardised design (d) means θ0 = 0 and σ = 1: the data
            // are then read in units of σ (DEVELOPERS.md, "Families").
            ((mean - theta0) / (sigma / (n as f64).sqrt()), mean, n, None, Observed::default())
        }
        (Family::MeanT | Family::PairedT, Summary::OneGroup { n, mean, sd: s }) => {
            let n = count("data.n", n, 2.0)?;
            let mean = finite("data.mean", mean)?;
            let s = sd("data.sd", s.ok_or(DecisionError::Missing { field: "data.sd", hint: "the t test needs the sample standard deviation" })?)?;
            let obs = Observed { sd1: Some(s), ..Observed::default() };
            ((mean - theta0) / (s / (n as f64).sqrt()), mean, n, None, obs)
        }
        (Family::TwoLearnersCv, Summary::OneGroup { n, mean, sd: s }) => {
            let n = count("data.n", n, 2.0)?;
            let mean = finite("data.mean", mean)?;
            let s = sd("data.sd", s.ok_or(DecisionError::Missing { field: "data.sd", hint: "the corrected t needs the SD of the per-split differences" })?)?;
            let Effect::CrossVal { rho, .. } = design.effect else { return Err(wrong()) };
            let obs = Observed { sd1: Some(s), ..Observed::default() };
            ((mean - theta0) / (s * (1.0 / n as f64 + rho).sqrt()), mean, n, None, obs)
        }
        (Family::TwoMeansPooled | Family::TwoMeansWelch, Summary::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 }) => {
            let (n1, n2) = (count("data.n1", n1, 2.0)?, count("data.n2", n2, 2.0)?);
            let (m1, m2) = (finite("data.mean1", mean1)?, finite("data.mean2", mean2)?);
            let (s1, s2) = (sd("data.sd1", sd1)?, sd("data.sd2", sd2)?);
            let (a, b) = (n1 as f64, n2 as f64);
            let diff = m1 - m2;
            let se = if family == Family::TwoMeansPooled {
                let sp2 = ((a - 1.0) * s1 * s1 + (b - 1.0) * s2 * s2) / (a + b - 2.0);
                (sp2 * (1.0 / a + 1.0 / b)).sqrt()
            } else {
                (s1 * s1 / a + s2 * s2 / b).sqrt()
            };
            let obs = Observed { sd1: Some(s1), sd2: Some(s2), ..Observed::default() };
            ((diff - theta0) / se, diff, n1, Some(n2), obs)
        }
        (Family::ProportionExact | Family::ProportionNormal, Summary::Proportion { successes: x, trials }) => {
            let n = count("data.trials", trials, 1.0)?;
            let x = successes("data.successes", x, n)? as f64;
            let p_hat = x / n as f64;
            let t = if family == Family::ProportionExact { x } else { (p_hat - theta0) / (theta0 * (1.0 - theta0) / n as f64).sqrt() };
            (t, p_hat, n, None, Observed::default())
        }
        (Family::TwoProportions, Summary::TwoProportions { successes1, trials1, successes2, trials2 }) => {
            let (n1, n2) = (count("data.trials1", trials1, 1.0)?, count("data.trials2", trials2, 1.0)?);
            let successes1 = successes("data.successes1", successes1, n1)? as f64;
            let successes2 = successes("data.successes2", successes2, n2)? as f64;
            let (a, b) = (n1 as f64, n2 as f64);
            let pooled = (successes1 + successes2) / (a + b);
            if pooled <= 0.0 || pooled >= 1.0 {
                return Err(DecisionError::Undefined(
                    "every observation in both groups has the same outcome, so the pooled standard error is 0 and the z statistic is undefined",
                ));
            }
            let se0 = (pooled * (1.0 - pooled) * (1.0 / a + 1.0 / b)).sqrt();
            let diff = successes1 / a - successes2 / b;
            (diff / se0, diff, n1, Some(n2), Observed { se0: Some(se0), ..Observed::default() })
        }
        (Family::TwoClassifiers, Summary::Classifiers { both_right, only_first_right, only_second_right, both_wrong }) => {
            // Conditional on the m = b + c discordant items (DEVELOPERS.md,
            // "Comparing models"): X = b; the estimate is (b − c)/n.
            let cells = classifier_cells(both_right, only_first_right, only_second_right, both_wrong)?;
            let [_, b, c, _] = cells;
            let n: u64 = cells.iter().sum();
            (b as f64, (b as f64 - c as f64) / n as f64, b + c, None, Observed { items: Some(n), ..Observed::default() })
        }
        _ => return Err(wrong()),
    };
    Ok(Observation { statistic, estimate, n1, n2, observed })
}

/// The p-value of the statistic `t` under the model's H0: one tail in the
/// alternative's direction; two-sided, both tails at the same distance
/// from the centre (for counts, every count at least as far from n·p0,
/// within `threshold::distance_tolerance`). In [0, 1].
pub fn p_value(model: &Model, alternative: Alternative, t: f64) -> f64 {
    let centre = model.setup.centre;
    let p = match &model.sampling {
        Sampling::Continuous { h0, .. } => match alternative {
            Alternative::Greater => h0.sf(t),
            Alternative::Less => h0.cdf(t),
            Alternative::TwoSided => {
                let a = (t - centre).abs();
                (h0.cdf(centre - a) + h0.sf(centre + a)).min(1.0)
            }
        },
        Sampling::Discrete { h0, .. } => {
            let x = t as u64;
            match alternative {
                Alternative::Greater => if x == 0 { 1.0 } else { h0.sf(x - 1) },
                Alternative::Less => h0.cdf(x),
                Alternative::TwoSided => {
                    let a = (t - centre).abs();
                    let tol = distance_tolerance(centre);
                    let low = (centre - a + tol).floor();
                    let high = (centre + a - tol).ceil();
                    let lower = if low >= 0.0 { h0.cdf(low as u64) } else { 0.0 };
                    let upper = if high <= 0.0 { 1.0 } else { h0.sf(high as u64 - 1) };
                    (lower + upper).min(1.0)
                }
            }
        }
    };
    // Tail sums may round a hair above 1.
    p.clamp(0.0, 1.0)
}

/// Decide from summary data, with the confidence interval at the level
/// that follows α_max (`interval::default_level`).
pub fn decide(design: &Design, data: &Summary) -> Result<Decision, DecisionError> {
    decide_at_level(design, data, None)
}

/// [`decide`] with the confidence interval at `level` (in (0, 1); None:
/// the level that follows α_max). A level outside (0, 1) is refused,
/// named `interval_level`.
pub fn decide_at_level(design: &Design, data: &Summary, level: Option<f64>) -> Result<Decision, DecisionError> {
    let level = match level {
        Some(l) => Some(check_level(l).map_err(|_| DecisionError::Value { field: INTERVAL_LEVEL.key, value: l, rule: Check::OpenUnit.rule() })?),
        None => None,
    };
    let Observation { statistic: t, estimate, n1, n2, observed } = observe(design, data)?;
    let at_n = evaluate_observed(design, n1, n2, &observed)?;
    let in_region = at_n.cut.rejects(t);
    let p_value = p_value(&at_n.model, design.alternative, t);
    let outcome = if !at_n.conclusive {
        Outcome::Inconclusive
    } else if in_region {
        Outcome::RejectH0
    } else {
        Outcome::DoNotRejectH0
    };
    let reading = reading(design, data, &at_n, outcome, t, estimate);
    let mut omitted = Vec::new();
    let interval = level
        .map_or_else(|| default_level(design.alternative, design.alpha_max), Ok)
        .and_then(|l| confidence_interval(design, data, l))
        .map_err(|e| omitted.push(format!("No confidence interval: {e}.")))
        .ok();
    let effect_size = effect_size(design, data).map_err(|e| omitted.push(format!("No standardised effect size: {e}."))).ok();
    Ok(Decision {
        outcome,
        reading,
        statistic: t,
        estimate,
        conventional: ConventionalReading { p_value, rejects_at_alpha_max: p_value <= design.alpha_max },
        at_n,
        interval,
        effect_size,
        omitted,
    })
}

fn reading(design: &Design, data: &Summary, at_n: &Evaluation, outcome: Outcome, t: f64, estimate: f64) -> String {
    let name = at_n.statistic;
    let n = match (at_n.n2, data) {
        (Some(n2), _) => format!("n1 = {}, n2 = {}", at_n.n1, n2),
        (None, Summary::Classifiers { both_right, only_first_right, only_second_right, both_wrong }) => format!(
            "m = {} items where exactly one classifier is right (of n = {})",
            at_n.n1,
            sig3(both_right + only_first_right + only_second_right + both_wrong)
        ),
        (None, _) => format!("n = {}", at_n.n1),
    };
    let observed = format!("the observed {name} = {} (estimate {})", sig3(t), sig3(estimate));
    match outcome {
        Outcome::Inconclusive => format!(
            "Inconclusive: with {n} this design cannot keep both error rates within their limits (α* = {}, β* = {}; limits {} and {}), so the data cannot settle the question; {observed} is reported for information only.",
            sig3(at_n.alpha),
            sig3(at_n.beta),
            sig3(design.alpha_max),
            sig3(design.beta_max)
        ),
        Outcome::RejectH0 => format!(
            "Reject H0: {observed} lies in the rejection region of the threshold that minimises the total error; with {n} both error rates are within their limits (α* = {}, β* = {}).",
            sig3(at_n.alpha),
            sig3(at_n.beta)
        ),
        Outcome::DoNotRejectH0 => format!(
            "Do not reject H0: {observed} does not reach the threshold that minimises the total error; with {n} both error rates are within their limits (α* = {}, β* = {}), so an effect as large as the one planned for would probably have been detected.",
            sig3(at_n.alpha),
            sig3(at_n.beta)
        ),
    }
}
