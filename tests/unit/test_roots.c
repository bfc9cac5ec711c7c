/* test_roots.c - roots, classification, state-space poles/zeros and hidden
 * modes, checked against exact factors, numpy.roots and the PBH definition. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "model/plant.h"
#include "roots/roots.h"
#include "support.h"

static ps_roots_ws *ws;
static void setup(void)
{
    ps_test_init();
    ws = ps_roots_ws_new();
    cr_assert_not_null(ws);
}
static void teardown(void) { ps_roots_ws_free(ws); }
TestSuite(roots, .init = setup, .fini = teardown);

/* Multiply the descending polynomial c (length *n) by (s - r) in place. */
static void mul_root(double *c, size_t *n, double r)
{
    c[*n] = 0;
    for (size_t i = *n; i > 0; i--)
        c[i] -= r * c[i - 1];
    (*n)++;
}
/* ... by (s^2 - 2 re s + re^2 + im^2). */
static void mul_pair(double *c, size_t *n, double re, double im)
{
    double b = -2 * re, k = re * re + im * im;
    c[*n] = c[*n + 1] = 0;
    for (size_t i = *n + 1; i > 1; i--)
        c[i] += b * c[i - 1] + k * c[i - 2];
    c[1] += b * c[0];
    *n += 2;
}

/* Is (re, im) among the roots within tol (relative to max(1,|z|))? */
static bool has_root(const ps_root *r, size_t n, double re, double im, double tol)
{
    for (size_t i = 0; i < n; i++)
        if (hypot(r[i].v.re - re, r[i].v.im - im) <= tol * fmax(1.0, hypot(re, im)))
            return true;
    return false;
}

Test(roots, product_of_known_factors)
{
    /* (s + 1.25)(s - 2.385)(s^2 + 0.6 s + 9.61) : roots -1.25, 2.385, -0.3 +- 3.085j */
    double c[8] = {1.0};
    size_t n = 1;
    mul_root(c, &n, -1.25);
    mul_root(c, &n, 2.385);
    mul_pair(c, &n, -0.3, sqrt(9.61 - 0.09));
    ps_root r[8];
    ps_diag d = {0};
    cr_assert_eq(ps_roots_poly(ws, c, n, r, &d), 4);
    cr_assert(has_root(r, 4, -1.25, 0, 1e-12));
    cr_assert(has_root(r, 4, 2.385, 0, 1e-12));
    cr_assert(has_root(r, 4, -0.3, sqrt(9.52), 1e-12));
    cr_assert(has_root(r, 4, -0.3, -sqrt(9.52), 1e-12));
    for (int i = 0; i < 4; i++) {
        ps_region want = r[i].v.re > 0 ? PS_RHP : PS_LHP;
        cr_assert_eq(r[i].region, want, "root %d", i);
        cr_assert_eq(r[i].mult, 1u);
    }
}

Test(roots, repeated_root_is_clustered_and_accurate)
{
    /* (s + 1.7)^4: members scatter by ~eps^(1/4); the cluster mean is accurate. */
    double c[8] = {1.0};
    size_t n = 1;
    for (int i = 0; i < 4; i++)
        mul_root(c, &n, -1.7);
    ps_root r[8];
    cr_assert_eq(ps_roots_poly(ws, c, n, r, NULL), 4);
    for (int i = 0; i < 4; i++) {
        cr_assert_eq(r[i].mult, 4u);
        cr_assert_float_eq(r[i].v.re, -1.7, 1e-9, "mean %.17g", r[i].v.re);
        cr_assert_float_eq(r[i].v.im, 0.0, 1e-12);
        cr_assert_eq(r[i].region, PS_LHP);
    }
}

Test(roots, axis_roots_never_flip_into_rhp)
{
    /* s (s^2 + 1)^2 (s^2 + 4): integrator, a double undamped pair, and a simple one. */
    double c[10] = {1.0};
    size_t n = 1;
    mul_root(c, &n, 0.0);
    mul_pair(c, &n, 0.0, 1.0);
    mul_pair(c, &n, 0.0, 1.0);
    mul_pair(c, &n, 0.0, 2.0);
    ps_root r[10];
    cr_assert_eq(ps_roots_poly(ws, c, n, r, NULL), 7);
    for (int i = 0; i < 7; i++)
        cr_assert_eq(r[i].region, PS_AXIS, "root %d = %g%+gj tol %g", i, r[i].v.re, r[i].v.im, r[i].tol);
    /* A pair whose real part is 1e-16: s^2 - 2e-16 s + 1 */
    double q[3] = {1.0, -2e-16, 1.0};
    cr_assert_eq(ps_roots_poly(ws, q, 3, r, NULL), 2);
    cr_assert_eq(r[0].region, PS_AXIS);
    cr_assert_eq(r[1].region, PS_AXIS);
    /* A genuinely unstable pair just off the axis, 1e-6: must be RHP. */
    double u[3] = {1.0, -2e-6, 1.0 + 1e-12};
    cr_assert_eq(ps_roots_poly(ws, u, 3, r, NULL), 2);
    cr_assert_eq(r[0].region, PS_RHP);
}

