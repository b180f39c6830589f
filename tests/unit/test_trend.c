/* test_trend.c: exact orthogonal-polynomial contrasts (rat_trend) over unequally spaced
 * levels with planned replicates. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <string.h>

#include "avow/rational.h"
#include "avow/util.h"

#define MAXK 8

static avow_rat mk(int64_t num, int64_t den)
{
    avow_rat r;
    assert_int_equal(rat_make(num, den, &r), AVOW_OK);
    return r;
}

static avow_rat dec(const char *s)
{
    avow_rat r;
    assert_int_equal(rat_from_decimal(s, strlen(s), &r), AVOW_OK);
    return r;
}

static void ints(const int64_t *v, size_t k, avow_rat *out)
{
    for (size_t i = 0; i < k; i++) out[i] = rat_int(v[i]);
}

/* rat_trend over integer x and n must give exactly the integers `want`. */
static void expect_trend(const int64_t *x, const int64_t *n, size_t k, int degree,
                         const int64_t *want)
{
    avow_rat xr[MAXK], nr[MAXK], c[MAXK];
    ints(x, k, xr);
    ints(n, k, nr);
    assert_int_equal(rat_trend(xr, nr, k, degree, c), AVOW_OK);
    for (size_t i = 0; i < k; i++) {
        if (c[i].den != 1 || c[i].num != want[i])
            fail_msg("degree %d, entry %zu: %lld/%lld, want %lld", degree, i,
                     (long long)c[i].num, (long long)c[i].den, (long long)want[i]);
    }
}

static void test_equal_spacing_four(void **state)
{
    (void)state;
    const int64_t x[] = {1, 2, 3, 4}, n[] = {1, 1, 1, 1};
    /* OP-eq4, Fisher & Yates tables (check-values.json) */
    expect_trend(x, n, 4, 1, (const int64_t[]){-3, -1, 1, 3});
    expect_trend(x, n, 4, 2, (const int64_t[]){1, -1, -1, 1});
    expect_trend(x, n, 4, 3, (const int64_t[]){-1, 3, -3, 1});
    /* equal replicates of any size give the same contrasts */
    const int64_t n7[] = {7, 7, 7, 7};
    expect_trend(x, n7, 4, 2, (const int64_t[]){1, -1, -1, 1});
}

static void test_equal_spacing_five(void **state)
{
    (void)state;
    const int64_t x[] = {1, 2, 3, 4, 5}, n[] = {1, 1, 1, 1, 1};
    /* OP-eq5, Fisher & Yates tables (check-values.json) */
    expect_trend(x, n, 5, 1, (const int64_t[]){-2, -1, 0, 1, 2});
    expect_trend(x, n, 5, 2, (const int64_t[]){2, -1, -2, -1, 2});
    expect_trend(x, n, 5, 3, (const int64_t[]){-1, 2, 0, -2, 1});
    expect_trend(x, n, 5, 4, (const int64_t[]){1, -4, 6, -4, 1});
}

static void test_unequal_spacing(void **state)
{
    (void)state;
    const int64_t x[] = {1, 2, 4, 8}, n[] = {1, 1, 1, 1};
    /* OP-uneq-spacing, exact rational Gram-Schmidt (check-values.json) */
    expect_trend(x, n, 4, 1, (const int64_t[]){-11, -7, 1, 17});
    expect_trend(x, n, 4, 2, (const int64_t[]){20, -4, -29, 13});
    expect_trend(x, n, 4, 3, (const int64_t[]){-8, 14, -7, 1});
    /* x = 10, 20, 40 with equal n: linear trend (-4, -1, 5), worked by hand, exact
     * (project issue text) */
    const int64_t x3[] = {10, 20, 40}, n3[] = {1, 1, 1};
    expect_trend(x3, n3, 3, 1, (const int64_t[]){-4, -1, 5});
    /* the same levels given out of order: the coefficients follow their levels */
    const int64_t x3r[] = {40, 10, 20};
    expect_trend(x3r, n3, 3, 1, (const int64_t[]){5, -4, -1});
}

