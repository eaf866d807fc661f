//! The noncentral t through its mixture representation, shared by
//! [`StudentT`](super::StudentT) (δ = 0) and [`NoncentralT`](super::NoncentralT).
//!
//! T = (Z + δ)/S with Z ~ N(0, 1) and S = √(V/ν), V ~ χ²(ν) independent, so
//! (Johnson, Kotz & Balakrishnan, *Continuous Univariate Distributions*,
//! vol. 2, 2nd ed., 1995, ch. 31, eq. 31.4 and 31.6)
//!
//! - P(T ≤ t) = E[Φ(t·S − δ)],
//! - P(T > t) = E[Φ(δ − t·S)], the same integral with (t, δ) → (−t, −δ),
//! - f(t) = E[S·φ(t·S − δ)].
//!
//! Every integrand is positive, so each tail keeps its relative accuracy.
//! The integrals are taken over y = ln S, where the log-integrand L(y) is
//! unimodal (its derivative in s is a sum of decreasing terms). We locate
//! the mode y* by a safeguarded Newton iteration, take the Laplace width
//! w = 1/√(−L''(y*)) and apply the trapezoidal rule in z on the map
//! y = y* + w·sinh(κz)/κ (κ = 0.15; step 0.4 in z and at most 0.1 in y,
//! tuned until the results agree with a 10× finer rule to 1e-13), which
//! converges geometrically for such smooth, rapidly decaying integrands
//! (Trefethen & Weideman, "The exponentially convergent trapezoidal rule",
//! SIAM Review 56, 2014) while
//! the sinh stretch covers the slowly decaying power-law side cheaply.
//! When |δ| is large compared with the χ width the factor Φ(t·e^y − δ) has a
//! cliff of width about 1/|δ| inside the bulk; then an adaptive
//! Gauss–Kronrod (7, 15) rule with an explicit tolerance and panel budget
//! takes over. All sums are formed relative to L(y*), so values far below
//! the f64 range of the integrand (down to about 1e-300) keep full
//! relative accuracy and logarithms stay finite.

use crate::engine::root::{Tolerance, brent_from};
use super::DistError;
use super::normal::{std_cdf, std_pdf, std_sf};
use super::t_beta::{ln_density_closed, ln_lower_central, ln_mean_s};

/// ln √(2π).
const LN_SQRT_2PI: f64 = 0.918_938_533_204_672_8;
/// ln 2.
const LN_2: f64 = std::f64::consts::LN_2;

/// Above this ν the mixture is replaced by its normal limit (see
/// [`normal_limit_sd`]). The mixture is verified against mpmath up to
/// ν = 1e6 (tests/dist_t.rs) and spot-checked at 1e7.
pub(super) const NU_LIMIT: f64 = 1e7;

/// Terms below exp(−CUT) times the peak are dropped: their sum stays below
/// about 1e-15 of the integral.
const CUT: f64 = 38.0;
/// Sinh stretch of the trapezoidal map: mild, because a strong stretch
/// distorts the near-Gaussian peaks of large ν.
const KAPPA: f64 = 0.15;
/// Trapezoidal step in z (units of the Laplace width w).
const STEP: f64 = 0.4;
/// Largest step in y near the mode; see `ln_integral`.
const Y_STEP: f64 = 0.1;
/// Trapezoidal nodes per side: the map passes 1e12 widths by node 500,
/// far beyond any integrand's support; 600 leaves a margin and bounds
/// the cost of a degenerate integrand (a noncentrality near 1e50).
const MAX_NODES: usize = 600;
/// Relative tolerance of the adaptive Gauss–Kronrod path.
const GK_TOL: f64 = 1e-14;
/// Panel budget of the adaptive Gauss–Kronrod path.
const GK_PANELS: usize = 400;

/// ln K − ν/2, where K = 2·(ν/2)^(ν/2)/Γ(ν/2) normalises the density of
/// y = ln S, K·exp(ν·y − ν·e^(2y)/2). For ν/2 ≥ 10 Stirling's series is used
/// so that the two huge terms ν/2·ln(ν/2) and ln Γ(ν/2) never meet: with
/// ln Γ(a) = (a − ½)·ln a − a + ln √(2π) + μ(a) the difference is
/// ln 2 + ½·ln a − ln √(2π) − μ(a) (Abramowitz & Stegun 6.1.41 for μ).
fn ln_norm(nu: f64) -> f64 {
    let a = 0.5 * nu;
    if a < 10.0 {
        LN_2 + a * a.ln() - a - libm::lgamma(a)
    } else {
        let r = 1.0 / (a * a);
        let mu = (1.0 / 12.0
            - r * (1.0 / 360.0 - r * (1.0 / 1260.0 - r * (1.0 / 1680.0 - r / 1188.0))))
            / a;
        LN_2 + 0.5 * a.ln() - LN_SQRT_2PI - mu
    }
}

