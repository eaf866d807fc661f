//! The Poisson distribution with mean λ.
//!
//! The mass is Loader's `dpois_raw` (C. Loader, "Fast and accurate
//! computation of binomial probabilities", 2000):
//! `exp(−δ(k) − bd0(k, λ)) / √(2πk)`, with Stirling's error δ and the
//! deviance term bd0 of `special.rs`; λ is taken exactly as given.
//!
//! For λ ≤ 1e7 each tail is a sum of mass terms taken outward from k (ratios
//! k/λ downward, λ/(k + 1) upward), stopped by a geometric bound. For
//! k + 1 ≤ λ the lower tail is summed and P(X > k) is its complement; for
//! k > λ the upper tail is summed and P(X ≤ k) is its complement. A Poisson
//! median lies in [λ − ln 2, λ + ⅓] (K. P. Choi, Proc. AMS 121, 1994), so
//! each complement is then ≥ ½. At k = ⌊λ⌋ the lower tail is summed; the
//! upper tail is its complement when that is ≥ ¼ and is summed otherwise.
//! Beyond 1e7 the sums would need more than 3e4 terms, and the tails come
//! from the regularised incomplete gamma function instead:
//! P(X ≤ k) = Q(k + 1, λ), P(X > k) = P(k + 1, λ), which uses Temme's
//! uniform expansion for such large arguments.

use super::special::{gamma_pq, ln_dpois_raw, smallest_true, sum_decreasing};
use super::{Continuous, Discrete, DistError, Normal, check};

/// Largest mean whose tails are summed term by term.
const SUM_MAX_MEAN: f64 = 1.0e7;

/// Poisson distribution with finite mean λ > 0.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Poisson {
    mean: f64,
}

impl Poisson {
    pub fn new(mean: f64) -> Result<Self, DistError> {
        let mean = check("mean", mean, mean.is_finite() && mean > 0.0, "finite and > 0")?;
        Ok(Poisson { mean })
    }

    /// The mean λ (also the variance).
    pub fn mean(&self) -> f64 {
        self.mean
    }

    /// Iteration cap for a tail sum: about 20 standard deviations of terms
    /// plus a margin; the stopping rule ends well before it.
    fn max_terms(&self) -> u64 {
        (100.0 + 20.0 * self.mean.sqrt()) as u64
    }

    /// P(X ≤ k) for k ≤ λ, summed down from k.
    fn lower_sum(&self, k: u64) -> f64 {
        let pk = self.pmf(k);
        if pk == 0.0 {
            return 0.0;
        }
        let m = self.mean;
        // P(X = j−1)/P(X = j) = j/λ, with j = k − i.
        let kf = k as f64;
        pk * sum_decreasing(|i| if i >= kf { 0.0 } else { (kf - i) / m }, self.max_terms())
    }

    /// P(X ≥ k) for k > λ, summed up from k.
    fn upper_sum(&self, k: u64) -> f64 {
        let pk = self.pmf(k);
        if pk == 0.0 {
            return 0.0;
        }
        let m = self.mean;
        // P(X = j+1)/P(X = j) = λ/(j + 1), with j = k + i.
        let k1 = k as f64 + 1.0;
        pk * sum_decreasing(|i| m / (k1 + i), self.max_terms())
    }

    /// (P(X ≤ k), P(X > k)), each accurate in its own tail.
    fn tails(&self, k: u64) -> (f64, f64) {
        if k == u64::MAX {
            return (1.0, 0.0);
        }
        if self.mean > SUM_MAX_MEAN {
            let (p, q) = gamma_pq(k as f64 + 1.0, self.mean);
            return (q, p);
        }
        // Each complement below is ≥ ½ (see the module notes); at
        // k = ⌊mean⌋ neither need be, so the upper tail is summed too
        // unless it is ≥ ¼, where the complement costs at most 3ε relative.
        let (kf, m) = (k as f64, self.mean);
        if kf + 1.0 <= m {
            let c = self.lower_sum(k);
            (c, 1.0 - c)
        } else if kf > m {
            let s = self.upper_sum(k + 1);
            (1.0 - s, s)
        } else {
            let c = self.lower_sum(k);
            if c <= 0.75 { (c, 1.0 - c) } else { (c, self.upper_sum(k + 1)) }
        }
    }

    /// Normal-approximation starting point for the quantile searches.
    fn guess(&self, p: f64) -> u64 {
        let z = Normal::STANDARD.quantile(p.clamp(1e-300, 1.0 - 1e-16)).unwrap_or(0.0);
        let g = self.mean + z * self.mean.sqrt();
        if g.is_finite() && g > 0.0 { g as u64 } else { 0 }
    }
}

fn check_probability(p: f64) -> Result<f64, DistError> {
    if (0.0..=1.0).contains(&p) { Ok(p) } else { Err(DistError::Probability(p)) }
}

