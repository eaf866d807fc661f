//! Checks against published tables and facts of the trade. Each value names
//! its source; values read from a printed table carry its rounding. Each
//! source says what was verified against a copy we could read (on
//! 2026-12-03) and what was not: a value that was not is marked "from
//! memory of the table", and no page number is given that was not seen.

use tern::engine::design::{Design, DesignSpec, Family};
use tern::engine::dist::{Binomial, Continuous, Discrete, ScaledChiSquare, StudentT};
use tern::engine::evaluate::{Rule, evaluate};
use tern::engine::sample_size::{conventional_power, sample_size};
use tern::engine::threshold::Alternative;

fn design(spec: DesignSpec) -> Design {
    Design::new(&spec).expect("valid design")
}

/// Cohen, J. (1988). Statistical Power Analysis for the Behavioral Sciences,
/// 2nd ed., Lawrence Erlbaum. Table 2.4.1 (n per group to detect d with the
/// two-sample t test), two-sided α = .05, power .80: 393, 64, 26 for
/// d = .2, .5, .8. Edition only verified; table number and values from
/// memory of the table, page not verified. Cohen's entries come from a
/// normal approximation with a correction and are rounded, so the exact
/// noncentral-t answer may differ by 1 (SciPy's exact answers, 394, 64 and
/// 26, are checked in `tests/reference/families.json`, cases
/// `check.cohen1988_table2.4.1.*`).
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
/// Values of the Student's t Distribution", the web edition
/// (itl.nist.gov/div898/handbook/eda/section3/eda3672.htm; a web handbook
/// without page numbers), critical values to three decimals, tabulated by
/// the probability below them (0.95 here is an upper tail of .05).
/// Verified on a stored copy of that page: its title and columns, and the
/// row ν = 1 at 0.95, 6.314. The rows ν = 10, 20 and 30: not verified on
/// the page; values from memory of the table.
#[test]
fn nist_t_critical_values() {
    let rows = [
        (1.0, 0.05, 6.314),   // verified on the page
        (10.0, 0.05, 1.812),  // from memory
        (10.0, 0.025, 2.228), // from memory
        (30.0, 0.05, 1.697),  // from memory
        (20.0, 0.01, 2.528),  // from memory
    ];
    for (df, upper, t) in rows {
        let q = StudentT::new(df).expect("df").quantile_upper(upper).expect("quantile");
        assert!((q - t).abs() < 5e-4, "t({df}) upper {upper}: {q} vs table {t}");
    }
}

/// NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.4, the table
/// of critical values of the chi-square distribution, web edition (page
/// eda3674.htm beside the t table's; no page numbers): an upper and a
/// lower table to three decimals, by the probability of exceeding the
/// value. Only the page's opening text and column heads were seen (a stored
/// copy without its rows): the values are not verified on the page; from
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
/// using exact methods. The American Statistician 56(2), 149–155 (journal,
/// volume, issue and pages verified on a library catalogue record with the
/// abstract). The abstract's claim: the exact one-sided test of one
/// binomial proportion, run at the largest attainable level below α, has a
/// power that is saw-toothed in n, not monotone, because that attainable
/// level moves with n and sets the critical value. The design (p0 = .6
/// against p1 = .8, α = .05, n from 10 to 60) is our own; the paper's own
/// numerical example was not verified.
///
/// Checked as sharply as the claim allows: at every n the conventional
/// critical value k is the one of the largest attainable level
/// (P0(X ≥ k) ≤ .05 < P0(X ≥ k − 1)); power falls at least five times; and
/// it falls only where the attainable level falls (Neyman–Pearson: at
/// n + 1 the test that ignores one observation has the level of n, so a
/// level at n + 1 at least as large gives at least the power). P0 comes
/// from Tern's binomial, itself checked against mpmath in
/// `tests/dist_discrete_chi2.rs`. Then, for
/// Tern's own answer, the Youden search's "stable from" n: every n from it
/// to `checked_to` is conclusive and the n below it is not.
#[test]
fn exact_binomial_power_saw_tooth() {
    let d = design(DesignSpec::new(Family::ProportionExact, Alternative::Greater).with("theta0", 0.6).with("theta1", 0.8).with("alpha_max", 0.05).with("beta_max", 0.2));
    let power: Vec<f64> = (10..=60).map(|n| conventional_power(&d, n).expect("power")).collect();
    let drops = power.windows(2).filter(|w| w[1] < w[0]).count();
    assert!(drops >= 5, "expected a saw-tooth, found {drops} drops");
    let mut level = Vec::new();
    for n in 10..=60u64 {
        let e = evaluate(&d, n).expect("evaluate");
        let Rule::AtLeast { k, .. } = e.conventional.rule else {
            panic!("n = {n}: conventional rule {:?} is not X ≥ k", e.conventional.rule)
        };
        assert!((1..=n as i64).contains(&k), "n = {n}: conventional k = {k}");
        let h0 = Binomial::new(n, 0.6).expect("binomial");
        let at = |k: i64| h0.sf((k - 1) as u64); // P0(X ≥ k), k ≥ 1
        assert!(at(k) <= 0.05, "n = {n}: P0(X ≥ {k}) = {} exceeds .05", at(k));
        assert!(k == 1 || at(k - 1) > 0.05, "n = {n}: k = {k} is not the largest attainable level: P0(X ≥ {}) = {}", k - 1, at(k - 1));
        assert!((e.conventional.alpha - at(k)).abs() <= 1e-14, "n = {n}: conventional α {} vs P0(X ≥ {k}) = {}", e.conventional.alpha, at(k));
        assert!((e.conventional.power - power[(n - 10) as usize]).abs() <= 1e-12, "n = {n}: two figures of the same power");
        level.push(at(k));
    }
    for (i, (p, a)) in power.windows(2).zip(level.windows(2)).enumerate() {
        if p[1] < p[0] {
            assert!(a[1] < a[0], "n = {} → {}: power falls ({} → {}) while the level does not ({} → {})", i + 10, i + 11, p[0], p[1], a[0], a[1]);
        }
    }
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
