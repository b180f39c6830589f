/* Unit tests of the parser: the syntax tree of complete studies and syntax errors. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <string.h>

#include "avow/syntax.h"

static int parse_text(avow_ctx *ctx, ast_study *st, const char *src)
{
    assert_int_equal(ctx_init(ctx, "t.avow", src, strlen(src)), AVOW_OK);
    return parse_study(ctx, st);
}

static const char full[] =
    "study \"T\"\n"
    "response strength \"lap shear\" unit \"MPa\"\n"
    "factor cure \"schedule\" {\n"
    "  room \"24 h\"\n"
    "  \"60 C\" at 60 \"2 h\"\n"
    "  cold at -5.5 code \"C-5\"\n"
    "  uv code \"UV-F\" \"flash\"\n"
    "}\n"
    "data \"d.csv\" { cure from \"s\" missing \"\" \"NA\" sha256 \"ab\" delimiter \";\" }\n"
    "alpha 0.01 adjust sidak orthogonal\n"
    "contrast heat = mean(\"60 C\", cold) - room \"desc\"\n"
    "contrast up = cure.uv - room > 0\n"
    "contrast dn = 2*room - (uv + cold)/1 < 0\n"
    "explore pairs explore versus room explore contrast z = trend(cure, 1)\n"
    "plan { replicates room 3, \"60 C\" 4, cold 2, uv 2 sigma 1.5 detect 2 power 0.8 seed 7 }\n";

static void test_full_tree(void **state)
{
    (void)state;
    avow_ctx ctx;
    ast_study st;
    assert_int_equal(parse_text(&ctx, &st, full), 0);
    assert_int_equal(ctx.nerrors, 0);
    ast_stmt_kind want[] = {ST_STUDY, ST_RESPONSE, ST_FACTOR, ST_DATA, ST_ALPHA, ST_ADJUST, ST_ORTHOGONAL,
                            ST_CONTRAST, ST_CONTRAST, ST_CONTRAST, ST_EXPLORE_PAIRS, ST_EXPLORE_VERSUS,
                            ST_EXPLORE_CONTRAST, ST_PLAN};
    size_t n = 0;
    const ast_stmt *s = st.stmts;
    for (; s; s = s->next, n++) {
        assert_true(n < sizeof want / sizeof want[0]);
        assert_int_equal(s->kind, want[n]);
    }
    assert_int_equal(n, sizeof want / sizeof want[0]);

    const ast_stmt *resp = st.stmts->next;
    assert_string_equal(resp->name.s, "strength");
    assert_string_equal(resp->str->s, "lap shear");
    assert_string_equal(resp->unit->s, "MPa");

    const ast_stmt *fac = resp->next;
    const ast_level *l = fac->levels;
    assert_string_equal(l->name.s, "room");
    assert_string_equal(l->desc->s, "24 h");
    assert_null(l->at.text);
    l = l->next;
    assert_string_equal(l->name.s, "60 C");
    assert_true(l->name.quoted);
    assert_memory_equal(l->at.text, "60", 2);
    assert_string_equal(l->desc->s, "2 h");
    l = l->next;
    assert_true(l->at.neg);
    assert_memory_equal(l->at.text, "5.5", 3);
    assert_string_equal(l->code->s, "C-5");
    assert_null(l->desc);
    l = l->next;
    assert_string_equal(l->code->s, "UV-F");
    assert_string_equal(l->desc->s, "flash");
    assert_null(l->next);

    const ast_stmt *data = fac->next;
    const ast_data_item *it = data->items;
    assert_int_equal(it->kind, DI_FROM);
    assert_int_equal(it->next->kind, DI_MISSING);
    assert_string_equal(it->next->strs->next->s, "NA");
    assert_int_equal(it->next->next->kind, DI_SHA256);
    assert_int_equal(it->next->next->next->kind, DI_DELIMITER);

    const ast_stmt *heat = data->next->next->next->next;
    assert_string_equal(heat->name.s, "heat");
    assert_int_equal(heat->expr->kind, EX_SUB);
    assert_int_equal(heat->expr->lhs->kind, EX_CALL);
    assert_string_equal(heat->expr->lhs->fn.s, "mean");
    assert_string_equal(heat->desc->s, "desc");
    assert_int_equal(heat->side, SIDE_TWO);
    const ast_stmt *up = heat->next;
    assert_int_equal(up->side, SIDE_GREATER);
    assert_string_equal(up->expr->lhs->factor.s, "cure");
    assert_string_equal(up->expr->lhs->level.s, "uv");
    const ast_stmt *dn = up->next;
    assert_int_equal(dn->side, SIDE_LESS);
    /* 2*room - (uv + cold)/1 : SUB(MUL(2, room), DIV(ADD(uv, cold), 1)) */
    assert_int_equal(dn->expr->kind, EX_SUB);
    assert_int_equal(dn->expr->lhs->kind, EX_MUL);
    assert_int_equal(dn->expr->rhs->kind, EX_DIV);
    assert_int_equal(dn->expr->rhs->lhs->kind, EX_ADD);
    assert_true(dn->expr->rhs->lhs->parens);

    const ast_stmt *plan = dn->next->next->next->next;
    const ast_plan_item *pi = plan->plan;
    assert_int_equal(pi->kind, PI_REPLICATES_EACH);
    assert_string_equal(pi->reps->next->level.s, "60 C");
    assert_int_equal(pi->next->kind, PI_SIGMA);
    assert_int_equal(pi->next->next->next->next->kind, PI_SEED);
    ctx_free(&ctx);
}

