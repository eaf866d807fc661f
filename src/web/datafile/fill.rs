//! The file's summary figures go into the same summary-figure fields a user
//! types into, so the decision, the charts and the parity with the command
//! line stay one path.
//!
//! Invariant: nothing the user typed is lost or silently replaced. Before a
//! field is first filled, its previous text is kept; every filled field is
//! marked (class `from-file`) while it still holds the file's figure, the
//! note above the figures says where they came from, and one click puts the
//! previous texts back. A field the user edits is the user's again.

use super::super::{dom, form};
use crate::engine::decision::Summary;
use crate::engine::design::Family;

#[derive(Debug, Clone, Default)]
pub struct Fill {
    /// (field, text) the file wrote last.
    pub filled: Vec<(String, String)>,
    /// (field, text before the file first wrote it), since the last undo.
    pub saved: Vec<(String, String)>,
    /// The file's figures are in use (false after "put back").
    pub active: bool,
}

/// A figure as text: whole numbers plainly, others with ten significant
/// digits (far below any difference the decision can see), no trailing zeros.
pub fn figure(v: f64) -> String {
    if !v.is_finite() {
        return String::new();
    }
    if v.fract() == 0.0 && v.abs() < 1e15 {
        return format!("{}", v as i64);
    }
    let digits = (9 - v.abs().log10().floor() as i32).clamp(0, 15) as usize;
    let s = format!("{v:.digits$}");
    if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
}

/// The page inputs of a summary (the family's registry fields), with
/// their texts.
pub fn fields(family: Family, s: &Summary) -> Vec<(&'static str, String)> {
    let entry = family.entry();
    s.fields().into_iter().filter_map(|(key, v)| entry.data_field(key).map(|f| (f.input, figure(v)))).collect()
}

fn current(field: &str) -> String {
    dom::value(&form::input_id(field))
}

impl Fill {
    /// Write the summary's figures into their fields, keeping what was
    /// there before (the first time only).
    pub fn write(&mut self, family: Family, s: &Summary) {
        if !self.active {
            return;
        }
        for (field, text) in fields(family, s) {
            // A figure the user typed over the file's one is theirs now.
            let edited = self.filled.iter().any(|(f, t)| f == field && *t != current(field));
            if edited {
                continue;
            }
            if !self.saved.iter().any(|(f, _)| f == field) {
                self.saved.push((field.to_string(), current(field)));
            }
            dom::set_value(&form::input_id(field), &text);
            self.filled.retain(|(f, _)| f != field);
            self.filled.push((field.to_string(), text));
        }
        self.mark();
    }

    /// Put back the texts that were there before the file wrote them.
    pub fn put_back(&mut self) {
        for (field, text) in self.saved.drain(..) {
            // Only where the file's figure is still there: an edit made
            // since then is the user's and stays.
            let still = self.filled.iter().any(|(f, t)| *f == field && *t == current(&field));
            if still {
                dom::set_value(&form::input_id(&field), &text);
            }
        }
        self.filled.clear();
        self.mark();
    }

    /// Mark exactly the fields that still hold the file's figure.
    pub fn mark(&self) {
        for (field, text) in &self.filled {
            let wrap = format!("w-{}", field.replace('.', "-"));
            dom::set_class(&wrap, "from-file", *text == current(field));
        }
        for f in ALL {
            if !self.filled.iter().any(|(x, _)| x == f) {
                dom::set_class(&format!("w-{}", f.replace('.', "-")), "from-file", false);
            }
        }
    }

    /// How many fields still hold the file's figure.
    pub fn shown(&self) -> usize {
        self.filled.iter().filter(|(f, t)| *t == current(f)).count()
    }
}

const ALL: [&str; 15] = [
    "data.n",
    "data.mean",
    "data.sd",
    "data.n1",
    "data.mean1",
    "data.sd1",
    "data.n2",
    "data.mean2",
    "data.sd2",
    "data.successes",
    "data.trials",
    "data.successes1",
    "data.trials1",
    "data.successes2",
    "data.trials2",
];
