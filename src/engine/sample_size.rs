//! Sample-size search: the smallest n (per group) that makes the design
//! conclusive, beside the conventional n (level α_max, power 1 − β_max).
//!
//! Continuous families: α*(n) and β*(n) fall with n, so the search guesses
//! n from the probit margins of a few solves (they grow about like √n) and
//! confirms that n passes and n − 1 fails, with bisection and doubling as
//! safeguards: about four threshold solves, and by construction n − 1
//! fails. Discrete families saw-tooth: the
//! search scans upward and also reports the smallest n from which every n up
//! to a stated bound stays conclusive.

use super::design::{Design, Effect, N_MAX};
use super::dist::{Continuous, Discrete, Normal};
use super::evaluate::{EvaluateError, Evaluation, Planned, evaluate, sig3, within};
use super::conventional::{continuous_level, discrete_level_near};
use super::threshold::DiscreteCut;
use std::cell::Cell;
use super::model::Sampling;
use super::threshold::{ContinuousCut, Errors};
use serde::{Deserialize, Serialize};

/// The first n a guided search probes: large enough that the t families'
/// heavy tails at tiny df do not distort the √n extrapolation.
const GUIDED_START: u64 = 10;

/// Largest n scanned for the exact binomial (one solve per n).
pub const N_MAX_DISCRETE: u64 = 200_000;

/// Threshold solves the count families' Youden scan and stable-from check
/// may use together. Past it the search stops and says at which n: a solve
/// costs from about 1 µs to 0.6 ms natively (two-sided, laws far apart,
/// n near 10^5), so without it an extreme design (a limit of 1e-300) kept
/// the page busy for minutes. p0 = .5 against .51 two-sided finds its
/// Youden n (30,934) within it and checks the stable range up to about
/// 40,500 instead of 61,868, saying so.
pub const DISCRETE_SOLVE_BUDGET: usize = 25_000;

/// The work of one solve in the budget's unit: a solve that walks more
/// counts than this (far-apart windows, a weight near 0 or 1 that sends
/// the walk across the whole window) is charged one solve per this many,
/// so the budget holds the time to a few seconds whatever the design.
pub const WORK_PER_SOLVE: u64 = 250;

/// Sample sizes the count families' conventional scan may try, from the
/// randomized Neyman–Pearson bound on. Each costs a bisection of O(log n)
/// tails; a design whose conventional n lies tens of thousands past that
/// bound (a level of 1e-300) stops here and says so. Ordinary designs need
/// a few hundred at most: the bound is the power of the best test at the
/// same level.
pub const CONVENTIONAL_SCAN_BUDGET: u64 = 25_000;

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
    /// Counts: the n at which the scan stopped because its budget of
    /// threshold solves ([`DISCRETE_SOLVE_BUDGET`]) ran out; no smaller n is
    /// conclusive. `None`: the search ran its course.
    pub stopped_at: Option<u64>,
    /// The search goes on elsewhere (the page's worker): nothing above is
    /// found yet. Never set in the command line's answers.
    #[serde(skip_serializing_if = "std::ops::Not::not")]
    pub pending: bool,
    /// The design's limit as n grows is not conclusive, so no n is (the
    /// first note says why): no search ran.
    #[serde(skip_serializing_if = "std::ops::Not::not")]
    pub never: bool,
}

impl SampleSize {
    /// The answer while the search goes on elsewhere.
    pub fn pending(design: &Design) -> SampleSize {
        let max = if design.family.discrete() { N_MAX_DISCRETE } else { N_MAX }.min(design.n_max());
        SampleSize {
            youden: None,
            searched_up_to: max,
            stable_from: None,
            checked_to: None,
            conventional: None,
            at_youden: None,
            balancing_weight: None,
            notes: Vec::new(),
            solves: 0,
            stopped_at: None,
            pending: true,
            never: false,
        }
    }
}

fn sizes(design: &Design, n1: u64) -> GroupSizes {
    let n2 = design.n2(n1);
    GroupSizes { n1, n2, n_total: n1 + n2.unwrap_or(0) }
}

