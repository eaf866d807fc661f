//! The central t tails through the regularised incomplete beta function,
//! a fast path beside the mixture integral of `t_integral`; and the
//! gamma-function ratio `ln_mean_s` behind B(ν/2, ½), which both t
//! densities' normalising constants share.
//!
//! For T ~ t(ν) and t < 0, P(T ≤ t) = ½·I_z(ν/2, ½) with z = ν/(ν + t²)
//! (Abramowitz & Stegun 26.7.1 with 26.5.27). I_z(a, b) is evaluated by its
//! continued fraction (A&S 26.5.8) with the modified Lentz algorithm
//! (Press et al., *Numerical Recipes*, 3rd ed., 2007, §6.4), taken directly
//! where it converges quickly, z < (a + 1)/(a + b + 2), and through
//! I_z(a, b) = 1 − I_{1−z}(b, a) otherwise; on that side I_z(a, b) is at
//! least about 0.3, so the complement keeps the relative accuracy of the
//! small tail. The prefactor z^a·(1 − z)^b/B(a, b) is formed in logarithms
//! from ln(1 + t²/ν) and ln(1 + ν/t²) (no cancellation, no overflow) and
//! B(ν/2, ½) from the Stirling-series ratio `ln_mean_s` (the two ln Γ never
//! meet). Near the switching point the fraction needs O(√ν) terms; past
//! [`MAX_TERMS`] it gives up and the caller integrates instead, so the path
//! serves ν up to [`NU_MAX`] and moderate t, where the solves and the
//! sample-size searches spend their time. Verified with the integral against
//! mpmath (tests/dist_t.rs).

/// ½·ln π.
const LN_SQRT_PI: f64 = 0.572_364_942_924_700_1;
/// Continued-fraction terms allowed before falling back to the integral.
const MAX_TERMS: usize = 300;
/// Largest ν served: beyond it the fraction's rounding (which grows with
/// ν, 3e-12 relative at ν = 1e6 in the 1e-20 tail) would exceed the
/// integral's, measured against the mpmath references.
const NU_MAX: f64 = 1e5;
/// Smallest |denominator| of the Lentz recurrence.
const TINY: f64 = 1e-300;

/// ln P(T ≤ t) for T ~ t(ν), or `None` when the continued fraction would
/// be slow or ν > [`NU_MAX`] (the caller then integrates).
pub(super) fn ln_lower_central(t: f64, nu: f64) -> Option<f64> {
    if !(t.is_finite() && t != 0.0 && nu > 0.0 && nu <= NU_MAX) {
        return None;
    }
    let (a, b) = (0.5 * nu, 0.5);
    // ln r with r = t²/ν, then ln z = −ln(1 + r) and ln(1 − z) = −ln(1 + 1/r).
    // r itself when t² cannot overflow (1.5 ulp), else through logarithms.
    let direct = t.abs() < 1e150 && nu > 1e-150;
    let ln_r = if direct { (t * t / nu).ln() } else { 2.0 * t.abs().ln() - nu.ln() };
    let (ln_z, ln_1mz, z, one_minus_z) = if ln_r <= 0.0 {
        let r = if direct { t * t / nu } else { ln_r.exp() };
        let l = r.ln_1p();
        (-l, ln_r - l, 1.0 / (1.0 + r), r / (1.0 + r))
    } else {
        let q = (-ln_r).exp();
        let l = q.ln_1p();
        (-(ln_r + l), -l, q / (1.0 + q), 1.0 / (1.0 + q))
    };
    // ln B(a, ½) = ln Γ(a) + ln Γ(½) − ln Γ(a + ½), and
    // ln_mean_s(ν) = ½·ln(1/a) + ln Γ(a + ½) − ln Γ(a).
    let ln_beta = LN_SQRT_PI - ln_mean_s(nu) - 0.5 * a.ln();
    let ln_front = a * ln_z + b * ln_1mz - ln_beta;
    // ln I_z(a, ½), the doubled small tail P(T ≤ −|t|).
    let ln_i = if z < (a + 1.0) / (a + b + 2.0) {
        ln_front - a.ln() + continued_fraction(a, b, z, one_minus_z)?.ln()
    } else {
        let j = (ln_front - b.ln() + continued_fraction(b, a, one_minus_z, z)?.ln()).exp();
        (-j).ln_1p()
    };
    let ln_small = ln_i - std::f64::consts::LN_2;
    Some(if t < 0.0 { ln_small } else { (-ln_small.exp()).ln_1p() })
}

