//! The Youden threshold: the critical value c* that minimises the (weighted)
//! total error w·α(c) + (1 − w)·β(c), for continuous and discrete statistics.
//!
//! Conventions (direction, the two-sided rule |T − t0| > c, ties) are those
//! of DEVELOPERS.md, "Statistical conventions". A continuous c* is a root of
//! ln((1 − w)·f1) − ln(w·f0) (one-sided; the two-sided form sums the
//! densities at t0 ± c), found by Halley's method with the densities' exact
//! derivatives where they cross once, else (or whenever it misbehaves) by
//! Brent's method from a bracket; never read off a grid. A discrete c* is
//! found exactly: the difference of the error between neighbouring cut-offs
//! is a difference of masses, so the walk follows the likelihood ratio.

use super::dist::{Continuous, DistError, Discrete, Normal};
use super::root::{RootError, Tolerance, brent, brent_from, expand};
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
}

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

/// ln(e^a + e^b) without overflow or underflow.
fn ln_add(a: f64, b: f64) -> f64 {
    let (hi, lo) = if a >= b { (a, b) } else { (b, a) };
    if hi == f64::NEG_INFINITY { hi } else { hi + (lo - hi).exp().ln_1p() }
}

fn check_weight(w: f64) -> Result<f64, ThresholdError> {
    if w > 0.0 && w < 1.0 { Ok(w) } else { Err(ThresholdError::Weight(w)) }
}

