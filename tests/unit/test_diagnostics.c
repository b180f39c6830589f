/* test_diagnostics.c: assumption diagnostics and robust alternatives (src/diagnostics.c).
 *
 * Reference values come from the project's methods note (shared/reference/methods.md,
 * sections 5, 6 and 8) and check-values.json beside it; each check names its ID and the
 * source stated there, and uses the tolerance stated there. Source codes used below:
 *   EX  = exact rational arithmetic (Python fractions) by the note's author;
 *   MP  = mpmath 1.2.1 at 40 digits (p-values);
 *   SP  = SciPy 1.10.1, the function named;
 *   OWN = the note author's own double-precision implementation of Royston's
 *         Shapiro-Wilk approximation (SciPy agrees with it to about 1e-7);
 *   MEM = quoted from memory by the note's author, not checked against the page.
 * The note's tolerance policy: exact rationals agree after rounding to binary64 (so an
 * exact statistic must equal num/den, itself correctly rounded by one IEEE division of
 * two integers below 2^53); mpmath values to the relative tolerances of each entry.
 * The data of the worked examples (methods.md section 11):
 *   NIST  = NIST/SEMATECH e-Handbook 7.4.3.4 one-way example (WX-nist-7.4.3);
 *   BULB  = lamp lifetimes with unequal n, course notes (WX-bulb).
 * Checks without an outside value test identities, invariances and statuses; they
 * state why the expected value holds. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include "numcheck.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "avow/diagnostics.h"
#include "avow/util.h"

/* ---- helpers ---- */

/* Fail unless got == want exactly (as doubles). */
static void eq_at(double got, double want, const char *what, const char *file, int line)
{
    if (!(got == want)) {
        print_error("%s: got %.17g, want exactly %.17g\n", what, got, want);
        _fail(file, line);
    }
}
#define CHECK_EQ(got, want, what) eq_at((got), (want), (what), __FILE__, __LINE__)

/* Fail unless the status is as expected. */
static void st_at(int got, int want, const char *what, const char *file, int line)
{
    if (got != want) {
        print_error("%s: status %d (%s), want %d (%s)\n", what, got, dx_status_text(got),
                    want, dx_status_text(want));
        _fail(file, line);
    }
}
#define CHECK_ST(got, want, what) st_at((got), (want), (what), __FILE__, __LINE__)

#define MAXV 6000
#define MAXG 80

/* Groups parsed from text: decimals separated by spaces, groups by '|'. */
typedef struct dataset {
    avow_dec v[MAXV];
    avow_dx_group g[MAXG];
    size_t k;
    size_t n;
} dataset;

static void load(dataset *d, const char *text)
{
    d->k = 0;
    d->n = 0;
    size_t start = 0;
    const char *p = text;
    for (;;) {
        while (*p == ' ') p++;
        if (*p == '|' || *p == 0) {
            assert_true(d->k < MAXG);
            d->g[d->k].values = d->v + start;
            d->g[d->k].n = d->n - start;
            d->k++;
            start = d->n;
            if (*p == 0) break;
            p++;
            continue;
        }
        size_t len = strcspn(p, " |");
        assert_true(d->n < MAXV);
        assert_int_equal(dec_parse(p, len, &d->v[d->n]), AVOW_OK);
        d->n++;
        p += len;
    }
}

static const char NIST[] = "6.9 5.4 5.8 4.6 4.0 | 8.3 6.8 7.8 9.2 6.5 | 8.0 10.5 8.1 6.9 9.3";
static const char BULB[] = "507 511 509 | 504 506 508 505 502 | 510 508 506 508";

static dataset ds, ds2;

/* ---- Levene and Brown-Forsythe (methods.md section 6) ---- */

static void test_levene_nist(void **state)
{
    (void)state;
    avow_dx_ftest r;
    load(&ds, NIST);
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, &r), AVOW_OK, "LV-mean-nist");
    /* LV-mean-nist: W = 6552/28633 (EX), p = 0.7988586459302591 (MP), tol p rel 1e-10 */
    CHECK_EQ(r.stat, 6552.0 / 28633.0, "LV-mean-nist W (EX 6552/28633)");
    CHECK_REL(r.stat, 0.22882687807774246, 1e-13, "LV-mean-nist W float");
    CHECK_EQ(r.df1, 2, "LV-mean-nist df1");
    CHECK_EQ(r.df2, 12, "LV-mean-nist df2");
    CHECK_REL(r.p, 0.7988586459302591, 1e-10, "LV-mean-nist p (MP)");

    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEDIAN, &r), AVOW_OK, "LV-median-nist");
    /* LV-median-nist: W = 114/1717 (EX), p = 0.9361025880088414 (MP) */
    CHECK_EQ(r.stat, 114.0 / 1717.0, "LV-median-nist W (EX 114/1717)");
    CHECK_REL(r.stat, 0.06639487478159581, 1e-13, "LV-median-nist W float");
    CHECK_REL(r.p, 0.9361025880088414, 1e-10, "LV-median-nist p (MP)");
}

static void test_levene_bulb(void **state)
{
    (void)state;
    avow_dx_ftest r;
    load(&ds, BULB);
    /* LV-mean-bulb and LV-median-bulb: W = 27/104 (EX) both, df (2, 9),
     * p = 0.7769318823741092 (MP), tol W rel 1e-13, p rel 1e-10 */
    for (int c = 0; c < 2; c++) {
        const char *id = c ? "LV-median-bulb" : "LV-mean-bulb";
        CHECK_ST(dx_levene(ds.g, ds.k, c ? AVOW_DX_MEDIAN : AVOW_DX_MEAN, &r), AVOW_OK, id);
        CHECK_EQ(r.stat, 27.0 / 104.0, id);
        CHECK_REL(r.stat, 0.25961538461538464, 1e-13, id);
        CHECK_EQ(r.df1, 2, id);
        CHECK_EQ(r.df2, 9, id);
        CHECK_REL(r.p, 0.7769318823741092, 1e-10, id);
    }
}

/* The general (GMP) path gives the same correctly rounded exact values as the fast
 * path: both round the same rational once. */
