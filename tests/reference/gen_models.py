#!/usr/bin/env python3
"""Independent reference values for the two model-comparison families.

Built only from ../shared/method.md (sections 6, 6c) and DEVELOPERS.md
("Statistical conventions", in particular "Comparing models"), with
general-purpose libraries (SciPy, statsmodels, NumPy, mpmath) and the helper
functions of gen_families.py (its exhaustive exact-binomial threshold table,
its tie rule, its continuous threshold solver and its mpmath-checked noncentral
t quadrature).  The engine's code was not read.  Writes
tests/reference/models.json (deterministic, cases sorted by name).

    python3 tests/reference/gen_models.py

two_classifiers
- p10 = (psi + acc1 - acc2)/2, p01 = (psi - acc1 + acc2)/2, q = p10/psi.
  Given m discordant items X ~ Bin(m, 1/2) under H0, Bin(m, q) under H1; the
  conditional threshold is gen_families.exact_table with p0 = 1/2, p1 = q, n = m
  (every k evaluated, two-sided regions over the distinct |2x - m| in integers,
  ties within 1e-12 relative, pick = smallest alpha).  m = 0 never rejects
  (alpha_0 = 0, beta_0 = 1).  k*_m does not depend on n: it is computed once
  per m and cached.
- Self-check at start-up: alpha(n), beta(n) at n = 7 to 10 for four designs
  agree to 1e-13 with an exact rational computation that brute-forces every
  m's rejection region (clf_self_check).
- at n: m ~ Bin(n, psi), alpha(n) = sum_m P(m) alpha_m, beta(n) likewise, over
  every m = 0..n with scipy.stats.binom.pmf (terms that underflow to 0 drop
  out), summed with math.fsum.
- Conventional figures at n (extra, beyond the conventions' minimum): per m the
  exact conditional test at level alpha_max (greater: smallest k with
  alpha_m(k) <= alpha_max, less: largest k, two-sided: smallest distance c,
  m = 0 never rejects), averaged over m ~ Bin(n, psi) the same way:
  `conventional_alpha`, `conventional_power`.
- Sample size: scan n = 1, 2, ...: n_youden = smallest conclusive n,
  checked_to = max(2 n_youden, n_youden + 100), n_stable = smallest n such that
  every n from it to checked_to is conclusive (null if checked_to is not);
  the bound rule of the exact binomial ("Sample-size search").  The scan starts
  at n = 1 (the engine may start later where no smaller n can be conclusive;
  the answers are the same).  n_conventional = ceil of Connor's (1987) formula
  n = (z sqrt(psi) + z_beta sqrt(psi - delta^2))^2 / delta^2; the unrounded
  value is recorded as `n_conventional_formula`.
- Decision: the data are the four cells `both_right`, `only_first_right` (b),
  `only_second_right` (c), `both_wrong` (field names chosen here: the
  conventions name the cells but not the fields).  X = b, m = b + c, the
  conditional threshold for m, conclusive iff alpha_m <= alpha_max and
  beta_m <= beta_max (otherwise `inconclusive`), estimate (b - c)/n with n the
  sum of the four cells, q estimate b/m (null when m = 0).  p-value: one-sided
  binomial tail of Bin(m, 1/2) in the chosen direction (checked against
  scipy.stats.binomtest); two-sided the distance rule P0(|X - m/2| >= |b - m/2|)
  in integer arithmetic on |2X - m| (equal to min(1, doubled tail)), checked
  against statsmodels mcnemar(exact=True) and scipy binomtest.  m = 0: p = 1.
- The cells and the refusal rules are evaluated in exact rational arithmetic
  of the decimal inputs (q = p10/psi then rounded once to a double): a design
  on the boundary (p10, p01, p11 or p00 exactly 0, e.g. discordant = 1 or
  discordant = |acc1 - acc2|) is accepted, as the conventions' ">= 0" says,
  although float evaluation of (psi + acc1 - acc2)/2 can put such a cell at
  -1e-16 (acc1 = .6, acc2 = .4, discordant = 1 gives p11 = -1.1e-16 in
  floats).  The engine must not refuse these designs by rounding (a
  tolerance of a few ulp or exact decimal arithmetic both do).
- Refused planning values: psi <= 0, p10 < 0, p01 < 0, p11 < 0, p00 < 0, an
  accuracy outside (0, 1), and (by method.md section 2, theta1 != theta0)
  acc1 = acc2.  The rule named in each refused case is the first of these
  in that order that fails.

two_learners_cv
- rho = 1/(k - 1) from `folds` k, or `test_train_ratio`; J = n.  H0: t(J - 1),
  H1: nct(J - 1, delta/(sigma sqrt(1/J + rho))).  Threshold and errors from
  gen_families.solve_cont then polish_t (noncentral t by the mpmath-checked
  quadrature); conventional critical value and power as for the t families.
  c_star on the t scale; estimate_threshold = theta0 + c sigma sqrt(1/J + rho)
  (two-sided: the half-width c sigma sqrt(1/J + rho)), planning sigma.
- Limit design: N(0, 1) against N(delta/(sigma sqrt(rho)), 1), same direction
  and weight (gen_families.solve_cont on the normal laws).  When it is not
  conclusive the sample-size case records `never_conclusive: true`, the floor
  sigma^2 rho, and the smallest |delta| whose limit design is conclusive
  (bisection on the conclusive predicate of the limit design to double
  precision, from the first conclusive point of a geometric grid;
  `smallest_conclusive_delta`, raw units, and `smallest_conclusive_theta1`
  = theta0 +/- it in the design's direction; two-sided: theta0 + it if
  theta1 > theta0 else theta0 - it).
- Sample size: smallest J >= 2 that is conclusive (doubling from 2 then
  bisection, every smaller J checked to fail up to 120 and a geometric spread
  above), n_conventional = smallest J whose conventional power is >= 1 -
  beta_max (null when even the limit design's conventional power is below).
- rho -> 0: cases with test_train_ratio = 1e-12 are compared with the
  paired_t at_n cases of families.json with the same d and n (agreement to
  1e-9 relative asserted).  test_train_ratio must be > 0 in this reading
  (rho = 0 is the plain paired t; the conventions do not say whether it is
  accepted, so no case uses it).

Cases with an error rate below 1e-13 or within 1e-8 (relative) of a limit,
or whose tie list is near the 1e-12 tie tolerance, are left out and listed.
"""
import json
import math
import platform
import sys
import time
import warnings
from fractions import Fraction
from pathlib import Path

