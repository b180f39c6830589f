/* render_plan.c: the plan review of `avow check`, as text for people and as
 * avow.plan/1 JSON for machines. No numerics: everything comes from the Plan. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "avow/render.h"
#include "table.h"

/* A short decimal for thresholds: up to 4 significant digits, no exponent above 1e-5. */
static void put_level_value(strbuf *o, double v)
{
    char buf[64];
    snprintf(buf, sizeof buf, "%.4g", v);
    sb_puts(o, buf);
}

static const char *side_words(ast_side s)
{
    switch (s) {
    case SIDE_GREATER: return "one-sided, > 0";
    case SIDE_LESS: return "one-sided, < 0";
    default: return "two-sided";
    }
}

static void rat_cell(text_table *t, size_t col, avow_rat r)
{
    char buf[48];
    rat_format(r, buf, sizeof buf);
    table_cell(t, col, "%s", buf);
}

static void heading(strbuf *o, const char *title)
{
    sb_printf(o, "\n%s\n", title);
    sb_pad(o, '-', utf8_width(title, strlen(title)));
    sb_putc(o, '\n');
}

/* Coefficient rows of a list of contrasts. */
static void contrast_table(const avow_plan *p, const plan_contrast *cs, size_t n, strbuf *o)
{
    size_t nc = p->ncells + 3;
    char align[72];
    memset(align, 'r', sizeof align);
    align[0] = 'l';
    align[nc - 1] = 'l';
    if (nc > 64) { sb_puts(o, "   (too many levels to tabulate; see the JSON plan)\n"); return; }
    text_table t;
    table_init(&t, nc, align);
    table_row(&t);
    table_cell(&t, 0, "contrast");
    for (size_t c = 0; c < p->ncells; c++) table_cell(&t, c + 1, "%s", plan_cell_name(p, c));
    table_cell(&t, nc - 2, "sum");
    table_cell(&t, nc - 1, "test");
    for (size_t i = 0; i < n; i++) {
        const plan_contrast *pc = &cs[i];
        table_row(&t);
        table_cell(&t, 0, "%s", pc->name);
        if (!pc->valid || !pc->coef) {
            table_cell(&t, 1, "(has errors)");
            continue;
        }
        avow_rat sum = RAT_ZERO;
        for (size_t c = 0; c < p->ncells; c++) {
            rat_cell(&t, c + 1, pc->coef[c]);
            rat_add(sum, pc->coef[c], &sum);
        }
        rat_cell(&t, nc - 2, sum);
        table_cell(&t, nc - 1, "%s", side_words(pc->side));
    }
    table_render(&t, 3, o);
    table_free(&t);
    sb_putc(o, '\n');
    for (size_t i = 0; i < n; i++) {
        sb_printf(o, "   %s = %s", cs[i].name, cs[i].expr);
        if (cs[i].side == SIDE_GREATER) sb_puts(o, " > 0");
        if (cs[i].side == SIDE_LESS) sb_puts(o, " < 0");
        sb_putc(o, '\n');
        if (cs[i].desc) sb_printf(o, "      %s\n", cs[i].desc);
    }
}

static void family_text(const avow_plan *p, strbuf *o)
{
    size_t m = p->family_m;
    sb_printf(o, "   alpha %s shared by %zu planned contrast%s, method %s\n", p->alpha_text, m,
              m == 1 ? "" : "s", mult_name(p->adjust));
    if (!m) return;
    double a = m ? p->family_levels ? p->family_levels[m - 1] : 0 : 0;
    switch (p->adjust) {
    case ADJ_NONE:
        sb_printf(o, "   Each contrast is tested on its own at %s; nothing bounds the chance of at least\n"
                     "   one false finding in the family.\n", p->alpha_text);
        break;
    case ADJ_BONFERRONI:
        sb_puts(o, "   Each contrast is declared a difference when its p-value is at most alpha/m = ");
        put_level_value(o, a);
        sb_puts(o, ".\n   Controls the chance of any false finding in the family (family-wise error rate).\n");
        break;
    case ADJ_SIDAK:
        sb_puts(o, "   Each contrast is declared a difference when its p-value is at most 1 - (1 - alpha)^(1/m) = ");
        put_level_value(o, a);
        sb_puts(o, ".\n   Controls the family-wise error rate exactly for independent tests.\n");
        break;
    case ADJ_HOLM:
        sb_puts(o, "   Step-down: sort the p-values from smallest; compare them in turn with ");
        for (size_t r = 0; r < m; r++) {
            if (r) sb_puts(o, r + 1 == m ? " and " : ", ");
            put_level_value(o, p->family_levels[r]);
        }
        sb_puts(o, ".\n   Stop at the first p-value above its level: it and every larger one stand.\n"
                   "   Controls the family-wise error rate.\n");
        break;
    case ADJ_FDR:
        sb_puts(o, "   Step-up: sort the p-values from smallest; find the largest rank r whose p-value is at\n"
                   "   most r*alpha/m (");
        for (size_t r = 0; r < m; r++) {
            if (r) sb_puts(o, ", ");
            put_level_value(o, p->family_levels[r]);
        }
        sb_puts(o, "); that p-value and every smaller one are findings.\n"
                   "   Controls the expected share of false findings among the findings (false discovery rate).\n");
        break;
    case ADJ_SCHEFFE:
        if (p->nfactors == 1 && !p->block)
            sb_puts(o, "   A contrast is declared a difference when |t| exceeds sqrt((k - 1) * F), with F the upper\n"
                       "   alpha point of the F distribution on k - 1 and N - k degrees of freedom");
        else
            sb_printf(o, "   A contrast is declared a difference when |t| exceeds sqrt(q * F), with q = %zu the\n"
                         "   treatment degrees of freedom of the model and F the upper alpha point of the F\n"
                         "   distribution on q and the residual degrees of freedom", p->treat_df);
        if (p->scheffe_crit > 0)
            sb_printf(o, ";\n   with the %lld planned runs that is |t| > %.4f", (long long)p->planned_runs,
                      p->scheffe_crit);
        sb_puts(o, ".\n   Holds for every contrast at once, including ones chosen after seeing the data.\n");
        break;
    }
    int any = 0;
    for (size_t i = 0; i < p->ncontrasts; i++)
        if (p->contrasts[i].valid && p->contrasts[i].side != SIDE_TWO) {
            sb_printf(o, "%s%s", any ? ", " : "   One-sided contrasts use their one-sided p-value: ", p->contrasts[i].name);
            any = 1;
        }
    if (any) sb_puts(o, ".\n");
}

