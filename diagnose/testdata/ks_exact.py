#!/usr/bin/python3
"""Golden values for diagnose.kolmogorovExactCDF: the exact two-sided
one-sample Kolmogorov-Smirnov survival function P(D_n >= d) from SciPy's
kstwo (Debian's python3-scipy). Run from the module root:

    /usr/bin/python3 diagnose/testdata/ks_exact.py > diagnose/testdata/ks_exact.json
"""
import json

import scipy
from scipy.stats import kstwo

cases = []
for n in (1, 2, 3, 4, 5, 7, 10, 15, 20, 30, 50, 75, 99):
    for d in (0.03, 0.05, 0.08, 0.1, 0.15, 0.2, 0.25, 0.3, 0.4, 0.5, 0.6, 0.75, 0.9, 0.99):
        if d <= 1 / (2 * n):
            continue  # D_n >= 1/(2n) always: P = 1
        cases.append({"n": n, "d": d, "sf": float(kstwo.sf(d, n))})
# The far upper tail, where 1 - P(D_n < d) cancels: compared relatively.
tail = []
for n, d in ((50, 0.62), (99, 0.5), (10, 0.9), (20, 0.7), (99, 0.3), (30, 0.6), (75, 0.45), (5, 0.99), (60, 0.4)):
    tail.append({"n": n, "d": d, "sf": float(kstwo.sf(d, n))})
print(json.dumps({"source": "scipy.stats.kstwo.sf, SciPy " + scipy.__version__, "cases": cases, "tail": tail}, indent=1))
