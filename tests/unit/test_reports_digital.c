/* test_reports_digital.c - every report writer carries the digital loop of a
 * hand-built sampled plant (rate, Nyquist frequency, computation delay, roots
 * in z with the sampling zeros marked, the Nyquist floor, the two new
 * targets), and a run of continuous plants shows none of it. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "report/listing.h"
#include "report/reports.h"
#include "screen/screen.h"
#include "support.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

TestSuite(reports_digital, .init = ps_test_init);

/* The held plant: one unstable pole 2.385 rad/s plus the triple integrator's
 * sampling zeros. The zeros of 1/s^3 sampled with a hold are the roots of
 * z^2 + 4 z + 1 = 0, -2 -+ sqrt(3) (Astrom, Hagander & Sternby, Automatica
 * 20(1), 1984): -3.7320508 (outside the unit circle) and -0.26794919. */
static const double H = 0.00125;          /* 800 Hz, Nyquist pi/H = 2513.27 rad/s = 400 Hz */
static const double CDELAY = 0.0015;      /* 1.2 samples */
static const double MS_NYQ = 1.4173;

static ps_summary *add_plant(ps_run *r, const char *id, ps_verdict v, double severity)
{
    ps_summary *s = ps_run_next(r);
    cr_assert_not_null(s);
    size_t order = s->order, file_index = s->file_index;
    memset(s, 0, sizeof *s);
    s->order = order;
    s->file_index = file_index;
    snprintf(s->id, sizeof s->id, "%s", id);
    s->line = 7 + order;
    s->verdict = v;
    s->severity = severity;
    s->share_ms = s->share_mt = severity;
    s->share_effort = NAN;
    s->worst = "Ms";
    snprintf(s->cause, sizeof s->cause, "floors of %s", id);
    s->fl.ms = 1.73;
    s->fl.mt = 1.21;
    s->fl.bode_area = 7.49;
    s->fl.ms_interpolation = 1.3;
    s->fl.mt_interpolation = 1.21;
    s->fl.effort = 2.718;
    s->fl.ms_band = s->fl.ms_poisson = s->fl.mt_poisson = NAN;
    s->fl.limiting = "interpolation";
    s->fl.crossover_min = 4.77;
    s->fl.crossover_max = INFINITY;
    s->req = (ps_requirements){.ms_allowed = 2.0, .mt_allowed = 1.25, .delta = 0.5, .k = 1.0};
    for (int k = 0; k < PS_TARGET_COUNT; k++)
        s->target[k] = (ps_target){.state = PS_TARGET_NA, .now = NAN, .limit = NAN};
    s->n_poles = 1;
    s->poles[0] = (ps_cplx){2.385, 0};
    s->n_rhp_poles = 1;
    s->n_growth = 1;
    s->growth[0] = (ps_cplx){2.385, 0};
    return s;
}

static void make_held(ps_summary *s)
{
    s->h = H;
    s->compute_delay = CDELAY;
    s->in_z = false;
    ps_floors *fl = &s->fl;
    fl->h = H;
    fl->nyquist = M_PI / H;
    fl->ms_nyquist = MS_NYQ;
    fl->ms_nyquist_ln = log(MS_NYQ);
    fl->limiting = "nyquist";
    fl->z_rel_degree = 2;
    fl->n_zpoles = 3;
    fl->zpoles[0] = (ps_cplx){exp(2.385 * H), 0};
    fl->zpoles[1] = (ps_cplx){0.9391, 0.1127};
    fl->zpoles[2] = (ps_cplx){0.9391, -0.1127};
    fl->n_zzeros = 3;
    fl->zzeros[0] = (ps_cplx){-2.0 - sqrt(3.0), 0};
    fl->zzeros[1] = (ps_cplx){-2.0 + sqrt(3.0), 0};
    fl->zzeros[2] = (ps_cplx){0.8513, 0}; /* the image of a plant zero: not a sampling zero */
    fl->zzero_sampling[0] = fl->zzero_sampling[1] = true;
    fl->n_sampling_zeros = 2;
    fl->n_zzeros_outside = 1;
}

