/* decimal.h: exact decimal values, exact per-cell accumulation of deviations, and the
 * exact one-way sums of squares built from them (Numerics policy, ARCHITECTURE.md;
 * methods.md section 10).
 *
 * Big-number arithmetic uses GMP (link with -lgmp). GMP allocates its limbs with its own
 * allocator, not avow_malloc, and aborts when memory is exhausted (GMP's documented
 * behaviour); this module makes no other heap allocation. */
#ifndef AVOW_DECIMAL_H
#define AVOW_DECIMAL_H

#include <stddef.h>
#include <stdint.h>

#include <gmp.h>

/* A 128-bit signed integer (a GCC/Clang extension). */
__extension__ typedef __int128 avow_i128;

/* A decimal number: value = sig * 10^exp, exactly. */
typedef struct avow_dec {
    int64_t sig;    /* significand; dec_parse gives |sig| < 10^18 without trailing zeros */
    int32_t exp;    /* power of ten */
} avow_dec;

/* Largest |exp| that dec_parse accepts for a non-zero value. A value outside
 * 10^-100000 .. 10^100018 is no measurement, and bounding the exponent bounds the size of
 * every exact intermediate. */
#define AVOW_DEC_EXP_LIMIT 100000

/* Largest spread of decimal exponents (largest minus smallest, among the non-zero values
 * of one cell and its shift) that is accumulated exactly; a value beyond it enters the
 * double-double part and the cell becomes inexact. */
#define AVOW_DEC_MAX_SPAN 4000

/* Parse the decimal text s[0..len) exactly. Grammar: [+-] digits [. [digits]] [exp] or
 * [+-] . digits [exp], where exp = (e|E) [+-] digits. Surrounding spaces are not
 * accepted: trimming is the caller's business (the CSV reader trims unquoted fields).
 * The result has trailing zeros of the significand moved into the exponent; zero is
 * {0, 0} whatever its sign or exponent.
 * Returns AVOW_OK; AVOW_ESYNTAX for anything else (empty, "inf", "nan", "1e", "--1", hex,
 * embedded spaces, thousands separators, a NUL byte); AVOW_EOVERFLOW when more than 18
 * significant digits remain or |exp| would exceed AVOW_DEC_EXP_LIMIT (the caller may fall
 * back to a binary64 reading). On error *out is unchanged. */
int dec_parse(const char *s, size_t len, avow_dec *out);

/* Exact comparison: -1, 0 or 1 as a <, =, > b. Any significands and exponents. */
int dec_cmp(avow_dec a, avow_dec b);

/* Set out (initialised by the caller) to the exact value of v. */
void dec_to_mpq(avow_dec v, mpq_t out);

/* Exact decimal text of v into out (size bytes; 96 hold any value): plain digits while
 * the number needs at most 6 zeros of padding, scientific notation (d.ddde+N) beyond. */
void dec_format(avow_dec v, char *out, size_t size);

/* The binary64 value nearest to v (ties to even); +-inf beyond the double range. */
double dec_get_d(avow_dec v);

/* The binary64 value nearest to the rational q (ties to even); +-inf beyond the double
 * range, subnormals rounded correctly. (mpq_get_d alone truncates.) */
double dec_mpq_get_d(const mpq_t q);

/* A decimal with at most 17 significant digits that converts back to exactly x (the
 * fewest digits among 15, 16 and 17 that do so; fewer when trailing zeros are stripped).
 * Returns AVOW_OK, or AVOW_EDOM when x is not finite. */
int dec_from_double(double x, avow_dec *out);

/* An unevaluated sum hi + lo of two doubles with |lo| <= ulp(hi)/2 (double-double). */
typedef struct avow_dd {
    double hi;      /* leading part */
    double lo;      /* trailing part */
} avow_dd;

/* Exact sufficient statistics of one cell.
 *
 * The first value added becomes the shift c. Every later value v enters as its deviation
 * d = v - c, exactly, as an integer count of 10^-scale units, where scale is the largest
 * number of decimals seen so far; T = sum d and S = sum d^2 are kept in 128-bit integers.
 * A value with more decimals rescales T (x10^k) and S (x10^2k) exactly. When a 128-bit
 * operation would overflow, the cell switches to GMP integers and stays exact.
 * Values that cannot be taken exactly (added with dec_acc_add_double, or whose exponent
 * would widen the cell's exponent spread beyond AVOW_DEC_MAX_SPAN) go to a separate
 * double-double sum of their deviations from the same shift, and `exact` becomes 0.
 * The results add both parts.
 *
 * Initialise with dec_acc_init and release with dec_acc_clear (GMP memory once `big`).
 * Do not duplicate an accumulator by value once `big` is set (the copies would share
 * limbs); moving it (e.g. within a realloc'd array) is fine.
 * Fields are readable; change them only through the functions below. */
