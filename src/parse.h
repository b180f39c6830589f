/* parse.h: state shared by the Lemon grammar actions and the parser glue (internal). */
#ifndef AVOW_PARSE_H
#define AVOW_PARSE_H

#include "avow/ast.h"
#include "avow/syntax.h"

/* Parser context, passed to every grammar action (%extra_argument). */
typedef struct parse_state {
    avow_ctx *ctx;          /* diagnostics and arena */
    ast_study *study;       /* the tree being built */
    ast_stmt *tail;         /* last statement appended */
    avow_token prev;        /* the token before the current one (type 0 at start) */
    avow_token cur;         /* the token being fed */
    int failed;             /* a syntax error was recorded */
    int block;              /* keyword type of the innermost open block, or 0 */
    avow_span block_open;   /* where that block's '{' is */
    int stmt;               /* keyword type of the statement being read, or 0 */
    int depth;              /* parentheses open */
    long stmt_tokens;       /* tokens since the current statement began */
} parse_state;

/* Lists built by left-recursive rules, kept in source order. */
typedef struct { ast_level *head, *tail; } level_list;
typedef struct { ast_data_item *head, *tail; } item_list;
typedef struct { ast_plan_item *head, *tail; } plan_list;
typedef struct { ast_rep *head, *tail; } rep_list;
typedef struct { ast_expr *head, *tail; } expr_list;
typedef struct { ast_str *head, *tail; } str_list;

/* Node constructors used by the grammar actions (parse.c). They never fail visibly:
 * on allocation failure they set ctx->oom and return a static dummy or NULL. */
void *parse_new(parse_state *ps, size_t size);
ast_name parse_name(const avow_token *t, int quoted);
ast_num parse_num(const avow_token *t, const avow_token *minus);
ast_str *parse_str(parse_state *ps, const avow_token *t);
ast_expr *parse_binary(parse_state *ps, ast_expr_kind k, ast_expr *a, ast_expr *b);
ast_expr *parse_neg(parse_state *ps, const avow_token *minus, ast_expr *a);
ast_expr *parse_numexpr(parse_state *ps, const avow_token *t);
ast_expr *parse_ref(parse_state *ps, const ast_name *factor, ast_name level);
ast_expr *parse_call(parse_state *ps, ast_name fn, ast_expr *args, const avow_token *rp);
ast_stmt *parse_stmt(parse_state *ps, ast_stmt_kind kind, const avow_token *key);
void parse_end_stmt(parse_state *ps, ast_stmt *s, avow_span last);
void parse_append(parse_state *ps, ast_stmt *s);
avow_span span_join(avow_span a, avow_span b);
avow_span span_of_name(ast_name n);
/* Called by the generated parser on a syntax error / stack overflow. */
void parse_syntax_error(parse_state *ps, const int *expected, int nexpected);
void parse_overflow(parse_state *ps);

#endif
