/* main.c: the avow command. A thin driver over libavow: parses the command line, runs
 * the stages, prints diagnostics and writes output. The only place that prints. */
#include <errno.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "avow/evaluate.h"
#include "avow/plan.h"
#include "avow/render.h"
#include "avow/run.h"
#include "avow/sheet.h"
#include "avow/svg.h"
#include "avow/syntax.h"

enum { EXIT_STUDY = 1, EXIT_DATA = 2, EXIT_USAGE = 64 };

static const char usage_text[] =
    "usage: avow COMMAND [ARGS]\n"
    "\n"
    "commands:\n"
    "  check STUDY [--format text|json]   review the plan of a study; reads no data\n"
    "  run STUDY [--format text|json|html] [--data FILE] [-o FILE] [--plots DIR]\n"
    "      [--no-diagnostics]\n"
    "                                     analyse the data and write the report\n"
    "  sheet STUDY [--seed N] [-o FILE]   lay out the randomized run sheet\n"
    "  fmt STUDY [-w]                     print the canonical form; -w rewrites it\n"
    "  help [COMMAND]                     describe a command\n"
    "\n"
    "options:\n"
    "  --help       this text\n"
    "  --version    the version of avow\n"
    "\n"
    "exit status: 0 success, 1 the study file has errors, 2 the data do not fit\n"
    "the study, 64 the command line is wrong.\n";

static const char help_check[] =
    "usage: avow check STUDY [--format text|json]\n"
    "\n"
    "Reads the study file and reviews its plan without any data: the response,\n"
    "the factors and their levels, every planned and exploratory contrast as\n"
    "exact fractions with its sum check, the orthogonality of the planned\n"
    "contrasts, the family plan (how alpha is shared), and the design\n"
    "assumptions and power of the plan block.\n"
    "\n"
    "Errors and warnings go to standard error as FILE:LINE:COL: error: message,\n"
    "with the source line and carets (in colour on a terminal, unless NO_COLOR\n"
    "is set). The review goes to standard output.\n"
    "\n"
    "  --format text   the review for people (default)\n"
    "  --format json   the review as avow.plan/1 JSON; with errors, only the\n"
    "                  diagnostics\n"
    "  --help          this text\n"
    "\n"
    "exit status: 0 no errors (warnings allowed), 1 errors, 64 command-line misuse.\n";

static const char help_fmt[] =
    "usage: avow fmt STUDY [-w]\n"
    "\n"
    "Prints the study file in canonical form: one statement per line, block items\n"
    "indented by four spaces, one level per line, minimal parentheses, comments\n"
    "kept in place and single blank lines kept where they were. Formatting twice\n"
    "changes nothing, and the formatted file checks to the same plan.\n"
    "\n"
    "  -w       rewrite STUDY in place (atomically) instead of printing;\n"
    "           untouched when already canonical\n"
    "  --help   this text\n"
    "\n"
    "exit status: 0 done, 1 the file has syntax errors, 64 command-line misuse.\n";

static const char help_run[] =
    "usage: avow run STUDY [--format text|json|html] [--data FILE] [-o FILE]\n"
    "                [--plots DIR] [--no-diagnostics]\n"
    "\n"
    "Checks the study, reads its data file in one pass, and writes the analysis\n"
    "report: the inputs with their SHA-256 digests and row counts, the study file\n"
    "echoed with line numbers, level summaries, the ANOVA table, the planned\n"
    "contrasts with raw and adjusted p-values, intervals and findings,\n"
    "exploratory contrasts, effect sizes, checks of the assumptions with robust\n"
    "alternatives, and notes. The text report draws the means against their\n"
    "reference distribution and the intervals of the comparisons in plain\n"
    "characters. On a terminal, the reading of a data file larger than 50 MB\n"
    "shows its progress on standard error.\n"
    "\n"
    "  --format text      the report for people (default)\n"
    "  --format json      the report as avow.report/1 JSON\n"
    "  --format html      the report as one self-contained HTML page with the\n"
    "                     pictures inline (no script, no external reference;\n"
    "                     for screens, phones and print)\n"
    "  --data FILE        analyse FILE instead of the study's data file (the\n"
    "                     study's sha256 lock applies to its own file only; the\n"
    "                     report names the file used)\n"
    "  -o FILE            write the report to FILE atomically instead of standard\n"
    "                     output\n"
    "  --plots DIR        also draw the pictures as SVG files in DIR (made if\n"
    "                     missing): means.svg, intervals.svg, residuals.svg,\n"
    "                     probability.svg and spread.svg (the last three need\n"
    "                     the checks of the assumptions)\n"
    "  --no-diagnostics   skip the checks of the assumptions (they keep every\n"
    "                     value in memory; without them memory stays small for\n"
    "                     any number of rows)\n"
    "  --help             this text\n"
    "\n"
    "exit status: 0 done, 1 the study file has errors, 2 the data do not fit the\n"
    "study (missing or changed file, unknown level label, non-numeric value, a\n"
    "level without data, too few observations), 64 command-line misuse. On any\n"
    "error no report is written.\n";

