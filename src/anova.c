/* anova.c: the analysis of `avow run` for one factor: level summaries, the ANOVA table,
 * planned contrasts with their multiplicity adjustment, and exploratory contrasts by
 * Scheffe's method. Sums of squares, means and contrast estimates are exact rationals
 * (GMP) from the exact per-level sums, rounded once to binary64 at the end. */
#include "avow/evaluate.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "avow/dist.h"
#include "avow/dunnett.h"
#include "avow/multiplicity.h"
#include "avow/srange.h"

/* Exact decimal text of v: plain digits while the number needs at most 6 zeros of
 * padding, scientific notation (d.ddde+N) beyond. */
static void dec_text(avow_dec v, char *out, size_t size)
{
    char digits[24], buf[96];
    int neg = v.sig < 0;
    unsigned long long m = neg ? (unsigned long long)(-(v.sig + 1)) + 1 : (unsigned long long)v.sig;
    int nd = snprintf(digits, sizeof digits, "%llu", m);
    long e = v.exp;
    size_t n = 0;
    if (neg) buf[n++] = '-';
    if (v.sig == 0) {
        buf[n++] = '0';
    } else if (e >= 0 && e <= 6) {
        memcpy(buf + n, digits, (size_t)nd); n += (size_t)nd;
        for (long z = 0; z < e; z++) buf[n++] = '0';
    } else if (e < 0 && -e < nd) {
        memcpy(buf + n, digits, (size_t)(nd + e)); n += (size_t)(nd + e);
        buf[n++] = '.';
        memcpy(buf + n, digits + nd + e, (size_t)-e); n += (size_t)-e;
    } else if (e < 0 && -e - nd <= 6) {
        buf[n++] = '0'; buf[n++] = '.';
        for (long z = 0; z < -e - nd; z++) buf[n++] = '0';
        memcpy(buf + n, digits, (size_t)nd); n += (size_t)nd;
    } else {
        buf[n++] = digits[0];
        if (nd > 1) { buf[n++] = '.'; memcpy(buf + n, digits + 1, (size_t)nd - 1); n += (size_t)nd - 1; }
        n += (size_t)snprintf(buf + n, sizeof buf - n, "e%+ld", e + nd - 1);
    }
    buf[n] = 0;
    snprintf(out, size, "%s", buf);
}

static void set_rat(mpq_t q, avow_rat r)
{
    mpz_set_si(mpq_numref(q), (long)r.num);
    mpz_set_si(mpq_denref(q), (long)r.den);
    mpq_canonicalize(q);
}

static void set_u64(mpq_t q, uint64_t n)
{
    mpz_set_ui(mpq_numref(q), (unsigned long)n);
    mpz_set_ui(mpq_denref(q), 1);
}

void eval_results_free(avow_results *res)
{
    avow_free(res->levels);
    avow_free(res->contrasts);
    avow_free(res->explores);
    avow_free(res->pairs);
    avow_free(res->versus);
    res->levels = NULL; res->contrasts = res->explores = NULL;
    res->pairs = res->versus = NULL;
}

/* Exact difference of two means and the factor 1/n_a + 1/n_b, both rounded once. */
static void pair_basic(mpq_t *means, const avow_results *res, size_t a, size_t b, const mpq_t mse,
                       avow_pair_result *out)
{
    mpq_t d, v, t;
    mpq_init(d); mpq_init(v); mpq_init(t);
    mpq_sub(d, means[a], means[b]);
    set_u64(t, res->levels[a].n);
    mpq_inv(v, t);
    set_u64(t, res->levels[b].n);
    mpq_inv(t, t);
    mpq_add(v, v, t);
    mpq_mul(v, v, mse);                 /* SE^2 = MSE (1/n_a + 1/n_b), exactly */
    out->a = a; out->b = b;
    out->df = (double)(res->n - res->ncells);
    out->estimate = dec_mpq_get_d(d);
    out->se = sqrt(dec_mpq_get_d(v));
    mpq_clear(d); mpq_clear(v); mpq_clear(t);
}

/* All pairs by Tukey-Kramer (Kramer 1956): q = |d| / sqrt(MSE/2 (1/n_a + 1/n_b)) referred to
 * the studentized range with k means and the residual df; simultaneous intervals
 * d +- q_alpha / sqrt(2) * SE. */
