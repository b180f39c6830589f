/* diag.h: the per-study-file context (source, line map, arena) and its diagnostics.
 * Phases record diagnostics here; only the driver prints them (diag_render). */
#ifndef AVOW_DIAG_H
#define AVOW_DIAG_H

#include <stddef.h>
#include <stdint.h>

#include "avow/util.h"

/* A byte span [start, end) into the source. */
typedef struct avow_span {
    uint32_t start;     /* first byte */
    uint32_t end;       /* one past the last byte */
} avow_span;

typedef enum { DIAG_ERROR, DIAG_WARNING } diag_severity;

/* One diagnostic record. Strings live in the context's arena. */
typedef struct avow_diag {
    diag_severity sev;  /* error or warning */
    avow_span span;     /* where; start == end points between characters */
    const char *msg;    /* the message, without location or severity */
    const char *hint;   /* a suggestion, or NULL */
    int has_related;    /* related span is set */
    avow_span related;  /* e.g. the first declaration of a duplicate */
    const char *related_msg; /* what the related span is ("first declared here") */
    int whole_file;     /* about the file as a whole: no source excerpt */
} avow_diag;

/* A comment in the source, kept for the formatter. */
typedef struct avow_comment {
    avow_span span;     /* from '#' to the end of the line (newline excluded) */
} avow_comment;

/* The context of one study file: every phase takes it first. */
typedef struct avow_ctx {
    const char *path;       /* file name used in diagnostics */
    char *src;              /* the bytes, NUL-terminated (owned) */
    size_t len;             /* bytes in src, without the terminator */
    avow_arena *arena;      /* syntax tree, names, messages */
    avow_diag *diags;       /* diagnostics in the order recorded */
    size_t ndiags, capdiags;
    size_t nerrors;         /* diagnostics with DIAG_ERROR */
    size_t nwarnings;       /* diagnostics with DIAG_WARNING */
    uint32_t *lines;        /* byte offset of the start of each line */
    size_t nlines;
    avow_comment *comments; /* comments in source order */
    size_t ncomments, capcomments;
    int oom;                /* an allocation failed somewhere: results are unusable */
} avow_ctx;

/* Largest study file accepted, in bytes. */
#define AVOW_MAX_STUDY_BYTES (16u * 1024u * 1024u)

/* Set up a context over a copy of `bytes` (len bytes). Returns AVOW_OK or AVOW_ENOMEM. */
int ctx_init(avow_ctx *ctx, const char *path, const char *bytes, size_t len);
/* Set up a context by reading `path`. AVOW_EIO when unreadable (errno kept). */
int ctx_load(avow_ctx *ctx, const char *path);
void ctx_free(avow_ctx *ctx);

/* Record a diagnostic; returns it so that a hint or related span can be attached,
 * or NULL when out of memory (ctx->oom is then set). */
avow_diag *ctx_error(avow_ctx *ctx, avow_span span, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
avow_diag *ctx_warning(avow_ctx *ctx, avow_span span, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
void diag_hint(avow_ctx *ctx, avow_diag *d, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
void diag_related(avow_ctx *ctx, avow_diag *d, avow_span span, const char *msg);
/* printf into the context's arena. */
char *ctx_printf(avow_ctx *ctx, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
void ctx_add_comment(avow_ctx *ctx, avow_span span);

/* 1-based line and column (in characters) of a byte offset. */
void ctx_line_col(const avow_ctx *ctx, uint32_t offset, unsigned *line, unsigned *col);
/* Start and length of a line (1-based), without its newline. */
void ctx_line_text(const avow_ctx *ctx, unsigned line, const char **text, size_t *len);
/* Sort diagnostics by position (stable), so reports read top to bottom. */
void ctx_sort_diags(avow_ctx *ctx);

/* Render every diagnostic as `FILE:LINE:COL: error: message`, the source line and
 * carets under the span, then hints and related spans. */
void diag_render(const avow_ctx *ctx, strbuf *out);
/* Render one diagnostic. */
void diag_render_one(const avow_ctx *ctx, const avow_diag *d, strbuf *out);

/* How rendered diagnostics look. The library never looks at the terminal: the caller
 * (the command) decides and passes the style in. */
typedef enum diag_style {
    DIAG_PLAIN = 0,     /* plain text, as in files, pipes and the golden tests */
    DIAG_COLOUR = 1     /* ANSI colours for a terminal: bold location, bold red `error:`,
                         * bold magenta `warning:`, bold cyan `note:`, cyan `hint:`,
                         * green carets; the characters are those of DIAG_PLAIN */
} diag_style;

/* diag_render and diag_render_one in a given style (DIAG_PLAIN gives the same bytes). */
void diag_render_styled(const avow_ctx *ctx, diag_style style, strbuf *out);
void diag_render_one_styled(const avow_ctx *ctx, const avow_diag *d, diag_style style, strbuf *out);

/* Append diagnostic text that is already rendered in the plain form (such as the data
 * reader's messages: `FILE:LINE:COL: error: message` lines and indented `  hint:`
 * lines), styled: the location and the `error:`, `warning:` or `note:` after it on
 * lines that begin at the first column, and `hint:` on lines that begin with
 * `  hint: `. Other text is copied as it is; DIAG_PLAIN copies everything. */
void diag_paint(const char *text, size_t len, diag_style style, strbuf *out);

#endif
