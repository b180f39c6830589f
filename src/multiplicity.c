/* multiplicity.c: multiple-testing adjustments of p-values.
 *
 * References:
 *   Holm, S. (1979). A simple sequentially rejective multiple test procedure.
 *     Scand. J. Statist. 6:65-70.
 *   Sidak (Šidák), Z. (1967). Rectangular confidence regions for the means of multivariate
 *     normal distributions. JASA 62:626-633.
 *   Benjamini, Y. & Hochberg, Y. (1995). Controlling the false discovery rate.
 *     J. R. Statist. Soc. B 57:289-300.
 *   Scheffe, H. (1953). A method for judging all contrasts in the analysis of
 *     variance. Biometrika 40:87-104. (Applied from F in the contrast module.) */
#include "avow/multiplicity.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "avow/util.h"

/* Names indexed by avow_adjust. */
static const char *const NAMES[] = {"none", "bonferroni", "holm", "sidak", "scheffe", "fdr"};
#define NMETHODS (sizeof NAMES / sizeof NAMES[0])

/* A value of the enum. */
static int method_ok(avow_adjust method)
{
    return (unsigned)method < NMETHODS;
}

const char *mult_name(avow_adjust method)
{
    return method_ok(method) ? NAMES[method] : NULL;
}

int mult_from_name(const char *s, size_t len, avow_adjust *out)
{
    if (!s || !out) return AVOW_EDOM;
    for (size_t i = 0; i < NMETHODS; i++) {
        if (strlen(NAMES[i]) == len && memcmp(NAMES[i], s, len) == 0) {
            *out = (avow_adjust)i;
            return AVOW_OK;
        }
    }
    return AVOW_EDOM;
}

/* One p-value with its position, for ranking. */
typedef struct ranked {
    double p;       /* the p-value */
    size_t i;       /* its index in the input */
} ranked;

/* Ascending p; ties by ascending index, so the order is total and deterministic. */
static int ranked_cmp(const void *a, const void *b)
{
    const ranked *x = a, *y = b;
    if (x->p < y->p) return -1;
    if (x->p > y->p) return 1;
    return (x->i > y->i) - (x->i < y->i);
}

/* The p-values sorted (ties by index) in a new buffer, or NULL when out of memory. */
static ranked *rank_p(const double *p, size_t m)
{
    if (m > SIZE_MAX / sizeof(ranked)) return NULL;
    ranked *r = avow_malloc(m * sizeof(ranked));
    if (!r) return NULL;
    for (size_t i = 0; i < m; i++) { r[i].p = p[i]; r[i].i = i; }
    qsort(r, m, sizeof(ranked), ranked_cmp);
    return r;
}

/* min(1, v) */
static double cap1(double v) { return v > 1 ? 1 : v; }

int mult_adjust_p(avow_adjust method, const double *p, size_t m, double *p_adj)
{
    if (!method_ok(method) || method == ADJ_SCHEFFE) return AVOW_EDOM;
    if (m == 0) return AVOW_OK;
    if (!p || !p_adj) return AVOW_EDOM;
    for (size_t i = 0; i < m; i++)
        if (!(p[i] >= 0 && p[i] <= 1)) return AVOW_EDOM;   /* also rejects NaN */

    double md = (double)m;
    switch (method) {
    case ADJ_NONE:
        if (p_adj != p) memmove(p_adj, p, m * sizeof(double));
        return AVOW_OK;
    case ADJ_BONFERRONI:
        for (size_t i = 0; i < m; i++) p_adj[i] = cap1(md * p[i]);
        return AVOW_OK;
    case ADJ_SIDAK:
        /* 1 - (1 - p)^m without cancellation for tiny p (Sidak 1967). */
        for (size_t i = 0; i < m; i++) p_adj[i] = cap1(-expm1(md * log1p(-p[i])));
        return AVOW_OK;
    case ADJ_HOLM: {
        /* Step-down (Holm 1979): running maximum of (m - r + 1) p_(r), r = 1..m. */
        ranked *r = rank_p(p, m);
        if (!r) return AVOW_ENOMEM;
        double run = 0;
        for (size_t k = 0; k < m; k++) {
            double v = cap1((double)(m - k) * r[k].p);   /* rank k + 1 */
            if (v > run) run = v;
            p_adj[r[k].i] = run;
        }
        avow_free(r);
        return AVOW_OK;
    }
    case ADJ_FDR: {
        /* Step-up (Benjamini & Hochberg 1995): running minimum of m p_(r) / r from the
         * largest rank down. */
        ranked *r = rank_p(p, m);
        if (!r) return AVOW_ENOMEM;
        double run = 1;
        for (size_t k = m; k-- > 0;) {
            /* m p / m is p exactly; computing it would risk an ulp. */
            double v = k + 1 == m ? r[k].p : cap1(md * r[k].p / (double)(k + 1));
            if (v < run) run = v;
            p_adj[r[k].i] = run;
        }
        avow_free(r);
        return AVOW_OK;
    }
    case ADJ_SCHEFFE:
        break;
    }
    return AVOW_EDOM;
}

double mult_sidak_alpha(double alpha, size_t m)
{
    if (!(alpha >= 0 && alpha <= 1) || m == 0) return NAN;
    /* 1 - (1 - alpha)^(1/m) (Sidak 1967), without cancellation. */
    return -expm1(log1p(-alpha) / (double)m);
}

int mult_reject(avow_adjust method, const double *p_adj, size_t m, double alpha,
                int *reject)
{
    if (!method_ok(method) || !(alpha > 0 && alpha < 1)) return AVOW_EDOM;
    if (m == 0) return AVOW_OK;
    if (!p_adj || !reject) return AVOW_EDOM;
    for (size_t i = 0; i < m; i++)
        if (!(p_adj[i] >= 0 && p_adj[i] <= 1)) return AVOW_EDOM;
    for (size_t i = 0; i < m; i++) reject[i] = p_adj[i] <= alpha;
    return AVOW_OK;
}

const char *mult_words(avow_adjust method)
{
    switch (method) {
    case ADJ_NONE: return "no adjustment";
    case ADJ_BONFERRONI: return "Bonferroni";
    case ADJ_HOLM: return "Holm step-down";
    case ADJ_SIDAK: return "Sidak";
    case ADJ_SCHEFFE: return "Scheffe";
    case ADJ_FDR: return "Benjamini-Hochberg (false discovery rate)";
    }
    return "?";
}
