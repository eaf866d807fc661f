//! Which columns answer the question: for the roles a family's data shape
//! needs (the registry's [`Shape::roles`]: the measurement; two paired
//! columns; a group column and its two levels; an outcome and the level
//! that counts as a success), the candidates, sensible first choices, and
//! the engine's [`Mapping`] built from what the user picked. The page and
//! the command line's `--data` both read a file through it.
//!
//! Choices are kept by column *name* and level text, so that reading the
//! file again (another delimiter, decimal mark, missing-value list) keeps
//! them when the columns are still there.

use crate::engine::family::{NO_TRUTH, Role, Shape};
use super::{self as table, ColumnKind, Mapping, Table};

/// What the user picked (column names, level texts), role by role.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Choice {
    pub picks: Vec<(Role, String)>,
}

impl Choice {
    pub fn get(&self, r: Role) -> Option<&str> {
        self.picks.iter().find(|(k, _)| *k == r).map(|(_, v)| v.as_str())
    }
    pub fn set(&mut self, r: Role, v: String) {
        self.picks.retain(|(k, _)| *k != r);
        self.picks.push((r, v));
    }
}

fn column_index(t: &Table, name: &str) -> Option<usize> {
    t.columns.iter().position(|c| c.name == name)
}

pub fn levels(t: &Table, column: Option<&str>) -> Vec<String> {
    column.and_then(|c| column_index(t, c)).map_or_else(Vec::new, |i| t.columns[i].levels.iter().map(|l| l.value.clone()).collect())
}

/// The columns a role may use, by index.
pub fn candidates(t: &Table, r: Role, choice: &Choice) -> Vec<String> {
    match r {
        Role::Value | Role::First | Role::Second => {
            t.columns.iter().filter(|c| c.kind == ColumnKind::Numeric).map(|c| c.name.clone()).collect()
        }
        // A group or outcome column has a few distinct values (numbers
        // only when they look like codes, such as 0/1 or 1/2/3).
        Role::Group | Role::Outcome => t
            .columns
            .iter()
            .filter(|c| {
                let most = if c.kind == ColumnKind::Numeric { 10 } else { table::LEVELS_SHOWN };
                c.distinct.is_some_and(|k| (2..=most).contains(&k))
            })
            .map(|c| c.name.clone())
            .collect(),
        Role::Level1 | Role::Level2 => levels(t, choice.get(Role::Group)),
        Role::Success => levels(t, choice.get(Role::Outcome)),
        // Right/wrong, labels or predictions: any column with values.
        Role::Classifier1 | Role::Classifier2 => t.columns.iter().filter(|c| c.count > 0).map(|c| c.name.clone()).collect(),
        Role::Truth => std::iter::once(NO_TRUTH.to_string()).chain(t.columns.iter().filter(|c| c.count > 0).map(|c| c.name.clone())).collect(),
    }
}

/// Does a column name read like a row label (patient, id, case number)?
fn id_like(name: &str) -> bool {
    let n = name.trim().to_lowercase();
    let words = ["id", "patient", "subject", "participant", "case", "row", "index", "no", "nr", "number", "#", "record"];
    words.contains(&n.as_str()) || n.ends_with("_id") || n.ends_with(" id") || n.starts_with("id_")
}

/// Does a level read like a success ("yes", "true", "1", ...)?
fn success_like(s: &str) -> bool {
    matches!(
        s.trim().to_lowercase().as_str(),
        "yes" | "y" | "true" | "1" | "success" | "positive" | "pass" | "detected" | "ja" | "oui" | "sí" | "si"
    )
}

