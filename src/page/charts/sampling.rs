//! The two sampling curves, under H0 and under the effect θ1, with the
//! threshold, the α area (hatched, under H0 where H0 is rejected), the β
//! area (dotted, under θ1 where it is not) and the observed value.

use super::prep::SamplingView;
use super::{DrawResult, Glyph, H0, H1, INK, Look, OBSERVED, cartesian, dots, hatch, interpolate, legend, mesh, prob, sane_range, short};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, v: &SamplingView, look: &Look) -> DrawResult<DB> {
    area.fill(&WHITE)?;
    let mut items = vec![
        (Glyph::Line(H0), v.h0_label.clone()),
        (Glyph::Dashed(H1), v.h1_label.clone()),
        (Glyph::Hatch(H0), format!("α* = {}: false alarm", prob(v.alpha))),
        (Glyph::Dots(H1), format!("β* = {}: miss", prob(v.beta))),
    ];
    if v.observed.is_some() {
        items.push((Glyph::Marker(OBSERVED), "observed".into()));
    }
    let plot = legend(area, &items, look)?;
    let xs = v.h0.iter().chain(v.h1.iter()).map(|p| p.0).chain(v.cuts.iter().copied());
    let (mut x0, mut x1) = xs.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| (a.min(x), b.max(x)));
    if !(x0.is_finite() && x1.is_finite()) {
        (x0, x1) = (0.0, 1.0);
    }
    // The observed value widens the axis when it lies within twenty spans
    // of the curves; farther out it is marked at the edge, "off the chart".
    let span = (x1 - x0).abs().max(1e-300);
    if let Some(o) = v.observed.filter(|o| o.is_finite() && (*o - x0) > -20.0 * span && (*o - x1) < 20.0 * span) {
        (x0, x1) = (x0.min(o), x1.max(o));
    }
    let pad = (x1 - x0) * 0.03;
    let ymax = v.h0.iter().chain(v.h1.iter()).map(|p| p.1).fold(0.0_f64, f64::max);
    let ymax = if ymax > 0.0 && ymax.is_finite() { ymax * 1.18 } else { 1.0 };
    let (lo, hi) = sane_range((x0 - pad, x1 + pad));
    let mut chart = cartesian(&plot, look, (lo, hi), (0.0, ymax))?;
    mesh(&mut chart, look, &v.x_label, &v.y_label, &|x| short(*x), &|y| short(*y))?;

    let rejected = |x: f64| v.reject.iter().any(|&(a, b)| x >= a && x <= b);
    // Areas first (light fill, then the pattern), curves on top.
    for (line, color, in_region) in [(&v.h0, H0, true), (&v.h1, H1, false)] {
        for run in runs(line, &|x| rejected(x) == in_region) {
            let mut poly = Vec::with_capacity(run.len() + 2);
            poly.push((run[0].0, 0.0));
            poly.extend(run.iter().copied());
            poly.push((run[run.len() - 1].0, 0.0));
            chart.draw_series(std::iter::once(Polygon::new(poly, color.mix(0.10).filled())))?;
        }
    }
    let h0 = &v.h0;
    let h1 = &v.h1;
    hatch(&mut chart, look, H0, &|x, y| rejected(x) && y <= interpolate(h0, x))?;
    dots(&mut chart, look, H1, &|x, y| !rejected(x) && y <= interpolate(h1, x))?;
    chart.draw_series(LineSeries::new(v.h0.iter().copied(), H0.stroke_width(look.width(2.5))))?;
    chart.draw_series(DashedLineSeries::new(v.h1.iter().copied(), look.px(7.0), look.px(5.0), H1.stroke_width(look.width(2.5))))?;

    // The threshold: a solid dark line with its value.
    let top = ymax * 0.97;
    for (i, &c) in v.cuts.iter().enumerate() {
        let line_top = if v.cuts.len() == 2 { ymax * 0.8 } else { ymax * 0.9 };
        chart.draw_series(std::iter::once(PathElement::new(vec![(c, 0.0), (c, line_top)], INK.stroke_width(look.width(2.0)))))?;
        let label = v.cut_text.get(i).cloned().unwrap_or_else(|| format!("threshold {}", short(c)));
        // Two thresholds (two-sided): the labels take turns in height so
        // that they never run into each other.
        let y = top - (i % 2) as f64 * ymax * 0.075;
        chart.draw_series(std::iter::once(Text::new(label, (c, y), look.text(12.5).pos(Pos::new(HPos::Center, VPos::Top)))))?;
    }
    // α and β letters inside their areas, where there is room.
    if let Some(p) = label_spot(&v.h0, &|x| rejected(x)) {
        chart.draw_series(std::iter::once(Text::new("α", p, look.text_in(15.0, H0).pos(Pos::new(HPos::Center, VPos::Center)))))?;
    }
    if let Some(p) = label_spot(&v.h1, &|x| !rejected(x)) {
        chart.draw_series(std::iter::once(Text::new("β", p, look.text_in(15.0, H1).pos(Pos::new(HPos::Center, VPos::Center)))))?;
    }
    if let Some(observed) = v.observed {
        let o = if observed.is_nan() { lo } else { observed.clamp(lo, hi) };
        chart.draw_series(std::iter::once(PathElement::new(vec![(o, 0.0), (o, ymax * 0.78)], OBSERVED.stroke_width(look.width(2.5)))))?;
        chart.draw_series(std::iter::once(Circle::new((o, ymax * 0.78), look.px(4.5), OBSERVED.filled())))?;
        // The label runs away from the nearest threshold, beside the marker.
        let off = if o == observed { "" } else { ", off the chart" };
        let label = format!("observed {}{off}", with_unit(short(observed), &v.unit));
        let near = v.cuts.iter().copied().min_by(|a, b| (a - o).abs().total_cmp(&(b - o).abs()));
        let dx = (x1 - x0) * 0.015;
        let (anchor, x) = if near.is_some_and(|c| o < c) { (HPos::Right, o - dx) } else { (HPos::Left, o + dx) };
        chart.draw_series(std::iter::once(Text::new(
            label,
            (x, ymax * 0.78),
            look.text_in(12.5, OBSERVED).pos(Pos::new(anchor, VPos::Center)),
        )))?;
    }
    Ok(())
}

