/* syntax.h: lexer and parser of the study language. */
#ifndef AVOW_SYNTAX_H
#define AVOW_SYNTAX_H

#include "avow/ast.h"
#include "avow/diag.h"

/* A token. Token types are the parser's TK_ constants (0 is the end of input). */
typedef struct avow_token {
    int type;           /* TK_* */
    avow_span span;     /* bytes in the source */
    const char *text;   /* STRING: decoded text in the arena; others: source bytes */
    uint32_t len;       /* bytes in text */
} avow_token;

/* Lexer state: the caller owns the cursor; the lexer allocates only decoded strings. */
typedef struct lex_state {
    avow_ctx *ctx;          /* diagnostics, arena, source */
    const unsigned char *cur; /* next byte */
    const unsigned char *mar; /* re2c backtracking marker */
    const unsigned char *lim; /* the terminating NUL */
} lex_state;

/* Longest identifier accepted, in bytes. */
#define AVOW_MAX_NAME 255
/* Deepest nesting of parentheses accepted in an expression. */
#define AVOW_MAX_NESTING 64
/* Most tokens one statement may have (bounds recursion over expressions). */
#define AVOW_MAX_STMT_TOKENS 10000
/* Most levels a factor may have, and most contrasts a study may declare. */
#define AVOW_MAX_LEVELS 1000
#define AVOW_MAX_CONTRASTS 1000


void lex_init(lex_state *l, avow_ctx *ctx);
/* Next token into *t. Returns 1 for a token, 0 at the end, -1 after recording an error. */
int lex_next(lex_state *l, avow_token *t);
/* Human name of a token type for messages ("'{'", "`factor`", "a name"). */
const char *lex_token_name(int type);
/* 1 when the token type is a keyword. */
int lex_is_keyword(int type);
/* 1 when s (len bytes) is a keyword of the language. */
int lex_is_keyword_text(const char *s, size_t len);

/* Parse a whole study file into *out. Returns 0 when there was no syntax error; on
 * error a diagnostic is recorded in ctx (the parser stops at the first). */
int parse_study(avow_ctx *ctx, ast_study *out);

#endif
