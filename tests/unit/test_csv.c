/* test_csv.c: the streaming CSV/TSV reader: quoting, line endings, byte-order mark,
 * delimiters, trimming, blank and ragged records, errors with line and column, block
 * boundaries (every small block size, and the 1 MiB default), buffer growth, read errors,
 * allocation failures, and comment lines before the header row. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "avow/csv.h"
#include "avow/util.h"

/* ---- helpers ---- */

/* A temporary file holding data, positioned at its start. */
static FILE *tmp_with(const char *data, size_t len)
{
    FILE *f = tmpfile();
    assert_non_null(f);
    if (len) assert_int_equal(fwrite(data, 1, len, f), len);
    assert_int_equal(fflush(f), 0);
    assert_int_equal(lseek(fileno(f), 0, SEEK_SET), 0);
    return f;
}

static void put_escaped(strbuf *b, const char *s, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        unsigned char c = (unsigned char)s[i];
        if (c == '\n') sb_puts(b, "\\n");
        else if (c == '\r') sb_puts(b, "\\r");
        else if (c == '\t') sb_puts(b, "\\t");
        else if (c == '|' || c == '\\') { sb_putc(b, '\\'); sb_putc(b, (char)c); }
        else if (c < 0x20 || c >= 0x7f) sb_printf(b, "\\x%02x", c);
        else sb_putc(b, (char)c);
    }
}

static void put_record(strbuf *b, const csv_record *rec)
{
    sb_printf(b, "%llu%s:", (unsigned long long)rec->line, rec->blank ? "B" : "");
    for (size_t i = 0; i < rec->nfields; i++) {
        if (i) sb_putc(b, '|');
        if (rec->fields[i].quoted) sb_putc(b, '"');
        put_escaped(b, rec->fields[i].ptr, rec->fields[i].len);
    }
    sb_putc(b, '\n');
}

static void put_error(strbuf *b, const csv_reader *r)
{
    const csv_error_info *e = csv_error(r);
    sb_printf(b, "ERR %d %llu:%zu %s\n", e->status, (unsigned long long)e->line, e->col, e->msg);
}

/* Everything the reader returns for data, one line per record ("LINE[B]:f1|"f2..." with
 * a leading quote for quoted fields), then "EOF" or the error. Caller frees. */
static char *dump_reader(csv_reader *r)
{
    strbuf b = {0};
    csv_record rec;
    int rc = csv_read_header(r, &rec);
    if (rc != AVOW_OK) {
        put_error(&b, r);
    } else {
        put_record(&b, &rec);
        while ((rc = csv_next(r, &rec)) == 1) put_record(&b, &rec);
        if (rc == 0) {
            sb_puts(&b, "EOF\n");
        } else {
            assert_int_equal(-rc, csv_error(r)->status);
            put_error(&b, r);
            /* errors are sticky */
            assert_int_equal(csv_next(r, &rec), rc);
        }
    }
    assert_false(b.failed);
    return b.s;
}

static char *dump_n(const char *data, size_t len, char delim, size_t bufsize)
{
    FILE *f = tmp_with(data, len);
    csv_reader *r;
    assert_int_equal(csv_open_fd_bufsize(fileno(f), delim, bufsize, &r), AVOW_OK);
    char *s = dump_reader(r);
    csv_close(r);
    fclose(f);
    return s;
}

/* The dump at the default block size and at every block size from 3 (raised to 4) to 80
 * equals expected. */
static void expect_dump_n(const char *data, size_t len, char delim, const char *expected)
{
    for (size_t bs = 3; bs <= 81; bs++) {
        size_t bufsize = bs == 81 ? CSV_DEFAULT_BUFSIZE : bs;
        char *got = dump_n(data, len, delim, bufsize);
        int same = strcmp(got, expected) == 0;
        if (!same) print_error("block size %zu:\n--- got\n%s--- expected\n%s", bufsize, got, expected);
        free(got);
        if (!same) fail();
    }
}

