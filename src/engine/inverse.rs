//! The inverse question: the smallest effect that a given n makes
//! conclusive (the design's other inputs fixed).
//!
//! The effect is moved from θ0 toward the side of the analyst's θ1; the
//! verdict is monotone in the effect for the continuous families, so a
//! bisection finds the boundary. The exact binomial can saw-tooth in the
//! effect too, so there a scan over 400 steps finds the first conclusive
//! step before the bisection refines it.

use super::design::{Design, Effect};
use super::evaluate::{EvaluateError, Evaluation, Planned, evaluate, within};
use serde::Serialize;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SmallestEffect {
    pub n1: u64,
    /// θ1 (or p1) at the boundary, on the alternative's side; `None` when no
    /// effect in range makes the design conclusive at this n.
    pub theta1: Option<f64>,
    /// The same as a standardised effect d = (θ1 − θ0)/σ, for mean families.
    pub d: Option<f64>,
    pub at_boundary: Option<Evaluation>,
    pub method: &'static str,
}

/// Largest standardised effect the search considers for mean families.
const D_MAX: f64 = 40.0;

/// θ1 at position u ∈ (0, 1] of the way from θ0 to the end of the range.
fn theta_at(design: &Design, u: f64) -> f64 {
    let (theta0, theta1) = design.effect.thetas();
    let s = if theta1 >= theta0 { 1.0 } else { -1.0 };
    match design.effect {
        Effect::Mean { sigma, .. } => theta0 + s * u * D_MAX * sigma,
        // The range reaches a standardised shift of D_MAX whatever the
        // variance floor ρ.
        Effect::CrossVal { sigma, rho, .. } => theta0 + s * u * D_MAX * sigma * (1.0 + rho).sqrt(),
        Effect::Welch { sigma1, sigma2, .. } => theta0 + s * u * D_MAX * ((sigma1 * sigma1 + sigma2 * sigma2) / 2.0).sqrt(),
        Effect::Proportion { p0, .. } => {
            let room = if s > 0.0 { 1.0 - p0 } else { p0 };
            p0 + s * u * room * (1.0 - 1e-9)
        }
        Effect::TwoProportions { p2, .. } => {
            let room = if s > 0.0 { 1.0 - p2 } else { p2 };
            s * u * room * (1.0 - 1e-9)
        }
        // The accuracy difference p10 − p01 reaches ±ψ (every discordant
        // item won by one classifier).
        Effect::Classifiers { psi, .. } => s * u * psi,
    }
}

fn standardised(design: &Design, theta1: f64) -> Option<f64> {
    match design.effect {
        Effect::Mean { theta0, sigma, .. } | Effect::CrossVal { theta0, sigma, .. } => Some((theta1 - theta0) / sigma),
        _ => None,
    }
}

/// The smallest effect that makes the design conclusive at n1.
pub fn smallest_effect(design: &Design, n1: u64) -> Result<SmallestEffect, EvaluateError> {
    let ok = |u: f64| -> Result<bool, EvaluateError> {
        let d = design.with_theta1(theta_at(design, u));
        Ok(within(&d, &Planned::new(&d).at(n1)?))
    };
    let discrete = design.family.discrete();
    let method = if discrete {
        "scan in 400 steps, then bisection between the last failing and the first conclusive step"
    } else {
        "bisection on the effect (the verdict is monotone in the effect)"
    };
    let (mut lo, mut hi) = (0.0, 1.0);
    if discrete {
        let steps = 400;
        let mut first = None;
        for i in 1..=steps {
            let u = i as f64 / steps as f64;
            if ok(u)? {
                first = Some(u);
                break;
            }
        }
        match first {
            Some(u) => {
                lo = u - 1.0 / steps as f64;
                hi = u;
            }
            None => return Ok(SmallestEffect { n1, theta1: None, d: None, at_boundary: None, method }),
        }
    } else if !ok(1.0)? {
        return Ok(SmallestEffect { n1, theta1: None, d: None, at_boundary: None, method });
    }
    for _ in 0..60 {
        let m = 0.5 * (lo + hi);
        if ok(m)? { hi = m } else { lo = m }
        if hi - lo <= 1e-12 * hi {
            break;
        }
    }
    let theta1 = theta_at(design, hi);
    let boundary = design.with_theta1(theta1);
    Ok(SmallestEffect { n1, theta1: Some(theta1), d: standardised(design, theta1), at_boundary: Some(evaluate(&boundary, n1)?), method })
}
