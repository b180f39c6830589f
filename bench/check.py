"""Sanity check of `make bench` (not timed): does avow's F statistic agree with the
Python pipeline's, and with the exact F computed from the generator's integer sums?

    /usr/bin/python3 bench/check.py AVOW.json PIPELINE.out DATA.sums

AVOW.json is `avow run --format json` output, PIPELINE.out the "F P" line of
pipeline.py, DATA.sums the per-level n, sum and sum of squares that gen.c wrote (in
units of 1e-6 and 1e-12). Prints the three F values and the number of significant
digits on which each pair agrees; exits 1 when avow and the pipeline agree on fewer
than 10.
"""
import json
import math
import sys
from fractions import Fraction

NEEDED_DIGITS = 10


def exact_f(path):
    """The F statistic of the one-way ANOVA, exactly, from the integer sums."""
    levels = []
    with open(path) as f:
        for line in f:
            if line.startswith("#") or not line.strip():
                continue
            _, n, s, q = line.split()
            levels.append((int(n), int(s), int(q)))
    k = len(levels)
    big_n = sum(n for n, _, _ in levels)
    big_s = sum(s for _, s, _ in levels)
    correction = Fraction(big_s * big_s, big_n)
    ss_between = sum(Fraction(s * s, n) for n, s, _ in levels) - correction
    ss_total = sum(q for _, _, q in levels) - correction
    ss_within = ss_total - ss_between
    return (ss_between / (k - 1)) / (ss_within / (big_n - k))


def digits(a, b):
    """Significant digits on which a and b agree: -log10 of the relative difference."""
    if a == b:
        return float("inf")
    return -math.log10(abs(a - b) / max(abs(a), abs(b)))


def show(d):
    return "all (identical doubles)" if math.isinf(d) else "%.1f" % d


def main(avow_json, pipeline_out, sums):
    with open(avow_json) as f:
        report = json.load(f)
    f_avow = float(report["anova"][0]["f"])
    with open(pipeline_out) as f:
        f_py = float(f.read().split()[0])
    f_exact = exact_f(sums)
    f_exact_d = float(f_exact)   # correctly rounded
    print("  F, avow            %.17g" % f_avow)
    print("  F, pandas + SciPy  %.17g" % f_py)
    print("  F, exact           %.17g   (rational arithmetic on the generator's integer sums)" % f_exact_d)
    d_pair = digits(f_avow, f_py)
    print("  avow vs pandas + SciPy: %s significant digits agree" % show(d_pair))
    print("  avow vs exact:          %s" % show(digits(f_avow, f_exact_d)))
    print("  pandas + SciPy vs exact: %s" % show(digits(f_py, f_exact_d)))
    if d_pair < NEEDED_DIGITS:
        print("  FAILED: fewer than %d significant digits agree" % NEEDED_DIGITS)
        return 1
    print("  ok: at least %d significant digits agree" % NEEDED_DIGITS)
    return 0


if __name__ == "__main__":
    if len(sys.argv) != 4:
        sys.exit("usage: check.py AVOW.json PIPELINE.out DATA.sums")
    sys.exit(main(*sys.argv[1:]))
