/* rational.c: exact rationals over int64 with 128-bit intermediates, exact decimal
 * conversion, correctly rounded conversion to binary64, and exact orthogonal-polynomial
 * contrasts. No operation ever returns a rounded or wrapped result: anything that does
 * not fit is reported as AVOW_EOVERFLOW. */
#include "avow/rational.h"

#include <assert.h>
#include <inttypes.h>
#include <math.h>
#include <stdio.h>

#include <openssl/bn.h>

#include "avow/util.h"

__extension__ typedef __int128 i128;
__extension__ typedef unsigned __int128 u128;

/* Products of two int64 magnitudes stay below 2^126, sums of two such below 2^127:
 * every intermediate below fits i128 without wrapping. */

static u128 u128_abs(i128 v) { return v < 0 ? (u128)0 - (u128)v : (u128)v; }

static u128 u128_gcd(u128 a, u128 b)
{
    while (b) {
        u128 t = a % b;
        a = b;
        b = t;
    }
    return a;
}

static uint64_t u64_gcd(uint64_t a, uint64_t b)
{
    while (b) {
        uint64_t t = a % b;
        a = b;
        b = t;
    }
    return a;
}

/* n/d reduced into *out; d != 0, neither operand is the most negative i128. */
static int rat_norm(i128 n, i128 d, avow_rat *out)
{
    if (d == 0) return AVOW_EDOM;
    int neg = (n < 0) != (d < 0);
    u128 un = u128_abs(n), ud = u128_abs(d);
    if (un == 0) { *out = RAT_ZERO; return AVOW_OK; }
    u128 g = u128_gcd(un, ud);
    un /= g;
    ud /= g;
    if (un > (u128)INT64_MAX || ud > (u128)INT64_MAX) return AVOW_EOVERFLOW;
    out->num = neg ? -(int64_t)un : (int64_t)un;
    out->den = (int64_t)ud;
    return AVOW_OK;
}

int rat_make(int64_t num, int64_t den, avow_rat *out)
{
    return rat_norm(num, den, out);
}

avow_rat rat_int(int64_t v)
{
    assert(v != INT64_MIN);
    return (avow_rat){v, 1};
}

int rat_add(avow_rat a, avow_rat b, avow_rat *out)
{
    return rat_norm((i128)a.num * b.den + (i128)b.num * a.den, (i128)a.den * b.den, out);
}

int rat_sub(avow_rat a, avow_rat b, avow_rat *out)
{
    return rat_norm((i128)a.num * b.den - (i128)b.num * a.den, (i128)a.den * b.den, out);
}

int rat_mul(avow_rat a, avow_rat b, avow_rat *out)
{
    return rat_norm((i128)a.num * b.num, (i128)a.den * b.den, out);
}

int rat_div(avow_rat a, avow_rat b, avow_rat *out)
{
    if (b.num == 0) return AVOW_EDOM;
    return rat_norm((i128)a.num * b.den, (i128)a.den * b.num, out);
}

avow_rat rat_neg(avow_rat a)
{
    return (avow_rat){-a.num, a.den};
}

int rat_cmp(avow_rat a, avow_rat b)
{
    i128 l = (i128)a.num * b.den, r = (i128)b.num * a.den;
    return (l > r) - (l < r);
}

int rat_is_zero(avow_rat a) { return a.num == 0; }

int rat_is_int(avow_rat a) { return a.den == 1; }

int rat_sign(avow_rat a) { return (a.num > 0) - (a.num < 0); }

static int u128_bits(u128 v)
{
    int b = 0;
    while (v) { v >>= 1; b++; }
    return b;
}

