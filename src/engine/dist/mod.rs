//! Probability distributions behind one interface.
//!
//! Every distribution is a small validated value (its constructor rejects bad
//! parameters with a [`DistError`] that names the parameter, its value and the
//! rule) and exposes the same operations: density, lower tail, upper tail and
//! both quantiles. Callers never write `1.0 - cdf(x)`: the upper tail has its
//! own function because the subtraction destroys accuracy in the tail.

mod binomial;
mod chi_square;
mod noncentral_t;
mod normal;
mod poisson;
mod special;
mod student_t;
mod t_beta;
mod t_integral;

pub use binomial::Binomial;
pub use chi_square::ScaledChiSquare;
pub use noncentral_t::NoncentralT;
pub use normal::Normal;
pub use poisson::Poisson;
pub use student_t::StudentT;

/// A parameter or argument was outside the distribution's domain, or an
/// iterative computation failed. Messages are written for the end user.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DistError {
    /// A parameter broke its rule, e.g. `sd is -1, but must be > 0`.
    #[error("{name} is {value_shown}, but must be {rule}", value_shown = crate::engine::shown::Num(*value))]
    Parameter { name: &'static str, value: f64, rule: &'static str },
    /// A probability passed to a quantile was outside [0, 1] or NaN.
    #[error("probability is {0}, but must be between 0 and 1")]
    Probability(f64),
    /// An iterative method (series, quadrature, root search) did not reach
    /// its tolerance within its budget.
    #[error("{what} did not converge within {iterations} iterations")]
    DidNotConverge { what: &'static str, iterations: usize },
}

/// Check a parameter with a predicate; `rule` completes "must be ...".
pub(crate) fn check(
    name: &'static str,
    value: f64,
    ok: bool,
    rule: &'static str,
) -> Result<f64, DistError> {
    if ok && !value.is_nan() {
        Ok(value)
    } else {
        Err(DistError::Parameter { name, value, rule })
    }
}

/// A continuous distribution on (part of) the real line.
///
/// Contract for implementors: `cdf(x) + sf(x) == 1` up to rounding, and each
/// of them keeps full *relative* accuracy in its own tail (`sf` far right,
/// `cdf` far left). `pdf` and `ln_pdf` return 0 and `-inf` outside the
/// support. None of these functions panics for any `f64` argument, NaN
/// included (NaN in, NaN out).
pub trait Continuous {
    /// Density f(x).
    fn pdf(&self, x: f64) -> f64;
    /// Natural log of the density; finite wherever f(x) > 0, even where f(x)
    /// underflows to 0 in `f64`.
    fn ln_pdf(&self, x: f64) -> f64;
    /// ln f(x) with its first and second derivatives in x, for Halley and
    /// Newton steps on density crossings. The derivatives may be NaN (the
    /// default) when they have no cheap form; callers then bracket instead.
    /// Cheaper than separate calls where the density is an integral: all
    /// three come from the same nodes.
    fn ln_pdf_derivatives(&self, x: f64) -> (f64, f64, f64) {
        (self.ln_pdf(x), f64::NAN, f64::NAN)
    }
    /// Lower tail P(X ≤ x).
    fn cdf(&self, x: f64) -> f64;
    /// Upper tail P(X > x).
    fn sf(&self, x: f64) -> f64;
    /// The x with P(X ≤ x) = p, for p in [0, 1] (0 and 1 give the support's
    /// ends, possibly infinite).
    fn quantile(&self, p: f64) -> Result<f64, DistError>;
    /// The x with P(X > x) = q, for q in [0, 1]; accurate for tiny q.
    fn quantile_upper(&self, q: f64) -> Result<f64, DistError>;
    /// A central value (mean or mode) used to bracket searches.
    fn centre(&self) -> f64;
    /// A spread (standard deviation or a comparable scale) used to bracket
    /// searches; always finite and > 0.
    fn spread(&self) -> f64;
    /// (mean, sd) when the distribution is normal, so that solvers can use
    /// closed forms; `None` otherwise.
    fn normal_parameters(&self) -> Option<(f64, f64)> {
        None
    }
}

/// A distribution on the non-negative integers 0, 1, 2, ... (with an upper
/// end `support_max` where there is one).
///
/// Same contract as [`Continuous`]: `cdf` and `sf` are complements, each
/// accurate in its own tail; nothing panics.
pub trait Discrete {
    /// Mass P(X = k).
    fn pmf(&self, k: u64) -> f64;
    /// Natural log of the mass; `-inf` outside the support.
    fn ln_pmf(&self, k: u64) -> f64;
    /// Lower tail P(X ≤ k).
    fn cdf(&self, k: u64) -> f64;
    /// Upper tail P(X > k).
    fn sf(&self, k: u64) -> f64;
    /// Smallest k with P(X ≤ k) ≥ p.
    fn quantile(&self, p: f64) -> Result<u64, DistError>;
    /// Smallest k with P(X > k) ≤ q.
    fn quantile_upper(&self, q: f64) -> Result<u64, DistError>;
    /// Largest value with positive mass (`u64::MAX` when unbounded).
    fn support_max(&self) -> u64;
    /// The mean, used to bracket searches.
    fn centre(&self) -> f64;
}
