/* check.c: the checker. Turns the syntax tree into a Plan: resolves names, reduces
 * contrast expressions to exact rational coefficients over cells, checks every rule of
 * the language, and reports all semantic errors of a file in one run. Never reads data. */
#include "avow/plan.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "avow/dist.h"

#include "avow/render.h"
#include "avow/syntax.h"

/* Checker state for one study file. */
typedef struct checker {
    avow_ctx *ctx;              /* diagnostics and arena */
    avow_plan *plan;            /* being filled */
    const ast_stmt *first[ST_COUNT]; /* first statement of each kind */
    const ast_stmt *factor_stmt;/* the statement of the (first) factor */
    avow_rat *weights;          /* planned replicates per cell (1 when not planned) */
} checker;

static int name_eq(const char *a, size_t alen, const char *b)
{
    return b && strlen(b) == alen && memcmp(a, b, alen) == 0;
}

/* Edit distance, capped, for "did you mean" hints. */
static size_t edit_distance(const char *a, size_t n, const char *b, size_t m)
{
    if (n > 64 || m > 64) return 99;
    size_t row[65];
    for (size_t j = 0; j <= m; j++) row[j] = j;
    for (size_t i = 1; i <= n; i++) {
        size_t prev = row[0];
        row[0] = i;
        for (size_t j = 1; j <= m; j++) {
            size_t cur = row[j];
            size_t best = prev + (a[i - 1] != b[j - 1]);
            if (row[j] + 1 < best) best = row[j] + 1;
            if (row[j - 1] + 1 < best) best = row[j - 1] + 1;
            row[j] = best;
            prev = cur;
        }
    }
    return row[m];
}

/* The closest of the candidate names, or NULL when none is close. */
static const char *closest(const char *s, size_t len, const char *const *cands, size_t n)
{
    const char *best = NULL;
    size_t bestd = len / 3 + 1;
    if (bestd > 3) bestd = 3;
    for (size_t i = 0; i < n; i++) {
        if (!cands[i]) continue;
        size_t d = edit_distance(s, len, cands[i], strlen(cands[i]));
        if (d <= bestd && (!best || d < bestd)) { best = cands[i]; bestd = d; }
    }
    return best;
}

static void rat_str(avow_rat r, char *buf) { rat_format(r, buf, 48); }

/* Exact value of a number literal; reports an error and returns 0 on failure. */
static int num_value(checker *ck, const ast_num *n, avow_rat *out)
{
    int rc = rat_from_decimal(n->text, n->len, out);
    if (rc) {
        ctx_error(ck->ctx, n->span, "the number %.*s%.*s is too large or too precise for exact arithmetic",
                  n->neg ? 1 : 0, "-", (int)(n->len > 40 ? 40 : n->len), n->text);
        return 0;
    }
    if (n->neg) *out = rat_neg(*out);
    return 1;
}

/* A printable copy of a number literal as written. */
static const char *num_text(checker *ck, const ast_num *n)
{
    return ctx_printf(ck->ctx, "%s%.*s", n->neg ? "-" : "", (int)n->len, n->text);
}

/* ---- singleton statements ---- */

static const char *stmt_word(ast_stmt_kind k)
{
    switch (k) {
    case ST_STUDY: return "study";
    case ST_RESPONSE: return "response";
    case ST_FACTOR: return "factor";
    case ST_DATA: return "data";
    case ST_ALPHA: return "alpha";
    case ST_ADJUST: return "adjust";
    case ST_ORTHOGONAL: return "orthogonal";
    case ST_CONTRAST: return "contrast";
    case ST_EXPLORE_PAIRS: return "explore pairs";
    case ST_EXPLORE_VERSUS: return "explore versus";
    case ST_EXPLORE_CONTRAST: return "explore contrast";
    case ST_PLAN: return "plan";
    case ST_VARIANCES: return "variances";
    case ST_BLOCK: return "block";
    case ST_INTERACTIONS: return "interactions";
    case ST_COUNT: break;
    }
    return "?";
}

static void collect_singletons(checker *ck, const ast_study *st)
{
    for (const ast_stmt *s = st->stmts; s; s = s->next) {
        switch (s->kind) {
        case ST_FACTOR: case ST_CONTRAST: case ST_EXPLORE_CONTRAST: case ST_EXPLORE_VERSUS:
        case ST_EXPLORE_PAIRS:
            if (!ck->first[s->kind]) ck->first[s->kind] = s;
            continue;
        default: break;
        }
        if (ck->first[s->kind]) {
            avow_diag *d = ctx_error(ck->ctx, s->key, "`%s` is given twice", stmt_word(s->kind));
            diag_related(ck->ctx, d, ck->first[s->kind]->key, "first given here");
            continue;
        }
        ck->first[s->kind] = s;
    }
    if (!ck->first[ST_STUDY]) {
        avow_diag *d = ctx_error(ck->ctx, (avow_span){0, 0}, "the file has no `study` statement");
        if (d) d->whole_file = 1;
        diag_hint(ck->ctx, d, "begin with a title: study \"what is compared and why\"");
    }
    if (!ck->first[ST_RESPONSE]) {
        avow_diag *d = ctx_error(ck->ctx, (avow_span){0, 0}, "the file has no `response` statement");
        if (d) d->whole_file = 1;
        diag_hint(ck->ctx, d, "name what is measured: response NAME \"label\" unit \"...\"");
    }
    if (!ck->first[ST_FACTOR]) {
        avow_diag *d = ctx_error(ck->ctx, (avow_span){0, 0}, "the file declares no factor");
        if (d) d->whole_file = 1;
        diag_hint(ck->ctx, d, "declare the treatments: factor NAME { level1 level2 ... }");
    }
}

static void check_title(checker *ck)
{
    const ast_stmt *s = ck->first[ST_STUDY];
    if (!s) return;
    ck->plan->title = s->str->s;
    if (s->str->len == 0) ctx_error(ck->ctx, s->str->span, "the study title is empty");
}

static void check_response(checker *ck)
{
    const ast_stmt *s = ck->first[ST_RESPONSE];
    if (!s) return;
    ck->plan->response = s->name.s;
    ck->plan->response_label = s->str ? s->str->s : NULL;
    ck->plan->unit = s->unit ? s->unit->s : NULL;
}

/* ---- factors and levels ---- */

static void check_factor_levels(checker *ck, const ast_stmt *s, plan_factor *f)
{
    size_t n = 0;
    for (const ast_level *l = s->levels; l; l = l->next) n++;
    int too_many = n > AVOW_MAX_LEVELS;
    if (too_many) {
        ctx_error(ck->ctx, s->name.span, "%s `%s` has %zu levels; at most %d are supported",
                  s->kind == ST_BLOCK ? "block" : "factor", s->name.s, n, AVOW_MAX_LEVELS);
        n = 0;
    }
    f->name = s->name.s;
    f->label = s->str ? s->str->s : NULL;
    f->span = s->span;
    f->levels = arena_alloc(ck->ctx->arena, (n ? n : 1) * sizeof *f->levels);
    if (!f->levels) { ck->ctx->oom = 1; return; }
    const ast_level **decl = avow_calloc(n ? n : 1, sizeof *decl);
    if (!decl) { ck->ctx->oom = 1; return; }
    size_t k = 0;
    for (const ast_level *l = n ? s->levels : NULL; l; l = l->next) {
        int dup = 0;
        if (l->name.len == 0) {
            ctx_error(ck->ctx, l->name.span, "a level name cannot be empty");
            continue;
        }
        for (size_t j = 0; j < k; j++) {
            if (name_eq(l->name.s, l->name.len, f->levels[j].name)) {
                avow_diag *d = ctx_error(ck->ctx, l->name.span, "level `%s` is declared twice in %s `%s`",
                                         l->name.s, s->kind == ST_BLOCK ? "block" : "factor", f->name);
                diag_related(ck->ctx, d, decl[j]->name.span, "first declared here");
                dup = 1;
            }
        }
        if (dup) continue;
        plan_level *pl = &f->levels[k];
        if (l->desc) {
            unsigned nline, dline, col;
            ctx_line_col(ck->ctx, l->name.span.start, &nline, &col);
            ctx_line_col(ck->ctx, l->desc->span.start, &dline, &col);
            if (dline != nline) {
                avow_diag *d = ctx_warning(ck->ctx, l->desc->span,
                                           "this string is read as the description of level `%s` on line %u, not as a level",
                                           l->name.s, nline);
                diag_hint(ck->ctx, d, "put each level on a line of its own, with its description on that line");
            }
        }
        pl->name = l->name.s;
        pl->desc = l->desc ? l->desc->s : NULL;
        pl->span = l->span;
        if (l->code) {
            pl->code = l->code->s;
            if (l->code->len == 0) ctx_error(ck->ctx, l->code->span, "a level code cannot be empty");
        }
        if (l->at.text) {
            pl->at_text = num_text(ck, &l->at);
            pl->has_at = num_value(ck, &l->at, &pl->at);
        }
        decl[k++] = l;
    }
    f->nlevels = k;
    /* Codes and labels must identify one level each. */
    for (size_t i = 0; i < k; i++) {
        const plan_level *a = &f->levels[i];
        const char *alabel = a->code ? a->code : a->name;
        for (size_t j = 0; j < i; j++) {
            const plan_level *b = &f->levels[j];
            const char *blabel = b->code ? b->code : b->name;
            if (strcmp(alabel, blabel) == 0) {
                avow_diag *d = ctx_error(ck->ctx, decl[i]->code ? decl[i]->code->span : decl[i]->name.span,
                                         "levels `%s` and `%s` would both be read from the label \"%s\" in the data",
                                         b->name, a->name, alabel);
                diag_related(ck->ctx, d, decl[j]->span, "the other level is declared here");
            }
            if (a->has_at && b->has_at && rat_cmp(a->at, b->at) == 0) {
                avow_diag *d = ctx_error(ck->ctx, decl[i]->at.span,
                                         "levels `%s` and `%s` have the same `at` value %s",
                                         b->name, a->name, a->at_text);
                diag_related(ck->ctx, d, decl[j]->at.span, "the other `at` value is here");
            }
        }
    }
    if (k < 2 && n == k && !too_many) {
        avow_diag *d = ctx_error(ck->ctx, s->name.span, "factor `%s` has %zu level%s; a comparison needs at least two",
                                 f->name, k, k == 1 ? "" : "s");
        diag_hint(ck->ctx, d, "list the levels inside the braces: factor %s { a b }", f->name);
    }
    avow_free(decl);
}

