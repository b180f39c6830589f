#!/usr/bin/python3
"""p-values and critical values of `avow run --format json` against SciPy.

Reference: Debian's python3-scipy 1.10.1 (checked below), run by /usr/bin/python3.
The data sets are generated here from seeded generators; that is fine because the
reference is SciPy computing from avow's own F and t (and from avow's degrees of
freedom, which are checked first, as are F and t themselves against exact fractions).

Tolerances:
  - tail probabilities (p-values): relative 1e-12 where the SciPy value is above 1e-300
    (every tail of these data sets is; a smaller reference would be a failure here, not
    a silent skip);
  - quantiles (interval half-width / standard error, Scheffe's critical value):
    relative 1e-10;
  - F and t against exact rational arithmetic: relative 1e-15 (avow rounds the exact F
    once; t = estimate / se takes a few roundings of binary64).
SciPy 1.10's f.isf is inaccurate in the extreme tail (methods note, section 1), so
quantiles are taken as ppf(1 - alpha) with moderate alpha only (0.01 to 0.10). Even
there SciPy 1.10.1's t.ppf is not always good to 1e-10: t.ppf(0.99, 53) gives
2.39878984010479 where the quantile is 2.3987898361414393 (mpmath 1.2.1, 40 digits),
a relative error of 1.7e-9. So every quantile reference is SciPy's ppf polished by
Newton steps on SciPy's own sf and pdf (accurate to about 1e-15, see the tolerances
above); a note is printed where the polish moved SciPy's ppf by more than 1e-10.

Data sets:
  A  four levels, n = 5, 8, 6, 11, moderate effects; the same data under adjust holm
     (per-comparison intervals), bonferroni and scheffe, at alpha 0.05;
  B  four levels, n = 13, 17, 15, 12, two means far apart relative to the noise:
     ANOVA p below 1e-100 and contrasts with p below 1e-50 (alpha 0.01, holm);
  C  five levels, n = 4, 4, 7, 5, 9, alpha 0.10, under bonferroni and scheffe.
Every set has a two-sided contrast and one-sided contrasts in both directions, and an
exploratory contrast (Scheffe).
"""
import json
import os
import random
import subprocess
import sys
import tempfile
from fractions import Fraction
from math import sqrt

import scipy
from scipy import stats

AVOW = os.environ.get("AVOW", "build/avow")
TAIL_RTOL = 1e-12
QUANT_RTOL = 1e-10
EXACT_RTOL = 1e-15

passed = 0
failed = 0


def check(what, got, want, rtol):
    """Relative comparison; counts and reports."""
    global passed, failed
    ok = isinstance(got, (int, float)) and want != 0 and abs(got - want) <= rtol * abs(want)
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL %s: avow %r, reference %r (relative tolerance %g)" % (what, got, want, rtol))


def check_tail(what, got, want):
    """A tail probability: relative 1e-12, and the reference must be above 1e-300."""
    global failed
    if not want > 1e-300:
        failed += 1
        print("FAIL %s: reference tail %r is not above 1e-300; the data set is too extreme" % (what, want))
        return
    check(what, got, want, TAIL_RTOL)


def check_equal(what, got, want):
    global passed, failed
    if got == want:
        passed += 1
    else:
        failed += 1
        print("FAIL %s: avow %r, want %r" % (what, got, want))


def quantile(dist, p, *df):
    """Upper-tail quantile x with dist.sf(x, *df) = p: dist.ppf(1 - p) (SciPy 1.10.1),
    then Newton steps on dist.sf and dist.pdf (SciPy 1.10.1)."""
    x0 = dist.ppf(1 - p, *df)
    x = x0
    for _ in range(3):
        x += (dist.sf(x, *df) - p) / dist.pdf(x, *df)
    if abs(x - x0) > 1e-10 * abs(x):
        notes.add("note: SciPy %s.ppf(1 - %.17g, %s) = %r, polished to %r (relative change %.2g)"
                  % (dist.name, p, ", ".join(map(str, df)), x0, x, (x0 - x) / x))
    return x


notes = set()


def generate(seed, means, ns, sd, decimals):
    """Rows (level, value text) from a seeded generator, in a shuffled order."""
    rng = random.Random(seed)
    rows = []
    for i, (mu, n) in enumerate(zip(means, ns)):
        for _ in range(n):
            rows.append(("l%d" % (i + 1), "%.*f" % (decimals, rng.gauss(mu, sd))))
    rng.shuffle(rows)
    return rows


