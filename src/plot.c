/* plot.c: the panels of the pictures, their axes, and the fixed-width text pictures of
 * the report (plot.h). Rendering only: every number drawn comes from the results. */
#include "plot.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

/* ---- axes ---- */

/* 10^e for an integer e, exact for |e| <= 22. */
static double pow10i(int e) { return pow(10.0, (double)e); }

int plot_axis_make(plot_axis *a, double lo, double hi, int target)
{
    memset(a, 0, sizeof *a);
    if (!isfinite(lo) || !isfinite(hi)) return 0;
    if (hi < lo) { double t = lo; lo = hi; hi = t; }
    if (hi == lo) {
        double d = lo != 0 ? fabs(lo) * 0.05 : 1;
        lo -= d; hi += d;
    }
    if (target < 1) target = 1;
    double raw = (hi - lo) / target;
    int e = (int)floor(log10(raw));
    double f = raw / pow10i(e);
    int mant;
    if (f <= 1 + 1e-9) mant = 1;
    else if (f <= 2 + 1e-9) mant = 2;
    else if (f <= 5 + 1e-9) mant = 5;
    else { mant = 1; e++; }
    double step = mant * pow10i(e);
    double k0 = floor(lo / step + 1e-9), k1 = ceil(hi / step - 1e-9);
    if (!isfinite(step) || step <= 0 || fabs(k0) > 1e15 || fabs(k1) > 1e15 || k1 - k0 > 1000) {
        /* Values far from zero relative to their spread: two plain ticks at the ends. */
        a->lo = lo; a->hi = hi; a->mant = 0; a->expo = 0; a->k0 = 0; a->nticks = 2;
        a->decimals = -1;
        return 1;
    }
    if (k1 <= k0) k1 = k0 + 1;
    a->mant = mant; a->expo = e; a->k0 = (long long)k0;
    a->nticks = (size_t)(k1 - k0) + 1;
    a->decimals = e < 0 ? -e : 0;
    a->lo = plot_tick(a, 0);
    a->hi = plot_tick(a, a->nticks - 1);
    return 1;
}

double plot_tick(const plot_axis *a, size_t i)
{
    if (a->mant == 0) return i == 0 ? a->lo : a->hi;
    double m = (double)((a->k0 + (long long)i) * a->mant);
    return a->expo >= 0 ? m * pow10i(a->expo) : m / pow10i(-a->expo);
}

void plot_tick_label(const plot_axis *a, size_t i, char *buf, size_t size)
{
    double v = plot_tick(a, i);
    if (a->decimals < 0) snprintf(buf, size, "%.6g", v);
    else snprintf(buf, size, "%.*f", a->decimals, v);
    /* No negative zero. */
    int zero = 1;
    for (const char *c = buf; *c; c++) if (*c >= '1' && *c <= '9') zero = 0;
    if (zero && buf[0] == '-') memmove(buf, buf + 1, strlen(buf));
}

void plot_track(double *m, double v)
{
    if (isfinite(v) && fabs(v) > *m) *m = fabs(v);
}

int plot_decimals(double m)
{
    if (m == 0) return 1;
    if (m >= 1e15) return -1;
    int d = 5 - (int)floor(log10(m));
    if (d < 1) d = 1;
    if (d > 12) d = 12;
    return d;
}

void plot_fixed(char *buf, size_t size, double v, int decimals)
{
    if (!isfinite(v)) snprintf(buf, size, isnan(v) ? "-" : v > 0 ? "inf" : "-inf");
    else if (decimals < 0) snprintf(buf, size, "%.6e", v);
    else snprintf(buf, size, "%.*f", decimals, v);
}

void plot_short(char *buf, size_t size, double v)
{
    if (!isfinite(v)) { snprintf(buf, size, "-"); return; }
    snprintf(buf, size, "%.4g", v);
}

/* ---- panels ---- */

