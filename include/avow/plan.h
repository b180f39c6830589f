/* plan.h: the checked study (the "Plan"), produced by the checker from the syntax tree.
 * Everything a later stage needs, with contrasts reduced to exact rational coefficients
 * over cells. A cell is one combination of factor levels; with one factor, one level.
 * All memory belongs to the context's arena. */
#ifndef AVOW_PLAN_H
#define AVOW_PLAN_H

#include <stddef.h>
#include <stdint.h>

#include "avow/ast.h"
#include "avow/diag.h"
#include "avow/multiplicity.h"
#include "avow/rational.h"


/* Most treatment factors in one study, and most treatment cells (combinations). */
#define AVOW_MAX_FACTORS 8
#define AVOW_MAX_CELLS 4096

typedef struct plan_level {
    const char *name;       /* level name (decoded) */
    const char *code;       /* label in the data when it differs from name, or NULL */
    const char *desc;       /* description, or NULL */
    int has_at;             /* carries an `at` value */
    avow_rat at;            /* the `at` value, exact */
    const char *at_text;    /* the `at` value as written */
    avow_span span;         /* the declaration */
} plan_level;

typedef struct plan_factor {
    const char *name;       /* factor name */
    const char *label;      /* descriptive label, or NULL */
    plan_level *levels;     /* its levels in declaration order */
    size_t nlevels;
    avow_span span;         /* the factor statement */
} plan_factor;

/* Which interactions of the treatment factors the model keeps (`interactions`). */
typedef enum { INTER_ALL = 0, INTER_NONE, INTER_PAIRS } plan_interactions;

/* One term of the model's treatment part: a main effect or an interaction. */
typedef struct plan_term {
    const char *name;       /* "resin", "resin by heat" */
    unsigned mask;          /* bit f set: treatment factor f takes part */
    size_t order;           /* number of factors in the term */
    size_t df;              /* product of (levels - 1) over its factors */
} plan_term;

/* One set of exploratory comparisons (`explore pairs`, `explore versus`). */
typedef enum { EXPLORE_PAIRS = 0, EXPLORE_VERSUS } plan_explore_kind;
typedef struct plan_explore {
    plan_explore_kind kind;
    long factor;            /* the factor whose levels are compared; -1: every treatment cell */
    long within;            /* compared within each level of this factor; -1: marginal means */
    size_t control;         /* versus: the control level of `factor` (the cell when factor is -1) */
    avow_span span;         /* the statement */
} plan_explore;

/* A contrast reduced to one exact coefficient per cell. */
typedef struct plan_contrast {
    const char *name;       /* contrast name */
    const char *desc;       /* description, or NULL */
    const char *expr;       /* the expression in canonical form */
    avow_rat *coef;         /* ncells coefficients, exact */
    ast_side side;          /* two-sided, greater (> 0) or less (< 0) */
    int valid;              /* reduced without error */
    avow_span span;         /* the statement */
} plan_contrast;

/* Power of one F test of the model at the planned replicates (a main effect, at its
 * least favourable configuration). */
typedef struct plan_power_term {
    const char *name;       /* the factor */
    double df1;             /* its degrees of freedom */
    double lambda;          /* noncentrality at the least favourable configuration */
    double power;           /* at the planned replicates */
    double power_needed;    /* at the replicates needed (when a target power is given) */
} plan_power_term;

/* Power of one planned contrast's test. */
typedef struct plan_power_contrast {
    const plan_contrast *pc;
    int sides;              /* 1: one-sided in the declared direction; 2: two-sided */
    double level;           /* the per-test level the adjustment implies (NaN for Scheffe) */
    double crit;            /* Scheffe: the critical |t| (else NaN) */
    double delta;           /* noncentrality detect / (sigma sqrt(sum c^2/n)), c scaled so
                               that its positive coefficients sum to 1 */
    double power;
    double power_needed;
} plan_power_contrast;

/* The power figures of `avow check` (plan block with sigma and detect). */
typedef struct plan_power {
    int computed;           /* the figures below exist */
    const char *why_not;    /* else why not (NULL when sigma or detect is absent) */
    int at_planned;         /* figures at the planned replicates exist */
    double df2;             /* residual df at the planned replicates */
    plan_power_term *terms; /* one per treatment factor */
    size_t nterms;
    plan_power_contrast *contrasts; /* one per valid planned contrast */
    size_t ncontrasts;
    int has_target;         /* `power P` was given */
    double target;
    int64_t needed;         /* smallest equal replicates per cell reaching the target for
                               every F test and contrast; 0 when beyond the search */
    int64_t needed_runs;    /* runs at that number */
    double needed_df2;
} plan_power;

