/* test_sheet.c: the run sheet: the layout (every cell its planned replicates, within
 * every declared block, blocks in order), reproducibility, the seed given to mt19937,
 * the generator itself, the checks that refuse a plan, rendering (provenance line,
 * header, quoting, delimiters, the run column's name) and allocation failures. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_rng.h>

#include "avow/plan.h"
#include "avow/render.h"
#include "avow/sheet.h"
#include "avow/syntax.h"

typedef struct fixture {
    avow_ctx ctx;
    ast_study st;
    avow_plan plan;
} fixture;

/* Parse and check src, which must have no errors. */
static void load(fixture *f, const char *src)
{
    memset(f, 0, sizeof *f);
    assert_int_equal(ctx_init(&f->ctx, "t.avow", src, strlen(src)), AVOW_OK);
    assert_int_equal(parse_study(&f->ctx, &f->st), 0);
    assert_int_equal(check_study(&f->ctx, &f->st, &f->plan), 0);
}

static void done(fixture *f) { ctx_free(&f->ctx); }

#define HEAD "study \"t\"\nresponse y\n"

/* Two crossed factors (2 x 3 cells) in three declared blocks, 2 replicates. */
static const char blocked[] = HEAD
    "factor a { a1 a2 }\nfactor b { b1 b2 b3 }\nblock day { mon tue wed }\n"
    "plan { replicates 2 seed 77 }\n";

static void test_layout_blocked(void **state)
{
    (void)state;
    fixture f;
    load(&f, blocked);
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 1), 0);
    avow_sheet s;
    assert_int_equal(sheet_build(&f.plan, 77, &s), AVOW_OK);
    assert_int_equal(s.nruns, 36);
    assert_int_equal(s.nblocks, 3);
    assert_int_equal(s.per_block, 12);
    size_t count[3][6] = {{0}};
    for (size_t i = 0; i < s.nruns; i++) {
        assert_int_equal(s.runs[i].block, i / 12);      /* blocks whole, in declared order */
        assert_true(s.runs[i].cell < 6);
        count[s.runs[i].block][s.runs[i].cell]++;
    }
    for (size_t b = 0; b < 3; b++)
        for (size_t c = 0; c < 6; c++) assert_int_equal(count[b][c], 2);
    /* the order is not the planned one in every block (the planned order puts cell
     * c at positions 2c and 2c + 1) */
    for (size_t b = 0; b < 3; b++) {
        int moved = 0;
        for (size_t k = 0; k < 12; k++) moved |= s.runs[12 * b + k].cell != k / 2;
        assert_true(moved);
    }
    sheet_free(&s);
    assert_null(s.runs);
    sheet_free(&s);     /* an empty sheet is fine */
    done(&f);
}

static void test_layout_unequal(void **state)
{
    (void)state;
    fixture f;
    load(&f, HEAD "factor g { p q r }\nplan { replicates p 1, q 4, r 2 seed 3 }\n");
    avow_sheet s;
    assert_int_equal(sheet_build(&f.plan, 3, &s), AVOW_OK);
    assert_int_equal(s.nruns, 7);
    assert_int_equal(s.nblocks, 0);
    size_t count[3] = {0};
    for (size_t i = 0; i < s.nruns; i++) { assert_int_equal(s.runs[i].block, 0); count[s.runs[i].cell]++; }
    assert_int_equal(count[0], 1);
    assert_int_equal(count[1], 4);
    assert_int_equal(count[2], 2);
    sheet_free(&s);
    done(&f);
}

static void test_reproducible(void **state)
{
    (void)state;
    fixture f;
    load(&f, HEAD "factor g { a b c d e }\nplan { replicates 6 }\n");
    avow_sheet s1, s2, s3, s4;
    assert_int_equal(sheet_build(&f.plan, 20261201, &s1), AVOW_OK);
    assert_int_equal(sheet_build(&f.plan, 20261201, &s2), AVOW_OK);
    assert_int_equal(sheet_build(&f.plan, 20261202, &s3), AVOW_OK);
    /* the seed is reduced modulo 2^32: 2^32 + 20261201 is the same sheet */
    assert_int_equal(sheet_build(&f.plan, ((uint64_t)1 << 32) + 20261201, &s4), AVOW_OK);
    assert_memory_equal(s1.runs, s2.runs, s1.nruns * sizeof *s1.runs);
    assert_memory_equal(s1.runs, s4.runs, s1.nruns * sizeof *s1.runs);
    assert_memory_not_equal(s1.runs, s3.runs, s1.nruns * sizeof *s1.runs);
    assert_true(s4.seed == ((uint64_t)1 << 32) + 20261201);
    assert_int_equal(s4.gen_seed, 20261201);
    sheet_free(&s1); sheet_free(&s2); sheet_free(&s3); sheet_free(&s4);
    done(&f);
}

