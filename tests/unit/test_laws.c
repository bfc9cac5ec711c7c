/* test_laws.c - the laws themselves, numerically: for plants with an RHP pole
 * (and an RHP zero), stabilizing controllers are found by a seeded search,
 * closed-loop stability is confirmed from the characteristic polynomial's
 * roots, and then (a) the Bode integral of ln|S(jw)| (GSL quadrature) equals
 * pi * sum Re p (relative degree 2) or pi p - (pi/2) kappa (relative degree 1);
 * (b) no achieved peak of |S| or |T| is below plantsieve's floor, also for
 * stable and biproper plants whose floors are 0 or 1. */
#include <criterion/criterion.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_poly.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <complex.h>

#include "limits/floors.h"
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

/* ---- whole plants: the floors of ps_floors_compute against loops built here ----
 * The laws (interpolation constraints, Skogestad & Postlethwaite, Multivariable
 * Feedback Control, 2nd ed. 2005, ch. 5): S = 1 - T; an internally stable loop
 * has T(p) = 1 at an RHP or axis pole of the plant and S(z) = 1 at an RHP or
 * axis zero; a strictly proper loop has S -> 1 at high frequency. Where none of
 * these holds the floor is 0, and a controller built here goes below 1. */

/* Polynomial in DESCENDING powers of s, degree < 8. */
typedef struct poly {
    size_t n;
    double c[8];
} poly;

static poly poly_mul(poly a, poly b)
{
    poly r = {a.n + b.n - 1, {0}};
    for (size_t i = 0; i < a.n; i++)
        for (size_t j = 0; j < b.n; j++)
            r.c[i + j] += a.c[i] * b.c[j];
    return r;
}

static poly poly_add(poly a, poly b)
{
    poly r = a.n >= b.n ? a : b;
    const poly *o = a.n >= b.n ? &b : &a;
    for (size_t j = 0; j < o->n; j++)
        r.c[r.n - o->n + j] += o->c[j];
    return r;
}

static double complex poly_at(const poly *a, double complex s)
{
    double complex v = 0;
    for (size_t i = 0; i < a->n; i++)
        v = v * s + a->c[i];
    return v;
}

/* Every root in the open LHP (GSL's companion-matrix solver, not plantsieve's
 * root finder). */
static bool hurwitz(const poly *a)
{
    size_t at = 0;
    while (at < a->n && a->c[at] == 0)
        at++;
    size_t n = a->n - at;
    if (n < 2)
        return n == 1;
    double asc[8], z[16];
    for (size_t i = 0; i < n; i++)
        asc[i] = a->c[a->n - 1 - i];
    gsl_poly_complex_workspace *w = gsl_poly_complex_workspace_alloc(n);
    int rc = gsl_poly_complex_solve(asc, n, w, z);
    gsl_poly_complex_workspace_free(w);
    cr_assert_eq(rc, GSL_SUCCESS);
    for (size_t i = 0; i + 1 < n; i++)
        if (!(z[2 * i] < -1e-9))
            return false;
    return true;
}

/* sup |num/den| over w = 0, n log-spaced points on [1e-3, 1e3] rad/s and
 * w -> infinity (ratio of the leading coefficients): a lower estimate of the
 * peak, so a floor above it is wrong. */
static double peak_ratio(const poly *num, const poly *den, int n)
{
    double best = cabs(poly_at(num, 0) / poly_at(den, 0));
    for (int i = 0; i < n; i++) {
        double w = pow(10.0, -3 + 6.0 * i / (n - 1));
        best = fmax(best, cabs(poly_at(num, I * w) / poly_at(den, I * w)));
    }
    if (num->n == den->n)
        best = fmax(best, fabs(num->c[0] / den->c[0]));
    return best;
}

typedef struct achieved {
    bool stable;
    double ms, mt;
} achieved;

/* Loop P = nP/dP, C = nC/dC: characteristic polynomial dP dC + nP nC,
 * S = dP dC / char, T = nP nC / char; peaks on a grid of n points. */
static achieved close_loop(poly nP, poly dP, poly nC, poly dC, int n)
{
    poly s_num = poly_mul(dP, dC), t_num = poly_mul(nP, nC);
    poly ch = poly_add(s_num, t_num);
    achieved a = {hurwitz(&ch), 0, 0};
    if (a.stable) {
        a.ms = peak_ratio(&s_num, &ch, n);
        a.mt = peak_ratio(&t_num, &ch, n);
    }
    return a;
}

