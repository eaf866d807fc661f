//! One-pass moments of a sample: n, mean, M2, M3, M4, min, max; and the
//! figures of one group that a mapping reports from them (`GroupStats`).
//!
//! Algorithm: Welford's update of the mean and M2 extended to M3 and M4 by
//! Terriberry (2007), as given in Pébay, "Formulas for robust, one-pass
//! parallel computation of covariances and arbitrary-order statistical
//! moments" (Sandia report SAND2008-6212, eq. 1.5 with n_B = 1). It never
//! subtracts two large sums, so the moments keep their accuracy when the
//! mean is large compared with the spread.
//!
//! Estimators (DEVELOPERS.md, "Data files"): sd with n − 1; skewness the
//! bias-adjusted G1 = g1·√(n(n−1))/(n−2) and excess kurtosis the
//! bias-adjusted G2 = ((n+1)·g2 + 6)·(n−1)/((n−2)(n−3)), where
//! g1 = m3/m2^{3/2}, g2 = m4/m2² − 3 and m_k = M_k/n: SciPy's
//! `skew(bias=False)` and `kurtosis(bias=False)`.
//!
//! Shift: every value is first reduced by the first value seen (exact when
//! the values are within a factor of two of it, Sterbenz), so the running
//! mean stays of the order of the spread. Without it the running mean of
//! data near 1e9 with a spread of 0.01 is rounded to 1e-7 at every step and
//! the sd loses six digits; with it the sd matches a two-pass computation.

use serde::Serialize;

/// Running central moment sums of the shifted values.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Moments {
    pub n: u64,
    pub min: f64,
    pub max: f64,
    shift: f64,
    /// Mean of x − shift.
    mean: f64,
    /// Σ(x − mean)².
    m2: f64,
    /// Σ(x − mean)³.
    m3: f64,
    /// Σ(x − mean)⁴.
    m4: f64,
}

impl Moments {
    pub fn new() -> Self {
        Moments { min: f64::INFINITY, max: f64::NEG_INFINITY, ..Moments::default() }
    }

    /// The mean of the values pushed (NaN when none).
    pub fn mean(&self) -> f64 {
        if self.n == 0 { f64::NAN } else { self.shift + self.mean }
    }

    pub fn from_values(values: &[f64]) -> Self {
        let mut m = Moments::new();
        for &x in values {
            m.push(x);
        }
        m
    }

    /// Add one finite value.
    pub fn push(&mut self, x: f64) {
        if self.n == 0 {
            self.shift = x;
        }
        self.min = self.min.min(x);
        self.max = self.max.max(x);
        let x = x - self.shift;
        let n1 = self.n as f64;
        self.n += 1;
        let n = self.n as f64;
        let delta = x - self.mean;
        let delta_n = delta / n;
        let delta_n2 = delta_n * delta_n;
        let term1 = delta * delta_n * n1;
        self.mean += delta_n;
        self.m4 += term1 * delta_n2 * (n * n - 3.0 * n + 3.0) + 6.0 * delta_n2 * self.m2 - 4.0 * delta_n * self.m3;
        self.m3 += term1 * delta_n * (n - 2.0) - 3.0 * delta_n * self.m2;
        self.m2 += term1;
    }

    /// Sample standard deviation (n − 1); `None` for n < 2.
    pub fn sd(&self) -> Option<f64> {
        (self.n >= 2).then(|| (self.m2.max(0.0) / (self.n as f64 - 1.0)).sqrt())
    }

    /// Bias-adjusted skewness G1; `None` for n < 3 or no spread.
    pub fn skewness(&self) -> Option<f64> {
        let n = self.n as f64;
        if self.n < 3 || self.m2 <= 0.0 {
            return None;
        }
        let g1 = n.sqrt() * self.m3 / self.m2.powf(1.5);
        Some(g1 * (n * (n - 1.0)).sqrt() / (n - 2.0))
    }

    /// Bias-adjusted excess kurtosis G2; `None` for n < 4 or no spread.
    pub fn excess_kurtosis(&self) -> Option<f64> {
        let n = self.n as f64;
        if self.n < 4 || self.m2 <= 0.0 {
            return None;
        }
        let g2 = n * self.m4 / (self.m2 * self.m2) - 3.0;
        Some(((n + 1.0) * g2 + 6.0) * (n - 1.0) / ((n - 2.0) * (n - 3.0)))
    }
}

/// One group's figures.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupStats {
    /// What the group is, in words (`weight`, `score: A`, `before − after`).
    pub label: String,
    /// Values used.
    pub n: usize,
    /// Rows of this group whose value is missing or not a number.
    pub missing: usize,
    pub mean: f64,
    /// Sample standard deviation (n − 1); `None` for n < 2.
    pub sd: Option<f64>,
    pub median: f64,
    pub min: f64,
    pub max: f64,
    /// Bias-adjusted skewness G1; `None` for n < 3 or sd = 0.
    pub skewness: Option<f64>,
    /// Bias-adjusted excess kurtosis G2; `None` for n < 4 or sd = 0.
    pub excess_kurtosis: Option<f64>,
    /// Binary outcomes: the number of successes (`mean` is then the
    /// proportion).
    pub successes: Option<usize>,
}