static void test_precedence(void **state)
{
    (void)state;
    avow_ctx ctx;
    ast_study st;
    /* -a*2 + b/4 - c  ==  SUB(ADD(MUL(NEG a, 2), DIV(b, 4)), c) */
    assert_int_equal(parse_text(&ctx, &st, "contrast x = -a*2 + b/4 - c"), 0);
    const ast_expr *e = st.stmts->expr;
    assert_int_equal(e->kind, EX_SUB);
    assert_int_equal(e->lhs->kind, EX_ADD);
    assert_int_equal(e->lhs->lhs->kind, EX_MUL);
    assert_int_equal(e->lhs->lhs->lhs->kind, EX_NEG);
    assert_int_equal(e->lhs->rhs->kind, EX_DIV);
    assert_int_equal(e->rhs->kind, EX_REF);
    ctx_free(&ctx);
}

static void expect_syntax(const char *src, unsigned line, unsigned col, const char *msg)
{
    avow_ctx ctx;
    ast_study st;
    assert_int_not_equal(parse_text(&ctx, &st, src), 0);
    assert_int_equal(ctx.nerrors, 1);
    unsigned l, c;
    ctx_line_col(&ctx, ctx.diags[0].span.start, &l, &c);
    assert_int_equal(l, line);
    assert_int_equal(c, col);
    if (strcmp(ctx.diags[0].msg, msg) != 0) fail_msg("got: %s\nwant: %s", ctx.diags[0].msg, msg);
    ctx_free(&ctx);
}

static void test_syntax_errors(void **state)
{
    (void)state;
    expect_syntax("factor f { a 5 }", 1, 14,
                  "expected a level name, '}' or ',' after `a`; found the number `5`");
    expect_syntax("contrast x a - b", 1, 12, "expected '=' after `x`; found the name `a`");
    expect_syntax("contrast x = a -", 1, 17, "expected an expression after `-`; found the end of the file");
    expect_syntax("study", 1, 6, "expected a string after `study`; found the end of the file");
    expect_syntax("alpha \"x\"", 1, 7, "expected a number or '-' after `alpha`; found the string \"x\"");
    expect_syntax("explore all", 1, 9, "expected `contrast`, `pairs` or `versus` after `explore`; found the name `all`");
    expect_syntax("plan { replicates }", 1, 19, "expected a level name, a number or '-' after `replicates`; found `}`");
    expect_syntax("response 5", 1, 10, "expected a name after `response`; found the number `5`");
    expect_syntax("contrast x = (a - b", 1, 20, "expected an operator or ')' after `b`; found the end of the file");
    expect_syntax("data \"d\" { x to \"c\" }", 1, 14, "expected `from` after `x`; found the name `to`");
}

static void test_empty_and_comments(void **state)
{
    (void)state;
    avow_ctx ctx;
    ast_study st;
    assert_int_equal(parse_text(&ctx, &st, "# only a comment\n\n"), 0);
    assert_null(st.stmts);
    assert_int_equal(ctx.ncomments, 1);
    ctx_free(&ctx);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_full_tree),
        cmocka_unit_test(test_precedence),
        cmocka_unit_test(test_syntax_errors),
        cmocka_unit_test(test_empty_and_comments),
    };
    return cmocka_run_group_tests_name("parser", tests, NULL, NULL);
}
