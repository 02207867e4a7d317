#!/usr/bin/python3
"""Writes the small prediction files used by the heldout tool's end-to-end tests.

Invented data, seeded (Python's random module, seed 8): pumps with a latent risk, a
"logistic" model whose probabilities follow the risk closely, a "knn" model that is
noisier and coarser (multiples of 1/15), and raw scores (log-odds) for a third model.
Run from anywhere: python3 tests/data/make_data.py  (rewrites the files beside it).
The hand-written error cases (bad_*.csv) are not generated here.
"""
import math
import os
import random

here = os.path.dirname(os.path.abspath(__file__))
rng = random.Random(8)
n = 300
rows = []
for i in range(n):
    risk = rng.gauss(-1.8, 1.3)
    p = 1 / (1 + math.exp(-risk))
    y = 1 if rng.random() < p else 0
    logistic = 1 / (1 + math.exp(-(risk + rng.gauss(0, 0.5))))
    knn = min(15, max(0, round(15 * (p + rng.gauss(0, 0.15))))) / 15
    logit = risk + rng.gauss(0, 0.8)
    rows.append((i, y, logistic, knn, logit))

def write(name, header, lines):
    with open(os.path.join(here, name), "w", newline="") as f:
        f.write(",".join(header) + "\n")
        for line in lines:
            f.write(",".join(str(v) for v in line) + "\n")

# wide layout: one column per model (repr of floats: round-trip text)
write("wide.csv", ["pump", "failed", "logistic", "knn", "margin"],
      [(i, y, repr(a), repr(b), repr(c)) for i, y, a, b, c in rows])
# long layout: one row per (model, pump), a model column
write("long.csv", ["model", "pump", "failed", "p"],
      [("logistic", i, y, repr(a)) for i, y, a, b, c in rows] + [("knn", i, y, repr(b)) for i, y, a, b, c in rows])
# resampled: a 10-fold split column (fold = pump mod 10 after a seeded shuffle)
order = list(range(n))
rng.shuffle(order)
fold = [0] * n
for k, i in enumerate(order):
    fold[i] = k % 10
write("resampled.csv", ["pump", "fold", "failed", "logistic", "knn"],
      [(i, "fold%d" % fold[i], y, repr(a), repr(b)) for i, y, a, b, c in rows])
