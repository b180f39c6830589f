#!/usr/bin/python3
"""`avow sheet`: the order of the runs against outside references.

References, each named beside its checks:
  A. The order reproduced without GSL. numpy 1.24.2 (Debian python3-numpy):
     numpy.random.MT19937 with its `_legacy_seeding`, which is the init_genrand seeding of
     Matsumoto & Nishimura's 2002 reference code of MT19937 (the seeding GSL's
     gsl_rng_mt19937 uses; its first outputs for seed 5489 are the C++ standard's
     std::mt19937, whose 10000th output 4123659995 is required by ISO C++11
     [rand.predef]: checked below as well). On top of the raw 32-bit outputs, GSL 2.7's
     rules, restated here: gsl_rng_uniform_int(r, n) draws k = x / floor((2^32 - 1) / n)
     until k < n (read from /usr/include/gsl/gsl_rng.h), and gsl_ran_shuffle walks
     i = n-1 down to 1 swapping element i with element uniform_int(i + 1) (Durstenfeld's
     form of the Fisher-Yates shuffle; GSL's randist/shuffle.c, from memory). The seed
     is reduced as avow documents: modulo 2^32, with 0 taken as 4357. Every run of every
     sheet must match, for the three examples (one factor; six blocks shuffled one after
     the other from one stream; two crossed factors) and 408 seeds: 0, 1, 4357, the
     examples' own, 2^32, 2^32 + 1, 2^64 - 1, and the 400 seeds of part B.
  B. Uniformity of positions. For a fixed list of 400 seeds, count how often each level
     (each cell) lands at each run position (each position within its block) and test
     the counts against "every order equally likely" with Pearson's chi-square statistic
     from scipy.stats.chisquare (SciPy 1.10.1, Debian python3-scipy) and the tail
     scipy.stats.chi2.sf. Decision rule fixed in advance: p >= 0.001 passes. Fixed seeds
     make the outcome deterministic.
     The reference distribution (derived here; standard permutation algebra): in one
     random order of N runs with n_L runs of level L (pi_L = n_L / N), the indicator
     table X[p, L] has covariance N/(N-1) (I - J/N) (x) (diag(pi) - pi pi'), i.e. N/(N-1)
     times the covariance of independent multinomial rows projected on tables whose
     columns also sum to n_L. Summing S independent orders, Pearson's statistic on the
     summed table tends to N/(N-1) times chi-square with (N-1)(L-1) degrees of freedom, so
     T = X2 (N-1)/N is referred to chi2((N-1)(L-1)). For blocks, one such table per
     block, the blocks independent: the T's add, and so do their degrees of freedom.
     A second check for blocks: the levels of the first run of strip s1 and of strip s2
     (consecutive shuffles of one stream) as pairs, 16 equally likely categories,
     multinomial over the seeds: scipy.stats.chisquare with 15 degrees of freedom.
     Negative controls (the test must be able to fail): the same statistics on orders
     made here with two known faults, the first run never moved and each half shuffled
     only within itself (Python's random.Random(1), a fixed stream), must give
     p < 0.001.
"""
import concurrent.futures
import csv
import hashlib
import io
import os
import random
import subprocess
import sys

import numpy as np
from scipy import stats

AVOW = os.environ.get("AVOW", "build/avow")
ALPHA = 0.001           # decision threshold, fixed in advance
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL", what)


def sheet(study, seed):
    """The sheet's comment line and its rows (lists of fields), read by Python's csv."""
    p = subprocess.run([AVOW, "sheet", study, "--seed", str(seed)], capture_output=True, text=True)
    if p.returncode != 0 or p.stderr:
        raise SystemExit("avow sheet %s --seed %d: exit %d\n%s" % (study, seed, p.returncode, p.stderr))
    first, rest = p.stdout.split("\n", 1)
    rows = list(csv.reader(io.StringIO(rest)))
    return first, rows[0], rows[1:]


