/* test_dist.c: central F and t tails and quantiles (src/dist.c).
 *
 * Reference values come from the project's methods note (shared/reference/methods.md,
 * section 1) and check-values.json beside it; each check names its ID and source, and
 * uses the tolerance stated there. Source codes used below:
 *   MP  = mpmath 1.2.1 at 40 digits (regularized incomplete beta, root-finding);
 *   EX  = exact rational arithmetic with Python fractions;
 *   TAB = a printed table, named;
 *   MEM = a table value quoted from memory, not checked against the printed page.
 * Checks without an outside value test identities, closed forms or self-consistency. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include "numcheck.h"

#include <math.h>
#include <stdio.h>

#include <gsl/gsl_cdf.h>

#include "avow/dist.h"
#include "avow/util.h"

/* ---- checking helpers: each prints what it checked when it fails ---- */



/* Fail unless got == want exactly (as doubles; NaN fails). */
static void eq_at(double got, double want, const char *what, const char *file, int line)
{
    if (!(got == want)) {
        print_error("%s: got %.17g, want exactly %.17g\n", what, got, want);
        _fail(file, line);
    }
}
#define CHECK_EQ(got, want, what) eq_at((got), (want), (what), __FILE__, __LINE__)

/* Fail unless a status is as expected. */
static void status_at(int got, int want, const char *what, const char *file, int line)
{
    if (got != want) {
        print_error("%s: status %d, want %d\n", what, got, want);
        _fail(file, line);
    }
}
#define CHECK_STATUS(got, want, what) status_at((got), (want), (what), __FILE__, __LINE__)

/* Quantile wrappers that require status 0. */
static double fqinv_at(double p, double d1, double d2, int solver, const char *file, int line)
{
    double x = NAN;
    int st = solver ? dist_f_qinv_solve(p, d1, d2, &x) : dist_f_qinv(p, d1, d2, &x);
    if (st != AVOW_OK) {
        print_error("%s(p=%.17g, d1=%.17g, d2=%.17g): status %d\n",
                    solver ? "dist_f_qinv_solve" : "dist_f_qinv", p, d1, d2, st);
        _fail(file, line);
    }
    return x;
}
#define FQINV(p, d1, d2) fqinv_at((p), (d1), (d2), 0, __FILE__, __LINE__)
#define FQINV_SOLVE(p, d1, d2) fqinv_at((p), (d1), (d2), 1, __FILE__, __LINE__)

static double tqinv_at(double p, double nu, int solver, const char *file, int line)
{
    double x = NAN;
    int st = solver ? dist_t_qinv_solve(p, nu, &x) : dist_t_qinv(p, nu, &x);
    if (st != AVOW_OK) {
        print_error("%s(p=%.17g, nu=%.17g): status %d\n",
                    solver ? "dist_t_qinv_solve" : "dist_t_qinv", p, nu, st);
        _fail(file, line);
    }
    return x;
}
#define TQINV(p, nu) tqinv_at((p), (nu), 0, __FILE__, __LINE__)
#define TQINV_SOLVE(p, nu) tqinv_at((p), (nu), 1, __FILE__, __LINE__)

static const double PI = 3.14159265358979323846264338327950288;

/* ---- printed table values, to half a unit in the last printed digit ---- */

static void test_table_values(void **state)
{
    (void)state;
    /* Ft-01: standard F table, F_0.05(6, 21) = 2.57 (MEM: "standard statistical tables,
     * from memory"; the methods note flags it as not checked against the page). */
    CHECK_ABS(FQINV(0.05, 6, 21), 2.57, 0.005, "Ft-01 F_0.05(6,21), table from memory");
    /* Ft-03, Ft-04: TAB, F table values printed in the lamp example (dahl.mines.edu
     * course notes ps_st9_4c). */
    CHECK_ABS(FQINV(0.05, 2, 9), 4.26, 0.005, "Ft-03 F_0.05(2,9), printed table");
    CHECK_ABS(FQINV(0.01, 2, 9), 8.02, 0.005, "Ft-04 F_0.01(2,9), printed table");
    /* Ft-06: TAB, NIST/SEMATECH e-Handbook 1.3.6.7.2 t table, t_0.025(10) = 2.228. */
    CHECK_ABS(TQINV(0.025, 10), 2.228, 0.0005, "Ft-06 t_0.025(10), NIST t table");
    /* t(0.975; 21) = 2.080: standard statistical tables, from memory (quoted in the
     * task brief; not in check-values.json, printed page not viewed). */
    CHECK_ABS(TQINV(0.025, 21), 2.080, 0.0005, "t_0.025(21), table from memory");
}

