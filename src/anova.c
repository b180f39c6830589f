/* anova.c: the analysis of `avow run`: cell summaries, the ANOVA table, planned contrasts
 * with their multiplicity adjustment, and the explorations. Everything rests on the
 * cell-means model (ARCHITECTURE.md): the reader's exact per-cell sums give exact cell
 * means, and every row of the table and every comparison is a linear hypothesis on them,
 * computed in exact rational arithmetic (GMP) and rounded once to binary64 at the end.
 *
 * Three fits, one model:
 *   - one factor: the hypothesis "all level means are equal" has the closed form
 *     sum n_i (ybar_i - ybar)^2 (dec_oneway), which needs no matrix;
 *   - several factors with every interaction and no block: each term is the hypothesis
 *     L_T mu = 0 with SS = (L_T m)' (L_T D^-1 L_T')^-1 (L_T m), m the cell means and
 *     D = diag(n); L_T's rows are the products, over the factors, of the centring rows
 *     (e_j - 1/L) for the term's factors and the averaging row (1/L) for the others, i.e.
 *     the term's effects under sum-to-zero coding. Each term is adjusted for all others;
 *   - with a block or without some interactions, the cell means are constrained: least
 *     squares on the cells with sum-to-zero effect coding X (intercept, terms, blocks),
 *     beta = (X'DX)^-1 X'D m, and each term's SS = beta_T' (V_TT)^-1 beta_T with
 *     V = (X'DX)^-1, again adjusted for all other terms. Cells without data are allowed
 *     as long as X'DX is invertible. The residual adds what the model leaves out (block by
 *     treatment, omitted interactions) to the variation within cells. */
#include "avow/evaluate.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "avow/dist.h"
#include "avow/exactla.h"
#include "avow/noncentral.h"
#include "analysis.h"
#include "avow/dunnett.h"
#include "avow/multiplicity.h"
#include "avow/srange.h"

static void set_rat(mpq_t q, avow_rat r)
{
    mpz_set_si(mpq_numref(q), (long)r.num);
    mpz_set_si(mpq_denref(q), (long)r.den);
    mpq_canonicalize(q);
}

/* Most parameters of a least-squares fit (a block, or interactions left out): the exact
 * inverse costs about p^3 operations on numbers of about p digits (134 parameters take
 * 1.5 s on the development machine). */
#define AVOW_MAX_GENERAL_PARAMS 300

void eval_results_free(avow_results *res)
{
    avow_free(res->levels);
    avow_free(res->margins);
    avow_free(res->blocks);
    avow_free(res->anova);
    avow_free(res->contrasts);
    avow_free(res->explores);
    for (size_t i = 0; i < res->nexplore_sets; i++) avow_free(res->explore_sets[i].pairs);
    avow_free(res->explore_sets);
    res->levels = NULL; res->margins = NULL; res->blocks = NULL; res->anova = NULL;
    res->contrasts = res->explores = NULL;
    res->explore_sets = NULL;
    res->nexplore_sets = 0;
    avow_free(res->effects);
    avow_free(res->checks.unusual);
    avow_free(res->checks.resid);
    res->effects = NULL;
    res->checks.unusual = NULL;
    res->checks.resid = NULL;
    res->checks.nresiduals = 0;
}

/* ---- the fitted model ---- */

typedef struct model {
    const avow_plan *plan;
    const avow_data *data;
    avow_fit fit;
    size_t T, B, C;         /* treatment cells, blocks, full cells (B T) */
    uint64_t *n;            /* per full cell */
    mpq_t *mean;            /* per full cell (0 when empty) */
    uint64_t *tn;           /* per treatment cell, pooled over blocks */
    mpq_t *tmean;           /* per treatment cell, pooled (0 when empty) */
    size_t p;               /* general fit: parameters */
    signed char *X;         /* general fit: C x p effect coding */
    mpq_t *beta;            /* general fit: p */
    mpq_t *V;               /* general fit: p x p, (X'DX)^-1 */
    size_t *term_col;       /* general fit: first column of each term */
    mpq_t mse;              /* residual mean square, exact */
    double dfe;             /* residual df */
} model;

static void model_free(model *M)
{
    avow_free(M->n);
    avow_free(M->tn);
    xla_free(M->mean, M->C);
    xla_free(M->tmean, M->T);
    avow_free(M->X);
    xla_free(M->beta, M->p);
    xla_free(M->V, M->p * M->p);
    avow_free(M->term_col);
    mpq_clear(M->mse);
}

/* Estimate and variance factor of sum c_t mu_t over the treatment cells (c has T
 * entries): est = c' mu_hat, and Var(est) = sigma^2 v. */
static void model_contrast(const model *M, mpq_t *c, mpq_t est, mpq_t v)
{
    mpq_t t, u;
    mpq_init(t); mpq_init(u);
    mpq_set_ui(est, 0, 1);
    mpq_set_ui(v, 0, 1);
    if (M->fit != FIT_GENERAL) {
        for (size_t i = 0; i < M->T; i++) {
            if (mpq_sgn(c[i]) == 0) continue;
            mpq_mul(t, c[i], M->tmean[i]);
            mpq_add(est, est, t);
            mpq_mul(t, c[i], c[i]);
            mpq_set_ui(u, (unsigned long)M->tn[i], 1);
            mpq_div(t, t, u);
            mpq_add(v, v, t);
        }
    } else {
        /* g = X' c_full, c_full = c / B in every block. */
        mpq_t *g = xla_alloc(M->p);
        if (g) {
            for (size_t b = 0; b < M->B; b++)
                for (size_t i = 0; i < M->T; i++) {
                    if (mpq_sgn(c[i]) == 0) continue;
                    const signed char *x = &M->X[(b * M->T + i) * M->p];
                    for (size_t j = 0; j < M->p; j++) {
                        if (x[j] > 0) mpq_add(g[j], g[j], c[i]);
                        else if (x[j] < 0) mpq_sub(g[j], g[j], c[i]);
                    }
                }
            mpq_set_ui(u, (unsigned long)M->B, 1);
            for (size_t j = 0; j < M->p; j++) mpq_div(g[j], g[j], u);
            for (size_t j = 0; j < M->p; j++) {
                if (mpq_sgn(g[j]) == 0) continue;
                mpq_mul(t, g[j], M->beta[j]);
                mpq_add(est, est, t);
                for (size_t k = 0; k < M->p; k++) {
                    if (mpq_sgn(g[k]) == 0) continue;
                    mpq_mul(t, g[j], g[k]);
                    mpq_mul(t, t, M->V[j * M->p + k]);
                    mpq_add(v, v, t);
                }
            }
            xla_free(g, M->p);
        }
    }
    mpq_clear(t); mpq_clear(u);
}

/* Covariance factor of two estimates (general fit): Cov = sigma^2 g_a' V g_b. Zero for
 * the other fits when the two vectors share no cell; the callers need only that case. */