static const char help_sheet[] =
    "usage: avow sheet STUDY [--seed N] [-o FILE]\n"
    "\n"
    "Checks the study and lays out its randomized run sheet: every treatment cell\n"
    "(a combination of the factors' levels) as often as the plan block's\n"
    "`replicates` say; with a block, the full set in every block, blocks in their\n"
    "declared order and the order random within each block; without one, a\n"
    "single random order of all runs. Runs are numbered 1..N. The order comes\n"
    "from GSL's mt19937 generator, seeded with the seed modulo 2^32, and a\n"
    "Fisher-Yates shuffle: the same study and seed give the same sheet, byte for\n"
    "byte.\n"
    "\n"
    "The sheet is CSV (or the study's delimiter; tab for a .tsv or .tab file\n"
    "name): a first line beginning with # that records avow's version, the\n"
    "study's SHA-256, the seed, the generator, the runs and blocks; a header row\n"
    "(run, each factor's data column, the block's, the response's); one row per\n"
    "run with the level labels and an empty response. Once the responses are\n"
    "filled in it is the data file `avow run` reads (it skips lines beginning\n"
    "with # before the header).\n"
    "\n"
    "  --seed N   the seed, a whole number from 0 to 18446744073709551615;\n"
    "             overrides the plan block's `seed`\n"
    "  -o FILE    write the sheet to FILE atomically instead of standard output\n"
    "  --help     this text\n"
    "\n"
    "exit status: 0 done, 1 the study has errors or cannot be laid out (no\n"
    "replicates planned, a block whose levels come from the data, no seed),\n"
    "64 command-line misuse.\n";

static int usage_error(const char *fmt, const char *arg)
{
    fprintf(stderr, "avow: ");
    fprintf(stderr, fmt, arg);
    fprintf(stderr, "\n(run `avow --help` for usage)\n");
    return EXIT_USAGE;
}

static void write_stdout(const strbuf *b)
{
    if (b->len) fwrite(b->s, 1, b->len, stdout);
    fflush(stdout);
}

/* Terminal manners. Colour and the progress indicator go to standard error only when it
 * is a terminal, so they never reach a file or a pipe; NO_COLOR (set to any value, even
 * empty) or TERM=dumb turns the colour off. Decided once, in main. */
static diag_style stderr_style = DIAG_PLAIN;
static int stderr_is_tty = 0;

static void decide_terminal_manners(void)
{
    stderr_is_tty = isatty(STDERR_FILENO);
    const char *term = getenv("TERM");
    stderr_style = stderr_is_tty && !getenv("NO_COLOR") && !(term && strcmp(term, "dumb") == 0)
                       ? DIAG_COLOUR : DIAG_PLAIN;
}

/* Write b to path atomically; prints the reason and returns nonzero on failure. */
static int write_file(const char *path, const strbuf *b)
{
    int rc = avow_write_atomic(path, b->s ? b->s : "", b->len);
    if (rc == AVOW_ENOMEM) fprintf(stderr, "avow: out of memory\n");
    else if (rc) fprintf(stderr, "avow: cannot write %s: %s\n", path, strerror(errno));
    return rc;
}

/* Write a library message buffer (already styled for standard error) to standard
 * error; when it could not be built, memory ran out. */
static void write_messages(const strbuf *m)
{
    if (m->failed) fputs("avow: out of memory\n", stderr);
    else if (m->len) fwrite(m->s, 1, m->len, stderr);
}

