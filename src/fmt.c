/* fmt.c: the canonical form of a study file. One statement per line, block items
 * indented by four spaces, one level per line, minimal parentheses, single blank lines
 * kept where the author put them, every comment kept in order. */
#include <string.h>

#include "avow/render.h"
#include "avow/syntax.h"

/* Alignment markers in the first pass: a cell ending in ALIGN1 is padded to its column
 * width plus one space, ALIGN2 plus two. Neither byte can occur in a study file's text
 * (the lexer rejects control bytes in strings and comments). */
#define ALIGN1 '\v'
#define ALIGN2 '\f'
/* Before a trailing comment; comments of consecutive lines share a column. */
#define ACOMMENT '\x1c'
/* At the start of a line, followed by one byte naming the kind of line: cells align
 * only with lines of the same kind. */
#define AKIND '\x1d'

/* Formatter state. */
typedef struct fmt_state {
    const avow_ctx *ctx;    /* source and comments */
    strbuf *out;            /* output */
    size_t ci;              /* next comment to emit */
    uint32_t last_end;      /* source offset after the last construct or comment emitted */
    int started;            /* something was emitted in the current block (or file) */
} fmt_state;

static int is_ident(const char *s, size_t n)
{
    if (n == 0 || n > AVOW_MAX_NAME) return 0;
    if (!((s[0] >= 'A' && s[0] <= 'Z') || (s[0] >= 'a' && s[0] <= 'z') || s[0] == '_')) return 0;
    for (size_t i = 1; i < n; i++) {
        char c = s[i];
        if (!((c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_'))
            return 0;
    }
    return 1;
}

void fmt_string(const char *s, size_t len, strbuf *out)
{
    sb_putc(out, '"');
    for (size_t i = 0; i < len; i++) {
        switch (s[i]) {
        case '"': sb_puts(out, "\\\""); break;
        case '\\': sb_puts(out, "\\\\"); break;
        case '\n': sb_puts(out, "\\n"); break;
        case '\t': sb_puts(out, "\\t"); break;
        default: sb_putc(out, s[i]);
        }
    }
    sb_putc(out, '"');
}

void fmt_name(const char *s, size_t len, int force_quote, strbuf *out)
{
    if (!force_quote && is_ident(s, len) && !lex_is_keyword_text(s, len)) sb_put(out, s, len);
    else fmt_string(s, len, out);
}

static void put_name(const ast_name *n, strbuf *out) { fmt_name(n->s, n->len, 0, out); }

/* 1 when put_name writes n as a string (whether or not the source quoted it). */
static int printed_quoted(const ast_name *n)
{
    return !is_ident(n->s, n->len) || lex_is_keyword_text(n->s, n->len);
}

static void put_num(const ast_num *n, strbuf *out)
{
    if (n->neg) sb_putc(out, '-');
    sb_put(out, n->text, n->len);
}

static int prec(const ast_expr *e)
{
    switch (e->kind) {
    case EX_ADD: case EX_SUB: return 1;
    case EX_MUL: case EX_DIV: return 2;
    case EX_NEG: return 3;
    default: return 4;
    }
}

static void put_expr(const ast_expr *e, int ctx_prec, int right, strbuf *out);

static void put_operand(const ast_expr *e, int p, int right, strbuf *out)
{
    int need = prec(e) < p || (right && prec(e) == p);
    if (need) sb_putc(out, '(');
    put_expr(e, need ? 0 : p, right, out);
    if (need) sb_putc(out, ')');
}

static void put_expr(const ast_expr *e, int ctx_prec, int right, strbuf *out)
{
    (void)ctx_prec; (void)right;
    switch (e->kind) {
    case EX_NUM: put_num(&e->num, out); break;
    case EX_REF:
        if (e->factor.len) { put_name(&e->factor, out); sb_putc(out, '.'); }
        put_name(&e->level, out);
        break;
    case EX_NEG:
        sb_putc(out, '-');
        /* A negation of a negation is written "- -x": parentheses here would be ones the
         * source did not need, and a long chain of them would pass the nesting limit
         * that the source kept to, so that the formatted file would not parse. */
        if (e->lhs->kind == EX_NEG) {
            sb_putc(out, ' ');
            put_expr(e->lhs, 3, 0, out);
        } else if (prec(e->lhs) < 3) {
            sb_putc(out, '('); put_expr(e->lhs, 0, 0, out); sb_putc(out, ')');
        } else put_expr(e->lhs, 3, 0, out);
        break;
    case EX_ADD: case EX_SUB: case EX_MUL: case EX_DIV: {
        int p = prec(e);
        put_operand(e->lhs, p, 0, out);
        static const char *const ops[] = {[EX_ADD] = " + ", [EX_SUB] = " - ", [EX_MUL] = "*",
                                          [EX_DIV] = "/"};
        sb_puts(out, ops[e->kind]);
        put_operand(e->rhs, p, 1, out);
        break;
    }
    case EX_CALL:
        sb_put(out, e->fn.s, e->fn.len);   /* mean and trend are keywords: never quoted */
        sb_putc(out, '(');
        for (const ast_expr *a = e->args; a; a = a->next) {
            put_expr(a, 0, 0, out);
            if (a->next) sb_puts(out, ", ");
        }
        sb_putc(out, ')');
        break;
    }
}

void fmt_expr(const ast_expr *e, strbuf *out) { put_expr(e, 0, 0, out); }

/* ---- layout with comments ---- */

/* 1 when the source between a and b holds an empty line. */
static int blank_between(const avow_ctx *ctx, uint32_t a, uint32_t b)
{
    int nl = 0;
    for (uint32_t i = a; i < b && i < ctx->len; i++) {
        char c = ctx->src[i];
        if (c == '\n') { if (++nl >= 2) return 1; }
        else if (c != ' ' && c != '\t' && c != '\r') nl = 0;
    }
    return 0;
}

static void put_comment_text(fmt_state *fs, const avow_comment *c)
{
    const char *s = fs->ctx->src + c->span.start;
    size_t n = c->span.end - c->span.start;
    while (n > 1 && (s[n - 1] == ' ' || s[n - 1] == '\t')) n--;
    sb_put(fs->out, s, n);
}

/* Start a line for a construct at [start, ...): first every comment before `upto`. */
static void begin_line(fmt_state *fs, uint32_t start, uint32_t upto, int indent, char kind)
{
    const avow_ctx *ctx = fs->ctx;
    while (fs->ci < ctx->ncomments && ctx->comments[fs->ci].span.start < upto) {
        const avow_comment *c = &ctx->comments[fs->ci++];
        if (fs->started && blank_between(ctx, fs->last_end, c->span.start)) sb_putc(fs->out, '\n');
        sb_pad(fs->out, ' ', (size_t)indent * 4);
        put_comment_text(fs, c);
        sb_putc(fs->out, '\n');
        fs->last_end = c->span.end;
        fs->started = 1;
    }
    if (fs->started && blank_between(ctx, fs->last_end, start)) sb_putc(fs->out, '\n');
    sb_putc(fs->out, AKIND);
    sb_putc(fs->out, kind);
    sb_pad(fs->out, ' ', (size_t)indent * 4);
    fs->started = 1;
}

/* Finish a line whose construct ends at `end`: a comment on the same source line
 * follows it. */
static void end_line(fmt_state *fs, uint32_t end)
{
    const avow_ctx *ctx = fs->ctx;
    fs->last_end = end;
    if (fs->ci < ctx->ncomments) {
        const avow_comment *c = &ctx->comments[fs->ci];
        /* Only blanks between (or the comma after a level, which the formatter writes
         * there itself): the comment trails this construct, not a later one. */
        int same = c->span.start >= end;
        for (uint32_t i = end; same && i < c->span.start; i++)
            if (ctx->src[i] != ' ' && ctx->src[i] != '\t' && ctx->src[i] != ',') same = 0;
        if (same) {
            sb_putc(fs->out, ACOMMENT);
            put_comment_text(fs, c);
            fs->ci++;
            fs->last_end = c->span.end;
        }
    }
    sb_putc(fs->out, '\n');
}

static void put_opt_string(const ast_str *s, strbuf *out)
{
    if (!s) return;
    sb_putc(out, ' ');
    fmt_string(s->s, s->len, out);
}

static void open_block(fmt_state *fs, const ast_stmt *s)
{
    sb_puts(fs->out, " {");
    end_line(fs, s->lbrace.end);
    fs->started = 0;
}

static void close_block(fmt_state *fs, const ast_stmt *s)
{
    /* Comments left inside the block stay inside it. */
    const avow_ctx *ctx = fs->ctx;
    while (fs->ci < ctx->ncomments && ctx->comments[fs->ci].span.start < s->rbrace.start) {
        const avow_comment *c = &ctx->comments[fs->ci++];
        if (fs->started && blank_between(ctx, fs->last_end, c->span.start)) sb_putc(fs->out, '\n');
        sb_puts(fs->out, "    ");
        put_comment_text(fs, c);
        sb_putc(fs->out, '\n');
        fs->last_end = c->span.end;
        fs->started = 1;
    }
    fs->started = 0;   /* no blank line before the closing brace */
    begin_line(fs, s->rbrace.start, s->rbrace.start, 0, '}');
    sb_putc(fs->out, '}');
    end_line(fs, s->rbrace.end);
}

static void put_level(fmt_state *fs, const ast_level *l)
{
    strbuf *o = fs->out;
    /* Without a description, a following level named by a string would read as one:
     * a comma right after the level's last part keeps them apart. What counts is how
     * the next name is written here, not in the source ("x" is written x). */
    int comma = !l->desc && l->next && printed_quoted(&l->next->name);
    begin_line(fs, l->span.start, l->span.end, 1, 'L');
    put_name(&l->name, o);
    if (comma && !l->at.text && !l->code) sb_putc(o, ',');
    sb_putc(o, ALIGN2);
    if (l->at.text) {
        sb_puts(o, "at ");
        put_num(&l->at, o);
        if (comma && !l->code) sb_putc(o, ',');
    }
    sb_putc(o, ALIGN2);
    if (l->code) {
        sb_puts(o, "code ");
        fmt_string(l->code->s, l->code->len, o);
        if (comma) sb_putc(o, ',');
    }
    sb_putc(o, ALIGN2);
    if (l->desc) fmt_string(l->desc->s, l->desc->len, o);
    end_line(fs, l->span.end);
}

static void put_data_item(fmt_state *fs, const ast_data_item *it)
{
    strbuf *o = fs->out;
    begin_line(fs, it->span.start, it->span.end, 1, (char)('a' + it->kind));
    switch (it->kind) {
    case DI_FROM: put_name(&it->name, o); sb_putc(o, ALIGN1); sb_puts(o, "from"); break;
    case DI_MISSING: sb_puts(o, "missing"); break;
    case DI_SHA256: sb_puts(o, "sha256"); break;
    case DI_DELIMITER: sb_puts(o, "delimiter"); break;
    }
    for (const ast_str *s = it->strs; s; s = s->next) put_opt_string(s, o);
    end_line(fs, it->span.end);
}

static void put_plan_item(fmt_state *fs, const ast_plan_item *it)
{
    static const char *const words[] = {"replicates", "replicates", "sigma", "detect", "power", "seed"};
    strbuf *o = fs->out;
    begin_line(fs, it->span.start, it->span.end, 1, 'P');
    sb_puts(o, words[it->kind]);
    sb_putc(o, ' ');
    if (it->kind == PI_REPLICATES_EACH) {
        for (const ast_rep *r = it->reps; r; r = r->next) {
            if (r->factor.len) { put_name(&r->factor, o); sb_putc(o, '.'); }
            put_name(&r->level, o);
            sb_putc(o, ' ');
            put_num(&r->count, o);
            if (r->next) sb_puts(o, ", ");
        }
    } else {
        put_num(&it->num, o);
    }
    end_line(fs, it->span.end);
}

static void put_contrast(fmt_state *fs, const ast_stmt *s)
{
    strbuf *o = fs->out;
    sb_puts(o, s->kind == ST_CONTRAST ? "contrast " : "explore contrast ");
    put_name(&s->name, o);
    sb_putc(o, ALIGN1);
    sb_puts(o, "= ");
    fmt_expr(s->expr, o);
    if (s->side != SIDE_TWO) {
        sb_puts(o, s->side == SIDE_GREATER ? " > " : " < ");
        put_num(&s->side_num, o);
    }
    put_opt_string(s->desc, o);
}

static void put_stmt(fmt_state *fs, const ast_stmt *s)
{
    strbuf *o = fs->out;
    /* Header line: up to the opening brace for blocks, the whole statement otherwise. */
    uint32_t head_end = s->has_block ? s->lbrace.end : s->span.end;
    /* Planned and exploratory contrasts align with each other. */
    char kind = s->kind == ST_EXPLORE_CONTRAST ? (char)('A' + ST_CONTRAST) : (char)('A' + s->kind);
    begin_line(fs, s->span.start, head_end, 0, kind);
    switch (s->kind) {
    case ST_STUDY: sb_puts(o, "study"); put_opt_string(s->str, o); break;
    case ST_RESPONSE:
        sb_puts(o, "response "); put_name(&s->name, o); put_opt_string(s->str, o);
        if (s->unit) { sb_puts(o, " unit"); put_opt_string(s->unit, o); }
        break;
    case ST_FACTOR:
        sb_puts(o, "factor "); put_name(&s->name, o); put_opt_string(s->str, o);
        open_block(fs, s);
        for (const ast_level *l = s->levels; l; l = l->next) put_level(fs, l);
        close_block(fs, s);
        return;
    case ST_BLOCK:
        sb_puts(o, "block "); put_name(&s->name, o); put_opt_string(s->str, o);
        if (!s->has_block) break;
        open_block(fs, s);
        for (const ast_level *l = s->levels; l; l = l->next) put_level(fs, l);
        close_block(fs, s);
        return;
    case ST_INTERACTIONS: sb_puts(o, "interactions "); sb_put(o, s->name.s, s->name.len); break;
    case ST_DATA:
        sb_puts(o, "data"); put_opt_string(s->str, o);
        if (!s->has_block) break;
        open_block(fs, s);
        for (const ast_data_item *it = s->items; it; it = it->next) put_data_item(fs, it);
        close_block(fs, s);
        return;
    case ST_ALPHA: sb_puts(o, "alpha "); put_num(&s->num, o); break;
    case ST_ADJUST: sb_puts(o, "adjust "); sb_put(o, s->method.s, s->method.len); break;
    case ST_ORTHOGONAL: sb_puts(o, "orthogonal"); break;
    case ST_VARIANCES: sb_puts(o, "variances "); put_name(&s->name, o); break;
    case ST_COUNT: break;
    case ST_CONTRAST: case ST_EXPLORE_CONTRAST: put_contrast(fs, s); break;
    case ST_EXPLORE_PAIRS:
        sb_puts(o, "explore pairs");
        if (s->factor.len) { sb_putc(o, ' '); put_name(&s->factor, o); }
        if (s->within.len) { sb_puts(o, " within "); put_name(&s->within, o); }
        break;
    case ST_EXPLORE_VERSUS:
        sb_puts(o, "explore versus ");
        if (s->factor.len) { put_name(&s->factor, o); sb_putc(o, '.'); }
        put_name(&s->name, o);
        if (s->within.len) { sb_puts(o, " within "); put_name(&s->within, o); }
        break;
    case ST_PLAN:
        sb_puts(o, "plan");
        open_block(fs, s);
        for (const ast_plan_item *it = s->plan; it; it = it->next) put_plan_item(fs, it);
        close_block(fs, s);
        return;
    }
    end_line(fs, s->span.end);
}

/* Second pass: lay out the lines. Within a run of consecutive lines of the same kind,
 * column j is as wide as its widest cell (plus the cell's separator) among the lines
 * that have a cell after it; empty cells take no room. Then trailing comments of
 * consecutive lines start in one column, two spaces after the longest of those lines.
 * Trailing spaces are dropped. */
typedef struct fmt_cell {
    size_t start, end;  /* bytes of the cell in the first-pass text */
    size_t width;       /* characters */
    int sep;            /* spaces after the cell: 1 or 2 (0 for the last) */
    size_t pad;         /* spaces to add after it */
} fmt_cell;

typedef struct fmt_line {
    char kind;          /* kind of line (0 for comment-only and blank lines) */
    size_t first;       /* index of its first cell */
    size_t ncells;      /* content cells */
    int has_comment;    /* a trailing comment follows */
    size_t cstart, cend;/* the comment's bytes */
    size_t width;       /* width of the laid-out content */
} fmt_line;

static void align_columns(const char *s, size_t n, strbuf *out)
{
    size_t nlines = 0, ncells = 0;
    for (size_t i = 0; i < n; i++) {
        if (s[i] == '\n') nlines++;
        if (s[i] == '\n' || s[i] == ALIGN1 || s[i] == ALIGN2 || s[i] == ACOMMENT) ncells++;
    }
    if (!nlines) { sb_put(out, s, n); return; }
    fmt_line *lines = avow_calloc(nlines, sizeof *lines);
    fmt_cell *cells = avow_calloc(ncells, sizeof *cells);
    if (!lines || !cells) { avow_free(lines); avow_free(cells); out->failed = 1; return; }
    size_t li = 0, ci = 0, cs = 0;
    int in_comment = 0;
    for (size_t i = 0; i < n; i++) {
        char c = s[i];
        fmt_line *L = &lines[li];
        if (i == cs && c == AKIND && i + 1 < n) { L->kind = s[i + 1]; i++; cs = i + 1; continue; }
        if (in_comment) {
            if (c == '\n') { L->cend = i; in_comment = 0; li++; cs = i + 1; if (li < nlines) lines[li].first = ci; }
            continue;
        }
        if (c != '\n' && c != ALIGN1 && c != ALIGN2 && c != ACOMMENT) continue;
        fmt_cell *C = &cells[ci++];
        C->start = cs; C->end = i;
        C->width = utf8_width(s + cs, i - cs);
        C->sep = c == ALIGN1 ? 1 : c == ALIGN2 ? 2 : 0;
        L->ncells++;
        cs = i + 1;
        if (c == ACOMMENT) { L->has_comment = 1; L->cstart = cs; in_comment = 1; }
        if (c == '\n') { li++; if (li < nlines) lines[li].first = ci; }
    }
    for (size_t j = 0;; j++) {
        int any = 0;
        for (size_t a = 0; a < nlines;) {
            if (lines[a].ncells <= j + 1) { a++; continue; }
            any = 1;
            size_t b = a, width = 0;
            while (b < nlines && lines[b].ncells > j + 1 && lines[b].kind == lines[a].kind) {
                const fmt_cell *C = &cells[lines[b].first + j];
                if (C->width && C->width + (size_t)C->sep > width) width = C->width + (size_t)C->sep;
                b++;
            }
            for (size_t k = a; k < b; k++) {
                fmt_cell *C = &cells[lines[k].first + j];
                C->pad = width > C->width ? width - C->width : 0;
            }
            a = b;
        }
        if (!any) break;
    }
    /* Content widths, then comment columns over runs of commented lines. */
    for (size_t l = 0; l < nlines; l++) {
        size_t w = 0, trail = 0;
        for (size_t k = 0; k < lines[l].ncells; k++) {
            const fmt_cell *C = &cells[lines[l].first + k];
            if (C->width) { w += trail + C->width; trail = 0; }
            if (k + 1 < lines[l].ncells) trail += C->pad;
        }
        lines[l].width = w;
    }
    size_t *ccol = avow_calloc(nlines, sizeof *ccol);
    if (!ccol) { avow_free(lines); avow_free(cells); out->failed = 1; return; }
    for (size_t a = 0; a < nlines;) {
        if (!lines[a].has_comment) { a++; continue; }
        size_t b = a, col = 0;
        while (b < nlines && lines[b].has_comment) { if (lines[b].width > col) col = lines[b].width; b++; }
        for (size_t k = a; k < b; k++) ccol[k] = col + 2;
        a = b;
    }
    for (size_t l = 0; l < nlines; l++) {
        size_t before = out->len;
        for (size_t k = 0; k < lines[l].ncells; k++) {
            const fmt_cell *C = &cells[lines[l].first + k];
            sb_put(out, s + C->start, C->end - C->start);
            if (k + 1 < lines[l].ncells) sb_pad(out, ' ', C->pad);
        }
        while (out->len > before && out->s[out->len - 1] == ' ') out->s[--out->len] = 0;
        if (lines[l].has_comment) {
            sb_pad(out, ' ', ccol[l] - lines[l].width);
            sb_put(out, s + lines[l].cstart, lines[l].cend - lines[l].cstart);
        }
        sb_putc(out, '\n');
    }
    avow_free(ccol);
    avow_free(lines);
    avow_free(cells);
}

void fmt_study(const avow_ctx *ctx, const ast_study *study, strbuf *final)
{
    fmt_state fs;
    strbuf raw = {0};
    strbuf *out = &raw;
    memset(&fs, 0, sizeof fs);
    fs.ctx = ctx;
    fs.out = out;
    for (const ast_stmt *s = study->stmts; s; s = s->next) put_stmt(&fs, s);
    /* Comments after the last statement. */
    while (fs.ci < ctx->ncomments) {
        const avow_comment *c = &ctx->comments[fs.ci++];
        if (fs.started && blank_between(ctx, fs.last_end, c->span.start)) sb_putc(out, '\n');
        put_comment_text(&fs, c);
        sb_putc(out, '\n');
        fs.last_end = c->span.end;
        fs.started = 1;
    }
    if (raw.failed) final->failed = 1;
    else align_columns(raw.s ? raw.s : "", raw.len, final);
    sb_free(&raw);
}
