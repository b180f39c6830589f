/* report_text.c: the analysis report of `avow run`, for people. Layout and wording are
 * avow's own. Deterministic bytes: no clock, no locale. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "avow/render.h"
#include "avow/svg.h"
#include "doc.h"
#include "plot.h"
#include "report.h"
#include "table.h"

/* Most rows of the ANOVA table: every term of eight factors, the block, residual, total. */
#define AVOW_MAX_ROWS 259

/* A number with enough significant digits to show its integer part and four more
 * (at least six), without exponent unless it is very large or very small. */
static void fmt_val(char *buf, size_t size, double v)
{
    if (!isfinite(v)) { snprintf(buf, size, isnan(v) ? "-" : v > 0 ? "inf" : "-inf"); return; }
    if (v == 0) { snprintf(buf, size, "0"); return; }
    double a = fabs(v);
    int intdigits = a >= 1 ? (int)floor(log10(a)) + 1 : 1;
    int sig = intdigits + 4 > 6 ? intdigits + 4 : 6;
    if (sig > 17) sig = 17;
    if (a >= 1e15 || a < 1e-5) { snprintf(buf, size, "%.*e", 5, v); return; }
    snprintf(buf, size, "%.*g", sig, v);
}

/* The largest finite magnitude seen so far, in *m. */
static void track(double *m, double v)
{
    if (isfinite(v) && fabs(v) > *m) *m = fabs(v);
}

/* Decimals that show a largest magnitude m with six significant digits (at least one
 * decimal, at most twelve). One column of a table uses one count. */
static int max_decimals(double m)
{
    if (m == 0) return 1;
    if (m >= 1e15) return -1;             /* scientific notation for the whole column */
    int lead = (int)floor(log10(m));      /* position of the leading digit */
    int d = 5 - lead;
    if (d < 1) d = 1;
    if (d > 12) d = 12;
    return d;
}

static int column_decimals(const double *vals, size_t n)
{
    double m = 0;
    for (size_t i = 0; i < n; i++) track(&m, vals[i]);
    return max_decimals(m);
}

static void fmt_fixed(char *buf, size_t size, double v, int decimals)
{
    if (!isfinite(v)) snprintf(buf, size, isnan(v) ? "-" : v > 0 ? "inf" : "-inf");
    else if (decimals < 0) snprintf(buf, size, "%.6e", v);
    else snprintf(buf, size, "%.*f", decimals, v);
}

/* A p-value: four decimals, or two significant digits with an exponent below 1e-4. */
static void fmt_p(char *buf, size_t size, double p)
{
    if (isnan(p)) snprintf(buf, size, "-");
    else if (p == 0) snprintf(buf, size, "0 (below 1e-308)");
    else if (p < 1e-4) snprintf(buf, size, "%.2e", p);
    else snprintf(buf, size, "%.4f", p);
}

/* The study file, verbatim, with line numbers. */
static void echo_study(const avow_ctx *ctx, doc *d)
{
    strbuf b = {0}, *o = &b;
    for (unsigned l = 1; l <= ctx->nlines; l++) {
        const char *text; size_t len;
        ctx_line_text(ctx, l, &text, &len);
        if (l == ctx->nlines && len == 0) break;   /* after the final newline */
        sb_printf(o, "%5u  ", l);
        sb_put(o, text, len);
        sb_putc(o, '\n');
    }
    if (b.failed) d->o->failed = 1;
    doc_pre(d, b.s ? b.s : "", b.len);
    sb_free(&b);
}

/* Decimals shared by the estimates, standard errors and interval ends of rs. */
static int contrast_decimals(const avow_contrast_result *rs, size_t n)
{
    double m = 0;
    for (size_t i = 0; i < n; i++) {
        track(&m, rs[i].estimate); track(&m, rs[i].se);
        track(&m, rs[i].ci_lo); track(&m, rs[i].ci_hi);
    }
    return max_decimals(m);
}

static void contrast_rows(text_table *t, const avow_contrast_result *rs, size_t n, int conf_pct)
{
    char a[64], b[160], c[64], d[64];
    int dec = contrast_decimals(rs, n);
    table_row(t);
    table_cell(t, 0, "contrast"); table_cell(t, 1, "estimate"); table_cell(t, 2, "std. error");
    table_cell(t, 3, "t"); table_cell(t, 4, "df"); table_cell(t, 5, "p");
    table_cell(t, 6, "p adjusted"); table_cell(t, 7, "%d%% interval", conf_pct); table_cell(t, 8, "finding");
    for (size_t i = 0; i < n; i++) {
        const avow_contrast_result *r = &rs[i];
        table_row(t);
        table_cell(t, 0, "%s", r->pc->name);
        fmt_fixed(a, sizeof a, r->estimate, dec); table_cell(t, 1, "%s", a);
        fmt_fixed(a, sizeof a, r->se, dec); table_cell(t, 2, "%s", a);
        fmt_fixed(a, sizeof a, r->t, 3); table_cell(t, 3, "%s", a);   /* "-" when not defined */
        if (isnan(r->df)) table_cell(t, 4, "-");   /* own-variance df with no variation */
        else if (r->df == floor(r->df)) table_cell(t, 4, "%.0f", r->df);
        else table_cell(t, 4, "%.1f", r->df);
        fmt_p(a, sizeof a, r->p); table_cell(t, 5, "%s", a);
        fmt_p(a, sizeof a, r->p_adj); table_cell(t, 6, "%s", a);
        fmt_fixed(c, sizeof c, r->ci_lo, dec); fmt_fixed(d, sizeof d, r->ci_hi, dec);
        if (r->pc->side == SIDE_GREATER) snprintf(b, sizeof b, "above %s", c);
        else if (r->pc->side == SIDE_LESS) snprintf(b, sizeof b, "below %s", d);
        else snprintf(b, sizeof b, "%s to %s", c, d);
        table_cell(t, 7, "%s", b);
        const char *found;
        if (isnan(r->p_adj)) found = "not defined";
        else if (r->pc->side == SIDE_GREATER) found = r->reject ? "above 0" : "not shown above 0";
        else if (r->pc->side == SIDE_LESS) found = r->reject ? "below 0" : "not shown below 0";
        else found = r->reject ? "differs from 0" : "no difference shown";
        table_cell(t, 8, "%s", found);
    }
}

