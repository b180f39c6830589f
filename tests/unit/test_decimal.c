/* test_decimal.c: exact decimal parsing, comparison and rounding; the exact per-cell
 * accumulator (128-bit path, rescaling, the switch to GMP, the double-double part); the
 * exact one-way sums of squares, checked against NIST StRD certified values and against
 * exact rationals computed with Python 3.11 fractions.
 *
 * The Python references were produced by scripts of this form (Python 3.11.7):
 *
 *   from fractions import Fraction as F
 *   def stats(vals):                      # total, mean, sum of squared deviations
 *       n = len(vals); t = sum(vals); m = t / n
 *       return t, m, sum((v - m) ** 2 for v in vals), min(vals), max(vals)
 *   def anova(groups):                    # grand mean, SS between, SS within
 *       N = sum(map(len, groups)); gm = sum(map(sum, groups)) / N
 *       means = [sum(g) / len(g) for g in groups]
 *       return (gm, sum(len(g) * (m - gm) ** 2 for g, m in zip(groups, means)),
 *               sum(sum((v - m) ** 2 for v in g) for g, m in zip(groups, means)))
 *
 * with the data given beside each check. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <fcntl.h>
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "avow/csv.h"
#include "avow/decimal.h"
#include "avow/util.h"

/* ---- helpers ---- */

static avow_dec D(int64_t sig, int32_t exp)
{
    avow_dec d = {sig, exp};
    return d;
}

static avow_dec P(const char *s)
{
    avow_dec d = {0, 0};
    int rc = dec_parse(s, strlen(s), &d);
    if (rc != AVOW_OK) fail_msg("dec_parse(\"%s\") = %d", s, rc);
    return d;
}

/* got == the rational "num/den" exactly */
static void expect_q(const mpq_t got, const char *ref)
{
    mpq_t r;
    mpq_init(r);
    assert_int_equal(mpq_set_str(r, ref, 10), 0);
    mpq_canonicalize(r);
    if (!mpq_equal(got, r)) {
        char *g = mpq_get_str(NULL, 10, got);
        print_error("got %s, expected %s\n", g, ref);
        free(g);
        mpq_clear(r);
        fail();
    }
    mpq_clear(r);
}

static void expect_rel(double got, double ref, double tol)
{
    double err = ref == 0 ? fabs(got) : fabs(got - ref) / fabs(ref);
    if (!(err <= tol)) fail_msg("got %.17g, expected %.17g (relative error %.3g > %.3g)",
                                got, ref, err, tol);
}

static void add_all(avow_acc *a, const char *const *vals, size_t n)
{
    for (size_t i = 0; i < n; i++) assert_int_equal(dec_acc_add(a, P(vals[i])), AVOW_OK);
}

/* total, mean and ss of a cell equal the given rationals; the double versions equal
 * their correct rounding */
static void expect_cell(const avow_acc *a, const char *total, const char *mean,
                        const char *ss)
{
    mpq_t q;
    mpq_init(q);
    double d;
    assert_int_equal(dec_acc_total(a, q), AVOW_OK);
    expect_q(q, total);
    assert_int_equal(dec_acc_total_d(a, &d), AVOW_OK);
    assert_true(d == dec_mpq_get_d(q));
    assert_int_equal(dec_acc_mean(a, q), AVOW_OK);
    expect_q(q, mean);
    assert_int_equal(dec_acc_mean_d(a, &d), AVOW_OK);
    assert_true(d == dec_mpq_get_d(q));
    assert_int_equal(dec_acc_ss(a, q), AVOW_OK);
    expect_q(q, ss);
    assert_int_equal(dec_acc_ss_d(a, &d), AVOW_OK);
    assert_true(d == dec_mpq_get_d(q));
    mpq_clear(q);
}

/* ---- parsing ---- */

static void test_parse_valid(void **state)
{
    (void)state;
    static const struct { const char *s; int64_t sig; int32_t exp; } cases[] = {
        {"0", 0, 0}, {"-0", 0, 0}, {"+0.000", 0, 0}, {"0e999999999999", 0, 0},
        {"00.00e-5", 0, 0},
        {"1", 1, 0}, {"+1", 1, 0}, {"-1", -1, 0}, {"10", 1, 1}, {"1200", 12, 2},
        {"1.5", 15, -1}, {"-1.50", -15, -1}, {"1.0", 1, 0}, {"1.000000", 1, 0},
        {".5", 5, -1}, {"-.25", -25, -2}, {"5.", 5, 0}, {"+5.e2", 5, 2},
        {"1e3", 1, 3}, {"1E3", 1, 3}, {"1e+3", 1, 3}, {"1e-3", 1, -3}, {"2.5E-02", 25, -3},
        {"1.2e+3", 12, 2}, {"0.000123", 123, -6}, {"000123.4500", 12345, -2},
        {"1000000000000.4", 10000000000004, -1}, {"196.3052", 1963052, -4},
        {"123456789012345678", INT64_C(123456789012345678), 0},
        {"-999999999999999999", -INT64_C(999999999999999999), 0},
        {"12345678901234567800", INT64_C(123456789012345678), 2},
        {"100000000000000000000000", 1, 23},
        {"0.000000000000000000000000001", 1, -27},
        {"1.000000000000000000000000", 1, 0},
        {"0000000000000000000000000000000000042", 42, 0},
        {"1.2345678901234567800000000", INT64_C(123456789012345678), -17},
        {"1e00000000000000000000000000007", 1, 7},
        {"1e100000", 1, 100000}, {"1e-100000", 1, -100000},
        {"0.1e-99999", 1, -100000}, {"10e99999", 1, 100000},
        {"123456789012345678e99983", INT64_C(123456789012345678), 99983},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        avow_dec d = {77, 77};
        int rc = dec_parse(cases[i].s, strlen(cases[i].s), &d);
        if (rc != AVOW_OK || d.sig != cases[i].sig || d.exp != cases[i].exp)
            fail_msg("\"%s\": rc %d, {%lld, %d}, expected {%lld, %d}", cases[i].s, rc,
                     (long long)d.sig, d.exp, (long long)cases[i].sig, cases[i].exp);
    }
    /* len bounds the text: "12" of "123" */
    avow_dec d;
    assert_int_equal(dec_parse("123", 2, &d), AVOW_OK);
    assert_true(d.sig == 12 && d.exp == 0);
}

