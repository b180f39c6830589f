/* fuzz_study.c: libFuzzer harness (a): a study file through the lexer, the parser, the
 * checker, the plan review (text and JSON) and the formatter, as `avow check` and
 * `avow fmt` run them. Besides crashes, leaks and undefined behaviour it stops on a
 * broken promise of the library:
 *   - the messages and the reviews are valid UTF-8, and the JSON review is JSON;
 *   - a study that parses formats to text that parses, formatting that text again
 *     changes nothing (avow fmt is idempotent), and the formatted study checks to the
 *     same verdict and the same plan review (up to its list of findings, whose line
 *     numbers move). */
#include "fuzz_common.h"

#include "avow/plan.h"
#include "avow/render.h"
#include "avow/run.h"
#include "avow/syntax.h"

/* The plan review up to its findings (which carry line numbers). */
static size_t review_body(const strbuf *b)
{
    const char *f = b->s ? strstr(b->s, "\nFindings\n") : NULL;
    return f ? (size_t)(f - b->s) : b->len;
}

typedef struct checked {
    avow_ctx ctx;
    ast_study st;
    avow_plan plan;
    int ok;                 /* 1 no errors, 0 errors */
    strbuf msgs, text, json, fmt;
} checked;

static void check_bytes(checked *c, const char *bytes, size_t n)
{
    memset(c, 0, sizeof *c);
    FUZZ_REQUIRE(ctx_init(&c->ctx, "fuzz.avow", bytes, n) == AVOW_OK, "out of memory");
    c->ok = avow_check_loaded(&c->ctx, &c->st, &c->plan, DIAG_PLAIN, &c->msgs);
    FUZZ_REQUIRE(c->ok >= 0, "out of memory");
    /* as avow check: the JSON review always, the text review when there are no errors */
    render_plan_json(&c->ctx, &c->plan, c->ok, &c->json);
    if (c->ok) render_plan_text(&c->ctx, &c->plan, &c->text);
    FUZZ_REQUIRE(!c->msgs.failed && !c->json.failed && !c->text.failed, "out of memory");
}

static void release(checked *c)
{
    sb_free(&c->msgs); sb_free(&c->text); sb_free(&c->json); sb_free(&c->fmt);
    ctx_free(&c->ctx);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (size > AVOW_MAX_STUDY_BYTES) return 0;
    checked a;
    check_bytes(&a, (const char *)data, size);
    FUZZ_REQUIRE(fuzz_valid_utf8(a.msgs.s, a.msgs.len), "the messages are not valid UTF-8");
    FUZZ_REQUIRE(fuzz_valid_utf8(a.text.s, a.text.len), "the plan review is not valid UTF-8");
    FUZZ_REQUIRE(fuzz_valid_utf8(a.json.s, a.json.len), "the JSON review is not valid UTF-8");
    FUZZ_REQUIRE(fuzz_valid_json(a.json.s, a.json.len), "the JSON review is not JSON");

    /* The formatter, on a study that parses (as avow fmt decides: parse_study alone). */
    avow_ctx pctx;
    ast_study pst;
    FUZZ_REQUIRE(ctx_init(&pctx, "fuzz.avow", (const char *)data, size) == AVOW_OK, "out of memory");
    int parses = parse_study(&pctx, &pst) == 0;
    FUZZ_REQUIRE(!pctx.oom, "out of memory");
    if (parses) {
        fmt_study(&pctx, &pst, &a.fmt);
        FUZZ_REQUIRE(!a.fmt.failed, "out of memory");
        FUZZ_REQUIRE(fuzz_valid_utf8(a.fmt.s, a.fmt.len), "the formatted study is not valid UTF-8");
        checked b;
        check_bytes(&b, a.fmt.s ? a.fmt.s : "", a.fmt.len);
        avow_ctx qctx;
        ast_study qst;
        FUZZ_REQUIRE(ctx_init(&qctx, "fuzz.avow", a.fmt.s ? a.fmt.s : "", a.fmt.len) == AVOW_OK, "out of memory");
        FUZZ_REQUIRE(parse_study(&qctx, &qst) == 0, "the formatted study does not parse");
        fmt_study(&qctx, &qst, &b.fmt);
        FUZZ_REQUIRE(!b.fmt.failed, "out of memory");
        FUZZ_REQUIRE(b.fmt.len == a.fmt.len && memcmp(b.fmt.s ? b.fmt.s : "", a.fmt.s ? a.fmt.s : "", a.fmt.len) == 0,
                     "formatting the formatted study changes it");
        FUZZ_REQUIRE(a.ok == b.ok, "the formatted study checks to another verdict");
        size_t ra = review_body(&a.text), rb = review_body(&b.text);
        FUZZ_REQUIRE(ra == rb && memcmp(a.text.s ? a.text.s : "", b.text.s ? b.text.s : "", ra) == 0,
                     "the formatted study checks to another plan review");
        ctx_free(&qctx);
        release(&b);
    }
    ctx_free(&pctx);
    release(&a);
    return 0;
}
