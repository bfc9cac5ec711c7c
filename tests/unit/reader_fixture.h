/* reader_fixture.h - the shared fixture of the catalog reader tests: a callback that
 * records every entry the reader hands out, and per-test set-up. Included by
 * test_yaml_reader.c and test_csv_reader.c only (one translation unit each). */
#ifndef PS_READER_FIXTURE_H
#define PS_READER_FIXTURE_H

#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include "catalog/catalog.h"
#include "support.h"

enum { KEEP = 8 };

/* Collects what the reader hands out: every call, and copies of the first few. */
typedef struct collector {
    size_t calls, errors, stop_after;
    ps_plant *kept; /* KEEP plants */
    bool failed[KEEP];
    ps_diag diag[KEEP];
} collector;

static int collect(void *ctx, ps_plant *p, const ps_diag *err)
{
    collector *c = ctx;
    if (c->calls < KEEP) {
        c->kept[c->calls] = *p;
        c->failed[c->calls] = err != NULL;
        if (err)
            c->diag[c->calls] = *err;
    }
    c->calls++;
    c->errors += err != NULL;
    return c->stop_after && c->calls >= c->stop_after;
}

static ps_plant *scratch;
static collector col;
static ps_diag fd;

static void setup(void)
{
    ps_test_init();
    scratch = malloc(sizeof *scratch);
    memset(&col, 0, sizeof col);
    col.kept = calloc(KEEP, sizeof *col.kept);
    memset(&fd, 0, sizeof fd);
}

static void teardown(void)
{
    free(scratch);
    free(col.kept);
}

#endif
