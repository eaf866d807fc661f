//! Student t and noncentral t against the mpmath references in
//! `tests/reference/t_dist.json` (written by `gen_t_dist.py`).
//!
//! Tolerances are the ones promised in the distributions' documentation:
//! pdf, cdf and sf within 1e-10 relative wherever the reference value is a
//! normal f64 (down to 1e-300, so the far tails are included); ln_pdf within
//! 1e-12 relative or 1e-10 absolute; quantiles within 1e-11 relative.

use std::collections::BTreeMap;

use tern::engine::dist::{Continuous, NoncentralT, StudentT};

const REL: f64 = 1e-10;
const LN_REL: f64 = 1e-12;
const LN_ABS: f64 = 1e-10;
const Q_REL: f64 = 1e-11;

fn num(v: &serde_json::Value) -> f64 {
    match v {
        serde_json::Value::String(s) => s.parse().expect("reference number"),
        other => other.as_f64().expect("reference number"),
    }
}

fn load() -> serde_json::Value {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/t_dist.json");
    let text = std::fs::read_to_string(path).expect("tests/reference/t_dist.json is present");
    serde_json::from_str(&text).expect("reference JSON parses")
}

/// Worst error per (distribution, function, region), kept with its case.
#[derive(Default)]
struct Worst(BTreeMap<String, (f64, String)>);

impl Worst {
    fn note(&mut self, key: String, err: f64, case: &str) {
        let e = self.0.entry(key).or_insert((0.0, String::new()));
        if err > e.0 || err.is_nan() {
            *e = (err, case.to_string());
        }
    }
    fn print(&self, title: &str) {
        println!("{title}");
        for (k, (e, c)) in &self.0 {
            println!("  {k:<34} {e:9.2e}  at {c}");
        }
    }
}

fn rel(got: f64, want: f64) -> f64 {
    if got == want {
        0.0
    } else {
        ((got - want) / want).abs()
    }
}

/// "left" below 1e-20 in the lower tail, "right" below 1e-20 in the upper
/// tail, else "centre".
fn region(cdf: f64, sf: f64) -> &'static str {
    if cdf < 1e-20 {
        "far left"
    } else if sf < 1e-20 {
        "far right"
    } else {
        "centre"
    }
}

fn check_all(
    d: &dyn Continuous,
    case: &serde_json::Value,
    tag: &str,
    worst: &mut Worst,
    bad: &mut Vec<String>,
) {
    let x = num(&case["x"]);
    let (pdf, ln_pdf, cdf, sf) = (
        num(&case["pdf"]),
        num(&case["ln_pdf"]),
        num(&case["cdf"]),
        num(&case["sf"]),
    );
    let name = format!(
        "{tag}(df={}, ncp={}) at x={x:e}",
        num(&case["df"]),
        num(&case["ncp"])
    );
    let reg = region(cdf, sf);
    let mut one = |f: &str, got: f64, want: f64| {
        if want.is_normal() && want >= 1e-300 {
            let e = rel(got, want);
            worst.note(format!("{tag} {f} {reg}"), e, &name);
            if e.is_nan() || e > REL {
                bad.push(format!("{f} of {name}: {got:e} vs {want:e} (rel {e:.2e})"));
            }
        }
    };
    one("pdf", d.pdf(x), pdf);
    one("cdf", d.cdf(x), cdf);
    one("sf", d.sf(x), sf);
    let got = d.ln_pdf(x);
    let e_abs = (got - ln_pdf).abs();
    let e_rel = rel(got, ln_pdf);
    worst.note(format!("{tag} ln_pdf (min of rel, abs) {reg}"), e_rel.min(e_abs), &name);
    if !(e_rel.is_finite() && e_rel <= LN_REL || e_abs <= LN_ABS) {
        bad.push(format!("ln_pdf of {name}: {got} vs {ln_pdf}"));
    }
}

#[test]
fn t_and_noncentral_t_match_mpmath() {
    let data = load();
    let cases = data["cases"].as_array().expect("cases");
    assert!(
        cases.len() >= 60,
        "reference file has {} cases",
        cases.len()
    );
    let mut worst = Worst::default();
    let mut bad = Vec::new();
    for case in cases {
        let (df, ncp) = (num(&case["df"]), num(&case["ncp"]));
        let nct = NoncentralT::new(df, ncp).expect("valid parameters");
        check_all(&nct, case, "nct", &mut worst, &mut bad);
        if ncp == 0.0 {
            let t = StudentT::new(df).expect("valid parameters");
            check_all(&t, case, "t", &mut worst, &mut bad);
        }
    }
    worst.print("worst relative error per function and region:");
    assert!(
        bad.is_empty(),
        "{} failures, first ones:\n{}",
        bad.len(),
        bad[..bad.len().min(30)].join("\n")
    );
}

#[test]
fn quantiles_match_mpmath() {
    let data = load();
    let cases = data["quantiles"].as_array().expect("quantiles");
    assert!(cases.len() >= 300);
    let mut worst = Worst::default();
    let mut bad = Vec::new();
    for case in cases {
        let (df, ncp, p, x) = (
            num(&case["df"]),
            num(&case["ncp"]),
            num(&case["p"]),
            num(&case["x"]),
        );
        let lower = case["tail"] == "lower";
        let name = format!("df={df}, ncp={ncp}, p={p:e}");
        let mut go = |tag: &str, d: &dyn Continuous| {
            let got = if lower {
                d.quantile(p)
            } else {
                d.quantile_upper(p)
            };
            let fname = if lower { "quantile" } else { "quantile_upper" };
            match got {
                Ok(q) => {
                    // x = 0 happens (the median of t); there an absolute
                    // 1e-14 is the meaningful test.
                    let e = if x == 0.0 { q.abs() } else { rel(q, x) };
                    let tail = if p < 1e-20 { "far" } else { "near" };
                    worst.note(format!("{tag} {fname} {tail}"), e, &name);
                    if e.is_nan() || (e > Q_REL && !(x == 0.0 && e <= 1e-14)) {
                        bad.push(format!(
                            "{tag} {fname} {name}: {q:e} vs {x:e} (rel {e:.2e})"
                        ));
                    }
                }
                Err(err) => bad.push(format!("{tag} {fname} {name}: {err}")),
            }
        };
        go("nct", &NoncentralT::new(df, ncp).expect("valid"));
        if ncp == 0.0 {
            go("t", &StudentT::new(df).expect("valid"));
        }
    }
    worst.print("worst quantile relative error:");
    assert!(
        bad.is_empty(),
        "{} failures, first ones:\n{}",
        bad.len(),
        bad[..bad.len().min(30)].join("\n")
    );
}

#[test]
fn huge_df_uses_the_normal_limit() {
    // Beyond 1e7 the documented limit N(ncp, 1 + ncp²/(2 df)) is used.
    let t = NoncentralT::new(1e9, 2.0).unwrap();
    let sd = (1.0 + 4.0 / 2e9_f64).sqrt();
    let z = (1.0_f64 - 2.0) / sd;
    let phi = 0.5 * libm::erfc(-z / std::f64::consts::SQRT_2);
    assert!(rel(t.cdf(1.0), phi) < 1e-14);
    let s = StudentT::new(1e9).unwrap();
    assert!(rel(s.sf(3.0), 0.5 * libm::erfc(3.0 / std::f64::consts::SQRT_2)) < 1e-14);
}
