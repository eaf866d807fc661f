//! Sample-size search: the smallest n (per group) that makes the design
//! conclusive, beside the conventional n (level α_max, power 1 − β_max).
//!
//! Continuous families: α*(n) and β*(n) fall with n, so the search doubles
//! from the smallest admissible n and bisects on integers, O(log n) threshold
//! solves, and by construction n − 1 fails. Discrete families saw-tooth: the
//! search scans upward and also reports the smallest n from which every n up
//! to a stated bound stays conclusive.

use super::design::{Design, N_MAX};
use super::dist::{Continuous, Discrete};
use super::evaluate::{EvaluateError, Evaluation, evaluate, sig3, solve, within};
use super::conventional::{continuous_level, discrete_level};
use super::model::Sampling;
use super::threshold::{ContinuousCut, Errors};
use serde::Serialize;

/// Largest n scanned for the exact binomial (one solve per n).
pub const N_MAX_DISCRETE: u64 = 200_000;

/// A sample size for both groups.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GroupSizes {
    pub n1: u64,
    pub n2: Option<u64>,
    pub n_total: u64,
}

/// The answer to "how large must the sample be?".
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SampleSize {
    /// The smallest conclusive n, if any up to `searched_up_to`.
    pub youden: Option<GroupSizes>,
    pub searched_up_to: u64,
    /// Discrete families: the smallest n from which every n up to
    /// `checked_to` is conclusive.
    pub stable_from: Option<GroupSizes>,
    pub checked_to: Option<u64>,
    /// The smallest n whose conventional test reaches power 1 − β_max.
    pub conventional: Option<GroupSizes>,
    /// The design evaluated at the Youden n (shown as the answer's `at_n`
    /// when no n is given).
    #[serde(skip)]
    pub at_youden: Option<Evaluation>,
    /// A cost weight under which the weighted threshold at the conventional
    /// n coincides with the conventional critical value (continuous only).
    pub balancing_weight: Option<f64>,
    /// Plain-language notes (why the two answers differ, saw-tooth).
    pub notes: Vec<String>,
    /// Threshold solves used, for diagnostics and benchmarks.
    pub solves: usize,
}

fn sizes(design: &Design, n1: u64) -> GroupSizes {
    let n2 = design.n2(n1);
    GroupSizes { n1, n2, n_total: n1 + n2.unwrap_or(0) }
}

/// α*, β* at n1 (planning values), counting solves.
pub fn errors_at(design: &Design, n1: u64, solves: &mut usize) -> Result<Errors, EvaluateError> {
    *solves += 1;
    let model = design.model(n1)?;
    Ok(solve(&model)?.1)
}

/// The conventional power at n1.
pub fn conventional_power(design: &Design, n1: u64) -> Result<f64, EvaluateError> {
    let m = design.model(n1)?;
    let e = match &m.sampling {
        Sampling::Continuous { h0, h1 } => continuous_level(h0, h1, design.alternative, m.setup.centre, design.alpha_max)?.1,
        Sampling::Discrete { h0, h1 } => discrete_level(h0, h1, design.alternative, m.setup.centre, design.alpha_max)?.1,
    };
    Ok(1.0 - e.beta)
}

/// Smallest n in [lo, max] where `ok` holds, for a predicate that is false
/// then true: doubling then bisection. `None` when false at `max`.
fn smallest_monotone<F>(lo: u64, max: u64, mut ok: F) -> Result<Option<u64>, EvaluateError>
where
    F: FnMut(u64) -> Result<bool, EvaluateError>,
{
    if ok(lo)? {
        return Ok(Some(lo));
    }
    let (mut fail, mut pass) = (lo, None);
    let mut step = lo.max(1);
    while pass.is_none() {
        let n = (fail + step).min(max);
        if ok(n)? {
            pass = Some(n);
        } else if n == max {
            return Ok(None);
        } else {
            fail = n;
            step = step.saturating_mul(2);
        }
    }
    let mut pass = pass.unwrap_or(max);
    while pass - fail > 1 {
        let m = fail + (pass - fail) / 2;
        if ok(m)? { pass = m } else { fail = m }
    }
    Ok(Some(pass))
}

/// Smallest n in [lo, max] where `ok` holds, scanning every n.
fn smallest_scan<F>(lo: u64, max: u64, mut ok: F) -> Result<Option<u64>, EvaluateError>
where
    F: FnMut(u64) -> Result<bool, EvaluateError>,
{
    for n in lo..=max {
        if ok(n)? {
            return Ok(Some(n));
        }
    }
    Ok(None)
}

