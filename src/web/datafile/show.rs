//! What the data-file part of step 3 shows: how the table was read (with
//! the controls to read it otherwise), its columns, the first rows, the
//! problems, the column questions, the summary per group and its two charts.
//!
//! Invariant: every text that comes from the file (file name, column
//! names, cells, levels, problem values) is set as text through
//! `dom::element`/`dom::text_table`; markup is only ever built from our own
//! constant strings.

use crate::page::charts::prep::DataViews;
use crate::page::charts::{histogram, quantile, short};
use super::super::{canvas, dom};
use crate::engine::family::{NO_TRUTH, Role, Shape};
use crate::engine::table::roles::{self as mapping, Choice};
use crate::engine::table::{self, ColumnKind, DataSummary, DecimalMark, Format, ReadOptions, Table};
use web_sys::Element;

pub fn alert(text: &str) {
    dom::set_text("data-alert", text);
}

/// The progress bar: `Some((fraction, words))` shows it, `None` hides it.
pub fn progress(p: Option<(f64, String)>) {
    match p {
        Some((f, words)) => {
            dom::set_hidden("data-progress", false);
            dom::set_attr("data-progress-bar", "value", Some(&format!("{:.0}", (f * 100.0).clamp(0.0, 100.0))));
            dom::set_text("data-progress-text", &words);
        }
        None => dom::set_hidden("data-progress", true),
    }
}

/// A group of radio chips: `name`, the question, (value, label, note) per
/// option, and the checked value.
fn chips(name: &str, question: &str, options: &[(String, String, String)], checked: Option<&str>) -> Option<Element> {
    let fs = dom::element("fieldset", "")?;
    fs.set_attribute("class", "choice").ok()?;
    dom::add(&fs, "legend", question)?;
    let group = dom::add(&fs, "div", "")?;
    group.set_attribute("class", "chip-group").ok()?;
    for (value, label, note) in options {
        let l = dom::add(&group, "label", "")?;
        l.set_attribute("class", "chip").ok()?;
        let input = dom::add(&l, "input", "")?;
        input.set_attribute("type", "radio").ok()?;
        input.set_attribute("name", name).ok()?;
        input.set_attribute("value", value).ok()?;
        if checked == Some(value.as_str()) {
            input.set_attribute("checked", "").ok()?;
        }
        let span = dom::add(&l, "span", "")?;
        dom::add(&span, "b", label)?;
        if !note.is_empty() {
            dom::add(&span, "small", note)?;
        }
    }
    Some(fs)
}

fn opt(value: &str, label: &str, note: &str) -> (String, String, String) {
    (value.to_string(), label.to_string(), note.to_string())
}

fn found(detected: bool) -> &'static str {
    if detected { "found in the file" } else { "your choice" }
}