/// 1/(k+2)! for k = 0..14: the Taylor coefficients of (e^x − 1 − x)/x².
const EXPM1MX: [f64; 15] = [
    1.0 / 2.0,
    1.0 / 6.0,
    1.0 / 24.0,
    1.0 / 120.0,
    1.0 / 720.0,
    1.0 / 5040.0,
    1.0 / 40320.0,
    1.0 / 362880.0,
    1.0 / 3628800.0,
    1.0 / 39916800.0,
    1.0 / 479001600.0,
    1.0 / 6227020800.0,
    1.0 / 87178291200.0,
    1.0 / 1307674368000.0,
    1.0 / 20922789888000.0,
];

/// e^x − 1 − x without cancellation near 0: for |x| < ½ the Taylor
/// polynomial (its first omitted term is below 3e-18 relative).
fn exp_m1_mx(x: f64) -> f64 {
    if x.abs() < 0.5 {
        let mut p = 0.0;
        for c in EXPM1MX.iter().rev() {
            p = p * x + c;
        }
        x * x * p
    } else {
        x.exp_m1() - x
    }
}

/// Mills ratio Φ(−x)/φ(x) for x ≥ 30 by Laplace's continued fraction
/// 1/(x + 1/(x + 2/(x + …))), evaluated bottom-up with 40 levels: at x ≥ 30
/// that is exact to rounding.
fn mills_far(x: f64) -> f64 {
    let mut f = x;
    for k in (1..=40).rev() {
        f = x + k as f64 / f;
    }
    1.0 / f
}

/// ln Φ(u), finite for every finite u.
fn ln_std_cdf(u: f64) -> f64 {
    if u >= 0.0 {
        (-std_sf(u)).ln_1p()
    } else if u > -30.0 {
        std_cdf(u).ln()
    } else {
        mills_far(-u).ln() - 0.5 * u * u - LN_SQRT_2PI
    }
}

/// φ(u)/Φ(u), the derivative of ln Φ.
fn std_hazard(u: f64) -> f64 {
    if u > -30.0 {
        std_pdf(u) / std_cdf(u)
    } else {
        1.0 / mills_far(-u)
    }
}

/// The log-integrand over y = ln S of one of the three integrals, up to the
/// constant ln K − ν/2.
#[derive(Clone, Copy)]
struct Integrand {
    nu: f64,
    /// sign of t (±1).
    sign: f64,
    /// ln |t|, so that t·e^y = sign·exp(y + ln|t|) never underflows early.
    ln_abs_t: f64,
    delta: f64,
    /// `true` for the density E[S·φ(tS − δ)], `false` for E[Φ(tS − δ)].
    density: bool,
}

impl Integrand {
    /// The integrand of the density (`density` true) or of P(T ≤ t).
    fn new(t: f64, nu: f64, delta: f64, density: bool) -> Self {
        Integrand { nu, sign: t.signum(), ln_abs_t: t.abs().ln(), delta, density }
    }

    fn ts(&self, y: f64) -> f64 {
        self.sign * (y + self.ln_abs_t).exp()
    }

    /// L(y) − (ln K − ν/2).
    fn ln_f(&self, y: f64) -> f64 {
        let chi = -0.5 * self.nu * exp_m1_mx(2.0 * y);
        let u = self.ts(y) - self.delta;
        if self.density {
            chi + y - 0.5 * u * u - LN_SQRT_2PI
        } else {
            chi + ln_std_cdf(u)
        }
    }

    /// L'(y) and L''(y) for the tail integrand.
    fn slope_curvature(&self, y: f64) -> (f64, f64) {
        let s2 = (2.0 * y).exp();
        let ts = self.ts(y);
        let u = ts - self.delta;
        let m = std_hazard(u);
        let d1 = self.nu * (1.0 - s2) + ts * m;
        let d2 = -2.0 * self.nu * s2 + ts * m - ts * ts * m * (u + m);
        (d1, d2)
    }