static void test_parse_syntax(void **state)
{
    (void)state;
    static const char *const bad[] = {
        "", "+", "-", ".", "+.", "-.e1", "e5", ".e5", "1e", "1e+", "1e-", "1E", "--1", "+-1",
        "-+1", "inf", "-inf", "Infinity", "nan", "NaN", "0x1A", "0x10", "1 2", " 1", "1 ",
        "1,000", "1,5", "1.2.3", "1..2", "1e5.5", "1ee5", "1e5e5", "1_000", "1'000", "12a",
        "a12", "\xd9\xa1", ("\xe2\x88\x92" "1"), "1e 5", "1 e5", "+ 1", "1e--5", "1.5%",
        "$1", "1/2", "(1)", "1d5", "1f", "0b101",
    };
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        avow_dec d = {77, 77};
        int rc = dec_parse(bad[i], strlen(bad[i]), &d);
        if (rc != AVOW_ESYNTAX) fail_msg("\"%s\": rc %d, expected AVOW_ESYNTAX", bad[i], rc);
        assert_true(d.sig == 77 && d.exp == 77);     /* untouched */
    }
    /* an embedded NUL byte */
    avow_dec d;
    assert_int_equal(dec_parse("1\0" "2", 3, &d), AVOW_ESYNTAX);
    assert_int_equal(dec_parse("12\0", 3, &d), AVOW_ESYNTAX);
}

static void test_parse_overflow(void **state)
{
    (void)state;
    static const char *const over[] = {
        "1234567890123456789",               /* 19 significant digits */
        "-1234567890123456789",
        "1.234567890123456789",
        "0.0001234567890123456789",
        "10000000000000000001",
        "9223372036854775807",               /* INT64_MAX: 19 digits */
        "1e99999999999", "1e-99999999999", "-1e99999999999999999999999999",
        "1e2147483648", "1e-2147483649", "1e100001", "1e-100001",
        "123e-100002",                       /* stored exponent -100002 */
    };
    for (size_t i = 0; i < sizeof over / sizeof over[0]; i++) {
        avow_dec d = {77, 77};
        int rc = dec_parse(over[i], strlen(over[i]), &d);
        if (rc != AVOW_EOVERFLOW) fail_msg("\"%s\": rc %d, expected AVOW_EOVERFLOW", over[i], rc);
        assert_true(d.sig == 77 && d.exp == 77);
    }
    /* a fraction with a million zeros before the digit: exponent out of range */
    size_t n = 1000003;
    char *s = malloc(n + 1);
    assert_non_null(s);
    s[0] = '0'; s[1] = '.';
    memset(s + 2, '0', n - 3);
    s[n - 1] = '7';
    s[n] = 0;
    avow_dec d;
    assert_int_equal(dec_parse(s, n, &d), AVOW_EOVERFLOW);
    /* the same number of trailing zeros after a digit: exact, value 7 * 10^-1 */
    s[2] = '7';
    s[n - 1] = '0';
    s[0] = '0';
    assert_int_equal(dec_parse(s, n, &d), AVOW_OK);
    assert_true(d.sig == 7 && d.exp == -1);
    free(s);
}

/* Exact value of a decimal string by an independent route: digits into a GMP integer,
 * divided by 10^(fraction digits), times 10^exponent. */
static int ref_value(const char *s, mpq_t out, int *sigdigits)
{
    char digits[256];
    size_t nd = 0, frac = 0;
    int neg = 0, point = 0;
    long e = 0;
    const char *p = s;
    if (*p == '-' || *p == '+') neg = *p++ == '-';
    for (; *p; p++) {
        if (*p == '.') { point = 1; continue; }
        if (*p == 'e' || *p == 'E') { e = strtol(p + 1, NULL, 10); break; }
        digits[nd++] = *p;
        if (point) frac++;
    }
    digits[nd] = 0;
    /* significant digits: strip leading and trailing zeros */
    size_t a = 0, b = nd;
    while (a < b && digits[a] == '0') a++;
    while (b > a && digits[b - 1] == '0') b--;
    *sigdigits = (int)(b - a);
    mpz_set_str(mpq_numref(out), nd ? digits : "0", 10);
    mpz_ui_pow_ui(mpq_denref(out), 10, frac);
    mpq_canonicalize(out);
    mpq_t t;
    mpq_init(t);
    mpz_ui_pow_ui(mpq_numref(t), 10, (unsigned long)labs(e));
    if (e < 0) mpq_div(out, out, t); else mpq_mul(out, out, t);
    if (neg) mpq_neg(out, out);
    mpq_clear(t);
    return 0;
}

/* Pseudo-random decimal strings of many shapes: the parse equals the exact value and is
 * normalised; more than 18 significant digits is exactly the overflow case. */
static void test_parse_random(void **state)
{
    (void)state;
    uint64_t x = 88172645463325252u;
    mpq_t ref, got;
    mpq_inits(ref, got, NULL);
    for (int iter = 0; iter < 200000; iter++) {
        x ^= x << 13; x ^= x >> 7; x ^= x << 17;
        char s[80];
        size_t n = 0;
        uint64_t r = x;
        if (r % 4 == 0) s[n++] = '-';
        else if (r % 4 == 1) s[n++] = '+';
        r /= 4;
        int ni = (int)(r % 22); r /= 22;
        int nf = (int)(r % 22); r /= 22;
        int haspoint = nf > 0 || r % 3 == 0; r /= 3;
        if (ni == 0 && nf == 0) ni = 1;
        uint64_t y = x * 0x9E3779B97F4A7C15u;
        for (int i = 0; i < ni; i++) {
            /* many zeros, to exercise leading and trailing zeros */
            s[n++] = (char)((y % 3 == 0) ? '0' : '0' + (y >> 8) % 10);
            y = y * 6364136223846793005u + 1442695040888963407u;
        }
        if (haspoint) s[n++] = '.';
        for (int i = 0; i < nf; i++) {
            s[n++] = (char)((y % 3 == 0) ? '0' : '0' + (y >> 8) % 10);
            y = y * 6364136223846793005u + 1442695040888963407u;
        }
        if (r % 4 == 0) n += (size_t)sprintf(s + n, "e%d", (int)(y % 41) - 20);
        s[n] = 0;
        int sd;
        ref_value(s, ref, &sd);
        avow_dec d;
        int rc = dec_parse(s, n, &d);
        if (sd > 18) {
            if (rc != AVOW_EOVERFLOW) fail_msg("\"%s\": rc %d, expected overflow", s, rc);
            continue;
        }
        if (rc != AVOW_OK) fail_msg("\"%s\": rc %d", s, rc);
        dec_to_mpq(d, got);
        if (!mpq_equal(got, ref)) fail_msg("\"%s\": {%lld, %d} is not its value", s,
                                           (long long)d.sig, d.exp);
        assert_true(d.sig % 10 != 0 || (d.sig == 0 && d.exp == 0));
    }
    mpq_clears(ref, got, NULL);
}

