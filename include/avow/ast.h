/* ast.h: the syntax tree of a study file. Nodes live in the context's arena and carry
 * byte spans into the source; lists are singly linked through `next`. */
#ifndef AVOW_AST_H
#define AVOW_AST_H

#include <stddef.h>
#include <stdint.h>

#include "avow/diag.h"

/* A name as written: an identifier or a quoted string (decoded). */
typedef struct ast_name {
    const char *s;      /* decoded text, NUL-terminated (arena) */
    uint32_t len;       /* bytes in s */
    avow_span span;     /* where it was written */
    int quoted;         /* written as a string */
} ast_name;

/* A string literal (decoded). */
typedef struct ast_str {
    const char *s;      /* decoded text, NUL-terminated (arena) */
    uint32_t len;       /* bytes in s */
    avow_span span;     /* including the quotes */
    struct ast_str *next; /* next string of a list (missing tokens) */
} ast_str;

/* A number literal, kept as written; the checker converts it exactly. */
typedef struct ast_num {
    const char *text;   /* the digits as written (points into the source) */
    uint32_t len;       /* bytes in text */
    int neg;            /* written with a leading minus */
    avow_span span;     /* including the minus */
} ast_num;

typedef enum {
    EX_NUM,     /* number literal */
    EX_REF,     /* level reference, maybe factor-qualified */
    EX_NEG,     /* unary minus */
    EX_ADD, EX_SUB, EX_MUL, EX_DIV,
    EX_CALL     /* mean(...), trend(...), or an unknown function */
} ast_expr_kind;

typedef struct ast_expr {
    ast_expr_kind kind;
    avow_span span;             /* the whole expression */
    ast_num num;                /* EX_NUM */
    ast_name factor;            /* EX_REF: qualifying factor (len 0, s NULL if none) */
    ast_name level;             /* EX_REF: the level */
    struct ast_expr *lhs, *rhs; /* EX_NEG uses lhs; binary operators use both */
    ast_name fn;                /* EX_CALL: function name */
    struct ast_expr *args;      /* EX_CALL: arguments, linked by next */
    struct ast_expr *next;      /* next argument in a call */
    int parens;                 /* written inside parentheses (formatter keeps none it needn't) */
} ast_expr;

/* One level of a factor. */
typedef struct ast_level {
    ast_name name;
    ast_num at;                 /* `at` value; at.text NULL if absent */
    ast_str *code;              /* `code` label or NULL */
    ast_str *desc;              /* description or NULL */
    avow_span span;             /* the whole level declaration */
    struct ast_level *next;
} ast_level;

typedef enum { DI_FROM, DI_MISSING, DI_SHA256, DI_DELIMITER } ast_data_kind;

/* One item of a data block. */
typedef struct ast_data_item {
    ast_data_kind kind;
    ast_name name;              /* DI_FROM: factor or response name */
    ast_str *strs;              /* the column (FROM), tokens (MISSING), digest, delimiter */
    avow_span span;
    struct ast_data_item *next;
} ast_data_item;

/* One `LEVEL N` pair of a per-level replicates item. */
typedef struct ast_rep {
    ast_name factor;            /* qualifying factor or len 0 */
    ast_name level;
    ast_num count;
    avow_span span;
    struct ast_rep *next;
} ast_rep;

typedef enum { PI_REPLICATES, PI_REPLICATES_EACH, PI_SIGMA, PI_DETECT, PI_POWER, PI_SEED }
    ast_plan_kind;

/* One item of a plan block. */
typedef struct ast_plan_item {
    ast_plan_kind kind;
    ast_num num;                /* the number (all but PI_REPLICATES_EACH) */
    ast_rep *reps;              /* PI_REPLICATES_EACH */
    avow_span span;
    avow_span key;              /* the item's keyword */
    struct ast_plan_item *next;
} ast_plan_item;

typedef enum {
    ST_STUDY, ST_RESPONSE, ST_FACTOR, ST_DATA, ST_ALPHA, ST_ADJUST, ST_ORTHOGONAL,
    ST_CONTRAST, ST_EXPLORE_PAIRS, ST_EXPLORE_VERSUS, ST_EXPLORE_CONTRAST, ST_PLAN,
    ST_VARIANCES, ST_BLOCK, ST_INTERACTIONS,
    ST_COUNT            /* number of statement kinds */
} ast_stmt_kind;

/* Direction of a planned contrast. */
typedef enum { SIDE_TWO = 0, SIDE_GREATER = 1, SIDE_LESS = 2 } ast_side;

/* One statement. Which fields are used depends on kind. */
typedef struct ast_stmt {
    ast_stmt_kind kind;
    avow_span span;             /* the whole statement */
    avow_span key;              /* its first keyword (both words for `explore x`) */
    ast_str *str;               /* study: title; response/factor: label; data: path */
    ast_name name;              /* response, factor, contrast; versus: the control level */
    ast_name factor;            /* versus: qualifying factor; pairs: the factor compared */
    ast_name within;            /* explore pairs / versus: compared within each level of this factor */
    ast_str *unit;              /* response: unit */
    ast_level *levels;          /* factor, block (NULL: block levels come from the data) */
    ast_data_item *items;       /* data */
    ast_num num;                /* alpha */
    ast_name method;            /* adjust: the method name as written */
    ast_expr *expr;             /* contrast, explore contrast */
    ast_side side;              /* contrast: direction */
    ast_num side_num;           /* contrast: the number after > or < (must be 0) */
    ast_str *desc;              /* contrast description */
    ast_plan_item *plan;        /* plan */
    int has_block;              /* factor/data/plan: braces were written */
    avow_span lbrace, rbrace;   /* the braces of a block */
    struct ast_stmt *next;
} ast_stmt;

/* A parsed study file. */
typedef struct ast_study {
    ast_stmt *stmts;            /* statements in source order */
} ast_study;

#endif
