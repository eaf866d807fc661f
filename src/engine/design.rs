//! A validated design: the test family, its direction, the alternative of
//! interest, the planning values, the two error limits and the cost weight.
//!
//! Architecture invariant: a `Design` that exists is valid. Every rule is
//! checked in [`Design::new`], which names the field, its value and the rule
//! in its error, so nothing downstream needs to re-check user input.

use super::family::{Field, LIMITS, REGISTRY, STANDARDISED};
use super::threshold::Alternative;
use serde::Serialize;

/// Largest sample size (per group) any search or evaluation accepts.
pub const N_MAX: u64 = 10_000_000;

pub use super::family::Family;

// The direction's names live beside the design that states it (the type
// belongs to the threshold solver, which knows no JSON).
impl Alternative {
    pub const ALL: [Alternative; 3] = [Alternative::Greater, Alternative::Less, Alternative::TwoSided];

    /// The name in JSON input and output.
    pub fn id(self) -> &'static str {
        match self {
            Alternative::Greater => "greater",
            Alternative::Less => "less",
            Alternative::TwoSided => "two_sided",
        }
    }

    pub fn from_id(id: &str) -> Option<Alternative> {
        Alternative::ALL.into_iter().find(|a| a.id() == id)
    }
}

/// The alternative of interest, in the family's own parameters.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Effect {
    /// A mean or a difference of means: θ0, θ1 and the planning SD σ (of
    /// the observations, the differences, or common to both groups).
    Mean { theta0: f64, theta1: f64, sigma: f64 },
    /// A difference of means with a planning SD per group.
    Welch { theta0: f64, theta1: f64, sigma1: f64, sigma2: f64 },
    /// One proportion: p0 under H0, p1 under the alternative.
    Proportion { p0: f64, p1: f64 },
    /// Two proportions under the alternative (H0: equal).
    TwoProportions { p1: f64, p2: f64 },
    /// Two learners' mean score difference over cross-validation splits:
    /// θ0, θ1, the SD σ of the per-split differences, and ρ = n_test/n_train
    /// (1/(k − 1) for k-fold), the floor of the variance factor 1/J + ρ.
    CrossVal { theta0: f64, theta1: f64, sigma: f64, rho: f64 },
    /// Two classifiers on the same items: their accuracies under the
    /// alternative and ψ, the share of items where exactly one is right
    /// (H0: equal accuracy). θ = acc1 − acc2 = p10 − p01.
    Classifiers { acc1: f64, acc2: f64, psi: f64 },
}

impl Effect {
    /// (θ0, θ1) on the parameter's scale; for two proportions the
    /// difference p1 − p2 (θ0 = 0).
    pub fn thetas(&self) -> (f64, f64) {
        match *self {
            Effect::Mean { theta0, theta1, .. } | Effect::Welch { theta0, theta1, .. } | Effect::CrossVal { theta0, theta1, .. } => (theta0, theta1),
            Effect::Proportion { p0, p1 } => (p0, p1),
            Effect::TwoProportions { p1, p2 } => (0.0, p1 - p2),
            Effect::Classifiers { acc1, acc2, .. } => (0.0, acc1 - acc2),
        }
    }

    /// Two classifiers: ψ and q = p10/ψ, the chance that a discordant item
    /// is one only classifier 1 gets right (DEVELOPERS.md, "Comparing
    /// models"); q is clamped to [0, 1] against rounding at the boundary
    /// designs (p01 = 0 or p10 = 0). None for the other effects.
    pub fn discordant(&self) -> Option<(f64, f64)> {
        let Effect::Classifiers { acc1, acc2, psi } = *self else { return None };
        Some((psi, ((psi + acc1 - acc2) / (2.0 * psi)).clamp(0.0, 1.0)))
    }
}