/* The power section of the review. */
static void power_text(const avow_plan *p, strbuf *o)
{
    const plan_power *pw = &p->powers;
    if (!p->has_sigma || !p->has_detect) return;
    heading(o, "Power and replicates");
    if (!pw->computed) {
        if (pw->why_not) sb_printf(o, "   Not computed: %s.\n", pw->why_not);
        return;
    }
    sb_printf(o, "   To find a difference of %s between two means when runs scatter with standard\n"
                 "   deviation %s, at alpha %s:\n", p->detect_text, p->sigma_text, p->alpha_text);
    text_table t;
    int planned = pw->at_planned, needed = pw->has_target && pw->needed > 0;
    size_t nc = 2 + (size_t)planned + (size_t)needed;
    table_init(&t, nc, "llrr");
    table_row(&t);
    size_t col = 0;
    table_cell(&t, col++, "test");
    table_cell(&t, col++, "how");
    if (planned) table_cell(&t, col++, "power, planned");
    if (needed) table_cell(&t, col++, "power at %lld per cell", (long long)pw->needed);
    for (size_t i = 0; i < pw->nterms; i++) {
        const plan_power_term *x = &pw->terms[i];
        table_row(&t);
        col = 0;
        table_cell(&t, col++, "F: %s", x->name);
        table_cell(&t, col++, "two means %s apart, the others between", p->detect_text);
        if (planned) table_cell(&t, col++, "%.3f", x->power);
        if (needed) table_cell(&t, col++, "%.3f", x->power_needed);
    }
    for (size_t i = 0; i < pw->ncontrasts; i++) {
        const plan_power_contrast *x = &pw->contrasts[i];
        table_row(&t);
        col = 0;
        table_cell(&t, col++, "contrast %s", x->pc->name);
        if (p->adjust == ADJ_SCHEFFE)
            table_cell(&t, col++, "%s, Scheffe's critical |t|", x->sides == 2 ? "two-sided" : "one-sided");
        else
            table_cell(&t, col++, "%s at %.4g%s", x->sides == 2 ? "two-sided" : "one-sided", x->level,
                       (p->adjust == ADJ_HOLM || p->adjust == ADJ_FDR) && pw->ncontrasts > 1 ? " (first step)" : "");
        if (planned) table_cell(&t, col++, "%.3f", x->power);
        if (needed) table_cell(&t, col++, "%.3f", x->power_needed);
    }
    table_render(&t, 3, o);
    table_free(&t);
    if (planned)
        sb_printf(o, "   Planned: %lld runs, %.0f residual degrees of freedom.\n", (long long)p->planned_runs, pw->df2);
    if (pw->has_target) {
        if (needed)
            sb_printf(o, "   Target power %s: %lld replicate%s per cell%s (%lld runs, %.0f residual df) is the\n"
                         "   smallest equal number that reaches it for every test above.\n",
                      p->power_text, (long long)pw->needed, pw->needed == 1 ? "" : "s",
                      p->block ? " in each block" : "", (long long)pw->needed_runs, pw->needed_df2);
        else
            sb_printf(o, "   Target power %s: not reached with up to 1,000,000 replicates per cell.\n", p->power_text);
        if (planned && needed) {
            int short_of = 0;
            for (size_t i = 0; i < pw->nterms; i++) short_of |= pw->terms[i].power < pw->target;
            for (size_t i = 0; i < pw->ncontrasts; i++) short_of |= pw->contrasts[i].power < pw->target;
            sb_puts(o, short_of ? "   The planned replicates fall short of the target for at least one test.\n"
                                : "   The planned replicates reach the target for every test.\n");
        }
    }
    if (p->nfactors > 1)
        sb_puts(o, "   F tests are for main effects with no interaction; contrasts are on cell means.\n");
}

