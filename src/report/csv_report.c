/* csv_report.c - the screening run as one RFC 4180 table: a header of stable
 * snake_case column names, then one row per plant in ranked order. */
#include "report/reports.h"
#include "report/csv_cells.h"
#include "report/certificate.h"
#include "core/numfmt.h"

#include <assert.h>
#include <math.h>
#include <stdbool.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* Cell conventions (README "CSV report"):
 *  - numbers are printed with "%.9g" (C locale), booleans as true/false;
 *  - an EMPTY cell means "no finite value": not applicable (no band, no
 *    roll-off, no RHP zero, a target that was not found), an input error, or
 *    an infinite value. Infinite floors are not written as "inf": the verdict
 *    column already says not-stabilizable, and an empty cell keeps every
 *    numeric column parseable as a number by any spreadsheet or reader. An
 *    unbounded crossover_max is likewise empty (no upper limit);
 *  - effort_allowed is empty when no effort limit was given.
 * note is the catalog's note as given (line breaks and tabs kept, inside
 * quotes; a note starting with '=', '+', '-', '@', a tab or CR gets the
 * leading apostrophe of csv_cells.h); unstable_controller_required is true
 * when parity interlacing fails, empty for an input error.
 * Lines end in CRLF; a field holding a comma, a double quote, CR or LF is
 * quoted and its quotes doubled. */

typedef ps_csv_out csv_out;

static void cell_text(csv_out *o, const char *s) { ps_csv_text(o, s); }
static void cell_num(csv_out *o, double x) { ps_csv_num(o, x); }

static void cell_size(csv_out *o, size_t n)
{
    ps_csv_unsigned(o, n);
}

static void cell_bool(csv_out *o, bool b) { cell_text(o, b ? "true" : "false"); }


/* Columns before the per-target groups, in order. */
static const char *const head_cols[] = {
    "rank",          "id",           "verdict",          "severity",         "severity_infinite",
    "worst",         "share_ms",     "share_mt",         "share_effort",     "cause",
    "file",          "line",         "ms_floor",         "mt_floor",         "ms_allowed",
    "mt_allowed",    "effort_floor", "effort_allowed",   "band_edge",        "band_attenuation",
    "rolloff_start", "bode_area",    "ms_interpolation", "mt_interpolation", "ms_band",
    "ms_poisson",    "mt_poisson",   "limiting",         "rhp_poles",        "rhp_zeros",
    "delay",         "hidden_unstable_mode", "crossover_min", "crossover_max", "window_open",
    "binding_floor", "first_factor", "without_delay", "without_rhp_zeros", "without_rolloff_start",
    "without_band",  "without_compute_delay", "without_sample_rate", "without_sampling_zeros",
    "sample_rate_hz", "nyquist_rad_s", "compute_delay_s", "compute_delay_samples",
    "domain",        "z_rel_degree", "sampling_zeros", "zeros_outside_circle", "ms_nyquist_floor",
};
_Static_assert(PS_FACTOR_COUNT == 7, "one without_ column per factor");
/* Columns after the per-target groups. note and unstable_controller_required
 * were added last, after the error columns, so that every earlier column
 * keeps its position: new columns are only ever appended. */
static const char *const tail_cols[] = {"error_line", "error_column", "error_field", "error",
                                        "note", "unstable_controller_required",
                                        /* screen --certify (empty without it) */
                                        "certificate", "cert_structure", "cert_rolloff_poles", "cert_ms", "cert_mt",
                                        "cert_ms_over_floor", "cert_mt_over_floor", "cert_num", "cert_den",
                                        "cert_rolloff_ratio", "cert_band_peak", "cert_decay", "cert_effort",
                                        "cert_evaluations", "cert_seed", "cert_reason"};
enum { N_CERT_COLS = 16 };

enum {
    N_HEAD = sizeof head_cols / sizeof head_cols[0],
    N_TAIL = sizeof tail_cols / sizeof tail_cols[0],
    N_COLS = N_HEAD + 3 * PS_TARGET_COUNT + N_TAIL
};

static void pad_to(csv_out *o, size_t n)
{
    while (o->n_cells < n)
        cell_text(o, NULL);
}

static void row_end(csv_out *o)
{
    assert(o->n_cells == N_COLS); /* every row as wide as the header */
    fputs("\r\n", o->f);
    o->n_cells = 0;
}