/// Everything about the table itself (not the mapping).
pub fn table(name: &str, t: &Table, opts: &ReadOptions, exclude: bool) {
    dom::set_hidden("data-loaded", false);
    let kind = match t.format {
        Format::Delimited { .. } => "text table",
        Format::Xlsx => "Excel workbook (.xlsx)",
        Format::Ods => "OpenDocument spreadsheet (.ods)",
    };
    let sheet = t.sheet.as_ref().map_or(String::new(), |s| format!(", sheet “{s}”"));
    dom::set_text(
        "data-source",
        &format!("“{name}”: {kind}{sheet}, {} data rows, {} columns. Nothing from it leaves this page.", t.n_rows, t.columns.len()),
    );
    // How it was read, with the controls to read it otherwise.
    let Some(read) = dom::element("div", "") else { return };
    if let Format::Delimited { delimiter } = t.format {
        let cur = match delimiter {
            '\t' => "tab".to_string(),
            c => c.to_string(),
        };
        let note = |v: &str| if v == cur { found(opts.delimiter.is_none()).to_string() } else { String::new() };
        let o = [
            opt(",", "comma ,", &note(",")),
            opt(";", "semicolon ;", &note(";")),
            opt("tab", "tab", &note("tab")),
            opt("|", "bar |", &note("|")),
        ];
        append(&read, chips("dr-delimiter", "Columns are separated by", &o, Some(&cur)));
    }
    if t.sheets.len() > 1 {
        let o: Vec<_> = t.sheets.iter().map(|s| opt(s, s, "")).collect();
        append(&read, chips("dr-sheet", "Sheet", &o, t.sheet.as_deref()));
    }
    let dec = if t.decimal == DecimalMark::Comma { "comma" } else { "point" };
    let note = |v: &str| if v == dec { found(opts.decimal.is_none()).to_string() } else { String::new() };
    let o = [opt("point", "point: 1234.5", &note("point")), opt("comma", "comma: 1234,5", &note("comma"))];
    append(&read, chips("dr-decimal", "Decimal mark", &o, Some(dec)));
    let hdr = if t.header { "yes" } else { "no" };
    let note = |v: &str| if v == hdr { found(opts.header.is_none()).to_string() } else { String::new() };
    let o = [opt("yes", "column names", &note("yes")), opt("no", "data already", &note("no"))];
    append(&read, chips("dr-header", "The first row holds", &o, Some(hdr)));
    if !t.notices.is_empty() {
        let ul = dom::element("ul", "");
        if let Some(ul) = &ul {
            let _ = ul.set_attribute("class", "notes");
            for n in &t.notices {
                dom::add(ul, "li", n);
            }
        }
        append(&read, ul);
    }
    dom::replace("data-read", Some(&read));
    let sep = match t.format {
        Format::Delimited { delimiter: '\t' } => "tabs between columns, ".to_string(),
        Format::Delimited { delimiter } => format!("“{delimiter}” between columns, "),
        _ => String::new(),
    };
    let brief = format!(
        "({sep}decimal {}, {}; change any of these here)",
        if t.decimal == DecimalMark::Comma { "comma" } else { "point" },
        if t.header { "first row: column names" } else { "no row of column names" }
    );
    dom::set_text("data-read-brief", &brief);

    // Columns: what each holds over the whole file.
    let rows: Vec<Vec<String>> = t
        .columns
        .iter()
        .map(|c| {
            let kind = match c.kind {
                ColumnKind::Numeric => "numbers".to_string(),
                ColumnKind::Categorical => match c.distinct {
                    Some(k) => format!("text, {k} different values"),
                    None => format!("text, over {} different values", table::MAX_LEVELS),
                },
                ColumnKind::Empty => "empty".to_string(),
            };
            vec![
                c.name.clone(),
                kind,
                c.count.to_string(),
                c.missing.to_string(),
                if c.bad > 0 { c.bad.to_string() } else { String::new() },
            ]
        })
        .collect();
    let cols = dom::text_table("", &["column", "holds", "values", "missing", "not numbers"], &rows, true);
    dom::replace("data-columns", cols.as_ref());

    // The first rows, as read.
    let mut head: Vec<&str> = vec!["row in file"];
    head.extend(t.columns.iter().map(|c| c.name.as_str()));
    let rows: Vec<Vec<String>> = t
        .preview
        .iter()
        .enumerate()
        .map(|(i, r)| {
            std::iter::once(t.preview_rows.get(i).map_or(String::new(), |n| n.to_string())).chain(r.iter().map(|c| clip(c))).collect()
        })
        .collect();
    let cap = format!("The first {} of {} data rows", t.preview.len(), t.n_rows);
    dom::replace("data-preview", dom::text_table(&cap, &head, &rows, true).as_ref());

    problems(t, exclude);
}

/// Cell text for a table on the page: at most 60 characters, the rest
/// replaced by "…" (a single cell may hold a whole paragraph).
fn clip(text: &str) -> String {
    const MOST: usize = 60;
    match text.char_indices().nth(MOST) {
        Some((at, _)) => format!("{}…", &text[..at]),
        None => text.to_string(),
    }
}

