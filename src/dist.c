/* dist.c: central F and t tails and upper-tail quantiles on top of GSL 2.7.
 *
 * Tails: Q_F(x; d1, d2) = I_{d2/(d2+d1 x)}(d2/2, d1/2) and
 * Q_t(t; nu) = (1/2) I_{nu/(nu+t^2)}(nu/2, 1/2), both evaluated by GSL's regularized
 * incomplete beta (gsl_cdf_fdist_Q/P, gsl_cdf_tdist_Q), except the t closed forms for
 * nu = 1 and nu = 2, which are exact and free of cancellation in the far tail, and the
 * t tail beyond |t| = 1e150, where GSL squares t into overflow and returns 0: there the
 * leading term of the incomplete-beta series is used, in logarithms.
 *
 * Quantiles: GSL 2.7's gsl_cdf_fdist_Qinv (through gsl_cdf_beta_Pinv) returns NaN for
 * some large denominator df (e.g. p = 0.05, d1 = 1, d2 = 1e5) and gsl_cdf_tdist_Qinv
 * loses accuracy for nu = 1 below p = 1e-9. GSL's answer is therefore only a first
 * candidate: it is kept when finite and reproducing the target tail to relative 1e-10,
 * and otherwise a bracketed, safeguarded Newton iteration on the log of the tail takes
 * over. Closed forms handle F with d1 = 2 and t with nu = 1, 2. */
#include "avow/dist.h"

#include <float.h>
#include <math.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_sf_gamma.h>

#include "avow/util.h"

/* pi to double precision (M_PI is not part of ISO C). */
static const double PI = 3.14159265358979323846264338327950288;

/* Accept GSL's quantile when |tail(x)/target - 1| is below this. */
static const double ACCEPT_REL = 1e-10;

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

/* Clamp a probability from GSL into [0, 1]; NaN passes through. */
static double clamp01(double q)
{
    if (q < 0) return 0;
    if (q > 1) return 1;
    return q;
}

double dist_f_q(double x, double d1, double d2)
{
    gsl_quiet();
    if (isnan(x) || !df_ok(d1) || !df_ok(d2)) return NAN;
    if (x <= 0) return 1;
    if (isinf(x)) return 0;
    return clamp01(gsl_cdf_fdist_Q(x, d1, d2));
}

double dist_f_p(double x, double d1, double d2)
{
    gsl_quiet();
    if (isnan(x) || !df_ok(d1) || !df_ok(d2)) return NAN;
    if (x <= 0) return 0;
    if (isinf(x)) return 1;
    return clamp01(gsl_cdf_fdist_P(x, d1, d2));
}

/* |t| above which t^2 may overflow inside gsl_cdf_tdist_Q (it returns 0 beyond about
 * 1.3e154 for every nu, although the tail decays only like |t|^-nu), and above which
 * nu/t^2 would be subnormal. */
static const double T_BIG = 1e150;

/* Upper tail of t(nu) for valid arguments (t not NaN, nu valid). */
static double t_q(double t, double nu)
{
    if (nu == 1) {
        /* Cauchy: Q(t) = 1/2 - atan(t)/pi; for t >= 1 that is atan(1/t)/pi, with no
         * cancellation in the far tail. */
        if (t >= 1) return atan(1 / t) / PI;
        return 0.5 - atan(t) / PI;
    }
    if (nu == 2) {
        /* Q(t) = (1/2)(1 - t/s) with s = sqrt(t^2 + 2); for t >= 1 rewritten as
         * 1/(s (s + t)) to avoid cancellation. */
        if (isinf(t)) return t > 0 ? 0 : 1;
        double s = hypot(t, sqrt(2.0));
        if (t >= 1) return (1 / s) / (s + t);
        return 0.5 - 0.5 * (t / s);
    }
    if (isinf(t)) return t > 0 ? 0 : 1;
    if (fabs(t) > T_BIG && nu <= 1e100) {
        /* Q(|t|) = (1/2) I_y(a, 1/2) with a = nu/2 and y = nu/(nu + t^2) < 1e-199, where
         * I_y(a, b) = y^a/(a B(a, b)) (1 + O(y)) (the series of I_y); y itself would be
         * subnormal or 0, so it is used through its logarithm. */
        double a = fabs(t), h = nu / 2;
        double ly = log(nu) - 2 * log(a) - log1p((nu / a) / a);
        double half = exp(h * ly - log(h) - gsl_sf_lnbeta(h, 0.5) - log(2.0));
        return clamp01(t > 0 ? half : 1 - half);
    }
    if (nu > 30 && nu <= 1e4 && fabs(t) > 1) {
        /* gsl_cdf_tdist_Q switches to a Cornish-Fisher approximation above 30 df, which
         * loses up to 1e-6 relative in the far tail (measured: t = 17.1, nu = 31 is off by
         * 8.4e-7 against mpmath at 40 digits). The regularized incomplete beta,
         * Q(|t|) = (1/2) I_y(nu/2, 1/2) with y = nu/(nu + t^2), keeps 1e-14 there. */
        double half = 0.5 * gsl_sf_beta_inc(nu / 2, 0.5, nu / (nu + t * t));
        return clamp01(t > 0 ? half : 1 - half);
    }
    return clamp01(gsl_cdf_tdist_Q(t, nu));
}