static void print_diags(const avow_ctx *ctx)
{
    strbuf b = {0};
    diag_render_styled(ctx, stderr_style, &b);
    if (b.len) fwrite(b.s, 1, b.len, stderr);
    sb_free(&b);
}

/* The progress indicator of `avow run`: shown on a terminal for data files larger than
 * PROGRESS_MIN_BYTES, at most every PROGRESS_INTERVAL_NS, erased when the pass ends. */
#define PROGRESS_MIN_BYTES 50000000ull   /* 50 MB */
#define PROGRESS_INTERVAL_NS 250000000ll /* four updates a second at most */

typedef struct progress_line {
    int width;              /* characters shown on the terminal; 0: nothing shown */
    int pct;                /* the percentage shown */
    struct timespec when;   /* when it was shown */
} progress_line;

static void progress_show(void *arg, uint64_t done, uint64_t total)
{
    progress_line *p = arg;
    if (total <= PROGRESS_MIN_BYTES) return;
    int pct = done >= total ? 100 : (int)(done / (total / 100 + 1));
    if (pct > 100) pct = 100;
    struct timespec now;
    if (clock_gettime(CLOCK_MONOTONIC, &now) != 0) return;
    if (p->width) {
        long long ns = (long long)(now.tv_sec - p->when.tv_sec) * 1000000000ll + (now.tv_nsec - p->when.tv_nsec);
        if (ns < PROGRESS_INTERVAL_NS || pct == p->pct) return;
    }
    char text[64];
    int n = snprintf(text, sizeof text, "avow: reading the data file, %d%%", pct);
    if (n <= 0 || (size_t)n >= sizeof text) return;
    fprintf(stderr, "\r%s", text);
    fflush(stderr);
    p->width = n;
    p->pct = pct;
    p->when = now;
}

static void progress_erase(progress_line *p)
{
    if (!p->width) return;
    fprintf(stderr, "\r%*s\r", p->width, "");
    fflush(stderr);
    p->width = 0;
}

/* Load a study file into ctx; prints the reason and returns nonzero on failure. */
static int load(avow_ctx *ctx, const char *path)
{
    strbuf m = {0};
    int rc = avow_load_study(ctx, path, &m);
    write_messages(&m);
    sb_free(&m);
    return rc;
}

/* Options of a command line, after the command word. */
typedef struct cli_args {
    const char *path;       /* the study file */
    const char *data;       /* --data FILE, or NULL */
    const char *out;        /* -o FILE, or NULL */
    const char *plots;      /* --plots DIR, or NULL */
    int json;               /* --format json */
    int html;               /* --format html */
    int write;              /* -w */
    int no_diagnostics;     /* --no-diagnostics */
    int has_seed;           /* --seed was given */
    uint64_t seed;          /* --seed N */
} cli_args;

enum { OPT_FORMAT = 1, OPT_DATA = 2, OPT_OUT = 4, OPT_WRITE = 8, OPT_NODIAG = 16, OPT_SEED = 32, OPT_PLOTS = 64,
       OPT_HTML = 128 };

/* A seed as plain decimal digits, 0 to 2^64 - 1. Returns 1 when s is one. */
static int parse_seed(const char *s, uint64_t *out)
{
    uint64_t v = 0;
    if (!*s) return 0;
    for (; *s; s++) {
        if (*s < '0' || *s > '9') return 0;
        unsigned d = (unsigned)(*s - '0');
        if (v > (UINT64_MAX - d) / 10) return 0;
        v = v * 10 + d;
    }
    *out = v;
    return 1;
}

/* Parse the arguments of command `cmd`, accepting the options in `allowed`.
 * Returns -1 to go on, or the exit status to return (help printed, or misuse). */