static void model_cov(const model *M, mpq_t *ca, mpq_t *cb, mpq_t out)
{
    mpq_set_ui(out, 0, 1);
    mpq_t t, u;
    mpq_init(t); mpq_init(u);
    if (M->fit != FIT_GENERAL) {
        for (size_t i = 0; i < M->T; i++) {
            if (mpq_sgn(ca[i]) == 0 || mpq_sgn(cb[i]) == 0) continue;
            mpq_mul(t, ca[i], cb[i]);
            mpq_set_ui(u, (unsigned long)M->tn[i], 1);
            mpq_div(t, t, u);
            mpq_add(out, out, t);
        }
    } else {
        mpq_t *ga = xla_alloc(M->p), *gb = xla_alloc(M->p);
        if (ga && gb) {
            for (size_t b = 0; b < M->B; b++)
                for (size_t i = 0; i < M->T; i++) {
                    const signed char *x = &M->X[(b * M->T + i) * M->p];
                    for (size_t j = 0; j < M->p; j++) {
                        if (!x[j]) continue;
                        if (x[j] > 0) { mpq_add(ga[j], ga[j], ca[i]); mpq_add(gb[j], gb[j], cb[i]); }
                        else { mpq_sub(ga[j], ga[j], ca[i]); mpq_sub(gb[j], gb[j], cb[i]); }
                    }
                }
            for (size_t j = 0; j < M->p; j++)
                for (size_t k = 0; k < M->p; k++) {
                    if (mpq_sgn(ga[j]) == 0 || mpq_sgn(gb[k]) == 0) continue;
                    mpq_mul(t, ga[j], gb[k]);
                    mpq_mul(t, t, M->V[j * M->p + k]);
                    mpq_add(out, out, t);
                }
            mpq_set_ui(u, (unsigned long)(M->B * M->B), 1);
            mpq_div(out, out, u);
        }
        xla_free(ga, M->p); xla_free(gb, M->p);
    }
    mpq_clear(t); mpq_clear(u);
}

/* The same sum of squares through the complement: with every interaction the full
 * model fits the cell means exactly, so SS_T is the weighted residual sum of squares of
 * the cell means under the model without term T, sum n m^2 - b' (X'DX)^-1 b, X the
 * effect coding of every other term (and the intercept), b = X' (cell totals). X'DX is
 * an integer matrix and b becomes one after scaling by a common denominator, so the solve
 * is fraction-free. Used when T has more columns than the rest of the model. */
static int cells_term_ss_complement(const model *M, size_t skip, mpq_t ss)
{
    const avow_plan *P = M->plan;
    size_t T = M->T, q = 1;
    for (size_t t = 0; t < P->nterms; t++) if (t != skip) q += P->terms[t].df;
    signed char *X = avow_calloc(T * q, 1);
    int64_t *Ai = avow_calloc(q * q, sizeof *Ai);
    mpz_t *A = xla_alloc_z(q * q), *b = xla_alloc_z(q);
    mpq_t *tot = xla_alloc(T), *x = xla_alloc(q), *bq = xla_alloc(q);
    mpz_t den;
    mpq_t t, u;
    mpz_init_set_ui(den, 1); mpq_init(t); mpq_init(u);
    int rc = X && Ai && A && b && tot && x && bq ? AVOW_OK : AVOW_ENOMEM;
    if (rc == AVOW_OK) {
        for (size_t c = 0; c < T; c++) {
            signed char *xc = &X[c * q];
            size_t col = 0;
            xc[col++] = 1;
            for (size_t k = 0; k < P->nterms; k++) {
                if (k == skip) continue;
                for (size_t j = 0; j < P->terms[k].df; j++)
                    xc[col++] = (signed char)plan_term_code(P, &P->terms[k], c, j);
            }
            int64_t nc = (int64_t)M->tn[c];
            for (size_t j = 0; j < q; j++) {
                if (!xc[j]) continue;
                for (size_t k = 0; k < q; k++) if (xc[k]) Ai[j * q + k] += xc[j] * xc[k] * nc;
            }
            mpq_set_ui(u, (unsigned long)M->tn[c], 1);
            mpq_mul(tot[c], M->tmean[c], u);
        }
        for (size_t j = 0; j < q * q; j++) mpz_set_si(A[j], (long)Ai[j]);
        for (size_t c = 0; c < T; c++)
            for (size_t j = 0; j < q; j++) {
                if (X[c * q + j] > 0) mpq_add(bq[j], bq[j], tot[c]);
                else if (X[c * q + j] < 0) mpq_sub(bq[j], bq[j], tot[c]);
            }
        for (size_t j = 0; j < q; j++) mpz_lcm(den, den, mpq_denref(bq[j]));
        for (size_t j = 0; j < q; j++) {
            mpz_divexact(mpq_numref(t), den, mpq_denref(bq[j]));
            mpz_mul(b[j], mpq_numref(bq[j]), mpq_numref(t));
        }
        rc = xla_solve_int(A, b, q, x);        /* x = (X'DX)^-1 b den */
    }
    if (rc == AVOW_OK) {
        /* ss = sum n m^2 - b' x / den */
        mpq_set_ui(ss, 0, 1);
        for (size_t c = 0; c < T; c++) {
            mpq_mul(t, tot[c], M->tmean[c]);
            mpq_add(ss, ss, t);
        }
        mpq_set_ui(u, 0, 1);
        for (size_t j = 0; j < q; j++) {
            mpq_mul(t, bq[j], x[j]);
            mpq_add(u, u, t);
        }
        mpq_set_z(t, den);
        mpq_div(u, u, t);
        mpq_sub(ss, ss, u);
    }
    avow_free(X); avow_free(Ai);
    xla_free_z(A, q * q); xla_free_z(b, q);
    xla_free(tot, T); xla_free(x, q); xla_free(bq, q);
    mpz_clear(den); mpq_clear(t); mpq_clear(u);
    return rc;
}

/* Sum of squares of term `t` for the cell-means fit: the hypothesis L_T mu = 0. */
static int cells_term_ss(const model *M, const plan_term *term, mpq_t ss)
{
    const avow_plan *P = M->plan;
    size_t d = term->df, T = M->T;
    mpq_t *L = xla_alloc(d * T), *A = xla_alloc(d * d), *r = xla_alloc(d);
    mpq_t t, u;
    mpq_init(t); mpq_init(u);
    int rc = (L && A && r) ? AVOW_OK : AVOW_ENOMEM;
    for (size_t j = 0; rc == AVOW_OK && j < d; j++)
        for (size_t c = 0; c < T; c++) {
            /* product over factors: in the term, (delta(l, j_f) - 1/L_f); else 1/L_f */
            mpq_set_ui(t, 1, 1);
            size_t jj = j;
            for (size_t f = P->nfactors; f-- > 0;) {
                size_t Lf = P->factors[f].nlevels, l = plan_cell_level(P, c, f);
                if (term->mask >> f & 1) {
                    size_t jf = jj % (Lf - 1);
                    jj /= Lf - 1;
                    mpq_set_si(u, l == jf ? (long)Lf - 1 : -1, (unsigned long)Lf);
                } else {
                    mpq_set_ui(u, 1, (unsigned long)Lf);
                }
                mpq_canonicalize(u);
                mpq_mul(t, t, u);
            }
            mpq_set(L[j * T + c], t);
        }
    for (size_t a = 0; rc == AVOW_OK && a < d; a++) {
        for (size_t c = 0; c < T; c++) {
            mpq_mul(t, L[a * T + c], M->tmean[c]);
            mpq_add(r[a], r[a], t);
        }
        for (size_t b = 0; b <= a; b++) {
            for (size_t c = 0; c < T; c++) {
                if (mpq_sgn(L[a * T + c]) == 0 || mpq_sgn(L[b * T + c]) == 0) continue;
                mpq_mul(t, L[a * T + c], L[b * T + c]);
                mpq_set_ui(u, (unsigned long)M->tn[c], 1);
                mpq_div(t, t, u);
                mpq_add(A[a * d + b], A[a * d + b], t);
            }
            mpq_set(A[b * d + a], A[a * d + b]);
        }
    }
    mpq_t *x = rc == AVOW_OK ? xla_alloc(d) : NULL;
    if (rc == AVOW_OK && !x) rc = AVOW_ENOMEM;
    if (rc == AVOW_OK) {
        for (size_t a = 0; a < d; a++) mpq_set(x[a], r[a]);
        rc = xla_solve(A, x, d, 1);
    }
    if (rc == AVOW_OK) {
        mpq_set_ui(ss, 0, 1);
        for (size_t a = 0; a < d; a++) {
            mpq_mul(t, r[a], x[a]);
            mpq_add(ss, ss, t);
        }
    }
    xla_free(x, d);
    xla_free(L, d * T); xla_free(A, d * d); xla_free(r, d);
    mpq_clear(t); mpq_clear(u);
    return rc;
}

