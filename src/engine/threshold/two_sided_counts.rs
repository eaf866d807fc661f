//! Two-sided counts: reject |X − m0| > c, the acceptance region growing
//! outward from m0 by distance, walked only where bounds on the remaining
//! mass leave regions in contention.

use super::mass_window::{MassCounts, first_true};
use super::region::{DiscreteCut, Errors, discrete_errors, distance_tolerance, same_distance};
use super::{DiscreteSolution, TAIL_WORK, TIE_TOLERANCE};
use crate::engine::dist::Discrete;

/// The two-sided discrete solve (see [`super::solve_discrete`]) around the
/// centre m0.
pub(super) fn solve<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, m0: f64, w: f64) -> DiscreteSolution {
    // Counts outside the two mass windows carry mass below 1e-300 under
    // both: a region's edge is only ever placed at a count with mass.
    let counts = MassCounts::of(h0, h1);
    let candidates = match local_walk(h0, h1, m0, w, counts) {
        Some(c) => c,
        None => full_walk(h0, h1, m0, w, counts),
    };
    two_sided_pick(h0, h1, m0, w, candidates)
}

/// Every candidate of the two-sided walk as (half-width, running weighted
/// error): the acceptance region grows outward from m0 by distance, E
/// starts at w (everything rejected, half-width −1) and each accepted count
/// changes it by (1 − w)·p1(x) − w·p0(x). Only counts with mass are
/// walked, so half-widths are the distances of such counts. The running
/// sum only ranks candidates; the winners are recomputed from the tails.
fn full_walk<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, m0: f64, w: f64, counts: MassCounts) -> Vec<(f64, f64)> {
    let mut points = counts.by_distance(m0).peekable();
    let mut candidates: Vec<(f64, f64)> = vec![(-1.0, w)];
    let mut e = w;
    while let Some(&(d0, _)) = points.peek() {
        while let Some((_, x)) = points.next_if(|p| same_distance(p.0, d0, m0)) {
            e += (1.0 - w) * h1.pmf(x) - w * h0.pmf(x);
        }
        candidates.push((d0, e));
    }
    candidates
}

/// Windows narrower than this are walked in full.
const LOCAL_WALK_FROM: u64 = 200;

