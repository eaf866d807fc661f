//! The result sentences: the sample size, the verdict at n, the decision
//! and the check of a given n, in plain words built from the engine's
//! answer (the engine's own sentences are shown as they are). The page
//! shell writes them into the page; a report can use the same.
//!
//! Architecture invariant: text only, no DOM; every figure comes from the
//! engine's answer (no statistic is computed here) and is rounded by the
//! charts' `prob` and `short`, as the charts show it.

use crate::engine::decision::Outcome;
use crate::engine::design::Family;
use crate::engine::evaluate::{Evaluation, Rule};
use crate::engine::request::{Answer, Check};
use crate::page::charts::{prob, short};

/// The sample-size card.
#[derive(Debug, Clone, PartialEq)]
pub struct SizeCard {
    /// `found`, `none` or `waiting`.
    pub state: &'static str,
    pub headline: String,
    pub detail: String,
    pub conventional: String,
    /// With a dropout share: the number to enrol.
    pub enrol: String,
    pub notes: Vec<String>,
    /// The balancing cost weight as shown, and the button's words.
    pub balancing: Option<(String, String)>,
    /// The verdict at the n the answer is shown at.
    pub verdict: String,
}

/// The decision card.
#[derive(Debug, Clone, PartialEq)]
pub struct DecideCard {
    /// `reject`, `keep`, `inconclusive` or `waiting`.
    pub state: &'static str,
    pub title: String,
    pub reading: String,
    /// (what, value) rows of the facts table.
    pub rows: Vec<(String, String)>,
}

pub fn unit_of(family: Family, unit: &str) -> String {
    if !family.entry().in_unit || unit.trim().is_empty() { String::new() } else { format!(" {}", unit.trim()) }
}

pub fn sizes(n1: u64, n2: Option<u64>) -> String {
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
    let (counted, as_estimate) = family.entry().counted.unwrap_or(("successes", "a proportion of"));
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
        Rule::AtLeast { k, estimate } => format!("reject H0 with at least {k} {counted} ({as_estimate} {} or more)", short(estimate)),
        Rule::AtMost { k, estimate } => format!("reject H0 with at most {k} {counted} ({as_estimate} {} or less)", short(estimate)),
        Rule::OutsideCounts { k_low, k_high, .. } => {
            let lo = k_low.map(|k| format!("at most {k}"));
            let hi = k_high.map(|k| format!("at least {k}"));
            let parts: Vec<String> = lo.into_iter().chain(hi).collect();
            format!("reject H0 with {} {counted}", parts.join(" or "))
        }
        Rule::Never => "no threshold helps: the best rule never rejects H0".into(),
        Rule::Always => "no threshold helps: the best rule always rejects H0".into(),
    }
}

/// The card while the design is incomplete.
pub fn incomplete(still_needed: &[String]) -> SizeCard {
    let detail = if still_needed.is_empty() {
        "Some values above need correcting; see the messages next to them.".to_string()
    } else {
        format!("Still needed: {}.", still_needed.join("; "))
    };
    SizeCard {
        state: "waiting",
        headline: "Not yet: the design is incomplete".into(),
        detail,
        conventional: String::new(),
        enrol: String::new(),
        notes: Vec::new(),
        balancing: None,
        verdict: String::new(),
    }
}

/// The decision card with no decision, saying why.
pub fn no_decision(text: &str) -> DecideCard {
    DecideCard { state: "waiting", title: "No decision yet".into(), reading: text.into(), rows: Vec::new() }
}

