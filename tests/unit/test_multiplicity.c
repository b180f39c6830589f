/* test_multiplicity.c: multiple-testing adjustments (src/multiplicity.c).
 *
 * Reference values: the project's methods note (shared/reference/methods.md, section 7)
 * and check-values.json beside it, IDs MC-*. The exact expected fractions there (1/40,
 * 9/100, ...) were computed with exact rational arithmetic in Python `fractions` on the
 * decimal p-values; MC-sidak-alpha, MC-bonf-t and MC-scheffe-S come from mpmath.
 * Tolerances are the ones stated there (exact: equality after rounding to binary64). */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include "numcheck.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "avow/dist.h"
#include "avow/multiplicity.h"
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

/* Fail unless two double arrays are equal element by element. */
static void vec_eq_at(const double *got, const double *want, size_t m, const char *what,
                      const char *file, int line)
{
    for (size_t i = 0; i < m; i++) {
        if (!(got[i] == want[i])) {
            print_error("%s[%zu]: got %.17g, want exactly %.17g\n", what, i, got[i], want[i]);
            _fail(file, line);
        }
    }
}
#define CHECK_VEC_EQ(got, want, m, what) vec_eq_at((got), (want), (m), (what), __FILE__, __LINE__)

/* Fail unless a status is as expected. */
static void status_at(int got, int want, const char *what, const char *file, int line)
{
    if (got != want) {
        print_error("%s: status %d, want %d\n", what, got, want);
        _fail(file, line);
    }
}
#define CHECK_STATUS(got, want, what) status_at((got), (want), (what), __FILE__, __LINE__)

/* The p-values of MC-bonf, MC-holm, MC-sidak and MC-bh (decimal 0.010, 0.040, 0.030,
 * 0.005, 0.200). */
static const double MC_P[5] = {0.010, 0.040, 0.030, 0.005, 0.200};

/* ---- names ---- */

static void test_names(void **state)
{
    (void)state;
    static const struct {
        avow_adjust m;      /* method */
        const char *name;   /* its name */
    } cases[] = {
        {ADJ_NONE, "none"}, {ADJ_BONFERRONI, "bonferroni"}, {ADJ_HOLM, "holm"},
        {ADJ_SIDAK, "sidak"}, {ADJ_SCHEFFE, "scheffe"}, {ADJ_FDR, "fdr"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        assert_string_equal(mult_name(cases[i].m), cases[i].name);
        avow_adjust got = (avow_adjust)-1;
        CHECK_STATUS(mult_from_name(cases[i].name, strlen(cases[i].name), &got), AVOW_OK,
                     cases[i].name);
        assert_int_equal(got, cases[i].m);
    }
    assert_null(mult_name((avow_adjust)6));
    assert_null(mult_name((avow_adjust)-1));

    /* Not NUL-terminated: only len bytes count. */
    avow_adjust got = ADJ_NONE;
    CHECK_STATUS(mult_from_name("holmes", 4, &got), AVOW_OK, "\"holm\" inside \"holmes\"");
    assert_int_equal(got, ADJ_HOLM);

    /* Unknown names leave *out alone. */
    static const char *const bad[] = {"Holm", "hol", "holmx", "", "bonf", "fdr ", "BH"};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        got = ADJ_SIDAK;
        CHECK_STATUS(mult_from_name(bad[i], strlen(bad[i]), &got), AVOW_EDOM, bad[i]);
        assert_int_equal(got, ADJ_SIDAK);
    }
    CHECK_STATUS(mult_from_name(NULL, 0, &got), AVOW_EDOM, "NULL name");
    CHECK_STATUS(mult_from_name("holm", 4, NULL), AVOW_EDOM, "NULL output");
}

/* ---- the MC reference values ---- */

static void test_mc_bonferroni(void **state)
{
    (void)state;
    /* MC-bonf: exact, Python fractions: 1/20, 1/5, 3/20, 1/40, 1. */
    const double want[5] = {1.0 / 20, 1.0 / 5, 3.0 / 20, 1.0 / 40, 1};
    double got[5];
    CHECK_STATUS(mult_adjust_p(ADJ_BONFERRONI, MC_P, 5, got), AVOW_OK, "MC-bonf");
    CHECK_VEC_EQ(got, want, 5, "MC-bonf");
}

