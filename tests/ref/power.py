#!/usr/bin/python3
"""Power and replicates needed in `avow check --format json` (the plan's "power"
object), against outside references.

References, each named beside its checks:
  - methods.md section 4 check values (computed there with mpmath and SciPy 1.10.1):
    NC-01 power of the one-way F test, k = 4, n = 10, f = 0.25 (lambda = 2.5), alpha
    0.05: 0.21223996641222842; NC-10 two-sample t power, n = 64 per group, d = 0.5:
    0.8014595579222541; NC-12 smallest n per group for power >= 0.80 with f = 0.25 and
    k = 2: 64.
  - SciPy 1.10.1 (Debian python3-scipy): scipy.stats.ncf.sf, scipy.stats.nct.sf/cdf and
    scipy.stats.f.isf / t.isf on noncentralities worked out here from the textbook
    definitions (least favourable configuration; contrast scaled so that its positive
    coefficients sum to 1), for one- and two-factor plans, blocks, unequal replicates,
    one-sided contrasts and each adjustment; relative tolerance 1e-9.
  - A Monte Carlo simulation (numpy 1.24.2 generator, fixed seed) of the one-way F test
    at the least favourable configuration: 20,000 simulated experiments; avow's power
    must lie within 4 standard errors of the simulated rejection rate.
  - Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, power table
    for the F test (from memory): u = 3 (k = 4), f = 0.25, n = 45 per group, alpha 0.05:
    power .80, to the table's two decimals.
"""
import itertools
import json
import math
import os
import subprocess
import sys
import tempfile

import numpy as np
from scipy import stats

AVOW = os.environ.get("AVOW", "build/avow")
fails = []
worst = 0.0

# sqrt(1/2) to 18 digits: lambda = n d^2 / (2 sigma^2) = n / 4 up to 1e-18
ROOT_HALF = "0.707106781186547524"


def plan(study):
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "s.avow")
        open(path, "w").write(study)
        p = subprocess.run([AVOW, "check", "--format", "json", path], capture_output=True, text=True)
        if p.returncode:
            print(p.stderr)
            raise SystemExit("avow check failed")
        return json.loads(p.stdout)["power"]


def rel(got, want, tol, what):
    global worst
    err = abs(got - want) / abs(want)
    worst = max(worst, err)
    if not err <= tol:
        fails.append(what)
        print("FAIL %s: %r vs %r (rel %.2e)" % (what, got, want, err))


def study(levels, body, plan_items, extra=""):
    s = 'study "power"\nresponse y\n'
    for name, lv in levels:
        s += "factor %s { %s }\n" % (name, " ".join(lv))
    s += extra + body + "plan {\n" + plan_items + "}\n"
    return s


# --- methods.md NC-10 and NC-12 (two groups, d = 0.5 sigma)
pw = plan(study([("g", ["a", "b"])], "contrast d = b - a\n", "replicates 64\nsigma 1\ndetect 0.5\npower 0.80\n"))
rel(pw["contrasts"][0]["power"], 0.8014595579222541, 1e-10, "methods.md NC-10 (contrast)")
rel(pw["f_tests"][0]["power"], 0.8014595579222541, 1e-10, "methods.md NC-10 (F with k = 2 equals the two-sided t)")
if pw["needed"]["replicates_per_cell"] != 64:
    fails.append("methods.md NC-12")
    print("FAIL NC-12: needed %r, want 64" % pw["needed"])

# --- methods.md NC-01 (k = 4, n = 10, f = 0.25: d = sigma sqrt(1/2) at the least
#     favourable configuration, f^2 = d^2 / (2 k sigma^2) = 1/16)
pw = plan(study([("g", ["a", "b", "c", "d"])], "", "replicates 10\nsigma 1\ndetect %s\n" % ROOT_HALF))
rel(pw["f_tests"][0]["power"], 0.21223996641222842, 1e-12, "methods.md NC-01")
rel(pw["f_tests"][0]["lambda"], 2.5, 1e-15, "lambda of NC-01")