static void expect_dump(const char *data, char delim, const char *expected)
{
    expect_dump_n(data, strlen(data), delim, expected);
}

/* ---- well-formed input ---- */

static void test_basic(void **state)
{
    (void)state;
    expect_dump("group,value\ng1,1.5\ng2,2.25\n", ',',
                "1:group|value\n2:g1|1.5\n3:g2|2.25\nEOF\n");
    /* header only */
    expect_dump("a,b\n", ',', "1:a|b\nEOF\n");
    expect_dump("a,b", ',', "1:a|b\nEOF\n");
    /* single column */
    expect_dump("x\n1\n2\n", ',', "1:x\n2:1\n3:2\nEOF\n");
    /* empty fields */
    expect_dump("a,b,c\n,,\n1,,3\n,2,\n", ',',
                "1:a|b|c\n2:||\n3:1||3\n4:|2|\nEOF\n");
}

static void test_line_endings(void **state)
{
    (void)state;
    const char *expected = "1:a|b\n2:1|2\n3:3|4\nEOF\n";
    expect_dump("a,b\r\n1,2\r\n3,4\r\n", ',', expected);      /* CRLF */
    expect_dump("a,b\n1,2\n3,4", ',', expected);              /* no final newline */
    expect_dump("a,b\r\n1,2\r\n3,4", ',', expected);
    expect_dump("a,b\r1,2\r3,4\r", ',', expected);            /* lone CR */
    expect_dump("a,b\n1,2\r\n3,4\r", ',', expected);          /* mixed */
    /* a quoted last field without newline */
    expect_dump("a,b\n1,\"2\"", ',', "1:a|b\n2:1|\"2\nEOF\n");
}

static void test_bom(void **state)
{
    (void)state;
    expect_dump("\xEF\xBB\xBF" "a,b\n1,2\n", ',', "1:a|b\n2:1|2\nEOF\n");
    expect_dump("\xEF\xBB\xBF" "\"a\",b\n", ',', "1:\"a|b\nEOF\n");
    /* only at the very start: elsewhere it is data */
    expect_dump("a\n\xEF\xBB\xBF" "x\n", ',', "1:a\n2:\\xef\\xbb\\xbfx\nEOF\n");
    /* a partial mark is data (and here invalid UTF-8 in the header) */
    expect_dump("\xEF\xBB" "a\n", ',', "ERR 5 1:1 header name is not valid UTF-8\n");
}

static void test_delimiters(void **state)
{
    (void)state;
    /* TSV: commas and quotes-in-quotes are data; spaces are still trimmed */
    expect_dump("name\tvalue\n a,b \t 1.5 \n\"x\ty\"\t2\n", '\t',
                "1:name|value\n2:a,b|1.5\n3:\"x\\ty|2\nEOF\n");
    expect_dump("a;b\n1,5;2,5\n", ';', "1:a|b\n2:1,5|2,5\nEOF\n");
    expect_dump("a|b\n1|2\n", '|', "1:a|b\n2:1|2\nEOF\n");
    /* a space delimiter: nothing is trimmed */
    expect_dump("a b\n1  2\n", ' ', "1:a|b\n2:1||2\nEOF\n");
    /* invalid delimiters */
    csv_reader *r = (csv_reader *)&r;
    assert_int_equal(csv_open_fd(0, '"', &r), AVOW_EDOM);
    assert_null(r);
    assert_int_equal(csv_open_fd(0, '\n', &r), AVOW_EDOM);
    assert_int_equal(csv_open_fd(0, '\r', &r), AVOW_EDOM);
    assert_int_equal(csv_open_fd(0, '\0', &r), AVOW_EDOM);
    assert_int_equal(csv_open_file(stdin, '"', &r), AVOW_EDOM);
}