/// α*, β* at n1 (planning values), counting solves.
pub fn errors_at(design: &Design, n1: u64, solves: &mut usize) -> Result<Errors, EvaluateError> {
    // A solve that walked more than WORK_PER_SOLVE counts is charged as
    // several, so the budget bounds the time and not only the number.
    let mut planned = Planned::new(design);
    let errors = planned.at(n1)?;
    *solves += planned.work;
    Ok(errors)
}

/// The conventional power at n1.
pub fn conventional_power(design: &Design, n1: u64) -> Result<f64, EvaluateError> {
    conventional_power_near(design, n1, &Cell::new(None))
}

/// [`conventional_power`] for a scan over n: `near` holds the two-sided
/// count test's half-width at the previous n, where the search starts,
/// and is updated.
fn conventional_power_near(design: &Design, n1: u64, near: &Cell<Option<f64>>) -> Result<f64, EvaluateError> {
    let m = design.model(n1)?;
    let e = match &m.sampling {
        Sampling::Continuous { h0, h1 } => continuous_level(h0, h1, design.alternative, m.setup.centre, design.alpha_max)?.1,
        Sampling::Discrete { h0, h1 } => {
            let (cut, e) = discrete_level_near(h0, h1, design.alternative, m.setup.centre, design.alpha_max, near.get())?;
            if let DiscreteCut::Outside { half_width, .. } = cut {
                near.set(Some(half_width));
            }
            e
        }
    };
    Ok(1.0 - e.beta)
}

/// Smallest n in [lo, max] where `ok` holds, for a predicate that is false
/// then true: doubling then bisection. `None` when false at `max`.
pub(super) fn smallest_monotone<F>(lo: u64, max: u64, mut ok: F) -> Result<Option<u64>, EvaluateError>
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

/// One evaluation of a guided search: whether n passes, and a score that
/// guides the next guess (see [`smallest_guided`]).
struct Probe {
    pass: bool,
    /// About linear in √n, ≥ 0 where n passes; only a guide.
    score: f64,
    /// The probit of the binding limit: score + this is about ∝ √n.
    scale: f64,
}

/// Upper-tail probit: z with P(Z > z) = e (±∞ at 0 and 1, NaN outside).
fn probit_upper(e: f64) -> f64 {
    Normal::STANDARD.quantile_upper(e.clamp(0.0, 1.0)).unwrap_or(f64::NAN)
}

/// The Youden probe at n: the smaller probit margin of α* and β* to their
/// limits. For a location shift by Δ·√n, −Φ⁻¹(α*) and −Φ⁻¹(β*) grow like
/// √n, which is what the guided search exploits.
fn youden_probe(design: &Design, n: u64, solves: &mut usize) -> Result<Probe, EvaluateError> {
    let e = errors_at(design, n, solves)?;
    let (za, zb) = (probit_upper(design.alpha_max), probit_upper(design.beta_max));
    let (ma, mb) = (probit_upper(e.alpha) - za, probit_upper(e.beta) - zb);
    let (score, scale) = if ma <= mb { (ma, za) } else { (mb, zb) };
    Ok(Probe { pass: within(design, &e), score, scale })
}

/// The conventional probe at n: the probit margin of the power.
fn conventional_probe(design: &Design, n: u64) -> Result<Probe, EvaluateError> {
    let power = conventional_power(design, n)?;
    let z = probit_upper(design.beta_max);
    Ok(Probe { pass: power >= 1.0 - design.beta_max, score: -probit_upper(power) - z, scale: z })
}

