/* discrete.c - the matrix exponential (scaling and squaring, Pade 13) and the
 * zero-order-hold equivalent of a continuous plant with a fractional input delay. */
#include "model/discrete.h"

#include <float.h>
#include <gsl/gsl_blas.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

enum { KMAX = PS_MAX_ORDER + 1 }; /* augmented [[A, B], [0, 0]] */

struct ps_discrete_ws {
    double w[KMAX * KMAX], a2[KMAX * KMAX], a4[KMAX * KMAX], a6[KMAX * KMAX];
    double u[KMAX * KMAX], v[KMAX * KMAX], t1[KMAX * KMAX], t2[KMAX * KMAX];
    double aug[KMAX * KMAX], e1[KMAX * KMAX], e2[KMAX * KMAX];
    double tau[KMAX];
    /* continuous realisation */
    double a[PS_MAX_ORDER * PS_MAX_ORDER], b[PS_MAX_ORDER], c[PS_MAX_ORDER];
    double num[PS_MAX_ORDER + 1], den[PS_MAX_ORDER + 1];
};

ps_discrete_ws *ps_discrete_ws_new(void)
{
    return calloc(1, sizeof(ps_discrete_ws));
}

void ps_discrete_ws_free(ps_discrete_ws *ws)
{
    free(ws);
}

/* Coefficients b_0..b_13 of the [13/13] Pade approximant of e^x and the
 * 1-norm bound theta_13 below which it is accurate to unit roundoff (Higham 2005,
 * table 2.3 and eq. 2.10). */
static const double pade13[14] = {64764752532480000.0, 32382376266240000.0, 7771770303897600.0,
                                  1187353796428800.0,  129060195264000.0,   10559470521600.0,
                                  670442572800.0,      33522128640.0,       1323241920.0,
                                  40840800.0,          960960.0,            16380.0,
                                  182.0,               1.0};
static const double theta13 = 5.371920351148152;

static void mul(const double *x, const double *y, double *out, size_t k)
{
    gsl_matrix_const_view X = gsl_matrix_const_view_array(x, k, k), Y = gsl_matrix_const_view_array(y, k, k);
    gsl_matrix_view O = gsl_matrix_view_array(out, k, k);
    gsl_blas_dgemm(CblasNoTrans, CblasNoTrans, 1.0, &X.matrix, &Y.matrix, 0.0, &O.matrix);
}

