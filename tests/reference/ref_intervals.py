#!/usr/bin/python3
"""Reference values for include/heldout/estimate/*: binomial intervals, t and normal
intervals, the corrected resampled t, bootstrap percentile/BCa on fixed replicates,
the .632/.632+ ingredients and the nested CV formula.

Sources, by entry prefix:
  binom.*   scipy.stats.binomtest(k, n).proportion_ci(level, method='wilson'|'exact'|'wilsoncc')
            (wilson/wilsoncc clipped to [0, 1] here, as heldout documents; 'exact' is found by
            root finding to ~1e-12 absolute, so the beta-quantile form with scipy.stats.beta.ppf
            is written too, as beta_lo/beta_hi); agresti_coull is the
            Agresti & Coull (1998) formula evaluated in numpy with scipy.stats.norm.ppf.
  tq.*      scipy.stats.t.ppf / t.sf / norm.ppf. scipy 1.10.1 t.ppf is off by up to ~1e-9
            relative (checked against R 4.2.2 qt), so each t quantile is also refined by two
            Newton steps on scipy.stats.t.cdf / t.pdf (tppf() below); the C++ side compares the
            refined value at 1e-12 and the raw t.ppf at 1e-8.
  tint.*    scipy.stats.t.interval / norm.interval on seeded random losses (np.var ddof=1).
  nb.*      Nadeau-Bengio corrected t evaluated with numpy + scipy.stats.t.sf / tppf (refined t.ppf).
  bca.*     scipy.stats._resampling._bca_interval (the helper behind scipy.stats.bootstrap)
            on a fixed set of replicates, and np.percentile (type 7) for the bounds.
  noinf.*   the no-information error as the numpy double sum mean(L(y_i, f_j)).
  p632.*    the .632/.632+ formulas of Efron & Tibshirani (1997) evaluated in numpy.
  ncv.*     the Bates-Hastie-Tibshirani nested CV formula evaluated in numpy on random cells.
"""
import warnings

import numpy as np
from scipy import stats
from scipy.stats import _resampling

import refio

warnings.simplefilter("ignore", RuntimeWarning)  # scipy binomtest at k = 0 or n warns on a harmless 1/0

t = refio.Table(__file__)
rng = np.random.default_rng(20261205)


def tppf(p, df):
    """scipy t.ppf refined by two Newton steps on scipy t.cdf (see the module comment)."""
    q = stats.t.ppf(p, df)
    for _ in range(2):
        q = q - (stats.t.cdf(q, df) - p) / stats.t.pdf(q, df)
    return q