/// Find the continuous threshold c* minimising w·α + (1 − w)·β.
pub fn solve_continuous<C0: Continuous, C1: Continuous>(
    h0: &C0,
    h1: &C1,
    setup: Setup,
) -> Result<ContinuousSolution, ThresholdError> {
    let w = check_weight(setup.weight)?;
    let (lw0, lw1) = (w.ln(), (1.0 - w).ln());
    let spread = h0.spread().max(h1.spread());
    let mut iterations = 0usize;
    match setup.alternative {
        Alternative::Greater | Alternative::Less => {
            // g(c) > 0 where the weighted H1 density is the larger one.
            let g = |c: f64| (lw1 + h1.ln_pdf(c)) - (lw0 + h0.ln_pdf(c));
            let make = |c: f64| match setup.alternative {
                Alternative::Greater => ContinuousCut::Above(c),
                _ => ContinuousCut::Below(c),
            };
            let mut candidates = Vec::with_capacity(4);
            let (c0, c1) = (h0.centre(), h1.centre());
            // Under H1 above H0, g rises with c; below, it falls.
            let rising = c1 > c0;
            // Halley first: from the crossing of the equal-variance normal
            // shift with the same centres and weights, g and its slope
            // from the same density evaluations.
            let newton_root = if setup.single_crossing {
                let slope = (c1 - c0) / (h0.spread() * h1.spread());
                let start = 0.5 * (c0 + c1) - (lw1 - lw0) / slope;
                let gs = |c: f64| {
                    let ((l1, s1, k1), (l0, s0, k0)) = (h1.ln_pdf_derivatives(c), h0.ln_pdf_derivatives(c));
                    ((lw1 + l1) - (lw0 + l0), s1 - s0, k1 - k0)
                };
                newton(gs, start, rising, f64::NEG_INFINITY, spread, &mut iterations)
            } else {
                None
            };
            if let Some(x) = newton_root {
                candidates.push(x);
            } else if setup.single_crossing {
                let anchor = 0.5 * (h0.centre() + h1.centre());
                let ga = g(anchor);
                let direction = if (ga < 0.0) == rising { 1.0 } else { -1.0 };
                // First try a tight bracket around a Newton guess: near the
                // crossing g is close to the normal-shift line whose slope is
                // (c1 − c0)/(s0·s1).
                let slope = (c1 - c0) / (h0.spread() * h1.spread());
                let near = tight_bracket(&g, anchor, ga, -ga / slope);
                // No sign change anywhere means the likelihood ratio never
                // reaches w/(1 − w) (heavy t tails with a small effect or an
                // extreme weight): then one of the ends is optimal.
                let bracket = match near {
                    Some(b) => Some(b),
                    None => match expand(g, anchor, 0.25 * spread, direction, 80) {
                        Ok((lo, hi)) => Some(((lo, g(lo)), (hi, g(hi)))),
                        Err(RootError::NotBracketed { .. }) => None,
                        Err(e) => return Err(e.into()),
                    },
                };
                if let Some((lo, hi)) = bracket {
                    let root = brent_from(g, lo, hi, Tolerance::TIGHT)?;
                    iterations += root.iterations;
                    candidates.push(root.x);
                }
            } else {
                for x in crossings(g, h0, h1, &mut iterations)? {
                    candidates.push(x);
                }
            }
            // The ends (never and always reject) compete too.
            candidates.push(f64::INFINITY);
            candidates.push(f64::NEG_INFINITY);
            let best = pick(make(f64::INFINITY), candidates.into_iter().map(make), |cut| continuous_errors(h0, h1, cut), w);
            Ok(ContinuousSolution { cut: best.0, errors: best.1, iterations })
        }
        Alternative::TwoSided => {
            let t0 = setup.centre;
            let g = |c: f64| {
                let l1 = ln_add(h1.ln_pdf(t0 + c), h1.ln_pdf(t0 - c));
                let l0 = ln_add(h0.ln_pdf(t0 + c), h0.ln_pdf(t0 - c));
                (lw1 + l1) - (lw0 + l0)
            };
            let make = |c: f64| ContinuousCut::Outside { centre: t0, half_width: c };
            let mut candidates = vec![0.0, f64::INFINITY];
            let anchor = 0.5 * (h1.centre() - t0).abs();
            // Halley first (see the one-sided case), on the sums of the two
            // sides' densities: d/dc ln(f(t0+c) + f(t0−c)) is the
            // density-weighted mean of the slopes at t0 + c and −(slope at
            // t0 − c).
            let newton_root = if setup.single_crossing {
                // With F(c) = f(t0+c) + f(t0−c) and shares pa, pb of the two
                // terms: (ln F)' = pa·sa − pb·sb and
                // (ln F)'' = pa·(ka + sa²) + pb·(kb + sb²) − ((ln F)')².
                let side = |h: &dyn Continuous, c: f64| {
                    let ((la, sa, ka), (lb, sb, kb)) = (h.ln_pdf_derivatives(t0 + c), h.ln_pdf_derivatives(t0 - c));
                    let l = ln_add(la, lb);
                    let share = |lx: f64| if lx - l < -745.0 { 0.0 } else { (lx - l).exp() };
                    let (pa, pb) = (share(la), share(lb));
                    let part = |p: f64, x: f64| if p == 0.0 { 0.0 } else { p * x };
                    let slope = part(pa, sa) - part(pb, sb);
                    let curvature = part(pa, ka + sa * sa) + part(pb, kb + sb * sb) - slope * slope;
                    (l, slope, curvature)
                };
                let gs = |c: f64| {
                    let ((l1, s1, k1), (l0, s0, k0)) = (side(h1, c), side(h0, c));
                    ((lw1 + l1) - (lw0 + l0), s1 - s0, k1 - k0)
                };
                // Start from the same equation for normals with the two
                // laws' centres and spreads (cheap: closed-form densities).
                let slope = (h1.centre() - t0).abs() / (h0.spread() * h1.spread());
                let rough = (anchor - (lw1 - lw0) / slope).max(0.0);
                let start = match (Normal::new(h0.centre(), h0.spread()), Normal::new(h1.centre(), h1.spread())) {
                    (Ok(n0), Ok(n1)) => {
                        let gn = |c: f64| {
                            let ((l1, s1, k1), (l0, s0, k0)) = (side(&n1, c), side(&n0, c));
                            ((lw1 + l1) - (lw0 + l0), s1 - s0, k1 - k0)
                        };
                        newton(gn, rough, true, 0.0, spread, &mut 0).unwrap_or(rough)
                    }
                    _ => rough,
                };
                newton(gs, start, true, 0.0, spread, &mut iterations)
            } else {
                None
            };
            let single = if newton_root.is_some() {
                newton_root.map(|x| ((x, 0.0), (x, 0.0)))
            } else if setup.single_crossing {
                let ga = g(anchor);
                let direction = if ga < 0.0 { 1.0 } else { -1.0 };
                // Near the crossing the far-side terms are negligible and g
                // follows the one-sided normal-shift line (see above).
                let slope = (h1.centre() - t0).abs() / (h0.spread() * h1.spread());
                match tight_bracket(&g, anchor, ga, -ga / slope) {
                    Some(b) if b.0.0 >= 0.0 => Some(b),
                    // Moving left the search must stop at c = 0.
                    _ => match expand(g, anchor, 0.25 * spread, direction, 80) {
                        Ok((lo, hi)) if lo >= 0.0 => Some(((lo, g(lo)), (hi, g(hi)))),
                        Ok(_) | Err(_) => None,
                    },
                }
            } else {
                None
            };
            match single {
                Some(((x, _), _)) if newton_root.is_some() => candidates.push(x),
                Some((lo, hi)) => {
                    let root = brent_from(g, lo, hi, Tolerance::TIGHT)?;
                    iterations += root.iterations;
                    candidates.push(root.x);
                }
                None => {
                    let reach = (h1.centre() - t0).abs() + 40.0 * spread;
                    let grid = 400;
                    let mut prev = (0.0, g(0.0));
                    for i in 1..=grid {
                        let x = reach * i as f64 / grid as f64;
                        let gx = g(x);
                        if gx.is_finite() && prev.1.is_finite() && (gx > 0.0) != (prev.1 > 0.0) {
                            let root = brent(g, prev.0, x, Tolerance::TIGHT)?;
                            iterations += root.iterations;
                            candidates.push(root.x);
                        }
                        prev = (x, gx);
                    }
                }
            }
            let best = pick(make(f64::INFINITY), candidates.into_iter().map(make), |cut| continuous_errors(h0, h1, cut), w);
            Ok(ContinuousSolution { cut: best.0, errors: best.1, iterations })
        }
    }
}

/// Relative step below which Newton stops: the next (unevaluated) step
/// is then about its square, far below the 1e-13 the callers need.
const NEWTON_STOP: f64 = 1e-8;

