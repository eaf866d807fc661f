//! What a reviewer reads beside a decision: the estimate's confidence
//! interval and a standardised effect size, from the same summary data.
//!
//! The interval's level follows the analyst's α limit unless another is
//! asked for ([`default_level`]): a one-sided test at α_max is matched by
//! the two-sided 1 − 2·α_max interval (its bound on the tested side is the
//! one-sided test's bound), a two-sided test by the 1 − α_max interval.
//! The estimate is the decision's (`decision::decide`): a mean, a mean
//! difference, a proportion, or a difference *group 1 minus group 2*.
//!
//! Architecture invariant: pure arithmetic on validated numbers, no I/O and
//! no web types; the data are checked by the decision's own rules
//! (`decision::count`, `finite`, `sd`), and nothing here panics or searches
//! without a budget, whatever the input: a bound that is not a finite
//! number is an [`IntervalError`], never a silent NaN.

use super::decision::{DecisionError, Summary, count, finite, sd, successes};
use super::design::{Design, Effect, Family};
use super::dist::{Binomial, Continuous, Discrete, DistError, Normal, StudentT};
use super::family::{Check, INTERVAL_LEVEL};
use super::root::{RootError, Tolerance, brent};
use super::threshold::Alternative;
use serde::Serialize;

/// A two-sided confidence interval for the decision's estimate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Interval {
    /// Confidence level in (0, 1), such as 0.9 for a 90% interval.
    pub level: f64,
    /// Lower and upper bound, in the estimate's unit (a proportion for the
    /// proportion families); `low ≤ high`.
    pub low: f64,
    pub high: f64,
    /// How the interval was computed, in plain words (with the degrees of
    /// freedom for the t intervals).
    pub method: String,
}

/// A standardised effect size: the observed effect on a scale free of the
/// data's unit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EffectSize {
    /// Its usual name, such as "Cohen's d".
    pub name: &'static str,
    /// Its symbol: "d", "d_z" or "h".
    pub symbol: &'static str,
    pub value: f64,
    /// How it is standardised, as a formula in words.
    pub note: &'static str,
}

