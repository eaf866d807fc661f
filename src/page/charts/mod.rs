//! The four charts of "See why", the data file's two and the simulation
//! check's, as drawing code
//! generic over a plotters [`DrawingBackend`]: the page draws them on
//! canvas, and natively the same functions draw SVG (`svg`).
//!
//! Architecture invariant: a chart function knows nothing of the DOM or the
//! engine's internals. It takes a plain view (`prep`), a [`Look`] (palette
//! and pixel scale) and a drawing area, and it cannot panic on any view the
//! engine can produce: empty or non-finite data draw an empty frame.
//!
//! Colour is never the only cue: H0 is a solid line and its α area is
//! hatched, the alternative is dashed and its β area dotted, and every mark
//! carries a text label. The palette is Paul Tol's "muted" set, chosen to
//! stay distinct under the common colour-vision deficiencies.

pub mod by_n;
pub mod histogram;
pub mod prep;
pub mod quantile;
pub mod realised_errors;
pub mod sampling;
pub mod svg;
pub mod table;
pub mod total_error;
pub mod tradeoff;

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Near-black for text, axes and the threshold.
pub const INK: RGBColor = RGBColor(0x22, 0x22, 0x22);
/// H0 and everything measured under it (α): indigo.
pub const H0: RGBColor = RGBColor(0x33, 0x22, 0x88);
/// The alternative θ1 and everything measured under it (β): green.
pub const H1: RGBColor = RGBColor(0x11, 0x77, 0x33);
/// Observed data: wine.
pub const OBSERVED: RGBColor = RGBColor(0x88, 0x22, 0x55);
/// Regions the analyst's limits allow: sand.
pub const ALLOWED: RGBColor = RGBColor(0xDD, 0xCC, 0x77);
/// Grid lines and reference lines.
pub const GRID: RGBColor = RGBColor(0xDD, 0xDD, 0xDD);
pub const MUTED: RGBColor = RGBColor(0x66, 0x66, 0x66);

/// The result of drawing on a backend.
pub type DrawResult<DB> = Result<(), DrawingAreaErrorKind<<DB as DrawingBackend>::ErrorType>>;

/// How to draw: the pixel scale (device pixels per CSS pixel) that makes
/// lines and text the same size on every screen.
#[derive(Debug, Clone, Copy)]
pub struct Look {
    pub scale: f64,
}

impl Look {
    pub fn new(scale: f64) -> Look {
        let scale = if scale.is_finite() && scale > 0.0 { scale.clamp(0.5, 4.0) } else { 1.0 };
        Look { scale }
    }
    /// CSS pixels to device pixels.
    pub fn px(&self, css: f64) -> i32 {
        (css * self.scale).round() as i32
    }
    pub fn width(&self, css: f64) -> u32 {
        (css * self.scale).round().max(1.0) as u32
    }
    pub fn text(&self, css: f64) -> TextStyle<'static> {
        ("sans-serif", css * self.scale).into_font().color(&INK)
    }
    pub fn text_in(&self, css: f64, color: RGBColor) -> TextStyle<'static> {
        ("sans-serif", css * self.scale).into_font().color(&color)
    }
}

/// What a legend entry shows beside its text.
#[derive(Debug, Clone, Copy)]
pub enum Glyph {
    Line(RGBColor),
    Dashed(RGBColor),
    Dotted(RGBColor),
    Hatch(RGBColor),
    Dots(RGBColor),
    Band(RGBColor),
    Marker(RGBColor),
    /// A mark alone (the simulation chart's model values).
    Mark(RGBColor, Mark),
    /// A mark on a bar with end caps (an estimate with its error bar).
    Interval(RGBColor, Mark),
}

/// A point's shape, so that what a point stands for does not rest on its
/// colour: a filled disc, a filled triangle, or an open diamond.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mark {
    Disc,
    Triangle,
    Diamond,
}

