/* diagnose.c: the assumption checks of `avow run` (analysis.h), built on the numerics of
 * diagnostics.c. Residuals are exact (the decimal value minus the exact fitted mean)
 * and rounded once. */
#include "analysis.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>

#include "avow/diagnostics.h"

/* |t| beyond which an observation is listed as unusual: 3, a common screening limit for
 * externally studentized residuals (common practice, no source). */
#define UNUSUAL_LIMIT 3.0

/* Groups of values by treatment cell (pooled over blocks); empty cells are left out. */
typedef struct cell_groups {
    avow_dec *values;       /* grouped copies */
    avow_dx_group *groups;  /* the non-empty cells */
    size_t k;
} cell_groups;

static void groups_free(cell_groups *g)
{
    avow_free(g->values);
    avow_free(g->groups);
}

/* Group the observations (or, when resid is not NULL, their residuals as 17-digit
 * decimals) by treatment cell. */
static int group_by_cell(const avow_plan *plan, const avow_data *data, const double *resid, cell_groups *g)
{
    size_t T = plan->ncells, N = data->nobs;
    memset(g, 0, sizeof *g);
    size_t *count = avow_calloc(T + 1, sizeof *count);
    g->values = avow_calloc(N ? N : 1, sizeof *g->values);
    g->groups = avow_calloc(T, sizeof *g->groups);
    if (!count || !g->values || !g->groups) { avow_free(count); groups_free(g); return AVOW_ENOMEM; }
    for (size_t i = 0; i < N; i++) count[data->obs[i].cell % T + 1]++;
    for (size_t t = 0; t < T; t++) count[t + 1] += count[t];   /* offsets */
    size_t *fill = avow_calloc(T, sizeof *fill);
    if (!fill) { avow_free(count); groups_free(g); return AVOW_ENOMEM; }
    for (size_t i = 0; i < N; i++) {
        size_t t = data->obs[i].cell % T;
        avow_dec v = data->obs[i].value;
        if (resid && dec_from_double(resid[i], &v) != AVOW_OK) v = (avow_dec){0, 0};
        g->values[count[t] + fill[t]++] = v;
    }
    for (size_t t = 0; t < T; t++)
        if (fill[t]) g->groups[g->k++] = (avow_dx_group){&g->values[count[t]], fill[t]};
    avow_free(fill);
    avow_free(count);
    return AVOW_OK;
}

/* Residuals e_i = y_i - fitted(cell of i), each the exact difference rounded (to within a
 * few units in the last place). Fast path per cell: with S the most decimals of the
 * cell's values (at most 20, and 10^S exact in binary64), y 10^S is an integer and
 * fitted 10^S = F + f, F an integer and 0 <= f < 1, so e = ((y 10^S - F) - f) / 10^S with
 * an exact integer difference and three roundings. Otherwise exact rationals. */
