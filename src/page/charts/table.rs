//! The numbers behind each chart as a small HTML table, for screen readers
//! and for anyone who wants the figures rather than the picture.

use super::prep::{ByNView, SamplingView, TotalErrorView, TradeoffView, Views};
use super::{prob, short};

/// A chart's numbers: a caption, the column heads and the rows (the first
/// cell of each row heads it). The page shows it as HTML; a report writes
/// it in its own format.
#[derive(Debug, Clone, PartialEq)]
pub struct Numbers {
    pub caption: String,
    pub head: Vec<String>,
    pub rows: Vec<Vec<String>>,
}

impl Numbers {
    fn new(caption: &str, head: &[&str], rows: Vec<Vec<String>>) -> Numbers {
        Numbers { caption: caption.to_string(), head: head.iter().map(|h| h.to_string()).collect(), rows }
    }

    /// The table as HTML, cells escaped.
    pub fn html(&self) -> String {
        let head: Vec<&str> = self.head.iter().map(String::as_str).collect();
        table(&self.caption, &head, &self.rows)
    }
}

/// The numbers of the four design charts, named as [`super::svg::design_charts`] names them.
pub fn design_numbers(v: &Views) -> Vec<(&'static str, Numbers)> {
    vec![
        ("sampling", sampling_numbers(&v.sampling)),
        ("by-n", by_n_numbers(&v.by_n)),
        ("tradeoff", tradeoff_numbers(&v.tradeoff)),
        ("total", total_error_numbers(&v.total)),
    ]
}

use crate::page::html::escape as esc;

fn table(caption: &str, head: &[&str], rows: &[Vec<String>]) -> String {
    let mut h = format!("<table><caption>{}</caption><thead><tr>", esc(caption));
    for c in head {
        h.push_str(&format!("<th scope=\"col\">{}</th>", esc(c)));
    }
    h.push_str("</tr></thead><tbody>");
    for r in rows {
        h.push_str("<tr>");
        for (i, c) in r.iter().enumerate() {
            if i == 0 {
                h.push_str(&format!("<th scope=\"row\">{}</th>", esc(c)));
            } else {
                h.push_str(&format!("<td>{}</td>", esc(c)));
            }
        }
        h.push_str("</tr>");
    }
    h.push_str("</tbody></table>");
    h
}

/// About `k` indices spread evenly over `0..len`, always with the ends.
fn spread(len: usize, k: usize) -> Vec<usize> {
    if len == 0 {
        return Vec::new();
    }
    if len <= k {
        return (0..len).collect();
    }
    let mut v: Vec<usize> = (0..k).map(|i| i * (len - 1) / (k - 1)).collect();
    v.dedup();
    v
}

fn u(x: f64, unit: &str) -> String {
    if unit.is_empty() { short(x) } else { format!("{} {unit}", short(x)) }
}

pub fn sampling(v: &SamplingView) -> String {
    sampling_numbers(v).html()
}

pub fn sampling_numbers(v: &SamplingView) -> Numbers {
    let mut rows = vec![
        vec!["peak of the curve if H0 is true".into(), u(v.h0_centre, &v.unit)],
        vec!["peak of the curve if the effect is θ1".into(), u(v.h1_centre, &v.unit)],
    ];
    for (i, c) in v.cuts.iter().enumerate() {
        let text = if v.discrete { v.cut_text.get(i).cloned().unwrap_or_default() } else { u(*c, &v.unit) };
        rows.push(vec!["threshold".into(), text]);
    }
    rows.push(vec!["α*, area under the H0 curve where H0 is rejected".into(), prob(v.alpha)]);
    rows.push(vec!["β*, area under the θ1 curve where H0 is kept".into(), prob(v.beta)]);
    if let Some(o) = v.observed {
        rows.push(vec!["observed".into(), u(o, &v.unit)]);
    }
    Numbers::new("The two sampling curves", &["quantity", "value"], rows)
}

pub fn by_n(v: &ByNView) -> String {
    by_n_numbers(v).html()
}

pub fn by_n_numbers(v: &ByNView) -> Numbers {
    let mut idx = spread(v.points.len(), 10);
    for target in [v.youden_n, Some(v.shown_n)].into_iter().flatten() {
        if let Some(i) = v.points.iter().position(|p| (p.n - target).abs() < 0.5) {
            idx.push(i);
        }
    }
    idx.sort_unstable();
    idx.dedup();
    let rows: Vec<Vec<String>> = idx
        .into_iter()
        .map(|i| {
            let p = v.points[i];
            vec![short(p.n), prob(p.alpha), prob(p.beta), if p.conclusive { "yes".into() } else { "no".into() }]
        })
        .collect();
    let cap = format!("α* and β* against n (limits: α {}, β {})", prob(v.alpha_max), prob(v.beta_max));
    Numbers::new(&cap, &["n", "α*", "β*", "conclusive"], rows)
}

pub fn tradeoff(v: &TradeoffView) -> String {
    tradeoff_numbers(v).html()
}

pub fn tradeoff_numbers(v: &TradeoffView) -> Numbers {
    let inner: Vec<(f64, f64)> = v.points.iter().copied().filter(|p| p.0 > 0.0 && p.0 < 1.0).collect();
    let mut rows: Vec<Vec<String>> =
        spread(inner.len(), 9).into_iter().map(|i| vec![prob(inner[i].0), prob(inner[i].1), String::new()]).collect();
    rows.push(vec![prob(v.youden.0), prob(v.youden.1), "the chosen threshold (largest J)".into()]);
    rows.sort_by(|a, b| a[0].parse::<f64>().unwrap_or(0.0).total_cmp(&b[0].parse::<f64>().unwrap_or(0.0)));
    let cap = format!("Power against α at {}; limits allow α ≤ {} and power ≥ {}", v.n_text, prob(v.alpha_max), prob(1.0 - v.beta_max));
    Numbers::new(&cap, &["α", "power", "note"], rows)
}

pub fn total_error(v: &TotalErrorView) -> String {
    total_error_numbers(v).html()
}

pub fn total_error_numbers(v: &TotalErrorView) -> Numbers {
    let mut rows: Vec<Vec<String>> = spread(v.points.len(), 9)
        .into_iter()
        .map(|i| {
            let p = v.points[i];
            vec![u(p.0, &v.unit), prob(p.1), prob(p.2), prob(p.1 + p.2)]
        })
        .collect();
    rows.push(vec![format!("{} (minimum)", u(v.minimum.0, &v.unit)), String::new(), String::new(), prob(v.minimum.1)]);
    Numbers::new("Total error against the threshold", &["threshold", "α", "β", "α + β"], rows)
}
