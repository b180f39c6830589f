/* noncentral.c: noncentral F and t tails, noncentrality inversion, power, sample size.
 *
 * Both distributions are Poisson-type mixtures of regularized incomplete beta functions
 * I_x(a, b) (GSL's gsl_sf_beta_inc_e):
 *
 *   noncentral F, mu = lambda/2, y = d1 x/(d1 x + d2):
 *     P(F <= x) = sum_j pi(j) I_y(d1/2 + j, d2/2),
 *     P(F > x)  = sum_j pi(j) I_{1-y}(d2/2, d1/2 + j),   pi(k) = e^-mu mu^k / Gamma(k + 1);
 *
 *   noncentral t, t > 0, mu = delta^2/2, y = t^2/(t^2 + nu) (Lenth 1989, Appl. Statist.
 *   38:185-189, algorithm AS 243):
 *     P(0 < T <= t) = (1/2) sum_j [pi(j) I_y(j + 1/2, nu/2) + s pi(j + 1/2) I_y(j + 1, nu/2)],
 *     s = sign(delta) (pi(j + 1/2) is Lenth's |q_j|), P(T <= 0) = Phi(-delta), and, for
 *     delta >= 0, P(T > t) = (1/2) sum_j [pi(j) I_{1-y}(nu/2, j + 1/2)
 *                                         + pi(j + 1/2) I_{1-y}(nu/2, j + 1)].
 *
 * One summation engine serves all of these: Benton & Krishnamoorthy (2003), "Computing
 * discrete mixtures of continuous distributions: noncentral chisquare, noncentral t and
 * the distribution of the square of the sample multiple correlation coefficient",
 * Comput. Statist. Data Anal. 43:249-267. The sum starts at the mode of the Poisson
 * weights and runs outward in both directions; the incomplete betas are carried by the
 * recurrence I_y(a + 1, b) = I_y(a, b) - T(a), T(a) = y^a (1-y)^b / (a B(a, b)), and
 * each direction stops when a bound on everything left is below 1e-17 of the sum. For
 * |delta| < sqrt(2) the mode is j = 0 and the scheme is Lenth's forward summation of
 * AS 243; for larger |delta|, where AS 243 loses accuracy, it is B&K's. Our own choices
 * within the scheme:
 *
 *   - Directions. Going down in j the lower-tail betas grow by additions
 *     (I(a - 1) = I(a) + T(a - 1)) and going up the upper-tail betas do; those
 *     directions are summed first and never need fresh betas. In the other direction
 *     the recurrence subtracts: its value is re-anchored with gsl_sf_beta_inc whenever it
 *     has fallen below 1/8 of its last anchored value, which bounds the amplification of
 *     rounding errors by 8.
 *   - Terms. The weights pi(k) and the terms T(a) are computed in the saddle-point form
 *     of Loader (2000), "Fast and accurate computation of binomial probabilities" (Bell
 *     Labs technical report): exp(-stirlerr - bd0), which keeps full relative accuracy
 *     where the plain exp(k log mu - mu - lgamma(k + 1)) loses lambda * 1e-16. Between
 *     anchors they follow their two-term recurrences, recomputed every 32 steps and
 *     whenever the value stepped from is below 1e-280 (possibly subnormal: going down in
 *     j a term grows by 1/y per step, and with tiny df and tiny x a subnormal term at
 *     the mode becomes one that matters).
 *   - Starting point. When the beta at the Poisson mode is below 1e-290 (a tiny tail:
 *     the sum is then carried by terms far from the mode) the start moves, by bisection
 *     on j (the betas are monotone in j), to the last index whose beta is still
 *     >= 1e-290, so that the largest terms are never lost to underflow.
 *   - Bounds. Lower-tail betas decrease in j and upper-tail betas increase, and the
 *     Poisson weights fall off geometrically beyond the mode (ratios mu/(k + 1) going up,
 *     k/mu going down), so what is left in a direction is at most
 *     (beta at the current index, or 1) * (current weight)/(1 - ratio).
 *   - The noncentral t with t and delta of opposite signs: the lower tail (t > 0,
 *     delta < 0; at least Phi(|delta|) >= 1/2) is summed as above, with alternating
 *     signs that cost only absolute accuracy near 1. The small upper tail is the
 *     difference of two positive sums (AS 243 and B&K lose it to cancellation). For
 *     |delta| <= 2.5 the difference is kept when the sums cancel by less than a factor
 *     100. Otherwise it comes from P(T > t) = E[Qnorm(|delta| + t S)], S = sqrt(V/nu),
 *     integrated in u = log S (a smooth, log-concave integrand) over the range where it
 *     is within e^-42 of its peak, by adaptive Gauss-Kronrod quadrature (see
 *     nct_opposite_tail).
 *
 * Accuracy is limited by gsl_sf_beta_inc itself, whose log-beta prefactor loses up to
 * about 2e-15 (a + b) relative for large parameters (measured against mpmath: 3e-11 at
 * a = 1e4, b = 5000; 1.4e-12 at a = 1000, b = 500; 1e-13 and better below a + b = 100).
 * The terms, weights, bounds and recurrences above add about 1e-14.
 *
 * Inversion in lambda uses Brent's method (Brent 1973, "Algorithms for Minimization
 * without Derivatives", ch. 4) on a bracket found by doubling. */
