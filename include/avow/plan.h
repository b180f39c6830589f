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

typedef struct avow_plan {
    const char *path;           /* the study file */
    const char *title;          /* study title */
    const char *response;       /* response name */
    const char *response_label; /* or NULL */
    const char *unit;           /* or NULL */
    plan_factor *factors;       /* treatment factors */
    size_t nfactors;
    size_t ncells;              /* number of cells (levels of the one factor in version 1) */

    int has_data;               /* a data statement is present */
    const char *data_path;      /* as written, relative to the study file's folder */
    const char **columns;       /* per factor, then the response: the column name */
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
    int explore_pairs;          /* all pairwise comparisons requested */
    int has_versus;             /* comparisons with a control requested */
    size_t versus_cell;         /* the control */

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
} avow_plan;

/* Check a parsed study: resolve names, reduce contrasts, check orthogonality and every
 * rule of the language. Diagnostics go to ctx; the plan is filled as far as possible.
 * Returns the number of errors (0: the plan is complete and valid). */
size_t check_study(avow_ctx *ctx, const ast_study *study, avow_plan *plan);

/* Name of a cell, e.g. "oven60" (arena). */
const char *plan_cell_name(const avow_plan *plan, size_t cell);

#endif
