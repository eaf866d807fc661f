//! The decision's confidence interval and standardised effect size against
//! an independent reference: `tests/reference/intervals.json`, written by
//! `tests/reference/gen_intervals.py` from the formulas with SciPy,
//! statsmodels, NumPy and mpmath (versions in the file's header). Every
//! family, both sidedness conventions for the default level, explicit
//! levels, and the edges (0 and n successes, n = 1, unequal groups, Welch's
//! fractional degrees of freedom).
//!
//! Each case goes through the JSON contract's parser (so `interval_level`
//! is read as a user gives it), then `interval::confidence_interval` and
//! `interval::effect_size`, and, where the decision is defined, through
//! `decide_at_level`, which must report the same figures. A bound's error
//! is relative to the larger of the bound and the interval's half-width
//! (a bound near 0 is computed as estimate ± half-width, so its accuracy
//! is the half-width's); an effect size's is relative to itself.
//! `cargo test --test reference_intervals -- --nocapture` prints the worst
//! error per family, with its case.

use std::collections::BTreeMap;

use serde_json::Value;
use tern::engine::decision::decide_at_level;
use tern::engine::interval::{confidence_interval, default_level, effect_size};
use tern::engine::request::parse_value;

/// Relative tolerance for bounds and effect sizes: about 100 × the worst
/// error observed, rounded up (2026-12-10; the run prints the current
/// worst). Worst observed: t bounds 1.1e-13 (mean_t and paired_t at one
/// degree of freedom and level .999, the t quantile's own error), Welch
/// 1.1e-13, pooled 5.5e-14, z 9.5e-15, Clopper–Pearson 2.0e-15, Wald
/// 2.9e-16; effect sizes 1.0e-14 (d), 1.6e-15 (h).
const TOLERANCE: f64 = 1e-11;

/// The level set by the default rule must match to rounding.
const LEVEL_TOLERANCE: f64 = 1e-15;

#[test]
fn intervals_and_effect_sizes_match_the_reference() {
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/intervals.json")).unwrap();
    let file: Value = serde_json::from_str(&text).unwrap();
    let cases = file["cases"].as_array().unwrap();
    assert!(cases.len() >= 400, "only {} cases", cases.len());
    let mut failures = Vec::new();
    let mut worst: BTreeMap<String, (f64, String)> = BTreeMap::new();
    let mut note = |family: &str, what: &str, err: f64, name: &str| {
        let e = worst.entry(format!("{family} {what}")).or_insert((0.0, String::new()));
        if err > e.0 || e.1.is_empty() {
            *e = (err, name.to_string());
        }
    };
    for case in cases {
        let name = case["name"].as_str().unwrap();
        let mut request = case["design"].clone();
        request["data"] = case["data"].clone();
        let req = match parse_value(&request) {
            Ok(r) => r,
            Err(e) => {
                failures.push(format!("{name}: refused: {e}"));
                continue;
            }
        };
        let design = req.design;
        let data = req.data.unwrap();
        let family = design.family.id();
        let want_level = case["level"].as_f64().unwrap();
        let level = match req.interval_level {
            Some(l) => l,
            None => default_level(design.alternative, design.alpha_max).unwrap(),
        };
        if (level - want_level).abs() > LEVEL_TOLERANCE {
            failures.push(format!("{name}: level {level}, reference {want_level}"));
        }
        let expect = &case["expect"];
        let (want_low, want_high, want_effect) =
            (expect["low"].as_f64().unwrap(), expect["high"].as_f64().unwrap(), expect["effect_size"].as_f64().unwrap());
        let interval = match confidence_interval(&design, &data, level) {
            Ok(i) => i,
            Err(e) => {
                failures.push(format!("{name}: no interval: {e}"));
                continue;
            }
        };
        let half = 0.5 * (want_high - want_low);
        for (what, got, want) in [("bounds", interval.low, want_low), ("bounds", interval.high, want_high)] {
            let scale = want.abs().max(half);
            let err = if scale == 0.0 { got.abs() } else { (got - want).abs() / scale };
            note(family, what, err, name);
            if err.is_nan() || err > TOLERANCE {
                failures.push(format!("{name}: bound {got:e}, reference {want:e} (error {err:.1e})"));
            }
        }
        if let Some(df) = expect.get("df").and_then(Value::as_f64) {
            let shown = if family == "two_means_welch" { format!("{df:.1} degrees") } else { format!("{df} degrees") };
            if !interval.method.contains(&shown) {
                failures.push(format!("{name}: the method {:?} does not state {shown}", interval.method));
            }
        }
        let effect = match effect_size(&design, &data) {
            Ok(e) => e,
            Err(e) => {
                failures.push(format!("{name}: no effect size: {e}"));
                continue;
            }
        };
        let err = if want_effect == 0.0 { effect.value.abs() } else { (effect.value - want_effect).abs() / want_effect.abs() };
        note(family, "effect size", err, name);
        if err.is_nan() || err > TOLERANCE {
            failures.push(format!("{name}: effect size {:e}, reference {want_effect:e} (error {err:.1e})", effect.value));
        }
        if case["decides"].as_bool().unwrap() {
            match decide_at_level(&design, &data, req.interval_level) {
                Ok(d) => {
                    if d.interval.as_ref() != Some(&interval) || d.effect_size.as_ref() != Some(&effect) || !d.omitted.is_empty() {
                        failures.push(format!("{name}: the decision reports {:?} and {:?} ({:?})", d.interval, d.effect_size, d.omitted));
                    }
                    if !(interval.low <= d.estimate && d.estimate <= interval.high) {
                        failures.push(format!("{name}: the estimate {} lies outside its interval", d.estimate));
                    }
                }
                Err(e) => failures.push(format!("{name}: the decision refused: {e}")),
            }
        }
    }
    println!("worst relative error (tolerance {TOLERANCE:e}):");
    for (what, (err, name)) in &worst {
        println!("  {what:32} {err:.2e}  {name}");
    }
    assert!(failures.is_empty(), "{} failures:\n{}", failures.len(), failures.join("\n"));
}
