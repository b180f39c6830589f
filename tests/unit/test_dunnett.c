/* test_dunnett.c: Dunnett's many-to-one distribution (src/dunnett.c).
 *
 * Reference values come from the project's methods note (shared/reference/methods.md,
 * section 3) and check-values.json beside it; each check names its ID and its source,
 * with the tolerance stated there:
 *   TAB  = Dunnett (1955) JASA 50:1096-1121, one-sided 5% table, as reprinted in a
 *          textbook appendix (Table 11, "Percentage points for Dunnett's test"), to half a
 *          unit of the last printed digit;
 *   MEM  = Dunnett (1964) Biometrics 20:482, two-sided 5% table, quoted FROM MEMORY in
 *          the note (not checked against the printed page), to half a unit of the last
 *          digit;
 *   GQ   = independent Gauss-Legendre quadrature in the project's reference notes,
 *          confirmed by Monte Carlo, to relative 1e-8.
 * Other checks use identities that hold exactly, each named where it is used (common
 * practice, no source beyond the derivation given), and a Monte Carlo simulation of the
 * one-way layout itself with its standard error stated. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include "numcheck.h"

#include <math.h>
#include <stdio.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sf_gamma.h>

#include "avow/dist.h"
#include "avow/dunnett.h"
#include "avow/util.h"

/* ---- checking helpers: each prints what it checked when it fails ---- */



/* Fail unless a status is as expected. */
static void status_at(int got, int want, const char *what, const char *file, int line)
{
    if (got != want) {
        print_error("%s: status %d, want %d\n", what, got, want);
        _fail(file, line);
    }
}
#define CHECK_STATUS(got, want, what) status_at((got), (want), (what), __FILE__, __LINE__)

/* Wrappers that require status 0 and return the value. */
static double qinv_at(double alpha, const double *lam, size_t p, double df, int two,
                      const char *file, int line)
{
    double d = NAN;
    int st = dunnett_qinv(alpha, lam, p, df, two, &d);
    if (st != AVOW_OK) {
        print_error("dunnett_qinv(alpha=%g, p=%zu, df=%g, two=%d): status %d\n",
                    alpha, p, df, two, st);
        _fail(file, line);
    }
    return d;
}
#define QINV(a, lam, p, df, two) qinv_at((a), (lam), (p), (df), (two), __FILE__, __LINE__)

static double tail_at(int upper, double d, const double *lam, size_t p, double df, int two,
                      const char *file, int line)
{
    double x = NAN;
    int st = upper ? dunnett_sf(d, lam, p, df, two, &x) : dunnett_cdf(d, lam, p, df, two, &x);
    if (st != AVOW_OK) {
        print_error("dunnett_%s(d=%g, p=%zu, df=%g, two=%d): status %d\n",
                    upper ? "sf" : "cdf", d, p, df, two, st);
        _fail(file, line);
    }
    return x;
}
#define SF(d, lam, p, df, two) tail_at(1, (d), (lam), (p), (df), (two), __FILE__, __LINE__)
#define CDF(d, lam, p, df, two) tail_at(0, (d), (lam), (p), (df), (two), __FILE__, __LINE__)

/* lambda for equal group sizes: sqrt(1/2). */
static void equal_lambda(double *lam, size_t p)
{
    for (size_t i = 0; i < p; i++) lam[i] = sqrt(0.5);
}

/* The unequal-n design of DU-uneq-2s / -1s: control 10, treatments 5, 8, 12. */
static const double UNEQ_N0 = 10;
static const double UNEQ_N[3] = {5, 8, 12};
static const double UNEQ_DF = 31;

/* ---- table values ---- */

typedef struct table_row {
    const char *id;
    int two;
    size_t p;
    double df;
    double table;       /* printed table value */
    double precise;     /* GQ value */
} table_row;

