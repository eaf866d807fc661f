#!/usr/bin/env python3
"""Reference values for the binomial, Poisson and scaled chi-square
distributions of `tern::engine::dist`, written to `discrete_chi2.json`.

Truth is computed with mpmath at high precision (mp.dps >= 40, more where a
complement must resolve a tiny tail); SciPy only proposes the arguments
(quantiles of the distributions, so the cases cover every part of the
support, far tails included) and starting points of root searches.

- Binomial and Poisson masses: exact log-gamma forms,
  ln C(n, k) + k ln p + (n - k) ln(1 - p) and k ln(m) - m - ln k!.
- Binomial and Poisson tails: exact sums of the masses, taken outward from k
  with exact term ratios until the remainder (bounded geometrically) is below
  1e-45 of the sum. The tail that does not contain the mean is summed; the
  other is its complement, formed at 40 digits where it is >= 1/2.
- Incomplete gamma: P(a, y) = y^a e^-y / Gamma(a+1) * sum_n y^n/((a+1)...(a+n)),
  summed to 1e-45 relative; Q(a, y) = 1 - P(a, y) with the working precision
  raised by the number of digits Q loses (mpmath's own gammainc stops with
  NoConvergence for a ~ 1e6).
- Quantiles: discrete ones by checking the defining inequalities at k - 1 and
  k with the exact tails; continuous ones by Newton's method on the exact
  tail at 45 digits.

Arguments are IEEE doubles and are taken exactly (mpf(float) is exact), so
the reference is the exact function value at the double the test passes.

Run: python3 tests/reference/gen_discrete_chi2.py  (a few minutes)
"""

import json
import math
import platform
import sys
from pathlib import Path

import mpmath
import scipy
from mpmath import mp, mpf
from scipy import stats

DPS = 45
mp.dps = DPS
TAIL_LEVELS = [1e-300, 1e-250, 1e-150, 1e-80, 1e-30, 1e-12, 1e-4, 0.05, 0.3, 0.5]
# Fewer levels where the exact sums need ~1e5 to 1e6 terms per value.
BIG_LEVELS = [1e-300, 1e-30, 0.3]
SMALLEST = 1e-300


def f(x):
    """mpf -> nearest double (0 below the double range)."""
    return float(x)


# ---------------------------------------------------------------- discrete


def sum_outward(first, ratio, max_terms):
    """first * (1 + r0 + r0 r1 + ...), ratios non-increasing; ratio(i) -> mpf
    or None at the end of the support."""
    term = mpf(1)
    s = mpf(1)
    eps = mpf(10) ** (-DPS)
    for i in range(max_terms):
        r = ratio(i)
        if r is None or r == 0:
            break
        term *= r
        s += term
        if r < 1 and term * r < eps * s * (1 - r):
            break
    else:
        raise RuntimeError("sum did not converge")
    return first * s


def binom_lnpmf(n, p, k):
    p = mpf(p)
    q = 1 - p
    if k < 0 or k > n:
        return -mp.inf
    lc = mp.loggamma(n + 1) - mp.loggamma(k + 1) - mp.loggamma(n - k + 1)
    return lc + (k * mp.log(p) if k else 0) + ((n - k) * mp.log(q) if n - k else 0)


def binom_tails(n, p, k):
    """(P(X <= k), P(X > k)) exactly."""
    pm, qm = mpf(p), 1 - mpf(p)
    if k >= n:
        return mpf(1), mpf(0)
    if k <= n * p:
        first = mp.exp(binom_lnpmf(n, p, k))

        def ratio(i):
            j = k - i
            if j <= 0:
                return None
            return (j * qm) / ((n - j + 1) * pm)

        c = sum_outward(first, ratio, 10**7)
        return c, 1 - c
    k1 = k + 1
    first = mp.exp(binom_lnpmf(n, p, k1))

    def ratio(i):
        j = k1 + i
        if j >= n:
            return None
        return ((n - j) * pm) / ((j + 1) * qm)

    s = sum_outward(first, ratio, 10**7)
    return 1 - s, s


def pois_lnpmf(m, k):
    m = mpf(m)
    return k * mp.log(m) - m - mp.loggamma(k + 1)


def pois_tails(m, k):
    mm = mpf(m)
    if k <= m:
        first = mp.exp(pois_lnpmf(m, k))
        c = sum_outward(first, lambda i: None if k - i <= 0 else (k - i) / mm, 10**8)
        return c, 1 - c
    first = mp.exp(pois_lnpmf(m, k + 1))
    s = sum_outward(first, lambda i: mm / (k + 1 + i + 1), 10**8)
    return 1 - s, s


def discrete_points(dist, top, levels=None):
    """Arguments k across the support: both ends, the centre and the
    quantiles of every tail level."""
    ks = {0, 1, 2}
    mean = dist.mean()
    ks.add(int(mean))
    ks.add(int(mean) + 1)
    for t in levels or TAIL_LEVELS:
        for v in (dist.ppf(t), dist.isf(t)):
            if math.isfinite(v) and v >= 0:
                ks.add(int(v))
                ks.add(int(v) + 3)
    if top is not None:
        ks |= {top - 1, top}
        ks = {k for k in ks if 0 <= k <= top}
    return sorted(ks)