Test(roots, coefficient_scales_1e_minus8_to_1e8)
{
    const double scales[] = {1e-8, 1e-4, 1.0, 1e4, 1e8};
    for (size_t k = 0; k < 5; k++) {
        /* scale * (s + 3.7e-3)(s - 41.3)(s + 2.9e3) */
        double c[6] = {scales[k]};
        size_t n = 1;
        mul_root(c, &n, -3.7e-3);
        mul_root(c, &n, 41.3);
        mul_root(c, &n, -2.9e3);
        ps_root r[6];
        cr_assert_eq(ps_roots_poly(ws, c, n, r, NULL), 3);
        cr_assert(has_root(r, 3, -3.7e-3, 0, 1e-9), "scale %g", scales[k]);
        cr_assert(has_root(r, 3, 41.3, 0, 1e-12), "scale %g", scales[k]);
        cr_assert(has_root(r, 3, -2.9e3, 0, 1e-12), "scale %g", scales[k]);
    }
}

/* numpy.roots as the oracle on seeded random polynomials of orders 2..20.
 * Tolerance: 1e-8 relative to max(1, |root|) after matching each numpy root
 * to its nearest plantsieve root (roots are well separated by construction). */
Test(roots, numpy_oracle_orders_2_to_20)
{
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "'%s' '%s/tests/oracle/np_roots.py' 60", PS_ORACLE_PYTHON, PS_SOURCE_DIR);
    FILE *f = popen(cmd, "r");
    cr_assert_not_null(f, "cannot run the numpy oracle");
    char line[16384];
    int cases = 0;
    double worst = 0;
    while (fgets(line, sizeof line, f)) {
        char *s = line, *e;
        long deg = strtol(s, &e, 10);
        double c[24], ref[48];
        for (long i = 0; i <= deg; i++)
            c[i] = strtod(e, &e);
        e = strchr(e, '|') + 1;
        for (long i = 0; i < 2 * deg; i++)
            ref[i] = strtod(e, &e);
        ps_root r[24];
        cr_assert_eq(ps_roots_poly(ws, c, (size_t)deg + 1, r, NULL), deg);
        for (long i = 0; i < deg; i++) {
            double best = INFINITY;
            for (long k = 0; k < deg; k++)
                best = fmin(best, hypot(r[k].v.re - ref[2 * i], r[k].v.im - ref[2 * i + 1]));
            double rel = best / fmax(1.0, hypot(ref[2 * i], ref[2 * i + 1]));
            worst = fmax(worst, rel);
            cr_assert_leq(rel, 1e-8, "degree %ld root %ld: %g off", deg, i, rel);
        }
        cases++;
    }
    int status = pclose(f);
    cr_assert_eq(status, 0, "numpy oracle exited with %d (is python3-numpy installed?)", status);
    cr_assert_eq(cases, 60, "oracle gave %d cases", cases);
    cr_log_info("numpy oracle: %d polynomials, worst relative root distance %.2e", cases, worst);
}

/* Controllable canonical realisation of num/den (descending, den monic after scaling). */
static void companion(ps_plant *p, const double *num, size_t nn, const double *den, size_t nd)
{
    size_t n = nd - 1;
    ps_plant_reset(p);
    snprintf(p->id, sizeof p->id, "ss");
    memset(p->a, 0, sizeof p->a);
    for (size_t i = 0; i + 1 < n; i++)
        p->a[i * n + i + 1] = 1.0;
    for (size_t j = 0; j < n; j++)
        p->a[(n - 1) * n + j] = -den[n - j] / den[0];
    for (size_t i = 0; i < n; i++)
        p->b[i] = i == n - 1 ? 1.0 : 0.0;
    double numpad[PS_MAX_ORDER + 1] = {0};
    if (nn > nd || nd > PS_MAX_ORDER + 1)
        return;
    memcpy(numpad + (nd - nn), num, nn * sizeof *num);
    p->d = numpad[0] / den[0];
    for (size_t j = 0; j < n; j++)
        p->c[j] = numpad[n - j] / den[0] - p->d * den[n - j] / den[0];
    p->a_rows = p->a_cols = p->n_b = p->n_c = n;
    p->present = (1u << PS_F_ID) | (1u << PS_F_A) | (1u << PS_F_B) | (1u << PS_F_C);
}

