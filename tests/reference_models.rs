//! The model-comparison families against an independent reference:
//! `tests/reference/models.json`, written by `tests/reference/gen_models.py`
//! with SciPy, statsmodels and mpmath (versions in the file) from the
//! conventions in DEVELOPERS.md ("Comparing models"). c*, α*, β*, the
//! estimate-scale threshold, the noncentrality and the conventional power
//! within 1e-9 relative; verdicts and sample sizes exact; a design that no
//! number of splits makes conclusive says so, with the reference's
//! smallest conclusive difference as its note writes it.
//!
//! `two_classifiers`: the conditional thresholds k*_m (and their ties),
//! α_m, β_m and the conventional level-α_max test at m; the unconditional
//! α(n), β(n) and conventional figures averaged over m ~ Bin(n, ψ); the
//! decisions from a 2 × 2 table (threshold, statistic, estimate, p-value,
//! outcome); the smallest conclusive n, the stable-from n and its bound, and
//! Connor's (1987) conventional n, one of them his published 248 pairs.

use serde_json::Value;
use tern::engine::decision::{Outcome, decide};
use tern::engine::evaluate::{Evaluation, Rule, evaluate, evaluate_observed, sig3};
use tern::engine::model::Observed;
use tern::engine::request::parse_value;
use tern::engine::sample_size::sample_size;

const TOLERANCE: f64 = 1e-9;

fn cases() -> Vec<Value> {
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/models.json"))
        .expect("tests/reference/models.json (python3 tests/reference/gen_models.py)");
    let v: Value = serde_json::from_str(&text).unwrap();
    v["cases"].as_array().unwrap().clone()
}

fn close(name: &str, what: &str, got: f64, want: f64) {
    let err = (got - want).abs() / want.abs().max(1e-300);
    assert!(err <= TOLERANCE || got == want, "{name}: {what} is {got}, the reference {want} (relative error {err:.1e})");
}

fn num(e: &Value, key: &str, name: &str) -> f64 {
    e[key].as_f64().unwrap_or_else(|| panic!("{name}: the reference lacks {key}"))
}

#[test]
fn two_learners_cv_matches_the_reference() {
    let mut counts = [0usize; 3];
    for case in cases().iter().filter(|c| c["design"]["family"] == "two_learners_cv") {
        let name = case["name"].as_str().unwrap();
        let e = &case["expect"];
        let parsed = parse_value(&case["design"]);
        match case["kind"].as_str().unwrap() {
            "refused" => {
                assert!(parsed.is_err(), "{name}: accepted, but the reference refuses it ({})", e["rule"]);
                counts[2] += 1;
            }
            "at_n" => {
                let req = parsed.unwrap_or_else(|err| panic!("{name}: {err}"));
                let n = req.n.unwrap_or_else(|| panic!("{name}: no n"));
                let at = evaluate(&req.design, n).unwrap_or_else(|err| panic!("{name}: {err}"));
                close(name, "α*", at.alpha, num(e, "alpha_star", name));
                close(name, "β*", at.beta, num(e, "beta_star", name));
                close(name, "conventional power", at.conventional.power, num(e, "conventional_power", name));
                close(name, "noncentrality", at.noncentrality.unwrap(), num(e, "noncentrality", name));
                assert_eq!(at.conclusive, e["conclusive"].as_bool().unwrap(), "{name}: conclusive");
                // One-sided: the threshold on the estimate's scale; two-sided:
                // the half-width on it (the reference's reading), θ0 ± that.
                let (theta0, _) = req.design.effect.thetas();
                let (c, est) = match at.rule {
                    Rule::Above { statistic, estimate } | Rule::Below { statistic, estimate } => (statistic, estimate),
                    Rule::Outside { half_width, estimate_high, .. } => (half_width, estimate_high - theta0),
                    ref other => panic!("{name}: rule {other:?}"),
                };
                close(name, "c*", c, num(e, "c_star", name));
                close(name, "threshold on the estimate's scale", est, num(e, "estimate_threshold", name));
                counts[0] += 1;
            }
            "sample_size" => {
                let req = parsed.unwrap_or_else(|err| panic!("{name}: {err}"));
                let s = sample_size(&req.design).unwrap_or_else(|err| panic!("{name}: {err}"));
                assert_eq!(s.youden.map(|g| g.n1), e["n_youden"].as_u64(), "{name}: the smallest conclusive J");
                if e["never_conclusive"].as_bool() == Some(true) {
                    assert!(s.never, "{name}: not marked as never conclusive");
                    let least = sig3(num(e, "smallest_conclusive_theta1", name));
                    assert!(s.notes[0].contains(&format!("θ1 = {least}")), "{name}: the note does not name θ1 = {least}: {}", s.notes[0]);
                } else {
                    assert!(!s.never, "{name}: marked as never conclusive");
                    assert_eq!(s.conventional.map(|g| g.n1), e["n_conventional"].as_u64(), "{name}: the conventional J");
                }
                counts[1] += 1;
            }
            other => panic!("{name}: unknown kind {other}"),
        }
    }
    println!("two_learners_cv: {} designs at n, {} sample sizes, {} refusals", counts[0], counts[1], counts[2]);
    assert!(counts[0] >= 40 && counts[1] >= 10 && counts[2] >= 1, "{counts:?}");
}

