/* csv.c: streaming CSV/TSV reader. One buffer of whole blocks; a record is scanned in
 * place (no copy), and only when it is complete are its quoted fields unescaped in
 * place. A record cut by the end of the buffered data is moved to the front of the
 * buffer, more is read (the buffer doubles when the record fills it) and the record is
 * scanned again from its start. See include/avow/csv.h for the format. */
#include "avow/csv.h"
#include "avow/util.h"

#include <errno.h>
#include <string.h>
#include <unistd.h>

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

/* Bytes allocated after the sentinel, so that a 64-byte block read at any p <= end stays
 * inside the buffer. Bytes past the sentinel never matter: the sentinel stops first. */
#define PAD 64
/* Block offset that matches no position (see next_stop). */
#define NO_BLOCK (((size_t)-1) / 2)

enum { ST_HEADER = 0, ST_DATA = 1, ST_FAILED = 2 };

struct csv_reader {
    int fd;                         /* source descriptor, or -1 */
    FILE *fp;                       /* source stream, or NULL */
    unsigned char *buf;             /* cap + 1 bytes: data, then a NUL sentinel */
    size_t cap;                     /* bytes of data the buffer holds */
    size_t pos;                     /* first byte not yet consumed */
    size_t end;                     /* one past the last valid byte; buf[end] == 0 */
    size_t max_record;              /* the buffer never grows beyond this */
    int eof;                        /* the source is exhausted */
    int state;                      /* ST_HEADER, ST_DATA or ST_FAILED */
    int trim;                       /* trim spaces around unquoted fields */
    int any_dq;                     /* the scanned record has a field with doubled quotes */
    size_t mbase;                   /* offset of the 64-byte block described by mask */
    uint64_t mask;                  /* bit i: buf[mbase + i] ends an unquoted run */
    unsigned char delim;            /* field delimiter */
    uint64_t line;                  /* physical line number at pos */
    uint64_t comments;              /* comment lines skipped before the header row */
    uint64_t nread;                 /* bytes read from the source so far */
    csv_field *fields;              /* field table of the current record */
    size_t fcap;                    /* entries allocated in fields */
    unsigned char stop_unq[256];    /* nonzero: byte ends an unquoted run */
    unsigned char stop_q[256];      /* nonzero: byte interrupts a quoted run */
    csv_error_info err;             /* the last error */
};

static int fail(csv_reader *r, int status, const char *msg, uint64_t line, size_t col)
{
    r->err.status = status;
    r->err.msg = msg;
    r->err.line = line;
    r->err.col = col;
    r->err.sys_errno = status == AVOW_EIO ? errno : 0;
    r->state = ST_FAILED;
    return status;
}

static int open_common(int fd, FILE *fp, char delim, size_t bufsize, csv_reader **out)
{
    *out = NULL;
    unsigned char d = (unsigned char)delim;
    if (d == '"' || d == '\r' || d == '\n' || d == 0) return AVOW_EDOM;
    if (bufsize < 4) bufsize = 4;
    if (bufsize > ((size_t)-1) / 4) return AVOW_EDOM;
    csv_reader *r = avow_calloc(1, sizeof *r);
    if (!r) return AVOW_ENOMEM;
    r->buf = avow_calloc(1, bufsize + 1 + PAD);     /* zeroed: no byte is undefined */
    r->fcap = 16;
    r->fields = avow_malloc(r->fcap * sizeof *r->fields);
    if (!r->buf || !r->fields) {
        avow_free(r->buf);
        avow_free(r->fields);
        avow_free(r);
        return AVOW_ENOMEM;
    }
    r->fd = fd;
    r->fp = fp;
    r->cap = bufsize;
    r->max_record = CSV_DEFAULT_MAX_RECORD > bufsize ? CSV_DEFAULT_MAX_RECORD : bufsize;
    r->delim = d;
    r->trim = d != ' ';
    r->line = 1;
    r->state = ST_HEADER;
    r->mbase = NO_BLOCK;
    const unsigned char stops[] = {d, '"', '\n', '\r', 0};
    for (size_t i = 0; i < sizeof stops; i++) r->stop_unq[stops[i]] = 1;
    r->stop_q['"'] = r->stop_q['\n'] = r->stop_q['\r'] = r->stop_q[0] = 1;
    *out = r;
    return AVOW_OK;
}

int csv_open_fd_bufsize(int fd, char delim, size_t bufsize, csv_reader **out)
{
    return open_common(fd, NULL, delim, bufsize, out);
}

int csv_open_fd(int fd, char delim, csv_reader **out)
{
    return open_common(fd, NULL, delim, CSV_DEFAULT_BUFSIZE, out);
}

int csv_open_file_bufsize(FILE *f, char delim, size_t bufsize, csv_reader **out)
{
    return open_common(-1, f, delim, bufsize, out);
}

