/* dist.h: central F and Student t distributions (tail probabilities and upper-tail
 * quantiles), built on GSL's incomplete-beta based cdf routines.
 *
 * Conventions shared by every function here:
 *   - "Q" is the upper tail P(X > x), "P" the lower tail P(X <= x). Tails are always
 *     computed directly, never as 1 minus the other tail.
 *   - Degrees of freedom must be finite and > 0; non-integer values are accepted.
 *     Infinite df (the normal / chi-square limits) are not handled here.
 *   - Probability functions return NaN for invalid arguments (NaN anywhere, df <= 0,
 *     df infinite); quantile functions return AVOW_EDOM instead.
 *   - The first call of any function here turns GSL's abort-on-error handler off
 *     (gsl_set_error_handler_off), for the whole process: GSL failures then show up as
 *     NaN or status codes, which this module checks, and never abort the program.
 *     (A plain static flag guards this: make the first call before starting threads.)
 *   - No function here prints or allocates. */
#ifndef AVOW_DIST_H
#define AVOW_DIST_H

/* Upper tail of the F(d1, d2) distribution, P(F > x), from gsl_cdf_fdist_Q.
 * x <= 0 gives 1, x = +inf gives 0. */
double dist_f_q(double x, double d1, double d2);

/* Lower tail of the F(d1, d2) distribution, P(F <= x), from gsl_cdf_fdist_P
 * (accurate when it is tiny). x <= 0 gives 0, x = +inf gives 1. */
double dist_f_p(double x, double d1, double d2);

/* Upper tail of Student's t with nu degrees of freedom, P(T > t). Closed forms for
 * nu = 1 (Cauchy) and nu = 2; gsl_cdf_tdist_Q otherwise, except for |t| > 1e150 (where
 * GSL returns 0) handled by the leading term of the series. t = -inf gives 1. */
double dist_t_q(double t, double nu);

/* Two-sided p-value P(|T| > |t|) = 2 Q(|t|), from the upper tail directly (never 1 - P).
 * The result lies in [0, 1]. */
double dist_t_p2(double t, double nu);

/* Density of Student's t with nu degrees of freedom at x (gsl_ran_tdist_pdf; through
 * logarithms where x^2 would overflow). NaN for NaN x or a bad nu; 0 at +-inf. */
double dist_t_density(double x, double nu);

/* Upper-tail quantile of F(d1, d2): *x such that dist_f_q(*x, d1, d2) = p.
 * p must lie in the open interval (0, 1). Closed form when d1 = 2. Otherwise GSL's
 * gsl_cdf_fdist_Qinv is tried first and its answer is kept only when finite and
 * |Q(x)/p - 1| < 1e-10 (for p > 1/2 the stricter |P(x)/(1-p) - 1| < 1e-10 is used,
 * where 1 - p is exact), and then polished by one Newton step; else the bracketed
 * root-finder of dist_f_qinv_solve is used (started from GSL's answer when finite).
 * Returns 0; AVOW_EDOM for invalid arguments (x NULL, p outside (0, 1), bad df, NaN)
 * or when GSL cannot evaluate the tail at these df; AVOW_EOVERFLOW when the quantile
 * exceeds the largest double in magnitude (*x is then +inf, or -inf for a lower t
 * quantile). A quantile below the smallest normal double (about 2.2e-308) gives *x = 0
 * and status 0. *x is left unchanged on AVOW_EDOM.
 * Accuracy is limited by GSL's tails: a few 1e-14 relative for moderate df, but only
 * about 1e-12 for a denominator df near 1e5, where gsl_cdf_fdist_Q itself is off by
 * up to about 2e-12 relative. */
int dist_f_qinv(double p, double d1, double d2, double *x);

/* Upper-tail quantile of t(nu): *x such that dist_t_q(*x, nu) = p, p in (0, 1).
 * p = 1/2 gives 0; p > 1/2 uses symmetry, *x = -(quantile of 1 - p) (1 - p is exact
 * there). Closed forms for nu = 1, *x = cot(pi p), and nu = 2,
 * *x = (1 - 2p)/sqrt(2p(1 - p)). Otherwise gsl_cdf_tdist_Qinv is tried first and kept
 * (then polished by one Newton step) only when finite and |Q(x)/p - 1| < 1e-10, else
 * the root-finder is used.
 * Status as for dist_f_qinv. */
int dist_t_qinv(double p, double nu, double *x);

/* The bracketed root-finder behind dist_f_qinv on its own: no closed form and no GSL
 * quantile first. It solves log Q(x) = log p (log P(x) = log(1 - p) when p > 1/2) by
 * Newton steps in log x, safeguarded by geometric bisection of a bracket. Exposed so
 * that tests can check it against closed forms and reference values; callers should use
 * dist_f_qinv. Status as for dist_f_qinv. */
int dist_f_qinv_solve(double p, double d1, double d2, double *x);

/* The root-finder behind dist_t_qinv on its own (no closed-form quantile, no GSL
 * quantile); symmetry is used for p >= 1/2 as in dist_t_qinv. Status as for
 * dist_f_qinv. */
int dist_t_qinv_solve(double p, double nu, double *x);

#endif