impl Discrete for Poisson {
    fn pmf(&self, k: u64) -> f64 {
        self.ln_pmf(k).exp()
    }

    fn ln_pmf(&self, k: u64) -> f64 {
        ln_dpois_raw(k as f64, self.mean)
    }

    fn cdf(&self, k: u64) -> f64 {
        self.tails(k).0
    }

    fn sf(&self, k: u64) -> f64 {
        self.tails(k).1
    }

    fn quantile(&self, p: f64) -> Result<u64, DistError> {
        let p = check_probability(p)?;
        if p == 0.0 {
            return Ok(0);
        }
        if p == 1.0 {
            // P(X ≤ k) < 1 for every finite k.
            return Ok(u64::MAX);
        }
        let g = self.guess(p);
        // For p > ½ read the condition off the upper tail, exact there:
        // P(X ≤ k) ≥ p ⇔ P(X > k) ≤ 1 − p (1 − p is exact for p ≥ ½).
        if p > 0.5 {
            let q = 1.0 - p;
            Ok(smallest_true(g, u64::MAX, |k| self.sf(k) <= q))
        } else {
            Ok(smallest_true(g, u64::MAX, |k| self.cdf(k) >= p))
        }
    }

    fn quantile_upper(&self, q: f64) -> Result<u64, DistError> {
        let q = check_probability(q)?;
        if q == 0.0 {
            // P(X > k) > 0 for every finite k.
            return Ok(u64::MAX);
        }
        let g = self.guess(1.0 - q);
        if q >= 0.5 {
            let p = 1.0 - q;
            Ok(smallest_true(g, u64::MAX, |k| self.cdf(k) >= p))
        } else {
            Ok(smallest_true(g, u64::MAX, |k| self.sf(k) <= q))
        }
    }

    fn support_max(&self) -> u64 {
        u64::MAX
    }

    fn centre(&self) -> f64 {
        self.mean
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_parameters_are_errors() {
        for m in [0.0, -1.0, f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let e = Poisson::new(m).unwrap_err();
            assert!(matches!(e, DistError::Parameter { name: "mean", .. }), "{e}");
        }
        assert_eq!(
            Poisson::new(-2.0).unwrap_err().to_string(),
            "mean is -2, but must be finite and > 0"
        );
        let d = Poisson::new(3.0).unwrap();
        assert_eq!(d.quantile(-0.5), Err(DistError::Probability(-0.5)));
        assert!(d.quantile_upper(f64::NAN).is_err());
    }

    #[test]
    fn tails_are_complements() {
        for m in [1e-3, 0.7, 10.0, 1e4, 1e7, 3e7, 1e12, 1e300] {
            let d = Poisson::new(m).unwrap();
            for k in [0u64, 1, 5, m as u64 / 2, m as u64, (2.0 * m) as u64, u64::MAX - 1, u64::MAX]
            {
                let (c, s) = (d.cdf(k), d.sf(k));
                assert!((c + s - 1.0).abs() < 1e-14, "mean={m} k={k}: {c} + {s}");
                assert!((0.0..=1.0).contains(&c) && (0.0..=1.0).contains(&s));
            }
        }
    }

    #[test]
    fn upper_tail_at_the_floor_of_the_mean_is_not_a_complement() {
        // k = 0 = ⌊λ⌋: P(X > 0) = 1 − e^(−λ) must not be formed as
        // 1 − P(X ≤ 0).
        let d = Poisson::new(1e-3).unwrap();
        let want = -(-1e-3f64).exp_m1();
        assert!(((d.sf(0) - want) / want).abs() < 1e-15, "{}", d.sf(0));
    }

    #[test]
    fn small_exact_values() {
        let d = Poisson::new(2.0).unwrap();
        // e^(−2)·2³/3!.
        let want = (-2.0f64).exp() * 8.0 / 6.0;
        assert!(((d.pmf(3) - want) / want).abs() < 1e-15);
        let total: f64 = (0..60).map(|k| d.pmf(k)).sum();
        assert!((total - 1.0).abs() < 1e-15);
    }

    #[test]
    fn quantiles_invert_the_tails() {
        for m in [0.01, 3.5, 2500.0, 5e7] {
            let d = Poisson::new(m).unwrap();
            for p in [1e-200, 1e-9, 0.2, 0.5, 0.8, 1.0 - 1e-12] {
                let k = d.quantile(p).unwrap();
                assert!(d.cdf(k) >= p && (k == 0 || d.cdf(k - 1) < p), "mean={m} p={p} k={k}");
                let k = d.quantile_upper(p).unwrap();
                assert!(d.sf(k) <= p && (k == 0 || d.sf(k - 1) > p), "mean={m} q={p} k={k}");
            }
        }
        let d = Poisson::new(1.0).unwrap();
        assert_eq!(d.quantile(1.0), Ok(u64::MAX));
        assert_eq!(d.quantile_upper(0.0), Ok(u64::MAX));
    }
}
