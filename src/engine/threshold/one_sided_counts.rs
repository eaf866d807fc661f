//! One-sided counts: reject X ≥ k or X ≤ k, the k where the weighted
//! likelihood ratio crosses w/(1 − w), with its ties.

use super::mass_window::{first_true, mass_window_last, window_mode};
use super::region::{DiscreteCut, Errors, discrete_errors};
use super::{DiscreteSolution, TAIL_WORK, TIE_TOLERANCE};
use crate::engine::dist::Discrete;

/// The one-sided discrete solve (see [`super::solve_discrete`]): reject
/// X ≥ k when `upper` (alternative greater), X ≤ k otherwise.
pub(super) fn solve<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, upper: bool, w: f64) -> DiscreteSolution {
    let (lw0, lw1) = (w.ln(), (1.0 - w).ln());
    // Counts above `top()` carry mass below 1e-300 under both.
    let top = || mass_window_last(h0).max(mass_window_last(h1));
    // Sign of D(k): > 0 where the weighted H1 mass is larger.
    let d = |k: u64| (lw1 + h1.ln_pmf(k)) - (lw0 + h0.ln_pmf(k));
    let errors = |cut| discrete_errors(h0, h1, cut);
    // The cut-offs that mean something: X ≥ 0 rejects always and X ≥ n + 1
    // never (X ≤ −1 never, X ≤ n always); beyond them only the same rules
    // repeat, which are no ties.
    let last = i64::try_from(h0.support_max().max(h1.support_max())).unwrap_or(i64::MAX - 1);
    // (1 − w)·p1(x) − w·p0(x), 0 off the support.
    let mass_step = |x: i64| if x < 0 { 0.0 } else { (1.0 - w) * h1.pmf(x as u64) - w * h0.pmf(x as u64) };
    if upper {
        // Smallest k in [0, top] with D(k) ≥ 0; none: never reject.
        let k = match quick_first(h0, h1, &d, |v| v >= 0.0) {
            Some(k) => k as i64,
            None => {
                let top = top();
                first_true(0, top, |k| d(k) >= 0.0).map_or(top as i64 + 1, |k| k as i64)
            }
        };
        let cut = DiscreteCut::AtLeast;
        // Rejecting X ≥ j + 1 instead of X ≥ j accepts X = j.
        with_ties(
            k,
            (0, last + 1),
            cut,
            &errors,
            w,
            |c| match c {
                DiscreteCut::AtLeast(k) => k,
                _ => 0,
            },
            mass_step,
        )
    } else {
        // Largest k with D(k) ≥ 0, i.e. one below the first k with D < 0.
        let k = match quick_first(h0, h1, &d, |v| v < 0.0) {
            Some(k) => k as i64 - 1,
            None => {
                let top = top();
                match first_true(0, top, |k| d(k) < 0.0) {
                    Some(k) => k as i64 - 1,
                    None => top as i64,
                }
            }
        };
        // Rejecting X ≤ j + 1 instead of X ≤ j rejects X = j + 1.
        with_ties(
            k,
            (-1, last),
            DiscreteCut::AtMost,
            &errors,
            w,
            |c| match c {
                DiscreteCut::AtMost(k) => k,
                _ => 0,
            },
            |j| -mass_step(j + 1),
        )
    }
}

/// The first k where `pred(D(k))` holds, for the one-sided solves, found
/// without the mass window when that gives the same answer: over the whole
/// support of two laws with the same finite support, D(k) = ln p1(k) −
/// ln p0(k) + const is linear in k (binomials of one n share their
/// binomial coefficient), so the crossing is interpolated from the two
/// ends and confirmed at k and k − 1, with a bisection inside the bracket
/// the guess leaves when it misses. The answer is then the one a search
/// over the mass window [0, top] gives exactly when k lies in that window,
/// which two masses at k show. `None` (the caller searches the window as
/// before): an unbounded support, no such k, or k outside the window.
fn quick_first<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, d: &dyn Fn(u64) -> f64, pred: fn(f64) -> bool) -> Option<u64> {
    let hi = h0.support_max();
    if hi != h1.support_max() || hi == u64::MAX {
        return None;
    }
    let (dl, dh) = (d(0), d(hi));
    if !(dl.is_finite() && dh.is_finite() && pred(dh)) {
        return None;
    }
    let k = if pred(dl) {
        0
    } else {
        let t = (-dl / (dh - dl)).clamp(0.0, 1.0);
        let g = ((t * hi as f64).ceil() as u64).clamp(1, hi);
        match (pred(d(g)), pred(d(g - 1))) {
            (true, false) => g,
            (true, true) => first_true(0, g - 1, |k| pred(d(k)))?,
            (false, _) => first_true(g + 1, hi, |k| pred(d(k)))?,
        }
    };
    // In the window of either law: at or below its mode, or its mass there
    // above the window's cut-off.
    let inside = |mode: u64, cutoff: f64, ln_pmf: f64| k <= mode || ln_pmf >= cutoff;
    let (m0, c0) = window_mode(h0);
    let (m1, c1) = window_mode(h1);
    (inside(m0, c0, h0.ln_pmf(k)) || inside(m1, c1, h1.ln_pmf(k))).then_some(k)
}