/* ---- F quantiles against high-precision references ---- */

static void test_f_quantiles(void **state)
{
    (void)state;
    /* Ft-02: MP. */
    CHECK_REL(FQINV(0.05, 6, 21), 2.5727116405095254, 1e-12, "Ft-02 F_0.05(6,21)");
    /* Ft-05: MP; closed form (d2/2)(alpha^(-2/d2) - 1) for d1 = 2. */
    CHECK_REL(FQINV(0.01, 2, 9), 8.02151730993206, 1e-12, "Ft-05 F_0.01(2,9)");
    /* Ft-11: closed form, 6 (100 - 1) = 594 exactly. */
    CHECK_REL(FQINV(1e-12, 2, 12), 594.0, 1e-12, "Ft-11 F_1e-12(2,12)");
    /* Ft-12: MP. */
    CHECK_REL(FQINV(1e-12, 3, 20), 113.45080145662351, 1e-10, "Ft-12 F_1e-12(3,20)");
    /* Ft-13, Ft-14, Ft-15: MP; GSL 2.7's gsl_cdf_fdist_Qinv returns NaN (and, with
     * GSL's default error handler, aborts the program) at all three. */
    CHECK_REL(FQINV(0.05, 1, 1e5), 3.8415518136867743, 1e-10, "Ft-13 F_0.05(1,1e5)");
    CHECK_REL(FQINV(1e-12, 10, 1000), 8.129711063512058, 1e-10, "Ft-14 F_1e-12(10,1000)");
    CHECK_REL(FQINV(1e-9, 100, 1000), 2.2112317430766675, 1e-10, "Ft-15 F_1e-9(100,1000)");
}

/* The root-finder alone (no closed form, no GSL quantile) on the same references. */
static void test_f_solver(void **state)
{
    (void)state;
    /* Ft-02: MP. */
    CHECK_REL(FQINV_SOLVE(0.05, 6, 21), 2.5727116405095254, 1e-12, "Ft-02 solver");
    /* Ft-05: MP / closed form. */
    CHECK_REL(FQINV_SOLVE(0.01, 2, 9), 8.02151730993206, 1e-12, "Ft-05 solver");
    /* Ft-11: closed form, 594 exactly. */
    CHECK_REL(FQINV_SOLVE(1e-12, 2, 12), 594.0, 1e-12, "Ft-11 solver");
    /* Ft-12 .. Ft-15: MP. */
    CHECK_REL(FQINV_SOLVE(1e-12, 3, 20), 113.45080145662351, 1e-10, "Ft-12 solver");
    CHECK_REL(FQINV_SOLVE(0.05, 1, 1e5), 3.8415518136867743, 1e-10, "Ft-13 solver");
    CHECK_REL(FQINV_SOLVE(1e-12, 10, 1000), 8.129711063512058, 1e-10, "Ft-14 solver");
    CHECK_REL(FQINV_SOLVE(1e-9, 100, 1000), 2.2112317430766675, 1e-10, "Ft-15 solver");
}

/* ---- t quantiles against high-precision references ---- */

static void test_t_quantiles(void **state)
{
    (void)state;
    /* Ft-07: MP. */
    CHECK_REL(TQINV(0.025, 10), 2.228138851986275, 1e-12, "Ft-07 t_0.025(10)");
    /* Ft-08: MP, non-integer df. */
    CHECK_REL(TQINV(0.025, 7.93), 2.309552118506422, 1e-12, "Ft-08 t_0.025(7.93)");
    /* Ft-18: MP. */
    CHECK_REL(TQINV(1e-12, 20), 15.151149592103092, 1e-11, "Ft-18 t_1e-12(20)");
    /* Ft-21: closed form cot(pi alpha) for nu = 1 (GSL 2.7 is off by 1.4e-5 here). */
    CHECK_REL(TQINV(1e-12, 1), 318309886183.79065, 1e-12, "Ft-21 t_1e-12(1)");
    /* Ft-23: MP (the NIST table prints the truncated 4.143). */
    CHECK_REL(TQINV(0.001, 10), 4.143700494046589, 1e-12, "Ft-23 t_0.001(10)");
    /* Lower-tail quantile by symmetry, same reference (Ft-07, MP): 1 - 0.975 is
     * 0.025000000000000022 in binary64, a relative change of 9e-16 in the tail, far
     * below the tolerance. (A mirrored Ft-18 is not possible: 1 - (1 - 1e-12) is
     * 1.0000889e-12 in binary64.) */
    CHECK_REL(TQINV(0.975, 10), -2.228138851986275, 1e-12, "Ft-07 mirrored, p = 0.975");
}