    /// Mode y* and Laplace width w.
    fn mode(&self) -> (f64, f64) {
        let (nu, delta) = (self.nu, self.delta);
        // Quadratic start: the mode of the density integrand, exact there
        // and a good start for the tail integrand deep in the tail, where
        // φ/Φ(u) ≈ −u. |t|·s solves (1 + r)·x² − σδ·x − ν' = 0, r = ν/t².
        let nu_q = if self.density { nu + 1.0 } else { nu };
        let b = self.sign * delta;
        // For |t| ≤ 1 solve for s itself, (ν + t²)·s² − tδ·s − ν' = 0, so
        // that ν/t² cannot overflow; the root avoids cancellation.
        let (y_q, curv) = if self.ln_abs_t <= 0.0 {
            let t = self.sign * self.ln_abs_t.exp();
            let a2 = nu + t * t;
            let td = t * delta;
            let disc = (td * td + 4.0 * a2 * nu_q).sqrt();
            let s = if td >= 0.0 {
                (td + disc) / (2.0 * a2)
            } else {
                2.0 * nu_q / (disc - td)
            };
            (s.ln(), a2 * s * s + nu_q)
        } else {
            let r = nu * (-2.0 * self.ln_abs_t).exp();
            let disc = (b * b + 4.0 * nu_q * (1.0 + r)).sqrt();
            let x = if b >= 0.0 {
                (b + disc) / (2.0 * (1.0 + r))
            } else {
                2.0 * nu_q / (disc - b)
            };
            (x.ln() - self.ln_abs_t, (1.0 + r) * x * x + nu_q)
        };
        if self.density {
            // L''(y*) = −(ν + t²)s² − (ν + 1) at the exact mode.
            return (y_q, 1.0 / curv.sqrt());
        }
        let mut y = if self.ts(0.0) - delta < 0.0 { y_q } else { 0.0 };
        if !y.is_finite() {
            y = 0.0;
        }
        // Bracket the root of L' (L' > 0 left of the mode, < 0 right).
        let (mut lo, mut hi);
        let (d0, _) = self.slope_curvature(y);
        let mut step = 0.5;
        if d0 > 0.0 {
            lo = y;
            hi = y + step;
            for _ in 0..80 {
                if self.slope_curvature(hi).0 <= 0.0 {
                    break;
                }
                lo = hi;
                step *= 2.0;
                hi = y + step;
            }
        } else {
            hi = y;
            lo = y - step;
            for _ in 0..80 {
                if self.slope_curvature(lo).0 > 0.0 {
                    break;
                }
                hi = lo;
                step *= 2.0;
                lo = y - step;
            }
        }
        if !(lo < y && y < hi) {
            y = 0.5 * (lo + hi);
        }
        // Safeguarded Newton: a step leaving the bracket is replaced by
        // bisection. The mode need only be good to a small fraction of w:
        // the trapezoidal sum does not depend on where its grid is centred.
        let mut w = 1.0 / nu.sqrt();
        for _ in 0..100 {
            let (d1, d2) = self.slope_curvature(y);
            if !d1.is_finite() || !d2.is_finite() {
                break;
            }
            if d1 > 0.0 {
                lo = y;
            } else {
                hi = y;
            }
            if d2 < 0.0 {
                w = 1.0 / (-d2).sqrt();
            }
            let mut next = if d2 < 0.0 {
                y - d1 / d2
            } else {
                0.5 * (lo + hi)
            };
            if !(next > lo && next < hi) {
                next = 0.5 * (lo + hi);
            }
            let done = (next - y).abs() < 0.02 * w || hi - lo < 0.02 * w;
            y = next;
            if done {
                break;
            }
        }
        let (_, d2) = self.slope_curvature(y);
        if d2 < 0.0 && d2.is_finite() {
            w = 1.0 / (-d2).sqrt();
        }
        (y, w)
    }

    /// ln of the integral of e^(ln_f) over the real line.
    fn ln_integral(&self) -> f64 {
        self.ln_integral_with(|_| (0.0, 0.0)).0
    }

