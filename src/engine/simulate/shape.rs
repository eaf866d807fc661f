//! Population shapes for the simulation check: what a data set is drawn
//! from, each shape with the planning mean and SD (measurements) or the
//! planning rate (yes/no outcomes), and its parameters with their rules.
//!
//! The formulas (DEVELOPERS.md, "Simulation check"), with Z standard
//! normal, mean μ and SD σ:
//! - normal: μ + σZ;
//! - gamma (right-skewed, skewness g): k = 4/g², μ + σ(G − k)/√k, G ~ Gamma(k, 1);
//! - log-normal (right-skewed, skewness g): w = e^{s²} solves (w + 2)√(w − 1) = g,
//!   μ + σ(e^{sZ} − √w)/√(w(w − 1)) (solved for u = w − 1, which keeps its digits);
//! - heavy-tailed: μ + σT√((ν − 2)/ν), T ~ t(ν), ν > 2;
//! - uniform: μ + σ√3(2U − 1);
//! - contaminated normal: μ + σZS/√(1 − ε + εk²), S = k with probability ε, else 1;
//! - resample: a group's own values, centred on its mean, plus μ;
//! - yes/no outcomes: Binomial(n, p), or in clusters of m with each
//!   cluster's rate P ~ Beta(p(1 − ρ)/ρ, (1 − p)(1 − ρ)/ρ) (intra-class
//!   correlation ρ; beta-binomial).
//!
//! Invariant: a `Population` that exists has parameters within their
//! rules (checked once, in [`Population::new`]), so drawing cannot fail;
//! every transform uses `libm`, the same code natively and in the page,
//! so a seed gives the same values on both.

use super::SimulationError;
use crate::engine::root::{Tolerance, brent};
use rand::RngExt;
use rand_distr::{Beta, Binomial, Distribution, Gamma, StandardNormal, StudentT};
use rand_xoshiro::Xoshiro256PlusPlus;

/// What a shape draws: measurements (the mean families) or yes/no
/// outcomes (the proportion families).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    Measurements,
    Outcomes,
}

/// A shape's parameter: its JSON key (inside `simulation`), its label on
/// the page, its range and the rule in words.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Param {
    pub key: &'static str,
    pub label: &'static str,
    /// Smallest and largest value taken; `open_min`: the smallest excluded.
    pub min: f64,
    pub max: f64,
    pub open_min: bool,
    pub whole: bool,
    /// What the page offers before the user types (an editable suggestion).
    pub suggested: f64,
    pub rule: &'static str,
}

impl Param {
    pub fn holds(&self, v: f64) -> bool {
        v.is_finite() && (if self.open_min { v > self.min } else { v >= self.min }) && v <= self.max && (!self.whole || v.fract() == 0.0)
    }
}

/// One population shape: id (the JSON value of `simulation.shape`), the
/// chooser's words, what it draws and its parameters.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShapeEntry {
    pub id: &'static str,
    pub label: &'static str,
    pub kind: Kind,
    pub params: &'static [Param],
    /// Draws from the user's data file (its groups' values).
    pub needs_data: bool,
}

const SKEWNESS: Param = Param {
    key: "skewness",
    label: "Skewness",
    min: 0.0,
    max: 20.0,
    open_min: true,
    whole: false,
    suggested: 1.0,
    rule: "a number above 0 and at most 20 (1 is a clear right skew, 2 a strong one)",
};

