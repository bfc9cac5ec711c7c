/* family_report.c - the family studies (boundaries along swept parameters,
 * tolerance yield) in JSON, plain text and Markdown. */
#include <math.h>
#include <stdio.h>

#include "report/json_parts.h"
#include "report/reports.h"
#include "screen/study.h"

static json_t *jnums(const double *x, size_t n)
{
    json_t *a = json_array();
    for (size_t i = 0; i < n; i++)
        json_array_append_new(a, ps_json_num(x[i]));
    return a;
}

static const char *tol_name(ps_tol_kind k)
{
    return k == PS_TOL_NORMAL ? "normal" : k == PS_TOL_UNIFORM ? "uniform" : "none";
}

static json_t *jparam(const ps_fam_param *p)
{
    return json_pack("{s:s,s:o,s:o,s:o}", "name", p->name, "nominal", ps_json_num(p->nominal), "sweep",
                     p->n_sweep ? jnums(p->sweep, p->n_sweep) : json_null(), "tolerance",
                     p->tol == PS_TOL_NONE ? json_null()
                                           : json_pack("{s:s,s:o}", "kind", tol_name(p->tol), "value",
                                                       ps_json_num(p->tol_value)));
}

static json_t *jbound(const ps_family_result *fr, const ps_boundary *b)
{
    bool found = b->state == PS_BOUND_FOUND;
    json_t *changes = json_array(), *passes = json_array();
    for (size_t i = 0; i < b->n_changes; i++)
        json_array_append_new(changes, json_pack("[o,o]", ps_json_num(b->change_lo[i]), ps_json_num(b->change_hi[i])));
    for (size_t i = 0; i < b->n_curve; i++)
        json_array_append_new(passes, json_boolean(b->curve_pass[i]));
    return json_pack("{s:s,s:s,s:o,s:o,s:o,s:o,s:o,s:o,s:o,s:{s:o,s:o,s:o,s:o},s:o}", "parameter",
                     fr->param[b->param].name, "state", ps_bound_state_name(b->state), "value",
                     found ? ps_json_num(b->value) : json_null(), "passes",
                     found ? json_string(b->pass_below ? "below" : "above") : json_null(), "ms_floor_passing",
                     found ? ps_json_num(b->ms_pass) : json_null(), "ms_floor_failing",
                     found ? ps_json_num(b->ms_fail) : json_null(), "severity_passing",
                     found ? ps_json_num(b->sev_pass) : json_null(), "severity_failing",
                     found ? ps_json_num(b->sev_fail) : json_null(), "changes", changes, "curve", "x",
                     jnums(b->curve_x, b->n_curve), "ms_floor", jnums(b->curve_ms, b->n_curve), "severity",
                     jnums(b->curve_sev, b->n_curve), "passes", passes, "reason",
                     b->state == PS_BOUND_ERROR ? ps_json_str(b->why) : json_null());
}

static json_t *jyield(const ps_family_result *fr)
{
    if (!fr->has_yield)
        return json_null();
    const ps_yield *y = &fr->yield;
    json_t *per = json_object();
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        json_object_set_new(per, ps_verdict_name((ps_verdict)v),
                            json_pack("{s:I,s:o,s:[o,o]}", "count", (json_int_t)y->count[v], "fraction",
                                      ps_json_num(y->frac[v]), "ci95", ps_json_num(y->lo[v]), ps_json_num(y->hi[v])));
    return json_pack("{s:I,s:I,s:s,s:o,s:{s:o,s:[o,o]},s:o,s:o}", "samples", (json_int_t)y->samples, "seed",
                     (json_int_t)y->seed, "interval", "Wilson score, 95 %", "per_verdict", per, "passing",
                     "fraction", ps_json_num(y->pass_frac), "ci95", ps_json_num(y->pass_lo),
                     ps_json_num(y->pass_hi), "most_responsible",
                     y->culprit < 0 ? json_null()
                                    : json_pack("{s:s,s:o}", "parameter", fr->param[y->culprit].name,
                                                "shift_in_spreads", ps_json_num(y->culprit_shift)),
                     "first_error", y->count[PS_VERDICT_UNREAD] ? ps_json_str(y->first_error) : json_null());
}

json_t *ps_json_families(const ps_run *r)
{
    json_t *a = json_array();
    for (size_t i = 0; i < r->n_families; i++) {
        const ps_family_result *fr = &r->families[i];
        json_t *params = json_array(), *bounds = json_array();
        for (size_t j = 0; j < fr->n_params; j++)
            json_array_append_new(params, jparam(&fr->param[j]));
        for (size_t j = 0; j < fr->n_bound; j++)
            json_array_append_new(bounds, jbound(fr, &fr->bound[j]));
        json_array_append_new(a, json_pack("{s:o,s:o,s:{s:o,s:I},s:I,s:o,s:o,s:o}", "id", ps_json_str(fr->id),
                                           "note", ps_json_str(fr->note), "source", "file",
                                           ps_json_str(r->catalogs[fr->file_index].file), "line",
                                           (json_int_t)fr->line, "grid_plants", (json_int_t)fr->grid, "parameters",
                                           params, "boundaries", bounds, "yield", jyield(fr)));
    }
    return a;
}

