#!/usr/bin/env python3
"""Reference values for Student's t and the noncentral t (tests/dist_t.rs).

Truth is computed with mpmath at mp.dps = 40:

* delta = 0: the closed-form density and the regularised incomplete beta
  P(T <= -|x|) = I_{nu/(nu+x^2)}(nu/2, 1/2) / 2 (mpmath.betainc);
* delta != 0: the mixture integrals of Johnson, Kotz & Balakrishnan
  (Continuous Univariate Distributions vol. 2, ch. 31) over y = ln S,
  S = sqrt(chi2_nu / nu):
      P(T <= x) = int K exp(nu*y - nu*e^(2y)/2) Phi(x e^y - delta) dy,
      P(T >  x) = int K exp(nu*y - nu*e^(2y)/2) Phi(delta - x e^y) dy,
      f(x)      = int K exp((nu+1)*y - nu*e^(2y)/2) phi(x e^y - delta) dy,
  K = 2 (nu/2)^(nu/2) / Gamma(nu/2), with mpmath.quad (tanh-sinh) split at
  the integrand's mode, at multiples of its width and around the cliff of
  Phi; each integral's error estimate is checked to be below 1e-20 of it.
  The integrals are also checked against betainc at delta = 0.

The x values are located with a float64 copy of the same mixture (only to
pick arguments whose tails span 1e-20 ... 1e-280; the truth never uses it).
Quantile cases reuse the truth: quantile(cdf(x)) = x and
quantile_upper(sf(x)) = x for the smaller of the two tails.

Usage: python3 tests/reference/gen_t_dist.py  (writes t_dist.json here).
"""
import json
import math
import os
import sys
from multiprocessing import Pool

import mpmath as mp

DPS = 40
DFS = [1, 2, 3, 5, 10, 30, 100, 200, 1000, 1e4, 1e5, 1e6]
NCPS = [-40, -10, -3, -0.5, 0, 0.5, 3, 10, 40]
TAIL_TARGETS = [1e-20, 1e-280]
CENTRE_STEPS = [-1.5, 1.5]

# ---------------------------------------------------------------- float locator
LN_SQRT_2PI = 0.5 * math.log(2 * math.pi)


def _lnk(nu):
    a = nu / 2
    return math.log(2) + a * math.log(a) - a - math.lgamma(a)


def _e(x):
    if abs(x) < 0.5:
        term = x * x / 2
        s, k = term, 2
        while abs(term) > 1e-17 * abs(s):
            k += 1
            term *= x / k
            s += term
        return s
    return math.expm1(x) - x


def _lnphi(u):
    if u >= 0:
        return math.log1p(-0.5 * math.erfc(u / math.sqrt(2)))
    if u > -30:
        return math.log(0.5 * math.erfc(-u / math.sqrt(2)))
    f = -u
    for k in range(60, 0, -1):
        f = -u + k / f
    return -math.log(f) - 0.5 * u * u - LN_SQRT_2PI


def _ln_lower_float(t, nu, d):
    """Rough ln P(T <= t): trapezoid on a fine grid around the float max."""
    if t == 0:
        return _lnphi(-d)
    a, c = nu / 2, _lnk(nu)
    sgn, lt = math.copysign(1, t), math.log(abs(t))

    def f(y):
        return c - a * _e(2 * y) + _lnphi(sgn * math.exp(y + lt) - d)

    ys = _argmax(f)
    return _log_trapz(f, ys, nu, d)


def _argmax(f):
    # Coarse-to-fine scan in y: robust for a unimodal function.
    lo, hi = -800.0, 50.0
    for _ in range(6):
        n = 200
        grid = [lo + (hi - lo) * i / n for i in range(n + 1)]
        vals = [f(y) for y in grid]
        i = max(range(n + 1), key=lambda j: vals[j])
        span = (hi - lo) / n
        lo, hi = grid[i] - 2 * span, grid[i] + 2 * span
    return 0.5 * (lo + hi)


def _log_trapz(f, ys, nu, d):
    h = 0.02 / math.sqrt(1 + nu + d * d)
    peak = f(ys)
    s = 1.0
    for sgn in (1, -1):
        k, step = 1, h
        y = ys
        while True:
            y += sgn * step
            v = f(y) - peak
            s += math.exp(v) * step / h
            if v < -45:
                break
            step = min(step * 1.02, 0.02)
            k += 1
    return peak + math.log(s * h)