static void test_levene_paths_agree(void **state)
{
    (void)state;
    const char *sets[] = { NIST, BULB, "1 2 | 3 5 | 10", "-1.25 3e5 7 | 0.001 0 -2 | 4 4 4 5" };
    for (size_t s = 0; s < sizeof sets / sizeof *sets; s++) {
        load(&ds, sets[s]);
        for (int c = 0; c < 2; c++) {
            avow_dx_ftest a, b;
            avow_dx_centre ce = c ? AVOW_DX_MEDIAN : AVOW_DX_MEAN;
            int sa = dx_levene(ds.g, ds.k, ce, &a), sb = dx_levene_big(ds.g, ds.k, ce, &b);
            CHECK_ST(sb, sa, "dx_levene_big status");
            if (sa == AVOW_OK) {
                CHECK_EQ(b.stat, a.stat, "dx_levene_big W");
                CHECK_EQ(b.p, a.p, "dx_levene_big p");
            }
        }
    }
}

/* Invariances of the exact statistics, which must hold bit for bit: W (Levene and
 * Brown-Forsythe) is unchanged by y -> a + b y, by a shift of one group alone (the
 * centre moves with it), and by the order of values within a group. Here the NIST data
 * are shifted by 10^15 (a value of 17 digits, still the fast path), multiplied by
 * 10^-300 (exponents far from the originals), with group 1 shifted by 1e16 and group
 * 3 by 0.05 (scaled values need 19 digits: the general path), and reordered. */
static void test_levene_invariance(void **state)
{
    (void)state;
    avow_dx_ftest a, b;
    load(&ds, NIST);
    for (int c = 0; c < 2; c++) {
        avow_dx_centre ce = c ? AVOW_DX_MEDIAN : AVOW_DX_MEAN;
        CHECK_ST(dx_levene(ds.g, ds.k, ce, &a), AVOW_OK, "NIST");
        load(&ds2, "1000000000000006.9 1000000000000005.4 1000000000000005.8 "
                   "1000000000000004.6 1000000000000004.0 | 1000000000000008.3 "
                   "1000000000000006.8 1000000000000007.8 1000000000000009.2 "
                   "1000000000000006.5 | 1000000000000008.0 1000000000000010.5 "
                   "1000000000000008.1 1000000000000006.9 1000000000000009.3");
        CHECK_ST(dx_levene(ds2.g, ds2.k, ce, &b), AVOW_OK, "NIST + 1e15");
        CHECK_EQ(b.stat, a.stat, "W(NIST + 1e15) = W(NIST)");
        load(&ds2, "6.9e-300 5.4e-300 5.8e-300 4.6e-300 4.0e-300 | 8.3e-300 6.8e-300 "
                   "7.8e-300 9.2e-300 6.5e-300 | 8.0e-300 10.5e-300 8.1e-300 6.9e-300 "
                   "9.3e-300");
        CHECK_ST(dx_levene(ds2.g, ds2.k, ce, &b), AVOW_OK, "NIST 1e-300");
        CHECK_EQ(b.stat, a.stat, "W(NIST 1e-300) = W(NIST)");
        load(&ds2, "10000000000000006.9 10000000000000005.4 10000000000000005.8 "
                   "10000000000000004.6 10000000000000004.0 | 8.3 6.8 7.8 9.2 6.5 | "
                   "8.05 10.55 8.15 6.95 9.35");
        CHECK_ST(dx_levene(ds2.g, ds2.k, ce, &b), AVOW_OK, "NIST, groups shifted");
        CHECK_EQ(b.stat, a.stat, "W(group 1 + 1e16, group 3 + 0.05) = W(NIST)");
        load(&ds2, "4.0 5.8 6.9 4.6 5.4 | 9.2 6.5 8.3 7.8 6.8 | 6.9 9.3 8.0 8.1 10.5");
        CHECK_ST(dx_levene(ds2.g, ds2.k, ce, &b), AVOW_OK, "NIST reordered");
        CHECK_EQ(b.stat, a.stat, "W(reordered) = W(NIST)");
    }
}

static void test_levene_edges(void **state)
{
    (void)state;
    avow_dx_ftest r;
    /* k = 2: df (1, N - 2) */
    load(&ds, "6.9 5.4 5.8 4.6 4.0 | 8.3 6.8 7.8 9.2 6.5");
    CHECK_ST(dx_levene(ds.g, 2, AVOW_DX_MEAN, &r), AVOW_OK, "k = 2");
    CHECK_EQ(r.df1, 1, "k = 2 df1");
    CHECK_EQ(r.df2, 8, "k = 2 df2");
    /* a group of one value: allowed, its deviation is 0; df2 = N - k */
    load(&ds, "6.9 5.4 5.8 4.6 4.0 | 8.3 | 8.0 10.5 8.1 6.9 9.3");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEDIAN, &r), AVOW_OK, "n = 1 group");
    CHECK_EQ(r.df2, 8, "n = 1 group df2");
    assert_true(isfinite(r.stat) && r.stat >= 0 && r.p >= 0 && r.p <= 1);
    /* every group of two values: |y - centre| is the same for both, within-group SS of
     * z is 0 and W does not exist */
    load(&ds, "1 2 | 3 5 | 4 8");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, &r), AVOW_DX_ENOSPREAD, "pairs");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEDIAN, &r), AVOW_DX_ENOSPREAD, "pairs median");
    /* all values equal */
    load(&ds, "3 3 3 | 3.0 3 | 3 3.00");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, &r), AVOW_DX_ENOSPREAD, "all equal");
    /* one group constant, others vary: fine */
    load(&ds, "3 3 3 | 1 2 4 | 5 9 6");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, &r), AVOW_OK, "one constant group");
    /* no residual df: every group of one value */
    load(&ds, "1 | 2 | 3");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, &r), AVOW_DX_ENODF, "N = k");
    /* invalid arguments */
    load(&ds, NIST);
    CHECK_ST(dx_levene(ds.g, 1, AVOW_DX_MEAN, &r), AVOW_EDOM, "k = 1");
    CHECK_ST(dx_levene(NULL, 3, AVOW_DX_MEAN, &r), AVOW_EDOM, "NULL groups");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, NULL), AVOW_EDOM, "NULL out");
    CHECK_ST(dx_levene(ds.g, ds.k, (avow_dx_centre)7, &r), AVOW_EDOM, "bad centre");
    ds.g[1].n = 0;
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, &r), AVOW_EDOM, "empty group");
    /* digit span beyond AVOW_DX_MAX_DIGITS */
    load(&ds, "1e-3000 2 | 1e3000 4");
    CHECK_ST(dx_levene(ds.g, ds.k, AVOW_DX_MEAN, &r), AVOW_EOVERFLOW, "digit span");
}

