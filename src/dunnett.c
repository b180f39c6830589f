/* dunnett.c: Dunnett's many-to-one distribution for product correlations.
 *
 * The integral (Dunnett 1955, JASA 50:1096-1121; Dunnett 1989, Applied Statistics
 * 38:564-579, algorithm AS 251, for correlations rho_ij = lambda_i lambda_j): writing
 * Z_i = lambda_i z + c_i e_i with c_i = sqrt(1 - lambda_i^2) and z, e_i independent
 * standard normals, and S = sqrt(chi2_df / df) with density f,
 *
 *   G(u) = P(max |Z_i| <= u) = int phi(z) prod_i r_i(z, u) dz,
 *   r_i(z, u) = Phi((lambda_i z + u)/c_i) - Phi((lambda_i z - u)/c_i)   (two-sided),
 *   r_i(z, u) = Phi((lambda_i z + u)/c_i)                               (one-sided),
 *   P(max |T_i| <= d) = int_0^inf f(s) G(d s) ds,
 *
 * and H(u) = 1 - G(u), P(max |T_i| > d) = int f(s) H(d s) ds, integrated on their own.
 *
 * Numerical scheme (this file's own; it shares nothing with the studentized range):
 *   - Inner integral over z: Gauss-Legendre (12 points) on equal pieces of [0, zmax]
 *     (two-sided, where the integrand is even) or [-zmax, zmax] (one-sided), with
 *     zmax = sqrt(u^2 + 81): the upper-tail integrand phi(z) Phi_c((u - lambda z)/c) is
 *     a Gaussian bump at lambda u of width c, and lambda u + 9 c <= sqrt(u^2 + 81). The
 *     pieces are 2 min(1, c_i/lambda_i) / sqrt(2 log p) long at most: the r_i change on
 *     the scale c_i/lambda_i, and a product of p of them near the point where
 *     p Phi_c(t) = 1, t = sqrt(2 log p), about 1/t times faster. Pieces are taken from
 *     the end where prod r_i is largest; once it has fallen below 1e-18 (it is monotone
 *     in z there) and the rest of G is below 1e-18 of the part so far, the rest adds its
 *     normal mass to H and nothing to G.
 *   - Each r_i is a difference of Phi's, written so that it does not cancel: with
 *     a < b the two arguments, Phi_c(a) - Phi_c(b) when a >= 0, and
 *     (erf(b/sqrt2) + erf(-a/sqrt2))/2 when a < 0 < b; the outside probability
 *     q_i = Phi(a) + Phi_c(b) is formed as well, from two positive terms. The products
 *     are accumulated as prod r_i and 1 - prod r_i (A <- A r_i + q_i, all terms
 *     positive), so the upper tail is integrated directly and keeps its relative
 *     accuracy. Equal lambdas are grouped: r^m and 1 - r^m = -expm1(m log1p(-q)).
 *   - Outer integral over x = log s, where the density of log S is exp(l(x)),
 *     l(x) = log 2 + a log a - lgamma(a) + 2 a x - a e^(2x), a = df/2, evaluated in logs
 *     as log 2 + K(a) - a (e^(2x) - 1 - 2x), with K(a) = a log a - a - lgamma(a) from
 *     Stirling's series for large a, so that no large terms cancel at large df.
 *     The range and the pieces come from cheap bounds of the two integrands, which for
 *     nonnegative correlations are (Sidak 1967, JASA 62:626, for |Z|; Slepian 1962,
 *     Bell System Technical Journal 41:463, one-sided)
 *       P1(u)^p <= G(u) <= P1(u),   1 - P1(u) <= H(u) <= min(1, p (1 - P1(u))),
 *     P1 the probability for a single comparison. The upper-tail range is where
 *     exp(l) (1 - P1) is above e^-40/p of its maximum, the lower-tail range where
 *     exp(l) P1 is above e^-40 of the largest exp(l) P1^p (one-sided with d > 0,
 *     G >= G(0) is used instead); these bounds are log-concave in x. Pieces are halved
 *     until each of the four bounds changes by at most 16 in log across a piece and is
 *     within 2.5 of linear at its midpoint, and a piece is at most 2 long; 16
 *     Gauss-Legendre points each.
 *     Below x_a, where u = d e^x < 1e-17/p, G(u) = G(0) to within 1e-17: that part is
 *     G(0) P(S <= e^x_a), from the regularized incomplete gamma. Above the upper-tail
 *     range, where p (1 - P1(u)) < 1e-17, G = 1 in double: that part is P(S > e^x).
 *   - The derivative in d comes free: with y = x + log d = log u the integral is
 *     int exp(l(y - log d)) G(e^y) dy, so d/d(log d) P = -int l'(x) exp(l(x)) G(d e^x) dx,
 *     the same nodes with weight l'(x) = -df expm1(2x). (For df infinite, G'(d) is
 *     integrated directly.) For the same reason the nodes in y and the inner integrals
 *     there serve any nearby d: only the density weights change. A grid is kept while
 *     the pieces still pass their tests (made with limits 0.7 times the above, and the
 *     range widened by 0.1) and the ranges at the new d lie inside it.
 *   - Critical values: Newton steps on log sf(d) - log alpha, kept inside a bracket
 *     given by the single-comparison t quantile (a lower bound, since the maximum
 *     exceeds each statistic) and the Sidak/Slepian quantile (an upper bound, by the
 *     inequalities above); bisection when a step leaves the bracket. For finite df the
 *     start is the upper bound times the ratio of the critical value to the same bound
 *     at df = infinity (cheap: one inner integral per step), so that one grid usually
 *     serves every step. */
#include "avow/dunnett.h"

#include <math.h>
#include <stdlib.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_sf_erf.h>
#include <gsl/gsl_sf_gamma.h>

#include "avow/dist.h"
#include "avow/util.h"