/// Every shape the simulation offers, in the chooser's order.
pub const SHAPES: [ShapeEntry; 9] = [
    ShapeEntry { id: "normal", label: "Normal", kind: Kind::Measurements, params: &[], needs_data: false },
    ShapeEntry { id: "gamma", label: "Right-skewed (gamma)", kind: Kind::Measurements, params: &[SKEWNESS], needs_data: false },
    ShapeEntry { id: "lognormal", label: "Right-skewed (log-normal)", kind: Kind::Measurements, params: &[SKEWNESS], needs_data: false },
    ShapeEntry {
        id: "heavy_tailed",
        label: "Heavy-tailed (scaled t)",
        kind: Kind::Measurements,
        params: &[Param {
            key: "df",
            label: "Degrees of freedom of the t shape",
            min: 2.0,
            max: 1000.0,
            open_min: true,
            whole: false,
            suggested: 5.0,
            rule: "a number above 2 and at most 1000 (with 2 or fewer the standard deviation is infinite; smaller means heavier tails)",
        }],
        needs_data: false,
    },
    ShapeEntry { id: "uniform", label: "Uniform (flat, no tails)", kind: Kind::Measurements, params: &[], needs_data: false },
    ShapeEntry {
        id: "contaminated",
        label: "Normal with outliers",
        kind: Kind::Measurements,
        params: &[
            Param {
                key: "outlier_share",
                label: "Share of outliers",
                min: 0.0,
                max: 0.5,
                open_min: true,
                whole: false,
                suggested: 0.05,
                rule: "a share above 0 and at most 0.5 (0.05 or 5% for 5 in 100)",
            },
            Param {
                key: "outlier_sd",
                label: "Outliers' spread, in standard deviations of the rest",
                min: 1.0,
                max: 100.0,
                open_min: false,
                whole: false,
                suggested: 3.0,
                rule: "a number from 1 to 100",
            },
        ],
        needs_data: false,
    },
    ShapeEntry { id: "resample", label: "Resampled from your data file", kind: Kind::Measurements, params: &[], needs_data: true },
    ShapeEntry { id: "bernoulli", label: "Independent yes/no outcomes", kind: Kind::Outcomes, params: &[], needs_data: false },
    ShapeEntry {
        id: "clustered",
        label: "Clustered yes/no outcomes (beta-binomial)",
        kind: Kind::Outcomes,
        params: &[
            Param {
                key: "icc",
                label: "Intra-class correlation",
                min: 0.0,
                max: 0.99,
                open_min: true,
                whole: false,
                suggested: 0.05,
                rule: "a number above 0 and at most 0.99",
            },
            Param {
                key: "cluster_size",
                label: "Observations per cluster",
                min: 1.0,
                max: 10_000_000.0,
                open_min: false,
                whole: true,
                suggested: 10.0,
                rule: "a whole number from 1 to 10000000",
            },
        ],
        needs_data: false,
    },
];

/// Every parameter key of every shape, once each.
pub fn param_keys() -> Vec<&'static str> {
    let mut keys: Vec<&'static str> = Vec::new();
    for p in SHAPES.iter().flat_map(|s| s.params) {
        if !keys.contains(&p.key) {
            keys.push(p.key);
        }
    }
    keys
}

pub fn entry(id: &str) -> Option<&'static ShapeEntry> {
    SHAPES.iter().find(|s| s.id == id)
}

/// A validated population shape.
#[derive(Debug, Clone, PartialEq)]
pub enum Population {
    Normal,
    Gamma { skewness: f64, k: f64 },
    /// u = e^{s²} − 1.
    LogNormal { skewness: f64, s: f64, u: f64 },
    HeavyTailed { df: f64, t: StudentT<f64> },
    Uniform,
    Contaminated { share: f64, k: f64 },
    /// Each group's values centred on the group's mean.
    Resample { groups: Vec<Vec<f64>> },
    Bernoulli,
    Clustered { icc: f64, size: u64 },
}

/// The shape as a request states it: the id, the parameters by key and,
/// for `resample`, the data file's groups.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ShapeSpec {
    pub id: String,
    pub params: Vec<(String, f64)>,
    pub groups: Option<Vec<Vec<f64>>>,
}

impl Population {
    /// Check a shape against its entry and the family's kind of data, and
    /// work out its constants. `groups_needed`: how many groups the
    /// family's data have (1 or 2), for `resample`.
    pub fn new(spec: &ShapeSpec, kind: Kind, groups_needed: usize) -> Result<Population, SimulationError> {
        let Some(e) = entry(&spec.id) else {
            return Err(SimulationError::Value {
                field: "simulation.shape".into(),
                shown: format!("\"{}\"", spec.id),
                rule: format!("one of {}", SHAPES.iter().map(|s| s.id).collect::<Vec<_>>().join(", ")),
            });
        };
        if e.kind != kind {
            let fits: Vec<&str> = SHAPES.iter().filter(|s| s.kind == kind).map(|s| s.id).collect();
            let what = if kind == Kind::Outcomes { "yes/no outcomes" } else { "measurements" };
            return Err(SimulationError::Value {
                field: "simulation.shape".into(),
                shown: format!("\"{}\"", spec.id),
                rule: format!("a shape of {what}, as this design's data are: one of {}", fits.join(", ")),
            });
        }
        for (k, _) in &spec.params {
            if !e.params.iter().any(|p| p.key == k) {
                let takes = if e.params.is_empty() { "no parameters".to_string() } else { e.params.iter().map(|p| p.key).collect::<Vec<_>>().join(", ") };
                return Err(SimulationError::Unknown { field: format!("simulation.{k}"), known: format!("the shape {} takes {takes}", e.id) });
            }
        }
        let mut values = Vec::new();
        for p in e.params {
            let field = format!("simulation.{}", p.key);
            let v = spec.params.iter().find(|(k, _)| k == p.key).map(|(_, v)| *v).ok_or_else(|| SimulationError::Missing {
                field: field.clone(),
                hint: format!("the {} shape needs it: {}", e.id, p.rule),
            })?;
            if !p.holds(v) {
                return Err(SimulationError::Value { field, shown: crate::engine::shown::Num(v).to_string(), rule: p.rule.into() });
            }
            values.push(v);
        }
        Ok(match e.id {
            "normal" => Population::Normal,
            "gamma" => Population::Gamma { skewness: values[0], k: 4.0 / (values[0] * values[0]) },
            "lognormal" => {
                let u = lognormal_u(values[0])?;
                Population::LogNormal { skewness: values[0], s: libm::sqrt(libm::log1p(u)), u }
            }
            "heavy_tailed" => {
                let t = StudentT::new(values[0]).map_err(|_| SimulationError::Value {
                    field: "simulation.df".into(),
                    shown: crate::engine::shown::Num(values[0]).to_string(),
                    rule: e.params[0].rule.into(),
                })?;
                Population::HeavyTailed { df: values[0], t }
            }
            "uniform" => Population::Uniform,
            "contaminated" => Population::Contaminated { share: values[0], k: values[1] },
            "resample" => Population::Resample { groups: centred_groups(spec.groups.as_deref(), groups_needed)? },
            "bernoulli" => Population::Bernoulli,
            _ => Population::Clustered { icc: values[0], size: values[1] as u64 },
        })
    }