/* ---- comparison and conversion ---- */

static void test_cmp(void **state)
{
    (void)state;
    static const struct { avow_dec a, b; int c; } cases[] = {
        {{0, 0}, {0, 5}, 0}, {{1, 0}, {10, -1}, 0}, {{1, 0}, {1, 0}, 0},
        {{15, -1}, {2, 0}, -1}, {{-15, -1}, {-2, 0}, 1}, {{-1, 0}, {0, 0}, -1},
        {{0, 0}, {-1, -99999}, 1}, {{1, -99999}, {0, 0}, 1}, {{1, 99999}, {9, 99998}, 1},
        {{INT64_MAX, 0}, {INT64_MAX, 1}, -1}, {{INT64_MIN, 0}, {INT64_MAX, 0}, -1},
        {{INT64_MIN, 20}, {-1, 38}, -1},         /* -9.2e38 < -1e38 */
        {{INT64_MAX, -18}, {1, 0}, 1},           /* 9.22 > 1 */
        {{INT64_MAX, -30}, {9223372036854775807, -30}, 0},
        {{5, 2000000000}, {5, -2000000000}, 1}, {{-5, 2000000000}, {-5, -2000000000}, -1},
        {{12345, -2}, {123449, -3}, 1}, {{123449, -3}, {12345, -2}, -1},
        {{999999999999999999, -40}, {1, -22}, -1}, {{1000000000000000000, -40}, {1, -22}, 0},
        {{1, -22}, {1000000000000000001, -40}, -1},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        int c = dec_cmp(cases[i].a, cases[i].b);
        if (c != cases[i].c) fail_msg("case %zu: %d, expected %d", i, c, cases[i].c);
        assert_int_equal(dec_cmp(cases[i].b, cases[i].a), -cases[i].c);
    }
}

static void test_get_d(void **state)
{
    (void)state;
    /* glibc strtod rounds correctly: compare on many shapes, incl. subnormals */
    static const char *const strs[] = {
        "0.1", "-0.3", "1000000000000.4", "196.3052", "123456789012345678",
        "9007199254740993", "9007199254740995", "1e22", "1e23", "8.5e-323",
        "2.4703282292062328e-324", "2.4703282292062327e-324", "4.9406564584124654e-324",
        "2.2250738585072011e-308", "2.2250738585072012e-308", "1.7976931348623157e308",
        "1.7976931348623158e308", "1.7976931348623159e308", "1e309", "-1e400", "1e-400",
        "123456789012345678e-340", "7.2057594037927933e16", "0.000001", "3.14159265358979323",
    };
    for (size_t i = 0; i < sizeof strs / sizeof strs[0]; i++) {
        avow_dec d;
        int rc = dec_parse(strs[i], strlen(strs[i]), &d);
        assert_int_equal(rc, AVOW_OK);
        double ref = strtod(strs[i], NULL);
        double got = dec_get_d(d);
        if (memcmp(&got, &ref, sizeof got) != 0)
            fail_msg("\"%s\": %.17g, strtod %.17g", strs[i], got, ref);
    }
    assert_true(dec_get_d(D(0, 0)) == 0.0);
    assert_true(isinf(dec_get_d(D(1, 100000))) && dec_get_d(D(-1, 100000)) < 0);
    assert_true(dec_get_d(D(-1, -100000)) == 0.0);
}

static void test_mpq_get_d(void **state)
{
    (void)state;
    mpq_t q;
    mpq_init(q);
    /* ties go to even */
    mpq_set_str(q, "9007199254740993", 10);          /* 2^53 + 1 */
    assert_true(dec_mpq_get_d(q) == 9007199254740992.0);
    mpq_set_str(q, "9007199254740995", 10);          /* 2^53 + 3 */
    assert_true(dec_mpq_get_d(q) == 9007199254740996.0);
    mpq_set_str(q, "-9007199254740995", 10);
    assert_true(dec_mpq_get_d(q) == -9007199254740996.0);
    /* just above a tie goes up; mpq_get_d alone would truncate */
    mpq_set_str(q, "18014398509481985/2", 10);       /* 2^53 + 0.5 */
    assert_true(dec_mpq_get_d(q) == 9007199254740992.0);
    mpq_set_str(q, "18014398509481987/2", 10);       /* 2^53 + 1.5 */
    assert_true(dec_mpq_get_d(q) == 9007199254740994.0);
    mpq_set_str(q, "2/3", 10);
    assert_true(dec_mpq_get_d(q) == 2.0 / 3.0);
    mpq_set_str(q, "1/3", 10);
    assert_true(dec_mpq_get_d(q) == 1.0 / 3.0);
    /* the largest double and the overflow threshold 2^1024 - 2^970 */
    mpz_ui_pow_ui(mpq_numref(q), 2, 1024);
    mpz_set_ui(mpq_denref(q), 1);
    mpz_t t;
    mpz_init(t);
    mpz_ui_pow_ui(t, 2, 970);
    mpz_sub(mpq_numref(q), mpq_numref(q), t);
    assert_true(isinf(dec_mpq_get_d(q)));
    mpz_sub_ui(mpq_numref(q), mpq_numref(q), 1);
    assert_true(dec_mpq_get_d(q) == DBL_MAX);
    /* subnormals: 2^-1074 and ties around it */
    mpz_set_ui(mpq_numref(q), 1);
    mpz_ui_pow_ui(mpq_denref(q), 2, 1074);
    assert_true(dec_mpq_get_d(q) == 4.9406564584124654e-324);
    mpz_ui_pow_ui(mpq_denref(q), 2, 1075);           /* half of it: tie to even (0) */
    assert_true(dec_mpq_get_d(q) == 0.0);
    mpz_set_ui(mpq_numref(q), 3);                    /* 1.5 * 2^-1074: tie to 2 * 2^-1074 */
    mpz_ui_pow_ui(mpq_denref(q), 2, 1075);
    assert_true(dec_mpq_get_d(q) == 2 * 4.9406564584124654e-324);
    mpz_set_ui(mpq_numref(q), 1);                    /* just above half: rounds up */
    mpz_ui_pow_ui(mpq_denref(q), 2, 1075);
    mpz_sub_ui(mpq_denref(q), mpq_denref(q), 1);
    assert_true(dec_mpq_get_d(q) == 4.9406564584124654e-324);
    mpz_clear(t);
    /* agreement with strtod on decimal fractions */
    for (int i = 1; i < 2000; i += 7) {
        char s[64];
        snprintf(s, sizeof s, "%d.%03de-%d", i, (i * 37) % 1000, i % 330);
        avow_dec d = P(s);
        dec_to_mpq(d, q);
        double ref = strtod(s, NULL);
        assert_true(dec_mpq_get_d(q) == ref);
    }
    mpq_clear(q);
}