/* Exact integer method, valid for every normalised value:
 * with N = |num| < 2^63 and D = den < 2^63 of bit lengths ln and ld, shifting N left by
 * s = 64 + ld - ln (2 <= s <= 126, and N << s < 2^(64 + ld) <= 2^127) gives a quotient
 * Q = floor(N * 2^s / D) in (2^63, 2^65) and a sticky bit for the non-zero remainder.
 * Q carries 11 or 12 bits beyond the 53 of the result, so rounding Q to 53 bits with
 * the sticky bit breaking ties is round-to-nearest-even of N/D itself. The rounded
 * mantissa (< 2^54) converts to double exactly, and ldexp scales by a power of two
 * into the normal range (the magnitude lies in [2^-63, 2^63]), which is also exact. */
double rat_to_double(avow_rat a)
{
    if (a.num == 0) return 0.0;
    u128 n = u128_abs(a.num), d = (u128)a.den;
    int s = 64 + u128_bits(d) - u128_bits(n);
    u128 scaled = n << s;
    u128 q = scaled / d;
    int sticky = scaled % d != 0;
    int shift = u128_bits(q) - 53;
    u128 low = q & (((u128)1 << shift) - 1);
    u128 half = (u128)1 << (shift - 1);
    uint64_t mant = (uint64_t)(q >> shift);
    if (low > half || (low == half && (sticky || (mant & 1)))) mant++;
    double r = ldexp((double)mant, shift - s);
    return a.num < 0 ? -r : r;
}

/* Largest significant-digit count of a decimal that can still be an avow_rat: a value
 * M * 10^-e (M not a multiple of 10) reduces by at most 5^e or 2^e, and its denominator
 * 2^e * 5^(e-b) or 5^e * 2^(e-a) fits only for e <= 62, so M < 2^63 * 5^62 < 10^63. */
enum { DEC_MAX_DIGITS = 63, DEC_MAX_NEG_EXP = 62, DEC_MAX_POS_EXP = 18 };

static int is_digit(char c) { return c >= '0' && c <= '9'; }

/* Divide the decimal digit string d[0..n) by a small divisor in place; returns the
 * new length (leading zeros dropped). */
static int digits_div_small(unsigned char *d, int n, unsigned div)
{
    unsigned rem = 0;
    int out = 0;
    for (int i = 0; i < n; i++) {
        unsigned cur = rem * 10 + d[i];
        unsigned qd = cur / div;
        rem = cur % div;
        if (out > 0 || qd != 0) d[out++] = (unsigned char)qd;
    }
    return out;
}

/* p^k when it fits int64 (p is 2 or 5), else 0. */
static u128 small_pow(unsigned p, int k)
{
    u128 r = 1;
    for (int i = 0; i < k; i++) {
        r *= p;
        if (r > (u128)INT64_MAX) return 0;
    }
    return r;
}

/* Digit k of the mantissa: the ni integer digits at s, then the fraction digits at
 * s + frac_start. */
static char dec_digit(const char *s, size_t ni, size_t frac_start, size_t k)
{
    return k < ni ? s[k] : s[frac_start + (k - ni)];
}

