/* sheet.h: the randomized run sheet of `avow sheet`. Every planned run of a study, in
 * an order drawn at random from a seed, written as the data file `avow run` reads once
 * the response column is filled in. Plain functions over the Plan; nothing prints.
 *
 * The layout: every treatment cell (combination of the factors' levels) appears its
 * planned number of replicates. With a block whose levels are declared, every block
 * holds that full set (a randomized complete block layout), blocks in their declared
 * order, the order randomized within each block; without a block, one randomization of
 * all runs. Runs are numbered 1..N down the sheet.
 *
 * The randomness: GSL's gsl_rng_mt19937 (the Mersenne Twister) seeded once from the
 * seed (sheet_generator_seed), then one gsl_ran_shuffle (Fisher-Yates) per block in
 * block order. The same study and seed give the same sheet, byte for byte. */
#ifndef AVOW_SHEET_H
#define AVOW_SHEET_H

#include <stddef.h>
#include <stdint.h>

#include "avow/ast.h"
#include "avow/plan.h"
#include "avow/util.h"

/* Most runs one sheet lays out. */
#define AVOW_SHEET_MAX_RUNS 1000000

/* The generator as the sheet names it, and the seed GSL's mt19937 takes for 0. */
#define AVOW_SHEET_GENERATOR "mt19937"
#define AVOW_SHEET_SEED_FOR_ZERO 4357UL

/* One planned run. */
typedef struct sheet_run {
    size_t cell;            /* its treatment cell (plan_cell_level gives the levels) */
    size_t block;           /* its block's level; 0 without a block */
} sheet_run;

/* A laid-out sheet. */
typedef struct avow_sheet {
    sheet_run *runs;        /* nruns runs in sheet order: runs[i] is run i + 1 (avow_malloc) */
    size_t nruns;           /* planned runs, blocks included */
    size_t nblocks;         /* blocks laid out; 0 without a block */
    size_t per_block;       /* runs in each block (nruns without a block) */
    uint64_t seed;          /* the seed as given */
    unsigned long gen_seed; /* the seed mt19937 was given: sheet_generator_seed(seed) */
} avow_sheet;

/* Check that a checked, error-free plan can be laid out: it plans replicates, its block
 * (if any) declares its levels, a seed is known (seed_given: from the command line or
 * the plan), and the sheet holds at most AVOW_SHEET_MAX_RUNS runs. Each problem is
 * recorded in ctx as an error at the place of the study it concerns (study: the
 * syntax tree the plan was checked from). Returns the number of errors recorded. */
size_t sheet_check(avow_ctx *ctx, const ast_study *study, const avow_plan *plan, int seed_given);

/* What mt19937 is seeded with for a seed: GSL's gsl_rng_set takes an unsigned long,
 * and its mt19937 keeps only the low 32 bits (an unsigned long may itself have only
 * 32), so the seed is reduced modulo 2^32 here, explicitly, and the sheet says so;
 * a reduced seed of 0 becomes 4357, as GSL itself would make it, so the value returned
 * is always the one the generator really starts from. */
unsigned long sheet_generator_seed(uint64_t seed);

/* Lay out the sheet of a plan that passed sheet_check, with the given seed. On
 * success *out owns its runs (sheet_free). Returns AVOW_OK, AVOW_ENOMEM, or AVOW_EDOM
 * when the plan cannot be laid out (see sheet_check); *out is then empty. */
int sheet_build(const avow_plan *plan, uint64_t seed, avow_sheet *out);

/* Release a sheet's runs (an empty sheet is fine). */
void sheet_free(avow_sheet *s);

/* The delimiter of the sheet: the study's `delimiter`; else, by the name of the file
 * the sheet is written to (out_path, may be NULL) or else of the study's data file, tab
 * for names ending in .tsv or .tab; else ','. The rule `avow run` applies when it reads
 * that file. */
char sheet_delimiter(const avow_plan *plan, const char *out_path);

/* Render the sheet as delimited text. First one comment line of provenance: avow's
 * version, the study file's SHA-256 (study_sha256, 64 hex digits), the seed and the value
 * mt19937 was seeded with (and why, when it differs), the generator and the shuffle, the
 * runs and blocks. Then the header row: the run number's column, "run" (or "run2",
 * "run3"... when the study reads a factor, the block or the response from a column of
 * that name), each factor's data column, the block's, the response's. Then one row per
 * run: its number, each factor's level as its data label (its code, else its name), the
 * block's level likewise, and an empty response. A field is quoted as RFC 4180 has it
 * (in double quotes, a quote doubled) when it holds the delimiter, a quote or a line
 * break, or begins or ends with a space. Lines end in LF. */
void sheet_render(const avow_plan *plan, const avow_sheet *s, const char *study_sha256, char delim,
                  strbuf *out);

#endif
