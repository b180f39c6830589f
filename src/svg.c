/* svg.c: the pictures of `avow run` as SVG (svg.h). Layout and style are avow's own:
 * a white sheet, slate ink, one teal for what was planned and one rust for what was
 * explored, and shapes and line styles that carry the meaning in grayscale too. */
#include "avow/svg.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "doc.h"
#include "plot.h"

#define W 720                       /* width of every picture, px */
#define FONT "DejaVu Sans, Verdana, Arial, sans-serif"
#define INK "#1b2b3a"               /* text, axes, marks */
#define MUTED "#5a6978"             /* secondary text */
#define GRID "#dfe5ea"              /* tick lines */
#define GUIDE "#c3ccd4"             /* row guides */
#define CURVE_FILL "#d3e0e8"
#define PLANNED "#0b5d66"           /* deep teal */
#define EXPLORED "#9c4a06"          /* rust */
#define ROW 22                      /* height of one row of a dot or interval chart */
#define CHAR_W 7.0                  /* average width of a 12 px character */

static const char *const files[AVOW_PIC_COUNT] = {
    "means.svg", "intervals.svg", "residuals.svg", "probability.svg", "spread.svg",
};

const char *svg_picture_file(avow_picture pic)
{
    return (unsigned)pic < AVOW_PIC_COUNT ? files[pic] : "?";
}

const char *svg_picture_missing(const avow_plan *p, const avow_results *r, avow_picture pic)
{
    (void)p;
    switch (pic) {
    case AVOW_PIC_MEANS:
        return NULL;
    case AVOW_PIC_INTERVALS:
        return r->ncontrasts || r->nexplore_sets || r->nexplores
               ? NULL : "the study has no planned contrasts and no exploratory comparisons to show";
    default:
        if (!r->checks.computed)
            return "the pictures of the residuals need the checks of the assumptions "
                   "(run without --no-diagnostics)";
        if (!r->checks.resid) return "the residuals were not kept for the pictures";
        if (r->checks.nresiduals > AVOW_PLOT_MAX_POINTS)
            return "there are more residuals than the 20000 a picture draws";
        return NULL;
    }
}

/* ---- drawing helpers ---- */

/* A coordinate with one decimal, never "-0.0". */
static void num(strbuf *o, double v)
{
    double r = round(v * 10) / 10;
    if (r == 0) r = 0;
    sb_printf(o, "%.1f", r);
}

/* A number for a data attribute (17 significant digits: the binary64 value itself). */
static void datnum(strbuf *o, double v)
{
    if (v == 0) v = 0;
    sb_printf(o, "%.17g", v);
}

static void esc(strbuf *o, const char *s)
{
    if (s) html_escape(o, s, strlen(s));
}

/* <text> at (x, y); anchor "start", "middle" or "end"; attrs (may be ""), escaped text. */
static void text(strbuf *o, double x, double y, const char *anchor, const char *attrs, const char *s)
{
    sb_puts(o, "<text x=\"");
    num(o, x);
    sb_puts(o, "\" y=\"");
    num(o, y);
    sb_putc(o, '"');
    if (strcmp(anchor, "start") != 0) sb_printf(o, " text-anchor=\"%s\"", anchor);
    if (attrs[0]) sb_printf(o, " %s", attrs);
    sb_putc(o, '>');
    esc(o, s);
    sb_puts(o, "</text>\n");
}

static void line(strbuf *o, const char *cls, double x1, double y1, double x2, double y2, const char *attrs)
{
    sb_puts(o, "<line");
    if (cls) sb_printf(o, " class=\"%s\"", cls);
    sb_puts(o, " x1=\""); num(o, x1);
    sb_puts(o, "\" y1=\""); num(o, y1);
    sb_puts(o, "\" x2=\""); num(o, x2);
    sb_puts(o, "\" y2=\""); num(o, y2);
    sb_printf(o, "\" %s/>\n", attrs);
}

/* Text wrapped to lines of at most `chars` characters, one <text> per line, from y on;
 * returns the y after the last line. */
static double para(strbuf *o, double x, double y, double lh, size_t chars, const char *attrs, const char *s)
{
    strbuf w = {0};
    plot_wrap(&w, s, 0, chars);
    const char *c = w.s ? w.s : "";
    while (*c) {
        const char *e = strchr(c, '\n');
        if (!e) e = c + strlen(c);
        strbuf l = {0};
        sb_put(&l, c, (size_t)(e - c));
        text(o, x, y, "start", attrs, l.s ? l.s : "");
        if (l.failed) o->failed = 1;
        sb_free(&l);
        y += lh;
        c = *e ? e + 1 : e;
    }
    if (w.failed) o->failed = 1;
    sb_free(&w);
    return y;
}

/* Width of a string in px at 12 px, roughly. */
static double text_w(const char *s, double size)
{
    return s ? (double)utf8_width(s, strlen(s)) * CHAR_W * size / 12.0 : 0;
}

/* The mapping of a value onto [p0, p1]. */
typedef struct map { double lo, hi, p0, p1; } map;
static double at(const map *m, double v) { return m->p0 + (v - m->lo) / (m->hi - m->lo) * (m->p1 - m->p0); }

