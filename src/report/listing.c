/* listing.c - terminal and JSON listing of poles, zeros and structure.
 * JSON is built with jansson; JSON has no NaN or infinity, so a non-finite
 * number is written as null with a reason beside it. */
#include "report/listing.h"

#include "limits/limits.h"
#include "report/json_parts.h"
#include "report/reports.h"

#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

struct ps_listing {
    FILE *out;
    bool json;
    json_t *catalogs;
    json_t *plants;
    bool failed;
};

ps_listing *ps_listing_new(FILE *out, bool json)
{
    ps_listing *l = calloc(1, sizeof *l);
    if (!l)
        return NULL;
    l->out = out;
    l->json = json;
    l->catalogs = json_array();
    l->plants = json_array();
    if (!l->catalogs || !l->plants) {
        ps_listing_free(l);
        return NULL;
    }
    return l;
}

void ps_listing_free(ps_listing *l)
{
    if (!l)
        return;
    json_decref(l->catalogs);
    json_decref(l->plants);
    free(l);
}

/* json_real refuses non-finite values: they become null. */
json_t *ps_json_num(double x)
{
    return isfinite(x) ? json_real(x) : json_null();
}

/* A string, or null when it is empty or not valid UTF-8. */
json_t *ps_json_str(const char *s)
{
    json_t *v = (s && *s) ? json_string(s) : NULL;
    return v ? v : json_null();
}

static json_t *jpair(ps_cplx z)
{
    return json_pack("[oo]", ps_json_num(z.re), ps_json_num(z.im));
}

static json_t *jroots(const ps_root *r, size_t n)
{
    json_t *a = json_array();
    for (size_t i = 0; i < n; i++)
        json_array_append_new(a, jpair(r[i].v));
    return a;
}

static json_t *jclasses(const ps_root *r, size_t n)
{
    json_t *a = json_array();
    for (size_t i = 0; i < n; i++)
        json_array_append_new(a, json_pack("{s:s,s:I,s:o}", "region", ps_region_name(r[i].region),
                                           "multiplicity", (json_int_t)r[i].mult,
                                           "tolerance", ps_json_num(r[i].tol)));
    return a;
}

static json_t *jwarnings(const ps_plant *p)
{
    json_t *a = json_array();
    for (size_t i = 0; i < p->n_warn; i++)
        json_array_append_new(a, ps_json_str(p->warn[i]));
    return a;
}

/* A floor value: a number, or null with a reason in reasons[key]. A floor
 * past a double's range (ln finite) is null with its base-10 logarithm in
 * <key>_log10 beside it. */
static void jfloor(json_t *obj, json_t *reasons, const char *key, double x, double ln, const char *why_inf)
{
    if (isfinite(x)) {
        json_object_set_new(obj, key, json_real(x));
        return;
    }
    json_object_set_new(obj, key, json_null());
    if (isinf(x) && x > 0 && isfinite(ln)) {
        char k[64];
        snprintf(k, sizeof k, "%s_log10", key);
        json_object_set_new(obj, k, json_real(ln / log(10.0)));
        json_object_set_new(reasons, key, json_string("finite but past a double's range (about 1.8e308): its base-10 "
                                                      "logarithm is given beside it"));
        return;
    }
    json_object_set_new(reasons, key, json_string(isinf(x) ? why_inf : "not computed"));
}

const char *ps_bode_coverage_text(int controller_rd)
{
    switch (controller_rd) {
    case 0: return "every proper controller";
    case 1: return "strictly proper controllers (a biproper one adds -pi kappa/2, kappa = lim s L(s))";
    default: return "controllers of relative degree >= 2 (relative degree 1 adds -pi kappa/2)";
    }
}

