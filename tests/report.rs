//! The report, written by `tern report` in each format, checked as a reader
//! and a reviewer would: the HTML has no script and nothing from elsewhere,
//! every chart is well-formed SVG, the Markdown is CommonMark a parser
//! reads into the expected headings, tables and images, the JSON carries
//! the engine's answer, and the numbers in the text are the ones
//! `tern run` gives for the same design.

use pulldown_cmark::{Event, Options, Parser, Tag};
use std::process::Command;

fn tern(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_tern")).args(args).output().expect("tern runs");
    (out.status.code().unwrap_or(-1), String::from_utf8_lossy(&out.stdout).into_owned(), String::from_utf8_lossy(&out.stderr).into_owned())
}

/// The clinic example with the report's own fields (a fictional scenario).
fn design_file() -> std::path::PathBuf {
    let text = r#"{
  "family": "two_means_pooled", "alternative": "less", "theta0": 0, "theta1": -3, "sigma": 6,
  "alpha_max": 0.10, "beta_max": 0.10, "unit": "days", "dropout": 0.15,
  "planning_source": "pilot study at the Harbour Street clinic, 2025 (24 patients)",
  "limits_reason": "a missed benefit and a false alarm cost about the same",
  "notes": "Recovery time after the new physiotherapy plan.\n\nSecond paragraph <b>not markup</b>.",
  "data": { "n1": 56, "mean1": 39.4, "sd1": 6.3, "n2": 56, "mean2": 42.1, "sd2": 5.8 }
}"#;
    let path = std::env::temp_dir().join(format!("tern-report-{}.json", std::process::id()));
    std::fs::write(&path, text).expect("write the design");
    path
}

fn report(format: &str) -> String {
    let path = design_file();
    let (code, out, err) = tern(&["report", path.to_str().unwrap(), "--format", format]);
    assert_eq!(code, 0, "{err}");
    out
}

/// The SVG documents inside an HTML report.
fn svgs(html: &str) -> Vec<&str> {
    html.match_indices("<svg").map(|(i, _)| &html[i..i + html[i..].find("</svg>").expect("closed svg") + 6]).collect()
}

#[test]
fn html_report_is_self_contained_and_its_charts_are_svg() {
    let html = report("html");
    assert!(html.starts_with("<!DOCTYPE html>"));
    let lower = html.to_lowercase();
    assert!(!lower.contains("<script"), "no script");
    for far in ["http://", "https://", "src=\"//", "@import", "url("] {
        // The SVG namespace is the one address allowed: it names, never fetches.
        let count = lower.matches(far).count() - lower.matches("http://www.w3.org/2000/svg").count().min(lower.matches(far).count());
        assert_eq!(count, 0, "{far} in the report");
    }
    assert!(html.contains("Content-Security-Policy") && html.contains("default-src 'none'"));
    let charts = svgs(&html);
    assert_eq!(charts.len(), 4, "four design charts");
    for svg in charts {
        roxmltree::Document::parse(svg).expect("each chart is well-formed XML");
        assert!(svg.contains("viewBox") && svg.contains("role=\"img\""));
    }
    // Escaped user text, the caution, both sections on the study.
    assert!(html.contains("&lt;b&gt;not markup&lt;/b&gt;"));
    assert!(html.contains("Decision support only"));
    for id in ["study", "design", "threshold", "sample-size", "decision", "charts", "reproduce"] {
        assert!(html.contains(&format!("<section id=\"report-{id}\">")), "section {id}");
    }
}