static void test_from_double(void **state)
{
    (void)state;
    avow_dec d;
    assert_int_equal(dec_from_double(0.1, &d), AVOW_OK);
    assert_true(d.sig == 1 && d.exp == -1);
    assert_int_equal(dec_from_double(-2.5, &d), AVOW_OK);
    assert_true(d.sig == -25 && d.exp == -1);
    assert_int_equal(dec_from_double(1e300, &d), AVOW_OK);
    assert_true(d.sig == 1 && d.exp == 300);
    assert_int_equal(dec_from_double(0.0, &d), AVOW_OK);
    assert_true(d.sig == 0 && d.exp == 0);
    assert_int_equal(dec_from_double(INFINITY, &d), AVOW_EDOM);
    assert_int_equal(dec_from_double(NAN, &d), AVOW_EDOM);
    const double xs[] = {1.0 / 3, -2.0 / 3, DBL_MAX, -DBL_MAX, DBL_MIN, 4.9406564584124654e-324,
                         1000000000000.4, 0.3, 123456.789, 9007199254740993.0, 5e-324 * 3};
    for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++) {
        assert_int_equal(dec_from_double(xs[i], &d), AVOW_OK);
        assert_true(dec_get_d(d) == xs[i]);
        assert_true(d.sig % 10 != 0);
        assert_true(d.sig < INT64_C(100000000000000000) && d.sig > -INT64_C(100000000000000000));
    }
}

/* ---- accumulator ---- */

static void test_acc_empty(void **state)
{
    (void)state;
    avow_acc a;
    dec_acc_init(&a);
    mpq_t q;
    mpq_init(q);
    double d;
    avow_dec m;
    assert_int_equal(dec_acc_n(&a), 0);
    assert_int_equal(dec_acc_is_exact(&a), 1);
    assert_int_equal(dec_acc_mean(&a, q), AVOW_EDOM);
    assert_int_equal(dec_acc_mean_d(&a, &d), AVOW_EDOM);
    assert_int_equal(dec_acc_min(&a, &m), AVOW_EDOM);
    assert_int_equal(dec_acc_max(&a, &m), AVOW_EDOM);
    assert_int_equal(dec_acc_total(&a, q), AVOW_OK);
    assert_int_equal(mpq_sgn(q), 0);
    assert_int_equal(dec_acc_ss(&a, q), AVOW_OK);
    assert_int_equal(mpq_sgn(q), 0);
    /* one value */
    assert_int_equal(dec_acc_add(&a, P("-3.25")), AVOW_OK);
    expect_cell(&a, "-13/4", "-13/4", "0");
    mpq_clear(q);
    dec_acc_clear(&a);
}

/* Zeros: a zero shift, then non-zero values; a cell of zeros only. */
static void test_acc_zeros(void **state)
{
    (void)state;
    avow_acc a;
    dec_acc_init(&a);
    static const char *const v[] = {"0", "-0", "0.000", "2.5", "0", "-1e-3", "7e4"};
    add_all(&a, v, sizeof v / sizeof v[0]);
    /* Python 3.11 fractions: stats([F(x) for x in v]) */
    expect_cell(&a, "70002499/1000", "10000357/1000", "2099975012678929/500000");
    avow_dec m;
    assert_int_equal(dec_acc_min(&a, &m), AVOW_OK);
    assert_true(m.sig == -1 && m.exp == -3);
    assert_int_equal(dec_acc_max(&a, &m), AVOW_OK);
    assert_true(m.sig == 7 && m.exp == 4);
    assert_int_equal(a.big, 0);
    dec_acc_clear(&a);

    dec_acc_init(&a);
    for (int i = 0; i < 5; i++) assert_int_equal(dec_acc_add(&a, D(0, 0)), AVOW_OK);
    expect_cell(&a, "0", "0", "0");
    dec_acc_clear(&a);
}

/* A value with more decimals than the current scale rescales T and S exactly. */
static void test_acc_rescale(void **state)
{
    (void)state;
    avow_acc a;
    dec_acc_init(&a);
    static const char *const v[] = {"1.5", "2.25", "3", "0.125", "-7.0001", "1e-3",
                                    "12345.6789", "-0", "5."};
    add_all(&a, v, sizeof v / sizeof v[0]);
    assert_int_equal(a.scale, 4);
    assert_int_equal(a.big, 0);
    assert_int_equal(a.exact, 1);
    /* Python 3.11 fractions: stats([F(x) for x in v]) */
    expect_cell(&a, "30876387/2500", "10292129/7500", "6773370536750433/50000000");
    avow_dec m;
    dec_acc_min(&a, &m);
    assert_true(m.sig == -70001 && m.exp == -4);
    dec_acc_max(&a, &m);
    assert_true(m.sig == 123456789 && m.exp == -4);
    dec_acc_clear(&a);
}