/// A root of g by Halley's method with g's exact first and second
/// derivatives (`gs` returns all three; a non-finite second derivative or a
/// Halley factor outside [½, 2] falls back to the Newton step), from
/// `start`, for a g that crosses zero once, rising or falling as `rising`
/// says, on [floor, ∞). Safeguarded: the points seen keep a bracket and a
/// step leaving it is replaced by bisection. It stops when
/// the step falls below [`NEWTON_STOP`] relative (plus 1e-13 of `scale`),
/// returning the point after that step; (at least) quadratic convergence
/// makes its error about the step squared. `None` (the caller then brackets and runs
/// Brent's method) on a non-finite value, a slope of the wrong sign, a step
/// below `floor` or 12 evaluations without converging.
fn newton<G: Fn(f64) -> (f64, f64, f64)>(gs: G, start: f64, rising: bool, floor: f64, scale: f64, iterations: &mut usize) -> Option<f64> {
    let (mut lo, mut hi) = (floor, f64::INFINITY);
    let mut x = start;
    let mut last_step = f64::NAN;
    for _ in 0..12 {
        let (g, slope, curvature) = gs(x);
        *iterations += 1;
        if !g.is_finite() {
            return None;
        }
        if g == 0.0 {
            return Some(x);
        }
        // The root lies above x where g has not yet reached 0.
        if (g < 0.0) == rising {
            lo = lo.max(x);
        } else {
            hi = hi.min(x);
        }
        if !slope.is_finite() || slope == 0.0 || (slope > 0.0) != rising {
            return None;
        }
        let newton_step = g / slope;
        // Halley: divide by 1 − g·g''/(2g'²) (Press et al., Numerical
        // Recipes, 3rd ed., §9.4); cubic convergence from a fair start.
        let factor = 1.0 - 0.5 * newton_step * curvature / slope;
        let step = if factor.is_finite() && (0.5..=2.0).contains(&factor) { newton_step / factor } else { newton_step };
        let mut next = x - step;
        if !(next > lo && next < hi) {
            if !(lo.is_finite() && hi.is_finite()) {
                return None;
            }
            next = 0.5 * (lo + hi);
        } else if step.abs() <= NEWTON_STOP * x.abs() + 1e-13 * scale {
            return Some(next);
        } else if step.abs() <= 1e-4 * x.abs() && step.abs() <= 0.1 * last_step.abs() {
            // Quadratic convergence seen (e_next ≈ C·e², C from the last
            // two steps): stop when the predicted next error is negligible.
            let predicted = step * step * (step / (last_step * last_step)).abs();
            if predicted <= 1e-15 * x.abs() {
                return Some(next);
            }
        }
        last_step = step;
        x = next;
    }
    None
}

/// Two points 3 % either side of anchor + step; returns them (with g) when
/// g changes sign between them, or the anchor and the nearer point when the
/// sign changes there; `None` otherwise (the caller widens the search).
fn tight_bracket<G: Fn(f64) -> f64>(g: &G, anchor: f64, ga: f64, step: f64) -> Option<((f64, f64), (f64, f64))> {
    if !step.is_finite() || step == 0.0 || ga == 0.0 {
        return None;
    }
    let (x1, x2) = (anchor + 0.97 * step, anchor + 1.03 * step);
    let (g1, g2) = (g(x1), g(x2));
    if !(g1.is_finite() && g2.is_finite()) {
        return None;
    }
    let ordered = |a: (f64, f64), b: (f64, f64)| if a.0 < b.0 { (a, b) } else { (b, a) };
    if (g1 > 0.0) != (g2 > 0.0) {
        Some(ordered((x1, g1), (x2, g2)))
    } else if (ga > 0.0) != (g1 > 0.0) {
        Some(ordered((anchor, ga), (x1, g1)))
    } else {
        None
    }
}

/// Every sign change of g over the central range of both distributions,
/// polished by Brent's method. The scan only brackets; the roots are exact.
fn crossings<G: Fn(f64) -> f64, C0: Continuous, C1: Continuous>(
    g: G,
    h0: &C0,
    h1: &C1,
    iterations: &mut usize,
) -> Result<Vec<f64>, ThresholdError> {
    if let (Some(a), Some(b)) = (h0.normal_parameters(), h1.normal_parameters()) {
        return Ok(normal_crossings(a, b, &g));
    }
    let lo = (h0.centre() - 40.0 * h0.spread()).min(h1.centre() - 40.0 * h1.spread());
    let hi = (h0.centre() + 40.0 * h0.spread()).max(h1.centre() + 40.0 * h1.spread());
    let grid = 800;
    let mut roots = Vec::new();
    let mut prev = (lo, g(lo));
    for i in 1..=grid {
        let x = lo + (hi - lo) * i as f64 / grid as f64;
        let gx = g(x);
        if gx.is_finite() && prev.1.is_finite() && (gx > 0.0) != (prev.1 > 0.0) {
            let root = brent(&g, prev.0, x, Tolerance::TIGHT)?;
            *iterations += root.iterations;
            roots.push(root.x);
        }
        prev = (x, gx);
    }
    Ok(roots)
}

