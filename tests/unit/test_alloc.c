/* Allocation failure: make the Nth allocation fail, for every N, while checking,
 * rendering and formatting a complete study, and through a whole `avow run` (the
 * library call the command makes: load, check, read the data, analyse, render, write
 * the report atomically) of the main example and of a two-factor example. Each run
 * must end cleanly, never crash: either an out-of-memory error (exit status 1, "out of
 * memory" in the messages, no report and no file written) or, once N is beyond the
 * last allocation, success with exactly the report of an unhindered run. Leaks are
 * caught by the sanitizer build (make sanitize runs this under LeakSanitizer). Only
 * allocations through avow_malloc are made to fail: GMP and GSL allocate on their own
 * (GMP aborts when memory runs out; see DEVELOPERS.md). */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "avow/plan.h"
#include "avow/run.h"
#include "avow/render.h"
#include "avow/syntax.h"

static const char study[] =
    "# comment\nstudy \"t\"\nresponse y \"label\" unit \"g\"\n"
    "factor f \"what\" { a at 1 \"x\"  b at 2 code \"B\"  c at 4  d }\n"
    "data \"d.csv\" { f from \"F\" missing \"\" \"NA\" }\n"
    "adjust scheffe\n"
    "contrast lin = trend(f, 1)  # trailing\n"
    "contrast m = mean(a, b) - d > 0 \"desc\"\n"
    "contrast bad = a - qq\n"
    "explore pairs explore versus d explore contrast z = a - c\n"
    "plan { replicates 3 sigma 1 detect 2 power 0.8 seed 1 }\n";

/* One complete pass; returns 1 when every stage succeeded. */
static int one_pass(void)
{
    avow_ctx ctx;
    if (ctx_init(&ctx, "t.avow", study, strlen(study)) != AVOW_OK) { ctx_free(&ctx); return 0; }
    ast_study st;
    avow_plan plan;
    int ok = parse_study(&ctx, &st) == 0;
    if (ok) check_study(&ctx, &st, &plan);
    strbuf a = {0}, b = {0}, c = {0}, d = {0};
    if (ok && !ctx.oom) {
        render_plan_text(&ctx, &plan, &a);
        render_plan_json(&ctx, &plan, 1, &b);
        fmt_study(&ctx, &st, &c);
        diag_render(&ctx, &d);
    }
    int good = ok && !ctx.oom && !a.failed && !b.failed && !c.failed && !d.failed;
    sb_free(&a); sb_free(&b); sb_free(&c); sb_free(&d);
    ctx_free(&ctx);
    return good;
}

static void test_every_allocation_fails_cleanly(void **state)
{
    (void)state;
    long n;
    int succeeded = 0;
    for (n = 0; n < 100000; n++) {
        avow_mem_fail_after(n);
        if (one_pass()) { succeeded = 1; break; }
    }
    avow_mem_fail_after(-1);
    assert_true(succeeded);
    assert_true(n > 10);   /* the pass allocates: the hook was exercised */
    print_message("allocation points exercised: %ld\n", n);
}

/* The bytes of a file (NULL when it cannot be read). */
static char *slurp(const char *path, size_t *len)
{
    char *buf;
    avow_mem_fail_after(-1);
    if (avow_read_file(path, &buf, len, (size_t)1 << 30) != AVOW_OK) return NULL;
    return buf;
}

/* One `avow run STUDY [--format json|html --plots DIR] -o OUT` through the library
 * (format 0 text, 1 JSON, 2 HTML with the SVG pictures drawn), with allocation n
 * failing (n < 0: none). Returns 1 when it succeeded, 0 when it ended in a clean
 * out-of-memory error; fails the test on anything else. want: the report of an
 * unhindered run, or NULL while it is being made. */
