//! The binomial distribution Bin(n, p): successes in n independent trials
//! with success probability p.
//!
//! The mass follows C. Loader, "Fast and accurate computation of binomial
//! probabilities" (2000): `exp(δ(n) − δ(k) − δ(n−k) − bd0(k, np) −
//! bd0(n−k, nq)) · √(n / (2π·k·(n−k)))`, with Stirling's error δ and the
//! deviance term bd0 of `special.rs`. The products np and nq and the
//! complement q = 1 − p are carried with their rounding errors, because in
//! the far tails the mass reacts to a relative change ε of np with a
//! relative change of about ε·|k − np|, up to 1e−11 for n = 1e7.
//!
//! Both tails sum mass terms outward from k, using the exact ratio of
//! neighbouring terms; the terms fall away from the mode, so the sum is
//! stopped by a geometric bound on the remainder. For k + 1 ≤ np the lower
//! tail is summed and P(X > k) is its complement; for k > np the upper tail
//! is summed and P(X ≤ k) is its complement. A binomial median lies between
//! ⌊np⌋ and ⌈np⌉, so each complement is then ≥ ½ and loses nothing. At
//! k = ⌊np⌋ the lower tail is summed; the upper tail is its complement when
//! that is ≥ ¼ (costing at most 3ε relative) and is summed as well
//! otherwise.

use super::special::{bd0, smallest_true, stirlerr, sum_decreasing};
use statrs::function::gamma::ln_gamma;
use super::{Continuous, Discrete, DistError, Normal, check};

/// ln(2π).
const LN_2PI: f64 = 1.837_877_066_409_345_5;

/// Largest accepted number of trials. A tail sum needs about 9 standard
/// deviations of terms, so this bounds a call at about 1.5e5 terms.
const MAX_N: u64 = 1_000_000_000;

/// Binomial distribution with 1 ≤ n ≤ 1e9 trials and success probability
/// p in [0, 1].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Binomial {
    n: u64,
    p: f64,
    /// q = 1 − p rounded, and its rounding error: q + q_lo = 1 − p exactly.
    q: f64,
    q_lo: f64,
}

impl Binomial {
    pub fn new(n: u64, p: f64) -> Result<Self, DistError> {
        check("n", n as f64, (1..=MAX_N).contains(&n), "a whole number from 1 to 1000000000")?;
        let p = check("p", p, (0.0..=1.0).contains(&p), "between 0 and 1")?;
        let q = 1.0 - p;
        // Exact for 0 ≤ p ≤ 1 (Fast2Sum, since |1| ≥ |p|).
        let q_lo = (1.0 - q) - p;
        Ok(Binomial { n, p, q, q_lo })
    }

    /// Number of trials.
    pub fn n(&self) -> u64 {
        self.n
    }

    /// Success probability.
    pub fn p(&self) -> f64 {
        self.p
    }

    fn mean(&self) -> f64 {
        self.n as f64 * self.p
    }

    /// ln P(X = k) for k ≤ n and 0 < p < 1 (Loader 2000).
    fn ln_pmf_inner(&self, k: u64) -> f64 {
        let n = self.n as f64;
        let (p, q) = (self.p, self.q);
        if k == 0 {
            // q^n = exp(n·ln(1 − p)); log1p is exact to an ulp in p.
            return n * (-p).ln_1p();
        }
        if k == self.n {
            return n * p.ln();
        }
        let x = k as f64;
        let y = n - x;
        // np and nq as double-length sums hi + lo; to first order in the
        // tiny lo, bd0(x, m + lo) = bd0(x, m) + (1 − x/m)·lo.
        let np = n * p;
        let np_lo = n.mul_add(p, -np);
        let nq = n * q;
        let nq_lo = n.mul_add(q, -nq) + n * self.q_lo;
        let d1 = bd0(x, np) + (1.0 - x / np) * np_lo;
        let d2 = bd0(y, nq) + (1.0 - y / nq) * nq_lo;
        if !(d1.is_finite() && d2.is_finite()) {
            // np or nq so small (p or q near the smallest double) that x/np
            // overflows: the direct form ln C(n, k) + k·ln p + (n − k)·ln q,
            // whose terms are then far from cancelling.
            return ln_gamma(n + 1.0) - ln_gamma(x + 1.0) - ln_gamma(y + 1.0) + x * p.ln() + y * if p < 0.5 { (-p).ln_1p() } else { q.ln() };
        }
        let lc = stirlerr(n) - stirlerr(x) - stirlerr(y) - d1 - d2;
        // ln(2π·x·y/n) = ln(2π) + ln s + ln(1 − s/n) with s the smaller of
        // x and y: 1 − x/n formed from a rounded x/n near 1 would lose digits.
        let small = x.min(y);
        let lf = LN_2PI + small.ln() + (-small / n).ln_1p();
        lc - 0.5 * lf
    }