fn with_unit(v: String, unit: &str) -> String {
    if unit.is_empty() { v } else { format!("{v} {unit}") }
}

/// Maximal runs of consecutive segments of `line` whose midpoints satisfy
/// `keep` (so a run ends exactly at a threshold point in the line).
fn runs(line: &[(f64, f64)], keep: &dyn Fn(f64) -> bool) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut cur: Vec<(f64, f64)> = Vec::new();
    for w in line.windows(2) {
        if keep(0.5 * (w[0].0 + w[1].0)) {
            if cur.is_empty() {
                cur.push(w[0]);
            }
            cur.push(w[1]);
        } else if !cur.is_empty() {
            out.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// A point inside the largest part of a shaded area, at a third of the
/// curve's height there, or `None` when the area is a sliver.
fn label_spot(line: &[(f64, f64)], keep: &dyn Fn(f64) -> bool) -> Option<(f64, f64)> {
    let peak = line.iter().map(|p| p.1).fold(0.0_f64, f64::max);
    let run = runs(line, keep).into_iter().max_by(|a, b| area(a).total_cmp(&area(b)))?;
    // The point where the run's area is split in half is a robust centre.
    let total = area(&run);
    let mut acc = 0.0;
    for w in run.windows(2) {
        acc += 0.5 * (w[0].1 + w[1].1) * (w[1].0 - w[0].0);
        if acc >= total / 2.0 {
            let y = 0.5 * (w[0].1 + w[1].1);
            return (y > 0.12 * peak).then_some((w[1].0, y * 0.4));
        }
    }
    None
}

fn area(run: &[(f64, f64)]) -> f64 {
    run.windows(2).map(|w| 0.5 * (w[0].1 + w[1].1) * (w[1].0 - w[0].0)).sum()
}
