//! Property tests of the engine's logic over random valid designs of every
//! family and direction (DEVELOPERS.md, "Statistical conventions").
//!
//! The properties are about the engine, not about the last digits of the
//! t and binomial distributions: every comparison below uses the same
//! distribution objects the engine uses (`design.model(n)`), so a property
//! holds or fails because of the solver, the search or the decision rules.
//!
//! Case counts are kept modest (the t families evaluate noncentral t
//! distributions, which are costly) so the file stays fast.

use proptest::prelude::*;
use proptest::test_runner::Config as ProptestConfig;
use tern::engine::decision::{Outcome, Summary, decide};
use tern::engine::design::{Design, DesignSpec, Family};
use tern::engine::dist::{Continuous, Discrete};
use tern::engine::evaluate::{Cut, evaluate, solve, within};
use tern::engine::model::{Observed, Sampling};
use tern::engine::sample_size::{conventional_power, sample_size};
use tern::engine::threshold::{Alternative, ContinuousCut, DiscreteCut, Errors, continuous_errors, discrete_errors};

/// Relative slack under which a grid point "is not smaller" than c*: the
/// engine's own tie tolerance (threshold::TIE_TOLERANCE).
const SLACK: f64 = 1e-12;

const ALTS: [Alternative; 3] = [Alternative::Greater, Alternative::Less, Alternative::TwoSided];

/// The random part of a design, direction-free: the effect is a magnitude
/// `delta` that `spec` places on the side the alternative asks for.
#[derive(Debug, Clone, Copy)]
struct Params {
    family: Family,
    weight: f64,
    theta0: f64,
    /// Standardised effect |θ1 − θ0|/σ for the mean families.
    d: f64,
    sigma: f64,
    sigma2: f64,
    /// Proportions as multiples of 1/256, so that p ↦ 1 − p is exact.
    p0: f64,
    dp: f64,
    ratio: f64,
    alpha_max: f64,
    beta_max: f64,
}

/// The specification with the effect on side `sign` (+1: θ1 > θ0; −1:
/// θ1 < θ0). `mirror` maps every proportion p to 1 − p (the mirror image of
/// a proportion design); for the other families the mirror is the sign.
fn spec(p: &Params, alternative: Alternative, sign: f64, mirror: bool) -> DesignSpec {
    let mut s = DesignSpec::new(p.family, alternative).with("alpha_max", p.alpha_max).with("beta_max", p.beta_max).with("weight", p.weight);
    if p.family.two_groups() {
        s.set("ratio", p.ratio);
    }
    let flip = |x: f64| if mirror { 1.0 - x } else { x };
    match p.family {
        Family::MeanZ | Family::MeanT | Family::PairedT | Family::TwoMeansPooled => {
            s.set("theta0", p.theta0);
            s.set("theta1", p.theta0 + sign * p.d * p.sigma);
            s.set("sigma", p.sigma);
        }
        Family::TwoMeansWelch => {
            let se = ((p.sigma * p.sigma + p.sigma2 * p.sigma2) / 2.0).sqrt();
            s.set("theta0", p.theta0);
            s.set("theta1", p.theta0 + sign * p.d * se);
            s.set("sigma1", p.sigma);
            s.set("sigma2", p.sigma2);
        }
        Family::ProportionExact | Family::ProportionNormal => {
            s.set("theta0", flip(p.p0));
            s.set("theta1", flip(p.p0 + sign * p.dp));
        }
        Family::TwoProportions => {
            s.set("p2", flip(p.p0));
            s.set("p1", flip(p.p0 + sign * p.dp));
        }
        Family::TwoLearnersCv => {
            s.set("theta0", p.theta0);
            s.set("theta1", p.theta0 + sign * p.d * p.sigma);
            s.set("sigma", p.sigma);
            // A small test share, so that most designs have a conclusive J.
            s.set("test_train_ratio", 0.01);
        }
        Family::TwoClassifiers => {
            // ψ = 1.5·|acc1 − acc2| holds the accuracies (p0 ± dp stays
            // in (0.2, 0.8)); the mirror swaps right and wrong.
            s.set("acc2", flip(p.p0));
            s.set("acc1", flip(p.p0 + sign * p.dp));
            s.set("discordant", 1.5 * p.dp);
        }
    }
    s
}

