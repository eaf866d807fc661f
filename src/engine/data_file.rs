//! Deciding from a data file through the JSON contract (the command line's
//! `tern run design.json --data FILE`): the design names the columns (and
//! levels) by the registry's data-file roles, the file is read as the page
//! reads it, and the answer carries how it was read, the mapping used and
//! every located problem beside the decision.
//!
//! Architecture invariant: no I/O (the caller passes the file's bytes and
//! name); the same reader, roles and summaries as the page; a column or
//! level the design names that the file does not have is refused by field
//! name, never replaced by a guess.

use super::family::Role;
use super::request::{self, Answer, RequestError};
use super::table::roles::{self, Choice};
use super::table::{DataSummary, DecimalMark, GroupStats, ReadOptions, Table, group_values, read_table, summarise};
use serde::Serialize;
use serde_json::{Map, Value};

/// The design's fields that say how to read the file and which rows to
/// leave out (the role fields are [`Role::key`]).
pub const READ_FIELDS: [&str; 6] = ["exclude_rows", "delimiter", "decimal", "header", "missing", "sheet"];

/// How the file was read and mapped, for the answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DataFileReport {
    pub file: String,
    /// The table as read: format, sheet, header, decimal mark, rows,
    /// columns, preview and the located problems (first 100, all counted).
    pub table: Table,
    /// Each role of the family's data shape and the column or level used;
    /// `chosen` is false where the design left it to the reader's first choice.
    pub mapping: Vec<RoleUsed>,
    /// Data rows left out because the design's `exclude_rows` named them.
    pub excluded: usize,
    /// Paired rows dropped because one side is missing or not a number.
    pub dropped_pairs: usize,
    pub groups: Vec<GroupStats>,
    /// Notes on the model's strain (advice; the test is not changed).
    pub notes: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoleUsed {
    pub role: &'static str,
    pub value: String,
    pub chosen: bool,
}

/// The answer with the data file's report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FileAnswer {
    #[serde(flatten)]
    pub answer: Answer,
    pub data_file: DataFileReport,
}

fn bad(field: &str, shown: String, rule: impl Into<String>) -> RequestError {
    RequestError::BadValue { field: field.into(), shown, rule: rule.into() }
}

fn text_of(v: &Value) -> String {
    match v {
        Value::String(s) => format!("\"{s}\""),
        other => other.to_string(),
    }
}

/// Take the data-file fields out of the design object: the role picks,
/// the rows to leave out and the read options.
fn take_fields(obj: &mut Map<String, Value>) -> Result<(Choice, Vec<usize>, ReadOptions), RequestError> {
    let mut choice = Choice::default();
    for r in Role::ALL {
        match obj.remove(r.key()) {
            None | Some(Value::Null) => {}
            Some(Value::String(s)) => choice.set(r, s),
            Some(v) => return Err(bad(r.key(), text_of(&v), "a column name or a level of a column, as text")),
        }
    }
    let mut opts = ReadOptions::default();
    let mut exclude = Vec::new();
    if let Some(v) = obj.remove("exclude_rows") {
        let rule = "a list of file row numbers, such as [12, 40]";
        let Value::Array(rows) = &v else { return Err(bad("exclude_rows", text_of(&v), rule)) };
        for x in rows {
            match x.as_u64().and_then(|r| usize::try_from(r).ok()) {
                Some(r) => exclude.push(r),
                None => return Err(bad("exclude_rows", text_of(x), rule)),
            }
        }
    }
    match obj.remove("delimiter") {
        None | Some(Value::Null) => {}
        Some(Value::String(s)) if s == "tab" || s == "\t" => opts.delimiter = Some(b'\t'),
        Some(Value::String(s)) if s.len() == 1 && s.is_ascii() => opts.delimiter = s.bytes().next(),
        Some(v) => return Err(bad("delimiter", text_of(&v), "one character such as \",\" or \";\", or \"tab\"")),
    }
    match obj.remove("decimal") {
        None | Some(Value::Null) => {}
        Some(Value::String(s)) if s == "point" => opts.decimal = Some(DecimalMark::Point),
        Some(Value::String(s)) if s == "comma" => opts.decimal = Some(DecimalMark::Comma),
        Some(v) => return Err(bad("decimal", text_of(&v), "\"point\" or \"comma\"")),
    }
    match obj.remove("header") {
        None | Some(Value::Null) => {}
        Some(Value::Bool(b)) => opts.header = Some(b),
        Some(v) => return Err(bad("header", text_of(&v), "true or false")),
    }
    match obj.remove("missing") {
        None | Some(Value::Null) => {}
        Some(Value::Array(a)) if a.iter().all(Value::is_string) => {
            opts.missing = a.iter().filter_map(|x| x.as_str().map(str::to_string)).collect();
        }
        Some(v) => return Err(bad("missing", text_of(&v), "a list of texts read as missing values, such as [\"\", \"NA\"]")),
    }
    match obj.remove("sheet") {
        None | Some(Value::Null) => {}
        Some(Value::String(s)) => opts.sheet = Some(s),
        Some(v) => return Err(bad("sheet", text_of(&v), "a sheet's name, as text")),
    }
    Ok((choice, exclude, opts))
}

/// A design read together with its data file: the request without the
/// data-file fields and with the file's summary as its `data`, and what
/// the reading found.
pub struct FromFile {
    /// The design's object, role and read fields taken out, the file's
    /// summary figures put in as `data`: what `tern run` reproduces every
    /// number from, without the file.
    pub request: Map<String, Value>,
    pub table: Table,
    pub mapping: Vec<RoleUsed>,
    pub summary: DataSummary,
    /// Each group's values (empty for binary outcomes, which have no
    /// histogram), in the summary's group order.
    pub values: Vec<Vec<f64>>,
}