static int parse_args(const char *cmd, int argc, char **argv, int allowed, const char *help, cli_args *a)
{
    memset(a, 0, sizeof *a);
    for (int i = 0; i < argc; i++) {
        const char *s = argv[i];
        if ((allowed & OPT_FORMAT) && (strcmp(s, "--format") == 0 || strncmp(s, "--format=", 9) == 0)) {
            const char *v = s[8] == '=' ? s + 9 : (i + 1 < argc ? argv[++i] : NULL);
            int html = (allowed & OPT_HTML) != 0;
            if (!v) return usage_error(html ? "--format needs a value: text, json or html%s"
                                            : "--format needs a value: text or json%s", "");
            a->json = a->html = 0;
            if (strcmp(v, "json") == 0) a->json = 1;
            else if (html && strcmp(v, "html") == 0) a->html = 1;
            else if (strcmp(v, "text") != 0)
                return usage_error(html ? "unknown format `%s`; the formats are text, json and html"
                                        : "unknown format `%s`; the formats are text and json", v);
        } else if ((allowed & OPT_DATA) && (strcmp(s, "--data") == 0 || strncmp(s, "--data=", 7) == 0)) {
            a->data = s[6] == '=' ? s + 7 : (i + 1 < argc ? argv[++i] : NULL);
            if (!a->data || !a->data[0]) return usage_error("--data needs a file name%s", "");
        } else if ((allowed & OPT_PLOTS) && (strcmp(s, "--plots") == 0 || strncmp(s, "--plots=", 8) == 0)) {
            a->plots = s[7] == '=' ? s + 8 : (i + 1 < argc ? argv[++i] : NULL);
            if (!a->plots || !a->plots[0]) return usage_error("--plots needs a folder name%s", "");
        } else if ((allowed & OPT_OUT) && strcmp(s, "-o") == 0) {
            a->out = i + 1 < argc ? argv[++i] : NULL;
            if (!a->out || !a->out[0]) return usage_error("-o needs a file name%s", "");
        } else if ((allowed & OPT_SEED) && (strcmp(s, "--seed") == 0 || strncmp(s, "--seed=", 7) == 0)) {
            const char *v = s[6] == '=' ? s + 7 : (i + 1 < argc ? argv[++i] : NULL);
            if (!v) return usage_error("--seed needs a value: a whole number from 0 to 18446744073709551615%s", "");
            if (!parse_seed(v, &a->seed))
                return usage_error("--seed takes a whole number from 0 to 18446744073709551615, not `%s`", v);
            a->has_seed = 1;
        } else if ((allowed & OPT_WRITE) && strcmp(s, "-w") == 0) {
            a->write = 1;
        } else if ((allowed & OPT_NODIAG) && strcmp(s, "--no-diagnostics") == 0) {
            a->no_diagnostics = 1;
        } else if (strcmp(s, "--help") == 0) {
            fputs(help, stdout);
            return 0;
        } else if (s[0] == '-' && s[1]) {
            fprintf(stderr, "avow: %s: unknown option `%s`\n(run `avow help %s` for usage)\n", cmd, s, cmd);
            return EXIT_USAGE;
        } else if (a->path) {
            fprintf(stderr, "avow: %s: one study file at a time (also given: `%s`)\n", cmd, s);
            return EXIT_USAGE;
        } else {
            a->path = s;
        }
    }
    if (!a->path) {
        fprintf(stderr, "avow: %s: which study file?\n(run `avow help %s` for usage)\n", cmd, cmd);
        return EXIT_USAGE;
    }
    return -1;
}

/* Load, parse and check a study; diagnostics are printed. Returns 1 when it has no
 * errors, 0 when it has, -1 when it could not be read or memory ran out (ctx freed). */
static int load_checked(const char *path, avow_ctx *ctx, ast_study *study, avow_plan *plan)
{
    if (load(ctx, path)) return -1;
    strbuf m = {0};
    int ok = avow_check_loaded(ctx, study, plan, stderr_style, &m);
    write_messages(&m);
    sb_free(&m);
    return ok;
}

static int cmd_check(int argc, char **argv)
{
    cli_args a;
    int r = parse_args("check", argc, argv, OPT_FORMAT, help_check, &a);
    if (r >= 0) return r;
    const char *path = a.path;
    int json = a.json;
    avow_ctx ctx;
    ast_study study;
    avow_plan plan;
    int ok = load_checked(path, &ctx, &study, &plan);
    if (ok < 0) return EXIT_STUDY;
    strbuf out = {0};
    if (json) render_plan_json(&ctx, &plan, ok, &out);
    else if (ok) render_plan_text(&ctx, &plan, &out);
    int rc = ok ? 0 : EXIT_STUDY;
    if (out.failed) { fprintf(stderr, "avow: out of memory\n"); rc = EXIT_STUDY; }
    else write_stdout(&out);
    if (!ok && !json)
        fprintf(stderr, "%s: %zu error%s, %zu warning%s\n", path, ctx.nerrors, ctx.nerrors == 1 ? "" : "s",
                ctx.nwarnings, ctx.nwarnings == 1 ? "" : "s");
    sb_free(&out);
    ctx_free(&ctx);
    return rc;
}