static void test_unequal_replicates(void **state)
{
    (void)state;
    const int64_t x[] = {1, 2, 4, 8}, n[] = {3, 2, 2, 3};
    /* OP-uneq-n, exact rational weighted Gram-Schmidt (check-values.json) */
    expect_trend(x, n, 4, 1, (const int64_t[]){-87, -38, 2, 123});
    expect_trend(x, n, 4, 2, (const int64_t[]){298, -89, -388, 179});
    expect_trend(x, n, 4, 3, (const int64_t[]){-8, 14, -7, 1});

    avow_rat xr[4], nr[4], c[3][4], d;
    ints(x, 4, xr);
    ints(n, 4, nr);
    for (int j = 0; j < 3; j++) assert_int_equal(rat_trend(xr, nr, 4, j + 1, c[j]), AVOW_OK);
    /* orthogonal under the planned replicates: sum c_i d_i / n_i = 0 exactly */
    for (int a = 0; a < 3; a++)
        for (int b = a + 1; b < 3; b++) {
            assert_int_equal(rat_vec_weighted_dot(c[a], c[b], nr, 4, &d), AVOW_OK);
            assert_true(rat_is_zero(d));
        }
    /* linear . quadratic = (-87*298)/3 + (38*89)/2 - (2*388)/2 + (123*179)/3 = 0,
     * worked by hand */
    assert_int_equal(rat_vec_weighted_dot(c[0], c[1], nr, 4, &d), AVOW_OK);
    assert_int_equal(d.num, 0);
    /* each is a contrast */
    for (int j = 0; j < 3; j++) {
        avow_rat s = RAT_ZERO;
        for (int i = 0; i < 4; i++) assert_int_equal(rat_add(s, c[j][i], &s), AVOW_OK);
        assert_true(rat_is_zero(s));
    }
}

/* The contrasts computed for equal n are not orthogonal once the replicates differ:
 * with c = n p and d = n q for the OP-uneq-spacing polynomials p, q and n = (3,2,2,3),
 * sum c d / n = sum n p q = -660 + 56 - 58 + 663 = 1 (worked by hand, exact). */
static void test_unweighted_not_orthogonal(void **state)
{
    (void)state;
    const int64_t x[] = {1, 2, 4, 8}, ones[] = {1, 1, 1, 1}, n[] = {3, 2, 2, 3};
    avow_rat xr[4], er[4], nr[4], p[4], q[4], d;
    ints(x, 4, xr);
    ints(ones, 4, er);
    ints(n, 4, nr);
    assert_int_equal(rat_trend(xr, er, 4, 1, p), AVOW_OK);
    assert_int_equal(rat_trend(xr, er, 4, 2, q), AVOW_OK);
    for (int i = 0; i < 4; i++) {
        assert_int_equal(rat_mul(p[i], nr[i], &p[i]), AVOW_OK);
        assert_int_equal(rat_mul(q[i], nr[i], &q[i]), AVOW_OK);
    }
    assert_int_equal(rat_vec_weighted_dot(p, q, nr, 4, &d), AVOW_OK);
    assert_true(d.num == 1 && d.den == 1);
}

/* OP-uneq-n data (check-values.json): the component sums of squares
 * SS_j = (sum c_i ybar_i)^2 / sum(c_i^2 / n_i) are 10647169/829000, 13338486/17927125
 * and 726/21625, and they add to SS_between = 13621/1000. */