int rat_from_decimal(const char *s, size_t len, avow_rat *out)
{
    /* A literal longer than 2^60 bytes cannot be addressed; the bound keeps the
     * exponent arithmetic below within int64. */
    if ((uint64_t)len > (UINT64_C(1) << 60)) return AVOW_EOVERFLOW;
    size_t i = 0, int_end, frac_start, frac_end;
    while (i < len && is_digit(s[i])) i++;
    int_end = i;
    if (int_end == 0) return AVOW_ESYNTAX;
    frac_start = frac_end = i;
    if (i < len && s[i] == '.') {
        frac_start = ++i;
        while (i < len && is_digit(s[i])) i++;
        frac_end = i;
        if (frac_end == frac_start) return AVOW_ESYNTAX;
    }
    const int64_t exp_cap = INT64_C(1) << 61;
    int64_t exp = 0;
    if (i < len && (s[i] == 'e' || s[i] == 'E')) {
        i++;
        int neg = 0;
        if (i < len && (s[i] == '+' || s[i] == '-')) neg = s[i++] == '-';
        size_t exp_start = i;
        for (; i < len && is_digit(s[i]); i++) {
            int dv = s[i] - '0';
            exp = exp <= (exp_cap - 9) / 10 ? exp * 10 + dv : exp_cap;
        }
        if (i == exp_start) return AVOW_ESYNTAX;
        if (neg) exp = -exp;
    }
    if (i != len) return AVOW_ESYNTAX;

    size_t ni = int_end, total = ni + (frac_end - frac_start);
    size_t first = 0;
    while (first < total && dec_digit(s, ni, frac_start, first) == '0') first++;
    if (first == total) { *out = RAT_ZERO; return AVOW_OK; }
    size_t last = total;
    while (dec_digit(s, ni, frac_start, last - 1) == '0') last--;
    size_t nsig = last - first;
    /* value = (significant digits) * 10^e10 */
    int64_t e10 = exp - (int64_t)(frac_end - frac_start) + (int64_t)(total - last);
    if (nsig > DEC_MAX_DIGITS || e10 > DEC_MAX_POS_EXP || e10 < -DEC_MAX_NEG_EXP)
        return AVOW_EOVERFLOW;
    unsigned char dig[DEC_MAX_DIGITS];
    int nd = (int)nsig;
    for (int k = 0; k < nd; k++)
        dig[k] = (unsigned char)(dec_digit(s, ni, frac_start, first + (size_t)k) - '0');

    u128 den = 1;
    if (e10 < 0) {
        /* The mantissa is not a multiple of 10, so it shares only 2s or only 5s with
         * 10^e; divide them out as far as the denominator allows. */
        int e = (int)-e10, twos = e, fives = e;
        while (dig[nd - 1] % 2 == 0 && twos > 0) {
            nd = digits_div_small(dig, nd, 2);
            twos--;
        }
        while (dig[nd - 1] == 5 && fives > 0) {
            nd = digits_div_small(dig, nd, 5);
            fives--;
        }
        u128 p2 = small_pow(2, twos), p5 = small_pow(5, fives);
        if (!p2 || !p5 || p2 > (u128)INT64_MAX / p5) return AVOW_EOVERFLOW;
        den = p2 * p5;
    }
    if (nd > 19) return AVOW_EOVERFLOW;
    u128 num = 0;
    for (int k = 0; k < nd; k++) num = num * 10 + dig[k];
    for (int64_t k = 0; k < e10; k++) num *= 10;
    if (num > (u128)INT64_MAX) return AVOW_EOVERFLOW;
    out->num = (int64_t)num;
    out->den = (int64_t)den;
    return AVOW_OK;
}

int rat_format(avow_rat a, char *buf, size_t size)
{
    if (a.den == 1) return snprintf(buf, size, "%" PRId64, a.num);
    return snprintf(buf, size, "%" PRId64 "/%" PRId64, a.num, a.den);
}

/* Every scaled entry is (num_i / G) * (L / den_i) with L the lcm of the denominators:
 * a non-zero entry needs L / den_i <= INT64_MAX, so L itself stays below 2^126 and any
 * larger running lcm already means overflow. */
int rat_vec_integer_scale(avow_rat *v, size_t n)
{
    const u128 lcm_cap = (u128)1 << 126;
    u128 l = 1;
    uint64_t g = 0;
    for (size_t i = 0; i < n; i++) {
        if (v[i].num == 0) continue;
        u128 d = (u128)v[i].den;
        u128 step = l / u128_gcd(l, d);
        if (step > lcm_cap / d) return AVOW_EOVERFLOW;
        l = step * d;
        g = u64_gcd(g, (uint64_t)u128_abs(v[i].num));
    }
    if (g == 0) return AVOW_OK;
    for (size_t i = 0; i < n; i++) {
        if (v[i].num == 0) continue;
        u128 f = l / (u128)v[i].den;
        if (f > (u128)INT64_MAX) return AVOW_EOVERFLOW;
        u128 m = (u128_abs(v[i].num) / g) * f;
        if (m > (u128)INT64_MAX) return AVOW_EOVERFLOW;
    }
    for (size_t i = 0; i < n; i++) {
        if (v[i].num == 0) continue;
        int64_t m = (int64_t)((u128_abs(v[i].num) / g) * (l / (u128)v[i].den));
        v[i] = (avow_rat){v[i].num < 0 ? -m : m, 1};
    }
    return AVOW_OK;
}