    /// Iteration cap for a tail sum: about 20 standard deviations of terms
    /// plus a margin; the stopping rule ends long before it.
    fn max_terms(&self) -> u64 {
        let var = self.n as f64 * self.p * self.q;
        (100.0 + 20.0 * var.sqrt()) as u64
    }

    /// P(X ≤ k) for k ≤ np, summed down from k.
    fn lower_sum(&self, k: u64) -> f64 {
        let pk = self.pmf(k);
        if pk == 0.0 {
            return 0.0;
        }
        let n1 = self.n as f64 + 1.0;
        // One rounded q/p instead of a product per term: its relative error
        // ε/2 grows by ε/2 per term, at most about 2e−13 over the terms that
        // matter for n = 1e7, and it halves the cost of a term.
        let qp = self.q / self.p;
        let kf = k as f64;
        // P(X = j−1)/P(X = j) = j·q / ((n − j + 1)·p), with j = k − i.
        let s = sum_decreasing(
            |i| {
                if i >= kf {
                    return 0.0;
                }
                let j = kf - i;
                j / (n1 - j) * qp
            },
            self.max_terms(),
        );
        pk * s
    }

    /// P(X ≥ k) for k > np, summed up from k.
    fn upper_sum(&self, k: u64) -> f64 {
        if k > self.n {
            return 0.0;
        }
        let pk = self.pmf(k);
        if pk == 0.0 {
            return 0.0;
        }
        let n = self.n as f64;
        let pq = self.p / self.q;
        let kf = k as f64;
        let last = (self.n - k) as f64;
        // P(X = j+1)/P(X = j) = (n − j)·p / ((j + 1)·q), with j = k + i.
        let s = sum_decreasing(
            |i| {
                if i >= last {
                    return 0.0;
                }
                let j = kf + i;
                (n - j) / (j + 1.0) * pq
            },
            self.max_terms(),
        );
        pk * s
    }

    /// (P(X ≤ k), P(X > k)), each accurate in its own tail.
    fn tails(&self, k: u64) -> (f64, f64) {
        if k >= self.n || self.p == 0.0 {
            return (1.0, 0.0);
        }
        if self.p == 1.0 {
            return (0.0, 1.0);
        }
        // Each complement below is ≥ ½ (see the module notes); at
        // k = ⌊mean⌋ neither need be, so the upper tail is summed too
        // unless it is ≥ ¼, where the complement costs at most 3ε relative.
        let (kf, m) = (k as f64, self.mean());
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

    /// Normal-approximation starting point for the quantile searches, for
    /// a lower-tail probability p in (0, 1).
    fn guess(&self, p: f64) -> u64 {
        let z = Normal::STANDARD.quantile(p.clamp(1e-300, 1.0 - 1e-16)).unwrap_or(0.0);
        let g = self.mean() + z * (self.n as f64 * self.p * self.q).sqrt();
        if g.is_finite() && g > 0.0 { g as u64 } else { 0 }
    }

    /// The k where the computed tail first reaches certainty: n, or 0 when
    /// p = 0 (all mass at 0).
    fn top(&self) -> u64 {
        if self.p == 0.0 { 0 } else { self.n }
    }
}

fn check_probability(p: f64) -> Result<f64, DistError> {
    if (0.0..=1.0).contains(&p) { Ok(p) } else { Err(DistError::Probability(p)) }
}

impl Discrete for Binomial {
    fn pmf(&self, k: u64) -> f64 {
        self.ln_pmf(k).exp()
    }

