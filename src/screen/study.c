/* study.c - feasibility boundaries along swept parameters (bisection on the
 * verdict, a monotonicity check on the sweep points, the floor that binds)
 * and tolerance yield (seeded GSL generator, draws truncated to declared
 * ranges, invalid units apart, Wilson intervals). README "Families". */
#include "screen/study.h"

#include <math.h>
#include <stdint.h>
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

const char *ps_quantity_words(ps_quantity q)
{
    switch (q) {
    case PS_QTY_MS: return "Ms floor";
    case PS_QTY_MT: return "Mt floor";
    case PS_QTY_EFFORT: return "effort floor (peak |C S|)";
    case PS_QTY_SEVERITY: return "severity";
    default: return "none";
    }
}

const char *ps_quantity_key(ps_quantity q)
{
    switch (q) {
    case PS_QTY_MS: return "Ms";
    case PS_QTY_MT: return "Mt";
    case PS_QTY_EFFORT: return "effort";
    case PS_QTY_SEVERITY: return "severity";
    default: return "not-stabilizable";
    }
}

double ps_boundary_plotted_value(const ps_boundary *b, size_t k)
{
    switch (b->plotted) {
    case PS_QTY_MS: return b->curve_ms[k];
    case PS_QTY_MT: return b->curve_mt[k];
    case PS_QTY_EFFORT: return b->curve_effort[k];
    default: return b->curve_sev[k];
    }
}

double ps_boundary_plotted_allowed(const ps_boundary *b)
{
    switch (b->plotted) {
    case PS_QTY_MS: return b->ms_allowed;
    case PS_QTY_MT: return b->mt_allowed;
    case PS_QTY_EFFORT: return b->effort_allowed;
    default: return 1.0;
    }
}

/* One point of parameter space: verdict, the three floors, their shares of
 * what is allowed (screen.h: ps_share_peak, ps_share_effort) and the
 * severity. Returns false with why set when the plant cannot be made or
 * analysed. */
typedef struct point {
    ps_verdict verdict;
    bool pass, hidden;
    double ms, mt, effort, severity;
    double share_ms, share_mt, share_effort; /* NAN when not applicable */
    double ms_allowed, mt_allowed, effort_allowed;
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
    const ps_requirements *q = &ws->plant.req;
    ps_screen_passes(ws->sws, &ws->an, q, &sev);
    const ps_floors *fl = ps_screen_last_floors(ws->sws);
    pt->severity = sev;
    pt->ms = fl->ms;
    pt->mt = fl->mt;
    pt->effort = fl->effort;
    pt->ms_allowed = q->ms_allowed;
    pt->mt_allowed = q->mt_allowed;
    pt->effort_allowed = q->effort_allowed > 0 ? q->effort_allowed : NAN;
    /* The shares as the severity weighs them (screen.c). */
    pt->share_ms = ps_share_peak_ln(fl->ms, fl->ms_ln, q->ms_allowed);
    pt->share_mt = ps_share_peak_ln(fl->mt, fl->mt_ln, q->mt_allowed);
    pt->share_effort = q->effort_allowed > 0 ? ps_share_effort_ln(fl->effort, fl->effort_ln, q->effort_allowed) : NAN;
    pt->hidden = ws->an.hidden_unstable;
    pt->verdict = ps_verdict_of(sev, fl->infinite, ws->an.hidden_unstable, opt->marginal_at);
    pt->pass = pt->verdict == PS_VERDICT_CLEAR || pt->verdict == PS_VERDICT_MARGINAL;
    return true;
}

/* The floor with the largest share (Ms before Mt before effort on a tie, as
 * the screening's "worst"); NONE when no share has a value. */
static ps_quantity largest_share(double sm, double st, double se)
{
    ps_quantity q = PS_QTY_NONE;
    double best = -INFINITY;
    if (!isnan(sm) && sm > best) {
        best = sm;
        q = PS_QTY_MS;
    }
    if (!isnan(st) && st > best) {
        best = st;
        q = PS_QTY_MT;
    }
    if (!isnan(se) && se > best)
        q = PS_QTY_EFFORT;
    return q;
}

static double share_of(const ps_boundary *b, ps_quantity q, size_t k)
{
    switch (q) {
    case PS_QTY_MS: return ps_share_peak(b->curve_ms[k], b->ms_allowed);
    case PS_QTY_MT: return ps_share_peak(b->curve_mt[k], b->mt_allowed);
    case PS_QTY_EFFORT: return b->effort_allowed > 0 ? ps_share_effort(b->curve_effort[k], b->effort_allowed) : NAN;
    default: return b->curve_sev[k];
    }
}

/* What the figure draws (see ps_boundary.plotted). A passing point has every
 * share <= 1, so it is on or below any floor's allowed line; a failing
 * stabilizable point has its largest share > 1, but maybe not that of the
 * chosen floor: then the severity is drawn instead. */
