/* test_discrete.c - the hold discretisation and the held plant's poles and zeros,
 * checked against scipy, integrated step responses, closed forms and published sampling zeros. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "core/complex_make.h"
#include "model/discrete.h"
#include "model/plant.h"
#include "roots/roots.h"
#include "support.h"

static ps_roots_ws *rws;
static ps_discrete_ws *dws;
static ps_held held;
static ps_plant plant;
static ps_analysis cont;
static ps_held_roots hr;

static void setup(void)
{
    ps_test_init();
    rws = ps_roots_ws_new();
    dws = ps_discrete_ws_new();
    cr_assert(rws && dws);
}
static void teardown(void)
{
    ps_roots_ws_free(rws);
    ps_discrete_ws_free(dws);
}
TestSuite(discrete, .init = setup, .fini = teardown);

/* Checked polynomial plant num/den (descending). */
static void poly_plant(const double *num, size_t nn, const double *den, size_t nd)
{
    ps_plant_reset(&plant);
    snprintf(plant.id, sizeof plant.id, "p");
    memcpy(plant.num, num, nn * sizeof *num);
    memcpy(plant.den, den, nd * sizeof *den);
    plant.n_num = nn;
    plant.n_den = nd;
    plant.present = (1u << PS_F_ID) | (1u << PS_F_NUM) | (1u << PS_F_DEN);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&plant, &d), PS_OK, "%s", d.text);
}

/* Factored plant gain * prod(s - z) / prod(s - p), real roots only. */
static void factored_plant(double gain, const double *z, size_t nz, const double *p, size_t np)
{
    ps_plant_reset(&plant);
    snprintf(plant.id, sizeof plant.id, "f");
    for (size_t i = 0; i < nz; i++)
        plant.zeros[i] = (ps_cplx){z[i], 0.0};
    for (size_t i = 0; i < np; i++)
        plant.poles[i] = (ps_cplx){p[i], 0.0};
    plant.n_zeros = nz;
    plant.n_poles = np;
    plant.gain = gain;
    plant.present = (1u << PS_F_ID) | (1u << PS_F_POLES) | (1u << PS_F_GAIN) | (nz ? (1u << PS_F_ZEROS) : 0u);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&plant, &d), PS_OK, "%s", d.text);
}