/* The t root-finder alone on the same references. */
static void test_t_solver(void **state)
{
    (void)state;
    /* Ft-07, Ft-08, Ft-18, Ft-23: MP. */
    CHECK_REL(TQINV_SOLVE(0.025, 10), 2.228138851986275, 1e-12, "Ft-07 solver");
    CHECK_REL(TQINV_SOLVE(0.025, 7.93), 2.309552118506422, 1e-12, "Ft-08 solver");
    CHECK_REL(TQINV_SOLVE(1e-12, 20), 15.151149592103092, 1e-11, "Ft-18 solver");
    CHECK_REL(TQINV_SOLVE(0.001, 10), 4.143700494046589, 1e-12, "Ft-23 solver");
    /* Ft-21: closed form; the solver inverts the atan tail, not the cot formula. */
    CHECK_REL(TQINV_SOLVE(1e-12, 1), 318309886183.79065, 1e-12, "Ft-21 solver");
}

/* ---- tail probabilities ---- */

static void test_tails(void **state)
{
    (void)state;
    /* Ft-09: MP. */
    CHECK_REL(dist_f_q(100, 3, 20), 3.268241807261642e-12, 1e-12, "Ft-09 Q_F(100;3,20)");
    /* Ft-10: EX, (3/103)^6 = 729/1194052296529. */
    CHECK_REL(dist_f_q(200, 2, 12), 729.0 / 1194052296529.0, 1e-13, "Ft-10 Q_F(200;2,12)");
    /* Ft-16: MP, lower tail. */
    CHECK_REL(dist_f_p(0.001, 5, 5), 1.7117826911287074e-07, 1e-12, "Ft-16 P_F(0.001;5,5)");
    /* Ft-17: MP. */
    CHECK_REL(dist_t_q(12, 20), 6.79777851294034e-11, 1e-12, "Ft-17 Q_t(12;20)");
    /* Ft-19: closed form 1/(sqrt(t^2+2)(sqrt(t^2+2)+t)). */
    CHECK_REL(dist_t_q(1e6, 2), 4.9999999999925e-13, 1e-12, "Ft-19 Q_t(1e6;2)");
    /* Ft-20: closed form atan(1/t)/pi. */
    CHECK_REL(dist_t_q(1e10, 1), 3.1830988618379065e-11, 1e-13, "Ft-20 Q_t(1e10;1)");
    /* Ft-22: MP; identity F(1, nu) = t^2: Q_F(6.25; 1, 15) = 2 Q_t(2.5; 15). */
    CHECK_REL(dist_f_q(6.25, 1, 15), 0.024505803246513847, 1e-13, "Ft-22 Q_F(6.25;1,15)");
    CHECK_REL(dist_t_p2(2.5, 15), 0.024505803246513847, 1e-13, "Ft-22 2Q_t(2.5;15)");
    CHECK_REL(dist_t_p2(-2.5, 15), 0.024505803246513847, 1e-13, "Ft-22 2Q_t(|-2.5|;15)");
    /* Ends of the support. */
    CHECK_EQ(dist_f_q(0, 3, 4), 1, "Q_F(0) = 1");
    CHECK_EQ(dist_f_q(-1, 3, 4), 1, "Q_F(-1) = 1");
    CHECK_EQ(dist_f_q(INFINITY, 3, 4), 0, "Q_F(inf) = 0");
    CHECK_EQ(dist_f_p(0, 3, 4), 0, "P_F(0) = 0");
    CHECK_EQ(dist_f_p(INFINITY, 3, 4), 1, "P_F(inf) = 1");
    CHECK_EQ(dist_t_q(0, 5), 0.5, "Q_t(0;5) = 1/2");
    CHECK_EQ(dist_t_q(INFINITY, 5), 0, "Q_t(inf;5) = 0");
    CHECK_EQ(dist_t_q(-INFINITY, 5), 1, "Q_t(-inf;5) = 1");
    CHECK_EQ(dist_t_q(-INFINITY, 1), 1, "Q_t(-inf;1) = 1");
    CHECK_EQ(dist_t_q(-INFINITY, 2), 1, "Q_t(-inf;2) = 1");
    CHECK_EQ(dist_t_q(0, 1), 0.5, "Q_t(0;1) = 1/2");
    CHECK_EQ(dist_t_q(0, 2), 0.5, "Q_t(0;2) = 1/2");
    CHECK_EQ(dist_t_p2(0, 7), 1, "two-sided p at t = 0");
}

