//! A histogram per group, one panel per group on a shared axis, each with
//! the normal curve of the group's own mean and standard deviation (dashed)
//! as a reference for the t tests' model.
//!
//! Colour is not the only cue: each panel carries its group's name, group 1
//! has plain bars and group 2 hatched ones, and the reference curve is
//! dashed in both.

use super::{DrawResult, Glyph, H0, H1, INK, Look, MUTED, cartesian, legend, mesh, short};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// One group's bins.
#[derive(Debug, Clone, PartialEq)]
pub struct HistogramGroup {
    pub label: String,
    /// Bin edges, increasing (one more than `counts`).
    pub edges: Vec<f64>,
    pub counts: Vec<usize>,
    /// Mean and standard deviation of the group (for the reference curve).
    pub mean: f64,
    pub sd: f64,
    pub n: usize,
}

#[derive(Debug, Clone, PartialEq)]
pub struct HistogramView {
    pub groups: Vec<HistogramGroup>,
    pub x_label: String,
    /// How the bins were chosen, for the table's caption.
    pub rule: String,
}

fn colour(i: usize) -> RGBColor {
    if i == 0 { H0 } else { H1 }
}

pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, v: &HistogramView, look: &Look) -> DrawResult<DB> {
    area.fill(&WHITE)?;
    if v.groups.is_empty() {
        return area.draw(&Text::new("No values to show.", (look.px(16.0), look.px(20.0)), look.text_in(14.0, MUTED)));
    }
    let mut items = Vec::new();
    for (i, g) in v.groups.iter().enumerate() {
        let glyph = if i == 0 { Glyph::Band(colour(i)) } else { Glyph::Hatch(colour(i)) };
        items.push((glyph, format!("{} (n = {})", g.label, g.n)));
    }
    items.push((Glyph::Dashed(INK), "normal curve, same mean and SD".into()));
    let plot = legend(area, &items, look)?;
    // Shared x range over every group's bins.
    let (mut x0, mut x1) = (f64::INFINITY, f64::NEG_INFINITY);
    for g in &v.groups {
        for &e in &g.edges {
            if e.is_finite() {
                x0 = x0.min(e);
                x1 = x1.max(e);
            }
        }
    }
    if !(x0.is_finite() && x1.is_finite()) {
        (x0, x1) = (0.0, 1.0);
    }
    let panels = plot.split_evenly((v.groups.len(), 1));
    let last = panels.len().saturating_sub(1);
    for (i, (g, panel)) in v.groups.iter().zip(panels.iter()).enumerate() {
        let c = colour(i);
        let top = g.counts.iter().copied().max().unwrap_or(0) as f64;
        let bin_w = if g.counts.is_empty() { 1.0 } else { (g.edges[g.edges.len() - 1] - g.edges[0]) / g.counts.len() as f64 };
        // The normal curve scaled to counts: n · width · density.
        let curve: Vec<(f64, f64)> = if g.sd > 0.0 && g.sd.is_finite() && g.mean.is_finite() {
            (0..=120)
                .map(|k| {
                    let x = x0 + (x1 - x0) * k as f64 / 120.0;
                    let z = (x - g.mean) / g.sd;
                    (x, g.n as f64 * bin_w * (-0.5 * z * z).exp() / (g.sd * (2.0 * std::f64::consts::PI).sqrt()))
                })
                .collect()
        } else {
            Vec::new()
        };
        let ymax = curve.iter().map(|p| p.1).fold(top, f64::max).max(1.0) * 1.15;
        let x_desc = if i == last { v.x_label.as_str() } else { "" };
        // The group's name on a strip of its own above its panel.
        let (title, body) = panel.split_vertically(look.px(20.0));
        title.draw(&Text::new(
            match (v.groups.len(), i) {
                (1, _) => format!("{} (n = {})", g.label, g.n),
                (_, i) => format!("group {}: {} (n = {})", i + 1, g.label, g.n),
            },
            (look.px(64.0), look.px(10.0)),
            look.text_in(13.0, c).pos(Pos::new(HPos::Left, VPos::Center)),
        ))?;
        let mut chart = cartesian(&body, look, (x0, x1), (0.0, ymax))?;
        mesh(&mut chart, look, x_desc, "count", &|x| short(*x), &|y| if y.fract() == 0.0 { short(*y) } else { String::new() })?;
        let bars: Vec<(f64, f64, f64)> =
            g.edges.windows(2).zip(g.counts.iter()).filter(|(_, n)| **n > 0).map(|(e, &n)| (e[0], e[1], n as f64)).collect();
        let fill = c.mix(if i == 0 { 0.55 } else { 0.15 }).filled();
        chart.draw_series(bars.iter().map(|&(a, b, h)| Rectangle::new([(a, 0.0), (b, h)], fill)))?;
        if i > 0 {
            // One pass of hatching over every bar of the group.
            let edges = &g.edges;
            let counts = &g.counts;
            super::hatch(&mut chart, look, c, &|x, y| {
                let k = edges.partition_point(|&e| e <= x);
                k >= 1 && k <= counts.len() && y <= counts[k - 1] as f64
            })?;
        }
        chart.draw_series(bars.iter().map(|&(a, b, h)| Rectangle::new([(a, 0.0), (b, h)], c.stroke_width(look.width(1.0)))))?;
        if !curve.is_empty() {
            chart.draw_series(DashedLineSeries::new(curve, look.px(6.0), look.px(4.0), INK.stroke_width(look.width(1.8))))?;
        }
    }
    Ok(())
}

/// The chart's numbers as (caption, column heads, rows) for a text table.
pub fn numbers(v: &HistogramView) -> (String, Vec<&'static str>, Vec<Vec<String>>) {
    let mut rows = Vec::new();
    for g in &v.groups {
        for (e, n) in g.edges.windows(2).zip(g.counts.iter()) {
            rows.push(vec![g.label.clone(), format!("{} to {}", short(e[0]), short(e[1])), n.to_string()]);
        }
    }
    (format!("Counts per bin ({})", v.rule), vec!["group", "values from … to", "count"], rows)
}
