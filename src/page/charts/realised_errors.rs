//! The simulation check's chart: the realised error rates of both rules,
//! the threshold of least total error and the conventional rule
//! (reject when p ≤ α_max), each with a bar of two Monte Carlo standard
//! errors, against the analyst's limits and the model's values at the
//! planned size, so that a reader sees at a glance whether each realised
//! rate is within its limit and near the model.
//!
//! Two panels, each on its own scale from 0: false alarms under H0
//! (realised α, indigo) above, misses under θ1 (realised β, green) below.
//! In each, one lane per rule: the realised rate as a mark on its error
//! bar (the threshold rule a disc, the conventional rule a triangle), the
//! model's value as an open diamond labelled with its name, the limit as
//! a dotted line labelled with its value, the rates it allows shaded sand.
//! Beside each lane: the rule's name and where its rate stands against
//! the limit, as the engine judges it (`simulate::Share::against`), never
//! a comparison made here. Colour is never the only cue: the panels have
//! titles, the rules have lanes, names and shapes, every mark a label.
//!
//! `numbers` and `shares` are the same figures as text tables: the rates
//! with their standard errors, model values, limits and standing, and
//! each outcome's share under H0 and under θ1 (the operating
//! characteristics of the neutral zone).

use super::table::Numbers;
use super::{ALLOWED, DrawResult, GRID, Glyph, H0, H1, INK, Look, MUTED, Mark, cartesian_with, draw_bar, draw_mark, legend, prob, short};
use crate::engine::shown::Num;
use crate::engine::simulate::{Share, Simulation, Standing};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// One rule's realised rate in one panel.
#[derive(Debug, Clone, PartialEq)]
pub struct RateRow {
    /// The rule in words.
    pub rule: String,
    pub mark: Mark,
    /// The realised rate and its Monte Carlo standard error; None before
    /// any data set is drawn (or when the engine's figure is not a number).
    pub realised: Option<(f64, f64)>,
    /// Where the realised rate stands against the limit, as the engine
    /// judges it; None before any data set is drawn.
    pub standing: Option<Standing>,
    /// The model's value at the planned size (it may not be a number:
    /// then it is not drawn) and its name.
    pub model: f64,
    pub model_name: &'static str,
}

/// One error rate: its panel title, its limit and a lane per rule.
#[derive(Debug, Clone, PartialEq)]
pub struct RatePanel {
    pub title: String,
    /// The rate in the table's words.
    pub rate: &'static str,
    pub limit: f64,
    /// The limit's name: α_max or β_max.
    pub limit_name: &'static str,
    pub rows: Vec<RateRow>,
}

/// One rule's outcome shares under one hypothesis.
#[derive(Debug, Clone, PartialEq)]
pub struct ShareRow {
    pub rule: String,
    /// "H0" or "θ1".
    pub under: &'static str,
    pub reject: Share,
    pub do_not_reject: Share,
    /// None for the conventional rule, which has no third outcome.
    pub inconclusive: Option<Share>,
}

/// The simulation check as the chart and its tables show it.
#[derive(Debug, Clone, PartialEq)]
pub struct RealisedErrorsView {
    /// False alarms (α) first, then misses (β).
    pub panels: Vec<RatePanel>,
    pub shares: Vec<ShareRow>,
    /// Data sets drawn per hypothesis so far, and planned.
    pub drawn: u64,
    pub replicates: u64,
}

/// The threshold rule's name, as the chart and the tables write it.
pub const THRESHOLD_RULE: &str = "threshold of least total error";

/// The conventional rule's name: "conventional, p ≤ 0.05".
pub fn conventional_rule(alpha_max: f64) -> String {
    format!("conventional, p ≤ {}", limit_text(alpha_max))
}

/// A limit as the analyst typed it ("0.05"); "—" if it is not a number.
fn limit_text(limit: f64) -> String {
    if limit.is_finite() { Num(limit).to_string() } else { "—".into() }
}