    fn ln_pmf(&self, k: u64) -> f64 {
        if k > self.n {
            return f64::NEG_INFINITY;
        }
        if self.p == 0.0 {
            return if k == 0 { 0.0 } else { f64::NEG_INFINITY };
        }
        if self.p == 1.0 {
            return if k == self.n { 0.0 } else { f64::NEG_INFINITY };
        }
        self.ln_pmf_inner(k)
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
            // P(X ≤ k) < 1 for every k < n (p > 0), even where the computed
            // tail rounds to 1 earlier.
            return Ok(self.top());
        }
        let g = self.guess(p);
        // For p > ½ the condition is read off the upper tail, which is exact
        // there: P(X ≤ k) ≥ p ⇔ P(X > k) ≤ 1 − p (1 − p is exact for p ≥ ½).
        if p > 0.5 {
            let q = 1.0 - p;
            Ok(smallest_true(g, self.n, |k| self.sf(k) <= q))
        } else {
            Ok(smallest_true(g, self.n, |k| self.cdf(k) >= p))
        }
    }

    fn quantile_upper(&self, q: f64) -> Result<u64, DistError> {
        let q = check_probability(q)?;
        if q == 0.0 {
            // P(X > k) > 0 for every k < n (p > 0), even where the computed
            // tail underflows earlier.
            return Ok(self.top());
        }
        let g = self.guess(1.0 - q);
        if q >= 0.5 {
            // P(X > k) ≤ q ⇔ P(X ≤ k) ≥ 1 − q, exact for q ≥ ½.
            let p = 1.0 - q;
            Ok(smallest_true(g, self.n, |k| self.cdf(k) >= p))
        } else {
            Ok(smallest_true(g, self.n, |k| self.sf(k) <= q))
        }
    }

    fn support_max(&self) -> u64 {
        self.n
    }

