/* table.c: plain-text tables for the reports. */
#include "table.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

void table_init(text_table *t, size_t ncols, const char *align)
{
    memset(t, 0, sizeof *t);
    t->ncols = ncols;
    t->align = align;
}

void table_row(text_table *t)
{
    if (t->failed) return;
    if (t->nrows == t->cap) {
        size_t cap = t->cap ? t->cap * 2 : 16;
        char **c = avow_realloc(t->cells, cap * t->ncols * sizeof *c);
        if (!c) { t->failed = 1; return; }
        t->cells = c;
        t->cap = cap;
    }
    memset(&t->cells[t->nrows * t->ncols], 0, t->ncols * sizeof *t->cells);
    t->nrows++;
}

void table_cell(text_table *t, size_t col, const char *fmt, ...)
{
    if (t->failed || !t->nrows || col >= t->ncols) return;
    strbuf b = {0};
    va_list ap;
    va_start(ap, fmt);
    sb_vprintf(&b, fmt, ap);
    va_end(ap);
    if (b.failed) { t->failed = 1; sb_free(&b); return; }
    char **slot = &t->cells[(t->nrows - 1) * t->ncols + col];
    avow_free(*slot);
    *slot = b.s ? b.s : NULL;
    if (!b.s) {
        *slot = avow_malloc(1);
        if (!*slot) { t->failed = 1; return; }
        (*slot)[0] = 0;
    }
}

void table_render(const text_table *t, size_t indent, strbuf *out)
{
    if (t->failed) { out->failed = 1; return; }
    size_t w[64] = {0};
    size_t nc = t->ncols < 64 ? t->ncols : 64;
    for (size_t r = 0; r < t->nrows; r++)
        for (size_t c = 0; c < nc; c++) {
            const char *s = t->cells[r * t->ncols + c];
            size_t cw = s ? utf8_width(s, strlen(s)) : 0;
            if (cw > w[c]) w[c] = cw;
        }
    for (size_t r = 0; r < t->nrows; r++) {
        strbuf line = {0};
        sb_pad(&line, ' ', indent);
        for (size_t c = 0; c < nc; c++) {
            const char *s = t->cells[r * t->ncols + c];
            if (!s) s = "";
            size_t cw = utf8_width(s, strlen(s));
            int right = t->align && t->align[c] == 'r';
            if (c) sb_puts(&line, "  ");
            if (right) sb_pad(&line, ' ', w[c] - cw);
            sb_puts(&line, s);
            if (!right) sb_pad(&line, ' ', w[c] - cw);
        }
        /* No trailing spaces. */
        while (line.len && line.s[line.len - 1] == ' ') line.s[--line.len] = 0;
        if (line.s) sb_put(out, line.s, line.len);
        sb_putc(out, '\n');
        if (line.failed) out->failed = 1;
        sb_free(&line);
    }
}

void table_free(text_table *t)
{
    if (t->cells)
        for (size_t i = 0; i < t->nrows * t->ncols; i++) avow_free(t->cells[i]);
    avow_free(t->cells);
    memset(t, 0, sizeof *t);
}
