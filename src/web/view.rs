//! The text of the results: the sample size, the decision, the check of a
//! given n, and what is still missing. Plain sentences built from the
//! engine's answer; the engine's own sentences are shown as they are.

use crate::page::charts::{prob, short};
use super::dom::{self, escape};
use crate::engine::decision::Outcome;
use crate::engine::design::Family;
use crate::engine::evaluate::{Evaluation, Rule};
use crate::engine::request::{Answer, Check};

fn unit_of(family: Family, unit: &str) -> String {
    if !family.entry().in_unit || unit.trim().is_empty() { String::new() } else { format!(" {}", unit.trim()) }
}

fn sizes(n1: u64, n2: Option<u64>) -> String {
    match n2 {
        Some(n2) if n2 == n1 => format!("{n1} in each group ({} in all)", n1 + n2),
        Some(n2) => format!("{n1} in group 1 and {n2} in group 2 ({} in all)", n1 + n2),
        None => format!("{n1}"),
    }
}

/// The rejection rule in words, on the estimate's scale and the statistic's.
pub fn rule_text(rule: &Rule, stat: &str, family: Family, unit: &str) -> String {
    let u = unit_of(family, unit);
    let est = family.entry().estimate;
    match *rule {
        Rule::Above { statistic, estimate } => {
            format!("reject H0 when {est} is above {}{u} ({stat} > {})", short(estimate), short(statistic))
        }
        Rule::Below { statistic, estimate } => {
            format!("reject H0 when {est} is below {}{u} ({stat} < {})", short(estimate), short(statistic))
        }
        Rule::Outside { estimate_low, estimate_high, statistic_low, statistic_high, .. } => format!(
            "reject H0 when {est} is below {}{u} or above {}{u} ({stat} outside {} to {})",
            short(estimate_low),
            short(estimate_high),
            short(statistic_low),
            short(statistic_high)
        ),
        Rule::AtLeast { k, estimate } => format!("reject H0 with at least {k} successes (a proportion of {} or more)", short(estimate)),
        Rule::AtMost { k, estimate } => format!("reject H0 with at most {k} successes (a proportion of {} or less)", short(estimate)),
        Rule::OutsideCounts { k_low, k_high, .. } => {
            let lo = k_low.map(|k| format!("at most {k}"));
            let hi = k_high.map(|k| format!("at least {k}"));
            let parts: Vec<String> = lo.into_iter().chain(hi).collect();
            format!("reject H0 with {} successes", parts.join(" or "))
        }
        Rule::Never => "no threshold helps: the best rule never rejects H0".into(),
        Rule::Always => "no threshold helps: the best rule always rejects H0".into(),
    }
}

/// What the sample-size and decision panels say while the design is incomplete.
pub fn show_incomplete(still_needed: &[String]) {
    let list = if still_needed.is_empty() {
        "Some values above need correcting; see the messages next to them.".to_string()
    } else {
        format!("Still needed: {}.", still_needed.join("; "))
    };
    dom::set_text("size-headline", "Not yet: the design is incomplete");
    dom::set_text("size-detail", &list);
    dom::set_text("size-conventional", "");
    dom::set_html("size-notes", "");
    dom::set_text("design-verdict", "");
    dom::set_attr("size-card", "data-state", Some("waiting"));
    show_no_decision("The decision appears here once the design is complete and your summary figures are entered.");
    dom::set_text("check-result", "");
    dom::set_hidden("use-balancing-weight", true);
}

pub fn show_no_decision(text: &str) {
    dom::set_attr("decide-card", "data-state", Some("waiting"));
    dom::set_text("decide-title", "No decision yet");
    dom::set_text("decide-reading", text);
    dom::set_html("decide-table", "");
}

