//! The continuous solve: c* as a root of the weighted log-density
//! difference (Halley where the densities cross once, Brent from a bracket
//! otherwise), the ends compared with every crossing.

use super::region::{ContinuousCut, Errors, continuous_errors};
use super::{Alternative, ContinuousSolution, Setup, TIE_TOLERANCE, ThresholdError, check_weight};
use crate::engine::dist::{Continuous, Normal};
use crate::engine::root::{HalleyTolerance, RootError, Tolerance, brent, brent_from, expand, halley};


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
            let by_halley = if setup.single_crossing {
                let slope = (c1 - c0) / (h0.spread() * h1.spread());
                let start = 0.5 * (c0 + c1) - (lw1 - lw0) / slope;
                let gs = |c: f64| {
                    let ((l1, s1, k1), (l0, s0, k0)) = (h1.ln_pdf_derivatives(c), h0.ln_pdf_derivatives(c));
                    ((lw1 + l1) - (lw0 + l0), s1 - s0, k1 - k0)
                };
                halley_root(gs, start, rising, f64::NEG_INFINITY, spread, &mut iterations)
            } else {
                None
            };
            if let Some(x) = by_halley {
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
            let by_halley = if setup.single_crossing {
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
                        halley_root(gn, rough, true, 0.0, spread, &mut 0).unwrap_or(rough)
                    }
                    _ => rough,
                };
                halley_root(gs, start, true, 0.0, spread, &mut iterations)
            } else {
                None
            };
            let single = if by_halley.is_some() {
                by_halley.map(|x| ((x, 0.0), (x, 0.0)))
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
                Some(((x, _), _)) if by_halley.is_some() => candidates.push(x),
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

/// ln(e^a + e^b) without overflow or underflow.
fn ln_add(a: f64, b: f64) -> f64 {
    let (hi, lo) = if a >= b { (a, b) } else { (b, a) };
    if hi == f64::NEG_INFINITY { hi } else { hi + (lo - hi).exp().ln_1p() }
}

/// Relative step below which Halley's iteration stops: the next
/// (unevaluated) step is then about its square, far below the 1e-13 the
/// callers need.
const HALLEY_STOP: f64 = 1e-8;

/// A root of g by [`halley`] (g's exact first and second derivatives from
/// `gs`), from `start`, for a g that crosses zero once, rising or falling
/// as `rising` says, on (floor, ∞). Stopping rule: a step below
/// [`HALLEY_STOP`] relative plus 1e-13 of `scale`, or, once quadratic
/// convergence is seen, a predicted next error below 1e-15 relative; at
/// most 12 evaluations, each counted in `iterations`. `None` on any
/// [`RootError`] (not finite, wrong slope, no convergence): the caller
/// then brackets and runs Brent's method.
fn halley_root<G: Fn(f64) -> (f64, f64, f64)>(gs: G, start: f64, rising: bool, floor: f64, scale: f64, iterations: &mut usize) -> Option<f64> {
    let tol = HalleyTolerance { step: Tolerance { abs: 1e-13 * scale, rel: HALLEY_STOP, max_iterations: 12 }, predicted_rel: 1e-15 };
    let counted = |c: f64| {
        *iterations += 1;
        gs(c)
    };
    halley(counted, start, (floor, f64::INFINITY), rising, tol).ok().map(|root| root.x)
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::dist::Normal;

    fn setup(alternative: Alternative, weight: f64, single: bool) -> Setup {
        Setup { alternative, centre: 0.0, weight, single_crossing: single }
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