/// Build the view from the engine's result; every figure is the engine's.
pub fn prep(sim: &Simulation) -> RealisedErrorsView {
    let drawn = sim.replicates_done > 0;
    let conventional = conventional_rule(sim.alpha_max);
    let (t, c, a) = (&sim.threshold_rule, &sim.conventional_rule, &sim.analytic);
    let row = |rule: &str, mark: Mark, s: &Share, limit: f64, model: f64, model_name: &'static str| RateRow {
        rule: rule.to_string(),
        mark,
        realised: Some((s.share, s.se)).filter(|(p, se)| drawn && p.is_finite() && se.is_finite()),
        standing: drawn.then(|| s.against(limit)),
        model,
        model_name,
    };
    let panels = vec![
        RatePanel {
            title: "False alarms: data drawn under H0, realised α".into(),
            rate: "α, false alarms under H0",
            limit: sim.alpha_max,
            limit_name: "α_max",
            rows: vec![
                row(THRESHOLD_RULE, Mark::Disc, &t.alpha, sim.alpha_max, a.alpha, "α*"),
                row(&conventional, Mark::Triangle, &c.alpha, sim.alpha_max, a.conventional_alpha, "α of the test"),
            ],
        },
        RatePanel {
            title: "Misses: data drawn under θ1, realised β (inconclusive counts as a miss)".into(),
            rate: "β, misses under θ1",
            limit: sim.beta_max,
            limit_name: "β_max",
            rows: vec![
                row(THRESHOLD_RULE, Mark::Disc, &t.beta, sim.beta_max, a.beta, "β*"),
                row(&conventional, Mark::Triangle, &c.beta, sim.beta_max, a.conventional_beta(), "1 − power"),
            ],
        },
    ];
    let share = |rule: &str, under: &'static str, o: &crate::engine::simulate::Outcomes| ShareRow {
        rule: rule.to_string(),
        under,
        reject: o.reject,
        do_not_reject: o.do_not_reject,
        inconclusive: o.inconclusive,
    };
    let shares = vec![
        share(THRESHOLD_RULE, "H0", &t.under_h0),
        share(THRESHOLD_RULE, "θ1", &t.under_h1),
        share(&conventional, "H0", &c.under_h0),
        share(&conventional, "θ1", &c.under_h1),
    ];
    RealisedErrorsView { panels, shares, drawn: sim.replicates_done, replicates: sim.replicates }
}

impl RealisedErrorsView {
    /// The chart in one sentence, for its accessible name.
    pub fn caption(&self) -> String {
        let mut parts = Vec::new();
        for p in &self.panels {
            for r in &p.rows {
                let value = r.realised.map_or("not drawn yet".to_string(), |(x, _)| prob(x));
                parts.push(format!("{}, {}: {} ({})", r.rule, p.rate, value, standing_words(r.standing)));
            }
        }
        format!("Realised error rates of {} of {} data sets per hypothesis: {}.", self.drawn, self.replicates, parts.join("; "))
    }
}

/// Where a rate stands, in the chart's words.
fn standing_words(s: Option<Standing>) -> &'static str {
    match s {
        Some(Standing::Within) => "within your limit",
        Some(Standing::AtLimit) => "at your limit (within 2 SE)",
        Some(Standing::Above) => "above your limit",
        None => "no data sets drawn yet",
    }
}

/// The widest the column of rule names may be, in CSS pixels (at most
/// this share of the chart's width on a narrow screen).
const NAMES_WIDTH: f64 = 216.0;
const NAMES_SHARE: f64 = 0.4;

pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, v: &RealisedErrorsView, look: &Look) -> DrawResult<DB> {
    area.fill(&WHITE)?;
    let items = vec![
        (Glyph::Interval(INK, Mark::Disc), "threshold rule, realised (bar ± 2 SE)".to_string()),
        (Glyph::Interval(INK, Mark::Triangle), "conventional rule, realised (bar ± 2 SE)".to_string()),
        (Glyph::Mark(INK, Mark::Diamond), "model value at the planned n".to_string()),
        (Glyph::Band(ALLOWED), "allowed by your limit (dotted line)".to_string()),
    ];
    let plot = legend(area, &items, look)?;
    if v.panels.is_empty() {
        return Ok(());
    }
    let panels = plot.split_evenly((v.panels.len(), 1));
    for (i, (p, panel)) in v.panels.iter().zip(panels.iter()).enumerate() {
        let colour = if i == 0 { H0 } else { H1 };
        draw_panel(panel, p, colour, v.drawn == 0, look)?;
    }
    Ok(())
}

