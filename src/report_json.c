/* report_json.c: the avow.report/1 JSON contract of `avow run` (ARCHITECTURE.md).
 * Numbers with 17 significant digits; values that do not exist are null. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "avow/render.h"

/* JSON number with 17 significant digits (round-trips binary64); null when not finite. */
static void num17(strbuf *o, double v)
{
    if (!isfinite(v)) { sb_puts(o, "null"); return; }
    if (v == 0) { sb_puts(o, "0"); return; }
    sb_printf(o, "%.17g", v);
}

static void key(strbuf *o, const char *k)
{
    json_string(o, k);
    sb_puts(o, ": ");
}

static void contrast_json(strbuf *o, const avow_plan *p, const avow_contrast_result *r, int planned)
{
    const plan_contrast *pc = r->pc;
    sb_puts(o, "{");
    key(o, "name"); json_string(o, pc->name);
    sb_puts(o, ", "); key(o, "expression"); json_string(o, pc->expr);
    sb_puts(o, ", "); key(o, "description"); json_string(o, pc->desc);
    sb_puts(o, ",\n      "); key(o, "coefficients"); sb_putc(o, '{');
    for (size_t c = 0; c < p->ncells; c++) {
        if (c) sb_puts(o, ", ");
        key(o, plan_cell_name(p, c));
        num17(o, rat_to_double(pc->coef[c]));
    }
    sb_puts(o, "},\n      "); key(o, "coefficients_exact"); sb_putc(o, '{');
    for (size_t c = 0; c < p->ncells; c++) {
        char buf[48];
        if (c) sb_puts(o, ", ");
        key(o, plan_cell_name(p, c));
        rat_format(pc->coef[c], buf, sizeof buf);
        json_string(o, buf);
    }
    sb_puts(o, "},\n      ");
    key(o, "alternative");
    json_string(o, pc->side == SIDE_GREATER ? "greater" : pc->side == SIDE_LESS ? "less" : "two-sided");
    sb_puts(o, ", "); key(o, "estimate"); num17(o, r->estimate);
    sb_puts(o, ", "); key(o, "se"); num17(o, r->se);
    sb_puts(o, ", "); key(o, "df"); num17(o, r->df);
    sb_puts(o, ", "); key(o, "t"); num17(o, r->t);
    sb_puts(o, ",\n      "); key(o, "p"); num17(o, r->p);
    sb_puts(o, ", "); key(o, "p_adjusted"); num17(o, r->p_adj);
    sb_puts(o, ", "); key(o, "ci"); sb_putc(o, '['); num17(o, r->ci_lo); sb_puts(o, ", "); num17(o, r->ci_hi);
    sb_puts(o, "], "); key(o, "ci_simultaneous"); sb_puts(o, r->ci_simultaneous ? "true" : "false");
    if (planned) { sb_puts(o, ", "); key(o, "ss"); num17(o, r->ss); }
    sb_puts(o, ", "); key(o, "reject"); sb_puts(o, r->reject ? "true" : "false");
    sb_putc(o, '}');
}

static const char *mean_name(const avow_plan *p, const plan_explore *e, size_t i)
{
    if (e->factor < 0) return plan_cell_name(p, i);
    return p->factors[e->factor].levels[i].name;
}

