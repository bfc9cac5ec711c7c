/* test_laws_family.c - the laws checked numerically on a seeded random family of
 * unstable plants with pole-placement controllers (Bode, Poisson, peak and band floors). */
/*
 * Family: 1-2 RHP poles (real, two real, or a complex pair), 0-2 RHP zeros
 * (same kinds) kept at least a factor 1.6 away from every RHP pole in
 * magnitude, stable poles and zeros, plant relative degree 1, 2 or 3, with
 * and without an input delay. Plant P = B/A, deg A = n. Controller C = S/R
 * with deg R = deg S = n - 1 solves A R + B S = Acl for a random stable Acl of
 * degree 2n - 1 (Sylvester matrix, GSL LU). Closed-loop stability is then
 * confirmed independently: delay-free, from the roots of A R + B S as
 * actually computed; with a delay, by the Nyquist criterion on L(jw). Every
 * law is checked with the RHP poles and zeros of the LOOP L = P C, so the
 * controller's own RHP poles and zeros are counted.
 *
 * All polynomials in this file are ASCENDING (c[0] + c[1] s + ...), the GSL
 * convention of gsl_poly_complex_solve.
 */
#include <criterion/criterion.h>
#include <criterion/logging.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_permutation.h>
#include <gsl/gsl_poly.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_vector.h>
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* After the GSL headers (LIBRARIES.md 1g); no gsl_complex is used here. */
#include "core/complex_make.h"

#include "limits/floors.h"
#include "limits/limits.h"
#include "model/plant.h"
#include "roots/roots.h"
#include "support.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

enum { MAXN = 8, MAXL = 2 * MAXN, NOSC = 1500, NPTS = NOSC + 4 * MAXL + 64, QLIMIT = 2 * NPTS };

typedef struct loop {
    /* plant, factored: P(s) = kp prod(s - z_j) / prod(s - p_i); pairs stored as both members */
    size_t np, nz;
    double complex p[MAXN], z[MAXN];
    double kp;
    int rel;      /* plant relative degree; the controller is biproper, so also L's */
    double theta; /* input delay, s */
    double scale; /* plant frequency scale, rad/s */
    /* polynomials, ascending: A (n+1 coeffs, monic), B, R and S (n coeffs each) */
    size_t n;
    double a[MAXN + 1], b[MAXN + 1], r[MAXN], s[MAXN];
    double cg; /* extra controller gain (1 except in the Nyquist cross-check) */
    /* roots */
    size_t ncp, ncz, ncl;
    double complex cpole[MAXN], czero[MAXN], clroot[MAXL];
    /* open-loop RHP poles and zeros of L = P C (plant and controller) */
    size_t nlp, nlz;
    double complex lp[MAXL], lz[MAXL];
    size_t n_ctrl_rhp_poles, n_ctrl_rhp_zeros;
    double wc;   /* largest frequency where |L0(jw)| >= 1 (delay-free loop) */
    double wmax; /* largest root magnitude in the loop */
} loop;

typedef struct family_opts {
    int rel;           /* 0: random 1..3 */
    double p_delay;    /* probability of an input delay */
    int min_rhp_zeros; /* 0..2 */
} family_opts;

typedef struct family_stats {
    int drawn, kept, singular, unstable, near_axis, delay_unstable, ambiguous, huge_peak;
} family_stats;

static ps_roots_ws *rws;
static ps_limits_ws *lws;
static ps_plant plant; /* large: kept static */

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
TestSuite(laws_family, .init = setup, .fini = teardown);

/* ---------- random numbers and polynomials ---------- */

static double unif(gsl_rng *g, double lo, double hi) { return lo + (hi - lo) * gsl_rng_uniform(g); }
static double logunif(gsl_rng *g, double lo, double hi) { return lo * pow(hi / lo, gsl_rng_uniform(g)); }
static int pick(gsl_rng *g, int n) { return (int)gsl_rng_uniform_int(g, (unsigned long)n); }

static double complex poly_at(const double *c, size_t len, double complex s)
{
    double complex v = 0;
    for (size_t i = len; i-- > 0;)
        v = v * s + c[i];
    return v;
}

/* c := lead * prod (s - q_k); pairs (stored as both members) multiplied as real
 * quadratics. Returns the number of coefficients (n + 1). */
static size_t poly_from_roots(const double complex *q, size_t n, double lead, double *c)
{
    size_t len = 1;
    c[0] = lead;
    for (size_t k = 0; k < n; k++) {
        double f[3];
        size_t fl;
        if (cimag(q[k]) < 0)
            continue; /* the partner with positive imaginary part does the pair */
        if (cimag(q[k]) > 0) {
            f[0] = creal(q[k]) * creal(q[k]) + cimag(q[k]) * cimag(q[k]);
            f[1] = -2 * creal(q[k]);
            f[2] = 1;
            fl = 3;
        } else {
            f[0] = -creal(q[k]);
            f[1] = 1;
            fl = 2;
        }
        double out[MAXL + 2] = {0};
        for (size_t i = 0; i < len; i++)
            for (size_t j = 0; j < fl; j++)
                out[i + j] += c[i] * f[j];
        len += fl - 1;
        memcpy(c, out, len * sizeof *c);
    }
    return len;
}

/* Roots of an ascending polynomial with len coefficients (leading exact zeros
 * stripped). Returns the number of roots, or -1 on a solver failure. */
static int poly_roots(const double *c, size_t len, double complex *out)
{
    while (len > 0 && c[len - 1] == 0.0)
        len--;
    if (len < 2)
        return 0;
    for (size_t i = 0; i < len; i++)
        if (!isfinite(c[i]))
            return -1;
    double z[2 * MAXL];
    gsl_poly_complex_workspace *w = gsl_poly_complex_workspace_alloc(len);
    if (!w)
        return -1;
    int rc = gsl_poly_complex_solve(c, len, w, z);
    gsl_poly_complex_workspace_free(w);
    if (rc != GSL_SUCCESS)
        return -1;
    for (size_t i = 0; i + 1 < len; i++)
        out[i] = ps_complex_make(z[2 * i], z[2 * i + 1]);
    return (int)(len - 1);
}

/* ---------- the loop ---------- */

static double complex P_at(const loop *l, double complex s)
{
    double complex v = l->kp;
    for (size_t j = 0; j < l->nz; j++)
        v *= s - l->z[j];
    for (size_t i = 0; i < l->np; i++)
        v /= s - l->p[i];
    return v;
}

static double complex C_at(const loop *l, double complex s)
{
    return l->cg * poly_at(l->s, l->n, s) / poly_at(l->r, l->n, s);
}

/* L(jw) without the delay factor. */
static double complex G_at(const loop *l, double w) { return P_at(l, I * w) * C_at(l, I * w); }

static double complex L_at(const loop *l, double w)
{
    double complex v = G_at(l, w);
    return l->theta > 0 ? v * cexp(-I * w * l->theta) : v;
}

/* ln|S(jw)| = -ln|1 + L| = -(1/2) ln(1 + 2 Re L + |L|^2), accurate for small |L|. */
static double ln_abs_S_at(const loop *l, double w)
{
    double complex L = L_at(l, w);
    return -0.5 * log1p(2 * creal(L) + creal(L) * creal(L) + cimag(L) * cimag(L));
}

