#!/usr/bin/python3
"""The assumption diagnostics of avow (src/diagnostics.c) against SciPy and against exact
rational arithmetic.

avow's numbers come from the probe program tests/tools/diag_probe.c, found in the
directory $AVOW_PROBES, else beside $AVOW (its directory + tests/tools), else
build/tests/tools. Every number it prints has 17 significant digits.

Data: seeded (numpy default_rng(20240611)) groups of unequal size, written as decimal
strings:
  plain     values with one decimal (many ties), k = 2..6, n_i = 3..30;
  offset    the same kind of values plus 1000000 (1e6 + small values);
  wide      m * 10^e, m = 1..999, e = -10..10: the scaled integers need more than 18
            digits (avow's general GMP path for Levene);
  single    some groups of one value (Levene, Brown-Forsythe, Kruskal-Wallis only);
  zerovar   one group constant (Bartlett and Welch must refuse it);
  many      k = 70 and 150 groups (Welch's binary64 path, k > 64).

References and tolerances (each check names its reference when it fails):
  SciPy 1.10.1 (Debian python3-scipy, run by /usr/bin/python3):
    stats.levene(center='mean'), stats.levene(center='median'), stats.bartlett,
    stats.kruskal: statistic and p, relative 1e-12, on the plain, single and zerovar
    sets, where SciPy's binary64 arithmetic keeps that many digits. On the offset and
    wide sets SciPy works on binary64 readings of the decimals (1000012.3 is not exactly
    representable) and then subtracts means near 1e6: it loses digits there (its
    deviation is printed), so those sets are compared with the exact references below
    instead. stats.kruskal is compared on every set (ranks of distinct decimals survive
    the binary64 reading).
    stats.ttest_ind(equal_var=False) for k = 2: Welch's F equals t^2 and has the same
    p; relative 1e-12.
    stats.shapiro, which SciPy computes in single precision: |dW| <= 5e-7 and
    |dp| <= 1e-5, the tolerances of shared/reference/methods.md section 5 (SW-*-scipy),
    on residual sets of n <= 60, the range where that note measured the agreement -
    or, where SciPy's own answer moves by more than that between inputs that are
    exactly equivalent in binary64 (x, -x, x/8, 32x, -x/2: W and p are invariant
    under them), by no more than that spread of SciPy's, measured here on the same
    data. Such cases are printed as notes. (Seen while this was written: one residual
    set of n = 45 where avow and SciPy differ by 1.9e-5 in p and SciPy's spread is
    2.1e-5.) The exactness of avow's own double-precision implementation is checked in
    tests/unit/test_diagnostics.c against the note's double-precision values (SW-*,
    1e-9 in W, 1e-8 in p; measured agreement about 1e-16).
    stats.skew and stats.kurtosis with bias=True (avow reports g1 and g2):
    |d| <= 1e-12 (1 + |value|).
  Exact rational arithmetic here (fractions.Fraction on the decimal strings), written
  from the formulas of methods.md section 6, independently of avow:
    Levene and Brown-Forsythe W, Kruskal-Wallis H, Welch F* and df2: avow's values are
    the exact rationals rounded once, as is float(Fraction) (correctly rounded), so
    they must be EQUAL (0 ulp) - except Welch with k > 64, avow's binary64 path,
    relative 1e-14 (the accuracy its header claims);
    Bartlett T: the exact variances carried through Python's decimal module at 50
    digits (ln), relative 1e-14;
    p-values from the exact statistics by SciPy's stats.f.sf / stats.chi2.sf (Boost's
    incomplete beta and gamma), relative 1e-12 against avow's GSL tails;
    effect sizes eta^2, omega^2 (Hays) and Cohen's f from exact sums of squares:
    avow's binary64 inputs are the exact SS rounded once, so relative 2e-15 for eta^2
    and f, absolute 4e-15 for omega^2 (which can be near 0).
  numpy least squares (numpy.linalg.lstsq, the hat matrix from numpy.linalg.pinv):
    studentized residuals of the cell-means model, internal r = e/(s sqrt(1 - h)) and
    external t from an actual refit without each observation; |d| <= 1e-12 (1 + |ref|)
    on the plain sets (values below 20: numpy's residuals are good to about 1e-14).
The statuses for data where a statistic does not exist are checked too (single:
Bartlett and Welch status 16; zerovar: status 17).

The last line is "diagnostics: N passed, N failed"; the exit status is 1 on any failure.
"""
import math
import os
import subprocess
import sys
from decimal import Decimal, getcontext
from fractions import Fraction

