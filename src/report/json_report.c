/* json_report.c - the screening run for machines, in two files: a summary
 * document of bounded size (<stem>.screen.json, schema
 * reports/schema/plantsieve-screening.schema.json) and the full record of
 * every plant as JSON Lines, one compact object a line in rank order
 * (<stem>.screen.plants.jsonl, schema plantsieve-screening-plant.schema.json). */
#include "report/json_parts.h"
#include "report/reports.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Roots: a real root as its number, a complex one as [re, im]. */
static json_t *jroots(const ps_cplx *r, size_t n)
{
    json_t *a = json_array();
    for (size_t i = 0; i < n && i < PS_MAP_MAX; i++)
        json_array_append_new(a, r[i].im == 0 ? ps_json_num(r[i].re)
                                              : json_pack("[oo]", ps_json_num(r[i].re), ps_json_num(r[i].im)));
    return a;
}

/* A target, compact: members without a value are left out (not written as
 * null), and the sentence the text reports build from it is not repeated.
 * "why" is kept where it adds a figure (no value passes: the floor at the
 * end of the search), not where it only restates the state. */
static json_t *jtarget(const ps_summary *s, ps_target_kind k)
{
    const ps_target *t = &s->target[k];
    json_t *o = json_pack("{s:s}", "state", ps_target_state_name(t->state));
    if (isfinite(t->now))
        json_object_set_new(o, "now", json_real(t->now));
    if (t->state == PS_TARGET_FOUND && isfinite(t->limit))
        json_object_set_new(o, "limit", json_real(t->limit));
    if ((t->state == PS_TARGET_UNBOUNDED || t->state == PS_TARGET_NONE) && isfinite(t->searched))
        json_object_set_new(o, "searched_to", json_real(t->searched));
    if (t->passes_now)
        json_object_set_new(o, "passes_now", json_true());
    if (t->why[0] && t->state != PS_TARGET_UNBOUNDED)
        json_object_set_new(o, "why", ps_json_str(t->why));
    return o;
}

/* The binding floor taken apart (screen/attribution.h): the present
 * factors, lowest relaxed floor first. */
/* A floor past a double's range is null in obj[key]; its base-10 logarithm
 * then goes beside it as key_log10. */
static void jlog10(json_t *obj, const char *key, double x, double ln)
{
    if (isinf(x) && x > 0 && isfinite(ln))
        json_object_set_new(obj, key, json_real(ln / log(10.0)));
}

static json_t *jattribution(const ps_attribution *a)
{
    json_t *fs = json_array();
    for (size_t i = 0; i < a->n_present; i++) {
        ps_factor f = (ps_factor)a->order[i];
        json_t *o = json_pack("{s:s,s:o,s:b}", "factor", ps_factor_key(f), "floor_without",
                              ps_json_num(a->without[f]), "lowers", i < a->n_lowering);
        jlog10(o, "floor_without_log10", a->without[f], a->without_ln[f]);
        json_array_append_new(fs, o);
    }
    json_t *o = json_pack("{s:s,s:o,s:o,s:o,s:o}", "binding", ps_peak_name(a->binding), "floor", ps_json_num(a->floor),
                          "allowed", ps_json_num(a->allowed), "factors", fs, "all_relaxed", ps_json_num(a->all_relaxed));
    jlog10(o, "floor_log10", a->floor, a->floor_ln);
    jlog10(o, "all_relaxed_log10", a->all_relaxed, a->all_relaxed_ln);
    return o;
}

static json_t *given_fields(const ps_summary *s)
{
    json_t *a = json_array();
    for (int f = PS_F_MS_ALLOWED; f <= PS_F_EFFORT_ALLOWED; f++)
        if (s->req_overridden[f])
            json_array_append_new(a, json_string(ps_field_name((ps_field)f)));
    return a;
}

/* The record's floors: the survey's floors object without what is the same
 * for every plant (the assumptions and the window's basis go once into the
 * summary) and without the coverage sentence (it follows from
 * structure.bode_controller_relative_degree_min). */
