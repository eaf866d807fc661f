//! The scaled chi-square distribution: the law of s·χ²(ν) for df ν > 0 and
//! scale s > 0.
//!
//! With s = 1 it is the ordinary chi-square; it is the sampling distribution
//! of (n − 1)·S²/σ0² when the true variance is s·σ0². Equivalently it is a
//! gamma distribution with shape a = ν/2 and scale 2s, so with y = x/(2s):
//!
//! - density: y^(a−1)·e^(−y)/Γ(a)/(2s), through Loader's `dpois_raw`
//!   (C. Loader, "Fast and accurate computation of binomial probabilities",
//!   2000), which avoids the large cancelling logarithms of the direct form;
//! - tails: the regularised incomplete gamma functions P(a, y) and Q(a, y) of
//!   `special.rs` (power series, Legendre's continued fraction, and Temme's
//!   uniform asymptotic expansion for a ≥ 5e5), each accurate in its own
//!   tail;
//! - quantiles: Newton's method on ln(tail) against ln y, started from the
//!   Wilson–Hilferty approximation. For a gamma law both ln P and ln Q are
//!   concave in ln y (the density of ln Y is log-concave), so after at most
//!   one overshooting step the iterates approach the root from one side.
//!   Steps are capped at a factor e¹⁰ in y, a bracket catches steps that
//!   leave it, and the search gives up with `DidNotConverge` after 200
//!   iterations.

use super::special::{gamma_pq, ln_dpois_raw};
use super::{Continuous, DistError, Normal, check};
use libm::lgamma;

/// Iteration budget of the quantile search.
const MAX_ITER: usize = 200;

/// Scaled chi-square distribution `scale`·χ²(`df`), df and scale finite and
/// > 0.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ScaledChiSquare {
    df: f64,
    scale: f64,
}

impl ScaledChiSquare {
    pub fn new(df: f64, scale: f64) -> Result<Self, DistError> {
        let df = check("df", df, df.is_finite() && df > 0.0, "finite and > 0")?;
        let scale = check("scale", scale, scale.is_finite() && scale > 0.0, "finite and > 0")?;
        Ok(ScaledChiSquare { df, scale })
    }

    /// Degrees of freedom ν.
    pub fn df(&self) -> f64 {
        self.df
    }

    /// Scale factor s (1 for the ordinary chi-square).
    pub fn scale(&self) -> f64 {
        self.scale
    }

    /// Gamma shape a = ν/2.
    fn shape(&self) -> f64 {
        0.5 * self.df
    }

    /// ln of the gamma(a, 1) density at y > 0: y^(a−1)e^(−y)/Γ(a).
    fn ln_gamma_density(&self, y: f64) -> f64 {
        let a = self.shape();
        if a >= 1.0 {
            ln_dpois_raw(a - 1.0, y)
        } else {
            // y^(a−1)e^(−y)/Γ(a) = (a/y)·y^a·e^(−y)/Γ(a + 1).
            // ln a − ln y rather than ln(a/y), which overflows for
            // subnormal y.
            ln_dpois_raw(a, y) + (a.ln() - y.ln())
        }
    }