static void test_generator_seed(void **state)
{
    (void)state;
    assert_int_equal(sheet_generator_seed(1), 1);
    assert_int_equal(sheet_generator_seed(4471), 4471);
    assert_int_equal(sheet_generator_seed(0xffffffffu), 0xffffffffu);
    assert_int_equal(sheet_generator_seed((uint64_t)1 << 32), 4357);
    assert_int_equal(sheet_generator_seed(((uint64_t)1 << 32) + 9), 9);
    assert_int_equal(sheet_generator_seed(UINT64_MAX), 0xffffffffu);
    /* 0 becomes 4357: GSL's mt19937 itself starts a seed of 0 from 4357, so the value
     * stated in the sheet is the one the generator really used */
    assert_int_equal(sheet_generator_seed(0), 4357);
    gsl_rng *a = gsl_rng_alloc(gsl_rng_mt19937), *b = gsl_rng_alloc(gsl_rng_mt19937);
    assert_non_null(a);
    assert_non_null(b);
    gsl_rng_set(a, 0);
    gsl_rng_set(b, 4357);
    for (int i = 0; i < 10; i++) assert_int_equal(gsl_rng_get(a), gsl_rng_get(b));
    gsl_rng_free(a);
    gsl_rng_free(b);
}

/* The generator the sheet names: ISO C++11 [rand.predef] requires the 10000th output of
 * mt19937 with its default seed 5489 to be 4123659995; GSL's mt19937 must be that
 * generator for the provenance line to mean what it says. */
static void test_generator_is_mt19937(void **state)
{
    (void)state;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    assert_non_null(r);
    assert_string_equal(gsl_rng_name(r), AVOW_SHEET_GENERATOR);
    gsl_rng_set(r, 5489);
    unsigned long x = 0;
    for (int i = 0; i < 10000; i++) x = gsl_rng_get(r);
    assert_int_equal(x, 4123659995UL);
    gsl_rng_free(r);
}

/* Messages of the errors recorded since diagnostic `from`, one per line. */
static char *messages(const avow_ctx *ctx, size_t from)
{
    strbuf b = {0};
    for (size_t i = from; i < ctx->ndiags; i++) sb_printf(&b, "%s | %s\n", ctx->diags[i].msg,
                                                         ctx->diags[i].hint ? ctx->diags[i].hint : "");
    return b.s ? b.s : calloc(1, 1);
}

