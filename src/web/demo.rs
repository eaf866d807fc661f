//! The worked scenario shown on first open, and the empty new design.
//!
//! The scenario is invented: the fictional Riverside Physiotherapy Clinic
//! (the same one as the README's first worked example) compares days to
//! recovery after knee surgery under two rehabilitation protocols.

use super::form;

/// Field values of the demo, as the user would type them.
pub const DEMO: &[(&str, &str)] = &[
    ("family", "two_means_pooled"),
    ("alternative", "less"),
    ("unit", "days"),
    (
        "notes",
        "Riverside Physiotherapy Clinic (an invented example). Group 1 follows the new early-loading protocol, group 2 the \
standard protocol. Recovery takes about 42 days with a standard deviation near 6 days; a reduction of 3 days would change \
practice. A false alarm (adopting a protocol that does nothing) and a miss are judged about equally costly, so both limits \
are 0.10.",
    ),
    ("theta0", "0"),
    ("theta1", "-3"),
    ("sigma", "6"),
    ("ratio", "1"),
    ("alpha_max", "0.10"),
    ("beta_max", "0.10"),
    ("data.n1", "56"),
    ("data.mean1", "39.4"),
    ("data.sd1", "6.3"),
    ("data.n2", "56"),
    ("data.mean2", "42.1"),
    ("data.sd2", "5.8"),
];

pub fn load_demo() {
    form::fill(DEMO);
}

/// A new design: every field empty, no family, no direction, no limits.
pub fn clear() {
    form::fill(&[]);
}
