/* diagnostics.c: assumption checks and robust alternatives (include/avow/diagnostics.h;
 * formulas in shared/reference/methods.md sections 5, 6 and 8). */
#include "avow/diagnostics.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <gmp.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_sf_log.h>

#include "avow/dist.h"
#include "avow/util.h"

__extension__ typedef __int128 i128;
__extension__ typedef unsigned __int128 u128;

static const double DX_PI = 3.14159265358979323846;

const char *dx_status_text(int status)
{
    switch (status) {
    case AVOW_OK: return "ok";
    case AVOW_ENOMEM: return "out of memory";
    case AVOW_EOVERFLOW: return "the values span too many digits";
    case AVOW_EDOM: return "invalid arguments";
    case AVOW_EIO: return "input/output error";
    case AVOW_ESYNTAX: return "malformed text";
    case AVOW_DX_ESMALL: return "a group has fewer than 2 observations";
    case AVOW_DX_EZEROVAR: return "a group has zero variance";
    case AVOW_DX_ENOSPREAD: return "the absolute deviations do not vary within any group";
    case AVOW_DX_EALLTIED: return "all observations are tied";
    case AVOW_DX_ENRANGE: return "the number of values is outside 3 to 5000";
    case AVOW_DX_EZERORANGE: return "all values are equal";
    case AVOW_DX_ENODF: return "no residual degrees of freedom";
    default: return "unknown status";
    }
}

/* ------------------------------------------------------------------ helpers */

/* GSL's default error handler aborts; turn it off once, as dist.c does, so that a GSL
 * failure could only show up as a NaN (none is expected: inputs are validated). */
static void gsl_quiet(void)
{
    static int done;
    if (!done) {
        gsl_set_error_handler_off();
        done = 1;
    }
}

static const int64_t P10[19] = {
    INT64_C(1), INT64_C(10), INT64_C(100), INT64_C(1000), INT64_C(10000), INT64_C(100000),
    INT64_C(1000000), INT64_C(10000000), INT64_C(100000000), INT64_C(1000000000),
    INT64_C(10000000000), INT64_C(100000000000), INT64_C(1000000000000),
    INT64_C(10000000000000), INT64_C(100000000000000), INT64_C(1000000000000000),
    INT64_C(10000000000000000), INT64_C(100000000000000000),
    INT64_C(1000000000000000000)
};

static uint64_t mag64(int64_t v) { return v < 0 ? (uint64_t)0 - (uint64_t)v : (uint64_t)v; }

static int ndigits(uint64_t m)
{
    int d = 1;
    while (d < 19 && m >= (uint64_t)P10[d]) d++;
    if (d == 19 && m >= UINT64_C(10000000000000000000)) d = 20;
    return d;
}

/* z = the unsigned 128-bit v. */
static void mpz_set_u128(mpz_t z, u128 v)
{
    uint64_t w[2] = { (uint64_t)v, (uint64_t)(v >> 64) };
    mpz_import(z, 2, -1, sizeof(uint64_t), 0, 0, w);
}

/* z = the signed 128-bit v. */
static void mpz_set_i128(mpz_t z, i128 v)
{
    mpz_set_u128(z, v < 0 ? (u128)0 - (u128)v : (u128)v);
    if (v < 0) mpz_neg(z, z);
}

static void mpz_set_u64(mpz_t z, uint64_t v) { mpz_set_u128(z, (u128)v); }

/* A non-negative integer hi 2^128 + lo, summed without overflow (hi stays far below
 * 2^128 for the sums made here: at most 2^32 squares below 2^188). */
typedef struct u256 {
    u128 lo;
    u128 hi;
} u256;

static void u256_add(u256 *a, u128 x)
{
    u128 s = a->lo + x;
    if (s < x) a->hi++;
    a->lo = s;
}

/* a += u^2 for u < 2^127. */
static void u256_add_sq(u256 *a, u128 u)
{
    uint64_t ul = (uint64_t)u, uh = (uint64_t)(u >> 64);
    u256_add(a, (u128)ul * ul);
    if (uh) {
        u128 m = (u128)uh * ul;             /* u^2 = uh^2 2^128 + 2 m 2^64 + ul^2 */
        u256_add(a, (u128)(uint64_t)m << 64);   /* m 2^64 = (m >> 64) 2^128 + low part */
        u256_add(a, (u128)(uint64_t)m << 64);
        a->hi += (m >> 64) * 2 + (u128)uh * uh;
    }
}

static void mpz_set_u256(mpz_t z, u256 a)
{
    uint64_t w[4] = { (uint64_t)a.lo, (uint64_t)(a.lo >> 64),
                      (uint64_t)a.hi, (uint64_t)(a.hi >> 64) };
    mpz_import(z, 4, -1, sizeof(uint64_t), 0, 0, w);
}

/* Neumaier's compensated sum. */
typedef struct ksum {
    double s, c;
} ksum;

static void ksum_add(ksum *k, double x)
{
    double t = k->s + x;
    if (fabs(k->s) >= fabs(x)) k->c += (k->s - t) + x;
    else k->c += (x - t) + k->s;
    k->s = t;
}

static double ksum_get(const ksum *k) { return k->s + k->c; }

/* Total count of values; AVOW_EDOM for invalid groups (NULL, k < 2, empty group). */
static int check_groups(const avow_dx_group *g, size_t k, uint64_t *n_total, size_t *n_max)
{
    if (!g || k < 2) return AVOW_EDOM;
    uint64_t n = 0;
    size_t mx = 0;
    for (size_t i = 0; i < k; i++) {
        if (g[i].n == 0 || !g[i].values) return AVOW_EDOM;
        if (g[i].n > UINT64_MAX - n) return AVOW_EOVERFLOW;
        n += g[i].n;
        if (g[i].n > mx) mx = g[i].n;
    }
    *n_total = n;
    if (n_max) *n_max = mx;
    return AVOW_OK;
}

/* The common scale of all values: each value is an integer number of units 10^emin.
 * fast: every scaled value has at most 18 digits (|Y| < 10^18 < 2^60). */
