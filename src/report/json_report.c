/* json_report.c - the screening run for machines: the summary document of
 * bounded size (<stem>.screen.json, schema
 * reports/schema/plantsieve-screening.schema.json). The full record of every
 * plant, as JSON Lines beside it, is written by jsonl_record.c. */
#include "report/json_parts.h"
#include "report/reports.h"
#include "report/certificate.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

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
    if (r->opt.certify != PS_CERTIFY_NONE) {
        json_t *opt = json_object_get(doc, "options");
        json_object_set_new(opt, "certify",
                            json_string(r->opt.certify == PS_CERTIFY_PASSING ? "passing" : "judged"));
        json_object_set_new(opt, "certify_budget", json_integer((json_int_t)(r->opt.certify_budget
                                                                                  ? r->opt.certify_budget
                                                                                  : PS_CERT_BUDGET)));
        json_t *br = json_object();
        for (int b = 0; b < PS_BRACKET_COUNT; b++)
            json_object_set_new(br, ps_bracket_name((ps_bracket)b), json_integer((json_int_t)r->per_bracket[b]));
        json_object_set_new(doc, "bracket", br);
    }
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
