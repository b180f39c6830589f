#!/usr/bin/python3
"""The noncentral F and t distributions of avow (src/noncentral.c) against SciPy, with
mpmath deciding wherever the two disagree.

avow's numbers come from the probe program tests/tools/noncentral_probe.c, found in the
directory $AVOW_PROBES, else beside $AVOW (its directory + tests/tools), else
build/tests/tools.

Reference: Debian's python3-scipy 1.10.1, run by /usr/bin/python3: scipy.stats.ncf.cdf
and .sf and scipy.stats.nct.cdf and .sf (in 1.10.1 all four call Boost.Math's
non_central_f / non_central_t, each tail computed directly), and scipy.stats.f / t for
zero noncentrality.

Where SciPy is unreliable. While this script was written, avow and SciPy were compared
on about 10,000 random points besides the grid below, with mpmath deciding each
disagreement. SciPy was wrong, and avow right, in these places (mpmath values in
parentheses):
  - nct lower tails for t > 0 and large delta: SciPy returns Phi(-delta) alone, e.g.
    P(T <= 0.5; nu=2, delta=30) = 4.9e-198 (6.38e-175);
  - nct tails where t and delta have opposite signs: e.g. P(T > 1e10; 3, -30) = 5.95e-41
    (1.49e-231), P(T > 3; 1e4, -5) = 6.66e-16 = 3 * 2^-52, a 1 - cdf artifact
    (6.316e-16), and relative errors of 1e-4 near 1e-13;
  - ncf far tails: P(F <= 30.2; 6.16, 12688.5, 1351) off by 1.1e-3 relative near 1e-119,
    and 1e-7 relative near 1e-231;
  - scipy.stats.t.isf for non-integer df: t.isf(0.01, 9.5) is off by 1e-9 relative.
So no region is excluded beforehand: every point is compared with SciPy, and where avow
and SciPy differ by more than the tolerance, an independent 40-digit mpmath computation
decides (written here, sharing no code with avow):
  mp_ncf: the Poisson mixture sum_j Pois(j; lambda/2) I_y(d1/2 + j, d2/2) (or the upper
     betas), every incomplete beta from its continued fraction (modified Lentz) with an
     exact prefactor, summed from the largest term outward until terms fall below
     1e-30 of the sum;
  mp_nct: the integral of Phi(t s - delta) (or its upper tail) against the density of
     S = sqrt(V/nu), in u = log s, by mp.quad (tanh-sinh) at 30 digits on 60 panels
     over the range where the integrand is within e^-90 of its peak.
The disputed point passes when avow agrees with mpmath within the tolerance below (a
note then names SciPy's error), and fails otherwise. When mpmath cannot be imported
(it is not among the project's declared dependencies), disputed points are excluded
from the check and listed, with that reason.

Tolerances (the accuracy target of avow's noncentral module): absolute 1e-9 on every
probability, and relative 1e-8 on every probability above 1e-250 (below that, SciPy's
tails leave the range where Boost keeps its relative accuracy, and avow's own documented
range ends near 1e-280). Inversion in lambda: relative 1e-8 against SciPy's brentq root
(SciPy's cdf is good to about 1e-13 relative near these roots). Power: absolute 1e-9,
with the critical values taken by brentq on scipy.special.betainc (not f.isf/t.isf).

Grid: noncentral F with d1 in {1, 2, 3, 10.5, 1e4}, d2 in {1, 2, 3, 30, 1e4}, lambda in
{0, 0.5, 5, 100, 1000, 5000, 10000} and x = m c, m = (d1 + lambda)/d1, for c in {1e-3,
0.3, 0.7, 1, 1.5, 3, 30}, plus x in {1e-300, 1e-10, 1e10, 1e300}; noncentral t with nu in
{1, 2, 3, 30, 1e4}, delta in {-100, -30, -5, -1, -0.1, 0, 0.1, 1, 5, 30, 100} and t in
{delta + k s: k in {-10, -3, -1, 0, 1, 3, 10}}, s = max(1, |delta|/sqrt(nu)), plus
t in {+-1e-300, +-1e-10, +-0.5, +-3, +-1e10, +-1e300}.

Prints the largest differences measured (per function, against SciPy where it agrees
and against mpmath where it decided) and ends with "noncentral: N passed, N failed";
the exit status is 1 on any failure.
"""
import math
import os
import subprocess
import sys
import warnings