/// Draw a mark centred at `(x, y)` (pixels of `area`), `r` pixels from its
/// centre to its edge. The diamond is open: white inside, so that a disc
/// or triangle drawn over it stays visible.
pub fn draw_mark<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, mark: Mark, (x, y): (i32, i32), r: i32, color: RGBColor, look: &Look) -> DrawResult<DB> {
    match mark {
        Mark::Disc => area.draw(&Circle::new((x, y), r, color.filled())),
        Mark::Triangle => {
            let t = r + r / 4 + 1;
            area.draw(&Polygon::new(vec![(x, y - t), (x + t, y + r), (x - t, y + r)], color.filled()))
        }
        Mark::Diamond => {
            let corners = vec![(x, y - r), (x + r, y), (x, y + r), (x - r, y), (x, y - r)];
            area.draw(&Polygon::new(corners.clone(), WHITE.filled()))?;
            area.draw(&PathElement::new(corners, color.stroke_width(look.width(1.8))))
        }
    }
}

/// A horizontal error bar from `x0` to `x1` at height `y` (pixels of
/// `area`) with end caps `cap` pixels high on each side.
pub fn draw_bar<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, (x0, x1, y): (i32, i32, i32), cap: i32, color: RGBColor, look: &Look) -> DrawResult<DB> {
    let style = color.stroke_width(look.width(2.0));
    area.draw(&PathElement::new(vec![(x0, y), (x1, y)], style))?;
    area.draw(&PathElement::new(vec![(x0, y - cap), (x0, y + cap)], style))?;
    area.draw(&PathElement::new(vec![(x1, y - cap), (x1, y + cap)], style))
}

/// Draw a legend as rows of (glyph, text) across the top of `area`, and
/// return the area left below it. Rows wrap to the width.
pub fn legend<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    items: &[(Glyph, String)],
    look: &Look,
) -> Result<DrawingArea<DB, Shift>, DrawingAreaErrorKind<DB::ErrorType>> {
    let (w, _) = area.dim_in_pixel();
    let font = look.text(12.5);
    let glyph_w = look.px(24.0);
    let gap = look.px(6.0);
    let sep = look.px(16.0);
    let row_h = look.px(20.0);
    let pad = look.px(4.0);
    // Lay out first, then draw.
    let mut placed: Vec<(i32, i32, usize)> = Vec::new();
    let (mut x, mut y) = (pad, pad);
    for (i, (_, text)) in items.iter().enumerate() {
        let (tw, _) = area.estimate_text_size(text, &font).unwrap_or((text.len() as u32 * 7, 12));
        let item_w = glyph_w + gap + tw as i32;
        if x > pad && x + item_w > w as i32 - pad {
            x = pad;
            y += row_h;
        }
        placed.push((x, y, i));
        x += item_w + sep;
    }
    let band = y + row_h + pad;
    for (x, y, i) in placed {
        let (glyph, text) = &items[i];
        let cy = y + row_h / 2;
        draw_glyph(area, *glyph, (x, cy), glyph_w, look)?;
        area.draw(&Text::new(text.clone(), (x + glyph_w + gap, cy), font.pos(Pos::new(HPos::Left, VPos::Center))))?;
    }
    let (_, rest) = area.split_vertically(band.max(0) as u32);
    Ok(rest)
}

