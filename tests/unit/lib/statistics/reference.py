"""Reference values for tests/unit/lib/statistics, computed once with SciPy/NumPy (independent general-purpose
implementations) and stored in reference.json; no test imports Python.

Regenerate:  python3 tests/unit/lib/statistics/reference.py > tests/unit/lib/statistics/reference.json
(written with SciPy 1.17.1 and NumPy 2.4.6).
"""
import json

import numpy as np
import scipy
from scipy import linalg, stats

out = {"generator": f"scipy {scipy.__version__}, numpy {np.__version__}"}

# Student (1908, Biometrika 6:1-25), table of Cushny & Peebles (1905): extra hours of sleep of 10 patients under
# two drugs. The paired test is of drug 2 - drug 1; the one-sample test is of drug 2 alone against 0.
drug1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0]
drug2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4]


def t_summary(x):
    x = np.asarray(x, dtype=float)
    n = len(x)
    res = stats.ttest_1samp(x, 0.0)
    ci = res.confidence_interval(0.95)
    sd = float(np.std(x, ddof=1))
    return {"n": n, "mean": float(np.mean(x)), "sd": sd, "se": sd / np.sqrt(n), "t": float(res.statistic),
            "df": int(res.df), "p": float(res.pvalue), "ci95": [float(ci.low), float(ci.high)], "dz": float(np.mean(x)) / sd}


paired = stats.ttest_rel(drug2, drug1)
out["sleep"] = {"drug1": drug1, "drug2": drug2,
                "paired": {**t_summary(np.subtract(drug2, drug1)), "t_ttest_rel": float(paired.statistic), "p_ttest_rel": float(paired.pvalue)},
                "oneSample": t_summary(drug2)}

# Anscombe (1973, Am Stat 27:17-21), data set I.
ax = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5]
ay = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68]
lr = stats.linregress(ax, ay)
out["anscombe"] = {"x": ax, "y": ay, "slope": lr.slope, "intercept": lr.intercept, "r": lr.rvalue, "p": lr.pvalue,
                   "seSlope": lr.stderr, "t": lr.slope / lr.stderr}

# Potthoff & Roy (1964, Biometrika 51:313-326): distance (mm) from the pituitary to the pterygomaxillary fissure of
# 11 girls at ages 8, 10, 12 and 14. One within-subject factor (age), classical sums of squares and the
# Greenhouse-Geisser epsilon by the double-centred covariance formula (Greenhouse & Geisser, 1959, eq. for k levels).
girls = np.array([
    [21, 20, 21.5, 23], [21, 21.5, 24, 25.5], [20.5, 24, 24.5, 26], [23.5, 24.5, 25, 26.5],
    [21.5, 23, 22.5, 23.5], [20, 21, 21, 22.5], [21.5, 22.5, 23, 25], [23, 23, 23.5, 24],
    [20, 21, 22, 21.5], [16.5, 19, 19, 19.5], [24.5, 25, 28, 28]])


def oneway_rm(y):
    n, k = y.shape
    grand = y.mean()
    ss_a = n * ((y.mean(axis=0) - grand) ** 2).sum()
    ss_s = k * ((y.mean(axis=1) - grand) ** 2).sum()
    ss_t = ((y - grand) ** 2).sum()
    ss_e = ss_t - ss_a - ss_s
    df1, df2 = k - 1, (k - 1) * (n - 1)
    F = (ss_a / df1) / (ss_e / df2)
    S = np.cov(y, rowvar=False)
    sbar = S.mean()
    diag = np.mean(np.diag(S))
    row = S.mean(axis=1)
    eps = (k ** 2 * (diag - sbar) ** 2) / ((k - 1) * ((S ** 2).sum() - 2 * k * (row ** 2).sum() + k ** 2 * sbar ** 2))
    return {"F": F, "df1": df1, "df2": df2, "p": float(stats.f.sf(F, df1, df2)), "eta2p": ss_a / (ss_a + ss_e),
            "epsilon": eps, "pGG": float(stats.f.sf(F, df1 * eps, df2 * eps)), "ss": ss_a, "ssError": ss_e}


out["girls"] = {"values": girls.tolist(), "age": oneway_rm(girls)}

# Two within-subject factors (3 x 4) on seeded normal data with unequal variances and correlations, by classical
# sums of squares over marginal means; epsilon from the eigenvalues of the effect's covariance in a basis from
# scipy.linalg.null_space (not the Helmert contrasts the TypeScript uses).
rng = np.random.default_rng(20240607)
n, a, b = 9, 3, 4
base = rng.normal(size=(n, 1, 1)) * 2
y = base + rng.normal(size=(n, a, b)) * np.linspace(0.5, 2.0, a * b).reshape(a, b) + np.arange(a).reshape(1, a, 1) * 0.4 \
    + np.array([0, 0.3, -0.2, 0.5]).reshape(1, 1, b)
y = np.round(y, 3)