int rat_vec_weighted_dot(const avow_rat *v, const avow_rat *w, const avow_rat *n,
                         size_t len, avow_rat *out)
{
    avow_rat sum = RAT_ZERO, t;
    int rc;
    for (size_t i = 0; i < len; i++) {
        if (rat_sign(n[i]) <= 0) return AVOW_EDOM;
        if ((rc = rat_mul(v[i], w[i], &t)) || (rc = rat_div(t, n[i], &t))
            || (rc = rat_add(sum, t, &sum)))
            return rc;
    }
    *out = sum;
    return AVOW_OK;
}

/* a * b as a reduced fraction of i128 (cross-cancelling first keeps it exact). */
static void rat_mul_wide(avow_rat a, avow_rat b, i128 *num, i128 *den)
{
    int64_t g1 = (int64_t)u64_gcd((uint64_t)u128_abs(a.num), (uint64_t)b.den);
    int64_t g2 = (int64_t)u64_gcd((uint64_t)u128_abs(b.num), (uint64_t)a.den);
    *num = (i128)(a.num / g1) * (b.num / g2);
    *den = (i128)(a.den / g2) * (b.den / g1);
    if (*num == 0) *den = 1;
}

int rat_vec_proportional(const avow_rat *v, const avow_rat *w, size_t n)
{
    size_t j = 0;
    while (j < n && w[j].num == 0) j++;
    if (j == n || v[j].num == 0) return 0;
    for (size_t i = 0; i < n; i++) {
        i128 ln, ld, rn, rd;
        rat_mul_wide(v[i], w[j], &ln, &ld);
        rat_mul_wide(w[i], v[j], &rn, &rd);
        if (ln != rn || ld != rd) return 0;
    }
    return 1;
}

/* ---- orthogonal-polynomial contrasts ----
 * The lower-degree polynomials and their inner products can be far larger than the
 * final coprime coefficients, so the construction runs on arbitrary-precision integers
 * (OpenSSL's BIGNUM, already a dependency of libavow) and only the result has to fit
 * int64. Every BN_ call below fails only when memory runs out. */

static BIGNUM *bn_from_i64(BIGNUM *r, int64_t v)
{
    unsigned char be[8];
    uint64_t m = (uint64_t)u128_abs(v);
    for (int i = 7; i >= 0; i--, m >>= 8) be[i] = (unsigned char)(m & 0xff);
    if (!BN_bin2bn(be, 8, r)) return NULL;
    BN_set_negative(r, v < 0);
    return r;
}

/* AVOW_EOVERFLOW when |v| >= 2^63. */
static int bn_to_i64(const BIGNUM *v, int64_t *out)
{
    unsigned char be[8];
    if (BN_num_bits(v) > 63 || BN_bn2binpad(v, be, 8) != 8) return AVOW_EOVERFLOW;
    uint64_t m = 0;
    for (int i = 0; i < 8; i++) m = m << 8 | be[i];
    *out = BN_is_negative(v) ? -(int64_t)m : (int64_t)m;
    return AVOW_OK;
}

/* Divide the integer vector v by the gcd of its entries (g is scratch; the vector is
 * not all zero). */
static int bn_vec_reduce(BIGNUM **v, size_t k, BIGNUM *g, BN_CTX *ctx)
{
    BN_zero(g);
    for (size_t i = 0; i < k; i++)
        if (!BN_gcd(g, g, v[i], ctx)) return 0;
    for (size_t i = 0; i < k; i++)
        if (!BN_div(v[i], NULL, v[i], g, ctx)) return 0;
    return 1;
}

