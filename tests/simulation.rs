//! The simulation check (`engine::simulate`): its reproducibility, its
//! refusals, its population shapes and its realised error rates.
//!
//! Expected values come from outside Tern: `tests/reference/simulation.json`
//! is written by `tests/reference/gen_simulation.py`, an independent NumPy
//! and SciPy simulation of the same cases (`simulation_cases.json`) with its
//! own generator, and SciPy's moments of the same distributions.

use serde_json::Value;
use tern::engine::data_file;
use tern::engine::request::{self, RequestError};
use tern::engine::simulate::shape::{Kind, Population, ShapeSpec};
use tern::engine::simulate::{Simulation, stream};
use tern::engine::simulate::{BLOCK, Plan, Tally};

fn plan(text: &str) -> Plan {
    let req = request::parse(text).unwrap();
    request::simulation_plan(&req, None).unwrap()
}

fn refusal(text: &str) -> String {
    match request::parse(text).and_then(|r| request::simulate(&r, None)) {
        Ok(_) => panic!("accepted: {text}"),
        Err(e) => e.to_string(),
    }
}

const POOLED: &str = r#"{"family": "two_means_pooled", "alternative": "less", "theta0": 0, "theta1": -3, "sigma": 6,
    "alpha_max": 0.1, "beta_max": 0.1, "n": 56, "dropout": 0.15"#;

