#!/usr/bin/python3
"""Reference values for heldout::delong_auc / delong_test / delong_covariance: a self-written
O(m n) implementation of the DeLong, DeLong & Clarke-Pearson (1988, Biometrics 44:837-845)
formulas in numpy (psi matrix by broadcasting, structural components V10/V01, S10/S01), with
normal quantiles and tail probabilities from scipy.stats.norm and scipy.stats.chi2. It is an
independent, deliberately naive route: no ranks, no sorting."""
import numpy as np
from scipy import stats

import refio


def delong(y, models):
    pos, neg = y == 1, y == 0
    m, n = pos.sum(), neg.sum()
    v10, v01, a = [], [], []
    for s in models:
        x, z = s[pos][:, None], s[neg][None, :]
        psi = (x > z) + 0.5 * (x == z)  # m x n
        v10.append(psi.mean(axis=1))
        v01.append(psi.mean(axis=0))
        a.append(psi.mean())
    v10, v01, a = np.array(v10), np.array(v01), np.array(a)
    s10 = np.cov(v10, ddof=1).reshape(len(models), len(models))
    s01 = np.cov(v01, ddof=1).reshape(len(models), len(models))
    return a, s10 / m + s01 / n


t = refio.Table(__file__)
rng = np.random.default_rng(20261203)
cases = 6
for case in range(cases):
    n = int(rng.integers(10, 400))
    y = rng.integers(0, 2, size=n)
    y[:2], y[2:4] = 1, 0
    k = 3
    base = rng.normal(size=n) + 0.8 * y
    models = [np.round(base + rng.normal(scale=0.6 + 0.3 * j, size=n), 1 if case % 2 else 3) for j in range(k)]
    a, cov = delong(y, models)
    level = [0.95, 0.9, 0.99][case % 3]
    zq = stats.norm.ppf(0.5 + level / 2)  # scipy.stats.norm
    se = np.sqrt(cov[0, 0])
    lg = np.log(a[0] / (1 - a[0]))
    h = zq * se / (a[0] * (1 - a[0]))
    d = a[0] - a[1]
    sed = np.sqrt(cov[0, 0] + cov[1, 1] - 2 * cov[0, 1])
    zz = d / sed
    L = np.array([[1.0, -1.0, 0.0], [0.0, 1.0, -1.0]])
    la = L @ a
    chi = la @ np.linalg.solve(L @ cov @ L.T, la)
    t.put(f"case{case}.truth", y)
    for j in range(k):
        t.put(f"case{case}.scores{j}", models[j])
    t.put(f"case{case}.level", level)
    t.put(f"case{case}.auc", a)
    t.put(f"case{case}.cov", cov.ravel())  # row-major k x k
    t.put(f"case{case}.logit", [1 / (1 + np.exp(-(lg - h))), 1 / (1 + np.exp(-(lg + h)))])
    t.put(f"case{case}.wald", [a[0] - zq * se, a[0] + zq * se])
    t.put(f"case{case}.test", [d, sed, zz, 2 * stats.norm.sf(abs(zz)), d - zq * sed, d + zq * sed])
    t.put(f"case{case}.chi2", [chi, 2, stats.chi2.sf(chi, 2)])  # scipy.stats.chi2
t.put("cases", cases)
t.close()
