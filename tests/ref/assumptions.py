#!/usr/bin/python3
"""`avow run --format json`: checks of the assumptions, robust alternatives and effect
sizes, end to end, against outside references.

References, each named beside its checks:
  - SciPy 1.10.1 (Debian python3-scipy): scipy.stats.levene(center='mean') and
    (center='median'), scipy.stats.bartlett, scipy.stats.kruskal, scipy.stats.shapiro
    (on the residuals; SciPy computes it in single precision, so W to 1e-6 and p to 2e-5
    absolute, methods.md section 5, widened to SciPy's own spread measured in
    tests/ref/diagnostics.py), scipy.stats.skew / kurtosis (bias=True, i.e. g1 and g2),
    scipy.stats.f.sf.
  - Welch's (1951) heteroscedastic F, evaluated here from its formula with Python's
    fractions (methods.md section 6).
  - Effect sizes from exact sums of squares with Python's fractions (methods.md section
    8 definitions): eta^2 = SS_T / SS_total, partial eta^2 = SS_T / (SS_T + SS_E),
    omega^2 = (SS_T - df_T MS_E) / (SS_total + MS_E), f = sqrt(SS_T / SS_E).
  - Externally studentized residuals from numpy 1.24.2 least squares (Debian
    python3-numpy): leverages from the hat matrix of the cell-means or block model,
    t_i = e_i / sqrt(MSE_(i) (1 - h_i)) with the leave-one-out mean square.
  - methods.md check values (sections 6 and 8, including the Steiger 2004 interval
    for Cohen's f from the noncentral F) on the NIST/SEMATECH e-Handbook one-way
    data (tests/golden/handbook): LV-mean-nist, LV-median-nist, BA-nist, WE-nist,
    KW-nist, ES-nist.
Tolerances: relative 1e-12 for statistics and p-values where SciPy's double arithmetic
allows (data sets here have small offsets), 1e-9 against numpy refits.
"""
import itertools
import json
import math
import os
import random
import subprocess
import sys
import tempfile
from fractions import Fraction

import numpy as np
from scipy import stats

AVOW = os.environ.get("AVOW", "build/avow")
fails = []
worst = {}


def rel(got, want, tol, what):
    err = abs(got - want) / max(abs(want), 1e-300)
    key = what.split(":")[0]
    worst[key] = max(worst.get(key, 0.0), err)
    if not err <= tol:
        fails.append(what)
        print("FAIL %s: %r vs %r (rel %.2e > %.0e)" % (what, got, want, err, tol))


def absd(got, want, tol, what):
    err = abs(got - want)
    key = what.split(":")[0]
    worst[key] = max(worst.get(key, 0.0), err)
    if not err <= tol:
        fails.append(what)
        print("FAIL %s: %r vs %r (abs %.2e > %.0e)" % (what, got, want, err, tol))


def run(study, header, rows, path=None):
    with tempfile.TemporaryDirectory() as d:
        open(os.path.join(d, "s.avow"), "w").write(study)
        with open(os.path.join(d, "d.csv"), "w") as f:
            f.write(",".join(header) + "\n")
            for r in rows:
                f.write(",".join(r) + "\n")
        p = subprocess.run([AVOW, "run", "--format", "json", path or os.path.join(d, "s.avow")],
                           capture_output=True, text=True)
        if p.returncode:
            print(p.stderr)
            raise SystemExit("avow failed")
        return json.loads(p.stdout)


def welch(groups):
    """Welch (1951) from its formula, exactly."""
    k = len(groups)
    w, m = [], []
    for g in groups:
        n = len(g)
        mean = sum(g) / n
        var = sum((x - mean) ** 2 for x in g) / (n - 1)
        w.append(n / var)
        m.append(mean)
    W = sum(w)
    yt = sum(wi * mi for wi, mi in zip(w, m)) / W
    lam = sum((1 - wi / W) ** 2 / (len(g) - 1) for wi, g in zip(w, groups))
    F = (sum(wi * (mi - yt) ** 2 for wi, mi in zip(w, m)) / (k - 1)) / (1 + Fraction(2 * (k - 2)) * lam / (k * k - 1))
    return F, (k * k - 1) / (3 * lam)


