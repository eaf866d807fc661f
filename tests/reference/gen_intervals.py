#!/usr/bin/env python3
"""Independent reference values for the decision's confidence interval and
standardised effect size.

Built only from the formulas in ../shared/method.md (section 7b) and the
"Statistical conventions" section of DEVELOPERS.md ("Confidence interval and
effect size"), with SciPy, statsmodels, NumPy and mpmath; the engine's code was not
read.  Writes tests/reference/intervals.json (deterministic: fixed seed,
cases sorted by name).

    python3 tests/reference/gen_intervals.py

Every interval is computed twice and the two must agree to 1e-12 relative
(to the larger of the bound and the half-width), or the script stops:
- mean families: SciPy's t / normal quantile on the recorded summary figures
  (the expected value), and statsmodels on the raw data the figures were
  computed from (DescrStatsW.tconfint_mean, CompareMeans.tconfint_diff with
  usevar "pooled" / "unequal", _zconfint_generic for the known-sigma z);
- proportion_exact: the roots of the binomial tail equations in mpmath at
  40 digits, P(X >= x | low) = q and P(X <= x | high) = q (q = (1 - level)/2;
  the binomial-beta relation makes them the incomplete-beta quantiles
  I_low(x, n - x + 1) = q, I_high(x + 1, n - x) = 1 - q), the expected values, and statsmodels
  proportion_confint(method="beta") (SciPy's beta quantiles, seen off by up
  to ~1e-12 relative), which must agree to 1e-10;
- proportion_normal: statsmodels proportion_confint(method="normal"), which
  clips to [0, 1], and the formula p +- z sqrt(p(1-p)/n) clipped likewise;
- two_proportions: statsmodels confint_proportions_2indep(method="wald",
  compare="diff") and the formula, both clipped to [-1, 1] (Tern's
  convention; statsmodels does not clip).
Effect sizes come from the formulas with NumPy (d) and statsmodels'
proportion_effectsize (Cohen's h).

The level is the case's `interval_level` when given, else the default that
follows the design's alpha_max: 1 - 2 alpha_max one-sided, 1 - alpha_max
two-sided (recorded as `level` either way).
"""
import json
import math
import platform
from pathlib import Path

import mpmath as mp
import numpy as np
import scipy
import statsmodels
from scipy import stats
from statsmodels.stats.proportion import (confint_proportions_2indep, proportion_confint,
                                          proportion_effectsize)
from statsmodels.stats.weightstats import CompareMeans, DescrStatsW, _zconfint_generic

AGREE = 1e-12
mp.mp.dps = 40
CASES = []


def default_level(alternative, alpha_max):
    return 1 - alpha_max if alternative == "two_sided" else 1 - 2 * alpha_max


def agree(name, a, b, scale, tol=AGREE):
    for x, y in zip(a, b):
        if abs(x - y) > tol * max(abs(x), scale):
            raise SystemExit(f"{name}: the two computations disagree: {a} vs {b}")


def add(name, design, data, expect, source, level=None, decides=True):
    level_used = level if level is not None else default_level(design["alternative"], design["alpha_max"])
    case = {"name": name, "design": dict(design), "data": data, "level": level_used}
    if level is not None:
        case["design"]["interval_level"] = level
    case["expect"] = expect(level_used)
    case["decides"] = decides
    case["source"] = source
    CASES.append(case)


def num(x):
    return float(x)


def effect_direction(alternative, theta0, spread):
    """theta1 on the side the alternative names."""
    return theta0 - spread if alternative == "less" else theta0 + spread


def mp_at_least(x, n, p):
    """P(X >= x) under Bin(n, p) in mpmath, summing the shorter side
    (40 digits leave 30 after the subtraction for any q the cases use)."""
    def mass(k):
        return mp.binomial(n, k) * p ** k * (1 - p) ** (n - k)
    if n - x < x:
        return mp.fsum(mass(k) for k in range(x, n + 1))
    return 1 - mp.fsum(mass(k) for k in range(0, x))


