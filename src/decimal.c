/* decimal.c: exact decimals, exact per-cell accumulation of deviations (128-bit
 * integers, then GMP, then double-double for what cannot be exact), and the exact
 * one-way sums of squares. See include/avow/decimal.h and methods.md section 10. */
#include "avow/decimal.h"
#include "avow/util.h"

#include <float.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

__extension__ typedef __int128 i128;
__extension__ typedef unsigned __int128 u128;

/* 10^k for k = 0..19 (10^19 < 2^64). */
static const uint64_t P10_64[20] = {
    UINT64_C(1), UINT64_C(10), UINT64_C(100), UINT64_C(1000), UINT64_C(10000),
    UINT64_C(100000), UINT64_C(1000000), UINT64_C(10000000), UINT64_C(100000000),
    UINT64_C(1000000000), UINT64_C(10000000000), UINT64_C(100000000000),
    UINT64_C(1000000000000), UINT64_C(10000000000000), UINT64_C(100000000000000),
    UINT64_C(1000000000000000), UINT64_C(10000000000000000),
    UINT64_C(100000000000000000), UINT64_C(1000000000000000000),
    UINT64_C(10000000000000000000)
};

#define E19 ((i128)UINT64_C(10000000000000000000))
/* 10^k for k = 0..38 (10^38 < 2^127). */
static const i128 P10_128[39] = {
    (i128)UINT64_C(1), (i128)UINT64_C(10), (i128)UINT64_C(100), (i128)UINT64_C(1000),
    (i128)UINT64_C(10000), (i128)UINT64_C(100000), (i128)UINT64_C(1000000),
    (i128)UINT64_C(10000000), (i128)UINT64_C(100000000), (i128)UINT64_C(1000000000),
    (i128)UINT64_C(10000000000), (i128)UINT64_C(100000000000),
    (i128)UINT64_C(1000000000000), (i128)UINT64_C(10000000000000),
    (i128)UINT64_C(100000000000000), (i128)UINT64_C(1000000000000000),
    (i128)UINT64_C(10000000000000000), (i128)UINT64_C(100000000000000000),
    (i128)UINT64_C(1000000000000000000), E19,
    E19 * UINT64_C(10), E19 * UINT64_C(100), E19 * UINT64_C(1000),
    E19 * UINT64_C(10000), E19 * UINT64_C(100000), E19 * UINT64_C(1000000),
    E19 * UINT64_C(10000000), E19 * UINT64_C(100000000), E19 * UINT64_C(1000000000),
    E19 * UINT64_C(10000000000), E19 * UINT64_C(100000000000),
    E19 * UINT64_C(1000000000000), E19 * UINT64_C(10000000000000),
    E19 * UINT64_C(100000000000000), E19 * UINT64_C(1000000000000000),
    E19 * UINT64_C(10000000000000000), E19 * UINT64_C(100000000000000000),
    E19 * UINT64_C(1000000000000000000), E19 * E19
};

/* 10^k for k = 0..22, exact in binary64. */
static const double P10_D[23] = {
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14,
    1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22
};

/* Scale sentinel while the exact part has seen only zeros: makes every k out of range. */
#define SCALE_NONE INT32_MIN

/* ------------------------------------------------------------------ parsing */

/* The general parser: any length, leading and trailing zeros in any number. */
__attribute__((noinline)) static int parse_general(const char *s, size_t len, avow_dec *out)
{
    const unsigned char *p = (const unsigned char *)s, *end = p + len;
    int neg = 0;
    if (p < end && (*p == '+' || *p == '-')) { neg = *p == '-'; p++; }

    uint64_t sig = 0;       /* significant digits taken so far */
    int64_t nd = 0;         /* how many */
    int64_t pending = 0;    /* zeros after the last non-zero digit, not yet in sig */
    int64_t frac = 0;       /* digits after the point */
    int64_t mant = 0;       /* digits in the mantissa */
    int over = 0;           /* more than 18 significant digits */
    int seen_point = 0;
    const int64_t cap = INT64_C(1) << 40;   /* counters saturate here (no overflow) */

    for (; p < end; p++) {
        unsigned c = (unsigned)*p - '0';
        if (c > 9) {
            if (*p == '.' && !seen_point) { seen_point = 1; continue; }
            break;
        }
        if (mant < cap) mant++;
        if (seen_point && frac < cap) frac++;
        if (c == 0) {
            if (sig && pending < cap) pending++;
        } else if (sig == 0) {
            sig = c; nd = 1; pending = 0;
        } else {
            if (over || pending + 1 > 18 - nd) {
                over = 1;
            } else {
                sig = sig * P10_64[pending + 1] + c;
                nd += pending + 1;
            }
            pending = 0;
        }
    }
    if (mant == 0) return AVOW_ESYNTAX;

    int64_t e = 0;
    if (p < end && (*p == 'e' || *p == 'E')) {
        p++;
        int eneg = 0;
        if (p < end && (*p == '+' || *p == '-')) { eneg = *p == '-'; p++; }
        const unsigned char *d0 = p;
        for (; p < end && (unsigned)*p - '0' <= 9; p++)
            if (e < INT64_C(1000000000000)) e = e * 10 + (*p - '0');
        if (p == d0) return AVOW_ESYNTAX;
        if (eneg) e = -e;
    }
    if (p != end) return AVOW_ESYNTAX;
    if (over) return AVOW_EOVERFLOW;
    if (sig == 0) { out->sig = 0; out->exp = 0; return AVOW_OK; }

    e = e - frac + pending;     /* |e| < 2^42: no overflow */
    if (e > AVOW_DEC_EXP_LIMIT || e < -AVOW_DEC_EXP_LIMIT) return AVOW_EOVERFLOW;
    out->sig = neg ? -(int64_t)sig : (int64_t)sig;
    out->exp = (int32_t)e;
    return AVOW_OK;
}