/* ---- Bartlett ---- */

static void test_bartlett(void **state)
{
    (void)state;
    avow_dx_chisq r;
    load(&ds, NIST);
    CHECK_ST(dx_bartlett(ds.g, ds.k, &r), AVOW_OK, "BA-nist");
    /* BA-nist: T = 0.2336797162070151, p = 0.8897276644308412 (MP on exact variances),
     * tol T rel 1e-12, p rel 1e-10 */
    CHECK_REL(r.stat, 0.2336797162070151, 1e-12, "BA-nist T (MP)");
    CHECK_EQ(r.df, 2, "BA-nist df");
    CHECK_REL(r.p, 0.8897276644308412, 1e-10, "BA-nist p (MP)");
    load(&ds, BULB);
    CHECK_ST(dx_bartlett(ds.g, ds.k, &r), AVOW_OK, "BA-bulb");
    /* BA-bulb: T = 0.2786667797554314, p = 0.8699379515992902 (MP) */
    CHECK_REL(r.stat, 0.2786667797554314, 1e-12, "BA-bulb T (MP)");
    CHECK_REL(r.p, 0.8699379515992902, 1e-10, "BA-bulb p (MP)");

    /* T depends only on the variances: the NIST data shifted by 1e15 (exact decimals)
     * give the same exact variances, hence bit for bit the same T */
    avow_dx_chisq b;
    load(&ds, NIST);
    dx_bartlett(ds.g, ds.k, &r);
    load(&ds2, "1000000000000006.9 1000000000000005.4 1000000000000005.8 "
               "1000000000000004.6 1000000000000004.0 | 8.3 6.8 7.8 9.2 6.5 | "
               "8.0 10.5 8.1 6.9 9.3e0");
    CHECK_ST(dx_bartlett(ds2.g, ds2.k, &b), AVOW_OK, "shifted");
    CHECK_EQ(b.stat, r.stat, "T(group 1 + 1e15) = T(NIST)");

    /* equal variances: T = 0 exactly (every eps_i is 0) */
    load(&ds, "1 2 3 | 11 12 13 | 5 6 7");
    CHECK_ST(dx_bartlett(ds.g, ds.k, &r), AVOW_OK, "equal variances");
    CHECK_EQ(r.stat, 0.0, "equal variances T");
    CHECK_EQ(r.p, 1.0, "equal variances p");

    /* closed form for k = 2 groups with the same nu = n - 1 and variances 1 and rho:
     * s_p^2 = (1 + rho)/2, numerator = nu ln((1 + rho)^2/(4 rho)), C = 1 + 1/(2 nu),
     * from the formula of methods.md section 6. With rho = 1e-20 (a variance ratio whose
     * eps = rho/s_p^2 - 1 is -1 to binary64) and nu = 2:
     * T = 1.6 ln(2.5e19) (1 + 1e-20 contributes below 1e-19 relative) */
    load(&ds, "1 2 3 | 1e-10 2e-10 3e-10");
    CHECK_ST(dx_bartlett(ds.g, ds.k, &r), AVOW_OK, "variance ratio 1e-20");
    CHECK_REL(r.stat, 1.6 * (log(2.5) + 19 * log(10.0)), 1e-15, "T, variance ratio 1e-20");
    /* nearly equal variances, where ln s_p^2 - ln s_i^2 would cancel: groups 0 1 2
     * (s^2 = 1) and 0 1.000001 2.000002 (s^2 = rho = 1.000001^2, rho - 1 = d =
     * 2.000001e-6): (1 + rho)^2/(4 rho) = 1 + d^2/(4 (1 + d)), so
     * T = 1.6 log1p(d^2/(4 (1 + d))), about 1.6e-12 */
    load(&ds, "0 1 2 | 0 1.000001 2.000002");
    CHECK_ST(dx_bartlett(ds.g, ds.k, &r), AVOW_OK, "nearly equal variances");
    {
        double d = 2.000001e-6;
        CHECK_REL(r.stat, 1.6 * log1p(d * d / (4 * (1 + d))), 1e-14, "T, nearly equal variances");
    }
    /* statuses */
    load(&ds, "1 2 3 | 4 4 4 | 5 7");
    CHECK_ST(dx_bartlett(ds.g, ds.k, &r), AVOW_DX_EZEROVAR, "zero variance group");
    load(&ds, "1 2 3 | 4 | 5 7");
    CHECK_ST(dx_bartlett(ds.g, ds.k, &r), AVOW_DX_ESMALL, "n = 1 group");
    CHECK_ST(dx_bartlett(ds.g, 1, &r), AVOW_EDOM, "k = 1");
    CHECK_ST(dx_bartlett(ds.g, ds.k, NULL), AVOW_EDOM, "NULL out");
}

/* ---- Welch ---- */