# ---- the examples' planned runs, from the study files ----
# cure.avow: levels in declaration order, uvflash read from its code UV-F; replicates 6.
CURE = ("examples/cure/cure.avow", [["room", "oven60", "oven80", "oven100", "UV-F"]], 6, None)
# coating.avow: prep x cure, the last factor varying fastest; replicates 4.
COAT = ("examples/coating/coating.avow",
        [["blast", "phosphate", "zirconium"], ["c180", "c200"]], 4, None)
# seedlots.avow: four dressings (two read from codes), replicates 1, strips s1..s6.
SEED = ("examples/seedlots/seedlots.avow", [["untreated", "fungicide", "BIO", "FUN+BIO"]], 1,
        ["s1", "s2", "s3", "s4", "s5", "s6"])


def cells(factors):
    out = [[]]
    for levels in factors:
        out = [c + [l] for c in out for l in levels]
    return [tuple(c) for c in out]


def planned(study):
    """Runs per block in planned (unshuffled) order: cells in order, each replicated."""
    _, factors, reps, _ = study
    return [c for c in cells(factors) for _ in range(reps)]


# ---- A. exact reproduction ----
class Gsl:
    """GSL 2.7's uniform_int and shuffle over numpy's MT19937 (see the docstring)."""

    def __init__(self, seed):
        s = seed % 2**32
        self.bg = np.random.MT19937()
        self.bg._legacy_seeding(s if s else 4357)     # numpy 1.24.2: init_genrand

    def uniform_int(self, n):
        scale = (2**32 - 1) // n
        while True:
            k = int(self.bg.random_raw()) // scale
            if k < n:
                return k

    def shuffle(self, a):
        for i in range(len(a) - 1, 0, -1):
            j = self.uniform_int(i + 1)
            a[i], a[j] = a[j], a[i]


def expected_rows(study, seed):
    path, factors, reps, blocks = study
    g = Gsl(seed)
    rows, run = [], 0
    for b in (blocks or [None]):
        order = planned(study)
        g.shuffle(order)
        for c in order:
            run += 1
            rows.append([str(run)] + list(c) + ([b] if b else []) + [""])
    return rows


# The generator itself: ISO C++11 [rand.predef]: the 10000th output of mt19937 with its
# default seed 5489 is 4123659995.
bg = np.random.MT19937()
bg._legacy_seeding(5489)
check(int(bg.random_raw(10000)[-1]) == 4123659995, "numpy MT19937 (seed 5489): 10000th output 4123659995")

SEEDS = [1000003 * k + 17 for k in range(400)]       # part B: 400 fixed seeds, distinct modulo 2^32
SPECIAL = [0, 1, 4357, 4471, 20261201, 2**32, 2**32 + 1, 2**64 - 1]
SHEETS = {}                                           # (study path, seed) -> rows
for study in (CURE, SEED, COAT):
    sha = hashlib.sha256(open(study[0], "rb").read()).hexdigest()
    matched = 0
    with concurrent.futures.ThreadPoolExecutor(max_workers=2) as pool:
        got = list(pool.map(lambda s: sheet(study[0], s), SPECIAL + SEEDS))
    for s, (first, header, rows) in zip(SPECIAL + SEEDS, got):
        SHEETS[study[0], s] = rows
        check(first.startswith("# avow 0.1.0 run sheet; study sha256 %s; seed %d; generator mt19937" % (sha, s)),
              "%s seed %d: provenance line %r" % (study[0], s, first[:120]))
        if rows == expected_rows(study, s):
            matched += 1
        else:
            check(False, "%s seed %d: the order differs from MT19937 + Fisher-Yates (numpy)" % (study[0], s))
    print("A. %s: %d of %d seeds give exactly the order of numpy's MT19937 + GSL's shuffle rule"
          % (study[0], matched, len(SPECIAL + SEEDS)))