/* Fast path for the common "[+-]digits[.digits]" with at most 18 digits in all; anything
 * else goes to parse_general. */
int dec_parse(const char *s, size_t len, avow_dec *out)
{
    const unsigned char *p = (const unsigned char *)s, *end = p + len;
    int neg = 0;
    if (p < end && (*p == '+' || *p == '-')) { neg = *p == '-'; p++; }
    const unsigned char *d0 = p;
    uint64_t sig = 0;           /* wraps harmlessly beyond 19 digits (then unused) */
    unsigned c;
    while (p < end && (c = (unsigned)*p - '0') <= 9) {
        sig = sig * 10 + c;
        p++;
    }
    size_t frac = 0, point = 0;
    if (p < end && *p == '.') {
        point = 1;
        const unsigned char *f0 = ++p;
        while (p < end && (c = (unsigned)*p - '0') <= 9) {
            sig = sig * 10 + c;
            p++;
        }
        frac = (size_t)(p - f0);
    }
    /* no digits, more to come (exponent or junk), more than 18 digits (leading zeros
     * included, so sig is exact): the general parser decides */
    size_t ndig = (size_t)(p - d0) - point;
    if (p != end || ndig == 0 || ndig > 18) return parse_general(s, len, out);
    if (sig == 0) { out->sig = 0; out->exp = 0; return AVOW_OK; }
    int32_t e = -(int32_t)frac;
    while (sig % 10 == 0) { sig /= 10; e++; }   /* division by a constant: a multiply */
    out->sig = neg ? -(int64_t)sig : (int64_t)sig;
    out->exp = e;
    return AVOW_OK;
}

/* ------------------------------------------------------------------ helpers */

static uint64_t mag64(int64_t v) { return v < 0 ? (uint64_t)0 - (uint64_t)v : (uint64_t)v; }

static int ndigits64(uint64_t m)
{
    int d = 1;
    while (d < 20 && m >= P10_64[d]) d++;
    return d;
}

int dec_cmp(avow_dec a, avow_dec b)
{
    int sa = (a.sig > 0) - (a.sig < 0), sb = (b.sig > 0) - (b.sig < 0);
    if (sa != sb) return sa < sb ? -1 : 1;
    if (sa == 0) return 0;
    if (a.exp == b.exp) return (a.sig > b.sig) - (a.sig < b.sig);
    int64_t de = (int64_t)a.exp - b.exp;
    if (de >= -19 && de <= 19) {
        /* align in 128 bits: |sig| 10^19 < 2^127 */
        i128 x = a.sig, y = b.sig;
        if (de > 0) x *= P10_128[de]; else y *= P10_128[-de];
        return (x > y) - (x < y);
    }
    uint64_t ma = mag64(a.sig), mb = mag64(b.sig);
    int64_t oa = ndigits64(ma) + (int64_t)a.exp, ob = ndigits64(mb) + (int64_t)b.exp;
    int c;
    if (oa != ob) {
        c = oa < ob ? -1 : 1;
    } else {
        /* same order of magnitude: the exponents differ by at most 18, and the shifted
         * significand has as many digits as the other one (<= 19): no overflow */
        if (a.exp > b.exp) ma *= P10_64[a.exp - b.exp];
        else mb *= P10_64[b.exp - a.exp];
        c = (ma > mb) - (ma < mb);
    }
    return sa > 0 ? c : -c;
}