# --- Cohen (1988) table, from memory: u = 3, f = 0.25, n = 45 -> .80
pw = plan(study([("g", ["a", "b", "c", "d"])], "", "replicates 45\nsigma 1\ndetect %s\n" % ROOT_HALF))
if abs(pw["f_tests"][0]["power"] - 0.80) > 0.005:
    fails.append("Cohen 1988 table (from memory)")
    print("FAIL Cohen table: %r" % pw["f_tests"][0]["power"])


# --- SciPy on independently worked noncentralities
def lfc_lambda(n_per_level, ds):
    """least favourable configuration, minimised over the pair of levels"""
    N = sum(n_per_level)
    best = math.inf
    L = len(n_per_level)
    for i, j in itertools.combinations(range(L), 2):
        mu = [0.0] * L
        mu[i], mu[j] = ds / 2, -ds / 2
        mbar = sum(n * m for n, m in zip(n_per_level, mu)) / N
        best = min(best, sum(n * (m - mbar) ** 2 for n, m in zip(n_per_level, mu)))
    return best


def t_power(level, df, delta, sides, crit=None):
    if crit is None:
        crit = stats.t.isf(level / sides, df)           # SciPy 1.10.1 scipy.stats.t.isf
    up = stats.nct.sf(crit, df, delta)                   # SciPy 1.10.1 scipy.stats.nct.sf
    return up if sides == 1 else up + stats.nct.cdf(-crit, df, delta)