/// Smallest n in [lo, max] where the probe passes, for a pass/fail pattern
/// that is false then true, found by guessing and confirming: each guess
/// is the secant root of the probes' scores on the √n scale (from one
/// probe, score + scale ∝ √n), clamped inside the bracket of the largest
/// failing and smallest passing n seen; after three probes in a row on the
/// same side of the answer the next is a bisection (or, with no passing n
/// yet, a doubling). It stops when n passes and n − 1 fails, so
/// the answer is the one doubling and bisection give, with a handful of
/// probes when the score is close to linear in √n. `None` when `max`
/// fails. Falls back to [`smallest_monotone`] if the probes contradict a
/// false-then-true pattern.
fn smallest_guided<F>(lo: u64, max: u64, start: u64, mut probe: F) -> Result<Option<u64>, EvaluateError>
where
    F: FnMut(u64) -> Result<Probe, EvaluateError>,
{
    let (mut fail, mut pass): (Option<u64>, Option<u64>) = (None, None);
    let mut points: Vec<(f64, f64, f64)> = Vec::new();
    // How many probes in a row moved the same end of the bracket.
    let (mut same_side, mut last_side) = (0usize, None);
    // max(lo).min(max), not clamp: clamp panics if a caller ever passes lo > max.
    let mut n = start.max(lo).min(max);
    for _ in 0..200 {
        let p = probe(n)?;
        if p.pass {
            pass = Some(pass.map_or(n, |q| q.min(n)));
        } else {
            fail = Some(fail.map_or(n, |f| f.max(n)));
        }
        if let (Some(f), Some(q)) = (fail, pass)
            && f >= q
        {
            // Not false-then-true after all: the plain search decides.
            return smallest_monotone(lo, max, |n| Ok(probe(n)?.pass));
        }
        points.push(((n as f64).sqrt(), p.score, p.scale));
        match (fail, pass) {
            (_, Some(q)) if q == lo => return Ok(Some(lo)),
            (Some(f), Some(q)) if q == f + 1 => return Ok(Some(q)),
            (Some(f), None) if f == max => return Ok(None),
            _ => {}
        }
        same_side = if last_side == Some(p.pass) { same_side + 1 } else { 0 };
        last_side = Some(p.pass);
        let low = fail.map_or(lo, |f| f + 1);
        let high = pass.map_or(max, |q| q - 1);
        // Growth is limited while no n passes, so a poor guess costs little.
        let reach = if pass.is_some() { high } else { high.min(fail.map_or(lo, |f| f).saturating_mul(16)).max(low) };
        let guess = predict(&points).filter(|g| g.is_finite() && *g > 0.0);
        n = match guess {
            Some(r) if same_side < 2 => {
                let g = (r * r).ceil().min(u64::MAX as f64 / 2.0) as u64;
                g.clamp(low, reach)
            }
            _ => match (fail, pass) {
                (Some(f), Some(q)) => f + (q - f) / 2,
                (Some(f), None) => f.saturating_mul(2).clamp(low, high),
                (None, Some(q)) => lo + (q - lo) / 2,
                (None, None) => low,
            },
        };
        if same_side >= 2 {
            same_side = 0;
        }
    }
    smallest_monotone(lo, max, |n| Ok(probe(n)?.pass))
}

/// Where the score reaches 0 on the √n scale: the secant through the last
/// two probes, or from one probe the line through the origin of
/// score + scale.
fn predict(points: &[(f64, f64, f64)]) -> Option<f64> {
    match points {
        [] => None,
        [(x, s, z)] => {
            let r = x * z / (s + z);
            (s + z > 0.0).then_some(r)
        }
        [.., (x1, s1, _), (x2, s2, _)] => {
            if !(s1.is_finite() && s2.is_finite()) || s1 == s2 || x1 == x2 {
                return predict(&points[points.len() - 1..]);
            }
            Some(x2 - s2 * (x2 - x1) / (s2 - s1))
        }
    }
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

/// The miss rate 1 − power of the same test as [`randomized_power`],
/// computed from the tails directly, so that it keeps its accuracy where
/// the power rounds to 1 (β_max below 1e-16).
fn randomized_miss<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, upward: bool, level: f64) -> Result<f64, EvaluateError> {
    Ok(if upward {
        // Accept X < j fully, X = j with probability 1 − γ.
        let j = h0.quantile_upper(level)?;
        let gamma = ((level - h0.sf(j)) / h0.pmf(j)).clamp(0.0, 1.0);
        let below = if j == 0 { 0.0 } else { h1.cdf(j - 1) };
        below + if gamma.is_finite() { (1.0 - gamma) * h1.pmf(j) } else { h1.pmf(j) }
    } else {
        // Accept X > j fully, X = j with probability 1 − γ.
        let j = h0.quantile(level)?;
        let below0 = if j == 0 { 0.0 } else { h0.cdf(j - 1) };
        let gamma = ((level - below0) / h0.pmf(j)).clamp(0.0, 1.0);
        h1.sf(j) + if gamma.is_finite() { (1.0 - gamma) * h1.pmf(j) } else { h1.pmf(j) }
    })
}

