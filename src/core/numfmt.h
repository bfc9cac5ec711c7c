/* numfmt.h - numbers written the way the C library's "%.*g" writes them,
 * faster. The report writers put tens of numbers a plant into every file;
 * at a million plants printf's exact decimal conversion was a fifth of the
 * time spent writing them. */
#ifndef PS_NUMFMT_H
#define PS_NUMFMT_H

#include <stddef.h>

/* Write x as snprintf(out, n, "%.*g", prec, x) would (the same bytes) and
 * return the length. n must be at least PS_NUMFMT_ROOM. The digits are
 * worked out in extended precision where that decides the rounding beyond
 * doubt; near a rounding tie, outside the range of exact powers of ten, for
 * zero, infinities, NaN, a precision outside 1..17, or where long double is
 * not wider than double, the C library writes them. */
enum { PS_NUMFMT_ROOM = 40 };
size_t ps_fmt_g(char *out, size_t n, double x, int prec);

/* The extended-precision part alone: the same bytes into out (at least
 * PS_NUMFMT_ROOM bytes) and their length, or 0 where it leaves x to the C
 * library (the cases above). Exposed for the tests, which check both that
 * it agrees with snprintf and how often it answers. */
size_t ps_fmt_g_fast(char *out, double x, int prec);

/* x rounded to prec significant decimal digits: the double that strtod
 * reads back from "%.*g" of x (the same value, without the text). */
double ps_round_sig(double x, int prec);

/* v in decimal as "%lld" writes it, into out (at least 24 bytes); the length. */
size_t ps_fmt_ll(char *out, long long v);

#endif