/* Far t tails beyond |t| = 1e154, where t^2 overflows and gsl_cdf_tdist_Q returns 0 for
 * every nu (dist_t_q switches to the leading term of the incomplete-beta series above
 * |t| = 1e150). */
static void test_t_far_tail(void **state)
{
    (void)state;
    /* Values: mpmath 1.3.0 at 40 digits, (1/2) betainc(nu/2, 1/2, 0, nu/(nu+t^2),
     * regularized), computed for this test (not in check-values.json). */
    CHECK_REL(dist_t_q(1e160, 0.05), 4.485631048063483417e-9, 1e-12, "Q_t(1e160; 0.05)");
    CHECK_REL(dist_t_q(1e200, 0.5), 3.2070097541422290519e-101, 1e-12, "Q_t(1e200; 0.5)");
    CHECK_REL(dist_t_q(1e300, 0.05), 4.4856310480634793933e-16, 1e-12, "Q_t(1e300; 0.05)");
    CHECK_REL(dist_t_q(-1e160, 0.05), 1 - 4.485631048063483417e-9, 1e-15, "Q_t(-1e160; 0.05)");
    /* The two evaluations agree where they meet (consistency, no outside value): a
     * relative step of 2e-15 in t changes the tail by about nu times that. */
    static const double nus[] = {0.05, 0.5, 1.5};
    char what[96];
    for (size_t i = 0; i < sizeof nus / sizeof nus[0]; i++) {
        double lo = dist_t_q(1e150 * (1 - 0x1p-50), nus[i]);
        double hi = dist_t_q(1e150 * (1 + 0x1p-50), nus[i]);
        snprintf(what, sizeof what, "Q_t(t; %g) continuous at t = 1e150", nus[i]);
        CHECK_REL(hi, lo, 1e-13, what);
    }
}

/* The nu = 1 and nu = 2 closed-form tails of dist_t_q against GSL's incomplete-beta
 * evaluation at moderate t, where GSL is accurate (methods note: at most 3e-15
 * relative); this verifies the derivations. Tolerance: closed forms, rel 1e-12. */
static void test_t_closed_form_tails(void **state)
{
    (void)state;
    static const double ts[] = {-10, -3, -1, -0.25, 0.001, 0.25, 1, 2.5, 10, 40};
    char what[96];
    for (size_t i = 0; i < sizeof ts / sizeof ts[0]; i++) {
        for (int nu = 1; nu <= 2; nu++) {
            snprintf(what, sizeof what, "Q_t(%g; %d) vs gsl_cdf_tdist_Q", ts[i], nu);
            CHECK_REL(dist_t_q(ts[i], nu), gsl_cdf_tdist_Q(ts[i], nu), 1e-12, what);
        }
        /* Cauchy tail written independently: 1/2 - atan(t)/pi. */
        snprintf(what, sizeof what, "Q_t(%g; 1) vs 1/2 - atan(t)/pi", ts[i]);
        CHECK_REL(dist_t_q(ts[i], 1), 0.5 - atan(ts[i]) / PI, 1e-12, what);
        /* nu = 2 tail written independently: (1 - t/sqrt(t^2 + 2))/2. */
        snprintf(what, sizeof what, "Q_t(%g; 2) vs (1 - t/sqrt(t^2+2))/2", ts[i]);
        CHECK_REL(dist_t_q(ts[i], 2), 0.5 * (1 - ts[i] / sqrt(ts[i] * ts[i] + 2)), 1e-12, what);
    }
}

/* Closed-form quantiles (t with nu = 1, 2; F with d1 = 2) against the root-finder,
 * which never uses them, and against formulas written out here. */
