/* families_csv.c - the family studies of a screening run as one RFC 4180
 * table: one row per boundary (one swept parameter) and per yield study. */
#include "report/reports.h"

#include <assert.h>
#include <math.h>
#include <stdbool.h>
#include <string.h>

#include "report/csv_cells.h"
#include "screen/study.h"

/* Cell conventions are those of the plant CSV (csv_report.c): numbers as
 * "%.9g" in the C locale, an EMPTY cell where the column does not apply to
 * the study (a boundary has no samples, a yield no parameter) or has no
 * finite value; CRLF line ends; a field holding a comma, a double quote, CR
 * or LF is quoted with its quotes doubled (report/csv_cells.c). */

static const char *const cols[] = {
    "family",          "study",          "parameter",           "state",
    "value",           "passes",         "binding",             "binding_allowed",
    "ms_floor_passing", "ms_floor_failing", "mt_floor_passing", "mt_floor_failing",
    "effort_floor_passing", "effort_floor_failing", "samples",   "seed",
    "valid_units",     "invalid_units",  "pass_fraction",       "pass_ci_low",
    "pass_ci_high",    "most_responsible", "shift_in_std_devs", "redrawn_draws",
    "warning",
};
enum { N_COLS = sizeof cols / sizeof cols[0], N_BOUND_COLS = 14 /* family .. effort_floor_failing */ };

typedef ps_csv_out fam_csv;

static void cell_text(fam_csv *o, const char *s) { ps_csv_text(o, s); }
static void cell_num(fam_csv *o, double x) { ps_csv_num(o, x); }
static void cell_unsigned(fam_csv *o, unsigned long long n) { ps_csv_unsigned(o, n); }

static void row_end(fam_csv *o)
{
    assert(o->n_cells <= N_COLS); /* no row wider than the header */
    ps_csv_row_end(o, N_COLS);
}

static double binding_allowed(const ps_boundary *b)
{
    switch (b->binding) {
    case PS_QTY_MS: return b->ms_allowed;
    case PS_QTY_MT: return b->mt_allowed;
    case PS_QTY_EFFORT: return b->effort_allowed;
    default: return NAN;
    }
}

static void boundary_row(fam_csv *o, const ps_family_result *fr, const ps_boundary *b)
{
    bool found = b->state == PS_BOUND_FOUND;
    cell_text(o, fr->id);
    cell_text(o, "boundary");
    cell_text(o, b->param < fr->n_params ? fr->param[b->param].name : NULL);
    cell_text(o, ps_bound_state_name(b->state));
    cell_num(o, found ? b->value : NAN);
    cell_text(o, found ? (b->pass_below ? "below" : "above") : NULL);
    cell_text(o, found ? ps_quantity_key(b->binding) : NULL);
    cell_num(o, found ? binding_allowed(b) : NAN);
    cell_num(o, found ? b->ms_pass : NAN);
    cell_num(o, found ? b->ms_fail : NAN);
    cell_num(o, found ? b->mt_pass : NAN);
    cell_num(o, found ? b->mt_fail : NAN);
    cell_num(o, found ? b->effort_pass : NAN);
    cell_num(o, found ? b->effort_fail : NAN);
    row_end(o);
}

static void yield_row(fam_csv *o, const ps_family_result *fr)
{
    const ps_yield *y = &fr->yield;
    bool culprit = y->culprit >= 0 && (size_t)y->culprit < fr->n_params;
    char warning[PS_DIAG_TEXT + 200];
    ps_yield_warning_text(fr, warning, sizeof warning);
    cell_text(o, fr->id);
    cell_text(o, "yield");
    for (int i = 2; i < N_BOUND_COLS; i++) /* parameter .. effort_floor_failing: boundary columns */
        cell_text(o, NULL);
    cell_unsigned(o, y->samples);
    cell_unsigned(o, y->seed);
    cell_unsigned(o, y->valid);
    cell_unsigned(o, y->invalid);
    cell_num(o, y->pass_frac);
    cell_num(o, y->pass_lo);
    cell_num(o, y->pass_hi);
    cell_text(o, culprit ? fr->param[y->culprit].name : NULL);
    cell_num(o, culprit ? y->culprit_shift : NAN);
    cell_unsigned(o, y->redrawn_total);
    cell_text(o, warning[0] ? warning : NULL);
    row_end(o);
}

ps_status ps_write_families_csv(FILE *f, const ps_run *r)
{
    fam_csv o = {.f = f, .n_cells = 0};
    for (size_t i = 0; i < N_COLS; i++)
        cell_text(&o, cols[i]);
    row_end(&o);
    for (size_t i = 0; i < r->n_families; i++) {
        const ps_family_result *fr = &r->families[i];
        for (size_t j = 0; j < fr->n_bound; j++)
            boundary_row(&o, fr, &fr->bound[j]);
        if (fr->has_yield)
            yield_row(&o, fr);
    }
    return ferror(f) ? PS_ERR_IO : PS_OK;
}
