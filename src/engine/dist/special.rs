//! Private special functions shared by the binomial, Poisson and scaled
//! chi-square distributions.
//!
//! Densities follow C. Loader, "Fast and accurate computation of binomial
//! probabilities" (2000): a probability mass is written as
//! `exp(−stirlerr − bd0) / √(2π·k)`, where `stirlerr` is the error of
//! Stirling's formula and `bd0(x, m) = x·ln(x/m) + m − x` is evaluated by a
//! series near `x = m`, so no large, nearly cancelling logarithms appear.
//!
//! The regularised incomplete gamma functions P(a, x) and Q(a, x) use the
//! power series for P when x < a + 1 and Legendre's continued fraction for Q
//! otherwise (Abramowitz & Stegun 6.5.29 and 6.5.31, evaluated with the
//! modified Lentz method), both with Loader's prefactor; the other tail is
//! the complement, which is ≥ about ½ wherever it is formed. For a ≥
//! [`TEMME_MIN_A`] both series need O(√a) terms, so Temme's uniform
//! asymptotic expansion takes over (N. M. Temme, "The asymptotic expansion of
//! the incomplete gamma functions", SIAM J. Math. Anal. 10, 1979; the
//! coefficients as tabulated by A. R. DiDonato and A. H. Morris, ACM TOMS 12,
//! 1986).

use libm::{erfc, lgamma};

/// ln(2π).
const LN_2PI: f64 = 1.837_877_066_409_345_5;
/// ln √(2π).
const LN_SQRT_2PI: f64 = 0.918_938_533_204_672_8;

/// Shape above which the incomplete gamma uses Temme's expansion. There the
/// first two correction terms leave a truncation error of order
/// 4e−3·a⁻² relative to the correction itself, far below 1e−15.
pub(crate) const TEMME_MIN_A: f64 = 5.0e5;

/// Stirling's error δ(x) = ln Γ(x + 1) − (x + ½)·ln x + x − ln √(2π), for
/// x > 0 (Loader 2000, section 2).
///
/// Above 15 the asymptotic series 1/(12x) − 1/(360x³) + … is used, cut where
/// the next term is below 1e−16 relative; below, the definition through
/// `libm::lgamma`, whose absolute error there (≈ 1e−15) enters every density
/// as a relative error of the same size.
pub(crate) fn stirlerr(x: f64) -> f64 {
    const S0: f64 = 1.0 / 12.0;
    const S1: f64 = 1.0 / 360.0;
    const S2: f64 = 1.0 / 1260.0;
    const S3: f64 = 1.0 / 1680.0;
    const S4: f64 = 1.0 / 1188.0;
    if x.is_nan() {
        return f64::NAN;
    }
    if x <= 15.0 {
        return lgamma(x + 1.0) - (x + 0.5) * x.ln() + x - LN_SQRT_2PI;
    }
    let xx = x * x;
    if x > 500.0 {
        (S0 - S1 / xx) / x
    } else if x > 80.0 {
        (S0 - (S1 - S2 / xx) / xx) / x
    } else if x > 35.0 {
        (S0 - (S1 - (S2 - S3 / xx) / xx) / xx) / x
    } else {
        (S0 - (S1 - (S2 - (S3 - S4 / xx) / xx) / xx) / xx) / x
    }
}