def mp_clopper_pearson(x, n, q, lo, hi):
    """The bounds in mpmath (40 digits), started from statsmodels' values,
    as the roots of the binomial tail equations that are the incomplete-beta
    quantiles' definition: P(X >= x | low) = q (I_low(x, n - x + 1) = q) and
    P(X <= x | high) = q (1 - I_high(x + 1, n - x) = q)."""
    def solve(f, start):
        start = mp.mpf(start)
        delta = mp.mpf(10) ** -9 * min(start, 1 - start)
        while f(start - delta) * f(start + delta) > 0:
            delta *= 10
            if delta > min(start, 1 - start):
                raise SystemExit(f"no bracket for mpmath's Clopper-Pearson root: x={x} n={n} q={q}")
        root = mp.findroot(f, (start - delta, start + delta), solver="anderson", tol=mp.mpf(10) ** -70, verify=False)
        if abs(f(root)) > q * mp.mpf(10) ** -25:
            raise SystemExit(f"mpmath's Clopper-Pearson root did not converge: x={x} n={n} q={q}")
        return root

    low = mp.mpf(0) if x == 0 else solve(lambda p: mp_at_least(x, n, p) - q, lo)
    high = mp.mpf(1) if x == n else solve(lambda p: 1 - mp_at_least(x + 1, n, p) - q, hi)
    return float(low), float(high)


def mean_cases(rng):
    alphas = [0.01, 0.05, 0.1, 0.2, 0.3]
    levels = [None, 0.5, 0.8, 0.99, 0.999]
    sizes = [(2, 2), (3, 7), (10, 10), (25, 60), (200, 35), (1000, 4)]
    for fam in ["mean_z", "mean_t", "paired_t", "two_means_pooled", "two_means_welch"]:
        i = 0
        for alt in ["greater", "less", "two_sided"]:
            for (n1, n2) in sizes:
                for level in levels[:3] if alt != "two_sided" else levels[::2]:
                    alpha = alphas[i % len(alphas)]
                    i += 1
                    theta0 = float(np.round(rng.normal(0, 3), 2))
                    scale = float(np.round(rng.uniform(0.2, 20), 3))
                    design = {"family": fam, "alternative": alt, "alpha_max": alpha, "beta_max": 0.2,
                              "theta0": theta0, "theta1": effect_direction(alt, theta0, 0.5 * scale)}
                    if fam == "two_means_welch":
                        design.pop("theta1")
                        design.update({"theta1": effect_direction(alt, theta0, 0.5 * scale),
                                       "sigma1": scale, "sigma2": 2 * scale})
                    else:
                        design["sigma"] = scale
                    name = f"{fam}.{alt}.{i:02d}"
                    if fam in ("two_means_pooled", "two_means_welch"):
                        x1 = rng.normal(theta0 + 0.3 * scale, scale, n1)
                        x2 = rng.normal(0, scale * rng.uniform(0.3, 3), n2)
                        add_two_means(name, design, x1, x2, level)
                    else:
                        x = rng.normal(theta0 + 0.4 * scale * rng.normal(), scale, max(n1, 2))
                        add_one_mean(name, design, x, level)


def add_one_mean(name, design, x, level):
    fam = design["family"]
    n, mean, sd = len(x), num(np.mean(x)), num(np.std(x, ddof=1))
    theta0 = design["theta0"]
    if fam == "mean_z":
        sigma = design["sigma"]
        data = {"n": n, "mean": mean}
    else:
        data = {"n": n, "mean": mean, "sd": sd}

    def expect(level):
        if fam == "mean_z":
            se = sigma / math.sqrt(n)
            lo, hi = stats.norm.interval(level, loc=mean, scale=se)
            agree(name, (lo, hi), _zconfint_generic(mean, se, 1 - level, "two-sided"), hi - lo)
            d = (mean - theta0) / sigma
        else:
            se = sd / math.sqrt(n)
            lo, hi = stats.t.interval(level, n - 1, loc=mean, scale=se)
            agree(name, (lo, hi), DescrStatsW(x).tconfint_mean(1 - level), hi - lo)
            d = (mean - theta0) / sd
        return {"low": num(lo), "high": num(hi), "effect_size": num(d)}

    source = ("SciPy norm.interval with the design's sigma; statsmodels _zconfint_generic" if fam == "mean_z"
              else "SciPy t.interval, n - 1 df; statsmodels DescrStatsW.tconfint_mean on the raw data")
    add(name, design, data, expect, source + "; d = (mean - theta0)/" + ("sigma" if fam == "mean_z" else "sd"), level)


