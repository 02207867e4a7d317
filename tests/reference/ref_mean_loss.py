#!/usr/bin/python3
"""Reference values for measure::mean_loss / measure::mse and the losses averaged through it:
numpy.average (weighted mean) of the per-row losses, on seeded random inputs with ties and
weights. Pinball: numpy.maximum form (Koenker & Bassett 1978); Huber: numpy.where form
(Huber 1964); Poisson deviance: scipy.special.xlogy; logistic: scipy.special.log_expit;
hinge: numpy.maximum; 0-1: numpy comparison."""
import numpy as np
from scipy.special import log_expit, xlogy

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
    e = y - f
    for tau in (0.1, 0.5, 0.9):
        rho = np.maximum(tau * e, (tau - 1) * e)
        t.put(f"case{case}.pinball{tau}", np.mean(rho))
        t.put(f"case{case}.wpinball{tau}", np.average(rho, weights=w))
    delta = 0.7
    hub = np.where(np.abs(e) <= delta, 0.5 * e**2, delta * (np.abs(e) - 0.5 * delta))
    t.put(f"case{case}.huber", np.mean(hub))
    t.put(f"case{case}.whuber", np.average(hub, weights=w))

    # Poisson deviance with a log link: counts y, log-means eta.
    mu_true = np.exp(rng.normal(scale=0.8, size=n))
    yc = rng.poisson(mu_true).astype(float)  # many ties and zeros
    eta = np.log(mu_true) + rng.normal(scale=0.3, size=n)
    mu = np.exp(eta)
    dev = 2 * (xlogy(yc, yc) - xlogy(yc, mu) - (yc - mu))  # xlogy(y, y) = 0 at y = 0
    t.put(f"case{case}.counts", yc)
    t.put(f"case{case}.logmean", eta)
    t.put(f"case{case}.poisson", np.mean(dev))
    t.put(f"case{case}.wpoisson", np.average(dev, weights=w))

    # Binary losses on logits (some large, for stability) and 0/1 truth.
    yb = rng.integers(0, 2, size=n).astype(float)
    logit = rng.normal(scale=3.0, size=n).round(1)  # ties, and exact zeros for the 0-1 threshold
    logit[: min(n, 3)] = [800.0, -900.0, 0.0][: min(n, 3)]
    logistic = -(yb * log_expit(logit) + (1 - yb) * log_expit(-logit))
    hinge = np.maximum(0.0, 1.0 - (2 * yb - 1) * logit)
    zero_one = ((logit >= 0).astype(float) != yb).astype(float)
    t.put(f"case{case}.label", yb)
    t.put(f"case{case}.logit", logit)
    t.put(f"case{case}.logistic", np.mean(logistic))
    t.put(f"case{case}.wlogistic", np.average(logistic, weights=w))
    t.put(f"case{case}.hinge", np.mean(hinge))
    t.put(f"case{case}.whinge", np.average(hinge, weights=w))
    t.put(f"case{case}.zero_one", np.mean(zero_one))
    t.put(f"case{case}.wzero_one", np.average(zero_one, weights=w))
t.close()
