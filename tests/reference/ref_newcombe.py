#!/usr/bin/python3
"""Reference values for heldout::newcombe_auc_interval: Newcombe's (2006, Statistics in Medicine
25:559-573, method 10 as recalled) score-type interval of an AUC — every theta with
(A - theta)^2 <= z^2 V(theta), V the Hanley & McNeil (1982) variance with N* = (m + n)/2 - 1 —
solved here with scipy.optimize.brentq on the same equation, z from scipy.stats.norm, and the
AUC of the scores by a naive O(m n) double loop in numpy. An independent route: a different
root finder and no ranks."""
import numpy as np
from scipy import optimize, stats

import refio


def variance(theta, m, n):
    ns = (m + n) / 2 - 1
    return theta * (1 - theta) * (1 + ns * ((1 - theta) / (2 - theta) + theta / (1 + theta))) / (m * n)


def interval(a, m, n, level):
    z = stats.norm.ppf(0.5 + level / 2)
    g = lambda th: (a - th) ** 2 - z * z * variance(th, m, n)
    # g < 0 strictly inside (0, 1) next to A; at A = 0 or 1 both terms vanish, so the bracket
    # starts a hair inside.
    ia = min(max(a, 1e-9), 1 - 1e-9)
    lo = 0.0 if a == 0 else optimize.brentq(g, 0.0, ia, xtol=1e-17, rtol=8.9e-16, maxiter=500)
    hi = 1.0 if a == 1 else optimize.brentq(g, ia, 1.0, xtol=1e-17, rtol=8.9e-16, maxiter=500)
    return lo, hi, np.sqrt(variance(a, m, n))


t = refio.Table(__file__)
# from (A, m, n, level), including A = 0 and 1 and one class of 1 row
grid = [(0.84, 10, 10, 0.95), (0.5, 5, 5, 0.95), (1.0, 5, 5, 0.95), (0.0, 3, 7, 0.9), (0.9, 4, 95, 0.95),
        (0.73, 30, 200, 0.99), (0.6, 1, 12, 0.95), (0.97, 25, 25, 0.8)]
for c, (a, m, n, level) in enumerate(grid):
    lo, hi, se = interval(a, m, n, level)
    t.put(f"grid{c}.in", [a, m, n, level])
    t.put(f"grid{c}.out", [lo, hi, se])
t.put("grid.count", [len(grid)])
# from scores with ties
rng = np.random.default_rng(20261204)
for c in range(4):
    m, n = [(5, 5), (3, 40), (12, 9), (30, 30)][c]
    y = np.r_[np.ones(m), np.zeros(n)].astype(int)
    s = np.round(rng.normal(size=m + n) + 1.2 * y, 1)
    psi = (s[y == 1][:, None] > s[y == 0][None, :]) + 0.5 * (s[y == 1][:, None] == s[y == 0][None, :])
    a = psi.mean()
    lo, hi, se = interval(a, m, n, 0.95)
    t.put(f"scores{c}.y", y)
    t.put(f"scores{c}.s", s)
    t.put(f"scores{c}.out", [a, lo, hi, se])
t.close()
