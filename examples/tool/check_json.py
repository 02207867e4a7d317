#!/usr/bin/python3
"""Checks the heldout tool's --json output against a live scipy/numpy reference.

usage: check_json.py OUT.json TOOL-ARGS...   (run by run_tool.cmake)

Reads the same CSV with Python's csv module, recomputes every estimate and comparison the
tool reports with general-purpose functions, and compares to 1e-9 relative:
  AUC                  scipy.stats.mannwhitneyu(pos, neg).statistic / (m n)  (Mann-Whitney form)
  classification error scipy.stats.binomtest(k, n).proportion_ci(level, method="wilson")
  Brier score          numpy mean of (p - y)^2, t interval with scipy.stats.t.ppf
  McNemar mid-p        2 binom.cdf(min(b, c) - 1) + binom.pmf(min(b, c)), at most 1 (Fagerland et al. 2013)
  Brier difference     numpy mean of the per-row differences (its paired bootstrap p is drawn at random)
  corrected t          Nadeau & Bengio (2003): se = sqrt((1/J + n_test/n_train) s^2), scipy.stats.t
AUC intervals and DeLong tests come from the library's DeLong code, checked in its own
tests; here only their point values (AUC, AUC difference) are recomputed. t-family intervals
of the measures (all in [0, 1]) are clipped to [0, 1], with "clipped": true where that cut them.
Wilson (error) and DeLong logit-scale (AUC) intervals lie inside [0, 1] by construction.
"""
import csv
import json
import math
import sys

import numpy as np
from scipy import stats

out = json.load(open(sys.argv[1]))  # must parse: the first check
args = sys.argv[2:]
path = args[0]


def opt(name, default=None, many=False):
    vals = [args[i + 1] for i in range(len(args) - 1) if args[i] == name]
    return vals if many else (vals[-1] if vals else default)


truth_col, score_cols = opt("--truth"), opt("--score", many=True)
model_col, split_col = opt("--model"), opt("--split")
level = float(opt("--level", "0.95"))
threshold = float(opt("--threshold", "0.5"))
folds = opt("--folds")

# Names with ill-formed UTF-8 are read as the tool must write them: each maximal subpart
# replaced by U+FFFD (Python's "replace" handler does exactly that); json.load above already
# decoded the output strictly, so the JSON itself is valid UTF-8 with escaped controls.
with open(path, newline="", encoding="utf-8", errors="replace") as f:
    rows = list(csv.DictReader(f))
models = {}  # name -> (y, s, split)
if model_col:
    for r in rows:
        models.setdefault(r[model_col], ([], [], []))
        m = models[r[model_col]]
        m[0].append(int(float(r[truth_col])))
        m[1].append(float(r[score_cols[0]]))
        m[2].append(r[split_col] if split_col else "all")
else:
    for c in score_cols:
        models[c] = ([int(float(r[truth_col])) for r in rows], [float(r[c]) for r in rows],
                     [r[split_col] if split_col else "all" for r in rows])

failures = []


def clipped_t(e, name, mean, half):
    """The t interval mean -/+ half of a measure in [0, 1], clipped to [0, 1] as the tool does."""
    lo, hi = mean - half, mean + half
    close(name + " lower", e["lower"], max(0.0, lo), 1e-8)
    close(name + " upper", e["upper"], min(1.0, hi), 1e-8)
    if e["clipped"] != (lo < 0 or hi > 1):
        failures.append("%s: clipped is %r for [%r, %r]" % (name, e["clipped"], lo, hi))


def close(what, got, want, rel=1e-9):
    if got is None or not (abs(got - want) <= rel * max(abs(want), 1e-300) or abs(got - want) < 1e-13):
        failures.append("%s: tool %r, reference %r" % (what, got, want))


def auc(y, s):
    y, s = np.asarray(y), np.asarray(s)
    pos, neg = s[y == 1], s[y == 0]
    return stats.mannwhitneyu(pos, neg).statistic / (len(pos) * len(neg))


def values(name, measure, y, s):
    y, s = np.asarray(y), np.asarray(s)
    if measure == "AUC":
        return auc(y, s)
    if measure == "Brier score":
        return float(np.mean((s - y) ** 2))
    return float(np.mean((s >= threshold).astype(int) != y))


# the tool's measure names (keys) as this script names them
KEYS = {"error": "classification error", "brier": "Brier score", "auc": "AUC"}
est = {(m["name"], KEYS[e["key"]]): e for m in out["models"] for e in m["estimates"] if e["key"] in KEYS}
cmp_ = {(c["first"], c["second"], KEYS[c["key"]]): c for c in out["comparisons"] if c["key"] in KEYS}
names = list(models)
assert [m["name"] for m in out["models"]] == names, "model order (and names read back): %r vs %r" % (
    [m["name"] for m in out["models"]], names)
