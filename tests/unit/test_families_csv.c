/* test_families_csv.c - the family-study CSV written from a hand-built run,
 * read back by Python's csv module: header, one row per study, cells. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "report/reports.h"
#include "screen/study.h"
#include "support.h"

TestSuite(families_csv, .init = ps_test_init);

static const char *const want_cols[] = {
    "family",           "study",           "parameter",         "state",
    "value",            "passes",          "binding",           "binding_allowed",
    "ms_floor_passing", "ms_floor_failing", "mt_floor_passing", "mt_floor_failing",
    "effort_floor_passing", "effort_floor_failing", "samples",   "seed",
    "valid_units",      "invalid_units",   "pass_fraction",     "pass_ci_low",
    "pass_ci_high",     "most_responsible", "shift_in_std_devs", "redrawn_draws",
    "warning",
};
enum { N_COLS = sizeof want_cols / sizeof want_cols[0] };

/* An id with every character RFC 4180 must quote. */
static const char tricky_id[] = "glide \"gap\", rev\r\nB";

static ps_fam_param param(const char *name, double nominal, size_t n_sweep)
{
    ps_fam_param p;
    memset(&p, 0, sizeof p);
    snprintf(p.name, sizeof p.name, "%s", name);
    p.nominal = nominal;
    p.n_sweep = n_sweep;
    for (size_t i = 0; i < n_sweep; i++)
        p.sweep[i] = nominal * (0.5 + 0.25 * (double)i);
    return p;
}

static ps_family_result *add_family(ps_run *r, const char *id)
{
    ps_family_result *fr = ps_run_next_family(r);
    cr_assert_not_null(fr);
    memset(fr, 0, sizeof *fr);
    snprintf(fr->id, sizeof fr->id, "%s", id);
    fr->line = 191;
    return fr;
}

/* Three families: two boundaries (found with the Mt floor binding,
 * non-monotone) and a yield with a culprit, redrawn draws and invalid
 * units; an evaluation error and no yield; a yield with no culprit. */
static void build_run(ps_run *r)
{
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT};
    ps_run_init(r, &opt);
    cr_assert_eq(ps_run_add_catalog(r, "catalogs/families.yaml", NULL), PS_OK);

    ps_family_result *a = add_family(r, tricky_id);
    a->n_params = 3;
    a->param[0] = param("gap", 0.006, 6);
    a->param[1] = param("coil", 40.0, 3);
    a->param[2] = param("g", 9.81, 0);
    a->n_bound = 2;
    a->bound[0] = (ps_boundary){.param = 0, .state = PS_BOUND_FOUND, .value = 0.00505136715, .pass_below = false,
                                .binding = PS_QTY_MT, .ms_allowed = 2, .mt_allowed = 1.25, .effort_allowed = NAN,
                                .ms_pass = 1.3372264, .ms_fail = 1.3372265, .mt_pass = 1.24999999998599,
                                .mt_fail = 1.25000000010089, .effort_pass = 9.8204166, .effort_fail = 9.8204167,
                                .n_curve = 6};
    a->bound[1] = (ps_boundary){.param = 1, .state = PS_BOUND_NON_MONOTONE, .value = 0.0123, .ms_pass = 3.75,
                                .n_changes = 2, .change_lo = {20, 50}, .change_hi = {30, 60}, .n_curve = 3};
    a->has_yield = true;
    a->yield = (ps_yield){.samples = 2000, .seed = 4294967295UL, .valid = 1928, .invalid = 72, .pass_frac = 0.9515,
                          .pass_lo = 0.94138, .pass_hi = 0.96049, .culprit = 0, .culprit_shift = -2.1837,
                          .redrawn_total = 45};
    snprintf(a->yield.first_error, sizeof a->yield.first_error, "poles: \"sqrt(2*g/gap)\": invalid operation");

    ps_family_result *b = add_family(r, "broken");
    b->n_params = 1;
    b->param[0] = param("b", 30.0, 3);
    b->n_bound = 1;
    b->bound[0] = (ps_boundary){.param = 0, .state = PS_BOUND_ERROR, .value = NAN, .n_curve = 3};
    snprintf(b->bound[0].why, sizeof b->bound[0].why, "expression '-sqrt(b-20)' is not a number at b=10");

    ps_family_result *c = add_family(r, "yield-only");
    c->n_params = 1;
    c->param[0] = param("c", 3.0, 0);
    c->has_yield = true;
    c->yield = (ps_yield){.samples = 500, .seed = 1, .valid = 500, .pass_frac = 1.0, .pass_lo = 0.992385,
                          .pass_hi = 1.0, .culprit = -1, .culprit_shift = NAN};
}

static char *render(const ps_run *r, size_t *len)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    cr_assert_not_null(f);
    cr_assert_eq(ps_write_families_csv(f, r), PS_OK);
    cr_assert_eq(fclose(f), 0);
    *len = n;
    return buf;
}

