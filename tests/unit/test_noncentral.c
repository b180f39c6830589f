/* test_noncentral.c: noncentral F and t tails, inversion in lambda, power and sample size
 * (src/noncentral.c).
 *
 * Reference values and their sources, named beside each check:
 *   NC-xx, ES-nist = the project's methods note (shared/reference/methods.md, sections 4
 *     and 8) and check-values.json beside it (NC-07 is only in the JSON file), with the
 *     tolerances stated there (relative, as the JSON gives them). Their sources, as
 *     stated: MP = mpmath 1.2.1 at 40 digits (Poisson-mixture series for the
 *     noncentral F, integral over chi for the noncentral t), SP = SciPy 1.10.1
 *     stats.ncf / stats.nct, EX = exact rational arithmetic.
 *   mp-ref = mpmath 1.2.1 at 40 digits with the reference code of
 *     tests/ref/noncentral.py (mp_ncf: the Poisson mixture with each incomplete beta
 *     from a 40-digit Lentz continued fraction; mp_nct: the integral over S = sqrt(V/nu)
 *     in log S by mp.quad at 30 digits), computed while this module was written. These
 *     cover the regions the table does not: tails near 1e-200, the start-index search,
 *     the quadrature for opposite signs of t and delta, small and non-integer df.
 *     Tolerance 1e-12 relative (the largest error measured on them is 1.2e-13).
 * Checks without an outside value test identities, monotonicity and the handling of
 * arguments. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include "numcheck.h"

#include <float.h>
#include <math.h>
#include <stdio.h>

#include "avow/dist.h"
#include "avow/noncentral.h"
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

static void nan_at(double got, const char *what, const char *file, int line)
{
    if (!isnan(got)) {
        print_error("%s: got %.17g, want NaN\n", what, got);
        _fail(file, line);
    }
}
#define CHECK_NAN(got, what) nan_at((got), (what), __FILE__, __LINE__)

static void status_at(int got, int want, const char *what, const char *file, int line)
{
    if (got != want) {
        print_error("%s: status %d, want %d\n", what, got, want);
        _fail(file, line);
    }
}
#define CHECK_STATUS(got, want, what) status_at((got), (want), (what), __FILE__, __LINE__)

/* Fail unless cond, printing a formatted message. */
static void true_at(int cond, const char *file, int line, const char *fmt, ...)
{
    if (!cond) {
        char buf[512];
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(buf, sizeof buf, fmt, ap);
        va_end(ap);
        print_error("%s\n", buf);
        _fail(file, line);
    }
}
#define CHECK_TRUE(cond, ...) true_at((cond), __FILE__, __LINE__, __VA_ARGS__)

/* ncdist_f_lambda that must succeed. */
static double lambda_at(double x, double d1, double d2, double p, const char *file, int line)
{
    double l = NAN;
    int st = ncdist_f_lambda(x, d1, d2, p, &l);
    if (st != AVOW_OK) {
        print_error("ncdist_f_lambda(x=%.17g, d1=%.17g, d2=%.17g, p=%.17g): status %d\n",
                    x, d1, d2, p, st);
        _fail(file, line);
    }
    return l;
}
#define LAMBDA(x, d1, d2, p) lambda_at((x), (d1), (d2), (p), __FILE__, __LINE__)

/* ---- the methods note, section 4 ---- */

static void test_methods_values(void **state)
{
    (void)state;
    /* NC-01: MP and SP 1.10.1; power of the one-way F test, k = 4, n = 10, f = 0.25
     * (lambda = N f^2 = 2.5), df (3, 36), alpha = 0.05. */
    CHECK_REL(ncdist_f_power(0.05, 3, 36, 2.5), 0.21223996641222842, 1e-10,
              "NC-01 F power k=4 n=10 f=0.25");
    /* NC-02 .. NC-05: MP and SP 1.10.1. */
    CHECK_REL(ncdist_f_p(2, 4, 20, 5), 0.47719327895790375, 1e-12, "NC-02 ncF P(2;4,20,5)");
    CHECK_REL(ncdist_f_q(50, 3, 20, 10), 5.219834012342127e-06, 1e-11,
              "NC-03 ncF Q(50;3,20,10)");
    CHECK_REL(ncdist_f_p(1.5, 2, 12, 100), 2.1233874548857655e-15, 1e-10,
              "NC-04 ncF P(1.5;2,12,100)");
    CHECK_REL(ncdist_f_p(30, 5, 50, 200), 0.09262149692200564, 1e-11,
              "NC-05 ncF P(30;5,50,200)");
    /* NC-06 .. NC-09: MP (integral over chi) and SP 1.10.1; NC-07 (check-values.json
     * only) is a negative t, the reflected tail. */
    CHECK_REL(ncdist_t_p(2, 10, 1), 0.8076115625303752, 1e-12, "NC-06 nct P(2;10,1)");
    CHECK_REL(ncdist_t_p(-1, 5, 0.5), 0.08244409105672346, 1e-12, "NC-07 nct P(-1;5,0.5)");
    CHECK_REL(ncdist_t_p(25, 20, 30), 0.09809224901430214, 1e-11, "NC-08 nct P(25;20,30)");
    CHECK_REL(ncdist_t_p(0.5, 30, 5), 3.4823931514651703e-06, 1e-11,
              "NC-09 nct P(0.5;30,5)");
    /* NC-10: MP and SP 1.10.1; two-sample t test, n = 64 per group, d = 0.5: nu = 126,
     * delta = d sqrt(n/2) = sqrt(8), two-sided alpha = 0.05 (Cohen's table: 0.80, from
     * memory, not used). */
    CHECK_REL(ncdist_t_power(0.05, 126, sqrt(8.0), 2), 0.8014595579222541, 1e-10,
              "NC-10 two-sample t power n=64 d=0.5");
}

