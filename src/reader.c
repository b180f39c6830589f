/* reader.c: the data reader of `avow run`. One streaming pass over a CSV/TSV file:
 * columns are found by name in the header, level labels are matched to cells, each
 * response value is parsed from its decimal text and accumulated exactly (decimal.c),
 * and every row is accounted for. Also the SHA-256 digests of the inputs (OpenSSL). */
#include "avow/evaluate.h"

#include <errno.h>
#include <pthread.h>
#include <stdarg.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <unistd.h>

#include <openssl/evp.h>

#include "avow/csv.h"

static void to_hex(const unsigned char *md, char *hex)
{
    static const char digits[] = "0123456789abcdef";
    for (int i = 0; i < 32; i++) {
        hex[2 * i] = digits[md[i] >> 4];
        hex[2 * i + 1] = digits[md[i] & 15];
    }
    hex[64] = 0;
}

void eval_sha256_bytes(const void *bytes, size_t len, char *hex)
{
    unsigned char md[32];
    unsigned int mdlen = 0;
    EVP_Digest(bytes, len, md, &mdlen, EVP_sha256(), NULL);
    to_hex(md, hex);
}

/* 1 for what avow reads as a file: a regular file, or a folder (whose read fails with
 * EISDIR). Devices, pipes and sockets are refused: /dev/zero would never end, and a
 * pipe cannot be read twice (by the hash and by the reader). */
static int is_file_like(mode_t m) { return S_ISREG(m) || S_ISDIR(m); }

/* The digest of the file at path, read through buf (size bytes). */
#define HASH_BLOCK (1 << 20)
static int sha256_file_with(const char *path, unsigned char *buf, size_t size, char *hex)
{
    int fd = open(path, O_RDONLY);
    if (fd < 0) return AVOW_EIO;
    struct stat st;
    if (fstat(fd, &st) == 0 && !is_file_like(st.st_mode)) {
        close(fd);
        errno = ENODEV;
        return AVOW_EIO;
    }
    EVP_MD_CTX *c = EVP_MD_CTX_new();
    if (!c || EVP_DigestInit_ex(c, EVP_sha256(), NULL) != 1) {
        EVP_MD_CTX_free(c); close(fd);
        return AVOW_ENOMEM;
    }
    int rc = AVOW_OK;
    for (;;) {
        ssize_t got = read(fd, buf, size);
        if (got < 0) { if (errno == EINTR) continue; rc = AVOW_EIO; break; }
        if (got == 0) break;
        EVP_DigestUpdate(c, buf, (size_t)got);
    }
    if (rc == AVOW_OK) {
        unsigned char md[32];
        unsigned int mdlen = 0;
        EVP_DigestFinal_ex(c, md, &mdlen);
        to_hex(md, hex);
    }
    int e = errno;
    EVP_MD_CTX_free(c);
    close(fd);
    errno = e;
    return rc;
}

int eval_sha256_file(const char *path, char *hex)
{
    unsigned char *buf = avow_malloc(HASH_BLOCK);
    if (!buf) return AVOW_ENOMEM;
    int rc = sha256_file_with(path, buf, HASH_BLOCK, hex);
    int e = errno;
    avow_free(buf);
    errno = e;
    return rc;
}

/* ---- hashing beside the data pass ---- */

struct eval_hash_job {
    pthread_t thread;       /* the hashing thread */
    const char *path;       /* the file */
    unsigned char *buf;     /* read buffer, allocated by the caller's thread: the
                               allocation hook (avow_mem_fail_after) counts only there */
    size_t size;            /* its bytes */
    char hex[65];           /* its digest when done */
    int rc;                 /* eval_sha256_file's status */
    int err;                /* errno on failure */
    int started;            /* the thread runs (else the work is done in join) */
};

static void *hash_main(void *arg)
{
    eval_hash_job *j = arg;
    j->rc = sha256_file_with(j->path, j->buf, j->size, j->hex);
    j->err = errno;
    return NULL;
}