double dist_t_q(double t, double nu)
{
    gsl_quiet();
    if (isnan(t) || !df_ok(nu)) return NAN;
    return t_q(t, nu);
}

double dist_t_p2(double t, double nu)
{
    gsl_quiet();
    if (isnan(t) || !df_ok(nu)) return NAN;
    double p = 2 * t_q(fabs(t), nu);
    return p > 1 ? 1 : p;
}

/* ---- bracketed root-finder on the log of a tail ---- */

/* The equation tail(x) = target on x in (0, inf), for a monotone tail. */
typedef struct tail_eq {
    double (*tail)(double x, const double *df); /* Q (decreasing) or P (increasing) at x */
    double (*pdf)(double x, const double *df);  /* density at x */
    const double *df;                           /* degrees of freedom passed to both */
    int upper;                                  /* 1: tail is the upper tail Q */
    double target;                              /* the target probability, > 0 */
    double log_target;                          /* its logarithm */
} tail_eq;

/* h(x) = log tail(x) - log target for the upper tail and its negative for the lower,
 * so that h decreases in x and h > 0 means the root lies above x. *dh is dh/d(log x)
 * = -x pdf(x)/tail(x) (NaN or 0 when unusable). Returns AVOW_EDOM when GSL cannot
 * evaluate the tail. */
static int tail_eval(const tail_eq *e, double x, double *h, double *dh)
{
    double t = e->tail(x, e->df);
    if (isnan(t)) return AVOW_EDOM;
    double lt = log(t);   /* -inf when the tail underflows */
    *h = e->upper ? lt - e->log_target : e->log_target - lt;
    *dh = t > 0 ? -x * e->pdf(x, e->df) / t : NAN;
    return AVOW_OK;
}

/* Solve e on (0, inf) starting from guess (> 0, finite; 1 otherwise).
 * First a bracket [lo, hi] with h(lo) > 0 > h(hi) is found by geometric expansion,
 * then Newton steps in u = log x are taken (x <- x exp(-h/h')) while they stay inside
 * the bracket and shrink fast enough, with geometric bisection otherwise (the classic
 * safeguarded-Newton scheme). Every evaluation narrows the bracket. */
static int tail_solve(const tail_eq *e, double guess, double *out)
{
    double x = (isfinite(guess) && guess > 0) ? guess : 1.0;
    double h, dh;
    int st = tail_eval(e, x, &h, &dh);
    if (st) return st;
    if (h == 0) { *out = x; return AVOW_OK; }

    double lo, hi;          /* bracket: h(lo) > 0 > h(hi) */
    double factor = 2;      /* expansion factor, squared after each step (capped) */
    if (h > 0) {
        lo = x;
        for (;;) {
            double nx = lo > DBL_MAX / factor ? DBL_MAX : lo * factor;
            double nh, ndh;
            if ((st = tail_eval(e, nx, &nh, &ndh))) return st;
            if (nh == 0) { *out = nx; return AVOW_OK; }
            if (nh < 0) { hi = nx; x = nx; h = nh; dh = ndh; break; }
            if (nx == DBL_MAX) { *out = INFINITY; return AVOW_EOVERFLOW; }
            lo = nx;
            factor = factor < 1e8 ? factor * factor : factor;
        }
    } else {
        hi = x;
        for (;;) {
            double nx = hi / factor;
            if (nx < DBL_MIN) nx = DBL_MIN;   /* GSL's tails are unreliable on subnormals */
            double nh, ndh;
            if ((st = tail_eval(e, nx, &nh, &ndh))) return st;
            if (nh == 0) { *out = nx; return AVOW_OK; }
            if (nh > 0) { lo = nx; x = nx; h = nh; dh = ndh; break; }
            if (nx == DBL_MIN) { *out = 0; return AVOW_OK; }   /* below every normal double */
            hi = nx;
            factor = factor < 1e8 ? factor * factor : factor;
        }
    }

    double step_old = log(hi) - log(lo);   /* size of the step before last, in log x */
    double step = step_old;                /* size of the last step, in log x */
    for (int it = 0; it < 400; it++) {
        double nx = 0;
        int newton = 0;
        if (isfinite(h) && isfinite(dh) && dh < 0) {
            double du = -h / dh;
            /* Newton only when it lands strictly inside the bracket and the step is
             * at most half the step before last (else the iteration is not converging
             * fast enough and bisection is safer). */
            if (fabs(du) < 0.5 * step_old && fabs(du) < 700) {
                nx = x * exp(du);
                newton = nx > lo && nx < hi;
                if (newton) { step_old = step; step = fabs(du); }
            }
        }
        if (!newton) {
            nx = sqrt(lo) * sqrt(hi);   /* geometric midpoint, safe from overflow */
            if (!(nx > lo && nx < hi)) nx = lo + 0.5 * (hi - lo);
            step_old = step;
            step = 0.5 * (log(hi) - log(lo));
        }
        if (!(nx > lo && nx < hi)) break;          /* bracket is two adjacent doubles */
        if (newton && fabs(nx - x) <= 2 * DBL_EPSILON * x) { x = nx; break; }
        x = nx;
        if ((st = tail_eval(e, x, &h, &dh))) return st;
        if (h == 0) break;
        if (h > 0) lo = x; else hi = x;
        if (hi - lo <= 4 * DBL_EPSILON * lo) break;
    }
    *out = x;
    return AVOW_OK;
}