static void mpz_set_i128(mpz_t z, i128 v)
{
    u128 m = v < 0 ? (u128)0 - (u128)v : (u128)v;
    uint64_t w[2];
    w[0] = (uint64_t)m;
    w[1] = (uint64_t)(m >> 64);
    mpz_import(z, 2, -1, sizeof(uint64_t), 0, 0, w);
    if (v < 0) mpz_neg(z, z);
}

static void mpz_set_u64(mpz_t z, uint64_t v) { mpz_set_i128(z, (i128)v); }

/* x *= 10^k. */
static void mpz_mul_p10(mpz_t x, unsigned long k)
{
    if (k == 0) return;
#if ULONG_MAX >= 10000000000000000000u
    if (k <= 19) { mpz_mul_ui(x, x, (unsigned long)P10_64[k]); return; }
#endif
    mpz_t p;
    mpz_init(p);
    mpz_ui_pow_ui(p, 10, k);
    mpz_mul(x, x, p);
    mpz_clear(p);
}

void dec_to_mpq(avow_dec v, mpq_t out)
{
    mpz_set_i128(mpq_numref(out), (i128)v.sig);
    mpz_set_ui(mpq_denref(out), 1);
    if (v.sig == 0) return;
    if (v.exp >= 0) {
        mpz_mul_p10(mpq_numref(out), (unsigned long)v.exp);
    } else {
        mpz_mul_p10(mpq_denref(out), (unsigned long)(-(int64_t)v.exp));
        mpq_canonicalize(out);
    }
}

/* Round the non-negative rational a to the nearest integer, ties to even. */
static void mpq_round_even(mpz_t out, const mpq_t a)
{
    mpz_t r;
    mpz_init(r);
    mpz_fdiv_qr(out, r, mpq_numref(a), mpq_denref(a));
    mpz_mul_2exp(r, r, 1);
    int c = mpz_cmp(r, mpq_denref(a));
    if (c > 0 || (c == 0 && mpz_odd_p(out))) mpz_add_ui(out, out, 1);
    mpz_clear(r);
}

double dec_mpq_get_d(const mpq_t q)
{
    int sgn = mpq_sgn(q);
    if (sgn == 0) return 0.0;
    mpq_t a, lo, hi;
    mpq_inits(a, lo, hi, NULL);
    mpq_abs(a, q);
    double d;
    int64_t bits = (int64_t)mpz_sizeinbase(mpq_numref(a), 2) -
                   (int64_t)mpz_sizeinbase(mpq_denref(a), 2);
    /* 2^(bits-1) < a < 2^(bits+1) */
    if (bits > 1025) { d = HUGE_VAL; goto done; }
    if (bits < -1080) { d = 0.0; goto done; }   /* a < 2^-1079, below half of 2^-1074 */
    /* beyond DBL_MAX + ulp/2 = 2^1024 - 2^970 rounds to infinity */
    mpz_set_ui(mpq_numref(hi), 1);
    mpz_mul_2exp(mpq_numref(hi), mpq_numref(hi), 54);
    mpz_sub_ui(mpq_numref(hi), mpq_numref(hi), 1);
    mpz_mul_2exp(mpq_numref(hi), mpq_numref(hi), 970);
    mpz_set_ui(mpq_denref(hi), 1);
    if (mpq_cmp(a, hi) >= 0) { d = HUGE_VAL; goto done; }
    if (bits <= -1022) {
        /* a < 2^-1021: doubles there are the multiples of 2^-1074, so round a * 2^1074
         * to an integer m < 2^53 (exact in binary64) */
        mpz_t m;
        mpz_init(m);
        mpq_set(lo, a);
        mpz_mul_2exp(mpq_numref(lo), mpq_numref(lo), 1074);
        mpq_canonicalize(lo);
        mpq_round_even(m, lo);
        d = ldexp(mpz_get_d(m), -1074);
        mpz_clear(m);
        goto done;
    }

    d = mpq_get_d(a);              /* truncated; make sure lo <= a < hi = next(lo) */
    mpq_set_d(lo, d);
    while (d > 0 && mpq_cmp(lo, a) > 0) { d = nextafter(d, 0.0); mpq_set_d(lo, d); }
    double u;
    for (;;) {
        u = nextafter(d, HUGE_VAL);
        if (isinf(u)) {             /* d == DBL_MAX: the next step would be 2^1024 */
            mpz_set_ui(mpq_numref(hi), 1);
            mpz_mul_2exp(mpq_numref(hi), mpq_numref(hi), 1024);
            mpz_set_ui(mpq_denref(hi), 1);
        } else {
            mpq_set_d(hi, u);
        }
        if (mpq_cmp(hi, a) > 0) break;
        d = u;
        mpq_set(lo, hi);
    }
    /* compare a with the midpoint (lo + hi) / 2 */
    mpq_add(hi, lo, hi);
    mpz_mul_2exp(mpq_denref(hi), mpq_denref(hi), 1);
    mpq_canonicalize(hi);
    int c = mpq_cmp(a, hi);
    if (c > 0) {
        d = u;
    } else if (c == 0) {
        uint64_t bitsd;
        memcpy(&bitsd, &d, sizeof bitsd);
        if (bitsd & 1) d = u;
    }
done:
    mpq_clears(a, lo, hi, NULL);
    return sgn < 0 ? -d : d;
}

