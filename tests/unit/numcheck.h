/* numcheck.h: numeric checks for the cmocka tests; each prints what it checked when it
 * fails. Include after <cmocka.h>. */
#ifndef AVOW_TESTS_NUMCHECK_H
#define AVOW_TESTS_NUMCHECK_H

#include <math.h>

/* Fail unless |got - want| <= tol |want| (NaN fails). */
static inline void rel_at(double got, double want, double tol, const char *what,
                          const char *file, int line)
{
    double err = fabs(got - want) / fabs(want);
    if (!(err <= tol)) {
        print_error("%s: got %.17g, want %.17g: relative error %.3g > %.3g\n",
                    what, got, want, err, tol);
        _fail(file, line);
    }
}
#define CHECK_REL(got, want, tol, what) rel_at((got), (want), (tol), (what), __FILE__, __LINE__)

/* Fail unless |got - want| <= tol (NaN fails). */
static inline void abs_at(double got, double want, double tol, const char *what,
                          const char *file, int line)
{
    double err = fabs(got - want);
    if (!(err <= tol)) {
        print_error("%s: got %.17g, want %.17g +- %.3g: off by %.3g\n",
                    what, got, want, tol, err);
        _fail(file, line);
    }
}
#define CHECK_ABS(got, want, tol, what) abs_at((got), (want), (tol), (what), __FILE__, __LINE__)

#endif