/// Why an interval or an effect size cannot be given. Messages name the
/// field and value at fault and say what to do.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum IntervalError {
    /// A confidence level outside (0, 1).
    #[error("{field} is {value_shown}, but must be {rule}", field = INTERVAL_LEVEL.key, rule = Check::OpenUnit.rule(), value_shown = crate::engine::shown::Num(*value))]
    Level { value: f64 },
    /// α_max gives no default level: 1 − 2·α_max ≤ 0 (one-sided) or
    /// 1 − α_max ≤ 0 (two-sided).
    #[error(
        "alpha_max is {value_shown}, which gives no confidence level (the {which} interval's level {formula} must be above 0): \
         give interval_level between 0 and 1 instead",
        value_shown = crate::engine::shown::Num(*value)
    )]
    NoDefaultLevel { value: f64, which: &'static str, formula: &'static str },
    /// The summary data break the decision's rules (field, value, rule).
    #[error(transparent)]
    Data(#[from] DecisionError),
    /// The effect size has no finite value for these data.
    #[error("{0}")]
    Undefined(&'static str),
    /// The figures are so large or small that a bound is not a finite number.
    #[error("the {what} is {value_shown}, not a finite number: the summary figures are too large (or too small) to combine; rescale the data's unit", value_shown = crate::engine::shown::Num(*value))]
    NotFinite { what: &'static str, value: f64 },
    /// A quantile could not be computed (a parameter out of its range).
    #[error("the interval's quantile could not be computed: {0}")]
    Quantile(#[from] DistError),
    /// A Clopper–Pearson bound's search failed (not expected; the
    /// bracket is proved before the search).
    #[error("the Clopper–Pearson bound could not be found: {0}")]
    Search(#[from] RootError),
}

/// The interval level matched to the test: 1 − 2·α_max for a one-sided
/// alternative (`greater`, `less`), 1 − α_max for `two_sided`.
///
/// α_max must be a number in (0, 0.5) for one-sided tests and (0, 1) for
/// two-sided ones (a valid `Design` has it in (0, 0.5), so its default
/// always exists); otherwise the error asks for an explicit level. Common
/// practice, no source: the 1 − 2α two-sided interval excludes θ0 on the
/// tested side exactly when the one-sided level-α test rejects.
pub fn default_level(alternative: Alternative, alpha_max: f64) -> Result<f64, IntervalError> {
    let (level, which, formula) = match alternative {
        Alternative::TwoSided => (1.0 - alpha_max, "two-sided test's", "1 − alpha_max"),
        Alternative::Greater | Alternative::Less => (1.0 - 2.0 * alpha_max, "one-sided test's", "1 − 2·alpha_max"),
    };
    if alpha_max > 0.0 && level > 0.0 && level < 1.0 {
        Ok(level)
    } else {
        Err(IntervalError::NoDefaultLevel { value: alpha_max, which, formula })
    }
}

/// Check a confidence level: a number strictly between 0 and 1.
pub fn check_level(level: f64) -> Result<f64, IntervalError> {
    if Check::OpenUnit.holds(level) { Ok(level) } else { Err(IntervalError::Level { value: level }) }
}

/// The two-sided confidence interval at `level` for the estimate the
/// decision reports, by family (q = (1 − level)/2, the tail on each side):
///
/// - `mean_z`: x̄ ± z₁₋q·σ/√n with the design's known σ (standardised
///   designs: σ = 1, data in units of σ).
/// - `mean_t`, `paired_t`: x̄ ± t₁₋q(n − 1)·s/√n (paired: the differences).
/// - `two_means_pooled`: (x̄1 − x̄2) ± t₁₋q(n1 + n2 − 2)·s_p·√(1/n1 + 1/n2),
///   s_p² = ((n1 − 1)s1² + (n2 − 1)s2²)/(n1 + n2 − 2).
/// - `two_means_welch`: (x̄1 − x̄2) ± t₁₋q(ν)·√(s1²/n1 + s2²/n2) with the
///   Welch–Satterthwaite ν from the observed SDs (not a whole number).
/// - `proportion_exact`: Clopper–Pearson: low = Beta⁻¹(q; x, n − x + 1)
///   (0 when x = 0), high = Beta⁻¹(1 − q; x + 1, n − x) (1 when x = n),
///   found as the p where P(X ≥ x) = q and P(X ≤ x) = q under Bin(n, p)
///   (the binomial–beta relation; Clopper and Pearson 1934).
/// - `proportion_normal`: Wald, p̂ ± z₁₋q·√(p̂(1 − p̂)/n), clipped to
///   [0, 1] (as statsmodels' `proportion_confint(method="normal")` does;
///   at x = 0 or n the interval has no width, a sign that the
///   approximation fails there).
/// - `two_proportions`: Wald for p̂1 − p̂2 with the unpooled standard error
///   √(p̂1(1 − p̂1)/n1 + p̂2(1 − p̂2)/n2), clipped to [−1, 1], the range of
///   a difference of proportions (our choice; statsmodels'
///   `confint_proportions_2indep(method="wald")` does not clip).
///
/// Sources: the z, t and Wald intervals are textbook forms (common
/// practice, no source); checked against SciPy and statsmodels
/// (`tests/reference/gen_intervals.py`).
pub fn confidence_interval(design: &Design, data: &Summary, level: f64) -> Result<Interval, IntervalError> {
    let level = check_level(level)?;
    // Exact: 1 − level is exact for level in [½, 1), and q ≤ ½ anyway.
    let q = 0.5 * (1.0 - level);
    let (low, high, method) = match read(design, data)? {
        Figures::KnownSigma { n, mean, sigma } => {
            let z = standard_normal()?.quantile_upper(q)?;
            let half = z * (sigma / n.sqrt());
            (mean - half, mean + half, "z interval with the known standard deviation σ".to_string())
        }
        Figures::OneGroup { n, mean, sd } => {
            let df = n - 1.0;
            let half = StudentT::new(df)?.quantile_upper(q)? * (sd / n.sqrt());
            let what = if design.family == Family::PairedT { "t interval for the mean difference" } else { "t interval" };
            (mean - half, mean + half, format!("{what}, {df} degrees of freedom"))
        }
        Figures::Splits { n, mean, sd, rho } => {
            let df = n - 1.0;
            let half = StudentT::new(df)?.quantile_upper(q)? * sd * (1.0 / n + rho).sqrt();
            (mean - half, mean + half, format!("corrected resampled t interval for the mean score difference (variance factor 1/J + n_test/n_train), {df} degrees of freedom"))
        }
        Figures::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 } => {
            let diff = mean1 - mean2;
            if design.family == Family::TwoMeansPooled {
                let df = n1 + n2 - 2.0;
                let se = pooled_sd(n1, sd1, n2, sd2) * (1.0 / n1 + 1.0 / n2).sqrt();
                let half = StudentT::new(df)?.quantile_upper(q)? * se;
                let method = format!("pooled-variance t interval for mean1 − mean2, {df} degrees of freedom");
                (diff - half, diff + half, method)
            } else {
                let (se, df) = welch(n1, sd1, n2, sd2);
                let half = StudentT::new(df)?.quantile_upper(q)? * se;
                let method = format!(
                    "Welch t interval for mean1 − mean2, {df:.1} degrees of freedom (Welch–Satterthwaite approximation)"
                );
                (diff - half, diff + half, method)
            }
        }
        Figures::Proportion { x, n } if design.family == Family::ProportionExact => {
            let (low, high) = clopper_pearson(x, n, q)?;
            (low, high, "Clopper–Pearson exact interval".to_string())
        }
        Figures::Proportion { x, n } => {
            let p = x as f64 / n as f64;
            let half = standard_normal()?.quantile_upper(q)? * (p * (1.0 - p) / n as f64).sqrt();
            let method = "Wald interval p̂ ± z·√(p̂(1 − p̂)/n) (normal approximation), clipped to [0, 1]";
            ((p - half).max(0.0), (p + half).min(1.0), method.to_string())
        }
        Figures::TwoProportions { x1, n1, x2, n2 } => {
            let (p1, p2) = (x1 / n1, x2 / n2);
            let se = (p1 * (1.0 - p1) / n1 + p2 * (1.0 - p2) / n2).sqrt();
            let half = standard_normal()?.quantile_upper(q)? * se;
            let method =
                "Wald interval for p̂1 − p̂2, unpooled standard error √(p̂1(1 − p̂1)/n1 + p̂2(1 − p̂2)/n2) (normal approximation), clipped to [−1, 1]";
            ((p1 - p2 - half).max(-1.0), (p1 - p2 + half).min(1.0), method.to_string())
        }
        Figures::Discordant { b, c, n } => {
            // The paired difference's variance estimate ((b + c) − (b − c)²/n)/n²
            // (common practice, no source).
            let d = (b - c) / n;
            let se = ((b + c) - (b - c) * (b - c) / n).max(0.0).sqrt() / n;
            let half = standard_normal()?.quantile_upper(q)? * se;
            let method = "Wald interval for the accuracy difference (b − c)/n of paired items, standard error √((b + c) − (b − c)²/n)/n \
                          (normal approximation), clipped to [−1, 1]";
            ((d - half).max(-1.0), (d + half).min(1.0), method.to_string())
        }
    };
    for (what, value) in [("interval's lower bound", low), ("interval's upper bound", high)] {
        if !value.is_finite() {
            return Err(IntervalError::NotFinite { what, value });
        }
    }
    Ok(Interval { level, low, high, method })
}

/// The family's usual standardised effect size (common practice, no
/// source; the measures are Cohen's, *Statistical Power Analysis for the
/// Behavioral Sciences*, 2nd ed., 1988, from memory):
///
/// - `mean_z`: d = (x̄ − θ0)/σ with the design's known σ.
/// - `mean_t`: d = (x̄ − θ0)/s; `paired_t`: d_z = (mean difference − θ0)/s
///   of the differences.
/// - `two_means_pooled`: d = (x̄1 − x̄2 − θ0)/s_p, pooled SD as in the
///   interval. θ0 is subtracted so that d is the observed counterpart of
///   the design's standardised effect (θ1 − θ0)/σ and t = d/√(1/n1 + 1/n2);
///   with θ0 = 0, the usual case, it is Cohen's d.
/// - `two_means_welch`: d = (x̄1 − x̄2 − θ0)/√((s1² + s2²)/2), the root mean
///   square of the two SDs, not weighted by group size.
/// - `proportion_exact`, `proportion_normal`: Cohen's h = 2·asin√p̂ − 2·asin√p0.
/// - `two_proportions`: h = 2·asin√p̂1 − 2·asin√p̂2.
/// - `two_classifiers`: Cohen's g = b/(b + c) − ½ (his sign-test index).
///
/// d is in SD units (any real number), h in radians, in [−π, π].
pub fn effect_size(design: &Design, data: &Summary) -> Result<EffectSize, IntervalError> {
    let (theta0, _) = design.effect.thetas();
    let arcsine = |p: f64| 2.0 * p.sqrt().asin();
    let (name, symbol, value, note) = match read(design, data)? {
        Figures::KnownSigma { mean, sigma, .. } => {
            ("Cohen's d", "d", (mean - theta0) / sigma, "(mean − θ0)/σ, standardised by the design's known σ")
        }
        Figures::OneGroup { mean, sd, .. } if design.family == Family::PairedT => {
            ("Cohen's d_z", "d_z", (mean - theta0) / sd, "(mean difference − θ0)/sd, standardised by the SD of the differences")
        }
        Figures::OneGroup { mean, sd, .. } => ("Cohen's d", "d", (mean - theta0) / sd, "(mean − θ0)/sd, standardised by the sample SD"),
        Figures::Splits { mean, sd, .. } => {
            ("standardised mean difference", "d", (mean - theta0) / sd, "(mean difference − θ0)/sd, standardised by the SD of the per-split differences")
        }
        Figures::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 } if design.family == Family::TwoMeansPooled => (
            "Cohen's d",
            "d",
            (mean1 - mean2 - theta0) / pooled_sd(n1, sd1, n2, sd2),
            "(mean1 − mean2 − θ0)/s_pooled, standardised by the pooled SD (n1 + n2 − 2 degrees of freedom)",
        ),
        Figures::TwoGroups { mean1, sd1, mean2, sd2, .. } => (
            "Cohen's d (average-variance SD)",
            "d",
            (mean1 - mean2 - theta0) / root_mean_square(sd1, sd2),
            "(mean1 − mean2 − θ0)/√((sd1² + sd2²)/2), standardised by the root mean square of the two SDs",
        ),
        Figures::Proportion { x, n } => {
            ("Cohen's h", "h", arcsine(x as f64 / n as f64) - arcsine(theta0), "2·asin√p̂ − 2·asin√p0, the difference of arcsine-transformed proportions")
        }
        Figures::TwoProportions { x1, n1, x2, n2 } => {
            ("Cohen's h", "h", arcsine(x1 / n1) - arcsine(x2 / n2), "2·asin√p̂1 − 2·asin√p̂2, the difference of arcsine-transformed proportions")
        }
        Figures::Discordant { b, c, .. } if b + c == 0.0 => {
            return Err(IntervalError::Undefined("Cohen's g needs at least one item where exactly one classifier is right"));
        }
        Figures::Discordant { b, c, .. } => {
            ("Cohen's g", "g", b / (b + c) - 0.5, "b/(b + c) − ½, the share of discordant items classifier 1 gets right, minus one half")
        }
    };
    if value.is_nan() {
        return Err(IntervalError::Undefined("the standardised effect size is undefined for these figures"));
    }
    if !value.is_finite() {
        return Err(IntervalError::NotFinite { what: "standardised effect size", value });
    }
    Ok(EffectSize { name, symbol, value, note })
}

/// The summary figures a family uses, validated by the decision's rules.
enum Figures {
    KnownSigma { n: f64, mean: f64, sigma: f64 },
    OneGroup { n: f64, mean: f64, sd: f64 },
    /// Per-split differences of two learners, with the variance floor ρ.
    Splits { n: f64, mean: f64, sd: f64, rho: f64 },
    TwoGroups { n1: f64, mean1: f64, sd1: f64, n2: f64, mean2: f64, sd2: f64 },
    Proportion { x: u64, n: u64 },
    TwoProportions { x1: f64, n1: f64, x2: f64, n2: f64 },
    /// Two classifiers: b, c (only 1 right, only 2 right) of n items.
    Discordant { b: f64, c: f64, n: f64 },
}

fn read(design: &Design, data: &Summary) -> Result<Figures, IntervalError> {
    let family = design.family;
    Ok(match (family, *data, design.effect) {
        (Family::MeanZ, Summary::OneGroup { n, mean, .. }, Effect::Mean { sigma, .. }) => {
            Figures::KnownSigma { n: count("data.n", n, 1.0)? as f64, mean: finite("data.mean", mean)?, sigma }
        }
        (Family::MeanT | Family::PairedT, Summary::OneGroup { n, mean, sd: s }, _) => {
            let s = s.ok_or(DecisionError::Missing { field: "data.sd", hint: "the t interval needs the sample standard deviation" })?;
            Figures::OneGroup { n: count("data.n", n, 2.0)? as f64, mean: finite("data.mean", mean)?, sd: sd("data.sd", s)? }
        }
        (Family::TwoLearnersCv, Summary::OneGroup { n, mean, sd: s }, Effect::CrossVal { rho, .. }) => {
            let s = s.ok_or(DecisionError::Missing { field: "data.sd", hint: "the corrected t interval needs the SD of the per-split differences" })?;
            Figures::Splits { n: count("data.n", n, 2.0)? as f64, mean: finite("data.mean", mean)?, sd: sd("data.sd", s)?, rho }
        }
        (Family::TwoMeansPooled | Family::TwoMeansWelch, Summary::TwoGroups { n1, mean1, sd1, n2, mean2, sd2 }, _) => Figures::TwoGroups {
            n1: count("data.n1", n1, 2.0)? as f64,
            mean1: finite("data.mean1", mean1)?,
            sd1: sd("data.sd1", sd1)?,
            n2: count("data.n2", n2, 2.0)? as f64,
            mean2: finite("data.mean2", mean2)?,
            sd2: sd("data.sd2", sd2)?,
        },
        (Family::ProportionExact | Family::ProportionNormal, Summary::Proportion { successes: x, trials }, _) => {
            let n = count("data.trials", trials, 1.0)?;
            Figures::Proportion { x: successes("data.successes", x, n)?, n }
        }
        (Family::TwoProportions, Summary::TwoProportions { successes1, trials1, successes2, trials2 }, _) => {
            let (n1, n2) = (count("data.trials1", trials1, 1.0)?, count("data.trials2", trials2, 1.0)?);
            let x1 = successes("data.successes1", successes1, n1)?;
            let x2 = successes("data.successes2", successes2, n2)?;
            Figures::TwoProportions { x1: x1 as f64, n1: n1 as f64, x2: x2 as f64, n2: n2 as f64 }
        }
        (Family::TwoClassifiers, Summary::Classifiers { both_right, only_first_right, only_second_right, both_wrong }, _) => {
            let cells = super::decision::classifier_cells(both_right, only_first_right, only_second_right, both_wrong)?;
            Figures::Discordant { b: cells[1] as f64, c: cells[2] as f64, n: cells.iter().sum::<u64>() as f64 }
        }
        _ => return Err(super::decision::wrong_kind(family, data).into()),
    })
}

fn standard_normal() -> Result<Normal, IntervalError> {
    Ok(Normal::new(0.0, 1.0)?)
}

/// √(a² + b²)/√2 scaled by the larger, so that huge or subnormal SDs
/// neither overflow nor underflow when squared.
fn root_mean_square(a: f64, b: f64) -> f64 {
    let m = a.max(b);
    m * (0.5 * ((a / m).powi(2) + (b / m).powi(2))).sqrt()
}

/// s_p = √(((n1 − 1)s1² + (n2 − 1)s2²)/(n1 + n2 − 2)), scaled as above.
fn pooled_sd(n1: f64, s1: f64, n2: f64, s2: f64) -> f64 {
    let m = s1.max(s2);
    m * (((n1 - 1.0) * (s1 / m).powi(2) + (n2 - 1.0) * (s2 / m).powi(2)) / (n1 + n2 - 2.0)).sqrt()
}

/// Welch's standard error √(s1²/n1 + s2²/n2) and the Welch–Satterthwaite
/// ν = (v1 + v2)²/(v1²/(n1 − 1) + v2²/(n2 − 1)), vᵢ = sᵢ²/nᵢ, computed
/// from the shares vᵢ/(v1 + v2) so that no square overflows; ν lies in
/// [min(n1, n2) − 1, n1 + n2 − 2].
fn welch(n1: f64, s1: f64, n2: f64, s2: f64) -> (f64, f64) {
    let (u1, u2) = (s1 / n1.sqrt(), s2 / n2.sqrt());
    let m = u1.max(u2);
    let (r1, r2) = ((u1 / m).powi(2), (u2 / m).powi(2));
    let (w1, w2) = (r1 / (r1 + r2), r2 / (r1 + r2));
    (m * (r1 + r2).sqrt(), 1.0 / (w1 * w1 / (n1 - 1.0) + w2 * w2 / (n2 - 1.0)))
}

/// The Clopper–Pearson bounds for x successes of n with tail q per side,
/// q in (0, ½]. The lower bound solves P(X ≥ x | p) = q, rising in p;
/// the upper P(X ≤ x | p) = q, falling in p. Brackets: the median of
/// Bin(n, x/n) is x, so P(X ≥ x) and P(X ≤ x) are ≥ ½ ≥ q at p = x/n;
/// and P(X ≥ x | p) ≤ P(X ≥ 1 | p) ≤ n·p, so the lower bound is ≥ q/n
/// (and, by symmetry, 1 − the upper bound is ≥ q/n); the brackets start
/// at q/(2n), where the tail is clearly below q (at q/n it can equal q to
/// the last digits, and rounding would lose the sign change). At the ends the
/// bounds have closed forms: x = 0 gives (0, 1 − q^(1/n)), x = n gives
/// (q^(1/n), 1).
///
/// The search runs on the logit s = ln(p/(1 − p)), from which p and 1 − p
/// both come with full relative accuracy; the tails are taken from
/// Bin(n, p) when p ≤ ½ and from the mirrored Bin(n, 1 − p) otherwise, so
/// the binomial is never handed a p whose complement has lost digits.
/// The brackets are under 90 wide in s; the tolerance (1e-17 absolute,
/// 4 ulp relative) is met by bisection alone in about 63 halvings, inside
/// the budget of 200.
fn clopper_pearson(x: u64, n: u64, q: f64) -> Result<(f64, f64), IntervalError> {
    const TOLERANCE: Tolerance = Tolerance { abs: 1e-17, rel: 4.0 * f64::EPSILON, max_iterations: 200 };
    let nf = n as f64;
    let root_q = q.ln() / nf;
    // logit(q/(2n)): the outer end of both brackets (mirrored for the upper).
    let outer = (0.5 * q / nf).ln() - (-0.5 * q / nf).ln_1p();
    // logit(x/n), the inner end of both.
    let inner = (x as f64).ln() - ((n - x) as f64).ln();
    let low = if x == 0 {
        0.0
    } else if x == n {
        root_q.exp()
    } else {
        let f = |s: f64| tail(n, x, s, true) - q;
        from_logit(brent(f, outer, inner, TOLERANCE)?.x)
    };
    let high = if x == n {
        1.0
    } else if x == 0 {
        -root_q.exp_m1()
    } else {
        let f = |s: f64| tail(n, x, s, false) - q;
        from_logit(brent(f, inner, -outer, TOLERANCE)?.x)
    };
    Ok((low, high))
}

/// p from its logit s: 1/(1 + e^(−s)).
fn from_logit(s: f64) -> f64 {
    1.0 / (1.0 + (-s).exp())
}

/// P(X ≥ x) (`at_least`) or P(X ≤ x) under Bin(n, p), p the logistic of
/// s, for 1 ≤ x ≤ n − 1; NaN if the binomial refuses its parameters (not
/// expected: p lies in [0, 1]), which the root search reports.
fn tail(n: u64, x: u64, s: f64, at_least: bool) -> f64 {
    if s <= 0.0 {
        match Binomial::new(n, from_logit(s)) {
            Ok(b) if at_least => b.sf(x - 1),
            Ok(b) => b.cdf(x),
            Err(_) => f64::NAN,
        }
    } else {
        // Y = n − X ~ Bin(n, 1 − p): X ≥ x is Y ≤ n − x, X ≤ x is Y ≥ n − x.
        match Binomial::new(n, from_logit(-s)) {
            Ok(b) if at_least => b.cdf(n - x),
            Ok(b) => b.sf(n - x - 1),
            Err(_) => f64::NAN,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::design::DesignSpec;

    fn design(family: Family, alternative: Alternative) -> Design {
        let spec = DesignSpec::new(family, alternative).with("alpha_max", 0.05).with("beta_max", 0.2);
        let spec = match family {
            Family::TwoMeansWelch => spec.with("theta0", 0.0).with("theta1", 1.0).with("sigma1", 1.0).with("sigma2", 2.0),
            Family::ProportionExact | Family::ProportionNormal => spec.with("theta0", 0.3).with("theta1", 0.5),
            Family::TwoProportions => spec.with("p1", 0.5).with("p2", 0.3),
            _ => spec.with("theta0", 0.0).with("theta1", 1.0).with("sigma", 2.0),
        };
        Design::new(&spec).unwrap()
    }

    #[test]
    fn default_level_follows_the_alpha_limit() {
        assert!((default_level(Alternative::Greater, 0.05).unwrap() - 0.9).abs() < 1e-15);
        assert!((default_level(Alternative::Less, 0.025).unwrap() - 0.95).abs() < 1e-15);
        assert!((default_level(Alternative::TwoSided, 0.05).unwrap() - 0.95).abs() < 1e-15);
        // One-sided α ≥ ½ leaves no interval; two-sided keeps one to α < 1.
        for a in [0.5, 0.7] {
            let e = default_level(Alternative::Greater, a).unwrap_err().to_string();
            assert!(e.contains(&format!("alpha_max is {a}")) && e.contains("interval_level"), "{e}");
        }
        assert!((default_level(Alternative::TwoSided, 0.7).unwrap() - 0.3).abs() < 1e-15);
        for a in [0.0, -0.1, 1.0, f64::NAN, f64::INFINITY] {
            assert!(default_level(Alternative::TwoSided, a).is_err(), "{a}");
            assert!(default_level(Alternative::Less, a).is_err(), "{a}");
        }
    }

    #[test]
    fn bad_levels_name_the_field() {
        let d = design(Family::MeanT, Alternative::Greater);
        let data = Summary::OneGroup { n: 10.0, mean: 1.0, sd: Some(1.0) };
        for level in [0.0, 1.0, 1.5, -0.2, f64::NAN, f64::INFINITY] {
            let e = confidence_interval(&d, &data, level).unwrap_err().to_string();
            assert_eq!(e, format!("interval_level is {level}, but must be between 0 and 1 (exclusive)"));
        }
    }

    #[test]
    fn bad_data_name_the_field() {
        let d = design(Family::MeanT, Alternative::Greater);
        let e = confidence_interval(&d, &Summary::OneGroup { n: 1.0, mean: 1.0, sd: Some(1.0) }, 0.9).unwrap_err().to_string();
        assert!(e.starts_with("data.n is 1, but must be a whole number from 2"), "{e}");
        let e = effect_size(&d, &Summary::OneGroup { n: 5.0, mean: 1.0, sd: Some(0.0) }).unwrap_err().to_string();
        assert!(e.starts_with("data.sd is 0, but must be a finite number > 0"), "{e}");
        let e = effect_size(&d, &Summary::Proportion { successes: 1.0, trials: 2.0 }).unwrap_err().to_string();
        assert!(e.contains("mean_t"), "{e}");
        let p = design(Family::ProportionExact, Alternative::Greater);
        let e = confidence_interval(&p, &Summary::Proportion { successes: 3.0, trials: 2.0 }, 0.9).unwrap_err().to_string();
        assert!(e.starts_with("data.successes is 3"), "{e}");
    }

    /// Figures at the ends of f64 give finite answers or a `NotFinite`
    /// error, never a panic or NaN.
    #[test]
    fn extreme_figures_never_give_nan() {
        let d = design(Family::TwoMeansWelch, Alternative::TwoSided);
        for (m1, s1, m2, s2) in [(1e308, 1e308, -1e308, 1e-308), (5e-324, 5e-324, 0.0, 1e300), (0.0, 1e-320, 0.0, 1e-320)] {
            let data = Summary::TwoGroups { n1: 2.0, mean1: m1, sd1: s1, n2: 1e7, mean2: m2, sd2: s2 };
            match confidence_interval(&d, &data, 1e-300) {
                Ok(i) => assert!(i.low.is_finite() && i.high.is_finite() && i.low <= i.high, "{i:?}"),
                Err(e) => assert!(matches!(e, IntervalError::NotFinite { .. }), "{e}"),
            }
            match effect_size(&d, &data) {
                Ok(e) => assert!(e.value.is_finite()),
                Err(e) => assert!(matches!(e, IntervalError::NotFinite { .. } | IntervalError::Undefined(_)), "{e}"),
            }
        }
    }

    /// Clopper–Pearson at the ends: x = 0 and x = n have closed forms, and
    /// the search's bounds meet them from one step inside (common practice,
    /// no source: (1 − p)^n = q and p^n = q).
    #[test]
    fn clopper_pearson_ends() {
        for n in [1u64, 2, 17, 1000, 10_000_000] {
            for q in [0.5, 0.025, 1e-10, 5.5e-17] {
                let (lo, hi) = clopper_pearson(0, n, q).unwrap();
                assert_eq!(lo, 0.0);
                assert!((hi - (1.0 - q.powf(1.0 / n as f64))).abs() <= 1e-9 * hi, "n={n} q={q} hi={hi}");
                let (lo, hi) = clopper_pearson(n, n, q).unwrap();
                assert_eq!(hi, 1.0);
                assert!((lo - q.powf(1.0 / n as f64)).abs() <= 1e-15, "n={n} q={q}");
                if n >= 2 {
                    let (lo, hi) = clopper_pearson(1, n, q).unwrap();
                    // 1 − q/n may round to 1.
                    assert!(lo > 0.0 && lo < 1.0 / n as f64 && hi > 1.0 / n as f64 && hi <= 1.0, "n={n} q={q}: {lo} {hi}");
                }
            }
        }
    }

    /// The symmetric intervals are centred on the decision's own estimate.
    #[test]
    fn centred_on_the_decisions_estimate() {
        use crate::engine::decision::decide;
        let cases = [
            (Family::MeanZ, Summary::OneGroup { n: 12.0, mean: 1.3, sd: None }),
            (Family::MeanT, Summary::OneGroup { n: 12.0, mean: 1.3, sd: Some(1.9) }),
            (Family::PairedT, Summary::OneGroup { n: 12.0, mean: -0.4, sd: Some(1.9) }),
            (Family::TwoMeansPooled, Summary::TwoGroups { n1: 9.0, mean1: 3.0, sd1: 1.0, n2: 14.0, mean2: 2.2, sd2: 1.5 }),
            (Family::TwoMeansWelch, Summary::TwoGroups { n1: 9.0, mean1: 3.0, sd1: 1.0, n2: 14.0, mean2: 2.2, sd2: 1.5 }),
            (Family::ProportionNormal, Summary::Proportion { successes: 7.0, trials: 20.0 }),
            (Family::TwoProportions, Summary::TwoProportions { successes1: 7.0, trials1: 20.0, successes2: 12.0, trials2: 25.0 }),
        ];
        for (family, data) in cases {
            let d = design(family, Alternative::TwoSided);
            let estimate = decide(&d, &data).unwrap().estimate;
            let i = confidence_interval(&d, &data, 0.9).unwrap();
            assert!(((i.low + i.high) / 2.0 - estimate).abs() <= 1e-14 * (1.0 + estimate.abs()), "{family:?}");
        }
    }
}
