/* csv.h: a streaming reader for delimited text (CSV, TSV), RFC 4180 plus a few
 * tolerances.
 *
 * Format accepted:
 * - Records end at LF, CRLF, a lone CR, or the end of the input (a final line needs no
 *   line terminator). Physical lines are counted the same way.
 * - A UTF-8 byte-order mark (EF BB BF) at the very start is skipped.
 * - Lines that begin with '#' before the header row are comments: they are skipped whole
 *   (quotes and delimiters in them mean nothing) and counted as physical lines. Only
 *   there: after the header, a '#' is data. A header whose first name begins with '#'
 *   must quote it.
 * - The first record is the header row; it is required (csv_read_header) and its names
 *   must be valid UTF-8. Data fields are passed through as bytes.
 * - Fields are separated by one delimiter byte (',' or '\t' or any byte except '"', CR,
 *   LF and NUL).
 * - A field starting with '"' (after optional spaces) is quoted: it may hold delimiters,
 *   line breaks (passed through as they are, CRLF included) and doubled quotes (""
 *   stands for "). After the closing quote only spaces may follow before the delimiter
 *   or the end of the record.
 * - Unquoted fields are trimmed of ASCII spaces (0x20, not tabs) at both ends; a quote
 *   inside them is an error. When the delimiter is itself a space, nothing is trimmed.
 * - A NUL byte anywhere is an error.
 * - Records may have different field counts: the reader reports nfields and the caller
 *   decides.
 * - A blank line (nothing but spaces) is a record with one empty unquoted field; it is
 *   flagged `blank` so the caller can skip and count it.
 *
 * Memory: one buffer (1 MiB by default) that grows only to hold the longest record, up
 * to a limit (64 MiB by default, csv_set_max_record), plus the field table. All heap
 * memory comes from avow_malloc. */
#ifndef AVOW_CSV_H
#define AVOW_CSV_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

/* Default block size of reads. */
#define CSV_DEFAULT_BUFSIZE ((size_t)1 << 20)
/* Default limit on the length of one record in bytes. */
#define CSV_DEFAULT_MAX_RECORD ((size_t)64 << 20)

typedef struct csv_reader csv_reader;

/* One field of a record. */
typedef struct csv_field {
    const char *ptr;    /* content: unescaped, trimmed if unquoted; not NUL-terminated */
    size_t len;         /* bytes in ptr */
    int quoted;         /* 1 when the field was quoted */
} csv_field;

/* One record. Pointers stay valid until the next csv_next / csv_read_header / csv_close. */
typedef struct csv_record {
    size_t nfields;             /* number of fields (>= 1) */
    const csv_field *fields;    /* the fields, in order */
    uint64_t line;              /* 1-based physical line where the record starts */
    int blank;                  /* 1 when the record is one empty unquoted field */
} csv_record;

/* What went wrong, for the last failed call. */
typedef struct csv_error_info {
    int status;         /* AVOW_ESYNTAX, AVOW_EIO or AVOW_ENOMEM (AVOW_OK: no error) */
    const char *msg;    /* a static English message without location */
    uint64_t line;      /* 1-based physical line where the offending field starts */
    size_t col;         /* 1-based field index within the record */
    int sys_errno;      /* errno of a failed read, else 0 */
} csv_error_info;

/* Open a reader on the file descriptor fd (not closed by csv_close) with the given
 * delimiter. Returns AVOW_OK, AVOW_EDOM (bad delimiter) or AVOW_ENOMEM; *out is NULL on
 * error. */
int csv_open_fd(int fd, char delim, csv_reader **out);

/* The same with a read block of bufsize bytes (at least 4; smaller values are raised);
 * meant for tests of block boundaries. */
int csv_open_fd_bufsize(int fd, char delim, size_t bufsize, csv_reader **out);

/* Open a reader on a stdio stream (not closed by csv_close). Same returns. */
int csv_open_file(FILE *f, char delim, csv_reader **out);
int csv_open_file_bufsize(FILE *f, char delim, size_t bufsize, csv_reader **out);

/* Set the longest record accepted, in bytes (raised to the block size when smaller).
 * A longer record is an AVOW_ESYNTAX error ("record too long"). */
void csv_set_max_record(csv_reader *r, size_t bytes);

/* Release the reader (NULL is fine). */
void csv_close(csv_reader *r);

/* Read the header row, after any comment lines; must be the first read. Returns
 * AVOW_OK, or an error status (AVOW_ESYNTAX, also for an empty input, nothing but
 * comments, a blank header line, a NUL byte in a comment or invalid UTF-8 in a name;
 * AVOW_EIO; AVOW_ENOMEM) with details in csv_error; AVOW_EDOM when called twice. */
int csv_read_header(csv_reader *r, csv_record *rec);

/* Comment lines skipped before the header row (0 before csv_read_header). */
uint64_t csv_comment_lines(const csv_reader *r);

/* Bytes read from the source so far (a read block ahead of the records returned), for a
 * progress indicator. */
uint64_t csv_bytes_read(const csv_reader *r);

/* The delimiter for a data file by its name: tab for names ending in .tsv or .tab,
 * else ','. */
char csv_delimiter_for_path(const char *path);

/* Read the next data record: 1 with *rec filled, 0 at the end of the input, or a
 * negative status (-AVOW_ESYNTAX, -AVOW_EIO, -AVOW_ENOMEM) with details in csv_error.
 * Errors are sticky: later calls return the same error. Calling it before
 * csv_read_header is a usage error (-AVOW_EDOM, "header row not read"; not sticky). */
int csv_next(csv_reader *r, csv_record *rec);

/* Details of the last error (status AVOW_OK when there was none). */
const csv_error_info *csv_error(const csv_reader *r);

#endif
