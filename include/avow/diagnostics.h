/* diagnostics.h: checks of the assumptions behind an analysis of variance, and robust
 * alternatives to it: homogeneity of variance (Levene, Brown-Forsythe, Bartlett), the
 * heteroscedastic one-way test of Welch, the rank test of Kruskal and Wallis, normality
 * of residuals (Shapiro-Wilk, moment ratios), effect sizes and studentized residuals.
 * Formulas, check values and their sources: shared/reference/methods.md sections 5, 6
 * and 8.
 *
 * The group tests work on GROUPS of observations supplied by the caller; a group is one
 * cell of the design (one level of a one-way study, one combination of levels of a
 * multi-factor study), so they serve every design alike. Their inputs are exact
 * decimals (avow_dec): ties, medians and ranks are decided by exact comparison, and
 *   - Levene, Brown-Forsythe, Welch and Kruskal-Wallis statistics (and Welch's df) are
 *     computed in exact rational arithmetic and rounded to binary64 once;
 *   - Bartlett's statistic, which needs logarithms, is computed from exact variance
 *     ratios as a sum of non-negative terms (a few units in the last place).
 * Residual diagnostics (Shapiro-Wilk, moments) take binary64 residuals.
 *
 * Conventions shared by every function here:
 *   - Upper-tail probabilities come directly from GSL's _Q functions (never 1 - P).
 *   - Heap memory comes from avow_malloc/avow_free only; every allocation failure
 *     returns AVOW_ENOMEM and leaves nothing allocated. GMP allocates its own limbs
 *     (and aborts when memory is exhausted, GMP's documented behaviour), as in
 *     decimal.h.
 *   - Nothing here prints. On any status other than AVOW_OK the output structure is
 *     left unchanged (dx_studentized excepted, as documented there).
 *   - Invalid arguments (NULL pointers, k < 2, an empty group, NaN) give AVOW_EDOM.
 *     The statuses below tell the caller why a statistic does not exist for valid data,
 *     so that a report can say so (dx_status_text gives a short English reason).
 *   - Values of a call must lie within AVOW_DX_MAX_DIGITS decimal digits of each other
 *     (the largest order of magnitude minus the smallest decimal exponent, among the
 *     non-zero values); beyond that the exact integers would be absurdly large and the
 *     group tests return AVOW_EOVERFLOW. No measured data come near it.
 *   - The first call of a group test or of dx_shapiro turns GSL's abort-on-error
 *     handler off for the whole process (gsl_set_error_handler_off, guarded by a plain
 *     static flag as in dist.h: make the first call before starting threads). Inputs
 *     are validated so that GSL has nothing to report. Otherwise no function keeps
 *     state, and all may run in several threads at once. */
#ifndef AVOW_DIAGNOSTICS_H
#define AVOW_DIAGNOSTICS_H

#include <stddef.h>
#include <stdint.h>

#include <gmp.h>

#include "avow/decimal.h"

/* Statuses of this module, beyond those of util.h. */
enum {
    AVOW_DX_ESMALL = 16,      /* a group has fewer than 2 observations (Bartlett, Welch) */
    AVOW_DX_EZEROVAR = 17,    /* a group has zero variance (Bartlett, Welch) */
    AVOW_DX_ENOSPREAD = 18,   /* Levene/Brown-Forsythe: the absolute deviations do not vary
                               * within any group, so W is undefined (e.g. every group has
                               * 2 values, or all values of each group are equal) */
    AVOW_DX_EALLTIED = 19,    /* Kruskal-Wallis: every observation has the same value */
    AVOW_DX_ENRANGE = 20,     /* Shapiro-Wilk: n outside 3..5000, where the approximation
                               * is not valid; not computed */
    AVOW_DX_EZERORANGE = 21,  /* Shapiro-Wilk, moments: all values are equal */
    AVOW_DX_ENODF = 22        /* no residual degrees of freedom left (N - k < 1), or too
                               * few for the statistic asked for */
};

/* Largest digit span of the values of one call of a group test (see above). */
#define AVOW_DX_MAX_DIGITS 4000

/* Largest number of groups for which dx_welch works in exact rational arithmetic. */
#define AVOW_DX_WELCH_EXACT_K 64

/* A short English reason for a status of this module or util.h ("a group has zero
 * variance"); never NULL. */
const char *dx_status_text(int status);

/* One group (cell) of observations: values[0..n). */
typedef struct avow_dx_group {
    const avow_dec *values;
    size_t n;
} avow_dx_group;

