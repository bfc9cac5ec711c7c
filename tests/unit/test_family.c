/* test_family.c - plant families: expressions against hand values, errors
 * with positions, feasibility boundaries known in closed form (which floor
 * binds there: Ms, Mt, effort; what the figure draws), a non-monotone sweep,
 * a tolerance yield against the normal CDF, declared ranges (redrawn draws,
 * their errors) and invalid units counted apart. */
#include <criterion/criterion.h>
#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "catalog/catalog.h"
#include "report/reports.h"
#include "screen/study.h"
#include "support.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static ps_family fam;
static ps_family_result res;
static ps_diag fam_diag;
static ps_status fam_status;
static bool study;
static ps_plant scratch, evaluated;

static int no_plant(void *ctx, ps_plant *p, const ps_diag *err)
{
    (void)ctx, (void)p, (void)err;
    return 0;
}

static int one_family(void *ctx, const ps_ynode *node, const ps_plant *defaults)
{
    (void)ctx;
    fam_status = ps_family_parse(&fam, node, defaults, &fam_diag);
    if (fam_status == PS_OK && study) {
        ps_study_ws *ws = ps_study_ws_new();
        cr_assert_not_null(ws);
        ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_ALL};
        ps_study_family(ws, &fam, &opt, &res);
        ps_study_ws_free(ws);
    }
    return 0;
}

/* Read the first family of text (the family stays in fam until the next call). */
static void read_family(const char *text, bool with_study)
{
    ps_family_free(&fam);
    memset(&fam_diag, 0, sizeof fam_diag);
    study = with_study;
    ps_diag fd = {0};
    const char *path = ps_test_write_temp(".yaml", text);
    cr_assert_eq(ps_catalog_read_families(path, &scratch, no_plant, one_family, NULL, &fd), PS_OK, "%s", fd.text);
}

TestSuite(family, .init = ps_test_init);

