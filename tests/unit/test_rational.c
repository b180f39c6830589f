/* test_rational.c: exact rational arithmetic, decimal parsing, rounding to binary64,
 * formatting and the vector helpers. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <string.h>

#include "avow/rational.h"
#include "avow/util.h"

#define MAXI INT64_MAX
#define P62 (INT64_C(1) << 62)

static avow_rat mk(int64_t num, int64_t den)
{
    avow_rat r;
    assert_int_equal(rat_make(num, den, &r), AVOW_OK);
    return r;
}

static void expect_rat(avow_rat got, int64_t num, int64_t den)
{
    assert_true(got.num == num);
    assert_true(got.den == den);
}

static const avow_rat sentinel = {42, 43};

/* ---- construction and normalisation ---- */

static void test_make_normalises(void **state)
{
    (void)state;
    expect_rat(mk(6, -4), -3, 2);
    expect_rat(mk(-10, -4), 5, 2);
    expect_rat(mk(0, -5), 0, 1);
    expect_rat(mk(0, MAXI), 0, 1);
    expect_rat(mk(INT64_MIN, 2), -P62, 1);
    expect_rat(mk(INT64_MIN, INT64_MIN), 1, 1);
    expect_rat(mk(INT64_MIN, -4), P62 / 2, 1);
    expect_rat(mk(MAXI, MAXI), 1, 1);
    expect_rat(mk(MAXI, -1), -MAXI, 1);
    /* gcd(2^62, 3 * 2^40) = 2^40 */
    expect_rat(mk(P62, 3 * (INT64_C(1) << 40)), INT64_C(1) << 22, 3);
}

static void test_make_errors(void **state)
{
    (void)state;
    avow_rat r = sentinel;
    assert_int_equal(rat_make(1, 0, &r), AVOW_EDOM);
    assert_int_equal(rat_make(0, 0, &r), AVOW_EDOM);
    /* -2^63 / 1 is excluded so that negation stays exact */
    assert_int_equal(rat_make(INT64_MIN, 1, &r), AVOW_EOVERFLOW);
    /* 2^63 */
    assert_int_equal(rat_make(INT64_MIN, -1, &r), AVOW_EOVERFLOW);
    assert_int_equal(rat_make(INT64_MIN, 3, &r), AVOW_EOVERFLOW);
    /* -1 / 2^63: the denominator does not fit */
    assert_int_equal(rat_make(1, INT64_MIN, &r), AVOW_EOVERFLOW);
    expect_rat(r, sentinel.num, sentinel.den);
}

static void test_predicates_and_negation(void **state)
{
    (void)state;
    avow_rat r;
    expect_rat(rat_int(-7), -7, 1);
    expect_rat(rat_int(MAXI), MAXI, 1);
    expect_rat(rat_neg(mk(3, 4)), -3, 4);
    expect_rat(rat_neg(rat_int(-MAXI)), MAXI, 1);
    expect_rat(rat_neg(RAT_ZERO), 0, 1);
    assert_int_equal(rat_sign(mk(-1, MAXI)), -1);
    assert_int_equal(rat_sign(RAT_ZERO), 0);
    assert_int_equal(rat_sign(mk(1, MAXI)), 1);
    assert_true(rat_is_zero(mk(0, -3)));
    assert_false(rat_is_zero(mk(1, MAXI)));
    assert_true(rat_is_int(mk(-8, 4)));
    assert_false(rat_is_int(mk(8, 3)));
    /* negative zero never appears: -1 * 0, 0 / -5, x - x */
    assert_int_equal(rat_mul(rat_int(-1), RAT_ZERO, &r), AVOW_OK);
    expect_rat(r, 0, 1);
    assert_int_equal(rat_div(RAT_ZERO, rat_int(-5), &r), AVOW_OK);
    expect_rat(r, 0, 1);
    assert_int_equal(rat_sub(mk(-5, 7), mk(-5, 7), &r), AVOW_OK);
    expect_rat(r, 0, 1);
    assert_int_equal(rat_add(mk(-MAXI, 3), mk(MAXI, 3), &r), AVOW_OK);
    expect_rat(r, 0, 1);
}

/* ---- arithmetic ---- */

