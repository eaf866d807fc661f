//! Engine benchmarks (criterion). Run with `cargo bench --bench engine`, or
//! `scripts/bench` for the side-by-side table against SciPy/statsmodels.
//!
//! Benchmark names are stable: `scripts/bench` reads
//! `target/criterion/<group>/<id>/new/estimates.json` for each of them.
//!
//! - `nct_cdf/<point>`: one `NoncentralT::cdf` call at a (df, ncp, x) point.
//! - `solve/<family>`: one threshold solve (the model at n, then c*, α*, β*)
//!   for a representative one-sided design of each family.
//! - `solve_two_sided/mean_t`: the same for the two-sided one-sample t.
//! - `search/mean_t_d0.3`: the sample-size search (Youden n and the
//!   conventional n) for the one-sample t, d = 0.3, α_max = 0.05,
//!   β_max = 0.2, alternative greater.
//! - `simulate/two_means_pooled_n100_100k`: the simulation check
//!   (`request::simulation_plan`, `Plan::run`, one thread) of the pooled
//!   two-sample t, d = 0.5, α_max = 0.05, β_max = 0.2, alternative greater,
//!   n = 100 per group, normal population, 100,000 data sets under each
//!   hypothesis, seed 1. d = 0.5 (the design of `solve/two_means_pooled`)
//!   is conclusive at n = 100, so every data set goes through the
//!   threshold comparison, not straight to inconclusive.
//!
//! The designs and points are mirrored in `benches/compare_scipy.py`; keep
//! the two lists identical. Before measuring, each solve prints one
//! `TERN_CHECK` line (c*, α*, β*, or n for the search) so that
//! `scripts/bench` can show that both sides did the same work.
//!
//! With `BENCH_QUICK` set (`scripts/bench --quick`), every group warms up
//! for 0.1 s and measures for 0.2 s: a check that the benches and the
//! script run, with rough figures. The `simulate` group still takes its
//! 10 samples of one iteration each (criterion's smallest sample size),
//! about 3 s.
//!
//! `std::hint::black_box` is used: it is what criterion 0.8's own (now
//! deprecated) `criterion::black_box` forwards to.

use criterion::{Criterion, SamplingMode, criterion_group, criterion_main};
use std::hint::black_box;
use std::time::Duration;
use tern::engine::design::{Design, Family};
use tern::engine::dist::{Continuous, NoncentralT};
use tern::engine::evaluate::{Cut, evaluate, solve};
use tern::engine::request;
use tern::engine::sample_size::sample_size;
use tern::engine::threshold::{Alternative, ContinuousCut, DiscreteCut};

#[path = "shared/cases.rs"]
mod cases;
use cases::{NCT_POINTS, SIMULATION, solve_cases, spec};

/// c* on the statistic's scale (the half-width for a two-sided cut, k for
/// X ≥ k).
fn cut_value(cut: &Cut) -> f64 {
    match *cut {
        Cut::Continuous(ContinuousCut::Above(c) | ContinuousCut::Below(c)) => c,
        Cut::Continuous(ContinuousCut::Outside { half_width, .. }) => half_width,
        Cut::Discrete(DiscreteCut::AtLeast(k) | DiscreteCut::AtMost(k)) => k as f64,
        Cut::Discrete(DiscreteCut::Outside { half_width, .. }) => half_width,
    }
}

/// A group's warm-up and measurement times: as given, or 0.1 s and 0.2 s
/// with `BENCH_QUICK` set (the group settings override criterion's own
/// `--warm-up-time` and `--measurement-time`).
fn times(warm_up: Duration, measurement: Duration) -> (Duration, Duration) {
    if std::env::var_os("BENCH_QUICK").is_some() {
        (Duration::from_millis(100), Duration::from_millis(200))
    } else {
        (warm_up, measurement)
    }
}

fn bench_nct_cdf(c: &mut Criterion) {
    let mut group = c.benchmark_group("nct_cdf");
    let (warm_up, measurement) = times(Duration::from_millis(500), Duration::from_secs(2));
    group.warm_up_time(warm_up).measurement_time(measurement).sample_size(50);
    for (id, df, ncp, x) in NCT_POINTS {
        let dist = NoncentralT::new(df, ncp).expect("valid noncentral t");
        println!("TERN_CHECK\tnct_cdf/{id}\tcdf={:.12e}", dist.cdf(x));
        group.bench_function(id, |b| b.iter(|| black_box(&dist).cdf(black_box(x))));
    }
    group.finish();
}