static void test_closed_form_quantiles(void **state)
{
    (void)state;
    static const double ps[] = {1e-300, 1e-15, 1e-9, 1e-4, 0.01, 0.05, 0.2, 0.25, 0.3,
                                0.45, 0.5, 0.55, 0.75, 0.9, 0.975, 0.999, 1 - 1e-9};
    char what[128];
    for (size_t i = 0; i < sizeof ps / sizeof ps[0]; i++) {
        double p = ps[i];
        /* nu = 1: x = cot(pi p) = cos(pi p)/sin(pi p); formula only where sin/cos of
         * pi p are well-conditioned (p not near 1/2 or 1). */
        if (p < 0.4) {
            snprintf(what, sizeof what, "t_%g(1) vs cos(pi p)/sin(pi p)", p);
            CHECK_REL(TQINV(p, 1), cos(PI * p) / sin(PI * p), 1e-12, what);
        }
        /* nu = 2: x = (1 - 2p)/sqrt(2p(1 - p)). */
        if (p < 0.4 || p > 0.6) {
            snprintf(what, sizeof what, "t_%g(2) vs (1-2p)/sqrt(2p(1-p))", p);
            CHECK_REL(TQINV(p, 2), (1 - 2 * p) / sqrt(2 * p * (1 - p)), 1e-12, what);
        }
        if (p == 0.5) {
            CHECK_EQ(TQINV(p, 1), 0, "t_0.5(1) = 0");
            CHECK_EQ(TQINV(p, 2), 0, "t_0.5(2) = 0");
            CHECK_EQ(TQINV_SOLVE(p, 1), 0, "solver t_0.5(1) = 0");
            continue;
        }
        /* The solver inverts the closed-form tails; it must agree with the closed-form
         * quantiles (near p = 1/2 the quantile is near 0 and only absolute accuracy is
         * meaningful, so p within 0.1 of 1/2 is compared absolutely). */
        for (int nu = 1; nu <= 2; nu++) {
            snprintf(what, sizeof what, "t_%g(%d): closed form vs solver", p, nu);
            if (fabs(p - 0.5) > 0.1)
                CHECK_REL(TQINV_SOLVE(p, nu), TQINV(p, nu), 1e-12, what);
            else
                CHECK_ABS(TQINV_SOLVE(p, nu), TQINV(p, nu), 1e-14, what);
        }
        /* F with d1 = 2: closed form in dist_f_qinv vs the solver on GSL's tails. */
        static const double d2s[] = {0.7, 1, 3, 12, 50, 1000};
        for (size_t j = 0; j < sizeof d2s / sizeof d2s[0]; j++) {
            if (p == 1e-300 && d2s[j] <= 1) continue;   /* overflows, tested elsewhere */
            double want = FQINV(p, 2, d2s[j]);
            snprintf(what, sizeof what, "F_%g(2, %g): closed form vs solver", p, d2s[j]);
            CHECK_REL(FQINV_SOLVE(p, 2, d2s[j]), want, 1e-12, what);
            if (p >= 1e-9 && p <= 0.5) {
                snprintf(what, sizeof what, "F_%g(2, %g) vs (d2/2)(p^(-2/d2) - 1)", p, d2s[j]);
                CHECK_REL(want, 0.5 * d2s[j] * (pow(p, -2 / d2s[j]) - 1), 1e-12, what);
            }
        }
    }
}

/* F(1, nu) is the square of t(nu): F_p(1, nu) = t_{p/2}(nu)^2, through two independent
 * code paths (GSL F quantile or solver; t closed form, GSL t quantile or solver).
 * At nu = 1e5 GSL's F tail is only good to about 6e-13 relative, which also bounds the
 * F quantile there (GSL's own F quantile at p = 0.5 is 3.7e-12 off before polishing). */
static void test_identity_f1_t2(void **state)
{
    (void)state;
    static const double nus[] = {1, 2, 3.5, 12, 1000, 1e5};
    static const double ps[] = {0.9, 0.5, 0.1, 0.05, 1e-3, 1e-8, 1e-12};
    char what[128];
    for (size_t i = 0; i < sizeof nus / sizeof nus[0]; i++)
        for (size_t j = 0; j < sizeof ps / sizeof ps[0]; j++) {
            double t = TQINV(ps[j] / 2, nus[i]);
            snprintf(what, sizeof what, "F_%g(1, %g) vs t_%g(%g)^2", ps[j], nus[i],
                     ps[j] / 2, nus[i]);
            CHECK_REL(FQINV(ps[j], 1, nus[i]), t * t, 1e-12, what);
            CHECK_REL(FQINV_SOLVE(ps[j], 1, nus[i]), t * t, 1e-12, what);
        }
}

