/* test_floors.c - requirement-free floors of whole plants, against published
 * values and closed forms worked from the formulas. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "limits/floors.h"
#include "support.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static ps_roots_ws *rws;
static ps_limits_ws *lws;
static ps_plant p;
static ps_analysis an;
static ps_floors fl;

static void setup(void)
{
    ps_test_init();
    rws = ps_roots_ws_new();
    lws = ps_limits_ws_new();
}
static void teardown(void)
{
    ps_roots_ws_free(rws);
    ps_limits_ws_free(lws);
}
TestSuite(floors, .init = setup, .fini = teardown);

static void run(const ps_cplx *z, size_t nz, const ps_cplx *q, size_t nq, double k, double theta)
{
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "t");
    if (nz)
        memcpy(p.zeros, z, nz * sizeof *z);
    memcpy(p.poles, q, nq * sizeof *q);
    p.n_zeros = nz;
    p.n_poles = nq;
    p.gain = k;
    p.delay = theta;
    p.present = (1u << PS_F_ID) | (1u << PS_F_ZEROS) | (1u << PS_F_POLES) | (1u << PS_F_GAIN);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(rws, &p, &an, &d), PS_OK, "%s", d.text);
    ps_floors_compute(lws, &an, &p.req, &fl);
}

/* Unstable airframe, RHP pole 6, RHP zero 26: Ms_min = Mt_min = 1.6 (Stein 2003).
 * The LHP roots and gain do not change the interpolation floors. */
Test(floors, airframe_plant_gives_1_6_and_an_open_window)
{
    run((ps_cplx[]){{26, 0}, {-31.5, 0}}, 2, (ps_cplx[]){{6, 0}, {-8.3, 0}, {-21.7, 0}}, 3, 4.85, 0.0);
    cr_assert_float_eq(fl.ms_interpolation, 1.6, 1e-10);
    cr_assert_float_eq(fl.mt_interpolation, 1.6, 1e-10);
    cr_assert_float_eq(fl.ms, 1.6, 1e-10);
    cr_assert_str_eq(fl.limiting, "interpolation");
    cr_assert_float_eq(fl.bode_area, 6 * M_PI, 1e-12);
    /* rules of thumb: w_c in [2p, z/2] = [12, 13] */
    cr_assert_float_eq(fl.crossover_min, 12.0, 1e-12);
    cr_assert_float_eq(fl.crossover_max, 13.0, 1e-12);
    cr_assert(fl.window_open);
    /* z = 20 < 4p: the window [12, 10] is closed; floor (20+6)/(20-6). */
    run((ps_cplx[]){{20, 0}}, 1, (ps_cplx[]){{6, 0}, {-8.3, 0}}, 2, 4.85, 0.0);
    cr_assert_not(fl.window_open);
    cr_assert_float_eq(fl.ms, 26.0 / 14.0, 1e-10);
}

/* One real RHP pole with delay theta: ||T|| >= e^{p theta}, and ||S|| equals
 * it (LIMITS sheet section 4; Astrom, European J. Control 2000, from memory). */
Test(floors, delayed_unstable_pole)
{
    run(NULL, 0, (ps_cplx[]){{4.43, 0}, {-4.43, 0}, {-50, 0}}, 3, 160, 0.04);
    cr_assert_float_eq(fl.mt_interpolation, exp(4.43 * 0.04), 1e-10);
    cr_assert_float_eq(fl.ms_interpolation, exp(4.43 * 0.04), 1e-10);
    cr_assert_float_eq(fl.crossover_max, 25.0, 1e-12);
    cr_assert_float_eq(fl.crossover_min, 8.86, 1e-12);
}

/* Effort to stabilize, one RHP pole: P = k/((s-p)(s+a)), mirror G_s = k/((s+p)(s+a)),
 * ||C S|| >= 1/|G_s(p)| = 2p(p+a)/|k|, times e^{p theta} with a delay (S&P 2nd ed. ch. 5). */