static void test_quoted(void **state)
{
    (void)state;
    /* delimiter, doubled quotes, empty quoted field, spaces kept inside quotes */
    expect_dump("a,b,c\n\"x,y\",\"he said \"\"hi\"\"\",\"\"\n\" p \",\"\"\"\"\"\",q\n", ',',
                "1:a|b|c\n2:\"x,y|\"he said \"hi\"|\"\n3:\" p |\"\"\"|q\nEOF\n");
    /* newlines inside quotes: LF, CRLF and CR are kept; physical lines still counted */
    expect_dump("h1,h2\n\"one\ntwo\",x\n\"a\r\nb\",y\n\"c\rd\",z\nlast,1\n", ',',
                "1:h1|h2\n2:\"one\\ntwo|x\n4:\"a\\r\\nb|y\n6:\"c\\rd|z\n8:last|1\nEOF\n");
    /* a quoted header name, and quoted data */
    expect_dump("\"grp, name\",\"value\"\n\"1\",\"2.5\"\n", ',',
                "1:\"grp, name|\"value\n2:\"1|\"2.5\nEOF\n");
    /* spaces around a quoted field are allowed and dropped */
    expect_dump("a,b\n  \"x\"  , \"y\"\n", ',', "1:a|b\n2:\"x|\"y\nEOF\n");
    /* many doubled quotes in a row */
    expect_dump("a\n\"\"\"\"\"\"\"\"\"\"\n", ',', "1:a\n2:\"\"\"\"\"\nEOF\n");
}

static void test_trim_blank_ragged(void **state)
{
    (void)state;
    /* unquoted fields are trimmed of spaces (not tabs) */
    expect_dump("  a ,b  \n 1 ,  2\t \n", ',', "1:a|b\n2:1|2\\t\nEOF\n");
    /* blank lines are records of one empty unquoted field, flagged */
    expect_dump("a,b\n\n1,2\n   \n\r\n3,4\n\n", ',',
                "1:a|b\n2B:\n3:1|2\n4B:\n5B:\n6:3|4\n7B:\nEOF\n");
    /* an empty quoted field is not blank */
    expect_dump("a\n\"\"\n", ',', "1:a\n2:\"\nEOF\n");
    /* ragged rows: the count is reported, not judged */
    expect_dump("a,b,c\n1\n1,2\n1,2,3,4\n", ',', "1:a|b|c\n2:1\n3:1|2\n4:1|2|3|4\nEOF\n");
    /* invalid UTF-8 in data fields is passed through */
    expect_dump("a\n\xff\xfe\n", ',', "1:a\n2:\\xff\\xfe\nEOF\n");
    /* valid UTF-8 header names */
    expect_dump("gr\xc3\xb6\xc3\x9f" "e,\xc2\xb5,\xf0\x9f\x93\x8f\n1,2,3\n", ',',
                "1:gr\\xc3\\xb6\\xc3\\x9fe|\\xc2\\xb5|\\xf0\\x9f\\x93\\x8f\n2:1|2|3\nEOF\n");
}

/* ---- comment lines before the header ---- */

