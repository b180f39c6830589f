/* gen.c: writes the benchmark's data file for `make bench`.
 *
 *   gen ROWS SEED OUT.csv OUT.sums
 *
 * OUT.csv has a header and ROWS rows "run,press,hardness": a run number, one of eight
 * press labels p1..p8 drawn at random for each row (so the levels are shuffled and
 * the group sizes differ a little), and a tablet hardness in newtons with six
 * decimals, normal around a press-specific mean (76 to 81 N, sd 2.5 N).
 *
 * OUT.sums has, per press, the count n, the exact sum of the values and the exact sum
 * of their squares, both in units of 1e-6 N (1e-12 N^2), as integers: the benchmark
 * computes the exact F statistic from them to check the tools against.
 *
 * The output is built in a large buffer and written with write(2) in big blocks; the
 * formatting is done by hand (no printf per row), so 10 million rows take seconds. */
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define LEVELS 8
#define BUFSZ (1u << 22)

__extension__ typedef unsigned __int128 u128;

static uint64_t rng_state;

static uint64_t next_u64(void)      /* splitmix64 */
{
    uint64_t z = (rng_state += UINT64_C(0x9e3779b97f4a7c15));
    z = (z ^ (z >> 30)) * UINT64_C(0xbf58476d1ce4e5b9);
    z = (z ^ (z >> 27)) * UINT64_C(0x94d049bb133111eb);
    return z ^ (z >> 31);
}

static double next_unit(void)       /* in (0, 1) */
{
    return ((double)(next_u64() >> 11) + 0.5) * (1.0 / 9007199254740992.0);
}

static char buf[BUFSZ];
static size_t used;
static FILE *out;

static void flush_buf(void)
{
    if (used && fwrite(buf, 1, used, out) != used) {
        fprintf(stderr, "gen: write failed: %s\n", strerror(errno));
        exit(1);
    }
    used = 0;
}

/* Writes v >= 0 in decimal; returns the number of characters. */
static size_t put_u64(char *p, uint64_t v)
{
    char tmp[24];
    size_t n = 0;
    do { tmp[n++] = (char)('0' + v % 10); v /= 10; } while (v);
    for (size_t i = 0; i < n; i++) p[i] = tmp[n - 1 - i];
    return n;
}

/* Writes an unsigned 128-bit integer in decimal into s (at least 40 bytes). */
static void u128_to_str(u128 v, char *s)
{
    char tmp[48];
    size_t n = 0;
    do { tmp[n++] = (char)('0' + (int)(v % 10)); v /= 10; } while (v);
    for (size_t i = 0; i < n; i++) s[i] = tmp[n - 1 - i];
    s[n] = 0;
}

int main(int argc, char **argv)
{
    if (argc != 5) {
        fprintf(stderr, "usage: gen ROWS SEED OUT.csv OUT.sums\n");
        return 64;
    }
    uint64_t rows = strtoull(argv[1], NULL, 10);
    rng_state = strtoull(argv[2], NULL, 10);
    out = fopen(argv[3], "wb");
    if (!out) { fprintf(stderr, "gen: %s: %s\n", argv[3], strerror(errno)); return 1; }
    setvbuf(out, NULL, _IONBF, 0);

    /* Press means in N: a realistic spread of about 5 N between the best and worst press. */
    static const double mean[LEVELS] = {78.2, 79.1, 77.6, 80.4, 78.9, 76.8, 79.7, 78.4};
    const double sd = 2.5;
    uint64_t n[LEVELS] = {0};
    int64_t s[LEVELS] = {0};
    u128 q[LEVELS] = {0};

    static const char header[] = "run,press,hardness\n";
    memcpy(buf, header, sizeof header - 1);
    used = sizeof header - 1;

    double spare = 0;
    int have_spare = 0;
    for (uint64_t r = 1; r <= rows; r++) {
        int lev = (int)(next_u64() >> 61);          /* 0..7, uniform */
        double z;
        if (have_spare) { z = spare; have_spare = 0; }
        else {                                      /* Box-Muller, two normals per draw */
            double u1 = next_unit(), u2 = next_unit();
            double rad = sqrt(-2.0 * log(u1));
            z = rad * cos(6.283185307179586 * u2);
            spare = rad * sin(6.283185307179586 * u2);
            have_spare = 1;
        }
        double x = mean[lev] + sd * z;
        if (x < 0.001) x = 0.001;                   /* hardness is positive (never happens at 30 sd) */
        int64_t micro = (int64_t)llround(x * 1e6);  /* the value in units of 1e-6 */
        n[lev]++;
        s[lev] += micro;
        q[lev] += (u128)((uint64_t)micro) * (uint64_t)micro;

        if (used + 64 > BUFSZ) flush_buf();
        char *p = buf + used;
        p += put_u64(p, r);
        *p++ = ',';
        *p++ = 'p';
        *p++ = (char)('1' + lev);
        *p++ = ',';
        p += put_u64(p, (uint64_t)(micro / 1000000));
        *p++ = '.';
        uint64_t frac = (uint64_t)(micro % 1000000);
        for (int i = 5; i >= 0; i--) { p[i] = (char)('0' + frac % 10); frac /= 10; }
        p += 6;
        *p++ = '\n';
        used = (size_t)(p - buf);
    }
    flush_buf();
    if (fclose(out) != 0) { fprintf(stderr, "gen: %s: %s\n", argv[3], strerror(errno)); return 1; }

    FILE *sf = fopen(argv[4], "w");
    if (!sf) { fprintf(stderr, "gen: %s: %s\n", argv[4], strerror(errno)); return 1; }
    fprintf(sf, "# press n sum_micro sumsq_micro2\n");
    for (int i = 0; i < LEVELS; i++) {
        char qs[48];
        u128_to_str(q[i], qs);
        fprintf(sf, "p%d %llu %lld %s\n", i + 1, (unsigned long long)n[i], (long long)s[i], qs);
    }
    if (fclose(sf) != 0) { fprintf(stderr, "gen: %s: %s\n", argv[4], strerror(errno)); return 1; }
    return 0;
}
