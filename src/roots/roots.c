/* roots.c - polynomial roots (GSL companion-matrix solver + Newton polish),
 * state-space poles (eigenvalues of A) and zeros (Rosenbrock pencil), PBH
 * hidden-mode tests, clustering and classification against the jw axis. */
#include "roots/roots.h"

#include <float.h>
#include <gsl/gsl_eigen.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_poly.h>
#include <gsl/gsl_vector.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "core/complex_make.h" /* after the GSL headers: gsl_complex stays a struct */

enum { NMAX = PS_MAX_ORDER + 1 };

struct ps_roots_ws {
    /* GSL workspaces are sized exactly; every size is made once, in
     * ps_roots_ws_new (about 1 MB in all), so analysis never allocates. */
    gsl_poly_complex_workspace *poly[NMAX + 1];
    gsl_eigen_nonsymm_workspace *eig[NMAX + 1];
    gsl_eigen_gen_workspace *gen[NMAX + 1];
    double asc[NMAX + 1];
    double z[2 * NMAX];
    double m1[NMAX * NMAX], m2[NMAX * NMAX];
    double alpha[2 * NMAX], beta[NMAX];
    double qz_q[NMAX * NMAX], qz_z[NMAX * NMAX]; /* Schur vectors: gsl_eigen_gen without them allocates */
    double emb[4 * NMAX * NMAX], v[4 * NMAX * NMAX], sv[2 * NMAX];
};

const char *ps_region_name(ps_region r)
{
    return r == PS_RHP ? "rhp" : r == PS_AXIS ? "axis" : "lhp";
}

void ps_roots_init(void)
{
    gsl_set_error_handler_off();
}

ps_roots_ws *ps_roots_ws_new(void)
{
    ps_roots_ws *ws = calloc(1, sizeof(ps_roots_ws));
    if (!ws)
        return NULL;
    for (size_t i = 1; i <= NMAX; i++) {
        if ((i >= 2 && !(ws->poly[i] = gsl_poly_complex_workspace_alloc(i))) ||
            !(ws->eig[i] = gsl_eigen_nonsymm_alloc(i)) || !(ws->gen[i] = gsl_eigen_gen_alloc(i))) {
            ps_roots_ws_free(ws);
            return NULL;
        }
    }
    return ws;
}

void ps_roots_ws_free(ps_roots_ws *ws)
{
    if (!ws)
        return;
    for (size_t i = 0; i <= NMAX; i++) {
        if (ws->poly[i])
            gsl_poly_complex_workspace_free(ws->poly[i]);
        if (ws->eig[i])
            gsl_eigen_nonsymm_free(ws->eig[i]);
        if (ws->gen[i])
            gsl_eigen_gen_free(ws->gen[i]);
    }
    free(ws);
}

static inline double complex to_c(ps_cplx x) { return ps_complex_make(x.re, x.im); }
static inline ps_cplx from_c(double complex x) { return (ps_cplx){creal(x), cimag(x)}; }

/* |re + i im|: the plain square root of the sum of squares where neither
 * square can overflow or lose the smaller part to underflow (within 1 ulp
 * or so of hypot, several times faster); hypot outside that range and for
 * infinities and NaNs. The root finder and the clustering below call it
 * tens of times a root. */
static inline double mag(double re, double im)
{
    double a = fabs(re), b = fabs(im), m = a > b ? a : b;
    if (m > 0x1p-450 && m < 0x1p450)
        return sqrt(re * re + im * im);
    return hypot(re, im);
}

static inline double magc(double complex z) { return mag(creal(z), cimag(z)); }

ps_cplx ps_poly_eval(const double *c, size_t n, ps_cplx s)
{
    double complex acc = 0, x = to_c(s);
    for (size_t i = 0; i < n; i++)
        acc = acc * x + c[i];
    return from_c(acc);
}

/* Horner on ASCENDING coefficients, with the derivative and the running sum
 * of |a_k| |x|^k used for the root condition number. */
static void horner_asc(const double *a, size_t n, double complex x, double complex *p,
                       double complex *dp, double *absum)
{
    double complex acc = 0, dacc = 0;
    double s = 0, ax = magc(x);
    for (size_t i = n; i-- > 0;) {
        dacc = dacc * x + acc;
        acc = acc * x + a[i];
        s = s * ax + fabs(a[i]);
    }
    *p = acc;
    *dp = dacc;
    *absum = s;
}