static void test_add_sub(void **state)
{
    (void)state;
    avow_rat r;
    assert_int_equal(rat_add(mk(1, 2), mk(1, 3), &r), AVOW_OK);
    expect_rat(r, 5, 6);
    assert_int_equal(rat_add(mk(1, 6), mk(1, 3), &r), AVOW_OK);
    expect_rat(r, 1, 2);
    assert_int_equal(rat_sub(mk(1, 6), mk(2, 3), &r), AVOW_OK);
    expect_rat(r, -1, 2);
    assert_int_equal(rat_add(rat_int(MAXI - 1), RAT_ONE, &r), AVOW_OK);
    expect_rat(r, MAXI, 1);
    assert_int_equal(rat_sub(rat_int(-MAXI + 1), RAT_ONE, &r), AVOW_OK);
    expect_rat(r, -MAXI, 1);
    /* the cross products reach 2^126 before the gcd brings them back */
    assert_int_equal(rat_add(mk(1, MAXI), mk(MAXI - 1, MAXI), &r), AVOW_OK);
    expect_rat(r, 1, 1);
    assert_int_equal(rat_sub(mk(MAXI, MAXI - 1), mk(1, MAXI - 1), &r), AVOW_OK);
    expect_rat(r, 1, 1);
    /* 2^62 + 2^62 - 1 = INT64_MAX */
    assert_int_equal(rat_add(rat_int(P62), rat_int(P62 - 1), &r), AVOW_OK);
    expect_rat(r, MAXI, 1);
}

static void test_add_sub_overflow(void **state)
{
    (void)state;
    avow_rat r = sentinel;
    assert_int_equal(rat_add(rat_int(MAXI), RAT_ONE, &r), AVOW_EOVERFLOW);
    assert_int_equal(rat_add(rat_int(P62), rat_int(P62), &r), AVOW_EOVERFLOW);
    /* -INT64_MAX - 1 would be INT64_MIN, which is not a valid numerator */
    assert_int_equal(rat_sub(rat_int(-MAXI), RAT_ONE, &r), AVOW_EOVERFLOW);
    assert_int_equal(rat_sub(rat_int(MAXI), rat_int(-MAXI), &r), AVOW_EOVERFLOW);
    /* coprime denominators whose product does not fit */
    assert_int_equal(rat_add(mk(1, MAXI), mk(1, MAXI - 1), &r), AVOW_EOVERFLOW);
    /* 3037000500 * 3037000499 = 9223372033963249500 fits, 3037000500 * 3037000501 =
     * 9223372040037250500 does not (Python 3.11 integers) */
    assert_int_equal(rat_sub(mk(1, INT64_C(3037000500)), mk(1, INT64_C(3037000499)), &r),
                     AVOW_OK);
    expect_rat(r, -1, INT64_C(9223372033963249500));
    r = sentinel;
    assert_int_equal(rat_add(mk(1, INT64_C(3037000500)), mk(1, INT64_C(3037000501)), &r),
                     AVOW_EOVERFLOW);
    expect_rat(r, sentinel.num, sentinel.den);
    r = sentinel;
    assert_int_equal(rat_add(mk(1, INT64_C(4294967311)), mk(1, INT64_C(4294967291)), &r),
                     AVOW_EOVERFLOW);
    expect_rat(r, sentinel.num, sentinel.den);
}

static void test_mul_div(void **state)
{
    (void)state;
    avow_rat r;
    assert_int_equal(rat_mul(mk(2, 3), mk(3, 4), &r), AVOW_OK);
    expect_rat(r, 1, 2);
    assert_int_equal(rat_mul(mk(MAXI, 2), mk(2, MAXI), &r), AVOW_OK);
    expect_rat(r, 1, 1);
    assert_int_equal(rat_mul(mk(-MAXI, 3), mk(3, MAXI - 1), &r), AVOW_OK);
    expect_rat(r, -MAXI, MAXI - 1);
    assert_int_equal(rat_mul(rat_int(INT64_C(1) << 31), rat_int(INT64_C(1) << 31), &r),
                     AVOW_OK);
    expect_rat(r, P62, 1);
    assert_int_equal(rat_div(mk(1, 2), mk(1, 4), &r), AVOW_OK);
    expect_rat(r, 2, 1);
    assert_int_equal(rat_div(RAT_ONE, mk(-2, 3), &r), AVOW_OK);
    expect_rat(r, -3, 2);
    assert_int_equal(rat_div(RAT_ONE, rat_int(-MAXI), &r), AVOW_OK);
    expect_rat(r, -1, MAXI);
    assert_int_equal(rat_div(mk(MAXI, 5), mk(MAXI, 7), &r), AVOW_OK);
    expect_rat(r, 7, 5);
    assert_int_equal(rat_div(mk(-4, 9), mk(-2, 3), &r), AVOW_OK);
    expect_rat(r, 2, 3);
}

