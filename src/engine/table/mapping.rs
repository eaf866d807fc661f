//! Map columns to a design's data (one column, paired columns, a value and
//! a group column, a binary outcome) and summarise each group.

use super::charts_data::quantiles;
use super::columns::{Column, MISSING};
use super::notes::{self, Group};
use super::summary::{GroupStats, Moments};
use super::{ColumnKind, Table, MAX_LEVELS};
use crate::engine::decision::Summary;
use serde::{Deserialize, Serialize};

/// Which columns (0-based [`super::ColumnInfo::index`]) play which part.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Mapping {
    /// One sample: `mean_z`, `mean_t`.
    OneColumn { column: usize },
    /// Paired samples: `paired_t` on first − second, row by row.
    Paired { first: usize, second: usize },
    /// Two groups: `two_means_pooled`, `two_means_welch`; group 1 is
    /// `level1` (differences are group 1 minus group 2).
    TwoGroups { value: usize, group: usize, level1: String, level2: String },
    /// One proportion: `proportion_exact`, `proportion_normal`; cells equal
    /// to `success` are successes, every other non-missing cell a failure.
    Binary { column: usize, success: String },
    /// Two proportions: `two_proportions`.
    TwoGroupsBinary { outcome: usize, success: String, group: usize, level1: String, level2: String },
    /// Two classifiers on the same items (`two_classifiers`), row by row:
    /// each column says right or wrong ([`right_wrong`]), or, with `truth`,
    /// holds a prediction that is right when it equals the truth.
    PairedBinary { first: usize, second: usize, truth: Option<usize> },
}

/// Does a cell's text say right (true) or wrong (false)? Case and the
/// surrounding spaces aside: 1, true, yes, y, t, correct, right, pass and
/// 0, false, no, n, f, wrong, incorrect, fail (a number equal to 1 or 0
/// too). None for anything else.
pub fn right_wrong(text: &str) -> Option<bool> {
    let t = text.trim().to_lowercase();
    match t.as_str() {
        "1" | "true" | "yes" | "y" | "t" | "correct" | "right" | "pass" => Some(true),
        "0" | "false" | "no" | "n" | "f" | "wrong" | "incorrect" | "fail" => Some(false),
        _ => match t.parse::<f64>() {
            Ok(1.0) => Some(true),
            Ok(0.0) => Some(false),
            _ => None,
        },
    }
}

/// Does every value of a column read as right or wrong?
pub fn right_wrong_column(c: &super::ColumnInfo) -> bool {
    !c.levels.is_empty() && c.levels.iter().all(|l| right_wrong(&l.value).is_some())
}

/// What a mapping gives: per-group figures, what was left out, the summary
/// for [`crate::engine::decision::decide`] and notes on the model.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DataSummary {
    pub groups: Vec<GroupStats>,
    /// Paired rows with one side missing or not a number.
    pub dropped_pairs: usize,
    /// Data rows left out because the user excluded them.
    pub excluded: usize,
    /// Ready for `decide()`; serialised as the JSON contract's `data` object.
    pub summary: Summary,
    /// Plain-language notes (advice, never a change of test).
    pub notes: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum MappingError {
    #[error("there is no column {index} (the table has {count} columns)")]
    NoColumn { index: usize, count: usize },
    #[error("column \"{column}\" holds no numbers ({detail})")]
    NotNumeric { column: String, detail: String },
    #[error("column \"{column}\" has no value \"{level}\"; its values are: {available}")]
    NoLevel { column: String, level: String, available: String },
    #[error("column \"{column}\" has more than {max} distinct values, so it cannot be a group or outcome column")]
    TooManyLevels { column: String, max: usize },
    #[error("{0}")]
    Same(String),
    #[error(
        "column \"{column}\" holds \"{value}\" (row {row}), which reads as neither right (1, true, yes, correct, right) nor wrong \
         (0, false, no, wrong, incorrect): choose two columns that say whether each classifier was right, or, if they hold \
         predictions, the column with the true label"
    )]
    NotRightWrong { column: String, value: String, row: usize },
    #[error("{group} has {n} usable value(s), but {needs}")]
    TooFew { group: String, n: usize, needs: String },
}