#include "avow/noncentral.h"

#include <float.h>
#include <math.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_sf_erf.h>
#include <gsl/gsl_sf_gamma.h>

#include "avow/dist.h"
#include "avow/util.h"

/* log(2 pi) and log(sqrt(2 pi)). */
static const double LOG_2PI = 1.8378770664093454835606594728112353;
static const double LOG_SQRT_2PI = 0.9189385332046727417803297364056177;
static const double LN2 = 0.6931471805599453094172321214581766;
static const double SQRT2 = 1.4142135623730950488016887242096981;

/* A sum stops when what is left is below this fraction of it, or below ABS_FLOOR (which
 * cannot matter to any tail above 1e-290, and ends sums whose terms all underflow). */
static const double SUM_EPS = 1e-17;
static const double ABS_FLOOR = 1e-305;
/* Betas below this are not used as starting points (see the top of the file). */
static const double TINY = 1e-290;
/* Weights and terms are recomputed from their closed forms every this many steps. */
enum { REANCHOR = 32 };
/* In a subtracting direction a beta is recomputed when it drops below this fraction of
 * its last anchored value. */
static const double DROP = 0.125;
/* Safety net on the number of terms of one sum (never reached for valid arguments:
 * about 40 sqrt(lambda) + 1000 terms are used). */
static const long MAX_TERMS = 20000000L;

/* Turn GSL's abort-on-error handler off, once per process. */
static void gsl_quiet(void)
{
    static int done;   /* the handler has been switched off */
    if (!done) {
        gsl_set_error_handler_off();
        done = 1;
    }
}

/* A degrees-of-freedom value this module accepts: finite and > 0. */
static int df_ok(double d) { return isfinite(d) && d > 0; }

/* A noncentrality lambda this module accepts. */
static int lambda_ok(double l) { return isfinite(l) && l >= 0 && l <= NCDIST_LAMBDA_MAX; }

/* A noncentrality delta this module accepts. */
static int delta_ok(double d) { return isfinite(d) && fabs(d) <= NCDIST_DELTA_MAX; }

static double clamp01(double q)
{
    if (q < 0) return 0;
    if (q > 1) return 1;
    return q;
}

/* ---- Loader's (2000) saddle-point pieces ---- */

/* stirlerr(z) = log Gamma(z + 1) - (z + 1/2) log z + z - log sqrt(2 pi), the error of
 * Stirling's formula, for z > 0: its asymptotic series above 15 (the first omitted term,
 * 691/(360360 z^11), is below 2.3e-16 there, as in Loader's choice), else the log of
 * GSL's gamma* (which is exactly exp(stirlerr)). */
static double stirlerr(double z)
{
    if (z > 15) {
        const double s0 = 1.0 / 12, s1 = 1.0 / 360, s2 = 1.0 / 1260, s3 = 1.0 / 1680,
                     s4 = 1.0 / 1188;
        double r = 1 / (z * z);
        return (s0 - (s1 - (s2 - (s3 - s4 * r) * r) * r) * r) / z;
    }
    return log(gsl_sf_gammastar(z));
}

/* bd0(x, m) = x log(x/m) + m - x >= 0, the deviance term, for x > 0, m > 0, by its
 * series in v = (x - m)/(x + m) when x is near m (no cancellation). */
static double bd0(double x, double m)
{
    if (fabs(x - m) < 0.1 * (x + m)) {
        double v = (x - m) / (x + m);
        double s = (x - m) * v;
        if (fabs(s) < DBL_MIN) return s;
        double ej = 2 * x * v;
        v *= v;
        for (int j = 1; j < 1000; j++) {
            ej *= v;
            double s1 = s + ej / (2 * j + 1);
            if (s1 == s) return s1;
            s = s1;
        }
        return s;
    }
    /* log(x/m) is the more accurate, unless the ratio over- or underflows (x or m
     * subnormal, e.g. the argument of a beta for t near 1e-155). */
    double r = x / m;
    double lr = (r > 0 && isfinite(r)) ? log(r) : log(x) - log(m);
    return x * lr + m - x;
}

/* The Poisson-type weight pi(k) = e^-mu mu^k / Gamma(k + 1) for k >= 0, mu > 0. */
static double pois_w(double k, double mu)
{
    if (k == 0) return exp(-mu);
    return exp(-stirlerr(k) - bd0(k, mu) - 0.5 * (LOG_2PI + log(k)));
}

/* T(a) = y^a z^b / (a B(a, b)) = I_y(a, b) - I_y(a + 1, b), for a, b > 0 and
 * y, z = 1 - y both > 0, written as the binomial-type density
 * Gamma(n + 1)/(Gamma(a + 1) Gamma(b + 1)) y^a z^b (n = a + b) times b/n, in Loader's
 * form. */