typedef struct avow_plan {
    const char *path;           /* the study file */
    const char *title;          /* study title */
    const char *response;       /* response name */
    const char *response_label; /* or NULL */
    const char *unit;           /* or NULL */
    plan_factor *factors;       /* treatment factors */
    size_t nfactors;
    size_t ncells;              /* treatment cells: every combination of the factors' levels,
                                   the last factor varying fastest */
    const char **cell_names;    /* plan_cell_name of every cell */
    plan_factor *block;         /* the blocking factor, or NULL */
    int block_from_data;        /* its levels are taken from the data (block->nlevels 0) */
    plan_interactions interactions; /* interactions the model keeps */
    plan_term *terms;           /* the treatment terms of the model, main effects first */
    size_t nterms;
    size_t treat_df;            /* sum of the terms' df: the dimension of the treatment part */
    int saturated;              /* no block and every interaction: the cell-means model */

    int has_data;               /* a data statement is present */
    const char *data_path;      /* as written, relative to the study file's folder */
    const char **columns;       /* per factor, then the block (if any), then the response */
    const char **missing;       /* missing-value tokens */
    size_t nmissing;
    const char *sha256;         /* lowercase hex lock, or NULL */
    char delimiter;             /* 0: by extension (',' or tab for .tsv) */

    avow_rat alpha;             /* family-wise error rate (or FDR) */
    const char *alpha_text;     /* as written, or "0.05" by default */
    avow_adjust adjust;         /* adjustment of planned contrasts */
    int orthogonal;             /* policy: planned contrasts must be orthogonal */
    int separate_variances;     /* `variances separate`: pairs by Games-Howell */

    plan_contrast *contrasts;   /* planned contrasts, in source order */
    size_t ncontrasts;
    avow_rat *ortho;            /* ncontrasts^2 products sum c_i d_i / n_i */
    plan_contrast *explores;    /* exploratory contrasts (Scheffe) */
    size_t nexplores;
    plan_explore *explore_sets; /* exploratory comparison sets, in source order */
    size_t nexplore_sets;

    int has_plan;               /* a plan block is present */
    int64_t *replicates;        /* planned replicates per cell, or NULL */
    int has_sigma, has_detect, has_power, has_seed;
    avow_rat sigma, detect, power;
    const char *sigma_text, *detect_text, *power_text;
    uint64_t seed;

    /* The family plan, worked out by the checker. */
    size_t family_m;            /* valid planned contrasts sharing alpha */
    double *family_levels;      /* per-test level by rank (family_m entries; equal for
                                   none, bonferroni and sidak; NULL for scheffe) */
    int64_t planned_runs;       /* total planned runs, 0 when no replicates are planned */
    double scheffe_crit;        /* critical |t| of Scheffe's rule when runs are planned, else 0 */

    plan_power powers;          /* power and replicates needed (src/power.c) */
} avow_plan;

/* Work out plan->powers from the plan block (called by check_study when the plan has no
 * errors): the power of each main effect's F test at its least favourable configuration
 * (two level means `detect` apart, the others at their midpoint) and of each planned
 * contrast's t test, from the noncentral F and t distributions (noncentral.h), at the
 * planned replicates, and with `power P` the smallest equal number of replicates per
 * cell that reaches P for all of them. Memory comes from the context's arena. */
void plan_compute_power(avow_ctx *ctx, avow_plan *plan);

/* Check a parsed study: resolve names, reduce contrasts, check orthogonality and every
 * rule of the language. Diagnostics go to ctx; the plan is filled as far as possible.
 * Returns the number of errors (0: the plan is complete and valid). */
size_t check_study(avow_ctx *ctx, const ast_study *study, avow_plan *plan);

/* Name of a treatment cell: the level name with one factor ("oven60"), else the
 * language's own form "cell(A, high)" (arena; "?" when out of memory). */
const char *plan_cell_name(const avow_plan *plan, size_t cell);

/* The level of factor f in a treatment cell. */
size_t plan_cell_level(const avow_plan *plan, size_t cell, size_t f);

/* The model's coding of a treatment term (sum-to-zero effect coding, the products of
 * the factors' codes for an interaction): the value, -1, 0 or 1, of the term's column j
 * (0 <= j < term->df) at a treatment cell. A factor with L levels has columns
 * j = 0..L-2 with code 1 at level j, -1 at level L-1, 0 elsewhere. */
int plan_term_code(const avow_plan *plan, const plan_term *term, size_t cell, size_t j);

/* Parameters of the model (intercept, treatment terms, blocks); 0 when the number of
 * blocks is known only from the data. */
size_t plan_model_params(const avow_plan *plan);

/* Name of column col of the data: the factor, block or response it holds. */
const char *plan_column_role(const avow_plan *plan, size_t col);

#endif
