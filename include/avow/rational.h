/* rational.h: exact rational numbers with 64-bit numerator and denominator.
 * Every operation detects overflow and reports it (AVOW_EOVERFLOW): never a wrong
 * answer. Values are kept normalised: den > 0, gcd(|num|, den) == 1, and
 * num != INT64_MIN (so that negation is always exact). */
#ifndef AVOW_RATIONAL_H
#define AVOW_RATIONAL_H

#include <stddef.h>
#include <stdint.h>

typedef struct avow_rat {
    int64_t num;    /* numerator, sign of the value */
    int64_t den;    /* denominator, always > 0 */
} avow_rat;

#define RAT_ZERO ((avow_rat){0, 1})
#define RAT_ONE  ((avow_rat){1, 1})

/* num/den normalised. AVOW_EDOM when den == 0, AVOW_EOVERFLOW when not representable. */
int rat_make(int64_t num, int64_t den, avow_rat *out);
avow_rat rat_int(int64_t v);               /* v/1; v must not be INT64_MIN */
int rat_add(avow_rat a, avow_rat b, avow_rat *out);
int rat_sub(avow_rat a, avow_rat b, avow_rat *out);
int rat_mul(avow_rat a, avow_rat b, avow_rat *out);
int rat_div(avow_rat a, avow_rat b, avow_rat *out);   /* AVOW_EDOM when b == 0 */
avow_rat rat_neg(avow_rat a);
int rat_cmp(avow_rat a, avow_rat b);       /* -1, 0, 1; exact */
int rat_is_zero(avow_rat a);
int rat_is_int(avow_rat a);
int rat_sign(avow_rat a);                  /* -1, 0, 1 */
/* The nearest binary64 value (correctly rounded). */
double rat_to_double(avow_rat a);
/* Exact conversion of a decimal literal: digits, optional fraction, optional exponent
 * ("2", "0.05", "1e-3", "2.5E+2"), no sign. AVOW_ESYNTAX when malformed,
 * AVOW_EOVERFLOW when the value needs more than 64 bits. */
int rat_from_decimal(const char *s, size_t len, avow_rat *out);
/* "num/den", or "num" when den == 1. buf of at least 48 bytes. Returns the length. */
int rat_format(avow_rat a, char *buf, size_t size);

/* Scale a vector of rationals by one positive factor so that every entry is an integer
 * and their gcd is 1 (all-zero vectors are left unchanged). */
int rat_vec_integer_scale(avow_rat *v, size_t n);
/* Sum of v[i] * w[i] / n[i] over i (n[i] > 0): the orthogonality product with planned
 * replicates. */
int rat_vec_weighted_dot(const avow_rat *v, const avow_rat *w, const avow_rat *n,
                         size_t len, avow_rat *out);
/* 1 when v = lambda * w for some lambda != 0 (both non-zero vectors), else 0. */
int rat_vec_proportional(const avow_rat *v, const avow_rat *w, size_t n);

/* Orthogonal-polynomial contrast of the given degree over k points x[i] with weights
 * n[i] > 0: coefficients c[i] = n[i] * p(x[i]), where p has degree `degree`, positive
 * leading coefficient, and is orthogonal to every polynomial of lower degree under the
 * weights n. The result is scaled to coprime integers. The x must be distinct and
 * 1 <= degree < k. Returns AVOW_OK, AVOW_EDOM (bad arguments), AVOW_EOVERFLOW (the
 * result does not fit 64-bit fractions) or AVOW_ENOMEM. Intermediates use GMP. */
int rat_trend(const avow_rat *x, const avow_rat *n, size_t k, int degree, avow_rat *c);

#endif