/* Limit of |L(jw)| w^rel as w -> inf: |kp cg s_{n-1} / r_{n-1}|. */
static double L_hf_coeff(const loop *l) { return fabs(l->kp * l->cg * l->s[l->n - 1] / l->r[l->n - 1]); }

/* kappa = lim_{s->inf} s L(s) for relative degree 1 (delay-free). */
static double L_kappa(const loop *l) { return l->kp * l->cg * l->s[l->n - 1] / l->r[l->n - 1]; }

/* Characteristic polynomial A R + cg B S, ascending, 2n coefficients. */
static size_t char_poly(const loop *l, double *c)
{
    size_t len = 2 * l->n;
    memset(c, 0, len * sizeof *c);
    for (size_t i = 0; i <= l->n; i++)
        for (size_t j = 0; j < l->n; j++) {
            c[i + j] += l->a[i] * l->r[j];
            c[i + j] += l->cg * l->b[i] * l->s[j];
        }
    return len;
}

/* Largest w on a log grid with |L0(jw)| >= 1 (delay-free), 0 if none;
 * OUT: *ms_coarse, the largest |S0| on the same grid. */
static double crossover(const loop *l, double *ms_coarse)
{
    double wc = 0;
    *ms_coarse = 0;
    for (int i = 0; i <= 3000; i++) {
        double w = l->scale * pow(10.0, -4 + 9.0 * i / 3000);
        double complex L = G_at(l, w);
        if (cabs(L) >= 1)
            wc = w;
        *ms_coarse = fmax(*ms_coarse, 1 / cabs(1 + L));
    }
    return wc;
}

/* ---------- Nyquist ---------- */

static double complex one_plus_L(const loop *l, double w) { return 1 + L_at(l, w); }

/* Phase change of 1 + L(jw) from w0 to w1, subdividing until each chord is
 * short against the distance to the origin, so no turn about 0 is missed. */
static double arg_step(const loop *l, double w0, double complex f0, double w1, double complex f1, int depth,
                       double *fmin_abs)
{
    double d = carg(f1 / f0);
    *fmin_abs = fmin(*fmin_abs, cabs(f1));
    if (fabs(d) < 0.2 && cabs(f1 - f0) < 0.2 * fmin(cabs(f0), cabs(f1)))
        return d;
    if (depth > 50) {
        *fmin_abs = 0; /* unresolved: the caller sees an ambiguous count */
        return d;
    }
    double wm = 0.5 * (w0 + w1);
    double complex fm = one_plus_L(l, wm);
    return arg_step(l, w0, f0, wm, fm, depth + 1, fmin_abs) + arg_step(l, wm, fm, w1, f1, depth + 1, fmin_abs);
}

/* Closed-loop RHP pole count by the Nyquist criterion: going up the jw axis,
 * the phase of 1 + L changes by 2 pi (P_ol - Z) over (-inf, inf), i.e. by
 * pi (P_ol - Z) over [0, inf) because L(-jw) = conj L(jw) (any textbook, e.g.
 * Skogestad & Postlethwaite 2nd ed. 2005, sec. 2.4.3, from memory). P_ol
 * counts the plant's and the controller's RHP poles; none may sit on the axis.
 * *ok is false when the count is not clearly an integer or 1 + L nearly
 * vanishes on the axis. */
static int nyquist_Z(const loop *l, bool *ok)
{
    double W = 1e3 * fmax(l->wmax, l->scale);
    while (cabs(L_at(l, W)) > 1e-3)
        W *= 2;
    double fmin_abs = INFINITY;
    double complex f0 = one_plus_L(l, 0.0);
    fmin_abs = cabs(f0);
    double w_lo = 1e-6 * fmin(l->scale, l->wmax), phase = 0, wprev = 0;
    enum { NGRID = 6000 };
    for (int i = 0; i <= NGRID; i++) {
        double w = w_lo * pow(W / w_lo, (double)i / NGRID);
        double complex f1 = one_plus_L(l, w);
        phase += arg_step(l, wprev, f0, w, f1, 0, &fmin_abs);
        f0 = f1;
        wprev = w;
    }
    phase += carg(1.0 / f0); /* |L| < 1e-3 beyond W: 1 + L stays near 1 */
    double turns = phase / M_PI;
    double rounded = round(turns);
    *ok = fabs(turns - rounded) < 1e-3 && fmin_abs > 1e-6;
    return (int)l->nlp - (int)rounded;
}

/* ---------- the random family ---------- */

static void push(double complex *v, size_t *n, double complex q) { v[(*n)++] = q; }
static void push_pair(double complex *v, size_t *n, double mag, double ang, int side)
{
    /* side = +1: RHP, x = mag cos(ang); side = -1: LHP */
    double x = side * mag * cos(ang), y = mag * sin(ang);
    push(v, n, ps_complex_make(x, y));
    push(v, n, ps_complex_make(x, -y));
}

static bool near_axis(double complex q, double scale)
{
    return fabs(creal(q)) < 1e-4 * cabs(q) + 1e-9 * scale;
}

