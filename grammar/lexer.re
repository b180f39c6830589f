/* lexer.re: tokens of the study language, for re2c. The buffer is the context's
 * NUL-terminated source; a NUL before the end is an error. Comments are recorded in
 * the context for the formatter. Strings are decoded into the arena. */
#include <stdio.h>
#include <string.h>

#include "avow/syntax.h"
#include "parser.h"

void lex_init(lex_state *l, avow_ctx *ctx)
{
    l->ctx = ctx;
    l->cur = (const unsigned char *)ctx->src;
    /* A UTF-8 byte-order mark, as some editors write, is skipped. */
    if (ctx->len >= 3 && memcmp(ctx->src, "\xEF\xBB\xBF", 3) == 0) l->cur += 3;
    l->mar = l->cur;
    l->lim = (const unsigned char *)ctx->src + ctx->len;
}

static avow_span span_at(const lex_state *l, const unsigned char *s, const unsigned char *e)
{
    const unsigned char *base = (const unsigned char *)l->ctx->src;
    return (avow_span){(uint32_t)(s - base), (uint32_t)(e - base)};
}

/* Check that [s, e) is valid UTF-8; on failure record an error at the bad byte. */
static int check_utf8(lex_state *l, const unsigned char *s, const unsigned char *e)
{
    while (s < e) {
        int n = utf8_seq_len(s, (size_t)(e - s));
        if (n == 0) {
            ctx_error(l->ctx, span_at(l, s, s + 1), "invalid UTF-8 byte 0x%02X", *s);
            return 0;
        }
        s += n;
    }
    return 1;
}

/* Decode the body of a string literal [s, e) (quotes excluded) into the arena. */
static int decode_string(lex_state *l, const unsigned char *s, const unsigned char *e,
                         avow_token *t)
{
    if (!check_utf8(l, s, e)) return 0;
    char *out = arena_alloc(l->ctx->arena, (size_t)(e - s) + 1);
    if (!out) { l->ctx->oom = 1; return 0; }
    size_t n = 0;
    for (const unsigned char *p = s; p < e; p++) {
        if (*p == '\t') {
            avow_diag *d = ctx_error(l->ctx, span_at(l, p, p + 1), "a tab inside a string");
            diag_hint(l->ctx, d, "write it as \\t");
            return 0;
        }
        if (*p < 0x20 || *p == 0x7f) {
            ctx_error(l->ctx, span_at(l, p, p + 1), "control byte 0x%02X inside a string", *p);
            return 0;
        }
        if (*p != '\\') { out[n++] = (char)*p; continue; }
        p++;
        switch (*p) {
        case '"': out[n++] = '"'; break;
        case '\\': out[n++] = '\\'; break;
        case 'n': out[n++] = '\n'; break;
        case 't': out[n++] = '\t'; break;
        default: {
            int len = utf8_seq_len(p, (size_t)(e - p));
            avow_diag *d = ctx_error(l->ctx, span_at(l, p - 1, p + (len > 0 ? len : 1)),
                                     "unknown escape `\\%.*s` in a string", len > 0 ? len : 1, p);
            diag_hint(l->ctx, d, "the escapes are \\\" \\\\ \\n and \\t");
            return 0;
        }
        }
    }
    out[n] = 0;
    t->text = out;
    t->len = (uint32_t)n;
    return 1;
}

/* Report an unexpected byte or character at p. */
static int unexpected(lex_state *l, const unsigned char *p)
{
    if (*p >= 0x80) {
        int n = utf8_seq_len(p, (size_t)(l->lim - p));
        if (n == 0) {
            ctx_error(l->ctx, span_at(l, p, p + 1), "invalid UTF-8 byte 0x%02X", *p);
            return -1;
        }
        avow_diag *d = ctx_error(l->ctx, span_at(l, p, p + n),
                                 "unexpected character `%.*s`", n, (const char *)p);
        if (n == 3 && p[0] == 0xE2 && p[1] == 0x80 && (p[2] == 0x9C || p[2] == 0x9D))
            diag_hint(l->ctx, d, "strings use plain double quotes \"...\"");
        else if (n == 3 && p[0] == 0xE2 && p[1] == 0x88 && p[2] == 0x92)
            diag_hint(l->ctx, d, "write the minus sign as -");
        else
            diag_hint(l->ctx, d, "names are ASCII letters, digits and _; quote other names: \"...\"");
        return -1;
    }
    if (*p < 0x20 || *p == 0x7f)
        ctx_error(l->ctx, span_at(l, p, p + 1), "unexpected control byte 0x%02X", *p);
    else {
        avow_diag *d = ctx_error(l->ctx, span_at(l, p, p + 1), "unexpected character `%c`", *p);
        if (*p == ';') diag_hint(l->ctx, d, "statements need no terminator");
        else if (*p == '\'') diag_hint(l->ctx, d, "strings use double quotes \"...\"");
    }
    return -1;
}