import numpy as np
import scipy
from scipy import optimize, special, stats

try:
    import mpmath as mp
    HAVE_MP = True
except ImportError:   # pragma: no cover - depends on the machine
    HAVE_MP = False

ABS_TOL = 1e-9
REL_TOL = 1e-8
REL_FLOOR = 1e-250
JUDGE = 1e-10
MAX_JUDGED = 400   # beyond this many disputes avow is broken: fail without mpmath
LAMBDA_RTOL = 1e-8

passed = 0
failed = 0
judged = 0   # points decided by mpmath
notes = []
excluded = []
# worst[fn] = [max abs vs SciPy, where, max rel vs SciPy (> 1e-250), where,
#              max rel vs mpmath (judged points), where]
worst = {}


def track(fn, slot, value, where):
    w = worst.setdefault(fn, [0.0, "", 0.0, "", 0.0, ""])
    if value > w[2 * slot]:
        w[2 * slot] = value
        w[2 * slot + 1] = where


def count(ok, msg):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL " + msg)


def probe_path():
    d = os.environ.get("AVOW_PROBES")
    if not d:
        avow = os.environ.get("AVOW")
        d = os.path.join(os.path.dirname(avow), "tests", "tools") if avow else "build/tests/tools"
    return os.path.join(d, "noncentral_probe")


def run_probe(requests):
    """requests: list of (fn, args...); returns floats (NaN for a status line)."""
    text = "".join(" ".join([r[0]] + [repr(float(a)) for a in r[1:]]) + "\n" for r in requests)
    res = subprocess.run([probe_path()], input=text, capture_output=True, text=True)
    if res.returncode != 0:
        raise RuntimeError("noncentral_probe failed (%d): %s" % (res.returncode, res.stderr.strip()))
    out = [float("nan") if line.startswith("status") else float(line)
           for line in res.stdout.splitlines()]
    if len(out) != len(requests):
        raise RuntimeError("noncentral_probe gave %d lines for %d requests" % (len(out), len(requests)))
    return out


# ---- mpmath references (independent of avow) ----

def mp_betacf(a, b, x):
    """Continued fraction of I_x(a, b) (modified Lentz), at the working precision."""
    tiny = mp.mpf(10) ** (-3 * mp.mp.dps)
    eps = mp.mpf(10) ** (3 - mp.mp.dps)
    qab, qap, qam = a + b, a + 1, a - 1
    c = mp.mpf(1)
    d = 1 - qab * x / qap
    d = 1 / (d if abs(d) > tiny else tiny)
    h = d
    for m in range(1, 200000):
        m2 = 2 * m
        for aa in (m * (b - m) * x / ((qam + m2) * (a + m2)),
                   -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2))):
            d = 1 + aa * d
            d = 1 / (d if abs(d) > tiny else tiny)
            c = 1 + aa / c
            c = c if abs(c) > tiny else tiny
            de = d * c
            h *= de
        if abs(de - 1) < eps:
            return h
    raise RuntimeError("mp_betacf did not converge")


def mp_ibeta(a, b, x, y):
    """(I_x(a, b), I_y(b, a)) for x + y = 1, each from the continued fraction on its
    small side."""
    if x == 0:
        return mp.mpf(0), mp.mpf(1)
    if y == 0:
        return mp.mpf(1), mp.mpf(0)
    lpre = a * mp.log(x) + b * mp.log(y) - (mp.loggamma(a) + mp.loggamma(b) - mp.loggamma(a + b))
    if x < (a + 1) / (a + b + 2):
        v = mp.exp(lpre) * mp_betacf(a, b, x) / a
        return v, 1 - v
    v = mp.exp(lpre) * mp_betacf(b, a, y) / b
    return 1 - v, v


