/* srange.h: the studentized range distribution, for Tukey-Kramer and Games-Howell
 * comparisons.
 *
 * Q = R / S, where R is the range of k independent standard normal variables and
 * nu S^2 is an independent chi-square variable with nu degrees of freedom. Computed by
 * Gauss-Legendre quadrature on subintervals in the manner of Copenhaver & Holland
 * (1988), J. Statist. Comput. Simul. 30:1-15 (see src/srange.c).
 *
 * Conventions shared by every function here:
 *   - k is the number of groups: an integer from 2 to 1000 (a double holding an
 *     integer value). Anything else is invalid.
 *   - df is the error degrees of freedom: > 0, non-integer values accepted (Welch-
 *     Satterthwaite df for Games-Howell), df = +INFINITY allowed (the range of k
 *     normals, a single integral).
 *   - The upper tail P(Q > q) is computed directly, never as 1 minus the lower tail,
 *     so that small tail probabilities keep their relative accuracy; likewise the lower
 *     tail P(Q <= q).
 *   - Probability functions return NaN for invalid arguments (NaN anywhere, bad k,
 *     df <= 0); the quantile function returns AVOW_EDOM instead.
 *   - Accuracy, measured for 2 <= k <= 100, df >= 2 and df = inf (tests/unit/
 *     test_srange.c, tests/ref/srange.py, and wider grids and random inputs while it
 *     was written): about 2e-12 relative in the upper tail, down to tails near 1e-300
 *     (against an independent quadrature, mpmath, and for k = 2 the t distribution),
 *     2e-12 absolute in the lower tail, and about 1e-12 relative in quantiles (SciPy
 *     1.10.1 agrees to 4e-11, its own limit). k up to 1000 and df down to 0.1 use the
 *     same method and were checked less widely (about 5e-12).
 *   - Cost: a tail takes a few thousand evaluations of its integrand: about 100 us at
 *     k = 100, df = 1000 (140 us in the upper tail, 60 us below q = 5), 130 us at
 *     df = 60 and up to about 250 us for small df, on one x86-64 core of the machine
 *     it was written on; df = inf takes about 6 us. A quantile takes 4 to 6 tails.
 *   - The first call of any function here turns GSL's abort-on-error handler off
 *     (gsl_set_error_handler_off) for the whole process and sets up the quadrature
 *     rules (once, thread-safely, with pthread_once). Nothing here prints or allocates
 *     (a call uses about 26 KB of stack); every function is safe to call from several
 *     threads at once. */
#ifndef AVOW_SRANGE_H
#define AVOW_SRANGE_H

/* Lower tail P(Q <= q) of the studentized range with k groups and df degrees of
 * freedom. q <= 0 gives 0, q = +inf gives 1. NaN for invalid arguments. */
double srange_cdf(double q, double k, double df);

/* Upper tail P(Q > q), computed directly (relative accuracy when it is small; 0 is
 * returned only for tails below about 1e-300). q <= 0 gives 1, q = +inf gives 0. NaN
 * for invalid arguments. */
double srange_sf(double q, double k, double df);

/* Upper-tail quantile: *q such that P(Q > *q) = p, for p in the open interval (0, 1)
 * (Tukey's critical value at level alpha is srange_qinv(alpha, k, df, &q)).
 * The root is bracketed by the k = 2 value sqrt(2) t_{p/2}(df), or sqrt(2) z_{p/2} if
 * smaller (a lower bound), and the union bound sqrt(2) t_{p/(k(k-1))}(df) (an upper
 * bound), then found by Newton steps in log q on the log of the tail (its derivative
 * from the density of Q, integrated alongside), safeguarded by bisection of the
 * bracket; for p > 1/2 the lower tail is matched to 1 - p instead (exact in binary64
 * there). Returns 0; AVOW_EDOM for invalid arguments (q NULL, p outside (0, 1), bad k
 * or df, NaN), *q then unchanged; AVOW_EOVERFLOW when the quantile exceeds the largest
 * double (*q is then +inf; only for df well below 1 and tiny p). */
int srange_qinv(double p, double k, double df, double *q);

#endif