/* One boundary in words: "gap must stay below 7.2e-3 (Ms floor 1.99 | 2.01)". */
void ps_boundary_text(const ps_family_result *fr, const ps_boundary *b, char *out, size_t n)
{
    const char *name = fr->param[b->param].name;
    switch (b->state) {
    case PS_BOUND_FOUND:
        snprintf(out, n, "%s must stay %s %.6g (nominal %.6g, swept %.6g .. %.6g); there the severity crosses 1 "
                 "with the Ms floor at %.4g",
                 name, b->pass_below ? "below" : "above", b->value, fr->param[b->param].nominal, b->curve_x[0],
                 b->curve_x[b->n_curve - 1], b->ms_pass);
        break;
    case PS_BOUND_ALL_PASS:
        snprintf(out, n, "%s: passes over the whole sweep %.6g .. %.6g", name, b->curve_x[0],
                 b->curve_x[b->n_curve - 1]);
        break;
    case PS_BOUND_ALL_FAIL:
        snprintf(out, n, "%s: fails over the whole sweep %.6g .. %.6g (no boundary inside it)", name,
                 b->curve_x[0], b->curve_x[b->n_curve - 1]);
        break;
    case PS_BOUND_NON_MONOTONE:
        snprintf(out, n, "%s: NOT MONOTONE - the verdict changes %zu times along the sweep (first between %.6g "
                 "and %.6g); no single boundary is reported",
                 name, b->n_changes, b->change_lo[0], b->change_hi[0]);
        break;
    default: snprintf(out, n, "%s: could not be evaluated: %.300s", name, b->why); break;
    }
}

static void yield_text(const ps_family_result *fr, char *out, size_t n)
{
    const ps_yield *y = &fr->yield;
    int w = snprintf(out, n, "%.1f %% of %zu units pass (95 %% Wilson %.1f .. %.1f %%; seed %lu)",
                     100 * y->pass_frac, y->samples, 100 * y->pass_lo, 100 * y->pass_hi, y->seed);
    if (w > 0 && (size_t)w < n && y->culprit >= 0)
        snprintf(out + w, n - (size_t)w, "; failures driven most by %s (failing units %+.2f spreads from passing)",
                 fr->param[y->culprit].name, y->culprit_shift);
}

void ps_text_families(FILE *f, const ps_run *r)
{
    if (!r->n_families)
        return;
    fputs("\nFamilies (boundaries: one swept parameter at a time, the others at nominal)\n", f);
    char line[700];
    for (size_t i = 0; i < r->n_families; i++) {
        const ps_family_result *fr = &r->families[i];
        fprintf(f, "  %s  %zu grid plant%s  %s:%zu\n", fr->id, fr->grid, fr->grid == 1 ? "" : "s",
                r->catalogs[fr->file_index].file, fr->line);
        for (size_t j = 0; j < fr->n_bound; j++) {
            ps_boundary_text(fr, &fr->bound[j], line, sizeof line);
            fprintf(f, "    boundary  %s\n", line);
        }
        if (fr->has_yield) {
            yield_text(fr, line, sizeof line);
            fprintf(f, "    yield     %s\n", line);
            const ps_yield *y = &fr->yield;
            fputs("              ", f);
            for (int v = 0; v < PS_VERDICT_COUNT; v++)
                if (y->count[v])
                    fprintf(f, " %s %zu", ps_verdict_name((ps_verdict)v), y->count[v]);
            fputc('\n', f);
        }
    }
}

void ps_md_families(FILE *f, const ps_run *r, void (*cell)(FILE *, const char *))
{
    if (!r->n_families)
        return;
    fputs("\n## Families\n\nBoundaries: one swept parameter at a time, the others at nominal. Yield: seeded "
          "samples of the toleranced parameters, 95 % Wilson intervals.\n\n| family | study | result |\n"
          "| --- | --- | --- |\n",
          f);
    char line[700];
    for (size_t i = 0; i < r->n_families; i++) {
        const ps_family_result *fr = &r->families[i];
        for (size_t j = 0; j < fr->n_bound; j++) {
            ps_boundary_text(fr, &fr->bound[j], line, sizeof line);
            fputs("| ", f);
            cell(f, fr->id);
            fputs(" | boundary | ", f);
            cell(f, line);
            fputs(" |\n", f);
        }
        if (fr->has_yield) {
            yield_text(fr, line, sizeof line);
            fputs("| ", f);
            cell(f, fr->id);
            fputs(" | yield | ", f);
            cell(f, line);
            fputs(" |\n", f);
        }
    }
}
