#!/usr/bin/python3
"""Independent cross-check of golden.json (made by golden.R) with numpy, scipy and statsmodels.

Run from anywhere with Debian's python3 (python3-numpy, python3-scipy, python3-statsmodels):
    /usr/bin/python3 testdata/noaa/golden_check.py
It recomputes a subset of the golden values from the CSV files in this folder and exits non-zero
if any differs from golden.json by more than the stated tolerance.
"""

import csv
import datetime
import json
import math
import os
import sys

import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import optimize, special, stats
from statsmodels.stats.diagnostic import acorr_ljungbox
from statsmodels.tsa.arima.model import ARIMA
from statsmodels.tsa.stattools import acf, pacf

HERE = os.path.dirname(os.path.abspath(__file__))
EPOCH = datetime.date(2000, 1, 1)
W = 2 * math.pi / 365.25

failures = []
checks = 0


def close(label, got, want, rtol, atol=0.0):
    global checks
    got = np.atleast_1d(np.asarray(got, dtype=float))
    want = np.atleast_1d(np.asarray(want, dtype=float))
    checks += 1
    if got.shape != want.shape or not np.allclose(got, want, rtol=rtol, atol=atol):
        failures.append(f"{label}: python {got.tolist()} vs R {want.tolist()}")


def design(t, k_max, trend):
    cols = [np.ones_like(t)]
    if trend:
        cols.append(t)
    for k in range(1, k_max + 1):
        cols.append(np.cos(k * W * t))
        cols.append(np.sin(k * W * t))
    return np.column_stack(cols)


def log_dstd_unit(z, nu):
    """Log density of the unit-variance Student-t."""
    s = math.sqrt((nu - 2) / nu)
    return stats.t.logpdf(z / s, nu) - math.log(s)


def log_dsstd(z, nu, xi):
    """Log density of the two-piece skewed t with mean 0 and variance 1 (written out from its definition)."""
    m1 = 2 * math.sqrt(nu - 2) / (nu - 1) / special.beta(0.5, nu / 2)
    mu = m1 * (xi - 1 / xi)
    sigma = math.sqrt((1 - m1**2) * (xi**2 + 1 / xi**2) + 2 * m1**2 - 1)
    u = z * sigma + mu
    scale = np.where(u >= 0, xi, 1 / xi)
    g = 2 / (xi + 1 / xi)
    return np.log(g) + log_dstd_unit(u / scale, nu) + math.log(sigma)