/* NC-11 / NC-12: smallest n per group with power >= 0.80, f = 0.25, alpha = 0.05. */
static void test_sample_size(void **state)
{
    (void)state;
    long n = 0;
    /* NC-11: SP 1.10.1 ncf, exact 45 (Cohen 1988 Table 8.4.4 gives 45, from memory). */
    CHECK_STATUS(ncdist_f_oneway_n(4, 0.25, 0.05, 0.80, &n), AVOW_OK, "NC-11 status");
    CHECK_EQ((double)n, 45, "NC-11 smallest n, k = 4, f = 0.25");
    /* NC-12: SP 1.10.1 ncf, exact 64 (the classic d = 0.5 two-group result). */
    CHECK_STATUS(ncdist_f_oneway_n(2, 0.25, 0.05, 0.80, &n), AVOW_OK, "NC-12 status");
    CHECK_EQ((double)n, 64, "NC-12 smallest n, k = 2, f = 0.25");
    /* The powers on either side, as printed in the NC-11 / NC-12 sources (SP 1.10.1
     * ncf: n = 44: 0.7939, n = 45: 0.8040; n = 64 (k = 2): 0.80146), to half a unit in
     * the last printed digit. */
    CHECK_ABS(ncdist_f_power(0.05, 3, 4 * 43, 4 * 44 * 0.0625), 0.7939, 5e-5,
              "NC-11 source: power at n = 44");
    CHECK_ABS(ncdist_f_power(0.05, 3, 4 * 44, 4 * 45 * 0.0625), 0.8040, 5e-5,
              "NC-11 source: power at n = 45");
    CHECK_ABS(ncdist_f_power(0.05, 1, 2 * 63, 2 * 64 * 0.0625), 0.80146, 5e-6,
              "NC-12 source: power at n = 64");
    /* The F test with two groups is the two-sided t test: same power as NC-10 (MP). */
    CHECK_REL(ncdist_f_power(0.05, 1, 126, 8), 0.8014595579222541, 1e-10,
              "NC-10 as an F test, lambda = delta^2 = 8");
    /* A target the smallest design already reaches, and a huge f. */
    CHECK_STATUS(ncdist_f_oneway_n(3, 5, 0.05, 0.5, &n), AVOW_OK, "n = 2 suffices: status");
    CHECK_EQ((double)n, 2, "n = 2 suffices");
    /* An effect too small for any n within the lambda limit. */
    n = -7;
    CHECK_STATUS(ncdist_f_oneway_n(2, 1e-6, 0.05, 0.99, &n), AVOW_EOVERFLOW,
                 "unreachable target");
    CHECK_EQ((double)n, -7, "n unchanged on overflow");
    CHECK_STATUS(ncdist_f_oneway_n(2.5, 0.25, 0.05, 0.8, &n), AVOW_EDOM, "k not integer");
    CHECK_STATUS(ncdist_f_oneway_n(1, 0.25, 0.05, 0.8, &n), AVOW_EDOM, "k = 1");
    CHECK_STATUS(ncdist_f_oneway_n(4, 0, 0.05, 0.8, &n), AVOW_EDOM, "f = 0");
    CHECK_STATUS(ncdist_f_oneway_n(4, NAN, 0.05, 0.8, &n), AVOW_EDOM, "f NaN");
    CHECK_STATUS(ncdist_f_oneway_n(4, 0.25, 0, 0.8, &n), AVOW_EDOM, "alpha = 0");
    CHECK_STATUS(ncdist_f_oneway_n(4, 0.25, 0.05, 1, &n), AVOW_EDOM, "target = 1");
    CHECK_STATUS(ncdist_f_oneway_n(4, 0.25, 0.05, 0.8, NULL), AVOW_EDOM, "n NULL");
}

/* ---- the methods note, section 8: Steiger's interval ---- */