void render_plan_text(const avow_ctx *ctx, const avow_plan *p, strbuf *o)
{
    sb_printf(o, "avow %s -- plan review (no data read)\n\n", AVOW_VERSION);
    text_table t;
    table_init(&t, 2, "ll");
    table_row(&t); table_cell(&t, 0, "study"); table_cell(&t, 1, "%s", p->title ? p->title : "");
    table_row(&t); table_cell(&t, 0, "file"); table_cell(&t, 1, "%s", p->path);
    table_row(&t); table_cell(&t, 0, "response");
    table_cell(&t, 1, "%s%s%s%s%s%s", p->response ? p->response : "",
               p->response_label ? " \"" : "", p->response_label ? p->response_label : "",
               p->response_label ? "\"" : "", p->unit ? ", in " : "", p->unit ? p->unit : "");
    table_row(&t); table_cell(&t, 0, "data");
    if (p->has_data) {
        strbuf d = {0};
        sb_printf(&d, "%s; columns", p->data_path);
        size_t ncols = p->nfactors + (p->block ? 1 : 0) + 1;
        for (size_t i = 0; i < ncols; i++)
            sb_printf(&d, "%s \"%s\" for %s", i ? "," : "", p->columns[i], plan_column_role(p, i));
        sb_puts(&d, "; missing");
        for (size_t i = 0; i < p->nmissing; i++) sb_printf(&d, " \"%s\"", p->missing[i]);
        sb_printf(&d, "; %s", p->sha256 ? "locked by sha256" : "not locked");
        table_cell(&t, 1, "%s", d.s ? d.s : "");
        sb_free(&d);
    } else {
        table_cell(&t, 1, "not named yet (needed by `avow run`)");
    }
    table_render(&t, 0, o);
    table_free(&t);

    for (size_t fi = 0; fi < p->nfactors; fi++) {
        const plan_factor *f = &p->factors[fi];
        strbuf h = {0};
        sb_printf(&h, "Factor %s%s%s%s: %zu levels", f->name, f->label ? " \"" : "",
                  f->label ? f->label : "", f->label ? "\"" : "", f->nlevels);
        heading(o, h.s ? h.s : "Factor");
        sb_free(&h);
        table_init(&t, 5, "lrlrl");
        table_row(&t);
        table_cell(&t, 0, "level"); table_cell(&t, 1, "at"); table_cell(&t, 2, "label in data");
        table_cell(&t, 3, "planned n"); table_cell(&t, 4, "description");
        for (size_t i = 0; i < f->nlevels; i++) {
            const plan_level *l = &f->levels[i];
            table_row(&t);
            table_cell(&t, 0, "%s", l->name);
            table_cell(&t, 1, "%s", l->has_at ? l->at_text : "-");
            table_cell(&t, 2, "%s", l->code ? l->code : l->name);
            if (p->replicates) {
                /* runs with this level: its cells' replicates, in every block */
                int64_t r = p->nfactors == 1 ? p->replicates[i] : p->replicates[0] * (int64_t)(p->ncells / f->nlevels);
                if (p->block && p->block_from_data) table_cell(&t, 3, "%lld per block", (long long)r);
                else table_cell(&t, 3, "%lld", (long long)(r * (p->block ? (int64_t)p->block->nlevels : 1)));
            } else {
                table_cell(&t, 3, "-");
            }
            table_cell(&t, 4, "%s", l->desc ? l->desc : "");
        }
        table_render(&t, 3, o);
        table_free(&t);
    }
    if (p->block) {
        const plan_factor *f = p->block;
        strbuf h = {0};
        if (p->block_from_data)
            sb_printf(&h, "Block %s%s%s%s: levels taken from the data", f->name, f->label ? " \"" : "",
                      f->label ? f->label : "", f->label ? "\"" : "");
        else
            sb_printf(&h, "Block %s%s%s%s: %zu levels", f->name, f->label ? " \"" : "",
                      f->label ? f->label : "", f->label ? "\"" : "", f->nlevels);
        heading(o, h.s ? h.s : "Block");
        sb_free(&h);
        if (!p->block_from_data) {
            table_init(&t, 3, "lll");
            table_row(&t);
            table_cell(&t, 0, "level"); table_cell(&t, 1, "label in data"); table_cell(&t, 2, "description");
            for (size_t i = 0; i < f->nlevels; i++) {
                const plan_level *l = &f->levels[i];
                table_row(&t);
                table_cell(&t, 0, "%s", l->name);
                table_cell(&t, 1, "%s", l->code ? l->code : l->name);
                table_cell(&t, 2, "%s", l->desc ? l->desc : "");
            }
            table_render(&t, 3, o);
            table_free(&t);
        }
        sb_puts(o, "   Blocks are additive: they shift every treatment alike and are averaged out of every\n"
                   "   comparison.\n");
    }
    if (p->nfactors > 1 || p->block) {
        heading(o, "Model");
        table_init(&t, 3, "lrl");
        table_row(&t);
        table_cell(&t, 0, "term"); table_cell(&t, 1, "df"); table_cell(&t, 2, "%s", "");
        for (size_t i = 0; i < p->nterms; i++) {
            table_row(&t);
            table_cell(&t, 0, "%s", p->terms[i].name);
            table_cell(&t, 1, "%zu", p->terms[i].df);
            table_cell(&t, 2, "%s", p->terms[i].order == 1 ? "main effect" : "interaction");
        }
        if (p->block) {
            table_row(&t);
            table_cell(&t, 0, "%s", p->block->name);
            if (p->block_from_data) table_cell(&t, 1, "-");
            else table_cell(&t, 1, "%zu", p->block->nlevels - 1);
            table_cell(&t, 2, "block");
        }
        table_render(&t, 3, o);
        table_free(&t);
        sb_printf(o, "   %zu treatment cell%s", p->ncells, p->ncells == 1 ? "" : "s");
        if (p->nfactors > 1)
            sb_printf(o, " (%s)", p->interactions == INTER_ALL ? "every interaction kept"
                                  : p->interactions == INTER_PAIRS ? "two-factor interactions kept"
                                  : "no interaction: an additive model");
        sb_puts(o, "; each term is tested adjusted for all the others.\n");
    }

    size_t df = p->treat_df;
    strbuf h = {0};
    sb_printf(&h, "Planned contrasts: %zu, with %zu degree%s of freedom %s", p->ncontrasts, df,
              df == 1 ? "" : "s", p->nfactors == 1 ? "between levels" : "among the treatments");
    heading(o, h.s ? h.s : "Planned contrasts");
    sb_free(&h);
    if (p->ncontrasts) contrast_table(p, p->contrasts, p->ncontrasts, o);
    else sb_puts(o, "   none declared: the run will report the ANOVA table only\n");

    if (p->ncontrasts > 1 && p->ortho) {
        heading(o, p->replicates ? (p->nfactors == 1 ? "Orthogonality: sum of c*d/n over levels, planned replicates"
                                                     : "Orthogonality: sum of c*d/n over cells, planned replicates")
                                 : (p->nfactors == 1 ? "Orthogonality: sum of c*d/n over levels, equal replicates"
                                                     : "Orthogonality: sum of c*d/n over cells, equal replicates"));
        size_t m = p->ncontrasts;
        if (m + 1 <= 64) {
            char align[65];
            memset(align, 'r', sizeof align);
            align[0] = 'l';
            table_init(&t, m + 1, align);
            table_row(&t);
            for (size_t j = 0; j < m; j++) table_cell(&t, j + 1, "%s", p->contrasts[j].name);
            size_t bad = 0;
            for (size_t i = 0; i < m; i++) {
                table_row(&t);
                table_cell(&t, 0, "%s", p->contrasts[i].name);
                for (size_t j = 0; j < m; j++) {
                    if (!p->contrasts[i].valid || !p->contrasts[j].valid) { table_cell(&t, j + 1, "?"); continue; }
                    if (i == j) { table_cell(&t, j + 1, "."); continue; }
                    rat_cell(&t, j + 1, p->ortho[i * m + j]);
                    if (j < i && !rat_is_zero(p->ortho[i * m + j])) bad++;
                }
            }
            table_render(&t, 3, o);
            table_free(&t);
            if (bad) sb_printf(o, "   %zu pair%s not orthogonal: their tests share information.\n", bad,
                               bad == 1 ? " is" : "s are");
            else sb_puts(o, "   Every pair is orthogonal: the contrasts ask separate questions.\n");
        }
    }

    if (p->nexplore_sets || p->nexplores) {
        heading(o, "Exploratory comparisons (reported apart from the planned family, always adjusted)");
        for (size_t i = 0; i < p->nexplore_sets; i++) {
            const plan_explore *e = &p->explore_sets[i];
            size_t k = e->factor < 0 ? p->ncells : p->factors[e->factor].nlevels;
            size_t slices = e->within >= 0 ? p->factors[e->within].nlevels : 1;
            const char *what = e->factor < 0 ? "cell" : "level";
            strbuf of = {0};
            if (e->factor >= 0 && p->nfactors > 1) sb_printf(&of, " of %s", p->factors[e->factor].name);
            if (e->within >= 0) sb_printf(&of, " within each level of %s", p->factors[e->within].name);
            if (e->kind == EXPLORE_PAIRS)
                sb_printf(o, "   every pair of %ss%s: %zu comparison%s, %s\n", what, of.s ? of.s : "",
                          slices * k * (k - 1) / 2, slices * k * (k - 1) / 2 == 1 ? "" : "s",
                          p->separate_variances ? "Games-Howell (each cell's own variance)" : "Tukey-Kramer");
            else
                sb_printf(o, "   every %s%s against %s: %zu comparison%s, Dunnett\n", what, of.s ? of.s : "",
                          p->factors[e->factor].levels[e->control].name, slices * (k - 1),
                          slices * (k - 1) == 1 ? "" : "s");
            sb_free(&of);
        }
        if (p->nexplores) {
            sb_printf(o, "   %zu contrast%s chosen after seeing data, Scheffe:\n\n", p->nexplores,
                      p->nexplores == 1 ? "" : "s");
            contrast_table(p, p->explores, p->nexplores, o);
        }
    }

    heading(o, "Family plan");
    family_text(p, o);

    if (p->has_plan) {
        heading(o, "Design assumptions (plan block)");
        table_init(&t, 2, "ll");
        if (p->replicates) {
            int equal = 1;
            for (size_t i = 1; i < p->ncells; i++) equal &= p->replicates[i] == p->replicates[0];
            table_row(&t); table_cell(&t, 0, "replicates");
            if (equal && p->ncells && p->block && p->block_from_data)
                table_cell(&t, 1, "%lld per cell in each block (blocks taken from the data)",
                           (long long)p->replicates[0]);
            else if (equal && p->ncells && p->block)
                table_cell(&t, 1, "%lld per cell in each block, %lld runs", (long long)p->replicates[0],
                           (long long)p->planned_runs);
            else if (equal && p->ncells)
                table_cell(&t, 1, "%lld per %s, %lld runs", (long long)p->replicates[0],
                           p->nfactors == 1 ? "level" : "cell", (long long)p->planned_runs);
            else table_cell(&t, 1, "as listed above, %lld runs", (long long)p->planned_runs);
        }
        if (p->has_sigma) { table_row(&t); table_cell(&t, 0, "sigma"); table_cell(&t, 1, "%s", p->sigma_text); }
        if (p->has_detect) { table_row(&t); table_cell(&t, 0, "detect"); table_cell(&t, 1, "%s", p->detect_text); }
        if (p->has_power) { table_row(&t); table_cell(&t, 0, "power"); table_cell(&t, 1, "%s", p->power_text); }
        if (p->has_seed) { table_row(&t); table_cell(&t, 0, "seed"); table_cell(&t, 1, "%llu", (unsigned long long)p->seed); }
        table_render(&t, 3, o);
        table_free(&t);
    }

    power_text(p, o);

    heading(o, "Findings");
    sb_printf(o, "   %zu error%s, %zu warning%s\n", ctx->nerrors, ctx->nerrors == 1 ? "" : "s",
              ctx->nwarnings, ctx->nwarnings == 1 ? "" : "s");
    for (size_t i = 0; i < ctx->ndiags; i++) {
        unsigned line, col;
        ctx_line_col(ctx, ctx->diags[i].span.start, &line, &col);
        sb_printf(o, "   line %u: %s: %s\n", line, ctx->diags[i].sev == DIAG_ERROR ? "error" : "warning",
                  ctx->diags[i].msg);
    }
}

