/* fuzz_data.c: libFuzzer harness (b): a data file through the CSV reader, the data pass
 * (eval_read) and the analysis (eval_analyse), then both reports, for three fixed
 * studies that read the same columns (f, g, blk, y): one factor with a coded level,
 * missing-value tokens and separate variances; two crossed factors in blocks taken from the data; and two
 * factors without their interaction in declared blocks. Besides crashes, leaks and
 * undefined behaviour it stops when the reader's error count and its messages disagree,
 * when a report or a message is not valid UTF-8 or holds a control character (the data
 * must not be able to drive a terminal through avow), or when the JSON report is not
 * JSON. */
#include "fuzz_common.h"

#include "avow/evaluate.h"
#include "avow/plan.h"
#include "avow/render.h"
#include "avow/run.h"
#include "avow/syntax.h"

static const char *const studies[] = {
    "study \"fuzz: one factor\"\n"
    "response y \"yield\" unit \"g\"\n"
    "factor f \"line\" { a at 1  b at 2  c at 4 code \"C-3\" }\n"
    "data \"fuzz.csv\" { f from \"f\"  y from \"y\"  missing \"\" \"NA\" }\n"
    "contrast ab = a - b\n"
    "contrast lin = trend(f, 1) > 0\n"
    "variances separate\n"
    "explore pairs\n"
    "explore versus a\n"
    "explore contrast hunch = c - mean(a, b)\n",

    "study \"fuzz: two factors in blocks from the data\"\n"
    "response y\n"
    "factor f { a b c }\n"
    "factor g { x y }\n"
    "block blk\n"
    "data \"fuzz.csv\" { f from \"f\"  g from \"g\"  blk from \"blk\"  y from \"y\"  missing \"NA\" }\n"
    "adjust bonferroni\n"
    "contrast ab = a - b\n"
    "contrast xy = x - y < 0\n"
    "contrast inter = interaction(a - c, x - y)\n"
    "explore pairs f\n"
    "explore pairs f within g\n",

    "study \"fuzz: two factors, declared blocks, no interaction\"\n"
    "response y\n"
    "factor f { a b c }\n"
    "factor g { x y }\n"
    "block blk { d1 d2 d3 }\n"
    "interactions none\n"
    "data \"fuzz.csv\" { f from \"f\"  g from \"g\"  blk from \"blk\"  y from \"y\" }\n"
    "adjust fdr\n"
    "contrast ab = a - b\n"
    "explore versus c\n",
};
#define NSTUDIES (sizeof studies / sizeof studies[0])

static struct fixed {
    avow_ctx ctx;
    ast_study st;
    avow_plan plan;
} fixed[NSTUDIES];

static void setup(void)
{
    static int done;
    if (done) return;
    done = 1;
    for (size_t i = 0; i < NSTUDIES; i++) {
        struct fixed *s = &fixed[i];
        strbuf m = {0};
        FUZZ_REQUIRE(ctx_init(&s->ctx, "fuzz.avow", studies[i], strlen(studies[i])) == AVOW_OK, "out of memory");
        if (avow_check_loaded(&s->ctx, &s->st, &s->plan, DIAG_PLAIN, &m) != 1) {
            fprintf(stderr, "avow fuzz: fixed study %zu does not check:\n%s", i, m.s ? m.s : "");
            abort();
        }
        sb_free(&m);
    }
}

/* 1 when w occurs in s as a word of its own (between spaces, line ends, parentheses). */
static int has_word(const char *s, const char *w)
{
    size_t n = strlen(w);
    for (const char *p = strstr(s, w); p; p = strstr(p + 1, w)) {
        char before = p == s ? ' ' : p[-1], after = p[n];
        if (strchr(" \n(", before) && (after == 0 || strchr(" \n),;", after))) return 1;
    }
    return 0;
}

static void one(const struct fixed *s, const char *path)
{
    avow_results res;
    memset(&res, 0, sizeof res);
    res.data_path = path;
    res.data_shown = "fuzz.csv";
    memset(res.study_sha256, 'a', 64);
    memset(res.data_sha256, 'b', 64);
    avow_data data;
    memset(&data, 0, sizeof data);
    data.keep = 1;
    strbuf errs = {0}, out = {0};
    FUZZ_REQUIRE(eval_data_init(&data, &s->plan) == AVOW_OK, "out of memory");
    size_t nerr = eval_read(&s->plan, path, "fuzz.csv", &data, &res, &errs, NULL);
    FUZZ_REQUIRE(!data.oom && !errs.failed, "out of memory");
    FUZZ_REQUIRE((nerr == 0) == (errs.len == 0), "the reader's error count and its messages disagree");
    if (nerr == 0) {
        FUZZ_REQUIRE(res.used + res.missing_response + res.missing_level == res.rows,
                     "the rows read are not all accounted for");
        int rc = eval_analyse(&s->plan, &data, &res, &errs);
        FUZZ_REQUIRE(rc == AVOW_OK || rc == AVOW_EDOM, "the analysis ran out of memory");
        FUZZ_REQUIRE((rc == AVOW_EDOM) == (errs.len > 0), "an analysis error without a message, or a message without an error");
        if (rc == AVOW_OK) {
            render_report_text(&s->ctx, &s->plan, &res, &out);
            FUZZ_REQUIRE(!out.failed && out.len > 0, "no text report");
            FUZZ_REQUIRE(fuzz_valid_utf8(out.s, out.len), "the text report is not valid UTF-8");
            FUZZ_REQUIRE(fuzz_no_controls(out.s, out.len, 0), "the text report holds a control character");
            if (!s->plan.block_from_data)   /* (a block label from the data may be any word) */
                FUZZ_REQUIRE(!has_word(out.s, "nan") && !has_word(out.s, "-nan") && !has_word(out.s, "inf")
                             && !has_word(out.s, "-inf"), "the text report shows nan or inf");
            sb_free(&out);
            render_report_json(&s->ctx, &s->plan, &res, &out);
            FUZZ_REQUIRE(!out.failed && out.len > 0, "no JSON report");
            FUZZ_REQUIRE(fuzz_valid_utf8(out.s, out.len), "the JSON report is not valid UTF-8");
            FUZZ_REQUIRE(fuzz_valid_json(out.s, out.len), "the JSON report is not JSON");
        }
    }
    FUZZ_REQUIRE(fuzz_valid_utf8(errs.s, errs.len), "the data errors are not valid UTF-8");
    FUZZ_REQUIRE(fuzz_no_controls(errs.s, errs.len, 0), "the data errors hold a control character");
    sb_free(&out);
    sb_free(&errs);
    eval_data_free(&data);
    eval_results_free(&res);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    setup();
    const char *path = fuzz_file(data, size);
    for (size_t i = 0; i < NSTUDIES; i++) one(&fixed[i], path);
    return 0;
}
