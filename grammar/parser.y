/* parser.y: the grammar of the study language (version 1), for Lemon.
 * Actions stay thin: they call constructors in src/parse.c. Errors are recorded in
 * the context by parse_syntax_error; nothing here prints. */

%name avowParse
%token_prefix TK_
%token_type {avow_token}
%extra_argument {parse_state *ps}
%stack_size 1000

%include {
#include <assert.h>
#include <string.h>
#include "parse.h"
}

%syntax_error {
    /* Work out which tokens the parser could have taken here, by replaying the
     * reductions the table would make for each terminal on a copy of the stack. */
    int expected[YYNTOKEN];
    int nexpected = 0;
    static YYACTIONTYPE st[YYSTACKDEPTH + 64];
    int base = (int)(yypParser->yytos - yypParser->yystack);
    (void)yymajor; (void)yyminor;
    for (int t = 0; t < YYNTOKEN; t++) {
        int sp = base, ok = 0;
        for (int i = 0; i <= base; i++) st[i] = yypParser->yystack[i].stateno;
        for (int guard = 0; guard < 4096; guard++) {
            YYACTIONTYPE act = yy_find_shift_action((YYCODETYPE)t, st[sp]);
            if (act <= YY_MAX_SHIFTREDUCE || act == YY_ACCEPT_ACTION) { ok = 1; break; }
            if (act < YY_MIN_REDUCE || act > YY_MAX_REDUCE) break;
            unsigned r = act - YY_MIN_REDUCE;
            sp += yyRuleInfoNRhs[r];
            if (sp < 0 || sp + 1 >= (int)(sizeof st / sizeof st[0])) break;
            st[sp + 1] = yy_find_reduce_action(st[sp], (YYCODETYPE)yyRuleInfoLhs[r]);
            sp++;
        }
        if (ok) expected[nexpected++] = t;
    }
    parse_syntax_error(ps, expected, nexpected);
}

%stack_overflow { parse_overflow(ps); }

/* Nodes live in the arena: nothing to free when the parser pops a symbol. */
%default_destructor { (void)ps; (void)yypminor; }

/* Precedence, lowest first. DESC_LOW lets a string after a level be its description. */
%nonassoc DESC_LOW.
%nonassoc STRING.
%left PLUS MINUS.
%left STAR SLASH.
%right UMINUS.


%type stmt {ast_stmt *}
%type string {ast_str *}
%type opt_string {ast_str *}
%type opt_unit {ast_str *}
%type lname {ast_name}
%type levelref {ast_expr *}
%type number {ast_num}
%type level {ast_level *}
%type lhead {ast_level *}
%type levels {level_list}
%type items {item_list}
%type item {ast_data_item *}
%type strings {str_list}
%type plan_items {plan_list}
%type plan_item {ast_plan_item *}
%type reps {rep_list}
%type rep {ast_rep *}
%type expr {ast_expr *}
%type args {expr_list}
%type arglist {expr_list}
%type method {ast_name}
%type contrast_body {ast_stmt *}

file ::= stmts.
stmts ::= .
stmts ::= stmts stmt(S).                    { parse_append(ps, S); }

/* ---- simple statements ---- */

stmt(S) ::= STUDY(K) string(T).             { S = parse_stmt(ps, ST_STUDY, &K); S->str = T;
                                              parse_end_stmt(ps, S, T->span); }

stmt(S) ::= RESPONSE(K) IDENT(N) opt_string(L) opt_unit(U).
    { S = parse_stmt(ps, ST_RESPONSE, &K); S->name = parse_name(&N, 0); S->str = L; S->unit = U;
      parse_end_stmt(ps, S, U ? U->span : L ? L->span : N.span); }

opt_string(A) ::= .                          { A = NULL; }
opt_string(A) ::= string(S).                 { A = S; }
opt_unit(A) ::= .                            { A = NULL; }
opt_unit(A) ::= UNIT string(S).              { A = S; }

stmt(S) ::= ALPHA(K) number(N).             { S = parse_stmt(ps, ST_ALPHA, &K); S->num = N;
                                              parse_end_stmt(ps, S, N.span); }
stmt(S) ::= ADJUST(K) method(M).            { S = parse_stmt(ps, ST_ADJUST, &K); S->method = M;
                                              parse_end_stmt(ps, S, M.span); }
method(A) ::= NONE(T).                       { A = parse_name(&T, 0); }
method(A) ::= BONFERRONI(T).                 { A = parse_name(&T, 0); }
method(A) ::= HOLM(T).                       { A = parse_name(&T, 0); }
method(A) ::= SIDAK(T).                      { A = parse_name(&T, 0); }
method(A) ::= SCHEFFE(T).                    { A = parse_name(&T, 0); }
method(A) ::= FDR(T).                        { A = parse_name(&T, 0); }
method(A) ::= IDENT(T).                      { A = parse_name(&T, 0); }
/* variances equal | variances separate: the word is checked by the checker. */
stmt(S) ::= VARIANCES(K) IDENT(W).          { S = parse_stmt(ps, ST_VARIANCES, &K); S->name = parse_name(&W, 0);
                                              parse_end_stmt(ps, S, W.span); }
