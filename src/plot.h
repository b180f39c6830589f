/* plot.h: what the pictures show, shared by the SVG pictures (svg.c) and their
 * fixed-width text versions in the report (internal). The numbers come from the
 * results; here they are only gathered into panels, placed on axes and formatted. */
#ifndef AVOW_PLOT_H
#define AVOW_PLOT_H

#include <stddef.h>
#include <stdint.h>

#include "avow/plan.h"
#include "avow/results.h"
#include "avow/util.h"

/* Most rows (means, intervals) one panel draws one by one; a larger panel is said to
 * be too large instead. */
#define AVOW_PLOT_MAX_ROWS 100
/* Most residuals a picture of the residuals draws. */
#define AVOW_PLOT_MAX_POINTS 20000
/* Columns of the value axis in the text pictures (positions 0..AVOW_TEXT_COLS). */
#define AVOW_TEXT_COLS 60

/* An axis with ticks in steps of 1, 2 or 5 times a power of ten. */
typedef struct plot_axis {
    double lo, hi;          /* the domain: the first and last tick */
    int mant, expo;         /* the step: mant * 10^expo, mant in {1, 2, 5} */
    long long k0;           /* lo = k0 * step */
    size_t nticks;
    int decimals;           /* of the tick labels */
} plot_axis;

/* The axis with about `target` steps over [lo, hi] (widened when lo == hi). Returns 0
 * when lo or hi is not finite. */
int plot_axis_make(plot_axis *a, double lo, double hi, int target);
/* Tick i, computed from its integer multiple of the step. */
double plot_tick(const plot_axis *a, size_t i);
/* Tick i as text ("0.5", "-2", "20"), never "-0". */
void plot_tick_label(const plot_axis *a, size_t i, char *buf, size_t size);

/* The largest finite magnitude seen so far, in *m. */
void plot_track(double *m, double v);
/* Decimals that show a largest magnitude m with six significant digits (at least one,
 * at most twelve): the report's own rule for a column of numbers. */
int plot_decimals(double m);
/* A number with that many decimals ("-" for NaN). */
void plot_fixed(char *buf, size_t size, double v, int decimals);
/* A number with four significant digits, for captions. */
void plot_short(char *buf, size_t size, double v);

/* One mark on a means panel. */
typedef struct plot_mean {
    char *label;
    double mean;
    uint64_t n;
} plot_mean;

/* A panel of means with their reference distribution. */
typedef struct plot_means_panel {
    char *title;
    char *short_name;       /* "cells", or the factor's name */
    plot_mean *means;
    size_t k;
    const avow_reference *ref;
    int pooled_blocks;      /* cell means pooled over blocks */
    int margins;            /* marginal means (model-based, effective n) */
} plot_means_panel;

/* One interval. */
typedef struct plot_interval {
    char *label;
    double est, lo, hi;     /* lo = -inf or hi = +inf for one-sided intervals */
    int reject;
} plot_interval;

/* A panel of intervals: the planned contrasts, or one family of exploratory ones. */
typedef struct plot_interval_panel {
    char *title;
    int planned;
    plot_interval *rows;
    size_t n;
} plot_interval_panel;

typedef struct plot_set {
    plot_means_panel *means;
    size_t nmeans;
    plot_interval_panel *intervals;
    size_t nintervals;
    char *value_label;      /* "lap-shear strength, strength (MPa)" */
    char *unit;             /* "MPa", or "" */
    int conf;               /* confidence in percent */
    int failed;             /* out of memory */
} plot_set;

/* Gather the panels of the two first pictures from the results. */
void plot_gather(const avow_plan *p, const avow_results *r, plot_set *s);
void plot_set_free(plot_set *s);

/* The domain of the means picture: every mean and every drawn curve. Returns 0 when
 * there is nothing finite to show. */
int plot_means_axis(const plot_set *s, plot_axis *a, int target);
/* The domain of the intervals picture: zero, every estimate and finite end. */
int plot_intervals_axis(const plot_set *s, plot_axis *a, int target);
/* Height of a reference curve at x by linear interpolation between its points (0
 * outside them). */
double plot_curve_at(const avow_reference *ref, double x);

/* The caption of the reference curves of the means picture, one paragraph without line
 * breaks. */
void plot_reference_caption(const plot_set *s, const avow_results *r, strbuf *out);

/* The fixed-width text pictures of the report: the means as a dot chart with the
 * reference curve under them, and the intervals; lines indented by three spaces,
 * ending with the caption. */
void plot_means_text(const plot_set *s, const avow_results *r, strbuf *out);
void plot_intervals_text(const plot_set *s, strbuf *out);

/* Wrap text (NULL: nothing) at `width` characters into lines starting with `indent`
 * spaces; a word longer than a line stands alone. */
void plot_wrap(strbuf *out, const char *text, size_t indent, size_t width);

#endif