static void test_steiger_interval(void **state)
{
    (void)state;
    /* ES-nist: k = 3 groups of 5 (N = 15); eta^2 = 20923/34012 (EX), so
     * F = (eta^2/(1 - eta^2)) (12/2) = 125538/13089. Interval ends: inversion of SP
     * 1.10.1 ncf.cdf in lambda with brentq, verified against MP to 1e-10; tolerance
     * lambda_rel 1e-8 as stated. */
    const double F = 125538.0 / 13089.0, N = 15;
    double lo = NAN, hi = NAN;
    CHECK_STATUS(ncdist_f_lambda_ci(F, 2, 12, 0.95, &lo, &hi), AVOW_OK, "ES-nist 95% status");
    CHECK_REL(lo, 2.1838881268669623, 1e-8, "ES-nist lambda 95% lower");
    CHECK_REL(hi, 47.10086837060038, 1e-8, "ES-nist lambda 95% upper");
    CHECK_REL(sqrt(lo / N), 0.38156590753253994, 1e-8, "ES-nist f 95% lower");
    CHECK_REL(sqrt(hi / N), 1.7720208495876562, 1e-8, "ES-nist f 95% upper");
    CHECK_STATUS(ncdist_f_lambda_ci(F, 2, 12, 0.90, &lo, &hi), AVOW_OK, "ES-nist 90% status");
    CHECK_REL(lo, 3.669486142839532, 1e-8, "ES-nist lambda 90% lower");
    CHECK_REL(hi, 41.24924901735328, 1e-8, "ES-nist lambda 90% upper");
    /* The same ends through ncdist_f_lambda directly. */
    CHECK_REL(LAMBDA(F, 2, 12, 0.975), 2.1838881268669623, 1e-8, "ES-nist via lambda");
    /* A small F: P at lambda = 0 is already below 0.975, so the lower end is 0. */
    CHECK_STATUS(ncdist_f_lambda_ci(0.5, 2, 12, 0.95, &lo, &hi), AVOW_OK, "small F status");
    CHECK_EQ(lo, 0, "small F: lower end 0");
    CHECK_TRUE(hi > 0, "small F: upper end %.17g > 0", hi);
    lo = hi = -1;
    CHECK_STATUS(ncdist_f_lambda_ci(F, 2, 12, 1, &lo, &hi), AVOW_EDOM, "level 1");
    CHECK_STATUS(ncdist_f_lambda_ci(F, 2, 12, 0.95, NULL, &hi), AVOW_EDOM, "lo NULL");
    CHECK_EQ(lo, -1, "lo unchanged on EDOM");
}

/* ---- values where the table is silent (mp-ref, see the top of the file) ---- */