json_t *ps_json_floors(const ps_floors *fl)
{
    json_t *f = json_object(), *why = json_object();
    json_object_set_new(f, "bode_area", ps_json_num(fl->bode_area));
    jfloor(f, why, "ms", fl->ms, fl->ms_ln, fl->note);
    jfloor(f, why, "mt", fl->mt, fl->mt_ln, fl->note);
    jfloor(f, why, "ms_interpolation", fl->ms_interpolation, fl->ms_interpolation_ln, fl->note);
    jfloor(f, why, "mt_interpolation", fl->mt_interpolation, fl->mt_interpolation_ln, fl->note);
    struct { const char *key; double v, ln; const char *missing; } req_floors[] = {
        {"ms_band", fl->ms_band, fl->ms_band_ln, "needs rolloff_start (the available bandwidth w_h)"},
        {"ms_poisson", fl->ms_poisson, fl->ms_poisson_ln, "needs a band requirement (band_edge, band_attenuation)"},
        {"mt_poisson", fl->mt_poisson, fl->mt_poisson_ln,
         "needs rolloff_start and rolloff_gain > 0 (undefined for rolloff_gain = 0)"},
    };
    for (size_t i = 0; i < 3; i++) {
        if (isnan(req_floors[i].v)) {
            json_object_set_new(f, req_floors[i].key, json_null());
            json_object_set_new(why, req_floors[i].key, json_string(req_floors[i].missing));
        } else
            jfloor(f, why, req_floors[i].key, req_floors[i].v, req_floors[i].ln, fl->note);
    }
    jfloor(f, why, "effort", fl->effort, fl->effort_ln, fl->note);
    if (!(fl->h > 0)) {
        json_object_set_new(f, "ms_nyquist", json_null());
        json_object_set_new(why, "ms_nyquist", json_string("a continuous loop: no sample rate"));
    } else if (isnan(fl->ms_nyquist)) {
        json_object_set_new(f, "ms_nyquist", json_null());
        json_object_set_new(why, "ms_nyquist", json_string("the plant in z has direct feedthrough: L(inf) may be "
                                                           "non-zero, so the discrete Bode area gives no floor"));
    } else
        jfloor(f, why, "ms_nyquist", fl->ms_nyquist, fl->ms_nyquist_ln, fl->note);
    json_object_set_new(f, "limiting", json_string(fl->limiting));
    json_object_set_new(f, "infinite", json_boolean(fl->infinite));
    json_object_set_new(f, "condition_estimate", ps_json_num(fl->cond));
    json_object_set_new(f, "window", json_pack("{s:o,s:o,s:b,s:s}", "crossover_min", ps_json_num(fl->crossover_min),
                                               "crossover_max", ps_json_num(fl->crossover_max), "open",
                                               fl->window_open, "basis", "rules of thumb"));
    if (isinf(fl->crossover_max))
        json_object_set_new(why, "crossover_max", json_string("no RHP zero and no delay: no upper limit"));
    json_object_set_new(f, "assumptions",
                        json_pack("[s,s,s,s]", "internal stability: no RHP pole/zero cancellation with the controller",
                                  "LTI SISO plant as given; the controller is any proper LTI controller",
                                  "with delay, the Ms floor equals the Mt floor (commutant-lifting equality, "
                                  "checked numerically, not proven here)",
                                  "crossover window from rules of thumb, not a law"));
    json_object_set_new(f, "structure",
                        json_pack("{s:b,s:b,s:i,s:s}", "parity_interlacing", fl->parity_interlacing,
                                  "unstable_controller_required", !fl->parity_interlacing,
                                  "bode_controller_relative_degree_min", fl->bode_controller_rd, "bode_coverage",
                                  ps_bode_coverage_text(fl->bode_controller_rd)));
    if (fl->note[0])
        json_object_set_new(f, "note", json_string(fl->note));
    json_object_set_new(f, "reasons", why);
    return f;
}

void ps_json_floor_extras(json_t *fj, const ps_floors *fl, const ps_requirements *q, const ps_cplx *growth,
                          size_t n_growth)
{
    /* Margins the allowed peaks would guarantee, the best disk margin any
     * controller can reach (1/Ms floor), and the time to double of each
     * real RHP pole (ln 2 / p). */
    json_object_set_new(fj, "disk_margin_max", ps_json_num(1.0 / fl->ms));
    json_object_set_new(fj, "margins_from_allowed",
                        json_pack("{s:o,s:o,s:o,s:o}", "gain_margin_from_ms",
                                  ps_json_num(ps_gain_margin_from_ms(q->ms_allowed)), "phase_margin_deg_from_ms",
                                  ps_json_num(ps_phase_margin_from_ms(q->ms_allowed)), "gain_margin_from_mt",
                                  ps_json_num(ps_gain_margin_from_mt(q->mt_allowed)), "phase_margin_deg_from_mt",
                                  ps_json_num(ps_phase_margin_from_mt(q->mt_allowed))));
    json_t *ttd = json_array();
    for (size_t i = 0; i < n_growth; i++)
        json_array_append_new(ttd, json_pack("{s:o,s:o,s:o}", "pole", ps_json_num(growth[i].re), "imag",
                                             ps_json_num(growth[i].im), "seconds",
                                             ps_json_num(log(2.0) / growth[i].re)));
    json_object_set_new(fj, "time_to_double", ttd);
}