def exact_anova(rows, k):
    """F and, per level, n and the exact mean, with Python fractions."""
    groups = {}
    for lev, text in rows:
        groups.setdefault(lev, []).append(Fraction(text))
    levels = ["l%d" % (i + 1) for i in range(k)]
    n = {lev: len(groups[lev]) for lev in levels}
    mean = {lev: sum(groups[lev]) / n[lev] for lev in levels}
    N = sum(n.values())
    grand = sum(sum(groups[lev]) for lev in levels) / N
    ssb = sum(n[lev] * (mean[lev] - grand) ** 2 for lev in levels)
    ssw = sum((y - mean[lev]) ** 2 for lev in levels for y in groups[lev])
    mse = ssw / (N - k)
    return (ssb / (k - 1)) / mse, mse, n, mean, N


def exact_t(coef, mse, n, mean):
    """t of a contrast with the given coefficients {level: Fraction}, as a float."""
    L = sum(c * mean[lev] for lev, c in coef.items())
    v = sum(c * c / n[lev] for lev, c in coef.items())
    # t = L / sqrt(mse v); its sign times sqrt(L^2 / (mse v)), rounded once at the end.
    t2 = L * L / (mse * v)
    return (1 if L > 0 else -1) * sqrt(t2) if L != 0 else 0.0, t2


def run_avow(tmp, name, study_text, rows):
    study = os.path.join(tmp, name + ".avow")
    data = os.path.join(tmp, name + ".csv")
    with open(study, "w") as f:
        f.write(study_text)
    with open(data, "w") as f:
        f.write("g,y\n")
        for lev, text in rows:
            f.write("%s,%s\n" % (lev, text))
    r = subprocess.run([AVOW, "run", study, "--data", data, "--format", "json"],
                       capture_output=True, text=True)
    if r.returncode != 0:
        raise RuntimeError("avow run %s: exit %d\n%s" % (name, r.returncode, r.stderr))
    return json.loads(r.stdout)


def study_text(title, k, alpha, adjust, contrasts, explores):
    levels = " ".join("l%d" % (i + 1) for i in range(k))
    lines = ['study "%s"' % title, "response y", "factor g { %s }" % levels,
             "alpha %s" % alpha, "adjust %s" % adjust]
    lines += ["contrast %s = %s" % c for c in contrasts]
    lines += ["explore contrast %s = %s" % e for e in explores]
    return "\n".join(lines) + "\n"


def verify(name, rep, rows, k, alpha, adjust):
    """Every check of one report."""
    F_exact, mse, n, mean, N = exact_anova(rows, k)
    df1, df2 = k - 1, N - k
    a = rep["anova"][0]
    check_equal(name + " anova df", (a["df"], rep["anova"][1]["df"]), (df1, df2))
    check(name + " anova F (exact fractions)", a["f"], float(F_exact), EXACT_RTOL)
    # scipy.stats.f.sf (SciPy 1.10.1): upper tail of F(df1, df2) at avow's F.
    check_tail(name + " anova p", a["p"], stats.f.sf(a["f"], df1, df2))

    m = len(rep["contrasts"])
    # scipy.stats.f.ppf (SciPy 1.10.1), polished: Scheffe's critical value sqrt((k-1) F_{1-alpha}).
    scheffe = sqrt(df1 * quantile(stats.f, alpha, df1, df2))
    for family, items in (("contrast", rep["contrasts"]),
                          ("explore", [c for e in rep["explore"] for c in e["comparisons"]])):
        for c in items:
            what = "%s %s %s (%s)" % (name, family, c["name"], c["alternative"])
            coef = {lev: Fraction(v) for lev, v in c["coefficients_exact"].items()}
            t_exact, t2 = exact_t(coef, mse, n, mean)
            check_equal(what + " df", c["df"], df2)
            check(what + " t (exact fractions)", c["t"], t_exact, EXACT_RTOL)
            t, se, est = c["t"], c["se"], c["estimate"]
            # Raw p-value: scipy.stats.t.sf (SciPy 1.10.1), in the declared direction;
            # two-sided is twice the upper tail at |t|.
            if c["alternative"] == "greater":
                p_ref = stats.t.sf(t, df2)
            elif c["alternative"] == "less":
                p_ref = stats.t.sf(-t, df2)
            else:
                p_ref = 2 * stats.t.sf(abs(t), df2)
            check_tail(what + " p", c["p"], p_ref)

            # The interval's critical value, from its half-width over the standard error.
            lo, hi = c["ci"]
            one = c["alternative"] != "two-sided"
            if c["alternative"] == "greater":
                check_equal(what + " open upper end", hi, None)
                crit = (est - lo) / se
            elif c["alternative"] == "less":
                check_equal(what + " open lower end", lo, None)
                crit = (hi - est) / se
            else:
                crit = (hi - lo) / (2 * se)
            if family == "explore" or adjust == "scheffe":
                crit_ref = scheffe
                check_equal(what + " simultaneous", c["ci_simultaneous"], True)
                # Scheffe's adjusted p: scipy.stats.f.sf (SciPy 1.10.1) at t^2/(k-1);
                # 1 for a one-sided contrast whose estimate points the other way.
                wrong_way = (c["alternative"] == "greater" and t < 0) or (c["alternative"] == "less" and t > 0)
                if wrong_way:
                    check_equal(what + " Scheffe adjusted p", c["p_adjusted"], 1)
                else:
                    check_tail(what + " Scheffe adjusted p", c["p_adjusted"], stats.f.sf(t * t / df1, df1, df2))
            elif adjust == "bonferroni":
                # scipy.stats.t.ppf (SciPy 1.10.1), polished, at 1 - alpha/(2m), or
                # 1 - alpha/m one-sided.
                crit_ref = quantile(stats.t, alpha / (m if one else 2 * m), df2)
                check_equal(what + " simultaneous", c["ci_simultaneous"], True)
            else:
                # Holm: per-comparison intervals, scipy.stats.t.ppf (SciPy 1.10.1),
                # polished, at 1 - alpha/2, or 1 - alpha one-sided.
                crit_ref = quantile(stats.t, alpha if one else alpha / 2, df2)
                check_equal(what + " per comparison", c["ci_simultaneous"], False)
            check(what + " interval half-width / se", crit, crit_ref, QUANT_RTOL)
    for e in rep["explore"]:
        # scipy.stats.f.ppf (SciPy 1.10.1), polished, as above.
        check(name + " explore critical_value", e["critical_value"], scheffe, QUANT_RTOL)
    return a["p"], [c["p"] for c in rep["contrasts"]]


