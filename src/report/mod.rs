//! The report a reviewer reads: one document built from a request and its
//! answer, written as self-contained HTML (which also prints, to PDF among
//! others), as CommonMark or as JSON. The page and `tern report` call the
//! same builder with the same request, so their documents differ only in
//! the date line.
//!
//! Architecture invariant: no DOM and no I/O; every figure comes from the
//! engine's answer (no statistic is computed here, only formatted), the
//! charts come from `page::charts` on the SVG backend, and a report holds
//! summaries only: never data rows, never a data file's name.

pub mod apa;
pub mod build;
pub mod html;
pub mod json;
pub mod markdown;

use apa::Inline;

pub use build::{DataPart, Prepared, ReportError, Stamp, build, data_part_from_file, prepare, prepare_found, simulation_of};

/// A report: a title, the date line, then sections in reading order.
#[derive(Debug, Clone, PartialEq)]
pub struct Report {
    pub title: String,
    /// "Prepared with Tern 0.1.0 (build …) on 2026-12-03."
    pub stamp: Stamp,
    /// The caution every report carries, shown first.
    pub caution: String,
    pub sections: Vec<Section>,
}

/// One section: an anchor id, a heading and its blocks.
#[derive(Debug, Clone, PartialEq)]
pub struct Section {
    pub id: &'static str,
    pub title: String,
    pub blocks: Vec<Block>,
}

/// The pieces a section is made of.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    Paragraph(Vec<Inline>),
    /// A list of (what, value) facts, shown as a two-column table.
    Facts(Vec<(String, Vec<Inline>)>),
    /// A table of figures.
    Table(Table),
    /// A bulleted list of sentences.
    List(Vec<String>),
    /// A chart: its title, the SVG document, and its numbers.
    Figure { id: &'static str, title: String, svg: String, numbers: Table },
    /// Verbatim text (the design as JSON, the command).
    Code { language: &'static str, text: String },
}

/// A table with a caption and column heads; the first cell of a row heads it.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    pub caption: String,
    pub head: Vec<String>,
    pub rows: Vec<Vec<String>>,
}