static void test_mc_holm(void **state)
{
    (void)state;
    /* MC-holm: exact, Python fractions: 1/25, 9/100, 9/100, 1/40, 1/5. */
    const double want[5] = {1.0 / 25, 9.0 / 100, 9.0 / 100, 1.0 / 40, 1.0 / 5};
    double got[5];
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, MC_P, 5, got), AVOW_OK, "MC-holm");
    CHECK_VEC_EQ(got, want, 5, "MC-holm");
}

static void test_mc_sidak(void **state)
{
    (void)state;
    /* MC-sidak: exact rationals by Python fractions (490099501/10000000000, ...),
     * given as these decimals; tolerance rel 1e-14. */
    const double want[5] = {0.0490099501, 0.1846273024, 0.1412659743, 0.024751246878125,
                            0.67232};
    double got[5];
    char what[32];
    CHECK_STATUS(mult_adjust_p(ADJ_SIDAK, MC_P, 5, got), AVOW_OK, "MC-sidak");
    for (size_t i = 0; i < 5; i++) {
        snprintf(what, sizeof what, "MC-sidak[%zu]", i);
        CHECK_REL(got[i], want[i], 1e-14, what);
    }
}

static void test_mc_bh(void **state)
{
    (void)state;
    /* MC-bh: exact, Python fractions on the decimal inputs: 1/40, 1/20, 1/20, 1/40, 1/5. */
    double got[5];
    CHECK_STATUS(mult_adjust_p(ADJ_FDR, MC_P, 5, got), AVOW_OK, "MC-bh");
    CHECK_EQ(got[0], 1.0 / 40, "MC-bh[0]");
    CHECK_EQ(got[1], 1.0 / 20, "MC-bh[1]");
    CHECK_EQ(got[3], 1.0 / 40, "MC-bh[3]");
    CHECK_EQ(got[4], 1.0 / 5, "MC-bh[4]");
    /* MC-bh[2] is 5 (3/100)/3 = 1/20 for the decimal input, but the binary64 input
     * 0.03 is 0.029999999999999998889...: 5 * 0.03 / 3 is exactly
     * 0.0499999999999999981..., whose nearest double is 0.049999999999999996, one unit
     * in the last place below the double nearest 1/20 (own check with Python
     * fractions on Fraction(0.03)). So equality with fl(1/20) cannot hold for any
     * correctly rounded computation on this input; the check is equality with the
     * correctly rounded value for the binary64 input, and one ulp from MC-bh's 1/20. */
    CHECK_EQ(got[2], 0.049999999999999996, "MC-bh[2], binary64 input 0.03");
    CHECK_EQ(nextafter(got[2], 1), 1.0 / 20, "MC-bh[2] is one ulp below 1/20");
}

static void test_mc_sidak_alpha(void **state)
{
    (void)state;
    /* MC-sidak-alpha: mpmath, rel 1e-14. */
    CHECK_REL(mult_sidak_alpha(0.05, 3), 0.0169524275084415, 1e-14, "MC-sidak-alpha");
    CHECK_EQ(mult_sidak_alpha(0.05, 1), 0.05, "one test: alpha itself");
    CHECK_EQ(mult_sidak_alpha(0, 4), 0, "alpha = 0");
    CHECK_EQ(mult_sidak_alpha(1, 4), 1, "alpha = 1");
    /* Tiny alpha: 1 - (1 - a)^(1/m) = a/m + (m - 1) a^2/(2 m^2) + ...; for a = 1e-20,
     * m = 4 the second term is 1e-40 relative to the first, so the answer is 2.5e-21
     * to double precision (a naive 1 - pow(1 - a, 1/m) gives 0). */
    CHECK_REL(mult_sidak_alpha(1e-20, 4), 2.5e-21, 1e-15, "Sidak level for tiny alpha");
    assert_true(isnan(mult_sidak_alpha(0.05, 0)));
    assert_true(isnan(mult_sidak_alpha(-0.01, 3)));
    assert_true(isnan(mult_sidak_alpha(1.5, 3)));
    assert_true(isnan(mult_sidak_alpha(NAN, 3)));
}