cases = [
    # (name, factors, contrasts [(name, expr, coef by cell, sides)], plan, extra, blocks)
    ("one factor, unequal", [("g", ["a", "b", "c"])],
     [("c1", "c - mean(a, b)", {("c",): 1, ("a",): -.5, ("b",): -.5}, 2),
      ("c2", "b - a > 0", {("b",): 1, ("a",): -1}, 1)],
     "replicates a 5, b 8, c 6\nsigma 2.5\ndetect 3\n", "adjust bonferroni\n", 1),
    ("one factor, sidak", [("g", ["a", "b", "c", "d"])],
     [("c1", "a - b", {("a",): 1, ("b",): -1}, 2), ("c2", "mean(a, b) - mean(c, d) < 0",
      {("a",): .5, ("b",): .5, ("c",): -.5, ("d",): -.5}, 1), ("c3", "c - d", {("c",): 1, ("d",): -1}, 2)],
     "replicates 7\nsigma 1.2\ndetect 1.5\n", "adjust sidak\n", 1),
    ("two factors, scheffe", [("p", ["x", "y", "z"]), ("q", ["lo", "hi"])],
     [("c1", "hi - lo", {(i, 1): 1 / 3 for i in range(3)} | {(i, 0): -1 / 3 for i in range(3)}, 2),
      ("c2", "interaction(x - y, hi - lo)", {(0, 1): 1, (0, 0): -1, (1, 1): -1, (1, 0): 1}, 2)],
     "replicates 4\nsigma 0.8\ndetect 1\n", "adjust scheffe\n", 1),
    ("blocks, holm", [("t", ["u", "v", "w", "x"])],
     [("c1", "mean(v, w, x) - u > 0", {(1,): 1 / 3, (2,): 1 / 3, (3,): 1 / 3, (0,): -1}, 1),
      ("c2", "x - w", {(3,): 1, (2,): -1}, 2)],
     "replicates 1\nsigma 0.35\ndetect 0.5\n", "adjust holm\nblock s { s1 s2 s3 s4 s5 s6 }\n", 6),
]
for name, factors, contrasts, plan_items, extra, B in cases:
    body = "".join("contrast %s = %s\n" % (c[0], c[1]) for c in contrasts)
    pw = plan(study(factors, body, plan_items, extra))
    sigma = float(plan_items.split("sigma ")[1].split()[0])
    d = float(plan_items.split("detect ")[1].split()[0])
    ds = d / sigma
    cells = list(itertools.product(*[range(len(lv)) for _, lv in factors]))
    if "replicates a" in plan_items:
        reps = {("a",): 5, ("b",): 8, ("c",): 6}
        runs = {(0,): 5, (1,): 8, (2,): 6}
    else:
        r = int(plan_items.split("replicates ")[1].split()[0])
        runs = {c: r * B for c in cells}
    N = sum(runs.values())
    q = sum(len(lv) - 1 for _, lv in factors) + (0 if len(factors) == 1 else
                                                   math.prod(len(lv) - 1 for _, lv in factors))
    params = 1 + q + (B - 1)
    df = N - params
    alpha = 0.05
    for fi, (fname, lv) in enumerate(factors):
        nl = [sum(n for c, n in runs.items() if c[fi] == l) for l in range(len(lv))]
        lam = lfc_lambda(nl, ds)
        want = stats.ncf.sf(stats.f.isf(alpha, len(lv) - 1, df), len(lv) - 1, df, lam)   # SciPy ncf.sf
        got = [t for t in pw["f_tests"] if t["factor"] == fname][0]
        rel(got["lambda"], lam, 1e-12, "%s: lambda of %s" % (name, fname))
        rel(got["power"], want, 1e-9, "%s: F power of %s (scipy.stats.ncf.sf)" % (name, fname))
    m = len(contrasts)
    for cname, _, coef, sides in contrasts:
        full = {}
        for key, v in coef.items():
            cell = key if len(factors) > 1 else (list(factors[0][1]).index(key[0]) if isinstance(key[0], str) else key[0],)
            full[cell] = v
        pos = sum(v for v in full.values() if v > 0)
        var = sum((v / pos) ** 2 / runs[c] for c, v in full.items())
        delta = ds / math.sqrt(var)
        if "scheffe" in extra:
            crit = math.sqrt(q * stats.f.isf(alpha, q, df))
            want = t_power(None, df, delta, sides, crit)
        else:
            level = {"bonferroni": alpha / m, "holm": alpha / m, "sidak": 1 - (1 - alpha) ** (1 / m)}[
                extra.split("adjust ")[1].split()[0]]
            want = t_power(level, df, delta, sides)
        got = [c for c in pw["contrasts"] if c["name"] == cname][0]
        rel(got["delta"], delta, 1e-12, "%s: delta of %s" % (name, cname))
        rel(got["power"], want, 1e-9, "%s: power of %s (scipy.stats.nct)" % (name, cname))
    print("scipy: %-22s compared" % name)

# --- Monte Carlo: k = 3, n = 8, sigma 1, d = 1.2, least favourable configuration
pw = plan(study([("g", ["a", "b", "c"])], "", "replicates 8\nsigma 1\ndetect 1.2\n"))
power = pw["f_tests"][0]["power"]
rng = np.random.default_rng(20261202)            # numpy 1.24.2 PCG64, fixed seed
R, n, k = 20000, 8, 3
mu = np.array([0.6, -0.6, 0.0])
y = rng.standard_normal((R, k, n)) + mu[None, :, None]
means = y.mean(axis=2)
grand = means.mean(axis=1, keepdims=True)
ssb = n * ((means - grand) ** 2).sum(axis=1)
ssw = ((y - means[:, :, None]) ** 2).sum(axis=(1, 2))
F = (ssb / (k - 1)) / (ssw / (k * (n - 1)))
rate = float((F > stats.f.isf(0.05, k - 1, k * (n - 1))).mean())
se = math.sqrt(rate * (1 - rate) / R)
print("Monte Carlo: simulated %.4f +- %.4f (1 s.e.), avow %.4f" % (rate, se, power))
if abs(rate - power) > 4 * se:
    fails.append("Monte Carlo")

print("worst relative difference: %.2e" % worst)
if fails:
    print("%d failures" % len(fails))
    sys.exit(1)
print("power: all checks passed")