    /// Solve P(a, y) = target (`lower`) or Q(a, y) = target for y, with
    /// target in (0, ½]; Newton on ln(tail) in u = ln y.
    fn solve(&self, target: f64, lower: bool) -> Result<f64, DistError> {
        let a = self.shape();
        let ln_target = target.ln();
        let z = Normal::STANDARD.quantile(target).unwrap_or(0.0);
        let z = if lower { z } else { -z };
        // Wilson–Hilferty for χ²(2a)/2; where its cube root base is not
        // positive (tiny a, far lower tail) use P(a, y) ≈ y^a/Γ(a + 1).
        let base = 1.0 - 1.0 / (9.0 * a) + z / (3.0 * a.sqrt());
        let u =
            if base > 0.0 { a.ln() + 3.0 * base.ln() } else { (ln_target + lgamma(a + 1.0)) / a };
        let u = if u.is_finite() { u } else { a.ln() };
        // The bracket is kept in y itself: ln y has an absolute rounding of
        // |ln y|·ε, too coarse to compare ulp-sized Newton steps against.
        let mut y = u.exp();
        let (mut lo, mut hi) = (0.0, f64::INFINITY);
        let mut expand: f64 = 1.0;
        let mut best = (f64::INFINITY, y);
        for _ in 0..MAX_ITER {
            let (p, q) = gamma_pq(a, y);
            let t = if lower { p } else { q };
            // s increases with y in both cases.
            let g = t.ln() - ln_target;
            let s = if lower { g } else { -g };
            if s.is_nan() {
                break;
            }
            if s == 0.0 || g.abs() < 1e-15 {
                return Ok(y);
            }
            if s > 0.0 {
                hi = y;
            } else {
                lo = y;
            }
            if g.abs() < best.0 {
                best = (g.abs(), y);
            }
            // Where one ulp of y moves the tail by more than the tolerance
            // (huge df), Newton ends up hopping across the root; a bracket a
            // few ulps wide is then the answer.
            if hi.is_finite() && hi - lo <= 8.0 * f64::EPSILON * hi {
                return Ok(best.1);
            }
            // ds/d(ln y) = y·f(y)/T(y) for both tails.
            let d = (y.ln() + self.ln_gamma_density(y) - t.ln()).exp();
            // Far from the root the tangent of the convex −ln Q can point
            // absurdly far; a factor e¹⁰ per step keeps y finite.
            let step = (-s / d).clamp(-10.0, 10.0);
            // y·e^step with full relative precision.
            let mut next = y + y * step.exp_m1();
            // A Newton step below an ulp or two: converged (tested before the
            // bracket, whose ends may be y itself).
            if (next - y).abs() <= 2.0 * f64::EPSILON * y {
                return Ok(y);
            }
            if !(next > lo && next < hi && next.is_finite()) {
                next = if lo > 0.0 && hi.is_finite() {
                    (0.5 * (lo.ln() + hi.ln())).exp()
                } else if s > 0.0 {
                    y * (-expand).exp()
                } else {
                    y * expand.exp()
                };
                expand *= 2.0;
            }
            if next == 0.0 {
                return Ok(next);
            }
            y = next;
        }
        Err(DistError::DidNotConverge { what: "scaled chi-square quantile", iterations: MAX_ITER })
    }
}

fn check_probability(p: f64) -> Result<f64, DistError> {
    if (0.0..=1.0).contains(&p) { Ok(p) } else { Err(DistError::Probability(p)) }
}

impl Continuous for ScaledChiSquare {
    fn pdf(&self, x: f64) -> f64 {
        let a = self.shape();
        if x.is_nan() {
            return f64::NAN;
        }
        if x == 0.0 {
            // The density at 0 is infinite, 1/(2s) or 0 as a <, =, > 1.
            return if a < 1.0 {
                f64::INFINITY
            } else if a == 1.0 {
                0.5 / self.scale
            } else {
                0.0
            };
        }
        if x < 0.0 || x == f64::INFINITY {
            return 0.0;
        }
        // Exponentiate before dividing by 2s, so the division does not add
        // the rounding of a shifted logarithm.
        let two_s = 2.0 * self.scale;
        self.ln_gamma_density(x / two_s).exp() / two_s
    }

    fn ln_pdf(&self, x: f64) -> f64 {
        if x.is_nan() {
            return f64::NAN;
        }
        if x < 0.0 || x == f64::INFINITY {
            return f64::NEG_INFINITY;
        }
        if x == 0.0 {
            return self.pdf(0.0).ln();
        }
        let two_s = 2.0 * self.scale;
        self.ln_gamma_density(x / two_s) - two_s.ln()
    }

    fn cdf(&self, x: f64) -> f64 {
        if x.is_nan() {
            return f64::NAN;
        }
        gamma_pq(self.shape(), x / (2.0 * self.scale)).0
    }

    fn sf(&self, x: f64) -> f64 {
        if x.is_nan() {
            return f64::NAN;
        }
        gamma_pq(self.shape(), x / (2.0 * self.scale)).1
    }

    fn quantile(&self, p: f64) -> Result<f64, DistError> {
        let p = check_probability(p)?;
        let y = match p {
            0.0 => return Ok(0.0),
            1.0 => return Ok(f64::INFINITY),
            _ if p <= 0.5 => self.solve(p, true)?,
            // 1 − p is exact for p ≥ ½.
            _ => self.solve(1.0 - p, false)?,
        };
        Ok(y * 2.0 * self.scale)
    }

    fn quantile_upper(&self, q: f64) -> Result<f64, DistError> {
        let q = check_probability(q)?;
        let y = match q {
            0.0 => return Ok(f64::INFINITY),
            1.0 => return Ok(0.0),
            _ if q <= 0.5 => self.solve(q, false)?,
            _ => self.solve(1.0 - q, true)?,
        };
        Ok(y * 2.0 * self.scale)
    }