    /// ln of the integral of e^(ln_f), and the means of the two components
    /// of `score(y)` under the weight e^(ln_f) (from the same nodes; 0 on
    /// the adaptive path, which only tail integrands take).
    fn ln_integral_with<S: Fn(f64) -> (f64, f64)>(&self, score: S) -> (f64, (f64, f64)) {
        let (y0, w) = self.mode();
        let peak = self.ln_f(y0);
        if !peak.is_finite() {
            return (peak, (f64::NAN, f64::NAN));
        }
        // A cliff of Φ(t·e^y − δ) at u = 0, of width about 1/|δ| in y, that
        // is much narrower than w and not negligible calls for adaptivity.
        if !self.density && self.sign * self.delta > 0.0 && self.delta.abs() * w > 1.0 {
            let yc = self.delta.abs().ln() - self.ln_abs_t;
            if self.ln_f(yc) - peak > -CUT {
                return (peak + self.adaptive(y0, w, yc, peak).ln(), (0.0, 0.0));
            }
        }
        // The integrand is entire, but e^(2y) and Φ(−e^y) limit the strip
        // where it stays bounded to a width below π/4 in y, so the step in
        // y near the mode is held to Y_STEP however wide the peak is.
        let step = STEP.min(Y_STEP / w);
        let (mut sum, mut scored) = (1.0, score(y0));
        // e^(κz) at z = ±k·step by repeated multiplication: sinh and cosh
        // without a transcendental call per node (the rounding grows like
        // k·ε, harmless for the few hundred nodes at most).
        let q = (KAPPA * step).exp();
        for side in [1.0, -1.0] {
            let mut e = 1.0;
            for _ in 1..=MAX_NODES {
                e *= q;
                let (sinh, cosh) = (0.5 * (e - 1.0 / e), 0.5 * (e + 1.0 / e));
                let y = y0 + side * w * sinh / KAPPA;
                let v = self.ln_f(y) - peak;
                let weight = v.exp() * cosh;
                sum += weight;
                if weight > 0.0 {
                    let (a, b) = score(y);
                    scored.0 += weight * a;
                    scored.1 += weight * b;
                }
                if v < -CUT || v.is_nan() || !e.is_finite() {
                    break;
                }
            }
        }
        (peak + (sum * step * w).ln(), (scored.0 / sum, scored.1 / sum))
    }

    /// ∫ e^(ln_f − peak) dy by adaptive Gauss–Kronrod on the range where
    /// the integrand exceeds e^(−CUT), split at the mode and the cliff.
    fn adaptive(&self, y0: f64, w: f64, yc: f64, peak: f64) -> f64 {
        let g = |y: f64| (self.ln_f(y) - peak).exp();
        let edge = |dir: f64| {
            let mut d = w;
            for _ in 0..200 {
                if self.ln_f(y0 + dir * d) - peak < -CUT {
                    break;
                }
                d *= 1.5;
            }
            y0 + dir * d
        };
        let (a, b) = (edge(-1.0), edge(1.0));
        let mut cuts = vec![a, b, y0];
        for k in [-3.0, -1.0, 1.0, 3.0] {
            cuts.push(yc + k / self.delta.abs());
        }
        cuts.retain(|c| *c >= a && *c <= b);
        cuts.sort_by(f64::total_cmp);
        let mut panels: Vec<(f64, f64, f64, f64)> = Vec::new();
        let (mut total, mut err) = (0.0, 0.0);
        for p in cuts.windows(2) {
            if p[1] > p[0] {
                let (r, e) = gk15(&g, p[0], p[1]);
                total += r;
                err += e;
                panels.push((p[0], p[1], r, e));
            }
        }
        while err > GK_TOL * total && panels.len() < GK_PANELS {
            // Split the panel with the largest error estimate.
            let mut worst = 0;
            for (i, p) in panels.iter().enumerate() {
                if p.3 > panels[worst].3 {
                    worst = i;
                }
            }
            let (lo, hi, r, e) = panels.swap_remove(worst);
            let mid = 0.5 * (lo + hi);
            let (r1, e1) = gk15(&g, lo, mid);
            let (r2, e2) = gk15(&g, mid, hi);
            total += r1 + r2 - r;
            err += e1 + e2 - e;
            panels.push((lo, mid, r1, e1));
            panels.push((mid, hi, r2, e2));
        }
        total
    }
}

/// Kronrod nodes (positive half) and weights of the 15-point rule, with the
/// embedded 7-point Gauss weights (QUADPACK's qk15).
const XK: [f64; 8] = [
    0.991_455_371_120_812_6,
    0.949_107_912_342_758_5,
    0.864_864_423_359_769_1,
    0.741_531_185_599_394_4,
    0.586_087_235_467_691_1,
    0.405_845_151_377_397_2,
    0.207_784_955_007_898_5,
    0.0,
];
const WK: [f64; 8] = [
    0.022_935_322_010_529_22,
    0.063_092_092_629_978_55,
    0.104_790_010_322_250_2,
    0.140_653_259_715_525_9,
    0.169_004_726_639_267_9,
    0.190_350_578_064_785_4,
    0.204_432_940_075_298_9,
    0.209_482_141_084_727_8,
];
const WG: [f64; 4] = [
    0.129_484_966_168_869_7,
    0.279_705_391_489_276_7,
    0.381_830_050_505_118_9,
    0.417_959_183_673_469_4,
];