def check_city(key, gold):
    with open(os.path.join(HERE, key + ".csv"), newline="") as f:
        rows = list(csv.DictReader(f))
    dates = [datetime.date.fromisoformat(r["date"]) for r in rows]
    assert all((b - a).days == 1 for a, b in zip(dates, dates[1:])), "gap in the daily grid"
    y = np.array([(float(r["temp_max"]) + float(r["temp_min"])) / 2 for r in rows])
    t = np.array([(d - EPOCH).days for d in dates], dtype=float)
    n = len(y)
    close(f"{key} n", n, gold["n"], 0)

    # Mean model: statsmodels OLS. statsmodels' llf-based AIC/BIC do not count sigma; R's do.
    for k in range(1, 5):
        g = gold["ols"][f"K{k}"]
        r = sm.OLS(y, design(t, k, True)).fit()
        close(f"{key} K{k} coef", r.params, g["coef"], 1e-9, 1e-12)
        close(f"{key} K{k} se", r.bse, g["se"], 1e-9)
        close(f"{key} K{k} r2", r.rsquared, g["r2"], 1e-12)
        close(f"{key} K{k} rss", r.ssr, g["rss"], 1e-11)
        close(f"{key} K{k} bic", r.bic + math.log(n), g["bic"], 1e-12)
        close(f"{key} K{k} aic", r.aic + 2, g["aic"], 1e-12)
    g = gold["ols"]["K1_notrend"]
    r = sm.OLS(y, design(t, 1, False)).fit()
    close(f"{key} K1_notrend coef", r.params, g["coef"], 1e-10)

    fit = sm.OLS(y, design(t, 1, True)).fit()
    a, b, c, s = fit.params
    psi = math.atan2(s, c)
    sea = gold["seasonal"]
    close(f"{key} amplitude", math.hypot(c, s), sea["amplitude"], 1e-11)
    close(f"{key} peak_day", 1 + (psi / W) % 365.25, sea["peak_day"], 1e-11)
    close(f"{key} trough_day", 1 + (psi / W + 365.25 / 2) % 365.25, sea["trough_day"], 1e-11)
    close(f"{key} trend_per_decade", b * 3652.5, sea["trend_per_decade"], 1e-9)

    # AR(1) by conditional least squares, and exact ML for comparison.
    x = y - design(t, 1, True) @ fit.params
    phi = float(np.dot(x[1:], x[:-1]) / np.dot(x[:-1], x[:-1]))
    close(f"{key} ar1 phi", phi, gold["ar1"]["phi"], 1e-10)
    ml = ARIMA(x, order=(1, 0, 0), trend="n").fit()
    close(f"{key} ar1 exact-ML phi (statsmodels vs arima CSS-ML)", ml.params[0], gold["ar1"]["arima"]["phi"], 0, 1e-4)

    # AR order table on the common sample t = 6..n.
    lags = np.column_stack([x[5 - j : n - j] for j in range(1, 6)])
    for p in range(1, 6):
        r = sm.OLS(x[5:], lags[:, :p]).fit()
        close(f"{key} ar p{p} coef", r.params, gold["ar_order"][f"p{p}"]["coef"], 1e-9, 1e-12)
        close(f"{key} ar p{p} bic", r.bic + math.log(n - 5), gold["ar_order"][f"p{p}"]["bic"], 1e-12)

    # Innovations, monthly sigma, standardized shocks.
    e = x[1:] - phi * x[:-1]
    mon = np.array([d.month for d in dates[1:]])
    sig = np.array([np.std(e[mon == m], ddof=1) for m in range(1, 13)])
    close(f"{key} monthly sigma", sig, gold["monthly_sigma"]["sigma"], 1e-9)
    z = e / sig[mon - 1]

    sh = gold["shocks"]
    close(f"{key} normal loglik", stats.norm.logpdf(z).sum(), sh["normal"]["loglik"], 1e-12)
    nu_t = sh["student_t"]["nu"]
    close(f"{key} t loglik at R's nu", log_dstd_unit(z, nu_t).sum(), sh["student_t"]["loglik"], 1e-12)
    res = optimize.minimize_scalar(lambda v: -log_dstd_unit(z, v).sum(), bounds=(2.05, 300),
                                   method="bounded", options={"xatol": 1e-8})
    close(f"{key} t nu (scipy bounded)", res.x, nu_t, 1e-4)
    sk = sh["skewed_t"]
    close(f"{key} skewed-t loglik at R's (nu, xi)", log_dsstd(z, sk["nu"], sk["xi"]).sum(), sk["loglik"], 1e-12)
    res = optimize.minimize(lambda p: -log_dsstd(z, 2 + math.exp(p[0]), math.exp(p[1])).sum(),
                            [math.log(8), 0.0], method="Nelder-Mead",
                            options={"xatol": 1e-10, "fatol": 1e-12, "maxiter": 20000})
    close(f"{key} skewed-t loglik (scipy optimum)", -res.fun, sk["loglik"], 0, 1e-7)
    close(f"{key} skewed-t nu (scipy optimum; flat likelihood)", 2 + math.exp(res.x[0]), sk["nu"], 2e-3)
    close(f"{key} skewed-t xi (scipy optimum)", math.exp(res.x[1]), sk["xi"], 1e-5)

    # Diagnostics.
    dg = gold["diagnostics"]
    close(f"{key} acf", acf(x, nlags=30, fft=False)[1:], dg["acf"]["values"], 1e-9, 1e-12)
    close(f"{key} pacf", pacf(x, nlags=30, method="ldb")[1:], dg["pacf"]["values"], 1e-8, 1e-12)
    for v, fitdf, name in ((z, 1, "z"), (z**2, 0, "z2")):
        lb = acorr_ljungbox(v, lags=[10, 20], model_df=fitdf, return_df=True)
        for lag in (10, 20):
            want = dg["ljung_box"][f"{name}_lag{lag}"]
            close(f"{key} Ljung-Box {name} Q({lag})", lb.loc[lag, "lb_stat"], want["statistic"], 1e-10)
            close(f"{key} Ljung-Box {name} p({lag})", lb.loc[lag, "lb_pvalue"], want["p_value"], 1e-8)
    close(f"{key} skewness", stats.skew(z), dg["moments"]["skewness"], 1e-10)
    close(f"{key} excess kurtosis", stats.kurtosis(z), dg["moments"]["excess_kurtosis"], 1e-10)
    jb = stats.jarque_bera(z)
    close(f"{key} Jarque-Bera", [jb.statistic, jb.pvalue],
          [dg["jarque_bera"]["statistic"], dg["jarque_bera"]["p_value"]], 1e-10)
    st = math.sqrt((nu_t - 2) / nu_t)
    ks = stats.kstest(z, lambda q: stats.t.cdf(q / st, nu_t))
    close(f"{key} KS statistic", ks.statistic, dg["ks_student_t"]["statistic"], 1e-10)

    for L in (30, 151):
        nw = n // L
        m = x[: nw * L].reshape(nw, L).mean(axis=1)
        close(f"{key} sd of {L}-day means", np.std(m, ddof=1), gold["window_means"][f"w{L}"]["sd"], 1e-9)


def main():
    with open(os.path.join(HERE, "golden.json")) as f:
        gold = json.load(f)
    for key in ("seattle", "new_york"):
        check_city(key, gold[key])
    print(f"numpy {np.__version__}, scipy {scipy.__version__}, statsmodels {statsmodels.__version__}; "
          f"golden.json from {gold['source']['r']}, fGarch {gold['source']['fgarch']}")
    for msg in failures:
        print("MISMATCH", msg)
    print(f"golden_check: {checks - len(failures)} passed, {len(failures)} failed")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