static void test_hard_points(void **state)
{
    (void)state;
    /* Noncentral F. */
    CHECK_REL(ncdist_f_p(6, 2, 12, 2100), 5.4893082181616217683e-219, 1e-12,
              "mp-ref P(6;2,12,2100): beta at the Poisson mode below 1e-290");
    CHECK_REL(ncdist_f_q(2142.857142857143, 2, 1e4, 1000), 2.2119299772761668677e-208, 1e-12,
              "mp-ref Q(2142.857;2,1e4,1000): upper beta at the mode below 1e-290");
    CHECK_REL(ncdist_f_q(1666.6666666666667, 2, 1e4, 400), 1.1664352551757967177e-268, 1e-12,
              "mp-ref Q(1666.67;2,1e4,400)");
    CHECK_REL(ncdist_f_q(200, 5, 1e4, 10), 3.1430026333999811661e-168, 1e-12,
              "mp-ref Q(200;5,1e4,10)");
    CHECK_REL(ncdist_f_p(20, 2, 12, 2000), 7.2022914339453415809e-92, 1e-12,
              "mp-ref P(20;2,12,2000)");
    CHECK_REL(ncdist_f_p(5, 2, 12, 1000), 4.6226013207679612941e-111, 1e-12,
              "mp-ref P(5;2,12,1000)");
    CHECK_REL(ncdist_f_p(1, 1, 1, 10), 0.025026075395399698181, 1e-12, "mp-ref P(1;1,1,10)");
    CHECK_REL(ncdist_f_q(1, 1, 1, 10), 0.97497392460460030182, 1e-12, "mp-ref Q(1;1,1,10)");
    CHECK_REL(ncdist_f_q(2.5, 3.7, 11.3, 7.9), 0.60567234823899552735, 1e-12,
              "mp-ref Q(2.5;3.7,11.3,7.9) non-integer df");
    CHECK_REL(ncdist_f_p(2000, 5, 100, 1e4), 0.48035243291854263645, 1e-12,
              "mp-ref P(2000;5,100,1e4)");
    CHECK_REL(ncdist_f_q(2600, 5, 100, 1e4), 0.043388177025783079488, 1e-12,
              "mp-ref Q(2600;5,100,1e4)");
    CHECK_REL(ncdist_f_p(1e-10, 1, 1, 1), 3.861294105202156372e-6, 1e-12,
              "mp-ref P(1e-10;1,1,1)");
    CHECK_REL(ncdist_f_q(1e10, 2, 3, 100), 5.1064468291189712801e-13, 1e-12,
              "mp-ref Q(1e10;2,3,100)");
    /* Tiny df: the recurrence term at the Poisson mode is subnormal here and grows by
     * 1/y = 1e158 per step down (an earlier version was off by 1.5e-5 in Q). */
    CHECK_REL(ncdist_f_q(1e-158, 0.01, 0.2, 5), 0.98750024680867116594, 1e-12,
              "mp-ref Q(1e-158;0.01,0.2,5) tiny df");
    CHECK_REL(ncdist_f_p(1e-158, 0.01, 0.2, 5), 0.012499753191328834058, 1e-12,
              "mp-ref P(1e-158;0.01,0.2,5) tiny df");
    /* A subnormal beta argument (y = 1e-310): the deviance term must not overflow in
     * log(x/m) (an earlier version lost the recurrence term there and returned
     * 6.4e-156 for both of these). */
    CHECK_REL(ncdist_f_p(1e-310, 1, 1, 5), 5.2256933138739598948e-157, 1e-12,
              "mp-ref P(1e-310;1,1,5) subnormal argument");
    CHECK_EQ(ncdist_f_p(1e-310, 1, 1, 5000), 0,
             "P(1e-310;1,1,5000) = 1.17e-1241 (mp-ref) underflows");
    CHECK_REL(ncdist_f_q(1e308, 1, 1, 5), 1.7911582867592300898e-154, 1e-12,
              "mp-ref Q(1e308;1,1,5)");
    /* Noncentral t, same signs of t and delta (positive series). */
    CHECK_REL(ncdist_t_p(0.5, 2, 30), 6.3838986557133523167e-175, 1e-12,
              "mp-ref P(0.5;2,30)");
    CHECK_REL(ncdist_t_p(90, 50, 100), 0.12492966879479200094, 1e-12, "mp-ref P(90;50,100)");
    CHECK_REL(ncdist_t_q(120, 50, 100), 0.050095761769276457431, 1e-12,
              "mp-ref Q(120;50,100)");
    CHECK_REL(ncdist_t_p(3, 1, 5), 0.11384628383771249348, 1e-12, "mp-ref P(3;1,5) nu = 1");
    CHECK_REL(ncdist_t_q(1.2, 4.5, 0.8), 0.37818112600355891492, 1e-12,
              "mp-ref Q(1.2;4.5,0.8) non-integer nu");
    /* t^2/(t^2 + nu) subnormal: P(T <= 1e-155) is P(T <= 0) = Phi(-delta) to within
     * 1e-150 (mpmath 1.2.1 ncdf: Phi(-2) = 0.0227501319481792072; Phi(-256) < 1e-14000).
     * An earlier version returned 3.4e-156 for delta = 256. */
    CHECK_REL(ncdist_t_p(1e-155, 12, 2), 0.0227501319481792072, 1e-14, "P(1e-155;12,2)");
    CHECK_EQ(ncdist_t_p(1e-155, 12, 256), 0, "P(1e-155;12,256) underflows");
    /* Opposite signs, small tail from the alternating series (cancellation below 100). */
    CHECK_REL(ncdist_t_q(2, 7.5, -1), 0.0041078709718669618096, 1e-12, "mp-ref Q(2;7.5,-1)");
    CHECK_REL(ncdist_t_p(-0.2, 2, 2), 0.015069326770036853852, 1e-12, "mp-ref P(-0.2;2,2)");
    /* Opposite signs, small tail from the quadrature. */
    CHECK_REL(ncdist_t_p(-2, 10, 3), 2.3181592899834628618e-6, 1e-12, "mp-ref P(-2;10,3)");
    CHECK_REL(ncdist_t_q(5, 5, -3), 1.4200930747361474929e-7, 1e-12, "mp-ref Q(5;5,-3)");
    CHECK_REL(ncdist_t_p(-5, 5, 3), 1.4200930747361474929e-7, 1e-12, "mp-ref P(-5;5,3)");
    CHECK_REL(ncdist_t_q(3, 1e4, -5), 6.3163339702031353071e-16, 1e-12, "mp-ref Q(3;1e4,-5)");
    CHECK_REL(ncdist_t_q(1e10, 3, -30), 1.4919827625707343995e-231, 1e-12,
              "mp-ref Q(1e10;3,-30)");
    CHECK_REL(ncdist_t_q(1e10, 30, -1), 3.1929259080181409e-282, 1e-12,
              "mp-ref Q(1e10;30,-1)");
    /* One-sided t power, critical value and tail at 40 digits (mp-ref; the critical value
     * by mp.findroot on mpmath's regularized incomplete beta). SciPy 1.10.1's own
     * t.isf(0.01, 9.5) is off by 1e-9 here, so its power differs by 3.4e-10. */
    CHECK_REL(ncdist_t_power(0.05, 20, 2.5, 1), 0.77910360509290550038, 1e-12,
              "mp-ref one-sided t power alpha=0.05 nu=20 delta=2.5");
    CHECK_REL(ncdist_t_power(0.01, 9.5, 3, 1), 0.59634227751593077041, 1e-12,
              "mp-ref one-sided t power alpha=0.01 nu=9.5 delta=3");
}

/* ---- zero noncentrality is the central distribution ---- */

