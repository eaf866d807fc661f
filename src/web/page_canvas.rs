//! plotters-canvas with text measured by the canvas itself.
//!
//! plotters measures a label (for axis and label areas) by adding a
//! `<span>` with a `style` attribute to the page and reading its size. The
//! page's Content-Security-Policy refuses style attributes, so every label
//! would be measured at the browser's default size (and each refusal is a
//! console error). `PageCanvas` draws exactly as `CanvasBackend` does and
//! answers `estimate_text_size` with the 2D context's `measureText` in the
//! same font string plotters-canvas draws with: no DOM change, no style.
//!
//! It also batches the two shapes the charts' patterns are made of: runs of
//! small filled circles of one colour (the dotted β area) become one canvas
//! path filled once, and runs of plain lines of one colour and width (the
//! hatched α area) one path stroked once. The pixels are the same (the
//! shapes of a run never overlap); the number of calls across the
//! WebAssembly boundary falls from four or five per shape to two.

use plotters_backend::{BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingBackend, DrawingErrorKind};
use plotters_canvas::CanvasBackend;
use wasm_bindgen::JsCast;
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

pub struct PageCanvas {
    inner: CanvasBackend,
    context: CanvasRenderingContext2d,
    /// The run of shapes whose path is open on the context, if any.
    batch: Option<Batch>,
}

/// A run of shapes drawn as one canvas path.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Batch {
    /// Filled circles of this colour (r, g, b, alpha).
    Dots((u8, u8, u8), f64),
    /// Stroked paths of this colour and line width.
    Lines((u8, u8, u8), f64, u32),
}

/// Circles up to this radius (canvas pixels) are batched: the pattern dots.
const DOT_RADIUS_MAX: u32 = 4;

fn css_color(c: BackendColor) -> String {
    let (r, g, b) = c.rgb;
    format!("rgba({r},{g},{b},{})", c.alpha)
}

impl PageCanvas {
    pub fn new(canvas: HtmlCanvasElement) -> Option<Self> {
        let context = canvas.get_context("2d").ok()??.dyn_into::<CanvasRenderingContext2d>().ok()?;
        let inner = CanvasBackend::with_canvas_object(canvas)?;
        Some(PageCanvas { inner, context, batch: None })
    }

    /// Close the open run, if any: fill its dots or stroke its lines.
    fn flush(&mut self) {
        match self.batch.take() {
            Some(Batch::Dots(..)) => self.context.fill(),
            Some(Batch::Lines(..)) => self.context.stroke(),
            None => {}
        }
    }

    /// Continue the open run when it is `next`, else start a new one.
    fn join(&mut self, next: Batch) {
        if self.batch == Some(next) {
            return;
        }
        self.flush();
        self.context.begin_path();
        match next {
            Batch::Dots(rgb, alpha) => self.context.set_fill_style_str(&css_color(BackendColor { rgb, alpha })),
            Batch::Lines(rgb, alpha, width) => {
                self.context.set_stroke_style_str(&css_color(BackendColor { rgb, alpha }));
                self.context.set_line_width(f64::from(width));
            }
        }
        self.batch = Some(next);
    }
}

type Drawn = Result<(), DrawingErrorKind<<CanvasBackend as DrawingBackend>::ErrorType>>;

impl DrawingBackend for PageCanvas {
    type ErrorType = <CanvasBackend as DrawingBackend>::ErrorType;

    fn get_size(&self) -> (u32, u32) {
        self.inner.get_size()
    }
    fn ensure_prepared(&mut self) -> Drawn {
        self.flush();
        self.inner.ensure_prepared()
    }
    fn present(&mut self) -> Drawn {
        self.flush();
        self.inner.present()
    }
    fn draw_pixel(&mut self, point: BackendCoord, color: BackendColor) -> Drawn {
        self.flush();
        self.inner.draw_pixel(point, color)
    }
    fn draw_line<S: BackendStyle>(&mut self, from: BackendCoord, to: BackendCoord, style: &S) -> Drawn {
        self.flush();
        self.inner.draw_line(from, to, style)
    }
    fn draw_rect<S: BackendStyle>(&mut self, upper_left: BackendCoord, bottom_right: BackendCoord, style: &S, fill: bool) -> Drawn {
        self.flush();
        self.inner.draw_rect(upper_left, bottom_right, style, fill)
    }
    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, path: I, style: &S) -> Drawn {
        let c = style.color();
        if c.alpha == 0.0 {
            return Ok(());
        }
        let mut points = path.into_iter();
        let Some(start) = points.next() else { return Ok(()) };
        self.join(Batch::Lines(c.rgb, c.alpha, style.stroke_width()));
        self.context.move_to(f64::from(start.0), f64::from(start.1));
        for p in points {
            self.context.line_to(f64::from(p.0), f64::from(p.1));
        }
        Ok(())
    }
    fn draw_circle<S: BackendStyle>(&mut self, center: BackendCoord, radius: u32, style: &S, fill: bool) -> Drawn {
        let c = style.color();
        if !fill || radius > DOT_RADIUS_MAX || c.alpha == 0.0 {
            self.flush();
            return self.inner.draw_circle(center, radius, style, fill);
        }
        self.join(Batch::Dots(c.rgb, c.alpha));
        let (x, y, r) = (f64::from(center.0), f64::from(center.1), f64::from(radius));
        // A new subpath per dot, so no line joins one dot to the next.
        self.context.move_to(x + r, y);
        // arc() throws only for a negative radius, which a u32 cannot be.
        let _ = self.context.arc(x, y, r, 0.0, std::f64::consts::TAU);
        Ok(())
    }
    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, vert: I, style: &S) -> Drawn {
        self.flush();
        self.inner.fill_polygon(vert, style)
    }
    fn draw_text<T: BackendTextStyle>(&mut self, text: &str, style: &T, pos: BackendCoord) -> Drawn {
        self.flush();
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