static ps_quantity plotted_quantity(const ps_boundary *b)
{
    ps_quantity q = PS_QTY_NONE;
    if (b->state == PS_BOUND_FOUND && b->binding != PS_QTY_NONE)
        q = b->binding;
    else { /* no boundary, or its failing side is not stabilizable: the worst stabilizable point's floor */
        double worst = -INFINITY;
        for (size_t k = 0; k < b->n_curve; k++) {
            if (b->curve_unstab[k] || !(b->curve_sev[k] > worst))
                continue;
            worst = b->curve_sev[k];
            q = largest_share(share_of(b, PS_QTY_MS, k), share_of(b, PS_QTY_MT, k), share_of(b, PS_QTY_EFFORT, k));
        }
    }
    if (q == PS_QTY_NONE)
        return PS_QTY_SEVERITY;
    for (size_t k = 0; k < b->n_curve; k++)
        if (!b->curve_pass[k] && !b->curve_unstab[k] && !(share_of(b, q, k) > 1.0))
            return PS_QTY_SEVERITY;
    return q;
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
    b->ms_allowed = b->mt_allowed = b->effort_allowed = NAN;
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
        /* Requirements are not expressions: the same at every point. */
        b->ms_allowed = pt.ms_allowed;
        b->mt_allowed = pt.mt_allowed;
        b->effort_allowed = pt.effort_allowed;
        b->curve_ms[k] = pt.ms;
        b->curve_mt[k] = pt.mt;
        b->curve_effort[k] = pt.effort;
        b->curve_sev[k] = pt.severity;
        b->curve_pass[k] = pt.pass;
        b->curve_unstab[k] = pt.verdict == PS_VERDICT_UNSTABILIZABLE;
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
        b->plotted = plotted_quantity(b);
        return;
    }
    if (changes > 1) {
        b->state = PS_BOUND_NON_MONOTONE;
        b->plotted = plotted_quantity(b);
        return;
    }
    /* One change between sweep points at and at + 1: bisect on the verdict. */
    double lo = b->curve_x[at], hi = b->curve_x[at + 1];
    bool lo_pass = b->curve_pass[at];
    point plo = {0}, phi = {0};
    values[j] = lo;
    if (!evaluate(ws, fam, values, opt, &plo, b->why, sizeof b->why)) {
        b->state = PS_BOUND_ERROR;
        return;
    }
    values[j] = hi;
    if (!evaluate(ws, fam, values, opt, &phi, b->why, sizeof b->why)) {
        b->state = PS_BOUND_ERROR;
        return;
    }
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
    const point *pp = lo_pass ? &plo : &phi, *pf = lo_pass ? &phi : &plo;
    b->state = PS_BOUND_FOUND;
    b->value = 0.5 * (lo + hi);
    b->pass_below = lo_pass;
    b->ms_pass = pp->ms;
    b->ms_fail = pf->ms;
    b->mt_pass = pp->mt;
    b->mt_fail = pf->mt;
    b->effort_pass = pp->effort;
    b->effort_fail = pf->effort;
    b->sev_pass = pp->severity;
    b->sev_fail = pf->severity;
    if (pf->verdict == PS_VERDICT_UNSTABILIZABLE) {
        b->binding = PS_QTY_NONE;
        b->fail_hidden = pf->hidden;
    } else
        b->binding = largest_share(pf->share_ms, pf->share_mt, pf->share_effort);
    b->plotted = plotted_quantity(b);
}

/* One toleranced value of a unit: the declared distribution, and with a
 * declared range the truncated one (drawn again from the same stream while
 * outside, at most PS_FAM_TRIES draws; NAN when none was inside). */
static double draw(ps_yield_sampler *rng, const ps_fam_param *par, size_t *rejected)
{
    bool ranged = par->has_min || par->has_max;
    switch (par->tol) {
    case PS_TOL_NORMAL:
        return ranged ? ps_yield_normal_in(rng, par->nominal, par->tol_value, par->min, par->max, PS_FAM_TRIES,
                                           rejected)
                      : ps_yield_normal(rng, par->nominal, par->tol_value);
    case PS_TOL_UNIFORM:
        return ranged ? ps_yield_uniform_in(rng, par->nominal, par->tol_value, par->min, par->max, PS_FAM_TRIES,
                                            rejected)
                      : ps_yield_uniform(rng, par->nominal, par->tol_value);
    default: return par->nominal;
    }
}

/* Sample s draws its values from a stream of its own that depends on (seed,
 * s) only (src/family/yield.c), in parameter order: the same seed gives the
 * same units in any order, on any number of threads or shards. A unit whose
 * model cannot be evaluated is invalid: counted apart, in no share. The
 * blocks k, k + n, k + 2n, ... of PS_YIELD_BLOCK samples go into t. */
