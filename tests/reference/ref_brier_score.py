#!/usr/bin/python3
"""Reference values for measure::brier_score (binary, Brier 1950's ML form) and
measure::multiclass_brier_score (the original multi-category form), by numpy.average on
seeded random inputs with ties and weights."""
import numpy as np

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(7306)
for case in range(5):
    n = int(rng.integers(1, 600))
    y = rng.integers(0, 2, size=n)
    p = rng.random(size=n).round(2)  # ties, and exact 0 and 1
    w = rng.integers(0, 4, size=n).astype(float)
    w[0] = 1.0
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", p)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.brier", np.mean((p - y) ** 2))
    t.put(f"case{case}.wbrier", np.average((p - y) ** 2, weights=w))
    # Multiclass rows from a Dirichlet, rounded then renormalised in the last column.
    k = int(rng.integers(2, 6))
    P = rng.dirichlet(np.ones(k), size=n).round(3)
    P[:, -1] = 1.0 - P[:, :-1].sum(axis=1)
    P = np.clip(P, 0.0, 1.0)
    P[:, -1] = 1.0 - P[:, :-1].sum(axis=1)
    ok = P[:, -1] >= 0
    P[~ok] = np.full(k, 1.0 / k)
    lab = rng.integers(0, k, size=n)
    onehot = np.eye(k)[lab]
    bs = np.sum((P - onehot) ** 2, axis=1)
    t.put(f"case{case}.k", [k])
    t.put(f"case{case}.labels", lab)
    t.put(f"case{case}.rows", P.ravel())
    t.put(f"case{case}.multi", np.mean(bs))
    t.put(f"case{case}.wmulti", np.average(bs, weights=w))
t.close()
