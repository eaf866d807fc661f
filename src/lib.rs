//! Tern: plan and decide hypothesis tests with both error rates under control.
//!
//! The crate has two worlds. [`engine`] is pure Rust: numbers and strings in,
//! plain data out, no I/O and no web types, so `cargo test` exercises all of it
//! natively. The page is split in two: [`page`], the page model (the charts
//! and what they draw), compiles natively with no web type, and the web layer
//! (compiled only for `wasm32`) is a thin shell of DOM, events and canvas
//! over both.

pub mod engine;

/// The page model: form reading, messages and the charts, natively
/// compiled and tested, no web types.
pub mod page;

/// The report a reviewer reads (HTML, Markdown, JSON), built from a request
/// and its answer with the page model's charts; natively and in the page.
pub mod report;

/// The page: DOM, events and canvas charts over the engine. Compiled only
/// for WebAssembly, so a native build never sees a web type.
#[cfg(target_arch = "wasm32")]
pub mod web;