/// Deviance term bd0(x, m) = x·ln(x/m) + m − x ≥ 0 for x ≥ 0, m > 0
/// (Loader 2000, section 3).
///
/// Near x = m the closed form cancels catastrophically, so with
/// v = (x − m)/(x + m) the series (x − m)·v + 2x·Σ v^(2j+1)/(2j+1) is summed
/// instead. Loader uses it for |v| < 0.1; here it is used up to |v| < ½
/// (x/m between ⅓ and 3), where it still converges like 4^(−j) and, unlike
/// the closed form, keeps a relative error of a few ulps: the closed form
/// loses x·ε to the rounding of x/m, which is 1e−12 in the exponent of a
/// mass for x ≈ 1e4.
pub(crate) fn bd0(x: f64, m: f64) -> f64 {
    if x.is_nan() || m.is_nan() {
        return f64::NAN;
    }
    if x == 0.0 {
        return m;
    }
    if !x.is_finite() || !m.is_finite() || m <= 0.0 {
        return f64::INFINITY;
    }
    let d = x - m;
    if d.abs() < 0.5 * (x + m) {
        let mut v = d / (x + m);
        let mut s = d * v;
        let mut ej = 2.0 * x * v;
        v *= v;
        // v² < ¼, so 30 terms reach below 1e−18 relative.
        for j in 1..80 {
            ej *= v;
            let s1 = s + ej / f64::from(2 * j + 1);
            if s1 == s {
                return s1;
            }
            s = s1;
        }
        s
    } else {
        // x/m can overflow or underflow for subnormal arguments; the
        // difference of logarithms cannot.
        let r = x / m;
        let l = if r.is_normal() { r.ln() } else { x.ln() - m.ln() };
        x * l + m - x
    }
}

/// ln of the Poisson-type mass m^x·e^(−m)/Γ(x + 1) for real x ≥ 0, m ≥ 0
/// (Loader's `dpois_raw`; for integer x it is the Poisson pmf).
pub(crate) fn ln_dpois_raw(x: f64, m: f64) -> f64 {
    if x.is_nan() || m.is_nan() {
        return f64::NAN;
    }
    if m == 0.0 {
        return if x == 0.0 { 0.0 } else { f64::NEG_INFINITY };
    }
    if !m.is_finite() || !x.is_finite() {
        return f64::NEG_INFINITY;
    }
    if x == 0.0 {
        return -m;
    }
    -stirlerr(x) - bd0(x, m) - 0.5 * (LN_2PI + x.ln())
}

/// The mass m^x·e^(−m)/Γ(x + 1), see [`ln_dpois_raw`].
pub(crate) fn dpois_raw(x: f64, m: f64) -> f64 {
    ln_dpois_raw(x, m).exp()
}

/// Sum the terms t₀ = 1, t₁ = r₀, t₂ = r₀·r₁, … of a positive series whose
/// ratios `ratio(i)` (from term i to term i + 1, i passed as an f64) do not increase with i, for
/// at most `max_terms` ratios. Returns the sum, relative to the first term.
///
/// Stopping rule: when the current ratio r < 1, the rest is below
/// t·r/(1 − r) (a geometric bound, valid because the ratios keep falling);
/// the sum stops once that bound is below 1e−17 of the sum.
/// `ratio` returns 0 past the end of a finite support.
pub(crate) fn sum_decreasing(mut ratio: impl FnMut(f64) -> f64, max_terms: u64) -> f64 {
    let mut term = 1.0;
    let mut sum = 1.0;
    // The index runs as an f64 (exact below 2⁵³): converting a u64 on every
    // step costs more than the step itself.
    let limit = max_terms as f64;
    let mut i = 0.0;
    while i < limit {
        let r = ratio(i);
        if r.is_nan() || r <= 0.0 {
            break;
        }
        term *= r;
        sum += term;
        if r < 1.0 && term * r < 1.0e-17 * sum * (1.0 - r) {
            break;
        }
        i += 1.0;
    }
    sum
}

/// Lower and upper regularised incomplete gamma functions (P(a, x), Q(a, x))
/// for a > 0, each with full relative accuracy in its own tail.
pub(crate) fn gamma_pq(a: f64, x: f64) -> (f64, f64) {
    if a.is_nan() || x.is_nan() || a <= 0.0 {
        return (f64::NAN, f64::NAN);
    }
    if x <= 0.0 {
        return (0.0, 1.0);
    }
    if x == f64::INFINITY {
        return (1.0, 0.0);
    }
    if a == f64::INFINITY {
        return (0.0, 1.0);
    }
    if a >= TEMME_MIN_A {
        return temme_pq(a, x);
    }
    if x < a + 1.0 {
        let p = gamma_p_series(a, x);
        (p, 1.0 - p)
    } else {
        let q = gamma_q_fraction(a, x);
        (1.0 - q, q)
    }
}