/* A test referred to the F distribution. */
typedef struct avow_dx_ftest {
    double stat;    /* W (Levene, Brown-Forsythe) or F* (Welch) */
    double df1;     /* numerator df, k - 1 */
    double df2;     /* denominator df: N - k, or Welch's (k^2 - 1)/(3 Lambda) */
    double p;       /* upper tail P(F(df1, df2) > stat), dist_f_q */
} avow_dx_ftest;

/* A test referred to the chi-square distribution. */
typedef struct avow_dx_chisq {
    double stat;    /* T (Bartlett) or H (Kruskal-Wallis, corrected for ties) */
    double df;      /* k - 1 */
    double p;       /* upper tail, gsl_cdf_chisq_Q(stat, df) */
} avow_dx_chisq;

/* Kruskal-Wallis details. */
typedef struct avow_dx_kw {
    avow_dx_chisq test;     /* H corrected for ties, df, p */
    double h_uncorrected;   /* H before the tie correction */
    double tie_factor;      /* 1 - sum(t^3 - t)/(N^3 - N), in (0, 1] */
} avow_dx_kw;

/* Centre of the absolute deviations in dx_levene. */
typedef enum {
    AVOW_DX_MEAN = 0,       /* Levene (1960) */
    AVOW_DX_MEDIAN = 1      /* Brown & Forsythe (1974) */
} avow_dx_centre;

/* Levene (1960, "Robust tests for equality of variances", in Olkin (ed.), Contributions
 * to Probability and Statistics, Stanford) with centre AVOW_DX_MEAN, and Brown &
 * Forsythe (1974, JASA 69:364) with centre AVOW_DX_MEDIAN (for an even group size the
 * median is the mean of the two middle values): the one-way analysis of variance
 * F statistic W of z_ij = |y_ij - centre_i|, with df (k - 1, N - k) and p the upper F
 * tail. methods.md section 6.
 * Exact: every value is scaled to an integer of units 10^e (e the smallest exponent),
 * d_i z_ij = |d_i y_ij - C_i| is an integer (d_i = n_i, C_i = sum y for the mean;
 * d_i = 2, C_i = the two middle values for the median), the per-group sums of these and
 * their squares are accumulated exactly (128/256-bit integers when the scaled values
 * have at most 18 digits, GMP integers otherwise), and the sums of squares of z and W
 * are formed from them as rationals and rounded once. Cost: linear in N for the mean,
 * plus a sort of each group for the median. Measured (one core of the development
 * machine, k = 5, values like 1000000.123; the range of several runs): N = 1e5 takes
 * 2-7 ms (mean) and 15-50 ms (median), N = 1e6 13-45 ms and 0.18-0.30 s; with values
 * spread over 20 orders of magnitude (the GMP path) N = 1e6 takes 0.07-0.13 s and
 * 0.28-0.54 s. So no approximate path is needed for large N.
 * Groups of one value are allowed (their z is 0). Needs k >= 2, every n_i >= 1.
 * Returns AVOW_OK; AVOW_EDOM (invalid arguments), AVOW_DX_ENODF (N - k < 1),
 * AVOW_DX_ENOSPREAD (within-group sum of squares of z is 0), AVOW_EOVERFLOW (digit span),
 * AVOW_ENOMEM. */
int dx_levene(const avow_dx_group *groups, size_t k, avow_dx_centre centre,
              avow_dx_ftest *out);

/* The general path of dx_levene on its own (GMP integers throughout, as used when the
 * scaled values exceed 18 digits), whatever the data. Exposed so that tests can check
 * it against the fast path; callers should use dx_levene. Same results and statuses. */
int dx_levene_big(const avow_dx_group *groups, size_t k, avow_dx_centre centre,
                  avow_dx_ftest *out);

/* Bartlett (1937, Proc. R. Soc. Lond. A 160:268):
 *   T = [(N - k) ln s_p^2 - sum (n_i - 1) ln s_i^2] / C,
 *   C = 1 + (sum 1/(n_i - 1) - 1/(N - k)) / (3(k - 1)),
 * referred to chi-square with k - 1 df (methods.md section 6). The numerator is
 * evaluated as sum (n_i - 1) [eps_i - ln(1 + eps_i)] with eps_i = s_i^2/s_p^2 - 1 exact
 * (the sum of (n_i - 1) eps_i is 0), each term non-negative: from GSL's
 * gsl_sf_log_1plusx_mx when s_i^2/s_p^2 >= 1/2, so nothing cancels when the variances
 * are nearly equal, and with ln(s_i^2/s_p^2) taken from the exact ratio below 1/2,
 * where eps_i is too close to -1 for 1 + eps_i to survive rounding. Measured within
 * 5e-16 relative of a 50-digit evaluation (tests/ref/diagnostics.py).
 * Returns AVOW_OK; AVOW_EDOM, AVOW_DX_ESMALL (some n_i < 2), AVOW_DX_EZEROVAR (some
 * s_i^2 = 0), AVOW_EOVERFLOW, AVOW_ENOMEM. */
