//! The test's error trade-off (its ROC curve): power 1 − β against α as
//! the threshold slides, the region the limits allow, and the Youden point,
//! whose height above the diagonal is J = 1 − α − β.

use super::prep::TradeoffView;
use super::{ALLOWED, DrawResult, Glyph, H0, INK, Look, MUTED, OBSERVED, cartesian, legend, mesh, prob, short};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, v: &TradeoffView, look: &Look) -> DrawResult<DB> {
    area.fill(&WHITE)?;
    let (a, p) = v.youden;
    let items = vec![
        (Glyph::Line(H0), format!("the test's trade-off at {}", v.n_text)),
        (Glyph::Band(ALLOWED), "allowed by your limits".to_string()),
        (Glyph::Marker(OBSERVED), format!("threshold chosen: J = {}", prob(p - a))),
        (Glyph::Dotted(MUTED), "no better than chance".to_string()),
    ];
    let plot = legend(area, &items, look)?;
    let mut chart = cartesian(&plot, look, (0.0, 1.0), (0.0, 1.0))?;
    mesh(&mut chart, look, "false-alarm rate α", "power 1 − β", &|x| short(*x), &|y| short(*y))?;
    let allowed = [(0.0, 1.0 - v.beta_max), (v.alpha_max, 1.0)];
    chart.draw_series(std::iter::once(Rectangle::new(allowed, ALLOWED.mix(0.45).filled())))?;
    chart.draw_series(std::iter::once(Rectangle::new(allowed, ALLOWED.stroke_width(look.width(1.5)))))?;
    chart.draw_series(DashedLineSeries::new(
        vec![(0.0, 0.0), (1.0, 1.0)],
        look.px(2.0),
        look.px(4.0),
        MUTED.stroke_width(look.width(1.5)),
    ))?;
    chart.draw_series(LineSeries::new(v.points.iter().copied(), H0.stroke_width(look.width(2.5))))?;
    if a.is_finite() && p.is_finite() {
        chart.draw_series(std::iter::once(PathElement::new(vec![(a, a), (a, p)], OBSERVED.stroke_width(look.width(2.0)))))?;
        chart.draw_series(std::iter::once(Circle::new((a, p), look.px(5.5), OBSERVED.filled())))?;
        chart.draw_series(std::iter::once(Circle::new((a, p), look.px(5.5), INK.stroke_width(look.width(1.0)))))?;
        let label = format!("α* = {}, power = {}", prob(a), prob(p));
        chart.draw_series(std::iter::once(Text::new(label, (a + 0.04, p - 0.06), look.text(12.5).pos(Pos::new(HPos::Left, VPos::Top)))))?;
        if p - a > 0.12 {
            let mid = 0.5 * (a + p);
            chart.draw_series(std::iter::once(Text::new(
                format!("J = {}", prob(p - a)),
                (a + 0.02, mid),
                look.text_in(12.5, OBSERVED).pos(Pos::new(HPos::Left, VPos::Center)),
            )))?;
        }
    }
    Ok(())
}