/// The count thresholds of an evaluation as the reference writes them:
/// k for one-sided rules (k_star), [k_low, k_high] two-sided (null for an
/// empty side).
fn counts(at: &Evaluation, rule: &Rule, name: &str) -> Value {
    let side = |k: Option<i64>| k.map_or(Value::Null, Value::from);
    match *rule {
        Rule::AtLeast { k, .. } | Rule::AtMost { k, .. } => Value::from(k),
        // Never: for one side the count past the support, as the reference
        // writes it (m + 1 above, −1 below).
        Rule::Never => match at.model.setup.alternative {
            tern::engine::threshold::Alternative::Greater => Value::from(at.model.n1 as i64 + 1),
            tern::engine::threshold::Alternative::Less => Value::from(-1),
            tern::engine::threshold::Alternative::TwoSided => Value::Array(vec![Value::Null, Value::Null]),
        },
        Rule::Always => match at.model.setup.alternative {
            tern::engine::threshold::Alternative::Greater => Value::from(0),
            tern::engine::threshold::Alternative::Less => Value::from(at.model.n1 as i64),
            tern::engine::threshold::Alternative::TwoSided => Value::Array(vec![Value::Null, Value::Null]),
        },
        Rule::OutsideCounts { k_low, k_high, .. } => Value::Array(vec![side(k_low), side(k_high)]),
        ref other => panic!("{name}: rule {other:?}"),
    }
}