/* Group roots whose distance is within their error estimates (tol, from the
 * root's condition number) or within merge_tol, but never farther apart than
 * PS_CLUSTER_RTOL relative (single linkage). A multiple root computed in
 * floating point scatters by about eps^(1/m); its members have huge condition
 * numbers and so large estimates, while well-separated simple roots never
 * merge. Each group is replaced by its mean (far more accurate than its
 * members), then every root is classified. Roots of a real polynomial or
 * matrix come in conjugate pairs: an imaginary part below tol is made 0. */
static void finish_roots(ps_root *r, size_t n, double merge_tol)
{
    int group[NMAX];
    for (size_t i = 0; i < n; i++)
        group[i] = (int)i;
    for (size_t i = 0; i < n; i++)
        for (size_t j = i + 1; j < n; j++) {
            double dist = mag(r[i].v.re - r[j].v.re, r[i].v.im - r[j].v.im);
            double near = fmax(r[i].tol + r[j].tol, merge_tol);
            if (!(dist <= near))
                continue;
            double scale = fmax(mag(r[i].v.re, r[i].v.im), mag(r[j].v.re, r[j].v.im));
            if (dist <= PS_CLUSTER_RTOL * scale) {
                int gi = group[i], gj = group[j];
                for (size_t k = 0; k < n; k++)
                    if (group[k] == gj)
                        group[k] = gi;
            }
        }
    for (size_t i = 0; i < n; i++) {
        if (group[i] != (int)i)
            continue;
        double complex sum = 0;
        double tol = INFINITY;
        unsigned m = 0;
        for (size_t k = 0; k < n; k++)
            if (group[k] == (int)i) {
                sum += to_c(r[k].v);
                tol = fmin(tol, r[k].tol);
                m++;
            }
        if (m > 1) {
            double complex mean = sum / m;
            tol = m * fmax(tol, 64 * DBL_EPSILON * magc(mean));
            for (size_t k = 0; k < n; k++)
                if (group[k] == (int)i) {
                    r[k].v = from_c(mean);
                    r[k].tol = tol;
                }
        }
        for (size_t k = 0; k < n; k++)
            if (group[k] == (int)i)
                r[k].mult = m;
    }
    for (size_t i = 0; i < n; i++)
        if (fabs(r[i].v.im) <= r[i].tol)
            r[i].v.im = 0.0;
    /* Make conjugate pairs exact: each root above the real axis is paired
     * with the nearest unpaired one below it, and both get the averages. */
    bool paired[NMAX] = {false};
    for (size_t i = 0; i < n; i++) {
        if (r[i].v.im <= 0)
            continue;
        size_t best = n;
        double bd = INFINITY;
        for (size_t k = 0; k < n; k++) {
            if (paired[k] || r[k].v.im >= 0)
                continue;
            double dk = mag(r[k].v.re - r[i].v.re, r[k].v.im + r[i].v.im);
            if (dk < bd) {
                bd = dk;
                best = k;
            }
        }
        if (best == n)
            continue;
        paired[best] = true;
        double re = 0.5 * (r[i].v.re + r[best].v.re), im = 0.5 * (r[i].v.im - r[best].v.im);
        double tol = fmax(r[i].tol, r[best].tol);
        r[i].v = (ps_cplx){re, im};
        r[best].v = (ps_cplx){re, -im};
        r[i].tol = r[best].tol = tol;
    }
    for (size_t i = 0; i < n; i++) {
        r[i].region = r[i].v.re > r[i].tol ? PS_RHP : r[i].v.re < -r[i].tol ? PS_LHP : PS_AXIS;
    }
}

static gsl_poly_complex_workspace *poly_ws(ps_roots_ws *ws, size_t n)
{
    return n <= NMAX ? ws->poly[n] : NULL;
}

