//! A design at one sample size: the Youden threshold on both scales, α*, β*,
//! J, the verdict, and the conventional figures beside them.
//!
//! Architecture invariant: the verdict is decided here and only here:
//! conclusive iff α* ≤ α_max and β* ≤ β_max.

use super::conventional::{continuous_level, discrete_level};
use super::design::Design;
use super::model::{Model, ModelError, Observed, Sampling};
use super::threshold::{Alternative, ContinuousCut, DiscreteCut, Errors, ThresholdError, solve_continuous, solve_discrete};
use super::discordant::Mixture;
use super::dist::Discrete;
use super::sample_size::WORK_PER_SOLVE;
use serde::Serialize;

/// A rejection region as the output shows it: on the statistic's scale and
/// on the estimate's scale (a mean, a difference, a proportion).
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "reject_when", rename_all = "snake_case")]
pub enum Rule {
    /// Reject when T > statistic (estimate > estimate).
    Above { statistic: f64, estimate: f64 },
    /// Reject when T < statistic.
    Below { statistic: f64, estimate: f64 },
    /// Reject when |T − centre| > half_width, i.e. T < low or T > high.
    Outside { centre: f64, half_width: f64, statistic_low: f64, statistic_high: f64, estimate_low: f64, estimate_high: f64 },
    /// Reject when X ≥ k.
    AtLeast { k: i64, estimate: f64 },
    /// Reject when X ≤ k.
    AtMost { k: i64, estimate: f64 },
    /// Reject when X ≤ k_low or X ≥ k_high (a side is null when empty).
    OutsideCounts { centre: f64, half_width: f64, k_low: Option<i64>, k_high: Option<i64> },
    /// The optimum never rejects H0 (the ends beat every finite threshold).
    Never,
    /// The optimum always rejects H0.
    Always,
}

impl Rule {
    fn continuous(cut: ContinuousCut, m: &Model) -> Rule {
        let est = |t: f64| m.offset + m.slope * t;
        match cut {
            ContinuousCut::Above(c) | ContinuousCut::Below(c) if c.is_infinite() => {
                let never = (c > 0.0) == matches!(cut, ContinuousCut::Above(_));
                if never { Rule::Never } else { Rule::Always }
            }
            ContinuousCut::Above(c) => Rule::Above { statistic: c, estimate: est(c) },
            ContinuousCut::Below(c) => Rule::Below { statistic: c, estimate: est(c) },
            ContinuousCut::Outside { half_width, .. } if half_width.is_infinite() => Rule::Never,
            ContinuousCut::Outside { half_width, .. } if half_width <= 0.0 => Rule::Always,
            ContinuousCut::Outside { centre, half_width } => Rule::Outside {
                centre,
                half_width,
                statistic_low: centre - half_width,
                statistic_high: centre + half_width,
                estimate_low: est(centre - half_width),
                estimate_high: est(centre + half_width),
            },
        }
    }

    fn discrete(cut: DiscreteCut, m: &Model) -> Rule {
        let est = |k: i64| m.offset + m.slope * k as f64;
        match cut {
            // Compared as i128 so that a negative k cannot wrap to "never".
            DiscreteCut::AtLeast(k) if k <= 0 => Rule::Always,
            DiscreteCut::AtLeast(k) if i128::from(k) > i128::from(m.n1) => Rule::Never,
            DiscreteCut::AtLeast(k) => Rule::AtLeast { k, estimate: est(k) },
            DiscreteCut::AtMost(k) if k < 0 => Rule::Never,
            DiscreteCut::AtMost(k) if i128::from(k) >= i128::from(m.n1) => Rule::Always,
            DiscreteCut::AtMost(k) => Rule::AtMost { k, estimate: est(k) },
            DiscreteCut::Outside { half_width, .. } if half_width < 0.0 => Rule::Always,
            DiscreteCut::Outside { low: None, high: None, .. } => Rule::Never,
            DiscreteCut::Outside { centre, half_width, low, high } => Rule::OutsideCounts { centre, half_width, k_low: low, k_high: high },
        }
    }
}

/// The conventional test at level α_max.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Conventional {
    pub rule: Rule,
    /// The attained type I error rate (exactly α_max for continuous T).
    pub alpha: f64,
    /// Power 1 − β at θ1.
    pub power: f64,
}

/// The design evaluated at one sample size.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Evaluation {
    pub n1: u64,
    pub n2: Option<u64>,
    pub n_total: u64,
    pub statistic: &'static str,
    pub df: Option<f64>,
    pub noncentrality: Option<f64>,
    /// The Youden (or cost-weighted) threshold c*.
    pub rule: Rule,
    pub alpha: f64,
    pub beta: f64,
    pub power: f64,
    pub total_error: f64,
    pub youden_j: f64,
    pub weight: f64,
    /// Other thresholds with the same weighted error (discrete only); the
    /// pick is the one with the smallest α.
    pub ties: Vec<Rule>,
    pub conclusive: bool,
    /// One plain sentence on the verdict.
    pub verdict: String,
    pub conventional: Conventional,
    pub approximation: Option<&'static str>,
    /// Two classifiers: the rates above are averaged over the number of
    /// discordant items; the rule shown is the one for their expected
    /// number. None for every other family.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub discordant: Option<DiscordantAt>,
    #[serde(skip)]
    pub model: Model,
    #[serde(skip)]
    pub cut: Cut,
}