/* ---- JSON ---- */

static void json_maybe(strbuf *o, double v)
{
    if (isfinite(v)) json_number(o, v); else sb_puts(o, "null");
}

/* The power object of avow.plan/1: inputs and every figure. */
static void power_json(const avow_plan *p, strbuf *o)
{
    const plan_power *pw = &p->powers;
    if (!p->has_sigma || !p->has_detect) { sb_puts(o, "null"); return; }
    if (!pw->computed) {
        sb_puts(o, "{\"computed\": false, \"reason\": ");
        json_string(o, pw->why_not);
        sb_putc(o, '}');
        return;
    }
    sb_puts(o, "{\"computed\": true, \"alpha\": "); json_number(o, rat_to_double(p->alpha));
    sb_puts(o, ", \"sigma\": "); json_number(o, rat_to_double(p->sigma));
    sb_puts(o, ", \"detect\": "); json_number(o, rat_to_double(p->detect));
    sb_puts(o, ", \"target\": "); json_maybe(o, pw->has_target ? pw->target : NAN);
    sb_puts(o, ",\n    \"planned\": ");
    if (pw->at_planned) {
        sb_printf(o, "{\"runs\": %lld, \"df_residual\": ", (long long)p->planned_runs);
        json_number(o, pw->df2);
        sb_putc(o, '}');
    } else sb_puts(o, "null");
    sb_puts(o, ",\n    \"needed\": ");
    if (pw->has_target && pw->needed > 0) {
        sb_printf(o, "{\"replicates_per_cell\": %lld, \"runs\": %lld, \"df_residual\": ",
                  (long long)pw->needed, (long long)pw->needed_runs);
        json_number(o, pw->needed_df2);
        sb_putc(o, '}');
    } else sb_puts(o, "null");
    sb_puts(o, ",\n    \"f_tests\": [");
    for (size_t i = 0; i < pw->nterms; i++) {
        const plan_power_term *x = &pw->terms[i];
        sb_puts(o, i ? ",\n      {\"factor\": " : "\n      {\"factor\": ");
        json_string(o, x->name);
        sb_puts(o, ", \"df1\": "); json_number(o, x->df1);
        sb_puts(o, ", \"lambda\": "); json_maybe(o, pw->at_planned ? x->lambda : NAN);
        sb_puts(o, ", \"power\": "); json_maybe(o, pw->at_planned ? x->power : NAN);
        sb_puts(o, ", \"power_at_needed\": "); json_maybe(o, pw->has_target && pw->needed ? x->power_needed : NAN);
        sb_putc(o, '}');
    }
    sb_puts(o, pw->nterms ? "],\n    \"contrasts\": [" : "], \"contrasts\": [");
    for (size_t i = 0; i < pw->ncontrasts; i++) {
        const plan_power_contrast *x = &pw->contrasts[i];
        sb_puts(o, i ? ",\n      {\"name\": " : "\n      {\"name\": ");
        json_string(o, x->pc->name);
        sb_printf(o, ", \"sides\": %d, \"level\": ", x->sides);
        json_maybe(o, x->level);
        sb_printf(o, ", \"level_is_first_step\": %s",
                  (p->adjust == ADJ_HOLM || p->adjust == ADJ_FDR) && pw->ncontrasts > 1 ? "true" : "false");
        sb_puts(o, ", \"scheffe_critical_t\": "); json_maybe(o, pw->at_planned ? x->crit : NAN);
        sb_puts(o, ", \"delta\": "); json_maybe(o, pw->at_planned ? x->delta : NAN);
        sb_puts(o, ", \"power\": "); json_maybe(o, pw->at_planned ? x->power : NAN);
        sb_puts(o, ", \"power_at_needed\": "); json_maybe(o, pw->has_target && pw->needed ? x->power_needed : NAN);
        sb_putc(o, '}');
    }
    sb_puts(o, pw->ncontrasts ? "]}" : "]}");
}

