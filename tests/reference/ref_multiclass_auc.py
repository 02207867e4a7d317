#!/usr/bin/python3
"""Reference values for measure::multiclass_auc: Hand & Till (2001) M computed literally from
the paper's rank formula with scipy.stats.rankdata (for each pair i != j: the rows of classes i
and j, ranked by column i, A(i|j) = (S_i - n_i(n_i+1)/2)/(n_i n_j)); one-vs-rest AUCs with
scipy.stats.mannwhitneyu, weighted by prevalence; weighted cases replicate rows by integer
weights (numpy.repeat). Probabilities are rounded to create ties."""
import numpy as np
from scipy import stats

import refio


def hand_till(y, p, c):
    tot = 0.0
    for i in range(c):
        for j in range(i + 1, c):
            a = []
            for (u, v) in ((i, j), (j, i)):
                sel = (y == u) | (y == v)
                r = stats.rankdata(p[sel, u])  # midranks
                nu, nv = (y == u).sum(), (y == v).sum()
                su = r[y[sel] == u].sum()
                a.append((su - nu * (nu + 1) / 2) / (nu * nv))
            tot += (a[0] + a[1]) / 2
    return tot * 2 / (c * (c - 1))


def ovr(y, p, c):
    out = 0.0
    for i in range(c):
        pos, neg = p[y == i, i], p[y != i, i]
        out += (y == i).mean() * stats.mannwhitneyu(pos, neg).statistic / (len(pos) * len(neg))
    return out


t = refio.Table(__file__)
rng = np.random.default_rng(20261208)
cases = 6
for case in range(cases):
    c = int(rng.integers(2, 6))
    n = int(rng.integers(3 * c, 300))
    y = rng.integers(0, c, size=n)
    y[:c] = np.arange(c)
    logits = rng.normal(size=(n, c)) + 1.5 * np.eye(c)[y]
    p = np.exp(logits)
    p = np.round(p / p.sum(axis=1, keepdims=True), 2)
    p[:, -1] = 1 - p[:, :-1].sum(axis=1)  # rows sum to 1 after rounding
    p = np.clip(p, 0, 1)
    p = p / p.sum(axis=1, keepdims=True)
    w = rng.integers(0, 4, size=n)
    w[:c] = 1
    ry, rp = np.repeat(y, w), np.repeat(p, w, axis=0)
    t.put(f"case{case}.classes", c)
    t.put(f"case{case}.truth", y)
    t.put(f"case{case}.probabilities", p.ravel())  # row-major
    t.put(f"case{case}.weights", w)
    t.put(f"case{case}.hand_till", hand_till(y, p, c))
    t.put(f"case{case}.ovr", ovr(y, p, c))
    t.put(f"case{case}.whand_till", hand_till(ry, rp, c))
    t.put(f"case{case}.wovr", ovr(ry, rp, c))
t.put("cases", cases)
t.close()