def add_two_means(name, design, x1, x2, level):
    fam = design["family"]
    n1, n2 = len(x1), len(x2)
    m1, m2 = num(np.mean(x1)), num(np.mean(x2))
    s1, s2 = num(np.std(x1, ddof=1)), num(np.std(x2, ddof=1))
    theta0 = design["theta0"]
    data = {"n1": n1, "mean1": m1, "sd1": s1, "n2": n2, "mean2": m2, "sd2": s2}
    cm = CompareMeans(DescrStatsW(x1), DescrStatsW(x2))

    def expect(level):
        diff = m1 - m2
        if fam == "two_means_pooled":
            df = n1 + n2 - 2
            sp = math.sqrt(((n1 - 1) * s1 ** 2 + (n2 - 1) * s2 ** 2) / df)
            se = sp * math.sqrt(1 / n1 + 1 / n2)
            lo, hi = stats.t.interval(level, df, loc=diff, scale=se)
            agree(name, (lo, hi), cm.tconfint_diff(1 - level, usevar="pooled"), hi - lo)
            d = (diff - theta0) / sp
        else:
            v1, v2 = s1 ** 2 / n1, s2 ** 2 / n2
            df = (v1 + v2) ** 2 / (v1 ** 2 / (n1 - 1) + v2 ** 2 / (n2 - 1))
            agree(name, (df,), (cm.dof_satt(),), 0)
            lo, hi = stats.t.interval(level, df, loc=diff, scale=math.sqrt(v1 + v2))
            agree(name, (lo, hi), cm.tconfint_diff(1 - level, usevar="unequal"), hi - lo)
            d = (diff - theta0) / math.sqrt((s1 ** 2 + s2 ** 2) / 2)
        return {"low": num(lo), "high": num(hi), "effect_size": num(d), "df": num(df)}

    source = ("SciPy t.interval, n1 + n2 - 2 df, pooled SD; statsmodels CompareMeans.tconfint_diff(usevar='pooled')"
              "; d = (mean1 - mean2 - theta0)/s_pooled" if fam == "two_means_pooled" else
              "SciPy t.interval, Welch-Satterthwaite df; statsmodels CompareMeans.tconfint_diff(usevar='unequal')"
              "; d = (mean1 - mean2 - theta0)/sqrt((sd1^2 + sd2^2)/2)")
    add(name, design, data, expect, source, level)


def proportion_cases(rng):
    counts = [(0, 1), (1, 1), (0, 10), (10, 10), (1, 10), (9, 10), (3, 17), (50, 100), (1, 1000),
              (999, 1000), (0, 100000), (12, 100000), (99990, 100000), (5000, 1000000)]
    levels = [None, 0.5, 0.9, 0.999, 1 - 1e-9]
    for fam in ["proportion_exact", "proportion_normal"]:
        i = 0
        for (x, n) in counts:
            for alt in ["greater", "less", "two_sided"]:
                for level in (levels[0], levels[1 + i % 4]):
                    alpha = [0.01, 0.05, 0.1, 0.25][i % 4]
                    i += 1
                    p0 = float(np.round(rng.uniform(0.1, 0.9), 3))
                    p1 = p0 + 0.05 if alt != "less" else p0 - 0.05
                    design = {"family": fam, "alternative": alt, "alpha_max": alpha, "beta_max": 0.2,
                              "theta0": p0, "theta1": p1}
                    add_proportion(f"{fam}.{alt}.{i:02d}", design, x, n, level)