static double beta_term(double a, double b, double y, double z)
{
    double n = a + b;
    double lc = stirlerr(n) - stirlerr(a) - stirlerr(b) - bd0(a, n * y) - bd0(b, n * z);
    double lf = LOG_2PI + log(a) + log(b) - log(n);
    return exp(lc - 0.5 * lf) * (b / n);
}

/* ---- incomplete beta ---- */

/* *lo = I_y(a, b) and *up = I_z(b, a) = 1 - *lo, for y + z = 1 (both given, each to
 * full relative accuracy) and a, b > 0. The one on the small side of GSL's switch point
 * (a + 1)/(a + b + 2) (the smaller one, unless both are near 1/2) comes from
 * gsl_sf_beta_inc directly (its continued fraction, relative accuracy), the other as 1
 * minus it. Returns AVOW_EDOM when GSL fails (an underflow is a 0, not a failure). */
static int ibeta_pair(double a, double b, double y, double z, double *lo, double *up)
{
    if (y <= 0) { *lo = 0; *up = 1; return AVOW_OK; }
    if (z <= 0) { *lo = 1; *up = 0; return AVOW_OK; }
    gsl_sf_result r;
    int small_lo = y <= (a + 1) / (a + b + 2);   /* GSL's own switch point */
    int st = small_lo ? gsl_sf_beta_inc_e(a, b, y, &r) : gsl_sf_beta_inc_e(b, a, z, &r);
    double v;
    if (st == GSL_SUCCESS) v = r.val;
    else if (st == GSL_EUNDRFLW) v = isfinite(r.val) && r.val > 0 ? r.val : 0;
    else return AVOW_EDOM;
    if (!isfinite(v)) return AVOW_EDOM;
    v = clamp01(v);
    if (small_lo) { *lo = v; *up = 1 - v; }
    else { *up = v; *lo = 1 - v; }
    return AVOW_OK;
}

/* ---- the mixture engine ---- */

/* sum_{j >= 0} pi(k0 + j) V(j), V(j) = I_y(a0 + j, b) (lower) or I_z(b, a0 + j) (upper). */
typedef struct mix {
    double a0, b;   /* first parameter at j = 0, second parameter */
    double y, z;    /* the beta argument and its complement, y + z = 1, both in (0, 1) */
    double mu, k0;  /* Poisson parameter (> 0) and index offset of the weights (0, 1/2) */
    int upper;      /* 1: V(j) = I_z(b, a0 + j), increasing in j; 0: I_y(a0 + j, b) */
} mix;

/* V(j) from GSL; NaN on failure. */
static double mix_v(const mix *m, long j)
{
    double lo, up;
    if (ibeta_pair(m->a0 + (double)j, m->b, m->y, m->z, &lo, &up)) return NAN;
    return m->upper ? up : lo;
}

/* Add the terms of one direction (dir = +1 or -1) from the anchor ja, where V = va, to
 * *sum; the anchor term itself is added when with_anchor. Returns AVOW_EDOM on failure. */
static int mix_pass(const mix *m, long ja, double va, int dir, int with_anchor, double *sum)
{
    const int adding = (dir > 0) == (m->upper != 0);   /* V grows in this direction */
    long j = ja;
    double v = va, vanc = va;
    double w = pois_w(m->k0 + (double)j, m->mu);
    double t = beta_term(m->a0 + (double)j, m->b, m->y, m->z);   /* T at a0 + j */
    int since = 0;
    if (with_anchor) *sum += w * v;
    for (long it = 0; it < MAX_TERMS; it++) {
        if (dir < 0 && j == 0) return AVOW_OK;
        double ap = m->a0 + (double)j;
        /* The weight and term at j + dir: by their recurrences, or afresh every REANCHOR
         * steps and whenever the value stepped from is below 1e-280 (it may be
         * subnormal, with few significant bits, or 0; going down in j a term grows by
         * 1/y per step and could carry that error into a value that matters). */
        int fresh = ++since >= REANCHOR;
        if (fresh) since = 0;
        double wn, tn;
        if (fresh || !(w >= 1e-280)) wn = pois_w(m->k0 + (double)(j + dir), m->mu);
        else if (dir > 0) wn = w * (m->mu / (m->k0 + (double)j + 1));
        else wn = w * ((m->k0 + (double)j) / m->mu);
        if (fresh || !(t >= 1e-280)) tn = beta_term(ap + dir, m->b, m->y, m->z);
        else if (dir > 0) tn = t * (m->y * ((ap + m->b) / (ap + 1)));
        else tn = t * (ap / (ap + m->b - 1)) / m->y;
        /* V(j + 1) = V(j) -+ T(j) going up, V(j - 1) = V(j) +- T(j - 1) going down. */
        double dv = dir > 0 ? t : tn;
        v = adding ? v + dv : v - dv;
        w = wn;
        t = tn;
        j += dir;
        if (!adding && v < DROP * vanc) {
            v = mix_v(m, j);
            if (isnan(v)) return AVOW_EDOM;
            vanc = v;
        }
        /* Bound on the weights from j onward in this direction (geometric beyond the
         * mode, else 1), times the bound on the betas there. */
        double k = m->k0 + (double)j, wb = 1;
        if (dir > 0 && k + 1 > m->mu) wb = w / (1 - m->mu / (k + 1));
        else if (dir < 0 && k < m->mu) wb = w / (1 - k / m->mu);
        if (wb > 1) wb = 1;
        double bound = adding ? wb : (v > 0 ? v : 0) * wb;
        if (bound <= SUM_EPS * *sum || bound <= ABS_FLOOR) return AVOW_OK;
        *sum += w * v;
    }
    return AVOW_EDOM;
}