static const table_row ROWS[] = {
    /* one-sided: TAB (Dunnett 1955 as reprinted, Table 11); precise: GQ */
    {"DU-1s-10-2", 0, 2, 10, 2.15, 2.1506138267507056},
    {"DU-1s-10-3", 0, 3, 10, 2.34, 2.3375590695763218},
    {"DU-1s-10-4", 0, 4, 10, 2.47, 2.465571782387702},
    {"DU-1s-20-3", 0, 3, 20, 2.19, 2.192283462387262},
    {"DU-1s-inf-2", 0, 2, INFINITY, 1.92, 1.9163319446876157},
    {"DU-1s-inf-5", 0, 5, INFINITY, 2.23, 2.2338169608700142},
    {"DU-1s-5-2", 0, 2, 5, 2.44, 2.4403786402297167},
    /* two-sided: MEM (Dunnett 1964, from memory); precise: GQ */
    {"DU-2s-10-2", 1, 2, 10, 2.57, 2.5683388760316466},
    {"DU-2s-10-3", 1, 3, 10, 2.76, 2.7589969783736104},
    {"DU-2s-10-4", 1, 4, 10, 2.89, 2.890480110336669},
    {"DU-2s-20-2", 1, 2, 20, 2.38, 2.3786899801813326},
    {"DU-2s-20-3", 1, 3, 20, 2.54, 2.5403496099416625},
    {"DU-2s-inf-2", 1, 2, INFINITY, 2.21, 2.2121277465786173},
    {"DU-2s-inf-3", 1, 3, INFINITY, 2.35, 2.348970590339272},
};
enum { NROWS = sizeof ROWS / sizeof ROWS[0] };

/* One-sided 5% points, TAB: Dunnett (1955) JASA 50:1096-1121, one-sided table, as
 * reprinted in a textbook appendix (Table 11); +-0.005 (half a unit of the last digit). */
static void test_table_one_sided(void **state)
{
    (void)state;
    double lam[8];
    for (size_t i = 0; i < NROWS; i++) {
        if (ROWS[i].two) continue;
        equal_lambda(lam, ROWS[i].p);
        double d = QINV(0.05, lam, ROWS[i].p, ROWS[i].df, 0);
        CHECK_ABS(d, ROWS[i].table, 0.005, ROWS[i].id);
    }
}

/* Two-sided 5% points, MEM: Dunnett (1964) Biometrics 20:482, two-sided table, FROM
 * MEMORY as the methods note flags them; +-0.005. */
static void test_table_two_sided_memory(void **state)
{
    (void)state;
    double lam[8];
    for (size_t i = 0; i < NROWS; i++) {
        if (!ROWS[i].two) continue;
        equal_lambda(lam, ROWS[i].p);
        double d = QINV(0.05, lam, ROWS[i].p, ROWS[i].df, 1);
        CHECK_ABS(d, ROWS[i].table, 0.005, ROWS[i].id);
    }
}

/* The precise values, GQ: independent Gauss-Legendre quadrature in the project's
 * reference notes, confirmed by Monte Carlo; relative 1e-8 (IDs "<id>-pre"). The upper
 * tail at the reference value must also be 0.05 to the matching accuracy. */
static void test_precise_equal_n(void **state)
{
    (void)state;
    double lam[8];
    char what[64];
    for (size_t i = 0; i < NROWS; i++) {
        equal_lambda(lam, ROWS[i].p);
        double d = QINV(0.05, lam, ROWS[i].p, ROWS[i].df, ROWS[i].two);
        snprintf(what, sizeof what, "%s-pre", ROWS[i].id);
        CHECK_REL(d, ROWS[i].precise, 1e-8, what);
        snprintf(what, sizeof what, "sf at %s-pre", ROWS[i].id);
        CHECK_ABS(SF(ROWS[i].precise, lam, ROWS[i].p, ROWS[i].df, ROWS[i].two), 0.05, 1e-9,
                  what);
    }
}

/* DU-uneq-2s and DU-uneq-1s, GQ (independent Gauss-Legendre quadrature in the project's
 * reference notes, confirmed by Monte Carlo): n0 = 10, n = (5, 8, 12), df = 31; rel 1e-8. */