/* out = sum_i w_i p_i q_i; tmp is scratch. */
static int bn_inner(BIGNUM *out, BIGNUM *const *p, BIGNUM *const *q, BIGNUM *const *w,
                    size_t k, BIGNUM *tmp, BN_CTX *ctx)
{
    BN_zero(out);
    for (size_t i = 0; i < k; i++)
        if (!BN_mul(tmp, p[i], q[i], ctx) || !BN_mul(tmp, tmp, w[i], ctx)
            || !BN_add(out, out, tmp))
            return 0;
    return 1;
}

/* Integer images of the rationals v: v_i * lcm(denominators), into out. */
static int bn_vec_from_rats(BIGNUM **out, const avow_rat *v, size_t k, BIGNUM *l,
                            BIGNUM *tmp, BN_CTX *ctx)
{
    if (!BN_one(l)) return 0;
    for (size_t i = 0; i < k; i++) {
        if (!bn_from_i64(tmp, v[i].den) || !BN_gcd(out[i], l, tmp, ctx)
            || !BN_div(out[i], NULL, l, out[i], ctx) || !BN_mul(l, out[i], tmp, ctx))
            return 0;
    }
    for (size_t i = 0; i < k; i++) {
        if (!bn_from_i64(tmp, v[i].den) || !BN_div(out[i], NULL, l, tmp, ctx)
            || !bn_from_i64(tmp, v[i].num) || !BN_mul(out[i], out[i], tmp, ctx))
            return 0;
    }
    return 1;
}

/* Fraction-free construction of the contrast into the int64 vector c. Method: Robson,
 * D. S. (1959), "A simple method for constructing orthogonal polynomials when the
 * independent variable is unequally spaced", Biometrics 15:187-191: Gram-Schmidt on
 * 1, x, x^2, ... under <p,q> = sum n_i p(x_i) q(x_i), carried out exactly.
 * - Weights and levels are replaced by integer multiples W = n * Ln and X = x * Lx
 *   (Ln, Lx > 0); a positive factor on every weight leaves orthogonality unchanged, and
 *   an increasing affine map of x leaves the orthogonal family and the signs of the
 *   leading coefficients unchanged.
 * - Polynomials are held by their values at the k levels. p_0 = 1 and p_1 = t, where
 *   t = X * sum(W) - sum(W X), i.e. x centred on its weighted mean.
 * - Step j orthogonalises t * p_{j-1} (which spans, with p_0..p_{j-1}, the same space
 *   as 1, x, ..., x^j) against p_{j-1} and p_{j-2} only: for m < j - 2,
 *   <t p_{j-1}, p_m> = <p_{j-1}, t p_m> = 0 because t p_m has degree below j - 1, so
 *   the other projections of Gram-Schmidt are exactly zero. With A = <p_{j-1},p_{j-1}>,
 *   B = <p_{j-2},p_{j-2}>, a = <t p_{j-1}, p_{j-1}>, b = <t p_{j-1}, p_{j-2}>:
 *   p_j = A B (t p_{j-1}) - a B p_{j-1} - b A p_{j-2}, a multiple of the projection by
 *   A B > 0, divided by the gcd of its entries (also > 0). The leading coefficient
 *   therefore stays positive.
 * - c = W * p_degree, divided by the gcd of its entries. */
