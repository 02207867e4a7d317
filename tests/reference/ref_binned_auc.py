#!/usr/bin/python3
"""Reference values for measure::binned_auc: the binned AUC is the exact AUC of the bin
indices (same-bin pairs are ties), so it is computed as scipy.stats.mannwhitneyu U/(m n) on
numpy.floor((s - low) * bins / (high - low)) (clamped to bins - 1); the exact AUC of the raw
scores (mannwhitneyu) and the bound sum_b P_b N_b / (2 P N) (numpy.bincount) go beside it."""
import numpy as np
from scipy import stats

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261209)
cases = 5
for case in range(cases):
    n = int(rng.integers(50, 3000))
    y = rng.integers(0, 2, size=n)
    y[0], y[1] = 1, 0
    s = 1 / (1 + np.exp(-(rng.normal(size=n) + 1.0 * y)))  # probabilities
    bins = [4, 16, 100, 1024, 7][case]
    low, high = 0.0, 1.0
    b = np.minimum(np.floor((s - low) * (bins / (high - low))), bins - 1).astype(int)
    pos, neg = y == 1, y == 0
    binned = stats.mannwhitneyu(b[pos], b[neg]).statistic / (pos.sum() * neg.sum())
    exact = stats.mannwhitneyu(s[pos], s[neg]).statistic / (pos.sum() * neg.sum())
    pb = np.bincount(b[pos], minlength=bins)
    nb = np.bincount(b[neg], minlength=bins)
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.scores", s)
    t.put(f"case{case}.bins", bins)
    t.put(f"case{case}.binned", binned)
    t.put(f"case{case}.exact", exact)
    t.put(f"case{case}.bound", (pb * nb).sum() / (2 * pos.sum() * neg.sum()))
t.put("cases", cases)
t.close()