fn append(parent: &Element, child: Option<Element>) {
    if let Some(c) = child {
        let _ = parent.append_child(&c);
    }
}

/// The problems, located, with the choice to leave their rows out.
fn problems(t: &Table, exclude: bool) {
    let p = &t.problems;
    if p.total == 0 {
        dom::set_hidden("data-problems", true);
        dom::replace("data-problems", None);
        return;
    }
    let Some(box_) = dom::element("div", "") else { return };
    let more = if p.total > p.shown.len() { format!(" (the first {} are listed)", p.shown.len()) } else { String::new() };
    dom::add(
        &box_,
        "h4",
        &format!(
            "{} {} in {} {}{more}",
            p.total,
            plural(p.total, "problem", "problems"),
            p.rows.len(),
            plural(p.rows.len(), "row", "rows")
        ),
    );
    let rows: Vec<Vec<String>> =
        p.shown.iter().map(|q| vec![q.row.to_string(), clip(&q.column), clip(&q.value), q.message.clone()]).collect();
    append(&box_, dom::text_table("", &["row in file", "column", "cell", "what is wrong"], &rows, true));
    if let Some(l) = dom::add(&box_, "label", "") {
        if let Some(i) = dom::add(&l, "input", "") {
            let _ = i.set_attribute("type", "checkbox");
            let _ = i.set_attribute("id", "data-exclude");
            if exclude {
                let _ = i.set_attribute("checked", "");
            }
        }
        if let Some(s) = dom::element("span", &format!(" Leave out these {} rows", p.rows.len())) {
            let _ = l.append_child(&s);
        }
    }
    if let Some(p) =
        dom::add(&box_, "p", "Otherwise a cell that is not a number counts as a missing value of its column. Your file is not changed.")
    {
        let _ = p.set_attribute("class", "aside-text");
    }
    dom::replace("data-problems", Some(&box_));
    dom::set_hidden("data-problems", false);
}

fn plural<'a>(n: usize, one: &'a str, many: &'a str) -> &'a str {
    if n == 1 { one } else { many }
}

/// The column questions of a family, each as a group of chips.
pub fn mapping(t: &Table, s: Shape, c: &Choice) {
    let Some(div) = dom::element("div", "") else { return };
    for &r in s.roles() {
        let cands = mapping::candidates(t, r, c);
        if cands.is_empty() {
            let text = match r {
                Role::Value | Role::First | Role::Second => {
                    format!("{} The table has no column of numbers for this question.", r.question())
                }
                Role::Group | Role::Outcome => {
                    format!("{} The table has no column with at least two different values for this question.", r.question())
                }
                Role::Level1 => "Group 1: choose the column that says the group first.".to_string(),
                Role::Level2 => "Group 2: choose the column that says the group first.".to_string(),
                Role::Success => "Success: choose the column that holds the outcome first.".to_string(),
                Role::Classifier1 | Role::Classifier2 | Role::Truth => format!("{} The table has no column with values.", r.question()),
            };
            if let Some(p) = dom::add(&div, "p", &text) {
                let _ = p.set_attribute("class", "msg general");
            }
            continue;
        }
        let o: Vec<_> = cands
            .iter()
            .map(|v| {
                let note = match r {
                    Role::Level1 | Role::Level2 | Role::Success => level_count(t, c, r, v),
                    _ => t.columns.iter().find(|x| x.name == *v).map_or(String::new(), |x| format!("{} values", x.count)),
                };
                if r == Role::Truth && v == NO_TRUTH {
                    return opt(v, "No: they say right or wrong", "");
                }
                opt(v, v, &note)
            })
            .collect();
        append(&div, chips(&format!("dm-{}", r.key()), r.question(), &o, c.get(r)));
    }
    dom::replace("data-mapping", Some(&div));
}

