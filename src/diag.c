/* diag.c: the study context, its line map, and diagnostic records and rendering. */
#include "avow/diag.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int ctx_init(avow_ctx *ctx, const char *path, const char *bytes, size_t len)
{
    memset(ctx, 0, sizeof *ctx);
    ctx->path = path;
    ctx->src = avow_malloc(len + 1);
    ctx->arena = arena_new();
    if (!ctx->src || !ctx->arena) { ctx_free(ctx); ctx->oom = 1; return AVOW_ENOMEM; }
    if (len) memcpy(ctx->src, bytes, len);
    ctx->src[len] = 0;
    ctx->len = len;
    size_t n = 1;
    for (size_t i = 0; i < len; i++) if (bytes[i] == '\n') n++;
    ctx->lines = avow_malloc(n * sizeof *ctx->lines);
    if (!ctx->lines) { ctx_free(ctx); ctx->oom = 1; return AVOW_ENOMEM; }
    ctx->lines[0] = 0;
    ctx->nlines = 1;
    for (size_t i = 0; i < len; i++)
        if (bytes[i] == '\n') ctx->lines[ctx->nlines++] = (uint32_t)(i + 1);
    return AVOW_OK;
}

int ctx_load(avow_ctx *ctx, const char *path)
{
    char *buf; size_t len;
    memset(ctx, 0, sizeof *ctx);
    int rc = avow_read_file(path, &buf, &len, AVOW_MAX_STUDY_BYTES);
    if (rc) return rc;
    rc = ctx_init(ctx, path, buf, len);
    avow_free(buf);
    return rc;
}

void ctx_free(avow_ctx *ctx)
{
    avow_free(ctx->src);
    arena_free(ctx->arena);
    avow_free(ctx->diags);
    avow_free(ctx->lines);
    avow_free(ctx->comments);
    ctx->src = NULL; ctx->arena = NULL; ctx->diags = NULL; ctx->lines = NULL;
    ctx->comments = NULL;
    ctx->ndiags = ctx->capdiags = ctx->ncomments = ctx->capcomments = 0;
}

static char *vprintf_arena(avow_ctx *ctx, const char *fmt, va_list ap)
{
    va_list ap2;
    va_copy(ap2, ap);
    int n = vsnprintf(NULL, 0, fmt, ap2);
    va_end(ap2);
    if (n < 0) n = 0;
    char *s = arena_alloc(ctx->arena, (size_t)n + 1);
    if (!s) { ctx->oom = 1; return NULL; }
    vsnprintf(s, (size_t)n + 1, fmt, ap);
    return s;
}

char *ctx_printf(avow_ctx *ctx, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    char *s = vprintf_arena(ctx, fmt, ap);
    va_end(ap);
    return s;
}

static avow_diag *add_diag(avow_ctx *ctx, diag_severity sev, avow_span span,
                           const char *fmt, va_list ap)
{
    if (ctx->ndiags == ctx->capdiags) {
        size_t cap = ctx->capdiags ? ctx->capdiags * 2 : 16;
        avow_diag *d = avow_realloc(ctx->diags, cap * sizeof *d);
        if (!d) { ctx->oom = 1; return NULL; }
        ctx->diags = d; ctx->capdiags = cap;
    }
    char *msg = vprintf_arena(ctx, fmt, ap);
    if (!msg) return NULL;
    avow_diag *d = &ctx->diags[ctx->ndiags++];
    memset(d, 0, sizeof *d);
    d->sev = sev; d->span = span; d->msg = msg;
    if (sev == DIAG_ERROR) ctx->nerrors++; else ctx->nwarnings++;
    return d;
}

avow_diag *ctx_error(avow_ctx *ctx, avow_span span, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    avow_diag *d = add_diag(ctx, DIAG_ERROR, span, fmt, ap);
    va_end(ap);
    return d;
}

avow_diag *ctx_warning(avow_ctx *ctx, avow_span span, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    avow_diag *d = add_diag(ctx, DIAG_WARNING, span, fmt, ap);
    va_end(ap);
    return d;
}

void diag_hint(avow_ctx *ctx, avow_diag *d, const char *fmt, ...)
{
    if (!d) return;
    va_list ap;
    va_start(ap, fmt);
    d->hint = vprintf_arena(ctx, fmt, ap);
    va_end(ap);
}

void diag_related(avow_ctx *ctx, avow_diag *d, avow_span span, const char *msg)
{
    (void)ctx;
    if (!d) return;
    d->has_related = 1; d->related = span; d->related_msg = msg;
}

void ctx_add_comment(avow_ctx *ctx, avow_span span)
{
    if (ctx->ncomments == ctx->capcomments) {
        size_t cap = ctx->capcomments ? ctx->capcomments * 2 : 16;
        avow_comment *c = avow_realloc(ctx->comments, cap * sizeof *c);
        if (!c) { ctx->oom = 1; return; }
        ctx->comments = c; ctx->capcomments = cap;
    }
    ctx->comments[ctx->ncomments++].span = span;
}