/// Two classifiers at n items: the conditional rule for the expected
/// number of discordant items, beside the averaged rates.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DiscordantAt {
    /// n·ψ, the expected number of discordant items.
    pub expected: f64,
    /// The m whose rule is shown: n·ψ rounded, at least 1.
    pub m: u64,
    /// The conditional α_m and β_m of that rule.
    pub alpha_m: f64,
    pub beta_m: f64,
}

/// The solver's own cut, kept for the decision and the charts.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Cut {
    Continuous(ContinuousCut),
    Discrete(DiscreteCut),
}

impl Cut {
    /// Does the region reject H0 at the statistic t (a count for discrete
    /// cuts)? The one rejection rule: [`ContinuousCut::rejects`] and
    /// [`DiscreteCut::rejects`].
    pub fn rejects(&self, t: f64) -> bool {
        match self {
            Cut::Continuous(c) => c.rejects(t),
            Cut::Discrete(c) => c.rejects(t),
        }
    }
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum EvaluateError {
    #[error(transparent)]
    Model(#[from] ModelError),
    #[error("the threshold could not be found: {0}")]
    Threshold(#[from] ThresholdError),
    #[error("a distribution could not be evaluated: {0}")]
    Dist(#[from] super::dist::DistError),
    /// A sample-size search given a quick budget stopped early, where its
    /// caller needed its end (`sample_size::search`).
    #[error("the sample-size search stopped before its end")]
    Unfinished,
}

/// Solve the threshold of a model: α*, β* and the cut.
pub fn solve(model: &Model) -> Result<(Cut, Errors, Vec<DiscreteCut>), ThresholdError> {
    solve_with_work(model).map(|(c, e, t, _)| (c, e, t))
}

/// [`solve`] with the work a discrete solve took (counts walked, see
/// `threshold::DiscreteSolution::work`; 0 for continuous statistics).
pub fn solve_with_work(model: &Model) -> Result<(Cut, Errors, Vec<DiscreteCut>, u64), ThresholdError> {
    Ok(match &model.sampling {
        Sampling::Continuous { h0, h1 } => {
            let s = solve_continuous(h0, h1, model.setup)?;
            (Cut::Continuous(s.cut), s.errors, Vec::new(), 0)
        }
        // No trials (two classifiers with no discordant item): the data
        // hold no evidence, so H0 is never rejected (DEVELOPERS.md,
        // "Comparing models").
        Sampling::Discrete { h0, .. } if h0.support_max() == 0 => (Cut::Discrete(never(model.setup.alternative)), Errors { alpha: 0.0, beta: 1.0 }, Vec::new(), 0),
        Sampling::Discrete { h0, h1 } => {
            let s = solve_discrete(h0, h1, model.setup)?;
            (Cut::Discrete(s.cut), s.errors, s.ties, s.work)
        }
    })
}

/// The count region that never rejects, on a support of {0}.
fn never(alternative: Alternative) -> DiscreteCut {
    match alternative {
        Alternative::Greater => DiscreteCut::AtLeast(1),
        Alternative::Less => DiscreteCut::AtMost(-1),
        Alternative::TwoSided => DiscreteCut::Outside { centre: 0.0, half_width: 0.0, low: None, high: None },
    }
}

/// α*, β* of a design with planning values, one n after another: two
/// classifiers average over the number of discordant items (its
/// thresholds kept between calls, `discordant::Mixture`); every other
/// family solves its model at n.
pub struct Planned {
    design: Design,
    mixture: Option<Mixture>,
    /// Work so far in threshold solves (see `sample_size::WORK_PER_SOLVE`).
    pub work: usize,
}

impl Planned {
    pub fn new(design: &Design) -> Planned {
        Planned { design: *design, mixture: Mixture::new(design), work: 0 }
    }

    pub fn at(&mut self, n: u64) -> Result<Errors, EvaluateError> {
        match &mut self.mixture {
            Some(m) => {
                let e = m.at(n, false)?.youden;
                self.work = m.work;
                Ok(e)
            }
            None => {
                let (_, e, _, work) = solve_with_work(&self.design.model(n)?)?;
                self.work += 1 + usize::try_from(work / WORK_PER_SOLVE).unwrap_or(usize::MAX / 4);
                Ok(e)
            }
        }
    }
}

/// Is a design conclusive at these errors?
pub fn within(design: &Design, e: &Errors) -> bool {
    e.alpha <= design.alpha_max && e.beta <= design.beta_max
}

/// Evaluate the design at n1 with planning values. Two classifiers: the
/// rates averaged over the number of discordant items, the rule for their
/// expected number (`discordant`).
pub fn evaluate(design: &Design, n1: u64) -> Result<Evaluation, EvaluateError> {
    let model = design.model(n1)?;
    let mut at = evaluate_model(design, model)?;
    if let (Some(mut mixture), Some((psi, _))) = (Mixture::new(design), design.effect.discordant()) {
        let avg = mixture.at(n1, true)?;
        at.discordant = Some(DiscordantAt { expected: n1 as f64 * psi, m: at.n1, alpha_m: at.alpha, beta_m: at.beta });
        let e = avg.youden;
        at.n1 = n1;
        at.n_total = n1;
        at.alpha = e.alpha;
        at.beta = e.beta;
        at.power = 1.0 - e.beta;
        at.total_error = e.alpha + e.beta;
        at.youden_j = 1.0 - e.alpha - e.beta;
        at.conclusive = within(design, &e);
        at.verdict = verdict_sentence(design, &e, at.conclusive);
        at.conventional.alpha = avg.conventional.alpha;
        at.conventional.power = 1.0 - avg.conventional.beta;
    }
    Ok(at)
}

/// Evaluate at given group sizes with observed SDs (a decision).
pub fn evaluate_observed(design: &Design, n1: u64, n2: Option<u64>, obs: &Observed) -> Result<Evaluation, EvaluateError> {
    let model = design.model_observed(n1, n2, obs)?;
    evaluate_model(design, model)
}

/// The threshold and the verdict at given group sizes with observed
/// values, without the words and the conventional figures: a decision's
/// steps for the simulation check, which repeats them per data set.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Judged {
    pub model: Model,
    pub cut: Cut,
    pub errors: Errors,
    pub conclusive: bool,
}

pub fn judge_observed(design: &Design, n1: u64, n2: Option<u64>, obs: &Observed) -> Result<Judged, EvaluateError> {
    let model = design.model_observed(n1, n2, obs)?;
    let (cut, errors, _) = solve(&model)?;
    Ok(Judged { model, cut, errors, conclusive: within(design, &errors) })
}

fn evaluate_model(design: &Design, model: Model) -> Result<Evaluation, EvaluateError> {
    let (cut, errors, ties) = solve(&model)?;
    let (rule, ties) = match cut {
        Cut::Continuous(c) => (Rule::continuous(c, &model), Vec::new()),
        Cut::Discrete(c) => {
            let ties = if ties.len() > 1 { ties.iter().map(|t| Rule::discrete(*t, &model)).collect() } else { Vec::new() };
            (Rule::discrete(c, &model), ties)
        }
    };
    let centre = model.setup.centre;
    let conventional = match &model.sampling {
        Sampling::Continuous { h0, h1 } => {
            let (c, e) = continuous_level(h0, h1, design.alternative, centre, design.alpha_max)?;
            Conventional { rule: Rule::continuous(c, &model), alpha: e.alpha, power: 1.0 - e.beta }
        }
        Sampling::Discrete { h0, .. } if h0.support_max() == 0 => {
            Conventional { rule: Rule::discrete(never(design.alternative), &model), alpha: 0.0, power: 0.0 }
        }
        Sampling::Discrete { h0, h1 } => {
            let (c, e) = discrete_level(h0, h1, design.alternative, centre, design.alpha_max)?;
            Conventional { rule: Rule::discrete(c, &model), alpha: e.alpha, power: 1.0 - e.beta }
        }
    };
    let conclusive = within(design, &errors);
    let verdict = verdict_sentence(design, &errors, conclusive);
    Ok(Evaluation {
        n1: model.n1,
        n2: model.n2,
        n_total: model.n1 + model.n2.unwrap_or(0),
        statistic: model.statistic,
        df: model.df,
        noncentrality: model.ncp,
        rule,
        alpha: errors.alpha,
        beta: errors.beta,
        power: 1.0 - errors.beta,
        total_error: errors.alpha + errors.beta,
        youden_j: 1.0 - errors.alpha - errors.beta,
        weight: design.weight,
        ties,
        conclusive,
        verdict,
        conventional,
        approximation: model.approximation,
        discordant: None,
        model,
        cut,
    })
}

/// Round for prose: three significant digits, trailing zeros dropped,
/// whole numbers (counts) as they are.
pub fn sig3(x: f64) -> String {
    if !x.is_finite() {
        return format!("{x}");
    }
    if x.fract() == 0.0 && x.abs() < 1e15 {
        return format!("{}", x as i64);
    }
    if x.abs() < 1e-4 {
        return format!("{x:.2e}");
    }
    let digits = (2 - x.abs().log10().floor() as i32).max(0) as usize;
    let s = format!("{x:.digits$}");
    if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
}

fn verdict_sentence(design: &Design, e: &Errors, conclusive: bool) -> String {
    let a = format!("α* = {} (limit {})", sig3(e.alpha), sig3(design.alpha_max));
    let b = format!("β* = {} (limit {})", sig3(e.beta), sig3(design.beta_max));
    if conclusive {
        format!("Conclusive: at the threshold both errors are within the limits, {a} and {b}.")
    } else {
        let mut over = Vec::new();
        if e.alpha > design.alpha_max {
            over.push(a);
        }
        if e.beta > design.beta_max {
            over.push(b);
        }
        format!(
            "Inconclusive: this design cannot tell the hypotheses apart well enough; {} above its limit.",
            over.join(" and ") + if over.len() > 1 { " are" } else { " is" }
        )
    }
}