/* Sum of squares of columns [col, col + d) in the general fit: beta' (V_dd)^-1 beta. */
static int general_ss(const model *M, size_t col, size_t d, mpq_t ss)
{
    mpq_t *A = xla_alloc(d * d), *x = xla_alloc(d);
    int rc = A && x ? AVOW_OK : AVOW_ENOMEM;
    if (rc == AVOW_OK) {
        for (size_t a = 0; a < d; a++) {
            mpq_set(x[a], M->beta[col + a]);
            for (size_t b = 0; b < d; b++) mpq_set(A[a * d + b], M->V[(col + a) * M->p + col + b]);
        }
        rc = xla_solve(A, x, d, 1);
    }
    if (rc == AVOW_OK) {
        mpq_t t;
        mpq_init(t);
        mpq_set_ui(ss, 0, 1);
        for (size_t a = 0; a < d; a++) {
            mpq_mul(t, M->beta[col + a], x[a]);
            mpq_add(ss, ss, t);
        }
        mpq_clear(t);
    }
    xla_free(A, d * d); xla_free(x, d);
    return rc;
}

/* The general fit: X (C x p), X'DX, its inverse V, and beta. AVOW_EDOM when X'DX is
 * singular (some term cannot be estimated from the cells that have data). */
static int general_fit(model *M)
{
    const avow_plan *P = M->plan;
    size_t p = 1 + P->treat_df + (M->B > 1 ? M->B - 1 : 0);
    M->p = p;
    M->X = avow_calloc(M->C * p, 1);
    M->term_col = avow_calloc(P->nterms + 1, sizeof *M->term_col);
    M->beta = xla_alloc(p);
    M->V = xla_alloc(p * p);
    if (!M->X || !M->term_col || !M->beta || !M->V) return AVOW_ENOMEM;
    size_t col = 1;
    for (size_t t = 0; t < P->nterms; t++) { M->term_col[t] = col; col += P->terms[t].df; }
    M->term_col[P->nterms] = col;   /* the block's columns */
    for (size_t b = 0; b < M->B; b++)
        for (size_t i = 0; i < M->T; i++) {
            signed char *x = &M->X[(b * M->T + i) * p];
            x[0] = 1;
            for (size_t t = 0; t < P->nterms; t++)
                for (size_t j = 0; j < P->terms[t].df; j++)
                    x[M->term_col[t] + j] = (signed char)plan_term_code(P, &P->terms[t], i, j);
            if (M->B > 1) {
                size_t bc = M->term_col[P->nterms];
                for (size_t j = 0; j + 1 < M->B; j++)
                    x[bc + j] = (signed char)(b == j ? 1 : b == M->B - 1 ? -1 : 0);
            }
        }
    /* A = X'DX (integers: sums of +-n, at most N in magnitude), beta = X'D m (the cell
     * totals), both exact. */
    mpq_t t, u;
    mpq_init(t); mpq_init(u);
    int64_t *Ai = avow_calloc(p * p, sizeof *Ai);
    if (!Ai) { mpq_clear(t); mpq_clear(u); return AVOW_ENOMEM; }
    for (size_t c = 0; c < M->C; c++) {
        if (!M->n[c]) continue;
        const signed char *x = &M->X[c * p];
        int64_t nc = (int64_t)M->n[c];
        mpq_set_ui(u, (unsigned long)M->n[c], 1);
        mpq_mul(t, M->mean[c], u);          /* the cell's total */
        for (size_t j = 0; j < p; j++) {
            if (!x[j]) continue;
            if (x[j] > 0) mpq_add(M->beta[j], M->beta[j], t);
            else mpq_sub(M->beta[j], M->beta[j], t);
            for (size_t k = 0; k < p; k++)
                if (x[k]) Ai[j * p + k] += x[j] * x[k] * nc;
        }
    }
    mpz_t *Az = xla_alloc_z(p * p);
    if (!Az) { avow_free(Ai); mpq_clear(t); mpq_clear(u); return AVOW_ENOMEM; }
    for (size_t j = 0; j < p * p; j++) mpz_set_si(Az[j], (long)Ai[j]);
    avow_free(Ai);
    int rc = xla_inverse_int(Az, M->V, p);  /* V = A^-1, fraction-free */
    xla_free_z(Az, p * p);
    if (rc == AVOW_OK) {
        /* beta = V (X'D m) */
        mpq_t *rhs = xla_alloc(p);
        if (!rhs) rc = AVOW_ENOMEM;
        for (size_t j = 0; rhs && j < p; j++) mpq_set(rhs[j], M->beta[j]);
        for (size_t j = 0; rhs && j < p; j++) {
            mpq_set_ui(M->beta[j], 0, 1);
            for (size_t k = 0; k < p; k++) {
                mpq_mul(t, M->V[j * p + k], rhs[k]);
                mpq_add(M->beta[j], M->beta[j], t);
            }
        }
        xla_free(rhs, p);
    }
    mpq_clear(t); mpq_clear(u);
    return rc;
}

/* ---- explorations ---- */

/* The vector over treatment cells of mean `l` of an exploration: a level of the set's
 * factor (marginal, or within level `slice` of the `within` factor), or a cell. */
static void explore_vector(const avow_plan *P, const plan_explore *e, long slice, size_t l, mpq_t *c)
{
    size_t G = 0;
    for (size_t i = 0; i < P->ncells; i++) mpq_set_ui(c[i], 0, 1);
    if (e->factor < 0) { mpq_set_ui(c[l], 1, 1); return; }
    for (size_t i = 0; i < P->ncells; i++)
        if (plan_cell_level(P, i, (size_t)e->factor) == l
            && (slice < 0 || plan_cell_level(P, i, (size_t)e->within) == (size_t)slice)) G++;
    for (size_t i = 0; i < P->ncells; i++)
        if (plan_cell_level(P, i, (size_t)e->factor) == l
            && (slice < 0 || plan_cell_level(P, i, (size_t)e->within) == (size_t)slice))
            mpq_set_ui(c[i], 1, (unsigned long)G);
}

static size_t explore_k(const avow_plan *P, const plan_explore *e)
{
    return e->factor < 0 ? P->ncells : P->factors[e->factor].nlevels;
}

/* Estimate, SE and df of mean a - mean b; with separate variances each cell's own
 * variance and Welch-Satterthwaite df (saturated fits only). */
static void pair_basic(const model *M, const avow_results *res, mpq_t *va, mpq_t *vb, int separate,
                       avow_pair_result *out)
{
    size_t T = M->T;
    mpq_t *c = xla_alloc(T);
    mpq_t est, v, q;
    mpq_init(est); mpq_init(v); mpq_init(q);
    if (!c) { out->estimate = out->se = NAN; out->df = NAN; goto out; }
    for (size_t i = 0; i < T; i++) mpq_sub(c[i], va[i], vb[i]);
    model_contrast(M, c, est, v);
    out->estimate = dec_mpq_get_d(est);
    if (!separate) {
        mpq_mul(q, v, M->mse);              /* SE^2 = MSE v, exactly */
        out->se = sqrt(dec_mpq_get_d(q));
        out->df = M->dfe;
    } else {
        /* Games & Howell (1976): SE^2 = sum c_t^2 s_t^2 / n_t; df by Welch-Satterthwaite. */
        double se2 = 0, den = 0;
        for (size_t i = 0; i < T; i++) {
            double ci = mpq_get_d(c[i]);
            if (ci == 0) continue;
            const avow_level_result *L = &res->levels[i];
            double w = ci * ci * L->sd * L->sd / (double)L->n;
            se2 += w;
            den += w * w / (double)(L->n - 1);
        }
        out->se = sqrt(se2);
        out->df = se2 * se2 / den;
    }
out:
    xla_free(c, T);
    mpq_clear(est); mpq_clear(v); mpq_clear(q);
}