static json_t *record_floors(const ps_summary *s)
{
    json_t *fj = ps_json_floors(&s->fl);
    json_object_del(fj, "assumptions");
    json_object_del(json_object_get(fj, "window"), "basis");
    /* Of the structure only the Bode coverage's controller degree stays
     * here: parity interlacing is the negation of the record's top-level
     * unstable_controller_required. */
    json_t *st = json_object_get(fj, "structure");
    json_object_set(fj, "bode_controller_relative_degree_min",
                    json_object_get(st, "bode_controller_relative_degree_min"));
    json_object_del(fj, "structure");
    /* Reasons that only say which requirement or which sampling is missing
     * follow from "requirements" and "sampling"; the others stay. */
    json_t *why = json_object_get(fj, "reasons");
    const char *key;
    json_t *v;
    void *tmp;
    json_object_foreach_safe(why, tmp, key, v)
    {
        const char *t = json_string_value(v);
        if (t && (strncmp(t, "needs ", 6) == 0 || strcmp(t, "a continuous loop: no sample rate") == 0 ||
                  strcmp(t, "no RHP zero and no delay: no upper limit") == 0))
            json_object_del(why, key);
    }
    if (json_object_size(why) == 0)
        json_object_del(fj, "reasons");
    json_t *ttd = json_array();
    for (size_t i = 0; i < s->n_growth; i++)
        json_array_append_new(ttd, json_pack("[o,o,o]", ps_json_num(s->growth[i].re), ps_json_num(s->growth[i].im),
                                             ps_json_num(log(2.0) / s->growth[i].re)));
    json_object_set_new(fj, "time_to_double", ttd);
    return fj;
}

/* The Ms floor against the band edge: the edges are a logarithmic grid
 * (screen.c: edge_i = from * (to / from)^(i / (points - 1))), so only its
 * ends are written. */
static json_t *record_band_curve(const ps_summary *s)
{
    if (!s->n_curve)
        return json_null();
    /* The curve is for plotting: four significant digits. */
    json_t *ms = json_array();
    for (size_t i = 0; i < s->n_curve; i++) {
        char b[32];
        snprintf(b, sizeof b, "%.4g", s->curve_ms[i]);
        json_array_append_new(ms, ps_json_num(isfinite(s->curve_ms[i]) ? strtod(b, NULL) : s->curve_ms[i]));
    }
    return json_pack("{s:o,s:o,s:o,s:I,s:o}", "attenuation", ps_json_num(s->band_eps), "band_edge_from",
                     ps_json_num(s->curve_wb[0]), "band_edge_to", ps_json_num(s->curve_wb[s->n_curve - 1]),
                     "points", (json_int_t)s->n_curve, "ms_floor", ms);
}

/* The requirements an entry gets when it gives none (model/plant.c), as
 * the `requirements` object; NULL on no memory. */
static json_t *requirement_defaults(void)
{
    ps_plant *p = calloc(1, sizeof *p);
    if (!p)
        return NULL;
    ps_plant_reset(p);
    json_t *q = ps_json_requirements(&p->req);
    free(p);
    return q;
}

/* A record's requirements: the members that differ from the defaults (the
 * summary's "requirement_defaults"), and which fields the catalog gave. */
static json_t *record_requirements(const ps_summary *s, const json_t *dflt)
{
    json_t *q = ps_json_requirements(&s->req);
    const char *key;
    json_t *v;
    void *tmp;
    json_object_foreach_safe(q, tmp, key, v)
        if (json_equal(v, json_object_get(dflt, key)))
            json_object_del(q, key);
    json_object_set_new(q, "given", given_fields(s));
    return q;
}

/* Remove the null and the false members of every object below the top of a
 * record (not array items: their position means something); a member left
 * out of a record is false, or has no value (not applicable, not finite,
 * not given). The top-level members are always written. */
static void strip_nulls(json_t *v)
{
    if (json_is_array(v)) {
        size_t i;
        json_t *x;
        json_array_foreach(v, i, x)
            strip_nulls(x);
        return;
    }
    if (!json_is_object(v))
        return;
    const char *key;
    json_t *x;
    void *tmp;
    json_object_foreach_safe(v, tmp, key, x)
    {
        if (json_is_null(x) || json_is_false(x))
            json_object_del(v, key);
        else
            strip_nulls(x);
    }
}

