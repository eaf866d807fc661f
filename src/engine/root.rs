//! Root finding with an explicit tolerance and iteration budget: Brent's
//! bracketing method, a geometric bracket expander, and Halley's iteration
//! for a function whose first two derivatives are known.
//!
//! Source: R. P. Brent (1973), *Algorithms for Minimization without
//! Derivatives*, ch. 4 (the `zero` procedure): inverse quadratic
//! interpolation guarded by bisection, so convergence is superlinear on
//! smooth functions and never slower than bisection. Halley: see
//! [`halley`].
//!
//! "Not bracketed", "did not converge", "not finite" and "wrong slope" are
//! errors, never a silent guess.

/// When to stop, and how much work is allowed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tolerance {
    /// Absolute width of the final bracket.
    pub abs: f64,
    /// Width relative to |x|; the bracket may be `abs + rel·|x|` wide.
    pub rel: f64,
    /// Maximum number of function evaluations after the two end points.
    pub max_iterations: usize,
}

impl Tolerance {
    /// Close to machine precision: 4 ulp relative, with a tiny absolute floor.
    pub const TIGHT: Tolerance = Tolerance { abs: 1e-300, rel: 4.0 * f64::EPSILON, max_iterations: 200 };
}

/// A root with the bracket that proves it and the work it took.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Root {
    pub x: f64,
    /// Final bracket [lo, hi] with a sign change (or an exact zero at x).
    pub bracket: (f64, f64),
    pub iterations: usize,
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RootError {
    #[error("the search interval [{lo}, {hi}] does not bracket a root (f = {f_lo} and {f_hi})")]
    NotBracketed { lo: f64, hi: f64, f_lo: f64, f_hi: f64 },
    #[error("the root search did not converge within {iterations} iterations (bracket [{lo}, {hi}])")]
    DidNotConverge { iterations: usize, lo: f64, hi: f64 },
    #[error("the function is not finite at x = {x}")]
    NotFinite { x: f64 },
    #[error("the function's slope at x = {x} is {slope}, not of the sign a single crossing needs")]
    WrongSlope { x: f64, slope: f64 },
}

/// Find x in [lo, hi] with f(x) = 0, given f(lo) and f(hi) of opposite signs
/// (or one of them exactly 0).
pub fn brent<F: FnMut(f64) -> f64>(mut f: F, lo: f64, hi: f64, tol: Tolerance) -> Result<Root, RootError> {
    let (fa, fb) = (f(lo), f(hi));
    brent_from(f, (lo, fa), (hi, fb), tol)
}