/// The smallest n (minus a margin of 2 for rounding) at which the
/// randomized most powerful test reaches power 1 − β_max; see
/// [`randomized_power`]. With `direct_miss` the miss rate is compared with
/// β_max instead (the Youden criterion β* ≤ β_max, exact for tiny β_max);
/// without it the power is compared with 1 − β_max in floating point, as
/// the conventional criterion does.
fn randomized_bound(design: &Design, lo: u64, max: u64, direct_miss: bool) -> Result<Option<u64>, EvaluateError> {
    let (theta0, theta1) = design.effect.thetas();
    let upward = theta1 > theta0;
    let target = 1.0 - design.beta_max;
    let ok = |n: u64| -> Result<bool, EvaluateError> {
        let m = design.model(n)?;
        match &m.sampling {
            Sampling::Discrete { h0, h1 } if direct_miss => {
                // A relative slack for the rounding of both miss rates.
                Ok(randomized_miss(h0, h1, upward, design.alpha_max)? <= design.beta_max * (1.0 + 1e-9))
            }
            Sampling::Discrete { h0, h1 } => Ok(randomized_power(h0, h1, upward, design.alpha_max)? >= target),
            Sampling::Continuous { .. } => Ok(true),
        }
    };
    Ok(smallest_monotone(lo, max, ok)?.map(|n| n.saturating_sub(2).max(lo)))
}

/// What the scans found: the expensive part of the search, as plain
/// numbers, so that a Web Worker can run it and hand it to the page, which
/// then finishes the answer with a few solves ([`finish`]).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Found {
    pub youden: Option<u64>,
    pub stable_from: Option<u64>,
    pub checked_to: Option<u64>,
    pub conventional: Option<u64>,
    /// Where the Youden scan or the stable check ran out of its budget.
    pub stopped_at: Option<u64>,
    /// Where the conventional scan ran out of its budget.
    pub conventional_stopped_at: Option<u64>,
    pub solves: usize,
    /// The largest n searched.
    pub max: u64,
}

/// Where a search stands, for a progress bar: the stage in words, the n
/// reached and, where the stage's length is known, the share done.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Progress {
    pub stage: &'static str,
    pub n: u64,
    pub fraction: Option<f64>,
}

/// Work a quick search (the page's, on its main thread) may do before it
/// hands the search to a worker: this many solves (weighted as in
/// [`DISCRETE_SOLVE_BUDGET`]) and as many conventional steps, a few tens
/// of milliseconds.
pub const QUICK_WORK: usize = 200;

/// The smallest conclusive n and the conventional n: [`search`] then
/// [`finish`].
pub fn sample_size(design: &Design) -> Result<SampleSize, EvaluateError> {
    match search(design, None, &mut |_| {})? {
        Some(found) => finish(design, &found),
        // Without a quick budget the search always finishes.
        None => Err(EvaluateError::Unfinished),
    }
}