static void test_check_refuses(void **state)
{
    (void)state;
    fixture f;
    char *m;
    /* no plan block: replicates and seed both missing, about the whole file */
    load(&f, HEAD "factor g { a b }\n");
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 0), 2);
    m = messages(&f.ctx, 0);
    assert_string_equal(m,
        "a run sheet needs the planned replicates | add a plan block with the replicates: plan { replicates N }\n"
        "a run sheet must be reproducible, and no seed is given | give --seed N or `seed N` in the plan block\n");
    assert_true(f.ctx.diags[0].whole_file);
    free(m);
    /* a seed from the command line is enough */
    size_t n0 = f.ctx.ndiags;
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 1), 1);
    assert_int_equal(f.ctx.ndiags, n0 + 1);
    done(&f);
    /* a plan block without replicates: at the plan keyword */
    load(&f, HEAD "factor g { a b }\nplan { sigma 2 seed 1 }\n");
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 1), 1);
    m = messages(&f.ctx, 0);
    assert_string_equal(m, "a run sheet needs the planned replicates | add `replicates N` to the plan block\n");
    free(m);
    assert_false(f.ctx.diags[0].whole_file);
    assert_int_equal(f.ctx.diags[0].span.start, strstr(f.ctx.src, "plan {") - f.ctx.src);
    done(&f);
    /* a block taken from the data: at its name */
    load(&f, HEAD "factor g { a b }\nblock plot\nplan { replicates 3 seed 1 }\n");
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 1), 1);
    m = messages(&f.ctx, 0);
    assert_string_equal(m, "the levels of the block `plot` are taken from the data, so no sheet can lay them out"
                           " | declare the block's levels to lay out a sheet: block plot { ... }\n");
    free(m);
    assert_int_equal(f.ctx.diags[0].span.start, strstr(f.ctx.src, "plot") - f.ctx.src);
    avow_sheet s;
    assert_int_equal(sheet_build(&f.plan, 1, &s), AVOW_EDOM);
    assert_null(s.runs);
    done(&f);
    /* too many runs: at the replicates item */
    load(&f, HEAD "factor g { a b }\nblock d { d1 d2 }\nplan { replicates 250001 seed 1 }\n");
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 1), 1);
    m = messages(&f.ctx, 0);
    assert_string_equal(m, "the plan holds 1000004 runs; a run sheet lays out at most 1000000"
                           " | plan fewer replicates, or lay out the experiment in parts\n");
    free(m);
    assert_int_equal(f.ctx.diags[0].span.start, strstr(f.ctx.src, "replicates") - f.ctx.src);
    assert_int_equal(sheet_build(&f.plan, 1, &s), AVOW_EDOM);
    done(&f);
    /* more runs than 64 bits count (set in the plan directly: the sum is saturated) */
    load(&f, HEAD "factor g { a b c }\nplan { replicates 2 seed 1 }\n");
    for (size_t c = 0; c < 3; c++) f.plan.replicates[c] = INT64_MAX;
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 1), 1);
    m = messages(&f.ctx, 0);
    assert_non_null(strstr(m, "the plan holds more runs than a run sheet lays out (at most 1000000)"));
    free(m);
    done(&f);
    /* exactly the limit is fine */
    load(&f, HEAD "factor g { a b }\nplan { replicates 500000 seed 1 }\n");
    assert_int_equal(sheet_check(&f.ctx, &f.st, &f.plan, 1), 0);
    done(&f);
}

/* The rows of a rendered sheet after its first two lines. */
static const char *rows_of(const char *s)
{
    const char *p = strchr(s, '\n');
    assert_non_null(p);
    p = strchr(p + 1, '\n');
    assert_non_null(p);
    return p + 1;
}

static void test_render(void **state)
{
    (void)state;
    fixture f;
    load(&f, HEAD "factor g { plain  comma code \"a, b\"  quote code \"say \\\"hi\\\"\"  pad code \" pad\" }\n"
                  "block day { mon  tue code \"T,2\" }\n"
                  "data \"d.csv\" { y from \"the y\" }\nplan { replicates 1 seed 5 }\n");
    avow_sheet s;
    assert_int_equal(sheet_build(&f.plan, 5, &s), AVOW_OK);
    strbuf o = {0};
    sheet_render(&f.plan, &s, "0123456789abcdef0123456789abcdef0123456789abcdef0123456789abcdef", ',', &o);
    assert_false(o.failed);
    const char *want_head =
        "# avow " AVOW_VERSION " run sheet; study sha256 0123456789abcdef0123456789abcdef0123456789abcdef0123456789abcdef; "
        "seed 5; generator mt19937 (GSL gsl_rng_mt19937) seeded with 5; order: Fisher-Yates shuffle "
        "(gsl_ran_shuffle) within each block; 8 runs in 2 blocks of 4 (block day)\n"
        "run,g,day,the y\n";
    assert_memory_equal(o.s, want_head, strlen(want_head));
    /* every row: its number, a label quoted as RFC 4180 has it, the block, empty y */
    const char *labels[4] = {"plain", "\"a, b\"", "\"say \"\"hi\"\"\"", "\" pad\""};
    const char *p = rows_of(o.s);
    for (size_t i = 0; i < 8; i++) {
        char want[64];
        snprintf(want, sizeof want, "%zu,%s,%s,\n", i + 1, labels[s.runs[i].cell], i < 4 ? "mon" : "\"T,2\"");
        assert_memory_equal(p, want, strlen(want));
        p += strlen(want);
    }
    assert_int_equal(*p, 0);
    sb_free(&o);
    /* tabs: the comma needs no quotes, a tab would */
    sheet_render(&f.plan, &s, "x", '\t', &o);
    assert_non_null(strstr(o.s, "\nrun\tg\tday\tthe y\n"));
    assert_non_null(strstr(o.s, "\ta, b\t"));
    assert_non_null(strstr(o.s, "\tT,2\t\n"));
    assert_non_null(strstr(o.s, "\t\" pad\"\t"));
    sb_free(&o);
    sheet_free(&s);
    done(&f);
}