/// The same seed gives the same counts and sample however the blocks are
/// shared out: one run, or blocks run apart and merged in order (as the
/// page's workers do).
#[test]
fn blocks_shared_out_give_the_same_numbers() {
    let p = plan(&format!(r#"{POOLED}, "simulation": {{"shape": "gamma", "skewness": 2, "replicates": 2600, "seed": 7}}}}"#));
    assert_eq!(p.blocks(), 2600u64.div_ceil(BLOCK));
    let whole = p.run();
    for split in [[0, 1, 6], [0, 3, 6], [0, 5, 6]] {
        let mut merged = Tally::default();
        for w in split.windows(2) {
            merged.merge(&p.run_blocks(w[0]..w[1]));
        }
        assert_eq!(merged, whole, "split {split:?}");
    }
    assert_eq!(whole.h0.replicates, 2600);
    assert_eq!(whole.sample_h0.len(), 2000);
    // A block past the end adds nothing.
    assert_eq!(p.run_blocks(6..9), Tally::default());
    // Another seed, other numbers.
    let other = plan(&format!(r#"{POOLED}, "simulation": {{"shape": "gamma", "skewness": 2, "replicates": 2600, "seed": 8}}}}"#)).run();
    assert_ne!(other.sample_h0, whole.sample_h0);
}

/// Each refusal names the field and the rule.
#[test]
fn refusals_name_the_field() {
    let with = |block: &str| format!(r#"{POOLED}, "simulation": {block}}}"#);
    let cases = [
        (with(r#"{"replicates": 100, "seed": 1}"#), "simulation.shape is missing"),
        (with(r#"{"shape": "normal", "seed": 1}"#), "simulation.replicates is missing"),
        (with(r#"{"shape": "normal", "replicates": 100}"#), "simulation.seed is missing"),
        (with(r#"{"shape": "normal", "replicates": 0, "seed": 1}"#), "simulation.replicates is 0"),
        (with(r#"{"shape": "normal", "replicates": 1.5, "seed": 1}"#), "simulation.replicates is 1.5"),
        (with(r#"{"shape": "normal", "replicates": 100, "seed": -1}"#), "simulation.seed is -1"),
        (with(r#"{"shape": "normal", "replicates": 100, "seed": 1e300}"#), "simulation.seed is 1e300"),
        (with(r#"{"shape": "cauchy", "replicates": 100, "seed": 1}"#), "simulation.shape is \"cauchy\""),
        (with(r#"{"shape": "bernoulli", "replicates": 100, "seed": 1}"#), "a shape of measurements"),
        (with(r#"{"shape": "gamma", "replicates": 100, "seed": 1}"#), "simulation.skewness is missing"),
        (with(r#"{"shape": "gamma", "skewness": 0, "replicates": 100, "seed": 1}"#), "simulation.skewness is 0"),
        (with(r#"{"shape": "heavy_tailed", "df": 2, "replicates": 100, "seed": 1}"#), "simulation.df is 2"),
        (with(r#"{"shape": "normal", "df": 4, "replicates": 100, "seed": 1}"#), "simulation.df is not a field here"),
        (with(r#"{"shape": "normal", "replicats": 100, "seed": 1}"#), "did you mean simulation.replicates"),
        (with(r#"{"shape": "resample", "replicates": 100, "seed": 1}"#), "load a data file"),
        (
            with(r#"{"shape": "normal", "replicates": 1000000, "seed": 1}"#).replace(r#""n": 56"#, r#""n": 5000"#),
            "simulation.replicates (now 1000000)",
        ),
        (with(r#""normal""#), "simulation is \"normal\""),
        (POOLED.to_string() + "}", "simulation is missing"),
    ];
    for (text, wanted) in cases {
        let m = refusal(&text);
        assert!(m.contains(wanted), "{text}\n  gave: {m}\n  wanted: {wanted}");
    }
}

/// A resampled population needs the family's number of groups, each of two
/// finite values at least.
#[test]
fn resampling_checks_its_groups() {
    let req = request::parse(&format!(r#"{POOLED}, "simulation": {{"shape": "resample", "replicates": 100, "seed": 1}}}}"#)).unwrap();
    let e = |g: Vec<Vec<f64>>| match request::simulate(&req, Some(g)) {
        Err(RequestError::Simulation(e)) => e.to_string(),
        other => panic!("{other:?}"),
    };
    assert!(e(vec![vec![1.0, 2.0]]).contains("needs 2"));
    assert!(e(vec![vec![1.0, 2.0], vec![3.0]]).contains("group 2"));
    assert!(e(vec![vec![1.0, f64::NAN], vec![3.0, 4.0]]).contains("group 1"));
    // Every value the same: each data set has an SD of 0, so none can be decided.
    let same = request::simulate(&req, Some(vec![vec![5.0; 10], vec![5.0; 10]])).unwrap().simulation;
    assert_eq!(same.no_decision.h0, 100);
    assert_eq!(same.threshold_rule.under_h0.inconclusive.unwrap().count, 100);
    assert_eq!(same.conventional_rule.alpha.count, 0);
}

fn reference() -> Value {
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/simulation.json"))
        .expect("tests/reference/simulation.json (python3 tests/reference/gen_simulation.py)");
    serde_json::from_str(&text).unwrap()
}

fn cases() -> Vec<Value> {
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/simulation_cases.json")).unwrap();
    let v: Value = serde_json::from_str(&text).unwrap();
    v["cases"].as_array().unwrap().clone()
}

/// Tern's simulation of one case (with its data file for `resample`).
fn run_case(case: &Value) -> Simulation {
    let mut design = case["design"].as_object().unwrap().clone();
    design.insert("simulation".into(), case["simulation"].clone());
    let text = Value::Object(design).to_string();
    match case["data_file"].as_str() {
        Some(file) => {
            let bytes = std::fs::read(format!("{}/{file}", env!("CARGO_MANIFEST_DIR"))).unwrap();
            data_file::simulate_with_file(&text, &bytes, file).unwrap().simulation
        }
        None => request::simulate(&request::parse(&text).unwrap(), None).unwrap().simulation,
    }
}

/// A share's Monte Carlo standard error at the expected value p.
fn se(p: f64, r: f64) -> f64 {
    (p * (1.0 - p) / r).sqrt()
}

/// Normal data and independent yes/no outcomes at the planned size: the
/// decision path's realised α and β lie within 4 Monte Carlo standard
/// errors of the analytic α*, β* (SciPy's, in simulation.json), and the
/// conventional rule's α within 4 of its level (exact families: the
/// attained α). For the normal approximations to the binomial the
/// expected values are the reference's exact sums over every binomial
/// outcome (`enumerated`): their analytic level is only approximate,
/// which the simulation rightly shows.
#[test]
fn normal_data_match_the_model() {
    let reference = reference();
    let mut checked = 0;
    for case in cases() {
        let sim = &case["simulation"];
        if !matches!(sim["shape"].as_str(), Some("normal" | "bernoulli")) || case["design"].get("dropout").is_some() {
            continue;
        }
        let name = case["name"].as_str().unwrap();
        let refcase = reference["cases"].as_array().unwrap().iter().find(|c| c["name"] == name).unwrap();
        let expected = refcase.get("enumerated").unwrap_or(&refcase["analytic"]);
        let s = run_case(&case);
        let r = s.replicates as f64;
        let f = |k: &str| expected[k].as_f64().unwrap();
        let figures = [
            ("alpha", s.threshold_rule.alpha.share, f("alpha")),
            ("beta", s.threshold_rule.beta.share, f("beta")),
            ("conventional alpha", s.conventional_rule.alpha.share, f("conventional_alpha")),
            ("conventional power", 1.0 - s.conventional_rule.beta.share, f("conventional_power")),
        ];
        for (what, got, want) in figures {
            let z = (got - want) / se(want, r);
            assert!(z.abs() <= 4.0, "{name}: {what} realised {got}, expected {want} ({z:+.1} SE)");
        }
        checked += 1;
    }
    assert!(checked >= 20, "{checked} designs checked");
}

/// Every case, every shape (skewed, heavy-tailed, uniform, with outliers,
/// resampled, clustered, with dropout): each outcome's share under each
/// hypothesis and rule agrees with the independent NumPy simulation
/// within 4 combined Monte Carlo standard errors.
#[test]
fn numpy_simulation_agrees() {
    let reference = reference();
    let cases = cases();
    assert_eq!(cases.len(), reference["cases"].as_array().unwrap().len());
    for case in &cases {
        let name = case["name"].as_str().unwrap();
        let refcase = reference["cases"].as_array().unwrap().iter().find(|c| c["name"] == name).unwrap();
        let s = run_case(case);
        let (r, rr) = (s.replicates as f64, refcase["replicates"].as_f64().unwrap());
        let t = &s.threshold_rule;
        let c = &s.conventional_rule;
        let ours = [
            ("h0", "youden", "reject", t.under_h0.reject.count),
            ("h0", "youden", "do_not_reject", t.under_h0.do_not_reject.count),
            ("h0", "youden", "inconclusive", t.under_h0.inconclusive.unwrap().count),
            ("h1", "youden", "reject", t.under_h1.reject.count),
            ("h1", "youden", "do_not_reject", t.under_h1.do_not_reject.count),
            ("h1", "youden", "inconclusive", t.under_h1.inconclusive.unwrap().count),
            ("h0", "conventional", "reject", c.under_h0.reject.count),
            ("h1", "conventional", "reject", c.under_h1.reject.count),
        ];
        for (h, rule, outcome, count) in ours {
            let theirs = refcase[rule][h][outcome].as_f64().unwrap();
            let (a, b) = (count as f64 / r, theirs / rr);
            let pooled = (count as f64 + theirs) / (r + rr);
            let sd = (pooled * (1.0 - pooled) * (1.0 / r + 1.0 / rr)).sqrt();
            assert!(
                (a - b).abs() <= 4.0 * sd,
                "{name}: {rule} {outcome} under {h}: Tern {a}, NumPy {b} ({:+.1} combined SE)",
                (a - b) / sd.max(f64::MIN_POSITIVE)
            );
        }
        assert_eq!(s.no_decision.h0 + s.no_decision.h1 > 0, refcase["no_decision"]["h0"].as_u64().unwrap() + refcase["no_decision"]["h1"].as_u64().unwrap() > 0, "{name}: no-decision data sets");
    }
}

/// Sample mean, SD and skewness of a shape's draws (mean 0, SD 1 asked)
/// match SciPy's moments of the same distribution, within 4 standard
/// errors estimated from the draws themselves.
#[test]
fn shapes_have_the_moments_asked() {
    let reference = reference();
    let n = 400_000u64;
    for s in reference["shapes"].as_array().unwrap() {
        let id = s["shape"].as_str().unwrap();
        let params: Vec<(String, f64)> = ["skewness", "df", "outlier_share", "outlier_sd"]
            .iter()
            .filter_map(|k| s.get(*k).and_then(Value::as_f64).map(|v| (k.to_string(), v)))
            .collect();
        let spec = ShapeSpec { id: id.into(), params: params.clone(), groups: None };
        let pop = Population::new(&spec, Kind::Measurements, 1).unwrap();
        let x = pop.measurements(&mut stream(99, 0), n, 0.0, 1.0, 0);
        let m = x.len() as f64;
        let mean = x.iter().sum::<f64>() / m;
        let central = |k: i32| x.iter().map(|v| (v - mean).powi(k)).sum::<f64>() / m;
        let (m2, m3, m4) = (central(2), central(3), central(4));
        let sd = m2.sqrt();
        let label = format!("{id} {params:?}");
        assert!((mean - s["mean"].as_f64().unwrap()).abs() <= 4.0 * sd / m.sqrt(), "{label}: mean {mean}");
        // SE of the SD: √((m4 − m2²)/(4 m2 N)).
        let sd_se = ((m4 - m2 * m2) / (4.0 * m2 * m)).sqrt();
        assert!((sd - s["sd"].as_f64().unwrap()).abs() <= 4.0 * sd_se, "{label}: sd {sd} (se {sd_se})");
        if let Some(want) = s["skew"].as_f64() {
            let skew = m3 / m2.powf(1.5);
            // SE of the sample skewness from the sixth moment (finite
            // where SciPy gives a kurtosis; heavy shapes get the
            // empirical one, which is noisy, so the bound is wide).
            let m6 = central(6);
            let skew_se = ((m6 - 6.0 * m4 * m2 + 9.0 * m2.powi(3) - m3 * m3) / m2.powi(3) / m).sqrt();
            assert!((skew - want).abs() <= 4.0 * skew_se + 0.02 * want.abs(), "{label}: skewness {skew}, SciPy {want} (se {skew_se})");
        }
    }
}

/// Clustered yes/no outcomes: the count's mean and variance match SciPy's
/// beta-binomial sums.
#[test]
fn clustered_counts_match_the_beta_binomial() {
    let reference = reference();
    for c in reference["clustered"].as_array().unwrap() {
        let f = |k: &str| c[k].as_f64().unwrap();
        let spec = ShapeSpec { id: "clustered".into(), params: vec![("icc".into(), f("icc")), ("cluster_size".into(), f("cluster_size"))], groups: None };
        let pop = Population::new(&spec, Kind::Outcomes, 1).unwrap();
        let mut rng = stream(5, 0);
        let draws = 200_000;
        let x: Vec<f64> = (0..draws).map(|_| pop.successes(&mut rng, f("n") as u64, f("p")) as f64).collect();
        let m = draws as f64;
        let mean = x.iter().sum::<f64>() / m;
        let var = x.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (m - 1.0);
        let (want_mean, want_var) = (f("mean"), f("variance"));
        assert!((mean - want_mean).abs() <= 4.0 * (want_var / m).sqrt(), "{c}: mean {mean}");
        // SE of a variance ≈ var·√(2/(N − 1)) (a normal-shaped count; the
        // bound below doubles it for the beta-binomial's heavier tails).
        assert!((var - want_var).abs() <= 8.0 * want_var * (2.0 / (m - 1.0)).sqrt(), "{c}: variance {var}");
    }
}