/// The scans of the sample-size search. With `quick` = Some(work), None
/// when the search would do more than that (the caller runs it again
/// elsewhere, without); `progress` hears where it stands, at every n.
pub fn search(design: &Design, quick: Option<usize>, progress: &mut dyn FnMut(Progress)) -> Result<Option<Found>, EvaluateError> {
    if design.effect.discordant().is_some() {
        return super::discordant::search(design, quick, progress);
    }
    let mut solves = 0usize;
    let lo = design.n_min();
    let discrete = design.family.discrete();
    // Two groups: n2 = ⌈ratio·n1⌉ must stay within N_MAX too.
    let max = if discrete { N_MAX_DISCRETE } else { N_MAX }.min(design.n_max());
    let ok = |n: u64, solves: &mut usize| -> Result<bool, EvaluateError> { Ok(within(design, &errors_at(design, n, solves)?)) };
    // Counts: no n below the randomized Neyman–Pearson bound can be
    // conclusive or reach the conventional power, so the scans start there.
    let scan_from = if discrete { randomized_bound(design, lo, max, false)?.unwrap_or(max) } else { lo };
    let mut stopped_at = None;
    let youden = if discrete {
        // No n whose most powerful test misses more than β_max can be conclusive.
        match randomized_bound(design, scan_from, max, true)? {
            Some(from) => {
                let mut found = None;
                for n in from..=max {
                    if quick.is_some_and(|q| solves >= q) {
                        return Ok(None);
                    }
                    progress(Progress { stage: "finding the smallest conclusive n", n, fraction: None });
                    if solves >= DISCRETE_SOLVE_BUDGET {
                        stopped_at = Some(n);
                        break;
                    }
                    if ok(n, &mut solves)? {
                        found = Some(n);
                        break;
                    }
                }
                found
            }
            None => None,
        }
    } else {
        // A design whose limit as n grows is not conclusive is conclusive
        // at no n (the corrected resampled t's variance floor).
        if limit_blocks(design)? { None } else { smallest_guided(lo, max, GUIDED_START, |n| youden_probe(design, n, &mut solves))? }
    };
    let (mut stable_from, mut checked_to) = (None, None);
    if discrete && let Some(first) = youden {
        let bound = (2 * first).max(first + 100).min(max);
        let mut last_fail = None;
        let mut checked = bound;
        for n in first..=bound {
            if quick.is_some_and(|q| solves >= q) {
                return Ok(None);
            }
            progress(Progress { stage: "checking that every larger n stays conclusive", n, fraction: Some((n - first) as f64 / (bound - first).max(1) as f64) });
            // The budget may cut the check short: the bound reported is
            // then the last n checked, and a note says so.
            if solves >= DISCRETE_SOLVE_BUDGET && n > first {
                checked = n - 1;
                stopped_at = Some(n);
                break;
            }
            if !ok(n, &mut solves)? {
                last_fail = Some(n);
            }
        }
        stable_from = Some(last_fail.map_or(first, |f| f + 1));
        checked_to = Some(checked);
    }
    let target = 1.0 - design.beta_max;
    let near = Cell::new(None);
    let conv_ok = |n: u64| -> Result<bool, EvaluateError> { Ok(conventional_power_near(design, n, &near)? >= target) };
    let mut conventional_stopped_at = None;
    let conventional = if discrete {
        let last = scan_from.saturating_add(CONVENTIONAL_SCAN_BUDGET - 1).min(max);
        let mut steps = 0usize;
        let mut out_of_time = false;
        let found = smallest_scan(scan_from, last, |n| {
            steps += 1;
            if quick.is_some_and(|q| steps > q) {
                out_of_time = true;
                return Ok(true);
            }
            progress(Progress { stage: "finding the conventional n", n, fraction: None });
            conv_ok(n)
        })?;
        if out_of_time {
            return Ok(None);
        }
        if found.is_none() && last < max {
            conventional_stopped_at = Some(last + 1);
        }
        found
    } else {
        smallest_guided(lo, max, GUIDED_START, |n| conventional_probe(design, n))?
    };
    Ok(Some(Found { youden, stable_from, checked_to, conventional, stopped_at, conventional_stopped_at, solves, max }))
}

/// The answer from what the scans found: the design at the Youden n, the
/// conventional errors, the balancing weight and the notes (a few solves).
pub fn finish(design: &Design, found: &Found) -> Result<SampleSize, EvaluateError> {
    let Found { youden, stable_from, checked_to, conventional, stopped_at, conventional_stopped_at, mut solves, max } = *found;
    let discrete = design.family.discrete();
    let target = 1.0 - design.beta_max;
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
    let mut notes = notes(design, youden, conventional, stable_from, balancing_weight, max, conventional_errors);
    let floored = floor(design)?;
    let never = floored.is_some();
    if let Some(f) = floored {
        notes.retain(|x| !x.starts_with("No sample size up to"));
        notes.insert(0, f);
    }
    if let Some(n) = stopped_at {
        let said = match youden {
            None => format!(
                "The search stopped at n = {n} per group: its budget of {DISCRETE_SOLVE_BUDGET} threshold solves (a solve over more than \
                 {WORK_PER_SOLVE} counts counting as several) ran out before any n was conclusive (no smaller n is). Larger limits or a \
                 larger effect need far smaller samples."
            ),
            Some(_) => format!(
                "Every n from the stable point was checked only up to {}: the search's budget of {DISCRETE_SOLVE_BUDGET} threshold \
                 solves (a solve over more than {WORK_PER_SOLVE} counts counting as several) ran out there.",
                n - 1
            ),
        };
        // The budget's note replaces the claim that no n up to the bound works.
        notes.retain(|x| !(youden.is_none() && x.starts_with("No sample size up to")));
        notes.insert(0, said);
    }
    if let Some(n) = conventional_stopped_at {
        notes.push(format!(
            "The conventional test's search stopped at n = {n} per group: its budget of {CONVENTIONAL_SCAN_BUDGET} sample sizes ran \
             out before its power reached {} (no smaller n reaches it).",
            sig3(target)
        ));
    }
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
        stopped_at,
        pending: false,
        never,
    })
}