double dec_get_d(avow_dec v)
{
    if (v.sig == 0) return 0.0;
    uint64_t m = mag64(v.sig);
    if (m <= (UINT64_C(1) << 53) && v.exp >= -22 && v.exp <= 22) {
        /* both operands exact: one correctly rounded operation */
        double d = (double)m;
        d = v.exp >= 0 ? d * P10_D[v.exp] : d / P10_D[-v.exp];
        return v.sig < 0 ? -d : d;
    }
    mpq_t q;
    mpq_init(q);
    dec_to_mpq(v, q);
    double d = dec_mpq_get_d(q);
    mpq_clear(q);
    return d;
}

int dec_from_double(double x, avow_dec *out)
{
    if (!isfinite(x)) return AVOW_EDOM;
    if (x == 0) { out->sig = 0; out->exp = 0; return AVOW_OK; }
    mpq_t q, t, p10;
    mpz_t n;
    mpq_inits(q, t, p10, NULL);
    mpz_init(n);
    mpq_set_d(q, fabs(x));
    /* e10 = floor(log10|x|), corrected exactly */
    int e10 = (int)floor(log10(fabs(x)));
    for (;;) {
        dec_to_mpq((avow_dec){1, e10}, p10);
        if (mpq_cmp(q, p10) < 0) { e10--; continue; }
        dec_to_mpq((avow_dec){1, e10 + 1}, p10);
        if (mpq_cmp(q, p10) >= 0) { e10++; continue; }
        break;
    }
    avow_dec best = {0, 0};
    for (int prec = 15; prec <= 17; prec++) {
        int sh = prec - 1 - e10;
        dec_to_mpq((avow_dec){1, sh}, p10);
        mpq_mul(t, q, p10);
        mpq_round_even(n, t);
        int32_t e = e10 - prec + 1;
        uint64_t m = mpz_get_ui(n);       /* < 10^17 <= ULONG_MAX on LP64 */
#if ULONG_MAX < 10000000000000000000u
        { uint64_t w = 0; mpz_export(&w, NULL, -1, sizeof w, 0, 0, n); m = w; }
#endif
        if (m == P10_64[prec]) { m = P10_64[prec - 1]; e++; }
        while (m % 10 == 0) { m /= 10; e++; }
        best.sig = x < 0 ? -(int64_t)m : (int64_t)m;
        best.exp = e;
        if (dec_get_d(best) == x) break;
    }
    mpq_clears(q, t, p10, NULL);
    mpz_clear(n);
    *out = best;
    return AVOW_OK;
}

/* ------------------------------------------------------------------ double-double
 * Error-free transformations (Knuth, TAOCP vol. 2, 4.2.2, TwoSum; Dekker 1971,
 * Numer. Math. 18:224, FastTwoSum and the exact product, here with fma) and the
 * accurate double-double addition of Hida, Li & Bailey (2001), "Algorithms for
 * quad-double precision floating point arithmetic", ARITH-15. */

static avow_dd two_sum(double a, double b)
{
    double s = a + b, bb = s - a;
    avow_dd r = {s, (a - (s - bb)) + (b - bb)};
    return r;
}

static avow_dd quick_two_sum(double a, double b)
{
    double s = a + b;
    avow_dd r = {s, b - (s - a)};
    return r;
}

static avow_dd dd_add(avow_dd a, avow_dd b)
{
    avow_dd s = two_sum(a.hi, b.hi), t = two_sum(a.lo, b.lo);
    s.lo += t.hi;
    s = quick_two_sum(s.hi, s.lo);
    s.lo += t.lo;
    return quick_two_sum(s.hi, s.lo);
}

static avow_dd dd_sqr(avow_dd a)
{
    double p = a.hi * a.hi;
    double e = fma(a.hi, a.hi, -p);
    e += 2.0 * a.hi * a.lo;
    return quick_two_sum(p, e);
}

/* The rational q as hi + lo: hi correctly rounded, lo the correctly rounded rest. */
static avow_dd dd_from_mpq(const mpq_t q)
{
    avow_dd r = {dec_mpq_get_d(q), 0.0};
    if (!isfinite(r.hi)) return r;
    mpq_t t;
    mpq_init(t);
    mpq_set_d(t, r.hi);
    mpq_sub(t, q, t);
    r.lo = dec_mpq_get_d(t);
    mpq_clear(t);
    return r;
}

