/* run.c: `avow run` end to end as one library call (the driver only writes the bytes),
 * and the loading and checking of a study file shared by the commands. */
#include "avow/run.h"

#include <errno.h>
#include <stdarg.h>
#include <string.h>
#include <sys/stat.h>

#include "avow/evaluate.h"
#include "avow/render.h"
#include "avow/syntax.h"

int avow_load_study(avow_ctx *ctx, const char *path, strbuf *msgs)
{
    int rc = ctx_load(ctx, path);
    if (rc == AVOW_ENOMEM) sb_printf(msgs, "avow: out of memory reading %s\n", path);
    else if (rc)
        sb_printf(msgs, "avow: cannot read %s: %s\n", path,
                  errno == EFBIG ? "larger than the 16 MiB a study file may have" : strerror(errno));
    return rc;
}

int avow_check_loaded(avow_ctx *ctx, ast_study *study, avow_plan *plan, diag_style style, strbuf *msgs)
{
    memset(plan, 0, sizeof *plan);
    plan->path = ctx->path;
    int ok = parse_study(ctx, study) == 0;
    if (ok) ok = check_study(ctx, study, plan) == 0;
    if (ctx->oom) {
        sb_puts(msgs, "avow: out of memory\n");
        ctx_free(ctx);
        return -1;
    }
    diag_render_styled(ctx, style, msgs);
    return ok;
}

char *avow_data_location(const char *study_path, const char *rel)
{
    const char *slash = rel[0] == '/' ? NULL : strrchr(study_path, '/');
    size_t dir = slash ? (size_t)(slash - study_path) + 1 : 0, n = strlen(rel);
    char *p = avow_malloc(dir + n + 1);
    if (!p) return NULL;
    memcpy(p, study_path, dir);
    memcpy(p + dir, rel, n + 1);
    return p;
}

static char *copy_string(const char *s)
{
    size_t n = strlen(s);
    char *p = avow_malloc(n + 1);
    if (p) memcpy(p, s, n + 1);
    return p;
}

static int out_of_memory(avow_run_result *r)
{
    r->oom = 1;
    sb_puts(&r->messages, "avow: out of memory\n");
    return AVOW_EXIT_STUDY;
}

/* Append a message about the data to r->messages, painted in the run's style (a
 * FILE: error: label, a hint). */
static void say_bytes(avow_run_result *r, diag_style style, const char *text, size_t len)
{
    diag_paint(text, len, style, &r->messages);
}