def discrete_quantile_truth(tails, kmax, p, upper, guess):
    """Smallest k with P(X <= k) >= p (or P(X > k) <= p when upper)."""

    def ok(k):
        c, s = tails(k)
        return (s <= p) if upper else (c >= p)

    k = max(0, min(kmax, int(guess)))
    steps = 0
    while k > 0 and ok(k - 1):
        k -= 1
        steps += 1
        if steps > 200:
            return None
    while not ok(k):
        k += 1
        steps += 1
        if steps > 200 or k > kmax:
            return None
    # Skip cases decided by less than 1e-9 relative: the tested code may
    # legitimately round either way there.
    for kk in (k - 1, k):
        if kk < 0:
            continue
        c, s = tails(kk)
        v = s if upper else c
        if v > 0 and abs(v / p - 1) < 1e-9:
            return None
    return k


# ---------------------------------------------------------------- gamma


def gamma_p_series(a, y):
    """P(a, y) at the current precision."""
    if y == 0:
        return mpf(0)
    pre = mp.exp(a * mp.log(y) - y - mp.loggamma(a + 1))
    term = mpf(1)
    s = mpf(1)
    eps = mpf(10) ** (-(mp.dps + 2))
    n = 0
    while True:
        n += 1
        r = y / (a + n)
        term *= r
        s += term
        if r < 1 and term * r < eps * s * (1 - r):
            break
        if n > 10**8:
            raise RuntimeError("series did not converge")
    return pre * s


def gamma_pq(a, y, q_hint):
    """Exact (P, Q); q_hint (a double estimate of Q) sets the precision the
    complement needs."""
    a, y = mpf(a), mpf(y)
    extra = 0
    if q_hint is not None and q_hint > 0:
        extra = max(0, int(-math.log10(q_hint)) + 5)
    elif q_hint == 0:
        extra = 330
    with mp.workdps(DPS + extra):
        p = gamma_p_series(a, y)
        q = 1 - p
    return +p, +q


def chi2_lnpdf(df, scale, x):
    a = mpf(df) / 2
    two_s = 2 * mpf(scale)
    y = mpf(x) / two_s
    return (a - 1) * mp.log(y) - y - mp.loggamma(a) - mp.log(two_s)


def chi2_points(df, scale, levels=None):
    d = stats.chi2(df, scale=scale)
    xs = set()
    for t in levels or TAIL_LEVELS:
        for v in (d.ppf(t), d.isf(t)):
            if math.isfinite(v) and v > 1e-290:
                xs.add(float("%.12g" % v))
    xs.add(float(df * scale))
    return sorted(xs)


def chi2_quantile_truth(df, scale, t, upper):
    """x with P(X <= x) = t (or P(X > x) = t when upper), by Newton's method
    on ln(tail) at 45 digits from SciPy's value."""
    d = stats.chi2(df, scale=scale)
    x0 = d.isf(t) if upper else d.ppf(t)
    if not (math.isfinite(x0) and x0 > 1e-290):
        return None
    a = mpf(df) / 2
    two_s = 2 * mpf(scale)
    y = mpf(x0) / two_s
    for _ in range(30):
        qh = t if upper else float(stats.chi2.sf(float(y * two_s), df, scale=scale))
        p, q = gamma_pq(a, y, qh)
        tail = q if upper else p
        dens = mp.exp((a - 1) * mp.log(y) - y - mp.loggamma(a))
        # d ln(tail)/dy = +-dens/tail.
        step = (mp.log(tail) - mp.log(t)) / (dens / tail)
        y = y + step if upper else y - step
        if abs(step / y) < mpf(10) ** -30:
            return f(y * two_s)
    return None


# ---------------------------------------------------------------- main


