//! The family registry reaches every door: for every entry, a design and
//! its summary figures go through the command line's JSON contract, the
//! page's form model and a data file, and each decides; the README carries
//! the registry's own table of families and fields.
//!
//! The values below are ordinary planning values chosen for this test
//! (a fictional study), not expected results: what is checked is that
//! every family is reachable and decides the same way through each door.

use tern::engine::decision::Summary;
use tern::engine::family::{Check, Entry, Field, REGISTRY, Role, Shape, fields_table};
use tern::engine::request::{self, Ask};
use tern::engine::table::{ReadOptions, read_table, summarise};
use tern::page::form::{self, FormText};
use tern::engine::table::roles::{Choice, complete, to_mapping};

/// The design fields a test gives: the required ones, and `folds` where a
/// family offers it (it or `test_train_ratio` must be given: the
/// conventions' "exactly one of").
fn given(e: &Entry) -> impl Iterator<Item = &'static Field> {
    e.design.iter().filter(|f| f.required || f.key == "folds")
}

/// A planning value for a design field, on the `greater` side.
fn planning(f: &Field) -> f64 {
    match (f.check, f.key) {
        (Check::Folds, _) => 10.0,
        (Check::OpenUnit, "theta0" | "p2" | "acc2") => 0.5,
        (_, "discordant") => 0.3,
        (Check::OpenUnit, _) => 0.7,
        (_, "theta0") => 0.0,
        (_, "theta1") => 0.6,
        (Check::Ratio, _) => 1.0,
        _ => 1.0,
    }
}

/// Summary figures that a design can decide from.
fn figure(key: &str) -> f64 {
    match key {
        "n" | "n1" | "n2" | "trials" | "trials1" | "trials2" => 40.0,
        "successes" | "successes1" => 30.0,
        "successes2" => 18.0,
        "mean" | "mean1" => 0.5,
        "mean2" => 0.0,
        _ => 1.0,
    }
}

fn design_json(e: &Entry) -> serde_json::Map<String, serde_json::Value> {
    let mut m = serde_json::Map::new();
    m.insert("family".into(), e.id.into());
    m.insert("alternative".into(), "greater".into());
    m.insert("alpha_max".into(), 0.1.into());
    m.insert("beta_max".into(), 0.2.into());
    for f in given(e) {
        m.insert(f.key.into(), planning(f).into());
    }
    m
}

fn outcome(v: &serde_json::Value) -> String {
    v["decision"]["outcome"].as_str().unwrap_or("none").to_string()
}

#[test]
fn every_family_decides_through_the_command_line_contract() {
    for e in &REGISTRY {
        let mut m = design_json(e);
        let data: serde_json::Map<String, serde_json::Value> =
            e.data.iter().filter(|f| f.required).map(|f| (f.key.to_string(), figure(f.key).into())).collect();
        m.insert("data".into(), data.into());
        let out = request::run(&serde_json::Value::Object(m).to_string()).unwrap_or_else(|err| panic!("{}: {err}", e.id));
        let v: serde_json::Value = serde_json::from_str(&out).unwrap();
        assert_eq!(v["family"], e.id);
        assert_ne!(outcome(&v), "none", "{}: no decision", e.id);
    }
}

#[test]
fn every_family_decides_through_the_page_form() {
    for e in &REGISTRY {
        let mut values: Vec<(String, String)> = vec![("alpha_max".into(), "10%".into()), ("beta_max".into(), "0.2".into())];
        for f in given(e) {
            values.push((f.input.into(), planning(f).to_string()));
        }
        for f in e.data.iter().filter(|f| f.required) {
            values.push((f.input.into(), figure(f.key).to_string()));
        }
        let text = FormText { family: Some(e.id.into()), alternative: Some("greater".into()), unit: String::new(), values, texts: Vec::new() };
        let reading = form::read(&text);
        assert!(reading.design_ready() && reading.data_complete, "{}: {:?}", e.id, reading.messages);
        let reply = request::reply(&reading.ask);
        assert!(reply.errors.is_empty(), "{}: {:?}", e.id, reply.errors);
        let answer = reply.answer.unwrap_or_else(|| panic!("{}: no answer", e.id));
        assert!(answer.decision.is_some(), "{}: no decision", e.id);
        assert!(form::shown(Some(e.family)).len() >= e.design.len() + 3, "{}", e.id);
    }
}

