/* test_plant.c - every validation rule of ps_plant_check, provoked on purpose. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "model/plant.h"
#include "support.h"

TestSuite(plant, .init = ps_test_init);

static ps_plant p;
static ps_diag d;

static void poly(const double *num, size_t nn, const double *den, size_t nd)
{
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "v-1");
    p.line = 7;
    ps_plant_mark(&p, PS_F_ID, 7, 5);
    memcpy(p.num, num, nn * sizeof *num);
    memcpy(p.den, den, nd * sizeof *den);
    p.n_num = nn;
    p.n_den = nd;
    ps_plant_mark(&p, PS_F_NUM, 8, 16);
    ps_plant_mark(&p, PS_F_DEN, 9, 18);
}

static void expect_error(const char *field, size_t line, const char *text)
{
    memset(&d, 0, sizeof d);
    cr_assert_eq(ps_plant_check(&p, &d), PS_ERR_INPUT);
    cr_assert_str_eq(d.field, field);
    cr_assert_eq(d.line, line, "line %zu", d.line);
    cr_assert(strstr(d.text, text) != NULL, "'%s' not in '%s'", text, d.text);
}

Test(plant, valid_polynomial_passes)
{
    poly((double[]){2.5}, 1, (double[]){1, 0, -19.6}, 3);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(p.form, PS_FORM_POLY);
    cr_assert_eq(p.n_warn, 0);
}

Test(plant, leading_zero_is_removed_with_a_warning)
{
    poly((double[]){0, 0, 2.5}, 3, (double[]){0, 1, 0, -19.6}, 4);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(p.n_num, 1);
    cr_assert_eq(p.n_den, 3);
    cr_assert_float_eq(p.den[0], 1.0, 0);
    cr_assert_eq(p.n_warn, 2);
    cr_assert(strstr(p.warn[0], "leading zero") != NULL);
}

Test(plant, empty_and_all_zero_polynomials)
{
    poly((double[]){1}, 1, (double[]){0}, 0);
    expect_error("denominator", 9, "empty");
    poly((double[]){0, 0}, 2, (double[]){1, 2}, 2);
    expect_error("numerator", 8, "all zeros");
}

Test(plant, non_finite_coefficient)
{
    poly((double[]){1}, 1, (double[]){1, NAN, 3}, 3);
    expect_error("denominator", 9, "non-finite");
}

Test(plant, improper_plant)
{
    poly((double[]){1, 2, 3}, 3, (double[]){1, 2}, 2);
    expect_error("numerator", 8, "improper");
}

Test(plant, constant_denominator_has_no_dynamics)
{
    poly((double[]){1}, 1, (double[]){4.2}, 1);
    expect_error("denominator", 9, "constant");
}

Test(plant, order_above_limit)
{
    double den[PS_MAX_ORDER + 2];
    for (size_t i = 0; i < PS_MAX_ORDER + 2; i++)
        den[i] = 1.0;
    poly((double[]){1}, 1, den, PS_MAX_ORDER + 2);
    expect_error("denominator", 9, "limit of 64");
    poly((double[]){1}, 1, den, PS_MAX_ORDER + 1); /* order 64 exactly is accepted */
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
}

Test(plant, negative_delay)
{
    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.delay = -0.004;
    ps_plant_mark(&p, PS_F_DELAY, 11, 12);
    expect_error("delay", 11, ">= 0");
}

Test(plant, missing_id_mixed_and_missing_forms)
{
    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.id[0] = '\0';
    expect_error("id", 7, "needs an id");
    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.n_poles = 1;
    p.poles[0] = (ps_cplx){-2, 0};
    ps_plant_mark(&p, PS_F_POLES, 10, 3);
    expect_error("id", 7, "mixes model forms");
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "empty");
    p.line = 3;
    ps_plant_mark(&p, PS_F_ID, 3, 1);
    expect_error("id", 3, "gives no model");
}