static void test_mc_critical_values(void **state)
{
    (void)state;
    double x = NAN;
    /* MC-bonf-t: mpmath 1.2.1 at 40 digits; Bonferroni t critical value for m = 3
     * two-sided tests at 0.05 on 12 df: upper-tail quantile at 0.05/(2*3). */
    CHECK_STATUS(dist_t_qinv(0.05 / 6, 12, &x), AVOW_OK, "MC-bonf-t");
    CHECK_REL(x, 2.7794731017810994, 1e-12, "MC-bonf-t t_{0.05/6}(12)");
    /* MC-scheffe-S: mpmath 1.2.1 at 40 digits; S = sqrt((k - 1) F_0.05(k - 1, N - k))
     * with k = 3, N - k = 12. */
    CHECK_STATUS(dist_f_qinv(0.05, 2, 12, &x), AVOW_OK, "MC-scheffe-S");
    CHECK_REL(sqrt(2 * x), 2.7875773835545425, 1e-12, "MC-scheffe-S sqrt(2 F_0.05(2,12))");
    /* Same through the root-finder rather than the d1 = 2 closed form. */
    CHECK_STATUS(dist_f_qinv_solve(0.05, 2, 12, &x), AVOW_OK, "MC-scheffe-S solver");
    CHECK_REL(sqrt(2 * x), 2.7875773835545425, 1e-12, "MC-scheffe-S via solver");
}

/* ---- behaviour ---- */

/* Ties: tied p-values get equal adjusted values, and the result does not depend on the
 * input order. Expected values worked by hand (exact, m = 5; the doubles below are the
 * correctly rounded products, e.g. 4 * 0.02 == 0.08 in binary64):
 *   holm: 5*0.01, max(4*0.02, 3*0.02, 2*0.02) = 0.08, then max(0.08, 0.04) = 0.08;
 *   fdr:  5*0.04/5 = 0.04, then min(5*0.02/4, 5*0.02/3, 5*0.02/2) = 0.025, and
 *         min(5*0.01/1, 0.025) = 0.025. */
static void test_ties(void **state)
{
    (void)state;
    const double p[5] = {0.02, 0.01, 0.02, 0.02, 0.04};
    const double holm[5] = {0.08, 0.05, 0.08, 0.08, 0.08};
    const double fdr[5] = {0.025, 0.025, 0.025, 0.025, 0.04};
    double got[5];
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, p, 5, got), AVOW_OK, "holm ties");
    CHECK_VEC_EQ(got, holm, 5, "holm ties");
    CHECK_STATUS(mult_adjust_p(ADJ_FDR, p, 5, got), AVOW_OK, "fdr ties");
    CHECK_VEC_EQ(got, fdr, 5, "fdr ties");

    /* Reversed input order gives the reversed output. */
    double rp[5], rgot[5], rwant[5];
    for (size_t i = 0; i < 5; i++) rp[i] = p[4 - i];
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, rp, 5, rgot), AVOW_OK, "holm reversed");
    for (size_t i = 0; i < 5; i++) rwant[i] = holm[4 - i];
    CHECK_VEC_EQ(rgot, rwant, 5, "holm reversed");
    CHECK_STATUS(mult_adjust_p(ADJ_FDR, rp, 5, rgot), AVOW_OK, "fdr reversed");
    for (size_t i = 0; i < 5; i++) rwant[i] = fdr[4 - i];
    CHECK_VEC_EQ(rgot, rwant, 5, "fdr reversed");
}

/* Holm and Benjamini-Hochberg against their definitions written out directly, O(m^2),
 * on a pseudo-random family with ties, zeros and ones. Ranks are stable by index:
 * rank(i) = 1 + #{j : p_j < p_i or (p_j == p_i and j < i)}. */
