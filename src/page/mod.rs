//! The page model: compiles natively, no web-sys.
//!
//! Everything the page shows that does not need a browser lives here: the
//! charts, as drawing code generic over a plotters backend, and the plain
//! views they draw. The web layer (`web`, wasm32 only) draws them on canvas;
//! a native build draws the same functions to SVG, and `cargo test` reaches
//! all of it.
//!
//! Architecture invariant: no DOM, no web-sys, no wasm-bindgen here; inputs
//! are the engine's answers and plain numbers.

pub mod charts;