static void test_mul_div_errors(void **state)
{
    (void)state;
    avow_rat r = sentinel;
    assert_int_equal(rat_mul(rat_int(INT64_C(1) << 32), rat_int(INT64_C(1) << 32), &r),
                     AVOW_EOVERFLOW);
    assert_int_equal(rat_mul(rat_int(MAXI), rat_int(-2), &r), AVOW_EOVERFLOW);
    /* 1 / 2^63 */
    assert_int_equal(rat_mul(mk(1, INT64_C(1) << 32), mk(1, INT64_C(1) << 31), &r),
                     AVOW_EOVERFLOW);
    /* -2^62 * 2 = -2^63 = INT64_MIN */
    assert_int_equal(rat_mul(rat_int(-P62), rat_int(2), &r), AVOW_EOVERFLOW);
    assert_int_equal(rat_div(RAT_ONE, RAT_ZERO, &r), AVOW_EDOM);
    assert_int_equal(rat_div(RAT_ZERO, RAT_ZERO, &r), AVOW_EDOM);
    assert_int_equal(rat_div(rat_int(MAXI), mk(1, 2), &r), AVOW_EOVERFLOW);
    assert_int_equal(rat_div(mk(1, MAXI), rat_int(2), &r), AVOW_EOVERFLOW);
    expect_rat(r, sentinel.num, sentinel.den);
}

static void test_cmp_exact(void **state)
{
    (void)state;
    /* 1 + 1/(M-1) < 1 + 1/(M-2): both round to the same double */
    avow_rat a = mk(MAXI, MAXI - 1), b = mk(MAXI - 1, MAXI - 2);
    assert_true(rat_to_double(a) == rat_to_double(b));
    assert_int_equal(rat_cmp(a, b), -1);
    assert_int_equal(rat_cmp(b, a), 1);
    assert_int_equal(rat_cmp(rat_neg(a), rat_neg(b)), 1);
    assert_int_equal(rat_cmp(a, a), 0);
    assert_int_equal(rat_cmp(mk(2, 4), mk(1, 2)), 0);
    assert_int_equal(rat_cmp(rat_int(-MAXI), rat_int(MAXI)), -1);
    assert_int_equal(rat_cmp(mk(1, MAXI), mk(1, MAXI - 1)), -1);
    assert_int_equal(rat_cmp(RAT_ZERO, mk(-1, MAXI)), 1);
    assert_int_equal(rat_cmp(mk(MAXI, 2), mk(MAXI - 1, 2)), 1);
    assert_int_equal(rat_cmp(mk(-MAXI, MAXI - 1), mk(-MAXI + 1, MAXI)), -1);
}

/* ---- conversion to binary64 ---- */

typedef struct { int64_t num, den; double want; } double_case;

/* Expected values: float(Fraction(num, den)) in Python 3.11 fractions, printed with
 * float.hex(). */