/* Rows of exploratory comparisons of two levels. */
/* Name of mean i of an exploration: a treatment cell, or a level of the set's factor. */
static const char *mean_name(const avow_plan *p, const plan_explore *e, size_t i)
{
    if (e->factor < 0) return plan_cell_name(p, i);
    return p->factors[e->factor].levels[i].name;
}

static void pair_table(doc *d, const avow_plan *p, const plan_explore *e, const avow_pair_result *rs,
                       size_t n, int conf, const char *stat)
{
    double mx = 0;
    for (size_t i = 0; i < n; i++) {
        track(&mx, rs[i].estimate); track(&mx, rs[i].se);
        track(&mx, rs[i].ci_lo); track(&mx, rs[i].ci_hi);
    }
    int dec = max_decimals(mx);
    text_table t;
    table_init(&t, 7, "lrrrrll");
    table_row(&t);
    table_cell(&t, 0, "comparison"); table_cell(&t, 1, "difference"); table_cell(&t, 2, "std. error");
    table_cell(&t, 3, "%s", stat); table_cell(&t, 4, "p adjusted"); table_cell(&t, 5, "%d%% interval", conf);
    table_cell(&t, 6, "finding");
    for (size_t i = 0; i < n; i++) {
        const avow_pair_result *r = &rs[i];
        char a[64], b[64];
        table_row(&t);
        table_cell(&t, 0, "%s - %s", mean_name(p, e, r->a), mean_name(p, e, r->b));
        fmt_fixed(a, sizeof a, r->estimate, dec); table_cell(&t, 1, "%s", a);
        fmt_fixed(a, sizeof a, r->se, dec); table_cell(&t, 2, "%s", a);
        fmt_fixed(a, sizeof a, r->stat, 3); table_cell(&t, 3, "%s", a);
        fmt_p(a, sizeof a, r->p_adj); table_cell(&t, 4, "%s", a);
        fmt_fixed(a, sizeof a, r->ci_lo, dec); fmt_fixed(b, sizeof b, r->ci_hi, dec);
        table_cell(&t, 5, "%s to %s", a, b);
        table_cell(&t, 6, "%s", isnan(r->p_adj) ? "not defined" : r->reject ? "differ" : "no difference shown");
    }
    doc_table(d, &t, 3, 1);
    table_free(&t);
}

/* Effect sizes of the terms: eta squared, (partial eta squared,) omega squared, f. */
static void effect_table(doc *d, const avow_plan *p, const avow_results *r)
{
    int any = 0, multi = p->nfactors > 1 || p->block, ci = 0;
    for (size_t i = 0; i + 2 < r->nanova; i++) { any |= r->effects[i].ok; ci |= r->effects[i].ci_ok; }
    if (!any) return;
    doc_heading(d, "effect-sizes", "Effect sizes");
    text_table t;
    size_t nc = (multi ? 5 : 4) + (ci ? 1 : 0);
    table_init(&t, nc, "lrrrrr");
    table_row(&t);
    size_t col = 0;
    table_cell(&t, col++, "source");
    table_cell(&t, col++, "eta squared");
    if (multi) table_cell(&t, col++, "partial eta sq.");
    table_cell(&t, col++, "omega squared");
    table_cell(&t, col++, multi ? "f (partial)" : "Cohen's f");
    if (ci) table_cell(&t, col++, "%d%% interval for f", (int)lround((1 - rat_to_double(p->alpha)) * 100));
    for (size_t i = 0; i + 2 < r->nanova; i++) {
        const avow_effect_result *e = &r->effects[i];
        if (!e->ok) continue;
        table_row(&t);
        col = 0;
        const avow_anova_row *A = &r->anova[i];
        if (r->fit == FIT_ONEWAY) table_cell(&t, col++, "between levels");
        else if (A->kind == ROW_BLOCK) table_cell(&t, col++, "%s (block)", A->source);
        else table_cell(&t, col++, "%s", A->source);
        table_cell(&t, col++, "%.4f", e->es.eta2);
        if (multi) table_cell(&t, col++, "%.4f", e->es.partial_eta2);
        table_cell(&t, col++, "%.4f", e->es.omega2);
        table_cell(&t, col++, "%.4f", e->es.cohen_f);
        if (ci) {
            if (e->ci_ok) table_cell(&t, col++, "%.4f to %.4f", e->f_lo, e->f_hi);
            else table_cell(&t, col++, "-");
        }
    }
    doc_table(d, &t, 3, 1);
    table_free(&t);
    doc_p(d, "%s", multi ? "   Eta squared: share of the total sum of squares; partial: of the term plus residual.\n"
                       "   Omega squared corrects eta squared for chance and can fall below 0.\n"
                     : "   Eta squared: share of the total sum of squares between levels; omega squared\n"
                       "   corrects it for chance and can fall below 0; f = sqrt(eta^2 / (1 - eta^2)).\n");
}