/* Build the model's treatment terms: every non-empty subset of the factors up to the
 * order the `interactions` statement allows, main effects first, then by order, each
 * order in the factors' declaration order (binary counting of the subset masks). */
static void build_terms(checker *ck)
{
    avow_plan *p = ck->plan;
    size_t k = p->nfactors;
    if (!k) return;
    size_t maxorder = p->interactions == INTER_NONE ? 1 : p->interactions == INTER_PAIRS ? 2 : k;
    size_t n = 0;
    for (unsigned m = 1; m < (1u << k); m++) if ((size_t)__builtin_popcount(m) <= maxorder) n++;
    p->terms = arena_alloc(ck->ctx->arena, n * sizeof *p->terms);
    if (!p->terms) { ck->ctx->oom = 1; return; }
    for (size_t order = 1; order <= maxorder; order++)
        for (unsigned m = 1; m < (1u << k); m++) {
            if ((size_t)__builtin_popcount(m) != order) continue;
            plan_term *t = &p->terms[p->nterms++];
            t->mask = m;
            t->order = order;
            t->df = 1;
            strbuf b = {0};
            for (size_t f = 0; f < k; f++) {
                if (!(m >> f & 1)) continue;
                if (b.len) sb_puts(&b, " by ");
                sb_puts(&b, p->factors[f].name);
                t->df *= p->factors[f].nlevels > 0 ? p->factors[f].nlevels - 1 : 0;
            }
            t->name = b.s ? arena_strndup(ck->ctx->arena, b.s, b.len) : NULL;
            if (!t->name) ck->ctx->oom = 1;
            sb_free(&b);
            p->treat_df += t->df;
        }
    p->saturated = !p->block && maxorder == k;
}

static void check_factors(checker *ck, const ast_study *st)
{
    size_t n = 0;
    for (const ast_stmt *s = st->stmts; s; s = s->next) if (s->kind == ST_FACTOR) n++;
    if (!n) return;
    ck->plan->factors = arena_alloc(ck->ctx->arena, n * sizeof(plan_factor));
    if (!ck->plan->factors) { ck->ctx->oom = 1; return; }
    const ast_stmt **firsts = avow_calloc(n, sizeof *firsts);
    if (!firsts) { ck->ctx->oom = 1; return; }
    size_t k = 0;
    for (const ast_stmt *s = st->stmts; s; s = s->next) {
        if (s->kind != ST_FACTOR) continue;
        if (s->name.len && ck->plan->response && strcmp(s->name.s, ck->plan->response) == 0) {
            avow_diag *d = ctx_error(ck->ctx, s->name.span, "`%s` is already the response's name", s->name.s);
            diag_related(ck->ctx, d, ck->first[ST_RESPONSE]->name.span, "the response is declared here");
        }
        int dup = 0;
        for (size_t j = 0; j < k; j++)
            if (strcmp(ck->plan->factors[j].name, s->name.s) == 0) {
                avow_diag *d = ctx_error(ck->ctx, s->name.span, "factor `%s` is declared twice", s->name.s);
                diag_related(ck->ctx, d, firsts[j]->name.span, "first declared here");
                dup = 1;
            }
        if (dup) continue;
        if (k == AVOW_MAX_FACTORS) {
            ctx_error(ck->ctx, s->key, "a study may cross at most %d treatment factors", AVOW_MAX_FACTORS);
            continue;
        }
        check_factor_levels(ck, s, &ck->plan->factors[k]);
        firsts[k++] = s;
    }
    ck->plan->nfactors = k;
    ck->factor_stmt = firsts[0];
    size_t cells = 1;
    for (size_t i = 0; i < k; i++) {
        size_t nl = ck->plan->factors[i].nlevels;
        if (nl && cells > AVOW_MAX_CELLS / nl) {
            avow_diag *d = ctx_error(ck->ctx, firsts[i]->key,
                                     "the factors cross into more than %d treatment cells", AVOW_MAX_CELLS);
            diag_hint(ck->ctx, d, "a designed experiment with this many combinations is better split into stages");
            cells = 0;
            break;
        }
        cells *= nl;
    }
    ck->plan->ncells = k ? cells : 0;
    avow_free(firsts);
}

/* The blocking factor: its levels as declared, or none (taken from the data). */
static void check_block(checker *ck, const ast_study *st)
{
    avow_plan *p = ck->plan;
    const ast_stmt *s = ck->first[ST_BLOCK];
    if (!s) return;
    p->block = arena_alloc(ck->ctx->arena, sizeof *p->block);
    if (!p->block) { ck->ctx->oom = 1; return; }
    for (size_t i = 0; i < p->nfactors; i++)
        if (strcmp(p->factors[i].name, s->name.s) == 0) {
            avow_diag *d = ctx_error(ck->ctx, s->name.span, "`%s` is already a treatment factor", s->name.s);
            diag_related(ck->ctx, d, p->factors[i].span, "the factor is declared here");
        }
    if (p->response && strcmp(s->name.s, p->response) == 0)
        ctx_error(ck->ctx, s->name.span, "`%s` is already the response's name", s->name.s);
    if (s->has_block) {
        check_factor_levels(ck, s, p->block);
    } else {
        p->block->name = s->name.s;
        p->block->label = s->str ? s->str->s : NULL;
        p->block->span = s->span;
        p->block->levels = NULL;
        p->block->nlevels = 0;
        p->block_from_data = 1;
    }
    (void)st;
}

static void check_interactions(checker *ck)
{
    avow_plan *p = ck->plan;
    const ast_stmt *s = ck->first[ST_INTERACTIONS];
    p->interactions = INTER_ALL;
    if (!s) return;
    if (name_eq(s->name.s, s->name.len, "none")) p->interactions = INTER_NONE;
    else if (name_eq(s->name.s, s->name.len, "pairs")) p->interactions = INTER_PAIRS;
    else if (!name_eq(s->name.s, s->name.len, "all")) {
        avow_diag *d = ctx_error(ck->ctx, s->name.span, "`interactions` is followed by `all`, `pairs` or `none`, not `%s`",
                                 s->name.s);
        diag_hint(ck->ctx, d, "interactions none: main effects only (an additive model)");
    }
    if (p->nfactors < 2 && p->interactions != INTER_ALL) {
        avow_diag *d = ctx_warning(ck->ctx, s->span, "`interactions %s` has no effect with one treatment factor",
                                   s->name.s);
        diag_hint(ck->ctx, d, "interactions are between crossed factors; declare a second `factor`");
    }
}

size_t plan_cell_level(const avow_plan *plan, size_t cell, size_t f)
{
    size_t stride = 1;
    for (size_t g = plan->nfactors; g-- > f + 1;) stride *= plan->factors[g].nlevels;
    return (cell / stride) % plan->factors[f].nlevels;
}

/* Name every treatment cell once, into the plan (arena). */
static void name_cells(checker *ck)
{
    avow_plan *plan = ck->plan;
    if (!plan->ncells) return;
    plan->cell_names = arena_alloc(ck->ctx->arena, plan->ncells * sizeof *plan->cell_names);
    if (!plan->cell_names) { ck->ctx->oom = 1; return; }
    for (size_t cell = 0; cell < plan->ncells; cell++) {
        if (plan->nfactors == 1) { plan->cell_names[cell] = plan->factors[0].levels[cell].name; continue; }
        strbuf b = {0};
        sb_puts(&b, "cell(");
        for (size_t f = 0; f < plan->nfactors; f++) {
            const char *nm = plan->factors[f].levels[plan_cell_level(plan, cell, f)].name;
            if (f) sb_puts(&b, ", ");
            fmt_name(nm, strlen(nm), 0, &b);
        }
        sb_putc(&b, ')');
        plan->cell_names[cell] = b.s ? arena_strndup(ck->ctx->arena, b.s, b.len) : NULL;
        if (!plan->cell_names[cell]) { ck->ctx->oom = 1; plan->cell_names[cell] = "?"; }
        sb_free(&b);
    }
}

const char *plan_cell_name(const avow_plan *plan, size_t cell)
{
    if (!plan->cell_names || cell >= plan->ncells) return "?";
    return plan->cell_names[cell];
}

int plan_term_code(const avow_plan *plan, const plan_term *term, size_t cell, size_t j)
{
    int v = 1;
    for (size_t f = plan->nfactors; f-- > 0;) {
        if (!(term->mask >> f & 1)) continue;
        size_t L = plan->factors[f].nlevels, jf = j % (L - 1);
        j /= L - 1;
        size_t l = plan_cell_level(plan, cell, f);
        if (l == L - 1) v = -v;
        else if (l != jf) return 0;
    }
    return v;
}

size_t plan_model_params(const avow_plan *plan)
{
    if (plan->block && plan->block_from_data) return 0;
    return 1 + plan->treat_df + (plan->block && plan->block->nlevels ? plan->block->nlevels - 1 : 0);
}

const char *plan_column_role(const avow_plan *plan, size_t col)
{
    if (col < plan->nfactors) return plan->factors[col].name;
    if (plan->block && col == plan->nfactors) return plan->block->name;
    return plan->response;
}

/* ---- level references ---- */

/* Suggest the closest level name among the levels of the factors in `only` (bit f),
 * or say where the levels are declared. */