static void test_welch(void **state)
{
    (void)state;
    avow_dx_ftest r;
    load(&ds, NIST);
    CHECK_ST(dx_welch(ds.g, ds.k, &r), AVOW_OK, "WE-nist");
    /* WE-nist: F = 57802453829708/6405597370965, df2 = 909055461136/114631586211 (EX),
     * p = 0.00905139857912335 (MP), tol F, df2 rel 1e-13, p rel 1e-10 */
    CHECK_EQ(r.stat, 57802453829708.0 / 6405597370965.0, "WE-nist F (EX)");
    CHECK_REL(r.stat, 9.02374134404893, 1e-13, "WE-nist F float");
    CHECK_EQ(r.df1, 2, "WE-nist df1");
    CHECK_EQ(r.df2, 909055461136.0 / 114631586211.0, "WE-nist df2 (EX)");
    CHECK_REL(r.df2, 7.9302353843618665, 1e-13, "WE-nist df2 float");
    CHECK_REL(r.p, 0.00905139857912335, 1e-10, "WE-nist p (MP)");

    load(&ds, BULB);
    CHECK_ST(dx_welch(ds.g, ds.k, &r), AVOW_OK, "WE-bulb");
    /* WE-bulb: F = 33228/9151, df2 = 5408/1039 (EX), p = 0.10297929397385346 (MP) */
    CHECK_EQ(r.stat, 33228.0 / 9151.0, "WE-bulb F (EX)");
    CHECK_EQ(r.df2, 5408.0 / 1039.0, "WE-bulb df2 (EX)");
    CHECK_REL(r.p, 0.10297929397385346, 1e-10, "WE-bulb p (MP)");

    /* WE-k2: NIST groups 1-2, F = Welch t^2 = 11.489655172413793, df2 =
     * 7.9987349408097765, p = 0.009507253160036143 (EX, MP; SP ttest_ind(equal_var=
     * False) gives t^2 = 11.489655172413793, p = 0.00950725316003614), tol rel 1e-12 */
    load(&ds, "6.9 5.4 5.8 4.6 4.0 | 8.3 6.8 7.8 9.2 6.5");
    CHECK_ST(dx_welch(ds.g, ds.k, &r), AVOW_OK, "WE-k2");
    CHECK_REL(r.stat, 11.489655172413793, 1e-12, "WE-k2 F");
    CHECK_EQ(r.df1, 1, "WE-k2 df1");
    CHECK_REL(r.df2, 7.9987349408097765, 1e-12, "WE-k2 df2");
    CHECK_REL(r.p, 0.009507253160036143, 1e-12, "WE-k2 p (MP)");
    CHECK_REL(r.p, 0.00950725316003614, 1e-12, "WE-k2 p (SP ttest_ind)");

    /* equal means: F = 0 exactly, p = 1 */
    load(&ds, "1 2 3 | 0 2 4 | 2 2.5 1.5");
    CHECK_ST(dx_welch(ds.g, ds.k, &r), AVOW_OK, "equal means");
    CHECK_EQ(r.stat, 0.0, "equal means F");
    CHECK_EQ(r.p, 1.0, "equal means p");

    load(&ds, "1 2 3 | 4 4 4 | 5 7");
    CHECK_ST(dx_welch(ds.g, ds.k, &r), AVOW_DX_EZEROVAR, "zero variance group");
    load(&ds, "1 2 3 | 4 | 5 7");
    CHECK_ST(dx_welch(ds.g, ds.k, &r), AVOW_DX_ESMALL, "n = 1 group");
    CHECK_ST(dx_welch(ds.g, 1, &r), AVOW_EDOM, "k = 1");
}

/* Welch with more than AVOW_DX_WELCH_EXACT_K groups goes through binary64. Both paths
 * are checked against each other (dx_welch_exact, dx_welch_double force one path) on the
 * worked examples and on 66 groups built from the NIST and BULB groups, at 1e-14
 * relative: the accuracy claimed in diagnostics.h for the binary64 path (the exact path
 * is the correctly rounded value). */
static void test_welch_paths(void **state)
{
    (void)state;
    const char *sets[] = { NIST, BULB, "6.9 5.4 5.8 4.6 4.0 | 8.3 6.8 7.8 9.2 6.5",
                           "1000000.1 1000000.3 1000000.2 | 1000000.25 1000000.27 | 1000001 1000003" };
    avow_dx_ftest a, b;
    for (size_t s = 0; s < sizeof sets / sizeof *sets; s++) {
        load(&ds, sets[s]);
        CHECK_ST(dx_welch_exact(ds.g, ds.k, &a), AVOW_OK, "exact path");
        CHECK_ST(dx_welch_double(ds.g, ds.k, &b), AVOW_OK, "binary64 path");
        CHECK_REL(b.stat, a.stat, 1e-14, "Welch F, binary64 path vs exact");
        CHECK_REL(b.df2, a.df2, 1e-14, "Welch df2, binary64 path vs exact");
        CHECK_ST(dx_welch(ds.g, ds.k, &b), AVOW_OK, "dx_welch");
        CHECK_EQ(b.stat, a.stat, "dx_welch takes the exact path for k <= 64");
    }
    /* 66 groups: the three NIST groups and three BULB groups, eleven times each, the
     * BULB ones shifted by 1000 per copy (a different mean in every group) */
    static char text[8192];
    size_t len = 0;
    for (int c = 0; c < 11; c++) {
        len += (size_t)snprintf(text + len, sizeof text - len, "%s%s | ", c ? " | " : "", NIST);
        len += (size_t)snprintf(text + len, sizeof text - len,
                                "%d %d %d | %d %d %d %d %d | %d %d %d %d",
                                1507 + 1000 * c, 1511 + 1000 * c, 1509 + 1000 * c,
                                1504 + 1000 * c, 1506 + 1000 * c, 1508 + 1000 * c,
                                1505 + 1000 * c, 1502 + 1000 * c, 1510 + 1000 * c,
                                1508 + 1000 * c, 1506 + 1000 * c, 1508 + 1000 * c);
    }
    load(&ds, text);
    assert_int_equal(ds.k, 66);
    CHECK_ST(dx_welch_exact(ds.g, ds.k, &a), AVOW_OK, "exact path, k = 66");
    CHECK_ST(dx_welch(ds.g, ds.k, &b), AVOW_OK, "dx_welch, k = 66");
    CHECK_REL(b.stat, a.stat, 1e-14, "Welch F k = 66, binary64 path vs exact");
    CHECK_REL(b.df2, a.df2, 1e-14, "Welch df2 k = 66, binary64 path vs exact");
    CHECK_EQ(b.df1, 65, "Welch k = 66 df1");
}

/* ---- Kruskal-Wallis ---- */

