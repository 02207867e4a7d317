#!/usr/bin/python3
"""Reference values for heldout/compare/: McNemar (scipy.stats.binomtest, binom, chi2),
Holm (numpy, the step-down formula of Holm 1979 written out), Friedman
(scipy.stats.friedmanchisquare, rankdata, chi2, f), the studentized range quantile with
infinite df (scipy.stats.studentized_range), Bonferroni-Dunn (scipy.stats.norm) and the
5x2cv t and F tests (scipy.stats.t, f), on seeded random inputs."""
import numpy as np
from scipy import stats

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261206)

# McNemar from counts: small, tied, one-sided-empty and large discordant totals.
counts = [(10, 3), (3, 10), (0, 0), (0, 7), (5, 5), (6, 5), (1, 0), (40, 61), (120, 95),
          (2000, 2100), (499000, 501500), (3, 30)]
for i, (b, c) in enumerate(counts):
    n = b + c
    k = min(b, c)
    key = f"mcnemar{i}."
    t.put(key + "counts", [b, c])
    if n == 0:
        continue
    t.put(key + "exact", stats.binomtest(b, n, 0.5).pvalue)                  # scipy.stats.binomtest
    mid = 2 * stats.binom.cdf(k - 1, n, 0.5) + stats.binom.pmf(k, n, 0.5)     # scipy.stats.binom
    t.put(key + "mid_p", min(1.0, mid))
    chi = (b - c) ** 2 / n
    t.put(key + "chi", chi)
    t.put(key + "chi_p", stats.chi2.sf(chi, 1))                               # scipy.stats.chi2
    cc = max(abs(b - c) - 1, 0) ** 2 / n
    t.put(key + "cc", cc)
    t.put(key + "cc_p", stats.chi2.sf(cc, 1))

# McNemar from labels (3 classes): the counts and the exact p-value.
for i in range(3):
    n = int(rng.integers(50, 400))
    y = rng.integers(0, 3, n)
    a = np.where(rng.random(n) < 0.8, y, rng.integers(0, 3, n))
    b = np.where(rng.random(n) < 0.7, y, rng.integers(0, 3, n))
    key = f"mcnemar_labels{i}."
    t.put(key + "truth", y)
    t.put(key + "a", a)
    t.put(key + "b", b)
    only_a = int(np.sum((a == y) & (b != y)))
    only_b = int(np.sum((a != y) & (b == y)))
    t.put(key + "counts", [only_a, only_b])
    t.put(key + "exact", stats.binomtest(only_a, only_a + only_b, 0.5).pvalue)

# Holm: adjusted p-values in input order (numpy, formula of Holm 1979), with ties.
for i in range(5):
    m = int(rng.integers(1, 30))
    p = rng.random(m) ** 3
    if m > 3:
        p[1] = p[0]
    order = np.argsort(p, kind="stable")
    scaled = np.minimum(1.0, (m - np.arange(m)) * p[order])
    adj = np.empty(m)
    adj[order] = np.maximum.accumulate(scaled)
    t.put(f"holm{i}.p", p)
    t.put(f"holm{i}.adjusted", adj)

# Friedman: data sets x models with ties (rounded values), k >= 3 for friedmanchisquare.
for i in range(6):
    N = int(rng.integers(3, 25))
    k = int(rng.integers(3, 9))
    x = (rng.normal(size=(N, k)) + np.linspace(0, 1, k)).round(1)
    if i == 0:
        x[0, :] = 0.5  # one data set where every model ties
    key = f"friedman{i}."
    t.put(key + "shape", [N, k])
    t.put(key + "values", x.ravel())  # row-major
    ranks_hi = np.array([stats.rankdata(-row) for row in x])  # scipy.stats.rankdata: midranks, 1 = highest
    ranks_lo = np.array([stats.rankdata(row) for row in x])
    t.put(key + "ranks_higher", ranks_hi.mean(axis=0))
    t.put(key + "ranks_lower", ranks_lo.mean(axis=0))
    R = ranks_hi.mean(axis=0)
    chi = 12 * N / (k * (k + 1)) * (np.sum(R ** 2) - k * (k + 1) ** 2 / 4)  # Demšar 2006, eq. for chi2_F
    t.put(key + "chi", chi)
    t.put(key + "chi_p", stats.chi2.sf(chi, k - 1))
    res = stats.friedmanchisquare(*x.T)                                    # scipy.stats.friedmanchisquare
    t.put(key + "chi_corrected", res.statistic)
    t.put(key + "chi_corrected_p", res.pvalue)
    ff = (N - 1) * chi / (N * (k - 1) - chi)                               # Iman & Davenport 1980
    t.put(key + "ff", ff)
    t.put(key + "ff_p", stats.f.sf(ff, k - 1, (k - 1) * (N - 1)))

# Studentized range quantile, infinite df (scipy.stats.studentized_range), and Bonferroni-Dunn.
ks = [2, 3, 4, 5, 7, 10, 15, 20, 30, 50, 100]
for p in [0.9, 0.95, 0.99]:
    t.put(f"qrange.{p}", [stats.studentized_range.ppf(p, k, np.inf) for k in ks])
t.put("qrange.k", ks)
for k in [2, 3, 5, 10]:
    for alpha in [0.05, 0.1]:
        t.put(f"bonferroni_dunn.{k}.{alpha}", stats.norm.isf(alpha / (2 * (k - 1))) * np.sqrt(k * (k + 1) / (6 * 12)))

# 5x2cv t and F (Dietterich 1998; Alpaydin 1999), random differences in fold order.
for i in range(4):
    d = rng.normal(0.01 * i, 0.03, size=(5, 2))
    s2 = ((d - d.mean(axis=1, keepdims=True)) ** 2).sum(axis=1)
    tt = d[0, 0] / np.sqrt(s2.mean())
    ff = (d ** 2).sum() / (2 * s2.sum())
    key = f"five_by_two{i}."
    t.put(key + "d", d.ravel())
    t.put(key + "t", tt)
    t.put(key + "t_p", 2 * stats.t.sf(abs(tt), 5))                           # scipy.stats.t
    t.put(key + "f", ff)
    t.put(key + "f_p", stats.f.sf(ff, 10, 5))                                # scipy.stats.f
    q = stats.t.isf(0.025, 5)
    t.put(key + "ci95", [d[0, 0] - q * np.sqrt(s2.mean()), d[0, 0] + q * np.sqrt(s2.mean())])
t.close()
