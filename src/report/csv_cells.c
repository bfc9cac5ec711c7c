/* csv_cells.c - see csv_cells.h. */
#include "report/csv_cells.h"

#include <math.h>
#include <string.h>

void ps_csv_text(ps_csv_out *o, const char *s)
{
    if (o->n_cells++ > 0)
        fputc(',', o->f);
    if (!s)
        return;
    if (strpbrk(s, ",\"\r\n") == NULL) {
        fputs(s, o->f);
        return;
    }
    fputc('"', o->f);
    for (const char *c = s; *c; c++) {
        if (*c == '"')
            fputc('"', o->f);
        fputc(*c, o->f);
    }
    fputc('"', o->f);
}

void ps_csv_num(ps_csv_out *o, double x)
{
    char buf[40];
    if (!isfinite(x)) {
        ps_csv_text(o, NULL);
        return;
    }
    snprintf(buf, sizeof buf, "%.9g", x);
    ps_csv_text(o, buf);
}

void ps_csv_unsigned(ps_csv_out *o, unsigned long long n)
{
    char buf[32];
    snprintf(buf, sizeof buf, "%llu", n);
    ps_csv_text(o, buf);
}

void ps_csv_row_end(ps_csv_out *o, size_t width)
{
    while (o->n_cells < width)
        ps_csv_text(o, NULL);
    fputs("\r\n", o->f);
    o->n_cells = 0;
}