static void factored(const ps_cplx *z, size_t nz, const ps_cplx *q, size_t nq)
{
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "f-1");
    p.line = 20;
    ps_plant_mark(&p, PS_F_ID, 20, 5);
    if (nz)
        memcpy(p.zeros, z, nz * sizeof *z);
    if (nq)
        memcpy(p.poles, q, nq * sizeof *q);
    p.n_zeros = nz;
    p.n_poles = nq;
    p.gain = -1.3;
    ps_plant_mark(&p, PS_F_ZEROS, 21, 5);
    ps_plant_mark(&p, PS_F_POLES, 22, 5);
    ps_plant_mark(&p, PS_F_GAIN, 23, 5);
}

Test(plant, complex_values_need_conjugates)
{
    factored(NULL, 0, (ps_cplx[]){{-1.5, 2}, {-1.5, -2}, {3.1, 0}}, 3);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    factored(NULL, 0, (ps_cplx[]){{-1.5, 2}, {-1.5, 2.5}, {3.1, 0}}, 3);
    expect_error("poles", 22, "no conjugate");
    factored((ps_cplx[]){{0.5, 1}}, 1, (ps_cplx[]){{-1, 0}, {-2, 0}}, 2);
    expect_error("zeros", 21, "no conjugate");
}

Test(plant, factored_improper_zero_gain_and_no_poles)
{
    factored((ps_cplx[]){{1, 0}, {2, 0}}, 2, (ps_cplx[]){{-1, 0}}, 1);
    expect_error("zeros", 21, "improper");
    factored(NULL, 0, (ps_cplx[]){{-1, 0}}, 1);
    p.gain = 0.0;
    expect_error("gain", 23, "zero");
    factored(NULL, 0, NULL, 0);
    expect_error("poles", 22, "empty");
}

static void ss(size_t rows, size_t cols, size_t nb, size_t nc)
{
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "s-1");
    p.line = 30;
    ps_plant_mark(&p, PS_F_ID, 30, 5);
    for (size_t i = 0; i < rows * cols; i++)
        p.a[i] = 0.37 * (double)i;
    for (size_t i = 0; i < PS_MAX_ORDER; i++)
        p.b[i] = p.c[i] = 1.0;
    p.a_rows = rows;
    p.a_cols = cols;
    p.n_b = nb;
    p.n_c = nc;
    ps_plant_mark(&p, PS_F_A, 31, 8);
    ps_plant_mark(&p, PS_F_B, 32, 8);
    ps_plant_mark(&p, PS_F_C, 33, 8);
}

Test(plant, state_space_sizes)
{
    ss(2, 2, 2, 2);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(p.form, PS_FORM_SS);
    ss(2, 3, 2, 2);
    expect_error("a", 31, "square");
    ss(3, 3, 2, 3);
    expect_error("b", 32, "one entry per state");
    ss(3, 3, 3, 4);
    expect_error("c", 33, "one entry per state");
    ss(2, 2, 2, 2);
    p.present &= ~(1u << PS_F_C);
    expect_error("c", 30, "missing");
    ss(2, 2, 2, 2);
    p.a[3] = INFINITY;
    expect_error("a", 31, "non-finite");
}

Test(plant, defaults_fill_only_absent_fields)
{
    static ps_plant df;
    ps_plant_reset(&df);
    df.delay = 0.012;
    ps_plant_mark(&df, PS_F_DELAY, 3, 10);
    snprintf(df.note, sizeof df.note, "default note");
    ps_plant_mark(&df, PS_F_NOTE, 4, 9);
    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    snprintf(p.note, sizeof p.note, "own note");
    ps_plant_mark(&p, PS_F_NOTE, 12, 9);
    ps_plant_apply_defaults(&p, &df);
    cr_assert_float_eq(p.delay, 0.012, 0);
    cr_assert_str_eq(p.note, "own note");
    cr_assert(ps_plant_has(&p, PS_F_DELAY));
}