static const double_case double_cases[] = {
    {INT64_C(9007199254740993), 1, 0x1.0000000000000p+53},     /* 2^53+1: tie, to even */
    {INT64_C(9007199254740995), 1, 0x1.0000000000002p+53},     /* 2^53+3: tie, to even */
    {1, 3, 0x1.5555555555555p-2},
    {-1, 3, -0x1.5555555555555p-2},
    {2, 3, 0x1.5555555555555p-1},
    {1, 10, 0x1.999999999999ap-4},
    {-7, 10, -0x1.6666666666666p-1},
    {MAXI, 3, 0x1.5555555555555p+61},
    {MAXI, 1, 0x1.0000000000000p+63},
    {-MAXI, 1, -0x1.0000000000000p+63},
    {1, MAXI, 0x1.0000000000000p-63},
    {MAXI - 1, MAXI, 0x1.0000000000000p+0},
    {MAXI, MAXI - 1, 0x1.0000000000000p+0},
    {INT64_C(36028797018963973), 4, 0x1.0000000000001p+53},    /* 2^53 + 1.25 */
    {INT64_C(18014398509481985), 2, 0x1.0000000000000p+53},    /* 2^53 + 0.5 */
    {INT64_C(27021597764222980), 3, 0x1.0000000000001p+53},    /* 2^53 + 4/3 */
    {INT64_C(27021597764222978), 3, 0x1.0000000000000p+53},    /* 2^53 + 2/3 */
    {INT64_C(61728394506172839), 500, 0x1.c12218377de6bp+46},
    {1, P62, 0x1.0000000000000p-62},
    {P62 + 1, P62, 0x1.0000000000000p+0},
    /* just above the midpoint 1 + 2^-53 by about 2e-21: rounding through an 80-bit
     * long double lands on the midpoint and then goes to even (1.0), which is wrong */
    {INT64_C(8214418394030085149), INT64_C(8214418394030084237), 0x1.0000000000001p+0},
    {INT64_C(837594512088845332), INT64_C(837594512088845239), 0x1.0000000000001p+0},
    /* plain double division of the rounded operands gives the neighbour here */
    {INT64_C(454370880871703632), INT64_C(7583925510670593843), 0x1.eacd53bd71c73p-5},
    {INT64_C(554205380355115558), INT64_C(5224397015519892655), 0x1.b281364708abap-4},
    {INT64_C(1795401505785412839), INT64_C(193194628264253923), 0x1.29621d43f2e6fp+3},
    /* random operands (Python random.seed(20240611)) */
    {INT64_C(-7553507098585928486), INT64_C(3113672806955107833), -0x1.36846619ee332p+1},
    {INT64_C(3371902816696921514), INT64_C(6983885102923041805), 0x1.ee663df32e696p-2},
    {INT64_C(158092847045414606), INT64_C(6465640547167649507), 0x1.909be176de52cp-6},
    {INT64_C(-5481407794407684824), INT64_C(7973436077787560321), -0x1.5ffa955599939p-1},
    {INT64_C(6907145164057095463), INT64_C(6298369571487776707), 0x1.18be739c51a93p+0},
    {INT64_C(-230167938357819642), INT64_C(374416533142435217), -0x1.3abee48dd4603p-1},
    {INT64_C(-2765670983550582841), INT64_C(7608922436063776539), -0x1.74336839ced97p-2},
    {INT64_C(7546942363919820997), INT64_C(4263862597268821457), 0x1.c51d44bfc995bp+0},
    {INT64_C(3060186815118339886), INT64_C(1902702426686518067), 0x1.9bbbfa26d7bbep+0},
    {INT64_C(9150649340673054940), INT64_C(7893788405184598861), 0x1.28c2bdb869c6bp+0},
    {INT64_C(-255211394375236913), INT64_C(88293445090305455), -0x1.71fb9a9842d71p+1},
    {INT64_C(351209963658150800), INT64_C(334991962748723669), 0x1.0c64cd1ca8018p+0},
};

static void test_to_double(void **state)
{
    (void)state;
    for (size_t i = 0; i < sizeof double_cases / sizeof double_cases[0]; i++) {
        const double_case *c = &double_cases[i];
        double got = rat_to_double(mk(c->num, c->den));
        if (got != c->want)
            fail_msg("case %zu: %a, want %a", i, got, c->want);
    }
    double z = rat_to_double(RAT_ZERO);
    assert_true(z == 0.0);
    assert_false(signbit(z));
}

/* ---- decimal literals ---- */

typedef struct { const char *text; int64_t num, den; } dec_case;

static const dec_case dec_values[] = {
    {"2", 2, 1},
    {"0.05", 1, 20},
    {"1e-3", 1, 1000},
    {"2.5E+2", 250, 1},
    {"0.000", 0, 1},
    {"007", 7, 1},
    {"1.50e1", 15, 1},
    {"0.1e-5", 1, 1000000},
    {"12.5e-1", 5, 4},
    {"1e0", 1, 1},
    {"3E-0", 3, 1},
    {"100000000000000000000e-10", INT64_C(10000000000), 1},
    {"0e999999999999", 0, 1},
    {"0.0e-999999999999", 0, 1},
    {"1E+000000000000000000000000000018", INT64_C(1000000000000000000), 1},
    {"1e-18", 1, INT64_C(1000000000000000000)},
    {"4611686018427387904", P62, 1},
    {"9223372036854775807", MAXI, 1},
    {"922337203685477580.7e1", MAXI, 1},
    {"0009223372036854775807.000", MAXI, 1},
    {"92233720368547758070000000000000000000000e-22", MAXI, 1},
    /* exact decimal expansions of 3/2^62, 1/2^62, 1/5^27 and INT64_MAX/2^62
     * (Python 3.11 fractions and decimal) */
    {"0.00000000000000000065052130349130266040447168052196502685546875", 3, P62},
    {"0.00000000000000000021684043449710088680149056017398834228515625", 1, P62},
    {"0.000000000000000000134217728", 1, INT64_C(7450580596923828125)},
    {"1.99999999999999999978315956550289911319850943982601165771484375", MAXI, P62},
    {"1.99999999999999999978315956550289911319850943982601165771484375000", MAXI, P62},
    {"199999999999999999978315956550289911319850943982601165771484375e-62", MAXI, P62},
};

