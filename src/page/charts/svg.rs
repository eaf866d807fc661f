//! The charts as SVG documents, natively: for the tests, for a person who
//! wants to look at them without a browser, and for a report.
//!
//! The same drawing functions as the page's canvas, on plotters' SVG
//! backend. Text is written as SVG `<text>` and drawn by the viewer's own
//! fonts; its width is only estimated for the legend's layout (plotters'
//! rough estimate without a font feature), so no font file is needed.

use super::prep::{DataViews, Views};
use super::{Look, by_n, histogram, quantile, sampling, total_error, tradeoff};
use plotters::coord::Shift;
use plotters::prelude::*;

/// An error of the SVG backend (it writes to a `String`, so in practice a
/// drawing error of plotters itself).
pub type SvgError = DrawingAreaErrorKind<std::io::Error>;


/// A chart drawn on the SVG backend.
pub type SvgPainter<'a> = &'a dyn Fn(&DrawingArea<SVGBackend<'_>, Shift>, &Look) -> Result<(), SvgError>;

/// Width and height of a design chart in CSS pixels: the page's shape for a
/// chart 720 pixels wide (0.62 of the width, at most 400).
pub const DESIGN_SIZE: (u32, u32) = (720, 400);
/// A data file's chart: the page gives these at least 420 pixels.
pub const DATA_SIZE: (u32, u32) = (720, 420);

/// Draw one chart into an SVG document of `size` pixels at pixel scale 1.
pub fn render(size: (u32, u32), draw: SvgPainter<'_>) -> Result<String, SvgError> {
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, size).into_drawing_area();
        draw(&root, &Look::new(1.0))?;
        root.present()?;
    }
    Ok(out)
}

/// The four charts of "See why", named as the page's canvases are
/// (`sampling`, `by-n`, `tradeoff`, `total`).
pub fn design_charts(v: &Views) -> Result<Vec<(&'static str, String)>, SvgError> {
    Ok(vec![
        ("sampling", render(DESIGN_SIZE, &|a, l| sampling::draw(a, &v.sampling, l))?),
        ("by-n", render(DESIGN_SIZE, &|a, l| by_n::draw(a, &v.by_n, l))?),
        ("tradeoff", render(DESIGN_SIZE, &|a, l| tradeoff::draw(a, &v.tradeoff, l))?),
        ("total", render(DESIGN_SIZE, &|a, l| total_error::draw(a, &v.total, l))?),
    ])
}

/// The data file's two charts (`histogram`, `quantile`).
pub fn data_charts(v: &DataViews) -> Result<Vec<(&'static str, String)>, SvgError> {
    Ok(vec![
        ("histogram", render(DATA_SIZE, &|a, l| histogram::draw(a, &v.histogram, l))?),
        ("quantile", render(DATA_SIZE, &|a, l| quantile::draw(a, &v.quantile, l))?),
    ])
}