int lex_next(lex_state *l, avow_token *t)
{
    const unsigned char *s;
    for (;;) {
        s = l->cur;
#define TOK(k) do { t->type = (k); goto done; } while (0)
        /*!re2c
            re2c:define:YYCTYPE = "unsigned char";
            re2c:define:YYCURSOR = "l->cur";
            re2c:define:YYMARKER = "l->mar";
            re2c:yyfill:enable = 0;
            re2c:indent:top = 2;

            digits = [0-9]+;
            number = digits ("." digits)? ([eE] [+-]? digits)?;
            ident  = [A-Za-z_][A-Za-z0-9_]*;
            strchar = [^"\\\n\x00] | "\\" [^\n\x00];

            "\x00" {
                if (s == l->lim) { l->cur = s; t->type = 0; t->span = span_at(l, s, s);
                                   t->text = (const char *)s; t->len = 0; return 0; }
                ctx_error(l->ctx, span_at(l, s, s + 1), "NUL byte in the study file");
                return -1;
            }
            [ \t\r\n]+ { continue; }
            "#" [^\n\x00]* {
                if (!check_utf8(l, s, l->cur)) return -1;
                const unsigned char *e = l->cur;
                if (e > s && e[-1] == '\r') e--;
                for (const unsigned char *p = s; p < e; p++)
                    if ((*p < 0x20 && *p != '\t') || *p == 0x7f) {
                        ctx_error(l->ctx, span_at(l, p, p + 1), "control byte 0x%02X in a comment", *p);
                        return -1;
                    }
                ctx_add_comment(l->ctx, span_at(l, s, e));
                continue;
            }

            "study"       { TOK(TK_STUDY); }
            "response"    { TOK(TK_RESPONSE); }
            "unit"        { TOK(TK_UNIT); }
            "factor"      { TOK(TK_FACTOR); }
            "block"       { TOK(TK_BLOCK); }
            "interactions" { TOK(TK_INTERACTIONS); }
            "within"      { TOK(TK_WITHIN); }
            "at"          { TOK(TK_AT); }
            "code"        { TOK(TK_CODE); }
            "data"        { TOK(TK_DATA); }
            "from"        { TOK(TK_FROM); }
            "missing"     { TOK(TK_MISSING); }
            "sha256"      { TOK(TK_SHA256); }
            "delimiter"   { TOK(TK_DELIMITER); }
            "alpha"       { TOK(TK_ALPHA); }
            "adjust"      { TOK(TK_ADJUST); }
            "orthogonal"  { TOK(TK_ORTHOGONAL); }
            "variances"   { TOK(TK_VARIANCES); }
            "contrast"    { TOK(TK_CONTRAST); }
            "explore"     { TOK(TK_EXPLORE); }
            "pairs"       { TOK(TK_PAIRS); }
            "versus"      { TOK(TK_VERSUS); }
            "mean"        { TOK(TK_MEAN); }
            "trend"       { TOK(TK_TREND); }
            "plan"        { TOK(TK_PLAN); }
            "replicates"  { TOK(TK_REPLICATES); }
            "sigma"       { TOK(TK_SIGMA); }
            "detect"      { TOK(TK_DETECT); }
            "power"       { TOK(TK_POWER); }
            "seed"        { TOK(TK_SEED); }
            "none"        { TOK(TK_NONE); }
            "bonferroni"  { TOK(TK_BONFERRONI); }
            "holm"        { TOK(TK_HOLM); }
            "sidak"       { TOK(TK_SIDAK); }
            "scheffe"     { TOK(TK_SCHEFFE); }
            "fdr"         { TOK(TK_FDR); }

            ident {
                if (l->cur - s > AVOW_MAX_NAME) {
                    ctx_error(l->ctx, span_at(l, s, s + 1),
                              "a name of %ld bytes; names are limited to %d bytes",
                              (long)(l->cur - s), AVOW_MAX_NAME);
                    return -1;
                }
                TOK(TK_IDENT);
            }
            number { TOK(TK_NUMBER); }
            number [A-Za-z_0-9.]+ | digits "." | digits ("." digits)? [eE] [+-]? {
                avow_diag *d = ctx_error(l->ctx, span_at(l, s, l->cur), "malformed number `%.*s`",
                                         (int)(l->cur - s > 40 ? 40 : l->cur - s), (const char *)s);
                diag_hint(l->ctx, d, "numbers look like 2, 0.05 or 1e-3; a product is written 2*name");
                return -1;
            }
            "." digits {
                avow_diag *d = ctx_error(l->ctx, span_at(l, s, l->cur), "a number needs a digit before the point");
                diag_hint(l->ctx, d, "write 0%.*s", (int)(l->cur - s > 40 ? 40 : l->cur - s), (const char *)s);
                return -1;
            }

            ["] strchar* ["] {
                t->type = TK_STRING;
                t->span = span_at(l, s, l->cur);
                if (!decode_string(l, s + 1, l->cur - 1, t)) return -1;
                return 1;
            }
            ["] strchar* {
                avow_diag *d = ctx_error(l->ctx, span_at(l, s, s + 1), "unterminated string");
                diag_hint(l->ctx, d, "close it with \" on the same line; write a newline as \\n");
                return -1;
            }

            "{" { TOK(TK_LBRACE); }
            "}" { TOK(TK_RBRACE); }
            "(" { TOK(TK_LPAREN); }
            ")" { TOK(TK_RPAREN); }
            "," { TOK(TK_COMMA); }
            "." { TOK(TK_DOT); }
            "=" { TOK(TK_EQ); }
            "+" { TOK(TK_PLUS); }
            "-" { TOK(TK_MINUS); }
            "*" { TOK(TK_STAR); }
            "/" { TOK(TK_SLASH); }
            ">" { TOK(TK_GT); }
            "<" { TOK(TK_LT); }

            * { return unexpected(l, s); }
        */
    }
done:
    /* Names and keywords are used as C strings later: copy them, NUL-terminated. */
    t->span = span_at(l, s, l->cur);
    t->len = (uint32_t)(l->cur - s);
    t->text = arena_strndup(l->ctx->arena, (const char *)s, t->len);
    if (!t->text) { l->ctx->oom = 1; return -1; }
    return 1;
}

