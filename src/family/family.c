/* family.c - reading a family mapping, expanding its grid and evaluating its
 * model expressions (src/family/expr.c: muParser, one handle per expression,
 * so re-evaluation with new parameter values runs the kept bytecode). */
#include "family/family.h"

#include <ctype.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "catalog/numtext.h"
#include "family/yield.h"

static ps_status fail(ps_diag *d, const ps_ynode *at, const char *field, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
static ps_status fail(ps_diag *d, const ps_ynode *at, const char *field, const char *fmt, ...)
{
    char text[PS_DIAG_TEXT];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(text, sizeof text, fmt, ap);
    va_end(ap);
    return ps_diag_set(d, PS_ERR_INPUT, at ? at->line : 0, at ? at->col : 0, field, "%s", text);
}

static bool is_scalar(const ps_ynode *n) { return n && n->kind == PS_YN_SCALAR; }

static ps_status number(const ps_ynode *n, const char *field, const char *what, double *out, ps_diag *d)
{
    const char *why = "";
    if (!is_scalar(n))
        return fail(d, n, field, "%s: expected a number", what);
    if (ps_text_real(n->text, out, &why) != 0)
        return fail(d, n, field, "%s: %s", what, why);
    return PS_OK;
}

/* A number under key of map; a missing key is reported at the mapping. */
static ps_status get_num(const ps_ynode *map, const char *key, const char *field, double *out, ps_diag *d)
{
    const ps_ynode *v = ps_ynode_get(map, key);
    if (!v)
        return fail(d, map, field, "%s: '%s' is missing", field, key);
    return number(v, field, key, out, d);
}

static bool identifier(const char *s)
{
    if (!(isalpha((unsigned char)s[0]) || s[0] == '_'))
        return false;
    for (const char *c = s; *c; c++)
        if (!(isalnum((unsigned char)*c) || *c == '_'))
            return false;
    return true;
}

/* ---- parameters ----------------------------------------------------------- */

static ps_status parse_sweep(ps_fam_param *par, const ps_ynode *n, ps_diag *d)
{
    if (n->kind == PS_YN_SEQ) {
        if (n->n == 0 || n->n > PS_FAM_SWEEP)
            return fail(d, n, "sweep", "sweep of '%s': expected 1 to 64 values", par->name);
        for (size_t i = 0; i < n->n; i++)
            if (number(n->items[i], "sweep", "sweep value", &par->sweep[i], d) != PS_OK)
                return PS_ERR_INPUT;
        par->n_sweep = n->n;
        return PS_OK;
    }
    if (n->kind != PS_YN_MAP)
        return fail(d, n, "sweep", "sweep of '%s': expected a list of values or {from, to, count, scale}",
                    par->name);
    double from, to, count;
    const ps_ynode *sc = ps_ynode_get(n, "scale");
    if (get_num(n, "from", "sweep", &from, d) != PS_OK || get_num(n, "to", "sweep", &to, d) != PS_OK ||
        get_num(n, "count", "sweep", &count, d) != PS_OK)
        return PS_ERR_INPUT;
    bool log_scale = false;
    if (sc) {
        if (!is_scalar(sc) || (strcmp(sc->text, "linear") != 0 && strcmp(sc->text, "log") != 0))
            return fail(d, sc, "sweep", "sweep scale: expected linear or log");
        log_scale = strcmp(sc->text, "log") == 0;
    }
    if (count != floor(count) || count < 2 || count > PS_FAM_SWEEP)
        return fail(d, n, "sweep", "sweep of '%s': count must be a whole number from 2 to 64", par->name);
    if (!(to > from) || (log_scale && !(from > 0)))
        return fail(d, n, "sweep", "sweep of '%s': expected from < to (and from > 0 on a log scale)", par->name);
    par->n_sweep = (size_t)count;
    for (size_t i = 0; i < par->n_sweep; i++) {
        double t = (double)i / (double)(par->n_sweep - 1);
        par->sweep[i] = log_scale ? from * pow(to / from, t) : from + (to - from) * t;
    }
    par->sweep[par->n_sweep - 1] = to;
    return PS_OK;
}

static ps_status parse_tolerance(ps_fam_param *par, const ps_ynode *n, ps_diag *d)
{
    const ps_ynode *nn = ps_ynode_get(n, "normal"), *un = ps_ynode_get(n, "uniform");
    if (n->kind != PS_YN_MAP || n->n != 1 || (!nn && !un))
        return fail(d, n, "tolerance", "tolerance of '%s': expected {normal: sigma} or {uniform: half-width}",
                    par->name);
    par->tol = nn ? PS_TOL_NORMAL : PS_TOL_UNIFORM;
    if (number(nn ? nn : un, "tolerance", "tolerance", &par->tol_value, d) != PS_OK)
        return PS_ERR_INPUT;
    if (!(par->tol_value > 0))
        return fail(d, nn ? nn : un, "tolerance", "tolerance of '%s': must be > 0", par->name);
    return PS_OK;
}

void ps_family_range_text(const ps_fam_param *par, char *out, size_t n)
{
    if (par->has_min && par->has_max)
        snprintf(out, n, "[%.6g, %.6g]", par->min, par->max);
    else if (par->has_min)
        snprintf(out, n, ">= %.6g", par->min);
    else if (par->has_max)
        snprintf(out, n, "<= %.6g", par->max);
    else if (n)
        out[0] = '\0';
}

/* A declared range {min, max} of a toleranced parameter (v: its mapping).
 * Drawn values outside it are drawn again (src/screen/study.c), so the range
 * must hold the nominal value, every sweep value and at least
 * PS_FAM_RANGE_MASS_MIN of the tolerance distribution. */
static ps_status parse_range(ps_fam_param *par, const ps_ynode *v, ps_diag *d)
{
    const ps_ynode *mn = ps_ynode_get(v, "min"), *mx = ps_ynode_get(v, "max"), *sw = ps_ynode_get(v, "sweep");
    par->min = -INFINITY;
    par->max = INFINITY;
    if (!mn && !mx)
        return PS_OK;
    char what_min[PS_FAM_NAME + 16], what_max[PS_FAM_NAME + 16];
    snprintf(what_min, sizeof what_min, "min of '%s'", par->name);
    snprintf(what_max, sizeof what_max, "max of '%s'", par->name);
    if ((mn && number(mn, "min", what_min, &par->min, d) != PS_OK) ||
        (mx && number(mx, "max", what_max, &par->max, d) != PS_OK))
        return PS_ERR_INPUT;
    par->has_min = mn != NULL;
    par->has_max = mx != NULL;
    const ps_ynode *at = mn ? mn : mx;
    const char *field = mn ? "min" : "max";
    if (par->tol == PS_TOL_NONE)
        return fail(d, at, field, "parameter '%s': min and max bound the values drawn for a yield study, but it has "
                    "no tolerance (add tolerance: {normal: sigma} or {uniform: half-width}, or drop %s)",
                    par->name, mn && mx ? "min and max" : field);
    if (mn && mx && !(par->min < par->max))
        return fail(d, mx, "max", "parameter '%s': max %.6g must be above min %.6g", par->name, par->max, par->min);
    char range[80];
    ps_family_range_text(par, range, sizeof range);
    if (!(par->nominal >= par->min && par->nominal <= par->max))
        return fail(d, par->nominal < par->min ? mn : mx, par->nominal < par->min ? "min" : "max",
                    "parameter '%s': nominal %.6g is outside its range %s", par->name, par->nominal, range);
    for (size_t i = 0; i < par->n_sweep; i++)
        if (!(par->sweep[i] >= par->min && par->sweep[i] <= par->max))
            return fail(d, sw, "sweep", "parameter '%s': sweep value %.6g is outside its range %s", par->name,
                        par->sweep[i], range);
    ps_truncated t;
    if (par->tol == PS_TOL_NORMAL)
        ps_yield_normal_truncated(par->nominal, par->tol_value, par->min, par->max, &t);
    else
        ps_yield_uniform_truncated(par->nominal, par->tol_value, par->min, par->max, &t);
    if (!(t.mass >= PS_FAM_RANGE_MASS_MIN))
        return fail(d, at, field, "parameter '%s': the range %s holds %.3g %% of its tolerance distribution (%s, %s "
                    "%.6g around %.6g); at least %g %% is needed to draw inside it",
                    par->name, range, 100 * t.mass, par->tol == PS_TOL_NORMAL ? "normal" : "uniform",
                    par->tol == PS_TOL_NORMAL ? "sigma" : "half-width", par->tol_value, par->nominal,
                    100 * PS_FAM_RANGE_MASS_MIN);
    par->range_mass = t.mass;
    par->draw_sd = t.sd;
    return PS_OK;
}

static ps_status parse_params(ps_family *fam, const ps_ynode *n, ps_diag *d)
{
    if (!n || n->kind != PS_YN_MAP || n->n == 0)
        return fail(d, n, "parameters", "parameters: expected a mapping of names to {nominal, sweep, tolerance}");
    if (n->n > PS_FAM_PARAMS)
        return fail(d, n, "parameters", "parameters: at most 8");
    for (size_t i = 0; i < n->n; i++) {
        ps_fam_param *par = &fam->param[i];
        const ps_ynode *key = n->keys[i], *v = n->items[i];
        if (strlen(key->text) >= PS_FAM_NAME || !identifier(key->text))
            return fail(d, key, "parameters", "parameter name '%s': expected a name of letters, digits and _",
                        key->text);
        for (size_t j = 0; j < i; j++)
            if (strcmp(fam->param[j].name, key->text) == 0)
                return fail(d, key, "parameters", "duplicate parameter '%s'", key->text);
        snprintf(par->name, sizeof par->name, "%s", key->text);
        par->line = key->line;
        par->col = key->col;
        par->min = -INFINITY;
        par->max = INFINITY;
        par->range_mass = 1.0;
        if (is_scalar(v)) {
            if (number(v, "parameters", "nominal value", &par->nominal, d) != PS_OK)
                return PS_ERR_INPUT;
        } else if (v->kind == PS_YN_MAP) {
            for (size_t k = 0; k < v->n; k++) {
                const char *kk = v->keys[k]->text;
                if (strcmp(kk, "nominal") && strcmp(kk, "sweep") && strcmp(kk, "tolerance") && strcmp(kk, "min") &&
                    strcmp(kk, "max"))
                    return fail(d, v->keys[k], "parameters", "parameter '%s': unknown key '%s' (expected "
                                "nominal, sweep, tolerance, min, max)", par->name, kk);
            }
            const ps_ynode *nom = ps_ynode_get(v, "nominal"), *sw = ps_ynode_get(v, "sweep"),
                           *tol = ps_ynode_get(v, "tolerance");
            if (!nom)
                return fail(d, v, "parameters", "parameter '%s': a nominal value is needed", par->name);
            if (number(nom, "parameters", "nominal value", &par->nominal, d) != PS_OK ||
                (sw && parse_sweep(par, sw, d) != PS_OK) || (tol && parse_tolerance(par, tol, d) != PS_OK))
                return PS_ERR_INPUT;
            par->draw_sd = par->tol == PS_TOL_NORMAL ? par->tol_value
                         : par->tol == PS_TOL_UNIFORM ? par->tol_value / sqrt(3.0) : 0.0;
            if (parse_range(par, v, d) != PS_OK)
                return PS_ERR_INPUT;
        } else
            return fail(d, v, "parameters", "parameter '%s': expected a number or {nominal, sweep, tolerance, min, max}",
                        par->name);
        fam->value[i] = par->nominal;
    }
    fam->n_params = n->n;
    const char *names[PS_FAM_PARAMS];
    for (size_t i = 0; i < fam->n_params; i++)
        names[i] = fam->param[i].name;
    if (!(fam->ectx = ps_expr_ctx_new()))
        return ps_diag_set(d, PS_ERR_NOMEM, n->line, n->col, "parameters", "out of memory");
    ps_diag ed = {0};
    if (ps_expr_set_params(fam->ectx, names, fam->value, fam->n_params, &ed) != PS_OK)
        return ps_diag_set(d, PS_ERR_INPUT, n->line, n->col, "parameters", "parameters: %.400s", ed.text);
    return PS_OK;
}

/* ---- model expressions ---------------------------------------------------- */

static bool model_field(ps_field f)
{
    return f == PS_F_NUM || f == PS_F_DEN || f == PS_F_ZEROS || f == PS_F_POLES || f == PS_F_GAIN ||
           f == PS_F_A || f == PS_F_B || f == PS_F_C || f == PS_F_D || f == PS_F_DELAY;
}

static bool list_field(ps_field f)
{
    return f == PS_F_NUM || f == PS_F_DEN || f == PS_F_ZEROS || f == PS_F_POLES || f == PS_F_B || f == PS_F_C;
}

/* The expression is the first len bytes of n's text (all of it for a model
 * field; before the unit for sample_rate and compute_delay). */
static ps_status add_expr_text(ps_family *fam, const ps_ynode *n, ps_field f, size_t index, size_t len,
                               ps_diag *d)
{
    const char *name = ps_field_name(f);
    if (!is_scalar(n))
        return fail(d, n, name, "%s: expected a number or an expression", name);
    if (fam->n_expr == PS_FAM_EXPRS)
        return fail(d, n, name, "%s: more than 512 expressions in one family", name);
    ps_fam_expr *e = &fam->expr[fam->n_expr];
    *e = (ps_fam_expr){.field = f, .index = index, .line = n->line, .col = n->col};
    if (!(e->text = strndup(n->text, len)))
        return ps_diag_set(d, PS_ERR_NOMEM, n->line, n->col, name, "out of memory");
    fam->n_expr++;
    /* Parsed now, at the nominal values: a syntax error or an unknown name
     * rejects the whole family with its position. */
    ps_diag ed = {0};
    ps_status st = ps_expr_compile(fam->ectx, e->text, &e->compiled, &ed);
    if (st != PS_OK) {
        /* a plain scalar's text starts at its column; quoted ones one later */
        size_t col = ed.col ? n->col + ed.col - 1 + (n->plain ? 0 : 1) : n->col;
        return ps_diag_set(d, st, n->line, col, name, "%s: %.400s", name, ed.text);
    }
    return PS_OK;
}

static ps_status add_expr(ps_family *fam, const ps_ynode *n, ps_field f, size_t index, ps_diag *d)
{
    return add_expr_text(fam, n, f, index, is_scalar(n) ? strlen(n->text) : 0, d);
}

/* The first len bytes of s are one plain number. */
static bool number_text(const char *s, size_t len)
{
    char head[128];
    double x;
    const char *why = "";
    if (len >= sizeof head)
        return false; /* longer than any number written by hand: an expression */
    memcpy(head, s, len);
    head[len] = '\0';
    return ps_text_real(head, &x, &why) == 0;
}

/* sample_rate, compute_delay in a family: a value with its unit as for a
 * plant ("2 kHz"), or an expression followed by its unit ("rate kHz",
 * "1/T s", "d samples"), so the rate or the delay can be swept or
 * toleranced. The unit is required either way (numtext.h). */
static ps_status parse_unit_field(ps_family *fam, ps_field f, const ps_ynode *v, ps_diag *d)
{
    const char *name = ps_field_name(f), *why = "";
    if (!is_scalar(v))
        return fail(d, v, name, "%s: expected a single value", name);
    size_t len;
    ps_text_unit unit;
    double scale;
    if (ps_text_unit_split(f, v->text, &len, &unit, &scale, &why) != 0) {
        const char *why_literal = ""; /* "500Hz": a literal without the blank */
        return ps_text_scalar_field(fam->tmpl, f, v->text, &why_literal) == 0
                   ? PS_OK
                   : fail(d, v, name, "%s: %s", name, why);
    }
    /* A plain number before the unit: a literal, read (and refused) as for a plant. */
    if (number_text(v->text, len)) {
        if (ps_text_scalar_field(fam->tmpl, f, v->text, &why) != 0)
            return fail(d, v, name, "%s: %s", name, why);
        return PS_OK;
    }
    if (add_expr_text(fam, v, f, 0, len, d) != PS_OK)
        return PS_ERR_INPUT;
    fam->expr[fam->n_expr - 1].unit = unit;
    fam->expr[fam->n_expr - 1].unit_scale = scale;
    return PS_OK;
}

static ps_status parse_model(ps_family *fam, ps_field f, const ps_ynode *v, ps_diag *d)
{
    const char *name = ps_field_name(f);
    if (f == PS_F_A) {
        if (v->kind != PS_YN_SEQ || v->n == 0 || v->n > PS_MAX_ORDER)
            return fail(d, v, name, "a: expected a list of rows (lists of expressions)");
        fam->a_rows = v->n;
        for (size_t r = 0; r < v->n; r++) {
            const ps_ynode *row = v->items[r];
            if (row->kind != PS_YN_SEQ || row->n != v->n)
                return fail(d, row, name, "a: every row must be a list as long as the number of rows");
            for (size_t c = 0; c < row->n; c++)
                if (add_expr(fam, row->items[c], f, r * v->n + c, d) != PS_OK)
                    return PS_ERR_INPUT;
        }
        fam->a_cols = v->n;
        fam->n_list[f] = v->n * v->n;
        return PS_OK;
    }
    if (list_field(f)) {
        size_t cap = (f == PS_F_NUM || f == PS_F_DEN) ? PS_MAX_ORDER + 1 : PS_MAX_ORDER;
        if (v->kind != PS_YN_SEQ || v->n > cap)
            return fail(d, v, name, "%s: expected a list of numbers or expressions (in a family, a list)", name);
        for (size_t i = 0; i < v->n; i++)
            if (add_expr(fam, v->items[i], f, i, d) != PS_OK)
                return PS_ERR_INPUT;
        fam->n_list[f] = v->n;
        return PS_OK;
    }
    fam->n_list[f] = 1;
    return add_expr(fam, v, f, 0, d);
}

static ps_status parse_yield(ps_family *fam, const ps_ynode *n, ps_diag *d)
{
    double samples, seed = 1;
    if (n->kind != PS_YN_MAP)
        return fail(d, n, "yield", "yield: expected {samples: N, seed: S}");
    if (get_num(n, "samples", "yield", &samples, d) != PS_OK)
        return PS_ERR_INPUT;
    const ps_ynode *s = ps_ynode_get(n, "seed");
    if (s && number(s, "yield", "yield seed", &seed, d) != PS_OK)
        return PS_ERR_INPUT;
    if (samples != floor(samples) || samples < 1 || samples > PS_FAM_SAMPLES || seed != floor(seed) || seed < 0 ||
        seed > 4294967295.0)
        return fail(d, n, "yield", "yield: samples must be a whole number 1..1000000, seed 0..4294967295");
    bool any = false;
    for (size_t i = 0; i < fam->n_params; i++)
        any |= fam->param[i].tol != PS_TOL_NONE;
    if (!any)
        return fail(d, n, "yield", "yield: no parameter has a tolerance");
    fam->samples = (size_t)samples;
    fam->seed = (unsigned long)seed;
    return PS_OK;
}

ps_status ps_family_parse(ps_family *fam, const ps_ynode *node, const ps_plant *defaults, ps_diag *d)
{
    memset(fam, 0, sizeof *fam);
    if (!(fam->tmpl = malloc(sizeof *fam->tmpl)))
        return ps_diag_set(d, PS_ERR_NOMEM, node->line, node->col, "", "out of memory");
    ps_plant_reset(fam->tmpl);
    fam->line = node->line;
    const ps_ynode *id = ps_ynode_get(node, "id"), *params = ps_ynode_get(node, "parameters");
    if (is_scalar(id))
        snprintf(fam->id, sizeof fam->id, "%s", id->text);
    if (!is_scalar(id) || id->text[0] == '\0')
        return fail(d, node, "id", "family: an id is needed");
    /* The family id starts every grid plant's id: the same rule as a plant id. */
    char bad_id[PS_DIAG_TEXT / 2];
    size_t bad_at = 0;
    if (ps_catalog_text_check(id->text, strlen(id->text), true, &bad_at, bad_id, sizeof bad_id) != 0) {
        fam->id[0] = '\0';
        return fail(d, id, "id", "family id: %s", bad_id);
    }
    if (!params)
        return fail(d, node, "parameters", "family '%s': 'parameters' is missing (a mapping of names to values)",
                    fam->id);
    if (parse_params(fam, params, d) != PS_OK)
        return PS_ERR_INPUT;
    const ps_ynode *yield = NULL;
    bool model = false;
    for (size_t i = 0; i < node->n; i++) {
        const ps_ynode *k = node->keys[i], *v = node->items[i];
        const char *key = k->text;
        if (strcmp(key, "id") == 0 || strcmp(key, "parameters") == 0)
            continue;
        if (strcmp(key, "yield") == 0) {
            yield = v;
            continue;
        }
        ps_field f = ps_field_lookup(key);
        if (f == PS_F_COUNT)
            return fail(d, k, key, "family: unknown key '%s'", key);
        ps_plant_mark(fam->tmpl, f, k->line, k->col);
        if (f == PS_F_NOTE) {
            if (!is_scalar(v))
                return fail(d, v, key, "note: expected a text");
            snprintf(fam->note, sizeof fam->note, "%s", v->text);
            snprintf(fam->tmpl->note, sizeof fam->tmpl->note, "%s", v->text);
        } else if (f == PS_F_SAMPLE_RATE || f == PS_F_COMPUTE_DELAY) {
            if (parse_unit_field(fam, f, v, d) != PS_OK)
                return PS_ERR_INPUT;
        } else if (model_field(f)) {
            model = true;
            if (parse_model(fam, f, v, d) != PS_OK)
                return PS_ERR_INPUT;
        } else {
            const char *why = "";
            if (!is_scalar(v) || ps_text_scalar_field(fam->tmpl, f, v->text, &why) != 0)
                return fail(d, v, key, "%s: %s", key, is_scalar(v) ? why : "expected a single value");
        }
    }
    if (!model)
        return fail(d, node, "", "family '%s': no model (numerator/denominator, zeros/poles/gain or a/b/c/d)",
                    fam->id);
    if (yield && parse_yield(fam, yield, d) != PS_OK)
        return PS_ERR_INPUT;
    size_t grid = 1;
    for (size_t i = 0; i < fam->n_params; i++)
        if (fam->param[i].n_sweep && (grid *= fam->param[i].n_sweep) > PS_FAM_GRID)
            return fail(d, params, "parameters", "family '%s': the sweep grid has more than 4096 points", fam->id);
    if (defaults)
        ps_plant_apply_defaults(fam->tmpl, defaults);
    return PS_OK;
}

void ps_family_free(ps_family *fam)
{
    for (size_t i = 0; i < fam->n_expr; i++)
        free(fam->expr[i].text);
    fam->n_expr = 0;
    ps_expr_ctx_free(fam->ectx);
    fam->ectx = NULL;
    free(fam->tmpl);
    fam->tmpl = NULL;
}

size_t ps_family_grid_size(const ps_family *fam)
{
    size_t n = 1;
    for (size_t i = 0; i < fam->n_params; i++)
        if (fam->param[i].n_sweep)
            n *= fam->param[i].n_sweep;
    return n;
}

void ps_family_grid_point(const ps_family *fam, size_t k, double *values)
{
    for (size_t i = fam->n_params; i-- > 0;) {
        const ps_fam_param *par = &fam->param[i];
        if (par->n_sweep) {
            values[i] = par->sweep[k % par->n_sweep];
            k /= par->n_sweep;
        } else
            values[i] = par->nominal;
    }
}

static void name_point(const ps_family *fam, const double *values, bool all_names, char *out, size_t n)
{
    int w = snprintf(out, n, "%s[", fam->id);
    bool first = true;
    for (size_t i = 0; i < fam->n_params && w > 0 && (size_t)w < n; i++) {
        if (!all_names && !fam->param[i].n_sweep)
            continue;
        w += snprintf(out + w, n - (size_t)w, "%s%s=%.6g", first ? "" : ",", fam->param[i].name, values[i]);
        first = false;
    }
    if (w > 0 && (size_t)w < n - 1)
        snprintf(out + w, n - (size_t)w, "]");
    if (first) /* nothing named: the family id alone */
        snprintf(out, n, "%s", fam->id);
}

ps_status ps_family_eval(ps_family *fam, const double *values, bool all_names, ps_plant *out, ps_diag *d)
{
    ps_plant_reset(out);
    *out = *fam->tmpl;
    out->line = fam->line;
    name_point(fam, values, all_names, out->id, sizeof out->id);
    ps_plant_mark(out, PS_F_ID, fam->line, 0);
    for (size_t i = 0; i < fam->n_params; i++)
        fam->value[i] = values[i];
    for (size_t i = 0; i < fam->n_expr; i++) {
        ps_fam_expr *e = &fam->expr[i];
        const char *name = ps_field_name(e->field);
        double v;
        ps_diag ed = {0};
        if (ps_expr_eval(fam->ectx, e->compiled, &v, &ed) != PS_OK)
            return ps_diag_set(d, PS_ERR_INPUT, e->line, e->col, name, "%s: %.400s", name, ed.text);
        switch (e->field) {
        case PS_F_NUM: out->num[e->index] = v; break;
        case PS_F_DEN: out->den[e->index] = v; break;
        case PS_F_ZEROS: out->zeros[e->index] = (ps_cplx){v, 0}; break;
        case PS_F_POLES: out->poles[e->index] = (ps_cplx){v, 0}; break;
        case PS_F_A: out->a[e->index] = v; break;
        case PS_F_B: out->b[e->index] = v; break;
        case PS_F_C: out->c[e->index] = v; break;
        case PS_F_SAMPLE_RATE: case PS_F_COMPUTE_DELAY:
            ps_text_unit_store(out, e->field, v, e->unit, e->unit_scale); /* ranges: ps_plant_check */
            break;
        default: *ps_plant_scalar(out, e->field) = v; break;
        }
    }
    out->n_num = fam->n_list[PS_F_NUM];
    out->n_den = fam->n_list[PS_F_DEN];
    out->n_zeros = fam->n_list[PS_F_ZEROS];
    out->n_poles = fam->n_list[PS_F_POLES];
    out->n_b = fam->n_list[PS_F_B];
    out->n_c = fam->n_list[PS_F_C];
    out->a_rows = fam->a_rows;
    out->a_cols = fam->a_cols;
    return PS_OK;
}