/// The sample-size card of an answer.
pub fn size_card(ans: &Answer, unit: &str) -> SizeCard {
    let fam = ans.design.family;
    let ss = &ans.sample_size;
    let (state, headline, detail) = match (&ss.youden, &ss.at_youden) {
        _ if ss.pending => (
            "searching",
            "Searching for the sample size…".to_string(),
            "Exact counts are checked one n at a time, and this design needs many: the search runs in the background, so the page stays usable. Where it stands shows below; Stop ends it.".to_string(),
        ),
        _ if ss.never => (
            "none",
            "No sample size is large enough".to_string(),
            "However many splits you run, the errors stop shrinking before they reach your limits; the note below says why and which effect could be found.".to_string(),
        ),
        (Some(g), Some(at)) => (
            "found",
            format!("n = {}", sizes(g.n1, g.n2)),
            format!(
                "This is the smallest sample that makes the design conclusive. At it, the threshold that minimises {} gives a false-alarm rate α* = {} (your limit {}) and a miss rate β* = {} (your limit {}); {}.",
                objective(ans.design.weight),
                prob(at.alpha),
                prob(ans.design.alpha_max),
                prob(at.beta),
                prob(ans.design.beta_max),
                rule_text(&at.rule, at.statistic, fam, unit)
            ) + &discordant_text(at),
        ),
        _ => (
            "none",
            "No sample size is large enough".to_string(),
            format!("No n up to {} makes both errors fall within your limits. Relax a limit or look for a larger effect.", ss.searched_up_to),
        ),
    };
    let conventional = match &ss.conventional {
        Some(c) => format!(
            "For comparison, a conventional test at level {} with power {} needs n = {}.",
            prob(ans.design.alpha_max),
            prob(1.0 - ans.design.beta_max),
            sizes(c.n1, c.n2)
        ),
        None => String::new(),
    };
    // The cost weight that would reproduce the conventional test, offered
    // as a one-click suggestion.
    let balancing = match ss.balancing_weight {
        Some(w) if crate::engine::family::Check::Weight.holds(w) => {
            let shown = format!("{w:.3}");
            let words = format!("Use w = {shown}: the weight that reproduces the conventional test");
            Some((shown, words))
        }
        _ => None,
    };
    let mut notes: Vec<String> = ss.notes.clone();
    if let (Some(st), Some(to)) = (&ss.stable_from, ss.checked_to) {
        notes.push(format!("Counts jump in steps, so conclusiveness can come and go as n grows: every n from {} up to {to} is conclusive.", st.n1));
    }
    let verdict = ans.at_n.as_ref().map(at_n_text).unwrap_or_default();
    let enrol = ans.enrolment.map_or(String::new(), |e| {
        format!("With {} expected dropout, enrol {} (⌈n / (1 − dropout)⌉ per group).", percent(e.dropout), sizes(e.enrol.n1, e.enrol.n2))
    });
    SizeCard { state, headline, detail, conventional, enrol, notes, balancing, verdict }
}

/// The decision card of an answer (None: no data decided).
pub fn decide_card(ans: &Answer, unit: &str) -> Option<DecideCard> {
    let d = ans.decision.as_ref()?;
    let fam = ans.design.family;
    let (state, title) = match d.outcome {
        Outcome::RejectH0 => ("reject", "Reject H0"),
        Outcome::DoNotRejectH0 => ("keep", "Do not reject H0"),
        Outcome::Inconclusive => ("inconclusive", "Inconclusive"),
    };
    let at = &d.at_n;
    let u = unit_of(fam, unit);
    let rows = vec![
        ("observed estimate".to_string(), format!("{}{u}", short(d.estimate))),
        (format!("observed statistic ({})", at.statistic), short(d.statistic)),
        ("rule for this sample".to_string(), rule_text(&at.rule, at.statistic, fam, unit)),
        ("α* at this sample size".to_string(), prob(at.alpha)),
        ("β* at this sample size".to_string(), prob(at.beta)),
        ("conventional p-value".to_string(), prob(d.conventional.p_value)),
        (
            "conventional test at level α limit".to_string(),
            if d.conventional.rejects_at_alpha_max { "rejects H0".into() } else { "does not reject H0".into() },
        ),
        ("conventional critical value".to_string(), conventional_text(at)),
        ("conventional power at θ1".to_string(), prob(at.conventional.power)),
    ];
    let mut rows = rows;
    if let Some(ci) = &d.interval {
        rows.push((format!("{} confidence interval", percent(ci.level)), format!("{}{u} to {}{u} ({})", short(ci.low), short(ci.high), ci.method)));
    }
    if let Some(es) = &d.effect_size {
        rows.push((format!("effect size, {}", es.name), format!("{} = {}", es.symbol, short(es.value))));
    }
    rows.extend(d.omitted.iter().map(|why| ("not given".to_string(), why.clone())));
    Some(DecideCard { state, title: title.into(), reading: d.reading.clone(), rows })
}

