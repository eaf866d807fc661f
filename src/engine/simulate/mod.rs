//! The simulation check: draw data sets under H0 and under θ1 from a
//! population shape, send each through the whole decision path (the
//! statistic from the data, the threshold for the realised sizes,
//! inconclusive when the design there is not conclusive) and beside it
//! the conventional rule (reject when p ≤ α_max), and count the outcomes.
//!
//! Replicates come in fixed blocks of [`BLOCK`] under each hypothesis;
//! block b under H0 draws from stream 2b, under θ1 from stream 2b + 1
//! ([`stream`]), so the counts are the same however the blocks are
//! shared out (one thread, the page's workers) and on every target.
//!
//! Invariant: no I/O; memory bounded by the counts, a sample of
//! [`SAMPLE`] statistics per hypothesis and a cache of at most
//! [`CACHE_MAX`] thresholds; a run's random draws (and threshold solves,
//! priced in draws) are bounded by [`DRAW_BUDGET`], refused up front with
//! a message; the statistic, threshold, verdict and p-value are the
//! decision's own functions (`decision::observe`, `evaluate::judge_observed`,
//! `decision::p_value`).

pub mod shape;
mod words;

use super::context::enrolment;
use super::decision::{Outcome, Summary, observe, p_value};
use super::design::{Design, Effect, Family};
use super::evaluate::{EvaluateError, judge_observed};
use super::evaluate::{Cut, evaluate};
use super::conventional::continuous_level;
use super::model::{Model, Observed, Sampling};
use super::threshold::ContinuousCut;
use super::sample_size::GroupSizes;
use rand::SeedableRng;
use rand_distr::{Binomial, Distribution};
use rand_xoshiro::{SplitMix64, Xoshiro256PlusPlus};
use serde::{Deserialize, Serialize};
use shape::{Kind, Population, ShapeSpec};
use std::collections::HashMap;
use std::ops::Range;

/// Replicates per block under each hypothesis.
pub const BLOCK: u64 = 500;
/// Statistics kept per hypothesis for a histogram: those of the first
/// replicates, in replicate order.
pub const SAMPLE: usize = 2_000;
/// The most data sets per hypothesis one run draws.
pub const REPLICATES_MAX: u64 = 1_000_000;
/// The largest seed: 2⁵³ − 1, so that JSON and the page's number field
/// carry it exactly.
pub const SEED_MAX: u64 = (1 << 53) - 1;
/// The most random draws one run makes (about 3 s natively, one thread).
pub const DRAW_BUDGET: u64 = 1_000_000_000;
/// A threshold solved anew for one data set (Welch's observed df), priced
/// in draws for the budget.
const SOLVE_COST: u64 = 10_000;
/// The most thresholds kept for reuse (by realised sizes and the observed
/// values the sampling distributions take).
pub const CACHE_MAX: usize = 4_096;

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SimulationError {
    #[error("{field} is {shown}, but must be {rule}")]
    Value { field: String, shown: String, rule: String },
    #[error("{field} is missing: {hint}")]
    Missing { field: String, hint: String },
    #[error("{field} is not a field here: {known}")]
    Unknown { field: String, known: String },
    #[error("{0}")]
    Shape(String),
    #[error(
        "the check would make about {draws_shown} random draws, more than the {budget_shown} one run may make: lower simulation.replicates (now {replicates}) or the sample size",
        draws_shown = super::shown::Num(*draws as f64),
        budget_shown = super::shown::Num(DRAW_BUDGET as f64)
    )]
    Budget { draws: u64, replicates: u64 },
    #[error(transparent)]
    Evaluate(#[from] EvaluateError),
}

/// The `simulation` block as a request states it (numbers unchecked).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Spec {
    pub shape: ShapeSpec,
    pub replicates: Option<f64>,
    pub seed: Option<f64>,
}