/// Where the weighted log-densities of two normals cross: the roots of the
/// quadratic (c − m0)²/(2s0²) − (c − m1)²/(2s1²) + ln((1−w)s0/(w s1)) = 0,
/// taken in the cancellation-free form, then polished by one Newton step on
/// `g` itself (its derivative is (c − m0)/s0² − (c − m1)/s1²).
fn normal_crossings<G: Fn(f64) -> f64>((m0, s0): (f64, f64), (m1, s1): (f64, f64), g: &G) -> Vec<f64> {
    let (v0, v1) = (s0 * s0, s1 * s1);
    let a = 0.5 / v0 - 0.5 / v1;
    let b = m1 / v1 - m0 / v0;
    // g(c) = a·c² + b·c + C, so C = g(0).
    let c = g(0.0);
    let mut roots = Vec::with_capacity(2);
    if a.abs() <= 1e-14 * (0.5 / v0).max(0.5 / v1) {
        if b != 0.0 {
            roots.push(-c / b);
        }
    } else {
        let disc = b * b - 4.0 * a * c;
        if disc >= 0.0 {
            let q = -0.5 * (b + b.signum() * disc.sqrt());
            if q != 0.0 {
                roots.push(q / a);
                roots.push(c / q);
            } else {
                roots.push(0.0);
            }
        }
    }
    for r in roots.iter_mut() {
        let slope = (*r - m0) / v0 - (*r - m1) / v1;
        let step = g(*r) / slope;
        if step.is_finite() {
            *r -= step;
        }
    }
    roots.retain(|r| r.is_finite());
    roots
}

/// The candidate with the smallest weighted error; ties (within
/// [`TIE_TOLERANCE`]) go to the smaller α.
fn pick<T: Copy, I: IntoIterator<Item = T>, E: Fn(T) -> Errors>(first: T, rest: I, errors: E, w: f64) -> (T, Errors) {
    let mut best = (first, errors(first));
    for cut in rest {
        let e = errors(cut);
        let (x, y) = (e.weighted(w), best.1.weighted(w));
        if x < y * (1.0 - TIE_TOLERANCE) || (x <= y * (1.0 + TIE_TOLERANCE) && e.alpha < best.1.alpha) {
            best = (cut, e);
        }
    }
    best
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
    let (lw0, lw1) = (w.ln(), (1.0 - w).ln());
    // Counts above `top()` carry mass below 1e-300 under both.
    let top = || mass_window_last(h0).max(mass_window_last(h1));
    // Sign of D(k): > 0 where the weighted H1 mass is larger.
    let d = |k: u64| (lw1 + h1.ln_pmf(k)) - (lw0 + h0.ln_pmf(k));
    let errors = |cut| discrete_errors(h0, h1, cut);
    // (1 − w)·p1(x) − w·p0(x), 0 off the support.
    let mass_step = |x: i64| if x < 0 { 0.0 } else { (1.0 - w) * h1.pmf(x as u64) - w * h0.pmf(x as u64) };
    match setup.alternative {
        Alternative::Greater => {
            // Smallest k in [0, top] with D(k) ≥ 0; none: never reject.
            let k = match quick_first(h0, h1, &d, |v| v >= 0.0) {
                Some(k) => k as i64,
                None => {
                    let top = top();
                    first_true(0, top, |k| d(k) >= 0.0).map_or(top as i64 + 1, |k| k as i64)
                }
            };
            let cut = DiscreteCut::AtLeast;
            // Rejecting X ≥ j + 1 instead of X ≥ j accepts X = j.
            Ok(with_ties(
                k,
                cut,
                &errors,
                w,
                |c| match c {
                    DiscreteCut::AtLeast(k) => k,
                    _ => 0,
                },
                mass_step,
            ))
        }
        Alternative::Less => {
            // Largest k with D(k) ≥ 0, i.e. one below the first k with D < 0.
            let k = match quick_first(h0, h1, &d, |v| v < 0.0) {
                Some(k) => k as i64 - 1,
                None => {
                    let top = top();
                    match first_true(0, top, |k| d(k) < 0.0) {
                        Some(k) => k as i64 - 1,
                        None => top as i64,
                    }
                }
            };
            // Rejecting X ≤ j + 1 instead of X ≤ j rejects X = j + 1.
            Ok(with_ties(
                k,
                DiscreteCut::AtMost,
                &errors,
                w,
                |c| match c {
                    DiscreteCut::AtMost(k) => k,
                    _ => 0,
                },
                |j| -mass_step(j + 1),
            ))
        }
        Alternative::TwoSided => {
            // Counts outside [first, top] carry mass below 1e-300 under both.
            let first = mass_window_first(h0).min(mass_window_first(h1));
            Ok(solve_discrete_two_sided(h0, h1, setup.centre, w, first, top()))
        }
    }
}

