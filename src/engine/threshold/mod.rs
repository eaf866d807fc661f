//! The Youden threshold: the critical value c* that minimises the (weighted)
//! total error w·α(c) + (1 − w)·β(c), for continuous and discrete statistics.
//!
//! Conventions (direction, the two-sided rule |T − t0| > c, ties) are those
//! of DEVELOPERS.md, "Statistical conventions". A continuous c* is a root of
//! ln((1 − w)·f1) − ln(w·f0) (one-sided; the two-sided form sums the
//! densities at t0 ± c), found by Halley's method (`root::halley`) with the
//! densities' exact derivatives where they cross once, else (or whenever it
//! returns an error) by Brent's method from a bracket; never read off a
//! grid. A discrete c* is found exactly: the difference of the error
//! between neighbouring cut-offs is a difference of masses, so the walk
//! follows the likelihood ratio.
//!
//! In reading order: `region` (the cuts, which values they reject, their α
//! and β, the two-sided count tolerance), `continuous` (the continuous
//! solve), `mass_window` (the counts that carry mass), `one_sided_counts`
//! and `two_sided_counts` (the discrete solves).

mod continuous;
mod mass_window;
mod one_sided_counts;
mod region;
mod two_sided_counts;

pub use continuous::solve_continuous;
pub(crate) use mass_window::{first_true, first_true_from, mass_window};
pub use region::{ContinuousCut, DiscreteCut, Errors, continuous_errors, discrete_alpha, discrete_errors, distance_tolerance, same_distance};

use super::dist::{DistError, Discrete};
use super::root::RootError;
use serde::{Deserialize, Serialize};

/// Which values of θ the alternative hypothesis covers.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Alternative {
    /// θ1 > θ0: reject for large T.
    Greater,
    /// θ1 < θ0: reject for small T.
    Less,
    /// θ = θ0 ± δ: reject for T far from t0 on either side.
    TwoSided,
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ThresholdError {
    #[error(transparent)]
    Root(#[from] RootError),
    #[error(transparent)]
    Dist(#[from] DistError),
    #[error("the cost weight is {0}, but must be between 0 and 1 (exclusive)")]
    Weight(f64),
}

/// The Youden (or cost-weighted) threshold of a continuous statistic.
#[derive(Debug, Clone, PartialEq)]
pub struct ContinuousSolution {
    pub cut: ContinuousCut,
    pub errors: Errors,
    /// Function evaluations of the root searches, for diagnostics.
    pub iterations: usize,
}

/// The Youden (or cost-weighted) threshold of a count, with its ties.
#[derive(Debug, Clone, PartialEq)]
pub struct DiscreteSolution {
    pub cut: DiscreteCut,
    pub errors: Errors,
    /// Every cut-off whose weighted error equals the minimum within 1e-12
    /// relative, the pick included, in increasing order of k.
    pub ties: Vec<DiscreteCut>,
    /// The work the solve took, in counts walked (a tail sum counting as
    /// [`TAIL_WORK`]): for callers that budget many solves.
    pub work: u64,
}

/// The work charged for one pair of tail sums (α and β of a region).
pub const TAIL_WORK: u64 = 64;

/// Relative closeness under which two weighted errors count as tied.
pub const TIE_TOLERANCE: f64 = 1e-12;

/// What the threshold search knows about a pair of sampling distributions.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Setup {
    pub alternative: Alternative,
    /// t0: the value of T when the estimate equals θ0 (two-sided centre).
    pub centre: f64,
    /// Cost weight w in (0, 1); ½ is Youden's case.
    pub weight: f64,
    /// True when f1/f0 is monotone (monotone likelihood ratio) so that the
    /// densities cross exactly once; false makes the search look for every
    /// crossing (normal approximations whose variance differs under H1).
    pub single_crossing: bool,
}

fn check_weight(w: f64) -> Result<f64, ThresholdError> {
    if w > 0.0 && w < 1.0 { Ok(w) } else { Err(ThresholdError::Weight(w)) }
}

/// Find the discrete threshold minimising w·α + (1 − w)·β, with its ties.
///
/// One-sided: the error changes between neighbouring cut-offs by
/// D(k) = (1 − w)·p1(k) − w·p0(k); under a monotone likelihood ratio the sign
/// of D changes once, so a bisection on the sign of ln((1−w)p1) − ln(w·p0)
/// finds the optimum in O(log n) mass evaluations. Two-sided: the acceptance
/// region grows by distance from the centre m0; the walk visits the
/// distinct distances near the optimum that bounds on the remaining mass
/// leave in contention (every one, for windows under 200 counts).
pub fn solve_discrete<D0: Discrete, D1: Discrete>(
    h0: &D0,
    h1: &D1,
    setup: Setup,
) -> Result<DiscreteSolution, ThresholdError> {
    let w = check_weight(setup.weight)?;
    Ok(match setup.alternative {
        Alternative::Greater => one_sided_counts::solve(h0, h1, true, w),
        Alternative::Less => one_sided_counts::solve(h0, h1, false, w),
        Alternative::TwoSided => two_sided_counts::solve(h0, h1, setup.centre, w),
    })
}
