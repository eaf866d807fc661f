//! The mass window of a discrete law: the counts outside which the mass is
//! negligible (below e^−745 of the mode's), and the integer bisection the
//! discrete solves share.

use crate::engine::dist::Discrete;

/// The counts [first, last] outside which the mass is below e^−745 (the
/// smallest f64) times the mass at the mode, found by bisection on the
/// unimodal log-mass: O(log n) evaluations instead of a tail search.
pub(crate) fn mass_window<D: Discrete>(d: &D) -> (u64, u64) {
    (mass_window_first(d), mass_window_last(d))
}

/// The first count of [`mass_window`] alone.
pub(super) fn mass_window_first<D: Discrete>(d: &D) -> u64 {
    let (mode, cutoff) = window_mode(d);
    first_true(0, mode, |k| d.ln_pmf(k) >= cutoff).unwrap_or(mode)
}

/// The last count of [`mass_window`] alone (all a one-sided solve needs).
pub(super) fn mass_window_last<D: Discrete>(d: &D) -> u64 {
    let (mode, cutoff) = window_mode(d);
    window_last(d, mode, cutoff)
}

/// The mode (floor of the centre) and the log-mass cut-off of the window.
pub(super) fn window_mode<D: Discrete>(d: &D) -> (u64, f64) {
    let mode = (d.centre().max(0.0).floor() as u64).min(d.support_max());
    (mode, d.ln_pmf(mode) - 745.0)
}

fn window_last<D: Discrete>(d: &D, mode: u64, cutoff: f64) -> u64 {
    let keep = |k: u64| d.ln_pmf(k) >= cutoff;
    // Upper end: the support's end, or doubling outward for unbounded laws.
    let support = d.support_max();
    let mut hi = support;
    if support == u64::MAX {
        let mut step = 1u64;
        hi = mode.saturating_add(step);
        for _ in 0..64 {
            if !keep(hi) {
                break;
            }
            step = step.saturating_mul(2);
            hi = mode.saturating_add(step);
        }
    }
    match first_true(mode, hi, |k| !keep(k)) {
        Some(k) => k.saturating_sub(1).max(mode),
        None => hi,
    }
}

/// Smallest k in [lo, hi] with `p(k)` true, for a predicate that is false
/// then true (monotone); `None` when false everywhere.
pub(super) fn first_true<P: Fn(u64) -> bool>(lo: u64, hi: u64, p: P) -> Option<u64> {
    if !p(hi) {
        return None;
    }
    let (mut a, mut b) = (lo, hi);
    while a < b {
        let m = a + (b - a) / 2;
        if p(m) { b = m } else { a = m + 1 }
    }
    Some(a)
}