/// Power of the randomized most powerful (Neyman–Pearson) test at exactly
/// `level`, one-sided toward θ1, for a count.
///
/// Why it bounds the scans (Neyman–Pearson lemma; common practice, no
/// source): every test of the same data with α ≤ level, the Youden region
/// and the conventional region of either sidedness included, has power at
/// most this; and this power never falls as n grows (the test at n + 1 can
/// ignore one observation). So the smallest n where it reaches 1 − β_max is
/// a lower bound for both searched sizes, found by bisection.
fn randomized_power<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, upward: bool, level: f64) -> Result<f64, EvaluateError> {
    Ok(if upward {
        // Reject X > j fully, X = j with probability γ.
        let j = h0.quantile_upper(level)?;
        let gamma = ((level - h0.sf(j)) / h0.pmf(j)).clamp(0.0, 1.0);
        h1.sf(j) + if gamma.is_finite() { gamma * h1.pmf(j) } else { 0.0 }
    } else {
        // Reject X < j fully, X = j with probability γ.
        let j = h0.quantile(level)?;
        let below0 = if j == 0 { 0.0 } else { h0.cdf(j - 1) };
        let below1 = if j == 0 { 0.0 } else { h1.cdf(j - 1) };
        let gamma = ((level - below0) / h0.pmf(j)).clamp(0.0, 1.0);
        below1 + if gamma.is_finite() { gamma * h1.pmf(j) } else { 0.0 }
    })
}

/// The smallest n (minus a margin of 2 for rounding) at which the
/// randomized most powerful test reaches power 1 − β_max; see
/// [`randomized_power`].
fn randomized_bound(design: &Design, lo: u64, max: u64) -> Result<Option<u64>, EvaluateError> {
    let (theta0, theta1) = design.effect.thetas();
    let upward = theta1 > theta0;
    let target = 1.0 - design.beta_max;
    let ok = |n: u64| -> Result<bool, EvaluateError> {
        let m = design.model(n)?;
        match &m.sampling {
            Sampling::Discrete { h0, h1 } => Ok(randomized_power(h0, h1, upward, design.alpha_max)? >= target),
            Sampling::Continuous { .. } => Ok(true),
        }
    };
    Ok(smallest_monotone(lo, max, ok)?.map(|n| n.saturating_sub(2).max(lo)))
}

/// Find the Youden and the conventional sample sizes.
pub fn sample_size(design: &Design) -> Result<SampleSize, EvaluateError> {
    let mut solves = 0usize;
    let lo = design.n_min();
    let discrete = design.family.discrete();
    // Two groups: n2 = ⌈ratio·n1⌉ must stay within N_MAX too.
    let max = if discrete { N_MAX_DISCRETE } else { N_MAX }.min(design.n_max());
    let mut ok = |n: u64| -> Result<bool, EvaluateError> { Ok(within(design, &errors_at(design, n, &mut solves)?)) };
    // Counts: no n below the randomized Neyman–Pearson bound can be
    // conclusive or reach the conventional power, so the scans start there.
    let scan_from = if discrete { randomized_bound(design, lo, max)?.unwrap_or(max) } else { lo };
    let youden = if discrete { smallest_scan(scan_from, max, &mut ok)? } else { smallest_monotone(lo, max, &mut ok)? };
    let (mut stable_from, mut checked_to) = (None, None);
    if discrete {
        if let Some(first) = youden {
            let bound = (2 * first).max(first + 100).min(max);
            let mut last_fail = None;
            for n in first..=bound {
                if !ok(n)? {
                    last_fail = Some(n);
                }
            }
            stable_from = Some(last_fail.map_or(first, |f| f + 1));
            checked_to = Some(bound);
        }
    }
    let target = 1.0 - design.beta_max;
    let conv_ok = |n: u64| -> Result<bool, EvaluateError> { Ok(conventional_power(design, n)? >= target) };
    let conventional = if discrete { smallest_scan(scan_from, max, conv_ok)? } else { smallest_monotone(lo, max, conv_ok)? };
    let balancing_weight = match conventional {
        Some(n) if !discrete => balancing_weight(design, n)?,
        _ => None,
    };
    let at_youden = match youden {
        Some(n) => Some(evaluate(design, n)?),
        None => None,
    };
    let conventional_errors = match conventional {
        Some(n) => Some(errors_at(design, n, &mut solves)?),
        None => None,
    };
    let notes = notes(design, youden, conventional, stable_from, balancing_weight, max, conventional_errors);
    Ok(SampleSize {
        youden: youden.map(|n| sizes(design, n)),
        searched_up_to: max,
        stable_from: stable_from.map(|n| sizes(design, n)),
        checked_to,
        conventional: conventional.map(|n| sizes(design, n)),
        at_youden,
        balancing_weight,
        notes,
        solves,
    })
}