static void test_comments(void **state)
{
    (void)state;
    /* skipped before the header; line numbers count them */
    expect_dump("# avow run sheet, seed 1\na,b\n1,2\n", ',', "2:a|b\n3:1|2\nEOF\n");
    expect_dump("#\n#x\n##\na\n1\n", ',', "4:a\n5:1\nEOF\n");
    /* every line end: CRLF, lone CR, LF; and a CR at the end of a block */
    expect_dump("#x\r\n#y\r#z\na,b\r\n1,2", ',', "4:a|b\n5:1|2\nEOF\n");
    expect_dump("#x\r#y\ra\r1\r", ',', "3:a\n4:1\nEOF\n");
    /* quotes and delimiters inside a comment mean nothing */
    expect_dump("# \"unbalanced, \"\"quote\n# a,b,c\nx,y\n1,2\n", ',', "3:x|y\n4:1|2\nEOF\n");
    /* after a byte-order mark */
    expect_dump("\xEF\xBB\xBF# c\na\n1\n", ',', "2:a\n3:1\nEOF\n");
    /* longer than every small block (the buffer does not grow for it) */
    {
        strbuf b = {0};
        sb_putc(&b, '#');
        sb_pad(&b, 'c', 200);
        sb_puts(&b, "\r\na\n1\n");
        assert_false(b.failed);
        expect_dump(b.s, ',', "2:a\n3:1\nEOF\n");
        FILE *f = tmp_with(b.s, b.len);
        csv_reader *r;
        assert_int_equal(csv_open_fd_bufsize(fileno(f), ',', 8, &r), AVOW_OK);
        csv_set_max_record(r, 8);
        char *got = dump_reader(r);
        assert_string_equal(got, "2:a\n3:1\nEOF\n");
        assert_int_equal(csv_comment_lines(r), 1);
        free(got);
        csv_close(r);
        fclose(f);
        sb_free(&b);
    }
    /* only before the header: after it, '#' is data */
    expect_dump("a,b\n#1,2\n# x,y\n", ',', "1:a|b\n2:#1|2\n3:# x|y\nEOF\n");
    /* only at the start of a line: a space first makes it the header; a quoted name */
    expect_dump("  # x,b\n1,2\n", ',', "1:# x|b\n2:1|2\nEOF\n");
    expect_dump("\"#id\",b\n1,2\n", ',', "1:\"#id|b\n2:1|2\nEOF\n");
    /* a blank line ends the comments: it is then the (blank) header row */
    expect_dump("# c\n\na\n", ',', "ERR 5 2:1 the header row is blank\n");
    /* nothing but comments */
    expect_dump("# a\n# b\n", ',', "ERR 5 3:1 no header row after the comment lines\n");
    expect_dump("# a", ',', "ERR 5 2:1 no header row after the comment lines\n");
    /* a NUL byte in a comment is an error, at its line */
    expect_dump_n("# a\n# b\0\na\n", 11, ',', "ERR 5 2:1 NUL byte\n");
    /* later errors keep counting the comment lines */
    expect_dump("# c1\n# c2\na,b\n1,x\"y\n", ',', "3:a|b\nERR 5 4:2 quote inside an unquoted field\n");
    expect_dump("# c1\r\n# c2\r\nh\n\"x\ny\"\n\"z\n", ',',
                "3:h\n4:\"x\\ny\nERR 5 6:1 unterminated quoted field\n");
    /* other delimiters */
    expect_dump("# seed 7\ta\nx\ty\n1\t2\n", '\t', "2:x|y\n3:1|2\nEOF\n");
    /* the count */
    FILE *f = tmp_with("#1\n#2\n#3\na\n", 12);
    csv_reader *r;
    csv_record rec;
    assert_int_equal(csv_open_fd(fileno(f), ',', &r), AVOW_OK);
    assert_int_equal(csv_comment_lines(r), 0);
    assert_int_equal(csv_read_header(r, &rec), AVOW_OK);
    assert_int_equal(rec.line, 4);
    assert_int_equal(csv_comment_lines(r), 3);
    csv_close(r);
    fclose(f);
    /* the delimiter by file name */
    assert_int_equal(csv_delimiter_for_path("runs.tsv"), '\t');
    assert_int_equal(csv_delimiter_for_path("d/runs.tab"), '\t');
    assert_int_equal(csv_delimiter_for_path("runs.csv"), ',');
    assert_int_equal(csv_delimiter_for_path("tsv"), ',');
    assert_int_equal(csv_delimiter_for_path(""), ',');
}

/* ---- errors ---- */