/// Random parameters. `d_lo`, `lim_lo` bound the effect and the limits from
/// below so that the sample-size searches stay short.
fn params(d_lo: f64, lim_lo: f64) -> impl Strategy<Value = Params> {
    (
        0usize..Family::ALL.len(),
        0.2f64..=0.8,
        -5.0f64..5.0,
        d_lo..1.5,
        0.5f64..3.0,
        0.5f64..3.0,
        // p0 in [80, 176]/256 and the shift in [24, 64]/256: θ1 stays in
        // (0, 1) on both sides and in the mirror.
        80u32..=176,
        24u32..=64,
        prop_oneof![Just(1.0), Just(0.5), Just(2.0), 0.5f64..2.0],
        (lim_lo..0.3, lim_lo..0.3),
    )
        .prop_map(|(f, weight, theta0, d, sigma, sigma2, p0, dp, ratio, (alpha_max, beta_max))| Params {
            family: Family::ALL[f],
            weight,
            theta0,
            d,
            sigma,
            sigma2,
            p0: p0 as f64 / 256.0,
            dp: dp as f64 / 256.0,
            ratio,
            alpha_max,
            beta_max,
        })
}

fn design(p: &Params, alt: Alternative, sign: f64) -> Design {
    let s = spec(p, alt, sign, false);
    Design::new(&s).unwrap_or_else(|e| panic!("a valid design was refused: {e}; {s:?}"))
}

/// Side of the effect for an alternative (two-sided: either).
fn side(alt: Alternative, coin: bool) -> f64 {
    match alt {
        Alternative::Greater => 1.0,
        Alternative::Less => -1.0,
        Alternative::TwoSided => {
            if coin {
                1.0
            } else {
                -1.0
            }
        }
    }
}

fn not_below(x: f64, best: f64) -> bool {
    x >= best - SLACK * best.abs()
}

/// Property (a), continuous: no threshold on a fine grid around c*, on a
/// coarse grid over the whole central range, or at the ends (never / always
/// reject) has a smaller weighted error than c*.
fn check_continuous_minimum<C0: Continuous, C1: Continuous>(h0: &C0, h1: &C1, cut: ContinuousCut, found: Errors, w: f64) -> Result<(), String> {
    let best = found.weighted(w);
    let spread = h0.spread().max(h1.spread());
    let lo = (h0.centre() - 12.0 * h0.spread()).min(h1.centre() - 12.0 * h1.spread());
    let hi = (h0.centre() + 12.0 * h0.spread()).max(h1.centre() + 12.0 * h1.spread());
    let check = |c: ContinuousCut| -> Result<(), String> {
        let e = continuous_errors(h0, h1, c);
        if not_below(e.weighted(w), best) {
            Ok(())
        } else {
            Err(format!("{c:?} gives w·α + (1 − w)·β = {:e} < {:e} at c* = {cut:?}", e.weighted(w), best))
        }
    };
    let mut local = Vec::new();
    match cut {
        ContinuousCut::Above(c) | ContinuousCut::Below(c) => {
            let make = |x: f64| match cut {
                ContinuousCut::Above(_) => ContinuousCut::Above(x),
                _ => ContinuousCut::Below(x),
            };
            if c.is_finite() {
                for i in 1..=40 {
                    local.push(c + i as f64 * 2.5e-4 * spread);
                    local.push(c - i as f64 * 2.5e-4 * spread);
                }
            }
            for i in 0..=240 {
                local.push(lo + (hi - lo) * i as f64 / 240.0);
            }
            local.push(f64::INFINITY);
            local.push(f64::NEG_INFINITY);
            for x in local {
                check(make(x))?;
            }
        }
        ContinuousCut::Outside { centre, half_width } => {
            let make = |x: f64| ContinuousCut::Outside { centre, half_width: x };
            if half_width.is_finite() {
                for i in 1..=40 {
                    local.push(half_width + i as f64 * 2.5e-4 * spread);
                    local.push((half_width - i as f64 * 2.5e-4 * spread).max(0.0));
                }
            }
            let reach = (h1.centre() - centre).abs().max((h0.centre() - centre).abs()) + 12.0 * spread;
            for i in 0..=240 {
                local.push(reach * i as f64 / 240.0);
            }
            local.push(f64::INFINITY);
            for x in local {
                check(make(x))?;
            }
        }
    }
    Ok(())
}