static void map_attrs(strbuf *o, const char *axis, const map *m)
{
    sb_printf(o, " data-%s-domain=\"", axis);
    datnum(o, m->lo); sb_putc(o, ' '); datnum(o, m->hi);
    sb_printf(o, "\" data-%s-range=\"", axis);
    num(o, m->p0); sb_putc(o, ' '); num(o, m->p1);
    sb_putc(o, '"');
}

/* Vertical grid lines at the ticks of a horizontal axis, from y0 to y1. */
static void vgrid(strbuf *o, const plot_axis *a, const map *m, double y0, double y1)
{
    for (size_t i = 0; i < a->nticks; i++) {
        double x = at(m, plot_tick(a, i));
        line(o, "grid", x, y0, x, y1, "stroke=\"" GRID "\" stroke-width=\"1\"");
    }
}

/* A horizontal axis at y with ticks, labels and a title under it; returns the y below. */
static double haxis(strbuf *o, const plot_axis *a, const map *m, double y, const char *title)
{
    line(o, "axis", m->p0, y, m->p1, y, "stroke=\"" INK "\" stroke-width=\"1\"");
    double last = -1e9;
    for (size_t i = 0; i < a->nticks; i++) {
        double x = at(m, plot_tick(a, i));
        line(o, "tick", x, y, x, y + 5, "stroke=\"" INK "\" stroke-width=\"1\"");
        char lab[48];
        plot_tick_label(a, i, lab, sizeof lab);
        double w = text_w(lab, 11);
        if (x - w / 2 < last + 6) continue;
        sb_puts(o, "<text class=\"ticklabel\" data-value=\"");
        datnum(o, plot_tick(a, i));
        sb_puts(o, "\" x=\"");
        num(o, x);
        sb_puts(o, "\" y=\"");
        num(o, y + 19);
        sb_puts(o, "\" text-anchor=\"middle\" font-size=\"11\" fill=\"" INK "\">");
        esc(o, lab);
        sb_puts(o, "</text>\n");
        last = x + w / 2;
    }
    /* The title centred under the axis, kept inside the picture; wrapped when long. */
    double w = text_w(title, 12);
    if (w > W - 40)
        return para(o, 20, y + 38, 16, 98, "font-size=\"12\" fill=\"" INK "\"", title) - 8;
    double cx = (m->p0 + m->p1) / 2;
    if (cx - w / 2 < 20) cx = 20 + w / 2;
    if (cx + w / 2 > W - 20) cx = W - 20 - w / 2;
    text(o, cx, y + 38, "middle", "font-size=\"12\" fill=\"" INK "\"", title);
    return y + 46;
}

/* A vertical axis at x with ticks and labels at its left and a rotated title. */
static void vaxis(strbuf *o, const plot_axis *a, const map *m, double x, const char *title)
{
    line(o, "axis", x, m->p0, x, m->p1, "stroke=\"" INK "\" stroke-width=\"1\"");
    double last = 1e9;
    for (size_t i = 0; i < a->nticks; i++) {
        double y = at(m, plot_tick(a, i));
        line(o, "tick", x - 5, y, x, y, "stroke=\"" INK "\" stroke-width=\"1\"");
        if (y > last - 14) continue;
        char lab[48];
        plot_tick_label(a, i, lab, sizeof lab);
        sb_puts(o, "<text class=\"ticklabel\" data-value=\"");
        datnum(o, plot_tick(a, i));
        sb_puts(o, "\" x=\"");
        num(o, x - 8);
        sb_puts(o, "\" y=\"");
        num(o, y + 4);
        sb_puts(o, "\" text-anchor=\"end\" font-size=\"11\" fill=\"" INK "\">");
        esc(o, lab);
        sb_puts(o, "</text>\n");
        last = y;
    }
    double cy = (m->p0 + m->p1) / 2;
    sb_puts(o, "<text x=\"");
    num(o, x - 52);
    sb_puts(o, "\" y=\"");
    num(o, cy);
    sb_puts(o, "\" text-anchor=\"middle\" transform=\"rotate(-90 ");
    num(o, x - 52); sb_putc(o, ' '); num(o, cy);
    sb_puts(o, ")\" font-size=\"12\" fill=\"" INK "\">");
    esc(o, title);
    sb_puts(o, "</text>\n");
}

/* Title and subtitle at the top; returns the y below them. */
static double heading(strbuf *o, const char *title, const char *sub)
{
    double y = para(o, 20, 28, 21, 62, "font-size=\"16\" font-weight=\"bold\" fill=\"" INK "\"", title) - 21;
    if (sub) y = para(o, 20, y + 19, 16, 100, "font-size=\"12\" fill=\"" MUTED "\"", sub) - 16;
    return y + 15;
}

/* A panel's title from y on, wrapped; returns the y where its rows start. */
static double panel_title(strbuf *o, double y, const char *title)
{
    return para(o, 20, y + 17, 17, 84, "font-size=\"13\" font-weight=\"bold\" fill=\"" INK "\"", title) - 8;
}