static ps_plant law_plant;
static ps_analysis law_an;

/* The floors plantsieve reports for P = num/den (polynomial form, analysed as
 * a catalog entry) under requirements q (NULL: none). */
static ps_floors floors_of(poly num, poly den, const ps_requirements *q)
{
    ps_plant_reset(&law_plant);
    snprintf(law_plant.id, sizeof law_plant.id, "law");
    memcpy(law_plant.num, num.c, num.n * sizeof num.c[0]);
    memcpy(law_plant.den, den.c, den.n * sizeof den.c[0]);
    law_plant.n_num = num.n;
    law_plant.n_den = den.n;
    law_plant.present = (1u << PS_F_ID) | (1u << PS_F_NUM) | (1u << PS_F_DEN);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&law_plant, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(rws, &law_plant, &law_an, &d), PS_OK, "%s", d.text);
    ps_floors fl;
    ps_floors_compute(lws, &law_an, q, &fl);
    return fl;
}

/* Witness: stable plant P = 2.385/(s^2 + 3.1 s + 1.7), C = 0.25. Closed loop
 * s^2 + 3.1 s + 2.29625 (damping 1.02, so |T| peaks at w = 0 with
 * 0.59625/2.29625 = 0.2597, worked by hand). No RHP or axis pole: nothing
 * forces T = 1, and the Mt floor must not exceed 0.26. The controller also
 * meets the roll-off requirement w_h = 12, delta = 0.5, k = 1 (|L| = 0.596/|..|
 * <= 72/w^2, checked on the grid), so the floors with it must hold too. */
Test(laws, stable_plant_witness_mt_floor_not_above_achieved)
{
    poly nP = {1, {2.385}}, dP = {3, {1, 3.1, 1.7}}, nC = {1, {0.25}}, dC = {1, {1}};
    achieved a = close_loop(nP, dP, nC, dC, 20000);
    cr_assert(a.stable);
    cr_assert_float_eq(a.mt, 0.59625 / 2.29625, 1e-12);
    ps_floors fl = floors_of(nP, dP, NULL);
    cr_assert_leq(fl.mt, a.mt, "Mt floor %g above the achieved ||T|| %g", fl.mt, a.mt);
    cr_assert_leq(fl.ms, a.ms, "Ms floor %g above the achieved ||S|| %g", fl.ms, a.ms);
    cr_assert_geq(fl.ms, 1.0, "strictly proper: S -> 1");

    ps_requirements q = law_plant.req;
    q.wh = 12.0;
    q.delta = 0.5;
    q.k = 1.0;
    for (int i = 0; i <= 2000; i++) {
        double w = q.wh * pow(10.0, 3.0 * i / 2000);
        double L = cabs(0.25 * poly_at(&nP, I * w) / poly_at(&dP, I * w));
        cr_assert_leq(L, q.delta * pow(q.wh / w, 1 + q.k), "roll-off not met at %g rad/s", w);
    }
    fl = floors_of(nP, dP, &q);
    cr_assert_leq(fl.mt, a.mt, "with roll-off: Mt floor %g above the achieved ||T|| %g", fl.mt, a.mt);
    cr_assert_leq(fl.ms, a.ms, "with roll-off: Ms floor %g above the achieved ||S|| %g", fl.ms, a.ms);
}

/* Witness: biproper P = (s + 1)/(s - 1), C = 3. Closed loop 4 s + 2 (root
 * -0.5); S = (s - 1)/(4 s + 2) peaks at w = 0 with 0.5, T = 3(s + 1)/(4 s + 2)
 * at w = 0 with 1.5 (worked by hand). T(1) = 1 forces ||T|| >= 1; nothing
 * forces S = 1, so the Ms floor must not exceed 0.5. A high gain C = 2385
 * brings ||S|| below 1e-3: no positive Ms floor holds for this plant. */
