//! The benchmark items of `benches/engine.rs`, each run a fixed number of
//! times, for instruction counts that do not depend on the machine's load:
//!
//!   cargo build --release --example bench_counts
//!   valgrind --tool=callgrind --callgrind-out-file=/tmp/cg.out \
//!     target/release/examples/bench_counts ITEM REPEATS
//!
//! ITEM is a benchmark id (`nct_cdf/df29_ncp1.64_x1.7`, `solve/mean_t`,
//! `solve_two_sided/mean_t`, `search/mean_t_d0.3`,
//! `simulate/two_means_pooled_n100_100k`, ...); the instructions per call
//! are (total at REPEATS − total at 0) / REPEATS.

use std::hint::black_box;
use tern::engine::design::{Design, Family};
use tern::engine::dist::{Continuous, NoncentralT};
use tern::engine::evaluate::solve;
use tern::engine::request;
use tern::engine::sample_size::sample_size;
use tern::engine::threshold::Alternative;

#[path = "../benches/shared/cases.rs"]
mod cases;
use cases::{NCT_POINTS, SIMULATION, solve_cases, spec};

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let item = args.get(1).map_or("", String::as_str);
    let repeats: usize = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(100);
    for (id, df, ncp, x) in NCT_POINTS {
        if item == format!("nct_cdf/{id}") {
            let t = NoncentralT::new(df, ncp).expect("valid");
            for _ in 0..repeats {
                black_box(black_box(&t).cdf(black_box(x)));
            }
        }
    }
    for (id, design, n) in solve_cases() {
        if item == id {
            for _ in 0..repeats {
                let model = black_box(&design).model(black_box(n)).expect("model");
                black_box(solve(&model).expect("solve"));
            }
        }
    }
    if item == "search/mean_t_d0.3" {
        let design = Design::new(&spec(Family::MeanT, Alternative::Greater).with("d", 0.3)).expect("valid design");
        for _ in 0..repeats {
            black_box(sample_size(black_box(&design)).expect("search"));
        }
    }
    if item == SIMULATION.0 {
        let req = request::parse(SIMULATION.1).expect("valid request");
        let plan = request::simulation_plan(&req, None).expect("valid simulation");
        for _ in 0..repeats {
            black_box(black_box(&plan).run());
        }
    }
}