ps_status ps_discrete_expm(ps_discrete_ws *ws, const double *M, size_t k, double tau, double *out, ps_diag *d)
{
    size_t kk = k * k;
    double norm1 = 0;
    for (size_t j = 0; j < k; j++) {
        double s = 0;
        for (size_t i = 0; i < k; i++)
            s += fabs(M[i * k + j] * tau);
        norm1 = fmax(norm1, s);
    }
    if (!isfinite(norm1))
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "matrix exponential of a non-finite matrix");
    int sq = 0;
    if (norm1 > theta13)
        sq = (int)ceil(log2(norm1 / theta13));
    if (sq > 1000)
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "matrix exponential: norm %.3g too large", norm1);
    double scale = ldexp(tau, -sq);
    double *W = ws->w, *A2 = ws->a2, *A4 = ws->a4, *A6 = ws->a6, *U = ws->u, *V = ws->v, *T = ws->t1;
    for (size_t i = 0; i < kk; i++)
        W[i] = M[i] * scale;
    mul(W, W, A2, k);
    mul(A2, A2, A4, k);
    mul(A4, A2, A6, k);
    const double *b = pade13;
    /* U = W [A6 (b13 A6 + b11 A4 + b9 A2) + b7 A6 + b5 A4 + b3 A2 + b1 I],
     * V = A6 (b12 A6 + b10 A4 + b8 A2) + b6 A6 + b4 A4 + b2 A2 + b0 I (Higham 2005, eq. 2.2-2.4). */
    for (size_t i = 0; i < kk; i++)
        T[i] = b[13] * A6[i] + b[11] * A4[i] + b[9] * A2[i];
    mul(A6, T, U, k);
    for (size_t i = 0; i < kk; i++)
        U[i] += b[7] * A6[i] + b[5] * A4[i] + b[3] * A2[i];
    for (size_t i = 0; i < k; i++)
        U[i * k + i] += b[1];
    memcpy(T, U, kk * sizeof *T);
    mul(W, T, U, k);
    for (size_t i = 0; i < kk; i++)
        T[i] = b[12] * A6[i] + b[10] * A4[i] + b[8] * A2[i];
    mul(A6, T, V, k);
    for (size_t i = 0; i < kk; i++)
        V[i] += b[6] * A6[i] + b[4] * A4[i] + b[2] * A2[i];
    for (size_t i = 0; i < k; i++)
        V[i * k + i] += b[0];
    /* (V - U) X = (V + U) */
    double *P = ws->t2;
    for (size_t i = 0; i < kk; i++) {
        P[i] = V[i] - U[i];
        out[i] = V[i] + U[i];
    }
    /* Householder QR, not LU: GSL 2.7's gsl_linalg_LU_decomp allocates a
     * vector inside (test_noalloc saw it); QR_decomp takes tau from us. V - U
     * is well conditioned after scaling (Higham 2005, sec. 2). */
    gsl_matrix_view Pm = gsl_matrix_view_array(P, k, k);
    gsl_vector_view hh = gsl_vector_view_array(ws->tau, k);
    int rc = gsl_linalg_QR_decomp(&Pm.matrix, &hh.vector);
    for (size_t i = 0; rc == GSL_SUCCESS && i < k; i++)
        if (!(fabs(P[i * k + i]) > 0))
            rc = GSL_ESING;
    for (size_t j = 0; rc == GSL_SUCCESS && j < k; j++) {
        gsl_vector_view col = gsl_vector_view_array_with_stride(out + j, k, k);
        rc = gsl_linalg_QR_svx(&Pm.matrix, &hh.vector, &col.vector);
    }
    if (rc != GSL_SUCCESS)
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "matrix exponential: Pade denominator singular (%s)",
                           gsl_strerror(rc));
    for (int s = 0; s < sq; s++) {
        memcpy(T, out, kk * sizeof *T);
        mul(T, T, out, k);
    }
    for (size_t i = 0; i < kk; i++)
        if (!isfinite(out[i]))
            return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "matrix exponential overflows (1-norm of M tau %.3g)",
                               norm1);
    return PS_OK;
}

/* Multiply the DESCENDING polynomial c (*n coefficients) by (s^2 + p1 s + p0) or, with
 * quad false, by (s + p0). */
static void poly_mul(double *c, size_t *n, bool quad, double p1, double p0)
{
    size_t add = quad ? 2 : 1, nn = *n + add;
    for (size_t i = nn; i-- > 0;) {
        double v = i < *n ? c[i] : 0.0;
        if (quad) {
            if (i >= 1 && i - 1 < *n)
                v += p1 * c[i - 1];
            if (i >= 2 && i - 2 < *n)
                v += p0 * c[i - 2];
        } else if (i >= 1 && i - 1 < *n) {
            v += p0 * c[i - 1];
        }
        c[i] = v;
    }
    *n = nn;
}

/* Expand roots (a pair stored as both members) into a monic DESCENDING polynomial. */
static void expand(const ps_cplx *r, size_t nr, double *c, size_t *n)
{
    c[0] = 1.0;
    *n = 1;
    for (size_t i = 0; i < nr; i++) {
        if (r[i].im == 0.0)
            poly_mul(c, n, false, 0.0, -r[i].re);
        else if (r[i].im > 0.0)
            poly_mul(c, n, true, -2.0 * r[i].re, r[i].re * r[i].re + r[i].im * r[i].im);
    }
}

