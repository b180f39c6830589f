/* power.c: power and replicates needed, at check time, from the plan block's sigma and
 * detect (plan.h, plan_compute_power). No data are read.
 *
 * F tests of the main effects. The least favourable configuration of a factor with
 * levels l = 1..L for a smallest difference d worth finding puts two level means d apart
 * and every other level mean at their midpoint; with n_l runs at level l the
 * noncentrality is lambda = sum_l n_l (mu_l - mu_bar)^2 / sigma^2, mu_bar the run-weighted
 * mean, minimised over the pair of levels (with equal runs: lambda = n d^2 / (2 sigma^2),
 * n the runs per level). Power = P(F > F_alpha; L - 1, df_resid, lambda) from the
 * noncentral F (noncentral.h). For several factors this is a main effect with no
 * interaction, the other factors' levels balanced (equal replicates per cell), so each
 * level's mean averages the same number of runs.
 *
 * Planned contrasts. The coefficients are scaled so that the positive ones sum to 1 (a
 * difference between two weighted averages), so that a contrast of size d has
 * noncentrality delta = d / (sigma sqrt(sum c_i^2 / n_i)) over the cells. Power of the
 * t test at the per-test level the adjustment implies: none alpha; Bonferroni alpha/m;
 * Sidak 1 - (1 - alpha)^(1/m); Holm and Benjamini-Hochberg alpha/m, the level of their
 * first step (the report says so); Scheffe: |t| beyond sqrt(q F_alpha(q, df_resid)), q
 * the treatment degrees of freedom. Two-sided tests count both tails; one-sided ones the
 * declared tail (the effect assumed in the declared direction).
 *
 * Replicates needed: the smallest equal number n of replicates per cell (in each block)
 * at which every F test and every planned contrast reaches the target power, by
 * doubling and then bisection (power grows with n). */
#include "avow/plan.h"

#include <math.h>
#include <string.h>

#include "avow/dist.h"
#include "avow/noncentral.h"
#include "avow/syntax.h"

/* Largest number of replicates per cell the search considers. */
#define POWER_MAX_N 1000000

/* Blocks in the design (1 without a block). */
static double nblocks(const avow_plan *p)
{
    return p->block ? (double)p->block->nlevels : 1.0;
}

/* Runs per cell (in all blocks): reps[c] * B, or n * B when n > 0 (equal replicates). */
static double cell_runs(const avow_plan *p, size_t c, int64_t n)
{
    double r = n > 0 ? (double)n : (double)p->replicates[c];
    return r * nblocks(p);
}

static double total_runs(const avow_plan *p, int64_t n)
{
    double t = 0;
    for (size_t c = 0; c < p->ncells; c++) t += cell_runs(p, c, n);
    return t;
}

/* Least favourable noncentrality of factor f's main effect. */
static double term_lambda(const avow_plan *p, size_t f, int64_t n, double d_over_sigma)
{
    size_t L = p->factors[f].nlevels;
    double nl[AVOW_MAX_LEVELS];
    double N = 0;
    for (size_t l = 0; l < L; l++) nl[l] = 0;
    for (size_t c = 0; c < p->ncells; c++) nl[plan_cell_level(p, c, f)] += cell_runs(p, c, n);
    for (size_t l = 0; l < L; l++) N += nl[l];
    double best = INFINITY;
    for (size_t i = 0; i < L; i++)
        for (size_t j = i + 1; j < L; j++) {
            /* mu_i = +d/2, mu_j = -d/2, the others 0 (their midpoint) */
            double mbar = (nl[i] - nl[j]) * 0.5 * d_over_sigma / N, lam = 0;
            for (size_t l = 0; l < L; l++) {
                double mu = l == i ? 0.5 * d_over_sigma : l == j ? -0.5 * d_over_sigma : 0;
                lam += nl[l] * (mu - mbar) * (mu - mbar);
            }
            if (lam < best) best = lam;
        }
    return best;
}

/* delta of a contrast: d / (sigma sqrt(sum c^2/n)) with c scaled to positive sum 1. */
static double contrast_delta(const avow_plan *p, const plan_contrast *pc, int64_t n, double d_over_sigma)
{
    double pos = 0, v = 0;
    for (size_t c = 0; c < p->ncells; c++) {
        double x = rat_to_double(pc->coef[c]);
        if (x > 0) pos += x;
    }
    for (size_t c = 0; c < p->ncells; c++) {
        double x = rat_to_double(pc->coef[c]) / pos;
        v += x * x / cell_runs(p, c, n);
    }
    return d_over_sigma / sqrt(v);
}

/* Power of a contrast's test at df, given its per-test level or Scheffe's critical |t|. */
static double contrast_power(const plan_power_contrast *pp, double df, double delta, double crit)
{
    if (!isnan(crit)) {
        /* Scheffe: |t| beyond crit (one-sided: in the declared direction only) */
        double up = ncdist_t_q(crit, df, delta);
        return pp->sides == 1 ? up : up + ncdist_t_p(-crit, df, delta);
    }
    return ncdist_t_power(pp->level, df, delta, pp->sides);
}

