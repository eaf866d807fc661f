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

/// [`first_true`] started from a guess near the answer: steps of 1, 2,
/// 4, … away from `guess` until the answer is bracketed, then bisection.
/// About 2·log2(distance) + 2 calls instead of log2(hi − lo), for a guess
/// a few counts off; the same answer for any guess.
pub(crate) fn first_true_from<P: Fn(u64) -> bool>(lo: u64, hi: u64, guess: u64, p: P) -> Option<u64> {
    if lo > hi {
        return None;
    }
    let g = guess.clamp(lo, hi);
    let mut step = 1u64;
    if p(g) {
        // The answer is at or below g: find a false point below.
        let mut high = g;
        loop {
            if high == lo {
                return Some(lo);
            }
            let probe = high.saturating_sub(step).max(lo);
            if !p(probe) {
                return first_true(probe + 1, high, p);
            }
            high = probe;
            step = step.saturating_mul(2);
        }
    } else {
        // The answer is above g, if anywhere: find a true point above.
        let mut low = g;
        loop {
            if low == hi {
                return None;
            }
            let probe = low.saturating_add(step).min(hi);
            if p(probe) {
                return first_true(low + 1, probe, p);
            }
            low = probe;
            step = step.saturating_mul(2);
        }
    }
}

/// Smallest k in [lo, hi] with `p(k)` true, for a predicate that is false
/// then true (monotone); `None` when false everywhere.
pub(crate) fn first_true<P: Fn(u64) -> bool>(lo: u64, hi: u64, p: P) -> Option<u64> {
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

/// The counts with mass under either of two laws: the union of their mass
/// windows, [first, top] less the gap of massless counts that lies between
/// the windows when the laws are far apart (a count in the gap carries
/// below e^−745 of either mode's mass under both, so no rule gains or
/// loses anything by it). The two-sided walks step over the gap, which
/// keeps them to the windows' width however far apart the laws lie.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) struct MassCounts {
    /// The first count of either window.
    pub first: u64,
    /// The last count of either window.
    pub top: u64,
    /// The massless counts between the windows, inclusive, if any.
    gap: Option<(u64, u64)>,
}

impl MassCounts {
    /// The union of the two laws' mass windows.
    pub fn of<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1) -> MassCounts {
        Self::from_windows(mass_window(h0), mass_window(h1))
    }

    /// The union of two windows [a0, b0] and [a1, b1] (a ≤ b).
    pub fn from_windows((a0, b0): (u64, u64), (a1, b1): (u64, u64)) -> MassCounts {
        let (lower, upper) = if a0 <= a1 { ((a0, b0), (a1, b1)) } else { ((a1, b1), (a0, b0)) };
        let gap = (upper.0 > lower.1.saturating_add(1)).then(|| (lower.1 + 1, upper.0 - 1));
        MassCounts { first: lower.0, top: lower.1.max(upper.1), gap }
    }

    /// The counts with mass in order of their distance from `centre`, each
    /// with its distance (|k − centre|; between the two sides at one
    /// distance, the lower count first): the two sides are each in order,
    /// so they are merged, not sorted.
    pub fn by_distance(&self, centre: f64) -> impl Iterator<Item = (f64, u64)> + '_ {
        let middle = centre.floor().max(0.0) as u64;
        let mut below = std::iter::successors(self.at_or_before(middle), |&k| self.before(k)).peekable();
        let mut above = std::iter::successors(middle.checked_add(1).and_then(|k| self.at_or_after(k)), |&k| self.after(k)).peekable();
        std::iter::from_fn(move || {
            let d = |k: u64| (k as f64 - centre).abs();
            match (below.peek(), above.peek()) {
                (Some(&l), Some(&u)) if d(u) < d(l) => above.next(),
                (Some(_), _) => below.next(),
                (None, _) => above.next(),
            }
            .map(|k| (d(k), k))
        })
    }

    /// The largest count with mass at or below `k`, if any.
    pub fn at_or_before(&self, k: u64) -> Option<u64> {
        if k < self.first {
            return None;
        }
        let k = k.min(self.top);
        match self.gap {
            Some((a, b)) if k >= a && k <= b => Some(a - 1),
            _ => Some(k),
        }
    }

    /// The smallest count with mass at or above `k`, if any.
    pub fn at_or_after(&self, k: u64) -> Option<u64> {
        if k > self.top {
            return None;
        }
        let k = k.max(self.first);
        match self.gap {
            Some((a, b)) if k >= a && k <= b => Some(b + 1),
            _ => Some(k),
        }
    }

    /// The count with mass just below `k`, if any.
    pub fn before(&self, k: u64) -> Option<u64> {
        k.checked_sub(1).and_then(|j| self.at_or_before(j))
    }

    /// The count with mass just above `k`, if any.
    pub fn after(&self, k: u64) -> Option<u64> {
        k.checked_add(1).and_then(|j| self.at_or_after(j))
    }
}

#[cfg(test)]
mod tests {
    use super::{MassCounts, first_true, first_true_from};

    /// The guided search gives the plain bisection's answer for every
    /// guess, answer and range (predicates written out: k ≥ t).
    #[test]
    fn first_true_from_any_guess_agrees() {
        for (lo, hi) in [(0u64, 0u64), (0, 1), (3, 40), (10, 1000)] {
            for t in lo.saturating_sub(1)..=hi + 2 {
                for guess in [0, lo, (lo + hi) / 2, hi, t, t.saturating_sub(3), t + 5, u64::MAX] {
                    let p = |k: u64| k >= t;
                    assert_eq!(first_true_from(lo, hi, guess, p), first_true(lo, hi, p), "[{lo}, {hi}], t {t}, guess {guess}");
                }
            }
        }
    }

    /// Stepping over the gap between two windows, against the sets written
    /// out: [2, 4] and [8, 9] leave 5–7 massless; overlapping or touching
    /// windows leave none.
    #[test]
    fn mass_counts_step_over_the_gap() {
        let c = MassCounts::from_windows((8, 9), (2, 4));
        let counts = |c: &MassCounts| c.by_distance(0.0).map(|(_, k)| k).collect::<Vec<_>>();
        assert_eq!(counts(&c), vec![2, 3, 4, 8, 9]);
        let around = c.by_distance(5.5).collect::<Vec<_>>();
        assert_eq!(around, vec![(1.5, 4), (2.5, 3), (2.5, 8), (3.5, 2), (3.5, 9)]);
        assert_eq!((c.first, c.top), (2, 9));
        assert_eq!((c.before(8), c.after(4), c.before(2), c.after(9)), (Some(4), Some(8), None, None));
        assert_eq!((c.at_or_after(6), c.at_or_before(6), c.at_or_before(100), c.at_or_after(0)), (Some(8), Some(4), Some(9), Some(2)));
        for (w0, w1, all) in [((2, 4), (5, 9), vec![2, 3, 4, 5, 6, 7, 8, 9]), ((0, 3), (1, 2), vec![0, 1, 2, 3])] {
            let c = MassCounts::from_windows(w0, w1);
            assert_eq!(counts(&c), all);
            assert_eq!(c.after(4), if all.contains(&5) { Some(5) } else { None });
        }
    }
}
