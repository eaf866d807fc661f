//! The page's charts drawn natively to SVG: the same drawing functions as
//! the canvas, from the same views (`page::charts::prep`), on plotters' SVG
//! backend. Each document must parse as XML and carry its axis
//! descriptions and legend entries, the words written in the chart code.
//!
//! The design is the page's demo (the invented Riverside Physiotherapy
//! Clinic, src/web/demo.rs), as the README's `examples/clinic-recovery.json`
//! states it, with the demo's unit, days; the data file is the page's
//! example, `examples/clinic-recovery-data.csv`.
//!
//! Every SVG is also written to `target/tmp/chart-svgs/` for a person to
//! look at (`cargo test --test charts_svg`, then open the files).

use serde_json::Value;
use tern::engine::evaluate::evaluate;
use tern::engine::request::{self, Answer};
use tern::engine::simulate::{Simulation, Tally};
use tern::engine::table::{self, Mapping, ReadOptions};
use tern::page::charts::prep::{self, DataViews, Views};
use tern::page::charts::realised_errors::THRESHOLD_RULE;
use tern::page::charts::{prob, realised_errors, svg};

/// The demo's unit (src/web/demo.rs).
const UNIT: &str = "days";

fn demo_answer() -> Answer {
    let mut value: Value = serde_json::from_str(include_str!("../examples/clinic-recovery.json")).expect("the example is JSON");
    value.as_object_mut().expect("the example is an object").insert("curves".into(), Value::Bool(true));
    let req = request::parse_value(&value).expect("the demo is a valid request");
    request::answer(&req).expect("the demo has an answer")
}

/// The views as the page builds them (src/web/mod.rs, `recompute`).
fn demo_views(answer: &Answer) -> Views {
    let at = answer.at_n.as_ref().expect("the demo is evaluated at the data's n");
    let curves = answer.curves.as_ref().expect("curves were asked for");
    let observed = answer.decision.as_ref().map(|d| d.statistic);
    let youden_n = answer.sample_size.youden.map(|g| g.n1);
    prep::views(&answer.design, at, curves, youden_n, observed, UNIT)
}

/// The example data file's two groups, as the page's first choices map
/// them: recovery days by protocol, early loading as group 1.
fn data_views() -> DataViews {
    let bytes = include_bytes!("../examples/clinic-recovery-data.csv");
    let t = table::read_table(bytes, Some("clinic-recovery-data.csv"), &ReadOptions::default()).expect("the example file reads");
    let col = |name: &str| t.columns.iter().find(|c| c.name == name).map(|c| c.index).expect("the example's column");
    let m = Mapping::TwoGroups {
        value: col("recovery_days"),
        group: col("protocol"),
        level1: "early loading".into(),
        level2: "standard".into(),
    };
    let sum = table::summarise(&t, &m, &[]).expect("the example summarises");
    let values = table::group_values(&t, &m, &[]).expect("the example's values");
    prep::data_views(&sum, &values, false, UNIT)
}

/// Parse an SVG document and return the text of every `<text>` element.
fn texts(name: &str, svg_text: &str, size: (u32, u32)) -> Vec<String> {
    let doc = roxmltree::Document::parse(svg_text).unwrap_or_else(|e| panic!("{name}: the SVG is not XML: {e}"));
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg", "{name}: root element");
    assert_eq!(root.attribute("width"), Some(size.0.to_string().as_str()), "{name}: width");
    assert_eq!(root.attribute("height"), Some(size.1.to_string().as_str()), "{name}: height");
    doc.descendants()
        .filter(|n| n.has_tag_name("text"))
        .map(|n| n.children().filter(|c| c.is_text()).filter_map(|c| c.text()).collect::<String>().trim().to_string())
        .collect()
}

/// What a chart must show: whole texts, and texts by their start (the
/// number after it is the engine's, checked elsewhere).
struct Expect {
    whole: &'static [&'static str],
    starts: &'static [&'static str],
}

fn check(name: &str, found: &[String], expect: &Expect) {
    for w in expect.whole {
        assert!(found.iter().any(|t| t == w), "{name}: no text \"{w}\" among {found:?}");
    }
    for s in expect.starts {
        assert!(found.iter().any(|t| t.starts_with(s)), "{name}: no text starting \"{s}\" among {found:?}");
    }
}

