#!/usr/bin/env python3
"""Time the work of `benches/engine.rs` done the natural way with SciPy and
statsmodels, and print microseconds per item.

Items (same names, designs and points as benches/engine.rs; keep the two
lists identical):

- nct_cdf/<point>: one scipy.stats.nct.cdf call at (df, ncp, x).
- solve/<family>, solve_two_sided/mean_t: one threshold solve at a fixed n.
  Continuous families: brentq on the weighted density difference
  w*f0(c) - (1-w)*f1(c) between the two modes (two-sided:
  w*(f0(c)+f0(-c)) - (1-w)*(f1(c)+f1(-c)) for the half-width c >= 0), with
  scipy.stats pdfs, then alpha and beta from sf/cdf at the root, and the
  weighted error compared with the two ends (never / always reject). The
  exact binomial: exhaustive search over every k in 0..n+1 with
  scipy.stats.binom (vectorised), ties to the smallest alpha.
- search/mean_t_d0.3: the smallest n with alpha* <= 0.05 and beta* <= 0.2
  for the one-sample t, d = 0.3, greater: doubling from n = 2, then
  bisection on integers, the brentq solve above at every n tried.
- search/mean_t_d0.3/statsmodels_conventional: statsmodels
  TTestPower().solve_power for the conventional n (level 0.05, power 0.8),
  a second reference; it answers a different (easier) question.
- simulate/two_means_pooled_n100_100k: the simulation check of the pooled
  two-sample t (d = 0.5, greater, n = 100 per group, normal population),
  100,000 data sets under each hypothesis, vectorised with NumPy's
  default_rng in chunks of 10,000 data sets (10,000 x 100 draws per group,
  so memory stays bounded): the pooled t statistic of each data set, the
  threshold comparison with the Youden critical value (solved once per
  call, as above) and the conventional rule's p-value from
  scipy.stats.t.sf compared with alpha_max. Its answers are Monte Carlo
  shares, drawn from another generator than Tern's: they agree with
  Tern's within their sampling error, not digit for digit.

Timing: timeit; for each item the loop count is chosen by autorange
(>= --min-time seconds per repeat) and --repeat repeats are taken; the
reported figure is the median repeat divided by the loop count (the minimum
is reported too). The simulation item, over half a second per call, takes
at most LONG_REPEAT repeats of one call.

Usage: python3 benches/compare_scipy.py [--json OUT.json] [--repeat R]
                                        [--min-time S]
"""

import argparse
import json
import math
import platform
import statistics
import sys
import timeit

import numpy as np
import scipy
import statsmodels
from scipy.optimize import brentq
from scipy.stats import binom, norm, nct, t
from statsmodels.stats.power import TTestPower

ALPHA_MAX = 0.05
BETA_MAX = 0.2
W = 0.5  # cost weight: Youden's case
TIE = 1e-12  # relative tie tolerance for the discrete search (DEVELOPERS.md)

# (id, df, ncp, x), as NCT_POINTS in engine.rs.
NCT_POINTS = [
    ("df29_ncp1.64_x1.7", 29.0, 1.64, 1.7),
    ("df200_ncp3_x-1", 200.0, 3.0, -1.0),
    ("df1e4_ncp5_x4", 1e4, 5.0, 4.0),
]


# ---------------------------------------------------------------- models
# Each returns the pair of sampling distributions of T at n as plain
# parameters (DEVELOPERS.md, "Families").

def mean_z(d, n):
    return ("norm", {"ncp": d * math.sqrt(n)})


def mean_t(d, n):
    return ("t", {"df": n - 1.0, "ncp": d * math.sqrt(n)})


def two_means_pooled(d, n1, ratio=1.0):
    n2 = math.ceil(ratio * n1 * (1 - 1e-12))
    f = math.sqrt(1.0 / n1 + 1.0 / n2)
    return ("t", {"df": n1 + n2 - 2.0, "ncp": d / f})