/// A checked simulation: the design at a size, the population and the
/// run's size and seed.
#[derive(Debug, Clone, PartialEq)]
pub struct Plan {
    pub design: Design,
    /// The planned (analysed) size of group 1; group 2's follows the ratio.
    pub n1: u64,
    pub n2: Option<u64>,
    /// With a dropout share: the number enrolled per group, of whom each
    /// is analysed with probability 1 − dropout.
    pub dropout: Option<f64>,
    pub enrol: Option<GroupSizes>,
    pub population: Population,
    pub replicates: u64,
    pub seed: u64,
}

fn whole(field: &str, v: Option<f64>, max: u64, hint: &str) -> Result<u64, SimulationError> {
    let v = v.ok_or_else(|| SimulationError::Missing { field: field.into(), hint: hint.into() })?;
    if v.is_finite() && v.fract() == 0.0 && v >= 0.0 && v <= max as f64 {
        Ok(v as u64)
    } else {
        Err(SimulationError::Value { field: field.into(), shown: super::shown::Num(v).to_string(), rule: format!("a whole number from 0 to {max}") })
    }
}

impl Plan {
    /// Check a simulation of `design` at n1 (analysed, group 1) with an
    /// optional dropout share (already checked by the design's rule).
    pub fn new(design: Design, n1: u64, dropout: Option<f64>, spec: &Spec) -> Result<Plan, SimulationError> {
        let replicates = whole(
            "simulation.replicates",
            spec.replicates,
            REPLICATES_MAX,
            "how many data sets to draw under each hypothesis, such as 10000",
        )?;
        if replicates == 0 {
            return Err(SimulationError::Value {
                field: "simulation.replicates".into(),
                shown: "0".into(),
                rule: format!("a whole number from 1 to {REPLICATES_MAX}"),
            });
        }
        let seed = whole("simulation.seed", spec.seed, SEED_MAX, "any whole number; the same seed gives the same numbers")?;
        let kind = if design.family.entry().shape.binary() { Kind::Outcomes } else { Kind::Measurements };
        let groups = if design.family.two_groups() { 2 } else { 1 };
        let population = Population::new(&spec.shape, kind, groups)?;
        if design.family == Family::TwoClassifiers && population != Population::Bernoulli {
            return Err(SimulationError::Shape(
                "two classifiers' test items are drawn independently (each item's 2 × 2 cell from the planning shares): choose independent yes/no outcomes".into(),
            ));
        }
        let n2 = design.n2(n1);
        let planned = GroupSizes { n1, n2, n_total: n1 + n2.unwrap_or(0) };
        let enrol = dropout.filter(|q| *q > 0.0).map(|q| enrolment(planned, q));
        let drawn = enrol.unwrap_or(planned);
        let per_set = population.draws(drawn.n1)
            + drawn.n2.map_or(0, |m| population.draws(m))
            + if enrol.is_some() { 2 } else { 0 }
            + if design.family == Family::TwoMeansWelch { SOLVE_COST } else { 0 };
        let draws = per_set.saturating_mul(replicates).saturating_mul(2);
        if draws > DRAW_BUDGET {
            return Err(SimulationError::Budget { draws, replicates });
        }
        Ok(Plan { design, n1, n2, dropout: enrol.and(dropout), enrol, population, replicates, seed })
    }

    /// The number of blocks of [`BLOCK`] replicates.
    pub fn blocks(&self) -> u64 {
        self.replicates.div_ceil(BLOCK)
    }

    /// Run every block.
    pub fn run(&self) -> Tally {
        self.run_blocks(0..self.blocks())
    }