/// Iteration budget for the series and the continued fraction: both need
/// O(√a) steps near x = a and fewer elsewhere.
fn budget(a: f64) -> u64 {
    (200.0 + 40.0 * a.sqrt()) as u64
}

/// P(a, x) = x^a·e^(−x)/Γ(a + 1) · Σₙ xⁿ/((a + 1)…(a + n)) (A&S 6.5.29),
/// for x < a + 1, where the ratios x/(a + n + 1) fall below 1 from the start
/// or after a few terms.
fn gamma_p_series(a: f64, x: f64) -> f64 {
    let pre = dpois_raw(a, x);
    if pre == 0.0 {
        return 0.0;
    }
    let s = sum_decreasing(|i| x / (a + (i + 1.0)), budget(a));
    pre * s
}

/// Q(a, x) = x^a·e^(−x)/Γ(a) · 1/(x + 1 − a − 1·(1 − a)/(x + 3 − a − …))
/// (Legendre's continued fraction, A&S 6.5.31), for x ≥ a + 1, evaluated by
/// the modified Lentz method.
fn gamma_q_fraction(a: f64, x: f64) -> f64 {
    // x^a·e^(−x)/Γ(a) = a·x^a·e^(−x)/Γ(a + 1).
    let pre = a * dpois_raw(a, x);
    if pre == 0.0 {
        return 0.0;
    }
    const TINY: f64 = 1.0e-300;
    let mut b = x + 1.0 - a;
    let mut c = 1.0 / TINY;
    let mut d = 1.0 / b;
    let mut h = d;
    let n = budget(a);
    let mut i = 1u64;
    while i <= n {
        let fi = i as f64;
        let an = -fi * (fi - a);
        b += 2.0;
        d = an * d + b;
        if d.abs() < TINY {
            d = TINY;
        }
        c = b + an / c;
        if c.abs() < TINY {
            c = TINY;
        }
        d = 1.0 / d;
        let del = d * c;
        h *= del;
        if (del - 1.0).abs() < 1.0e-16 {
            break;
        }
        i += 1;
    }
    pre * h
}

/// Temme's uniform expansion for large a (Temme 1979; DiDonato & Morris
/// 1986, eq. 15): with λ = x/a and η = sign(λ − 1)·√(2(λ − 1 − ln λ)),
///
/// Q(a, x) = ½·erfc(η·√(a/2)) + e^(−aη²/2)/√(2πa) · (c₀(η) + c₁(η)/a + …),
///
/// and P is the same with the sign of η and of the sum flipped. Here
/// a·η²/2 = bd0(a, x) exactly, which keeps the exponent accurate near λ = 1.
fn temme_pq(a: f64, x: f64) -> (f64, f64) {
    let w = bd0(a, x);
    let z = w.sqrt();
    let eta = (2.0 * w / a).sqrt();
    let eta = if x < a { -eta } else { eta };
    let r = (-w).exp() / (2.0 * std::f64::consts::PI * a).sqrt()
        * (temme_c0(eta, x, a) + temme_c1(eta, x, a) / a);
    if x >= a {
        let q = 0.5 * erfc(z) + r;
        (1.0 - q, q)
    } else {
        let p = 0.5 * erfc(z) - r;
        (p, 1.0 - p)
    }
}

/// c₀(η) = 1/(λ − 1) − 1/η. Below |η| = 0.1 the two terms cancel, so the
/// Taylor series of DiDonato & Morris (1986, coefficients d₀ₖ) is used; its
/// truncation after η¹⁰ leaves less than 1e−17 (checked against mpmath).
fn temme_c0(eta: f64, x: f64, a: f64) -> f64 {
    const D0: [f64; 11] = [
        -1.0 / 3.0,
        1.0 / 12.0,
        -2.0 / 135.0,
        1.0 / 864.0,
        1.0 / 2835.0,
        -139.0 / 777_600.0,
        1.0 / 25_515.0,
        -571.0 / 261_273_600.0,
        -1.854_062_210_715_16e-6,
        8.296_711_340_953_086e-7,
        -1.766_595_273_682_607_9e-7,
    ];
    if eta.abs() < 0.1 {
        D0.iter().rev().fold(0.0, |acc, &d| acc * eta + d)
    } else {
        // λ − 1 = (x − a)/a, formed from the exact difference.
        a / (x - a) - 1.0 / eta
    }
}