def two_means_welch(theta0, theta1, s1, s2, n1, ratio=1.0):
    n2 = math.ceil(ratio * n1 * (1 - 1e-12))
    v1, v2 = s1 * s1 / n1, s2 * s2 / n2
    df = (v1 + v2) ** 2 / (v1 * v1 / (n1 - 1) + v2 * v2 / (n2 - 1))
    return ("t", {"df": df, "ncp": (theta1 - theta0) / math.sqrt(v1 + v2)})


def proportion_normal(p0, p1, n):
    se0 = math.sqrt(p0 * (1 - p0) / n)
    se1 = math.sqrt(p1 * (1 - p1) / n)
    return ("norm2", {"mean": (p1 - p0) / se0, "sd": se1 / se0})


def two_proportions(p1, p2, n1, ratio=1.0):
    n2 = math.ceil(ratio * n1 * (1 - 1e-12))
    pbar = (p1 + ratio * p2) / (1 + ratio)
    se0 = math.sqrt(pbar * (1 - pbar) * (1.0 / n1 + 1.0 / n2))
    se1 = math.sqrt(p1 * (1 - p1) / n1 + p2 * (1 - p2) / n2)
    return ("norm2", {"mean": (p1 - p2) / se0, "sd": se1 / se0})


def proportion_exact(p0, p1, n):
    return ("binom", {"n": n, "p0": p0, "p1": p1})


# ---------------------------------------------------------------- solves

def pdfs(kind, p):
    """(f0, f1, sf0, cdf1, centre of H1) with scipy.stats functions."""
    if kind == "norm":
        m = p["ncp"]
        return (lambda c: norm.pdf(c), lambda c: norm.pdf(c, m),
                lambda c: norm.sf(c), lambda c: norm.cdf(c, m), m)
    if kind == "norm2":
        m, s = p["mean"], p["sd"]
        return (lambda c: norm.pdf(c), lambda c: norm.pdf(c, m, s),
                lambda c: norm.sf(c), lambda c: norm.cdf(c, m, s), m)
    df, m = p["df"], p["ncp"]
    return (lambda c: t.pdf(c, df), lambda c: nct.pdf(c, df, m),
            lambda c: t.sf(c, df), lambda c: nct.cdf(c, df, m), m)


def best_of_ends(c, alpha, beta):
    """Compare the crossing with never (alpha 0, beta 1) and always reject."""
    cands = [(W * alpha + (1 - W) * beta, alpha, c, beta),
             (1 - W, 0.0, math.inf, 1.0),
             (W, 1.0, -math.inf, 0.0)]
    e, a, c, b = min(cands, key=lambda r: (r[0], r[1]))
    return c, a, b


def solve_greater(kind, p):
    """One-sided (greater) threshold: c*, alpha*, beta*."""
    if kind == "binom":
        n, p0, p1 = p["n"], p["p0"], p["p1"]
        ks = np.arange(0, n + 2)
        alpha = binom.sf(ks - 1, n, p0)   # P0(X >= k)
        beta = binom.cdf(ks - 1, n, p1)   # P1(X <= k - 1)
        e = W * alpha + (1 - W) * beta
        emin = e.min()
        tied = np.nonzero(e <= emin * (1 + TIE))[0]
        i = tied[np.argmin(alpha[tied])]
        return float(ks[i]), float(alpha[i]), float(beta[i])
    f0, f1, sf0, cdf1, m = pdfs(kind, p)
    c = brentq(lambda c: W * f0(c) - (1 - W) * f1(c), 0.0, m, xtol=1e-12, rtol=4 * np.finfo(float).eps)
    return best_of_ends(c, float(sf0(c)), float(cdf1(c)))


