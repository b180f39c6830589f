/* test_pictures.c: the pieces behind the pictures: axes in steps of 1, 2 or 5 times a
 * power of ten, tick labels, wrapping, HTML escaping; and the renderers of the report
 * (text, HTML) and of every SVG picture on a complete study under allocation failure
 * (each allocation failing alone, and each with every later one): each run either says
 * it failed or gives exactly the bytes of a run without failures, never a silently
 * changed output. Leaks are caught by the sanitizer build. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "avow/evaluate.h"
#include "avow/plan.h"
#include "avow/render.h"
#include "avow/svg.h"
#include "avow/syntax.h"
#include "doc.h"
#include "plot.h"

/* The step of an axis must be 1, 2 or 5 times a power of ten, and its ticks cover
 * [lo, hi] with about `target` steps. */
static void axis_ok(double lo, double hi, int target)
{
    plot_axis a;
    assert_true(plot_axis_make(&a, lo, hi, target));
    assert_true(a.mant == 1 || a.mant == 2 || a.mant == 5);
    assert_true(a.lo <= lo && a.hi >= hi);
    double step = plot_tick(&a, 1) - plot_tick(&a, 0);
    /* (the difference of two ticks far from zero carries their rounding) */
    assert_true(fabs(step - a.mant * pow(10, a.expo)) <= 4e-16 * fabs(plot_tick(&a, 1)) + 1e-15 * step);
    /* No more than one step of slack at either end, and not too many ticks. */
    assert_true(lo - a.lo < step * (1 + 1e-9) && a.hi - hi < step * (1 + 1e-9));
    assert_true(a.nticks >= 2 && a.nticks <= (size_t)(2.5 * target) + 2);
    assert_true(plot_tick(&a, a.nticks - 1) == a.hi);
}

static void test_axes(void **state)
{
    (void)state;
    axis_ok(17.82, 23.575, 6);
    axis_ok(-3.74, 7.76, 7);
    axis_ok(0.001, 0.0093, 5);
    axis_ok(-1e6, 3e6, 6);
    axis_ok(1000000000000.3, 1000000000000.5, 6);
    axis_ok(-0.2, 0.2, 6);

    plot_axis a;
    char buf[64];
    assert_true(plot_axis_make(&a, 17.82, 23.575, 6));
    assert_int_equal(a.mant, 1);
    assert_int_equal(a.expo, 0);
    assert_true(a.lo == 17 && a.hi == 24 && a.nticks == 8);
    plot_tick_label(&a, 0, buf, sizeof buf);
    assert_string_equal(buf, "17");

    assert_true(plot_axis_make(&a, -0.25, 0.35, 6));     /* step 0.1: ticks -0.3 .. 0.4 */
    assert_int_equal(a.mant, 1);
    assert_int_equal(a.expo, -1);
    assert_int_equal(a.decimals, 1);
    for (size_t i = 0; i < a.nticks; i++) {
        plot_tick_label(&a, i, buf, sizeof buf);
        assert_true(strcmp(buf, "-0.0") != 0 && strcmp(buf, "-0") != 0);
        if (fabs(plot_tick(&a, i)) < 1e-12) assert_string_equal(buf, "0.0");
    }
    plot_tick_label(&a, 0, buf, sizeof buf);
    assert_string_equal(buf, "-0.3");

    /* One value: widened around it. Nothing finite: no axis. */
    assert_true(plot_axis_make(&a, 5, 5, 6));
    assert_true(a.lo < 5 && a.hi > 5);
    assert_true(plot_axis_make(&a, 0, 0, 6));
    assert_true(a.lo < 0 && a.hi > 0);
    assert_false(plot_axis_make(&a, NAN, 1, 6));
    assert_false(plot_axis_make(&a, 0, INFINITY, 6));
    /* Far from zero relative to the spread: plain ends. */
    assert_true(plot_axis_make(&a, 1e20, 1e20 + 1e6, 6));
    assert_true(a.nticks >= 2 && a.lo <= 1e20 && a.hi >= 1e20 + 1e6);
}