static void test_kruskal(void **state)
{
    (void)state;
    avow_dx_kw r;
    load(&ds, NIST);
    CHECK_ST(dx_kruskal(ds.g, ds.k, &r), AVOW_OK, "KW-nist");
    /* KW-nist: H uncorrected 67/8, tie factor 559/560, H = 4690/559 (EX),
     * p = 0.015070877263608446 (MP), tol H rel 1e-13, p rel 1e-10 */
    CHECK_EQ(r.h_uncorrected, 67.0 / 8.0, "KW-nist H uncorrected (EX)");
    CHECK_EQ(r.tie_factor, 559.0 / 560.0, "KW-nist tie factor (EX)");
    CHECK_EQ(r.test.stat, 4690.0 / 559.0, "KW-nist H (EX)");
    CHECK_REL(r.test.stat, 8.389982110912344, 1e-13, "KW-nist H float");
    CHECK_EQ(r.test.df, 2, "KW-nist df");
    CHECK_REL(r.test.p, 0.015070877263608446, 1e-10, "KW-nist p (MP)");

    load(&ds, BULB);
    CHECK_ST(dx_kruskal(ds.g, ds.k, &r), AVOW_OK, "KW-bulb");
    /* KW-bulb: H uncorrected 17003/3120, tie factor 281/286, H = 187033/33720 (EX),
     * p = 0.06245403476718784 (MP) */
    CHECK_EQ(r.h_uncorrected, 17003.0 / 3120.0, "KW-bulb H uncorrected (EX)");
    CHECK_EQ(r.tie_factor, 281.0 / 286.0, "KW-bulb tie factor (EX)");
    CHECK_EQ(r.test.stat, 187033.0 / 33720.0, "KW-bulb H (EX)");
    CHECK_REL(r.test.p, 0.06245403476718784, 1e-10, "KW-bulb p (MP)");

    /* ranks are invariant under any increasing map: the BULB values written as powers
     * of ten 10^v (exponents 502..511, far outside binary64) give the same H bit for
     * bit; ties are found on the exact decimals */
    avow_dx_kw b;
    load(&ds2, "1e507 1e511 1e509 | 1e504 1e506 1e508 1e505 1e502 | 1e510 1e508 1e506 1e508");
    CHECK_ST(dx_kruskal(ds2.g, ds2.k, &b), AVOW_OK, "KW-bulb as powers of ten");
    CHECK_EQ(b.test.stat, r.test.stat, "H(10^y) = H(y)");
    /* equal decimals written differently are ties: 508, 508.0, 5.080e2 */
    load(&ds2, "507 511 509 | 504 506 508.0 505 502 | 510 5.080e2 506 508.000");
    CHECK_ST(dx_kruskal(ds2.g, ds2.k, &b), AVOW_OK, "ties written differently");
    CHECK_EQ(b.test.stat, r.test.stat, "ties by exact value");

    /* edges: k = 2, groups of one value, all tied */
    load(&ds, "1 | 2 | 3");
    CHECK_ST(dx_kruskal(ds.g, ds.k, &r), AVOW_OK, "n = 1 groups");
    /* three singletons: R = 1, 2, 3, H = 12/(3 4) 14 - 12 = 2 (from the formula);
     * no ties */
    CHECK_EQ(r.test.stat, 2.0, "three singletons H");
    CHECK_EQ(r.tie_factor, 1.0, "no ties");
    load(&ds, "5 5 | 5 5.0 5");
    CHECK_ST(dx_kruskal(ds.g, ds.k, &r), AVOW_DX_EALLTIED, "all tied");
    CHECK_ST(dx_kruskal(ds.g, 1, &r), AVOW_EDOM, "k = 1");
    CHECK_ST(dx_kruskal(NULL, 2, &r), AVOW_EDOM, "NULL");
}

/* ---- Shapiro-Wilk (methods.md section 5) ---- */

static void sw(const double *x, size_t n, avow_dx_sw *r)
{
    CHECK_ST(dx_shapiro(x, n, r), AVOW_OK, "dx_shapiro");
}

