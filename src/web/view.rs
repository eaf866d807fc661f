//! The results' shell: writes the page model's result sentences
//! ([`crate::page::results`]) into the sample-size card, the decision card
//! and the check line.
//!
//! Architecture invariant: DOM writes only; every sentence is the model's.

use super::dom::{self, escape};
use crate::engine::request::{Answer, Check};
use crate::page::results::{self, DecideCard, SizeCard};

fn show_size(card: &SizeCard) {
    dom::set_attr("size-card", "data-state", Some(card.state));
    dom::set_text("size-headline", &card.headline);
    dom::set_text("size-detail", &card.detail);
    dom::set_text("size-conventional", &card.conventional);
    dom::set_text("size-enrol", &card.enrol);
    dom::set_html("size-notes", &card.notes.iter().map(|n| format!("<li>{}</li>", escape(n))).collect::<String>());
    dom::set_text("design-verdict", &card.verdict);
    match &card.balancing {
        Some((shown, words)) => {
            // The button's click handler reads data-weight.
            dom::set_attr("use-balancing-weight", "data-weight", Some(shown));
            dom::set_text("use-balancing-weight", words);
            dom::set_hidden("use-balancing-weight", false);
        }
        None => dom::set_hidden("use-balancing-weight", true),
    }
}

fn show_decide(card: &DecideCard) {
    dom::set_attr("decide-card", "data-state", Some(card.state));
    dom::set_text("decide-title", &card.title);
    dom::set_text("decide-reading", &card.reading);
    if card.rows.is_empty() {
        dom::set_html("decide-table", "");
    } else {
        let body: String =
            card.rows.iter().map(|(k, v)| format!("<tr><th scope=\"row\">{}</th><td>{}</td></tr>", escape(k), escape(v))).collect();
        dom::set_html("decide-table", &format!("<table class=\"facts\"><tbody>{body}</tbody></table>"));
    }
}

/// What the sample-size and decision panels say while the design is incomplete.
pub fn show_incomplete(still_needed: &[String]) {
    show_size(&results::incomplete(still_needed));
    show_no_decision("The decision appears here once the design is complete and your summary figures are entered.");
    dom::set_text("check-result", "");
}

pub fn show_no_decision(text: &str) {
    show_decide(&results::no_decision(text));
}

pub fn show_answer(ans: &Answer, unit: &str) {
    show_size(&results::size_card(ans, unit));
    match results::decide_card(ans, unit) {
        Some(card) => show_decide(&card),
        None => show_no_decision("Enter your summary figures above to decide."),
    }
}

/// The answer to "check a sample size you already have".
pub fn show_check(check: Option<&Check>) {
    dom::set_text("check-result", &check.map(results::check_text).unwrap_or_default());
}
