//! The report as JSON: the report's metadata (title, date line, version,
//! build, the caution, the sections' titles, the study notes), the design as the request
//! gave it (without the study notes) and the engine's full answer, so that
//! a program can read every number the document shows.

use super::Report;
use crate::engine::request::Answer;
use serde_json::{Value, json};

/// The JSON document, pretty-printed.
pub fn json(r: &Report, request: &Value, answer: &Answer) -> String {
    let mut design = request.clone();
    if let Some(o) = design.as_object_mut() {
        o.remove("notes");
        o.remove("curves");
    }
    let doc = json!({
        "report": {
            "title": r.title,
            "prepared": r.stamp.line(),
            "date": r.stamp.date,
            "tern_version": r.stamp.version,
            "build": r.stamp.build,
            "caution": r.caution,
            "sections": r.sections.iter().map(|s| json!({"id": s.id, "title": s.title})).collect::<Vec<_>>(),
            "command": "tern run design.json",
            // The study notes as the report shows them (the design leaves them out).
            "notes": request.get("notes").cloned().unwrap_or(Value::Null),
        },
        "design": design,
        "answer": answer,
    });
    serde_json::to_string_pretty(&doc).unwrap_or_default()
}
