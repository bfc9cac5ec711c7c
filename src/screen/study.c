/* study.c - feasibility boundaries along swept parameters (bisection on the
 * verdict, with a monotonicity check on the sweep points) and tolerance
 * yield (seeded GSL generator, Wilson intervals). README "Families". */
#include "screen/study.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "family/yield.h"

struct ps_study_ws {
    ps_screen_ws *sws;
    ps_roots_ws *rws;
    ps_plant plant;
    ps_analysis an;
    ps_yield_sampler *rng;
};

const char *ps_bound_state_name(ps_bound_state s)
{
    static const char *const names[] = {"found", "passes-throughout", "fails-throughout", "non-monotone",
                                        "evaluation-error"};
    return names[s];
}

ps_study_ws *ps_study_ws_new(void)
{
    ps_study_ws *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->sws = ps_screen_ws_new();
    ws->rws = ps_roots_ws_new();
    ws->rng = ps_yield_sampler_new();
    if (!ws->sws || !ws->rws || !ws->rng) {
        ps_study_ws_free(ws);
        return NULL;
    }
    return ws;
}

void ps_study_ws_free(ps_study_ws *ws)
{
    if (!ws)
        return;
    ps_screen_ws_free(ws->sws);
    ps_roots_ws_free(ws->rws);
    ps_yield_sampler_free(ws->rng);
    free(ws);
}

/* One point of parameter space: verdict, Ms floor and severity. Returns
 * false with why set when the plant cannot be made or analysed. */
typedef struct point {
    ps_verdict verdict;
    bool pass;
    double ms, severity;
} point;

