/* noncentral.h: noncentral F and noncentral t distributions, for power, sample size and
 * the noncentrality confidence interval of an effect size.
 *
 * Definitions:
 *   - Noncentral F(d1, d2, lambda): (X1/d1)/(X2/d2) with X1 a noncentral chi-square on
 *     d1 df with noncentrality lambda (the sum of squared means, so that the power of a
 *     one-way ANOVA with N observations and Cohen's effect size f uses lambda = N f^2)
 *     and X2 an independent central chi-square on d2 df.
 *   - Noncentral t(nu, delta): (Z + delta)/sqrt(V/nu), Z standard normal, V an
 *     independent chi-square on nu df.
 *
 * Conventions shared by every function here (as in dist.h):
 *   - "Q" is the upper tail P(X > x), "P" the lower tail P(X <= x). Both tails are
 *     computed directly, never as 1 minus the other tail, so that a small tail keeps its
 *     relative accuracy.
 *   - Degrees of freedom must be finite and > 0; non-integer values are accepted.
 *   - The noncentrality lambda must be finite, >= 0 and <= NCDIST_LAMBDA_MAX; delta must
 *     be finite with |delta| <= NCDIST_DELTA_MAX. lambda = 0 and delta = 0 give exactly
 *     the central values of dist.h (dist_f_p/dist_f_q, dist_t_q).
 *   - Probability and power functions return NaN for invalid arguments (NaN anywhere,
 *     bad df, noncentrality out of range, alpha outside (0, 1)); the functions that
 *     return a status return AVOW_EDOM instead (status codes from avow/util.h) and
 *     leave their outputs unchanged.
 *   - Accuracy, measured against mpmath at 40 digits and SciPy 1.10.1 (tests/unit/
 *     test_noncentral.c, tests/ref/noncentral.py, and some 20,000 random points while
 *     this was written): both tails to about 1e-13 relative, down to tails of about
 *     1e-280, for moderate df. The limit is GSL's incomplete beta, whose relative error
 *     grows to about 2e-15 (a + b) for large parameters a = d1/2 + j, b = d2/2 (j up to
 *     about lambda/2 + 40 sqrt(lambda)): the largest error measured is 3e-11 relative
 *     (1.5e-11 absolute) at d1 = d2 = 1e4, lambda = 1e4, and 8e-12 at nu = 1e4,
 *     delta = 100; for df up to 1e7 and lambda up to 1e6, P + Q stays within 1e-10 of 1
 *     (measured 7e-11 at nu = 2.7e6, delta = -833).
 *     Tails below about 1e-280 lose relative accuracy and underflow to 0 below the
 *     doubles; a tail near 1 is good to about 2e-15 absolute. When nu/t^2 (or
 *     d2/(d1 x)) falls below the normal doubles (|t| > 1e154 for nu near 1) the beta
 *     argument is subnormal with few significant digits: measured 8e-11 absolute at
 *     t = 9e158, nu = 0.011, delta = -820.
 *   - Cost (one x86-64 core): a P and Q pair takes about 5-10 us up to lambda = 1000,
 *     25 us at lambda = 1e4 and 250 us at lambda = 1e6 (the number of terms grows like
 *     sqrt(lambda)); the noncentral t about twice that at lambda = delta^2. The small
 *     tail of the noncentral t when t and delta have opposite signs is a quadrature:
 *     10-25 us on average, at most about 0.4 ms (nu from 1e-3 to 1e4). The slowest call
 *     seen in 120,000 random ones (df from 1e-3 to 1e7, any lambda and delta in range)
 *     took 8 ms, at |delta| near 800.
 *   - The first call of any function here turns GSL's abort-on-error handler off
 *     (gsl_set_error_handler_off) for the whole process, as dist.h does; GSL failures
 *     show up as NaN, never as an abort. Make the first call before starting threads.
 *     After that every function is safe to call from several threads at once.
 *   - No function here prints or allocates (the quadrature keeps its panel stack, about
 *     7 KB, on the C stack). */
#ifndef AVOW_NONCENTRAL_H
#define AVOW_NONCENTRAL_H

/* Largest noncentrality accepted by the noncentral F functions, and the largest
 * |delta| accepted by the noncentral t functions (delta^2/2 = NCDIST_LAMBDA_MAX/2). */
#define NCDIST_LAMBDA_MAX 1e6
#define NCDIST_DELTA_MAX 1000.0

/* Lower tail of the noncentral F: P(F <= x; d1, d2, lambda). x <= 0 gives 0, x = +inf
 * gives 1; lambda = 0 gives dist_f_p(x, d1, d2). Method: the Poisson mixture
 * sum_j Pois(j; lambda/2) I_y(d1/2 + j, d2/2), y = d1 x/(d1 x + d2), summed outward from
 * the Poisson mode with a rigorous bound on what is left (Benton & Krishnamoorthy 2003,
 * see src/noncentral.c). */