/// ln E[S] = ln(√(2/ν)·Γ((ν+1)/2)/Γ(ν/2)) for S = √(V/ν), V ~ χ²(ν), by
/// Stirling's series for large ν (the two ln Γ would cancel to 13 digits
/// at ν = 1e6). It gives ln B(ν/2, ½) = ln √π − ln E[S] − ½·ln(ν/2), and
/// the central t density's normalising constant 1/(√ν·B(ν/2, ½)) =
/// E[S]/√(2π).
pub(super) fn ln_mean_s(nu: f64) -> f64 {
    let a = 0.5 * nu;
    if a < 10.0 {
        0.5 * (1.0 / a).ln() + libm::lgamma(a + 0.5) - libm::lgamma(a)
    } else {
        // ln Γ(a+½) − ln Γ(a) = ½·ln a + a·(ln(1+x) − x) + μ(a+½) − μ(a)
        // with x = 1/(2a); the ½·ln a cancels against ln √(2/ν).
        let x = 0.5 / a;
        let mu = |z: f64| {
            let r = 1.0 / (z * z);
            (1.0 / 12.0 - r * (1.0 / 360.0 - r * (1.0 / 1260.0 - r * (1.0 / 1680.0 - r / 1188.0))))
                / z
        };
        let log1pmx = x.ln_1p() - x;
        a * log1pmx + mu(a + 0.5) - mu(a)
    }
}

/// The continued fraction of I_x(a, b)·a·B(a, b)/(x^a·(1 − x)^b)
/// (A&S 26.5.8) by the modified Lentz algorithm, given x and 1 − x;
/// `None` when it has not
/// converged to rounding within [`MAX_TERMS`] terms.
fn continued_fraction(a: f64, b: f64, x: f64, one_minus_x: f64) -> Option<f64> {
    let guard = |v: f64| if v.abs() < TINY { TINY } else { v };
    let (qab, qap, qam) = (a + b, a + 1.0, a - 1.0);
    let mut c = 1.0;
    // 1 − (a + b)·x/(a + 1), without the cancellation near x = 1.
    let mut d = 1.0 / guard((qap * one_minus_x + (1.0 - b) * x) / qap);
    let mut h = d;
    for m in 1..=MAX_TERMS {
        let m = m as f64;
        let m2 = 2.0 * m;
        // Even step.
        let aa = m * (b - m) * x / ((qam + m2) * (a + m2));
        d = 1.0 / guard(1.0 + aa * d);
        c = guard(1.0 + aa / c);
        h *= d * c;
        // Odd step.
        let aa = -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2));
        d = 1.0 / guard(1.0 + aa * d);
        c = guard(1.0 + aa / c);
        let del = d * c;
        h *= del;
        if (del - 1.0).abs() <= 2.0 * f64::EPSILON {
            return if h.is_finite() && h > 0.0 { Some(h) } else { None };
        }
    }
    None
}

/// ln f(x) of t(ν) from the closed form, given ln f(0) (see
/// `StudentT::new`); finite x, ν ≤ the normal-limit switch.
pub(super) fn ln_density_closed(x: f64, nu: f64, ln_f0: f64) -> f64 {
    let x2 = x * x;
    // ln(1 + x²/ν), rewritten for |x| > √ν so that x² may overflow
    // without the logarithm doing so.
    let ln_base = if x2 <= nu {
        (x2 / nu).ln_1p()
    } else {
        2.0 * x.abs().ln() - nu.ln() + (nu / x2).ln_1p()
    };
    ln_f0 - 0.5 * (nu + 1.0) * ln_base
}