/* Controllable canonical realisation of num/den (DESCENDING, nn <= nd):
 * x1' = x2, ..., xn' = -sum a_j x_{n-j+1} + u, y = sum (beta_j - d a_j) x + d u
 * (Kailath, Linear Systems, 1980, sec. 2.1, from memory). */
static double canonical(ps_discrete_ws *ws, const double *num, size_t nn, const double *den, size_t nd)
{
    size_t n = nd - 1;
    memset(ws->a, 0, n * n * sizeof *ws->a);
    for (size_t i = 0; i + 1 < n; i++)
        ws->a[i * n + i + 1] = 1.0;
    for (size_t j = 0; j < n; j++) {
        ws->a[(n - 1) * n + j] = -den[n - j] / den[0];
        ws->b[j] = j == n - 1 ? 1.0 : 0.0;
    }
    double pad[PS_MAX_ORDER + 1] = {0};
    memcpy(pad + (nd - nn), num, nn * sizeof *num);
    double dd = pad[0] / den[0];
    for (size_t j = 0; j < n; j++)
        ws->c[j] = pad[n - j] / den[0] - dd * den[n - j] / den[0];
    return dd;
}

/* The continuous realisation into ws->a, b, c; returns its order, *dd its D. */
static size_t realise(ps_discrete_ws *ws, const ps_plant *p, double *dd)
{
    switch (p->form) {
    case PS_FORM_SS: {
        size_t n = p->a_rows;
        memcpy(ws->a, p->a, n * n * sizeof *ws->a);
        memcpy(ws->b, p->b, n * sizeof *ws->b);
        memcpy(ws->c, p->c, n * sizeof *ws->c);
        *dd = p->d;
        return n;
    }
    case PS_FORM_POLY:
        *dd = canonical(ws, p->num, p->n_num, p->den, p->n_den);
        return p->n_den - 1;
    case PS_FORM_FACTORED: {
        size_t nn = 0, nd = 0;
        expand(p->zeros, p->n_zeros, ws->num, &nn);
        expand(p->poles, p->n_poles, ws->den, &nd);
        for (size_t i = 0; i < nn; i++)
            ws->num[i] *= p->gain;
        *dd = canonical(ws, ws->num, nn, ws->den, nd);
        return nd - 1;
    }
    default:
        return (size_t)-1;
    }
}

/* e^{[[A, B], [0, 0]] tau} = [[e^{A tau}, int_0^tau e^{A s} ds B], [0, 1]] (Van Loan,
 * IEEE TAC 23(3), 1978; Moler & Van Loan, SIAM Review 45(1), 2003, sec. 10, from memory).
 * Leaves the (n+1) x (n+1) result in e. */
static ps_status aug_expm(ps_discrete_ws *ws, size_t n, double tau, double *e, ps_diag *d)
{
    size_t k = n + 1;
    memset(ws->aug, 0, k * k * sizeof *ws->aug);
    for (size_t i = 0; i < n; i++) {
        memcpy(ws->aug + i * k, ws->a + i * n, n * sizeof *ws->a);
        ws->aug[i * k + n] = ws->b[i];
    }
    return ps_discrete_expm(ws, ws->aug, k, tau, e, d);
}

