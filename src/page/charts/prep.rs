//! From the engine's answer to the plain views the charts draw: axes on the
//! scale the analyst reads (the estimate, in the design's unit), rejection
//! regions as intervals, labels in plain words.
//!
//! Architecture invariant: every number here comes from the engine's
//! answer or from the same sampling distributions it used; nothing is
//! recomputed by another method.

use crate::engine::curves::Curves;
use crate::engine::design::Design;
use crate::engine::dist::Continuous;
use crate::engine::evaluate::{Evaluation, Rule};
use crate::engine::model::Sampling;
use crate::engine::table::{self, DataSummary};
use crate::engine::threshold::Alternative;

use super::histogram::{HistogramGroup, HistogramView};
use super::quantile::{QuantileGroup, QuantileView};
use super::short;

/// The two sampling curves with the threshold.
#[derive(Debug, Clone, PartialEq)]
pub struct SamplingView {
    pub discrete: bool,
    /// Polylines sorted by x, on the axis scale (densities per unit of the
    /// axis; for counts a step outline of the probabilities).
    pub h0: Vec<(f64, f64)>,
    pub h1: Vec<(f64, f64)>,
    /// Where H0 is rejected, as intervals on the axis.
    pub reject: Vec<(f64, f64)>,
    /// The threshold(s) on the axis, and how to label each.
    pub cuts: Vec<f64>,
    pub cut_text: Vec<String>,
    pub observed: Option<f64>,
    pub alpha: f64,
    pub beta: f64,
    pub x_label: String,
    pub y_label: String,
    pub h0_label: String,
    pub h1_label: String,
    pub unit: String,
    /// Centres of the curves (for the table).
    pub h0_centre: f64,
    pub h1_centre: f64,
}

/// α* and β* at one n, with the engine's verdict there.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ByNPoint {
    pub n: f64,
    pub alpha: f64,
    pub beta: f64,
    /// From the engine (`curves::ByN::conclusive`), never recomputed here.
    pub conclusive: bool,
}

/// α* and β* against n.
#[derive(Debug, Clone, PartialEq)]
pub struct ByNView {
    /// Sorted by n.
    pub points: Vec<ByNPoint>,
    pub alpha_max: f64,
    pub beta_max: f64,
    /// The smallest conclusive n, if found.
    pub youden_n: Option<f64>,
    /// The n the other charts show.
    pub shown_n: f64,
    pub discrete: bool,
    pub x_label: String,
}

/// Power against α as the threshold slides (the ROC of the test).
#[derive(Debug, Clone, PartialEq)]
pub struct TradeoffView {
    /// (α, power) sorted by α.
    pub points: Vec<(f64, f64)>,
    pub youden: (f64, f64),
    pub alpha_max: f64,
    pub beta_max: f64,
    pub n_text: String,
}

/// α + β (and each part) against the threshold.
#[derive(Debug, Clone, PartialEq)]
pub struct TotalErrorView {
    /// (threshold on the axis, α, β) sorted by threshold.
    pub points: Vec<(f64, f64, f64)>,
    pub minimum: (f64, f64),
    pub x_label: String,
    pub unit: String,
}

/// All four views.
#[derive(Debug, Clone, PartialEq)]
pub struct Views {
    pub sampling: SamplingView,
    pub by_n: ByNView,
    pub tradeoff: TradeoffView,
    pub total: TotalErrorView,
}


fn with_unit(text: &str, unit: &str) -> String {
    if unit.is_empty() { text.to_string() } else { format!("{text} ({unit})") }
}

/// Rejection intervals of a rule on the statistic's scale.
fn reject_intervals(rule: &Rule) -> Vec<(f64, f64)> {
    let inf = f64::INFINITY;
    match *rule {
        Rule::Above { statistic, .. } => vec![(statistic, inf)],
        Rule::Below { statistic, .. } => vec![(-inf, statistic)],
        Rule::Outside { statistic_low, statistic_high, .. } => vec![(-inf, statistic_low), (statistic_high, inf)],
        Rule::AtLeast { k, .. } => vec![(k as f64 - 0.5, inf)],
        Rule::AtMost { k, .. } => vec![(-inf, k as f64 + 0.5)],
        Rule::OutsideCounts { k_low, k_high, .. } => {
            let mut v = Vec::new();
            if let Some(k) = k_low {
                v.push((-inf, k as f64 + 0.5));
            }
            if let Some(k) = k_high {
                v.push((k as f64 - 0.5, inf));
            }
            v
        }
        Rule::Never => Vec::new(),
        Rule::Always => vec![(-inf, inf)],
    }
}