/// Property (a), discrete: every admissible cut-off k (which contains every
/// window around k*) has a weighted error at least that of k*, and among the
/// tied ones k* has the smallest α (DEVELOPERS.md, "Ties").
fn check_discrete_minimum<D0: Discrete, D1: Discrete>(h0: &D0, h1: &D1, cut: DiscreteCut, found: Errors, w: f64, n: u64, m0: f64) -> Result<(), String> {
    let best = found.weighted(w);
    let n = n as i64;
    let cuts: Vec<DiscreteCut> = match cut {
        DiscreteCut::AtLeast(_) => (0..=n + 1).map(DiscreteCut::AtLeast).collect(),
        DiscreteCut::AtMost(_) => (-1..=n).map(DiscreteCut::AtMost).collect(),
        DiscreteCut::Outside { .. } => {
            let mut v: Vec<DiscreteCut> = (0..=n).map(|x| DiscreteCut::outside(m0, (x as f64 - m0).abs(), n as u64)).collect();
            // Half-width below every distance: always reject.
            v.push(DiscreteCut::Outside { centre: m0, half_width: -1.0, low: None, high: Some(0) });
            v
        }
    };
    for c in cuts {
        let e = discrete_errors(h0, h1, c);
        if !not_below(e.weighted(w), best) {
            return Err(format!("{c:?} gives {:e} < {:e} at k* = {cut:?}", e.weighted(w), best));
        }
        let tied = (e.weighted(w) - best).abs() <= SLACK * best;
        if tied && e.alpha < found.alpha * (1.0 - 1e-12) {
            return Err(format!("{c:?} ties with k* = {cut:?} but has the smaller α {:e} < {:e}", e.alpha, found.alpha));
        }
    }
    Ok(())
}

/// The mirror image of a cut: T ↦ −T for continuous statistics (t0 = 0),
/// X ↦ n − X for counts.
fn mirror_cut(cut: Cut, n: u64) -> Cut {
    let n = n as i64;
    match cut {
        Cut::Continuous(ContinuousCut::Above(c)) => Cut::Continuous(ContinuousCut::Below(-c)),
        Cut::Continuous(ContinuousCut::Below(c)) => Cut::Continuous(ContinuousCut::Above(-c)),
        Cut::Continuous(c @ ContinuousCut::Outside { .. }) => Cut::Continuous(c),
        Cut::Discrete(DiscreteCut::AtLeast(k)) => Cut::Discrete(DiscreteCut::AtMost(n - k)),
        Cut::Discrete(DiscreteCut::AtMost(k)) => Cut::Discrete(DiscreteCut::AtLeast(n - k)),
        // Always reject (half-width below every distance) is its own mirror.
        c @ Cut::Discrete(DiscreteCut::Outside { half_width, .. }) if half_width < 0.0 => c,
        Cut::Discrete(DiscreteCut::Outside { centre, half_width, low, high }) => Cut::Discrete(DiscreteCut::Outside {
            centre: n as f64 - centre,
            half_width,
            low: high.map(|k| n - k),
            high: low.map(|k| n - k),
        }),
    }
}

fn close(a: f64, b: f64, rel: f64) -> bool {
    a == b || (a - b).abs() <= rel * a.abs().max(b.abs())
}

/// Thresholds equal up to the root finder's tolerance (4 ulp relative, plus
/// a tiny absolute floor for thresholds near 0).
fn same_cut(a: Cut, b: Cut) -> bool {
    let near = |x: f64, y: f64| x == y || (x - y).abs() <= 1e-12 * (1.0 + x.abs().max(y.abs()));
    match (a, b) {
        (Cut::Continuous(ContinuousCut::Above(x)), Cut::Continuous(ContinuousCut::Above(y)))
        | (Cut::Continuous(ContinuousCut::Below(x)), Cut::Continuous(ContinuousCut::Below(y))) => near(x, y),
        (Cut::Continuous(ContinuousCut::Outside { half_width: x, .. }), Cut::Continuous(ContinuousCut::Outside { half_width: y, .. })) => {
            near(x, y)
        }
        (
            Cut::Discrete(DiscreteCut::Outside { low: l1, high: h1, half_width: w1, .. }),
            Cut::Discrete(DiscreteCut::Outside { low: l2, high: h2, half_width: w2, .. }),
        ) => (w1 < 0.0 && w2 < 0.0) || (l1 == l2 && h1 == h2),
        (x, y) => x == y,
    }
}

