#!/usr/bin/python3
"""Test-set planning (include/heldout/planning/test_rows.hpp), recomputed with numpy/scipy:

  prop.*  smallest n with Wilson half-width z sqrt(n p (1-p) + z^2/4) / (n + z^2) <= h, found
          from the closed-form root of the quadratic h^2 (n + z^2)^2 = z^2 (n p (1-p) + z^2/4)
          (numpy.roots), rounded up, then checked at n and n - 1; z = scipy.stats.norm.ppf.
  auc.*   smallest n with z SE <= h, SE of Hanley & McNeil (1982) eq. (2), n1 = floor(n pi + 1/2),
          found by a plain linear scan over n (no bisection).
  mcn.*   Connor (1987) closed form n = (z_{1-a/2} sqrt(psi) + z_{power} sqrt(psi - d^2))^2 / d^2,
          rounded up (math.ceil), z from scipy.stats.norm.ppf.
"""
import math

import numpy as np
from scipy import stats

import refio

t = refio.Table(__file__)


def wilson_half(p, n, z):
    return z * math.sqrt(n * p * (1 - p) + z * z / 4) / (n + z * z)


rows = []
for p in (0.5, 0.1, 0.02, 0.0, 0.3, 0.95):
    for h in (0.05, 0.02, 0.01, 0.003):
        for lev in (0.95, 0.9, 0.99):
            z = stats.norm.ppf(0.5 + lev / 2)
            q = p * (1 - p)
            # h^2 n^2 + (2 h^2 z^2 - z^2 q) n + h^2 z^4 - z^4/4 = 0
            roots = np.roots([h * h, 2 * h * h * z * z - z * z * q, h * h * z ** 4 - z ** 4 / 4])
            n = max(1, math.ceil(max(r.real for r in roots)))
            while wilson_half(p, n, z) > h:
                n += 1
            while n > 1 and wilson_half(p, n - 1, z) <= h:
                n -= 1
            rows += [p, h, lev, n]
t.put("prop", rows)


def hm_se(a, n1, n0):
    q1, q2 = a / (2 - a), 2 * a * a / (1 + a)
    return math.sqrt((a * (1 - a) + (n1 - 1) * (q1 - a * a) + (n0 - 1) * (q2 - a * a)) / (n1 * n0))


rows = []
for a in (0.3, 0.7, 0.85, 0.95):
    for pi in (0.5, 0.1, 0.03):
        for h in (0.05, 0.03):
            for lev in (0.95, 0.9):
                z = stats.norm.ppf(0.5 + lev / 2)
                n = 2
                while True:
                    n1 = math.floor(n * pi + 0.5)
                    if 1 <= n1 < n and z * hm_se(a, n1, n - n1) <= h:
                        break
                    n += 1
                rows += [a, pi, h, lev, n]
t.put("auc", rows)

rows = []
for psi in (0.1, 0.2, 0.35):
    for d in (0.03, 0.05, 0.08):
        if d >= psi:
            continue
        for alpha in (0.05, 0.01):
            for power in (0.8, 0.9):
                za = stats.norm.ppf(1 - alpha / 2)
                zb = stats.norm.ppf(power)
                n = math.ceil((za * math.sqrt(psi) + zb * math.sqrt(psi - d * d)) ** 2 / (d * d))
                rows += [psi, d, alpha, power, n]
t.put("mcn", rows)
t.close()
