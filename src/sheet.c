/* sheet.c: the randomized run sheet of `avow sheet` (include/avow/sheet.h).
 *
 * Randomness (the only numerics here) comes from GSL:
 * - gsl_rng_mt19937, the Mersenne Twister of M. Matsumoto and T. Nishimura, "Mersenne
 *   Twister: a 623-dimensionally equidistributed uniform pseudo-random number
 *   generator", ACM Transactions on Modeling and Computer Simulation 8(1), 3-30 (1998),
 *   with the 2002 seeding of its authors' reference code;
 * - gsl_ran_shuffle, the Fisher-Yates shuffle (R. A. Fisher and F. Yates, "Statistical
 *   Tables for Biological, Agricultural and Medical Research", 1938) in its in-place
 *   form (R. Durstenfeld, "Algorithm 235: Random permutation", Communications of the
 *   ACM 7(7), 420 (1964)): every order of the runs equally likely, given uniform draws,
 *   which gsl_rng_uniform_int makes by rejection. */
#include "avow/sheet.h"

#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include "avow/csv.h"
#include "avow/render.h"

/* Turn GSL's abort-on-error handler off, once per process (as dist.c does). */
static void gsl_quiet(void)
{
    static int done;   /* the handler has been switched off */
    if (!done) {
        gsl_set_error_handler_off();
        done = 1;
    }
}

/* Runs per block (the planned replicates summed over the cells) and the number of
 * blocks laid out (1 without a block), each saturated at UINT64_MAX; their product,
 * saturated, is returned. 0 when the plan has no replicates or undeclared blocks. */
static uint64_t planned_runs(const avow_plan *plan, uint64_t *per_block, uint64_t *blocks)
{
    *per_block = 0;
    *blocks = plan->block ? plan->block->nlevels : 1;
    if (!plan->replicates || (plan->block && plan->block_from_data) || *blocks == 0) return 0;
    for (size_t c = 0; c < plan->ncells; c++) {
        uint64_t r = plan->replicates[c] > 0 ? (uint64_t)plan->replicates[c] : 0;
        *per_block = r > UINT64_MAX - *per_block ? UINT64_MAX : *per_block + r;
    }
    if (*per_block && *blocks > UINT64_MAX / *per_block) return UINT64_MAX;
    return *per_block * *blocks;
}

static const ast_stmt *first_stmt(const ast_study *study, ast_stmt_kind kind)
{
    for (const ast_stmt *s = study ? study->stmts : NULL; s; s = s->next)
        if (s->kind == kind) return s;
    return NULL;
}

size_t sheet_check(avow_ctx *ctx, const ast_study *study, const avow_plan *plan, int seed_given)
{
    size_t before = ctx->nerrors;
    const ast_stmt *pst = first_stmt(study, ST_PLAN), *bst = first_stmt(study, ST_BLOCK);
    avow_span at_plan = pst ? pst->key : (avow_span){0, 0};
    if (!plan->replicates) {
        avow_diag *d = ctx_error(ctx, at_plan, "a run sheet needs the planned replicates");
        if (d && !pst) d->whole_file = 1;
        diag_hint(ctx, d, pst ? "add `replicates N` to the plan block"
                              : "add a plan block with the replicates: plan { replicates N }");
    }
    if (plan->block && plan->block_from_data) {
        avow_diag *d = ctx_error(ctx, bst ? bst->name.span : plan->block->span,
                                 "the levels of the block `%s` are taken from the data, so no sheet can lay "
                                 "them out", plan->block->name);
        diag_hint(ctx, d, "declare the block's levels to lay out a sheet: block %s { ... }", plan->block->name);
    }
    if (!seed_given) {
        avow_diag *d = ctx_error(ctx, at_plan, "a run sheet must be reproducible, and no seed is given");
        if (d && !pst) d->whole_file = 1;
        diag_hint(ctx, d, "give --seed N or `seed N` in the plan block");
    }
    uint64_t per, nb, total = planned_runs(plan, &per, &nb);
    if (total > AVOW_SHEET_MAX_RUNS) {
        avow_span at = at_plan;
        for (const ast_plan_item *it = pst ? pst->plan : NULL; it; it = it->next)
            if (it->kind == PI_REPLICATES || it->kind == PI_REPLICATES_EACH) at = it->span;
        avow_diag *d;
        if (total == UINT64_MAX)
            d = ctx_error(ctx, at, "the plan holds more runs than a run sheet lays out (at most %d)",
                          AVOW_SHEET_MAX_RUNS);
        else
            d = ctx_error(ctx, at, "the plan holds %llu runs; a run sheet lays out at most %d",
                          (unsigned long long)total, AVOW_SHEET_MAX_RUNS);
        diag_hint(ctx, d, "plan fewer replicates, or lay out the experiment in parts");
    }
    return ctx->nerrors - before;
}

unsigned long sheet_generator_seed(uint64_t seed)
{
    unsigned long s = (unsigned long)(seed & 0xffffffffu);
    return s ? s : AVOW_SHEET_SEED_FOR_ZERO;
}

void sheet_free(avow_sheet *s)
{
    avow_free(s->runs);
    memset(s, 0, sizeof *s);
}