int ps_roots_poly(ps_roots_ws *ws, const double *c, size_t n, ps_root *out, ps_diag *d)
{
    if (n == 0 || n > NMAX + 0u || c[0] == 0.0) {
        ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "polynomial of invalid length or leading zero");
        return -1;
    }
    size_t deg = n - 1, k = 0;
    double *a = ws->asc;
    for (size_t i = 0; i < n; i++)
        a[i] = c[n - 1 - i];
    /* Exact roots at the origin: strip them before solving. */
    size_t nz = 0;
    while (nz < deg && a[nz] == 0.0)
        nz++;
    for (; k < nz; k++)
        out[k] = (ps_root){{0.0, 0.0}, PS_AXIS, 1, 0.0};
    const double *ar = a + nz;
    size_t m = n - nz;
    if (m == 2) {
        out[k++] = (ps_root){{-ar[0] / ar[1], 0.0}, PS_LHP, 1, 0.0};
    } else if (m > 2) {
        gsl_poly_complex_workspace *w = poly_ws(ws, m);
        if (!w) {
            ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory for the root solver");
            return -1;
        }
        int rc = gsl_poly_complex_solve(ar, m, w, ws->z);
        if (rc != GSL_SUCCESS) {
            ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "root solver failed: %s", gsl_strerror(rc));
            return -1;
        }
        for (size_t i = 0; i < m - 1; i++)
            out[k++] = (ps_root){{ws->z[2 * i], ws->z[2 * i + 1]}, PS_LHP, 1, 0.0};
    }
    /* Newton polish on the original (deflated-at-zero) polynomial; a step is
     * kept only when it lowers |p|, so a multiple root is never pushed off. */
    for (size_t i = nz; i < k; i++) {
        double complex x = to_c(out[i].v), p, dp;
        double absum;
        horner_asc(ar, m, x, &p, &dp, &absum);
        /* Members of a multiple root (huge condition number) are left as the
         * solver gave them: Newton would move them unevenly and spoil the
         * cluster mean. */
        bool simple = magc(dp) * magc(x) * 1e-6 > 16 * DBL_EPSILON * absum;
        for (int it = 0; simple && it < 3 && magc(p) > 0 && magc(dp) > 0; it++) {
            double complex xn = x - p / dp, pn, dpn;
            double sn;
            horner_asc(ar, m, xn, &pn, &dpn, &sn);
            if (!(magc(pn) < magc(p)))
                break;
            x = xn;
            p = pn;
            dp = dpn;
            absum = sn;
        }
        /* Condition number of a simple root: sum|a_k||x|^k / (|x| |p'(x)|). */
        double ax = magc(x), kappa = 1.0;
        if (ax > 0 && magc(dp) > 0)
            kappa = fmax(1.0, absum / (ax * magc(dp)));
        else if (ax > 0)
            kappa = 1.0 / DBL_EPSILON;
        out[i].v = from_c(x);
        out[i].tol = fmin(16 * DBL_EPSILON * kappa, 1e-3) * ax;
    }
    finish_roots(out, deg, 0.0);
    return (int)deg;
}

static double frob(const double *x, size_t n)
{
    double s = 0;
    for (size_t i = 0; i < n; i++)
        s += x[i] * x[i];
    return sqrt(s);
}

/* Smallest singular value over the largest of the complex matrix
 * [A - lam I, B] (controllability, ctrl = true) or [A - lam I; C] via the real
 * embedding [Re -Im; Im Re] (GSL has no complex SVD). */
static double pbh_ratio(ps_roots_ws *ws, const ps_plant *p, double complex lam, bool ctrl)
{
    size_t n = p->a_rows, rows = n + 1, cols = n;
    /* Tall (n+1) x n complex matrix K: [A - lam I, B]^T for ctrl, [A - lam I; C] otherwise. */
    size_t R = 2 * rows, C = 2 * cols;
    for (size_t i = 0; i < rows; i++)
        for (size_t j = 0; j < cols; j++) {
            double complex kij;
            if (i == n)
                kij = ctrl ? p->b[j] : p->c[j];
            else if (ctrl)
                kij = p->a[j * n + i] - (i == j ? lam : 0);
            else
                kij = p->a[i * n + j] - (i == j ? lam : 0);
            double re = creal(kij), im = cimag(kij);
            ws->emb[i * C + j] = re;
            ws->emb[i * C + j + cols] = -im;
            ws->emb[(i + rows) * C + j] = im;
            ws->emb[(i + rows) * C + j + cols] = re;
        }
    gsl_matrix_view E = gsl_matrix_view_array(ws->emb, R, C);
    gsl_matrix_view V = gsl_matrix_view_array(ws->v, C, C);
    gsl_vector_view S = gsl_vector_view_array(ws->sv, C);
    /* One-sided Jacobi: no internal allocation, and accurate small singular values. */
    if (gsl_linalg_SV_decomp_jacobi(&E.matrix, &V.matrix, &S.vector) != GSL_SUCCESS)
        return NAN;
    double smax = 0, smin = INFINITY;
    for (size_t k = 0; k < C; k++) {
        smax = fmax(smax, ws->sv[k]);
        smin = fmin(smin, ws->sv[k]);
    }
    return smax > 0 ? smin / smax : 0.0;
}