/* Index (0-based) of the line holding offset. */
static size_t line_index(const avow_ctx *ctx, uint32_t off)
{
    size_t lo = 0, hi = ctx->nlines;
    while (hi - lo > 1) {
        size_t mid = (lo + hi) / 2;
        if (ctx->lines[mid] <= off) lo = mid; else hi = mid;
    }
    return lo;
}

/* Characters between two offsets: a valid UTF-8 sequence or a stray byte counts one. */
static unsigned char_count(const char *s, size_t n)
{
    unsigned c = 0;
    for (size_t i = 0; i < n; c++) {
        int l = utf8_seq_len((const unsigned char *)s + i, n - i);
        i += l > 0 ? (size_t)l : 1;
    }
    return c;
}

void ctx_line_col(const avow_ctx *ctx, uint32_t off, unsigned *line, unsigned *col)
{
    if (off > ctx->len) off = (uint32_t)ctx->len;
    size_t li = line_index(ctx, off);
    *line = (unsigned)li + 1;
    *col = char_count(ctx->src + ctx->lines[li], off - ctx->lines[li]) + 1;
}

void ctx_line_text(const avow_ctx *ctx, unsigned line, const char **text, size_t *len)
{
    if (line < 1 || line > ctx->nlines) { *text = ""; *len = 0; return; }
    uint32_t s = ctx->lines[line - 1];
    uint32_t e = line < ctx->nlines ? ctx->lines[line] - 1 : (uint32_t)ctx->len;
    if (e > s && ctx->src[e - 1] == '\r') e--;
    *text = ctx->src + s; *len = e - s;
}

static int diag_cmp(const void *a, const void *b)
{
    const avow_diag *x = a, *y = b;
    if (x->span.start != y->span.start) return x->span.start < y->span.start ? -1 : 1;
    return 0;
}

void ctx_sort_diags(avow_ctx *ctx)
{
    /* Insertion sort: stable, and the lists are short. */
    for (size_t i = 1; i < ctx->ndiags; i++) {
        avow_diag d = ctx->diags[i];
        size_t j = i;
        while (j > 0 && diag_cmp(&ctx->diags[j - 1], &d) > 0) {
            ctx->diags[j] = ctx->diags[j - 1];
            j--;
        }
        ctx->diags[j] = d;
    }
}

/* Longest part of a source line shown, in characters. */
#define SHOW_MAX 160

/* The colours of DIAG_COLOUR (ANSI SGR sequences). */
#define SGR_RESET   "\033[0m"
#define SGR_LOC     "\033[1m"      /* bold: FILE:LINE:COL: */
#define SGR_ERROR   "\033[1;31m"   /* bold red */
#define SGR_WARNING "\033[1;35m"   /* bold magenta */
#define SGR_NOTE    "\033[1;36m"   /* bold cyan */
#define SGR_HINT    "\033[36m"     /* cyan */
#define SGR_CARET   "\033[32m"     /* green */

/* Append s[0..n) wrapped in the colour sgr when styled. */
static void put_styled(strbuf *out, diag_style style, const char *sgr, const char *s, size_t n)
{
    if (style == DIAG_COLOUR) sb_puts(out, sgr);
    sb_put(out, s, n);
    if (style == DIAG_COLOUR) sb_puts(out, SGR_RESET);
}

/* Append the source line around [s, e) (offsets) with carets beneath. */
static void render_excerpt(const avow_ctx *ctx, uint32_t s, uint32_t e, diag_style style, strbuf *out)
{
    if (ctx->len == 0) return;
    unsigned line, col;
    ctx_line_col(ctx, s, &line, &col);
    const char *text; size_t tlen;
    ctx_line_text(ctx, line, &text, &tlen);
    uint32_t lstart = (uint32_t)(text - ctx->src);
    uint32_t lend = lstart + (uint32_t)tlen;
    if (e > lend) e = lend;
    if (e < s) e = s;
    /* Walk characters, choosing a window of SHOW_MAX around the span start. */
    unsigned total = char_count(text, tlen);
    unsigned first = 0;
    if (total > SHOW_MAX && col > SHOW_MAX / 2) first = col - SHOW_MAX / 2;
    strbuf src = {0}, car = {0};
    sb_puts(out, "  ");
    if (first) { sb_puts(&src, "..."); sb_puts(&car, "   "); }
    unsigned ci = 0;
    size_t i = 0;
    int any_caret = 0;
    for (; i < tlen && ci < first + SHOW_MAX; ci++) {
        int l = utf8_seq_len((const unsigned char *)text + i, tlen - i);
        size_t step = l > 0 ? (size_t)l : 1;
        uint32_t off = lstart + (uint32_t)i;
        if (ci >= first) {
            unsigned char c = (unsigned char)text[i];
            if (l <= 0 || c < 0x20 || c == 0x7f) sb_putc(&src, c == '\t' ? ' ' : '?');
            else sb_put(&src, text + i, step);
            int in = off >= s && (off < e || (off == s && e == s));
            if (in) { sb_putc(&car, '^'); any_caret = 1; }
            else if (!any_caret) sb_putc(&car, ' ');
        }
        i += step;
    }
    if (i < tlen) sb_puts(&src, "...");
    if (!any_caret) sb_putc(&car, '^');   /* span at end of line */
    sb_put(out, src.s ? src.s : "", src.len);
    sb_puts(out, "\n  ");
    put_styled(out, style, SGR_CARET, car.s ? car.s : "", car.len);
    sb_putc(out, '\n');
    if (src.failed || car.failed) out->failed = 1;
    sb_free(&src); sb_free(&car);
}