/* All pairs of one family by Tukey-Kramer (Kramer 1956): q = |d| / (SE / sqrt 2) referred
 * to the studentized range with k means and the residual df; simultaneous intervals
 * d +- q_alpha / sqrt(2) SE. With separate variances, Games & Howell (1976): the same with
 * each pair's own SE and Welch-Satterthwaite df. */
static int explore_pairs(const model *M, const avow_results *res, avow_explore_result *er, double alpha)
{
    const avow_plan *P = M->plan;
    size_t k = er->k, T = M->T;
    size_t n = k * (k - 1) / 2;
    int separate = P->separate_variances;
    er->pairs = avow_calloc(n ? n : 1, sizeof *er->pairs);
    mpq_t *vec = xla_alloc(k * T);
    if (!er->pairs || !vec) { xla_free(vec, k * T); return AVOW_ENOMEM; }
    for (size_t l = 0; l < k; l++) explore_vector(P, er->set, er->slice, l, &vec[l * T]);
    double q;
    er->crit = !separate && srange_qinv(alpha, (double)k, M->dfe, &q) == 0 ? q : NAN;
    size_t m = 0;
    for (size_t b = 0; b < k; b++)
        for (size_t a = b + 1; a < k; a++) {
            avow_pair_result *r = &er->pairs[m++];
            r->a = a; r->b = b;
            pair_basic(M, res, &vec[a * T], &vec[b * T], separate, r);
            r->stat = r->se > 0 ? fabs(r->estimate) / r->se * sqrt(2.0) : NAN;
            int dfok = isfinite(r->df) && r->df > 0;
            r->p_adj = dfok ? srange_sf(r->stat, (double)k, r->df) : NAN;
            r->reject = r->p_adj <= alpha;
            double crit = separate ? (dfok && srange_qinv(alpha, (double)k, r->df, &q) == 0 ? q : NAN) : er->crit;
            double half = crit / sqrt(2.0) * r->se;
            r->ci_lo = r->estimate - half;
            r->ci_hi = r->estimate + half;
        }
    er->npairs = m;
    xla_free(vec, k * T);
    return AVOW_OK;
}

/* Each level against the control by Dunnett's method (Dunnett 1955; AS 251): t_i =
 * (mean_i - mean_0) / SE_i, the maximum of |t_i| referred to the many-to-one multivariate
 * t with correlations lambda_i lambda_j, lambda_i = sqrt(v_0 / (v_i + v_0)), v the
 * variance factors of the means (1/n for raw level means). That product form holds when
 * the means are uncorrelated; otherwise the result is flagged approximate. */
static int explore_versus(const model *M, const avow_results *res, avow_explore_result *er, double alpha)
{
    const avow_plan *P = M->plan;
    size_t k = er->k, T = M->T, c0 = er->set->control, p = k - 1;
    er->pairs = avow_calloc(p ? p : 1, sizeof *er->pairs);
    double *lambda = avow_calloc(p ? p : 1, sizeof *lambda);
    mpq_t *vec = xla_alloc(k * T);
    mpq_t *vf = xla_alloc(k);
    mpq_t est, cov;
    mpq_init(est); mpq_init(cov);
    int rc = AVOW_OK;
    if (!er->pairs || !lambda || !vec || !vf) { rc = AVOW_ENOMEM; goto out; }
    for (size_t l = 0; l < k; l++) {
        explore_vector(P, er->set, er->slice, l, &vec[l * T]);
        model_contrast(M, &vec[l * T], est, vf[l]);
    }
    if (M->fit == FIT_GENERAL)
        for (size_t a = 0; a < k && !er->approximate; a++)
            for (size_t b = 0; b < a && !er->approximate; b++) {
                model_cov(M, &vec[a * T], &vec[b * T], cov);
                if (mpq_sgn(cov) != 0) er->approximate = 1;
            }
    double v0 = dec_mpq_get_d(vf[c0]);
    for (size_t i = 0, j = 0; i < k; i++) {
        if (i == c0) continue;
        double vi = dec_mpq_get_d(vf[i]);
        lambda[j++] = sqrt(v0 / (vi + v0));
    }
    double d;
    er->crit = dunnett_qinv(alpha, lambda, p, M->dfe, 1, &d) == 0 ? d : NAN;
    for (size_t i = 0, j = 0; i < k; i++) {
        if (i == c0) continue;
        avow_pair_result *r = &er->pairs[j++];
        r->a = i; r->b = c0;
        pair_basic(M, res, &vec[i * T], &vec[c0 * T], 0, r);
        r->stat = r->se > 0 ? fabs(r->estimate) / r->se : NAN;
        double sf;
        r->p_adj = isnan(r->stat) ? NAN : dunnett_sf(r->stat, lambda, p, M->dfe, 1, &sf) == 0 ? sf : NAN;
        r->reject = r->p_adj <= alpha;
        r->ci_lo = r->estimate - er->crit * r->se;
        r->ci_hi = r->estimate + er->crit * r->se;
    }
    er->npairs = p;
out:
    avow_free(lambda);
    xla_free(vec, k * T); xla_free(vf, k);
    mpq_clear(est); mpq_clear(cov);
    return rc;
}

/* ---- contrasts ---- */

/* Fill estimate, se, t, ss and the unadjusted p of one contrast. */
/* Under `variances separate` (cell-means fits): the standard error from each cell's own
 * variance, SE^2 = sum c_t^2 s_t^2 / n_t, and Welch-Satterthwaite degrees of freedom
 * (Satterthwaite 1946; Welch 1947), df = (sum w_t)^2 / sum w_t^2 / (n_t - 1), w_t =
 * c_t^2 s_t^2 / n_t, all exact and rounded once. NaN when a cell with a non-zero
 * coefficient has fewer than 2 runs. */
static void separate_se(const model *M, mpq_t *c, double *se, double *df)
{
    mpq_t w, sw, sw2, q, n1;
    mpq_init(w); mpq_init(sw); mpq_init(sw2); mpq_init(q); mpq_init(n1);
    int ok = 1;
    for (size_t i = 0; i < M->T && ok; i++) {
        if (mpq_sgn(c[i]) == 0) continue;
        uint64_t n = M->tn[i];
        if (n < 2) { ok = 0; break; }
        dec_acc_ss(&M->data->acc[i], q);            /* one block: the cell itself */
        mpq_set_ui(n1, (unsigned long)(n - 1), 1);
        mpq_div(q, q, n1);                          /* s^2 */
        mpq_mul(w, c[i], c[i]);
        mpq_mul(w, w, q);
        mpq_set_ui(n1, (unsigned long)n, 1);
        mpq_div(w, w, n1);                          /* c^2 s^2 / n */
        mpq_add(sw, sw, w);
        mpq_mul(w, w, w);
        mpq_set_ui(n1, (unsigned long)(n - 1), 1);
        mpq_div(w, w, n1);
        mpq_add(sw2, sw2, w);
    }
    if (ok && mpq_sgn(sw2) > 0) {
        *se = sqrt(dec_mpq_get_d(sw));
        mpq_mul(q, sw, sw);
        mpq_div(q, q, sw2);
        *df = dec_mpq_get_d(q);
    } else {
        *se = *df = NAN;
    }
    mpq_clear(w); mpq_clear(sw); mpq_clear(sw2); mpq_clear(q); mpq_clear(n1);
}