static void header(csv_out *o)
{
    char name[64];
    for (size_t i = 0; i < N_HEAD; i++)
        cell_text(o, head_cols[i]);
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        static const char *const parts[] = {"state", "now", "limit"};
        for (size_t j = 0; j < 3; j++) {
            snprintf(name, sizeof name, "%s_%s", ps_target_key((ps_target_kind)k), parts[j]);
            cell_text(o, name);
        }
    }
    for (size_t i = 0; i < N_TAIL; i++)
        cell_text(o, tail_cols[i]);
    row_end(o);
}

/* The digital loop: every cell empty for a continuous loop (h == 0).
 * sampling_zeros lists the sampling zeros among the first PS_ZMAP zeros in z,
 * space-separated, complex ones as re+imj (none for a plant given in z). */
static void sampling_cells(csv_out *o, const ps_summary *s)
{
    const ps_floors *fl = &s->fl;
    if (!(s->h > 0)) {
        for (int i = 0; i < 9; i++)
            cell_text(o, NULL);
        return;
    }
    cell_num(o, 1.0 / s->h);
    cell_num(o, M_PI / s->h);
    cell_num(o, s->compute_delay);
    cell_num(o, s->compute_delay / s->h);
    cell_text(o, s->in_z ? "z" : "s");
    cell_num(o, fl->z_rel_degree);
    char list[PS_ZMAP * 40] = "";
    size_t len = 0;
    for (size_t i = 0; i < fl->n_zzeros && i < PS_ZMAP; i++) {
        if (!ps_zzero_is_sampling(fl, s->in_z, i))
            continue;
        int w = fl->zzeros[i].im != 0
                    ? snprintf(list + len, sizeof list - len, "%s%.9g%+.9gj", len ? " " : "", fl->zzeros[i].re,
                               fl->zzeros[i].im)
                    : snprintf(list + len, sizeof list - len, "%s%.9g", len ? " " : "", fl->zzeros[i].re);
        if (w < 0 || (size_t)w >= sizeof list - len)
            break;
        len += (size_t)w;
    }
    cell_text(o, list[0] ? list : NULL);
    cell_size(o, fl->n_zzeros_outside);
    cell_num(o, fl->ms_nyquist);
}

/* Coefficients in descending powers of s as a bracketed list, "[1, 2.5, 0]"
 * (pasteable as an array; a leading '[' needs no formula guard). */
static void cell_poly(csv_out *o, const double *p, size_t n)
{
    char b[(PS_CTRL_MAX_ORDER + 1) * 28 + 4] = "[";
    size_t at = 1;
    for (size_t i = 0; i < n && at + PS_NUMFMT_ROOM + 4 < sizeof b; i++) {
        if (i) {
            b[at++] = ',';
            b[at++] = ' ';
        }
        at += ps_fmt_g(b + at, sizeof b - at, p[i], 17);
    }
    b[at++] = ']';
    b[at] = '\0';
    cell_text(o, b);
}

/* The bracket (screen --certify): the outcome, then the verified controller's
 * figures when one was found, the search's reason otherwise. */
static void cert_cells(csv_out *o, const ps_run *r, const ps_summary *s)
{
    ps_bracket b = ps_summary_bracket(s, &r->opt);
    size_t end = o->n_cells + N_CERT_COLS;
    if (b == PS_BRACKET_NONE) {
        pad_to(o, end);
        return;
    }
    cell_text(o, ps_bracket_name(b));
    const ps_cert *c = &s->cert[0];
    if (s->n_cert && c->found) {
        const ps_loop_check *k = &c->chk;
        cell_text(o, ps_ctrl_structure_name(c->ctrl.structure));
        cell_size(o, c->ctrl.n_rolloff);
        cell_num(o, k->ms);
        cell_num(o, k->mt);
        cell_num(o, s->fl.ms >= 1 ? k->ms / s->fl.ms : NAN);
        cell_num(o, s->fl.mt >= 1 ? k->mt / s->fl.mt : NAN);
        cell_poly(o, c->ctrl.num, c->ctrl.n_num);
        cell_poly(o, c->ctrl.den, c->ctrl.n_den);
        cell_num(o, k->rolloff_ratio);
        cell_num(o, k->band_peak);
        cell_num(o, k->decay);
        cell_num(o, k->effort);
    } else
        pad_to(o, o->n_cells + 12);
    if (s->n_cert) {
        char seed[24];
        snprintf(seed, sizeof seed, "%016llx", (unsigned long long)c->seed);
        cell_size(o, c->evaluations);
        cell_text(o, seed);
        cell_text(o, c->found && !c->chk.meets ? c->chk.why : c->reason[0] ? c->reason : NULL);
    }
    pad_to(o, end);
}