static void level_suggest(checker *ck, avow_diag *d, const ast_name *level, unsigned only)
{
    avow_plan *p = ck->plan;
    size_t total = 0;
    for (size_t f = 0; f < p->nfactors; f++) if (only >> f & 1) total += p->factors[f].nlevels;
    const char **cands = avow_calloc(total ? total : 1, sizeof *cands);
    if (!cands) { ck->ctx->oom = 1; return; }
    size_t n = 0;
    for (size_t f = 0; f < p->nfactors; f++)
        if (only >> f & 1)
            for (size_t i = 0; i < p->factors[f].nlevels; i++) cands[n++] = p->factors[f].levels[i].name;
    const char *c = closest(level->s, level->len, cands, n);
    avow_free(cands);
    if (c) {
        strbuf b = {0};
        fmt_name(c, strlen(c), 0, &b);
        diag_hint(ck->ctx, d, "did you mean %s%s%s?", b.s && b.s[0] == '"' ? "" : "`",
                  b.s ? b.s : c, b.s && b.s[0] == '"' ? "" : "`");
        sb_free(&b);
        return;
    }
    for (size_t f = 0; f < p->nfactors; f++)
        if (only >> f & 1) {
            unsigned line, col;
            ctx_line_col(ck->ctx, p->factors[f].span.start, &line, &col);
            diag_hint(ck->ctx, d, "the levels of `%s` are declared at line %u", p->factors[f].name, line);
            return;
        }
}

/* Resolve a (maybe factor-qualified) level reference to a factor and one of its levels.
 * Returns 1, or 0 after an error. */
static int resolve_ref(checker *ck, const ast_name *factor, const ast_name *level, size_t *fo, size_t *lo)
{
    avow_plan *p = ck->plan;
    if (p->nfactors == 0) return 0;
    unsigned only = (1u << p->nfactors) - 1;
    if (factor && factor->len) {
        size_t fi;
        for (fi = 0; fi < p->nfactors; fi++) if (strcmp(p->factors[fi].name, factor->s) == 0) break;
        if (fi == p->nfactors) {
            if (p->block && strcmp(p->block->name, factor->s) == 0) {
                avow_diag *d = ctx_error(ck->ctx, factor->span, "`%s` is the block; comparisons are between treatments",
                                         factor->s);
                diag_hint(ck->ctx, d, "blocks are averaged out of every comparison");
                return 0;
            }
            avow_diag *d = ctx_error(ck->ctx, factor->span, "unknown factor `%s`", factor->s);
            const char **cands = avow_calloc(p->nfactors, sizeof *cands);
            if (!cands) { ck->ctx->oom = 1; return 0; }
            for (size_t i = 0; i < p->nfactors; i++) cands[i] = p->factors[i].name;
            const char *c = closest(factor->s, factor->len, cands, p->nfactors);
            avow_free(cands);
            if (c) diag_hint(ck->ctx, d, "did you mean `%s`?", c);
            return 0;
        }
        only = 1u << fi;
    }
    size_t found = 0, ff = 0, fl = 0, second = 0;
    for (size_t f = 0; f < p->nfactors; f++) {
        if (!(only >> f & 1)) continue;
        const plan_factor *pf = &p->factors[f];
        for (size_t i = 0; i < pf->nlevels; i++)
            if (name_eq(level->s, level->len, pf->levels[i].name)) {
                if (found++ == 0) { ff = f; fl = i; }
                else second = f;
            }
    }
    if (found == 1) { *fo = ff; *lo = fl; return 1; }
    if (found > 1) {
        avow_diag *d = ctx_error(ck->ctx, level->span, "`%s` is a level of both `%s` and `%s`",
                                 level->s, p->factors[ff].name, p->factors[second].name);
        diag_hint(ck->ctx, d, "name the factor too: %s.%s", p->factors[ff].name, level->s);
        return 0;
    }
    avow_diag *d = ctx_error(ck->ctx, level->span, "unknown level `%s`", level->s);
    for (size_t f = 0; f < p->nfactors; f++) {
        if (!(only >> f & 1)) continue;
        const plan_factor *pf = &p->factors[f];
        for (size_t i = 0; i < pf->nlevels; i++)
            if (pf->levels[i].code && name_eq(level->s, level->len, pf->levels[i].code)) {
                diag_hint(ck->ctx, d, "\"%s\" is the data code of level `%s`; refer to levels by name",
                          pf->levels[i].code, pf->levels[i].name);
                return 0;
            }
        if (name_eq(level->s, level->len, pf->name)) {
            diag_hint(ck->ctx, d, "`%s` is the factor; name one of its levels", pf->name);
            return 0;
        }
    }
    if (p->block) {
        for (size_t i = 0; i < p->block->nlevels; i++)
            if (name_eq(level->s, level->len, p->block->levels[i].name)) {
                diag_hint(ck->ctx, d, "`%s` is a level of the block `%s`; comparisons are between treatments",
                          level->s, p->block->name);
                return 0;
            }
    }
    level_suggest(ck, d, level, only);
    return 0;
}

/* Resolve a reference to a treatment cell when the study has one factor (a level is a
 * cell); -1 after an error. */
static long resolve_level(checker *ck, const ast_name *factor, const ast_name *level)
{
    size_t f, l;
    if (!resolve_ref(ck, factor, level, &f, &l)) return -1;
    return (long)l;
}

/* ---- contrast reduction ---- */

/* The value of an expression: coefficients per cell, a constant, and whether it
 * refers to any level at all. */
typedef struct linval {
    avow_rat *c;        /* ncells coefficients */
    avow_rat k;         /* constant term */
    int levels;         /* refers to a level mean */
} linval;

static int lin_alloc(checker *ck, linval *v)
{
    size_t n = ck->plan->ncells ? ck->plan->ncells : 1;
    v->c = avow_calloc(n, sizeof *v->c);
    if (!v->c) { ck->ctx->oom = 1; return 0; }
    for (size_t i = 0; i < n; i++) v->c[i] = RAT_ZERO;
    v->k = RAT_ZERO;
    v->levels = 0;
    return 1;
}

static void lin_free(linval *v) { avow_free(v->c); v->c = NULL; }

static void overflow_error(checker *ck, avow_span span)
{
    avow_diag *d = ctx_error(ck->ctx, span,
                             "the coefficients overflow exact 64-bit fractions");
    diag_hint(ck->ctx, d, "simplify the expression or use smaller numbers");
}

/* v = a op b elementwise (op: +1 add, -1 subtract). */
static int lin_addsub(checker *ck, linval *a, const linval *b, int op, avow_span span)
{
    size_t n = ck->plan->ncells;
    for (size_t i = 0; i < n; i++) {
        int rc = op > 0 ? rat_add(a->c[i], b->c[i], &a->c[i]) : rat_sub(a->c[i], b->c[i], &a->c[i]);
        if (rc) { overflow_error(ck, span); return 0; }
    }
    int rc = op > 0 ? rat_add(a->k, b->k, &a->k) : rat_sub(a->k, b->k, &a->k);
    if (rc) { overflow_error(ck, span); return 0; }
    a->levels |= b->levels;
    return 1;
}

static int lin_scale(checker *ck, linval *a, avow_rat f, int divide, avow_span span)
{
    size_t n = ck->plan->ncells;
    for (size_t i = 0; i < n; i++) {
        int rc = divide ? rat_div(a->c[i], f, &a->c[i]) : rat_mul(a->c[i], f, &a->c[i]);
        if (rc) { overflow_error(ck, span); return 0; }
    }
    int rc = divide ? rat_div(a->k, f, &a->k) : rat_mul(a->k, f, &a->k);
    if (rc) { overflow_error(ck, span); return 0; }
    return 1;
}

/* v += scale * (the marginal mean of level l of factor f): scale / G on each of the G
 * cells with that level (the mean of a level averages the other factors' levels
 * equally). */
static int marginal_add(checker *ck, linval *v, size_t f, size_t l, avow_rat scale, avow_span span)
{
    avow_plan *p = ck->plan;
    size_t G = p->ncells / p->factors[f].nlevels;
    avow_rat w;
    if (rat_div(scale, rat_int((int64_t)G), &w)) { overflow_error(ck, span); return 0; }
    for (size_t c = 0; c < p->ncells; c++)
        if (plan_cell_level(p, c, f) == l && rat_add(v->c[c], w, &v->c[c])) { overflow_error(ck, span); return 0; }
    v->levels = 1;
    return 1;
}

static int reduce(checker *ck, const ast_expr *e, linval *out);

static int reduce_mean(checker *ck, const ast_expr *e, linval *out)
{
    size_t m = 0;
    int ok = 1;
    if (!e->args) {
        avow_diag *d = ctx_error(ck->ctx, e->span, "mean() needs at least one level");
        diag_hint(ck->ctx, d, "for example mean(a, b)");
        return 0;
    }
    size_t nargs = 0;
    for (const ast_expr *a = e->args; a; a = a->next) nargs++;
    size_t *fs = avow_calloc(nargs, sizeof *fs), *ls = avow_calloc(nargs, sizeof *ls);
    const ast_expr **where = avow_calloc(nargs, sizeof *where);
    if (!fs || !ls || !where) { avow_free(fs); avow_free(ls); avow_free(where); ck->ctx->oom = 1; return 0; }
    for (const ast_expr *a = e->args; a; a = a->next) {
        if (a->kind != EX_REF) {
            avow_diag *d = ctx_error(ck->ctx, a->span, "mean() takes level names, not expressions");
            diag_hint(ck->ctx, d, "average expressions with arithmetic: (a + 2*b)/3");
            ok = 0;
            continue;
        }
        size_t f, l;
        if (!resolve_ref(ck, &a->factor, &a->level, &f, &l)) { ok = 0; continue; }
        int dup = 0;
        for (size_t j = 0; j < m; j++)
            if (fs[j] == f && ls[j] == l) {
                avow_diag *d = ctx_error(ck->ctx, a->span, "level `%s` appears twice in mean()",
                                         ck->plan->factors[f].levels[l].name);
                diag_related(ck->ctx, d, where[j]->span, "it first appears here");
                diag_hint(ck->ctx, d, "to weight a level, write the weights out: (2*a + b)/3");
                ok = 0;
                dup = 1;
            }
        if (dup) continue;
        fs[m] = f; ls[m] = l; where[m] = a;
        m++;
    }
    avow_rat w;
    if (ok && rat_make(1, (int64_t)m, &w)) { overflow_error(ck, e->span); ok = 0; }
    for (size_t j = 0; ok && j < m; j++) ok = marginal_add(ck, out, fs[j], ls[j], w, e->span);
    avow_free(fs); avow_free(ls); avow_free(where);
    return ok;
}