def solve_two_sided(kind, p):
    """Two-sided threshold |T| > c: half-width c*, alpha*, beta*."""
    assert kind == "t"
    df, m = p["df"], p["ncp"]

    def g(c):
        return W * (t.pdf(c, df) + t.pdf(-c, df)) - (1 - W) * (nct.pdf(c, df, m) + nct.pdf(-c, df, m))

    c = brentq(g, 0.0, abs(m), xtol=1e-12, rtol=4 * np.finfo(float).eps)
    alpha = 2.0 * t.sf(c, df)
    beta = nct.cdf(c, df, m) - nct.cdf(-c, df, m)
    e = W * alpha + (1 - W) * beta
    # Ends: c = 0 (always reject) and c = inf (never reject).
    if W <= e:
        return 0.0, 1.0, 0.0
    if 1 - W < e:
        return math.inf, 0.0, 1.0
    return c, float(alpha), float(beta)


# (item, model function, arguments incl. n, solver), as solve_cases() in
# engine.rs.
SOLVES = [
    ("solve/mean_z", mean_z, (0.3, 121), solve_greater),
    ("solve/mean_t", mean_t, (0.3, 120), solve_greater),
    ("solve/paired_t", mean_t, (0.5, 50), solve_greater),
    ("solve/two_means_pooled", two_means_pooled, (0.5, 100), solve_greater),
    ("solve/two_means_welch", two_means_welch, (0.0, 0.5, 1.0, 1.5, 100), solve_greater),
    ("solve/proportion_exact", proportion_exact, (0.5, 0.6, 200), solve_greater),
    ("solve/proportion_normal", proportion_normal, (0.5, 0.6, 200), solve_greater),
    ("solve/two_proportions", two_proportions, (0.6, 0.5, 400), solve_greater),
    ("solve_two_sided/mean_t", mean_t, (0.3, 120), solve_two_sided),
]


def one_solve(model, args, solver):
    kind, p = model(*args)
    return solver(kind, p)


# ---------------------------------------------------------------- search

def search_mean_t(d=0.3, lo=2, n_max=10_000_000):
    """Smallest n with alpha* <= ALPHA_MAX and beta* <= BETA_MAX: doubling
    from lo, then bisection on integers (as the engine's search)."""
    def ok(n):
        _, a, b = solve_greater(*mean_t(d, n))
        return a <= ALPHA_MAX and b <= BETA_MAX

    if ok(lo):
        return lo
    fail, step, passed = lo, lo, None
    while passed is None:
        n = min(fail + step, n_max)
        if ok(n):
            passed = n
        elif n == n_max:
            return None
        else:
            fail, step = n, step * 2
    while passed - fail > 1:
        mid = fail + (passed - fail) // 2
        if ok(mid):
            passed = mid
        else:
            fail = mid
    return passed


def statsmodels_conventional(d=0.3):
    return TTestPower().solve_power(effect_size=d, nobs=None, alpha=ALPHA_MAX,
                                    power=1 - BETA_MAX, alternative="larger")


# ---------------------------------------------------------------- simulation

# The request of benches/shared/cases.rs (`SIMULATION`): two_means_pooled,
# greater, d = 0.5 (theta0 = 0, theta1 = d, sigma = 1), n = 100 per group,
# normal population, 100,000 data sets under each hypothesis.
SIMULATION = {"item": "simulate/two_means_pooled_n100_100k", "d": 0.5, "n": 100,
              "replicates": 100_000, "chunk": 10_000, "seed": 1}
LONG_REPEAT = 3  # repeats at most for the simulation item (over half a second per call)


