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
    json_t *o = json_pack("{s:s,s:o,s:o,s:o}", "name", p->name, "nominal", ps_json_num(p->nominal), "sweep",
                          p->n_sweep ? jnums(p->sweep, p->n_sweep) : json_null(), "tolerance",
                          p->tol == PS_TOL_NONE ? json_null()
                                                : json_pack("{s:s,s:o}", "kind", tol_name(p->tol), "value",
                                                            ps_json_num(p->tol_value)));
    json_object_set_new(o, "range",
                        p->has_min || p->has_max
                            ? json_pack("{s:o,s:o,s:o}", "min", p->has_min ? ps_json_num(p->min) : json_null(), "max",
                                        p->has_max ? ps_json_num(p->max) : json_null(), "mass",
                                        ps_json_num(p->range_mass))
                            : json_null());
    return o;
}

static json_t *jfound(bool found, double x)
{
    return found ? ps_json_num(x) : json_null();
}

static json_t *jbound(const ps_family_result *fr, const ps_boundary *b)
{
    bool found = b->state == PS_BOUND_FOUND;
    json_t *changes = json_array(), *passes = json_array(), *stab = json_array();
    for (size_t i = 0; i < b->n_changes; i++)
        json_array_append_new(changes, json_pack("[o,o]", ps_json_num(b->change_lo[i]), ps_json_num(b->change_hi[i])));
    for (size_t i = 0; i < b->n_curve; i++) {
        json_array_append_new(passes, json_boolean(b->curve_pass[i]));
        json_array_append_new(stab, json_boolean(!b->curve_unstab[i]));
    }
    bool curve = b->state != PS_BOUND_ERROR;
    json_t *o = json_object();
    json_object_set_new(o, "parameter", json_string(fr->param[b->param].name));
    json_object_set_new(o, "state", json_string(ps_bound_state_name(b->state)));
    json_object_set_new(o, "value", jfound(found, b->value));
    json_object_set_new(o, "passes", found ? json_string(b->pass_below ? "below" : "above") : json_null());
    json_object_set_new(o, "binding", found ? json_string(ps_quantity_key(b->binding)) : json_null());
    json_object_set_new(o, "allowed",
                        json_pack("{s:o,s:o,s:o}", "ms", ps_json_num(b->ms_allowed), "mt", ps_json_num(b->mt_allowed),
                                  "effort", ps_json_num(b->effort_allowed)));
    json_object_set_new(o, "ms_floor_passing", jfound(found, b->ms_pass));
    json_object_set_new(o, "ms_floor_failing", jfound(found, b->ms_fail));
    json_object_set_new(o, "mt_floor_passing", jfound(found, b->mt_pass));
    json_object_set_new(o, "mt_floor_failing", jfound(found, b->mt_fail));
    json_object_set_new(o, "effort_floor_passing", jfound(found, b->effort_pass));
    json_object_set_new(o, "effort_floor_failing", jfound(found, b->effort_fail));
    json_object_set_new(o, "severity_passing", jfound(found, b->sev_pass));
    json_object_set_new(o, "severity_failing", jfound(found, b->sev_fail));
    json_object_set_new(o, "changes", changes);
    json_object_set_new(o, "curve",
                        json_pack("{s:o,s:o,s:o,s:o,s:o,s:o,s:o,s:o}", "x", jnums(b->curve_x, b->n_curve), "ms_floor",
                                  jnums(b->curve_ms, b->n_curve), "mt_floor", jnums(b->curve_mt, b->n_curve),
                                  "effort_floor", jnums(b->curve_effort, b->n_curve), "severity",
                                  jnums(b->curve_sev, b->n_curve), "passes", passes, "stabilizable", stab, "plotted",
                                  curve ? json_string(ps_quantity_key(b->plotted)) : json_null()));
    json_object_set_new(o, "reason", b->state == PS_BOUND_ERROR ? ps_json_str(b->why) : json_null());
    return o;
}

