/* evaluate.h: the evaluator of `avow run`: the data reader (one streaming pass into
 * exact per-level sums), the input digests, and the analysis (ANOVA, contrasts,
 * multiplicity). Plain functions over the Plan and the Results; nothing prints. */
#ifndef AVOW_EVALUATE_H
#define AVOW_EVALUATE_H

#include <stddef.h>
#include <stdint.h>

#include "avow/decimal.h"
#include "avow/plan.h"
#include "avow/results.h"
#include "avow/util.h"

/* Why a data file is refused when it is a device, a pipe or a socket (those may never
 * end, like /dev/zero, or cannot be read twice). */
#define AVOW_NOT_A_FILE "the data file is not a regular file (a device, a pipe or a socket)"

/* Most data errors collected before the reader gives up. */
#define AVOW_MAX_DATA_ERRORS 20

/* SHA-256 of a file's bytes as 64 lowercase hex digits (hex holds 65 bytes).
 * Returns AVOW_OK or AVOW_EIO (errno kept). */
int eval_sha256_file(const char *path, char *hex);
/* Hash a file on a second thread while the caller reads it (the machine has cores to
 * spare; the digest is the same). Start returns NULL when out of memory; join waits,
 * writes the hex digest and returns eval_sha256_file's status (errno kept); it frees
 * the job. When no thread can be started the work is done in join. */
typedef struct eval_hash_job eval_hash_job;
eval_hash_job *eval_sha256_start(const char *path);
int eval_sha256_join(eval_hash_job *job, char *hex);
/* SHA-256 of a buffer. */
void eval_sha256_bytes(const void *bytes, size_t len, char *hex);

/* Most blocks a study's data may hold. */
#define AVOW_MAX_BLOCKS 10000

/* The data reduced to exact sufficient statistics: one accumulator per full cell (a
 * treatment cell within a block), block-major: acc[b * plan->ncells + t]. Without a
 * block there is one "block". Blocks taken from the data are numbered in order of first
 * appearance. */
/* One observation, kept for the diagnostics (medians, ranks, residuals). */
typedef struct avow_obs {
    avow_dec value;         /* exact (the nearest 17-digit decimal for a value that could
                               not be taken exactly) */
    uint64_t line;          /* its line in the data file */
    uint32_t cell;          /* its full cell: block * ncells + treatment cell */
} avow_obs;

typedef struct avow_data {
    int keep;               /* keep every observation (set by the caller before reading) */
    int residuals;          /* with keep: also give each observation's fitted value and
                               residual in the results (checks.resid), for the pictures */
    avow_obs *obs;          /* the observations in file order, when keep */
    size_t nobs, obscap;
    avow_acc *acc;          /* nblocks * ncells accumulators */
    size_t ncells;          /* treatment cells (plan->ncells) */
    size_t nblocks;         /* blocks seen or declared (1 without a block) */
    size_t cap;             /* blocks allocated */
    char **block_labels;    /* labels of blocks taken from the data (avow_malloc), else NULL */
    int oom;                /* memory ran out while reading (set by eval_read, whose
                               errors then say so): not a fault of the data */
} avow_data;

/* Prepare d for the plan (declared blocks, or one). Returns AVOW_OK or AVOW_ENOMEM. */
int eval_data_init(avow_data *d, const avow_plan *plan);
void eval_data_free(avow_data *d);

/* Progress of the data pass, for a caller that wants to show it (the library shows
 * nothing): fn(arg, done, total) is called with the bytes read so far and the file's
 * size (0 when it is not a regular file): once after the header row, every few
 * thousand records while the bytes read grow, and once at the end of the pass (done
 * then equals the bytes read in all). fn must not touch the reader's data. */
typedef void (*avow_progress_fn)(void *arg, uint64_t done, uint64_t total);
typedef struct avow_progress {
    avow_progress_fn fn;
    void *arg;
} avow_progress;

/* Read the data file at `path` (shown in messages as `shown`) for the plan: map columns
 * and level labels, take each response value exactly, and account for every row.
 * Errors (each `FILE:LINE:COL: error: message`, at most AVOW_MAX_DATA_ERRORS) are
 * appended to errs. `progress` may be NULL. Returns the number of errors; 0 when the
 * data fit the study. */
size_t eval_read(const avow_plan *plan, const char *path, const char *shown, avow_data *data,
                 avow_results *res, strbuf *errs, const avow_progress *progress);

/* Analyse the accumulated data: cell summaries, the ANOVA table, planned and
 * exploratory contrasts with their adjustments. Result arrays are allocated with
 * avow_malloc; release them with eval_results_free.
 * Returns AVOW_OK, AVOW_ENOMEM or AVOW_EDOM (data that cannot be analysed; a message
 * is appended to errs). */
int eval_analyse(const avow_plan *plan, const avow_data *data, avow_results *res, strbuf *errs);

void eval_results_free(avow_results *res);

#endif
