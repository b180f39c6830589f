/* srange.c: the studentized range distribution Q = R / S.
 *
 * Method: Copenhaver & Holland (1988), "Computation of the distribution of the maximum
 * studentized range statistic with application to multiple significance testing of
 * simple effects", J. Statist. Comput. Simul. 30:1-15: the double integral
 *
 *   P(Q <= q) = int_0^inf f_nu(s) P_inf(q s) ds,
 *   P_inf(w)  = P(R <= w) = k int phi(z) [Phi(z) - Phi(z - w)]^(k-1) dz,
 *
 * (f_nu the density of S = sqrt(chi2_nu / nu)) evaluated by Gauss-Legendre rules
 * (12 points) on subintervals, each integral summed panel by panel outward from its
 * peak until what is left cannot matter. Our own choices within that scheme:
 *
 *   - The outer variable is t = log s. Its density p(t) = f_nu(e^t) e^t is smooth and
 *     unimodal at t = 0 for every nu (no s^(nu-1) singularity at s = 0 for
 *     non-integer nu), and its left tail, which carries the heavy tail of Q for small
 *     nu, is a plain exponential e^(nu t) instead of a power of s. log p is evaluated
 *     as C(nu/2) - (nu/2)(expm1(2t) - 2t), with the constant written through GSL's
 *     gsl_sf_gammastar and expm1(y) - y summed as a series for small y, so that
 *     nothing cancels even for nu = 1e30. Above nu = 1e30 the df = inf single integral
 *     is used (the relative difference is of order q^4/nu, below 1e-15 for every q
 *     whose tail does not underflow).
 *   - The upper tail is integrated directly:
 *     P(R > w) = k int phi(z) Phi(z)^(k-1) [1 - (1 - r)^(k-1)] dz, r = Phi(z - w)/Phi(z),
 *     with 1 - (1 - r)^(k-1) = -expm1((k-1) log1p(-r)), and P(Q > q) =
 *     int p(t) P(R > q e^t) dt, so that small upper tails keep their relative accuracy.
 *   - Phi(z) - Phi(z - w) is Q(z - w) - Q(z) when z - w >= 0 and Phi(z) - Phi(z - w)
 *     otherwise, each term taken from erfc on its small side (no cancellation); for
 *     w < 1e-3, a Taylor series about the midpoint.
 *   - For each w only the smaller tail of R is integrated (P(R <= w) below about the
 *     mean range, P(R > w) above it), the other being 1 minus it. The lower-tail
 *     integrand is a narrow peak for small w (width about 1/sqrt(k)), centred and scaled
 *     in closed form. The upper-tail integrand is summed on one grid for the whole call,
 *     its panels sized by a bound on the curvature of its log over all w, so that
 *     k phi(z) Phi(z)^(k-1) is computed once per node and reused for every w; beyond
 *     the point where (1 - r)^(k-1) < e^-39 its rest is 1 - Phi(z)^k in closed form.
 *   - Below w0, where P(R <= w) <= k (w/sqrt(2 pi))^(k-1)/sqrt(2) < 2^-60, P(R > w) = 1
 *     to double precision: the upper tail takes that part of the outer integral in
 *     closed form, P(S < w0/q), a regularized incomplete gamma function
 *     (gsl_sf_gamma_inc_P).
 *   - The outer integral starts at the peak of a cheap surrogate of its integrand: the
 *     union bound k(k-1) Q(w/sqrt 2) for P(R > w), and for P(R <= w) the bound
 *     k D^(k-2) (Phi(w/sqrt 2) - 1/2), D = Phi(w/2) - Phi(-w/2).
 *   - Panel widths adapt as a walk proceeds: each next panel is at most SR_CT (outer) or
 *     SR_CZ (lower tail of R) local scales 1/sqrt(-(log f)'') wide, and narrow enough
 *     for the slope of log f given the panel's share of the integral (slope_limit),
 *     both read off the previous panel's own values (a quadratic through three of its
 *     nodes), so no extra evaluations are spent on it; outer panels also respect the
 *     surrogate's curvature at both ends and the scale of R in log w where the
 *     surrogate is flat.
 *   - Both integrands are log-concave (in z: marginals of the log-concave joint density
 *     of the maximum and minimum over convex sets; in t: the upper tail of the range is
 *     log-concave in w, hence so is P(R > q e^t) in t; P(R <= e^t) was checked to be
 *     log-concave in t numerically for k = 2 .. 1000), so beyond the last node the
 *     integrand lies below the tangent of its log there, and a walk stops when that
 *     bound on the rest is below its tolerance (walk_done).
 *   - Tolerances are SR_TAU relative, loosened where it cannot matter: an inner
 *     integral at an outer node needs only the absolute accuracy that the node's
 *     weight makes visible in the outer sum, and when the wanted tail of R is 1 minus
 *     the integral, relative accuracy of that tail, not of the integral, is what
 *     counts.
 *
 * Accuracy and speed were measured with tests/unit/test_srange.c, tests/ref/srange.py
 * (SciPy 1.10.1 and an independent brute-force quadrature) and mpmath 1.2.1 spot
 * checks: errors of about 1e-12 relative in upper tails and 1e-12 absolute in lower
 * tails. */
#include "avow/srange.h"

#include <float.h>
#include <math.h>
#include <pthread.h>
#include <string.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_sf_gamma.h>

#include "avow/dist.h"
#include "avow/util.h"

static const double PI = 3.14159265358979323846264338327950288;
static const double SQRT2 = 1.41421356237309504880168872420969808;
static const double SQRT1_2 = 0.70710678118654752440084436210484904;
static const double INV_SQRT_2PI = 0.39894228040143267793994605993438187;
static const double LN_SQRT_2PI = 0.91893853320467274178032973640561764;
static const double SQRT_2PI = 2.50662827463100050241576528481104525;

/* ---- tuning (accuracy and speed measured as described above) ---- */