/// c₁(η) = 1/η³ − 1/(λ − 1)³ − 1/(λ − 1)² − 1/(12(λ − 1)); it enters divided
/// by a ≥ 5e5, so three Taylor terms (d₁ₖ of DiDonato & Morris) suffice below
/// |η| = 0.1, where the closed form cancels.
fn temme_c1(eta: f64, x: f64, a: f64) -> f64 {
    if eta.abs() < 0.1 {
        -1.0 / 540.0 + eta * (-1.0 / 288.0 + eta / 378.0)
    } else {
        let l1 = (x - a) / a;
        1.0 / (eta * eta * eta) - 1.0 / (l1 * l1 * l1) - 1.0 / (l1 * l1) - 1.0 / (12.0 * l1)
    }
}

/// Smallest integer k in [0, max] for which `pred(k)` holds, where `pred` is
/// false below some point and true from there on and `pred(max)` is true.
/// Starts from `guess`, brackets by doubling steps, then bisects; every
/// phase is capped at 64 steps, which covers the whole `u64` range.
pub(crate) fn smallest_true(guess: u64, max: u64, mut pred: impl FnMut(u64) -> bool) -> u64 {
    let g = guess.min(max);
    // Invariant after bracketing: pred(hi) is true and (lo is None or
    // pred(lo) is false), with lo < hi.
    let (mut lo, mut hi): (Option<u64>, u64);
    if pred(g) {
        hi = g;
        lo = None;
        let mut step = 1u64;
        for _ in 0..64 {
            if hi == 0 {
                break;
            }
            let cand = hi.saturating_sub(step);
            if pred(cand) {
                hi = cand;
                step = step.saturating_mul(2);
            } else {
                lo = Some(cand);
                break;
            }
        }
        if lo.is_none() && hi != 0 {
            // Not reached in 64 doublings: fall back to the support's start.
            if pred(0) {
                return 0;
            }
            lo = Some(0);
        }
    } else {
        lo = Some(g);
        hi = max;
        let mut step = 1u64;
        for _ in 0..64 {
            let cand = g.saturating_add(step).min(max);
            if pred(cand) {
                hi = cand;
                break;
            }
            lo = Some(cand);
            if cand == max {
                break;
            }
            step = step.saturating_mul(2);
        }
    }
    let Some(mut l) = lo else { return hi };
    for _ in 0..70 {
        if hi - l <= 1 {
            break;
        }
        let mid = l + (hi - l) / 2;
        if pred(mid) {
            hi = mid;
        } else {
            l = mid;
        }
    }
    hi
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stirlerr_is_continuous_at_the_switch() {
        // The lgamma definition and the series must agree where they meet.
        let below = lgamma(16.0) - 15.5 * 15.0f64.ln() + 15.0 - LN_SQRT_2PI;
        assert!((stirlerr(15.0) - below).abs() < 1e-15);
        let s = 15.000001;
        let def = lgamma(s + 1.0) - (s + 0.5) * s.ln() + s - LN_SQRT_2PI;
        assert!((stirlerr(s) - def).abs() < 5e-15);
    }

    #[test]
    fn smallest_true_finds_the_edge() {
        for edge in [0u64, 1, 2, 7, 1000, 123_456_789, u64::MAX] {
            for guess in [0u64, 5, 999, 1001, u64::MAX / 2, u64::MAX] {
                assert_eq!(smallest_true(guess, u64::MAX, |k| k >= edge), edge);
            }
        }
        assert_eq!(smallest_true(3, 10, |k| k >= 10), 10);
    }
}
