/* Unit tests of the checker: exact contrast reduction, trend contrasts through the
 * language, orthogonality with planned replicates, the family plan, error collection. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <string.h>

#include "avow/plan.h"
#include "avow/syntax.h"

typedef struct fixture {
    avow_ctx ctx;
    ast_study st;
    avow_plan plan;
    size_t errors;
} fixture;

static void run(fixture *f, const char *src)
{
    memset(f, 0, sizeof *f);
    assert_int_equal(ctx_init(&f->ctx, "t.avow", src, strlen(src)), AVOW_OK);
    assert_int_equal(parse_study(&f->ctx, &f->st), 0);
    f->errors = check_study(&f->ctx, &f->st, &f->plan);
}

static void done(fixture *f) { ctx_free(&f->ctx); }

static void assert_rat(avow_rat r, int64_t num, int64_t den)
{
    if (r.num != num || r.den != den)
        fail_msg("got %lld/%lld, want %lld/%lld", (long long)r.num, (long long)r.den,
                 (long long)num, (long long)den);
}

#define HEAD "study \"t\"\nresponse y\n"

static void test_reduction_exact(void **state)
{
    (void)state;
    fixture f;
    run(&f, HEAD "factor f { a b c d }\n"
            "contrast m = mean(a, b, c) - d\n"
            "contrast w = (2*a - b)/3 - 0.1*c + 0.1*d - a/3\n"
            "contrast q = -(-(a - b)) * 1e-3\n");
    assert_int_equal(f.errors, 0);
    assert_int_equal(f.plan.ncells, 4);
    const plan_contrast *m = &f.plan.contrasts[0];
    assert_true(m->valid);
    assert_rat(m->coef[0], 1, 3); assert_rat(m->coef[1], 1, 3);
    assert_rat(m->coef[2], 1, 3); assert_rat(m->coef[3], -1, 1);
    const plan_contrast *w = &f.plan.contrasts[1];
    /* a: 2/3 - 1/3 = 1/3; b: -1/3; c: -1/10; d: 1/10 */
    assert_rat(w->coef[0], 1, 3); assert_rat(w->coef[1], -1, 3);
    assert_rat(w->coef[2], -1, 10); assert_rat(w->coef[3], 1, 10);
    const plan_contrast *q = &f.plan.contrasts[2];
    assert_rat(q->coef[0], 1, 1000); assert_rat(q->coef[1], -1, 1000);
    assert_string_equal(m->expr, "mean(a, b, c) - d");
    done(&f);
}

/* Linear trend over at = 10, 20, 40 with equal replicates is proportional to
 * (-4, -1, 5): worked by hand, exact (mean 70/3; deviations -40/3, -10/3, 50/3). */
static void test_trend_through_language(void **state)
{
    (void)state;
    fixture f;
    run(&f, HEAD "factor dose { ctl  d10 at 10  d20 at 20  d40 at 40 }\n"
            "contrast lin = trend(dose, 1)\ncontrast quad = trend(dose, 2)\n");
    assert_int_equal(f.errors, 0);
    const avow_rat *c = f.plan.contrasts[0].coef;
    assert_rat(c[0], 0, 1);
    assert_rat(c[1], -4, 1); assert_rat(c[2], -1, 1); assert_rat(c[3], 5, 1);
    /* Linear and quadratic are orthogonal (equal replicates). */
    assert_rat(f.plan.ortho[0 * 2 + 1], 0, 1);
    done(&f);
}

/* With planned replicates n = (3, 2, 2, 3) at x = 1, 2, 4, 8 the weighted polynomials
 * give c = (-87, -38, 2, 123) and (298, -89, -388, 179): methods note section 9,
 * OP-uneq-n (exact rational arithmetic with Python fractions). */
static void test_trend_planned_replicates(void **state)
{
    (void)state;
    fixture f;
    run(&f, HEAD "factor x { x1 at 1  x2 at 2  x4 at 4  x8 at 8 }\n"
            "contrast lin = trend(x, 1)\ncontrast quad = trend(x, 2)\n"
            "plan { replicates x1 3, x2 2, x4 2, x8 3 }\n");
    assert_int_equal(f.errors, 0);
    const avow_rat *l = f.plan.contrasts[0].coef, *q = f.plan.contrasts[1].coef;
    assert_rat(l[0], -87, 1); assert_rat(l[1], -38, 1); assert_rat(l[2], 2, 1); assert_rat(l[3], 123, 1);
    assert_rat(q[0], 298, 1); assert_rat(q[1], -89, 1); assert_rat(q[2], -388, 1); assert_rat(q[3], 179, 1);
    assert_rat(f.plan.ortho[1], 0, 1);
    assert_int_equal(f.ctx.nwarnings, 0);
    done(&f);
}