def _solve(g, x0, direction, scale):
    """x with g(x) = 0, g monotone; search from x0 in `direction`."""
    from scipy.optimize import brentq
    a, ga = x0, g(x0)
    step = scale
    for _ in range(400):
        b = x0 + direction * step
        gb = g(b)
        if (ga > 0) != (gb > 0):
            lo, hi = sorted((a, b))
            return brentq(g, lo, hi, xtol=1e-9 * max(1.0, abs(b)), rtol=1e-9)
        a, ga = b, gb
        step *= 3
    return None


def _round(x):
    return float("%.6g" % x) if x != 0 else 0.0


def pick_x(nu, d):
    sd = math.sqrt((1 + d * d / (2 * nu)) * (nu / (nu - 2) if nu > 3 else 3))
    xs = {_round(d + k * sd) for k in CENTRE_STEPS}
    for p in TAIL_TARGETS:
        lp = math.log(p)
        xl = _solve(lambda x: _ln_lower_float(x, nu, d) - lp, d, -1, sd)
        xr = _solve(lambda x: _ln_lower_float(-x, nu, -d) - lp, d, 1, sd)
        for x in (xl, xr):
            if x is not None and math.isfinite(x):
                xs.add(_round(x))
    return sorted(xs)


# ---------------------------------------------------------------- mpmath truth
def _mode(logf, y0):
    # Golden-section polish of the float argmax, in mp.
    a, b = mp.mpf(y0) - 2, mp.mpf(y0) + 2
    while logf(a) > logf(a + mp.mpf("1e-3")):
        a -= 4
    while logf(b) > logf(b - mp.mpf("1e-3")):
        b += 4
    g = (mp.sqrt(5) - 1) / 2
    for _ in range(120):
        c, e = b - g * (b - a), a + g * (b - a)
        if logf(c) > logf(e):
            b = e
        else:
            a = c
    return (a + b) / 2


def _integral(logf, y0, cliff=None, cliff_w=None):
    ys = mp.mpf(y0)
    peak = logf(ys)
    h = mp.mpf("1e-4")
    curv = -(logf(ys + h) - 2 * peak + logf(ys - h)) / (h * h)
    w = 1 / mp.sqrt(curv) if curv > 0 else mp.mpf(1)
    # Finite ends where the integrand has fallen below e^-100 of its peak.
    ends = []
    for sgn in (-1, 1):
        k = 4
        while logf(ys + sgn * k * w) - peak > -100:
            k *= 2
        ends.append(ys + sgn * k * w)
    pts = {ends[0], ends[1], ys - 3 * w, ys, ys + 3 * w}
    if cliff is not None:
        pts.update(cliff + k * cliff_w for k in (-4, -1, 0, 1, 4))
    pts = sorted(p for p in pts if ends[0] <= p <= ends[1])
    total, err = mp.mpf(0), mp.mpf(0)
    for a, b in zip(pts[:-1], pts[1:]):
        v, e = mp.quad(lambda y: mp.exp(logf(y) - peak), [a, b], error=True, maxdegree=7)
        total += v
        err += e
    if not err <= mp.mpf("1e-20") * total:
        raise RuntimeError("quad error %s of %s" % (err, total))
    return peak + mp.log(total)


def truth(nu, d, x):
    mp.mp.dps = DPS
    nu_, d_, x_ = mp.mpf(nu), mp.mpf(d), mp.mpf(x)
    if d == 0:
        lc = mp.loggamma((nu_ + 1) / 2) - mp.loggamma(nu_ / 2) - mp.log(nu_ * mp.pi) / 2
        ln_pdf = lc - (nu_ + 1) / 2 * mp.log1p(x_ * x_ / nu_)
        if x == 0:
            small = mp.mpf("0.5")
        else:
            small = mp.betainc(nu_ / 2, mp.mpf("0.5"), 0, nu_ / (nu_ + x_ * x_), regularized=True) / 2
        cdf, sf = (small, 1 - small) if x <= 0 else (1 - small, small)
        return ln_pdf, cdf, sf
    lk = mp.log(2) + nu_ / 2 * mp.log(nu_ / 2) - mp.loggamma(nu_ / 2)

    def tail(t, dd):
        if t == 0:
            return mp.ncdf(-dd)

        def logf(y):
            return lk + nu_ * y - nu_ * mp.exp(2 * y) / 2 + mp.log(mp.ncdf(t * mp.exp(y) - dd))

        tf, df_ = float(t), float(dd)
        sg, lt = math.copysign(1, tf), math.log(abs(tf))
        y0 = _argmax(lambda y: _lnk(nu) - nu / 2 * _e(2 * y) + _lnphi(sg * math.exp(y + lt) - df_))
        cliff = mp.log(dd / t) if dd / t > 0 else None
        return mp.exp(_integral(logf, y0, cliff, 1 / abs(dd)))

    def lpdf(y):
        return (lk + (nu_ + 1) * y - nu_ * mp.exp(2 * y) / 2
                - (x_ * mp.exp(y) - d_) ** 2 / 2 - mp.log(2 * mp.pi) / 2)

    A = nu + x * x
    disc = math.sqrt(x * x * d * d + 4 * A * (nu + 1))
    xq = (x * d + disc) / (2 * A) if x * d >= 0 else 2 * (nu + 1) / (disc - x * d)
    ln_pdf = _integral(lpdf, math.log(xq))
    # Only the smaller tail is integrated; the other is 1 minus it, exact at
    # 40 digits because it is at least 1/2.
    if x < d:
        cdf = tail(x_, d_)
        return ln_pdf, cdf, 1 - cdf
    sf = tail(-x_, -d_)
    return ln_pdf, 1 - sf, sf