/* The whole sum; NaN on failure. */
static double mix_sum(const mix *m)
{
    long mode = m->mu > m->k0 ? (long)floor(m->mu - m->k0) : 0;
    long ja = mode;
    double va = mix_v(m, ja);
    if (isnan(va)) return NAN;
    if (va < TINY) {
        if (!m->upper) {
            /* The largest j < mode with I_y(a0 + j, b) >= TINY (I decreases in j). */
            double v0 = mix_v(m, 0);
            if (isnan(v0)) return NAN;
            long lo = 0, hi = mode;
            double vlo = v0;
            if (v0 >= TINY) {
                while (hi - lo > 1) {
                    long mid = lo + (hi - lo) / 2;
                    double vm = mix_v(m, mid);
                    if (isnan(vm)) return NAN;
                    if (vm >= TINY) { lo = mid; vlo = vm; } else hi = mid;
                }
            }
            ja = lo;
            va = vlo;
        } else {
            /* The smallest j > mode with I_z(b, a0 + j) >= TINY (increasing in j), up to
             * where the Poisson weights are below 1e-320 of their peak. */
            long jmax = mode + (long)(40 * sqrt(m->mu) + 800);
            long lo = mode, hi = mode, step = 1;
            double vhi = va;
            for (;;) {
                hi = lo + step < jmax ? lo + step : jmax;
                vhi = mix_v(m, hi);
                if (isnan(vhi)) return NAN;
                if (vhi >= TINY || hi == jmax) break;
                lo = hi;
                step *= 2;
            }
            if (vhi >= TINY) {
                while (hi - lo > 1) {
                    long mid = lo + (hi - lo) / 2;
                    double vm = mix_v(m, mid);
                    if (isnan(vm)) return NAN;
                    if (vm >= TINY) { hi = mid; vhi = vm; } else lo = mid;
                }
            }
            ja = hi;
            va = vhi;
        }
    }
    double sum = 0;
    int first = m->upper ? +1 : -1;   /* the adding direction goes first */
    if (mix_pass(m, ja, va, first, 1, &sum)) return NAN;
    if (mix_pass(m, ja, va, -first, 0, &sum)) return NAN;
    return sum;
}

/* ---- noncentral F ---- */

/* y = d1 x/(d1 x + d2) and z = 1 - y = d2/(d1 x + d2), each to full relative accuracy,
 * for 0 < x < inf (no overflow of d1 x). */
static void f_args(double x, double d1, double d2, double *y, double *z)
{
    double r = (d2 / d1) / x;   /* z/y; may be 0 or inf */
    if (r <= 1) {
        *y = 1 / (1 + r);
        *z = r / (1 + r);
    } else {
        double s = (d1 / d2) * x;   /* y/z < 1 */
        *y = s / (1 + s);
        *z = 1 / (1 + s);
    }
}

/* Either tail for valid arguments with 0 < x < inf and lambda > 0. */
static double ncf_tail(double x, double d1, double d2, double lambda, int upper)
{
    mix m;
    f_args(x, d1, d2, &m.y, &m.z);
    if (m.y <= 0) return upper ? 1 : 0;
    if (m.z <= 0) return upper ? 0 : 1;
    m.a0 = d1 / 2;
    m.b = d2 / 2;
    m.mu = lambda / 2;
    m.k0 = 0;
    m.upper = upper;
    return clamp01(mix_sum(&m));
}

double ncdist_f_p(double x, double d1, double d2, double lambda)
{
    gsl_quiet();
    if (isnan(x) || !df_ok(d1) || !df_ok(d2) || !lambda_ok(lambda)) return NAN;
    if (lambda == 0) return dist_f_p(x, d1, d2);
    if (x <= 0) return 0;
    if (isinf(x)) return 1;
    return ncf_tail(x, d1, d2, lambda, 0);
}

double ncdist_f_q(double x, double d1, double d2, double lambda)
{
    gsl_quiet();
    if (isnan(x) || !df_ok(d1) || !df_ok(d2) || !lambda_ok(lambda)) return NAN;
    if (lambda == 0) return dist_f_q(x, d1, d2);
    if (x <= 0) return 1;
    if (isinf(x)) return 0;
    return ncf_tail(x, d1, d2, lambda, 1);
}

