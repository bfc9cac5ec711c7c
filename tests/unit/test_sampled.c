/* test_sampled.c - the floors of a digital loop: closed forms for held
 * one-pole plants, the hold's sampling zeros, the map to w, the identity
 * of the Nyquist band floor with the Poisson floor at z = infinity, and the
 * sampling factors of the attribution and the sample-rate target. */
#include <criterion/criterion.h>
#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "limits/floors.h"
#include "limits/sampled.h"
#include "roots/roots.h"
#include "screen/screen.h"
#include "support.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static ps_roots_ws *rws;
static ps_limits_ws *lws;
static ps_sampled_ws *sws;
static void setup(void)
{
    ps_test_init();
    rws = ps_roots_ws_new();
    lws = ps_limits_ws_new();
    sws = ps_sampled_ws_new();
}
static void teardown(void)
{
    ps_sampled_ws_free(sws);
    ps_roots_ws_free(rws);
    ps_limits_ws_free(lws);
}
TestSuite(sampled, .init = setup, .fini = teardown);

static ps_plant plant;
static ps_analysis an;
static ps_floors fl;

/* A factored plant in s, held at period h with computation delay cd (s),
 * analysed: the catalog's sample fields set after ps_plant_check, as the
 * reader's check leaves them. */
static void held(const ps_cplx *poles, size_t np, const ps_cplx *zeros, size_t nz, double gain, double delay, double h,
                 double cd)
{
    ps_plant_reset(&plant);
    snprintf(plant.id, sizeof plant.id, "held");
    ps_plant_mark(&plant, PS_F_ID, 1, 1);
    plant.n_poles = np;
    memcpy(plant.poles, poles, np * sizeof *poles);
    ps_plant_mark(&plant, PS_F_POLES, 2, 1);
    plant.n_zeros = nz;
    if (nz)
        memcpy(plant.zeros, zeros, nz * sizeof *zeros);
    ps_plant_mark(&plant, PS_F_ZEROS, 3, 1);
    plant.gain = gain;
    ps_plant_mark(&plant, PS_F_GAIN, 4, 1);
    if (delay > 0) {
        plant.delay = delay;
        ps_plant_mark(&plant, PS_F_DELAY, 5, 1);
    }
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&plant, &d), PS_OK, "%s", d.text);
    plant.sample_period = h;
    plant.compute_delay = cd;
    plant.compute_delay_samples = cd / h;
    cr_assert_eq(ps_roots_analyse(rws, &plant, &an, &d), PS_OK, "%s", d.text);
}

static const ps_requirements loose = {.ms_allowed = 2.0, .mt_allowed = 1.25, .delta = 0.5, .k = 1.0};

static double rel(double a, double b) { return fabs(a - b) / fabs(b); }

/* One real unstable pole p held at h, no delay: P(z) has the pole e^{p h}
 * and relative degree 1, i.e. the zero w = 1 in w = (z - 1)/(z + 1). The
 * one-point Pick value at w_p = tanh(p h / 2) is |1 + w_p| / |1 - w_p| = e^{p h}
 * for both ||S|| and ||T|| (S&P 2nd ed. 2005, sec. 5.6 for the
 * continuous form |z + p| / |z - p|, here at z = 1). */
Test(sampled, one_pole_held_floor_is_e_to_the_p_h)
{
    const double ps[] = {0.731, 3.3, 12.9}, hs[] = {0.0913, 0.0117, 0.00173};
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            held(&(ps_cplx){ps[i], 0}, 1, NULL, 0, 2.17, 0.0, hs[j], 0.0);
            ps_floors_compute(lws, &an, &loose, &fl);
            double want = exp(ps[i] * hs[j]);
            cr_expect_lt(rel(fl.mt, want), 1e-12, "p %g h %g: Mt %.15g, e^{ph} %.15g", ps[i], hs[j], fl.mt, want);
            cr_expect_lt(rel(fl.ms, want), 1e-12, "p %g h %g: Ms %.15g", ps[i], hs[j], fl.ms);
            cr_expect_eq(fl.z_rel_degree, 1);
            cr_expect_lt(rel(fl.bode_area, M_PI * ps[i]), 1e-12, "discrete Bode area (pi/h) ln e^{ph} = pi p");
        }
}

