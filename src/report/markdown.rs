//! The report as CommonMark with the common table extension: headings,
//! paragraphs, pipe tables, each chart as an SVG data-URI image followed by
//! its numbers, and fenced code for the design and the command.

use super::apa::Inline;
use super::{Block, Report, Table};
use base64::Engine;

/// Escape the characters CommonMark would read as markup in running text.
fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        if matches!(c, '\\' | '`' | '*' | '_' | '[' | ']' | '<' | '>' | '#' | '|' | '!' | '&') {
            out.push('\\');
        }
        if c == '\n' {
            out.push(' ');
        } else {
            out.push(c);
        }
    }
    out
}

fn inlines(runs: &[Inline]) -> String {
    runs.iter()
        .map(|r| match r {
            Inline::Text(s) => escape(s),
            Inline::Symbol(s) => format!("*{}*", escape(s)),
        })
        .collect()
}

fn row(cells: &[String]) -> String {
    format!("| {} |\n", cells.join(" | "))
}

fn table(t: &Table) -> String {
    let mut m = String::new();
    if !t.caption.is_empty() {
        m.push_str(&format!("{}\n\n", escape(&t.caption)));
    }
    m.push_str(&row(&t.head.iter().map(|h| escape(h)).collect::<Vec<_>>()));
    m.push_str(&row(&t.head.iter().map(|_| "---".to_string()).collect::<Vec<_>>()));
    for r in &t.rows {
        m.push_str(&row(&r.iter().map(|c| escape(c)).collect::<Vec<_>>()));
    }
    m
}

/// The longest run of backticks in `s`, so that a code fence is longer.
fn fence_for(s: &str) -> String {
    let mut longest = 0;
    let mut run = 0;
    for c in s.chars() {
        run = if c == '`' { run + 1 } else { 0 };
        longest = longest.max(run);
    }
    "`".repeat((longest + 1).max(3))
}

/// The whole Markdown document.
pub fn markdown(r: &Report) -> String {
    let mut m = format!("# {}\n\n{}\n\n", escape(&r.title), escape(&r.stamp.line()));
    m.push_str(&format!("> **{}**\n\n", escape(&r.caution)));
    for s in &r.sections {
        m.push_str(&format!("## {}\n\n", escape(&s.title)));
        for b in &s.blocks {
            match b {
                Block::Paragraph(runs) => m.push_str(&format!("{}\n\n", inlines(runs))),
                Block::Facts(facts) => {
                    m.push_str(&row(&["what".into(), "value".into()]));
                    m.push_str(&row(&["---".into(), "---".into()]));
                    for (k, v) in facts {
                        m.push_str(&row(&[escape(k), inlines(v)]));
                    }
                    m.push('\n');
                }
                Block::Table(t) => {
                    m.push_str(&table(t));
                    m.push('\n');
                }
                Block::List(items) => {
                    for i in items {
                        m.push_str(&format!("- {}\n", escape(i)));
                    }
                    m.push('\n');
                }
                Block::Figure { title, svg, numbers, .. } => {
                    let data = base64::engine::general_purpose::STANDARD.encode(svg.as_bytes());
                    m.push_str(&format!("### {}\n\n![{}](data:image/svg+xml;base64,{data})\n\n", escape(title), escape(title)));
                    m.push_str(&table(numbers));
                    m.push('\n');
                }
                Block::Code { language, text } => {
                    let fence = fence_for(text);
                    m.push_str(&format!("{fence}{language}\n{text}\n{fence}\n\n"));
                }
            }
        }
    }
    m
}
