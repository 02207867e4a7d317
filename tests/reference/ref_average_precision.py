#!/usr/bin/python3
"""Reference values for measure::average_precision and measure::auprc, and for pr_points: a
scripted numpy implementation of the grouped definitions of Davis & Goadrich 2006, worked by hand (rows sorted by
numpy.argsort, ties grouped with numpy.unique, cumulative sums with numpy.cumsum), on seeded
random data with heavy ties; weighted cases replicate rows by integer weights (numpy.repeat)."""
import numpy as np

import refio


def pr(y, s):
    thr, inv = np.unique(-s, return_inverse=True)  # distinct scores, decreasing
    tp = np.cumsum(np.bincount(inv, weights=(y == 1).astype(float), minlength=len(thr)))
    fp = np.cumsum(np.bincount(inv, weights=(y == 0).astype(float), minlength=len(thr)))
    return tp / (tp + fp), tp / tp[-1], -thr


def ap(y, s):
    p, r, _ = pr(y, s)
    return np.sum(np.diff(np.concatenate([[0.0], r])) * p)


def trap(y, s, p0=None):
    p, r, _ = pr(y, s)
    pp = np.concatenate([[1.0 if p0 is None else p[0]], p])
    return np.sum(np.diff(np.concatenate([[0.0], r])) * (pp[1:] + pp[:-1]) / 2)


t = refio.Table(__file__)
rng = np.random.default_rng(20261204)
cases = 6
for case in range(cases):
    n = int(rng.integers(5, 500))
    y = rng.integers(0, 2, size=n)
    y[0], y[1] = 1, 0
    s = np.round(rng.normal(size=n) + 0.6 * y, 1 if case % 2 else 2)
    w = rng.integers(0, 4, size=n)
    w[0] = 1
    rs, ry = np.repeat(s, w), np.repeat(y, w)  # integer weights = replicated rows
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.scores", s)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.ap", ap(y, s))
    t.put(f"case{case}.trap", trap(y, s))
    t.put(f"case{case}.trap_first", trap(y, s, p0=True))
    t.put(f"case{case}.wap", ap(ry, rs))
    t.put(f"case{case}.wtrap", trap(ry, rs))
    p, r, th = pr(y, s)
    t.put(f"case{case}.precision", p)
    t.put(f"case{case}.recall", r)
    t.put(f"case{case}.threshold", th)
t.put("cases", cases)
t.close()