typedef struct dx_scale {
    int32_t emin;
    int fast;
} dx_scale;

static int scale_find(const avow_dx_group *g, size_t k, dx_scale *sc)
{
    int any = 0;
    int64_t emin = 0, top = 0;
    for (size_t i = 0; i < k; i++) {
        for (size_t j = 0; j < g[i].n; j++) {
            avow_dec v = g[i].values[j];
            if (v.sig == 0) continue;
            int64_t t = ndigits(mag64(v.sig)) + (int64_t)v.exp;  /* |v| < 10^t */
            if (!any || v.exp < emin) emin = v.exp;
            if (!any || t > top) top = t;
            any = 1;
        }
    }
    if (!any) { sc->emin = 0; sc->fast = 1; return AVOW_OK; }
    if (top - emin > AVOW_DX_MAX_DIGITS) return AVOW_EOVERFLOW;
    sc->emin = (int32_t)emin;
    sc->fast = top - emin <= 18;
    return AVOW_OK;
}

/* v in units of 10^emin, for a fast scale. */
static int64_t scale_i64(avow_dec v, int32_t emin)
{
    return v.sig == 0 ? 0 : v.sig * P10[v.exp - emin];
}

/* out = v in units of 10^emin (any scale). */
static void scale_mpz(mpz_t out, avow_dec v, int32_t emin)
{
    mpz_set_u64(out, mag64(v.sig));
    if (v.sig == 0) return;
    int64_t s = (int64_t)v.exp - emin;
    if (s > 0) {
        if (s <= 18) {
            mpz_mul_ui(out, out, (unsigned long)P10[s]);
        } else {
            mpz_t p;
            mpz_init(p);
            mpz_ui_pow_ui(p, 10, (unsigned long)s);
            mpz_mul(out, out, p);
            mpz_clear(p);
        }
    }
    if (v.sig < 0) mpz_neg(out, out);
}

/* The k-th smallest of y[0..n) moved to y[k], smaller ones before it and larger ones
 * after (Hoare's selection, "FIND", 1961, with a median-of-three pivot): linear time on
 * average, so a median needs no full sort. */
static void select_i64(int64_t *y, size_t n, size_t k)
{
    size_t lo = 0, hi = n - 1;
    while (hi > lo) {
        size_t mid = lo + (hi - lo) / 2;
        int64_t a = y[lo], b = y[mid], c = y[hi];
        int64_t pivot = a < b ? (b < c ? b : a < c ? c : a) : (a < c ? a : b < c ? c : b);
        size_t i = lo, j = hi;
        while (i <= j) {
            while (y[i] < pivot) i++;
            while (y[j] > pivot) j--;
            if (i <= j) {
                int64_t t = y[i]; y[i] = y[j]; y[j] = t;
                i++;
                if (j == 0) break;
                j--;
            }
        }
        if (k <= j) hi = j;
        else if (k >= i) lo = i;
        else return;
    }
}

static int cmp_dec(const void *a, const void *b)
{
    return dec_cmp(*(const avow_dec *)a, *(const avow_dec *)b);
}

/* ------------------------------------------------------------------ Levene */

/* Accumulates the exact one-way analysis of variance of z over the groups:
 *   ssw = sum_i (n_i B_i - A_i^2) / (n_i d_i^2),
 *   st  = sum_i T_i^2 / n_i,   tot = sum_i T_i,   T_i = A_i / d_i,
 * where A_i = sum d_i z_ij and B_i = sum (d_i z_ij)^2 are integers. */
typedef struct lev_sums {
    mpq_t ssw, st, tot, t, q;
} lev_sums;

static void lev_add_group(lev_sums *s, uint64_t n, const mpz_t d, const mpz_t a,
                          const mpz_t b)
{
    mpz_t nz;
    mpz_init(nz);
    mpz_set_u64(nz, n);
    /* (n B - A^2) / (n d^2) */
    mpz_mul(mpq_numref(s->q), nz, b);
    mpz_submul(mpq_numref(s->q), a, a);
    mpz_mul(mpq_denref(s->q), d, d);
    mpz_mul(mpq_denref(s->q), mpq_denref(s->q), nz);
    mpq_canonicalize(s->q);
    mpq_add(s->ssw, s->ssw, s->q);
    /* T = A / d */
    mpz_set(mpq_numref(s->t), a);
    mpz_set(mpq_denref(s->t), d);
    mpq_canonicalize(s->t);
    mpq_add(s->tot, s->tot, s->t);
    /* T^2 / n */
    mpq_mul(s->q, s->t, s->t);
    mpz_mul(mpq_denref(s->q), mpq_denref(s->q), nz);
    mpq_canonicalize(s->q);
    mpq_add(s->st, s->st, s->q);
    mpz_clear(nz);
}

/* Fast path for one group: all scaled values fit in 18 digits and n < 2^32.
 * y: scratch for n values. */
static void lev_group_fast(const avow_dx_group *g, int32_t emin, avow_dx_centre centre,
                           int64_t *y, mpz_t d, mpz_t a, mpz_t b)
{
    size_t n = g->n;
    for (size_t j = 0; j < n; j++) y[j] = scale_i64(g->values[j], emin);
    i128 dd, c;
    if (centre == AVOW_DX_MEAN) {
        i128 s = 0;
        for (size_t j = 0; j < n; j++) s += y[j];
        dd = (i128)n;
        c = s;
    } else {
        /* the two middle values: select the upper one; the lower one is the largest of
         * the values before it when n is even */
        size_t up = n / 2;
        select_i64(y, n, up);
        int64_t hi_mid = y[up], lo_mid = hi_mid;
        if (n % 2 == 0) {
            lo_mid = y[0];
            for (size_t j = 1; j < up; j++) if (y[j] > lo_mid) lo_mid = y[j];
        }
        dd = 2;
        c = (i128)lo_mid + hi_mid;
    }
    /* |dd y - c| < 2^32 2^60 + 2^92 = 2^93 */
    u128 sa = 0;
    u256 sb = {0, 0};
    for (size_t j = 0; j < n; j++) {
        i128 v = dd * y[j] - c;
        u128 u = v < 0 ? (u128)(-v) : (u128)v;
        sa += u;
        u256_add_sq(&sb, u);
    }
    mpz_set_i128(d, dd);
    mpz_set_u128(a, sa);
    mpz_set_u256(b, sb);
}

