//! Two classifiers at n test items: the unconditional error rates of the
//! exact conditional test, averaged over the number of discordant items
//! m ~ Bin(n, ψ), and the sample-size scans over n (DEVELOPERS.md,
//! "Comparing models").
//!
//! A decision is conditional on the observed m: its threshold is the
//! discrete Youden threshold k*_m of X | m ~ Bin(m, ½) against Bin(m, q)
//! (`Design::model_observed` at m, solved by `evaluate::solve_with_work`,
//! m = 0 never rejecting). Planned at n items, the rates are
//! α(n) = Σ_m P(m)·α_m and β(n) = Σ_m P(m)·β_m.
//!
//! Architecture invariant: this is the only place that averages over m, and
//! each k*_m is the decision's own threshold, solved once per m and kept.
//! The terms are summed outward from the mode of Bin(n, ψ) until the rest of
//! each tail, bounded geometrically, is below 1e-17 of the smallest nonzero
//! sum, or its terms fall below 1e-300 (DEVELOPERS.md: terms below 1e-300
//! may be left out).

use super::design::{Design, Effect};
use super::dist::{Binomial, Continuous, Discrete, Normal};
use super::evaluate::{EvaluateError, solve_with_work, within};
use super::conventional::discrete_level;
use super::model::{Observed, Sampling};
use super::sample_size::{DISCRETE_SOLVE_BUDGET, Found, N_MAX_DISCRETE, Progress, WORK_PER_SOLVE, smallest_monotone};
use super::threshold::{Alternative, Errors};
use std::collections::HashMap;

/// Mixture terms summed per unit of the search's budget (one threshold
/// solve): a term is a multiply, an add and a look-up, some 2,000 times
/// cheaper than a solve over a few hundred counts.
const TERMS_PER_SOLVE: u64 = 20_000;

/// A tail's remainder below this share of the smallest nonzero sum ends it.
const RELATIVE_REST: f64 = 1e-17;

/// Mixture weights below this are left out.
const SMALLEST_TERM: f64 = 1e-300;

/// The design's rates at n items, averaged over m.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Averaged {
    /// α(n), β(n) of the conditional Youden thresholds.
    pub youden: Errors,
    /// The same for the exact conditional test at level α_max (its β is
    /// 1 − power).
    pub conventional: Errors,
}

#[derive(Debug, Clone, Copy)]
struct PerM {
    youden: Errors,
    conventional: Option<Errors>,
}

/// The conditional thresholds of one design, solved as the sums need them.
#[derive(Debug, Clone)]
pub struct Mixture {
    design: Design,
    psi: f64,
    per_m: HashMap<u64, PerM>,
    terms: u64,
    /// Work so far in threshold solves (a solve over more than
    /// `WORK_PER_SOLVE` counts charged as several), terms included.
    pub work: usize,
}

impl Mixture {
    /// None for every family but two classifiers.
    pub fn new(design: &Design) -> Option<Mixture> {
        let (psi, _) = design.effect.discordant()?;
        Some(Mixture { design: *design, psi, per_m: HashMap::new(), terms: 0, work: 0 })
    }

    /// The conditional rates at m (the conventional ones too when asked).
    fn at_m(&mut self, m: u64, conventional: bool) -> Result<PerM, EvaluateError> {
        if let Some(p) = self.per_m.get(&m)
            && (p.conventional.is_some() || !conventional)
        {
            return Ok(*p);
        }
        let model = self.design.model_observed(m, None, &Observed::default())?;
        let youden = match self.per_m.get(&m) {
            Some(p) => p.youden,
            None => {
                let (_, e, _, work) = solve_with_work(&model)?;
                self.work += 1 + usize::try_from(work / WORK_PER_SOLVE).unwrap_or(usize::MAX / 4);
                e
            }
        };
        let conventional = if conventional {
            self.work += 1;
            Some(conventional_at(&self.design, &model)?)
        } else {
            None
        };
        let p = PerM { youden, conventional };
        self.per_m.insert(m, p);
        Ok(p)
    }

