/* fuzz_common.h: what the fuzz harnesses share: an in-memory file that the library can
 * open by path (a memfd, seen as /proc/self/fd/N; a temporary file where there is
 * none), and the harness entry point the replay driver calls. */
#ifndef AVOW_FUZZ_COMMON_H
#define AVOW_FUZZ_COMMON_H

#define _GNU_SOURCE 1
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <unistd.h>

#include "avow/util.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* The path of a file that holds exactly bytes[0..n); the same file each call. */
static inline const char *fuzz_file(const uint8_t *bytes, size_t n)
{
    static int fd = -1;
    static char path[64];
    if (fd < 0) {
#ifdef MFD_CLOEXEC
        fd = memfd_create("avow-fuzz", MFD_CLOEXEC);
        if (fd >= 0) snprintf(path, sizeof path, "/proc/self/fd/%d", fd);
#endif
        if (fd < 0) {
            strcpy(path, "/tmp/avow-fuzz-XXXXXX");
            fd = mkstemp(path);
            if (fd < 0) { perror("avow fuzz: no temporary file"); abort(); }
            unlink(path);   /* still open: reopen it through /proc */
            snprintf(path, sizeof path, "/proc/self/fd/%d", fd);
        }
    }
    if (ftruncate(fd, 0) != 0) { perror("avow fuzz: ftruncate"); abort(); }
    size_t off = 0;
    while (off < n) {
        ssize_t w = pwrite(fd, bytes + off, n - off, (off_t)off);
        if (w <= 0) { perror("avow fuzz: pwrite"); abort(); }
        off += (size_t)w;
    }
    return path;
}

/* Stop with a message: a property of the library does not hold for this input. */
#define FUZZ_REQUIRE(cond, what) \
    do { if (!(cond)) { fprintf(stderr, "avow fuzz: %s (%s:%d)\n", what, __FILE__, __LINE__); abort(); } } while (0)

/* 1 when s[0..n) is valid UTF-8 (the reports and messages must be). */
static inline int fuzz_valid_utf8(const char *s, size_t n)
{
    for (size_t i = 0; i < n;) {
        int l = utf8_seq_len((const unsigned char *)s + i, n - i);
        if (l == 0) return 0;
        i += (size_t)l;
    }
    return 1;
}

/* 1 when s[0..n) holds no control character but line feeds (C0, DEL, or the C1 range
 * U+0080..U+009F, which some terminals obey): safe to show on a terminal. Assumes
 * valid UTF-8. */
static inline int fuzz_no_controls(const char *s, size_t n, int allow_tab)
{
    const unsigned char *u = (const unsigned char *)s;
    for (size_t i = 0; i < n; i++) {
        if (u[i] == '\n' || (allow_tab && u[i] == '\t')) continue;
        if (u[i] < 0x20 || u[i] == 0x7f) return 0;
        if (u[i] == 0xC2 && i + 1 < n && u[i + 1] >= 0x80 && u[i + 1] <= 0x9F) return 0;
    }
    return 1;
}

/* ---- a strict JSON checker (RFC 8259), enough to tell that a report parses ---- */

typedef struct json_cursor { const char *p, *e; int depth; } json_cursor;

static inline void json_ws(json_cursor *c)
{
    while (c->p < c->e && (*c->p == ' ' || *c->p == '\n' || *c->p == '\t' || *c->p == '\r')) c->p++;
}

static inline int json_lit(json_cursor *c, const char *w)
{
    size_t n = strlen(w);
    if ((size_t)(c->e - c->p) < n || memcmp(c->p, w, n) != 0) return 0;
    c->p += n;
    return 1;
}

static inline int json_str(json_cursor *c)
{
    if (c->p >= c->e || *c->p != '"') return 0;
    c->p++;
    while (c->p < c->e && *c->p != '"') {
        unsigned char ch = (unsigned char)*c->p;
        if (ch < 0x20) return 0;
        if (ch == '\\') {
            c->p++;
            if (c->p >= c->e) return 0;
            if (*c->p == 'u') {
                for (int i = 1; i <= 4; i++)
                    if (c->p + i >= c->e || !strchr("0123456789abcdefABCDEF", c->p[i]) || !c->p[i]) return 0;
                c->p += 5;
                continue;
            }
            if (!strchr("\"\\/bfnrt", *c->p) || !*c->p) return 0;
        }
        c->p++;
    }
    if (c->p >= c->e) return 0;
    c->p++;
    return 1;
}

static inline int json_num(json_cursor *c)
{
    const char *s = c->p;
    if (c->p < c->e && *c->p == '-') c->p++;
    if (c->p >= c->e) return 0;
    if (*c->p == '0') c->p++;
    else if (*c->p >= '1' && *c->p <= '9') while (c->p < c->e && *c->p >= '0' && *c->p <= '9') c->p++;
    else return 0;
    if (c->p < c->e && *c->p == '.') {
        c->p++;
        const char *d = c->p;
        while (c->p < c->e && *c->p >= '0' && *c->p <= '9') c->p++;
        if (c->p == d) return 0;
    }
    if (c->p < c->e && (*c->p == 'e' || *c->p == 'E')) {
        c->p++;
        if (c->p < c->e && (*c->p == '+' || *c->p == '-')) c->p++;
        const char *d = c->p;
        while (c->p < c->e && *c->p >= '0' && *c->p <= '9') c->p++;
        if (c->p == d) return 0;
    }
    return c->p > s;
}

static inline int json_value(json_cursor *c)
{
    json_ws(c);
    if (c->p >= c->e || ++c->depth > 200) return 0;
    int ok;
    if (*c->p == '{' || *c->p == '[') {
        char close = *c->p == '{' ? '}' : ']';
        int obj = *c->p == '{';
        c->p++;
        json_ws(c);
        if (c->p < c->e && *c->p == close) { c->p++; c->depth--; return 1; }
        for (;;) {
            if (obj) {
                json_ws(c);
                if (!json_str(c)) return 0;
                json_ws(c);
                if (c->p >= c->e || *c->p != ':') return 0;
                c->p++;
            }
            if (!json_value(c)) return 0;
            json_ws(c);
            if (c->p < c->e && *c->p == ',') { c->p++; continue; }
            if (c->p < c->e && *c->p == close) { c->p++; break; }
            return 0;
        }
        ok = 1;
    } else if (*c->p == '"') ok = json_str(c);
    else if (*c->p == 't') ok = json_lit(c, "true");
    else if (*c->p == 'f') ok = json_lit(c, "false");
    else if (*c->p == 'n') ok = json_lit(c, "null");
    else ok = json_num(c);
    c->depth--;
    return ok;
}

/* 1 when s[0..n) is one JSON value (surrounding white space allowed). */
static inline int fuzz_valid_json(const char *s, size_t n)
{
    json_cursor c = {s, s + n, 0};
    if (!json_value(&c)) return 0;
    json_ws(&c);
    return c.p == c.e;
}

#endif
