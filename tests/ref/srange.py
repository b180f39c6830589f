#!/usr/bin/python3
"""The studentized range distribution of avow (src/srange.c) against SciPy and against a
brute-force quadrature.

avow's numbers come from the probe program tests/tools/srange_probe.c, found in the
directory $AVOW_PROBES, else beside $AVOW (its directory + tests/tools, so that the
sanitizer build checks its own probe), else build/tests/tools.

Reference: Debian's python3-scipy 1.10.1 (checked below), run by /usr/bin/python3:
scipy.stats.studentized_range.cdf, .sf and .ppf. In SciPy 1.10.1 the cdf is a nested
scipy.integrate.nquad (epsabs=1e-11, epsrel=1e-12) over the same double integral; sf is
not defined by the distribution, so .sf is the generic 1 - cdf, and .ppf is the generic
root-finder (brentq, xtol=1e-14) on the cdf; for df >= 100000 SciPy switches to the
df = inf integral (the grid below stays under it, apart from df = inf itself).

Grid: k in {2, 3, 5, 10, 20, 50, 100}, df in {2, 3, 5, 10, 20, 60, 120, 1000, inf}, and
the quantiles of upper-tail probability alpha in {0.1, 0.05, 0.01, 0.001}. At each point:
  ppf  avow srange_qinv(alpha) against SciPy ppf(1 - alpha):
       |dq| <= 1e-9 q + 1e-10 / f(q), f = SciPy's pdf at q. The first term is avow's
       quantile target; the second is SciPy's own limit, its cdf being good to about
       1e-11 absolute, which moves its quantile by that over the density (at k = 100,
       df = 2, alpha = 0.001 that is 8e-7 absolute on q = 160, more than 1e-9 q);
  cdf  avow srange_cdf against SciPy cdf at SciPy's quantile: absolute 1e-10, ten times
       SciPy's requested absolute accuracy (two nested integrals);
  sf   avow srange_sf against SciPy sf there: absolute 1e-10, as SciPy's sf is 1 - cdf.
SciPy cannot check the relative accuracy of small upper tails (its sf is 1 - cdf), so a
brute-force quadrature written here (not sharing code or method with avow: dense fixed
Gauss-Legendre in z, 20 points on panels of 0.1, numpy-vectorized with scipy.special.log_ndtr,
and scipy.integrate.quad at epsrel 1e-13 over log s) checks avow's upper tail to
relative 1e-10 (the target) at avow's quantiles for alpha = 1e-6 and 1e-12 on a few
(k, df). (While this script was written the brute force reproduced mpmath 1.2.1 at 25
digits to 3e-15 relative at P(Q > 8; 3, 12) = 2.8911020322350343e-4.)

Where avow and SciPy disagree beyond a tolerance the brute force decides: if it agrees
with avow within the tolerance (and not with SciPy), the check passes with a printed
note naming SciPy's error; otherwise it fails.

The last line is "studentized range: N passed, N failed"; the exit status is 1 on any
failure.
"""
import math
import os
import subprocess
import sys

import numpy as np
import scipy
from scipy import integrate
from scipy.special import log_ndtr
from scipy.stats import studentized_range

KS = [2, 3, 5, 10, 20, 50, 100]
DFS = [2, 3, 5, 10, 20, 60, 120, 1000, math.inf]
ALPHAS = [0.1, 0.05, 0.01, 0.001]
# Far upper tails checked against the brute force: (k, df, alpha).
FAR = [(3, 2, 1e-6), (3, 12, 1e-12), (20, 5, 1e-6), (20, 120, 1e-12),
       (100, 3, 1e-6), (100, 1000, 1e-12), (10, math.inf, 1e-12), (100, math.inf, 1e-6)]

CDF_ATOL = 1e-10
Q_RTOL = 1e-9
SCIPY_CDF_ERR = 1e-10
TAIL_RTOL = 1e-10

passed = 0
failed = 0
notes = []
worst = {"ppf": (0.0, ""), "cdf": (0.0, ""), "sf": (0.0, "")}   # largest deviations from SciPy


def track(kind, dev, where):
    if dev > worst[kind][0]:
        worst[kind] = (dev, where)


def probe_path():
    d = os.environ.get("AVOW_PROBES")
    if not d:
        avow = os.environ.get("AVOW")
        d = os.path.join(os.path.dirname(avow), "tests", "tools") if avow else "build/tests/tools"
    return os.path.join(d, "srange_probe")


