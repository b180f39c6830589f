/* util.h: memory, arenas and growable strings shared by every stage of libavow. */
#ifndef AVOW_UTIL_H
#define AVOW_UTIL_H

#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

/* Status codes returned by libavow functions (0 is success). */
enum {
    AVOW_OK = 0,
    AVOW_ENOMEM = 1,     /* an allocation failed */
    AVOW_EOVERFLOW = 2,  /* a value does not fit exact 64-bit arithmetic */
    AVOW_EDOM = 3,       /* division by zero or an argument out of range */
    AVOW_EIO = 4,        /* a file could not be read or written */
    AVOW_ESYNTAX = 5     /* malformed text */
};

/* All heap use goes through these, so that tests can make the Nth allocation fail. */
void *avow_malloc(size_t n);
void *avow_calloc(size_t count, size_t size);
void *avow_realloc(void *p, size_t n);
void avow_free(void *p);
/* Test hook: allocation number n (0-based, counted from this call) and every later one
 * fail; n < 0 turns the hook off. */
void avow_mem_fail_after(long n);
/* Test hook: only allocation n (0-based, counted from this call) fails; n < 0 turns the
 * hook off. */
void avow_mem_fail_only(long n);
/* Number of allocations made since the last avow_mem_fail_after call. */
long avow_mem_count(void);

/* An arena: many small allocations freed together. */
typedef struct avow_arena avow_arena;
avow_arena *arena_new(void);
void arena_free(avow_arena *a);                    /* NULL is fine */
void *arena_alloc(avow_arena *a, size_t n);        /* zeroed, 16-byte aligned; NULL on failure */
char *arena_strndup(avow_arena *a, const char *s, size_t n); /* NUL-terminated copy */

/* A growable byte string. A failed allocation sets `failed`; later appends do nothing. */
typedef struct strbuf {
    char *s;        /* NUL-terminated contents (NULL until the first append) */
    size_t len;     /* bytes used, without the NUL */
    size_t cap;     /* bytes allocated */
    int failed;     /* an allocation failed */
} strbuf;
void sb_putc(strbuf *b, char c);
void sb_put(strbuf *b, const char *s, size_t n);
void sb_puts(strbuf *b, const char *s);
void sb_printf(strbuf *b, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
void sb_vprintf(strbuf *b, const char *fmt, va_list ap);
void sb_pad(strbuf *b, char c, size_t n);          /* n copies of c */
void sb_free(strbuf *b);
/* Width of a UTF-8 string in characters (code points). */
size_t utf8_width(const char *s, size_t n);
/* Length of the valid UTF-8 sequence at s (1..4), or 0 when invalid; n bytes available. */
int utf8_seq_len(const unsigned char *s, size_t n);

/* Read a whole file into a NUL-terminated buffer (the file may itself hold NULs).
 * Returns AVOW_OK, AVOW_ENOMEM or AVOW_EIO (errno kept). */
int avow_read_file(const char *path, char **out, size_t *len, size_t limit);
/* Write bytes to path atomically: a temporary file beside it, then rename. */
int avow_write_atomic(const char *path, const char *bytes, size_t len);
/* Make a folder and any missing parents (an existing folder is fine). Returns AVOW_OK,
 * AVOW_ENOMEM or AVOW_EIO (errno kept; ENOTDIR when a part is not a folder). */
int avow_mkdirs(const char *path);

#endif