static void pairs_json(strbuf *o, const avow_plan *p, const plan_explore *e, const avow_pair_result *rs, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        const avow_pair_result *r = &rs[i];
        const char *a = mean_name(p, e, r->a), *b = mean_name(p, e, r->b);
        strbuf name = {0};
        sb_printf(&name, "%s - %s", a, b);
        sb_puts(o, i ? ",\n      {" : "\n      {");
        key(o, "name"); json_string(o, name.s ? name.s : "");
        sb_free(&name);
        sb_puts(o, ", "); key(o, "a"); json_string(o, a);
        sb_puts(o, ", "); key(o, "b"); json_string(o, b);
        sb_puts(o, ", "); key(o, "estimate"); num17(o, r->estimate);
        sb_puts(o, ", "); key(o, "se"); num17(o, r->se);
        sb_puts(o, ", "); key(o, "df"); num17(o, r->df);
        sb_puts(o, ", "); key(o, "statistic"); num17(o, r->stat);
        sb_puts(o, ", "); key(o, "p_adjusted"); num17(o, r->p_adj);
        sb_puts(o, ", "); key(o, "ci"); sb_putc(o, '['); num17(o, r->ci_lo); sb_puts(o, ", ");
        num17(o, r->ci_hi); sb_puts(o, "], ");
        key(o, "reject"); sb_puts(o, r->reject ? "true" : "false");
        sb_putc(o, '}');
    }
}

static void effects_json(strbuf *o, const avow_plan *p, const avow_results *r)
{
    sb_puts(o, "  \"effect_sizes\": {\"terms\": [");
    int first = 1;
    for (size_t i = 0; i + 2 < r->nanova; i++) {
        const avow_effect_result *e = &r->effects[i];
        sb_puts(o, first ? "\n    {" : ",\n    {");
        first = 0;
        key(o, "source"); json_string(o, r->anova[i].source);
        sb_puts(o, ", "); key(o, "eta_squared"); num17(o, e->ok ? e->es.eta2 : NAN);
        sb_puts(o, ", "); key(o, "partial_eta_squared"); num17(o, e->ok ? e->es.partial_eta2 : NAN);
        sb_puts(o, ", "); key(o, "omega_squared"); num17(o, e->ok ? e->es.omega2 : NAN);
        sb_puts(o, ", "); key(o, "cohen_f"); num17(o, e->ok ? e->es.cohen_f : NAN);
        sb_puts(o, ", "); key(o, "cohen_f_ci");
        if (e->ci_ok) { sb_putc(o, '['); num17(o, e->f_lo); sb_puts(o, ", "); num17(o, e->f_hi); sb_putc(o, ']'); }
        else sb_puts(o, "null");
        sb_putc(o, '}');
    }
    sb_puts(o, first ? "], \"contrasts\": [" : "\n  ], \"contrasts\": [");
    for (size_t i = 0; i < r->ncontrasts; i++) {
        sb_puts(o, i ? ", {" : "{");
        key(o, "name"); json_string(o, r->contrasts[i].pc->name);
        sb_puts(o, ", "); key(o, "standardized"); num17(o, r->contrasts[i].std_effect);
        sb_putc(o, '}');
    }
    (void)p;
    sb_puts(o, "]},\n");
}

/* {"statistic": .., "df1": .., "df2": .., "p": ..} or {"not_computed": "reason"} */
static void ftest_json(strbuf *o, int rc, const avow_dx_ftest *t)
{
    if (rc != AVOW_OK) { sb_puts(o, "{\"not_computed\": "); json_string(o, dx_status_text(rc)); sb_putc(o, '}'); return; }
    sb_puts(o, "{\"statistic\": "); num17(o, t->stat);
    sb_puts(o, ", \"df1\": "); num17(o, t->df1);
    sb_puts(o, ", \"df2\": "); num17(o, t->df2);
    sb_puts(o, ", \"p\": "); num17(o, t->p);
    sb_putc(o, '}');
}

