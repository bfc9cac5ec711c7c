/* json_report.c - the screening run as one JSON document (schema:
 * reports/schema/plantsieve-screening.schema.json; its floors object is the
 * survey schema's $defs/floors). */
#include "report/json_parts.h"
#include "report/reports.h"

#include <math.h>
#include <string.h>

static json_t *jroots(const ps_cplx *r, size_t n)
{
    json_t *a = json_array();
    for (size_t i = 0; i < n && i < PS_MAP_MAX; i++)
        json_array_append_new(a, json_pack("[oo]", ps_json_num(r[i].re), ps_json_num(r[i].im)));
    return a;
}

static json_t *jtarget(const ps_summary *s, ps_target_kind k)
{
    const ps_target *t = &s->target[k];
    char text[320];
    ps_target_text(s, k, text, sizeof text);
    return json_pack("{s:s,s:o,s:o,s:o,s:b,s:o,s:o}", "state", ps_target_state_name(t->state), "now",
                     ps_json_num(t->now), "limit", t->state == PS_TARGET_FOUND ? ps_json_num(t->limit) : json_null(), "searched_to",
                     t->state == PS_TARGET_UNBOUNDED || t->state == PS_TARGET_NONE ? ps_json_num(t->searched)
                                                                                   : json_null(),
                     "passes_now", t->passes_now, "text", ps_json_str(text), "why", ps_json_str(t->why));
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

static json_t *plant_json(const ps_run *r, const ps_summary *s, size_t rank)
{
    json_t *j = json_object();
    json_object_set_new(j, "rank", json_integer((json_int_t)rank));
    json_object_set_new(j, "id", ps_json_str(s->id));
    json_object_set_new(j, "source", json_pack("{s:o,s:I}", "file",
                                               ps_json_str(s->file_index < r->n_catalogs ? r->catalogs[s->file_index].file : ""),
                                               "line", (json_int_t)s->line));
    json_object_set_new(j, "verdict", json_string(ps_verdict_name(s->verdict)));
    json_object_set_new(j, "severity", ps_json_num(s->severity));
    json_object_set_new(j, "severity_infinite", json_boolean(isinf(s->severity)));
    json_object_set_new(j, "shares", json_pack("{s:o,s:o,s:o}", "ms", ps_json_num(s->share_ms), "mt",
                                               ps_json_num(s->share_mt), "effort", ps_json_num(s->share_effort)));
    json_object_set_new(j, "worst", json_string(s->worst));
    json_object_set_new(j, "cause", ps_json_str(s->cause));
    if (s->verdict == PS_VERDICT_UNREAD) {
        json_object_set_new(j, "attribution", json_null());
        json_object_set_new(j, "plant", json_null());
        json_object_set_new(j, "requirements", json_null());
        json_object_set_new(j, "floors", json_null());
        json_object_set_new(j, "sampling", json_null());
        json_object_set_new(j, "targets", json_null());
        json_object_set_new(j, "band_curve", json_null());
        json_object_set_new(j, "error", json_pack("{s:o,s:I,s:I,s:o}", "message", ps_json_str(s->err_text), "line",
                                                  (json_int_t)s->err_line, "column", (json_int_t)s->err_col,
                                                  "field", ps_json_str(s->err_field)));
        return j;
    }
    json_object_set_new(j, "plant",
                        json_pack("{s:o,s:o,s:I,s:I,s:b,s:o,s:o,s:i,s:I,s:I,s:b}", "poles",
                                  jroots(s->poles, s->n_poles), "zeros", jroots(s->zeros, s->n_zeros), "n_poles",
                                  (json_int_t)s->n_poles, "n_zeros", (json_int_t)s->n_zeros, "roots_truncated",
                                  s->n_poles > PS_MAP_MAX || s->n_zeros > PS_MAP_MAX, "gain", ps_json_num(s->gain),
                                  "delay", ps_json_num(s->delay), "relative_degree", s->rel_degree, "rhp_poles",
                                  (json_int_t)s->n_rhp_poles, "rhp_zeros", (json_int_t)s->n_rhp_zeros,
                                  "hidden_unstable_mode", s->hidden_unstable));
    json_t *q = ps_json_requirements(&s->req);
    json_object_set_new(q, "given", given_fields(s));
    json_object_set_new(j, "requirements", q);
    json_t *fj = ps_json_floors(&s->fl);
    ps_json_floor_extras(fj, &s->fl, &s->req, s->growth, s->n_growth);
    json_object_set_new(j, "floors", fj);
    json_object_set_new(j, "sampling", ps_json_sampling(&s->fl, s->h, s->compute_delay, s->in_z));
    json_object_set_new(j, "attribution", jattribution(&s->attr));
    json_t *t = json_object();
    for (int k = 0; k < PS_TARGET_COUNT; k++)
        json_object_set_new(t, ps_target_key((ps_target_kind)k), jtarget(s, (ps_target_kind)k));
    json_object_set_new(j, "targets", t);
    json_t *wb = json_array(), *ms = json_array();
    for (size_t i = 0; i < s->n_curve; i++) {
        json_array_append_new(wb, ps_json_num(s->curve_wb[i]));
        json_array_append_new(ms, ps_json_num(s->curve_ms[i]));
    }
    json_object_set_new(j, "band_curve", s->n_curve ? json_pack("{s:o,s:o,s:o}", "attenuation",
                                                                ps_json_num(s->band_eps), "band_edge", wb,
                                                                "ms_floor", ms)
                                                    : json_null());
    if (!s->n_curve) {
        json_decref(wb);
        json_decref(ms);
    }
    json_object_set_new(j, "error", json_null());
    return j;
}

/* One plant object at depth 2 of the document: jansson's indented form,
 * every line after the first shifted by 4 spaces (JSON strings hold no raw
 * newline, so the split is safe). */
static int put_indented(FILE *f, const char *text)
{
    for (const char *p = text; *p; p++) {
        if (fputc(*p, f) == EOF)
            return -1;
        if (*p == '\n' && fputs("    ", f) == EOF)
            return -1;
    }
    return 0;
}

/* The document is written as it would be dumped whole, but plant by plant:
 * memory stays at one plant's JSON tree however long the run. */
ps_status ps_write_json(FILE *f, const ps_run *r)
{
    const size_t flags = JSON_INDENT(2) | JSON_REAL_PRECISION(15);
    json_t *cats = json_array(), *per = json_object();
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        json_t *cj = json_pack("{s:o,s:s}", "file", ps_json_str(c->file), "status", c->failed ? "failed" : "read");
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
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        json_object_set_new(per, ps_verdict_name((ps_verdict)v), json_integer((json_int_t)r->per_verdict[v]));
    json_t *doc = json_pack("{s:i,s:s,s:{s:s,s:s},s:o,s:{s:o},s:{s:I,s:I,s:I,s:o},s:s,s:o}", "schema_version",
                            PS_SCREEN_SCHEMA_VERSION, "kind", "screening", "tool", "name", "plantsieve", "version",
                            PS_VERSION, "catalogs", cats, "options", "marginal_at", ps_json_num(r->opt.marginal_at),
                            "counts", "entries", (json_int_t)r->counts.entries, "models",
                            (json_int_t)r->counts.models, "errors", (json_int_t)r->counts.errors, "per_verdict", per,
                            "caution", ps_caution_text, "plants", json_array());
    if (!doc)
        return PS_ERR_NOMEM;
    json_object_set_new(doc, "families", ps_json_families(r));
    char *text = json_dumps(doc, flags);
    json_decref(doc);
    if (!text)
        return PS_ERR_NOMEM;
    static const char slot[] = "\"plants\": []";
    char *mark = strstr(text, slot);
    ps_status st = PS_OK;
    if (!mark || fwrite(text, 1, (size_t)(mark - text) + sizeof slot - 2, f) != (size_t)(mark - text) + sizeof slot - 2)
        st = mark ? PS_ERR_IO : PS_ERR_NOMEM;
    for (size_t i = 0; st == PS_OK && i < r->n_rows; i++) {
        json_t *pj = plant_json(r, ps_run_row(r, i), i + 1);
        char *pt = pj ? json_dumps(pj, flags) : NULL;
        json_decref(pj);
        if (!pt)
            st = PS_ERR_NOMEM;
        else if (fputs(i ? ",\n    " : "\n    ", f) == EOF || put_indented(f, pt) != 0)
            st = PS_ERR_IO;
        free(pt);
    }
    if (st == PS_OK && ((r->n_rows && fputs("\n  ", f) == EOF) || fputs(mark + sizeof slot - 2, f) == EOF ||
                        fputc('\n', f) == EOF))
        st = PS_ERR_IO;
    free(text);
    if (st != PS_OK)
        return st;
    return ferror(f) ? PS_ERR_IO : PS_OK;
}
