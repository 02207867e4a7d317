#!/usr/bin/python3
"""Reference values for measure::rmse: numpy.sqrt(numpy.average((y - f)**2)) on seeded random
inputs with ties and weights."""
import numpy as np

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(7302)
for case in range(5):
    n = int(rng.integers(1, 500))
    y = rng.normal(loc=3.0, size=n).round(1)
    f = (y + rng.normal(scale=0.4, size=n)).round(2)
    w = rng.random(size=n).round(1)  # fractional weights, some 0
    w[0] = 0.5
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", f)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.rmse", np.sqrt(np.mean((y - f) ** 2)))
    t.put(f"case{case}.wrmse", np.sqrt(np.average((y - f) ** 2, weights=w)))
t.close()