/* A real whose value at PS_JSONL_DIGITS significant digits is a whole
 * number, as that whole number without a fraction ("1" for 1.0 and for
 * 0.9999999999: JSON has one number type, and a record of many unit floors
 * is the shorter for it); every member and element, recursively. */
static json_t *whole_number(const json_t *x)
{
    if (!json_is_real(x))
        return NULL;
    double v = json_real_value(x), w = nearbyint(v);
    if (!(fabs(v) < 1e9) || fabs(v - w) > 1e-8 * fabs(v) || (w == 0 && v != 0) || signbit(v) != signbit(w))
        return NULL;
    if (v != w) { /* written as a whole number at that precision? */
        char b[40];
        snprintf(b, sizeof b, "%.*g", PS_JSONL_DIGITS, v);
        if (strpbrk(b, ".eEni"))
            return NULL;
        w = strtod(b, NULL);
    }
    return w == 0 && signbit(w) ? NULL : json_integer((json_int_t)w);
}

static void whole_numbers(json_t *v)
{
    json_t *x, *w;
    if (json_is_array(v)) {
        size_t i;
        json_array_foreach(v, i, x)
        {
            if ((w = whole_number(x)))
                json_array_set_new(v, i, w);
            else
                whole_numbers(x);
        }
        return;
    }
    if (!json_is_object(v))
        return;
    const char *key;
    void *tmp;
    json_object_foreach_safe(v, tmp, key, x)
    {
        if ((w = whole_number(x)))
            json_object_set_new(v, key, w);
        else
            whole_numbers(x);
    }
}

/* The top-level members of a record written even when null or false; any
 * other member, at any depth, is left out when null or false. */
static bool always_present(const char *key)
{
    static const char *const keep[] = {"rank", "id", "verdict", "severity", "file", "line", "note"};
    for (size_t i = 0; i < sizeof keep / sizeof keep[0]; i++)
        if (strcmp(key, keep[i]) == 0)
            return true;
    return false;
}

/* One plant's full record (a line of the JSON Lines file). */
static json_t *plant_record(const ps_run *r, const ps_summary *s, size_t rank, const json_t *dflt)
{
    bool unread = s->verdict == PS_VERDICT_UNREAD;
    json_t *j = json_object();
    json_object_set_new(j, "rank", json_integer((json_int_t)rank));
    json_object_set_new(j, "id", ps_json_str(s->id));
    json_object_set_new(j, "verdict", json_string(ps_verdict_name(s->verdict)));
    json_object_set_new(j, "severity", ps_json_num(s->severity));
    json_object_set_new(j, "severity_infinite", json_boolean(isinf(s->severity)));
    json_object_set_new(j, "file", ps_json_str(s->file_index < r->n_catalogs ? r->catalogs[s->file_index].file : ""));
    json_object_set_new(j, "line", json_integer((json_int_t)s->line));
    json_object_set_new(j, "note", ps_json_str(s->note));
    json_object_set_new(j, "unstable_controller_required",
                        unread ? json_null() : json_boolean(!s->fl.parity_interlacing));
    if (unread) {
        json_object_set_new(j, "error", json_pack("{s:o,s:I,s:I,s:o}", "message", ps_json_str(s->err_text), "line",
                                                  (json_int_t)s->err_line, "column", (json_int_t)s->err_col,
                                                  "field", ps_json_str(s->err_field)));
        return j;
    }
    json_object_set_new(j, "shares", json_pack("{s:o,s:o,s:o}", "ms", ps_json_num(s->share_ms), "mt",
                                               ps_json_num(s->share_mt), "effort", ps_json_num(s->share_effort)));
    json_object_set_new(j, "worst", json_string(s->worst));
    json_object_set_new(j, "cause", ps_json_str(s->cause));
    json_object_set_new(j, "plant",
                        json_pack("{s:o,s:o,s:I,s:I,s:b,s:o,s:o,s:i,s:I,s:I,s:b}", "poles",
                                  jroots(s->poles, s->n_poles), "zeros", jroots(s->zeros, s->n_zeros), "n_poles",
                                  (json_int_t)s->n_poles, "n_zeros", (json_int_t)s->n_zeros, "roots_truncated",
                                  s->n_poles > PS_MAP_MAX || s->n_zeros > PS_MAP_MAX, "gain", ps_json_num(s->gain),
                                  "delay", ps_json_num(s->delay), "relative_degree", s->rel_degree, "rhp_poles",
                                  (json_int_t)s->n_rhp_poles, "rhp_zeros", (json_int_t)s->n_rhp_zeros,
                                  "hidden_unstable_mode", s->hidden_unstable));
    json_object_set_new(j, "requirements", record_requirements(s, dflt));
    json_object_set_new(j, "floors", record_floors(s));
    json_object_set_new(j, "sampling", ps_json_sampling(&s->fl, s->h, s->compute_delay, s->in_z));
    json_object_set_new(j, "attribution", jattribution(&s->attr));
    json_t *t = json_object();
    for (int k = 0; k < PS_TARGET_COUNT; k++)
        if (s->target[k].state != PS_TARGET_NA) /* absent: does not apply */
            json_object_set_new(t, ps_target_key((ps_target_kind)k), jtarget(s, (ps_target_kind)k));
    json_object_set_new(j, "targets", t);
    json_object_set_new(j, "band_curve", record_band_curve(s));
    return j;
}

