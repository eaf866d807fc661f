//! The conventional test a reviewer expects: the critical value at level
//! α_max and its power at θ1, for the same statistic and direction.

use super::dist::{Continuous, Discrete};
use super::root::{Tolerance, brent, expand};
use super::threshold::{
    Alternative, ContinuousCut, DiscreteCut, Errors, ThresholdError, continuous_errors, discrete_errors,
    first_true, mass_window,
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
            let fits = |c: f64| discrete_errors(h0, h1, region(c)).alpha <= level;
            // α falls as the half-width grows. The half-widths that mean
            // something are the counts' distances from the centre; on each
            // side they grow with the count's distance, so each side is
            // bisected for its first fit and the nearer of the two is the
            // smallest half-width that fits (O(log n) tails, no list).
            let middle = (centre.floor().max(0.0) as u64).clamp(first, top);
            let below = if middle as f64 <= centre {
                // The largest x ≤ middle whose distance fits.
                match first_true(first, middle, |x| !fits(centre - x as f64)) {
                    Some(x) => x.checked_sub(1).filter(|&x| x >= first),
                    None => Some(middle),
                }
                .map(|x| centre - x as f64)
            } else {
                None
            };
            let above = middle
                .checked_add(u64::from(middle as f64 <= centre))
                .filter(|&x| x <= top)
                .and_then(|lo| first_true(lo, top, |x| fits(x as f64 - centre)))
                .map(|x| x as f64 - centre);
            match (below, above) {
                (Some(b), Some(a)) => region(b.min(a)),
                (Some(c), None) | (None, Some(c)) => region(c),
                (None, None) => DiscreteCut::Outside { centre, half_width: f64::INFINITY, low: None, high: None },
            }
        }
    };
    Ok((cut, discrete_errors(h0, h1, cut)))
}