/* Wrap the body into a complete picture of height h. */
static void finish(strbuf *out, int standalone, double h, const char *title, const strbuf *body)
{
    int hh = (int)ceil(h);
    if (standalone) sb_puts(out, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    sb_printf(out, "<svg%s class=\"avow-picture\" width=\"%d\" height=\"%d\" viewBox=\"0 0 %d %d\" role=\"img\" "
                   "font-family=\"" FONT "\" font-size=\"12\">\n",
              standalone ? " xmlns=\"http://www.w3.org/2000/svg\"" : "", W, hh, W, hh);
    sb_puts(out, "<title>");
    esc(out, title);
    sb_puts(out, "</title>\n");
    sb_printf(out, "<rect width=\"%d\" height=\"%d\" fill=\"#ffffff\"/>\n", W, hh);
    if (body->s) sb_put(out, body->s, body->len);
    if (body->failed) out->failed = 1;
    sb_puts(out, "</svg>\n");
}

/* Room for the row labels at the left: the widest, within [60, 240] px. */
static double label_room(double widest)
{
    double w = widest + 28;
    if (w < 80) w = 80;
    if (w > 250) w = 250;
    return w;
}

/* A label cut to fit max_px (with an ellipsis). */
static void fit_label(const char *s, double max_px, strbuf *out)
{
    if (!s) return;
    size_t n = strlen(s);
    if (text_w(s, 12) <= max_px) { sb_puts(out, s); return; }
    size_t keep = (size_t)(max_px / CHAR_W);
    if (keep < 2) keep = 2;
    size_t i = 0, c = 0;
    while (i < n && c + 1 < keep) {
        i++;
        while (i < n && ((unsigned char)s[i] & 0xC0) == 0x80) i++;
        c++;
    }
    sb_put(out, s, i);
    sb_puts(out, "\xE2\x80\xA6");
}

static void row_label(strbuf *o, double x, double y, double room, const char *s)
{
    strbuf l = {0};
    fit_label(s, room - 28, &l);
    text(o, x, y, "end", "fill=\"" INK "\"", l.s ? l.s : "");
    if (l.failed) o->failed = 1;
    sb_free(&l);
}

/* ---- captions ---- */

void svg_picture_caption(const avow_plan *p, const avow_results *r, avow_picture pic, strbuf *cap)
{
    if (svg_picture_missing(p, r, pic)) return;
    const avow_assumptions *A = &r->checks;
    plot_set s;
    plot_gather(p, r, &s);
    if (s.failed) cap->failed = 1;
    switch (pic) {
    case AVOW_PIC_MEANS:
        plot_reference_caption(&s, r, cap);
        break;
    case AVOW_PIC_INTERVALS: {
        int any_planned = 0, any_explored = 0;
        for (size_t i = 0; i < s.nintervals; i++) {
            if (s.intervals[i].planned) any_planned = 1; else any_explored = 1;
        }
        sb_printf(cap, "Each row shows an estimate and its %d%% interval; the number at the right is the "
                       "estimate. ", s.conf);
        if (any_planned)
            sb_puts(cap, "Planned contrasts (filled circles, solid lines) were fixed in the study before the data. ");
        if (any_explored)
            sb_puts(cap, "Exploratory comparisons (open diamonds, dashed lines) were chosen after seeing the data or "
                         "screen every difference: leads to confirm in a new study, not conclusions. ");
        sb_puts(cap, "An interval clear of the zero line shows a difference at its level; an arrow marks an "
                     "interval open on that side (a one-sided contrast).");
        break;
    }
    case AVOW_PIC_RESIDUALS:
        sb_printf(cap, "Each of the %zu runs: its residual (the value less %s) against its fitted value. The "
                       "points should scatter evenly about the dashed zero line; a funnel (spread growing with the "
                       "fitted value) or a curve calls the model's assumptions into question.", A->nresiduals,
                  r->fit == FIT_GENERAL ? "the fitted value of the model"
                  : p->nfactors == 1 ? "its level's mean" : "its cell's mean");
        break;
    case AVOW_PIC_PROBABILITY:
        sb_printf(cap, "The %zu residuals in order, each against the value a normal sample of the same size would "
                       "be expected to have at its rank (Blom's positions). ", A->nresiduals);
        sb_puts(cap, r->resid_sd > 0
                     ? "Points close to the line, whose slope is the residual standard deviation, suggest normal "
                       "residuals; points bending away at the ends suggest long or short tails, or skew."
                     : "The residuals do not vary, so there is no line to compare them with.");
        break;
    case AVOW_PIC_SPREAD: {
        char sd[32];
        plot_short(sd, sizeof sd, r->resid_sd);
        sb_printf(cap, "The residuals of each %s on one line, with their range. Lines of similar width mean a "
                       "similar spread; the dashed lines mark one residual standard deviation (%s%s%s) either side "
                       "of zero. The spread tests of the report (Levene, Brown-Forsythe, Bartlett) put this in "
                       "numbers.", p->nfactors == 1 ? "level" : "cell", sd, p->unit ? " " : "",
                  p->unit ? p->unit : "");
        break;
    }
    default:
        break;
    }
    plot_set_free(&s);
}

/* The caption under a standalone picture, from y on; returns the y after it (y itself
 * for a picture inside a page, whose caption the page gives). */
static double caption(strbuf *b, const avow_plan *p, const avow_results *r, avow_picture pic, int standalone,
                      double y)
{
    if (!standalone) return y;
    strbuf cap = {0};
    svg_picture_caption(p, r, pic, &cap);
    y = para(b, 20, y, 16, 98, "font-size=\"12\" fill=\"" INK "\"", cap.s ? cap.s : "");
    if (cap.failed) b->failed = 1;
    sb_free(&cap);
    return y;
}

/* The width needed so far for a value printed beside the rows (11 px text), in *w. */
static void value_width(double *w, double v, int dec)
{
    char t[64];
    plot_fixed(t, sizeof t, v, dec);
    double tw = text_w(t, 11);
    if (tw > *w) *w = tw;
}

/* Room at the right for values w px wide. */
static double value_room(double w)
{
    w += 26;
    if (w < 84) w = 84;
    if (w > 240) w = 240;
    return w;
}

/* ---- the means ---- */

static void draw_means(const avow_plan *p, const avow_results *r, int standalone, strbuf *out)
{
    plot_set s;
    plot_gather(p, r, &s);
    strbuf b = {0};
    plot_axis a;
    int have_axis = !s.failed && plot_means_axis(&s, &a, 7);
    double widest = text_w("reference", 12);
    double mx = 0, vw = 0;
    for (size_t i = 0; i < s.nmeans; i++) {
        for (size_t j = 0; j < s.means[i].k && s.means[i].k <= AVOW_PLOT_MAX_ROWS; j++) {
            double w = text_w(s.means[i].means[j].label, 12);
            if (w > widest) widest = w;
        }
    }
    double room = label_room(widest);
    for (size_t i = 0; i < s.nmeans; i++)
        for (size_t j = 0; j < s.means[i].k; j++) plot_track(&mx, s.means[i].means[j].mean);
    int dec = plot_decimals(mx);
    for (size_t i = 0; i < s.nmeans; i++)
        for (size_t j = 0; j < s.means[i].k; j++) value_width(&vw, s.means[i].means[j].mean, dec);
    double right = value_room(vw);
    map m = {0, 1, room, W - right};
    if (have_axis) { m.lo = a.lo; m.hi = a.hi; }
    strbuf title = {0};
    sb_printf(&title, "Means of %s and their reference distribution", p->response);
    double y = heading(&b, title.s ? title.s : "", p->title);

    double top = y + 4;
    sb_puts(&b, "<g class=\"plot\"");
    map_attrs(&b, "x", &m);
    sb_puts(&b, ">\n");
    y = top;
    for (size_t i = 0; i < s.nmeans; i++) {
        const plot_means_panel *mp = &s.means[i];
        y = panel_title(&b, y, mp->title);
        if (mp->k > AVOW_PLOT_MAX_ROWS || !have_axis) {
            char note[160];
            if (mp->k > AVOW_PLOT_MAX_ROWS)
                snprintf(note, sizeof note, "%zu means: more than the %d a picture draws one by one", mp->k,
                         AVOW_PLOT_MAX_ROWS);
            else snprintf(note, sizeof note, "no finite means to draw");
            text(&b, room, y + 14, "start", "fill=\"" MUTED "\"", note);
            y += 22;
            continue;
        }
        vgrid(&b, &a, &m, y - 2, y + (double)mp->k * ROW + (mp->ref->ok ? 74 : 0) + 2);
        sb_printf(&b, "<g class=\"panel\" data-means=\"%zu\">\n", mp->k);
        for (size_t j = 0; j < mp->k; j++) {
            const plot_mean *pm = &mp->means[j];
            double cy = y + ROW / 2.0;
            row_label(&b, room - 12, cy + 4, room, pm->label);
            line(&b, NULL, m.p0, cy, m.p1, cy, "stroke=\"" GUIDE "\" stroke-width=\"1\" stroke-dasharray=\"1 3\"");
            if (isfinite(pm->mean)) {
                sb_puts(&b, "<circle class=\"mean\" data-label=\"");
                esc(&b, pm->label);
                sb_puts(&b, "\" cx=\"");
                num(&b, at(&m, pm->mean));
                sb_puts(&b, "\" cy=\"");
                num(&b, cy);
                sb_puts(&b, "\" r=\"5.5\" fill=\"" INK "\" stroke=\"#ffffff\" stroke-width=\"1.5\"/>\n");
            }
            char v[64];
            plot_fixed(v, sizeof v, pm->mean, dec);
            text(&b, m.p1 + 10, cy + 4, "start", "font-size=\"11\" fill=\"" MUTED "\"", v);
            y += ROW;
        }
        if (mp->ref->ok) {
            const avow_reference *ref = mp->ref;
            double base = y + 62, ht = 50;
            char dfl[48];
            snprintf(dfl, sizeof dfl, "t, %.0f df", ref->df);
            text(&b, room - 12, base - 26, "end", "font-size=\"11\" font-style=\"italic\" fill=\"" INK "\"",
                 "reference");
            text(&b, room - 12, base - 12, "end", "font-size=\"11\" fill=\"" MUTED "\"", dfl);
            text(&b, room - 12, base + 10, "end", "font-size=\"11\" fill=\"" MUTED "\"", "the means");
            sb_puts(&b, "<path class=\"curve\" data-baseline=\"");
            num(&b, base);
            sb_puts(&b, "\" data-height=\"");
            num(&b, ht);
            sb_puts(&b, "\" d=\"M");
            num(&b, at(&m, ref->x[0])); sb_putc(&b, ','); num(&b, base);
            for (size_t k = 0; k < AVOW_CURVE_POINTS; k++) {
                sb_puts(&b, " L");
                num(&b, at(&m, ref->x[k])); sb_putc(&b, ',');
                num(&b, base - ht * ref->height[k]);
            }
            sb_puts(&b, " L");
            num(&b, at(&m, ref->x[AVOW_CURVE_POINTS - 1])); sb_putc(&b, ','); num(&b, base);
            sb_puts(&b, " Z\" fill=\"" CURVE_FILL "\" stroke=\"" INK "\" stroke-width=\"1.3\" "
                        "stroke-linejoin=\"round\"/>\n");
            /* Its centre, and every mean again on the curve's baseline. */
            line(&b, "centre", at(&m, ref->centre), base - ht, at(&m, ref->centre), base,
                 "stroke=\"" INK "\" stroke-width=\"1\" stroke-dasharray=\"2 2\"");
            line(&b, NULL, m.p0, base, m.p1, base, "stroke=\"" INK "\" stroke-width=\"1\"");
            for (size_t j = 0; j < mp->k; j++) {
                if (!isfinite(mp->means[j].mean)) continue;
                double x = at(&m, mp->means[j].mean);
                sb_puts(&b, "<path class=\"rug\" data-label=\"");
                esc(&b, mp->means[j].label);
                sb_puts(&b, "\" d=\"M");
                num(&b, x); sb_putc(&b, ','); num(&b, base + 1);
                sb_puts(&b, " l-4.5,8 h9 Z\" fill=\"" INK "\"/>\n");
            }
            y += 74;
        }
        sb_puts(&b, "</g>\n");
        y += 8;
    }
    sb_puts(&b, "</g>\n");
    if (have_axis) y = haxis(&b, &a, &m, y + 6, s.value_label);
    y += 10;
    y = caption(&b, p, r, AVOW_PIC_MEANS, standalone, y) + 6;
    if (title.failed) out->failed = 1;
    finish(out, standalone, y + 6, title.s ? title.s : "", &b);
    if (s.failed) out->failed = 1;
    sb_free(&title);
    sb_free(&b);
    plot_set_free(&s);
}

/* ---- the intervals ---- */

static void estimate_mark(strbuf *o, int planned, double x, double y)
{
    if (planned) {
        sb_puts(o, "<circle class=\"estimate\" cx=\"");
        num(o, x);
        sb_puts(o, "\" cy=\"");
        num(o, y);
        sb_puts(o, "\" r=\"5\" fill=\"" PLANNED "\" stroke=\"#ffffff\" stroke-width=\"1.2\"/>\n");
    } else {
        sb_puts(o, "<path class=\"estimate\" d=\"M");
        num(o, x); sb_putc(o, ','); num(o, y - 6);
        sb_puts(o, " L"); num(o, x + 6); sb_putc(o, ','); num(o, y);
        sb_puts(o, " L"); num(o, x); sb_putc(o, ','); num(o, y + 6);
        sb_puts(o, " L"); num(o, x - 6); sb_putc(o, ','); num(o, y);
        sb_puts(o, " Z\" fill=\"#ffffff\" stroke=\"" EXPLORED "\" stroke-width=\"2\"/>\n");
    }
}

static const char *ci_style(int planned)
{
    return planned ? "stroke=\"" PLANNED "\" stroke-width=\"2.5\""
                   : "stroke=\"" EXPLORED "\" stroke-width=\"2\" stroke-dasharray=\"6 3\"";
}

static void draw_intervals(const avow_plan *p, const avow_results *r, int standalone, strbuf *out)
{
    plot_set s;
    plot_gather(p, r, &s);
    strbuf b = {0};
    plot_axis a;
    if (s.failed || !plot_intervals_axis(&s, &a, 7)) { out->failed |= s.failed; plot_set_free(&s); return; }
    double widest = 0;
    double mx = 0, vw = 0;
    for (size_t i = 0; i < s.nintervals; i++) {
        for (size_t j = 0; j < s.intervals[i].n && s.intervals[i].n <= AVOW_PLOT_MAX_ROWS; j++) {
            double w = text_w(s.intervals[i].rows[j].label, 12);
            if (w > widest) widest = w;
        }
    }
    double room = label_room(widest);
    for (size_t i = 0; i < s.nintervals; i++)
        for (size_t j = 0; j < s.intervals[i].n; j++) plot_track(&mx, s.intervals[i].rows[j].est);
    int dec = plot_decimals(mx);
    for (size_t i = 0; i < s.nintervals; i++)
        for (size_t j = 0; j < s.intervals[i].n; j++) value_width(&vw, s.intervals[i].rows[j].est, dec);
    double right = value_room(vw);
    map m = {a.lo, a.hi, room, W - right};
    strbuf title = {0};
    sb_printf(&title, "Comparisons of %s: estimates and intervals", p->response);
    double y = heading(&b, title.s ? title.s : "", p->title);

    /* The legend. */
    int any_planned = 0, any_explored = 0;
    for (size_t i = 0; i < s.nintervals; i++) {
        if (s.intervals[i].planned) any_planned = 1; else any_explored = 1;
    }
    double lx = 20, ly = y + 10;
    sb_puts(&b, "<g class=\"legend\">\n");
    if (any_planned) {
        line(&b, NULL, lx, ly, lx + 34, ly, ci_style(1));
        estimate_mark(&b, 1, lx + 17, ly);
        text(&b, lx + 42, ly + 4, "start", "fill=\"" INK "\"", "planned contrast, fixed before the data");
        lx += 42 + text_w("planned contrast, fixed before the data", 12) + 24;
    }
    if (any_explored) {
        line(&b, NULL, lx, ly, lx + 34, ly, ci_style(0));
        estimate_mark(&b, 0, lx + 17, ly);
        text(&b, lx + 42, ly + 4, "start", "fill=\"" INK "\"", "exploratory comparison");
    }
    sb_puts(&b, "</g>\n");
    y += 30;

    double top = y + 4;
    double zx = at(&m, 0);
    sb_puts(&b, "<g class=\"plot\"");
    map_attrs(&b, "x", &m);
    sb_puts(&b, ">\n");
    y = top;
    for (size_t i = 0; i < s.nintervals; i++) {
        const plot_interval_panel *ip = &s.intervals[i];
        y = panel_title(&b, y, ip->title);
        if (ip->n > AVOW_PLOT_MAX_ROWS) {
            char note[160];
            snprintf(note, sizeof note, "%zu intervals: more than the %d a picture draws one by one", ip->n,
                     AVOW_PLOT_MAX_ROWS);
            text(&b, room, y + 14, "start", "fill=\"" MUTED "\"", note);
            y += 30;
            continue;
        }
        /* Grid and the zero line behind this panel's rows (not through its title). */
        vgrid(&b, &a, &m, y - 2, y + (double)ip->n * ROW + 2);
        line(&b, "zero", zx, y - 2, zx, y + (double)ip->n * ROW + 2, "stroke=\"" INK "\" stroke-width=\"1.6\"");
        sb_printf(&b, "<g class=\"panel %s\" data-intervals=\"%zu\">\n", ip->planned ? "planned" : "exploratory",
                  ip->n);
        for (size_t j = 0; j < ip->n; j++) {
            const plot_interval *iv = &ip->rows[j];
            double cy = y + ROW / 2.0;
            row_label(&b, room - 12, cy + 4, room, iv->label);
            sb_printf(&b, "<g class=\"interval %s\" data-label=\"", ip->planned ? "planned" : "exploratory");
            esc(&b, iv->label);
            sb_puts(&b, "\">\n");
            if (!isnan(iv->lo) && !isnan(iv->hi)) {
                double x1 = isfinite(iv->lo) ? at(&m, iv->lo) : m.p0 - 4;
                double x2 = isfinite(iv->hi) ? at(&m, iv->hi) : m.p1 + 4;
                line(&b, "ci", x1, cy, x2, cy, ci_style(ip->planned));
                const char *col = ip->planned ? PLANNED : EXPLORED;
                char st[64];
                snprintf(st, sizeof st, "stroke=\"%s\" stroke-width=\"2\"", col);
                if (isfinite(iv->lo)) line(&b, "cap", x1, cy - 5, x1, cy + 5, st);
                else {
                    sb_puts(&b, "<path class=\"open\" d=\"M");
                    num(&b, x1 - 2); sb_putc(&b, ','); num(&b, cy);
                    sb_printf(&b, " l8,-5 v10 Z\" fill=\"%s\"/>\n", col);
                }
                if (isfinite(iv->hi)) line(&b, "cap", x2, cy - 5, x2, cy + 5, st);
                else {
                    sb_puts(&b, "<path class=\"open\" d=\"M");
                    num(&b, x2 + 2); sb_putc(&b, ','); num(&b, cy);
                    sb_printf(&b, " l-8,-5 v10 Z\" fill=\"%s\"/>\n", col);
                }
            }
            if (isfinite(iv->est)) estimate_mark(&b, ip->planned, at(&m, iv->est), cy);
            sb_puts(&b, "</g>\n");
            char v[64];
            plot_fixed(v, sizeof v, iv->est, dec);
            text(&b, m.p1 + 14, cy + 4, "start", "font-size=\"11\" fill=\"" MUTED "\"", v);
            y += ROW;
        }
        sb_puts(&b, "</g>\n");
        y += 8;
    }
    sb_puts(&b, "</g>\n");
    strbuf xt = {0};
    sb_printf(&xt, "difference in %s", s.value_label ? s.value_label : "");
    y = haxis(&b, &a, &m, y + 6, xt.s ? xt.s : "");
    if (xt.failed) out->failed = 1;
    sb_free(&xt);
    y = caption(&b, p, r, AVOW_PIC_INTERVALS, standalone, y + 10);
    if (title.failed) out->failed = 1;
    finish(out, standalone, y + 8, title.s ? title.s : "", &b);
    if (s.failed) out->failed = 1;
    sb_free(&title);
    sb_free(&b);
    plot_set_free(&s);
}

/* ---- the residuals ---- */

static void value_title(const avow_plan *p, const char *what, strbuf *o)
{
    const char *unit = p->unit ? p->unit : "";
    sb_printf(o, "%s%s%s%s", what, unit[0] ? " (" : "", unit, unit[0] ? ")" : "");
}

/* Symmetric domain about zero covering every residual. */
static int resid_axis(const avow_results *r, plot_axis *a, int target)
{
    double m = 0;
    for (size_t i = 0; i < r->checks.nresiduals; i++) {
        double e = fabs(r->checks.resid[i].residual);
        if (isfinite(e) && e > m) m = e;
    }
    if (m == 0) m = r->resid_sd > 0 ? r->resid_sd : 1;
    return plot_axis_make(a, -m, m, target);
}

static void point(strbuf *o, double x, double y, const avow_residual *e)
{
    sb_printf(o, "<circle class=\"point\" data-line=\"%llu\" cx=\"", (unsigned long long)e->line);
    num(o, x);
    sb_puts(o, "\" cy=\"");
    num(o, y);
    sb_puts(o, "\" r=\"3.6\"/>\n");
}

static void draw_scatter(const avow_plan *p, const avow_results *r, int probability, int standalone, strbuf *out)
{
    const avow_assumptions *A = &r->checks;
    strbuf b = {0}, title = {0}, xt = {0}, yt = {0};
    if (probability) sb_printf(&title, "Normal probability plot of the residuals of %s", p->response);
    else sb_printf(&title, "Residuals of %s against fitted values", p->response);
    double y = heading(&b, title.s ? title.s : "", p->title);
    plot_axis ax, ay;
    double lo = 0, hi = 0;
    int any = 0;
    for (size_t i = 0; i < A->nresiduals; i++) {
        double v = probability ? A->resid[i].normal_score : A->resid[i].fitted;
        if (!isfinite(v)) continue;
        if (!any || v < lo) lo = v;
        if (!any || v > hi) hi = v;
        any = 1;
    }
    if (probability) { double mm = fabs(lo) > fabs(hi) ? fabs(lo) : fabs(hi); lo = -mm; hi = mm; }
    else if (any) { double pad = (hi - lo) * 0.04; lo -= pad; hi += pad; }
    if (!any || !plot_axis_make(&ax, lo, hi, 7) || !resid_axis(r, &ay, 6)) {
        sb_free(&b); sb_free(&title); return;
    }
    double top = y + 10, bottom = top + 320;
    map mx = {ax.lo, ax.hi, 92, W - 30};
    map my = {ay.lo, ay.hi, bottom, top};
    /* Grid, zero line, axes. */
    vgrid(&b, &ax, &mx, top, bottom);
    for (size_t i = 0; i < ay.nticks; i++) {
        double yy = at(&my, plot_tick(&ay, i));
        line(&b, "grid", mx.p0, yy, mx.p1, yy, "stroke=\"" GRID "\" stroke-width=\"1\"");
    }
    line(&b, "zero", mx.p0, at(&my, 0), mx.p1, at(&my, 0),
         "stroke=\"" INK "\" stroke-width=\"1.2\" stroke-dasharray=\"6 4\"");
    value_title(p, "residual", &yt);
    vaxis(&b, &ay, &my, mx.p0, yt.s ? yt.s : "");
    sb_puts(&b, "<g class=\"plot\"");
    map_attrs(&b, "x", &mx);
    map_attrs(&b, "y", &my);
    sb_printf(&b, " data-points=\"%zu\">\n", A->nresiduals);
    if (probability && r->resid_sd > 0) {
        /* The line of a normal sample with the residual standard deviation. */
        double z0 = ax.lo, z1 = ax.hi;
        if (r->resid_sd * z1 > ay.hi) z1 = ay.hi / r->resid_sd;
        if (r->resid_sd * z0 < ay.lo) z0 = ay.lo / r->resid_sd;
        line(&b, "guide", at(&mx, z0), at(&my, r->resid_sd * z0), at(&mx, z1), at(&my, r->resid_sd * z1),
             "stroke=\"" PLANNED "\" stroke-width=\"1.6\"");
    }
    sb_puts(&b, "<g fill=\"none\" stroke=\"" INK "\" stroke-width=\"1.3\">\n");
    for (size_t i = 0; i < A->nresiduals; i++) {
        const avow_residual *e = &A->resid[i];
        double xv = probability ? e->normal_score : e->fitted;
        if (!isfinite(xv) || !isfinite(e->residual)) continue;
        point(&b, at(&mx, xv), at(&my, e->residual), e);
    }
    sb_puts(&b, "</g>\n</g>\n");
    if (probability) sb_puts(&xt, "expected value of a standard normal sample of this size");
    else value_title(p, "fitted value", &xt);
    y = haxis(&b, &ax, &mx, bottom, xt.s ? xt.s : "");
    y = caption(&b, p, r, probability ? AVOW_PIC_PROBABILITY : AVOW_PIC_RESIDUALS, standalone, y + 10);
    if (title.failed) out->failed = 1;
    finish(out, standalone, y + 8, title.s ? title.s : "", &b);
    if (xt.failed || yt.failed) out->failed = 1;
    sb_free(&b); sb_free(&title); sb_free(&xt); sb_free(&yt);
}

static void draw_spread(const avow_plan *p, const avow_results *r, int standalone, strbuf *out)
{
    const avow_assumptions *A = &r->checks;
    plot_set s;
    plot_gather(p, r, &s);
    plot_axis a;
    if (s.failed || !resid_axis(r, &a, 7)) { out->failed |= s.failed; plot_set_free(&s); return; }
    const plot_means_panel *cells = &s.means[0];
    /* The cells as rows, in plan order (empty cells have no row). */
    size_t T = p->ncells;
    long *row_of = avow_calloc(T ? T : 1, sizeof *row_of);
    double *mn = avow_calloc(T ? T : 1, sizeof *mn), *mx_ = avow_calloc(T ? T : 1, sizeof *mx_);
    size_t *cnt = avow_calloc(T ? T : 1, sizeof *cnt);
    if (!row_of || !mn || !mx_ || !cnt) {
        out->failed = 1;
        avow_free(row_of); avow_free(mn); avow_free(mx_); avow_free(cnt);
        plot_set_free(&s);
        return;
    }
    size_t nrows = 0;
    for (size_t t = 0; t < T; t++) row_of[t] = r->levels[t].n ? (long)nrows++ : -1;
    for (size_t i = 0; i < A->nresiduals; i++) {
        const avow_residual *e = &A->resid[i];
        size_t t = e->cell;
        if (t >= T || !isfinite(e->residual)) continue;
        if (!cnt[t] || e->residual < mn[t]) mn[t] = e->residual;
        if (!cnt[t] || e->residual > mx_[t]) mx_[t] = e->residual;
        cnt[t]++;
    }
    double widest = 0;
    for (size_t j = 0; j < cells->k; j++) {
        double w = text_w(cells->means[j].label, 12);
        if (w > widest) widest = w;
    }
    double room = label_room(widest);
    strbuf b = {0}, title = {0};
    sb_printf(&title, "Spread of the residuals of %s by %s", p->response, p->nfactors == 1 ? "level" : "cell");
    double y = heading(&b, title.s ? title.s : "", p->title);
    map m = {a.lo, a.hi, room, W - 70};
    double top = y + 22;
    int too_many = nrows > AVOW_PLOT_MAX_ROWS;
    double h = too_many ? 30 : (double)nrows * ROW + 8;
    vgrid(&b, &a, &m, top, top + h);
    line(&b, "zero", at(&m, 0), top, at(&m, 0), top + h, "stroke=\"" INK "\" stroke-width=\"1.4\"");
    if (r->resid_sd > 0)
        for (int sgn = -1; sgn <= 1; sgn += 2) {
            double v = sgn * r->resid_sd;
            if (v < a.lo || v > a.hi) continue;
            line(&b, "sd", at(&m, v), top, at(&m, v), top + h,
                 "stroke=\"" PLANNED "\" stroke-width=\"1.3\" stroke-dasharray=\"5 4\"");
            text(&b, at(&m, v), top - 4, "middle", "font-size=\"11\" fill=\"" PLANNED "\"",
                 sgn < 0 ? "-1 sd" : "+1 sd");
        }
    sb_puts(&b, "<g class=\"plot\"");
    map_attrs(&b, "x", &m);
    sb_printf(&b, " data-points=\"%zu\">\n", too_many ? (size_t)0 : A->nresiduals);
    if (too_many) {
        char note[160];
        snprintf(note, sizeof note, "%zu %s: more than the %d a picture draws one by one", nrows,
                 p->nfactors == 1 ? "levels" : "cells", AVOW_PLOT_MAX_ROWS);
        text(&b, room, top + 18, "start", "fill=\"" MUTED "\"", note);
    } else {
        for (size_t t = 0, j = 0; t < T; t++) {
            if (row_of[t] < 0) continue;
            double cy = top + 4 + (double)row_of[t] * ROW + ROW / 2.0;
            row_label(&b, room - 12, cy + 4, room, cells->means[j].label);
            if (cnt[t])
                line(&b, "range", at(&m, mn[t]), cy, at(&m, mx_[t]), cy, "stroke=\"" MUTED "\" stroke-width=\"1\"");
            char nn[32];
            snprintf(nn, sizeof nn, "n %llu", (unsigned long long)r->levels[t].n);
            text(&b, m.p1 + 12, cy + 4, "start", "font-size=\"11\" fill=\"" MUTED "\"", nn);
            j++;
        }
        sb_puts(&b, "<g fill=\"" INK "\" fill-opacity=\"0.25\" stroke=\"" INK "\" stroke-width=\"1.2\">\n");
        for (size_t i = 0; i < A->nresiduals; i++) {
            const avow_residual *e = &A->resid[i];
            if (e->cell >= T || row_of[e->cell] < 0 || !isfinite(e->residual)) continue;
            double cy = top + 4 + (double)row_of[e->cell] * ROW + ROW / 2.0;
            point(&b, at(&m, e->residual), cy, e);
        }
        sb_puts(&b, "</g>\n");
    }
    sb_puts(&b, "</g>\n");
    strbuf xt = {0};
    value_title(p, "residual", &xt);
    y = haxis(&b, &a, &m, top + h + 4, xt.s ? xt.s : "");
    y = caption(&b, p, r, AVOW_PIC_SPREAD, standalone, y + 10);
    if (title.failed) out->failed = 1;
    finish(out, standalone, y + 8, title.s ? title.s : "", &b);
    if (xt.failed || s.failed) out->failed = 1;
    sb_free(&xt); sb_free(&b); sb_free(&title);
    avow_free(row_of); avow_free(mn); avow_free(mx_); avow_free(cnt);
    plot_set_free(&s);
}

void render_svg(const avow_plan *p, const avow_results *r, avow_picture pic, int standalone, strbuf *out)
{
    if (svg_picture_missing(p, r, pic)) return;
    switch (pic) {
    case AVOW_PIC_MEANS: draw_means(p, r, standalone, out); break;
    case AVOW_PIC_INTERVALS: draw_intervals(p, r, standalone, out); break;
    case AVOW_PIC_RESIDUALS: draw_scatter(p, r, 0, standalone, out); break;
    case AVOW_PIC_PROBABILITY: draw_scatter(p, r, 1, standalone, out); break;
    case AVOW_PIC_SPREAD: draw_spread(p, r, standalone, out); break;
    default: break;
    }
}