/* Draw one plant and pole-placement controller; true when the loop is kept. */
static bool draw_loop(gsl_rng *g, const family_opts *o, loop *l, family_stats *st)
{
    memset(l, 0, sizeof *l);
    st->drawn++;
    double w0 = logunif(g, 0.1, 10);
    l->scale = w0;
    l->cg = 1;
    int rel = o->rel ? o->rel : 1 + pick(g, 3);
    l->rel = rel;
    const double deg = M_PI / 180;

    /* RHP poles */
    int npr = 1 + pick(g, 2);
    if (npr == 1)
        push(l->p, &l->np, w0 * unif(g, 0.3, 2));
    else if (pick(g, 2))
        push_pair(l->p, &l->np, w0 * unif(g, 0.4, 2), unif(g, 15, 75) * deg, 1);
    else {
        double p1 = w0 * unif(g, 0.3, 1.5);
        push(l->p, &l->np, p1);
        push(l->p, &l->np, p1 * unif(g, 1.4, 3));
    }
    double pmax = 0, pmin = INFINITY;
    for (size_t i = 0; i < l->np; i++) {
        pmax = fmax(pmax, cabs(l->p[i]));
        pmin = fmin(pmin, cabs(l->p[i]));
    }

    /* RHP zeros: mostly faster than every RHP pole (|z| >= 1.6 pmax), sometimes
     * slower (|z| <= pmin / 1.6), never within a factor 1.6 in magnitude. */
    int nzr = o->min_rhp_zeros + pick(g, 3 - o->min_rhp_zeros);
    bool above = gsl_rng_uniform(g) < 0.85;
    double zmag = above ? pmax * unif(g, 1.6, 8) : pmin / unif(g, 1.6, 4);
    if (nzr == 1)
        push(l->z, &l->nz, zmag);
    else if (nzr == 2) {
        if (pick(g, 2))
            push_pair(l->z, &l->nz, zmag, unif(g, 15, 75) * deg, 1);
        else {
            push(l->z, &l->nz, zmag);
            push(l->z, &l->nz, above ? zmag * unif(g, 1.3, 3) : zmag / unif(g, 1.3, 3));
        }
    }
    double zmin = INFINITY;
    for (size_t j = 0; j < l->nz; j++)
        zmin = fmin(zmin, cabs(l->z[j]));

    /* stable zeros and poles: n = (number of zeros) + rel */
    int mz = pick(g, 2);
    while (nzr + mz + rel < npr)
        mz++;
    for (int j = 0; j < mz; j++)
        push(l->z, &l->nz, -w0 * logunif(g, 0.2, 10));
    size_t n = l->nz + (size_t)rel;
    while (l->np < n) {
        if (n - l->np >= 2 && gsl_rng_uniform(g) < 0.4) {
            double zeta = unif(g, 0.15, 0.9);
            push_pair(l->p, &l->np, w0 * logunif(g, 0.3, 10), acos(zeta), -1);
        } else
            push(l->p, &l->np, -w0 * logunif(g, 0.2, 10));
    }
    l->n = n;

    /* gain: |P(j w0)| random in [0.3, 3], random sign */
    l->kp = 1;
    l->kp = (pick(g, 2) ? 1 : -1) * logunif(g, 0.3, 3) / cabs(P_at(l, I * w0));

    /* closed-loop polynomial: 2n - 1 stable roots around a target crossover;
     * sometimes the mirror images of the RHP poles and the stable plant poles
     * (near-optimal choices that push the peaks towards the floors). */
    double wt = (nzr > 0 && above) ? sqrt(pmax * zmin) : pmax * unif(g, 2, 6);
    size_t ncl = 2 * n - 1, k = 0;
    double complex cl[MAXL];
    if (gsl_rng_uniform(g) < 0.3)
        for (size_t i = 0; i < l->np; i++)
            cl[k++] = creal(l->p[i]) > 0 ? -conj(l->p[i]) : l->p[i];
    while (k < ncl) {
        if (ncl - k >= 2 && pick(g, 2)) {
            double zeta = unif(g, 0.3, 0.99);
            push_pair(cl, &k, wt * logunif(g, 0.4, 4), acos(zeta), -1);
        } else
            cl[k++] = -wt * logunif(g, 0.4, 4);
    }
    double acl[MAXL + 1];
    size_t lacl = poly_from_roots(cl, ncl, 1.0, acl);
    cr_assert_eq(lacl, 2 * n);

    /* A (monic) and B = kp prod(s - z), ascending */
    poly_from_roots(l->p, l->np, 1.0, l->a);
    double bb[MAXN + 1] = {0};
    size_t lb = poly_from_roots(l->z, l->nz, l->kp, bb);
    memcpy(l->b, bb, sizeof bb);
    cr_assert_leq(lb, n);

    /* Sylvester system: coefficient of s^m in A R + B S equals acl[m], m = 0..2n-1;
     * unknowns r_0..r_{n-1}, s_0..s_{n-1}. */
    size_t N = 2 * n;
    gsl_matrix *M = gsl_matrix_calloc(N, N);
    gsl_vector *rhs = gsl_vector_alloc(N), *x = gsl_vector_alloc(N);
    gsl_permutation *perm = gsl_permutation_alloc(N);
    cr_assert(M && rhs && x && perm);
    for (size_t m = 0; m < N; m++) {
        gsl_vector_set(rhs, m, acl[m]);
        for (size_t i = 0; i < n; i++)
            if (m >= i && m - i <= n) {
                gsl_matrix_set(M, m, i, l->a[m - i]);
                gsl_matrix_set(M, m, n + i, l->b[m - i]);
            }
    }
    int signum;
    int rc = gsl_linalg_LU_decomp(M, perm, &signum);
    if (rc == GSL_SUCCESS)
        rc = gsl_linalg_LU_solve(M, perm, rhs, x);
    if (rc == GSL_SUCCESS)
        for (size_t i = 0; i < n; i++) {
            l->r[i] = gsl_vector_get(x, i);
            l->s[i] = gsl_vector_get(x, n + i);
        }
    gsl_matrix_free(M);
    gsl_vector_free(rhs);
    gsl_vector_free(x);
    gsl_permutation_free(perm);
    bool finite = true;
    for (size_t i = 0; i < n; i++)
        finite = finite && isfinite(l->r[i]) && isfinite(l->s[i]);
    if (rc != GSL_SUCCESS || !finite || l->r[n - 1] == 0.0) {
        st->singular++;
        return false;
    }

    /* controller roots; none near the axis (Nyquist and the integrals need that) */
    int ncp = poly_roots(l->r, n, l->cpole), ncz = poly_roots(l->s, n, l->czero);
    if (ncp < 0 || ncz < 0) {
        st->singular++;
        return false;
    }
    l->ncp = (size_t)ncp;
    l->ncz = (size_t)ncz;
    for (size_t i = 0; i < l->ncp; i++)
        if (near_axis(l->cpole[i], w0)) {
            st->near_axis++;
            return false;
        }
    for (size_t i = 0; i < l->ncz; i++)
        if (near_axis(l->czero[i], w0)) {
            st->near_axis++;
            return false;
        }

    /* independent stability check: roots of A R + B S as computed */
    double chp[MAXL];
    size_t lch = char_poly(l, chp);
    int nr = poly_roots(chp, lch, l->clroot);
    if (nr != (int)(2 * n - 1)) {
        st->singular++;
        return false;
    }
    l->ncl = (size_t)nr;
    for (size_t i = 0; i < l->ncl; i++)
        if (!(creal(l->clroot[i]) < -1e-6 * cabs(l->clroot[i]))) {
            st->unstable++;
            return false;
        }

    /* L's RHP poles and zeros: the plant's and the controller's */
    for (size_t i = 0; i < l->np; i++)
        if (creal(l->p[i]) > 0)
            l->lp[l->nlp++] = l->p[i];
    for (size_t i = 0; i < l->ncp; i++)
        if (creal(l->cpole[i]) > 0) {
            l->lp[l->nlp++] = l->cpole[i];
            l->n_ctrl_rhp_poles++;
        }
    for (size_t j = 0; j < l->nz; j++)
        if (creal(l->z[j]) > 0)
            l->lz[l->nlz++] = l->z[j];
    for (size_t j = 0; j < l->ncz; j++)
        if (creal(l->czero[j]) > 0) {
            l->lz[l->nlz++] = l->czero[j];
            l->n_ctrl_rhp_zeros++;
        }
    l->wmax = w0;
    for (size_t i = 0; i < l->np; i++)
        l->wmax = fmax(l->wmax, cabs(l->p[i]));
    for (size_t i = 0; i < l->nz; i++)
        l->wmax = fmax(l->wmax, cabs(l->z[i]));
    for (size_t i = 0; i < l->ncp; i++)
        l->wmax = fmax(l->wmax, cabs(l->cpole[i]));
    for (size_t i = 0; i < l->ncz; i++)
        l->wmax = fmax(l->wmax, cabs(l->czero[i]));
    for (size_t i = 0; i < l->ncl; i++)
        l->wmax = fmax(l->wmax, cabs(l->clroot[i]));
    double ms_coarse;
    l->wc = crossover(l, &ms_coarse);
    if (!(l->wc > 0)) { /* an unstable plant stabilized must cross |L| = 1 */
        st->ambiguous++;
        return false;
    }
    /* Pole placement on plants with a slow RHP zero can give peaks of |S| of
     * 1e7 and more: 1 + L then loses 7 digits to cancellation and the
     * quadratures test rounding, not the laws. Such loops are dropped (and counted). */
    if (ms_coarse > 1e3) {
        st->huge_peak++;
        return false;
    }

    /* delay: designed delay-free, then a delay small against the crossover,
     * kept only when the Nyquist criterion confirms stability */
    if (gsl_rng_uniform(g) < o->p_delay) {
        l->theta = unif(g, 0.01, 0.3) / l->wc;
        bool ok;
        int Z = nyquist_Z(l, &ok);
        if (!ok) {
            st->ambiguous++;
            return false;
        }
        cr_assert_geq(Z, 0, "Nyquist count of closed-loop RHP poles is negative: %d", Z);
        if (Z != 0) {
            st->delay_unstable++;
            return false;
        }
    }
    st->kept++;
    return true;
}