static void test_shapiro_values(void **state)
{
    (void)state;
    avow_dx_sw r;
    static const double weights[] = {148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236};
    sw(weights, 11, &r);
    /* SW-sw1965_weights (OWN): W = 0.7888146948353875 +-1e-9, p = 0.006703814056502984
     * +-1e-8 */
    CHECK_ABS(r.w, 0.7888146948353875, 1e-9, "SW-sw1965_weights W (OWN)");
    CHECK_ABS(r.p, 0.006703814056502984, 1e-8, "SW-sw1965_weights p (OWN)");
    /* SW-sw1965_weights-scipy (SP stats.shapiro, single precision): W =
     * 0.7888147830963135 +-5e-7, p = 0.006703833118081093 +-1e-5 */
    CHECK_ABS(r.w, 0.7888147830963135, 5e-7, "SW-sw1965_weights-scipy W (SP)");
    CHECK_ABS(r.p, 0.006703833118081093, 1e-5, "SW-sw1965_weights-scipy p (SP)");
    /* SW-1965-printed (MEM): Shapiro & Wilk (1965) printed W = 0.79 +-0.005 */
    CHECK_ABS(r.w, 0.79, 0.005, "SW-1965-printed W (MEM)");

    static const double three[] = {1, 2, 4};
    sw(three, 3, &r);
    /* SW-three-exact: W = 27/28 (exact: a = (-sqrt 1/2, 0, sqrt 1/2)); p =
     * (6/pi)(asin sqrt W - asin sqrt(3/4)) = 0.6368868450289699, tol p rel 1e-12.
     * W to the +-1e-9 of SW-three_1_2_4 (OWN), which gives W = 0.9642857142857146,
     * p = 0.6368868450289714 +-1e-8 */
    CHECK_ABS(r.w, 27.0 / 28.0, 1e-9, "SW-three-exact W");
    CHECK_REL(r.p, 0.6368868450289699, 1e-12, "SW-three-exact p");
    CHECK_ABS(r.w, 0.9642857142857146, 1e-9, "SW-three_1_2_4 W (OWN)");
    CHECK_ABS(r.p, 0.6368868450289714, 1e-8, "SW-three_1_2_4 p (OWN)");
    /* SW-three_1_2_4-scipy (SP): W = 0.9642857313156128 +-5e-7, p = 0.6368856430053711
     * +-1e-5 */
    CHECK_ABS(r.w, 0.9642857313156128, 5e-7, "SW-three_1_2_4-scipy W (SP)");
    CHECK_ABS(r.p, 0.6368856430053711, 1e-5, "SW-three_1_2_4-scipy p (SP)");

    static const double lev1[] = {6.9, 5.4, 5.8, 4.6, 4.0};
    sw(lev1, 5, &r);
    /* SW-nist_level1 (OWN): W = 0.984669417571964 +-1e-9, p = 0.9579395026655044 +-1e-8;
     * -scipy (SP): W = 0.9846692681312561 +-5e-7, p = 0.9579389095306396 +-1e-5 */
    CHECK_ABS(r.w, 0.984669417571964, 1e-9, "SW-nist_level1 W (OWN)");
    CHECK_ABS(r.p, 0.9579395026655044, 1e-8, "SW-nist_level1 p (OWN)");
    CHECK_ABS(r.w, 0.9846692681312561, 5e-7, "SW-nist_level1-scipy W (SP)");
    CHECK_ABS(r.p, 0.9579389095306396, 1e-5, "SW-nist_level1-scipy p (SP)");

    double sq[20];
    for (int i = 0; i < 20; i++) sq[i] = (double)(i + 1) * (i + 1);
    sw(sq, 20, &r);
    /* SW-squares_1_20 (OWN): W = 0.9061306284765464 +-1e-9, p = 0.053809588828203886
     * +-1e-8; -scipy (SP): W = 0.9061306715011597 +-5e-7, p = 0.05380954220890999 +-1e-5 */
    CHECK_ABS(r.w, 0.9061306284765464, 1e-9, "SW-squares_1_20 W (OWN)");
    CHECK_ABS(r.p, 0.053809588828203886, 1e-8, "SW-squares_1_20 p (OWN)");
    CHECK_ABS(r.w, 0.9061306715011597, 5e-7, "SW-squares_1_20-scipy W (SP)");
    CHECK_ABS(r.p, 0.05380954220890999, 1e-5, "SW-squares_1_20-scipy p (SP)");

    static const double sirstv[] = {
        196.3052, 196.124, 196.189, 196.2569, 196.3403, 196.3042, 196.3825, 196.1669,
        196.3257, 196.0422, 196.1303, 196.2005, 196.2889, 196.0343, 196.1811, 196.2795,
        196.1748, 196.1494, 196.1485, 195.9885, 196.2119, 196.1051, 196.185, 196.0052,
        196.209};
    sw(sirstv, 25, &r);
    /* SW-sirstv_pooled (OWN): W = 0.9720167399322719 +-1e-9, p = 0.69648038173256 +-1e-8;
     * -scipy (SP): W = 0.9720168113708496 +-5e-7, p = 0.6964817047119141 +-1e-5 */
    CHECK_ABS(r.w, 0.9720167399322719, 1e-9, "SW-sirstv_pooled W (OWN)");
    CHECK_ABS(r.p, 0.69648038173256, 1e-8, "SW-sirstv_pooled p (OWN)");
    CHECK_ABS(r.w, 0.9720168113708496, 5e-7, "SW-sirstv_pooled-scipy W (SP)");
    CHECK_ABS(r.p, 0.6964817047119141, 1e-5, "SW-sirstv_pooled-scipy p (SP)");

    double cu[60];
    for (int i = 0; i < 60; i++) cu[i] = (double)(i + 1) * (i + 1) * (i + 1);
    sw(cu, 60, &r);
    /* SW-cubes_1_60 (OWN): W = 0.8270904906028792 +-1e-9, p = 6.84311027305462e-07
     * +-1e-8; -scipy (SP): W = 0.8270906209945679 +-5e-7, p = 6.8431535282798e-07 +-1e-5 */
    CHECK_ABS(r.w, 0.8270904906028792, 1e-9, "SW-cubes_1_60 W (OWN)");
    CHECK_ABS(r.p, 6.84311027305462e-07, 1e-8, "SW-cubes_1_60 p (OWN)");
    CHECK_ABS(r.w, 0.8270906209945679, 5e-7, "SW-cubes_1_60-scipy W (SP)");
    CHECK_ABS(r.p, 6.8431535282798e-07, 1e-5, "SW-cubes_1_60-scipy p (SP)");
}

/* W and p do not depend on the order of the values, nor on a location and positive
 * scale change (W is a squared correlation); here checked to rounding level. */
static void test_shapiro_invariance(void **state)
{
    (void)state;
    static const double x[] = {148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236};
    double y[11];
    avow_dx_sw a, b;
    sw(x, 11, &a);
    for (int i = 0; i < 11; i++) y[i] = x[10 - i] * 0.001 - 1e3;
    sw(y, 11, &b);
    CHECK_REL(b.w, a.w, 1e-12, "W invariant (reversed, scaled, shifted)");
    CHECK_REL(b.p, a.p, 1e-10, "p invariant");
}

static void test_shapiro_edges(void **state)
{
    (void)state;
    avow_dx_sw r;
    static double big[5001];
    static const double two[] = {1, 2}, flat[] = {2, 2, 2, 2};
    CHECK_ST(dx_shapiro(two, 2, &r), AVOW_DX_ENRANGE, "n = 2");
    CHECK_ST(dx_shapiro(two, 0, &r), AVOW_DX_ENRANGE, "n = 0");
    for (int i = 0; i < 5001; i++) big[i] = sin((double)i) + (double)i * 1e-4;
    CHECK_ST(dx_shapiro(big, 5001, &r), AVOW_DX_ENRANGE, "n = 5001");
    CHECK_ST(dx_shapiro(big, 5000, &r), AVOW_OK, "n = 5000");
    assert_true(r.w > 0 && r.w <= 1 && r.p >= 0 && r.p <= 1);
    CHECK_ST(dx_shapiro(flat, 4, &r), AVOW_DX_EZERORANGE, "zero range");
    double nanx[] = {1, NAN, 3};
    CHECK_ST(dx_shapiro(nanx, 3, &r), AVOW_EDOM, "NaN");
    CHECK_ST(dx_shapiro(NULL, 3, &r), AVOW_EDOM, "NULL");
    /* n = 3 equally spaced: W = 1 (the data lie on the coefficients), p = 1 */
    static const double eq3[] = {1, 2, 3};
    sw(eq3, 3, &r);
    CHECK_REL(r.w, 1.0, 1e-15, "equally spaced n = 3 W");
    CHECK_REL(r.p, 1.0, 1e-12, "equally spaced n = 3 p");
    /* n = 3 with two equal values: the smallest possible W, 3/4, p = 0 (exact formula) */
    static const double t3[] = {1, 1, 2};
    sw(t3, 3, &r);
    CHECK_REL(r.w, 0.75, 1e-15, "n = 3 tie W");
    CHECK_ABS(r.p, 0.0, 1e-7, "n = 3 tie p");
}

/* ---- moments ---- */

/* g1 and g2 change sign / stay under reflection x -> -x, are unchanged by x -> a + b x
 * (b > 0), and g2 >= g1^2 - 2 (Pearson's inequality, b2 >= b1 + 1, for any
 * distribution, including the empirical one). SciPy agreement: tests/ref/diagnostics.py. */
