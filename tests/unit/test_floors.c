/* test_floors.c - requirement-free floors of whole plants, against published
 * values and closed forms worked from the formulas. */
#include <criterion/criterion.h>
#include <math.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>

#include "core/text.h"
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

/* A stable, minimum-phase, strictly proper plant: S -> 1 at high frequency,
 * so ||S|| >= 1 for every proper controller; nothing forces T anywhere (C = 0
 * gives T = 0), so the Mt floor is 0 (interpolation constraints, Skogestad &
 * Postlethwaite, Multivariable Feedback Control, 2nd ed. 2005, ch. 5; the
 * laws with controllers built are in test_laws). */
Test(floors, benign_plant_is_not_binding)
{
    run((ps_cplx[]){{-2.2, 0}}, 1, (ps_cplx[]){{-1.3, 0}, {-5.9, 0}}, 2, 3.3, 0.0);
    cr_assert_float_eq(fl.ms_interpolation, 1.0, 0);
    cr_assert_float_eq(fl.mt_interpolation, 0.0, 0);
    cr_assert_float_eq(fl.ms, 1.0, 0);
    cr_assert_float_eq(fl.mt, 0.0, 0);
    cr_assert_float_eq(fl.effort, 0.0, 0);
    cr_assert_str_eq(fl.limiting, "none");
    cr_assert(fl.window_open);
    cr_assert_str_eq(fl.note, "");
}

/* Where the value 1 is forced (S&P 2nd ed. 2005, ch. 5) and where it is not. */
Test(floors, the_value_one_only_where_s_or_t_is_forced_to_one)
{
    /* integrator: T(j0) = 1 for every stabilizing controller */
    run(NULL, 0, (ps_cplx[]){{0, 0}, {-2.9, 0}}, 2, 1.37, 0.0);
    cr_assert_eq(an.n_axis_poles, 1);
    cr_assert_float_eq(fl.mt_interpolation, 1.0, 0);
    cr_assert_float_eq(fl.mt, 1.0, 0);
    cr_assert_float_eq(fl.ms, 1.0, 0); /* strictly proper */
    /* biproper, stable, zero at the origin: S(j0) = 1 */
    run((ps_cplx[]){{0, 0}}, 1, (ps_cplx[]){{-0.83, 0}}, 1, 1.45, 0.0);
    cr_assert_eq(an.rel_degree, 0);
    cr_assert_float_eq(fl.ms_interpolation, 1.0, 0);
    cr_assert_float_eq(fl.mt, 0.0, 0);
    /* biproper, stable, RHP zero: S(z) = 1, maximum modulus */
    run((ps_cplx[]){{2.7, 0}}, 1, (ps_cplx[]){{-1.3, 0}}, 1, -0.62, 0.0);
    cr_assert_float_eq(fl.ms_interpolation, 1.0, 0);
    cr_assert_float_eq(fl.mt, 0.0, 0);
    /* biproper, stable, LHP zero, no delay: nothing forces either */
    run((ps_cplx[]){{-2.1, 0}}, 1, (ps_cplx[]){{-0.6, 0}}, 1, 3.7, 0.0);
    cr_assert_float_eq(fl.ms, 0.0, 0);
    cr_assert_float_eq(fl.mt, 0.0, 0);
    cr_assert_str_eq(fl.limiting, "none");
    /* ... with a delay: sup |S| >= 1/(1 - |L(inf)|) >= 1 for a stable neutral loop */
    run((ps_cplx[]){{-2.1, 0}}, 1, (ps_cplx[]){{-0.6, 0}}, 1, 3.7, 0.013);
    cr_assert_float_eq(fl.ms_interpolation, 1.0, 0);
    cr_assert_float_eq(fl.mt, 0.0, 0);
    /* biproper, RHP pole, LHP zero: T(p) = 1 gives Mt 1; S is free (Ms 0 = Mt - 1) */
    run((ps_cplx[]){{-1, 0}}, 1, (ps_cplx[]){{1, 0}}, 1, 1.0, 0.0);
    cr_assert_float_eq(fl.ms_interpolation, 0.0, 0);
    cr_assert_float_eq(fl.mt_interpolation, 1.0, 0);
    cr_assert_float_eq(fl.ms, 0.0, 0);
    cr_assert_float_eq(fl.mt, 1.0, 0);
    /* ... with a delay e^{-0.03 s}: both floors e^{p theta} (Pick) */
    run((ps_cplx[]){{-1, 0}}, 1, (ps_cplx[]){{1, 0}}, 1, 1.0, 0.03);
    cr_assert_float_eq(fl.ms, exp(0.03), 1e-12);
    cr_assert_float_eq(fl.mt, exp(0.03), 1e-12);
}

