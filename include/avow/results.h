/* results.h: what `avow run` computes, as plain data for the renderers. The reader
 * fills the data part (row accounting, per-level sums); the analysis fills the rest.
 * Renderers only format these numbers. */
#ifndef AVOW_RESULTS_H
#define AVOW_RESULTS_H

#include <stddef.h>
#include <stdint.h>

#include "avow/diagnostics.h"
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
typedef enum { ROW_TERM = 0, ROW_BLOCK, ROW_RESIDUAL, ROW_TOTAL } avow_row_kind;
typedef struct avow_anova_row {
    const char *source;     /* "cure", "resin by heat", the block's name, "residual", "total" */
    avow_row_kind kind;
    double df, ss, ms, f, p;
} avow_anova_row;

/* The model-based mean of one level of a factor (several factors): the average of the
 * fitted cell means with that level, the other factors' levels weighted equally. */
typedef struct avow_margin_result {
    size_t factor, level;
    uint64_t n;             /* observations with that level */
    double mean;            /* marginal mean */
    double se;              /* its standard error, sqrt(MSE v) */
} avow_margin_result;

/* One block's raw summary. */
typedef struct avow_block_result {
    const char *label;      /* the block's level name or data label */
    uint64_t n;
    double mean;
} avow_block_result;

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
    double std_effect;      /* estimate / residual standard deviation */
    int reject;             /* decision at the study's alpha after adjustment */
} avow_contrast_result;

/* Effect sizes of one row of the ANOVA table (terms and the block). */
typedef struct avow_effect_result {
    int ok;                 /* computed (AVOW_OK from dx_effect_sizes_exact) */
    avow_dx_effect es;      /* eta^2, partial eta^2, omega^2, Cohen's f */
    int ci_ok;              /* the interval below exists */
    double f_lo, f_hi;      /* confidence interval for f from the noncentral F (Steiger
                               2004), at the study's confidence */
} avow_effect_result;

/* An observation whose externally studentized residual is beyond the limit. */
typedef struct avow_unusual {
    uint64_t line;          /* in the data file */
    size_t cell;            /* treatment cell */
    size_t block;           /* block (0 without one) */
    char value_text[96];    /* the value as exact decimal text */
    double fitted;          /* the model's fitted value */
    double residual;        /* value - fitted */
    double t;               /* externally studentized residual */
} avow_unusual;

/* Most unusual observations listed one by one. */
#define AVOW_MAX_LISTED_UNUSUAL 20

/* One observation's place in the fitted model, for the pictures of the residuals
 * (kept only when avow_data.residuals is set). */
typedef struct avow_residual {
    uint64_t line;          /* in the data file */
    size_t cell;            /* treatment cell */
    size_t block;           /* block (0 without one) */
    double fitted;          /* the model's fitted value, exact and rounded once */
    double residual;        /* value - fitted, exact and rounded once */
    double normal_score;    /* the expected standard normal value at its rank among all the
                               residuals: Blom's position, PhiInv((r - 3/8) / (N + 1/4)),
                               ties ranked in file order */
} avow_residual;

/* Checks of the assumptions and robust alternatives (computed from the kept values). */
typedef struct avow_assumptions {
    int computed;           /* the values were kept (not --no-diagnostics) */
    size_t ngroups;         /* groups of the spread tests: the treatment cells */
    int on_residuals;       /* the spread tests use residuals (block or omitted
                               interactions), not the raw values */
    int levene_rc, bf_rc, bartlett_rc;      /* AVOW_OK or the reason (dx_status_text) */
    avow_dx_ftest levene, bf;
    avow_dx_chisq bartlett;
    size_t nresid;          /* residuals behind the normality checks */
    int shapiro_rc, moments_rc;
    avow_dx_sw shapiro;
    avow_dx_moments moments;
    double unusual_limit;   /* |t| beyond which an observation is listed */
    int unusual_rc;         /* AVOW_OK, or why studentized residuals do not exist */
    avow_unusual *unusual;  /* the first AVOW_MAX_LISTED_UNUSUAL, by line */
    size_t nunusual, nunusual_total;
    int robust_applies;     /* the robust one-way alternatives apply (no block) */
    int welch_rc, kruskal_rc;
    avow_dx_ftest welch;
    avow_dx_kw kruskal;
    avow_residual *resid;   /* every observation in file order (avow_data.residuals), or NULL */
    size_t nresiduals;
} avow_assumptions;

/* Points on which the reference curve of a set of means is drawn. */
#define AVOW_CURVE_POINTS 161
/* The curve spans this many scale units either side of its centre. */
#define AVOW_CURVE_SPAN 4.0