#ifndef SR_CT
#define SR_CT 4.0     /* outer panel width, in local scales */
#endif
#ifndef SR_CZ
#define SR_CZ 3.0     /* panel width for P(R <= w) in z, in local scales */
#endif
#ifndef SR_CB
#define SR_CB 3.5     /* panel width of the grid for P(R > w), in local scales */
#endif
#ifndef SR_CG
#define SR_CG 2.5     /* outer panel width in the bulk of R, in units of its scale sg */
#endif
#ifndef SR_TMAX
#define SR_TMAX 1.0   /* outer panel width at most this (p(t) has e^(2t) in its log) */
#endif
#ifndef SR_TAU
#define SR_TAU 1e-12  /* relative error allowed per panel and in the tail of a walk */
#endif

/* ---- Gauss-Legendre rules, set up once ---- */

#ifndef SR_NT
#define SR_NT 12      /* points per panel, outer */
#endif
#ifndef SR_NZ
#define SR_NZ 12      /* points per panel, inner */
#endif
enum { NT = SR_NT, NZ = SR_NZ, NMAX = SR_NT > SR_NZ ? SR_NT : SR_NZ };
static double gt_x[NT], gt_w[NT];       /* nodes in (-1, 1), ascending, and weights */
static double gz_x[NZ], gz_w[NZ];
static double gt_c, gz_c;               /* error constants of the rules, see gl_const */
static pthread_once_t once = PTHREAD_ONCE_INIT;

/* Nodes and weights of the n-point rule on [-1, 1]: Newton's method on the Legendre
 * polynomial P_n (three-term recurrence) from the usual cosine starting values. */
static void gl_rule(int n, double *x, double *w)
{
    for (int i = 0; i < (n + 1) / 2; i++) {
        double z = cos(PI * (i + 0.75) / (n + 0.5)), dp = 1;
        for (int it = 0; it < 100; it++) {
            double p0 = 1, p1 = z;
            for (int j = 2; j <= n; j++) {
                double p2 = ((2 * j - 1) * z * p1 - (j - 1) * p0) / j;
                p0 = p1;
                p1 = p2;
            }
            dp = n * (z * p1 - p0) / (z * z - 1);
            double dz = p1 / dp;
            z -= dz;
            if (fabs(dz) <= 1e-17 && it > 2) break;
        }
        double wt = 2 / ((1 - z * z) * dp * dp);
        x[n - 1 - i] = z;   w[n - 1 - i] = wt;
        x[i] = -z;          w[i] = wt;
    }
}

/* The n-point rule on a panel of width W integrates e^(lambda u) with relative error
 * about (lambda W)^(2n) (n!)^4 / ((2n + 1) ((2n)!)^3): the constant, in logs. */
static double gl_const(int n)
{
    return 4 * lgamma(n + 1.0) - log(2 * n + 1.0) - 3 * lgamma(2 * n + 1.0);
}

static void setup(void)
{
    gsl_set_error_handler_off();
    gl_rule(NT, gt_x, gt_w);
    gl_rule(NZ, gz_x, gz_w);
    gt_c = gl_const(NT);
    gz_c = gl_const(NZ);
}

/* ---- normal distribution ---- */

static double norm_q(double x) { return 0.5 * erfc(x * SQRT1_2); }    /* P(Z > x) */
static double norm_p(double x) { return 0.5 * erfc(-x * SQRT1_2); }   /* P(Z <= x) */
static double norm_pdf(double x) { return INV_SQRT_2PI * exp(-0.5 * x * x); }

/* phi(x)/Q(x) (the inverse Mills ratio), for any x; a continued fraction above 5. */
static double mills_inv(double x)
{
    if (x < 5) return norm_pdf(x) / norm_q(x);
    double r = x;
    for (int n = 40; n >= 1; n--) r = x + n / r;
    return r;
}

/* ---- panel walks ---- */

enum { MAXPANEL = 2000 };   /* per walk; far beyond any real need */

/* Stopping rule of a walk, after a panel whose raw integrand values at its ascending
 * nodes are f[0..n-1] (nodes x), the walk going in direction dir and the panel's far
 * end being e. The integrand is log-concave, so beyond the last node x1 it lies below
 * the tangent of log f at x1, whose slope (in the direction of the walk) is at most
 * the secant slope s from the node before: when s < 0 the rest is at most
 * f(x1) exp(s |e - x1|) / |s|. A walk stops when that bound is below tol, or when the
 * integrand has underflowed to 0 at the far end (unless tol < 0: nothing found yet,
 * see walk). */
static int walk_done(const double *x, const double *f, int n, int dir, double e,
                     double tol)
{
    int i1 = dir > 0 ? n - 1 : 0, i0 = i1 - dir;
    if (f[i1] == 0) return tol >= 0;
    if (!(f[i0] > 0)) return 0;
    double d = fabs(x[i1] - x[i0]);
    double s = (log(f[i1]) - log(f[i0])) / d;
    if (!(s < 0)) return 0;                       /* still rising (or NaN) */
    return f[i1] * exp(s * fabs(e - x[i1])) / -s <= tol;
}

/* An integrand for walk(): raw values f[i] (and density values fd[i] when fd is not
 * NULL) at the n points x[i]; each f[i] is wanted to within tol (absolute) plus
 * SR_TAU relative. */
typedef void (*panel_fn)(void *ctx, const double *x, int n, double tol, double *f,
                         double *fd);

typedef struct walk_par {
    const double *gx, *gw;  /* the rule on [-1, 1] */
    int n;                  /* its number of points */
    double lc;              /* its error constant, gl_const(n) */
    double start, width;    /* where the walks start (the peak) and their first width */
    double wmax;            /* widest panel */
    /* Further limits on the width w of the panel from edge e in direction dir (NULL for
     * none); ctx is the integrand's. */
    double (*limit)(const void *ctx, double e, int dir, double w);
    /* The log of an upper bound of the integrand at x (NULL for none): while nothing
     * has been found, the second walk goes on through zeros as long as this bound
     * exceeds e^-800 (a start off the peak, in a region where the integrand
     * underflows; see walk). */
    double (*logbound)(const void *ctx, double x);
    double cw;              /* width <= cw / sqrt(-(log f)'') */
    double lo;              /* lower end of the domain (-inf for none) */
    double head;            /* the integral below lo (used in the stopping test) */
    double atol;            /* absolute error allowed besides SR_TAU relative */
    int comp;               /* 1: the caller wants 1 - (integral), so the relative
                             * part of the tolerance is SR_TAU (1 - integral) */
} walk_par;

