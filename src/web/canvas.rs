//! Canvas plumbing: size each canvas for its CSS box and the screen's
//! devicePixelRatio (crisp on high-DPI screens), draw a chart on it with
//! plotters-canvas (through `PageCanvas`), and put the same numbers in the
//! chart's table; and each chart's "Save as SVG" and "Save as PNG".

use crate::page::charts::prep::{DataViews, Views};
use crate::page::charts::{self, DrawResult, Look, by_n, histogram, prob, quantile, sampling, short, svg, table, total_error, tradeoff};
use super::dom;
use plotters::coord::Shift;
use plotters::prelude::*;
use super::page_canvas::PageCanvas;
use base64::Engine;
use std::cell::RefCell;
use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;

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
    for (id, m) in CHARTS.into_iter().zip([s, n, t, e]) {
        if let Some(draw) = design_painter(v, id) {
            timed(id, m, &draw);
        }
    }
    keep(|k| k.design = Some(v.clone()));
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
    clear_all_saying("Complete the design to see this chart.", "Empty: the design is incomplete.");
}

/// Blank every chart with `text` on it and `label` as its name.
pub fn clear_all_saying(text: &str, name: &str) {
    for id in CHARTS {
        paint(id, &|a, l| {
            a.fill(&WHITE)?;
            a.draw(&Text::new(text, (l.px(16.0), l.px(20.0)), l.text_in(14.0, charts::MUTED)))
        });
        label(id, name);
    }
    fill_tables(None, false);
    dom::set_text("cap-n", "—");
    keep(|k| k.design = None);
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

/// A chart of "See why" on the canvas backend, by its canvas id.
fn design_painter<'a>(v: &'a Views, id: &str) -> Option<impl Fn(&DrawingArea<PageCanvas, Shift>, &Look) -> DrawResult<PageCanvas> + 'a> {
    let which = CHARTS.iter().position(|&c| c == id)?;
    Some(move |a: &DrawingArea<PageCanvas, Shift>, l: &Look| match which {
        0 => sampling::draw(a, &v.sampling, l),
        1 => by_n::draw(a, &v.by_n, l),
        2 => tradeoff::draw(a, &v.tradeoff, l),
        _ => total_error::draw(a, &v.total, l),
    })
}

/// A data file's chart on the canvas backend, by its canvas id.
fn data_painter<'a>(v: &'a DataViews, id: &str) -> Option<impl Fn(&DrawingArea<PageCanvas, Shift>, &Look) -> DrawResult<PageCanvas> + 'a> {
    let histogram = match id {
        "chart-histogram" => true,
        "chart-quantile" => false,
        _ => return None,
    };
    Some(move |a: &DrawingArea<PageCanvas, Shift>, l: &Look| {
        if histogram { histogram::draw(a, &v.histogram, l) } else { quantile::draw(a, &v.quantile, l) }
    })
}

/// Draw the data file's two charts (the views are kept for their save buttons).
pub fn draw_data(v: &DataViews) {
    for id in ["chart-histogram", "chart-quantile"] {
        if let Some(draw) = data_painter(v, id) {
            paint(id, &draw);
        }
    }
    keep(|k| k.data = Some(v.clone()));
}

/// Forget the data file's views (its charts are hidden).
pub fn forget_data() {
    keep(|k| k.data = None);
}

// ---- Save as SVG and Save as PNG -------------------------------------
//
// Each chart's <figure> in index.html has two buttons,
// `<button data-save="svg|png" data-chart="NAME">`, NAME one of
// `svg::DESIGN_CHARTS` or `svg::DATA_CHARTS`, each with its click listener,
// which saves from the views last drawn:
// - SVG: `svg::design_chart` / `svg::data_chart`, the same document as the
//   report's (FixedMetrics, the report's size), saved as
//   `tern-chart-NAME.svg`;
// - PNG: the chart drawn again by the same canvas functions on a canvas
//   that is not in the page, at twice the displayed chart's CSS size with
//   `Look::new(2.0)`: a fixed 2× rather than 2 × devicePixelRatio, so that
//   the file is the same on every screen (on a 2× screen it is exactly the
//   pixels shown), encoded at once (`toDataURL`) and saved as `tern-chart-NAME.png`.
// Both go through a Blob URL revoked after the click (`dom::download_blob`).

/// The views last drawn, for the save buttons; and whether the buttons'
/// listener is installed.
#[derive(Default)]
struct Kept {
    design: Option<Views>,
    data: Option<DataViews>,
    listening: bool,
    /// Whether the design's and the data's buttons are enabled now.
    shown: Option<(bool, bool)>,
}

thread_local! {
    static KEPT: RefCell<Kept> = RefCell::new(Kept::default());
}