def mp_ncf(x, d1, d2, lam, upper):
    """P(F <= x) or P(F > x) for the noncentral F, 40 digits."""
    with mp.workdps(40):
        x, d1, d2, mu = mp.mpf(x), mp.mpf(d1), mp.mpf(d2), mp.mpf(lam) / 2
        y, z = d1 * x / (d1 * x + d2), d2 / (d1 * x + d2)
        a, b = d1 / 2, d2 / 2
        cache = {}

        def term(j):
            if j not in cache:
                w = mp.exp(-mu + j * mp.log(mu) - mp.loggamma(j + 1)) if mu > 0 else mp.mpf(j == 0)
                lo, up = mp_ibeta(a + j, b, y, z)
                cache[j] = w * (up if upper else lo)
            return cache[j]

        if mu == 0:
            return term(0)
        lo, hi = 0, int(mu + 60 * mp.sqrt(mu) + 200)
        while hi - lo > 2:   # the terms are unimodal in j: ternary search for the largest
            m1, m2 = lo + (hi - lo) // 3, hi - (hi - lo) // 3
            if term(m1) < term(m2):
                lo = m1
            else:
                hi = m2
        js = max(range(lo, hi + 1), key=term)
        tot = term(js)
        for step in (1, -1):
            j = js + step
            while j >= 0:
                t = term(j)
                tot += t
                if t < mp.mpf(10) ** -30 * tot:
                    break
                j += step
        return tot


def mp_nct(t, nu, delta, upper):
    """P(T <= t) or P(T > t) for the noncentral t, 30 digits, by the integral over S."""
    with mp.workdps(30):
        t, nu, delta = mp.mpf(t), mp.mpf(nu), mp.mpf(delta)
        h = nu / 2
        lc = mp.log(2) + h * mp.log(h) - mp.loggamma(h)
        r2 = mp.sqrt(2)

        def lg(u):
            s = mp.exp(u)
            v = t * s - delta
            tail = mp.erfc(v / r2) / 2 if upper else mp.erfc(-v / r2) / 2
            return lc + 2 * h * u - h * s * s + (mp.log(tail) if tail > 0 else mp.mpf("-inf"))

        us = [mp.mpf(k) / 4 for k in range(-4 * 60, 4 * 8)]
        vals = [lg(u) for u in us]
        k = max(range(len(us)), key=lambda i: vals[i])
        lo, hi = us[max(k - 1, 0)], us[min(k + 1, len(us) - 1)]
        for _ in range(80):
            m1, m2 = lo + (hi - lo) * mp.mpf(0.382), lo + (hi - lo) * mp.mpf(0.618)
            if lg(m1) < lg(m2):
                lo = m1
            else:
                hi = m2
        u0 = (lo + hi) / 2
        pk = lg(u0)
        if pk == mp.mpf("-inf"):
            return mp.mpf(0)
        ends = []
        for sgn in (-1, 1):
            st = mp.mpf(0.05)
            while lg(u0 + sgn * st) > pk - 90:
                st *= 1.5
            ends.append(u0 + sgn * st)
        val = mp.quad(lambda u: mp.exp(lg(u) - pk), mp.linspace(ends[0], ends[1], 60))
        return val * mp.exp(pk)


# ---- comparing ----

def within(a, r):
    """avow value a against reference r: absolute 1e-9, relative 1e-8 above 1e-250."""
    if not (math.isfinite(a) and math.isfinite(r)):
        return False
    if abs(a - r) > ABS_TOL:
        return False
    return r <= REL_FLOOR or abs(a - r) <= REL_TOL * r


def close(a, r):
    """Agreement to 1e-10 (absolute, and relative above 1e-250): below this, a
    difference is not worth an mpmath computation."""
    if not (math.isfinite(a) and math.isfinite(r)):
        return False
    return abs(a - r) <= JUDGE and (r <= REL_FLOOR or abs(a - r) <= JUDGE * r)


def compare(fn, where, a, s, mpref):
    """One probability: avow a, SciPy s, mpref() the mpmath value on demand. Points where
    the two differ by more than 1e-10 are decided by mpmath (when importable) against
    the tolerance; the others pass on SciPy's value."""
    def agree_with_scipy():
        track(fn, 0, abs(a - s), where)
        if s > REL_FLOOR:
            track(fn, 1, abs(a - s) / s, where)
        count(True, "")

    if close(a, s):
        agree_with_scipy()
        return
    if not HAVE_MP:
        if within(a, s):
            agree_with_scipy()
        else:
            excluded.append("%s %s: avow %r, SciPy %r (no mpmath to decide)" % (fn, where, a, s))
        return
    global judged
    judged += 1
    if judged > MAX_JUDGED:
        count(False, "%s %s: avow %r, SciPy %r (more than %d disagreements: not decided)"
              % (fn, where, a, s, MAX_JUDGED))
        return
    m = mpref()
    mf = float(m)
    ok = within(a, mf)
    if mf > REL_FLOOR:
        track(fn, 2, float(abs(a - m) / m), where)
    if ok:
        notes.append("note: %s %s: SciPy %r, avow %r, mpmath %s"
                     % (fn, where, s, a, mp.nstr(m, 17)))
    count(ok, "%s %s: avow %r, SciPy %r, mpmath %s" % (fn, where, a, s, mp.nstr(m, 17)))


