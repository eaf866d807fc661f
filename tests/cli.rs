//! The command line as a user meets it: the built `tern` binary, driven with
//! std::process::Command. Exit codes (src/bin/tern.rs): 0 answered, 2 the
//! input was refused (message on stderr naming field, value and rule),
//! 1 the input could not be read.

use std::io::Write;
use std::process::{Command, Output, Stdio};

const BIN: &str = env!("CARGO_BIN_EXE_tern");

fn tern(args: &[&str], stdin: Option<&str>) -> Output {
    let mut child = Command::new(BIN)
        .args(args)
        .stdin(if stdin.is_some() { Stdio::piped() } else { Stdio::null() })
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("the tern binary starts");
    if let Some(text) = stdin {
        child.stdin.take().unwrap().write_all(text.as_bytes()).unwrap();
    }
    child.wait_with_output().unwrap()
}

fn text(b: &[u8]) -> String {
    String::from_utf8_lossy(b).into_owned()
}

/// method.md §5: d = 0.3, α_max = .05, β_max = .2, one-sided z test needs
/// n = 121 (Youden) against 69 (conventional). A z design keeps the CLI test
/// independent of the t and binomial implementations.
const Z_DESIGN: &str = r#"{"family": "mean_z", "alternative": "greater", "d": 0.3, "alpha_max": 0.05, "beta_max": 0.2}"#;

const TOP_LEVEL: [&str; 10] =
    ["tern_version", "family", "family_title", "design", "caution", "at_n", "sample_size", "smallest_effect", "decision", "curves"];

fn answer_of(out: &Output) -> serde_json::Value {
    assert_eq!(out.status.code(), Some(0), "stderr: {}", text(&out.stderr));
    serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("stdout is not JSON ({e}): {}", text(&out.stdout)))
}

fn check_z_answer(v: &serde_json::Value) {
    for key in TOP_LEVEL {
        assert!(v.get(key).is_some(), "top-level key {key} missing: {v}");
    }
    assert_eq!(v["tern_version"], env!("CARGO_PKG_VERSION"));
    assert_eq!(v["family"], "mean_z");
    assert!(v["caution"].as_str().is_some_and(|c| c.contains("Decision support only")));
    assert_eq!(v["sample_size"]["youden"]["n1"], 121);
    assert_eq!(v["sample_size"]["conventional"]["n1"], 69);
    // Without n the answer is shown at the Youden n.
    assert_eq!(v["at_n"]["n1"], 121);
    assert_eq!(v["at_n"]["conclusive"], true);
}

/// A valid design on standard input is answered with the documented keys.
#[test]
fn valid_design_on_stdin() {
    let out = tern(&["run"], Some(Z_DESIGN));
    check_z_answer(&answer_of(&out));
    assert!(out.stderr.is_empty(), "stderr: {}", text(&out.stderr));
}

/// `-` means standard input too, and a file gives the same answer.
#[test]
fn valid_design_as_a_file_and_as_dash() {
    let path = std::path::Path::new(env!("CARGO_TARGET_TMPDIR")).join("cli_z_design.json");
    std::fs::write(&path, Z_DESIGN).unwrap();
    let from_file = tern(&["run", path.to_str().unwrap()], None);
    check_z_answer(&answer_of(&from_file));
    let from_dash = tern(&["run", "-"], Some(Z_DESIGN));
    assert_eq!(text(&from_file.stdout), text(&from_dash.stdout));
}