/* General path for one group, in GMP integers. sorted: scratch for n values. */
static void lev_group_big(const avow_dx_group *g, int32_t emin, avow_dx_centre centre,
                          avow_dec *sorted, mpz_t d, mpz_t a, mpz_t b)
{
    size_t n = g->n;
    mpz_t c, y, u;
    mpz_inits(c, y, u, NULL);
    if (centre == AVOW_DX_MEAN) {
        mpz_set_ui(c, 0);
        for (size_t j = 0; j < n; j++) {
            scale_mpz(y, g->values[j], emin);
            mpz_add(c, c, y);
        }
        mpz_set_u64(d, n);
    } else {
        memcpy(sorted, g->values, n * sizeof *sorted);
        qsort(sorted, n, sizeof *sorted, cmp_dec);
        scale_mpz(c, sorted[(n - 1) / 2], emin);
        scale_mpz(y, sorted[n / 2], emin);
        mpz_add(c, c, y);
        mpz_set_ui(d, 2);
    }
    mpz_set_ui(a, 0);
    mpz_set_ui(b, 0);
    for (size_t j = 0; j < n; j++) {
        scale_mpz(y, g->values[j], emin);
        mpz_mul(u, d, y);
        mpz_sub(u, u, c);
        mpz_abs(u, u);
        mpz_add(a, a, u);
        mpz_addmul(b, u, u);
    }
    mpz_clears(c, y, u, NULL);
}

static int levene(const avow_dx_group *groups, size_t k, avow_dx_centre centre,
                  int force_big, avow_dx_ftest *out)
{
    gsl_quiet();
    uint64_t n_total;
    size_t n_max;
    if (!out || (centre != AVOW_DX_MEAN && centre != AVOW_DX_MEDIAN)) return AVOW_EDOM;
    int st = check_groups(groups, k, &n_total, &n_max);
    if (st) return st;
    if (n_total <= k) return AVOW_DX_ENODF;
    dx_scale sc;
    if ((st = scale_find(groups, k, &sc)) != AVOW_OK) return st;
    int fast = !force_big && sc.fast && n_max < (UINT64_C(1) << 32);
    /* scratch: scaled values (fast) or a sorted copy (general path, median only) */
    void *scratch = NULL;
    if (fast) scratch = avow_malloc(n_max * sizeof(int64_t));
    else if (centre == AVOW_DX_MEDIAN) scratch = avow_malloc(n_max * sizeof(avow_dec));
    if ((fast || centre == AVOW_DX_MEDIAN) && !scratch) return AVOW_ENOMEM;

    lev_sums s;
    mpq_inits(s.ssw, s.st, s.tot, s.t, s.q, NULL);
    mpz_t d, a, b;
    mpz_inits(d, a, b, NULL);
    for (size_t i = 0; i < k; i++) {
        if (fast) lev_group_fast(&groups[i], sc.emin, centre, scratch, d, a, b);
        else lev_group_big(&groups[i], sc.emin, centre, scratch, d, a, b);
        lev_add_group(&s, groups[i].n, d, a, b);
    }
    avow_free(scratch);
    /* SSB = st - tot^2 / N; W = (N - k) SSB / ((k - 1) SSW) */
    if (mpq_sgn(s.ssw) == 0) {
        st = AVOW_DX_ENOSPREAD;
    } else {
        mpq_mul(s.q, s.tot, s.tot);
        mpz_set_u64(mpq_numref(s.t), n_total);
        mpz_set_ui(mpq_denref(s.t), 1);
        mpq_div(s.q, s.q, s.t);
        mpq_sub(s.q, s.st, s.q);                        /* SSB */
        mpz_set_u64(mpq_numref(s.t), n_total - k);
        mpz_set_u64(mpq_denref(s.t), (uint64_t)k - 1);
        mpq_canonicalize(s.t);
        mpq_mul(s.q, s.q, s.t);
        mpq_div(s.q, s.q, s.ssw);
        avow_dx_ftest r;
        r.stat = dec_mpq_get_d(s.q);
        r.df1 = (double)(k - 1);
        r.df2 = (double)(n_total - k);
        r.p = dist_f_q(r.stat, r.df1, r.df2);
        *out = r;
    }
    mpz_clears(d, a, b, NULL);
    mpq_clears(s.ssw, s.st, s.tot, s.t, s.q, NULL);
    return st;
}

int dx_levene(const avow_dx_group *groups, size_t k, avow_dx_centre centre,
              avow_dx_ftest *out)
{
    return levene(groups, k, centre, 0, out);
}

int dx_levene_big(const avow_dx_group *groups, size_t k, avow_dx_centre centre,
                  avow_dx_ftest *out)
{
    return levene(groups, k, centre, 1, out);
}

/* ------------------------------------------------------------------ group moments */

/* Exact mean and sum of squared deviations of each group (decimal.h accumulators).
 * means and ss: k initialised rationals each. */
static int group_moments(const avow_dx_group *g, size_t k, mpq_t *means, mpq_t *ss)
{
    int st = AVOW_OK;
    for (size_t i = 0; i < k && st == AVOW_OK; i++) {
        avow_acc acc;
        dec_acc_init(&acc);
        for (size_t j = 0; j < g[i].n && st == AVOW_OK; j++) st = dec_acc_add(&acc, g[i].values[j]);
        if (st == AVOW_OK) st = dec_acc_mean(&acc, means[i]);
        if (st == AVOW_OK) st = dec_acc_ss(&acc, ss[i]);
        dec_acc_clear(&acc);
    }
    return st;
}