/// The weight w with w·f0(c) = (1 − w)·f1(c) at the conventional critical
/// value c of the conventional n: with it the weighted threshold reproduces
/// the conventional test, so the weighted design is conclusive there.
fn balancing_weight(design: &Design, n1: u64) -> Result<Option<f64>, EvaluateError> {
    let m = design.model(n1)?;
    let Sampling::Continuous { h0, h1 } = &m.sampling else { return Ok(None) };
    let (cut, _) = continuous_level(h0, h1, design.alternative, m.setup.centre, design.alpha_max)?;
    let (f0, f1) = match cut {
        ContinuousCut::Above(c) | ContinuousCut::Below(c) => (h0.pdf(c), h1.pdf(c)),
        ContinuousCut::Outside { centre, half_width: c } => {
            (h0.pdf(centre + c) + h0.pdf(centre - c), h1.pdf(centre + c) + h1.pdf(centre - c))
        }
    };
    let w = f1 / (f0 + f1);
    Ok(if w.is_finite() && w > 0.0 && w < 1.0 { Some(w) } else { None })
}

fn notes(
    design: &Design,
    youden: Option<u64>,
    conventional: Option<u64>,
    stable: Option<u64>,
    w: Option<f64>,
    max: u64,
    conventional_errors: Option<Errors>,
) -> Vec<String> {
    let mut notes = Vec::new();
    match (youden, conventional) {
        (None, _) => notes.push(format!(
            "No sample size up to {max} per group makes this design conclusive: the effect is too small for these limits."
        )),
        (Some(y), Some(c)) if y > c && design.alpha_max != design.beta_max => {
            let mut s = format!(
                "The n that makes the design conclusive ({y}) exceeds the conventional n ({c}). The threshold that minimises \
                 α + β treats both errors alike (for a symmetric shift α* = β*), so both must meet the smaller limit \
                 ({}); the conventional test instead spends the limits unequally (α = {}, β = {}).",
                sig3(design.alpha_max.min(design.beta_max)),
                sig3(design.alpha_max),
                sig3(design.beta_max)
            );
            if let Some(w) = w {
                s.push_str(&format!(
                    " To weigh the errors as those limits do, set the cost weight w = {} (a false alarm weighted {}, a miss {}): \
                     it reproduces the conventional test at n = {c}.",
                    sig3(w),
                    sig3(w),
                    sig3(1.0 - w)
                ));
            }
            notes.push(s);
        }
        (Some(y), Some(c)) if y > c => {
            let at = conventional_errors.map_or(String::new(), |e| {
                format!(" At n = {c} the Youden threshold gives α* = {} and β* = {}.", sig3(e.alpha), sig3(e.beta))
            });
            notes.push(format!(
                "The n that makes the design conclusive ({y}) exceeds the conventional n ({c}) although the limits are equal: \
                 the threshold of least total error need not put each error exactly at its limit when the sampling \
                 distributions are not mirror images of each other (noncentral t, binomial).{at}"
            ));
        }
        _ => {}
    }
    if let (Some(y), Some(s)) = (youden, stable) {
        if s > y {
            notes.push(format!(
                "Exact binomial errors saw-tooth with n: n = {y} is conclusive, but some larger n are not; every n from {s} on is conclusive (checked up to the bound stated)."
            ));
        }
    }
    notes
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::design::{DesignSpec, Family};
    use crate::engine::threshold::Alternative;

    /// method.md §5: d = 0.3, α_max = .05, β_max = .2, one-sided z test:
    /// 121 (Youden) vs 69 (conventional). The conventional value is the
    /// textbook ((z.95 + z.80)/d)² = 68.7 → 69 (common practice, no source);
    /// the Youden value needs Φ(−0.15·√n) ≤ .05, i.e. n ≥ (2·1.6449/0.3)² =
    /// 120.3 → 121.
    #[test]
    fn z_test_youden_versus_conventional() {
        let spec = DesignSpec {
            family: Some(Family::MeanZ),
            alternative: Some(Alternative::Greater),
            d: Some(0.3),
            alpha_max: Some(0.05),
            beta_max: Some(0.2),
            ..Default::default()
        };
        let design = Design::new(&spec).unwrap();
        let s = sample_size(&design).unwrap();
        assert_eq!(s.youden.map(|g| g.n1), Some(121));
        assert_eq!(s.conventional.map(|g| g.n1), Some(69));
        assert!(s.solves < 40, "{} solves", s.solves);
        let w = s.balancing_weight.unwrap();
        let weighted = Design::new(&DesignSpec { weight: Some(w), ..spec }).unwrap();
        let sw = sample_size(&weighted).unwrap();
        assert!(sw.youden.unwrap().n1 <= 69, "{:?}", sw.youden);
        println!("{:?} {}", s.notes, w);
    }
}