static int residuals(const avow_data *data, mpq_t *fitted, double *e)
{
    size_t N = data->nobs, C = data->ncells * data->nblocks;
    int32_t *minexp = avow_calloc(C ? C : 1, sizeof *minexp);
    avow_i128 *Fi = avow_calloc(C ? C : 1, sizeof *Fi);
    double *Ff = avow_calloc(C ? C : 1, sizeof *Ff);
    signed char *fast = avow_calloc(C ? C : 1, 1);
    if (!minexp || !Fi || !Ff || !fast) {
        avow_free(minexp); avow_free(Fi); avow_free(Ff); avow_free(fast);
        return AVOW_ENOMEM;
    }
    for (size_t c = 0; c < C; c++) minexp[c] = 0;
    for (size_t i = 0; i < N; i++) {
        const avow_obs *o = &data->obs[i];
        if (o->value.sig && o->value.exp < minexp[o->cell]) minexp[o->cell] = o->value.exp;
    }
    mpq_t q, y, r;
    mpz_t fl, lim;
    mpq_init(q); mpq_init(y); mpq_init(r);
    mpz_init(fl); mpz_init(lim);
    mpz_ui_pow_ui(lim, 2, 100);
    for (size_t c = 0; c < C; c++) {
        int32_t S = -minexp[c];
        if (S > 20) continue;
        mpz_ui_pow_ui(mpq_numref(q), 10, (unsigned long)S);
        mpz_set_ui(mpq_denref(q), 1);
        mpq_mul(q, q, fitted[c]);                   /* fitted 10^S */
        mpz_fdiv_q(fl, mpq_numref(q), mpq_denref(q));
        if (mpz_cmpabs(fl, lim) >= 0) continue;
        mpq_set_z(r, fl);
        mpq_sub(r, q, r);                           /* the fraction, in [0, 1) */
        Ff[c] = mpq_get_d(r);
        /* F as a 128-bit integer (|F| < 2^100) */
        int neg = mpz_sgn(fl) < 0;
        mpz_abs(fl, fl);
        avow_i128 v = 0;
        for (int w = 0; w < 4; w++) {
            unsigned long part = mpz_getlimbn(fl, 0) & 0xffffffffUL;
            v |= (avow_i128)part << (32 * w);
            mpz_fdiv_q_2exp(fl, fl, 32);
        }
        Fi[c] = neg ? -v : v;
        fast[c] = 1;
    }
    static const double P10[21] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
                                   1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20};
    for (size_t i = 0; i < N; i++) {
        const avow_obs *o = &data->obs[i];
        size_t c = o->cell;
        int32_t S = -minexp[c], k = o->value.exp + S;     /* 0 <= k */
        if (fast[c] && k <= 20) {
            avow_i128 x = (avow_i128)o->value.sig;
            avow_i128 p = 1;
            for (int32_t j = 0; j < k; j++) p *= 10;
            x *= p;                                     /* |x| < 10^38 */
            e[i] = ((double)(x - Fi[c]) - Ff[c]) / P10[S];
            continue;
        }
        dec_to_mpq(o->value, y);
        mpq_sub(r, y, fitted[c]);
        e[i] = dec_mpq_get_d(r);
    }
    mpq_clear(q); mpq_clear(y); mpq_clear(r);
    mpz_clear(fl); mpz_clear(lim);
    avow_free(minexp); avow_free(Fi); avow_free(Ff); avow_free(fast);
    return AVOW_OK;
}

/* Order of residuals for the normal scores: by value, ties in file order. */
typedef struct ranked { double e; size_t i; } ranked;
static int ranked_cmp(const void *pa, const void *pb)
{
    const ranked *a = pa, *b = pb;
    if (a->e < b->e) return -1;
    if (a->e > b->e) return 1;
    return a->i < b->i ? -1 : a->i > b->i;
}

/* Each observation's fitted value, residual and normal score (res->checks.resid). */
static int keep_residuals(const avow_plan *plan, const avow_data *data, mpq_t *fitted, const double *e,
                          avow_assumptions *A)
{
    size_t N = data->nobs, T = plan->ncells;
    A->resid = avow_calloc(N ? N : 1, sizeof *A->resid);
    ranked *order = avow_calloc(N ? N : 1, sizeof *order);
    if (!A->resid || !order) { avow_free(order); return AVOW_ENOMEM; }
    for (size_t i = 0; i < N; i++) {
        avow_residual *r = &A->resid[i];
        size_t c = data->obs[i].cell;
        r->line = data->obs[i].line;
        r->cell = c % T;
        r->block = c / T;
        r->fitted = dec_mpq_get_d(fitted[c]);
        r->residual = e[i];
        order[i] = (ranked){e[i], i};
    }
    qsort(order, N, sizeof *order, ranked_cmp);
    /* Blom (1958): the expected normal order statistic of rank r among N is close to
     * PhiInv((r - 3/8) / (N + 1/4)). */
    for (size_t r = 0; r < N; r++)
        A->resid[order[r].i].normal_score = gsl_cdf_ugaussian_Pinv(((double)(r + 1) - 0.375) / ((double)N + 0.25));
    avow_free(order);
    A->nresiduals = N;
    return AVOW_OK;
}