import mpmath as mp
import numpy as np
import scipy
import statsmodels
from scipy import optimize, stats
from statsmodels.stats.contingency_tables import mcnemar

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import gen_families as gf  # noqa: E402

Skip = gf.Skip
TINY = gf.TINY
BORDER = 1e-8
CASES = gf.CASES        # gen_families' case list and helpers (its own main is not run)
SKIPPED = gf.SKIPPED
add, try_case, base = gf.add, gf.try_case, gf.base
ALTS = ["greater", "less", "two_sided"]


def borderline(v, lim):
    return abs(v / lim - 1) < BORDER


# ============================================================ two_classifiers
def exact_cells(des):
    """The four cells in exact rational arithmetic of the decimal inputs."""
    a1, a2, psi = (Fraction(str(des[k])) for k in ("acc1", "acc2", "discordant"))
    p10 = (psi + a1 - a2) / 2
    p01 = (psi - a1 + a2) / 2
    return {"p10": p10, "p01": p01, "p11": a1 - p10, "p00": 1 - a1 - p01, "psi": psi}


def cells(des):
    """The cells as correctly rounded floats (q = p10/psi rounded once)."""
    c = exact_cells(des)
    out = {k: float(v) for k, v in c.items()}
    out["q"] = float(c["p10"] / c["psi"]) if c["psi"] > 0 else None
    return out


def refusal(des):
    """The first rule the planning values break, or None."""
    a1, a2, psi = float(des["acc1"]), float(des["acc2"]), float(des["discordant"])
    if not (0 < a1 < 1):
        return "acc1 must lie in (0, 1)"
    if not (0 < a2 < 1):
        return "acc2 must lie in (0, 1)"
    if not psi > 0:
        return "discordant must be > 0"
    c = exact_cells(des)
    if c["p10"] < 0:
        return "p10 = (discordant + acc1 - acc2)/2 must be >= 0 (discordant >= acc2 - acc1)"
    if c["p01"] < 0:
        return "p01 = (discordant - acc1 + acc2)/2 must be >= 0 (discordant >= acc1 - acc2)"
    if c["p11"] < 0:
        return "p11 = acc1 - p10 must be >= 0 (both right)"
    if c["p00"] < 0:
        return "p00 = 1 - acc1 - p01 must be >= 0 (both wrong)"
    if a1 == a2:
        return "acc1 = acc2: the alternative equals the null (method.md section 2, theta1 != theta0)"
    return None


class CondCache:
    """Per-m conditional thresholds of Bin(m, 1/2) vs Bin(m, q), computed once."""

    def __init__(self, des):
        self.alt, self.w, self.amax = des["alternative"], gf.weight(des), des["alpha_max"]
        self.q = cells(des)["q"]
        self.tables = {}
        # m = 0 never rejects
        self.a = [0.0]
        self.b = [1.0]
        self.ca = [0.0]
        self.cp = [0.0]
        self.near_tie = []

    def table(self, m):
        if m not in self.tables:
            d = {"alternative": self.alt, "theta0": 0.5, "theta1": self.q,
                 "alpha_max": self.amax}
            if self.w != 0.5:
                d["weight"] = self.w
            t = gf.exact_table(d, m)
            # a tie tolerance hazard: a value just outside 1e-12 of the minimum
            E, Emin = t["E"], t["E"].min()
            rel = np.abs(E - Emin) / Emin
            if np.any((rel > 1e-13) & (rel < 1e-10)):
                self.near_tie.append(m)
            self.tables[m] = t
        return self.tables[m]

    def extend(self, M):
        for m in range(len(self.a), M + 1):
            t = self.table(m)
            i, j = t["pick"], t["conv"]
            self.a.append(float(t["alpha"][i]))
            self.b.append(float(t["beta"][i]))
            self.ca.append(float(t["alpha"][j]))
            self.cp.append(float(t["power"][j]))
            if len(self.tables) > 64:          # keep memory bounded
                self.tables.pop(m - 1, None)

    def at_n(self, n, psi):
        self.extend(n)
        pm = stats.binom.pmf(np.arange(n + 1), n, psi)
        keep = pm > 0
        idx = np.nonzero(keep)[0]
        p = pm[keep]
        A = math.fsum((p * np.asarray(self.a)[idx]).tolist())
        B = math.fsum((p * np.asarray(self.b)[idx]).tolist())
        CA = math.fsum((p * np.asarray(self.ca)[idx]).tolist())
        CP = math.fsum((p * np.asarray(self.cp)[idx]).tolist())
        return A, B, CA, CP


CC_SRC = ("conditional thresholds: gen_families.exact_table with p0 = 1/2, p1 = q = p10/psi, n = m "
          "(every k evaluated with scipy.stats.binom sf/cdf; two-sided over the distinct |2x - m| "
          "in integers; ties within 1e-12 relative, pick = smallest alpha); m = 0 never rejects")