/* Whole samples of delay m (plant delay plus computation delay) add m zeros
 * at z = infinity: ||T|| >= e^{p (m + 1) h} (the closed form the issue
 * states for f = 0: e^{p (theta + h)}). */
Test(sampled, whole_sample_delay_adds_to_the_relative_degree)
{
    double p = 4.37, h = 0.0131;
    for (unsigned m = 0; m <= 5; m++) {
        held(&(ps_cplx){p, 0}, 1, NULL, 0, 1.0, 0.4 * m * h, h, 0.6 * m * h);
        ps_floors_compute(lws, &an, &loose, &fl);
        double want = exp(p * (m + 1) * h);
        cr_expect_lt(rel(fl.mt, want), 1e-9, "m %u: Mt %.15g want %.15g", m, fl.mt, want);
        cr_expect_eq(fl.z_rel_degree, (int)m + 1);
    }
}

/* 1/s^3 held: the zeros of the held plant are the roots of z^2 + 4 z + 1,
 * -2 +- sqrt(3) (Astrom, Hagander & Sternby, Automatica 20(1), 1984), both
 * made by the hold; one lies outside the unit circle. */
Test(sampled, triple_integrator_sampling_zeros)
{
    ps_cplx zero3[3] = {{0, 0}, {0, 0}, {0, 0}};
    held(zero3, 3, NULL, 0, 1.0, 0.0, 0.0731, 0.0);
    ps_floors_compute(lws, &an, &loose, &fl);
    cr_assert_eq(fl.n_zzeros, 2);
    double a = fmin(fl.zzeros[0].re, fl.zzeros[1].re), b = fmax(fl.zzeros[0].re, fl.zzeros[1].re);
    cr_expect_lt(fabs(a - (-2 - sqrt(3))), 1e-9, "%.15g", a);
    cr_expect_lt(fabs(b - (-2 + sqrt(3))), 1e-9, "%.15g", b);
    cr_expect(fl.zzero_sampling[0] && fl.zzero_sampling[1]);
    cr_expect_eq(fl.n_sampling_zeros, 2);
    cr_expect_eq(fl.n_zzeros_outside, 1);
    cr_expect_geq(fl.ms, 1.0, "||S|| >= 1 for a held plant");
}

/* The plant in w is the plant in z: P(z0) from the roots in z equals
 * P~(w0) from the roots and gain in w, w0 = (z0 - 1)/(z0 + 1), also with a
 * zero at z = -1 (the held double integrator: (h^2/2)(z + 1)/(z - 1)^2). */
Test(sampled, plant_in_w_equals_plant_in_z)
{
    ps_cplx dbl[2] = {{0, 0}, {0, 0}};
    ps_cplx mix[4] = {{2.15, 0}, {-0.8, 3.1}, {-0.8, -3.1}, {-11.2, 0}};
    ps_cplx mz[1] = {{5.3, 0}};
    struct { const ps_cplx *p; size_t np; const ps_cplx *z; size_t nz; double delay, h, cd; } cases[] = {
        {dbl, 2, NULL, 0, 0.0, 0.05, 0.0}, {mix, 4, mz, 1, 0.0123, 0.0071, 0.0071}, {mix, 4, mz, 1, 0.0, 0.031, 0.0}};
    for (int c = 0; c < 3; c++) {
        held(cases[c].p, cases[c].np, cases[c].z, cases[c].nz, -3.7, cases[c].delay, cases[c].h, cases[c].cd);
        const ps_sampled_view *v = ps_sampled_view_of(sws, &an, &(ps_diag){0});
        cr_assert_not_null(v);
        double complex z0 = 0.37 + 1.91 * I, w0 = (z0 - 1) / (z0 + 1);
        double complex pz = v->z_gain, pw = v->w.gain;
        for (size_t j = 0; j < v->n_zz; j++)
            pz *= z0 - (v->zz[j].re + I * v->zz[j].im);
        for (size_t i = 0; i < v->n_zp; i++)
            pz /= z0 - (v->zp[i].re + I * v->zp[i].im);
        for (size_t j = 0; j < v->w.n_zeros; j++)
            pw *= w0 - (v->w.zeros[j].v.re + I * v->w.zeros[j].v.im);
        for (size_t i = 0; i < v->w.n_poles; i++)
            pw /= w0 - (v->w.poles[i].v.re + I * v->w.poles[i].v.im);
        cr_expect_lt(cabs(pz - pw) / cabs(pz), 1e-9, "case %d: P(z0) %g%+gj, P~(w0) %g%+gj", c, creal(pz), cimag(pz),
                     creal(pw), cimag(pw));
    }
}