static const char *const dec_syntax[] = {
    "", ".", "1.", ".5", "1e", "1E", "1e+", "1e-", "e5", "E5", "1.2.3", "+1", "-1", " 1",
    "1 ", "1x", "0x10", "1_000", "1e5.5", "1e+-5", "1,5", "1.e5", "1..2", "inf", "nan",
    "\xd9\xa1", "1e 5", "1.5e", "--1",
};

static const char *const dec_overflow[] = {
    "1e30", "1e-30", "1e19", "1e-19", "9223372036854775808", "99999999999999999999",
    "1e999999999999", "1e-999999999999", "1e99999999999999999999999999999999999999",
    "1e-99999999999999999999999999999999999999", "9223372036854775807.5",
    /* exponents 2^64 + 5 and 2^64, which wrap to 5 and 0 in 64 bits */
    "1e18446744073709551621", "1e-18446744073709551621", "2e18446744073709551616",
    "0.9223372036854775807",            /* INT64_MAX / 10^19 */
    "18446744073709551616e-1",          /* 2^64 / 10 = 2^63 / 5 */
    "922337203685477580.8e1",           /* 2^63 */
    /* 1/2^63 and 1/5^28 (Python 3.11 fractions and decimal) */
    "0.000000000000000000108420217248550443400745280086994171142578125",
    "0.0000000000000000000268435456",
    /* one significant digit beyond the 63 that INT64_MAX/2^62 needs */
    "1.999999999999999999783159565502899113198509439826011657714843751",
};

static void test_from_decimal_values(void **state)
{
    (void)state;
    for (size_t i = 0; i < sizeof dec_values / sizeof dec_values[0]; i++) {
        avow_rat r = sentinel;
        int rc = rat_from_decimal(dec_values[i].text, strlen(dec_values[i].text), &r);
        if (rc != AVOW_OK || r.num != dec_values[i].num || r.den != dec_values[i].den)
            fail_msg("\"%s\": rc %d, %lld/%lld", dec_values[i].text, rc, (long long)r.num,
                     (long long)r.den);
    }
}

static void test_from_decimal_errors(void **state)
{
    (void)state;
    for (size_t i = 0; i < sizeof dec_syntax / sizeof dec_syntax[0]; i++) {
        avow_rat r = sentinel;
        int rc = rat_from_decimal(dec_syntax[i], strlen(dec_syntax[i]), &r);
        if (rc != AVOW_ESYNTAX || r.num != sentinel.num)
            fail_msg("\"%s\": rc %d, want syntax error", dec_syntax[i], rc);
    }
    for (size_t i = 0; i < sizeof dec_overflow / sizeof dec_overflow[0]; i++) {
        avow_rat r = sentinel;
        int rc = rat_from_decimal(dec_overflow[i], strlen(dec_overflow[i]), &r);
        if (rc != AVOW_EOVERFLOW || r.num != sentinel.num)
            fail_msg("\"%s\": rc %d, want overflow", dec_overflow[i], rc);
    }
}

static void test_from_decimal_length(void **state)
{
    (void)state;
    avow_rat r;
    assert_int_equal(rat_from_decimal("12345", 3, &r), AVOW_OK);
    expect_rat(r, 123, 1);
    assert_int_equal(rat_from_decimal("1e5x", 3, &r), AVOW_OK);
    expect_rat(r, 100000, 1);
    assert_int_equal(rat_from_decimal("2.5", 1, &r), AVOW_OK);
    expect_rat(r, 2, 1);
    assert_int_equal(rat_from_decimal("2.5", 2, &r), AVOW_ESYNTAX);
    assert_int_equal(rat_from_decimal("7", 0, &r), AVOW_ESYNTAX);
    assert_int_equal(rat_from_decimal("1\0", 2, &r), AVOW_ESYNTAX);
    /* a long run of zeros around the significant digits */
    char buf[4096];
    memset(buf, '0', sizeof buf);
    buf[2000] = '.';
    buf[1999] = '3';
    assert_int_equal(rat_from_decimal(buf, sizeof buf, &r), AVOW_OK);
    expect_rat(r, 3, 1);
    buf[1999] = '0';
    buf[2030] = '5';
    buf[2031] = 'e';
    buf[2032] = '3';
    buf[2033] = '0';
    assert_int_equal(rat_from_decimal(buf, 2034, &r), AVOW_OK);
    expect_rat(r, 5, 1);    /* 5e-30 * 1e30 */
}