/* cell(L1, L2, ...): the mean of the cells that have all the given levels (one level per
 * factor at most; the factors left out are averaged equally). */
static int reduce_cell(checker *ck, const ast_expr *e, linval *out)
{
    avow_plan *p = ck->plan;
    if (!e->args) {
        avow_diag *d = ctx_error(ck->ctx, e->span, "cell() needs a level of at least one factor");
        diag_hint(ck->ctx, d, "for example cell(%s)", p->nfactors > 1 ? "a, high" : "a");
        return 0;
    }
    long lev[AVOW_MAX_FACTORS];
    const ast_expr *where[AVOW_MAX_FACTORS] = {0};
    for (size_t f = 0; f < AVOW_MAX_FACTORS; f++) lev[f] = -1;
    int ok = 1;
    for (const ast_expr *a = e->args; a; a = a->next) {
        if (a->kind != EX_REF) {
            avow_diag *d = ctx_error(ck->ctx, a->span, "cell() takes level names, one per factor");
            diag_hint(ck->ctx, d, "for example cell(a, high)");
            ok = 0;
            continue;
        }
        size_t f, l;
        if (!resolve_ref(ck, &a->factor, &a->level, &f, &l)) { ok = 0; continue; }
        if (where[f]) {
            avow_diag *d = ctx_error(ck->ctx, a->span, "cell() names two levels of `%s`", p->factors[f].name);
            diag_related(ck->ctx, d, where[f]->span, "the first is here");
            diag_hint(ck->ctx, d, "a cell has one level of each factor; to average levels use mean()");
            ok = 0;
            continue;
        }
        where[f] = a;
        lev[f] = (long)l;
    }
    if (!ok) return 0;
    size_t G = 0;
    for (size_t c = 0; c < p->ncells; c++) {
        int match = 1;
        for (size_t f = 0; f < p->nfactors && match; f++)
            if (lev[f] >= 0 && plan_cell_level(p, c, f) != (size_t)lev[f]) match = 0;
        if (match) G++;
    }
    avow_rat w;
    if (rat_make(1, (int64_t)G, &w)) { overflow_error(ck, e->span); return 0; }
    for (size_t c = 0; c < p->ncells; c++) {
        int match = 1;
        for (size_t f = 0; f < p->nfactors && match; f++)
            if (lev[f] >= 0 && plan_cell_level(p, c, f) != (size_t)lev[f]) match = 0;
        if (match) out->c[c] = w;
    }
    out->levels = 1;
    return 1;
}

/* The factor a cell vector is a pure contrast of: constant over the other factors, so
 * that v[cell] = a[level of f] / G. Returns the factor and fills a (per level sums), or
 * -1 when v varies with more than one factor (or none). */
static long pure_factor(checker *ck, const avow_rat *v, avow_rat *a, int *overflow)
{
    avow_plan *p = ck->plan;
    *overflow = 0;
    for (size_t f = 0; f < p->nfactors; f++) {
        size_t L = p->factors[f].nlevels, G = p->ncells / L;
        for (size_t l = 0; l < L; l++) a[l] = RAT_ZERO;
        for (size_t c = 0; c < p->ncells; c++) {
            size_t l = plan_cell_level(p, c, f);
            if (rat_add(a[l], v[c], &a[l])) { *overflow = 1; return -1; }
        }
        int pure = 1;
        for (size_t c = 0; c < p->ncells && pure; c++) {
            avow_rat want;
            if (rat_div(a[plan_cell_level(p, c, f)], rat_int((int64_t)G), &want)) { *overflow = 1; return -1; }
            if (rat_cmp(want, v[c]) != 0) pure = 0;
        }
        int any = 0;
        for (size_t l = 0; l < L; l++) if (!rat_is_zero(a[l])) any = 1;
        if (pure && any) return (long)f;
    }
    return -1;
}

/* interaction(E1, E2, ...): each argument a contrast among the levels of one factor,
 * distinct factors; the result is their product over the cells (the interaction
 * contrast: does the first comparison change with the second?), averaged over the
 * factors left out. */
static int reduce_interaction(checker *ck, const ast_expr *e, linval *out)
{
    avow_plan *p = ck->plan;
    size_t nargs = 0;
    for (const ast_expr *a = e->args; a; a = a->next) nargs++;
    if (nargs < 2) {
        avow_diag *d = ctx_error(ck->ctx, e->span, "interaction() takes two or more contrasts, each on another factor");
        diag_hint(ck->ctx, d, "for example interaction(high - low, resinA - resinB)");
        return 0;
    }
    avow_rat *coef[AVOW_MAX_FACTORS] = {0};
    const ast_expr *where[AVOW_MAX_FACTORS] = {0};
    int ok = 1;
    for (const ast_expr *a = e->args; a; a = a->next) {
        linval v;
        if (!lin_alloc(ck, &v)) { ok = 0; break; }
        if (!reduce(ck, a, &v)) { lin_free(&v); ok = 0; continue; }
        avow_rat sum = RAT_ZERO;
        for (size_t c = 0; c < p->ncells; c++) rat_add(sum, v.c[c], &sum);
        if (!v.levels || !rat_is_zero(v.k)) {
            ctx_error(ck->ctx, a->span, "each argument of interaction() compares levels of one factor");
            lin_free(&v); ok = 0; continue;
        }
        avow_rat *lv = avow_calloc(AVOW_MAX_LEVELS, sizeof *lv);
        if (!lv) { ck->ctx->oom = 1; lin_free(&v); ok = 0; break; }
        int of;
        long f = pure_factor(ck, v.c, lv, &of);
        lin_free(&v);
        if (of) { overflow_error(ck, a->span); avow_free(lv); ok = 0; continue; }
        if (f < 0) {
            avow_diag *d = ctx_error(ck->ctx, a->span, "this argument of interaction() mixes levels of several factors");
            diag_hint(ck->ctx, d, "give one comparison per factor, e.g. interaction(high - low, a - b)");
            avow_free(lv); ok = 0; continue;
        }
        avow_rat lsum = RAT_ZERO;
        for (size_t l = 0; l < p->factors[f].nlevels; l++) rat_add(lsum, lv[l], &lsum);
        if (!rat_is_zero(lsum)) {
            char buf[48];
            rat_str(lsum, buf);
            avow_diag *d = ctx_error(ck->ctx, a->span, "the coefficients of this comparison sum to %s, not 0", buf);
            diag_hint(ck->ctx, d, "each argument of interaction() is itself a contrast, e.g. high - low");
            avow_free(lv); ok = 0; continue;
        }
        if (coef[f]) {
            avow_diag *d = ctx_error(ck->ctx, a->span, "interaction() has two comparisons of `%s`", p->factors[f].name);
            diag_related(ck->ctx, d, where[f]->span, "the first is here");
            avow_free(lv); ok = 0; continue;
        }
        coef[f] = lv;
        where[f] = a;
    }
    if (ok) {
        size_t G = 1;
        for (size_t f = 0; f < p->nfactors; f++) if (!coef[f]) G *= p->factors[f].nlevels;
        for (size_t c = 0; c < p->ncells && ok; c++) {
            avow_rat x;
            if (rat_make(1, (int64_t)G, &x)) { overflow_error(ck, e->span); ok = 0; break; }
            for (size_t f = 0; f < p->nfactors; f++)
                if (coef[f] && rat_mul(x, coef[f][plan_cell_level(p, c, f)], &x)) {
                    overflow_error(ck, e->span); ok = 0; break;
                }
            out->c[c] = x;
        }
        out->levels = 1;
    }
    for (size_t f = 0; f < AVOW_MAX_FACTORS; f++) avow_free(coef[f]);
    return ok;
}

static int reduce_trend(checker *ck, const ast_expr *e, linval *out)
{
    const ast_expr *fa = e->args, *da = fa ? fa->next : NULL;
    if (!fa || !da || da->next) {
        avow_diag *d = ctx_error(ck->ctx, e->span, "trend() takes two arguments: a factor and a degree");
        diag_hint(ck->ctx, d, "for example trend(%s, 1) for a linear trend",
                  ck->plan->nfactors ? ck->plan->factors[0].name : "dose");
        return 0;
    }
    if (fa->kind != EX_REF || fa->factor.len || fa->level.quoted) {
        ctx_error(ck->ctx, fa->span, "the first argument of trend() is a factor name");
        return 0;
    }
    const plan_factor *f = NULL;
    size_t fidx = 0;
    for (size_t i = 0; i < ck->plan->nfactors; i++)
        if (name_eq(fa->level.s, fa->level.len, ck->plan->factors[i].name)) { f = &ck->plan->factors[i]; fidx = i; }
    if (!f) {
        avow_diag *d = ctx_error(ck->ctx, fa->span, "unknown factor `%s`", fa->level.s);
        if (ck->plan->nfactors) {
            const plan_factor *f0 = &ck->plan->factors[0];
            int is_level = 0;
            for (size_t i = 0; i < f0->nlevels; i++)
                if (name_eq(fa->level.s, fa->level.len, f0->levels[i].name)) is_level = 1;
            if (is_level) diag_hint(ck->ctx, d, "`%s` is a level; trend() runs over a factor's levels: trend(%s, 1)",
                                    fa->level.s, f0->name);
            else diag_hint(ck->ctx, d, "did you mean `%s`?", f0->name);
        }
        return 0;
    }
    avow_rat deg;
    if (da->kind != EX_NUM || rat_from_decimal(da->num.text, da->num.len, &deg) || !rat_is_int(deg)
        || deg.num < 1) {
        ctx_error(ck->ctx, da->span, "the degree of trend() is a whole number, 1 or more");
        return 0;
    }
    size_t k = 0;
    for (size_t i = 0; i < f->nlevels; i++) if (f->levels[i].has_at) k++;
    if (k < 2) {
        avow_diag *d = ctx_error(ck->ctx, e->span, "trend() needs levels with `at` values; factor `%s` has %zu",
                                 f->name, k);
        diag_hint(ck->ctx, d, "give each quantitative level its value: oven60 at 60");
        return 0;
    }
    if (deg.num >= (int64_t)k) {
        avow_diag *d = ctx_error(ck->ctx, da->span,
                                 "trend degree %lld needs more than %lld levels with `at` values; factor `%s` has %zu",
                                 (long long)deg.num, (long long)deg.num, f->name, k);
        diag_hint(ck->ctx, d, "with %zu levels the highest degree is %zu", k, k - 1);
        return 0;
    }
    avow_rat *x = avow_calloc(k, sizeof *x), *w = avow_calloc(k, sizeof *w), *c = avow_calloc(k, sizeof *c);
    int ok = x && w && c;
    if (!ok) ck->ctx->oom = 1;
    /* Weights: the planned replicates behind each level's mean. With several factors a
     * level's mean averages G cells, and its variance is sigma^2 sum(1/n_cell) / G^2, so
     * it counts as G^2 / sum(1/n_cell) replicates (G n with n per cell). */
    size_t j = 0;
    size_t G = ck->plan->ncells / f->nlevels;
    for (size_t i = 0; ok && i < f->nlevels; i++) {
        if (!f->levels[i].has_at) continue;
        x[j] = f->levels[i].at;
        avow_rat inv = RAT_ZERO, t;
        for (size_t cc = 0; cc < ck->plan->ncells; cc++)
            if (plan_cell_level(ck->plan, cc, fidx) == i
                && (rat_div(RAT_ONE, ck->weights[cc], &t) || rat_add(inv, t, &inv))) ok = 0;
        if (ok && rat_div(rat_int((int64_t)(G * G)), inv, &w[j])) ok = 0;
        if (!ok) { overflow_error(ck, e->span); break; }
        j++;
    }
    if (ok) {
        int rc = rat_trend(x, w, k, (int)deg.num, c);
        if (rc == AVOW_ENOMEM) {
            ck->ctx->oom = 1;
            ok = 0;
        } else if (rc) {
            avow_diag *d = ctx_error(ck->ctx, e->span, "the trend coefficients overflow exact 64-bit fractions");
            diag_hint(ck->ctx, d, "rescale the `at` values (for example hours instead of seconds)");
            ok = 0;
        }
    }
    for (size_t i = 0, jj = 0; ok && i < f->nlevels; i++) {
        if (!f->levels[i].has_at) continue;
        ok = marginal_add(ck, out, fidx, i, c[jj++], e->span);
    }
    if (ok) out->levels = 1;
    avow_free(x); avow_free(w); avow_free(c);
    return ok;
}

