/* multiplicity.h: adjusting a family of m p-values for multiple testing.
 *
 * Methods (adjusted p-values; every one is capped at 1):
 *   none        p
 *   bonferroni  min(1, m p)
 *   holm        Holm (1979) step-down: with p_(1) <= ... <= p_(m),
 *               p~_(r) = max over j <= r of min(1, (m - j + 1) p_(j))
 *   sidak       Sidak (1967) single-step: 1 - (1 - p)^m, as -expm1(m log1p(-p))
 *   scheffe     Scheffe (1953): not a p-value adjustment; the contrast module computes
 *               Scheffe p-values from F. Only its name is handled here.
 *   fdr         Benjamini & Hochberg (1995) step-up false discovery rate:
 *               p~_(r) = min over j >= r of min(1, m p_(j) / j)
 * Ties among the p-values are ranked by their index (stable), so results never depend
 * on the sort routine; the step-down and step-up formulas give tied p-values equal
 * adjusted values anyway. */
#ifndef AVOW_MULTIPLICITY_H
#define AVOW_MULTIPLICITY_H

#include <stddef.h>

/* A multiplicity adjustment method. */
typedef enum {
    ADJ_NONE,        /* no adjustment */
    ADJ_BONFERRONI,  /* Bonferroni: m p */
    ADJ_HOLM,        /* Holm (1979) step-down Bonferroni */
    ADJ_SIDAK,       /* Sidak (1967): 1 - (1 - p)^m */
    ADJ_SCHEFFE,     /* Scheffe (1953): from F, in the contrast module */
    ADJ_FDR          /* Benjamini & Hochberg (1995) false discovery rate */
} avow_adjust;

/* The method's name as written in study files: "none", "bonferroni", "holm", "sidak",
 * "scheffe", "fdr". NULL for a value outside the enum. */
const char *mult_name(avow_adjust method);

/* The method in words for reports ("Holm step-down", "Benjamini-Hochberg (false
 * discovery rate)"). */
const char *mult_words(avow_adjust method);

/* Look up a method by its exact (case-sensitive) name: s holds len bytes, not
 * necessarily NUL-terminated. Returns 0 and sets *out, or AVOW_EDOM (out untouched)
 * for an unknown name or NULL arguments. */
int mult_from_name(const char *s, size_t len, avow_adjust *out);

/* Adjusted p-values p_adj[0..m-1] for p[0..m-1] under method (formulas above).
 * Every p[i] must lie in [0, 1]. p_adj may be the same array as p (in place).
 * m = 0 is accepted and does nothing. Returns 0; AVOW_EDOM for ADJ_SCHEFFE, a value
 * outside the enum, a p-value outside [0, 1] or NaN, or NULL arrays with m > 0;
 * AVOW_ENOMEM when the ranking buffer (holm, fdr) cannot be allocated. p_adj is left
 * unchanged on error. */
int mult_adjust_p(avow_adjust method, const double *p, size_t m, double *p_adj);

/* Per-test significance level of the Sidak procedure for a family of m tests at
 * familywise level alpha: 1 - (1 - alpha)^(1/m), computed as -expm1(log1p(-alpha)/m).
 * NaN unless 0 <= alpha <= 1 and m >= 1. */
double mult_sidak_alpha(double alpha, size_t m);

/* Decisions from adjusted p-values: reject[i] = 1 when p_adj[i] <= alpha, else 0
 * (a p-value equal to alpha rejects). The rule is the same for every method, Scheffe
 * included, once p-values are adjusted; method is checked to be a value of the enum.
 * alpha must lie in (0, 1) and every p_adj[i] in [0, 1]. Returns 0, or AVOW_EDOM
 * (reject untouched) for invalid arguments or NULL arrays with m > 0. */
int mult_reject(avow_adjust method, const double *p_adj, size_t m, double alpha,
                int *reject);

#endif