/* --plots DIR: make the folder and write the pictures the run drew, atomically; say on
 * standard error which could not be drawn and why. Returns 0, or 1 after printing an
 * error. */
static int write_pictures(const char *dir, const avow_run_result *res)
{
    if (avow_mkdirs(dir) != AVOW_OK) {
        fprintf(stderr, "avow: cannot make the folder %s: %s\n", dir,
                errno == ENOTDIR ? "a part of the path is not a folder" : strerror(errno));
        return 1;
    }
    size_t dl = strlen(dir);
    const char *sep = dl && dir[dl - 1] == '/' ? "" : "/";
    for (int pic = 0; pic < AVOW_PIC_COUNT; pic++) {
        const char *why = res->picture_missing[pic];
        if (why) {
            /* One line for a run of pictures left out for the same reason. */
            int last = pic;
            while (last + 1 < AVOW_PIC_COUNT && res->picture_missing[last + 1] == why) last++;
            fprintf(stderr, "avow: note: ");
            for (int k = pic; k <= last; k++)
                fprintf(stderr, "%s%s", k == pic ? "" : k == last ? " and " : ", ", svg_picture_file((avow_picture)k));
            fprintf(stderr, " not written: %s\n", why);
            pic = last;
            continue;
        }
        const char *file = svg_picture_file((avow_picture)pic);
        char *path = malloc(dl + strlen(sep) + strlen(file) + 1);
        if (!path) {
            fprintf(stderr, "avow: out of memory\n");
            return 1;
        }
        sprintf(path, "%s%s%s", dir, sep, file);
        int rc = write_file(path, &res->pictures[pic]);
        free(path);
        if (rc) return 1;
    }
    return 0;
}

static int cmd_run(int argc, char **argv)
{
    cli_args a;
    int r = parse_args("run", argc, argv, OPT_FORMAT | OPT_HTML | OPT_DATA | OPT_OUT | OPT_NODIAG | OPT_PLOTS, help_run,
                       &a);
    if (r >= 0) return r;
    progress_line bar = {0};
    avow_progress progress = {progress_show, &bar};
    avow_run_opts o = {.study_path = a.path, .data_path = a.data, .json = a.json, .html = a.html,
                       .pictures = a.plots != NULL, .no_diagnostics = a.no_diagnostics,
                       .style = stderr_style, .progress = stderr_is_tty ? &progress : NULL};
    avow_run_result res;
    int rc = avow_run(&o, &res);
    progress_erase(&bar);
    write_messages(&res.messages);
    if (rc == 0 && a.plots && write_pictures(a.plots, &res) != 0) rc = EXIT_STUDY;
    if (rc == 0 && a.out) {
        if (write_file(a.out, &res.report)) rc = EXIT_STUDY;
    } else if (rc == 0) {
        write_stdout(&res.report);
    }
    avow_run_free(&res);
    return rc;
}