static int reduce(checker *ck, const ast_expr *e, linval *out)
{
    switch (e->kind) {
    case EX_NUM: {
        avow_rat v;
        if (!num_value(ck, &e->num, &v)) return 0;
        out->k = v;
        return 1;
    }
    case EX_REF: {
        size_t f, l;
        if (!resolve_ref(ck, &e->factor, &e->level, &f, &l)) return 0;
        return marginal_add(ck, out, f, l, RAT_ONE, e->span);
    }
    case EX_NEG:
        if (!reduce(ck, e->lhs, out)) return 0;
        return lin_scale(ck, out, rat_int(-1), 0, e->span);
    case EX_ADD: case EX_SUB: case EX_MUL: case EX_DIV: {
        linval b;
        if (!lin_alloc(ck, &b)) return 0;
        int okl = reduce(ck, e->lhs, out);
        int okr = reduce(ck, e->rhs, &b);
        int ok = okl && okr;
        if (ok && (e->kind == EX_ADD || e->kind == EX_SUB))
            ok = lin_addsub(ck, out, &b, e->kind == EX_ADD ? 1 : -1, e->span);
        else if (ok && e->kind == EX_MUL) {
            if (out->levels && b.levels) {
                avow_diag *d = ctx_error(ck->ctx, e->span, "not linear: a product of two level means");
                diag_hint(ck->ctx, d, "a contrast multiplies level means by numbers only, e.g. 2*a - b - c");
                ok = 0;
            } else if (out->levels) {
                ok = lin_scale(ck, out, b.k, 0, e->span);
            } else {
                ok = lin_scale(ck, &b, out->k, 0, e->span);
                if (ok) { avow_rat *t = out->c; *out = b; b.c = t; }
            }
        } else if (ok && e->kind == EX_DIV) {
            if (b.levels) {
                avow_diag *d = ctx_error(ck->ctx, e->rhs->span, "not linear: division by a level mean");
                diag_hint(ck->ctx, d, "divide by numbers only, e.g. (a + b)/2 - c");
                ok = 0;
            } else if (rat_is_zero(b.k)) {
                ctx_error(ck->ctx, e->rhs->span, "division by zero");
                ok = 0;
            } else {
                ok = lin_scale(ck, out, b.k, 1, e->span);
            }
        }
        lin_free(&b);
        return ok;
    }
    case EX_CALL:
        if (name_eq(e->fn.s, e->fn.len, "mean")) return reduce_mean(ck, e, out);
        if (name_eq(e->fn.s, e->fn.len, "trend")) return reduce_trend(ck, e, out);
        if (name_eq(e->fn.s, e->fn.len, "cell")) return reduce_cell(ck, e, out);
        if (name_eq(e->fn.s, e->fn.len, "interaction")) return reduce_interaction(ck, e, out);
        {
            avow_diag *d = ctx_error(ck->ctx, e->fn.span, "unknown function `%s`", e->fn.s);
            diag_hint(ck->ctx, d, "the functions are mean(LEVEL, ...), trend(FACTOR, DEGREE), cell(LEVEL, ...) "
                                  "and interaction(CONTRAST, CONTRAST, ...)");
        }
        return 0;
    }
    return 0;
}

/* Suggest a zero-sum form: mean(positive levels) - mean(negative levels). */
static void sum_hint(checker *ck, avow_diag *d, const avow_rat *c)
{
    size_t n = ck->plan->ncells, np = 0, nn = 0;
    avow_rat pv = RAT_ZERO, nv = RAT_ZERO;
    int uniform = 1;
    for (size_t i = 0; i < n; i++) {
        int s = rat_sign(c[i]);
        if (s > 0) { if (np++ && rat_cmp(pv, c[i])) uniform = 0; pv = c[i]; }
        if (s < 0) { if (nn++ && rat_cmp(nv, c[i])) uniform = 0; nv = c[i]; }
    }
    if (!np || !nn) {
        diag_hint(ck->ctx, d, "a contrast compares means, so its coefficients sum to zero, e.g. a - b");
        return;
    }
    if (!uniform) {
        diag_hint(ck->ctx, d, "weights on each side of the comparison must balance");
        return;
    }
    strbuf b = {0};
    for (int side = 1; side >= -1; side -= 2) {
        size_t cnt = side > 0 ? np : nn;
        if (side < 0) sb_puts(&b, " - ");
        if (cnt > 1) sb_puts(&b, "mean(");
        size_t w = 0;
        for (size_t i = 0; i < n; i++) {
            if (rat_sign(c[i]) != side) continue;
            if (w++) sb_puts(&b, ", ");
            const char *nm = plan_cell_name(ck->plan, i);
            fmt_name(nm, strlen(nm), 0, &b);
        }
        if (cnt > 1) sb_putc(&b, ')');
    }
    if (b.failed) ck->ctx->oom = 1;
    else diag_hint(ck->ctx, d, "did you mean %s?", b.s);
    sb_free(&b);
}

/* Reduce one contrast statement into pc. */
static void check_contrast(checker *ck, const ast_stmt *s, plan_contrast *pc, int explore)
{
    pc->name = s->name.s;
    pc->desc = s->desc ? s->desc->s : NULL;
    pc->side = s->side;
    pc->span = s->span;
    strbuf b = {0};
    fmt_expr(s->expr, &b);
    pc->expr = b.s ? arena_strndup(ck->ctx->arena, b.s, b.len) : "";
    sb_free(&b);
    if (s->side != SIDE_TWO) {
        avow_rat z;
        if (explore) {
            avow_diag *d = ctx_error(ck->ctx, s->side_num.span,
                                     "an exploratory contrast is two-sided; a direction must be fixed before the data are seen");
            diag_hint(ck->ctx, d, "declare it as a planned `contrast` if the direction was chosen in advance");
        } else if (rat_from_decimal(s->side_num.text, s->side_num.len, &z) || !rat_is_zero(z)) {
            avow_diag *d = ctx_error(ck->ctx, s->side_num.span, "a one-sided contrast compares with 0");
            diag_hint(ck->ctx, d, "write `> 0` or `< 0`; to test a difference of %s%.*s, shift the comparison in the analysis plan",
                      s->side_num.neg ? "-" : "", (int)s->side_num.len, s->side_num.text);
        }
    }
    if (ck->plan->ncells == 0) return;
    linval v;
    if (!lin_alloc(ck, &v)) return;
    if (!reduce(ck, s->expr, &v)) { lin_free(&v); return; }
    size_t n = ck->plan->ncells;
    pc->coef = arena_alloc(ck->ctx->arena, n * sizeof *pc->coef);
    if (!pc->coef) { ck->ctx->oom = 1; lin_free(&v); return; }
    memcpy(pc->coef, v.c, n * sizeof *pc->coef);
    lin_free(&v);
    if (!v.levels) {
        avow_diag *d = ctx_error(ck->ctx, s->expr->span, "the contrast refers to no level");
        diag_hint(ck->ctx, d, "a contrast compares level means, e.g. a - b");
        return;
    }
    if (!rat_is_zero(v.k)) {
        char buf[48];
        rat_str(rat_sign(v.k) < 0 ? rat_neg(v.k) : v.k, buf);
        avow_diag *d = ctx_error(ck->ctx, s->expr->span, "the expression has a constant term (%s %s)",
                                 rat_sign(v.k) < 0 ? "-" : "+", buf);
        diag_hint(ck->ctx, d, "a contrast is a combination of level means only; remove the number");
        return;
    }
    int nonzero = 0;
    avow_rat sum = RAT_ZERO;
    for (size_t i = 0; i < n; i++) {
        if (!rat_is_zero(pc->coef[i])) nonzero = 1;
        if (rat_add(sum, pc->coef[i], &sum)) { overflow_error(ck, s->expr->span); return; }
    }
    if (!nonzero) {
        avow_diag *d = ctx_error(ck->ctx, s->expr->span, "all coefficients are zero: the contrast compares nothing");
        diag_hint(ck->ctx, d, "the terms cancel; check the signs");
        return;
    }
    if (!rat_is_zero(sum)) {
        char buf[48];
        rat_str(sum, buf);
        avow_diag *d = ctx_error(ck->ctx, s->expr->span, "the coefficients sum to %s, not 0", buf);
        sum_hint(ck, d, pc->coef);
        return;
    }
    if (ck->plan->interactions != INTER_ALL && ck->plan->nfactors > 1) {
        /* Under a model without some interactions, a contrast must touch a term it keeps. */
        int touches = 0;
        for (size_t t = 0; t < ck->plan->nterms && !touches; t++) {
            const plan_term *term = &ck->plan->terms[t];
            for (size_t j = 0; j < term->df && !touches; j++) {
                avow_rat dot = RAT_ZERO, x;
                for (size_t c = 0; c < n; c++) {
                    int code = plan_term_code(ck->plan, term, c, j);
                    if (code && (rat_mul(pc->coef[c], rat_int(code), &x) || rat_add(dot, x, &dot))) {
                        overflow_error(ck, s->expr->span);
                        return;
                    }
                }
                if (!rat_is_zero(dot)) touches = 1;
            }
        }
        if (!touches) {
            avow_diag *d = ctx_error(ck->ctx, s->expr->span,
                                     "this contrast measures only interactions that the model leaves out");
            diag_related(ck->ctx, d, ck->first[ST_INTERACTIONS]->span, "the model's interactions are set here");
            diag_hint(ck->ctx, d, "keep the interaction in the model (interactions all), or drop the contrast");
            return;
        }
    }
    pc->valid = 1;
}