static void test_moments(void **state)
{
    (void)state;
    static const double x[] = {148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236};
    double y[11];
    avow_dx_moments a, b;
    CHECK_ST(dx_moments(x, 11, &a), AVOW_OK, "moments");
    for (int i = 0; i < 11; i++) y[i] = -x[i];
    CHECK_ST(dx_moments(y, 11, &b), AVOW_OK, "moments reflected");
    CHECK_REL(b.skewness, -a.skewness, 1e-14, "g1(-x) = -g1(x)");
    CHECK_REL(b.kurtosis, a.kurtosis, 1e-14, "g2(-x) = g2(x)");
    for (int i = 0; i < 11; i++) y[i] = 1e6 + x[i] / 8;
    CHECK_ST(dx_moments(y, 11, &b), AVOW_OK, "moments shifted");
    /* 1e6 + x/8 is exact in binary64; the mean of such values is known to about
     * ulp(1e6) = 1.2e-10, against deviations of about 10: relative 1e-11 each */
    CHECK_REL(b.skewness, a.skewness, 1e-10, "g1(1e6 + x/8) = g1(x)");
    CHECK_REL(b.kurtosis, a.kurtosis, 1e-10, "g2(1e6 + x/8) = g2(x)");
    assert_true(a.kurtosis >= a.skewness * a.skewness - 2);
    static const double two[] = {1, 3};
    /* n = 2: the empirical distribution is two points with equal weight: g1 = 0, g2 = -2
     * (m4 = m2^2); both exact here */
    CHECK_ST(dx_moments(two, 2, &a), AVOW_OK, "n = 2");
    CHECK_EQ(a.skewness, 0.0, "n = 2 g1");
    CHECK_EQ(a.kurtosis, -2.0, "n = 2 g2");
    static const double flat[] = {5, 5, 5};
    CHECK_ST(dx_moments(flat, 3, &a), AVOW_DX_EZERORANGE, "zero variance");
    CHECK_ST(dx_moments(two, 1, &a), AVOW_EDOM, "n = 1");
}

/* ---- effect sizes (methods.md section 8) ---- */

static void test_effect_sizes(void **state)
{
    (void)state;
    /* ES-nist (EX): eta^2 = 20923/34012, omega^2 = 74966/140411, f = 1.2643250529065442,
     * from SSB = 20923/750, SSW = 4363/250 (WX-nist-7.4.3), df 2 and 12; tolerance
     * "exact" for the rational parts */
    mpq_t ssb, ssw, sst;
    mpq_inits(ssb, ssw, sst, NULL);
    mpq_set_ui(ssb, 20923, 750);
    mpq_set_ui(ssw, 4363, 250);
    mpq_canonicalize(ssb);
    mpq_canonicalize(ssw);
    mpq_add(sst, ssb, ssw);
    avow_dx_effect e;
    CHECK_ST(dx_effect_sizes_exact(ssb, 2, ssw, 12, sst, &e), AVOW_OK, "ES-nist exact");
    CHECK_EQ(e.eta2, 20923.0 / 34012.0, "ES-nist eta2 (EX)");
    CHECK_EQ(e.partial_eta2, 20923.0 / 34012.0, "ES-nist partial eta2 = eta2 (one-way)");
    CHECK_EQ(e.omega2, 74966.0 / 140411.0, "ES-nist omega2 (EX)");
    /* f: sqrt of the correctly rounded exact ratio, within 1 ulp */
    CHECK_REL(e.cohen_f, 1.2643250529065442, 2.3e-16, "ES-nist f (EX)");
    /* binary64 inputs (each the exact SS rounded once): a few roundings more */
    CHECK_ST(dx_effect_sizes(20923.0 / 750.0, 2, 17.452, 12, 17006.0 / 375.0, &e), AVOW_OK,
             "ES-nist double");
    CHECK_REL(e.eta2, 20923.0 / 34012.0, 1e-15, "ES-nist eta2 (EX), double inputs");
    CHECK_REL(e.omega2, 74966.0 / 140411.0, 1e-15, "ES-nist omega2 (EX), double inputs");
    CHECK_REL(e.cohen_f, 1.2643250529065442, 1e-15, "ES-nist f (EX), double inputs");
    /* omega^2 is negative when F < 1, and reported as computed: SS_effect = 1, df 2,
     * SS_error = 12, df 12 (MSE 1, F = 1/2): omega^2 = (1 - 2)/(13 + 1) = -1/14 */
    CHECK_ST(dx_effect_sizes(1, 2, 12, 12, 13, &e), AVOW_OK, "F < 1");
    CHECK_REL(e.omega2, -1.0 / 14.0, 1e-15, "negative omega2");
    CHECK_ST(dx_effect_sizes(1, 2, 0, 12, 13, &e), AVOW_EDOM, "SS_error = 0");
    CHECK_ST(dx_effect_sizes(-1, 2, 1, 12, 13, &e), AVOW_EDOM, "negative SS");
    CHECK_ST(dx_effect_sizes(1, 0, 1, 12, 13, &e), AVOW_EDOM, "df 0");
    CHECK_ST(dx_effect_sizes(NAN, 2, 1, 12, 13, &e), AVOW_EDOM, "NaN");
    CHECK_ST(dx_effect_sizes_exact(ssb, 0, ssw, 12, sst, &e), AVOW_EDOM, "exact df 0");
    mpq_clears(ssb, ssw, sst, NULL);
}

/* ---- studentized residuals ---- */

/* The externally studentized residual is the residual of y over its standard error
 * from the fit without y: in a cell-means model, t = (y - ybar_(-)) /
 * (s_(-) sqrt(1 + 1/(n - 1))), with ybar_(-) the mean of the other n - 1 values of its
 * cell and s_(-)^2 the residual mean square of all data without y, dfe - 1 df. Checked
 * here by that brute-force refit on the NIST data (and against numpy's least squares in
 * tests/ref/diagnostics.py). */