/* ---- tuning constants (see the header comment of this file) ---- */

enum {
    NZ = 12,          /* Gauss-Legendre points per inner piece */
    NX = 16,          /* Gauss-Legendre points per outer piece */
    MAX_PIECES = 2048 /* outer pieces at most (far more than any case needs) */
};
static const double Z_TAIL2 = 81;      /* zmax^2 = u^2 + Z_TAIL2 */
static const double HZ = 2;  /* inner piece length times sqrt(2 log p) / min(1, c/lambda) */
static const double TAIL = 40;         /* log of the neglected fraction */
static const double STEP_LOG = 16;     /* largest change of a log bound across a piece */
static const double BEND_LOG = 2.5;    /* largest departure from linear at a midpoint */
static const double W_MAX = 2;         /* longest outer piece, in log s */
static const double SLACK = 0.7;       /* the three limits above, when making pieces */
static const double MARGIN = 0.1;      /* outer range widened by this when making pieces */
static const double U_EDGE = 38.5;     /* beyond: Phi_c(u) < 1e-323, the tail is 0 */
static const double DF_INF = 1e20;     /* df at or above this counts as infinite */

static const double SQRT1_2 = 0.707106781186547524400844362104849039;
static const double INV_SQRT_2PI = 0.398942280401432677939946059934381868;
static const double LOG_2PI = 1.83787706640934548356065947281123527;
static const double LN2 = 0.693147180559945309417232121458176568;

/* Turn GSL's abort-on-error handler off, once per process. */
static void gsl_quiet(void)
{
    static int done;   /* the handler has been switched off */
    if (!done) {
        gsl_set_error_handler_off();
        done = 1;
    }
}

/* ---- the problem: distinct lambdas and quadrature rules ---- */

typedef struct dn {
    int two;            /* two-sided */
    size_t p;           /* number of treatments */
    size_t k;           /* number of distinct lambda values */
    double *lc;         /* lambda / c for each distinct lambda */
    double *ic;         /* 1 / c */
    double *mult;       /* how many treatments share it */
    double *r;          /* scratch: r_i^m_i at one node */
    double *dr;         /* scratch: d r_i / d u at one node */
    double hz;          /* inner piece length */
    double df;          /* degrees of freedom (INFINITY for the normal limit) */
    double a;           /* df / 2 */
    double kconst;      /* log 2 + K(a): l(x) = kconst - a em1x(2x) */
    int have0;          /* g0, h0 computed */
    double g0, h0;      /* G(0) and H(0) */
    size_t iz_lo, iz_hi;     /* indices of the lowest and highest inner nodes */
    double zx[NZ], zw[NZ];   /* inner rule on [-1, 1] */
    double xx[NX], xw[NX];   /* outer rule on [-1, 1] */
} dn;

static int cmp_double(const void *x, const void *y)
{
    double a = *(const double *)x, b = *(const double *)y;
    return (a > b) - (a < b);
}

/* Arguments shared by every function: lambda[0..p-1] in [0, 1), df > 0 (inf allowed). */
static int args_ok(const double *lambda, size_t p, double df)
{
    if (!lambda || p == 0 || !(df > 0)) return 0;
    for (size_t i = 0; i < p; i++)
        if (!(lambda[i] >= 0 && lambda[i] < 1)) return 0;
    return 1;
}

/* Fill rule[] with an n-point Gauss-Legendre rule on [-1, 1] from GSL's tables. */
static int gl_rule(size_t n, double *x, double *w)
{
    gsl_integration_glfixed_table *t = gsl_integration_glfixed_table_alloc(n);
    if (!t) return AVOW_ENOMEM;
    for (size_t i = 0; i < n; i++) gsl_integration_glfixed_point(-1, 1, i, &x[i], &w[i], t);
    gsl_integration_glfixed_table_free(t);
    return AVOW_OK;
}

/* Stirling remainder lgamma(a) - ((a - 1/2) log a - a + log(2 pi)/2), for a >= 10. */
static double stirling_rest(double a)
{
    double r = 1 / (a * a);
    return (1.0 / 12 - r * (1.0 / 360 - r * (1.0 / 1260 - r * (1.0 / 1680 - r / 1188)))) / a;
}

static void dn_free(dn *c)
{
    avow_free(c->lc);
}

/* Set up c for the arguments (already checked). */
static int dn_init(dn *c, const double *lambda, size_t p, double df, int two_sided)
{
    c->lc = NULL;
    c->have0 = 0;
    if (p > SIZE_MAX / (6 * sizeof(double))) return AVOW_ENOMEM;
    double *mem = avow_malloc(6 * p * sizeof(double));
    if (!mem) return AVOW_ENOMEM;
    double *sorted = mem + 5 * p;
    c->lc = mem;
    c->ic = mem + p;
    c->mult = mem + 2 * p;
    c->r = mem + 3 * p;
    c->dr = mem + 4 * p;
    for (size_t i = 0; i < p; i++) sorted[i] = lambda[i];
    qsort(sorted, p, sizeof(double), cmp_double);
    size_t k = 0;
    double scale = 1;   /* min over lambdas of min(1, c / lambda) */
    for (size_t i = 0; i < p; i++) {
        if (k > 0 && sorted[i] == sorted[i - 1]) { c->mult[k - 1] += 1; continue; }
        double l = sorted[i];
        double cc = sqrt((1 - l) * (1 + l));
        c->ic[k] = 1 / cc;
        c->lc[k] = l / cc;
        c->mult[k] = 1;
        if (l > 0 && cc / l < scale) scale = cc / l;
        k++;
    }
    c->k = k;
    c->p = p;
    c->two = two_sided != 0;
    /* prod r_i^m_i changes faster as the number of factors grows: the transition of
     * (1 - Phi_c(t))^p lies near t = sqrt(2 log p) and is about 1/t wide */
    c->hz = HZ * scale / fmax(1, sqrt(2 * log((double)p)));
    c->df = df >= DF_INF ? INFINITY : df;
    c->a = c->df / 2;
    if (isfinite(c->df)) {
        double a = c->a;
        double kk = a >= 10 ? 0.5 * log(a) - 0.5 * LOG_2PI - stirling_rest(a)
                            : a * log(a) - a - gsl_sf_lngamma(a);
        c->kconst = LN2 + kk;
    }
    int st = gl_rule(NZ, c->zx, c->zw);
    if (!st) st = gl_rule(NX, c->xx, c->xw);
    if (st) { dn_free(c); c->lc = NULL; return st; }
    c->iz_lo = c->iz_hi = 0;
    for (size_t i = 1; i < NZ; i++) {
        if (c->zx[i] < c->zx[c->iz_lo]) c->iz_lo = i;
        if (c->zx[i] > c->zx[c->iz_hi]) c->iz_hi = i;
    }
    return AVOW_OK;
}