typedef struct avow_acc {
    uint64_t n;             /* values added (exact and inexact) */
    uint64_t n_inexact;     /* values in the double-double part */
    int exact;              /* 1 while every value was taken exactly */
    int big;                /* 1 once t, s, shift_u moved to the GMP integers */
    int any_nonzero;        /* the exact part has seen a non-zero value (incl. the shift) */
    int32_t scale;          /* exact deviations count units of 10^-scale (valid if any_nonzero) */
    int32_t exp_hi;         /* largest exponent of a non-zero exact value (if any_nonzero) */
    avow_dec shift;         /* c: the first value added */
    avow_dec min;           /* smallest value added, exact (see dec_acc_add_double) */
    avow_dec max;           /* largest value added, exact (see dec_acc_add_double) */
    avow_i128 t;            /* T, sum of exact deviations in 10^-scale units (if !big) */
    avow_i128 s;            /* S, sum of their squares in 10^-2scale units (if !big) */
    avow_i128 shift_u;      /* c in 10^-scale units (if !big) */
    avow_i128 dmin;         /* smallest exact deviation in 10^-scale units (if !big) */
    avow_i128 dmax;         /* largest exact deviation in 10^-scale units (if !big) */
    mpz_t bt;               /* T (if big) */
    mpz_t bs;               /* S (if big) */
    mpz_t bshift;           /* c in 10^-scale units (if big) */
    mpz_t btmp;             /* scratch (if big) */
    avow_dd dt;             /* sum of inexact deviations, real units */
    avow_dd ds;             /* sum of their squares, real units */
    avow_dd shift_dd;       /* c as a double-double (if have_shift_dd) */
    int have_shift_dd;      /* shift_dd has been computed */
} avow_acc;

/* Make a an empty accumulator. (Call dec_acc_clear first when reusing a big one.) */
void dec_acc_init(avow_acc *a);

/* Release GMP memory held by a and leave it empty. */
void dec_acc_clear(avow_acc *a);

/* Add the exact value v. Returns AVOW_OK; AVOW_EOVERFLOW when v falls outside the exact
 * spread and its deviation or squared deviation overflows binary64; AVOW_EDOM when
 * |v.exp| > 2 AVOW_DEC_EXP_LIMIT for non-zero v (dec_parse never gives such a value).
 * On error v is not added.
 * Common case (same scale, no overflow): no allocation, no GMP, no division. */
int dec_acc_add(avow_acc *a, avow_dec v);

/* Add a value that could not be parsed exactly (e.g. more than 18 significant digits,
 * read with strtod). Its deviation from the shift is accumulated in double-double and
 * the cell becomes inexact; min and max see it as dec_from_double(v). The first value of
 * a cell may come this way too (its shift is then dec_from_double(v)). Returns AVOW_OK,
 * AVOW_EDOM when v is not finite, AVOW_EOVERFLOW when the deviation or its square
 * overflows binary64 (v not added). */
int dec_acc_add_double(avow_acc *a, double v);

/* Accessors. */
uint64_t dec_acc_n(const avow_acc *a);          /* number of values */
int dec_acc_is_exact(const avow_acc *a);        /* 1 when every value was taken exactly */
/* Smallest / largest value; AVOW_EDOM when the cell is empty. */
int dec_acc_min(const avow_acc *a, avow_dec *out);
int dec_acc_max(const avow_acc *a, avow_dec *out);

/* Exact results (out initialised by the caller), computed from the shift c, the count n
 * and the deviation sums T, S (exact part plus the exact value of the double-double
 * part):
 *   total = n c + T
 *   mean  = c + T / n                     (AVOW_EDOM when n == 0)
 *   ss    = (n S - T^2) / n, the sum of squared deviations about the cell mean; for an
 *           exact cell n S - T^2 >= 0 is an integer identity at the common scale; an
 *           inexact cell can round slightly below 0 and is clamped at 0.
 * An empty cell has total 0 and ss 0. Return AVOW_OK or AVOW_EDOM. */
int dec_acc_total(const avow_acc *a, mpq_t out);
int dec_acc_mean(const avow_acc *a, mpq_t out);
int dec_acc_ss(const avow_acc *a, mpq_t out);

/* The same, correctly rounded to binary64 once at the end (dec_mpq_get_d). */
int dec_acc_total_d(const avow_acc *a, double *out);
int dec_acc_mean_d(const avow_acc *a, double *out);
int dec_acc_ss_d(const avow_acc *a, double *out);

/* One-way analysis of variance sums, exact. Release with dec_oneway_clear. */
typedef struct avow_oneway {
    uint64_t n;             /* N, observations in all cells */
    size_t k;               /* cells with at least one observation */
    int exact;              /* 1 when every cell was accumulated exactly */
    double grand_mean;      /* ybar = sum(total_i) / N, correctly rounded */
    double ss_between;      /* sum n_i (ybar_i - ybar)^2, correctly rounded */
    double ss_within;       /* sum SS_i, correctly rounded */
    double ss_total;        /* ss_between + ss_within (exact sum), correctly rounded */
    mpq_t q_grand_mean;     /* the exact values of the four above */
    mpq_t q_ss_between;
    mpq_t q_ss_within;
    mpq_t q_ss_total;
} avow_oneway;

/* From k cell accumulators compute, in exact rational arithmetic,
 *   ybar_i = c_i + T_i / n_i,   ybar = sum(n_i c_i + T_i) / N,
 *   SSW = sum (n_i S_i - T_i^2) / n_i,   SSB = sum n_i (ybar_i - ybar)^2,
 *   SST = SSB + SSW,
 * then round each to binary64 once. Empty cells are skipped (k counts the others).
 * Every term is non-negative and exact, so the doubles are the correctly rounded exact
 * values (for an inexact cell: of its accumulated double-double deviations).
 * On AVOW_OK the caller owns the mpq fields of *out and must call dec_oneway_clear.
 * Returns AVOW_OK, AVOW_EDOM (N == 0) or AVOW_EOVERFLOW (N beyond 64 bits); on error
 * *out needs no clearing. */
int dec_oneway(const avow_acc *cells, size_t k, avow_oneway *out);

/* Release the rationals of a result filled by dec_oneway. */
void dec_oneway_clear(avow_oneway *o);

#endif