fn level_count(t: &Table, c: &Choice, r: Role, level: &str) -> String {
    let col = if r == Role::Success { c.get(Role::Outcome) } else { c.get(Role::Group) };
    t.columns
        .iter()
        .find(|x| Some(x.name.as_str()) == col)
        .and_then(|x| x.levels.iter().find(|l| l.value == level))
        .map_or(String::new(), |l| format!("{} rows", l.count))
}

pub fn mapping_waiting() {
    let p = dom::element("p", "Choose what you are comparing (step 1); the questions about the columns follow from it.");
    dom::replace("data-mapping", p.as_ref());
}

/// The figures per group and the notes.
pub fn summary(s: &DataSummary, sh: Shape) {
    dom::set_text("data-summary-msg", "");
    let binary = sh.binary();
    let opt = |v: Option<f64>| v.map_or("—".to_string(), short);
    let rows: Vec<Vec<String>> = s
        .groups
        .iter()
        .map(|g| {
            if binary {
                vec![
                    g.label.clone(),
                    g.n.to_string(),
                    g.successes.map_or("—".into(), |k| k.to_string()),
                    short(g.mean),
                    g.missing.to_string(),
                ]
            } else {
                vec![
                    g.label.clone(),
                    g.n.to_string(),
                    short(g.mean),
                    opt(g.sd),
                    short(g.median),
                    short(g.min),
                    short(g.max),
                    opt(g.skewness),
                    opt(g.excess_kurtosis),
                    g.missing.to_string(),
                ]
            }
        })
        .collect();
    let head: &[&str] = if binary {
        &["group", "n", "successes", "proportion", "missing"]
    } else {
        &["group", "n", "mean", "SD", "median", "min", "max", "skewness", "excess kurtosis", "missing"]
    };
    let cap = "Per group (SD with n − 1; skewness G1 and excess kurtosis G2, bias-adjusted)";
    dom::replace("data-summary", dom::text_table(if binary { "Per group" } else { cap }, head, &rows, true).as_ref());
    // The engine's notes already count dropped pairs and excluded rows.
    let notes = &s.notes;
    let ul = dom::element("ul", "");
    if let Some(ul) = &ul {
        let _ = ul.set_attribute("class", "notes");
        let _ = ul.set_attribute("id", "data-notes");
        for n in notes {
            dom::add(ul, "li", n);
        }
    }
    if let (Some(old), Some(new)) = (dom::by_id("data-notes"), ul) {
        let _ = old.replace_with_with_node_1(&new);
    }
}

/// The file cannot be summarised as chosen: say why, in place.
pub fn summary_message(text: &str) {
    dom::set_text("data-summary-msg", text);
    dom::replace("data-summary", None);
    if let Some(n) = dom::by_id("data-notes") {
        n.set_text_content(None);
    }
}

/// Draw both charts (or blank them), with their tables.
pub fn charts(v: Option<&DataViews>) {
    dom::set_hidden("data-charts", v.is_none());
    let Some(v) = v else {
        dom::replace("table-histogram", None);
        dom::replace("table-quantile", None);
        canvas::forget_data();
        return;
    };
    canvas::draw_data(v);
    let (cap, head, rows) = histogram::numbers(&v.histogram);
    dom::replace("table-histogram", dom::text_table(&cap, &head, &rows, true).as_ref());
    let (cap, head, rows) = quantile::numbers(&v.quantile);
    dom::replace("table-quantile", dom::text_table(&cap, &head, &rows, true).as_ref());
    let groups =
        v.histogram.groups.iter().map(|g| format!("{} (n = {}, mean {})", g.label, g.n, short(g.mean))).collect::<Vec<_>>().join("; ");
    dom::set_attr("chart-histogram", "aria-label", Some(&format!("Histogram per group: {groups}. The numbers are in the table below.")));
    dom::set_attr("chart-quantile", "aria-label", Some(&format!("Normal quantile plot: {groups}. The numbers are in the table below.")));
}