/* Hold the current plant and find the held roots. */
static void hold(double h, double theta)
{
    ps_diag d = {0};
    cr_assert_eq(ps_roots_analyse(rws, &plant, &cont, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_discrete_hold(dws, &plant, h, theta, &held, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_held(rws, &held, &cont, &hr, &d), PS_OK, "%s", d.text);
}

static double complex held_tf(double complex z)
{
    double complex v = hr.gain;
    for (size_t i = 0; i < hr.n_zeros; i++)
        v *= z - ps_complex_make(hr.zeros[i].re, hr.zeros[i].im);
    for (size_t i = 0; i < hr.n_poles; i++)
        v /= z - ps_complex_make(hr.poles[i].re, hr.poles[i].im);
    return v;
}

/* Distance from (re, im) to the nearest held zero. */
static double zero_dist(double re, double im)
{
    double best = INFINITY;
    for (size_t i = 0; i < hr.n_zeros; i++)
        best = fmin(best, hypot(hr.zeros[i].re - re, hr.zeros[i].im - im));
    return best;
}

static size_t read_list(char **s, double *out, size_t cap)
{
    size_t n = 0;
    char *e;
    for (;;) {
        double v = strtod(*s, &e);
        if (e == *s)
            break;
        cr_assert_lt(n, cap);
        out[n++] = v;
        *s = e;
    }
    if (**s == ' ')
        (*s)++;
    if (**s == '|')
        (*s)++;
    return n;
}

/* scipy.signal.cont2discrete(method='zoh') on 200 seeded random plants of
 * orders 1..6, relative degree 0..n, stable and unstable (tests/oracle/zoh_oracle.py).
 * The realisation is basis-dependent, so the check is on the transfer function:
 * gain * prod(z - zeros) / prod(z - poles) from ps_roots_held against numd/dend at
 * three points, 1e-7 relative; every root of dend matched by a held pole (1e-7 of
 * max(1, |p|)); the relative degree of a held strictly proper plant is 1 (a
 * biproper one 0), since C Gamma = C int e^{As} ds B is not 0 for small h
 * (Astrom & Wittenmark, Computer-Controlled Systems, 3rd ed., sec. 2.6, from memory). */
Test(discrete, scipy_cont2discrete_200_random_plants)
{
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "'%s' '%s/tests/oracle/zoh_oracle.py' random 200", PS_ORACLE_PYTHON,
             PS_SOURCE_DIR);
    FILE *f = popen(cmd, "r");
    cr_assert_not_null(f);
    static char line[1 << 14];
    int cases = 0;
    double worst_h = 0, worst_p = 0;
    while (fgets(line, sizeof line, f)) {
        char *s = line;
        double hbuf[1], num[8], den[8], pts[12], poles[16];
        cr_assert_eq(read_list(&s, hbuf, 1), 1);
        size_t nn = read_list(&s, num, 8), nd = read_list(&s, den, 8);
        cr_assert_eq(read_list(&s, pts, 12), 12);
        size_t np2 = read_list(&s, poles, 16);
        cr_assert_eq(np2, 2 * (nd - 1));
        poly_plant(num, nn, den, nd);
        hold(hbuf[0], 0.0);
        cr_assert_eq(held.ss.a_rows, nd - 1);
        cr_assert_eq(hr.rel_degree, nn == nd ? 0 : 1, "case %d: relative degree %d", cases, hr.rel_degree);
        for (int k = 0; k < 3; k++) {
            double complex z = ps_complex_make(pts[4 * k], pts[4 * k + 1]), ref = ps_complex_make(pts[4 * k + 2], pts[4 * k + 3]);
            double rel = cabs(held_tf(z) - ref) / cabs(ref);
            worst_h = fmax(worst_h, rel);
            cr_assert_leq(rel, 1e-7, "case %d point %d: H off by %g relative", cases, k, rel);
        }
        for (size_t i = 0; i < nd - 1; i++) {
            double best = INFINITY;
            for (size_t j = 0; j < hr.n_poles; j++)
                best = fmin(best, hypot(hr.poles[j].re - poles[2 * i], hr.poles[j].im - poles[2 * i + 1]));
            double rel = best / fmax(1.0, hypot(poles[2 * i], poles[2 * i + 1]));
            worst_p = fmax(worst_p, rel);
            cr_assert_leq(rel, 1e-7, "case %d pole %zu: %g off", cases, i, rel);
        }
        cases++;
    }
    cr_assert_eq(pclose(f), 0, "the scipy oracle failed (python3-scipy missing?)");
    cr_assert_eq(cases, 200);
    cr_log_info("cont2discrete: 200 plants, worst H %.2e, worst pole %.2e", worst_h, worst_p);
}

/* Whole and fractional input delays: the held plant driven by a unit step from
 * k = 0 gives y[k] = y_step(k h - theta) of the continuous plant, which the
 * oracle integrates numerically (solve_ivp, DOP853, rtol 1e-12) from its own
 * realisation (tf2ss). Tolerance 1e-8 of max(1, |y|). Also the order n + m + (f > 0). */
Test(discrete, delayed_step_response_matches_integration)
{
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "'%s' '%s/tests/oracle/zoh_oracle.py' step", PS_ORACLE_PYTHON, PS_SOURCE_DIR);
    FILE *f = popen(cmd, "r");
    cr_assert_not_null(f);
    static char line[1 << 14];
    int cases = 0;
    double worst = 0;
    while (fgets(line, sizeof line, f)) {
        char *s = line;
        double head[3], num[8], den[8], y[64];
        cr_assert_eq(read_list(&s, head, 3), 3);
        size_t nn = read_list(&s, num, 8), nd = read_list(&s, den, 8);
        size_t K = read_list(&s, y, 64);
        cr_assert_eq(K, (size_t)head[2]);
        double h = head[0], theta = head[1];
        poly_plant(num, nn, den, nd);
        hold(h, theta);
        double q = theta / h, whole = floor(q + 1e-9), frac = q - whole;
        size_t want = nd - 1 + (size_t)whole + (frac > 1e-9 ? 1 : 0);
        cr_assert_eq(held.ss.a_rows, want, "case %d: order %zu, want %zu", cases, held.ss.a_rows, want);
        size_t N = held.ss.a_rows;
        double x[PS_MAX_ORDER] = {0}, xn[PS_MAX_ORDER];
        for (size_t k = 0; k < K; k++) {
            double yk = held.ss.d;
            for (size_t i = 0; i < N; i++)
                yk += held.ss.c[i] * x[i];
            double err = fabs(yk - y[k]) / fmax(1.0, fabs(y[k]));
            worst = fmax(worst, err);
            cr_assert_leq(err, 1e-8, "case %d (theta/h = %.3f) sample %zu: %.12g vs %.12g", cases, q, k, yk, y[k]);
            for (size_t i = 0; i < N; i++) {
                xn[i] = held.ss.b[i];
                for (size_t j = 0; j < N; j++)
                    xn[i] += held.ss.a[i * N + j] * x[j];
            }
            memcpy(x, xn, N * sizeof *x);
        }
        cases++;
    }
    cr_assert_eq(pclose(f), 0, "the step oracle failed");
    cr_assert_eq(cases, 9);
    cr_log_info("delayed step responses: 9 plants, worst %.2e", worst);
}

