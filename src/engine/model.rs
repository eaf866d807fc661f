//! From a design and a sample size to the sampling distributions of the
//! test statistic under H0 and under θ1 (DEVELOPERS.md, "Families").
//!
//! Architecture invariant: this is the only module that knows which
//! distribution each family's statistic follows; the threshold, search and
//! decision code see only the two distributions, the direction and the map
//! from the statistic to the estimate.

use super::design::{Design, Effect, Family, N_MAX};
use super::dist::{Binomial, Continuous, DistError, Discrete, NoncentralT, Normal, StudentT};
use super::threshold::Setup;

/// A continuous sampling distribution.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ContDist {
    Normal(Normal),
    T(StudentT),
    Nct(NoncentralT),
}

/// A discrete sampling distribution.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DiscDist {
    Binomial(Binomial),
    /// Bin(0, p): no trials, all mass at 0 (two classifiers with no
    /// discordant item).
    NoTrials,
}

macro_rules! delegate {
    ($self:ident, $d:ident => $e:expr) => {
        match $self {
            ContDist::Normal($d) => $e,
            ContDist::T($d) => $e,
            ContDist::Nct($d) => $e,
        }
    };
}

impl Continuous for ContDist {
    fn pdf(&self, x: f64) -> f64 {
        delegate!(self, d => d.pdf(x))
    }
    fn ln_pdf(&self, x: f64) -> f64 {
        delegate!(self, d => d.ln_pdf(x))
    }
    fn ln_pdf_derivatives(&self, x: f64) -> (f64, f64, f64) {
        delegate!(self, d => d.ln_pdf_derivatives(x))
    }
    fn cdf(&self, x: f64) -> f64 {
        delegate!(self, d => d.cdf(x))
    }
    fn sf(&self, x: f64) -> f64 {
        delegate!(self, d => d.sf(x))
    }
    fn quantile(&self, p: f64) -> Result<f64, DistError> {
        delegate!(self, d => d.quantile(p))
    }
    fn quantile_upper(&self, q: f64) -> Result<f64, DistError> {
        delegate!(self, d => d.quantile_upper(q))
    }
    fn centre(&self) -> f64 {
        delegate!(self, d => d.centre())
    }
    fn spread(&self) -> f64 {
        delegate!(self, d => d.spread())
    }
    fn normal_parameters(&self) -> Option<(f64, f64)> {
        delegate!(self, d => d.normal_parameters())
    }
}

impl Discrete for DiscDist {
    fn pmf(&self, k: u64) -> f64 {
        match self {
            DiscDist::Binomial(d) => d.pmf(k),
            DiscDist::NoTrials => f64::from(u8::from(k == 0)),
        }
    }
    fn ln_pmf(&self, k: u64) -> f64 {
        match self {
            DiscDist::Binomial(d) => d.ln_pmf(k),
            DiscDist::NoTrials => if k == 0 { 0.0 } else { f64::NEG_INFINITY },
        }
    }
    fn cdf(&self, k: u64) -> f64 {
        match self {
            DiscDist::Binomial(d) => d.cdf(k),
            DiscDist::NoTrials => 1.0,
        }
    }
    fn sf(&self, k: u64) -> f64 {
        match self {
            DiscDist::Binomial(d) => d.sf(k),
            DiscDist::NoTrials => 0.0,
        }
    }
    fn quantile(&self, p: f64) -> Result<u64, DistError> {
        match self {
            DiscDist::Binomial(d) => d.quantile(p),
            DiscDist::NoTrials => Ok(0),
        }
    }
    fn quantile_upper(&self, q: f64) -> Result<u64, DistError> {
        match self {
            DiscDist::Binomial(d) => d.quantile_upper(q),
            DiscDist::NoTrials => Ok(0),
        }
    }
    fn support_max(&self) -> u64 {
        match self {
            DiscDist::Binomial(d) => d.support_max(),
            DiscDist::NoTrials => 0,
        }
    }
    fn centre(&self) -> f64 {
        match self {
            DiscDist::Binomial(d) => d.centre(),
            DiscDist::NoTrials => 0.0,
        }
    }
}