static void log_stats(const char *what, const family_stats *st)
{
    cr_log_info("%s: drawn %d, kept %d; discarded: closed loop unstable %d, delay destabilised %d, "
                "controller root near the axis %d, peak |S| > 1e3 %d, singular/solver %d, ambiguous %d",
                what, st->drawn, st->kept, st->unstable, st->delay_unstable, st->near_axis, st->huge_peak,
                st->singular, st->ambiguous);
}

static gsl_rng *rng_new(unsigned long seed)
{
    gsl_rng *g = gsl_rng_alloc(gsl_rng_mt19937);
    cr_assert_not_null(g);
    gsl_rng_set(g, seed);
    return g;
}

/* ---------- sups on the jw axis ---------- */

typedef enum which { MAG_S, MAG_T, MAG_CS, MAG_LROLL } which;

typedef struct magfun {
    const loop *l;
    which what;
    double wh; /* MAG_LROLL: |L(jw)| (w/wh)^rel */
} magfun;

static double mag_at(const magfun *m, double w)
{
    double complex L = L_at(m->l, w);
    switch (m->what) {
    case MAG_S: return 1 / cabs(1 + L);
    case MAG_T: return cabs(L / (1 + L));
    case MAG_CS: {
        double complex C = C_at(m->l, I * w);
        return cabs(C / (1 + L));
    }
    case MAG_LROLL: return cabs(L) * pow(w / m->wh, m->l->rel);
    }
    return NAN;
}

/* Golden-section maximum of mag on [lo, hi] (in log w). */
static double refine(const magfun *m, double lo, double hi)
{
    const double gr = 0.6180339887498949;
    double a = log(lo), b = log(hi);
    double c = b - gr * (b - a), d = a + gr * (b - a);
    double fc = mag_at(m, exp(c)), fd = mag_at(m, exp(d)), best = fmax(fc, fd);
    for (int it = 0; it < 200 && b - a > 1e-14 * fmax(1.0, fabs(a)); it++) {
        if (fc > fd) {
            b = d;
            d = c;
            fd = fc;
            c = b - gr * (b - a);
            fc = mag_at(m, exp(c));
            best = fmax(best, fc);
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + gr * (b - a);
            fd = mag_at(m, exp(d));
            best = fmax(best, fd);
        }
    }
    return best;
}

/* sup of mag on [lo, hi] (lo may be 0; hi may be INFINITY, with lim the value
 * at infinity): log grid of npts points on [max(lo, grid_lo), min(hi, grid_hi)],
 * endpoint values, every grid local maximum refined. OUT: *wpeak. */
static double sup_on(const magfun *m, double lo, double hi, double grid_lo, double grid_hi, int npts, double lim,
                     double *wpeak)
{
    double g0 = fmax(lo, grid_lo), g1 = fmin(hi, grid_hi);
    double best = -INFINITY, wb = g0;
    if (lo == 0) {
        best = mag_at(m, 0.0);
        wb = 0;
    }
    if (isinf(hi) && lim > best) {
        best = lim;
        wb = INFINITY;
    }
    enum { GMAX = 8001 };
    static double ws[GMAX], vs[GMAX];
    if (npts > GMAX)
        npts = GMAX;
    for (int i = 0; i < npts; i++) {
        ws[i] = g0 * pow(g1 / g0, (double)i / (npts - 1));
        vs[i] = mag_at(m, ws[i]);
        if (vs[i] > best) {
            best = vs[i];
            wb = ws[i];
        }
    }
    for (int i = 1; i + 1 < npts; i++)
        if (vs[i] >= vs[i - 1] && vs[i] >= vs[i + 1]) {
            double v = refine(m, ws[i - 1], ws[i + 1]);
            if (v > best) {
                best = v;
                wb = ws[i];
            }
        }
    if (wpeak)
        *wpeak = wb;
    return best;
}

/* ---------- quadrature ---------- */

typedef enum integrand { INT_BODE, INT_POIS_S, INT_POIS_T } integrand;

typedef struct integ {
    const loop *l;
    integrand kind;
    double x, y; /* Poisson point */
} integ;

/* Weight: 1 for Bode; the Poisson kernel x/(x^2 + (w - y)^2) folded onto
 * [0, inf) (the log-magnitudes are even in w) for the Poisson integrals. */
static double weight(const integ *c, double w)
{
    if (c->kind == INT_BODE)
        return 1.0;
    return c->x / (c->x * c->x + (w - c->y) * (w - c->y)) + c->x / (c->x * c->x + (w + c->y) * (w + c->y));
}

/* The whole integrand: ln|S| (Bode, Poisson at a zero) or ln|T| = ln|L| + ln|S|
 * (Poisson at a pole), times the weight. */
static double f_full(double w, void *vp)
{
    const integ *c = vp;
    double v = ln_abs_S_at(c->l, w);
    if (c->kind == INT_POIS_T)
        v += log(cabs(G_at(c->l, w))); /* |L| = |G| on the axis */
    return v * weight(c, w);
}

/* Pieces for a delayed tail, G = L without the delay:
 *   ln|S| = -Re L + (ln|S| + Re L),  -Re L = -(Re G cos(w theta) + Im G sin(w theta)),
 * the first two Fourier integrals (qawf), the remainder O(|L|^2) non-oscillatory
 * enough for qags; ln|G| (T only) does not oscillate. */
static double f_base(double w, void *vp)
{
    const integ *c = vp;
    return c->kind == INT_POIS_T ? log(cabs(G_at(c->l, w))) * weight(c, w) : 0.0;
}
static double f_neg_reG(double w, void *vp)
{
    const integ *c = vp;
    return -creal(G_at(c->l, w)) * weight(c, w);
}
static double f_neg_imG(double w, void *vp)
{
    const integ *c = vp;
    return -cimag(G_at(c->l, w)) * weight(c, w);
}
static double f_rem(double w, void *vp)
{
    const integ *c = vp;
    return (ln_abs_S_at(c->l, w) + creal(L_at(c->l, w))) * weight(c, w);
}
/* |ln|1 + u| - Re u| <= sum_{n>=2} |u|^n / n <= |u|^2 / (2 (1 - |u|)) for |u| < 1:
 * a bound on f_rem that does not oscillate. */
static double f_rem_bound(double w, void *vp)
{
    const integ *c = vp;
    double g = cabs(G_at(c->l, w));
    return g < 1 ? g * g / (2 * (1 - g)) * weight(c, w) : INFINITY;
}