int dx_bartlett(const avow_dx_group *groups, size_t k, avow_dx_chisq *out);

/* Welch (1951, Biometrika 38:330) heteroscedastic one-way analysis of variance:
 *   w_i = n_i/s_i^2, ytilde = sum w_i ybar_i / sum w_i,
 *   Lambda = sum (1 - w_i/sum w)^2/(n_i - 1),
 *   F* = [sum w_i (ybar_i - ytilde)^2/(k - 1)] / [1 + 2(k - 2) Lambda/(k^2 - 1)],
 *   df = (k - 1, (k^2 - 1)/(3 Lambda)), p the upper F tail (methods.md section 6).
 * For k <= AVOW_DX_WELCH_EXACT_K, F* and df2 are exact rationals rounded once. The
 * exact rationals grow with k (the weights' denominators multiply: about 2 s at
 * k = 1000, minutes at k = 10000), so above that k they are computed in binary64 from
 * the exact group means and variances: correctly rounded weights, deviations from the
 * weighted mean formed exactly before rounding, 1 - w_i/sum w from sums of the other
 * weights, compensated sums of non-negative terms (measured within 5e-16 relative of
 * the exact values for k = 66 to 150; tests check 1e-14). For k = 2, F* is the square of Welch's t (methods.md WE-k2).
 * Returns AVOW_OK; AVOW_EDOM, AVOW_DX_ESMALL, AVOW_DX_EZEROVAR, AVOW_EOVERFLOW,
 * AVOW_ENOMEM. */
int dx_welch(const avow_dx_group *groups, size_t k, avow_dx_ftest *out);

/* The two paths of dx_welch on their own, whatever k: exact rationals, and binary64.
 * Exposed so that tests can check one against the other; callers should use dx_welch.
 * Same statuses. */
int dx_welch_exact(const avow_dx_group *groups, size_t k, avow_dx_ftest *out);
int dx_welch_double(const avow_dx_group *groups, size_t k, avow_dx_ftest *out);

/* Kruskal & Wallis (1952, JASA 47:583): with midranks for ties (found by exact
 * comparison of the decimals), R_i the rank sum of group i,
 *   H = [12/(N(N+1)) sum R_i^2/n_i - 3(N + 1)] / [1 - sum(t^3 - t)/(N^3 - N)],
 * t running over the sizes of the groups of tied values; referred to chi-square with
 * k - 1 df (methods.md section 6). Exact rational, rounded once. Groups of one value
 * are allowed. Cost: one sort of all N values (0.35-0.7 s for N = 1e6).
 * Returns AVOW_OK; AVOW_EDOM, AVOW_DX_EALLTIED, AVOW_EOVERFLOW (N >= 2^32),
 * AVOW_ENOMEM. */
int dx_kruskal(const avow_dx_group *groups, size_t k, avow_dx_kw *out);

/* Shapiro-Wilk W and its p-value. */
typedef struct avow_dx_sw {
    double w;       /* W, in (0, 1] */
    double p;       /* p-value of Royston's normalizing approximation */
} avow_dx_sw;

/* Shapiro & Wilk (1965, Biometrika 52:591) W for x[0..n) (binary64, e.g. residuals; the
 * caller's array is not changed), with the coefficients and p-value of Royston (1992,
 * Stat. Comput. 2:117) as in algorithm AS R94 (Royston 1995, Appl. Statist. 44:547):
 * methods.md section 5. The normal scores use gsl_cdf_ugaussian_Pinv (double
 * precision, where AS R94 used a 7-digit approximation). 1 - W, which the p-value
 * needs, is computed as the residual sum of squares of x on the coefficients (no
 * cancellation when W is near 1). For n = 3 the p-value is the exact
 * (6/pi)(asin sqrt(W) - asin sqrt(3/4)). For 4 <= n <= 11 the approximation
 * z = (-ln(gamma - ln(1 - W)) - mu)/sigma has no value once ln(1 - W) >= gamma (W far
 * below any tabulated point); p is then 0, the limit of the approximation there.
 * Returns AVOW_OK; AVOW_EDOM (x NULL or a value not finite), AVOW_DX_ENRANGE (n outside
 * 3..5000: not computed), AVOW_DX_EZERORANGE (all values equal), AVOW_ENOMEM. */