/* Values that are all multiples of a power of ten: deviations count 10^2 units. */
static void test_acc_negative_scale(void **state)
{
    (void)state;
    avow_acc a;
    dec_acc_init(&a);
    static const char *const v[] = {"1200", "3400", "5e3", "-7e2", "12e5"};
    add_all(&a, v, sizeof v / sizeof v[0]);
    assert_int_equal(a.scale, -2);
    /* Python 3.11 fractions: stats([F(x) for x in v]) */
    expect_cell(&a, "1208900", "241780", "1147750648000");
    dec_acc_clear(&a);
}

/* The exponent spread limit AVOW_DEC_MAX_SPAN, with the largest exponent raised on the
 * hot path. */
static void test_acc_span_limit(void **state)
{
    (void)state;
    avow_acc a;
    dec_acc_init(&a);
    assert_int_equal(dec_acc_add(&a, P("1.5")), AVOW_OK);
    assert_int_equal(dec_acc_add(&a, P("1e2")), AVOW_OK);    /* exponent 2 */
    assert_int_equal(a.exp_hi, 2);
    assert_int_equal(dec_acc_add(&a, D(3, -3998)), AVOW_OK); /* spread 4000: exact */
    assert_int_equal(a.exact, 1);
    assert_int_equal(a.scale, 3998);
    assert_int_equal(dec_acc_add(&a, D(3, -3999)), AVOW_OK); /* spread 4001 */
    assert_int_equal(a.exact, 0);
    assert_int_equal(a.n_inexact, 1);
    assert_int_equal(dec_acc_n(&a), 4);
    double d;
    assert_int_equal(dec_acc_total_d(&a, &d), AVOW_OK);
    expect_rel(d, 101.5, 1e-16);
    dec_acc_clear(&a);
}

/* Spread exponents and 18-digit significands overflow 128 bits: the cell moves to GMP
 * and stays exact. */
static void test_acc_gmp_switch(void **state)
{
    (void)state;
    avow_acc a;
    dec_acc_init(&a);
    static const char *const v[] = {"123456789012345678", "1e-18", "-987654321098765432e5",
                                    "5.5", "123456789012345678e-20", "999999999999999999e10",
                                    "-1"};
    add_all(&a, v, sizeof v / sizeof v[0]);
    assert_int_equal(a.big, 1);
    assert_int_equal(a.exact, 1);
    /* Python 3.11 fractions: stats([F(x) for x in v]) */
    expect_cell(&a,
                "499995061734567345123457284125061728394506172889/50000000000000000000",
                "71427865962081049303351040589294532627786596127/50000000000000000000",
                "107143209886553705074345818404088305610400416279257496420928881864394345"
                "691714187079499930760759/1250000000000000000000000000000000000000");
    avow_dec m;
    dec_acc_min(&a, &m);
    assert_true(m.sig == -INT64_C(987654321098765432) && m.exp == 5);
    dec_acc_max(&a, &m);
    assert_true(m.sig == INT64_C(999999999999999999) && m.exp == 10);
    dec_acc_clear(&a);
}

/* S overflows 2^127 by accumulation on the hot path (no rescaling). */
static void test_acc_sum_overflow(void **state)
{
    (void)state;
    avow_acc a;
    dec_acc_init(&a);
    assert_int_equal(dec_acc_add(&a, D(0, 0)), AVOW_OK);
    for (int i = 0; i < 1001; i++) {
        assert_int_equal(dec_acc_add(&a, D(i % 2 ? -INT64_C(999999999999999999)
                                                 : INT64_C(999999999999999999), 0)), AVOW_OK);
        if (i == 100) assert_int_equal(a.big, 0);   /* 101 * (1e18)^2 < 2^127 */
    }
    assert_int_equal(a.big, 1);
    /* Python 3.11 fractions: v = [F(0)] + [F(999999999999999999) * (-1) ** i
     * for i in range(1001)]; stats(v) */
    expect_cell(&a, "999999999999999999", "333333333333333333/334",
                "334333666666666665997999333333333333667667/334");
    dec_acc_clear(&a);
}

/* Pseudo-random values in many shapes (growing scale, exponents spread over 30 places,
 * significands up to 2^62 that force the GMP switch): total and ss equal the exact
 * reference computed by the test with plain GMP rational sums. */
static void test_acc_many_random(void **state)
{
    (void)state;
    avow_acc a;
    mpq_t sum, sum2, v, ref, got;
    mpq_inits(sum, sum2, v, ref, got, NULL);
    uint64_t x = 42;
    for (int trial = 0; trial < 40; trial++) {
        dec_acc_init(&a);
        mpq_set_ui(sum, 0, 1);
        mpq_set_ui(sum2, 0, 1);
        int n = 2000;
        for (int i = 0; i < n; i++) {
            x = x * 6364136223846793005u + 1442695040888963407u;
            /* the scale grows during the run; large trials spread exponents widely */
            int64_t sig = (int64_t)(x >> (trial % 8 == 7 ? 1 : 20)) - (int64_t)(x >> 21);
            int32_t exp = -(int32_t)((x >> 5) % (unsigned)(1 + trial % 12 + i / 400));
            if (trial % 5 == 4) exp += (int32_t)((x >> 9) % 30);
            avow_dec d = {sig, exp};
            assert_int_equal(dec_acc_add(&a, d), AVOW_OK);
            dec_to_mpq(d, v);
            mpq_add(sum, sum, v);
            mpq_mul(v, v, v);
            mpq_add(sum2, sum2, v);
        }
        /* ss = sum2 - sum^2 / n (exact) */
        mpq_mul(ref, sum, sum);
        mpq_set_ui(v, (unsigned long)n, 1);
        mpq_div(ref, ref, v);
        mpq_sub(ref, sum2, ref);
        assert_int_equal(dec_acc_ss(&a, got), AVOW_OK);
        assert_true(mpq_equal(got, ref));
        assert_int_equal(dec_acc_total(&a, got), AVOW_OK);
        assert_true(mpq_equal(got, sum));
        assert_int_equal(a.exact, 1);
        dec_acc_clear(&a);
    }
    mpq_clears(sum, sum2, v, ref, got, NULL);
}

