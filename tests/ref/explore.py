#!/usr/bin/env python3
"""Exploratory comparisons of `avow run` against independent references.

- explore pairs (Tukey-Kramer): p-values and simultaneous intervals against
  scipy.stats.tukey_hsd (SciPy 1.10.1, Debian python3-scipy), which uses the
  Tukey-Kramer method for unequal group sizes. Tolerance: relative 1e-6 on p-values
  above 1e-6 and absolute 1e-9 below (SciPy integrates the studentized range to about
  that accuracy), relative 1e-8 on interval ends.
- explore pairs under `variances separate` (Games-Howell): the formula evaluated here,
  independently, with scipy.stats.studentized_range.sf / .ppf (SciPy 1.10.1) on the
  Welch-Satterthwaite degrees of freedom of each pair; same tolerances.
- explore versus (Dunnett): the many-to-one distribution has no SciPy counterpart in
  1.10; here the critical value is checked by simulation: with the avow critical value
  d, the simulated probability that max |T_i| <= d under the null must be 0.95 within
  4 standard errors (standard error sqrt(0.95 * 0.05 / N), N = 400,000 draws).
The data sets are generated here (seeded); the references compute from the same data.
"""
import json
import math
import os
import random
import subprocess
import sys
import tempfile

import numpy as np
from scipy import stats

AVOW = os.environ.get("AVOW", "build/avow")
passed = failed = 0


def check(label, got, want, rel=None, abs_=None):
    global passed, failed
    ok = False
    if got is not None and want is not None:
        diff = abs(got - want)
        ok = (rel is not None and diff <= rel * abs(want)) or (abs_ is not None and diff <= abs_)
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL %s: got %r, want %r" % (label, got, want))


def make_data(seed, sizes, spreads):
    rng = random.Random(seed)
    groups = []
    for i, (n, sd) in enumerate(zip(sizes, spreads)):
        groups.append(["%.4f" % (50 + 0.8 * i * rng.random() + rng.gauss(0, sd)) for _ in range(n)])
    return groups


def run(tmp, name, groups, extra):
    k = len(groups)
    with open(os.path.join(tmp, name + ".csv"), "w") as f:
        f.write("g,y\n")
        for i, g in enumerate(groups):
            for v in g:
                f.write("l%d,%s\n" % (i, v))
    study = os.path.join(tmp, name + ".avow")
    with open(study, "w") as f:
        f.write('study "%s"\nresponse y\nfactor g { %s }\ndata "%s.csv"\n%s\n'
                % (name, " ".join("l%d" % i for i in range(k)), name, extra))
    out = subprocess.run([AVOW, "run", study, "--format", "json"], capture_output=True, text=True)
    if out.returncode != 0:
        sys.stderr.write(out.stderr)
        raise SystemExit("avow failed on " + name)
    rep = json.loads(out.stdout)
    return {e["method"]: e for e in rep["explore"]}, rep


def p_check(label, got, want):
    if want > 1e-6:
        check(label, got, want, rel=1e-6)
    else:
        check(label, got, want, abs_=1e-9)


def main():
    with tempfile.TemporaryDirectory() as tmp:
        # Tukey-Kramer, unequal n.
        for seed, sizes in ((1, [5, 8, 6, 7]), (2, [3, 12, 4, 9, 6, 5])):
            groups = make_data(seed, sizes, [1.0] * len(sizes))
            ex, _ = run(tmp, "tk%d" % seed, groups, "explore pairs")
            data = [np.array([float(v) for v in g]) for g in groups]
            ref = stats.tukey_hsd(*data)
            ci = ref.confidence_interval(confidence_level=0.95)
            for c in ex["tukey-kramer"]["comparisons"]:
                a, b = int(c["a"][1:]), int(c["b"][1:])
                p_check("TK seed %d %s p" % (seed, c["name"]), c["p_adjusted"], ref.pvalue[a, b])
                check("TK seed %d %s ci low" % (seed, c["name"]), c["ci"][0], ci.low[a, b], rel=1e-8, abs_=1e-10)
                check("TK seed %d %s ci high" % (seed, c["name"]), c["ci"][1], ci.high[a, b], rel=1e-8, abs_=1e-10)
        # Games-Howell, unequal n and spreads.
        sizes, spreads = [6, 9, 5, 12], [0.5, 1.5, 3.0, 1.0]
        groups = make_data(3, sizes, spreads)
        ex, _ = run(tmp, "gh", groups, "variances separate\nexplore pairs")
        data = [np.array([float(v) for v in g]) for g in groups]
        k = len(data)
        for c in ex["games-howell"]["comparisons"]:
            a, b = int(c["a"][1:]), int(c["b"][1:])
            va, vb = data[a].var(ddof=1) / len(data[a]), data[b].var(ddof=1) / len(data[b])
            df = (va + vb) ** 2 / (va ** 2 / (len(data[a]) - 1) + vb ** 2 / (len(data[b]) - 1))
            d = data[a].mean() - data[b].mean()
            q = abs(d) / math.sqrt((va + vb) / 2)
            p = stats.studentized_range.sf(q, k, df)
            half = stats.studentized_range.ppf(0.95, k, df) / math.sqrt(2) * math.sqrt(va + vb)
            check("GH %s df" % c["name"], c["df"], df, rel=1e-10)
            check("GH %s q" % c["name"], c["statistic"], q, rel=1e-10)
            p_check("GH %s p" % c["name"], c["p_adjusted"], p)
            check("GH %s ci low" % c["name"], c["ci"][0], d - half, rel=1e-8, abs_=1e-10)
            check("GH %s ci high" % c["name"], c["ci"][1], d + half, rel=1e-8, abs_=1e-10)
        # Dunnett, unequal n: simulate the null distribution of max |T_i| at avow's d.
        sizes = [10, 5, 8, 12]
        groups = make_data(4, sizes, [1.0] * 4)
        ex, rep = run(tmp, "du", groups, "explore versus l0")
        d = ex["dunnett"]["critical_value"]
        df = rep["anova"][1]["df"]
        n0, ns = sizes[0], sizes[1:]
        rng = np.random.default_rng(20261201)
        N = 400_000
        z0 = rng.standard_normal(N) / math.sqrt(n0)
        s = np.sqrt(rng.chisquare(df, N) / df)
        inside = np.ones(N, dtype=bool)
        for n in ns:
            zi = rng.standard_normal(N) / math.sqrt(n)
            t = (zi - z0) / (s * math.sqrt(1 / n + 1 / n0))
            inside &= np.abs(t) <= d
        prob = inside.mean()
        se = math.sqrt(0.95 * 0.05 / N)
        check("Dunnett coverage at d = %.6f (simulated %.5f, s.e. %.5f)" % (d, prob, se), prob, 0.95, abs_=4 * se)
    print("explorations: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
