#!/usr/bin/python3
"""Reference values for measure::auc and heldout::ranked_sample: scipy.stats.mannwhitneyu
U statistic of the positives divided by m*n, on seeded random data with heavy ties; weighted
cases replicate each row by its integer weight (np.repeat) before calling mannwhitneyu."""
import numpy as np
from scipy import stats

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261202)
cases = 8
for case in range(cases):
    n = int(rng.integers(2, 600)) if case < cases - 1 else 20000
    levels = int(rng.integers(2, 40))  # few distinct values: heavy ties
    y = rng.integers(0, 2, size=n)
    y[0], y[1] = 0, 1  # both classes present
    s = (rng.normal(size=n) + 0.7 * y).round(1) if case % 2 else rng.integers(0, levels, size=n) / levels
    if case == 3:
        s = s.astype(np.float32).astype(np.float64)  # exactly representable as float32
    w = rng.integers(0, 5, size=n)
    w[0], w[1] = 1, 1  # each class keeps some weight
    pos, neg = s[y == 1], s[y == 0]
    auc = stats.mannwhitneyu(pos, neg).statistic / (len(pos) * len(neg))  # scipy.stats.mannwhitneyu
    rs, ry = np.repeat(s, w), np.repeat(y, w)  # integer weights = replicated rows
    rpos, rneg = rs[ry == 1], rs[ry == 0]
    wauc = stats.mannwhitneyu(rpos, rneg).statistic / (len(rpos) * len(rneg))
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.scores", s)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.auc", auc)
    t.put(f"case{case}.wauc", wauc)
t.put("cases", cases)
t.close()
