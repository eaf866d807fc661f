//! The page model: everything the page decides and draws that does not need
//! a browser, compiled natively as well as for WebAssembly, so that `cargo
//! test` reaches it: the form (reading typed text into the engine's typed
//! request, placing messages) and the charts, as drawing code generic over a
//! plotters backend with the plain views they draw. `src/web` is the shell
//! around it: events, DOM text, canvas; a native build draws the same charts
//! to SVG.
//!
//! Architecture invariant: no DOM, no web-sys, no wasm-bindgen here; the
//! model calls the engine with typed values (`engine::request::Ask`), once
//! per change of the form, and JSON stays at the edges (command line,
//! files, links).

pub mod charts;
pub mod form;
pub mod html;
pub mod results;