def main():
    global failed
    try:
        run_all()
    except Exception as e:  # avow failed or wrote something unexpected: a failure, and say so
        failed += 1
        print("FAIL: %s: %s" % (type(e).__name__, e))
    for n in sorted(notes):
        print(n)
    print("pvalues: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


def run_all():
    global failed
    if scipy.__version__ != "1.10.1":
        print("note: the reference values were chosen with SciPy 1.10.1; this is %s" % scipy.__version__)
    contrasts = [("near", "l2 - l1"), ("up", "l3 - mean(l1, l2) > 0"), ("down", "l4 - l3 < 0")]
    explores = [("hunch", "l4 - mean(l1, l2, l3)")]
    with tempfile.TemporaryDirectory() as tmp:
        rows_a = generate(20261201, [10.0, 10.8, 11.5, 10.3], [5, 8, 6, 11], 1.0, 3)
        for adjust in ("holm", "bonferroni", "scheffe"):
            name = "A/" + adjust
            rep = run_avow(tmp, "a-" + adjust, study_text("Synthetic set A", 4, "0.05", adjust, contrasts, explores), rows_a)
            verify(name, rep, rows_a, 4, 0.05, adjust)

        rows_b = generate(4711, [0.0, 0.0, 1.0, 2.0], [13, 17, 15, 12], 0.003, 5)
        contrasts_b = [("near", "l2 - l1"), ("up", "l3 - mean(l1, l2) > 0"), ("far", "l4 - l3"),
                       ("down", "l3 - l4 < 0")]
        rep = run_avow(tmp, "b", study_text("Synthetic set B", 4, "0.01", "holm", contrasts_b, explores), rows_b)
        p_anova, p_contrasts = verify("B/holm", rep, rows_b, 4, 0.01, "holm")
        # The set must reach the extreme tails it is meant for.
        if not p_anova < 1e-100:
            failed += 1
            print("FAIL B: the ANOVA p-value %r is not below 1e-100" % p_anova)
        if not min(p_contrasts) < 1e-50:
            failed += 1
            print("FAIL B: no contrast p-value below 1e-50 (%r)" % p_contrasts)

        rows_c = generate(99, [5.0, 5.4, 4.1, 6.0, 5.2], [4, 4, 7, 5, 9], 0.8, 2)
        contrasts_c = [("ab", "l1 - l2"), ("mid", "l3 - mean(l1, l2, l4, l5) < 0"),
                       ("top", "l4 - l5 > 0"), ("pair", "mean(l1, l2) - mean(l4, l5)")]
        explores_c = [("e1", "l5 - l1"), ("e2", "mean(l3, l4) - mean(l1, l2, l5)")]
        for adjust in ("bonferroni", "scheffe"):
            rep = run_avow(tmp, "c-" + adjust, study_text("Synthetic set C", 5, "0.10", adjust, contrasts_c, explores_c), rows_c)
            verify("C/" + adjust, rep, rows_c, 5, 0.10, adjust)



if __name__ == "__main__":
    sys.exit(main())