/* ---- noncentral t ---- */

/* log of the standard normal upper tail, log Qnorm(z), for any z (GSL's log erfc keeps
 * it accurate far into the tail). */
static double log_qnorm(double z)
{
    return gsl_sf_log_erfc(z / SQRT2) - LN2;
}

/* e^y - 1 - y without cancellation: its Taylor series for |y| < 1/2, else from expm1. */
static double expm1_minus_x(double y)
{
    if (fabs(y) >= 0.5) return expm1(y) - y;
    double term = 0.5 * y * y, sum = term;
    for (int k = 3; k < 40; k++) {
        term *= y / k;
        double ns = sum + term;
        if (ns == sum) break;
        sum = ns;
    }
    return sum;
}

/* The integrand of P(T > t) = E[Qnorm(d + t S)] in u = log S (d >= 0, t > 0):
 * L(u) = log Qnorm(d + t e^u) + log of the density of u = log S, which is
 * c - h (e^(2u) - 1 - 2u) with h = nu/2 and c = log 2 + (1/2) log h - stirlerr(h)
 * - log sqrt(2 pi) (no cancellation for large nu). */
typedef struct tq_int {
    double d, t, h, c;
} tq_int;

/* L(u); with dl not NULL also L'(u) and L''(u) (L is concave). */
static double tq_L(const tq_int *q, double u, double *dl, double *d2l)
{
    double ts = q->t * exp(u);
    double zz = q->d + ts;
    double lq = log_qnorm(zz);
    double e2m1 = expm1(2 * u);
    double L = lq + q->c - q->h * expm1_minus_x(2 * u);
    if (dl) {
        /* R = phi(z)/Qnorm(z), the inverse Mills ratio (GSL's normal hazard function,
         * accurate for large z where phi/Qnorm would cancel); R' = R (R - z). */
        double R = gsl_sf_hazard(zz);
        *dl = -ts * R - 2 * q->h * e2m1;
        *d2l = -ts * R - ts * ts * R * (R - zz) - 4 * q->h * (e2m1 + 1);
    }
    return L;
}

/* exp(L(u) - peak), the integrand scaled by its peak, as a GSL function. */
typedef struct tq_scaled {
    const tq_int *q;
    double lpk;
} tq_scaled;

static double tq_f(double u, void *p)
{
    const tq_scaled *s = p;
    return exp(tq_L(s->q, u, NULL, NULL) - s->lpk);
}

/* P(T > t; nu, -d) for t > 0, d > 0 (the small tail of opposite signs) by quadrature
 * in u = log S; NaN on failure (not seen for nu from 1e-3 to 1e7). */
