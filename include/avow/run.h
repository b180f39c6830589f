/* run.h: the whole of `avow run` as one library call, and the loading and checking of a
 * study file that every command starts with. Nothing here prints: the report and every
 * message meant for standard error come back as bytes, and the driver writes them. */
#ifndef AVOW_RUN_H
#define AVOW_RUN_H

#include <stddef.h>

#include "avow/ast.h"
#include "avow/diag.h"
#include "avow/evaluate.h"
#include "avow/plan.h"
#include "avow/svg.h"
#include "avow/util.h"

/* Exit statuses of the command, as the library decides them. */
enum { AVOW_EXIT_OK = 0, AVOW_EXIT_STUDY = 1, AVOW_EXIT_DATA = 2 };

/* Load the study file at path into ctx. On failure appends the reason ("avow: cannot
 * read PATH: ...", or out of memory) to msgs and returns AVOW_EIO or AVOW_ENOMEM; ctx
 * then holds nothing to free. */
int avow_load_study(avow_ctx *ctx, const char *path, strbuf *msgs);

/* Parse and check a loaded study; its diagnostics are rendered into msgs in the given
 * style. Returns 1 when the study has no errors, 0 when it has, -1 when memory ran out
 * ("avow: out of memory" is appended and ctx is freed). plan->path is set to ctx->path. */
int avow_check_loaded(avow_ctx *ctx, ast_study *study, avow_plan *plan, diag_style style, strbuf *msgs);

/* What `avow run` is asked to do. */
typedef struct avow_run_opts {
    const char *study_path;     /* the study file; named in messages and in the report;
                                   its data file is found relative to its folder */
    const char *study_bytes;    /* when not NULL: the study's bytes (study_len of them),
                                   used instead of reading study_path */
    size_t study_len;
    const char *data_path;      /* --data FILE, or NULL for the study's own data file */
    int json;                   /* the avow.report/1 JSON report instead of text */
    int html;                   /* the self-contained HTML report instead of text */
    int pictures;               /* also draw the SVG pictures (result.pictures) */
    int no_diagnostics;         /* skip the checks of the assumptions */
    diag_style style;           /* how messages are styled (DIAG_PLAIN unless the driver
                                   writes them to a colour terminal) */
    const avow_progress *progress;  /* told how far the data pass has got; may be NULL */
} avow_run_opts;

/* What it produced. */
typedef struct avow_run_result {
    int status;                 /* AVOW_EXIT_OK, AVOW_EXIT_STUDY (errors in the study, an
                                   unreadable study, memory ran out) or AVOW_EXIT_DATA */
    int oom;                    /* memory ran out somewhere (status AVOW_EXIT_STUDY) */
    strbuf report;              /* the report; empty unless status is AVOW_EXIT_OK */
    strbuf messages;            /* the bytes for standard error (warnings even on
                                   success); when messages.failed, memory ran out and
                                   only "avow: out of memory" can be said */
    /* With opts.pictures and status AVOW_EXIT_OK: each picture's standalone SVG, or
     * (empty buffer) the reason it cannot be drawn for these data. */
    strbuf pictures[AVOW_PIC_COUNT];
    const char *picture_missing[AVOW_PIC_COUNT];
} avow_run_result;

/* Check the study, read its data in one pass, analyse them and render the report.
 * Reads the study and the data file; writes nothing. Returns r->status. Release r with
 * avow_run_free whatever the status. */
int avow_run(const avow_run_opts *o, avow_run_result *r);
void avow_run_free(avow_run_result *r);

/* Where a study's data file is: rel itself when absolute, else rel in the folder of
 * study_path. Allocated with avow_malloc; NULL when out of memory. */
char *avow_data_location(const char *study_path, const char *rel);

#endif