/* The run: a held plant (redesign, sample-rate target found, computation
 * delay not monotone), a plant given in z (clear), a continuous plant. */
static void build_digital(ps_run *r)
{
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(r, &opt);
    cr_assert_eq(ps_run_add_catalog(r, "loops.yaml", NULL), PS_OK);
    ps_summary *s = add_plant(r, "held-800", PS_VERDICT_REDESIGN, 1.562);
    make_held(s);
    s->target[PS_TARGET_SAMPLE_RATE] = (ps_target){.state = PS_TARGET_FOUND, .now = 800.0, .limit = 2173.5};
    s->target[PS_TARGET_COMPUTE_DELAY] = (ps_target){.state = PS_TARGET_NOT_MONOTONE, .now = CDELAY, .limit = NAN};
    snprintf(s->target[PS_TARGET_COMPUTE_DELAY].why, sizeof s->target[0].why,
             "passes at 0.613 ms but fails again at 0.947 ms");
    ps_run_commit(r);

    s = add_plant(r, "given-in-z", PS_VERDICT_CLEAR, 0.413);
    make_held(s);
    s->in_z = true;
    s->compute_delay = 2 * H;
    s->fl.ms_nyquist = NAN; /* direct feedthrough */
    s->fl.ms_nyquist_ln = NAN;
    s->fl.limiting = "interpolation";
    s->fl.zzeros[0] = (ps_cplx){-1.5207, 0};
    /* Flags set on purpose: for a plant in z no zero may be called a sampling zero. */
    s->fl.n_sampling_zeros = 2;
    ps_run_commit(r);

    s = add_plant(r, "continuous-c", PS_VERDICT_MARGINAL, 0.871);
    ps_run_commit(r);
    r->counts = (ps_batch_counts){.entries = 3, .models = 3};
    ps_run_rank(r);
}

static void build_continuous(ps_run *r)
{
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(r, &opt);
    cr_assert_eq(ps_run_add_catalog(r, "cont.yaml", NULL), PS_OK);
    add_plant(r, "cont-a", PS_VERDICT_REDESIGN, 1.31);
    ps_run_commit(r);
    add_plant(r, "cont-b", PS_VERDICT_CLEAR, 0.31);
    ps_run_commit(r);
    r->counts = (ps_batch_counts){.entries = 2, .models = 2};
    ps_run_rank(r);
}

static ps_status term_all(FILE *f, const ps_run *r) { return ps_write_terminal(f, r, false, 0, NULL); }

/* Runs of white space (the terminal report wraps at 96 columns) become one space. */
static void squeeze(char *doc)
{
    char *o = doc;
    for (const char *p = doc; *p; p++) {
        bool sp = *p == ' ' || *p == '\n' || *p == '\r' || *p == '\t';
        if (sp && o > doc && o[-1] == ' ')
            continue;
        *o++ = sp ? ' ' : *p;
    }
    *o = '\0';
}

static char *render(ps_writer_fn fn, const ps_run *r)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    cr_assert_not_null(f);
    cr_assert_eq(fn(f, r), PS_OK);
    cr_assert_eq(fclose(f), 0);
    return buf;
}

static void has(const char *doc, const char *what, const char *writer)
{
    cr_assert_not_null(strstr(doc, what), "%s: missing '%s'", writer, what);
}

static void lacks(const char *doc, const char *what, const char *writer)
{
    cr_assert_null(strstr(doc, what), "%s: must not print '%s'", writer, what);
}