/* Tail map w = W / t, t in (0, 1]: integral_W^inf f(w) dw = integral_0^1 f(W/t) W/t^2 dt.
 * Scaled by W (unlike qagiu's w = W + (1-t)/t), so a tail decaying like 1/w^2
 * becomes a bounded integrand on (0, 1], and ln w growth a log singularity
 * that qags extrapolates away. */
typedef struct tailmap {
    gsl_function *f;
    double W;
} tailmap;

static double f_tail(double t, void *vp)
{
    const tailmap *m = vp;
    if (t <= 0)
        return 0;
    double w = m->W / t;
    return GSL_FN_EVAL(m->f, w) * m->W / (t * t);
}

typedef struct quad {
    gsl_integration_workspace *iw, *cw;
    gsl_integration_qawo_table *tab;
} quad;

static quad quad_new(void)
{
    quad q = {gsl_integration_workspace_alloc(QLIMIT), gsl_integration_workspace_alloc(QLIMIT),
              gsl_integration_qawo_table_alloc(1.0, 1.0, GSL_INTEG_COSINE, 30)};
    cr_assert(q.iw && q.cw && q.tab);
    return q;
}
static void quad_free(quad *q)
{
    gsl_integration_workspace_free(q->iw);
    gsl_integration_workspace_free(q->cw);
    gsl_integration_qawo_table_free(q->tab);
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Split frequency: beyond every root of the loop and where |L| < 1e-4. */
static double split_frequency(const loop *l)
{
    double W = 20 * fmax(l->wmax, l->wc);
    while (cabs(L_at(l, W)) > 1e-4)
        W *= 2;
    return W;
}

/* Breakpoints on [0, W]: 0, the resonance frequencies |Im| of the loop's
 * poles, zeros and closed-loop poles, extra (if > 0), W. Returns the count. */
static size_t breakpoints(const loop *l, double W, double extra, double *pts)
{
    size_t n = 0;
    pts[n++] = 0;
    const double complex *sets[5] = {l->p, l->z, l->cpole, l->czero, l->clroot};
    size_t ns[5] = {l->np, l->nz, l->ncp, l->ncz, l->ncl};
    for (int k = 0; k < 5; k++)
        for (size_t i = 0; i < ns[k]; i++) {
            double y = fabs(cimag(sets[k][i]));
            if (y > 1e-6 * W && y < W * 0.999)
                pts[n++] = y;
        }
    if (extra > 1e-6 * W && extra < 0.999 * W)
        pts[n++] = extra;
    /* a geometric ladder too: one Gauss-Kronrod rule on [20, 1e7] would sample
     * nothing below 3e4 and report a confident wrong answer */
    for (double w = 1e-3 * l->scale; w < 0.999 * W; w *= 3)
        pts[n++] = w;
    /* with a delay, ln|S| oscillates with period 2 pi / theta: a breakpoint
     * every half period (or every few, at most NOSC of them) */
    if (l->theta > 0) {
        double step = M_PI / l->theta * ceil(W * l->theta / M_PI / NOSC);
        for (double w = step; w < 0.999 * W; w += step)
            pts[n++] = w;
    }
    qsort(pts + 1, n - 1, sizeof *pts, cmp_double);
    size_t m = 1;
    for (size_t i = 1; i < n; i++)
        if (pts[i] > pts[m - 1] * (1 + 1e-6) + 1e-12 * W)
            pts[m++] = pts[i];
    pts[m++] = W;
    return m;
}

/* GSL reports "roundoff error" when the requested tolerance is below what the
 * integrand's rounding allows; accept that when its own error estimate is
 * still far inside the law's 1e-6 tolerance (the comparison is made anyway). */
static int accept(int rc, double res, double err)
{
    if ((rc == GSL_EROUND || rc == GSL_EDIVERGE) && isfinite(res) && isfinite(err) &&
        err <= 1e-8 * fmax(1.0, fabs(res)))
        return GSL_SUCCESS;
    return rc;
}

/* integral_0^inf of the integrand c: GSL qag between breakpoints on [0, W],
 * the tail by the map w = W/t; with a delay the tail is split as in
 * f_base..f_rem. Returns the GSL status (GSL_ETOL when GSL's own error
 * estimate exceeds 1e-8 relative); OUT: res, err (GSL's estimate). */
static int integrate(quad *q, integ *c, double *res, double *err)
{
    const loop *l = c->l;
    static double pts[NPTS];
    double W = split_frequency(l);
    size_t npts = breakpoints(l, W, c->kind == INT_BODE ? 0.0 : c->y, pts);
    double epsabs = 1e-12 * fmax(1.0, c->kind == INT_BODE ? l->scale : 1.0), epsrel = 1e-10;
    double r1 = 0, e1 = 0, r2 = 0, e2 = 0;
    gsl_function f = {f_full, c};
    /* interval by interval with the 61-point rule and no extrapolation: qagp's
     * epsilon extrapolation once returned GSL_SUCCESS with an estimate of 4e-2 */
    int rc = GSL_SUCCESS;
    for (size_t i = 0; i + 1 < npts && rc == GSL_SUCCESS; i++) {
        double v = 0, e = 0;
        rc = accept(gsl_integration_qag(&f, pts[i], pts[i + 1], epsabs / (double)npts, epsrel, QLIMIT,
                                        GSL_INTEG_GAUSS61, q->iw, &v, &e),
                    v, e);
        r1 += v;
        e1 += e;
    }
    if (rc == GSL_SUCCESS && !(e1 <= 1e-8 * fmax(1.0, fabs(r1))))
        rc = GSL_ETOL;
    if (rc) {
        fprintf(stderr, "  quadrature on [0, %g] (%zu points) failed: %.12g +- %.3g\n", W, npts, r1, e1);
        return rc;
    }
    if (l->theta == 0) {
        tailmap tm = {&f, W};
        gsl_function ft = {f_tail, &tm};
        rc = accept(gsl_integration_qags(&ft, 0, 1, epsabs, epsrel, QLIMIT, q->iw, &r2, &e2), r2, e2);
    } else {
        double v[4] = {0}, e[4] = {0};
        gsl_function fb = {f_base, c}, fr = {f_neg_reG, c}, fi = {f_neg_imG, c}, fm = {f_rem, c};
        tailmap tb = {&fb, W}, tm = {&fm, W};
        gsl_function ftb = {f_tail, &tb}, ftm = {f_tail, &tm};
        if (c->kind == INT_POIS_T)
            rc = accept(gsl_integration_qags(&ftb, 0, 1, epsabs, epsrel, QLIMIT, q->iw, &v[0], &e[0]), v[0], e[0]);
        if (!rc) {
            gsl_integration_qawo_table_set(q->tab, l->theta, 1.0, GSL_INTEG_COSINE);
            rc = accept(gsl_integration_qawf(&fr, W, epsabs, QLIMIT, q->iw, q->cw, q->tab, &v[1], &e[1]), v[1], e[1]);
        }
        if (!rc) {
            gsl_integration_qawo_table_set(q->tab, l->theta, 1.0, GSL_INTEG_SINE);
            rc = accept(gsl_integration_qawf(&fi, W, epsabs, QLIMIT, q->iw, q->cw, q->tab, &v[2], &e[2]), v[2], e[2]);
        }
        if (!rc) {
            rc = accept(gsl_integration_qags(&ftm, 0, 1, epsabs, 1e-8, QLIMIT, q->iw, &v[3], &e[3]), v[3], e[3]);
            if (rc) {
                /* the remainder still oscillates (cos 2 w theta, ...) and qags may
                 * give up on it: then integrate it on [W, 100 W] period by period
                 * and count the rest as 0 +- its rigorous bound */
                double W2 = 100 * W, step = M_PI / l->theta * ceil((W2 - W) * l->theta / M_PI / NOSC);
                rc = GSL_SUCCESS;
                v[3] = e[3] = 0;
                for (double a = W; a < W2 && rc == GSL_SUCCESS; a += step) {
                    double vv = 0, ee = 0;
                    rc = accept(gsl_integration_qag(&fm, a, fmin(a + step, W2), epsabs / NOSC, 1e-10, QLIMIT,
                                                    GSL_INTEG_GAUSS61, q->iw, &vv, &ee),
                                vv, ee);
                    v[3] += vv;
                    e[3] += ee;
                }
                gsl_function fbd = {f_rem_bound, c};
                tailmap tbd = {&fbd, W2};
                gsl_function ftbd = {f_tail, &tbd};
                double bound = 0, ebound = 0;
                if (rc == GSL_SUCCESS)
                    rc = gsl_integration_qags(&ftbd, 0, 1, epsabs, 1e-6, QLIMIT, q->iw, &bound, &ebound);
                e[3] += bound + ebound;
            }
        }
        r2 = v[0] + v[1] + v[2] + v[3];
        e2 = e[0] + e[1] + e[2] + e[3];
    }
    *res = r1 + r2;
    *err = e1 + e2;
    if (rc == GSL_SUCCESS && !(e2 <= 1e-8 * fmax(1.0, fabs(*res))))
        rc = GSL_ETOL;
    if (rc)
        fprintf(stderr, "  tail quadrature failed from W = %g: %.12g +- %.3g (body %.12g +- %.3g)\n", W, r2, e2, r1,
                e1);
    return rc;
}

/* ---------- the plant as plantsieve sees it ---------- */

static void plant_floors(const loop *l, ps_analysis *an, ps_floors *fl)
{
    ps_plant_reset(&plant);
    snprintf(plant.id, sizeof plant.id, "family");
    for (size_t i = 0; i < l->np; i++)
        plant.poles[i] = (ps_cplx){creal(l->p[i]), cimag(l->p[i])};
    for (size_t j = 0; j < l->nz; j++)
        plant.zeros[j] = (ps_cplx){creal(l->z[j]), cimag(l->z[j])};
    plant.n_poles = l->np;
    plant.n_zeros = l->nz;
    plant.gain = l->kp;
    plant.delay = l->theta;
    plant.present = (1u << PS_F_ID) | (1u << PS_F_ZEROS) | (1u << PS_F_POLES) | (1u << PS_F_GAIN);
    if (l->theta > 0)
        plant.present |= 1u << PS_F_DELAY;
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&plant, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_roots_analyse(rws, &plant, an, &d), PS_OK, "%s", d.text);
    cr_assert_eq(an->n_rhp_poles, l->nlp - l->n_ctrl_rhp_poles);
    cr_assert_eq(an->n_rhp_zeros, l->nlz - l->n_ctrl_rhp_zeros);
    ps_floors_compute(lws, an, NULL, fl);
}

