//! Chart data for the user's values: histogram bins and normal quantile
//! plot points. Pure numbers; the page draws them.
//!
//! Histogram rule: NumPy's `histogram_bin_edges(x, bins="auto")` for float
//! data: the smaller of the Freedman–Diaconis width 2·IQR·n^(−1/3) and the
//! Sturges width range/(log2 n + 1) (Sturges alone when the IQR is 0; IQR
//! from the linearly interpolated quartiles), ⌈range/width⌉ equal bins from
//! min to max (one bin min − ½ to max + ½ when all values are equal), at
//! most [`MAX_BINS`]; counts as `numpy.histogram` (bins half-open, the last
//! closed). Normal quantile plot: Blom's plotting positions
//! (i − 3/8)/(n + 1/4), i = 1..n, against the sorted values.

use crate::engine::dist::{Continuous, Normal};
use serde::Serialize;

/// Most bins a histogram gets (NumPy has no cap; a chart has a few hundred
/// pixels).
pub const MAX_BINS: usize = 200;
/// Most points of a normal quantile plot: more values are thinned to this
/// many ranks, evenly spaced, both extremes kept.
pub const QQ_MAX_POINTS: usize = 2000;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Histogram {
    /// Bin edges, ascending, `counts.len() + 1` of them; empty without data.
    pub edges: Vec<f64>,
    pub counts: Vec<usize>,
    /// The rule that chose the bins, in words.
    pub rule: &'static str,
}

const RULE: &str = "NumPy's \"auto\" rule: the smaller of the Freedman–Diaconis and Sturges bin widths";

/// Linearly interpolated quantiles of finite data at each p in `ps`,
/// without sorting (selection, O(n) each); `scratch` is reordered.
pub(crate) fn quantiles(scratch: &mut [f64], ps: &[f64]) -> Vec<f64> {
    let n = scratch.len();
    if n == 0 {
        return vec![f64::NAN; ps.len()];
    }
    ps.iter()
        .map(|&p| {
            let h = (n - 1) as f64 * p;
            let lo = (h.floor() as usize).min(n - 1);
            let t = h - lo as f64;
            let (_, &mut a, right) = scratch.select_nth_unstable_by(lo, f64::total_cmp);
            if t == 0.0 || right.is_empty() {
                a
            } else {
                let b = right.iter().copied().fold(f64::INFINITY, f64::min);
                a + t * (b - a)
            }
        })
        .collect()
}

/// Finite values, sorted ascending.
pub(crate) fn sorted_finite(values: &[f64]) -> Vec<f64> {
    let mut v: Vec<f64> = values.iter().copied().filter(|x| x.is_finite()).collect();
    v.sort_unstable_by(f64::total_cmp);
    v
}

/// Histogram of the finite values (others are ignored).
pub fn histogram(values: &[f64]) -> Histogram {
    let mut x: Vec<f64> = values.iter().copied().filter(|v| v.is_finite()).collect();
    let n = x.len();
    if n == 0 {
        return Histogram { edges: Vec::new(), counts: Vec::new(), rule: RULE };
    }
    let (mut first, mut last) = x.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &v| (lo.min(v), hi.max(v)));
    let range = last - first;
    let bins = if range > 0.0 {
        let sturges = range / ((n as f64).log2() + 1.0);
        let q = quantiles(&mut x, &[0.25, 0.75]);
        let iqr = q[1] - q[0];
        let fd = 2.0 * iqr * (n as f64).powf(-1.0 / 3.0);
        let width = if fd > 0.0 { fd.min(sturges) } else { sturges };
        ((range / width).ceil() as usize).clamp(1, MAX_BINS)
    } else {
        first -= 0.5;
        last += 0.5;
        1
    };
    let step = (last - first) / bins as f64;
    let mut edges: Vec<f64> = (0..bins).map(|i| first + i as f64 * step).collect();
    edges.push(last);
    let mut counts = vec![0usize; bins];
    let norm = bins as f64 / (last - first);
    for &v in &x {
        let mut i = (((v - first) * norm) as usize).min(bins - 1);
        if i > 0 && v < edges[i] {
            i -= 1;
        } else if i + 1 < bins && v >= edges[i + 1] {
            i += 1;
        }
        counts[i] += 1;
    }
    Histogram { edges, counts, rule: RULE }
}

/// Normal quantile plot points (standard normal quantile at Blom's
/// position, observed value), ascending.
pub fn normal_quantile_points(values: &[f64]) -> Vec<(f64, f64)> {
    let x = sorted_finite(values);
    let n = x.len();
    let Ok(z) = Normal::new(0.0, 1.0) else { return Vec::new() };
    let at = |i: usize| {
        let p = (i as f64 + 1.0 - 0.375) / (n as f64 + 0.25);
        (z.quantile(p).unwrap_or(f64::NAN), x[i])
    };
    if n <= QQ_MAX_POINTS {
        (0..n).map(at).collect()
    } else {
        let k = QQ_MAX_POINTS - 1;
        (0..=k).map(|j| at(((j as f64 / k as f64) * (n - 1) as f64).round() as usize)).collect()
    }
}