def add_proportion(name, design, x, n, level):
    fam = design["family"]
    p0 = design["theta0"]

    def expect(level):
        q = (1 - level) / 2
        if fam == "proportion_exact":
            lo, hi = proportion_confint(x, n, alpha=1 - level, method="beta")
            # mpmath's 40-digit roots are the expected values; SciPy's beta
            # quantiles (behind statsmodels) were seen off by 1e-12 relative.
            exact = mp_clopper_pearson(x, n, q, lo, hi)
            agree(name, exact, (lo, hi), 0, tol=1e-10)
            lo, hi = exact
        else:
            lo, hi = proportion_confint(x, n, alpha=1 - level, method="normal")
            p = x / n
            half = stats.norm.isf(q) * math.sqrt(p * (1 - p) / n)
            agree(name, (lo, hi), (max(p - half, 0.0), min(p + half, 1.0)), hi - lo)
        h = proportion_effectsize(x / n, p0)
        agree(name, (h,), (2 * math.asin(math.sqrt(x / n)) - 2 * math.asin(math.sqrt(p0)),), 1e-300)
        return {"low": num(lo), "high": num(hi), "effect_size": num(h)}

    source = ("Clopper-Pearson: mpmath (40 digits) roots of the binomial tail equations, "
              "checked against statsmodels proportion_confint(method='beta') to 1e-10" if fam == "proportion_exact" else
              "statsmodels proportion_confint(method='normal') (Wald, clipped to [0, 1]) and the formula")
    add(name, design, {"successes": x, "trials": n}, expect, source + "; h = statsmodels proportion_effectsize(p_hat, p0)", level)


def two_proportion_cases(rng):
    data = [(0, 10, 0, 12), (10, 10, 0, 12), (3, 10, 7, 12), (1, 1, 0, 1), (40, 100, 25, 50),
            (5, 1000, 17, 3000), (999, 1000, 1, 1000), (123, 400, 150, 400), (0, 5, 5, 5)]
    levels = [None, 0.6, 0.95, 0.999]
    i = 0
    for (x1, n1, x2, n2) in data:
        for alt in ["greater", "less", "two_sided"]:
            for level in (levels[0], levels[1 + i % 3]):
                alpha = [0.01, 0.05, 0.1, 0.25][i % 4]
                i += 1
                design = {"family": "two_proportions", "alternative": alt, "alpha_max": alpha, "beta_max": 0.2,
                          "p1": 0.5 if alt != "less" else 0.3, "p2": 0.3 if alt != "less" else 0.5}
                name = f"two_proportions.{alt}.{i:02d}"
                pooled = (x1 + x2) / (n1 + n2)
                add_two_proportions(name, design, x1, n1, x2, n2, level, decides=0 < pooled < 1)


def add_two_proportions(name, design, x1, n1, x2, n2, level, decides):
    def expect(level):
        lo, hi = confint_proportions_2indep(x1, n1, x2, n2, method="wald", compare="diff", alpha=1 - level)
        lo, hi = max(float(lo), -1.0), min(float(hi), 1.0)
        p1, p2 = x1 / n1, x2 / n2
        half = stats.norm.isf((1 - level) / 2) * math.sqrt(p1 * (1 - p1) / n1 + p2 * (1 - p2) / n2)
        agree(name, (lo, hi), (max(p1 - p2 - half, -1.0), min(p1 - p2 + half, 1.0)), hi - lo)
        h = proportion_effectsize(p1, p2)
        return {"low": num(lo), "high": num(hi), "effect_size": num(h)}

    add(name, design, {"successes1": x1, "trials1": n1, "successes2": x2, "trials2": n2}, expect,
        "statsmodels confint_proportions_2indep(method='wald', compare='diff'), clipped to [-1, 1]; "
        "h = statsmodels proportion_effectsize(p1_hat, p2_hat)", level, decides)


def main():
    rng = np.random.default_rng(20261210)
    mean_cases(rng)
    proportion_cases(rng)
    two_proportion_cases(rng)
    cases = sorted(CASES, key=lambda c: c["name"])
    names = [c["name"] for c in cases]
    assert len(set(names)) == len(names), "case names must be unique"
    out = {"generator": "tests/reference/gen_intervals.py",
           "versions": {"python": platform.python_version(), "scipy": scipy.__version__,
                        "statsmodels": statsmodels.__version__, "numpy": np.__version__,
                        "mpmath": mp.__version__},
           "cases": cases}
    path = Path(__file__).resolve().parent / "intervals.json"
    path.write_text(json.dumps(out, indent=1, allow_nan=False) + "\n")
    print(f"wrote {path}, {len(cases)} cases")
    for fam in sorted({c["design"]["family"] for c in cases}):
        print(f"  {fam:20s} {sum(c['design']['family'] == fam for c in cases)}")


if __name__ == "__main__":
    main()