def fmt(v):
    return "%g" % v


def ncf_grid():
    pts = []
    for d1 in (1, 2, 3, 10.5, 1e4):
        for d2 in (1, 2, 3, 30, 1e4):
            for lam in (0, 0.5, 5, 100, 1000, 5000, 10000):
                m = (d1 + lam) / d1
                xs = [m * c for c in (1e-3, 0.3, 0.7, 1, 1.5, 3, 30)] + [1e-300, 1e-10, 1e10, 1e300]
                pts += [(x, d1, d2, lam) for x in xs]
    av = run_probe([("fp",) + p for p in pts] + [("fq",) + p for p in pts])
    n = len(pts)
    x, d1, d2, lam = (np.array(c, dtype=float) for c in zip(*pts))
    with warnings.catch_warnings(), np.errstate(all="ignore"):
        warnings.simplefilter("ignore")
        nz = lam > 0
        cdf = np.where(nz, stats.ncf.cdf(x, d1, d2, np.where(nz, lam, 1)), stats.f.cdf(x, d1, d2))
        sf = np.where(nz, stats.ncf.sf(x, d1, d2, np.where(nz, lam, 1)), stats.f.sf(x, d1, d2))
    for i, p in enumerate(pts):
        where = "x=%r d1=%s d2=%s lambda=%s" % (p[0], fmt(p[1]), fmt(p[2]), fmt(p[3]))
        compare("ncF P", where, av[i], float(cdf[i]), lambda p=p: mp_ncf(*p, upper=False))
        compare("ncF Q", where, av[n + i], float(sf[i]), lambda p=p: mp_ncf(*p, upper=True))
    return n


def nct_grid():
    pts = []
    for nu in (1, 2, 3, 30, 1e4):
        for d in (-100, -30, -5, -1, -0.1, 0, 0.1, 1, 5, 30, 100):
            s = max(1.0, abs(d) / math.sqrt(nu))
            ts = [d + k * s for k in (-10, -3, -1, 0, 1, 3, 10)]
            ts += [sg * v for sg in (-1, 1) for v in (1e-300, 1e-10, 0.5, 3, 1e10, 1e300)]
            pts += [(t, nu, d) for t in ts]
    av = run_probe([("tp",) + p for p in pts] + [("tq",) + p for p in pts])
    n = len(pts)
    t, nu, d = (np.array(c, dtype=float) for c in zip(*pts))
    with warnings.catch_warnings(), np.errstate(all="ignore"):
        warnings.simplefilter("ignore")
        nz = d != 0
        cdf = np.where(nz, stats.nct.cdf(t, nu, np.where(nz, d, 1)), stats.t.cdf(t, nu))
        sf = np.where(nz, stats.nct.sf(t, nu, np.where(nz, d, 1)), stats.t.sf(t, nu))
    for i, p in enumerate(pts):
        where = "t=%r nu=%s delta=%s" % (p[0], fmt(p[1]), fmt(p[2]))
        compare("nct P", where, av[i], float(cdf[i]), lambda p=p: mp_nct(*p, upper=False))
        compare("nct Q", where, av[n + i], float(sf[i]), lambda p=p: mp_nct(*p, upper=True))
    return n


def lambda_grid():
    """ncdist_f_lambda against brentq on SciPy's ncf.cdf."""
    cases = []
    for d1, d2 in ((1, 10), (2, 12), (3, 36), (4.5, 30.5), (10, 1000)):
        for x in (0.8, 3, 9.5, 40):
            for p in (1e-6, 0.025, 0.5, 0.975):
                cases.append((x, d1, d2, p))
    av = run_probe([("lambda",) + c for c in cases])
    for (x, d1, d2, p), l in zip(cases, av):
        where = "x=%r d1=%s d2=%s p=%r" % (x, fmt(d1), fmt(d2), p)

        def g(lam):
            return (stats.ncf.cdf(x, d1, d2, lam) if lam > 0 else stats.f.cdf(x, d1, d2)) - p

        if g(0) <= 0:
            ok = l == 0
            count(ok, "lambda %s: want 0 (P(x; 0) <= p), avow %r" % (where, l))
            continue
        hi = max(1.0, d1 * x)
        while g(hi) > 0:
            hi *= 2
        ref = optimize.brentq(g, 0, hi, xtol=1e-300, rtol=4 * np.finfo(float).eps, maxiter=500)
        err = abs(l - ref) / ref if math.isfinite(l) else math.inf
        track("lambda", 1, err, where)
        track("lambda", 0, abs(l - ref), where)
        count(err <= LAMBDA_RTOL, "lambda %s: avow %r, SciPy brentq %r, relative %.3g > %g"
              % (where, l, ref, err, LAMBDA_RTOL))
    return len(cases)