static int explore_pairs(const avow_plan *plan, mpq_t *means, avow_results *res, const mpq_t mse,
                         double alpha, double df)
{
    size_t k = plan->ncells;
    size_t n = k * (k - 1) / 2;
    res->pairs = avow_calloc(n ? n : 1, sizeof *res->pairs);
    if (!res->pairs) return AVOW_ENOMEM;
    double q;
    res->pairs_crit = srange_qinv(alpha, (double)k, df, &q) == 0 ? q : NAN;
    size_t m = 0;
    for (size_t b = 0; b < k; b++)
        for (size_t a = b + 1; a < k; a++) {
            avow_pair_result *r = &res->pairs[m++];
            pair_basic(means, res, a, b, mse, r);
            r->stat = r->se > 0 ? fabs(r->estimate) / r->se * sqrt(2.0) : NAN;
            r->p_adj = srange_sf(r->stat, (double)k, df);
            r->reject = r->p_adj <= alpha;
            double half = res->pairs_crit / sqrt(2.0) * r->se;
            r->ci_lo = r->estimate - half;
            r->ci_hi = r->estimate + half;
        }
    res->npairs = m;
    return AVOW_OK;
}

/* All pairs by Games & Howell (1976), each level with its own variance: SE^2 = s_a^2/n_a +
 * s_b^2/n_b, q = |d| / sqrt(SE^2 / 2), Welch-Satterthwaite df per pair, referred to the
 * studentized range with k means; intervals d +- q_alpha(k, df_ab) / sqrt(2) * SE. */
static int explore_pairs_separate(const avow_plan *plan, mpq_t *means, avow_results *res, double alpha)
{
    size_t k = plan->ncells;
    size_t n = k * (k - 1) / 2;
    res->pairs = avow_calloc(n ? n : 1, sizeof *res->pairs);
    if (!res->pairs) return AVOW_ENOMEM;
    res->pairs_crit = NAN;              /* one per pair: its df differs */
    size_t m = 0;
    mpq_t d;
    mpq_init(d);
    for (size_t b = 0; b < k; b++)
        for (size_t a = b + 1; a < k; a++) {
            avow_pair_result *r = &res->pairs[m++];
            const avow_level_result *A = &res->levels[a], *B = &res->levels[b];
            mpq_sub(d, means[a], means[b]);
            r->a = a; r->b = b;
            r->estimate = dec_mpq_get_d(d);
            double va = A->sd * A->sd / (double)A->n, vb = B->sd * B->sd / (double)B->n;
            double df = (va + vb) * (va + vb) / (va * va / (double)(A->n - 1) + vb * vb / (double)(B->n - 1));
            r->se = sqrt(va + vb);
            r->df = df;
            r->stat = r->se > 0 ? fabs(r->estimate) / r->se * sqrt(2.0) : NAN;
            r->p_adj = isfinite(df) && df > 0 ? srange_sf(r->stat, (double)k, df) : NAN;
            r->reject = r->p_adj <= alpha;
            double q;
            double half = (isfinite(df) && df > 0 && srange_qinv(alpha, (double)k, df, &q) == 0)
                          ? q / sqrt(2.0) * r->se : NAN;
            r->ci_lo = r->estimate - half;
            r->ci_hi = r->estimate + half;
        }
    mpq_clear(d);
    res->npairs = m;
    return AVOW_OK;
}

/* Each level against the control by Dunnett's method (Dunnett 1955; AS 251): t_i =
 * (mean_i - mean_0) / SE_i, the maximum of |t_i| referred to the many-to-one multivariate
 * t with correlations lambda_i lambda_j, lambda_i = sqrt(n_i / (n_i + n_0)). */
