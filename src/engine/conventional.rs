//! The conventional test a reviewer expects: the critical value at level
//! α_max and its power at θ1, for the same statistic and direction.

use super::dist::{Continuous, Discrete};
use super::root::{Tolerance, brent, expand};
use super::threshold::{
    Alternative, ContinuousCut, DiscreteCut, Errors, ThresholdError, continuous_errors, discrete_alpha, discrete_errors,
    first_true, first_true_from, mass_window,
};

/// The level-α test of a continuous statistic. Two-sided: the half-width c
/// with P0(|T − t0| > c) = α (solved, so asymmetric H0 work too).
pub fn continuous_level<C0: Continuous, C1: Continuous>(
    h0: &C0,
    h1: &C1,
    alternative: Alternative,
    centre: f64,
    level: f64,
) -> Result<(ContinuousCut, Errors), ThresholdError> {
    let cut = match alternative {
        Alternative::Greater => ContinuousCut::Above(h0.quantile_upper(level)?),
        Alternative::Less => ContinuousCut::Below(h0.quantile(level)?),
        Alternative::TwoSided => {
            // ln α(c) − ln level falls from ln(1/level) > 0 at c = 0.
            let f = |c: f64| (h0.cdf(centre - c) + h0.sf(centre + c)).ln() - level.ln();
            let (lo, hi) = expand(f, 0.0, h0.spread(), 1.0, 80)?;
            let root = brent(f, lo, hi, Tolerance::TIGHT)?;
            ContinuousCut::Outside { centre, half_width: root.x }
        }
    };
    Ok((cut, continuous_errors(h0, h1, cut)))
}

/// The level-α test of a count: the largest rejection region whose exact
/// α does not exceed the level. Two-sided: the smallest half-width, over the
/// distinct distances |x − m0|, with α ≤ level.
pub fn discrete_level<D0: Discrete, D1: Discrete>(
    h0: &D0,
    h1: &D1,
    alternative: Alternative,
    centre: f64,
    level: f64,
) -> Result<(DiscreteCut, Errors), ThresholdError> {
    discrete_level_near(h0, h1, alternative, centre, level, None)
}

/// [`discrete_level`] with, for a two-sided test, the half-width of a
/// nearby design (the previous n of a scan) as the place to start the
/// search: the same answer, found in a few tails instead of about
/// 2·log2(n).
pub fn discrete_level_near<D0: Discrete, D1: Discrete>(
    h0: &D0,
    h1: &D1,
    alternative: Alternative,
    centre: f64,
    level: f64,
    near: Option<f64>,
) -> Result<(DiscreteCut, Errors), ThresholdError> {
    let cut = match alternative {
        Alternative::Greater => DiscreteCut::AtLeast(h0.quantile_upper(level)? as i64 + 1),
        Alternative::Less => {
            let j = h0.quantile(level)?;
            DiscreteCut::AtMost(if h0.cdf(j) <= level { j as i64 } else { j as i64 - 1 })
        }
        Alternative::TwoSided => {
            let support = h0.support_max();
            // Counts outside [first, top] carry negligible H0 mass: they
            // cannot move α across any level a user can state.
            let (first, top) = mass_window(h0);
            let region = |c: f64| DiscreteCut::outside(centre, c, support);
            let fits = |c: f64| discrete_alpha(h0, region(c)) <= level;
            // α falls as the half-width grows. The half-widths that mean
            // something are the counts' distances from the centre, one
            // apart on each side. The below side is bisected for its first
            // fit b; every distance below b − 1 then fails too, so the
            // above side can only improve on b with its one distance in
            // (b − 1, b). Without a fit below, the above side is bisected.
            // O(log n) tails, no list.
            let middle = (centre.floor().max(0.0) as u64).clamp(first, top);
            let below = if middle as f64 <= centre {
                // The largest x ≤ middle whose distance fits.
                let misses = |x: u64| !fits(centre - x as f64);
                let found = match near.filter(|h| h.is_finite() && *h >= 0.0) {
                    Some(h) => first_true_from(first, middle, (centre - h).ceil().max(0.0) as u64, misses),
                    None => first_true(first, middle, misses),
                };
                match found {
                    Some(x) => x.checked_sub(1).filter(|&x| x >= first),
                    None => Some(middle),
                }
                .map(|x| centre - x as f64)
            } else {
                None
            };
            let above_from = middle.checked_add(u64::from(middle as f64 <= centre)).filter(|&x| x <= top);
            let above = match (below, above_from) {
                (_, None) => None,
                (Some(b), Some(lo)) => {
                    // The above count whose distance lies in (b − 1, b), if any.
                    let x = (centre + b - 1.0).floor() as u64 + 1;
                    (x >= lo && x <= top && (x as f64 - centre) < b && fits(x as f64 - centre)).then_some(x as f64 - centre)
                }
                (None, Some(lo)) => first_true(lo, top, |x| fits(x as f64 - centre)).map(|x| x as f64 - centre),
            };
            match (below, above) {
                (Some(b), Some(a)) => region(b.min(a)),
                (Some(c), None) | (None, Some(c)) => region(c),
                (None, None) => DiscreteCut::Outside { centre, half_width: f64::INFINITY, low: None, high: None },
            }
        }
    };
    Ok((cut, discrete_errors(h0, h1, cut)))
}
