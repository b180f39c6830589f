/* doc.c: the report as a document, written as fixed-width text or as HTML (doc.h). */
#include "doc.h"

#include <stdarg.h>
#include <string.h>

void doc_init(doc *d, strbuf *o, int html)
{
    memset(d, 0, sizeof *d);
    d->o = o;
    d->html = html;
}

void html_escape(strbuf *o, const char *s, size_t n)
{
    for (size_t i = 0; i < n;) {
        unsigned char c = (unsigned char)s[i];
        if (c == '&') sb_puts(o, "&amp;");
        else if (c == '<') sb_puts(o, "&lt;");
        else if (c == '>') sb_puts(o, "&gt;");
        else if (c == '"') sb_puts(o, "&quot;");
        else if (c == '\n' || c == '\t') sb_putc(o, (char)c);
        else if (c < 0x20 || c == 0x7f) sb_puts(o, "\xEF\xBF\xBD");
        else if (c < 0x80) sb_putc(o, (char)c);
        else {
            int len = utf8_seq_len((const unsigned char *)s + i, n - i);
            if (len == 0) { sb_puts(o, "\xEF\xBF\xBD"); i++; continue; }
            sb_put(o, s + i, (size_t)len);
            i += (size_t)len;
            continue;
        }
        i++;
    }
}

/* Close an open list or table of labelled results (HTML). */
static void close_blocks(doc *d)
{
    if (d->in_list) { sb_puts(d->o, "</ul>\n"); d->in_list = 0; }
    if (d->in_kv) { sb_puts(d->o, "</table></div>\n"); d->in_kv = 0; }
}

void doc_finish(doc *d)
{
    if (!d->html) return;
    close_blocks(d);
    if (d->in_section) { sb_puts(d->o, "</section>\n"); d->in_section = 0; }
}

void doc_heading(doc *d, const char *id, const char *title)
{
    if (!d->html) {
        sb_printf(d->o, "\n%s\n", title);
        sb_pad(d->o, '-', utf8_width(title, strlen(title)));
        sb_putc(d->o, '\n');
        return;
    }
    doc_finish(d);
    sb_puts(d->o, "<section id=\"");
    html_escape(d->o, id, strlen(id));
    sb_puts(d->o, "\">\n<h2>");
    html_escape(d->o, title, strlen(title));
    sb_puts(d->o, "</h2>\n");
    d->in_section = 1;
}

/* The lines of s joined by single spaces, leading spaces of each line dropped; returns
 * the indentation of the first line. */
static size_t joined(const char *s, size_t n, strbuf *out)
{
    size_t i = 0, indent = 0;
    while (i < n && s[i] == '\n') i++;
    while (i + indent < n && s[i + indent] == ' ') indent++;
    int first = 1;
    while (i < n) {
        while (i < n && s[i] == ' ') i++;
        size_t e = i;
        while (e < n && s[e] != '\n') e++;
        size_t t = e;
        while (t > i && s[t - 1] == ' ') t--;
        if (t > i) {
            if (!first) sb_putc(out, ' ');
            sb_put(out, s + i, t - i);
            first = 0;
        }
        i = e < n ? e + 1 : e;
    }
    return indent;
}

/* Write the joined lines of text as one element. */
static void element(doc *d, const char *tag, const char *cls, const strbuf *text)
{
    strbuf j = {0};
    size_t indent = joined(text->s ? text->s : "", text->len, &j);
    sb_printf(d->o, "<%s", tag);
    if (cls) sb_printf(d->o, " class=\"%s\"", cls);
    else if (indent >= 6) sb_puts(d->o, " class=\"i2\"");
    else if (indent >= 3) sb_puts(d->o, " class=\"i1\"");
    sb_putc(d->o, '>');
    html_escape(d->o, j.s ? j.s : "", j.len);
    sb_printf(d->o, "</%s>\n", tag);
    if (j.failed) d->o->failed = 1;
    sb_free(&j);
}

static void vtext(doc *d, const char *tag, const char *cls, const char *fmt, va_list ap)
{
    strbuf b = {0};
    sb_vprintf(&b, fmt, ap);
    if (b.failed) d->o->failed = 1;
    if (!d->html) {
        if (b.s) sb_put(d->o, b.s, b.len);
    } else {
        close_blocks(d);
        element(d, tag, cls, &b);
    }
    sb_free(&b);
}

void doc_sub(doc *d, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    vtext(d, "h3", NULL, fmt, ap);
    va_end(ap);
}