    /// The data the shape draws, in words, for every place a result
    /// appears ("With right-skewed data (gamma, skewness 2) the ...").
    pub fn words(&self) -> String {
        let n = |v: f64| crate::engine::shown::Num(v).to_string();
        match self {
            Population::Normal => "normal data".into(),
            Population::Gamma { skewness, .. } => format!("right-skewed data (gamma, skewness {})", n(*skewness)),
            Population::LogNormal { skewness, .. } => format!("right-skewed data (log-normal, skewness {})", n(*skewness)),
            Population::HeavyTailed { df, .. } => format!("heavy-tailed data (scaled t with {} degrees of freedom)", n(*df)),
            Population::Uniform => "uniform data (flat, no tails)".into(),
            Population::Contaminated { share, k } => format!("normal data with {}% outliers at {} SD", n(share * 100.0), n(*k)),
            Population::Resample { groups } => {
                let sizes: Vec<String> = groups.iter().map(|g| g.len().to_string()).collect();
                format!("data resampled from your file ({} values, each group centred and shifted to the hypothesis)", sizes.join(" and "))
            }
            Population::Bernoulli => "independent yes/no outcomes (binomial)".into(),
            Population::Clustered { icc, size } => {
                format!("clustered yes/no outcomes (clusters of {size}, intra-class correlation {}; beta-binomial)", n(*icc))
            }
        }
    }

    /// How many random draws one group of `n` costs: the budget's unit.
    pub fn draws(&self, n: u64) -> u64 {
        match self {
            Population::Bernoulli => 1,
            Population::Clustered { size, .. } => 2 * n.div_ceil(*size),
            _ => n,
        }
    }

    /// `n` measurements of mean `mu` and SD `sigma`, each handed to `f`
    /// as drawn (for `resample`, group `group`'s centred values plus `mu`;
    /// `sigma` unused). Yes/no shapes draw none.
    pub fn each(&self, rng: &mut Xoshiro256PlusPlus, n: u64, mu: f64, sigma: f64, group: usize, mut f: impl FnMut(f64)) {
        match self {
            Population::Normal => {
                for _ in 0..n {
                    let z: f64 = StandardNormal.sample(rng);
                    f(mu + sigma * z);
                }
            }
            Population::Gamma { k, .. } => {
                // Gamma::new cannot fail for k = 4/g² with g in (0, 20].
                if let Ok(g) = Gamma::new(*k, 1.0) {
                    let root_k = libm::sqrt(*k);
                    for _ in 0..n {
                        f(mu + sigma * (g.sample(rng) - k) / root_k);
                    }
                }
            }
            Population::LogNormal { s, u, .. } => {
                let centre = libm::sqrt(1.0 + u);
                let scale = libm::sqrt((1.0 + u) * u);
                for _ in 0..n {
                    let z: f64 = StandardNormal.sample(rng);
                    f(mu + sigma * (libm::exp(s * z) - centre) / scale);
                }
            }
            Population::HeavyTailed { df, t } => {
                let scale = libm::sqrt((df - 2.0) / df);
                for _ in 0..n {
                    f(mu + sigma * scale * t.sample(rng));
                }
            }
            Population::Uniform => {
                let half = sigma * libm::sqrt(3.0);
                for _ in 0..n {
                    f(mu + half * (2.0 * rng.random::<f64>() - 1.0));
                }
            }
            Population::Contaminated { share, k } => {
                let norm = libm::sqrt(1.0 - share + share * k * k);
                for _ in 0..n {
                    let z: f64 = StandardNormal.sample(rng);
                    let s = if rng.random::<f64>() < *share { *k } else { 1.0 };
                    f(mu + sigma * z * s / norm);
                }
            }
            Population::Resample { groups } => {
                if let Some(g) = groups.get(group).filter(|g| !g.is_empty()) {
                    // u32 indices: the same draws on 32- and 64-bit targets.
                    let len = g.len() as u32;
                    for _ in 0..n {
                        f(mu + g[rng.random_range(0..len) as usize]);
                    }
                }
            }
            Population::Bernoulli | Population::Clustered { .. } => {}
        }
    }