/* ---- the inner integral ---- */

/* Below this, prod r_i is taken as 0 for the rest of the z range (it is monotone there). */
static const double CUT = 1e-18;

/* The integrands at one node z: adds w prod r_i to *sg, w (1 - prod r_i) to *sh, and
 * when dg is set w d/du prod r_i to *sd. Returns prod r_i. */
static double inner_node(dn *c, double u, double z, double w, int dg,
                         double *sg, double *sh, double *sd)
{
    double all = 1, any = 0;   /* prod r_i and 1 - prod r_i, so far */
    for (size_t m = 0; m < c->k; m++) {
        double bu = c->lc[m] * z, du = u * c->ic[m];
        double q, r;
        if (c->two) {
            double lo = bu - du, hi = bu + du;   /* lo < hi, hi > 0 (z >= 0, u > 0) */
            double ehi = erfc(hi * SQRT1_2);
            if (lo >= 0) {
                double elo = erfc(lo * SQRT1_2);
                r = 0.5 * (elo - ehi);             /* Phi_c(lo) - Phi_c(hi) */
                q = 1 - 0.5 * elo + 0.5 * ehi;     /* >= 1/2 */
            } else {
                double elo = erfc(-lo * SQRT1_2);
                q = 0.5 * (elo + ehi);             /* Phi(lo) + Phi_c(hi) */
                r = 0.5 * ((1 - ehi) + (1 - elo)); /* erf sums, no cancellation */
            }
            if (dg) c->dr[m] = c->ic[m] * INV_SQRT_2PI *
                               (exp(-0.5 * hi * hi) + exp(-0.5 * lo * lo));
        } else {
            double hi = bu + du;
            double e = 0.5 * erfc(fabs(hi) * SQRT1_2);
            if (hi >= 0) { q = e; r = 1 - e; } else { r = e; q = 1 - e; }
            if (dg) c->dr[m] = c->ic[m] * INV_SQRT_2PI * exp(-0.5 * hi * hi);
        }
        if (c->mult[m] != 1) {
            double lr = q < 0.5 ? log1p(-q) : log(r);
            r = exp(c->mult[m] * lr);           /* r^m */
            q = -expm1(c->mult[m] * lr);        /* 1 - r^m */
        }
        /* 1 - prod over one more factor: any r + q, a sum of positive terms */
        any = any * r + q;
        all *= r;
        c->r[m] = r;
    }
    *sg += w * all;
    *sh += w * any;
    if (dg) {
        /* d/du prod r_i^m_i = sum_i m_i r_i' r_i^(m_i - 1) prod_(j != i) r_j^m_j */
        double t = 0;
        for (size_t m = 0; m < c->k; m++) {
            if (!(c->r[m] > 0)) continue;
            double rest = all / c->r[m];
            if (c->mult[m] != 1) rest *= pow(c->r[m], 1 - 1 / c->mult[m]);
            t += c->mult[m] * c->dr[m] * rest;
        }
        *sd += w * t;
    }
    return all;
}

/* G(u), H(u) = 1 - G(u) (integrated directly, never as a difference), and when dg is
 * not NULL also G'(u). The pieces are taken from the end where prod r_i is largest
 * (z = 0 two-sided, z = zmax one-sided); once prod r_i has fallen below CUT at a
 * piece's far end it stays below (each r_i is monotone in z there), and when that bounds
 * the rest of G to CUT times the part so far, the rest of the range adds its normal
 * mass to H and nothing to G. */
static void inner(dn *c, double u, double *g, double *h, double *dg)
{
    if (u >= U_EDGE || (c->two && u <= 0) || (!c->two && u <= -U_EDGE)) {
        int one = u > 0;
        *g = one ? 1 : 0;
        *h = one ? 0 : 1;
        if (dg) *dg = 0;   /* beyond U_EDGE the density of the maximum underflows */
        return;
    }
    double zmax = sqrt(u * u + Z_TAIL2);
    double width = c->two ? zmax : 2 * zmax;
    double np = ceil(width / c->hz);
    double hl = width / np, half = 0.5 * hl;
    size_t npieces = (size_t)np;
    double sg = 0, sh = 0, sd = 0;
    for (size_t j = 0; j < npieces; j++) {
        /* two-sided: pieces from 0 upward; one-sided: from zmax downward */
        double mid = c->two ? ((double)j + 0.5) * hl : zmax - ((double)j + 0.5) * hl;
        double edge = 1;   /* prod r_i at the node nearest the far end of the piece */
        for (size_t i = 0; i < NZ; i++) {
            double z = mid + half * c->zx[i];
            double w = half * c->zw[i] * INV_SQRT_2PI * exp(-0.5 * z * z);
            double all = inner_node(c, u, z, w, dg != NULL, &sg, &sh, &sd);
            if (i == (c->two ? c->iz_hi : c->iz_lo)) edge = all;
        }
        if (edge < CUT) {
            /* the rest, two-sided z > mid + half, one-sided z < mid - half, has normal
             * mass m: it adds m (1 - O(edge)) to H and at most edge m to G */
            double zend = c->two ? mid + half : mid - half;
            double m = 0.5 * erfc((c->two ? zend : -zend) * SQRT1_2);
            if (edge * m <= CUT * sg) {
                sh += m;
                break;
            }
        }
    }
    double f = c->two ? 2 : 1;
    *g = f * sg;
    *h = f * sh;
    if (dg) *dg = f * sd;
}