static ps_status yield_blocks(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, size_t k, size_t n,
                              ps_yield_tally *t)
{
    size_t n_blocks = (fam->samples + PS_YIELD_BLOCK - 1) / PS_YIELD_BLOCK;
    for (size_t blk = k; blk < n_blocks; blk += n) {
        if (t->n_blocks == t->cap_blocks) {
            size_t cap = t->cap_blocks ? 2 * t->cap_blocks : 16;
            ps_yield_block *nb = realloc(t->blocks, cap * sizeof *nb);
            if (!nb)
                return PS_ERR_NOMEM;
            t->blocks = nb;
            t->cap_blocks = cap;
        }
        ps_yield_block *bl = &t->blocks[t->n_blocks++];
        memset(bl, 0, sizeof *bl);
        bl->block = blk;
        size_t end = (blk + 1) * PS_YIELD_BLOCK < fam->samples ? (blk + 1) * PS_YIELD_BLOCK : fam->samples;
        for (size_t s = blk * PS_YIELD_BLOCK; s < end; s++) {
            double values[PS_FAM_PARAMS];
            ps_diag sd = {0};
            ps_yield_sampler_start(ws->rng, fam->seed, s, &sd); /* s < 1e6: always in range */
            int lost = -1; /* a ranged parameter with no draw inside its range */
            for (size_t i = 0; i < fam->n_params; i++) {
                values[i] = draw(ws->rng, &fam->param[i], &t->redrawn[i]);
                if (isnan(values[i]) && lost < 0)
                    lost = (int)i;
                if (fam->param[i].tol != PS_TOL_NONE && !isnan(values[i])) {
                    t->drawn_min[i] = fmin(t->drawn_min[i], values[i]);
                    t->drawn_max[i] = fmax(t->drawn_max[i], values[i]);
                }
            }
            point pt;
            char why[PS_DIAG_TEXT];
            if (lost >= 0)
                snprintf(why, sizeof why, "%s[unit %zu]: '%s': no draw inside its range in %d tries", fam->id, s,
                         fam->param[lost].name, PS_FAM_TRIES);
            if (lost >= 0 || !evaluate(ws, fam, values, opt, &pt, why, sizeof why)) {
                if (!t->invalid++) { /* blocks go up: the first here is the first of this tally */
                    t->first_error_at = s;
                    snprintf(t->first_error, sizeof t->first_error, "%s", why);
                }
                continue;
            }
            t->count[pt.verdict]++;
            double *sum = pt.pass ? bl->sum_pass : bl->sum_fail;
            for (size_t i = 0; i < fam->n_params; i++)
                sum[i] += values[i];
            if (pt.pass)
                t->n_pass++;
            else
                t->n_fail++;
        }
    }
    return PS_OK;
}

void ps_yield_tally_init(ps_yield_tally *t)
{
    memset(t, 0, sizeof *t);
    t->first_error_at = SIZE_MAX;
    for (size_t i = 0; i < PS_FAM_PARAMS; i++) {
        t->drawn_min[i] = INFINITY;
        t->drawn_max[i] = -INFINITY;
    }
}

void ps_yield_tally_free(ps_yield_tally *t)
{
    if (t) {
        free(t->blocks);
        t->blocks = NULL;
        t->n_blocks = t->cap_blocks = 0;
    }
}

static int by_block(const void *a, const void *b)
{
    const ps_yield_block *x = a, *y = b;
    return x->block < y->block ? -1 : x->block > y->block;
}

ps_status ps_yield_tally_add(ps_yield_tally *into, const ps_yield_tally *part)
{
    if (part->n_blocks) {
        size_t n = into->n_blocks + part->n_blocks;
        if (n > into->cap_blocks) {
            ps_yield_block *nb = realloc(into->blocks, n * sizeof *nb);
            if (!nb)
                return PS_ERR_NOMEM;
            into->blocks = nb;
            into->cap_blocks = n;
        }
        memcpy(into->blocks + into->n_blocks, part->blocks, part->n_blocks * sizeof *part->blocks);
        into->n_blocks = n;
        qsort(into->blocks, n, sizeof *into->blocks, by_block);
    }
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        into->count[v] += part->count[v];
    into->n_pass += part->n_pass;
    into->n_fail += part->n_fail;
    for (size_t i = 0; i < PS_FAM_PARAMS; i++) {
        into->redrawn[i] += part->redrawn[i];
        into->drawn_min[i] = fmin(into->drawn_min[i], part->drawn_min[i]);
        into->drawn_max[i] = fmax(into->drawn_max[i], part->drawn_max[i]);
    }
    if (part->invalid && part->first_error_at < into->first_error_at) {
        into->first_error_at = part->first_error_at;
        memcpy(into->first_error, part->first_error, sizeof into->first_error);
    }
    into->invalid += part->invalid;
    return PS_OK;
}