/* Two routes to one number: the Nyquist band floor (the discrete Bode area
 * left to [wb, pi/h]) and the Poisson floor at the zero w = 1 (z = infinity)
 * with the band [0, tan(wb h / 2)] in w. With Theta = 2 atan(tan(wb h/2)) =
 * wb h and |B_p(1)^-1| = prod |p_d|, the Poisson exponent
 * [Theta ln(1/eps) + pi sum ln|p_d|] / (pi - Theta) is the Nyquist one
 * [wb ln(1/eps) + (pi/h) sum ln|p_d|] / (pi/h - wb). Without finite zeros
 * outside the circle they must agree. */
Test(sampled, nyquist_band_floor_equals_poisson_at_infinity)
{
    ps_cplx poles[3] = {{1.91, 0}, {0.6, 2.2}, {0.6, -2.2}}, zeros[2] = {{-2.3, 0}, {-7.1, 0}};
    double hs[] = {0.0377, 0.0093};
    for (int j = 0; j < 2; j++) {
        held(poles, 3, zeros, 2, 5.5, 0.0, hs[j], 0.0);
        ps_requirements q = loose;
        q.wb = 0.37 * M_PI / hs[j];
        q.eps = 0.413;
        ps_floors_compute(lws, &an, &q, &fl);
        cr_expect_eq(fl.n_zzeros_outside, 0, "relative degree 1, minimum phase: %zu zeros outside",
                     fl.n_zzeros_outside);
        if (fl.n_zzeros_outside == 0)
            cr_expect_lt(fabs(fl.ms_nyquist_ln - fl.ms_poisson_ln), 1e-9 * fabs(fl.ms_poisson_ln),
                         "h %g: Nyquist %.15g, Poisson %.15g", hs[j], fl.ms_nyquist_ln, fl.ms_poisson_ln);
    }
}

/* The attribution of a held plant: the sample-rate factor's figure is the
 * floor of the same plant held at 4 times the rate (a computation delay
 * given in samples scaling with it), recomputed here. */
Test(sampled, rate_factor_is_the_floor_at_four_times_the_rate)
{
    double p = 6.1, h = 0.02;
    held(&(ps_cplx){p, 0}, 1, NULL, 0, 1.0, 0.0, h, h);
    ps_floors_compute(lws, &an, &loose, &fl);
    ps_analysis scratch;
    ps_attribution a;
    ps_attribution_compute(lws, &scratch, &an, &loose, &fl, PS_PEAK_MT, &a);
    cr_assert(a.present[PS_FACTOR_RATE] && a.present[PS_FACTOR_COMPUTE]);
    cr_expect_lt(rel(a.without[PS_FACTOR_RATE], exp(p * 2 * h / 4)), 1e-9, "at 4x: %.15g", a.without[PS_FACTOR_RATE]);
    cr_expect_lt(rel(a.without[PS_FACTOR_COMPUTE], exp(p * h)), 1e-9, "no computation delay: %.15g",
                 a.without[PS_FACTOR_COMPUTE]);
    char cause[PS_CAUSE_MAX];
    ps_attribution_cause(&a, &an, &loose, &fl, false, cause, sizeof cause);
    cr_expect_not_null(strstr(cause, "sample rate 50 Hz"), "%s", cause);
    cr_expect_not_null(strstr(cause, "at 200 Hz"), "%s", cause);
}

/* The lowest sample rate for 1/(s - p) with one sample of computation
 * delay: Mt floor e^{2 p h} <= Mt allowed gives 1/h >= 2 p / ln(Mt allowed). */