Test(floors, effort_single_pole_closed_form)
{
    double pp = 49.52, a = 40.0, k = -98100, th = 0.001;
    run(NULL, 0, (ps_cplx[]){{pp, 0}, {-pp, 0}, {-a, 0}}, 3, k, 0.0);
    /* the plant also has the pole -p: G_s = k/((s+p)(s+p)(s+a)), so 1/|G_s(p)| = (2p)^2 (p+a)/|k| */
    cr_assert_float_eq(fl.effort, 4 * pp * pp * (pp + a) / fabs(k), 1e-9);
    run(NULL, 0, (ps_cplx[]){{pp, 0}, {-pp, 0}, {-a, 0}}, 3, k, th);
    cr_assert_float_eq(fl.effort, exp(pp * th) * 4 * pp * pp * (pp + a) / fabs(k), 1e-9);
}

/* Two RHP poles: the tight Pick value is never below the single-pole values. */
Test(floors, effort_two_poles_not_below_single_values)
{
    run(NULL, 0, (ps_cplx[]){{3.1, 0}, {7.7, 0}, {-12, 0}}, 3, 55.0, 0.0);
    double s1 = 1 / fabs(55.0 / ((3.1 + 3.1) * (3.1 + 7.7) * (3.1 + 12)));
    double s2 = 1 / fabs(55.0 / ((7.7 + 3.1) * (7.7 + 7.7) * (7.7 + 12)));
    cr_assert_geq(fl.effort, fmax(s1, s2) * (1 - 1e-12));
    cr_assert_float_eq(fl.bode_area, M_PI * 10.8, 1e-12);
}

Test(floors, benign_plant_is_not_binding)
{
    run((ps_cplx[]){{-2.2, 0}}, 1, (ps_cplx[]){{-1.3, 0}, {-5.9, 0}}, 2, 3.3, 0.0);
    cr_assert_float_eq(fl.ms, 1.0, 0);
    cr_assert_float_eq(fl.mt, 1.0, 0);
    cr_assert_float_eq(fl.effort, 0.0, 0);
    cr_assert_str_eq(fl.limiting, "none");
    cr_assert(fl.window_open);
}

Test(floors, exact_cancellation_is_infinite)
{
    run((ps_cplx[]){{3.3, 0}}, 1, (ps_cplx[]){{3.3, 0}, {-1, 0}}, 2, 1.0, 0.0);
    cr_assert(an.hidden_unstable);
    cr_assert(fl.infinite);
    cr_assert(isinf(fl.ms));
}

/* Available-bandwidth form (Stein 2003): one real RHP pole p against W_a with
 * delta = 0: Ms >= exp(pi p / W_a); with delta = 0 the T Poisson floor is undefined. */
Test(floors, band_floor_from_requirements)
{
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "band");
    p.poles[0] = (ps_cplx){7.9, 0};
    p.poles[1] = (ps_cplx){-7.9, 0};
    p.n_poles = 2;
    p.gain = 3.1;
    p.req.wh = 40.0;
    p.req.delta = 0.0;
    p.present = (1u << PS_F_ID) | (1u << PS_F_POLES) | (1u << PS_F_GAIN) | (1u << PS_F_ROLLOFF_START) |
                (1u << PS_F_ROLLOFF_GAIN);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(rws, &p, &an, &d), PS_OK, "%s", d.text);
    ps_floors_compute(lws, &an, &p.req, &fl);
    cr_assert_float_eq(fl.ms_band, exp(M_PI * 7.9 / 40.0), 1e-12);
    cr_assert_float_eq(fl.ms, fl.ms_band, 0);
    cr_assert_str_eq(fl.limiting, "band");
    cr_assert(isnan(fl.mt_poisson));
    cr_assert(isnan(fl.ms_poisson));
    cr_assert_float_eq(fl.crossover_max, 40.0, 0);
}
