/* exactla.c: exact rational Gauss-Jordan elimination (GMP mpq). Exact arithmetic needs
 * no pivoting for stability; the pivot is the first non-zero entry of its column, which
 * also keeps the work on sparse, effect-coded matrices small. */
#include "avow/exactla.h"

#include "avow/util.h"

mpq_t *xla_alloc(size_t n)
{
    mpq_t *v = avow_calloc(n ? n : 1, sizeof *v);
    if (!v) return NULL;
    for (size_t i = 0; i < n; i++) mpq_init(v[i]);
    return v;
}

void xla_free(mpq_t *v, size_t n)
{
    if (!v) return;
    for (size_t i = 0; i < n; i++) mpq_clear(v[i]);
    avow_free(v);
}

static void swap_rows(mpq_t *M, size_t cols, size_t a, size_t b)
{
    if (a == b) return;
    for (size_t j = 0; j < cols; j++) mpq_swap(M[a * cols + j], M[b * cols + j]);
}

int xla_solve(mpq_t *A, mpq_t *B, size_t n, size_t m)
{
    mpq_t f, t;
    mpq_init(f); mpq_init(t);
    int rc = AVOW_OK;
    for (size_t k = 0; k < n; k++) {
        size_t piv = k;
        while (piv < n && mpq_sgn(A[piv * n + k]) == 0) piv++;
        if (piv == n) { rc = AVOW_EDOM; break; }
        swap_rows(A, n, k, piv);
        swap_rows(B, m, k, piv);
        /* Scale the pivot row to 1. */
        mpq_inv(f, A[k * n + k]);
        for (size_t j = k; j < n; j++) mpq_mul(A[k * n + j], A[k * n + j], f);
        for (size_t j = 0; j < m; j++) mpq_mul(B[k * m + j], B[k * m + j], f);
        /* Clear the column in every other row. */
        for (size_t i = 0; i < n; i++) {
            if (i == k || mpq_sgn(A[i * n + k]) == 0) continue;
            mpq_set(f, A[i * n + k]);
            for (size_t j = k; j < n; j++) {
                if (mpq_sgn(A[k * n + j]) == 0) continue;
                mpq_mul(t, f, A[k * n + j]);
                mpq_sub(A[i * n + j], A[i * n + j], t);
            }
            for (size_t j = 0; j < m; j++) {
                if (mpq_sgn(B[k * m + j]) == 0) continue;
                mpq_mul(t, f, B[k * m + j]);
                mpq_sub(B[i * m + j], B[i * m + j], t);
            }
        }
    }
    mpq_clear(f); mpq_clear(t);
    return rc;
}

mpz_t *xla_alloc_z(size_t n)
{
    mpz_t *v = avow_calloc(n ? n : 1, sizeof *v);
    if (!v) return NULL;
    for (size_t i = 0; i < n; i++) mpz_init(v[i]);
    return v;
}

void xla_free_z(mpz_t *v, size_t n)
{
    if (!v) return;
    for (size_t i = 0; i < n; i++) mpz_clear(v[i]);
    avow_free(v);
}

/* Fraction-free Gauss-Jordan on [A | I]: at step k every row i != k becomes
 * (a_kk row_i - a_ik row_k) / prev, where prev is the previous pivot; the division is
 * exact (Sylvester's identity), so entries stay integers bounded by minors of A. At the
 * end the left part is det(A) I and the right part adj(A) (up to the sign of the row
 * exchanges, which cancels in adj/det). */
