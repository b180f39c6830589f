/* svg.h: the pictures of `avow run`, drawn by avow itself as SVG. Renderers only: the
 * numbers drawn come from the results (means, intervals, the reference curves, the
 * residuals and their normal scores); here they are placed on axes and written out.
 * Deterministic bytes: fixed number formatting, no clock, no locale.
 *
 * Every picture carries the mapping of its axes for checking: each <g class="plot">
 * has data-x-domain="LO HI" and data-x-range="PX0 PX1" (and data-y-... for two axes),
 * so that the value at pixel x is LO + (x - PX0) (HI - LO) / (PX1 - PX0). */
#ifndef AVOW_SVG_H
#define AVOW_SVG_H

#include "avow/plan.h"
#include "avow/results.h"
#include "avow/util.h"

typedef enum {
    AVOW_PIC_MEANS = 0,     /* level (cell) means with their reference distribution */
    AVOW_PIC_INTERVALS,     /* planned contrasts and exploratory comparisons */
    AVOW_PIC_RESIDUALS,     /* residuals against fitted values */
    AVOW_PIC_PROBABILITY,   /* normal probability plot of the residuals */
    AVOW_PIC_SPREAD,        /* residuals by level or cell */
    AVOW_PIC_COUNT
} avow_picture;

/* The file name of a picture: "means.svg", "intervals.svg", "residuals.svg",
 * "probability.svg", "spread.svg". */
const char *svg_picture_file(avow_picture pic);

/* Why a picture cannot be drawn from these results (a sentence), or NULL when it can:
 * no comparisons to show, the checks of the assumptions were not made
 * (--no-diagnostics), the residuals were not kept, or too many residuals. */
const char *svg_picture_missing(const avow_plan *p, const avow_results *r, avow_picture pic);

/* Draw a picture. standalone: a complete SVG file (XML declaration, namespace) with its
 * caption drawn under it; otherwise an <svg> element to place inside an HTML page,
 * whose caption the page sets as text (svg_picture_caption). A picture that cannot be
 * drawn writes nothing. */
void render_svg(const avow_plan *p, const avow_results *r, avow_picture pic, int standalone, strbuf *out);

/* The caption of a picture in words, one paragraph without line breaks: what it shows
 * and how to read it (for the means, the reference curve's df, scale and the n behind
 * it). Nothing for a picture that cannot be drawn. */
void svg_picture_caption(const avow_plan *p, const avow_results *r, avow_picture pic, strbuf *out);

#endif