static int contrast_name_taken(checker *ck, const ast_stmt *s, const ast_study *st)
{
    for (const ast_stmt *t = st->stmts; t && t != s; t = t->next) {
        if (t->kind != ST_CONTRAST && t->kind != ST_EXPLORE_CONTRAST) continue;
        if (strcmp(t->name.s, s->name.s) == 0) {
            avow_diag *d = ctx_error(ck->ctx, s->name.span, "contrast `%s` is declared twice", s->name.s);
            diag_related(ck->ctx, d, t->name.span, "first declared here");
            return 1;
        }
    }
    return 0;
}

static void check_contrasts(checker *ck, const ast_study *st)
{
    avow_plan *p = ck->plan;
    size_t np = 0, ne = 0;
    for (const ast_stmt *s = st->stmts; s; s = s->next) {
        if (s->kind == ST_CONTRAST) np++;
        if (s->kind == ST_EXPLORE_CONTRAST) ne++;
    }
    if (np + ne > AVOW_MAX_CONTRASTS) {
        ctx_error(ck->ctx, ck->first[ST_CONTRAST] ? ck->first[ST_CONTRAST]->key : ck->first[ST_EXPLORE_CONTRAST]->key,
                  "%zu contrasts; at most %d are supported", np + ne, AVOW_MAX_CONTRASTS);
        return;
    }
    p->contrasts = arena_alloc(ck->ctx->arena, (np ? np : 1) * sizeof *p->contrasts);
    p->explores = arena_alloc(ck->ctx->arena, (ne ? ne : 1) * sizeof *p->explores);
    if (!p->contrasts || !p->explores) { ck->ctx->oom = 1; return; }
    for (const ast_stmt *s = st->stmts; s; s = s->next) {
        if (s->kind != ST_CONTRAST && s->kind != ST_EXPLORE_CONTRAST) continue;
        int dup = contrast_name_taken(ck, s, st);
        int explore = s->kind == ST_EXPLORE_CONTRAST;
        plan_contrast *pc = explore ? &p->explores[p->nexplores] : &p->contrasts[p->ncontrasts];
        check_contrast(ck, s, pc, explore);
        if (dup) pc->valid = 0;
        if (explore) p->nexplores++; else p->ncontrasts++;
    }
}

/* Orthogonality and proportionality of every pair of planned contrasts. */
static void check_orthogonality(checker *ck)
{
    avow_plan *p = ck->plan;
    size_t m = p->ncontrasts, n = p->ncells;
    if (!m || !n) return;
    p->ortho = arena_alloc(ck->ctx->arena, m * m * sizeof *p->ortho);
    if (!p->ortho) { ck->ctx->oom = 1; return; }
    for (size_t i = 0; i < m; i++) {
        for (size_t j = 0; j <= i; j++) {
            const plan_contrast *a = &p->contrasts[i], *b = &p->contrasts[j];
            p->ortho[i * m + j] = p->ortho[j * m + i] = RAT_ZERO;
            if (!a->valid || !b->valid) continue;
            avow_rat dot;
            if (rat_vec_weighted_dot(a->coef, b->coef, ck->weights, n, &dot)) {
                overflow_error(ck, a->span);
                continue;
            }
            p->ortho[i * m + j] = p->ortho[j * m + i] = dot;
            if (i == j || rat_is_zero(dot)) continue;
            int prop = rat_vec_proportional(a->coef, b->coef, n);
            if (prop) {
                avow_diag *d = ctx_warning(ck->ctx, a->span, "contrast `%s` is proportional to `%s`: it tests the same comparison",
                                           a->name, b->name);
                diag_related(ck->ctx, d, b->span, ctx_printf(ck->ctx, "`%s` is declared here", b->name));
            }
            if (p->orthogonal || !prop) {
                char buf[48];
                rat_str(dot, buf);
                avow_diag *d;
                const char *what = p->replicates ? "with the planned replicates" : "with equal replicates";
                if (p->orthogonal)
                    d = ctx_error(ck->ctx, a->span, "contrasts `%s` and `%s` are not orthogonal %s (sum c*d/n = %s); the study requires orthogonal contrasts",
                                  b->name, a->name, what, buf);
                else
                    d = ctx_warning(ck->ctx, a->span, "contrasts `%s` and `%s` are not orthogonal %s (sum c*d/n = %s)",
                                    b->name, a->name, what, buf);
                diag_related(ck->ctx, d, b->span, ctx_printf(ck->ctx, "`%s` is declared here", b->name));
            }
        }
    }
    size_t dfb = p->treat_df, valid = 0;
    for (size_t i = 0; i < m; i++) {
        if (!p->contrasts[i].valid) continue;
        if (++valid == dfb + 1) {
            if (p->nfactors == 1)
                ctx_warning(ck->ctx, p->contrasts[i].span,
                            "%zu planned contrasts but only %zu degree%s of freedom between the %zu levels",
                            m, dfb, dfb == 1 ? "" : "s", n);
            else
                ctx_warning(ck->ctx, p->contrasts[i].span,
                            "%zu planned contrasts but only %zu degree%s of freedom among the treatments of the model",
                            m, dfb, dfb == 1 ? "" : "s");
            break;
        }
    }
}

/* ---- data ---- */

static int is_hex(const char *s, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        char c = s[i];
        if (!((c >= '0' && c <= '9') || (c >= 'a' && c <= 'f') || (c >= 'A' && c <= 'F'))) return 0;
    }
    return 1;
}

static void check_data_block(checker *ck, const ast_stmt *s, size_t ncols);

static void check_data(checker *ck)
{
    const ast_stmt *s = ck->first[ST_DATA];
    avow_plan *p = ck->plan;
    size_t ncols = p->nfactors + (p->block ? 1 : 0) + 1;
    p->columns = arena_alloc(ck->ctx->arena, ncols * sizeof *p->columns);
    if (!p->columns) { ck->ctx->oom = 1; return; }
    for (size_t i = 0; i < ncols; i++) p->columns[i] = plan_column_role(p, i);
    static const char *const default_missing[] = {"", "NA"};
    p->missing = (const char **)default_missing;
    p->nmissing = 2;
    if (s) check_data_block(ck, s, ncols);
    /* A level label that is also a missing-value token would be read as missing. */
    for (size_t fi = 0; fi < p->nfactors + (p->block ? 1 : 0); fi++)
        for (size_t li = 0; li < (fi < p->nfactors ? p->factors[fi].nlevels : p->block->nlevels); li++) {
            const plan_level *l = fi < p->nfactors ? &p->factors[fi].levels[li] : &p->block->levels[li];
            const char *label = l->code ? l->code : l->name;
            for (size_t m = 0; m < p->nmissing && label[0]; m++)
                if (strcmp(label, p->missing[m]) == 0)
                    ctx_warning(ck->ctx, l->span, "the label \"%s\" of level `%s` is also a missing-value token",
                                label, l->name);
        }
}