fn cuts_of(intervals: &[(f64, f64)]) -> Vec<f64> {
    let mut c: Vec<f64> = intervals.iter().flat_map(|&(a, b)| [a, b]).filter(|v| v.is_finite()).collect();
    c.sort_by(f64::total_cmp);
    c.dedup();
    c
}

/// Build the views. `observed`: the observed statistic when the data were
/// decided at the n the charts show.
pub fn views(design: &Design, at: &Evaluation, curves: &Curves, youden_n: Option<u64>, observed: Option<f64>, unit: &str) -> Views {
    let m = &at.model;
    let discrete = curves.densities.discrete;
    let entry = design.family.entry();
    let unit = if entry.in_unit { unit.trim().to_string() } else { String::new() };
    // Axis scale: the estimate (continuous) or the count (discrete).
    let (offset, slope) = if discrete || !(m.slope.is_finite() && m.slope != 0.0) { (0.0, 1.0) } else { (m.offset, m.slope) };
    let axis = |t: f64| offset + slope * t;
    let jac = 1.0 / slope.abs();
    let intervals_t = reject_intervals(&at.rule);
    let mut reject: Vec<(f64, f64)> = intervals_t
        .iter()
        .map(|&(a, b)| {
            let (p, q) = (axis(a), axis(b));
            (p.min(q), p.max(q))
        })
        .collect();
    reject.sort_by(|a, b| a.0.total_cmp(&b.0));
    let cuts = cuts_of(&reject);
    let u = if unit.is_empty() { String::new() } else { format!(" {unit}") };
    let cut_text: Vec<String> = cuts
        .iter()
        .map(|&c| {
            if !discrete {
                return format!("threshold {}{u}", short(c));
            }
            // Counts: the cut lies halfway between two counts (the axis
            // is the count); the engine's rule says which side rejects.
            let above = at.cut.rejects(c + 0.5);
            if above { format!("reject at {} or more", short(c + 0.5)) } else { format!("reject at {} or fewer", short(c - 0.5)) }
        })
        .collect();
    let d = &curves.densities;
    type Line = Vec<(f64, f64)>;
    let (mut h0, mut h1): (Line, Line) = if discrete {
        let step = |ys: &[f64]| -> Vec<(f64, f64)> { d.x.iter().zip(ys).flat_map(|(&k, &p)| [(k - 0.5, p), (k + 0.5, p)]).collect() };
        (step(&d.h0), step(&d.h1))
    } else {
        let pts = |ys: &[f64]| -> Vec<(f64, f64)> { d.x.iter().zip(ys).map(|(&t, &y)| (axis(t), y * jac)).collect() };
        (pts(&d.h0), pts(&d.h1))
    };
    if !discrete && let Sampling::Continuous { h0: f0, h1: f1 } = &m.sampling {
        // Put the threshold itself on both curves so that the shaded areas
        // end exactly at it.
        for t in intervals_t.iter().flat_map(|&(a, b)| [a, b]).filter(|v| v.is_finite()) {
            h0.push((axis(t), f0.pdf(t) * jac));
            h1.push((axis(t), f1.pdf(t) * jac));
        }
    }
    for line in [&mut h0, &mut h1] {
        line.retain(|p| p.0.is_finite() && p.1.is_finite());
        line.sort_by(|a, b| a.0.total_cmp(&b.0));
    }
    let (theta0, theta1) = design.effect.thetas();
    let name = entry.axis;
    let (h0_label, h1_label) = if discrete {
        (format!("if H0 is true (p = {})", short(theta0)), format!("if the effect is θ1 (p = {})", short(theta1)))
    } else if let Some(null) = entry.null_words {
        (format!("if H0 is true ({null})"), format!("if the effect is θ1 (difference {})", short(theta1)))
    } else {
        (format!("if H0 is true (θ0 = {})", short(theta0)), format!("if the effect is θ1 (θ1 = {})", short(theta1)))
    };
    let centre =
        |line: &[(f64, f64)]| line.iter().copied().fold((f64::NAN, f64::NEG_INFINITY), |acc, p| if p.1 > acc.1 { p } else { acc }).0;
    let sampling = SamplingView {
        discrete,
        h0_centre: centre(&h0),
        h1_centre: centre(&h1),
        h0,
        h1,
        reject,
        cuts,
        cut_text,
        observed: observed.map(axis),
        alpha: at.alpha,
        beta: at.beta,
        x_label: if discrete { format!("{name} (out of n = {})", at.n1) } else { with_unit(name, &unit) },
        y_label: if discrete { "probability".into() } else { "probability density".into() },
        h0_label,
        h1_label,
        unit: unit.clone(),
    };
    let by_n = ByNView {
        points: curves
            .by_n
            .iter()
            .map(|p| ByNPoint { n: p.n1 as f64, alpha: p.alpha, beta: p.beta, conclusive: p.conclusive })
            .filter(|p| p.alpha.is_finite() && p.beta.is_finite())
            .collect(),
        alpha_max: design.alpha_max,
        beta_max: design.beta_max,
        youden_n: youden_n.map(|n| n as f64),
        shown_n: at.n1 as f64,
        discrete,
        x_label: if design.family.two_groups() {
            "sample size of group 1, n1 (log scale)".into()
        } else {
            "sample size n (log scale)".into()
        },
    };
    let mut roc: Vec<(f64, f64)> =
        curves.tradeoff.iter().map(|p| (p.alpha, 1.0 - p.beta)).filter(|p| p.0.is_finite() && p.1.is_finite()).collect();
    roc.push((0.0, 0.0));
    roc.push((1.0, 1.0));
    roc.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    let n_text = match at.n2 {
        Some(n2) => format!("n1 = {}, n2 = {}", at.n1, n2),
        None => format!("n = {}", at.n1),
    };
    let tradeoff =
        TradeoffView { points: roc, youden: (at.alpha, 1.0 - at.beta), alpha_max: design.alpha_max, beta_max: design.beta_max, n_text };
    let two_sided = design.alternative == Alternative::TwoSided;
    let thr = |t: f64| if two_sided { t * slope.abs() } else { axis(t) };
    let mut points: Vec<(f64, f64, f64)> = curves
        .tradeoff
        .iter()
        .map(|p| (thr(p.threshold), p.alpha, p.beta))
        .filter(|p| p.0.is_finite() && p.1.is_finite() && p.2.is_finite())
        .collect();
    points.sort_by(|a, b| a.0.total_cmp(&b.0));
    let x_label = match (two_sided, discrete) {
        (true, true) => "distance of the count from its H0 centre".to_string(),
        (true, false) => with_unit(&format!("half-width of the no-rejection zone, {name}"), &unit),
        (false, true) => "threshold count k".to_string(),
        (false, false) => with_unit(&format!("threshold, {name}"), &unit),
    };
    let total = TotalErrorView { points, minimum: (thr(curves.youden.threshold), at.alpha + at.beta), x_label, unit };
    Views { sampling, by_n, tradeoff, total }
}