/* The words every text writer must carry for the two sampled plants. */
static void check_text(const char *doc, const char *writer)
{
    has(doc, "sample rate 800 Hz (period 1.25 ms)", writer);
    has(doc, "Nyquist frequency 2513 rad/s (400 Hz)", writer);
    has(doc, "computation delay 1.5 ms (1.2 samples)", writer);
    has(doc, "continuous plant behind a zero-order hold", writer);
    has(doc, "-3.732 (sampling zero, outside the unit circle)", writer);
    has(doc, "-0.2679 (sampling zero)", writer);
    has(doc, "0.8513;", writer); /* the plant zero's image: unmarked */
    lacks(doc, "0.8513 (", writer);
    has(doc, "0.9391+-0.1127j", writer);
    has(doc, "1.003 (outside the unit circle)", writer); /* e^{2.385 h} */
    has(doc, "relative degree in z 2", writer);
    has(doc, "from the discrete Bode area (Sung ", writer);
    has(doc, "1.417", writer);
    /* the plant in z: its zeros are the model's, never sampling zeros */
    has(doc, "plant given in z", writer);
    has(doc, "computation delay 2.5 ms (2 samples)", writer);
    has(doc, "-1.521 (outside the unit circle)", writer);
    lacks(doc, "-1.521 (sampling", writer);
    has(doc, "not applicable (the plant in z has direct feedthrough", writer);
    /* the targets of the flagged plant */
    has(doc, "sample rate must reach 2174 Hz (Nyquist frequency 6828 rad/s); now 800 Hz", writer);
    has(doc, "computation delay: no single boundary (passes at 0.613 ms but fails again at 0.947 ms)", writer);
}

static size_t count(const char *hay, const char *needle)
{
    size_t n = 0;
    for (const char *p = strstr(hay, needle); p; p = strstr(p + 1, needle))
        n++;
    return n;
}

Test(reports_digital, terminal_markdown_html_carry_the_digital_loop)
{
    static ps_run r;
    build_digital(&r);
    struct { const char *name; ps_writer_fn fn; } w[] = {
        {"terminal", term_all}, {"markdown", ps_write_markdown}, {"html", ps_write_html}};
    for (size_t i = 0; i < 3; i++) {
        char *doc = render(w[i].fn, &r);
        squeeze(doc);
        check_text(doc, w[i].name);
        /* Only the two sampled plants get "sampling zero" wording: two per held plant. */
        cr_assert_eq(count(doc, "(sampling zero"), 2, "%s: %zu sampling-zero marks", w[i].name,
                     count(doc, "(sampling zero"));
        free(doc);
    }
    ps_run_free(&r);
}

Test(reports_digital, text_writers_print_nothing_new_for_continuous_loops)
{
    static ps_run r;
    build_continuous(&r);
    static const char *const words[] = {"digital loop", "Digital loops", "sample rate", "Nyquist", "in z",
                                        "sampling zero", "unit circle", "computation delay", "Sung"};
    ps_writer_fn fns[] = {term_all, ps_write_markdown, ps_write_html};
    for (size_t i = 0; i < 3; i++) {
        char *doc = render(fns[i], &r);
        for (size_t k = 0; k < sizeof words / sizeof words[0]; k++)
            cr_assert_null(strstr(doc, words[k]), "writer %zu prints '%s' for a continuous run", i, words[k]);
        free(doc);
    }
    ps_run_free(&r);
}

static int column(const ps_csv_table *t, const char *name)
{
    for (size_t c = 0; c < t->n_cols[0]; c++)
        if (strcmp(t->cell[0][c], name) == 0)
            return (int)c;
    cr_assert_fail("no column '%s'", name);
    return -1;
}

static size_t row_of(const ps_csv_table *t, const char *id)
{
    int c = column(t, "id");
    for (size_t i = 1; i < t->n_rows; i++)
        if (strcmp(t->cell[i][c], id) == 0)
            return i;
    cr_assert_fail("no row '%s'", id);
    return 0;
}

