/* diag.c - filling diagnostic records. */
#include "core/diag.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

ps_status ps_diag_vset(ps_diag *d, ps_status st, size_t line, size_t col, const char *field,
                       const char *fmt, va_list ap)
{
    if (!d)
        return st;
    d->line = line;
    d->col = col;
    snprintf(d->field, sizeof d->field, "%s", field ? field : "");
    vsnprintf(d->text, sizeof d->text, fmt, ap);
    return st;
}

ps_status ps_diag_set(ps_diag *d, ps_status st, size_t line, size_t col,
                      const char *field, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    ps_diag_vset(d, st, line, col, field, fmt, ap);
    va_end(ap);
    return st;
}

void ps_diag_clear(ps_diag *d)
{
    if (!d)
        return;
    d->line = d->col = 0;
    d->field[0] = d->text[0] = '\0';
}

const char *ps_diag_pos(char *out, size_t n, size_t line, size_t col)
{
    if (line == 0)
        snprintf(out, n, "%s", "");
    else if (col == 0)
        snprintf(out, n, ":%zu", line);
    else
        snprintf(out, n, ":%zu:%zu", line, col);
    return out;
}

const char *ps_diag_pos_words(char *out, size_t n, size_t line, size_t col)
{
    if (line == 0)
        snprintf(out, n, "%s", "");
    else if (col == 0)
        snprintf(out, n, "line %zu", line);
    else
        snprintf(out, n, "line %zu, column %zu", line, col);
    return out;
}
