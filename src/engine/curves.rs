//! Curves for the charts, as data (no drawing here): the two sampling
//! densities, the ROC of the test with the Youden point, α + β against the
//! threshold, and α*, β* against n.
//!
//! Architecture invariant: every point is computed from the same model and
//! solver as the figures it illustrates, so a chart can never disagree with
//! the numbers beside it.

use super::design::Design;
use super::dist::{Continuous, Discrete};
use super::evaluate::{EvaluateError, Evaluation, Planned, within};
use super::model::Sampling;
use super::sample_size::N_MAX_DISCRETE;
use super::threshold::{Alternative, ContinuousCut, DiscreteCut, continuous_errors, discrete_errors};
use serde::Serialize;

/// Sampling densities (continuous) or masses (discrete) on a common axis.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Densities {
    /// Statistic values (counts for discrete statistics).
    pub x: Vec<f64>,
    /// The same points on the estimate's scale.
    pub estimate: Vec<f64>,
    pub h0: Vec<f64>,
    pub h1: Vec<f64>,
    pub discrete: bool,
}

/// A point of a curve with the threshold that produces it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ErrorPoint {
    /// The threshold on the statistic's scale (two-sided: the half-width).
    pub threshold: f64,
    pub alpha: f64,
    pub beta: f64,
}

/// α* and β* at one n, with the verdict there.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ByN {
    pub n1: u64,
    pub alpha: f64,
    pub beta: f64,
    /// The design is conclusive at this n, as `evaluate::within` decides:
    /// the charts show this flag and never compare the errors with the
    /// limits themselves.
    pub conclusive: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Curves {
    pub densities: Densities,
    /// The error trade-off as the threshold slides: ROC = (α, 1 − β), and
    /// total error α + β against the threshold, from the same points.
    pub tradeoff: Vec<ErrorPoint>,
    /// The Youden point (α*, β*) and its threshold.
    pub youden: ErrorPoint,
    pub by_n: Vec<ByN>,
}

const POINTS: usize = 201;

