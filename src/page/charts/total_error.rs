//! Total error α + β against the threshold, with its two parts and the
//! minimum (the Youden threshold) marked.

use super::prep::TotalErrorView;
use super::{DrawResult, Glyph, H0, H1, INK, Look, OBSERVED, cartesian, legend, mesh, prob, sane_range, short};
use plotters::coord::Shift;
use plotters::prelude::*;

pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, v: &TotalErrorView, look: &Look) -> DrawResult<DB> {
    area.fill(&WHITE)?;
    let (c, e) = v.minimum;
    let items = vec![
        (Glyph::Line(INK), "total error α + β".to_string()),
        (Glyph::Dotted(H0), "α (false alarm)".to_string()),
        (Glyph::Dashed(H1), "β (miss)".to_string()),
        (
            Glyph::Marker(OBSERVED),
            format!(
                "smallest α + β = {} at {}{}",
                prob(e),
                short(c),
                if v.unit.is_empty() { String::new() } else { format!(" {}", v.unit) }
            ),
        ),
    ];
    let plot = legend(area, &items, look)?;
    let (x0, x1) = v.points.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), p| (a.min(p.0), b.max(p.0)));
    let (x0, x1) = sane_range((x0, x1));
    let mut chart = cartesian(&plot, look, (x0, x1), (0.0, 1.05))?;
    mesh(&mut chart, look, &v.x_label, "error rate", &|x| short(*x), &|y| short(*y))?;
    chart.draw_series(DashedLineSeries::new(
        v.points.iter().map(|p| (p.0, p.1)),
        look.px(2.0),
        look.px(3.5),
        H0.stroke_width(look.width(2.0)),
    ))?;
    chart.draw_series(DashedLineSeries::new(
        v.points.iter().map(|p| (p.0, p.2)),
        look.px(7.0),
        look.px(5.0),
        H1.stroke_width(look.width(2.0)),
    ))?;
    chart.draw_series(LineSeries::new(v.points.iter().map(|p| (p.0, p.1 + p.2)), INK.stroke_width(look.width(3.0))))?;
    // The minimum is marked where the curve is drawn; one beyond the curve's
    // range (values at the edge of the doubles) is named in the legend only.
    if c.is_finite() && e.is_finite() && c >= x0 && c <= x1 {
        chart.draw_series(std::iter::once(PathElement::new(vec![(c, 0.0), (c, e)], OBSERVED.stroke_width(look.width(2.0)))))?;
        chart.draw_series(std::iter::once(Circle::new((c, e), look.px(5.5), OBSERVED.filled())))?;
    }
    Ok(())
}