static int dd_finite(avow_dd a) { return isfinite(a.hi) && isfinite(a.lo); }

/* ------------------------------------------------------------------ accumulator */

void dec_acc_init(avow_acc *a)
{
    memset(a, 0, sizeof *a);
    a->exact = 1;
    a->scale = SCALE_NONE;
}

void dec_acc_clear(avow_acc *a)
{
    if (a->big) mpz_clears(a->bt, a->bs, a->bshift, a->btmp, NULL);
    dec_acc_init(a);
}

/* Make v the shift of the empty accumulator a (no value counted yet). */
static void acc_set_shift(avow_acc *a, avow_dec v)
{
    a->shift = v;
    a->min = a->max = v;
    a->have_shift_dd = 0;
    a->t = a->s = 0;
    a->dmin = a->dmax = 0;      /* the shift is always among the values seen */
    if (v.sig != 0) {
        a->any_nonzero = 1;
        a->scale = -v.exp;
        a->exp_hi = v.exp;
        a->shift_u = v.sig;
    } else {
        a->any_nonzero = 0;
        a->scale = SCALE_NONE;
        a->exp_hi = 0;
        a->shift_u = 0;
    }
}

/* Update min and max with v by exact comparison. */
static void acc_minmax(avow_acc *a, avow_dec v)
{
    if (v.exp == a->min.exp ? v.sig < a->min.sig : dec_cmp(v, a->min) < 0) a->min = v;
    else if (v.exp == a->max.exp ? v.sig > a->max.sig : dec_cmp(v, a->max) > 0) a->max = v;
}

/* The same for an exact value whose deviation d lies outside [dmin, dmax] (in 128-bit
 * mode). Invariant: dmin and dmax bound the deviations of the exact values, and the
 * shift (deviation 0) is among the values, so an exact value with d in [dmin, dmax] lies
 * within [min, max]. */
__attribute__((noinline)) static void acc_minmax_dev(avow_acc *a, avow_dec v, i128 d)
{
    if (d < a->dmin) a->dmin = d;
    if (d > a->dmax) a->dmax = d;
    acc_minmax(a, v);
}

/* out = x * 10^k in 128 bits; 0 on overflow. */
static int mul_p10_i128(i128 x, int64_t k, i128 *out)
{
    if (x == 0) { *out = 0; return 1; }
    if (k < 0 || k > 38) return 0;
    return !__builtin_mul_overflow(x, P10_128[k], out);
}

static void acc_promote(avow_acc *a)
{
    mpz_inits(a->bt, a->bs, a->bshift, a->btmp, NULL);
    mpz_set_i128(a->bt, a->t);
    mpz_set_i128(a->bs, a->s);
    mpz_set_i128(a->bshift, a->shift_u);
    a->big = 1;
}

/* Increase the scale by k > 0: T x10^k, S x10^2k, shift x10^k, exactly. */
static void acc_rescale(avow_acc *a, int64_t k)
{
    if (!a->big) {
        i128 t, s, c, lo, hi;
        if (mul_p10_i128(a->t, k, &t) && mul_p10_i128(a->s, 2 * k, &s) &&
            mul_p10_i128(a->shift_u, k, &c) && mul_p10_i128(a->dmin, k, &lo) &&
            mul_p10_i128(a->dmax, k, &hi)) {
            a->t = t; a->s = s; a->shift_u = c; a->dmin = lo; a->dmax = hi;
            a->scale = (int32_t)(a->scale + k);
            return;
        }
        acc_promote(a);
    }
    mpz_mul_p10(a->bt, (unsigned long)k);
    mpz_mul_p10(a->bs, 2 * (unsigned long)k);
    mpz_mul_p10(a->bshift, (unsigned long)k);
    a->scale = (int32_t)(a->scale + k);
}

/* Add the deviation of v (v.exp >= -scale or v zero) in 128 bits; 0 when something
 * would overflow (nothing changed). */
static int acc_dev_i128(avow_acc *a, avow_dec v, i128 *dev)
{
    i128 vu = 0, d, t, sq, s;
    if (v.sig != 0 && !mul_p10_i128(v.sig, (int64_t)v.exp + a->scale, &vu)) return 0;
    if (__builtin_sub_overflow(vu, a->shift_u, &d)) return 0;
    if (__builtin_add_overflow(a->t, d, &t)) return 0;
    if (__builtin_mul_overflow(d, d, &sq)) return 0;
    if (__builtin_add_overflow(a->s, sq, &s)) return 0;
    a->t = t;
    a->s = s;
    *dev = d;
    return 1;
}