static void near(const char *text, double want, double rel)
{
    char *end;
    double got = strtod(text, &end);
    cr_assert(end != text && *end == '\0', "'%s' is not a number", text);
    cr_assert(fabs(got - want) <= rel * fabs(want), "got %s, want %.9g", text, want);
}

Test(reports_digital, csv_columns)
{
    static ps_run r;
    build_digital(&r);
    char *doc = render(ps_write_csv, &r);
    char path[256];
    snprintf(path, sizeof path, "%s", ps_test_write_temp(".csv", doc));
    static ps_csv_table t;
    ps_test_csv_read(path, &t);
    unlink(path);
#define CELL(row, name) t.cell[row][column(&t, name)]
    size_t a = row_of(&t, "held-800"), z = row_of(&t, "given-in-z"), c = row_of(&t, "continuous-c");
    near(CELL(a, "sample_rate_hz"), 800.0, 1e-9);
    near(CELL(a, "nyquist_rad_s"), M_PI / H, 1e-8); /* nine significant digits */
    near(CELL(a, "compute_delay_s"), CDELAY, 1e-9);
    near(CELL(a, "compute_delay_samples"), 1.2, 1e-9);
    cr_assert_str_eq(CELL(a, "domain"), "s");
    cr_assert_str_eq(CELL(a, "z_rel_degree"), "2");
    /* a text cell that begins with '-' carries the formula guard */
    cr_assert_str_eq(CELL(a, "sampling_zeros"), "'-3.73205081 -0.267949192");
    cr_assert_str_eq(CELL(a, "zeros_outside_circle"), "1");
    near(CELL(a, "ms_nyquist_floor"), MS_NYQ, 1e-9);
    cr_assert_str_eq(CELL(a, "limiting"), "nyquist");
    cr_assert_str_eq(CELL(a, "sample_rate_state"), "found");
    near(CELL(a, "sample_rate_limit"), 2173.5, 1e-9);
    near(CELL(a, "sample_rate_now"), 800.0, 1e-9);
    cr_assert_str_eq(CELL(a, "compute_delay_state"), "not-monotone");
    cr_assert_str_eq(CELL(a, "compute_delay_limit"), "");
    cr_assert_str_eq(CELL(z, "domain"), "z");
    cr_assert_str_eq(CELL(z, "sampling_zeros"), "");
    cr_assert_str_eq(CELL(z, "ms_nyquist_floor"), "");
    near(CELL(z, "compute_delay_samples"), 2.0, 1e-12);
    static const char *const digital[] = {"sample_rate_hz", "nyquist_rad_s", "compute_delay_s",
                                          "compute_delay_samples", "domain", "z_rel_degree", "sampling_zeros",
                                          "zeros_outside_circle", "ms_nyquist_floor", "sample_rate_now",
                                          "sample_rate_limit", "compute_delay_now", "compute_delay_limit"};
    for (size_t i = 0; i < sizeof digital / sizeof digital[0]; i++)
        cr_assert_str_eq(CELL(c, digital[i]), "", "continuous plant: %s not empty", digital[i]);
    cr_assert_str_eq(CELL(c, "sample_rate_state"), "not-applicable");
#undef CELL
    free(doc);
    ps_run_free(&r);
}

static json_t *plant_named(json_t *doc, const char *id)
{
    size_t i;
    json_t *p;
    json_array_foreach(doc, i, p)
        if (strcmp(json_string_value(json_object_get(p, "id")), id) == 0)
            return p;
    cr_assert_fail("no plant '%s'", id);
    return NULL;
}

static double num(json_t *o, const char *key)
{
    json_t *v = json_object_get(o, key);
    cr_assert(json_is_number(v), "'%s' is not a number", key);
    return json_number_value(v);
}