void json_string(strbuf *o, const char *s)
{
    if (!s) { sb_puts(o, "null"); return; }
    sb_putc(o, '"');
    for (; *s; s++) {
        unsigned char c = (unsigned char)*s;
        switch (c) {
        case '"': sb_puts(o, "\\\""); break;
        case '\\': sb_puts(o, "\\\\"); break;
        case '\n': sb_puts(o, "\\n"); break;
        case '\t': sb_puts(o, "\\t"); break;
        case '\r': sb_puts(o, "\\r"); break;
        default:
            if (c < 0x20 || c == 0x7f) sb_printf(o, "\\u%04x", c);
            else sb_putc(o, (char)c);
        }
    }
    sb_putc(o, '"');
}

void json_number(strbuf *o, double v)
{
    if (!isfinite(v)) { sb_puts(o, "null"); return; }
    if (v == 0) { sb_puts(o, "0"); return; }
    if (v == floor(v) && fabs(v) < 1e15) { sb_printf(o, "%.0f", v); return; }
    sb_printf(o, "%.17g", v);
}

static void json_rat(strbuf *o, avow_rat r)
{
    json_number(o, rat_to_double(r));
}

static void json_rat_str(strbuf *o, avow_rat r)
{
    char buf[48];
    rat_format(r, buf, sizeof buf);
    json_string(o, buf);
}

