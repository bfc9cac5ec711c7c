/* support.c - helpers shared by the unit tests. */
#define _GNU_SOURCE
#include "support.h"

#include <criterion/criterion.h>

#include <gsl/gsl_errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#ifndef PS_ORACLE_PYTHON /* executables built without the test definitions (xcheck) */
#define PS_ORACLE_PYTHON ""
#endif

void ps_test_init(void) { gsl_set_error_handler_off(); }

char *ps_test_temp_name(char *buf, size_t n, const char *stem)
{
    const char *dir = getenv("TMPDIR");
    snprintf(buf, n, "%s/%sXXXXXX", dir && dir[0] ? dir : "/tmp", stem);
    return buf;
}

const char *ps_test_write_temp(const char *suffix, const char *text)
{
    static char path[256];
    const char *dir = getenv("TMPDIR");
    snprintf(path, sizeof path, "%s/pstestXXXXXX%s", dir ? dir : "/tmp", suffix);
    int fd = mkstemps(path, (int)strlen(suffix));
    if (fd < 0)
        return NULL;
    size_t n = strlen(text);
    if (write(fd, text, n) != (ssize_t)n) {
        close(fd);
        return NULL;
    }
    close(fd);
    return path;
}

static int hexval(char c)
{
    return c >= '0' && c <= '9' ? c - '0' : c >= 'a' && c <= 'f' ? c - 'a' + 10 : -1;
}

static const char csv_reader_script[] =
    "import csv, sys\n"
    "with open(sys.argv[1], newline='') as f:\n"
    "    for row in csv.reader(f, strict=True):\n"
    "        print(' '.join('=' + c.encode('utf-8').hex() for c in row))\n";

void ps_test_csv_read(const char *csv_path, ps_csv_table *t)
{
    cr_assert(strlen(PS_ORACLE_PYTHON) > 0, "Debian python3 not found at configure time");
    char script[256], cmd[1024];
    snprintf(script, sizeof script, "%s", ps_test_write_temp(".py", csv_reader_script));
    snprintf(cmd, sizeof cmd, "'%s' '%s' '%s'", PS_ORACLE_PYTHON, script, csv_path);
    FILE *p = popen(cmd, "r");
    cr_assert_not_null(p);
    memset(t, 0, sizeof *t);
    char *line = NULL;
    size_t cap = 0;
    while (getline(&line, &cap, p) > 0) {
        cr_assert_lt(t->n_rows, PS_CSV_ROWS);
        size_t col = 0;
        for (char *tok = strtok(line, " \n"); tok; tok = strtok(NULL, " \n")) {
            cr_assert_eq(tok[0], '=', "bad reader output '%s'", tok);
            cr_assert_lt(col, PS_CSV_COLS);
            size_t hex = strlen(tok + 1);
            cr_assert_lt(hex / 2, PS_CSV_CELL);
            char *out = t->cell[t->n_rows][col];
            for (size_t i = 0; i < hex / 2; i++)
                out[i] = (char)(hexval(tok[1 + 2 * i]) * 16 + hexval(tok[2 + 2 * i]));
            col++;
        }
        t->n_cols[t->n_rows++] = col;
    }
    free(line);
    cr_assert_eq(pclose(p), 0, "the CSV reader rejected the file");
    unlink(script);
}