/* The held 1/s^r has the same zeros for every h: the roots of the
 * Euler-Frobenius polynomials z + 1 (r = 2), z^2 + 4z + 1 (r = 3), z^3 + 11 z^2 +
 * 11 z + 1 (r = 4) (Astrom, Hagander & Sternby, Automatica 20(1), 1984). Two
 * periods, a state-space chain as given in the catalog (gain 2.385). */
Test(discrete, sampling_zeros_of_integrator_chains)
{
    const double s24 = sqrt(24.0), s3 = sqrt(3.0);
    const double want[3][3] = {{-1.0}, {-2.0 - s3, -2.0 + s3}, {-1.0, -5.0 - s24, -5.0 + s24}};
    const double hs[2] = {0.0371, 0.413};
    for (size_t r = 2; r <= 4; r++)
        for (int k = 0; k < 2; k++) {
            double p[4] = {0, 0, 0, 0};
            factored_plant(2.385, NULL, 0, p, r);
            hold(hs[k], 0.0);
            cr_assert_eq(hr.n_zeros, r - 1, "r %zu h %g: %zu zeros", r, hs[k], hr.n_zeros);
            cr_assert_eq(hr.rel_degree, 1);
            for (size_t i = 0; i < r - 1; i++) {
                double dz = zero_dist(want[r - 2][i], 0.0);
                cr_assert_leq(dz, 1e-6 * fabs(want[r - 2][i]), "r %zu h %g: no zero near %g (%g off)", r, hs[k],
                              want[r - 2][i], dz);
            }
        }
}

/* With poles the sampling zeros reach those limits only as h -> 0, at first
 * order: the distance to the limit roughly halves with h (ratio within 1.6..2.4
 * per halving) and is below 1e-2 relative at the smallest period. Plants with
 * poles -0.71, -1.93, -3.17, -0.52 (relative degree r = 2, 3, 4, no finite zeros). */
Test(discrete, sampling_zeros_approach_the_limit_at_first_order)
{
    const double s24 = sqrt(24.0), s3 = sqrt(3.0);
    const double want[3][3] = {{-1.0}, {-2.0 - s3, -2.0 + s3}, {-1.0, -5.0 - s24, -5.0 + s24}};
    const double p[4] = {-0.71, -1.93, -3.17, -0.52};
    for (size_t r = 2; r <= 4; r++) {
        double prev = 0;
        for (int k = 0; k < 6; k++) {
            double h = 0.2 * ldexp(1.0, -k);
            factored_plant(2.385, NULL, 0, p, r);
            hold(h, 0.0);
            cr_assert_eq(hr.n_zeros, r - 1);
            double err = 0;
            for (size_t i = 0; i < r - 1; i++)
                err = fmax(err, zero_dist(want[r - 2][i], 0.0) / fabs(want[r - 2][i]));
            if (k > 0) {
                double ratio = prev / err;
                cr_assert(ratio > 1.6 && ratio < 2.4, "r %zu h %g: error %g, ratio %g per halving", r, h, err, ratio);
            }
            prev = err;
        }
        cr_assert_leq(prev, 1e-2, "r %zu: %g from the limit at the smallest h", r, prev);
    }
}

