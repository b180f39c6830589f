#!/usr/bin/python3
"""Multi-factor studies: `avow run --format json` against outside references.

References, each named beside its checks:
  A. Python's `fractions` (Python 3.11 standard library): balanced two- and three-factor
     data with large constant offsets; the classical decomposition of a balanced
     factorial (every main effect and interaction from the cell, level and grand means)
     computed exactly. Score: LRE = -log10(relative error); every sum of squares, mean
     square and F must reach 12 (the issue's target), and reaches 14 or more in practice.
  B. numpy 1.24.2 least squares (Debian python3-numpy, numpy.linalg.lstsq) with
     sum-to-zero (effect) coding: unbalanced data, each term's sum of squares adjusted
     for all other terms = increase of the residual sum of squares when the term's
     columns are dropped from the full model; df and F from the same fits; p from
     scipy.stats.f.sf (SciPy 1.10.1, Debian python3-scipy). Cases: unbalanced two-factor
     with every interaction; the same data under an additive model (interactions none);
     a blocked study with one block-treatment cell missing and block labels taken from
     the data; a two-factor blocked study. Contrast estimates and standard errors against
     c' X b and sqrt(MSE c' X (X'X)^-1 X' c) from the same fit. Tolerance: relative
     1e-9 (numpy works in binary64 from values parsed with float(); avow is exact).
  C. Textbook worked examples with printed sums of squares (values typed from memory,
     marked so): a 3 x 3 two-factor experiment with 4 replicates and a randomized
     complete block design with 4 treatments in 6 blocks, both from D. C. Montgomery,
     "Design and Analysis of Experiments" (from memory: data and printed table).
     Tolerance: the printed rounding (half a unit in the last printed digit).
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
failures = []
worst = {"lre": 99.0, "rel_numpy": 0.0}


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL", what)


def lre(got, want):
    want = float(want)
    if want == 0:
        return 15.0 if got == 0 else -math.log10(abs(got))
    err = abs(got - want) / abs(want)
    return 16.0 if err == 0 else -math.log10(err)


def run(study, rows, header):
    with tempfile.TemporaryDirectory() as d:
        with open(os.path.join(d, "s.avow"), "w") as f:
            f.write(study)
        with open(os.path.join(d, "d.csv"), "w") as f:
            f.write(",".join(header) + "\n")
            for r in rows:
                f.write(",".join(r) + "\n")
        p = subprocess.run([AVOW, "run", "--format", "json", os.path.join(d, "s.avow")],
                           capture_output=True, text=True)
        if p.returncode != 0:
            print(p.stderr)
            raise SystemExit("avow run failed")
        return json.loads(p.stdout)


def rows_by_source(js):
    return {r["source"]: r for r in js["anova"]}


# ---------------------------------------------------------------- A. balanced, exact

def balanced_case(name, levels, n, offset, decimals, seed):
    rng = random.Random(seed)
    k = len(levels)
    names = ["f%d" % i for i in range(k)]
    cells = list(itertools.product(*[range(L) for L in levels]))
    data = {}
    rows = []
    for c in cells:
        vals = []
        for _ in range(n):
            units = rng.randint(-3 * 10**decimals, 3 * 10**decimals) + sum(c) * rng.randint(0, 10**decimals)
            v = Fraction(offset) + Fraction(units, 10**decimals)
            text = str(Fraction(offset)) if units == 0 else None
            # decimal text of v, exactly
            sign = "-" if v < 0 else ""
            a = abs(v)
            ip = a.numerator // a.denominator
            fp = a - ip
            digits = str(int(fp * 10**decimals)).rjust(decimals, "0")
            text = "%s%d.%s" % (sign, ip, digits)
            assert Fraction(text) == v
            vals.append(v)
            rows.append(["L%d" % c[i] for i in range(k)] + [text])
        data[c] = vals
    study = 'study "%s"\nresponse y\n' % name
    for i, L in enumerate(levels):
        study += "factor %s { %s }\n" % (names[i], " ".join("L%d" % j for j in range(L)))
    study += 'data "d.csv"\n'
    js = run(study, rows, names + ["y"])
    got = rows_by_source(js)
    # exact classical decomposition
    N = len(cells) * n
    grand = sum(sum(v) for v in data.values()) / N
    cellmean = {c: sum(v) / n for c, v in data.items()}

    def marg(subset):
        """means over cells grouped by the factors in subset"""
        acc = {}
        for c, m in cellmean.items():
            key = tuple(c[i] for i in subset)
            acc.setdefault(key, []).append(m)
        return {key: sum(v) / len(v) for key, v in acc.items()}

    effects = {}
    for r in range(1, k + 1):
        for subset in itertools.combinations(range(k), r):
            m = marg(subset)
            # effect by inclusion-exclusion over sub-subsets
            eff = {}
            for key in m:
                val = Fraction(0)
                for s in range(len(subset) + 1):
                    for sub in itertools.combinations(range(len(subset)), s):
                        sign = (-1) ** (len(subset) - s)
                        if s == 0:
                            val += sign * grand
                        else:
                            mm = marg(tuple(subset[i] for i in sub))
                            val += sign * mm[tuple(key[i] for i in sub)]
                eff[key] = val
            reps = N // len(m)
            ss = sum(reps * e * e for e in eff.values())
            df = 1
            for i in subset:
                df *= levels[i] - 1
            effects[" by ".join(names[i] for i in subset)] = (ss, df)
    ssw = sum(sum((x - cellmean[c]) ** 2 for x in v) for c, v in data.items())
    dfe = N - len(cells)
    mse = ssw / dfe
    sst = sum((x - grand) ** 2 for v in data.values() for x in v)
    for src, (ss, df) in effects.items():
        g = got[src]
        check(g["df"] == df, "%s %s df %s != %s" % (name, src, g["df"], df))
        for key, want in (("ss", ss), ("ms", ss / df), ("f", ss / df / mse)):
            L = lre(g[key], want)
            worst["lre"] = min(worst["lre"], L)
            check(L >= 12, "%s %s %s LRE %.1f < 12" % (name, src, key, L))
        pref = stats.f.sf(float(ss / df / mse), df, dfe)   # SciPy 1.10.1 scipy.stats.f.sf
        check(abs(g["p"] - pref) <= 1e-12 * pref + 1e-300, "%s %s p %r vs scipy %r" % (name, src, g["p"], pref))
    for src, want in (("residual", ssw), ("total", sst)):
        L = lre(got[src]["ss"], want)
        worst["lre"] = min(worst["lre"], L)
        check(L >= 12, "%s %s ss LRE %.1f" % (name, src, L))
    # balanced: the exact terms add up to the total (fractions identity)
    check(sum(ss for ss, _ in effects.values()) + ssw == sst, "%s classical identity" % name)
    check(js["model"]["balanced"] is True, "%s balanced flag" % name)
    # marginal means: the level means of a balanced design
    for lev in js["levels"]:
        f = names.index(lev["factor"])
        j = int(lev["level"][1:])
        want = marg((f,))[(j,)]
        L = lre(lev["mean"], want)
        worst["lre"] = min(worst["lre"], L)
        check(L >= 12, "%s margin %s %s LRE %.1f" % (name, lev["factor"], lev["level"], L))
    print("A %-22s ok: min LRE so far %.1f" % (name, worst["lre"]))


balanced_case("two-factor 3x4 1e7", [3, 4], 3, "10000000", 3, 11)
balanced_case("two-factor 2x2 1e11", [2, 2], 5, "-400000000000", 2, 12)
balanced_case("three-factor 2x3x2", [2, 3, 2], 2, "250000", 4, 13)
balanced_case("three-factor 3x2x4 1e9", [3, 2, 4], 3, "1000000000", 3, 14)

# ---------------------------------------------------------------- B. numpy least squares


def effect_code(L, l):
    return [1.0 if l == j else (-1.0 if l == L - 1 else 0.0) for j in range(L - 1)]


def design(obs, levels, terms, nblocks):
    """obs: list of (levels tuple, block, y). terms: list of factor-index tuples."""
    cols = {"intercept": [0]}
    X = []
    for c, b, _ in obs:
        row = [1.0]
        for t in terms:
            parts = [effect_code(levels[i], c[i]) for i in t]
            for combo in itertools.product(*parts):
                row.append(float(np.prod(combo)))
        if nblocks > 1:
            row += effect_code(nblocks, b)
        X.append(row)
    pos = 1
    for t in terms:
        d = int(np.prod([levels[i] - 1 for i in t]))
        cols[t] = list(range(pos, pos + d))
        pos += d
    if nblocks > 1:
        cols["block"] = list(range(pos, pos + nblocks - 1))
    return np.array(X), cols


def rss(X, y, keep):
    Xs = X[:, keep]
    b, *_ = np.linalg.lstsq(Xs, y, rcond=None)
    r = y - Xs @ b
    return float(r @ r)


def close(got, want, tol, what):
    err = abs(got - want) / max(abs(want), 1e-300)
    worst["rel_numpy"] = max(worst["rel_numpy"], err)
    check(err <= tol, "%s: %r vs %r (rel %.2e)" % (what, got, want, err))


def numpy_case(name, levels, obs, terms, interactions, block_decl, contrasts):
    k = len(levels)
    names = ["f%d" % i for i in range(k)]
    nblocks = 1 + max(b for _, b, _ in obs) if block_decl else 1
    study = 'study "%s"\nresponse y\n' % name
    for i, L in enumerate(levels):
        study += "factor %s { %s }\n" % (names[i], " ".join("L%d" % j for j in range(L)))
    if block_decl:
        study += block_decl + "\n"
    if interactions:
        study += "interactions %s\n" % interactions
    study += 'data "d.csv"\n'
    for cname, expr, _ in contrasts:
        study += "contrast %s = %s\n" % (cname, expr)
    header = names + (["blk"] if block_decl else []) + ["y"]
    rows = [["L%d" % c[i] for i in range(k)] + (["B%d" % b] if block_decl else []) + [y] for c, b, y in obs]
    js = run(study, rows, header)
    got = rows_by_source(js)
    y = np.array([float(v) for _, _, v in obs])
    X, cols = design(obs, levels, terms, nblocks)
    full = list(range(X.shape[1]))
    R = rss(X, y, full)
    dfe = len(obs) - X.shape[1]
    mse = R / dfe
    close(got["residual"]["ss"], R, 1e-9, "%s residual ss" % name)
    check(got["residual"]["df"] == dfe, "%s residual df" % name)
    sources = [(" by ".join(names[i] for i in t), cols[t]) for t in terms]
    if nblocks > 1:
        sources.append(("blk", cols["block"]))
    for src, cc in sources:
        ss = rss(X, y, [c for c in full if c not in cc]) - R
        g = got[src]
        check(g["df"] == len(cc), "%s %s df" % (name, src))
        close(g["ss"], ss, 1e-9, "%s %s ss" % (name, src))
        F = ss / len(cc) / mse
        close(g["f"], F, 1e-9, "%s %s F" % (name, src))
        close(g["p"], stats.f.sf(F, len(cc), dfe), 1e-8, "%s %s p (scipy.stats.f.sf)" % (name, src))
    # contrasts: c' mu_hat over treatment cells averaged over blocks
    b, *_ = np.linalg.lstsq(X, y, rcond=None)
    XtXi = np.linalg.inv(X.T @ X)
    gotc = {c["name"]: c for c in js["contrasts"]}
    cells = list(itertools.product(*[range(L) for L in levels]))
    for cname, _, coef in contrasts:
        g = np.zeros(X.shape[1])
        for c in cells:
            w = coef.get(c, 0.0)
            if not w:
                continue
            for blk in range(nblocks):
                row, _ = design([(c, blk, "0")], levels, terms, nblocks)
                g += w / nblocks * row[0]
        est = float(g @ b)
        se = math.sqrt(mse * float(g @ XtXi @ g))
        close(gotc[cname]["estimate"], est, 1e-9, "%s contrast %s estimate" % (name, cname))
        close(gotc[cname]["se"], se, 1e-9, "%s contrast %s se" % (name, cname))
    print("B %-22s ok: worst relative difference so far %.2e" % (name, worst["rel_numpy"]))


rng = random.Random(20261202)
# unbalanced two-factor, every interaction
lv = [3, 4]
obs = []
for c in itertools.product(range(3), range(4)):
    for _ in range(rng.randint(1, 5)):
        obs.append((c, 0, "%.2f" % (50 + 3 * c[0] - 2 * c[1] + (1.5 if c == (1, 2) else 0) + rng.gauss(0, 1.5))))
marg0 = {c: (0.25 if c[0] == 0 else -0.25 if c[0] == 2 else 0.0) for c in itertools.product(range(3), range(4))}
inter = {(0, 0): 1.0, (0, 1): -1.0, (1, 0): -1.0, (1, 1): 1.0}
numpy_case("unbalanced 3x4", lv, obs, [(0,), (1,), (0, 1)], None, None,
           [("m", "f0.L0 - f0.L2", marg0), ("i", "interaction(f0.L0 - f0.L1, f1.L0 - f1.L1)", inter)])
numpy_case("additive 3x4", lv, obs, [(0,), (1,)], "none", None,
           [("m", "f0.L0 - f0.L2", marg0)])
# larger unbalanced designs: here the interactions have more columns than the rest of
# the model, which avow computes through the reduced model (the other route)
for lv, tag in (([4, 5], "unbalanced 4x5"), ([2, 3, 3], "unbalanced 2x3x3")):
    obs = []
    for c in itertools.product(*[range(L) for L in lv]):
        for _ in range(rng.randint(1, 4)):
            obs.append((c, 0, "%.3f" % (100 + sum(c) + (0.7 if c[0] == c[1] else 0) + rng.gauss(0, 1))))
    terms = [t for r in range(1, len(lv) + 1) for t in itertools.combinations(range(len(lv)), r)]
    numpy_case(tag, lv, obs, terms, None, None, [])
    if len(lv) == 3:
        numpy_case(tag + " pairs", lv, obs, [t for t in terms if len(t) <= 2], "pairs", None, [])
# one factor in blocks from the data, one block-treatment cell missing, some replicated
obs = []
for blk in range(5):
    for t in range(4):
        if (blk, t) == (2, 1):
            continue
        for _ in range(1 + (blk == 0 and t == 3)):
            obs.append(((t,), blk, "%.1f" % (20 + 2 * t + 3 * blk + rng.gauss(0, 1))))
numpy_case("blocks, a hole", [4], obs, [(0,)], None, "block blk",
           [("c", "L0 - L3", {(0,): 1.0, (3,): -1.0}), ("d", "mean(L1, L2) - L0", {(1,): .5, (2,): .5, (0,): -1.0})])
# two factors in blocks
obs = []
for blk in range(4):
    for c in itertools.product(range(2), range(3)):
        obs.append((c, blk, "%.3f" % (7 + c[0] + 0.5 * c[1] + 0.8 * blk + rng.gauss(0, 0.3))))
obs.pop(5)
numpy_case("2x3 in 4 blocks", [2, 3], obs, [(0,), (1,), (0, 1)], None, "block blk",
           [("c", "cell(f0.L0, f1.L2) - cell(f0.L1, f1.L2)", {(0, 2): 1.0, (1, 2): -1.0})])

# ---------------------------------------------------------------- C. textbook examples

# Montgomery, Design and Analysis of Experiments: battery life, material type x
# temperature, 4 replicates (from memory: data and the printed ANOVA table
# 10683.72, 39118.72, 9613.78, 18230.75, 77646.97; F 7.91, 28.97, 3.56).
bat = {(0, 0): [130, 155, 74, 180], (0, 1): [34, 40, 80, 75], (0, 2): [20, 70, 82, 58],
       (1, 0): [150, 188, 159, 126], (1, 1): [136, 122, 106, 115], (1, 2): [25, 70, 58, 45],
       (2, 0): [138, 110, 168, 160], (2, 1): [174, 120, 150, 139], (2, 2): [96, 104, 82, 60]}
rows = [["m%d" % c[0], "t%d" % c[1], str(v)] for c, vs in bat.items() for v in vs]
js = run('study "battery"\nresponse life\nfactor material { m0 m1 m2 }\nfactor temp { t0 t1 t2 }\n'
         'data "d.csv"\n', rows, ["material", "temp", "life"])
got = rows_by_source(js)
for src, ss, f in (("material", 10683.72, 7.91), ("temp", 39118.72, 28.97), ("material by temp", 9613.78, 3.56)):
    check(abs(got[src]["ss"] - ss) <= 0.005, "battery %s ss %r vs printed %r" % (src, got[src]["ss"], ss))
    check(abs(got[src]["f"] - f) <= 0.005, "battery %s F %r vs printed %r" % (src, got[src]["f"], f))
check(abs(got["residual"]["ss"] - 18230.75) <= 0.005, "battery residual")
check(abs(got["total"]["ss"] - 77646.97) <= 0.005, "battery total")
print("C battery (two-factor, from memory)      ok")

# Montgomery, Design and Analysis of Experiments: vascular graft extrusion pressure, 4
# pressures in 6 batches of resin as blocks (from memory: data and the printed table
# treatments 178.17, blocks 192.25, error 109.89, total 480.31; F 8.11, P 0.0019).
graft = {0: [90.3, 89.2, 98.2, 93.9, 87.4, 97.9], 1: [92.5, 89.5, 90.6, 94.7, 87.0, 95.8],
         2: [85.5, 90.8, 89.6, 86.2, 88.0, 93.4], 3: [82.5, 89.5, 85.6, 87.4, 78.9, 90.7]}
rows = [["P%d" % t, "B%d" % b, str(v)] for t, vs in graft.items() for b, v in enumerate(vs)]
js = run('study "graft"\nresponse flicks\nfactor pressure { P0 P1 P2 P3 }\nblock batch\ndata "d.csv"\n',
         rows, ["pressure", "batch", "flicks"])
got = rows_by_source(js)
for src, ss in (("pressure", 178.17), ("batch", 192.25), ("residual", 109.89), ("total", 480.31)):
    check(abs(got[src]["ss"] - ss) <= 0.005, "graft %s ss %r vs printed %r" % (src, got[src]["ss"], ss))
check(abs(got["pressure"]["f"] - 8.11) <= 0.005, "graft F")
check(abs(got["pressure"]["p"] - 0.0019) <= 0.00005, "graft p")
check(got["residual"]["df"] == 15 and js["model"]["df_within_cells"] == 0, "graft residual from block by treatment")
print("C graft (randomized complete blocks, from memory) ok")

print("worst LRE against exact fractions: %.1f; worst relative difference against numpy: %.2e"
      % (worst["lre"], worst["rel_numpy"]))
if failures:
    print("%d failures" % len(failures))
    sys.exit(1)
print("factorial: all checks passed")