void doc_p(doc *d, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    vtext(d, "p", NULL, fmt, ap);
    va_end(ap);
}

void doc_note(doc *d, const char *cls, const char *fmt, ...)
{
    strbuf b = {0};
    va_list ap;
    va_start(ap, fmt);
    sb_vprintf(&b, fmt, ap);
    va_end(ap);
    if (b.failed) d->o->failed = 1;
    if (!d->html) {
        sb_puts(d->o, "- ");
        if (b.s) sb_put(d->o, b.s, b.len);
    } else {
        if (d->in_kv) { sb_puts(d->o, "</table></div>\n"); d->in_kv = 0; }
        if (!d->in_list) { sb_puts(d->o, "<ul class=\"notes\">\n"); d->in_list = 1; }
        element(d, "li", cls, &b);
    }
    sb_free(&b);
}

void doc_kv(doc *d, const char *label, const char *fmt, ...)
{
    strbuf b = {0};
    va_list ap;
    va_start(ap, fmt);
    sb_vprintf(&b, fmt, ap);
    va_end(ap);
    if (b.failed) d->o->failed = 1;
    if (!d->html) {
        sb_printf(d->o, "   %-46s", label);
        if (b.s) sb_put(d->o, b.s, b.len);
        sb_putc(d->o, '\n');
    } else {
        if (d->in_list) { sb_puts(d->o, "</ul>\n"); d->in_list = 0; }
        if (!d->in_kv) { sb_puts(d->o, "<div class=\"scroll\"><table class=\"kv\">\n"); d->in_kv = 1; }
        sb_puts(d->o, "<tr><th>");
        html_escape(d->o, label, strlen(label));
        sb_puts(d->o, "</th><td>");
        html_escape(d->o, b.s ? b.s : "", b.len);
        sb_puts(d->o, "</td></tr>\n");
    }
    sb_free(&b);
}

void doc_blank(doc *d)
{
    if (!d->html) sb_putc(d->o, '\n');
}

void doc_table(doc *d, const text_table *t, size_t indent, int header)
{
    if (!d->html) { table_render(t, indent, d->o); return; }
    close_blocks(d);
    if (t->failed) { d->o->failed = 1; return; }
    sb_printf(d->o, "<div class=\"scroll\"><table%s>\n", header ? "" : " class=\"kv\"");
    for (size_t r = 0; r < t->nrows; r++) {
        int head = header && r == 0;
        if (head) sb_puts(d->o, "<thead>");
        else if (header && r == 1) sb_puts(d->o, "<tbody>");
        sb_puts(d->o, "<tr>");
        for (size_t c = 0; c < t->ncols; c++) {
            const char *s = t->cells[r * t->ncols + c];
            if (!s) s = "";
            size_t lead = 0;
            while (s[lead] == ' ') lead++;
            int right = t->align && t->align[c] == 'r';
            const char *tag = head || (!header && c == 0) ? "th" : "td";
            sb_printf(d->o, "<%s", tag);
            if (right && lead) sb_puts(d->o, " class=\"r sub\"");
            else if (right) sb_puts(d->o, " class=\"r\"");
            else if (lead) sb_puts(d->o, " class=\"sub\"");
            sb_putc(d->o, '>');
            html_escape(d->o, s + lead, strlen(s + lead));
            sb_printf(d->o, "</%s>", tag);
        }
        sb_puts(d->o, "</tr>");
        if (head) sb_puts(d->o, "</thead>");
        sb_putc(d->o, '\n');
    }
    sb_puts(d->o, header && t->nrows > 1 ? "</tbody></table></div>\n" : "</table></div>\n");
}

void doc_pre(doc *d, const char *text, size_t len)
{
    if (!d->html) { sb_put(d->o, text, len); return; }
    close_blocks(d);
    sb_puts(d->o, "<div class=\"scroll\"><pre>");
    html_escape(d->o, text, len);
    sb_puts(d->o, "</pre></div>\n");
}

void doc_figure(doc *d, const char *markup, size_t len, const char *caption)
{
    if (!d->html) return;
    close_blocks(d);
    sb_puts(d->o, "<figure>\n");
    sb_put(d->o, markup, len);
    if (caption && caption[0]) {
        sb_puts(d->o, "<figcaption>");
        html_escape(d->o, caption, strlen(caption));
        sb_puts(d->o, "</figcaption>\n");
    }
    sb_puts(d->o, "</figure>\n");
}