static void test_precise_unequal_n(void **state)
{
    (void)state;
    double lam[3];
    CHECK_STATUS(dunnett_lambda(UNEQ_N0, UNEQ_N, 3, lam), AVOW_OK, "dunnett_lambda");
    CHECK_REL(lam[0], sqrt(5.0 / 15), 1e-15, "lambda_1 = sqrt(5/15)");
    CHECK_REL(lam[1], sqrt(8.0 / 18), 1e-15, "lambda_2 = sqrt(8/18)");
    CHECK_REL(lam[2], sqrt(12.0 / 22), 1e-15, "lambda_3 = sqrt(12/22)");
    CHECK_REL(QINV(0.05, lam, 3, UNEQ_DF, 1), 2.4816878870693584, 1e-8, "DU-uneq-2s");
    CHECK_REL(QINV(0.05, lam, 3, UNEQ_DF, 0), 2.1593861690730467, 1e-8, "DU-uneq-1s");
    /* the answer does not depend on the order of the treatments */
    double rev[3] = {lam[2], lam[0], lam[1]};
    CHECK_REL(QINV(0.05, rev, 3, UNEQ_DF, 1), 2.4816878870693584, 1e-8, "DU-uneq-2s reordered");
}

/* ---- identities ---- */

/* Two-sided tails of t(nu) from the regularized incomplete beta, by the textbook identities
 * P(|T| > t) = I_x(nu/2, 1/2) with x = nu/(nu + t^2), and P(|T| <= t) = I_y(1/2, nu/2)
 * with y = t^2/(nu + t^2) = 1 - x, both formed directly. When one of x, y is below 1e-3,
 * GSL would form the other as 1 minus it and lose digits, so that tail is taken as 1
 * minus the other (it is then near 1). GSL's own t tail is not used: it switches to a
 * Cornish-Fisher approximation for nu > 30 and loses up to 1e-6 relative in the far
 * tail. df infinite: the normal. */
static double t_out2(double t, double nu)
{
    if (isinf(nu)) return erfc(t / sqrt(2.0));
    double x = nu / (nu + t * t), y = t * t / (nu + t * t);
    if (y < 1e-3) return 1 - gsl_sf_beta_inc(0.5, nu / 2, y);
    return gsl_sf_beta_inc(nu / 2, 0.5, x);
}

static double t_in2(double t, double nu)
{
    if (isinf(nu)) return erf(t / sqrt(2.0));
    double x = nu / (nu + t * t), y = t * t / (nu + t * t);
    if (x < 1e-3) return 1 - gsl_sf_beta_inc(nu / 2, 0.5, x);
    return gsl_sf_beta_inc(0.5, nu / 2, y);
}

/* Upper tail of t(nu), P(T > t), t >= 0. */
static double t_upper(double t, double nu) { return 0.5 * t_out2(t, nu); }

/* One treatment: the statistic is Student's t, so d = t_{alpha/2}(df) two-sided and
 * t_alpha(df) one-sided (dist_t_qinv), for any lambda, over a grid of df (common
 * practice: the definition of t). Target 1e-7 relative; checked at 1e-9. */
static void test_one_treatment_quantiles(void **state)
{
    (void)state;
    const double dfs[] = {1, 1.5, 2, 3, 4.5, 7, 10, 31, 100, 1000, 1e5};
    const double alphas[] = {0.1, 0.05, 0.01, 0.001};
    const double lams[] = {0, 0.3, sqrt(0.5), 0.95};
    char what[96];
    for (size_t i = 0; i < sizeof dfs / sizeof dfs[0]; i++) {
        for (size_t j = 0; j < sizeof alphas / sizeof alphas[0]; j++) {
            const double *lam = &lams[(i + j) % 4];
            double t2, t1;
            assert_int_equal(dist_t_qinv(alphas[j] / 2, dfs[i], &t2), AVOW_OK);
            assert_int_equal(dist_t_qinv(alphas[j], dfs[i], &t1), AVOW_OK);
            snprintf(what, sizeof what, "p=1 two-sided alpha %g df %g = t", alphas[j], dfs[i]);
            CHECK_REL(QINV(alphas[j], lam, 1, dfs[i], 1), t2, 1e-9, what);
            snprintf(what, sizeof what, "p=1 one-sided alpha %g df %g = t", alphas[j], dfs[i]);
            CHECK_REL(QINV(alphas[j], lam, 1, dfs[i], 0), t1, 1e-9, what);
        }
    }
    /* df infinite: the normal quantile */
    double lam[1] = {0.5};
    CHECK_REL(QINV(0.05, lam, 1, INFINITY, 1), gsl_cdf_ugaussian_Qinv(0.025), 1e-12,
              "p=1 df=inf two-sided = z_0.025");
    CHECK_REL(QINV(0.05, lam, 1, INFINITY, 0), gsl_cdf_ugaussian_Qinv(0.05), 1e-12,
              "p=1 df=inf one-sided = z_0.05");
}