fn draw_glyph<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, g: Glyph, (x, cy): (i32, i32), w: i32, look: &Look) -> DrawResult<DB> {
    let h = look.px(6.0);
    let line = |c: RGBColor| c.stroke_width(look.width(2.5));
    match g {
        Glyph::Line(c) => area.draw(&PathElement::new(vec![(x, cy), (x + w, cy)], line(c))),
        Glyph::Dashed(c) => {
            let seg = look.px(5.0).max(1);
            let mut s = x;
            while s < x + w {
                area.draw(&PathElement::new(vec![(s, cy), ((s + seg).min(x + w), cy)], line(c)))?;
                s += 2 * seg;
            }
            Ok(())
        }
        Glyph::Dotted(c) => {
            let mut s = x;
            while s <= x + w {
                area.draw(&Circle::new((s, cy), look.px(1.2).max(1), c.filled()))?;
                s += look.px(4.0).max(2);
            }
            Ok(())
        }
        Glyph::Hatch(c) => {
            area.draw(&Rectangle::new([(x, cy - h), (x + w, cy + h)], c.mix(0.12).filled()))?;
            let step = look.px(5.0).max(2);
            let mut s = x - 2 * h;
            while s < x + w {
                let (x0, y0) = (s.max(x), cy + h - (s.max(x) - s));
                let x1 = (s + 2 * h).min(x + w);
                let y1 = cy + h - (x1 - s);
                area.draw(&PathElement::new(vec![(x0, y0), (x1, y1)], c.stroke_width(look.width(1.2))))?;
                s += step;
            }
            area.draw(&Rectangle::new([(x, cy - h), (x + w, cy + h)], c.stroke_width(look.width(1.0))))
        }
        Glyph::Dots(c) => {
            area.draw(&Rectangle::new([(x, cy - h), (x + w, cy + h)], c.mix(0.12).filled()))?;
            let step = look.px(5.0).max(2);
            let mut yy = cy - h + step / 2;
            let mut row = 0;
            while yy < cy + h {
                let mut xx = x + step / 2 + if row % 2 == 1 { step / 2 } else { 0 };
                while xx < x + w {
                    area.draw(&Circle::new((xx, yy), look.px(1.1).max(1), c.filled()))?;
                    xx += step;
                }
                yy += step;
                row += 1;
            }
            area.draw(&Rectangle::new([(x, cy - h), (x + w, cy + h)], c.stroke_width(look.width(1.0))))
        }
        Glyph::Band(c) => {
            area.draw(&Rectangle::new([(x, cy - h), (x + w, cy + h)], c.mix(0.45).filled()))?;
            area.draw(&Rectangle::new([(x, cy - h), (x + w, cy + h)], c.stroke_width(look.width(1.0))))
        }
        Glyph::Marker(c) => {
            area.draw(&PathElement::new(vec![(x + w / 2, cy - h - 2), (x + w / 2, cy + h + 2)], c.stroke_width(look.width(2.0))))?;
            area.draw(&Circle::new((x + w / 2, cy), look.px(4.0), c.filled()))
        }
        Glyph::Mark(c, m) => draw_mark(area, m, (x + w / 2, cy), look.px(6.0), c, look),
        Glyph::Interval(c, m) => {
            draw_bar(area, (x + look.px(1.0), x + w - look.px(1.0), cy), look.px(4.0), c, look)?;
            draw_mark(area, m, (x + w / 2, cy), look.px(4.5), c, look)
        }
    }
}

/// A chart context on f64 axes that hold every point near the plot.
pub type Chart<'a, DB> = ChartContext<'a, DB, Cartesian2d<Clamped, Clamped>>;

/// An f64 axis that holds every value within eight widths of its range
/// before plotters maps it to whole pixels: a point far outside the plot
/// (a value at the edge of the doubles) would otherwise overflow the pixel
/// arithmetic. Inside that band it maps exactly as `RangedCoordf64`; NaN
/// goes to the range's start.
#[derive(Clone)]
pub struct Clamped(RangedCoordf64);

impl Clamped {
    fn hold(&self, v: f64) -> f64 {
        let r = self.0.range();
        let band = 8.0 * (r.end - r.start);
        if v.is_nan() { r.start } else { v.clamp(r.start - band, r.end + band) }
    }
}

impl Ranged for Clamped {
    type FormatOption = plotters::coord::ranged1d::DefaultFormatting;
    type ValueType = f64;
    fn map(&self, value: &f64, limit: (i32, i32)) -> i32 {
        self.0.map(&self.hold(*value), limit)
    }
    fn key_points<Hint: plotters::coord::ranged1d::KeyPointHint>(&self, hint: Hint) -> Vec<f64> {
        self.0.key_points(hint)
    }
    fn range(&self) -> std::ops::Range<f64> {
        self.0.range()
    }
}