/* Cart and rod, linearised: -(M+m) g as a denominator coefficient; hand values. */
Test(family, expressions_against_hand_values)
{
    read_family("families:\n"
                "  - id: cart\n"
                "    parameters: {M: 1.2, m: 0.1, g: 9.81, l: {nominal: 0.5, sweep: [0.25, 0.5]}}\n"
                "    numerator: [\"-1/(M*l)\"]\n"
                "    denominator: [1, 0, \"-(M+m)*g/(M*l)\"]\n"
                "    delay: \"0.002 + 0*l\"\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    cr_assert_eq(ps_family_grid_size(&fam), 2);
    double v[PS_FAM_PARAMS];
    ps_family_grid_point(&fam, 1, v);
    ps_diag d = {0};
    cr_assert_eq(ps_family_eval(&fam, v, false, &evaluated, &d), PS_OK, "%s", d.text);
    cr_assert_str_eq(evaluated.id, "cart[l=0.5]");
    cr_assert_float_eq(evaluated.num[0], -1 / (1.2 * 0.5), 1e-15);
    cr_assert_float_eq(evaluated.den[2], -(1.2 + 0.1) * 9.81 / (1.2 * 0.5), 1e-13);
    cr_assert_float_eq(evaluated.delay, 0.002, 1e-18);
    /* re-evaluation with new values reuses the compiled expressions */
    ps_family_grid_point(&fam, 0, v);
    cr_assert_eq(ps_family_eval(&fam, v, false, &evaluated, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(evaluated.den[2], -(1.3) * 9.81 / (1.2 * 0.25), 1e-13);
    cr_assert_eq(ps_plant_check(&evaluated, &d), PS_OK, "%s", d.text);
}

Test(family, unknown_name_and_syntax_errors_have_positions)
{
    read_family("families:\n  - id: f\n    parameters: {a: 1}\n    numerator: [1]\n    denominator: [1, \"a*bb\"]\n",
                false);
    cr_assert_eq(fam_status, PS_ERR_INPUT);
    cr_assert_eq(fam_diag.line, 5);
    cr_assert_str_eq(fam_diag.field, "denominator");
    cr_assert(strstr(fam_diag.text, "a*bb") && strstr(fam_diag.text, "unknown name \"bb\"") &&
                  strstr(fam_diag.text, "character 3"),
              "%s", fam_diag.text);
    read_family("families:\n  - id: f\n    parameters: {a: 1}\n    numerator: [1]\n    denominator: [1, \"(a+\"]\n",
                false);
    cr_assert_eq(fam_status, PS_ERR_INPUT);
    cr_assert(strstr(fam_diag.text, "character"), "%s", fam_diag.text);
}

Test(family, division_by_zero_names_the_values)
{
    read_family("families:\n  - id: f\n    parameters: {a: {nominal: 1, sweep: [0, 1]}}\n"
                "    numerator: [\"1/a\"]\n    denominator: [1, 2]\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    double v[PS_FAM_PARAMS];
    ps_family_grid_point(&fam, 0, v);
    ps_diag d = {0};
    cr_assert_eq(ps_family_eval(&fam, v, false, &evaluated, &d), PS_ERR_INPUT);
    cr_assert(strstr(d.text, "1/a") && strstr(d.text, "a=0") && strstr(d.text, "division by zero"), "%s", d.text);
    cr_assert_eq(d.line, 4);
}

/* Point-mass pendulum, p = sqrt(g/l), against an available bandwidth W_a
 * with delta = 0 (Stein 2003): Ms floor exp(pi p / W_a). It passes while
 * exp(pi p / W_a) <= Ms_allowed, i.e. l >= g pi^2 / (W_a ln Ms_allowed)^2. */
static void read_pendulum(const char *nominal, const char *sigma, const char *samples, const char *seed)
{
    char text[1024];
    snprintf(text, sizeof text,
             "defaults:\n  rolloff_start: 40\n  rolloff_gain: 0\n"
             "families:\n"
             "  - id: pend\n"
             "    parameters:\n"
             "      g: 9.81\n"
             "      l: {nominal: %s, sweep: {from: 0.05, to: 1.0, count: 9, scale: log}, tolerance: {normal: %s}}\n"
             "    poles: [\"sqrt(g/l)\", \"-sqrt(g/l)\", -60]\n"
             "    gain: \"60*g/l\"\n"
             "    yield: {samples: %s, seed: %s}\n",
             nominal, sigma, samples, seed);
    read_family(text, true);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
}

Test(family, pendulum_boundary_in_closed_form)
{
    read_pendulum("0.5", "0.01", "10", "1");
    double want = 9.81 * M_PI * M_PI / pow(40 * log(2.0), 2);
    cr_assert_eq(res.n_bound, 1);
    const ps_boundary *b = &res.bound[0];
    cr_assert_eq(b->state, PS_BOUND_FOUND, "%s", ps_bound_state_name(b->state));
    cr_assert_not(b->pass_below);
    cr_assert_float_eq(b->value, want, 1e-6 * want, "boundary %.12g, closed form %.12g", b->value, want);
    cr_assert_leq(b->ms_pass, 2.0);
    cr_assert_gt(b->ms_fail, 2.0);
}

/* A pole that rises and falls along the sweep: the verdict flips twice. */
Test(family, non_monotone_sweep_is_reported)
{
    read_family("defaults:\n  rolloff_start: 40\n  rolloff_gain: 0\n"
                "families:\n  - id: hump\n"
                "    parameters: {x: {nominal: 0.5, sweep: {from: 0, to: 1, count: 11}}}\n"
                "    poles: [\"20*(1 - 3.6*(x-0.5)^2)\", -5]\n    gain: 1\n",
                true);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    cr_assert_eq(res.bound[0].state, PS_BOUND_NON_MONOTONE, "%s", ps_bound_state_name(res.bound[0].state));
    cr_assert_eq(res.bound[0].n_changes, 2);
}

/* l ~ N(0.14, 0.01): the failing share is Phi((l* - 0.14)/0.01) (GSL's
 * normal CDF); the Wilson interval of 4000 seeded samples must hold it. */
Test(family, yield_matches_the_normal_cdf)
{
    read_pendulum("0.14", "0.01", "4000", "20261202");
    double lstar = 9.81 * M_PI * M_PI / pow(40 * log(2.0), 2);
    double want_pass = 1 - gsl_cdf_ugaussian_P((lstar - 0.14) / 0.01);
    const ps_yield *y = &res.yield;
    cr_assert(res.has_yield);
    cr_assert_eq(y->samples, 4000);
    cr_assert_leq(y->pass_lo, want_pass, "pass %.4f [%.4f, %.4f], expected %.4f", y->pass_frac, y->pass_lo,
                  y->pass_hi, want_pass);
    cr_assert_geq(y->pass_hi, want_pass, "pass %.4f [%.4f, %.4f], expected %.4f", y->pass_frac, y->pass_lo,
                  y->pass_hi, want_pass);
    cr_assert_eq(y->culprit, 1, "the only toleranced parameter, l");
    cr_assert_lt(y->culprit_shift, 0, "failing units have shorter rods");
    /* the same seed gives the same units; another seed other units */
    size_t first = y->count[PS_VERDICT_CLEAR] + y->count[PS_VERDICT_MARGINAL];
    read_pendulum("0.14", "0.01", "4000", "20261202");
    cr_assert_eq(res.yield.count[PS_VERDICT_CLEAR] + res.yield.count[PS_VERDICT_MARGINAL], first);
    read_pendulum("0.14", "0.01", "4000", "7");
    cr_assert_neq(res.yield.count[PS_VERDICT_CLEAR] + res.yield.count[PS_VERDICT_MARGINAL], first);
}

/* ---- which floor binds at a boundary ----------------------------------- */

/* One real unstable pole p behind a delay theta: every stabilizing loop has
 * ||T|| >= e^{p theta} (Skogestad & Postlethwaite, Multivariable Feedback
 * Control, 2nd ed. 2005, ch. 5), so against the allowed Mt 1.25 the delay
 * must stay below ln(1.25)/p. The band floor exp(pi p / W_a) (Stein 2003)
 * = exp(pi 3.7 / 40) = 1.337 keeps the Ms share (allowed 2) near 0.42: the
 * Mt floor, not the Ms floor, sets the verdict there. */
static void read_delay_pole(void)
{
    read_family("defaults:\n  rolloff_start: 40\n  rolloff_gain: 0\n"
                "families:\n  - id: delay-pole\n"
                "    parameters: {p: 3.7, theta: {nominal: 0.03, sweep: {from: 0.005, to: 0.12, count: 9}}}\n"
                "    poles: [p, -60]\n    gain: 60\n    delay: theta\n",
                true);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
}

Test(family, mt_floor_binds_at_a_delay_boundary)
{
    read_delay_pole();
    const ps_boundary *b = &res.bound[0];
    double want = log(1.25) / 3.7, band = exp(M_PI * 3.7 / 40);
    cr_assert_eq(b->state, PS_BOUND_FOUND, "%s", ps_bound_state_name(b->state));
    cr_assert(b->pass_below);
    cr_assert_float_eq(b->value, want, 1e-6 * want, "boundary %.12g, ln(1.25)/p = %.12g", b->value, want);
    cr_assert_eq(b->binding, PS_QTY_MT, "binding %s", ps_quantity_key(b->binding));
    cr_assert_float_eq(b->mt_allowed, 1.25, 0);
    cr_assert_float_eq(b->ms_allowed, 2.0, 0);
    cr_assert(isnan(b->effort_allowed), "no effort requirement");
    cr_assert_leq(b->mt_pass, 1.25);
    cr_assert_gt(b->mt_fail, 1.25);
    cr_assert_float_eq(b->mt_pass, 1.25, 1e-8);
    /* the Ms floor there is the band floor, far below the allowed 2 */
    cr_assert_float_eq(b->ms_pass, band, 1e-6 * band, "Ms floor %.9g, band floor %.9g", b->ms_pass, band);
    cr_assert_lt(b->ms_fail, 2.0);
    /* the figure draws the Mt floor, and every failing sweep point is above 1.25 */
    cr_assert_eq(b->plotted, PS_QTY_MT, "plotted %s", ps_quantity_key(b->plotted));
    cr_assert_float_eq(ps_boundary_plotted_allowed(b), 1.25, 0);
    size_t fails = 0;
    for (size_t k = 0; k < b->n_curve; k++) {
        double mt = exp(3.7 * b->curve_x[k]);
        cr_assert_float_eq(b->curve_mt[k], fmax(mt, 1.0), 1e-6 * mt, "Mt floor at theta %g", b->curve_x[k]);
        cr_assert_eq(ps_boundary_plotted_value(b, k), b->curve_mt[k]);
        if (!b->curve_pass[k]) {
            fails++;
            cr_assert_gt(b->curve_mt[k], 1.25);
            cr_assert_lt(b->curve_ms[k], 2.0, "a failing point below the allowed Ms at theta %g", b->curve_x[k]);
        }
    }
    cr_assert_geq(fails, 3);
    char text[700];
    ps_boundary_text(&res, b, text, sizeof text);
    cr_assert(strstr(text, "theta must stay below 0.0603091") && strstr(text, "set by the Mt floor: 1.25 passing, "
                                                                              "1.25 failing, allowed 1.25"),
              "%s", text);
    cr_assert_null(strstr(text, "Ms floor"), "%s", text);
}

/* P = k / ((s - p)(s + 60)): its stable mirror G_s = k / ((s + p)(s + 60))
 * gives ||C S|| >= 1/|G_s(p)| = 2 p (p + 60) / k (S&P 2nd ed. ch. 5, input
 * usage). Against an allowed effort E the gain must stay above
 * 2 p (p + 60) / E; the Ms and Mt shares stay below 0.5 there. */
Test(family, effort_floor_binds_at_a_gain_boundary)
{
    read_family("defaults:\n  rolloff_start: 40\n  rolloff_gain: 0\n"
                "families:\n  - id: weak-drive\n"
                "    parameters: {p: 3.7, k: {nominal: 300, sweep: {from: 50, to: 800, count: 7, scale: log}}}\n"
                "    poles: [p, -60]\n    gain: k\n    effort_allowed: 2.385\n",
                true);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    const ps_boundary *b = &res.bound[0];
    double want = 2 * 3.7 * 63.7 / 2.385;
    cr_assert_eq(b->state, PS_BOUND_FOUND, "%s", ps_bound_state_name(b->state));
    cr_assert_not(b->pass_below);
    cr_assert_float_eq(b->value, want, 1e-6 * want, "boundary %.12g, 2p(p+60)/E = %.12g", b->value, want);
    cr_assert_eq(b->binding, PS_QTY_EFFORT, "binding %s", ps_quantity_key(b->binding));
    cr_assert_float_eq(b->effort_allowed, 2.385, 0);
    cr_assert_leq(b->effort_pass, 2.385);
    cr_assert_gt(b->effort_fail, 2.385);
    cr_assert_eq(b->plotted, PS_QTY_EFFORT, "plotted %s", ps_quantity_key(b->plotted));
    char text[700];
    ps_boundary_text(&res, b, text, sizeof text);
    cr_assert(strstr(text, "set by the effort floor (peak |C S|): 2.385 passing, 2.385 failing, allowed 2.385"), "%s",
              text);
}

/* Failing at both ends for different floors: small x, the delay's Mt floor
 * e^{0.4 (1 - x)} above 1.25; large x, the band floor exp(pi a / 40),
 * a = 2 + 10 x, above the allowed Ms 2 while the Mt share near x = 0.7 stays
 * below 1. No floor lies above its line at every failing point: the figure
 * draws the severity against 1. */
Test(family, severity_is_plotted_when_the_failing_floor_changes)
{
    read_family("defaults:\n  rolloff_start: 40\n  rolloff_gain: 0\n"
                "families:\n  - id: two-ends\n"
                "    parameters: {x: {nominal: 0.5, sweep: {from: 0, to: 1, count: 11}}}\n"
                "    poles: [\"2 + 10*x\", -60]\n    gain: 60\n    delay: \"0.4*(1 - x)/(2 + 10*x)\"\n",
                true);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    const ps_boundary *b = &res.bound[0];
    cr_assert_eq(b->state, PS_BOUND_NON_MONOTONE, "%s", ps_bound_state_name(b->state));
    cr_assert_eq(b->plotted, PS_QTY_SEVERITY, "plotted %s", ps_quantity_key(b->plotted));
    cr_assert_float_eq(ps_boundary_plotted_allowed(b), 1.0, 0);
    bool ms_only = false, mt_only = false;
    for (size_t k = 0; k < b->n_curve; k++) {
        if (b->curve_pass[k])
            continue;
        cr_assert_gt(ps_boundary_plotted_value(b, k), 1.0);
        ms_only |= b->curve_ms[k] > 2.0 && b->curve_mt[k] <= 1.25;
        mt_only |= b->curve_mt[k] > 1.25 && b->curve_ms[k] <= 2.0;
    }
    cr_assert(ms_only && mt_only, "failing points of both kinds");
}

/* ---- declared ranges and invalid units -------------------------------------- */

/* A levitated carrier, p = sqrt(2 g / gap): the gap drawn normal with sigma
 * half its nominal, so a draw falls below 0 with probability Phi(-2) =
 * 0.02275 (GSL's normal CDF), where sqrt(2 g / gap) is not a number. */
static void read_gap(const char *range, const char *samples)
{
    char text[1024];
    snprintf(text, sizeof text,
             "families:\n  - id: gap\n"
             "    parameters:\n"
             "      gap: {nominal: 0.006, tolerance: {normal: 0.003}%s}\n"
             "      g: 9.81\n"
             "    poles: [\"sqrt(2*g/gap)\", \"-sqrt(2*g/gap)\", -300]\n"
             "    gain: \"-2*g/gap*300\"\n"
             "    rolloff_start: 600\n"
             "    yield: {samples: %s, seed: 2385}\n",
             range, samples);
    read_family(text, true);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
}

/* With min: 0 no unit is drawn below 0: not one invalid unit (a negative
 * gap would make sqrt(2 g / gap) invalid), the least drawn gap >= 0, and
 * the draws redrawn about as many as a truncated normal needs: for n kept
 * draws the rejected ones are negative binomial, mean n q / (1 - q) and
 * standard deviation sqrt(n q) / (1 - q), q = Phi(-2); within 5 of those. */
Test(family, ranged_draws_stay_inside_and_are_counted)
{
    read_gap(", min: 0", "4000");
    const ps_yield *y = &res.yield;
    cr_assert_eq(res.param[0].has_min, true);
    cr_assert_eq(y->invalid, 0, "%zu invalid units: %s", y->invalid, y->first_error);
    cr_assert_eq(y->valid, 4000);
    cr_assert_geq(y->drawn_min[0], 0.0, "least gap drawn %.9g", y->drawn_min[0]);
    double q = gsl_cdf_ugaussian_P(-2.0), n = 4000;
    double mean = n * q / (1 - q), sd = sqrt(n * q) / (1 - q);
    cr_assert(fabs((double)y->redrawn[0] - mean) <= 5 * sd, "%zu redrawn, expected %.1f +- %.1f", y->redrawn[0],
              mean, sd);
    cr_assert_gt(y->redrawn[0], 0, "draws below 0 happened and were redrawn");
    cr_assert_eq(y->redrawn_total, y->redrawn[0]);
    cr_assert_eq(y->redrawn[1], 0, "g has no tolerance");
    cr_assert_float_eq(res.param[0].range_mass, 1 - q, 1e-12);
    char text[1400];
    ps_yield_text(&res, text, sizeof text);
    char want[120];
    snprintf(want, sizeof want, "gap drawn from its normal distribution truncated to >= 0 (97.7 %% of it): %zu draws "
             "outside redrawn", y->redrawn[0]);
    cr_assert(strstr(text, want), "%s\nwanted: %s", text, want);
    ps_yield_warning_text(&res, text, sizeof text);
    cr_assert_str_empty(text);
}

/* Without a range the same draws below 0 are invalid units: counted apart
 * (binomial, n Phi(-2) within 5 standard deviations), in no share, and
 * named in a warning line. */
Test(family, invalid_units_are_counted_apart)
{
    read_gap("", "4000");
    const ps_yield *y = &res.yield;
    double q = gsl_cdf_ugaussian_P(-2.0), n = 4000;
    cr_assert(fabs((double)y->invalid - n * q) <= 5 * sqrt(n * q * (1 - q)), "%zu invalid, expected %.1f",
              y->invalid, n * q);
    cr_assert_eq(y->valid + y->invalid, 4000);
    cr_assert_eq(y->count[PS_VERDICT_UNREAD], 0);
    size_t sum = 0;
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        sum += y->count[v];
    cr_assert_eq(sum, y->valid, "the verdict counts cover the valid units only");
    double pass = (double)(y->count[PS_VERDICT_CLEAR] + y->count[PS_VERDICT_MARGINAL]);
    cr_assert_float_eq(y->pass_frac, pass / (double)y->valid, 1e-15);
    cr_assert_float_eq(y->frac[PS_VERDICT_REDESIGN], (double)y->count[PS_VERDICT_REDESIGN] / (double)y->valid, 1e-15);
    cr_assert_lt(y->drawn_min[0], 0.0);
    cr_assert_eq(y->redrawn_total, 0);
    cr_assert(strstr(y->first_error, "sqrt(2*g/gap)") && strstr(y->first_error, "gap=-"), "%s", y->first_error);
    char text[1400], want[80];
    ps_yield_warning_text(&res, text, sizeof text);
    snprintf(want, sizeof want, "%zu of 4000 units could not be evaluated (invalid units", y->invalid);
    cr_assert(strstr(text, want) && strstr(text, "sqrt(2*g/gap)"), "%s", text);
    ps_yield_text(&res, text, sizeof text);
    snprintf(want, sizeof want, "of the %zu units that could be evaluated pass", y->valid);
    cr_assert(strstr(text, want), "%s", text);
    /* the culprit's shift is in standard deviations of its drawn values */
    cr_assert_eq(y->culprit, 0);
    snprintf(want, sizeof want, "driven most by gap (mean of failing units %+.2f standard deviations from", y->culprit_shift);
    cr_assert(strstr(text, want) && !strstr(text, "spread"), "%s", text);
}

typedef struct range_case {
    const char *param;    /* the parameter's mapping */
    const char *after;    /* the error points just after this text */
    const char *field, *words;
} range_case;

/* A family id starts every grid plant's id: a control character in it is
 * refused like one in a plant id (it would reach the terminal raw). */
Test(family, control_character_in_family_id_refused)
{
    read_family("families:\n  - id: \"gap\\e[2J\"\n    parameters:\n      gap: {nominal: 0.006, sweep: [0.004, 0.008]}\n"
                "    poles: [\"-1/gap\"]\n    gain: 2.385\n",
                false);
    cr_assert_eq(fam_status, PS_ERR_INPUT);
    cr_expect_eq(fam_diag.line, 2);
    cr_expect_eq(fam_diag.col, 9);
    cr_expect_str_eq(fam_diag.field, "id");
    cr_expect(strstr(fam_diag.text, "family id: control character U+001B at character 4") != NULL, "%s",
              fam_diag.text);
    cr_expect_str_eq(fam.id, "", "no id with the escape is kept");
}

Test(family, range_errors_name_line_field_and_expectation)
{
    static const range_case cases[] = {
        {"{nominal: 0.006, tolerance: {normal: 0.003}, min: 0.01, max: 0.002}", "max: ", "max",
         "max 0.002 must be above min 0.01"},
        {"{nominal: 0.006, tolerance: {normal: 0.003}, min: 0.006, max: 0.006}", "max: ", "max", "must be above min"},
        {"{nominal: 0.006, tolerance: {normal: 0.003}, min: 0.0075}", "min: ", "min",
         "nominal 0.006 is outside its range >= 0.0075"},
        {"{nominal: 0.006, tolerance: {uniform: 0.003}, max: 0.005}", "max: ", "max",
         "nominal 0.006 is outside its range <= 0.005"},
        {"{nominal: 0.006, min: 0}", "min: ", "min", "has no tolerance"},
        {"{nominal: 0.006, sweep: [0.004, 0.008], max: 0.01}", "max: ", "max", "has no tolerance"},
        {"{nominal: 0.006, sweep: [-0.002, 0.008], tolerance: {normal: 0.001}, min: 0}", "sweep: ", "sweep",
         "sweep value -0.002 is outside its range >= 0"},
        /* [0.006, 0.00602] holds Phi(0.02/3) - 1/2 = 0.266 % of N(0.006, 0.003) (GSL's normal CDF) */
        {"{nominal: 0.006, tolerance: {normal: 0.003}, min: 0.006, max: 0.00602}", "min: ", "min",
         "the range [0.006, 0.00602] holds 0.266 % of its tolerance distribution"},
        {"{nominal: 0.006, tolerance: {normal: 0.003}, min: zero}", "min: ", "min", "min of 'gap': expected"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
        char text[512];
        snprintf(text, sizeof text,
                 "families:\n  - id: f\n    parameters:\n      gap: %s\n    poles: [\"-1/gap\"]\n    gain: 1\n",
                 cases[i].param);
        /* "      gap: " is 11 characters: the mapping opens at column 12 */
        const char *at = strstr(cases[i].param, cases[i].after);
        cr_assert_not_null(at);
        size_t col = 12 + (size_t)(at - cases[i].param) + strlen(cases[i].after);
        read_family(text, false);
        cr_assert_eq(fam_status, PS_ERR_INPUT, "case %zu accepted: %s", i, cases[i].param);
        cr_expect_eq(fam_diag.line, 4, "case %zu: line %zu", i, fam_diag.line);
        cr_expect_eq(fam_diag.col, col, "case %zu: column %zu, expected %zu (%s)", i, fam_diag.col, col,
                     fam_diag.text);
        cr_expect_str_eq(fam_diag.field, cases[i].field, "case %zu: field", i);
        cr_expect(strstr(fam_diag.text, cases[i].words) && strstr(fam_diag.text, "'gap'"), "case %zu: %s", i,
                  fam_diag.text);
    }
    /* a range holding Phi(0.04) - 1/2 = 1.6 % passes the mass rule; a nominal on the range's end is accepted */
    read_family("families:\n  - id: f\n    parameters:\n      gap: {nominal: 0.006, tolerance: {normal: 0.003}, "
                "min: 0.006, max: 0.00612}\n    poles: [\"-1/gap\"]\n    gain: 1\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    cr_assert_float_eq(fam.param[0].range_mass, gsl_cdf_ugaussian_P(0.04) - 0.5, 1e-12);
    read_family("families:\n  - id: f\n    parameters:\n      gap: {nominal: 0.006, tolerance: {uniform: 0.003}, "
                "min: 0.006}\n    poles: [\"-1/gap\"]\n    gain: 1\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    cr_assert_float_eq(fam.param[0].range_mass, 0.5, 1e-15);
}

/* ---- the digital loop: the sample rate and the computation delay as parameters ---- */

Test(family, sample_rate_and_compute_delay_as_expressions)
{
    read_family("families:\n"
                "  - id: loop-rate\n"
                "    parameters:\n"
                "      rate: {nominal: 2.4, sweep: [0.8, 2.4, 9.6], tolerance: {normal: 0.05}}\n"
                "      lag: 0.37\n"
                "    poles: [3.17, -41.3]\n"
                "    gain: 2.385\n"
                "    sample_rate: rate kHz\n"
                "    compute_delay: \"lag + 0.25 samples\"\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    cr_assert_eq(ps_family_grid_size(&fam), 3);
    double kHz[3] = {0.8, 2.4, 9.6};
    for (size_t k = 0; k < 3; k++) {
        double v[PS_FAM_PARAMS];
        ps_family_grid_point(&fam, k, v);
        ps_diag d = {0};
        cr_assert_eq(ps_family_eval(&fam, v, false, &evaluated, &d), PS_OK, "%s", d.text);
        cr_assert(ps_plant_has(&evaluated, PS_F_SAMPLE_RATE));
        cr_assert_float_eq(evaluated.sample_period, 1.0 / (kHz[k] * 1e3), 1e-18);
        cr_assert_float_eq(evaluated.compute_delay_samples, 0.62, 1e-15);
        cr_assert_eq(ps_plant_check(&evaluated, &d), PS_OK, "%s", d.text);
        cr_assert_float_eq(evaluated.compute_delay, 0.62 / (kHz[k] * 1e3), 1e-18);
    }

    /* a period parameter in ms and a computation delay in us */
    read_family("families:\n"
                "  - id: loop-period\n"
                "    parameters: {T: {nominal: 2.5, sweep: {from: 1, to: 4, count: 4}}}\n"
                "    poles: [-41.3]\n"
                "    sample_rate: \"T ms\"\n"
                "    compute_delay: \"T*200 us\"\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    double v[PS_FAM_PARAMS];
    ps_family_grid_point(&fam, 2, v);
    ps_diag d = {0};
    cr_assert_eq(ps_family_eval(&fam, v, false, &evaluated, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(evaluated.sample_period, 3e-3, 1e-18);
    cr_assert_float_eq(evaluated.compute_delay, 600e-6, 1e-18);
    cr_assert(isnan(evaluated.compute_delay_samples));
}

Test(family, sample_rate_literal_default_and_errors)
{
    /* a literal with its unit, and the catalog default for the delay */
    read_family("defaults:\n"
                "  compute_delay: 0.5 samples\n"
                "families:\n"
                "  - id: fixed-rate\n"
                "    parameters: {p: {nominal: 3.17, sweep: [1.2, 3.17]}}\n"
                "    poles: [p, -41.3]\n"
                "    sample_rate: 500 Hz\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    double v[PS_FAM_PARAMS];
    ps_family_grid_point(&fam, 0, v);
    ps_diag d = {0};
    cr_assert_eq(ps_family_eval(&fam, v, false, &evaluated, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_plant_check(&evaluated, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(evaluated.sample_period, 0.002, 1e-18);
    cr_assert_float_eq(evaluated.compute_delay, 0.001, 1e-18);

    /* an expression without its unit is refused as a bare number is */
    read_family("families:\n"
                "  - id: no-unit\n"
                "    parameters: {rate: 2.4}\n"
                "    poles: [-41.3]\n"
                "    sample_rate: \"rate*1000\"\n",
                false);
    cr_assert_eq(fam_status, PS_ERR_INPUT);
    cr_assert_eq(fam_diag.line, 5);
    cr_assert_str_eq(fam_diag.field, "sample_rate");
    cr_assert(strstr(fam_diag.text, "needs its unit") != NULL, "%s", fam_diag.text);

    /* an unknown name in the expression: its position */
    read_family("families:\n"
                "  - id: typo\n"
                "    parameters: {rate: 2.4}\n"
                "    poles: [-41.3]\n"
                "    sample_rate: rte kHz\n",
                false);
    cr_assert_eq(fam_status, PS_ERR_INPUT);
    cr_assert_eq(fam_diag.line, 5);
    cr_assert_str_eq(fam_diag.field, "sample_rate");
    cr_assert(strstr(fam_diag.text, "rte") != NULL, "%s", fam_diag.text);

    /* a swept value that makes the rate negative: an error of that grid point */
    read_family("families:\n"
                "  - id: through-zero\n"
                "    parameters: {rate: {nominal: 1.5, sweep: [-0.5, 1.5]}}\n"
                "    poles: [-41.3]\n"
                "    sample_rate: rate kHz\n",
                false);
    cr_assert_eq(fam_status, PS_OK, "%s", fam_diag.text);
    ps_family_grid_point(&fam, 0, v);
    cr_assert_eq(ps_family_eval(&fam, v, false, &evaluated, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_plant_check(&evaluated, &d), PS_ERR_INPUT);
    cr_assert_str_eq(d.field, "sample_rate");
    cr_assert_eq(d.line, 5);
    cr_assert(strstr(d.text, "above 0") != NULL, "%s", d.text);
}

/* ---- a yield study split over shards ------------------------------------ */

/* The study of fam split into n shards (shard k drawing blocks k, k + n,
 * ...), the tallies added in the order given by step (shards visited
 * backwards with step n - 1), finished; it must equal the whole study to the
 * last bit: the same units, counts, first invalid unit and culprit sums. */
static void split_and_add(size_t n, ps_yield *out)
{
    ps_study_ws *ws = ps_study_ws_new();
    cr_assert_not_null(ws);
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_ALL};
    ps_yield_tally whole;
    ps_yield_tally_init(&whole);
    static ps_family_result part;
    for (size_t j = 0; j < n; j++) {
        size_t k = n - 1 - j; /* last shard first: the order of adding must not matter */
        ps_yield_tally t;
        cr_assert_eq(ps_study_family_shard(ws, &fam, &opt, k, n, k == 0, &part, &t), PS_OK);
        cr_assert_eq(ps_yield_tally_add(&whole, &t), PS_OK);
        ps_yield_tally_free(&t);
    }
    ps_yield_finish(fam.param, fam.n_params, fam.samples, fam.seed, &whole, out);
    ps_yield_tally_free(&whole);
    ps_study_ws_free(ws);
}

static void shards_equal_whole(void)
{
    ps_yield want = res.yield, got;
    for (size_t n = 1; n <= 6; n++) {
        split_and_add(n, &got);
        cr_assert_eq(got.valid, want.valid, "n = %zu", n);
        cr_assert_eq(got.culprit, want.culprit, "n = %zu", n);
        cr_assert_str_eq(got.first_error, want.first_error, "n = %zu", n);
        cr_assert_eq(got.culprit_shift, want.culprit_shift, "n = %zu: shift %.17g against %.17g", n,
                     got.culprit_shift, want.culprit_shift);
        cr_assert(memcmp(&got, &want, sizeof got) == 0, "n = %zu: the whole study, byte for byte", n);
        for (int v = 0; v < PS_VERDICT_COUNT; v++)
            cr_assert_eq(got.count[v], want.count[v], "n = %zu, verdict %d", n, v);
    }
}

Test(family, yield_split_over_shards_adds_up_bit_for_bit)
{
    /* 5 blocks of PS_YIELD_BLOCK, the last one short; a culprit to find */
    read_pendulum("0.14", "0.01", "18000", "20261205");
    cr_assert(res.yield.culprit >= 0);
    shards_equal_whole();
    /* invalid units: the first one named is the first in sample order */
    read_gap("", "18000");
    cr_assert_gt(res.yield.invalid, 0);
    shards_equal_whole();
}