for (name, measure), e in est.items():  # every measure reported lies in [0, 1], and so do intervals
    assert isinstance(e["clipped"], bool), "clipped flag"
    if e["lower"] is not None and not (0 <= e["lower"] <= e["value"] <= e["upper"] <= 1):
        failures.append("%s %s: interval [%r, %r] around %r not inside [0, 1]" % (
            name, measure, e["lower"], e["upper"], e["value"]))
assert out["rows"] == len(next(iter(models.values()))[0])
checked = 0
if not split_col:
    for name, (y, s, _) in models.items():
        y, s = np.asarray(y), np.asarray(s)
        n = len(y)
        probability = bool(np.all((s >= 0) & (s <= 1)))
        close(name + " AUC", est[(name, "AUC")]["value"], auc(y, s))
        checked += 1
        if probability:
            k = int(np.sum((s >= threshold).astype(int) != y))
            ci = stats.binomtest(k, n).proportion_ci(level, method="wilson")
            e = est[(name, "classification error")]
            close(name + " error", e["value"], k / n)
            close(name + " error lower", e["lower"], ci.low)
            close(name + " error upper", e["upper"], ci.high)
            b = (s - y) ** 2
            tq = stats.t.ppf(0.5 + level / 2, n - 1)
            se = np.std(b, ddof=1) / math.sqrt(n)
            e = est[(name, "Brier score")]
            close(name + " Brier", e["value"], float(np.mean(b)))
            # scipy's t.ppf is accurate to ~1e-10 relative (checked against R 4.2.2 qt): a looser band here
            clipped_t(e, name + " Brier", float(np.mean(b)), tq * se)
            checked += 3
        else:
            assert (name, "Brier score") not in est, "no Brier score for raw scores"
    for i, a in enumerate(names):
        for b_ in names[i + 1:]:
            ya, sa, _ = models[a]
            yb, sb, _ = models[b_]
            sa, sb, y = np.asarray(sa), np.asarray(sb), np.asarray(ya)
            close(a + "-" + b_ + " AUC difference", cmp_[(a, b_, "AUC")]["difference"], auc(y, sa) - auc(y, sb))
            checked += 1
            if (a, b_, "classification error") in cmp_:
                ra, rb = (sa >= threshold).astype(int) == y, (sb >= threshold).astype(int) == y
                only_a, only_b = int(np.sum(ra & ~rb)), int(np.sum(~ra & rb))
                c = cmp_[(a, b_, "classification error")]
                m_, nd = min(only_a, only_b), only_a + only_b
                p = min(1.0, 2 * stats.binom.cdf(m_ - 1, nd, 0.5) + stats.binom.pmf(m_, nd, 0.5)) if nd else 1.0
                close(a + "-" + b_ + " McNemar mid-p", c["p_value"], p)
                close(a + "-" + b_ + " error difference", c["difference"], (only_b - only_a) / len(y))
                c = cmp_[(a, b_, "Brier score")]
                close(a + "-" + b_ + " Brier difference", c["difference"],
                      float(np.mean((sa - y) ** 2 - (sb - y) ** 2)))
                checked += 4
else:
    k = int(folds)
    for name, (y, s, sp) in models.items():
        splits = sorted(set(sp), key=sp.index)
        per = {}
        for measure in ["classification error", "Brier score", "AUC"]:
            v = []
            for g in splits:
                idx = [i for i in range(len(y)) if sp[i] == g]
                v.append(values(name, measure, [y[i] for i in idx], [s[i] for i in idx]))
            per[measure] = np.asarray(v)
            J = len(v)
            n_test = len(y) / J
            n_train = (k - 1) * n_test
            se = math.sqrt((1 / J + n_test / n_train) * np.var(v, ddof=1))
            tq = stats.t.ppf(0.5 + level / 2, J - 1)
            e = est[(name, measure)]
            close(name + " " + measure, e["value"], float(np.mean(v)))
            clipped_t(e, name + " " + measure, float(np.mean(v)), tq * se)
            checked += 3
        models[name] = (y, s, sp, per)
    for i, a in enumerate(names):
        for b_ in names[i + 1:]:
            for measure in ["classification error", "Brier score", "AUC"]:
                d = models[a][3][measure] - models[b_][3][measure]
                J = len(d)
                n_test = len(models[a][0]) / J
                se = math.sqrt((1 / J + 1 / (k - 1)) * np.var(d, ddof=1))
                t = float(np.mean(d)) / se
                c = cmp_[(a, b_, measure)]
                close(a + "-" + b_ + " " + measure + " t", c["statistic"], t)
                close(a + "-" + b_ + " " + measure + " p", c["p_value"], 2 * stats.t.sf(abs(t), J - 1), 1e-8)
                checked += 2
if failures:
    print("\n".join(failures))
    sys.exit(1)
print("JSON parses; %d values agree with scipy" % checked)
