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
use tern::engine::table::{self, Mapping, ReadOptions};
use tern::page::charts::prep::{self, DataViews, Views};
use tern::page::charts::svg;

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
