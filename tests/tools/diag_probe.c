/* diag_probe: drives the assumption diagnostics (include/avow/diagnostics.h) from
 * standard input, for the reference check tests/ref/diagnostics.py.
 *
 * Input is whitespace-separated tokens; requests:
 *   groups K  N1 v v ... N2 v v ...   K groups of decimal strings (parsed exactly)
 *       -> one line each: "levene_mean W DF1 DF2 P", "levene_median W DF1 DF2 P",
 *          "bartlett T DF P", "welch F DF1 DF2 P", "kruskal H DF P H_UNCORRECTED
 *          TIE_FACTOR"; a statistic that is not computed gives "NAME status N"
 *   shapiro N x x ...                  binary64 values -> "shapiro W P"
 *   moments N x x ...                  -> "moments G1 G2"
 *   student E N_CELL MSE DFE           -> "student R T"
 *   effect SS_EFFECT DF_EFFECT SS_ERROR DF_ERROR SS_TOTAL
 *                                      -> "effect ETA2 PARTIAL_ETA2 OMEGA2 F"
 * Every number is printed with %.17g. Malformed input is an error (exit 2). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "avow/diagnostics.h"
#include "avow/util.h"

static char tok[256];

/* The next token, or NULL at the end of input. */
static const char *next(void)
{
    if (scanf("%255s", tok) != 1) return NULL;
    return tok;
}

static int fail(const char *msg)
{
    fprintf(stderr, "diag_probe: %s\n", msg);
    return 2;
}

static int read_size(size_t *out)
{
    const char *t = next();
    char *end;
    if (!t) return 0;
    unsigned long long v = strtoull(t, &end, 10);
    if (*end || t[0] == '-') return 0;
    *out = (size_t)v;
    return 1;
}

static int read_double(double *out)
{
    const char *t = next();
    char *end;
    if (!t) return 0;
    *out = strtod(t, &end);
    return *end == 0;
}

static void print_f(const char *name, int st, const avow_dx_ftest *r)
{
    if (st) printf("%s status %d\n", name, st);
    else printf("%s %.17g %.17g %.17g %.17g\n", name, r->stat, r->df1, r->df2, r->p);
}

static int do_groups(void)
{
    size_t k;
    if (!read_size(&k) || k == 0) return fail("groups: bad K");
    avow_dx_group *g = calloc(k, sizeof *g);
    if (!g) return fail("out of memory");
    int rc = 0;
    for (size_t i = 0; i < k && !rc; i++) {
        size_t n;
        if (!read_size(&n) || n == 0) { rc = fail("groups: bad N"); break; }
        avow_dec *v = malloc(n * sizeof *v);
        if (!v) { rc = fail("out of memory"); break; }
        g[i].values = v;
        g[i].n = n;
        for (size_t j = 0; j < n; j++) {
            const char *t = next();
            if (!t || dec_parse(t, strlen(t), &v[j]) != AVOW_OK) { rc = fail("groups: bad value"); break; }
        }
    }
    if (!rc) {
        avow_dx_ftest f;
        avow_dx_chisq c;
        avow_dx_kw kw;
        int st = dx_levene(g, k, AVOW_DX_MEAN, &f);
        print_f("levene_mean", st, &f);
        st = dx_levene(g, k, AVOW_DX_MEDIAN, &f);
        print_f("levene_median", st, &f);
        st = dx_bartlett(g, k, &c);
        if (st) printf("bartlett status %d\n", st);
        else printf("bartlett %.17g %.17g %.17g\n", c.stat, c.df, c.p);
        st = dx_welch(g, k, &f);
        print_f("welch", st, &f);
        st = dx_kruskal(g, k, &kw);
        if (st) printf("kruskal status %d\n", st);
        else printf("kruskal %.17g %.17g %.17g %.17g %.17g\n", kw.test.stat, kw.test.df,
                    kw.test.p, kw.h_uncorrected, kw.tie_factor);
    }
    for (size_t i = 0; i < k; i++) free((void *)g[i].values);
    free(g);
    return rc;
}

static int do_doubles(const char *name)
{
    size_t n;
    if (!read_size(&n)) return fail("bad N");
    double *x = malloc((n ? n : 1) * sizeof *x);
    if (!x) return fail("out of memory");
    for (size_t i = 0; i < n; i++)
        if (!read_double(&x[i])) { free(x); return fail("bad value"); }
    int st;
    if (strcmp(name, "shapiro") == 0) {
        avow_dx_sw r;
        st = dx_shapiro(x, n, &r);
        if (!st) printf("shapiro %.17g %.17g\n", r.w, r.p);
    } else {
        avow_dx_moments r;
        st = dx_moments(x, n, &r);
        if (!st) printf("moments %.17g %.17g\n", r.skewness, r.kurtosis);
    }
    if (st) printf("%s status %d\n", name, st);
    free(x);
    return 0;
}

int main(void)
{
    const char *t;
    while ((t = next()) != NULL) {
        int rc = 0;
        if (strcmp(t, "groups") == 0) {
            rc = do_groups();
        } else if (strcmp(t, "shapiro") == 0 || strcmp(t, "moments") == 0) {
            rc = do_doubles(t[0] == 's' ? "shapiro" : "moments");
        } else if (strcmp(t, "student") == 0) {
            double e, n, mse, dfe, r = 0, tt = 0;
            if (!read_double(&e) || !read_double(&n) || !read_double(&mse) || !read_double(&dfe))
                return fail("student: bad arguments");
            int st = dx_studentized(e, n, mse, dfe, &r, &tt);
            if (st) printf("student status %d\n", st);
            else printf("student %.17g %.17g\n", r, tt);
        } else if (strcmp(t, "effect") == 0) {
            double a[5];
            for (int i = 0; i < 5; i++)
                if (!read_double(&a[i])) return fail("effect: bad arguments");
            avow_dx_effect r;
            int st = dx_effect_sizes(a[0], a[1], a[2], a[3], a[4], &r);
            if (st) printf("effect status %d\n", st);
            else printf("effect %.17g %.17g %.17g %.17g\n", r.eta2, r.partial_eta2, r.omega2,
                        r.cohen_f);
        } else {
            fprintf(stderr, "diag_probe: unknown request \"%s\"\n", t);
            return 2;
        }
        if (rc) return rc;
    }
    if (fflush(stdout) != 0 || ferror(stdout)) return 2;
    return 0;
}