/* Fractional delay f h on P = b/(s + a). Modified z-transform worked out here:
 * x[k+1] = phi x[k] + g0 u[k] + g1 u[k-1], phi = e^{-a h},
 * g0 = b (1 - e^{-a (1-f) h}) / a  (the input held since k h + f h, for (1-f) h),
 * g1 = b e^{-a (1-f) h} (1 - e^{-a f h}) / a  (u[k-1] acts for f h, then decays (1-f) h),
 * so H(z) = (g0 z + g1) / (z (z - phi)): one zero at -g1/g0, which tends to
 * -f/(1 - f) as h -> 0 (expand both exponentials to first order). Checked: the
 * held zero against -g1/g0 to 1e-10 relative at several h, and its distance to
 * -f/(1-f) shrinking, below 1e-3 relative at h = 1e-4. */
Test(discrete, fractional_delay_zero_of_first_order_plant)
{
    const double a = 1.73, b = 2.385, fs[4] = {0.21, 0.37, 0.64, 0.83};
    for (int i = 0; i < 4; i++) {
        double f = fs[i], prev = INFINITY;
        for (int k = 0; k < 4; k++) {
            double h = 0.37 * pow(10.0, -k);
            double poles[1] = {-a};
            factored_plant(b, NULL, 0, poles, 1);
            hold(h, f * h);
            cr_assert_eq(held.m, 0);
            cr_assert_float_eq(held.f, f, 1e-12);
            cr_assert_eq(hr.n_zeros, 1, "f %g h %g: %zu zeros", f, h, hr.n_zeros);
            cr_assert_eq(hr.zeros[0].im, 0.0);
            double g0 = b * (1 - exp(-a * (1 - f) * h)) / a, g1 = b * exp(-a * (1 - f) * h) * (1 - exp(-a * f * h)) / a;
            double closed = -g1 / g0;
            cr_assert_leq(fabs(hr.zeros[0].re - closed), 1e-10 * fabs(closed), "f %g h %g: %.15g vs %.15g", f, h,
                          hr.zeros[0].re, closed);
            cr_assert_float_eq(hr.gain, g0, 1e-10 * g0);
            double lim = -f / (1 - f), err = fabs(hr.zeros[0].re - lim) / fabs(lim);
            cr_assert_lt(err, prev, "f %g: not approaching -f/(1-f) as h shrinks", f);
            prev = err;
        }
        cr_assert_leq(prev, 1e-3, "f %g: %g from -f/(1-f) at h = 3.7e-4", f, prev);
    }
}

/* e^{M t} of an upper-triangular 2 x 2 [[a, c], [0, d]]: diagonal e^{a t}, e^{d t},
 * corner c (e^{a t} - e^{d t}) / (a - d) (Moler & Van Loan, SIAM Review 45(1), 2003,
 * sec. 2, from memory); and a rotation [[0, w], [-w, 0]] t -> [[cos, sin], [-sin, cos]].
 * Norms from 0.01 to 400 (squaring from none to many). 1e-12 relative. */
Test(discrete, expm_closed_forms)
{
    double out[4];
    ps_diag d = {0};
    const double ts[4] = {0.0107, 0.83, 6.1, 41.7};
    for (int k = 0; k < 4; k++) {
        double t = ts[k], a = -2.385, c = 4.71, dd = -0.913;
        double M[4] = {a, c, 0, dd};
        cr_assert_eq(ps_discrete_expm(dws, M, 2, t, out, &d), PS_OK, "%s", d.text);
        double ea = exp(a * t), ed = exp(dd * t), corner = c * (ea - ed) / (a - dd);
        cr_assert_leq(fabs(out[0] - ea), 1e-12 * ea, "t %g", t);
        cr_assert_leq(fabs(out[3] - ed), 1e-12 * ed, "t %g", t);
        cr_assert_leq(fabs(out[1] - corner), 1e-12 * fabs(corner), "t %g: %.17g vs %.17g", t, out[1], corner);
        cr_assert_leq(fabs(out[2]), 0.0);
        double w = 9.47, R[4] = {0, w, -w, 0};
        cr_assert_eq(ps_discrete_expm(dws, R, 2, t, out, &d), PS_OK, "%s", d.text);
        double co = cos(w * t), si = sin(w * t);
        double tol = 1e-12 * fmax(1.0, w * t);
        cr_assert_leq(fabs(out[0] - co), tol, "t %g", t);
        cr_assert_leq(fabs(out[1] - si), tol, "t %g", t);
        cr_assert_leq(fabs(out[2] + si), tol, "t %g", t);
        cr_assert_leq(fabs(out[3] - co), tol, "t %g", t);
    }
}