/* Largest lambda W for a panel of width W over which log f has slope lambda, when the
 * panel holds the fraction mu of the integral: its relative error (lambda W)^(2n) C
 * (gl_const) is to stay below SR_TAU / mu (and lambda W = 8 is always allowed). */
static double slope_limit(double lc, int n, double mu)
{
    double l = (log(SR_TAU) - log(fmax(mu, 1e-300)) - lc) / (2 * n);
    return exp(fmax(l, log(8.0)));
}

/* Width of the next panel, from the values f at the nodes x of the panel just summed,
 * whose far end (in the direction dir of the walk) is e; wprev its width and total the
 * running total: at most cw / sqrt(-(log f)'') and slope_limit / |(log f)'|, both of a
 * quadratic through three nodes, and at most twice wprev. */
static double next_width(const walk_par *wp, const double *x, const double *f, int dir,
                         double e, double wprev, double total)
{
    int n = wp->n, s = n / 4;
    int i0 = dir > 0 ? n - 1 : 0, i1 = i0 - dir * s, i2 = i0 - 2 * dir * s;
    if (!(f[i0] > 0 && f[i1] > 0 && f[i2] > 0)) return wprev;
    double y0 = log(f[i0]), y1 = log(f[i1]), y2 = log(f[i2]);
    double d01 = (y1 - y0) / (x[i1] - x[i0]), d12 = (y2 - y1) / (x[i2] - x[i1]);
    double d012 = (d12 - d01) / (x[i2] - x[i0]);
    double curv = 2 * d012, slope = d01 + d012 * (2 * e - x[i0] - x[i1]);
    double w = fmin(wp->wmax, 2 * wprev);
    if (curv < 0) w = fmin(w, wp->cw / sqrt(-curv));
    if (slope != 0) {
        /* the panel's share, bounded by f at its near end times its width */
        double mu = total > 0 ? f[i0] * w / total : 1;
        w = fmin(w, slope_limit(wp->lc, n, mu) / fabs(slope));
    }
    return w;
}

/* Integral of fn over (lo, inf) by panels outward from wp->start, first to the right
 * and then to the left; the density integral in *dsum when dsum is not NULL. NaN when
 * the integrand gives NaN (or a walk does not end within MAXPANEL panels). */
static double walk(const walk_par *wp, panel_fn fn, void *ctx, double *dsum)
{
    double total = 0, dtot = 0;
    double x[NMAX], f[NMAX], fd[NMAX];
    for (int dir = 1; dir >= -1; dir -= 2) {
        double edge = wp->start, wd = wp->width;
        if (wp->limit) wd = wp->limit(ctx, edge, dir, wd);
        for (int np = 0; ; np++) {
            if (np == MAXPANEL) return NAN;      /* never seen: a safeguard */
            double a = dir > 0 ? edge : edge - wd, b = dir > 0 ? edge + wd : edge;
            if (b <= wp->lo) break;
            int last = 0;
            if (a <= wp->lo) { a = wp->lo; last = dir < 0; }
            double hw = 0.5 * (b - a), mid = 0.5 * (a + b);
            for (int i = 0; i < wp->n; i++) {
                x[i] = mid + hw * wp->gx[i];
                fd[i] = 0;
            }
            fn(ctx, x, wp->n, SR_TAU * (total + wp->head) / (b - a), f, dsum ? fd : NULL);
            double v = 0, dv = 0;
            for (int i = 0; i < wp->n; i++) {
                v += wp->gw[i] * f[i];
                dv += wp->gw[i] * fd[i];
            }
            v *= hw;
            dv *= hw;
            if (isnan(v)) return NAN;
            total += v;
            dtot += dv;
            edge = dir > 0 ? b : a;
            double sum = total + wp->head;
            double tol = SR_TAU * (wp->comp ? 1 - sum : sum) + wp->atol;
            /* Starting off the peak in a region where the integrand underflows, the
             * first walk stops at once and the second must go on until it finds
             * something (by log-concavity, the mass lies on its side), unless an upper
             * bound of the integrand says that nothing is left to find. */
            if (dir < 0 && sum == 0 && wp->logbound && wp->logbound(ctx, edge) > -800)
                tol = -1;
            if (last || walk_done(x, f, wp->n, dir, edge, tol)) break;
            wd = next_width(wp, x, f, dir, edge, b - a, total + wp->head);
            if (wp->limit) wd = wp->limit(ctx, edge, dir, wd);
        }
    }
    if (dsum) *dsum = dtot;
    return total;
}

/* ---- the range R of k standard normals (df = inf) ---- */

/* The grid of the upper-tail integral in z, built lazily for one call: panel j covers
 * [edge[j + GJ0], edge[j + GJ0 + 1]], edge[GJ0] = zk. Per node: z, c = Q(z) for z > 0
 * or Phi(z) otherwise, ia = 1/Phi(z) and a = k phi(z) Phi(z)^(k-1). */
enum { GJ0 = 16, GJ = 64 };   /* panels -GJ0 .. GJ - GJ0 - 1 */
typedef struct sr_grid {
    int elo, ehi;             /* edge[elo .. ehi] are set */
    double edge[GJ + 1];
    unsigned char done[GJ];
    double hw[GJ];            /* half width of each panel */
    double z[GJ][NZ], c[GJ][NZ], ia[GJ][NZ], a[GJ][NZ];
} sr_grid;