/// Is the design's limit as n grows (`Design::limit_model`) not
/// conclusive, so that no n is? One solve of the limit's normal laws.
fn limit_blocks(design: &Design) -> Result<bool, EvaluateError> {
    match design.limit_model() {
        Some(limit) => Ok(!within(design, &super::evaluate::solve(&limit)?.1)),
        None => Ok(false),
    }
}

/// When the design's limit as n grows (`Design::limit_model`) is not
/// conclusive, no n is: the sentence saying so, with the variance floor
/// and the smallest effect whose limit is conclusive (bisection on the
/// limit's normal shift, 200 steps at most). None for every other design.
fn floor(design: &Design) -> Result<Option<String>, EvaluateError> {
    let Some(limit) = design.limit_model() else { return Ok(None) };
    let (_, errors, _) = super::evaluate::solve(&limit)?;
    if within(design, &errors) {
        return Ok(None);
    }
    let Effect::CrossVal { theta0, theta1, sigma, rho } = design.effect else { return Ok(None) };
    let side = if theta1 >= theta0 { 1.0 } else { -1.0 };
    let scale = sigma * rho.sqrt();
    let conclusive_at = |shift: f64| -> Result<bool, EvaluateError> {
        let d = design.with_theta1(theta0 + side * shift * scale);
        Ok(match d.limit_model() {
            Some(m) => within(&d, &super::evaluate::solve(&m)?.1),
            None => false,
        })
    };
    // A normal shift of 80 SDs is conclusive for every limit above 1e-300.
    let (mut lo, mut hi) = (0.0, 80.0);
    let least = if conclusive_at(hi)? {
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if conclusive_at(mid)? { hi = mid } else { lo = mid }
            if hi - lo <= 1e-9 * hi {
                break;
            }
        }
        Some(theta0 + side * hi * scale)
    } else {
        None
    };
    let least = least.map_or(String::new(), |l| format!(" The smallest difference that any number of splits can make conclusive is θ1 = {}.", sig3(l)));
    Ok(Some(format!(
        "No number of splits makes this design conclusive: the corrected statistic's variance, σ²·(1/J + n_test/n_train), never falls below \
         σ²·n_test/n_train = {} (the training sets overlap), so even endless splits leave α* = {} and β* = {} against your limits {} and {}.{least}",
        sig3(sigma * sigma * rho),
        sig3(errors.alpha),
        sig3(errors.beta),
        sig3(design.alpha_max),
        sig3(design.beta_max)
    )))
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
    if let (Some(y), Some(s)) = (youden, stable)
        && s > y
    {
        notes.push(format!(
            "Exact binomial errors saw-tooth with n: n = {y} is conclusive, but some larger n are not; every n from {s} on is conclusive (checked up to the bound stated)."
        ));
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
        let spec = DesignSpec::new(Family::MeanZ, Alternative::Greater).with("d", 0.3).with("alpha_max", 0.05).with("beta_max", 0.2);
        let design = Design::new(&spec).unwrap();
        let s = sample_size(&design).unwrap();
        assert_eq!(s.youden.map(|g| g.n1), Some(121));
        assert_eq!(s.conventional.map(|g| g.n1), Some(69));
        assert!(s.solves < 40, "{} solves", s.solves);
        let w = s.balancing_weight.unwrap();
        let weighted = Design::new(&spec.clone().with("weight", w)).unwrap();
        let sw = sample_size(&weighted).unwrap();
        assert!(sw.youden.unwrap().n1 <= 69, "{:?}", sw.youden);
        println!("{:?} {}", s.notes, w);
    }
}
