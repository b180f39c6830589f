/* srange_probe: drives the studentized range functions from standard input, for the
 * reference check tests/ref/srange.py.
 *
 * Each input line is one request, "cdf Q K DF", "sf Q K DF" or "qinv P K DF" (DF may
 * be "inf"); each gives one output line: the value with %.17g, or for qinv a nonzero
 * status as "status N". Blank lines are skipped; anything else is an error (exit 2). */
#include <stdio.h>
#include <string.h>

#include "avow/srange.h"

int main(void)
{
    char line[512];
    unsigned long lineno = 0;
    while (fgets(line, sizeof line, stdin)) {
        lineno++;
        char fn[16];
        double a, k, df;
        char extra;
        if (strspn(line, " \t\r\n") == strlen(line)) continue;
        if (sscanf(line, "%15s %lf %lf %lf %c", fn, &a, &k, &df, &extra) != 4) {
            fprintf(stderr, "srange_probe: line %lu: expected \"FN X K DF\"\n", lineno);
            return 2;
        }
        if (strcmp(fn, "cdf") == 0) {
            printf("%.17g\n", srange_cdf(a, k, df));
        } else if (strcmp(fn, "sf") == 0) {
            printf("%.17g\n", srange_sf(a, k, df));
        } else if (strcmp(fn, "qinv") == 0) {
            double q = 0;
            int st = srange_qinv(a, k, df, &q);
            if (st) printf("status %d\n", st);
            else printf("%.17g\n", q);
        } else {
            fprintf(stderr, "srange_probe: line %lu: unknown function \"%s\"\n", lineno, fn);
            return 2;
        }
    }
    if (fflush(stdout) != 0 || ferror(stdout)) return 2;
    return 0;
}