/// The first k where `pred(D(k))` holds, for the one-sided solves, found
/// without the mass window when that gives the same answer: over the whole
/// support of two laws with the same finite support, D(k) = ln p1(k) −
/// ln p0(k) + const is linear in k (binomials of one n share their
/// binomial coefficient), so the crossing is interpolated from the two
/// ends and confirmed at k and k − 1, with a bisection inside the bracket
/// the guess leaves when it misses. The answer is then the one a search
/// over the mass window [0, top] gives exactly when k lies in that window,
/// which two masses at k show. `None` (the caller searches the window as
/// before): an unbounded support, no such k, or k outside the window.
fn quick_first<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, d: &dyn Fn(u64) -> f64, pred: fn(f64) -> bool) -> Option<u64> {
    let hi = h0.support_max();
    if hi != h1.support_max() || hi == u64::MAX {
        return None;
    }
    let (dl, dh) = (d(0), d(hi));
    if !(dl.is_finite() && dh.is_finite() && pred(dh)) {
        return None;
    }
    let k = if pred(dl) {
        0
    } else {
        let t = (-dl / (dh - dl)).clamp(0.0, 1.0);
        let g = ((t * hi as f64).ceil() as u64).clamp(1, hi);
        match (pred(d(g)), pred(d(g - 1))) {
            (true, false) => g,
            (true, true) => first_true(0, g - 1, |k| pred(d(k)))?,
            (false, _) => first_true(g + 1, hi, |k| pred(d(k)))?,
        }
    };
    // In the window of either law: at or below its mode, or its mass there
    // above the window's cut-off.
    let inside = |mode: u64, cutoff: f64, ln_pmf: f64| k <= mode || ln_pmf >= cutoff;
    let (m0, c0) = window_mode(h0);
    let (m1, c1) = window_mode(h1);
    (inside(m0, c0, h0.ln_pmf(k)) || inside(m1, c1, h1.ln_pmf(k))).then_some(k)
}

/// The counts [first, last] outside which the mass is below e^−745 (the
/// smallest f64) times the mass at the mode, found by bisection on the
/// unimodal log-mass: O(log n) evaluations instead of a tail search.
pub(crate) fn mass_window<D: Discrete>(d: &D) -> (u64, u64) {
    (mass_window_first(d), mass_window_last(d))
}

/// The first count of [`mass_window`] alone.
fn mass_window_first<D: Discrete>(d: &D) -> u64 {
    let (mode, cutoff) = window_mode(d);
    first_true(0, mode, |k| d.ln_pmf(k) >= cutoff).unwrap_or(mode)
}

/// The last count of [`mass_window`] alone (all a one-sided solve needs).
fn mass_window_last<D: Discrete>(d: &D) -> u64 {
    let (mode, cutoff) = window_mode(d);
    window_last(d, mode, cutoff)
}

/// The mode (floor of the centre) and the log-mass cut-off of the window.
fn window_mode<D: Discrete>(d: &D) -> (u64, f64) {
    let mode = (d.centre().max(0.0).floor() as u64).min(d.support_max());
    (mode, d.ln_pmf(mode) - 745.0)
}

fn window_last<D: Discrete>(d: &D, mode: u64, cutoff: f64) -> u64 {
    let keep = |k: u64| d.ln_pmf(k) >= cutoff;
    // Upper end: the support's end, or doubling outward for unbounded laws.
    let support = d.support_max();
    let mut hi = support;
    if support == u64::MAX {
        let mut step = 1u64;
        hi = mode.saturating_add(step);
        for _ in 0..64 {
            if !keep(hi) {
                break;
            }
            step = step.saturating_mul(2);
            hi = mode.saturating_add(step);
        }
    }
    match first_true(mode, hi, |k| !keep(k)) {
        Some(k) => k.saturating_sub(1).max(mode),
        None => hi,
    }
}

/// Smallest k in [lo, hi] with `p(k)` true, for a predicate that is false
/// then true (monotone); `None` when false everywhere.
fn first_true<P: Fn(u64) -> bool>(lo: u64, hi: u64, p: P) -> Option<u64> {
    if !p(hi) {
        return None;
    }
    let (mut a, mut b) = (lo, hi);
    while a < b {
        let m = a + (b - a) / 2;
        if p(m) { b = m } else { a = m + 1 }
    }
    Some(a)
}

/// Gather the neighbours of `k` whose weighted error ties with it, and pick
/// the one with the smallest α. `step(j)` is E(j + 1) − E(j) from the two
/// masses: a neighbour whose summed steps exceed the tie tolerance tenfold
/// cannot tie (the tails agree with the masses to about 1e-15 of E), so its
/// tails are not computed; any other is judged from its tails as before.
fn with_ties<F, M, K, S>(k: i64, make: M, errors: &F, w: f64, key: K, step: S) -> DiscreteSolution
where
    F: Fn(DiscreteCut) -> Errors,
    M: Fn(i64) -> DiscreteCut,
    K: Fn(DiscreteCut) -> i64,
    S: Fn(i64) -> f64,
{
    let e = errors(make(k));
    let best = e.weighted(w);
    let scale = TIE_TOLERANCE * best.max(f64::MIN_POSITIVE);
    let tied = |x: &Errors| (x.weighted(w) - best).abs() <= scale;
    let mut ties = vec![(make(k), e)];
    for dir in [-1i64, 1] {
        let mut j = k + dir;
        // E(j) − E(k), from the masses.
        let mut moved = 0.0;
        // More than a handful of exact ties cannot happen under a monotone
        // likelihood ratio; the bound keeps the walk finite regardless.
        for _ in 0..4 {
            moved += if dir > 0 { step(j - 1) } else { -step(j) };
            if moved.abs() > 10.0 * scale {
                break;
            }
            let ej = errors(make(j));
            if !tied(&ej) {
                break;
            }
            ties.push((make(j), ej));
            j += dir;
        }
    }
    ties.sort_by_key(|(c, _)| key(*c));
    let (cut, errors) = ties
        .iter()
        .copied()
        .fold(ties[0], |acc, x| if x.1.alpha < acc.1.alpha { x } else { acc });
    DiscreteSolution { cut, errors, ties: ties.into_iter().map(|(c, _)| c).collect() }
}