/* A delay of 7 samples given in seconds (0.7 s at 0.1 s) is 7 whole samples, not
 * 6.999999999999999 (6 and an extra state with f near 1): 0.7 / 0.1 rounds below 7. */
Test(discrete, whole_delay_from_seconds_snaps)
{
    double den[2] = {1.0, 0.71}, num[1] = {2.385};
    poly_plant(num, 1, den, 2);
    cr_assert_lt(0.7 / 0.1, 7.0, "the premise: the quotient rounds below 7");
    hold(0.1, 0.7);
    cr_assert_eq(held.m, 7);
    cr_assert_eq(held.f, 0.0);
    cr_assert_eq(held.ss.a_rows, 8);
    cr_assert_eq(hr.rel_degree, 8);
}

Test(discrete, bad_period_delay_and_order_are_input_errors)
{
    double den[3] = {1.0, 0.71, 2.9}, num[1] = {2.385};
    poly_plant(num, 1, den, 3);
    ps_diag d = {0};
    cr_assert_eq(ps_discrete_hold(dws, &plant, 0.0, 0.0, &held, &d), PS_ERR_INPUT);
    cr_assert(strstr(d.text, "sample period"), "%s", d.text);
    cr_assert_eq(ps_discrete_hold(dws, &plant, NAN, 0.0, &held, &d), PS_ERR_INPUT);
    cr_assert_eq(ps_discrete_hold(dws, &plant, 0.01, -0.003, &held, &d), PS_ERR_INPUT);
    cr_assert(strstr(d.text, "delay"), "%s", d.text);
    /* order 2 + 62 whole samples = 64 fits; + a fraction does not */
    cr_assert_eq(ps_discrete_hold(dws, &plant, 0.01, 0.62, &held, &d), PS_OK, "%s", d.text);
    cr_assert_eq(held.ss.a_rows, 64);
    cr_assert_eq(ps_discrete_hold(dws, &plant, 0.01, 0.6237, &held, &d), PS_ERR_INPUT);
    cr_assert(strstr(d.text, "order"), "%s", d.text);
}

/* Whole samples on top of the fraction add poles at z = 0 and relative degree,
 * no finite zeros: b/(s + a) with theta = (2 + 0.37) h has, by the derivation
 * above with u[k] replaced by u[k-2], H(z) = (g0 z + g1) / (z^3 (z - e^{-a h})):
 * one zero -g1/g0, poles e^{-a h} and 0 (three times), relative degree 3. */
Test(discrete, whole_samples_add_poles_at_the_origin)
{
    const double a = 1.73, b = 2.385, f = 0.37, h = 0.0913;
    double poles[1] = {-a};
    factored_plant(b, NULL, 0, poles, 1);
    hold(h, (2 + f) * h);
    cr_assert_eq(held.m, 2);
    cr_assert_eq(held.ss.a_rows, 4);
    cr_assert_eq(hr.rel_degree, 3);
    cr_assert_eq(hr.n_zeros, 1);
    double g0 = b * (1 - exp(-a * (1 - f) * h)) / a, g1 = b * exp(-a * (1 - f) * h) * (1 - exp(-a * f * h)) / a;
    cr_assert_leq(fabs(hr.zeros[0].re + g1 / g0), 1e-10 * g1 / g0, "%.15g vs %.15g", hr.zeros[0].re, -g1 / g0);
    cr_assert_float_eq(hr.gain, g0, 1e-10 * g0);
    cr_assert_eq(hr.n_poles, 4);
    cr_assert_float_eq(hr.poles[0].re, exp(-a * h), 1e-14);
    for (size_t i = 1; i < 4; i++)
        cr_assert_eq(hr.poles[i].re, 0.0);
}