Test(plant, requirement_defaults_and_ranges)
{
    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    cr_assert_float_eq(p.req.ms_allowed, 2.0, 0);   /* common practice */
    cr_assert_float_eq(p.req.mt_allowed, 1.25, 0);  /* S&P 2nd ed. ch. 2, from memory */
    cr_assert_float_eq(p.req.delta, 0.5, 0);
    cr_assert_float_eq(p.req.k, 1.0, 0);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);

    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.req.eps = 1.2;
    p.req.wb = 3.0;
    ps_plant_mark(&p, PS_F_BAND_EDGE, 14, 3);
    ps_plant_mark(&p, PS_F_BAND_ATTENUATION, 15, 3);
    expect_error("band_attenuation", 15, "(0, 1)");

    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.req.wb = 3.0;
    ps_plant_mark(&p, PS_F_BAND_EDGE, 14, 3);
    expect_error("band_attenuation", 7, "missing");

    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.req.wb = 30.0;
    p.req.eps = 0.1;
    p.req.wh = 20.0;
    ps_plant_mark(&p, PS_F_BAND_EDGE, 14, 3);
    ps_plant_mark(&p, PS_F_BAND_ATTENUATION, 15, 3);
    ps_plant_mark(&p, PS_F_ROLLOFF_START, 16, 3);
    expect_error("rolloff_start", 16, "above band_edge");

    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.req.delta = 1.0;
    ps_plant_mark(&p, PS_F_ROLLOFF_GAIN, 17, 3);
    expect_error("rolloff_gain", 17, "[0, 1)");

    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.req.k = 0.0;
    ps_plant_mark(&p, PS_F_ROLLOFF_SLOPE, 18, 3);
    expect_error("rolloff_slope", 18, "above 0");

    poly((double[]){1}, 1, (double[]){1, 2}, 2);
    p.req.ms_allowed = 0.9;
    ps_plant_mark(&p, PS_F_MS_ALLOWED, 19, 3);
    expect_error("peak_s_allowed", 19, "above 1");
}

/* ps_plant_copy copies arrays only up to their counts: everything counted
 * must arrive, whatever the destination held before. */
#define SAME_ITEMS(f, n) cr_assert_eq(memcmp(dst.f, p.f, (n) * sizeof p.f[0]), 0, "%s differs", #f)

Test(plant, copy_carries_every_counted_item)
{
    static ps_plant dst;
    poly((double[]){2.5, -1}, 2, (double[]){1, 0, -19.6}, 3);
    snprintf(p.note, sizeof p.note, "gap 4 mm");
    p.n_zeros = 1;
    p.zeros[0] = (ps_cplx){3, 0};
    p.n_poles = 2;
    p.poles[0] = (ps_cplx){-1, 2};
    p.poles[1] = (ps_cplx){-1, -2};
    p.gain = 7.5;
    p.a_rows = p.a_cols = 2;
    memcpy(p.a, (double[]){0, 1, 19.6, 0}, 4 * sizeof p.a[0]);
    p.n_b = p.n_c = 2;
    p.b[1] = 1;
    p.c[0] = 1;
    p.d = 0.25;
    p.delay = 0.01;
    p.req.wb = 12;
    p.sample_period = 0.00125;
    p.compute_delay = 0.000413;
    p.compute_delay_samples = 0.33;
    p.in_z = true;
    p.defaults_sample_period = 0.0005;
    ps_plant_warn(&p, "first %d", 1);
    ps_plant_warn(&p, "second");
    memset(&dst, 0xa5, sizeof dst);
    ps_plant_copy(&dst, &p);

    cr_assert_str_eq(dst.id, "v-1");
    cr_assert_str_eq(dst.note, "gap 4 mm");
    cr_assert_eq(dst.line, 7);
    cr_assert_eq(dst.present, p.present);
    cr_assert_eq(memcmp(dst.field_line, p.field_line, sizeof p.field_line), 0);
    cr_assert_eq(memcmp(dst.field_col, p.field_col, sizeof p.field_col), 0);
    cr_assert_eq(dst.form, p.form);
    cr_assert_eq(dst.n_num, 2);
    cr_assert_eq(dst.n_den, 3);
    SAME_ITEMS(num, 2);
    SAME_ITEMS(den, 3);
    cr_assert_eq(dst.n_zeros, 1);
    cr_assert_eq(dst.n_poles, 2);
    SAME_ITEMS(zeros, 1);
    SAME_ITEMS(poles, 2);
    cr_assert_eq(dst.gain, 7.5);
    cr_assert_eq(dst.a_rows, 2);
    cr_assert_eq(dst.a_cols, 2);
    SAME_ITEMS(a, 4);
    cr_assert_eq(dst.n_b, 2);
    cr_assert_eq(dst.n_c, 2);
    SAME_ITEMS(b, 2);
    SAME_ITEMS(c, 2);
    cr_assert_eq(dst.d, 0.25);
    cr_assert_eq(dst.delay, 0.01);
    cr_assert_eq(memcmp(&dst.req, &p.req, sizeof p.req), 0);
    cr_assert_eq(dst.sample_period, 0.00125);
    cr_assert_eq(dst.compute_delay, 0.000413);
    cr_assert_eq(dst.compute_delay_samples, 0.33);
    cr_assert(dst.in_z);
    cr_assert_eq(dst.defaults_sample_period, 0.0005);
    p.in_z = false;
    cr_assert_eq(dst.n_warn, 2);
    cr_assert_str_eq(dst.warn[0], "first 1");
    cr_assert_str_eq(dst.warn[1], "second");

    /* the copy checks as the original does */
    p.n_zeros = p.n_poles = p.a_rows = p.a_cols = p.n_b = p.n_c = 0;
    ps_plant_copy(&dst, &p);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_plant_check(&dst, &d), PS_OK, "%s", d.text);
    cr_assert_eq(dst.form, p.form);
}