static void acc_dev_big(avow_acc *a, avow_dec v)
{
    mpz_set_i128(a->btmp, (i128)v.sig);
    if (v.sig != 0) mpz_mul_p10(a->btmp, (unsigned long)((int64_t)v.exp + a->scale));
    mpz_sub(a->btmp, a->btmp, a->bshift);
    mpz_add(a->bt, a->bt, a->btmp);
    mpz_addmul(a->bs, a->btmp, a->btmp);
}

/* Add the double-double deviation d of the value whose exact decimal (or stand-in) is
 * v to the inexact part. */
static int acc_dd_commit(avow_acc *a, avow_dd d, avow_dec v)
{
    if (!dd_finite(d)) return AVOW_EOVERFLOW;
    avow_dd t = dd_add(a->dt, d), s = dd_add(a->ds, dd_sqr(d));
    if (!dd_finite(t) || !dd_finite(s)) return AVOW_EOVERFLOW;
    a->dt = t;
    a->ds = s;
    if (a->n == 0) { a->min = a->max = v; }
    else acc_minmax(a, v);
    a->n++;
    a->n_inexact++;
    a->exact = 0;
    return AVOW_OK;
}

/* An exact value outside the exact spread: its exact deviation, rounded to
 * double-double. */
static int acc_add_far(avow_acc *a, avow_dec v)
{
    mpq_t q, c;
    mpq_inits(q, c, NULL);
    dec_to_mpq(v, q);
    dec_to_mpq(a->shift, c);
    mpq_sub(q, q, c);
    avow_dd d = dd_from_mpq(q);
    mpq_clears(q, c, NULL);
    return acc_dd_commit(a, d, v);
}

__attribute__((noinline)) static int acc_add_slow(avow_acc *a, avow_dec v)
{
    if (v.sig != 0 && (v.exp > 2 * AVOW_DEC_EXP_LIMIT || v.exp < -2 * AVOW_DEC_EXP_LIMIT))
        return AVOW_EDOM;
    if (a->n == 0) {
        acc_set_shift(a, v);
        a->n = 1;
        return AVOW_OK;
    }
    if (v.sig != 0) {
        if (!a->any_nonzero) {
            /* shift and every value so far are zero: T = S = 0 at any scale */
            a->any_nonzero = 1;
            a->scale = -v.exp;
            a->exp_hi = v.exp;
        } else {
            int64_t lo = -(int64_t)a->scale, hi = a->exp_hi;
            if (v.exp < lo) lo = v.exp;
            if (v.exp > hi) hi = v.exp;
            if (hi - lo > AVOW_DEC_MAX_SPAN) return acc_add_far(a, v);
            if (v.exp < -(int64_t)a->scale) acc_rescale(a, -(int64_t)v.exp - a->scale);
            if (v.exp > a->exp_hi) a->exp_hi = v.exp;
        }
    } else if (!a->any_nonzero) {
        /* zero minus a zero shift */
        a->n++;
        acc_minmax(a, v);
        return AVOW_OK;
    }
    i128 d;
    if (!a->big && acc_dev_i128(a, v, &d)) {
        a->n++;
        acc_minmax_dev(a, v, d);
        return AVOW_OK;
    }
    if (!a->big) acc_promote(a);
    acc_dev_big(a, v);
    a->n++;
    acc_minmax(a, v);
    return AVOW_OK;
}

int dec_acc_add(avow_acc *a, avow_dec v)
{
    /* Hot path: same or coarser scale (k <= 19 keeps |sig| 10^k < 2^127), 128-bit
     * arithmetic, deviation within 64 bits so that its square is one multiply. */
    uint64_t k = (uint64_t)((int64_t)v.exp + a->scale);
    if (k <= 19 && a->n != 0 && !a->big) {
        i128 vu = (i128)v.sig * (i128)P10_64[k], d, t, s;
        if (!__builtin_sub_overflow(vu, a->shift_u, &d) && d >= INT64_MIN && d <= INT64_MAX &&
            !__builtin_add_overflow(a->t, d, &t)) {
            int64_t d64 = (int64_t)d;
            if (!__builtin_add_overflow(a->s, (i128)d64 * d64, &s)) {
                a->t = t;
                a->s = s;
                a->n++;
                if (v.exp > a->exp_hi && v.sig != 0) a->exp_hi = v.exp;
                if (d64 < a->dmin || d64 > a->dmax) acc_minmax_dev(a, v, d64);
                return AVOW_OK;
            }
        }
    }
    return acc_add_slow(a, v);
}