/* The roll-off requirement |L| <= delta (w_h/w)^(1+k) beyond w_h makes the
 * loop strictly proper, so S -> 1 and ||S|| >= 1; for a biproper plant that
 * is the only source of the 1, and the note says so. The plant alone: Ms 0. */
Test(floors, rolloff_requirement_gives_ms_one_to_a_biproper_plant)
{
    run((ps_cplx[]){{-1, 0}}, 1, (ps_cplx[]){{1, 0}}, 1, 1.0, 0.0);
    ps_requirements q = p.req;
    q.wh = 47.3;
    ps_floors_compute(lws, &an, &q, &fl);
    cr_assert_float_eq(fl.ms_interpolation, 0.0, 0);
    cr_assert_float_eq(fl.ms, 1.0, 0);
    cr_assert_float_eq(fl.mt, 1.0, 0);
    cr_assert_str_eq(fl.limiting, "none");
    cr_assert(strstr(fl.note, "roll-off requirement") != NULL, "note: %s", fl.note);
    /* a strictly proper plant has the 1 of its own: no such sentence */
    run(NULL, 0, (ps_cplx[]){{1, 0}, {-4.4, 0}}, 2, 1.0, 0.0);
    ps_floors_compute(lws, &an, &q, &fl);
    cr_assert_float_eq(fl.ms, 1.0, 0);
    cr_assert_str_eq(fl.note, "");
}

/* The plant alone fixes the Ms floor at 1 for a strictly proper plant
 * whatever its other roots, and overall keeps Ms >= Mt - 1 and Mt >= Ms - 1
 * (S + T = 1). A stable plant with an RHP zero and a band: the Poisson Ms
 * floor > 1 sets Mt = Ms - 1 (its own Mt floors are 0). */
Test(floors, overall_with_zero_floors_keeps_s_plus_t_equal_one)
{
    run((ps_cplx[]){{2.9, 0}}, 1, (ps_cplx[]){{-1.1, 0}, {-4.7, 0}}, 2, -1.0, 0.0);
    ps_requirements q = p.req;
    q.wb = 0.8;
    q.eps = 0.3;
    ps_floors_compute(lws, &an, &q, &fl);
    cr_assert_float_eq(fl.mt_interpolation, 0.0, 0);
    cr_assert_gt(fl.ms_poisson, 1.0);
    cr_assert_float_eq(fl.ms, fl.ms_poisson, 0);
    cr_assert_float_eq(fl.mt, fl.ms_poisson - 1.0, 0);
    cr_assert_str_eq(fl.limiting, "poisson");
}

/* No controller stabilizes a plant with a hidden unstable mode: limiting
 * names that, not a floor. Shared RHP root of a rational plant (the roots
 * module calls it a hidden mode) and a state-space mode the input does not
 * reach (PBH). */
Test(floors, exact_cancellation_is_infinite)
{
    run((ps_cplx[]){{3.3, 0}}, 1, (ps_cplx[]){{3.3, 0}, {-1, 0}}, 2, 1.0, 0.0);
    cr_assert(an.hidden_unstable);
    cr_assert(fl.infinite);
    cr_assert(isinf(fl.ms));
    cr_assert(fl.ms_ln == INFINITY && fl.mt_ln == INFINITY, "an exact cancellation is infinite in the log too");
    cr_assert_str_eq(fl.limiting, "hidden-mode");
}