/// The candidates of [`full_walk`] that can come within 1e-9 of the
/// minimum, found without visiting the whole mass window.
///
/// Why it is exact: under a monotone likelihood ratio the increment
/// (1 − w)·p1(x) − w·p0(x) is positive exactly on one side of a count x_c
/// (found by bisection), which lies on H1's side of m0. (i) Every region
/// that does not yet reach x_c has only negative increments, so its error
/// is at least that of the largest such region: the walk starts there, from
/// its error computed exactly from the tails. (ii) Once x_c is accepted,
/// the only negative increments left are those of the counts beyond the
/// far (H0-side) edge L, whose sum is at most w·P0(beyond L); so when
/// E − w·P0(beyond L) exceeds the minimum so far by more than the
/// closeness margin, no later region can come close, and the walk stops.
/// (iii) Inward from the start the error only grows, so only the few
/// regions still within the margin are listed. Like the full walk it
/// steps only over counts with mass. `None` (the caller walks in full) for
/// narrow windows or when x_c is not on H1's side of m0.
fn local_walk<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, m0: f64, w: f64, counts: MassCounts) -> Option<Vec<(f64, f64)>> {
    let (first, top) = (counts.first, counts.top);
    if top.saturating_sub(first) < LOCAL_WALK_FROM || !(m0 >= first as f64 && m0 <= top as f64) {
        return None;
    }
    let (lw0, lw1) = (w.ln(), (1.0 - w).ln());
    let ratio = |k: u64| (lw1 + h1.ln_pmf(k)) - (lw0 + h0.ln_pmf(k));
    let inc = |k: u64| (1.0 - w) * h1.pmf(k) - w * h0.pmf(k);
    let up = h1.centre() > h0.centre();
    // x_c: the first positive count (up) or the last one (down).
    let xc = if up {
        first_true(first, top, |k| ratio(k) >= 0.0)?
    } else {
        first_true(first, top, |k| ratio(k) < 0.0)?.checked_sub(1)?
    };
    let dc = (xc as f64 - m0).abs();
    if (up && xc as f64 <= m0) || (!up && xc as f64 >= m0) || xc < first || dc < 2.0 {
        return None;
    }
    let tol = distance_tolerance(m0);
    // (i) The largest region whose counts are all nearer than x_c.
    let mut lo = counts.at_or_after(((m0 - dc + tol).ceil().max(first as f64)) as u64)?;
    let mut hi = counts.at_or_before(((m0 + dc - tol).floor().min(top as f64)) as u64)?;
    if lo > hi {
        return None;
    }
    let region = |half_width: f64| DiscreteCut::outside(m0, half_width, h0.support_max());
    let (lo_start, hi_start) = (lo, hi);
    let d_start = (m0 - lo as f64).max(hi as f64 - m0);
    let mut e = discrete_errors(h0, h1, region(d_start)).weighted(w);
    let e_start = e;
    let mut candidates = vec![(d_start, e)];
    let mut best = e;
    // (ii) Outward. `beyond` is P0 of the counts past the H0-side edge.
    let exact_beyond = |lo: u64, hi: u64| if up { if lo == 0 { 0.0 } else { h0.cdf(lo - 1) } } else { h0.sf(hi) };
    let mut beyond = exact_beyond(lo, hi);
    let margin = |best: f64| best + 1e-9 * best.abs().max(1e-300);
    let mut steps = 0u32;
    loop {
        let (below, above) = (counts.before(lo), counts.after(hi));
        let dl = below.map_or(f64::INFINITY, |k| m0 - k as f64);
        let du = above.map_or(f64::INFINITY, |k| k as f64 - m0);
        let d0 = dl.min(du);
        if !d0.is_finite() {
            break;
        }
        if let (Some(k), true) = (below, same_distance(dl, d0, m0)) {
            lo = k;
            e += inc(lo);
            if up {
                beyond -= h0.pmf(lo);
            }
        }
        if let (Some(k), true) = (above, same_distance(du, d0, m0)) {
            hi = k;
            e += inc(hi);
            if !up {
                beyond -= h0.pmf(hi);
            }
        }
        candidates.push((d0, e));
        best = best.min(e);
        steps += 1;
        let past_xc = if up { hi >= xc } else { lo <= xc };
        // The running `beyond` is only an estimate; the stop is confirmed
        // with the exact tail (at most every 16 steps).
        if past_xc && e - w * beyond.max(0.0) * (1.0 + 1e-6) > margin(best) && steps >= 16 {
            steps = 0;
            beyond = exact_beyond(lo, hi);
            if e - w * beyond > margin(best) {
                break;
            }
        }
    }
    // (iii) Inward from the start: removing a count with a negative
    // increment raises E, so stop at the first region past the margin.
    let (mut lo, mut hi, mut e) = (Some(lo_start), Some(hi_start), e_start);
    while let (Some(l), Some(h)) = (lo, hi) {
        if l > h || e > margin(best) {
            break;
        }
        let (dl, du) = (m0 - l as f64, h as f64 - m0);
        let d0 = dl.max(du);
        let (drop_lo, drop_hi) = (same_distance(dl, d0, m0), same_distance(du, d0, m0));
        if drop_lo {
            e -= inc(l);
        }
        if drop_hi && !(drop_lo && l == h) {
            e -= inc(h);
        }
        lo = if drop_lo { counts.after(l) } else { lo };
        hi = if drop_hi { counts.before(h) } else { hi };
        match (lo, hi) {
            (Some(l), Some(h)) if l <= h => candidates.push(((m0 - l as f64).max(h as f64 - m0), e)),
            _ => candidates.push((-1.0, w)),
        }
    }
    Some(candidates)
}