/* ---- formatting ---- */

static void test_format(void **state)
{
    (void)state;
    char buf[48];
    assert_int_equal(rat_format(mk(-3, 2), buf, sizeof buf), 4);
    assert_string_equal(buf, "-3/2");
    assert_int_equal(rat_format(rat_int(7), buf, sizeof buf), 1);
    assert_string_equal(buf, "7");
    assert_int_equal(rat_format(mk(0, -9), buf, sizeof buf), 1);
    assert_string_equal(buf, "0");
    assert_int_equal(rat_format(mk(-MAXI, MAXI - 1), buf, sizeof buf), 40);
    assert_string_equal(buf, "-9223372036854775807/9223372036854775806");
    assert_int_equal(rat_format(rat_int(-MAXI), buf, sizeof buf), 20);
    assert_string_equal(buf, "-9223372036854775807");
}

/* ---- vectors ---- */

static void expect_ints(const avow_rat *v, const int64_t *want, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        if (v[i].den != 1 || v[i].num != want[i])
            fail_msg("entry %zu: %lld/%lld, want %lld", i, (long long)v[i].num,
                     (long long)v[i].den, (long long)want[i]);
    }
}

static void test_integer_scale(void **state)
{
    (void)state;
    avow_rat a[] = {mk(1, 2), mk(-1, 3), mk(5, 6)};
    assert_int_equal(rat_vec_integer_scale(a, 3), AVOW_OK);
    expect_ints(a, (const int64_t[]){3, -2, 5}, 3);
    avow_rat b[] = {mk(2, 3), mk(4, 3)};
    assert_int_equal(rat_vec_integer_scale(b, 2), AVOW_OK);
    expect_ints(b, (const int64_t[]){1, 2}, 2);
    avow_rat c[] = {mk(-1, 2), mk(-1, 4)};
    assert_int_equal(rat_vec_integer_scale(c, 2), AVOW_OK);
    expect_ints(c, (const int64_t[]){-2, -1}, 2);
    avow_rat d[] = {RAT_ZERO, rat_int(4), rat_int(-6)};
    assert_int_equal(rat_vec_integer_scale(d, 3), AVOW_OK);
    expect_ints(d, (const int64_t[]){0, 2, -3}, 3);
    avow_rat e[] = {rat_int(6), rat_int(10), rat_int(14)};
    assert_int_equal(rat_vec_integer_scale(e, 3), AVOW_OK);
    expect_ints(e, (const int64_t[]){3, 5, 7}, 3);
    avow_rat f[] = {mk(-5, 7)};
    assert_int_equal(rat_vec_integer_scale(f, 1), AVOW_OK);
    expect_ints(f, (const int64_t[]){-1}, 1);
    avow_rat z[] = {RAT_ZERO, RAT_ZERO};
    assert_int_equal(rat_vec_integer_scale(z, 2), AVOW_OK);
    expect_ints(z, (const int64_t[]){0, 0}, 2);
    assert_int_equal(rat_vec_integer_scale(NULL, 0), AVOW_OK);
    /* primes near 2^32: the lcm 4294967311 * 4294967291 exceeds INT64_MAX, the
     * result does not */
    avow_rat g[] = {mk(1, INT64_C(4294967311)), mk(-1, INT64_C(4294967291))};
    assert_int_equal(rat_vec_integer_scale(g, 2), AVOW_OK);
    expect_ints(g, (const int64_t[]){INT64_C(4294967291), -INT64_C(4294967311)}, 2);
    avow_rat h[] = {mk(MAXI, 3), mk(MAXI, 6)};
    assert_int_equal(rat_vec_integer_scale(h, 2), AVOW_OK);
    expect_ints(h, (const int64_t[]){2, 1}, 2);
}