Test(reports_digital, json_sampling_object_floor_and_targets)
{
    static ps_run r;
    build_digital(&r);
    char *summary = render(ps_write_json, &r);
    json_error_t err;
    json_t *sum = json_loads(summary, 0, &err);
    cr_assert_not_null(sum, "%s", err.text);
    cr_assert_eq(json_integer_value(json_object_get(sum, "schema_version")), 6);
    cr_assert_str_eq(json_string_value(json_object_get(sum, "plants_file")), "loops.screen.plants.jsonl");
    json_decref(sum);
    free(summary);
    /* The plant records: one JSON object a line (JSON Lines), numbers with
     * PS_JSONL_DIGITS = 9 significant digits, so values are compared to a
     * relative 1e-8; members without a value (null) or false are left out. */
    char *text = render(ps_write_plants_jsonl, &r);
    json_t *doc = json_array();
    for (char *line = text, *eol; *line; line = eol + 1) {
        eol = strchr(line, '\n');
        cr_assert_not_null(eol, "every record ends its line");
        *eol = '\0';
        json_t *rec = json_loads(line, 0, &err);
        cr_assert_not_null(rec, "%s", err.text);
        json_array_append_new(doc, rec);
    }
    cr_assert_eq(json_array_size(doc), r.n_rows);

    json_t *a = plant_named(doc, "held-800"), *smp = json_object_get(a, "sampling");
    cr_assert(json_is_object(smp));
    cr_assert_float_eq(num(smp, "rate_hz"), 800.0, 800.0 * 1e-8);
    cr_assert_float_eq(num(smp, "period_s"), H, H * 1e-8);
    cr_assert_float_eq(num(smp, "nyquist_rad_s"), M_PI / H, M_PI / H * 1e-8);
    cr_assert_float_eq(num(smp, "compute_delay_s"), CDELAY, CDELAY * 1e-8);
    cr_assert_float_eq(num(smp, "compute_delay_samples"), 1.2, 1.2e-8);
    cr_assert_str_eq(json_string_value(json_object_get(smp, "domain")), "s");
    cr_assert_eq(json_integer_value(json_object_get(smp, "z_rel_degree")), 2);
    json_t *zz = json_object_get(smp, "zeros_z"), *pz = json_object_get(smp, "poles_z");
    cr_assert_eq(json_array_size(pz), 3);
    cr_assert_float_eq(num(json_array_get(pz, 1), "im"), 0.1127, 0.1127e-8);
    cr_assert_eq(json_array_size(zz), 3);
    cr_assert_float_eq(num(json_array_get(zz, 0), "re"), -3.7320508075688772, 3.74e-8);
    cr_assert(json_is_true(json_object_get(json_array_get(zz, 0), "sampling")));
    cr_assert(json_is_true(json_object_get(json_array_get(zz, 0), "outside")));
    cr_assert(json_is_true(json_object_get(json_array_get(zz, 1), "sampling")));
    cr_assert_null(json_object_get(json_array_get(zz, 1), "outside"), "false is left out");
    cr_assert_null(json_object_get(json_array_get(zz, 2), "sampling"), "false is left out");
    json_t *fl = json_object_get(a, "floors");
    cr_assert_float_eq(num(fl, "ms_nyquist"), MS_NYQ, fabs(MS_NYQ) * 1e-8);
    cr_assert_str_eq(json_string_value(json_object_get(fl, "limiting")), "nyquist");
    json_t *tg = json_object_get(a, "targets");
    json_t *sr = json_object_get(tg, "sample_rate"), *cd = json_object_get(tg, "compute_delay");
    cr_assert_str_eq(json_string_value(json_object_get(sr, "state")), "found");
    cr_assert_float_eq(num(sr, "limit"), 2173.5, 2173.5e-8);
    cr_assert_str_eq(json_string_value(json_object_get(cd, "state")), "not-monotone");
    cr_assert_null(json_object_get(cd, "limit"), "no limit: left out");
    cr_assert_float_eq(num(cd, "now"), CDELAY, CDELAY * 1e-8);

    json_t *z = plant_named(doc, "given-in-z");
    smp = json_object_get(z, "sampling");
    cr_assert_str_eq(json_string_value(json_object_get(smp, "domain")), "z");
    zz = json_object_get(smp, "zeros_z");
    for (size_t i = 0; i < json_array_size(zz); i++)
        cr_assert_null(json_object_get(json_array_get(zz, i), "sampling"), "plant in z, zero %zu", i);
    cr_assert(json_is_true(json_object_get(json_array_get(zz, 0), "outside")));
    cr_assert_eq(json_integer_value(json_object_get(smp, "n_sampling_zeros")), 0);
    fl = json_object_get(z, "floors");
    cr_assert_null(json_object_get(fl, "ms_nyquist"));
    cr_assert_not_null(json_object_get(json_object_get(fl, "reasons"), "ms_nyquist"));

    json_t *c = plant_named(doc, "continuous-c");
    cr_assert_null(json_object_get(c, "sampling"), "a continuous loop: no sampling member (null is left out)");
    cr_assert_null(json_object_get(json_object_get(c, "floors"), "ms_nyquist"));
    cr_assert_null(json_object_get(json_object_get(c, "targets"), "sample_rate"), "not applicable: left out");
    json_decref(doc);
    free(text);
    ps_run_free(&r);
}