void ps_yield_finish(const ps_fam_param *param, size_t n_params, size_t samples, unsigned long seed,
                     const ps_yield_tally *t, ps_yield *y)
{
    memset(y, 0, sizeof *y);
    y->samples = samples;
    y->seed = seed;
    y->culprit = -1;
    y->culprit_shift = NAN;
    memcpy(y->count, t->count, sizeof y->count);
    memcpy(y->redrawn, t->redrawn, sizeof y->redrawn);
    memcpy(y->drawn_min, t->drawn_min, sizeof y->drawn_min);
    memcpy(y->drawn_max, t->drawn_max, sizeof y->drawn_max);
    y->invalid = t->invalid;
    if (t->invalid)
        memcpy(y->first_error, t->first_error, sizeof y->first_error);
    /* block by block, in block order: the same additions however the blocks were shared out */
    double sum_fail[PS_FAM_PARAMS] = {0}, sum_pass[PS_FAM_PARAMS] = {0};
    for (size_t b = 0; b < t->n_blocks; b++)
        for (size_t i = 0; i < n_params; i++) {
            sum_fail[i] += t->blocks[b].sum_fail[i];
            sum_pass[i] += t->blocks[b].sum_pass[i];
        }
    size_t n_fail = t->n_fail, n_pass = t->n_pass;
    for (size_t i = 0; i < n_params; i++)
        y->redrawn_total += y->redrawn[i];
    y->valid = y->samples - y->invalid;
    ps_interval ci;
    ps_diag wd = {0};
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        y->frac[v] = y->lo[v] = y->hi[v] = NAN;
        if (y->valid && ps_yield_wilson(y->count[v], y->valid, 0.95, &ci, &wd) == PS_OK) {
            y->frac[v] = (double)y->count[v] / (double)y->valid;
            y->lo[v] = ci.lo;
            y->hi[v] = ci.hi;
        }
    }
    y->pass_frac = y->pass_lo = y->pass_hi = NAN;
    if (y->valid && ps_yield_wilson(n_pass, y->valid, 0.95, &ci, &wd) == PS_OK) {
        y->pass_frac = (double)n_pass / (double)y->valid;
        y->pass_lo = ci.lo;
        y->pass_hi = ci.hi;
    }
    /* The parameter whose failing units sit farthest from the passing ones,
     * in standard deviations of its drawn values (sigma, half-width / sqrt 3
     * for uniform; that of the truncated distribution with a range). */
    if (n_fail && n_pass) {
        double best = 0;
        for (size_t i = 0; i < n_params; i++) {
            const ps_fam_param *par = &param[i];
            if (par->tol == PS_TOL_NONE || !(par->draw_sd > 0))
                continue;
            double shift = (sum_fail[i] / (double)n_fail - sum_pass[i] / (double)n_pass) / par->draw_sd;
            if (fabs(shift) > fabs(best)) {
                best = shift;
                y->culprit = (int)i;
            }
        }
        if (y->culprit >= 0)
            y->culprit_shift = best;
    }
}

ps_status ps_study_family_shard(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, size_t k, size_t n,
                                bool bounds, ps_family_result *out, ps_yield_tally *tally)
{
    memset(out, 0, sizeof *out);
    snprintf(out->id, sizeof out->id, "%s", fam->id);
    snprintf(out->note, sizeof out->note, "%s", fam->note);
    out->line = fam->line;
    out->n_params = fam->n_params;
    memcpy(out->param, fam->param, sizeof out->param);
    out->grid = ps_family_grid_size(fam);
    for (size_t j = 0; bounds && j < fam->n_params; j++)
        if (fam->param[j].n_sweep >= 2)
            boundary(ws, fam, j, opt, &out->bound[out->n_bound++]);
    ps_yield_tally_init(tally);
    if (!fam->samples)
        return PS_OK;
    out->has_yield = true;
    ps_status st = yield_blocks(ws, fam, opt, k, n ? n : 1, tally);
    ps_yield_finish(fam->param, fam->n_params, fam->samples, fam->seed, tally, &out->yield);
    return st;
}

void ps_study_family(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, ps_family_result *out)
{
    ps_yield_tally t;
    if (ps_study_family_shard(ws, fam, opt, 0, 1, true, out, &t) != PS_OK && out->has_yield) {
        /* no memory for the block sums: the study is not claimed */
        out->yield.valid = 0;
        out->yield.invalid = out->yield.samples;
        snprintf(out->yield.first_error, sizeof out->yield.first_error, "%s: out of memory for the yield study",
                 fam->id);
    }
    ps_yield_tally_free(&t);
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
