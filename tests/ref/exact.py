#!/usr/bin/env python3
"""Exact reference for `avow run`: ANOVA table, level summaries and contrast statistics
recomputed with Python's `fractions` (exact rational arithmetic, Python 3.11 standard
library) from the same decimal text, and compared with avow's JSON report.

The data sets are generated here with a seeded generator: unequal replicates, large
constant offsets (up to 13 leading digits), many decimals, negative values. They are
test inputs only; every expected value is computed exactly from them.

Score: LRE = -log10(relative error), capped at 15; every value must reach 13.
Square roots (standard deviations, standard errors, t) are taken from the exact
rationals with the `decimal` module at 60 digits.
"""
import json
import math
import os
import random
import subprocess
import sys
import tempfile
from decimal import Decimal, getcontext
from fractions import Fraction

AVOW = os.environ.get("AVOW", "build/avow")
TARGET = 13.0
getcontext().prec = 60


def lre(got, want):
    want = float(want)
    if got is None:
        return 0.0
    if want == 0:
        return 15.0 if got == 0 else min(15.0, -math.log10(abs(got)))
    err = abs(got - want) / abs(want)
    return 15.0 if err == 0 else min(15.0, -math.log10(err))


def fsqrt(q):
    """sqrt of a non-negative Fraction, to 60 digits, as float."""
    return float((Decimal(q.numerator) / Decimal(q.denominator)).sqrt())


def make_sets():
    rng = random.Random(20261201)
    sets = []
    # (name, offset, decimals, group sizes)
    shapes = [
        ("small-unequal", "0", 1, [3, 5, 4]),
        ("offset-1e6", "1000000", 4, [7, 2, 9, 5]),
        ("offset-1e12", "1000000000000", 2, [4, 6, 5, 3, 8]),
        ("many-decimals", "-37.5", 9, [11, 13, 10]),
        ("negative-large", "-987654321", 6, [20, 31, 17, 25, 12, 9]),
    ]
    for name, offset, dec, sizes in shapes:
        groups = []
        for gi, n in enumerate(sizes):
            vals = []
            for _ in range(n):
                units = rng.randint(-5 * 10**dec, 5 * 10**dec) + gi * rng.randint(0, 3 * 10**dec)
                v = Decimal(offset) + Decimal(units).scaleb(-dec)
                vals.append(format(v, "f"))
            groups.append(vals)
        sets.append((name, groups))
    return sets


def contrasts_for(k):
    """Planned contrasts as (name, text, coefficient list of Fractions)."""
    names = ["g%d" % i for i in range(k)]
    out = [("first_vs_rest", "g0 - mean(%s)" % ", ".join(names[1:]),
            [Fraction(1)] + [Fraction(-1, k - 1)] * (k - 1)),
           ("pair", "g1 - g%d" % (k - 1),
            [Fraction(0), Fraction(1)] + [Fraction(0)] * (k - 3) + [Fraction(-1)])]
    if k >= 3:
        # Linear trend over at values 1, 2, 4, ... with equal weights, scaled as avow does:
        # checked separately; here a hand-made weighted contrast with thirds.
        c = [Fraction(0)] * k
        c[0], c[1], c[2] = Fraction(2, 3), Fraction(-1, 3), Fraction(-1, 3)
        out.append(("thirds", "2*g0/3 - (g1 + g2)/3", c))
    return out


def reference(groups, contrasts):
    vals = [[Fraction(Decimal(v)) for v in g] for g in groups]
    n = [len(g) for g in vals]
    N, k = sum(n), len(vals)
    means = [sum(g) / len(g) for g in vals]
    grand = sum(sum(g) for g in vals) / N
    ss_i = [sum((x - m) ** 2 for x in g) for g, m in zip(vals, means)]
    ssw = sum(ss_i)
    ssb = sum(ni * (m - grand) ** 2 for ni, m in zip(n, means))
    sst = ssb + ssw
    msb, msw = ssb / (k - 1), ssw / (N - k)
    ref = {
        "between df": k - 1, "between SS": ssb, "between MS": msb, "F": msb / msw,
        "within df": N - k, "within SS": ssw, "within MS": msw, "total SS": sst,
        "R-squared": ssb / sst, "residual SD": fsqrt(msw), "grand mean": grand,
    }
    for i in range(k):
        ref["mean %d" % i] = means[i]
        ref["sd %d" % i] = fsqrt(ss_i[i] / (n[i] - 1))
    for name, _, c in contrasts:
        L = sum(ci * m for ci, m in zip(c, means))
        v = sum(ci * ci / ni for ci, ni in zip(c, n))
        se = fsqrt(msw * v)
        ref[name + " estimate"] = L
        ref[name + " se"] = se
        ref[name + " t"] = float(Decimal(L.numerator) / Decimal(L.denominator)) / se
        ref[name + " ss"] = L * L / v
    return ref


def run(tmp, name, groups, contrasts):
    k = len(groups)
    with open(os.path.join(tmp, name + ".csv"), "w") as f:
        f.write("treatment,y\n")
        rows = [(i, v) for i, g in enumerate(groups) for v in g]
        random.Random(len(rows)).shuffle(rows)
        for i, v in rows:
            f.write("g%d,%s\n" % (i, v))
    study = os.path.join(tmp, name + ".avow")
    with open(study, "w") as f:
        f.write('study "exact reference %s"\nresponse y\n' % name)
        f.write("factor treatment { %s }\n" % " ".join("g%d" % i for i in range(k)))
        f.write('data "%s.csv"\nadjust none\n' % name)
        for cname, text, _ in contrasts:
            f.write("contrast %s = %s\n" % (cname, text))
    out = subprocess.run([AVOW, "run", study, "--format", "json"], capture_output=True, text=True)
    if out.returncode != 0:
        sys.stderr.write(out.stderr)
        raise SystemExit("avow failed on " + name)
    rep = json.loads(out.stdout)
    a0, a1, a2 = rep["anova"]
    got = {
        "between df": a0["df"], "between SS": a0["ss"], "between MS": a0["ms"], "F": a0["f"],
        "within df": a1["df"], "within SS": a1["ss"], "within MS": a1["ms"], "total SS": a2["ss"],
        "R-squared": rep["fit"]["r_squared"], "residual SD": rep["fit"]["residual_sd"],
        "grand mean": rep["fit"]["grand_mean"],
    }
    for i, lv in enumerate(rep["levels"]):
        got["mean %d" % i] = lv["mean"]
        got["sd %d" % i] = lv["sd"]
    for c in rep["contrasts"]:
        for key in ("estimate", "se", "t", "ss"):
            got[c["name"] + " " + key] = c[key]
    return got


def main():
    failures = checks = 0
    worst = 15.0
    with tempfile.TemporaryDirectory() as tmp:
        for name, groups in make_sets():
            contrasts = contrasts_for(len(groups))
            ref = reference(groups, contrasts)
            got = run(tmp, name, groups, contrasts)
            low = 15.0
            for key, want in ref.items():
                s = lre(got.get(key), want)
                checks += 1
                low = min(low, s)
                if s < TARGET:
                    failures += 1
                    print("FAIL %s %s: got %r, exact %r (LRE %.1f)" % (name, key, got.get(key), float(want), s))
            worst = min(worst, low)
            print("%-15s minimum LRE %.1f over %d values" % (name, low, len(ref)))
    print("worst LRE: %.1f" % worst)
    print("exact reference: %d passed, %d failed" % (checks - failures, failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