eval_hash_job *eval_sha256_start(const char *path)
{
    eval_hash_job *j = avow_calloc(1, sizeof *j);
    if (!j) return NULL;
    /* a small file needs no megabyte of buffer */
    struct stat st;
    j->size = HASH_BLOCK;
    if (stat(path, &st) == 0 && S_ISREG(st.st_mode) && st.st_size >= 0 && (uint64_t)st.st_size < j->size)
        j->size = (size_t)st.st_size + 1 > 4096 ? (size_t)st.st_size + 1 : 4096;
    j->buf = avow_malloc(j->size);
    if (!j->buf) { avow_free(j); return NULL; }
    j->path = path;
    j->started = pthread_create(&j->thread, NULL, hash_main, j) == 0;
    return j;
}

int eval_sha256_join(eval_hash_job *j, char *hex)
{
    if (!j) return AVOW_ENOMEM;
    if (j->started) pthread_join(j->thread, NULL);
    else hash_main(j);
    int rc = j->rc;
    if (rc == AVOW_OK) memcpy(hex, j->hex, 65);
    avow_free(j->buf);
    errno = j->err;
    avow_free(j);
    return rc;
}

/* ---- label lookup: open addressing over the level labels ---- */

typedef struct label_map {
    const char **label;     /* per slot: the label, or NULL */
    size_t *len;            /* its length */
    size_t *cell;           /* its cell */
    size_t mask;            /* slots - 1 (a power of two) */
} label_map;

static uint64_t hash_bytes(const char *s, size_t n)
{
    uint64_t h = 1469598103934665603u;   /* FNV-1a */
    for (size_t i = 0; i < n; i++) { h ^= (unsigned char)s[i]; h *= 1099511628211u; }
    return h;
}

static int map_put(label_map *m, const char *lab, size_t n, size_t cell)
{
    size_t h = (size_t)hash_bytes(lab, n) & m->mask;
    while (m->label[h]) h = (h + 1) & m->mask;
    m->label[h] = lab; m->len[h] = n; m->cell[h] = cell;
    return 1;
}

static int map_alloc(label_map *m, size_t slots)
{
    m->mask = slots - 1;
    m->label = avow_calloc(slots, sizeof *m->label);
    m->len = avow_calloc(slots, sizeof *m->len);
    m->cell = avow_calloc(slots, sizeof *m->cell);
    return m->label && m->len && m->cell;
}

static int map_init(label_map *m, const plan_factor *f)
{
    size_t slots = 16;
    while (slots < 2 * f->nlevels + 2) slots *= 2;
    if (!map_alloc(m, slots)) return 0;
    for (size_t i = 0; i < f->nlevels; i++) {
        const char *lab = f->levels[i].code ? f->levels[i].code : f->levels[i].name;
        map_put(m, lab, strlen(lab), i);
    }
    return 1;
}

/* Add a label (kept by the caller) to a map that grows: at most half full. */
static int map_add(label_map *m, const char *lab, size_t n, size_t cell, size_t count)
{
    if (2 * (count + 1) > m->mask + 1) {
        label_map bigger = {0};
        if (!map_alloc(&bigger, 2 * (m->mask + 1))) {
            avow_free(bigger.label); avow_free(bigger.len); avow_free(bigger.cell);
            return 0;
        }
        for (size_t i = 0; i <= m->mask; i++)
            if (m->label[i]) map_put(&bigger, m->label[i], m->len[i], m->cell[i]);
        avow_free(m->label); avow_free(m->len); avow_free(m->cell);
        *m = bigger;
    }
    return map_put(m, lab, n, cell);
}

static long map_find(const label_map *m, const char *s, size_t n)
{
    size_t h = (size_t)hash_bytes(s, n) & m->mask;
    while (m->label[h]) {
        if (m->len[h] == n && memcmp(m->label[h], s, n) == 0) return (long)m->cell[h];
        h = (h + 1) & m->mask;
    }
    return -1;
}

static void map_free(label_map *m)
{
    avow_free(m->label); avow_free(m->len); avow_free(m->cell);
}

/* ---- the data's cells ---- */