/* One treatment: the tails equal t tails, down to far-tail values, relative 1e-12 (this
 * is the check that the upper tail is integrated directly). GSL's incomplete beta is
 * itself good to about 1e-12 only for moderate df (at df = 1e5 it is off by 5e-12), so
 * large df are checked against two values of MP = mpmath 1.2.1 at 40 digits (regularized
 * incomplete beta I_x(df/2, 1/2), computed for this test at the exact doubles given). */
static void test_one_treatment_tails(void **state)
{
    (void)state;
    double l1[1] = {0.45};
    CHECK_REL(SF(2.0511149, l1, 1, 1e5, 1), 0.040258358259406359917, 1e-12,
              "p=1 sf(2.0511149) df 1e5 two-sided, MP");
    CHECK_REL(SF(5.94823321, l1, 1, 200, 1), 1.1932809379609908595e-08, 1e-12,
              "p=1 sf(5.94823321) df 200 two-sided, MP");
    const double dfs[] = {0.5, 1, 2.5, 10, 31, 200, INFINITY};
    char what[96];
    for (size_t i = 0; i < sizeof dfs / sizeof dfs[0]; i++) {
        double lam[1] = {0.1 + 0.1 * (double)i};
        for (double d = 0.01; d < 1e12; d *= 2.9) {
            double q = t_upper(d, dfs[i]);
            if (q < 1e-280) break;
            snprintf(what, sizeof what, "p=1 sf(%g) df %g two-sided = 2 Q_t", d, dfs[i]);
            CHECK_REL(SF(d, lam, 1, dfs[i], 1), 2 * q, 1e-12, what);
            snprintf(what, sizeof what, "p=1 sf(%g) df %g one-sided = Q_t", d, dfs[i]);
            CHECK_REL(SF(d, lam, 1, dfs[i], 0), q, 1e-12, what);
            snprintf(what, sizeof what, "p=1 cdf(%g) df %g two-sided = P(|T| <= d)", d, dfs[i]);
            CHECK_ABS(CDF(d, lam, 1, dfs[i], 1), t_in2(d, dfs[i]), 1e-13, what);
            snprintf(what, sizeof what, "p=1 cdf(-%g) df %g one-sided = Q_t", d, dfs[i]);
            CHECK_REL(CDF(-d, lam, 1, dfs[i], 0), q, 1e-11, what);
        }
    }
}

/* Uncorrelated comparisons (lambda = 0) with df infinite are independent normals:
 * P(max |Z_i| > d) = 1 - (1 - 2 Phi_c(d))^p (common practice, no source), far tail
 * included, relative 1e-12. */
static void test_independent(void **state)
{
    (void)state;
    double lam[5] = {0, 0, 0, 0, 0};
    char what[64];
    for (double d = 0.2; d < 9; d += 0.7) {
        double q = 0.5 * erfc(d / sqrt(2.0));
        double two = -expm1(5 * log1p(-2 * q)), one = -expm1(5 * log1p(-q));
        snprintf(what, sizeof what, "independent two-sided sf(%g)", d);
        CHECK_REL(SF(d, lam, 5, INFINITY, 1), two, 1e-12, what);
        snprintf(what, sizeof what, "independent one-sided sf(%g)", d);
        CHECK_REL(SF(d, lam, 5, INFINITY, 0), one, 1e-12, what);
    }
}

/* One-sided at d = 0 (just above, so that the integral over s is used): P(all T_i <= 0)
 * does not depend on df. With equal n it is P(all X_i <= X_0) = 1/(p + 1) for p + 1
 * exchangeable group means; for p = 2 it is 1/4 + asin(rho)/(2 pi) (Sheppard's formula
 * for the bivariate normal orthant). Common practice, no source; absolute 1e-12. */