/// The numbers a reviewer checks, against `tern run` on the same design.
/// Enrolment: ⌈54 / 0.85⌉ = 64 per group (54 / 0.85 = 63.53; by hand).
/// The statistic and p in journal style: t(110) = −2.36, p = .010 (SciPy
/// 1.17.1, scipy.stats.ttest_ind_from_stats(39.4, 6.3, 56, 42.1, 5.8, 56,
/// alternative="less"): t = −2.35948, p = 0.0100319).
#[test]
fn report_numbers_are_the_engines() {
    let path = design_file();
    let (code, run, err) = tern(&["run", path.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let answer: serde_json::Value = serde_json::from_str(&run).unwrap();
    let md = report("md");
    let youden = answer["sample_size"]["youden"]["n1"].as_u64().unwrap();
    assert_eq!(youden, 54);
    assert!(md.contains("n = 54 in each group (108 in all)"), "{md}");
    assert!(md.contains("enrol 64 in each group (128 in all)"), "{md}");
    assert!(md.contains("*t*(110) = −2.36, *p* = .010"), "{md}");
    assert!(md.contains("(source: pilot study at the Harbour Street clinic, 2025 (24 patients))"));
    assert!(md.contains("Why these limits: a missed benefit and a false alarm cost about the same"));
    // The 80% interval (one-sided test, α limit .10: 1 − 2·α) and Cohen's d,
    // by hand with SciPy 1.17.1: s_pooled = √((55·6.3² + 55·5.8²)/110),
    // t.ppf(0.9, 110) = 1.28930; bounds −4.17536 and −1.22464, d = −0.44590.
    assert!(md.contains(r"80% CI \[−4.18, −1.22\] days"), "the interval (CommonMark escapes the brackets)");
    assert!(md.contains("*d* = −0.45"), "Cohen's d");
    let json: serde_json::Value = serde_json::from_str(&report("json")).unwrap();
    assert_eq!(json["answer"]["at_n"], answer["at_n"], "the JSON report carries the engine's answer");
    assert_eq!(json["answer"]["sample_size"], answer["sample_size"]);
    assert_eq!(json["answer"]["enrolment"]["enrol"]["n1"], 64);
    assert!(json["design"].get("notes").is_none(), "the notes stay in the document, not the design");
    assert_eq!(json["report"]["command"], "tern run design.json");
}

/// What a CommonMark parser reads in a Markdown report: the headings' text,
/// the number of tables and of images (each an SVG data URI), and the
/// text of each code block.
struct ReadMarkdown {
    headings: Vec<String>,
    tables: usize,
    images: usize,
    code: Vec<String>,
}

fn read_markdown(md: &str) -> ReadMarkdown {
    let mut r = ReadMarkdown { headings: Vec::new(), tables: 0, images: 0, code: Vec::new() };
    let mut in_heading = false;
    let mut in_code = false;
    for ev in Parser::new_ext(md, Options::ENABLE_TABLES) {
        match ev {
            Event::Start(Tag::Heading { .. }) => {
                in_heading = true;
                r.headings.push(String::new());
            }
            Event::End(pulldown_cmark::TagEnd::Heading(_)) => in_heading = false,
            Event::Start(Tag::Table(_)) => r.tables += 1,
            Event::Start(Tag::Image { dest_url, .. }) => {
                assert!(dest_url.starts_with("data:image/svg+xml;base64,"));
                r.images += 1;
            }
            Event::Start(Tag::CodeBlock(_)) => {
                in_code = true;
                r.code.push(String::new());
            }
            Event::End(pulldown_cmark::TagEnd::CodeBlock) => in_code = false,
            Event::Text(t) if in_heading => r.headings.last_mut().unwrap().push_str(&t),
            Event::Text(t) if in_code => r.code.last_mut().unwrap().push_str(&t),
            _ => {}
        }
    }
    r
}

#[test]
fn markdown_report_is_commonmark_with_tables_and_images() {
    let md = report("md");
    let ReadMarkdown { headings, tables, images, code } = read_markdown(&md);
    assert!(headings[0].starts_with("Tern report: two means"), "{headings:?}");
    for h in ["The study", "The design", "The sample size", "The decision", "Charts", "Reproduce these numbers"] {
        assert!(headings.iter().any(|x| x == h), "heading {h}: {headings:?}");
    }
    assert_eq!(images, 4);
    assert!(tables >= 8, "{tables} tables");
    // The design block reads back as the request, without the notes.
    let design: serde_json::Value = serde_json::from_str(&code[0]).expect("the design block is JSON");
    assert_eq!(design["theta1"], -3);
    assert!(design.get("notes").is_none());
    assert_eq!(code[1].trim(), "tern run design.json");
}

#[test]
fn report_arguments_are_checked() {
    let path = design_file();
    let p = path.to_str().unwrap();
    let (code, _, err) = tern(&["report", p, "--format", "pdf"]);
    assert_eq!(code, 2);
    assert!(err.contains("--format is \"pdf\", but must be html, md or json"), "{err}");
    let (code, _, err) = tern(&["report", "/nonexistent/design.json"]);
    assert_eq!(code, 1, "{err}");
    let out = std::env::temp_dir().join(format!("tern-report-out-{}.html", std::process::id()));
    let (code, stdout, err) = tern(&["report", p, "--out", out.to_str().unwrap()]);
    assert_eq!((code, stdout.as_str()), (0, ""), "{err}");
    assert!(std::fs::read_to_string(&out).unwrap().contains("</html>"));
}

/// A text written to a file of its own in the temporary folder.
fn written(stem: &str, text: &str) -> std::path::PathBuf {
    let path = std::env::temp_dir().join(format!("{stem}-{}.json", std::process::id()));
    std::fs::write(&path, text).expect("write the file");
    path
}

/// A design that names the example data file's columns (the closing
/// brace left to the caller).
const FILE_PLAN: &str = r#"{"family": "two_means_pooled", "alternative": "less", "theta0": 0, "theta1": -3, "sigma": 5, "alpha_max": 0.05,
    "beta_max": 0.2, "value": "recovery_days", "group": "protocol", "level1": "early loading", "level2": "standard""#;

/// A report decided from a data file: the file's histogram and quantile
/// plot join the charts, its notes the decision, the file's name and rows
/// stay out, and the design block (summary figures as `data`, no role
/// fields) reproduces the decision with `tern run` and no file.
#[test]
fn report_from_a_data_file_holds_summaries_only() {
    let plan = written("tern-report-plan", &format!("{FILE_PLAN}}}"));
    let file = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/clinic-recovery-data.csv");
    let (code, html, err) = tern(&["report", plan.to_str().unwrap(), "--data", file]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(svgs(&html).len(), 6, "four design charts and the file's two");
    assert!(html.contains("report-chart-histogram") && html.contains("report-chart-quantile"));
    assert!(!html.contains("clinic-recovery-data"), "the file's name stays out");
    let (_, md, _) = tern(&["report", plan.to_str().unwrap(), "--data", file, "--format", "md"]);
    let block = md.split("```json\n").nth(1).and_then(|b| b.split("\n```").next()).expect("design block");
    let design: serde_json::Value = serde_json::from_str(block).unwrap();
    assert!(design.get("value").is_none() && design.get("group").is_none(), "no role fields: {design}");
    let again = written("tern-report-again", block);
    let (_, from_block, _) = tern(&["run", again.to_str().unwrap()]);
    let (_, from_file, _) = tern(&["run", plan.to_str().unwrap(), "--data", file]);
    let (a, b): (serde_json::Value, serde_json::Value) = (serde_json::from_str(&from_block).unwrap(), serde_json::from_str(&from_file).unwrap());
    assert_eq!(a["decision"], b["decision"], "the design block reproduces the decision without the file");
}

/// Regressions (found by the long fuzz run): summary figures at the edge
/// of the doubles (a mean or SD of 1.8e308, a σ of 1e300) made the
/// sampling chart's axis infinite and plotters' pixel arithmetic overflow.
/// The report is built; the observed value far outside the curves is
/// marked at the edge of the chart.
#[test]
fn extreme_figures_do_not_break_the_charts() {
    for text in [
        r#"{"family": "paired_t", "alternative": "less", "theta0": 0, "theta1": -35.338192217550755, "sigma": 0.01, "alpha_max": 0.001, "beta_max": 0.001, "data": {"n": 10, "mean": 1.7976931348623157e308, "sd": 13.595009583731837}}"#,
        r#"{"family": "paired_t", "alternative": "two_sided", "theta0": 0, "theta1": 0.9236197109119423, "sigma": 1e300, "alpha_max": 0.001, "beta_max": 0.001, "data": {"n": 1782, "mean": 0, "sd": 0.01}}"#,
        r#"{"family": "mean_z", "alternative": "greater", "theta0": 0, "theta1": 13.473194061450391, "sigma": 1e8, "alpha_max": 0.001, "beta_max": 0.001, "data": {"n": 1, "mean": 1.7976931348623157e308}}"#,
        r#"{"family": "mean_t", "alternative": "two_sided", "theta0": 0, "theta1": 24.33939679727062, "sigma": 10.748780052292659, "alpha_max": 0.001, "beta_max": 0.001, "data": {"n": 4, "mean": 0, "sd": 1.7976931348623157e308}}"#,
        r#"{"family": "two_means_pooled", "alternative": "two_sided", "theta0": 0, "theta1": 0.01, "sigma": 0.01, "alpha_max": 0.001, "beta_max": 0.001, "data": {"n1": 320, "mean1": 1.7976931348623157e308, "sd1": 44.91696756850147, "n2": 21, "mean2": 0, "sd2": 0.01}}"#,
    ] {
        match tern::report::prepare(text, tern::report::Stamp::today("2026-12-03".into()), None, None) {
            Ok(p) => {
                let html = p.html();
                for svg in svgs(&html) {
                    roxmltree::Document::parse(svg).expect("well-formed chart");
                }
            }
            Err(e) => assert!(!e.to_string().is_empty(), "{text}"),
        }
    }
}

/// The clinic's design with a simulation check (right-skewed recovery
/// times, the design's 15% dropout; fewer data sets than a real check, to
/// keep the test short).
fn checked_design_file() -> (std::path::PathBuf, String) {
    let text = r#"{
  "family": "two_means_pooled", "alternative": "less", "theta0": 0, "theta1": -3, "sigma": 6,
  "alpha_max": 0.10, "beta_max": 0.10, "unit": "days", "dropout": 0.15, "n": 56,
  "data": { "n1": 56, "mean1": 39.4, "sd1": 6.3, "n2": 56, "mean2": 42.1, "sd2": 5.8 },
  "simulation": { "shape": "gamma", "skewness": 1.5, "replicates": 3000, "seed": 2026 }
}"#;
    (written("tern-report-check", text), text.to_string())
}

/// The engine's own answer for the request's simulation block, as JSON
/// text read back (as the command line's output is read, so that both
/// meet serde_json's reading of the same digits).
fn engine_simulation(text: &str) -> serde_json::Value {
    let req = tern::engine::request::parse(text).expect("a valid request");
    let answer = tern::engine::request::simulate(&req, None).expect("the check runs");
    serde_json::from_str(&serde_json::to_string(&answer.simulation).unwrap()).unwrap()
}

/// The same simulation, or a short message saying where they differ (the
/// statistics' sample is long).
fn same_simulation(found: &serde_json::Value, expected: &serde_json::Value, what: &str) {
    if found != expected {
        let keys = expected.as_object().map(|o| o.keys().filter(|k| found.get(k.as_str()) != o.get(k.as_str())).cloned().collect::<Vec<_>>());
        panic!("{what}: the simulation differs from the engine's in {keys:?}");
    }
}

/// A report of a design with a `simulation` block has the section "Check
/// by simulation" after the sample size and before the decision, with its
/// chart (well-formed SVG), its tables and the engine's readings; every
/// number is the one `tern simulate` gives for the same request (the
/// report formats the engine's result, it computes none), and the design
/// block reproduces it.
#[test]
fn report_with_a_simulation_block_has_the_check() {
    let (path, text) = checked_design_file();
    let p = path.to_str().unwrap();
    let expected = engine_simulation(&text);
    let (code, cli, err) = tern(&["simulate", p]);
    assert_eq!(code, 0, "{err}");
    let cli: serde_json::Value = serde_json::from_str(&cli).unwrap();
    same_simulation(&cli["simulation"], &expected, "tern simulate");

    // JSON: the simulation is the engine's, whole.
    let (code, json, err) = tern(&["report", p, "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let json: serde_json::Value = serde_json::from_str(&json).unwrap();
    same_simulation(&json["simulation"], &expected, "the JSON report");
    assert_eq!(json["report"]["simulation_command"], "tern simulate design.json");
    let ids: Vec<&str> = json["report"]["sections"].as_array().unwrap().iter().map(|s| s["id"].as_str().unwrap()).collect();
    let at = |id: &str| ids.iter().position(|x| *x == id).unwrap_or_else(|| panic!("section {id} in {ids:?}"));
    assert!(at("sample-size") < at("simulation") && at("simulation") < at("decision"), "{ids:?}");

    // HTML: the section, its chart among the five, the engine's readings.
    let (code, html, err) = tern(&["report", p]);
    assert_eq!(code, 0, "{err}");
    assert!(html.contains("<section id=\"report-simulation\">") && html.contains("<figure id=\"report-chart-simulation\">"));
    let charts = svgs(&html);
    assert_eq!(charts.len(), 5, "four design charts and the check's");
    for svg in &charts {
        roxmltree::Document::parse(svg).expect("each chart is well-formed XML");
    }
    let section = &html[html.find("<section id=\"report-simulation\">").unwrap()..];
    let section = &section[..section.find("</section>").unwrap()];
    for reading in expected["readings"].as_array().unwrap() {
        let li = format!("<li>{}</li>", tern::page::html::escape(reading.as_str().unwrap()));
        assert!(section.contains(&li), "reading {li}");
    }
    // The figures of the tables: each rule's realised α and β with its
    // SE, and each outcome's share under each hypothesis, as printed.
    let fig = |v: &serde_json::Value| tern::page::charts::prob(v.as_f64().unwrap());
    for rule in ["threshold_rule", "conventional_rule"] {
        let r = &expected[rule];
        for rate in ["alpha", "beta"] {
            let cells = format!("<td>{}</td><td>{}</td>", fig(&r[rate]["share"]), fig(&r[rate]["se"]));
            assert!(section.contains(&cells), "{rule} {rate}: {cells}");
        }
        for under in ["under_h0", "under_h1"] {
            for outcome in ["reject", "do_not_reject", "inconclusive"] {
                let s = &r[under][outcome];
                if s.is_null() {
                    continue;
                }
                let cell = format!("<td>{} ± {}</td>", fig(&s["share"]), fig(&s["se"]));
                assert!(section.contains(&cell), "{rule} {under} {outcome}: {cell}");
            }
        }
    }
    let a = &expected["analytic"];
    for cell in [format!("α* = {}", fig(&a["alpha"])), format!("β* = {}", fig(&a["beta"])), "α_max = 0.1".into(), "β_max = 0.1".into()] {
        assert!(section.contains(&format!("<td>{cell}</td>")), "{cell}");
    }
    for fact in ["right-skewed data (gamma, skewness 1.5)", "56 in each group (112 in all)", "66 in each group (132 in all) enrolled", "<td>3000</td>", "<td>2026</td>"] {
        assert!(section.contains(fact), "{fact}");
    }

    // Markdown: CommonMark with the section's heading, the chart as an
    // image, and a design block that reproduces the check.
    let (code, md, err) = tern(&["report", p, "--format", "md"]);
    assert_eq!(code, 0, "{err}");
    let ReadMarkdown { headings, images, code: code_blocks, .. } = read_markdown(&md);
    for h in ["Check by simulation", "Realised error rates against your limits and the model"] {
        assert!(headings.iter().any(|x| x == h), "heading {h}: {headings:?}");
    }
    assert_eq!(images, 5);
    assert_eq!(code_blocks[1].trim(), "tern run design.json\ntern simulate design.json");
    let again = written("tern-report-check-again", &code_blocks[0]);
    let (code, out, err) = tern(&["simulate", again.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let out: serde_json::Value = serde_json::from_str(&out).unwrap();
    same_simulation(&out["simulation"], &expected, "tern simulate on the design block");
}

/// Without a `simulation` block there is no such section; a block the
/// engine refuses stops the report with the engine's message.
#[test]
fn report_simulation_block_is_checked() {
    let html = report("html");
    assert!(!html.contains("report-simulation"));
    let (_, text) = checked_design_file();
    let bad = written("tern-report-check-bad", &text.replace("\"replicates\": 3000", "\"replicates\": 0"));
    let (code, out, err) = tern(&["report", bad.to_str().unwrap()]);
    assert_eq!((code, out.as_str()), (2, ""), "{err}");
    assert!(err.contains("simulation.replicates is 0"), "{err}");
}

/// With a data file, `tern report --data` runs the check as `tern simulate
/// --data` does: the `resample` shape draws from the file's groups.
#[test]
fn report_resamples_the_data_file_as_simulate_does() {
    let plan = written("tern-report-resample", &format!(r#"{FILE_PLAN}, "simulation": {{"shape": "resample", "replicates": 1000, "seed": 11}}}}"#));
    let file = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/clinic-recovery-data.csv");
    let (code, sim, err) = tern(&["simulate", plan.to_str().unwrap(), "--data", file]);
    assert_eq!(code, 0, "{err}");
    let sim: serde_json::Value = serde_json::from_str(&sim).unwrap();
    let (code, json, err) = tern(&["report", plan.to_str().unwrap(), "--data", file, "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let json: serde_json::Value = serde_json::from_str(&json).unwrap();
    same_simulation(&json["simulation"], &sim["simulation"], "the JSON report");
    let (_, html, _) = tern(&["report", plan.to_str().unwrap(), "--data", file]);
    assert_eq!(svgs(&html).len(), 7, "four design charts, the file's two and the check's");
    assert!(html.contains("tern simulate design.json --data with the data file"));
    assert!(!html.contains("clinic-recovery-data"), "the file's name stays out");
}