static void checks_json(strbuf *o, const avow_plan *p, const avow_results *r)
{
    const avow_assumptions *A = &r->checks;
    if (!A->computed) {
        sb_puts(o, "  \"diagnostics\": {\"computed\": false},\n  \"robust\": null,\n");
        return;
    }
    sb_printf(o, "  \"diagnostics\": {\"computed\": true, \"groups\": %zu, \"on_residuals\": %s,\n    \"levene\": ",
              A->ngroups, A->on_residuals ? "true" : "false");
    ftest_json(o, A->levene_rc, &A->levene);
    sb_puts(o, ",\n    \"brown_forsythe\": ");
    ftest_json(o, A->bf_rc, &A->bf);
    sb_puts(o, ",\n    \"bartlett\": ");
    if (A->bartlett_rc != AVOW_OK) { sb_puts(o, "{\"not_computed\": "); json_string(o, dx_status_text(A->bartlett_rc)); sb_putc(o, '}'); }
    else {
        sb_puts(o, "{\"statistic\": "); num17(o, A->bartlett.stat);
        sb_puts(o, ", \"df\": "); num17(o, A->bartlett.df);
        sb_puts(o, ", \"p\": "); num17(o, A->bartlett.p);
        sb_putc(o, '}');
    }
    sb_printf(o, ",\n    \"shapiro_wilk\": ");
    if (A->shapiro_rc != AVOW_OK) { sb_puts(o, "{\"not_computed\": "); json_string(o, dx_status_text(A->shapiro_rc)); sb_putc(o, '}'); }
    else {
        sb_printf(o, "{\"n\": %zu, \"w\": ", A->nresid); num17(o, A->shapiro.w);
        sb_puts(o, ", \"p\": "); num17(o, A->shapiro.p);
        sb_putc(o, '}');
    }
    sb_puts(o, ",\n    \"residual_moments\": ");
    if (A->moments_rc != AVOW_OK) { sb_puts(o, "{\"not_computed\": "); json_string(o, dx_status_text(A->moments_rc)); sb_putc(o, '}'); }
    else {
        sb_puts(o, "{\"skewness\": "); num17(o, A->moments.skewness);
        sb_puts(o, ", \"excess_kurtosis\": "); num17(o, A->moments.kurtosis);
        sb_putc(o, '}');
    }
    sb_puts(o, ",\n    \"unusual\": {\"limit\": "); num17(o, A->unusual_limit);
    if (A->unusual_rc != AVOW_OK) { sb_puts(o, ", \"not_computed\": "); json_string(o, dx_status_text(A->unusual_rc)); }
    sb_printf(o, ", \"count\": %zu, \"listed\": [", A->nunusual_total);
    for (size_t i = 0; i < A->nunusual; i++) {
        const avow_unusual *u = &A->unusual[i];
        sb_printf(o, "%s{\"line\": %llu, \"cell\": ", i ? ", " : "", (unsigned long long)u->line);
        json_string(o, plan_cell_name(p, u->cell));
        sb_puts(o, ", \"block\": ");
        json_string(o, r->nblocks ? r->blocks[u->block].label : NULL);
        sb_puts(o, ", \"value\": "); json_string(o, u->value_text);
        sb_puts(o, ", \"fitted\": "); num17(o, u->fitted);
        sb_puts(o, ", \"residual\": "); num17(o, u->residual);
        sb_puts(o, ", \"t\": "); num17(o, u->t);
        sb_putc(o, '}');
    }
    sb_puts(o, "]}},\n  \"robust\": ");
    if (!A->robust_applies) { sb_puts(o, "null,\n"); return; }
    sb_puts(o, "{\"welch\": ");
    ftest_json(o, A->welch_rc, &A->welch);
    sb_puts(o, ", \"kruskal_wallis\": ");
    if (A->kruskal_rc != AVOW_OK) { sb_puts(o, "{\"not_computed\": "); json_string(o, dx_status_text(A->kruskal_rc)); sb_putc(o, '}'); }
    else {
        sb_puts(o, "{\"h\": "); num17(o, A->kruskal.test.stat);
        sb_puts(o, ", \"h_uncorrected\": "); num17(o, A->kruskal.h_uncorrected);
        sb_puts(o, ", \"tie_factor\": "); num17(o, A->kruskal.tie_factor);
        sb_puts(o, ", \"df\": "); num17(o, A->kruskal.test.df);
        sb_puts(o, ", \"p\": "); num17(o, A->kruskal.test.p);
        sb_putc(o, '}');
    }
    sb_puts(o, "},\n");
}