static int data_grow(avow_data *d, size_t blocks)
{
    if (blocks <= d->cap) return AVOW_OK;
    size_t cap = d->cap ? d->cap : 1;
    while (cap < blocks) cap *= 2;
    avow_acc *acc = avow_realloc(d->acc, cap * d->ncells * sizeof *acc);
    if (!acc) return AVOW_ENOMEM;
    d->acc = acc;
    for (size_t i = d->cap * d->ncells; i < cap * d->ncells; i++) dec_acc_init(&acc[i]);
    d->cap = cap;
    return AVOW_OK;
}

/* Keep one observation (data->keep). */
static int keep_obs(avow_data *d, avow_dec v, uint64_t line, size_t cell)
{
    if (d->nobs == d->obscap) {
        size_t cap = d->obscap ? 2 * d->obscap : 1024;
        avow_obs *o = avow_realloc(d->obs, cap * sizeof *o);
        if (!o) return AVOW_ENOMEM;
        d->obs = o;
        d->obscap = cap;
    }
    d->obs[d->nobs++] = (avow_obs){v, line, (uint32_t)cell};
    return AVOW_OK;
}

int eval_data_init(avow_data *d, const avow_plan *plan)
{
    int keep = d->keep, residuals = d->residuals;
    memset(d, 0, sizeof *d);
    d->keep = keep;
    d->residuals = residuals;
    d->ncells = plan->ncells;
    d->nblocks = plan->block ? plan->block->nlevels : 1;
    return data_grow(d, d->nblocks ? d->nblocks : 1);
}

void eval_data_free(avow_data *d)
{
    for (size_t i = 0; i < d->cap * d->ncells; i++) dec_acc_clear(&d->acc[i]);
    avow_free(d->acc);
    if (d->block_labels) for (size_t b = 0; b < d->nblocks; b++) avow_free(d->block_labels[b]);
    avow_free(d->block_labels);
    avow_free(d->obs);
    memset(d, 0, sizeof *d);
}

/* ---- the pass ---- */

/* The missing-value tokens with their lengths; `lengths` has bit L set when some token
 * has L bytes (L < 64), so most fields are ruled out by one test. */
typedef struct missing_set {
    const char **tok;       /* the tokens */
    size_t *len;            /* their lengths */
    size_t n;               /* how many */
    uint64_t lengths;       /* bit L: a token of L bytes exists (L < 64) */
    int long_tokens;        /* some token has 64 bytes or more */
} missing_set;

static int missing_init(missing_set *m, const avow_plan *p)
{
    m->tok = p->missing;
    m->n = p->nmissing;
    m->len = avow_calloc(m->n ? m->n : 1, sizeof *m->len);
    if (!m->len) return 0;
    for (size_t i = 0; i < m->n; i++) {
        m->len[i] = strlen(m->tok[i]);
        if (m->len[i] < 64) m->lengths |= (uint64_t)1 << m->len[i];
        else m->long_tokens = 1;
    }
    return 1;
}

static int is_missing(const missing_set *m, const char *s, size_t n)
{
    if (n < 64 ? !(m->lengths >> n & 1) : !m->long_tokens) return 0;
    for (size_t i = 0; i < m->n; i++)
        if (m->len[i] == n && memcmp(m->tok[i], s, n) == 0) return 1;
    return 0;
}

/* Append a field's text for a message: at most 40 characters, cut at a character
 * boundary, with control characters (C0, DEL, C1) and bytes that are not UTF-8 shown as
 * '?', so that a message is valid UTF-8 and cannot drive a terminal. */
static void put_field(strbuf *b, const char *s, size_t n)
{
    const unsigned char *u = (const unsigned char *)s;
    sb_putc(b, '"');
    size_t i = 0;
    for (int shown = 0; i < n && shown < 40; shown++) {
        int l = utf8_seq_len(u + i, n - i);
        if (l == 0 || u[i] < 0x20 || u[i] == 0x7f || (l == 2 && u[i] == 0xC2 && u[i + 1] < 0xA0)) {
            sb_putc(b, '?');
            i += l ? (size_t)l : 1;
        } else {
            sb_put(b, s + i, (size_t)l);
            i += (size_t)l;
        }
    }
    if (i < n) sb_puts(b, "...");
    sb_putc(b, '"');
}