static void print_loop(const loop *l)
{
    fprintf(stderr, "  plant: gain %.17g, delay %.17g\n  poles:", l->kp, l->theta);
    for (size_t i = 0; i < l->np; i++)
        fprintf(stderr, " (%.17g%+.17gj)", creal(l->p[i]), cimag(l->p[i]));
    fprintf(stderr, "\n  zeros:");
    for (size_t j = 0; j < l->nz; j++)
        fprintf(stderr, " (%.17g%+.17gj)", creal(l->z[j]), cimag(l->z[j]));
    fprintf(stderr, "\n  controller S (ascending, times %.17g):", l->cg);
    for (size_t i = 0; i < l->n; i++)
        fprintf(stderr, " %.17g", l->s[i]);
    fprintf(stderr, "\n  controller R (ascending):");
    for (size_t i = 0; i < l->n; i++)
        fprintf(stderr, " %.17g", l->r[i]);
    fprintf(stderr, "\n");
}

/* ---------- (0) the stability machinery itself ---------- */

/* The Nyquist count used for delayed loops must agree with the roots of the
 * characteristic polynomial on delay-free loops, stable and unstable alike
 * (the controller gain is scaled by a random factor to destabilise some). */
Test(laws_family, nyquist_count_agrees_with_characteristic_roots)
{
    gsl_rng *g = rng_new(20240611);
    family_opts o = {0, 0.0, 0};
    family_stats st = {0};
    int agree = 0, n_stable = 0, n_unstable = 0, skipped = 0;
    loop l;
    for (int t = 0; t < 4000 && agree < 400; t++) {
        if (!draw_loop(g, &o, &l, &st))
            continue;
        l.cg = logunif(g, 0.1, 10);
        double chp[MAXL];
        double complex rt[MAXL];
        size_t lch = char_poly(&l, chp);
        int nr = poly_roots(chp, lch, rt);
        cr_assert_geq(nr, 1);
        int Zr = 0;
        bool marginal = false;
        for (int i = 0; i < nr; i++) {
            Zr += creal(rt[i]) > 0;
            marginal = marginal || fabs(creal(rt[i])) < 1e-6 * cabs(rt[i]);
        }
        bool ok;
        int Zn = nyquist_Z(&l, &ok);
        if (marginal || !ok) {
            skipped++;
            continue;
        }
        if (Zn != Zr)
            print_loop(&l);
        cr_assert_eq(Zn, Zr, "draw %d: Nyquist says %d closed-loop RHP poles, roots say %d", t, Zn, Zr);
        agree++;
        n_stable += Zr == 0;
        n_unstable += Zr > 0;
    }
    gsl_rng_free(g);
    log_stats("nyquist cross-check family", &st);
    cr_log_info("nyquist vs roots: %d loops agree (%d stable, %d unstable), %d skipped as marginal", agree, n_stable,
                n_unstable, skipped);
    cr_assert_geq(agree, 400);
    cr_assert_geq(n_stable, 50);
    cr_assert_geq(n_unstable, 50);
}

/* ---------- (a) Bode sensitivity integral ---------- */

/* Bode 1945; Freudenberg & Looze, IEEE TAC 30(6), 1985; Skogestad &
 * Postlethwaite, Multivariable Feedback Control, 2nd ed. 2005, sec. 5.2 (from
 * memory): for a stable closed loop,
 *   integral_0^inf ln|S(jw)| dw = pi sum Re(RHP poles of L) - (pi/2) kappa,
 * kappa = lim s L(s), which is 0 for relative degree >= 2. The sum runs over L's
 * RHP poles: the plant's AND the controller's. With a delay the kappa term
 * vanishes but ln|S| ~ kappa sin(w theta)/w is only conditionally integrable,
 * so delayed loops are drawn with relative degree >= 2 only. */