static double scheffe_crit(const avow_plan *p, double alpha, double df)
{
    double f, q = (double)p->treat_df;
    if (dist_f_qinv(alpha, q, df, &f) != 0) return NAN;
    return sqrt(q * f);
}

/* Every power at n replicates per cell (0: the planned replicates); the smallest one. */
static double powers_at(const avow_plan *p, plan_power *pw, int64_t n, double alpha, double ds, int store_needed)
{
    double df = total_runs(p, n) - (double)plan_model_params(p);
    double worst = INFINITY;
    if (!(df >= 1)) return NAN;
    for (size_t f = 0; f < pw->nterms; f++) {
        plan_power_term *t = &pw->terms[f];
        double lam = term_lambda(p, f, n, ds);
        double pv = lam <= NCDIST_LAMBDA_MAX ? ncdist_f_power(alpha, t->df1, df, lam) : 1.0;
        if (store_needed) t->power_needed = pv;
        else { t->power = pv; t->lambda = lam; }
        if (!(pv >= worst)) worst = pv;
    }
    double crit = p->adjust == ADJ_SCHEFFE ? scheffe_crit(p, alpha, df) : NAN;
    for (size_t i = 0; i < pw->ncontrasts; i++) {
        plan_power_contrast *c = &pw->contrasts[i];
        double delta = contrast_delta(p, c->pc, n, ds);
        double pv = fabs(delta) <= NCDIST_DELTA_MAX ? contrast_power(c, df, delta, crit) : 1.0;
        if (store_needed) c->power_needed = pv;
        else { c->power = pv; c->delta = delta; c->crit = crit; }
        if (!(pv >= worst)) worst = pv;
    }
    return worst;
}

void plan_compute_power(avow_ctx *ctx, avow_plan *p)
{
    plan_power *pw = &p->powers;
    memset(pw, 0, sizeof *pw);
    if (!p->has_sigma || !p->has_detect || !p->nfactors) return;
    if (!p->replicates && !p->has_power) {
        pw->why_not = "give `replicates N` for the power of the planned design, or `power P` for the replicates needed";
        return;
    }
    if (p->block && p->block_from_data) {
        pw->why_not = "the number of blocks is known only from the data; declare the block's levels";
        return;
    }
    double alpha = rat_to_double(p->alpha);
    double ds = rat_to_double(p->detect) / rat_to_double(p->sigma);
    pw->nterms = p->nfactors;
    pw->terms = arena_alloc(ctx->arena, pw->nterms * sizeof *pw->terms);
    size_t m = 0;
    for (size_t i = 0; i < p->ncontrasts; i++) m += p->contrasts[i].valid;
    pw->contrasts = arena_alloc(ctx->arena, (m ? m : 1) * sizeof *pw->contrasts);
    if (!pw->terms || !pw->contrasts) { ctx->oom = 1; return; }
    for (size_t f = 0; f < p->nfactors; f++) {
        pw->terms[f].name = p->factors[f].name;
        pw->terms[f].df1 = (double)(p->factors[f].nlevels - 1);
        pw->terms[f].power = pw->terms[f].power_needed = NAN;
    }
    for (size_t i = 0; i < p->ncontrasts; i++) {
        if (!p->contrasts[i].valid) continue;
        plan_power_contrast *c = &pw->contrasts[pw->ncontrasts++];
        c->pc = &p->contrasts[i];
        c->sides = c->pc->side == SIDE_TWO ? 2 : 1;
        c->crit = NAN;
        c->power = c->power_needed = NAN;
        switch (p->adjust) {
        case ADJ_NONE: c->level = alpha; break;
        case ADJ_SIDAK: c->level = mult_sidak_alpha(alpha, m); break;
        case ADJ_SCHEFFE: c->level = NAN; break;
        default: c->level = alpha / (double)m; break;   /* Bonferroni; Holm and BH: first step */
        }
    }
    pw->computed = 1;
    if (p->replicates) {
        pw->df2 = total_runs(p, 0) - (double)plan_model_params(p);
        pw->at_planned = pw->df2 >= 1;
        if (pw->at_planned) powers_at(p, pw, 0, alpha, ds, 0);
    }
    if (p->has_power) {
        pw->has_target = 1;
        pw->target = rat_to_double(p->power);
        /* doubling, then bisection on n */
        int64_t lo = 1, hi = 2;
        while (hi <= POWER_MAX_N) {
            double w = powers_at(p, pw, hi, alpha, ds, 1);
            if (w >= pw->target) break;
            lo = hi;
            hi *= 2;
        }
        if (hi > POWER_MAX_N) {
            pw->needed = 0;
        } else {
            while (hi - lo > 1) {
                int64_t mid = lo + (hi - lo) / 2;
                double w = powers_at(p, pw, mid, alpha, ds, 1);
                if (w >= pw->target) hi = mid; else lo = mid;
            }
            pw->needed = hi;
            pw->needed_runs = (int64_t)total_runs(p, hi);
            pw->needed_df2 = total_runs(p, hi) - (double)plan_model_params(p);
            powers_at(p, pw, hi, alpha, ds, 1);
        }
    }
}