static bool evaluate(ps_study_ws *ws, ps_family *fam, const double *values, const ps_screen_opts *opt, point *pt,
                     char *why, size_t nwhy)
{
    ps_diag d = {0};
    if (ps_family_eval(fam, values, true, &ws->plant, &d) != PS_OK || ps_plant_check(&ws->plant, &d) != PS_OK ||
        ps_roots_analyse(ws->rws, &ws->plant, &ws->an, &d) != PS_OK) {
        snprintf(why, nwhy, "%.80s: line %zu, field '%.40s': %.300s", ws->plant.id, d.line, d.field, d.text);
        return false;
    }
    double sev;
    ps_screen_passes(ws->sws, &ws->an, &ws->plant.req, &sev);
    const ps_floors *fl = ps_screen_last_floors(ws->sws);
    pt->severity = sev;
    pt->ms = fl->ms;
    pt->verdict = ps_verdict_of(sev, fl->infinite, ws->an.hidden_unstable, opt->marginal_at);
    pt->pass = pt->verdict == PS_VERDICT_CLEAR || pt->verdict == PS_VERDICT_MARGINAL;
    return true;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static void boundary(ps_study_ws *ws, ps_family *fam, size_t j, const ps_screen_opts *opt, ps_boundary *b)
{
    memset(b, 0, sizeof *b);
    b->param = j;
    b->value = NAN;
    const ps_fam_param *par = &fam->param[j];
    double values[PS_FAM_PARAMS];
    for (size_t i = 0; i < fam->n_params; i++)
        values[i] = fam->param[i].nominal;
    b->n_curve = par->n_sweep;
    memcpy(b->curve_x, par->sweep, par->n_sweep * sizeof(double));
    qsort(b->curve_x, b->n_curve, sizeof(double), cmp_double);
    for (size_t k = 0; k < b->n_curve; k++) {
        point pt;
        values[j] = b->curve_x[k];
        if (!evaluate(ws, fam, values, opt, &pt, b->why, sizeof b->why)) {
            b->state = PS_BOUND_ERROR;
            return;
        }
        b->curve_ms[k] = pt.ms;
        b->curve_sev[k] = pt.severity;
        b->curve_pass[k] = pt.pass;
    }
    size_t changes = 0, at = 0;
    for (size_t k = 0; k + 1 < b->n_curve; k++)
        if (b->curve_pass[k] != b->curve_pass[k + 1]) {
            if (b->n_changes < PS_BOUND_CHANGES) {
                b->change_lo[b->n_changes] = b->curve_x[k];
                b->change_hi[b->n_changes++] = b->curve_x[k + 1];
            }
            changes++;
            at = k;
        }
    if (changes == 0) {
        b->state = b->curve_pass[0] ? PS_BOUND_ALL_PASS : PS_BOUND_ALL_FAIL;
        return;
    }
    if (changes > 1) {
        b->state = PS_BOUND_NON_MONOTONE;
        return;
    }
    /* One change between sweep points at and at + 1: bisect on the verdict. */
    double lo = b->curve_x[at], hi = b->curve_x[at + 1];
    bool lo_pass = b->curve_pass[at];
    point plo = {0}, phi = {0};
    plo.ms = b->curve_ms[at], plo.severity = b->curve_sev[at];
    phi.ms = b->curve_ms[at + 1], phi.severity = b->curve_sev[at + 1];
    for (int it = 0; it < 200 && hi - lo > 1e-10 * fmax(fabs(lo), fabs(hi)); it++) {
        double mid = 0.5 * (lo + hi);
        point pm;
        values[j] = mid;
        if (!evaluate(ws, fam, values, opt, &pm, b->why, sizeof b->why)) {
            b->state = PS_BOUND_ERROR;
            return;
        }
        if (pm.pass == lo_pass) {
            lo = mid;
            plo = pm;
        } else {
            hi = mid;
            phi = pm;
        }
    }
    b->state = PS_BOUND_FOUND;
    b->value = 0.5 * (lo + hi);
    b->pass_below = lo_pass;
    b->ms_pass = lo_pass ? plo.ms : phi.ms;
    b->ms_fail = lo_pass ? phi.ms : plo.ms;
    b->sev_pass = lo_pass ? plo.severity : phi.severity;
    b->sev_fail = lo_pass ? phi.severity : plo.severity;
}

static double draw(ps_yield_sampler *rng, const ps_fam_param *par)
{
    switch (par->tol) {
    case PS_TOL_NORMAL: return ps_yield_normal(rng, par->nominal, par->tol_value);
    case PS_TOL_UNIFORM: return ps_yield_uniform(rng, par->nominal, par->tol_value);
    default: return par->nominal;
    }
}

/* Sample s draws its values from a stream of its own that depends on (seed,
 * s) only (src/family/yield.c), in parameter order: the same seed gives the
 * same units in any order or on any number of threads. */
static void yield(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, ps_yield *y)
{
    memset(y, 0, sizeof *y);
    y->samples = fam->samples;
    y->seed = fam->seed;
    y->culprit = -1;
    double sum_fail[PS_FAM_PARAMS] = {0}, sum_pass[PS_FAM_PARAMS] = {0};
    size_t n_fail = 0, n_pass = 0;
    for (size_t s = 0; s < fam->samples; s++) {
        double values[PS_FAM_PARAMS];
        ps_diag sd = {0};
        ps_yield_sampler_start(ws->rng, fam->seed, s, &sd); /* s < 1e6: always in range */
        for (size_t i = 0; i < fam->n_params; i++)
            values[i] = draw(ws->rng, &fam->param[i]);
        point pt;
        char why[PS_DIAG_TEXT];
        if (!evaluate(ws, fam, values, opt, &pt, why, sizeof why)) {
            if (!y->count[PS_VERDICT_UNREAD]++)
                snprintf(y->first_error, sizeof y->first_error, "%s", why);
            continue;
        }
        y->count[pt.verdict]++;
        double *sum = pt.pass ? sum_pass : sum_fail;
        for (size_t i = 0; i < fam->n_params; i++)
            sum[i] += values[i];
        if (pt.pass)
            n_pass++;
        else
            n_fail++;
    }
    ps_interval ci;
    ps_diag wd = {0};
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        y->frac[v] = (double)y->count[v] / (double)y->samples;
        ps_yield_wilson(y->count[v], y->samples, 0.95, &ci, &wd);
        y->lo[v] = ci.lo;
        y->hi[v] = ci.hi;
    }
    y->pass_frac = (double)n_pass / (double)y->samples;
    ps_yield_wilson(n_pass, y->samples, 0.95, &ci, &wd);
    y->pass_lo = ci.lo;
    y->pass_hi = ci.hi;
    /* The parameter whose failing units sit farthest from the passing ones,
     * in units of its own spread (sigma; half-width / sqrt 3 for uniform). */
    if (n_fail && n_pass) {
        double best = 0;
        for (size_t i = 0; i < fam->n_params; i++) {
            const ps_fam_param *par = &fam->param[i];
            if (par->tol == PS_TOL_NONE)
                continue;
            double spread = par->tol == PS_TOL_NORMAL ? par->tol_value : par->tol_value / sqrt(3.0);
            double shift = (sum_fail[i] / (double)n_fail - sum_pass[i] / (double)n_pass) / spread;
            if (fabs(shift) > fabs(best)) {
                best = shift;
                y->culprit = (int)i;
            }
        }
        y->culprit_shift = best;
    }
}

void ps_study_family(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, ps_family_result *out)
{
    memset(out, 0, sizeof *out);
    snprintf(out->id, sizeof out->id, "%s", fam->id);
    snprintf(out->note, sizeof out->note, "%s", fam->note);
    out->line = fam->line;
    out->n_params = fam->n_params;
    memcpy(out->param, fam->param, sizeof out->param);
    out->grid = ps_family_grid_size(fam);
    for (size_t j = 0; j < fam->n_params; j++)
        if (fam->param[j].n_sweep >= 2)
            boundary(ws, fam, j, opt, &out->bound[out->n_bound++]);
    if (fam->samples) {
        out->has_yield = true;
        yield(ws, fam, opt, &out->yield);
    }
}

ps_family_result *ps_run_next_family(ps_run *r)
{
    if (r->n_families == r->cap_families) {
        size_t cap = r->cap_families ? 2 * r->cap_families : 4;
        ps_family_result *f = realloc(r->families, cap * sizeof *f);
        if (!f)
            return NULL;
        r->families = f;
        r->cap_families = cap;
    }
    return &r->families[r->n_families++];
}