static void test_errors(void **state)
{
    (void)state;
    expect_dump("a,b\n1,x\"y\n", ',', "1:a|b\nERR 5 2:2 quote inside an unquoted field\n");
    expect_dump("a,b\n1,2\n\"x\"y,2\n", ',',
                "1:a|b\n2:1|2\nERR 5 3:1 text after the closing quote\n");
    expect_dump("a,b\n\"x\" \"y\",2\n", ',', "1:a|b\nERR 5 2:1 text after the closing quote\n");
    /* unterminated: reported at the line where the field starts */
    expect_dump("a,b\n1,\"abc\n\ndef\n", ',', "1:a|b\nERR 5 2:2 unterminated quoted field\n");
    expect_dump("a,b\n1,\"", ',', "1:a|b\nERR 5 2:2 unterminated quoted field\n");
    /* line numbers after a multi-line quoted field */
    expect_dump("a\n\"x\ny\"\nb\"c\n", ',', "1:a\n2:\"x\\ny\nERR 5 4:1 quote inside an unquoted field\n");
    /* NUL bytes */
    expect_dump_n("a,b\n1,2\0\n", 9, ',', "1:a|b\nERR 5 2:2 NUL byte\n");
    expect_dump_n("a,b\n1,\"2\0\"\n", 11, ',', "1:a|b\nERR 5 2:2 NUL byte\n");
    expect_dump_n("a,b\n1,\"2\"\0\n", 11, ',', "1:a|b\nERR 5 2:2 NUL byte\n");
    expect_dump_n("a\0,b\n", 5, ',', "ERR 5 1:1 NUL byte\n");
    /* header problems */
    expect_dump("a,\xff\n1,2\n", ',', "ERR 5 1:2 header name is not valid UTF-8\n");
    expect_dump("a,b,\xc0\x80\n", ',', "ERR 5 1:3 header name is not valid UTF-8\n");
    expect_dump("\xed\xa0\x80\n", ',', "ERR 5 1:1 header name is not valid UTF-8\n");
    expect_dump("ok,\"bad\xe2\x82\"\n", ',', "ERR 5 1:2 header name is not valid UTF-8\n");
    expect_dump("", ',', "ERR 5 1:1 empty input: a header row is required\n");
    expect_dump("\xEF\xBB\xBF", ',', "ERR 5 1:1 empty input: a header row is required\n");
    expect_dump("\na,b\n", ',', "ERR 5 1:1 the header row is blank\n");
    expect_dump("  \r\n", ',', "ERR 5 1:1 the header row is blank\n");
}

static void test_usage_errors(void **state)
{
    (void)state;
    FILE *f = tmp_with("a\n1\n", 4);
    csv_reader *r;
    csv_record rec;
    assert_int_equal(csv_open_fd(fileno(f), ',', &r), AVOW_OK);
    assert_int_equal(csv_next(r, &rec), -AVOW_EDOM);
    assert_int_equal(csv_error(r)->status, AVOW_EDOM);
    assert_int_equal(csv_read_header(r, &rec), AVOW_OK);     /* not sticky */
    assert_int_equal(csv_read_header(r, &rec), AVOW_EDOM);
    assert_int_equal(csv_next(r, &rec), 1);
    assert_int_equal(rec.nfields, 1);
    assert_int_equal(csv_next(r, &rec), 0);
    assert_int_equal(csv_next(r, &rec), 0);
    csv_close(r);
    csv_close(NULL);
    fclose(f);
}

static void test_read_errors(void **state)
{
    (void)state;
    csv_reader *r;
    csv_record rec;
    /* a closed descriptor */
    assert_int_equal(csv_open_fd(-1, ',', &r), AVOW_OK);
    assert_int_equal(csv_read_header(r, &rec), AVOW_EIO);
    assert_int_equal(csv_error(r)->status, AVOW_EIO);
    assert_int_equal(csv_error(r)->sys_errno, EBADF);
    assert_int_equal(csv_next(r, &rec), -AVOW_EIO);
    csv_close(r);
    /* a directory */
    int fd = open(".", O_RDONLY);
    assert_true(fd >= 0);
    assert_int_equal(csv_open_fd(fd, ',', &r), AVOW_OK);
    assert_int_equal(csv_read_header(r, &rec), AVOW_EIO);
    assert_int_equal(csv_error(r)->sys_errno, EISDIR);
    csv_close(r);
    close(fd);
    /* a stdio stream on a directory */
    FILE *f = fopen(".", "r");
    assert_non_null(f);
    assert_int_equal(csv_open_file(f, ',', &r), AVOW_OK);
    assert_int_equal(csv_read_header(r, &rec), AVOW_EIO);
    assert_int_equal(csv_error(r)->sys_errno, EISDIR);
    csv_close(r);
    fclose(f);
}

