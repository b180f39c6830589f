/* results.h: what `avow run` computes, as plain data for the renderers. The reader
 * fills the data part (row accounting, per-level sums); the analysis fills the rest.
 * Renderers only format these numbers. */
#ifndef AVOW_RESULTS_H
#define AVOW_RESULTS_H

#include <stddef.h>
#include <stdint.h>

#include "avow/plan.h"

/* Most line numbers of rows with a missing value listed one by one in the report. */
#define AVOW_MAX_LISTED_MISSING 20

/* Summary of one level (cell). */
typedef struct avow_level_result {
    uint64_t n;             /* observations used */
    double mean;            /* exact mean, correctly rounded */
    double sd;              /* sample standard deviation (n - 1 divisor); NaN when n < 2 */
    double min, max;        /* smallest and largest observation */
    char min_text[96];      /* the same as exact decimal text */
    char max_text[96];
    int exact;              /* every value of the level was taken exactly */
} avow_level_result;

/* One row of the ANOVA table. Values that do not exist are NaN. */
typedef struct avow_anova_row {
    const char *source;     /* "cure", "residual", "total" */
    double df, ss, ms, f, p;
} avow_anova_row;

/* One tested contrast (planned or exploratory). */
typedef struct avow_contrast_result {
    const plan_contrast *pc;  /* the contrast in the plan */
    double estimate;        /* sum c_i ybar_i */
    double se;              /* sqrt(MSE sum c_i^2 / n_i) */
    double df;              /* residual degrees of freedom */
    double t;               /* estimate / se */
    double p;               /* unadjusted p-value (one-sided in the declared direction) */
    double p_adj;           /* adjusted within its family */
    double ci_lo, ci_hi;    /* interval at the study's confidence; +-INFINITY when one-sided */
    int ci_simultaneous;    /* the interval holds for the whole family at once */
    double ss;              /* estimate^2 / sum c_i^2 / n_i */
    int reject;             /* decision at the study's alpha after adjustment */
} avow_contrast_result;

/* One exploratory comparison of two levels (all pairs, or a level against the control). */
typedef struct avow_pair_result {
    size_t a, b;            /* the cells compared: estimate = mean(a) - mean(b) */
    double estimate;        /* difference of the two means */
    double se;              /* its standard error: sqrt(MSE (1/n_a + 1/n_b)) */
    double stat;            /* the test statistic (studentized range q, or Dunnett's |t|) */
    double df;              /* degrees of freedom (residual; Welch-Satterthwaite per pair) */
    double p_adj;           /* adjusted p-value for the whole set of comparisons */
    double ci_lo, ci_hi;    /* simultaneous interval for the whole set */
    int reject;             /* p_adj <= alpha */
} avow_pair_result;

/* Everything `avow run` reports. */
typedef struct avow_results {
    /* inputs */
    char study_sha256[65];  /* of the study file's bytes */
    char data_sha256[65];   /* of the data file's bytes */
    const char *data_path;  /* as opened (relative to the working directory) */
    const char *data_shown; /* as shown in the report (as written in the study, or --data) */
    int data_from_option;   /* --data was given */
    char delimiter;         /* the delimiter used */

    /* row accounting */
    uint64_t rows;          /* data rows read (header excluded) */
    uint64_t used;          /* rows that entered the analysis */
    uint64_t blank;         /* blank lines skipped */
    uint64_t missing_response;  /* rows whose response is a missing-value token */
    uint64_t missing_level;     /* rows whose level label is a missing-value token */
    uint64_t missing_lines[AVOW_MAX_LISTED_MISSING]; /* first lines with a missing value */
    size_t nmissing_lines;
    uint64_t inexact_values;    /* values that could not be held exactly (compensated) */

    /* per level */
    avow_level_result *levels;  /* ncells entries */
    size_t ncells;

    /* ANOVA */
    uint64_t n;             /* observations used */
    double grand_mean;
    avow_anova_row anova[3];    /* between levels, residual, total */
    double r_squared;
    double resid_sd;        /* sqrt of the residual mean square */
    double mse;             /* residual mean square */

    /* contrasts */
    avow_contrast_result *contrasts;    /* planned, plan order */
    size_t ncontrasts;
    double t_crit;          /* per-comparison two-sided critical t at alpha */
    double family_crit;     /* the critical |t| behind simultaneous intervals, or NaN */
    int orthogonal_set;     /* planned contrasts mutually orthogonal with the actual n */
    int complete_set;       /* ... and there are k - 1 of them: their SS add to SSB */
    double contrast_ss_sum; /* sum of the planned contrasts' SS */
    avow_contrast_result *explores;     /* exploratory contrasts (Scheffe) */
    size_t nexplores;
    double scheffe_crit;    /* sqrt((k - 1) F_alpha(k - 1, N - k)) */
    avow_pair_result *pairs;    /* explore pairs: every pair, Tukey-Kramer */
    size_t npairs;
    double pairs_crit;      /* studentized range upper-alpha point q; intervals use q/sqrt(2) */
    avow_pair_result *versus;   /* explore versus: each level against the control, Dunnett */
    size_t nversus;
    double versus_crit;     /* Dunnett's two-sided critical value */
} avow_results;

#endif