/* "W = 0.2288 on 2 and 12 df, p = 0.7989", or why the test was not computed. */
static void test_line(doc *d, const char *what, int rc, const char *stat, double x, double df1, double df2,
                      double pv)
{
    char a[64], b[64];
    if (rc != AVOW_OK) { doc_kv(d, what, "not computed: %s", dx_status_text(rc)); return; }
    fmt_val(a, sizeof a, x);
    fmt_p(b, sizeof b, pv);
    if (isnan(df1)) doc_kv(d, what, "%s = %s, p = %s", stat, a, b);
    else if (isnan(df2)) doc_kv(d, what, "%s = %s on %.0f df, p = %s", stat, a, df1, b);
    else if (df2 == floor(df2)) doc_kv(d, what, "%s = %s on %.0f and %.0f df, p = %s", stat, a, df1, df2, b);
    else doc_kv(d, what, "%s = %s on %.0f and %.2f df, p = %s", stat, a, df1, df2, b);
}

/* HTML: a picture inline, with its caption as text. */
static void html_picture(doc *d, const avow_plan *p, const avow_results *r, avow_picture pic)
{
    strbuf svg = {0}, cap = {0};
    render_svg(p, r, pic, 0, &svg);
    svg_picture_caption(p, r, pic, &cap);
    if (svg.failed || cap.failed) d->o->failed = 1;
    doc_figure(d, svg.s ? svg.s : "", svg.len, cap.s);
    sb_free(&svg);
    sb_free(&cap);
}

/* HTML: the pictures of the residuals in a figure each, or why they are not drawn. */
static void residual_figures(doc *d, const avow_plan *p, const avow_results *r, const avow_picture *pics, size_t n)
{
    if (!d->html) return;
    for (size_t i = 0; i < n; i++) {
        const char *why = svg_picture_missing(p, r, pics[i]);
        if (why) {
            if (i == 0) doc_p(d, "   The pictures of the residuals are not drawn: %s.\n", why);
            return;
        }
        html_picture(d, p, r, pics[i]);
    }
}

/* Checks of the assumptions, unusual observations and robust alternatives. */
static void checks_section(doc *d, const avow_plan *p, const avow_results *r)
{
    const avow_assumptions *A = &r->checks;
    char a[64], b[64];
    double alpha = rat_to_double(p->alpha);
    doc_heading(d, "checks", "Checks of the assumptions");
    if (!A->computed) {
        doc_p(d, "   Not computed: the run was made with --no-diagnostics, which keeps only the sums.\n");
        if (d->html) doc_p(d, "   The pictures of the residuals need these checks too.\n");
        return;
    }
    const char *grp = p->nfactors == 1 ? "levels" : "cells";
    doc_sub(d, "Equal spread between the %zu %s%s:\n", A->ngroups, grp,
            A->on_residuals ? " (on the residuals of the model)" : "");
    test_line(d, "Levene (deviations from the means)", A->levene_rc, "W", A->levene.stat, A->levene.df1,
              A->levene.df2, A->levene.p);
    test_line(d, "Brown-Forsythe (deviations from the medians)", A->bf_rc, "W", A->bf.stat, A->bf.df1, A->bf.df2,
              A->bf.p);
    test_line(d, "Bartlett", A->bartlett_rc, "T", A->bartlett.stat, A->bartlett.df, NAN, A->bartlett.p);
    int spread_bad = (A->levene_rc == AVOW_OK && A->levene.p <= alpha) || (A->bf_rc == AVOW_OK && A->bf.p <= alpha);
    int spread_known = A->levene_rc == AVOW_OK || A->bf_rc == AVOW_OK;
    if (!spread_known)
        doc_p(d, "   Verdict: the spread cannot be compared with these data.\n");
    else if (spread_bad)
        doc_p(d, "   Verdict: the spread differs between the %s. F and the contrasts assume it does not;\n"
                 "   %s\n", grp,
              A->robust_applies ? "the Welch result below, and `variances separate` for the pairs, are the safer reading."
                                : "treat p-values near alpha with care.");
    else
        doc_p(d, "   Verdict: no sign that the spread differs between the %s.\n", grp);
    static const avow_picture spread_pic[] = {AVOW_PIC_SPREAD};
    residual_figures(d, p, r, spread_pic, 1);

    doc_sub(d, "\nNormal residuals (%zu residuals from the fitted %s):\n", A->nresid,
            r->fit == FIT_GENERAL ? "model" : p->nfactors == 1 ? "level means" : "cell means");
    test_line(d, "Shapiro-Wilk (Royston's approximation)", A->shapiro_rc, "W", A->shapiro.w, NAN, NAN, A->shapiro.p);
    if (A->moments_rc == AVOW_OK) {
        fmt_val(a, sizeof a, A->moments.skewness);
        fmt_val(b, sizeof b, A->moments.kurtosis);
        doc_kv(d, "shape", "skewness %s, excess kurtosis %s", a, b);
    }
    if (A->shapiro_rc == AVOW_OK && A->shapiro.p <= alpha)
        doc_p(d, "   Verdict: the residuals depart from a normal shape. Look at the unusual observations;\n"
                 "   %s\n", A->robust_applies ? "the rank test below does not assume normality."
                                                : "treat p-values near alpha with care.");
    else if (A->shapiro_rc == AVOW_OK)
        doc_p(d, "   Verdict: no sign that the residuals depart from a normal shape.\n");
    else
        doc_p(d, "   Verdict: normality is not tested with these data.\n");
    if (svg_picture_missing(p, r, AVOW_PIC_SPREAD) == NULL) {
        static const avow_picture resid_pics[] = {AVOW_PIC_RESIDUALS, AVOW_PIC_PROBABILITY};
        residual_figures(d, p, r, resid_pics, 2);
    }

    doc_sub(d, "\nUnusual observations (externally studentized residual beyond %g):\n", A->unusual_limit);
    if (A->unusual_rc != AVOW_OK) {
        doc_p(d, "   not computed: %s\n", dx_status_text(A->unusual_rc));
    } else if (!A->nunusual_total) {
        doc_p(d, "   none\n");
    } else {
        text_table t;
        size_t nc = 6 + (r->nblocks ? 1 : 0);
        table_init(&t, nc, "rllrrrr");
        table_row(&t);
        size_t col = 0;
        table_cell(&t, col++, "line");
        table_cell(&t, col++, "%s", p->nfactors == 1 ? "level" : "cell");
        if (r->nblocks) table_cell(&t, col++, "block");
        table_cell(&t, col++, "value"); table_cell(&t, col++, "fitted"); table_cell(&t, col++, "residual");
        table_cell(&t, col++, "t");
        for (size_t i = 0; i < A->nunusual; i++) {
            const avow_unusual *u = &A->unusual[i];
            table_row(&t);
            col = 0;
            table_cell(&t, col++, "%llu", (unsigned long long)u->line);
            table_cell(&t, col++, "%s", plan_cell_name(p, u->cell));
            if (r->nblocks) table_cell(&t, col++, "%s", r->blocks[u->block].label);
            table_cell(&t, col++, "%s", u->value_text);
            fmt_val(a, sizeof a, u->fitted); table_cell(&t, col++, "%s", a);
            fmt_val(b, sizeof b, u->residual); table_cell(&t, col++, "%s", b);
            table_cell(&t, col++, "%.2f", u->t);
        }
        doc_table(d, &t, 3, 1);
        table_free(&t);
        if (A->nunusual_total > A->nunusual)
            doc_p(d, "   and %zu more\n", A->nunusual_total - A->nunusual);
        doc_p(d, "   Verdict: %zu observation%s stand%s out; check %s against the run records before\n"
                 "   trusting the analysis (never drop a value only because it is unusual).\n",
              A->nunusual_total, A->nunusual_total == 1 ? "" : "s", A->nunusual_total == 1 ? "s" : "",
              A->nunusual_total == 1 ? "it" : "them");
    }

    if (A->robust_applies) {
        doc_sub(d, "\nRobust alternatives to the F test of equal %s means:\n", p->nfactors == 1 ? "level" : "cell");
        test_line(d, "Welch (each group's own variance)", A->welch_rc, "F", A->welch.stat, A->welch.df1,
                  A->welch.df2, A->welch.p);
        test_line(d, "Kruskal-Wallis (ranks, ties corrected)", A->kruskal_rc, "H", A->kruskal.test.stat,
                  A->kruskal.test.df, NAN, A->kruskal.test.p);
        if (p->nfactors > 1)
            doc_p(d, "   (These compare the cells as one factor: they test whether any cell differs,\n"
                     "   not each term of the model.)\n");
    } else {
        doc_sub(d, "\nRobust alternatives: not computed for a study in blocks (they compare groups without\n"
                   "blocks).\n");
    }
}