/* Constants of one call for k groups, and the grid. */
typedef struct sr_k {
    double k, m;      /* k and k - 1 */
    double zk;        /* peak of the density k phi(z) Phi(z)^m of the maximum */
    double wmed;      /* below: integrate P(R <= w); above: P(R > w) */
    double w0;        /* P(R <= w) < 2^-60 for w < w0 */
    double sg;        /* scale of the range in log w: about its sd / mean */
    double wa, wb;    /* bulk of the range: both tail bounds of the surrogates >= e^-7 */
    double tk;        /* bound on -(log [1 - (1 - r)^m])'' in z, see sr_k_init */
    sr_grid g;
} sr_k;

/* -(log Phi)''(z) = M (z + M), M = phi(z)/Phi(z). */
static double neg_lphi2(double z)
{
    double mr = z < -5 ? mills_inv(-z) : norm_pdf(z) / norm_p(z);
    return mr * (z + mr);
}

/* Curvature of log [Phi(z + w/2) - Phi(z - w/2)] at its peak z = 0, i.e. of the
 * window of width w centred at z: kappa(w) = w phi(w/2) / erf(w / (2 sqrt 2)) (1 at
 * w = 0, falling to 0). */
static double window_curv(double w)
{
    return w > 1e-8 ? w * norm_pdf(0.5 * w) / erf(0.5 * SQRT1_2 * w) : 1;
}

/* Local scale of the upper-tail integrand k phi(z) Phi(z)^m [1 - (1 - r)^m],
 * r = Phi(z - w)/Phi(z), at z, for every w: its -(log)'' is at most
 * 1 + m M(z + M) + tk, M = phi(z)/Phi(z) (tk bounds the last factor, see sr_k_init). */
static double grid_scale(const sr_k *c, double z)
{
    return 1 / sqrt(1 + c->tk + c->m * neg_lphi2(z));
}

/* Width of the grid panel that starts (dir > 0) or ends (dir < 0) at z: SR_CB local
 * scales. Going left the curvature grows, so it is taken at the far end too. */
static double grid_width(const sr_k *c, double z, int dir)
{
    double w = SR_CB * grid_scale(c, z);
    if (dir < 0) w = fmin(w, SR_CB * grid_scale(c, z - w));
    return w;
}

/* log of the bound P(R <= w) <= k D^(k-2) (Phi(w/sqrt 2) - 1/2), D = Phi(w/2) -
 * Phi(-w/2) (from Phi(z) - Phi(z - w) <= D and int phi(z) [Phi(z) - Phi(z - w)] dz =
 * Phi(w/sqrt 2) - 1/2), i.e. log(k/2) + (k-2) log erf(w/(2 sqrt 2)) + log erf(w/2). */
static double lower_bound_log(double k, double w)
{
    double u = 0.5 * SQRT1_2 * w, v = 0.5 * w;
    double ld = u < 1 ? log(erf(u)) : log1p(-erfc(u));
    double le = v < 1 ? log(erf(v)) : log1p(-erfc(v));
    return log(0.5 * k) + (k - 2) * ld + le;
}

static int sr_k_init(sr_k *c, double k)
{
    c->k = k;
    c->m = k - 1;
    double m = c->m;
    /* Peak: d/dz [-z^2/2 + m log Phi(z)] = -z + m phi/Phi = 0, decreasing in z.
     * Newton safeguarded by the bracket [-2, 10]. */
    double lo = -2, hi = 10, z = sqrt(2 * log(k)) - 0.5;
    for (int it = 0; it < 100; it++) {
        double mr = norm_pdf(z) / norm_p(z);
        double g = -z + m * mr;
        double g1 = -1 - m * mr * (z + mr);
        if (g > 0) lo = z; else hi = z;
        double nz = z - g / g1;
        if (!(nz > lo && nz < hi)) nz = 0.5 * (lo + hi);
        if (fabs(nz - z) < 1e-12 || hi - lo < 1e-12) { z = nz; break; }
        z = nz;
    }
    c->zk = z;
    /* Mean range, approximately (Blom's plotting positions): only a switch. */
    c->wmed = 2 * gsl_cdf_ugaussian_Pinv((k - 0.375) / (k + 0.25));
    c->w0 = SQRT_2PI * exp((log(SQRT2 / k) - 60 * log(2.0)) / m);
    c->sg = 0.5 / log(k);
    /* log[1 - (1 - r)^m] ~ psi(u) = log(1 - exp(-e^u)), u = log(m r), switches from u to
     * 0 where m r ~ 1, i.e. z - w ~ x = Phi^-1(1/m); there u' ~ M = phi(x)/Phi(x) and
     * u'' >= -1, and |psi''| < 0.42, 0 <= psi' <= 1: the curvature is at most
     * 0.42 M^2 + 1, taken as 0.5 M^2 + 1. For m = 1 the factor is r itself (curvature
     * at most 1). */
    if (m >= 2) {
        double x = gsl_cdf_ugaussian_Pinv(1 / m), mr = norm_pdf(x) / norm_p(x);
        c->tk = 0.5 * mr * mr + 1;
    } else {
        c->tk = 1;
    }
    /* wb: k(k-1) Q(wb/sqrt 2) = e^-7; wa: the lower-tail bound of surr_g is e^-7 there
     * (it increases with w; bisection in log w). */
    c->wb = SQRT2 * gsl_cdf_ugaussian_Qinv(exp(-7.0) / (k * m));
    double la = -40, lb = log(c->wb);
    for (int i = 0; i < 30; i++) {              /* to 4e-8 in log w: only a zone */
        double lw = 0.5 * (la + lb), w = exp(lw);
        if (lower_bound_log(k, w) < -7) la = lw; else lb = lw;
    }
    c->wa = exp(la);
    c->g.elo = c->g.ehi = GJ0;
    c->g.edge[GJ0] = z;
    memset(c->g.done, 0, sizeof c->g.done);
    return isfinite(c->wmed) && isfinite(z) && isfinite(c->wb) ? AVOW_OK : AVOW_EDOM;
}