/* GSL's candidate quantile g is kept when finite, > 0 and |tail(g)/target - 1| <
 * ACCEPT_REL. It is then polished by one Newton step in log x, kept only when it brings
 * the tail closer to the target (GSL's own answer can be off by a few 1e-12 relative at
 * large df while still passing the acceptance test).
 * Returns 1 and sets *x when accepted, 0 otherwise. */
static int accept_gsl(const tail_eq *e, double g, double *x)
{
    if (!(isfinite(g) && g > 0)) return 0;
    double t = e->tail(g, e->df);
    if (!(fabs(t / e->target - 1) < ACCEPT_REL)) return 0;
    *x = g;
    double h, dh, h1, dh1;
    if (tail_eval(e, g, &h, &dh) || h == 0 || !isfinite(dh) || !(dh < 0)) return 1;
    double x1 = g * exp(-h / dh);
    if (isfinite(x1) && x1 > 0 && !tail_eval(e, x1, &h1, &dh1) && fabs(h1) < fabs(h))
        *x = x1;
    return 1;
}

/* ---- F quantile ---- */

/* F tails and density with df[0] = d1, df[1] = d2, for finite x > 0. */
static double f_tail_q(double x, const double *df)
{
    return clamp01(gsl_cdf_fdist_Q(x, df[0], df[1]));
}

static double f_tail_p(double x, const double *df)
{
    return clamp01(gsl_cdf_fdist_P(x, df[0], df[1]));
}

static double f_pdf(double x, const double *df) { return gsl_ran_fdist_pdf(x, df[0], df[1]); }

/* Arguments shared by every quantile function: p in (0, 1), out not NULL. */
static int p_ok(double p) { return p > 0 && p < 1; }

/* The F quantile equation for p: p <= 1/2 matches Q to p, p > 1/2 matches P to 1 - p
 * (exact in binary64 for p in [1/2, 1]). df holds {d1, d2} and must outlive e. */
static void f_setup(double p, const double *df, tail_eq *e)
{
    e->df = df;
    e->pdf = f_pdf;
    if (p <= 0.5) {
        e->tail = f_tail_q; e->upper = 1; e->target = p;
    } else {
        e->tail = f_tail_p; e->upper = 0; e->target = 1 - p;
    }
    e->log_target = log(e->target);
}

int dist_f_qinv_solve(double p, double d1, double d2, double *x)
{
    gsl_quiet();
    if (!x || !p_ok(p) || !df_ok(d1) || !df_ok(d2)) return AVOW_EDOM;
    const double df[2] = {d1, d2};
    tail_eq e;
    f_setup(p, df, &e);
    return tail_solve(&e, 1.0, x);
}