static void test_components_add_to_between(void **state)
{
    (void)state;
    static const char *const data[4][3] = {
        {"2.1", "2.5", "2.3"}, {"3.0", "3.4", NULL}, {"4.4", "4.0", NULL},
        {"5.1", "5.5", "5.0"},
    };
    const int64_t x[] = {1, 2, 4, 8};
    avow_rat xr[4], nr[4], mean[4], c[4], l, v, ss, total = RAT_ZERO;
    ints(x, 4, xr);
    for (int i = 0; i < 4; i++) {
        avow_rat sum = RAT_ZERO;
        int cnt = 0;
        for (int j = 0; j < 3 && data[i][j]; j++, cnt++)
            assert_int_equal(rat_add(sum, dec(data[i][j]), &sum), AVOW_OK);
        nr[i] = rat_int(cnt);
        assert_int_equal(rat_div(sum, nr[i], &mean[i]), AVOW_OK);
    }
    const avow_rat want[3] = {mk(10647169, 829000), mk(13338486, 17927125), mk(726, 21625)};
    for (int j = 0; j < 3; j++) {
        assert_int_equal(rat_trend(xr, nr, 4, j + 1, c), AVOW_OK);
        l = RAT_ZERO;
        for (int i = 0; i < 4; i++) {
            assert_int_equal(rat_mul(c[i], mean[i], &v), AVOW_OK);
            assert_int_equal(rat_add(l, v, &l), AVOW_OK);
        }
        assert_int_equal(rat_vec_weighted_dot(c, c, nr, 4, &v), AVOW_OK);
        assert_int_equal(rat_mul(l, l, &ss), AVOW_OK);
        assert_int_equal(rat_div(ss, v, &ss), AVOW_OK);
        assert_int_equal(rat_cmp(ss, want[j]), 0);
        assert_int_equal(rat_add(total, ss, &total), AVOW_OK);
    }
    assert_int_equal(rat_cmp(total, mk(13621, 1000)), 0);
}

static void test_fractional_levels_and_weights(void **state)
{
    (void)state;
    avow_rat x[3] = {dec("0.1"), dec("0.2"), dec("0.4")}, n[3], c[3];
    for (int i = 0; i < 3; i++) n[i] = RAT_ONE;
    /* x = 0.1, 0.2, 0.4 is x = 10, 20, 40 rescaled: (-4, -1, 5), worked by hand */
    assert_int_equal(rat_trend(x, n, 3, 1, c), AVOW_OK);
    assert_true(c[0].num == -4 && c[1].num == -1 && c[2].num == 5);
    assert_true(c[0].den == 1 && c[1].den == 1 && c[2].den == 1);

    /* x = 0, 1, 3 with n = 1/2, 5, 7/3. Linear: weighted mean 72/47, c = n (x - 72/47)
     * = (-36, -125, 161) / 47. Quadratic (degree k - 1): c_i is proportional to
     * 1 / prod_{j != i} (x_i - x_j) = (1/3, -1/2, 1/6) whatever the weights.
     * Both worked by hand, exact. */
    avow_rat x2[3] = {rat_int(0), rat_int(1), rat_int(3)};
    avow_rat n2[3] = {mk(1, 2), rat_int(5), mk(7, 3)};
    assert_int_equal(rat_trend(x2, n2, 3, 1, c), AVOW_OK);
    assert_true(c[0].num == -36 && c[1].num == -125 && c[2].num == 161);
    assert_int_equal(rat_trend(x2, n2, 3, 2, c), AVOW_OK);
    assert_true(c[0].num == 2 && c[1].num == -3 && c[2].num == 1);
    assert_true(c[0].den == 1 && c[1].den == 1 && c[2].den == 1);
}

static void test_large_values(void **state)
{
    (void)state;
    /* x = 0, 1, 10^6, 10^12, equal n: the linear contrast fits; the quadratic is
     * (333333333333666666333333333333, ...) and does not (Python 3.11 fractions,
     * Gram-Schmidt on raw powers). */
    const int64_t x[] = {0, 1, INT64_C(1000000), INT64_C(1000000000000)}, n[] = {1, 1, 1, 1};
    expect_trend(x, n, 4, 1,
                 (const int64_t[]){-INT64_C(1000001000001), -INT64_C(1000000999997),
                                   -INT64_C(999997000001), INT64_C(2999998999999)});
    avow_rat xr[4], nr[4], c[4];
    ints(x, 4, xr);
    ints(n, 4, nr);
    for (int i = 0; i < 4; i++) c[i] = RAT_ONE;
    assert_int_equal(rat_trend(xr, nr, 4, 2, c), AVOW_EOVERFLOW);
    for (int i = 0; i < 4; i++) assert_true(c[i].num == 1 && c[i].den == 1);

    /* x = 0, 1, INT64_MAX: the linear contrast is (-2^63, 3 - 2^63, 2^64 - 3)
     * (Python 3.11 fractions) */
    avow_rat xb[3] = {rat_int(0), rat_int(1), rat_int(INT64_MAX)};
    assert_int_equal(rat_trend(xb, nr, 3, 1, c), AVOW_EOVERFLOW);
    /* levels with huge coprime denominators */
    avow_rat xc[3] = {mk(1, INT64_MAX), mk(1, INT64_MAX - 1), mk(1, INT64_MAX - 2)};
    assert_int_equal(rat_trend(xc, nr, 3, 1, c), AVOW_EOVERFLOW);
}