int sheet_build(const avow_plan *plan, uint64_t seed, avow_sheet *out)
{
    memset(out, 0, sizeof *out);
    uint64_t per, nb, total = planned_runs(plan, &per, &nb);
    if (total == 0 || total > AVOW_SHEET_MAX_RUNS) return AVOW_EDOM;
    sheet_run *runs = avow_malloc((size_t)total * sizeof *runs);
    if (!runs) return AVOW_ENOMEM;
    gsl_quiet();
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    if (!rng) { avow_free(runs); return AVOW_ENOMEM; }
    unsigned long gen_seed = sheet_generator_seed(seed);
    gsl_rng_set(rng, gen_seed);
    size_t i = 0;
    for (size_t b = 0; b < (size_t)nb; b++) {
        sheet_run *first = runs + i;
        for (size_t c = 0; c < plan->ncells; c++)
            for (int64_t k = 0; k < plan->replicates[c]; k++) {
                runs[i].cell = c;
                runs[i].block = b;
                i++;
            }
        gsl_ran_shuffle(rng, first, (size_t)per, sizeof *first);
    }
    gsl_rng_free(rng);
    out->runs = runs;
    out->nruns = (size_t)total;
    out->nblocks = plan->block ? (size_t)nb : 0;
    out->per_block = (size_t)per;
    out->seed = seed;
    out->gen_seed = gen_seed;
    return AVOW_OK;
}

char sheet_delimiter(const avow_plan *plan, const char *out_path)
{
    if (plan->delimiter) return plan->delimiter;
    if (out_path) return csv_delimiter_for_path(out_path);
    if (plan->has_data && plan->data_path) return csv_delimiter_for_path(plan->data_path);
    return ',';
}

/* Append a field, quoted (RFC 4180: in double quotes, a quote doubled) when the reader
 * would otherwise split or trim it. */
static void put_field(strbuf *o, const char *s, char delim)
{
    size_t n = strlen(s);
    int quote = n && (s[0] == ' ' || s[n - 1] == ' ');
    for (size_t i = 0; i < n && !quote; i++)
        quote = s[i] == delim || s[i] == '"' || s[i] == '\r' || s[i] == '\n';
    if (!quote) { sb_put(o, s, n); return; }
    sb_putc(o, '"');
    for (size_t i = 0; i < n; i++) {
        if (s[i] == '"') sb_putc(o, '"');
        sb_putc(o, s[i]);
    }
    sb_putc(o, '"');
}

static const char *label(const plan_level *l) { return l->code ? l->code : l->name; }

void sheet_render(const avow_plan *plan, const avow_sheet *s, const char *study_sha256, char delim,
                  strbuf *out)
{
    size_t nf = plan->nfactors, ncols = nf + (plan->block ? 1 : 0) + 1;

    /* The provenance line. */
    sb_printf(out, "# avow %s run sheet; study sha256 %s; seed %llu; generator %s (GSL gsl_rng_mt19937) "
                   "seeded with %lu", AVOW_VERSION, study_sha256, (unsigned long long)s->seed,
              AVOW_SHEET_GENERATOR, s->gen_seed);
    if ((s->seed & 0xffffffffu) == 0)
        sb_puts(out, s->seed ? " (the seed modulo 2^32 is 0, which GSL replaces by 4357)"
                             : " (GSL replaces a seed of 0 by 4357)");
    else if (s->seed != (uint64_t)s->gen_seed)
        sb_puts(out, " (the seed modulo 2^32)");
    sb_printf(out, "; order: Fisher-Yates shuffle (gsl_ran_shuffle) %s; %zu run%s",
              s->nblocks ? "within each block" : "of all runs", s->nruns, s->nruns == 1 ? "" : "s");
    if (s->nblocks)
        sb_printf(out, " in %zu blocks of %zu (block %s)\n", s->nblocks, s->per_block, plan->block->name);
    else
        sb_puts(out, ", no blocks\n");

    /* The header row: the run number's column takes a name no study column has. */
    char run_col[32] = "run";
    for (unsigned k = 2;; k++) {
        size_t c = 0;
        while (c < ncols && strcmp(plan->columns[c], run_col) != 0) c++;
        if (c == ncols) break;
        snprintf(run_col, sizeof run_col, "run%u", k);
    }
    put_field(out, run_col, delim);
    for (size_t c = 0; c < ncols; c++) {
        sb_putc(out, delim);
        put_field(out, plan->columns[c], delim);
    }
    sb_putc(out, '\n');

    /* One row per run; the response is left empty. */
    for (size_t i = 0; i < s->nruns && !out->failed; i++) {
        const sheet_run *r = &s->runs[i];
        sb_printf(out, "%zu", i + 1);
        for (size_t f = 0; f < nf; f++) {
            sb_putc(out, delim);
            put_field(out, label(&plan->factors[f].levels[plan_cell_level(plan, r->cell, f)]), delim);
        }
        if (plan->block) {
            sb_putc(out, delim);
            put_field(out, label(&plan->block->levels[r->block]), delim);
        }
        sb_putc(out, delim);
        sb_putc(out, '\n');
    }
}