/// Planning shares of two classifiers' agreement cells within this much of
/// 0 count as 0: accuracies and shares given to fifteen digits (0.9, 0.7,
/// 0.2) make p01 = (0.2 − 0.9 + 0.7)/2 a rounding error away from 0.
pub const CELL_SLACK: f64 = 1e-12;

/// Everything a user states about a design, before validation: the family,
/// the direction, and the numbers by their JSON names (the registry's
/// design fields, `d` and the limits). Fields a family does not use must be
/// absent.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct DesignSpec {
    pub family: Option<Family>,
    pub alternative: Option<Alternative>,
    /// (field name, value) pairs, each name at most once.
    pub values: Vec<(&'static str, f64)>,
}

impl DesignSpec {
    pub fn new(family: Family, alternative: Alternative) -> DesignSpec {
        DesignSpec { family: Some(family), alternative: Some(alternative), values: Vec::new() }
    }

    /// The value of a field, if given.
    pub fn get(&self, key: &str) -> Option<f64> {
        self.values.iter().find(|(k, _)| *k == key).map(|(_, v)| *v)
    }

    /// Give a field a value (replacing an earlier one).
    pub fn set(&mut self, key: &'static str, v: f64) {
        self.unset(key);
        self.values.push((key, v));
    }

    /// Remove a field.
    pub fn unset(&mut self, key: &str) {
        self.values.retain(|(k, _)| *k != key);
    }

    /// Give a field a value or remove it.
    pub fn put(&mut self, key: &'static str, v: Option<f64>) {
        match v {
            Some(v) => self.set(key, v),
            None => self.unset(key),
        }
    }

    /// The same specification with a field set.
    pub fn with(mut self, key: &'static str, v: f64) -> DesignSpec {
        self.set(key, v);
        self
    }

    /// The same specification without these fields.
    pub fn without(mut self, keys: &[&str]) -> DesignSpec {
        self.values.retain(|(k, _)| !keys.contains(k));
        self
    }
}

/// A design broke a rule. Messages name the field, its value and the rule.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DesignError {
    #[error("{field} is missing: {hint}")]
    Missing { field: &'static str, hint: String },
    #[error("{field} is {value_shown}, but must be {rule}", value_shown = crate::engine::shown::Num(*value))]
    OutOfRange { field: &'static str, value: f64, rule: &'static str },
    #[error("{field} does not apply to the family {family}: {hint}")]
    NotApplicable { field: &'static str, family: &'static str, hint: String },
    #[error("{field} is {value_shown}, but with the alternative \"{alternative}\" it must be {rule}", value_shown = crate::engine::shown::Num(*value))]
    Direction { field: &'static str, value: f64, alternative: &'static str, rule: String },
    #[error("give either d or theta1 with sigma, not both")]
    EffectTwice,
    /// Two fields that say the same thing in two ways, both given (or
    /// neither, when one is needed).
    #[error("give exactly one of {first} and {second}: {hint}")]
    OneOf { first: &'static str, second: &'static str, hint: &'static str },
    /// Two classifiers: the discordant share ψ cannot hold the accuracies
    /// given (each of the four cells of the 2 × 2 table must be ≥ 0).
    #[error(
        "discordant is {value_shown}, but with acc1 = {acc1_shown} and acc2 = {acc2_shown} it must lie from {low_shown} to {high_shown}: {reason}",
        value_shown = crate::engine::shown::Num(*value),
        acc1_shown = crate::engine::shown::Num(*acc1),
        acc2_shown = crate::engine::shown::Num(*acc2),
        low_shown = crate::engine::shown::Num(*low),
        high_shown = crate::engine::shown::Num(*high)
    )]
    Discordant { value: f64, acc1: f64, acc2: f64, low: f64, high: f64, reason: &'static str },
    /// Group 2 would reach the family's smallest size only beyond [`N_MAX`].
    #[error(
        "ratio is {value:e}, but {family} needs at least {least} observations in group 2 (n2 = ⌈ratio·n1⌉), which this ratio \
         reaches only when group 1 exceeds the largest n searched, {max}: the ratio must be at least {smallest:e}"
    )]
    RatioTooSmall { value: f64, family: &'static str, least: u64, max: u64, smallest: f64 },
}

