//! A validated design: the test family, its direction, the alternative of
//! interest, the planning values, the two error limits and the cost weight.
//!
//! Architecture invariant: a `Design` that exists is valid. Every rule is
//! checked in [`Design::new`], which names the field, its value and the rule
//! in its error, so nothing downstream needs to re-check user input.

use super::threshold::Alternative;
use serde::Serialize;

/// Largest sample size (per group) any search or evaluation accepts.
pub const N_MAX: u64 = 10_000_000;

/// The test families (DEVELOPERS.md, "Families").
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Family {
    /// One mean, σ known: z statistic.
    MeanZ,
    /// One mean, σ unknown: one-sample t.
    MeanT,
    /// Paired means: one-sample t on the differences.
    PairedT,
    /// Two means, equal variances: pooled t.
    TwoMeansPooled,
    /// Two means, unequal variances: Welch t.
    TwoMeansWelch,
    /// One proportion, exact binomial.
    ProportionExact,
    /// One proportion, normal approximation.
    ProportionNormal,
    /// Two proportions, normal approximation with pooled SE under H0.
    TwoProportions,
}

impl Family {
    pub const ALL: [Family; 8] = [
        Family::MeanZ,
        Family::MeanT,
        Family::PairedT,
        Family::TwoMeansPooled,
        Family::TwoMeansWelch,
        Family::ProportionExact,
        Family::ProportionNormal,
        Family::TwoProportions,
    ];

    /// The identifier used in JSON input and output.
    pub fn id(self) -> &'static str {
        match self {
            Family::MeanZ => "mean_z",
            Family::MeanT => "mean_t",
            Family::PairedT => "paired_t",
            Family::TwoMeansPooled => "two_means_pooled",
            Family::TwoMeansWelch => "two_means_welch",
            Family::ProportionExact => "proportion_exact",
            Family::ProportionNormal => "proportion_normal",
            Family::TwoProportions => "two_proportions",
        }
    }

    pub fn from_id(id: &str) -> Option<Family> {
        Family::ALL.into_iter().find(|f| f.id() == id)
    }

    /// A plain description for messages and reports.
    pub fn title(self) -> &'static str {
        match self {
            Family::MeanZ => "one mean, known standard deviation (z test)",
            Family::MeanT => "one mean, unknown standard deviation (t test)",
            Family::PairedT => "paired means (t test on the differences)",
            Family::TwoMeansPooled => "two means, equal variances (pooled t test)",
            Family::TwoMeansWelch => "two means, unequal variances (Welch t test)",
            Family::ProportionExact => "one proportion, exact binomial test",
            Family::ProportionNormal => "one proportion, normal approximation",
            Family::TwoProportions => "two proportions, normal approximation",
        }
    }

    pub fn two_groups(self) -> bool {
        matches!(self, Family::TwoMeansPooled | Family::TwoMeansWelch | Family::TwoProportions)
    }

    pub fn discrete(self) -> bool {
        matches!(self, Family::ProportionExact)
    }

    /// Smallest n (per group) for which the statistic is defined.
    pub fn n_min(self) -> u64 {
        match self {
            Family::MeanT | Family::PairedT | Family::TwoMeansPooled | Family::TwoMeansWelch => 2,
            _ => 1,
        }
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
}

impl Effect {
    /// (θ0, θ1) on the parameter's scale; for two proportions the
    /// difference p1 − p2 (θ0 = 0).
    pub fn thetas(&self) -> (f64, f64) {
        match *self {
            Effect::Mean { theta0, theta1, .. } | Effect::Welch { theta0, theta1, .. } => (theta0, theta1),
            Effect::Proportion { p0, p1 } => (p0, p1),
            Effect::TwoProportions { p1, p2 } => (0.0, p1 - p2),
        }
    }
}

/// Everything a user states about a design, before validation. Fields a
/// family does not use must be `None`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct DesignSpec {
    pub family: Option<Family>,
    pub alternative: Option<Alternative>,
    pub theta0: Option<f64>,
    pub theta1: Option<f64>,
    pub sigma: Option<f64>,
    pub sigma1: Option<f64>,
    pub sigma2: Option<f64>,
    pub d: Option<f64>,
    pub p1: Option<f64>,
    pub p2: Option<f64>,
    pub ratio: Option<f64>,
    pub alpha_max: Option<f64>,
    pub beta_max: Option<f64>,
    pub weight: Option<f64>,
}