/// The largest value a panel shows: its limit, each error bar's end and
/// each model value, with room to spare, at most 1 (a rate).
fn panel_top(p: &RatePanel) -> f64 {
    let mut top: f64 = if p.limit.is_finite() { p.limit } else { 0.0 };
    for r in &p.rows {
        if let Some((s, se)) = r.realised {
            top = top.max(s + 2.0 * se);
        }
        if r.model.is_finite() {
            top = top.max(r.model);
        }
    }
    if top.is_finite() && top > 0.0 { (top * 1.15).min(1.0) } else { 1.0 }
}

fn draw_panel<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, p: &RatePanel, colour: RGBColor, empty: bool, look: &Look) -> DrawResult<DB> {
    let (title, body) = area.split_vertically(look.px(22.0));
    let heading = if empty { format!("{} (no data sets drawn yet)", p.title) } else { p.title.clone() };
    title.draw(&Text::new(heading, (look.px(8.0), look.px(12.0)), look.text_in(13.0, colour).pos(Pos::new(HPos::Left, VPos::Center))))?;
    let (width, _) = area.dim_in_pixel();
    let names = (look.px(NAMES_WIDTH) as f64).min(NAMES_SHARE * width as f64) as i32;
    let top = panel_top(p);
    let mut chart = cartesian_with(&body, look, (0.0, top), (0.0, 1.0), look.px(26.0), names)?;
    chart
        .configure_mesh()
        .disable_y_mesh()
        .bold_line_style(GRID.stroke_width(look.width(1.0)))
        .light_line_style(TRANSPARENT)
        .axis_style(MUTED.stroke_width(look.width(1.0)))
        .x_labels(6)
        .y_labels(0)
        .label_style(look.text(12.0))
        .x_label_formatter(&|x| short(*x))
        .draw()?;
    let limit_shown = p.limit.is_finite() && p.limit >= 0.0 && p.limit <= top;
    if limit_shown {
        chart.draw_series(std::iter::once(Rectangle::new([(0.0, 0.0), (p.limit, 1.0)], ALLOWED.mix(0.35).filled())))?;
        chart.draw_series(DashedLineSeries::new(vec![(p.limit, 0.0), (p.limit, 1.0)], look.px(2.0), look.px(4.0), colour.stroke_width(look.width(2.0))))?;
    }
    // Pixel geometry, relative to this panel's area.
    let base = area.get_base_pixel();
    let (xs, ys) = chart.plotting_area().get_pixel_range();
    let (left, right) = (xs.start - base.0, xs.end - base.0);
    let (plot_top, plot_bottom) = (ys.start - base.1, ys.end - base.1);
    let x_of = |x: f64| chart.backend_coord(&(x, 0.0)).0 - base.0;
    let font = look.text(12.0);
    // A label centred at x (kept inside the plot), its top or bottom edge
    // at y, on a light backing so that the limit's line does not cross it.
    let label = |text: String, x: i32, y: i32, edge: VPos| {
        let (w, h) = area.estimate_text_size(&text, &font).unwrap_or((0, 0));
        let (w, h) = (w as i32, h as i32);
        let x = if right - left <= w { left + w / 2 } else { x.clamp(left + w / 2, right - w / 2) };
        let y0 = if matches!(edge, VPos::Top) { y } else { y - h };
        // The backing covers the middle of the text: the SVG backend's
        // fixed estimate is about a third wider than the text the viewer
        // draws, the canvas's measure exact.
        let half = w * 36 / 100;
        area.draw(&Rectangle::new([(x - half, y0 + h / 8), (x + half, y0 + h)], WHITE.mix(0.85).filled()))?;
        area.draw(&Text::new(text, (x, y), font.pos(Pos::new(HPos::Center, edge))))
    };
    let strip = look.px(18.0);
    if limit_shown {
        let text = format!("your limit {} = {}", p.limit_name, limit_text(p.limit));
        let (w, _) = area.estimate_text_size(&text, &font).unwrap_or((0, 0));
        let x = x_of(p.limit);
        // Right of the line when it fits, else left of it.
        let (anchor, at) = if x + look.px(4.0) + w as i32 <= right { (HPos::Left, x + look.px(4.0)) } else { (HPos::Right, x - look.px(4.0)) };
        area.draw(&Text::new(text, (at, plot_top + strip / 2), font.pos(Pos::new(anchor, VPos::Center))))?;
    }
    let lanes = p.rows.len().max(1) as i32;
    let lane_h = (plot_bottom - plot_top - strip).max(lanes) / lanes;
    for (i, r) in p.rows.iter().enumerate() {
        let y = plot_top + strip + lane_h * i as i32 + lane_h / 2;
        // The rule's name and its standing, left of the plot.
        let name_x = look.px(8.0);
        area.draw(&Text::new(r.rule.clone(), (name_x, y - look.px(8.0)), font.pos(Pos::new(HPos::Left, VPos::Center))))?;
        area.draw(&Text::new(
            standing_words(r.standing),
            (name_x, y + look.px(8.0)),
            look.text_in(12.0, colour).pos(Pos::new(HPos::Left, VPos::Center)),
        ))?;
        // The model's value: an open diamond, labelled below.
        if r.model.is_finite() {
            let x = x_of(r.model.clamp(0.0, top));
            draw_mark(area, Mark::Diamond, (x, y), look.px(7.0), INK, look)?;
            label(format!("model {} = {}", r.model_name, prob(r.model)), x, y + look.px(10.0), VPos::Top)?;
        } else {
            label(format!("model {}: not available", r.model_name), left, y + look.px(10.0), VPos::Top)?;
        }
        // The realised rate on its bar of ± 2 standard errors (within
        // 0 and 1), labelled above.
        if let Some((s, se)) = r.realised {
            let (x0, x1) = (x_of((s - 2.0 * se).max(0.0)), x_of((s + 2.0 * se).min(1.0)));
            draw_bar(area, (x0, x1, y), look.px(5.0), colour, look)?;
            let x = x_of(s);
            draw_mark(area, r.mark, (x, y), look.px(5.0), colour, look)?;
            label(format!("realised {} (SE {})", prob(s), prob(se)), x, y - look.px(9.0), VPos::Bottom)?;
        }
    }
    Ok(())
}

