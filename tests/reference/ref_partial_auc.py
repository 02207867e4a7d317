#!/usr/bin/python3
"""Reference values for measure::partial_auc: the empirical ROC vertices from numpy
(broadcast comparisons), cut at a and b with numpy.interp and integrated with numpy.trapz;
the McClish (1989) standardisation (1 + (pAUC - min)/(max - min))/2 with min = (b^2 - a^2)/2,
max = b - a; and scipy.stats.mannwhitneyu U/(m n) for the full range [0, 1]."""
import numpy as np
from scipy import stats

import refio


def roc(y, s, w):
    th = np.unique(s)[::-1]
    ge = s[None, :] >= th[:, None]
    tpr = np.concatenate([[0.0], (ge * (w * (y == 1))).sum(axis=1) / (w * (y == 1)).sum()])
    fpr = np.concatenate([[0.0], (ge * (w * (y == 0))).sum(axis=1) / (w * (y == 0)).sum()])
    return fpr, tpr


def pauc(fpr, tpr, a, b):
    inside = (fpr > a) & (fpr < b)
    xs = np.concatenate([[a], fpr[inside], [b]])
    ys = np.concatenate([[np.interp(a, fpr, tpr)], tpr[inside], [np.interp(b, fpr, tpr)]])
    return np.trapz(ys, xs)


t = refio.Table(__file__)
rng = np.random.default_rng(20261206)
cases = 6
for case in range(cases):
    n = int(rng.integers(20, 400))
    y = rng.integers(0, 2, size=n)
    y[0], y[1] = 1, 0
    s = np.round(rng.normal(size=n) + y, 1)
    w = rng.integers(1, 4, size=n).astype(float)
    a = float(rng.uniform(0, 0.3)) if case % 3 else 0.0
    b = float(a + rng.uniform(0.05, 0.6))
    fpr, tpr = roc(y, s, np.ones(n))
    wf, wt = roc(y, s, w)
    p = pauc(fpr, tpr, a, b)
    mn, mx = (b * b - a * a) / 2, b - a
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.scores", s)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.range", [a, b])
    t.put(f"case{case}.pauc", p)
    t.put(f"case{case}.mcclish", (1 + (p - mn) / (mx - mn)) / 2)
    t.put(f"case{case}.wpauc", pauc(wf, wt, a, b))
    t.put(f"case{case}.full", stats.mannwhitneyu(s[y == 1], s[y == 0]).statistic / ((y == 1).sum() * (y == 0).sum()))
t.put("cases", cases)
t.close()
