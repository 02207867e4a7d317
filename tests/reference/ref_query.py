#!/usr/bin/python3
"""Reference values for the query measures (heldout/query/*.hpp): numpy on seeded queries with
heavy ties, rows shuffled so that a query's rows are not contiguous.

The tie-exact values are computed here from the pairwise form of the expectation over the
orders of tied items (McSherry & Najork 2008), written independently of the C++ code:
per position p, E[gain_p] = G_b/n_b and E[rel_p] = r_b/n_b (block b holds p); for AP the full
matrix E[rel_p rel_q] (same block: r(r-1)/(n(n-1)); different blocks: the product of r/n) is
summed with numpy.tril; for RR the first-relevant position within its block follows the
hypergeometric law C(n-1-x, r-1)/C(n, r) (math.comb). Blocks from numpy.unique on -score.
Definitions: methods.md §17 (Järvelin & Kekäläinen 2002; Burges et al. 2005)."""
import math

import numpy as np

import refio


def blocks(s, rel, gain):
    """Per position of the ranking: expected gain, expected relevance, block id; and the blocks."""
    u, inv, cnt = np.unique(-s, return_inverse=True, return_counts=True)  # blocks, best first
    r_b = np.bincount(inv, weights=(rel > 0).astype(float), minlength=len(u))
    g_b = np.bincount(inv, weights=gain, minlength=len(u))
    pos_block = np.repeat(np.arange(len(u)), cnt)  # block of each position
    return g_b[pos_block] / cnt[pos_block], r_b[pos_block] / cnt[pos_block], pos_block, r_b, cnt


def gains(rel, exponential):
    return np.power(2.0, rel) - 1.0 if exponential else rel.astype(float)


def disc(n):
    return 1.0 / np.log2(np.arange(n) + 2.0)


def dcg(s, rel, k, exponential):
    eg, _, _, _, _ = blocks(s, rel, gains(rel, exponential))
    K = len(s) if k == 0 else min(k, len(s))
    return float(np.sum(eg[:K] * disc(K)))


def ndcg(s, rel, k, exponential):
    if not np.any(rel > 0):
        return None
    K = len(s) if k == 0 else min(k, len(s))
    ideal = np.sort(gains(rel, exponential))[::-1][:K]
    return dcg(s, rel, k, exponential) / float(np.sum(ideal * disc(K)))


def top(s, rel, k):
    _, er, _, _, _ = blocks(s, rel, gains(rel, False))
    return float(np.sum(er[: min(k, len(s))]))


def precision(s, rel, k):
    return top(s, rel, k) / k


def recall(s, rel, k):
    R = np.sum(rel > 0)
    return None if R == 0 else top(s, rel, k) / R


def rr(s, rel):
    if not np.any(rel > 0):
        return None
    _, _, _, r_b, cnt = blocks(s, rel, gains(rel, False))
    b = int(np.argmax(r_b > 0))
    start = int(np.sum(cnt[:b]))
    n, r = int(cnt[b]), int(r_b[b])
    return sum(math.comb(n - 1 - x, r - 1) / math.comb(n, r) / (start + 1 + x) for x in range(n - r + 1))


def ap(s, rel, k):
    R = int(np.sum(rel > 0))
    if R == 0:
        return None
    _, er, pb, r_b, cnt = blocks(s, rel, gains(rel, False))
    n = len(s)
    same = pb[:, None] == pb[None, :]
    nb, rb = cnt[pb].astype(float), r_b[pb]
    with np.errstate(divide="ignore", invalid="ignore"):
        within = np.where(nb > 1, rb * (rb - 1) / (nb * (nb - 1)), 0.0)
    M = np.where(same, within[:, None] * np.ones(n)[None, :], er[:, None] * er[None, :])
    np.fill_diagonal(M, er)
    K = n if k == 0 else min(k, n)
    D = R if k == 0 else min(k, R)
    per_pos = np.sum(np.tril(M), axis=1) / (np.arange(n) + 1.0)
    return float(np.sum(per_pos[:K])) / D


MEASURES = {
    "ndcg5": lambda s, r: ndcg(s, r, 5, True),
    "ndcg0_linear": lambda s, r: ndcg(s, r, 0, False),
    "dcg10": lambda s, r: dcg(s, r, 10, True),
    "p5": lambda s, r: precision(s, r, 5),
    "r5": lambda s, r: recall(s, r, 5),
    "rr": rr,
    "ap0": lambda s, r: ap(s, r, 0),
    "ap10": lambda s, r: ap(s, r, 10),
}

t = refio.Table(__file__)
rng = np.random.default_rng(20261204)
for case in range(4):
    Q = int(rng.integers(20, 60))
    ids = rng.choice(np.arange(-500, 500), size=Q, replace=False)
    q, rel, s, w = [], [], [], []
    for i, qid in enumerate(ids):
        n = int(rng.integers(1, 60))
        r = rng.integers(0, 5, size=n) * (rng.random(size=n) < 0.4)
        if i % 7 == 3:
            r[:] = 0  # a query with no relevant item
        sc = np.round(rng.normal(size=n) + 0.3 * r, 1)  # one decimal: many ties
        q += [qid] * n
        rel += list(r)
        s += list(sc)
        w += [float(rng.integers(1, 5))] * n
    perm = rng.permutation(len(q)) if case % 2 == 0 else np.arange(len(q))  # even cases: rows shuffled
    q, rel, s, w = np.array(q)[perm], np.array(rel)[perm], np.array(s)[perm], np.array(w)[perm]
    t.put(f"case{case}.query", q)
    t.put(f"case{case}.relevance", rel)
    t.put(f"case{case}.scores", s)
    t.put(f"case{case}.weights", w)
    _, first = np.unique(q, return_index=True)
    order = q[np.sort(first)]  # ids in order of first appearance
    for name, f in MEASURES.items():
        ids_ok, vals, skipped, ws = [], [], [], []
        for qid in order:
            m = q == qid
            v = f(s[m], rel[m])
            if v is None:
                skipped.append(qid)
            else:
                ids_ok.append(qid)
                vals.append(v)
                ws.append(w[m][0])
        t.put(f"case{case}.{name}.ids", ids_ok)
        t.put(f"case{case}.{name}.values", vals)
        t.put(f"case{case}.{name}.skipped", skipped)
        t.put(f"case{case}.{name}.mean", np.mean(vals))
        t.put(f"case{case}.{name}.weighted_mean", np.sum(np.array(ws) * vals) / np.sum(ws))
t.close()