    fn centre(&self) -> f64 {
        self.df * self.scale
    }

    fn spread(&self) -> f64 {
        self.scale * (2.0 * self.df).sqrt()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_parameters_are_errors() {
        for (df, scale) in [
            (0.0, 1.0),
            (-1.0, 1.0),
            (f64::NAN, 1.0),
            (f64::INFINITY, 1.0),
            (3.0, 0.0),
            (3.0, -2.0),
            (3.0, f64::NAN),
            (3.0, f64::INFINITY),
        ] {
            assert!(
                matches!(ScaledChiSquare::new(df, scale), Err(DistError::Parameter { .. })),
                "{df} {scale}"
            );
        }
        assert_eq!(
            ScaledChiSquare::new(-1.0, 1.0).unwrap_err().to_string(),
            "df is -1, but must be finite and > 0"
        );
        assert_eq!(
            ScaledChiSquare::new(2.0, 0.0).unwrap_err().to_string(),
            "scale is 0, but must be finite and > 0"
        );
        let c = ScaledChiSquare::new(3.0, 1.0).unwrap();
        assert_eq!(c.quantile(2.0), Err(DistError::Probability(2.0)));
        assert!(c.quantile_upper(f64::NAN).is_err());
    }

    #[test]
    fn tails_are_complements_and_nan_propagates() {
        for df in [1e-3, 0.5, 1.0, 2.0, 7.3, 300.0, 9.99e5, 1e6, 2e6, 1e12, 1e300] {
            for scale in [0.25, 1.0, 4.0] {
                let c = ScaledChiSquare::new(df, scale).unwrap();
                let m = c.centre();
                for x in [
                    0.0,
                    1e-300,
                    1e-3 * m,
                    0.5 * m,
                    m,
                    m + c.spread(),
                    3.0 * m,
                    1e300,
                    f64::INFINITY,
                    -1.0,
                ] {
                    let (p, q) = (c.cdf(x), c.sf(x));
                    assert!((p + q - 1.0).abs() < 1e-14, "df={df} scale={scale} x={x}: {p} + {q}");
                    assert!(c.pdf(x) >= 0.0 && !c.ln_pdf(x).is_nan());
                }
                assert!(c.cdf(f64::NAN).is_nan() && c.sf(f64::NAN).is_nan());
                assert!(c.pdf(f64::NAN).is_nan() && c.ln_pdf(f64::NAN).is_nan());
            }
        }
    }

    #[test]
    fn closed_forms() {
        // df = 2, scale = 1: exponential with mean 2.
        let c = ScaledChiSquare::new(2.0, 1.0).unwrap();
        for x in [1e-8, 0.3, 5.0, 700.0] {
            let sf = (-x / 2.0f64).exp();
            // The exponent's rounding, |ln sf|·1.1e−16, bounds the agreement.
            assert!(((c.sf(x) - sf) / sf).abs() < 1e-13, "x={x}");
            assert!(((c.pdf(x) - sf / 2.0) / (sf / 2.0)).abs() < 1e-13);
        }
        assert_eq!(c.pdf(0.0), 0.5);
        let q = c.quantile_upper(1e-100).unwrap();
        assert!((q - 200.0 * std::f64::consts::LN_10).abs() < 1e-12 * q);
    }

    #[test]
    fn quantiles_invert_the_tails() {
        for df in [0.01, 0.5, 3.0, 80.0, 2e6, 1e10] {
            let c = ScaledChiSquare::new(df, 1.7).unwrap();
            for p in [1e-300, 1e-20, 0.01, 0.5, 0.9, 1.0 - 1e-10] {
                // A one-ulp change of x moves the tail by ε·x·f(x)/tail
                // relative, which is large for huge df; allow for it.
                let x = c.quantile(p).unwrap();
                let slack = 1e-9 + 1e-15 * x * c.pdf(x) / p;
                // Quantiles below 1e−290 are not representable to full precision.
                assert!(
                    x < 1e-290 || ((c.cdf(x) - p) / p).abs() < slack,
                    "df={df} p={p} x={x} cdf={}",
                    c.cdf(x)
                );
                let x = c.quantile_upper(p).unwrap();
                let slack = 1e-9 + 1e-15 * x * c.pdf(x) / p;
                assert!(
                    x < 1e-290 || ((c.sf(x) - p) / p).abs() < slack,
                    "df={df} q={p} x={x} sf={}",
                    c.sf(x)
                );
            }
        }
    }
}