static void test_render_seeds_and_names(void **state)
{
    (void)state;
    fixture f;
    /* the study reads columns called run and run2: the run number takes run3 */
    load(&f, HEAD "factor g { a b }\ndata \"d.csv\" { g from \"run\"  y from \"run2\" }\nplan { replicates 2 }\n");
    static const struct { uint64_t seed; const char *says; } cases[] = {
        {7, "seed 7; generator mt19937 (GSL gsl_rng_mt19937) seeded with 7; order"},
        {((uint64_t)1 << 32) + 7,
         "seed 4294967303; generator mt19937 (GSL gsl_rng_mt19937) seeded with 7 (the seed modulo 2^32); order"},
        {0, "seed 0; generator mt19937 (GSL gsl_rng_mt19937) seeded with 4357 (GSL replaces a seed of 0 by 4357); order"},
        {(uint64_t)3 << 32, "seed 12884901888; generator mt19937 (GSL gsl_rng_mt19937) seeded with 4357 "
                            "(the seed modulo 2^32 is 0, which GSL replaces by 4357); order"},
    };
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        avow_sheet s;
        assert_int_equal(sheet_build(&f.plan, cases[k].seed, &s), AVOW_OK);
        strbuf o = {0};
        sheet_render(&f.plan, &s, "h", ',', &o);
        assert_non_null(strstr(o.s, cases[k].says));
        assert_non_null(strstr(o.s, "; 4 runs, no blocks\nrun3,run,run2\n"));
        sb_free(&o);
        sheet_free(&s);
    }
    done(&f);
}

static void test_delimiter(void **state)
{
    (void)state;
    fixture f;
    load(&f, HEAD "factor g { a b }\n");
    assert_int_equal(sheet_delimiter(&f.plan, NULL), ',');
    assert_int_equal(sheet_delimiter(&f.plan, "out.tsv"), '\t');
    done(&f);
    load(&f, HEAD "factor g { a b }\ndata \"d.tsv\"\n");
    assert_int_equal(sheet_delimiter(&f.plan, NULL), '\t');
    assert_int_equal(sheet_delimiter(&f.plan, "runs.csv"), ',');     /* the file written decides */
    assert_int_equal(sheet_delimiter(&f.plan, "runs.tab"), '\t');
    done(&f);
    load(&f, HEAD "factor g { a b }\ndata \"d.tsv\" { delimiter \";\" }\n");
    assert_int_equal(sheet_delimiter(&f.plan, NULL), ';');
    assert_int_equal(sheet_delimiter(&f.plan, "runs.tsv"), ';');     /* the study's own wins */
    done(&f);
}

static void test_alloc_failures(void **state)
{
    (void)state;
    fixture f;
    load(&f, blocked);
    avow_sheet ref;
    assert_int_equal(sheet_build(&f.plan, 77, &ref), AVOW_OK);
    strbuf want = {0};
    sheet_render(&f.plan, &ref, "h", ',', &want);
    assert_false(want.failed);
    int saw_fail = 0, saw_ok = 0;
    for (long n = 0; n < 64 && !saw_ok; n++) {
        avow_sheet s;
        strbuf o = {0};
        avow_mem_fail_after(n);
        int rc = sheet_build(&f.plan, 77, &s);
        if (rc == AVOW_OK) sheet_render(&f.plan, &s, "h", ',', &o);
        avow_mem_fail_after(-1);
        if (rc != AVOW_OK) {
            assert_int_equal(rc, AVOW_ENOMEM);
            assert_null(s.runs);
            saw_fail = 1;
        } else if (o.failed) {
            saw_fail = 1;
        } else {
            assert_int_equal(o.len, want.len);
            assert_memory_equal(o.s, want.s, want.len);
            saw_ok = 1;
        }
        sb_free(&o);
        sheet_free(&s);
    }
    assert_true(saw_fail && saw_ok);
    sb_free(&want);
    sheet_free(&ref);
    done(&f);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_layout_blocked),
        cmocka_unit_test(test_layout_unequal),
        cmocka_unit_test(test_reproducible),
        cmocka_unit_test(test_generator_seed),
        cmocka_unit_test(test_generator_is_mt19937),
        cmocka_unit_test(test_check_refuses),
        cmocka_unit_test(test_render),
        cmocka_unit_test(test_render_seeds_and_names),
        cmocka_unit_test(test_delimiter),
        cmocka_unit_test(test_alloc_failures),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