/* Make sure panel j of the grid exists (its edges set); 0 when j is outside it. */
static int grid_panel(sr_k *c, int j)
{
    sr_grid *g = &c->g;
    int jj = j + GJ0;
    if (jj < 0 || jj >= GJ) return 0;
    while (g->ehi < jj + 1) {
        g->edge[g->ehi + 1] = g->edge[g->ehi] + grid_width(c, g->edge[g->ehi], 1);
        g->ehi++;
    }
    while (g->elo > jj) {
        g->edge[g->elo - 1] = g->edge[g->elo] - grid_width(c, g->edge[g->elo], -1);
        g->elo--;
    }
    if (!g->done[jj]) {
        double a = g->edge[jj], b = g->edge[jj + 1];
        double hw = 0.5 * (b - a), mid = 0.5 * (a + b);
        g->hw[jj] = hw;
        for (int i = 0; i < NZ; i++) {
            double z = mid + hw * gz_x[i];
            double cz = z > 0 ? norm_q(z) : norm_p(z);
            double la = z > 0 ? log1p(-cz) : log(cz);
            g->z[jj][i] = z;
            g->c[jj][i] = cz;
            g->ia[jj][i] = 1 / (z > 0 ? 1 - cz : cz);
            g->a[jj][i] = c->k * exp(-0.5 * z * z - LN_SQRT_2PI + c->m * la);
        }
        g->done[jj] = 1;
    }
    return 1;
}

/* Phi(z) - Phi(z - w) for w > 0 without cancellation, given c = Q(z) (z > 0) or
 * Phi(z) (z <= 0); also returns b = Phi(z - w). Below w = 1e-3 the difference is the
 * Taylor series about the midpoint u = z - w/2, phi(u) [w + (u^2 - 1) w^3/24 +
 * (u^4 - 6u^2 + 3) w^5/1920] (the next term is below 1e-18 relative where phi(u) is
 * not negligible), instead of a difference that would lose about log10(1/w) digits. */
static double window(double z, double w, double c, double *b)
{
    double x = z - w;
    if (x >= 0) {
        double qx = norm_q(x);
        *b = 1 - qx;
        if (w < 1e-3) goto series;
        return qx - c;
    }
    *b = norm_p(x);
    if (w < 1e-3) goto series;
    return (z > 0 ? 1 - c : c) - *b;
series:
    {
        double u = z - 0.5 * w, u2 = u * u, w2 = w * w;
        return norm_pdf(u) * w * (1 + w2 * ((u2 - 1) / 24 + w2 * (u2 * (u2 - 6) + 3) / 1920));
    }
}

/* Upper tail P(R > w) on the grid (see the header comment), to SR_TAU relative plus
 * atol absolute (SR_TAU (1 - P) plus atol when comp), and the density of R at w in
 * *dens when dens is not NULL. */
static double range_upper(sr_k *c, double w, double atol, int comp, double *dens)
{
    double m = c->m;
    if (c->k * m * norm_q(SQRT1_2 * w) < 1e-300) {   /* the union bound underflows */
        if (dens) *dens = 0;
        return 0;
    }
    double zs = fmax(c->zk, 0.5 * w);
    /* The panel holding zs (or the last one of the grid). */
    int js = 0;
    while (grid_panel(c, js + 1) && c->g.edge[js + 1 + GJ0] <= zs) js++;
    double total = 0, dtot = 0, f[NZ];
    for (int dir = 1; dir >= -1; dir -= 2) {
        for (int j = dir > 0 ? js : js - 1; ; j += dir) {
            if (!grid_panel(c, j)) return NAN;   /* off the grid: not expected */
            int jj = j + GJ0;
            double v = 0, dv = 0;
            if (dir > 0 && j > js && c->g.edge[jj] > 0) {
                /* Beyond z = e, once (1 - r)^m < e^-39 there (and so further right):
                 * the rest is int_e^inf k phi Phi^m = 1 - Phi(e)^k, within 1e-17. */
                double e = c->g.edge[jj], qe = norm_q(e), b;
                double d = window(e, w, qe, &b);
                if (d > 0 && m * log(d / (1 - qe)) < -39) {
                    total += -expm1(c->k * log1p(-qe));
                    break;
                }
            }
            for (int i = 0; i < NZ; i++) {
                double a0 = c->g.a[jj][i];
                f[i] = 0;
                if (a0 == 0) continue;
                double z = c->g.z[jj][i], b;
                double d = window(z, w, c->g.c[jj][i], &b);
                double ia = c->g.ia[jj][i];
                double r = b * ia, lr, y;   /* lr = log(d/a) = log(1 - r), y = m lr */
                if (r < 1e-5) {
                    lr = -r * (1 + r * (0.5 + r * (1.0 / 3)));   /* error < r^4/4 */
                } else if (r <= 0.5) {
                    lr = log1p(-r);
                } else {
                    lr = d > 0 ? log(d * ia) : -INFINITY;
                }
                /* 1 - (1 - r)^m = -expm1(y); the series when |y| < 1e-5 */
                y = m * lr;
                f[i] = a0 * (y > -1e-5 ? -y * (1 + y * (0.5 + y * (1.0 / 6))) : -expm1(y));
                v += gz_w[i] * f[i];
                if (dens && d > 0) dv += gz_w[i] * a0 * m * norm_pdf(z - w) * exp(y) / d;
            }
            v *= c->g.hw[jj];
            dv *= c->g.hw[jj];
            if (isnan(v)) return NAN;
            total += v;
            dtot += dv;
            double e = c->g.edge[dir > 0 ? jj + 1 : jj];
            double tol = SR_TAU * (comp ? 1 - total : total) + atol;
            if (walk_done(c->g.z[jj], f, NZ, dir, e, tol)) break;
        }
    }
    if (dens) *dens = dtot;
    return total;
}

typedef struct lower_ctx { const sr_k *c; double w; } lower_ctx;

/* The integrand of P(R <= w), k phi(z) d^m with d = Phi(z) - Phi(z - w), and of the
 * density of R, k m phi(z) phi(z - w) d^(m - 1). */