    /// Run the blocks in `range` (clipped to the plan's blocks), in order.
    pub fn run_blocks(&self, range: Range<u64>) -> Tally {
        let mut runner = Runner::new(self);
        let mut tally = Tally::default();
        for b in range.start..range.end.min(self.blocks()) {
            let first = b * BLOCK;
            let count = BLOCK.min(self.replicates - first);
            for (h, hypothesis) in [Hypothesis::Null, Hypothesis::Alternative].into_iter().enumerate() {
                let mut rng = stream(self.seed, 2 * b + h as u64);
                let truth = self.truth(hypothesis);
                for r in first..first + count {
                    let one = runner.one(&mut rng, &truth);
                    let (counts, sample) = if h == 0 { (&mut tally.h0, &mut tally.sample_h0) } else { (&mut tally.h1, &mut tally.sample_h1) };
                    counts.add(one);
                    if r < SAMPLE as u64
                        && let Some(t) = one.statistic.filter(|t| t.is_finite())
                    {
                        sample.push(t);
                    }
                }
            }
        }
        tally
    }

    /// The population's parameters under a hypothesis: each group's mean
    /// and SD (measurements) or rate (outcomes).
    fn truth(&self, h: Hypothesis) -> Truth {
        let (theta0, theta1) = self.design.effect.thetas();
        let theta = if h == Hypothesis::Null { theta0 } else { theta1 };
        match self.design.effect {
            Effect::Mean { sigma, .. } => Truth { mean: [theta, 0.0], sd: [sigma, sigma], rate: [0.0; 2] },
            // The per-split differences, drawn independently: the check
            // shows the statistic's behaviour under the planning values,
            // not the overlap of real training sets.
            Effect::CrossVal { sigma, .. } => Truth { mean: [theta, 0.0], sd: [sigma, sigma], rate: [0.0; 2] },
            Effect::Welch { sigma1, sigma2, .. } => Truth { mean: [theta, 0.0], sd: [sigma1, sigma2], rate: [0.0; 2] },
            Effect::Proportion { .. } => Truth { mean: [0.0; 2], sd: [0.0; 2], rate: [theta, theta] },
            Effect::TwoProportions { p1, p2 } => {
                let rate = if h == Hypothesis::Null {
                    let pbar = (p1 + self.design.ratio * p2) / (1.0 + self.design.ratio);
                    [pbar, pbar]
                } else {
                    [p1, p2]
                };
                Truth { mean: [0.0; 2], sd: [0.0; 2], rate }
            }
            // rate = [ψ, q]: the share of discordant items and the chance
            // that one of them is won by classifier 1 (½ under H0, equal
            // accuracy with the same ψ).
            Effect::Classifiers { .. } => {
                let (psi, q) = self.design.effect.discordant().unwrap_or((0.0, 0.5));
                Truth { mean: [0.0; 2], sd: [0.0; 2], rate: [psi, if h == Hypothesis::Null { 0.5 } else { q }] }
            }
        }
    }

    /// The result of a tally of this plan: shares with their Monte Carlo
    /// standard errors, the analytic figures at the planned size and the
    /// sentences.
    pub fn result(&self, tally: &Tally) -> Result<Simulation, SimulationError> {
        let at = evaluate(&self.design, self.n1)?;
        let analytic = Analytic {
            n1: at.n1,
            n2: at.n2,
            alpha: at.alpha,
            beta: at.beta,
            total_error: at.alpha + at.beta,
            conclusive: at.conclusive,
            conventional_alpha: at.conventional.alpha,
            conventional_power: at.conventional.power,
        };
        let threshold_rule = RuleResult::new(&tally.h0, &tally.h1, false);
        let conventional_rule = RuleResult::new(&tally.h0, &tally.h1, true);
        let mut sim = Simulation {
            population: self.population.words(),
            family: self.design.family.id(),
            n1: self.n1,
            n2: self.n2,
            dropout: self.dropout,
            enrol: self.enrol,
            replicates_done: tally.h0.replicates.min(tally.h1.replicates),
            replicates: self.replicates,
            seed: self.seed,
            alpha_max: self.design.alpha_max,
            beta_max: self.design.beta_max,
            threshold_rule,
            conventional_rule,
            analytic,
            no_decision: Pair { h0: tally.h0.no_decision, h1: tally.h1.no_decision },
            readings: Vec::new(),
            sample: SampleOut { statistic: at.statistic, h0: tally.sample_h0.clone(), h1: tally.sample_h1.clone() },
        };
        sim.readings = words::readings(&sim);
        Ok(sim)
    }
}