fn n_range(family: Family) -> std::ops::RangeInclusive<u64> {
    family.n_min()..=120
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 40, ..ProptestConfig::default() })]

    /// (a) c* minimises w·α + (1 − w)·β over every threshold the grid or the
    /// cut-off list offers, for every family, direction and weight; and (b)
    /// α*, β* are probabilities and J = 1 − α* − β*, total error and power
    /// follow from them, and the verdict is "both within the limits".
    #[test]
    fn threshold_minimises_the_weighted_error(p in params(0.2, 0.05), a in 0usize..3, coin: bool, n_pick in 0.0f64..1.0) {
        let alt = ALTS[a];
        let d = design(&p, alt, side(alt, coin));
        let r = n_range(p.family);
        // The design's own smallest n1 (see mirror_images_agree).
        let n = (r.start() + ((r.end() - r.start()) as f64 * n_pick) as u64).max(d.n_min());
        let model = d.model(n).map_err(|e| TestCaseError::fail(format!("model at n = {n}: {e}")))?;
        let (cut, errors, _) = solve(&model).map_err(|e| TestCaseError::fail(format!("solve at n = {n}: {e}")))?;
        let res = match (&model.sampling, cut) {
            (Sampling::Continuous { h0, h1 }, Cut::Continuous(c)) => check_continuous_minimum(h0, h1, c, errors, d.weight),
            (Sampling::Discrete { h0, h1 }, Cut::Discrete(c)) => check_discrete_minimum(h0, h1, c, errors, d.weight, model.n1, model.setup.centre),
            (s, c) => Err(format!("cut {c:?} does not match the sampling {s:?}")),
        };
        prop_assert!(res.is_ok(), "{:?} {:?} n = {}: {}", p.family, alt, n, res.unwrap_err());

        // (b) The reported figures are the solver's, and consistent.
        let ev = evaluate(&d, n).map_err(|e| TestCaseError::fail(format!("evaluate at n = {n}: {e}")))?;
        prop_assert!((0.0..=1.0).contains(&ev.alpha) && (0.0..=1.0).contains(&ev.beta), "α* = {}, β* = {}", ev.alpha, ev.beta);
        // Two classifiers: the solved model is the one at the expected
        // number of discordant items; the design's rates average over it.
        let solved = ev.discordant.as_ref().map_or((ev.alpha, ev.beta), |m| (m.alpha_m, m.beta_m));
        prop_assert_eq!(solved.0, errors.alpha);
        prop_assert_eq!(solved.1, errors.beta);
        prop_assert!((ev.youden_j - (1.0 - ev.alpha - ev.beta)).abs() <= 1e-15, "J = {} vs 1 − α* − β* = {}", ev.youden_j, 1.0 - ev.alpha - ev.beta);
        prop_assert!((ev.total_error - (ev.alpha + ev.beta)).abs() <= 1e-15);
        prop_assert!((ev.power - (1.0 - ev.beta)).abs() <= 1e-15);
        prop_assert_eq!(ev.conclusive, ev.alpha <= d.alpha_max && ev.beta <= d.beta_max);
        prop_assert_eq!(ev.weight, d.weight);
        prop_assert!(same_cut(ev.cut, cut));
        // The conventional test spends α_max exactly for a continuous
        // statistic (to the quantile's accuracy) and at most α_max for a
        // count (DEVELOPERS.md, engine::conventional).
        if p.family.discrete() {
            prop_assert!(ev.conventional.alpha <= d.alpha_max, "conventional α = {} > {}", ev.conventional.alpha, d.alpha_max);
        } else {
            prop_assert!(close(ev.conventional.alpha, d.alpha_max, 1e-12), "conventional α = {} ≠ {}", ev.conventional.alpha, d.alpha_max);
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    /// (c) The sample-size search's n is conclusive and n − 1 is not (unless
    /// n is the smallest admissible n); the conventional n reaches power
    /// 1 − β_max and n − 1 does not. Continuous families only: there α*(n)
    /// and β*(n) fall with n (DEVELOPERS.md, "Sample-size search").
    #[test]
    fn sample_size_is_the_smallest_conclusive_n(p in params(0.3, 0.05), a in 0usize..3, coin: bool) {
        prop_assume!(!p.family.discrete());
        let alt = ALTS[a];
        let d = design(&p, alt, side(alt, coin));
        let s = sample_size(&d).map_err(|e| TestCaseError::fail(format!("sample size: {e}")))?;
        let n = s.youden.map(|g| g.n1);
        prop_assert!(n.is_some(), "{:?} {:?}: no conclusive n found", p.family, alt);
        let n = n.unwrap();
        prop_assert_eq!(s.youden.unwrap().n2, d.n2(n));
        let at = evaluate(&d, n).map_err(|e| TestCaseError::fail(format!("evaluate: {e}")))?;
        prop_assert!(at.conclusive, "n = {} is not conclusive: α* = {}, β* = {}", n, at.alpha, at.beta);
        if n > d.n_min() {
            let below = evaluate(&d, n - 1).map_err(|e| TestCaseError::fail(format!("evaluate: {e}")))?;
            prop_assert!(!below.conclusive, "n − 1 = {} is conclusive too: α* = {}, β* = {}", n - 1, below.alpha, below.beta);
        }
        prop_assert_eq!(s.at_youden.as_ref().map(|e| e.n1), Some(n));
        // d ≥ 0.3 and limits ≥ .05 keep the conventional n far below the
        // search's bound: it must be found.
        let c = s.conventional.map(|g| g.n1);
        prop_assert!(c.is_some(), "{:?} {:?}: no conventional n found", p.family, alt);
        let c = c.unwrap();
        let target = 1.0 - d.beta_max;
        prop_assert!(conventional_power(&d, c).unwrap() >= target);
        if c > d.n_min() {
            prop_assert!(conventional_power(&d, c - 1).unwrap() < target, "conventional n − 1 = {} reaches the power", c - 1);
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 12, ..ProptestConfig::default() })]

    /// (c), discrete counterpart: the exact binomial scan's n is conclusive,
    /// no smaller n is, and every n from `stable_from` to `checked_to` is.
    #[test]
    fn exact_binomial_sample_size_scan(mut p in params(0.3, 0.1), a in 0usize..3, coin: bool) {
        p.family = Family::ProportionExact;
        // Large shifts keep the scan short.
        p.dp = p.dp.max(48.0 / 256.0);
        let alt = ALTS[a];
        let d = design(&p, alt, side(alt, coin));
        let s = sample_size(&d).map_err(|e| TestCaseError::fail(format!("sample size: {e}")))?;
        let n = s.youden.map(|g| g.n1);
        prop_assert!(n.is_some());
        let n = n.unwrap();
        let ok = |m: u64| evaluate(&d, m).unwrap().conclusive;
        prop_assert!(ok(n));
        for m in 1..n {
            prop_assert!(!ok(m), "n = {} is conclusive, below the reported {}", m, n);
        }
        let (from, to) = (s.stable_from.unwrap().n1, s.checked_to.unwrap());
        prop_assert!(from >= n && to >= from);
        prop_assert_eq!(to, (2 * n).max(n + 100));
        for m in from..=to {
            prop_assert!(ok(m), "n = {} in [stable_from {}, checked_to {}] is not conclusive", m, from, to);
        }
        if from > n {
            prop_assert!(!ok(from - 1), "stable_from {} is not the first of the stable run", from);
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 32, ..ProptestConfig::default() })]

    /// (d) Mirror invariance: the design toward larger θ and its mirror
    /// image (θ1 = θ0 − δ; proportions p ↦ 1 − p) have the same α*, β*,
    /// mirrored thresholds and the same sample sizes. Two-sided designs at
    /// θ0 + δ and θ0 − δ likewise (the mirror of a two-sided design is
    /// itself).
    #[test]
    fn mirror_images_agree(p in params(0.3, 0.08), two_sided: bool, n_pick in 0.0f64..1.0) {
        let proportion = matches!(p.family, Family::ProportionExact | Family::ProportionNormal | Family::TwoProportions);
        let (alt_a, alt_b) = if two_sided { (Alternative::TwoSided, Alternative::TwoSided) } else { (Alternative::Greater, Alternative::Less) };
        let a = design(&p, alt_a, 1.0);
        let sb = if proportion { spec(&p, alt_b, 1.0, true) } else { spec(&p, alt_b, -1.0, false) };
        let b = Design::new(&sb).unwrap_or_else(|e| panic!("mirror refused: {e}; {sb:?}"));
        let r = n_range(p.family);
        // The design's own smallest n1: n2 = ⌈ratio·n1⌉ ≥ 2 needs more than
        // the family's when ratio < 1.
        let n = (r.start() + ((r.end() - r.start()) as f64 * n_pick) as u64).max(a.n_min());
        let (ea, eb) = (evaluate(&a, n).unwrap(), evaluate(&b, n).unwrap());
        prop_assert!(close(ea.alpha, eb.alpha, 1e-12), "α*: {} vs {}", ea.alpha, eb.alpha);
        prop_assert!(close(ea.beta, eb.beta, 1e-12), "β*: {} vs {}", ea.beta, eb.beta);
        let mirrored = mirror_cut(ea.cut, ea.model.n1);
        prop_assert!(same_cut(mirrored, eb.cut), "thresholds are not mirror images: {:?} vs {:?}", ea.cut, eb.cut);
        prop_assert_eq!(ea.conclusive, eb.conclusive);
        let (sa, sb) = (sample_size(&a).unwrap(), sample_size(&b).unwrap());
        prop_assert_eq!(sa.youden, sb.youden);
        prop_assert_eq!(sa.conventional, sb.conventional);
        prop_assert_eq!(sa.stable_from, sb.stable_from);
    }
}