def case_clf_at_n(name, des, n):
    cc = CondCache(des)
    a, b, ca, cp = cc.at_n(n, cells(des)["psi"])
    if cc.near_tie:
        raise Skip(f"near tie at m = {cc.near_tie[:3]}")
    if min(a, b) < TINY:
        raise Skip("error rate below 1e-13")
    if borderline(a, des["alpha_max"]) or borderline(b, des["beta_max"]):
        raise Skip("borderline")
    c = cells(des)
    exp = {"alpha_star": a, "beta_star": b,
           "conclusive": bool(a <= des["alpha_max"] and b <= des["beta_max"]), "q": c["q"], "p10": c["p10"], "p01": c["p01"],
           "conventional_alpha": ca, "conventional_power": cp}
    src = (f"m ~ Bin({n}, {c['psi']}); alpha(n) = sum_m P(m) alpha_m(k*_m), beta(n) likewise over every "
           f"m = 0..n (scipy.stats.binom.pmf, math.fsum); {CC_SRC}; conventional: per m the exact "
           f"conditional test at level alpha_max, averaged the same way")
    add(name, "at_n", dict(des, n=n), exp, src)


def cond_threshold(des, m):
    """The table for m >= 1, the picked region and its alpha, beta (Skip on hazards)."""
    cc = CondCache(des)
    t = cc.table(m)
    if cc.near_tie:
        raise Skip("near tie")
    i = t["pick"]
    a, b = float(t["alpha"][i]), float(t["beta"][i])
    if min(a, b) < TINY:
        raise Skip("error rate below 1e-13")
    if borderline(a, des["alpha_max"]) or borderline(b, des["beta_max"]):
        raise Skip("borderline")
    return t, i, a, b


def case_clf_conditional(name, des, m):
    t, i, a, b = cond_threshold(des, m)
    j, alt = t["conv"], des["alternative"]
    exp = gf.region_fields(t, i, alt)
    exp.update({"alpha_star": a, "beta_star": b,
                "conclusive": bool(a <= des["alpha_max"] and b <= des["beta_max"]),
                "q": cells(des)["q"],
                "conventional_alpha": float(t["alpha"][j]),
                "conventional_power": float(t["power"][j])})
    if alt == "two_sided":
        exp["conventional_k"] = {"k_low": t["regions"][j][0], "k_high": t["regions"][j][1]}
    else:
        exp["conventional_k"] = t["regions"][j]
    src = (f"X | m = {m} ~ Bin(m, 1/2) vs Bin(m, q); {CC_SRC}")
    if len(t["tied"]) > 1:
        src += f"; {len(t['tied'])} tied regions"
    add(name, "conditional", dict(des, m=m), exp, src)


