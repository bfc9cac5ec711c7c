/* numfmt.c - see numfmt.h.
 *
 * "%.*g" with P significant digits (ISO C 7.21.6.1): X is the decimal
 * exponent of x once rounded to P digits; X < -4 or X >= P gives the style
 * d.ddde+XX (at least two exponent digits), otherwise plain decimals with
 * P - 1 - X digits after the point; trailing zeros of the fraction go, and
 * the point with them when nothing is left.
 *
 * The P digits are the integer nearest to s = |x| 10^(P-1-X). With
 * |P-1-X| <= 27 the power of ten is exact in a 64-bit significand
 * (5^27 < 2^63), so s takes one rounding of at most 2^-64 relative: s is
 * within err = s 2^-62 of the exact value. The answer is taken only when
 * no half-integer lies within err of s: then the exact value rounds to the
 * same integer as s does (an integer within err of s is no doubt: the exact
 * value rounds to it from either side), and near either end of
 * [10^(P-1), 10^P) the carry below gives the digits and exponent that the
 * neighbouring exponent would; otherwise the C library answers. */
#include "core/numfmt.h"

#include <float.h>
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#if LDBL_MANT_DIG >= 64
static const long double pow10l_exact[28] = {
    1e0L,  1e1L,  1e2L,  1e3L,  1e4L,  1e5L,  1e6L,  1e7L,  1e8L,  1e9L,  1e10L, 1e11L, 1e12L, 1e13L,
    1e14L, 1e15L, 1e16L, 1e17L, 1e18L, 1e19L, 1e20L, 1e21L, 1e22L, 1e23L, 1e24L, 1e25L, 1e26L, 1e27L,
};

/* Whether long double arithmetic really carries 64 bits here (an emulator
 * may compute it in double precision). */
static bool wide_enough(void)
{
    volatile long double one = 1.0L, tiny = 0x1p-63L;
    return one + tiny != one;
}

/* The P digits of ax (> 0, finite) into dig and its exponent into *x10;
 * false where the rounding is not beyond doubt. */
static bool digits_of(double ax, int p, char *dig, unsigned long long *whole_digits, int *x10)
{
    int e2;
    frexp(ax, &e2); /* ax in [2^(e2-1), 2^e2) */
    int e = (int)floor((e2 - 1) * 0.30102999566398120); /* floor(log10 ax), or one less */
    long double lo = pow10l_exact[p - 1], hi = pow10l_exact[p];
    for (int tries = 0; tries < 3; tries++) {
        int k = p - 1 - e;
        if (k > 27 || k < -27)
            return false;
        long double s = k >= 0 ? (long double)ax * pow10l_exact[k] : (long double)ax / pow10l_exact[-k];
        long double err = s * 0x1p-62L;
        if (s < lo - err) {
            e--;
            continue;
        }
        if (s >= hi + err) {
            e++;
            continue;
        }
        long double whole = floorl(s), frac = s - whole;
        if (fabsl(frac - 0.5L) <= err) /* near an integer is no doubt: it rounds to it either way */
            return false;
        unsigned long long d = (unsigned long long)whole + (frac > 0.5L);
        if (d == (unsigned long long)hi) { /* 9.99...5 up to the next power of ten */
            d = (unsigned long long)lo;
            e++;
        }
        *whole_digits = d;
        for (int i = p - 1; i >= 0; i--) {
            dig[i] = (char)('0' + d % 10);
            d /= 10;
        }
        *x10 = e;
        return true;
    }
    return false;
}
#endif

size_t ps_fmt_g_fast(char *out, double x, int prec)
{
#if LDBL_MANT_DIG >= 64
    if (prec < 1 || prec > 17 || !isfinite(x) || x == 0 || !wide_enough())
        return 0;
    char dig[18];
    unsigned long long d;
    int e;
    if (!digits_of(fabs(x), prec, dig, &d, &e))
        return 0;
    int nd = prec; /* the digits left once trailing zeros go */
    while (nd > 1 && dig[nd - 1] == '0')
        nd--;
    char *o = out;
    if (signbit(x))
        *o++ = '-';
    if (e < -4 || e >= prec) {
        *o++ = dig[0];
        if (nd > 1) {
            *o++ = '.';
            memcpy(o, dig + 1, (size_t)nd - 1);
            o += nd - 1;
        }
        *o++ = 'e';
        *o++ = e < 0 ? '-' : '+';
        int ae = e < 0 ? -e : e;
        if (ae >= 100) {
            *o++ = (char)('0' + ae / 100);
            ae %= 100;
        }
        *o++ = (char)('0' + ae / 10);
        *o++ = (char)('0' + ae % 10);
    } else if (e >= 0) {
        memcpy(o, dig, (size_t)e + 1);
        o += e + 1;
        if (nd > e + 1) {
            *o++ = '.';
            memcpy(o, dig + e + 1, (size_t)(nd - e - 1));
            o += nd - e - 1;
        }
    } else {
        *o++ = '0';
        *o++ = '.';
        for (int i = 0; i < -e - 1; i++)
            *o++ = '0';
        memcpy(o, dig, (size_t)nd);
        o += nd;
    }
    *o = '\0';
    return (size_t)(o - out);
#else
    (void)out;
    (void)x;
    (void)prec;
    return 0;
#endif
}

size_t ps_fmt_g(char *out, size_t n, double x, int prec)
{
    if (n >= PS_NUMFMT_ROOM) {
        size_t len = ps_fmt_g_fast(out, x, prec);
        if (len)
            return len;
    }
    int len = snprintf(out, n, "%.*g", prec, x);
    return len < 0 ? 0 : (size_t)len;
}

double ps_round_sig(double x, int prec)
{
#if LDBL_MANT_DIG >= 64
    /* D 10^k with D < 2^53 and |k| <= 22: one correctly rounded product or
     * quotient of exact doubles, which is what strtod returns (Clinger,
     * PLDI 1990, the fast path). */
    static const double pow10_exact[23] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
                                           1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
    if (prec >= 1 && prec <= 15 && isfinite(x) && x != 0 && wide_enough()) {
        char dig[18];
        unsigned long long d;
        int e;
        if (digits_of(fabs(x), prec, dig, &d, &e)) {
            int k = e - (prec - 1);
            if (k >= -22 && k <= 22) {
                double v = k >= 0 ? (double)d * pow10_exact[k] : (double)d / pow10_exact[-k];
                return signbit(x) ? -v : v;
            }
        }
    }
#endif
    char b[PS_NUMFMT_ROOM];
    snprintf(b, sizeof b, "%.*g", prec, x);
    return strtod(b, NULL);
}

size_t ps_fmt_ll(char *out, long long v)
{
    char rev[24];
    size_t n = 0;
    unsigned long long u = v < 0 ? 0ull - (unsigned long long)v : (unsigned long long)v;
    do {
        rev[n++] = (char)('0' + u % 10);
        u /= 10;
    } while (u);
    char *o = out;
    if (v < 0)
        *o++ = '-';
    while (n)
        *o++ = rev[--n];
    *o = '\0';
    return (size_t)(o - out);
}