/* The marginal means (model-based): factor, level, n, mean, se. */
static void margins_json(strbuf *o, const avow_plan *p, const avow_results *r)
{
    for (size_t i = 0; i < r->nmargins; i++) {
        const avow_margin_result *mr = &r->margins[i];
        sb_puts(o, i ? ",\n    {" : "\n    {");
        key(o, "factor"); json_string(o, p->factors[mr->factor].name);
        sb_puts(o, ", "); key(o, "level"); json_string(o, p->factors[mr->factor].levels[mr->level].name);
        sb_printf(o, ", \"n\": %llu, ", (unsigned long long)mr->n);
        key(o, "mean"); num17(o, mr->mean);
        sb_puts(o, ", "); key(o, "se"); num17(o, mr->se);
        sb_putc(o, '}');
    }
}

void render_report_json(const avow_ctx *ctx, const avow_plan *p, const avow_results *r, strbuf *o)
{
    (void)ctx;
    sb_puts(o, "{\n  \"format\": \"avow.report/1\",\n");
    sb_printf(o, "  \"tool\": {\"name\": \"avow\", \"version\": \"%s\"},\n", AVOW_VERSION);
    sb_puts(o, "  \"study\": {"); key(o, "title"); json_string(o, p->title);
    sb_puts(o, ", "); key(o, "path"); json_string(o, p->path);
    sb_puts(o, ", "); key(o, "sha256"); json_string(o, r->study_sha256);
    sb_puts(o, "},\n  \"data\": {"); key(o, "path"); json_string(o, r->data_shown);
    sb_puts(o, ", "); key(o, "sha256"); json_string(o, r->data_sha256);
    sb_printf(o, ", \"rows\": %llu, \"used\": %llu, \"missing\": %llu",
              (unsigned long long)r->rows, (unsigned long long)r->used,
              (unsigned long long)(r->missing_response + r->missing_level));
    sb_printf(o, ", \"missing_response\": %llu, \"missing_level\": %llu, \"blank_lines\": %llu",
              (unsigned long long)r->missing_response, (unsigned long long)r->missing_level,
              (unsigned long long)r->blank);
    sb_puts(o, ", \"missing_lines\": [");
    for (size_t i = 0; i < r->nmissing_lines; i++)
        sb_printf(o, "%s%llu", i ? ", " : "", (unsigned long long)r->missing_lines[i]);
    sb_printf(o, "], \"from_option\": %s, \"locked\": %s, \"lock_checked\": %s, \"exact\": %s, "
                 "\"inexact_values\": %llu},\n",
              r->data_from_option ? "true" : "false", p->sha256 ? "true" : "false",
              p->sha256 && !r->data_from_option ? "true" : "false",
              r->inexact_values ? "false" : "true", (unsigned long long)r->inexact_values);
    sb_puts(o, "  \"response\": {"); key(o, "name"); json_string(o, p->response);
    sb_puts(o, ", "); key(o, "unit"); json_string(o, p->unit);
    sb_puts(o, "},\n  \"alpha\": "); num17(o, rat_to_double(p->alpha));
    sb_puts(o, ", \"adjust\": "); json_string(o, mult_name(p->adjust));
    sb_puts(o, ",\n  \"levels\": [");
    if (p->nfactors == 1) {
        for (size_t i = 0; i < r->ncells; i++) {
            const avow_level_result *L = &r->levels[i];
            sb_puts(o, i ? ",\n    {" : "\n    {");
            key(o, "factor"); json_string(o, p->factors[0].name);
            sb_puts(o, ", "); key(o, "level"); json_string(o, plan_cell_name(p, i));
            sb_printf(o, ", \"n\": %llu, ", (unsigned long long)L->n);
            key(o, "mean"); num17(o, L->mean);
            sb_puts(o, ", "); key(o, "sd"); num17(o, L->sd);
            sb_puts(o, ", "); key(o, "min"); num17(o, L->min);
            sb_puts(o, ", "); key(o, "max"); num17(o, L->max);
            sb_puts(o, ", "); key(o, "min_exact"); json_string(o, L->min_text);
            sb_puts(o, ", "); key(o, "max_exact"); json_string(o, L->max_text);
            sb_putc(o, '}');
        }
    } else {
        margins_json(o, p, r);      /* several factors: each level's marginal mean */
    }
    sb_puts(o, "\n  ],\n  \"margins\": [");
    margins_json(o, p, r);
    sb_puts(o, r->nmargins ? "\n  ],\n  \"cells\": [" : "],\n  \"cells\": [");
    for (size_t i = 0; i < r->ncells; i++) {
        const avow_level_result *L = &r->levels[i];
        sb_puts(o, i ? ",\n    {" : "\n    {");
        key(o, "cell"); json_string(o, plan_cell_name(p, i));
        sb_puts(o, ", \"levels\": {");
        for (size_t f = 0; f < p->nfactors; f++) {
            if (f) sb_puts(o, ", ");
            key(o, p->factors[f].name);
            json_string(o, p->factors[f].levels[plan_cell_level(p, i, f)].name);
        }
        sb_printf(o, "}, \"n\": %llu, ", (unsigned long long)L->n);
        key(o, "mean"); num17(o, L->mean);
        sb_puts(o, ", "); key(o, "sd"); num17(o, L->sd);
        sb_puts(o, ", "); key(o, "min"); num17(o, L->min);
        sb_puts(o, ", "); key(o, "max"); num17(o, L->max);
        sb_puts(o, ", "); key(o, "min_exact"); json_string(o, L->n ? L->min_text : NULL);
        sb_puts(o, ", "); key(o, "max_exact"); json_string(o, L->n ? L->max_text : NULL);
        sb_putc(o, '}');
    }
    sb_puts(o, "\n  ],\n  \"blocks\": [");
    for (size_t i = 0; i < r->nblocks; i++) {
        sb_puts(o, i ? ",\n    {" : "\n    {");
        key(o, "block"); json_string(o, r->blocks[i].label);
        sb_printf(o, ", \"n\": %llu, ", (unsigned long long)r->blocks[i].n);
        key(o, "mean"); num17(o, r->blocks[i].mean);
        sb_putc(o, '}');
    }
    sb_puts(o, r->nblocks ? "\n  ],\n  \"model\": {" : "],\n  \"model\": {");
    static const char *const fits[] = {"one-factor", "cell-means", "least-squares"};
    static const char *const inter[] = {"all", "none", "pairs"};
    key(o, "fit"); json_string(o, fits[r->fit]);
    sb_puts(o, ", "); key(o, "interactions"); json_string(o, inter[p->interactions]);
    sb_puts(o, ", "); key(o, "block"); json_string(o, p->block ? p->block->name : NULL);
    sb_printf(o, ", \"balanced\": %s, \"terms_adjusted_for_each_other\": true, \"empty_cells\": %zu, ",
              r->balanced ? "true" : "false", r->empty_cells);
    key(o, "df_within_cells"); num17(o, r->df_within);
    sb_puts(o, ", "); key(o, "df_left_out"); num17(o, r->df_lof);
    sb_puts(o, "},\n  \"anova\": [");
    static const char *const kinds[] = {"term", "block", "residual", "total"};
    for (size_t i = 0; i < r->nanova; i++) {
        const avow_anova_row *A = &r->anova[i];
        sb_puts(o, i ? ",\n    {" : "\n    {");
        key(o, "source"); json_string(o, A->source);
        sb_puts(o, ", "); key(o, "kind"); json_string(o, kinds[A->kind]);
        sb_puts(o, ", "); key(o, "df"); num17(o, A->df);
        sb_puts(o, ", "); key(o, "ss"); num17(o, A->ss);
        sb_puts(o, ", "); key(o, "ms"); num17(o, A->ms);
        sb_puts(o, ", "); key(o, "f"); num17(o, A->f);
        sb_puts(o, ", "); key(o, "p"); num17(o, A->p);
        sb_putc(o, '}');
    }
    sb_puts(o, "\n  ],\n  \"fit\": {"); key(o, "n"); sb_printf(o, "%llu", (unsigned long long)r->n);
    sb_puts(o, ", "); key(o, "grand_mean"); num17(o, r->grand_mean);
    sb_puts(o, ", "); key(o, "r_squared"); num17(o, r->r_squared);
    sb_puts(o, ", "); key(o, "residual_sd"); num17(o, r->resid_sd);
    sb_puts(o, "},\n  \"contrasts\": [");
    for (size_t i = 0; i < r->ncontrasts; i++) {
        sb_puts(o, i ? ",\n    " : "\n    ");
        contrast_json(o, p, &r->contrasts[i], 1);
    }
    sb_puts(o, r->ncontrasts ? "\n  ],\n" : "],\n");
    sb_printf(o, "  \"contrast_set\": {\"orthogonal\": %s, \"complete\": %s, \"ss_sum\": ",
              r->orthogonal_set ? "true" : "false", r->complete_set ? "true" : "false");
    num17(o, r->ncontrasts ? r->contrast_ss_sum : NAN);
    sb_puts(o, "},\n  \"explore\": [");
    int first = 1;
    for (size_t i = 0; i < r->nexplore_sets; i++) {
        const avow_explore_result *er = &r->explore_sets[i];
        const plan_explore *e = er->set;
        sb_puts(o, first ? "\n    {" : ",\n    {");
        first = 0;
        if (e->kind == EXPLORE_PAIRS) {
            sb_printf(o, "\"method\": \"%s\"", p->separate_variances ? "games-howell" : "tukey-kramer");
        } else {
            sb_puts(o, "\"method\": \"dunnett\", \"control\": ");
            json_string(o, mean_name(p, e, e->control));
            sb_puts(o, ", \"alternative\": \"two-sided\"");
            sb_printf(o, ", \"approximate\": %s", er->approximate ? "true" : "false");
        }
        sb_puts(o, ", \"factor\": ");
        json_string(o, e->factor >= 0 ? p->factors[e->factor].name : NULL);
        sb_puts(o, ", \"within\": ");
        json_string(o, e->within >= 0 ? p->factors[e->within].name : NULL);
        sb_puts(o, ", \"at\": ");
        json_string(o, er->slice >= 0 ? p->factors[e->within].levels[er->slice].name : NULL);
        sb_printf(o, ", \"means\": %zu, \"critical_value\": ", er->k);
        num17(o, er->crit);
        sb_printf(o, ", \"statistic\": \"%s\", \"comparisons\": [",
                  e->kind == EXPLORE_PAIRS ? "studentized range" : "|t|");
        pairs_json(o, p, e, er->pairs, er->npairs);
        sb_puts(o, "]}");
    }
    if (r->nexplores) {
        sb_puts(o, first ? "\n    " : ",\n    ");
        sb_puts(o, "{\"method\": \"scheffe\", \"critical_value\": ");
        num17(o, r->scheffe_crit);
        sb_puts(o, ", \"comparisons\": [");
        for (size_t i = 0; i < r->nexplores; i++) {
            sb_puts(o, i ? ",\n      " : "\n      ");
            contrast_json(o, p, &r->explores[i], 0);
        }
        sb_puts(o, "]}");
        first = 0;
    }
    sb_puts(o, first ? "],\n" : "\n  ],\n");
    effects_json(o, p, r);
    checks_json(o, p, r);
    sb_puts(o, "  \"caution\": ");
    json_string(o, AVOW_CAUTION);
    sb_puts(o, "\n}\n");
}
