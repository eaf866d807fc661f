//! From a file to a decision: mappings, exclusions, notes, and the decision
//! from a file equal to the decision from the same summary figures.

use tern::engine::decision::{Summary, decide};
use tern::engine::design::{Design, DesignSpec, Family};
use tern::engine::table::{Mapping, MappingError, ReadOptions, Table, group_values, read_table, summarise};
use tern::engine::threshold::Alternative;

fn file(dir: &str, name: &str) -> Table {
    let path = format!("{}/tests/{dir}/{name}", env!("CARGO_MANIFEST_DIR"));
    read_table(&std::fs::read(&path).unwrap(), Some(name), &ReadOptions::default()).unwrap()
}

fn corpus(name: &str) -> Table {
    file("data_files", name)
}

fn design(spec: DesignSpec) -> Design {
    Design::new(&spec).expect("valid design")
}

#[test]
fn two_groups_file_decides_like_its_summary_figures() {
    // tests/reference/data/two_wards.csv: the figures below are NumPy's
    // (tests/reference/describe.json, rounded here only for the comparison
    // through the JSON contract).
    let t = file("reference/data", "two_wards.csv");
    let m = Mapping::TwoGroups { value: 1, group: 0, level1: "Nord".into(), level2: "Süd".into() };
    let ds = summarise(&t, &m, &[]).unwrap();
    let Summary::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 } = ds.summary else { panic!("{:?}", ds.summary) };
    assert_eq!((n1, n2), (23.0, 31.0));
    for family in [Family::TwoMeansPooled, Family::TwoMeansWelch] {
        let mut spec = DesignSpec::new(family, Alternative::Greater).with("theta0", 0.0).with("theta1", 5.0).with("alpha_max", 0.1).with("beta_max", 0.2);
        spec.put("sigma", (family == Family::TwoMeansPooled).then_some(7.0));
        spec.put("sigma1", (family == Family::TwoMeansWelch).then_some(4.0));
        spec.put("sigma2", (family == Family::TwoMeansWelch).then_some(9.0));
        let d = design(spec);
        let from_file = decide(&d, &ds.summary).unwrap();
        let from_figures = decide(&d, &Summary::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 }).unwrap();
        assert_eq!(from_file, from_figures);
        // The serialised summary is the JSON contract's `data` object.
        let data = serde_json::to_value(ds.summary).unwrap();
        assert_eq!(data["n1"], 23.0);
        assert!(data.get("n").is_none());
    }
    // Unequal spreads (sd 4 vs 9 planned): the note suggests Welch, as advice.
    assert!(ds.notes.iter().any(|n| n.contains("Welch")), "{:?}", ds.notes);
}

#[test]
fn summary_serialises_as_the_request_data_object() {
    let t = file("reference/data", "blood_pressure.csv");
    let ds = summarise(&t, &Mapping::OneColumn { column: 0 }, &[]).unwrap();
    let request = serde_json::json!({
        "family": "mean_t", "alternative": "greater", "theta0": 125.0, "theta1": 133.0, "sigma": 14.0,
        "alpha_max": 0.1, "beta_max": 0.2, "data": ds.summary,
    });
    let req = tern::engine::request::parse(&request.to_string()).unwrap();
    assert_eq!(req.data, Some(ds.summary));
    let direct = decide(&req.design, &ds.summary).unwrap();
    let answered = tern::engine::request::answer(&req).unwrap().decision.unwrap();
    assert_eq!(direct, answered);
}

#[test]
fn paired_rows_with_one_side_missing_are_dropped_and_counted() {
    let t = corpus("paired.csv");
    let ds = summarise(&t, &Mapping::Paired { first: 1, second: 2 }, &[]).unwrap();
    // Differences 140−132, 138−135, 145−139, 160−150 (rows 3 and 5 have one side).
    assert_eq!(ds.dropped_pairs, 2);
    assert_eq!(ds.groups[0].n, 4);
    assert_eq!(ds.groups[0].label, "before − after");
    assert!((ds.groups[0].mean - 6.75).abs() < 1e-12);
    assert!(ds.notes.iter().any(|n| n.contains("2 row(s) have only one of the two paired")));
    assert!(matches!(summarise(&t, &Mapping::Paired { first: 1, second: 1 }, &[]), Err(MappingError::Same(_))));
}

#[test]
fn a_one_group_two_group_file_names_the_levels_it_has() {
    let t = corpus("one_group.csv");
    let m = Mapping::TwoGroups { value: 0, group: 1, level1: "treated".into(), level2: "control".into() };
    let e = summarise(&t, &m, &[]).unwrap_err();
    assert_eq!(e.to_string(), "column \"arm\" has no value \"control\"; its values are: \"treated\"");
    let same = Mapping::TwoGroups { value: 0, group: 1, level1: "treated".into(), level2: "treated".into() };
    assert!(summarise(&t, &same, &[]).unwrap_err().to_string().contains("two different values"));
}

