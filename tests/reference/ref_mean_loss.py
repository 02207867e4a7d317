#!/usr/bin/python3
"""Reference values for measure::mean_loss / measure::mse: numpy.average (weighted mean)
of the squared errors, on seeded random inputs with ties and weights."""
import numpy as np

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261201)
for case in range(5):
    n = int(rng.integers(1, 400))
    y = rng.normal(size=n).round(2)  # rounding creates ties
    f = y + rng.normal(scale=0.5, size=n)
    w = rng.integers(0, 5, size=n).astype(float)
    w[0] = 1.0  # never all-zero
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", f)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.mse", np.mean((y - f) ** 2))                      # numpy.mean
    t.put(f"case{case}.wmse", np.average((y - f) ** 2, weights=w))      # numpy.average
t.close()