json_t *ps_json_sampling(const ps_floors *fl, double h, double compute_delay, bool in_z)
{
    if (!(h > 0))
        return json_null();
    json_t *pz = json_array(), *zz = json_array();
    for (size_t i = 0; i < fl->n_zpoles && i < PS_ZMAP; i++)
        json_array_append_new(pz, json_pack("{s:o,s:o}", "re", ps_json_num(fl->zpoles[i].re), "im",
                                            ps_json_num(fl->zpoles[i].im)));
    for (size_t i = 0; i < fl->n_zzeros && i < PS_ZMAP; i++)
        json_array_append_new(zz, json_pack("{s:o,s:o,s:b,s:b}", "re", ps_json_num(fl->zzeros[i].re), "im",
                                            ps_json_num(fl->zzeros[i].im), "sampling",
                                            ps_zzero_is_sampling(fl, in_z, i), "outside",
                                            ps_zroot_outside(fl->zzeros[i])));
    return json_pack("{s:o,s:o,s:o,s:o,s:o,s:s,s:i,s:o,s:o,s:I,s:I,s:I,s:I}", "rate_hz", ps_json_num(1.0 / h),
                     "period_s", ps_json_num(h), "nyquist_rad_s", ps_json_num(M_PI / h), "compute_delay_s",
                     ps_json_num(compute_delay), "compute_delay_samples", ps_json_num(compute_delay / h), "domain",
                     in_z ? "z" : "s", "z_rel_degree", fl->z_rel_degree, "poles_z", pz, "zeros_z", zz, "n_poles_z",
                     (json_int_t)fl->n_zpoles, "n_zeros_z", (json_int_t)fl->n_zzeros, "n_sampling_zeros",
                     (json_int_t)(in_z ? 0 : fl->n_sampling_zeros), "n_zeros_outside",
                     (json_int_t)fl->n_zzeros_outside);
}

json_t *ps_json_requirements(const ps_requirements *q)
{
    return json_pack("{s:o,s:o,s:o,s:o,s:o,s:o,s:o,s:o}", "peak_s_allowed", ps_json_num(q->ms_allowed),
                     "peak_t_allowed", ps_json_num(q->mt_allowed), "band_edge",
                     q->wb > 0 ? ps_json_num(q->wb) : json_null(), "band_attenuation",
                     q->wb > 0 ? ps_json_num(q->eps) : json_null(), "rolloff_start",
                     q->wh > 0 ? ps_json_num(q->wh) : json_null(), "rolloff_gain", ps_json_num(q->delta),
                     "rolloff_slope", ps_json_num(q->k), "effort_allowed",
                     q->effort_allowed > 0 ? ps_json_num(q->effort_allowed) : json_null());
}

