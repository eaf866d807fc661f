//! Binomial, Poisson and scaled chi-square against the mpmath reference in
//! `tests/reference/discrete_chi2.json` (written by
//! `tests/reference/gen_discrete_chi2.py`, which documents how each value is
//! computed). Every value is checked; the worst relative error of each
//! function is printed beside its tolerance (`cargo test -- --nocapture`
//! shows it).

use serde_json::Value;
use std::collections::BTreeMap;
use tern::engine::dist::{Binomial, Continuous, Discrete, Poisson, ScaledChiSquare};

/// Relative tolerance per function: about 100 × the worst error observed
/// (2026-12-03, five runs, identical), rounded up to 1, 2 or 5 in the
/// leading digit, but never looser than before (masses 1e-12, tails,
/// densities and logarithms 1e-10, chi-square quantiles 1e-12). Worst
/// observed: binomial pmf 3.4e-13, ln_pmf 3.3e-15, cdf 3.4e-13, sf 1.4e-13;
/// Poisson pmf 1.6e-13, ln_pmf 2.9e-15, cdf 1.6e-13, sf 3.7e-14; chi-square
/// pdf 1.4e-12, ln_pdf 1.3e-14, cdf 2.2e-12, sf 1.3e-12, quantile 5.4e-14;
/// discrete quantiles exact. The run prints the current worst beside each
/// tolerance (`--nocapture`).
fn tolerance(name: &str) -> f64 {
    match name {
        "binomial pmf" | "poisson pmf" | "chi2 quantile" => 1e-12,
        "binomial ln_pmf" | "poisson ln_pmf" => 5e-13,
        "binomial cdf" => 5e-11,
        "binomial sf" | "poisson cdf" => 2e-11,
        "poisson sf" => 5e-12,
        "chi2 pdf" | "chi2 cdf" | "chi2 sf" => 1e-10,
        "chi2 ln_pdf" => 2e-12,
        // Counts: any difference is infinite.
        "binomial quantile" | "poisson quantile" => 0.0,
        other => panic!("no tolerance for {other:?}"),
    }
}

fn load() -> Value {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/discrete_chi2.json");
    let text = std::fs::read_to_string(path).expect("reference file is readable");
    serde_json::from_str(&text).expect("reference file is valid JSON")
}

/// Worst relative error per function, with the case that produced it.
#[derive(Default)]
struct Worst(BTreeMap<&'static str, (f64, String, usize)>);

impl Worst {
    fn record(&mut self, name: &'static str, err: f64, case: impl FnOnce() -> String) {
        let e = self.0.entry(name).or_insert((0.0, String::new(), 0));
        e.2 += 1;
        if err > e.0 || err.is_nan() {
            e.0 = err;
            e.1 = case();
        }
    }

    fn report_and_check(&self) {
        let mut failed = Vec::new();
        for (name, (err, case, count)) in &self.0 {
            let tol = tolerance(name);
            println!("{name:>22}: worst relative error {err:.3e} [tolerance {tol:.0e}] over {count} values (at {case})");
            if err.is_nan() || *err > tol {
                failed.push(format!("{name}: {err:.3e} at {case}"));
            }
        }
        assert!(failed.is_empty(), "tolerance exceeded:\n{}", failed.join("\n"));
    }
}

fn rel(got: f64, want: f64) -> f64 {
    if got == want { 0.0 } else { ((got - want) / want).abs() }
}

/// Relative error of a logarithm, measured against max(1, |want|): its
/// absolute error is what the exponential turns into a relative error.
fn rel_log(got: f64, want: f64) -> f64 {
    if got == want { 0.0 } else { (got - want).abs() / want.abs().max(1.0) }
}

/// A reference value that is `null` lies below 1e-300 and is not checked
/// for accuracy, only for being tiny too.
fn check_value(
    w: &mut Worst,
    name: &'static str,
    got: f64,
    want: &Value,
    case: &dyn Fn() -> String,
) {
    match want.as_f64() {
        Some(v) => w.record(name, rel(got, v), case),
        None => {
            let tiny = if got < 1e-299 { 0.0 } else { f64::INFINITY };
            w.record(name, tiny, case);
        }
    }
}

fn num(v: &Value) -> f64 {
    v.as_f64().expect("number")
}

fn int(v: &Value) -> u64 {
    v.as_u64().expect("non-negative integer")
}

fn rows<'a>(r: &'a Value, key: &str) -> &'a Vec<Value> {
    r[key].as_array().expect("array of cases")
}