int csv_open_file(FILE *f, char delim, csv_reader **out)
{
    return open_common(-1, f, delim, CSV_DEFAULT_BUFSIZE, out);
}

void csv_set_max_record(csv_reader *r, size_t bytes)
{
    r->max_record = bytes > r->cap ? bytes : r->cap;
}

void csv_close(csv_reader *r)
{
    if (!r) return;
    avow_free(r->buf);
    avow_free(r->fields);
    avow_free(r);
}

const csv_error_info *csv_error(const csv_reader *r) { return &r->err; }

/* Make room for more data after the partial record at pos and read one block.
 * Returns AVOW_OK (eof set when nothing more came) or an error status. */
static int refill(csv_reader *r, size_t col)
{
    r->mbase = NO_BLOCK;        /* the bytes move or change */
    if (r->pos > 0) {
        memmove(r->buf, r->buf + r->pos, r->end - r->pos);
        r->end -= r->pos;
        r->pos = 0;
    }
    if (r->end == r->cap) {
        if (r->cap >= r->max_record)
            return fail(r, AVOW_ESYNTAX, "record too long (an unterminated quoted field?)",
                        r->line, col);
        size_t ncap = r->cap * 2 < r->max_record ? r->cap * 2 : r->max_record;
        unsigned char *nb = avow_realloc(r->buf, ncap + 1 + PAD);
        if (!nb) return fail(r, AVOW_ENOMEM, "out of memory", r->line, col);
        memset(nb + r->cap, 0, ncap - r->cap + 1 + PAD);
        r->buf = nb;
        r->cap = ncap;
    }
    size_t room = r->cap - r->end, got;
    if (r->fp) {
        got = fread(r->buf + r->end, 1, room, r->fp);
        if (got == 0 && ferror(r->fp)) {
            if (errno == 0) errno = EIO;
            return fail(r, AVOW_EIO, "read error", r->line, col);
        }
    } else {
        ssize_t n;
        do n = read(r->fd, r->buf + r->end, room); while (n < 0 && errno == EINTR);
        if (n < 0) return fail(r, AVOW_EIO, "read error", r->line, col);
        got = (size_t)n;
    }
    if (got == 0) r->eof = 1;
    r->nread += got;
    r->end += got;
    r->buf[r->end] = 0;
    return AVOW_OK;
}

static int grow_fields(csv_reader *r)
{
    if (r->fcap > ((size_t)-1) / (2 * sizeof *r->fields)) return AVOW_ENOMEM;
    csv_field *nf = avow_realloc(r->fields, 2 * r->fcap * sizeof *nf);
    if (!nf) return AVOW_ENOMEM;
    r->fields = nf;
    r->fcap *= 2;
    return AVOW_OK;
}

/* Bit i set when p[i] ends an unquoted run (delimiter, quote, CR, LF or NUL), i < 64. */
static inline uint64_t stop_mask(const unsigned char *stops, unsigned char delim,
                                 const unsigned char *p)
{
    uint64_t m = 0;
#if defined(__SSE2__)
    (void)stops;
    const __m128i vd = _mm_set1_epi8((char)delim), vq = _mm_set1_epi8('"'),
                  vn = _mm_set1_epi8('\n'), vr = _mm_set1_epi8('\r'), vz = _mm_setzero_si128();
    for (int i = 0; i < 4; i++) {
        __m128i x = _mm_loadu_si128((const __m128i *)(const void *)(p + 16 * i));
        __m128i c = _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(x, vd), _mm_cmpeq_epi8(x, vq)),
                                 _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(x, vn),
                                                           _mm_cmpeq_epi8(x, vr)),
                                              _mm_cmpeq_epi8(x, vz)));
        m |= (uint64_t)(unsigned)_mm_movemask_epi8(c) << (16 * i);
    }
#else
    (void)delim;
    for (int i = 0; i < 64; i++) m |= (uint64_t)stops[p[i]] << i;
#endif
    return m;
}

/* The first byte at or after p that ends an unquoted run (the sentinel guarantees one).
 * The stop bits of one 64-byte block are cached in *mbase / *mask across fields and
 * records, so that a short field costs a shift and a count of trailing zeros. */
static inline unsigned char *next_stop(const csv_reader *r, unsigned char *base,
                                       unsigned char *p, size_t *mbase, uint64_t *mask)
{
    size_t off = (size_t)(p - base);
    for (;;) {
        size_t rel = off - *mbase;      /* huge when off < *mbase */
        if (rel < 64) {
            uint64_t m = *mask >> rel;
            if (m) return p + __builtin_ctzll(m);
            off = *mbase + 64;
            p = base + off;
        }
        *mbase = off;
        *mask = stop_mask(r->stop_unq, r->delim, p);
    }
}