/* k rationals, initialised; NULL when out of memory. */
static mpq_t *mpq_array(size_t k)
{
    if (k > SIZE_MAX / sizeof(mpq_t)) return NULL;
    mpq_t *a = avow_malloc(k * sizeof(mpq_t));
    if (!a) return NULL;
    for (size_t i = 0; i < k; i++) mpq_init(a[i]);
    return a;
}

static void mpq_array_free(mpq_t *a, size_t k)
{
    if (!a) return;
    for (size_t i = 0; i < k; i++) mpq_clear(a[i]);
    avow_free(a);
}

/* Common checks of Bartlett and Welch: k >= 2, every n_i >= 2. */
static int check_variance_groups(const avow_dx_group *groups, size_t k, uint64_t *n_total)
{
    int st = check_groups(groups, k, n_total, NULL);
    if (st) return st;
    for (size_t i = 0; i < k; i++)
        if (groups[i].n < 2) return AVOW_DX_ESMALL;
    return AVOW_OK;
}

/* q = the integer v. */
static void mpq_set_u64(mpq_t q, uint64_t v)
{
    mpz_set_u64(mpq_numref(q), v);
    mpz_set_ui(mpq_denref(q), 1);
}

/* ------------------------------------------------------------------ Bartlett */

/* ln q for a rational q > 0 of any size: q = (mn 2^en)/(md 2^ed) with mn, md in
 * [1/2, 1), ln q = ln(mn/md) + (en - ed) ln 2. Used for q < 1/2, where the result is
 * below -0.69 and the two terms cannot cancel to more than a bit. */
static double mpq_log(const mpq_t q)
{
    signed long en, ed;
    double mn = mpz_get_d_2exp(&en, mpq_numref(q));
    double md = mpz_get_d_2exp(&ed, mpq_denref(q));
    return log(mn / md) + (double)(en - ed) * 0.69314718055994530942;
}

int dx_bartlett(const avow_dx_group *groups, size_t k, avow_dx_chisq *out)
{
    gsl_quiet();
    uint64_t n_total;
    if (!out) return AVOW_EDOM;
    int st = check_variance_groups(groups, k, &n_total);
    if (st) return st;
    mpq_t *means = mpq_array(k);
    mpq_t *ss = mpq_array(k);
    if (!means || !ss) {
        mpq_array_free(means, k);
        mpq_array_free(ss, k);
        return AVOW_ENOMEM;
    }
    st = group_moments(groups, k, means, ss);
    for (size_t i = 0; i < k && st == AVOW_OK; i++)
        if (mpq_sgn(ss[i]) == 0) st = AVOW_DX_EZEROVAR;
    if (st == AVOW_OK) {
        mpq_t sp, q, c, one, half;
        mpq_inits(sp, q, c, one, half, NULL);
        /* s_p^2 = sum SS_i / (N - k) */
        for (size_t i = 0; i < k; i++) mpq_add(sp, sp, ss[i]);
        mpq_set_u64(q, n_total - k);
        mpq_div(sp, sp, q);
        /* numerator = sum nu_i (eps_i - ln(1 + eps_i)), eps_i = r_i - 1, r_i = s_i^2 / s_p^2;
         * every term is non-negative, so the sum does not cancel. For r_i >= 1/2, eps_i
         * is rounded from its exact value and eps - ln(1 + eps) taken from
         * gsl_sf_log_1plusx_mx (accurate for small eps); below 1/2, eps_i is near -1 and
         * its rounding would swamp 1 + eps_i, so ln r_i comes from the exact ratio
         * (mpq_log) and the term, eps_i - ln r_i >= 0.19, has no cancellation to fear. */
        ksum num = {0, 0};
        mpq_set_ui(one, 1, 1);
        mpq_set_ui(half, 1, 2);
        for (size_t i = 0; i < k; i++) {
            uint64_t nu = groups[i].n - 1;
            mpq_set_u64(q, nu);
            mpq_div(q, ss[i], q);           /* s_i^2 */
            mpq_div(q, q, sp);              /* r_i > 0 */
            double lr = mpq_cmp(q, half) < 0 ? mpq_log(q) : 0.0;
            int small = mpq_cmp(q, half) < 0;
            mpq_sub(q, q, one);             /* eps_i > -1 */
            double eps = dec_mpq_get_d(q);
            double term;
            if (small) term = eps - lr;
            else if (isinf(eps)) term = eps;
            else if (eps >= 1e300) term = eps - log(eps);   /* log1p(eps) = log(eps) there */
            else term = -gsl_sf_log_1plusx_mx(eps);
            ksum_add(&num, (double)nu * term);
        }
        /* C = 1 + (sum 1/nu_i - 1/(N - k)) / (3 (k - 1)) */
        for (size_t i = 0; i < k; i++) {
            mpq_set_ui(q, 1, 1);
            mpz_set_u64(mpq_denref(q), groups[i].n - 1);
            mpq_add(c, c, q);
        }
        mpq_set_ui(q, 1, 1);
        mpz_set_u64(mpq_denref(q), n_total - k);
        mpq_sub(c, c, q);
        mpq_set_u64(q, 3 * ((uint64_t)k - 1));
        mpq_div(c, c, q);
        mpq_add(c, c, one);
        double cd = dec_mpq_get_d(c);
        avow_dx_chisq r;
        r.stat = ksum_get(&num) / cd;
        r.df = (double)(k - 1);
        r.p = gsl_cdf_chisq_Q(r.stat, r.df);
        *out = r;
        mpq_clears(sp, q, c, one, half, NULL);
    }
    mpq_array_free(means, k);
    mpq_array_free(ss, k);
    return st;
}

/* ------------------------------------------------------------------ Welch */

/* Welch's F* and df2 in exact rational arithmetic. w[i] holds SS_i on entry (> 0) and is
 * overwritten. The sizes of the rationals grow with k (the weights' denominators
 * multiply): about 10 ms at k = 64, 2 s at k = 1000. */