/// The words of each chart, from the chart code (src/page/charts/*.rs) and
/// the views (prep.rs): axis descriptions first, then the legend.
fn expected(name: &str) -> Expect {
    match name {
        "sampling" => Expect {
            whole: &[
                "difference of means, group 1 − group 2 (days)",
                "probability density",
                "if H0 is true (θ0 = 0)",
                "if the effect is θ1 (θ1 = −3)",
                "observed",
            ],
            starts: &["α* = ", "β* = ", "threshold ", "observed "],
        },
        "by-n" => Expect {
            whole: &[
                "sample size of group 1, n1 (log scale)",
                "error rate at the threshold",
                "α*: false-alarm rate at the threshold",
                "β*: miss rate",
                "both limits: 0.100",
                "conclusive",
                "shown: n = 56",
            ],
            starts: &["smallest conclusive n = "],
        },
        "tradeoff" => Expect {
            whole: &[
                "false-alarm rate α",
                "power 1 − β",
                "the test's trade-off at n1 = 56, n2 = 56",
                "allowed by your limits",
                "no better than chance",
            ],
            starts: &["threshold chosen: J = ", "α* = "],
        },
        "total" => Expect {
            whole: &[
                "threshold, difference of means, group 1 − group 2 (days)",
                "error rate",
                "total error α + β",
                "α (false alarm)",
                "β (miss)",
            ],
            starts: &["smallest α + β = "],
        },
        // 58 patients per protocol in the file, 2 of each with NA for the
        // recovery days: 56 values per group.
        "histogram" => Expect {
            whole: &[
                "value (days)",
                "count",
                "recovery_days: early loading (n = 56)",
                "recovery_days: standard (n = 56)",
                "normal curve, same mean and SD",
                "group 1: recovery_days: early loading (n = 56)",
                "group 2: recovery_days: standard (n = 56)",
            ],
            starts: &[],
        },
        "quantile" => Expect {
            whole: &[
                "normal quantile z (where a normal sample would put the value)",
                "value (days)",
                "recovery_days: early loading (circles; line: mean + SD·z)",
                "recovery_days: standard (triangles; line: mean + SD·z)",
            ],
            starts: &[],
        },
        other => panic!("no expectations for chart {other}"),
    }
}

fn write_for_a_person(charts: &[(&str, String)]) {
    let dir = std::path::Path::new(env!("CARGO_TARGET_TMPDIR")).join("chart-svgs");
    std::fs::create_dir_all(&dir).expect("a folder under target/tmp");
    for (name, text) in charts {
        std::fs::write(dir.join(format!("{name}.svg")), text).expect("write the SVG");
    }
}

#[test]
fn design_charts_are_svg_with_their_labels() {
    let answer = demo_answer();
    let charts = svg::design_charts(&demo_views(&answer)).expect("the demo's charts draw");
    assert_eq!(charts.iter().map(|c| c.0).collect::<Vec<_>>(), ["sampling", "by-n", "tradeoff", "total"]);
    for (name, text) in &charts {
        check(name, &texts(name, text, svg::DESIGN_SIZE), &expected(name));
    }
    write_for_a_person(&charts);
}

#[test]
fn data_charts_are_svg_with_their_labels() {
    let charts = svg::data_charts(&data_views()).expect("the example's charts draw");
    assert_eq!(charts.iter().map(|c| c.0).collect::<Vec<_>>(), ["histogram", "quantile"]);
    for (name, text) in &charts {
        check(name, &texts(name, text, svg::DATA_SIZE), &expected(name));
    }
    write_for_a_person(&charts);
}

/// One verdict: the chart of α*, β* against n shows the engine's own
/// verdict at every n (the one `evaluate` gives), and its table says the
/// same; nothing in the charts compares the errors with the limits again.
#[test]
fn by_n_shows_the_engines_verdict() {
    let answer = demo_answer();
    let views = demo_views(&answer);
    let design = &answer.design;
    assert!(!views.by_n.points.is_empty());
    for p in &views.by_n.points {
        let e = evaluate(design, p.n as u64).expect("the demo evaluates at every charted n");
        assert_eq!(p.conclusive, e.conclusive, "n = {}", p.n);
    }
    // Not vacuous: the demo's chart runs from inconclusive to conclusive.
    assert!(views.by_n.points.iter().any(|p| p.conclusive) && views.by_n.points.iter().any(|p| !p.conclusive));
    let table = tern::page::charts::table::by_n(&views.by_n);
    let yes = table.matches("<td>yes</td>").count();
    let no = table.matches("<td>no</td>").count();
    assert!(yes > 0 && no > 0, "the demo's table has both verdicts: {table}");
}

