/* test_numfmt.c - ps_fmt_g against the C library's own "%.*g" (glibc's
 * snprintf, exact decimal conversion): the same bytes for every value
 * tried, including the hard ones (near rounding ties, around powers of
 * ten, round numbers, every finite bit pattern), and the fast part must
 * really answer for the numbers reports carry, or the speed is not there. */
#include <criterion/criterion.h>
#include <float.h>
#include <limits.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "core/numfmt.h"
#include "support.h"

TestSuite(numfmt, .init = ps_test_init);

static uint64_t rng_state = 0x9e3779b97f4a7c15u;

/* splitmix64 (Steele, Lea and Flood, OOPSLA 2014): seeded, repeatable. */
static uint64_t next_u64(void)
{
    uint64_t z = (rng_state += 0x9e3779b97f4a7c15u);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

static double uniform01(void)
{
    return (double)(next_u64() >> 11) * 0x1p-53;
}

static size_t fast_answers, tried;

/* One value at one precision: ps_fmt_g and, where it answers, the fast part
 * write exactly what snprintf writes. */
static void same(double x, int prec)
{
    char want[64], got[PS_NUMFMT_ROOM], fast[PS_NUMFMT_ROOM];
    int n = snprintf(want, sizeof want, "%.*g", prec, x);
    size_t len = ps_fmt_g(got, sizeof got, x, prec);
    cr_assert_str_eq(got, want, "%%.%dg of %a: got '%s', snprintf '%s'", prec, x, got, want);
    cr_assert_eq(len, (size_t)n);
    size_t lf = ps_fmt_g_fast(fast, x, prec);
    tried++;
    if (lf) {
        fast_answers++;
        cr_assert_str_eq(fast, want, "fast %%.%dg of %a: '%s', snprintf '%s'", prec, x, fast, want);
        cr_assert_eq(lf, (size_t)n);
    }
}

Test(numfmt, log_uniform_values_every_precision)
{
    for (int i = 0; i < 200000; i++) {
        double x = pow(10.0, -30.0 + 75.0 * uniform01()) * (next_u64() & 1 ? -1 : 1);
        for (int prec = 1; prec <= 17; prec++)
            same(x, prec);
    }
}

Test(numfmt, every_finite_bit_pattern_kind)
{
    for (int i = 0; i < 300000; i++) {
        uint64_t bits = next_u64();
        double x;
        memcpy(&x, &bits, sizeof x);
        if (!isfinite(x))
            continue;
        same(x, 1 + (int)(next_u64() % 17));
    }
}

/* Decimal strings that end in a 5 just past the kept digits are as close to
 * a rounding tie as a double gets; their neighbours too. */
Test(numfmt, near_rounding_ties)
{
    char s[64];
    for (int i = 0; i < 100000; i++) {
        int prec = 1 + (int)(next_u64() % 17);
        int len = snprintf(s, sizeof s, "%llu", (unsigned long long)(next_u64() % 100000000000000000ull));
        if (len > prec)
            len = prec;
        s[len] = '\0';
        int e = (int)(next_u64() % 40) - 20;
        char t[96];
        snprintf(t, sizeof t, "%c.%s5%se%d", s[0], s + 1, next_u64() & 1 ? "" : "000001", e);
        double x = strtod(t, NULL);
        same(x, len);
        same(nextafter(x, INFINITY), len);
        same(nextafter(x, -INFINITY), len);
        same(x, prec);
    }
    /* exact binary ties: round half to even in the C library */
    const double ties[] = {0.5, 1.5, 2.5, 0.125, 0.375, 1.25, 2.25, 1048576.5, 1e22 + 0.0, 0.0625};
    for (size_t i = 0; i < sizeof ties / sizeof ties[0]; i++)
        for (int prec = 1; prec <= 17; prec++)
            same(ties[i], prec), same(-ties[i], prec);
}

Test(numfmt, powers_of_ten_and_nines)
{
    for (int k = -30; k <= 40; k++) {
        double p = pow(10.0, k);
        for (int prec = 1; prec <= 17; prec++) {
            same(p, prec);
            same(nextafter(p, 0), prec);
            same(nextafter(p, INFINITY), prec);
            char t[64];
            snprintf(t, sizeof t, "9.%.*se%d", prec, "9999999999999999999", k);
            same(strtod(t, NULL), prec);
            snprintf(t, sizeof t, "9.%.*s5e%d", prec - 1, "9999999999999999999", k);
            same(strtod(t, NULL), prec);
        }
    }
    /* where %g turns to the e-style: 1e-4 .. 1e-5 and 10^P */
    for (int prec = 1; prec <= 17; prec++) {
        same(0.0001, prec), same(0.00009999999, prec), same(0.000099999999999999999, prec);
        same(pow(10.0, prec), prec), same(pow(10.0, prec) - 0.5, prec), same(pow(10.0, prec - 1), prec);
    }
}

Test(numfmt, round_numbers_reports_carry)
{
    for (int i = -100000; i <= 100000; i++) {
        same(i, 9);
        same(i / 10.0, 9);
        same(i / 100.0, 3);
        same(i / 1000.0, 15);
        same(i * 0.001, 9);
    }
}

Test(numfmt, what_the_library_writes)
{
    const double specials[] = {0.0, -0.0, INFINITY, -INFINITY, NAN, DBL_MIN, -DBL_MIN, DBL_MAX, DBL_TRUE_MIN,
                               0x1p-1040, 1e-320, 1e300, 5e-324};
    for (size_t i = 0; i < sizeof specials / sizeof specials[0]; i++)
        for (int prec = 1; prec <= 17; prec++)
            same(specials[i], prec);
    char out[PS_NUMFMT_ROOM];
    cr_expect_eq(ps_fmt_g_fast(out, 1.5, 0), 0u, "precision 0 is left to the C library");
    cr_expect_eq(ps_fmt_g_fast(out, 1.5, 18), 0u, "precision 18 is left to the C library");
    char small[8];
    cr_expect_eq(ps_fmt_g(small, sizeof small, 123.456789, 9), 10u, "snprintf's length when cut");
    cr_expect_str_eq(small, "123.456");
}

/* The numbers of a screening report (9 digits, 1e-6 .. 1e9): the fast part
 * answers nearly all of them (else the writers gain nothing). */
Test(numfmt, fast_part_answers_report_numbers)
{
    fast_answers = tried = 0;
    for (int i = 0; i < 200000; i++)
        same(pow(10.0, -6.0 + 15.0 * uniform01()), 9);
    cr_expect_geq((double)fast_answers, 0.999 * (double)tried, "fast part answered %zu of %zu", fast_answers,
                  tried);
}

/* ps_round_sig is strtod of the text, without the text. */
static void same_value(double x, int prec)
{
    char b[64];
    snprintf(b, sizeof b, "%.*g", prec, x);
    double want = strtod(b, NULL), got = ps_round_sig(x, prec);
    cr_assert(memcmp(&want, &got, sizeof want) == 0 || (isnan(want) && isnan(got)),
              "%%.%dg of %a read back is %a, ps_round_sig %a", prec, x, want, got);
}

Test(numfmt, rounded_value_reads_back_the_same)
{
    for (int i = 0; i < 300000; i++) {
        double x = pow(10.0, -40.0 + 90.0 * uniform01()) * (next_u64() & 1 ? -1 : 1);
        same_value(x, 1 + (int)(next_u64() % 17));
        same_value(x, 4);
    }
    const double specials[] = {0.0, -0.0, INFINITY, -INFINITY, NAN, DBL_MAX, DBL_TRUE_MIN, 9.9995, 0.5, 2.5e-7};
    for (size_t i = 0; i < sizeof specials / sizeof specials[0]; i++)
        for (int prec = 1; prec <= 17; prec++)
            same_value(specials[i], prec);
}

Test(numfmt, integers_as_the_library_writes_them)
{
    const long long edge[] = {0, 1, -1, 9, 10, -10, 999999999, 1000000000, LLONG_MAX, LLONG_MIN, LLONG_MIN + 1};
    char want[32], got[24];
    for (size_t i = 0; i < sizeof edge / sizeof edge[0]; i++) {
        snprintf(want, sizeof want, "%lld", edge[i]);
        cr_assert_eq(ps_fmt_ll(got, edge[i]), strlen(want));
        cr_assert_str_eq(got, want);
    }
    for (int i = 0; i < 200000; i++) {
        long long v = (long long)(next_u64() >> (next_u64() % 64)) * (next_u64() & 1 ? -1 : 1);
        snprintf(want, sizeof want, "%lld", v);
        cr_assert_eq(ps_fmt_ll(got, v), strlen(want));
        cr_assert_str_eq(got, want);
    }
}
