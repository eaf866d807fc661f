#!/usr/bin/env python3
"""Reference summaries of data files for tests/reference_describe.rs.

    /path/to/venv/bin/python tests/reference/gen_describe.py

Writes the data files in tests/reference/data/ (seeded NumPy draws, rounded
as a user's export would be; invented measurements of a fictional clinic)
and tests/reference/describe.json with, per group of each mapping:
- n, mean, variance (ddof=1), skewness and excess kurtosis from
  scipy.stats.describe(x, bias=False) (G1 and G2, Fisher's definition),
- median, min, max from NumPy,
- the histogram of numpy.histogram(x, bins="auto"),
- normal quantile plot points at Blom's positions (i - 3/8)/(n + 1/4),
  quantiles from scipy.stats.norm.ppf.
Library versions are recorded in the JSON.
"""
import json
import os
import platform

import numpy as np
import scipy
from scipy import stats

HERE = os.path.dirname(os.path.abspath(__file__))
DATA = os.path.join(HERE, "data")
os.makedirs(DATA, exist_ok=True)
rng = np.random.default_rng(20261202)


def write(name, text):
    with open(os.path.join(DATA, name), "w", encoding="utf-8", newline="") as f:
        f.write(text)


def col(x, fmt="{:.2f}"):
    return [fmt.format(v) for v in x]


# Systolic blood pressure, one column, decimal point.
bp = np.round(rng.normal(128, 14, 50), 1)
write("blood_pressure.csv", "systolic_mmHg\n" + "\n".join(col(bp, "{:.1f}")) + "\n")

# Length of stay in days: right-skewed, small n.
stay = np.round(rng.lognormal(1.2, 0.8, 30), 2)
write("length_of_stay.csv", "days\n" + "\n".join(col(stay)) + "\n")

# A large offset with a small spread: naive sums of squares lose every digit.
big = 1e9 + np.round(rng.normal(0, 0.01, 1000), 6)
write("large_offset.csv", "reading\n" + "\n".join(repr(float(v)) for v in big) + "\n")

# Four values: the smallest n with an excess kurtosis.
write("four_values.csv", "score\n2\n3\n7\n11\n")

# Heavy tails (t with 3 df), decimal comma and semicolons, with thousands separators.
heavy = np.round(1500 + 200 * rng.standard_t(3, 200), 2)
write("heavy_tails_comma.csv", "Betrag\n" + "\n".join(f"{v:,.2f}".replace(",", " ").replace(".", ",") for v in heavy) + "\n")

# Two groups in long format, semicolon and decimal comma, different n and sd.
a = np.round(rng.normal(31.5, 4.0, 23), 2)
b = np.round(rng.normal(28.0, 9.0, 31), 2)
rows = [("Nord", v) for v in a] + [("Süd", v) for v in b]
order = rng.permutation(len(rows))
write("two_wards.csv", "Station;Minuten\n" + "\n".join(f"{rows[i][0]};{rows[i][1]:.2f}".replace(".", ",") for i in order) + "\n")

# Paired before/after with one side missing in two rows.
before = np.round(rng.normal(150, 12, 25), 0)
after = np.round(before - rng.normal(6, 5, 25), 0)
lines = []
for i, (x, y) in enumerate(zip(before, after)):
    xs = "NA" if i == 4 else f"{x:.0f}"
    ys = "" if i == 17 else f"{y:.0f}"
    lines.append(f"{i + 1},{xs},{ys}")
write("before_after.csv", "patient,before,after\n" + "\n".join(lines) + "\n")
diffs = np.array([x - y for i, (x, y) in enumerate(zip(before, after)) if i not in (4, 17)])

# Integer scores with many ties (odd n).
likert = rng.integers(1, 6, 101)
write("ratings.csv", "rating\n" + "\n".join(str(v) for v in likert) + "\n")


def shifted(x):
    """Describe x - x[0] instead of x: exact for data within a factor of two
    of x[0], and moments do not change under a shift. For the 1e9-sized
    readings NumPy's mean is rounded to 1.2e-7 (one ulp), which moves the
    third moment about it by 5e-4 relative; the shifted data avoid that."""
    x = np.asarray(x, dtype=float)
    g = group(x - x[0])
    for k in ("mean", "median", "min", "max"):
        g[k] += float(x[0])
    g["histogram"] = group(x)["histogram"]
    g["qq"] = group(x)["qq"]
    return g


def group(x):
    x = np.asarray(x, dtype=float)
    d = stats.describe(x, ddof=1, bias=False)
    n = len(x)
    hist_counts, hist_edges = np.histogram(x, bins="auto")
    pos = (np.arange(1, n + 1) - 0.375) / (n + 0.25)
    qq = list(zip(stats.norm.ppf(pos).tolist(), np.sort(x).tolist()))
    return {
        "n": int(d.nobs),
        "mean": float(d.mean),
        "sd": float(np.sqrt(d.variance)),
        "median": float(np.median(x)),
        "min": float(d.minmax[0]),
        "max": float(d.minmax[1]),
        "skewness": float(d.skewness),
        "excess_kurtosis": float(d.kurtosis),
        "histogram": {"edges": hist_edges.tolist(), "counts": hist_counts.tolist()},
        "qq": qq,
    }


cases = [
    {"file": "blood_pressure.csv", "mapping": {"kind": "one_column", "column": 0}, "groups": [group(bp)]},
    {"file": "length_of_stay.csv", "mapping": {"kind": "one_column", "column": 0}, "groups": [group(stay)]},
    {"file": "large_offset.csv", "mapping": {"kind": "one_column", "column": 0}, "groups": [shifted(big)]},
    {"file": "four_values.csv", "mapping": {"kind": "one_column", "column": 0}, "groups": [group([2, 3, 7, 11])]},
    {"file": "heavy_tails_comma.csv", "mapping": {"kind": "one_column", "column": 0}, "groups": [group(heavy)]},
    {
        "file": "two_wards.csv",
        "mapping": {"kind": "two_groups", "value": 1, "group": 0, "level1": "Nord", "level2": "Süd"},
        "groups": [group(a), group(b)],
    },
    {"file": "before_after.csv", "mapping": {"kind": "paired", "first": 1, "second": 2}, "groups": [group(diffs)]},
    {"file": "ratings.csv", "mapping": {"kind": "one_column", "column": 0}, "groups": [group(likert)]},
]

out = {
    "generator": "tests/reference/gen_describe.py",
    "versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
    "cases": cases,
}
with open(os.path.join(HERE, "describe.json"), "w") as f:
    json.dump(out, f, indent=1, sort_keys=True)
    f.write("\n")
print(len(cases), "cases;", out["versions"])
