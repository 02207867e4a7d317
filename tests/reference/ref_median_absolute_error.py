#!/usr/bin/python3
"""Reference values for measure::median_absolute_error on seeded random inputs with ties
and weights: numpy.median of |y - f| unweighted; weighted (integer weights) as
numpy.median of the errors replicated w times (numpy.repeat), which is what the weighted
definition must reduce to; fractional weights by sorting (numpy.argsort + numpy.cumsum)
with the lower/upper weighted medians of the definition."""
import numpy as np

import refio


def weighted_median(e, w):
    order = np.argsort(e, kind="stable")
    e, w = e[order], w[order]
    c = np.cumsum(w)
    total = c[-1]
    lower = e[np.argmax(2 * c >= total)]
    upper = e[np.argmax(2 * c > total)]
    return 0.5 * (lower + upper)


t = refio.Table(__file__)
rng = np.random.default_rng(7304)
for case in range(6):
    n = int(rng.integers(1, 400)) if case else 6  # case 0: even n
    y = rng.normal(size=n).round(1)
    f = (y + rng.normal(scale=0.5, size=n)).round(1)  # many tied errors
    wi = rng.integers(0, 4, size=n).astype(float)
    wi[0] = 1.0
    wf = rng.random(size=n) + 0.05
    e = np.abs(y - f)
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.prediction", f)
    t.put(f"case{case}.int_weights", wi)
    t.put(f"case{case}.frac_weights", wf)
    t.put(f"case{case}.median", np.median(e))                                      # numpy.median
    t.put(f"case{case}.int_weighted", np.median(np.repeat(e, wi.astype(int))))    # replication
    t.put(f"case{case}.frac_weighted", weighted_median(e, wf))                    # sorting
t.close()