import numpy as np
import scipy
from scipy import stats

ST_SMALL = 16
ST_ZEROVAR = 17

REL_SCIPY = 1e-12
REL_P = 1e-12
REL_BARTLETT = 1e-14
REL_WELCH_DOUBLE = 1e-14
SW_W_ABS = 5e-7
SW_P_ABS = 1e-5
SW_N_MAX = 60
SW_EQUIVALENT = (1.0, -1.0, 0.125, 32.0, -0.5)
sw_notes = []
MOM_TOL = 1e-12
STUD_TOL = 1e-12
ES_REL = 2e-15
ES_OMEGA_ABS = 4e-15

passed = 0
failed = 0
worst = {}       # name -> (error, where)
info = {}        # SciPy's own deviations where it is not the reference


def track(table, name, err, where):
    if name not in table or err > table[name][0]:
        table[name] = (err, where)


def check(ok, msg):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL " + msg)


def rel(a, b):
    if a == b:
        return 0.0
    return abs(a - b) / abs(b) if b != 0 else math.inf


def check_rel(name, got, want, tol, where, table=None):
    e = rel(got, want)
    track(worst if table is None else table, name, e, where)
    check(e <= tol, "%s %s: avow %r, reference %r, relative error %.3g > %g"
          % (name, where, got, want, e, tol))


def check_equal(name, got, want, where):
    ulps = 0 if got == want else abs(got - want) / math.ulp(want)
    track(worst, name + " (ulp)", ulps, where)
    check(got == want, "%s %s: avow %r, exact %r (must be equal, %.3g ulp)"
          % (name, where, got, want, ulps))


# ---- probe ----

def probe_path():
    d = os.environ.get("AVOW_PROBES")
    if not d:
        avow = os.environ.get("AVOW")
        d = os.path.join(os.path.dirname(avow), "tests", "tools") if avow else "build/tests/tools"
    return os.path.join(d, "diag_probe")


def run_probe(text):
    res = subprocess.run([probe_path()], input=text, capture_output=True, text=True)
    if res.returncode != 0:
        raise RuntimeError("diag_probe failed (%d): %s" % (res.returncode, res.stderr.strip()))
    out = []
    for line in res.stdout.splitlines():
        f = line.split()
        if f[1] == "status":
            out.append((f[0], int(f[2])))
        else:
            out.append((f[0], [float(x) for x in f[1:]]))
    return out


# ---- data ----

rng = np.random.default_rng(20240611)


