#!/usr/bin/python3
"""Reference values for measure::cross_entropy (binary) and multiclass_cross_entropy:
-numpy.average of scipy.special.xlogy(y, p) + scipy.special.xlog1py(1 - y, -p) (binary) and
of numpy.log(p[i, y_i]) (multiclass), with numpy.clip for the eps policy, on seeded random
inputs with ties and weights."""
import numpy as np
from scipy.special import xlog1py, xlogy

import refio


def binary(y, p, w=None):
    return -np.average(xlogy(y, p) + xlog1py(1 - y, -p), weights=w)


t = refio.Table(__file__)
rng = np.random.default_rng(7307)
for case in range(5):
    n = int(rng.integers(1, 1500))
    y = rng.integers(0, 2, size=n)
    p = np.clip(rng.beta(0.7, 0.7, size=n).round(3), 1e-3, 1 - 1e-3)  # ties, near the ends
    p[: min(n, 2)] = [1e-12, 1 - 1e-12][: min(n, 2)]  # tiny tails: log1p accuracy matters
    w = rng.integers(0, 4, size=n).astype(float)
    w[0] = 1.0
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", p)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.ce", binary(y, p))
    t.put(f"case{case}.wce", binary(y, p, w))
    # Exact 0 and 1 with clipping eps = 1e-7 (numpy.clip).
    q = rng.random(size=n).round(1)
    t.put(f"case{case}.edge_prediction", q)
    t.put(f"case{case}.ce_eps", binary(y, np.clip(q, 1e-7, 1 - 1e-7)))
    t.put(f"case{case}.wce_eps", binary(y, np.clip(q, 1e-7, 1 - 1e-7), w))
    # Multiclass rows.
    k = int(rng.integers(2, 6))
    P = rng.dirichlet(np.ones(k), size=n)
    lab = rng.integers(0, k, size=n)
    ll = -np.log(P[np.arange(n), lab])
    t.put(f"case{case}.k", [k])
    t.put(f"case{case}.labels", lab)
    t.put(f"case{case}.rows", P.ravel())
    t.put(f"case{case}.multi", np.mean(ll))
    t.put(f"case{case}.wmulti", np.average(ll, weights=w))
t.close()