static void lower_panel(void *ctx, const double *x, int n, double tol, double *f,
                        double *fd)
{
    (void)tol;
    const lower_ctx *lc = ctx;
    double k = lc->c->k, m = lc->c->m, w = lc->w;
    for (int i = 0; i < n; i++) {
        double z = x[i], b;
        double d = window(z, w, z > 0 ? norm_q(z) : norm_p(z), &b);
        f[i] = d > 0 ? k * exp(-0.5 * z * z - LN_SQRT_2PI + m * log(d)) : 0;
        if (fd) fd[i] = d > 0 ? f[i] * m * norm_pdf(z - w) / d : 0;
    }
}

/* Lower tail P(R <= w), to SR_TAU relative plus atol absolute (to SR_TAU (1 - P) plus
 * atol when comp); the density of R in *dens when dens is not NULL. */
static double range_lower(const sr_k *c, double w, double atol, int comp, double *dens)
{
    /* Curvature of log d at z = w/2: kappa = w phi(w/2) / erf(w/(2 sqrt 2)); the log of
     * the integrand then has curvature about -(1 + m kappa), and its peak lies near
     * (w/2) m kappa / (1 + m kappa). */
    double mk = c->m * window_curv(w);
    lower_ctx lc = { c, w };
    walk_par wp = { gz_x, gz_w, NZ, gz_c, 0.5 * w * mk / (1 + mk), SR_CZ / sqrt(1 + mk),
                    SR_CZ, NULL, NULL, SR_CZ, -INFINITY, 0, atol, comp };
    return walk(&wp, lower_panel, &lc, dens);
}

/* Both tails of R at w > 0; the one wanted (upper or not) to SR_TAU relative plus atol
 * absolute; the density when dens is not NULL. The smaller tail is integrated, the
 * other is 1 minus it (with relative accuracy too when atol = 0). */
static void range_tails(sr_k *c, double w, int upper, double atol, double *lo, double *up,
                        double *dens)
{
    if (w < c->wmed) {
        double l = range_lower(c, w, atol, upper, dens);
        *lo = l;
        *up = 1 - l;
    } else {
        double u = range_upper(c, w, atol, !upper, dens);
        *up = u;
        *lo = 1 - u;
    }
    if (*lo < 0) *lo = 0;
    if (*up < 0) *up = 0;
}

/* ---- the outer integral over t = log s ---- */

/* expm1(y) - y, without cancellation for small |y|. */
static double em1mx(double y)
{
    if (fabs(y) < 0.5) {
        double term = 0.5 * y * y, sum = term;
        for (int n = 3; n < 40; n++) {
            term *= y / n;
            sum += term;
            if (fabs(term) <= 1e-17 * sum) break;
        }
        return sum;
    }
    return expm1(y) - y;
}

/* One evaluation: the tail (upper or lower) of Q at q. */
typedef struct sr_eval {
    sr_k kc;
    double q, h;      /* h = nu/2 */
    double lc;        /* log of the normalizing constant of p(t) */
    double ta, tb;    /* the bulk of R, [wa, wb], in t = log(w/q) */
    int upper;
} sr_eval;

/* log p(t), p the density of log S. */
static double log_pt(const sr_eval *e, double t)
{
    return e->lc - e->h * em1mx(2 * t);
}

/* The surrogate of log P(R > w) (upper) or log P(R <= w) (lower) at w = q e^t, and its
 * first and second derivatives in t (see the header comment); 0 (flat) where the bound
 * it comes from exceeds 1. upper is e->upper for the wanted tail. */
static double surr_g(const sr_eval *e, double t, int upper, double *g1, double *g2)
{
    double w = e->q * exp(t), k = e->kc.k, m = e->kc.m;
    *g1 = *g2 = 0;
    if (upper) {
        double x = w * SQRT1_2, qx = norm_q(x), mi = mills_inv(x);
        /* log Q(x) = log phi(x) - log(phi(x)/Q(x)) where Q(x) underflows. */
        double lg = log(k * m) + (qx > 1e-300 ? log(qx) : -0.5 * x * x - LN_SQRT_2PI - log(mi));
        if (!(lg < 0)) return 0;
        *g1 = -x * mi;
        *g2 = -(x * mi + x * x * mi * (mi - x));
        return lg;
    }
    /* D = erf(w / (2 sqrt 2)), E = 2 (Phi(w/sqrt 2) - 1/2) = erf(w/2). */
    double lg = lower_bound_log(k, w);
    if (!(lg < 0)) return 0;
    double D = erf(0.5 * SQRT1_2 * w), E = erf(0.5 * w);
    double ph = norm_pdf(0.5 * w);                 /* D'(w) */
    double gE = exp(-0.25 * w * w) / sqrt(PI);     /* E'(w) */
    double l1 = ph / D, l1p = -ph * (0.25 * w * D + ph) / (D * D);
    double l2 = gE / E, l2p = (-0.5 * w * gE * E - gE * gE) / (E * E);
    *g1 = w * ((m - 1) * l1 + l2);
    *g2 = *g1 + w * w * ((m - 1) * l1p + l2p);
    return lg;
}

/* Derivative in t of the log of the surrogate integrand, log p(t) + surr_g, and its
 * second derivative in *d2. */
static double surr_d(const sr_eval *e, double t, double *d2)
{
    double g1, g2;
    surr_g(e, t, e->upper, &g1, &g2);
    if (d2) *d2 = -4 * e->h * exp(2 * t) + g2;
    return -2 * e->h * expm1(2 * t) + g1;
}

/* Peak of the surrogate integrand: bisection on its derivative (which decreases) down
 * to a bracket 1/4 wide, then Newton's method safeguarded by the bracket, to a
 * thousandth of the local scale 1/sqrt(-(log)''). (Newton alone would creep towards a
 * distant peak: far out, the log falls like -c e^(2t) and each step moves by 1/2.) */
