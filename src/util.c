/* util.c: allocation hooks, arena, strbuf, UTF-8 helpers, whole-file I/O. */
#include "avow/util.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

static long fail_at = -1;   /* allocation index that starts failing; -1 = never */
static long alloc_count;    /* allocations since the hook was set */
static int fail_once;       /* only allocation fail_at fails */

static int should_fail(void)
{
    long i = alloc_count++;
    return fail_at >= 0 && (fail_once ? i == fail_at : i >= fail_at);
}

void avow_mem_fail_after(long n) { fail_at = n; alloc_count = 0; fail_once = 0; }
void avow_mem_fail_only(long n) { fail_at = n; alloc_count = 0; fail_once = 1; }
long avow_mem_count(void) { return alloc_count; }

void *avow_malloc(size_t n) { return should_fail() ? NULL : malloc(n ? n : 1); }
void *avow_calloc(size_t c, size_t s) { return should_fail() ? NULL : calloc(c ? c : 1, s ? s : 1); }
void *avow_realloc(void *p, size_t n) { return should_fail() ? NULL : realloc(p, n ? n : 1); }
void avow_free(void *p) { free(p); }

/* ---- arena ---- */

typedef struct arena_chunk {
    struct arena_chunk *next;   /* older chunk */
    size_t used, size;          /* bytes used / available in data */
    _Alignas(16) unsigned char data[];
} arena_chunk;

struct avow_arena {
    arena_chunk *head;          /* newest chunk */
};

avow_arena *arena_new(void) { return avow_calloc(1, sizeof(avow_arena)); }

void arena_free(avow_arena *a)
{
    if (!a) return;
    for (arena_chunk *c = a->head, *n; c; c = n) { n = c->next; avow_free(c); }
    avow_free(a);
}

void *arena_alloc(avow_arena *a, size_t n)
{
    n = (n + 15) & ~(size_t)15;
    if (!a || n == 0) n = 16;
    if (!a) return NULL;
    arena_chunk *c = a->head;
    if (!c || c->size - c->used < n) {
        size_t size = n > 16384 ? n : 16384;
        c = avow_malloc(sizeof(arena_chunk) + size);
        if (!c) return NULL;
        c->next = a->head; c->used = 0; c->size = size;
        a->head = c;
    }
    void *p = c->data + c->used;
    c->used += n;
    memset(p, 0, n);
    return p;
}

char *arena_strndup(avow_arena *a, const char *s, size_t n)
{
    char *p = arena_alloc(a, n + 1);
    if (!p) return NULL;
    if (n) memcpy(p, s, n);
    p[n] = 0;
    return p;
}

/* ---- strbuf ---- */

static int sb_grow(strbuf *b, size_t extra)
{
    if (b->failed) return 0;
    if (b->len + extra + 1 <= b->cap) return 1;
    size_t cap = b->cap ? b->cap : 256;
    while (cap < b->len + extra + 1) cap *= 2;
    char *s = avow_realloc(b->s, cap);
    if (!s) { b->failed = 1; return 0; }
    b->s = s; b->cap = cap;
    return 1;
}

void sb_put(strbuf *b, const char *s, size_t n)
{
    if (!sb_grow(b, n)) return;
    if (n) memcpy(b->s + b->len, s, n);
    b->len += n;
    b->s[b->len] = 0;
}

void sb_putc(strbuf *b, char c) { sb_put(b, &c, 1); }
void sb_puts(strbuf *b, const char *s) { sb_put(b, s, strlen(s)); }

void sb_pad(strbuf *b, char c, size_t n)
{
    if (!sb_grow(b, n)) return;
    memset(b->s + b->len, c, n);
    b->len += n;
    b->s[b->len] = 0;
}

void sb_vprintf(strbuf *b, const char *fmt, va_list ap)
{
    va_list ap2;
    va_copy(ap2, ap);
    int n = vsnprintf(NULL, 0, fmt, ap2);
    va_end(ap2);
    if (n < 0) { b->failed = 1; return; }
    if (!sb_grow(b, (size_t)n)) return;
    vsnprintf(b->s + b->len, (size_t)n + 1, fmt, ap);
    b->len += (size_t)n;
}

void sb_printf(strbuf *b, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    sb_vprintf(b, fmt, ap);
    va_end(ap);
}

void sb_free(strbuf *b)
{
    avow_free(b->s);
    b->s = NULL; b->len = b->cap = 0; b->failed = 0;
}

/* ---- UTF-8 ---- */