/* Over a grid of df (integer, non-integer, d1 < 1 where GSL refuses, up to 1000) and p
 * on both sides of 1/2, the quantile x must be a root of the computed tail to relative
 * 1e-13: the tail at x (1 - 1e-13) and at x (1 + 1e-13) lies on opposite sides of the
 * target (the upper tail for p <= 1/2, the lower tail against 1 - p above). Also
 * |tail(x)/target - 1| < 1e-10, the acceptance rule. (Denominator df near 1e5 are left
 * out: GSL's F tail there is not smooth at the 1e-13 level.) */
static void test_quantile_roundtrip_grid(void **state)
{
    (void)state;
    static const double d1s[] = {0.5, 1, 3, 7.3, 30, 100};
    static const double d2s[] = {0.8, 1, 4, 12, 47.5, 1000};
    static const double ps[] = {1e-30, 1e-12, 1e-6, 0.01, 0.05, 0.3, 0.5, 0.8, 0.99,
                                1 - 1e-9};
    const double d = 1e-13;
    char what[160];
    for (size_t a = 0; a < sizeof d1s / sizeof d1s[0]; a++)
        for (size_t b = 0; b < sizeof d2s / sizeof d2s[0]; b++)
            for (size_t k = 0; k < sizeof ps / sizeof ps[0]; k++) {
                double d1 = d1s[a], d2 = d2s[b], p = ps[k];
                double x = FQINV(p, d1, d2);
                double below, above, at, target;
                if (p <= 0.5) {
                    target = p;
                    at = dist_f_q(x, d1, d2);
                    below = dist_f_q(x * (1 - d), d1, d2);
                    above = dist_f_q(x * (1 + d), d1, d2);
                } else {
                    target = 1 - p;
                    at = dist_f_p(x, d1, d2);
                    below = dist_f_p(x * (1 + d), d1, d2);
                    above = dist_f_p(x * (1 - d), d1, d2);
                }
                snprintf(what, sizeof what, "F_%g(%g, %g) = %.17g brackets the target",
                         p, d1, d2, x);
                if (!(below > target && above < target)) {
                    print_error("%s: tails %.17g, %.17g around %.17g\n", what, below,
                                above, target);
                    fail();
                }
                snprintf(what, sizeof what, "tail at F_%g(%g, %g)", p, d1, d2);
                CHECK_REL(at, target, 1e-10, what);
            }
    static const double nus[] = {0.3, 1, 1.5, 2, 4, 7.93, 30, 1e4};
    for (size_t a = 0; a < sizeof nus / sizeof nus[0]; a++)
        for (size_t k = 0; k < sizeof ps / sizeof ps[0]; k++) {
            double nu = nus[a], p = ps[k];
            if (p == 0.5) continue;
            double x = TQINV(p, nu);
            double q = p < 0.5 ? p : 1 - p, ax = fabs(x);
            double below = dist_t_q(ax * (1 - d), nu), above = dist_t_q(ax * (1 + d), nu);
            snprintf(what, sizeof what, "t_%g(%g) = %.17g brackets the target", p, nu, x);
            if (!(below > q && above < q && (x > 0) == (p < 0.5))) {
                print_error("%s: tails %.17g, %.17g around %.17g\n", what, below, above, q);
                fail();
            }
            snprintf(what, sizeof what, "tail at t_%g(%g)", p, nu);
            CHECK_REL(dist_t_q(ax, nu), q, 1e-10, what);
        }
}