static void test_zero_noncentrality(void **state)
{
    (void)state;
    const double xs[] = {1e-300, 1e-8, 0.3, 1, 2.5, 40, 1e8};
    const double dfs[] = {1, 2.5, 7, 30, 1e4};
    char what[160];
    for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++)
        for (size_t a = 0; a < sizeof dfs / sizeof dfs[0]; a++)
            for (size_t b = 0; b < sizeof dfs / sizeof dfs[0]; b++) {
                double x = xs[i], d1 = dfs[a], d2 = dfs[b];
                snprintf(what, sizeof what, "lambda = 0: x=%g d1=%g d2=%g", x, d1, d2);
                CHECK_EQ(ncdist_f_p(x, d1, d2, 0), dist_f_p(x, d1, d2), what);
                CHECK_EQ(ncdist_f_q(x, d1, d2, 0), dist_f_q(x, d1, d2), what);
                /* lambda = 1e-300 goes through the series, whose only term is then
                 * GSL's incomplete beta at j = 0: it must meet the central tails
                 * (computed by GSL's cdf routines, another path). Both paths carry GSL's
                 * own error, which grows with the df: at d1 = d2 = 1e4 and x = 1, where
                 * the exact value is 1/2 by symmetry, gsl_cdf_fdist_P gives 1/2 + 4.2e-12
                 * and gsl_sf_beta_inc 1/2 - 4.2e-12 (measured). So 1e-12 up to df 30 and
                 * the target 1e-10 when a df is 1e4. */
                snprintf(what, sizeof what, "lambda = 1e-300: x=%g d1=%g d2=%g", x, d1, d2);
                double p = dist_f_p(x, d1, d2), q = dist_f_q(x, d1, d2);
                double tol = d1 > 30 || d2 > 30 ? 1e-10 : 1e-12;
                if (p > 1e-280) CHECK_REL(ncdist_f_p(x, d1, d2, 1e-300), p, tol, what);
                if (q > 1e-280) CHECK_REL(ncdist_f_q(x, d1, d2, 1e-300), q, tol, what);
            }
    const double ts[] = {-1e6, -3, -0.5, 0, 0.5, 3, 1e6};
    const double nus[] = {1, 2, 3.5, 30, 1e4};
    for (size_t i = 0; i < sizeof ts / sizeof ts[0]; i++)
        for (size_t a = 0; a < sizeof nus / sizeof nus[0]; a++) {
            double t = ts[i], nu = nus[a];
            snprintf(what, sizeof what, "delta = 0: t=%g nu=%g", t, nu);
            CHECK_EQ(ncdist_t_q(t, nu, 0), dist_t_q(t, nu), what);
            CHECK_EQ(ncdist_t_p(t, nu, 0), dist_t_q(-t, nu), what);
            snprintf(what, sizeof what, "delta = 1e-300: t=%g nu=%g", t, nu);
            double q = dist_t_q(t, nu), p = dist_t_q(-t, nu);
            if (q == 0) CHECK_EQ(ncdist_t_q(t, nu, 1e-300), 0, what);
            else CHECK_REL(ncdist_t_q(t, nu, 1e-300), q, 1e-12, what);
            if (p == 0) CHECK_EQ(ncdist_t_p(t, nu, 1e-300), 0, what);
            else CHECK_REL(ncdist_t_p(t, nu, 1e-300), p, 1e-12, what);
        }
    /* Power at no effect is the level. */
    CHECK_REL(ncdist_f_power(0.05, 3, 36, 0), 0.05, 1e-12, "F power at lambda = 0");
    CHECK_REL(ncdist_t_power(0.05, 12, 0, 1), 0.05, 1e-12, "one-sided t power at delta = 0");
    CHECK_REL(ncdist_t_power(0.05, 12, 0, 2), 0.05, 1e-12, "two-sided t power at delta = 0");
}

/* ---- identities ---- */

/* P + Q = 1, and the noncentral F(1, nu, delta^2) as the square of the noncentral t:
 * P_F(x) = P_t(sqrt x) - P_t(-sqrt x) and Q_F(x) = Q_t(sqrt x) + P_t(-sqrt x) (two
 * different series: a0 = 1/2 with integer weights for F, two half sums for t). */