static int run_once(const char *path, int format, const char *out, long n, const char *want,
                    size_t want_len, char **got, size_t *got_len)
{
    avow_run_opts o = {.study_path = path, .json = format == 1, .html = format == 2, .pictures = format == 2};
    avow_run_result r;
    avow_mem_fail_after(n);
    int rc = avow_run(&o, &r);
    int wrc = rc == 0 ? avow_write_atomic(out, r.report.s ? r.report.s : "", r.report.len) : -1;
    long made = avow_mem_count();
    avow_mem_fail_after(-1);
    int ok;
    if (rc == 0 && wrc == AVOW_OK) {
        /* success: the report written is the unhindered run's, byte for byte */
        size_t len;
        char *file = slurp(out, &len);
        assert_non_null(file);
        if (want && (len != want_len || memcmp(file, want, len) != 0))
            fail_msg("%s: allocation %ld failed, the run succeeded, and its report differs "
                     "from the unhindered run's", path, n);
        if (got) { *got = file; *got_len = len; } else avow_free(file);
        assert_true(n < 0 || n >= made);   /* nothing failed that the run ignored */
        if (o.pictures) {
            /* every picture is drawn or says why not */
            for (int pic = 0; pic < AVOW_PIC_COUNT; pic++)
                assert_true((r.pictures[pic].len > 0) != (r.picture_missing[pic] != NULL));
            assert_true(r.pictures[AVOW_PIC_MEANS].len > 0);
        }
        ok = 1;
    } else if (rc == 0) {
        /* the run succeeded; writing the report ran out of memory and wrote nothing */
        assert_int_equal(wrc, AVOW_ENOMEM);
        assert_int_equal(access(out, F_OK), -1);
        ok = 0;
    } else {
        if (rc != AVOW_EXIT_STUDY || !r.oom)
            fail_msg("%s: allocation %ld failed and the run ended with status %d (oom %d): %s", path,
                     n, rc, r.oom, r.messages.failed ? "(messages lost)" : r.messages.s ? r.messages.s : "");
        assert_true(r.messages.failed || strstr(r.messages.s, "out of memory") != NULL);
        assert_int_equal(r.report.len, 0);
        assert_true(n >= 0);
        ok = 0;
    }
    avow_run_free(&r);
    return ok;
}

/* Sweep n over every allocation of a whole run of path. */
static const char *const format_name[] = {"text", "json", "html and pictures"};

static void sweep_run(const char *path, int format)
{
    char dir[] = "/tmp/avow-alloc-XXXXXX";
    assert_non_null(mkdtemp(dir));
    char out[64];
    snprintf(out, sizeof out, "%s/report", dir);
    char *want;
    size_t want_len;
    assert_int_equal(run_once(path, format, out, -1, NULL, 0, &want, &want_len), 1);
    assert_true(want_len > 1000);
    assert_int_equal(unlink(out), 0);
    long n;
    for (n = 0; n < 1000000; n++) {
        if (run_once(path, format, out, n, want, want_len, NULL, NULL)) break;
        /* nothing is left behind: no report, no temporary file */
        assert_int_equal(rmdir(dir), 0);
        assert_non_null(mkdtemp(strcpy(dir, "/tmp/avow-alloc-XXXXXX")));
        snprintf(out, sizeof out, "%s/report", dir);
    }
    assert_true(n > 100);   /* the run allocates: the hook was exercised */
    print_message("%s (%s): %ld allocation points, each failing cleanly\n", path, format_name[format], n);
    unlink(out);
    assert_int_equal(rmdir(dir), 0);
    avow_free(want);
}

static void test_run_cure_text(void **state) { (void)state; sweep_run("examples/cure/cure.avow", 0); }
static void test_run_cure_json(void **state) { (void)state; sweep_run("examples/cure/cure.avow", 1); }
static void test_run_coating_text(void **state) { (void)state; sweep_run("examples/coating/coating.avow", 0); }
static void test_run_coating_json(void **state) { (void)state; sweep_run("examples/coating/coating.avow", 1); }
static void test_run_cure_html(void **state) { (void)state; sweep_run("examples/cure/cure.avow", 2); }

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_every_allocation_fails_cleanly),
        cmocka_unit_test(test_run_cure_text),
        cmocka_unit_test(test_run_cure_json),
        cmocka_unit_test(test_run_coating_text),
        cmocka_unit_test(test_run_coating_json),
        cmocka_unit_test(test_run_cure_html),
    };
    return cmocka_run_group_tests_name("allocation failure", tests, NULL, NULL);
}