static void test_orthant(void **state)
{
    (void)state;
    const double dfs[] = {0.7, 3, 25, 1e4, INFINITY};
    double lam[12];
    char what[64];
    for (size_t p = 1; p <= 12; p += 3) {
        equal_lambda(lam, p);
        for (size_t i = 0; i < sizeof dfs / sizeof dfs[0]; i++) {
            snprintf(what, sizeof what, "P(max T <= 0), p=%zu df %g", p, dfs[i]);
            CHECK_ABS(CDF(1e-300, lam, p, dfs[i], 0), 1.0 / (double)(p + 1), 1e-12, what);
            CHECK_ABS(CDF(0, lam, p, dfs[i], 0), 1.0 / (double)(p + 1), 1e-12, what);
        }
    }
    const double PI = 3.14159265358979323846;
    double l2[2] = {0.3, 0.9};
    double want = 0.25 + asin(0.27) / (2 * PI);
    CHECK_ABS(CDF(1e-300, l2, 2, 8, 0), want, 1e-12, "P(max T <= 0), rho = 0.27");
}

/* The same lambda given as repeated values or as distinct values one ulp apart goes
 * through different code (multiplicities vs single factors): the answers must agree. */
static void test_multiplicity_path(void **state)
{
    (void)state;
    double a = sqrt(0.5);
    double same[4] = {a, a, a, a}, near[4] = {a, nextafter(a, 1), a, nextafter(a, 0)};
    for (int two = 0; two <= 1; two++) {
        CHECK_REL(SF(3.1, near, 4, 12, two), SF(3.1, same, 4, 12, two), 1e-12,
                  "repeated vs distinct lambdas, sf(3.1)");
        CHECK_REL(SF(6.5, near, 4, INFINITY, two), SF(6.5, same, 4, INFINITY, two), 1e-12,
                  "repeated vs distinct lambdas, sf(6.5) df inf");
        CHECK_REL(QINV(0.01, near, 4, 7, two), QINV(0.01, same, 4, 7, two), 1e-10,
                  "repeated vs distinct lambdas, qinv");
    }
}

/* Consistency over a grid: cdf + sf = 1 (each integrated on its own), cdf increasing and
 * sf decreasing in d, and the bounds p_single <= sf <= p p_single (the maximum exceeds
 * each statistic; Bonferroni), common practice, no source. */
static void test_grid_consistency(void **state)
{
    (void)state;
    double lam[5];
    CHECK_STATUS(dunnett_lambda(6, (const double[]){2, 4, 6, 9, 20}, 5, lam), AVOW_OK,
                 "dunnett_lambda");
    const double dfs[] = {0.8, 4, 17.5, 300, INFINITY};
    char what[96];
    for (int two = 0; two <= 1; two++) {
        for (size_t i = 0; i < sizeof dfs / sizeof dfs[0]; i++) {
            double prev_c = -1, prev_s = 2;
            for (double d = two ? 0.05 : -4; d < 60; d += (d < 5 ? 1.1 : 13.3)) {
                double c = CDF(d, lam, 5, dfs[i], two), s = SF(d, lam, 5, dfs[i], two);
                snprintf(what, sizeof what, "cdf + sf at d=%g df %g two %d", d, dfs[i], two);
                CHECK_ABS(c + s, 1, 1e-13, what);
                assert_true(c >= prev_c - 1e-15);
                assert_true(s <= prev_s + 1e-15);
                prev_c = c;
                prev_s = s;
                double single = two ? t_out2(d, dfs[i]) : t_upper(d, dfs[i]);
                if (d < 0) single = 1 - t_upper(-d, dfs[i]);
                snprintf(what, sizeof what, "sf >= single at d=%g df %g two %d", d, dfs[i], two);
                if (!(s >= single * (1 - 1e-12))) { print_error("%s\n", what); fail(); }
                snprintf(what, sizeof what, "sf <= p single at d=%g df %g two %d", d, dfs[i],
                         two);
                if (!(s <= 5 * single * (1 + 1e-12))) { print_error("%s\n", what); fail(); }
            }
        }
    }
}

