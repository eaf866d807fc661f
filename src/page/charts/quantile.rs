//! The normal quantile plot: each value (sorted) against the normal
//! quantile at its plotting position, with the line mean + SD·z of its
//! group. Points near the line mean the normal model of the t tests fits;
//! a bow says skew, an S heavy or light tails.
//!
//! Colour is not the only cue: group 1 is drawn as circles with a solid
//! line, group 2 as triangles with a dashed line, and the legend names both.

use super::{DrawResult, Glyph, H0, H1, Look, MUTED, cartesian, legend, mesh, short};
use plotters::coord::Shift;
use plotters::prelude::*;

#[derive(Debug, Clone, PartialEq)]
pub struct QuantileGroup {
    pub label: String,
    /// (normal quantile z, observed value), sorted by z; thinned for large n.
    pub points: Vec<(f64, f64)>,
    pub mean: f64,
    pub sd: f64,
}

#[derive(Debug, Clone, PartialEq)]
pub struct QuantileView {
    pub groups: Vec<QuantileGroup>,
    pub y_label: String,
    /// How the plotting positions were chosen, for the table's caption.
    pub positions: String,
}

fn colour(i: usize) -> RGBColor {
    if i == 0 { H0 } else { H1 }
}

pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, v: &QuantileView, look: &Look) -> DrawResult<DB> {
    area.fill(&WHITE)?;
    let all = v.groups.iter().flat_map(|g| g.points.iter()).filter(|p| p.0.is_finite() && p.1.is_finite());
    let (mut z0, mut z1, mut y0, mut y1) = (f64::INFINITY, f64::NEG_INFINITY, f64::INFINITY, f64::NEG_INFINITY);
    for &(z, y) in all {
        z0 = z0.min(z);
        z1 = z1.max(z);
        y0 = y0.min(y);
        y1 = y1.max(y);
    }
    if !z0.is_finite() {
        return area.draw(&Text::new("No values to show.", (look.px(16.0), look.px(20.0)), look.text_in(14.0, MUTED)));
    }
    let mut items = Vec::new();
    for (i, g) in v.groups.iter().enumerate() {
        let c = colour(i);
        let shape = if i == 0 { "circles" } else { "triangles" };
        items.push((if i == 0 { Glyph::Line(c) } else { Glyph::Dashed(c) }, format!("{} ({shape}; line: mean + SD·z)", g.label)));
    }
    let plot = legend(area, &items, look)?;
    let (zp, yp) = ((z1 - z0) * 0.04, (y1 - y0) * 0.06);
    let mut chart = cartesian(&plot, look, (z0 - zp, z1 + zp), (y0 - yp, y1 + yp))?;
    mesh(&mut chart, look, "normal quantile z (where a normal sample would put the value)", &v.y_label, &|x| short(*x), &|y| short(*y))?;
    let r = look.px(3.2).max(2);
    for (i, g) in v.groups.iter().enumerate() {
        let c = colour(i);
        if g.sd.is_finite() && g.mean.is_finite() {
            let line = vec![(z0 - zp, g.mean + g.sd * (z0 - zp)), (z1 + zp, g.mean + g.sd * (z1 + zp))];
            if i == 0 {
                chart.draw_series(LineSeries::new(line, c.stroke_width(look.width(1.8))))?;
            } else {
                chart.draw_series(DashedLineSeries::new(line, look.px(7.0), look.px(5.0), c.stroke_width(look.width(1.8))))?;
            }
        }
        let pts = g.points.iter().copied().filter(|p| p.0.is_finite() && p.1.is_finite());
        if i == 0 {
            chart.draw_series(pts.map(|p| Circle::new(p, r, c.stroke_width(look.width(1.4)))))?;
        } else {
            chart.draw_series(pts.map(|p| TriangleMarker::new(p, r + 1, c.filled())))?;
        }
    }
    Ok(())
}

/// The chart's numbers as (caption, column heads, rows): about ten points
/// per group spread over the range, and the line of each group.
pub fn numbers(v: &QuantileView) -> (String, Vec<&'static str>, Vec<Vec<String>>) {
    let mut rows = Vec::new();
    for g in &v.groups {
        let len = g.points.len();
        let k = len.min(11);
        let mut idx: Vec<usize> = if k < 2 { (0..len).collect() } else { (0..k).map(|i| i * (len - 1) / (k - 1)).collect() };
        idx.dedup();
        for i in idx {
            let (z, y) = g.points[i];
            rows.push(vec![g.label.clone(), short(z), short(y), short(g.mean + g.sd * z)]);
        }
    }
    (format!("Values against normal quantiles ({})", v.positions), vec!["group", "normal quantile z", "value", "on the line"], rows)
}