static void test_against_definitions(void **state)
{
    (void)state;
    enum { M = 64 };
    double p[M], holm[M], fdr[M], bonf[M], none[M];
    uint32_t s = 12345u;
    for (size_t i = 0; i < M; i++) {
        s = s * 1664525u + 1013904223u;            /* a linear congruential generator */
        uint32_t r = s >> 8;
        if (i % 9 == 3) p[i] = p[i / 2];           /* ties */
        else if (i == 5) p[i] = 0;
        else if (i == 6) p[i] = 1;
        else p[i] = (double)(r % 100000u) / 1e6 * ((i % 3) ? 1 : 1e-3);
    }
    size_t rank[M];
    for (size_t i = 0; i < M; i++) {
        rank[i] = 1;
        for (size_t j = 0; j < M; j++)
            if (p[j] < p[i] || (p[j] == p[i] && j < i)) rank[i]++;
    }
    double want_holm[M], want_fdr[M];
    for (size_t i = 0; i < M; i++) {
        double h = 0, f = 1;
        for (size_t j = 0; j < M; j++) {
            if (rank[j] <= rank[i]) {
                double v = (double)(M - rank[j] + 1) * p[j];
                if (v > 1) v = 1;
                if (v > h) h = v;
            }
            if (rank[j] >= rank[i]) {
                double v = (double)M * p[j] / (double)rank[j];
                if (v > 1) v = 1;
                if (v < f) f = v;
            }
        }
        want_holm[i] = h;
        want_fdr[i] = f;
    }
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, p, M, holm), AVOW_OK, "holm");
    CHECK_VEC_EQ(holm, want_holm, M, "holm vs definition");
    CHECK_STATUS(mult_adjust_p(ADJ_FDR, p, M, fdr), AVOW_OK, "fdr");
    CHECK_VEC_EQ(fdr, want_fdr, M, "fdr vs definition");
    CHECK_STATUS(mult_adjust_p(ADJ_BONFERRONI, p, M, bonf), AVOW_OK, "bonferroni");
    CHECK_STATUS(mult_adjust_p(ADJ_NONE, p, M, none), AVOW_OK, "none");
    CHECK_VEC_EQ(none, p, M, "none is the identity");
    /* Orderings that hold for every family: p <= fdr <= holm <= bonferroni. */
    for (size_t i = 0; i < M; i++) {
        if (!(p[i] <= fdr[i] && fdr[i] <= holm[i] && holm[i] <= bonf[i] && bonf[i] <= 1)) {
            print_error("order at %zu: p %.17g fdr %.17g holm %.17g bonf %.17g\n", i, p[i],
                        fdr[i], holm[i], bonf[i]);
            fail();
        }
    }
}

/* Caps at 1, the ends 0 and 1, and Sidak's accuracy at tiny p. */
static void test_caps_and_tiny_p(void **state)
{
    (void)state;
    const double p[4] = {0.5, 0.9, 1.0, 0.0};
    double got[4];
    CHECK_STATUS(mult_adjust_p(ADJ_BONFERRONI, p, 4, got), AVOW_OK, "bonferroni cap");
    CHECK_VEC_EQ(got, ((const double[4]){1, 1, 1, 0}), 4, "bonferroni cap");
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, p, 4, got), AVOW_OK, "holm cap");
    CHECK_VEC_EQ(got, ((const double[4]){1, 1, 1, 0}), 4, "holm cap");
    CHECK_STATUS(mult_adjust_p(ADJ_SIDAK, p, 4, got), AVOW_OK, "sidak ends");
    CHECK_EQ(got[2], 1, "sidak p = 1");
    CHECK_EQ(got[3], 0, "sidak p = 0");
    /* 1 - 0.5^4 = 15/16 and 1 - 0.1^4 = 0.9999 (exact arithmetic by hand). */
    CHECK_REL(got[0], 15.0 / 16, 1e-15, "sidak 1 - 0.5^4");
    CHECK_REL(got[1], 0.9999, 1e-15, "sidak 1 - 0.1^4");
    CHECK_STATUS(mult_adjust_p(ADJ_FDR, p, 4, got), AVOW_OK, "fdr cap");
    /* ranks: 0 (1), 0.5 (2), 0.9 (3), 1 (4): 4*1/4 = 1, 4*0.9/3 = 1.2 -> 1, 4*0.5/2 = 1. */
    CHECK_VEC_EQ(got, ((const double[4]){1, 1, 1, 0}), 4, "fdr cap");

    /* Sidak at p = 1e-20, m = 10: 1 - (1 - p)^m = m p - 45 p^2 + ..., i.e. 1e-19 to a
     * relative 4.5e-19; the naive 1 - pow(1 - p, m) gives 0. */
    double tiny[10], tiny_adj[10];
    for (size_t i = 0; i < 10; i++) tiny[i] = 1e-20;
    CHECK_STATUS(mult_adjust_p(ADJ_SIDAK, tiny, 10, tiny_adj), AVOW_OK, "sidak tiny");
    CHECK_REL(tiny_adj[0], 1e-19, 1e-15, "sidak at p = 1e-20, m = 10");
}