int dec_acc_add_double(avow_acc *a, double v)
{
    if (!isfinite(v)) return AVOW_EDOM;
    avow_dec dv;
    dec_from_double(v, &dv);
    if (a->n == 0) acc_set_shift(a, dv);
    if (!a->have_shift_dd) {
        mpq_t c;
        mpq_init(c);
        dec_to_mpq(a->shift, c);
        a->shift_dd = dd_from_mpq(c);
        mpq_clear(c);
        a->have_shift_dd = 1;
    }
    /* d = v - (shift.hi + shift.lo) */
    avow_dd d = two_sum(v, -a->shift_dd.hi);
    d.lo -= a->shift_dd.lo;
    d = quick_two_sum(d.hi, d.lo);
    return acc_dd_commit(a, d, dv);
}

uint64_t dec_acc_n(const avow_acc *a) { return a->n; }
int dec_acc_is_exact(const avow_acc *a) { return a->exact; }

int dec_acc_min(const avow_acc *a, avow_dec *out)
{
    if (a->n == 0) return AVOW_EDOM;
    *out = a->min;
    return AVOW_OK;
}

int dec_acc_max(const avow_acc *a, avow_dec *out)
{
    if (a->n == 0) return AVOW_EDOM;
    *out = a->max;
    return AVOW_OK;
}

/* T and S of the whole cell in real units: exact part plus the double-double part. */
static void acc_sums(const avow_acc *a, mpq_t t, mpq_t s)
{
    mpq_set_ui(t, 0, 1);
    mpq_set_ui(s, 0, 1);
    if (a->any_nonzero) {
        if (a->big) {
            mpz_set(mpq_numref(t), a->bt);
            mpz_set(mpq_numref(s), a->bs);
        } else {
            mpz_set_i128(mpq_numref(t), a->t);
            mpz_set_i128(mpq_numref(s), a->s);
        }
        if (a->scale >= 0) {
            mpz_mul_p10(mpq_denref(t), (unsigned long)a->scale);
            mpz_mul_p10(mpq_denref(s), 2 * (unsigned long)a->scale);
        } else {
            mpz_mul_p10(mpq_numref(t), (unsigned long)(-(long)a->scale));
            mpz_mul_p10(mpq_numref(s), 2 * (unsigned long)(-(long)a->scale));
        }
        mpq_canonicalize(t);
        mpq_canonicalize(s);
    }
    if (a->n_inexact) {
        mpq_t x;
        mpq_init(x);
        mpq_set_d(x, a->dt.hi); mpq_add(t, t, x);
        mpq_set_d(x, a->dt.lo); mpq_add(t, t, x);
        mpq_set_d(x, a->ds.hi); mpq_add(s, s, x);
        mpq_set_d(x, a->ds.lo); mpq_add(s, s, x);
        mpq_clear(x);
    }
}

/* total = n c + T, mean = total / n (if n > 0), ss = S - T^2 / n clamped at 0. Any
 * output may be NULL. */
static void acc_results(const avow_acc *a, mpq_t total, mpq_t mean, mpq_t ss)
{
    mpq_t t, s, c, nq;
    mpq_inits(t, s, c, nq, NULL);
    if (a->n != 0) {
        acc_sums(a, t, s);
        dec_to_mpq(a->shift, c);
        mpz_set_u64(mpq_numref(nq), a->n);
    }
    if (total || mean) {
        mpq_t tot;
        mpq_init(tot);
        mpq_mul(tot, c, nq);
        mpq_add(tot, tot, t);
        if (mean && a->n != 0) mpq_div(mean, tot, nq);
        if (total) mpq_set(total, tot);
        mpq_clear(tot);
    }
    if (ss) {
        mpq_set_ui(ss, 0, 1);
        if (a->n != 0) {
            mpq_mul(ss, t, t);
            mpq_div(ss, ss, nq);
            mpq_sub(ss, s, ss);
            if (mpq_sgn(ss) < 0) mpq_set_ui(ss, 0, 1);
        }
    }
    mpq_clears(t, s, c, nq, NULL);
}

int dec_acc_total(const avow_acc *a, mpq_t out)
{
    acc_results(a, out, NULL, NULL);
    return AVOW_OK;
}

int dec_acc_mean(const avow_acc *a, mpq_t out)
{
    if (a->n == 0) return AVOW_EDOM;
    acc_results(a, NULL, out, NULL);
    return AVOW_OK;
}

int dec_acc_ss(const avow_acc *a, mpq_t out)
{
    acc_results(a, NULL, NULL, out);
    return AVOW_OK;
}

/* Run an exact result function and round it once. */
static int acc_result_d(const avow_acc *a, int (*f)(const avow_acc *, mpq_t), double *out)
{
    mpq_t q;
    mpq_init(q);
    int rc = f(a, q);
    if (rc == AVOW_OK) *out = dec_mpq_get_d(q);
    mpq_clear(q);
    return rc;
}

