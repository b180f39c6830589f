/* exactla.h: exact rational linear algebra on small dense matrices (GMP mpq), for the
 * linear hypotheses of the analysis. Matrices are row-major arrays of mpq_t.
 * GMP allocates its limbs itself (and aborts when memory is exhausted); the arrays
 * themselves come from avow_malloc. */
#ifndef AVOW_EXACTLA_H
#define AVOW_EXACTLA_H

#include <stddef.h>

#include <gmp.h>

/* n rationals, each 0; NULL when out of memory. Release with xla_free(v, n). */
mpq_t *xla_alloc(size_t n);
void xla_free(mpq_t *v, size_t n);

/* Solve A X = B exactly by Gauss-Jordan elimination: A is n x n (destroyed), B is n x m
 * and is overwritten by X. Returns AVOW_OK, or AVOW_EDOM when A is singular (A and B
 * are then unspecified). */
int xla_solve(mpq_t *A, mpq_t *B, size_t n, size_t m);

/* Invert the integer matrix A (n x n, row-major, destroyed) by fraction-free
 * Gauss-Jordan elimination (Bareiss 1968): every intermediate is an integer (a minor of
 * A), so no gcd is ever taken; the result is written to Vinv as rationals adj(A)/det(A),
 * each canonicalized once. Returns AVOW_OK, AVOW_EDOM when A is singular, AVOW_ENOMEM. */
int xla_inverse_int(mpz_t *A, mpq_t *Vinv, size_t n);

/* Solve A x = b exactly for an integer matrix A (n x n, destroyed) and an integer
 * vector b (destroyed): fraction-free forward elimination (Bareiss 1968), whose
 * intermediates are integer minors of [A | b], then back substitution in rationals.
 * x (n rationals) receives the solution. AVOW_OK, AVOW_EDOM (singular) or AVOW_ENOMEM. */
int xla_solve_int(mpz_t *A, mpz_t *b, size_t n, mpq_t *x);

/* n integers, each 0 / release. */
mpz_t *xla_alloc_z(size_t n);
void xla_free_z(mpz_t *v, size_t n);

#endif