/// The pair of sampling distributions.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Sampling {
    Continuous { h0: ContDist, h1: ContDist },
    Discrete { h0: DiscDist, h1: DiscDist },
}

/// Observed standard deviations from data, which replace the planning ones
/// where the statistic uses them (the estimate scale of t statistics and
/// Welch's degrees of freedom).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Observed {
    /// SD of group 1 (or of the observations or differences).
    pub sd1: Option<f64>,
    pub sd2: Option<f64>,
    /// Standard error of the estimate under H0 (two proportions: from the
    /// observed pooled rate).
    pub se0: Option<f64>,
    /// Two classifiers: the n test items, which map the count X of the m
    /// discordant items to the accuracy difference (2X − m)/n = (b − c)/n.
    pub items: Option<u64>,
}

/// Everything the solvers need about a design at one sample size.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Model {
    pub sampling: Sampling,
    pub setup: Setup,
    /// estimate = offset + slope · T.
    pub offset: f64,
    pub slope: f64,
    /// The statistic's name: "z", "t" or "X".
    pub statistic: &'static str,
    pub n1: u64,
    pub n2: Option<u64>,
    /// Degrees of freedom of t statistics.
    pub df: Option<f64>,
    /// Noncentrality (the mean of T under θ1 for z statistics).
    pub ncp: Option<f64>,
    /// The approximation the family relies on, named for the output.
    pub approximation: Option<&'static str>,
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ModelError {
    #[error("{field} is {value_shown}, but must be a whole number from {min} to {max}", value_shown = crate::engine::shown::Num(*value))]
    SampleSize { field: &'static str, value: f64, min: u64, max: u64 },
    #[error("the sampling distribution cannot be formed: {0}")]
    Dist(#[from] DistError),
    /// The design's values lie so far apart that the arithmetic of its
    /// sampling distributions overflows or underflows (a noncentrality of
    /// 1e308, a Welch df of NaN): named by its most extreme value.
    #[error(
        "{field} is {value_shown}: with the design's other values ({others}) the sampling distribution cannot be formed ({detail}); \
         state the values in a unit where they lie between about 1e-100 and 1e100",
        value_shown = crate::engine::shown::Num(*value)
    )]
    Scale { field: &'static str, value: f64, others: String, detail: String },
}

/// The expected number of discordant items among n, rounded to the
/// nearest whole number and at least 1: m = ⌊n·ψ + ½⌋ ∨ 1.
pub fn expected_discordant(n: u64, psi: f64) -> u64 {
    ((n as f64 * psi + 0.5).floor() as u64).clamp(1, n.max(1))
}

/// Welch–Satterthwaite degrees of freedom for variances of the means v1, v2.
pub fn welch_df(v1: f64, v2: f64, n1: u64, n2: u64) -> f64 {
    (v1 + v2).powi(2) / (v1 * v1 / (n1 - 1) as f64 + v2 * v2 / (n2 - 1) as f64)
}

impl Design {
    /// The model at n1 (n2 from the allocation ratio) with planning values.
    /// Two classifiers: the conditional model at the expected number of
    /// discordant items among n1 ([`expected_discordant`]), the one the
    /// charts draw; their planning errors average over that number
    /// (`discordant`).
    pub fn model(&self, n1: u64) -> Result<Model, ModelError> {
        if let Some((psi, _)) = self.effect.discordant() {
            if !(1..=N_MAX).contains(&n1) {
                return Err(ModelError::SampleSize { field: "n", value: n1 as f64, min: 1, max: N_MAX });
            }
            return self.model_observed(expected_discordant(n1, psi), None, &Observed { items: Some(n1), ..Observed::default() });
        }
        let n2 = self.n2(n1);
        self.model_observed(n1, n2, &Observed::default())
    }

    /// The observed values that change the sampling distributions (so the
    /// threshold and the verdict) beyond the group sizes: Welch's df takes
    /// the observed SDs, the two-proportion z its observed pooled SE. The
    /// other families' thresholds on the statistic's scale depend on the
    /// sizes alone (their observed SD only maps T to the estimate).
    pub fn sampling_observed(&self, obs: &Observed) -> Observed {
        match self.family {
            Family::TwoMeansWelch => Observed { sd1: obs.sd1, sd2: obs.sd2, ..Observed::default() },
            Family::TwoProportions => Observed { se0: obs.se0, ..Observed::default() },
            _ => Observed::default(),
        }
    }

    /// The design as the sample grows without end, where the statistic's
    /// laws stop changing before its errors vanish: the corrected
    /// resampled t's variance factor 1/J + ρ never falls below ρ, so its
    /// laws tend to N(0, 1) and N(δ/(σ√ρ), 1). None for every family whose
    /// errors vanish as n grows.
    pub fn limit_model(&self) -> Option<Model> {
        let Effect::CrossVal { theta0, theta1, sigma, rho } = self.effect else { return None };
        let ncp = (theta1 - theta0) / (sigma * rho.sqrt());
        let h1 = Normal::new(ncp, 1.0).ok()?;
        Some(Model {
            sampling: Sampling::Continuous { h0: ContDist::Normal(Normal::STANDARD), h1: ContDist::Normal(h1) },
            setup: Setup { alternative: self.alternative, centre: 0.0, weight: self.weight, single_crossing: true },
            offset: theta0,
            slope: sigma * rho.sqrt(),
            statistic: "z",
            n1: u64::MAX,
            n2: None,
            df: None,
            ncp: Some(ncp),
            approximation: None,
        })
    }

    /// The model at the given group sizes, with observed SDs where the
    /// statistic uses them.
    pub fn model_observed(&self, n1: u64, n2: Option<u64>, obs: &Observed) -> Result<Model, ModelError> {
        self.model_unscaled(n1, n2, obs).map_err(|e| match e {
            ModelError::Dist(d) => self.scale_error(d),
            other => other,
        })
    }

    /// A distribution the design's values cannot form, as the user's
    /// field with the most extreme value (farthest from 1 on a log scale).
    fn scale_error(&self, d: DistError) -> ModelError {
        let values: Vec<(&'static str, f64)> = match self.effect {
            Effect::Mean { theta0, theta1, sigma } => vec![("theta0", theta0), ("theta1", theta1), ("sigma", sigma)],
            Effect::Welch { theta0, theta1, sigma1, sigma2 } => vec![("theta0", theta0), ("theta1", theta1), ("sigma1", sigma1), ("sigma2", sigma2)],
            Effect::Proportion { p0, p1 } => vec![("theta0", p0), ("theta1", p1)],
            Effect::TwoProportions { p1, p2 } => vec![("p1", p1), ("p2", p2)],
            Effect::CrossVal { theta0, theta1, sigma, rho } => vec![("theta0", theta0), ("theta1", theta1), ("sigma", sigma), ("test_train_ratio", rho)],
            Effect::Classifiers { acc1, acc2, psi } => vec![("acc1", acc1), ("acc2", acc2), ("discordant", psi)],
        };
        let extremity = |v: f64| if v == 0.0 || !v.is_finite() { 0.0 } else { v.abs().ln().abs() };
        let (field, value) = values.iter().copied().fold(values[0], |a, b| if extremity(b.1) > extremity(a.1) { b } else { a });
        let others = values.iter().filter(|(k, _)| *k != field).map(|(k, v)| format!("{k} = {}", crate::engine::shown::Num(*v))).collect::<Vec<_>>().join(", ");
        ModelError::Scale { field, value, others, detail: d.to_string() }
    }

    fn model_unscaled(&self, n1: u64, n2: Option<u64>, obs: &Observed) -> Result<Model, ModelError> {
        // Two classifiers' statistic is conditional on the m discordant
        // items, which may be none.
        let (min, field) = match self.family {
            Family::TwoClassifiers => (0, "the number of discordant items m"),
            _ => (self.family.n_min(), if self.family.two_groups() { "n1" } else { "n" }),
        };
        if n1 < min || n1 > N_MAX {
            return Err(ModelError::SampleSize { field, value: n1 as f64, min, max: N_MAX });
        }
        let n2v = match (self.family.two_groups(), n2) {
            (true, Some(m)) if m >= min && m <= N_MAX => m,
            (true, m) => {
                return Err(ModelError::SampleSize { field: "n2", value: m.map_or(f64::NAN, |m| m as f64), min, max: N_MAX });
            }
            (false, _) => 0,
        };
        let (theta0, theta1) = self.effect.thetas();
        let delta = theta1 - theta0;
        let alt = self.alternative;
        let setup = |single_crossing| Setup { alternative: alt, centre: 0.0, weight: self.weight, single_crossing };
        // An exact count X of n1 trials: estimate = offset + slope · X.
        let exact = |h0, h1, centre, offset, slope| Model {
            sampling: Sampling::Discrete { h0, h1 },
            setup: Setup { centre, ..setup(true) },
            offset,
            slope,
            statistic: "X",
            n1,
            n2: None,
            df: None,
            ncp: None,
            approximation: None,
        };
        let n = n1 as f64;
        let (m1, m2) = (n, n2v as f64);
        let model = match (self.family, self.effect) {
            (Family::MeanZ, Effect::Mean { sigma, .. }) => {
                let se = sigma / n.sqrt();
                let ncp = delta / se;
                Model {
                    sampling: Sampling::Continuous { h0: ContDist::Normal(Normal::STANDARD), h1: ContDist::Normal(Normal::new(ncp, 1.0)?) },
                    setup: setup(true),
                    offset: theta0,
                    slope: se,
                    statistic: "z",
                    n1,
                    n2: None,
                    df: None,
                    ncp: Some(ncp),
                    approximation: None,
                }
            }
            (Family::MeanT | Family::PairedT, Effect::Mean { sigma, .. }) => {
                let df = n - 1.0;
                let ncp = delta / (sigma / n.sqrt());
                Model {
                    sampling: Sampling::Continuous { h0: ContDist::T(StudentT::new(df)?), h1: ContDist::Nct(NoncentralT::new(df, ncp)?) },
                    setup: setup(true),
                    offset: theta0,
                    slope: obs.sd1.unwrap_or(sigma) / n.sqrt(),
                    statistic: "t",
                    n1,
                    n2: None,
                    df: Some(df),
                    ncp: Some(ncp),
                    approximation: None,
                }
            }
            (Family::TwoMeansPooled, Effect::Mean { sigma, .. }) => {
                let df = m1 + m2 - 2.0;
                let f = (1.0 / m1 + 1.0 / m2).sqrt();
                let ncp = delta / (sigma * f);
                let sd = match (obs.sd1, obs.sd2) {
                    (Some(s1), Some(s2)) => (((m1 - 1.0) * s1 * s1 + (m2 - 1.0) * s2 * s2) / df).sqrt(),
                    _ => sigma,
                };
                Model {
                    sampling: Sampling::Continuous { h0: ContDist::T(StudentT::new(df)?), h1: ContDist::Nct(NoncentralT::new(df, ncp)?) },
                    setup: setup(true),
                    offset: theta0,
                    slope: sd * f,
                    statistic: "t",
                    n1,
                    n2: Some(n2v),
                    df: Some(df),
                    ncp: Some(ncp),
                    approximation: None,
                }
            }
            (Family::TwoMeansWelch, Effect::Welch { sigma1, sigma2, .. }) => {
                let (v1, v2) = (sigma1 * sigma1 / m1, sigma2 * sigma2 / m2);
                let se = (v1 + v2).sqrt();
                let ncp = delta / se;
                let (o1, o2) = match (obs.sd1, obs.sd2) {
                    (Some(s1), Some(s2)) => (s1 * s1 / m1, s2 * s2 / m2),
                    _ => (v1, v2),
                };
                let df = welch_df(o1, o2, n1, n2v);
                Model {
                    sampling: Sampling::Continuous { h0: ContDist::T(StudentT::new(df)?), h1: ContDist::Nct(NoncentralT::new(df, ncp)?) },
                    setup: setup(true),
                    offset: theta0,
                    slope: (o1 + o2).sqrt(),
                    statistic: "t",
                    n1,
                    n2: Some(n2v),
                    df: Some(df),
                    ncp: Some(ncp),
                    approximation: Some("Welch–Satterthwaite degrees of freedom"),
                }
            }
            (Family::ProportionExact, Effect::Proportion { p0, p1 }) => {
                exact(DiscDist::Binomial(Binomial::new(n1, p0)?), DiscDist::Binomial(Binomial::new(n1, p1)?), n * p0, 0.0, 1.0 / n)
            }
            (Family::ProportionNormal, Effect::Proportion { p0, p1 }) => {
                let se0 = (p0 * (1.0 - p0) / n).sqrt();
                let se1 = (p1 * (1.0 - p1) / n).sqrt();
                let mean = delta / se0;
                Model {
                    sampling: Sampling::Continuous {
                        h0: ContDist::Normal(Normal::STANDARD),
                        h1: ContDist::Normal(Normal::new(mean, se1 / se0)?),
                    },
                    setup: setup(false),
                    offset: p0,
                    slope: se0,
                    statistic: "z",
                    n1,
                    n2: None,
                    df: None,
                    ncp: Some(mean),
                    approximation: Some("normal approximation to the binomial, SE from p0 under H0 and from p1 under the alternative, no continuity correction"),
                }
            }
            (Family::TwoProportions, Effect::TwoProportions { p1, p2 }) => {
                // Planning: the allocation-weighted rate; in a decision the
                // statistic divides by the observed pooled SE, so the model
                // uses that same SE (DEVELOPERS.md, "Families").
                let pbar = (p1 + self.ratio * p2) / (1.0 + self.ratio);
                let se0 = obs.se0.unwrap_or_else(|| (pbar * (1.0 - pbar) * (1.0 / m1 + 1.0 / m2)).sqrt());
                let se1 = (p1 * (1.0 - p1) / m1 + p2 * (1.0 - p2) / m2).sqrt();
                let mean = delta / se0;
                Model {
                    sampling: Sampling::Continuous {
                        h0: ContDist::Normal(Normal::STANDARD),
                        h1: ContDist::Normal(Normal::new(mean, se1 / se0)?),
                    },
                    setup: setup(false),
                    offset: 0.0,
                    slope: se0,
                    statistic: "z",
                    n1,
                    n2: Some(n2v),
                    df: None,
                    ncp: Some(mean),
                    approximation: Some("normal approximation, pooled SE under H0 and unpooled SE under the alternative, no continuity correction"),
                }
            }
            (Family::TwoLearnersCv, Effect::CrossVal { sigma, rho, .. }) => {
                // Corrected resampled t: the variance factor 1/J + ρ
                // (Nadeau & Bengio 2003; Bouckaert & Frank 2004's form).
                let df = n - 1.0;
                let f = (1.0 / n + rho).sqrt();
                let ncp = delta / (sigma * f);
                Model {
                    sampling: Sampling::Continuous { h0: ContDist::T(StudentT::new(df)?), h1: ContDist::Nct(NoncentralT::new(df, ncp)?) },
                    setup: setup(true),
                    offset: theta0,
                    slope: obs.sd1.unwrap_or(sigma) * f,
                    statistic: "t",
                    n1,
                    n2: None,
                    df: Some(df),
                    ncp: Some(ncp),
                    approximation: self.family.entry().approximation,
                }
            }
            (Family::TwoClassifiers, Effect::Classifiers { .. }) => {
                // X | m ~ Bin(m, ½) under H0, Bin(m, q) under the
                // alternative (the exact conditional test); m = 0 holds no
                // trial at all.
                let q = self.effect.discordant().map_or(f64::NAN, |(_, q)| q);
                let (h0, h1) = if n1 == 0 {
                    (DiscDist::NoTrials, DiscDist::NoTrials)
                } else {
                    (DiscDist::Binomial(Binomial::new(n1, 0.5)?), DiscDist::Binomial(Binomial::new(n1, q)?))
                };
                // estimate = (2X − m)/items, the accuracy difference (items
                // = m when unknown: the difference among discordant items).
                let items = obs.items.unwrap_or(n1).max(1) as f64;
                exact(h0, h1, n / 2.0, -n / items, 2.0 / items)
            }
            // Design::new pairs every family with its own effect kind.
            (family, _) => {
                return Err(ModelError::Dist(DistError::Parameter { name: family.id(), value: f64::NAN, rule: "paired with its own kind of effect" }));
            }
        };
        Ok(model)
    }
}
