//! Map columns to a design's data (one column, paired columns, a value and
//! a group column, a binary outcome) and summarise each group.

use super::Table;
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
}

/// One group's figures.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupStats {
    /// What the group is, in words (`weight`, `score: A`, `before − after`).
    pub label: String,
    /// Values used.
    pub n: usize,
    /// Rows of this group whose value is missing or not a number.
    pub missing: usize,
    pub mean: f64,
    /// Sample standard deviation (n − 1); `None` for n < 2.
    pub sd: Option<f64>,
    pub median: f64,
    pub min: f64,
    pub max: f64,
    /// Bias-adjusted skewness G1; `None` for n < 3 or sd = 0.
    pub skewness: Option<f64>,
    /// Bias-adjusted excess kurtosis G2; `None` for n < 4 or sd = 0.
    pub excess_kurtosis: Option<f64>,
    /// Binary outcomes: the number of successes (`mean` is then the
    /// proportion).
    pub successes: Option<usize>,
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
    #[error("{group} has {n} usable value(s), but {needs}")]
    TooFew { group: String, n: usize, needs: String },
}

/// Summarise the mapped columns, leaving out the data rows whose file row
/// (as in [`super::Problem::row`]) is in `exclude_rows`.
pub fn summarise(table: &Table, mapping: &Mapping, exclude_rows: &[usize]) -> Result<DataSummary, MappingError> {
    let _ = (table, mapping, exclude_rows);
    Err(MappingError::Same("not built yet".into()))
}

/// The values of each group, in the order of [`DataSummary::groups`]
/// (binary outcomes as 1 and 0), for the charts.
pub fn group_values(table: &Table, mapping: &Mapping, exclude_rows: &[usize]) -> Result<Vec<Vec<f64>>, MappingError> {
    let _ = (table, mapping, exclude_rows);
    Err(MappingError::Same("not built yet".into()))
}