/* ---- the CSV read back by Python's csv module ---- */

typedef ps_csv_table table;

static void read_back(const char *text, table *t)
{
    char csv_path[256];
    snprintf(csv_path, sizeof csv_path, "%s", ps_test_write_temp(".csv", text));
    ps_test_csv_read(csv_path, t);
    cr_assert_leq(t->n_cols[0], N_COLS);
    for (size_t r = 0; r < t->n_rows; r++)
        cr_assert_leq(t->n_cols[r], N_COLS, "row %zu is wider than the header", r);
    unlink(csv_path);
}

static const char *cell(const table *t, size_t row, const char *name)
{
    for (size_t c = 0; c < N_COLS; c++)
        if (strcmp(want_cols[c], name) == 0)
            return t->cell[row][c];
    cr_assert_fail("no column '%s'", name);
    return NULL;
}

static void assert_near(const char *text, double want, double rel)
{
    char *end;
    double got = strtod(text, &end);
    cr_assert(end != text && *end == '\0', "'%s' is not a number", text);
    cr_assert(fabs(got - want) <= rel * fabs(want), "'%s' != %.12g", text, want);
}

Test(families_csv, one_row_per_study_read_back_by_python)
{
    static ps_run r;
    build_run(&r);
    size_t len;
    char *text = render(&r, &len);
    static table t;
    read_back(text, &t);

    /* header, 2 boundaries + yield, 1 boundary, 1 yield */
    cr_assert_eq(t.n_rows, 1 + 3 + 1 + 1);
    for (size_t i = 0; i < t.n_rows; i++)
        cr_assert_eq(t.n_cols[i], N_COLS, "row %zu has %zu cells", i, t.n_cols[i]);
    for (size_t c = 0; c < N_COLS; c++)
        cr_assert_str_eq(t.cell[0][c], want_cols[c]);

    /* A found boundary: value, side, the binding floor with its allowed value
     * and the three floors either side; no yield cells. */
    cr_assert_str_eq(cell(&t, 1, "family"), tricky_id);
    cr_assert_str_eq(cell(&t, 1, "study"), "boundary");
    cr_assert_str_eq(cell(&t, 1, "parameter"), "gap");
    cr_assert_str_eq(cell(&t, 1, "state"), "found");
    assert_near(cell(&t, 1, "value"), 0.00505136715, 1e-9);
    cr_assert_str_eq(cell(&t, 1, "passes"), "above");
    cr_assert_str_eq(cell(&t, 1, "binding"), "Mt");
    assert_near(cell(&t, 1, "binding_allowed"), 1.25, 0);
    assert_near(cell(&t, 1, "ms_floor_passing"), 1.3372264, 1e-9);
    assert_near(cell(&t, 1, "ms_floor_failing"), 1.3372265, 1e-9);
    assert_near(cell(&t, 1, "mt_floor_passing"), 1.24999999998599, 1e-9);
    assert_near(cell(&t, 1, "mt_floor_failing"), 1.25000000010089, 1e-9);
    assert_near(cell(&t, 1, "effort_floor_passing"), 9.8204166, 1e-9);
    assert_near(cell(&t, 1, "effort_floor_failing"), 9.8204167, 1e-9);
    static const char *const yield_cols[] = {"samples",       "seed",         "valid_units",      "invalid_units",
                                             "pass_fraction", "pass_ci_low",  "pass_ci_high",     "most_responsible",
                                             "shift_in_std_devs", "redrawn_draws", "warning"};
    for (size_t i = 0; i < sizeof yield_cols / sizeof yield_cols[0]; i++) {
        cr_assert_str_empty(cell(&t, 1, yield_cols[i]), "%s", yield_cols[i]);
        cr_assert_str_empty(cell(&t, 2, yield_cols[i]), "%s", yield_cols[i]);
        cr_assert_str_empty(cell(&t, 4, yield_cols[i]), "%s", yield_cols[i]);
    }

    /* Not monotone: state only, even where the record holds stray numbers. */
    cr_assert_str_eq(cell(&t, 2, "parameter"), "coil");
    cr_assert_str_eq(cell(&t, 2, "state"), "non-monotone");
    static const char *const found_cols[] = {"value",            "passes",           "binding",
                                             "binding_allowed",  "ms_floor_passing", "ms_floor_failing",
                                             "mt_floor_passing", "mt_floor_failing", "effort_floor_passing",
                                             "effort_floor_failing"};
    for (size_t i = 0; i < sizeof found_cols / sizeof *found_cols; i++) {
        cr_assert_str_empty(cell(&t, 2, found_cols[i]), "%s", found_cols[i]);
        cr_assert_str_empty(cell(&t, 4, found_cols[i]), "%s", found_cols[i]);
    }

    /* The yield of the first family: sample count, seed, share, interval, culprit. */
    cr_assert_str_eq(cell(&t, 3, "family"), tricky_id);
    cr_assert_str_eq(cell(&t, 3, "study"), "yield");
    static const char *const bound_cols[] = {"parameter",        "state",            "value",
                                             "passes",           "binding",          "binding_allowed",
                                             "ms_floor_passing", "ms_floor_failing", "mt_floor_passing",
                                             "mt_floor_failing", "effort_floor_passing", "effort_floor_failing"};
    for (size_t i = 0; i < sizeof bound_cols / sizeof *bound_cols; i++) {
        cr_assert_str_empty(cell(&t, 3, bound_cols[i]), "%s", bound_cols[i]);
        cr_assert_str_empty(cell(&t, 5, bound_cols[i]), "%s", bound_cols[i]);
    }
    cr_assert_str_eq(cell(&t, 3, "samples"), "2000");
    cr_assert_str_eq(cell(&t, 3, "seed"), "4294967295");
    assert_near(cell(&t, 3, "pass_fraction"), 0.9515, 1e-9);
    assert_near(cell(&t, 3, "pass_ci_low"), 0.94138, 1e-9);
    assert_near(cell(&t, 3, "pass_ci_high"), 0.96049, 1e-9);
    cr_assert_str_eq(cell(&t, 3, "valid_units"), "1928");
    cr_assert_str_eq(cell(&t, 3, "invalid_units"), "72");
    cr_assert_str_eq(cell(&t, 3, "redrawn_draws"), "45");
    cr_assert_str_eq(cell(&t, 3, "most_responsible"), "gap");
    assert_near(cell(&t, 3, "shift_in_std_devs"), -2.1837, 1e-9);
    cr_assert_str_eq(cell(&t, 3, "warning"), "72 of 2000 units could not be evaluated (invalid units, left out of "
                                             "every share); the first: poles: \"sqrt(2*g/gap)\": invalid operation");

    /* The evaluation error: its state, nothing else. */
    cr_assert_str_eq(cell(&t, 4, "family"), "broken");
    cr_assert_str_eq(cell(&t, 4, "study"), "boundary");
    cr_assert_str_eq(cell(&t, 4, "parameter"), "b");
    cr_assert_str_eq(cell(&t, 4, "state"), "evaluation-error");

    /* A yield with no failing unit has no culprit: both cells empty. */
    cr_assert_str_eq(cell(&t, 5, "family"), "yield-only");
    cr_assert_str_eq(cell(&t, 5, "samples"), "500");
    cr_assert_str_eq(cell(&t, 5, "seed"), "1");
    assert_near(cell(&t, 5, "pass_fraction"), 1.0, 0);
    assert_near(cell(&t, 5, "pass_ci_low"), 0.992385, 1e-9);
    cr_assert_str_empty(cell(&t, 5, "most_responsible"));
    cr_assert_str_empty(cell(&t, 5, "shift_in_std_devs"));
    cr_assert_str_eq(cell(&t, 5, "invalid_units"), "0");
    cr_assert_str_eq(cell(&t, 5, "redrawn_draws"), "0");
    cr_assert_str_empty(cell(&t, 5, "warning"), "no warning when every unit could be evaluated");

    free(text);
    ps_run_free(&r);
}

