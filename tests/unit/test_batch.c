/* test_batch.c - the per-entry pipeline: every entry ends as a model or an
 * error (count invariant), duplicate ids across catalogs, file failures. */
#include <criterion/criterion.h>
#include <stdio.h>
#include <string.h>

#include "batch/batch.h"
#include "support.h"

TestSuite(batch, .init = ps_test_init);

typedef struct seen {
    size_t models, errors;
    char last_error[PS_DIAG_TEXT];
    double last_ms;
} seen;

static void record(void *ctx, const ps_outcome *o)
{
    seen *s = ctx;
    if (o->err) {
        s->errors++;
        snprintf(s->last_error, sizeof s->last_error, "%s", o->err->text);
    } else {
        s->models++;
        cr_assert_not_null(o->an);
        cr_assert_not_null(o->fl);
        s->last_ms = o->fl->ms;
    }
}

Test(batch, count_invariant_and_duplicates_across_catalogs)
{
    seen s = {0};
    ps_batch *b = ps_batch_new(record, &s);
    cr_assert_not_null(b);
    char a_path[256], c_path[256];
    snprintf(a_path, sizeof a_path, "%s", ps_test_write_temp(".yaml",
             "plants:\n"
             "  - id: w-1\n    zeros: [26]\n    poles: [6, -9.5]\n    gain: 2.1\n"
             "  - id: w-2\n    numerator: [1]\n    denominator: [1, x]\n"
             "  - id: w-3\n    numerator: [1]\n    denominator: [1, 3.3]\n"));
    snprintf(c_path, sizeof c_path, "%s", ps_test_write_temp(".csv",
             "id,numerator,denominator\n"
             "w-3,1,1 4.4\n"
             "w-4,2,1 0 -7.7\n"));
    ps_diag fd = {0};
    cr_assert_eq(ps_batch_run(b, a_path, &fd), PS_OK, "%s", fd.text);
    cr_assert_eq(s.models, 2); /* w-1, w-3; w-2 has a bad coefficient */
    cr_assert_eq(s.errors, 1);
    cr_assert_eq(ps_batch_run(b, c_path, &fd), PS_OK, "%s", fd.text);
    const ps_batch_counts *c = ps_batch_counts_get(b);
    cr_assert_eq(c->entries, 5);
    cr_assert_eq(c->entries, c->models + c->errors);
    cr_assert_eq(c->models, 3);
    cr_assert_eq(c->errors, 2);
    cr_assert_eq(s.models + s.errors, 5);
    cr_assert(strstr(s.last_error, "duplicate id 'w-3'") != NULL, "%s", s.last_error);
    cr_assert_eq(ps_batch_run(b, "no/such/catalog.yaml", &fd), PS_ERR_IO);
    cr_assert_eq(ps_batch_counts_get(b)->files_failed, 1);
    ps_batch_free(b);
    remove(a_path);
    remove(c_path);
}

Test(batch, floors_reach_the_sink)
{
    seen s = {0};
    ps_batch *b = ps_batch_new(record, &s);
    const char *path = ps_test_write_temp(".yaml", "plants:\n  - id: air\n    zeros: [26]\n    poles: [6, -9.5]\n    gain: 2.1\n");
    ps_diag fd = {0};
    cr_assert_eq(ps_batch_run(b, path, &fd), PS_OK, "%s", fd.text);
    cr_assert_float_eq(s.last_ms, 1.6, 1e-10); /* Stein 2003: (26+6)/(26-6) */
    ps_batch_free(b);
    remove(path);
}