#[test]
fn two_classifiers_match_the_reference() {
    let mut tally = [0usize; 5];
    for case in cases().iter().filter(|c| c["design"]["family"] == "two_classifiers") {
        let name = case["name"].as_str().unwrap();
        let e = &case["expect"];
        let mut design = case["design"].clone();
        let m = design.as_object_mut().and_then(|o| o.remove("m")).and_then(|v| v.as_u64());
        let parsed = parse_value(&design);
        match case["kind"].as_str().unwrap() {
            "refused" => {
                assert!(parsed.is_err(), "{name}: accepted, but the reference refuses it ({})", e["rule"]);
                tally[4] += 1;
            }
            "conditional" => {
                let req = parsed.unwrap_or_else(|err| panic!("{name}: {err}"));
                let m = m.unwrap_or_else(|| panic!("{name}: no m"));
                let at = evaluate_observed(&req.design, m, None, &Observed::default()).unwrap_or_else(|err| panic!("{name}: {err}"));
                close(name, "α_m", at.alpha, num(e, "alpha_star", name));
                close(name, "β_m", at.beta, num(e, "beta_star", name));
                close(name, "conventional α_m", at.conventional.alpha, num(e, "conventional_alpha", name));
                close(name, "conventional power at m", at.conventional.power, num(e, "conventional_power", name));
                assert_eq!(at.conclusive, e["conclusive"].as_bool().unwrap(), "{name}: conclusive");
                let two_sided = e.get("k_star").is_none();
                let want = if two_sided { serde_json::json!([e["k_low"], e["k_high"]]) } else { e["k_star"].clone() };
                assert_eq!(counts(&at, &at.rule, name), want, "{name}: k*_m");
                let ties: Vec<Value> = if at.ties.is_empty() { vec![counts(&at, &at.rule, name)] } else { at.ties.iter().map(|t| counts(&at, t, name)).collect() };
                assert_eq!(Value::Array(ties), e["ties"], "{name}: the tied thresholds");
                tally[0] += 1;
            }
            "at_n" => {
                let req = parsed.unwrap_or_else(|err| panic!("{name}: {err}"));
                let n = req.n.unwrap_or_else(|| panic!("{name}: no n"));
                let at = evaluate(&req.design, n).unwrap_or_else(|err| panic!("{name}: {err}"));
                close(name, "α(n)", at.alpha, num(e, "alpha_star", name));
                close(name, "β(n)", at.beta, num(e, "beta_star", name));
                close(name, "conventional α(n)", at.conventional.alpha, num(e, "conventional_alpha", name));
                close(name, "conventional power(n)", at.conventional.power, num(e, "conventional_power", name));
                assert_eq!(at.conclusive, e["conclusive"].as_bool().unwrap(), "{name}: conclusive");
                assert_eq!(at.n1, n, "{name}: n items");
                tally[1] += 1;
            }
            "decision" => {
                let req = parsed.unwrap_or_else(|err| panic!("{name}: {err}"));
                let data = req.data.unwrap_or_else(|| panic!("{name}: no data"));
                let d = decide(&req.design, &data).unwrap_or_else(|err| panic!("{name}: {err}"));
                assert_eq!(d.at_n.n1, e["m"].as_u64().unwrap(), "{name}: m");
                close(name, "α_m", d.at_n.alpha, num(e, "alpha_star", name));
                close(name, "β_m", d.at_n.beta, num(e, "beta_star", name));
                close(name, "p-value", d.conventional.p_value, num(e, "p_value", name));
                close(name, "estimate", d.estimate, num(e, "estimate", name));
                assert_eq!(d.statistic, num(e, "statistic", name), "{name}: X = b");
                assert_eq!(counts(&d.at_n, &d.at_n.rule, name), e["c_star"], "{name}: the threshold for m");
                let outcome = match d.outcome {
                    Outcome::RejectH0 => "reject_h0",
                    Outcome::DoNotRejectH0 => "do_not_reject_h0",
                    Outcome::Inconclusive => "inconclusive",
                };
                assert_eq!(outcome, e["outcome"].as_str().unwrap(), "{name}: outcome");
                tally[2] += 1;
            }
            "sample_size" => {
                let req = parsed.unwrap_or_else(|err| panic!("{name}: {err}"));
                let s = sample_size(&req.design).unwrap_or_else(|err| panic!("{name}: {err}"));
                assert_eq!(s.youden.map(|g| g.n1), e["n_youden"].as_u64(), "{name}: the smallest conclusive n");
                assert_eq!(s.stable_from.map(|g| g.n1), e["n_stable"].as_u64(), "{name}: stable from");
                assert_eq!(s.checked_to, e["checked_to"].as_u64(), "{name}: checked to");
                assert_eq!(s.conventional.map(|g| g.n1), e["n_conventional"].as_u64(), "{name}: Connor's n");
                tally[3] += 1;
            }
            other => panic!("{name}: unknown kind {other}"),
        }
    }
    println!("two_classifiers: {} conditional, {} at n, {} decisions, {} sample sizes, {} refusals", tally[0], tally[1], tally[2], tally[3], tally[4]);
    assert!(tally[0] >= 40 && tally[1] >= 40 && tally[2] >= 40 && tally[3] >= 10 && tally[4] >= 5, "{tally:?}");
}

/// Connor (1987, Biometrics 43:207–211): p10 = .125, p01 = .25, two-sided
/// α = .05, power .90 → 248 pairs (the example issue 12 quotes).
#[test]
fn connor_1987_example() {
    let req = parse_value(&serde_json::json!({
        "family": "two_classifiers", "alternative": "two_sided", "acc1": 0.6, "acc2": 0.725, "discordant": 0.375,
        "alpha_max": 0.05, "beta_max": 0.1
    }))
    .unwrap();
    assert_eq!(tern::engine::discordant::connor_n(&req.design), Some(248));
}