/// Change what is kept, installing the buttons' listener the first time.
fn keep(change: impl FnOnce(&mut Kept)) {
    let install = KEPT.with(|k| {
        let mut k = k.borrow_mut();
        change(&mut k);
        !std::mem::replace(&mut k.listening, true)
    });
    if install {
        listen_for_saves();
    }
    // The buttons are enabled or disabled only when that changes: a redraw
    // on every keystroke must not write twelve attributes each time.
    let Some((design, data)) = KEPT.with(|k| {
        let mut k = k.borrow_mut();
        let now = (k.design.is_some(), k.data.is_some());
        (k.shown != Some(now)).then(|| {
            k.shown = Some(now);
            now
        })
    }) else {
        return;
    };
    for (names, on) in [(&svg::DESIGN_CHARTS[..], design), (&svg::DATA_CHARTS[..], data)] {
        for name in names {
            for kind in ["svg", "png"] {
                dom::set_attr(&format!("save-{kind}-{name}"), "disabled", (!on).then_some(""));
            }
        }
    }
}

/// One click listener per save button. (Not one on the document: the
/// download's own link click would bubble up to it while it runs.)
fn listen_for_saves() {
    let Some(buttons) = dom::document().and_then(|d| d.query_selector_all("button[data-save]").ok()) else { return };
    for i in 0..buttons.length() {
        let Some(button) = buttons.item(i).and_then(|n| n.dyn_into::<web_sys::Element>().ok()) else { continue };
        let (Some(kind), Some(name)) = (button.get_attribute("data-save"), button.get_attribute("data-chart")) else { continue };
        let cb = Closure::<dyn FnMut()>::new(move || {
            let saved = if kind == "png" { save_png(&name) } else { save_svg(&name) };
            if let Err(e) = saved {
                web_sys::console::warn_1(&format!("the chart {name} could not be saved as {kind}: {e:?}").into());
            }
        });
        if button.add_event_listener_with_callback("click", cb.as_ref().unchecked_ref()).is_ok() {
            // The listeners live as long as the page.
            cb.forget();
        }
    }
}

fn save_svg(name: &str) -> Result<(), JsValue> {
    let text = KEPT.with(|k| {
        let k = k.borrow();
        k.design.as_ref().and_then(|v| svg::design_chart(v, name)).or_else(|| k.data.as_ref().and_then(|v| svg::data_chart(v, name)))
    });
    let text = text.ok_or("nothing drawn in this chart")?.map_err(|e| e.to_string())?;
    let options = web_sys::BlobPropertyBag::new();
    options.set_type("image/svg+xml");
    let blob = web_sys::Blob::new_with_str_sequence_and_options(&js_sys::Array::of1(&JsValue::from_str(&text)), &options)?;
    dom::download_blob(&format!("tern-chart-{name}.svg"), &blob)
}

fn save_png(name: &str) -> Result<(), JsValue> {
    let id = format!("chart-{name}");
    let shown = dom::canvas(&id).ok_or("no such chart")?;
    let (css_w, css_h) = (shown.client_width(), shown.client_height());
    if css_w < 10 || css_h < 10 {
        return Err("the chart is not shown".into());
    }
    let offscreen: web_sys::HtmlCanvasElement = dom::document().ok_or("no document")?.create_element("canvas")?.dyn_into()?;
    offscreen.set_width(2 * css_w as u32);
    offscreen.set_height(2 * css_h as u32);
    let look = Look::new(2.0);
    let backend = PageCanvas::new(offscreen.clone()).ok_or("no 2D context")?;
    let root = backend.into_drawing_area();
    let drawn = KEPT.with(|k| {
        let k = k.borrow();
        if let Some(draw) = k.design.as_ref().and_then(|v| design_painter(v, &id)) {
            Some(draw(&root, &look))
        } else {
            k.data.as_ref().and_then(|v| data_painter(v, &id)).map(|draw| draw(&root, &look))
        }
    });
    drawn.ok_or("nothing drawn in this chart")?.and_then(|_| root.present()).map_err(|e| e.to_string())?;
    // Encoded at once (a data URL, decoded here) rather than through the
    // asynchronous toBlob, so the download starts within the click: a
    // download from a later callback can be held back by the browser.
    let url = offscreen.to_data_url_with_type("image/png")?;
    let encoded = url.split_once(',').map(|(_, d)| d).ok_or("the browser made no PNG")?;
    let bytes = base64::engine::general_purpose::STANDARD.decode(encoded).map_err(|e| JsValue::from_str(&e.to_string()))?;
    let options = web_sys::BlobPropertyBag::new();
    options.set_type("image/png");
    let parts = js_sys::Array::of1(&js_sys::Uint8Array::from(&bytes[..]));
    let blob = web_sys::Blob::new_with_u8_array_sequence_and_options(&parts, &options)?;
    dom::download_blob(&format!("tern-chart-{name}.png"), &blob)
}
