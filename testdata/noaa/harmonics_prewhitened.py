"""Reference values for the harmonics table's prewhitened BIC on the NOAA series in this folder.

Run from the repository root with Debian's python3 and python3-numpy:
    /usr/bin/python3 testdata/noaa/harmonics_prewhitened.py
It reads seattle.csv and new_york.csv and writes harmonics_prewhitened.json.

Conventions (the Go fit's, calibrate.Fit with a linear trend):
  y = (temp_max + temp_min) / 2, t = days since 2000-01-01, w = 2*pi/365.25
  mean model with K harmonics: columns 1, t, cos(k w t), sin(k w t) for k = 1..K, by least squares
  rho = lag-1 autocorrelation of the K = 4 residuals r: sum r[t] r[t-1] / sum r[t-1]^2
        (over consecutive days; these records have no gaps)
  prewhitened regression (Cochrane-Orcutt): y[t] - rho y[t-1] on x[t] - rho x[t-1], t = 2..n
  BIC = n log(2 pi RSS / n) + n + (k + 1) log n, n rows, k columns (R's BIC of an lm)
The plain OLS BIC of each K is written too (it equals R's, golden.json).
"""
import csv
import json
import math
import datetime

import numpy as np

DIR = "testdata/noaa"
EPOCH = datetime.date(2000, 1, 1)
W = 2 * math.pi / 365.25


def read(city):
    t, y = [], []
    with open(f"{DIR}/{city}.csv") as f:
        for row in csv.DictReader(f):
            d = datetime.date.fromisoformat(row["date"])
            t.append((d - EPOCH).days)
            y.append((float(row["temp_max"]) + float(row["temp_min"])) / 2)
    t, y = np.array(t, float), np.array(y, float)
    assert np.all(np.diff(t) == 1), "a gap: the prewhitening pairs would need it"
    return t, y


def design(t, K):
    cols = [np.ones_like(t), t]
    for k in range(1, K + 1):
        cols += [np.cos(k * W * t), np.sin(k * W * t)]
    return np.column_stack(cols)


def bic(x, y):
    beta, *_ = np.linalg.lstsq(x, y, rcond=None)
    rss = float(np.sum((y - x @ beta) ** 2))
    n, k = x.shape
    return n * math.log(2 * math.pi * rss / n) + n + (k + 1) * math.log(n), y - x @ beta


out = {"source": f"numpy {np.__version__} (Debian python3-numpy); testdata/noaa/harmonics_prewhitened.py"}
for city in ["seattle", "new_york"]:
    t, y = read(city)
    _, r = bic(design(t, 4), y)
    rho = float(np.sum(r[1:] * r[:-1]) / np.sum(r[:-1] ** 2))
    rows = []
    for K in range(1, 5):
        x = design(t, K)
        ols_bic, _ = bic(x, y)
        pw_bic, _ = bic(x[1:] - rho * x[:-1], y[1:] - rho * y[:-1])
        rows.append({"k": K, "bic_prewhitened": pw_bic, "bic_ols": ols_bic})
    best = min(rows, key=lambda r: r["bic_prewhitened"])["k"]
    out[city] = {"rho": rho, "harmonics": rows, "best_k": best}

with open(f"{DIR}/harmonics_prewhitened.json", "w") as f:
    json.dump(out, f, indent=2)
    f.write("\n")
print(json.dumps({c: (out[c]["rho"], out[c]["best_k"]) for c in ["seattle", "new_york"]}))