/* G(0) and H(0), computed once per problem. */
static void at_zero(dn *c)
{
    if (!c->have0) {
        inner(c, 0, &c->g0, &c->h0, NULL);
        c->have0 = 1;
    }
}

/* ---- the outer integral ---- */

/* e^y - 1 - y without cancellation. */
static double em1x(double y)
{
    if (fabs(y) < 0.5) {
        double term = y * y / 2, sum = term;
        for (int k = 3; k < 40 && fabs(term) > 1e-17 * fabs(sum); k++) {
            term *= y / k;
            sum += term;
        }
        return sum;
    }
    return expm1(y) - y;
}

/* Log density of x = log S, and its derivative. */
static double ell(const dn *c, double x) { return c->kconst - c->a * em1x(2 * x); }
static double ell_d(const dn *c, double x) { return -c->df * expm1(2 * x); }

/* log P1(u) and log(1 - P1(u)), P1 the lower probability for a single comparison. */
static double log_p1(const dn *c, double u)
{
    if (c->two) {
        if (u <= 0) return -INFINITY;
        if (u < 1) return log(erf(u * SQRT1_2));
        return log1p(-erfc(u * SQRT1_2));
    }
    return gsl_sf_log_erfc(-u * SQRT1_2) - LN2;
}

static double log_q1(const dn *c, double u)
{
    if (c->two) {
        if (u <= 0) return 0;
        return gsl_sf_log_erfc(u * SQRT1_2);
    }
    return gsl_sf_log_erfc(u * SQRT1_2) - LN2;
}

/* The four log bounds on the integrands at x, for a given d (see the file header):
 *   v[0] = l + log(1 - P1)                       lower bound, upper-tail integrand
 *   v[1] = l + min(0, log p + log(1 - P1))       upper bound, upper-tail integrand
 *   v[2] = l + p log P1                          lower bound, lower-tail integrand
 *   v[3] = l + log P1                            upper bound, lower-tail integrand */
typedef struct bounds_ctx {
    const dn *c;
    double d;
    double logp;
} bounds_ctx;

static void bounds(const bounds_ctx *b, double x, double v[4])
{
    double l = ell(b->c, x);
    double u = b->d * exp(x);
    double lq = log_q1(b->c, u), lp = log_p1(b->c, u);
    v[0] = l + lq;
    v[1] = l + fmin(0, b->logp + lq);
    v[2] = l + (double)b->c->p * lp;
    v[3] = l + lp;
    for (int i = 0; i < 4; i++)
        if (isnan(v[i])) v[i] = -INFINITY;
}

/* One bound (which = 0..3) or l itself (which = -1) at x. */
static double bound_at(const bounds_ctx *b, int which, double x)
{
    if (which < 0) return ell(b->c, x);
    double v[4];
    bounds(b, x, v);
    return v[which];
}

/* The maximum of a concave function on [lo, hi] by golden-section search: sets *xm
 * and returns the value there. */
static double concave_max(const bounds_ctx *b, int which, double lo, double hi, double *xm)
{
    const double g = 0.381966011250105151795413165634361883;   /* (3 - sqrt 5)/2 */
    double x1 = lo + g * (hi - lo), x2 = hi - g * (hi - lo);
    double f1 = bound_at(b, which, x1), f2 = bound_at(b, which, x2);
    for (int it = 0; it < 200 && hi - lo > 1e-12 * (1 + fabs(lo) + fabs(hi)); it++) {
        if (f1 < f2) {
            lo = x1; x1 = x2; f1 = f2;
            x2 = hi - g * (hi - lo); f2 = bound_at(b, which, x2);
        } else {
            hi = x2; x2 = x1; f2 = f1;
            x1 = lo + g * (hi - lo); f1 = bound_at(b, which, x1);
        }
    }
    double fl = bound_at(b, which, lo), fh = bound_at(b, which, hi);
    double xb = f1 >= f2 ? x1 : x2, fb = fmax(f1, f2);
    if (fl > fb) { xb = lo; fb = fl; }
    if (fh > fb) { xb = hi; fb = fh; }
    *xm = xb;
    return fb;
}

/* For a concave function with value >= level at xm: the point between xm and edge where
 * it falls to level (bisection); edge itself when the value there is still >= level. */
static double crossing(const bounds_ctx *b, int which, double xm, double edge, double level)
{
    if (bound_at(b, which, edge) >= level) return edge;
    double in = xm, out = edge;
    for (int it = 0; it < 200; it++) {
        double mid = 0.5 * (in + out);
        if (mid == in || mid == out) break;
        if (bound_at(b, which, mid) >= level) in = mid; else out = mid;
    }
    return out;
}

/* The x on the side given by sign (+1 or -1) where a em1x(2x) = t (t > 0), i.e. where
 * the density of log S has fallen by e^-t from its peak (capped at |x| = 1e6). */
static double ell_drop(const dn *c, double t, int sign)
{
    double in = 0, out = sign;
    while (c->a * em1x(2 * out) < t) {
        out *= 2;
        if (fabs(out) > 1e6) return out;
    }
    for (int it = 0; it < 200; it++) {
        double mid = 0.5 * (in + out);
        if (mid == in || mid == out) break;
        if (c->a * em1x(2 * mid) < t) in = mid; else out = mid;
    }
    return out;
}

