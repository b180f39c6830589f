/* report.h: the analysis report written once through the document layer (internal);
 * report_text.c gives it the text form, report_html.c the HTML page around it. */
#ifndef AVOW_REPORT_H
#define AVOW_REPORT_H

#include "avow/diag.h"
#include "avow/plan.h"
#include "avow/results.h"
#include "doc.h"

/* Every part of the report after its first line: the inputs, the study file, the
 * summaries, the analysis of variance, the pictures, the contrasts, the explorations,
 * the checks and the notes with the caution. */
void report_body(doc *d, const avow_ctx *ctx, const avow_plan *p, const avow_results *r);

#endif