static void contrast_basic(const model *M, const plan_contrast *pc, int separate, avow_contrast_result *out)
{
    mpq_t *c = xla_alloc(M->T);
    mpq_t L, v, t;
    mpq_init(L); mpq_init(v); mpq_init(t);
    out->pc = pc;
    out->df = M->dfe;
    if (!c) { out->estimate = out->se = out->t = out->p = out->ss = NAN; goto out; }
    for (size_t i = 0; i < M->T; i++) set_rat(c[i], pc->coef[i]);
    model_contrast(M, c, L, v);
    out->estimate = dec_mpq_get_d(L);
    mpq_mul(t, M->mse, v);              /* SE^2 = MSE * v, exactly */
    out->se = sqrt(dec_mpq_get_d(t));
    if (separate) separate_se(M, c, &out->se, &out->df);
    if (mpq_sgn(v) > 0) {
        mpq_mul(t, L, L);
        mpq_div(t, t, v);               /* SS = L^2 / v, exactly */
        out->ss = dec_mpq_get_d(t);
    } else {
        out->ss = NAN;
    }
    out->t = out->se > 0 ? out->estimate / out->se : NAN;
    switch (pc->side) {
    case SIDE_GREATER: out->p = dist_t_q(out->t, out->df); break;
    case SIDE_LESS: out->p = dist_t_q(-out->t, out->df); break;
    default: out->p = dist_t_p2(out->t, out->df); break;
    }
out:
    xla_free(c, M->T);
    mpq_clear(L); mpq_clear(v); mpq_clear(t);
}

/* Interval estimate +- crit * se, one-sided in the declared direction. */
static void set_interval(avow_contrast_result *r, double crit)
{
    double half = crit * r->se;
    r->ci_lo = r->pc->side == SIDE_LESS ? -INFINITY : r->estimate - half;
    r->ci_hi = r->pc->side == SIDE_GREATER ? INFINITY : r->estimate + half;
}

/* Upper-tail t quantile, NaN when it cannot be had. */
static double tq(double p, double df)
{
    double x;
    return dist_t_qinv(p, df, &x) == 0 ? x : NAN;
}

/* Cell summaries pooled over blocks (n, mean, sd, min, max) and the exact pooled means. */
static void summarise_cells(model *M, avow_results *res)
{
    const avow_data *D = M->data;
    mpq_t ss, t, u;
    mpq_init(ss); mpq_init(t); mpq_init(u);
    for (size_t i = 0; i < M->T; i++) {
        avow_level_result *L = &res->levels[i];
        uint64_t n = 0;
        mpq_set_ui(M->tmean[i], 0, 1);
        avow_dec mn = {0, 0}, mx = {0, 0};
        int any = 0, exact = 1;
        for (size_t b = 0; b < M->B; b++) {
            size_t c = b * M->T + i;
            const avow_acc *a = &D->acc[c];
            if (!M->n[c]) continue;
            n += M->n[c];
            mpq_set_ui(u, (unsigned long)M->n[c], 1);
            mpq_mul(t, M->mean[c], u);
            mpq_add(M->tmean[i], M->tmean[i], t);
            avow_dec lo, hi;
            dec_acc_min(a, &lo);
            dec_acc_max(a, &hi);
            if (!any || dec_cmp(lo, mn) < 0) mn = lo;
            if (!any || dec_cmp(hi, mx) > 0) mx = hi;
            any = 1;
            exact &= dec_acc_is_exact(a);
        }
        M->tn[i] = n;
        L->n = n;
        L->exact = exact;
        if (!n) {
            L->mean = L->sd = L->min = L->max = NAN;
            snprintf(L->min_text, sizeof L->min_text, "-");
            snprintf(L->max_text, sizeof L->max_text, "-");
            continue;
        }
        mpq_set_ui(u, (unsigned long)n, 1);
        mpq_div(M->tmean[i], M->tmean[i], u);
        L->mean = dec_mpq_get_d(M->tmean[i]);
        /* pooled SS about the pooled mean: within each block's cell, plus between them */
        mpq_set_ui(ss, 0, 1);
        for (size_t b = 0; b < M->B; b++) {
            size_t c = b * M->T + i;
            if (!M->n[c]) continue;
            dec_acc_ss(&D->acc[c], t);
            mpq_add(ss, ss, t);
            mpq_sub(t, M->mean[c], M->tmean[i]);
            mpq_mul(t, t, t);
            mpq_set_ui(u, (unsigned long)M->n[c], 1);
            mpq_mul(t, t, u);
            mpq_add(ss, ss, t);
        }
        if (n > 1) {
            mpq_set_ui(u, (unsigned long)(n - 1), 1);
            mpq_div(t, ss, u);
            L->sd = sqrt(dec_mpq_get_d(t));
        } else {
            L->sd = NAN;
        }
        L->min = dec_get_d(mn);
        L->max = dec_get_d(mx);
        dec_format(mn, L->min_text, sizeof L->min_text);
        dec_format(mx, L->max_text, sizeof L->max_text);
    }
    mpq_clear(ss); mpq_clear(t); mpq_clear(u);
}

/* Name the treatment cells without data, for an error message. */
/* The reference distribution of k means whose squared standard errors are mse * w[i]
 * (w = 1/n for a mean of n runs): the t distribution with df degrees of freedom scaled
 * by sqrt(mse * mean(w)), that is resid_sd / sqrt(n_h) with n_h the harmonic mean of
 * the n, sampled for the pictures. */
static void reference_curve(avow_reference *ref, const double *w, size_t k, double mse, double df, double centre)
{
    memset(ref, 0, sizeof *ref);
    ref->k = k;
    ref->df = df;
    ref->centre = centre;
    double sum = 0;
    int equal = 1;
    for (size_t i = 0; i < k; i++) {
        sum += w[i];
        if (fabs(w[i] - w[0]) > 1e-12 * w[0]) equal = 0;
    }
    if (!k || !(sum > 0) || !(mse > 0) || !(df > 0) || !isfinite(centre)) return;
    ref->equal_n = equal;
    ref->n_h = (double)k / sum;
    ref->scale = sqrt(mse / ref->n_h);
    if (!(ref->scale > 0) || !isfinite(ref->scale)) return;
    double peak = dist_t_density(0, df);
    for (size_t i = 0; i < AVOW_CURVE_POINTS; i++) {
        double u = -AVOW_CURVE_SPAN + 2 * AVOW_CURVE_SPAN * (double)i / (AVOW_CURVE_POINTS - 1);
        ref->x[i] = centre + u * ref->scale;
        ref->height[i] = dist_t_density(u, df) / peak;
    }
    ref->ok = isfinite(peak) && peak > 0;
}

static void list_empty(const model *M, strbuf *errs)
{
    size_t shown = 0, total = 0;
    for (size_t i = 0; i < M->T; i++) {
        if (M->tn[i]) continue;
        if (shown < 10) sb_printf(errs, "%s%s", shown ? ", " : "", plan_cell_name(M->plan, i));
        shown++;
        total++;
    }
    if (total > 10) sb_printf(errs, " and %zu more", total - 10);
}

static void set_row(avow_anova_row *A, const char *src, avow_row_kind kind, double df, const mpq_t ss,
                    const mpq_t mse, int has_f)
{
    A->source = src;
    A->kind = kind;
    A->df = df;
    A->ss = dec_mpq_get_d(ss);
    A->ms = A->f = A->p = NAN;
    if (kind == ROW_TOTAL || df <= 0) return;
    mpq_t ms, q;
    mpq_init(ms); mpq_init(q);
    mpq_set_d(q, df);
    mpq_div(ms, ss, q);
    A->ms = dec_mpq_get_d(ms);
    if (kind != ROW_RESIDUAL && has_f && mpq_sgn(mse) > 0) {
        mpq_div(q, ms, mse);
        A->f = dec_mpq_get_d(q);
    }
    mpq_clear(ms); mpq_clear(q);
}

