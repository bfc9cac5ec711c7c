/* test_laws.c - the laws themselves, numerically: for plants with an RHP pole
 * (and an RHP zero), stabilizing controllers are found by a seeded search,
 * closed-loop stability is confirmed from the characteristic polynomial's
 * roots, and then (a) the Bode integral of ln|S(jw)| (GSL quadrature) equals
 * pi * sum Re p (relative degree 2) or pi p - (pi/2) kappa (relative degree 1);
 * (b) no achieved peak of |S| or |T| is below plantsieve's floor. */
#include <criterion/criterion.h>
#include <gsl/gsl_integration.h>
#include <math.h>
#include <stdlib.h>

#include <complex.h>

#include "limits/limits.h"
#include "roots/roots.h"
#include "support.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static ps_roots_ws *rws;
static ps_limits_ws *lws;
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
TestSuite(laws, .init = setup, .fini = teardown);

/* Loop: P = kp (z - s)^nz / ((s - p)(s + c)), C = K (s + d)/(s + e). */
typedef struct loop {
    double kp, z, p, c, K, d, e;
    int has_zero;
} loop;

static double complex L_at(const loop *l, double w)
{
    double complex s = I * w;
    double complex P = l->kp * (l->has_zero ? (l->z - s) : 1.0) / ((s - l->p) * (s + l->c));
    return P * l->K * (s + l->d) / (s + l->e);
}

static double ln_abs_S(double w, void *params)
{
    return -log(cabs(1.0 + L_at(params, w)));
}

/* Characteristic polynomial (s - p)(s + c)(s + e) + kp K (s + d)(z - s or 1); all roots in the LHP? */
static bool stable(const loop *l)
{
    double a[4] = {1, l->c - l->p + l->e, -l->p * l->c + (l->c - l->p) * l->e, -l->p * l->c * l->e};
    double g = l->kp * l->K;
    if (l->has_zero) { /* + g (-(s^2) + (z - d) s + z d) */
        a[1] += -g;
        a[2] += g * (l->z - l->d);
        a[3] += g * l->z * l->d;
    } else {
        a[2] += g;
        a[3] += g * l->d;
    }
    ps_root r[3];
    if (a[0] == 0 || ps_roots_poly(rws, a, 4, r, NULL) != 3)
        return false;
    for (int i = 0; i < 3; i++)
        if (!(r[i].v.re < -1e-6))
            return false;
    return true;
}

static double urand(unsigned *s, double lo, double hi) { return lo + (hi - lo) * rand_r(s) / (double)RAND_MAX; }

/* Peak of |S| (which = 0) or |T| (which = 1) on a log grid, refined by golden sections. */
static double peak(const loop *l, int which)
{
    double best = 0, wbest = 1e-3;
    for (int i = 0; i <= 6000; i++) {
        double w = pow(10.0, -3 + 7.0 * i / 6000);
        double complex L = L_at(l, w);
        double v = which ? cabs(L / (1 + L)) : cabs(1 / (1 + L));
        if (v > best) {
            best = v;
            wbest = w;
        }
    }
    double lo = wbest / 1.003, hi = wbest * 1.003;
    for (int it = 0; it < 60; it++) {
        double m1 = lo + (hi - lo) * 0.382, m2 = lo + (hi - lo) * 0.618;
        double complex L1 = L_at(l, m1), L2 = L_at(l, m2);
        double v1 = which ? cabs(L1 / (1 + L1)) : cabs(1 / (1 + L1));
        double v2 = which ? cabs(L2 / (1 + L2)) : cabs(1 / (1 + L2));
        if (v1 > v2)
            hi = m2;
        else
            lo = m1;
        best = fmax(best, fmax(v1, v2));
    }
    return best;
}

Test(laws, bode_integral_matches_the_floor_for_stabilizing_controllers)
{
    unsigned seed = 777;
    gsl_integration_workspace *iw = gsl_integration_workspace_alloc(2000);
    int checked = 0;
    double worst = 0;
    for (int trial = 0; trial < 4000 && checked < 200; trial++) {
        loop l = {urand(&seed, 0.5, 5), 0, urand(&seed, 0.3, 8), urand(&seed, 0.5, 20),
                  urand(&seed, 0.5, 400), urand(&seed, 0.05, 10), urand(&seed, 1, 80), 0};
        if (!stable(&l))
            continue;
        double res, err;
        gsl_function f = {ln_abs_S, &l};
        /* loop relative degree 2: integral of ln|S| = pi p (Bode; Freudenberg & Looze 1985) */
        int rc = gsl_integration_qagiu(&f, 0, 1e-12, 1e-10, 2000, iw, &res, &err);
        if (rc != 0)
            continue;
        double F = ps_bode_area((ps_cplx[]){{l.p, 0}}, 1);
        double rel = fabs(res - F) / F;
        worst = fmax(worst, rel);
        cr_assert_leq(rel, 1e-6, "trial %d: integral %.12g vs pi p %.12g", trial, res, F);
        checked++;
    }
    gsl_integration_workspace_free(iw);
    cr_assert_geq(checked, 100, "only %d stabilizing controllers found", checked);
    cr_log_info("Bode integral: %d loops, worst relative error %.2e", checked, worst);
}

Test(laws, achieved_peaks_never_below_the_floors)
{
    unsigned seed = 2026;
    int checked = 0;
    double tightest = INFINITY;
    for (int trial = 0; trial < 400000 && checked < 1000; trial++) {
        /* unstable airframe-like plant: RHP pole p, RHP zero z (z > p) */
        double p = urand(&seed, 0.5, 8), z = p * urand(&seed, 1.5, 12);
        loop l = {urand(&seed, 0.3, 6), z, p, urand(&seed, 0.5, 30), urand(&seed, -200, 200),
                  urand(&seed, 0.05, 40), urand(&seed, 0.5, 200), 1};
        if (!stable(&l))
            continue;
        double floor_s, cond;
        ps_diag d = {0};
        cr_assert_eq(ps_chen_floor(lws, (ps_cplx[]){{z, 0}}, 1, (ps_cplx[]){{p, 0}}, 1, &floor_s, &cond, &d),
                     PS_OK, "%s", d.text);
        double ms = peak(&l, 0), mt = peak(&l, 1);
        tightest = fmin(tightest, fmin(ms, mt) / floor_s);
        cr_assert_geq(ms, floor_s * (1 - 1e-9), "trial %d: peak |S| %g below floor %g", trial, ms, floor_s);
        cr_assert_geq(mt, floor_s * (1 - 1e-9), "trial %d: peak |T| %g below floor %g", trial, mt, floor_s);
        checked++;
    }
    cr_assert_geq(checked, 1000, "only %d stabilizing controllers found", checked);
    cr_log_info("peaks vs floors: %d loops, tightest achieved/floor ratio %.4f", checked, tightest);
}