static void test_identities(void **state)
{
    (void)state;
    char what[160];
    const double nus[] = {1, 2, 5.5, 30, 1000};
    const double deltas[] = {-40, -6, -1.5, -0.2, 0.2, 1.5, 6, 40};
    const double xs[] = {0.01, 0.5, 2, 10, 100, 2000};
    for (size_t a = 0; a < sizeof nus / sizeof nus[0]; a++)
        for (size_t b = 0; b < sizeof deltas / sizeof deltas[0]; b++)
            for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++) {
                double nu = nus[a], d = deltas[b], x = xs[i], r = sqrt(x);
                double pf = ncdist_f_p(x, 1, nu, d * d), qf = ncdist_f_q(x, 1, nu, d * d);
                double pt = ncdist_t_p(r, nu, d), ptm = ncdist_t_p(-r, nu, d);
                double qt = ncdist_t_q(r, nu, d);
                snprintf(what, sizeof what, "F(1,nu,d^2) = t^2: x=%g nu=%g delta=%g", x, nu, d);
                /* P_F = P_t(r) - P_t(-r) = Q_t(-r) - Q_t(r): the pair of smaller tails is
                 * used, and the tolerance is 1e-12 of the operands (the rounding bound of
                 * a difference), i.e. relative unless the two tails nearly cancel. */
                double a1 = pt, b1 = ptm;
                if (pt > 0.5) { a1 = ncdist_t_q(-r, nu, d); b1 = qt; }
                if (pf > 1e-280) CHECK_ABS(a1 - b1, pf, 1e-12 * (a1 + b1), what);
                if (qf > 1e-280) CHECK_REL(qt + ptm, qf, 1e-12, what);
                snprintf(what, sizeof what, "P + Q = 1: x=%g nu=%g delta=%g", x, nu, d);
                CHECK_ABS(pf + qf, 1, 1e-13, what);
                CHECK_ABS(pt + qt, 1, 1e-13, what);
            }
    /* P + Q = 1 for the noncentral F up to the limit of lambda. */
    const double lams[] = {0.1, 10, 1000, 1e4, 1e5, 1e6};
    for (size_t i = 0; i < sizeof lams / sizeof lams[0]; i++) {
        double l = lams[i];
        double x = (5 + l) / 5;   /* about the mean */
        snprintf(what, sizeof what, "P + Q = 1 at lambda = %g", l);
        CHECK_ABS(ncdist_f_p(x, 5, 40, l) + ncdist_f_q(x, 5, 40, l), 1, 1e-13, what);
    }
    /* The documented reflection for t < 0. */
    CHECK_EQ(ncdist_t_p(-1.3, 7, 2), ncdist_t_q(1.3, 7, -2), "reflection P(-t;d) = Q(t;-d)");
    CHECK_EQ(ncdist_t_q(-1.3, 7, 2), ncdist_t_p(1.3, 7, -2), "reflection Q(-t;d) = P(t;-d)");
}

/* ---- monotonicity ---- */

static void test_monotone(void **state)
{
    (void)state;
    const double lams[] = {0, 0.01, 0.5, 3, 20, 150, 1000, 5000, 10000};
    const double xs[] = {0.2, 1, 3, 30, 300, 3000};
    for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++) {
        double prev_p = 2, prev_q = -1;
        for (size_t k = 0; k < sizeof lams / sizeof lams[0]; k++) {
            double p = ncdist_f_p(xs[i], 4, 25, lams[k]), q = ncdist_f_q(xs[i], 4, 25, lams[k]);
            /* Monotone up to rounding (a tail near 1 is a sum of thousands of weights,
             * good to about 1.5e-15 absolute at lambda = 5000, measured), and strictly
             * so where the tail is below 1/2 and not 0. */
            CHECK_TRUE(p <= prev_p + 1e-14 && (p < prev_p || p == 0 || prev_p >= 0.5),
                       "P(%g;4,25,lambda) not decreasing at lambda=%g: %.17g after %.17g",
                       xs[i], lams[k], p, prev_p);
            CHECK_TRUE(q >= prev_q - 1e-14 && (q > prev_q || q >= 0.5),
                       "Q(%g;4,25,lambda) not increasing at lambda=%g: %.17g after %.17g",
                       xs[i], lams[k], q, prev_q);
            prev_p = p;
            prev_q = q;
        }
    }
    const double deltas[] = {-50, -10, -2, -0.5, 0, 0.5, 2, 10, 50};
    const double ts[] = {-20, -1, 0.3, 2, 9, 60};
    for (size_t i = 0; i < sizeof ts / sizeof ts[0]; i++) {
        double prev = 2;
        for (size_t k = 0; k < sizeof deltas / sizeof deltas[0]; k++) {
            double p = ncdist_t_p(ts[i], 6, deltas[k]);
            CHECK_TRUE(p <= prev + 1e-14 && (p < prev || p == 0 || prev >= 0.5),
                       "P(%g;6,delta) not decreasing at delta=%g: %.17g after %.17g", ts[i],
                       deltas[k], p, prev);
            prev = p;
        }
    }
    /* Power grows with lambda and with n. */
    double prev = 0;
    for (int n = 2; n <= 80; n += 6) {
        double pw = ncdist_f_power(0.05, 2, 3 * (n - 1), 3 * n * 0.0625);
        CHECK_TRUE(pw > prev, "power not increasing at n=%d: %.17g after %.17g", n, pw, prev);
        prev = pw;
    }
}

/* ---- inversion in lambda ---- */