double ncdist_f_p(double x, double d1, double d2, double lambda);

/* Upper tail of the noncentral F: P(F > x; d1, d2, lambda), summed directly as
 * sum_j Pois(j; lambda/2) I_{1-y}(d2/2, d1/2 + j). x <= 0 gives 1, x = +inf gives 0;
 * lambda = 0 gives dist_f_q(x, d1, d2). */
double ncdist_f_q(double x, double d1, double d2, double lambda);

/* Lower tail of the noncentral t: P(T <= t; nu, delta). t = -inf gives 0, +inf gives 1;
 * delta = 0 gives the central dist_t_q(-t, nu). For t < 0 the reflection
 * P(T <= t; nu, delta) = P(T > -t; nu, -delta) is used (directly, no subtraction). */
double ncdist_t_p(double t, double nu, double delta);

/* Upper tail of the noncentral t: P(T > t; nu, delta). t = -inf gives 1, +inf gives 0;
 * delta = 0 gives dist_t_q(t, nu). */
double ncdist_t_q(double t, double nu, double delta);

/* Inversion in the noncentrality: *lambda such that ncdist_f_p(x, d1, d2, *lambda) = p,
 * for x finite and >= 0 and p in the open interval (0, 1). P(F <= x) decreases in
 * lambda, so the solution is unique; when P at lambda = 0 is already <= p, *lambda = 0
 * (no lambda >= 0 solves the equation). Solved by Brent's bracketed method on the log of
 * the smaller tail (log P - log p for p <= 1/2, log(1 - p) - log Q otherwise), to about
 * 1e-12 relative in lambda (limited by the accuracy of the tails).
 * Returns 0; AVOW_EDOM for invalid arguments (lambda NULL, x not finite or < 0, p
 * outside (0, 1), bad df, NaN) or when a tail cannot be evaluated; AVOW_EOVERFLOW when
 * the solution exceeds NCDIST_LAMBDA_MAX (*lambda is then +inf). *lambda is unchanged
 * on AVOW_EDOM. */
int ncdist_f_lambda(double x, double d1, double d2, double p, double *lambda);

/* Confidence interval for the noncentrality of an observed F (Steiger 2004, Psychol.
 * Methods 9:164): *lo solves P(F <= x; lambda) = (1 + level)/2 and *hi solves it for
 * (1 - level)/2, each through ncdist_f_lambda (0 when no lambda >= 0 reaches it).
 * level must lie in (0, 1), e.g. 0.95. Status as for ncdist_f_lambda (the first
 * failure); on AVOW_EDOM both outputs are unchanged. Cohen's f interval is
 * sqrt(lambda/N) at both ends. */
int ncdist_f_lambda_ci(double x, double d1, double d2, double level, double *lo,
                       double *hi);

/* Power of the F test at level alpha: P(F > F_crit; d1, d2, lambda) with F_crit the
 * upper alpha quantile of the central F(d1, d2) (dist_f_qinv). alpha in (0, 1).
 * NaN for invalid arguments or when the critical value cannot be computed. */
double ncdist_f_power(double alpha, double d1, double d2, double lambda);

/* Power of a t test at level alpha against noncentrality delta.
 * sides = 1: the one-sided test rejecting for large T, P(T > t_alpha; nu, delta);
 * sides = 2: P(T > t_{alpha/2}; nu, delta) + P(T <= -t_{alpha/2}; nu, delta),
 * t_p the upper p quantile of the central t(nu) (dist_t_qinv). For two samples of n
 * each and standardized difference d, nu = 2n - 2 and delta = d sqrt(n/2).
 * NaN for invalid arguments (sides not 1 or 2, alpha outside (0, 1), ...). */
double ncdist_t_power(double alpha, double nu, double delta, int sides);

/* Smallest number n >= 2 of observations per group for which the one-way ANOVA F test
 * with k equal groups (d1 = k - 1, d2 = k (n - 1), lambda = k n f^2, Cohen's f) reaches
 * at least the power `target` at level alpha. k is an integer from 2 to 1e6 (as a
 * double), f > 0 finite, alpha and target in (0, 1). Power increases with n; the search doubles n and
 * then bisects. Returns 0 and sets *n; AVOW_EDOM for invalid arguments or a failed
 * tail (*n unchanged); AVOW_EOVERFLOW when no n with lambda <= NCDIST_LAMBDA_MAX and
 * n <= 1e9 reaches the target (*n unchanged). */
int ncdist_f_oneway_n(double k, double f, double alpha, double target, long *n);

#endif