pub fn show_answer(ans: &Answer, unit: &str) {
    let fam = ans.design.family;
    let ss = &ans.sample_size;
    match (&ss.youden, &ss.at_youden) {
        (Some(g), Some(at)) => {
            dom::set_attr("size-card", "data-state", Some("found"));
            dom::set_text("size-headline", &format!("n = {}", sizes(g.n1, g.n2)));
            dom::set_text(
                "size-detail",
                &format!(
                    "This is the smallest sample that makes the design conclusive. At it, the threshold that minimises {} gives a false-alarm rate α* = {} (your limit {}) and a miss rate β* = {} (your limit {}); {}.",
                    objective(ans.design.weight),
                    prob(at.alpha),
                    prob(ans.design.alpha_max),
                    prob(at.beta),
                    prob(ans.design.beta_max),
                    rule_text(&at.rule, at.statistic, fam, unit)
                ),
            );
        }
        _ => {
            dom::set_attr("size-card", "data-state", Some("none"));
            dom::set_text("size-headline", "No sample size is large enough");
            dom::set_text(
                "size-detail",
                &format!(
                    "No n up to {} makes both errors fall within your limits. Relax a limit or look for a larger effect.",
                    ss.searched_up_to
                ),
            );
        }
    }
    let conv = match &ss.conventional {
        Some(c) => format!(
            "For comparison, a conventional test at level {} with power {} needs n = {}.",
            prob(ans.design.alpha_max),
            prob(1.0 - ans.design.beta_max),
            sizes(c.n1, c.n2)
        ),
        None => String::new(),
    };
    dom::set_text("size-conventional", &conv);
    // The cost weight that would reproduce the conventional test, as a
    // one-click suggestion (the button's click handler reads data-weight).
    match ss.balancing_weight {
        Some(w) if w.is_finite() && w > 0.0 && w < 1.0 => {
            let shown = format!("{w:.3}");
            dom::set_attr("use-balancing-weight", "data-weight", Some(&shown));
            dom::set_text("use-balancing-weight", &format!("Use w = {shown}: the weight that reproduces the conventional test"));
            dom::set_hidden("use-balancing-weight", false);
        }
        _ => dom::set_hidden("use-balancing-weight", true),
    }
    let mut notes: Vec<String> = ss.notes.clone();
    if let (Some(st), Some(to)) = (&ss.stable_from, ss.checked_to) {
        notes.push(format!(
            "Counts jump in steps, so conclusiveness can come and go as n grows: every n from {} up to {to} is conclusive.",
            st.n1
        ));
    }
    dom::set_html("size-notes", &notes.iter().map(|n| format!("<li>{}</li>", escape(n))).collect::<String>());
    if let Some(at) = &ans.at_n {
        dom::set_text("design-verdict", &at_n_text(at));
    }
    match &ans.decision {
        Some(d) => {
            let (state, title) = match d.outcome {
                Outcome::RejectH0 => ("reject", "Reject H0"),
                Outcome::DoNotRejectH0 => ("keep", "Do not reject H0"),
                Outcome::Inconclusive => ("inconclusive", "Inconclusive"),
            };
            dom::set_attr("decide-card", "data-state", Some(state));
            dom::set_text("decide-title", title);
            dom::set_text("decide-reading", &d.reading);
            let at = &d.at_n;
            let u = unit_of(fam, unit);
            let rows = [
                ("observed estimate", format!("{}{u}", short(d.estimate))),
                (&*format!("observed statistic ({})", at.statistic), short(d.statistic)),
                ("rule for this sample", rule_text(&at.rule, at.statistic, fam, unit)),
                ("α* at this sample size", prob(at.alpha)),
                ("β* at this sample size", prob(at.beta)),
                ("conventional p-value", prob(d.conventional.p_value)),
                (
                    "conventional test at level α limit",
                    if d.conventional.rejects_at_alpha_max { "rejects H0".into() } else { "does not reject H0".into() },
                ),
                ("conventional critical value", conventional_text(at)),
                ("conventional power at θ1", prob(at.conventional.power)),
            ];
            let body: String =
                rows.iter().map(|(k, v)| format!("<tr><th scope=\"row\">{}</th><td>{}</td></tr>", escape(k), escape(v))).collect();
            dom::set_html("decide-table", &format!("<table class=\"facts\"><tbody>{body}</tbody></table>"));
        }
        None => show_no_decision("Enter your summary figures above to decide."),
    }
}

/// What the threshold minimises: α + β in Youden's case, else the weighted sum.
fn objective(w: f64) -> String {
    if w == 0.5 {
        "α + β".into()
    } else {
        format!("{}·α + {}·β", short(w), short(1.0 - w))
    }
}

fn conventional_text(at: &Evaluation) -> String {
    match at.conventional.rule {
        Rule::Above { statistic, .. } => format!("{} > {}", at.statistic, short(statistic)),
        Rule::Below { statistic, .. } => format!("{} < {}", at.statistic, short(statistic)),
        Rule::Outside { statistic_low, statistic_high, .. } => {
            format!("{} outside {} to {}", at.statistic, short(statistic_low), short(statistic_high))
        }
        Rule::AtLeast { k, .. } => format!("X ≥ {k}"),
        Rule::AtMost { k, .. } => format!("X ≤ {k}"),
        Rule::OutsideCounts { k_low, k_high, .. } => {
            format!("X ≤ {} or X ≥ {}", k_low.map_or("—".into(), |k| k.to_string()), k_high.map_or("—".into(), |k| k.to_string()))
        }
        Rule::Never => "never rejects".into(),
        Rule::Always => "always rejects".into(),
    }
}

fn at_n_text(at: &Evaluation) -> String {
    let mut s = format!("At {}: {}", sizes(at.n1, at.n2).replace(" in each group", " per group"), at.verdict);
    if let Some(a) = at.approximation {
        s.push_str(&format!(" (Approximation: {a}.)"));
    }
    s
}

/// The answer to "check a sample size you already have".
pub fn show_check(check: Option<&Check>) {
    let Some(check) = check else {
        dom::set_text("check-result", "");
        return;
    };
    let mut text = at_n_text(&check.at_n);
    {
        let se = &check.smallest_effect;
        match se.theta1 {
            Some(t) => {
                let d = se.d.map_or(String::new(), |d| format!(" (standardised d = {})", short(d)));
                text.push_str(&format!(" The smallest effect this n makes conclusive is θ1 = {}{d}.", short(t)));
            }
            None => text.push_str(" No effect in range makes the design conclusive at this n."),
        }
    }
    dom::set_text("check-result", &text);
}
