/* xcheck_lapack.c - state-space poles from plantsieve (GSL) against LAPACK's
 * dgeev as an independent eigen-solver, on seeded random matrices. Its own
 * executable: lapacke.h pulls in complex.h, and libblas/gslcblas clash. */
#include <criterion/criterion.h>
#include <lapacke.h>
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <string.h>

#include "model/plant.h"
#include "roots/roots.h"
#include "support.h"

TestSuite(xcheck, .init = ps_test_init);

static unsigned long long lcg = 88172645463325252ull;
static double urand(void) /* xorshift64, uniform in [-1, 1) */
{
    lcg ^= lcg << 13;
    lcg ^= lcg >> 7;
    lcg ^= lcg << 17;
    return (double)(lcg >> 11) / 4503599627370496.0 - 1.0;
}

Test(xcheck, eigenvalues_match_lapack_dgeev)
{
    static ps_plant p;
    static ps_analysis an;
    ps_roots_ws *ws = ps_roots_ws_new();
    double worst = 0;
    for (int trial = 0; trial < 200; trial++) {
        size_t n = 2 + (size_t)trial % 19;
        ps_plant_reset(&p);
        snprintf(p.id, sizeof p.id, "x%d", trial);
        for (size_t i = 0; i < n * n; i++)
            p.a[i] = 3.0 * urand();
        for (size_t i = 0; i < n; i++) {
            p.b[i] = urand();
            p.c[i] = urand();
        }
        p.a_rows = p.a_cols = p.n_b = p.n_c = n;
        p.present = (1u << PS_F_ID) | (1u << PS_F_A) | (1u << PS_F_B) | (1u << PS_F_C);
        ps_diag d = {0};
        cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
        cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s", d.text);
        double a[PS_MAX_ORDER * PS_MAX_ORDER], wr[PS_MAX_ORDER], wi[PS_MAX_ORDER];
        memcpy(a, p.a, n * n * sizeof *a);
        lapack_int info = LAPACKE_dgeev(LAPACK_ROW_MAJOR, 'N', 'N', (lapack_int)n, a, (lapack_int)n, wr,
                                        wi, NULL, 1, NULL, 1);
        cr_assert_eq(info, 0);
        cr_assert_eq(an.n_poles, n);
        /* Each LAPACK eigenvalue has a plantsieve pole within 1e-9 (relative
         * to max(1, |lambda|)); random dense matrices have simple eigenvalues. */
        for (size_t i = 0; i < n; i++) {
            double best = INFINITY;
            for (size_t k = 0; k < n; k++)
                best = fmin(best, hypot(an.poles[k].v.re - wr[i], an.poles[k].v.im - wi[i]));
            double rel = best / fmax(1.0, hypot(wr[i], wi[i]));
            worst = fmax(worst, rel);
            cr_assert_leq(rel, 1e-9, "trial %d n %zu eigenvalue %zu off by %g", trial, n, i, rel);
        }
    }
    cr_log_info("LAPACK dgeev cross-check: 200 matrices, worst relative distance %.2e", worst);
    ps_roots_ws_free(ws);
}

/* State-space zeros against LAPACK's dggev (balanced QZ) on the Rosenbrock
 * pencil [A B; C D] - s [I 0; 0 0]. The four plants are cascades of second-
 * and first-order sections with relative degree 3 to 6, from
 * tests/bench/gen_catalog.py --ss-stress --seed 3 (ids b56, b162, b364,
 * b2207), and b329 (order 8, relative degree 8: c a^7 b = 1783 is far
 * above rounding, yet below the old threshold 1e-12 |c| |b| |a|_F^7 = 2147,
 * which rejected the plant as identically zero). On the first four GSL's unbalanced QZ returned some eigenvalues at infinity as
 * finite (|z| up to 1.5e13); the count law (n - r finite zeros, r the
 * relative degree) must hold, every LAPACK zero must be found, and a hidden
 * unstable mode is flagged only where an unstable pole is a LAPACK zero. */
typedef struct ss_case {
    const char *id;
    size_t n;
    double a[64], b[8], c[8];
    bool spurious; /* GSL's QZ returns eigenvalues at infinity as finite */
} ss_case;