# ---- binomial proportion intervals on a grid including k = 0 and k = n
grid = []
for n in (1, 2, 3, 5, 10, 20, 29, 50, 100, 1000, 123457):
    ks = range(n + 1) if n <= 29 else sorted({0, 1, 2, n // 3, n // 2, n - 2, n - 1, n})
    for k in ks:
        grid.append((k, n))
levels = (0.95, 0.90, 0.99, 0.5)
rows = []
for (k, n) in grid:
    for lev in levels:
        r = stats.binomtest(k, n).proportion_ci(confidence_level=lev, method="wilson")
        e = stats.binomtest(k, n).proportion_ci(confidence_level=lev, method="exact")
        c = stats.binomtest(k, n).proportion_ci(confidence_level=lev, method="wilsoncc")
        z = stats.norm.ppf(0.5 + lev / 2)
        nt = n + z * z
        pt = (k + z * z / 2) / nt
        h = z * np.sqrt(pt * (1 - pt) / nt)
        rows.append([k, n, lev,
                     np.clip(r.low, 0, 1), np.clip(r.high, 0, 1),
                     e.low, e.high,
                     np.clip(c.low, 0, 1), np.clip(c.high, 0, 1),
                     max(0.0, pt - h), min(1.0, pt + h),
                     0.0 if k == 0 else stats.beta.ppf((1 - lev) / 2, k, n - k + 1),
                     1.0 if k == n else stats.beta.ppf(1 - (1 - lev) / 2, k + 1, n - k)])
rows = np.array(rows)
t.put("binom.count", [len(rows)])
for j, name in enumerate(["k", "n", "level", "wilson_lo", "wilson_hi", "exact_lo", "exact_hi",
                          "wilsoncc_lo", "wilsoncc_hi", "ac_lo", "ac_hi", "beta_lo", "beta_hi"]):
    t.put("binom." + name, rows[:, j])

# ---- t and normal quantiles, t tail probabilities
dfs = np.array([1, 2, 3, 5, 7, 9, 14, 29, 99, 1000, 2.5])
ps = np.array([0.975, 0.95, 0.995, 0.9, 0.6])
qd, qp, qv, qr = [], [], [], []
for d in dfs:
    for p in ps:
        qd.append(d)
        qp.append(p)
        qv.append(stats.t.ppf(p, d))
        qr.append(tppf(p, d))
t.put("tq.df", qd)
t.put("tq.p", qp)
t.put("tq.ppf", qv)
t.put("tq.ppf_refined", qr)
xs = np.array([0.1, 1.0, 2.5, 4.0, 10.0])
sd_, sx, sv = [], [], []
for d in dfs:
    for x in xs:
        sd_.append(d)
        sx.append(x)
        sv.append(stats.t.sf(x, d))
t.put("tq.sf_df", sd_)
t.put("tq.sf_x", sx)
t.put("tq.sf", sv)
t.put("tq.norm_p", ps)
t.put("tq.norm_ppf", stats.norm.ppf(ps))

# ---- t and normal intervals of the mean of random losses
for c in range(5):
    n = int(rng.integers(2, 300))
    x = rng.gamma(2.0, size=n) * 10.0 ** rng.integers(-3, 4)
    if c == 4:
        x = 1e6 + rng.normal(scale=1e-3, size=n)  # large losses, tiny spread (one-pass cancels)
    lev = [0.95, 0.9, 0.99, 0.8, 0.95][c]
    m = np.mean(x)
    se = np.sqrt(np.var(x, ddof=1) / n)
    t.put(f"tint.case{c}.x", x)
    t.put(f"tint.case{c}.level", [lev])
    t.put(f"tint.case{c}.mean", [m])
    t.put(f"tint.case{c}.se", [se])
    t.put(f"tint.case{c}.t", stats.t.interval(lev, n - 1, loc=m, scale=se))
    t.put(f"tint.case{c}.t_half_refined", [tppf(0.5 + lev / 2, n - 1) * se])
    t.put(f"tint.case{c}.norm", stats.norm.interval(lev, loc=m, scale=se))

# ---- corrected resampled t (Nadeau & Bengio 2003) on random differences
for c in range(4):
    J = int(rng.integers(3, 60))
    d = rng.normal(0.01, 0.03, size=J)
    n1, n2 = [(90, 10), (9, 1), (4, 1), (700, 300)][c]
    lev = [0.95, 0.9, 0.99, 0.95][c]
    m = np.mean(d)
    s2 = np.var(d, ddof=1)
    se = np.sqrt((1 / J + n2 / n1) * s2)
    st = m / se
    q = tppf(0.5 + lev / 2, J - 1)
    t.put(f"nb.case{c}.d", d)
    t.put(f"nb.case{c}.sizes", [n1, n2, lev])
    t.put(f"nb.case{c}.result", [m, se, st, J - 1, 2 * stats.t.sf(abs(st), J - 1), m - q * se, m + q * se])
    sen = np.sqrt(s2 / J)
    t.put(f"nb.case{c}.naive", [sen, m / sen, 2 * stats.t.sf(abs(m / sen), J - 1)])

# ---- BCa on fixed replicates: scipy's own _bca_interval helper, np.percentile type 7
def bca_case(name, x, reps, lev):
    alpha = (1 - lev) / 2
    a1, a2, ahat = _resampling._bca_interval((x,), np.mean, axis=-1, alpha=alpha,
                                             theta_hat_b=np.asarray(reps)[None, :], batch=None)
    a1, a2, ahat = float(np.ravel(a1)[0]), float(np.ravel(a2)[0]), float(np.ravel(ahat)[0])
    t.put(name + ".x", x)
    t.put(name + ".reps", reps)
    t.put(name + ".level", [lev])
    t.put(name + ".theta", [np.mean(x)])
    t.put(name + ".jack", [(np.sum(x) - xi) / (len(x) - 1) for xi in x])
    t.put(name + ".alphas", [a1, a2, ahat])
    t.put(name + ".bca", [np.percentile(reps, 100 * a1), np.percentile(reps, 100 * a2)])
    t.put(name + ".pct", [np.percentile(reps, 100 * alpha), np.percentile(reps, 100 * (1 - alpha))])


x12 = np.array([2.1, 3.4, 1.9, 5.6, 4.2, 3.3, 7.8, 2.8, 4.9, 3.0])
r12 = np.array([3.67, 3.32, 4.40, 3.96, 3.36, 3.08, 4.05, 3.77, 4.04, 3.62,
                4.81, 3.88, 3.39, 3.72, 3.73, 4.33, 3.41, 3.86, 3.85, 3.44])
bca_case("bca.methods12", x12, r12, 0.90)
xr = rng.exponential(size=40)
bca_case("bca.random", xr, np.array([np.mean(rng.choice(xr, size=40)) for _ in range(999)]), 0.95)
# Ties at the estimate: 0/1 data (an error indicator), replicate means in steps of 1/20, many
# exactly equal to theta = 0.3 (computed as integer counts / 20, so ties are exact).
x01 = np.array([1, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 1, 0, 0, 1, 0, 0], dtype=float)
tied = np.array([rng.choice(x01, size=20).sum() / 20 for _ in range(400)])
bca_case("bca.tied", x01, tied, 0.95)
t.put("bca.tied.counts", [np.sum(tied < 0.3), np.sum(tied == 0.3)])

# ---- no-information error: numpy double sums
for c in range(3):
    n = int(rng.integers(5, 120))
    k = [2, 3, 4][c]
    y = rng.integers(0, k, size=n)
    f = np.where(rng.random(n) < 0.7, y, rng.integers(0, k, size=n))
    t.put(f"noinf.case{c}.y", y)
    t.put(f"noinf.case{c}.f", f)
    t.put(f"noinf.case{c}.zero_one", [np.mean(y[:, None] != f[None, :])])
    yr = rng.normal(size=n) * 3 + 5
    fr = yr + rng.normal(size=n)
    t.put(f"noinf.case{c}.yr", yr)
    t.put(f"noinf.case{c}.fr", fr)
    t.put(f"noinf.case{c}.squared", [np.mean((yr[:, None] - fr[None, :]) ** 2)])
    t.put(f"noinf.case{c}.absolute", [np.mean(np.abs(yr[:, None] - fr[None, :]))])

# ---- .632 / .632+ formulas (Efron & Tibshirani 1997), random cases including both clips
def p632(err, e1, g):
    e1p = min(e1, g)
    R = (e1p - err) / (g - err) if (e1 > err and g > err) else 0.0
    w = 0.632 / (1 - 0.368 * R)
    e632 = 0.368 * err + 0.632 * e1
    # Efron & Tibshirani 1997 eq. (32): correction on the unclipped .632 (methods.md section 11)
    return [e632, e1p, R, w, e632 + (e1p - err) * 0.368 * 0.632 * R / (1 - 0.368 * R)]


cases = [(0.1, 0.3, 0.5), (0.2, 0.6, 0.5), (0.3, 0.2, 0.5), (0.4, 0.5, 0.3), (0.0, 0.25, 0.25)]
for _ in range(5):
    cases.append(tuple(rng.random(3)))
for c, (err, e1, g) in enumerate(cases):
    t.put(f"p632.case{c}.in", [err, e1, g])
    t.put(f"p632.case{c}.out", p632(err, e1, g))
t.put("p632.count", [len(cases)])

# ---- nested CV formula on random cells (numpy)
K, R, n = 4, 3, 22
sizes = [6, 6, 5, 5]
t.put("ncv.shape", [K, R, n])
A, Bv, inner_means, outer_all = [], [], [], []
for r in range(R):
    for k in range(K):
        eo = rng.gamma(2.0, size=sizes[k])
        ei = rng.gamma(2.2, size=n - sizes[k])
        t.put(f"ncv.r{r}k{k}.outer", eo)
        t.put(f"ncv.r{r}k{k}.inner", ei)
        A.append((ei.mean() - eo.mean()) ** 2)
        Bv.append(np.var(eo, ddof=1) / len(eo))
        inner_means.append(ei.mean())
        outer_all.extend(eo)
mse = np.mean(A) - np.mean(Bv)
ncv = np.mean(inner_means)
cv = np.mean(outer_all)
bias = (1 + (K - 2) / K) * (ncv - cv)
se_naive = np.std(outer_all, ddof=1) / np.sqrt(n)
se = np.sqrt(max(mse, 0) * (K - 1) / K)
se_g = min(max(se, se_naive), np.sqrt(K) * se_naive)
z = stats.norm.ppf(0.95)
t.put("ncv.result", [mse, ncv, cv, bias, se_naive, se_g, ncv - bias - z * se_g, ncv - bias + z * se_g])
t.close()