/* Symmetry of the t quantile, exact where 1 - p is exact and p = 1 - (1 - p). */
static void test_t_symmetry(void **state)
{
    (void)state;
    static const double ps[] = {0.25, 0.125, 0.0009765625, 0x1p-40};
    static const double nus[] = {1, 2, 3, 7.93, 100};
    char what[96];
    for (size_t i = 0; i < sizeof ps / sizeof ps[0]; i++)
        for (size_t j = 0; j < sizeof nus / sizeof nus[0]; j++) {
            snprintf(what, sizeof what, "t_%g(%g) = -t_%g(%g)", 1 - ps[i], nus[j], ps[i], nus[j]);
            CHECK_EQ(TQINV(1 - ps[i], nus[j]), -TQINV(ps[i], nus[j]), what);
            CHECK_EQ(TQINV_SOLVE(1 - ps[i], nus[j]), -TQINV_SOLVE(ps[i], nus[j]), what);
        }
    CHECK_EQ(TQINV(0.5, 9), 0, "t_0.5(9) = 0");
    CHECK_EQ(TQINV_SOLVE(0.5, 9), 0, "solver t_0.5(9) = 0");
}

/* Invalid arguments: NaN from the tails, AVOW_EDOM (output untouched) from quantiles. */
static void test_invalid_arguments(void **state)
{
    (void)state;
    assert_true(isnan(dist_f_q(NAN, 1, 2)));
    assert_true(isnan(dist_f_q(1, 0, 2)));
    assert_true(isnan(dist_f_q(1, 1, -2)));
    assert_true(isnan(dist_f_q(1, INFINITY, 2)));
    assert_true(isnan(dist_f_q(1, 1, NAN)));
    assert_true(isnan(dist_f_p(1, NAN, 2)));
    assert_true(isnan(dist_f_p(NAN, 1, 2)));
    assert_true(isnan(dist_t_q(NAN, 3)));
    assert_true(isnan(dist_t_q(1, 0)));
    assert_true(isnan(dist_t_q(1, INFINITY)));
    assert_true(isnan(dist_t_p2(NAN, 3)));
    assert_true(isnan(dist_t_p2(1, -1)));

    static const double bad_p[] = {0, 1, -0.1, 1.5, NAN, INFINITY, -INFINITY};
    char what[96];
    for (size_t i = 0; i < sizeof bad_p / sizeof bad_p[0]; i++) {
        double x = 42;
        snprintf(what, sizeof what, "p = %g", bad_p[i]);
        CHECK_STATUS(dist_f_qinv(bad_p[i], 3, 4, &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_f_qinv(bad_p[i], 2, 4, &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_f_qinv_solve(bad_p[i], 3, 4, &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_t_qinv(bad_p[i], 3, &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_t_qinv(bad_p[i], 1, &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_t_qinv_solve(bad_p[i], 3, &x), AVOW_EDOM, what);
        CHECK_EQ(x, 42, "output untouched on AVOW_EDOM");
    }
    static const double bad_df[] = {0, -1, NAN, INFINITY, -INFINITY};
    for (size_t i = 0; i < sizeof bad_df / sizeof bad_df[0]; i++) {
        double x = 42;
        snprintf(what, sizeof what, "df = %g", bad_df[i]);
        CHECK_STATUS(dist_f_qinv(0.05, bad_df[i], 4, &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_f_qinv(0.05, 3, bad_df[i], &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_f_qinv(0.05, 2, bad_df[i], &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_f_qinv_solve(0.05, 3, bad_df[i], &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_t_qinv(0.05, bad_df[i], &x), AVOW_EDOM, what);
        CHECK_STATUS(dist_t_qinv_solve(0.05, bad_df[i], &x), AVOW_EDOM, what);
        CHECK_EQ(x, 42, "output untouched on AVOW_EDOM");
    }
    CHECK_STATUS(dist_f_qinv(0.05, 3, 4, NULL), AVOW_EDOM, "NULL output");
    CHECK_STATUS(dist_t_qinv(0.05, 3, NULL), AVOW_EDOM, "NULL output");
    CHECK_STATUS(dist_f_qinv_solve(0.05, 3, 4, NULL), AVOW_EDOM, "NULL output");
    CHECK_STATUS(dist_t_qinv_solve(0.05, 3, NULL), AVOW_EDOM, "NULL output");
}

/* Quantiles beyond the range of doubles, and df where GSL's quantile refuses or fails
 * (GSL's default handler would abort the test program here). */
static void test_extremes(void **state)
{
    (void)state;
    double x = 0;
    /* Q_F(x; 1, 0.01) decays like x^(-0.005): the 1e-300 point is near 10^60000. */
    CHECK_STATUS(dist_f_qinv(1e-300, 1, 0.01, &x), AVOW_EOVERFLOW, "F_1e-300(1, 0.01)");
    assert_true(isinf(x) && x > 0);
    x = 0;
    CHECK_STATUS(dist_f_qinv(1e-300, 2, 0.01, &x), AVOW_EOVERFLOW, "F_1e-300(2, 0.01)");
    assert_true(isinf(x) && x > 0);
    /* Cauchy: cot(pi 1e-320) is about 1e319, beyond DBL_MAX. */
    x = 0;
    CHECK_STATUS(dist_t_qinv(1e-320, 1, &x), AVOW_EOVERFLOW, "t_1e-320(1)");
    assert_true(isinf(x) && x > 0);
    x = 0;
    CHECK_STATUS(dist_t_qinv_solve(1e-300, 0.5, &x), AVOW_EOVERFLOW, "t_1e-300(0.5)");
    assert_true(isinf(x) && x > 0);
    x = 0;
    CHECK_STATUS(dist_t_qinv(1 - 0x1p-53, 0.02, &x), AVOW_EOVERFLOW, "t_(1-2^-53)(0.02)");
    assert_true(isinf(x) && x < 0);
    /* P_F(x; 0.01, 1) grows like x^0.005 (P_F(1e-300) is still 0.03): the quantile for
     * 1 - p = 2^-53 is near 1e-3200, below every double, and is returned as 0. */
    x = 1;
    CHECK_STATUS(dist_f_qinv(1 - 0x1p-53, 0.01, 1, &x), AVOW_OK, "F_(1-2^-53)(0.01, 1)");
    CHECK_EQ(x, 0, "F quantile below every double");
    /* d1 < 1: GSL's quantile reports an error ("nu1 < 1"); the solver answers. */
    x = FQINV(0.3, 0.01, 0.01);
    CHECK_REL(dist_f_q(x, 0.01, 0.01), 0.3, 1e-12, "Q_F at F_0.3(0.01, 0.01)");
    /* Tiny tails through the solver with a t df near 1, where GSL's t quantile is
     * inaccurate: the answer must reproduce the tail. */
    x = TQINV(1e-12, 1.0000001);
    CHECK_REL(dist_t_q(x, 1.0000001), 1e-12, 1e-12, "Q_t at t_1e-12(1.0000001)");
    /* The far-tail closed forms stay exact where GSL would lose digits. */
    CHECK_REL(TQINV(1e-200, 2), 1 / sqrt(2e-200), 1e-14, "t_1e-200(2) = 1/sqrt(2p)");
}

/* Far t tails above 30 df, where GSL's t tail uses a Cornish-Fisher approximation:
 * reference values from mpmath 1.2.1 at 40 digits, (1/2) betainc(nu/2, 1/2, 0,
 * nu/(nu + t^2), regularized). */
static void test_t_far_tail_large_df(void **state)
{
    (void)state;
    CHECK_REL(dist_t_q(17.1, 31), 1.2222245769629046369e-17, 1e-12, "Q_t(17.1; 31), mpmath 1.2.1");
    CHECK_REL(dist_t_q(12, 50), 1.2311903126662723162e-16, 1e-12, "Q_t(12; 50), mpmath 1.2.1");
    CHECK_REL(dist_t_q(8, 31), 2.470131850951689779e-9, 1e-12, "Q_t(8; 31), mpmath 1.2.1");
    CHECK_REL(dist_t_q(-8, 31), 1 - 2.470131850951689779e-9, 1e-15, "P_t(8; 31) by symmetry, mpmath 1.2.1");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_table_values),
        cmocka_unit_test(test_f_quantiles),
        cmocka_unit_test(test_f_solver),
        cmocka_unit_test(test_t_quantiles),
        cmocka_unit_test(test_t_solver),
        cmocka_unit_test(test_tails),
        cmocka_unit_test(test_t_far_tail),
        cmocka_unit_test(test_t_closed_form_tails),
        cmocka_unit_test(test_closed_form_quantiles),
        cmocka_unit_test(test_identity_f1_t2),
        cmocka_unit_test(test_quantile_roundtrip_grid),
        cmocka_unit_test(test_t_symmetry),
        cmocka_unit_test(test_invalid_arguments),
        cmocka_unit_test(test_extremes),
        cmocka_unit_test(test_t_far_tail_large_df),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