static json_t *plant_json(const ps_outcome *o)
{
    const ps_plant *p = o->p;
    json_t *j = json_object();
    json_object_set_new(j, "id", ps_json_str(p->id));
    json_object_set_new(j, "note", ps_json_str(p->note));
    json_object_set_new(j, "source", json_pack("{s:o,s:I}", "file", ps_json_str(o->file), "line",
                                               (json_int_t)p->line));
    if (o->err) {
        const ps_diag *e = o->err;
        json_object_set_new(j, "form", json_null());
        json_object_set_new(j, "poles", json_null());
        json_object_set_new(j, "zeros", json_null());
        json_object_set_new(j, "gain", json_null());
        json_object_set_new(j, "delay", json_null());
        json_object_set_new(j, "relative_degree", json_null());
        json_object_set_new(j, "classification", json_null());
        json_object_set_new(j, "hidden_unstable_mode", json_null());
        json_object_set_new(j, "requirements", json_null());
        json_object_set_new(j, "floors", json_null());
        json_object_set_new(j, "sampling", json_null());
        json_object_set_new(j, "warnings", jwarnings(p));
        json_object_set_new(j, "error", json_pack("{s:o,s:o,s:I,s:I,s:o}", "message", ps_json_str(e->text),
                                                  "file", ps_json_str(o->file), "line", (json_int_t)e->line,
                                                  "column", (json_int_t)e->col, "field",
                                                  ps_json_str(e->field)));
        return j;
    }
    const ps_analysis *an = o->an;
    json_object_set_new(j, "form", json_string(ps_form_name(p->form)));
    json_object_set_new(j, "poles", jroots(an->poles, an->n_poles));
    json_object_set_new(j, "zeros", jroots(an->zeros, an->n_zeros));
    json_object_set_new(j, "gain", ps_json_num(an->gain));
    json_object_set_new(j, "delay", ps_json_num(an->delay));
    json_object_set_new(j, "relative_degree", json_integer(an->rel_degree));
    json_object_set_new(j, "classification",
                        json_pack("{s:o,s:o,s:I,s:I,s:I}", "poles", jclasses(an->poles, an->n_poles),
                                  "zeros", jclasses(an->zeros, an->n_zeros), "rhp_poles",
                                  (json_int_t)an->n_rhp_poles, "rhp_zeros",
                                  (json_int_t)an->n_rhp_zeros, "axis_poles",
                                  (json_int_t)an->n_axis_poles));
    json_object_set_new(j, "hidden_unstable_mode", json_boolean(an->hidden_unstable));
    const ps_requirements *q = &p->req;
    json_t *fj = ps_json_floors(o->fl);
    ps_cplx growth[PS_MAX_ORDER];
    size_t n_growth = 0;
    for (size_t i = 0; i < an->n_poles; i++)
        if (an->poles[i].region == PS_RHP && an->poles[i].v.im >= 0)
            growth[n_growth++] = an->poles[i].v;
    ps_json_floor_extras(fj, o->fl, q, growth, n_growth);
    json_object_set_new(j, "requirements", ps_json_requirements(q));
    json_object_set_new(j, "floors", fj);
    json_object_set_new(j, "sampling", ps_json_sampling(o->fl, an->h, an->compute_delay, an->in_z));
    json_object_set_new(j, "warnings", jwarnings(p));
    json_object_set_new(j, "error", json_null());
    return j;
}

/* in_z: the roots are in z, classified against the unit circle (an RHP root
 * lies outside it, an axis root on it). */
static void text_roots(FILE *f, const char *label, const ps_root *r, size_t n, bool in_z)
{
    fprintf(f, "  %-6s", label);
    if (n == 0)
        fputs(" none", f);
    for (size_t i = 0; i < n; i++) {
        /* Each distinct root once: members of a multiple root and the lower
         * member of a conjugate pair (printed as re+-imj) are skipped. */
        bool seen = false;
        for (size_t k = 0; k < i && !seen; k++)
            seen = r[k].v.re == r[i].v.re && fabs(r[k].v.im) == fabs(r[i].v.im);
        if (seen)
            continue;
        if (r[i].v.im != 0)
            fprintf(f, " %.6g+-%.6gj", r[i].v.re, fabs(r[i].v.im));
        else
            fprintf(f, " %.6g", r[i].v.re);
        if (r[i].region != PS_LHP)
            fprintf(f, "[%s]", in_z ? (r[i].region == PS_RHP ? "outside" : "circle") : ps_region_name(r[i].region));
        if (r[i].mult > 1)
            fprintf(f, "(x%u)", r[i].mult);
    }
    fputc('\n', f);
}

