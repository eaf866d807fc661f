//! The simulation check's result in plain sentences: what was drawn, each
//! rule's realised error rates against the limits and the analytic
//! values, the inconclusive shares, and which rule made fewer errors.
//!
//! A rate is "above" or "within" a limit only when it is more than two
//! Monte Carlo standard errors from it; otherwise it is "at the limit
//! within two standard errors".

use super::{Share, Simulation, Standing};
use crate::engine::evaluate::sig3;

/// A rate against its limit, in words.
fn against(share: &Share, limit: f64) -> String {
    match share.against(limit) {
        Standing::Above => format!("above your limit {}", sig3(limit)),
        Standing::Within => format!("within your limit {}", sig3(limit)),
        Standing::AtLimit => format!("at your limit {} within two standard errors", sig3(limit)),
    }
}

fn rate(s: &Share) -> String {
    format!("{} (± {})", sig3(s.share), sig3(s.se))
}

fn percent(s: &Share) -> String {
    let p = s.share * 100.0;
    if p > 0.0 && p < 0.1 { "under 0.1%".into() } else { format!("{}%", sig3((p * 10.0).round() / 10.0)) }
}

pub(super) fn readings(sim: &Simulation) -> Vec<String> {
    let mut out = Vec::new();
    let size = match sim.n2 {
        Some(n2) => format!("n1 = {}, n2 = {}", sim.n1, n2),
        None => format!("n = {}", sim.n1),
    };
    let drawn = match (sim.enrol, sim.dropout) {
        (Some(e), Some(q)) => {
            let enrol = match e.n2 {
                Some(m) => format!("{} and {}", e.n1, m),
                None => e.n1.to_string(),
            };
            format!(
                "{} data sets under H0 and as many under the alternative ({}); {enrol} enrolled, each lost with probability {} (planned {size}), so the analysed size varies; seed {}.",
                sim.replicates_done,
                sim.population,
                sig3(q),
                sim.seed
            )
        }
        _ => format!(
            "{} data sets under H0 and as many under the alternative ({}), {size}; seed {}.",
            sim.replicates_done, sim.population, sim.seed
        ),
    };
    out.push(format!("Drawn: {drawn}"));
    let t = &sim.threshold_rule;
    let a = &sim.analytic;
    out.push(format!(
        "With {} the threshold rule's false-alarm rate (realised α) is {}, {}; the model gives α* = {}.",
        sim.population,
        rate(&t.alpha),
        against(&t.alpha, sim.alpha_max),
        sig3(a.alpha)
    ));
    out.push(format!(
        "Its miss rate (realised β, inconclusive counted as a miss) is {}, {}; the model gives β* = {}.",
        rate(&t.beta),
        against(&t.beta, sim.beta_max),
        sig3(a.beta)
    ));
    if let (Some(i0), Some(i1)) = (t.under_h0.inconclusive, t.under_h1.inconclusive)
        && (i0.count > 0 || i1.count > 0)
    {
        out.push(format!(
            "Inconclusive: {} of the data sets under H0 and {} under the alternative (the design at their analysed size, or with their observed spread, is not conclusive{}).",
            percent(&i0),
            percent(&i1),
            if sim.no_decision.h0 + sim.no_decision.h1 > 0 { ", or they could not be decided" } else { "" }
        ));
    }
    if sim.no_decision.h0 + sim.no_decision.h1 > 0 {
        out.push(format!(
            "{} data sets under H0 and {} under the alternative could not be decided (an analysed size below the smallest, a standard deviation of 0, or every outcome the same); they count as inconclusive for the threshold rule and as not rejecting for the conventional one.",
            sim.no_decision.h0, sim.no_decision.h1
        ));
    }
    let c = &sim.conventional_rule;
    out.push(format!(
        "The conventional rule (reject when p ≤ {}): realised α = {}, {}, where the model gives {}; realised β = {}, {}, where the model gives {}.",
        sig3(sim.alpha_max),
        rate(&c.alpha),
        against(&c.alpha, sim.alpha_max),
        sig3(a.conventional_alpha),
        rate(&c.beta),
        against(&c.beta, sim.beta_max),
        sig3(a.conventional_beta())
    ));
    let (et, ec) = (t.total_error, c.total_error);
    let se = (et.se * et.se + ec.se * ec.se).sqrt();
    let verdict = if et.value + 2.0 * se < ec.value {
        "the threshold rule makes fewer errors in all"
    } else if ec.value + 2.0 * se < et.value {
        "the conventional rule makes fewer errors in all"
    } else {
        "the two rules make about as many errors in all (within two standard errors)"
    };
    out.push(format!(
        "Total error α + β: {} (± {}) for the threshold rule against {} (± {}) for the conventional rule: {verdict}.",
        sig3(et.value),
        sig3(et.se),
        sig3(ec.value),
        sig3(ec.se)
    ));
    out
}
