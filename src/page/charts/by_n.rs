//! α* and β* against the sample size, with the two limits, the sizes at
//! which the design is conclusive, and the n the other charts show.

use super::prep::ByNView;
use super::{ALLOWED, DrawResult, GRID, Glyph, H0, H1, INK, Look, MUTED, legend, prob, short};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, v: &ByNView, look: &Look) -> DrawResult<DB> {
    area.fill(&WHITE)?;
    let same = (v.alpha_max - v.beta_max).abs() < 1e-12;
    let mut items =
        vec![(Glyph::Line(H0), "α*: false-alarm rate at the threshold".to_string()), (Glyph::Dashed(H1), "β*: miss rate".to_string())];
    if same {
        items.push((Glyph::Dotted(INK), format!("both limits: {}", prob(v.alpha_max))));
    } else {
        items.push((Glyph::Dotted(H0), format!("α limit {}", prob(v.alpha_max))));
        items.push((Glyph::Dotted(H1), format!("β limit {}", prob(v.beta_max))));
    }
    items.push((Glyph::Band(ALLOWED), "conclusive".into()));
    if let Some(n) = v.youden_n {
        items.push((Glyph::Dashed(INK), format!("smallest conclusive n = {}", short(n))));
    }
    let plot = legend(area, &items, look)?;
    let lo = v.points.first().map_or(1.0, |p| p.n).max(1.0);
    let hi = v.points.last().map_or(10.0, |p| p.n).max(lo * 1.5);
    let ytop = v.points.iter().flat_map(|p| [p.alpha, p.beta]).chain([v.alpha_max, v.beta_max]).fold(0.0_f64, f64::max);
    let ytop = if ytop.is_finite() && ytop > 0.0 { (ytop * 1.08).min(1.0) } else { 0.5 };
    let mut chart = ChartBuilder::on(&plot)
        .margin_left(look.px(6.0))
        .margin_right(look.px(14.0))
        .margin_top(look.px(6.0))
        .margin_bottom(look.px(4.0))
        .x_label_area_size(look.px(44.0))
        .y_label_area_size(look.px(58.0))
        .build_cartesian_2d((lo..hi).log_scale(), 0.0..ytop)?;
    chart
        .configure_mesh()
        .disable_x_mesh()
        .bold_line_style(GRID.stroke_width(look.width(1.0)))
        .light_line_style(TRANSPARENT)
        .axis_style(MUTED.stroke_width(look.width(1.0)))
        .x_labels(12)
        .y_labels(6)
        .label_style(look.text(12.0))
        .axis_desc_style(look.text(13.0))
        .x_desc(v.x_label.as_str())
        .y_desc("error rate at the threshold")
        // Log axis: label only 1, 2 and 5 times a power of ten.
        .x_label_formatter(&|x| {
            let m = *x / 10f64.powf(x.log10().floor());
            if [1.0, 2.0, 5.0].iter().any(|k| (m - k).abs() < 1e-6) { short(*x) } else { String::new() }
        })
        .y_label_formatter(&|y| short(*y))
        .draw()?;
    // Conclusive stretches (the engine's verdict at each n), one rectangle
    // per run of conclusive points; each point's share reaches halfway to
    // its neighbours (in log n).
    let edge = |i: usize, right: bool| {
        let p = v.points[i].n;
        match (right, i) {
            (false, 0) => p,
            (false, _) => (p * v.points[i - 1].n).sqrt(),
            (true, _) if i + 1 == v.points.len() => p,
            (true, _) => (p * v.points[i + 1].n).sqrt(),
        }
    };
    let mut bands = Vec::new();
    let mut start: Option<usize> = None;
    for i in 0..=v.points.len() {
        let inside = v.points.get(i).is_some_and(|p| p.conclusive);
        match (inside, start) {
            (true, None) => start = Some(i),
            (false, Some(s0)) => {
                bands.push(Rectangle::new([(edge(s0, false), 0.0), (edge(i - 1, true), ytop)], ALLOWED.mix(0.35).filled()));
                start = None;
            }
            _ => {}
        }
    }
    chart.draw_series(bands)?;
    let dotted =
        |c: RGBColor, y: f64| DashedLineSeries::new(vec![(lo, y), (hi, y)], look.px(2.0), look.px(4.0), c.stroke_width(look.width(2.0)));
    if same {
        chart.draw_series(dotted(INK, v.alpha_max))?;
    } else {
        chart.draw_series(dotted(H0, v.alpha_max))?;
        chart.draw_series(dotted(H1, v.beta_max))?;
    }
    chart.draw_series(LineSeries::new(v.points.iter().map(|p| (p.n, p.alpha)), H0.stroke_width(look.width(2.5))))?;
    chart.draw_series(DashedLineSeries::new(
        v.points.iter().map(|p| (p.n, p.beta)),
        look.px(7.0),
        look.px(5.0),
        H1.stroke_width(look.width(2.5)),
    ))?;
    if let Some(n) = v.youden_n.filter(|n| *n >= lo && *n <= hi && (*n - v.shown_n).abs() > 0.5) {
        chart.draw_series(DashedLineSeries::new(
            vec![(n, 0.0), (n, ytop * 0.86)],
            look.px(3.0),
            look.px(3.0),
            INK.stroke_width(look.width(1.5)),
        ))?;
    }
    let n = v.shown_n;
    if n >= lo && n <= hi {
        chart.draw_series(std::iter::once(PathElement::new(vec![(n, 0.0), (n, ytop * 0.95)], INK.stroke_width(look.width(2.0)))))?;
        let right = n > (lo * hi).sqrt();
        let (anchor, shift) = if right { (HPos::Right, 0.97) } else { (HPos::Left, 1.03) };
        chart.draw_series(std::iter::once(Text::new(
            format!("shown: n = {}", short(n)),
            (n * shift, ytop * 0.97),
            look.text(12.5).pos(Pos::new(anchor, VPos::Top)),
        )))?;
    }
    Ok(())
}