/// Gauss–Kronrod (7, 15) on [a, b]: the estimate and |K15 − G7|.
fn gk15(g: &impl Fn(f64) -> f64, a: f64, b: f64) -> (f64, f64) {
    let c = 0.5 * (a + b);
    let hl = 0.5 * (b - a);
    let fc = g(c);
    let mut rk = fc * WK[7];
    let mut rg = fc * WG[3];
    for j in 0..7 {
        let x = hl * XK[j];
        let v = g(c - x) + g(c + x);
        rk += WK[j] * v;
        if j % 2 == 1 {
            rg += WG[j / 2] * v;
        }
    }
    (rk * hl, ((rk - rg) * hl).abs())
}

/// Normal limit for ν > [`NU_LIMIT`]: T ≈ N(δ, 1 + δ²/(2ν)), from
/// T = (Z + δ)/S with S ≈ 1 + N(0, 1/(2ν)). At ν = 1e7 its absolute error is
/// at most 1.6e-8 (δ = 0) to 7.7e-7 (|δ| = 40); relative accuracy holds
/// only near the centre (1.5e-4 within 4 standard deviations).
fn normal_limit_sd(nu: f64, delta: f64) -> f64 {
    (1.0 + delta * delta / (2.0 * nu)).sqrt()
}

/// ln P(T ≤ t) for T ~ t(ν, δ). NaN in, NaN out.
pub(super) fn ln_lower(t: f64, nu: f64, delta: f64) -> f64 {
    if t.is_nan() || nu.is_nan() || delta.is_nan() {
        return f64::NAN;
    }
    if t == f64::INFINITY {
        return 0.0;
    }
    if t == f64::NEG_INFINITY {
        return f64::NEG_INFINITY;
    }
    if nu > NU_LIMIT {
        return ln_std_cdf((t - delta) / normal_limit_sd(nu, delta));
    }
    if t == 0.0 {
        // T ≤ 0 exactly when Z ≤ −δ.
        return ln_std_cdf(-delta);
    }
    if delta == 0.0 {
        // The central t: the incomplete beta's continued fraction is a
        // small fraction of the quadrature's cost where it converges fast.
        if let Some(v) = ln_lower_central(t, nu) {
            return v.min(0.0);
        }
    }
    let f = Integrand::new(t, nu, delta, false);
    // A probability next to 1 may come out a rounding above it.
    (ln_norm(nu) + f.ln_integral()).min(0.0)
}

/// ln f(t) for T ~ t(ν, δ). NaN in, NaN out; −inf at t = ±inf.
pub(super) fn ln_density(t: f64, nu: f64, delta: f64) -> f64 {
    if t.is_nan() || nu.is_nan() || delta.is_nan() {
        return f64::NAN;
    }
    if t.is_infinite() {
        return f64::NEG_INFINITY;
    }
    if nu > NU_LIMIT {
        let sd = normal_limit_sd(nu, delta);
        let z = (t - delta) / sd;
        return -0.5 * z * z - LN_SQRT_2PI - sd.ln();
    }
    if t == 0.0 {
        // f(0) = E[S]·φ(δ) = √(2/ν)·Γ((ν+1)/2)/Γ(ν/2)·φ(δ).
        return ln_mean_s(nu) - 0.5 * delta * delta - LN_SQRT_2PI;
    }
    if delta == 0.0 {
        // The central t has a closed form; the quadrature is for δ ≠ 0.
        return ln_density_closed(t, nu, ln_mean_s(nu) - LN_SQRT_2PI);
    }
    let f = Integrand::new(t, nu, delta, true);
    ln_norm(nu) + f.ln_integral()
}

