//! Rejection regions and their errors: the cuts a threshold search returns,
//! which values each rejects, α and β of each, and the one tolerance with
//! which the two-sided count rule compares distances from its centre.
//!
//! Conventions: DEVELOPERS.md, "Statistical conventions" (strict
//! inequalities for a continuous T, X ≥ k and X ≤ k for counts, the
//! two-sided count rule |X − m0| > c).

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

impl ContinuousCut {
    /// Does the region reject H0 at the statistic t? Strict inequalities:
    /// a t exactly at the threshold is not rejected.
    pub fn rejects(&self, t: f64) -> bool {
        match *self {
            ContinuousCut::Above(c) => t > c,
            ContinuousCut::Below(c) => t < c,
            ContinuousCut::Outside { centre, half_width } => (t - centre).abs() > half_width,
        }
    }
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

impl DiscreteCut {
    /// The two-sided count region |X − centre| > half_width as X ≤ low or
    /// X ≥ high, on the support 0..=`support`; distances within
    /// [`distance_tolerance`] of the half-width count as equal to it (not
    /// rejected).
    pub fn outside(centre: f64, half_width: f64, support: u64) -> DiscreteCut {
        let tol = distance_tolerance(centre);
        // Saturating: an infinite half-width gives no side (never rejects).
        let k_low = ((centre - half_width - tol).ceil() as i64).saturating_sub(1);
        let k_high = ((centre + half_width + tol).floor() as i64).saturating_add(1);
        DiscreteCut::Outside {
            centre,
            half_width,
            low: if k_low >= 0 { Some(k_low) } else { None },
            high: if k_high >= 0 && (k_high as u64) <= support { Some(k_high) } else { None },
        }
    }

    /// Does the region reject H0 at the count x (given as f64, the
    /// statistic's type)? X ≥ k, X ≤ k, and for the two-sided rule a
    /// distance from the centre beyond the half-width by more than
    /// [`distance_tolerance`], the rule [`DiscreteCut::outside`] turns into
    /// `low` and `high`.
    pub fn rejects(&self, x: f64) -> bool {
        match *self {
            DiscreteCut::AtLeast(k) => x >= k as f64,
            DiscreteCut::AtMost(k) => x <= k as f64,
            DiscreteCut::Outside { centre, half_width, .. } => (x - centre).abs() > half_width + distance_tolerance(centre),
        }
    }
}

/// The rounding absorbed when the two-sided count rule compares distances
/// |x − m0| of counts from the centre m0 (absolute, in counts):
/// 1e-9·(1 + |m0|). Two distances closer than this are the same distance.
///
/// What it absorbs: m0 = n·p0 is a rounded product, so the two counts a
/// half-integer m0 lies between (n = 35, p0 = 0.1: m0 = 3.5000000000000004)
/// get distances that differ by a few ulps of m0 (≈ 2.2e-16·|m0|) although
/// they are equal; the 1 covers m0 near 0, where the subtraction's own
/// rounding dominates. Why this size: it is some 10^6 times that rounding,
/// and still below the smallest gap between truly different distances a
/// stated p0 gives: two distances differ by an integer or by |x + y − 2·m0|,
/// which for a p0 with d decimals is 0 or at least 10^−d, above the
/// tolerance while 1 + |m0| < 10^(9 − d).
pub fn distance_tolerance(centre: f64) -> f64 {
    1e-9 * (1.0 + centre.abs())
}

/// Two counts' distances from m0 that are the same up to rounding of m0
/// (within [`distance_tolerance`]).
pub fn same_distance(a: f64, b: f64, m0: f64) -> bool {
    (a - b).abs() <= distance_tolerance(m0)
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

/// P(X ≥ k) for any integer k, support ends included.
fn at_least(d: &dyn DiscreteTail, k: i64) -> f64 {
    if k <= 0 { 1.0 } else { d.sf_k(k as u64 - 1) }
}

/// P(X ≤ k) for any integer k, support ends included.
fn at_most(d: &dyn DiscreteTail, k: i64) -> f64 {
    if k < 0 { 0.0 } else { d.cdf_k(k as u64) }
}

/// α alone of a discrete rejection region (H0's tails only): what a
/// search for a level needs, at half the cost of [`discrete_errors`].
pub fn discrete_alpha<D0: Discrete>(h0: &D0, cut: DiscreteCut) -> f64 {
    match cut {
        DiscreteCut::AtLeast(k) => at_least(h0, k),
        DiscreteCut::AtMost(k) => at_most(h0, k),
        DiscreteCut::Outside { low, high, .. } => (low.map_or(0.0, |k| at_most(h0, k)) + high.map_or(0.0, |k| at_least(h0, k))).min(1.0),
    }
}

/// α and β of a discrete rejection region.
pub fn discrete_errors<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, cut: DiscreteCut) -> Errors {
    match cut {
        DiscreteCut::AtLeast(k) => Errors { alpha: at_least(h0, k), beta: 1.0_f64.min(at_most(h1, k - 1)) },
        DiscreteCut::AtMost(k) => Errors { alpha: at_most(h0, k), beta: at_least(h1, k + 1) },
        DiscreteCut::Outside { low, high, .. } => {
            let alpha = discrete_alpha(h0, cut);
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
            Errors { alpha, beta }
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

#[cfg(test)]
mod tests {
    use super::*;

    /// The rejection rule of a two-sided count region says the same as its
    /// `low` and `high` for every count, also where the centre is a rounded
    /// half-integer (35 × 0.1 = 3.5000000000000004: the counts 3 and 4 are
    /// equally far from it) or an integer; the continuous rule is strict
    /// (DEVELOPERS.md, "Decision from summary data").
    #[test]
    fn one_rule_for_counts_and_their_bounds() {
        for (n, p0) in [(35u64, 0.1), (20, 0.5), (21, 0.5), (10, 0.3), (7, 0.05)] {
            let m0 = n as f64 * p0;
            let mut half_widths: Vec<f64> = (0..=n).map(|x| (x as f64 - m0).abs()).collect();
            half_widths.extend([-1.0, f64::INFINITY]);
            for c in half_widths {
                let cut = DiscreteCut::outside(m0, c, n);
                let DiscreteCut::Outside { low, high, .. } = cut else { panic!("not a two-sided region") };
                for x in 0..=n {
                    let by_bounds = low.is_some_and(|k| x as i64 <= k) || high.is_some_and(|k| x as i64 >= k);
                    assert_eq!(cut.rejects(x as f64), by_bounds, "n {n}, p0 {p0}, half-width {c}, x {x}");
                }
            }
        }
        assert!(!DiscreteCut::outside(3.5000000000000004, 0.5, 35).rejects(3.0));
        assert!(!DiscreteCut::outside(3.5000000000000004, 0.5, 35).rejects(4.0));
        assert!(DiscreteCut::AtLeast(3).rejects(3.0) && !DiscreteCut::AtLeast(3).rejects(2.0));
        assert!(DiscreteCut::AtMost(3).rejects(3.0) && !DiscreteCut::AtMost(3).rejects(4.0));
        assert!(!ContinuousCut::Above(1.5).rejects(1.5) && ContinuousCut::Above(1.5).rejects(1.6));
        assert!(!ContinuousCut::Below(1.5).rejects(1.5) && ContinuousCut::Below(1.5).rejects(1.4));
        let two = ContinuousCut::Outside { centre: 1.0, half_width: 2.0 };
        assert!(!two.rejects(3.0) && !two.rejects(-1.0) && two.rejects(3.1) && two.rejects(-1.1));
    }
}