/* ---- the digital loop (README "Digital loops") --------------------------- */

static void rate(double h, size_t line)
{
    p.sample_period = h;
    ps_plant_mark(&p, PS_F_SAMPLE_RATE, line, 3);
}

static void delay_samples(double k, size_t line)
{
    p.compute_delay_samples = k;
    p.compute_delay = 0.0;
    ps_plant_mark(&p, PS_F_COMPUTE_DELAY, line, 3);
}

static void delay_seconds(double c, size_t line)
{
    p.compute_delay = c;
    p.compute_delay_samples = NAN;
    ps_plant_mark(&p, PS_F_COMPUTE_DELAY, line, 3);
}

static void in_z(size_t line)
{
    p.in_z = true;
    ps_plant_mark(&p, PS_F_DOMAIN, line, 3);
}

Test(plant, compute_delay_defaults_to_one_sample_and_scales_with_h)
{
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(1.0 / 2650.0, 11);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(p.compute_delay_samples, 1.0, 0);
    cr_assert_float_eq(p.compute_delay, 1.0 / 2650.0, 1e-18);

    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.00125, 11);
    delay_samples(0.37, 12);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(p.compute_delay, 0.37 * 0.00125, 1e-18);

    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.00125, 11);
    delay_seconds(0.000413, 12);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(p.compute_delay, 0.000413, 0);
    cr_assert(isnan(p.compute_delay_samples));

    /* a continuous loop: no computation delay */
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(p.compute_delay, 0.0, 0);
    cr_assert_float_eq(p.sample_period, 0.0, 0);
}

Test(plant, compute_delay_needs_a_sample_rate)
{
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    delay_samples(1.5, 12);
    expect_error("compute_delay", 12, "needs sample_rate");
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    delay_seconds(0.0003, 13);
    expect_error("compute_delay", 13, "needs sample_rate");
}

Test(plant, sample_rate_and_compute_delay_ranges)
{
    /* what a family's expression can give; the readers refuse these earlier */
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(-0.002, 11);
    expect_error("sample_rate", 11, "above 0");
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(INFINITY, 11);
    expect_error("sample_rate", 11, "above 0");
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.002, 11);
    delay_samples(-0.25, 12);
    expect_error("compute_delay", 12, "0 or more");
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.002, 11);
    delay_seconds(-0.0004, 12);
    expect_error("compute_delay", 12, "0 or more");
}

Test(plant, domain_z_needs_a_sample_rate)
{
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    expect_error("domain", 14, "needs sample_rate");
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(0.001, 11);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
}

Test(plant, domain_z_refuses_a_delay_field)
{
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(0.001, 11);
    p.delay = 0.003;
    ps_plant_mark(&p, PS_F_DELAY, 15, 3);
    expect_error("delay", 15, "poles at z = 0");
}

