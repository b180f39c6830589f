/* Unit tests of the lexer: token types, spans, decoded strings, comments, errors. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <string.h>

#include "avow/syntax.h"
#include "parser.h"

/* Lex all of src; store types in out (max n); return count or -1 on error. */
static int lex_all(avow_ctx *ctx, const char *src, size_t len, int *types, avow_token *toks, int n)
{
    assert_int_equal(ctx_init(ctx, "t.avow", src, len), AVOW_OK);
    lex_state l;
    lex_init(&l, ctx);
    int k = 0;
    for (;;) {
        avow_token t;
        int r = lex_next(&l, &t);
        if (r < 0) return -1;
        if (r == 0) return k;
        if (k < n) { types[k] = t.type; if (toks) toks[k] = t; }
        k++;
    }
}

static void test_keywords_and_names(void **state)
{
    (void)state;
    avow_ctx ctx;
    int ty[16];
    const char *src = "study factor oven60 _x9 mean trend holm fdr";
    assert_int_equal(lex_all(&ctx, src, strlen(src), ty, NULL, 16), 8);
    int want[] = {TK_STUDY, TK_FACTOR, TK_IDENT, TK_IDENT, TK_MEAN, TK_TREND, TK_HOLM, TK_FDR};
    for (int i = 0; i < 8; i++) assert_int_equal(ty[i], want[i]);
    ctx_free(&ctx);
}

static void test_spans_and_numbers(void **state)
{
    (void)state;
    avow_ctx ctx;
    int ty[16];
    avow_token tk[16];
    const char *src = "alpha 0.05\n  x = 2*a - 1e-3 > 0";
    int n = lex_all(&ctx, src, strlen(src), ty, tk, 16);
    assert_int_equal(n, 11);
    assert_int_equal(ty[1], TK_NUMBER);
    assert_int_equal(tk[1].span.start, 6);
    assert_int_equal(tk[1].span.end, 10);
    assert_int_equal(tk[1].len, 4);
    assert_memory_equal(tk[1].text, "0.05", 4);
    unsigned line, col;
    ctx_line_col(&ctx, tk[2].span.start, &line, &col);
    assert_int_equal(line, 2);
    assert_int_equal(col, 3);
    assert_int_equal(ty[4], TK_NUMBER);
    assert_int_equal(ty[5], TK_STAR);
    assert_int_equal(ty[8], TK_NUMBER);
    assert_memory_equal(tk[8].text, "1e-3", 4);
    assert_int_equal(ty[9], TK_GT);
    ctx_free(&ctx);
}

static void test_strings_decoded(void **state)
{
    (void)state;
    avow_ctx ctx;
    int ty[4];
    avow_token tk[4];
    const char *src = "\"a \\\"q\\\" \\\\ \\n \\t \xc3\xa9\"";
    assert_int_equal(lex_all(&ctx, src, strlen(src), ty, tk, 4), 1);
    assert_int_equal(ty[0], TK_STRING);
    assert_string_equal(tk[0].text, "a \"q\" \\ \n \t \xc3\xa9");
    assert_int_equal(tk[0].span.start, 0);
    assert_int_equal(tk[0].span.end, strlen(src));
    ctx_free(&ctx);
}

static void test_comments_recorded(void **state)
{
    (void)state;
    avow_ctx ctx;
    int ty[4];
    const char *src = "# one\r\nstudy # two \"not a string\"\n#";
    assert_int_equal(lex_all(&ctx, src, strlen(src), ty, NULL, 4), 1);
    assert_int_equal(ctx.ncomments, 3);
    assert_int_equal(ctx.comments[0].span.start, 0);
    assert_int_equal(ctx.comments[0].span.end, 5);   /* CR excluded */
    assert_int_equal(ctx.comments[2].span.end - ctx.comments[2].span.start, 1);
    ctx_free(&ctx);
}

/* Each bad input gives exactly one error with the expected message prefix and column. */
static void expect_error(const char *src, size_t len, unsigned col, const char *msg)
{
    avow_ctx ctx;
    int ty[64];
    assert_int_equal(lex_all(&ctx, src, len, ty, NULL, 64), -1);
    assert_int_equal(ctx.nerrors, 1);
    unsigned line, c;
    ctx_line_col(&ctx, ctx.diags[0].span.start, &line, &c);
    assert_int_equal(c, col);
    assert_true(strncmp(ctx.diags[0].msg, msg, strlen(msg)) == 0);
    ctx_free(&ctx);
}

static void test_errors(void **state)
{
    (void)state;
    expect_error("study \"abc", 10, 7, "unterminated string");
    expect_error("study \"a\nb\"", 11, 7, "unterminated string");
    expect_error("a ; b", 5, 3, "unexpected character `;`");
    expect_error("a \x01", 3, 3, "unexpected control byte 0x01");
    expect_error("ab\0cd", 5, 3, "NUL byte");
    expect_error("\"\xc3\"", 3, 2, "invalid UTF-8 byte 0xC3");
    expect_error("\xed\xa0\x80", 3, 1, "invalid UTF-8 byte 0xED");   /* encoded surrogate */
    expect_error("\xc0\xaf", 2, 1, "invalid UTF-8 byte 0xC0");       /* overlong */
    expect_error("x = 2.", 6, 5, "malformed number");
    expect_error("x = 1e+", 7, 5, "malformed number");
    expect_error("x = 3abc", 8, 5, "malformed number");
    expect_error("x = .5", 6, 5, "a number needs a digit");
    expect_error("\"\\x\"", 4, 2, "unknown escape");
    expect_error("\"a\tb\"", 5, 3, "a tab inside a string");
    expect_error("# a\x0b b", 7, 4, "control byte 0x0B in a comment");
    expect_error("é", 2, 1, "unexpected character");
}

static void test_long_name(void **state)
{
    (void)state;
    char buf[300];
    memset(buf, 'x', sizeof buf);
    avow_ctx ctx;
    int ty[2];
    assert_int_equal(lex_all(&ctx, buf, 255, ty, NULL, 2), 1);
    ctx_free(&ctx);
    expect_error(buf, 256, 1, "a name of 256 bytes");
}

static void test_keyword_text(void **state)
{
    (void)state;
    assert_true(lex_is_keyword_text("power", 5));
    assert_true(lex_is_keyword_text("scheffe", 7));
    assert_false(lex_is_keyword_text("powe", 4));
    assert_false(lex_is_keyword_text("room", 4));
    assert_true(lex_is_keyword(TK_PLAN));
    assert_false(lex_is_keyword(TK_IDENT));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_keywords_and_names),
        cmocka_unit_test(test_spans_and_numbers),
        cmocka_unit_test(test_strings_decoded),
        cmocka_unit_test(test_comments_recorded),
        cmocka_unit_test(test_errors),
        cmocka_unit_test(test_long_name),
        cmocka_unit_test(test_keyword_text),
    };
    return cmocka_run_group_tests_name("lexer", tests, NULL, NULL);
}