static void test_studentized(void **state)
{
    (void)state;
    static const double y[3][5] = {{6.9, 5.4, 5.8, 4.6, 4.0}, {8.3, 6.8, 7.8, 9.2, 6.5},
                                   {8.0, 10.5, 8.1, 6.9, 9.3}};
    double mean[3], sse = 0;
    for (int i = 0; i < 3; i++) {
        mean[i] = 0;
        for (int j = 0; j < 5; j++) mean[i] += y[i][j] / 5;
        for (int j = 0; j < 5; j++) sse += (y[i][j] - mean[i]) * (y[i][j] - mean[i]);
    }
    double mse = sse / 12;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 5; j++) {
            double e = y[i][j] - mean[i], r, t;
            CHECK_ST(dx_studentized(e, 5, mse, 12, &r, &t), AVOW_OK, "studentized");
            CHECK_REL(r, e / sqrt(mse * 0.8), 1e-15, "internal r = e / (s sqrt(1 - 1/n))");
            /* refit without y[i][j] */
            double m = 0, s2 = 0;
            for (int jj = 0; jj < 5; jj++) if (jj != j) m += y[i][jj] / 4;
            for (int ii = 0; ii < 3; ii++)
                for (int jj = 0; jj < 5; jj++) {
                    if (ii == i && jj == j) continue;
                    double c = ii == i ? m : mean[ii];
                    s2 += (y[ii][jj] - c) * (y[ii][jj] - c);
                }
            s2 /= 11;
            double want = (y[i][j] - m) / sqrt(s2 * (1 + 1.0 / 4));
            CHECK_REL(t, want, 1e-12, "external t = deleted residual / its SE (refit)");
        }
    double r, t;
    CHECK_ST(dx_studentized(1, 1, 1, 10, &r, &t), AVOW_EDOM, "n_cell = 1");
    CHECK_ST(dx_studentized(1, 5, 0, 10, &r, &t), AVOW_EDOM, "mse = 0");
    CHECK_ST(dx_studentized(1, 5, 1, 0, &r, &t), AVOW_EDOM, "dfe = 0");
    CHECK_ST(dx_studentized(1, 5, 1, 1, &r, &t), AVOW_DX_ENODF, "dfe = 1");
    assert_true(isnan(t));
    CHECK_REL(r, 1 / sqrt(0.8), 1e-15, "r set when t is not");
    /* r^2 > dfe cannot come from data (r^2 <= dfe always); t does not exist and the
     * status says so: e = 4, n = 5, mse = 1 gives r^2 = 20 > 12 */
    CHECK_ST(dx_studentized(4, 5, 1, 12, &r, &t), AVOW_DX_ENODF, "r^2 > dfe");
    assert_true(isnan(t));
}

/* ---- allocation failure ---- */

/* Every allocation of every function may fail: each call must then return AVOW_ENOMEM
 * (and nothing else), and once allocations succeed the result must be the same as
 * without the hook. Leaks are caught by the sanitizer build (make sanitize). */
static int run_all(double *out)
{
    static avow_dec v[140];
    static avow_dx_group g[70];
    static int ready;
    if (!ready) {
        for (int i = 0; i < 140; i++) {
            char buf[32];
            snprintf(buf, sizeof buf, "%d.%d", 500 + (i * 37) % 23, (i * 11) % 10);
            dec_parse(buf, strlen(buf), &v[i]);
        }
        for (int i = 0; i < 70; i++) { g[i].values = v + 2 * i; g[i].n = 2; }
        ready = 1;
    }
    avow_dx_ftest f;
    avow_dx_chisq c;
    avow_dx_kw kw;
    avow_dx_sw s;
    double x[40];
    for (int i = 0; i < 40; i++) x[i] = dec_get_d(v[i]);
    int st;
    /* k = 3 groups of 6 for Levene; 70 groups of 2 (beyond the exact Welch) */
    avow_dx_group g3[3] = {{v, 6}, {v + 6, 6}, {v + 12, 6}};
    if ((st = dx_levene(g3, 3, AVOW_DX_MEAN, &f))) return st;
    out[0] = f.stat;
    if ((st = dx_levene(g3, 3, AVOW_DX_MEDIAN, &f))) return st;
    out[1] = f.stat;
    if ((st = dx_levene_big(g3, 3, AVOW_DX_MEDIAN, &f))) return st;
    out[2] = f.stat;
    if ((st = dx_bartlett(g, 70, &c))) return st;
    out[3] = c.stat;
    if ((st = dx_welch(g, 70, &f))) return st;
    out[4] = f.stat;
    if ((st = dx_welch(g3, 3, &f))) return st;
    out[5] = f.stat;
    if ((st = dx_kruskal(g, 70, &kw))) return st;
    out[6] = kw.test.stat;
    if ((st = dx_shapiro(x, 40, &s))) return st;
    out[7] = s.w;
    return AVOW_OK;
}

static void test_allocation_failure(void **state)
{
    (void)state;
    double want[8], got[8];
    avow_mem_fail_after(-1);
    CHECK_ST(run_all(want), AVOW_OK, "without failures");
    long n;
    int ok = 0;
    for (n = 0; n < 1000; n++) {
        avow_mem_fail_after(n);
        int st = run_all(got);
        if (st == AVOW_OK) { ok = 1; break; }
        CHECK_ST(st, AVOW_ENOMEM, "with a failing allocation");
    }
    avow_mem_fail_after(-1);
    assert_true(ok);
    assert_true(n >= 8);        /* each allocating function met at least one failure */
    for (int i = 0; i < 8; i++) CHECK_EQ(got[i], want[i], "result after failures");
    print_message("allocation points exercised: %ld\n", n);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_levene_nist),
        cmocka_unit_test(test_levene_bulb),
        cmocka_unit_test(test_levene_paths_agree),
        cmocka_unit_test(test_levene_invariance),
        cmocka_unit_test(test_levene_edges),
        cmocka_unit_test(test_bartlett),
        cmocka_unit_test(test_welch),
        cmocka_unit_test(test_welch_paths),
        cmocka_unit_test(test_kruskal),
        cmocka_unit_test(test_shapiro_values),
        cmocka_unit_test(test_shapiro_invariance),
        cmocka_unit_test(test_shapiro_edges),
        cmocka_unit_test(test_moments),
        cmocka_unit_test(test_effect_sizes),
        cmocka_unit_test(test_studentized),
        cmocka_unit_test(test_allocation_failure),
    };
    return cmocka_run_group_tests_name("diagnostics", tests, NULL, NULL);
}
