/* csv_cells.h - RFC 4180 cells shared by the CSV reports: a cell holding a
 * comma, double quote, CR or LF is quoted with its quotes doubled; numbers
 * "%.9g" in the C locale; a NULL text or a non-finite number is an empty
 * cell; rows end in CRLF. */
#ifndef PS_CSV_CELLS_H
#define PS_CSV_CELLS_H

#include <stddef.h>
#include <stdio.h>

typedef struct ps_csv_out {
    FILE *f;
    size_t n_cells; /* cells written in the current row */
} ps_csv_out;

void ps_csv_text(ps_csv_out *o, const char *s);
void ps_csv_num(ps_csv_out *o, double x);
void ps_csv_unsigned(ps_csv_out *o, unsigned long long n);
/* Pad the row with empty cells to width, then end it. */
void ps_csv_row_end(ps_csv_out *o, size_t width);

#endif