/* ---- streams, blocks, growth ---- */

static void test_stdio_stream(void **state)
{
    (void)state;
    const char *data = "a,b\n\"1\n2\",3\n4,5";
    for (size_t bs = 4; bs < 20; bs++) {
        FILE *f = tmp_with(data, strlen(data));
        csv_reader *r;
        assert_int_equal(csv_open_file_bufsize(f, ',', bs, &r), AVOW_OK);
        char *got = dump_reader(r);
        assert_string_equal(got, "1:a|b\n2:\"1\\n2|3\n4:4|5\nEOF\n");
        free(got);
        csv_close(r);
        fclose(f);
    }
    FILE *f = tmp_with(data, strlen(data));
    csv_reader *r;
    assert_int_equal(csv_open_file(f, ',', &r), AVOW_OK);
    char *got = dump_reader(r);
    assert_string_equal(got, "1:a|b\n2:\"1\\n2|3\n4:4|5\nEOF\n");
    free(got);
    csv_close(r);
    fclose(f);
}

/* Records that cross the 1 MiB block boundary in every awkward way: inside an unquoted
 * field, inside a quoted field between doubled quotes, between CR and LF, right after a
 * delimiter. Every record before is a filler with two fields on its own line; the
 * records from the tail on are dumped. */
static void test_block_boundary_1mib(void **state)
{
    (void)state;
    const size_t B = CSV_DEFAULT_BUFSIZE;
    static const char *const tails[] = {
        "12345,67890\n",        /* unquoted field across the boundary */
        "\"ab\"\"cd\",1\r\n",   /* doubled quote across it */
        "x,y\r\n",              /* CR | LF */
        "p,\"q\"\n",            /* delimiter | quote */
    };
    static const char *const tail_dump[] = {"12345|67890", "\"ab\"cd|1", "x|y", "p|\"q"};
    for (size_t t = 0; t < sizeof tails / sizeof tails[0]; t++) {
        for (size_t cut = 1; cut < strlen(tails[t]); cut++) {
            /* filler rows so that the tail record starts `cut` bytes before B */
            strbuf b = {0};
            sb_puts(&b, "h1,h2\n");
            size_t rows = 0;
            while (b.len + 16 < B - cut) sb_printf(&b, "%09zu,1\n", rows++);
            size_t need = B - cut - b.len;     /* 5..16 bytes: one more row */
            sb_pad(&b, 'z', need - 2);
            sb_puts(&b, ",\n");
            rows++;
            assert_int_equal(b.len, B - cut);
            sb_puts(&b, tails[t]);
            sb_puts(&b, "last,row\n");
            assert_false(b.failed);

            FILE *f = tmp_with(b.s, b.len);
            csv_reader *r;
            csv_record rec;
            assert_int_equal(csv_open_fd(fileno(f), ',', &r), AVOW_OK);
            assert_int_equal(csv_read_header(r, &rec), AVOW_OK);
            for (size_t i = 0; i < rows; i++) {
                assert_int_equal(csv_next(r, &rec), 1);
                assert_int_equal(rec.line, i + 2);
                assert_int_equal(rec.nfields, 2);
                assert_int_equal(rec.fields[0].len, i + 1 < rows ? 9 : need - 2);
            }
            strbuf got = {0};
            int rc;
            while ((rc = csv_next(r, &rec)) == 1) put_record(&got, &rec);
            assert_int_equal(rc, 0);
            char expect[128];
            snprintf(expect, sizeof expect, "%zu:%s\n%zu:last|row\n", rows + 2, tail_dump[t],
                     rows + 3);
            assert_string_equal(got.s, expect);
            sb_free(&got);
            csv_close(r);
            fclose(f);
            sb_free(&b);
        }
    }
}

