//! plotters-canvas with text measured by the canvas itself.
//!
//! plotters measures a label (for axis and label areas) by adding a
//! `<span>` with a `style` attribute to the page and reading its size. The
//! page's Content-Security-Policy refuses style attributes, so every label
//! would be measured at the browser's default size (and each refusal is a
//! console error). `PageCanvas` draws exactly as `CanvasBackend` does and
//! answers `estimate_text_size` with the 2D context's `measureText` in the
//! same font string plotters-canvas draws with: no DOM change, no style.

use plotters_backend::{BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingBackend, DrawingErrorKind};
use plotters_canvas::CanvasBackend;
use wasm_bindgen::JsCast;
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

pub struct PageCanvas {
    inner: CanvasBackend,
    context: CanvasRenderingContext2d,
}

impl PageCanvas {
    pub fn new(canvas: HtmlCanvasElement) -> Option<Self> {
        let context = canvas.get_context("2d").ok()??.dyn_into::<CanvasRenderingContext2d>().ok()?;
        let inner = CanvasBackend::with_canvas_object(canvas)?;
        Some(PageCanvas { inner, context })
    }
}

type Drawn = Result<(), DrawingErrorKind<<CanvasBackend as DrawingBackend>::ErrorType>>;

impl DrawingBackend for PageCanvas {
    type ErrorType = <CanvasBackend as DrawingBackend>::ErrorType;

    fn get_size(&self) -> (u32, u32) {
        self.inner.get_size()
    }
    fn ensure_prepared(&mut self) -> Drawn {
        self.inner.ensure_prepared()
    }
    fn present(&mut self) -> Drawn {
        self.inner.present()
    }
    fn draw_pixel(&mut self, point: BackendCoord, color: BackendColor) -> Drawn {
        self.inner.draw_pixel(point, color)
    }
    fn draw_line<S: BackendStyle>(&mut self, from: BackendCoord, to: BackendCoord, style: &S) -> Drawn {
        self.inner.draw_line(from, to, style)
    }
    fn draw_rect<S: BackendStyle>(&mut self, upper_left: BackendCoord, bottom_right: BackendCoord, style: &S, fill: bool) -> Drawn {
        self.inner.draw_rect(upper_left, bottom_right, style, fill)
    }
    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, path: I, style: &S) -> Drawn {
        self.inner.draw_path(path, style)
    }
    fn draw_circle<S: BackendStyle>(&mut self, center: BackendCoord, radius: u32, style: &S, fill: bool) -> Drawn {
        self.inner.draw_circle(center, radius, style, fill)
    }
    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, vert: I, style: &S) -> Drawn {
        self.inner.fill_polygon(vert, style)
    }
    fn draw_text<T: BackendTextStyle>(&mut self, text: &str, style: &T, pos: BackendCoord) -> Drawn {
        self.inner.draw_text(text, style, pos)
    }

    /// Width and height in canvas pixels of `text` drawn horizontally: the
    /// advance width, and the font's ascent plus descent (1.2 × the size
    /// where the browser does not report them).
    fn estimate_text_size<T: BackendTextStyle>(&self, text: &str, style: &T) -> Result<(u32, u32), DrawingErrorKind<Self::ErrorType>> {
        let size = style.size();
        self.context.save();
        self.context.set_font(&format!("{} {}px {}", style.style().as_str(), size, style.family().as_str()));
        let measured = self.context.measure_text(text);
        self.context.restore();
        let (width, height) = match measured {
            Ok(m) => {
                let h = m.font_bounding_box_ascent() + m.font_bounding_box_descent();
                (m.width(), if h.is_finite() && h > 0.0 { h } else { 1.2 * size })
            }
            // A rough guess keeps the chart drawn if measuring ever fails.
            Err(_) => (0.6 * size * text.chars().count() as f64, 1.2 * size),
        };
        Ok((width.ceil().max(0.0) as u32, height.ceil().max(0.0) as u32))
    }
}