/* Log of P(S <= e^x) = P(a, a e^(2x)), the regularized incomplete gamma. */
static double log_s_cdf(const dn *c, double x)
{
    double a = c->a;
    double ly = log(a) + 2 * x;   /* log of a e^(2x) */
    if (ly < log(1e-3)) {
        /* P(a, y) = y^a e^-y / Gamma(a + 1) (1 + y/(a+1) + y^2/((a+1)(a+2)) + ...) */
        double y = exp(ly), term = 1, sum = 1;
        for (int k = 1; k < 30; k++) {
            term *= y / (a + k);
            sum += term;
            if (term < 1e-17 * sum) break;
        }
        return a * ly - y - gsl_sf_lngamma(a + 1) + log(sum);
    }
    return log(gsl_sf_gamma_inc_P(a, exp(ly)));
}

/* Where the integrands matter for one d (finite df, d finite and nonzero). */
typedef struct plan {
    bounds_ctx b;
    double xa;          /* below xa, u = d e^x is within 1e-17/p of 0 */
    double lo, hi;      /* the range to integrate numerically */
    int left;           /* lo == xa: the part below is G(0), H(0) times P(S <= e^lo) */
    int right;          /* the part above hi is G = 1, H = 0 (to 1e-17) times P(S > e^hi) */
    double s_lo, s_hi;  /* range of the upper-tail integrand */
    double p_lo, p_hi;  /* range of the lower-tail integrand (empty when p_lo > p_hi) */
    double xm_s, xm_p;  /* the maxima of their bounds */
    double floor_[4];   /* below these the bounds are ignored when making pieces */
} plan;

/* The u above which p (1 - P1(u)) < 1e-17: 1 - G(u) <= that, so G(u) = 1 in double. */
static double right_u(const dn *c)
{
    double target = log(1e-17) - log((double)c->p), lo = 0, hi = U_EDGE;
    for (int it = 0; it < 100; it++) {
        double mid = 0.5 * (lo + hi);
        if (log_q1(c, mid) > target) lo = mid; else hi = mid;
    }
    return hi;
}

static void make_plan(dn *c, double d, plan *pl)
{
    bounds_ctx *b = &pl->b;
    b->c = c;
    b->d = d;
    b->logp = log((double)c->p);
    /* The search domain: where the density of log S is above e^-800 of its peak, and
     * not below x_a. */
    double xa = log(1e-17 / (double)c->p) - log(fabs(d));
    double dom_lo = fmax(ell_drop(c, 800, -1), xa);
    double dom_hi = ell_drop(c, 800, +1);
    if (dom_lo >= dom_hi) dom_lo = dom_hi - 1;
    pl->xa = xa;

    /* Upper tail: where v[0] is above e^-TAIL/p of its maximum; outside, the upper bound
     * v[1] <= v[0] + log p is below e^-TAIL times the largest lower bound. One-sided with
     * d < 0 the tail is between 1/2 and 1 and the density itself is used. */
    int ws = (c->two || d > 0) ? 0 : -1;
    double ms = concave_max(b, ws, dom_lo, dom_hi, &pl->xm_s);
    double lev_s = ms - TAIL - (ws == 0 ? b->logp : LN2);
    pl->s_lo = crossing(b, ws, pl->xm_s, dom_lo, lev_s);
    pl->s_hi = crossing(b, ws, pl->xm_s, dom_hi, lev_s);
    double fl_s = lev_s - 5;

    /* Lower tail: where the upper bound l + log P1 exceeds e^-TAIL times the largest
     * lower bound l + p log P1; one-sided with d > 0, G >= G(0) and the density with
     * the factor G(0) is used. */
    double fl_p;
    if (c->two || d < 0) {
        double mp = concave_max(b, 2, dom_lo, dom_hi, &pl->xm_p);
        double lev_p = mp - TAIL;
        double mu = concave_max(b, 3, dom_lo, dom_hi, &pl->xm_p);
        fl_p = lev_p - 5;
        if (mp > -INFINITY && mu >= lev_p) {
            pl->p_lo = crossing(b, 3, pl->xm_p, dom_lo, lev_p);
            pl->p_hi = crossing(b, 3, pl->xm_p, dom_hi, lev_p);
        } else {
            pl->p_lo = dom_hi;   /* negligible everywhere: empty */
            pl->p_hi = dom_lo;
        }
    } else {
        at_zero(c);
        double ml = concave_max(b, -1, dom_lo, dom_hi, &pl->xm_p);
        double lev_p = ml - TAIL + log(c->g0);
        fl_p = lev_p - 5;
        pl->p_lo = crossing(b, -1, pl->xm_p, dom_lo, lev_p);
        pl->p_hi = crossing(b, -1, pl->xm_p, dom_hi, lev_p);
    }
    pl->lo = pl->s_lo;
    pl->hi = pl->s_hi;
    if (pl->p_lo <= pl->p_hi) {
        pl->lo = fmin(pl->lo, pl->p_lo);
        pl->hi = fmax(pl->hi, pl->p_hi);
    }
    pl->left = pl->lo <= xa;
    if (pl->left) pl->lo = xa;
    /* Above the point where p (1 - P1(u)) < 1e-17 (u = U_RIGHT / p-dependent), G = 1 to
     * double precision; beyond the upper-tail range too, the lower-tail integrand is
     * the density alone, whose integral is the incomplete gamma. */
    pl->right = 0;
    if (d > 0) {
        double xr = fmax(log(right_u(c)) - log(d), pl->s_hi);
        if (xr < pl->hi) {
            pl->hi = xr;
            pl->right = 1;
        }
    }
    pl->floor_[0] = pl->floor_[1] = fl_s;
    pl->floor_[2] = pl->floor_[3] = fl_p;
}