/// A share with its standard error, "0.0815 ± 0.00612"; "—" before any
/// data set is drawn.
fn share_text(s: &Share, drawn: bool) -> String {
    if drawn { format!("{} ± {}", prob(s.share), prob(s.se)) } else { "—".into() }
}

/// The realised rates as a text table: rule, rate, realised, ± SE, the
/// model's value, the limit and where the rate stands against it.
pub fn numbers(v: &RealisedErrorsView) -> Numbers {
    let mut rows = Vec::new();
    for p in &v.panels {
        for r in &p.rows {
            let (realised, se) = r.realised.map_or(("—".to_string(), "—".to_string()), |(s, se)| (prob(s), prob(se)));
            let against = match r.standing {
                Some(Standing::Within) => "within",
                Some(Standing::AtLimit) => "at the limit, within 2 SE",
                Some(Standing::Above) => "above",
                None => "—",
            };
            rows.push(vec![
                r.rule.clone(),
                p.rate.to_string(),
                realised,
                se,
                format!("{} = {}", r.model_name, prob(r.model)),
                format!("{} = {}", p.limit_name, limit_text(p.limit)),
                against.to_string(),
            ]);
        }
    }
    let caption = format!(
        "Realised error rates from {} data sets per hypothesis{} (SE: Monte Carlo standard error; a rate is above or within its limit only when more than 2 SE from it)",
        v.drawn,
        if v.drawn < v.replicates { format!(" of {}", v.replicates) } else { String::new() }
    );
    Numbers {
        caption,
        head: ["rule", "rate", "realised", "± SE", "analytic", "limit", "against the limit"].map(String::from).to_vec(),
        rows,
    }
}

/// Each outcome's share under H0 and under θ1 for both rules, each with
/// its Monte Carlo standard error.
pub fn shares(v: &RealisedErrorsView) -> Numbers {
    let drawn = v.drawn > 0;
    let rows = v
        .shares
        .iter()
        .map(|s| {
            vec![
                s.rule.clone(),
                s.under.to_string(),
                share_text(&s.reject, drawn),
                share_text(&s.do_not_reject, drawn),
                s.inconclusive.map_or("none (no third outcome)".into(), |i| share_text(&i, drawn)),
            ]
        })
        .collect();
    Numbers {
        caption: "Share of each outcome among the data sets drawn under each hypothesis (± Monte Carlo standard error)".into(),
        head: ["rule", "data drawn under", "reject H0", "do not reject H0", "inconclusive"].map(String::from).to_vec(),
        rows,
    }
}
