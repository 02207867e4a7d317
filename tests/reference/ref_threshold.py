#!/usr/bin/python3
"""Reference values for heldout::cost_optimal_threshold and youden_threshold: numpy brute force
over every candidate threshold (the distinct scores, decreasing, after +inf), rates by direct
broadcast comparison, expected cost pi1[(1-TPR)C10 + TPR C11] + pi0[FPR C01 + (1-FPR) C00],
numpy.argmin / numpy.argmax (first index = highest threshold among ties)."""
import numpy as np

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261207)
cases = 6
for case in range(cases):
    n = int(rng.integers(10, 400))
    y = rng.integers(0, 2, size=n)
    y[0], y[1] = 1, 0
    s = np.round(rng.normal(size=n) + 1.2 * y, 2)
    cost = np.array([[0.0, float(rng.uniform(0.5, 2))], [float(rng.uniform(1, 10)), 0.0]])
    if case == 2:
        cost[0, 0], cost[1, 1] = 0.1, -0.2  # any finite costs
    th = np.concatenate([[np.inf], np.unique(s)[::-1]])
    ge = s[None, :] >= th[:, None]
    tpr = (ge & (y == 1)).sum(axis=1) / (y == 1).sum()
    fpr = (ge & (y == 0)).sum(axis=1) / (y == 0).sum()
    prior = [None, 0.05, 0.5][case % 3]
    pi1 = (y == 1).mean() if prior is None else prior
    c = pi1 * ((1 - tpr) * cost[1, 0] + tpr * cost[1, 1]) + (1 - pi1) * (fpr * cost[0, 1] + (1 - fpr) * cost[0, 0])
    k = int(np.argmin(c))
    j = tpr - fpr
    kj = int(np.argmax(j))
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.scores", s)
    t.put(f"case{case}.cost", cost.ravel())
    t.put(f"case{case}.prior", -1.0 if prior is None else prior)
    t.put(f"case{case}.optimal", [th[k], c[k], tpr[k], fpr[k]])
    t.put(f"case{case}.youden", [th[kj], j[kj], tpr[kj], fpr[kj]])
t.put("cases", cases)
t.close()
