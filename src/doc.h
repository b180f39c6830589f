/* doc.h: the report as a document (internal). The analysis report is written once,
 * through these calls, and comes out either as the fixed-width text report or as the
 * body of the HTML report, so both carry the same sections, tables, notes and words.
 * Text mode writes every string verbatim; HTML mode gives each call its element. */
#ifndef AVOW_DOC_H
#define AVOW_DOC_H

#include <stddef.h>

#include "avow/util.h"
#include "table.h"

typedef struct doc {
    strbuf *o;
    int html;               /* HTML body instead of text */
    int in_section;         /* html: a <section> is open */
    int in_list;            /* html: a <ul> of notes is open */
    int in_kv;              /* html: a table of labelled results is open */
} doc;

void doc_init(doc *d, strbuf *o, int html);
/* A section: text, the title underlined with dashes after a blank line; HTML, a
 * <section id=ID> with an <h2>. */
void doc_heading(doc *d, const char *id, const char *title);
/* A sub-heading: whole lines at the left margin (a leading newline makes the blank
 * line of the text report). HTML: an <h3>, the lines joined. */
void doc_sub(doc *d, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
/* A paragraph of whole lines, each indented alike (0, 3 or 6 spaces in the text
 * report). HTML: a <p>, lines joined by spaces, its indentation as a class. */
void doc_p(doc *d, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
/* A note of the closing list, written "- text" with continuation lines indented by two
 * spaces in the text. cls: an HTML class for the item, or NULL. */
void doc_note(doc *d, const char *cls, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
/* A labelled result: "   LABEL (padded to 46)VALUE" in the text, a row of a two-column
 * table in HTML. */
void doc_kv(doc *d, const char *label, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
/* A blank line of the text report (nothing in HTML). */
void doc_blank(doc *d);
/* A table; its first row is the header when header is set. */
void doc_table(doc *d, const text_table *t, size_t indent, int header);
/* Fixed-width lines shown as they are (the study file, the text pictures). */
void doc_pre(doc *d, const char *text, size_t len);
/* HTML only: a figure holding markup made elsewhere (an inline SVG picture) and its
 * caption in words (or NULL). */
void doc_figure(doc *d, const char *markup, size_t len, const char *caption);
/* Close whatever is open. */
void doc_finish(doc *d);

/* Text as HTML character data (also safe inside double-quoted attributes): & < > " are
 * escaped, control characters and bytes that are not UTF-8 become U+FFFD. */
void html_escape(strbuf *o, const char *s, size_t n);

#endif