def tenths(t):
    """The decimal string of the integer number of tenths t."""
    s = "-" if t < 0 else ""
    a = abs(int(t))
    return "%s%d.%d" % (s, a // 10, a % 10)


def gen_tenths(k, nlo, nhi, offset=0):
    groups = []
    for _ in range(k):
        n = int(rng.integers(nlo, nhi + 1))
        mu = rng.uniform(50, 150)
        sd = rng.uniform(5, 30)
        t = np.rint(rng.normal(mu, sd, n)).astype(np.int64) + offset * 10
        groups.append([tenths(x) for x in t])
    return groups


def make_sets():
    sets = []
    for i in range(12):
        sets.append(("plain%d" % i, "plain", gen_tenths(int(rng.integers(2, 7)), 3, 30)))
    for i in range(6):
        sets.append(("offset%d" % i, "offset", gen_tenths(int(rng.integers(2, 7)), 3, 30, 1000000)))
    for i in range(3):
        k = int(rng.integers(3, 6))
        groups = []
        for _ in range(k):
            n = int(rng.integers(4, 15))
            groups.append(["%de%d" % (int(rng.integers(1, 1000)), int(rng.integers(-10, 11)))
                           for _ in range(n)])
        sets.append(("wide%d" % i, "wide", groups))
    for i in range(3):
        g = gen_tenths(int(rng.integers(3, 6)), 3, 12)
        g[1] = g[1][:1]
        if i == 2:
            g[0] = g[0][:1]
        sets.append(("single%d" % i, "single", g))
    g = gen_tenths(4, 4, 10)
    g[2] = ["12.5"] * 6
    sets.append(("zerovar", "zerovar", g))
    for k in (70, 150):
        sets.append(("many%d" % k, "many", gen_tenths(k, 2, 8)))
    for i in range(4):
        sets.append(("two%d" % i, "plain", gen_tenths(2, 3, 25)))
    return sets


# ---- exact references ----

def fr(s):
    return Fraction(s)      # exact: Fraction parses decimal strings, exponent form too


def median(v):
    v = sorted(v)
    n = len(v)
    return v[n // 2] if n % 2 else (v[n // 2 - 1] + v[n // 2]) / 2


def oneway_f(zs):
    """(SSB / (k - 1)) / (SSW / (N - k)) of the groups zs, exact."""
    k = len(zs)
    n = sum(len(z) for z in zs)
    grand = sum(sum(z) for z in zs) / n
    ssb = sum(len(z) * (sum(z) / len(z) - grand) ** 2 for z in zs)
    ssw = sum(sum((x - sum(z) / len(z)) ** 2 for x in z) for z in zs)
    return (ssb / (k - 1)) / (ssw / (n - k))


def levene_exact(groups, centre):
    zs = []
    for g in groups:
        c = sum(g) / len(g) if centre == "mean" else median(g)
        zs.append([abs(x - c) for x in g])
    return oneway_f(zs)


def welch_exact(groups):
    k = len(groups)
    means = [sum(g) / len(g) for g in groups]
    var = [sum((x - m) ** 2 for x in g) / (len(g) - 1) for g, m in zip(groups, means)]
    w = [len(g) / v for g, v in zip(groups, var)]
    ws = sum(w)
    yt = sum(wi * m for wi, m in zip(w, means)) / ws
    lam = sum((1 - wi / ws) ** 2 / (len(g) - 1) for wi, g in zip(w, groups))
    f = (sum(wi * (m - yt) ** 2 for wi, m in zip(w, means)) / (k - 1)) / \
        (1 + Fraction(2 * (k - 2)) * lam / (k * k - 1))
    return f, Fraction(k * k - 1) / (3 * lam)


def kruskal_exact(groups):
    items = sorted((x, i) for i, g in enumerate(groups) for x in g)
    n = len(items)
    rsum = [Fraction(0)] * len(groups)
    ties = 0
    p = 0
    while p < n:
        q = p + 1
        while q < n and items[q][0] == items[p][0]:
            q += 1
        rank = Fraction(p + 1 + q, 2)
        for j in range(p, q):
            rsum[items[j][1]] += rank
        t = q - p
        ties += t ** 3 - t
        p = q
    h = Fraction(12, n * (n + 1)) * sum(r * r / len(g) for r, g in zip(rsum, groups)) - 3 * (n + 1)
    return h / (1 - Fraction(ties, n ** 3 - n))


def bartlett_hp(groups):
    getcontext().prec = 50
    k = len(groups)
    n = sum(len(g) for g in groups)
    ss = [sum((x - sum(g) / len(g)) ** 2 for x in g) for g in groups]
    sp = sum(ss) / (n - k)

    def ln(q):
        return (Decimal(q.numerator) / Decimal(q.denominator)).ln()

    num = (n - k) * ln(sp) - sum((len(g) - 1) * ln(s / (len(g) - 1)) for g, s in zip(groups, ss))
    c = 1 + (sum(Fraction(1, len(g) - 1) for g in groups) - Fraction(1, n - k)) / (3 * (k - 1))
    return float(num / (Decimal(c.numerator) / Decimal(c.denominator)))


# ---- checks ----

def group_request(groups):
    return "groups %d %s\n" % (len(groups), " ".join("%d %s" % (len(g), " ".join(g)) for g in groups))


def check_groups(sets, results):
    for (name, kind, groups), res in zip(sets, results):
        d = dict(res)
        q = [[fr(x) for x in g] for g in groups]
        fl = [[float(x) for x in g] for g in groups]
        k = len(groups)
        n = sum(len(g) for g in groups)
        scipy_ok = kind in ("plain", "single", "zerovar", "many")
        # Levene / Brown-Forsythe
        for centre, key in (("mean", "levene_mean"), ("median", "levene_median")):
            r = d[key]
            check(isinstance(r, list), "%s %s: status %r" % (key, name, r))
            if not isinstance(r, list):
                continue
            w, df1, df2, p = r
            check(df1 == k - 1 and df2 == n - k, "%s %s: df %r %r" % (key, name, df1, df2))
            ex = float(levene_exact(q, centre))
            check_equal(key + " W vs exact", w, ex, name)
            check_rel(key + " p vs f.sf(exact W)", p, float(stats.f.sf(ex, k - 1, n - k)), REL_P, name)
            sw, sp = stats.levene(*fl, center=centre)
            if scipy_ok:
                check_rel(key + " W vs SciPy", w, float(sw), REL_SCIPY, name)
                check_rel(key + " p vs SciPy", p, float(sp), REL_SCIPY, name)
            else:
                track(info, key + " W", rel(float(sw), ex), name)
        # Bartlett and Welch
        small = any(len(g) < 2 for g in groups)
        zero = any(len(set(g)) == 1 for g in q if len(g) >= 2)
        for key in ("bartlett", "welch"):
            r = d[key]
            if small or zero:
                want = ST_SMALL if small else ST_ZEROVAR
                check(r == want, "%s %s: got %r, want status %d" % (key, name, r, want))
                continue
            check(isinstance(r, list), "%s %s: status %r" % (key, name, r))
        if not (small or zero):
            t, df, p = d["bartlett"]
            ref = bartlett_hp(q)
            check_rel("bartlett T vs 50-digit decimal", t, ref, REL_BARTLETT, name)
            check_rel("bartlett p vs chi2.sf(reference T)", p, float(stats.chi2.sf(ref, k - 1)), REL_P, name)
            st, sp = stats.bartlett(*fl)
            if scipy_ok:
                check_rel("bartlett T vs SciPy", t, float(st), REL_SCIPY, name)
                check_rel("bartlett p vs SciPy", p, float(sp), REL_SCIPY, name)
            else:
                track(info, "bartlett T", rel(float(st), ref), name)
            f, df1, df2, p = d["welch"]
            ef, edf2 = welch_exact(q)
            if k <= 64:
                check_equal("welch F vs exact", f, float(ef), name)
                check_equal("welch df2 vs exact", df2, float(edf2), name)
            else:
                check_rel("welch F (k > 64) vs exact", f, float(ef), REL_WELCH_DOUBLE, name)
                check_rel("welch df2 (k > 64) vs exact", df2, float(edf2), REL_WELCH_DOUBLE, name)
            check_rel("welch p vs f.sf(exact F, exact df2)", p,
                      float(stats.f.sf(float(ef), k - 1, float(edf2))), REL_P, name)
            if k == 2 and scipy_ok:
                tt = stats.ttest_ind(fl[0], fl[1], equal_var=False)
                check_rel("welch F vs SciPy ttest_ind t^2", f, float(tt.statistic) ** 2, REL_SCIPY, name)
                check_rel("welch p vs SciPy ttest_ind", p, float(tt.pvalue), REL_SCIPY, name)
        # Kruskal-Wallis
        h, df, p, hu, tf = d["kruskal"]
        ex = float(kruskal_exact(q))
        check_equal("kruskal H vs exact", h, ex, name)
        check_rel("kruskal p vs chi2.sf(exact H)", p, float(stats.chi2.sf(ex, k - 1)), REL_P, name)
        sh, sp = stats.kruskal(*fl)
        check_rel("kruskal H vs SciPy", h, float(sh), REL_SCIPY, name)
        check_rel("kruskal p vs SciPy", p, float(sp), REL_SCIPY, name)


def residuals(q):
    """Residuals from the cell means, each exact then rounded once."""
    out = []
    for g in q:
        m = sum(g) / len(g)
        out += [float(x - m) for x in g]
    return out


def shapiro_moment_requests(sets):
    arrays = []
    for name, kind, groups in sets:
        q = [[fr(x) for x in g] for g in groups]
        res = residuals(q)
        arrays.append((name + " residuals", res))
        if kind == "plain":
            arrays.append((name + " raw", [float(x) for x in q[0]]))
    text = ""
    for _, x in arrays:
        body = " ".join(repr(v) for v in x)
        text += "shapiro %d %s\nmoments %d %s\n" % (len(x), body, len(x), body)
    return arrays, text


def check_shapiro_moments(arrays, results):
    for i, (name, x) in enumerate(arrays):
        sw = results[2 * i]
        mo = results[2 * i + 1]
        n = len(x)
        if n <= SW_N_MAX and n >= 3:
            check(sw[0] == "shapiro" and isinstance(sw[1], list), "shapiro %s: %r" % (name, sw))
            w, p = sw[1]
            ref = stats.shapiro(x)
            # SciPy on inputs that are exactly equivalent in binary64 (W and p do not
            # change under x -> -x or scaling by a power of two): its own spread
            xa = np.array(x)
            alt = [stats.shapiro(xa * c) for c in SW_EQUIVALENT]
            spw = max(a.statistic for a in alt) - min(a.statistic for a in alt)
            spp = max(a.pvalue for a in alt) - min(a.pvalue for a in alt)
            dw, dp = abs(w - ref.statistic), abs(p - ref.pvalue)
            track(worst, "shapiro W vs SciPy (abs)", dw, name + " n=%d" % n)
            track(worst, "shapiro p vs SciPy (abs)", dp, name + " n=%d" % n)
            track(info, "shapiro W: SciPy's spread on equivalent inputs (abs)", spw, name + " n=%d" % n)
            track(info, "shapiro p: SciPy's spread on equivalent inputs (abs)", spp, name + " n=%d" % n)
            tw, tp = max(SW_W_ABS, spw), max(SW_P_ABS, spp)
            if dw > SW_W_ABS or dp > SW_P_ABS:
                sw_notes.append("note: shapiro %s (n=%d): avow - SciPy = %.3g in W, %.3g in p, beyond "
                                "methods.md's %g / %g, but SciPy itself moves by %.3g in W, %.3g in p "
                                "between exactly equivalent inputs" % (name, n, w - ref.statistic,
                                                                       p - ref.pvalue, SW_W_ABS, SW_P_ABS, spw, spp))
            check(dw <= tw, "shapiro W %s: avow %r, SciPy %r, |d| %.3g > %.3g"
                  % (name, w, ref.statistic, dw, tw))
            check(dp <= tp, "shapiro p %s: avow %r, SciPy %r, |d| %.3g > %.3g"
                  % (name, p, ref.pvalue, dp, tp))
        elif isinstance(sw[1], list):
            ref = stats.shapiro(x)
            track(info, "shapiro W, n > %d (abs)" % SW_N_MAX, abs(sw[1][0] - ref.statistic), name + " n=%d" % n)
            track(info, "shapiro p, n > %d (abs)" % SW_N_MAX, abs(sw[1][1] - ref.pvalue), name + " n=%d" % n)
        g1, g2 = mo[1]
        r1 = float(stats.skew(x, bias=True))
        r2 = float(stats.kurtosis(x, bias=True))
        for label, got, want in (("skewness g1", g1, r1), ("kurtosis g2", g2, r2)):
            d = abs(got - want) / (1 + abs(want))
            track(worst, label + " vs SciPy (bias=True)", d, name)
            check(d <= MOM_TOL, "%s %s: avow %r, SciPy %r, |d|/(1+|ref|) %.3g > %g"
                  % (label, name, got, want, d, MOM_TOL))


def studentized_requests(sets):
    cases = []
    for name, kind, groups in sets:
        if kind != "plain" or name.startswith("two"):
            continue
        q = [[fr(x) for x in g] for g in groups]
        n = sum(len(g) for g in groups)
        k = len(groups)
        sse = sum(sum((x - sum(g) / len(g)) ** 2 for x in g) for g in q)
        mse = float(sse / (n - k))
        # numpy: cell-means design, least squares, hat matrix, refits
        y = np.array([float(x) for g in groups for x in g])
        cell = np.array([i for i, g in enumerate(groups) for _ in g])
        X = (cell[:, None] == np.arange(k)[None, :]).astype(float)
        beta = np.linalg.lstsq(X, y, rcond=None)[0]
        e = y - X @ beta
        h = np.diag(X @ np.linalg.pinv(X))
        s = math.sqrt(float(e @ e) / (n - k))
        for i in range(n):
            ni = len(groups[cell[i]])
            if ni < 2:
                continue
            keep = np.arange(n) != i
            b2 = np.linalg.lstsq(X[keep], y[keep], rcond=None)[0]
            e2 = y[keep] - X[keep] @ b2
            s2 = math.sqrt(float(e2 @ e2) / (n - 1 - k))
            r_np = e[i] / (s * math.sqrt(1 - h[i]))
            t_np = e[i] / (s2 * math.sqrt(1 - h[i]))
            ex_e = float(q[cell[i]][[j for j in range(n) if cell[j] == cell[i]].index(i)]
                         - sum(q[cell[i]]) / ni)
            cases.append(("%s obs %d" % (name, i), ex_e, ni, mse, n - k, r_np, t_np, h[i]))
    text = "".join("student %r %d %r %d\n" % (c[1], c[2], c[3], c[4]) for c in cases)
    return cases, text


def check_studentized(cases, results):
    for c, res in zip(cases, results):
        name, e, ni, mse, dfe, r_np, t_np, h = c
        check(abs(h - 1 / ni) <= 1e-13, "studentized %s: numpy leverage %r is not 1/n = %r" % (name, h, 1 / ni))
        check(isinstance(res[1], list), "studentized %s: %r" % (name, res))
        r, t = res[1]
        for label, got, want in (("internal r", r, r_np), ("external t", t, t_np)):
            d = abs(got - want) / (1 + abs(want))
            track(worst, "studentized " + label + " vs numpy refit", d, name)
            check(d <= STUD_TOL, "studentized %s %s: avow %r, numpy %r, |d|/(1+|ref|) %.3g > %g"
                  % (label, name, got, want, d, STUD_TOL))


def effect_requests(sets):
    cases = []
    for name, kind, groups in sets:
        q = [[fr(x) for x in g] for g in groups]
        k = len(q)
        n = sum(len(g) for g in q)
        grand = sum(sum(g) for g in q) / n
        ssb = sum(len(g) * (sum(g) / len(g) - grand) ** 2 for g in q)
        ssw = sum(sum((x - sum(g) / len(g)) ** 2 for x in g) for g in q)
        if ssw == 0:
            continue
        sst = ssb + ssw
        mse = ssw / (n - k)
        cases.append((name, ssb, k - 1, ssw, n - k, sst,
                      float(ssb / sst), float((ssb - (k - 1) * mse) / (sst + mse)),
                      math.sqrt(float(ssb / ssw))))
    text = "".join("effect %r %d %r %d %r\n" % (float(c[1]), c[2], float(c[3]), c[4], float(c[5]))
                   for c in cases)
    return cases, text


def check_effects(cases, results):
    for c, res in zip(cases, results):
        name, eta2, omega2, f = c[0], c[6], c[7], c[8]
        check(isinstance(res[1], list), "effect %s: %r" % (name, res))
        e2, pe2, o2, cf = res[1]
        check_rel("eta^2 vs exact", e2, eta2, ES_REL, name)
        check_rel("Cohen's f vs exact", cf, f, ES_REL, name)
        check(pe2 == e2 or rel(pe2, e2) <= ES_REL, "partial eta^2 %s: %r vs eta^2 %r (one-way: equal)"
              % (name, pe2, e2))
        d = abs(o2 - omega2)
        track(worst, "omega^2 vs exact (abs)", d, name)
        check(d <= ES_OMEGA_ABS, "omega^2 %s: avow %r, exact %r, |d| %.3g > %g" % (name, o2, omega2, d, ES_OMEGA_ABS))


def main():
    if scipy.__version__ != "1.10.1":
        print("note: the tolerances were set for SciPy 1.10.1; this is %s" % scipy.__version__)
    path = probe_path()
    if not os.access(path, os.X_OK):
        print("FAIL no diag probe at %s (build it with make, or set AVOW_PROBES)" % path)
        print("diagnostics: 0 passed, 1 failed")
        return 1
    sets = make_sets()
    arrays, sw_text = shapiro_moment_requests(sets)
    stud, stud_text = studentized_requests(sets)
    eff, eff_text = effect_requests(sets)
    text = "".join(group_request(g) for _, _, g in sets) + sw_text + stud_text + eff_text
    try:
        out = run_probe(text)
    except RuntimeError as e:
        print("FAIL %s" % e)
        print("diagnostics: 0 passed, 1 failed")
        return 1
    want = 5 * len(sets) + 2 * len(arrays) + len(stud) + len(eff)
    if len(out) != want:
        print("FAIL diag_probe gave %d lines for %d requests" % (len(out), want))
        print("diagnostics: %d passed, %d failed" % (passed, failed + 1))
        return 1
    i = 0
    results = [out[i + 5 * j:i + 5 * j + 5] for j in range(len(sets))]
    i += 5 * len(sets)
    check_groups(sets, results)
    check_shapiro_moments(arrays, out[i:i + 2 * len(arrays)])
    i += 2 * len(arrays)
    check_studentized(stud, out[i:i + len(stud)])
    i += len(stud)
    check_effects(eff, out[i:i + len(eff)])
    print("data sets: %d (%d values); residual arrays: %d; studentized residuals: %d"
          % (len(sets), sum(len(g) for _, _, gs in sets for g in gs), len(arrays), len(stud)))
    print("largest differences (relative unless marked):")
    for k in sorted(worst):
        print("  %-50s %.3g  (%s)" % (k, worst[k][0], worst[k][1]))
    print("SciPy's own deviation from the exact values where it is not the reference "
          "(offset and wide sets; Shapiro-Wilk beyond n = %d):" % SW_N_MAX)
    for k in sorted(info):
        print("  %-50s %.3g  (%s)" % (k, info[k][0], info[k][1]))
    for line in sw_notes:
        print(line)
    print("diagnostics: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