/// Summarise the mapped columns, leaving out the data rows whose file row
/// (as in [`super::Problem::row`]) is in `exclude_rows`.
pub fn summarise(table: &Table, mapping: &Mapping, exclude_rows: &[usize]) -> Result<DataSummary, MappingError> {
    let sel = select(table, mapping, exclude_rows)?;
    let mut groups = Vec::with_capacity(sel.groups.len());
    let mut quartiles = Vec::with_capacity(sel.groups.len());
    for g in &sel.groups {
        let m = Moments::from_values(&g.values);
        let q = quantiles(&mut g.values.clone(), &[0.25, 0.5, 0.75]);
        let median = q[1];
        groups.push(GroupStats {
            label: g.label.clone(),
            n: g.values.len(),
            missing: g.missing,
            mean: m.mean(),
            sd: m.sd(),
            median,
            min: m.min,
            max: m.max,
            skewness: m.skewness(),
            excess_kurtosis: m.excess_kurtosis(),
            successes: g.successes,
        });
        quartiles.push((q[0], q[2]));
    }
    let sd = |g: &GroupStats| g.sd.unwrap_or(f64::NAN);
    let summary = match mapping {
        Mapping::OneColumn { .. } | Mapping::Paired { .. } => {
            let g = &groups[0];
            Summary::OneGroup { n: g.n as f64, mean: g.mean, sd: g.sd }
        }
        Mapping::TwoGroups { .. } => {
            let (a, b) = (&groups[0], &groups[1]);
            Summary::TwoGroups { n1: a.n as f64, mean1: a.mean, sd1: sd(a), n2: b.n as f64, mean2: b.mean, sd2: sd(b) }
        }
        Mapping::Binary { .. } => {
            let g = &groups[0];
            Summary::Proportion { successes: g.successes.unwrap_or(0) as f64, trials: g.n as f64 }
        }
        Mapping::TwoGroupsBinary { .. } => {
            let (a, b) = (&groups[0], &groups[1]);
            Summary::TwoProportions {
                successes1: a.successes.unwrap_or(0) as f64,
                trials1: a.n as f64,
                successes2: b.successes.unwrap_or(0) as f64,
                trials2: b.n as f64,
            }
        }
        // The two groups hold the same items in the same order (1 right).
        Mapping::PairedBinary { .. } => {
            let mut cells = [0usize; 4];
            for (x, y) in sel.groups[0].values.iter().zip(&sel.groups[1].values) {
                cells[match (*x == 1.0, *y == 1.0) {
                    (true, true) => 0,
                    (true, false) => 1,
                    (false, true) => 2,
                    (false, false) => 3,
                }] += 1;
            }
            Summary::Classifiers {
                both_right: cells[0] as f64,
                only_first_right: cells[1] as f64,
                only_second_right: cells[2] as f64,
                both_wrong: cells[3] as f64,
            }
        }
    };
    let binary = matches!(mapping, Mapping::Binary { .. } | Mapping::TwoGroupsBinary { .. } | Mapping::PairedBinary { .. });
    let views: Vec<Group<'_>> = groups
        .iter()
        .zip(&quartiles)
        .zip(&sel.groups)
        .map(|((stats, &quartiles), g)| Group { stats, quartiles, values: &g.values, rows: &g.rows, table })
        .collect();
    let notes = notes::notes(&views, binary, sel.dropped_pairs, sel.other_rows, sel.excluded);
    Ok(DataSummary { groups, dropped_pairs: sel.dropped_pairs, excluded: sel.excluded, summary, notes })
}

/// The values of each group, in the order of [`DataSummary::groups`]
/// (binary outcomes as 1 and 0), for the charts.
pub fn group_values(table: &Table, mapping: &Mapping, exclude_rows: &[usize]) -> Result<Vec<Vec<f64>>, MappingError> {
    Ok(select(table, mapping, exclude_rows)?.groups.into_iter().map(|g| g.values).collect())
}

/// One group's values and the data index of each.
pub(crate) struct Selected {
    pub label: String,
    pub values: Vec<f64>,
    pub rows: Vec<u32>,
    pub missing: usize,
    pub successes: Option<usize>,
}

struct Selection {
    groups: Vec<Selected>,
    dropped_pairs: usize,
    /// Rows whose group cell is missing or another level.
    other_rows: usize,
    excluded: usize,
}

fn column(table: &Table, index: usize) -> Result<&Column, MappingError> {
    table.data.get(index).ok_or(MappingError::NoColumn { index, count: table.data.len() })
}

fn numeric(col: &Column) -> Result<&[f64], MappingError> {
    match col.kind() {
        ColumnKind::Numeric => Ok(&col.values),
        ColumnKind::Empty => Err(MappingError::NotNumeric { column: col.name.clone(), detail: "every cell is missing".into() }),
        ColumnKind::Categorical => Err(MappingError::NotNumeric {
            column: col.name.clone(),
            detail: match col.text_shown.first() {
                Some((_, t)) => format!("it holds text such as \"{t}\"; choose a column of measurements"),
                None => "it holds text; choose a column of measurements".into(),
            },
        }),
    }
}