static ps_status ss_poles(ps_roots_ws *ws, const ps_plant *p, ps_analysis *out, ps_diag *d)
{
    size_t n = p->a_rows;
    memcpy(ws->m1, p->a, n * n * sizeof(double));
    if (!ws->eig[n])
        return ps_diag_set(d, PS_ERR_NOMEM, p->line, 0, "a", "out of memory for the eigen-solver");
    /* Balancing is off by default in GSL; on, it matches LAPACK's dgeev. */
    gsl_eigen_nonsymm_params(0, 1, ws->eig[n]);
    gsl_matrix_view A = gsl_matrix_view_array(ws->m1, n, n);
    gsl_vector_complex_view ev = gsl_vector_complex_view_array(ws->alpha, n);
    int rc = gsl_eigen_nonsymm(&A.matrix, &ev.vector, ws->eig[n]);
    if (rc != GSL_SUCCESS)
        return ps_diag_set(d, PS_ERR_NUMERIC, p->field_line[PS_F_A], 0, "a",
                           "eigenvalues of a did not converge: %s", gsl_strerror(rc));
    double tol = 64 * DBL_EPSILON * fmax(frob(p->a, n * n), DBL_MIN);
    for (size_t i = 0; i < n; i++)
        out->poles[i] = (ps_root){{ws->alpha[2 * i], ws->alpha[2 * i + 1]}, PS_LHP, 1, tol};
    out->n_poles = n;
    /* A defective (Jordan) eigenvalue scatters by eps^(1/m) ||A||; eigenvalues
     * closer than 1e-6 ||A|| are treated as one multiple eigenvalue. */
    finish_roots(out->poles, n, 1e-6 * frob(p->a, n * n));
    return PS_OK;
}

/* det [sI-A, -B; C, D] has degree n - r exactly, r the relative degree (its
 * leading coefficient is the first non-zero Markov parameter). Rounding
 * spreads a block of eigenvalues at infinity of size k over a circle of
 * radius about |M| eps^(-1/k), which for k of 5 or more is near the plant's
 * own frequencies; GSL's QZ (no balancing) then returns some as finite.
 * Keep the n - r smallest (a conjugate pair the cut would split goes too);
 * returns how many went, *from the smallest magnitude among them. */
static size_t keep_degree(ps_root *z, size_t *nz, size_t want, double *from)
{
    size_t n = *nz;
    if (n <= want)
        return 0;
    for (size_t i = 1; i < n; i++) { /* by magnitude, ascending (n <= 65) */
        ps_root t = z[i];
        double m = hypot(t.v.re, t.v.im);
        size_t j = i;
        for (; j > 0 && hypot(z[j - 1].v.re, z[j - 1].v.im) > m; j--)
            z[j] = z[j - 1];
        z[j] = t;
    }
    size_t keep = want;
    if (keep > 0 && z[keep - 1].v.im != 0.0) {
        bool pair_kept = false;
        for (size_t i = 0; i + 1 < keep; i++)
            pair_kept |= z[i].v.re == z[keep - 1].v.re && z[i].v.im == -z[keep - 1].v.im;
        if (!pair_kept)
            keep--;
    }
    *from = hypot(z[keep].v.re, z[keep].v.im);
    *nz = keep;
    return n - keep;
}