/// A small file with the columns a shape needs, in the shape's own words.
fn file_for(shape: Shape) -> &'static str {
    match shape {
        Shape::One => "patient,days\n1,0.2\n2,1.4\n3,0.9\n4,-0.3\n5,1.1\n6,0.4\n",
        Shape::Paired => "patient,before,after\n1,5.2,4.1\n2,6.0,5.5\n3,4.8,4.9\n4,5.5,4.2\n5,6.1,5.0\n",
        Shape::TwoGroups => "ward,days\nA,1.2\nA,0.8\nA,1.9\nB,0.1\nB,0.5\nB,-0.2\n",
        Shape::Binary => "patient,healed\n1,yes\n2,yes\n3,no\n4,yes\n5,yes\n6,no\n",
        Shape::TwoGroupsBinary => "ward,healed\nA,yes\nA,yes\nA,no\nA,yes\nB,no\nB,yes\nB,no\nB,no\n",
        Shape::PairedBinary => "item,model_a,model_b\n1,correct,correct\n2,correct,wrong\n3,wrong,correct\n4,correct,correct\n5,correct,wrong\n6,wrong,wrong\n",
    }
}

#[test]
fn every_family_decides_from_a_data_file() {
    for e in &REGISTRY {
        let t = read_table(file_for(e.shape).as_bytes(), Some("study.csv"), &ReadOptions::default()).unwrap();
        let choice = complete(&t, e.shape, &Choice::default(), "");
        for &r in e.shape.roles() {
            assert!(choice.get(r).is_some(), "{}: no first choice for {}", e.id, r.key());
        }
        let mapping = to_mapping(&t, e.shape, &choice).unwrap_or_else(|q| panic!("{}: {q}", e.id));
        let s = summarise(&t, &mapping, &[]).unwrap_or_else(|err| panic!("{}: {err}", e.id));
        // The file's figures are the family's summary fields, and decide.
        let fields: Vec<(&str, f64)> = s.summary.fields();
        for f in e.data.iter().filter(|f| f.required) {
            assert!(fields.iter().any(|(k, _)| *k == f.key), "{}: the file gives no {}", e.id, f.key);
        }
        let spec = request::parse_value(&serde_json::Value::Object(design_json(e))).unwrap().design;
        let ask = Ask { spec: to_spec(e), n: None, data: Some(fields.clone()), ..Ask::default() };
        let reply = request::reply(&ask);
        assert!(reply.errors.is_empty(), "{}: {:?}", e.id, reply.errors);
        assert_eq!(reply.answer.map(|a| a.design), Some(spec));
        assert!(matches!(Summary::from_fields(e.family, &fields), Ok(x) if x == s.summary), "{}", e.id);
    }
}

fn to_spec(e: &Entry) -> tern::engine::design::DesignSpec {
    let mut s = tern::engine::design::DesignSpec::new(e.family, tern::engine::threshold::Alternative::Greater)
        .with("alpha_max", 0.1)
        .with("beta_max", 0.2);
    for f in given(e) {
        s.set(f.key, planning(f));
    }
    s
}

#[test]
fn every_role_is_asked_by_some_shape() {
    for r in Role::ALL {
        assert!(REGISTRY.iter().any(|e| e.shape.roles().contains(&r)), "{} is never asked", r.key());
        assert_eq!(Role::from_key(r.key()), Some(r));
    }
}

#[test]
fn the_readme_carries_the_registrys_table() {
    let readme = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md")).unwrap();
    let table = fields_table();
    assert!(
        readme.contains(&table),
        "README.md's families table differs from the registry's; replace it with:\n\n{table}"
    );
}

/// `TERN_PRINT_FAMILIES_TABLE=1 cargo test --test registry print -- --nocapture`
/// prints the table for the README.
#[test]
fn print_the_families_table_when_asked() {
    if std::env::var_os("TERN_PRINT_FAMILIES_TABLE").is_some() {
        println!("{}", fields_table());
    }
}