static void welch_exact(const avow_dx_group *groups, size_t k, mpq_t *means, mpq_t *w,
                        double *f, double *df2)
{
    mpq_t wsum, yt, q, num, lam, one, kk, nu;
    mpq_inits(wsum, yt, q, num, lam, one, kk, nu, NULL);
    mpq_set_ui(one, 1, 1);
    mpz_t t;
    mpz_init(t);
    for (size_t i = 0; i < k; i++) {
        /* w_i = n_i / s_i^2 = n_i (n_i - 1) / SS_i */
        uint64_t n = groups[i].n;
        mpq_inv(w[i], w[i]);
        mpz_set_u64(t, n);
        mpz_mul(mpq_numref(w[i]), mpq_numref(w[i]), t);
        mpz_set_u64(t, n - 1);
        mpz_mul(mpq_numref(w[i]), mpq_numref(w[i]), t);
        mpq_canonicalize(w[i]);
        mpq_add(wsum, wsum, w[i]);
        mpq_mul(q, w[i], means[i]);
        mpq_add(yt, yt, q);
    }
    mpz_clear(t);
    mpq_div(yt, yt, wsum);
    for (size_t i = 0; i < k; i++) {
        /* num += w_i (ybar_i - yt)^2 */
        mpq_sub(q, means[i], yt);
        mpq_mul(q, q, q);
        mpq_mul(q, q, w[i]);
        mpq_add(num, num, q);
        /* lam += (1 - w_i / W)^2 / (n_i - 1) */
        mpq_div(q, w[i], wsum);
        mpq_sub(q, one, q);
        mpq_mul(q, q, q);
        mpq_set_u64(nu, groups[i].n - 1);
        mpq_div(q, q, nu);
        mpq_add(lam, lam, q);
    }
    /* F = [num / (k - 1)] / [1 + 2 (k - 2) lam / (k^2 - 1)], df2 = (k^2 - 1) / (3 lam) */
    uint64_t k1 = (uint64_t)k - 1;
    mpq_set_u64(q, k1);
    mpq_div(num, num, q);
    mpq_set_u64(kk, k1);
    mpz_mul_ui(mpq_numref(kk), mpq_numref(kk), (unsigned long)(k + 1));  /* k^2 - 1 */
    mpq_set_u64(q, 2 * ((uint64_t)k - 2));
    mpq_mul(q, q, lam);
    mpq_div(q, q, kk);
    mpq_add(q, q, one);
    mpq_div(num, num, q);                   /* F */
    mpq_set_ui(q, 3, 1);
    mpq_mul(q, q, lam);
    mpq_div(q, kk, q);                      /* df2 */
    *f = dec_mpq_get_d(num);
    *df2 = dec_mpq_get_d(q);
    mpq_clears(wsum, yt, q, num, lam, one, kk, nu, NULL);
}

/* Welch's F* and df2 in binary64 from the exact group means and sums of squares, for
 * many groups. Each weight w_i = n_i (n_i - 1)/SS_i is correctly rounded; the deviations
 * ybar_i - c from a binary64 approximation c of the weighted mean are formed exactly and
 * rounded once, and the weighted sum of squares is taken about their own weighted mean
 * (a small correction), so the numerator is a sum of non-negative terms; 1 - w_i/W is
 * (sum of the other weights)/W from prefix and suffix sums, never a difference. All
 * sums are compensated (Neumaier). w[i] holds SS_i on entry. scratch: 3 k doubles. */
static void welch_double(const avow_dx_group *groups, size_t k, mpq_t *means, mpq_t *w,
                         double *scratch, double *f, double *df2)
{
    double *wd = scratch, *dev = scratch + k, *suf = scratch + 2 * k;
    mpq_t q, c;
    mpq_inits(q, c, NULL);
    mpz_t t;
    mpz_init(t);
    ksum wsum = {0, 0}, wy = {0, 0};
    for (size_t i = 0; i < k; i++) {
        uint64_t n = groups[i].n;
        mpq_inv(q, w[i]);
        mpz_set_u64(t, n);
        mpz_mul(mpq_numref(q), mpq_numref(q), t);
        mpz_set_u64(t, n - 1);
        mpz_mul(mpq_numref(q), mpq_numref(q), t);
        mpq_canonicalize(q);
        wd[i] = dec_mpq_get_d(q);
        ksum_add(&wsum, wd[i]);
        ksum_add(&wy, wd[i] * dec_mpq_get_d(means[i]));
    }
    mpz_clear(t);
    double wtot = ksum_get(&wsum);
    mpq_set_d(c, ksum_get(&wy) / wtot);
    ksum wd1 = {0, 0};
    for (size_t i = 0; i < k; i++) {
        mpq_sub(q, means[i], c);
        dev[i] = dec_mpq_get_d(q);
        ksum_add(&wd1, wd[i] * dev[i]);
    }
    double delta = ksum_get(&wd1) / wtot;
    ksum num = {0, 0}, lam = {0, 0};
    double acc = 0.0;
    for (size_t i = k; i-- > 0;) {
        suf[i] = acc;                       /* sum of w_j, j > i */
        acc += wd[i];
    }
    double pre = 0.0;                       /* sum of w_j, j < i */
    for (size_t i = 0; i < k; i++) {
        double d = dev[i] - delta;
        ksum_add(&num, wd[i] * d * d);
        double other = (pre + suf[i]) / wtot;
        ksum_add(&lam, other * other / (double)(groups[i].n - 1));
        pre += wd[i];
    }
    double kk = (double)(k - 1) * (double)(k + 1), l = ksum_get(&lam);
    *f = ksum_get(&num) / (double)(k - 1) / (1.0 + 2.0 * (double)(k - 2) * l / kk);
    *df2 = kk / (3.0 * l);
    mpq_clears(q, c, NULL);
}