static void test_orthogonality_uses_replicates(void **state)
{
    (void)state;
    fixture f;
    /* a - b and a + b - 2c: orthogonal with equal n; with n = (2, 1, 1) the product is
     * 1*1/2 + (-1)(1)/1 + 0 = -1/2. */
    run(&f, HEAD "factor f { a b c }\ncontrast x = a - b\ncontrast z = a + b - 2*c\n");
    assert_int_equal(f.errors, 0);
    assert_int_equal(f.ctx.nwarnings, 0);
    assert_rat(f.plan.ortho[1], 0, 1);
    assert_rat(f.plan.ortho[0], 2, 1);   /* x with itself: 1 + 1 */
    done(&f);
    run(&f, HEAD "factor f { a b c }\ncontrast x = a - b\ncontrast z = a + b - 2*c\n"
            "plan { replicates a 2, b 1, c 1 }\n");
    assert_int_equal(f.errors, 0);
    assert_int_equal(f.ctx.nwarnings, 1);
    assert_rat(f.plan.ortho[1], -1, 2);
    assert_non_null(strstr(f.ctx.diags[0].msg, "not orthogonal with the planned replicates (sum c*d/n = -1/2)"));
    done(&f);
    run(&f, HEAD "factor f { a b c }\northogonal\ncontrast x = a - b\ncontrast z = a + b - 2*c\n"
            "plan { replicates a 2, b 1, c 1 }\n");
    assert_int_equal(f.errors, 1);
    done(&f);
}

static void test_proportional(void **state)
{
    (void)state;
    fixture f;
    run(&f, HEAD "factor f { a b c }\ncontrast x = a - b\ncontrast z = (b - a)/7\n");
    assert_int_equal(f.errors, 0);
    assert_int_equal(f.ctx.nwarnings, 1);
    assert_non_null(strstr(f.ctx.diags[0].msg, "proportional"));
    done(&f);
}

static void test_family_levels(void **state)
{
    (void)state;
    fixture f;
    run(&f, HEAD "factor f { a b c d }\nadjust holm\nalpha 0.06\n"
            "contrast x = a - b\ncontrast z = c - d\ncontrast w = a + b - c - d\n");
    assert_int_equal(f.errors, 0);
    assert_int_equal(f.plan.family_m, 3);
    /* Holm: alpha/3, alpha/2, alpha (Holm 1979; common practice, no source needed). */
    assert_true(f.plan.family_levels[0] == 0.06 / 3);
    assert_true(f.plan.family_levels[1] == 0.06 / 2);
    assert_true(f.plan.family_levels[2] == 0.06);
    assert_rat(f.plan.alpha, 3, 50);
    done(&f);
    run(&f, HEAD "factor f { a b c d }\nadjust fdr\n"
            "contrast x = a - b\ncontrast z = c - d\n");
    assert_true(f.plan.family_levels[0] == 0.05 / 2);
    assert_true(f.plan.family_levels[1] == 0.05);
    done(&f);
}

static void test_all_errors_reported(void **state)
{
    (void)state;
    fixture f;
    run(&f, HEAD "factor f { a b c }\nalpha 0\n"
            "contrast x = a - q\ncontrast z = a + b\ncontrast x = a - b\n"
            "explore versus w\nplan { replicates 1 power 2 }\n");
    /* alpha, unknown q, sum 2, duplicate x, unknown w, no residual df, power */
    assert_int_equal(f.errors, 7);
    /* Sorted by position. */
    for (size_t i = 1; i < f.ctx.ndiags; i++)
        assert_true(f.ctx.diags[i - 1].span.start <= f.ctx.diags[i].span.start);
    done(&f);
}

static void test_defaults(void **state)
{
    (void)state;
    fixture f;
    run(&f, HEAD "factor f { a b }\n");
    assert_int_equal(f.errors, 0);
    assert_rat(f.plan.alpha, 1, 20);
    assert_int_equal(f.plan.adjust, ADJ_HOLM);
    assert_int_equal(f.plan.nmissing, 2);
    assert_string_equal(f.plan.missing[1], "NA");
    assert_string_equal(f.plan.columns[0], "f");
    assert_string_equal(f.plan.columns[1], "y");
    assert_false(f.plan.has_data);
    done(&f);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_reduction_exact),
        cmocka_unit_test(test_trend_through_language),
        cmocka_unit_test(test_trend_planned_replicates),
        cmocka_unit_test(test_orthogonality_uses_replicates),
        cmocka_unit_test(test_proportional),
        cmocka_unit_test(test_family_levels),
        cmocka_unit_test(test_all_errors_reported),
        cmocka_unit_test(test_defaults),
    };
    return cmocka_run_group_tests_name("checker", tests, NULL, NULL);
}