/* Values that cannot be exact: doubles, and an exponent spread beyond the limit. */
static void test_acc_inexact(void **state)
{
    (void)state;
    avow_acc a;
    double d;
    dec_acc_init(&a);
    add_all(&a, (const char *const[]){"10.5", "11.25"}, 2);
    assert_int_equal(dec_acc_add_double(&a, 12.125), AVOW_OK);   /* exact binary value */
    assert_int_equal(a.exact, 0);
    assert_int_equal(dec_acc_is_exact(&a), 0);
    assert_int_equal(a.n_inexact, 1);
    assert_int_equal(dec_acc_n(&a), 3);
    /* 12.125 is a double exactly: the results are still the exact ones.
     * Python 3.11 fractions: stats([F("10.5"), F("11.25"), F("12.125")]) */
    expect_cell(&a, "271/8", "271/24", "127/96");
    assert_int_equal(dec_acc_add_double(&a, INFINITY), AVOW_EDOM);
    assert_int_equal(dec_acc_add_double(&a, NAN), AVOW_EDOM);
    assert_int_equal(dec_acc_n(&a), 3);
    dec_acc_clear(&a);

    /* a value read through binary64: 0.1 is 0.1000000000000000055511151231257827... */
    dec_acc_init(&a);
    assert_int_equal(dec_acc_add_double(&a, 0.1), AVOW_OK);   /* first value: the shift */
    assert_int_equal(dec_acc_add(&a, P("0.2")), AVOW_OK);
    assert_int_equal(dec_acc_add(&a, P("0.3")), AVOW_OK);
    avow_dec m;
    dec_acc_min(&a, &m);
    assert_true(m.sig == 1 && m.exp == -1);
    assert_int_equal(dec_acc_mean_d(&a, &d), AVOW_OK);
    expect_rel(d, 0.2, 1e-16);
    assert_int_equal(dec_acc_ss_d(&a, &d), AVOW_OK);
    expect_rel(d, 0.02, 1e-15);
    dec_acc_clear(&a);

    /* the shift 0.1 is no binary64 value: the double 0.1 differs from it by
     * 1/180143985094819840 (Python 3.11 fractions: F(0.1) - F("0.1")); the sum of
     * squares of {0.1, double 0.1} is half its square, 1.5407439555097887e-35 */
    dec_acc_init(&a);
    assert_int_equal(dec_acc_add(&a, P("0.1")), AVOW_OK);
    assert_int_equal(dec_acc_add_double(&a, 0.1), AVOW_OK);
    assert_int_equal(dec_acc_ss_d(&a, &d), AVOW_OK);
    expect_rel(d, 1.5407439555097887e-35, 1e-15);
    dec_acc_clear(&a);

    /* exponent spread beyond AVOW_DEC_MAX_SPAN: 1e-5000 next to 1 */
    dec_acc_init(&a);
    add_all(&a, (const char *const[]){"1", "3"}, 2);
    assert_int_equal(dec_acc_add(&a, D(1, -5000)), AVOW_OK);
    assert_int_equal(a.exact, 0);
    assert_int_equal(a.n_inexact, 1);
    assert_int_equal(dec_acc_add(&a, P("2")), AVOW_OK);     /* exact again, same cell */
    assert_int_equal(a.n_inexact, 1);
    dec_acc_min(&a, &m);
    assert_true(m.sig == 1 && m.exp == -5000);
    assert_int_equal(dec_acc_mean_d(&a, &d), AVOW_OK);
    expect_rel(d, 6.0 / 4, 1e-16);
    assert_int_equal(dec_acc_ss_d(&a, &d), AVOW_OK);
    expect_rel(d, 5.0, 1e-15);
    dec_acc_clear(&a);

    /* a deviation whose square overflows binary64 is refused, nothing changes */
    dec_acc_init(&a);
    assert_int_equal(dec_acc_add(&a, P("1")), AVOW_OK);
    assert_int_equal(dec_acc_add_double(&a, 1e200), AVOW_EOVERFLOW);
    assert_int_equal(dec_acc_add(&a, D(1, 5000)), AVOW_EOVERFLOW);
    assert_int_equal(dec_acc_n(&a), 1);
    assert_int_equal(dec_acc_max(&a, &m), AVOW_OK);
    assert_true(m.sig == 1 && m.exp == 0);
    /* exponents no parse can give are refused */
    assert_int_equal(dec_acc_add(&a, D(1, INT32_MIN)), AVOW_EDOM);
    assert_int_equal(dec_acc_add(&a, D(1, 2 * AVOW_DEC_EXP_LIMIT + 1)), AVOW_EDOM);
    assert_int_equal(dec_acc_n(&a), 1);
    dec_acc_clear(&a);
    dec_acc_init(&a);
    assert_int_equal(dec_acc_add(&a, D(-7, INT32_MAX)), AVOW_EDOM);
    assert_int_equal(dec_acc_n(&a), 0);
    dec_acc_clear(&a);
}