static ps_status ss_zeros(ps_roots_ws *ws, const ps_plant *p, ps_analysis *out, size_t *dropped, double *from,
                          ps_diag *d)
{
    size_t n = p->a_rows, N = n + 1;
    /* Rosenbrock pencil M - s Nn with M = [A B; C D], Nn = [I 0; 0 0]. */
    for (size_t i = 0; i < N; i++)
        for (size_t j = 0; j < N; j++) {
            double mij;
            if (i < n && j < n)
                mij = p->a[i * n + j];
            else if (i < n)
                mij = p->b[i];
            else if (j < n)
                mij = p->c[j];
            else
                mij = p->d;
            ws->m1[i * N + j] = mij;
            ws->m2[i * N + j] = (i == j && i < n) ? 1.0 : 0.0;
        }
    double mnorm = frob(ws->m1, N * N);
    if (!ws->gen[N])
        return ps_diag_set(d, PS_ERR_NOMEM, p->line, 0, "a", "out of memory for the pencil solver");
    gsl_matrix_view M = gsl_matrix_view_array(ws->m1, N, N);
    gsl_matrix_view Nn = gsl_matrix_view_array(ws->m2, N, N);
    gsl_vector_complex_view al = gsl_vector_complex_view_array(ws->alpha, N);
    gsl_vector_view be = gsl_vector_view_array(ws->beta, N);
    gsl_matrix_view Q = gsl_matrix_view_array(ws->qz_q, N, N), Z = gsl_matrix_view_array(ws->qz_z, N, N);
    int rc = gsl_eigen_gen_QZ(&M.matrix, &Nn.matrix, &al.vector, &be.vector, &Q.matrix, &Z.matrix, ws->gen[N]);
    if (rc != GSL_SUCCESS)
        return ps_diag_set(d, PS_ERR_NUMERIC, p->field_line[PS_F_A], 0, "a",
                           "zeros (generalized eigenvalues) did not converge: %s", gsl_strerror(rc));
    size_t nz = 0;
    for (size_t i = 0; i < N; i++) {
        double ar = ws->alpha[2 * i], ai = ws->alpha[2 * i + 1], b = ws->beta[i];
        double am = hypot(ar, ai);
        if (am == 0.0 && b == 0.0)
            return ps_diag_set(d, PS_ERR_INPUT, p->line, 0, "c",
                               "singular pencil: the transfer function is identically zero");
        if (fabs(b) <= 100 * DBL_EPSILON * am)
            continue; /* infinite eigenvalue: not a zero */
        ps_cplx z = {ar / b, ai / b};
        double tol = 64 * DBL_EPSILON * (mnorm + hypot(z.re, z.im) * sqrt((double)n));
        out->zeros[nz++] = (ps_root){z, PS_LHP, 1, tol};
    }
    if (out->rel_degree >= 0 && (size_t)out->rel_degree <= n)
        *dropped = keep_degree(out->zeros, &nz, n - (size_t)out->rel_degree, from);
    out->n_zeros = nz;
    finish_roots(out->zeros, nz, 1e-6 * mnorm);
    return PS_OK;
}

/* Gain and relative degree from the Markov parameters D, CB, CAB, ... */
static ps_status ss_markov(ps_roots_ws *ws, const ps_plant *p, ps_analysis *out, ps_diag *d)
{
    size_t n = p->a_rows;
    if (p->d != 0.0) {
        out->gain = p->d;
        out->rel_degree = 0;
        return PS_OK;
    }
    /* c a^(k-1) b is zero when it is below 1e-12 of |c| |a|^(k-1) |b| taken
     * entry by entry: the size of the terms it sums, and the scale of its
     * rounding error (Higham, Accuracy and Stability of Numerical Algorithms,
     * 2nd ed., section 3.5, from memory). Norm products would be far larger
     * for a cascade of fast sections and call its first Markov parameter
     * zero. */
    double *v = ws->z, *w = ws->asc, *va = ws->m1, *wa = ws->m1 + n;
    memcpy(v, p->b, n * sizeof *v);
    for (size_t i = 0; i < n; i++)
        va[i] = fabs(p->b[i]);
    for (size_t k = 1; k <= n; k++) {
        double mk = 0, scale = 0;
        for (size_t i = 0; i < n; i++) {
            mk += p->c[i] * v[i];
            scale += fabs(p->c[i]) * va[i];
        }
        if (fabs(mk) > 1e-12 * scale) {
            out->gain = mk;
            out->rel_degree = (int)k;
            return PS_OK;
        }
        for (size_t i = 0; i < n; i++) {
            double s = 0, sa = 0;
            for (size_t j = 0; j < n; j++) {
                s += p->a[i * n + j] * v[j];
                sa += fabs(p->a[i * n + j]) * va[j];
            }
            w[i] = s;
            wa[i] = sa;
        }
        memcpy(v, w, n * sizeof *v);
        memcpy(va, wa, n * sizeof *va);
    }
    return ps_diag_set(d, PS_ERR_INPUT, p->line, 0, "c",
                       "every Markov parameter is zero: the transfer function is identically zero");
}

