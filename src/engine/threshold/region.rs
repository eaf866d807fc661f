//! Rejection regions and their errors: the cuts a threshold search
//! returns and α and β of each.

use crate::engine::dist::{Continuous, Discrete};

/// The rejection region of a continuous statistic T. Infinite values are
/// allowed: `Above(+∞)` never rejects, `Above(−∞)` always rejects.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ContinuousCut {
    /// Reject when T > c.
    Above(f64),
    /// Reject when T < c.
    Below(f64),
    /// Reject when |T − centre| > half_width.
    Outside { centre: f64, half_width: f64 },
}

/// The rejection region of a count X.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DiscreteCut {
    /// Reject when X ≥ k (k = support max + 1: never).
    AtLeast(i64),
    /// Reject when X ≤ k (k = −1: never).
    AtMost(i64),
    /// Reject when |X − centre| > half_width (half_width < 0: always);
    /// equivalently X ≤ low or X ≥ high, a side being `None` when empty.
    Outside { centre: f64, half_width: f64, low: Option<i64>, high: Option<i64> },
}

/// Errors of a rejection region.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Errors {
    /// Type I error rate P0(reject).
    pub alpha: f64,
    /// Type II error rate P1(do not reject) at θ1.
    pub beta: f64,
}

impl Errors {
    pub fn weighted(&self, w: f64) -> f64 {
        w * self.alpha + (1.0 - w) * self.beta
    }
}


/// α and β of a continuous rejection region.
pub fn continuous_errors<C0: Continuous, C1: Continuous>(h0: &C0, h1: &C1, cut: ContinuousCut) -> Errors {
    match cut {
        // Clamped like the two-sided and discrete branches: a tail computed
        // by quadrature or series may overshoot 1 by rounding.
        ContinuousCut::Above(c) => Errors { alpha: h0.sf(c).clamp(0.0, 1.0), beta: h1.cdf(c).clamp(0.0, 1.0) },
        ContinuousCut::Below(c) => Errors { alpha: h0.cdf(c).clamp(0.0, 1.0), beta: h1.sf(c).clamp(0.0, 1.0) },
        ContinuousCut::Outside { centre, half_width } => {
            let (lo, hi) = (centre - half_width, centre + half_width);
            let alpha = h0.cdf(lo) + h0.sf(hi);
            // P1(lo ≤ T ≤ hi), from the tail that is smaller so that the
            // difference keeps its digits.
            let below_hi = h1.cdf(hi);
            let beta = if below_hi <= 0.5 { below_hi - h1.cdf(lo) } else { h1.sf(lo) - h1.sf(hi) };
            Errors { alpha: alpha.min(1.0), beta: beta.clamp(0.0, 1.0) }
        }
    }
}

/// α and β of a discrete rejection region.
pub fn discrete_errors<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, cut: DiscreteCut) -> Errors {
    // P(X ≥ k) and P(X ≤ k) for any integer k, support ends included.
    let at_least = |d: &dyn DiscreteTail, k: i64| if k <= 0 { 1.0 } else { d.sf_k(k as u64 - 1) };
    let at_most = |d: &dyn DiscreteTail, k: i64| if k < 0 { 0.0 } else { d.cdf_k(k as u64) };
    match cut {
        DiscreteCut::AtLeast(k) => Errors { alpha: at_least(h0, k), beta: 1.0_f64.min(at_most(h1, k - 1)) },
        DiscreteCut::AtMost(k) => Errors { alpha: at_most(h0, k), beta: at_least(h1, k + 1) },
        DiscreteCut::Outside { low, high, .. } => {
            let alpha = low.map_or(0.0, |k| at_most(h0, k)) + high.map_or(0.0, |k| at_least(h0, k));
            // Accepted: low+1 ..= high−1.
            let a = low.map_or(0, |k| k + 1);
            let b = high.map_or(i64::MAX, |k| k - 1);
            let beta = if a > b {
                0.0
            } else {
                // P1(a ≤ X ≤ b) from whichever tail is small, so that a tiny
                // β keeps its digits.
                let upto_b = if b == i64::MAX { 1.0 } else { at_most(h1, b) };
                let below_a = if a <= 0 { 0.0 } else { at_most(h1, a - 1) };
                if upto_b <= 0.5 {
                    (upto_b - below_a).max(0.0)
                } else {
                    let from_a = if a <= 0 { 1.0 } else { at_least(h1, a) };
                    let above_b = if b == i64::MAX { 0.0 } else { at_least(h1, b + 1) };
                    (from_a - above_b).max(0.0)
                }
            };
            Errors { alpha: alpha.min(1.0), beta }
        }
    }
}

/// Object-safe access to the two tails, so the closures above can take
/// either distribution.
trait DiscreteTail {
    fn cdf_k(&self, k: u64) -> f64;
    fn sf_k(&self, k: u64) -> f64;
}

impl<D: Discrete> DiscreteTail for D {
    fn cdf_k(&self, k: u64) -> f64 {
        self.cdf(k)
    }
    fn sf_k(&self, k: u64) -> f64 {
        self.sf(k)
    }
}
