/* The data reader's progress callback (eval_read): called after the header row, while
 * the bytes read grow and once at the end, with the file's size as the total; the bytes
 * never go back and end at the size of the file; without a callback the reading is the
 * same. The reader itself prints nothing. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "avow/csv.h"
#include "avow/evaluate.h"
#include "avow/syntax.h"

static const char study[] =
    "study \"progress\"\nresponse y\nfactor g { a b }\n"
    "data \"d.csv\" {\n    g from \"g\"\n    y from \"y\"\n}\n";

typedef struct calls {
    size_t n;
    uint64_t done[4096];
    uint64_t total[4096];
} calls;

static void record(void *arg, uint64_t done, uint64_t total)
{
    calls *c = arg;
    if (c->n < sizeof c->done / sizeof c->done[0]) {
        c->done[c->n] = done;
        c->total[c->n] = total;
    }
    c->n++;
}

/* A data file of `rows` rows in a fresh temporary file; returns its size. */
static uint64_t write_data(char *path, size_t rows)
{
    int fd = mkstemp(path);
    assert_true(fd >= 0);
    FILE *f = fdopen(fd, "w");
    assert_non_null(f);
    fputs("g,y\n", f);
    for (size_t i = 0; i < rows; i++) fprintf(f, "%s,%zu.%zu\n", i % 2 ? "a" : "b", i % 89, i % 10);
    assert_int_equal(fclose(f), 0);
    FILE *r = fopen(path, "rb");
    assert_non_null(r);
    fseek(r, 0, SEEK_END);
    long size = ftell(r);
    fclose(r);
    return (uint64_t)size;
}

/* Read the file with the plan of `study`; returns the errors, fills rows and used. */
static size_t read_with(const char *path, const avow_progress *progress, uint64_t *rows, uint64_t *used)
{
    avow_ctx ctx;
    ast_study st;
    avow_plan plan;
    assert_int_equal(ctx_init(&ctx, "t.avow", study, strlen(study)), AVOW_OK);
    memset(&plan, 0, sizeof plan);
    assert_int_equal(parse_study(&ctx, &st), 0);
    assert_int_equal(check_study(&ctx, &st, &plan), 0);
    avow_data data;
    memset(&data, 0, sizeof data);
    assert_int_equal(eval_data_init(&data, &plan), AVOW_OK);
    avow_results res;
    memset(&res, 0, sizeof res);
    strbuf errs = {0};
    size_t nerr = eval_read(&plan, path, path, &data, &res, &errs, progress);
    *rows = res.rows;
    *used = res.used;
    sb_free(&errs);
    eval_data_free(&data);
    eval_results_free(&res);
    ctx_free(&ctx);
    return nerr;
}

static void test_progress_calls(void **state)
{
    (void)state;
    char path[] = "/tmp/avow-reader-XXXXXX";
    uint64_t size = write_data(path, 600000);     /* about 4.2 MB: several read blocks */
    assert_true(size > 3 * CSV_DEFAULT_BUFSIZE);
    calls *c = calloc(1, sizeof *c);
    assert_non_null(c);
    avow_progress p = {record, c};
    uint64_t rows, used, rows0, used0;
    assert_int_equal(read_with(path, &p, &rows, &used), 0);
    assert_int_equal(rows, 600000);
    assert_int_equal(used, 600000);
    assert_true(c->n >= 4 && c->n < sizeof c->done / sizeof c->done[0]);
    assert_true(c->done[0] > 0);                  /* after the header row: a block read */
    for (size_t i = 0; i < c->n; i++) {
        assert_int_equal(c->total[i], size);
        assert_true(c->done[i] <= size);
        if (i) assert_true(c->done[i] >= c->done[i - 1]);
    }
    assert_int_equal(c->done[c->n - 1], size);    /* the end of the pass */
    assert_true(c->done[c->n / 2] < size);        /* and calls on the way */

    /* No callback, or one without a function: the same reading. */
    assert_int_equal(read_with(path, NULL, &rows0, &used0), 0);
    assert_int_equal(rows0, rows);
    assert_int_equal(used0, used);
    avow_progress none = {NULL, c};
    size_t before = c->n;
    assert_int_equal(read_with(path, &none, &rows0, &used0), 0);
    assert_int_equal(c->n, before);
    assert_int_equal(rows0, rows);
    free(c);
    unlink(path);
}

/* A small file, read in one block and in fewer records than the reader counts between
 * two looks: one call after the header row and one at the end, both at the full size. */
static void test_progress_small_file(void **state)
{
    (void)state;
    char path[] = "/tmp/avow-reader-XXXXXX";
    uint64_t size = write_data(path, 1000);
    calls *c = calloc(1, sizeof *c);
    assert_non_null(c);
    avow_progress p = {record, c};
    uint64_t rows, used;
    assert_int_equal(read_with(path, &p, &rows, &used), 0);
    assert_int_equal(rows, 1000);
    assert_int_equal(c->n, 2);
    assert_int_equal(c->done[0], size);
    assert_int_equal(c->done[1], size);
    assert_int_equal(c->total[1], size);
    free(c);
    unlink(path);
}

static void test_bytes_read(void **state)
{
    (void)state;
    char path[] = "/tmp/avow-reader-XXXXXX";
    uint64_t size = write_data(path, 1000);
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    csv_reader *r;
    assert_int_equal(csv_open_file_bufsize(f, ',', 64, &r), AVOW_OK);
    assert_int_equal(csv_bytes_read(r), 0);
    csv_record rec;
    assert_int_equal(csv_read_header(r, &rec), AVOW_OK);
    uint64_t last = csv_bytes_read(r);
    assert_true(last >= 4 && last < size);
    int got;
    while ((got = csv_next(r, &rec)) == 1) {
        assert_true(csv_bytes_read(r) >= last);
        last = csv_bytes_read(r);
    }
    assert_int_equal(got, 0);
    assert_int_equal(csv_bytes_read(r), size);
    csv_close(r);
    fclose(f);
    unlink(path);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_progress_calls),
        cmocka_unit_test(test_progress_small_file),
        cmocka_unit_test(test_bytes_read),
    };
    return cmocka_run_group_tests_name("reader progress", tests, NULL, NULL);
}