int xla_inverse_int(mpz_t *A, mpq_t *Vinv, size_t n)
{
    size_t w = 2 * n;
    mpz_t *M = xla_alloc_z(n * w);
    if (!M) return AVOW_ENOMEM;
    mpz_t prev, t, u;
    mpz_init_set_ui(prev, 1); mpz_init(t); mpz_init(u);
    for (size_t i = 0; i < n; i++) {
        for (size_t j = 0; j < n; j++) mpz_set(M[i * w + j], A[i * n + j]);
        mpz_set_ui(M[i * w + n + i], 1);
    }
    int rc = AVOW_OK;
    for (size_t k = 0; k < n; k++) {
        size_t piv = k;
        while (piv < n && mpz_sgn(M[piv * w + k]) == 0) piv++;
        if (piv == n) { rc = AVOW_EDOM; break; }
        if (piv != k)
            for (size_t j = 0; j < w; j++) mpz_swap(M[k * w + j], M[piv * w + j]);
        for (size_t i = 0; i < n; i++) {
            if (i == k) continue;
            for (size_t j = 0; j < w; j++) {
                if (j == k) continue;
                mpz_mul(t, M[k * w + k], M[i * w + j]);
                mpz_mul(u, M[i * w + k], M[k * w + j]);
                mpz_sub(t, t, u);
                mpz_divexact(M[i * w + j], t, prev);
            }
            mpz_set_ui(M[i * w + k], 0);
        }
        /* The pivot row stays as it is; rows pivoted earlier were scaled with the others,
         * so after the last step every diagonal entry is det(A). */
        mpz_set(prev, M[k * w + k]);
    }
    if (rc == AVOW_OK) {
        /* Every row has been scaled to det(A) on the diagonal; V = right part / det
         * (mpq_canonicalize also makes the denominator positive). */
        for (size_t i = 0; i < n; i++)
            for (size_t j = 0; j < n; j++) {
                mpq_set_num(Vinv[i * n + j], M[i * w + n + j]);
                mpq_set_den(Vinv[i * n + j], M[i * w + i]);
                mpq_canonicalize(Vinv[i * n + j]);
            }
    }
    mpz_clear(prev); mpz_clear(t); mpz_clear(u);
    xla_free_z(M, n * w);
    return rc;
}

int xla_solve_int(mpz_t *A, mpz_t *b, size_t n, mpq_t *x)
{
    mpz_t prev, t, u;
    mpz_init_set_ui(prev, 1); mpz_init(t); mpz_init(u);
    int rc = AVOW_OK;
    for (size_t k = 0; k < n; k++) {
        size_t piv = k;
        while (piv < n && mpz_sgn(A[piv * n + k]) == 0) piv++;
        if (piv == n) { rc = AVOW_EDOM; break; }
        if (piv != k) {
            for (size_t j = 0; j < n; j++) mpz_swap(A[k * n + j], A[piv * n + j]);
            mpz_swap(b[k], b[piv]);
        }
        for (size_t i = k + 1; i < n; i++) {
            for (size_t j = k + 1; j < n; j++) {
                mpz_mul(t, A[k * n + k], A[i * n + j]);
                mpz_mul(u, A[i * n + k], A[k * n + j]);
                mpz_sub(t, t, u);
                mpz_divexact(A[i * n + j], t, prev);
            }
            mpz_mul(t, A[k * n + k], b[i]);
            mpz_mul(u, A[i * n + k], b[k]);
            mpz_sub(t, t, u);
            mpz_divexact(b[i], t, prev);
            mpz_set_ui(A[i * n + k], 0);
        }
        mpz_set(prev, A[k * n + k]);
    }
    if (rc == AVOW_OK) {
        /* Back substitution on the upper triangle, in rationals. */
        mpq_t s, q;
        mpq_init(s); mpq_init(q);
        for (size_t i = n; i-- > 0;) {
            mpq_set_z(s, b[i]);
            for (size_t j = i + 1; j < n; j++) {
                if (mpz_sgn(A[i * n + j]) == 0) continue;
                mpq_set_z(q, A[i * n + j]);
                mpq_mul(q, q, x[j]);
                mpq_sub(s, s, q);
            }
            mpq_set_z(q, A[i * n + i]);
            mpq_div(x[i], s, q);
        }
        mpq_clear(s); mpq_clear(q);
    }
    mpz_clear(prev); mpz_clear(t); mpz_clear(u);
    return rc;
}