static double outer_peak(const sr_eval *e)
{
    double lo = -1, hi = 1;
    for (int i = 0; i < 200 && surr_d(e, lo, NULL) < 0; i++) lo = 2 * lo - 1;
    for (int i = 0; i < 200 && surr_d(e, hi, NULL) > 0; i++) hi = 2 * hi + 1;
    while (hi - lo > 0.25) {
        double mid = 0.5 * (lo + hi);
        if (surr_d(e, mid, NULL) > 0) lo = mid; else hi = mid;
    }
    double t = 0.5 * (lo + hi);
    for (int i = 0; i < 100; i++) {
        double d2, d1 = surr_d(e, t, &d2);
        if (d1 > 0) lo = t; else hi = t;
        double nt = d2 < 0 ? t - d1 / d2 : 0.5 * (lo + hi);
        if (!(nt > lo && nt < hi)) nt = 0.5 * (lo + hi);
        double step = fabs(nt - t);
        t = nt;
        if (d2 < 0 && step < 1e-3 / sqrt(-d2)) break;
        if (!(hi - lo > 0)) break;
    }
    return t;
}

/* Limits on an outer panel from edge e in direction dir, of width w: the surrogate's
 * curvature at both ends (as in next_width), the other tail's surrogate where it is not
 * negligible (see below), SR_CG sg where the panel meets
 * the bulk of R (where the surrogate is flat but the tails of R are not), and SR_TMAX
 * where h e^(2t) > 1e-3 (log p(t) has -h e^(2t) in it, whose derivatives grow as
 * 2^n). */
static double outer_limit(const void *ctx, double e, int dir, double w)
{
    const sr_eval *ev = ctx;
    for (int pass = 0; pass < 2; pass++) {
        double t = pass ? e + dir * w : e, d2, g1, g2;
        surr_d(ev, t, &d2);
        if (d2 < 0) w = fmin(w, SR_CT / sqrt(-d2));
        /* The wanted tail is 1 minus the other one, whose bound a = e^lg may be small
         * but steep (e^(-w^2/4) beyond the bulk): it needs relative accuracy SR_TAU / a
         * only, which slope_limit turns into a width for its slope g1. */
        double lg = surr_g(ev, t, !ev->upper, &g1, &g2);
        if (lg < 0 && lg > -60 && g1 != 0) w = fmin(w, slope_limit(gt_c, NT, exp(lg)) / fabs(g1));
    }
    double a = dir > 0 ? e : e - w, b = dir > 0 ? e + w : e;
    if (b > ev->ta && a < ev->tb) w = fmin(w, SR_CG * ev->kc.sg);
    if (ev->h * exp(2 * b) > 1e-3) w = fmin(w, SR_TMAX);
    return w;
}

/* log of the surrogate integrand p(t) x (bound on the wanted tail of R at q e^t),
 * an upper bound of the integrand. */
static double outer_logbound(const void *ctx, double t)
{
    const sr_eval *e = ctx;
    double g1, g2;
    return log_pt(e, t) + surr_g(e, t, e->upper, &g1, &g2);
}

/* p(t) times the wanted tail of R at q e^t, and p(t) e^t times the density of R there
 * (the integrand of the density of Q). */
static void outer_panel(void *ctx, const double *t, int n, double tol, double *f,
                        double *fd)
{
    sr_eval *e = ctx;
    for (int i = 0; i < n; i++) {
        double lp = log_pt(e, t[i]);
        f[i] = 0;
        if (lp < -745) continue;
        double p = exp(lp);
        double s = exp(t[i]), w = e->q * s;
        if (e->upper && w < e->kc.w0) { f[i] = p; continue; }
        double lo, up, dens = 0;
        range_tails(&e->kc, w, e->upper, tol / p, &lo, &up, fd ? &dens : NULL);
        f[i] = p * (e->upper ? up : lo);
        if (fd) fd[i] = p * s * dens;
    }
}

/* Tail of Q at finite q > 0, upper or lower, and the density in *dens when not NULL. */
static double sr_tail(double q, double k, double nu, int upper, double *dens)
{
    sr_eval e;
    if (sr_k_init(&e.kc, k)) return NAN;
    e.q = q;
    e.upper = upper;
    if (!(nu <= 1e30)) {
        double lo = 0, up = 1, d = 0;
        if (!(upper && q < e.kc.w0)) range_tails(&e.kc, q, upper, 0, &lo, &up, dens ? &d : NULL);
        if (dens) *dens = d;
        return upper ? up : lo;
    }
    e.h = 0.5 * nu;
    e.lc = log(2.0) + 0.5 * log(e.h) - LN_SQRT_2PI - log(gsl_sf_gammastar(e.h));
    if (!isfinite(e.lc)) return NAN;

    double tp = outer_peak(&e);
    /* The upper tail below t0 = log(w0/q) is P(S < w0/q). */
    double tmin = -INFINITY, head = 0;
    if (upper) {
        /* P(S < s0) = P(h, h s0^2), the regularized incomplete gamma function; for
         * x = h s0^2 < 1e-10 (which may underflow while P does not: q = 1e200, df = 0.5)
         * its series x^h e^-x / Gamma(h + 1) (1 + x/(h + 1) + ...), in logs. */
        double ls0 = log(e.kc.w0) - log(q);
        double lx = log(e.h) + 2 * ls0;
        if (!(lx < log(1e300))) return 1;
        tmin = ls0;
        if (lx < log(1e-10)) {
            double x = exp(lx);
            head = exp(e.h * lx - x - lgamma(e.h + 1) + log1p(x / (e.h + 1)));
        } else {
            head = gsl_sf_gamma_inc_P(e.h, exp(lx));
        }
        if (isnan(head)) return NAN;
        if (tp < tmin) tp = tmin;
    }
    e.ta = log(e.kc.wa / q);
    e.tb = log(e.kc.wb / q);
    /* The surrogate integrand bounds the integrand from above and peaks at tp: when it
     * is below e^-800 there, the integral is too (the walk would find only zeros). */
    if (outer_logbound(&e, tp) < -800) {
        if (dens) *dens = 0;
        return head;
    }
    walk_par wp = { gt_x, gt_w, NT, gt_c, tp, 1, 50, outer_limit, outer_logbound, SR_CT,
                    tmin, head, 0, 0 };
    double r = walk(&wp, outer_panel, &e, dens) + head;
    if (isnan(r)) return NAN;
    return r > 1 ? 1 : r;
}