/* Critical values reproduce their level (both branches: alpha <= 1/2 on the upper tail,
 * alpha > 1/2 on the lower tail), including small adjusted levels, and df at or above
 * 1e20 is the same as infinite. */
static void test_roundtrip(void **state)
{
    (void)state;
    double lam[3];
    CHECK_STATUS(dunnett_lambda(UNEQ_N0, UNEQ_N, 3, lam), AVOW_OK, "dunnett_lambda");
    const double alphas[] = {1e-12, 1e-8, 1e-4, 0.01, 0.2, 0.5, 0.7, 0.99};
    const double dfs[] = {0.6, 2, 9, 31, 5000, INFINITY};
    char what[96];
    for (int two = 0; two <= 1; two++) {
        for (size_t i = 0; i < sizeof alphas / sizeof alphas[0]; i++) {
            for (size_t j = 0; j < sizeof dfs / sizeof dfs[0]; j++) {
                double d = QINV(alphas[i], lam, 3, dfs[j], two);
                snprintf(what, sizeof what, "sf(qinv(%g)) df %g two %d", alphas[i], dfs[j], two);
                if (alphas[i] <= 0.5)
                    CHECK_REL(SF(d, lam, 3, dfs[j], two), alphas[i], 1e-10, what);
                else
                    CHECK_REL(CDF(d, lam, 3, dfs[j], two), 1 - alphas[i], 1e-10, what);
            }
        }
    }
    assert_true(QINV(0.05, lam, 3, 1e20, 1) == QINV(0.05, lam, 3, INFINITY, 1));
    /* one-sided, alpha > 1/2: a negative critical value */
    assert_true(QINV(0.9, lam, 3, 10, 0) < 0);
}

/* ---- Monte Carlo of the one-way layout itself ----
 *
 * The unequal-n design of DU-uneq: group means ybar_0 ~ N(0, 1/n0), ybar_i ~ N(0, 1/n_i),
 * s^2 ~ chi2_31 / 31 (unit error variance), T_i = (ybar_i - ybar_0) / (s sqrt(1/n_i +
 * 1/n0)). This simulates the data model, not the integral, so it checks the product
 * correlation and the formula as well as the code. N = 4e6 draws from GSL's mt19937
 * with a fixed seed. At each checked d the estimate of P = cdf(d) has standard error
 * sqrt(P(1 - P)/N), at most 2.5e-4 and 1.09e-4 at P = 0.95; the tolerance is 4
 * standard errors (a correct implementation fails with probability 6e-5 per check
 * for a random seed; with the fixed seed the test is deterministic). */
static void test_monte_carlo_unequal(void **state)
{
    (void)state;
    enum { NCHECK = 4 };
    const long N = 4000000;
    double lam[3];
    CHECK_STATUS(dunnett_lambda(UNEQ_N0, UNEQ_N, 3, lam), AVOW_OK, "dunnett_lambda");
    const double d2[NCHECK] = {1.2, 2.0, 2.4816878870693584, 3.0};
    const double d1[NCHECK] = {0.5, 1.5, 2.1593861690730467, 2.8};
    long c2[NCHECK] = {0}, c1[NCHECK] = {0};
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    assert_non_null(r);
    gsl_rng_set(r, 20240601UL);
    double sd0 = 1 / sqrt(UNEQ_N0), sdi[3], se[3];
    for (int k = 0; k < 3; k++) {
        sdi[k] = 1 / sqrt(UNEQ_N[k]);
        se[k] = sqrt(1 / UNEQ_N[k] + 1 / UNEQ_N0);
    }
    for (long i = 0; i < N; i++) {
        double m0 = gsl_ran_gaussian_ziggurat(r, sd0);
        double s = sqrt(gsl_ran_chisq(r, UNEQ_DF) / UNEQ_DF);
        double mx = -INFINITY, ma = 0;
        for (int k = 0; k < 3; k++) {
            double t = (gsl_ran_gaussian_ziggurat(r, sdi[k]) - m0) / (s * se[k]);
            if (t > mx) mx = t;
            if (fabs(t) > ma) ma = fabs(t);
        }
        for (int j = 0; j < NCHECK; j++) {
            c2[j] += ma <= d2[j];
            c1[j] += mx <= d1[j];
        }
    }
    gsl_rng_free(r);
    char what[96];
    for (int j = 0; j < NCHECK; j++) {
        double p2 = CDF(d2[j], lam, 3, UNEQ_DF, 1), p1 = CDF(d1[j], lam, 3, UNEQ_DF, 0);
        double se2 = sqrt(p2 * (1 - p2) / (double)N), se1 = sqrt(p1 * (1 - p1) / (double)N);
        snprintf(what, sizeof what, "Monte Carlo two-sided P(max|T| <= %g), 4 SE = %.2g",
                 d2[j], 4 * se2);
        CHECK_ABS((double)c2[j] / (double)N, p2, 4 * se2, what);
        snprintf(what, sizeof what, "Monte Carlo one-sided P(max T <= %g), 4 SE = %.2g",
                 d1[j], 4 * se1);
        CHECK_ABS((double)c1[j] / (double)N, p1, 4 * se1, what);
    }
    /* the critical values of DU-uneq sit at 0.95 */
    CHECK_ABS(CDF(d2[2], lam, 3, UNEQ_DF, 1), 0.95, 1e-9, "cdf at DU-uneq-2s");
    CHECK_ABS(CDF(d1[2], lam, 3, UNEQ_DF, 0), 0.95, 1e-9, "cdf at DU-uneq-1s");
}