# ---- B. uniformity of positions ----
def position_test(name, tables, n_per_block, probs):
    """tables: per block, counts[position][category] over the seeds. Returns p."""
    S = sum(tables[0][0])
    N, L = n_per_block, len(probs)
    T, df, X2all = 0.0, 0, 0.0
    for counts in tables:
        obs = np.array(counts, dtype=float).ravel()
        exp = np.array([[S * q for q in probs] for _ in range(N)]).ravel()
        x2, _ = stats.chisquare(obs, exp)                 # SciPy 1.10.1 scipy.stats.chisquare
        X2all += x2
        T += x2 * (N - 1) / N
        df += (N - 1) * (L - 1)
    p = stats.chi2.sf(T, df)                              # SciPy 1.10.1 scipy.stats.chi2.sf
    print("B. %s: Pearson X2 = %.3f (scipy.stats.chisquare), T = X2 (N-1)/N = %.3f, df = %d, p = %.3g"
          % (name, X2all, T, df, p))
    return p


def tables_of(study, orders_by_seed):
    """Count tables per block from sheets given as lists of per-block orders."""
    path, factors, reps, blocks = study
    cs = cells(factors)
    nb = len(blocks) if blocks else 1
    per = len(cs) * reps
    tables = [[[0] * len(cs) for _ in range(per)] for _ in range(nb)]
    for orders in orders_by_seed:
        for b, order in enumerate(orders):
            for pos, c in enumerate(order):
                tables[b][pos][cs.index(c)] += 1
    return tables, per, [reps / per] * len(cs)


def avow_orders(study, seed):
    path, factors, reps, blocks = study
    rows = SHEETS[path, seed]
    k = len(factors)
    per = len(cells(factors)) * reps
    orders = []
    for i, r in enumerate(rows):
        if i % per == 0:
            orders.append([])
        orders[-1].append(tuple(r[1:1 + k]))
    return orders


for study, name in ((CURE, "cure, 30 runs x 5 levels"), (COAT, "coating, 24 runs x 6 cells"),
                    (SEED, "seedlots, 6 blocks x 4 runs x 4 dressings, within blocks")):
    by_seed = [avow_orders(study, s) for s in SEEDS]
    tables, per, probs = tables_of(study, by_seed)
    p = position_test(name, tables, per, probs)
    check(p >= ALPHA, "%s: positions not uniform, p = %.3g < %g" % (name, p, ALPHA))
    if study is SEED:
        ds = cells(study[1])
        pairs = [0] * (len(ds) ** 2)
        for orders in by_seed:
            pairs[ds.index(orders[0][0]) * len(ds) + ds.index(orders[1][0])] += 1
        x2, pp = stats.chisquare(pairs)                   # SciPy 1.10.1; df 15
        print("B. seedlots, first runs of strips s1 and s2 as pairs: X2 = %.3f, df = 15, p = %.3g" % (x2, pp))
        check(pp >= ALPHA, "seedlots: first runs of s1 and s2 not independent, p = %.3g" % pp)

# Negative controls: faulty orders must be rejected.
rnd = random.Random(1)


def first_fixed(order):
    rest = order[1:]
    rnd.shuffle(rest)
    return [order[0]] + rest


def halves(order):
    h = len(order) // 2
    a, b = order[:h], order[h:]
    rnd.shuffle(a)
    rnd.shuffle(b)
    return a + b


for fault, fn in (("first run never moved", first_fixed), ("each half shuffled alone", halves)):
    by_seed = [[fn(planned(CURE))] for _ in SEEDS]
    tables, per, probs = tables_of(CURE, by_seed)
    p = position_test("negative control, cure, " + fault, tables, per, probs)
    check(p < ALPHA, "negative control (%s) not rejected: p = %.3g" % (fault, p))

if failures:
    print("sheet reference: %d failure(s)" % len(failures))
    sys.exit(1)
print("sheet reference: all checks passed")