static void test_lambda_inversion(void **state)
{
    (void)state;
    const double ps[] = {1e-10, 0.025, 0.5, 0.975, 1 - 1e-6};
    const struct { double x, d1, d2; } cs[] = {
        {9.5, 2, 12}, {3, 1, 1}, {1.7, 4.5, 30.5}, {25, 10, 1e4}, {2000, 5, 100}};
    char what[160];
    for (size_t c = 0; c < sizeof cs / sizeof cs[0]; c++)
        for (size_t i = 0; i < sizeof ps / sizeof ps[0]; i++) {
            double x = cs[c].x, d1 = cs[c].d1, d2 = cs[c].d2, p = ps[i];
            double l = LAMBDA(x, d1, d2, p);
            snprintf(what, sizeof what, "lambda round trip x=%g d1=%g d2=%g p=%g: lambda=%.17g",
                     x, d1, d2, p, l);
            if (l == 0) {
                CHECK_TRUE(dist_f_p(x, d1, d2) <= p, "%s: lambda 0 but P(x;0) = %.17g > p",
                           what, dist_f_p(x, d1, d2));
                continue;
            }
            /* The tail matched is P for p <= 1/2, Q = 1 - p (exact) above. */
            if (p <= 0.5) CHECK_REL(ncdist_f_p(x, d1, d2, l), p, 1e-11, what);
            else CHECK_REL(ncdist_f_q(x, d1, d2, l), 1 - p, 1e-11, what);
        }
    /* No lambda >= 0 reaches p: 0. */
    CHECK_EQ(LAMBDA(0.5, 2, 12, 0.5), 0, "P(0.5;2,12,0) < 0.5: lambda 0");
    CHECK_EQ(LAMBDA(0, 2, 12, 0.5), 0, "x = 0: lambda 0");
    /* Beyond the supported range. */
    double l = -1;
    CHECK_STATUS(ncdist_f_lambda(1e6, 2, 12, 1e-9, &l), AVOW_EOVERFLOW, "lambda beyond max");
    CHECK_TRUE(isinf(l) && l > 0, "lambda beyond max: %.17g, want +inf", l);
    /* Invalid arguments leave *lambda unchanged. */
    l = -1;
    CHECK_STATUS(ncdist_f_lambda(2, 2, 12, 0, &l), AVOW_EDOM, "p = 0");
    CHECK_STATUS(ncdist_f_lambda(2, 2, 12, 1, &l), AVOW_EDOM, "p = 1");
    CHECK_STATUS(ncdist_f_lambda(2, 2, 12, NAN, &l), AVOW_EDOM, "p NaN");
    CHECK_STATUS(ncdist_f_lambda(-1, 2, 12, 0.5, &l), AVOW_EDOM, "x < 0");
    CHECK_STATUS(ncdist_f_lambda(INFINITY, 2, 12, 0.5, &l), AVOW_EDOM, "x inf");
    CHECK_STATUS(ncdist_f_lambda(NAN, 2, 12, 0.5, &l), AVOW_EDOM, "x NaN");
    CHECK_STATUS(ncdist_f_lambda(2, 0, 12, 0.5, &l), AVOW_EDOM, "d1 = 0");
    CHECK_STATUS(ncdist_f_lambda(2, 2, INFINITY, 0.5, &l), AVOW_EDOM, "d2 inf");
    CHECK_STATUS(ncdist_f_lambda(2, 2, 12, 0.5, NULL), AVOW_EDOM, "NULL");
    CHECK_EQ(l, -1, "lambda unchanged on EDOM");
}

/* ---- arguments ---- */

static void test_invalid_arguments(void **state)
{
    (void)state;
    CHECK_NAN(ncdist_f_p(NAN, 2, 3, 1), "F P x NaN");
    CHECK_NAN(ncdist_f_q(1, NAN, 3, 1), "F Q d1 NaN");
    CHECK_NAN(ncdist_f_p(1, 0, 3, 1), "F P d1 = 0");
    CHECK_NAN(ncdist_f_p(1, 2, -3, 1), "F P d2 < 0");
    CHECK_NAN(ncdist_f_q(1, INFINITY, 3, 1), "F Q d1 inf");
    CHECK_NAN(ncdist_f_p(1, 2, 3, -1), "F P lambda < 0");
    CHECK_NAN(ncdist_f_q(1, 2, 3, NAN), "F Q lambda NaN");
    CHECK_NAN(ncdist_f_q(1, 2, 3, INFINITY), "F Q lambda inf");
    CHECK_NAN(ncdist_f_p(1, 2, 3, 2 * NCDIST_LAMBDA_MAX), "F P lambda beyond max");
    CHECK_NAN(ncdist_t_p(NAN, 3, 1), "t P t NaN");
    CHECK_NAN(ncdist_t_q(1, 0, 1), "t Q nu = 0");
    CHECK_NAN(ncdist_t_q(1, INFINITY, 1), "t Q nu inf");
    CHECK_NAN(ncdist_t_p(1, 3, NAN), "t P delta NaN");
    CHECK_NAN(ncdist_t_p(1, 3, -INFINITY), "t P delta -inf");
    CHECK_NAN(ncdist_t_q(1, 3, 2 * NCDIST_DELTA_MAX), "t Q delta beyond max");
    CHECK_NAN(ncdist_f_power(0, 3, 36, 2.5), "F power alpha = 0");
    CHECK_NAN(ncdist_f_power(1, 3, 36, 2.5), "F power alpha = 1");
    CHECK_NAN(ncdist_f_power(0.05, 3, 36, -1), "F power lambda < 0");
    CHECK_NAN(ncdist_t_power(0.05, 10, 1, 3), "t power sides = 3");
    CHECK_NAN(ncdist_t_power(0.05, 10, 1, 0), "t power sides = 0");
    CHECK_NAN(ncdist_t_power(NAN, 10, 1, 2), "t power alpha NaN");
    CHECK_NAN(ncdist_t_power(0.05, -1, 1, 2), "t power nu < 0");
}

