//! Canvas plumbing: size each canvas for its CSS box and the screen's
//! devicePixelRatio (crisp on high-DPI screens), draw a chart on it with
//! plotters-canvas (through `PageCanvas`), and put the same numbers in the
//! chart's table.

use crate::page::charts::prep::Views;
use crate::page::charts::{self, DrawResult, Look, by_n, prob, sampling, short, table, total_error, tradeoff};
use super::dom;
use plotters::coord::Shift;
use plotters::prelude::*;
use super::page_canvas::PageCanvas;

const CHARTS: [&str; 4] = ["chart-sampling", "chart-by-n", "chart-tradeoff", "chart-total"];

/// A canvas with its laid-out CSS width, read before anything is written.
type Measured = Option<(web_sys::HtmlCanvasElement, f64)>;

/// Read a canvas's CSS width; `None` when it is not laid out (hidden or
/// missing). Reading layout after a write makes the browser lay the page
/// out again, so every width is read before any canvas is resized.
fn measure(id: &str) -> Measured {
    let canvas = dom::canvas(id)?;
    let css_w = canvas.client_width() as f64;
    (css_w >= 10.0).then_some((canvas, css_w))
}

/// Size a measured canvas for its width and the screen; returns it with
/// the pixel scale.
fn prepare((canvas, css_w): (web_sys::HtmlCanvasElement, f64)) -> (web_sys::HtmlCanvasElement, Look) {
    let dpr = dom::window().map_or(1.0, |w| w.device_pixel_ratio());
    let look = Look::new(dpr);
    // Wide charts get a flatter shape; narrow ones stay readable.
    // A chart may ask for more height (data-min-height, CSS pixels).
    let min_h = canvas.get_attribute("data-min-height").and_then(|v| v.parse::<f64>().ok()).unwrap_or(260.0).clamp(260.0, 800.0);
    let css_h = (css_w * 0.62).clamp(min_h, 400.0_f64.max(min_h)).round();
    // Through the CSSOM: the page's policy refuses style attributes.
    let _ = canvas.style().set_property("height", &format!("{css_h}px"));
    let (w, h) = ((css_w * look.scale).round() as u32, (css_h * look.scale).round() as u32);
    if canvas.width() != w {
        canvas.set_width(w);
    }
    if canvas.height() != h {
        canvas.set_height(h);
    }
    (canvas, look)
}

/// A chart drawn on the canvas backend.
pub(super) type Painter<'a> = &'a dyn Fn(&DrawingArea<PageCanvas, Shift>, &Look) -> DrawResult<PageCanvas>;

pub(super) fn paint(id: &str, draw: Painter<'_>) {
    paint_measured(id, measure(id), draw);
}

fn paint_measured(id: &str, measured: Measured, draw: Painter<'_>) {
    let Some(m) = measured else { return };
    let (canvas, look) = prepare(m);
    let Some(backend) = PageCanvas::new(canvas) else { return };
    let root = backend.into_drawing_area();
    if let Err(e) = draw(&root, &look).and_then(|_| root.present()) {
        web_sys::console::warn_1(&format!("chart {id} could not be drawn: {e}").into());
    }
}

pub fn draw_all(v: &Views) {
    // All four widths first: one layout at most, not one per chart.
    let [s, n, t, e] = CHARTS.map(measure);
    // Each chart's drawing time in ms, kept on the canvas for the browser test.
    let timed = |id: &str, m: Measured, draw: Painter<'_>| {
        let t0 = dom::now_ms();
        paint_measured(id, m, draw);
        dom::set_attr(id, "data-draw-ms", Some(&format!("{:.2}", dom::now_ms() - t0)));
    };
    timed("chart-sampling", s, &|a, l| sampling::draw(a, &v.sampling, l));
    timed("chart-by-n", n, &|a, l| by_n::draw(a, &v.by_n, l));
    timed("chart-tradeoff", t, &|a, l| tradeoff::draw(a, &v.tradeoff, l));
    timed("chart-total", e, &|a, l| total_error::draw(a, &v.total, l));
    fill_tables(Some(v), false);
    let s = &v.sampling;
    let cuts = s.cut_text.join(" and ");
    label(
        "chart-sampling",
        &format!(
            "Two sampling curves, if H0 is true and if the effect is θ1; {}; hatched false-alarm area α* = {}, dotted miss area β* = {}{}.",
            cuts,
            prob(s.alpha),
            prob(s.beta),
            s.observed.map_or(String::new(), |o| format!("; observed value {}", short(o)))
        ),
    );
    label(
        "chart-by-n",
        &format!(
            "α* and β* against the sample size, with the limits {} and {}{}.",
            prob(v.by_n.alpha_max),
            prob(v.by_n.beta_max),
            v.by_n.youden_n.map_or(String::new(), |n| format!("; conclusive from n = {}", short(n)))
        ),
    );
    label(
        "chart-tradeoff",
        &format!(
            "Power against false-alarm rate as the threshold slides; the chosen threshold gives α* = {} and power {}.",
            prob(v.tradeoff.youden.0),
            prob(v.tradeoff.youden.1)
        ),
    );
    label(
        "chart-total",
        &format!("Total error α + β against the threshold; smallest {} at {}.", prob(v.total.minimum.1), short(v.total.minimum.0)),
    );
    dom::set_text("cap-n", &v.tradeoff.n_text);
}

fn label(id: &str, text: &str) {
    dom::set_attr(id, "aria-label", Some(text));
}

/// Blank every chart (the design is incomplete), with a word saying why.
pub fn clear_all() {
    for id in CHARTS {
        paint(id, &|a, l| {
            a.fill(&WHITE)?;
            a.draw(&Text::new("Complete the design to see this chart.", (l.px(16.0), l.px(20.0)), l.text_in(14.0, charts::MUTED)))
        });
        label(id, "Empty: the design is incomplete.");
    }
    fill_tables(None, false);
    dom::set_text("cap-n", "—");
}

const TABLES: [&str; 4] = ["table-sampling", "table-by-n", "table-tradeoff", "table-total"];

/// Write each chart's numbers table, or empty it without views. A table
/// whose `<details>` is closed is only marked stale (its HTML is hundreds
/// of rows, rebuilt on every keystroke otherwise) and written when it is
/// opened: `opened` is true for that call, from the details' toggle event,
/// and then only stale tables are written.
pub fn fill_tables(v: Option<&Views>, opened: bool) {
    for id in TABLES {
        let Some(el) = dom::by_id(id) else { continue };
        let open = el.parent_element().is_some_and(|d| d.has_attribute("open"));
        if !open {
            let _ = el.set_attribute("data-stale", "true");
            continue;
        }
        if opened && el.get_attribute("data-stale").is_none() {
            continue;
        }
        let html = match v {
            None => String::new(),
            Some(v) => match id {
                "table-sampling" => table::sampling(&v.sampling),
                "table-by-n" => table::by_n(&v.by_n),
                "table-tradeoff" => table::tradeoff(&v.tradeoff),
                _ => table::total_error(&v.total),
            },
        };
        el.set_inner_html(&html);
        let _ = el.remove_attribute("data-stale");
    }
}