static int cmd_sheet(int argc, char **argv)
{
    cli_args a;
    int r = parse_args("sheet", argc, argv, OPT_SEED | OPT_OUT, help_sheet, &a);
    if (r >= 0) return r;
    avow_ctx ctx;
    ast_study study;
    avow_plan plan;
    int ok = load_checked(a.path, &ctx, &study, &plan);
    if (ok < 0) return EXIT_STUDY;
    if (ok) {
        size_t first = ctx.ndiags;
        ok = sheet_check(&ctx, &study, &plan, a.has_seed || plan.has_seed) == 0;
        if (ctx.oom) { fprintf(stderr, "avow: out of memory\n"); ctx_free(&ctx); return EXIT_STUDY; }
        strbuf e = {0};
        for (size_t i = first; i < ctx.ndiags; i++) diag_render_one_styled(&ctx, &ctx.diags[i], stderr_style, &e);
        if (e.len) fwrite(e.s, 1, e.len, stderr);
        sb_free(&e);
    }
    if (!ok) {
        fprintf(stderr, "%s: %zu error%s, %zu warning%s; no sheet was written\n", a.path, ctx.nerrors,
                ctx.nerrors == 1 ? "" : "s", ctx.nwarnings, ctx.nwarnings == 1 ? "" : "s");
        ctx_free(&ctx);
        return EXIT_STUDY;
    }
    char sha[65];
    eval_sha256_bytes(ctx.src, ctx.len, sha);
    avow_sheet sheet;
    strbuf out = {0};
    int rc = 0;
    if (sheet_build(&plan, a.has_seed ? a.seed : plan.seed, &sheet) != AVOW_OK) {
        fprintf(stderr, "avow: out of memory\n");
        rc = EXIT_STUDY;
    } else {
        sheet_render(&plan, &sheet, sha, sheet_delimiter(&plan, a.out), &out);
        if (out.failed) {
            fprintf(stderr, "avow: out of memory\n");
            rc = EXIT_STUDY;
        } else if (a.out) {
            if (write_file(a.out, &out)) rc = EXIT_STUDY;
        } else {
            write_stdout(&out);
        }
    }
    sheet_free(&sheet);
    sb_free(&out);
    ctx_free(&ctx);
    return rc;
}

static int cmd_fmt(int argc, char **argv)
{
    cli_args a;
    int r = parse_args("fmt", argc, argv, OPT_WRITE, help_fmt, &a);
    if (r >= 0) return r;
    const char *path = a.path;
    int write = a.write;
    avow_ctx ctx;
    if (load(&ctx, path)) return EXIT_STUDY;
    ast_study study;
    if (parse_study(&ctx, &study) != 0) {
        if (ctx.oom) fprintf(stderr, "avow: out of memory\n");
        print_diags(&ctx);
        ctx_free(&ctx);
        return EXIT_STUDY;
    }
    strbuf out = {0};
    fmt_study(&ctx, &study, &out);
    int rc = 0;
    if (out.failed) {
        fprintf(stderr, "avow: out of memory\n");
        rc = EXIT_STUDY;
    } else if (!write) {
        write_stdout(&out);
    } else if (out.len != ctx.len || memcmp(out.s ? out.s : "", ctx.src, out.len) != 0) {
        if (write_file(path, &out)) rc = EXIT_STUDY;
    }
    sb_free(&out);
    ctx_free(&ctx);
    return rc;
}

int main(int argc, char **argv)
{
    decide_terminal_manners();
    if (argc < 2) { fputs(usage_text, stderr); return EXIT_USAGE; }
    const char *cmd = argv[1];
    if (strcmp(cmd, "--help") == 0 || strcmp(cmd, "-h") == 0) { fputs(usage_text, stdout); return 0; }
    if (strcmp(cmd, "--version") == 0) { printf("avow %s\n", AVOW_VERSION); return 0; }
    if (strcmp(cmd, "check") == 0) return cmd_check(argc - 2, argv + 2);
    if (strcmp(cmd, "fmt") == 0) return cmd_fmt(argc - 2, argv + 2);
    if (strcmp(cmd, "run") == 0) return cmd_run(argc - 2, argv + 2);
    if (strcmp(cmd, "sheet") == 0) return cmd_sheet(argc - 2, argv + 2);
    if (strcmp(cmd, "help") == 0) {
        if (argc < 3) { fputs(usage_text, stdout); return 0; }
        if (strcmp(argv[2], "check") == 0) { fputs(help_check, stdout); return 0; }
        if (strcmp(argv[2], "fmt") == 0) { fputs(help_fmt, stdout); return 0; }
        if (strcmp(argv[2], "run") == 0) { fputs(help_run, stdout); return 0; }
        if (strcmp(argv[2], "sheet") == 0) { fputs(help_sheet, stdout); return 0; }
        if (strcmp(argv[2], "help") == 0) { fputs(usage_text, stdout); return 0; }
        return usage_error("help: no command `%s`; the commands are check, run, sheet, fmt and help", argv[2]);
    }
    return usage_error("unknown command `%s`; the commands are check, run, sheet, fmt and help", cmd);
}