/* ---- arguments, special values, allocation failure ---- */

static void test_invalid_arguments(void **state)
{
    (void)state;
    double lam[2] = {0.5, 0.6}, x = 42;
    double bad1[2] = {0.5, 1}, bad2[2] = {-0.1, 0.5}, bad3[2] = {NAN, 0.5};
    CHECK_STATUS(dunnett_cdf(1, NULL, 2, 10, 1, &x), AVOW_EDOM, "lambda NULL");
    CHECK_STATUS(dunnett_cdf(1, lam, 0, 10, 1, &x), AVOW_EDOM, "p = 0");
    CHECK_STATUS(dunnett_cdf(1, lam, 2, 10, 1, NULL), AVOW_EDOM, "prob NULL");
    CHECK_STATUS(dunnett_sf(1, bad1, 2, 10, 1, &x), AVOW_EDOM, "lambda = 1");
    CHECK_STATUS(dunnett_sf(1, bad2, 2, 10, 1, &x), AVOW_EDOM, "lambda < 0");
    CHECK_STATUS(dunnett_sf(1, bad3, 2, 10, 1, &x), AVOW_EDOM, "lambda NaN");
    CHECK_STATUS(dunnett_sf(1, lam, 2, 0, 1, &x), AVOW_EDOM, "df = 0");
    CHECK_STATUS(dunnett_sf(1, lam, 2, -3, 1, &x), AVOW_EDOM, "df < 0");
    CHECK_STATUS(dunnett_sf(1, lam, 2, NAN, 1, &x), AVOW_EDOM, "df NaN");
    CHECK_STATUS(dunnett_sf(NAN, lam, 2, 10, 1, &x), AVOW_EDOM, "d NaN");
    CHECK_STATUS(dunnett_qinv(0, lam, 2, 10, 1, &x), AVOW_EDOM, "alpha = 0");
    CHECK_STATUS(dunnett_qinv(1, lam, 2, 10, 1, &x), AVOW_EDOM, "alpha = 1");
    CHECK_STATUS(dunnett_qinv(NAN, lam, 2, 10, 1, &x), AVOW_EDOM, "alpha NaN");
    CHECK_STATUS(dunnett_qinv(0.05, lam, 2, 10, 1, NULL), AVOW_EDOM, "d NULL");
    CHECK_STATUS(dunnett_qinv(0.05, bad1, 2, 10, 1, &x), AVOW_EDOM, "qinv lambda = 1");
    assert_true(x == 42);   /* outputs untouched on error */

    double n[2] = {3, 4};
    CHECK_STATUS(dunnett_lambda(0, n, 2, lam), AVOW_EDOM, "n0 = 0");
    CHECK_STATUS(dunnett_lambda(INFINITY, n, 2, lam), AVOW_EDOM, "n0 infinite");
    CHECK_STATUS(dunnett_lambda(5, (const double[]){3, -1}, 2, lam), AVOW_EDOM, "n < 0");
    CHECK_STATUS(dunnett_lambda(5, (const double[]){3, NAN}, 2, lam), AVOW_EDOM, "n NaN");
    CHECK_STATUS(dunnett_lambda(1e-20, n, 2, lam), AVOW_EDOM, "lambda rounds to 1");
    CHECK_STATUS(dunnett_lambda(5, n, 0, lam), AVOW_EDOM, "lambda p = 0");
    CHECK_STATUS(dunnett_lambda(5, NULL, 2, lam), AVOW_EDOM, "n NULL");
    assert_true(lam[0] == 0.5 && lam[1] == 0.6);
}

