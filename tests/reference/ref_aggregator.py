#!/usr/bin/python3
"""Reference values for include/heldout/estimate/aggregator.hpp: the interval an estimate
gets through the aggregator's dispatch, computed here directly from the recorded data.

Sources, by entry prefix:
  one.*     one test set, squared errors: scipy.stats.t.interval(level, n - 1, loc=mean,
            scale=sem) on the per-row losses (numpy.var ddof=1). scipy 1.10.1 t.ppf is off by
            up to ~1e-9 relative (checked against R 4.2.2 qt): compare at 1e-8.
  bin.*     one test set, 0/1 errors: scipy.stats.binomtest(k, n).proportion_ci(level,
            method='wilson' | 'exact'); Agresti-Coull (Agresti & Coull 1998) as the formula
            with scipy.stats.norm.ppf.
  cv.*      repeated splits, per-split MSE: the Nadeau-Bengio (2003) corrected interval and the
            naive t over splits with scipy.stats.t.ppf; the pooled MSE with numpy.mean.
"""
import numpy as np
from scipy import stats

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261207)

# ---- one test set, regression
n = 57
y = rng.normal(size=n).round(2)
f = y + rng.normal(scale=0.7, size=n)
loss = (y - f) ** 2
t.put("one.truth", y)
t.put("one.prediction", f)
for lev in (0.95, 0.9):
    m = np.mean(loss)
    sem = np.sqrt(np.var(loss, ddof=1) / n)
    lo, hi = stats.t.interval(lev, n - 1, loc=m, scale=sem)  # scipy.stats.t.interval
    key = f"one.L{int(round(lev * 100))}"
    t.put(key + ".mean", m)
    t.put(key + ".se", sem)
    t.put(key + ".lower", lo)
    t.put(key + ".upper", hi)

# ---- one test set, classification errors
n = 83
yl = rng.integers(0, 3, size=n)
fl = np.where(rng.random(n) < 0.8, yl, rng.integers(0, 3, size=n))
k = int(np.sum(yl != fl))
t.put("bin.truth", yl)
t.put("bin.prediction", fl)
t.put("bin.k", k)
for lev in (0.95, 0.8):
    key = f"bin.L{int(round(lev * 100))}"
    w = stats.binomtest(k, n).proportion_ci(confidence_level=lev, method="wilson")
    e = stats.binomtest(k, n).proportion_ci(confidence_level=lev, method="exact")
    z = stats.norm.ppf(0.5 + lev / 2)
    nt = n + z * z
    pt = (k + z * z / 2) / nt
    half = z * np.sqrt(pt * (1 - pt) / nt)
    t.put(key + ".wilson", [w.low, w.high])
    t.put(key + ".exact", [e.low, e.high])
    t.put(key + ".ac", [max(0.0, pt - half), min(1.0, pt + half)])

# ---- repeated splits: J random subsamples of a data set of N rows
N, J, ntest = 120, 15, 30
yy = rng.normal(size=N)
ff = yy + rng.normal(scale=0.5, size=N)
t.put("cv.truth", yy)
t.put("cv.prediction", ff)
vals = []
all_losses = []
for j in range(J):
    test = np.sort(rng.choice(N, size=ntest, replace=False))
    t.put(f"cv.split{j}.test", test)
    l = (yy[test] - ff[test]) ** 2
    vals.append(np.mean(l))
    all_losses.append(l)
vals = np.array(vals)
t.put("cv.values", vals)
t.put("cv.pooled", np.mean(np.concatenate(all_losses)))  # numpy.mean over all test rows
for lev in (0.95, 0.9):
    key = f"cv.L{int(round(lev * 100))}"
    m = np.mean(vals)
    s2 = np.var(vals, ddof=1)
    q = stats.t.ppf(0.5 + lev / 2, J - 1)
    se_c = np.sqrt((1 / J + ntest / (N - ntest)) * s2)  # Nadeau & Bengio (2003)
    se_n = np.sqrt(s2 / J)
    t.put(key + ".mean", m)
    t.put(key + ".corrected", [se_c, m - q * se_c, m + q * se_c])
    t.put(key + ".naive", [se_n, m - q * se_n, m + q * se_n])
t.close()