/* path: 0 by k, 1 exact, 2 binary64 */
static int welch(const avow_dx_group *groups, size_t k, int path, avow_dx_ftest *out)
{
    gsl_quiet();
    uint64_t n_total;
    if (!out) return AVOW_EDOM;
    int st = check_variance_groups(groups, k, &n_total);
    if (st) return st;
    mpq_t *means = mpq_array(k);
    mpq_t *ss = mpq_array(k);
    int exact = path == 1 || (path == 0 && k <= AVOW_DX_WELCH_EXACT_K);
    double *scratch = exact ? NULL : avow_malloc(3 * k * sizeof(double));
    if (!means || !ss || (!exact && !scratch)) {
        mpq_array_free(means, k);
        mpq_array_free(ss, k);
        avow_free(scratch);
        return AVOW_ENOMEM;
    }
    st = group_moments(groups, k, means, ss);
    for (size_t i = 0; i < k && st == AVOW_OK; i++)
        if (mpq_sgn(ss[i]) == 0) st = AVOW_DX_EZEROVAR;
    if (st == AVOW_OK) {
        avow_dx_ftest r;
        if (exact) welch_exact(groups, k, means, ss, &r.stat, &r.df2);
        else welch_double(groups, k, means, ss, scratch, &r.stat, &r.df2);
        r.df1 = (double)(k - 1);
        r.p = dist_f_q(r.stat, r.df1, r.df2);
        *out = r;
    }
    avow_free(scratch);
    mpq_array_free(means, k);
    mpq_array_free(ss, k);
    return st;
}

int dx_welch(const avow_dx_group *groups, size_t k, avow_dx_ftest *out)
{
    return welch(groups, k, 0, out);
}

int dx_welch_exact(const avow_dx_group *groups, size_t k, avow_dx_ftest *out)
{
    return welch(groups, k, 1, out);
}

int dx_welch_double(const avow_dx_group *groups, size_t k, avow_dx_ftest *out)
{
    return welch(groups, k, 2, out);
}

/* ------------------------------------------------------------------ Kruskal-Wallis */

typedef struct kw_item {
    avow_dec v;
    size_t g;
} kw_item;

static int cmp_kw(const void *a, const void *b)
{
    return dec_cmp(((const kw_item *)a)->v, ((const kw_item *)b)->v);
}

int dx_kruskal(const avow_dx_group *groups, size_t k, avow_dx_kw *out)
{
    gsl_quiet();
    uint64_t n_total;
    if (!out) return AVOW_EDOM;
    int st = check_groups(groups, k, &n_total, NULL);
    if (st) return st;
    if (n_total >= (UINT64_C(1) << 32) || n_total > SIZE_MAX / sizeof(kw_item))
        return AVOW_EOVERFLOW;
    size_t N = (size_t)n_total;
    kw_item *it = avow_malloc(N * sizeof *it);
    u128 *r2 = avow_calloc(k, sizeof *r2);     /* twice the rank sum of each group */
    if (!it || !r2) {
        avow_free(it);
        avow_free(r2);
        return AVOW_ENOMEM;
    }
    size_t m = 0;
    for (size_t i = 0; i < k; i++)
        for (size_t j = 0; j < groups[i].n; j++) {
            it[m].v = groups[i].values[j];
            it[m].g = i;
            m++;
        }
    dx_scale sc;
    st = scale_find(groups, k, &sc);
    if (st) { avow_free(it); avow_free(r2); return st; }
    int sorted = 0;
    if (sc.fast && N > 64) {
        /* Every value is an exact integer number of units 10^emin below 10^18: sort those
         * integers by a stable least-significant-digit radix sort, bytewise (Seward's
         * counting passes; Knuth, TAOCP vol. 3, 5.2.5), much faster than comparisons. */
        uint64_t *key = avow_malloc(2 * N * sizeof *key);
        uint32_t *grp = avow_malloc(2 * N * sizeof *grp);
        if (key && grp) {
            for (size_t j = 0; j < N; j++) {
                key[j] = (uint64_t)scale_i64(it[j].v, sc.emin) ^ (UINT64_C(1) << 63);
                grp[j] = (uint32_t)j;
            }
            uint64_t *ka = key, *kb = key + N;
            uint32_t *ga = grp, *gb = grp + N;
            for (int byte = 0; byte < 8; byte++) {
                size_t count[257] = {0};
                int sh = 8 * byte;
                for (size_t j = 0; j < N; j++) count[((ka[j] >> sh) & 255) + 1]++;
                if (count[((ka[0] >> sh) & 255) + 1] == N) continue;   /* one value of this byte */
                for (int b = 0; b < 256; b++) count[b + 1] += count[b];
                for (size_t j = 0; j < N; j++) {
                    size_t at = count[(ka[j] >> sh) & 255]++;
                    kb[at] = ka[j];
                    gb[at] = ga[j];
                }
                uint64_t *tk = ka; ka = kb; kb = tk;
                uint32_t *tg = ga; ga = gb; gb = tg;
            }
            kw_item *sorted_it = avow_malloc(N * sizeof *sorted_it);
            if (sorted_it) {
                for (size_t j = 0; j < N; j++) sorted_it[j] = it[ga[j]];
                avow_free(it);
                it = sorted_it;
                sorted = 1;
            }
        }
        avow_free(key);
        avow_free(grp);
    }
    if (!sorted) qsort(it, N, sizeof *it, cmp_kw);
    u128 ties = 0;                              /* sum t^3 - t */
    for (size_t p = 0; p < N;) {
        size_t q = p + 1;
        while (q < N && dec_cmp(it[q].v, it[p].v) == 0) q++;
        /* positions p..q-1 share the midrank (p + 1 + q) / 2 */
        u128 twice = (u128)p + 1 + q;
        for (size_t j = p; j < q; j++) r2[it[j].g] += twice;
        u128 t = q - p;
        ties += t * t * t - t;
        p = q;
    }
    avow_free(it);
    u128 nn = N;
    u128 total = nn * nn * nn - nn;
    if (ties == total) {
        avow_free(r2);
        return AVOW_DX_EALLTIED;
    }
    mpq_t s, q, h, f;
    mpq_inits(s, q, h, f, NULL);
    /* sum R_i^2 / n_i = sum r2_i^2 / (4 n_i) */
    for (size_t i = 0; i < k; i++) {
        mpz_set_u128(mpq_numref(q), r2[i]);
        mpz_mul(mpq_numref(q), mpq_numref(q), mpq_numref(q));
        mpz_set_u64(mpq_denref(q), 4 * (uint64_t)groups[i].n);
        mpq_canonicalize(q);
        mpq_add(s, s, q);
    }
    avow_free(r2);
    /* H = 12 s / (N (N + 1)) - 3 (N + 1) */
    mpz_set_u128(mpq_numref(q), 12);
    mpz_set_u128(mpq_denref(q), nn * (nn + 1));
    mpq_canonicalize(q);
    mpq_mul(h, s, q);
    mpq_set_u64(q, 3 * ((uint64_t)N + 1));
    mpq_sub(h, h, q);
    /* tie factor 1 - ties / (N^3 - N) */
    mpz_set_u128(mpq_numref(f), total - ties);
    mpz_set_u128(mpq_denref(f), total);
    mpq_canonicalize(f);
    avow_dx_kw r;
    r.h_uncorrected = dec_mpq_get_d(h);
    r.tie_factor = dec_mpq_get_d(f);
    mpq_div(h, h, f);
    r.test.stat = dec_mpq_get_d(h);
    r.test.df = (double)(k - 1);
    r.test.p = gsl_cdf_chisq_Q(r.test.stat, r.test.df);
    *out = r;
    mpq_clears(s, q, h, f, NULL);
    return AVOW_OK;
}