/* The survey listing (text and JSON) from a hand-built outcome. */
Test(reports_digital, survey_listing_text_and_json)
{
    static ps_plant p;
    static ps_analysis an;
    static ps_summary s; /* for its floors */
    static ps_run r;
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(&r, &opt);
    cr_assert_eq(ps_run_add_catalog(&r, "x.yaml", NULL), PS_OK);
    ps_summary *held = add_plant(&r, "held-800", PS_VERDICT_REDESIGN, 1.5);
    make_held(held);
    s = *held;
    ps_run_free(&r);
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "held-800");
    p.form = PS_FORM_FACTORED;
    p.line = 3;
    an.n_poles = 1;
    an.poles[0] = (ps_root){.v = {2.385, 0}, .region = PS_RHP, .mult = 1};
    an.poles[0].v.re = 1.5207; /* the model is in z: this pole lies outside the unit circle */
    an.n_rhp_poles = 1;
    an.h = H;
    an.compute_delay = CDELAY;
    an.in_z = true;
    ps_outcome o = {.file = "x.yaml", .p = &p, .an = &an, .fl = &s.fl};
    ps_batch_counts counts = {.entries = 1, .models = 1};
    for (int json = 0; json < 2; json++) {
        char *buf = NULL;
        size_t n = 0;
        FILE *f = open_memstream(&buf, &n);
        ps_listing *l = ps_listing_new(f, json);
        ps_listing_add(l, &o);
        cr_assert_eq(ps_listing_finish(l, &counts), PS_OK);
        ps_listing_free(l);
        fclose(f);
        if (!json) {
            has(buf, "sample rate 800 Hz", "survey text");
            has(buf, "plant given in z", "survey text");
            lacks(buf, "(sampling zero", "survey text of a plant in z");
            has(buf, "-3.732 (outside the unit circle)", "survey text");
            has(buf, "from the discrete Bode area", "survey text");
            lacks(buf, "[rhp]", "survey text of a plant in z");
            has(buf, "poles in z 1.5207[outside]", "survey text of a plant in z");
            has(buf, "poles outside the unit circle 1", "survey text of a plant in z");
        } else {
            json_t *doc = json_loads(buf, 0, NULL);
            cr_assert_not_null(doc);
            json_t *pl = json_array_get(json_object_get(doc, "plants"), 0);
            cr_assert_float_eq(num(json_object_get(pl, "sampling"), "rate_hz"), 800.0, 1e-9);
            cr_assert_float_eq(num(json_object_get(pl, "floors"), "ms_nyquist"), MS_NYQ, 1e-12);
            json_decref(doc);
        }
        free(buf);
    }
}
