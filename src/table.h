/* table.h: plain-text tables for the reports (internal). Cells are copied; columns are
 * sized to their widest cell in characters. */
#ifndef AVOW_TABLE_H
#define AVOW_TABLE_H

#include <stddef.h>

#include "avow/util.h"

typedef struct text_table {
    size_t ncols;       /* columns */
    size_t nrows;       /* rows filled so far (the header is row 0 when used) */
    size_t cap;         /* rows allocated */
    char **cells;       /* nrows * ncols strings (NULL: empty) */
    const char *align;  /* per column: 'l' or 'r' */
    int failed;         /* an allocation failed */
} text_table;

void table_init(text_table *t, size_t ncols, const char *align);
/* Start a new row; later table_cell calls fill it from the left. */
void table_row(text_table *t);
/* Set column col of the current row (printf-style). */
void table_cell(text_table *t, size_t col, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
/* Render with the given indentation and two spaces between columns. */
void table_render(const text_table *t, size_t indent, strbuf *out);
void table_free(text_table *t);

#endif