def check_groups(tag, js, groups_f):
    """groups_f: list of lists of Fractions, the cells."""
    D, R = js["diagnostics"], js["robust"]
    fl = [[float(x) for x in g] for g in groups_f]
    for key, centre in (("levene", "mean"), ("brown_forsythe", "median")):
        ref = stats.levene(*fl, center=centre)        # SciPy 1.10.1 scipy.stats.levene
        rel(D[key]["statistic"], ref.statistic, 1e-12, "%s: %s W" % (key, tag))
        rel(D[key]["p"], ref.pvalue, 1e-11, "%s: %s p" % (key, tag))
    ref = stats.bartlett(*fl)                          # SciPy 1.10.1 scipy.stats.bartlett
    rel(D["bartlett"]["statistic"], ref.statistic, 1e-12, "bartlett: %s T" % tag)
    rel(D["bartlett"]["p"], ref.pvalue, 1e-11, "bartlett: %s p" % tag)
    if R is not None:
        ref = stats.kruskal(*fl)                       # SciPy 1.10.1 scipy.stats.kruskal
        rel(R["kruskal_wallis"]["h"], ref.statistic, 1e-12, "kruskal: %s H" % tag)
        rel(R["kruskal_wallis"]["p"], ref.pvalue, 1e-11, "kruskal: %s p" % tag)
        F, df2 = welch(groups_f)                       # Welch (1951), formula, fractions
        rel(R["welch"]["statistic"], float(F), 1e-14, "welch: %s F" % tag)
        rel(R["welch"]["df2"], float(df2), 1e-14, "welch: %s df2" % tag)
        rel(R["welch"]["p"], stats.f.sf(float(F), len(groups_f) - 1, float(df2)), 1e-11, "welch: %s p" % tag)


def check_residuals(tag, js, resid, X, y):
    D = js["diagnostics"]
    sw = stats.shapiro(resid)                           # SciPy 1.10.1 scipy.stats.shapiro
    absd(D["shapiro_wilk"]["w"], sw.statistic, 1e-6, "shapiro: %s W" % tag)
    absd(D["shapiro_wilk"]["p"], sw.pvalue, 2.2e-5, "shapiro: %s p" % tag)
    rel(D["residual_moments"]["skewness"], stats.skew(resid, bias=True), 1e-10, "moments: %s skew" % tag)
    rel(D["residual_moments"]["excess_kurtosis"], stats.kurtosis(resid, bias=True), 1e-10, "moments: %s kurt" % tag)
    # externally studentized residuals beyond 3 (numpy 1.24.2 hat matrix)
    H = X @ np.linalg.pinv(X.T @ X) @ X.T
    h = np.diag(H)
    n, p = X.shape
    rank = np.linalg.matrix_rank(X)
    dfe = n - rank
    sse = float(resid @ resid)
    t = []
    for i in range(n):
        if h[i] > 1 - 1e-12:
            t.append(0.0)
            continue
        s2 = (sse - resid[i] ** 2 / (1 - h[i])) / (dfe - 1)
        t.append(resid[i] / math.sqrt(s2 * (1 - h[i])))
    big = [i for i in range(n) if abs(t[i]) > 3]
    un = D["unusual"]
    if un["count"] != len(big):
        fails.append("unusual count %s" % tag)
        print("FAIL unusual %s: %d vs %d" % (tag, un["count"], len(big)))
    for u, i in zip(un["listed"], big):
        rel(u["t"], t[i], 1e-9, "studentized: %s line %d" % (tag, u["line"]))


def effect_sizes(tag, js, ss_terms, sse, dfe, sst):
    got = {e["source"]: e for e in js["effect_sizes"]["terms"]}
    mse = sse / dfe
    for src, (ss, df) in ss_terms.items():
        e = got[src]
        rel(e["eta_squared"], float(ss / sst), 1e-15, "effect: %s %s eta2" % (tag, src))
        rel(e["partial_eta_squared"], float(ss / (ss + sse)), 1e-15, "effect: %s %s partial" % (tag, src))
        rel(e["omega_squared"], float((ss - df * mse) / (sst + mse)), 1e-14, "effect: %s %s omega2" % (tag, src))
        rel(e["cohen_f"], math.sqrt(float(ss / sse)), 2e-16 * 4, "effect: %s %s f" % (tag, src))


rng = random.Random(20261203)

# 1. one factor, unequal n, values to 2 decimals (ties), one wild value
levels = ["a", "b", "c", "d"]
cells = {l: [] for l in levels}
rows = []
for i, l in enumerate(levels):
    for _ in range(rng.randint(5, 12)):
        v = Fraction(round(rng.gauss(10 + i, 1 + 0.4 * i), 1)).limit_denominator(10)
        cells[l].append(v)
