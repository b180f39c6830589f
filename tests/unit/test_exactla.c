/* test_exactla.c: exact rational linear algebra (src/exactla.c). */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <stdlib.h>

#include "avow/exactla.h"
#include "avow/util.h"

static unsigned long binom(unsigned long n, unsigned long k)
{
    unsigned long r = 1;
    for (unsigned long i = 1; i <= k; i++) r = r * (n - k + i) / i;
    return r;
}

/* The inverse of the n x n Hilbert matrix H_ij = 1/(i + j - 1) has the integer entries
 * (-1)^(i+j) (i+j-1) C(n+i-1, n-j) C(n+j-1, n-i) C(i+j-2, i-1)^2 (1-based; a classical
 * closed form, from memory). Hilbert matrices are the standard ill-conditioned test:
 * binary floating point loses every digit by n = 12, exact arithmetic none. */
static void test_hilbert_inverse(void **state)
{
    (void)state;
    for (size_t n = 1; n <= 12; n++) {
        mpq_t *A = xla_alloc(n * n), *B = xla_alloc(n * n);
        assert_non_null(A);
        assert_non_null(B);
        for (size_t i = 0; i < n; i++)
            for (size_t j = 0; j < n; j++) {
                mpq_set_ui(A[i * n + j], 1, (unsigned long)(i + j + 1));
                mpq_set_ui(B[i * n + j], i == j, 1);
            }
        assert_int_equal(xla_solve(A, B, n, n), AVOW_OK);
        mpq_t want;
        mpq_init(want);
        for (unsigned long i = 1; i <= n; i++)
            for (unsigned long j = 1; j <= n; j++) {
                unsigned long c = binom(i + j - 2, i - 1);
                mpz_set_ui(mpq_numref(want), (i + j - 1));
                mpz_mul_ui(mpq_numref(want), mpq_numref(want), binom(n + i - 1, n - j));
                mpz_mul_ui(mpq_numref(want), mpq_numref(want), binom(n + j - 1, n - i));
                mpz_mul_ui(mpq_numref(want), mpq_numref(want), c);
                mpz_mul_ui(mpq_numref(want), mpq_numref(want), c);
                if ((i + j) % 2) mpz_neg(mpq_numref(want), mpq_numref(want));
                mpz_set_ui(mpq_denref(want), 1);
                assert_true(mpq_equal(B[(i - 1) * n + (j - 1)], want));
            }
        mpq_clear(want);
        xla_free(A, n * n);
        xla_free(B, n * n);
    }
}

/* The fraction-free integer inverse agrees with the rational elimination, and A V = I. */
static void test_integer_inverse_agrees(void **state)
{
    (void)state;
    srand(7);
    for (size_t n = 1; n <= 9; n++) {
        for (int rep = 0; rep < 5; rep++) {
            mpz_t *Z = xla_alloc_z(n * n);
            mpq_t *A = xla_alloc(n * n), *B = xla_alloc(n * n), *V = xla_alloc(n * n);
            long *a = calloc(n * n, sizeof *a);
            for (size_t i = 0; i < n * n; i++) {
                a[i] = (long)(rand() % 41) - 20;
                mpz_set_si(Z[i], a[i]);
                mpq_set_si(A[i], a[i], 1);
            }
            for (size_t i = 0; i < n; i++)
                for (size_t j = 0; j < n; j++) mpq_set_ui(B[i * n + j], i == j, 1);
            /* the fraction-free solve of A x = b (b = column sums of a) first */
            mpz_t *Z2 = xla_alloc_z(n * n), *bz = xla_alloc_z(n);
            mpq_t *x = xla_alloc(n);
            for (size_t i = 0; i < n * n; i++) mpz_set_si(Z2[i], a[i]);
            for (size_t i = 0; i < n; i++) mpz_set_si(bz[i], (long)(i * 3) - 4);
            int r0 = xla_solve_int(Z2, bz, n, x);
            int r1 = xla_solve(A, B, n, n);
            int r2 = xla_inverse_int(Z, V, n);
            assert_int_equal(r1, r2);
            assert_int_equal(r0, r1);
            if (r0 == AVOW_OK) {
                /* x = V b */
                mpq_t s0, t0;
                mpq_init(s0); mpq_init(t0);
                for (size_t i = 0; i < n; i++) {
                    mpq_set_ui(s0, 0, 1);
                    for (size_t k = 0; k < n; k++) {
                        mpq_set_si(t0, (long)(k * 3) - 4, 1);
                        mpq_mul(t0, t0, V[i * n + k]);
                        mpq_add(s0, s0, t0);
                    }
                    assert_true(mpq_equal(s0, x[i]));
                }
                mpq_clear(s0); mpq_clear(t0);
            }
            xla_free_z(Z2, n * n); xla_free_z(bz, n); xla_free(x, n);
            if (r1 == AVOW_OK) {
                for (size_t i = 0; i < n * n; i++) assert_true(mpq_equal(B[i], V[i]));
                mpq_t s, t;
                mpq_init(s); mpq_init(t);
                for (size_t i = 0; i < n; i++)
                    for (size_t j = 0; j < n; j++) {
                        mpq_set_ui(s, 0, 1);
                        for (size_t k = 0; k < n; k++) {
                            mpq_set_si(t, a[i * n + k], 1);
                            mpq_mul(t, t, V[k * n + j]);
                            mpq_add(s, s, t);
                        }
                        assert_int_equal(mpq_cmp_ui(s, i == j, 1), 0);
                    }
                mpq_clear(s); mpq_clear(t);
            }
            free(a);
            xla_free_z(Z, n * n);
            xla_free(A, n * n); xla_free(B, n * n); xla_free(V, n * n);
        }
    }
}

/* Singular matrices are reported, by both routines; a zero leading pivot is not. */
static void test_singular(void **state)
{
    (void)state;
    long rows[3][3] = {{1, 2, 3}, {2, 4, 6}, {0, 1, 1}};     /* row 2 = 2 row 1 */
    long perm[3][3] = {{0, 1, 0}, {1, 0, 0}, {0, 0, 1}};     /* needs a row exchange */
    for (int which = 0; which < 2; which++) {
        mpz_t *Z = xla_alloc_z(9);
        mpq_t *A = xla_alloc(9), *B = xla_alloc(9), *V = xla_alloc(9);
        for (size_t i = 0; i < 3; i++)
            for (size_t j = 0; j < 3; j++) {
                long v = which ? perm[i][j] : rows[i][j];
                mpz_set_si(Z[i * 3 + j], v);
                mpq_set_si(A[i * 3 + j], v, 1);
                mpq_set_ui(B[i * 3 + j], i == j, 1);
            }
        int want = which ? AVOW_OK : AVOW_EDOM;
        assert_int_equal(xla_solve(A, B, 3, 3), want);
        assert_int_equal(xla_inverse_int(Z, V, 3), want);
        if (which)   /* a permutation matrix is its own transpose's inverse */
            for (size_t i = 0; i < 3; i++)
                for (size_t j = 0; j < 3; j++) assert_int_equal(mpq_cmp_si(V[i * 3 + j], perm[j][i], 1), 0);
        xla_free_z(Z, 9);
        xla_free(A, 9); xla_free(B, 9); xla_free(V, 9);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_hilbert_inverse),
        cmocka_unit_test(test_integer_inverse_agrees),
        cmocka_unit_test(test_singular),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