def s17(v):
    return mp.nstr(v, 17, min_fixed=1, max_fixed=0) if v != 0 else "0"


def one_combo(args):
    nu, d = args
    rows = []
    for x in pick_x(nu, d):
        ln_pdf, cdf, sf = truth(nu, d, x)
        rows.append({"df": nu, "ncp": d, "x": x, "pdf": s17(mp.exp(ln_pdf)),
                     "ln_pdf": s17(ln_pdf), "cdf": s17(cdf), "sf": s17(sf)})
    return rows


def self_check():
    """The quadrature against betainc where both apply (delta = 0)."""
    mp.mp.dps = DPS
    worst = 0
    for nu, x in [(1, -3e5), (3, -40.0), (30, 2.5), (1000, -9.0), (1e6, -30.0)]:
        _, c_beta, _ = truth(nu, 0, x)
        nu_, x_ = mp.mpf(nu), mp.mpf(x)
        lk = mp.log(2) + nu_ / 2 * mp.log(nu_ / 2) - mp.loggamma(nu_ / 2)
        logf = lambda y: lk + nu_ * y - nu_ * mp.exp(2 * y) / 2 + mp.log(mp.ncdf(x_ * mp.exp(y)))
        y0 = _argmax(lambda y: _lnk(nu) - nu / 2 * _e(2 * y) + _lnphi(math.exp(y) * x))
        c_quad = mp.exp(_integral(logf, y0))
        worst = max(worst, abs(c_quad / c_beta - 1))
    if worst > mp.mpf("1e-25"):
        raise RuntimeError("quad and betainc disagree by %s" % worst)
    return float(worst)


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    check = self_check()
    combos = [(nu, d) for nu in DFS for d in NCPS]
    # A stride coprime to the count visits every pair once, mixing df and
    # ncp, so a partial run already covers the whole range.
    combos = [combos[(37 * k) % len(combos)] for k in range(len(combos))]
    cases = []
    with Pool(int(os.environ.get("JOBS", "2"))) as pool:
        # Rewritten after every parameter pair, so an interrupted run still
        # leaves a usable (smaller) file.
        for part in pool.imap_unordered(one_combo, combos):
            cases.extend(part)
            write(here, check, cases)
    write(here, check, cases)
    print(len(cases), "cases")


def write(here, check, cases):
    import scipy
    cases = sorted(cases, key=lambda r: (r["df"], r["ncp"], r["x"]))
    quantiles = []
    for r in cases:
        c, s = float(r["cdf"]), float(r["sf"])
        if 1e-300 < c <= 0.5:
            quantiles.append({"df": r["df"], "ncp": r["ncp"], "tail": "lower", "p": r["cdf"], "x": r["x"]})
        elif 1e-300 < s < 0.5:
            quantiles.append({"df": r["df"], "ncp": r["ncp"], "tail": "upper", "p": r["sf"], "x": r["x"]})
    out = {
        "generator": "tests/reference/gen_t_dist.py",
        "python": sys.version.split()[0],
        "mpmath": mp.__version__,
        "scipy": scipy.__version__ + " (brentq to locate x only)",
        "dps": DPS,
        "method": "delta=0: closed-form pdf and mpmath.betainc; delta!=0: mpmath.quad of the "
                  "chi-mixture integrals over ln S (JKB ch. 31), split at mode/width/cliff",
        "quad_vs_betainc_max_rel": check,
        "cases": cases,
        "quantiles": quantiles,
    }
    with open(os.path.join(here, "t_dist.json"), "w") as fh:
        json.dump(out, fh, separators=(",", ":"))
        fh.write("\n")


if __name__ == "__main__":
    main()