static void test_integer_scale_overflow(void **state)
{
    (void)state;
    avow_rat a[] = {mk(1, INT64_C(4294967311)), mk(1, INT64_C(4294967291)),
                    mk(1, INT64_C(4294967279))};
    avow_rat a0[3];
    memcpy(a0, a, sizeof a);
    assert_int_equal(rat_vec_integer_scale(a, 3), AVOW_EOVERFLOW);
    assert_memory_equal(a, a0, sizeof a);
    avow_rat b[] = {rat_int(MAXI), mk(1, 2)};
    assert_int_equal(rat_vec_integer_scale(b, 2), AVOW_EOVERFLOW);
    expect_rat(b[0], MAXI, 1);
    expect_rat(b[1], 1, 2);
    /* the running lcm passes 2^126 */
    avow_rat c[] = {mk(1, MAXI), mk(1, MAXI - 1), mk(1, MAXI - 2), mk(1, MAXI - 3)};
    assert_int_equal(rat_vec_integer_scale(c, 4), AVOW_EOVERFLOW);
    expect_rat(c[0], 1, MAXI);
    /* pairwise coprime denominators with product 2^128 + 4 (Python 3.11 integers),
     * which would wrap to 4 in 128 bits; the scaled entries exceed 10^21 */
    avow_rat d[] = {mk(1, INT64_C(70949286317145860)), mk(1, INT64_C(40388473189)),
                    mk(1, INT64_C(118750098349))};
    assert_int_equal(rat_vec_integer_scale(d, 3), AVOW_EOVERFLOW);
    expect_rat(d[2], 1, INT64_C(118750098349));
}

static void test_weighted_dot(void **state)
{
    (void)state;
    avow_rat r = sentinel;
    const avow_rat v[] = {rat_int(1), rat_int(2), rat_int(3)};
    const avow_rat w[] = {rat_int(4), rat_int(-5), rat_int(6)};
    const avow_rat n[] = {rat_int(1), rat_int(2), rat_int(3)};
    assert_int_equal(rat_vec_weighted_dot(v, w, n, 3, &r), AVOW_OK);
    expect_rat(r, 5, 1);     /* 4 - 5 + 6, by hand */
    const avow_rat v2[] = {mk(1, 2), mk(1, 3)};
    const avow_rat w2[] = {mk(1, 5), mk(1, 7)};
    const avow_rat n2[] = {mk(1, 3), rat_int(2)};
    assert_int_equal(rat_vec_weighted_dot(v2, w2, n2, 2, &r), AVOW_OK);
    expect_rat(r, 34, 105);  /* 3/10 + 1/42, by hand */
    const avow_rat n3[] = {RAT_ONE, rat_int(4)};
    const avow_rat w3[] = {rat_int(-3), RAT_ONE};
    assert_int_equal(rat_vec_weighted_dot(v, w3, n3, 2, &r), AVOW_OK);
    expect_rat(r, -5, 2);    /* -3 + 2/4, by hand */
    assert_int_equal(rat_vec_weighted_dot(v, w, n, 0, &r), AVOW_OK);
    expect_rat(r, 0, 1);

    r = sentinel;
    const avow_rat n0[] = {rat_int(1), RAT_ZERO, rat_int(3)};
    assert_int_equal(rat_vec_weighted_dot(v, w, n0, 3, &r), AVOW_EDOM);
    const avow_rat nneg[] = {rat_int(1), rat_int(2), rat_int(-3)};
    assert_int_equal(rat_vec_weighted_dot(v, w, nneg, 3, &r), AVOW_EDOM);
    const avow_rat big[] = {rat_int(MAXI), rat_int(MAXI)};
    const avow_rat ones[] = {RAT_ONE, RAT_ONE};
    assert_int_equal(rat_vec_weighted_dot(big, ones, ones, 2, &r), AVOW_EOVERFLOW);
    assert_int_equal(rat_vec_weighted_dot(big, big, ones, 1, &r), AVOW_EOVERFLOW);
    /* partial sums and single terms beyond 64 bits, final values that fit */
    const avow_rat up[] = {rat_int(MAXI), rat_int(MAXI), rat_int(-MAXI)};
    const avow_rat ones3[] = {RAT_ONE, RAT_ONE, RAT_ONE};
    assert_int_equal(rat_vec_weighted_dot(up, ones3, ones3, 3, &r), AVOW_OK);
    expect_rat(r, MAXI, 1);
    const avow_rat hv[] = {rat_int(P62), rat_int(-P62)};
    const avow_rat hw[] = {rat_int(4), rat_int(4)};
    const avow_rat hn[] = {mk(1, 3), mk(1, 3)};
    assert_int_equal(rat_vec_weighted_dot(hv, hw, hn, 2, &r), AVOW_OK);
    expect_rat(r, 0, 1);
    /* (1/M)(1/M)/(1/M) + (1/(M-1))(1/(M-1))/(1/(M-1)) - 1/M = 1/(M-1) */
    const avow_rat dv[] = {mk(1, MAXI), mk(1, MAXI - 1), mk(-1, MAXI)};
    const avow_rat dn[] = {mk(1, MAXI), mk(1, MAXI - 1), RAT_ONE};
    const avow_rat dw[] = {mk(1, MAXI), mk(1, MAXI - 1), RAT_ONE};
    assert_int_equal(rat_vec_weighted_dot(dv, dw, dn, 3, &r), AVOW_OK);
    expect_rat(r, 1, MAXI - 1);

    r = sentinel;
    const avow_rat tiny[] = {mk(1, INT64_C(1) << 32)};
    const avow_rat tinyw[] = {mk(1, INT64_C(1) << 31)};
    assert_int_equal(rat_vec_weighted_dot(tiny, tinyw, ones, 1, &r), AVOW_EOVERFLOW);
    expect_rat(r, sentinel.num, sentinel.den);
}

