#!/usr/bin/python3
"""Reference values for measure::r_squared: 1 - SSE/SST with the test set's own (weighted)
mean, numpy.average / numpy.sum, on seeded random inputs with ties and weights; and, for
unit weights, 1 - SSE / (n * numpy.var(y)) as a second route."""
import numpy as np

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(7305)
for case in range(5):
    n = int(rng.integers(3, 500))
    y = (1e3 + rng.normal(size=n)).round(2)  # offset: centring matters; rounding: ties
    f = (y + rng.normal(scale=0.8 if case != 4 else 3.0, size=n)).round(2)  # case 4: R^2 < 0
    w = rng.integers(0, 4, size=n).astype(float)
    w[:2] = [1.0, 2.0]
    if y[0] == y[1]:
        y[1] += 0.5
    sse = np.sum((y - f) ** 2)
    wmean = np.average(y, weights=w)
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", f)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.r2", 1 - sse / np.sum((y - y.mean()) ** 2))
    t.put(f"case{case}.r2_var", 1 - sse / (n * np.var(y)))                            # numpy.var
    t.put(f"case{case}.wr2", 1 - np.sum(w * (y - f) ** 2) / np.sum(w * (y - wmean) ** 2))
t.close()