/// The random stream of one block and hypothesis (`index` = 2·block +
/// hypothesis): Xoshiro256++ seeded from SplitMix64 keyed by the seed and
/// the index, so blocks draw independent streams that depend on nothing
/// else.
pub fn stream(seed: u64, index: u64) -> Xoshiro256PlusPlus {
    let mut key = SplitMix64::seed_from_u64(seed ^ index.wrapping_add(1).wrapping_mul(0x9E37_79B9_7F4A_7C15));
    Xoshiro256PlusPlus::from_rng(&mut key)
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Hypothesis {
    Null,
    Alternative,
}

/// The population under one hypothesis.
struct Truth {
    mean: [f64; 2],
    sd: [f64; 2],
    rate: [f64; 2],
}

/// One data set's path.
#[derive(Debug, Clone, Copy, PartialEq)]
struct One {
    /// None: no decision possible (a size below the family's smallest, a
    /// standard deviation of 0, a pooled rate of 0 or 1).
    outcome: Option<Outcome>,
    conventional_reject: bool,
    statistic: Option<f64>,
}

/// A threshold kept for reuse.
#[derive(Debug, Clone, Copy)]
struct Kept {
    model: Model,
    cut: Cut,
    conclusive: bool,
    /// The conventional test's level-α_max region of a continuous
    /// statistic, for thresholds reused across data sets.
    level: Option<ContinuousCut>,
}

/// Is t within rounding of the region's edge? There the p-value decides.
fn near_edge(cut: ContinuousCut, t: f64) -> bool {
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-9 * (1.0 + a.abs().max(b.abs()));
    match cut {
        ContinuousCut::Above(c) | ContinuousCut::Below(c) => close(t, c),
        ContinuousCut::Outside { centre, half_width } => close((t - centre).abs(), half_width),
    }
}

type Key = (u64, Option<u64>, [Option<u64>; 3]);

struct Runner<'a> {
    plan: &'a Plan,
    cache: HashMap<Key, Option<Kept>>,
}