def two_way(y):
    n, a, b = y.shape
    g = y.mean()
    mA = y.mean(axis=(0, 2)); mB = y.mean(axis=(0, 1)); mS = y.mean(axis=(1, 2))
    mAB = y.mean(axis=0); mAS = y.mean(axis=2); mBS = y.mean(axis=1)
    ss = {}
    ss["A"] = n * b * ((mA - g) ** 2).sum()
    ss["B"] = n * a * ((mB - g) ** 2).sum()
    ss["AB"] = n * ((mAB - mA[:, None] - mB[None, :] + g) ** 2).sum()
    ss["AS"] = b * ((mAS - mA[None, :] - mS[:, None] + g) ** 2).sum()
    ss["BS"] = a * ((mBS - mB[None, :] - mS[:, None] + g) ** 2).sum()
    ss["ABS"] = ((y - mAB[None] - mAS[:, :, None] - mBS[:, None, :] + mA[None, :, None] + mB[None, None, :] + mS[:, None, None] - g) ** 2).sum()

    def eps_of(M):
        # M: contrast basis (cells x d), orthonormal, orthogonal to what the effect averages over.
        z = y.reshape(n, a * b) @ M
        S = np.cov(z, rowvar=False).reshape(M.shape[1], M.shape[1])
        lam = np.linalg.eigvalsh(S)
        return float(lam.sum() ** 2 / (len(lam) * (lam ** 2).sum()))

    Ca = linalg.null_space(np.ones((1, a)))
    Cb = linalg.null_space(np.ones((1, b)))
    basis = {"A": np.kron(Ca, np.ones((b, 1)) / np.sqrt(b)), "B": np.kron(np.ones((a, 1)) / np.sqrt(a), Cb), "AB": np.kron(Ca, Cb)}
    effects = {}
    for name, err, df1 in (("A", "AS", a - 1), ("B", "BS", b - 1), ("AB", "ABS", (a - 1) * (b - 1))):
        df2 = df1 * (n - 1)
        F = (ss[name] / df1) / (ss[err] / df2)
        eps = 1.0 if df1 == 1 else eps_of(basis[name])
        effects[name] = {"F": F, "df1": df1, "df2": df2, "p": float(stats.f.sf(F, df1, df2)), "eta2p": ss[name] / (ss[name] + ss[err]),
                         "epsilon": eps, "pGG": float(stats.f.sf(F, df1 * eps, df2 * eps)), "ss": ss[name], "ssError": ss[err]}
    return effects


out["twoWay"] = {"values": y.reshape(n, a * b).tolist(), "levels": [a, b], "effects": two_way(y)}

# D'Agostino-Pearson K^2 on the 44 girls' distances (all ages pooled) and on the Anscombe y values.
def k2(x):
    r = stats.normaltest(x)
    return {"skewness": float(stats.skew(x)), "kurtosis": float(stats.kurtosis(x, fisher=False)),
            "zSkewness": float(stats.skewtest(x).statistic), "zKurtosis": float(stats.kurtosistest(x).statistic),
            "k2": float(r.statistic), "p": float(r.pvalue)}


out["k2"] = {"girls": {"x": girls.flatten().tolist(), **k2(girls.flatten())}}

# Quantiles beyond the printed tables.
out["quantiles"] = {
    "t": [[p, df, float(stats.t.ppf(p, df))] for p, df in ((0.975, 1), (0.975, 3), (0.95, 11), (0.995, 60), (0.6, 4))],
    "f": [[p, d1, d2, float(stats.f.ppf(p, d1, d2))] for p, d1, d2 in ((0.95, 1, 11), (0.99, 3, 33), (0.9, 5, 7))],
    "tTail": [[t, df, float(2 * stats.t.sf(abs(t), df))] for t, df in ((12.5, 11), (0.3, 4), (40.0, 11))],
    "fTail": [[f, d1, d2, float(stats.f.sf(f, d1, d2))] for f, d1, d2 in ((9.1, 1, 11), (3.2, 3, 33), (60.0, 2, 20), (3.2, 2.13, 23.4))],
}

# The cluster-based permutation test (Maris & Oostenveld, 2007) on a small seeded cohort, n = 7 subjects on a
# 6 x 10 map with a planted positive and negative patch, all 2^7 sign flips enumerated by brute force: t by
# scipy.stats.ttest_1samp, clusters by scipy.ndimage.label (its default 2-D structure is 4-connectivity).
from scipy import ndimage

rng = np.random.default_rng(7)
ns, nf, nt = 7, 6, 10
maps = rng.normal(size=(ns, nf, nt))
maps[:, 1:3, 2:6] += 1.5
maps[:, 4:6, 6:9] -= 1.2
maps = np.round(maps, 4)
crit = stats.t.ppf(1 - 0.05 / 2, ns - 1)


def clusters_of(x):
    t = stats.ttest_1samp(x, 0.0, axis=0).statistic
    found = []
    for sign in (1, -1):
        lab, k = ndimage.label(sign * t > crit)
        for i in range(1, k + 1):
            found.append({"sign": sign, "mass": float(t[lab == i].sum()), "size": int((lab == i).sum())})
    return t, found


t_obs, observed = clusters_of(maps)
null = []
for code in range(2 ** ns):
    signs = np.array([-1.0 if code >> i & 1 else 1.0 for i in range(ns)]).reshape(ns, 1, 1)
    _, cl = clusters_of(maps * signs)
    null.append(max([abs(c["mass"]) for c in cl], default=0.0))
null = np.array(null)
for c in observed:
    c["p"] = float((null >= abs(c["mass"]) * (1 - 1e-12)).mean())
out["mapTest"] = {"values": maps.reshape(ns, nf * nt).tolist(), "nFrequencies": nf, "nTimes": nt, "t": t_obs.flatten().tolist(),
                  "clusters": sorted(observed, key=lambda c: -abs(c["mass"])), "null": null.tolist()}

print(json.dumps(out, indent=1))