Test(roots, state_space_matches_polynomial_form)
{
    /* G = -3.1 (s - 2.7)(s + 0.45) / ((s - 1.9)(s + 4.2)(s^2 + 1.3 s + 6.8)) */
    double num[4] = {-3.1}, den[6] = {1.0};
    size_t nn = 1, nd = 1;
    mul_root(num, &nn, 2.7);
    mul_root(num, &nn, -0.45);
    mul_root(den, &nd, 1.9);
    mul_root(den, &nd, -4.2);
    mul_pair(den, &nd, -0.65, sqrt(6.8 - 0.4225));
    static ps_plant ss, poly;
    companion(&ss, num, nn, den, nd);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&ss, &d), PS_OK, "%s", d.text);
    ps_plant_reset(&poly);
    snprintf(poly.id, sizeof poly.id, "poly");
    memcpy(poly.num, num, sizeof num);
    memcpy(poly.den, den, sizeof den);
    poly.n_num = nn;
    poly.n_den = nd;
    poly.present = (1u << PS_F_ID) | (1u << PS_F_NUM) | (1u << PS_F_DEN);
    cr_assert_eq(ps_plant_check(&poly, &d), PS_OK, "%s", d.text);

    static ps_analysis a1, a2;
    cr_assert_eq(ps_roots_analyse(ws, &ss, &a1, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &poly, &a2, &d), PS_OK, "%s", d.text);
    cr_assert_eq(a1.n_poles, 4);
    cr_assert_eq(a1.n_zeros, 2);
    cr_assert_eq(a1.rel_degree, 2);
    cr_assert_eq(a2.rel_degree, 2);
    cr_assert_float_eq(a1.gain, -3.1, 1e-12);
    cr_assert_float_eq(a2.gain, -3.1, 1e-12);
    for (size_t i = 0; i < a2.n_poles; i++)
        cr_assert(has_root(a1.poles, a1.n_poles, a2.poles[i].v.re, a2.poles[i].v.im, 1e-10));
    for (size_t i = 0; i < a2.n_zeros; i++)
        cr_assert(has_root(a1.zeros, a1.n_zeros, a2.zeros[i].v.re, a2.zeros[i].v.im, 1e-10));
    cr_assert_eq(a1.n_rhp_poles, 1);
    cr_assert_eq(a1.n_rhp_zeros, 1);
    cr_assert_not(a1.hidden_unstable);
    cr_assert(has_root(a1.zeros, 2, 2.7, 0, 1e-10));
}

static void diag2(ps_plant *p, double l1, double l2, const double b[2], const double c[2])
{
    ps_plant_reset(p);
    snprintf(p->id, sizeof p->id, "pbh");
    double a[4] = {l1, 0.0, 0.0, l2};
    memcpy(p->a, a, sizeof a);
    memcpy(p->b, b, 2 * sizeof *b);
    memcpy(p->c, c, 2 * sizeof *c);
    p->a_rows = p->a_cols = p->n_b = p->n_c = 2;
    p->present = (1u << PS_F_ID) | (1u << PS_F_A) | (1u << PS_F_B) | (1u << PS_F_C);
}

Test(roots, pbh_finds_uncontrollable_and_unobservable_unstable_modes)
{
    static ps_plant p;
    static ps_analysis an;
    ps_diag d = {0};
    /* Unstable state 2.3 not driven by the input. */
    diag2(&p, 2.3, -1.1, (double[]){0.0, 1.0}, (double[]){1.0, 1.0});
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert(an.hidden_unstable);
    cr_assert(strstr(p.warn[0], "uncontrollable") != NULL, "%s", p.warn[0]);
    /* Unstable state 2.3 not seen by the output. */
    diag2(&p, 2.3, -1.1, (double[]){1.0, 1.0}, (double[]){0.0, 1.0});
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert(an.hidden_unstable);
    cr_assert(strstr(p.warn[0], "unobservable") != NULL, "%s", p.warn[0]);
    /* Same plant fully coupled: nothing hidden. */
    diag2(&p, 2.3, -1.1, (double[]){1.0, 1.0}, (double[]){1.0, 1.0});
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_not(an.hidden_unstable);
    cr_assert_eq(p.n_warn, 0, "%s", p.warn[0]);
    /* A stable uncontrollable mode is not a hidden UNSTABLE mode. */
    diag2(&p, -2.3, 1.1, (double[]){0.0, 1.0}, (double[]){1.0, 1.0});
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_not(an.hidden_unstable);
}