static void test_bad_arguments(void **state)
{
    (void)state;
    avow_rat x[4] = {rat_int(1), rat_int(2), rat_int(3), rat_int(4)};
    avow_rat n[4] = {RAT_ONE, RAT_ONE, RAT_ONE, RAT_ONE};
    avow_rat c[4] = {RAT_ONE, RAT_ONE, RAT_ONE, RAT_ONE};
    assert_int_equal(rat_trend(x, n, 4, 0, c), AVOW_EDOM);
    assert_int_equal(rat_trend(x, n, 4, -1, c), AVOW_EDOM);
    assert_int_equal(rat_trend(x, n, 4, 4, c), AVOW_EDOM);
    assert_int_equal(rat_trend(x, n, 1, 1, c), AVOW_EDOM);
    assert_int_equal(rat_trend(x, n, 0, 1, c), AVOW_EDOM);
    n[2] = RAT_ZERO;
    assert_int_equal(rat_trend(x, n, 4, 1, c), AVOW_EDOM);
    n[2] = rat_int(-2);
    assert_int_equal(rat_trend(x, n, 4, 1, c), AVOW_EDOM);
    n[2] = RAT_ONE;
    x[3] = mk(4, 2);    /* equal to x[1] */
    assert_int_equal(rat_trend(x, n, 4, 1, c), AVOW_EDOM);
    for (int i = 0; i < 4; i++) assert_true(c[i].num == 1 && c[i].den == 1);
    /* two levels: only a linear trend, (-1, 1) */
    assert_int_equal(rat_trend(x, n, 2, 1, c), AVOW_OK);
    assert_true(c[0].num == -1 && c[1].num == 1);
}

/* Each of rat_trend's allocations fails in turn: AVOW_ENOMEM with c unchanged. */
static void test_allocation_failure(void **state)
{
    (void)state;
    avow_rat x[3] = {rat_int(1), rat_int(2), rat_int(3)};
    avow_rat n[3] = {RAT_ONE, RAT_ONE, RAT_ONE};
    avow_rat c[3];
    int rc = AVOW_ENOMEM;
    long at;
    for (at = 0; at < 100 && rc == AVOW_ENOMEM; at++) {
        for (int i = 0; i < 3; i++) c[i] = RAT_ONE;
        avow_mem_fail_after(at);
        rc = rat_trend(x, n, 3, 1, c);
        avow_mem_fail_after(-1);
        if (rc == AVOW_ENOMEM)
            for (int i = 0; i < 3; i++) assert_true(c[i].num == 1 && c[i].den == 1);
    }
    assert_int_equal(rc, AVOW_OK);
    assert_true(at > 1);
    assert_true(c[0].num == -1 && c[1].num == 0 && c[2].num == 1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_equal_spacing_four),
        cmocka_unit_test(test_equal_spacing_five),
        cmocka_unit_test(test_unequal_spacing),
        cmocka_unit_test(test_unequal_replicates),
        cmocka_unit_test(test_unweighted_not_orthogonal),
        cmocka_unit_test(test_components_add_to_between),
        cmocka_unit_test(test_fractional_levels_and_weights),
        cmocka_unit_test(test_large_values),
        cmocka_unit_test(test_bad_arguments),
        cmocka_unit_test(test_allocation_failure),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