/// A design broke a rule. Messages name the field, its value and the rule.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DesignError {
    #[error("{field} is missing: {hint}")]
    Missing { field: &'static str, hint: &'static str },
    #[error("{field} is {value}, but must be {rule}")]
    OutOfRange { field: &'static str, value: f64, rule: &'static str },
    #[error("{field} does not apply to the family {family}: {hint}")]
    NotApplicable { field: &'static str, family: &'static str, hint: &'static str },
    #[error("{field} is {value}, but with the alternative \"{alternative}\" it must be {rule}")]
    Direction { field: &'static str, value: f64, alternative: &'static str, rule: String },
    #[error("give either d or theta1 with sigma, not both")]
    EffectTwice,
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

fn finite(field: &'static str, v: f64) -> Result<f64, DesignError> {
    if v.is_finite() { Ok(v) } else { Err(DesignError::OutOfRange { field, value: v, rule: "a finite number" }) }
}

fn positive(field: &'static str, v: f64) -> Result<f64, DesignError> {
    if v.is_finite() && v > 0.0 {
        Ok(v)
    } else {
        Err(DesignError::OutOfRange { field, value: v, rule: "a finite number > 0" })
    }
}

fn open_unit(field: &'static str, v: f64) -> Result<f64, DesignError> {
    if v > 0.0 && v < 1.0 {
        Ok(v)
    } else {
        Err(DesignError::OutOfRange { field, value: v, rule: "between 0 and 1 (exclusive)" })
    }
}

fn limit(field: &'static str, v: Option<f64>) -> Result<f64, DesignError> {
    let hint = if field == "alpha_max" {
        "choose the largest type I error rate (false alarm) the context can accept, between 0 and 0.5"
    } else {
        "choose the largest type II error rate (missed effect) the context can accept, between 0 and 0.5"
    };
    let v = v.ok_or(DesignError::Missing { field, hint })?;
    if v > 0.0 && v < 0.5 {
        Ok(v)
    } else {
        Err(DesignError::OutOfRange { field, value: v, rule: "between 0 and 0.5 (exclusive)" })
    }
}

fn need(field: &'static str, v: Option<f64>, hint: &'static str) -> Result<f64, DesignError> {
    v.ok_or(DesignError::Missing { field, hint })
}

impl Design {
    /// Validate a specification. Every rule of DEVELOPERS.md is checked here.
    pub fn new(spec: &DesignSpec) -> Result<Design, DesignError> {
        let family = spec.family.ok_or(DesignError::Missing {
            field: "family",
            hint: "choose one of mean_z, mean_t, paired_t, two_means_pooled, two_means_welch, proportion_exact, proportion_normal, two_proportions",
        })?;
        let alternative = spec.alternative.ok_or(DesignError::Missing {
            field: "alternative",
            hint: "choose greater, less or two_sided",
        })?;
        let alpha_max = limit("alpha_max", spec.alpha_max)?;
        let beta_max = limit("beta_max", spec.beta_max)?;
        let weight = match spec.weight {
            None => 0.5,
            Some(w) => open_unit("weight", w)?,
        };
        let not_for = |field: &'static str, present: bool, hint: &'static str| {
            if present { Err(DesignError::NotApplicable { field, family: family.id(), hint }) } else { Ok(()) }
        };
        let ratio = if family.two_groups() {
            match spec.ratio {
                None => 1.0,
                Some(r) if r.is_finite() && r > 0.0 && r <= 100.0 => r,
                Some(r) => {
                    return Err(DesignError::OutOfRange { field: "ratio", value: r, rule: "between 0 and 100 (n2 = ratio·n1)" });
                }
            }
        } else {
            not_for("ratio", spec.ratio.is_some(), "it is the allocation ratio n2/n1 of two-group families")?;
            1.0
        };
        let mut standardised = false;
        let effect = match family {
            Family::MeanZ | Family::MeanT | Family::PairedT | Family::TwoMeansPooled => {
                not_for("sigma1", spec.sigma1.is_some(), "per-group SDs belong to two_means_welch; use sigma")?;
                not_for("sigma2", spec.sigma2.is_some(), "per-group SDs belong to two_means_welch; use sigma")?;
                not_for("p1", spec.p1.is_some(), "use theta0 and theta1")?;
                not_for("p2", spec.p2.is_some(), "use theta0 and theta1")?;
                if let Some(d) = spec.d {
                    if spec.theta1.is_some() || spec.sigma.is_some() || spec.theta0.is_some() {
                        return Err(DesignError::EffectTwice);
                    }
                    let d = finite("d", d)?;
                    standardised = true;
                    Effect::Mean { theta0: 0.0, theta1: d, sigma: 1.0 }
                } else {
                    let theta0 = finite("theta0", need("theta0", spec.theta0, "the mean (or difference) under H0")?)?;
                    let theta1 = finite(
                        "theta1",
                        need("theta1", spec.theta1, "the smallest effect worth finding, as the mean under the alternative (or give d)")?,
                    )?;
                    let sigma = positive("sigma", need("sigma", spec.sigma, "the planning standard deviation")?)?;
                    Effect::Mean { theta0, theta1, sigma }
                }
            }
            Family::TwoMeansWelch => {
                not_for("d", spec.d.is_some(), "with two SDs give theta0, theta1, sigma1 and sigma2")?;
                not_for("sigma", spec.sigma.is_some(), "give sigma1 and sigma2")?;
                not_for("p1", spec.p1.is_some(), "use theta0 and theta1")?;
                not_for("p2", spec.p2.is_some(), "use theta0 and theta1")?;
                let theta0 = finite("theta0", need("theta0", spec.theta0, "the difference of means under H0")?)?;
                let theta1 = finite("theta1", need("theta1", spec.theta1, "the smallest difference worth finding")?)?;
                let sigma1 = positive("sigma1", need("sigma1", spec.sigma1, "the planning SD of group 1")?)?;
                let sigma2 = positive("sigma2", need("sigma2", spec.sigma2, "the planning SD of group 2")?)?;
                Effect::Welch { theta0, theta1, sigma1, sigma2 }
            }
            Family::ProportionExact | Family::ProportionNormal => {
                for (f, v) in [("d", spec.d), ("sigma", spec.sigma), ("sigma1", spec.sigma1), ("sigma2", spec.sigma2), ("p1", spec.p1), ("p2", spec.p2)] {
                    not_for(f, v.is_some(), "a proportion design takes theta0 (p under H0) and theta1 (p under the alternative)")?;
                }
                let p0 = open_unit("theta0", need("theta0", spec.theta0, "the proportion under H0")?)?;
                let p1 = open_unit("theta1", need("theta1", spec.theta1, "the proportion under the alternative")?)?;
                Effect::Proportion { p0, p1 }
            }
            Family::TwoProportions => {
                for (f, v) in [("d", spec.d), ("sigma", spec.sigma), ("sigma1", spec.sigma1), ("sigma2", spec.sigma2), ("theta0", spec.theta0), ("theta1", spec.theta1)] {
                    not_for(f, v.is_some(), "two proportions take p1 and p2, the group rates under the alternative")?;
                }
                let p1 = open_unit("p1", need("p1", spec.p1, "the rate in group 1 under the alternative")?)?;
                let p2 = open_unit("p2", need("p2", spec.p2, "the rate in group 2 under the alternative")?)?;
                Effect::TwoProportions { p1, p2 }
            }
        };
        let (theta0, theta1) = effect.thetas();
        let field = match (family, standardised) {
            (Family::TwoProportions, _) => "p1",
            (_, true) => "d",
            _ => "theta1",
        };
        // Echo the p1 the analyst gave: p2 + (p1 − p2) need not round back to it.
        let shown = match effect { Effect::TwoProportions { p1, .. } => p1, _ => theta1 };
        let other = match family {
            Family::TwoProportions => "p2",
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
            let alternative = match alternative {
                Alternative::Greater => "greater",
                Alternative::Less => "less",
                Alternative::TwoSided => "two_sided",
            };
            return Err(DesignError::Direction { field, value: shown, alternative, rule });
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
        };
        d
    }
}