/* Names of token types for messages, indexed by TK_ value. */
static const char *const token_names[] = {
    [0] = "the end of the file",
    [TK_STRING] = "a string", [TK_IDENT] = "a name", [TK_NUMBER] = "a number",
    [TK_PLUS] = "'+'", [TK_MINUS] = "'-'", [TK_STAR] = "'*'", [TK_SLASH] = "'/'",
    [TK_LBRACE] = "'{'", [TK_RBRACE] = "'}'", [TK_LPAREN] = "'('", [TK_RPAREN] = "')'",
    [TK_COMMA] = "','", [TK_DOT] = "'.'", [TK_EQ] = "'='", [TK_GT] = "'>'", [TK_LT] = "'<'",
    [TK_STUDY] = "`study`", [TK_RESPONSE] = "`response`", [TK_UNIT] = "`unit`",
    [TK_FACTOR] = "`factor`", [TK_BLOCK] = "`block`", [TK_INTERACTIONS] = "`interactions`",
    [TK_WITHIN] = "`within`", [TK_AT] = "`at`", [TK_CODE] = "`code`", [TK_DATA] = "`data`",
    [TK_FROM] = "`from`", [TK_MISSING] = "`missing`", [TK_SHA256] = "`sha256`",
    [TK_DELIMITER] = "`delimiter`", [TK_ALPHA] = "`alpha`", [TK_ADJUST] = "`adjust`",
    [TK_ORTHOGONAL] = "`orthogonal`", [TK_VARIANCES] = "`variances`", [TK_CONTRAST] = "`contrast`", [TK_EXPLORE] = "`explore`",
    [TK_PAIRS] = "`pairs`", [TK_VERSUS] = "`versus`", [TK_MEAN] = "`mean`",
    [TK_TREND] = "`trend`", [TK_PLAN] = "`plan`", [TK_REPLICATES] = "`replicates`",
    [TK_SIGMA] = "`sigma`", [TK_DETECT] = "`detect`", [TK_POWER] = "`power`",
    [TK_SEED] = "`seed`", [TK_NONE] = "`none`", [TK_BONFERRONI] = "`bonferroni`",
    [TK_HOLM] = "`holm`", [TK_SIDAK] = "`sidak`", [TK_SCHEFFE] = "`scheffe`", [TK_FDR] = "`fdr`",
};

const char *lex_token_name(int type)
{
    if (type < 0 || (size_t)type >= sizeof token_names / sizeof token_names[0] || !token_names[type])
        return "a token";
    return token_names[type];
}

int lex_is_keyword(int type)
{
    const char *n = lex_token_name(type);
    return n[0] == '`';
}

int lex_is_keyword_text(const char *s, size_t len)
{
    for (size_t i = 0; i < sizeof token_names / sizeof token_names[0]; i++) {
        const char *n = token_names[i];
        if (n && n[0] == '`' && strlen(n) == len + 2 && memcmp(n + 1, s, len) == 0) return 1;
    }
    return 0;
}