/* Why a label cannot be shown in a report (NULL when it can): bytes that are not UTF-8,
 * or a control character (C0, DEL, C1). */
static const char *label_fault(const char *s, size_t n)
{
    const unsigned char *u = (const unsigned char *)s;
    for (size_t i = 0; i < n;) {
        int l = utf8_seq_len(u + i, n - i);
        if (l == 0) return "is not valid UTF-8";
        if (u[i] < 0x20 || u[i] == 0x7f || (l == 2 && u[i] == 0xC2 && u[i + 1] < 0xA0))
            return "holds a control character";
        i += (size_t)l;
    }
    return NULL;
}

typedef struct read_state {
    const avow_plan *plan;
    const char *shown;      /* file name in messages */
    strbuf *errs;
    size_t nerr;            /* errors recorded */
} read_state;

static void data_error(read_state *rs, uint64_t line, size_t col, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;

static void data_error(read_state *rs, uint64_t line, size_t col, const char *fmt, ...)
{
    rs->nerr++;
    if (rs->nerr > AVOW_MAX_DATA_ERRORS) return;
    if (line) sb_printf(rs->errs, "%s:%llu:%zu: error: ", rs->shown, (unsigned long long)line, col);
    else sb_printf(rs->errs, "%s: error: ", rs->shown);
    va_list ap;
    va_start(ap, fmt);
    sb_vprintf(rs->errs, fmt, ap);
    va_end(ap);
    sb_putc(rs->errs, '\n');
}

/* Why a label may have matched no level: it is a level's name read from a code, or a
 * description; otherwise the labels that do match. */
static void label_hint(const plan_factor *f, const char *s, size_t n, strbuf *errs)
{
    for (size_t i = 0; i < f->nlevels; i++) {
        const plan_level *l = &f->levels[i];
        if (l->desc && strlen(l->desc) == n && memcmp(l->desc, s, n) == 0) {
            sb_printf(errs, "  hint: the study reads \"%s\" as the description of level `%s`; "
                            "separate levels named by strings with commas: \"1\", \"2\"\n", l->desc, l->name);
            return;
        }
        if (l->code && strlen(l->name) == n && memcmp(l->name, s, n) == 0) {
            sb_printf(errs, "  hint: level `%s` is read from the label \"%s\" (its `code`)\n", l->name, l->code);
            return;
        }
    }
    for (size_t i = 0; i < f->nlevels; i++) {
        const char *lab = f->levels[i].code ? f->levels[i].code : f->levels[i].name;
        if (strlen(lab) == n && strncasecmp(lab, s, n) == 0) {
            sb_printf(errs, "  hint: labels are case-sensitive; the level's label is \"%s\"\n", lab);
            return;
        }
    }
    sb_puts(errs, "  hint: the labels of the levels are ");
    for (size_t i = 0; i < f->nlevels && i < 10; i++) {
        const char *lab = f->levels[i].code ? f->levels[i].code : f->levels[i].name;
        sb_printf(errs, "%s\"%s\"", i ? ", " : "", lab);
    }
    sb_puts(errs, f->nlevels > 10 ? ", ...\n" : "\n");
}

/* A hint for a CSV syntax error. */
static const char *csv_hint(const char *msg)
{
    if (strstr(msg, "NUL")) return "the file holds binary bytes; export the sheet as CSV text";
    if (strstr(msg, "unterminated")) return "a field that starts with \" must end with \"; a quote inside it is written \"\"";
    if (strstr(msg, "quote inside")) return "quote the whole field, and double the quotes inside it: \"12 \"\"A\"\"\"";
    if (strstr(msg, "after the closing quote")) return "nothing but the delimiter may follow a closing quote";
    return NULL;
}

static char pick_delimiter(const avow_plan *p, const char *path)
{
    return p->delimiter ? p->delimiter : csv_delimiter_for_path(path);
}

/* Column index of name in the header, or -1 (-2 when it appears twice). */
static long find_column(const csv_record *hdr, const char *name)
{
    long found = -1;
    size_t n = strlen(name);
    for (size_t i = 0; i < hdr->nfields; i++)
        if (hdr->fields[i].len == n && memcmp(hdr->fields[i].ptr, name, n) == 0) {
            if (found >= 0) return -2;
            found = (long)i;
        }
    return found;
}

/* Report the header's columns when a needed one is missing. */
static void missing_column(read_state *rs, const csv_record *rec, const char *name, const char *role,
                           uint64_t comments)
{
    strbuf have = {0};
    for (size_t c = 0; c < rec->nfields && c < 12; c++) {
        if (c) sb_puts(&have, ", ");
        put_field(&have, rec->fields[c].ptr, rec->fields[c].len);
    }
    if (rec->nfields > 12) sb_puts(&have, ", ...");
    data_error(rs, rec->line, 1, "no column \"%s\" for `%s`; the header has %s", name, role,
               have.s ? have.s : "no names");
    sb_free(&have);
    if (rec->nfields == 1 && rs->nerr == 1) {
        const char *h = rec->fields[0].ptr;
        size_t hl = rec->fields[0].len;
        const char *d = memchr(h, '\t', hl) ? "\\t" : memchr(h, ';', hl) ? ";" : memchr(h, ',', hl) ? "," : NULL;
        if (d) sb_printf(rs->errs, "  hint: the header is one field; add delimiter \"%s\" to the data block\n", d);
    }
    if (comments == 1 && rs->nerr == 1)
        sb_puts(rs->errs, "  hint: line 1 begins with # and was skipped as a comment; quote a first column "
                          "name that begins with #: \"#id\"\n");
    else if (comments && rs->nerr == 1)
        sb_printf(rs->errs, "  hint: lines 1 to %llu begin with # and were skipped as comments; quote a first "
                            "column name that begins with #: \"#id\"\n", (unsigned long long)comments);
}

/* Records between two looks at the bytes read, for the progress callback. */
#define PROGRESS_RECORDS 4096

/* Size of the open file fd, or 0 when it is not a regular file. */
static uint64_t file_size(int fd)
{
    struct stat st;
    if (fstat(fd, &st) != 0 || !S_ISREG(st.st_mode) || st.st_size < 0) return 0;
    return (uint64_t)st.st_size;
}

size_t eval_read(const avow_plan *plan, const char *path, const char *shown, avow_data *data,
                 avow_results *res, strbuf *errs, const avow_progress *progress)
{
    read_state rs = {plan, shown, errs, 0};
    size_t nf = plan->nfactors, has_block = plan->block ? 1 : 0;
    size_t ncols_study = nf + has_block + 1;   /* factors, block, response */
    size_t bcol_i = nf, ycol_i = nf + has_block;
    res->delimiter = pick_delimiter(plan, path);
    int fd = open(path, O_RDONLY);
    if (fd < 0) {
        sb_printf(errs, "%s: error: cannot open the data file: %s\n", shown, strerror(errno));
        return 1;
    }
    struct stat st;
    int have_st = fstat(fd, &st) == 0;
    if (have_st && !is_file_like(st.st_mode)) {
        sb_printf(errs, "%s: error: %s\n", shown, AVOW_NOT_A_FILE);
        close(fd);
        return 1;
    }
    csv_reader *r = NULL;
    label_map maps[AVOW_MAX_FACTORS + 1];
    memset(maps, 0, sizeof maps);
    missing_set miss = {0};
    long cols[AVOW_MAX_FACTORS + 2];
    /* A file smaller than the reader's block gets a buffer of its own size (it grows if
     * the file does): a few hundred bytes of data need no megabyte. */
    size_t bufsize = CSV_DEFAULT_BUFSIZE;
    if (have_st && S_ISREG(st.st_mode) && st.st_size >= 0 && (uint64_t)st.st_size < bufsize)
        bufsize = (size_t)st.st_size + 1 > 4096 ? (size_t)st.st_size + 1 : 4096;
    int ok_init = csv_open_fd_bufsize(fd, res->delimiter, bufsize, &r) == AVOW_OK && missing_init(&miss, plan);
    for (size_t f = 0; ok_init && f < nf; f++) ok_init = map_init(&maps[f], &plan->factors[f]);
    if (ok_init && has_block) {
        if (plan->block_from_data) ok_init = map_alloc(&maps[nf], 16);
        else ok_init = map_init(&maps[nf], plan->block);
    }
    if (!ok_init) {
        data->oom = 1;
        sb_printf(errs, "%s: error: out of memory\n", shown);
        csv_close(r);
        for (size_t f = 0; f <= nf; f++) map_free(&maps[f]);
        avow_free(miss.len); close(fd);
        return 1;
    }
    csv_record rec;
    if (csv_read_header(r, &rec) != AVOW_OK) {
        const csv_error_info *e = csv_error(r);
        if (e->status == AVOW_ENOMEM) data->oom = 1;
        data_error(&rs, e->line ? e->line : 1, e->col ? e->col : 1, "%s%s",
                   e->status == AVOW_EIO ? "cannot read the data file: " : "the header row: ",
                   e->status == AVOW_EIO ? strerror(e->sys_errno) : e->msg);
        const char *hint = e->status == AVOW_ESYNTAX ? csv_hint(e->msg) : NULL;
        if (hint) sb_printf(errs, "  hint: %s\n", hint);
        goto done;
    }
    size_t ncols = rec.nfields;
    for (size_t i = 0; i < ncols_study; i++) {
        cols[i] = find_column(&rec, plan->columns[i]);
        const char *role = plan_column_role(plan, i);
        const char *what = i == ycol_i ? "response" : i == bcol_i && has_block ? "block" : "factor";
        if (cols[i] == -2)
            data_error(&rs, rec.line, 1, "the header has two columns named \"%s\" (the %s)", plan->columns[i], what);
        else if (cols[i] < 0)
            missing_column(&rs, &rec, plan->columns[i], role, csv_comment_lines(r));
    }
    if (rs.nerr) goto done;
    size_t ycol = (size_t)cols[ycol_i];
    if (progress && !progress->fn) progress = NULL;
    uint64_t total = progress ? file_size(fd) : 0, shown_bytes = 0;
    unsigned tick = 0;
    if (progress) progress->fn(progress->arg, shown_bytes = csv_bytes_read(r), total);
    for (;;) {
        if (progress && ++tick == PROGRESS_RECORDS) {
            tick = 0;
            uint64_t n = csv_bytes_read(r);
            if (n != shown_bytes) progress->fn(progress->arg, shown_bytes = n, total);
        }
        int got = csv_next(r, &rec);
        if (got == 0) break;
        if (got < 0) {
            const csv_error_info *e = csv_error(r);
            if (e->status == AVOW_ENOMEM) data->oom = 1;
            if (e->status == AVOW_EIO)
                data_error(&rs, e->line, e->col, "cannot read the data file: %s", strerror(e->sys_errno));
            else {
                data_error(&rs, e->line, e->col, "%s", e->msg);
                const char *hint = csv_hint(e->msg);
                if (hint) sb_printf(errs, "  hint: %s\n", hint);
            }
            break;
        }
        if (rec.blank) { res->blank++; continue; }
        res->rows++;
        if (rec.nfields != ncols) {
            data_error(&rs, rec.line, rec.nfields < ncols ? rec.nfields : ncols + 1,
                       "this row has %zu field%s; the header has %zu", rec.nfields,
                       rec.nfields == 1 ? "" : "s", ncols);
            continue;
        }
        const csv_field *yf = &rec.fields[ycol];
        int miss_level = 0;
        for (size_t i = 0; i < nf + has_block && !miss_level; i++) {
            const csv_field *lf = &rec.fields[cols[i]];
            miss_level = is_missing(&miss, lf->ptr, lf->len);
        }
        int miss_y = is_missing(&miss, yf->ptr, yf->len);
        if (miss_level || miss_y) {
            if (miss_y) res->missing_response++;
            else res->missing_level++;
            if (res->nmissing_lines < AVOW_MAX_LISTED_MISSING) res->missing_lines[res->nmissing_lines++] = rec.line;
            continue;
        }
        size_t cell = 0;
        int bad = 0;
        for (size_t f = 0; f < nf; f++) {
            const csv_field *lf = &rec.fields[cols[f]];
            long l = map_find(&maps[f], lf->ptr, lf->len);
            if (l < 0) {
                strbuf b = {0};
                put_field(&b, lf->ptr, lf->len);
                data_error(&rs, rec.line, (size_t)cols[f] + 1, "%s is not a level of `%s`", b.s ? b.s : "?",
                           plan->factors[f].name);
                sb_free(&b);
                if (rs.nerr <= AVOW_MAX_DATA_ERRORS) label_hint(&plan->factors[f], lf->ptr, lf->len, errs);
                bad = 1;
                break;
            }
            cell = cell * plan->factors[f].nlevels + (size_t)l;
        }
        if (bad) continue;
        size_t block = 0;
        if (has_block) {
            const csv_field *bf = &rec.fields[cols[bcol_i]];
            long b = map_find(&maps[nf], bf->ptr, bf->len);
            if (b < 0 && plan->block_from_data) {
                /* The label is shown in the reports: it must be text that cannot drive a
                 * terminal or break the JSON report. */
                const char *why = label_fault(bf->ptr, bf->len);
                if (why) {
                    strbuf bb = {0};
                    put_field(&bb, bf->ptr, bf->len);
                    data_error(&rs, rec.line, (size_t)cols[bcol_i] + 1, "the label %s of block `%s` %s",
                               bb.s ? bb.s : "?", plan->block->name, why);
                    sb_free(&bb);
                    continue;
                }
                if (data->nblocks >= AVOW_MAX_BLOCKS) {
                    data_error(&rs, rec.line, (size_t)cols[bcol_i] + 1, "more than %d blocks in `%s`",
                               AVOW_MAX_BLOCKS, plan->block->name);
                    break;
                }
                char **labels = avow_realloc(data->block_labels, (data->nblocks + 1) * sizeof *labels);
                char *lab = avow_malloc(bf->len + 1);
                if (labels) data->block_labels = labels;
                if (!labels || !lab || data_grow(data, data->nblocks + 1) != AVOW_OK) {
                    avow_free(lab);
                    data->oom = 1;
                    data_error(&rs, 0, 0, "out of memory");
                    break;
                }
                memcpy(lab, bf->ptr, bf->len);
                lab[bf->len] = 0;
                data->block_labels[data->nblocks] = lab;
                if (!map_add(&maps[nf], lab, bf->len, data->nblocks, data->nblocks)) {
                    data->nblocks++;
                    data->oom = 1;
                    data_error(&rs, 0, 0, "out of memory");
                    break;
                }
                b = (long)data->nblocks++;
            } else if (b < 0) {
                strbuf bb = {0};
                put_field(&bb, bf->ptr, bf->len);
                data_error(&rs, rec.line, (size_t)cols[bcol_i] + 1, "%s is not a level of the block `%s`",
                           bb.s ? bb.s : "?", plan->block->name);
                sb_free(&bb);
                if (rs.nerr <= AVOW_MAX_DATA_ERRORS) label_hint(plan->block, bf->ptr, bf->len, errs);
                continue;
            }
            block = (size_t)b;
        }
        avow_acc *acc = &data->acc[block * data->ncells + cell];
        avow_dec v;
        int pr = dec_parse(yf->ptr, yf->len, &v);
        if (pr == AVOW_OK) {
            if (data->keep && keep_obs(data, v, rec.line, block * data->ncells + cell) != AVOW_OK) {
                data->oom = 1;
                data_error(&rs, 0, 0, "out of memory keeping the values for the diagnostics");
                sb_puts(errs, "  hint: avow run --no-diagnostics keeps only the sums\n");
                break;
            }
            if (dec_acc_add(acc, v) != AVOW_OK) {
                if (data->keep) data->nobs--;
                strbuf b = {0};
                put_field(&b, yf->ptr, yf->len);
                data_error(&rs, rec.line, ycol + 1, "the value %s is too far from the others to be analysed",
                           b.s ? b.s : "?");
                sb_free(&b);
                continue;
            }
        } else if (pr == AVOW_EOVERFLOW) {
            /* More digits than 64 bits hold: read it as the nearest double and say so
             * (a long text, hundreds of digits, is copied to the heap: it may still be
             * within the range of doubles). */
            char small[512], *tmp = small;
            if (yf->len >= sizeof small && !(tmp = avow_malloc(yf->len + 1))) {
                data->oom = 1;
                data_error(&rs, 0, 0, "out of memory");
                break;
            }
            memcpy(tmp, yf->ptr, yf->len);
            tmp[yf->len] = 0;
            char *end;
            double d = strtod(tmp, &end);
            int whole = *end == 0;
            if (tmp != small) avow_free(tmp);
            if (!whole || dec_acc_add_double(acc, d) != AVOW_OK) {
                strbuf b = {0};
                put_field(&b, yf->ptr, yf->len);
                data_error(&rs, rec.line, ycol + 1, "the value %s is out of range", b.s ? b.s : "?");
                sb_free(&b);
                continue;
            }
            avow_dec dv;
            if (data->keep && (dec_from_double(d, &dv) != AVOW_OK
                               || keep_obs(data, dv, rec.line, block * data->ncells + cell) != AVOW_OK)) {
                data->oom = 1;
                data_error(&rs, 0, 0, "out of memory keeping the values for the diagnostics");
                break;
            }
            res->inexact_values++;
        } else {
            strbuf b = {0};
            put_field(&b, yf->ptr, yf->len);
            const char *why = "is not a number";
            char low[8] = {0};
            for (size_t i = 0; i < yf->len && i < 7; i++)
                low[i] = (char)(yf->ptr[i] >= 'A' && yf->ptr[i] <= 'Z' ? yf->ptr[i] + 32 : yf->ptr[i]);
            if (strstr(low, "inf") || strstr(low, "nan")) why = "is not a finite number";
            data_error(&rs, rec.line, ycol + 1, "the %s value %s %s", plan->response, b.s ? b.s : "?", why);
            sb_free(&b);
            if (rs.nerr <= AVOW_MAX_DATA_ERRORS && memchr(yf->ptr, ',', yf->len) && !memchr(yf->ptr, '.', yf->len))
                sb_puts(errs, "  hint: write decimals with a point: 11.0, not 11,0\n");
            continue;
        }
        res->used++;
    }
    if (progress) progress->fn(progress->arg, csv_bytes_read(r), total);
    if (!rs.nerr && res->rows == 0)
        data_error(&rs, 0, 0, "the file has a header row but no data rows");
    if (!rs.nerr && plan->saturated) {
        /* The cell-means model needs every cell; a model without some interactions, or with
         * blocks, may do without some (the analysis checks that every term is estimable). */
        uint64_t N = 0;
        for (size_t i = 0; i < plan->ncells; i++) {
            uint64_t n = dec_acc_n(&data->acc[i]);
            N += n;
            if (n == 0)
                data_error(&rs, 0, 0, plan->nfactors == 1 ? "level `%s` has no data" : "%s has no data",
                           plan_cell_name(plan, i));
        }
        /* (with several factors the analysis counts the residual's degrees of freedom) */
        if (!rs.nerr && plan->nfactors == 1 && N <= plan->ncells)
            data_error(&rs, 0, 0, "%llu observations for %zu levels leave no degrees of freedom for the residual",
                       (unsigned long long)N, plan->ncells);
    }
    if (!rs.nerr && has_block && data->nblocks < 2)
        data_error(&rs, 0, 0, "the data hold %zu block%s of `%s`; blocks need at least two",
                   data->nblocks, data->nblocks == 1 ? "" : "s", plan->block->name);
done:
    if (rs.nerr > AVOW_MAX_DATA_ERRORS)
        sb_printf(errs, "%s: error: %zu more errors not shown\n", shown, rs.nerr - AVOW_MAX_DATA_ERRORS);
    csv_close(r);
    for (size_t f = 0; f <= nf && f <= AVOW_MAX_FACTORS; f++) map_free(&maps[f]);
    avow_free(miss.len);
    close(fd);
    return rs.nerr;
}