/// The answer to "check a sample size you already have".
pub fn check_text(check: &Check) -> String {
    let mut text = at_n_text(&check.at_n);
    let se = &check.smallest_effect;
    match se.theta1 {
        Some(t) => {
            let d = se.d.map_or(String::new(), |d| format!(" (standardised d = {})", short(d)));
            text.push_str(&format!(" The smallest effect this n makes conclusive is θ1 = {}{d}.", short(t)));
        }
        None => text.push_str(" No effect in range makes the design conclusive at this n."),
    }
    text
}

/// A share as a percentage without needless decimals: 0.15 → "15%".
pub fn percent(x: f64) -> String {
    let s = format!("{:.2}", x * 100.0);
    format!("{}%", s.trim_end_matches('0').trim_end_matches('.'))
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

/// Two classifiers: which m the rule shown is for, and that the rates are
/// averaged over m (empty for every other family).
pub fn discordant_text(at: &Evaluation) -> String {
    at.discordant.as_ref().map_or(String::new(), |d| {
        format!(
            " The rule is the one for m = {} items where exactly one classifier is right, the number expected among n = {} (n·ψ = {}); \
             the rates α* and β* average the exact conditional test over every m, and a decision recomputes the threshold for the m observed.",
            d.m,
            at.n1,
            short(d.expected)
        )
    })
}

fn at_n_text(at: &Evaluation) -> String {
    let mut s = format!("At {}: {}", sizes(at.n1, at.n2).replace(" in each group", " per group"), at.verdict);
    if let Some(a) = at.approximation {
        s.push_str(&format!(" (Approximation: {a}.)"));
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::design::DesignSpec;
    use crate::engine::request::{Ask, reply};
    use crate::engine::threshold::Alternative;

    /// method.md §5: one-sided z test, d = 0.3, α limit .05, β limit .2:
    /// 121 (Youden) against 69 (conventional).
    #[test]
    fn the_size_card_says_the_youden_and_the_conventional_n() {
        let spec = DesignSpec::new(Family::MeanZ, Alternative::Greater).with("d", 0.3).with("alpha_max", 0.05).with("beta_max", 0.2);
        let r = reply(&Ask { spec, n: Some(50.0), data: Some(vec![("n", 121.0), ("mean", 0.31)]), ..Ask::default() });
        assert!(r.errors.is_empty(), "{:?}", r.errors);
        let ans = r.answer.unwrap();
        let card = size_card(&ans, "");
        assert_eq!((card.state, card.headline.as_str()), ("found", "n = 121"));
        assert!(card.conventional.ends_with("needs n = 69."), "{}", card.conventional);
        assert!(card.balancing.is_some());
        let decide = decide_card(&ans, "").unwrap();
        assert_eq!(decide.state, "reject", "{:?}", decide);
        assert!(decide.rows.iter().any(|(k, v)| k == "rule for this sample" && v.starts_with("reject H0 when the sample mean is above 0.15")));
        let check = check_text(r.check.as_ref().unwrap());
        assert!(check.starts_with("At 50: ") && check.contains("smallest effect this n makes conclusive"), "{check}");
        assert_eq!(incomplete(&["the α limit".into()]).detail, "Still needed: the α limit.");
    }
}
