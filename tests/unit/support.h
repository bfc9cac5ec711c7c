/* support.h - helpers shared by the unit tests. */
#ifndef PS_TEST_SUPPORT_H
#define PS_TEST_SUPPORT_H

#include <stddef.h>

/* Turn GSL's aborting handler off (call from every suite's .init). */
void ps_test_init(void);

/* Write text to a fresh temporary file whose name ends in suffix; returns a
 * static path (valid until the next call). */
const char *ps_test_write_temp(const char *suffix, const char *text);
/* A template "$TMPDIR/<stem>XXXXXX" (TMPDIR, else /tmp) in buf, for
 * mkstemp or mkdtemp; returns buf. */
char *ps_test_temp_name(char *buf, size_t n, const char *stem);

/* A CSV file read back by Debian's python3 csv module (strict mode): every
 * cell byte for byte (the script prints each field as hex). Fails the test
 * when the reader rejects the file or the table overflows. */
enum { PS_CSV_ROWS = 16, PS_CSV_COLS = 128, PS_CSV_CELL = 512 };
typedef struct ps_csv_table {
    size_t n_rows;
    size_t n_cols[PS_CSV_ROWS];
    char cell[PS_CSV_ROWS][PS_CSV_COLS][PS_CSV_CELL];
} ps_csv_table;

void ps_test_csv_read(const char *csv_path, ps_csv_table *t);

#endif