int dec_acc_total_d(const avow_acc *a, double *out) { return acc_result_d(a, dec_acc_total, out); }
int dec_acc_mean_d(const avow_acc *a, double *out) { return acc_result_d(a, dec_acc_mean, out); }
int dec_acc_ss_d(const avow_acc *a, double *out) { return acc_result_d(a, dec_acc_ss, out); }

/* ------------------------------------------------------------------ one-way */

int dec_oneway(const avow_acc *cells, size_t k, avow_oneway *out)
{
    uint64_t n = 0;
    size_t used = 0;
    int exact = 1;
    for (size_t i = 0; i < k; i++) {
        if (cells[i].n == 0) continue;
        if (__builtin_add_overflow(n, cells[i].n, &n)) return AVOW_EOVERFLOW;
        used++;
        exact &= cells[i].exact;
    }
    if (n == 0) return AVOW_EDOM;

    mpq_t total, ss, x, nq;
    mpq_inits(total, ss, x, nq, NULL);
    mpq_inits(out->q_grand_mean, out->q_ss_between, out->q_ss_within, out->q_ss_total, NULL);

    /* pass 1: grand total and SSW = sum SS_i */
    for (size_t i = 0; i < k; i++) {
        if (cells[i].n == 0) continue;
        acc_results(&cells[i], x, NULL, ss);
        mpq_add(total, total, x);
        mpq_add(out->q_ss_within, out->q_ss_within, ss);
    }
    mpz_set_u64(mpq_numref(nq), n);
    mpq_div(out->q_grand_mean, total, nq);

    /* pass 2: SSB = sum n_i (ybar_i - ybar)^2, every term >= 0 */
    for (size_t i = 0; i < k; i++) {
        if (cells[i].n == 0) continue;
        acc_results(&cells[i], NULL, x, NULL);
        mpq_sub(x, x, out->q_grand_mean);
        mpq_mul(x, x, x);
        mpz_set_u64(mpq_numref(nq), cells[i].n);
        mpq_mul(x, x, nq);
        mpq_add(out->q_ss_between, out->q_ss_between, x);
    }
    mpq_add(out->q_ss_total, out->q_ss_between, out->q_ss_within);

    out->n = n;
    out->k = used;
    out->exact = exact;
    out->grand_mean = dec_mpq_get_d(out->q_grand_mean);
    out->ss_between = dec_mpq_get_d(out->q_ss_between);
    out->ss_within = dec_mpq_get_d(out->q_ss_within);
    out->ss_total = dec_mpq_get_d(out->q_ss_total);
    mpq_clears(total, ss, x, nq, NULL);
    return AVOW_OK;
}

void dec_oneway_clear(avow_oneway *o)
{
    mpq_clears(o->q_grand_mean, o->q_ss_between, o->q_ss_within, o->q_ss_total, NULL);
}

/* Exact decimal text of v: plain digits while the number needs at most 6 zeros of
 * padding, scientific notation (d.ddde+N) beyond. */
void dec_format(avow_dec v, char *out, size_t size)
{
    char digits[24], buf[96];
    int neg = v.sig < 0;
    unsigned long long m = neg ? (unsigned long long)(-(v.sig + 1)) + 1 : (unsigned long long)v.sig;
    int nd = snprintf(digits, sizeof digits, "%llu", m);
    long e = v.exp;
    size_t n = 0;
    if (neg) buf[n++] = '-';
    if (v.sig == 0) {
        buf[n++] = '0';
    } else if (e >= 0 && e <= 6) {
        memcpy(buf + n, digits, (size_t)nd); n += (size_t)nd;
        for (long z = 0; z < e; z++) buf[n++] = '0';
    } else if (e < 0 && -e < nd) {
        memcpy(buf + n, digits, (size_t)(nd + e)); n += (size_t)(nd + e);
        buf[n++] = '.';
        memcpy(buf + n, digits + nd + e, (size_t)-e); n += (size_t)-e;
    } else if (e < 0 && -e - nd <= 6) {
        buf[n++] = '0'; buf[n++] = '.';
        for (long z = 0; z < -e - nd; z++) buf[n++] = '0';
        memcpy(buf + n, digits, (size_t)nd); n += (size_t)nd;
    } else {
        buf[n++] = digits[0];
        if (nd > 1) { buf[n++] = '.'; memcpy(buf + n, digits + 1, (size_t)nd - 1); n += (size_t)nd - 1; }
        n += (size_t)snprintf(buf + n, sizeof buf - n, "e%+ld", e + nd - 1);
    }
    buf[n] = 0;
    snprintf(out, size, "%s", buf);
}