/* ---- public functions ---- */

static int k_ok(double k) { return k >= 2 && k <= 1000 && k == floor(k); }
static int df_ok(double df) { return df > 0; }   /* NaN fails; +inf passes */

double srange_cdf(double q, double k, double df)
{
    pthread_once(&once, setup);
    if (isnan(q) || !k_ok(k) || !df_ok(df)) return NAN;
    if (q <= 0) return 0;
    if (isinf(q)) return 1;
    return sr_tail(q, k, df, 0, NULL);
}

double srange_sf(double q, double k, double df)
{
    pthread_once(&once, setup);
    if (isnan(q) || !k_ok(k) || !df_ok(df)) return NAN;
    if (q <= 0) return 1;
    if (isinf(q)) return 0;
    return sr_tail(q, k, df, 1, NULL);
}

/* ---- quantile ---- */

/* sqrt(2) times the upper-tail quantile of t(df) (normal for df > 1e30) at a in
 * (0, 1/2): the k = 2 quantile at level 2a. +inf when it overflows, NaN on failure. */
static double bound_q(double a, double df)
{
    if (!(a > 0 && a < 0.5)) return NAN;
    if (!(df <= 1e30)) return SQRT2 * gsl_cdf_ugaussian_Qinv(a);
    double x;
    int st = dist_t_qinv(a, df, &x);
    if (st == AVOW_EOVERFLOW) return INFINITY;
    return st ? NAN : SQRT2 * x;
}

/* The equation of srange_qinv, h(q) = log tail(q) - log target for the upper tail and
 * its negative for the lower: decreasing in q, > 0 below the root. *dh is dh/d(log q)
 * (NaN when unusable). Returns NaN for h when the tail cannot be evaluated. */
typedef struct q_eq { double k, df, lt; int upper; } q_eq;

static double q_eval(const q_eq *e, double q, double *dh)
{
    double dens = 0;
    double t = sr_tail(q, e->k, e->df, e->upper, &dens);
    if (isnan(t)) { *dh = NAN; return NAN; }
    *dh = t > 0 && dens > 0 ? -q * dens / t : NAN;
    double lt = log(t);
    return e->upper ? lt - e->lt : e->lt - lt;
}

int srange_qinv(double p, double k, double df, double *q)
{
    pthread_once(&once, setup);
    if (!q || !(p > 0 && p < 1) || !k_ok(k) || !df_ok(df)) return AVOW_EDOM;
    q_eq e = { k, df, 0, p <= 0.5 };
    e.lt = log(e.upper ? p : 1 - p);   /* 1 - p is exact for p >= 1/2 */

    /* Bracket: P(Q > q) >= 2 P(T > q/sqrt 2) (one pair of the k) and
     * P(Q > q) <= k(k-1) P(T > q/sqrt 2) (the union over the pairs), so h(lo) >= 0 >=
     * h(hi) for the quantiles lo, hi of these bounds (lo taken no larger than the normal
     * one, see below). They meet for k = 2, where lo is
     * moved down by 1e-6 relative to stay clear of rounding; only hi, the better start,
     * is evaluated (and moved up should it fail, which a bad t quantile could cause). */
    double lo = bound_q(0.5 * p, df), hi = bound_q(p / (k * (k - 1)), df);
    double h, dh;
    /* t quantiles are never below normal ones, so the normal one keeps lo a lower bound
     * even should the t quantile be wrong (dist_t_qinv was seen to return 11.5 for
     * t_{6.8e-8}(1.43e27), which is 5.27). */
    double lz = SQRT2 * gsl_cdf_ugaussian_Qinv(0.5 * p);
    if (!(lo <= lz)) lo = lz;
    if (!(lo > 0 && isfinite(lo))) lo = DBL_MIN;
    if (!(hi > 0)) hi = 1;            /* NaN: the t quantile failed */
    if (isinf(hi)) hi = DBL_MAX;
    if (!(hi > lo)) hi = lo;
    lo *= 1 - 1e-6;
    h = q_eval(&e, hi, &dh);
    for (int i = 0; i < 2000 && h >= 0; i++) {            /* move up until h < 0 */
        if (hi == DBL_MAX) { *q = INFINITY; return AVOW_EOVERFLOW; }
        lo = hi;
        hi = hi > DBL_MAX / 2 ? DBL_MAX : hi * (i == 0 ? 1 + 1e-6 : 2);
        h = q_eval(&e, hi, &dh);
    }
    if (isnan(h)) return AVOW_EDOM;

    /* Newton steps in log q, kept while they land inside the bracket and at least halve
     * the step before last; geometric bisection otherwise. Every evaluation narrows the
     * bracket. The iteration ends with a Newton step below 1e-12 (the tails are good to
     * about that, relatively, so smaller steps would chase rounding). For k = 2, where hi
     * is the root itself, a rounding h(hi) >= 0 first moves hi up by only 1e-6. */
    double x = hi;
    double step_old = log(hi) - log(lo), step = step_old;
    for (int it = 0; it < 200; it++) {
        double nx = 0, du = 0;
        int newton = 0;
        if (isfinite(h) && isfinite(dh) && dh < 0) {
            du = -h / dh;
            /* converged (x itself is then an end of the bracket) */
            if (fabs(du) <= 1e-12) { x *= exp(du); break; }
            if (fabs(du) < 0.5 * step_old) {
                nx = x * exp(du);
                newton = nx > lo && nx < hi;
            }
        }
        if (newton) {
            step_old = step;
            step = fabs(du);
        } else {
            nx = sqrt(lo) * sqrt(hi);
            if (!(nx > lo && nx < hi)) break;          /* adjacent doubles */
            step_old = step;
            step = 0.5 * (log(hi) - log(lo));
        }
        x = nx;
        h = q_eval(&e, x, &dh);
        if (isnan(h)) return AVOW_EDOM;
        if (h == 0) break;
        if (h > 0) lo = x; else hi = x;
        if (hi - lo <= 4 * DBL_EPSILON * lo) break;
    }
    *q = x;
    return AVOW_OK;
}