Test(laws_family, bode_integral_over_loop_rhp_poles)
{
    gsl_rng *g = rng_new(1985);
    quad q = quad_new();
    family_stats st = {0};
    int count[4] = {0}, n_delay = 0, n_ctrl_unstable = 0, n_kappa = 0;
    double worst = 0, worst_est = 0;
    loop l;
    for (int t = 0; t < 6000 && count[1] + count[2] + count[3] < 300; t++) {
        int rel = 1 + t % 3;
        if (count[rel] >= 100)
            continue;
        family_opts o = {rel, rel >= 2 ? 0.35 : 0.0, 0};
        if (!draw_loop(g, &o, &l, &st))
            continue;
        double F = 0;
        for (size_t i = 0; i < l.nlp; i++)
            F += M_PI * creal(l.lp[i]);
        if (rel == 1) {
            F -= M_PI / 2 * L_kappa(&l);
            n_kappa++;
        }
        integ c = {&l, INT_BODE, 0, 0};
        double res = NAN, err = NAN;
        int rc = integrate(&q, &c, &res, &err);
        double e = fabs(res - F) / fmax(1.0, fabs(F));
        if (!(e <= 1e-6))
            print_loop(&l);
        cr_assert_eq(rc, GSL_SUCCESS, "draw %d: quadrature status %d (%s), result %.12g, estimate %.3g", t, rc,
                     gsl_strerror(rc), res, err);
        cr_assert_leq(e, 1e-6, "draw %d (rel %d, theta %g): integral %.12g vs F %.12g, err %.3g", t, rel, l.theta,
                      res, F, e);
        worst = fmax(worst, e);
        worst_est = fmax(worst_est, err / fmax(1.0, fabs(F)));
        count[rel]++;
        n_delay += l.theta > 0;
        n_ctrl_unstable += l.n_ctrl_rhp_poles > 0;
    }
    quad_free(&q);
    gsl_rng_free(g);
    log_stats("bode family", &st);
    cr_log_info("bode integral: %d loops (rel 1/2/3: %d/%d/%d, %d with delay, %d with an unstable controller), "
                "worst error %.2e (relative to max(1,|F|); largest GSL estimate %.2e)",
                count[1] + count[2] + count[3], count[1], count[2], count[3], n_delay, n_ctrl_unstable, worst,
                worst_est);
    cr_assert_geq(count[1], 60);
    cr_assert_geq(count[2], 60);
    cr_assert_geq(count[3], 60);
    cr_assert_geq(n_delay, 30);
    cr_assert_geq(n_ctrl_unstable, 20, "too few unstable controllers to test their share of the area");
    cr_assert_geq(n_kappa, 60);
}

/* ---------- (b) achieved peaks never below plantsieve's floors ---------- */

/* Floors (interpolation, with delay the Pick value, and the effort floor) from
 * ps_floors_compute on the plant's own analysis; references: J. Chen, IEEE TAC
 * 45(6), 2000; Skogestad & Postlethwaite 2nd ed. 2005, ch. 5 (from memory);
 * Glover, Int. J. Control 43, 1986 for the effort (LIMITS.md sec. 4-5). The
 * delayed ||S|| floor rests on the commutant-lifting equality of LIMITS.md
 * sec. 4 (unproved here; this test is one of its numerical checks). */
Test(laws_family, achieved_peaks_never_below_floors)
{
    gsl_rng *g = rng_new(2000);
    family_opts o = {0, 0.4, 0};
    family_stats st = {0};
    int checked = 0, n_delay = 0, n_s_binding = 0;
    double tight_s = INFINITY, tight_t = INFINITY, tight_cs = INFINITY;
    loop l;
    ps_analysis an;
    ps_floors fl;
    for (int t = 0; t < 20000 && checked < 1200; t++) {
        if (!draw_loop(g, &o, &l, &st))
            continue;
        plant_floors(&l, &an, &fl);
        cr_assert_not(fl.infinite);
        double lo = 1e-3 * l.scale, hi = 1e4 * l.scale;
        magfun ms_f = {&l, MAG_S, 0}, mt_f = {&l, MAG_T, 0}, mc_f = {&l, MAG_CS, 0};
        double wS, wT, wC;
        double ms = sup_on(&ms_f, 0, INFINITY, lo, hi, 4000, 1.0, &wS);
        double mt = sup_on(&mt_f, 0, INFINITY, lo, hi, 4000, 0.0, &wT);
        double mcs = sup_on(&mc_f, 0, INFINITY, lo, hi, 4000, fabs(l.cg * l.s[l.n - 1] / l.r[l.n - 1]), &wC);
        bool bad = !(ms >= fl.ms_interpolation * (1 - 1e-9)) || !(mt >= fl.mt_interpolation * (1 - 1e-9)) ||
                   !(mcs >= fl.effort * (1 - 1e-9));
        if (bad) {
            print_loop(&l);
            fprintf(stderr, "  peaks |S| %.12g at %g, |T| %.12g at %g, |CS| %.12g at %g; floors %.12g %.12g %.12g (%s)\n",
                    ms, wS, mt, wT, mcs, wC, fl.ms_interpolation, fl.mt_interpolation, fl.effort, fl.note);
        }
        cr_assert_geq(ms, fl.ms_interpolation * (1 - 1e-9), "draw %d: peak |S| %.12g below floor %.12g", t, ms,
                      fl.ms_interpolation);
        cr_assert_geq(mt, fl.mt_interpolation * (1 - 1e-9), "draw %d: peak |T| %.12g below floor %.12g", t, mt,
                      fl.mt_interpolation);
        cr_assert_geq(mcs, fl.effort * (1 - 1e-9), "draw %d: peak |CS| %.12g below floor %.12g", t, mcs, fl.effort);
        /* ||S|| >= 1 holds for every strictly proper loop: the ratio for S is
         * recorded only where the floor says more than that */
        if (fl.ms_interpolation > 1 + 1e-9) {
            tight_s = fmin(tight_s, ms / fl.ms_interpolation);
            n_s_binding++;
        }
        tight_t = fmin(tight_t, mt / fl.mt_interpolation);
        tight_cs = fmin(tight_cs, mcs / fl.effort);
        checked++;
        n_delay += l.theta > 0;
    }
    gsl_rng_free(g);
    log_stats("peak family", &st);
    cr_log_info("peaks vs floors: %d loops (%d with delay, %d with an S floor above 1); tightest achieved/floor: "
                "S %.9f, T %.9f, CS %.9f",
                checked, n_delay, n_s_binding, tight_s, tight_t, tight_cs);
    cr_assert_geq(checked, 1000);
    cr_assert_geq(n_delay, 200);
}

/* ---------- (c) band-forced floor ---------- */

/* Doyle, Francis & Tannenbaum, Feedback Control Theory, 1992, ch. "Design
 * Constraints" (from memory), exact tail as in LIMITS.md sec. 2: with
 * |S| <= eps on [0, wb] and |L| <= delta (wh/w)^(1+k) for w >= wh,
 *   ln sup_{[wb, wh]} |S| >= [F_L + wb ln(1/eps) - I_tail] / (wh - wb),
 * F_L = pi sum Re over L's RHP poles. Delay-free, relative degree >= 2, and
 * eps, delta measured on the loop itself. */