/* RFC 4180: every line ends in CRLF, and the only bare LF is inside the quoted id. */
Test(families_csv, lines_end_in_crlf)
{
    static ps_run r;
    build_run(&r);
    size_t len;
    char *text = render(&r, &len);
    cr_assert_eq(strlen(text), len, "no NUL inside the document");
    cr_assert(len > 2 && text[len - 2] == '\r' && text[len - 1] == '\n');
    size_t crlf = 0;
    for (size_t i = 0; i < len; i++)
        if (text[i] == '\n') {
            cr_assert(i > 0 && text[i - 1] == '\r', "bare LF at byte %zu", i);
            crlf++;
        }
    cr_assert_eq(crlf, 6 + 3, "six records and the CRLF inside the id of each of its three rows");
    cr_assert_not_null(strstr(text, "\"glide \"\"gap\"\", rev\r\nB\""), "the id quoted, its quotes doubled");
    free(text);
    ps_run_free(&r);
}

Test(families_csv, no_families_gives_the_header_only)
{
    static ps_run r;
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT};
    ps_run_init(&r, &opt);
    size_t len;
    char *text = render(&r, &len);
    static table t;
    read_back(text, &t);
    cr_assert_eq(t.n_rows, 1);
    cr_assert_eq(t.n_cols[0], N_COLS);
    free(text);
    ps_run_free(&r);
}

Test(families_csv, write_errors_are_reported)
{
    static ps_run r;
    build_run(&r);
    FILE *f = fopen("/dev/null", "r"); /* every write fails and sets the error flag */
    cr_assert_not_null(f);
    cr_assert_eq(ps_write_families_csv(f, &r), PS_ERR_IO);
    fclose(f);
    ps_run_free(&r);
}