/* Records longer than the block: the buffer grows; beyond the limit, an error. */
static void test_long_records(void **state)
{
    (void)state;
    strbuf b = {0};
    sb_puts(&b, "h\n");
    sb_pad(&b, 'v', 5000);
    sb_puts(&b, "\n\"");
    sb_pad(&b, 'w', 3000);
    sb_puts(&b, "\"\nend\n");
    for (size_t bs = 4; bs <= 64; bs *= 2) {
        FILE *f = tmp_with(b.s, b.len);
        csv_reader *r;
        csv_record rec;
        assert_int_equal(csv_open_fd_bufsize(fileno(f), ',', bs, &r), AVOW_OK);
        assert_int_equal(csv_read_header(r, &rec), AVOW_OK);
        assert_int_equal(csv_next(r, &rec), 1);
        assert_int_equal(rec.fields[0].len, 5000);
        assert_int_equal(csv_next(r, &rec), 1);
        assert_int_equal(rec.fields[0].len, 3000);
        assert_int_equal(rec.line, 3);
        assert_int_equal(csv_next(r, &rec), 1);
        assert_int_equal(rec.fields[0].len, 3);
        assert_int_equal(csv_next(r, &rec), 0);
        csv_close(r);

        /* with a limit of 4096 bytes per record */
        assert_int_equal(lseek(fileno(f), 0, SEEK_SET), 0);
        assert_int_equal(csv_open_fd_bufsize(fileno(f), ',', bs, &r), AVOW_OK);
        csv_set_max_record(r, 4096);
        assert_int_equal(csv_read_header(r, &rec), AVOW_OK);
        assert_int_equal(csv_next(r, &rec), -AVOW_ESYNTAX);
        assert_int_equal(csv_error(r)->line, 2);
        assert_int_equal(csv_error(r)->col, 1);
        assert_string_equal(csv_error(r)->msg, "record too long (an unterminated quoted field?)");
        csv_close(r);
        fclose(f);
    }
    sb_free(&b);
}

/* Many fields: the field table grows. */
static void test_many_fields(void **state)
{
    (void)state;
    strbuf in = {0}, out = {0};
    for (int row = 0; row < 3; row++) {
        sb_printf(&out, "%d:", row + 1);
        for (int i = 0; i < 1000; i++) {
            if (i) { sb_putc(&in, ','); sb_putc(&out, '|'); }
            if (i % 7 == 3) {
                sb_printf(&in, "\"c%d\"", i);
                sb_printf(&out, "\"c%d", i);
            } else {
                sb_printf(&in, "c%d", i);
                sb_printf(&out, "c%d", i);
            }
        }
        sb_putc(&in, '\n');
        sb_putc(&out, '\n');
    }
    sb_puts(&out, "EOF\n");
    char *got = dump_n(in.s, in.len, ',', 64);
    assert_string_equal(got, out.s);
    free(got);
    sb_free(&in);
    sb_free(&out);
}