static void plant_text(FILE *f, const ps_outcome *o)
{
    const ps_plant *p = o->p;
    if (o->err) {
        /* A row-level error (a short or long CSV row) names no field. */
        char pos[PS_DIAG_POS];
        fprintf(f, "%s  REJECTED  %s%s\n  error  %s%s%s%s\n\n", p->id[0] ? p->id : "(no id)", o->file,
                ps_diag_pos(pos, sizeof pos, o->err->line, 0), o->err->text, o->err->field[0] ? " (field '" : "", o->err->field,
                o->err->field[0] ? "')" : "");
        return;
    }
    const ps_analysis *an = o->an;
    fprintf(f, "%s  %s  order %zu  %s:%zu\n", p->id, ps_form_name(p->form), an->n_poles, o->file, p->line);
    text_roots(f, an->in_z ? "poles in z" : "poles", an->poles, an->n_poles, an->in_z);
    text_roots(f, an->in_z ? "zeros in z" : "zeros", an->zeros, an->n_zeros, an->in_z);
    fprintf(f, "  gain %.6g   relative degree %d   delay %.6g s   %s %zu   %s %zu%s\n",
            an->gain, an->rel_degree, an->delay, an->in_z ? "poles outside the unit circle" : "RHP poles",
            an->n_rhp_poles, an->in_z ? "zeros outside" : "RHP zeros", an->n_rhp_zeros,
            an->hidden_unstable ? "   HIDDEN UNSTABLE MODE" : "");
    const ps_floors *fl = o->fl;
    if (fl->infinite)
        fprintf(f, "  floors  infinite: %s\n", fl->note);
    else
        fprintf(f, "  floors  Ms >= %.4g  Mt >= %.4g  Bode area %.4g rad/s  effort >= %.4g  "
                   "crossover window %.4g..%.4g rad/s %s (rules of thumb)\n",
                fl->ms, fl->mt, fl->bode_area, fl->effort, fl->crossover_min, fl->crossover_max,
                fl->window_open ? "open" : "CLOSED");
    if (!fl->infinite)
        fprintf(f, "  structure  %s; Bode area floor covers %s\n",
                fl->parity_interlacing ? "a stable controller can stabilize (parity interlacing holds)"
                                       : "EVERY STABILIZING CONTROLLER IS UNSTABLE (parity interlacing fails)",
                ps_bode_coverage_text(fl->bode_controller_rd));
    if (fl->h > 0) {
        char text[1200];
        ps_sampling_text(fl->h, an->compute_delay, an->in_z, text, sizeof text);
        fprintf(f, "  digital loop  %s\n", text);
        ps_zroots_text(fl, an->in_z, text, sizeof text);
        fprintf(f, "  roots in z  %s\n", text);
        ps_nyquist_floor_text(fl, p->req.wb, text, sizeof text);
        fprintf(f, "  Nyquist floor  %s\n", text);
    }
    if (fl->note[0] && !fl->infinite)
        fprintf(f, "  note  %s\n", fl->note);
    for (size_t i = 0; i < p->n_warn; i++)
        fprintf(f, "  warning  %s\n", p->warn[i]);
    fputc('\n', f);
}

void ps_listing_add(void *ctx, const ps_outcome *o)
{
    ps_listing *l = ctx;
    if (l->json)
        json_array_append_new(l->plants, plant_json(o));
    else
        plant_text(l->out, o);
}

void ps_listing_catalog(ps_listing *l, const char *file, const ps_diag *fdiag)
{
    json_t *c = json_pack("{s:o,s:s}", "file", ps_json_str(file), "status", fdiag ? "failed" : "read");
    if (fdiag) {
        char unread[256];
        ps_unread_text(fdiag->line, unread, sizeof unread);
        json_object_set_new(c, "error",
                            json_pack("{s:o,s:I,s:I,s:o,s:s}", "message", ps_json_str(fdiag->text), "line",
                                      (json_int_t)fdiag->line, "column", (json_int_t)fdiag->col,
                                      "unread_after_line",
                                      fdiag->line > 0 ? json_integer((json_int_t)fdiag->line) : json_null(),
                                      "unread", unread));
    }
    json_array_append_new(l->catalogs, c);
}

ps_status ps_listing_finish(ps_listing *l, const ps_batch_counts *c)
{
    if (l->json) {
        json_t *doc = json_pack("{s:i,s:{s:s,s:s},s:O,s:{s:I,s:I,s:I},s:O}", "schema_version",
                                PS_JSON_SCHEMA_VERSION, "tool", "name", "plantsieve", "version",
                                PS_VERSION, "catalogs", l->catalogs, "counts", "entries",
                                (json_int_t)c->entries, "models", (json_int_t)c->models, "errors",
                                (json_int_t)c->errors, "plants", l->plants);
        if (!doc)
            return PS_ERR_NOMEM;
        int rc = json_dumpf(doc, l->out, JSON_INDENT(2) | JSON_REAL_PRECISION(15));
        json_decref(doc);
        if (rc != 0 || fputc('\n', l->out) == EOF)
            return PS_ERR_IO;
    } else {
        fprintf(l->out, "%zu entries read: %zu models, %zu rejected\n", c->entries, c->models, c->errors);
    }
    return ferror(l->out) ? PS_ERR_IO : PS_OK;
}