/// The validated design.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Design {
    pub family: Family,
    pub alternative: Alternative,
    pub effect: Effect,
    /// Largest acceptable type I error rate, in (0, 0.5).
    pub alpha_max: f64,
    /// Largest acceptable type II error rate, in (0, 0.5).
    pub beta_max: f64,
    /// Cost weight w in (0, 1): the threshold minimises w·α + (1 − w)·β.
    pub weight: f64,
    /// Allocation ratio n2/n1 (1 for one-group families).
    pub ratio: f64,
    /// True when the effect was given standardised (`d`): θ0 = 0, σ = 1.
    pub standardised: bool,
}

fn check(field: &Field, v: f64) -> Result<f64, DesignError> {
    if field.check.holds(v) { Ok(v) } else { Err(DesignError::OutOfRange { field: field.key, value: v, rule: field.check.rule() }) }
}

fn value(spec: &DesignSpec, field: &Field) -> Result<Option<f64>, DesignError> {
    match spec.get(field.key) {
        None if field.required => Err(DesignError::Missing { field: field.key, hint: field.hint.into() }),
        None => Ok(None),
        Some(v) => check(field, v).map(Some),
    }
}

impl Design {
    /// Validate a specification against the family's registry entry
    /// (fields, rules, messages), then build the effect.
    pub fn new(spec: &DesignSpec) -> Result<Design, DesignError> {
        let family = spec.family.ok_or_else(|| DesignError::Missing { field: "family", hint: format!("choose one of {}", Family::ids()) })?;
        let entry = family.entry();
        let alternative = spec.alternative.ok_or_else(|| DesignError::Missing {
            field: "alternative",
            hint: "choose greater, less or two_sided".into(),
        })?;
        let [alpha, beta, weight] = &LIMITS;
        let alpha_max = value(spec, alpha)?.unwrap_or(f64::NAN);
        let beta_max = value(spec, beta)?.unwrap_or(f64::NAN);
        let weight = value(spec, weight)?.unwrap_or(0.5);
        // A field the family does not take is wrong whatever its value.
        for &(key, _) in &spec.values {
            if !entry.accepts(key) {
                let what = REGISTRY.iter().find_map(|e| e.design_field(key)).map_or(String::new(), |f| format!("{key} is {}; ", f.needed));
                return Err(DesignError::NotApplicable { field: key, family: entry.id, hint: format!("{what}{}", entry.takes()) });
            }
        }
        // A standardised effect d stands for θ0 = 0, θ1 = d, σ = 1.
        const REPLACED: [&str; 3] = ["theta0", "theta1", "sigma"];
        let standardised = entry.standardised && spec.get(STANDARDISED.key).is_some();
        let mut values: Vec<(&'static str, f64)> = Vec::new();
        if standardised {
            if REPLACED.iter().any(|k| spec.get(k).is_some()) {
                return Err(DesignError::EffectTwice);
            }
            let d = value(spec, &STANDARDISED)?.unwrap_or(f64::NAN);
            values.extend([("theta0", 0.0), ("theta1", d), ("sigma", 1.0)]);
        }
        for field in entry.design.iter().filter(|f| !(standardised && REPLACED.contains(&f.key))) {
            if let Some(v) = value(spec, field)? {
                values.push((field.key, v));
            }
        }
        let get = |key: &str| values.iter().find(|(k, _)| *k == key).map_or(f64::NAN, |(_, v)| *v);
        let ratio = if entry.two_groups { values.iter().find(|(k, _)| *k == "ratio").map_or(1.0, |(_, v)| *v) } else { 1.0 };
        let effect = match family {
            Family::MeanZ | Family::MeanT | Family::PairedT | Family::TwoMeansPooled => {
                Effect::Mean { theta0: get("theta0"), theta1: get("theta1"), sigma: get("sigma") }
            }
            Family::TwoMeansWelch => {
                Effect::Welch { theta0: get("theta0"), theta1: get("theta1"), sigma1: get("sigma1"), sigma2: get("sigma2") }
            }
            Family::ProportionExact | Family::ProportionNormal => Effect::Proportion { p0: get("theta0"), p1: get("theta1") },
            Family::TwoProportions => Effect::TwoProportions { p1: get("p1"), p2: get("p2") },
            Family::TwoLearnersCv => {
                let has = |key: &str| values.iter().any(|(k, _)| *k == key);
                let rho = match (has("folds"), has("test_train_ratio")) {
                    (true, false) => 1.0 / (get("folds") - 1.0),
                    (false, true) => get("test_train_ratio"),
                    _ => {
                        return Err(DesignError::OneOf {
                            first: "folds",
                            second: "test_train_ratio",
                            hint: "folds k for k-fold cross-validation (n_test/n_train = 1/(k − 1)), or test_train_ratio for repeated hold-out splits",
                        });
                    }
                };
                Effect::CrossVal { theta0: get("theta0"), theta1: get("theta1"), sigma: get("sigma"), rho }
            }
            Family::TwoClassifiers => classifiers(get("acc1"), get("acc2"), get("discordant"))?,
        };
        let (theta0, theta1) = effect.thetas();
        let field = match (family, standardised) {
            (Family::TwoProportions, _) => "p1",
            (Family::TwoClassifiers, _) => "acc1",
            (_, true) => "d",
            _ => "theta1",
        };
        // Echo the p1 the analyst gave: p2 + (p1 − p2) need not round back to it.
        let shown = match effect {
            Effect::TwoProportions { p1, .. } => p1,
            Effect::Classifiers { acc1, .. } => acc1,
            _ => theta1,
        };
        let other = match family {
            Family::TwoProportions => "p2",
            Family::TwoClassifiers => "acc2",
            _ if standardised => "0",
            _ => "theta0",
        };
        let rule = match alternative {
            Alternative::Greater if theta1 <= theta0 => Some(format!("greater than {other}")),
            Alternative::Less if theta1 >= theta0 => Some(format!("less than {other}")),
            Alternative::TwoSided if theta1 == theta0 => Some(format!("different from {other}")),
            _ => None,
        };
        if let Some(rule) = rule {
            return Err(DesignError::Direction { field, value: shown, alternative: alternative.id(), rule });
        }
        let design = Design { family, alternative, effect, alpha_max, beta_max, weight, ratio, standardised };
        if design.n_min() > N_MAX {
            // The smallest ratio that works: (m − 1)/N_MAX, nudged up past
            // the rounding slack of `n2` (a few ulps).
            let least = family.n_min();
            let mut smallest = (least - 1) as f64 / N_MAX as f64;
            for _ in 0..64 {
                if (Design { ratio: smallest, ..design }).n2(N_MAX).is_some_and(|n2| n2 >= least) {
                    break;
                }
                smallest = smallest.next_up();
            }
            return Err(DesignError::RatioTooSmall { value: ratio, family: family.id(), least, max: N_MAX, smallest });
        }
        Ok(design)
    }

    /// n2 for a given n1: ⌈ratio·n1⌉ for two-group families.
    pub fn n2(&self, n1: u64) -> Option<u64> {
        if self.family.two_groups() {
            // A tiny relative slack keeps ratio·n1 = 150.00000000000003 at 150.
            Some(((self.ratio * n1 as f64) * (1.0 - 1e-12)).ceil().max(1.0) as u64)
        } else {
            None
        }
    }

    /// Smallest admissible n1 (both groups must reach the family's minimum).
    /// Closed form, then at most a few steps for floating-point rounding;
    /// [`N_MAX`] + 1 when group 2 never reaches the minimum within N_MAX
    /// (which [`Design::new`] refuses).
    pub fn n_min(&self) -> u64 {
        let m = self.family.n_min();
        let reaches = |n: u64| self.n2(n).is_none_or(|n2| n2 >= m);
        // ⌈ratio·n1·(1 − 1e-12)⌉ ≥ m once ratio·n1·(1 − 1e-12) > m − 1.
        let bound = ((m - 1) as f64 / (self.ratio * (1.0 - 1e-12))).floor();
        let mut n = if bound < N_MAX as f64 { (bound as u64 + 1).max(m) } else { N_MAX + 1 };
        for _ in 0..4 {
            if n > m && reaches(n - 1) {
                n -= 1;
            }
        }
        for _ in 0..4 {
            if n <= N_MAX && !reaches(n) {
                n += 1;
            }
        }
        n
    }

    /// Largest admissible n1: n2 = ⌈ratio·n1⌉ must not exceed N_MAX either.
    pub fn n_max(&self) -> u64 {
        let mut n = if self.ratio > 1.0 { ((N_MAX as f64) / self.ratio).floor() as u64 } else { N_MAX };
        while n > self.n_min() && self.n2(n).is_some_and(|n2| n2 > N_MAX) {
            n -= 1;
        }
        while n < N_MAX && self.n2(n + 1).is_none_or(|n2| n2 <= N_MAX) {
            n += 1;
        }
        n
    }

    /// The same design with another θ1 (or p1): used by the inverse
    /// questions. The caller keeps θ1 on the alternative's side.
    pub fn with_theta1(&self, theta1: f64) -> Design {
        let mut d = *self;
        d.effect = match self.effect {
            Effect::Mean { theta0, sigma, .. } => Effect::Mean { theta0, theta1, sigma },
            Effect::Welch { theta0, sigma1, sigma2, .. } => Effect::Welch { theta0, theta1, sigma1, sigma2 },
            Effect::Proportion { p0, .. } => Effect::Proportion { p0, p1: theta1 },
            Effect::TwoProportions { p2, .. } => Effect::TwoProportions { p1: p2 + theta1, p2 },
            Effect::CrossVal { theta0, sigma, rho, .. } => Effect::CrossVal { theta0, theta1, sigma, rho },
            // ψ and acc2 stay; the caller keeps |θ1| ≤ ψ (q in [0, 1]).
            Effect::Classifiers { acc2, psi, .. } => Effect::Classifiers { acc1: acc2 + theta1, acc2, psi },
        };
        d
    }
}

/// Two classifiers' planning values, with the 2 × 2 table's four cells
/// checked (DEVELOPERS.md, "Comparing models"): |acc1 − acc2| ≤ ψ ≤
/// min(acc1 + acc2, 2 − acc1 − acc2), within [`CELL_SLACK`].
fn classifiers(acc1: f64, acc2: f64, psi: f64) -> Result<Effect, DesignError> {
    // Shown to twelve decimals: 0.05, not 0.04999999999999993.
    let twelve = |x: f64| (x * 1e12).round() / 1e12;
    let low = twelve((acc1 - acc2).abs());
    let high = twelve((acc1 + acc2).min(2.0 - acc1 - acc2));
    let refuse = |reason| Err(DesignError::Discordant { value: psi, acc1, acc2, low, high, reason });
    if psi < (acc1 - acc2).abs() - CELL_SLACK {
        return refuse(
            "the accuracies differ only on items where exactly one classifier is right, so that share is at least the gap between them",
        );
    }
    if psi > acc1 + acc2 + CELL_SLACK {
        return refuse("the share of items both get right, (acc1 + acc2 − discordant)/2, would be below 0");
    }
    if psi > 2.0 - acc1 - acc2 + CELL_SLACK {
        return refuse("the share of items both get wrong, (2 − acc1 − acc2 − discordant)/2, would be below 0");
    }
    Ok(Effect::Classifiers { acc1, acc2, psi })
}