fn bench_solve(c: &mut Criterion) {
    let cases = solve_cases();
    for group_name in ["solve", "solve_two_sided"] {
        let mut group = c.benchmark_group(group_name);
        // Auto sampling switches to flat sampling when one iteration is slow.
        let (warm_up, measurement) = times(Duration::from_millis(500), Duration::from_secs(3));
        group.warm_up_time(warm_up).measurement_time(measurement).sample_size(30);
        for (name, design, n) in cases.iter().filter(|(name, ..)| name.split('/').next() == Some(group_name)) {
            let model = design.model(*n).unwrap_or_else(|e| panic!("{name}: model at n = {n}: {e}"));
            let (cut, errors, _) = solve(&model).unwrap_or_else(|e| panic!("{name}: solve: {e}"));
            println!(
                "TERN_CHECK\t{name}\tn={n}\tc={:.9}\talpha={:.9}\tbeta={:.9}",
                cut_value(&cut),
                errors.alpha,
                errors.beta
            );
            let id = name.split('/').nth(1).expect("group/id");
            // One solve = the sampling distributions at n, then c*, α*, β*.
            group.bench_function(id, |b| {
                b.iter(|| {
                    let model = black_box(design).model(black_box(*n)).expect("model");
                    solve(black_box(&model)).expect("solve")
                })
            });
        }
        group.finish();
    }
}

fn bench_search(c: &mut Criterion) {
    let design = Design::new(&spec(Family::MeanT, Alternative::Greater).with("d", 0.3)).expect("valid design");
    let answer = sample_size(&design).expect("search");
    println!(
        "TERN_CHECK\tsearch/mean_t_d0.3\tn={}\tconventional_n={}\tsolves={}",
        answer.youden.map_or(0, |g| g.n1),
        answer.conventional.map_or(0, |g| g.n1),
        answer.solves
    );
    let mut group = c.benchmark_group("search");
    let (warm_up, measurement) = times(Duration::from_millis(500), Duration::from_secs(5));
    group.warm_up_time(warm_up).measurement_time(measurement).sample_size(10);
    group.bench_function("mean_t_d0.3", |b| b.iter(|| sample_size(black_box(&design)).expect("search")));
    group.finish();
}

fn bench_simulate(c: &mut Criterion) {
    let name = SIMULATION.0;
    let req = request::parse(SIMULATION.1).unwrap_or_else(|e| panic!("{name}: request: {e}"));
    let plan = request::simulation_plan(&req, None).unwrap_or_else(|e| panic!("{name}: plan: {e}"));
    let at = evaluate(&plan.design, plan.n1).unwrap_or_else(|e| panic!("{name}: evaluate: {e}"));
    assert!(at.conclusive, "{name}: the design must be conclusive at n = {}", plan.n1);
    let tally = plan.run();
    let (h0, h1) = (tally.h0, tally.h1);
    // Shares of data sets: α by rejecting under H0, β by not rejecting
    // under θ1 (the threshold rule's inconclusive counts as not rejecting;
    // none here, the design being conclusive).
    let share = |count: u64, of: u64| count as f64 / of as f64;
    println!(
        "TERN_CHECK\t{name}\tn={}\treplicates={}\tc={:.9}\talpha_share={:.6}\tbeta_share={:.6}\tconventional_alpha_share={:.6}\tconventional_beta_share={:.6}",
        plan.n1,
        plan.replicates,
        cut_value(&at.cut),
        share(h0.reject, h0.replicates),
        share(h1.replicates - h1.reject, h1.replicates),
        share(h0.conventional_reject, h0.replicates),
        share(h1.replicates - h1.conventional_reject, h1.replicates),
    );
    let mut group = c.benchmark_group("simulate");
    // One iteration takes a few tenths of a second: 10 samples (criterion's
    // least) of the same iteration count each.
    let (warm_up, measurement) = times(Duration::from_secs(1), Duration::from_secs(5));
    group.warm_up_time(warm_up).measurement_time(measurement).sample_size(10).sampling_mode(SamplingMode::Flat);
    let id = name.split('/').nth(1).expect("group/id");
    group.bench_function(id, |b| b.iter(|| black_box(&plan).run()));
    group.finish();
}

criterion_group!(benches, bench_nct_cdf, bench_solve, bench_search, bench_simulate);
criterion_main!(benches);