Test(laws, biproper_witness_ms_floor_not_above_achieved)
{
    poly nP = {2, {1, 1}}, dP = {2, {1, -1}}, dC = {1, {1}};
    achieved a = close_loop(nP, dP, (poly){1, {3}}, dC, 20000);
    cr_assert(a.stable);
    cr_assert_float_eq(a.ms, 0.5, 1e-12);
    cr_assert_float_eq(a.mt, 1.5, 1e-12);
    ps_floors fl = floors_of(nP, dP, NULL);
    cr_assert_leq(fl.ms, a.ms, "Ms floor %g above the achieved ||S|| %g", fl.ms, a.ms);
    cr_assert_leq(fl.mt, a.mt, "Mt floor %g above the achieved ||T|| %g", fl.mt, a.mt);
    cr_assert_geq(fl.mt, 1.0, "T(p) = 1 at the RHP pole");
    achieved hi = close_loop(nP, dP, (poly){1, {2385}}, dC, 20000);
    cr_assert(hi.stable);
    cr_assert_lt(hi.ms, 1e-3);
    cr_assert_leq(fl.ms, hi.ms);
}

static double law_rand(unsigned *s, double lo, double hi) { return lo + (hi - lo) * rand_r(s) / (double)RAND_MAX; }

/* Seeded search over four kinds of plant, each with a static gain or a lag
 * controller, keeping the first 400 stabilizing ones of each kind (peaks on
 * 2000 grid points and w = 0, infinity): no reported floor is above the
 * achieved peaks. The kinds: stable strictly proper (floors Ms 1, Mt 0),
 * biproper with an RHP pole and an LHP zero (Ms 0, Mt 1), biproper with a
 * zero at the origin (Ms 1: S(0) = 1), an integrator (Mt 1: T(0) = 1). */
Test(laws, stable_biproper_and_axis_plants_floors_never_above_achieved)
{
    unsigned seed = 4111;
    int checked[4] = {0}, below_one[4] = {0};
    for (int trial = 0; trial < 20000 && (checked[0] < 400 || checked[1] < 400 || checked[2] < 400 || checked[3] < 400);
         trial++) {
        int kind = trial % 4;
        double a0 = law_rand(&seed, 0.2, 9), a1 = law_rand(&seed, 0.3, 7), g = law_rand(&seed, 0.4, 6);
        double k = law_rand(&seed, -3, 40), lag = law_rand(&seed, 0.5, 60);
        poly nP, dP;
        switch (kind) {
        case 0: nP = (poly){1, {g}}; dP = (poly){3, {1, a1, a0}}; break;
        case 1: nP = (poly){2, {g, g * a0}}; dP = (poly){2, {1, -a1 / 2}}; break;
        case 2: nP = (poly){2, {g, 0}}; dP = (poly){2, {1, a0}}; break;
        default: nP = (poly){1, {g}}; dP = (poly){3, {1, a1, 0}}; break;
        }
        /* half static gains, half k lag/(s + lag) */
        poly nC = trial % 8 < 4 ? (poly){1, {k}} : (poly){1, {k * lag}};
        poly dC = trial % 8 < 4 ? (poly){1, {1}} : (poly){2, {1, lag}};
        if (checked[kind] >= 400)
            continue;
        achieved a = close_loop(nP, dP, nC, dC, 2000);
        if (!a.stable)
            continue;
        ps_floors fl = floors_of(nP, dP, NULL);
        cr_assert_leq(fl.ms, a.ms * (1 + 1e-12), "kind %d trial %d: Ms floor %g, achieved %g", kind, trial, fl.ms,
                      a.ms);
        cr_assert_leq(fl.mt, a.mt * (1 + 1e-12), "kind %d trial %d: Mt floor %g, achieved %g", kind, trial, fl.mt,
                      a.mt);
        below_one[kind] += kind == 1 ? a.ms < 1 : kind == 0 ? a.mt < 1 : 0;
        checked[kind]++;
    }
    for (int kind = 0; kind < 4; kind++)
        cr_assert_geq(checked[kind], 400, "kind %d: only %d stabilizing controllers", kind, checked[kind]);
    /* the zero floors are needed: loops below 1 exist where nothing forces 1 */
    cr_assert_geq(below_one[0], 50, "stable plants with ||T|| < 1: %d", below_one[0]);
    cr_assert_geq(below_one[1], 50, "biproper plants with ||S|| < 1: %d", below_one[1]);
    cr_log_info("floors vs peaks: %d + %d + %d + %d loops; below 1: %d stable (T), %d biproper (S)", checked[0],
                checked[1], checked[2], checked[3], below_one[0], below_one[1]);
}