/* Scan one record starting at pos. Returns 1 when complete (fields filled, *nfields
 * and *next_line set, pos advanced), 0 when more data is needed (*nfields = the field
 * being scanned, 1-based), or -status on error. Nothing in the buffer is modified. */
static int scan_record(csv_reader *r, size_t *nfields, uint64_t *next_line)
{
    unsigned char *base = r->buf, *p = base + r->pos, *end = base + r->end;
    const unsigned char *sq = r->stop_q;
    const unsigned char delim = r->delim;
    const int trim = r->trim, eof = r->eof;
    uint64_t line = r->line;
    size_t nf = 0, mbase = r->mbase, fcap = r->fcap;
    uint64_t mask = r->mask;
    csv_field *fields = r->fields;      /* locals: stores to fields cannot alias them */
    int any_dq = 0;

    for (;;) {
        if (nf == fcap) {
            if (grow_fields(r) != AVOW_OK)
                return -fail(r, AVOW_ENOMEM, "out of memory", line, nf + 1);
            fields = r->fields;
            fcap = r->fcap;
        }
        csv_field *f = &fields[nf];
        uint64_t fline = line;
        if (trim) while (*p == ' ') p++;
        if (*p == '"') {
            unsigned char *cs = ++p, *ce;
            int dq = 0;
            for (;;) {
                while (!sq[*p]) p++;
                if (*p == '"') {
                    /* at the end of the buffered data p[1] is the sentinel: the quote
                     * looks closing, and the end test below asks for more data */
                    if (p[1] == '"') { dq = 1; p += 2; continue; }
                    ce = p++;
                    break;
                }
                if (p == end) {
                    if (!eof) goto need;
                    return -fail(r, AVOW_ESYNTAX, "unterminated quoted field", fline, nf + 1);
                }
                if (*p == 0) return -fail(r, AVOW_ESYNTAX, "NUL byte", fline, nf + 1);
                if (*p == '\n') { line++; p++; continue; }
                /* CR: a line break of its own unless an LF follows */
                if (p + 1 == end && !eof) goto need;
                if (p[1] != '\n') line++;
                p++;
            }
            f->ptr = (const char *)cs;
            f->len = (size_t)(ce - cs);
            f->quoted = 1 + dq;     /* 2: unescape when the record is complete */
            any_dq |= dq;
            if (trim) while (*p == ' ') p++;
            if (*p == delim) { p++; nf++; continue; }      /* the sentinel is never delim */
            if (p == end) { if (!eof) goto need; goto record_end; }
            if (*p == '\n' || *p == '\r') goto record_end;
            if (*p == 0) return -fail(r, AVOW_ESYNTAX, "NUL byte", fline, nf + 1);
            return -fail(r, AVOW_ESYNTAX, "text after the closing quote", fline, nf + 1);
        }
        unsigned char *s = p;
        p = next_stop(r, base, p, &mbase, &mask);
        unsigned char *e = p;
        if (trim) while (e > s && e[-1] == ' ') e--;
        f->ptr = (const char *)s;
        f->len = (size_t)(e - s);
        f->quoted = 0;
        if (*p == delim) { p++; nf++; continue; }
        if (*p == '"')
            return -fail(r, AVOW_ESYNTAX, "quote inside an unquoted field", fline, nf + 1);
        if (*p == 0) {
            if (p != end) return -fail(r, AVOW_ESYNTAX, "NUL byte", fline, nf + 1);
            if (!eof) goto need;
        }
        goto record_end;
    }

record_end:
    if (p < end) {              /* at CR or LF */
        if (*p == '\r') {
            if (p + 1 == end && !eof) goto need;
            p++;
            if (*p == '\n') p++;    /* at end this reads the sentinel */
        } else {
            p++;
        }
        line++;
    }
    r->pos = (size_t)(p - base);
    r->mbase = mbase;
    r->mask = mask;
    r->any_dq = any_dq;
    *nfields = nf + 1;
    *next_line = line;
    return 1;

need:
    *nfields = nf + 1;
    return 0;
}

/* Read one record: 1, 0 at the end of input, or -status. */
static int read_record(csv_reader *r, csv_record *rec)
{
    size_t nf;
    uint64_t next_line;
    for (;;) {
        if (r->pos == r->end) {
            if (r->eof) return 0;
            int rc = refill(r, 1);
            if (rc != AVOW_OK) return -rc;
            continue;
        }
        int rc = scan_record(r, &nf, &next_line);
        if (rc > 0) break;
        if (rc < 0) return rc;
        rc = refill(r, nf);
        if (rc != AVOW_OK) return -rc;
    }
    csv_field *fs = r->fields;
    for (size_t i = 0; r->any_dq && i < nf; i++) {
        if (fs[i].quoted != 2) continue;
        /* every quote inside the content is doubled: drop the first of each pair */
        char *w = (char *)fs[i].ptr;
        const char *rd = fs[i].ptr, *e = fs[i].ptr + fs[i].len;
        while (rd < e) {
            if (*rd == '"') rd++;
            *w++ = *rd++;
        }
        fs[i].len = (size_t)(w - fs[i].ptr);
        fs[i].quoted = 1;
    }
    rec->nfields = nf;
    rec->fields = fs;
    rec->line = r->line;
    rec->blank = nf == 1 && fs[0].len == 0 && !fs[0].quoted;
    r->line = next_line;
    return 1;
}