fn codes(col: &Column) -> Result<&[u32], MappingError> {
    col.codes.as_deref().ok_or(MappingError::TooManyLevels { column: col.name.clone(), max: MAX_LEVELS })
}

fn level(col: &Column, text: &str) -> Result<u32, MappingError> {
    col.code_of(text).ok_or_else(|| MappingError::NoLevel {
        column: col.name.clone(),
        level: text.to_string(),
        available: {
            let mut shown: Vec<String> = col.levels.iter().take(10).map(|l| format!("\"{}\"", l.value)).collect();
            if col.levels.len() > 10 {
                shown.push(format!("and {} more", col.levels.len() - 10));
            }
            if shown.is_empty() { "none (every cell is missing)".into() } else { shown.join(", ") }
        },
    })
}

fn select(table: &Table, mapping: &Mapping, exclude_rows: &[usize]) -> Result<Selection, MappingError> {
    let n = table.n_rows;
    let mut keep = vec![true; n];
    let mut excluded = 0;
    for &r in exclude_rows {
        if let Some(i) = table.data_index(r)
            && keep[i]
        {
            keep[i] = false;
            excluded += 1;
        }
    }
    let mut sel = Selection { groups: Vec::new(), dropped_pairs: 0, other_rows: 0, excluded };
    let empty = |label: String| Selected { label, values: Vec::new(), rows: Vec::new(), missing: 0, successes: None };
    match mapping {
        Mapping::OneColumn { column: c } => {
            let col = column(table, *c)?;
            let v = numeric(col)?;
            let mut g = empty(col.name.clone());
            for i in (0..n).filter(|&i| keep[i]) {
                if v[i].is_finite() {
                    g.values.push(v[i]);
                    g.rows.push(i as u32);
                } else {
                    g.missing += 1;
                }
            }
            sel.groups.push(g);
        }
        Mapping::Paired { first, second } => {
            if first == second {
                return Err(MappingError::Same("paired data need two different columns (first and second measurement)".into()));
            }
            let (ca, cb) = (column(table, *first)?, column(table, *second)?);
            let (a, b) = (numeric(ca)?, numeric(cb)?);
            let mut g = empty(format!("{} − {}", ca.name, cb.name));
            for i in (0..n).filter(|&i| keep[i]) {
                match (a[i].is_finite(), b[i].is_finite()) {
                    (true, true) => {
                        g.values.push(a[i] - b[i]);
                        g.rows.push(i as u32);
                    }
                    (false, false) => g.missing += 1,
                    _ => sel.dropped_pairs += 1,
                }
            }
            sel.groups.push(g);
        }
        Mapping::TwoGroups { value, group, level1, level2 } => {
            let (cv, cg) = (column(table, *value)?, column(table, *group)?);
            if value == group {
                return Err(MappingError::Same("the value column and the group column must differ".into()));
            }
            let v = numeric(cv)?;
            let k = codes(cg)?;
            let (k1, k2) = two_levels(cg, level1, level2)?;
            let mut gs = [empty(format!("{}: {}", cv.name, level1.trim())), empty(format!("{}: {}", cv.name, level2.trim()))];
            for i in (0..n).filter(|&i| keep[i]) {
                let slot = if k[i] == k1 { 0 } else if k[i] == k2 { 1 } else { sel.other_rows += 1; continue };
                if v[i].is_finite() {
                    gs[slot].values.push(v[i]);
                    gs[slot].rows.push(i as u32);
                } else {
                    gs[slot].missing += 1;
                }
            }
            sel.groups.extend(gs);
        }
        Mapping::Binary { column: c, success } => {
            let col = column(table, *c)?;
            let k = codes(col)?;
            let ks = level(col, success)?;
            let mut g = empty(format!("{}: {}", col.name, success.trim()));
            binary_into(&mut g, (0..n).filter(|&i| keep[i]), k, ks);
            sel.groups.push(g);
        }
        Mapping::TwoGroupsBinary { outcome, success, group, level1, level2 } => {
            let (co, cg) = (column(table, *outcome)?, column(table, *group)?);
            if outcome == group {
                return Err(MappingError::Same("the outcome column and the group column must differ".into()));
            }
            let (ko, kg) = (codes(co)?, codes(cg)?);
            let ks = level(co, success)?;
            let (k1, k2) = two_levels(cg, level1, level2)?;
            let mut gs = [
                empty(format!("{} = {}: {}", co.name, success.trim(), level1.trim())),
                empty(format!("{} = {}: {}", co.name, success.trim(), level2.trim())),
            ];
            for (slot, kl) in [(0, k1), (1, k2)] {
                binary_into(&mut gs[slot], (0..n).filter(|&i| keep[i] && kg[i] == kl), ko, ks);
            }
            sel.other_rows = (0..n).filter(|&i| keep[i] && kg[i] != k1 && kg[i] != k2).count();
            sel.groups.extend(gs);
        }
        Mapping::PairedBinary { first, second, truth } => {
            if first == second || truth.is_some_and(|t| t == *first || t == *second) {
                return Err(MappingError::Same("the two classifiers' columns (and the true label's) must be different columns".into()));
            }
            let (ca, cb) = (column(table, *first)?, column(table, *second)?);
            let ct = truth.map(|t| column(table, t)).transpose()?;
            let (ra, rb) = (rights(table, ca, ct)?, rights(table, cb, ct)?);
            let word = if ct.is_some() { "right (prediction = truth)" } else { "right" };
            let mut gs = [empty(format!("{}: {word}", ca.name)), empty(format!("{}: {word}", cb.name))];
            for i in (0..n).filter(|&i| keep[i]) {
                match (ra[i], rb[i]) {
                    (Some(x), Some(y)) => {
                        for (g, hit) in gs.iter_mut().zip([x, y]) {
                            g.values.push(if hit { 1.0 } else { 0.0 });
                            g.rows.push(i as u32);
                        }
                    }
                    (None, None) => gs.iter_mut().for_each(|g| g.missing += 1),
                    _ => sel.dropped_pairs += 1,
                }
            }
            for g in &mut gs {
                g.successes = Some(g.values.iter().filter(|v| **v == 1.0).count());
            }
            sel.groups.extend(gs);
        }
    }
    for g in &sel.groups {
        let needs = match mapping {
            Mapping::TwoGroups { .. } => 2,
            _ => 1,
        };
        if g.values.len() < needs {
            return Err(MappingError::TooFew {
                group: g.label.clone(),
                n: g.values.len(),
                needs: if needs == 2 {
                    "each group needs at least 2 for a standard deviation".into()
                } else {
                    "a summary needs at least 1".into()
                },
            });
        }
    }
    Ok(sel)
}