int eval_diagnose(const avow_plan *plan, const avow_data *data, mpq_t *fitted, const double *leverage,
                  avow_results *res)
{
    avow_assumptions *A = &res->checks;
    size_t N = data->nobs, T = plan->ncells;
    A->computed = 1;
    A->on_residuals = res->fit == FIT_GENERAL;
    A->unusual_limit = UNUSUAL_LIMIT;
    double dfe = res->anova[res->nanova - 2].df, mse = res->mse;
    double *e = avow_calloc(N ? N : 1, sizeof *e);
    A->unusual = avow_calloc(AVOW_MAX_LISTED_UNUSUAL, sizeof *A->unusual);
    if (!e || !A->unusual) { avow_free(e); return AVOW_ENOMEM; }
    int rc = residuals(data, fitted, e);
    if (rc != AVOW_OK) { avow_free(e); return rc; }
    if (data->residuals) {
        int krc = keep_residuals(plan, data, fitted, e, A);
        if (krc != AVOW_OK) { avow_free(e); return krc; }
    }

    /* Equal spread between the treatment cells. */
    cell_groups g;
    rc = group_by_cell(plan, data, A->on_residuals ? e : NULL, &g);
    if (rc != AVOW_OK) { avow_free(e); return rc; }
    A->ngroups = g.k;
    A->levene_rc = dx_levene(g.groups, g.k, AVOW_DX_MEAN, &A->levene);
    A->bf_rc = dx_levene(g.groups, g.k, AVOW_DX_MEDIAN, &A->bf);
    A->bartlett_rc = dx_bartlett(g.groups, g.k, &A->bartlett);
    groups_free(&g);

    /* Normality of the residuals. */
    A->nresid = N;
    A->shapiro_rc = dx_shapiro(e, N, &A->shapiro);
    A->moments_rc = dx_moments(e, N, &A->moments);

    /* Unusual observations. */
    A->unusual_rc = AVOW_OK;
    for (size_t i = 0; i < N; i++) {
        size_t c = data->obs[i].cell;
        double h = leverage[c];
        if (!(h > 0 && h < 1)) continue;    /* a lone observation in its cell: residual 0 */
        double rs, ts;
        int src = dx_studentized(e[i], 1.0 / h, mse, dfe, &rs, &ts);
        if (src == AVOW_EDOM) { A->unusual_rc = AVOW_EDOM; break; }
        if (src != AVOW_OK || !(fabs(ts) > UNUSUAL_LIMIT)) continue;
        A->nunusual_total++;
        if (A->nunusual == AVOW_MAX_LISTED_UNUSUAL) continue;
        avow_unusual *u = &A->unusual[A->nunusual++];
        u->line = data->obs[i].line;
        u->cell = c % T;
        u->block = c / T;
        dec_format(data->obs[i].value, u->value_text, sizeof u->value_text);
        u->fitted = dec_mpq_get_d(fitted[c]);
        u->residual = e[i];
        u->t = ts;
    }
    if (mse <= 0 || dfe <= 1) A->unusual_rc = AVOW_DX_ENODF;

    /* Robust one-way alternatives over the cells (no block). */
    A->robust_applies = !plan->block;
    if (A->robust_applies) {
        rc = group_by_cell(plan, data, NULL, &g);
        if (rc != AVOW_OK) { avow_free(e); return rc; }
        A->welch_rc = dx_welch(g.groups, g.k, &A->welch);
        A->kruskal_rc = dx_kruskal(g.groups, g.k, &A->kruskal);
        groups_free(&g);
    }
    avow_free(e);
    return AVOW_OK;
}
