//! The page model: everything the page decides, compiled natively as well
//! as for WebAssembly, with no web-sys and no DOM, so that `cargo test`
//! reaches it. `src/web` is the shell around it: events, DOM text, canvas.
//!
//! Architecture invariant: no web types here; the model calls the engine
//! with typed values (`engine::request::Ask`), once per change of the form,
//! and JSON stays at the edges (command line, files, links).

pub mod form;
