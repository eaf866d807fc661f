//! Checks against published tables and facts of the trade. Each value names
//! its source; values read from a printed table carry its rounding.

use tern::engine::design::{Design, DesignSpec, Family};
use tern::engine::dist::{Continuous, ScaledChiSquare, StudentT};
use tern::engine::evaluate::{Rule, evaluate};
use tern::engine::sample_size::{conventional_power, sample_size};
use tern::engine::threshold::Alternative;

fn design(spec: DesignSpec) -> Design {
    Design::new(&spec).expect("valid design")
}

/// Cohen, J. (1988). Statistical Power Analysis for the Behavioral Sciences,
/// 2nd ed., Table 2.4.1 (two-sample t, two-sided α = .05, power .80): n per
/// group 393, 64, 26 for d = .2, .5, .8. Values from memory of the table.
/// Cohen's entries come from a normal approximation with a correction and
/// are rounded, so the exact noncentral-t answer may differ by 1.
#[test]
fn cohen_two_sample_table() {
    for (d, n) in [(0.2, 393u64), (0.5, 64), (0.8, 26)] {
        let s = sample_size(&design(DesignSpec::new(Family::TwoMeansPooled, Alternative::TwoSided).with("d", d).with("alpha_max", 0.05).with("beta_max", 0.2)))
        .expect("search");
        let got = s.conventional.expect("found").n1;
        assert!(got.abs_diff(n) <= 1, "d = {d}: conventional n {got}, Cohen's table {n}");
    }
}

/// NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2, "Critical
/// values of the Student's t distribution" (upper-tail critical values,
/// three decimals). Values from memory of the table.
#[test]
fn nist_t_critical_values() {
    for (df, upper, t) in [(10.0, 0.05, 1.812), (10.0, 0.025, 2.228), (30.0, 0.05, 1.697), (20.0, 0.01, 2.528), (1.0, 0.05, 6.314)] {
        let q = StudentT::new(df).expect("df").quantile_upper(upper).expect("quantile");
        assert!((q - t).abs() < 5e-4, "t({df}) upper {upper}: {q} vs table {t}");
    }
}

/// NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.4, "Critical
/// values of the chi-square distribution" (three decimals). Values from
/// memory of the table.
#[test]
fn nist_chi_square_critical_values() {
    for (df, upper, x) in [(10.0, 0.05, 18.307), (10.0, 0.95, 3.940), (1.0, 0.05, 3.841), (5.0, 0.01, 15.086)] {
        let q = ScaledChiSquare::new(df, 1.0).expect("df").quantile_upper(upper).expect("quantile");
        assert!((q - x).abs() < 5e-4, "chi2({df}) upper {upper}: {q} vs table {x}");
    }
}

/// Chernick, M. R. & Liu, C. Y. (2002). The saw-toothed behavior of power
/// versus sample size and software solutions: single binomial proportion
/// using exact methods. The American Statistician 56(2), 149–155: for
/// p0 = .6 against p1 = .8 the power of the exact level-α test is not
/// monotone in n. Checked qualitatively: somewhere in 10..=60 a larger n
/// has lower power, and the Youden search reports a stable n beyond the
/// first conclusive one when the saw-tooth crosses the limit.
#[test]
fn exact_binomial_power_saw_tooth() {
    let d = design(DesignSpec::new(Family::ProportionExact, Alternative::Greater).with("theta0", 0.6).with("theta1", 0.8).with("alpha_max", 0.05).with("beta_max", 0.2));
    let power: Vec<f64> = (10..=60).map(|n| conventional_power(&d, n).expect("power")).collect();
    let drops = power.windows(2).filter(|w| w[1] < w[0]).count();
    assert!(drops >= 5, "expected a saw-tooth, found {drops} drops");
    let s = sample_size(&d).expect("search");
    let first = s.youden.expect("found").n1;
    let stable = s.stable_from.expect("stable").n1;
    assert!(stable >= first);
    // Every n from `stable` to `checked_to` is conclusive, and stable − 1 is
    // not (when it is above the first conclusive n).
    for n in stable..=s.checked_to.expect("bound") {
        assert!(evaluate(&d, n).expect("evaluate").conclusive, "n = {n}");
    }
    if stable > first {
        assert!(!evaluate(&d, stable - 1).expect("evaluate").conclusive);
    }
}

/// Fact of the trade (common practice, no source): for a symmetric unimodal
/// location shift (z test) the Youden threshold is the midpoint (θ0 + θ1)/2
/// on the estimate scale and α* = β*.
#[test]
fn z_test_threshold_is_the_midpoint() {
    for (theta0, theta1, sigma, n, alt) in [
        (100.0, 103.0, 10.0, 50u64, Alternative::Greater),
        (5.0, 4.2, 1.5, 12, Alternative::Less),
        (0.0, 0.3, 1.0, 121, Alternative::Greater),
    ] {
        let d = design(DesignSpec::new(Family::MeanZ, alt).with("theta0", theta0).with("theta1", theta1).with("sigma", sigma).with("alpha_max", 0.05).with("beta_max", 0.2));
        let e = evaluate(&d, n).expect("evaluate");
        let est = match e.rule {
            Rule::Above { estimate, .. } | Rule::Below { estimate, .. } => estimate,
            ref r => panic!("unexpected rule {r:?}"),
        };
        let mid = 0.5 * (theta0 + theta1);
        assert!((est - mid).abs() <= 1e-12 * mid.abs().max(1.0), "{est} vs {mid}");
        assert!((e.alpha - e.beta).abs() <= 1e-14, "{} vs {}", e.alpha, e.beta);
    }
}

/// method.md §5 (fact of the trade, checked by hand: n ≥ (2·z.95/d)² =
/// 120.3 and ((z.95 + z.80)/d)² = 68.7): d = 0.3, α_max = .05, β_max = .2,
/// one-sided z test needs 121 for the Youden design against 69
/// conventionally.
#[test]
fn z_test_sample_sizes() {
    let s = sample_size(&design(DesignSpec::new(Family::MeanZ, Alternative::Greater).with("d", 0.3).with("alpha_max", 0.05).with("beta_max", 0.2)))
    .expect("search");
    assert_eq!(s.youden.map(|g| g.n1), Some(121));
    assert_eq!(s.conventional.map(|g| g.n1), Some(69));
}