int dist_f_qinv(double p, double d1, double d2, double *x)
{
    gsl_quiet();
    if (!x || !p_ok(p) || !df_ok(d1) || !df_ok(d2)) return AVOW_EDOM;
    if (d1 == 2) {
        /* Q(x) = (1 + 2x/d2)^(-d2/2), so x = (d2/2)(p^(-2/d2) - 1). */
        double r = 0.5 * d2 * expm1(-2 * log(p) / d2);
        if (!isfinite(r)) { *x = INFINITY; return AVOW_EOVERFLOW; }
        *x = r;
        return AVOW_OK;
    }
    const double df[2] = {d1, d2};
    tail_eq e;
    f_setup(p, df, &e);
    double g = gsl_cdf_fdist_Qinv(p, d1, d2);   /* NaN when GSL fails */
    if (accept_gsl(&e, g, x)) return AVOW_OK;
    return tail_solve(&e, g, x);
}

/* ---- t quantile ---- */

/* t upper tail and density with df[0] = nu, for finite x > 0. */
static double t_tail_q(double x, const double *df) { return t_q(x, df[0]); }
static double t_pdf(double x, const double *df)
{
    double nu = df[0];
    if (fabs(x) <= T_BIG || nu > 1e100) return gsl_ran_tdist_pdf(x, nu);
    /* x^2 would overflow in GSL's density: use log(1 + x^2/nu) = 2 log|x| - log nu. */
    double lc = gsl_sf_lngamma((nu + 1) / 2) - gsl_sf_lngamma(nu / 2) - 0.5 * log(nu * PI);
    return exp(lc - 0.5 * (nu + 1) * (2 * log(fabs(x)) - log(nu)));
}

double dist_t_density(double x, double nu)
{
    gsl_quiet();
    if (isnan(x) || !df_ok(nu)) return NAN;
    if (isinf(x)) return 0;
    const double df[1] = {nu};
    return t_pdf(x, df);
}

/* The t quantile equation Q(x) = p for 0 < p < 1/2 (the quantile is then positive).
 * df holds {nu} and must outlive e. */
static void t_setup(double p, const double *df, tail_eq *e)
{
    e->df = df;
    e->pdf = t_pdf;
    e->tail = t_tail_q;
    e->upper = 1;
    e->target = p;
    e->log_target = log(p);
}

/* Upper-tail t quantile for 0 < p < 1/2: closed forms, else GSL checked, else solver. */
static int t_qinv_low(double p, double nu, double *x)
{
    if (nu == 1) {
        /* Cauchy: Q(x) = atan(1/x)/pi = p gives x = cot(pi p) = tan(pi (1/2 - p)).
         * 1/tan(pi p) is accurate for small p; 1/2 - p is exact for p >= 1/4. */
        double r = p <= 0.25 ? 1 / tan(PI * p) : tan(PI * (0.5 - p));
        if (!isfinite(r)) { *x = INFINITY; return AVOW_EOVERFLOW; }
        *x = r;
        return AVOW_OK;
    }
    if (nu == 2) {
        /* Q(x) = (1 - x/sqrt(x^2 + 2))/2 = p: with a = 1 - 2p, x^2 (1 - a^2) = 2 a^2 and
         * 1 - a^2 = 4p(1 - p), so x = (1 - 2p)/sqrt(2p(1 - p)). */
        *x = (1 - 2 * p) / sqrt(2 * p * (1 - p));
        return AVOW_OK;
    }
    const double df[1] = {nu};
    tail_eq e;
    t_setup(p, df, &e);
    double g = gsl_cdf_tdist_Qinv(p, nu);       /* NaN when GSL fails */
    if (accept_gsl(&e, g, x)) return AVOW_OK;
    return tail_solve(&e, g, x);
}

/* Apply the symmetry Q(-x) = 1 - Q(x) around a quantile routine for p < 1/2. */
static int t_qinv_sym(double p, double nu, double *x, int solver_only)
{
    if (p == 0.5) { *x = 0; return AVOW_OK; }
    double q = p < 0.5 ? p : 1 - p;   /* exact for p in [1/2, 1] */
    double r;
    int st;
    if (solver_only) {
        const double df[1] = {nu};
        tail_eq e;
        t_setup(q, df, &e);
        st = tail_solve(&e, 1.0, &r);
    } else {
        st = t_qinv_low(q, nu, &r);
    }
    if (st == AVOW_EDOM) return st;
    *x = p < 0.5 ? r : -r;
    return st;
}

int dist_t_qinv(double p, double nu, double *x)
{
    gsl_quiet();
    if (!x || !p_ok(p) || !df_ok(nu)) return AVOW_EDOM;
    return t_qinv_sym(p, nu, x, 0);
}

int dist_t_qinv_solve(double p, double nu, double *x)
{
    gsl_quiet();
    if (!x || !p_ok(p) || !df_ok(nu)) return AVOW_EDOM;
    return t_qinv_sym(p, nu, x, 1);
}