def p_value_clf(alt, b, m):
    """Exact conditional p-value of X = b of m, and the checks it passed."""
    B = stats.binom
    if m == 0:
        return 1.0, "m = 0: p = 1 (no discordant item)"
    if alt == "greater":
        p = float(B.sf(b - 1, m, 0.5))
        r = stats.binomtest(b, m, 0.5, alternative="greater").pvalue
        assert abs(p - r) <= 1e-13 * p, (p, r)
        return p, "P0(X >= b), Bin(m, 1/2), scipy.stats.binom.sf; = scipy.stats.binomtest(greater)"
    if alt == "less":
        p = float(B.cdf(b, m, 0.5))
        r = stats.binomtest(b, m, 0.5, alternative="less").pvalue
        assert abs(p - r) <= 1e-13 * p, (p, r)
        return p, "P0(X <= b), Bin(m, 1/2), scipy.stats.binom.cdf; = scipy.stats.binomtest(less)"
    dobs = abs(2 * b - m)
    xs = np.arange(m + 1)
    mask = np.abs(2 * xs - m) >= dobs
    # the two tails separately (no cancellation)
    lo = (m - dobs) // 2                      # largest x with 2x <= m - dobs
    hi = -((-(m + dobs)) // 2)                # smallest x with 2x >= m + dobs
    if dobs == 0:
        p = 1.0
    else:
        p = float((B.cdf(lo, m, 0.5) if lo >= 0 else 0.0) + (B.sf(hi - 1, m, 0.5) if hi <= m else 0.0))
    brute = float(B.pmf(xs[mask], m, 0.5).sum())
    assert abs(p - brute) <= 1e-12 * p, (p, brute)
    doubled = min(1.0, 2 * float(B.cdf(min(b, m - b), m, 0.5)))
    assert abs(p - doubled) <= 1e-13 * p, (p, doubled)
    tbl = [[0, b], [m - b, 0]]
    sm = float(mcnemar(tbl, exact=True).pvalue)
    assert abs(p - sm) <= 1e-12 * p, (p, sm)
    sp = float(stats.binomtest(b, m, 0.5).pvalue)
    assert abs(p - sp) <= 1e-12 * p, (p, sp)
    return p, ("distance rule P0(|X - m/2| >= |b - m/2|) on |2X - m| in integers (= min(1, doubled "
               "tail)); agrees with statsmodels mcnemar(exact=True) and scipy.stats.binomtest to 1e-12")


def case_clf_decision(name, des, data):
    b, c = data["only_first_right"], data["only_second_right"]
    n = data["both_right"] + b + c + data["both_wrong"]
    m = b + c
    alt = des["alternative"]
    p, psrc = p_value_clf(alt, b, m)
    exp = {"statistic": b, "m": m, "p_value": p, "estimate": (b - c) / n,
           "q_estimate": (b / m) if m > 0 else None}
    if m == 0:
        a, be = 0.0, 1.0
        exp.update({"alpha_star": a, "beta_star": be, "ties": [], "outcome": "inconclusive"})
        if alt == "two_sided":
            exp["k_low"], exp["k_high"] = None, None
        else:
            exp["k_star"] = 1 if alt == "greater" else -1
        exp["c_star"] = exp.get("k_star", [None, None])
        add(name, "decision", dict(des, data=data), exp,
            "m = 0: never reject (alpha_0 = 0, beta_0 = 1), so not conclusive: inconclusive; " + psrc)
        return
    t, i, a, be = cond_threshold(des, m)
    exp.update(gf.region_fields(t, i, alt))
    if alt == "greater":
        rej = b >= exp["k_star"]
    elif alt == "less":
        rej = b <= exp["k_star"]
    else:
        kl, kh = exp["k_low"], exp["k_high"]
        rej = (kl is not None and b <= kl) or (kh is not None and b >= kh)
    conclusive = a <= des["alpha_max"] and be <= des["beta_max"]
    exp["c_star"] = exp.get("k_star", [exp.get("k_low"), exp.get("k_high")])
    exp.update({"alpha_star": a, "beta_star": be,
                "outcome": "inconclusive" if not conclusive else
                ("reject_h0" if rej else "do_not_reject_h0")})
    add(name, "decision", dict(des, data=data), exp,
        f"X = b = {b} of m = {m}; conditional threshold for m: {CC_SRC}; p-value: {psrc}; "
        "estimate (b - c)/n, q estimate b/m")


def connor_n(des):
    c = cells(des)
    psi, delta = c["psi"], c["p10"] - c["p01"]
    amax, bmax = des["alpha_max"], des["beta_max"]
    z = stats.norm.isf(amax / 2) if des["alternative"] == "two_sided" else stats.norm.isf(amax)
    zb = stats.norm.isf(bmax)
    raw = (z * math.sqrt(psi) + zb * math.sqrt(psi - delta * delta)) ** 2 / (delta * delta)
    if abs(raw - round(raw)) < 1e-9:
        raise Skip("Connor's n on an integer: rounding hazard")
    return float(raw), math.ceil(raw)


def sample_size_clf(des, nmax=20000):
    cc = CondCache(des)
    psi = cells(des)["psi"]
    amax, bmax = des["alpha_max"], des["beta_max"]
    res = {}
    n_first = checked_to = None
    n = 1
    while True:
        a, b, _, _ = cc.at_n(n, psi)
        if borderline(a, amax) or borderline(b, bmax):
            raise Skip(f"borderline at n = {n}")
        ok = a <= amax and b <= bmax
        res[n] = ok
        if ok and n_first is None:
            n_first = n
            checked_to = max(2 * n_first, n_first + 100)
        if n_first is not None and n >= checked_to:
            break
        n += 1
        if n > nmax:
            raise Skip("scan too long")
    if cc.near_tie:
        raise Skip(f"near tie at m = {cc.near_tie[:3]}")
    n_stable = gf.stable_from(res, checked_to)
    return n_first, n_stable, checked_to


def case_clf_ss(name, des, extra="", checks=None):
    raw, nc = connor_n(des)
    nf, ns, ct = sample_size_clf(des)
    exp = {"n_youden": nf, "n_stable": ns, "checked_to": ct, "n_conventional": nc,
           "n_conventional_formula": raw}
    if checks:
        for k, v in checks.items():
            assert exp[k] == v, (name, k, exp[k], v)
    add(name, "sample_size", des, exp,
        "scan n = 1, 2, ... of the unconditional alpha(n), beta(n) (sum over m ~ Bin(n, psi) of the "
        f"cached conditional thresholds; {CC_SRC}); n_stable = smallest n such that every n up to "
        "checked_to = max(2 n_youden, n_youden + 100) is conclusive; n_conventional = ceil of Connor "
        "(1987) (z sqrt(psi) + z_beta sqrt(psi - delta^2))^2/delta^2 with scipy.stats.norm.isf" + extra)


def case_refused(name, des):
    rule = refusal(des)
    assert rule is not None, des
    add(name, "refused", des, {"refused": True, "rule": rule},
        "planning values that break a rule of 'Comparing models' (two_classifiers): the first rule "
        "broken, in the order acc1, acc2 in (0, 1); discordant > 0; p10, p01, p11, p00 >= 0; acc1 != acc2")


CLF_PLANS = {
    "greater": [(0.85, 0.80, 0.15), (0.90, 0.82, 0.12), (0.75, 0.65, 0.30), (0.70, 0.60, 0.20),
                (0.80, 0.70, 0.40), (0.95, 0.90, 0.07)],
    "less": [(0.80, 0.85, 0.15), (0.82, 0.90, 0.12), (0.65, 0.75, 0.30), (0.60, 0.70, 0.20),
             (0.70, 0.80, 0.40), (0.90, 0.95, 0.07)],
    "two_sided": [(0.85, 0.80, 0.15), (0.82, 0.90, 0.12), (0.75, 0.65, 0.30), (0.60, 0.70, 0.20),
                  (0.80, 0.70, 0.40), (0.9, 0.95, 0.07)],
}
CLF_WEIGHTS = [0.5, 0.25, 0.5, 0.8, 0.5, 0.75, 0.5]
LIMITS = gf.LIMITS


def gen_two_classifiers(rng):
    fam = "two_classifiers"
    ns = [5, 20, 60, 150, 400, 1000, 3000, 12, 250]
    idx = 0
    for alt in ALTS:
        for pi, (a1, a2, psi) in enumerate(CLF_PLANS[alt]):
            kw = {"acc1": a1, "acc2": a2, "discordant": psi}
            assert refusal(kw) is None, kw
            for j in range(3):
                amax, bmax = LIMITS[(pi + j + idx) % len(LIMITS)]
                w = CLF_WEIGHTS[(pi * 2 + j + idx) % len(CLF_WEIGHTS)]
                des = base(fam, alt, amax, bmax, w, **kw)
                n = ns[(pi * 3 + j + ALTS.index(alt) * 2) % len(ns)]
                try_case(case_clf_at_n, f"{fam}.{alt}.at_n.{idx:03d}", des, n)
                idx += 1
            for j, m in enumerate((1, 7, 25, 80, 300)):
                if (pi + j) % 2 and m not in (1, 300):
                    continue
                amax, bmax = LIMITS[(pi + j) % len(LIMITS)]
                w = CLF_WEIGHTS[(pi + 2 * j) % len(CLF_WEIGHTS)]
                des = base(fam, alt, amax, bmax, w, **kw)
                try_case(case_clf_conditional, f"{fam}.{alt}.conditional.{idx:03d}", des, m)
                idx += 1
            for j, n in enumerate((30, 150, 600, 1500)):
                amax, bmax = LIMITS[(pi + j + 1) % len(LIMITS)]
                w = 0.5 if (pi + j) % 3 else [0.25, 0.8][j % 2]
                c = cells(kw)
                probs = [c["p11"], c["p10"], c["p01"], c["p00"]]
                if j == 0 and pi % 2 == 0:
                    # a table whose discordant split leans the other way
                    probs = [c["p11"], c["p01"], c["p10"], c["p00"]]
                if j == 3:
                    # data drawn under H0 (equal accuracy), lenient limits
                    probs = [c["p11"], c["psi"] / 2, c["psi"] / 2, c["p00"]]
                    amax, bmax = [(0.1, 0.1), (0.05, 0.2), (0.2, 0.2)][pi % 3]
                des = base(fam, alt, amax, bmax, w, **kw)
                cnt = rng.multinomial(n, probs)
                data = {"both_right": int(cnt[0]), "only_first_right": int(cnt[1]),
                        "only_second_right": int(cnt[2]), "both_wrong": int(cnt[3])}
                try_case(case_clf_decision, f"{fam}.{alt}.decision.{idx:03d}", des, data)
                idx += 1
            amax, bmax = [(0.05, 0.2), (0.1, 0.1), (0.05, 0.1), (0.2, 0.2), (0.1, 0.2), (0.05, 0.2)][pi]
            w = [0.5, 0.25, 0.5, 0.8, 0.5, 0.5][pi]
            des = base(fam, alt, amax, bmax, w, **kw)
            try_case(case_clf_ss, f"{fam}.{alt}.sample_size.{idx:03d}", des)
            idx += 1
    # decisions at the edges: m = 0, b = c (two-sided p = 1), all discordant one way
    for i, (alt, data) in enumerate([
            ("two_sided", {"both_right": 40, "only_first_right": 0, "only_second_right": 0, "both_wrong": 10}),
            ("greater", {"both_right": 40, "only_first_right": 0, "only_second_right": 0, "both_wrong": 10}),
            ("two_sided", {"both_right": 50, "only_first_right": 9, "only_second_right": 9, "both_wrong": 12}),
            ("greater", {"both_right": 30, "only_first_right": 14, "only_second_right": 0, "both_wrong": 6}),
            ("less", {"both_right": 30, "only_first_right": 0, "only_second_right": 14, "both_wrong": 6})]):
        a1, a2 = (0.8, 0.7) if alt != "less" else (0.7, 0.8)
        des = base("two_classifiers", alt, 0.05, 0.2, acc1=a1, acc2=a2, discordant=0.2)
        try_case(case_clf_decision, f"two_classifiers.{alt}.decision.edge{i}", des, data)
    # refused planning values
    refused = [
        {"acc1": 0.9, "acc2": 0.7, "discordant": 0.1},      # psi < |acc1 - acc2|: p01 < 0
        {"acc1": 0.7, "acc2": 0.9, "discordant": 0.1},      # p10 < 0
        {"acc1": 0.8, "acc2": 0.7, "discordant": 0.0},      # psi = 0
        {"acc1": 0.8, "acc2": 0.7, "discordant": -0.1},
        {"acc1": 0.95, "acc2": 0.9, "discordant": 0.2},     # p00 = 1 - .95 - .075 < 0
        {"acc1": 0.1, "acc2": 0.15, "discordant": 0.3},     # p11 = .1 - .125 < 0
        {"acc1": 1.0, "acc2": 0.9, "discordant": 0.1},
        {"acc1": 0.0, "acc2": 0.1, "discordant": 0.1},
        {"acc1": 0.8, "acc2": 1.2, "discordant": 0.5},
        {"acc1": 0.8, "acc2": 0.8, "discordant": 0.2},      # equal accuracies
    ]
    k = 0
    for kw in refused:
        if refusal(kw) is None:
            continue
        case_refused(f"two_classifiers.refused.{k:02d}", base("two_classifiers", "greater", 0.05, 0.2, **kw))
        k += 1


def gen_clf_all_discordant():
    """psi = 1 (every item discordant, p11 = p00 = 0): m = n always, so the design is the
    exact binomial Bin(n, 1/2) vs Bin(n, q), q = acc1: compared with the
    proportion_exact cases of families.json with theta0 = 0.5, theta1 = acc1."""
    fam_cases = json.loads((HERE / "families.json").read_text())["cases"]
    k = 0
    for ref in fam_cases:
        rd = ref["design"]
        if rd["family"] != "proportion_exact" or rd["theta0"] != 0.5 or ref["kind"] not in ("at_n", "sample_size"):
            continue
        p1 = rd["theta1"]
        kw = {"acc1": p1, "acc2": round(1 - p1, 12), "discordant": 1.0}
        if refusal(kw) is not None:
            SKIPPED.append((ref["name"], "psi = 1 design refused by rounding: " + refusal(kw)))
            continue
        des = {k2: v for k2, v in rd.items() if k2 not in ("theta0", "theta1", "n")}
        des.update(kw, family="two_classifiers")
        name = f"two_classifiers.{rd['alternative']}.{ref['kind']}.all_discordant{k}"
        k += 1
        note = (f". FACT: with psi = 1 every item is discordant (m = n), so the design is the exact "
                f"binomial test of p = 1/2 against q = acc1; agrees with families.json {ref['name']}")
        if ref["kind"] == "at_n":
            case_clf_at_n(name, des, rd["n"])
            e = CASES[-1]["expect"]
            for a, b in (("alpha_star", "alpha_star"), ("beta_star", "beta_star")):
                assert abs(e[a] - ref["expect"][b]) <= 1e-12 * ref["expect"][b], (name, e[a], ref["expect"][b])
            assert e["conclusive"] == ref["expect"]["conclusive"]
            CASES[-1]["source"] += note
        else:
            case_clf_ss(name, des, note)
            e = CASES[-1]["expect"]
            for f in ("n_youden", "n_stable", "checked_to"):
                assert e[f] == ref["expect"][f], (name, f, e[f], ref["expect"][f])


def clf_self_check():
    """alpha(n), beta(n) at small n by an independent route: every m = 0..n with its
    exact binomial weight, each m's threshold found by brute force over the rejection
    regions (sets of X) in exact rational arithmetic (ties exactly equal, pick =
    smallest alpha)."""
    from math import comb

    def regions(alt, m):
        xs = range(m + 1)
        if alt == "greater":
            return [set(x for x in xs if x >= k) for k in range(m + 2)]
        if alt == "less":
            return [set(x for x in xs if x <= k) for k in range(-1, m + 1)]
        ds = sorted(set(abs(2 * x - m) for x in xs))
        return [set(xs)] + [set(x for x in xs if abs(2 * x - m) > d) for d in ds]

    def law(m, p):
        return [comb(m, x) * p ** x * (1 - p) ** (m - x) for x in range(m + 1)]

    for alt, kw, w, n in (("greater", {"acc1": 0.8, "acc2": 0.7, "discordant": 0.3}, Fraction(1, 2), 9),
                          ("less", {"acc1": 0.65, "acc2": 0.75, "discordant": 0.25}, Fraction(1, 4), 8),
                          ("two_sided", {"acc1": 0.9, "acc2": 0.82, "discordant": 0.12}, Fraction(4, 5), 10),
                          ("two_sided", {"acc1": 0.6, "acc2": 0.7, "discordant": 0.4}, Fraction(1, 2), 7)):
        c = exact_cells(kw)
        q = c["p10"] / c["psi"]
        A = Bt = Fraction(0)
        for m in range(n + 1):
            pm = comb(n, m) * c["psi"] ** m * (1 - c["psi"]) ** (n - m)
            if m == 0:
                a_m, b_m = Fraction(0), Fraction(1)
            else:
                f0, f1 = law(m, Fraction(1, 2)), law(m, q)
                best = None
                for R in regions(alt, m):
                    a = sum(f0[x] for x in R)
                    b = 1 - sum(f1[x] for x in R)
                    key = (w * a + (1 - w) * b, a)
                    if best is None or key < best[0]:
                        best = (key, a, b)
                a_m, b_m = best[1], best[2]
            A += pm * a_m
            Bt += pm * b_m
        des = base("two_classifiers", alt, 0.05, 0.2, float(w), **kw)
        a, b, _, _ = CondCache(des).at_n(n, float(c["psi"]))
        assert abs(a / float(A) - 1) < 1e-13 and abs(b / float(Bt) - 1) < 1e-13, (alt, a, float(A), b, float(Bt))


def gen_clf_checks():
    # Connor (1987), Biometrics 43:207-211: p10 = .125, p01 = .25, two-sided alpha .05, power .90
    # acc1 - acc2 = p10 - p01 = -.125, psi = .375; acc1 = .6, acc2 = .725 gives those cells
    des = base("two_classifiers", "two_sided", 0.05, 0.1, acc1=0.6, acc2=0.725, discordant=0.375)
    raw, nc = connor_n(des)
    c = cells(des)
    assert abs(c["p10"] - 0.125) < 1e-12 and abs(c["p01"] - 0.25) < 1e-12
    assert nc == 248, (raw, nc)
    case_clf_ss("check.two_classifiers.connor1987.248", des,
                f". PUBLISHED CHECK: Connor (1987), Biometrics 43:207-211, p10 = .125, p01 = .25, "
                f"two-sided alpha .05, power .90: 248 pairs (as quoted in issue 12); the formula gives "
                f"{raw:.6f} -> {nc}", checks={"n_conventional": 248})


# ============================================================ two_learners_cv
def rho_of(des):
    if "folds" in des:
        return 1.0 / (des["folds"] - 1)
    return float(des["test_train_ratio"])


def cv_model(des, J):
    th0, th1, sg = gf.means(des)
    rho = rho_of(des)
    f = 1.0 / J + rho
    ncp = (th1 - th0) / (sg * math.sqrt(f))
    return gf.Cont("t", J - 1, ncp, None, sg * math.sqrt(f), th0,
                   f"t({J - 1}) vs nct({J - 1}, delta/(sigma sqrt(1/J + rho)) = {ncp:.6g}); rho = {rho:.6g}")


def cv_full(des, J):
    alt, w = des["alternative"], gf.weight(des)
    m = cv_model(des, J)
    r = gf.solve_cont(m, alt, w)
    c2, a2, b2 = gf.polish_t(m, alt, w, r["c"])
    for u, v in ((r["c"], c2), (r["alpha"], a2), (r["beta"], b2)):
        if abs(u - v) > 1e-7 * abs(v) + 1e-300:
            raise Skip("scipy/quadrature disagreement > 1e-7")
    if min(a2, b2) < TINY:
        raise Skip("error rate below 1e-13")
    crit, pw = gf.conventional_cont(m, alt, des["alpha_max"], use_mp=True)
    return m, c2, a2, b2, crit, pw, r["n_crossings"]


CV_SRC = ("corrected resampled t: H0 t(J-1), H1 nct(J-1, delta/(sigma sqrt(1/J + rho))); threshold by "
          "gen_families.solve_cont (scipy.optimize.brentq on the log weighted density ratio, all "
          "crossings scanned, ends compared) Newton-polished with the mpmath-checked float64 "
          "noncentral t quadrature (gen_families.polish_t); alpha from scipy.stats.t; beta and "
          "conventional power from the quadrature; conventional critical from scipy.stats.t.isf/ppf")


def case_cv_at_n(name, des, J, ref=None):
    d = dict(des, n=J)
    m, c, a, b, crit, pw, nx = cv_full(d, J)
    if borderline(a, des["alpha_max"]) or borderline(b, des["beta_max"]):
        raise Skip("borderline")
    alt = des["alternative"]
    est = c * m.scale if alt == "two_sided" else m.offset + c * m.scale
    rho = rho_of(des)
    exp = {"c_star": c, "estimate_threshold": est, "alpha_star": a, "beta_star": b,
           "conclusive": bool(a <= des["alpha_max"] and b <= des["beta_max"]),
           "conventional_critical": crit, "conventional_power": pw,
           "rho": rho, "variance_factor": 1.0 / J + rho, "noncentrality": m.loc1}
    src = m.label + ". " + CV_SRC
    if nx > 1:
        src += f"; {nx} density crossings, the smallest weighted error kept"
    if ref is not None:
        for k in ("c_star", "alpha_star", "beta_star", "conventional_critical", "conventional_power"):
            rv = ref["expect"][k]
            assert abs(exp[k] - rv) <= 1e-9 * abs(rv), (name, k, exp[k], rv)
        exp["paired_t_reference"] = {k: ref["expect"][k] for k in
                                     ("c_star", "alpha_star", "beta_star", "estimate_threshold")}
        exp["paired_t_reference"]["name"] = ref["name"]
        src += (f"; FACT OF THE TRADE: as rho -> 0 the corrected resampled t is the paired t: with rho = "
                f"{rho:g} these agree to 1e-9 relative with families.json {ref['name']} (same d, n)")
    add(name, "at_n", d, exp, src)


def limit_conclusive(des, D):
    """Normal-shift limit design N(0,1) vs N(D,1): (conclusive, alpha, beta)."""
    m = gf.Cont("norm", None, D, 1.0, 1.0, 0.0, "limit")
    try:
        r = gf.solve_cont(m, des["alternative"], gf.weight(des))
    except Skip as e:
        if "at an end" in str(e) or "no density crossing" in str(e):
            return False, 0.5, 0.5
        raise
    return (r["alpha"] <= des["alpha_max"] and r["beta"] <= des["beta_max"]), r["alpha"], r["beta"]


def smallest_limit_D(des):
    """Smallest |D| (standardised limit shift) whose limit design is conclusive."""
    sgn = -1.0 if des["alternative"] == "less" else 1.0
    grid = np.geomspace(1e-2, 40, 400)
    first = None
    for i, g in enumerate(grid):
        if limit_conclusive(des, sgn * g)[0]:
            first = i
            break
    assert first is not None and first > 0
    for g in grid[first:]:   # the conclusive set must be an interval above the answer on the grid
        assert limit_conclusive(des, sgn * g)[0]
    lo, hi = float(grid[first - 1]), float(grid[first])
    for _ in range(200):
        mid = (lo + hi) / 2
        if mid in (lo, hi):
            break
        if limit_conclusive(des, sgn * mid)[0]:
            hi = mid
        else:
            lo = mid
    ok, a, b = limit_conclusive(des, sgn * hi)
    assert ok and not limit_conclusive(des, sgn * lo)[0]
    return hi, a, b


def cv_conventional_n(des, D):
    """Smallest J whose conventional power reaches 1 - beta_max, or None when even the
    limit design's (J -> infinity: z test of shift D) does not; with its source text."""
    alt, amax, bmax = des["alternative"], des["alpha_max"], des["beta_max"]
    target = 1 - bmax
    zc = stats.norm.isf(amax / 2 if alt == "two_sided" else amax)
    lim_pow = stats.norm.sf(zc - abs(D)) + (stats.norm.cdf(-zc - abs(D)) if alt == "two_sided" else 0.0)
    if abs(lim_pow / target - 1) < 1e-8:
        raise Skip("limit conventional power borderline")
    if lim_pow < target:
        nc = None
        csrc = "; n_conventional null: even the limit design's conventional power is below 1 - beta_max"
    else:
        def cok(J):
            p = gf.conventional_cont(cv_model(des, J), alt, amax)[1]
            if abs(p / target - 1) < 1e-10:
                raise Skip("borderline conventional power")
            return p >= target
        nc = gf.search_cont(cok, 2)
        for J in range(2, min(nc, 300)):
            if cok(J):
                raise Skip("conventional power not monotone")
        csrc = ("; n_conventional: smallest J with power >= 1 - beta_max at the level-alpha_max "
                "critical value of t(J-1) (scipy.stats.t / nct), doubling then bisection")
    return nc, csrc


def case_cv_ss(name, des):
    th0, th1, sg = gf.means(des)
    rho = rho_of(des)
    alt = des["alternative"]
    amax, bmax = des["alpha_max"], des["beta_max"]
    D = (th1 - th0) / (sg * math.sqrt(rho))
    ok, la, lb = limit_conclusive(des, D)
    if borderline(la, amax) or borderline(lb, bmax):
        raise Skip("limit design borderline")
    if not ok:
        Dmin, a, b = smallest_limit_D(des)
        dmin = Dmin * sg * math.sqrt(rho)
        sgn = (1.0 if th1 > th0 else -1.0)
        exp = {"never_conclusive": True, "n_youden": None, "floor_variance": sg * sg * rho,
               "limit_noncentrality": D, "limit_alpha": la, "limit_beta": lb,
               "smallest_conclusive_delta": dmin, "smallest_conclusive_theta1": th0 + sgn * dmin,
               "smallest_conclusive_noncentrality": Dmin}
        exp["n_conventional"], csrc = cv_conventional_n(des, D)
        add(name, "sample_size", des, exp,
            "limit design N(0,1) vs N(delta/(sigma sqrt(rho)), 1), same direction and weight "
            "(gen_families.solve_cont on scipy.stats.norm) is not conclusive, so no J is; floor "
            "variance sigma^2 rho; smallest conclusive delta = sigma sqrt(rho) times the smallest "
            "limit shift whose design is conclusive (geometric grid, then 200-step bisection on the "
            "conclusive predicate)" + csrc)
        return
    cache = {}

    def yok(J):
        if J not in cache:
            m = cv_model(des, J)
            try:
                r = gf.solve_cont(m, alt, gf.weight(des), N=801)
            except Skip as e:
                if "at an end" in str(e) or "no density crossing" in str(e):
                    r = {"alpha": 0.5, "beta": 0.5}
                else:
                    raise
            cache[J] = r
        r = cache[J]
        if borderline(r["alpha"], amax) or borderline(r["beta"], bmax):
            raise Skip(f"borderline at J = {J}")
        return r["alpha"] <= amax and r["beta"] <= bmax
    ny = gf.search_cont(yok, 2)
    for J in range(2, min(ny, 120)):
        if yok(J):
            raise Skip(f"conclusive set not an interval (J = {J})")
    if ny > 120:
        for J in sorted(set(np.unique(np.geomspace(120, ny - 1, 30).astype(int)))):
            if J < ny and yok(int(J)):
                raise Skip("conclusive set not an interval")
    # confirm with the polished values at ny and ny - 1
    _, _, a, b, _, _, _ = cv_full(des, ny)
    assert a <= amax and b <= bmax
    if ny > 2:
        _, _, a1, b1, _, _, _ = cv_full(des, ny - 1)
        assert not (a1 <= amax and b1 <= bmax)
    nc, csrc = cv_conventional_n(des, D)
    exp = {"never_conclusive": False, "n_youden": ny, "n_conventional": nc,
           "floor_variance": sg * sg * rho, "limit_noncentrality": D}
    add(name, "sample_size", des, exp,
        "smallest J >= 2: doubling from 2 then bisection with gen_families.solve_cont on "
        "scipy.stats.t/nct, every smaller J checked to fail (above 120 a geometric spread of 30), "
        "J and J - 1 confirmed with the quadrature-polished values" + csrc)


def cv_refused():
    """Inputs the conventions refuse (two_learners_cv)."""
    out = [
        ({"d": 0.5, "folds": 1}, "folds must be a whole number >= 2"),
        ({"d": 0.5, "folds": 2.5}, "folds must be a whole number >= 2"),
        ({"d": 0.5, "folds": 5, "test_train_ratio": 0.25}, "exactly one of folds and test_train_ratio"),
        ({"d": 0.5}, "exactly one of folds and test_train_ratio"),
    ]
    for k, (kw, rule) in enumerate(out):
        add(f"two_learners_cv.refused.{k:02d}", "refused",
            base("two_learners_cv", "greater", 0.05, 0.2, **kw), {"refused": True, "rule": rule},
            "inputs that break a rule of 'Comparing models' (two_learners_cv)")


def gen_two_learners_cv():
    fam = "two_learners_cv"
    effs = [{"d": 0.5}, {"d": 1.0}, {"d": 2.0}, {"theta0": 0.0, "theta1": 0.02, "sigma": 0.015},
            {"theta0": 0.01, "theta1": 0.04, "sigma": 0.02}, {"d": 1.5}]
    rhos = [{"folds": 10}, {"folds": 5}, {"test_train_ratio": 0.1}, {"folds": 2},
            {"test_train_ratio": 0.05}, {"folds": 3}]
    Js = [5, 10, 30, 100, 12, 50, 3, 20]
    W = [0.5, 0.5, 0.25, 0.5, 0.75, 0.5]
    idx = 0
    for alt in ALTS:
        for ei, eff in enumerate(effs):
            e = dict(eff)
            if alt == "less" or (alt == "two_sided" and ei % 2 == 1):
                e = gf.mirror_means(e)
            for j in range(3):
                amax, bmax = LIMITS[(ei + j + idx) % len(LIMITS)]
                w = W[(ei + 2 * j + idx) % len(W)]
                des = base(fam, alt, amax, bmax, w, **e, **rhos[(ei + j) % len(rhos)])
                J = Js[(ei * 3 + j * 5 + idx) % len(Js)]
                try_case(case_cv_at_n, f"{fam}.{alt}.at_n.{idx:03d}", des, J)
                idx += 1
            for j in range(2):
                amax, bmax = [(0.05, 0.2), (0.1, 0.1), (0.2, 0.2), (0.05, 0.1)][(ei + j) % 4]
                w = [0.5, 0.5, 0.25, 0.75][(ei + j + idx) % 4]
                des = base(fam, alt, amax, bmax, w, **e, **rhos[(ei + 2 * j + 1) % len(rhos)])
                try_case(case_cv_ss, f"{fam}.{alt}.sample_size.{idx:03d}", des)
                idx += 1
    # rho -> 0: the paired t of the same d and n (families.json)
    fam_cases = {c["name"]: c for c in json.loads((HERE / "families.json").read_text())["cases"]}
    for i, ref_name in enumerate(["paired_t.greater.at_n.000", "paired_t.greater.at_n.006",
                                  "paired_t.less.at_n.036", "paired_t.two_sided.at_n.061",
                                  "paired_t.two_sided.at_n.072", "paired_t.greater.at_n.024"]):
        ref = fam_cases[ref_name]
        rd = {k: v for k, v in ref["design"].items() if k not in ("family", "n")}
        des = dict(rd, family=fam, test_train_ratio=1e-12)
        try_case(case_cv_at_n, f"{fam}.{des['alternative']}.at_n.tiny_rho{i}", des, ref["design"]["n"], ref)
    cv_refused()


def main():
    gf.self_check()
    clf_self_check()
    rng = np.random.default_rng(20261203)
    t0 = time.time()
    for label, fn in (("two_classifiers", lambda: gen_two_classifiers(rng)),
                      ("two_classifiers checks", gen_clf_checks),
                      ("two_classifiers all discordant", gen_clf_all_discordant),
                      ("two_learners_cv", gen_two_learners_cv)):
        t = time.time()
        fn()
        print(f"{label}: {time.time() - t:.1f} s", file=sys.stderr)
    cases = sorted(CASES, key=lambda c: c["name"])
    gf.write_reference("models.json", "tests/reference/gen_models.py", cases, SKIPPED,
                       ["two_classifiers", "two_learners_cv"],
                       ["at_n", "conditional", "decision", "sample_size", "refused"], sort_keys=True)
    print(f"total {time.time() - t0:.0f} s")

if __name__ == "__main__":
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        main()