/// A request with n and data: the decision and the smallest effect appear.
#[test]
fn decision_through_the_cli() {
    // x̄ = 0.5 with σ = 1, n = 121: z = 5.5, far beyond c* = 0.15·√121 = 1.65.
    let out = tern(
        &["run"],
        Some(r#"{"family": "mean_z", "alternative": "greater", "theta0": 0, "theta1": 0.3, "sigma": 1, "alpha_max": 0.05, "beta_max": 0.2, "n": 121, "data": {"n": 121, "mean": 0.5}}"#),
    );
    let v = answer_of(&out);
    assert_eq!(v["decision"]["outcome"], "reject_h0");
    assert!(v["smallest_effect"]["theta1"].as_f64().is_some());
    assert_eq!(v["at_n"]["n1"], 121);
}

/// Bad designs: exit 2, nothing on stdout, and stderr names field, value
/// and rule (a few rows of tests/bad_input.rs).
#[test]
fn bad_designs_exit_2_with_the_message() {
    let cases: [(&str, &str, &[&str]); 9] = [
        (
            "beta_max 0.7",
            r#"{"family": "mean_t", "alternative": "greater", "d": 0.5, "alpha_max": 0.05, "beta_max": 0.7}"#,
            &["beta_max is 0.7, but must be between 0 and 0.5 (exclusive)"],
        ),
        ("sigma negative", r#"{"family": "mean_z", "alternative": "greater", "theta0": 0, "theta1": 1, "sigma": -1, "alpha_max": 0.05, "beta_max": 0.2}"#, &["sigma is -1", "> 0"]),
        ("alpha_max missing", r#"{"family": "mean_z", "alternative": "greater", "d": 0.5, "beta_max": 0.2}"#, &["alpha_max is missing", "choose"]),
        ("wrong direction", r#"{"family": "mean_z", "alternative": "less", "d": 0.5, "alpha_max": 0.05, "beta_max": 0.2}"#, &["d is 0.5", "\"less\"", "less than 0"]),
        ("typo", r#"{"family": "mean_z", "alternative": "greater", "d": 0.5, "alpha_max": 0.05, "betamax": 0.2}"#, &["betamax is not a known field", "did you mean beta_max?"]),
        ("n = 2.5", r#"{"family": "mean_z", "alternative": "greater", "d": 0.5, "alpha_max": 0.05, "beta_max": 0.2, "n": 2.5}"#, &["n is 2.5", "whole number"]),
        ("successes > trials", r#"{"family": "proportion_exact", "alternative": "greater", "theta0": 0.5, "theta1": 0.7, "alpha_max": 0.05, "beta_max": 0.2, "data": {"successes": 12, "trials": 10}}"#, &["data.successes is 12", "number of trials"]),
        ("invalid JSON", r#"{"family": "#, &["not valid JSON"]),
        // Regression: this ratio used to panic in the sample-size search (exit 101); see tests/bad_input.rs.
        (
            "ratio too small for group 2",
            r#"{"family":"two_means_pooled","alternative":"greater","d":0.5,"alpha_max":0.05,"beta_max":0.2,"ratio":1e-7}"#,
            &["ratio is 1e-7", "largest n searched, 10000000", "must be at least"],
        ),
    ];
    let mut failures = Vec::new();
    for (name, input, fragments) in cases {
        let out = tern(&["run"], Some(input));
        let err = text(&out.stderr);
        if out.status.code() != Some(2) {
            failures.push(format!("{name}: exit {:?}, stderr {err}", out.status.code()));
        }
        if !out.stdout.is_empty() {
            failures.push(format!("{name}: printed on stdout: {}", text(&out.stdout)));
        }
        if !err.starts_with("tern: ") {
            failures.push(format!("{name}: stderr does not start with \"tern: \": {err}"));
        }
        for f in fragments {
            if !err.contains(f) {
                failures.push(format!("{name}: stderr lacks {f:?}: {err}"));
            }
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// `tern help` (and its usual spellings) prints the usage and succeeds.
#[test]
fn help_exits_0() {
    for arg in ["help", "--help", "-h"] {
        let out = tern(&[arg], None);
        assert_eq!(out.status.code(), Some(0), "{arg}");
        assert!(text(&out.stdout).contains("usage:"), "{arg}: {}", text(&out.stdout));
        assert!(text(&out.stdout).contains("tern run [FILE]"));
    }
}

/// An unknown command is a refused input (exit 2) and names the command;
/// no command at all shows the usage and exits 2 as well.
#[test]
fn unknown_or_missing_command_exits_2() {
    let out = tern(&["frobnicate"], None);
    assert_eq!(out.status.code(), Some(2));
    let err = text(&out.stderr);
    assert!(err.contains("unknown command \"frobnicate\""), "{err}");
    assert!(err.contains("usage:"), "{err}");
    let out = tern(&[], None);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("usage:"));
}

/// A file that cannot be read (missing, or a directory) exits 1 and says
/// which path failed.
#[test]
fn unreadable_file_exits_1() {
    let missing = std::path::Path::new(env!("CARGO_TARGET_TMPDIR")).join("no_such_design.json");
    let _ = std::fs::remove_file(&missing);
    let out = tern(&["run", missing.to_str().unwrap()], None);
    assert_eq!(out.status.code(), Some(1), "stderr: {}", text(&out.stderr));
    assert!(text(&out.stderr).contains("cannot read"), "{}", text(&out.stderr));
    assert!(text(&out.stderr).contains("no_such_design.json"));
    assert!(out.stdout.is_empty());
    let dir = env!("CARGO_TARGET_TMPDIR");
    let out = tern(&["run", dir], None);
    assert_eq!(out.status.code(), Some(1), "directory: stderr {}", text(&out.stderr));
}

/// Standard input that is not UTF-8 cannot be read as text: exit 1.
#[test]
fn non_utf8_stdin_exits_1() {
    let mut child = Command::new(BIN).arg("run").stdin(Stdio::piped()).stdout(Stdio::piped()).stderr(Stdio::piped()).spawn().unwrap();
    child.stdin.take().unwrap().write_all(&[0x7b, 0xff, 0xfe, 0x7d]).unwrap();
    let out = child.wait_with_output().unwrap();
    assert_eq!(out.status.code(), Some(1), "stderr: {}", text(&out.stderr));
}

fn reference_data(name: &str) -> String {
    format!("{}/tests/reference/data/{name}", env!("CARGO_MANIFEST_DIR"))
}

/// NumPy's figures for a file of tests/reference/data (tests/reference/
/// describe.json, written by gen_describe.py with NumPy 2.4.6).
fn numpy_groups(file: &str) -> Vec<(u64, f64, f64)> {
    let path = format!("{}/tests/reference/describe.json", env!("CARGO_MANIFEST_DIR"));
    let d: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    let case = d["cases"].as_array().unwrap().iter().find(|c| c["file"] == file).unwrap();
    case["groups"].as_array().unwrap().iter().map(|g| (g["n"].as_u64().unwrap(), g["mean"].as_f64().unwrap(), g["sd"].as_f64().unwrap())).collect()
}

fn write_design(name: &str, json: &str) -> String {
    let dir = std::env::temp_dir().join(format!("tern-cli-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    std::fs::write(&p, json).unwrap();
    p.to_string_lossy().into_owned()
}

/// `--data`: the file's groups are read as NumPy reads them, the mapping
/// named in the design is used (and what was left to the reader is
/// marked), and the decision is the one the same figures give as summary
/// data.
#[test]
fn decides_from_a_data_file() {
    let design = r#"{"family": "two_means_welch", "alternative": "greater", "theta0": 0, "theta1": 3, "sigma1": 4, "sigma2": 8,
        "alpha_max": 0.1, "beta_max": 0.2, "group": "Station", "level1": "Nord", "level2": "Süd"}"#;
    let path = write_design("wards.json", design);
    let v = answer_of(&tern(&["run", &path, "--data", &reference_data("two_wards.csv")], None));
    let groups = v["data_file"]["groups"].as_array().unwrap();
    for (g, (n, mean, sd)) in groups.iter().zip(numpy_groups("two_wards.csv")) {
        assert_eq!(g["n"].as_u64(), Some(n));
        assert!((g["mean"].as_f64().unwrap() - mean).abs() <= 1e-12 * mean.abs(), "{g}");
        assert!((g["sd"].as_f64().unwrap() - sd).abs() <= 1e-12 * sd, "{g}");
    }
    let mapping = &v["data_file"]["mapping"];
    assert_eq!(mapping[0]["role"], "value");
    assert_eq!(mapping[0]["value"], "Minuten");
    assert_eq!(mapping[0]["chosen"], false, "the value column was left to the reader");
    assert_eq!(mapping[1]["value"], "Station");
    assert_eq!(mapping[1]["chosen"], true);
    // The same design with NumPy's figures as summary data decides alike.
    let g = numpy_groups("two_wards.csv");
    let with_figures = format!(
        r#"{{"family": "two_means_welch", "alternative": "greater", "theta0": 0, "theta1": 3, "sigma1": 4, "sigma2": 8, "alpha_max": 0.1, "beta_max": 0.2,
        "data": {{"n1": {}, "mean1": {}, "sd1": {}, "n2": {}, "mean2": {}, "sd2": {}}}}}"#,
        g[0].0, g[0].1, g[0].2, g[1].0, g[1].1, g[1].2
    );
    let w = answer_of(&tern(&["run"], Some(&with_figures)));
    assert_eq!(v["decision"]["outcome"], w["decision"]["outcome"]);
    let (a, b) = (v["decision"]["statistic"].as_f64().unwrap(), w["decision"]["statistic"].as_f64().unwrap());
    assert!((a - b).abs() <= 1e-10 * b.abs(), "{a} vs {b}");
}

/// A column or level the file does not have is refused by its field, with
/// what the file offers; a data file beside summary figures is refused; an
/// unreadable data file exits 1.
#[test]
fn data_file_refusals_name_the_field() {
    let base = r#""family": "two_means_pooled", "alternative": "greater", "d": 0.5, "alpha_max": 0.1, "beta_max": 0.2"#;
    let file = reference_data("two_wards.csv");
    let cases: [(&str, &[&str]); 4] = [
        (r#""group": "Ward""#, &["group is \"Ward\"", "Station"]),
        (r#""level1": "Ost""#, &["level1 is \"Ost\"", "Nord", "Süd"]),
        (r#""success": "yes""#, &["success is not a known field", "value, group, level1, level2"]),
        (r#""data": {"n1": 3, "mean1": 1, "sd1": 1, "n2": 3, "mean2": 0, "sd2": 1}"#, &["data is summary figures", "data file"]),
    ];
    for (extra, expect) in cases {
        let path = write_design("refused.json", &format!("{{{base}, {extra}}}"));
        let out = tern(&["run", &path, "--data", &file], None);
        assert_eq!(out.status.code(), Some(2), "{extra}: {}", text(&out.stdout));
        let err = text(&out.stderr);
        for e in expect {
            assert!(err.contains(e), "{extra}: {err:?} lacks {e:?}");
        }
    }
    let path = write_design("ok.json", &format!("{{{base}}}"));
    let out = tern(&["run", &path, "--data", "/nonexistent/file.csv"], None);
    assert_eq!(out.status.code(), Some(1));
    assert!(text(&out.stderr).contains("cannot read /nonexistent/file.csv"));
    let out = tern(&["run", &path, "--data"], None);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("--data needs a file name"));
}

/// A file's bad cells come back located (row as the user sees it, column,
/// verbatim text), and `exclude_rows` leaves their rows out.
#[test]
fn data_file_problems_are_located_and_can_be_left_out() {
    let csv = "patient,days\n1,4.5\n2,5.1\n3,n/a?\n4,6.0\n5,4.4\n";
    let dir = std::env::temp_dir().join(format!("tern-cli-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("stays.csv");
    std::fs::write(&file, csv).unwrap();
    let file = file.to_string_lossy().into_owned();
    let design = r#"{"family": "mean_t", "alternative": "greater", "theta0": 4, "theta1": 5, "sigma": 1, "alpha_max": 0.1, "beta_max": 0.2, "value": "days"}"#;
    let v = answer_of(&tern(&["run", &write_design("stays.json", design), "--data", &file], None));
    let p = &v["data_file"]["table"]["problems"];
    assert_eq!(p["total"], 1);
    assert_eq!(p["shown"][0]["row"], 4, "line 4 of the file holds patient 3");
    assert_eq!(p["shown"][0]["column"], "days");
    assert_eq!(p["shown"][0]["value"], "n/a?");
    assert_eq!(v["data_file"]["groups"][0]["n"], 4);
    let design = design.replace(r#""value": "days""#, r#""value": "days", "exclude_rows": [4, 6]"#);
    let v = answer_of(&tern(&["run", &write_design("stays2.json", &design), "--data", &file], None));
    assert_eq!(v["data_file"]["excluded"], 2);
    assert_eq!(v["data_file"]["groups"][0]["n"], 3);
}