#[test]
fn sd_zero_is_noted_and_the_decision_says_why_it_cannot_proceed() {
    let t = corpus("sd_zero.csv");
    let m = Mapping::TwoGroups { value: 0, group: 1, level1: "A".into(), level2: "B".into() };
    let ds = summarise(&t, &m, &[]).unwrap();
    assert_eq!(ds.groups[0].sd, Some(0.0));
    assert_eq!(ds.groups[0].skewness, None);
    assert!(ds.notes.iter().any(|n| n.contains("standard deviation is 0")), "{:?}", ds.notes);
    let d = design(DesignSpec::new(Family::TwoMeansPooled, Alternative::Greater).with("d", 0.5).with("alpha_max", 0.1).with("beta_max", 0.2));
    let e = decide(&d, &ds.summary).unwrap_err().to_string();
    assert!(e.contains("sd = 0"), "{e}");
}

#[test]
fn binary_outcomes_count_successes_per_group() {
    let t = corpus("binary_outcome.csv");
    let one = summarise(&t, &Mapping::Binary { column: 1, success: "yes".into() }, &[]).unwrap();
    assert_eq!(one.summary, Summary::Proportion { successes: 3.0, trials: 6.0 });
    assert_eq!(one.groups[0].missing, 1);
    let two = Mapping::TwoGroupsBinary { outcome: 1, success: "yes".into(), group: 0, level1: "treated".into(), level2: "control".into() };
    let ds = summarise(&t, &two, &[]).unwrap();
    assert_eq!(ds.summary, Summary::TwoProportions { successes1: 2.0, trials1: 3.0, successes2: 1.0, trials2: 3.0 });
    assert!(ds.notes.iter().any(|n| n.contains("normal approximation is rough")));
    assert_eq!(group_values(&t, &two, &[]).unwrap()[0], [1.0, 1.0, 0.0]);
    let e = summarise(&t, &Mapping::Binary { column: 1, success: "Yes!".into() }, &[]).unwrap_err().to_string();
    assert!(e.contains("\"yes\", \"no\""), "{e}");
}

#[test]
fn excluding_the_problem_rows_keeps_the_rest() {
    let t = corpus("bad_cells.csv");
    assert_eq!(t.problems.rows, [3, 5]);
    let all = summarise(&t, &Mapping::OneColumn { column: 1 }, &[]).unwrap();
    assert_eq!((all.groups[0].n, all.groups[0].missing, all.excluded), (3, 2, 0));
    let kept = summarise(&t, &Mapping::OneColumn { column: 1 }, &t.problems.rows).unwrap();
    assert_eq!((kept.groups[0].n, kept.groups[0].missing, kept.excluded), (3, 0, 2));
    // Rows that are not data rows (the header, beyond the end) are ignored.
    let odd = summarise(&t, &Mapping::OneColumn { column: 1 }, &[1, 2, 2, 999]).unwrap();
    assert_eq!((odd.groups[0].n, odd.excluded), (2, 1));
}

#[test]
fn mapping_errors_name_the_column() {
    let t = corpus("binary_outcome.csv");
    assert_eq!(
        summarise(&t, &Mapping::OneColumn { column: 0 }, &[]).unwrap_err().to_string(),
        "column \"arm\" holds no numbers (it holds text such as \"treated\"; choose a column of measurements)"
    );
    assert!(matches!(summarise(&t, &Mapping::OneColumn { column: 9 }, &[]), Err(MappingError::NoColumn { index: 9, count: 2 })));
    let e = corpus("empty_column.csv");
    assert!(summarise(&e, &Mapping::OneColumn { column: 1 }, &[]).unwrap_err().to_string().contains("every cell is missing"));
}

#[test]
fn skew_and_outliers_are_noted() {
    // A fictional clinic's waiting times in minutes, one far-out entry (row 12).
    let text = "minutes\n12\n14\n11\n13\n15\n12\n14\n13\n12\n11\n240\n13\n";
    let t = read_table(text.as_bytes(), None, &ReadOptions::default()).unwrap();
    let ds = summarise(&t, &Mapping::OneColumn { column: 0 }, &[]).unwrap();
    assert!(ds.notes.iter().any(|n| n.contains("strongly skewed")), "{:?}", ds.notes);
    assert!(ds.notes.iter().any(|n| n.contains("row 12 (240)")), "{:?}", ds.notes);
}