Test(laws_family, band_floor_below_achieved_midband_peak)
{
    gsl_rng *g = rng_new(1992);
    family_stats st = {0};
    int checked = 0, no_band = 0, n_ctrl_unstable = 0;
    double tightest = INFINITY, max_floor = 0;
    loop l;
    for (int t = 0; t < 8000 && checked < 250; t++) {
        family_opts o = {2 + t % 2, 0.0, 0};
        if (!draw_loop(g, &o, &l, &st))
            continue;
        magfun sf = {&l, MAG_S, 0};
        /* first frequency where |S| reaches 0.7 */
        double w07 = 0, wprev = 0;
        if (mag_at(&sf, 0.0) < 0.7)
            for (int i = 0; i <= 4000; i++) {
                double w = l.scale * pow(10.0, -5 + 9.0 * i / 4000);
                if (mag_at(&sf, w) >= 0.7) {
                    w07 = w;
                    break;
                }
                wprev = w;
            }
        if (!(w07 > 0 && wprev > 0)) {
            no_band++;
            continue;
        }
        double wb = unif(g, 0.2, 0.95) * wprev;
        double eps = sup_on(&sf, 0, wb, 1e-7 * wb, wb, 2000, NAN, NULL);
        cr_assert_lt(eps, 1.0);
        /* roll-off start: from above the crossover until delta is below a random target */
        int k = l.rel - 1;
        double target = unif(g, 0.05, 0.9), wh = fmax(1.5 * wb, 1.2 * l.wc), delta = INFINITY;
        for (int it = 0; it < 400; it++) {
            magfun lf = {&l, MAG_LROLL, wh};
            delta = sup_on(&lf, wh, INFINITY, wh, 1e6 * wh, 3000, L_hf_coeff(&l) / pow(wh, l.rel), NULL);
            if (delta < target)
                break;
            wh *= 1.2;
        }
        cr_assert_lt(delta, 1.0);
        double F = 0;
        for (size_t i = 0; i < l.nlp; i++)
            F += M_PI * creal(l.lp[i]);
        double floor = ps_band_floor(F, wb, eps, wh, delta, (double)k);
        double mid = sup_on(&sf, wb, wh, wb, wh, 4000, NAN, NULL);
        if (!(mid >= floor * (1 - 1e-9))) {
            print_loop(&l);
            fprintf(stderr, "  F_L %.12g wb %.12g eps %.12g wh %.12g delta %.12g k %d\n", F, wb, eps, wh, delta, k);
        }
        cr_assert_geq(mid, floor * (1 - 1e-9), "draw %d: sup |S| on [wb, wh] %.12g below band floor %.12g", t, mid,
                      floor);
        tightest = fmin(tightest, mid / floor);
        max_floor = fmax(max_floor, floor);
        n_ctrl_unstable += l.n_ctrl_rhp_poles > 0;
        checked++;
    }
    gsl_rng_free(g);
    log_stats("band family", &st);
    cr_log_info("band floor: %d loops (%d with an unstable controller; %d skipped: |S| never below 0.7 at low "
                "frequency), tightest achieved/floor %.6f, largest floor %.4f",
                checked, n_ctrl_unstable, no_band, tightest, max_floor);
    cr_assert_geq(checked, 200);
}

/* ---------- (d) Poisson identities ---------- */

/* Freudenberg & Looze, IEEE TAC 30(6), 1985; Skogestad & Postlethwaite 2nd ed.
 * 2005, sec. 5.3 and 5.4 (from memory). At an RHP zero z = x + jy of P,
 *   int_{-inf}^{inf} ln|S(jw)| x/(x^2+(w-y)^2) dw = pi ln prod_i |z + conj p_i|/|z - p_i|
 * over L's RHP poles p_i; at an RHP pole p = x + jy of P,
 *   int ln|T(jw)| x/(x^2+(w-y)^2) dw = pi ln prod_j |p + conj z_j|/|p - z_j| + pi x theta
 * over L's RHP zeros z_j (plant and controller). */
Test(laws_family, poisson_identities_at_rhp_zeros_and_poles)
{
    gsl_rng *g = rng_new(1985030);
    quad q = quad_new();
    family_opts o = {0, 0.35, 1};
    family_stats st = {0};
    int checked = 0, n_s = 0, n_t = 0, n_delay = 0, n_cplx = 0;
    double worst_s = 0, worst_t = 0;
    loop l;
    for (int t = 0; t < 4000 && checked < 150; t++) {
        if (!draw_loop(g, &o, &l, &st))
            continue;
        for (size_t j = 0; j < l.nz; j++) {
            double complex z = l.z[j];
            if (!(creal(z) > 0) || cimag(z) < 0)
                continue; /* the conjugate gives the same identity */
            double expect = 0;
            for (size_t i = 0; i < l.nlp; i++)
                expect += M_PI * log(cabs(z + conj(l.lp[i])) / cabs(z - l.lp[i]));
            integ c = {&l, INT_POIS_S, creal(z), cimag(z)};
            double res = NAN, err = NAN;
            int rc = integrate(&q, &c, &res, &err);
            double e = fabs(res - expect) / fmax(1.0, fabs(expect));
            if (rc || !(e <= 1e-6))
                print_loop(&l);
            cr_assert_eq(rc, GSL_SUCCESS, "draw %d: quadrature status %d (%s)", t, rc, gsl_strerror(rc));
            cr_assert_leq(e, 1e-6, "draw %d: S-Poisson at z = %g%+gj: %.12g vs %.12g", t, creal(z), cimag(z), res,
                          expect);
            worst_s = fmax(worst_s, e);
            n_s++;
            n_cplx += cimag(z) > 0;
        }
        for (size_t i = 0; i < l.np; i++) {
            double complex p = l.p[i];
            if (!(creal(p) > 0) || cimag(p) < 0)
                continue;
            double expect = M_PI * creal(p) * l.theta;
            for (size_t j = 0; j < l.nlz; j++)
                expect += M_PI * log(cabs(p + conj(l.lz[j])) / cabs(p - l.lz[j]));
            integ c = {&l, INT_POIS_T, creal(p), cimag(p)};
            double res = NAN, err = NAN;
            int rc = integrate(&q, &c, &res, &err);
            double e = fabs(res - expect) / fmax(1.0, fabs(expect));
            if (rc || !(e <= 1e-6))
                print_loop(&l);
            cr_assert_eq(rc, GSL_SUCCESS, "draw %d: quadrature status %d (%s)", t, rc, gsl_strerror(rc));
            cr_assert_leq(e, 1e-6, "draw %d: T-Poisson at p = %g%+gj: %.12g vs %.12g", t, creal(p), cimag(p), res,
                          expect);
            worst_t = fmax(worst_t, e);
            n_t++;
            n_cplx += cimag(p) > 0;
        }
        n_delay += l.theta > 0;
        checked++;
    }
    quad_free(&q);
    gsl_rng_free(g);
    log_stats("poisson family", &st);
    cr_log_info("poisson: %d loops (%d with delay), %d S identities (worst %.2e), %d T identities (worst %.2e), "
                "%d at complex points",
                checked, n_delay, n_s, worst_s, n_t, worst_t, n_cplx);
    cr_assert_geq(checked, 100);
    cr_assert_geq(n_delay, 25);
    cr_assert_geq(n_cplx, 30);
}