static void test_wrap_and_escape(void **state)
{
    (void)state;
    strbuf b = {0};
    plot_wrap(&b, "one two three four five six", 3, 14);
    assert_string_equal(b.s, "   one two\n   three four\n   five six\n");
    sb_free(&b);
    plot_wrap(&b, "averyveryverylongword x", 2, 8);    /* a long word stands alone */
    assert_string_equal(b.s, "  averyveryverylongword\n  x\n");
    sb_free(&b);
    const char in[] = "a<b & \"c\" >\x01\xff\xc3\xa9";
    html_escape(&b, in, sizeof in - 1);
    assert_string_equal(b.s, "a&lt;b &amp; &quot;c&quot; &gt;\xEF\xBF\xBD\xEF\xBF\xBD\xc3\xa9");
    sb_free(&b);
}

/* The cure example, analysed with the residuals kept. */
typedef struct run {
    avow_ctx ctx;
    ast_study st;
    avow_plan plan;
    avow_data data;
    avow_results res;
} run;

static void analyse(run *r, const char *path)
{
    memset(r, 0, sizeof *r);
    assert_int_equal(ctx_load(&r->ctx, path), AVOW_OK);
    r->plan.path = path;
    assert_int_equal(parse_study(&r->ctx, &r->st), 0);
    assert_int_equal(check_study(&r->ctx, &r->st, &r->plan), 0);
    r->data.keep = 1;
    r->data.residuals = 1;
    assert_int_equal(eval_data_init(&r->data, &r->plan), AVOW_OK);
    strbuf errs = {0};
    char *dp = malloc(strlen(path) + 64);
    assert_non_null(dp);
    strcpy(dp, path);
    strcpy(strrchr(dp, '/') + 1, r->plan.data_path);
    r->res.data_path = r->res.data_shown = "data.csv";
    assert_int_equal(eval_read(&r->plan, dp, dp, &r->data, &r->res, &errs, NULL), 0);
    assert_int_equal(eval_analyse(&r->plan, &r->data, &r->res, &errs), AVOW_OK);
    free(dp);
    sb_free(&errs);
    assert_int_equal(r->res.checks.nresiduals, r->res.n);
    assert_true(r->res.ref_cells.ok);
}

static void finish_run(run *r)
{
    eval_results_free(&r->res);
    eval_data_free(&r->data);
    ctx_free(&r->ctx);
}

/* Render what `which` names: 0 text, 1 HTML, 2.. the SVG pictures. */
static void render(const run *r, int which, strbuf *out)
{
    if (which == 0) render_report_text(&r->ctx, &r->plan, &r->res, out);
    else if (which == 1) render_report_html(&r->ctx, &r->plan, &r->res, out);
    else render_svg(&r->plan, &r->res, (avow_picture)(which - 2), 1, out);
}

static void test_renderers_under_allocation_failure(void **state)
{
    (void)state;
    static const char *const studies[] = {"examples/cure/cure.avow", "examples/coating/coating.avow",
                                          "examples/seedlots/seedlots.avow"};
    for (size_t s = 0; s < sizeof studies / sizeof *studies; s++) {
        run r;
        analyse(&r, studies[s]);
        for (int which = 0; which < 2 + AVOW_PIC_COUNT; which++) {
            strbuf want = {0};
            render(&r, which, &want);
            assert_false(want.failed);
            assert_true(want.len > 1000);
            /* Allocation n alone fails, then allocation n and every later one. */
            for (int mode = 0; mode < 2; mode++) {
                long n, failed_runs = 0;
                for (n = 0; n < 1000000; n++) {
                    strbuf got = {0};
                    if (mode == 0) avow_mem_fail_only(n);
                    else avow_mem_fail_after(n);
                    render(&r, which, &got);
                    long used = avow_mem_count();
                    avow_mem_fail_after(-1);
                    if (!got.failed) {
                        /* No failure reported: the bytes must be the full output. */
                        if (got.len != want.len || memcmp(got.s, want.s, want.len) != 0)
                            print_message("%s, renderer %d: allocation %ld failed %s, and the output "
                                          "differs without saying so\n", studies[s], which, n,
                                          mode == 0 ? "alone" : "with every later one");
                        assert_int_equal(got.len, want.len);
                        assert_memory_equal(got.s, want.s, want.len);
                    } else {
                        failed_runs++;
                    }
                    sb_free(&got);
                    if (n >= used) break;   /* past the last allocation: nothing failed */
                }
                assert_true(failed_runs > 5);
            }
            sb_free(&want);
        }
        finish_run(&r);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_axes),
        cmocka_unit_test(test_wrap_and_escape),
        cmocka_unit_test(test_renderers_under_allocation_failure),
    };
    return cmocka_run_group_tests_name("pictures", tests, NULL, NULL);
}