    fn centre(&self) -> f64 {
        self.mean()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_parameters_are_errors() {
        assert!(Binomial::new(0, 0.5).is_err());
        assert!(Binomial::new(MAX_N + 1, 0.5).is_err());
        assert!(Binomial::new(u64::MAX, 0.5).is_err());
        for p in [-0.1, 1.1, f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            let e = Binomial::new(10, p).unwrap_err();
            assert!(matches!(e, DistError::Parameter { name: "p", .. }), "{e}");
        }
        let msg = Binomial::new(10, 1.5).unwrap_err().to_string();
        assert_eq!(msg, "p is 1.5, but must be between 0 and 1");
        let b = Binomial::new(10, 0.3).unwrap();
        assert_eq!(b.quantile(1.5), Err(DistError::Probability(1.5)));
        assert!(b.quantile(f64::NAN).is_err());
        assert!(b.quantile_upper(-1.0).is_err());
    }

    #[test]
    fn tails_are_complements() {
        for (n, p) in
            [(1, 0.5), (10, 0.3), (1000, 1e-4), (1000, 0.9999), (100_000, 0.5), (7, 0.0), (7, 1.0)]
        {
            let b = Binomial::new(n, p).unwrap();
            for k in [0, 1, n / 3, n / 2, n - 1, n, n + 1, u64::MAX] {
                let (c, s) = (b.cdf(k), b.sf(k));
                assert!((c + s - 1.0).abs() < 1e-14, "n={n} p={p} k={k}: {c} + {s}");
                assert!((0.0..=1.0).contains(&c) && (0.0..=1.0).contains(&s));
            }
        }
    }

    #[test]
    fn upper_tail_at_the_floor_of_the_mean_is_not_a_complement() {
        // k = 0 = ⌊np⌋: P(X > 0) = 1 − q² = p(2 − p) is tiny and must not be
        // formed as 1 − P(X ≤ 0).
        let p = 1e-4;
        let b = Binomial::new(2, p).unwrap();
        let want = p * (2.0 - p);
        assert!(((b.sf(0) - want) / want).abs() < 1e-15, "{}", b.sf(0));
    }

    /// Regression (found by the long fuzz run): with p the smallest
    /// subnormal, x/np overflowed and P(X = 1) came out NaN, which made the
    /// two-sided walk pick "always reject". Closed forms, by hand:
    /// P(X = 1) = n·p·(1 − p)^(n−1), ln P(X = k) = ln C(n, k) + k·ln p +
    /// (n − k)·ln(1 − p) (the last term is 0 in doubles for these p).
    #[test]
    fn subnormal_rates_have_finite_masses() {
        let p = 5e-324;
        let b = Binomial::new(2, p).unwrap();
        assert_eq!(b.pmf(1), 2.0 * p);
        let want = 2f64.ln() + p.ln();
        assert!((b.ln_pmf(1) - want).abs() <= 1e-13 * want.abs(), "{}", b.ln_pmf(1));
        let b = Binomial::new(1000, 1e-310).unwrap();
        // ln C(1000, 3) = ln(166,167,000).
        let want = 166_167_000f64.ln() + 3.0 * 1e-310f64.ln();
        assert!((b.ln_pmf(3) - want).abs() <= 1e-13 * want.abs(), "{} against {want}", b.ln_pmf(3));
        // The mirror image: q = 2^−53, the smallest q a double p < 1 leaves.
        let b = Binomial::new(2, 1.0 - f64::EPSILON / 2.0).unwrap();
        assert!(b.pmf(1).is_finite());
    }

    #[test]
    fn pmf_sums_to_one_and_matches_small_exact_values() {
        let b = Binomial::new(20, 0.35).unwrap();
        let total: f64 = (0..=20).map(|k| b.pmf(k)).sum();
        assert!((total - 1.0).abs() < 1e-14);
        // C(5, 2)·0.5⁵ = 10/32.
        let b = Binomial::new(5, 0.5).unwrap();
        assert!((b.pmf(2) - 0.3125).abs() < 1e-15);
        assert_eq!(b.pmf(6), 0.0);
        assert_eq!(b.ln_pmf(6), f64::NEG_INFINITY);
    }

    #[test]
    fn degenerate_and_extreme_arguments_do_not_panic() {
        let b = Binomial::new(12, 0.0).unwrap();
        assert_eq!((b.pmf(0), b.cdf(0), b.sf(0)), (1.0, 1.0, 0.0));
        assert_eq!(b.quantile(0.7), Ok(0));
        assert_eq!(b.quantile_upper(0.0), Ok(0));
        let b = Binomial::new(12, 1.0).unwrap();
        assert_eq!((b.pmf(12), b.cdf(11), b.sf(11)), (1.0, 0.0, 1.0));
        assert_eq!(b.quantile(0.1), Ok(12));
        let b = Binomial::new(MAX_N, 0.5).unwrap();
        assert!(b.cdf(u64::MAX) == 1.0 && b.sf(0) == 1.0);
        assert!(b.quantile(1e-300).is_ok() && b.quantile_upper(1e-300).is_ok());
        assert_eq!(b.quantile(1.0), Ok(MAX_N));
        assert_eq!(b.quantile_upper(0.0), Ok(MAX_N));
    }

    #[test]
    fn quantiles_invert_the_tails() {
        let b = Binomial::new(1000, 0.01).unwrap();
        for p in [1e-12, 0.01, 0.3, 0.5, 0.9, 1.0 - 1e-9] {
            let k = b.quantile(p).unwrap();
            assert!(b.cdf(k) >= p && (k == 0 || b.cdf(k - 1) < p), "p={p} k={k}");
            let k = b.quantile_upper(p).unwrap();
            assert!(b.sf(k) <= p && (k == 0 || b.sf(k - 1) > p), "q={p} k={k}");
        }
    }
}