/* The reference distribution of a set of means for the pictures: the t distribution
 * with the residual df, scaled by the standard error of one mean. A mean of n runs has
 * standard error resid_sd / sqrt(n); with unequal n the scale takes the harmonic mean of
 * the n (for marginal means the effective n, MSE / se^2), so that scale^2 is the average
 * squared standard error. Sliding the curve along the axis, means that cannot sit under
 * it together differ by more than the noise explains. */
typedef struct avow_reference {
    int ok;                 /* the curve exists (residual df > 0 and MSE > 0) */
    size_t k;               /* means behind it */
    double n_h;             /* harmonic mean of their n (effective n for marginal means) */
    int equal_n;            /* every mean has the same n */
    double scale;           /* resid_sd / sqrt(n_h) */
    double df;              /* residual degrees of freedom */
    double centre;          /* where it is drawn: the grand mean (or the factor's average) */
    double x[AVOW_CURVE_POINTS];      /* centre + u scale, u evenly from -SPAN to SPAN */
    double height[AVOW_CURVE_POINTS]; /* t density at u relative to its peak (1 at u = 0) */
} avow_reference;

/* One exploratory comparison of two means (all pairs, or a level against the control). */
typedef struct avow_pair_result {
    size_t a, b;            /* the means compared (levels of the set's factor, or treatment
                               cells when it compares every cell): estimate = mean(a) - mean(b) */
    double estimate;        /* difference of the two means */
    double se;              /* its standard error: sqrt(MSE (1/n_a + 1/n_b)) */
    double stat;            /* the test statistic (studentized range q, or Dunnett's |t|) */
    double df;              /* degrees of freedom (residual; Welch-Satterthwaite per pair) */
    double p_adj;           /* adjusted p-value for the whole set of comparisons */
    double ci_lo, ci_hi;    /* simultaneous interval for the whole set */
    int reject;             /* p_adj <= alpha */
} avow_pair_result;

/* One family of exploratory comparisons: a set of the plan, within one level of its
 * `within` factor (or over the marginal means). */
typedef struct avow_explore_result {
    const plan_explore *set;    /* the set in the plan */
    long slice;             /* level of set->within, or -1 */
    size_t k;               /* number of means in the family */
    avow_pair_result *pairs;
    size_t npairs;
    double crit;            /* pairs: studentized range point q (intervals use q/sqrt(2));
                               versus: Dunnett's two-sided critical |t|; NaN when per pair */
    int approximate;        /* versus: the means are correlated beyond Dunnett's product form */
} avow_explore_result;

/* How the model was fitted. */
typedef enum {
    FIT_ONEWAY = 0,         /* one factor: the between-levels sum of squares in closed form */
    FIT_CELLS,              /* every interaction, no block: hypotheses on the cell means */
    FIT_GENERAL             /* blocks or omitted interactions: least squares on the cells */
} avow_fit;

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

    /* per treatment cell (pooled over blocks) */
    avow_level_result *levels;  /* ncells entries */
    size_t ncells;
    avow_margin_result *margins; /* several factors: every level of every factor */
    size_t nmargins;
    avow_block_result *blocks;  /* with a block: every block */
    size_t nblocks;

    /* reference distributions of the means, for the pictures */
    avow_reference ref_cells;   /* of the treatment cell (level) means */
    avow_reference ref_margins[AVOW_MAX_FACTORS]; /* several factors: of each factor's
                                   marginal means */

    /* the model */
    avow_fit fit;
    int balanced;           /* every cell (within every block) has the same number of runs */
    size_t empty_cells;     /* block-by-treatment cells without data (general fit) */
    double df_within;       /* residual df from replicates within cells */
    double ss_within;       /* and their sum of squares */
    double df_lof;          /* residual df from what the model leaves out (block by
                               treatment, omitted interactions) */
    double ss_cells;        /* between-cells sum of squares, sum n_c (m_c - ybar)^2 over the
                               treatment cells (cell-means fits) */

    /* ANOVA */
    uint64_t n;             /* observations used */
    double grand_mean;
    avow_anova_row *anova;  /* terms, block, residual, total */
    size_t nanova;
    avow_effect_result *effects; /* per ANOVA row (terms and block; others not ok) */
    avow_assumptions checks; /* assumption checks and robust alternatives */
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
    double scheffe_crit;    /* sqrt(q F_alpha(q, df)), q the treatment df of the model */
    avow_explore_result *explore_sets; /* explore pairs / versus, per slice */
    size_t nexplore_sets;
} avow_results;

#endif