static void json_contrasts(const avow_plan *p, const plan_contrast *cs, size_t n, strbuf *o)
{
    sb_putc(o, '[');
    for (size_t i = 0; i < n; i++) {
        const plan_contrast *pc = &cs[i];
        sb_puts(o, i ? ",\n    {" : "\n    {");
        sb_puts(o, "\"name\": "); json_string(o, pc->name);
        sb_puts(o, ", \"description\": "); json_string(o, pc->desc);
        sb_puts(o, ", \"expression\": "); json_string(o, pc->expr);
        sb_puts(o, ", \"alternative\": ");
        json_string(o, pc->side == SIDE_GREATER ? "greater" : pc->side == SIDE_LESS ? "less" : "two-sided");
        sb_printf(o, ", \"valid\": %s", pc->valid ? "true" : "false");
        if (pc->valid) {
            sb_puts(o, ",\n     \"coefficients\": {");
            for (size_t c = 0; c < p->ncells; c++) {
                if (c) sb_puts(o, ", ");
                json_string(o, plan_cell_name(p, c)); sb_puts(o, ": "); json_rat(o, pc->coef[c]);
            }
            sb_puts(o, "},\n     \"coefficients_exact\": {");
            for (size_t c = 0; c < p->ncells; c++) {
                if (c) sb_puts(o, ", ");
                json_string(o, plan_cell_name(p, c)); sb_puts(o, ": "); json_rat_str(o, pc->coef[c]);
            }
            sb_putc(o, '}');
        }
        sb_putc(o, '}');
    }
    sb_puts(o, n ? "\n  ]" : "]");
}