stmt(S) ::= ORTHOGONAL(K).                  { S = parse_stmt(ps, ST_ORTHOGONAL, &K);
                                              parse_end_stmt(ps, S, K.span); }

/* ---- factor ---- */

stmt(S) ::= FACTOR(K) IDENT(N) opt_string(L) LBRACE(B) levels(V) RBRACE(R).
    { S = parse_stmt(ps, ST_FACTOR, &K); S->name = parse_name(&N, 0); S->str = L;
      S->levels = V.head; S->has_block = 1; S->lbrace = B.span; S->rbrace = R.span;
      parse_end_stmt(ps, S, R.span); }

/* A blocking factor: levels declared, or taken from the data when no braces follow. */
stmt(S) ::= BLOCK(K) IDENT(N) opt_string(L) LBRACE(B) levels(V) RBRACE(R).
    { S = parse_stmt(ps, ST_BLOCK, &K); S->name = parse_name(&N, 0); S->str = L;
      S->levels = V.head; S->has_block = 1; S->lbrace = B.span; S->rbrace = R.span;
      parse_end_stmt(ps, S, R.span); }
stmt(S) ::= BLOCK(K) IDENT(N) opt_string(L).
    { S = parse_stmt(ps, ST_BLOCK, &K); S->name = parse_name(&N, 0); S->str = L;
      parse_end_stmt(ps, S, L ? L->span : N.span); }

/* interactions all | none | pairs: which interactions of the treatment factors the model
 * keeps (the word is checked by the checker). */
stmt(S) ::= INTERACTIONS(K) IDENT(W).       { S = parse_stmt(ps, ST_INTERACTIONS, &K); S->name = parse_name(&W, 0);
                                              parse_end_stmt(ps, S, W.span); }
stmt(S) ::= INTERACTIONS(K) NONE(W).        { S = parse_stmt(ps, ST_INTERACTIONS, &K); S->name = parse_name(&W, 0);
                                              parse_end_stmt(ps, S, W.span); }
stmt(S) ::= INTERACTIONS(K) PAIRS(W).       { S = parse_stmt(ps, ST_INTERACTIONS, &K); S->name = parse_name(&W, 0);
                                              parse_end_stmt(ps, S, W.span); }

levels(A) ::= .                              { A.head = A.tail = NULL; }
levels(A) ::= levels(B) level(L).            { A = B; if (!A.head) A.head = L; else A.tail->next = L;
                                              A.tail = L; }
/* A comma may end a level: it separates a level from a following level named by a
 * string, which would otherwise read as the first level's description. */
levels(A) ::= levels(B) COMMA.               { A = B; }

level(A) ::= lhead(H). [DESC_LOW]            { A = H; }
level(A) ::= lhead(H) string(D).             { A = H; A->desc = D; A->span = span_join(A->span, D->span); }

lhead(A) ::= lname(N).                       { A = parse_new(ps, sizeof *A); A->name = N; A->span = N.span; }
lhead(A) ::= lname(N) AT number(X).          { A = parse_new(ps, sizeof *A); A->name = N; A->at = X;
                                              A->span = span_join(N.span, X.span); }
lhead(A) ::= lname(N) CODE string(C).        { A = parse_new(ps, sizeof *A); A->name = N; A->code = C;
                                              A->span = span_join(N.span, C->span); }
lhead(A) ::= lname(N) AT number(X) CODE string(C).
    { A = parse_new(ps, sizeof *A); A->name = N; A->at = X; A->code = C;
      A->span = span_join(N.span, C->span); }

lname(A) ::= IDENT(T).                       { A = parse_name(&T, 0); }
lname(A) ::= STRING(T).                      { A = parse_name(&T, 1); }

number(A) ::= NUMBER(T).                     { A = parse_num(&T, NULL); }
number(A) ::= MINUS(M) NUMBER(T).            { A = parse_num(&T, &M); }

string(A) ::= STRING(T).                     { A = parse_str(ps, &T); }

/* ---- data ---- */

stmt(S) ::= DATA(K) string(P).              { S = parse_stmt(ps, ST_DATA, &K); S->str = P;
                                              parse_end_stmt(ps, S, P->span); }
stmt(S) ::= DATA(K) string(P) LBRACE(B) items(I) RBRACE(R).
    { S = parse_stmt(ps, ST_DATA, &K); S->str = P; S->items = I.head;
      S->has_block = 1; S->lbrace = B.span; S->rbrace = R.span; parse_end_stmt(ps, S, R.span); }

