/* csv_cells.h - RFC 4180 cells shared by the CSV reports: a cell holding a
 * comma, double quote, CR or LF is quoted with its quotes doubled; numbers
 * "%.9g" in the C locale; a NULL text or a non-finite number is an empty
 * cell; rows end in CRLF. A text cell that begins with '=', '+', '-', '@',
 * a tab or a CR gets a leading apostrophe inside the cell, so that a
 * spreadsheet shows it as text instead of running it as a formula (common
 * practice against formula injection); numbers are never guarded. */
#ifndef PS_CSV_CELLS_H
#define PS_CSV_CELLS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

typedef struct ps_csv_out {
    FILE *f;
    size_t n_cells; /* cells written in the current row */
} ps_csv_out;

/* True when ps_csv_text writes s with the leading apostrophe. */
bool ps_csv_text_guarded(const char *s);
/* A text cell (NULL: empty), guarded as above. */
void ps_csv_text(ps_csv_out *o, const char *s);
/* A number cell, never guarded: -1.5 stays a number. */
void ps_csv_num(ps_csv_out *o, double x);
void ps_csv_unsigned(ps_csv_out *o, unsigned long long n);
/* Pad the row with empty cells to width, then end it. */
void ps_csv_row_end(ps_csv_out *o, size_t width);

#endif