static char *dupf(plot_set *s, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
static char *dupf(plot_set *s, const char *fmt, ...)
{
    strbuf b = {0};
    va_list ap;
    va_start(ap, fmt);
    sb_vprintf(&b, fmt, ap);
    va_end(ap);
    if (b.failed || !b.s) { sb_free(&b); s->failed = 1; return NULL; }
    return b.s;
}

static const char *mean_name(const avow_plan *p, const plan_explore *e, size_t i)
{
    if (e->factor < 0) return plan_cell_name(p, i);
    return p->factors[e->factor].levels[i].name;
}

static void add_contrasts(plot_set *s, plot_interval_panel *ip, const avow_contrast_result *cs, size_t n)
{
    ip->rows = avow_calloc(n ? n : 1, sizeof *ip->rows);
    if (!ip->rows) { s->failed = 1; return; }
    for (size_t i = 0; i < n; i++) {
        plot_interval *iv = &ip->rows[ip->n++];
        iv->label = dupf(s, "%s", cs[i].pc->name);
        iv->est = cs[i].estimate;
        iv->lo = cs[i].ci_lo;
        iv->hi = cs[i].ci_hi;
        iv->reject = cs[i].reject;
    }
}

void plot_gather(const avow_plan *p, const avow_results *r, plot_set *s)
{
    memset(s, 0, sizeof *s);
    double alpha = rat_to_double(p->alpha);
    s->conf = (int)lround((1 - alpha) * 100);
    const char *unit = p->unit ? p->unit : "";
    s->unit = dupf(s, "%s", unit);
    if (p->response_label)
        s->value_label = dupf(s, "%s: %s%s%s%s", p->response, p->response_label, unit[0] ? " (" : "", unit,
                              unit[0] ? ")" : "");
    else
        s->value_label = dupf(s, "%s%s%s%s", p->response, unit[0] ? " (" : "", unit, unit[0] ? ")" : "");

    /* Means: the cells (levels), then with several factors each factor's margins. */
    size_t np = 1 + (r->nmargins ? p->nfactors : 0);
    s->means = avow_calloc(np, sizeof *s->means);
    if (!s->means) { s->failed = 1; return; }
    plot_means_panel *m = &s->means[s->nmeans++];
    m->ref = &r->ref_cells;
    m->pooled_blocks = p->block != NULL;
    m->short_name = dupf(s, "%s", p->nfactors == 1 ? p->factors[0].name : "cells");
    if (p->nfactors == 1) {
        const plan_factor *f = &p->factors[0];
        m->title = f->label ? dupf(s, "%s: %s", f->name, f->label) : dupf(s, "%s", f->name);
    } else {
        strbuf t = {0};
        sb_puts(&t, "cells: ");
        for (size_t f = 0; f < p->nfactors; f++) sb_printf(&t, "%s%s", f ? " by " : "", p->factors[f].name);
        m->title = t.s;
        if (t.failed || !t.s) { sb_free(&t); m->title = NULL; s->failed = 1; }
    }
    m->means = avow_calloc(r->ncells ? r->ncells : 1, sizeof *m->means);
    if (!m->means) { s->failed = 1; return; }
    for (size_t i = 0; i < r->ncells; i++) {
        if (!r->levels[i].n) continue;
        plot_mean *pm = &m->means[m->k++];
        if (p->nfactors == 1) pm->label = dupf(s, "%s", p->factors[0].levels[i].name);
        else {
            strbuf t = {0};
            for (size_t f = 0; f < p->nfactors; f++)
                sb_printf(&t, "%s%s", f ? ", " : "", p->factors[f].levels[plan_cell_level(p, i, f)].name);
            pm->label = t.s;
            if (t.failed || !t.s) { sb_free(&t); pm->label = NULL; s->failed = 1; }
        }
        pm->mean = r->levels[i].mean;
        pm->n = r->levels[i].n;
    }
    for (size_t f = 0, i = 0; r->nmargins && f < p->nfactors; f++) {
        plot_means_panel *mf = &s->means[s->nmeans++];
        const plan_factor *pf = &p->factors[f];
        mf->title = dupf(s, "%s%s%s, %s", pf->name, pf->label ? ": " : "", pf->label ? pf->label : "",
                         p->nfactors > 1 ? "averaged over the other factors" : "adjusted for the blocks");
        mf->ref = &r->ref_margins[f];
        mf->short_name = dupf(s, "%s", pf->name);
        mf->margins = 1;
        mf->means = avow_calloc(pf->nlevels ? pf->nlevels : 1, sizeof *mf->means);
        if (!mf->means) { s->failed = 1; return; }
        for (; i < r->nmargins && r->margins[i].factor == f; i++) {
            plot_mean *pm = &mf->means[mf->k++];
            pm->label = dupf(s, "%s", pf->levels[r->margins[i].level].name);
            pm->mean = r->margins[i].mean;
            pm->n = r->margins[i].n;
        }
    }

    /* Intervals: the planned contrasts, each family of exploratory ones, the
     * exploratory contrasts. */
    size_t ni = (r->ncontrasts ? 1 : 0) + r->nexplore_sets + (r->nexplores ? 1 : 0);
    if (!ni) return;
    s->intervals = avow_calloc(ni, sizeof *s->intervals);
    if (!s->intervals) { s->failed = 1; return; }
    if (r->ncontrasts) {
        plot_interval_panel *ip = &s->intervals[s->nintervals++];
        ip->planned = 1;
        int simultaneous = r->contrasts[0].ci_simultaneous;
        ip->title = dupf(s, "Planned contrasts, %s: %d%% intervals%s", mult_words(p->adjust), s->conf,
                         simultaneous ? ", simultaneous" : " per comparison");
        add_contrasts(s, ip, r->contrasts, r->ncontrasts);
    }
    for (size_t k = 0; k < r->nexplore_sets; k++) {
        const avow_explore_result *er = &r->explore_sets[k];
        const plan_explore *e = er->set;
        plot_interval_panel *ip = &s->intervals[s->nintervals++];
        const char *whats = e->factor < 0 ? "cells" : p->nfactors == 1 ? "levels" : NULL;
        strbuf t = {0};
        if (e->kind == EXPLORE_PAIRS) {
            if (whats) sb_printf(&t, "Every pair of %s", whats);
            else sb_printf(&t, "Every pair of levels of %s", p->factors[e->factor].name);
        } else {
            sb_printf(&t, "Each %s against %s", e->factor < 0 ? "cell" : p->nfactors == 1 ? "level"
                                                 : p->factors[e->factor].name,
                      mean_name(p, e, e->control));
        }
        if (er->slice >= 0)
            sb_printf(&t, " within %s = %s", p->factors[e->within].name, p->factors[e->within].levels[er->slice].name);
        sb_printf(&t, ", %s: simultaneous %d%% intervals",
                  e->kind == EXPLORE_VERSUS ? "Dunnett" : p->separate_variances ? "Games-Howell" : "Tukey-Kramer",
                  s->conf);
        ip->title = t.s;
        if (t.failed || !t.s) { sb_free(&t); ip->title = NULL; s->failed = 1; }
        ip->rows = avow_calloc(er->npairs ? er->npairs : 1, sizeof *ip->rows);
        if (!ip->rows) { s->failed = 1; return; }
        for (size_t i = 0; i < er->npairs; i++) {
            const avow_pair_result *pr = &er->pairs[i];
            plot_interval *iv = &ip->rows[ip->n++];
            iv->label = dupf(s, "%s - %s", mean_name(p, e, pr->a), mean_name(p, e, pr->b));
            iv->est = pr->estimate;
            iv->lo = pr->ci_lo;
            iv->hi = pr->ci_hi;
            iv->reject = pr->reject;
        }
    }
    if (r->nexplores) {
        plot_interval_panel *ip = &s->intervals[s->nintervals++];
        ip->title = dupf(s, "Exploratory contrasts, Scheffe: simultaneous %d%% intervals", s->conf);
        add_contrasts(s, ip, r->explores, r->nexplores);
    }
}

void plot_set_free(plot_set *s)
{
    for (size_t i = 0; i < s->nmeans; i++) {
        for (size_t j = 0; j < s->means[i].k; j++) avow_free(s->means[i].means[j].label);
        avow_free(s->means[i].means);
        avow_free(s->means[i].title);
        avow_free(s->means[i].short_name);
    }
    avow_free(s->means);
    for (size_t i = 0; i < s->nintervals; i++) {
        for (size_t j = 0; j < s->intervals[i].n; j++) avow_free(s->intervals[i].rows[j].label);
        avow_free(s->intervals[i].rows);
        avow_free(s->intervals[i].title);
    }
    avow_free(s->intervals);
    avow_free(s->value_label);
    avow_free(s->unit);
    memset(s, 0, sizeof *s);
}

static void widen(double v, double *lo, double *hi, int *any)
{
    if (!isfinite(v)) return;
    if (!*any || v < *lo) *lo = v;
    if (!*any || v > *hi) *hi = v;
    *any = 1;
}

int plot_means_axis(const plot_set *s, plot_axis *a, int target)
{
    double lo = 0, hi = 0;
    int any = 0;
    for (size_t i = 0; i < s->nmeans; i++) {
        const plot_means_panel *m = &s->means[i];
        if (m->k > AVOW_PLOT_MAX_ROWS) continue;
        for (size_t j = 0; j < m->k; j++) widen(m->means[j].mean, &lo, &hi, &any);
        if (m->ref->ok) {
            widen(m->ref->x[0], &lo, &hi, &any);
            widen(m->ref->x[AVOW_CURVE_POINTS - 1], &lo, &hi, &any);
        }
    }
    return any && plot_axis_make(a, lo, hi, target);
}

int plot_intervals_axis(const plot_set *s, plot_axis *a, int target)
{
    double lo = 0, hi = 0;
    int any = 1;
    for (size_t i = 0; i < s->nintervals; i++) {
        const plot_interval_panel *ip = &s->intervals[i];
        if (ip->n > AVOW_PLOT_MAX_ROWS) continue;
        for (size_t j = 0; j < ip->n; j++) {
            widen(ip->rows[j].est, &lo, &hi, &any);
            widen(ip->rows[j].lo, &lo, &hi, &any);
            widen(ip->rows[j].hi, &lo, &hi, &any);
        }
    }
    return plot_axis_make(a, lo, hi, target);
}

double plot_curve_at(const avow_reference *ref, double x)
{
    if (!ref->ok || !(x >= ref->x[0]) || !(x <= ref->x[AVOW_CURVE_POINTS - 1])) return 0;
    size_t lo = 0, hi = AVOW_CURVE_POINTS - 1;
    while (hi - lo > 1) {
        size_t mid = (lo + hi) / 2;
        if (ref->x[mid] <= x) lo = mid; else hi = mid;
    }
    double w = ref->x[hi] - ref->x[lo];
    double f = w > 0 ? (x - ref->x[lo]) / w : 0;
    return ref->height[lo] + f * (ref->height[hi] - ref->height[lo]);
}

/* "0.4912 MPa" */
static void with_unit(const plot_set *s, double v, strbuf *out)
{
    char a[32];
    plot_short(a, sizeof a, v);
    sb_printf(out, "%s%s%s", a, s->unit && s->unit[0] ? " " : "", s->unit ? s->unit : "");
}

/* "4 runs", "5.769 runs (the harmonic mean of the 5 to 6 runs behind the means)" */
static void runs_words(const plot_means_panel *m, strbuf *out)
{
    char b[32];
    const avow_reference *ref = m->ref;
    plot_short(b, sizeof b, ref->n_h);
    const char *eff = m->margins ? "effective " : "";
    sb_printf(out, "%s %sruns", b, eff);
    if (ref->equal_n) return;
    sb_puts(out, " (the harmonic mean of the ");
    if (!m->margins && m->k) {
        uint64_t lo = m->means[0].n, hi = m->means[0].n;
        for (size_t i = 1; i < m->k; i++) {
            if (m->means[i].n < lo) lo = m->means[i].n;
            if (m->means[i].n > hi) hi = m->means[i].n;
        }
        sb_printf(out, "%llu to %llu ", (unsigned long long)lo, (unsigned long long)hi);
    }
    sb_printf(out, "%sruns behind the means)", eff);
}

void plot_reference_caption(const plot_set *s, const avow_results *r, strbuf *out)
{
    size_t drawn = 0, ok = 0;
    const plot_means_panel *one = NULL;
    for (size_t i = 0; i < s->nmeans; i++) {
        if (s->means[i].k > AVOW_PLOT_MAX_ROWS) continue;
        drawn++;
        if (s->means[i].ref->ok) { ok++; one = &s->means[i]; }
    }
    if (!ok) {
        if (drawn)
            sb_puts(out, "No reference curve: without residual variation (or residual degrees of freedom) the "
                         "means have no standard error.");
    } else if (s->nmeans == 1) {
        sb_printf(out, "The curve is the t distribution with %.0f df scaled by ", one->ref->df);
        with_unit(s, one->ref->scale, out);
        sb_puts(out, ", the standard error of a mean of ");
        runs_words(one, out);
        sb_puts(out, ": the residual standard deviation ");
        with_unit(s, r->resid_sd, out);
        char b[32];
        plot_short(b, sizeof b, one->ref->n_h);
        sb_printf(out, " over the square root of %s. It is drawn centred on the grand mean. Slide it along the "
                       "axis: means that cannot sit under the curve together differ by more than the run-to-run "
                       "noise explains.", b);
    } else {
        sb_printf(out, "Each curve is the t distribution with %.0f df scaled by the standard error of one mean of "
                       "its panel (residual standard deviation ", one->ref->df);
        with_unit(s, r->resid_sd, out);
        sb_puts(out, " over the square root of the runs behind a mean), drawn centred on the grand mean for the "
                     "cells and on the average of its level means for a factor. Slide a curve along the axis: "
                     "means that cannot sit under it together differ by more than the run-to-run noise explains. "
                     "Scales:");
        int first = 1;
        for (size_t i = 0; i < s->nmeans; i++) {
            const plot_means_panel *m = &s->means[i];
            if (m->k > AVOW_PLOT_MAX_ROWS || !m->ref->ok) continue;
            sb_printf(out, "%s %s, ", first ? "" : ";", m->short_name ? m->short_name : "");
            with_unit(s, m->ref->scale, out);
            sb_puts(out, " (");
            runs_words(m, out);
            sb_puts(out, " per mean)");
            first = 0;
        }
        sb_putc(out, '.');
    }
    if (s->nmeans && s->means[0].pooled_blocks)
        sb_puts(out, " Cell means are pooled over the blocks, as in the summaries.");
}

void plot_wrap(strbuf *out, const char *text, size_t indent, size_t width)
{
    const char *s = text ? text : "";
    while (*s) {
        while (*s == ' ') s++;
        if (!*s) break;
        /* Take words while they fit. */
        const char *end = s, *last = NULL;
        size_t w = indent;
        while (*end) {
            const char *we = end;
            while (*we && *we != ' ') we++;
            size_t ww = utf8_width(end, (size_t)(we - end));
            if (last && w + 1 + ww > width) break;
            w += (last ? 1 : 0) + ww;
            last = we;
            end = we;
            if (*end == ' ') end++;
        }
        sb_pad(out, ' ', indent);
        sb_put(out, s, (size_t)(last - s));
        sb_putc(out, '\n');
        s = last;
    }
}

/* ---- the text pictures ---- */

/* Position of v on the text axis, 0..AVOW_TEXT_COLS. */
static int text_pos(const plot_axis *a, double v)
{
    double f = (v - a->lo) / (a->hi - a->lo) * AVOW_TEXT_COLS;
    long p = lround(f);
    if (p < 0) p = 0;
    if (p > AVOW_TEXT_COLS) p = AVOW_TEXT_COLS;
    return (int)p;
}

/* The axis line and the line of tick labels under a chart whose plot area starts at
 * column `left`. */
static void text_axis(strbuf *o, const plot_axis *a, size_t left)
{
    char row[AVOW_TEXT_COLS + 2];
    memset(row, '-', sizeof row);
    row[AVOW_TEXT_COLS + 1] = 0;
    for (size_t i = 0; i < a->nticks; i++) row[text_pos(a, plot_tick(a, i))] = '+';
    sb_pad(o, ' ', left);
    sb_puts(o, row);
    sb_putc(o, '\n');
    /* Labels centred under their ticks, left out where they would touch the previous. */
    size_t width = left + AVOW_TEXT_COLS + 64;
    char *line = avow_malloc(width + 1);
    if (!line) { o->failed = 1; return; }
    memset(line, ' ', width);
    long lastend = -1;
    for (size_t i = 0; i < a->nticks; i++) {
        char lab[48];
        plot_tick_label(a, i, lab, sizeof lab);
        long w = (long)strlen(lab);
        long start = (long)left + text_pos(a, plot_tick(a, i)) - (w - 1) / 2;
        if (start < 0) start = 0;
        if (start <= lastend || start + w > (long)width) continue;
        memcpy(line + start, lab, (size_t)w);
        lastend = start + w;
    }
    size_t len = width;
    while (len && line[len - 1] == ' ') len--;
    sb_put(o, line, len);
    sb_putc(o, '\n');
    avow_free(line);
}

/* Width of the widest label, at most 28, and at least min. */
static size_t label_width(const char *s, size_t cur)
{
    size_t w = s ? utf8_width(s, strlen(s)) : 0;
    if (w > 28) w = 28;
    return w > cur ? w : cur;
}

/* A label cut to w characters (with "~" when cut) and padded to w. */
static void put_label(strbuf *o, const char *s, size_t w)
{
    if (!s) s = "";
    size_t n = strlen(s), cw = utf8_width(s, n);
    if (cw <= w) { sb_puts(o, s); sb_pad(o, ' ', w - cw); return; }
    size_t i = 0, c = 0;
    while (i < n && c + 1 < w) {
        i++;
        while (i < n && ((unsigned char)s[i] & 0xC0) == 0x80) i++;
        c++;
    }
    sb_put(o, s, i);
    sb_putc(o, '~');
}

void plot_means_text(const plot_set *s, const avow_results *r, strbuf *o)
{
    plot_axis a;
    if (!plot_means_axis(s, &a, 6)) {
        for (size_t i = 0; i < s->nmeans; i++) {
            const plot_means_panel *m = &s->means[i];
            if (s->nmeans > 1) sb_printf(o, "   %s\n", m->title ? m->title : "");
            if (m->k > AVOW_PLOT_MAX_ROWS)
                sb_printf(o, "   (%zu means: more than the %d a picture draws one by one)\n", m->k, AVOW_PLOT_MAX_ROWS);
            else
                sb_puts(o, "   (no finite means to draw)\n");
        }
        return;
    }
    size_t lw = 9;      /* "reference" */
    for (size_t i = 0; i < s->nmeans; i++) {
        for (size_t j = 0; j < s->means[i].k && s->means[i].k <= AVOW_PLOT_MAX_ROWS; j++)
            lw = label_width(s->means[i].means[j].label, lw);
    }
    double mx = 0;
    for (size_t i = 0; i < s->nmeans; i++)
        for (size_t j = 0; j < s->means[i].k; j++) plot_track(&mx, s->means[i].means[j].mean);
    int dec = plot_decimals(mx);
    size_t left = 3 + lw + 2;
    char grid[AVOW_TEXT_COLS + 2];
    memset(grid, ' ', sizeof grid);
    grid[AVOW_TEXT_COLS + 1] = 0;
    for (size_t t = 0; t < a.nticks; t++) grid[text_pos(&a, plot_tick(&a, t))] = '.';
    for (size_t i = 0; i < s->nmeans; i++) {
        const plot_means_panel *m = &s->means[i];
        if (s->nmeans > 1) sb_printf(o, "%s   %s\n", i ? "\n" : "", m->title ? m->title : "");
        if (m->k > AVOW_PLOT_MAX_ROWS) {
            sb_printf(o, "   (%zu means: more than the %d a picture draws one by one)\n", m->k, AVOW_PLOT_MAX_ROWS);
            continue;
        }
        char row[AVOW_TEXT_COLS + 2];
        for (size_t j = 0; j < m->k; j++) {
            const plot_mean *pm = &m->means[j];
            memcpy(row, grid, sizeof row);
            if (isfinite(pm->mean)) row[text_pos(&a, pm->mean)] = 'o';
            char v[64];
            plot_fixed(v, sizeof v, pm->mean, dec);
            sb_puts(o, "   ");
            put_label(o, pm->label, lw);
            sb_printf(o, "  %s  %s\n", row, v);
        }
        if (!m->ref->ok) continue;
        /* The curve in three rows of two steps each, then the means again on one line. */
        int lvl[AVOW_TEXT_COLS + 1];
        for (int c = 0; c <= AVOW_TEXT_COLS; c++) {
            double x = a.lo + (a.hi - a.lo) * c / AVOW_TEXT_COLS;
            lvl[c] = (int)lround(plot_curve_at(m->ref, x) * 6);
        }
        char dfl[32];
        snprintf(dfl, sizeof dfl, "t, %.0f df", m->ref->df);
        const char *labels[3] = {"reference", dfl, ""};
        for (int rr = 2; rr >= 0; rr--) {
            memset(row, ' ', sizeof row);
            row[AVOW_TEXT_COLS + 1] = 0;
            for (int c = 0; c <= AVOW_TEXT_COLS; c++) {
                if (lvl[c] >= 2 * rr + 2) row[c] = '#';
                else if (lvl[c] == 2 * rr + 1) row[c] = '.';
            }
            sb_puts(o, "   ");
            put_label(o, labels[2 - rr], lw);
            sb_puts(o, "  ");
            size_t len = AVOW_TEXT_COLS + 1;
            while (len && row[len - 1] == ' ') len--;
            sb_put(o, row, len);
            /* No trailing spaces after an empty row's label either. */
            while (o->len && o->s[o->len - 1] == ' ') o->s[--o->len] = 0;
            sb_putc(o, '\n');
        }
        memset(row, ' ', sizeof row);
        row[AVOW_TEXT_COLS + 1] = 0;
        for (size_t j = 0; j < m->k; j++)
            if (isfinite(m->means[j].mean)) row[text_pos(&a, m->means[j].mean)] = '^';
        sb_puts(o, "   ");
        put_label(o, "the means", lw);
        size_t len = AVOW_TEXT_COLS + 1;
        while (len && row[len - 1] == ' ') len--;
        sb_puts(o, "  ");
        sb_put(o, row, len);
        sb_putc(o, '\n');
    }
    text_axis(o, &a, left);
    plot_wrap(o, s->value_label ? s->value_label : "", left, left + AVOW_TEXT_COLS + 30);
    strbuf cap = {0};
    plot_reference_caption(s, r, &cap);
    plot_wrap(o, cap.s ? cap.s : "", 3, 90);
    if (cap.failed) o->failed = 1;
    sb_free(&cap);
}

void plot_intervals_text(const plot_set *s, strbuf *o)
{
    plot_axis a;
    if (!plot_intervals_axis(s, &a, 6)) return;
    size_t lw = 0;
    for (size_t i = 0; i < s->nintervals; i++)
        for (size_t j = 0; j < s->intervals[i].n && s->intervals[i].n <= AVOW_PLOT_MAX_ROWS; j++)
            lw = label_width(s->intervals[i].rows[j].label, lw);
    size_t left = 3 + lw + 2;
    int zero = text_pos(&a, 0);
    int any_planned = 0, any_explored = 0;
    for (size_t i = 0; i < s->nintervals; i++) {
        if (s->intervals[i].planned) any_planned = 1;
        else any_explored = 1;
    }
    if (any_planned) sb_puts(o, "   * a planned estimate, [=====] its interval\n");
    if (any_explored) sb_puts(o, "   o an exploratory estimate, (-----) its interval\n");
    sb_puts(o, "   | zero; < or > an interval open on that side\n");
    for (size_t i = 0; i < s->nintervals; i++) {
        const plot_interval_panel *ip = &s->intervals[i];
        sb_printf(o, "\n   %s\n", ip->title ? ip->title : "");
        if (ip->n > AVOW_PLOT_MAX_ROWS) {
            sb_printf(o, "   (%zu intervals: more than the %d a picture draws one by one)\n", ip->n,
                      AVOW_PLOT_MAX_ROWS);
            continue;
        }
        char fill = ip->planned ? '=' : '-', open = ip->planned ? '[' : '(', close = ip->planned ? ']' : ')';
        char mark = ip->planned ? '*' : 'o';
        for (size_t j = 0; j < ip->n; j++) {
            const plot_interval *iv = &ip->rows[j];
            char row[AVOW_TEXT_COLS + 2];
            memset(row, ' ', sizeof row);
            row[AVOW_TEXT_COLS + 1] = 0;
            row[zero] = '|';
            if (!isnan(iv->lo) && !isnan(iv->hi)) {
                int l = isfinite(iv->lo) ? text_pos(&a, iv->lo) : 0;
                int h = isfinite(iv->hi) ? text_pos(&a, iv->hi) : AVOW_TEXT_COLS;
                for (int c = l; c <= h; c++) row[c] = c == zero ? '|' : fill;
                row[l] = isfinite(iv->lo) ? open : '<';
                row[h] = isfinite(iv->hi) ? close : '>';
            }
            if (isfinite(iv->est)) row[text_pos(&a, iv->est)] = mark;
            sb_puts(o, "   ");
            put_label(o, iv->label, lw);
            size_t len = AVOW_TEXT_COLS + 1;
            while (len && row[len - 1] == ' ') len--;
            sb_puts(o, "  ");
            sb_put(o, row, len);
            sb_putc(o, '\n');
        }
    }
    text_axis(o, &a, left);
    strbuf t = {0};
    sb_printf(&t, "difference in %s", s->value_label ? s->value_label : "");
    plot_wrap(o, t.s ? t.s : "", left, left + AVOW_TEXT_COLS + 30);
    if (t.failed) o->failed = 1;
    sb_free(&t);
}