rows = [[l, "%.1f" % float(v)] for l in levels for v in cells[l]]
rows.append(["b", "25.0"])
cells["b"].append(Fraction(25))
js = run('study "one"\nresponse y\nfactor g { a b c d }\ndata "d.csv"\n', ["g", "y"], rows)
check_groups("one-way", js, [cells[l] for l in levels])
yv = [float(v) for l in levels for v in cells[l]]
fit = [float(sum(cells[l]) / len(cells[l])) for l in levels for v in cells[l]]
X = np.array([[1.0 if l == m else 0.0 for m in levels] for l in levels for v in cells[l]])
check_residuals("one-way", js, np.array(yv) - np.array(fit), X, np.array(yv))
allv = [v for l in levels for v in cells[l]]
gm = sum(allv) / len(allv)
sst = sum((v - gm) ** 2 for v in allv)
sse = sum(sum((v - sum(cells[l]) / len(cells[l])) ** 2 for v in cells[l]) for l in levels)
effect_sizes("one-way", js, {"g": (sst - sse, 3)}, sse, len(allv) - 4, sst)
print("one factor: compared")

# 2. two factors, every interaction
A, B = ["p", "q", "r"], ["lo", "hi"]
cells = {}
rows = []
for a, b in itertools.product(A, B):
    vs = [Fraction(round(rng.gauss(5 + A.index(a) + 2 * B.index(b), 0.5 + 0.3 * A.index(a)), 2)).limit_denominator(100)
          for _ in range(rng.randint(3, 7))]
    cells[(a, b)] = vs
    rows += [[a, b, "%.2f" % float(v)] for v in vs]
js = run('study "two"\nresponse y\nfactor f { p q r }\nfactor h { lo hi }\ndata "d.csv"\n', ["f", "h", "y"], rows)
keys = list(itertools.product(A, B))
check_groups("two-factor", js, [cells[k] for k in keys])
yv = np.array([float(v) for k in keys for v in cells[k]])
fit = np.array([float(sum(cells[k]) / len(cells[k])) for k in keys for v in cells[k]])
X = np.array([[1.0 if k == m else 0.0 for m in keys] for k in keys for v in cells[k]])
check_residuals("two-factor", js, yv - fit, X, yv)
print("two factors: compared")

# 3. one factor in blocks, one observation per cell, a missing cell: residual checks
#    against the block model's least squares fit (numpy), spread tests on residuals
T, Bk = ["t0", "t1", "t2", "t3"], ["b%d" % i for i in range(7)]
obs = []
for bi, b in enumerate(Bk):
    for ti, t in enumerate(T):
        if (bi, ti) == (3, 2):
            continue
        obs.append((t, b, round(20 + ti + 1.5 * bi + rng.gauss(0, 1), 2)))
js = run('study "blocks"\nresponse y\nfactor t { t0 t1 t2 t3 }\nblock b\ndata "d.csv"\n', ["t", "b", "y"],
         [[t, b, "%.2f" % y] for t, b, y in obs])
X = np.array([[1.0] + [1.0 if t == m else 0.0 for m in T[1:]] + [1.0 if b == m else 0.0 for m in Bk[1:]]
              for t, b, _ in obs])
yv = np.array([y for _, _, y in obs])
beta, *_ = np.linalg.lstsq(X, yv, rcond=None)
resid = yv - X @ beta
check_residuals("blocks", js, resid, X, yv)
# the spread tests group the residuals by treatment (SciPy on numpy's residuals;
# avow's residuals are exact and rounded to 17 digits, so relative 1e-9 here)
D = js["diagnostics"]
grp = [[resid[i] for i in range(len(obs)) if obs[i][0] == t] for t in T]
for key, centre in (("levene", "mean"), ("brown_forsythe", "median")):
    ref = stats.levene(*grp, center=centre)            # SciPy 1.10.1 scipy.stats.levene
    rel(D[key]["statistic"], ref.statistic, 1e-9, "levene-residuals: blocks %s" % key)
check = js["robust"] is None
if not check:
    fails.append("robust for blocks")
print("blocks: compared")

# 4. methods.md check values on the NIST e-Handbook data (tests/golden/handbook)
js = json.loads(subprocess.run([AVOW, "run", "--format", "json", "tests/golden/handbook/study.avow"],
                               capture_output=True, text=True).stdout)