static int explore_versus(const avow_plan *plan, mpq_t *means, avow_results *res, const mpq_t mse,
                          double alpha, double df)
{
    size_t k = plan->ncells, c = plan->versus_cell, p = k - 1;
    res->versus = avow_calloc(p ? p : 1, sizeof *res->versus);
    double *lambda = avow_calloc(p ? p : 1, sizeof *lambda);
    if (!res->versus || !lambda) { avow_free(lambda); return AVOW_ENOMEM; }
    double n0 = (double)res->levels[c].n;
    for (size_t i = 0, j = 0; i < k; i++) {
        if (i == c) continue;
        double ni = (double)res->levels[i].n;
        lambda[j++] = sqrt(ni / (ni + n0));
    }
    double d;
    res->versus_crit = dunnett_qinv(alpha, lambda, p, df, 1, &d) == 0 ? d : NAN;
    for (size_t i = 0, j = 0; i < k; i++) {
        if (i == c) continue;
        avow_pair_result *r = &res->versus[j++];
        pair_basic(means, res, i, c, mse, r);
        r->stat = r->se > 0 ? fabs(r->estimate) / r->se : NAN;
        double sf;
        r->p_adj = isnan(r->stat) ? NAN : dunnett_sf(r->stat, lambda, p, df, 1, &sf) == 0 ? sf : NAN;
        r->reject = r->p_adj <= alpha;
        r->ci_lo = r->estimate - res->versus_crit * r->se;
        r->ci_hi = r->estimate + res->versus_crit * r->se;
    }
    res->nversus = p;
    avow_free(lambda);
    return AVOW_OK;
}

/* Exact estimate and variance factor of a contrast: L = sum c_i ybar_i and
 * v = sum c_i^2 / n_i, both as rationals. */
static void contrast_exact(const avow_rat *c, mpq_t *means, const avow_acc *cells, size_t k,
                           mpq_t L, mpq_t v)
{
    mpq_t ci, term;
    mpq_init(ci); mpq_init(term);
    mpq_set_ui(L, 0, 1);
    mpq_set_ui(v, 0, 1);
    for (size_t i = 0; i < k; i++) {
        if (c[i].num == 0) continue;
        set_rat(ci, c[i]);
        mpq_mul(term, ci, means[i]);
        mpq_add(L, L, term);
        mpq_mul(term, ci, ci);
        mpq_t n;
        mpq_init(n);
        set_u64(n, dec_acc_n(&cells[i]));
        mpq_div(term, term, n);
        mpq_add(v, v, term);
        mpq_clear(n);
    }
    mpq_clear(ci); mpq_clear(term);
}

