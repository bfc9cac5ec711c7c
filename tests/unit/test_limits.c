/* test_limits.c - floors against published values and against each other
 * (Chen form vs Nevanlinna-Pick), and the roll-off tail series against GSL
 * quadrature of its defining integral. */
#include <criterion/criterion.h>
#include <gsl/gsl_integration.h>
#include <math.h>
#include <stdlib.h>

#include "core/complex_make.h"

#include "limits/limits.h"
#include "support.h"

static ps_limits_ws *ws;
static void setup(void)
{
    ps_test_init();
    ws = ps_limits_ws_new();
    cr_assert_not_null(ws);
}
static void teardown(void) { ps_limits_ws_free(ws); }
TestSuite(limits, .init = setup, .fini = teardown);

/* Unstable forward-swept-wing airframe, RHP pole 6, RHP zero 26:
 * Ms_min = Mt_min = 32/20 = 1.6 (G. Stein, "Respect the Unstable", IEEE
 * Control Systems Magazine 23(4), 2003). */
Test(limits, unstable_airframe_pole6_zero26_is_1_6)
{
    ps_cplx z[] = {{26, 0}}, p[] = {{6, 0}};
    cr_assert_float_eq(ps_ms_single(z, 1, p, 1), 1.6, 1e-15);
    cr_assert_float_eq(ps_mt_single(z, 1, p, 1, 0.0), 1.6, 1e-15);
    double ms, cond;
    ps_diag d = {0};
    cr_assert_eq(ps_chen_floor(ws, z, 1, p, 1, &ms, &cond, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(ms, 1.6, 1e-12);
    /* Pick route: point p, value 1/B_z(p) = (p + z)/(p - z). */
    ps_cplx w[] = {{(6.0 + 26.0) / (6.0 - 26.0), 0}};
    double g;
    cr_assert_eq(ps_pick_gamma(ws, p, w, 1, &g, &cond, &d), PS_OK, "%s", d.text);
    cr_assert_float_eq(g, 1.6, 1e-12);
}

/* Rod balanced on a cart, cart position measured: RHP pole p = sqrt((M+m)g/(M l)),
 * RHP zero z = sqrt(g/l); Ms_min = (r+1)/(r-1), r = p/z = sqrt(1 + m/M): about 42
 * for m/M = 0.1 (Doyle, Francis & Tannenbaum, Feedback Control Theory, 1992,
 * stabilization chapter; S&P 2nd ed. ch. 5 — from memory). */
Test(limits, rod_on_cart_mass_ratio_0_1_is_about_42)
{
    double g = 9.81, l = 0.837, ratio = 0.1;
    double p = sqrt((1 + ratio) * g / l), z = sqrt(g / l), r = p / z;
    ps_cplx zz[] = {{z, 0}}, pp[] = {{p, 0}};
    double ms, cond;
    cr_assert_eq(ps_chen_floor(ws, zz, 1, pp, 1, &ms, &cond, NULL), PS_OK);
    cr_assert_float_eq(ms, (r + 1) / (r - 1), 1e-9 * ms);
    cr_assert(ms > 41.5 && ms < 42.5, "Ms floor %g", ms);
}

static double urand(unsigned *s) { return rand_r(s) / (double)RAND_MAX; }

/* Random RHP sets with complex pairs: the Chen joint floor equals the Pick
 * value for T (points p_i, w_i = 1/B_z(p_i)), and is never below the
 * single-point products. */
Test(limits, chen_equals_pick_on_random_sets)
{
    unsigned seed = 4242;
    double worst = 0;
    for (int trial = 0; trial < 300; trial++) {
        ps_cplx z[6], p[6];
        size_t nz = 0, np = 0, want_z = 1 + trial % 4, want_p = 1 + (trial / 4) % 4;
        while (nz < want_z) {
            double re = 0.3 + 8 * urand(&seed), im = 6 * urand(&seed);
            if (nz + 2 <= want_z && urand(&seed) < 0.4) {
                z[nz++] = (ps_cplx){re, im};
                z[nz++] = (ps_cplx){re, -im};
            } else
                z[nz++] = (ps_cplx){re, 0};
        }
        while (np < want_p) {
            double re = 0.3 + 8 * urand(&seed), im = 6 * urand(&seed);
            if (np + 2 <= want_p && urand(&seed) < 0.4) {
                p[np++] = (ps_cplx){re, im};
                p[np++] = (ps_cplx){re, -im};
            } else
                p[np++] = (ps_cplx){re, 0};
        }
        double chen, pick, cond;
        ps_diag d = {0};
        if (ps_chen_floor(ws, z, nz, p, np, &chen, &cond, &d) != PS_OK)
            continue; /* near-coincident random points: refused, with a reason */
        ps_cplx w[6];
        for (size_t i = 0; i < np; i++) {
            double complex v = 1;
            for (size_t j = 0; j < nz; j++) {
                double complex pi = ps_complex_make(p[i].re, p[i].im), zj = ps_complex_make(z[j].re, z[j].im);
                v *= (pi + conj(zj)) / (pi - zj);
            }
            w[i] = (ps_cplx){creal(v), cimag(v)};
        }
        cr_assert_eq(ps_pick_gamma(ws, p, w, np, &pick, &cond, &d), PS_OK, "%s", d.text);
        double rel = fabs(chen - pick) / chen;
        if (cond < 1e8) {
            worst = fmax(worst, rel);
            cr_assert_leq(rel, 1e-7, "trial %d: Chen %g vs Pick %g (cond %g)", trial, chen, pick, cond);
        }
        cr_assert_geq(chen * (1 + 1e-7), ps_ms_single(z, nz, p, np), "trial %d chen %g pick %g single %g cond %g nz %zu np %zu", trial, chen, pick, ps_ms_single(z, nz, p, np), cond, nz, np);
        cr_assert_geq(chen * (1 + 1e-7), ps_mt_single(z, nz, p, np, 0.0), "trial %d chen %g pick %g single %g cond %g nz %zu np %zu", trial, chen, pick, ps_mt_single(z, nz, p, np, 0.0), cond, nz, np);
    }
    cr_log_info("Chen vs Pick: worst relative difference %.2e", worst);
}

static double tail_integrand(double w, void *params)
{
    const double *q = params; /* wh, delta, k */
    return -log1p(-q[1] * pow(q[0] / w, 1 + q[2]));
}

/* The exact tail series against its defining integral (GSL qagiu). */
Test(limits, rolloff_tail_series_matches_quadrature)
{
    const double cases[][3] = {{40, 0.5, 1}, {12.5, 0.9, 0.5}, {300, 0.2, 2}, {7, 0.75, 1.3}};
    gsl_integration_workspace *iw = gsl_integration_workspace_alloc(1000);
    for (size_t i = 0; i < 4; i++) {
        double q[3] = {cases[i][0], cases[i][1], cases[i][2]}, res, err;
        gsl_function f = {tail_integrand, q};
        int rc = gsl_integration_qagiu(&f, q[0], 0, 1e-11, 1000, iw, &res, &err);
        cr_assert_eq(rc, 0);
        cr_assert_float_eq(ps_rolloff_tail(q[0], q[1], q[2]), res, 1e-9 * res, "case %zu", i);
        /* The book's 3 delta wh / (2k) bound (delta <= 1/2) is never below it. */
        if (q[1] <= 0.5)
            cr_assert_geq(3 * q[1] * q[0] / (2 * q[2]), res);
    }
    gsl_integration_workspace_free(iw);
    cr_assert_float_eq(ps_rolloff_tail(40, 0.0, 1), 0.0, 0);
}

/* Stein 2003 available-bandwidth form: delta = 0, no band: Ms >= exp(F / Wa). */
Test(limits, band_floor_available_bandwidth_form)
{
    ps_cplx p[] = {{7.9, 0}};
    double F = ps_bode_area(p, 1);
    cr_assert_float_eq(F, M_PI * 7.9, 1e-14);
    cr_assert_float_eq(ps_band_floor(F, 0, 0.5, 40, 0.0, 1), exp(M_PI * 7.9 / 40), 1e-14);
    /* with a band: exp((F + wb ln(1/eps)) / (Wa - wb)) */
    cr_assert_float_eq(ps_band_floor(F, 2.5, 0.3, 40, 0.0, 1), exp((F + 2.5 * log(1 / 0.3)) / 37.5), 1e-14);
}

/* Margin table from the exact inequalities GM >= Ms/(Ms-1), PM >= 2 asin(1/(2Ms))
 * (S&P 2nd ed. ch. 2): Ms 1.2 -> 6.0, 49.25 deg; 1.6 -> 2.667, 36.42 deg;
 * 2.0 -> 2, 28.96 deg (values worked by hand from the formulas). */
Test(limits, margins_guaranteed_by_peaks)
{
    cr_assert_float_eq(ps_gain_margin_from_ms(1.2), 6.0, 1e-12);
    cr_assert_float_eq(ps_phase_margin_from_ms(1.2), 49.25, 0.005);
    cr_assert_float_eq(ps_gain_margin_from_ms(1.6), 2.6667, 5e-5);
    cr_assert_float_eq(ps_phase_margin_from_ms(1.6), 36.42, 0.005);
    cr_assert_float_eq(ps_gain_margin_from_ms(2.0), 2.0, 1e-12);
    cr_assert_float_eq(ps_phase_margin_from_ms(2.0), 28.96, 0.005);
    cr_assert_float_eq(ps_gain_margin_from_mt(1.25), 1.8, 1e-12);
    cr_assert_float_eq(ps_phase_margin_from_mt(1.25), 47.16, 0.005);
}

/* Poisson floors, Freudenberg & Looze 1985 (formulas as in DFT 1992, "Design
 * Constraints"): the band-free limits reduce to the interpolation products,
 * and a value worked by hand from the formula. */
Test(limits, poisson_floors_limits_and_hand_value)
{
    ps_cplx z[] = {{26, 0}}, p[] = {{6, 0}};
    /* wb -> 0: Theta -> 0 and the S floor tends to (z+p)/(z-p) = 1.6 */
    cr_assert_float_eq(ps_poisson_s_floor(z, 1, p, 1, 0.5, 1e-9), 1.6, 1e-9);
    /* wh -> infinity: Theta -> pi and the T floor tends to 1.6 e^{p theta} */
    cr_assert_float_eq(ps_poisson_t_floor(z, 1, p, 1, 0.01, 0.5, 1e12), 1.6 * exp(0.06), 1e-6);
    /* a real zero at 2, no RHP pole, |S| <= 0.5 up to wb = 1:
     * Theta = 2 atan(1/2) = 0.927295, floor = 2^{0.927295/(pi - 0.927295)} = 1.336793 */
    cr_assert_float_eq(ps_poisson_s_floor((ps_cplx[]){{2, 0}}, 1, NULL, 0, 0.5, 1.0), 1.336793, 1e-6);
    /* the floor grows with the band it must hold */
    cr_assert_gt(ps_poisson_s_floor(z, 1, p, 1, 0.5, 10), ps_poisson_s_floor(z, 1, p, 1, 0.5, 5));
    /* complex pair: one bound for the pair, the lower member skipped */
    ps_cplx zz[] = {{3, 4}, {3, -4}};
    double pair = ps_poisson_s_floor(zz, 2, NULL, 0, 0.3, 2.0);
    double th = atan((2.0 - 4) / 3) + atan((2.0 + 4) / 3);
    cr_assert_float_eq(pair, pow(1 / 0.3, th / (M_PI - th)), 1e-12);
    /* The Poisson integrals exist only at an RHP zero (for S) or pole (for T):
     * without one there is nothing to bound, and 0 says so (a stable plant
     * with C = 0 has T = 0; a biproper one can have ||S|| below 1). */
    cr_assert_float_eq(ps_poisson_s_floor(NULL, 0, p, 1, 0.5, 1.0), 0.0, 0);
    cr_assert_float_eq(ps_poisson_t_floor(z, 1, NULL, 0, 0.01, 0.5, 40.0), 0.0, 0);
}