/// The two charts of a data file: a histogram and a normal quantile plot
/// per group.
#[derive(Debug, Clone, PartialEq)]
pub struct DataViews {
    pub histogram: HistogramView,
    pub quantile: QuantileView,
}

/// Build the data file's views from its summary and the values of each
/// group (`table::group_values`, in the summary's group order). `paired`:
/// the values are paired differences, which the axis says.
pub fn data_views(s: &DataSummary, values: &[Vec<f64>], paired: bool, unit: &str) -> DataViews {
    let u = if unit.trim().is_empty() { String::new() } else { format!(" ({})", unit.trim()) };
    let what = if paired { "difference" } else { "value" };
    let mut hist = Vec::new();
    let mut qq = Vec::new();
    let mut rule = String::new();
    for (i, v) in values.iter().enumerate() {
        let g = s.groups.get(i);
        let label = g.map_or_else(|| format!("group {}", i + 1), |g| g.label.clone());
        let mean = g.map_or(f64::NAN, |g| g.mean);
        let sd = g.and_then(|g| g.sd).unwrap_or(f64::NAN);
        let h = table::histogram(v);
        rule = h.rule.to_string();
        hist.push(HistogramGroup { label: label.clone(), edges: h.edges, counts: h.counts, mean, sd, n: v.len() });
        qq.push(QuantileGroup { label, points: thin(table::normal_quantile_points(v), QQ_DRAWN), mean, sd });
    }
    DataViews {
        histogram: HistogramView { groups: hist, x_label: format!("{what}{u}"), rule },
        quantile: QuantileView {
            groups: qq,
            y_label: format!("{what}{u}"),
            positions: "Blom’s plotting positions (i − 3/8)/(n + 1/4)".into(),
        },
    }
}

/// Points of a quantile plot drawn per group: more are indistinguishable on
/// a chart a few hundred pixels wide, and each costs drawing time.
const QQ_DRAWN: usize = 400;

/// At most `k` points spread evenly by rank, keeping both ends.
fn thin(points: Vec<(f64, f64)>, k: usize) -> Vec<(f64, f64)> {
    if points.len() <= k || k < 2 {
        return points;
    }
    let last = points.len() - 1;
    let mut idx: Vec<usize> = (0..k).map(|i| i * last / (k - 1)).collect();
    idx.dedup();
    idx.into_iter().map(|i| points[i]).collect()
}