Test(plant, domain_z_takes_whole_samples_only)
{
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(0.001, 11);
    delay_samples(1.5, 12);
    expect_error("compute_delay", 12, "whole number");

    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(0.001, 11);
    delay_seconds(0.0023, 12);
    expect_error("compute_delay", 12, "whole number");

    /* whole numbers, in samples or in seconds (3 periods, with rounding) */
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(0.001, 11);
    delay_samples(2, 12);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(p.compute_delay, 0.002, 1e-18);
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(1.0 / 3000.0, 11);
    delay_seconds(0.001, 12);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
}

Test(plant, band_edge_and_rolloff_start_below_nyquist)
{
    /* h = 2 ms: Nyquist pi/h = 1570.8 rad/s = 250 Hz */
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.002, 11);
    p.req.wb = 1600.0;
    p.req.eps = 0.1;
    ps_plant_mark(&p, PS_F_BAND_EDGE, 16, 3);
    ps_plant_mark(&p, PS_F_BAND_ATTENUATION, 17, 3);
    expect_error("band_edge", 16, "Nyquist frequency pi/h = 1570.8 rad/s (250 Hz)");

    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.002, 11);
    p.req.wh = 1575.0;
    ps_plant_mark(&p, PS_F_ROLLOFF_START, 18, 3);
    expect_error("rolloff_start", 18, "below the Nyquist frequency");

    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.002, 11);
    p.req.wh = 1565.0;
    ps_plant_mark(&p, PS_F_ROLLOFF_START, 18, 3);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
}

Test(plant, sample_rate_from_defaults_and_a_plant_in_z)
{
    static ps_plant df;
    ps_plant_reset(&df);
    df.sample_period = 0.0005;
    ps_plant_mark(&df, PS_F_SAMPLE_RATE, 3, 16);
    df.compute_delay_samples = 0.6;
    ps_plant_mark(&df, PS_F_COMPUTE_DELAY, 4, 18);

    /* in s: inherits both, or overrides the rate with its own */
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    ps_plant_apply_defaults(&p, &df);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(p.sample_period, 0.0005, 0);
    cr_assert_float_eq(p.compute_delay, 0.6 * 0.0005, 1e-18);
    cr_assert_eq(p.field_line[PS_F_SAMPLE_RATE], 3);
    poly((double[]){2.385}, 1, (double[]){1, -3.17}, 2);
    rate(0.00125, 11);
    ps_plant_apply_defaults(&p, &df);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(p.sample_period, 0.00125, 0);
    cr_assert_float_eq(p.compute_delay, 0.6 * 0.00125, 1e-18);

    /* in z: its own rate must be the defaults' */
    df.compute_delay_samples = 1;
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(0.00125, 11);
    ps_plant_apply_defaults(&p, &df);
    expect_error("sample_rate", 11, "a model in z holds only at its own period");
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    rate(0.0005 * (1 + 3e-10), 11);
    ps_plant_apply_defaults(&p, &df);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    in_z(14);
    ps_plant_apply_defaults(&p, &df);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert(p.in_z);
}

Test(plant, domain_and_delay_in_seconds_inherited)
{
    static ps_plant df;
    ps_plant_reset(&df);
    df.in_z = true;
    ps_plant_mark(&df, PS_F_DOMAIN, 5, 11);
    df.compute_delay = 0.004;
    ps_plant_mark(&df, PS_F_COMPUTE_DELAY, 6, 18);
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    rate(0.002, 11);
    ps_plant_apply_defaults(&p, &df);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert(p.in_z);
    cr_assert_float_eq(p.compute_delay, 0.004, 0);
    cr_assert(isnan(p.compute_delay_samples));
    /* the inherited domain without a rate: named at the defaults' line */
    poly((double[]){0.4173}, 1, (double[]){1, -1.2}, 2);
    ps_plant_apply_defaults(&p, &df);
    expect_error("domain", 5, "needs sample_rate");
}

Test(plant, improper_in_z_is_not_causal)
{
    poly((double[]){1, 2.5, 0.3}, 3, (double[]){1, -0.4}, 2);
    in_z(14);
    rate(0.001, 11);
    expect_error("numerator", 8, "not causal");
}
