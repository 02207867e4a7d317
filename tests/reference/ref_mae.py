#!/usr/bin/python3
"""Reference values for measure::mae: numpy.average of |y - f| (weighted and not) on
seeded random inputs with ties and weights."""
import numpy as np

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(7301)
for case in range(5):
    n = int(rng.integers(1, 500))
    y = rng.normal(size=n).round(1)  # ties
    f = (y + rng.normal(scale=0.7, size=n)).round(2)
    w = rng.integers(0, 4, size=n).astype(float)
    w[0] = 2.0
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", f)
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.mae", np.mean(np.abs(y - f)))                   # numpy.mean
    t.put(f"case{case}.wmae", np.average(np.abs(y - f), weights=w))    # numpy.average
t.close()