/// Read a design (JSON text) and its data file's bytes: read the file, map
/// its columns by the design's role fields (first choices for the roles
/// it leaves out, reported as such) and summarise.
pub fn read_with_file(text: &str, bytes: &[u8], name: &str) -> Result<FromFile, RequestError> {
    let value: Value = serde_json::from_str(text).map_err(|e| RequestError::NotJson(e.to_string()))?;
    let Value::Object(mut obj) = value else { return Err(RequestError::NotObject) };
    if obj.get("data").is_some_and(|d| !d.is_null()) {
        return Err(bad("data", "summary figures".into(), "absent when a data file is given: the file's figures decide"));
    }
    let (picks, exclude, opts) = take_fields(&mut obj)?;
    let req = request::parse_value(&Value::Object(obj.clone()))?;
    let file_error = |message: String| RequestError::DataFile { file: name.to_string(), message };
    let table = read_table(bytes, Some(name), &opts).map_err(|e| file_error(e.to_string()))?;
    let shape = req.design.family.entry().shape;
    for r in Role::ALL {
        if picks.get(r).is_some() && !shape.roles().contains(&r) {
            let wanted: Vec<&str> = shape.roles().iter().map(|r| r.key()).collect();
            return Err(RequestError::UnknownField {
                field: r.key().into(),
                hint: String::new(),
                known: format!("{} (the data-file roles of {})", wanted.join(", "), req.design.family.id()),
            });
        }
    }
    // Role by role, in the order the page asks: a pick the design names
    // must be one the file offers; a role it leaves out gets the page's
    // first choice.
    let mut choice = Choice::default();
    for &r in shape.roles() {
        match picks.get(r) {
            Some(v) => {
                let offered = roles::candidates(&table, r, &choice);
                if !offered.iter().any(|c| c == v) {
                    let what = if r.is_column() { "a column of the file that can play this part" } else { "a value of the chosen column" };
                    let list = if offered.is_empty() { "none fits".to_string() } else { offered.join(", ") };
                    return Err(bad(r.key(), format!("\"{v}\""), format!("{what} ({list})")));
                }
                choice.set(r, v.to_string());
            }
            None => {
                if let Some(v) = roles::complete(&table, shape, &choice, "").get(r) {
                    choice.set(r, v.to_string());
                }
            }
        }
    }
    let mapping = roles::to_mapping(&table, shape, &choice).map_err(|q| file_error(format!("still to choose: {q}")))?;
    let summary = summarise(&table, &mapping, &exclude).map_err(|e| file_error(e.to_string()))?;
    let values = if shape.binary() { Vec::new() } else { group_values(&table, &mapping, &exclude).map_err(|e| file_error(e.to_string()))? };
    let data: Map<String, Value> = summary.summary.fields().into_iter().map(|(k, v)| (k.to_string(), request::json_number(v))).collect();
    obj.insert("data".into(), Value::Object(data));
    let used = shape
        .roles()
        .iter()
        .map(|&r| RoleUsed { role: r.key(), value: choice.get(r).unwrap_or_default().to_string(), chosen: picks.get(r).is_some() })
        .collect();
    Ok(FromFile { request: obj, table, mapping: used, summary, values })
}

/// Answer a design (JSON text) from a data file's bytes: read, map and
/// summarise ([`read_with_file`]), then decide.
pub fn answer_from_file(text: &str, bytes: &[u8], name: &str) -> Result<FileAnswer, RequestError> {
    let f = read_with_file(text, bytes, name)?;
    let mut req = request::parse_value(&Value::Object(f.request))?;
    req.data = Some(f.summary.summary);
    let answer = request::answer(&req)?;
    Ok(FileAnswer {
        answer,
        data_file: DataFileReport {
            file: name.to_string(),
            table: f.table,
            mapping: f.mapping,
            excluded: f.summary.excluded,
            dropped_pairs: f.summary.dropped_pairs,
            groups: f.summary.groups,
            notes: f.summary.notes,
        },
    })
}

/// The same, serialised: the command line's `tern run design.json --data FILE`.
pub fn run_from_file(text: &str, bytes: &[u8], name: &str) -> Result<String, RequestError> {
    let a = answer_from_file(text, bytes, name)?;
    serde_json::to_string_pretty(&a).map_err(|e| RequestError::NotJson(e.to_string()))
}

/// The simulation check of a design (JSON text with a `simulation` block)
/// beside its data file: the file's values per group are what the
/// `resample` shape draws from (yes/no outcomes have none to resample).
pub fn simulate_with_file(text: &str, bytes: &[u8], name: &str) -> Result<request::SimulationAnswer, RequestError> {
    let mut f = read_with_file(text, bytes, name)?;
    f.request.remove("data");
    let req = request::parse_value(&Value::Object(f.request))?;
    let groups = if f.values.is_empty() { None } else { Some(f.values) };
    request::simulate(&req, groups)
}

/// The same, serialised: `tern simulate design.json --data FILE`.
pub fn simulate_from_file(text: &str, bytes: &[u8], name: &str) -> Result<String, RequestError> {
    let a = simulate_with_file(text, bytes, name)?;
    serde_json::to_string_pretty(&a).map_err(|e| RequestError::NotJson(e.to_string()))
}
