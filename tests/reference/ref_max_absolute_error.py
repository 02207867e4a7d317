#!/usr/bin/python3
"""Reference values for measure::max_absolute_error: numpy.max of |y - f| over all rows and
over the rows of positive weight, on seeded random inputs with ties and weights."""
import numpy as np

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(7303)
for case in range(5):
    n = int(rng.integers(2, 300))
    y = rng.normal(size=n).round(1)
    f = (y + rng.standard_t(3, size=n)).round(1)  # heavy tails, ties
    w = rng.integers(0, 3, size=n).astype(float)
    w[0] = 1.0
    e = np.abs(y - f)
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", f)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.max", np.max(e))
    t.put(f"case{case}.wmax", np.max(e[w > 0]))
t.close()
