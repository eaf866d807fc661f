//! The report as JSON: the report's metadata (title, date line, version,
//! build, the caution, the sections' titles, the study notes), the design as the request
//! gave it (without the study notes) and the engine's full answer, so that
//! a program can read every number the document shows.

use super::Report;
use super::build::{RUN_COMMAND, SIMULATE_COMMAND};
use crate::engine::request::Answer;
use crate::engine::simulate::Simulation;
use serde_json::{Value, json};

/// The JSON document, pretty-printed; with a simulation check, its result
/// as `tern simulate` prints it (`simulation`) and its command.
pub fn json(r: &Report, request: &Value, answer: &Answer, simulation: Option<&Simulation>) -> String {
    let mut design = request.clone();
    if let Some(o) = design.as_object_mut() {
        o.remove("notes");
        o.remove("curves");
    }
    let mut doc = json!({
        "report": {
            "title": r.title,
            "prepared": r.stamp.line(),
            "date": r.stamp.date,
            "tern_version": r.stamp.version,
            "build": r.stamp.build,
            "caution": r.caution,
            "sections": r.sections.iter().map(|s| json!({"id": s.id, "title": s.title})).collect::<Vec<_>>(),
            "command": RUN_COMMAND,
            // The study notes as the report shows them (the design leaves them out).
            "notes": request.get("notes").cloned().unwrap_or(Value::Null),
        },
        "design": design,
        "answer": answer,
    });
    if let (Some(sim), Some(o)) = (simulation, doc.as_object_mut()) {
        o.insert("simulation".into(), serde_json::to_value(sim).unwrap_or(Value::Null));
        if let Some(rep) = o.get_mut("report").and_then(Value::as_object_mut) {
            rep.insert("simulation_command".into(), Value::from(SIMULATE_COMMAND));
        }
    }
    serde_json::to_string_pretty(&doc).unwrap_or_default()
}