/* min and max are exact across representations, rescaling and the GMP switch */
static void test_acc_minmax(void **state)
{
    (void)state;
    avow_acc a;
    avow_dec m;
    dec_acc_init(&a);
    add_all(&a, (const char *const[]){"1.4", "1.0", "1.45", "-0.001", "1.450", "2", "-0.0011",
                                      "2.0000001"}, 8);
    dec_acc_min(&a, &m);
    assert_true(m.sig == -11 && m.exp == -4);
    dec_acc_max(&a, &m);
    assert_true(m.sig == 20000001 && m.exp == -7);
    /* the fast bounds on deviations, in units of 10^-7 from the shift 1.4 */
    assert_int_equal(a.scale, 7);
    assert_true(a.dmin == -14011000 && a.dmax == 6000001);
    /* the GMP switch keeps them */
    assert_int_equal(dec_acc_add(&a, D(INT64_C(999999999999999999), 30)), AVOW_OK);
    assert_int_equal(dec_acc_add(&a, D(-INT64_C(999999999999999999), -60)), AVOW_OK);
    assert_int_equal(a.big, 1);
    assert_int_equal(dec_acc_add(&a, D(-3, 0)), AVOW_OK);
    dec_acc_min(&a, &m);
    assert_true(m.sig == -3 && m.exp == 0);
    dec_acc_max(&a, &m);
    assert_true(m.sig == INT64_C(999999999999999999) && m.exp == 30);
    assert_int_equal(dec_acc_add_double(&a, -4.5), AVOW_OK);
    dec_acc_min(&a, &m);
    assert_true(m.sig == -45 && m.exp == -1);
    dec_acc_clear(&a);

    /* an inexact minimum, then exact values above it on the hot path */
    dec_acc_init(&a);
    add_all(&a, (const char *const[]){"5", "6"}, 2);
    assert_int_equal(dec_acc_add_double(&a, -1.0), AVOW_OK);
    add_all(&a, (const char *const[]){"4", "7", "-0.5"}, 3);
    dec_acc_min(&a, &m);
    assert_true(m.sig == -1 && m.exp == 0);
    dec_acc_max(&a, &m);
    assert_true(m.sig == 7 && m.exp == 0);
    dec_acc_clear(&a);
}

/* 13 constant leading digits, three cells, 60000 values with 1 to 3 decimals (trailing
 * zeros make the exponents vary). */
static void test_acc_thirteen_digits(void **state)
{
    (void)state;
    avow_acc cells[3];
    for (int i = 0; i < 3; i++) dec_acc_init(&cells[i]);
    uint64_t x = 12345;
    for (int k = 0; k < 60000; k++) {
        x = x * 6364136223846793005u + 1442695040888963407u;
        char s[40];
        int n = snprintf(s, sizeof s, "%lld.%03d", 1000000000000LL + k % 3,
                         (int)((x >> 33) % 1000));
        avow_dec d;
        assert_int_equal(dec_parse(s, (size_t)n, &d), AVOW_OK);
        assert_int_equal(dec_acc_add(&cells[k % 3], d), AVOW_OK);
    }
    avow_oneway o;
    assert_int_equal(dec_oneway(cells, 3, &o), AVOW_OK);
    /* Python 3.11 fractions: the same generator,
     *   x = (6364136223846793005 * x + 1442695040888963407) & (2**64 - 1)
     *   cells[k % 3].append(F("%d.%03d" % (10**12 + k % 3, (x >> 33) % 1000)))
     * then anova(cells) */
    expect_q(o.q_grand_mean, "12000000000018006877/12000000");
    expect_q(o.q_ss_between, "1196565128378683/30000000000");
    expect_q(o.q_ss_within, "100437478124803/20000000000");
    assert_true(o.ss_between == dec_mpq_get_d(o.q_ss_between));
    assert_true(o.ss_within == dec_mpq_get_d(o.q_ss_within));
    assert_true(o.exact == 1 && o.n == 60000 && o.k == 3);
    for (int i = 0; i < 3; i++) assert_int_equal(cells[i].big, 0);
    dec_oneway_clear(&o);
    for (int i = 0; i < 3; i++) dec_acc_clear(&cells[i]);
}

/* ---- one-way sums ---- */

/* NIST/SEMATECH e-Handbook of Statistical Methods, section 7.4.3.4, one-way ANOVA worked
 * by hand; exact values as recomputed in methods.md section 11 (and with Python 3.11
 * fractions): SST (between) = 20923/750, SSE (within) = 4363/250. */
static void test_oneway_handbook(void **state)
{
    (void)state;
    static const char *const g[3][5] = {{"6.9", "5.4", "5.8", "4.6", "4.0"},
                                        {"8.3", "6.8", "7.8", "9.2", "6.5"},
                                        {"8.0", "10.5", "8.1", "6.9", "9.3"}};
    avow_acc cells[4];
    for (int i = 0; i < 4; i++) dec_acc_init(&cells[i]);
    /* an empty cell in the middle is skipped */
    for (int i = 0; i < 3; i++) add_all(&cells[i == 2 ? 3 : i], g[i], 5);
    avow_oneway o;
    assert_int_equal(dec_oneway(cells, 4, &o), AVOW_OK);
    assert_true(o.n == 15 && o.k == 3 && o.exact == 1);
    expect_q(o.q_ss_between, "20923/750");
    expect_q(o.q_ss_within, "4363/250");
    expect_q(o.q_ss_total, "34012/750");
    expect_q(o.q_grand_mean, "1081/150");
    assert_true(o.ss_between == 20923.0 / 750);
    assert_true(o.ss_within == 4363.0 / 250);
    assert_true(o.grand_mean == 1081.0 / 150);
    assert_true(o.ss_total == dec_mpq_get_d(o.q_ss_total));
    dec_oneway_clear(&o);
    for (int i = 0; i < 4; i++) dec_acc_clear(&cells[i]);

    avow_acc none[2];
    dec_acc_init(&none[0]);
    dec_acc_init(&none[1]);
    assert_int_equal(dec_oneway(none, 2, &o), AVOW_EDOM);
    assert_int_equal(dec_oneway(none, 0, &o), AVOW_EDOM);
}

/* ---- NIST StRD ---- */

static FILE *open_nist(const char *name)
{
    char path[1024];
    const char *env = getenv("AVOW_NIST_DIR");
    if (env && *env) {
        snprintf(path, sizeof path, "%s/%s", env, name);
        return fopen(path, "rb");
    }
    snprintf(path, sizeof path, "tests/data/nist/%s", name);
    FILE *f = fopen(path, "rb");
    if (f) return f;
    /* relative to this source file: <dir>/../data/nist */
    const char *src = __FILE__, *slash = strrchr(src, '/');
    int dirlen = slash ? (int)(slash - src) : 1;
    snprintf(path, sizeof path, "%.*s/../data/nist/%s", dirlen, slash ? src : ".", name);
    return fopen(path, "rb");
}

/* Read a group,value file with the CSV reader into cells (labels in order of first
 * appearance). With thirteen != 0 the leading "1." of every value becomes
 * "1000000000000." (the NIST construction of SmLs07-09 from SmLs01-03). */
