/* xcheck_lapack.c - state-space poles from plantsieve (GSL) against LAPACK's
 * dgeev as an independent eigen-solver, on seeded random matrices. Its own
 * executable: lapacke.h pulls in complex.h, and libblas/gslcblas clash. */
#include <criterion/criterion.h>
#include <lapacke.h>
#include <math.h>
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