void report_body(doc *d, const avow_ctx *ctx, const avow_plan *p, const avow_results *r)
{
    char a[64], b[64], c[64];
    double alpha = rat_to_double(p->alpha);
    int conf = (int)lround((1 - alpha) * 100);
    const char *unit = p->unit ? p->unit : "";
    text_table t;
    table_init(&t, 2, "ll");
    table_row(&t); table_cell(&t, 0, "study"); table_cell(&t, 1, "%s", p->title);
    table_row(&t); table_cell(&t, 0, "study file"); table_cell(&t, 1, "%s", p->path);
    table_row(&t); table_cell(&t, 0, "  sha256"); table_cell(&t, 1, "%s", r->study_sha256);
    table_row(&t); table_cell(&t, 0, "data file");
    table_cell(&t, 1, "%s%s", r->data_shown, r->data_from_option ? " (given with --data)" : "");
    table_row(&t); table_cell(&t, 0, "  sha256");
    table_cell(&t, 1, "%s%s", r->data_sha256,
               !p->sha256 ? " (not locked)"
               : r->data_from_option ? " (the study's lock is for its own data file; not checked)"
               : " (matches the lock in the study)");
    table_row(&t); table_cell(&t, 0, "rows");
    table_cell(&t, 1, "%llu read, %llu used, %llu with a missing response, %llu with a missing level",
               (unsigned long long)r->rows, (unsigned long long)r->used,
               (unsigned long long)r->missing_response, (unsigned long long)r->missing_level);
    if (r->nmissing_lines) {
        strbuf l = {0};
        for (size_t i = 0; i < r->nmissing_lines; i++)
            sb_printf(&l, "%s%llu", i ? ", " : "", (unsigned long long)r->missing_lines[i]);
        uint64_t more = r->missing_response + r->missing_level - r->nmissing_lines;
        if (more) sb_printf(&l, " and %llu more", (unsigned long long)more);
        table_row(&t); table_cell(&t, 0, "  missing at lines"); table_cell(&t, 1, "%s", l.s ? l.s : "");
        if (l.failed) d->o->failed = 1;
        sb_free(&l);
    }
    if (r->blank) {
        table_row(&t); table_cell(&t, 0, "  blank lines"); table_cell(&t, 1, "%llu, skipped", (unsigned long long)r->blank);
    }
    doc_table(d, &t, 0, 0);
    table_free(&t);

    doc_heading(d, "study-file", "Study file as read");
    echo_study(ctx, d);

    strbuf h = {0};
    if (p->nfactors == 1)
        sb_printf(&h, "Summaries of %s%s%s%s by %s", p->response, unit[0] ? " (" : "", unit, unit[0] ? ")" : "",
                  p->factors[0].name);
    else
        sb_printf(&h, "Summaries of %s%s%s%s by cell", p->response, unit[0] ? " (" : "", unit, unit[0] ? ")" : "");
    doc_heading(d, "summaries", h.s ? h.s : "Levels");
    if (h.failed) d->o->failed = 1;
    sb_free(&h);
    size_t nf = p->nfactors, nc = nf + 5;
    char align[AVOW_MAX_FACTORS + 6];
    for (size_t i = 0; i < nc; i++) align[i] = i < nf ? 'l' : 'r';
    align[nc] = 0;
    table_init(&t, nc, align);
    table_row(&t);
    if (nf == 1) table_cell(&t, 0, "level");
    else for (size_t f = 0; f < nf; f++) table_cell(&t, f, "%s", p->factors[f].name);
    table_cell(&t, nf, "n"); table_cell(&t, nf + 1, "mean");
    table_cell(&t, nf + 2, "std. dev."); table_cell(&t, nf + 3, "min"); table_cell(&t, nf + 4, "max");
    int dmean, dsd;
    {
        double mmax = 0, smax = 0;
        for (size_t i = 0; i < r->ncells; i++) { track(&mmax, r->levels[i].mean); track(&smax, r->levels[i].sd); }
        dmean = max_decimals(mmax);
        dsd = max_decimals(smax);
        /* Means on a large offset: show as many decimals as the spread needs, but no
         * more digits than a binary64 number holds (15 significant).
         * (Only when the means dwarf their spread by four orders of magnitude or more.) */
        if (dmean >= 0 && dsd >= dmean + 4 && mmax > 0) {
            int room = 14 - (int)floor(log10(mmax));
            dmean = dsd < room ? dsd : room > dmean ? room : dmean;
        }
    }
    for (size_t i = 0; i < r->ncells; i++) {
        const avow_level_result *L = &r->levels[i];
        table_row(&t);
        if (nf == 1) table_cell(&t, 0, "%s", plan_cell_name(p, i));
        else for (size_t f = 0; f < nf; f++) table_cell(&t, f, "%s", p->factors[f].levels[plan_cell_level(p, i, f)].name);
        table_cell(&t, nf, "%llu", (unsigned long long)L->n);
        fmt_fixed(a, sizeof a, L->mean, dmean); table_cell(&t, nf + 1, "%s", a);
        fmt_fixed(a, sizeof a, L->sd, dsd); table_cell(&t, nf + 2, "%s", a);
        table_cell(&t, nf + 3, "%s", L->min_text);
        table_cell(&t, nf + 4, "%s", L->max_text);
    }
    doc_table(d, &t, 3, 1);
    table_free(&t);
    if (p->block)
        doc_p(d, "   Cells pool the %zu blocks of `%s`; the standard deviation includes the spread between blocks.\n",
                  r->nblocks, p->block->name);

    if (r->nmargins) {
        doc_heading(d, "margins", p->nfactors > 1 ? "Level means, averaged over the other factors"
                                                  : "Level means, adjusted for the blocks");
        table_init(&t, 5, "llrrr");
        table_row(&t);
        table_cell(&t, 0, "factor"); table_cell(&t, 1, "level"); table_cell(&t, 2, "n");
        table_cell(&t, 3, "mean"); table_cell(&t, 4, "std. error");
        double mv = 0;
        for (size_t i = 0; i < r->nmargins; i++) { track(&mv, r->margins[i].mean); track(&mv, r->margins[i].se); }
        int d2 = max_decimals(mv);
        int dm = d2 > dmean ? d2 : dmean;
        for (size_t i = 0; i < r->nmargins; i++) {
            const avow_margin_result *mr = &r->margins[i];
            table_row(&t);
            if (i == 0 || r->margins[i - 1].factor != mr->factor) table_cell(&t, 0, "%s", p->factors[mr->factor].name);
            table_cell(&t, 1, "%s", p->factors[mr->factor].levels[mr->level].name);
            table_cell(&t, 2, "%llu", (unsigned long long)mr->n);
            fmt_fixed(a, sizeof a, mr->mean, dm); table_cell(&t, 3, "%s", a);
            fmt_fixed(a, sizeof a, mr->se, dm); table_cell(&t, 4, "%s", a);
        }
        doc_table(d, &t, 3, 1);
        table_free(&t);
        doc_p(d, "%s", p->nfactors == 1
                   ? "   Means of the fitted cells, each block weighted equally: the level means the\n"
                     "   comparisons use.\n"
                   : r->fit == FIT_GENERAL
                   ? "   Means of the fitted cells, each level of the other factors weighted equally.\n"
                   : "   Means of the cell means, each level of the other factors weighted equally.\n");
    }
    if (r->nblocks) {
        strbuf hb = {0};
        sb_printf(&hb, "Blocks: %s%s%s%s", p->block->name, p->block->label ? " (" : "",
                  p->block->label ? p->block->label : "", p->block->label ? ")" : "");
        doc_heading(d, "blocks", hb.s ? hb.s : "Blocks");
        if (hb.failed) d->o->failed = 1;
        sb_free(&hb);
        table_init(&t, 3, "lrr");
        table_row(&t);
        table_cell(&t, 0, "block"); table_cell(&t, 1, "n"); table_cell(&t, 2, "mean");
        for (size_t i = 0; i < r->nblocks; i++) {
            table_row(&t);
            table_cell(&t, 0, "%s", r->blocks[i].label);
            table_cell(&t, 1, "%llu", (unsigned long long)r->blocks[i].n);
            fmt_fixed(a, sizeof a, r->blocks[i].mean, dmean); table_cell(&t, 2, "%s", a);
        }
        doc_table(d, &t, 3, 1);
        table_free(&t);
    }

    doc_heading(d, "anova", "Analysis of variance");
    table_init(&t, 6, "lrrrrr");
    table_row(&t);
    table_cell(&t, 0, "source"); table_cell(&t, 1, "df"); table_cell(&t, 2, "sum of squares");
    table_cell(&t, 3, "mean square"); table_cell(&t, 4, "F"); table_cell(&t, 5, "p");
    double ssv[AVOW_MAX_ROWS], msv[AVOW_MAX_ROWS];
    size_t nrow = r->nanova < AVOW_MAX_ROWS ? r->nanova : AVOW_MAX_ROWS;
    for (size_t i = 0; i < nrow; i++) { ssv[i] = r->anova[i].ss; msv[i] = r->anova[i].ms; }
    int dss = column_decimals(ssv, nrow), dms = column_decimals(msv, nrow - 1);
    for (size_t i = 0; i < nrow; i++) {
        const avow_anova_row *A = &r->anova[i];
        table_row(&t);
        if (r->fit == FIT_ONEWAY && A->kind == ROW_TERM) table_cell(&t, 0, "between levels");
        else if (A->kind == ROW_BLOCK) table_cell(&t, 0, "%s (block)", A->source);
        else table_cell(&t, 0, "%s", A->source);
        table_cell(&t, 1, "%.0f", A->df);
        fmt_fixed(a, sizeof a, A->ss, dss); table_cell(&t, 2, "%s", a);
        if (!isnan(A->ms)) { fmt_fixed(a, sizeof a, A->ms, dms); table_cell(&t, 3, "%s", a); }
        if (!isnan(A->f)) { fmt_val(a, sizeof a, A->f); table_cell(&t, 4, "%s", a); }
        if (!isnan(A->p)) { fmt_p(a, sizeof a, A->p); table_cell(&t, 5, "%s", a); }
    }
    doc_table(d, &t, 3, 1);
    table_free(&t);
    fmt_val(a, sizeof a, r->r_squared);
    fmt_val(b, sizeof b, r->resid_sd);
    fmt_val(c, sizeof c, r->grand_mean);
    doc_p(d, "   R-squared %s; residual standard deviation %s%s%s; grand mean %s\n", a, b,
              unit[0] ? " " : "", unit, c);
    if (isnan(r->anova[0].f)) {
        /* No residual variation: say what F can and cannot say. */
        int all_equal = 1;
        for (size_t i = 0; i < nrow; i++)
            if (r->anova[i].kind != ROW_RESIDUAL && r->anova[i].ss != 0) all_equal = 0;
        if (all_equal)
            doc_p(d, "%s", "   Every observation has the same value: the means do not differ at all and there is\n"
                       "   no residual variation. F is 0/0, so no test is made: the data show no difference,\n"
                       "   but they cannot say how large a difference the run-to-run noise might hide.\n");
        else
            doc_p(d, "%s", r->fit == FIT_ONEWAY
                       ? "   Every observation equals its level's mean: there is no residual variation, so F\n"
                         "   and the contrast tests are not defined. The means differ, but with no noise to\n"
                         "   measure them against the data cannot say whether the difference would recur.\n"
                       : "   Every observation equals its fitted value: there is no residual variation, so F\n"
                         "   and the contrast tests are not defined. The means differ, but with no noise to\n"
                         "   measure them against the data cannot say whether the difference would recur.\n");
    }
    if (p->nfactors > 1 || p->block) {
        if (r->balanced)
            doc_p(d, "   Balanced data: every cell has the same number of runs, and the rows add up to the total.\n");
        else
            doc_p(d, "   Unbalanced data: each row's sum of squares is adjusted for every other row (a linear\n"
                       "   hypothesis on the cell means), so the rows need not add up to the total.\n");
    }
    if (r->fit == FIT_GENERAL && r->df_lof > 0) {
        const char *left = p->block && p->interactions == INTER_ALL ? "block-by-treatment interaction"
                           : p->block ? "block-by-treatment interaction and the interactions left out"
                           : "interactions left out of the model";
        if (r->df_within == 0)
            doc_p(d, "   One run per cell: the residual is the %s (%.0f df),\n"
                         "   which the model assumes is noise.\n", left, r->df_lof);
        else
            doc_p(d, "   The residual pools %.0f df of replicates within cells and %.0f df of the\n"
                         "   %s, which the model assumes is noise.\n", r->df_within, r->df_lof, left);
    }
    if (r->empty_cells && p->block)
        doc_p(d, "   %zu block-by-treatment cell%s without data; the model still estimates every row.\n",
                  r->empty_cells, r->empty_cells == 1 ? " is" : "s are");
    else if (r->empty_cells)
        doc_p(d, "   %zu cell%s without data; the model still estimates every row.\n",
                  r->empty_cells, r->empty_cells == 1 ? " is" : "s are");

    effect_table(d, p, r);

    plot_set ps;
    plot_gather(p, r, &ps);
    if (ps.failed) d->o->failed = 1;
    doc_heading(d, "picture-means", "Picture: the means and their reference distribution");
    if (d->html) {
        html_picture(d, p, r, AVOW_PIC_MEANS);
    } else {
        plot_means_text(&ps, r, d->o);
    }

    if (r->ncontrasts) {
        strbuf hh = {0};
        sb_printf(&hh, "Planned contrasts: %zu, %s at alpha %s", r->ncontrasts, mult_words(p->adjust),
                  p->alpha_text);
        doc_heading(d, "planned", hh.s ? hh.s : "Planned contrasts");
        if (hh.failed) d->o->failed = 1;
        sb_free(&hh);
        table_init(&t, 9, "lrrrrrrll");
        contrast_rows(&t, r->contrasts, r->ncontrasts, conf);
        doc_table(d, &t, 3, 1);
        table_free(&t);
        doc_blank(d);
        int dec = contrast_decimals(r->contrasts, r->ncontrasts);
        for (size_t i = 0; i < r->ncontrasts; i++) {
            const avow_contrast_result *x = &r->contrasts[i];
            char lo[64], hi[64];
            fmt_fixed(a, sizeof a, x->estimate, dec);
            fmt_fixed(lo, sizeof lo, x->ci_lo, dec);
            fmt_fixed(hi, sizeof hi, x->ci_hi, dec);
            fmt_p(b, sizeof b, x->p_adj);
            doc_p(d, "   %s = %s%s\n", x->pc->name, x->pc->expr,
                  x->pc->side == SIDE_GREATER ? " > 0" : x->pc->side == SIDE_LESS ? " < 0" : "");
            if (x->pc->desc) doc_p(d, "      \"%s\"\n", x->pc->desc);
            strbuf el = {0};
            sb_printf(&el, "      estimate %s%s%s, %d%% interval ", a, unit[0] ? " " : "", unit, conf);
            if (x->pc->side == SIDE_GREATER) sb_printf(&el, "above %s", lo);
            else if (x->pc->side == SIDE_LESS) sb_printf(&el, "below %s", hi);
            else sb_printf(&el, "%s to %s", lo, hi);
            sb_printf(&el, " (%s)\n", x->ci_simultaneous ? "simultaneous" : "per comparison");
            if (el.failed) d->o->failed = 1;
            doc_p(d, "%s", el.s ? el.s : "");
            sb_free(&el);
            if (isfinite(x->std_effect))
                doc_p(d, "      standardized effect %.3f (estimate / residual standard deviation)\n", x->std_effect);
            if (isnan(x->p_adj)) {
                doc_p(d, "      no test: without residual variation the contrast has no standard error.\n");
                continue;
            }
            const char *dir = x->pc->side == SIDE_GREATER ? "above" : "below";
            if (x->pc->side == SIDE_TWO)
                doc_p(d, "      adjusted p %s %s %s: %s", b, x->reject ? "<=" : ">", p->alpha_text,
                      x->reject ? "the data show a difference.\n" : "the data do not show a difference at this level.\n");
            else if (x->reject)
                doc_p(d, "      adjusted p %s <= %s: the data show it %s 0, as declared.\n", b, p->alpha_text, dir);
            else
                doc_p(d, "      adjusted p %s > %s: the data do not show it %s 0 at this level.\n", b, p->alpha_text,
                      dir);
        }
    }
    if (r->nexplore_sets) {
        doc_heading(d, "exploratory", "Exploratory comparisons (after seeing the data; adjusted, simultaneous intervals)");
        for (size_t i = 0; i < r->nexplore_sets; i++) {
            const avow_explore_result *er = &r->explore_sets[i];
            const plan_explore *e = er->set;
            strbuf what = {0}, whats = {0};
            if (e->factor < 0) { sb_puts(&what, "cell"); sb_puts(&whats, "cells"); }
            else if (p->nfactors == 1) { sb_puts(&what, "level"); sb_puts(&whats, "levels"); }
            else {
                sb_printf(&what, "level of `%s`", p->factors[e->factor].name);
                sb_printf(&whats, "levels of `%s`", p->factors[e->factor].name);
            }
            strbuf where = {0};
            if (er->slice >= 0)
                sb_printf(&where, " within %s = %s", p->factors[e->within].name,
                          p->factors[e->within].levels[er->slice].name);
            else if (e->factor >= 0 && p->nfactors > 1)
                sb_puts(&where, ", averaged over the other factors");
            const char *gap = i ? "\n" : "";
            if (e->kind == EXPLORE_PAIRS && p->separate_variances) {
                doc_sub(d, "%sEvery pair of %s%s, Games-Howell: each %s own variance, studentized range\n"
                           "for %zu means with Welch-Satterthwaite df for each pair\n",
                        gap, whats.s ? whats.s : "", where.s ? where.s : "", p->nfactors == 1 ? "level's" : "cell's", er->k);
                pair_table(d, p, e, er->pairs, er->npairs, conf, "q");
            } else if (e->kind == EXPLORE_PAIRS) {
                fmt_val(a, sizeof a, er->crit);
                if (where.len)
                    doc_sub(d, "%sEvery pair of %s%s;\nTukey-Kramer: studentized range for %zu means and %.0f df, "
                               "upper %s point %s\n", gap, whats.s ? whats.s : "", where.s, er->k,
                              r->anova[r->nanova - 2].df, p->alpha_text, a);
                else
                    doc_sub(d, "%sEvery pair of %s, Tukey-Kramer: studentized range for %zu means and %.0f df,\n"
                               "upper %s point %s\n", gap, whats.s ? whats.s : "", er->k,
                              r->anova[r->nanova - 2].df, p->alpha_text, a);
                pair_table(d, p, e, er->pairs, er->npairs, conf, "q");
            } else {
                fmt_val(a, sizeof a, er->crit);
                doc_sub(d, "%sEach %s against %s%s%sDunnett (two-sided): critical |t| %s\n", gap, what.s ? what.s : "",
                          mean_name(p, e, e->control), where.s ? where.s : "", where.len ? ";\n" : ", ", a);
                if (er->approximate)
                    doc_p(d, "(approximate: with these data the means are correlated beyond Dunnett's product form)\n");
                pair_table(d, p, e, er->pairs, er->npairs, conf, "|t|");
            }
            if (what.failed || whats.failed || where.failed) d->o->failed = 1;
            sb_free(&what);
            sb_free(&whats);
            sb_free(&where);
        }
        int sliced = 0;
        for (size_t i = 0; i < r->nexplore_sets; i++) sliced |= r->explore_sets[i].slice >= 0;
        if (sliced)
            doc_p(d, "Comparisons within a level of another factor are adjusted within that level.\n");
    }
    if (r->nexplores) {
        doc_heading(d, "exploratory-contrasts", "Exploratory contrasts (chosen after seeing data; Scheffe, simultaneous)");
        table_init(&t, 9, "lrrrrrrll");
        contrast_rows(&t, r->explores, r->nexplores, conf);
        doc_table(d, &t, 3, 1);
        table_free(&t);
        doc_blank(d);
        for (size_t i = 0; i < r->nexplores; i++)
            doc_p(d, "   %s = %s\n", r->explores[i].pc->name, r->explores[i].pc->expr);
    }

    if (ps.nintervals) {
        doc_heading(d, "picture-intervals", "Picture: the comparisons and their intervals");
        if (d->html) {
            html_picture(d, p, r, AVOW_PIC_INTERVALS);
        } else {
            plot_intervals_text(&ps, d->o);
        }
    }
    plot_set_free(&ps);

    checks_section(d, p, r);

    doc_heading(d, "notes", "Notes");
    if (r->inexact_values)
        doc_note(d, NULL, "%llu value%s had more digits than exact arithmetic holds (18 significant digits);\n"
                     "  they entered as the nearest binary64 number with compensated (double-double) sums.\n"
                     "  Every other value was taken exactly from its decimal text.\n",
                  (unsigned long long)r->inexact_values, r->inexact_values == 1 ? "" : "s");
    else
        doc_note(d, NULL, "Every value was taken exactly from its decimal text; sums of squares, means and\n"
                   "  contrast estimates are exact fractions, rounded once for display.\n");
    if (r->ncontrasts) {
        switch (p->adjust) {
        case ADJ_NONE:
            if (r->ncontrasts == 1)
                doc_note(d, NULL, "One planned contrast, tested at %s: there is nothing to adjust.\n", p->alpha_text);
            else
                doc_note(d, NULL, "No adjustment: each contrast is tested at %s on its own; nothing bounds the chance\n"
                             "  of at least one false finding among the %zu. Intervals are per comparison.\n",
                          p->alpha_text, r->ncontrasts);
            break;
        case ADJ_BONFERRONI: case ADJ_SIDAK: case ADJ_SCHEFFE:
            doc_note(d, NULL, "%s controls the chance of any false finding among the planned contrasts at %s.\n"
                         "  Its intervals are simultaneous: all of them hold together with %d%% confidence.\n",
                      mult_words(p->adjust), p->alpha_text, conf);
            break;
        case ADJ_HOLM:
            doc_note(d, NULL, "Holm's step-down method controls the chance of any false finding among the planned\n"
                         "  contrasts at %s. It defines no simultaneous interval: the intervals shown are per\n"
                         "  comparison, at %d%% each.\n", p->alpha_text, conf);
            break;
        case ADJ_FDR:
            doc_note(d, NULL, "The Benjamini-Hochberg method controls the expected share of false findings among\n"
                         "  the findings at %s, not the chance of any. Intervals are per comparison, at %d%% each.\n",
                      p->alpha_text, conf);
            break;
        }
        if (r->complete_set) {
            fmt_val(a, sizeof a, r->contrast_ss_sum);
            fmt_val(b, sizeof b, r->fit == FIT_ONEWAY ? r->anova[0].ss : r->ss_cells);
            doc_note(d, NULL, "The %zu planned contrasts are mutually orthogonal with the replicates obtained, so their\n"
                         "  sums of squares add up to the between-%s sum of squares: %s = %s.\n",
                      r->ncontrasts, r->fit == FIT_ONEWAY ? "levels" : "cells", a, b);
        } else if (r->ncontrasts > 1 && !r->orthogonal_set && r->fit != FIT_GENERAL) {
            doc_note(d, NULL, "The planned contrasts are not all orthogonal with the replicates obtained: their tests\n"
                       "  share information and their sums of squares do not split the between-levels sum.\n");
        }
        if (p->separate_variances && r->fit != FIT_GENERAL)
            doc_note(d, NULL, "Under `variances separate` each planned contrast's standard error comes from each\n"
                         "  level's own variance, with Welch-Satterthwaite degrees of freedom.\n");
        int one = 0;
        for (size_t i = 0; i < r->ncontrasts; i++) one |= r->contrasts[i].pc->side != SIDE_TWO;
        if (one)
            doc_note(d, NULL, "One-sided contrasts use the one-sided p-value in their declared direction and a\n"
                       "  one-sided interval.\n");
    }
    if (r->nexplore_sets || r->nexplores)
        doc_note(d, NULL, "Exploratory comparisons were chosen after seeing the data or as a screen of every\n"
                   "  difference; they are adjusted for the whole set they belong to, and their findings\n"
                   "  are leads to confirm in a new study, not conclusions.\n");
    doc_note(d, "caution", "%s\n", AVOW_CAUTION_WRAPPED);
    doc_finish(d);
}

void render_report_text(const avow_ctx *ctx, const avow_plan *p, const avow_results *r, strbuf *o)
{
    sb_printf(o, "avow %s -- analysis report\n\n", AVOW_VERSION);
    doc d;
    doc_init(&d, o, 0);
    report_body(&d, ctx, p, r);
}
