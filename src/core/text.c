/* text.c - appends into a fixed buffer (see text.h). */
#include "core/text.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>

ps_text ps_text_on(char *buf, size_t n)
{
    buf[0] = '\0';
    return (ps_text){buf, n, 0};
}

void ps_text_put(ps_text *t, const char *fmt, ...)
{
    if (t->len + 1 >= t->n)
        return;
    va_list ap;
    va_start(ap, fmt);
    int w = vsnprintf(t->buf + t->len, t->n - t->len, fmt, ap);
    va_end(ap);
    if (w > 0)
        t->len = t->len + (size_t)w < t->n ? t->len + (size_t)w : t->n - 1;
}

const char *ps_text_big(char *buf, size_t n, double value, double ln, int sig)
{
    if (isfinite(value) || !(value > 0) || !isfinite(ln)) {
        snprintf(buf, n, "%.*g", sig, value);
        return buf;
    }
    /* value = 10^x, x = ln / ln 10 = e + f: mantissa 10^f in [1, 10),
     * rounded to sig digits (a mantissa that rounds to 10 moves the exponent). */
    double x = ln / log(10.0), e = floor(x);
    char m[32];
    snprintf(m, sizeof m, "%.*g", sig, pow(10.0, x - e));
    if (strtod(m, NULL) >= 10.0) {
        e += 1.0;
        snprintf(m, sizeof m, "%.*g", sig, pow(10.0, x - e));
    }
    snprintf(buf, n, "%se%+.0f", m, e);
    return buf;
}

void ps_text_put_big(ps_text *t, double value, double ln, int sig)
{
    char b[48];
    ps_text_put(t, "%s", ps_text_big(b, sizeof b, value, ln, sig));
}