/// The mesh every chart shares: light grid, labelled axes.
pub fn mesh<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    look: &Look,
    x_desc: &str,
    y_desc: &str,
    x_fmt: &dyn Fn(&f64) -> String,
    y_fmt: &dyn Fn(&f64) -> String,
) -> DrawResult<DB> {
    chart
        .configure_mesh()
        .disable_x_mesh()
        .bold_line_style(GRID.stroke_width(look.width(1.0)))
        .light_line_style(TRANSPARENT)
        .axis_style(MUTED.stroke_width(look.width(1.0)))
        .x_labels(6)
        .y_labels(5)
        .label_style(look.text(12.0))
        .axis_desc_style(look.text(13.0))
        .x_desc(x_desc)
        .y_desc(y_desc)
        .x_label_formatter(x_fmt)
        .y_label_formatter(y_fmt)
        .draw()
}

/// Build the Cartesian chart on `area` with room for axis labels.
pub fn cartesian<'a, DB: DrawingBackend>(
    area: &'a DrawingArea<DB, Shift>,
    look: &Look,
    x: (f64, f64),
    y: (f64, f64),
) -> Result<Chart<'a, DB>, DrawingAreaErrorKind<DB::ErrorType>> {
    cartesian_with(area, look, x, y, look.px(44.0), look.px(58.0))
}

/// The same with the label areas given: `below` pixels under the plot for
/// the x axis, `beside` pixels left of it for the y axis.
pub fn cartesian_with<'a, DB: DrawingBackend>(
    area: &'a DrawingArea<DB, Shift>,
    look: &Look,
    x: (f64, f64),
    y: (f64, f64),
    below: i32,
    beside: i32,
) -> Result<Chart<'a, DB>, DrawingAreaErrorKind<DB::ErrorType>> {
    let (x0, x1) = sane_range(x);
    let (y0, y1) = sane_range(y);
    ChartBuilder::on(area)
        .margin_left(look.px(6.0))
        .margin_right(look.px(14.0))
        .margin_top(look.px(6.0))
        .margin_bottom(look.px(4.0))
        .x_label_area_size(below.max(0))
        .y_label_area_size(beside.max(0))
        .build_cartesian_2d(Clamped(RangedCoordf64::from(x0..x1)), Clamped(RangedCoordf64::from(y0..y1)))
}

/// A range plotters can draw: finite, increasing, non-empty, and held
/// within ±f64::MAX/4 so that its width is finite too and every finite
/// point lies within a few widths of it (plotters maps a point through the
/// width to whole pixels, which overflow otherwise).
pub fn sane_range((a, b): (f64, f64)) -> (f64, f64) {
    const LIMIT: f64 = f64::MAX / 4.0;
    let (a, b) = if a.is_finite() && b.is_finite() { (a.min(b).clamp(-LIMIT, LIMIT), a.max(b).clamp(-LIMIT, LIMIT)) } else { (0.0, 1.0) };
    if b - a > 1e-12 * (1.0 + a.abs()) {
        (a, b)
    } else {
        let half = 0.5f64.max(1e-6 * a.abs());
        (a - half, b + half)
    }
}