/* A larger file: line numbers and values survive thousands of block refills. */
static void test_many_rows(void **state)
{
    (void)state;
    strbuf b = {0};
    sb_puts(&b, "g,v\n");
    for (int i = 0; i < 20000; i++) {
        if (i % 97 == 0) sb_puts(&b, "\n");                       /* blank line */
        if (i % 13 == 0) sb_printf(&b, "\"g%d\",%d.5\r\n", i % 5, i);
        else sb_printf(&b, "g%d,%d.5\n", i % 5, i);
    }
    const size_t sizes[] = {7, 100, 4096, CSV_DEFAULT_BUFSIZE};
    for (size_t s = 0; s < sizeof sizes / sizeof sizes[0]; s++) {
        FILE *f = tmp_with(b.s, b.len);
        csv_reader *r;
        csv_record rec;
        assert_int_equal(csv_open_fd_bufsize(fileno(f), ',', sizes[s], &r), AVOW_OK);
        assert_int_equal(csv_read_header(r, &rec), AVOW_OK);
        uint64_t line = 2;
        for (int i = 0; i < 20000; i++) {
            if (i % 97 == 0) {
                assert_int_equal(csv_next(r, &rec), 1);
                assert_true(rec.blank);
                assert_int_equal(rec.line, line++);
            }
            assert_int_equal(csv_next(r, &rec), 1);
            assert_false(rec.blank);
            assert_int_equal(rec.line, line++);
            assert_int_equal(rec.nfields, 2);
            char want[32];
            int n = snprintf(want, sizeof want, "%d.5", i);
            assert_int_equal(rec.fields[1].len, (size_t)n);
            assert_memory_equal(rec.fields[1].ptr, want, (size_t)n);
            assert_int_equal(rec.fields[0].quoted, i % 13 == 0);
        }
        assert_int_equal(csv_next(r, &rec), 0);
        csv_close(r);
        fclose(f);
    }
    sb_free(&b);
}

/* ---- allocation failures ---- */

static void test_alloc_failures(void **state)
{
    (void)state;
    /* long records (buffer growth) and many fields (field table growth) */
    strbuf b = {0};
    sb_puts(&b, "a,b\n");
    for (int i = 0; i < 40; i++) sb_puts(&b, "x,");
    sb_puts(&b, "y\n");
    sb_pad(&b, 'q', 300);
    sb_puts(&b, "\n1,2\n");
    char *ref = dump_n(b.s, b.len, ',', 8);
    int saw_open_fail = 0, saw_read_fail = 0, saw_success = 0;
    for (long n = 0; n < 64; n++) {
        FILE *f = tmp_with(b.s, b.len);
        csv_reader *r = NULL;
        avow_mem_fail_after(n);
        int rc = csv_open_fd_bufsize(fileno(f), ',', 8, &r);
        if (rc != AVOW_OK) {
            avow_mem_fail_after(-1);
            assert_int_equal(rc, AVOW_ENOMEM);
            assert_null(r);
            saw_open_fail = 1;
            fclose(f);
            continue;
        }
        csv_record rec;
        rc = csv_read_header(r, &rec);
        int last = rc == AVOW_OK ? 1 : -rc;
        while (last == 1) last = csv_next(r, &rec);
        avow_mem_fail_after(-1);
        if (last == 0) {
            saw_success = 1;
            /* and then the output is the normal one */
            assert_int_equal(lseek(fileno(f), 0, SEEK_SET), 0);
            csv_close(r);
            assert_int_equal(csv_open_fd_bufsize(fileno(f), ',', 8, &r), AVOW_OK);
            char *got = dump_reader(r);
            assert_string_equal(got, ref);
            free(got);
        } else {
            assert_int_equal(last, -AVOW_ENOMEM);
            assert_int_equal(csv_error(r)->status, AVOW_ENOMEM);
            saw_read_fail = 1;
        }
        csv_close(r);
        fclose(f);
    }
    assert_true(saw_open_fail && saw_read_fail && saw_success);
    free(ref);
    sb_free(&b);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_basic),
        cmocka_unit_test(test_line_endings),
        cmocka_unit_test(test_bom),
        cmocka_unit_test(test_delimiters),
        cmocka_unit_test(test_quoted),
        cmocka_unit_test(test_trim_blank_ragged),
        cmocka_unit_test(test_comments),
        cmocka_unit_test(test_errors),
        cmocka_unit_test(test_usage_errors),
        cmocka_unit_test(test_read_errors),
        cmocka_unit_test(test_stdio_stream),
        cmocka_unit_test(test_block_boundary_1mib),
        cmocka_unit_test(test_long_records),
        cmocka_unit_test(test_many_fields),
        cmocka_unit_test(test_many_rows),
        cmocka_unit_test(test_alloc_failures),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
