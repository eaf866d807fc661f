//! Numbers as psychology and medical journals print them: the statistics
//! style of the APA Publication Manual, 7th ed. (2020), section 6.36
//! ("Statistics in Text"), and its "Numbers and Statistics" guide.
//!
//! - A statistic with its degrees of freedom in parentheses and two
//!   decimals: *t*(110) = −2.36. Welch's fractional df keeps one decimal:
//!   *t*(57.3).
//! - Exact p-values with three decimals and no leading zero (a probability
//!   cannot exceed 1): *p* = .010; below .001 *p* < .001, never .000;
//!   above .999 *p* > .999.
//! - Other quantities that cannot exceed 1 (α, β, power) also drop the
//!   leading zero; an effect size such as *d*, which can, keeps it.
//! - A confidence interval as "95% CI [−4.21, −0.35]".
//! - The minus sign is U+2212, not a hyphen.
//!
//! Architecture invariant: formatting only; symbols come back as
//! [`Inline::Symbol`] so that each output format sets them in italics its
//! own way.

/// A run of text in a report: plain, or a statistical symbol (set in
/// italics: *t*, *p*, *d*, *n*).
#[derive(Debug, Clone, PartialEq)]
pub enum Inline {
    Text(String),
    Symbol(String),
}

/// Plain text.
pub fn text(s: impl Into<String>) -> Inline {
    Inline::Text(s.into())
}

/// An italic symbol.
pub fn symbol(s: impl Into<String>) -> Inline {
    Inline::Symbol(s.into())
}

/// `x` with `decimals` decimals and a true minus sign; "−0.00" becomes
/// "0.00". Not finite: "undefined".
pub fn fixed(x: f64, decimals: usize) -> String {
    if !x.is_finite() {
        return "undefined".into();
    }
    let s = format!("{x:.decimals$}");
    if s.trim_start_matches('-').chars().all(|c| c == '0' || c == '.') {
        return s.trim_start_matches('-').to_string();
    }
    s.replacen('-', "\u{2212}", 1)
}

/// A quantity that cannot exceed 1 in absolute value, without its leading
/// zero: 0.05 → ".05" (with `decimals` = 2).
pub fn no_leading_zero(x: f64, decimals: usize) -> String {
    let s = fixed(x, decimals);
    if let Some(rest) = s.strip_prefix("0.") {
        format!(".{rest}")
    } else if let Some(rest) = s.strip_prefix("\u{2212}0.") {
        format!("\u{2212}.{rest}")
    } else {
        s
    }
}

/// The p-value's relation and value: ("=", ".010"), ("<", ".001"),
/// (">", ".999").
pub fn p_parts(p: f64) -> (&'static str, String) {
    if !p.is_finite() {
        ("=", "undefined".into())
    } else if p < 0.001 {
        ("<", ".001".into())
    } else if p > 0.999 {
        (">", ".999".into())
    } else {
        ("=", no_leading_zero(p, 3))
    }
}

/// *p* = .010, *p* < .001.
pub fn p_value(p: f64) -> Vec<Inline> {
    let (rel, v) = p_parts(p);
    vec![symbol("p"), text(format!(" {rel} {v}"))]
}

/// Degrees of freedom: whole numbers as they are, fractional ones (Welch)
/// with one decimal.
pub fn df(df: f64) -> String {
    if df.fract() == 0.0 && df.abs() < 1e15 { format!("{}", df as i64) } else { fixed(df, 1) }
}

/// A test statistic with its df when it has one: *t*(110) = −2.36,
/// *z* = 1.96. Counts (`X`) are whole numbers and shown so.
pub fn statistic(symbol_text: &str, degrees: Option<f64>, value: f64) -> Vec<Inline> {
    let mut out = vec![symbol(symbol_text)];
    let shown = if symbol_text == "X" && value.fract() == 0.0 { format!("{value}") } else { fixed(value, 2) };
    match degrees {
        Some(d) => out.push(text(format!("({}) = {shown}", df(d)))),
        None => out.push(text(format!(" = {shown}"))),
    }
    out
}

/// A level as a percentage without needless decimals: 0.95 → "95%",
/// 0.975 → "97.5%".
pub fn percent(level: f64) -> String {
    crate::page::results::percent(level)
}

/// 95% CI [−4.21, −0.35], the bounds with `decimals` decimals.
pub fn interval(level: f64, low: f64, high: f64, decimals: usize) -> String {
    format!("{} CI [{}, {}]", percent(level), fixed(low, decimals), fixed(high, decimals))
}

/// Decimals that show a number of this size to about three significant
/// figures, between 2 and 6: estimates and interval bounds.
pub fn decimals_for(x: f64) -> usize {
    let a = x.abs();
    if !a.is_finite() || a >= 10.0 || a == 0.0 {
        2
    } else {
        (2 - a.log10().floor() as i64).clamp(2, 6) as usize
    }
}

/// The runs as plain text (symbols unmarked), for tests and alt text.
pub fn plain(runs: &[Inline]) -> String {
    runs.iter()
        .map(|r| match r {
            Inline::Text(s) | Inline::Symbol(s) => s.as_str(),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The style's cases, value → text (APA Publication Manual, 7th ed.,
    /// section 6.36, and its "Numbers and Statistics" guide: exact p to
    /// three decimals, no leading zero, p < .001 below that, statistic to
    /// two decimals with df in parentheses).
    #[test]
    fn numbers_follow_the_journal_style() {
        let p = |x: f64| plain(&p_value(x));
        for (x, want) in [
            (0.0004, "p < .001"),
            (0.0100, "p = .010"),
            (0.001, "p = .001"),
            (0.00099, "p < .001"),
            (0.0, "p < .001"),
            (0.049, "p = .049"),
            (0.5, "p = .500"),
            (0.9995, "p > .999"),
            (1.0, "p > .999"),
        ] {
            assert_eq!(p(x), want, "p = {x}");
        }
        let st = |s: &str, d: Option<f64>, v: f64| plain(&statistic(s, d, v));
        assert_eq!(st("t", Some(110.0), -2.3612), "t(110) = \u{2212}2.36");
        assert_eq!(st("t", Some(57.3), 2.0), "t(57.3) = 2.00");
        assert_eq!(st("t", Some(57.34), 2.0), "t(57.3) = 2.00");
        assert_eq!(st("z", None, 1.95996), "z = 1.96");
        assert_eq!(st("X", None, 37.0), "X = 37");
        assert_eq!(interval(0.95, -4.2149, -0.3501, 2), "95% CI [\u{2212}4.21, \u{2212}0.35]");
        assert_eq!(interval(1.0 - 2.0 * 0.05, 1.0, 2.0, 2), "90% CI [1.00, 2.00]");
        assert_eq!(percent(0.975), "97.5%");
        assert_eq!(no_leading_zero(0.05, 2), ".05");
        assert_eq!(no_leading_zero(0.8, 2), ".80");
        assert_eq!(fixed(-0.001, 2), "0.00");
        assert_eq!(fixed(f64::NAN, 2), "undefined");
        assert_eq!(decimals_for(0.0123), 4);
        assert_eq!(decimals_for(-3.2), 2);
    }
}