items(A) ::= .                               { A.head = A.tail = NULL; }
items(A) ::= items(B) item(I).               { A = B; if (!A.head) A.head = I; else A.tail->next = I;
                                              A.tail = I; }

item(A) ::= IDENT(N) FROM string(C).         { A = parse_new(ps, sizeof *A); A->kind = DI_FROM;
                                              A->name = parse_name(&N, 0); A->strs = C;
                                              A->span = span_join(N.span, C->span); }
item(A) ::= MISSING(K) strings(L).           { A = parse_new(ps, sizeof *A); A->kind = DI_MISSING;
                                              A->strs = L.head; A->span = span_join(K.span, L.tail->span); }
item(A) ::= SHA256(K) string(C).             { A = parse_new(ps, sizeof *A); A->kind = DI_SHA256;
                                              A->strs = C; A->span = span_join(K.span, C->span); }
item(A) ::= DELIMITER(K) string(C).          { A = parse_new(ps, sizeof *A); A->kind = DI_DELIMITER;
                                              A->strs = C; A->span = span_join(K.span, C->span); }

strings(A) ::= string(S).                    { A.head = A.tail = S; }
strings(A) ::= strings(B) string(S).         { A = B; A.tail->next = S; A.tail = S; }

/* ---- contrasts and explorations ---- */

stmt(S) ::= CONTRAST(K) contrast_body(B).   { S = B; S->kind = ST_CONTRAST; S->key = K.span;
                                              S->span = span_join(K.span, S->span); }
stmt(S) ::= EXPLORE(K) CONTRAST contrast_body(B).
    { S = B; S->kind = ST_EXPLORE_CONTRAST; S->key = K.span; S->span = span_join(K.span, S->span); }
stmt(S) ::= EXPLORE(K) PAIRS(P).            { S = parse_stmt(ps, ST_EXPLORE_PAIRS, &K);
                                              S->key = span_join(K.span, P.span);
                                              parse_end_stmt(ps, S, P.span); }
stmt(S) ::= EXPLORE(K) PAIRS(P) IDENT(F).   { S = parse_stmt(ps, ST_EXPLORE_PAIRS, &K);
                                              S->key = span_join(K.span, P.span); S->factor = parse_name(&F, 0);
                                              parse_end_stmt(ps, S, F.span); }
stmt(S) ::= EXPLORE(K) PAIRS(P) IDENT(F) WITHIN IDENT(W).
    { S = parse_stmt(ps, ST_EXPLORE_PAIRS, &K); S->key = span_join(K.span, P.span);
      S->factor = parse_name(&F, 0); S->within = parse_name(&W, 0); parse_end_stmt(ps, S, W.span); }
stmt(S) ::= EXPLORE(K) VERSUS(V) levelref(L).
    { S = parse_stmt(ps, ST_EXPLORE_VERSUS, &K); S->key = span_join(K.span, V.span);
      S->name = L->level; S->factor = L->factor; parse_end_stmt(ps, S, L->span); }
stmt(S) ::= EXPLORE(K) VERSUS(V) levelref(L) WITHIN IDENT(W).
    { S = parse_stmt(ps, ST_EXPLORE_VERSUS, &K); S->key = span_join(K.span, V.span);
      S->name = L->level; S->factor = L->factor; S->within = parse_name(&W, 0);
      parse_end_stmt(ps, S, W.span); }

contrast_body(S) ::= IDENT(N) EQ expr(E).
    { S = parse_stmt(ps, ST_CONTRAST, &N); S->name = parse_name(&N, 0); S->expr = E;
      parse_end_stmt(ps, S, E->span); }
contrast_body(S) ::= IDENT(N) EQ expr(E) string(D).
    { S = parse_stmt(ps, ST_CONTRAST, &N); S->name = parse_name(&N, 0); S->expr = E; S->desc = D;
      parse_end_stmt(ps, S, D->span); }
contrast_body(S) ::= IDENT(N) EQ expr(E) GT number(Z).
    { S = parse_stmt(ps, ST_CONTRAST, &N); S->name = parse_name(&N, 0); S->expr = E;
      S->side = SIDE_GREATER; S->side_num = Z; parse_end_stmt(ps, S, Z.span); }
contrast_body(S) ::= IDENT(N) EQ expr(E) GT number(Z) string(D).
    { S = parse_stmt(ps, ST_CONTRAST, &N); S->name = parse_name(&N, 0); S->expr = E;
      S->side = SIDE_GREATER; S->side_num = Z; S->desc = D; parse_end_stmt(ps, S, D->span); }
contrast_body(S) ::= IDENT(N) EQ expr(E) LT number(Z).
    { S = parse_stmt(ps, ST_CONTRAST, &N); S->name = parse_name(&N, 0); S->expr = E;
      S->side = SIDE_LESS; S->side_num = Z; parse_end_stmt(ps, S, Z.span); }