static void count_regions(ps_analysis *out)
{
    out->n_rhp_poles = out->n_rhp_zeros = out->n_axis_poles = 0;
    for (size_t i = 0; i < out->n_poles; i++) {
        out->n_rhp_poles += out->poles[i].region == PS_RHP;
        out->n_axis_poles += out->poles[i].region == PS_AXIS;
    }
    for (size_t i = 0; i < out->n_zeros; i++)
        out->n_rhp_zeros += out->zeros[i].region == PS_RHP;
}

/* A plant in z: each root classified against the unit circle, outside
 * (PS_RHP, unstable), on it within tol (PS_AXIS) or inside (PS_LHP), with tol
 * = max(the root's error estimate, 64 eps |z|) and kept as the root's tol.
 * Runs before the cancellation and PBH checks, which then judge "unstable"
 * by the circle. */
static void circle_roots(ps_root *r, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        double m = hypot(r[i].v.re, r[i].v.im);
        double tol = fmax(r[i].tol, 64 * DBL_EPSILON * m);
        r[i].tol = tol;
        r[i].region = m > 1.0 + tol ? PS_RHP : fabs(m - 1.0) <= tol ? PS_AXIS : PS_LHP;
    }
}

static void classify_unit_circle(ps_analysis *an)
{
    circle_roots(an->poles, an->n_poles);
    circle_roots(an->zeros, an->n_zeros);
}

/* The class of a root in words, for warnings: half plane or unit circle. */
static const char *region_words(const ps_analysis *out, ps_region r)
{
    if (!out->in_z)
        return ps_region_name(r);
    return r == PS_RHP ? "outside the unit circle" : r == PS_AXIS ? "on the unit circle" : "inside the unit circle";
}

/* Shared RHP/axis roots of numerator and denominator are hidden modes;
 * close but distinct RHP pairs are reported as near cancellations. In z
 * the regions are those of the unit circle (classify_unit_circle ran). */
static void check_cancellations(ps_plant *p, ps_analysis *out, bool flag_hidden)
{
    for (size_t i = 0; i < out->n_zeros; i++) {
        const ps_root *z = &out->zeros[i];
        if (z->region == PS_LHP || (i > 0 && memcmp(&z->v, &out->zeros[i - 1].v, sizeof z->v) == 0))
            continue;
        for (size_t j = 0; j < out->n_poles; j++) {
            const ps_root *q = &out->poles[j];
            if (q->region == PS_LHP || (z->v.im < 0) || (q->v.im < 0))
                continue;
            double dist = hypot(z->v.re - q->v.re, z->v.im - q->v.im);
            double mag = fmax(hypot(q->v.re, q->v.im), DBL_MIN);
            if (dist <= fmax(PS_CANCEL_RTOL * mag, z->tol + q->tol)) {
                if (flag_hidden) {
                    out->hidden_unstable = true;
                    ps_plant_warn(p, "hidden unstable mode: numerator and denominator share the root "
                                     "%.6g%+.6gj (%s); no controller can move it",
                                  q->v.re, q->v.im, region_words(out, q->region));
                }
                break;
            }
            if (!(z->region == PS_RHP && q->region == PS_RHP && dist <= PS_NEAR_CANCEL_RTOL * mag))
                continue;
            if (!out->in_z) {
                double bound = hypot(z->v.re + q->v.re, z->v.im - q->v.im) / dist;
                ps_plant_warn(p, "near cancellation: RHP zero %.6g%+.6gj is %.3g%% from RHP pole "
                                 "%.6g%+.6gj (|z+conj(p)|/|z-p| = %.4g)",
                              z->v.re, z->v.im, 100 * dist / mag, q->v.re, q->v.im, bound);
            } else {
                /* the disc's counterpart of |z + conj(p)|: |1 - z conj(p)| */
                double bound = hypot(1.0 - (z->v.re * q->v.re + z->v.im * q->v.im),
                                     -(z->v.im * q->v.re - z->v.re * q->v.im)) / dist;
                ps_plant_warn(p, "near cancellation: zero %.6g%+.6gj outside the unit circle is %.3g%% from "
                                 "pole %.6g%+.6gj outside it (|1-z conj(p)|/|z-p| = %.4g)",
                              z->v.re, z->v.im, 100 * dist / mag, q->v.re, q->v.im, bound);
            }
        }
    }
}