/// Keep what still fits the table, and fill every unanswered role with an
/// obvious first choice (the measurement column whose name contains the
/// design's unit, else the last numeric column; a group column with exactly
/// two levels, in the order they first appear; a yes-like success).
pub fn complete(t: &Table, s: Shape, old: &Choice, unit: &str) -> Choice {
    let mut c = Choice::default();
    for &r in s.roles() {
        let cands = candidates(t, r, &c);
        if let Some(v) = old.get(r).filter(|v| cands.iter().any(|x| x == v)) {
            c.set(r, v.to_string());
            continue;
        }
        let taken: Vec<String> = c.picks.iter().map(|(_, v)| v.clone()).collect();
        let mut free: Vec<&String> = cands.iter().filter(|x| !taken.contains(x)).collect();
        // A column that numbers the rows is rarely the measurement.
        if matches!(r, Role::Value | Role::First | Role::Second) && free.iter().any(|x| !id_like(x)) {
            free.retain(|x| !id_like(x));
        }
        let pick = match r {
            Role::Value => {
                let u = unit.trim().to_lowercase();
                free.iter().find(|x| !u.is_empty() && x.to_lowercase().contains(&u)).or(free.last()).map(|x| x.to_string())
            }
            Role::First | Role::Second => free.first().map(|x| x.to_string()),
            Role::Group | Role::Outcome => {
                let two = |x: &&&String| column_index(t, x).is_some_and(|i| t.columns[i].levels.len() == 2);
                let yes_like = |x: &&&String| levels(t, Some(x.as_str())).iter().any(|l| success_like(l));
                let first = if r == Role::Outcome { free.iter().find(|x| two(x) && yes_like(x)) } else { None };
                first
                    .or_else(|| free.iter().find(|x| two(x) && !(r == Role::Group && yes_like(x))))
                    .or_else(|| free.iter().find(two))
                    .map(|x| x.to_string())
            }
            Role::Level1 => free.first().map(|x| x.to_string()),
            Role::Level2 => free.first().map(|x| x.to_string()),
            Role::Success => free.iter().find(|x| success_like(x)).or(free.first()).map(|x| x.to_string()),
            // Two columns that read as right/wrong, or else the first two.
            Role::Classifier1 | Role::Classifier2 => {
                let codes = |x: &&&String| column_index(t, x).is_some_and(|i| table::right_wrong_column(&t.columns[i]));
                free.iter().find(codes).or(free.first()).map(|x| x.to_string())
            }
            // A column named like the true label, else none.
            Role::Truth => {
                let named = |x: &&&String| matches!(x.trim().to_lowercase().as_str(), "truth" | "label" | "target" | "actual" | "gold" | "y_true" | "true label" | "true_label" | "ground truth");
                Some(free.iter().find(named).map_or(NO_TRUTH.to_string(), |x| x.to_string()))
            }
        };
        if let Some(p) = pick {
            c.set(r, p);
        }
    }
    c
}

/// The engine's mapping, or the first unanswered question.
pub fn to_mapping(t: &Table, s: Shape, c: &Choice) -> Result<Mapping, &'static str> {
    let col = |r: Role| c.get(r).and_then(|n| column_index(t, n)).ok_or(r.question());
    let text = |r: Role| c.get(r).map(str::to_string).ok_or(r.question());
    Ok(match s {
        Shape::One => Mapping::OneColumn { column: col(Role::Value)? },
        Shape::Paired => Mapping::Paired { first: col(Role::First)?, second: col(Role::Second)? },
        Shape::TwoGroups => Mapping::TwoGroups {
            value: col(Role::Value)?,
            group: col(Role::Group)?,
            level1: text(Role::Level1)?,
            level2: text(Role::Level2)?,
        },
        Shape::Binary => Mapping::Binary { column: col(Role::Outcome)?, success: text(Role::Success)? },
        Shape::TwoGroupsBinary => Mapping::TwoGroupsBinary {
            outcome: col(Role::Outcome)?,
            success: text(Role::Success)?,
            group: col(Role::Group)?,
            level1: text(Role::Level1)?,
            level2: text(Role::Level2)?,
        },
        Shape::PairedBinary => Mapping::PairedBinary {
            first: col(Role::Classifier1)?,
            second: col(Role::Classifier2)?,
            truth: match c.get(Role::Truth) {
                None | Some(NO_TRUTH) => None,
                Some(name) => Some(column_index(t, name).ok_or(Role::Truth.question())?),
            },
        },
    })
}

/// The choice in words, for the note beside the filled figures.
pub fn describe(s: Shape, c: &Choice) -> String {
    let g = |r: Role| c.get(r).unwrap_or("—").to_string();
    match s {
        Shape::One => format!("measurements: {}", g(Role::Value)),
        Shape::Paired => format!("differences {} − {}", g(Role::First), g(Role::Second)),
        Shape::TwoGroups => format!(
            "measurements: {}; group 1: {} = {}; group 2: {} = {}",
            g(Role::Value),
            g(Role::Group),
            g(Role::Level1),
            g(Role::Group),
            g(Role::Level2)
        ),
        Shape::Binary => format!("outcome: {} = {}", g(Role::Outcome), g(Role::Success)),
        Shape::TwoGroupsBinary => format!(
            "outcome: {} = {}; group 1: {} = {}; group 2: {} = {}",
            g(Role::Outcome),
            g(Role::Success),
            g(Role::Group),
            g(Role::Level1),
            g(Role::Group),
            g(Role::Level2)
        ),
        Shape::PairedBinary => match c.get(Role::Truth) {
            Some(truth) if truth != NO_TRUTH => format!("predictions {} and {} against the truth {truth}", g(Role::Classifier1), g(Role::Classifier2)),
            _ => format!("right or wrong: classifier 1 {}, classifier 2 {}", g(Role::Classifier1), g(Role::Classifier2)),
        },
    }
}