static void plant_row(csv_out *o, const ps_run *r, const ps_summary *s, size_t rank)
{
    bool unread = s->verdict == PS_VERDICT_UNREAD;
    const ps_floors *fl = &s->fl;
    const ps_requirements *q = &s->req;
    cell_size(o, rank);
    cell_text(o, s->id);
    cell_text(o, ps_verdict_name(s->verdict));
    cell_num(o, s->severity);
    if (unread)
        cell_text(o, NULL);
    else
        cell_bool(o, isinf(s->severity));
    cell_text(o, unread ? NULL : s->worst);
    cell_num(o, s->share_ms);
    cell_num(o, s->share_mt);
    cell_num(o, s->share_effort);
    cell_text(o, s->cause);
    cell_text(o, s->file_index < r->n_catalogs ? r->catalogs[s->file_index].file : NULL);
    cell_size(o, s->line);
    if (unread) {
        /* Nothing was analysed: every floor, requirement and target cell is empty. */
        pad_to(o, N_HEAD + 3 * PS_TARGET_COUNT);
        cell_size(o, s->err_line);
        cell_size(o, s->err_col);
        cell_text(o, s->err_field);
        cell_text(o, s->err_text);
        cell_text(o, s->note[0] ? s->note : NULL);
        cell_text(o, NULL); /* nothing was analysed */
        pad_to(o, N_COLS);
        row_end(o);
        return;
    }
    cell_num(o, fl->ms);
    cell_num(o, fl->mt);
    cell_num(o, q->ms_allowed);
    cell_num(o, q->mt_allowed);
    cell_num(o, fl->effort);
    cell_num(o, q->effort_allowed > 0 ? q->effort_allowed : NAN);
    cell_num(o, q->wb > 0 ? q->wb : NAN);
    cell_num(o, q->wb > 0 ? q->eps : NAN);
    cell_num(o, q->wh > 0 ? q->wh : NAN);
    cell_num(o, fl->bode_area);
    cell_num(o, fl->ms_interpolation);
    cell_num(o, fl->mt_interpolation);
    cell_num(o, fl->ms_band);
    cell_num(o, fl->ms_poisson);
    cell_num(o, fl->mt_poisson);
    cell_text(o, fl->limiting);
    cell_size(o, s->n_rhp_poles);
    cell_size(o, s->n_rhp_zeros);
    cell_num(o, s->delay);
    cell_bool(o, s->hidden_unstable);
    cell_num(o, fl->crossover_min);
    cell_num(o, fl->crossover_max);
    cell_bool(o, fl->window_open);
    /* The attribution (screen/attribution.h): the binding floor, the factor
     * whose relaxation lowers it most, and the floor each relaxation leaves. */
    const ps_attribution *a = &s->attr;
    cell_num(o, a->floor);
    cell_text(o, a->n_lowering ? ps_factor_key((ps_factor)a->order[0]) : NULL);
    for (int f = 0; f < PS_FACTOR_COUNT; f++)
        cell_num(o, a->without[f]);
    sampling_cells(o, s);
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        const ps_target *t = &s->target[k];
        cell_text(o, ps_target_state_name(t->state));
        cell_num(o, t->state == PS_TARGET_NA ? NAN : t->now);
        cell_num(o, t->state == PS_TARGET_FOUND ? t->limit : NAN);
    }
    pad_to(o, N_COLS - 2 - N_CERT_COLS); /* the error columns stay empty */
    cell_text(o, s->note[0] ? s->note : NULL);
    /* Every stabilizing controller is itself unstable: parity interlacing
     * fails (the survey JSON's structure.unstable_controller_required). */
    cell_bool(o, !fl->parity_interlacing);
    cert_cells(o, r, s);
    row_end(o);
}

ps_status ps_write_csv(FILE *f, const ps_run *r)
{
    csv_out o = {.f = f, .n_cells = 0};
    header(&o);
    for (size_t i = 0; i < r->n_rows; i++)
        plant_row(&o, r, ps_run_row(r, i), i + 1);
    return ferror(f) ? PS_ERR_IO : PS_OK;
}