contrast_body(S) ::= IDENT(N) EQ expr(E) LT number(Z) string(D).
    { S = parse_stmt(ps, ST_CONTRAST, &N); S->name = parse_name(&N, 0); S->expr = E;
      S->side = SIDE_LESS; S->side_num = Z; S->desc = D; parse_end_stmt(ps, S, D->span); }

/* ---- expressions ---- */

expr(A) ::= expr(B) PLUS expr(C).            { A = parse_binary(ps, EX_ADD, B, C); }
expr(A) ::= expr(B) MINUS expr(C).           { A = parse_binary(ps, EX_SUB, B, C); }
expr(A) ::= expr(B) STAR expr(C).            { A = parse_binary(ps, EX_MUL, B, C); }
expr(A) ::= expr(B) SLASH expr(C).           { A = parse_binary(ps, EX_DIV, B, C); }
expr(A) ::= MINUS(M) expr(B). [UMINUS]       { A = parse_neg(ps, &M, B); }
expr(A) ::= LPAREN(L) expr(B) RPAREN(R).     { A = B; A->parens = 1; A->span = span_join(L.span, R.span); }
expr(A) ::= NUMBER(T).                       { A = parse_numexpr(ps, &T); }
expr(A) ::= levelref(R).                     { A = R; }
expr(A) ::= MEAN(F) LPAREN args(L) RPAREN(R).  { A = parse_call(ps, parse_name(&F, 0), L.head, &R); }
expr(A) ::= TREND(F) LPAREN args(L) RPAREN(R). { A = parse_call(ps, parse_name(&F, 0), L.head, &R); }
expr(A) ::= IDENT(F) LPAREN args(L) RPAREN(R). { A = parse_call(ps, parse_name(&F, 0), L.head, &R); }

args(A) ::= .                                { A.head = A.tail = NULL; }
args(A) ::= arglist(B).                      { A = B; }
arglist(A) ::= expr(E).                      { A.head = A.tail = E; }
arglist(A) ::= arglist(B) COMMA expr(E).     { A = B; A.tail->next = E; A.tail = E; }

levelref(A) ::= lname(N).                    { A = parse_ref(ps, NULL, N); }
levelref(A) ::= IDENT(F) DOT lname(N).       { ast_name f = parse_name(&F, 0); A = parse_ref(ps, &f, N); }

/* ---- plan ---- */

stmt(S) ::= PLAN(K) LBRACE(B) plan_items(I) RBRACE(R).
    { S = parse_stmt(ps, ST_PLAN, &K); S->plan = I.head; S->has_block = 1; S->lbrace = B.span;
      S->rbrace = R.span; parse_end_stmt(ps, S, R.span); }

plan_items(A) ::= .                          { A.head = A.tail = NULL; }
plan_items(A) ::= plan_items(B) plan_item(I). { A = B; if (!A.head) A.head = I; else A.tail->next = I;
                                              A.tail = I; }

plan_item(A) ::= REPLICATES(K) number(N).    { A = parse_new(ps, sizeof *A); A->kind = PI_REPLICATES;
                                              A->num = N; A->key = K.span; A->span = span_join(K.span, N.span); }
plan_item(A) ::= REPLICATES(K) reps(L).      { A = parse_new(ps, sizeof *A); A->kind = PI_REPLICATES_EACH;
                                              A->reps = L.head; A->key = K.span;
                                              A->span = span_join(K.span, L.tail->span); }
plan_item(A) ::= SIGMA(K) number(N).         { A = parse_new(ps, sizeof *A); A->kind = PI_SIGMA;
                                              A->num = N; A->key = K.span; A->span = span_join(K.span, N.span); }
plan_item(A) ::= DETECT(K) number(N).        { A = parse_new(ps, sizeof *A); A->kind = PI_DETECT;
                                              A->num = N; A->key = K.span; A->span = span_join(K.span, N.span); }
plan_item(A) ::= POWER(K) number(N).         { A = parse_new(ps, sizeof *A); A->kind = PI_POWER;
                                              A->num = N; A->key = K.span; A->span = span_join(K.span, N.span); }
plan_item(A) ::= SEED(K) number(N).          { A = parse_new(ps, sizeof *A); A->kind = PI_SEED;
                                              A->num = N; A->key = K.span; A->span = span_join(K.span, N.span); }

reps(A) ::= rep(R).                          { A.head = A.tail = R; }
reps(A) ::= reps(B) COMMA rep(R).            { A = B; A.tail->next = R; A.tail = R; }
rep(A) ::= levelref(L) number(N).            { A = parse_new(ps, sizeof *A); A->factor = L->factor;
                                              A->level = L->level; A->count = N;
                                              A->span = span_join(L->span, N.span); }