D, R = js["diagnostics"], js["robust"]
rel(D["levene"]["statistic"], 6552 / 28633, 1e-15, "methods.md LV-mean-nist: W")
rel(D["levene"]["p"], 0.7988586459302591, 1e-12, "methods.md LV-mean-nist: p")
rel(D["brown_forsythe"]["statistic"], 114 / 1717, 1e-15, "methods.md LV-median-nist: W")
rel(D["brown_forsythe"]["p"], 0.9361025880088414, 1e-12, "methods.md LV-median-nist: p")
rel(D["bartlett"]["statistic"], 0.2336797162070151, 1e-14, "methods.md BA-nist: T")
rel(D["bartlett"]["p"], 0.8897276644308412, 1e-12, "methods.md BA-nist: p")
rel(R["welch"]["statistic"], 9.02374134404893, 1e-14, "methods.md WE-nist: F")
rel(R["welch"]["df2"], 909055461136 / 114631586211, 1e-15, "methods.md WE-nist: df2")
rel(R["welch"]["p"], 0.00905139857912335, 1e-12, "methods.md WE-nist: p")
rel(R["kruskal_wallis"]["h"], 4690 / 559, 1e-15, "methods.md KW-nist: H")
rel(R["kruskal_wallis"]["p"], 0.015070877263608446, 1e-12, "methods.md KW-nist: p")
e = js["effect_sizes"]["terms"][0]
rel(e["eta_squared"], 20923 / 34012, 1e-15, "methods.md ES-nist: eta2")
rel(e["omega_squared"], 74966 / 140411, 1e-15, "methods.md ES-nist: omega2")
rel(e["cohen_f"], 1.2643250529065442, 1e-15, "methods.md ES-nist: f")
# Steiger (2004) interval for f at 95%: methods.md ES-nist (SciPy ncf inverted, checked with mpmath)
rel(e["cohen_f_ci"][0], 0.38156590753253994, 1e-10, "methods.md ES-nist: f 95% lower")
rel(e["cohen_f_ci"][1], 1.7720208495876562, 1e-10, "methods.md ES-nist: f 95% upper")
print("methods.md check values: compared")

# 4b. planned contrasts under `variances separate`: b - a against Welch's two-sample t
#     test (SciPy 1.10.1 scipy.stats.ttest_ind(equal_var=False)), and a three-level
#     contrast against the Welch-Satterthwaite formula with fractions
g = {"a": ["1.0", "1.4", "0.8", "1.1"], "b": ["2.0", "3.1", "1.2"], "c": ["5.5", "3.0", "7.1", "4.4", "6.0"]}
js = run('study "sep"\nresponse y\nfactor g { a b c }\nvariances separate\nadjust none\ndata "d.csv"\n'
         'contrast ab = b - a\ncontrast rest = c - mean(a, b) > 0\n', ["g", "y"],
         [[k, v] for k, vs in g.items() for v in vs])
C = {c["name"]: c for c in js["contrasts"]}
ref = stats.ttest_ind([float(x) for x in g["b"]], [float(x) for x in g["a"]], equal_var=False)
rel(C["ab"]["t"], ref.statistic, 1e-13, "separate-variances: ab t (scipy ttest_ind)")
rel(C["ab"]["p"], ref.pvalue, 1e-11, "separate-variances: ab p (scipy ttest_ind)")
fr = {k: [Fraction(x) for x in vs] for k, vs in g.items()}
coef = {"c": Fraction(1), "a": Fraction(-1, 2), "b": Fraction(-1, 2)}
w = {}
for k, vs in fr.items():
    n = len(vs)
    mean = sum(vs) / n
    s2 = sum((x - mean) ** 2 for x in vs) / (n - 1)
    w[k] = coef[k] ** 2 * s2 / n
df = sum(w.values()) ** 2 / sum(w[k] ** 2 / (len(fr[k]) - 1) for k in w)
se = math.sqrt(float(sum(w.values())))
rel(C["rest"]["se"], se, 1e-15, "separate-variances: rest se (formula, fractions)")
rel(C["rest"]["df"], float(df), 1e-15, "separate-variances: rest df (formula, fractions)")
rel(C["rest"]["p"], stats.t.sf(C["rest"]["estimate"] / se, float(df)), 1e-11, "separate-variances: rest p (scipy t.sf)")

# 5. --no-diagnostics: nothing computed, nothing else changed
a = subprocess.run([AVOW, "run", "--format", "json", "tests/golden/handbook/study.avow"], capture_output=True, text=True).stdout
b = subprocess.run([AVOW, "run", "--format", "json", "--no-diagnostics", "tests/golden/handbook/study.avow"],
                   capture_output=True, text=True).stdout
ja, jb = json.loads(a), json.loads(b)
if jb["diagnostics"] != {"computed": False} or jb["robust"] is not None:
    fails.append("no-diagnostics leaves diagnostics")
for k in ja:
    if k not in ("diagnostics", "robust") and ja[k] != jb[k]:
        fails.append("no-diagnostics changes %s" % k)

for k in sorted(worst):
    print("  worst %-18s %.2e" % (k, worst[k]))
if fails:
    print("%d failures" % len(fails))
    sys.exit(1)
print("assumptions: all checks passed")