def main():
    out = {
        "generator": "tests/reference/gen_discrete_chi2.py",
        "versions": {
            "python": platform.python_version(),
            "mpmath": mpmath.__version__,
            "scipy": scipy.__version__,
            "mp_dps": DPS,
        },
        "notes": "Exact values at the given doubles; values below 1e-300 are "
        "stored as null and not checked (ln_pmf / ln_pdf always are).",
        "binomial_columns": ["n", "p", "k", "pmf", "ln_pmf", "cdf", "sf"],
        "binomial": [],
        "poisson_columns": ["mean", "k", "pmf", "ln_pmf", "cdf", "sf"],
        "poisson": [],
        "chi2_columns": ["df", "scale", "x", "pdf", "ln_pdf", "cdf", "sf"],
        "chi2": [],
        "binomial_quantile_columns": ["n", "p", "prob", "upper", "k"],
        "binomial_quantile": [],
        "poisson_quantile_columns": ["mean", "prob", "upper", "k"],
        "poisson_quantile": [],
        "chi2_quantile_columns": ["df", "scale", "prob", "upper", "x"],
        "chi2_quantile": [],
    }

    def keep(v):
        v = f(v)
        return v if v >= SMALLEST else None

    ns = [1, 2, 7, 20, 100, 1000, 10_000, 100_000, 1_000_000, 10_000_000]
    ps = [1e-4, 0.01, 0.1, 0.3, 0.5, 0.77, 0.99, 0.9999]
    for n in ns:
        for p in ps:
            d = stats.binom(n, p)
            for k in discrete_points(d, n):
                c, s = binom_tails(n, p, k)
                lp = binom_lnpmf(n, p, k)
                out["binomial"].append([n, p, k, keep(mp.exp(lp)), f(lp), keep(c), keep(s)])
        print("binomial n =", n, file=sys.stderr, flush=True)

    means = [1e-3, 0.1, 1.0, 3.7, 10.0, 55.5, 1000.0, 1e4, 1e5, 1e6, 1e7, 3e7, 1e9]
    for m in means:
        d = stats.poisson(m)
        for k in discrete_points(d, None, BIG_LEVELS if m > 1e8 else None):
            c, s = pois_tails(m, k)
            lp = pois_lnpmf(m, k)
            out["poisson"].append([m, k, keep(mp.exp(lp)), f(lp), keep(c), keep(s)])
        print("poisson mean =", m, file=sys.stderr, flush=True)

    dfs = [0.5, 1.0, 2.0, 3.0, 7.5, 10.0, 31.0, 100.0, 1000.0, 1e4, 1e5, 4e5, 999_999.0, 1e6, 1.5e6, 2e6]
    scales = [0.25, 1.0, 1.3, 4.0]
    # Far beyond the planning range, one scale each: these exercise the
    # large-shape expansion where the exact series needs ~1e5 terms.
    big_dfs = [2e7, 1e9]
    for i, df in enumerate(dfs + big_dfs):
        pair = (scales[i % 4], scales[(i + 1) % 4])
        for scale in pair if df not in big_dfs else pair[:1]:
            for x in chi2_points(df, scale, BIG_LEVELS if df in big_dfs else None):
                qh = float(stats.chi2.sf(x, df, scale=scale))
                p, q = gamma_pq(mpf(df) / 2, mpf(x) / (2 * mpf(scale)), qh)
                lp = chi2_lnpdf(df, scale, x)
                out["chi2"].append([df, scale, x, keep(mp.exp(lp)), f(lp), keep(p), keep(q)])
        print("chi2 df =", df, file=sys.stderr, flush=True)

    levels = [1e-250, 1e-12, 0.025, 0.5, 0.975, 1 - 1e-9]
    for n, p in [(1, 0.5), (20, 0.3), (1000, 0.01), (10_000, 0.5), (1_000_000, 0.77), (10_000_000, 1e-4)]:
        d = stats.binom(n, p)
        for t in levels:
            for upper in (False, True):
                guess = d.isf(t) if upper else d.ppf(t)
                if not math.isfinite(guess):
                    guess = n if upper else 0
                k = discrete_quantile_truth(lambda k: binom_tails(n, p, k), n, t, upper, guess)
                if k is not None:
                    out["binomial_quantile"].append([n, p, t, upper, k])
    for m in [1e-3, 2.5, 400.0, 1e6, 1e7]:
        d = stats.poisson(m)
        for t in levels:
            for upper in (False, True):
                guess = d.isf(t) if upper else d.ppf(t)
                if not math.isfinite(guess):
                    guess = 0
                k = discrete_quantile_truth(lambda k: pois_tails(m, k), 10**19, t, upper, guess)
                if k is not None:
                    out["poisson_quantile"].append([m, t, upper, k])
    print("discrete quantiles done", file=sys.stderr, flush=True)
    for df, scale in [(0.5, 1.0), (3.0, 0.25), (29.0, 1.3), (1000.0, 4.0), (2e6, 1.0), (2e7, 1.3)]:
        for t in [1e-280, 1e-20, 1e-3, 0.3, 0.5]:
            for upper in (False, True):
                x = chi2_quantile_truth(df, scale, t, upper)
                if x is not None:
                    out["chi2_quantile"].append([df, scale, t, upper, x])
    print("chi2 quantiles done", file=sys.stderr, flush=True)

    path = Path(__file__).with_name("discrete_chi2.json")
    text = json.dumps(out, separators=(",", ":"))
    # One case per line keeps diffs readable.
    text = text.replace("],[", "],\n[")
    path.write_text(text + "\n")
    print(
        f"wrote {path}: {len(text)} bytes, {len(out['binomial'])} binomial, "
        f"{len(out['poisson'])} poisson, {len(out['chi2'])} chi2, "
        f"{len(out['binomial_quantile']) + len(out['poisson_quantile']) + len(out['chi2_quantile'])} quantile cases",
        file=sys.stderr,
    )


if __name__ == "__main__":
    main()
