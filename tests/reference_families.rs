//! The engine against an independent reference: `tests/reference/families.json`,
//! written by `tests/reference/gen_families.py` with SciPy and statsmodels
//! (versions in the file's header), and `exact_large.json` (the exact
//! binomial at large n, by `gen_exact_large.py` with the same builder). Every family, every alternative; c*, α*,
//! β* within 1e-9 relative, sample sizes exact.

use serde_json::Value;
use tern::engine::decision::{Outcome, decide};
use tern::engine::evaluate::{Evaluation, Rule, evaluate};
use tern::engine::request::parse_value;
use tern::engine::sample_size::sample_size;

const REL: f64 = 1e-9;

fn close(what: &str, case: &str, got: f64, want: f64, worst: &mut f64, failures: &mut Vec<String>) {
    let err = (got - want).abs() / want.abs().max(1e-300);
    let ok = (got - want).abs() <= REL * want.abs().max(got.abs()) + 1e-300;
    if want.abs() > 1e-13 {
        *worst = worst.max(err);
    }
    if !ok {
        failures.push(format!("{case}: {what} = {got:e}, reference {want:e} (relative error {err:.2e})"));
    }
}

fn num(v: &Value, key: &str) -> Option<f64> {
    v.get(key).and_then(Value::as_f64)
}

/// The threshold's statistic-scale value and estimate-scale value (two-sided:
/// half-widths).
fn threshold(e: &Evaluation) -> Option<(f64, f64)> {
    match e.rule {
        Rule::Above { statistic, estimate } | Rule::Below { statistic, estimate } => Some((statistic, estimate)),
        Rule::Outside { half_width, estimate_high, estimate_low, .. } => Some((half_width, 0.5 * (estimate_high - estimate_low))),
        _ => None,
    }
}

fn conventional_threshold(e: &Evaluation) -> Option<f64> {
    match e.conventional.rule {
        Rule::Above { statistic, .. } | Rule::Below { statistic, .. } => Some(statistic),
        Rule::Outside { half_width, .. } => Some(half_width),
        _ => None,
    }
}

fn counts(rule: &Rule) -> (Option<i64>, Option<i64>, Option<i64>) {
    match *rule {
        Rule::AtLeast { k, .. } | Rule::AtMost { k, .. } => (Some(k), None, None),
        Rule::OutsideCounts { k_low, k_high, .. } => (None, k_low, k_high),
        _ => (None, None, None),
    }
}

fn int(v: &Value, key: &str) -> Option<Option<i64>> {
    v.get(key).map(|x| x.as_i64())
}

#[test]
fn families_match_the_reference() {
    let checked = check_file("families.json");
    assert!(checked >= 200, "only {checked} reference cases");
}

/// The exact binomial at n ≈ 31,000 and 62,000 (p0 = .5 against .51, both
/// alternatives), where the two-sided walk stops early: written by
/// `tests/reference/gen_exact_large.py` with the same SciPy case builder.
#[test]
fn large_exact_binomial_matches_the_reference() {
    let checked = check_file("exact_large.json");
    assert_eq!(checked, 10);
}