static void test_special_values(void **state)
{
    (void)state;
    double lam[3] = {0.5, 0.7, 0.7};
    assert_true(CDF(0, lam, 3, 10, 1) == 0 && SF(0, lam, 3, 10, 1) == 1);
    assert_true(CDF(-2, lam, 3, 10, 1) == 0 && SF(-2, lam, 3, 10, 1) == 1);
    assert_true(CDF(INFINITY, lam, 3, 10, 1) == 1 && SF(INFINITY, lam, 3, 10, 1) == 0);
    assert_true(CDF(INFINITY, lam, 3, 10, 0) == 1 && SF(INFINITY, lam, 3, 10, 0) == 0);
    assert_true(CDF(-INFINITY, lam, 3, 10, 0) == 0 && SF(-INFINITY, lam, 3, 10, 0) == 1);
    /* far beyond the last representable tail: 0, not NaN */
    assert_true(SF(1e300, lam, 3, INFINITY, 1) == 0);
    assert_true(SF(60, lam, 3, 1e6, 1) == 0);
    /* heavy tails: tiny df keeps the answer finite, or reports overflow */
    double d = 0;
    CHECK_STATUS(dunnett_qinv(0.05, lam, 3, 0.3, 1, &d), AVOW_OK, "qinv df 0.3");
    CHECK_REL(SF(d, lam, 3, 0.3, 1), 0.05, 1e-10, "sf(qinv) df 0.3");
    CHECK_STATUS(dunnett_qinv(1e-10, lam, 3, 0.02, 1, &d), AVOW_EOVERFLOW, "qinv df 0.02");
    assert_true(d == INFINITY);
}

/* Every allocation point fails cleanly (AVOW_ENOMEM, output untouched, no leak under
 * the sanitizer build), and the call succeeds once allocation works again. */
static void test_allocation_failure(void **state)
{
    (void)state;
    double lam[3] = {0.4, 0.6, 0.7};
    for (int fn = 0; fn < 3; fn++) {
        int ok = 0;
        for (long n = 0; n < 50 && !ok; n++) {
            double x = 42;
            avow_mem_fail_after(n);
            int st = fn == 0   ? dunnett_cdf(2.5, lam, 3, 12, 1, &x)
                     : fn == 1 ? dunnett_sf(2.5, lam, 3, 12, 0, &x)
                               : dunnett_qinv(0.05, lam, 3, 12, 1, &x);
            avow_mem_fail_after(-1);
            if (st == AVOW_OK) ok = 1;
            else {
                CHECK_STATUS(st, AVOW_ENOMEM, "failed allocation");
                assert_true(x == 42);
            }
        }
        assert_true(ok);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_table_one_sided),
        cmocka_unit_test(test_table_two_sided_memory),
        cmocka_unit_test(test_precise_equal_n),
        cmocka_unit_test(test_precise_unequal_n),
        cmocka_unit_test(test_one_treatment_quantiles),
        cmocka_unit_test(test_one_treatment_tails),
        cmocka_unit_test(test_independent),
        cmocka_unit_test(test_orthant),
        cmocka_unit_test(test_multiplicity_path),
        cmocka_unit_test(test_grid_consistency),
        cmocka_unit_test(test_roundtrip),
        cmocka_unit_test(test_monte_carlo_unequal),
        cmocka_unit_test(test_invalid_arguments),
        cmocka_unit_test(test_special_values),
        cmocka_unit_test(test_allocation_failure),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
