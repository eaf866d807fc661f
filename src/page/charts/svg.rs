//! The charts as SVG documents: for the tests, for a person who wants to
//! look at them without a browser, for a report and for the page's "save
//! as SVG".
//!
//! The same drawing functions as the page's canvas, on plotters' SVG
//! backend. Text is written as SVG `<text>` and drawn by the viewer's own
//! fonts, so no font file is needed; where the layout needs a text's size
//! (the legend's rows, the axes' label areas) [`FixedMetrics`] answers with
//! a fixed estimate, so that the page and the command line write the same
//! document byte for byte.

use super::prep::{DataViews, Views};
use super::realised_errors::{self, RealisedErrorsView};
use super::{Look, by_n, histogram, quantile, sampling, total_error, tradeoff};
use plotters::backend::DrawingBackend;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters_backend::{BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingErrorKind};

/// An error of the SVG backend (it writes to a `String`, so in practice a
/// drawing error of plotters itself).
pub type SvgError = DrawingAreaErrorKind<std::io::Error>;

/// plotters' SVG backend with text measured by a fixed estimate instead of
/// a font: 0.58 em per character (about the mean advance of a sans-serif
/// face over digits and lower case) and 1.2 em of height. Everything else
/// is the SVG backend's own.
pub struct FixedMetrics<'a>(SVGBackend<'a>);

/// Width and height in pixels of `text` at `size` pixels under the fixed
/// estimate.
pub fn text_size(text: &str, size: f64) -> (u32, u32) {
    let w = 0.58 * size * text.chars().count() as f64;
    (w.ceil().max(0.0) as u32, (1.2 * size).ceil().max(0.0) as u32)
}

type Drawn = Result<(), DrawingErrorKind<std::io::Error>>;

impl DrawingBackend for FixedMetrics<'_> {
    type ErrorType = std::io::Error;
    fn get_size(&self) -> (u32, u32) {
        self.0.get_size()
    }
    fn ensure_prepared(&mut self) -> Drawn {
        self.0.ensure_prepared()
    }
    fn present(&mut self) -> Drawn {
        self.0.present()
    }
    fn draw_pixel(&mut self, point: BackendCoord, color: BackendColor) -> Drawn {
        self.0.draw_pixel(point, color)
    }
    fn draw_line<S: BackendStyle>(&mut self, from: BackendCoord, to: BackendCoord, style: &S) -> Drawn {
        self.0.draw_line(from, to, style)
    }
    fn draw_rect<S: BackendStyle>(&mut self, upper_left: BackendCoord, bottom_right: BackendCoord, style: &S, fill: bool) -> Drawn {
        self.0.draw_rect(upper_left, bottom_right, style, fill)
    }
    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, path: I, style: &S) -> Drawn {
        self.0.draw_path(path, style)
    }
    fn draw_circle<S: BackendStyle>(&mut self, center: BackendCoord, radius: u32, style: &S, fill: bool) -> Drawn {
        self.0.draw_circle(center, radius, style, fill)
    }
    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, vert: I, style: &S) -> Drawn {
        self.0.fill_polygon(vert, style)
    }
    fn draw_text<T: BackendTextStyle>(&mut self, text: &str, style: &T, pos: BackendCoord) -> Drawn {
        self.0.draw_text(text, style, pos)
    }
    fn estimate_text_size<T: BackendTextStyle>(&self, text: &str, style: &T) -> Result<(u32, u32), DrawingErrorKind<Self::ErrorType>> {
        Ok(text_size(text, style.size()))
    }
    fn blit_bitmap(&mut self, pos: BackendCoord, size: (u32, u32), src: &[u8]) -> Drawn {
        self.0.blit_bitmap(pos, size, src)
    }
}

/// A chart drawn on the SVG backend.
pub type SvgPainter<'a> = &'a dyn Fn(&DrawingArea<FixedMetrics<'_>, Shift>, &Look) -> Result<(), SvgError>;

/// Width and height of a design chart in CSS pixels: the page's shape for a
/// chart 720 pixels wide (0.62 of the width, at most 400).
pub const DESIGN_SIZE: (u32, u32) = (720, 400);
/// A data file's chart: the page gives these at least 420 pixels.
pub const DATA_SIZE: (u32, u32) = (720, 420);
/// The simulation check's chart: two panels of two lanes each under a
/// legend of two rows.
pub const SIMULATION_SIZE: (u32, u32) = (720, 440);

/// Draw one chart into an SVG document of `size` pixels at pixel scale 1.
pub fn render(size: (u32, u32), draw: SvgPainter<'_>) -> Result<String, SvgError> {
    let mut out = String::new();
    {
        let root = FixedMetrics(SVGBackend::with_string(&mut out, size)).into_drawing_area();
        draw(&root, &Look::new(1.0))?;
        root.present()?;
    }
    Ok(out)
}

/// The four charts of "See why", named as the page's canvases are
/// (`sampling`, `by-n`, `tradeoff`, `total`).
pub const DESIGN_CHARTS: [&str; 4] = ["sampling", "by-n", "tradeoff", "total"];
/// The data file's two charts.
pub const DATA_CHARTS: [&str; 2] = ["histogram", "quantile"];

/// One chart of "See why" by its name (`DESIGN_CHARTS`); None for another name.
pub fn design_chart(v: &Views, id: &str) -> Option<Result<String, SvgError>> {
    Some(match id {
        "sampling" => render(DESIGN_SIZE, &|a, l| sampling::draw(a, &v.sampling, l)),
        "by-n" => render(DESIGN_SIZE, &|a, l| by_n::draw(a, &v.by_n, l)),
        "tradeoff" => render(DESIGN_SIZE, &|a, l| tradeoff::draw(a, &v.tradeoff, l)),
        "total" => render(DESIGN_SIZE, &|a, l| total_error::draw(a, &v.total, l)),
        _ => return None,
    })
}

/// One of the data file's charts by its name (`DATA_CHARTS`); None for another name.
pub fn data_chart(v: &DataViews, id: &str) -> Option<Result<String, SvgError>> {
    Some(match id {
        "histogram" => render(DATA_SIZE, &|a, l| histogram::draw(a, &v.histogram, l)),
        "quantile" => render(DATA_SIZE, &|a, l| quantile::draw(a, &v.quantile, l)),
        _ => return None,
    })
}

/// The four charts of "See why" in order, with their names.
pub fn design_charts(v: &Views) -> Result<Vec<(&'static str, String)>, SvgError> {
    DESIGN_CHARTS.iter().filter_map(|&id| design_chart(v, id).map(|svg| svg.map(|s| (id, s)))).collect()
}

/// The data file's two charts in order, with their names.
pub fn data_charts(v: &DataViews) -> Result<Vec<(&'static str, String)>, SvgError> {
    DATA_CHARTS.iter().filter_map(|&id| data_chart(v, id).map(|svg| svg.map(|s| (id, s)))).collect()
}

/// The simulation check's chart (realised α and β of both rules against
/// the limits and the model), named `realised-errors`.
pub fn simulation_chart(v: &RealisedErrorsView) -> Result<String, SvgError> {
    render(SIMULATION_SIZE, &|a, l| realised_errors::draw(a, v, l))
}