/* Is the piece [x0, x1] fine enough for the bounds of pl? The limits are multiplied by
 * slack (< 1 when making pieces, so that a nearby d still finds them fine). */
static int piece_ok(const plan *pl, double x0, double x1, double slack)
{
    double v0[4], v1[4], vm[4];
    if (x1 - x0 > slack * W_MAX) return 0;
    bounds(&pl->b, x0, v0);
    bounds(&pl->b, x1, v1);
    bounds(&pl->b, 0.5 * (x0 + x1), vm);
    for (int i = 0; i < 4; i++) {
        double f0 = fmax(v0[i], pl->floor_[i]), f1 = fmax(v1[i], pl->floor_[i]);
        double fm = fmax(vm[i], pl->floor_[i]);
        if (fabs(f1 - f0) > slack * STEP_LOG) return 0;
        if (fabs(fm - 0.5 * (f0 + f1)) > slack * BEND_LOG) return 0;
    }
    return 1;
}

/* The outer rule for one d, in y = x + log|d| = log|u|, with G and H at its nodes, so
 * that a nearby d can reuse the inner integrals (only the density weights change). */
typedef struct grid {
    int valid;
    int sign;           /* sign of the d it was made for */
    int left;           /* the part below ylo is G(0), H(0) times P(S <= e^x) */
    int right;          /* the part above yhi is G = 1, H = 0 times P(S > e^x) */
    size_t npiece, n;   /* pieces and nodes (n = NX npiece) */
    double ylo, yhi;    /* range covered */
    double *piece;      /* npiece pairs (y0, y1) */
    double *y, *w, *g, *h;   /* nodes, weights (times half-length), G, H */
} grid;

static void grid_free(grid *gr)
{
    avow_free(gr->piece);
    gr->piece = NULL;
    gr->valid = 0;
}

/* Can gr serve d (planned in pl)? */
static int grid_fits(const grid *gr, double d, const plan *pl)
{
    if (!gr->valid || gr->sign != (d > 0 ? 1 : -1)) return 0;
    double ld = log(fabs(d));
    if (!gr->left && (pl->left || pl->lo + ld < gr->ylo)) return 0;
    if (gr->right ? pl->s_hi + ld > gr->yhi : (pl->right || pl->hi + ld > gr->yhi)) return 0;
    for (size_t i = 0; i < gr->npiece; i++)
        if (!piece_ok(pl, gr->piece[2 * i] - ld, gr->piece[2 * i + 1] - ld, 1)) return 0;
    return 1;
}

/* Make gr for d: pieces, nodes, and the inner integrals at them. */
static int grid_build(dn *c, double d, const plan *pl, grid *gr)
{
    double (*pc)[2] = NULL;
    size_t top = 0, npc = 0;
    grid_free(gr);
    /* pieces: halve from the initial breakpoints until piece_ok; popped left to right */
    double bp[4];
    size_t nbp = 0;
    double lo = pl->left ? pl->lo : pl->lo - MARGIN;
    double hi = pl->right ? pl->hi : pl->hi + MARGIN;
    bp[nbp++] = lo;
    double m1 = fmin(pl->xm_s, pl->xm_p), m2 = fmax(pl->xm_s, pl->xm_p);
    if (m1 > lo && m1 < hi) bp[nbp++] = m1;
    if (m2 > bp[nbp - 1] && m2 < hi) bp[nbp++] = m2;
    bp[nbp++] = hi;
    pc = avow_malloc(MAX_PIECES * sizeof *pc);
    if (!pc) return AVOW_ENOMEM;
    double (*st)[2] = avow_malloc(MAX_PIECES * sizeof *st);
    if (!st) { avow_free(pc); return AVOW_ENOMEM; }
    for (size_t i = nbp - 1; i > 0; i--) {
        st[top][0] = bp[i - 1];
        st[top][1] = bp[i];
        top++;
    }
    while (top > 0 && npc < MAX_PIECES) {
        top--;
        double x0 = st[top][0], x1 = st[top][1];
        double xm = 0.5 * (x0 + x1);
        if (top + 2 <= MAX_PIECES && xm > x0 && xm < x1 && !piece_ok(pl, x0, x1, SLACK)) {
            st[top][0] = xm; st[top][1] = x1; top++;
            st[top][0] = x0; st[top][1] = xm; top++;
            continue;
        }
        pc[npc][0] = x0;
        pc[npc][1] = x1;
        npc++;
    }
    avow_free(st);

    size_t n = npc * NX;
    double *mem = avow_malloc((2 * npc + 4 * n) * sizeof(double));
    if (!mem) { avow_free(pc); return AVOW_ENOMEM; }
    gr->piece = mem;
    gr->y = mem + 2 * npc;
    gr->w = gr->y + n;
    gr->g = gr->w + n;
    gr->h = gr->g + n;
    double ld = log(fabs(d));
    double log_tiny = log(1e-17);
    for (size_t i = 0; i < npc; i++) {
        double x0 = pc[i][0], x1 = pc[i][1];
        gr->piece[2 * i] = x0 + ld;
        gr->piece[2 * i + 1] = x1 + ld;
        double mid = 0.5 * (x0 + x1), half = 0.5 * (x1 - x0);
        for (size_t j = 0; j < NX; j++) {
            size_t k = i * NX + j;
            double x = mid + half * c->xx[j];
            double u = d * exp(x);
            gr->y[k] = x + ld;
            gr->w[k] = half * c->xw[j];
            /* outside the upper-tail range with a negligible tail: G = 1; outside the
             * lower-tail range with a negligible G: G = 0 */
            int out_s = x < pl->s_lo || x > pl->s_hi;
            int out_p = x < pl->p_lo || x > pl->p_hi;
            if (out_s && pl->b.logp + log_q1(c, u) < log_tiny) {
                gr->g[k] = 1; gr->h[k] = 0;
            } else if (out_p && log_p1(c, u) < log_tiny) {
                gr->g[k] = 0; gr->h[k] = 1;
            } else {
                inner(c, u, &gr->g[k], &gr->h[k], NULL);
            }
        }
    }
    avow_free(pc);
    gr->npiece = npc;
    gr->n = n;
    gr->ylo = lo + ld;
    gr->yhi = hi + ld;
    gr->left = pl->left;
    gr->right = pl->right;
    gr->sign = d > 0 ? 1 : -1;
    gr->valid = 1;
    if (gr->left) at_zero(c);
    return AVOW_OK;
}