int utf8_seq_len(const unsigned char *s, size_t n)
{
    if (n == 0) return 0;
    unsigned c = s[0];
    if (c < 0x80) return 1;
    int len; unsigned min;
    if (c >= 0xC2 && c <= 0xDF) { len = 2; min = 0x80; }
    else if (c >= 0xE0 && c <= 0xEF) { len = 3; min = 0x800; }
    else if (c >= 0xF0 && c <= 0xF4) { len = 4; min = 0x10000; }
    else return 0;
    if ((size_t)len > n) return 0;
    unsigned cp = c & (0x7F >> len);
    for (int i = 1; i < len; i++) {
        if ((s[i] & 0xC0) != 0x80) return 0;
        cp = (cp << 6) | (s[i] & 0x3F);
    }
    if (cp < min || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return 0;
    return len;
}

size_t utf8_width(const char *s, size_t n)
{
    size_t w = 0;
    for (size_t i = 0; i < n; i++)
        if (((unsigned char)s[i] & 0xC0) != 0x80) w++;
    return w;
}

/* ---- files ---- */

int avow_read_file(const char *path, char **out, size_t *len, size_t limit)
{
    *out = NULL; *len = 0;
    FILE *f = fopen(path, "rb");
    if (!f) return AVOW_EIO;
    size_t cap = 4096, n = 0;
    char *buf = avow_malloc(cap);
    if (!buf) { fclose(f); return AVOW_ENOMEM; }
    for (;;) {
        if (cap - n < 2) {
            if (cap > limit) { avow_free(buf); fclose(f); errno = EFBIG; return AVOW_EIO; }
            char *nb = avow_realloc(buf, cap * 2);
            if (!nb) { avow_free(buf); fclose(f); return AVOW_ENOMEM; }
            buf = nb; cap *= 2;
        }
        errno = 0;
        size_t got = fread(buf + n, 1, cap - n - 1, f);
        n += got;
        if (got == 0) break;
    }
    int err = ferror(f) ? (errno ? errno : EIO) : 0;
    fclose(f);
    if (err) { avow_free(buf); errno = err; return AVOW_EIO; }
    if (n > limit) { avow_free(buf); errno = EFBIG; return AVOW_EIO; }
    buf[n] = 0;
    *out = buf; *len = n;
    return AVOW_OK;
}

int avow_write_atomic(const char *path, const char *bytes, size_t len)
{
    size_t pl = strlen(path);
    char *tmp = avow_malloc(pl + 16);
    if (!tmp) return AVOW_ENOMEM;
    memcpy(tmp, path, pl);
    memcpy(tmp + pl, ".tmp-XXXXXX", 12);
    int fd = mkstemp(tmp);
    if (fd < 0) { avow_free(tmp); return AVOW_EIO; }
    mode_t mask = umask(0);
    umask(mask);
    (void)fchmod(fd, 0666 & ~mask);
    size_t off = 0;
    while (off < len) {
        ssize_t w = write(fd, bytes + off, len - off);
        if (w < 0) { if (errno == EINTR) continue; break; }
        off += (size_t)w;
    }
    int ok = off == len && fsync(fd) == 0;
    ok = (close(fd) == 0) && ok;
    if (ok && rename(tmp, path) == 0) { avow_free(tmp); return AVOW_OK; }
    int e = errno;
    unlink(tmp);
    avow_free(tmp);
    errno = e;
    return AVOW_EIO;
}

int avow_mkdirs(const char *path)
{
    size_t n = strlen(path);
    if (n == 0) { errno = ENOENT; return AVOW_EIO; }
    char *p = avow_malloc(n + 1);
    if (!p) return AVOW_ENOMEM;
    memcpy(p, path, n + 1);
    /* Each prefix that ends before a slash, then the whole path. */
    for (size_t i = 1; i <= n; i++) {
        if (i < n && p[i] != '/') continue;
        if (i < n && p[i - 1] == '/') continue;
        char c = p[i];
        p[i] = 0;
        struct stat st;
        if (stat(p, &st) != 0) {
            if (errno != ENOENT || (mkdir(p, 0777) != 0 && errno != EEXIST)) {
                int e = errno;
                avow_free(p);
                errno = e;
                return AVOW_EIO;
            }
        } else if (!S_ISDIR(st.st_mode)) {
            avow_free(p);
            errno = ENOTDIR;
            return AVOW_EIO;
        }
        p[i] = c;
    }
    avow_free(p);
    return AVOW_OK;
}