static void json_diagnostics(const avow_ctx *ctx, strbuf *o)
{
    sb_puts(o, "\"diagnostics\": [");
    for (size_t i = 0; i < ctx->ndiags; i++) {
        const avow_diag *d = &ctx->diags[i];
        unsigned line, col;
        ctx_line_col(ctx, d->span.start, &line, &col);
        sb_puts(o, i ? ",\n    {" : "\n    {");
        sb_printf(o, "\"severity\": \"%s\", \"line\": %u, \"column\": %u, \"message\": ",
                  d->sev == DIAG_ERROR ? "error" : "warning", line, col);
        json_string(o, d->msg);
        sb_puts(o, ", \"hint\": ");
        json_string(o, d->hint);
        sb_putc(o, '}');
    }
    sb_puts(o, ctx->ndiags ? "\n  ]" : "]");
}

void render_plan_json(const avow_ctx *ctx, const avow_plan *p, int ok, strbuf *o)
{
    sb_puts(o, "{\n  \"format\": \"avow.plan/1\",\n");
    sb_printf(o, "  \"tool\": {\"name\": \"avow\", \"version\": \"%s\"},\n", AVOW_VERSION);
    sb_printf(o, "  \"ok\": %s,\n  ", ok ? "true" : "false");
    json_diagnostics(ctx, o);
    if (!ok) { sb_puts(o, "\n}\n"); return; }
    sb_puts(o, ",\n  \"study\": {\"title\": "); json_string(o, p->title);
    sb_puts(o, ", \"path\": "); json_string(o, p->path);
    sb_puts(o, "},\n  \"response\": {\"name\": "); json_string(o, p->response);
    sb_puts(o, ", \"label\": "); json_string(o, p->response_label);
    sb_puts(o, ", \"unit\": "); json_string(o, p->unit);
    sb_puts(o, "},\n  \"factors\": [");
    for (size_t fi = 0; fi < p->nfactors; fi++) {
        sb_puts(o, fi ? ", {" : "{");
        sb_puts(o, "\"name\": "); json_string(o, p->factors[fi].name);
        sb_puts(o, ", \"label\": "); json_string(o, p->factors[fi].label);
        sb_printf(o, ", \"levels\": %zu}", p->factors[fi].nlevels);
    }
    sb_puts(o, "],\n  \"levels\": [");
    size_t nl = 0;
    for (size_t fi = 0; fi < p->nfactors; fi++)
        for (size_t i = 0; i < p->factors[fi].nlevels; i++) {
            const plan_level *l = &p->factors[fi].levels[i];
            sb_puts(o, nl++ ? ",\n    {" : "\n    {");
            sb_puts(o, "\"factor\": "); json_string(o, p->factors[fi].name);
            sb_puts(o, ", \"level\": "); json_string(o, l->name);
            sb_puts(o, ", \"code\": "); json_string(o, l->code);
            sb_puts(o, ", \"at\": ");
            if (l->has_at) json_rat(o, l->at); else sb_puts(o, "null");
            sb_puts(o, ", \"at_exact\": ");
            if (l->has_at) json_rat_str(o, l->at); else sb_puts(o, "null");
            sb_puts(o, ", \"planned_n\": ");
            if (p->replicates && p->nfactors == 1) sb_printf(o, "%lld", (long long)p->replicates[i]);
            else sb_puts(o, "null");
            sb_puts(o, ", \"description\": "); json_string(o, l->desc);
            sb_putc(o, '}');
        }
    sb_puts(o, "\n  ],\n  \"block\": ");
    if (p->block) {
        sb_puts(o, "{\"name\": "); json_string(o, p->block->name);
        sb_puts(o, ", \"label\": "); json_string(o, p->block->label);
        sb_puts(o, ", \"levels\": ");
        if (p->block_from_data) sb_puts(o, "null");
        else {
            sb_putc(o, '[');
            for (size_t i = 0; i < p->block->nlevels; i++) {
                if (i) sb_puts(o, ", ");
                json_string(o, p->block->levels[i].name);
            }
            sb_putc(o, ']');
        }
        sb_putc(o, '}');
    } else {
        sb_puts(o, "null");
    }
    static const char *const inter[] = {"all", "none", "pairs"};
    sb_printf(o, ",\n  \"model\": {\"cells\": %zu, \"interactions\": \"%s\", \"treatment_df\": %zu, \"terms\": [",
              p->ncells, inter[p->interactions], p->treat_df);
    for (size_t i = 0; i < p->nterms; i++) {
        sb_puts(o, i ? ", {\"name\": " : "{\"name\": ");
        json_string(o, p->terms[i].name);
        sb_printf(o, ", \"df\": %zu}", p->terms[i].df);
    }
    sb_puts(o, "]},\n  \"data\": ");
    if (p->has_data) {
        sb_puts(o, "{\"path\": "); json_string(o, p->data_path);
        sb_puts(o, ", \"columns\": {");
        for (size_t i = 0; i < p->nfactors + (p->block ? 1 : 0) + 1; i++) {
            if (i) sb_puts(o, ", ");
            json_string(o, plan_column_role(p, i));
            sb_puts(o, ": ");
            json_string(o, p->columns[i]);
        }
        sb_puts(o, "}, \"missing\": [");
        for (size_t i = 0; i < p->nmissing; i++) { if (i) sb_puts(o, ", "); json_string(o, p->missing[i]); }
        sb_puts(o, "], \"sha256\": "); json_string(o, p->sha256);
        sb_puts(o, ", \"delimiter\": ");
        if (p->delimiter) { char d[2] = {p->delimiter, 0}; json_string(o, d); } else sb_puts(o, "null");
        sb_putc(o, '}');
    } else {
        sb_puts(o, "null");
    }
    sb_puts(o, ",\n  \"alpha\": "); json_rat(o, p->alpha);
    sb_puts(o, ", \"alpha_exact\": "); json_rat_str(o, p->alpha);
    sb_puts(o, ", \"adjust\": "); json_string(o, mult_name(p->adjust));
    sb_printf(o, ", \"orthogonal_required\": %s,\n  \"contrasts\": ", p->orthogonal ? "true" : "false");
    json_contrasts(p, p->contrasts, p->ncontrasts, o);
    sb_puts(o, ",\n  \"orthogonality\": {\"contrasts\": [");
    size_t m = p->ncontrasts;
    for (size_t i = 0; i < m; i++) { if (i) sb_puts(o, ", "); json_string(o, p->contrasts[i].name); }
    sb_puts(o, "],\n    \"products\": [");
    for (size_t i = 0; i < m && p->ortho; i++) {
        sb_puts(o, i ? ",\n      [" : "\n      [");
        for (size_t j = 0; j < m; j++) {
            if (j) sb_puts(o, ", ");
            if (p->contrasts[i].valid && p->contrasts[j].valid) json_rat_str(o, p->ortho[i * m + j]);
            else sb_puts(o, "null");
        }
        sb_putc(o, ']');
    }
    sb_puts(o, m ? "]},\n" : "]},\n");
    sb_puts(o, "  \"explore\": [");
    int first = 1;
    for (size_t i = 0; i < p->nexplore_sets; i++) {
        const plan_explore *e = &p->explore_sets[i];
        size_t k = e->factor < 0 ? p->ncells : p->factors[e->factor].nlevels;
        size_t slices = e->within >= 0 ? p->factors[e->within].nlevels : 1;
        sb_puts(o, first ? "\n    {" : ",\n    {");
        first = 0;
        if (e->kind == EXPLORE_PAIRS)
            sb_printf(o, "\"method\": \"%s\"", p->separate_variances ? "games-howell" : "tukey-kramer");
        else {
            sb_puts(o, "\"method\": \"dunnett\", \"control\": ");
            json_string(o, p->factors[e->factor].levels[e->control].name);
        }
        sb_puts(o, ", \"factor\": ");
        json_string(o, e->factor >= 0 ? p->factors[e->factor].name : NULL);
        sb_puts(o, ", \"within\": ");
        json_string(o, e->within >= 0 ? p->factors[e->within].name : NULL);
        sb_printf(o, ", \"comparisons\": %zu}", slices * (e->kind == EXPLORE_PAIRS ? k * (k - 1) / 2 : k - 1));
    }
    if (p->nexplores) {
        sb_printf(o, "%s\n    {\"method\": \"scheffe\", \"contrasts\": ", first ? "" : ",");
        json_contrasts(p, p->explores, p->nexplores, o);
        sb_putc(o, '}');
        first = 0;
    }
    sb_puts(o, first ? "],\n" : "\n  ],\n");
    sb_printf(o, "  \"family\": {\"method\": \"%s\", \"alpha\": ", mult_name(p->adjust));
    json_rat(o, p->alpha);
    sb_printf(o, ", \"m\": %zu, \"per_test_levels\": ", p->family_m);
    if (p->family_levels) {
        sb_putc(o, '[');
        for (size_t i = 0; i < p->family_m; i++) { if (i) sb_puts(o, ", "); json_number(o, p->family_levels[i]); }
        sb_putc(o, ']');
    } else sb_puts(o, "null");
    sb_puts(o, ", \"scheffe_critical_t\": ");
    if (p->scheffe_crit > 0) json_number(o, p->scheffe_crit); else sb_puts(o, "null");
    sb_puts(o, "},\n  \"plan\": ");
    if (p->has_plan) {
        sb_puts(o, "{\"runs\": ");
        if (p->planned_runs) sb_printf(o, "%lld", (long long)p->planned_runs); else sb_puts(o, "null");
        sb_puts(o, ", \"sigma\": "); if (p->has_sigma) json_rat(o, p->sigma); else sb_puts(o, "null");
        sb_puts(o, ", \"detect\": "); if (p->has_detect) json_rat(o, p->detect); else sb_puts(o, "null");
        sb_puts(o, ", \"power\": "); if (p->has_power) json_rat(o, p->power); else sb_puts(o, "null");
        sb_puts(o, ", \"seed\": ");
        if (p->has_seed) sb_printf(o, "%llu", (unsigned long long)p->seed); else sb_puts(o, "null");
        sb_putc(o, '}');
    } else sb_puts(o, "null");
    sb_puts(o, ",\n  \"power\": ");
    power_json(p, o);
    sb_puts(o, "\n}\n");
}