/* The outcome of one evaluation at d. */
typedef struct dn_val {
    double cdf, sf;     /* lower and upper tail */
    double dsf;         /* d sf / d d (= -d cdf / d d) */
} dn_val;

/* Sums over the grid for d (of the sign the grid was made for). */
static void grid_sums(dn *c, const grid *gr, double d, dn_val *out)
{
    double ld = log(fabs(d));
    double s0 = 0, s1 = 0, s3 = 0;   /* cdf, sf, d sf / d log|d| */
    for (size_t k = 0; k < gr->n; k++) {
        double x = gr->y[k] - ld;
        double e = gr->w[k] * exp(ell(c, x));
        if (e == 0) continue;
        double lp = ell_d(c, x);
        s0 += e * gr->g[k];
        s1 += e * gr->h[k];
        s3 -= e * lp * gr->h[k];
    }
    if (gr->left) {
        double x = gr->ylo - ld;
        double mass = exp(log_s_cdf(c, x)), dens = exp(ell(c, x));
        s0 += c->g0 * mass;
        s1 += c->h0 * mass;
        s3 -= c->h0 * dens;
    }
    if (gr->right) {
        double x = gr->yhi - ld;
        s0 += gsl_sf_gamma_inc_Q(c->a, c->a * exp(2 * x));
    }
    out->cdf = s0;
    out->sf = s1;
    out->dsf = s3 / d;
}

/* Both tails at d (finite, nonzero; d > 0 when two-sided) and d sf/dd. gr is reused
 * when it fits d, else rebuilt. */
static int dn_eval(dn *c, double d, grid *gr, dn_val *out)
{
    if (!isfinite(c->df)) {
        double g, h, dg;
        inner(c, d, &g, &h, &dg);
        out->cdf = g;
        out->sf = h;
        out->dsf = -dg;
        return AVOW_OK;
    }
    plan pl;
    make_plan(c, d, &pl);
    if (pl.left && pl.lo >= pl.hi) {
        /* u = d e^x is within 1e-17/p of 0 wherever the density of S matters */
        at_zero(c);
        out->cdf = c->g0;
        out->sf = c->h0;
        out->dsf = NAN;
        return AVOW_OK;
    }
    if (!grid_fits(gr, d, &pl)) {
        int st = grid_build(c, d, &pl, gr);
        if (st) return st;
    }
    grid_sums(c, gr, d, out);
    return AVOW_OK;
}

/* ---- public functions ---- */

int dunnett_lambda(double n0, const double *n, size_t p, double *lambda)
{
    if (!n || !lambda || p == 0 || !(n0 > 0) || !isfinite(n0)) return AVOW_EDOM;
    for (size_t i = 0; i < p; i++) {
        if (!(n[i] > 0) || !isfinite(n[i])) return AVOW_EDOM;
        if (!(1 / sqrt(1 + n0 / n[i]) < 1)) return AVOW_EDOM;
    }
    for (size_t i = 0; i < p; i++) lambda[i] = 1 / sqrt(1 + n0 / n[i]);
    return AVOW_OK;
}

/* Both tails at d, with the special values. */
static int tails(double d, const double *lambda, size_t p, double df, int two_sided,
                 double *cdf, double *sf)
{
    gsl_quiet();
    if (isnan(d) || !args_ok(lambda, p, df)) return AVOW_EDOM;
    if (d == INFINITY) { *cdf = 1; *sf = 0; return AVOW_OK; }
    if (d == -INFINITY || (two_sided && d <= 0)) { *cdf = 0; *sf = 1; return AVOW_OK; }
    dn c;
    int st = dn_init(&c, lambda, p, df, two_sided);
    if (st) return st;
    if (d == 0) {
        at_zero(&c);   /* one-sided: P(all Z_i <= 0), free of df */
        *cdf = c.g0;
        *sf = c.h0;
    } else {
        grid gr = {0};
        dn_val v;
        st = dn_eval(&c, d, &gr, &v);
        grid_free(&gr);
        if (!st && (isnan(v.cdf) || isnan(v.sf))) st = AVOW_EDOM;
        if (!st) {
            *cdf = fmin(fmax(v.cdf, 0), 1);
            *sf = fmin(fmax(v.sf, 0), 1);
        }
    }
    dn_free(&c);
    return st;
}

int dunnett_cdf(double d, const double *lambda, size_t p, double df, int two_sided,
                double *prob)
{
    double cdf, sf;
    if (!prob) return AVOW_EDOM;
    int st = tails(d, lambda, p, df, two_sided, &cdf, &sf);
    if (!st) *prob = cdf;
    return st;
}

int dunnett_sf(double d, const double *lambda, size_t p, double df, int two_sided,
               double *prob)
{
    double cdf, sf;
    if (!prob) return AVOW_EDOM;
    int st = tails(d, lambda, p, df, two_sided, &cdf, &sf);
    if (!st) *prob = sf;
    return st;
}

/* Upper quantile of a single comparison (t, or normal for df infinite) at tail
 * probability q in (0, 1). Status as dist_t_qinv. */