/* In place: p_adj may be p. */
static void test_in_place(void **state)
{
    (void)state;
    static const avow_adjust methods[] = {ADJ_NONE, ADJ_BONFERRONI, ADJ_HOLM, ADJ_SIDAK,
                                          ADJ_FDR};
    for (size_t k = 0; k < sizeof methods / sizeof methods[0]; k++) {
        double sep[5], inplace[5];
        memcpy(inplace, MC_P, sizeof inplace);
        CHECK_STATUS(mult_adjust_p(methods[k], MC_P, 5, sep), AVOW_OK, mult_name(methods[k]));
        CHECK_STATUS(mult_adjust_p(methods[k], inplace, 5, inplace), AVOW_OK,
                     mult_name(methods[k]));
        CHECK_VEC_EQ(inplace, sep, 5, mult_name(methods[k]));
    }
}

static void test_invalid_arguments(void **state)
{
    (void)state;
    double out[3] = {7, 7, 7};
    const double ok[3] = {0.1, 0.2, 0.3};
    const double want_untouched[3] = {7, 7, 7};
    CHECK_STATUS(mult_adjust_p(ADJ_SCHEFFE, ok, 3, out), AVOW_EDOM, "scheffe is not p-based");
    CHECK_STATUS(mult_adjust_p((avow_adjust)42, ok, 3, out), AVOW_EDOM, "unknown method");
    static const double bad[] = {-0.01, 1.0000001, NAN, INFINITY};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        const double p[3] = {0.1, bad[i], 0.3};
        for (int m = ADJ_NONE; m <= ADJ_FDR; m++)
            CHECK_STATUS(mult_adjust_p((avow_adjust)m, p, 3, out), AVOW_EDOM, "bad p-value");
    }
    CHECK_VEC_EQ(out, want_untouched, 3, "output untouched on error");
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, NULL, 3, out), AVOW_EDOM, "NULL p");
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, ok, 3, NULL), AVOW_EDOM, "NULL p_adj");
    CHECK_STATUS(mult_adjust_p(ADJ_HOLM, NULL, 0, NULL), AVOW_OK, "m = 0");
    CHECK_STATUS(mult_adjust_p(ADJ_FDR, ok, 0, out), AVOW_OK, "m = 0");
    CHECK_VEC_EQ(out, want_untouched, 3, "m = 0 writes nothing");
}

/* Holm and fdr allocate a ranking buffer: a failed allocation is reported and leaves
 * the output alone; the other methods do not allocate. */
static void test_out_of_memory(void **state)
{
    (void)state;
    double out[5] = {7, 7, 7, 7, 7};
    const double untouched[5] = {7, 7, 7, 7, 7};
    avow_mem_fail_after(0);
    int st_holm = mult_adjust_p(ADJ_HOLM, MC_P, 5, out);
    int st_fdr = mult_adjust_p(ADJ_FDR, MC_P, 5, out);
    avow_mem_fail_after(-1);
    CHECK_STATUS(st_holm, AVOW_ENOMEM, "holm without memory");
    CHECK_STATUS(st_fdr, AVOW_ENOMEM, "fdr without memory");
    CHECK_VEC_EQ(out, untouched, 5, "output untouched on AVOW_ENOMEM");
    avow_mem_fail_after(0);
    int st_bonf = mult_adjust_p(ADJ_BONFERRONI, MC_P, 5, out);
    avow_mem_fail_after(-1);
    CHECK_STATUS(st_bonf, AVOW_OK, "bonferroni needs no memory");
}