static double nct_opposite_tail(double t, double nu, double d)
{
    tq_int q;
    q.d = d;
    q.t = t;
    q.h = nu / 2;
    q.c = LN2 + 0.5 * log(q.h) - stirlerr(q.h) - LOG_SQRT_2PI;

    /* The peak: L' decreases; bracket its zero by doubling, then Newton steps
     * safeguarded by bisection. */
    double dl, d2l;
    double lo, hi;
    tq_L(&q, 0, &dl, &d2l);
    if (dl > 0) {
        lo = 0;
        hi = 1;
        for (int i = 0; i < 12; i++) {
            tq_L(&q, hi, &dl, &d2l);
            if (!(dl > 0)) break;
            lo = hi;
            hi *= 2;
        }
    } else {
        hi = 0;
        lo = -1;
        for (int i = 0; i < 12; i++) {
            tq_L(&q, lo, &dl, &d2l);
            if (dl > 0) break;
            hi = lo;
            lo *= 2;
        }
    }
    /* The peak only centres and scales the grid: 1e-10 in u is ample. */
    double u = 0.5 * (lo + hi);
    for (int i = 0; i < 200 && hi - lo > 1e-10 * (1 + fabs(u)); i++) {
        tq_L(&q, u, &dl, &d2l);
        if (dl == 0) break;
        if (dl > 0) lo = u; else hi = u;
        double un = (d2l < 0 && isfinite(dl / d2l)) ? u - dl / d2l : NAN;
        if (un > lo && un < hi) {
            int small = fabs(un - u) <= 1e-10 * (1 + fabs(u));
            u = un;
            if (small) break;
        } else {
            u = 0.5 * (lo + hi);
        }
    }
    double lpk = tq_L(&q, u, &dl, &d2l);
    if (!isfinite(lpk) || !(d2l < 0)) return NAN;
    double sig = 1 / sqrt(-d2l);

    /* The ends: where L has fallen 42 below the peak (e^-42 < 6e-19), found by
     * doubling steps; by concavity what lies beyond is smaller still (relative to the
     * peak area, below 1e-18). */
    const double DROP_L = 42;
    double ends[2];
    for (int side = 0; side < 2; side++) {
        double sgn = side ? 1 : -1, step = sig;
        double e = u + sgn * step;
        for (int i = 0; i < 60 && tq_L(&q, e, NULL, NULL) > lpk - DROP_L; i++) {
            step *= 2;
            e = u + sgn * step;
        }
        ends[side] = e;
    }

    /* The integral is at most e^lpk (b - a) plus a tail below e^-42 of it: nothing to
     * compute when that underflows. */
    double a = ends[0], b = ends[1];
    if (lpk + log(b - a) < -746) return 0;
    /* Adaptive Gauss-Kronrod (GSL's non-allocating 15-point rule, gsl_integration_qk15,
     * from QUADPACK: Piessens et al. 1983) on panels that start at widths sig, 2 sig,
     * 4 sig, ... away from the peak (so that the narrow peak and a long, slowly decaying
     * left tail, e^(nu u) for small nu, are both resolved), each panel halved until its
     * error estimate is below 1e-15 of the total or the rounding noise of L. */
    tq_scaled ts = {&q, lpk};
    gsl_function fn = {tq_f, &ts};
    enum { STACK = 400 };
    double pa[STACK], pb[STACK];
    int top = 0;
    for (int side = 0; side < 2; side++) {
        double from = u, w = sig;
        for (;;) {
            double to = side ? from + w : from - w;
            int last = side ? to >= b : to <= a;
            if (last) to = side ? b : a;
            if (top == STACK) return NAN;
            pa[top] = side ? from : to;
            pb[top] = side ? to : from;
            top++;
            if (last) break;
            from = to;
            w *= 2;
        }
    }
    double total = 0, r, err, rabs, rasc;
    for (int i = 0; i < top; i++) {   /* a first estimate, for the tolerance */
        gsl_integration_qk15(&fn, pa[i], pb[i], &r, &err, &rabs, &rasc);
        total += r;
    }
    double noise = 8 * DBL_EPSILON * (fabs(lpk) + fabs(q.c) + 1);
    double tol = (noise > 1e-15 ? noise : 1e-15) * total;
    double sum = 0;
    long evals = 0;
    while (top > 0) {
        top--;
        double pl = pa[top], pr = pb[top];
        gsl_integration_qk15(&fn, pl, pr, &r, &err, &rabs, &rasc);
        if (++evals > 20000) return NAN;
        if (err <= tol || pr - pl <= 1e-12 * (1 + fabs(pl))) {
            sum += r;
            continue;
        }
        if (top + 2 > STACK) return NAN;
        double mid = 0.5 * (pl + pr);
        pa[top] = pl; pb[top] = mid; top++;
        pa[top] = mid; pb[top] = pr; top++;
    }
    return sum * exp(lpk);
}

/* y = t^2/(t^2 + nu) and z = nu/(t^2 + nu), each to full relative accuracy, t > 0 finite. */
static void t_args(double t, double nu, double *y, double *z)
{
    if (t * t >= nu || t > 1e150) {
        double r = (nu / t) / t;   /* z/y <= 1 */
        *y = 1 / (1 + r);
        *z = r / (1 + r);
    } else {
        double s = (t / nu) * t;   /* y/z < 1 */
        *y = s / (1 + s);
        *z = 1 / (1 + s);
    }
}

/* The two half sums of Lenth's series at t > 0, mu = delta^2/2 > 0: *s0 with the
 * weights pi(j) and first parameters j + 1/2, *s1 with pi(j + 1/2) and j + 1; lower
 * (I_y(., nu/2)) or upper (I_z(nu/2, .)) betas. Returns AVOW_EDOM on failure. */
static int nct_halves(double y, double z, double nu, double mu, int upper, double *s0,
                      double *s1)
{
    mix m;
    m.y = y;
    m.z = z;
    m.b = nu / 2;
    m.mu = mu;
    m.upper = upper;
    m.a0 = 0.5;
    m.k0 = 0;
    *s0 = mix_sum(&m);
    m.a0 = 1;
    m.k0 = 0.5;
    *s1 = mix_sum(&m);
    return isnan(*s0) || isnan(*s1) ? AVOW_EDOM : AVOW_OK;
}