/// Diagonal hatching inside a region of the plot, `inside(x, y)` in data
/// coordinates, drawn as 45° lines `spacing` CSS pixels apart.
pub fn hatch<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    look: &Look,
    color: RGBColor,
    inside: &dyn Fn(f64, f64) -> bool,
) -> DrawResult<DB> {
    let (w, h) = chart.plotting_area().dim_in_pixel();
    let (w, h) = (w as f64, h as f64);
    if w < 2.0 || h < 2.0 {
        return Ok(());
    }
    let xr = chart.x_range();
    let yr = chart.y_range();
    let to_data = |px: f64, py: f64| (xr.start + px / w * (xr.end - xr.start), yr.start + py / h * (yr.end - yr.start));
    let spacing = 7.0 * look.scale;
    let step = 1.5 * look.scale;
    // Each hatch line is straight, so a run inside the region is drawn
    // from its first to its last point: two canvas calls instead of one
    // per sampled point (the sampling only finds where the region ends).
    let mut paths: Vec<Vec<(f64, f64)>> = Vec::new();
    let mut c = -h;
    while c < w {
        let mut run: Option<((f64, f64), (f64, f64))> = None;
        let mut t = 0.0;
        while t <= h {
            let (px, py) = (c + t, t);
            let p = to_data(px, py);
            if px >= 0.0 && px <= w && inside(p.0, p.1) {
                run = Some(run.map_or((p, p), |(a, _)| (a, p)));
            } else if let Some((a, b)) = run.take()
                && a != b
            {
                paths.push(vec![a, b]);
            }
            t += step;
        }
        if let Some((a, b)) = run
            && a != b
        {
            paths.push(vec![a, b]);
        }
        c += spacing;
    }
    let style = color.stroke_width(look.width(1.1));
    chart.draw_series(paths.into_iter().map(|p| PathElement::new(p, style)))?;
    Ok(())
}

/// Dots on a staggered grid inside a region of the plot.
pub fn dots<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    look: &Look,
    color: RGBColor,
    inside: &dyn Fn(f64, f64) -> bool,
) -> DrawResult<DB> {
    let (w, h) = chart.plotting_area().dim_in_pixel();
    let (w, h) = (w as f64, h as f64);
    if w < 2.0 || h < 2.0 {
        return Ok(());
    }
    let xr = chart.x_range();
    let yr = chart.y_range();
    let spacing = 6.0 * look.scale;
    let r = look.px(1.3).max(1);
    let mut pts = Vec::new();
    let mut row = 0;
    let mut py = spacing / 2.0;
    while py < h {
        let mut px = if row % 2 == 1 { spacing } else { spacing / 2.0 };
        while px < w {
            let p = (xr.start + px / w * (xr.end - xr.start), yr.start + py / h * (yr.end - yr.start));
            if inside(p.0, p.1) {
                pts.push(p);
            }
            px += spacing;
        }
        py += spacing;
        row += 1;
    }
    chart.draw_series(pts.into_iter().map(|p| Circle::new(p, r, color.filled())))?;
    Ok(())
}

/// Linear interpolation on a polyline sorted by x (0 outside it).
pub fn interpolate(line: &[(f64, f64)], x: f64) -> f64 {
    if line.len() < 2 || x < line[0].0 || x > line[line.len() - 1].0 {
        return 0.0;
    }
    let i = line.partition_point(|p| p.0 < x).clamp(1, line.len() - 1);
    let (a, b) = (line[i - 1], line[i]);
    if b.0 - a.0 <= 0.0 { a.1.max(b.1) } else { a.1 + (b.1 - a.1) * (x - a.0) / (b.0 - a.0) }
}

/// A number for an axis tick or a label: short, no trailing zeros.
pub fn short(v: f64) -> String {
    if !v.is_finite() {
        return "—".into();
    }
    let a = v.abs();
    let s = if a == 0.0 {
        "0".to_string()
    } else if !(1e-3..1e5).contains(&a) {
        format!("{v:.2e}")
    } else if a >= 100.0 {
        format!("{v:.0}")
    } else if a >= 10.0 {
        format!("{v:.1}")
    } else if a >= 1.0 {
        format!("{v:.2}")
    } else {
        format!("{v:.3}")
    };
    let s = if s.contains('.') && !s.contains('e') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s };
    s.replace('-', "−")
}

/// A probability with three significant digits, as in the text.
pub fn prob(p: f64) -> String {
    if !p.is_finite() {
        return "—".into();
    }
    if p == 0.0 {
        return "0".into();
    }
    if p < 0.001 {
        return format!("{p:.1e}");
    }
    let digits = (2 - p.abs().log10().floor() as i32).clamp(0, 6) as usize;
    format!("{p:.digits$}")
}