/// Build every curve for the design as evaluated at `at`, with α*, β*
/// against n over [n_min, n_hi].
pub fn curves(design: &Design, at: &Evaluation, n_hi: u64) -> Result<Curves, EvaluateError> {
    let m = &at.model;
    let est = |t: f64| m.offset + m.slope * t;
    let centre = m.setup.centre;
    let two_sided = design.alternative == Alternative::TwoSided;
    let youden_threshold = match at.cut {
        super::evaluate::Cut::Continuous(ContinuousCut::Above(c) | ContinuousCut::Below(c)) => c,
        super::evaluate::Cut::Continuous(ContinuousCut::Outside { half_width, .. }) => half_width,
        super::evaluate::Cut::Discrete(DiscreteCut::AtLeast(k) | DiscreteCut::AtMost(k)) => k as f64,
        super::evaluate::Cut::Discrete(DiscreteCut::Outside { half_width, .. }) => half_width,
    };
    let youden = ErrorPoint { threshold: youden_threshold, alpha: at.alpha, beta: at.beta };
    let (densities, tradeoff) = match &m.sampling {
        Sampling::Continuous { h0, h1 } => {
            let lo = h0.quantile(1e-4)?.min(h1.quantile(1e-4)?);
            let hi = h0.quantile_upper(1e-4)?.max(h1.quantile_upper(1e-4)?);
            let x: Vec<f64> = (0..POINTS).map(|i| lo + (hi - lo) * i as f64 / (POINTS - 1) as f64).collect();
            let d = Densities {
                estimate: x.iter().map(|&t| est(t)).collect(),
                h0: x.iter().map(|&t| h0.pdf(t)).collect(),
                h1: x.iter().map(|&t| h1.pdf(t)).collect(),
                x: x.clone(),
                discrete: false,
            };
            let tradeoff = if two_sided {
                let reach = (lo - centre).abs().max((hi - centre).abs());
                (0..POINTS)
                    .map(|i| {
                        let c = reach * i as f64 / (POINTS - 1) as f64;
                        let e = continuous_errors(h0, h1, ContinuousCut::Outside { centre, half_width: c });
                        ErrorPoint { threshold: c, alpha: e.alpha, beta: e.beta }
                    })
                    .collect()
            } else {
                x.iter()
                    .map(|&c| {
                        let cut = if design.alternative == Alternative::Greater { ContinuousCut::Above(c) } else { ContinuousCut::Below(c) };
                        let e = continuous_errors(h0, h1, cut);
                        ErrorPoint { threshold: c, alpha: e.alpha, beta: e.beta }
                    })
                    .collect()
            };
            (d, tradeoff)
        }
        Sampling::Discrete { h0, h1 } => {
            let lo = h0.quantile(1e-4)?.min(h1.quantile(1e-4)?);
            let hi = h0.quantile_upper(1e-4)?.max(h1.quantile_upper(1e-4)?);
            let stride = ((hi - lo) / (2 * POINTS as u64)).max(1);
            let ks: Vec<u64> = (lo..=hi).step_by(stride as usize).collect();
            let d = Densities {
                x: ks.iter().map(|&k| k as f64).collect(),
                estimate: ks.iter().map(|&k| est(k as f64)).collect(),
                h0: ks.iter().map(|&k| h0.pmf(k)).collect(),
                h1: ks.iter().map(|&k| h1.pmf(k)).collect(),
                discrete: true,
            };
            let support = h0.support_max();
            let tradeoff = ks
                .iter()
                .map(|&k| {
                    let cut = match design.alternative {
                        Alternative::Greater => DiscreteCut::AtLeast(k as i64),
                        Alternative::Less => DiscreteCut::AtMost(k as i64),
                        Alternative::TwoSided => DiscreteCut::outside(centre, (k as f64 - centre).abs(), support),
                    };
                    let e = discrete_errors(h0, h1, cut);
                    let threshold = if two_sided { (k as f64 - centre).abs() } else { k as f64 };
                    ErrorPoint { threshold, alpha: e.alpha, beta: e.beta }
                })
                .collect::<Vec<_>>();
            let mut tradeoff = tradeoff;
            if two_sided {
                tradeoff.sort_by(|a, b| a.threshold.total_cmp(&b.threshold));
                tradeoff.dedup_by(|a, b| (a.threshold - b.threshold).abs() < 1e-9);
            }
            (d, tradeoff)
        }
    };
    let by_n = by_n(design, n_hi)?;
    Ok(Curves { densities, tradeoff, youden, by_n })
}

/// α*, β* at about 80 values of n from the smallest admissible to `n_hi`
/// (geometric spacing; every n for short ranges). For the exact binomial
/// the curve stops at the search's bound, [`N_MAX_DISCRETE`]: an exact
/// two-sided solve near n = 10,000,000 takes about a second, and the
/// chart would need a score of them.
fn by_n(design: &Design, n_hi: u64) -> Result<Vec<ByN>, EvaluateError> {
    let lo = design.n_min();
    let n_hi = if design.family.discrete() { n_hi.min(N_MAX_DISCRETE) } else { n_hi };
    let hi = n_hi.max(lo + 1);
    let mut ns: Vec<u64> = Vec::new();
    let steps = 80u64;
    if hi - lo <= steps {
        ns.extend(lo..=hi);
    } else {
        let ratio = (hi as f64 / lo as f64).powf(1.0 / steps as f64);
        let mut v = lo as f64;
        for _ in 0..=steps {
            ns.push(v.round() as u64);
            v *= ratio;
        }
        ns.push(hi);
        ns.sort_unstable();
        ns.dedup();
    }
    let mut planned = Planned::new(design);
    ns.into_iter()
        .map(|n| {
            let e = planned.at(n)?;
            Ok(ByN { n1: n, alpha: e.alpha, beta: e.beta, conclusive: within(design, &e) })
        })
        .collect()
}