impl<'a> Runner<'a> {
    fn new(plan: &'a Plan) -> Runner<'a> {
        Runner { plan, cache: HashMap::new() }
    }

    fn sizes(&self, rng: &mut Xoshiro256PlusPlus) -> (u64, Option<u64>) {
        let plan = self.plan;
        match (plan.enrol, plan.dropout) {
            (Some(e), Some(q)) => {
                let keep = |rng: &mut Xoshiro256PlusPlus, m: u64| Binomial::new(m, 1.0 - q).map_or(m, |b| b.sample(rng));
                let n1 = keep(rng, e.n1);
                (n1, e.n2.map(|m| keep(rng, m)))
            }
            _ => (plan.n1, plan.n2),
        }
    }

    /// A group's n, mean and sample SD (divisor n − 1; None below 2), in
    /// one pass over the draws as they come, about the population mean
    /// `mean` (a shift that keeps the sum of squares well conditioned).
    fn moments(&mut self, rng: &mut Xoshiro256PlusPlus, n: u64, mean: f64, sd: f64, group: usize) -> (f64, f64, Option<f64>) {
        let (mut s1, mut s2) = (0.0, 0.0);
        let (mut first, mut same) = (None, true);
        self.plan.population.each(rng, n, mean, sd, group, |x| {
            let d = x - mean;
            s1 += d;
            s2 += d * d;
            same &= *first.get_or_insert(x) == x;
        });
        let m = n as f64;
        let avg = mean + s1 / m;
        // Equal values have an SD of exactly 0, as a user's data would,
        // whatever the rounding of the sums.
        let s = (n >= 2).then(|| if same { 0.0 } else { ((s2 - s1 * s1 / m).max(0.0) / (m - 1.0)).sqrt() });
        (m, avg, s)
    }

    fn one(&mut self, rng: &mut Xoshiro256PlusPlus, truth: &Truth) -> One {
        let none = One { outcome: None, conventional_reject: false, statistic: None };
        let design = self.plan.design;
        let (n1, n2) = self.sizes(rng);
        let min = design.family.n_min();
        if n1 < min || n2.is_some_and(|m| m < min) {
            return none;
        }
        let outcomes = matches!(self.plan.population, Population::Bernoulli | Population::Clustered { .. });
        let summary = match (design.family.two_groups(), outcomes) {
            _ if design.family == Family::TwoClassifiers => {
                // m ~ Bin(n, ψ) discordant items, b ~ Bin(m, q) of them won
                // by classifier 1; the agreeing items' split does not enter
                // the decision and is left at "both right".
                let draw = |rng: &mut Xoshiro256PlusPlus, n: u64, p: f64| Binomial::new(n, p).map_or(0, |b| b.sample(rng));
                let m = draw(rng, n1, truth.rate[0]);
                let b = draw(rng, m, truth.rate[1]);
                Summary::Classifiers { both_right: (n1 - m) as f64, only_first_right: b as f64, only_second_right: (m - b) as f64, both_wrong: 0.0 }
            }
            (false, false) => {
                let (n, mean, sd) = self.moments(rng, n1, truth.mean[0], truth.sd[0], 0);
                Summary::OneGroup { n, mean, sd }
            }
            (true, false) => {
                let m2 = n2.unwrap_or(n1);
                let (a, mean1, sd1) = self.moments(rng, n1, truth.mean[0], truth.sd[0], 0);
                let (b, mean2, sd2) = self.moments(rng, m2, truth.mean[1], truth.sd[1], 1);
                Summary::TwoGroups { n1: a, mean1, sd1: sd1.unwrap_or(f64::NAN), n2: b, mean2, sd2: sd2.unwrap_or(f64::NAN) }
            }
            (false, true) => {
                let x = self.plan.population.successes(rng, n1, truth.rate[0]);
                Summary::Proportion { successes: x as f64, trials: n1 as f64 }
            }
            (true, true) => {
                let m2 = n2.unwrap_or(n1);
                let x1 = self.plan.population.successes(rng, n1, truth.rate[0]);
                let x2 = self.plan.population.successes(rng, m2, truth.rate[1]);
                Summary::TwoProportions { successes1: x1 as f64, trials1: n1 as f64, successes2: x2 as f64, trials2: m2 as f64 }
            }
        };
        let Ok(seen) = observe(&design, &summary) else { return none };
        let Some(kept) = self.kept(seen.n1, seen.n2, &seen.observed) else { return none };
        let t = seen.statistic;
        let outcome = if !kept.conclusive {
            Outcome::Inconclusive
        } else if kept.cut.rejects(t) {
            Outcome::RejectH0
        } else {
            Outcome::DoNotRejectH0
        };
        // The conventional outcome is the p-value's (p ≤ α_max); away from
        // the edge of the level-α_max region the region says the same at
        // a fraction of the cost.
        let conventional_reject = match kept.level {
            Some(cut) if !near_edge(cut, t) => cut.rejects(t),
            _ => p_value(&kept.model, design.alternative, t) <= design.alpha_max,
        };
        One { outcome: Some(outcome), conventional_reject, statistic: Some(t) }
    }

    /// The threshold and verdict for these sizes and observed values, from
    /// the cache when the sampling distributions are the same.
    fn kept(&mut self, n1: u64, n2: Option<u64>, observed: &Observed) -> Option<Kept> {
        let design = &self.plan.design;
        let o = design.sampling_observed(observed);
        let key: Key = (n1, n2, [o.sd1.map(f64::to_bits), o.sd2.map(f64::to_bits), o.se0.map(f64::to_bits)]);
        if let Some(k) = self.cache.get(&key) {
            return *k;
        }
        let kept = judge_observed(design, n1, n2, observed).ok().map(|j| {
            // Welch's threshold is solved anew per data set: its p-value
            // costs less than a level region it would use once.
            let level = match j.model.sampling {
                Sampling::Continuous { h0, h1 } if o.sd1.is_none() => {
                    continuous_level(&h0, &h1, design.alternative, j.model.setup.centre, design.alpha_max).ok().map(|(c, _)| c)
                }
                _ => None,
            };
            Kept { model: j.model, cut: j.cut, conclusive: j.conclusive, level }
        });
        if self.cache.len() < CACHE_MAX {
            self.cache.insert(key, kept);
        }
        kept
    }
}

/// Counts of one hypothesis's data sets.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct Counts {
    pub replicates: u64,
    pub reject: u64,
    pub do_not_reject: u64,
    /// Inconclusive, including the data sets with no decision possible.
    pub inconclusive: u64,
    pub conventional_reject: u64,
    /// Data sets that could not be decided (counted inconclusive above and
    /// as not rejecting by the conventional rule).
    pub no_decision: u64,
}

