#!/usr/bin/python3
"""Reference values for the label measures (confusion_matrix, classification_error,
accuracy, balanced_accuracy, cost_weighted_error, precision/recall/specificity/f_beta,
mcc, cohen_kappa) on seeded random labels with ties and weights.

Sources, named per entry below:
 * confusion tables: numpy.add.at (weighted) and numpy.bincount (counts);
 * error / accuracy: numpy.average of the 0/1 mismatch vector;
 * binary MCC: scipy.stats.pearsonr on the 0/1 vectors (weighted: integer weights,
   each observation repeated w times with numpy.repeat);
 * multiclass MCC: Gorodkin's (2004) definition evaluated in numpy — the covariance of the
   one-hot indicator matrices, sum_k cov(X_k, Y_k) / sqrt(sum_k var X_k * sum_k var Y_k),
   via numpy.cov (aweights for weighted cases), not the simplified count formula;
 * kappa, balanced accuracy, precision, recall, specificity, F-beta, cost-weighted error:
   the published formula evaluated in numpy on the numpy confusion table (Cohen 1960/1968,
   Brodersen et al. 2010, van Rijsbergen 1979, Elkan 2001).
"""
import numpy as np
import scipy.stats

import refio

t = refio.Table(__file__)
rng = np.random.default_rng(20261202)


def table(y, f, k, w=None):
    c = np.zeros((k, k))
    np.add.at(c, (y, f), 1.0 if w is None else w)  # numpy.add.at
    return c


def counts(y, f, k):
    return np.bincount(y * k + f, minlength=k * k).reshape(k, k).astype(float)  # numpy.bincount


def per_class(c):
    tp = np.diag(c)
    fp = c.sum(axis=0) - tp
    fn = c.sum(axis=1) - tp
    tn = c.sum() - tp - fp - fn
    return tp, fp, fn, tn


def rates(c, beta):
    tp, fp, fn, tn = per_class(c)
    b2 = beta * beta
    return {
        "precision": tp / (tp + fp),
        "recall": tp / (tp + fn),
        "specificity": tn / (tn + fp),
        "f": (1 + b2) * tp / ((1 + b2) * tp + b2 * fn + fp),
    }


def pooled(c, beta):
    tp, fp, fn, tn = (x.sum() for x in per_class(c))
    b2 = beta * beta
    return {
        "precision": tp / (tp + fp),
        "recall": tp / (tp + fn),
        "specificity": tn / (tn + fp),
        "f": (1 + b2) * tp / ((1 + b2) * tp + b2 * fn + fp),
    }


def kappa(c, kind):
    k = c.shape[0]
    n = c.sum()
    r, s = c.sum(axis=1), c.sum(axis=0)
    if kind == "none":  # Cohen 1960: (p_o - p_e) / (1 - p_e)
        po = np.trace(c) / n
        pe = (r * s).sum() / n**2
        return (po - pe) / (1 - pe)
    i, j = np.meshgrid(np.arange(k), np.arange(k), indexing="ij")
    d = np.abs(i - j) / (k - 1)
    wgt = d if kind == "linear" else d**2  # Cohen 1968 weighted kappa
    e = np.outer(r, s) / n
    return 1 - (wgt * c).sum() / (wgt * e).sum()


def gorodkin(y, f, k, w=None):
    x = np.eye(k)[y]
    z = np.eye(k)[f]
    cov = lambda a, b: sum(np.cov(a[:, q], b[:, q], aweights=w)[0, 1] for q in range(k))  # numpy.cov
    return cov(x, z) / np.sqrt(cov(x, x) * cov(z, z))


def put_measures(prefix, y, f, k, c, w, beta):
    t.put(prefix + "error", np.average(y != f, weights=w))  # numpy.average
    t.put(prefix + "accuracy", np.average(y == f, weights=w))
    t.put(prefix + "balanced_accuracy", np.mean(np.diag(c) / c.sum(axis=1)))  # Brodersen et al. 2010
    rr = rates(c, beta)
    share = c.sum(axis=1) / c.sum()
    pl = pooled(c, beta)
    for name, v in rr.items():
        t.put(prefix + name + ".per_class", v)
        t.put(prefix + name + ".mean", np.mean(v))
        t.put(prefix + name + ".prevalence", np.sum(share * v))
        t.put(prefix + name + ".pooled", pl[name])
    for kind in ("none", "linear", "quadratic"):
        t.put(prefix + "kappa." + kind, kappa(c, kind))
    costs = np.arange(k * k, dtype=float).reshape(k, k) / 7.0
    np.fill_diagonal(costs, 0.0)
    t.put(prefix + "costs", costs.ravel())
    t.put(prefix + "cost_error", (costs * c).sum() / c.sum())  # Elkan 2001, evaluated in numpy


case = 0
# Binary cases: integer weights, so the weighted MCC can be checked by repetition.
for n in (37, 250, 1000):
    y = rng.integers(0, 2, size=n)
    f = np.where(rng.random(n) < 0.7, y, rng.integers(0, 2, size=n))  # ties everywhere: labels
    y[:2], f[:2] = [0, 1], [1, 0]  # both classes in both margins
    w = rng.integers(0, 5, size=n).astype(float)
    w[:2] = 1.0
    p = f"case{case}."
    t.put(p + "k", [2])
    t.put(p + "truth", y)
    t.put(p + "prediction", f)
    t.put(p + "weights", w)
    cu, cw = counts(y, f, 2), table(y, f, 2, w)
    assert np.array_equal(cu, table(y, f, 2))
    t.put(p + "table", cu.ravel())
    t.put(p + "wtable", cw.ravel())
    put_measures(p + "u.", y, f, 2, cu, None, 2.0)
    put_measures(p + "w.", y, f, 2, cw, w, 2.0)
    t.put(p + "u.mcc", scipy.stats.pearsonr(y, f)[0])  # scipy.stats.pearsonr
    wi = w.astype(int)
    t.put(p + "w.mcc", scipy.stats.pearsonr(np.repeat(y, wi), np.repeat(f, wi))[0])
    case += 1

# Multiclass cases: real-valued weights.
for n, k in ((60, 3), (400, 4), (2000, 5)):
    y = rng.integers(0, k, size=n)
    f = np.where(rng.random(n) < 0.6, y, rng.integers(0, k, size=n))
    y[:k] = np.arange(k)
    f[:k] = rng.permutation(k)  # every class in both margins
    w = rng.uniform(0.0, 3.0, size=n).round(3)
    p = f"case{case}."
    t.put(p + "k", [k])
    t.put(p + "truth", y)
    t.put(p + "prediction", f)
    t.put(p + "weights", w)
    cu, cw = counts(y, f, k), table(y, f, k, w)
    t.put(p + "table", cu.ravel())
    t.put(p + "wtable", cw.ravel())
    put_measures(p + "u.", y, f, k, cu, None, 0.5)
    put_measures(p + "w.", y, f, k, cw, w, 0.5)
    t.put(p + "u.mcc", gorodkin(y, f, k))
    t.put(p + "w.mcc", gorodkin(y, f, k, w))
    case += 1

t.put("cases", [case])
t.close()