/* ------------------------------------------------------------------ Shapiro-Wilk */

/* c[0] + c[1] x + ... + c[n-1] x^(n-1). */
static double poly(const double *c, int n, double x)
{
    double r = c[n - 1];
    for (int i = n - 2; i >= 0; i--) r = r * x + c[i];
    return r;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Royston's coefficients a[0..n/2) for the largest values (a[0] for x_(n)), positive;
 * Royston (1992) / AS R94 (1995), methods.md section 5 steps 1-4. */
static void sw_coefficients(size_t n, double *a)
{
    /* polynomials in u = n^-1/2 for a_n and a_(n-1) (AS R94 C1, C2) */
    static const double c1[6] = { 0.0, 0.221157, -0.147981, -2.071190, 4.434685, -2.706056 };
    static const double c2[6] = { 0.0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633 };
    size_t n2 = n / 2;
    if (n == 3) {
        a[0] = sqrt(0.5);
        return;
    }
    double an25 = (double)n + 0.25, summ2 = 0.0;
    /* a[i] temporarily holds m_(n-i) = -Phi^-1((i + 1 - 3/8)/(n + 1/4)) > 0 */
    for (size_t i = 0; i < n2; i++) {
        a[i] = -gsl_cdf_ugaussian_Pinv(((double)(i + 1) - 0.375) / an25);
        summ2 += a[i] * a[i];
    }
    summ2 *= 2.0;
    double ssumm2 = sqrt(summ2), rsn = 1.0 / sqrt((double)n);
    double a1 = poly(c1, 6, rsn) + a[0] / ssumm2, fac;
    size_t i1;
    if (n > 5) {
        double a2 = poly(c2, 6, rsn) + a[1] / ssumm2;
        fac = sqrt((summ2 - 2.0 * a[0] * a[0] - 2.0 * a[1] * a[1]) /
                   (1.0 - 2.0 * a1 * a1 - 2.0 * a2 * a2));
        a[1] = a2;
        i1 = 2;
    } else {
        fac = sqrt((summ2 - 2.0 * a[0] * a[0]) / (1.0 - 2.0 * a1 * a1));
        i1 = 1;
    }
    a[0] = a1;
    for (size_t i = i1; i < n2; i++) a[i] /= fac;
}

int dx_shapiro(const double *x, size_t n, avow_dx_sw *out)
{
    gsl_quiet();
    if (!x || !out) return AVOW_EDOM;
    for (size_t i = 0; i < n; i++)
        if (!isfinite(x[i])) return AVOW_EDOM;
    if (n < 3 || n > 5000) return AVOW_DX_ENRANGE;
    double *xs = avow_malloc(n * sizeof *xs);
    double *a = avow_malloc((n / 2) * sizeof *a);
    if (!xs || !a) {
        avow_free(xs);
        avow_free(a);
        return AVOW_ENOMEM;
    }
    memcpy(xs, x, n * sizeof *xs);
    qsort(xs, n, sizeof *xs, cmp_double);
    if (xs[0] == xs[n - 1]) {
        avow_free(xs);
        avow_free(a);
        return AVOW_DX_EZERORANGE;
    }
    sw_coefficients(n, a);
    /* centre (mean refined by one correction pass) */
    double mean = 0.0;
    for (size_t i = 0; i < n; i++) mean += xs[i];
    mean /= (double)n;
    double corr = 0.0;
    for (size_t i = 0; i < n; i++) corr += xs[i] - mean;
    mean += corr / (double)n;
    /* coefficient of x_(i) (ascending): -a[i] for i < n/2, +a[n-1-i] for i >= n - n/2 */
    size_t n2 = n / 2;
    double ssx = 0.0, sax = 0.0, ssa = 0.0;
    for (size_t i = 0; i < n; i++) {
        double xc = xs[i] - mean;
        double c = i < n2 ? -a[i] : (i >= n - n2 ? a[n - 1 - i] : 0.0);
        ssx += xc * xc;
        sax += c * xc;
        ssa += c * c;
    }
    /* W = sax^2 / (ssa ssx); 1 - W = sum (xc - b c)^2 / ssx with b = sax / ssa */
    double b = sax / ssa, res = 0.0;
    for (size_t i = 0; i < n; i++) {
        double xc = xs[i] - mean;
        double c = i < n2 ? -a[i] : (i >= n - n2 ? a[n - 1 - i] : 0.0);
        double e = xc - b * c;
        res += e * e;
    }
    avow_free(xs);
    avow_free(a);
    double w = sax * sax / (ssa * ssx);
    double w1 = res / ssx;                      /* 1 - W */
    if (w > 1.0) w = 1.0;
    double p;
    if (n == 3) {
        /* exact (methods.md section 5 step 5) */
        p = 6.0 / DX_PI * (asin(sqrt(w)) - DX_PI / 3.0);
        if (p < 0.0) p = 0.0;
        if (p > 1.0) p = 1.0;
    } else if (!(w1 > 0.0)) {
        p = 1.0;                                /* 1 - W = 0: z = -inf */
    } else {
        double y = log(w1), z;
        double an = (double)n;
        if (n <= 11) {
            static const double g[2] = { -2.273, 0.459 };
            static const double c3[4] = { 0.5440, -0.39978, 0.025054, -6.714e-4 };
            static const double c4[4] = { 1.3822, -0.77857, 0.062767, -0.0020322 };
            double gamma = poly(g, 2, an);
            if (y >= gamma) {
                z = INFINITY;                   /* beyond the approximation: its limit */
            } else {
                double m = poly(c3, 4, an), s = exp(poly(c4, 4, an));
                z = (-log(gamma - y) - m) / s;
            }
        } else {
            static const double c5[4] = { -1.5861, -0.31082, -0.083751, 0.0038915 };
            static const double c6[3] = { -0.4803, -0.082676, 0.0030302 };
            double ln = log(an);
            double m = poly(c5, 4, ln), s = exp(poly(c6, 3, ln));
            z = (y - m) / s;
        }
        p = isinf(z) ? 0.0 : gsl_cdf_ugaussian_Q(z);
    }
    out->w = w;
    out->p = p;
    return AVOW_OK;
}

/* ------------------------------------------------------------------ moments */


int dx_moments(const double *x, size_t n, avow_dx_moments *out)
{
    if (!x || !out || n < 2) return AVOW_EDOM;
    ksum s = {0, 0};
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i])) return AVOW_EDOM;
        ksum_add(&s, x[i]);
    }
    double dn = (double)n;
    double mean = ksum_get(&s) / dn;
    ksum c = {0, 0};
    for (size_t i = 0; i < n; i++) ksum_add(&c, x[i] - mean);
    mean += ksum_get(&c) / dn;
    ksum s2 = {0, 0}, s3 = {0, 0}, s4 = {0, 0};
    int varies = 0;
    for (size_t i = 0; i < n; i++) {
        double d = x[i] - mean, d2 = d * d;
        if (x[i] != x[0]) varies = 1;
        ksum_add(&s2, d2);
        ksum_add(&s3, d2 * d);
        ksum_add(&s4, d2 * d2);
    }
    double m2 = ksum_get(&s2) / dn;
    if (!varies || !(m2 > 0.0)) return AVOW_DX_EZERORANGE;
    double m3 = ksum_get(&s3) / dn, m4 = ksum_get(&s4) / dn;
    out->skewness = m3 / (m2 * sqrt(m2));
    out->kurtosis = m4 / (m2 * m2) - 3.0;
    return AVOW_OK;
}