/* ---- ends of the support and extreme arguments ---- */

static void test_extremes(void **state)
{
    (void)state;
    CHECK_EQ(ncdist_f_p(0, 3, 4, 2), 0, "F P(0) = 0");
    CHECK_EQ(ncdist_f_p(-1, 3, 4, 2), 0, "F P(-1) = 0");
    CHECK_EQ(ncdist_f_q(0, 3, 4, 2), 1, "F Q(0) = 1");
    CHECK_EQ(ncdist_f_q(-INFINITY, 3, 4, 2), 1, "F Q(-inf) = 1");
    CHECK_EQ(ncdist_f_p(INFINITY, 3, 4, 2), 1, "F P(inf) = 1");
    CHECK_EQ(ncdist_f_q(INFINITY, 3, 4, 2), 0, "F Q(inf) = 0");
    CHECK_EQ(ncdist_t_p(-INFINITY, 3, 2), 0, "t P(-inf) = 0");
    CHECK_EQ(ncdist_t_p(INFINITY, 3, 2), 1, "t P(inf) = 1");
    CHECK_EQ(ncdist_t_q(-INFINITY, 3, 2), 1, "t Q(-inf) = 1");
    CHECK_EQ(ncdist_t_q(INFINITY, 3, 2), 0, "t Q(inf) = 0");
    /* t = 0: P(T <= 0) = Phi(-delta). mpmath 1.2.1 ncdf at 40 digits:
     * Phi(-1.5) = 0.066807201268858066004, Phi(-40) = 3.6558935409150297037e-350
     * (below the doubles: 0). */
    CHECK_REL(ncdist_t_p(0, 4, 1.5), 0.066807201268858066004, 1e-14, "P(T <= 0; 1.5)");
    CHECK_REL(ncdist_t_q(0, 4, -1.5), 0.066807201268858066004, 1e-14, "P(T > 0; -1.5)");
    CHECK_EQ(ncdist_t_p(0, 4, 40), 0, "P(T <= 0; 40) underflows");
    /* Tails far below the doubles underflow to 0 (mp-ref: P(1.5;2,12,5000) =
     * 4.6779959207826070922e-859); the complementary tail is then 1 to the absolute
     * accuracy of a sum of some 2800 weights (measured 1.4e-15). */
    CHECK_EQ(ncdist_f_p(1.5, 2, 12, 5000), 0, "P(1.5;2,12,5000) = 4.7e-859 underflows");
    CHECK_ABS(ncdist_f_q(1.5, 2, 12, 5000), 1, 1e-14, "Q(1.5;2,12,5000) = 1");
    /* Huge and tiny arguments stay in [0, 1] and sum to 1. */
    const double xs[] = {1e-300, 1e-100, 1e100, 1e300, DBL_MAX};
    char what[128];
    for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++) {
        double x = xs[i];
        double p = ncdist_f_p(x, 1, 1, 50), q = ncdist_f_q(x, 1, 1, 50);
        snprintf(what, sizeof what, "F(1,1,50) at x=%g: P + Q", x);
        CHECK_ABS(p + q, 1, 1e-15, what);
        double tp = ncdist_t_p(x, 1, -30), tq = ncdist_t_q(x, 1, -30);
        snprintf(what, sizeof what, "t(1,-30) at t=%g: P + Q", x);
        CHECK_ABS(tp + tq, 1, 1e-15, what);
        tp = ncdist_t_p(-x, 2, 30);
        tq = ncdist_t_q(-x, 2, 30);
        snprintf(what, sizeof what, "t(2,30) at t=-%g: P + Q", x);
        CHECK_ABS(tp + tq, 1, 1e-15, what);
    }
    /* The largest noncentralities accepted. */
    double x = (1 + NCDIST_LAMBDA_MAX) * 1.001;
    CHECK_ABS(ncdist_f_p(x, 1, 1e4, NCDIST_LAMBDA_MAX) + ncdist_f_q(x, 1, 1e4, NCDIST_LAMBDA_MAX),
              1, 1e-13, "P + Q at lambda max");
    CHECK_ABS(ncdist_t_p(NCDIST_DELTA_MAX, 1e4, NCDIST_DELTA_MAX) +
                  ncdist_t_q(NCDIST_DELTA_MAX, 1e4, NCDIST_DELTA_MAX),
              1, 1e-13, "P + Q at delta max");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_methods_values),
        cmocka_unit_test(test_sample_size),
        cmocka_unit_test(test_steiger_interval),
        cmocka_unit_test(test_hard_points),
        cmocka_unit_test(test_zero_noncentrality),
        cmocka_unit_test(test_identities),
        cmocka_unit_test(test_monotone),
        cmocka_unit_test(test_lambda_inversion),
        cmocka_unit_test(test_invalid_arguments),
        cmocka_unit_test(test_extremes),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