static void test_proportional(void **state)
{
    (void)state;
    const avow_rat a[] = {rat_int(1), rat_int(2), rat_int(3)};
    const avow_rat b[] = {rat_int(2), rat_int(4), rat_int(6)};
    const avow_rat c[] = {rat_int(-1), rat_int(-2), rat_int(-3)};
    const avow_rat d[] = {rat_int(1), rat_int(2), rat_int(4)};
    assert_int_equal(rat_vec_proportional(a, b, 3), 1);
    assert_int_equal(rat_vec_proportional(b, a, 3), 1);
    assert_int_equal(rat_vec_proportional(c, b, 3), 1);
    assert_int_equal(rat_vec_proportional(a, d, 3), 0);
    assert_int_equal(rat_vec_proportional(d, a, 3), 0);
    const avow_rat e[] = {mk(1, 2), mk(1, 3)};
    const avow_rat f[] = {rat_int(3), rat_int(2)};
    assert_int_equal(rat_vec_proportional(e, f, 2), 1);
    const avow_rat g[] = {RAT_ZERO, rat_int(1)};
    const avow_rat h[] = {RAT_ZERO, rat_int(2)};
    const avow_rat k[] = {rat_int(1), RAT_ZERO};
    const avow_rat z[] = {RAT_ZERO, RAT_ZERO};
    assert_int_equal(rat_vec_proportional(g, h, 2), 1);
    assert_int_equal(rat_vec_proportional(g, k, 2), 0);
    assert_int_equal(rat_vec_proportional(k, g, 2), 0);
    assert_int_equal(rat_vec_proportional(z, g, 2), 0);
    assert_int_equal(rat_vec_proportional(g, z, 2), 0);
    assert_int_equal(rat_vec_proportional(z, z, 2), 0);
    assert_int_equal(rat_vec_proportional(a, b, 0), 0);
    /* the factor MAXI * (MAXI - 1) is not representable; the test stays exact */
    const avow_rat m[] = {mk(1, MAXI), mk(1, MAXI - 1)};
    const avow_rat m2[] = {rat_int(MAXI - 1), rat_int(MAXI)};
    assert_int_equal(rat_vec_proportional(m, m2, 2), 1);
    /* ratios M/(M-1) and (M-1)/(M-2) agree to 1e-37 but differ */
    const avow_rat p[] = {rat_int(MAXI), rat_int(MAXI - 1)};
    const avow_rat q[] = {rat_int(MAXI - 1), rat_int(MAXI - 2)};
    assert_int_equal(rat_vec_proportional(p, q, 2), 0);
    const avow_rat s[] = {mk(MAXI, 3), mk(MAXI - 1, 3)};
    const avow_rat t[] = {rat_int(-MAXI), rat_int(-MAXI + 1)};
    assert_int_equal(rat_vec_proportional(s, t, 2), 1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_make_normalises),
        cmocka_unit_test(test_make_errors),
        cmocka_unit_test(test_predicates_and_negation),
        cmocka_unit_test(test_add_sub),
        cmocka_unit_test(test_add_sub_overflow),
        cmocka_unit_test(test_mul_div),
        cmocka_unit_test(test_mul_div_errors),
        cmocka_unit_test(test_cmp_exact),
        cmocka_unit_test(test_to_double),
        cmocka_unit_test(test_from_decimal_values),
        cmocka_unit_test(test_from_decimal_errors),
        cmocka_unit_test(test_from_decimal_length),
        cmocka_unit_test(test_format),
        cmocka_unit_test(test_integer_scale),
        cmocka_unit_test(test_integer_scale_overflow),
        cmocka_unit_test(test_weighted_dot),
        cmocka_unit_test(test_proportional),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
