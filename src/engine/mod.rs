//! The computational core: distributions, threshold solve, design verdict,
//! decision from data, sample-size search and chart curves.
//!
//! Architecture invariant: nothing here knows about the browser, the file
//! system or the command line. Every function that a user's input can reach
//! returns a `Result` instead of panicking.

pub mod dist;