ps_status ps_discrete_hold(ps_discrete_ws *ws, const ps_plant *p, double h, double theta, ps_held *out,
                           ps_diag *d)
{
    if (!(isfinite(h) && h > 0))
        return ps_diag_set(d, PS_ERR_INPUT, p->line, 0, "", "sample period must be finite and positive, got %g", h);
    if (!(isfinite(theta) && theta >= 0))
        return ps_diag_set(d, PS_ERR_INPUT, p->line, 0, "delay", "delay must be finite and >= 0, got %g", theta);
    double dd = 0;
    size_t n = realise(ws, p, &dd);
    if (n == (size_t)-1)
        return ps_diag_set(d, PS_ERR_INPUT, p->line, 0, "", "plant has no checked model form");
    double q = theta / h, mq = floor(q), f = q - mq;
    if (f < PS_DELAY_SNAP)
        f = 0.0;
    else if (f > 1.0 - PS_DELAY_SNAP) {
        f = 0.0;
        mq += 1.0;
    }
    if (mq + (f > 0) > (double)(PS_MAX_ORDER - n))
        return ps_diag_set(d, PS_ERR_INPUT, p->line, 0, "delay",
                           "a delay of %.6g samples makes the held plant's order exceed %d", q, PS_MAX_ORDER);
    unsigned m = (unsigned)mq;
    size_t L = m + (f > 0), N = n + L, k = n + 1;
    out->h = h;
    out->theta = theta;
    out->m = m;
    out->f = f;
    out->n = n;
    ps_status st;
    double *E = ws->e1, *E2 = ws->e2;
    if ((st = aug_expm(ws, n, h, E, d)) != PS_OK)
        return st;
    for (size_t i = 0; i < n; i++) {
        memcpy(out->phi + i * n, E + i * k, n * sizeof *E);
        out->gamma0[i] = E[i * k + n];
        out->gamma1[i] = 0.0;
    }
    if (f > 0) {
        /* Gamma0 = Gamma((1-f) h) and Gamma1 = e^{A (1-f) h} Gamma(f h), each from
         * its own exponential: Gamma(h) - Gamma((1-f) h) would cancel for small f. */
        if ((st = aug_expm(ws, n, (1.0 - f) * h, E, d)) != PS_OK ||
            (st = aug_expm(ws, n, f * h, E2, d)) != PS_OK)
            return st;
        for (size_t i = 0; i < n; i++) {
            out->gamma0[i] = E[i * k + n];
            double s = 0;
            for (size_t j = 0; j < n; j++)
                s += E[i * k + j] * E2[j * k + n];
            out->gamma1[i] = s;
        }
    }
    /* Realisation of order N: state [x; u[k-1]; ...; u[k-L]]. */
    ps_plant *z = &out->ss;
    ps_plant_reset(z);
    memcpy(z->id, p->id, sizeof z->id);
    z->line = p->line;
    memset(z->a, 0, N * N * sizeof *z->a);
    memset(z->b, 0, N * sizeof *z->b);
    memset(z->c, 0, N * sizeof *z->c);
    for (size_t i = 0; i < n; i++) {
        memcpy(z->a + i * N, out->phi + i * n, n * sizeof *z->a);
        z->c[i] = ws->c[i];
    }
    z->d = 0.0;
    /* u[k-m] enters x through Gamma0: from the input itself when m = 0, else
     * from the state u[k-m] (column n + m - 1). u[k-m-1] through Gamma1 (column
     * n + m). The output y[k] = C x[k] + D u(k h - theta) reads u[k-m] when
     * f = 0 and u[k-m-1] when f > 0 (k h - theta then lies inside that hold interval). */
    for (size_t i = 0; i < n; i++) {
        if (m == 0)
            z->b[i] = out->gamma0[i];
        else
            z->a[i * N + n + m - 1] = out->gamma0[i];
        if (f > 0)
            z->a[i * N + n + m] = out->gamma1[i];
    }
    if (L > 0) {
        z->b[n] = 1.0;
        for (size_t j = 1; j < L; j++)
            z->a[(n + j) * N + n + j - 1] = 1.0;
    }
    size_t dcol = f > 0 ? n + m : n + m - 1; /* valid when L > 0 */
    if (L == 0)
        z->d = dd;
    else
        z->c[dcol] += dd;
    z->a_rows = z->a_cols = z->n_b = z->n_c = N;
    z->form = PS_FORM_SS;
    for (size_t i = 0; i < N * N; i++)
        if (!isfinite(z->a[i]))
            return ps_diag_set(d, PS_ERR_NUMERIC, p->line, 0, "", "held plant not finite (e^{A h} overflows)");
    return PS_OK;
}