def simulate_pooled(d, n, replicates, chunk, seed):
    """Draw `replicates` data sets under H0 (group 1 mean 0) and under
    theta1 (group 1 mean d), group 2 mean 0, SD 1, n per group; count the
    threshold rule's and the conventional rule's rejections."""
    c, _, _ = solve_greater(*two_means_pooled(d, n))  # the Youden c*, once
    df = 2 * n - 2
    rng = np.random.default_rng(seed)
    counts = {}
    for hypothesis, mean1 in (("h0", 0.0), ("h1", d)):
        reject = conventional = 0
        for start in range(0, replicates, chunk):
            m = min(chunk, replicates - start)
            x1 = rng.standard_normal((m, n))
            x2 = rng.standard_normal((m, n))
            x1 += mean1
            sp2 = (x1.var(axis=1, ddof=1) + x2.var(axis=1, ddof=1)) / 2.0  # equal n
            stat = (x1.mean(axis=1) - x2.mean(axis=1)) / np.sqrt(sp2 * (2.0 / n))
            reject += int(np.count_nonzero(stat > c))
            conventional += int(np.count_nonzero(t.sf(stat, df) <= ALPHA_MAX))
        counts[hypothesis] = (reject, conventional)
    return c, counts


# ---------------------------------------------------------------- timing

def time_call(fn, repeat, min_time):
    timer = timeit.Timer(fn)
    number, taken = timer.autorange()  # >= 0.2 s per repeat
    if taken < min_time:
        number = max(1, math.ceil(number * min_time / taken))
    runs = timer.repeat(repeat=repeat, number=number)
    per = [r / number for r in runs]
    return statistics.median(per) * 1e6, min(per) * 1e6, number


def versions():
    return {
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "statsmodels": statsmodels.__version__,
    }


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--json", help="also write the results to this JSON file")
    ap.add_argument("--repeat", type=int, default=7, help="timeit repeats per item (default 7)")
    ap.add_argument("--min-time", type=float, default=0.2, help="seconds per repeat (default 0.2)")
    args = ap.parse_args()

    results = []

    def record(item, fn, check, repeat=args.repeat):
        med, best, number = time_call(fn, repeat, args.min_time)
        results.append({"item": item, "us": med, "us_min": best, "loops": number, "repeats": repeat, "check": check})
        print(f"{item:<48} {med:12.3f} µs  (min {best:.3f}, {number} loops x {repeat})  {check}", flush=True)

    v = versions()
    print("compare_scipy: " + ", ".join(f"{k} {val}" for k, val in v.items()), flush=True)
    print(f"{'item':<48} {'median':>12}", flush=True)

    for pid, df, ncp, x in NCT_POINTS:
        val = float(nct.cdf(x, df, ncp))
        record(f"nct_cdf/{pid}", lambda x=x, df=df, ncp=ncp: nct.cdf(x, df, ncp), f"cdf={val:.12e}")

    for item, model, margs, solver in SOLVES:
        c, a, b = one_solve(model, margs, solver)
        check = f"n={margs[-1]}\tc={c:.9f}\talpha={a:.9f}\tbeta={b:.9f}"
        record(item, lambda model=model, margs=margs, solver=solver: one_solve(model, margs, solver), check)

    n = search_mean_t()
    record("search/mean_t_d0.3", search_mean_t, f"n={n}")
    n_conv = statsmodels_conventional()
    record("search/mean_t_d0.3/statsmodels_conventional", statsmodels_conventional,
           f"n={math.ceil(n_conv)} (solve_power {n_conv:.4f})")

    sim = {k: v for k, v in SIMULATION.items() if k != "item"}
    c, counts = simulate_pooled(**sim)
    r = sim["replicates"]
    (rej0, conv0), (rej1, conv1) = counts["h0"], counts["h1"]
    check = (f"n={sim['n']}\treplicates={r}\tc={c:.9f}\talpha_share={rej0 / r:.6f}\tbeta_share={1 - rej1 / r:.6f}"
             f"\tconventional_alpha_share={conv0 / r:.6f}\tconventional_beta_share={1 - conv1 / r:.6f}")
    record(SIMULATION["item"], lambda: simulate_pooled(**sim), check, repeat=min(args.repeat, LONG_REPEAT))

    if args.json:
        with open(args.json, "w", encoding="utf-8") as fh:
            json.dump({"versions": v, "results": results}, fh, indent=1)
    return 0


if __name__ == "__main__":
    sys.exit(main())
