/* noncentral_probe: drives the noncentral F and t functions from standard input, for the
 * reference check tests/ref/noncentral.py.
 *
 * Each input line is one request; each gives one output line, the value with %.17g
 * (for "lambda", a nonzero status as "status N"):
 *   fp X D1 D2 LAMBDA        ncdist_f_p          fq X D1 D2 LAMBDA   ncdist_f_q
 *   tp T NU DELTA            ncdist_t_p          tq T NU DELTA       ncdist_t_q
 *   lambda X D1 D2 P         ncdist_f_lambda
 *   fpower ALPHA D1 D2 LAMBDA                    ncdist_f_power
 *   tpower ALPHA NU DELTA SIDES                  ncdist_t_power
 * Numbers are read with strtod ("inf" and "nan" included). Blank lines are skipped;
 * anything else is an error (exit 2). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "avow/noncentral.h"

/* Read up to `max` numbers after the function name; returns how many, -1 on junk. */
static int numbers(char *s, double *v, int max)
{
    int n = 0;
    for (;;) {
        s += strspn(s, " \t\r\n");
        if (*s == '\0') return n;
        if (n == max) return -1;
        char *end;
        v[n] = strtod(s, &end);
        if (end == s || (*end != '\0' && strchr(" \t\r\n", *end) == NULL)) return -1;
        n++;
        s = end;
    }
}

int main(void)
{
    char line[512];
    unsigned long lineno = 0;
    while (fgets(line, sizeof line, stdin)) {
        lineno++;
        if (strspn(line, " \t\r\n") == strlen(line)) continue;
        char *s = line + strspn(line, " \t");
        size_t fl = strcspn(s, " \t\r\n");
        char fn[16];
        if (fl == 0 || fl >= sizeof fn) goto bad;
        memcpy(fn, s, fl);
        fn[fl] = '\0';
        double v[4];
        int n = numbers(s + fl, v, 4);
        if (strcmp(fn, "fp") == 0 && n == 4) {
            printf("%.17g\n", ncdist_f_p(v[0], v[1], v[2], v[3]));
        } else if (strcmp(fn, "fq") == 0 && n == 4) {
            printf("%.17g\n", ncdist_f_q(v[0], v[1], v[2], v[3]));
        } else if (strcmp(fn, "tp") == 0 && n == 3) {
            printf("%.17g\n", ncdist_t_p(v[0], v[1], v[2]));
        } else if (strcmp(fn, "tq") == 0 && n == 3) {
            printf("%.17g\n", ncdist_t_q(v[0], v[1], v[2]));
        } else if (strcmp(fn, "lambda") == 0 && n == 4) {
            double l = 0;
            int st = ncdist_f_lambda(v[0], v[1], v[2], v[3], &l);
            if (st) printf("status %d\n", st);
            else printf("%.17g\n", l);
        } else if (strcmp(fn, "fpower") == 0 && n == 4) {
            printf("%.17g\n", ncdist_f_power(v[0], v[1], v[2], v[3]));
        } else if (strcmp(fn, "tpower") == 0 && n == 4) {
            printf("%.17g\n", ncdist_t_power(v[0], v[1], v[2], (int)v[3]));
        } else {
            goto bad;
        }
        continue;
    bad:
        fprintf(stderr, "noncentral_probe: line %lu: expected a function name and its "
                        "arguments (see the top of tests/tools/noncentral_probe.c)\n", lineno);
        return 2;
    }
    if (fflush(stdout) != 0 || ferror(stdout)) return 2;
    return 0;
}