/// [`brent`] when f is already known at both ends (saves two evaluations
/// of an expensive f).
pub fn brent_from<F: FnMut(f64) -> f64>(
    mut f: F,
    (lo, f_lo): (f64, f64),
    (hi, f_hi): (f64, f64),
    tol: Tolerance,
) -> Result<Root, RootError> {
    let (mut a, mut b) = (lo, hi);
    let (mut fa, mut fb) = (f_lo, f_hi);
    if fa.is_nan() {
        return Err(RootError::NotFinite { x: a });
    }
    if fb.is_nan() {
        return Err(RootError::NotFinite { x: b });
    }
    if fa == 0.0 {
        return Ok(Root { x: a, bracket: (a, a), iterations: 0 });
    }
    if fb == 0.0 {
        return Ok(Root { x: b, bracket: (b, b), iterations: 0 });
    }
    if fa.signum() == fb.signum() {
        return Err(RootError::NotBracketed { lo, hi, f_lo: fa, f_hi: fb });
    }
    let (mut c, mut fc) = (a, fa);
    let (mut d, mut e) = (b - a, b - a);
    for iteration in 1..=tol.max_iterations {
        if fb.signum() == fc.signum() {
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if fc.abs() < fb.abs() {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let t = 0.5 * (tol.abs + tol.rel * b.abs());
        let m = 0.5 * (c - b);
        if m.abs() <= t || fb == 0.0 {
            let bracket = if b < c { (b, c) } else { (c, b) };
            return Ok(Root { x: b, bracket, iterations: iteration });
        }
        if e.abs() < t || fa.abs() <= fb.abs() {
            d = m;
            e = m;
        } else {
            let s = fb / fa;
            let (mut p, mut q);
            if a == c {
                p = 2.0 * m * s;
                q = 1.0 - s;
            } else {
                let qa = fa / fc;
                let r = fb / fc;
                p = s * (2.0 * m * qa * (qa - r) - (b - a) * (r - 1.0));
                q = (qa - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if p > 0.0 {
                q = -q;
            } else {
                p = -p;
            }
            if 2.0 * p < 3.0 * m * q - (t * q).abs() && p < (0.5 * e * q).abs() {
                e = d;
                d = p / q;
            } else {
                d = m;
                e = m;
            }
        }
        a = b;
        fa = fb;
        b += if d.abs() > t { d } else { t.copysign(m) };
        fb = f(b);
        if fb.is_nan() {
            return Err(RootError::NotFinite { x: b });
        }
    }
    let (lo, hi) = if b < c { (b, c) } else { (c, b) };
    Err(RootError::DidNotConverge { iterations: tol.max_iterations, lo, hi })
}

/// Widen [lo, hi] geometrically (by `step`, doubling each time) on the side
/// named until f changes sign between `anchor` and the moving end; returns
/// the bracket. `direction` is +1 to move right, −1 to move left.
pub fn expand<F: FnMut(f64) -> f64>(
    mut f: F,
    anchor: f64,
    step: f64,
    direction: f64,
    max_steps: usize,
) -> Result<(f64, f64), RootError> {
    let fa = f(anchor);
    if fa.is_nan() {
        return Err(RootError::NotFinite { x: anchor });
    }
    let mut prev = anchor;
    let mut width = step.abs().max(f64::MIN_POSITIVE);
    for _ in 0..max_steps {
        let x = anchor + direction * width;
        let fx = f(x);
        if fx.is_nan() {
            return Err(RootError::NotFinite { x });
        }
        if fx == 0.0 || fx.signum() != fa.signum() {
            return Ok(if prev < x { (prev, x) } else { (x, prev) });
        }
        prev = x;
        width *= 2.0;
    }
    let end = anchor + direction * width;
    Err(RootError::NotBracketed { lo: anchor.min(end), hi: anchor.max(end), f_lo: fa, f_hi: fa })
}

/// When Halley's iteration stops, and how much work it may do.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HalleyTolerance {
    /// A step no longer than `step.abs + step.rel·|x|` ends the iteration
    /// (the point after that step is returned; at least quadratic
    /// convergence makes its error about the step squared);
    /// `step.max_iterations` is the budget of evaluations of f.
    pub step: Tolerance,
    /// Once convergence is seen to be at least quadratic (a step below 1e-4
    /// relative and below a tenth of the step before), the iteration also
    /// ends when the next error, predicted as step³/(step before)², is below
    /// `predicted_rel·|x|`.
    pub predicted_rel: f64,
}

/// A root of f by Halley's iteration from `start`, for an f that crosses
/// zero once on the open interval `bracket` (either end may be infinite),
/// rising there when `rising` is true, falling otherwise; `f` returns
/// f(x), f'(x) and f''(x).
///
/// Source: Halley's step x − (f/f')/(1 − f·f''/(2f'²)) (Press et al.,
/// *Numerical Recipes*, 3rd ed., 2007, §9.4), cubic near a simple root
/// from a fair start; a non-finite f'' or a Halley factor outside [½, 2]
/// falls back to the Newton step x − f/f'. Safeguarded: each point seen
/// narrows the bracket on its side of the root, and a step leaving the
/// bracket is replaced by bisection once both ends are finite. Stopping
/// rule and budget: [`HalleyTolerance`].
///
/// Errors, never a silent guess: `NotFinite` where f is not finite,
/// `WrongSlope` where f' is zero, not finite or of the wrong sign (f does
/// not cross once as promised), `DidNotConverge` when a step leaves a
/// bracket that still has an infinite end, or when the budget runs out.
/// The root comes with the bracket of the points seen, open (an end of
/// `bracket`) on a side no point has reached, and the evaluations used.
pub fn halley<F: FnMut(f64) -> (f64, f64, f64)>(
    mut f: F,
    start: f64,
    bracket: (f64, f64),
    rising: bool,
    tol: HalleyTolerance,
) -> Result<Root, RootError> {
    let (mut lo, mut hi) = bracket;
    let mut x = start;
    let mut last_step = f64::NAN;
    for iteration in 1..=tol.step.max_iterations {
        let (fx, slope, curvature) = f(x);
        if !fx.is_finite() {
            return Err(RootError::NotFinite { x });
        }
        if fx == 0.0 {
            return Ok(Root { x, bracket: (x, x), iterations: iteration });
        }
        // The root lies above x where f has not yet reached 0.
        if (fx < 0.0) == rising {
            lo = lo.max(x);
        } else {
            hi = hi.min(x);
        }
        if !slope.is_finite() || slope == 0.0 || (slope > 0.0) != rising {
            return Err(RootError::WrongSlope { x, slope });
        }
        let newton_step = fx / slope;
        let factor = 1.0 - 0.5 * newton_step * curvature / slope;
        let step = if factor.is_finite() && (0.5..=2.0).contains(&factor) { newton_step / factor } else { newton_step };
        let mut next = x - step;
        if !(next > lo && next < hi) {
            if !(lo.is_finite() && hi.is_finite()) {
                return Err(RootError::DidNotConverge { iterations: iteration, lo, hi });
            }
            next = 0.5 * (lo + hi);
        } else if step.abs() <= tol.step.rel * x.abs() + tol.step.abs {
            return Ok(Root { x: next, bracket: (lo, hi), iterations: iteration });
        } else if step.abs() <= 1e-4 * x.abs() && step.abs() <= 0.1 * last_step.abs() {
            // Quadratic convergence seen (e_next ≈ C·e², C from the last
            // two steps): stop when the predicted next error is negligible.
            let predicted = step * step * (step / (last_step * last_step)).abs();
            if predicted <= tol.predicted_rel * x.abs() {
                return Ok(Root { x: next, bracket: (lo, hi), iterations: iteration });
            }
        }
        last_step = step;
        x = next;
    }
    Err(RootError::DidNotConverge { iterations: tol.step.max_iterations, lo, hi })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_known_roots() {
        // cos(x) = x has the root 0.7390851332151607 (Dottie number; common
        // practice, no source).
        let r = brent(|x| x.cos() - x, 0.0, 1.0, Tolerance::TIGHT).unwrap();
        assert!((r.x - 0.739_085_133_215_160_7).abs() < 1e-15);
        let r = brent(|x| x * x - 2.0, 0.0, 2.0, Tolerance::TIGHT).unwrap();
        assert!((r.x - std::f64::consts::SQRT_2).abs() < 1e-15);
    }

    #[test]
    fn reports_missing_bracket_and_budget() {
        assert!(matches!(brent(|x| x * x + 1.0, -1.0, 1.0, Tolerance::TIGHT), Err(RootError::NotBracketed { .. })));
        let tiny = Tolerance { max_iterations: 2, ..Tolerance::TIGHT };
        assert!(matches!(brent(|x| x.powi(3) - 0.3, 0.0, 1.0, tiny), Err(RootError::DidNotConverge { .. })));
        assert!(matches!(brent(|_| f64::NAN, 0.0, 1.0, Tolerance::TIGHT), Err(RootError::NotFinite { .. })));
    }

    fn halley_tight(max_iterations: usize) -> HalleyTolerance {
        HalleyTolerance { step: Tolerance { abs: 1e-300, rel: 1e-8, max_iterations }, predicted_rel: 1e-15 }
    }

    /// The same roots as Brent's (common practice, no source), from the
    /// function and its exact derivatives; the falling case from the right.
    #[test]
    fn halley_finds_known_roots() {
        let r = halley(|x| (x.cos() - x, -x.sin() - 1.0, -x.cos()), 1.0, (0.0, f64::INFINITY), false, halley_tight(20)).unwrap();
        assert!((r.x - 0.739_085_133_215_160_7).abs() < 1e-15, "{r:?}");
        assert!(r.bracket.0 <= r.x && r.x <= r.bracket.1 && r.iterations <= 6, "{r:?}");
        let r = halley(|x| (x * x - 2.0, 2.0 * x, 2.0), 1.0, (f64::NEG_INFINITY, f64::INFINITY), true, halley_tight(20)).unwrap();
        assert!((r.x - std::f64::consts::SQRT_2).abs() < 1e-15, "{r:?}");
        // A start beyond the floor's side of the root is pulled back inside.
        let r = halley(|x| (x.ln(), 1.0 / x, -1.0 / (x * x)), 30.0, (0.0, f64::INFINITY), true, halley_tight(40)).unwrap();
        assert!((r.x - 1.0).abs() < 1e-15, "{r:?}");
    }

    #[test]
    fn halley_reports_failures() {
        let nan = halley(|_| (f64::NAN, 1.0, 0.0), 0.5, (0.0, 1.0), true, halley_tight(20));
        assert!(matches!(nan, Err(RootError::NotFinite { .. })), "{nan:?}");
        // x² + 1 falls left of 0: the promised rising crossing is not there.
        let wrong = halley(|x| (x * x + 1.0, 2.0 * x, 2.0), -1.0, (f64::NEG_INFINITY, f64::INFINITY), true, halley_tight(20));
        assert!(matches!(wrong, Err(RootError::WrongSlope { .. })), "{wrong:?}");
        let short = halley(|x| (x.powi(3) - 0.3, 3.0 * x * x, 6.0 * x), 5.0, (0.0, f64::INFINITY), true, halley_tight(2));
        assert!(matches!(short, Err(RootError::DidNotConverge { iterations: 2, .. })), "{short:?}");
    }

    #[test]
    fn expands_to_a_bracket() {
        let (lo, hi) = expand(|x| x - 37.0, 0.0, 1.0, 1.0, 60).unwrap();
        assert!(lo <= 37.0 && 37.0 <= hi);
        let (lo, hi) = expand(|x| x + 5.0, 0.0, 1.0, -1.0, 60).unwrap();
        assert!(lo <= -5.0 && -5.0 <= hi);
    }
}