/// Summary data for a design, drawn around its planning values.
#[derive(Debug, Clone, Copy)]
struct Draw {
    n1: u64,
    n2: u64,
    /// Position of the observed mean or rate, in [0, 1].
    u1: f64,
    u2: f64,
    /// Observed SD as a multiple of the planning SD.
    s1: f64,
    s2: f64,
}

fn summary(d: &Design, p: &Params, x: &Draw) -> Summary {
    let (theta0, theta1) = d.effect.thetas();
    let spread = (theta1 - theta0).abs();
    let mean = theta0 - 2.0 * spread + 5.0 * spread * x.u1;
    match p.family {
        Family::MeanZ | Family::MeanT | Family::PairedT | Family::TwoLearnersCv => Summary::OneGroup { n: x.n1 as f64, mean, sd: Some(p.sigma * x.s1) },
        Family::TwoMeansPooled | Family::TwoMeansWelch => Summary::TwoGroups {
            n1: x.n1 as f64,
            mean1: mean,
            sd1: p.sigma * x.s1,
            n2: x.n2 as f64,
            mean2: 0.0,
            sd2: p.sigma2 * x.s2,
        },
        Family::ProportionExact | Family::ProportionNormal => {
            Summary::Proportion { successes: (x.u1 * x.n1 as f64).floor().min(x.n1 as f64), trials: x.n1 as f64 }
        }
        Family::TwoClassifiers => {
            let n = x.n1 as f64;
            let (b, c) = ((x.u1 * n / 4.0).floor(), (x.u2 * n / 4.0).floor());
            Summary::Classifiers { both_right: n - b - c, only_first_right: b, only_second_right: c, both_wrong: 0.0 }
        }
        Family::TwoProportions => Summary::TwoProportions {
            successes1: (x.u1 * x.n1 as f64).floor().min(x.n1 as f64),
            trials1: x.n1 as f64,
            successes2: (x.u2 * x.n2 as f64).floor().min(x.n2 as f64),
            trials2: x.n2 as f64,
        },
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 96, ..ProptestConfig::default() })]

    /// (e) The decision is consistent: "inconclusive" exactly when the design
    /// at the data's n (with the observed SDs where the statistic uses them:
    /// Welch's degrees of freedom) is not conclusive; otherwise "reject H0"
    /// exactly when the observed statistic lies in the rejection region of
    /// c* (strict inequality for continuous T, X ≥ k for counts).
    #[test]
    fn decision_follows_the_verdict_at_the_actual_n(
        p in params(0.2, 0.05),
        a in 0usize..3,
        coin: bool,
        n1 in 2u64..150,
        n2 in 2u64..150,
        u1 in 0.0f64..1.0,
        u2 in 0.0f64..1.0,
        s1 in 0.5f64..2.0,
        s2 in 0.5f64..2.0,
    ) {
        let alt = ALTS[a];
        let d = design(&p, alt, side(alt, coin));
        let x = Draw { n1, n2, u1, u2, s1, s2 };
        let data = summary(&d, &p, &x);
        let dec = match decide(&d, &data) {
            Ok(dec) => dec,
            Err(e) => {
                // The only refusal valid data can meet: two proportions whose
                // pooled rate is 0 or 1 (pooled SE 0).
                let pooled_degenerate = matches!(data, Summary::TwoProportions { successes1, successes2, trials1, trials2 }
                    if successes1 + successes2 == 0.0 || successes1 + successes2 == trials1 + trials2);
                prop_assert!(pooled_degenerate, "valid data refused: {e}; {data:?}");
                return Ok(());
            }
        };
        let two = p.family.two_groups();
        let n2v = if two { Some(n2) } else { None };
        let obs = match (p.family, data) {
            (Family::TwoMeansWelch, Summary::TwoGroups { sd1, sd2, .. }) => Observed { sd1: Some(sd1), sd2: Some(sd2), ..Observed::default() },
            // The decision's model divides by the observed pooled SE, as the
            // statistic does (DEVELOPERS.md, "Families").
            (Family::TwoProportions, Summary::TwoProportions { successes1, trials1, successes2, trials2 }) => {
                let pooled = (successes1 + successes2) / (trials1 + trials2);
                Observed { se0: Some((pooled * (1.0 - pooled) * (1.0 / trials1 + 1.0 / trials2)).sqrt()), ..Observed::default() }
            }
            _ => Observed::default(),
        };
        // Two classifiers decide conditional on the m = b + c discordant
        // items (DEVELOPERS.md, "Comparing models").
        let n1 = match data {
            Summary::Classifiers { only_first_right, only_second_right, .. } => (only_first_right + only_second_right) as u64,
            _ => n1,
        };
        let model = d.model_observed(n1, n2v, &obs).unwrap();
        let (cut, errors, _) = solve(&model).unwrap();
        let conclusive = within(&d, &errors);
        prop_assert_eq!(dec.at_n.n1, n1);
        prop_assert_eq!(dec.at_n.n2, n2v);
        prop_assert_eq!(dec.at_n.conclusive, conclusive);
        prop_assert_eq!(dec.outcome == Outcome::Inconclusive, !conclusive, "outcome {:?} but conclusive = {}", dec.outcome, conclusive);
        prop_assert!(same_cut(dec.at_n.cut, cut));
        let t = dec.statistic;
        prop_assert!(t.is_finite());
        let in_region = match cut {
            Cut::Continuous(ContinuousCut::Above(c)) => t > c,
            Cut::Continuous(ContinuousCut::Below(c)) => t < c,
            Cut::Continuous(ContinuousCut::Outside { centre, half_width }) => (t - centre).abs() > half_width,
            Cut::Discrete(DiscreteCut::AtLeast(k)) => t >= k as f64,
            Cut::Discrete(DiscreteCut::AtMost(k)) => t <= k as f64,
            Cut::Discrete(DiscreteCut::Outside { low, high, .. }) => low.is_some_and(|k| t <= k as f64) || high.is_some_and(|k| t >= k as f64),
        };
        if conclusive {
            let expect = if in_region { Outcome::RejectH0 } else { Outcome::DoNotRejectH0 };
            prop_assert_eq!(dec.outcome, expect, "statistic {} against {:?}", t, cut);
        }
        prop_assert!((0.0..=1.0).contains(&dec.conventional.p_value), "p-value {}", dec.conventional.p_value);
        prop_assert_eq!(dec.conventional.rejects_at_alpha_max, dec.conventional.p_value <= d.alpha_max);
    }
}