static int single_qinv(double q, double df, double *x)
{
    if (!isfinite(df)) {
        *x = gsl_cdf_ugaussian_Qinv(q);
        return isfinite(*x) ? AVOW_OK : AVOW_EOVERFLOW;
    }
    return dist_t_qinv(q, df, x);
}

/* The equation of dunnett_qinv at d: h = log(tail) - log(target), decreasing in d, and
 * dh/dd (NaN when not available). */
typedef struct qeq {
    dn *c;
    grid gr;
    int upper;          /* solve on the upper tail (alpha <= 1/2) */
    double log_target;
} qeq;

static int qinv_h(qeq *e, double d, double *h, double *dh)
{
    dn_val v;
    if (d == 0 || (e->c->two && d < 0)) {
        at_zero(e->c);
        v.cdf = e->c->two ? 0 : e->c->g0;
        v.sf = e->c->two ? 1 : e->c->h0;
        v.dsf = NAN;
    } else {
        int st = dn_eval(e->c, d, &e->gr, &v);
        if (st) return st;
    }
    if (e->upper) {
        *h = log(v.sf) - e->log_target;
        *dh = v.dsf / v.sf;
    } else {
        *h = e->log_target - log(v.cdf);
        *dh = v.dsf / v.cdf;
    }
    return isnan(*h) ? AVOW_EDOM : AVOW_OK;
}

/* Relative step below which Newton's iteration has converged: its error is then of the
 * order of the square of the step. */
static const double NEWTON_TOL = 1e-9;

/* Solve h = 0 from x0, keeping a bracket [lo, hi] with h(lo) > 0 > h(hi): dlo and dhi
 * are proven bounds (moved outward by 1e-3 to be safe from rounding; dhi may be +inf).
 * Newton steps inside the bracket, bisection (doubling while hi is infinite) otherwise. */
static int qinv_solve(qeq *e, double dlo, double dhi, double x0, double *d)
{
    double lo = dlo - 1e-3 * fmax(fabs(dlo), 1);
    double hi = dhi + 1e-3 * fmax(fabs(dhi), 1);
    double x = x0 > lo && x0 < hi ? x0 : (isfinite(hi) ? 0.5 * (lo + hi) : dlo), h, dh;
    int st = qinv_h(e, x, &h, &dh);
    if (st) return st;
    if (h > 0) lo = x; else hi = x;
    for (int it = 0; it < 300 && h != 0; it++) {
        double scale = fmax(fabs(x), 1e-3);
        double nx = x;
        int newton = 0;
        if (isfinite(h) && isfinite(dh) && dh < 0) {
            nx = x - h / dh;
            if (fabs(nx - x) <= NEWTON_TOL * scale) {
                if (nx >= lo && nx <= hi) x = nx;
                break;
            }
            newton = nx > lo && nx < hi;
        }
        if (!newton) {
            if (isinf(hi)) {
                nx = x + fmax(fabs(x), 1);
                if (!isfinite(nx)) { *d = INFINITY; return AVOW_EOVERFLOW; }
            } else {
                if (!(hi - lo > 1e-15 * scale)) break;
                nx = 0.5 * (lo + hi);
            }
        }
        x = nx;
        if ((st = qinv_h(e, x, &h, &dh))) return st;
        if (h > 0) lo = x; else hi = x;
    }
    *d = x;
    return AVOW_OK;
}

int dunnett_qinv(double alpha, const double *lambda, size_t p, double df, int two_sided,
                 double *d)
{
    gsl_quiet();
    if (!d || !(alpha > 0 && alpha < 1) || !args_ok(lambda, p, df)) return AVOW_EDOM;
    double dfe = df >= DF_INF ? INFINITY : df;
    double k = two_sided ? 2 : 1;
    /* Bounds: the maximum exceeds each statistic, so the root lies above the single
     * quantile at alpha; by Sidak's and Slepian's inequalities it lies below the single
     * quantile at beta = 1 - (1 - alpha)^(1/p). */
    double beta = -expm1(log1p(-alpha) / (double)p);
    double dlo, dhi;
    int st = single_qinv(alpha / k, dfe, &dlo);
    if (st == AVOW_EOVERFLOW) { *d = INFINITY; return AVOW_EOVERFLOW; }
    if (st) return st;
    st = single_qinv(beta / k, dfe, &dhi);
    if (st == AVOW_EOVERFLOW) dhi = INFINITY;   /* no finite upper bound */
    else if (st) return st;

    dn c;
    if ((st = dn_init(&c, lambda, p, df, two_sided))) return st;
    qeq e = {0};
    e.c = &c;
    e.upper = alpha <= 0.5;
    e.log_target = e.upper ? log(alpha) : log1p(-alpha);
    /* Start: for finite df, the upper bound scaled by the ratio of the critical value to
     * the same bound at df = infinity (a few inner integrals; the inner integrals do
     * not depend on df), usually within 1e-3, so that one outer grid serves every
     * Newton step; else the upper bound. */
    double x0 = dhi;
    if (isfinite(c.df) && isfinite(dhi) && dhi > 0) {
        double l_inf = gsl_cdf_ugaussian_Qinv(alpha / k);
        double s_inf = gsl_cdf_ugaussian_Qinv(beta / k), d_inf = NAN;
        if (s_inf > 0 && l_inf > 0) {
            c.df = INFINITY;
            int st0 = qinv_solve(&e, l_inf, s_inf, s_inf, &d_inf);
            c.df = dfe;
            if (st0 == AVOW_OK && d_inf > 0 && d_inf <= s_inf) x0 = dhi * (d_inf / s_inf);
        }
    }
    double r = NAN;
    st = qinv_solve(&e, dlo, dhi, x0, &r);
    grid_free(&e.gr);
    dn_free(&c);
    if (st == AVOW_OK || st == AVOW_EOVERFLOW) *d = r;
    return st;
}