    /// `n` measurements as a list (see [`Population::each`]).
    pub fn measurements(&self, rng: &mut Xoshiro256PlusPlus, n: u64, mu: f64, sigma: f64, group: usize) -> Vec<f64> {
        let mut out = Vec::with_capacity(usize::try_from(n).unwrap_or(0).min(1 << 20));
        self.each(rng, n, mu, sigma, group, |x| out.push(x));
        out
    }

    /// The number of successes among `n` yes/no outcomes with rate `p`.
    pub fn successes(&self, rng: &mut Xoshiro256PlusPlus, n: u64, p: f64) -> u64 {
        let binomial = |rng: &mut Xoshiro256PlusPlus, n: u64, p: f64| Binomial::new(n, p.clamp(0.0, 1.0)).map_or(0, |b| b.sample(rng));
        match self {
            Population::Clustered { icc, size } => {
                let f = (1.0 - icc) / icc;
                let Ok(beta) = Beta::new(p * f, (1.0 - p) * f) else { return binomial(rng, n, p) };
                let mut total = 0;
                let mut left = n;
                while left > 0 {
                    let m = left.min(*size);
                    let rate: f64 = beta.sample(rng);
                    total += binomial(rng, m, rate);
                    left -= m;
                }
                total
            }
            _ => binomial(rng, n, p),
        }
    }
}

/// u = e^{s²} − 1 of the log-normal with skewness g: the
/// root of (u + 3)√u = g on (0, ∞), increasing in u; bracketed by
/// 3√u ≤ g (so u ≤ (g/3)²) and u^{3/2} ≤ g (so u ≤ g^{2/3}): the root lies
/// in [min of the two bounds / 4, min of the two bounds].
fn lognormal_u(g: f64) -> Result<f64, SimulationError> {
    let f = |u: f64| (u + 3.0) * libm::sqrt(u) - g;
    let hi = (g / 3.0).powi(2).min(libm::pow(g, 2.0 / 3.0));
    let lo = hi / 16.0;
    brent(f, lo, hi, Tolerance { abs: 0.0, rel: 4.0 * f64::EPSILON, max_iterations: 200 })
        .map(|r| r.x)
        .map_err(|e| SimulationError::Shape(format!("the log-normal shape with skewness {g} cannot be formed ({e})")))
}

/// Each group's values centred on its mean, checked: the family's number
/// of groups, at least two values each, every value finite.
fn centred_groups(groups: Option<&[Vec<f64>]>, needed: usize) -> Result<Vec<Vec<f64>>, SimulationError> {
    let Some(groups) = groups else {
        return Err(SimulationError::Missing {
            field: "simulation.shape".into(),
            hint: "\"resample\" draws from a data file's values: load a data file (the command line: --data FILE)".into(),
        });
    };
    if groups.len() != needed {
        return Err(SimulationError::Shape(format!("the data file gives {} groups of values, but this design needs {needed}", groups.len())));
    }
    groups
        .iter()
        .enumerate()
        .map(|(i, g)| {
            if g.len() < 2 || g.iter().any(|v| !v.is_finite()) {
                return Err(SimulationError::Shape(format!(
                    "group {} of the data file has {} usable values; resampling needs at least 2 finite values per group",
                    i + 1,
                    g.iter().filter(|v| v.is_finite()).count()
                )));
            }
            let mean = g.iter().sum::<f64>() / g.len() as f64;
            let centred: Vec<f64> = g.iter().map(|v| v - mean).collect();
            if centred.iter().any(|v| !v.is_finite()) {
                return Err(SimulationError::Shape(format!("group {} of the data file has values too large to centre", i + 1)));
            }
            Ok(centred)
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lognormal_u_solves_the_skewness_equation() {
        for g in [1e-6, 0.01, 0.5, 1.0, 3.0, 20.0] {
            let u = lognormal_u(g).unwrap();
            let back = (u + 3.0) * u.sqrt();
            assert!((back - g).abs() <= 1e-13 * g, "g {g}: u {u} gives {back}");
        }
    }

    #[test]
    fn every_parameter_rule_is_met_by_its_suggestion() {
        for s in SHAPES {
            for p in s.params {
                assert!(p.holds(p.suggested), "{} {}", s.id, p.key);
            }
        }
    }
}