def run_probe(requests):
    """requests: list of (fn, x, k, df); returns the list of floats (NaN for a status)."""
    text = "".join("%s %r %d %s\n" % (fn, x, k, "inf" if math.isinf(df) else repr(df))
                   for fn, x, k, df in requests)
    res = subprocess.run([probe_path()], input=text, capture_output=True, text=True)
    if res.returncode != 0:
        raise RuntimeError("srange_probe failed (%d): %s" % (res.returncode, res.stderr.strip()))
    out = []
    for line in res.stdout.splitlines():
        out.append(float("nan") if line.startswith("status") else float(line))
    if len(out) != len(requests):
        raise RuntimeError("srange_probe gave %d lines for %d requests" % (len(out), len(requests)))
    return out


# ---- brute force: P(Q <= q), P(Q > q), written independently of avow ----

_GX, _GW = np.polynomial.legendre.leggauss(20)


def _nodes(a, b, h):
    n = max(1, int(math.ceil((b - a) / h)))
    e = np.linspace(a, b, n + 1)
    mid = (e[:-1] + e[1:]) / 2
    hw = (e[1:] - e[:-1]) / 2
    return (mid[:, None] + hw[:, None] * _GX[None, :]).ravel(), (hw[:, None] * _GW[None, :]).ravel()


def bf_range(w, k):
    """(P(R <= w), P(R > w)) for the range R of k standard normals, each with relative
    accuracy: k int phi(z) d^m and k int phi(z) Phi(z)^m [1 - (1 - r)^m] over z, with
    d = Phi(z) - Phi(z - w) and r = Phi(z - w)/Phi(z) taken in logs."""
    m = k - 1
    z, wt = _nodes(-15.0, max(15.0, w / 2 + 15.0), 0.1)
    la = log_ndtr(z)
    lb = log_ndtr(z - w)
    with np.errstate(divide="ignore"):
        l1r = np.log(-np.expm1(lb - la))           # log(1 - r) = log(d / Phi(z))
    lphi = -0.5 * z * z - 0.5 * math.log(2 * math.pi)
    lo = np.sum(wt * k * np.exp(lphi + m * (la + l1r)))
    r = np.exp(lb - la)
    l1r_small = np.log1p(-np.minimum(r, 0.5))
    l1r = np.where(r <= 0.5, l1r_small, l1r)
    up = np.sum(wt * k * np.exp(lphi + m * la) * -np.expm1(m * l1r))
    return lo, up


def _log_norm_const(h):
    """log of 2 h^h / Gamma(h) e^-h, written as log 2 + (1/2) log h - log sqrt(2 pi)
    minus Stirling's correction lgamma(h) - [(h - 1/2) log h - h + log sqrt(2 pi)]."""
    if h >= 10:
        corr = 1 / (12 * h) - 1 / (360 * h ** 3) + 1 / (1260 * h ** 5) - 1 / (1680 * h ** 7)
    else:
        corr = math.lgamma(h) - ((h - 0.5) * math.log(h) - h + 0.5 * math.log(2 * math.pi))
    return math.log(2) + 0.5 * math.log(h) - 0.5 * math.log(2 * math.pi) - corr


def bf_tail(q, k, df, upper):
    """P(Q > q) (upper) or P(Q <= q): the range tail averaged over t = log S, whose
    density is exp(C - h (e^(2t) - 1 - 2t)), h = df/2, by adaptive quadrature."""
    i = 1 if upper else 0
    if math.isinf(df):
        return bf_range(q, k)[i]
    h = df / 2
    c = _log_norm_const(h)

    def logp(t):
        return c - h * (math.expm1(2 * t) - 2 * t)

    tlo = max(-745.0 / df - 1, -80.0)
    thi = 0.5 * math.log1p(750.0 / h) + 0.5
    pts = sorted({0.0} | {math.log(v / q) for v in (1, 2, 4, 6, 9) if tlo < math.log(v / q) < thi})
    return integrate.quad(lambda t: math.exp(logp(t)) * bf_range(q * math.exp(t), k)[i],
                          tlo, thi, points=pts, epsabs=0, epsrel=1e-13, limit=2000)[0]


# ---- checks ----

def count(ok, msg):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL " + msg)


def fmt_df(df):
    return "inf" if math.isinf(df) else "%g" % df


