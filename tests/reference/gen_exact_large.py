#!/usr/bin/env python3
"""Reference solves of the exact binomial at large n, beside families.json.

The design p0 = .5 against p1 = .51 (alpha_max .05, beta_max .2, w = 1/2)
needs n = 30,934 two-sided (26,899 one-sided): the sizes where the engine's
two-sided threshold walk stops early. A full scan of every n up to 2 n in
Python is too slow to serve as a reference for the sample-size search, so
this script pins the solves at the n the search reports and next to them:
the Youden n and n - 1, the "stable from" n and n - 1, and checked_to.

Every case is built by gen_families.case_at_n_exact (exhaustive evaluation
of every rejection region with scipy.stats.binom, ties within 1e-12
relative, pick = smallest alpha; DEVELOPERS.md conventions), in the schema
of families.json, and written to exact_large.json; tests/reference_families.rs
checks both files the same way.

Run: python3 tests/reference/gen_exact_large.py (SciPy 1.17.1, NumPy,
statsmodels 0.15.0 and mpmath 1.3.0 as for gen_families.py; the versions
used are written into the output).
"""

import json
import platform
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

import gen_families as G  # noqa: E402

DESIGN = {"family": "proportion_exact", "alpha_max": 0.05, "beta_max": 0.2,
          "theta0": 0.5, "theta1": 0.51}

# (alternative, n): the engine's sample-size answers for this design and
# their neighbours (Youden n, stable-from n, checked_to).
POINTS = [("two_sided", n) for n in (30933, 30934, 31231, 31232, 61868)] + \
         [("greater", n) for n in (26898, 26899, 27198, 27199, 53798)]


def main():
    for alt, n in POINTS:
        des = dict(DESIGN, alternative=alt)
        G.case_at_n_exact(f"proportion_exact.{alt}.at_n.large_{n}", des, n)
    out = {"generator": "tests/reference/gen_exact_large.py (cases built by gen_families.case_at_n_exact)",
           "versions": {"python": platform.python_version(), "scipy": G.scipy.__version__,
                        "statsmodels": G.statsmodels.__version__, "numpy": G.np.__version__,
                        "mpmath": G.mp.__version__},
           "cases": G.CASES}
    path = HERE / "exact_large.json"
    path.write_text(json.dumps(out, indent=1, allow_nan=False) + "\n")
    for c in G.CASES:
        e = c["expect"]
        print(c["name"], e.get("k_low", e.get("k_star")), e.get("k_high", ""),
              e["alpha_star"], e["beta_star"], e["conclusive"], e["ties"])
    print(f"wrote {path}, {len(G.CASES)} cases")


if __name__ == "__main__":
    main()