static void check_data_block(checker *ck, const ast_stmt *s, size_t ncols)
{
    avow_plan *p = ck->plan;
    p->has_data = 1;
    p->data_path = s->str->s;
    if (s->str->len == 0) ctx_error(ck->ctx, s->str->span, "the data file name is empty");
    const ast_data_item *seen[4] = {0};
    const ast_data_item **mapped = avow_calloc(ncols, sizeof *mapped);
    if (!mapped) { ck->ctx->oom = 1; return; }
    for (const ast_data_item *it = s->items; it; it = it->next) {
        if (it->kind != DI_FROM) {
            if (seen[it->kind]) {
                static const char *const words[] = {"from", "missing", "sha256", "delimiter"};
                avow_diag *d = ctx_error(ck->ctx, it->span, "`%s` is given twice in the data block", words[it->kind]);
                diag_related(ck->ctx, d, seen[it->kind]->span, "first given here");
                continue;
            }
            seen[it->kind] = it;
        }
        switch (it->kind) {
        case DI_FROM: {
            size_t col = ncols;
            for (size_t i = 0; i < ncols; i++) {
                const char *role = plan_column_role(p, i);
                if (role && name_eq(it->name.s, it->name.len, role)) col = i;
            }
            if (col == ncols) {
                avow_diag *d = ctx_error(ck->ctx, it->name.span, "`%s` is neither a factor%s nor the response",
                                         it->name.s, p->block ? ", the block" : "");
                const char **cands = avow_calloc(ncols, sizeof *cands);
                if (cands) {
                    for (size_t i = 0; i < ncols; i++) cands[i] = plan_column_role(p, i) ? plan_column_role(p, i) : "";
                    const char *c = closest(it->name.s, it->name.len, cands, ncols);
                    if (c) diag_hint(ck->ctx, d, "did you mean `%s`?", c);
                    avow_free(cands);
                }
                break;
            }
            if (mapped[col]) {
                avow_diag *d = ctx_error(ck->ctx, it->span, "the column of `%s` is given twice", it->name.s);
                diag_related(ck->ctx, d, mapped[col]->span, "first given here");
                break;
            }
            if (it->strs->len == 0) { ctx_error(ck->ctx, it->strs->span, "the column name is empty"); break; }
            mapped[col] = it;
            p->columns[col] = it->strs->s;
            break;
        }
        case DI_MISSING: {
            size_t n = 0;
            for (const ast_str *t = it->strs; t; t = t->next) n++;
            const char **m = arena_alloc(ck->ctx->arena, n * sizeof *m);
            if (!m) { ck->ctx->oom = 1; break; }
            n = 0;
            for (const ast_str *t = it->strs; t; t = t->next) m[n++] = t->s;
            p->missing = m;
            p->nmissing = n;
            break;
        }
        case DI_SHA256: {
            const ast_str *h = it->strs;
            if (h->len != 64 || !is_hex(h->s, h->len)) {
                avow_diag *d = ctx_error(ck->ctx, h->span, "a sha256 lock is 64 hexadecimal digits; this has %u characters",
                                         h->len);
                diag_hint(ck->ctx, d, "compute it with: sha256sum %s", p->data_path);
                break;
            }
            char *lc = arena_strndup(ck->ctx->arena, h->s, 64);
            if (!lc) { ck->ctx->oom = 1; break; }
            for (int i = 0; i < 64; i++) if (lc[i] >= 'A' && lc[i] <= 'F') lc[i] = (char)(lc[i] - 'A' + 'a');
            p->sha256 = lc;
            break;
        }
        case DI_DELIMITER: {
            const ast_str *dl = it->strs;
            if (dl->len != 1 || dl->s[0] == '"' || dl->s[0] == '\n' || dl->s[0] == '\r') {
                avow_diag *d = ctx_error(ck->ctx, dl->span, "the delimiter is one character other than a quote or a newline");
                diag_hint(ck->ctx, d, "for example delimiter \";\" or delimiter \"\\t\"");
                break;
            }
            p->delimiter = dl->s[0];
            break;
        }
        }
    }
    /* Two roles read from one column. */
    for (size_t i = 0; i < ncols; i++)
        for (size_t j = 0; j < i; j++)
            if (p->columns[i] && p->columns[j] && strcmp(p->columns[i], p->columns[j]) == 0) {
                const ast_data_item *it = mapped[i] ? mapped[i] : mapped[j];
                ctx_error(ck->ctx, it ? it->span : s->key, "column \"%s\" would hold both `%s` and `%s`",
                          p->columns[i], plan_column_role(p, j), plan_column_role(p, i));
            }
    avow_free(mapped);
}

/* ---- settings ---- */

static void check_settings(checker *ck)
{
    avow_plan *p = ck->plan;
    p->alpha = (avow_rat){1, 20};
    p->alpha_text = "0.05";
    p->adjust = ADJ_HOLM;
    const ast_stmt *s = ck->first[ST_ALPHA];
    if (s) {
        avow_rat a;
        if (num_value(ck, &s->num, &a)) {
            if (rat_sign(a) <= 0 || rat_cmp(a, RAT_ONE) >= 0) {
                avow_diag *d = ctx_error(ck->ctx, s->num.span, "alpha must lie strictly between 0 and 1");
                diag_hint(ck->ctx, d, "a common choice is alpha 0.05");
            } else {
                p->alpha = a;
                p->alpha_text = num_text(ck, &s->num);
            }
        }
    }
    s = ck->first[ST_ADJUST];
    if (s && mult_from_name(s->method.s, s->method.len, &p->adjust)) {
        avow_diag *d = ctx_error(ck->ctx, s->method.span, "unknown adjustment method `%s`", s->method.s);
        diag_hint(ck->ctx, d, "the methods are none, bonferroni, holm, sidak, scheffe and fdr");
    }
    p->orthogonal = ck->first[ST_ORTHOGONAL] != NULL;
    s = ck->first[ST_VARIANCES];
    if (s) {
        if (name_eq(s->name.s, s->name.len, "separate")) {
            p->separate_variances = 1;
            if (p->nfactors && !p->saturated) {
                avow_diag *d = ctx_error(ck->ctx, s->span, "separate variances need a model with every interaction and no block");
                diag_hint(ck->ctx, d, "each cell's own variance is its spread around its own mean, which %s",
                          p->block ? "a block model does not estimate" : "a model without interactions does not fit");
            }
        }
        else if (!name_eq(s->name.s, s->name.len, "equal")) {
            avow_diag *d = ctx_error(ck->ctx, s->name.span, "`variances` is followed by `equal` or `separate`, not `%s`",
                                     s->name.s);
            diag_hint(ck->ctx, d, "variances separate: exploratory pairs use each level's own variance");
        }
    }
}

/* ---- plan block ---- */

static int whole_number(checker *ck, const ast_num *n, int64_t min, const char *what, int64_t *out)
{
    avow_rat v;
    if (!num_value(ck, n, &v)) return 0;
    if (!rat_is_int(v) || v.num < min) {
        ctx_error(ck->ctx, n->span, "%s must be a whole number, at least %lld", what, (long long)min);
        return 0;
    }
    *out = v.num;
    return 1;
}

static void check_plan_block(checker *ck)
{
    const ast_stmt *s = ck->first[ST_PLAN];
    avow_plan *p = ck->plan;
    size_t n = p->ncells;
    ck->weights = arena_alloc(ck->ctx->arena, (n ? n : 1) * sizeof *ck->weights);
    if (!ck->weights) { ck->ctx->oom = 1; return; }
    for (size_t i = 0; i < n; i++) ck->weights[i] = RAT_ONE;
    if (!s) return;
    p->has_plan = 1;
    const ast_plan_item *seen[PI_SEED + 1] = {0};
    for (const ast_plan_item *it = s->plan; it; it = it->next) {
        int kind = it->kind == PI_REPLICATES_EACH ? PI_REPLICATES : (int)it->kind;
        if (seen[kind]) {
            static const char *const words[] = {"replicates", "replicates", "sigma", "detect", "power", "seed"};
            avow_diag *d = ctx_error(ck->ctx, it->key, "`%s` is given twice in the plan", words[kind]);
            diag_related(ck->ctx, d, seen[kind]->key, "first given here");
            continue;
        }
        seen[kind] = it;
        switch (it->kind) {
        case PI_REPLICATES: {
            int64_t r;
            if (!whole_number(ck, &it->num, 1, "the number of replicates", &r)) break;
            if (!n) break;
            p->replicates = arena_alloc(ck->ctx->arena, n * sizeof *p->replicates);
            if (!p->replicates) { ck->ctx->oom = 1; break; }
            for (size_t i = 0; i < n; i++) p->replicates[i] = r;
            break;
        }
        case PI_REPLICATES_EACH: {
            if (!n) break;
            if (p->nfactors > 1) {
                avow_diag *d = ctx_error(ck->ctx, it->span, "replicates per level apply to a study with one factor");
                diag_hint(ck->ctx, d, "give one number of runs for every cell: replicates 4");
                break;
            }
            int64_t *reps = arena_alloc(ck->ctx->arena, n * sizeof *reps);
            const ast_rep **where = avow_calloc(n, sizeof *where);
            if (!reps || !where) { ck->ctx->oom = 1; avow_free(where); break; }
            int ok = 1;
            for (const ast_rep *r = it->reps; r; r = r->next) {
                long cell = resolve_level(ck, &r->factor, &r->level);
                int64_t cnt;
                if (!whole_number(ck, &r->count, 1, "the number of replicates", &cnt)) ok = 0;
                if (cell < 0) { ok = 0; continue; }
                if (where[cell]) {
                    avow_diag *d = ctx_error(ck->ctx, r->span, "replicates of `%s` are given twice",
                                             plan_cell_name(p, (size_t)cell));
                    diag_related(ck->ctx, d, where[cell]->span, "first given here");
                    ok = 0;
                    continue;
                }
                where[cell] = r;
                reps[cell] = cnt;
            }
            strbuf miss = {0};
            size_t nmiss = 0;
            for (size_t i = 0; i < n; i++)
                if (!where[i]) { sb_printf(&miss, "%s`%s`", nmiss++ ? ", " : "", plan_cell_name(p, i)); }
            if (nmiss && ok) {
                avow_diag *d = ctx_error(ck->ctx, it->key, "replicates are not given for %s", miss.s ? miss.s : "");
                diag_hint(ck->ctx, d, "list every level, or give one number for all: replicates 6");
                ok = 0;
            }
            sb_free(&miss);
            avow_free(where);
            if (ok) p->replicates = reps;
            break;
        }
        case PI_SIGMA: case PI_DETECT: {
            avow_rat v;
            if (!num_value(ck, &it->num, &v)) break;
            if (rat_sign(v) <= 0) {
                ctx_error(ck->ctx, it->num.span, "%s must be greater than 0",
                          it->kind == PI_SIGMA ? "sigma" : "detect");
                break;
            }
            if (it->kind == PI_SIGMA) { p->has_sigma = 1; p->sigma = v; p->sigma_text = num_text(ck, &it->num); }
            else { p->has_detect = 1; p->detect = v; p->detect_text = num_text(ck, &it->num); }
            break;
        }
        case PI_POWER: {
            avow_rat v;
            if (!num_value(ck, &it->num, &v)) break;
            if (rat_sign(v) <= 0 || rat_cmp(v, RAT_ONE) >= 0) {
                ctx_error(ck->ctx, it->num.span, "power must lie strictly between 0 and 1");
                break;
            }
            p->has_power = 1; p->power = v; p->power_text = num_text(ck, &it->num);
            break;
        }
        case PI_SEED: {
            const ast_num *nm = &it->num;
            uint64_t v = 0;
            int ok = !nm->neg;
            for (uint32_t i = 0; ok && i < nm->len; i++) {
                char c = nm->text[i];
                if (c < '0' || c > '9') { ok = 0; break; }
                if (v > (UINT64_MAX - (uint64_t)(c - '0')) / 10) { ok = 0; break; }
                v = v * 10 + (uint64_t)(c - '0');
            }
            if (!ok) {
                ctx_error(ck->ctx, nm->span, "the seed is a whole number from 0 to 18446744073709551615");
                break;
            }
            p->has_seed = 1; p->seed = v;
            break;
        }
        }
    }
    if (p->replicates) {
        int64_t total = 0;
        for (size_t i = 0; i < n; i++) {
            total += p->replicates[i];
            if (total > ((int64_t)1 << 40)) break;
            ck->weights[i] = rat_int(p->replicates[i]);
        }
        int64_t nb = p->block ? (int64_t)p->block->nlevels : 1;
        int64_t params = (int64_t)plan_model_params(p);
        if (nb > 0 && params > 0 && total * nb <= params) {
            const ast_plan_item *it = seen[PI_REPLICATES];
            avow_diag *d;
            if (p->nfactors == 1 && !p->block)
                d = ctx_error(ck->ctx, it->span,
                              "%lld runs for %zu levels leave no degrees of freedom for the residual",
                              (long long)total, n);
            else
                d = ctx_error(ck->ctx, it->span,
                              "%lld runs for a model with %lld parameters leave no degrees of freedom for the residual",
                              (long long)(total * nb), (long long)params);
            diag_hint(ck->ctx, d, p->nfactors == 1 && !p->block
                      ? "plan at least two runs for some level; replicates 2 is the smallest useful design"
                      : "plan more runs per cell, or leave out interactions (interactions none)");
        }
    }
}