/// The simulation check of the clinic's design (as README's `tern
/// simulate` example states it, fewer data sets): right-skewed data, 15%
/// dropout, at the demo's n = 56.
const CHECK: &str = r#"{"family": "two_means_pooled", "alternative": "less", "theta0": 0, "theta1": -3,
    "sigma": 6, "alpha_max": 0.1, "beta_max": 0.1, "n": 56, "dropout": 0.15,
    "simulation": {"shape": "gamma", "skewness": 1.5, "replicates": 2000, "seed": 2026}}"#;

fn simulation(text: &str) -> Simulation {
    let req = request::parse(text).expect("a valid request");
    request::simulate(&req, None).expect("the check runs").simulation
}

/// The chart of a result: it draws, parses, and its texts.
fn simulation_texts(name: &str, sim: &Simulation) -> Vec<String> {
    let view = realised_errors::prep(sim);
    let text = svg::simulation_chart(&view).unwrap_or_else(|e| panic!("{name}: the chart draws: {e}"));
    write_for_a_person(&[(name, text.clone())]);
    // The tables write every row, whatever the result.
    let (numbers, shares) = (realised_errors::numbers(&view), realised_errors::shares(&view));
    assert_eq!(numbers.rows.len(), 4, "{name}: α and β of both rules");
    assert_eq!(shares.rows.len(), 4, "{name}: both rules under each hypothesis");
    for (table, rows) in [(&numbers, &numbers.rows), (&shares, &shares.rows)] {
        for r in rows {
            assert_eq!(r.len(), table.head.len(), "{name}: {r:?}");
            assert!(r.iter().all(|c| !c.contains("NaN") && !c.contains("inf")), "{name}: {r:?}");
        }
    }
    texts(name, &text, svg::SIMULATION_SIZE)
}

/// The simulation chart: its panels, its lanes, the limits and every
/// realised rate and model value with the engine's numbers; the text
/// tables the same.
#[test]
fn simulation_chart_shows_the_engines_rates() {
    let sim = simulation(CHECK);
    let found = simulation_texts("realised-errors", &sim);
    let (t, c, a) = (&sim.threshold_rule, &sim.conventional_rule, &sim.analytic);
    let mut want = vec![
        "False alarms: data drawn under H0, realised α".to_string(),
        "Misses: data drawn under θ1, realised β (inconclusive counts as a miss)".to_string(),
        "threshold rule, realised (bar ± 2 SE)".to_string(),
        "conventional rule, realised (bar ± 2 SE)".to_string(),
        "model value at the planned n".to_string(),
        "allowed by your limit (dotted line)".to_string(),
        "threshold of least total error".to_string(),
        "conventional, p ≤ 0.1".to_string(),
        "your limit α_max = 0.1".to_string(),
        "your limit β_max = 0.1".to_string(),
        format!("model α* = {}", prob(a.alpha)),
        format!("model β* = {}", prob(a.beta)),
        format!("model α of the test = {}", prob(a.conventional_alpha)),
        format!("model 1 − power = {}", prob(1.0 - a.conventional_power)),
    ];
    for s in [t.alpha, t.beta, c.alpha, c.beta] {
        want.push(format!("realised {} (SE {})", prob(s.share), prob(s.se)));
    }
    for w in &want {
        assert!(found.iter().any(|t| t == w), "no text \"{w}\" among {found:?}");
    }
    // Each lane says where its rate stands; with gamma data and dropout
    // the threshold rule's β is above the limit (the engine's reading says
    // so too).
    assert_eq!(found.iter().filter(|t| t.ends_with("your limit") || t.starts_with("at your limit")).count(), 4, "{found:?}");
    assert!(sim.readings.iter().any(|r| r.contains("above your limit")), "{:?}", sim.readings);
    assert!(found.iter().any(|t| t == "above your limit"));
    let view = realised_errors::prep(&sim);
    let numbers = realised_errors::numbers(&view);
    assert_eq!(numbers.head, ["rule", "rate", "realised", "± SE", "analytic", "limit", "against the limit"]);
    // Rows: α of both rules, then β of both.
    assert_eq!(numbers.rows[2][..4], [THRESHOLD_RULE.to_string(), "β, misses under θ1".into(), prob(t.beta.share), prob(t.beta.se)]);
    assert_eq!(numbers.rows[2][6], "above");
    let shares = realised_errors::shares(&view);
    assert_eq!(shares.rows[0][4], format!("{} ± {}", prob(t.under_h0.inconclusive.unwrap().share), prob(t.under_h0.inconclusive.unwrap().se)));
    assert_eq!(shares.rows[2][4], "none (no third outcome)");
}