static void hidden_modes_ss(ps_roots_ws *ws, ps_plant *p, ps_analysis *out)
{
    out->minimal = true;
    for (size_t i = 0; i < out->n_poles; i++) {
        const ps_root *r = &out->poles[i];
        if (r->region == PS_LHP || r->v.im < 0 || (i > 0 && memcmp(&r->v, &out->poles[i - 1].v, sizeof r->v) == 0))
            continue;
        /* A hidden mode is an invariant zero of the pencil, so with no zero
         * near it the PBH ratio is small only through the realisation's
         * scaling (the tolerance is loose: it only lets the test run). */
        bool near_zero = false;
        for (size_t k = 0; k < out->n_zeros && !near_zero; k++)
            near_zero = hypot(out->zeros[k].v.re - r->v.re, out->zeros[k].v.im - r->v.im) <=
                        1e-3 * fmax(1.0, hypot(r->v.re, r->v.im));
        if (!near_zero)
            continue;
        double complex lam = to_c(r->v);
        double rc = pbh_ratio(ws, p, lam, true), ro = pbh_ratio(ws, p, lam, false);
        bool unc = !(rc > PS_PBH_RTOL), uno = !(ro > PS_PBH_RTOL);
        if (unc || uno) {
            out->hidden_unstable = true;
            out->minimal = false;
            ps_plant_warn(p, "hidden unstable mode: eigenvalue %.6g%+.6gj (%s) is %s%s%s "
                             "(PBH test, smallest/largest singular value %.2g)",
                          r->v.re, r->v.im, region_words(out, r->region), unc ? "uncontrollable" : "",
                          unc && uno ? " and " : "", uno ? "unobservable" : "", unc ? rc : ro);
        }
    }
}

/* Point a solver diagnostic at the catalog field it came from. */
static ps_status locate(ps_diag *d, const ps_plant *p, ps_field f)
{
    if (d) {
        d->line = p->field_line[f];
        d->col = p->field_col[f];
        snprintf(d->field, sizeof d->field, "%s", ps_field_name(f));
    }
    return PS_ERR_NUMERIC;
}