Test(floors, hidden_state_space_mode_is_named)
{
    /* unstable state 2.3 not driven by the input (PBH), with a band and a roll-off requirement */
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "ss");
    double a[4] = {2.3, 0.0, 0.0, -1.1};
    memcpy(p.a, a, sizeof a);
    p.b[0] = 0.0;
    p.b[1] = 1.0;
    p.c[0] = 1.0;
    p.c[1] = 1.0;
    p.a_rows = p.a_cols = p.n_b = p.n_c = 2;
    p.present = (1u << PS_F_ID) | (1u << PS_F_A) | (1u << PS_F_B) | (1u << PS_F_C);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(rws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert(an.hidden_unstable);
    ps_requirements q = p.req;
    q.wb = 0.4;
    q.eps = 0.2;
    q.wh = 30.0;
    ps_floors_compute(lws, &an, &q, &fl);
    cr_assert_str_eq(fl.limiting, "hidden-mode");
}

/* An RHP pole moved exactly onto an RHP zero, as the redesign search does
 * when it scales the poles: the analysis has no hidden-mode flag, the
 * floors are infinite, and limiting names the cancellation. */
Test(floors, exact_cancellation_without_hidden_flag_is_named)
{
    run((ps_cplx[]){{5.1, 0}}, 1, (ps_cplx[]){{3.4, 0}, {-2, 0}}, 2, 1.0, 0.0);
    cr_assert_not(an.hidden_unstable);
    cr_assert_str_eq(fl.limiting, "interpolation");
    for (size_t i = 0; i < an.n_poles; i++)
        if (an.poles[i].region == PS_RHP)
            an.poles[i].v = an.zeros[0].v;
    ps_floors_compute(lws, &an, &p.req, &fl);
    cr_assert(fl.infinite);
    cr_assert_str_eq(fl.limiting, "cancellation");
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

/* Repeated RHP roots: derivative (confluent) interpolation conditions. */

/* Double RHP pole 2, one RHP zero 7, no delay. With one RHP zero the floor
 * on ||S|| is the single interpolation condition S(z) = 1: |B_p(z)^-1| =
 * ((7+2)/(7-2))^2 = 3.24, tight (S&P 2nd ed. ch. 5, one point). The floor on
 * ||T|| comes from the other side: the confluent Pick problem at the double
 * pole (T(p) = 1, T'(p) = 0). Chen's equality Ms_min = Mt_min (IEEE TAC
 * 45(6), 2000) says both agree. */
Test(floors, double_pole_confluent_equals_single_zero_bound)
{
    run((ps_cplx[]){{7, 0}}, 1, (ps_cplx[]){{2, 0}, {2, 0}, {-5, 0}}, 3, 1.0, 0.0);
    cr_assert_float_eq(fl.ms_interpolation, 3.24, 1e-9);
    cr_assert_float_eq(fl.mt_interpolation, 3.24, 1e-9, "confluent Pick at the double pole: %.15g",
                       fl.mt_interpolation);
    cr_assert(strstr(fl.note, "confluent"), "note: %s", fl.note);
}

/* Mirror case: double RHP zero 7, one RHP pole 2. Now ||T|| has the single
 * condition (|B_z(p)^-1| = 3.24, tight) and ||S|| the confluent one at the
 * double zero (S(z) = 1, S'(z) = 0). */
Test(floors, double_zero_confluent_equals_single_pole_bound)
{
    run((ps_cplx[]){{7, 0}, {7, 0}}, 2, (ps_cplx[]){{2, 0}, {-5, 0}, {-6, 0}}, 3, 1.0, 0.0);
    cr_assert_float_eq(fl.mt_interpolation, 3.24, 1e-9);
    cr_assert_float_eq(fl.ms_interpolation, 3.24, 1e-9, "confluent Pick at the double zero: %.15g",
                       fl.ms_interpolation);
}

/* Effort for G = 1/(s-1)^2: X = KS / B_p^2 must match h = (s+1)^2 and h'
 * at s = 1. Worked by hand from the 2x2 confluent Pick pencil:
 * lambda^2 - 96 lambda + 256 = 0, gamma = sqrt(48 + 32 sqrt 2) = 4 (1 + sqrt 2).
 * The same value is 1/sigma_min of the Hankel operator of 1/(s+1)^2,
 * whose Hankel singular values are (sqrt 2 +- 1)/4 (Glover's minimum-effort
 * stabilization, IJC 1986; from memory). */
Test(floors, double_pole_effort_closed_form)
{
    run(NULL, 0, (ps_cplx[]){{1, 0}, {1, 0}}, 2, 1.0, 0.0);
    cr_assert_float_eq(fl.effort, 4 * (1 + sqrt(2.0)), 1e-9, "effort %.15g", fl.effort);
}

/* The confluent value is the limit of ordinary Pick problems whose points
 * split the repeated root: p +- h, with the same analytic data. */
static double split_pick(double p0, double h, const ps_cplx *z, size_t nz, double theta)
{
    ps_cplx s[2] = {{p0 - h, 0}, {p0 + h, 0}}, w[2];
    for (int i = 0; i < 2; i++) {
        double v = exp(s[i].re * theta);
        for (size_t j = 0; j < nz; j++)
            v *= (s[i].re + z[j].re) / (s[i].re - z[j].re);
        w[i] = (ps_cplx){v, 0};
    }
    double g, cond;
    ps_diag d = {0};
    cr_assert_eq(ps_pick_gamma(lws, s, w, 2, &g, &cond, &d), PS_OK, "%s", d.text);
    return g;
}

Test(floors, confluent_is_the_limit_of_split_points)
{
    ps_cplx z[] = {{5.5, 0}, {9, 0}};
    double theta = 0.05;
    run(z, 2, (ps_cplx[]){{1.5, 0}, {1.5, 0}, {-4, 0}, {-30, 0}}, 4, 2.0, theta);
    double conf = fl.mt_interpolation;
    double e3 = fabs(split_pick(1.5, 1e-2, z, 2, theta) - conf) / conf;
    double e4 = fabs(split_pick(1.5, 1e-3, z, 2, theta) - conf) / conf;
    cr_assert_lt(e4, e3, "no convergence: %g then %g", e3, e4);
    cr_assert_lt(e4, 1e-4, "split 1e-3 differs by %g", e4);
    /* not the single-point product, which is smaller here */
    double single = exp(1.5 * theta) * (1.5 + 5.5) / (5.5 - 1.5) * (1.5 + 9) / (9 - 1.5);
    cr_assert_gt(conf, single * (1 + 1e-6), "confluent %.12g, single %.12g", conf, single);
}

/* With one real repeated point the Pick value cannot tell the sign of the
 * derivative data (s -> s0^2/s maps the RHP onto itself and fixes s0), so
 * these cases also fix the derivative convention: a double pole with a
 * simple pole, and a repeated complex pair, each against one real RHP zero
 * whose single condition is tight (as above). */
Test(floors, mixed_and_complex_repeated_poles_match_single_zero_bound)
{
    run((ps_cplx[]){{9, 0}}, 1, (ps_cplx[]){{2, 0}, {2, 0}, {5, 0}, {-3, 0}}, 4, 1.0, 0.0);
    double want = (11.0 / 7.0) * (11.0 / 7.0) * (14.0 / 4.0);
    cr_assert_float_eq(fl.ms_interpolation, want, 1e-9 * want);
    cr_assert_float_eq(fl.mt_interpolation, want, 1e-9 * want, "mt %.15g want %.15g", fl.mt_interpolation, want);

    ps_cplx pair[] = {{1, 2}, {1, -2}, {1, 2}, {1, -2}, {-4, 0}};
    run((ps_cplx[]){{6, 0}}, 1, pair, 5, 1.0, 0.0);
    double b = hypot(6 + 1, 2) / hypot(6 - 1, 2); /* |z + conj p| / |z - p| for each of the four poles */
    want = b * b * b * b;
    cr_assert_float_eq(fl.ms_interpolation, want, 1e-9 * want);
    cr_assert_float_eq(fl.mt_interpolation, want, 1e-9 * want, "mt %.15g want %.15g", fl.mt_interpolation, want);
}

/* Parity interlacing (Youla, Bongiorno & Lu, Automatica 10, 1974). A
 * strictly proper plant with one real RHP zero z and one real RHP pole p:
 * the real zeros in [0, +inf] are z and +inf. With p < z the interval
 * (z, inf) holds no pole and a stable controller can stabilize; with p > z
 * it holds one, so every stabilizing controller is itself unstable (S&P 2nd
 * ed. ch. 5, from memory). */
Test(floors, parity_interlacing_flags_unstable_controller_need)
{
    run((ps_cplx[]){{8, 0}}, 1, (ps_cplx[]){{3, 0}, {-3, 0}, {-20, 0}}, 3, 1.0, 0.0);
    cr_assert(fl.parity_interlacing, "z = 8 > p = 3: a stable controller can stabilize");
    run((ps_cplx[]){{2, 0}}, 1, (ps_cplx[]){{3, 0}, {-3, 0}, {-20, 0}}, 3, 1.0, 0.0);
    cr_assert_not(fl.parity_interlacing, "z = 2 < p = 3: one real pole between z and infinity");
    /* two RHP poles beyond the zero: even, holds again */
    run((ps_cplx[]){{2, 0}}, 1, (ps_cplx[]){{3, 0}, {4, 0}, {-20, 0}}, 3, 1.0, 0.0);
    cr_assert(fl.parity_interlacing);
    /* a complex pair between the zeros does not count */
    run((ps_cplx[]){{2, 0}}, 1, (ps_cplx[]){{3, 1}, {3, -1}, {-20, 0}}, 3, 1.0, 0.0);
    cr_assert(fl.parity_interlacing);
    /* biproper plant: no zero at infinity, so z = 2 < p = 3 has no pair */
    run((ps_cplx[]){{2, 0}, {-1, 0}}, 2, (ps_cplx[]){{3, 0}, {-20, 0}}, 2, 1.0, 0.0);
    cr_assert(fl.parity_interlacing);
    /* ... unless delayed: e^{-s theta} vanishes along the positive real axis */
    run((ps_cplx[]){{2, 0}, {-1, 0}}, 2, (ps_cplx[]){{3, 0}, {-20, 0}}, 2, 1.0, 0.01);
    cr_assert_not(fl.parity_interlacing);
}

/* Bode area floor coverage: the loop needs relative degree >= 2. */
Test(floors, bode_coverage_by_relative_degree)
{
    run(NULL, 0, (ps_cplx[]){{3, 0}, {-20, 0}}, 2, 1.0, 0.0);
    cr_assert_eq(fl.bode_controller_rd, 0);
    run(NULL, 0, (ps_cplx[]){{3, 0}}, 1, 1.0, 0.0);
    cr_assert_eq(fl.bode_controller_rd, 1);
    run((ps_cplx[]){{-1, 0}}, 1, (ps_cplx[]){{3, 0}}, 1, 1.0, 0.0);
    cr_assert_eq(fl.bode_controller_rd, 2);
}

/* Same value, bit for bit, or both NaN. */
static bool same_double(double a, double b)
{
    return (isnan(a) && isnan(b)) || memcmp(&a, &b, sizeof a) == 0;
}

/* Every field of a equals f's, bit for bit (q names the case). */
static void same_floors(const ps_floors *a_fl, const ps_floors *f_fl, const ps_requirements *q)
{
    _Static_assert(offsetof(ps_floors, mt) - offsetof(ps_floors, bode_area) == 8 * sizeof(double),
                   "the nine floor values follow each other");
    const double *a = &a_fl->bode_area, *f = &f_fl->bode_area;
    for (size_t m = 0; m < 9; m++) /* bode_area .. mt */
        cr_assert(same_double(a[m], f[m]), "field %zu at wb %g wh %g delta %g: %.17g vs %.17g", m, q->wb, q->wh,
                  q->delta, a[m], f[m]);
    const double a_ln[] = {a_fl->ms_ln, a_fl->mt_ln, a_fl->ms_interpolation_ln, a_fl->mt_interpolation_ln,
                           a_fl->effort_ln, a_fl->ms_band_ln, a_fl->ms_poisson_ln, a_fl->mt_poisson_ln};
    const double f_ln[] = {f_fl->ms_ln, f_fl->mt_ln, f_fl->ms_interpolation_ln, f_fl->mt_interpolation_ln,
                           f_fl->effort_ln, f_fl->ms_band_ln, f_fl->ms_poisson_ln, f_fl->mt_poisson_ln};
    for (size_t m = 0; m < 8; m++) /* the logarithms beside the floors */
        cr_assert(same_double(a_ln[m], f_ln[m]), "log %zu at wb %g wh %g delta %g: %.17g vs %.17g", m, q->wb, q->wh,
                  q->delta, a_ln[m], f_ln[m]);
    cr_assert(same_double(a_fl->band_tail, f_fl->band_tail));
    cr_assert_str_eq(a_fl->limiting, f_fl->limiting);
    cr_assert(same_double(a_fl->crossover_min, f_fl->crossover_min));
    cr_assert(same_double(a_fl->crossover_max, f_fl->crossover_max));
    cr_assert_eq(a_fl->window_open, f_fl->window_open);
    cr_assert_eq(a_fl->infinite, f_fl->infinite);
    cr_assert(same_double(a_fl->cond, f_fl->cond));
    cr_assert_eq(a_fl->parity_interlacing, f_fl->parity_interlacing);
    cr_assert_eq(a_fl->bode_controller_rd, f_fl->bode_controller_rd);
    cr_assert_str_eq(a_fl->note, f_fl->note);
}

/* ps_floors_plant once, then ps_floors_apply on one copy for a run of
 * different requirements, gives what a full ps_floors_compute gives for each
 * (the searches rely on it). Applying several requirements in turn to the
 * same copy catches a requirement field the apply step leaves stale. Two
 * plants: one with delay, and a biproper one whose Ms floor of 1 comes from
 * the roll-off requirement alone (the note then changes with it). */
static void check_halves(void)
{
    ps_floors half, applied, full;
    ps_floors_plant(lws, &an, &half);
    applied = half;
    const double wb[] = {0.0, 0.3, 2.0, 5.5}, wh[] = {0.0, 12.0, 40.0, 400.0}, delta[] = {0.0, 0.3, 0.7};
    int checked = 0;
    for (size_t i = 0; i < 4; i++)
        for (size_t j = 0; j < 4; j++)
            for (size_t k = 0; k < 3; k++) {
                ps_requirements q = p.req;
                q.wb = wb[i];
                q.eps = 0.4;
                q.wh = wh[j];
                q.delta = delta[k];
                if (q.wh > 0 && !(q.wh > q.wb))
                    continue;
                ps_floors_apply(lws, &an, &q, &applied);
                ps_floors_compute(lws, &an, &q, &full);
                same_floors(&applied, &full, &q);
                checked++;
            }
    cr_assert_geq(checked, 30);
}

Test(floors, plant_half_then_requirements_equals_full_compute)
{
    run((ps_cplx[]){{19, 0}}, 1, (ps_cplx[]){{3.1, 0}, {1.2, 2.5}, {1.2, -2.5}, {-9, 0}}, 4, 2.0, 0.004);
    check_halves();
    run((ps_cplx[]){{-1.9, 0}}, 1, (ps_cplx[]){{0.35, 0}}, 1, 2.6, 0.0);
    check_halves();
    /* floors past a double's range: e^{p theta} = e^{954}, and band floors of a fast pole */
    run((ps_cplx[]){{7.9, 0}}, 1, (ps_cplx[]){{2.385, 0}, {0.93, 0}, {-7.1, 0}}, 3, 3.17, 400.0);
    check_halves();
    run(NULL, 0, (ps_cplx[]){{2.385e5, 0}, {-20, 0}}, 2, 100.0, 0.0);
    check_halves();
}

/* After one ps_floors_apply, moving only the band edge (wb, eps) with
 * ps_floors_apply_band gives the full floors for each band edge (the band
 * target and the Ms-vs-band curve rely on it); the Poisson Mt floor is
 * active (delta > 0) so a stale one would show. */
static void check_band_only(void)
{
    const double wh[] = {12.0, 40.0, 400.0}, delta[] = {0.3, 0.7}, wb[] = {0.05, 0.3, 2.0, 5.5, 11.0};
    int checked = 0;
    for (size_t j = 0; j < 3; j++)
        for (size_t k = 0; k < 2; k++) {
            ps_requirements q = p.req;
            q.wh = wh[j];
            q.delta = delta[k];
            q.wb = 1.0;
            q.eps = 0.5;
            ps_floors base, moved, full;
            ps_floors_plant(lws, &an, &base);
            ps_floors_apply(lws, &an, &q, &base);
            cr_assert(isfinite(base.mt_poisson_ln), "the Poisson Mt floor is active in this case");
            for (size_t i = 0; i < 5; i++) {
                q.wb = wb[i];
                q.eps = i % 2 ? 0.1 : 0.7071;
                if (!(q.wh > q.wb))
                    continue;
                moved = base;
                ps_floors_apply_band(lws, &an, &q, &moved);
                ps_floors_compute(lws, &an, &q, &full);
                same_floors(&moved, &full, &q);
                checked++;
            }
        }
    cr_assert_geq(checked, 25);
}

/* Two plants: RHP zeros beside the poles, and a biproper one with a slow RHP
 * pole whose band floor crosses 1 as the band edge moves (the roll-off
 * sentence in the note comes and goes). */
Test(floors, band_only_update_equals_full_compute)
{
    run((ps_cplx[]){{19, 0}, {4.5, 0}}, 2, (ps_cplx[]){{3.1, 0}, {1.2, 2.5}, {1.2, -2.5}, {-9, 0}}, 4, 2.0, 0.0);
    check_band_only();
    run((ps_cplx[]){{-1.9, 0}}, 1, (ps_cplx[]){{0.35, 0}}, 1, 2.6, 0.0);
    check_band_only();
    /* past a double's range: a long delay (Poisson Mt floor) and a fast pole (band floors) */
    run((ps_cplx[]){{19, 0}}, 1, (ps_cplx[]){{2.385, 0}, {-9, 0}}, 2, 2.0, 400.0);
    check_band_only();
    run(NULL, 0, (ps_cplx[]){{2.385e5, 0}, {-20, 0}}, 2, 100.0, 0.0);
    check_band_only();
}

/* Floors past a double's range (about 1.8e308) are finite: they are carried
 * in natural logarithms, `infinite` stays false and the note names no
 * cancellation (issue 14, finding 1). One RHP pole p with delay theta: the
 * Mt floor is |e^{p theta} B_z(p)^-1| = e^{p theta} (z + p)/(z - p) for one
 * RHP zero z (S&P 2nd ed. 2005, ch. 5, one interpolation point), and with
 * delay the Ms floor equals it; the effort floor is e^{p theta}/|G_s(p)|,
 * G_s(p) = k (p - z)/((p + p)(p + a)) for P = k (s - z)/((s - p)(s + a)). */
Test(floors, long_delay_floor_is_finite_in_logarithm)
{
    double pp = 2.385, th = 400.0, a = 7.1, k = 3.17, z = 7.9;
    run(NULL, 0, (ps_cplx[]){{pp, 0}, {-a, 0}}, 2, k, th);
    cr_assert(!fl.infinite);
    cr_assert(isinf(fl.mt_interpolation), "e^954 is past a double's range");
    cr_assert_float_eq(fl.mt_interpolation_ln, pp * th, 1e-12 * pp * th);
    cr_assert_float_eq(fl.ms_interpolation_ln, pp * th, 1e-12 * pp * th);
    cr_assert_float_eq(fl.ms_ln, pp * th, 1e-12 * pp * th);
    cr_assert_float_eq(fl.mt_ln, pp * th, 1e-12 * pp * th);
    cr_assert_float_eq(fl.effort_ln, pp * th + log(2 * pp * (pp + a) / k), 1e-12 * pp * th);
    cr_assert_str_eq(fl.limiting, "interpolation");
    cr_assert_null(strstr(fl.note, "coincides"), "note: %s", fl.note);
    /* printed as a power of ten: e^954 = 2.0746065...e+414 (Python decimal, 40 digits) */
    char b[48];
    cr_assert_str_eq(ps_text_big(b, sizeof b, fl.mt, fl.mt_ln, 5), "2.0746e+414");
    run((ps_cplx[]){{z, 0}}, 1, (ps_cplx[]){{pp, 0}, {-a, 0}}, 2, k, th);
    cr_assert(!fl.infinite);
    double want = pp * th + log((z + pp) / (z - pp));
    cr_assert_float_eq(fl.mt_interpolation_ln, want, 1e-12 * want);
    cr_assert_float_eq(fl.ms_ln, want, 1e-12 * want);
    cr_assert_float_eq(fl.effort_ln, pp * th + log(2 * pp * (pp + a) / (k * (z - pp))), 1e-12 * want);
}

/* Two RHP poles with delay: past e^230 the Pick data are scaled by their
 * largest modulus (gamma(c w) = |c| gamma(w)). ln gamma is smooth in theta,
 * so its second difference across the threshold (one side plain, one side
 * scaled; step h) is O(h^2); a scaling that lost or doubled the factor would
 * leave a jump of about 230. */
Test(floors, scaled_pick_continues_the_plain_one)
{
    double p2 = 7.7, h = 1e-3, th[3], l[3];
    th[1] = 230.0 / p2; /* the larger data modulus is e^{p2 theta}: at the threshold */
    th[0] = th[1] - h;
    th[2] = th[1] + h;
    for (int i = 0; i < 3; i++) {
        run((ps_cplx[]){{19.3, 0}}, 1, (ps_cplx[]){{3.1, 0}, {p2, 0}, {-12, 0}}, 3, 55.0, th[i]);
        cr_assert(!fl.infinite);
        cr_assert_eq(fl.mt_route, PS_ROUTE_PICK);
        l[i] = fl.mt_interpolation_ln;
        cr_assert_geq(l[i], p2 * th[i] + log((19.3 + p2) / (19.3 - p2)) - 1e-9, "not below the single-point value");
    }
    cr_assert_float_eq(l[0] - 2 * l[1] + l[2], 0.0, 1e-6, "second difference %g", l[0] - 2 * l[1] + l[2]);
    /* and far past a double's range it stays finite and above the single-point value */
    run((ps_cplx[]){{19.3, 0}}, 1, (ps_cplx[]){{3.1, 0}, {p2, 0}, {-12, 0}}, 3, 55.0, 500.0);
    cr_assert(!fl.infinite);
    cr_assert(isfinite(fl.mt_interpolation_ln) && isfinite(fl.effort_ln));
    cr_assert_geq(fl.mt_interpolation_ln, p2 * 500.0 + log((19.3 + p2) / (19.3 - p2)) - 1e-9);
}

/* A fast RHP pole against a low roll-off start: the band floor exp(pi p /
 * w_h) with delta = 0 (Stein 2003) is past a double's range; its logarithm
 * is pi p / w_h, and Mt >= Ms - 1 has the same logarithm there. */
Test(floors, band_floor_past_double_range_is_finite_in_logarithm)
{
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "far");
    p.poles[0] = (ps_cplx){2.385e8, 0};
    p.poles[1] = (ps_cplx){-20, 0};
    p.n_poles = 2;
    p.gain = 100;
    p.req.wh = 7.3;
    p.req.delta = 0.0;
    p.present = (1u << PS_F_ID) | (1u << PS_F_POLES) | (1u << PS_F_GAIN) | (1u << PS_F_ROLLOFF_START) |
                (1u << PS_F_ROLLOFF_GAIN);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(rws, &p, &an, &d), PS_OK, "%s", d.text);
    ps_floors_compute(lws, &an, &p.req, &fl);
    double want = M_PI * 2.385e8 / 7.3;
    cr_assert(!fl.infinite);
    cr_assert(isinf(fl.ms_band));
    cr_assert_float_eq(fl.ms_band_ln, want, 1e-13 * want);
    cr_assert_float_eq(fl.ms_ln, want, 1e-13 * want);
    cr_assert_float_eq(fl.mt_ln, want, 1e-13 * want);
    cr_assert_str_eq(fl.limiting, "band");
    cr_assert_float_eq(fl.ms_interpolation, 1.0, 0);
}