/* P(T > t) (upper) or P(T <= t) for t > 0 finite, delta != 0. */
static double nct_pos(double t, double nu, double delta, int upper)
{
    double y, z;
    t_args(t, nu, &y, &z);
    double d = fabs(delta), mu = 0.5 * d * d;
    double s0, s1;
    if (z <= 0) return upper ? 0 : 1;   /* t beyond every double scale */
    if (y <= 0) {                        /* t^2 underflows: P(T <= t) = P(T <= 0) */
        return upper ? gsl_cdf_ugaussian_P(delta) : gsl_cdf_ugaussian_Q(delta);
    }
    if (delta > 0) {
        if (nct_halves(y, z, nu, mu, upper, &s0, &s1)) return NAN;
        if (upper) return clamp01(0.5 * (s0 + s1));
        return clamp01(gsl_cdf_ugaussian_Q(delta) + 0.5 * (s0 + s1));
    }
    /* delta < 0: the half sum with pi(j + 1/2) enters with a minus sign. */
    if (!upper) {
        if (nct_halves(y, z, nu, mu, 0, &s0, &s1)) return NAN;
        return clamp01(gsl_cdf_ugaussian_P(d) + 0.5 * (s0 - s1));
    }
    /* s0 + s1 is twice P(T > t; nu, |delta|), which exceeds this tail by a factor of at
     * least E[(Z + d)+] / E[(Z - d)+] (about 8000 at d = 3) in the limit of large t, and
     * by more elsewhere: beyond d = 2.5 the series is not even tried. */
    if (d <= 2.5) {
        if (nct_halves(y, z, nu, mu, 1, &s0, &s1)) return NAN;
        double diff = s0 - s1;
        if (diff > 0 && s0 + s1 <= 100 * diff) return clamp01(0.5 * diff);
    }
    return clamp01(nct_opposite_tail(t, nu, d));
}

/* Upper tail P(T > t) for valid arguments. */
static double nct_q(double t, double nu, double delta)
{
    if (delta == 0) return dist_t_q(t, nu);
    if (isinf(t)) return t > 0 ? 0 : 1;
    if (t == 0) return gsl_cdf_ugaussian_P(delta);
    if (t > 0) return nct_pos(t, nu, delta, 1);
    return nct_pos(-t, nu, -delta, 0);   /* P(T > t; delta) = P(T <= -t; -delta) */
}

/* Lower tail P(T <= t) for valid arguments. */
static double nct_p(double t, double nu, double delta)
{
    if (delta == 0) return dist_t_q(-t, nu);
    if (isinf(t)) return t > 0 ? 1 : 0;
    if (t == 0) return gsl_cdf_ugaussian_Q(delta);
    if (t > 0) return nct_pos(t, nu, delta, 0);
    return nct_pos(-t, nu, -delta, 1);   /* P(T <= t; delta) = P(T > -t; -delta) */
}

double ncdist_t_p(double t, double nu, double delta)
{
    gsl_quiet();
    if (isnan(t) || !df_ok(nu) || !delta_ok(delta)) return NAN;
    return nct_p(t, nu, delta);
}

double ncdist_t_q(double t, double nu, double delta)
{
    gsl_quiet();
    if (isnan(t) || !df_ok(nu) || !delta_ok(delta)) return NAN;
    return nct_q(t, nu, delta);
}

/* ---- inversion in lambda ---- */

/* g(lambda) = log P(x; lambda) - log p (p <= 1/2) or log(1 - p) - log Q(x; lambda),
 * decreasing in lambda; NaN on failure. */
typedef struct lam_eq {
    double x, d1, d2, p;
    int use_q;         /* match Q to 1 - p */
    double log_target; /* log p or log(1 - p) */
} lam_eq;

static double lam_g(const lam_eq *e, double lambda)
{
    if (e->use_q) {
        double q = ncdist_f_q(e->x, e->d1, e->d2, lambda);
        if (isnan(q)) return NAN;
        return e->log_target - log(q);
    }
    double p = ncdist_f_p(e->x, e->d1, e->d2, lambda);
    if (isnan(p)) return NAN;
    return log(p) - e->log_target;
}

/* Brent's zeroin on [a, b] with g(a) > 0 > g(b) (given as fa, fb). */
static int brent(const lam_eq *e, double a, double fa, double b, double fb, double *root)
{
    double c = a, fc = fa, d = b - a, ee = d;
    for (int it = 0; it < 200; it++) {
        if ((fb > 0) == (fc > 0)) {
            c = a; fc = fa; d = b - a; ee = d;
        }
        if (fabs(fc) < fabs(fb)) {
            a = b; b = c; c = a;
            fa = fb; fb = fc; fc = fa;
        }
        double tol = 2 * DBL_EPSILON * fabs(b) + 1e-300;
        double m = 0.5 * (c - b);
        if (fabs(m) <= tol || fb == 0) { *root = b; return AVOW_OK; }
        if (fabs(ee) >= tol && fabs(fa) > fabs(fb)) {
            double s = fb / fa, pp, qq;
            if (a == c) {
                pp = 2 * m * s;
                qq = 1 - s;
            } else {
                double r = fb / fc;
                qq = fa / fc;
                pp = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
                qq = (qq - 1) * (r - 1) * (s - 1);
            }
            if (pp > 0) qq = -qq; else pp = -pp;
            if (2 * pp < 3 * m * qq - fabs(tol * qq) && pp < fabs(0.5 * ee * qq)) {
                ee = d;
                d = pp / qq;
            } else {
                d = m; ee = m;
            }
        } else {
            d = m; ee = m;
        }
        a = b; fa = fb;
        b += fabs(d) > tol ? d : (m > 0 ? tol : -tol);
        fb = lam_g(e, b);
        if (isnan(fb)) return AVOW_EDOM;
    }
    *root = b;
    return AVOW_OK;
}