int eval_analyse(const avow_plan *plan, const avow_data *data, avow_results *res, strbuf *errs)
{
    model M;
    memset(&M, 0, sizeof M);
    mpq_init(M.mse);
    M.plan = plan;
    M.data = data;
    M.T = plan->ncells;
    M.B = data->nblocks ? data->nblocks : 1;
    M.C = M.T * M.B;
    M.fit = plan->nfactors == 1 && !plan->block ? FIT_ONEWAY : plan->saturated ? FIT_CELLS : FIT_GENERAL;
    res->fit = M.fit;
    res->ncells = M.T;
    double *p = NULL, *padj = NULL;
    int rc = AVOW_OK;
    mpq_t q, ssw, sst, ssres, gm, t, u;
    mpq_init(q); mpq_init(ssw); mpq_init(sst); mpq_init(ssres); mpq_init(gm); mpq_init(t); mpq_init(u);
    res->levels = avow_calloc(M.T, sizeof *res->levels);
    M.n = avow_calloc(M.C, sizeof *M.n);
    M.tn = avow_calloc(M.T, sizeof *M.tn);
    M.mean = xla_alloc(M.C);
    M.tmean = xla_alloc(M.T);
    size_t nrows = plan->nterms + (plan->block ? 1 : 0) + 2;
    res->anova = avow_calloc(nrows, sizeof *res->anova);
    if (!res->levels || !M.n || !M.tn || !M.mean || !M.tmean || !res->anova) { rc = AVOW_ENOMEM; goto out; }

    /* Exact cell statistics. */
    uint64_t N = 0;
    for (size_t c = 0; c < M.C; c++) {
        const avow_acc *a = &data->acc[c];
        M.n[c] = dec_acc_n(a);
        N += M.n[c];
        if (M.n[c]) {
            dec_acc_mean(a, M.mean[c]);
            dec_acc_ss(a, q);
            mpq_add(ssw, ssw, q);
            mpq_set_ui(u, (unsigned long)M.n[c], 1);
            mpq_mul(t, M.mean[c], u);
            mpq_add(gm, gm, t);
        } else {
            res->empty_cells++;
        }
    }
    if (N == 0) {
        sb_puts(errs, "the data cannot be analysed (no observations)\n");
        rc = AVOW_EDOM;
        goto out;
    }
    res->n = N;
    mpq_set_ui(u, (unsigned long)N, 1);
    mpq_div(gm, gm, u);
    res->grand_mean = dec_mpq_get_d(gm);
    mpq_set(sst, ssw);
    res->balanced = 1;
    for (size_t c = 0; c < M.C; c++) {
        if (M.n[c] != M.n[0]) res->balanced = 0;
        if (!M.n[c]) continue;
        mpq_sub(t, M.mean[c], gm);
        mpq_mul(t, t, t);
        mpq_set_ui(u, (unsigned long)M.n[c], 1);
        mpq_mul(t, t, u);
        mpq_add(sst, sst, t);
    }
    summarise_cells(&M, res);
    mpq_sub(q, sst, ssw);
    res->ss_cells = dec_mpq_get_d(q);
    uint64_t nonempty = M.C - res->empty_cells;
    res->df_within = (double)(N - nonempty);
    res->ss_within = dec_mpq_get_d(ssw);

    /* The model's terms. */
    mpq_t *term_ss = xla_alloc(nrows);
    if (!term_ss) { rc = AVOW_ENOMEM; goto out; }
    size_t params;
    if (M.fit == FIT_ONEWAY) {
        avow_oneway ow;
        if (dec_oneway(data->acc, M.T, &ow) != AVOW_OK) {
            sb_puts(errs, "the data cannot be analysed (more than 2^64 observations)\n");
            xla_free(term_ss, nrows);
            rc = AVOW_EDOM;
            goto out;
        }
        mpq_set(term_ss[0], ow.q_ss_between);
        dec_oneway_clear(&ow);
        mpq_set(ssres, ssw);
        params = M.T;
    } else if (M.fit == FIT_CELLS) {
        for (size_t i = 0; i < plan->nterms && rc == AVOW_OK; i++) {
            size_t d = plan->terms[i].df;
            rc = d <= M.T - d ? cells_term_ss(&M, &plan->terms[i], term_ss[i])
                              : cells_term_ss_complement(&M, i, term_ss[i]);
        }
        mpq_set(ssres, ssw);
        params = M.T;
    } else {
        if (N > ((uint64_t)1 << 62)) {
            sb_puts(errs, "the data cannot be analysed (more than 2^62 observations)\n");
            xla_free(term_ss, nrows);
            rc = AVOW_EDOM;
            goto out;
        }
        size_t want = 1 + plan->treat_df + (M.B > 1 ? M.B - 1 : 0);
        if (want > AVOW_MAX_GENERAL_PARAMS) {
            sb_printf(errs, "the model has %zu parameters; with a block or interactions left out avow fits "
                            "at most %d exactly\n  hint: fewer blocks or factor levels, or keep every "
                            "interaction and drop the block\n", want, AVOW_MAX_GENERAL_PARAMS);
            xla_free(term_ss, nrows);
            rc = AVOW_EDOM;
            goto out;
        }
        rc = general_fit(&M);
        if (rc == AVOW_EDOM) {
            int any_empty = 0;
            for (size_t i = 0; i < M.T; i++) if (!M.tn[i]) any_empty = 1;
            if (any_empty) {
                sb_puts(errs, "the data cannot estimate every term of the model: no data for ");
                list_empty(&M, errs);
                sb_puts(errs, plan->interactions == INTER_ALL
                              ? "\n  hint: run the missing combinations, or leave interactions out of the model\n"
                              : "\n  hint: every level of every factor needs data, and the cells with data must "
                                "connect them\n");
            } else {
                sb_puts(errs, "the data cannot estimate every term of the model: the cells with data do not "
                              "connect the levels (some effects are confounded with blocks)\n");
            }
        }
        for (size_t i = 0; i < plan->nterms && rc == AVOW_OK; i++)
            rc = general_ss(&M, M.term_col[i], plan->terms[i].df, term_ss[i]);
        if (rc == AVOW_OK && M.B > 1)
            rc = general_ss(&M, M.term_col[plan->nterms], M.B - 1, term_ss[plan->nterms]);
        /* residual = within cells + lack of fit, sum n_c (m_c - mu_hat_c)^2 */
        mpq_set(ssres, ssw);
        for (size_t c = 0; rc == AVOW_OK && c < M.C; c++) {
            if (!M.n[c]) continue;
            mpq_set_ui(q, 0, 1);
            for (size_t j = 0; j < M.p; j++) {
                signed char x = M.X[c * M.p + j];
                if (x > 0) mpq_add(q, q, M.beta[j]);
                else if (x < 0) mpq_sub(q, q, M.beta[j]);
            }
            mpq_sub(t, M.mean[c], q);
            mpq_mul(t, t, t);
            mpq_set_ui(u, (unsigned long)M.n[c], 1);
            mpq_mul(t, t, u);
            mpq_add(ssres, ssres, t);
        }
        params = M.p;
    }
    if (rc != AVOW_OK) { xla_free(term_ss, nrows); goto out; }
    if (N <= params) {
        sb_printf(errs, "%llu observations for a model with %zu parameters leave no degrees of freedom for the residual\n",
                  (unsigned long long)N, params);
        sb_puts(errs, "  hint: run replicates, or leave interactions out of the model (interactions none)\n");
        xla_free(term_ss, nrows);
        rc = AVOW_EDOM;
        goto out;
    }
    M.dfe = (double)(N - params);
    res->df_lof = M.dfe - res->df_within;
    mpq_set_ui(u, (unsigned long)(N - params), 1);
    mpq_div(M.mse, ssres, u);
    int has_f = mpq_sgn(M.mse) > 0;
    size_t r = 0;
    for (size_t i = 0; i < plan->nterms; i++, r++)
        set_row(&res->anova[r], plan->terms[i].name, ROW_TERM, (double)plan->terms[i].df, term_ss[i], M.mse, has_f);
    if (plan->block) set_row(&res->anova[r++], plan->block->name, ROW_BLOCK, (double)(M.B - 1), term_ss[plan->nterms], M.mse, has_f);
    set_row(&res->anova[r++], "residual", ROW_RESIDUAL, M.dfe, ssres, M.mse, 0);
    set_row(&res->anova[r++], "total", ROW_TOTAL, (double)(N - 1), sst, M.mse, 0);
    res->nanova = r;
    for (size_t i = 0; i + 2 < r; i++)
        res->anova[i].p = isnan(res->anova[i].f) ? NAN : dist_f_q(res->anova[i].f, res->anova[i].df, M.dfe);
    /* Effect sizes of the terms and the block, from the exact sums of squares. */
    res->effects = avow_calloc(r, sizeof *res->effects);
    if (!res->effects) { xla_free(term_ss, nrows); rc = AVOW_ENOMEM; goto out; }
    for (size_t i = 0; i + 2 < r; i++) {
        avow_effect_result *e = &res->effects[i];
        e->ok = dx_effect_sizes_exact(term_ss[i], (uint64_t)res->anova[i].df, ssres, (uint64_t)M.dfe, sst,
                                      &e->es) == AVOW_OK;
        /* Steiger (2004): invert the noncentral F in lambda at the observed F; f = sqrt(lambda / N). */
        double lo, hi;
        if (e->ok && isfinite(res->anova[i].f)
            && ncdist_f_lambda_ci(res->anova[i].f, res->anova[i].df, M.dfe, 1 - rat_to_double(plan->alpha), &lo,
                                  &hi) == AVOW_OK) {
            e->ci_ok = 1;
            e->f_lo = sqrt(lo / (double)N);
            e->f_hi = sqrt(hi / (double)N);
        }
    }
    xla_free(term_ss, nrows);
    /* Results beyond binary64 cannot be shown; say so rather than print infinities. */
    int finite = isfinite(res->grand_mean);
    for (size_t i = 0; i < r && finite; i++) finite = isfinite(res->anova[i].ss);
    for (size_t i = 0; i < M.T && finite; i++) finite = !isinf(res->levels[i].mean) && !isinf(res->levels[i].sd);
    if (!finite) {
        sb_puts(errs, "the data's means or sums of squares exceed the range of binary64 numbers "
                      "(about 1.8e308)\n  hint: rescale the response, for example to other units\n");
        rc = AVOW_EDOM;
        goto out;
    }
    res->mse = dec_mpq_get_d(M.mse);
    res->resid_sd = sqrt(res->mse);
    if (mpq_sgn(sst) > 0) {
        mpq_sub(q, sst, ssres);
        mpq_div(q, q, sst);
        res->r_squared = dec_mpq_get_d(q);
    } else {
        res->r_squared = NAN;
    }

    /* Marginal means of every level (several factors; with a block, the level means
     * adjusted for the blocks). */
    if (plan->nfactors > 1 || plan->block) {
        size_t nm = 0;
        for (size_t f = 0; f < plan->nfactors; f++) nm += plan->factors[f].nlevels;
        res->margins = avow_calloc(nm, sizeof *res->margins);
        mpq_t *c = xla_alloc(M.T);
        if (!res->margins || !c) { xla_free(c, M.T); rc = AVOW_ENOMEM; goto out; }
        plan_explore e = {EXPLORE_PAIRS, 0, -1, 0, {0, 0}};
        for (size_t f = 0; f < plan->nfactors; f++) {
            e.factor = (long)f;
            for (size_t l = 0; l < plan->factors[f].nlevels; l++) {
                avow_margin_result *mr = &res->margins[res->nmargins++];
                mr->factor = f; mr->level = l;
                explore_vector(plan, &e, -1, l, c);
                model_contrast(&M, c, q, t);
                mr->mean = dec_mpq_get_d(q);
                mpq_mul(t, t, M.mse);
                mr->se = sqrt(dec_mpq_get_d(t));
                for (size_t i = 0; i < M.T; i++) if (mpq_sgn(c[i])) mr->n += M.tn[i];
            }
        }
        xla_free(c, M.T);
    }
    /* Reference distributions of the means, for the pictures. */
    {
        double *w = avow_calloc(M.T + res->nmargins + 1, sizeof *w);
        if (!w) { rc = AVOW_ENOMEM; goto out; }
        size_t k = 0;
        for (size_t i = 0; i < M.T; i++) if (M.tn[i]) w[k++] = 1.0 / (double)M.tn[i];
        reference_curve(&res->ref_cells, w, k, res->mse, M.dfe, res->grand_mean);
        for (size_t f = 0, i = 0; f < plan->nfactors && res->nmargins; f++) {
            double centre = 0;
            k = 0;
            for (; i < res->nmargins && res->margins[i].factor == f; i++) {
                w[k++] = res->margins[i].se * res->margins[i].se / res->mse;
                centre += res->margins[i].mean;
            }
            reference_curve(&res->ref_margins[f], w, k, res->mse, M.dfe, k ? centre / (double)k : NAN);
        }
        avow_free(w);
    }
    /* Block summaries. */
    if (plan->block) {
        res->blocks = avow_calloc(M.B, sizeof *res->blocks);
        if (!res->blocks) { rc = AVOW_ENOMEM; goto out; }
        for (size_t b = 0; b < M.B; b++) {
            avow_block_result *br = &res->blocks[b];
            br->label = data->block_labels ? data->block_labels[b] : plan->block->levels[b].name;
            mpq_set_ui(q, 0, 1);
            for (size_t i = 0; i < M.T; i++) {
                size_t c = b * M.T + i;
                br->n += M.n[c];
                mpq_set_ui(u, (unsigned long)M.n[c], 1);
                mpq_mul(t, M.mean[c], u);
                mpq_add(q, q, t);
            }
            if (br->n) {
                mpq_set_ui(u, (unsigned long)br->n, 1);
                mpq_div(q, q, u);
                br->mean = dec_mpq_get_d(q);
            } else {
                br->mean = NAN;
            }
        }
        res->nblocks = M.B;
    }

    /* Planned contrasts. */
    double alpha = rat_to_double(plan->alpha);
    double dfe = M.dfe, qdf = (double)plan->treat_df;
    size_t m = 0;
    for (size_t i = 0; i < plan->ncontrasts; i++) m += plan->contrasts[i].valid;
    res->contrasts = avow_calloc(m ? m : 1, sizeof *res->contrasts);
    res->explores = avow_calloc(plan->nexplores ? plan->nexplores : 1, sizeof *res->explores);
    p = avow_calloc(m ? m : 1, sizeof *p);
    padj = avow_calloc(m ? m : 1, sizeof *padj);
    if (!res->contrasts || !res->explores || !p || !padj) { rc = AVOW_ENOMEM; goto out; }
    for (size_t i = 0, j = 0; i < plan->ncontrasts; i++) {
        if (!plan->contrasts[i].valid) continue;
        contrast_basic(&M, &plan->contrasts[i], plan->separate_variances && M.fit != FIT_GENERAL, &res->contrasts[j]);
        res->contrasts[j].std_effect = res->resid_sd > 0 ? res->contrasts[j].estimate / res->resid_sd : NAN;
        p[j] = res->contrasts[j].p;
        j++;
    }
    res->ncontrasts = m;
    res->t_crit = tq(alpha / 2, dfe);
    double fcrit;
    res->scheffe_crit = (qdf > 0 && dist_f_qinv(alpha, qdf, dfe, &fcrit) == 0) ? sqrt(qdf * fcrit) : NAN;
    res->family_crit = NAN;
    if (m) {
        int ok_p = 1;
        for (size_t j = 0; j < m; j++) if (!(p[j] >= 0 && p[j] <= 1)) ok_p = 0;
        if (plan->adjust == ADJ_SCHEFFE) {
            for (size_t j = 0; j < m; j++) {
                avow_contrast_result *cr = &res->contrasts[j];
                int wrong_way = (cr->pc->side == SIDE_GREATER && cr->t < 0) || (cr->pc->side == SIDE_LESS && cr->t > 0);
                padj[j] = wrong_way ? 1 : dist_f_q(cr->t * cr->t / qdf, qdf, cr->df);
            }
        } else if (ok_p) {
            mult_adjust_p(plan->adjust, p, m, padj);
        } else {
            for (size_t j = 0; j < m; j++) padj[j] = NAN;
        }
        for (size_t j = 0; j < m; j++) {
            avow_contrast_result *cr = &res->contrasts[j];
            cr->p_adj = padj[j];
            cr->reject = padj[j] <= alpha;   /* false when undefined (NaN) */
            int one = cr->pc->side != SIDE_TWO;
            double crit;
            switch (plan->adjust) {
            case ADJ_BONFERRONI:
                crit = tq(one ? alpha / (double)m : alpha / (2.0 * (double)m), cr->df);
                cr->ci_simultaneous = 1;
                break;
            case ADJ_SIDAK: {
                double a1 = mult_sidak_alpha(alpha, m);
                crit = tq(one ? a1 : a1 / 2, cr->df);
                cr->ci_simultaneous = 1;
                break;
            }
            case ADJ_SCHEFFE:
                crit = cr->df == dfe ? res->scheffe_crit
                       : (dist_f_qinv(alpha, qdf, cr->df, &fcrit) == 0 ? sqrt(qdf * fcrit) : NAN);
                cr->ci_simultaneous = 1;
                break;
            default:
                crit = tq(one ? alpha : alpha / 2, cr->df);
                cr->ci_simultaneous = 0;
                break;
            }
            if (cr->ci_simultaneous && !one && cr->df == dfe) res->family_crit = crit;
            set_interval(cr, crit);
        }
        /* Orthogonality with the replicates actually obtained (cell-means fits): the SS of
         * a complete orthogonal set then add up to the treatments' SS. */
        int ortho = M.fit != FIT_GENERAL;
        avow_rat *nr = avow_calloc(M.T, sizeof *nr);
        if (!nr) { rc = AVOW_ENOMEM; goto out; }
        for (size_t i = 0; i < M.T; i++) nr[i] = rat_int((int64_t)M.tn[i]);
        for (size_t a = 0; a < m && ortho; a++)
            for (size_t b = 0; b < a && ortho; b++) {
                avow_rat d;
                if (rat_vec_weighted_dot(res->contrasts[a].pc->coef, res->contrasts[b].pc->coef, nr, M.T, &d)
                    || !rat_is_zero(d))
                    ortho = 0;
            }
        avow_free(nr);
        res->orthogonal_set = ortho;
        res->complete_set = ortho && m == plan->treat_df;
        res->contrast_ss_sum = 0;
        for (size_t j = 0; j < m; j++) res->contrast_ss_sum += res->contrasts[j].ss;
    }

    /* Exploratory contrasts: Scheffe, simultaneous over every treatment contrast. */
    for (size_t i = 0, j = 0; i < plan->nexplores; i++) {
        if (!plan->explores[i].valid) continue;
        avow_contrast_result *cr = &res->explores[j++];
        contrast_basic(&M, &plan->explores[i], 0, cr);
        cr->std_effect = res->resid_sd > 0 ? cr->estimate / res->resid_sd : NAN;
        cr->p_adj = dist_f_q(cr->t * cr->t / qdf, qdf, dfe);
        cr->reject = cr->p_adj <= alpha;
        cr->ci_simultaneous = 1;
        set_interval(cr, res->scheffe_crit);
        res->nexplores = j;
    }

    /* Exploratory pairs and comparisons with a control, per slice. */
    size_t nsets = 0;
    for (size_t i = 0; i < plan->nexplore_sets; i++) {
        const plan_explore *e = &plan->explore_sets[i];
        nsets += e->within >= 0 ? plan->factors[e->within].nlevels : 1;
    }
    if (nsets) {
        res->explore_sets = avow_calloc(nsets, sizeof *res->explore_sets);
        if (!res->explore_sets) { rc = AVOW_ENOMEM; goto out; }
        for (size_t i = 0; i < plan->nexplore_sets && rc == AVOW_OK; i++) {
            const plan_explore *e = &plan->explore_sets[i];
            size_t slices = e->within >= 0 ? plan->factors[e->within].nlevels : 1;
            for (size_t sl = 0; sl < slices && rc == AVOW_OK; sl++) {
                avow_explore_result *er = &res->explore_sets[res->nexplore_sets++];
                er->set = e;
                er->slice = e->within >= 0 ? (long)sl : -1;
                er->k = explore_k(plan, e);
                rc = e->kind == EXPLORE_PAIRS ? explore_pairs(&M, res, er, alpha) : explore_versus(&M, res, er, alpha);
            }
        }
    }
    /* Checks of the assumptions, from the kept observations. */
    if (data->keep && data->nobs) {
        mpq_t *fitted = xla_alloc(M.C);
        double *lev = avow_calloc(M.C, sizeof *lev);
        if (!fitted || !lev) { xla_free(fitted, M.C); avow_free(lev); rc = AVOW_ENOMEM; goto out; }
        for (size_t c = 0; c < M.C; c++) {
            if (M.fit != FIT_GENERAL) {
                mpq_set(fitted[c], M.mean[c]);
                lev[c] = M.n[c] ? 1.0 / (double)M.n[c] : NAN;
                continue;
            }
            const signed char *x = &M.X[c * M.p];
            for (size_t j = 0; j < M.p; j++) {
                if (x[j] > 0) mpq_add(fitted[c], fitted[c], M.beta[j]);
                else if (x[j] < 0) mpq_sub(fitted[c], fitted[c], M.beta[j]);
            }
            /* leverage x' V x */
            mpq_set_ui(q, 0, 1);
            for (size_t j = 0; j < M.p; j++) {
                if (!x[j]) continue;
                for (size_t k = 0; k < M.p; k++) {
                    if (!x[k]) continue;
                    if (x[j] * x[k] > 0) mpq_add(q, q, M.V[j * M.p + k]);
                    else mpq_sub(q, q, M.V[j * M.p + k]);
                }
            }
            lev[c] = dec_mpq_get_d(q);
        }
        rc = eval_diagnose(plan, data, fitted, lev, res);
        xla_free(fitted, M.C);
        avow_free(lev);
    }
out:
    avow_free(p); avow_free(padj);
    mpq_clear(q); mpq_clear(ssw); mpq_clear(sst); mpq_clear(ssres); mpq_clear(gm); mpq_clear(t); mpq_clear(u);
    model_free(&M);
    return rc;
}