/* Append `FILE:LINE:COL: label: ` with the location and the label styled. */
static void put_heading(strbuf *out, diag_style style, const char *path, unsigned line, unsigned col,
                        const char *sgr, const char *label)
{
    if (style == DIAG_COLOUR) sb_puts(out, SGR_LOC);
    sb_printf(out, "%s:%u:%u:", path, line, col);
    if (style == DIAG_COLOUR) sb_puts(out, SGR_RESET);
    sb_putc(out, ' ');
    put_styled(out, style, sgr, label, strlen(label));
    sb_putc(out, ' ');
}

void diag_render_one_styled(const avow_ctx *ctx, const avow_diag *d, diag_style style, strbuf *out)
{
    unsigned line, col;
    ctx_line_col(ctx, d->span.start, &line, &col);
    if (d->sev == DIAG_ERROR) put_heading(out, style, ctx->path, line, col, SGR_ERROR, "error:");
    else put_heading(out, style, ctx->path, line, col, SGR_WARNING, "warning:");
    sb_printf(out, "%s\n", d->msg);
    if (!d->whole_file) render_excerpt(ctx, d->span.start, d->span.end, style, out);
    if (d->hint) {
        sb_puts(out, "  ");
        put_styled(out, style, SGR_HINT, "hint:", 5);
        sb_printf(out, " %s\n", d->hint);
    }
    if (d->has_related) {
        ctx_line_col(ctx, d->related.start, &line, &col);
        put_heading(out, style, ctx->path, line, col, SGR_NOTE, "note:");
        sb_printf(out, "%s\n", d->related_msg ? d->related_msg : "see here");
    }
}

void diag_render_one(const avow_ctx *ctx, const avow_diag *d, strbuf *out)
{
    diag_render_one_styled(ctx, d, DIAG_PLAIN, out);
}

void diag_render_styled(const avow_ctx *ctx, diag_style style, strbuf *out)
{
    for (size_t i = 0; i < ctx->ndiags; i++) diag_render_one_styled(ctx, &ctx->diags[i], style, out);
}

void diag_render(const avow_ctx *ctx, strbuf *out)
{
    diag_render_styled(ctx, DIAG_PLAIN, out);
}

/* The first `: LABEL ` of a line [s, e) for the three labels; NULL when none. */
static const char *find_label(const char *s, const char *e, const char **sgr, size_t *lablen)
{
    static const struct { const char *text; const char *sgr; } labels[] = {
        {": error: ", SGR_ERROR}, {": warning: ", SGR_WARNING}, {": note: ", SGR_NOTE},
    };
    const char *best = NULL;
    for (size_t k = 0; k < sizeof labels / sizeof labels[0]; k++) {
        size_t n = strlen(labels[k].text);
        for (const char *p = s; p + n <= e; p++)
            if (memcmp(p, labels[k].text, n) == 0) {
                if (!best || p < best) { best = p; *sgr = labels[k].sgr; *lablen = n - 3; }
                break;
            }
    }
    return best;
}

void diag_paint(const char *text, size_t len, diag_style style, strbuf *out)
{
    if (style != DIAG_COLOUR) { sb_put(out, text, len); return; }
    const char *p = text, *end = text + len;
    while (p < end) {
        const char *nl = memchr(p, '\n', (size_t)(end - p));
        const char *e = nl ? nl : end;
        const char *sgr = NULL;
        size_t lablen = 0;
        const char *at = p < e && *p != ' ' ? find_label(p, e, &sgr, &lablen) : NULL;
        if (at) {
            put_styled(out, style, SGR_LOC, p, (size_t)(at - p) + 1);       /* FILE:LINE:COL: */
            sb_putc(out, ' ');
            put_styled(out, style, sgr, at + 2, lablen);                    /* error: */
            sb_put(out, at + 2 + lablen, (size_t)(e - (at + 2 + lablen)));
        } else if (e - p >= 8 && memcmp(p, "  hint: ", 8) == 0) {
            sb_puts(out, "  ");
            put_styled(out, style, SGR_HINT, "hint:", 5);
            sb_put(out, p + 7, (size_t)(e - (p + 7)));
        } else {
            sb_put(out, p, (size_t)(e - p));
        }
        if (nl) sb_putc(out, '\n');
        p = nl ? nl + 1 : end;
    }
}
