/* csv_cells.c - see csv_cells.h. */
#include "report/csv_cells.h"

#include <math.h>
#include <string.h>

#include "core/numfmt.h"

/* One cell as given, quoted when RFC 4180 asks for it; guard: a leading
 * apostrophe written inside the cell, before s. */
static void cell_put(ps_csv_out *o, const char *s, bool guard)
{
    if (o->n_cells++ > 0)
        fputc(',', o->f);
    if (!s)
        return;
    if (strpbrk(s, ",\"\r\n") == NULL) {
        if (guard)
            fputc('\'', o->f);
        fputs(s, o->f);
        return;
    }
    fputc('"', o->f);
    if (guard)
        fputc('\'', o->f);
    for (const char *c = s, *q; *c; c = q + 1) { /* up to and with each '"', then it again */
        q = strchr(c, '"');
        if (!q) {
            fputs(c, o->f);
            break;
        }
        fwrite(c, 1, (size_t)(q - c) + 1, o->f);
        fputc('"', o->f);
    }
    fputc('"', o->f);
}

bool ps_csv_text_guarded(const char *s)
{
    return s && s[0] != '\0' && strchr("=+-@\t\r", s[0]) != NULL;
}

void ps_csv_text(ps_csv_out *o, const char *s)
{
    cell_put(o, s, ps_csv_text_guarded(s));
}

void ps_csv_num(ps_csv_out *o, double x)
{
    char buf[40];
    if (!isfinite(x)) {
        cell_put(o, NULL, false);
        return;
    }
    ps_fmt_g(buf, sizeof buf, x, 9);
    cell_put(o, buf, false);
}

void ps_csv_unsigned(ps_csv_out *o, unsigned long long n)
{
    char buf[32];
    snprintf(buf, sizeof buf, "%llu", n);
    cell_put(o, buf, false);
}

void ps_csv_row_end(ps_csv_out *o, size_t width)
{
    while (o->n_cells < width)
        cell_put(o, NULL, false);
    fputs("\r\n", o->f);
    o->n_cells = 0;
}