/* Skip the lines before the header row that begin with '#' (comments, such as the
 * provenance line of a run sheet), counting them as physical lines. Only the bytes up
 * to the line end are looked at, and pos moves past them as they are seen, so a comment
 * of any length fits the buffer. Returns AVOW_OK or an error status. */
static int skip_comments(csv_reader *r)
{
    int in_comment = 0;     /* pos is inside a comment line */
    for (;;) {
        unsigned char *b = r->buf, *p = b + r->pos, *e = b + r->end;
        if (!in_comment) {
            if (p == e) {
                if (r->eof) return AVOW_OK;
                int rc = refill(r, 1);
                if (rc != AVOW_OK) return rc;
                continue;
            }
            if (*p != '#') return AVOW_OK;
            in_comment = 1;
            r->comments++;
        }
        while (p < e && *p != '\n' && *p != '\r' && *p != 0) p++;
        r->pos = (size_t)(p - b);
        if (p == e) {
            if (r->eof) { r->line++; return AVOW_OK; }     /* a last line without a line end */
        } else if (*p == 0) {
            return fail(r, AVOW_ESYNTAX, "NUL byte", r->line, 1);
        } else if (*p == '\n' || p + 1 < e || r->eof) {
            r->pos += *p == '\r' && p + 1 < e && p[1] == '\n' ? 2 : 1;
            r->line++;
            in_comment = 0;
            continue;
        }
        /* the buffered data end in the comment, or at a CR that an LF may follow */
        int rc = refill(r, 1);
        if (rc != AVOW_OK) return rc;
    }
}

uint64_t csv_comment_lines(const csv_reader *r) { return r->comments; }

uint64_t csv_bytes_read(const csv_reader *r) { return r->nread; }

char csv_delimiter_for_path(const char *path)
{
    size_t n = strlen(path);
    if (n >= 4 && (strcmp(path + n - 4, ".tsv") == 0 || strcmp(path + n - 4, ".tab") == 0)) return '\t';
    return ',';
}

int csv_read_header(csv_reader *r, csv_record *rec)
{
    if (r->state == ST_FAILED) return r->err.status;
    if (r->state != ST_HEADER) {
        r->err.status = AVOW_EDOM;
        r->err.msg = "header row already read";
        r->err.line = r->err.col = 0;
        r->err.sys_errno = 0;
        return AVOW_EDOM;
    }
    while (r->end - r->pos < 3 && !r->eof) {
        int rc = refill(r, 1);
        if (rc != AVOW_OK) return rc;
    }
    if (r->end - r->pos >= 3 && memcmp(r->buf + r->pos, "\xEF\xBB\xBF", 3) == 0) r->pos += 3;
    int rc = skip_comments(r);
    if (rc != AVOW_OK) return rc;
    rc = read_record(r, rec);
    if (rc < 0) return -rc;
    if (rc == 0 && r->comments)
        return fail(r, AVOW_ESYNTAX, "no header row after the comment lines", r->line, 1);
    if (rc == 0) return fail(r, AVOW_ESYNTAX, "empty input: a header row is required", 1, 1);
    if (rec->blank) return fail(r, AVOW_ESYNTAX, "the header row is blank", rec->line, 1);
    for (size_t i = 0; i < rec->nfields; i++) {
        const unsigned char *s = (const unsigned char *)rec->fields[i].ptr;
        size_t n = rec->fields[i].len;
        for (size_t j = 0; j < n;) {
            int l = utf8_seq_len(s + j, n - j);
            if (l == 0)
                return fail(r, AVOW_ESYNTAX, "header name is not valid UTF-8", rec->line, i + 1);
            j += (size_t)l;
        }
    }
    r->state = ST_DATA;
    return AVOW_OK;
}

int csv_next(csv_reader *r, csv_record *rec)
{
    if (r->state == ST_FAILED) return -r->err.status;
    if (r->state == ST_HEADER) {
        r->err.status = AVOW_EDOM;
        r->err.msg = "header row not read";
        r->err.line = r->err.col = 0;
        r->err.sys_errno = 0;
        return -AVOW_EDOM;
    }
    return read_record(r, rec);
}
