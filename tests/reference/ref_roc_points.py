#!/usr/bin/python3
"""Reference values for heldout::roc_points: a scripted numpy computation of the empirical ROC
(for each distinct score t, decreasing: FPR = #{neg >= t}/n, TPR = #{pos >= t}/m by direct
comparison with numpy broadcasting, no sorting), on seeded random data with ties and
integer weights; the trapezoid over the points (numpy.trapz) is checked against
scipy.stats.mannwhitneyu U/(m n)."""
import numpy as np
from scipy import stats

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261205)
cases = 5
for case in range(cases):
    n = int(rng.integers(3, 300))
    y = rng.integers(0, 2, size=n)
    y[0], y[1] = 1, 0
    s = np.round(rng.normal(size=n) + y, 1)
    w = rng.integers(0, 4, size=n).astype(float)
    w[0] = w[1] = 1
    th = np.unique(s)[::-1]
    ge = s[None, :] >= th[:, None]  # thresholds x rows
    tpr = np.concatenate([[0.0], (ge & (y == 1)).sum(axis=1) / (y == 1).sum()])
    fpr = np.concatenate([[0.0], (ge & (y == 0)).sum(axis=1) / (y == 0).sum()])
    wtpr = np.concatenate([[0.0], (ge * (w * (y == 1))).sum(axis=1) / (w * (y == 1)).sum()])
    wfpr = np.concatenate([[0.0], (ge * (w * (y == 0))).sum(axis=1) / (w * (y == 0)).sum()])
    assert abs(np.trapz(tpr, fpr) - stats.mannwhitneyu(s[y == 1], s[y == 0]).statistic / ((y == 1).sum() * (y == 0).sum())) < 1e-12
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.scores", s)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.threshold", th)
    t.put(f"case{case}.tpr", tpr)
    t.put(f"case{case}.fpr", fpr)
    t.put(f"case{case}.wtpr", wtpr)
    t.put(f"case{case}.wfpr", wfpr)
t.put("cases", cases)
t.close()
