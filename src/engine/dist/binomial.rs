//! Placeholder: being written.

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Binomial;