int dx_shapiro(const double *x, size_t n, avow_dx_sw *out);

/* Sample moment ratios. */
typedef struct avow_dx_moments {
    double skewness;        /* g1 = m3 / m2^(3/2) */
    double kurtosis;        /* g2 = m4 / m2^2 - 3 (excess kurtosis) */
} avow_dx_moments;

/* Skewness and excess kurtosis of x[0..n) as the sample moment ratios g1 and g2 (the
 * plain moment estimators with divisor n, m_r = sum (x - xbar)^r / n; Joanes & Gill
 * 1998, The Statistician 47:183, citation from memory), not the adjusted G1/G2. These
 * match SciPy's stats.skew and stats.kurtosis with bias=True (their default).
 * The mean is refined by one correction pass and the sums are compensated.
 * Returns AVOW_OK; AVOW_EDOM (x NULL, n < 2, a value not finite), AVOW_DX_EZERORANGE
 * (all values equal), AVOW_ENOMEM never (no allocation). */
int dx_moments(const double *x, size_t n, avow_dx_moments *out);

/* Effect sizes of one term of an analysis of variance. */
typedef struct avow_dx_effect {
    double eta2;            /* SS_effect / SS_total */
    double partial_eta2;    /* SS_effect / (SS_effect + SS_error) */
    double omega2;          /* Hays: (SS_effect - df_effect MS_error)/(SS_total + MS_error);
                             * negative when F < 1: reported as computed */
    double cohen_f;         /* sqrt(SS_effect / SS_error) */
} avow_dx_effect;

/* Effect sizes from an analysis of variance summary (methods.md section 8): eta
 * squared, partial eta squared, Hays's omega squared (Hays 1963, Statistics for
 * Psychologists; citation from memory), which can be negative and is reported as
 * computed, and Cohen's f = sqrt(partial eta^2/(1 - partial eta^2)) = sqrt(SS_effect /
 * SS_error) (Cohen 1988, Statistical Power Analysis, 2nd ed.; citation from memory),
 * which for a one-way design is methods.md's sqrt(eta^2/(1 - eta^2)). MS_error is
 * SS_error / df_error. For a one-way design SS_total = SS_effect + SS_error, and eta2
 * equals partial_eta2.
 * Returns AVOW_OK; AVOW_EDOM unless ss_effect >= 0, ss_error > 0, ss_total > 0,
 * df_effect > 0, df_error > 0, all finite. */
int dx_effect_sizes(double ss_effect, double df_effect, double ss_error, double df_error,
                    double ss_total, avow_dx_effect *out);

/* The same from exact sums of squares (e.g. the rationals of dec_oneway) and integer
 * degrees of freedom: eta2, partial_eta2 and omega2 are the exact values correctly
 * rounded to binary64, cohen_f the square root of the correctly rounded ratio (within
 * one unit in the last place). Returns AVOW_OK; AVOW_EDOM unless ss_effect >= 0,
 * ss_error > 0, ss_total > 0, df_effect > 0, df_error > 0. */
int dx_effect_sizes_exact(const mpq_t ss_effect, uint64_t df_effect, const mpq_t ss_error,
                          uint64_t df_error, const mpq_t ss_total, avow_dx_effect *out);

/* Studentized residuals of the cell-means model (the leverage of an observation in a
 * cell of n_cell observations is h = 1/n_cell; Cook & Weisberg 1982, Residuals and
 * Influence in Regression, ch. 2, citation from memory):
 *   internally studentized  r = e / sqrt(mse (1 - h)),
 *   externally studentized  t = r sqrt((dfe - 1)/(dfe - r^2)),
 * t being e over the residual standard deviation with the observation left out.
 * e is the residual, mse the residual mean square, dfe its degrees of freedom.
 * Returns AVOW_OK with *r and *t set; AVOW_EDOM (nothing set) for invalid arguments:
 * n_cell < 2 (a lone observation has residual 0 and leverage 1), mse <= 0, dfe <= 0,
 * anything not finite, or NULL pointers; AVOW_DX_ENODF with *r set and *t = NaN when
 * dfe <= 1 or dfe - r^2 <= 0 (the variance left without the observation is 0 or has
 * no degrees of freedom). */
int dx_studentized(double e, double n_cell, double mse, double dfe, double *r, double *t);

#endif
