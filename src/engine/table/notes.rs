//! Plain-language notes when the data strain the model the design assumes:
//! advice only, never a switch of the test.
//!
//! Rules (rules of thumb, common practice, no single source):
//! - sd = 0: the t statistic is undefined.
//! - skewness: |G1| ≥ 1 with n < 30, or |G1| ≥ 2 with n < 100, is "strong
//!   skew with a small sample" for a t test on means.
//! - extreme values: beyond Tukey's far-out fences, 3·IQR outside the
//!   quartiles (Tukey, Exploratory Data Analysis, 1977).
//! - unequal spreads: the larger sd at least twice the smaller suggests the
//!   Welch test rather than the pooled one.
//! - proportions: fewer than 5 successes or 5 failures in a group makes the
//!   normal approximation rough.

use super::summary::GroupStats;
use super::Table;

/// One group as the notes see it.
pub(crate) struct Group<'a> {
    pub stats: &'a GroupStats,
    /// First and third quartiles (linear interpolation).
    pub quartiles: (f64, f64),
    pub values: &'a [f64],
    /// Data index of each value.
    pub rows: &'a [u32],
    pub table: &'a Table,
}

fn fmt(v: f64) -> String {
    crate::engine::evaluate::sig3(v)
}

pub(crate) fn notes(groups: &[Group<'_>], binary: bool, dropped_pairs: usize, other_rows: usize, excluded: usize) -> Vec<String> {
    let mut out = Vec::new();
    if excluded > 0 {
        out.push(format!("{excluded} row(s) you excluded are left out of every figure."));
    }
    if dropped_pairs > 0 {
        out.push(format!("{dropped_pairs} row(s) have only one of the two paired measurements and are left out."));
    }
    if other_rows > 0 {
        out.push(format!("{other_rows} row(s) belong to neither chosen group (another value or an empty group cell) and are left out."));
    }
    for g in groups {
        let s = g.stats;
        if s.missing > 0 {
            out.push(format!("{}: {} row(s) have no usable value (missing or not a number) and are left out.", s.label, s.missing));
        }
        if binary {
            let x = s.successes.unwrap_or(0);
            let failures = s.n - x;
            if x < 5 || failures < 5 {
                out.push(format!(
                    "{}: {x} successes and {failures} failures; with fewer than 5 of either the normal approximation is rough (for one proportion the exact binomial test avoids it).",
                    s.label
                ));
            }
            continue;
        }
        if s.n >= 2 && s.sd == Some(0.0) {
            out.push(format!(
                "{}: all {} values are equal ({}), so the standard deviation is 0 and a t statistic cannot be computed; check that this is the right column.",
                s.label,
                s.n,
                fmt(s.mean)
            ));
            continue;
        }
        if let Some(g1) = s.skewness
            && ((g1.abs() >= 1.0 && s.n < 30) || (g1.abs() >= 2.0 && s.n < 100))
        {
            out.push(format!(
                "{}: the values are strongly skewed (skewness {}) and n = {} is small, so the t test's actual error rates may differ from α* and β*. Consider a transformation chosen for reasons other than this outcome (for example logarithms of amounts), or check the design by simulation.",
                s.label,
                fmt(g1),
                s.n
            ));
        }
        if g.values.len() >= 4 {
            let (q1, q3) = g.quartiles;
            let iqr = q3 - q1;
            if iqr > 0.0 {
                let (lo, hi) = (q1 - 3.0 * iqr, q3 + 3.0 * iqr);
                let far: Vec<(u32, f64)> =
                    g.values.iter().zip(g.rows).filter(|(v, _)| **v < lo || **v > hi).map(|(v, r)| (*r, *v)).collect();
                if !far.is_empty() {
                    let shown: Vec<String> = far
                        .iter()
                        .take(5)
                        .map(|(r, v)| format!("row {} ({})", g.table.file_row(*r as usize).unwrap_or(0), fmt(*v)))
                        .collect();
                    out.push(format!(
                        "{}: {} value(s) lie far outside the rest (more than 3 × IQR beyond the quartiles, Tukey's far-out fences): {}{}. Check them for entry errors; the mean and sd are sensitive to them, and leaving them out needs a reason other than the outcome.",
                        s.label,
                        far.len(),
                        shown.join(", "),
                        if far.len() > 5 { ", …" } else { "" }
                    ));
                }
            }
        }
    }
    if !binary
        && let [a, b] = groups
        && let (Some(s1), Some(s2)) = (a.stats.sd, b.stats.sd)
        && s1 > 0.0
        && s2 > 0.0
    {
        let ratio = s1.max(s2) / s1.min(s2);
        if ratio >= 2.0 {
            out.push(format!(
                "The standard deviations differ by a factor of {} ({} and {}): the pooled t test assumes equal variances and the Welch test does not. If the design uses the pooled test, consider the Welch family, chosen before looking at the outcome.",
                fmt(ratio),
                fmt(s1),
                fmt(s2)
            ));
        }
    }
    out
}