static json_t *jyield(const ps_family_result *fr)
{
    if (!fr->has_yield)
        return json_null();
    const ps_yield *y = &fr->yield;
    json_t *per = json_object(), *drawn = json_array();
    for (int v = 0; v < PS_VERDICT_UNREAD; v++)
        json_object_set_new(per, ps_verdict_name((ps_verdict)v),
                            json_pack("{s:I,s:o,s:[o,o]}", "count", (json_int_t)y->count[v], "fraction",
                                      ps_json_num(y->frac[v]), "ci95", ps_json_num(y->lo[v]), ps_json_num(y->hi[v])));
    for (size_t i = 0; i < fr->n_params; i++) {
        const ps_fam_param *p = &fr->param[i];
        if (p->tol == PS_TOL_NONE)
            continue;
        json_array_append_new(drawn, json_pack("{s:s,s:o,s:o,s:I}", "parameter", p->name, "min",
                                               ps_json_num(y->drawn_min[i]), "max", ps_json_num(y->drawn_max[i]),
                                               "redrawn", (json_int_t)y->redrawn[i]));
    }
    char warning[PS_DIAG_TEXT + 200];
    ps_yield_warning_text(fr, warning, sizeof warning);
    json_t *o = json_pack("{s:I,s:I,s:I,s:I,s:s,s:o,s:{s:o,s:[o,o]}}", "samples", (json_int_t)y->samples, "seed",
                          (json_int_t)y->seed, "valid_units", (json_int_t)y->valid, "invalid_units",
                          (json_int_t)y->invalid, "interval", "Wilson score, 95 %", "per_verdict", per, "passing",
                          "fraction", ps_json_num(y->pass_frac), "ci95", ps_json_num(y->pass_lo),
                          ps_json_num(y->pass_hi));
    json_object_set_new(o, "most_responsible",
                        y->culprit < 0 ? json_null()
                                       : json_pack("{s:s,s:o}", "parameter", fr->param[y->culprit].name,
                                                   "shift_in_std_devs", ps_json_num(y->culprit_shift)));
    json_object_set_new(o, "drawn", drawn);
    json_object_set_new(o, "redrawn_draws", json_integer((json_int_t)y->redrawn_total));
    json_object_set_new(o, "first_error", y->invalid ? ps_json_str(y->first_error) : json_null());
    json_object_set_new(o, "warning", warning[0] ? ps_json_str(warning) : json_null());
    return o;
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

/* One boundary in words: "gap must stay above 0.00505 (...); there the
 * severity crosses 1, set by the Mt floor: 1.25 passing, 1.25 failing,
 * allowed 1.25". */
void ps_boundary_text(const ps_family_result *fr, const ps_boundary *b, char *out, size_t n)
{
    const char *name = fr->param[b->param].name;
    switch (b->state) {
    case PS_BOUND_FOUND: {
        int w = snprintf(out, n, "%s must stay %s %.6g (nominal %.6g, swept %.6g .. %.6g); ", name,
                         b->pass_below ? "below" : "above", b->value, fr->param[b->param].nominal, b->curve_x[0],
                         b->curve_x[b->n_curve - 1]);
        if (w < 0 || (size_t)w >= n)
            break;
        double fp, ff, allowed;
        switch (b->binding) {
        case PS_QTY_MS: fp = b->ms_pass, ff = b->ms_fail, allowed = b->ms_allowed; break;
        case PS_QTY_MT: fp = b->mt_pass, ff = b->mt_fail, allowed = b->mt_allowed; break;
        case PS_QTY_EFFORT: fp = b->effort_pass, ff = b->effort_fail, allowed = b->effort_allowed; break;
        default:
            snprintf(out + w, n - (size_t)w, "beyond it the plant is not stabilizable (%s)",
                     b->fail_hidden ? "a hidden unstable mode" : "an infinite floor");
            return;
        }
        snprintf(out + w, n - (size_t)w, "there the severity crosses 1, set by the %s: %.4g passing, %.4g failing, "
                 "allowed %.4g",
                 ps_quantity_words(b->binding), fp, ff, allowed);
        break;
    }
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

void ps_yield_text(const ps_family_result *fr, char *out, size_t n)
{
    const ps_yield *y = &fr->yield;
    int w;
    if (y->valid == 0)
        w = snprintf(out, n, "none of %zu units could be evaluated (seed %lu)", y->samples, y->seed);
    else
        w = snprintf(out, n, "%.1f %% of %s%zu units%s pass (95 %% Wilson %.1f .. %.1f %%; seed %lu)",
                     100 * y->pass_frac, y->invalid ? "the " : "", y->valid,
                     y->invalid ? " that could be evaluated" : "", 100 * y->pass_lo, 100 * y->pass_hi, y->seed);
    if (w > 0 && (size_t)w < n && y->culprit >= 0)
        w += snprintf(out + w, n - (size_t)w, "; failures driven most by %s (mean of failing units %+.2f standard "
                      "deviations from that of passing ones)",
                      fr->param[y->culprit].name, y->culprit_shift);
    for (size_t i = 0; i < fr->n_params && w > 0 && (size_t)w < n; i++) {
        const ps_fam_param *p = &fr->param[i];
        if (!(p->has_min || p->has_max))
            continue;
        char range[80];
        ps_family_range_text(p, range, sizeof range);
        w += snprintf(out + w, n - (size_t)w, "; %s drawn from its %s distribution truncated to %s (%.1f %% of it): "
                      "%zu draw%s outside redrawn",
                      p->name, tol_name(p->tol), range, 100 * p->range_mass, y->redrawn[i],
                      y->redrawn[i] == 1 ? "" : "s");
    }
}

void ps_yield_warning_text(const ps_family_result *fr, char *out, size_t n)
{
    const ps_yield *y = &fr->yield;
    if (!fr->has_yield || y->invalid == 0) {
        if (n)
            out[0] = '\0';
        return;
    }
    snprintf(out, n, "%zu of %zu units could not be evaluated (invalid units, left out of every share); the first: %s",
             y->invalid, y->samples, y->first_error);
}

void ps_text_families(FILE *f, const ps_run *r)
{
    if (!r->n_families)
        return;
    fputs("\nFamilies (boundaries: one swept parameter at a time, the others at nominal)\n", f);
    char line[1400];
    for (size_t i = 0; i < r->n_families; i++) {
        const ps_family_result *fr = &r->families[i];
        fprintf(f, "  %s  %zu grid plant%s  %s:%zu\n", fr->id, fr->grid, fr->grid == 1 ? "" : "s",
                r->catalogs[fr->file_index].file, fr->line);
        for (size_t j = 0; j < fr->n_bound; j++) {
            ps_boundary_text(fr, &fr->bound[j], line, sizeof line);
            fprintf(f, "    boundary  %s\n", line);
        }
        if (fr->has_yield) {
            ps_yield_text(fr, line, sizeof line);
            fprintf(f, "    yield     %s\n", line);
            const ps_yield *y = &fr->yield;
            fputs("              ", f);
            for (int v = 0; v < PS_VERDICT_UNREAD; v++)
                if (y->count[v])
                    fprintf(f, " %s %zu", ps_verdict_name((ps_verdict)v), y->count[v]);
            if (y->invalid)
                fprintf(f, " invalid %zu", y->invalid);
            fputc('\n', f);
            ps_yield_warning_text(fr, line, sizeof line);
            if (line[0])
                fprintf(f, "    warning   %s\n", line);
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
    char line[1400];
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
            ps_yield_text(fr, line, sizeof line);
            fputs("| ", f);
            cell(f, fr->id);
            fputs(" | yield | ", f);
            cell(f, line);
            fputs(" |\n", f);
            ps_yield_warning_text(fr, line, sizeof line);
            if (line[0]) {
                fputs("| ", f);
                cell(f, fr->id);
                fputs(" | warning | ", f);
                cell(f, line);
                fputs(" |\n", f);
            }
        }
    }
}