impl Counts {
    fn add(&mut self, one: One) {
        self.replicates += 1;
        match one.outcome {
            Some(Outcome::RejectH0) => self.reject += 1,
            Some(Outcome::DoNotRejectH0) => self.do_not_reject += 1,
            Some(Outcome::Inconclusive) => self.inconclusive += 1,
            None => {
                self.inconclusive += 1;
                self.no_decision += 1;
            }
        }
        if one.conventional_reject {
            self.conventional_reject += 1;
        }
    }

    fn merge(&mut self, o: &Counts) {
        self.replicates += o.replicates;
        self.reject += o.reject;
        self.do_not_reject += o.do_not_reject;
        self.inconclusive += o.inconclusive;
        self.conventional_reject += o.conventional_reject;
        self.no_decision += o.no_decision;
    }
}

/// What a run of blocks found: the counts and the first statistics.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
pub struct Tally {
    pub h0: Counts,
    pub h1: Counts,
    pub sample_h0: Vec<f64>,
    pub sample_h1: Vec<f64>,
}

impl Tally {
    /// Add the tally of the blocks that follow this one's (merge in block
    /// order, so that the sample stays the first replicates').
    pub fn merge(&mut self, next: &Tally) {
        self.h0.merge(&next.h0);
        self.h1.merge(&next.h1);
        for (mine, theirs) in [(&mut self.sample_h0, &next.sample_h0), (&mut self.sample_h1, &next.sample_h1)] {
            let room = SAMPLE.saturating_sub(mine.len());
            mine.extend(theirs.iter().take(room));
        }
    }
}

/// A share of data sets with its Monte Carlo standard error √(p(1 − p)/R).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Share {
    pub count: u64,
    pub share: f64,
    pub se: f64,
}

impl Share {
    fn of(count: u64, of: u64) -> Share {
        let r = of.max(1) as f64;
        let p = count as f64 / r;
        Share { count, share: p, se: (p * (1.0 - p) / r).sqrt() }
    }

    /// Where this rate stands against a limit: above or within it only
    /// when it is more than two Monte Carlo standard errors away
    /// (DEVELOPERS.md, "Simulation check"); otherwise at the limit. A
    /// share or limit that is not a number is at the limit (nothing is
    /// claimed).
    pub fn against(&self, limit: f64) -> Standing {
        let margin = 2.0 * self.se;
        if self.share - margin > limit {
            Standing::Above
        } else if self.share + margin <= limit {
            Standing::Within
        } else {
            Standing::AtLimit
        }
    }
}