    /// α(n), β(n) (and the conventional test's with `conventional`).
    pub fn at(&mut self, n: u64, conventional: bool) -> Result<Averaged, EvaluateError> {
        let weights = Binomial::new(n, self.psi)?;
        let mode = (((n + 1) as f64 * self.psi).floor() as u64).min(n);
        // [α, β, conventional α, conventional β].
        let mut sums = [0.0f64; 4];
        let add = |this: &mut Mixture, m: u64, w: f64, sums: &mut [f64; 4]| -> Result<(), EvaluateError> {
            let p = this.at_m(m, conventional)?;
            sums[0] += w * p.youden.alpha;
            sums[1] += w * p.youden.beta;
            if let Some(c) = p.conventional {
                sums[2] += w * c.alpha;
                sums[3] += w * c.beta;
            }
            this.terms += 1;
            Ok(())
        };
        let top = weights.pmf(mode);
        add(self, mode, top, &mut sums)?;
        let odds = self.psi / (1.0 - self.psi);
        // Upward: P(m + 1)/P(m) = (n − m)/(m + 1)·ψ/(1 − ψ), falling in m.
        let (mut m, mut w) = (mode, top);
        while m < n {
            let r = (n - m) as f64 / (m + 1) as f64 * odds;
            let next = w * r;
            if next < SMALLEST_TERM || !next.is_finite() || (r < 1.0 && next / (1.0 - r) < rest_tolerance(&sums)) {
                break;
            }
            m += 1;
            w = next;
            add(self, m, w, &mut sums)?;
        }
        // Downward: P(m − 1)/P(m) = m/(n − m + 1)·(1 − ψ)/ψ, falling as m falls.
        let (mut m, mut w) = (mode, top);
        while m > 0 {
            let r = m as f64 / (n - m + 1) as f64 / odds;
            let next = w * r;
            if next < SMALLEST_TERM || !next.is_finite() || (r < 1.0 && next / (1.0 - r) < rest_tolerance(&sums)) {
                break;
            }
            m -= 1;
            w = next;
            add(self, m, w, &mut sums)?;
        }
        self.work += usize::try_from(self.terms / TERMS_PER_SOLVE).unwrap_or(0);
        self.terms %= TERMS_PER_SOLVE;
        let clamp = |x: f64| x.clamp(0.0, 1.0);
        Ok(Averaged {
            youden: Errors { alpha: clamp(sums[0]), beta: clamp(sums[1]) },
            conventional: Errors { alpha: clamp(sums[2]), beta: clamp(sums[3]) },
        })
    }
}

/// RELATIVE_REST of the smallest nonzero sum (0 while every sum is 0).
fn rest_tolerance(sums: &[f64; 4]) -> f64 {
    sums.iter().copied().filter(|s| *s > 0.0).fold(f64::INFINITY, f64::min).min(f64::MAX) * RELATIVE_REST
}

/// The exact conditional test at level α_max for one m: its α and β.
fn conventional_at(design: &Design, model: &super::model::Model) -> Result<Errors, EvaluateError> {
    let Sampling::Discrete { h0, h1 } = &model.sampling else { return Ok(Errors { alpha: 0.0, beta: 1.0 }) };
    if h0.support_max() == 0 {
        return Ok(Errors { alpha: 0.0, beta: 1.0 });
    }
    Ok(discrete_level(h0, h1, design.alternative, model.setup.centre, design.alpha_max)?.1)
}

/// Connor's (1987, Biometrics 43:207–211) normal-approximation sample size
/// of the conditional test: n = (z·√ψ + z_β·√(ψ − δ²))²/δ², δ = acc1 −
/// acc2, z = z_{1−α_max} one-sided or z_{1−α_max/2} two-sided, z_β =
/// z_{1−β_max}, rounded up. None when it is not a number up to
/// [`N_MAX_DISCRETE`].
pub fn connor_n(design: &Design) -> Option<u64> {
    let Effect::Classifiers { acc1, acc2, psi } = design.effect else { return None };
    let delta = acc1 - acc2;
    let level = if design.alternative == Alternative::TwoSided { design.alpha_max / 2.0 } else { design.alpha_max };
    let z = Normal::STANDARD.quantile_upper(level).ok()?;
    let zb = Normal::STANDARD.quantile_upper(design.beta_max).ok()?;
    let n = (z * psi.sqrt() + zb * (psi - delta * delta).max(0.0).sqrt()).powi(2) / (delta * delta);
    // A relative slack keeps 248.000000000001 at 248.
    let n = (n * (1.0 - 1e-12)).ceil();
    (n.is_finite() && n >= 1.0 && n <= N_MAX_DISCRETE as f64).then_some(n as u64)
}