/// Results at the edges draw a chart that parses and tables without a
/// "NaN": no data set drawn yet (the page's first partial result), every
/// data set inconclusive, shares of exactly 0 and 1, and figures that are
/// not numbers.
#[test]
fn simulation_chart_survives_edge_results() {
    // No data set drawn: the engine's result of an empty tally.
    let req = request::parse(CHECK).unwrap();
    let plan = request::simulation_plan(&req, None).unwrap();
    let empty = plan.result(&Tally::default()).unwrap();
    assert_eq!(empty.replicates_done, 0);
    let found = simulation_texts("realised-errors-none-drawn", &empty);
    assert!(found.iter().any(|t| t == "no data sets drawn yet"), "{found:?}");
    assert!(!found.iter().any(|t| t.starts_with("realised ")), "{found:?}");
    let numbers = realised_errors::numbers(&realised_errors::prep(&empty));
    assert!(numbers.rows.iter().all(|r| r[2] == "—" && r[6] == "—"), "{numbers:?}");

    // n = 4 per group: the design is not conclusive there, so the
    // threshold rule is inconclusive on every data set (α = 0, β = 1).
    let small = simulation(&CHECK.replace(r#""n": 56, "dropout": 0.15"#, r#""n": 4"#).replace("2000", "300"));
    let inc = small.threshold_rule.under_h0.inconclusive.unwrap();
    assert_eq!((inc.share, small.threshold_rule.alpha.share, small.threshold_rule.beta.share), (1.0, 0.0, 1.0));
    let found = simulation_texts("realised-errors-all-inconclusive", &small);
    assert!(found.iter().any(|t| t == "realised 1.00 (SE 0)") && found.iter().any(|t| t == "realised 0 (SE 0)"), "{found:?}");

    // An effect of 30 days against an SD of 6: every θ1 data set rejects
    // (β = 0 for both rules, a reject share of 1).
    let sure = simulation(&CHECK.replace(r#""theta1": -3"#, r#""theta1": -30"#).replace("2000", "300"));
    assert_eq!((sure.threshold_rule.beta.share, sure.conventional_rule.under_h1.reject.share), (0.0, 1.0));
    simulation_texts("realised-errors-sure", &sure);

    // Figures that are not numbers (no engine result has them; a chart
    // must still draw): the model's values, a share, a limit.
    let mut odd = sim_with_odd_figures(simulation(&CHECK.replace("2000", "300")));
    let found = simulation_texts("realised-errors-not-numbers", &odd);
    assert!(found.iter().any(|t| t == "model α*: not available"), "{found:?}");
    odd.beta_max = f64::INFINITY;
    odd.threshold_rule.beta.se = f64::INFINITY;
    simulation_texts("realised-errors-not-numbers", &odd);

    // Any size the page may give a canvas, down to one pixel.
    let view = realised_errors::prep(&simulation(&CHECK.replace("2000", "300")));
    for size in [(1, 1), (40, 30), (320, 200), (2000, 300)] {
        let text = svg::render(size, &|a, l| realised_errors::draw(a, &view, l)).unwrap_or_else(|e| panic!("{size:?}: {e}"));
        roxmltree::Document::parse(&text).unwrap_or_else(|e| panic!("{size:?}: {e}"));
    }
}

fn sim_with_odd_figures(mut s: Simulation) -> Simulation {
    s.analytic.alpha = f64::NAN;
    s.analytic.beta = f64::INFINITY;
    s.analytic.conventional_power = f64::NEG_INFINITY;
    s.conventional_rule.alpha.share = f64::NAN;
    s.alpha_max = f64::NAN;
    s
}
