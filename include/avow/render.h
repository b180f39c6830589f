/* render.h: renderers of the plan review (text, JSON) and the canonical formatter.
 * No numerics beyond formatting; output goes to a strbuf, the driver writes it. */
#ifndef AVOW_RENDER_H
#define AVOW_RENDER_H

#include "avow/ast.h"
#include "avow/plan.h"
#include "avow/results.h"

#define AVOW_VERSION "0.1.0"

/* The standing caution of every report (the text report wraps it). */
#define AVOW_CAUTION "A statistically significant difference is not evidence that a product, process " \
    "or treatment is safe. Where people can be hurt, decisions follow the applicable regulations, " \
    "local codes and licensed review."
#define AVOW_CAUTION_WRAPPED "A statistically significant difference is not evidence that a product, process or\n" \
    "  treatment is safe. Where people can be hurt, decisions follow the applicable\n" \
    "  regulations, local codes and licensed review."

/* The plan review for people. */
void render_plan_text(const avow_ctx *ctx, const avow_plan *plan, strbuf *out);
/* The plan as `avow.plan/1` JSON; when the study has errors, only the diagnostics. */
void render_plan_json(const avow_ctx *ctx, const avow_plan *plan, int ok, strbuf *out);

/* The analysis report of `avow run`, for people and as avow.report/1 JSON. ctx is the
 * study file's context (its bytes are echoed in the text report). */
void render_report_text(const avow_ctx *ctx, const avow_plan *plan, const avow_results *res, strbuf *out);
void render_report_json(const avow_ctx *ctx, const avow_plan *plan, const avow_results *res, strbuf *out);
/* The same report as one self-contained HTML page: the text report's sections, tables,
 * notes and caution, the pictures inline as SVG (svg.h), one stylesheet for screens,
 * narrow screens and print; no script and no external reference. */
void render_report_html(const avow_ctx *ctx, const avow_plan *plan, const avow_results *res, strbuf *out);

/* The canonical form of a study file, comments kept. */
void fmt_study(const avow_ctx *ctx, const ast_study *study, strbuf *out);
/* An expression in canonical form. */
void fmt_expr(const ast_expr *e, strbuf *out);
/* A name, quoted when it is not a plain identifier or is a keyword. */
void fmt_name(const char *s, size_t len, int force_quote, strbuf *out);
/* A string literal with escapes. */
void fmt_string(const char *s, size_t len, strbuf *out);

/* JSON helpers shared by the JSON renderers. */
void json_string(strbuf *out, const char *s);
void json_number(strbuf *out, double v);

#endif