static void factored(ps_plant *p, const ps_cplx *z, size_t nz, const ps_cplx *q, size_t nq)
{
    ps_plant_reset(p);
    snprintf(p->id, sizeof p->id, "fac");
    memcpy(p->zeros, z, nz * sizeof *z);
    memcpy(p->poles, q, nq * sizeof *q);
    p->n_zeros = nz;
    p->n_poles = nq;
    p->gain = 2.2;
    p->present = (1u << PS_F_ID) | (1u << PS_F_ZEROS) | (1u << PS_F_POLES) | (1u << PS_F_GAIN);
}

Test(roots, shared_rhp_root_is_a_hidden_mode_and_close_one_is_reported)
{
    static ps_plant p;
    static ps_analysis an;
    ps_diag d = {0};
    factored(&p, (ps_cplx[]){{3.3, 0}}, 1, (ps_cplx[]){{3.3, 0}, {-1, 0}}, 2);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK);
    cr_assert(an.hidden_unstable);
    /* z = p (1 + 0.05): near cancellation, bound |z+p|/|z-p| = 6.415/0.165 = 41 */
    factored(&p, (ps_cplx[]){{3.465, 0}}, 1, (ps_cplx[]){{3.3, 0}, {-1, 0}}, 2);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK);
    cr_assert_not(an.hidden_unstable);
    cr_assert_eq(p.n_warn, 1);
    cr_assert(strstr(p.warn[0], "near cancellation") != NULL, "%s", p.warn[0]);
    cr_assert(strstr(p.warn[0], "= 41") != NULL, "%s", p.warn[0]);
}

Test(roots, relative_degree_from_markov_parameters)
{
    /* Triple integrator chain with c picking the first state: G = 1.9/s^3. */
    static ps_plant p;
    static ps_analysis an;
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "chain");
    memset(p.a, 0, sizeof p.a);
    p.a[0 * 3 + 1] = 1.0;
    p.a[1 * 3 + 2] = 1.0;
    p.b[0] = p.b[1] = 0.0;
    p.b[2] = 1.9;
    p.c[0] = 1.0;
    p.c[1] = p.c[2] = 0.0;
    p.a_rows = p.a_cols = p.n_b = p.n_c = 3;
    p.present = (1u << PS_F_ID) | (1u << PS_F_A) | (1u << PS_F_B) | (1u << PS_F_C);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_eq(an.rel_degree, 3);
    cr_assert_float_eq(an.gain, 1.9, 1e-14);
    cr_assert_eq(an.n_zeros, 0);
    cr_assert_eq(an.n_axis_poles, 3);
    /* c = 0: identically zero, an input error, not a crash. */
    p.c[0] = 0.0;
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_ERR_INPUT);
    cr_assert(strstr(d.text, "identically zero") != NULL, "%s", d.text);
}

/* ---- plants in z: classified against the unit circle ------------------------ */

static void make_z(ps_plant *p, double h)
{
    p->in_z = true;
    p->sample_period = h;
    p->present |= (1u << PS_F_DOMAIN) | (1u << PS_F_SAMPLE_RATE);
}

Test(roots, z_polynomial_outside_inside_the_circle)
{
    static ps_plant p;
    static ps_analysis an;
    ps_diag d = {0};
    /* 0.4173 (z + 3.73) / ((z - 1.2)(z - 0.5)): pole 1.2 and zero -3.73 outside
     * the circle (unstable, non-minimum-phase), pole 0.5 inside; in s the
     * classes would be the other way round for 0.5 and -3.73. */
    ps_plant_reset(&p);
    snprintf(p.id, sizeof p.id, "zpoly");
    double num[2] = {0.4173, 0.4173 * 3.73}, den[3] = {1.0, -1.7, 0.6};
    memcpy(p.num, num, sizeof num);
    memcpy(p.den, den, sizeof den);
    p.n_num = 2;
    p.n_den = 3;
    p.present = (1u << PS_F_ID) | (1u << PS_F_NUM) | (1u << PS_F_DEN);
    make_z(&p, 0.001);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert(an.in_z);
    cr_assert_eq(an.delay, 0.0);
    cr_assert_eq(an.n_rhp_poles, 1);
    cr_assert_eq(an.n_rhp_zeros, 1);
    cr_assert_eq(an.n_axis_poles, 0);
    for (size_t i = 0; i < an.n_poles; i++)
        cr_assert_eq(an.poles[i].region, an.poles[i].v.re > 1 ? PS_RHP : PS_LHP, "pole %g", an.poles[i].v.re);
    cr_assert_eq(an.zeros[0].region, PS_RHP);
    cr_assert(an.zeros[0].tol >= 64 * 2.220446049250313e-16 * 3.73);
    cr_assert_not(an.hidden_unstable);
}