/// Gather the neighbours of `k` whose weighted error ties with it, and pick
/// the one with the smallest α. `step(j)` is E(j + 1) − E(j) from the two
/// masses: a neighbour whose summed steps exceed the tie tolerance tenfold
/// cannot tie (the tails agree with the masses to about 1e-15 of E), so its
/// tails are not computed; any other is judged from its tails as before.
/// Neighbours outside `range` (the cut-offs that mean something) are not
/// visited.
fn with_ties<F, M, K, S>(k: i64, range: (i64, i64), make: M, errors: &F, w: f64, key: K, step: S) -> DiscreteSolution
where
    F: Fn(DiscreteCut) -> Errors,
    M: Fn(i64) -> DiscreteCut,
    K: Fn(DiscreteCut) -> i64,
    S: Fn(i64) -> f64,
{
    let e = errors(make(k));
    let best = e.weighted(w);
    let scale = TIE_TOLERANCE * best.max(f64::MIN_POSITIVE);
    let tied = |x: &Errors| (x.weighted(w) - best).abs() <= scale;
    let mut ties = vec![(make(k), e)];
    for dir in [-1i64, 1] {
        let mut j = k + dir;
        // E(j) − E(k), from the masses.
        let mut moved = 0.0;
        // More than a handful of exact ties cannot happen under a monotone
        // likelihood ratio; the bound keeps the walk finite regardless.
        for _ in 0..4 {
            if j < range.0 || j > range.1 {
                break;
            }
            moved += if dir > 0 { step(j - 1) } else { -step(j) };
            if moved.abs() > 10.0 * scale {
                break;
            }
            let ej = errors(make(j));
            if !tied(&ej) {
                break;
            }
            ties.push((make(j), ej));
            j += dir;
        }
    }
    ties.sort_by_key(|(c, _)| key(*c));
    let (cut, errors) = ties
        .iter()
        .copied()
        .fold(ties[0], |acc, x| if x.1.alpha < acc.1.alpha { x } else { acc });
    let work = TAIL_WORK * (ties.len() as u64 + 1);
    DiscreteSolution { cut, errors, ties: ties.into_iter().map(|(c, _)| c).collect(), work }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::dist::Discrete;

    /// Regression (found by the property test `mirror_images_agree`): when
    /// the best rule is "always reject", the tie walk went below X ≥ 0 and
    /// reported X ≥ −4 … X ≥ 0 as five tied rules. By hand, n = 1,
    /// p0 = .3125, p1 = .40625, w = .2: always rejecting costs
    /// w·1 = .2; X ≥ 1 costs .2·.3125 + .8·.59375 = .5375; never rejecting
    /// costs .8. The optimum is X ≥ 0, alone.
    #[test]
    fn always_reject_is_one_rule_not_a_run_of_ties() {
        use crate::engine::dist::Binomial;
        let (h0, h1) = (Binomial::new(1, 0.3125).unwrap(), Binomial::new(1, 0.40625).unwrap());
        let s = solve(&h0, &h1, true, 0.2);
        assert_eq!(s.cut, DiscreteCut::AtLeast(0));
        assert_eq!((s.errors.alpha, s.errors.beta), (1.0, 0.0));
        assert_eq!(s.ties, vec![DiscreteCut::AtLeast(0)]);
        // Mirrored: reject X ≤ 1 (= always) with p0 = .40625 > p1 = .3125.
        let s = solve(&h1, &h0, false, 0.2);
        assert!(s.ties.iter().all(|c| matches!(c, DiscreteCut::AtMost(k) if (-1..=1).contains(k))), "{:?}", s.ties);
        assert_eq!((s.errors.alpha, s.errors.beta), (1.0, 0.0));
    }

    /// The one-sided discrete crossing found by interpolation over the
    /// support is the one the bisection over the mass window finds, or the
    /// quick path declines (`None`) and the window search runs as before.
    #[test]
    fn quick_crossing_agrees_with_the_window_search() {
        use crate::engine::dist::Binomial;
        let mut quick = 0;
        for n in [1u64, 2, 3, 7, 20, 61, 200, 1000, 5000] {
            for (p0, p1) in [(0.5, 0.6), (0.6, 0.8), (0.1, 0.05), (0.01, 0.02), (0.9, 0.95), (0.3, 0.1), (0.5, 0.501), (1e-4, 0.5)] {
                for w in [0.1, 0.5, 0.9] {
                    let (h0, h1) = (Binomial::new(n, p0).unwrap(), Binomial::new(n, p1).unwrap());
                    let (lw0, lw1) = (f64::ln(w), f64::ln(1.0 - w));
                    let d = |k: u64| (lw1 + h1.ln_pmf(k)) - (lw0 + h0.ln_pmf(k));
                    let top = mass_window_last(&h0).max(mass_window_last(&h1));
                    for pred in [(|v: f64| v >= 0.0) as fn(f64) -> bool, |v: f64| v < 0.0] {
                        if let Some(k) = quick_first(&h0, &h1, &d, pred) {
                            quick += 1;
                            assert_eq!(Some(k), first_true(0, top, |k| pred(d(k))), "n {n}, p0 {p0}, p1 {p1}, w {w}");
                        }
                    }
                }
            }
        }
        assert!(quick > 100, "the quick path ran only {quick} times");
    }
}