/// The sample-size scans for two classifiers: the smallest conclusive n,
/// the n from which every n up to max(2n, n + 100) is conclusive, and
/// Connor's conventional n. The Youden scan starts at a bound no
/// conclusive n lies below: conclusive needs w·α(n) + (1 − w)·β(n) ≤
/// w·α_max + (1 − w)·β_max, and the weighted error of every rule at m is at
/// least that of the one-sided rule toward q (the likelihood-ratio rule,
/// the best of all rules at m), which never rises with m, so its average
/// never rises with n: the smallest n where that average meets the bound
/// is found by bisection. Work is shared with
/// `sample_size::DISCRETE_SOLVE_BUDGET`; `quick` and `progress` as in
/// `sample_size::search`.
pub fn search(design: &Design, quick: Option<usize>, progress: &mut dyn FnMut(Progress)) -> Result<Option<Found>, EvaluateError> {
    let Some(mut mixture) = Mixture::new(design) else { return Err(EvaluateError::Unfinished) };
    let Some((_, q)) = design.effect.discordant() else { return Err(EvaluateError::Unfinished) };
    let max = N_MAX_DISCRETE.min(design.n_max());
    let toward = if q > 0.5 { Alternative::Greater } else { Alternative::Less };
    let mut best = Mixture::new(&Design { alternative: toward, ..*design }).ok_or(EvaluateError::Unfinished)?;
    let limit = design.weight * design.alpha_max + (1.0 - design.weight) * design.beta_max;
    let spent = |a: &Mixture, b: &Mixture| a.work + b.work;
    let mut out_of_time = false;
    let from = smallest_monotone(1, max, |n| {
        if quick.is_some_and(|budget| spent(&mixture, &best) >= budget) || spent(&mixture, &best) >= DISCRETE_SOLVE_BUDGET {
            // Give up on the bound, not on the search: start lower.
            out_of_time = true;
            return Ok(true);
        }
        progress(Progress { stage: "finding the smallest conclusive n", n, fraction: None });
        let e = best.at(n, false)?.youden;
        // A relative slack for the rounding of both sums.
        Ok(design.weight * e.alpha + (1.0 - design.weight) * e.beta <= limit * (1.0 + 1e-9))
    })?;
    if out_of_time && quick.is_some() {
        return Ok(None);
    }
    let from = if out_of_time { 1 } else { from.map_or(max, |n| n.saturating_sub(2).max(1)) };
    let mut stopped_at = None;
    let mut youden = None;
    let budget_gone = |mx: &Mixture, b: &Mixture| spent(mx, b) >= DISCRETE_SOLVE_BUDGET;
    for n in from..=max {
        if quick.is_some_and(|budget| spent(&mixture, &best) >= budget) {
            return Ok(None);
        }
        progress(Progress { stage: "finding the smallest conclusive n", n, fraction: None });
        if budget_gone(&mixture, &best) {
            stopped_at = Some(n);
            break;
        }
        if within(design, &mixture.at(n, false)?.youden) {
            youden = Some(n);
            break;
        }
    }
    let (mut stable_from, mut checked_to) = (None, None);
    if let Some(first) = youden {
        let bound = (2 * first).max(first + 100).min(max);
        let mut last_fail = None;
        let mut checked = bound;
        for n in first..=bound {
            if quick.is_some_and(|budget| spent(&mixture, &best) >= budget) {
                return Ok(None);
            }
            progress(Progress {
                stage: "checking that every larger n stays conclusive",
                n,
                fraction: Some((n - first) as f64 / (bound - first).max(1) as f64),
            });
            if budget_gone(&mixture, &best) && n > first {
                checked = n - 1;
                stopped_at = Some(n);
                break;
            }
            if !within(design, &mixture.at(n, false)?.youden) {
                last_fail = Some(n);
            }
        }
        stable_from = Some(last_fail.map_or(first, |f| f + 1));
        checked_to = Some(checked);
    }
    Ok(Some(Found {
        youden,
        stable_from,
        checked_to,
        conventional: connor_n(design),
        stopped_at,
        conventional_stopped_at: None,
        solves: spent(&mixture, &best),
        max,
    }))
}