def f_crit(alpha, d1, d2):
    """Upper alpha quantile of F(d1, d2) by brentq on Q(x) = I_{d2/(d2+d1 x)}(d2/2, d1/2)."""
    def q(x):
        return special.betainc(d2 / 2, d1 / 2, d2 / (d2 + d1 * x)) - alpha
    hi = 1.0
    while q(hi) > 0:
        hi *= 2
    return optimize.brentq(q, 0, hi, xtol=1e-300, rtol=4 * np.finfo(float).eps, maxiter=500)


def t_crit(alpha, nu):
    """Upper alpha quantile of t(nu) by brentq on Q(t) = I_{nu/(nu+t^2)}(nu/2, 1/2)/2."""
    def q(t):
        return 0.5 * special.betainc(nu / 2, 0.5, nu / (nu + t * t)) - alpha
    hi = 1.0
    while q(hi) > 0:
        hi *= 2
    return optimize.brentq(q, 0, hi, xtol=1e-300, rtol=4 * np.finfo(float).eps, maxiter=500)


def power_grid():
    freq, treq, fref, tref = [], [], [], []
    for alpha in (0.05, 0.01):
        for d1, d2, lam in ((3, 36, 2.5), (1, 126, 8), (4, 20.5, 15), (2, 1000, 300)):
            freq.append(("fpower", alpha, d1, d2, lam))
            fref.append(float(stats.ncf.sf(f_crit(alpha, d1, d2), d1, d2, lam)))
        for nu, d in ((126, math.sqrt(8)), (9.5, 3), (20, -1.5), (4, 0.7)):
            for sides in (1, 2):
                treq.append(("tpower", alpha, nu, d, sides))
                a = alpha / sides
                tc = t_crit(a, nu)
                v = float(stats.nct.sf(tc, nu, d))
                if sides == 2:
                    v += float(stats.nct.cdf(-tc, nu, d))
                tref.append(v)
    av = run_probe(freq + treq)
    for r, a, s in zip(freq + treq, av, fref + tref):
        where = " ".join(repr(v) for v in r[1:])
        err = abs(a - s)
        track(r[0], 0, err, where)
        track(r[0], 1, err / s, where)
        count(err <= ABS_TOL, "%s %s: avow %r, SciPy %r, off by %.3g" % (r[0], where, a, s, err))
    return len(freq) + len(treq)


def main():
    if scipy.__version__ != "1.10.1":
        print("note: the reliability notes above are for SciPy 1.10.1; this is %s"
              % scipy.__version__)
    path = probe_path()
    if not os.access(path, os.X_OK):
        print("FAIL no noncentral probe at %s (build it with make, or set AVOW_PROBES)" % path)
        print("noncentral: 0 passed, 1 failed")
        return 1
    try:
        nf = ncf_grid()
        nt = nct_grid()
        nl = lambda_grid()
        npw = power_grid()
    except RuntimeError as e:
        print("FAIL %s" % e)
        print("noncentral: %d passed, %d failed" % (passed, failed + 1))
        return 1
    for line in notes:
        print(line)
    for line in excluded:
        print("excluded: " + line)
    print("grid: %d noncentral F points (both tails), %d noncentral t points (both tails), "
          "%d inversions, %d powers; %d disputes decided by mpmath%s"
          % (nf, nt, nl, npw, judged,
             "" if HAVE_MP else " (mpmath not available: %d excluded)" % len(excluded)))
    for fn in sorted(worst):
        w = worst[fn]
        line = "worst %-7s vs SciPy: %.2g absolute (%s), %.2g relative (%s)" % (fn, w[0], w[1], w[2], w[3])
        if w[4] > 0:
            line += "; vs mpmath where it decided: %.2g relative (%s)" % (w[4], w[5])
        print(line)
    print("noncentral: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