static int trend_bn(const avow_rat *x, const avow_rat *n, size_t k, int degree,
                    BIGNUM **slots, BN_CTX *ctx, int64_t *c)
{
    BIGNUM **w = slots, **t = slots + k, **prev = slots + 2 * k, **cur = slots + 3 * k,
           **next = slots + 4 * k, **s = slots + 5 * k;
    BIGNUM *sw = s[0], *swx = s[1], *ca = s[2], *cb = s[3], *ga = s[4], *gb = s[5],
           *tmp = s[6], *tmp2 = s[7];
    if (!bn_vec_from_rats(w, n, k, tmp, tmp2, ctx) || !bn_vec_from_rats(t, x, k, tmp, tmp2, ctx))
        return AVOW_ENOMEM;
    BN_zero(sw);
    BN_zero(swx);
    for (size_t i = 0; i < k; i++)
        if (!BN_add(sw, sw, w[i]) || !BN_mul(tmp, w[i], t[i], ctx) || !BN_add(swx, swx, tmp))
            return AVOW_ENOMEM;
    for (size_t i = 0; i < k; i++)
        if (!BN_mul(t[i], t[i], sw, ctx) || !BN_sub(t[i], t[i], swx) || !BN_one(prev[i])
            || !BN_copy(cur[i], t[i]))
            return AVOW_ENOMEM;
    if (!bn_vec_reduce(t, k, tmp, ctx) || !bn_vec_reduce(cur, k, tmp, ctx)) return AVOW_ENOMEM;
    for (int j = 2; j <= degree; j++) {
        for (size_t i = 0; i < k; i++)
            if (!BN_mul(next[i], t[i], cur[i], ctx)) return AVOW_ENOMEM;
        if (!bn_inner(ga, cur, cur, w, k, tmp, ctx) || !bn_inner(gb, prev, prev, w, k, tmp, ctx)
            || !bn_inner(ca, next, cur, w, k, tmp, ctx)
            || !bn_inner(cb, next, prev, w, k, tmp, ctx))
            return AVOW_ENOMEM;
        /* ca := a B, cb := b A, ga := A B */
        if (!BN_mul(ca, ca, gb, ctx) || !BN_mul(cb, cb, ga, ctx) || !BN_mul(ga, ga, gb, ctx))
            return AVOW_ENOMEM;
        for (size_t i = 0; i < k; i++)
            if (!BN_mul(next[i], next[i], ga, ctx) || !BN_mul(tmp, ca, cur[i], ctx)
                || !BN_sub(next[i], next[i], tmp) || !BN_mul(tmp, cb, prev[i], ctx)
                || !BN_sub(next[i], next[i], tmp))
                return AVOW_ENOMEM;
        if (!bn_vec_reduce(next, k, tmp, ctx)) return AVOW_ENOMEM;
        BIGNUM **old = prev;
        prev = cur;
        cur = next;
        next = old;
    }
    for (size_t i = 0; i < k; i++)
        if (!BN_mul(next[i], w[i], cur[i], ctx)) return AVOW_ENOMEM;
    if (!bn_vec_reduce(next, k, tmp, ctx)) return AVOW_ENOMEM;
    for (size_t i = 0; i < k; i++)
        if (bn_to_i64(next[i], &c[i])) return AVOW_EOVERFLOW;
    return AVOW_OK;
}

enum { TREND_VECTORS = 5, TREND_SCALARS = 8 };

int rat_trend(const avow_rat *x, const avow_rat *n, size_t k, int degree, avow_rat *c)
{
    if (k < 2 || degree < 1 || (size_t)degree >= k) return AVOW_EDOM;
    for (size_t i = 0; i < k; i++) {
        if (rat_sign(n[i]) <= 0) return AVOW_EDOM;
        for (size_t j = 0; j < i; j++)
            if (rat_cmp(x[i], x[j]) == 0) return AVOW_EDOM;
    }
    size_t nslots = TREND_VECTORS * k + TREND_SCALARS;
    BIGNUM **slots = avow_malloc(nslots * sizeof *slots);
    int64_t *res = avow_malloc(k * sizeof *res);
    BN_CTX *ctx = BN_CTX_new();
    int rc = AVOW_ENOMEM;
    if (slots && res && ctx) {
        BN_CTX_start(ctx);
        size_t got = 0;
        while (got < nslots && (slots[got] = BN_CTX_get(ctx)) != NULL) got++;
        if (got == nslots) rc = trend_bn(x, n, k, degree, slots, ctx, res);
        BN_CTX_end(ctx);
    }
    if (rc == AVOW_OK)
        for (size_t i = 0; i < k; i++) c[i] = (avow_rat){res[i], 1};
    BN_CTX_free(ctx);
    avow_free(res);
    avow_free(slots);
    return rc;
}