/// ln f(t) for T ~ t(ν, δ) with d ln f/dt = f'/f and d² ln f/dt² =
/// f''/f − (f'/f)², where f'(t) = −E[S²·u·φ(u)] and
/// f''(t) = E[S³·(u² − 1)·φ(u)], u = t·S − δ: weighted means of −S·u and
/// S²·(u² − 1) over the density's own quadrature nodes. The derivatives
/// have the accuracy of means with cancelling signs (they steer Halley
/// steps; roots are judged by the density alone).
pub(super) fn ln_density_derivatives(t: f64, nu: f64, delta: f64) -> (f64, f64, f64) {
    if let Some(v) = ln_density_fast_cases(t, nu, delta) {
        return v;
    }
    let f = Integrand::new(t, nu, delta, true);
    let (ln_i, (slope, second)) = f.ln_integral_with(|y| {
        let s = y.exp();
        let u = t * s - delta;
        (-s * u, s * s * (u * u - 1.0))
    });
    (ln_norm(nu) + ln_i, slope, second - slope * slope)
}

/// The cases of [`ln_density_derivatives`] with a closed form: NaN, ±∞,
/// the normal limit, t = 0 and δ = 0.
fn ln_density_fast_cases(t: f64, nu: f64, delta: f64) -> Option<(f64, f64, f64)> {
    if t.is_nan() || nu.is_nan() || delta.is_nan() {
        return Some((f64::NAN, f64::NAN, f64::NAN));
    }
    if t.is_infinite() {
        return Some((f64::NEG_INFINITY, f64::NAN, f64::NAN));
    }
    if nu > NU_LIMIT {
        let sd = normal_limit_sd(nu, delta);
        return Some((ln_density(t, nu, delta), -(t - delta) / (sd * sd), -1.0 / (sd * sd)));
    }
    if t == 0.0 {
        // f(0) = E[S]·φ(δ), f'(0) = δ·φ(δ)·E[S²] = δ·φ(δ) and
        // f''(0) = (δ² − 1)·φ(δ)·E[S³], E[S³] = E[S]·(ν + 1)/ν.
        let slope = delta * (-ln_mean_s(nu)).exp();
        let curvature = (delta * delta - 1.0) * (nu + 1.0) / nu - slope * slope;
        return Some((ln_density(t, nu, delta), slope, curvature));
    }
    if delta == 0.0 {
        let r = 1.0 / (nu + t * t);
        return Some((ln_density(t, nu, delta), -(nu + 1.0) * t * r, -(nu + 1.0) * (nu - t * t) * r * r));
    }
    None
}

/// Find x with ln F(x) = ln p for a monotone tail function given as its
/// logarithm (`increasing` says whether ln F rises with x), by Brent's
/// method (Brent, *Algorithms for Minimization without Derivatives*, 1973,
/// ch. 4) after bracketing outward from `start` in steps growing ×4.
/// Tolerance: 4·ε·|x| + `abs_tol`; at most 300 bracket and 300 Brent steps.
pub(super) fn solve_tail(
    ln_f: impl Fn(f64) -> f64,
    ln_p: f64,
    increasing: bool,
    start: f64,
    scale: f64,
) -> Result<f64, DistError> {
    let g = |x: f64| {
        let v = ln_f(x) - ln_p;
        if increasing { v } else { -v }
    };
    let not_bracketed = DistError::DidNotConverge {
        what: "quantile bracket",
        iterations: 300,
    };
    // Bracket: g(a) < 0 < g(b) with a < b.
    let mut a = start;
    let mut ga = g(a);
    if ga.is_nan() {
        return Err(not_bracketed);
    }
    let mut b;
    let mut gb;
    let mut step = scale;
    if ga < 0.0 {
        b = a;
        gb = ga;
        let mut found = false;
        for _ in 0..300 {
            a = b;
            ga = gb;
            b = start + step;
            step *= 4.0;
            if !b.is_finite() {
                break;
            }
            gb = g(b);
            if gb >= 0.0 {
                found = true;
                break;
            }
        }
        if !found {
            return Err(not_bracketed);
        }
    } else {
        b = a;
        gb = ga;
        let mut found = false;
        for _ in 0..300 {
            b = a;
            gb = ga;
            a = start - step;
            step *= 4.0;
            if !a.is_finite() {
                break;
            }
            ga = g(a);
            if ga < 0.0 {
                found = true;
                break;
            }
        }
        if !found {
            return Err(not_bracketed);
        }
    }
    if gb == 0.0 {
        return Ok(b);
    }
    // The crate's Brent (engine::root), 4 ulp relative plus an absolute
    // floor scaled to the distribution.
    let tol = Tolerance { abs: 1e-300 + 1e-15 * scale, rel: 4.0 * f64::EPSILON, max_iterations: 300 };
    brent_from(g, (a, ga), (b, gb), tol)
        .map(|r| r.x)
        .map_err(|_| DistError::DidNotConverge { what: "quantile search", iterations: 300 })
}