fn solve_discrete_two_sided<D0: Discrete, D1: Discrete>(
    h0: &D0,
    h1: &D1,
    m0: f64,
    w: f64,
    first: u64,
    top: u64,
) -> DiscreteSolution {
    let candidates = match local_walk(h0, h1, m0, w, first, top) {
        Some(c) => c,
        None => full_walk(h0, h1, m0, w, first, top),
    };
    two_sided_pick(h0, h1, m0, w, candidates)
}

/// Two counts' distances from m0 that are the same up to rounding of m0.
fn same_distance(a: f64, b: f64, m0: f64) -> bool {
    (a - b).abs() <= 1e-9 * (1.0 + m0.abs())
}

/// Every candidate of the two-sided walk as (half-width, running weighted
/// error): the acceptance region grows outward from m0 by distance, E
/// starts at w (everything rejected, half-width −1) and each accepted count
/// changes it by (1 − w)·p1(x) − w·p0(x). The running sum only ranks
/// candidates; the winners are recomputed from the tails.
fn full_walk<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, m0: f64, w: f64, first: u64, top: u64) -> Vec<(f64, f64)> {
    let mut points: Vec<(f64, u64)> = (first..=top).map(|x| ((x as f64 - m0).abs(), x)).collect();
    points.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut candidates: Vec<(f64, f64)> = vec![(-1.0, w)];
    let mut e = w;
    let mut i = 0;
    while i < points.len() {
        let d0 = points[i].0;
        while i < points.len() && same_distance(points[i].0, d0, m0) {
            let x = points[i].1;
            e += (1.0 - w) * h1.pmf(x) - w * h0.pmf(x);
            i += 1;
        }
        candidates.push((d0, e));
    }
    candidates
}

/// Windows narrower than this are walked in full.
const LOCAL_WALK_FROM: u64 = 200;

/// The candidates of [`full_walk`] that can come within 1e-9 of the
/// minimum, found without visiting the whole mass window.
///
/// Why it is exact: under a monotone likelihood ratio the increment
/// (1 − w)·p1(x) − w·p0(x) is positive exactly on one side of a count x_c
/// (found by bisection), which lies on H1's side of m0. (i) Every region
/// that does not yet reach x_c has only negative increments, so its error
/// is at least that of the largest such region: the walk starts there, from
/// its error computed exactly from the tails. (ii) Once x_c is accepted,
/// the only negative increments left are those of the counts beyond the
/// far (H0-side) edge L, whose sum is at most w·P0(beyond L); so when
/// E − w·P0(beyond L) exceeds the minimum so far by more than the
/// closeness margin, no later region can come close, and the walk stops.
/// (iii) Inward from the start the error only grows, so only the few
/// regions still within the margin are listed. `None` (the caller walks in
/// full) for narrow windows or when x_c is not on H1's side of m0.
fn local_walk<D0: Discrete, D1: Discrete>(
    h0: &D0,
    h1: &D1,
    m0: f64,
    w: f64,
    first: u64,
    top: u64,
) -> Option<Vec<(f64, f64)>> {
    if top.saturating_sub(first) < LOCAL_WALK_FROM || !(m0 >= first as f64 && m0 <= top as f64) {
        return None;
    }
    let (lw0, lw1) = (w.ln(), (1.0 - w).ln());
    let ratio = |k: u64| (lw1 + h1.ln_pmf(k)) - (lw0 + h0.ln_pmf(k));
    let inc = |k: u64| (1.0 - w) * h1.pmf(k) - w * h0.pmf(k);
    let up = h1.centre() > h0.centre();
    // x_c: the first positive count (up) or the last one (down).
    let xc = if up {
        first_true(first, top, |k| ratio(k) >= 0.0)?
    } else {
        first_true(first, top, |k| ratio(k) < 0.0)?.checked_sub(1)?
    };
    let dc = (xc as f64 - m0).abs();
    if (up && xc as f64 <= m0) || (!up && xc as f64 >= m0) || xc < first || dc < 2.0 {
        return None;
    }
    let tol = 1e-9 * (1.0 + m0.abs());
    // (i) The largest region whose counts are all nearer than x_c.
    let mut lo = ((m0 - dc + tol).ceil().max(first as f64)) as u64;
    let mut hi = ((m0 + dc - tol).floor().min(top as f64)) as u64;
    if lo > hi {
        return None;
    }
    let region = |half_width: f64| super::conventional::outside(m0, half_width, h0.support_max());
    let (lo_start, hi_start) = (lo, hi);
    let d_start = (m0 - lo as f64).max(hi as f64 - m0);
    let mut e = discrete_errors(h0, h1, region(d_start)).weighted(w);
    let e_start = e;
    let mut candidates = vec![(d_start, e)];
    let mut best = e;
    // (ii) Outward. `beyond` is P0 of the counts past the H0-side edge.
    let exact_beyond = |lo: u64, hi: u64| if up { if lo == 0 { 0.0 } else { h0.cdf(lo - 1) } } else { h0.sf(hi) };
    let mut beyond = exact_beyond(lo, hi);
    let margin = |best: f64| best + 1e-9 * best.abs().max(1e-300);
    let mut steps = 0u32;
    loop {
        let dl = if lo > first { m0 - (lo - 1) as f64 } else { f64::INFINITY };
        let du = if hi < top { (hi + 1) as f64 - m0 } else { f64::INFINITY };
        let d0 = dl.min(du);
        if !d0.is_finite() {
            break;
        }
        if same_distance(dl, d0, m0) {
            lo -= 1;
            e += inc(lo);
            if up {
                beyond -= h0.pmf(lo);
            }
        }
        if same_distance(du, d0, m0) {
            hi += 1;
            e += inc(hi);
            if !up {
                beyond -= h0.pmf(hi);
            }
        }
        candidates.push((d0, e));
        best = best.min(e);
        steps += 1;
        let past_xc = if up { hi >= xc } else { lo <= xc };
        // The running `beyond` is only an estimate; the stop is confirmed
        // with the exact tail (at most every 16 steps).
        if past_xc && e - w * beyond.max(0.0) * (1.0 + 1e-6) > margin(best) && steps >= 16 {
            steps = 0;
            beyond = exact_beyond(lo, hi);
            if e - w * beyond > margin(best) {
                break;
            }
        }
    }
    // (iii) Inward from the start: removing a count with a negative
    // increment raises E, so stop at the first region past the margin.
    let (mut lo, mut hi, mut e) = (lo_start as i64, hi_start as i64, e_start);
    while e <= margin(best) && lo <= hi {
        let (dl, du) = (m0 - lo as f64, hi as f64 - m0);
        let d0 = dl.max(du);
        let (drop_lo, drop_hi) = (same_distance(dl, d0, m0), same_distance(du, d0, m0));
        if drop_lo {
            e -= inc(lo as u64);
        }
        if drop_hi && !(drop_lo && lo == hi) {
            e -= inc(hi as u64);
        }
        lo += drop_lo as i64;
        hi -= drop_hi as i64;
        if lo > hi {
            candidates.push((-1.0, w));
        } else {
            candidates.push(((m0 - lo as f64).max(hi as f64 - m0), e));
        }
    }
    Some(candidates)
}

