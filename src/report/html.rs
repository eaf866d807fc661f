//! The report as one self-contained HTML file: no script, no file or font
//! from anywhere else (its own content policy forbids them), the charts as
//! inline SVG, and a print style sheet so that the browser's "print" makes
//! the PDF: A4 or US Letter margins, no chart or table split across pages,
//! black text on white.

use super::apa::Inline;
use super::{Block, Report, Table};
use crate::page::html::escape;

/// The style: screen and print, every rule under `.tern-report` so that
/// the page can show the same report beside its own content (it adopts
/// this sheet through the CSS object model: its policy allows no inline
/// style). Charts scale to the text width; in print each section keeps its
/// heading with the text that follows and no figure or table is cut by a
/// page break.
///
/// Print layout (the demo fits in 4 pages on A4 and on US Letter,
/// `tests/browser/report.mjs`): 9 pt text with tight spacing; each chart
/// takes 68% of the text width with its numbers table beside it in 7 pt
/// (held to the rest of the width: it wraps between words, never inside a
/// number, and never overflows), so that a chart and its numbers are read
/// together and three charts fit a page; the charts flow on from the
/// decision with no forced break (a break before them would cost a page),
/// and the reproducibility block, whose JSON should not be split from its
/// heading, starts a page of its own. The simulation check's chart is the
/// exception: its table of seven columns goes below it at full width.
pub const STYLE: &str = "\
body.report-page { margin: 0; background: #fff; }
.tern-report { font: 11pt/1.45 system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif; color: #111; background: #fff; max-width: 48rem; margin: 2rem auto; padding: 0 1rem; }
.tern-report h1, .tern-report h2, .tern-report h3 { font-family: inherit; color: #111; }
.tern-report h1 { font-size: 1.6rem; margin-bottom: .2rem; }
.tern-report h2 { font-size: 1.2rem; margin-top: 2rem; border-bottom: 1px solid #999; padding-bottom: .2rem; }
.tern-report .report-stamp { color: #333; margin-top: 0; }
.tern-report .report-caution { border: 2px solid #111; padding: .6rem .8rem; font-weight: 600; color: #111; background: #fff; }
.tern-report table { border-collapse: collapse; margin: .6rem 0; font-size: .92em; }
.tern-report caption { text-align: left; font-weight: 600; padding-bottom: .2rem; }
.tern-report th, .tern-report td { color: #111; border: 1px solid #888; padding: .2rem .45rem; text-align: left; vertical-align: top; }
.tern-report table.report-facts th { font-weight: normal; background: #f2f2f2; }
.tern-report figure { margin: 1rem 0; break-inside: avoid; page-break-inside: avoid; }
.tern-report figure svg { width: 100%; height: auto; border: 1px solid #ccc; }
.tern-report figcaption { font-weight: 600; margin-bottom: .3rem; }
.tern-report pre { background: #f4f4f4; border: 1px solid #ccc; padding: .5rem; overflow-x: auto; white-space: pre-wrap; word-break: break-word; font-size: .85em; }
@page { margin: 14mm 14mm; }
@media print {
  .tern-report { max-width: none; margin: 0; padding: 0; font-size: 9pt; line-height: 1.35; }
  .tern-report h1 { font-size: 15pt; margin: 0 0 1mm; }
  .tern-report h2 { font-size: 11.5pt; margin: 4mm 0 1.5mm; break-after: avoid; page-break-after: avoid; }
  .tern-report p { margin: 1.5mm 0; }
  .tern-report .report-caution { padding: 1.5mm 2.5mm; }
  .tern-report table { margin: 1.5mm 0; }
  .tern-report th, .tern-report td { padding: .3mm 1.5mm; }
  .tern-report table, .tern-report pre, .tern-report .report-caution, .tern-report li { break-inside: avoid; page-break-inside: avoid; }
  .tern-report figure { display: grid; grid-template-columns: 68% minmax(0, 1fr); column-gap: 3mm; align-items: start; margin: 3mm 0; }
  .tern-report figcaption { grid-column: 1 / -1; margin-bottom: 1mm; }
  .tern-report figure svg { border: none; }
  .tern-report figure table { margin: 0; width: 100%; font-size: 7pt; line-height: 1.2; }
  .tern-report figure#report-chart-simulation { display: block; }
  .tern-report figure#report-chart-simulation svg { width: 80%; }
  .tern-report figure#report-chart-simulation table { margin-top: 1.5mm; }
  .tern-report section#report-reproduce { break-before: page; page-break-before: always; }
  .tern-report pre { font-size: 8pt; padding: 1.5mm; }
  .tern-report a { color: inherit; text-decoration: none; }
}
";


fn inlines(runs: &[Inline]) -> String {
    runs.iter()
        .map(|r| match r {
            Inline::Text(s) => escape(s),
            Inline::Symbol(s) => format!("<i>{}</i>", escape(s)),
        })
        .collect()
}

fn table(t: &Table, class: &str) -> String {
    let mut h = format!("<table{class}>");
    if !t.caption.is_empty() {
        h.push_str(&format!("<caption>{}</caption>", escape(&t.caption)));
    }
    h.push_str("<thead><tr>");
    for c in &t.head {
        h.push_str(&format!("<th scope=\"col\">{}</th>", escape(c)));
    }
    h.push_str("</tr></thead><tbody>");
    for row in &t.rows {
        h.push_str("<tr>");
        for (i, c) in row.iter().enumerate() {
            let tag = if i == 0 { "th scope=\"row\"" } else { "td" };
            let end = if i == 0 { "th" } else { "td" };
            h.push_str(&format!("<{tag}>{}</{end}>", escape(c)));
        }
        h.push_str("</tr>");
    }
    h.push_str("</tbody></table>");
    h
}

/// An SVG document made fit to sit inside HTML: without its XML
/// declaration, scaled by a viewBox, labelled for screen readers.
fn inline_svg(svg: &str, title: &str) -> String {
    let body = match svg.find("<svg") {
        Some(i) => &svg[i..],
        None => svg,
    };
    let attr = |name: &str| -> Option<String> {
        let head = &body[..body.find('>').unwrap_or(0)];
        let k = head.find(&format!(" {name}=\""))? + name.len() + 3;
        Some(head[k..].split('"').next()?.to_string())
    };
    let mut extra = format!(" role=\"img\" aria-label=\"{}\"", escape(title));
    if !body[..body.find('>').unwrap_or(0)].contains("viewBox")
        && let (Some(w), Some(h)) = (attr("width"), attr("height"))
    {
        extra.push_str(&format!(" viewBox=\"0 0 {w} {h}\""));
    }
    body.replacen("<svg", &format!("<svg{extra}"), 1)
}

/// The report itself, as an `<article class="tern-report">` (the page
/// shows it as it is; [`html`] wraps it into a document). Ids start with
/// `report-` so they never meet the page's own.
pub fn content(r: &Report) -> String {
    let mut h = String::from("<article class=\"tern-report\" aria-labelledby=\"report-title\">\n");
    h.push_str(&format!("<h1 id=\"report-title\">{}</h1>\n<p class=\"report-stamp\">{}</p>\n", escape(&r.title), escape(&r.stamp.line())));
    h.push_str(&format!("<p class=\"report-caution\" role=\"note\">{}</p>\n", escape(&r.caution)));
    for s in &r.sections {
        h.push_str(&format!("<section id=\"report-{}\">\n<h2>{}</h2>\n", s.id, escape(&s.title)));
        for b in &s.blocks {
            match b {
                Block::Paragraph(runs) => h.push_str(&format!("<p>{}</p>\n", inlines(runs))),
                Block::Facts(facts) => {
                    h.push_str("<table class=\"report-facts\"><tbody>");
                    for (k, v) in facts {
                        h.push_str(&format!("<tr><th scope=\"row\">{}</th><td>{}</td></tr>", escape(k), inlines(v)));
                    }
                    h.push_str("</tbody></table>\n");
                }
                Block::Table(t) => {
                    h.push_str(&table(t, ""));
                    h.push('\n');
                }
                Block::List(items) => {
                    h.push_str("<ul>");
                    for i in items {
                        h.push_str(&format!("<li>{}</li>", escape(i)));
                    }
                    h.push_str("</ul>\n");
                }
                Block::Figure { id, title, svg, numbers } => {
                    h.push_str(&format!(
                        "<figure id=\"report-chart-{id}\">\n<figcaption>{}</figcaption>\n{}\n{}\n</figure>\n",
                        escape(title),
                        inline_svg(svg, title),
                        table(numbers, "")
                    ));
                }
                Block::Code { language, text } => h.push_str(&format!("<pre><code class=\"language-{language}\">{}</code></pre>\n", escape(text))),
            }
        }
        h.push_str("</section>\n");
    }
    h.push_str("</article>\n");
    h
}

/// The whole HTML document: the report in a `<main>`, with its style and
/// its own content policy (no script, nothing from elsewhere).
pub fn html(r: &Report) -> String {
    let mut h = String::from("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    h.push_str("<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'; img-src data:\">\n");
    h.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
    h.push_str(&format!("<title>{}</title>\n<style>\n{STYLE}</style>\n</head>\n<body class=\"report-page\">\n<main>\n", escape(&r.title)));
    h.push_str(&content(r));
    h.push_str("</main>\n</body>\n</html>\n");
    h
}