Test(roots, z_roots_on_the_circle_are_the_axis_class)
{
    static ps_plant p;
    static ps_analysis an;
    ps_diag d = {0};
    /* e^{+-0.7j} typed to 17 digits, an integrator at z = 1, and -0.3 */
    double c = cos(0.7), s = sin(0.7);
    factored(&p, (ps_cplx[]){{-0.62, 0}}, 1, (ps_cplx[]){{c, s}, {c, -s}, {1.0, 0}, {-0.3, 0}}, 4);
    make_z(&p, 0.002);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_eq(an.n_axis_poles, 3);
    cr_assert_eq(an.n_rhp_poles, 0);
    cr_assert_eq(an.n_rhp_zeros, 0);
    size_t axis = 0;
    for (size_t i = 0; i < an.n_poles; i++)
        axis += an.poles[i].region == PS_AXIS;
    cr_assert_eq(axis, 3);
    /* just outside the tolerance: 1 + 1e-9 is outside the circle */
    factored(&p, (ps_cplx[]){{0, 0}}, 0, (ps_cplx[]){{1.0 + 1e-9, 0}, {-0.3, 0}}, 2);
    make_z(&p, 0.002);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_eq(an.n_rhp_poles, 1);
    cr_assert_eq(an.n_axis_poles, 0);
}

Test(roots, z_state_space_hidden_modes_by_the_circle)
{
    static ps_plant p;
    static ps_analysis an;
    ps_diag d = {0};
    /* unreachable mode at 1.5: outside the circle, hidden and unstable */
    diag2(&p, 1.5, 0.35, (double[]){0.0, 1.0}, (double[]){1.0, 1.0});
    make_z(&p, 0.001);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert(an.hidden_unstable);
    cr_assert(strstr(p.warn[0], "outside the unit circle") != NULL, "%s", p.warn[0]);
    /* unreachable mode at -1.5: in the left half plane, but outside the circle */
    diag2(&p, -1.5, 0.35, (double[]){0.0, 1.0}, (double[]){1.0, 1.0});
    make_z(&p, 0.001);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert(an.hidden_unstable);
    cr_assert(strstr(p.warn[0], "uncontrollable") != NULL, "%s", p.warn[0]);
    cr_assert_eq(an.n_rhp_poles, 1);
    /* unobservable mode at 0.5: right half plane, but inside the circle: stable */
    diag2(&p, 0.5, -0.35, (double[]){1.0, 1.0}, (double[]){0.0, 1.0});
    make_z(&p, 0.001);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_not(an.hidden_unstable);
    cr_assert_eq(an.n_rhp_poles, 0);
}

Test(roots, z_shared_and_near_roots_by_the_circle)
{
    static ps_plant p;
    static ps_analysis an;
    ps_diag d = {0};
    /* a shared root at -1.5 (outside the circle) is a hidden unstable mode */
    factored(&p, (ps_cplx[]){{-1.5, 0}}, 1, (ps_cplx[]){{-1.5, 0}, {0.2, 0}}, 2);
    make_z(&p, 0.001);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert(an.hidden_unstable);
    cr_assert(strstr(p.warn[0], "outside the unit circle") != NULL, "%s", p.warn[0]);
    /* a shared root at 0.6 (inside) is not */
    factored(&p, (ps_cplx[]){{0.6, 0}}, 1, (ps_cplx[]){{0.6, 0}, {0.2, 0}}, 2);
    make_z(&p, 0.001);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_not(an.hidden_unstable);
    /* zero 1.26 within 5 % of pole 1.2: |1 - z p| / |z - p| = 0.512 / 0.06 = 8.533 */
    factored(&p, (ps_cplx[]){{1.26, 0}}, 1, (ps_cplx[]){{1.2, 0}, {0.2, 0}}, 2);
    make_z(&p, 0.001);
    cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
    cr_assert_eq(p.n_warn, 1);
    cr_assert(strstr(p.warn[0], "near cancellation") != NULL, "%s", p.warn[0]);
    cr_assert(strstr(p.warn[0], "= 8.533") != NULL, "%s", p.warn[0]);
}