/// From the walk's candidates to the solution: those within 1e-9 of the
/// smallest running error are recomputed from the tails, ties within
/// [`TIE_TOLERANCE`] are listed in order of half-width and the pick is the
/// smallest α.
fn two_sided_pick<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, m0: f64, w: f64, candidates: Vec<(f64, f64)>) -> DiscreteSolution {
    let support = h0.support_max();
    let region = |half_width: f64| super::conventional::outside(m0, half_width, support);
    let min = candidates.iter().map(|c| c.1).fold(f64::INFINITY, f64::min);
    // Anything close to the minimum in the running sum is re-evaluated.
    let mut close: Vec<(DiscreteCut, Errors)> = candidates
        .iter()
        .filter(|c| c.1 <= min + 1e-9 * min.abs().max(1e-300))
        .map(|c| {
            let cut = if c.0 < 0.0 {
                DiscreteCut::Outside { centre: m0, half_width: -1.0, low: None, high: Some(0) }
            } else {
                region(c.0)
            };
            (cut, discrete_errors(h0, h1, cut))
        })
        .collect();
    close.sort_by(|a, b| a.1.weighted(w).total_cmp(&b.1.weighted(w)));
    let best = close[0].1.weighted(w);
    close.retain(|c| c.1.weighted(w) <= best + TIE_TOLERANCE * best);
    let half = |c: &DiscreteCut| match c {
        DiscreteCut::Outside { half_width, .. } => *half_width,
        _ => 0.0,
    };
    close.sort_by(|a, b| half(&a.0).total_cmp(&half(&b.0)));
    close.dedup_by(|a, b| a.0 == b.0);
    let pickd = close.iter().copied().fold(close[0], |acc, x| if x.1.alpha < acc.1.alpha { x } else { acc });
    DiscreteSolution { cut: pickd.0, errors: pickd.1, ties: close.into_iter().map(|c| c.0).collect() }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::dist::Normal;

    fn setup(alternative: Alternative, weight: f64, single: bool) -> Setup {
        Setup { alternative, centre: 0.0, weight, single_crossing: single }
    }

    /// The one-sided discrete crossing found by interpolation over the
    /// support is the one the bisection over the mass window finds, or the
    /// quick path declines (`None`) and the window search runs as before.
    #[test]
    fn quick_crossing_agrees_with_the_window_search() {
        use crate::engine::dist::Binomial;
        let mut quick = 0;
        for n in [1u64, 2, 3, 7, 20, 61, 200, 1000, 5000] {
            for (p0, p1) in [(0.5, 0.6), (0.6, 0.8), (0.1, 0.05), (0.01, 0.02), (0.9, 0.95), (0.3, 0.1), (0.5, 0.501), (1e-4, 0.5)] {
                for w in [0.1, 0.5, 0.9] {
                    let (h0, h1) = (Binomial::new(n, p0).unwrap(), Binomial::new(n, p1).unwrap());
                    let (lw0, lw1) = (f64::ln(w), f64::ln(1.0 - w));
                    let d = |k: u64| (lw1 + h1.ln_pmf(k)) - (lw0 + h0.ln_pmf(k));
                    let top = mass_window_last(&h0).max(mass_window_last(&h1));
                    for pred in [(|v: f64| v >= 0.0) as fn(f64) -> bool, |v: f64| v < 0.0] {
                        if let Some(k) = quick_first(&h0, &h1, &d, pred) {
                            quick += 1;
                            assert_eq!(Some(k), first_true(0, top, |k| pred(d(k))), "n {n}, p0 {p0}, p1 {p1}, w {w}");
                        }
                    }
                }
            }
        }
        assert!(quick > 100, "the quick path ran only {quick} times");
    }

    /// Fact of the trade (common practice, no source): for a symmetric
    /// unimodal location shift the Youden threshold is the midpoint and
    /// α* = β* = Φ(−Δ/2).
    #[test]
    fn midpoint_for_a_normal_shift() {
        for (delta, single) in [(2.5, true), (0.7, true), (-1.3, true), (2.5, false), (-4.0, false)] {
            let h0 = Normal::STANDARD;
            let h1 = Normal::new(delta, 1.0).unwrap();
            let alt = if delta > 0.0 { Alternative::Greater } else { Alternative::Less };
            let s = solve_continuous(&h0, &h1, setup(alt, 0.5, single)).unwrap();
            let c = match s.cut {
                ContinuousCut::Above(c) | ContinuousCut::Below(c) => c,
                _ => f64::NAN,
            };
            assert!((c - delta / 2.0).abs() < 1e-14, "{delta}: {c}");
            let expect = crate::engine::dist::Normal::STANDARD.cdf(-delta.abs() / 2.0);
            assert!((s.errors.alpha - expect).abs() < 1e-15 && (s.errors.beta - expect).abs() < 1e-15);
        }
    }

    /// Cost weight: the threshold moves to where f1/f0 = w/(1 − w), i.e.
    /// c = Δ/2 + ln(w/(1−w))/Δ for unit-variance normals (likelihood-ratio
    /// threshold; common practice, no source).
    #[test]
    fn weighted_threshold_is_the_likelihood_ratio_point() {
        let h0 = Normal::STANDARD;
        let h1 = Normal::new(2.0, 1.0).unwrap();
        for w in [0.25, 0.75, 0.9] {
            let s = solve_continuous(&h0, &h1, setup(Alternative::Greater, w, true)).unwrap();
            let expect = 1.0 + (w / (1.0 - w)).ln() / 2.0;
            match s.cut {
                ContinuousCut::Above(c) => assert!((c - expect).abs() < 1e-13, "w {w}: {c} vs {expect}"),
                _ => panic!("wrong cut"),
            }
        }
    }

    /// The local two-sided walk lists exactly the ties and pick of the walk
    /// over the whole mass window (its own definition), over a grid of
    /// binomial designs both ways, with weights and with a half-integer m0.
    #[test]
    fn local_two_sided_walk_agrees_with_the_full_walk() {
        use crate::engine::dist::Binomial;
        let mut local_used = 0;
        for n in [201u64, 250, 999, 1000, 3001, 20_000, 30_934] {
            for (p0, p1) in [(0.5, 0.51), (0.5, 0.55), (0.5, 0.45), (0.3, 0.34), (0.6, 0.8), (0.02, 0.03), (0.9, 0.88)] {
                for w in [0.5, 0.2, 0.8] {
                    let (h0, h1) = (Binomial::new(n, p0).unwrap(), Binomial::new(n, p1).unwrap());
                    let m0 = n as f64 * p0;
                    let top = mass_window(&h0).1.max(mass_window(&h1).1);
                    let first = mass_window(&h0).0.min(mass_window(&h1).0);
                    let full = two_sided_pick(&h0, &h1, m0, w, full_walk(&h0, &h1, m0, w, first, top));
                    if let Some(c) = local_walk(&h0, &h1, m0, w, first, top) {
                        local_used += 1;
                        let local = two_sided_pick(&h0, &h1, m0, w, c);
                        assert_eq!(local, full, "n {n}, p0 {p0}, p1 {p1}, w {w}");
                    }
                }
            }
        }
        assert!(local_used > 60, "{local_used}");
    }

    /// Two-sided normal: c* solves 2φ(c) = φ(c − Δ) + φ(c + Δ), not Δ/2.
    #[test]
    fn two_sided_normal_solves_the_summed_equation() {
        let h0 = Normal::STANDARD;
        let h1 = Normal::new(3.0, 1.0).unwrap();
        let s = solve_continuous(&h0, &h1, setup(Alternative::TwoSided, 0.5, true)).unwrap();
        let ContinuousCut::Outside { half_width: c, .. } = s.cut else { panic!("wrong cut") };
        let lhs = 2.0 * h0.pdf(c);
        let rhs = h1.pdf(c) + h1.pdf(-c);
        assert!((lhs - rhs).abs() < 1e-14 * lhs, "{c}");
        assert!(c > 1.5);
        // The scan + Brent path (no single-crossing promise) finds the same
        // root; the two root finders may differ in the last ulps (Brent
        // stops at a 4-ulp bracket).
        let g = solve_continuous(&h0, &h1, setup(Alternative::TwoSided, 0.5, false)).unwrap();
        let ContinuousCut::Outside { half_width: cg, .. } = g.cut else { panic!("wrong cut") };
        assert!((cg - c).abs() <= 8.0 * f64::EPSILON * c, "{cg} vs {c}");
    }
}
