/* dunnett.h: the distribution of Dunnett's many-to-one statistics: p treatments each
 * compared with one control, in one experiment with a pooled error variance.
 *
 * The statistics are T_i = Z_i / S (i = 1..p), where (Z_1, ..., Z_p) is multivariate
 * normal with unit variances and correlations of product form
 * corr(Z_i, Z_j) = lambda_i lambda_j, and S^2 is an independent chi-square with df
 * degrees of freedom divided by df. For a one-way layout with n_0 observations on the
 * control and n_i on treatment i, lambda_i = sqrt(n_i / (n_i + n_0)) (dunnett_lambda),
 * and df is the residual degrees of freedom.
 *
 * "Two-sided" concerns max_i |T_i|, "one-sided" max_i T_i (larger than control).
 *
 * Conventions shared by every function here:
 *   - lambda holds p values with 0 <= lambda[i] < 1 (p >= 1); equal values may repeat
 *     (the equal-n case costs the same as p = 1).
 *   - df > 0, non-integer allowed; df = +INFINITY gives the normal limit (known
 *     variance). df >= 1e20 is treated as infinite (the probabilities change by
 *     O(1/df) there, far below double rounding).
 *   - Probabilities are computed by Gauss-Legendre quadrature of Dunnett's integral to
 *     about 1e-13 absolute, and upper tails (dunnett_sf) to about 1e-12 relative down
 *     to 1e-300 (below that they may underflow to 0).
 *   - Functions return AVOW_OK; AVOW_EDOM for invalid arguments (NULL pointers, p = 0,
 *     NaN, lambda outside [0, 1), df <= 0) with the output left unchanged; AVOW_ENOMEM
 *     when working memory (a few doubles per distinct lambda) cannot be had.
 *   - The first call of any function here turns GSL's abort-on-error handler off for
 *     the whole process (as dist.h does). No function here prints.
 *   - Running time grows with the number of distinct lambda values (equal lambdas cost
 *     as one), a little with p, and for lambda near 1 like lambda/sqrt(1 - lambda^2):
 *     a few milliseconds per call with equal n, up to p = 99; a few tenths of a second
 *     for 99 all-different lambdas (lambda up to 0.92). */
#ifndef AVOW_DUNNETT_H
#define AVOW_DUNNETT_H

#include <stddef.h>

/* The correlation factors for a one-way layout: lambda[i] = sqrt(n[i] / (n[i] + n0)),
 * for a control of size n0 and p treatments of sizes n[0..p-1] (sizes > 0 and finite;
 * non-integer accepted, e.g. for harmonic-mean sizes). Returns AVOW_EDOM for invalid
 * sizes, p = 0, NULL pointers, or when some lambda rounds to 1 (n0 / n[i] below about
 * 1e-16); lambda is then unchanged. */
int dunnett_lambda(double n0, const double *n, size_t p, double *lambda);

/* Lower tail: *prob = P(max_i |T_i| <= d) when two_sided is nonzero, else
 * P(max_i T_i <= d). Two-sided, d <= 0 gives 0; d = +inf gives 1; one-sided d = -inf
 * gives 0. Absolute accuracy about 1e-13. */
int dunnett_cdf(double d, const double *lambda, size_t p, double df, int two_sided,
                double *prob);

/* Upper tail, the complement of dunnett_cdf: P(max_i |T_i| > d) (two-sided) or
 * P(max_i T_i > d) (one-sided). It is integrated directly, never as 1 - cdf, so that it
 * keeps its relative accuracy when small: the adjusted p-value of a comparison with
 * statistic t is dunnett_sf(|t|, ...) two-sided, dunnett_sf(t, ...) one-sided. */
int dunnett_sf(double d, const double *lambda, size_t p, double df, int two_sided,
               double *prob);

/* Critical value: *d with dunnett_sf(*d, ...) = alpha, 0 < alpha < 1 (for alpha > 1/2
 * it solves dunnett_cdf(*d, ...) = 1 - alpha, where 1 - alpha is exact). The root is
 * bracketed between the single-comparison t quantile (below) and the Sidak/Slepian
 * quantile (above), both bounds for product correlations lambda_i lambda_j >= 0, and
 * found by Newton steps on the log of the tail, safeguarded by bisection. Relative
 * accuracy about 1e-10 (absolute 1e-12 near 0, one-sided). Returns AVOW_EOVERFLOW with
 * *d = +inf when the value exceeds the largest double (tiny df); otherwise status as
 * above. */
int dunnett_qinv(double alpha, const double *lambda, size_t p, double df, int two_sided,
                 double *d);

#endif