static size_t read_nist(const char *name, int thirteen, avow_acc *cells, size_t maxcells)
{
    FILE *f = open_nist(name);
    if (!f) fail_msg("cannot open %s: set AVOW_NIST_DIR or run from the repository root", name);
    csv_reader *r;
    assert_int_equal(csv_open_file(f, ',', &r), AVOW_OK);
    csv_record rec;
    assert_int_equal(csv_read_header(r, &rec), AVOW_OK);
    assert_int_equal(rec.nfields, 2);
    char labels[16][16];
    size_t k = 0;
    int rc;
    while ((rc = csv_next(r, &rec)) == 1) {
        assert_int_equal(rec.nfields, 2);
        const csv_field *g = &rec.fields[0], *v = &rec.fields[1];
        assert_true(g->len > 0 && g->len < 16);
        size_t i = 0;
        while (i < k && !(strlen(labels[i]) == g->len && memcmp(labels[i], g->ptr, g->len) == 0))
            i++;
        if (i == k) {
            assert_true(k < maxcells);
            memcpy(labels[k], g->ptr, g->len);
            labels[k][g->len] = 0;
            dec_acc_init(&cells[k++]);
        }
        char buf[64];
        const char *text = v->ptr;
        size_t len = v->len;
        if (thirteen) {
            assert_true(len > 2 && len < 40 && memcmp(v->ptr, "1.", 2) == 0);
            len = (size_t)snprintf(buf, sizeof buf, "1000000000000%.*s", (int)(len - 1), v->ptr + 1);
            text = buf;
        }
        avow_dec d;
        assert_int_equal(dec_parse(text, len, &d), AVOW_OK);
        assert_int_equal(dec_acc_add(&cells[i], d), AVOW_OK);
    }
    assert_int_equal(rc, 0);
    csv_close(r);
    fclose(f);
    return k;
}

static void check_nist(const char *name, int thirteen, size_t k_expected, uint64_t n_expected,
                       double ssb, double ssw, const char *qssb, const char *qssw)
{
    avow_acc cells[16];
    size_t k = read_nist(name, thirteen, cells, 16);
    assert_int_equal(k, k_expected);
    avow_oneway o;
    assert_int_equal(dec_oneway(cells, k, &o), AVOW_OK);
    assert_int_equal(o.n, n_expected);
    assert_int_equal(o.exact, 1);
    expect_rel(o.ss_between, ssb, 1e-14);
    expect_rel(o.ss_within, ssw, 1e-14);
    /* and exactly: Python 3.11 fractions on the same file */
    expect_q(o.q_ss_between, qssb);
    expect_q(o.q_ss_within, qssw);
    dec_oneway_clear(&o);
    for (size_t i = 0; i < k; i++) dec_acc_clear(&cells[i]);
}

/* Certified values: NIST StRD ANOVA, certified values (between/within SS). */
static void test_nist_sirstv(void **state)
{
    (void)state;
    check_nist("SiRstv.csv", 0, 5, 25, 5.11462616000000E-02, 2.16636560000000E-01,
               "63932827/1250000000", "2707957/12500000");
}

static void test_nist_smls01_03(void **state)
{
    (void)state;
    check_nist("SmLs01.csv", 0, 9, 189, 1.68000000000000E+00, 1.80000000000000E+00, "42/25", "9/5");
    check_nist("SmLs02.csv", 0, 9, 1809, 1.60800000000000E+01, 1.80000000000000E+01, "402/25", "18");
    check_nist("SmLs03.csv", 0, 9, 18009, 1.60080000000000E+02, 1.80000000000000E+02, "4002/25", "180");
}

static void test_nist_smls04_06(void **state)
{
    (void)state;
    check_nist("SmLs04.csv", 0, 9, 189, 1.68000000000000E+00, 1.80000000000000E+00, "42/25", "9/5");
    check_nist("SmLs05.csv", 0, 9, 1809, 1.60800000000000E+01, 1.80000000000000E+01, "402/25", "18");
    check_nist("SmLs06.csv", 0, 9, 18009, 1.60080000000000E+02, 1.80000000000000E+02, "4002/25", "180");
}

/* SmLs07-09 (13 constant leading digits), built from SmLs01-03; certified SS as for
 * SmLs01-03 (NIST StRD ANOVA, certified values; methods.md section 11). */
static void test_nist_smls07_09(void **state)
{
    (void)state;
    check_nist("SmLs01.csv", 1, 9, 189, 1.68000000000000E+00, 1.80000000000000E+00, "42/25", "9/5");
    check_nist("SmLs02.csv", 1, 9, 1809, 1.60800000000000E+01, 1.80000000000000E+01, "402/25", "18");
    check_nist("SmLs03.csv", 1, 9, 18009, 1.60080000000000E+02, 1.80000000000000E+02, "4002/25", "180");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_parse_valid),
        cmocka_unit_test(test_parse_syntax),
        cmocka_unit_test(test_parse_overflow),
        cmocka_unit_test(test_parse_random),
        cmocka_unit_test(test_cmp),
        cmocka_unit_test(test_get_d),
        cmocka_unit_test(test_mpq_get_d),
        cmocka_unit_test(test_from_double),
        cmocka_unit_test(test_acc_empty),
        cmocka_unit_test(test_acc_zeros),
        cmocka_unit_test(test_acc_rescale),
        cmocka_unit_test(test_acc_negative_scale),
        cmocka_unit_test(test_acc_span_limit),
        cmocka_unit_test(test_acc_gmp_switch),
        cmocka_unit_test(test_acc_sum_overflow),
        cmocka_unit_test(test_acc_many_random),
        cmocka_unit_test(test_acc_inexact),
        cmocka_unit_test(test_acc_minmax),
        cmocka_unit_test(test_acc_thirteen_digits),
        cmocka_unit_test(test_oneway_handbook),
        cmocka_unit_test(test_nist_sirstv),
        cmocka_unit_test(test_nist_smls01_03),
        cmocka_unit_test(test_nist_smls04_06),
        cmocka_unit_test(test_nist_smls07_09),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