Test(sampled, lowest_rate_target_matches_the_closed_form)
{
    double p = 3.93;
    held(&(ps_cplx){p, 0}, 1, NULL, 0, 1.0, 0.0, 0.01, 0.01);
    ps_floors_compute(lws, &an, &loose, &fl);
    ps_screen_ws *ws = ps_screen_ws_new();
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT};
    ps_outcome o = {"t.yaml", &plant, &an, &fl, NULL, 0};
    plant.req = loose;
    static ps_summary s;
    ps_screen_assess(ws, &o, &opt, &s);
    ps_screen_ws_free(ws);
    const ps_target *t = &s.target[PS_TARGET_SAMPLE_RATE];
    cr_assert_eq(t->state, PS_TARGET_FOUND, "%s", t->why);
    double want = 2 * p / log(loose.mt_allowed);
    cr_expect_lt(rel(t->limit, want), 1e-8, "limit %.12g Hz, closed form %.12g Hz", t->limit, want);
    cr_expect_lt(rel(t->now, 100.0), 1e-12);
    cr_expect(t->passes_now == (100.0 >= want));
}

/* Pathological sampling (Kalman, Ho & Narendra 1963, from memory): an unstable
 * pair a +- jb held at a rate b/(pi k) puts both poles on one point
 * e^{a h}, and the held plant loses that unstable mode. The lowest passing
 * rate is then no boundary: the target must say so, naming a failing rate
 * that is checked here directly. */
Test(sampled, pathological_rate_makes_the_rate_target_not_monotone)
{
    ps_cplx poles[3] = {{0.3, 40.0}, {0.3, -40.0}, {-5.0, 0.0}};
    held(poles, 3, NULL, 0, 2000.0, 0.0, 1.0 / 200.0, 0.0);
    plant.compute_delay_samples = 0.0;
    an.compute_delay_samples = 0.0;
    ps_requirements q = loose;
    q.mt_allowed = 1.5;
    q.ms_allowed = 3.0;
    plant.req = q;
    ps_floors_compute(lws, &an, &q, &fl);
    ps_screen_ws *ws = ps_screen_ws_new();
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT};
    ps_outcome o = {"t.yaml", &plant, &an, &fl, NULL, 0};
    static ps_summary s;
    ps_screen_assess(ws, &o, &opt, &s);
    ps_screen_ws_free(ws);
    const ps_target *t = &s.target[PS_TARGET_SAMPLE_RATE];
    cr_assert_eq(t->state, PS_TARGET_NOT_MONOTONE, "state %s: %s", ps_target_state_name(t->state), t->why);
    double x = 40.0 / M_PI; /* b / pi */
    cr_expect_not_null(strstr(t->why, "12.7324"), "%s", t->why);
    ps_analysis at = an;
    at.h = 1.0 / x;
    ps_floors fx;
    ps_floors_compute(lws, &at, &q, &fx);
    cr_expect_gt(fx.mt, q.mt_allowed, "at %.10g Hz the Mt floor %g must fail", x, fx.mt);
}

/* An unstable plant with no rolloff_start is judged when it has a sample
 * rate (the Nyquist frequency is its bandwidth limit), and is
 * needs-bandwidth without one. */
Test(sampled, sample_rate_judges_an_unstable_plant_without_rolloff)
{
    ps_screen_ws *ws = ps_screen_ws_new();
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_NONE};
    static ps_summary s;
    for (int sampled = 0; sampled <= 1; sampled++) {
        held(&(ps_cplx){2.71, 0}, 1, NULL, 0, 1.0, 0.0, sampled ? 0.0037 : 0.0, sampled ? 0.0037 : 0.0);
        plant.req = loose;
        ps_floors_compute(lws, &an, &loose, &fl);
        ps_outcome o = {"t.yaml", &plant, &an, &fl, NULL, 0};
        ps_screen_assess(ws, &o, &opt, &s);
        if (sampled)
            cr_expect_eq(s.verdict, PS_VERDICT_CLEAR, "sampled: %s (%s)", ps_verdict_name(s.verdict), s.cause);
        else
            cr_expect_eq(s.verdict, PS_VERDICT_NEEDS_BANDWIDTH, "continuous: %s", ps_verdict_name(s.verdict));
    }
    ps_screen_ws_free(ws);
}