/// A realised rate against the analyst's limit, judged beyond two Monte
/// Carlo standard errors ([`Share::against`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Standing {
    /// More than two standard errors below the limit (or at it exactly
    /// with no simulation error).
    Within,
    /// Within two standard errors of the limit.
    AtLimit,
    /// More than two standard errors above the limit.
    Above,
}

/// Each outcome's share under one hypothesis.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Outcomes {
    pub reject: Share,
    pub do_not_reject: Share,
    /// The conventional rule has no inconclusive outcome.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub inconclusive: Option<Share>,
}

/// A sum of two independent estimates and its standard error.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Estimate {
    pub value: f64,
    pub se: f64,
}

/// One rule's realised figures: realised α is the share of H0 data sets it
/// rejects, realised β the share of θ1 data sets it does not reject
/// (do not reject or inconclusive).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RuleResult {
    pub under_h0: Outcomes,
    pub under_h1: Outcomes,
    pub alpha: Share,
    pub beta: Share,
    pub total_error: Estimate,
}

impl RuleResult {
    fn new(h0: &Counts, h1: &Counts, conventional: bool) -> RuleResult {
        let outcomes = |c: &Counts| {
            if conventional {
                Outcomes {
                    reject: Share::of(c.conventional_reject, c.replicates),
                    do_not_reject: Share::of(c.replicates - c.conventional_reject, c.replicates),
                    inconclusive: None,
                }
            } else {
                Outcomes {
                    reject: Share::of(c.reject, c.replicates),
                    do_not_reject: Share::of(c.do_not_reject, c.replicates),
                    inconclusive: Some(Share::of(c.inconclusive, c.replicates)),
                }
            }
        };
        let (under_h0, under_h1) = (outcomes(h0), outcomes(h1));
        let alpha = under_h0.reject;
        let beta = Share::of(h1.replicates - under_h1.reject.count, h1.replicates);
        // √(a² + b²) written out: `hypot` differs in the last bit between
        // targets, and the figures must be the same natively and on the page.
        let total_error = Estimate { value: alpha.share + beta.share, se: (alpha.se * alpha.se + beta.se * beta.se).sqrt() };
        RuleResult { under_h0, under_h1, alpha, beta, total_error }
    }
}

/// The design's analytic figures at the planned size (planning values).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Analytic {
    pub n1: u64,
    pub n2: Option<u64>,
    pub alpha: f64,
    pub beta: f64,
    pub total_error: f64,
    pub conclusive: bool,
    /// The conventional test's attained α (α_max for continuous statistics).
    pub conventional_alpha: f64,
    pub conventional_power: f64,
}

impl Analytic {
    /// The conventional test's miss rate, 1 − power (the figure its
    /// realised β is compared with).
    pub fn conventional_beta(&self) -> f64 {
        1.0 - self.conventional_power
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Pair<T> {
    pub h0: T,
    pub h1: T,
}

/// The first statistics under each hypothesis, for a histogram.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SampleOut {
    pub statistic: &'static str,
    pub h0: Vec<f64>,
    pub h1: Vec<f64>,
}

/// The simulation check's result.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Simulation {
    pub family: &'static str,
    /// The population shape in words.
    pub population: String,
    pub n1: u64,
    pub n2: Option<u64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub dropout: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub enrol: Option<GroupSizes>,
    /// Data sets drawn per hypothesis so far (the page shows partial results).
    pub replicates_done: u64,
    pub replicates: u64,
    pub seed: u64,
    pub alpha_max: f64,
    pub beta_max: f64,
    /// The threshold of least (weighted) total error, three outcomes.
    pub threshold_rule: RuleResult,
    /// Reject when p ≤ α_max.
    pub conventional_rule: RuleResult,
    pub analytic: Analytic,
    pub no_decision: Pair<u64>,
    /// Plain sentences on what the figures mean.
    pub readings: Vec<String>,
    pub sample: SampleOut,
}