/* A treatment factor named in an explore statement; -1 after an error. */
static long explore_factor(checker *ck, const ast_name *n)
{
    avow_plan *p = ck->plan;
    for (size_t f = 0; f < p->nfactors; f++)
        if (name_eq(n->s, n->len, p->factors[f].name)) return (long)f;
    if (p->block && name_eq(n->s, n->len, p->block->name)) {
        avow_diag *d = ctx_error(ck->ctx, n->span, "`%s` is the block; explorations compare treatments", n->s);
        diag_hint(ck->ctx, d, "blocks are averaged out of every comparison");
        return -1;
    }
    avow_diag *d = ctx_error(ck->ctx, n->span, "unknown factor `%s`", n->s);
    const char **cands = avow_calloc(p->nfactors ? p->nfactors : 1, sizeof *cands);
    if (!cands) { ck->ctx->oom = 1; return -1; }
    for (size_t i = 0; i < p->nfactors; i++) cands[i] = p->factors[i].name;
    const char *c = closest(n->s, n->len, cands, p->nfactors);
    avow_free(cands);
    if (c) diag_hint(ck->ctx, d, "did you mean `%s`?", c);
    return -1;
}

/* Is the interaction of factors a and b (as a pair, or inside a higher term) in the model? */
static int model_has_pair(const avow_plan *p, size_t a, size_t b)
{
    unsigned m = (1u << a) | (1u << b);
    for (size_t t = 0; t < p->nterms; t++) if ((p->terms[t].mask & m) == m) return 1;
    return 0;
}

static void check_explore(checker *ck, const ast_study *st)
{
    avow_plan *p = ck->plan;
    size_t n = 0;
    for (const ast_stmt *s = st->stmts; s; s = s->next)
        if (s->kind == ST_EXPLORE_PAIRS || s->kind == ST_EXPLORE_VERSUS) n++;
    if (!n || !p->nfactors) return;
    p->explore_sets = arena_alloc(ck->ctx->arena, n * sizeof *p->explore_sets);
    const ast_stmt **stmts = avow_calloc(n, sizeof *stmts);
    if (!p->explore_sets || !stmts) { avow_free(stmts); ck->ctx->oom = 1; return; }
    for (const ast_stmt *s = st->stmts; s; s = s->next) {
        if (s->kind != ST_EXPLORE_PAIRS && s->kind != ST_EXPLORE_VERSUS) continue;
        plan_explore e = {s->kind == ST_EXPLORE_PAIRS ? EXPLORE_PAIRS : EXPLORE_VERSUS, -1, -1, 0, s->span};
        int ok = 1;
        if (e.kind == EXPLORE_PAIRS) {
            if (s->factor.len) ok = (e.factor = explore_factor(ck, &s->factor)) >= 0;
            else if (p->nfactors == 1) e.factor = 0;
        } else {
            size_t f, l;
            ok = resolve_ref(ck, &s->factor, &s->name, &f, &l);
            if (ok) { e.factor = (long)f; e.control = l; }
        }
        if (s->within.len) {
            long w = explore_factor(ck, &s->within);
            if (w < 0) ok = 0;
            else if (ok && w == e.factor) {
                avow_diag *d = ctx_error(ck->ctx, s->within.span, "levels of `%s` cannot be compared within `%s` itself",
                                         s->within.s, s->within.s);
                diag_hint(ck->ctx, d, "name another factor after `within`");
                ok = 0;
            } else if (ok && e.factor < 0) {
                ok = 0;
            } else if (ok && !model_has_pair(p, (size_t)e.factor, (size_t)w)) {
                avow_diag *d = ctx_error(ck->ctx, s->within.span,
                                         "the model has no `%s` by `%s` interaction, so the comparisons are the same within every level of `%s`",
                                         p->factors[e.factor].name, p->factors[w].name, p->factors[w].name);
                diag_hint(ck->ctx, d, "compare the marginal means: explore %s %s",
                          e.kind == EXPLORE_PAIRS ? "pairs" : "versus",
                          e.kind == EXPLORE_PAIRS ? p->factors[e.factor].name : p->factors[e.factor].levels[e.control].name);
                ok = 0;
            }
            e.within = w;
        }
        if (!ok) continue;
        int dup = 0;
        for (size_t i = 0; i < p->nexplore_sets && !dup; i++) {
            const plan_explore *o = &p->explore_sets[i];
            if (o->kind == e.kind && o->factor == e.factor && o->within == e.within
                && (e.kind == EXPLORE_PAIRS || o->control == e.control)) {
                avow_diag *d = ctx_error(ck->ctx, s->key, "the same exploration is requested twice");
                diag_related(ck->ctx, d, stmts[i]->key, "first requested here");
                dup = 1;
            } else if (e.kind == EXPLORE_VERSUS && o->kind == EXPLORE_VERSUS && o->factor == e.factor
                       && o->within == e.within) {
                avow_diag *d = ctx_error(ck->ctx, s->key, "`explore versus` names two controls for `%s`",
                                         p->factors[e.factor].name);
                diag_related(ck->ctx, d, stmts[i]->key, "first given here");
                dup = 1;
            }
        }
        if (dup) continue;
        stmts[p->nexplore_sets] = s;
        p->explore_sets[p->nexplore_sets++] = e;
    }
    avow_free(stmts);
}

/* The per-test levels each method implies for the planned family. */
static void check_family(checker *ck)
{
    avow_plan *p = ck->plan;
    size_t m = 0;
    for (size_t i = 0; i < p->ncontrasts; i++) m += p->contrasts[i].valid;
    p->family_m = m;
    int64_t nb = p->block ? (int64_t)p->block->nlevels : 1;
    if (p->replicates && nb > 0)
        for (size_t i = 0; i < p->ncells; i++) {
            int64_t r;
            if (__builtin_mul_overflow(p->replicates[i], nb, &r)
                || __builtin_add_overflow(p->planned_runs, r, &p->planned_runs)) {
                p->planned_runs = INT64_MAX;    /* beyond any real study; nothing computed from it */
                break;
            }
        }
    if (p->adjust == ADJ_SCHEFFE) {
        int64_t q = (int64_t)p->treat_df, params = (int64_t)plan_model_params(p);
        double f;
        if (params > 0 && p->planned_runs > params && q > 0
            && dist_f_qinv(rat_to_double(p->alpha), (double)q, (double)(p->planned_runs - params), &f) == 0)
            p->scheffe_crit = sqrt((double)q * f);
        return;
    }
    if (!m) return;
    p->family_levels = arena_alloc(ck->ctx->arena, m * sizeof *p->family_levels);
    if (!p->family_levels) { ck->ctx->oom = 1; return; }
    double a = rat_to_double(p->alpha);
    for (size_t r = 1; r <= m; r++) {
        double v = a;
        switch (p->adjust) {
        case ADJ_NONE: v = a; break;
        case ADJ_BONFERRONI: v = a / (double)m; break;
        case ADJ_SIDAK: v = mult_sidak_alpha(a, m); break;
        case ADJ_HOLM: v = a / (double)(m - r + 1); break;
        case ADJ_FDR: v = a * (double)r / (double)m; break;
        case ADJ_SCHEFFE: break;
        }
        p->family_levels[r - 1] = v;
    }
}

size_t check_study(avow_ctx *ctx, const ast_study *study, avow_plan *plan)
{
    memset(plan, 0, sizeof *plan);
    plan->path = ctx->path;
    checker ck;
    memset(&ck, 0, sizeof ck);
    ck.ctx = ctx;
    ck.plan = plan;
    size_t before = ctx->nerrors;
    collect_singletons(&ck, study);
    check_title(&ck);
    check_response(&ck);
    check_factors(&ck, study);
    check_block(&ck, study);
    check_interactions(&ck);
    build_terms(&ck);
    name_cells(&ck);
    check_settings(&ck);
    check_plan_block(&ck);
    check_data(&ck);
    check_contrasts(&ck, study);
    check_orthogonality(&ck);
    check_explore(&ck, study);
    check_family(&ck);
    if (ctx->nerrors == before && !ctx->oom) plan_compute_power(ctx, plan);
    ctx_sort_diags(ctx);
    if (ctx->oom) return ctx->nerrors - before + 1;
    return ctx->nerrors - before;
}
