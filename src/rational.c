/* rational.c: exact rationals over int64 with 128-bit intermediates, exact decimal
 * conversion, correctly rounded conversion to binary64, and exact orthogonal-polynomial
 * contrasts. No operation ever returns a rounded or wrapped result: anything that does
 * not fit is reported as AVOW_EOVERFLOW. Whenever a function returns an error, its
 * outputs (*out, the vector, c) are left unchanged. */
#include "avow/rational.h"

#include <assert.h>
#include <inttypes.h>
#include <math.h>
#include <stdio.h>

#include <gmp.h>

#include "avow/util.h"

__extension__ typedef __int128 i128;
__extension__ typedef unsigned __int128 u128;

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

/* Products of two int64 magnitudes stay below 2^126 and sums of two such below 2^127,
 * so the operands handed to rat_norm never wrap. */
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

/* a * b as a reduced fraction of i128 (cross-cancelling first keeps it exact). */
static void rat_mul_wide(avow_rat a, avow_rat b, i128 *num, i128 *den)
{
    int64_t g1 = (int64_t)u64_gcd((uint64_t)u128_abs(a.num), (uint64_t)b.den);
    int64_t g2 = (int64_t)u64_gcd((uint64_t)u128_abs(b.num), (uint64_t)a.den);
    *num = (i128)(a.num / g1) * (b.num / g2);
    *den = (i128)(a.den / g2) * (b.den / g1);
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

/* ---- sums whose intermediates may exceed 128 bits ----
 * Partial sums of a dot product, and the lower-degree polynomials and inner products
 * behind a trend contrast, can be far larger than the final values. These run on GMP
 * integers and fractions, so only the result has to fit int64. GMP allocates with its
 * own allocator and aborts when memory is exhausted (as in decimal.c). */

static void big_set_i64(mpz_t z, int64_t v)
{
    uint64_t m = (uint64_t)u128_abs(v);
    mpz_import(z, 1, 1, sizeof m, 0, 0, &m);
    if (v < 0) mpz_neg(z, z);
}

/* AVOW_EOVERFLOW when |z| >= 2^63. */
static int big_get_i64(const mpz_t z, int64_t *out)
{
    if (mpz_sizeinbase(z, 2) > 63) return AVOW_EOVERFLOW;
    uint64_t m = 0;
    mpz_export(&m, NULL, 1, sizeof m, 0, 0, z);
    *out = mpz_sgn(z) < 0 ? -(int64_t)m : (int64_t)m;
    return AVOW_OK;
}

int rat_vec_weighted_dot(const avow_rat *v, const avow_rat *w, const avow_rat *n,
                         size_t len, avow_rat *out)
{
    for (size_t i = 0; i < len; i++)
        if (rat_sign(n[i]) <= 0) return AVOW_EDOM;
    mpq_t sum, term;
    mpz_t f;
    mpq_inits(sum, term, NULL);
    mpz_init(f);
    for (size_t i = 0; i < len; i++) {
        /* v w / n = (v.num w.num n.den) / (v.den w.den n.num), n.num > 0 */
        big_set_i64(mpq_numref(term), v[i].num);
        big_set_i64(f, w[i].num);
        mpz_mul(mpq_numref(term), mpq_numref(term), f);
        big_set_i64(f, n[i].den);
        mpz_mul(mpq_numref(term), mpq_numref(term), f);
        big_set_i64(mpq_denref(term), v[i].den);
        big_set_i64(f, w[i].den);
        mpz_mul(mpq_denref(term), mpq_denref(term), f);
        big_set_i64(f, n[i].num);
        mpz_mul(mpq_denref(term), mpq_denref(term), f);
        mpq_canonicalize(term);
        mpq_add(sum, sum, term);
    }
    int64_t num, den;
    int rc = AVOW_EOVERFLOW;
    if (!big_get_i64(mpq_numref(sum), &num) && !big_get_i64(mpq_denref(sum), &den)) {
        *out = (avow_rat){num, den};
        rc = AVOW_OK;
    }
    mpq_clears(sum, term, NULL);
    mpz_clear(f);
    return rc;
}

/* Divide the integer vector v by the gcd of its entries (the vector is not all zero). */
static void big_vec_reduce(mpz_t *v, size_t k, mpz_t g)
{
    mpz_set_ui(g, 0);
    for (size_t i = 0; i < k; i++) mpz_gcd(g, g, v[i]);
    for (size_t i = 0; i < k; i++) mpz_divexact(v[i], v[i], g);
}

/* out = sum_i w_i p_i q_i */
static void big_inner(mpz_t out, mpz_t *p, mpz_t *q, mpz_t *w, size_t k, mpz_t tmp)
{
    mpz_set_ui(out, 0);
    for (size_t i = 0; i < k; i++) {
        mpz_mul(tmp, p[i], q[i]);
        mpz_addmul(out, tmp, w[i]);
    }
}

/* Integer images of the rationals v: v_i * lcm(denominators), into out. */
static void big_vec_from_rats(mpz_t *out, const avow_rat *v, size_t k, mpz_t l, mpz_t tmp)
{
    mpz_set_ui(l, 1);
    for (size_t i = 0; i < k; i++) {
        big_set_i64(tmp, v[i].den);
        mpz_lcm(l, l, tmp);
    }
    for (size_t i = 0; i < k; i++) {
        big_set_i64(tmp, v[i].den);
        mpz_divexact(out[i], l, tmp);
        big_set_i64(tmp, v[i].num);
        mpz_mul(out[i], out[i], tmp);
    }
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
static int trend_big(const avow_rat *x, const avow_rat *n, size_t k, int degree,
                     mpz_t *slots, int64_t *c)
{
    mpz_t *w = slots, *t = slots + k, *prev = slots + 2 * k, *cur = slots + 3 * k,
          *next = slots + 4 * k, *s = slots + 5 * k;
    mpz_ptr sw = s[0], swx = s[1], ca = s[2], cb = s[3], ga = s[4], gb = s[5], tmp = s[6],
            tmp2 = s[7];
    big_vec_from_rats(w, n, k, tmp, tmp2);
    big_vec_from_rats(t, x, k, tmp, tmp2);
    mpz_set_ui(sw, 0);
    mpz_set_ui(swx, 0);
    for (size_t i = 0; i < k; i++) {
        mpz_add(sw, sw, w[i]);
        mpz_addmul(swx, w[i], t[i]);
    }
    for (size_t i = 0; i < k; i++) {
        mpz_mul(t[i], t[i], sw);
        mpz_sub(t[i], t[i], swx);
    }
    big_vec_reduce(t, k, tmp);
    for (size_t i = 0; i < k; i++) {
        mpz_set_ui(prev[i], 1);
        mpz_set(cur[i], t[i]);
    }
    for (int j = 2; j <= degree; j++) {
        for (size_t i = 0; i < k; i++) mpz_mul(next[i], t[i], cur[i]);
        big_inner(ga, cur, cur, w, k, tmp);
        big_inner(gb, prev, prev, w, k, tmp);
        big_inner(ca, next, cur, w, k, tmp);
        big_inner(cb, next, prev, w, k, tmp);
        /* ca := a B, cb := b A, ga := A B */
        mpz_mul(ca, ca, gb);
        mpz_mul(cb, cb, ga);
        mpz_mul(ga, ga, gb);
        for (size_t i = 0; i < k; i++) {
            mpz_mul(next[i], next[i], ga);
            mpz_submul(next[i], ca, cur[i]);
            mpz_submul(next[i], cb, prev[i]);
        }
        big_vec_reduce(next, k, tmp);
        mpz_t *old = prev;
        prev = cur;
        cur = next;
        next = old;
    }
    for (size_t i = 0; i < k; i++) mpz_mul(next[i], w[i], cur[i]);
    big_vec_reduce(next, k, tmp);
    for (size_t i = 0; i < k; i++)
        if (big_get_i64(next[i], &c[i])) return AVOW_EOVERFLOW;
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
    mpz_t *slots = avow_malloc(nslots * sizeof *slots);
    int64_t *res = avow_malloc(k * sizeof *res);
    int rc = AVOW_ENOMEM;
    if (slots && res) {
        for (size_t i = 0; i < nslots; i++) mpz_init(slots[i]);
        rc = trend_big(x, n, k, degree, slots, res);
        for (size_t i = 0; i < nslots; i++) mpz_clear(slots[i]);
    }
    if (rc == AVOW_OK)
        for (size_t i = 0; i < k; i++) c[i] = (avow_rat){res[i], 1};
    avow_free(res);
    avow_free(slots);
    return rc;
}
