/* text.c - appends into a fixed buffer (see text.h). */
#include "core/text.h"

#include <stdarg.h>
#include <stdio.h>

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
