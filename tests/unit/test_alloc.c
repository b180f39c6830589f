/* Allocation failure: make the Nth allocation fail, for every N, while checking,
 * rendering and formatting a complete study. Each run must end cleanly (an error or
 * success), never crash; leaks are caught by the sanitizer build (make sanitize). */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <string.h>

#include "avow/plan.h"
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

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_every_allocation_fails_cleanly),
    };
    return cmocka_run_group_tests_name("allocation failure", tests, NULL, NULL);
}