/// From the walk's candidates to the solution: those within 1e-9 of the
/// smallest running error are recomputed from the tails, ties within
/// [`TIE_TOLERANCE`] are listed in order of half-width and the pick is the
/// smallest α. Every tail pair counts [`TAIL_WORK`] in the solve's work, so
/// that a scan over n that keeps recomputing many (a weight or limit near
/// 1e-300, where the running sum cannot rank them) runs out of budget
/// sooner rather than taking minutes.
fn two_sided_pick<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, m0: f64, w: f64, candidates: Vec<(f64, f64)>) -> DiscreteSolution {
    let support = h0.support_max();
    let region = |half_width: f64| DiscreteCut::outside(m0, half_width, support);
    let min = candidates.iter().map(|c| c.1).fold(f64::INFINITY, f64::min);
    // Anything close to the minimum in the running sum is re-evaluated.
    let mut close: Vec<(DiscreteCut, Errors)> = candidates
        .iter()
        .filter(|c| c.1 <= min + 1e-9 * min.abs().max(1e-300))
        .map(|c| {
            let cut = if c.0 < 0.0 {
                DiscreteCut::Outside { centre: m0, half_width: -1.0, low: None, high: Some(0) }
            } else {
                region(c.0)
            };
            (cut, discrete_errors(h0, h1, cut))
        })
        .collect();
    let work = candidates.len() as u64 + TAIL_WORK * close.len() as u64;
    close.sort_by(|a, b| a.1.weighted(w).total_cmp(&b.1.weighted(w)));
    let best = close[0].1.weighted(w);
    close.retain(|c| c.1.weighted(w) <= best + TIE_TOLERANCE * best);
    let half = |c: &DiscreteCut| match c {
        DiscreteCut::Outside { half_width, .. } => *half_width,
        _ => 0.0,
    };
    close.sort_by(|a, b| half(&a.0).total_cmp(&half(&b.0)));
    close.dedup_by(|a, b| a.0 == b.0);
    let pickd = close.iter().copied().fold(close[0], |acc, x| if x.1.alpha < acc.1.alpha { x } else { acc });
    DiscreteSolution { cut: pickd.0, errors: pickd.1, ties: close.into_iter().map(|c| c.0).collect(), work }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The local two-sided walk lists exactly the ties and pick of the walk
    /// over the whole mass window (its own definition), over a grid of
    /// binomial designs both ways, with weights and with a half-integer m0.
    #[test]
    fn local_two_sided_walk_agrees_with_the_full_walk() {
        // The answer: pick, errors and ties (the work differs by design).
        let same = |s: &DiscreteSolution| (s.cut, s.errors, s.ties.clone());
        use crate::engine::dist::Binomial;
        let mut local_used = 0;
        for n in [201u64, 250, 999, 1000, 3001, 20_000, 30_934] {
            for (p0, p1) in [(0.5, 0.51), (0.5, 0.55), (0.5, 0.45), (0.3, 0.34), (0.6, 0.8), (0.02, 0.03), (0.9, 0.88)] {
                for w in [0.5, 0.2, 0.8] {
                    let (h0, h1) = (Binomial::new(n, p0).unwrap(), Binomial::new(n, p1).unwrap());
                    let m0 = n as f64 * p0;
                    let counts = MassCounts::of(&h0, &h1);
                    let full = two_sided_pick(&h0, &h1, m0, w, full_walk(&h0, &h1, m0, w, counts));
                    if let Some(c) = local_walk(&h0, &h1, m0, w, counts) {
                        local_used += 1;
                        let local = two_sided_pick(&h0, &h1, m0, w, c);
                        assert_eq!(same(&local), same(&full), "n {n}, p0 {p0}, p1 {p1}, w {w}");
                    }
                }
            }
        }
        assert!(local_used > 60, "{local_used}");
        // Laws so far apart that a gap of massless counts lies between their
        // windows (p0 = .02 against .3 at n = 100,000: about 38σ either side
        // of 2,000 and of 30,000): both walks step over it, and agree.
        for (p0, p1) in [(0.02, 0.3), (0.3, 0.02)] {
            for w in [0.5, 1e-6, 1.0 - 1e-6] {
                let n = 100_000;
                let (h0, h1) = (Binomial::new(n, p0).unwrap(), Binomial::new(n, p1).unwrap());
                let m0 = n as f64 * p0;
                let counts = MassCounts::of(&h0, &h1);
                assert!(counts.by_distance(m0).count() < 20_000, "the gap is stepped over");
                let full = two_sided_pick(&h0, &h1, m0, w, full_walk(&h0, &h1, m0, w, counts));
                let local = two_sided_pick(&h0, &h1, m0, w, local_walk(&h0, &h1, m0, w, counts).expect("local walk"));
                assert_eq!(same(&local), same(&full), "p0 {p0}, p1 {p1}, w {w}");
            }
        }
    }
}