#[test]
fn binomial_matches_reference() {
    let r = load();
    let mut w = Worst::default();
    for c in rows(&r, "binomial") {
        let (n, p, k) = (int(&c[0]), num(&c[1]), int(&c[2]));
        let d = Binomial::new(n, p).expect("valid parameters");
        let case = || format!("n={n} p={p} k={k}");
        check_value(&mut w, "binomial pmf", d.pmf(k), &c[3], &case);
        w.record("binomial ln_pmf", rel_log(d.ln_pmf(k), num(&c[4])), case);
        check_value(&mut w, "binomial cdf", d.cdf(k), &c[5], &case);
        check_value(&mut w, "binomial sf", d.sf(k), &c[6], &case);
    }
    for c in rows(&r, "binomial_quantile") {
        let (n, p, prob, upper, k) =
            (int(&c[0]), num(&c[1]), num(&c[2]), c[3].as_bool().unwrap(), int(&c[4]));
        let d = Binomial::new(n, p).unwrap();
        let got = if upper { d.quantile_upper(prob) } else { d.quantile(prob) }.unwrap();
        let err = if got == k { 0.0 } else { f64::INFINITY };
        w.record("binomial quantile", err, || {
            format!("n={n} p={p} prob={prob} upper={upper}: got {got}, want {k}")
        });
    }
    w.report_and_check();
}

#[test]
fn poisson_matches_reference() {
    let r = load();
    let mut w = Worst::default();
    for c in rows(&r, "poisson") {
        let (m, k) = (num(&c[0]), int(&c[1]));
        let d = Poisson::new(m).expect("valid parameters");
        let case = || format!("mean={m} k={k}");
        check_value(&mut w, "poisson pmf", d.pmf(k), &c[2], &case);
        w.record("poisson ln_pmf", rel_log(d.ln_pmf(k), num(&c[3])), case);
        check_value(&mut w, "poisson cdf", d.cdf(k), &c[4], &case);
        check_value(&mut w, "poisson sf", d.sf(k), &c[5], &case);
    }
    for c in rows(&r, "poisson_quantile") {
        let (m, prob, upper, k) = (num(&c[0]), num(&c[1]), c[2].as_bool().unwrap(), int(&c[3]));
        let d = Poisson::new(m).unwrap();
        let got = if upper { d.quantile_upper(prob) } else { d.quantile(prob) }.unwrap();
        let err = if got == k { 0.0 } else { f64::INFINITY };
        w.record("poisson quantile", err, || {
            format!("mean={m} prob={prob} upper={upper}: got {got}, want {k}")
        });
    }
    w.report_and_check();
}

#[test]
fn chi_square_matches_reference() {
    let r = load();
    let mut w = Worst::default();
    for c in rows(&r, "chi2") {
        let (df, scale, x) = (num(&c[0]), num(&c[1]), num(&c[2]));
        let d = ScaledChiSquare::new(df, scale).expect("valid parameters");
        let case = || format!("df={df} scale={scale} x={x}");
        check_value(&mut w, "chi2 pdf", d.pdf(x), &c[3], &case);
        w.record("chi2 ln_pdf", rel_log(d.ln_pdf(x), num(&c[4])), case);
        check_value(&mut w, "chi2 cdf", d.cdf(x), &c[5], &case);
        check_value(&mut w, "chi2 sf", d.sf(x), &c[6], &case);
    }
    for c in rows(&r, "chi2_quantile") {
        let (df, scale, prob, upper, x) =
            (num(&c[0]), num(&c[1]), num(&c[2]), c[3].as_bool().unwrap(), num(&c[4]));
        let d = ScaledChiSquare::new(df, scale).unwrap();
        let got = if upper { d.quantile_upper(prob) } else { d.quantile(prob) }.unwrap();
        w.record("chi2 quantile", rel(got, x), || {
            format!("df={df} scale={scale} prob={prob} upper={upper}: got {got}, want {x}")
        });
    }
    w.report_and_check();
}

#[test]
fn reference_file_names_its_tools() {
    let r = load();
    assert_eq!(r["versions"]["mpmath"], "1.3.0");
    assert!(r["versions"]["mp_dps"].as_u64().unwrap() >= 40);
    for key in
        ["binomial", "poisson", "chi2", "binomial_quantile", "poisson_quantile", "chi2_quantile"]
    {
        assert!(!rows(&r, key).is_empty(), "{key} has cases");
    }
}
