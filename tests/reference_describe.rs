//! Summaries of data files against NumPy/SciPy: tests/reference/describe.json,
//! written by tests/reference/gen_describe.py (versions recorded in the JSON)
//! over the committed files in tests/reference/data/.
//!
//! Per group: n, mean, sd (ddof = 1), skewness G1 and excess kurtosis G2 from
//! `scipy.stats.describe(x, ddof=1, bias=False)`; median, min, max from NumPy;
//! the histogram from `numpy.histogram(x, bins="auto")`; normal quantile plot
//! points from `scipy.stats.norm.ppf` at Blom's positions.

use serde_json::Value;
use tern::engine::table::{Mapping, ReadOptions, group_values, histogram, normal_quantile_points, read_table, summarise};

fn close(what: &str, got: f64, want: f64, rel: f64) {
    let err = (got - want).abs() / want.abs().max(1e-300);
    assert!(err <= rel || (got - want).abs() <= 1e-300, "{what}: got {got}, SciPy/NumPy {want}, relative error {err:e} > {rel:e}");
}

#[test]
fn summaries_match_numpy_and_scipy() {
    let dir = env!("CARGO_MANIFEST_DIR");
    let json: Value = serde_json::from_str(&std::fs::read_to_string(format!("{dir}/tests/reference/describe.json")).unwrap()).unwrap();
    let cases = json["cases"].as_array().unwrap();
    assert_eq!(cases.len(), 8);
    let mut worst = 0.0f64;
    for case in cases {
        let file = case["file"].as_str().unwrap();
        let bytes = std::fs::read(format!("{dir}/tests/reference/data/{file}")).unwrap();
        let table = read_table(&bytes, Some(file), &ReadOptions::default()).unwrap();
        assert_eq!(table.problems.total, 0, "{file}: {:?}", table.problems.shown);
        let mapping: Mapping = serde_json::from_value(case["mapping"].clone()).unwrap();
        let got = summarise(&table, &mapping, &[]).unwrap();
        let values = group_values(&table, &mapping, &[]).unwrap();
        for (i, want) in case["groups"].as_array().unwrap().iter().enumerate() {
            let g = &got.groups[i];
            let what = |f: &str| format!("{file} group {i} {f}");
            assert_eq!(g.n as u64, want["n"].as_u64().unwrap(), "{}", what("n"));
            let f = |k: &str| want[k].as_f64().unwrap();
            // large_offset.csv: a spread of 1e-11 of the mean; the reference
            // describes the exactly shifted data (see gen_describe.py).
            let (rel_mean, rel_sd, rel_shape) = (1e-13, 1e-11, 1e-9);
            close(&what("mean"), g.mean, f("mean"), rel_mean);
            close(&what("sd"), g.sd.unwrap(), f("sd"), rel_sd);
            close(&what("median"), g.median, f("median"), 1e-15);
            close(&what("min"), g.min, f("min"), 0.0);
            close(&what("max"), g.max, f("max"), 0.0);
            close(&what("skewness"), g.skewness.unwrap(), f("skewness"), rel_shape);
            close(&what("excess kurtosis"), g.excess_kurtosis.unwrap(), f("excess_kurtosis"), rel_shape);
            for (got, key) in [(g.sd.unwrap(), "sd"), (g.skewness.unwrap(), "skewness"), (g.excess_kurtosis.unwrap(), "excess_kurtosis")] {
                worst = worst.max(((got - f(key)) / f(key)).abs());
            }
            // Histogram: the same bins and counts as numpy.histogram(x, "auto").
            let h = histogram(&values[i]);
            let edges: Vec<f64> = want["histogram"]["edges"].as_array().unwrap().iter().map(|v| v.as_f64().unwrap()).collect();
            let counts: Vec<usize> = want["histogram"]["counts"].as_array().unwrap().iter().map(|v| v.as_u64().unwrap() as usize).collect();
            assert_eq!(h.counts, counts, "{}", what("histogram counts"));
            assert_eq!(h.edges.len(), edges.len());
            for (a, b) in h.edges.iter().zip(&edges) {
                assert!((a - b).abs() <= 1e-12 * b.abs().max(1.0), "{}: edge {a} vs {b}", what("histogram"));
            }
            // Normal quantile plot points (all n ≤ 2000 here).
            let qq = normal_quantile_points(&values[i]);
            let want_qq = want["qq"].as_array().unwrap();
            assert_eq!(qq.len(), want_qq.len());
            for ((z, x), w) in qq.iter().zip(want_qq) {
                close(&what("qq quantile"), *z, w[0].as_f64().unwrap(), 1e-12);
                close(&what("qq value"), *x, w[1].as_f64().unwrap(), 0.0);
            }
        }
    }
    eprintln!("worst relative error of sd, skewness and excess kurtosis against SciPy: {worst:e}");
}