/// Each row's right (true) or wrong (false) for one classifier's column;
/// None where the cell (or the truth) is missing. Without `truth` the
/// cells must say right or wrong; with it, a prediction is right when its
/// text equals the truth's (spaces around ignored), or its number does.
fn rights(table: &Table, col: &Column, truth: Option<&Column>) -> Result<Vec<Option<bool>>, MappingError> {
    let n = table.n_rows;
    let text = |c: &Column, i: usize| -> Option<String> {
        match c.codes.as_deref() {
            Some(k) if k[i] == MISSING => None,
            Some(k) => c.levels.get(k[i] as usize).map(|l| l.value.trim().to_string()),
            None if c.values[i].is_finite() => Some(c.values[i].to_string()),
            None => None,
        }
    };
    let mut out = Vec::with_capacity(n);
    for i in 0..n {
        let Some(mine) = text(col, i) else {
            out.push(None);
            continue;
        };
        out.push(match truth {
            None => Some(right_wrong(&mine).ok_or_else(|| MappingError::NotRightWrong {
                column: col.name.clone(),
                value: mine.clone(),
                row: table.file_row(i).unwrap_or(i + 1),
            })?),
            Some(t) => text(t, i).map(|truth| {
                let number = |s: &str| s.parse::<f64>().ok();
                truth == mine || matches!((number(&truth), number(&mine)), (Some(a), Some(b)) if a == b)
            }),
        });
    }
    Ok(out)
}

fn two_levels(col: &Column, level1: &str, level2: &str) -> Result<(u32, u32), MappingError> {
    let (k1, k2) = (level(col, level1)?, level(col, level2)?);
    if k1 == k2 {
        return Err(MappingError::Same(format!("choose two different values of \"{}\" as the two groups", col.name)));
    }
    Ok((k1, k2))
}

/// Successes (code `success`) as 1, other non-missing cells as 0.
fn binary_into(g: &mut Selected, rows: impl Iterator<Item = usize>, codes: &[u32], success: u32) {
    let mut x = 0;
    for i in rows {
        match codes[i] {
            MISSING => g.missing += 1,
            k => {
                let hit = k == success;
                x += usize::from(hit);
                g.values.push(if hit { 1.0 } else { 0.0 });
                g.rows.push(i as u32);
            }
        }
    }
    g.successes = Some(x);
}