ps_status ps_roots_analyse(ps_roots_ws *ws, ps_plant *p, ps_analysis *out, ps_diag *d)
{
    out->n_poles = out->n_zeros = 0;
    out->gain = 0.0;
    out->rel_degree = 0;
    out->hidden_unstable = false;
    out->minimal = true;
    out->delay = p->delay;
    out->h = p->sample_period;
    out->compute_delay = p->compute_delay;
    out->compute_delay_samples = p->compute_delay_samples;
    out->in_z = p->in_z;
    out->relax_sampling_zeros = false;
    if (p->in_z)
        out->delay = 0.0; /* refused by ps_plant_check; a model in z holds its delay as poles at 0 */
    ps_status st = PS_OK;
    switch (p->form) {
    case PS_FORM_POLY: {
        int np = ps_roots_poly(ws, p->den, p->n_den, out->poles, d);
        if (np < 0)
            return locate(d, p, PS_F_DEN);
        int nz = ps_roots_poly(ws, p->num, p->n_num, out->zeros, d);
        if (nz < 0)
            return locate(d, p, PS_F_NUM);
        out->n_poles = (size_t)np;
        out->n_zeros = (size_t)nz;
        out->gain = p->num[0] / p->den[0];
        out->rel_degree = np - nz;
        if (np > 15)
            ps_plant_warn(p, "order %d from expanded coefficients: roots may be inaccurate; "
                             "prefer factored or state-space input", np);
        if (p->in_z)
            classify_unit_circle(out);
        check_cancellations(p, out, true);
        break;
    }
    case PS_FORM_FACTORED: {
        double tol_base = 16 * DBL_EPSILON;
        for (size_t i = 0; i < p->n_poles; i++)
            out->poles[i] = (ps_root){p->poles[i], PS_LHP, 1, tol_base * hypot(p->poles[i].re, p->poles[i].im)};
        for (size_t i = 0; i < p->n_zeros; i++)
            out->zeros[i] = (ps_root){p->zeros[i], PS_LHP, 1, tol_base * hypot(p->zeros[i].re, p->zeros[i].im)};
        out->n_poles = p->n_poles;
        out->n_zeros = p->n_zeros;
        finish_roots(out->poles, out->n_poles, 0.0);
        finish_roots(out->zeros, out->n_zeros, 0.0);
        out->gain = p->gain;
        out->rel_degree = (int)(p->n_poles - p->n_zeros);
        if (p->in_z)
            classify_unit_circle(out);
        check_cancellations(p, out, true);
        break;
    }
    case PS_FORM_SS: {
        size_t dropped = 0;
        double from = 0;
        if ((st = ss_markov(ws, p, out, d)) != PS_OK || (st = ss_poles(ws, p, out, d)) != PS_OK ||
            (st = ss_zeros(ws, p, out, &dropped, &from, d)) != PS_OK)
            return st;
        if (dropped)
            ps_plant_warn(p, "the pencil gave %zu finite eigenvalues more than relative degree %d allows; "
                             "the largest (|z| >= %.3g) are taken as infinite (rounding of the eigenvalues "
                             "at infinity)",
                          dropped, out->rel_degree, from);
        if (p->in_z)
            classify_unit_circle(out);
        hidden_modes_ss(ws, p, out);
        if ((int)(out->n_poles - out->n_zeros) != out->rel_degree)
            ps_plant_warn(p, "pencil gives %zu finite zeros but the Markov parameters give relative "
                             "degree %d: check the realisation",
                          out->n_zeros, out->rel_degree);
        check_cancellations(p, out, false);
        break;
    }
    default:
        return ps_diag_set(d, PS_ERR_INPUT, p->line, 0, "", "plant has no checked model form");
    }
    count_regions(out);
    return PS_OK;
}

ps_status ps_roots_held(ps_roots_ws *ws, const ps_held *held, const ps_analysis *cont, ps_held_roots *out,
                        ps_diag *d)
{
    const ps_plant *z = &held->ss;
    out->n_poles = out->n_zeros = 0;
    if (cont->n_poles != held->n || z->form != PS_FORM_SS || z->a_rows < held->n)
        return ps_diag_set(d, PS_ERR_INPUT, z->line, 0, "", "held plant of order %zu does not match %zu poles",
                           held->n, cont->n_poles);
    ps_analysis a;
    a.n_poles = a.n_zeros = 0;
    size_t dropped = 0;
    double from = 0;
    ps_status st;
    if ((st = ss_markov(ws, z, &a, d)) != PS_OK || (st = ss_zeros(ws, z, &a, &dropped, &from, d)) != PS_OK)
        return st;
    /* The pole of e^{A h} for an eigenvalue p of A is e^{p h}. */
    for (size_t i = 0; i < held->n; i++) {
        double r = exp(cont->poles[i].v.re * held->h), w = cont->poles[i].v.im * held->h;
        out->poles[i] = (ps_cplx){r * cos(w), r * sin(w)};
    }
    for (size_t i = held->n; i < z->a_rows; i++)
        out->poles[i] = (ps_cplx){0.0, 0.0};
    out->n_poles = z->a_rows;
    for (size_t i = 0; i < a.n_zeros; i++)
        out->zeros[i] = a.zeros[i].v;
    out->n_zeros = a.n_zeros;
    out->gain = a.gain;
    out->rel_degree = a.rel_degree;
    return PS_OK;
}
