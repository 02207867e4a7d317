#!/usr/bin/python3
"""Reference values for measure::calibration_error / multiclass_calibration_error on seeded
random inputs with ties and weights. Equal-width bins: scipy.stats.binned_statistic
(statistic='sum') over the negated confidences with negated, reversed edges m/M, which
turns its left-closed bins [a, b) into the right-closed ((m-1)/M, m/M] of Naeini et al.
(2015) with confidence 0 in the first bin. Equal-count bins: numpy.argsort + numpy.cumsum
for the weighted quantile edges, numpy.searchsorted for the bin of each row."""
import numpy as np
from scipy.stats import binned_statistic

import refio


def sums_equal_width(c, h, w, M):
    edges = -(np.arange(M, -1, -1) / M)  # -1, ..., -1/M, 0 (division, like the library)
    out = []
    for v in (w, w * c, w * h):
        s = binned_statistic(-c, v, statistic="sum", bins=edges).statistic
        out.append(s[::-1])  # bin 0 = [0, 1/M]
    return out


def sums_equal_count(c, h, w, M):
    order = np.argsort(c, kind="stable")
    cum = np.cumsum(w[order])
    total = w.sum()
    thresholds = [c[order][np.argmax(cum * M >= m * total)] for m in range(1, M)]
    b = np.searchsorted(np.array(thresholds), c, side="left")  # #{m : c > t_m}
    return [np.bincount(b, weights=v, minlength=M) for v in (w, w * c, w * h)]


def ece_mce(W, C, H):
    total = W.sum()
    gap = np.abs(H - C)
    nz = W > 0
    return gap.sum() / total, np.max(gap[nz] / W[nz])


t = refio.Table(__file__)
rng = np.random.default_rng(7308)
for case in range(5):
    n = int(rng.integers(20, 800))
    y = rng.integers(0, 2, size=n)
    p = rng.random(size=n).round(2)  # ties, exact edges m/M, exact 0 and 1
    p[:4] = [0.0, 1.0, 0.07, 0.55]  # the edge cases of Naeini et al. 2015; Guo et al. 2017, worked by hand
    w = rng.integers(0, 4, size=n).astype(float)
    w[0] = 1.0
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", p)
    t.put(f"case{case}.weights", w)
    pred = (p >= 0.5).astype(int)
    top_c = np.where(p >= 0.5, p, 1 - p)
    top_h = (pred == y).astype(float)
    for M in (5, 10, 15, 100):
        for name, c, h in (("pos", p, y.astype(float)), ("top", top_c, top_h)):
            for wname, ww in (("u", np.ones(n)), ("w", w)):
                e, m = ece_mce(*sums_equal_width(c, h, ww, M))
                t.put(f"case{case}.width.{name}.{wname}.{M}", [e, m])
                e, m = ece_mce(*sums_equal_count(c, h, ww, M))
                t.put(f"case{case}.count.{name}.{wname}.{M}", [e, m])
    # Multiclass top-label on rows (argmax: first maximal column, numpy.argmax).
    k = int(rng.integers(3, 6))
    P = rng.dirichlet(np.ones(k), size=n).round(2)
    P[:, -1] = 1.0 - P[:, :-1].sum(axis=1)
    bad = P[:, -1] < 0
    P[bad] = 1.0 / k
    lab = rng.integers(0, k, size=n)
    arg = np.argmax(P, axis=1)
    c = P[np.arange(n), arg]
    h = (arg == lab).astype(float)
    t.put(f"case{case}.k", [k])
    t.put(f"case{case}.labels", lab)
    t.put(f"case{case}.rows", P.ravel())
    for M in (10, 15):
        e, m = ece_mce(*sums_equal_width(c, h, w, M))
        t.put(f"case{case}.multi.width.{M}", [e, m])
        e, m = ece_mce(*sums_equal_count(c, h, w, M))
        t.put(f"case{case}.multi.count.{M}", [e, m])
t.close()