/* Numbers in the record carry PS_JSONL_DIGITS significant digits. */
ps_status ps_write_plants_jsonl(FILE *f, const ps_run *r)
{
    const size_t flags = JSON_COMPACT | JSON_REAL_PRECISION(PS_JSONL_DIGITS);
    json_t *dflt = requirement_defaults();
    if (!dflt)
        return PS_ERR_NOMEM;
    ps_status st = PS_OK;
    for (size_t i = 0; st == PS_OK && i < r->n_rows; i++) {
        json_t *pj = plant_record(r, ps_run_row(r, i), i + 1, dflt);
        const char *key;
        json_t *x;
        void *tmp;
        json_object_foreach_safe(pj, tmp, key, x)
        {
            if (!always_present(key) && (json_is_null(x) || json_is_false(x)))
                json_object_del(pj, key);
            else
                strip_nulls(x);
        }
        whole_numbers(pj);
        char *pt = pj ? json_dumps(pj, flags) : NULL;
        json_decref(pj);
        if (!pt)
            st = PS_ERR_NOMEM;
        else if (fputs(pt, f) == EOF || fputc('\n', f) == EOF)
            st = PS_ERR_IO;
        free(pt);
    }
    json_decref(dflt);
    if (st != PS_OK)
        return st;
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

/* The catalogs of the run with their provenance (title, SHA-256, size). */
static json_t *jcatalogs(const ps_run *r)
{
    json_t *cats = json_array();
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        json_t *cj = json_pack("{s:o,s:s,s:o,s:o,s:o}", "file", ps_json_str(c->file), "status",
                               c->failed ? "failed" : "read", "title", ps_json_str(c->title), "sha256",
                               ps_json_str(c->sha256), "bytes",
                               c->sha256[0] ? json_integer((json_int_t)c->bytes) : json_null());
        if (c->failed) {
            char unread[256];
            ps_unread_text(c->line, unread, sizeof unread);
            json_object_set_new(cj, "error",
                                json_pack("{s:o,s:I,s:I,s:o,s:s}", "message", ps_json_str(c->error), "line",
                                          (json_int_t)c->line, "column", (json_int_t)c->col, "unread_after_line",
                                          c->line > 0 ? json_integer((json_int_t)c->line) : json_null(),
                                          "unread", unread));
        }
        json_array_append_new(cats, cj);
    }
    return cats;
}

/* The first PS_JSON_WORST plants of the ranking, and the severity
 * distribution of all of them (ps_severity_histogram). */