int ncdist_f_lambda(double x, double d1, double d2, double p, double *lambda)
{
    gsl_quiet();
    if (!lambda || !isfinite(x) || x < 0 || !(p > 0 && p < 1) || !df_ok(d1) || !df_ok(d2))
        return AVOW_EDOM;
    lam_eq e = {x, d1, d2, p, p > 0.5, 0};
    e.log_target = e.use_q ? log(1 - p) : log(p);
    double g0 = lam_g(&e, 0);
    if (isnan(g0)) return AVOW_EDOM;
    if (g0 <= 0) { *lambda = 0; return AVOW_OK; }
    /* Bracket: from about the lambda whose mean matches x, doubling. */
    double lo = 0, glo = g0;
    double hi = fmax(1, d1 * x);
    if (hi > NCDIST_LAMBDA_MAX) hi = NCDIST_LAMBDA_MAX;
    double ghi;
    for (;;) {
        ghi = lam_g(&e, hi);
        if (isnan(ghi)) return AVOW_EDOM;
        if (ghi <= 0) break;
        lo = hi;
        glo = ghi;
        if (hi == NCDIST_LAMBDA_MAX) { *lambda = INFINITY; return AVOW_EOVERFLOW; }
        hi = 2 * hi < NCDIST_LAMBDA_MAX ? 2 * hi : NCDIST_LAMBDA_MAX;
    }
    if (ghi == 0) { *lambda = hi; return AVOW_OK; }
    double r;
    if (brent(&e, lo, glo, hi, ghi, &r)) return AVOW_EDOM;
    *lambda = r;
    return AVOW_OK;
}

int ncdist_f_lambda_ci(double x, double d1, double d2, double level, double *lo, double *hi)
{
    gsl_quiet();
    if (!lo || !hi || !(level > 0 && level < 1)) return AVOW_EDOM;
    double l = 0, h = 0;
    int st = ncdist_f_lambda(x, d1, d2, 0.5 + 0.5 * level, &l);
    if (st == AVOW_EDOM) return st;
    int st2 = ncdist_f_lambda(x, d1, d2, 0.5 - 0.5 * level, &h);
    if (st2 == AVOW_EDOM) return st2;
    *lo = l;
    *hi = h;
    return st ? st : st2;
}

/* ---- power and sample size ---- */

double ncdist_f_power(double alpha, double d1, double d2, double lambda)
{
    gsl_quiet();
    if (!(alpha > 0 && alpha < 1) || !df_ok(d1) || !df_ok(d2) || !lambda_ok(lambda))
        return NAN;
    double fc = NAN;
    int st = dist_f_qinv(alpha, d1, d2, &fc);
    if (st == AVOW_EDOM) return NAN;
    return ncdist_f_q(fc, d1, d2, lambda);   /* fc = +inf (overflow) gives 0 */
}

double ncdist_t_power(double alpha, double nu, double delta, int sides)
{
    gsl_quiet();
    if (!(alpha > 0 && alpha < 1) || !df_ok(nu) || !delta_ok(delta) ||
        (sides != 1 && sides != 2))
        return NAN;
    double tc = NAN;
    int st = dist_t_qinv(sides == 2 ? 0.5 * alpha : alpha, nu, &tc);
    if (st == AVOW_EDOM) return NAN;
    double pw = nct_q(tc, nu, delta);
    if (sides == 2) pw += nct_p(-tc, nu, delta);
    return clamp01(pw);
}

/* Power of the balanced one-way ANOVA with k groups of n; NaN on failure, and -1 when
 * lambda exceeds the supported range. */
static double oneway_power(double k, double f, double alpha, long n)
{
    double lambda = k * (double)n * f * f;
    if (!(lambda <= NCDIST_LAMBDA_MAX)) return -1;
    return ncdist_f_power(alpha, k - 1, k * ((double)n - 1), lambda);
}

int ncdist_f_oneway_n(double k, double f, double alpha, double target, long *n)
{
    gsl_quiet();
    if (!n || !(k >= 2 && k <= 1e6 && k == floor(k)) || !isfinite(f) || !(f > 0) ||
        !(alpha > 0 && alpha < 1) || !(target > 0 && target < 1))
        return AVOW_EDOM;
    const long NMAX = 1000000000L;
    long lo = 1, hi = 2;   /* power(lo) < target (lo = 1 stands for "none") */
    for (;;) {
        double pw = oneway_power(k, f, alpha, hi);
        if (isnan(pw)) return AVOW_EDOM;
        if (pw >= target) break;
        if (pw < 0 || hi >= NMAX) return AVOW_EOVERFLOW;
        lo = hi;
        hi = hi * 2 < NMAX ? hi * 2 : NMAX;
    }
    while (hi - lo > 1) {
        long mid = lo + (hi - lo) / 2;
        double pw = oneway_power(k, f, alpha, mid);
        if (isnan(pw)) return AVOW_EDOM;
        if (pw >= target) hi = mid; else lo = mid;
    }
    *n = hi;
    return AVOW_OK;
}