/// Check every case of one reference file in tests/reference/; returns how
/// many were checked.
fn check_file(file: &str) -> usize {
    let path = format!("{}/tests/reference/{file}", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path} is committed: {e}"));
    let doc: Value = serde_json::from_str(&text).expect("the reference file is JSON");
    let cases = doc["cases"].as_array().expect("cases");
    let mut failures = Vec::new();
    let mut worst = 0.0f64;
    let mut checked = 0;
    for case in cases {
        let name = case["name"].as_str().unwrap_or("?");
        let expect = &case["expect"];
        let req = match parse_value(&case["design"]) {
            Ok(r) => r,
            Err(e) => {
                failures.push(format!("{name}: design refused: {e}"));
                continue;
            }
        };
        let design = &req.design;
        checked += 1;
        match case["kind"].as_str() {
            Some("at_n") => {
                let n = req.n.expect("at_n cases give n");
                let e = match evaluate(design, n) {
                    Ok(e) => e,
                    Err(err) => {
                        failures.push(format!("{name}: {err}"));
                        continue;
                    }
                };
                if let Some(c) = num(expect, "c_star") {
                    match threshold(&e) {
                        Some((t, est)) => {
                            close("c*", name, t, c, &mut worst, &mut failures);
                            if let Some(x) = num(expect, "estimate_threshold") {
                                close("c* on the estimate scale", name, est, x, &mut worst, &mut failures);
                            }
                        }
                        None => failures.push(format!("{name}: rule {:?} has no finite threshold", e.rule)),
                    }
                    if let (Some(c), Some(t)) = (num(expect, "conventional_critical"), conventional_threshold(&e)) {
                        close("conventional critical value", name, t, c, &mut worst, &mut failures);
                    }
                } else {
                    let (k, lo, hi) = counts(&e.rule);
                    if let Some(want) = int(expect, "k_star") {
                        if k != want {
                            failures.push(format!("{name}: k* = {k:?}, reference {want:?}"));
                        }
                    }
                    if let (Some(wl), Some(wh)) = (int(expect, "k_low"), int(expect, "k_high")) {
                        if (lo, hi) != (wl, wh) {
                            failures.push(format!("{name}: region ({lo:?}, {hi:?}), reference ({wl:?}, {wh:?})"));
                        }
                    }
                    if let Some(ties) = expect.get("ties").and_then(Value::as_array) {
                        let want: Vec<i64> = ties.iter().filter_map(Value::as_i64).collect();
                        let got: Vec<i64> = if e.ties.is_empty() {
                            k.into_iter().collect()
                        } else {
                            e.ties.iter().filter_map(|t| counts(t).0).collect()
                        };
                        if want.len() > 1 && got != want {
                            failures.push(format!("{name}: ties {got:?}, reference {want:?}"));
                        }
                    }
                    if let Some(a) = num(expect, "conventional_alpha") {
                        close("conventional α", name, e.conventional.alpha, a, &mut worst, &mut failures);
                    }
                }
                close("α*", name, e.alpha, num(expect, "alpha_star").unwrap_or(f64::NAN), &mut worst, &mut failures);
                close("β*", name, e.beta, num(expect, "beta_star").unwrap_or(f64::NAN), &mut worst, &mut failures);
                if let Some(p) = num(expect, "conventional_power") {
                    close("conventional power", name, e.conventional.power, p, &mut worst, &mut failures);
                }
                if let Some(c) = expect.get("conclusive").and_then(Value::as_bool) {
                    if c != e.conclusive {
                        failures.push(format!("{name}: conclusive = {}, reference {c}", e.conclusive));
                    }
                }
            }
            Some("sample_size") => {
                let s = match sample_size(design) {
                    Ok(s) => s,
                    Err(err) => {
                        failures.push(format!("{name}: {err}"));
                        continue;
                    }
                };
                for (key, got) in [
                    ("n_youden", s.youden.map(|g| g.n1)),
                    ("n_conventional", s.conventional.map(|g| g.n1)),
                    ("n_stable", s.stable_from.map(|g| g.n1)),
                    ("checked_to", s.checked_to),
                ] {
                    if let Some(want) = expect.get(key) {
                        let want = want.as_u64();
                        if got != want {
                            failures.push(format!("{name}: {key} = {got:?}, reference {want:?}"));
                        }
                    }
                }
            }
            Some("decision") => {
                let Some(data) = req.data else {
                    failures.push(format!("{name}: decision case without data"));
                    continue;
                };
                let d = match decide(design, &data) {
                    Ok(d) => d,
                    Err(err) => {
                        failures.push(format!("{name}: {err}"));
                        continue;
                    }
                };
                close("statistic", name, d.statistic, num(expect, "statistic").unwrap_or(f64::NAN), &mut worst, &mut failures);
                close("p-value", name, d.conventional.p_value, num(expect, "p_value").unwrap_or(f64::NAN), &mut worst, &mut failures);
                if let (Some(c), Some((t, _))) = (num(expect, "c_star"), threshold(&d.at_n)) {
                    close("c* at the data's n", name, t, c, &mut worst, &mut failures);
                }
                close("α* at the data's n", name, d.at_n.alpha, num(expect, "alpha_star").unwrap_or(f64::NAN), &mut worst, &mut failures);
                close("β* at the data's n", name, d.at_n.beta, num(expect, "beta_star").unwrap_or(f64::NAN), &mut worst, &mut failures);
                let want = match expect["outcome"].as_str() {
                    Some("reject_h0") => Some(Outcome::RejectH0),
                    Some("do_not_reject_h0") => Some(Outcome::DoNotRejectH0),
                    Some("inconclusive") => Some(Outcome::Inconclusive),
                    _ => None,
                };
                if want != Some(d.outcome) {
                    failures.push(format!("{name}: outcome {:?}, reference {want:?}", d.outcome));
                }
            }
            other => failures.push(format!("{name}: unknown kind {other:?}")),
        }
    }
    println!("{file}: checked {checked} reference cases; worst relative error {worst:.2e}");
    assert!(failures.is_empty(), "{file}: {} of {checked} cases differ:\n{}", failures.len(), failures.join("\n"));
    checked
}