static json_t *jworst(const ps_run *r)
{
    json_t *a = json_array();
    for (size_t i = 0; i < r->n_rows && i < PS_JSON_WORST; i++) {
        const ps_summary *s = ps_run_row(r, i);
        json_array_append_new(a, json_pack("{s:I,s:o,s:s,s:o,s:b}", "rank", (json_int_t)(i + 1), "id",
                                           ps_json_str(s->id), "verdict", ps_verdict_name(s->verdict), "severity",
                                           ps_json_num(s->severity), "severity_infinite", isinf(s->severity)));
    }
    return a;
}

static json_t *jhistogram(const ps_run *r)
{
    size_t count[PS_HIST_BINS];
    ps_severity_histogram(r, count);
    json_t *a = json_array();
    for (int b = 0; b < PS_HIST_BINS; b++) {
        double above, up_to;
        ps_histogram_bin(b, &above, &up_to);
        json_array_append_new(a, json_pack("{s:s,s:o,s:o,s:I}", "bin", ps_histogram_label(b), "above",
                                           ps_json_num(above), "up_to", ps_json_num(up_to), "plants",
                                           (json_int_t)count[b]));
    }
    return a;
}

ps_status ps_write_json(FILE *f, const ps_run *r)
{
    json_t *per = json_object();
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        json_object_set_new(per, ps_verdict_name((ps_verdict)v), json_integer((json_int_t)r->per_verdict[v]));
    char plants[PS_STEM_MAX + 32], stem[PS_STEM_MAX];
    ps_report_stem(r, stem, sizeof stem);
    snprintf(plants, sizeof plants, "%s.screen.plants.jsonl", stem);
    json_t *doc = json_pack("{s:i,s:s,s:{s:s,s:s},s:{s:o,s:o,s:o},s:o,s:{s:o},s:{s:I,s:I,s:I,s:o}}",
                            "schema_version", PS_SCREEN_SCHEMA_VERSION, "kind", "screening", "tool", "name",
                            "plantsieve", "version", PS_VERSION, "run", "title", ps_json_str(ps_run_title(r)),
                            "date", ps_json_str(r->meta.date), "command_line", ps_json_str(r->meta.command_line),
                            "catalogs", jcatalogs(r), "options", "marginal_at", ps_json_num(r->opt.marginal_at),
                            "counts", "entries", (json_int_t)r->counts.entries, "models",
                            (json_int_t)r->counts.models, "errors", (json_int_t)r->counts.errors, "per_verdict", per);
    if (!doc)
        return PS_ERR_NOMEM;
    json_object_set_new(doc, "severity_histogram", jhistogram(r));
    json_object_set_new(doc, "worst", jworst(r));
    json_object_set_new(doc, "caps", json_pack("{s:i,s:i,s:i}", "json_worst", PS_JSON_WORST, "markdown_table",
                                               PS_MD_TABLE_MAX, "markdown_detail", PS_MD_DETAIL_MAX));
    json_object_set_new(doc, "plants_file", json_string(plants));
    json_object_set_new(doc, "plants_count", json_integer((json_int_t)r->n_rows));
    json_object_set_new(doc, "record_digits", json_integer(PS_JSONL_DIGITS));
    json_t *dflt = requirement_defaults();
    if (!dflt) {
        json_decref(doc);
        return PS_ERR_NOMEM;
    }
    json_object_set_new(doc, "requirement_defaults", dflt);
    json_object_set_new(doc, "assumptions",
                        json_pack("[s,s,s,s]", "internal stability: no RHP pole/zero cancellation with the controller",
                                  "LTI SISO plant as given; the controller is any proper LTI controller",
                                  "with delay, the Ms floor equals the Mt floor (commutant-lifting equality, "
                                  "checked numerically, not proven here)",
                                  "crossover window from rules of thumb, not a law"));
    json_object_set_new(doc, "families", ps_json_families(r));
    json_object_set_new(doc, "caution", json_string(ps_caution_text));
    int rc = json_dumpf(doc, f, JSON_INDENT(2) | JSON_REAL_PRECISION(15));
    json_decref(doc);
    if (rc != 0 || fputc('\n', f) == EOF)
        return PS_ERR_IO;
    return ferror(f) ? PS_ERR_IO : PS_OK;
}