static const ss_case ss_cases[] = {
    {"b56", 7,
     {0, 13.7478221988, 0, 0, 0, 0, 0, -13.7478221988, -6.62506590224, 0, 0, 0, 0, 0, 0, 0, 0, 11.2279200311, 0,
      0, 0, 0.00406261259951, 3.81053054396, -11.2279200311, -23.1710993113, 0, 0, 0, 0, 0, 0, 0, 0,
      20.8687918472, 0, 0, 0, 0.382867626115, 0, -20.8687918472, -41.7392210653, 0, 0, 0, 0, 0, 0.711617536664,
      0, -4.47856801534},
     {0, 0.5, 0, 0.0169020471998, 0, 0, 0},
     {0, 0, 0, 0, 0, 0, 0.305434791069},
     true},
    {"b162", 3,
     {0, 0.580191271005, 0, -0.580191271005, -0.058564585045, 0, 0.519772667427, 0, -35.3417133161},
     {0, 1, 0},
     {0, 0, 1.97883628208},
     true},
    {"b364", 7,
     {0, 6.07017084421, 0, 0, 0, 0, 0, -6.07017084421, -2.91237417728, 0, 0, 0, 0, 0, 0, 0, 0, 3.41475786599, 0,
      0, 0, 3.47044736328, 1.31286223897, -0.853689466498, -2.13655535586, 0, 0, 0, 0, 0, 0, 0, 0,
      33.6727961099, 0, 0, 0, 2.00638555524, 0.0360007003006, -33.6727961099, -142.311267593, 0, 0, 0, 0, 0,
      19.7848908681, 0, -8.53959127001},
     {0, 4, 0, 0.0633660893741, 0, 0, 0},
     {0, 0, 0, 0, 0, 0, 5.01754831359},
     true},
    {"b2207", 6,
     {0, 135.015402251, 0, 0, 0, 0, -135.015402251, -336.510875418, 0, 0, 0, 0, 0, 0, 0, 14.8166295076, 0, 0,
      0.358065596178, 0, -14.8166295076, -57.1670381567, 0, 0, 0, 0, 0, 0, 0, 3.20153725626, 0, 0,
      0.0392942226555, 0, 3.20153725626, 3.76561211756},
     {0, 0.125, 0, 0, 0, 0},
     {0, 0, 0, 0, 0.0679247153872, 0},
     true},
    {"b329", 8,
     {0, 57.8028401029, 0, 0, 0, 0, 0, 0, -57.8028401029, -59.3983880084, 0, 0, 0, 0, 0, 0, 0, 0, 0, 83.4843503927,
      0, 0, 0, 0, 0.887278581849, 0, -83.4843503927, -89.962959533, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1.99295154878, 0, 0,
      0, 0, 1.28149198017, 0, -1.99295154878, -1.71690841687, 0, 0, 0, 0, 0, 0, 0, 0, 0, 18.631588476, 0, 0, 0, 0,
      0.0305919781926, 0, -18.631588476, -37.3339317299},
     {0, 0.5, 0, 0, 0, 0, 0, 0},
     {0, 0, 0, 0, 0, 0, 0.571992980661, 0},
     false},
};

Test(xcheck, state_space_zeros_match_lapack_dggev)
{
    static ps_plant p;
    static ps_analysis an;
    ps_roots_ws *ws = ps_roots_ws_new();
    for (size_t k = 0; k < sizeof ss_cases / sizeof ss_cases[0]; k++) {
        const ss_case *sc = &ss_cases[k];
        size_t n = sc->n, N = n + 1;
        ps_plant_reset(&p);
        snprintf(p.id, sizeof p.id, "%s", sc->id);
        memcpy(p.a, sc->a, n * n * sizeof *p.a);
        memcpy(p.b, sc->b, n * sizeof *p.b);
        memcpy(p.c, sc->c, n * sizeof *p.c);
        p.a_rows = p.a_cols = p.n_b = p.n_c = n;
        p.present = (1u << PS_F_ID) | (1u << PS_F_A) | (1u << PS_F_B) | (1u << PS_F_C);
        ps_diag d = {0};
        cr_assert_eq(ps_plant_check(&p, &d), PS_OK, "%s", d.text);
        cr_assert_eq(ps_roots_analyse(ws, &p, &an, &d), PS_OK, "%s: %s", sc->id, d.text);

        double m[81], e[81], ar[9], ai[9], be[9];
        for (size_t i = 0; i < N; i++)
            for (size_t j = 0; j < N; j++) {
                m[i * N + j] = i < n && j < n ? sc->a[i * n + j] : i < n ? sc->b[i] : j < n ? sc->c[j] : 0.0;
                e[i * N + j] = i == j && i < n ? 1.0 : 0.0;
            }
        lapack_int info = LAPACKE_dggev(LAPACK_ROW_MAJOR, 'N', 'N', (lapack_int)N, m, (lapack_int)N, e,
                                        (lapack_int)N, ar, ai, be, NULL, 1, NULL, 1);
        cr_assert_eq(info, 0);
        size_t finite = 0;
        bool hidden = false; /* an unstable pole that is also a zero of the pencil */
        for (size_t i = 0; i < N; i++) {
            if (be[i] == 0.0 || hypot(ar[i], ai[i]) > 1e10 * fabs(be[i]))
                continue;
            finite++;
            double zr = ar[i] / be[i], zi = ai[i] / be[i], best = INFINITY;
            for (size_t q = 0; q < an.n_poles; q++)
                hidden |= an.poles[q].v.re > 0 &&
                          hypot(an.poles[q].v.re - zr, an.poles[q].v.im - zi) <= 1e-6 * fmax(1.0, hypot(zr, zi));
            for (size_t q = 0; q < an.n_zeros; q++)
                best = fmin(best, hypot(an.zeros[q].v.re - zr, an.zeros[q].v.im - zi));
            cr_assert_leq(best / fmax(1.0, hypot(zr, zi)), 1e-6, "%s: LAPACK zero %g%+gj not found", sc->id, zr,
                          zi);
        }
        cr_assert_eq(an.n_zeros, finite, "%s: %zu zeros, LAPACK dggev %zu", sc->id, an.n_zeros, finite);
        cr_assert_eq(an.n_zeros, n - (size_t)an.rel_degree, "%s: count law", sc->id);
        /* PBH on a badly scaled realisation flagged b2207 (minimal: r = n,
         * so the numerator is a constant) as hiding its unstable pole. */
        cr_assert_eq(an.hidden_unstable, hidden, "%s: hidden unstable mode %d, LAPACK zeros say %d", sc->id,
                     an.hidden_unstable, hidden);
        bool told = false;
        for (size_t w = 0; w < p.n_warn; w++)
            told |= strstr(p.warn[w], "taken as infinite") != NULL;
        cr_assert_eq(told, sc->spurious, "%s: a warning tells the dropped eigenvalues", sc->id);
    }
    ps_roots_ws_free(ws);
}