/* A factored plant with a complex pair is expanded before it is realised: its
 * held transfer function must equal that of the same plant given as
 * polynomials (the route checked against scipy above), 1e-10 relative at two
 * points, with a fractional delay. 3.29 (s + 0.83) / ((s^2 + 0.82 s + 0.41^2 + 2.17^2)(s - 1.13)). */
Test(discrete, factored_pair_matches_polynomial_form)
{
    const double h = 0.0613, theta = 1.46 * h, re = -0.41, im = 2.17;
    ps_plant_reset(&plant);
    snprintf(plant.id, sizeof plant.id, "f");
    plant.zeros[0] = (ps_cplx){-0.83, 0.0};
    plant.poles[0] = (ps_cplx){re, im};
    plant.poles[1] = (ps_cplx){re, -im};
    plant.poles[2] = (ps_cplx){1.13, 0.0};
    plant.n_zeros = 1;
    plant.n_poles = 3;
    plant.gain = 3.29;
    plant.present = (1u << PS_F_ID) | (1u << PS_F_POLES) | (1u << PS_F_GAIN) | (1u << PS_F_ZEROS);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&plant, &d), PS_OK, "%s", d.text);
    hold(h, theta);
    const double complex pts[2] = {ps_complex_make(1.37, 0.42), ps_complex_make(-0.83, 1.19)};
    double complex hf[2] = {held_tf(pts[0]), held_tf(pts[1])};
    double k2 = re * re + im * im, num[2] = {3.29, 3.29 * 0.83};
    double den[4] = {1.0, -2 * re - 1.13, k2 + 2 * re * 1.13, -1.13 * k2};
    poly_plant(num, 2, den, 4);
    hold(h, theta);
    for (int i = 0; i < 2; i++) {
        double rel = cabs(held_tf(pts[i]) - hf[i]) / cabs(hf[i]);
        cr_assert_leq(rel, 1e-10, "point %d: %g relative", i, rel);
    }
}

/* A state-space plant is held in its own basis: a scaled chain of three
 * integrators (x1' = 0.7 x2, x2' = 1.9 x3, x3' = 1.3 u, y = 1.1 x1) has the held
 * zeros of 1/s^3, -2 -+ sqrt 3 (Astrom, Hagander & Sternby, Automatica 20(1), 1984),
 * and gain C Gamma = 1.1 * 0.7 * 1.9 * 1.3 h^3 / 6 (the h^3/6 of the triple integral). */
Test(discrete, state_space_plant_held_in_its_basis)
{
    ps_plant_reset(&plant);
    snprintf(plant.id, sizeof plant.id, "ss");
    memset(plant.a, 0, 9 * sizeof *plant.a);
    plant.a[1] = 0.7;
    plant.a[5] = 1.9;
    plant.b[0] = plant.b[1] = 0.0;
    plant.b[2] = 1.3;
    plant.c[0] = 1.1;
    plant.c[1] = plant.c[2] = 0.0;
    plant.d = 0.0;
    plant.a_rows = plant.a_cols = plant.n_b = plant.n_c = 3;
    plant.present = (1u << PS_F_ID) | (1u << PS_F_A) | (1u << PS_F_B) | (1u << PS_F_C);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&plant, &d), PS_OK, "%s", d.text);
    const double h = 0.173;
    hold(h, 0.0);
    cr_assert_eq(hr.n_zeros, 2);
    cr_assert_leq(zero_dist(-2 - sqrt(3.0), 0), 1e-8 * (2 + sqrt(3.0)));
    cr_assert_leq(zero_dist(-2 + sqrt(3.0), 0), 1e-8 * (2 - sqrt(3.0)));
    double g = 1.1 * 0.7 * 1.9 * 1.3 * h * h * h / 6;
    cr_assert_float_eq(hr.gain, g, 1e-12 * g);
}