/* ------------------------------------------------------------------ effect sizes */

int dx_effect_sizes(double ss_effect, double df_effect, double ss_error, double df_error,
                    double ss_total, avow_dx_effect *out)
{
    if (!out || !isfinite(ss_effect) || !isfinite(df_effect) || !isfinite(ss_error) ||
        !isfinite(df_error) || !isfinite(ss_total) || !(ss_effect >= 0) ||
        !(ss_error > 0) || !(ss_total > 0) || !(df_effect > 0) || !(df_error > 0))
        return AVOW_EDOM;
    double mse = ss_error / df_error;
    avow_dx_effect r;
    r.eta2 = ss_effect / ss_total;
    r.partial_eta2 = ss_effect / (ss_effect + ss_error);
    r.omega2 = (ss_effect - df_effect * mse) / (ss_total + mse);
    r.cohen_f = sqrt(ss_effect / ss_error);
    *out = r;
    return AVOW_OK;
}

int dx_effect_sizes_exact(const mpq_t ss_effect, uint64_t df_effect, const mpq_t ss_error,
                          uint64_t df_error, const mpq_t ss_total, avow_dx_effect *out)
{
    if (!out || mpq_sgn(ss_effect) < 0 || mpq_sgn(ss_error) <= 0 || mpq_sgn(ss_total) <= 0 ||
        df_effect == 0 || df_error == 0)
        return AVOW_EDOM;
    mpq_t mse, q, d;
    mpq_inits(mse, q, d, NULL);
    avow_dx_effect r;
    mpq_set_u64(d, df_error);
    mpq_div(mse, ss_error, d);
    mpq_div(q, ss_effect, ss_total);
    r.eta2 = dec_mpq_get_d(q);
    mpq_add(d, ss_effect, ss_error);
    mpq_div(q, ss_effect, d);
    r.partial_eta2 = dec_mpq_get_d(q);
    mpq_set_u64(q, df_effect);
    mpq_mul(q, q, mse);
    mpq_sub(q, ss_effect, q);
    mpq_add(d, ss_total, mse);
    mpq_div(q, q, d);
    r.omega2 = dec_mpq_get_d(q);
    mpq_div(q, ss_effect, ss_error);
    r.cohen_f = sqrt(dec_mpq_get_d(q));
    *out = r;
    mpq_clears(mse, q, d, NULL);
    return AVOW_OK;
}

/* ------------------------------------------------------------------ studentized */

int dx_studentized(double e, double n_cell, double mse, double dfe, double *r, double *t)
{
    if (!r || !t || !isfinite(e) || !isfinite(n_cell) || !isfinite(mse) ||
        !isfinite(dfe) || !(n_cell >= 2) || !(mse > 0) || !(dfe > 0))
        return AVOW_EDOM;
    /* 1 - h = (n - 1) / n */
    double ri = e / sqrt(mse * ((n_cell - 1.0) / n_cell));
    *r = ri;
    double rest = dfe - ri * ri;
    if (!(dfe > 1) || !(rest > 0)) {
        *t = NAN;
        return AVOW_DX_ENODF;
    }
    *t = ri * sqrt((dfe - 1.0) / rest);
    return AVOW_OK;
}
