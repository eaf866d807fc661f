//! The designs of the benchmarks, shared by `benches/engine.rs` and
//! `examples/bench_counts.rs` (instruction counts under callgrind).

use tern::engine::design::{Design, DesignSpec, Family};
use tern::engine::threshold::Alternative;

/// The (df, ncp, x) points of `nct_cdf`, with their benchmark ids.
pub const NCT_POINTS: [(&str, f64, f64, f64); 3] = [
    ("df29_ncp1.64_x1.7", 29.0, 1.64, 1.7),
    ("df200_ncp3_x-1", 200.0, 3.0, -1.0),
    ("df1e4_ncp5_x4", 1e4, 5.0, 4.0),
];

/// The simulation check's benchmark id and request (`request::parse`).
/// Mirrored in compare_scipy.py (`SIMULATION`).
pub const SIMULATION: (&str, &str) = (
    "simulate/two_means_pooled_n100_100k",
    r#"{"family": "two_means_pooled", "alternative": "greater", "d": 0.5,
        "alpha_max": 0.05, "beta_max": 0.2, "n": 100,
        "simulation": {"shape": "normal", "replicates": 100000, "seed": 1}}"#,
);

pub const ALPHA_MAX: f64 = 0.05;
pub const BETA_MAX: f64 = 0.2;

pub fn spec(family: Family, alternative: Alternative) -> DesignSpec {
    DesignSpec { family: Some(family), alternative: Some(alternative), ..DesignSpec::default() }.with("alpha_max", ALPHA_MAX).with("beta_max", BETA_MAX)
}

/// A representative design of each family and the n (per group) it is
/// solved at. Mirrored in compare_scipy.py (`SOLVES`).
pub fn solve_cases() -> Vec<(String, Design, u64)> {
    use Alternative::{Greater, TwoSided};
    let d = |family, alternative, d: f64| spec(family, alternative).with("d", d);
    let cases: Vec<(&str, DesignSpec, u64)> = vec![
        ("solve/mean_z", d(Family::MeanZ, Greater, 0.3), 121),
        ("solve/mean_t", d(Family::MeanT, Greater, 0.3), 120),
        ("solve/paired_t", d(Family::PairedT, Greater, 0.5), 50),
        ("solve/two_means_pooled", d(Family::TwoMeansPooled, Greater, 0.5), 100),
        (
            "solve/two_means_welch",
            spec(Family::TwoMeansWelch, Greater).with("theta0", 0.0).with("theta1", 0.5).with("sigma1", 1.0).with("sigma2", 1.5),
            100,
        ),
        (
            "solve/proportion_exact",
            spec(Family::ProportionExact, Greater).with("theta0", 0.5).with("theta1", 0.6),
            200,
        ),
        (
            "solve/proportion_normal",
            spec(Family::ProportionNormal, Greater).with("theta0", 0.5).with("theta1", 0.6),
            200,
        ),
        (
            "solve/two_proportions",
            spec(Family::TwoProportions, Greater).with("p1", 0.6).with("p2", 0.5),
            400,
        ),
        ("solve_two_sided/mean_t", d(Family::MeanT, TwoSided, 0.3), 120),
    ];
    cases
        .into_iter()
        .map(|(name, s, n)| {
            let design = Design::new(&s).unwrap_or_else(|e| panic!("{name}: invalid design: {e}"));
            (name.to_string(), design, n)
        })
        .collect()
}