def check_with_dispute(what, got, want, ok, judge):
    """ok(got, want) decides; when it fails, judge() gives the brute force's verdict as
    (ok_avow, ok_scipy, bf_value)."""
    if ok(got, want):
        count(True, "")
        return
    ok_avow, ok_scipy, bfv = judge()
    if ok_avow and not ok_scipy:
        notes.append("note: %s: SciPy %r is off; brute force %r agrees with avow %r"
                     % (what, want, bfv, got))
        count(True, "")
    else:
        count(False, "%s: avow %r, SciPy %r, brute force %r" % (what, got, want, bfv))


def run_grid():
    pts = [(k, df, a) for k in KS for df in DFS for a in ALPHAS]
    sp = []
    for k, df, a in pts:
        q = float(studentized_range.ppf(1 - a, k, df))
        sp.append((q, float(studentized_range.cdf(q, k, df)), float(studentized_range.sf(q, k, df)),
                   float(studentized_range.pdf(q, k, df))))
    reqs = []
    for (k, df, a), (q, _, _, _) in zip(pts, sp):
        reqs += [("qinv", a, k, df), ("cdf", q, k, df), ("sf", q, k, df)]
    av = run_probe(reqs)
    for i, ((k, df, a), (q, c, s, f)) in enumerate(zip(pts, sp)):
        aq, ac, asf = av[3 * i:3 * i + 3]
        where = "k=%d df=%s alpha=%g" % (k, fmt_df(df), a)
        qtol = Q_RTOL * q + SCIPY_CDF_ERR / f
        track("ppf", abs(aq / q - 1), where)
        track("cdf", abs(ac - c), where)
        track("sf", abs(asf - s) / s, where)

        def judge_q(aq=aq, q=q, k=k, df=df, a=a):
            # the brute-force upper tail at each candidate quantile against alpha, to the
            # quantile target (1e-9; d log P / d log q is at least 1 at these alphas)
            bav = bf_tail(aq, k, df, True)
            bsp = bf_tail(q, k, df, True)
            return abs(bav / a - 1) <= Q_RTOL, abs(bsp / a - 1) <= Q_RTOL, bav

        check_with_dispute("ppf " + where, aq, q, lambda g, w: abs(g - w) <= qtol, judge_q)

        def judge_c(q=q, k=k, df=df, ac=ac, c=c):
            b = bf_tail(q, k, df, False)
            return abs(ac - b) <= CDF_ATOL, abs(c - b) <= CDF_ATOL, b

        check_with_dispute("cdf " + where + " q=%r" % q, ac, c,
                           lambda g, w: abs(g - w) <= CDF_ATOL, judge_c)

        def judge_s(q=q, k=k, df=df, asf=asf, s=s):
            b = bf_tail(q, k, df, True)
            return abs(asf - b) <= CDF_ATOL, abs(s - b) <= CDF_ATOL, b

        check_with_dispute("sf " + where + " q=%r" % q, asf, s,
                           lambda g, w: abs(g - w) <= CDF_ATOL, judge_s)
    return len(pts)


def run_far_tails():
    qs = run_probe([("qinv", a, k, df) for k, df, a in FAR])
    sfs = run_probe([("sf", q, k, df) for q, (k, df, a) in zip(qs, FAR)])
    far = 0.0
    for q, s, (k, df, a) in zip(qs, sfs, FAR):
        b = bf_tail(q, k, df, True)
        err = abs(s / b - 1)
        far = max(far, err)
        count(err <= TAIL_RTOL, "far upper tail k=%d df=%s q=%r: avow %r, brute force %r, "
              "relative error %.3g > %g" % (k, fmt_df(df), q, s, b, err, TAIL_RTOL))
    return far


def main():
    if scipy.__version__ != "1.10.1":
        print("note: the tolerances were set for SciPy 1.10.1; this is %s" % scipy.__version__)
    path = probe_path()
    if not os.access(path, os.X_OK):
        print("FAIL no srange probe at %s (build it with make, or set AVOW_PROBES)" % path)
        print("studentized range: 0 passed, 1 failed")
        return 1
    try:
        n = run_grid()
        far = run_far_tails()
    except RuntimeError as e:
        print("FAIL %s" % e)
        print("studentized range: %d passed, %d failed" % (passed, failed + 1))
        return 1
    for line in notes:
        print(line)
    print("grid: %d points; largest differences from SciPy: quantile %.2g relative (%s), "
          "cdf %.2g absolute (%s), sf %.2g relative (%s)"
          % (n, worst["ppf"][0], worst["ppf"][1], worst["cdf"][0], worst["cdf"][1],
             worst["sf"][0], worst["sf"][1]))
    print("far upper tails: largest relative difference from the brute force %.2g" % far)
    print("studentized range: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
