#!/usr/bin/python3
"""Writes CSV files of every task of the heldout tool into a directory (run by run_tool.cmake
through SETUP=tasks, before the tool runs). Seeded (numpy's default_rng), so every run writes
the same files.

usage: make_tasks.py DIR

  regression.csv        300 rows: y, ridge, tree (predictions), fold (10 folds)
  multiclass.csv        240 rows, 3 classes: y; labels by a model 'vote'; class probabilities
                        of two models in columns soft:0..2 and mlp:0..2 (the out-of-fold
                        writer's NAME:j names); fold (8 folds)
  multiclass_long.csv   the same in the long layout: y, model, p:0..2, fold
  query.csv             40 queries of 6 to 12 items: qid, rel (0..3), bm25, neural, fold
                        (5 folds, grouped by query); ties in the scores
  query_small.csv       12 queries: exact enumeration of the sign-flip test (<= 20 queries)
  censored.csv          200 rows: time, event (about 30% censored), cox, forest (risk
                        scores), fold (5 folds)
"""
import os
import sys

import numpy as np

out = sys.argv[1]
os.makedirs(out, exist_ok=True)
rng = np.random.default_rng(20261204)


def write(name, header, rows):
    with open(os.path.join(out, name), "w", newline="") as f:
        f.write(",".join(header) + "\n")
        for r in rows:
            f.write(",".join(str(x) for x in r) + "\n")


# regression
n = 300
x = rng.normal(size=n)
y = 2 * x + rng.normal(size=n)
ridge = 1.9 * x + rng.normal(scale=0.3, size=n)
tree = np.round(2 * x) + rng.normal(scale=0.6, size=n)
write("regression.csv", ["fold", "y", "ridge", "tree"],
      [("f%d" % (i % 10), "%.6f" % y[i], "%.6f" % ridge[i], "%.6f" % tree[i]) for i in range(n)])

# multiclass
n, k = 240, 3
y = rng.integers(0, k, size=n)


def probs(strength):
    logits = rng.normal(size=(n, k))
    logits[np.arange(n), y] += strength
    p = np.exp(logits)
    return p / p.sum(axis=1, keepdims=True)


soft, mlp = probs(1.5), probs(1.0)
vote = np.where(rng.random(n) < 0.7, y, rng.integers(0, k, size=n))
rows = []
for i in range(n):
    rows.append(["f%d" % (i % 8), y[i], vote[i]] + [repr(float(v)) for v in soft[i]] + [repr(float(v)) for v in mlp[i]])
write("multiclass.csv", ["fold", "y", "vote"] + ["soft:%d" % j for j in range(k)] + ["mlp:%d" % j for j in range(k)],
      rows)
long_rows = []
for name, p in (("soft", soft), ("mlp", mlp)):
    for i in range(n):
        long_rows.append(["f%d" % (i % 8), y[i], name] + [repr(float(v)) for v in p[i]])
write("multiclass_long.csv", ["fold", "y", "model"] + ["p:%d" % j for j in range(k)], long_rows)


# query
def queries(nq, name, folds):
    rows = []
    for q in range(nq):
        m = int(rng.integers(6, 13))
        rel = rng.integers(0, 4, size=m) * (rng.random(m) < 0.6)
        if q % 9 == 4:
            rel[:] = 0  # a query with no relevant item: skipped by NDCG and MRR, 0 for P@k
        bm25 = np.round(rel + rng.normal(scale=1.2, size=m), 1)  # rounded: ties
        neural = rel + rng.normal(scale=0.9, size=m)
        for i in range(m):
            rows.append([1000 + 7 * q, int(rel[i]), "%.1f" % bm25[i], "%.6f" % neural[i], "g%d" % (q % folds)])
    write(name, ["qid", "rel", "bm25", "neural", "fold"], rows)


queries(40, "query.csv", 5)
queries(12, "query_small.csv", 3)

# censored
n = 200
risk = rng.normal(size=n)
t_event = rng.exponential(scale=np.exp(-risk))
t_cens = rng.exponential(scale=2.0, size=n)
time = np.round(np.minimum(t_event, t_cens), 2)  # rounded: ties in time
event = (t_event <= t_cens).astype(int)
cox = risk + rng.normal(scale=0.5, size=n)
forest = np.round(risk + rng.normal(scale=0.8, size=n), 1)  # ties in risk
write("censored.csv", ["time", "event", "cox", "forest", "fold"],
      [("%.2f" % time[i], event[i], "%.6f" % cox[i], "%.1f" % forest[i], "s%d" % (i % 5)) for i in range(n)])