/* Fill estimate, se, t, ss and the unadjusted p of one contrast. */
static void contrast_basic(const plan_contrast *pc, mpq_t *means, const avow_acc *cells, size_t k,
                           const mpq_t mse, double df, avow_contrast_result *out)
{
    mpq_t L, v, t;
    mpq_init(L); mpq_init(v); mpq_init(t);
    contrast_exact(pc->coef, means, cells, k, L, v);
    out->pc = pc;
    out->df = df;
    out->estimate = dec_mpq_get_d(L);
    mpq_mul(t, mse, v);                 /* SE^2 = MSE * v, exactly */
    out->se = sqrt(dec_mpq_get_d(t));
    mpq_mul(t, L, L);
    mpq_div(t, t, v);                   /* SS = L^2 / v, exactly */
    out->ss = dec_mpq_get_d(t);
    out->t = out->se > 0 ? out->estimate / out->se : NAN;
    switch (pc->side) {
    case SIDE_GREATER: out->p = dist_t_q(out->t, df); break;
    case SIDE_LESS: out->p = dist_t_q(-out->t, df); break;
    default: out->p = dist_t_p2(out->t, df); break;
    }
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

int eval_analyse(const avow_plan *plan, const avow_acc *cells, avow_results *res, strbuf *errs)
{
    size_t k = plan->ncells;
    res->ncells = k;
    res->levels = avow_calloc(k, sizeof *res->levels);
    if (!res->levels) return AVOW_ENOMEM;
    avow_oneway ow;
    int rc = dec_oneway(cells, k, &ow);
    if (rc) {
        sb_puts(errs, "the data cannot be analysed (no observations, or more than 2^64)\n");
        return AVOW_EDOM;
    }
    double *p = NULL, *padj = NULL;
    int *rej = NULL;
    mpq_t *means = avow_calloc(k, sizeof *means);
    if (!means) { dec_oneway_clear(&ow); return AVOW_ENOMEM; }
    mpq_t ss_i, q;
    mpq_init(ss_i); mpq_init(q);
    for (size_t i = 0; i < k; i++) {
        avow_level_result *L = &res->levels[i];
        const avow_acc *a = &cells[i];
        mpq_init(means[i]);
        dec_acc_mean(a, means[i]);
        L->n = dec_acc_n(a);
        L->mean = dec_mpq_get_d(means[i]);
        dec_acc_ss(a, ss_i);
        if (L->n > 1) {
            set_u64(q, L->n - 1);
            mpq_div(q, ss_i, q);
            L->sd = sqrt(dec_mpq_get_d(q));
        } else {
            L->sd = NAN;
        }
        avow_dec mn, mx;
        dec_acc_min(a, &mn);
        dec_acc_max(a, &mx);
        L->min = dec_get_d(mn);
        L->max = dec_get_d(mx);
        dec_text(mn, L->min_text, sizeof L->min_text);
        dec_text(mx, L->max_text, sizeof L->max_text);
        L->exact = dec_acc_is_exact(a);
    }
    uint64_t N = ow.n;
    res->n = N;
    res->grand_mean = ow.grand_mean;
    double dfb = (double)(k - 1), dfw = (double)(N - k), dft = (double)(N - 1);
    /* Mean squares and F exactly, then rounded. */
    mpq_t msb, msw, f;
    mpq_init(msb); mpq_init(msw); mpq_init(f);
    set_u64(q, k - 1);
    mpq_div(msb, ow.q_ss_between, q);
    set_u64(q, N - k);
    mpq_div(msw, ow.q_ss_within, q);
    int has_f = mpq_sgn(msw) > 0;
    if (has_f) mpq_div(f, msb, msw);
    avow_anova_row *A = res->anova;
    A[0] = (avow_anova_row){plan->factors[0].name, dfb, ow.ss_between, dec_mpq_get_d(msb),
                            has_f ? dec_mpq_get_d(f) : NAN, NAN};
    A[0].p = has_f ? dist_f_q(A[0].f, dfb, dfw) : NAN;
    A[1] = (avow_anova_row){"residual", dfw, ow.ss_within, dec_mpq_get_d(msw), NAN, NAN};
    A[2] = (avow_anova_row){"total", dft, ow.ss_total, NAN, NAN, NAN};
    /* Results beyond binary64 cannot be shown; say so rather than print infinities. */
    int finite = isfinite(ow.grand_mean) && isfinite(A[0].ss) && isfinite(A[1].ss) && isfinite(A[2].ss);
    for (size_t i = 0; i < k && finite; i++) finite = isfinite(res->levels[i].mean) && !isinf(res->levels[i].sd);
    if (!finite) {
        sb_puts(errs, "the data's means or sums of squares exceed the range of binary64 numbers "
                      "(about 1.8e308)\n  hint: rescale the response, for example to other units\n");
        rc = AVOW_EDOM;
        goto out;
    }
    res->mse = A[1].ms;
    res->resid_sd = sqrt(res->mse);
    if (mpq_sgn(ow.q_ss_total) > 0) {
        mpq_div(q, ow.q_ss_between, ow.q_ss_total);
        res->r_squared = dec_mpq_get_d(q);
    } else {
        res->r_squared = NAN;
    }

    /* Planned contrasts. */
    double alpha = rat_to_double(plan->alpha);
    size_t m = 0;
    for (size_t i = 0; i < plan->ncontrasts; i++) m += plan->contrasts[i].valid;
    res->contrasts = avow_calloc(m ? m : 1, sizeof *res->contrasts);
    res->explores = avow_calloc(plan->nexplores ? plan->nexplores : 1, sizeof *res->explores);
    p = avow_calloc(m ? m : 1, sizeof *p);
    padj = avow_calloc(m ? m : 1, sizeof *padj);
    rej = avow_calloc(m ? m : 1, sizeof *rej);
    if (!res->contrasts || !res->explores || !p || !padj || !rej) { rc = AVOW_ENOMEM; goto out; }
    for (size_t i = 0, j = 0; i < plan->ncontrasts; i++) {
        if (!plan->contrasts[i].valid) continue;
        contrast_basic(&plan->contrasts[i], means, cells, k, msw, dfw, &res->contrasts[j]);
        p[j] = res->contrasts[j].p;
        j++;
    }
    res->ncontrasts = m;
    res->t_crit = tq(alpha / 2, dfw);
    double fcrit;
    res->scheffe_crit = (k > 1 && dist_f_qinv(alpha, dfb, dfw, &fcrit) == 0) ? sqrt(dfb * fcrit) : NAN;
    res->family_crit = NAN;
    if (m) {
        int ok_p = 1;
        for (size_t j = 0; j < m; j++) if (!(p[j] >= 0 && p[j] <= 1)) ok_p = 0;
        if (plan->adjust == ADJ_SCHEFFE) {
            for (size_t j = 0; j < m; j++) {
                avow_contrast_result *r = &res->contrasts[j];
                int wrong_way = (r->pc->side == SIDE_GREATER && r->t < 0) || (r->pc->side == SIDE_LESS && r->t > 0);
                padj[j] = wrong_way ? 1 : dist_f_q(r->t * r->t / dfb, dfb, dfw);
            }
        } else if (ok_p) {
            mult_adjust_p(plan->adjust, p, m, padj);
        } else {
            for (size_t j = 0; j < m; j++) padj[j] = NAN;
        }
        for (size_t j = 0; j < m; j++) {
            avow_contrast_result *r = &res->contrasts[j];
            r->p_adj = padj[j];
            r->reject = padj[j] <= alpha;   /* false when undefined (NaN) */
            int one = r->pc->side != SIDE_TWO;
            double crit;
            switch (plan->adjust) {
            case ADJ_BONFERRONI:
                crit = tq(one ? alpha / (double)m : alpha / (2.0 * (double)m), dfw);
                r->ci_simultaneous = 1;
                break;
            case ADJ_SIDAK: {
                double a1 = mult_sidak_alpha(alpha, m);
                crit = tq(one ? a1 : a1 / 2, dfw);
                r->ci_simultaneous = 1;
                break;
            }
            case ADJ_SCHEFFE:
                crit = res->scheffe_crit;
                r->ci_simultaneous = 1;
                break;
            default:
                crit = tq(one ? alpha : alpha / 2, dfw);
                r->ci_simultaneous = 0;
                break;
            }
            if (r->ci_simultaneous && !one) res->family_crit = crit;
            set_interval(r, crit);
        }
        /* Orthogonality with the replicates actually obtained. */
        avow_rat *nr = avow_calloc(k, sizeof *nr);
        if (!nr) { rc = AVOW_ENOMEM; goto out; }
        int ortho = 1;
        for (size_t i = 0; i < k; i++) nr[i] = rat_int((int64_t)res->levels[i].n);
        for (size_t a = 0; a < m && ortho; a++)
            for (size_t b = 0; b < a && ortho; b++) {
                avow_rat d;
                if (rat_vec_weighted_dot(res->contrasts[a].pc->coef, res->contrasts[b].pc->coef, nr, k, &d)
                    || !rat_is_zero(d))
                    ortho = 0;
            }
        avow_free(nr);
        res->orthogonal_set = ortho;
        res->complete_set = ortho && m == k - 1;
        res->contrast_ss_sum = 0;
        for (size_t j = 0; j < m; j++) res->contrast_ss_sum += res->contrasts[j].ss;
    }

    /* Exploratory contrasts: Scheffe, simultaneous over every contrast. */
    for (size_t i = 0, j = 0; i < plan->nexplores; i++) {
        if (!plan->explores[i].valid) continue;
        avow_contrast_result *r = &res->explores[j++];
        contrast_basic(&plan->explores[i], means, cells, k, msw, dfw, r);
        r->p_adj = dist_f_q(r->t * r->t / dfb, dfb, dfw);
        r->reject = r->p_adj <= alpha;
        r->ci_simultaneous = 1;
        set_interval(r, res->scheffe_crit);
        res->nexplores = j;
    }
    if (plan->explore_pairs && k >= 2) {
        rc = plan->separate_variances ? explore_pairs_separate(plan, means, res, alpha)
                                      : explore_pairs(plan, means, res, msw, alpha, dfw);
        if (rc != AVOW_OK) goto out;
    }
    if (plan->has_versus && k >= 2 && (rc = explore_versus(plan, means, res, msw, alpha, dfw)) != AVOW_OK)
        goto out;
out:
    avow_free(p); avow_free(padj); avow_free(rej);
    for (size_t i = 0; i < k; i++) mpq_clear(means[i]);
    avow_free(means);
    mpq_clear(ss_i); mpq_clear(q); mpq_clear(msb); mpq_clear(msw); mpq_clear(f);
    dec_oneway_clear(&ow);
    return rc;
}