/* Rejection: p_adj <= alpha, so a p-value equal to alpha rejects. */
static void test_reject(void **state)
{
    (void)state;
    const double p_adj[6] = {0.05, 0.0499, 0.0501, 0, 1, 0.049999999999999996};
    int rej[6] = {-1, -1, -1, -1, -1, -1};
    CHECK_STATUS(mult_reject(ADJ_HOLM, p_adj, 6, 0.05, rej), AVOW_OK, "reject");
    const int want[6] = {1, 1, 0, 1, 0, 1};
    for (size_t i = 0; i < 6; i++) {
        if (rej[i] != want[i]) {
            print_error("reject[%zu] for p_adj %.17g at alpha 0.05: got %d, want %d\n", i,
                        p_adj[i], rej[i], want[i]);
            fail();
        }
    }
    /* MC-bh at alpha = 0.05 (adjusted values from the routine itself): all but the
     * last (adjusted 1/5) reject. */
    double adj[5];
    int r[5];
    CHECK_STATUS(mult_adjust_p(ADJ_FDR, MC_P, 5, adj), AVOW_OK, "MC-bh");
    CHECK_STATUS(mult_reject(ADJ_FDR, adj, 5, 0.05, r), AVOW_OK, "MC-bh reject");
    assert_int_equal(r[0] + r[1] + r[2] + r[3], 4);
    assert_int_equal(r[4], 0);

    int untouched[2] = {-1, -1};
    const double two[2] = {0.01, 0.5};
    CHECK_STATUS(mult_reject(ADJ_HOLM, two, 2, 0, untouched), AVOW_EDOM, "alpha = 0");
    CHECK_STATUS(mult_reject(ADJ_HOLM, two, 2, 1, untouched), AVOW_EDOM, "alpha = 1");
    CHECK_STATUS(mult_reject(ADJ_HOLM, two, 2, NAN, untouched), AVOW_EDOM, "alpha NaN");
    CHECK_STATUS(mult_reject((avow_adjust)42, two, 2, 0.05, untouched), AVOW_EDOM,
                 "unknown method");
    const double badp[2] = {0.01, NAN};
    CHECK_STATUS(mult_reject(ADJ_HOLM, badp, 2, 0.05, untouched), AVOW_EDOM, "NaN p_adj");
    CHECK_STATUS(mult_reject(ADJ_HOLM, NULL, 2, 0.05, untouched), AVOW_EDOM, "NULL p_adj");
    CHECK_STATUS(mult_reject(ADJ_HOLM, two, 2, 0.05, NULL), AVOW_EDOM, "NULL reject");
    assert_int_equal(untouched[0], -1);
    assert_int_equal(untouched[1], -1);
    CHECK_STATUS(mult_reject(ADJ_SCHEFFE, two, 2, 0.05, untouched), AVOW_OK,
                 "scheffe p-values reject the same way");
    assert_int_equal(untouched[0], 1);
    assert_int_equal(untouched[1], 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_names),
        cmocka_unit_test(test_mc_bonferroni),
        cmocka_unit_test(test_mc_holm),
        cmocka_unit_test(test_mc_sidak),
        cmocka_unit_test(test_mc_bh),
        cmocka_unit_test(test_mc_sidak_alpha),
        cmocka_unit_test(test_mc_critical_values),
        cmocka_unit_test(test_ties),
        cmocka_unit_test(test_against_definitions),
        cmocka_unit_test(test_caps_and_tiny_p),
        cmocka_unit_test(test_in_place),
        cmocka_unit_test(test_invalid_arguments),
        cmocka_unit_test(test_out_of_memory),
        cmocka_unit_test(test_reject),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
