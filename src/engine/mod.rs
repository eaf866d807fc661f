//! The computational core: distributions, threshold solve, design verdict,
//! decision from data, sample-size search and chart curves.
//!
//! Architecture invariant: nothing here knows about the browser, the file
//! system or the command line. Every function that a user's input can reach
//! returns a `Result` instead of panicking.

pub mod dist;
pub mod root;
pub mod threshold;
pub mod family;
pub mod design;
pub mod conventional;
pub mod evaluate;
pub mod model;
pub mod sample_size;
pub mod discordant;
pub mod decision;
pub mod interval;
pub mod curves;
pub mod inverse;
pub mod simulate;
pub mod context;
pub mod shown;
pub mod request;
pub mod data_file;
pub mod table;