static void say(avow_run_result *r, diag_style style, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
static void say(avow_run_result *r, diag_style style, const char *fmt, ...)
{
    strbuf m = {0};
    va_list ap;
    va_start(ap, fmt);
    sb_vprintf(&m, fmt, ap);
    va_end(ap);
    if (m.failed) r->messages.failed = 1;
    else say_bytes(r, style, m.s, m.len);
    sb_free(&m);
}

/* Draw every picture that can be drawn; note why the others cannot. */
static int draw_pictures(const avow_plan *plan, const avow_results *res, avow_run_result *r)
{
    for (int pic = 0; pic < AVOW_PIC_COUNT; pic++) {
        r->picture_missing[pic] = svg_picture_missing(plan, res, (avow_picture)pic);
        if (r->picture_missing[pic]) continue;
        render_svg(plan, res, (avow_picture)pic, 1, &r->pictures[pic]);
        if (r->pictures[pic].failed) return AVOW_ENOMEM;
    }
    return AVOW_OK;
}

int avow_run(const avow_run_opts *o, avow_run_result *r)
{
    memset(r, 0, sizeof *r);
    strbuf *msg = &r->messages;
    const char *path = o->study_path, *data_opt = o->data_path;
    avow_ctx ctx;
    if (o->study_bytes) {
        if (ctx_init(&ctx, path, o->study_bytes, o->study_len) != AVOW_OK)
            return r->status = out_of_memory(r);
    } else {
        int lrc = avow_load_study(&ctx, path, msg);
        if (lrc) { r->oom = lrc == AVOW_ENOMEM; return r->status = AVOW_EXIT_STUDY; }
    }
    ast_study study;
    avow_plan plan;
    int ok = avow_check_loaded(&ctx, &study, &plan, o->style, msg);
    if (ok < 0) { r->oom = 1; return r->status = AVOW_EXIT_STUDY; }
    if (!ok) {
        sb_printf(msg, "%s: %zu error%s, %zu warning%s; nothing was analysed\n", path, ctx.nerrors,
                  ctx.nerrors == 1 ? "" : "s", ctx.nwarnings, ctx.nwarnings == 1 ? "" : "s");
        ctx_free(&ctx);
        return r->status = AVOW_EXIT_STUDY;
    }
    if (!data_opt && !plan.has_data) {
        sb_printf(msg, "avow: %s names no data file: add a `data` statement or give --data FILE\n", path);
        ctx_free(&ctx);
        return r->status = AVOW_EXIT_DATA;
    }
    avow_results res;
    memset(&res, 0, sizeof res);
    char *data_path = data_opt ? copy_string(data_opt) : avow_data_location(path, plan.data_path);
    res.data_path = data_path;
    res.data_shown = data_opt ? data_opt : plan.data_path;
    res.data_from_option = data_opt != NULL;
    eval_sha256_bytes(ctx.src, ctx.len, res.study_sha256);
    int rc = AVOW_EXIT_OK;
    strbuf errs = {0};
    avow_data data;
    memset(&data, 0, sizeof data);
    if (!data_path) { rc = out_of_memory(r); goto done; }
    /* A study may name /dev/zero or a pipe: refuse what is not a file before the
     * digest's thread starts reading it. */
    struct stat st;
    if (stat(data_path, &st) == 0 && !S_ISREG(st.st_mode) && !S_ISDIR(st.st_mode)) {
        say(r, o->style, "%s: error: %s\n", data_path, AVOW_NOT_A_FILE);
        rc = AVOW_EXIT_DATA;
        goto done;
    }
    data.keep = !o->no_diagnostics;
    data.residuals = data.keep && (o->pictures || o->html);
    if (eval_data_init(&data, &plan) != AVOW_OK) { rc = out_of_memory(r); goto done; }
    /* The digest is computed on a second thread while the data are read. */
    eval_hash_job *job = eval_sha256_start(data_path);
    size_t nerr = eval_read(&plan, data_path, data_path, &data, &res, &errs, o->progress);
    int hrc = eval_sha256_join(job, res.data_sha256);
    if (hrc != AVOW_OK) {
        if (hrc == AVOW_ENOMEM) rc = out_of_memory(r);
        else {
            say(r, o->style, "%s: error: cannot read the data file: %s\n", data_path, strerror(errno));
            rc = AVOW_EXIT_DATA;
        }
        goto done;
    }
    if (plan.sha256 && !data_opt && strcmp(plan.sha256, res.data_sha256) != 0) {
        say(r, o->style, "%s: error: the data file has changed since the study locked it\n"
                         "  sha256 locked in the study: %s\n  sha256 of the file now:     %s\n"
                         "  hint: if the change is intended, update the `sha256` line of the data block\n",
            data_path, plan.sha256, res.data_sha256);
        rc = AVOW_EXIT_DATA;
        goto done;
    }
    if (data.oom || errs.failed) {
        /* Memory ran out while reading: not a fault of the data (the reader's message
         * may carry a hint, such as --no-diagnostics). */
        if (!errs.failed) say_bytes(r, o->style, errs.s, errs.len);
        rc = out_of_memory(r);
        goto done;
    }
    if (nerr != 0) {
        say_bytes(r, o->style, errs.s, errs.len);
        sb_puts(msg, "avow: the data do not fit the study; no report was written\n");
        rc = AVOW_EXIT_DATA;
        goto done;
    }
    int arc = eval_analyse(&plan, &data, &res, &errs);
    if (arc != AVOW_OK) {
        if (errs.len && !errs.failed && arc == AVOW_EDOM) {
            say(r, o->style, "%s: error: %.*s", data_path, (int)errs.len, errs.s);
            sb_puts(msg, "avow: no report was written\n");
            rc = AVOW_EXIT_DATA;
        } else {
            rc = out_of_memory(r);
        }
        goto done;
    }
    if (o->pictures && draw_pictures(&plan, &res, r) != AVOW_OK) { rc = out_of_memory(r); goto done; }
    if (o->json) render_report_json(&ctx, &plan, &res, &r->report);
    else if (o->html) render_report_html(&ctx, &plan, &res, &r->report);
    else render_report_text(&ctx, &plan, &res, &r->report);
    if (r->report.failed) rc = out_of_memory(r);
done:
    if (rc != AVOW_EXIT_OK) {
        sb_free(&r->report);
        for (int pic = 0; pic < AVOW_PIC_COUNT; pic++) sb_free(&r->pictures[pic]);
    }
    eval_data_free(&data);
    avow_free(data_path);
    eval_results_free(&res);
    sb_free(&errs);
    ctx_free(&ctx);
    return r->status = rc;
}

void avow_run_free(avow_run_result *r)
{
    sb_free(&r->report);
    for (int pic = 0; pic < AVOW_PIC_COUNT; pic++) sb_free(&r->pictures[pic]);
    sb_free(&r->messages);
}
