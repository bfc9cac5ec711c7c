/* limits.c - Bode area, band-forced, interpolation and Pick floors.
 * Complex linear algebra uses GSL (Cholesky, triangular solves, Hermitian
 * eigenvalues) on views of workspace buffers: no allocation per plant. */
#include "limits/limits.h"
#include "limits/sampled.h"

#include <float.h>
#include <gsl/gsl_blas.h>
#include <gsl/gsl_complex.h>
#include <gsl/gsl_complex_math.h>
#include <gsl/gsl_eigen.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <math.h>
#include <stdlib.h>

#include "core/complex_make.h" /* after GSL: gsl_complex stays a struct */

enum { NP = PS_MAX_ORDER };

struct ps_limits_ws {
    double qa[2 * NP * NP], qb[2 * NP * NP], qc[2 * NP * NP];
    double ev[NP];
    gsl_eigen_herm_workspace *herm[NP + 1];
    double tail_delta, tail_k, tail_sum; /* last roll-off tail series (per unit w_h) */
    double log_eps_at, log_inv_eps;      /* last band attenuation and ln(1/eps) */
    bool tail_valid;
    bool skip_effort; /* probes that do not count effort skip its Pick problem */
    ps_sampled_ws *sampled; /* the digital loop's plant (limits/sampled.h) */
};

ps_sampled_ws *ps_limits_sampled(ps_limits_ws *ws)
{
    return ws->sampled;
}

void ps_limits_skip_effort(ps_limits_ws *ws, bool skip) { ws->skip_effort = skip; }
bool ps_limits_effort_skipped(const ps_limits_ws *ws) { return ws->skip_effort; }

/* Everything the per-plant path needs is allocated here, once: the
 * eigen-solver workspaces for every matrix size included. */
ps_limits_ws *ps_limits_ws_new(void)
{
    ps_limits_ws *ws = calloc(1, sizeof(ps_limits_ws));
    if (!ws)
        return NULL;
    for (size_t i = 1; i <= NP; i++)
        if (!(ws->herm[i] = gsl_eigen_herm_alloc(i))) {
            ps_limits_ws_free(ws);
            return NULL;
        }
    /* the digital loop's workspace too: the per-plant path allocates nothing */
    if (!(ws->sampled = ps_sampled_ws_new())) {
        ps_limits_ws_free(ws);
        return NULL;
    }
    return ws;
}

void ps_limits_ws_free(ps_limits_ws *ws)
{
    if (!ws)
        return;
    for (size_t i = 0; i <= NP; i++)
        if (ws->herm[i])
            gsl_eigen_herm_free(ws->herm[i]);
    ps_sampled_ws_free(ws->sampled);
    free(ws);
}

static inline double complex cx(ps_cplx a) { return ps_complex_make(a.re, a.im); }

double ps_bode_area(const ps_cplx *p, size_t np)
{
    double s = 0;
    for (size_t i = 0; i < np; i++)
        s += p[i].re;
    return M_PI * s;
}

double ps_rolloff_tail(double wh, double delta, double k)
{
    if (delta <= 0)
        return 0.0;
    double sum = 0, dn = 1;
    for (int n = 1; n < 100000; n++) {
        dn *= delta;
        double term = dn / (n * (n * (1 + k) - 1));
        sum += term;
        if (term < 1e-17 * sum)
            break;
    }
    return wh * sum;
}

double ps_rolloff_tail_ws(ps_limits_ws *ws, double wh, double delta, double k)
{
    /* The tail series depends on delta and k only (I = w_h * sum): a run
     * with shared requirements sums it once. */
    if (!ws->tail_valid || ws->tail_delta != delta || ws->tail_k != k) {
        ws->tail_sum = ps_rolloff_tail(1.0, delta, k);
        ws->tail_delta = delta;
        ws->tail_k = k;
        ws->tail_valid = true;
    }
    return wh * ws->tail_sum;
}

double ps_band_floor_ln_ws(ps_limits_ws *ws, double F, double wb, double eps, double wh, double delta, double k)
{
    double tail = ps_rolloff_tail_ws(ws, wh, delta, k);
    if (wb > 0 && eps != ws->log_eps_at) { /* the band target and curve keep eps */
        ws->log_eps_at = eps;
        ws->log_inv_eps = log(1 / eps);
    }
    double band = wb > 0 ? wb * ws->log_inv_eps : 0.0;
    return (F + band - tail) / (wh - wb);
}

double ps_band_floor_ws(ps_limits_ws *ws, double F, double wb, double eps, double wh, double delta, double k)
{
    return exp(ps_band_floor_ln_ws(ws, F, wb, eps, wh, delta, k));
}

double ps_band_floor(double F, double wb, double eps, double wh, double delta, double k)
{
    double band = wb > 0 ? wb * log(1 / eps) : 0.0;
    return exp((F + band - ps_rolloff_tail(wh, delta, k)) / (wh - wb));
}

/* The products through their logarithms (one loop for both forms). */
double ps_ms_single(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np)
{
    return exp(ps_ms_single_ln(z, nz, p, np));
}

double ps_mt_single(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta)
{
    return exp(ps_mt_single_ln(z, nz, p, np, theta));
}

double ps_ms_single_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np)
{
    double best = 0.0;
    for (size_t j = 0; j < nz; j++) {
        double sum = 0.0;
        for (size_t i = 0; i < np; i++) {
            double den = cabs(cx(z[j]) - cx(p[i]));
            if (den == 0)
                return INFINITY;
            sum += log(cabs(cx(z[j]) + conj(cx(p[i])))) - log(den);
        }
        best = fmax(best, sum);
    }
    return best;
}

double ps_mt_single_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta)
{
    double best = 0.0;
    for (size_t i = 0; i < np; i++) {
        double sum = p[i].re * theta;
        for (size_t j = 0; j < nz; j++) {
            double den = cabs(cx(z[j]) - cx(p[i]));
            if (den == 0)
                return INFINITY;
            sum += log(cabs(conj(cx(z[j])) + cx(p[i]))) - log(den);
        }
        best = fmax(best, sum);
    }
    return best;
}

/* Cholesky of the Hermitian n x n matrix in buf (lower triangle used). The
 * condition estimate is (max pivot / min pivot)^2 of L. */
static ps_status chol(double *buf, size_t n, double *cond, ps_diag *d, const char *what)
{
    gsl_matrix_complex_view M = gsl_matrix_complex_view_array(buf, n, n);
    int rc = gsl_linalg_complex_cholesky_decomp(&M.matrix);
    if (rc != GSL_SUCCESS)
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "",
                           "%s matrix is not positive definite in floating point (repeated or "
                           "near-coincident points): %s",
                           what, gsl_strerror(rc));
    double lo = INFINITY, hi = 0;
    for (size_t i = 0; i < n; i++) {
        double v = GSL_REAL(gsl_matrix_complex_get(&M.matrix, i, i));
        lo = fmin(lo, v);
        hi = fmax(hi, v);
    }
    double c = lo > 0 ? (hi / lo) * (hi / lo) : INFINITY;
    *cond = fmax(*cond, c);
    if (!(c < 1e14))
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "",
                           "%s matrix is too ill-conditioned (estimate %.2g): points nearly coincide", what, c);
    return PS_OK;
}

/* Largest eigenvalue of the Hermitian n x n matrix in buf (destroyed). */
static ps_status lambda_max(ps_limits_ws *ws, double *buf, size_t n, double *out, ps_diag *d)
{
    gsl_eigen_herm_workspace *w = ws->herm[n];
    gsl_matrix_complex_view M = gsl_matrix_complex_view_array(buf, n, n);
    gsl_vector_view ev = gsl_vector_view_array(ws->ev, n);
    int rc = gsl_eigen_herm(&M.matrix, &ev.vector, w);
    if (rc != GSL_SUCCESS)
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "Hermitian eigenvalues failed: %s", gsl_strerror(rc));
    double m = -INFINITY;
    for (size_t i = 0; i < n; i++)
        m = fmax(m, ws->ev[i]);
    *out = m;
    return PS_OK;
}

static void set(double *buf, size_t ld, size_t i, size_t j, double complex v)
{
    buf[2 * (i * ld + j)] = creal(v);
    buf[2 * (i * ld + j) + 1] = cimag(v);
}

ps_status ps_chen_floor(ps_limits_ws *ws, const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np,
                        double *out, double *cond, ps_diag *d)
{
    *cond = 1.0;
    if (nz == 0 || np == 0) {
        *out = 1.0;
        return PS_OK;
    }
    /* Conventions (LIMITS sheet): [Qz]_ik = 1/(z_i + conj z_k),
     * [Qp]_jl = 1/(conj p_j + p_l), [Qzp]_ij = 1/(z_i - p_j). */
    for (size_t i = 0; i < nz; i++)
        for (size_t k = 0; k < nz; k++)
            set(ws->qa, nz, i, k, 1.0 / (cx(z[i]) + conj(cx(z[k]))));
    for (size_t j = 0; j < np; j++)
        for (size_t l = 0; l < np; l++)
            set(ws->qb, np, j, l, 1.0 / (conj(cx(p[j])) + cx(p[l])));
    for (size_t i = 0; i < nz; i++)
        for (size_t j = 0; j < np; j++) {
            double complex dz = cx(z[i]) - cx(p[j]);
            if (dz == 0) {
                *out = INFINITY;
                return PS_OK; /* exact RHP cancellation: no controller stabilizes */
            }
            set(ws->qc, np, i, j, 1.0 / dz);
        }
    ps_status st = chol(ws->qa, nz, cond, d, "zero (Qz)");
    if (st == PS_OK)
        st = chol(ws->qb, np, cond, d, "pole (Qp)");
    if (st != PS_OK)
        return st;
    gsl_matrix_complex_view Lz = gsl_matrix_complex_view_array(ws->qa, nz, nz);
    gsl_matrix_complex_view Lp = gsl_matrix_complex_view_array(ws->qb, np, np);
    gsl_matrix_complex_view X = gsl_matrix_complex_view_array(ws->qc, nz, np);
    gsl_complex one = gsl_complex_rect(1, 0);
    /* Y = Lz^-1 Qzp Lp^-H; then sigma_max(Y)^2 = lambda_max(Y^H Y). */
    gsl_blas_ztrsm(CblasLeft, CblasLower, CblasNoTrans, CblasNonUnit, one, &Lz.matrix, &X.matrix);
    gsl_blas_ztrsm(CblasRight, CblasLower, CblasConjTrans, CblasNonUnit, one, &Lp.matrix, &X.matrix);
    gsl_matrix_complex_view G = gsl_matrix_complex_view_array(ws->qa, np, np);
    gsl_blas_zgemm(CblasConjTrans, CblasNoTrans, one, &X.matrix, &X.matrix, gsl_complex_rect(0, 0),
                   &G.matrix);
    double lmax;
    if ((st = lambda_max(ws, ws->qa, np, &lmax, d)) != PS_OK)
        return st;
    *out = sqrt(1.0 + fmax(lmax, 0.0));
    return PS_OK;
}

/* Taylor coefficient (a, b) of 1/(conj s + t) at (s_k, s_l):
 * (-1)^{a+b} C(a+b, a) / (conj s_k + s_l)^{a+b+1}. */
static double complex kernel_coef(double complex sk, double complex sl, unsigned a, unsigned b)
{
    double binom = 1;
    for (unsigned i = 1; i <= b; i++)
        binom = binom * (a + i) / i;
    double complex base = conj(sk) + sl, pw = base;
    for (unsigned i = 0; i < a + b; i++)
        pw *= base;
    return ((a + b) % 2 ? -binom : binom) / pw;
}

ps_status ps_pick_confluent(ps_limits_ws *ws, const ps_cplx *s, const unsigned *mult, size_t npts,
                            const ps_cplx *taylor, double *out, double *cond, ps_diag *d)
{
    *cond = 1.0;
    size_t n = 0, start[NP];
    for (size_t k = 0; k < npts; k++) {
        start[k] = n;
        n += mult[k];
    }
    if (n == 0) {
        *out = 0.0;
        return PS_OK;
    }
    if (n > NP)
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "more interpolation conditions (%zu) than supported (%d)",
                           n, NP);
    if (n == 1 && s[0].re > 0) {
        /* One point: the constant function meets it, so the least norm is
         * |w| (the 1 x 1 Pick matrix gives the same, one rounding apart). */
        *out = hypot(taylor[0].re, taylor[0].im);
        return PS_OK;
    }
    for (size_t k = 0; k < npts; k++)
        for (size_t l = 0; l < npts; l++) {
            double complex sk = cx(s[k]), sl = cx(s[l]);
            const ps_cplx *hk = taylor + start[k], *hl = taylor + start[l];
            for (unsigned a = 0; a < mult[k]; a++)
                for (unsigned b = 0; b < mult[l]; b++) {
                    double complex bab = 0;
                    for (unsigned al = 0; al <= a; al++)
                        for (unsigned be = 0; be <= b; be++)
                            bab += conj(cx(hk[al])) * cx(hl[be]) * kernel_coef(sk, sl, a - al, b - be);
                    set(ws->qa, n, start[k] + a, start[l] + b, kernel_coef(sk, sl, a, b));
                    set(ws->qb, n, start[k] + a, start[l] + b, bab);
                }
        }
    ps_status st = chol(ws->qa, n, cond, d, "Pick (point)");
    if (st != PS_OK)
        return st;
    gsl_matrix_complex_view L = gsl_matrix_complex_view_array(ws->qa, n, n);
    gsl_matrix_complex_view B = gsl_matrix_complex_view_array(ws->qb, n, n);
    gsl_complex one = gsl_complex_rect(1, 0);
    gsl_blas_ztrsm(CblasLeft, CblasLower, CblasNoTrans, CblasNonUnit, one, &L.matrix, &B.matrix);
    gsl_blas_ztrsm(CblasRight, CblasLower, CblasConjTrans, CblasNonUnit, one, &L.matrix, &B.matrix);
    double lmax;
    if ((st = lambda_max(ws, ws->qb, n, &lmax, d)) != PS_OK)
        return st;
    *out = sqrt(fmax(lmax, 0.0));
    return PS_OK;
}

ps_status ps_pick_gamma(ps_limits_ws *ws, const ps_cplx *s, const ps_cplx *w, size_t n, double *out,
                        double *cond, ps_diag *d)
{
    unsigned ones[NP];
    if (n > NP)
        return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "more interpolation points (%zu) than supported (%d)", n,
                           NP);
    for (size_t k = 0; k < n; k++)
        ones[k] = 1;
    return ps_pick_confluent(ws, s, ones, n, w, out, cond, d);
}

double ps_gain_margin_from_ms(double ms) { return ms > 1 ? ms / (ms - 1) : INFINITY; }
double ps_phase_margin_from_ms(double ms) { return ms >= 0.5 ? 2 * asin(1 / (2 * ms)) * 180 / M_PI : NAN; }
double ps_gain_margin_from_mt(double mt) { return mt > 0 ? 1 + 1 / mt : INFINITY; }
double ps_phase_margin_from_mt(double mt) { return ps_phase_margin_from_ms(mt); }

/* Weighted length of the band |w| <= wb seen from the point x + jy (x > 0). */
static double band_angle(ps_cplx s, double wb)
{
    return atan((wb - s.im) / s.re) + atan((wb + s.im) / s.re);
}

/* ln of a single-point product: log of the value where it is finite (so
 * that the exponentials below are those of the plain formula), else the
 * sum of logarithms (the value overflowed). */
static double ln_of(double value, double ln) { return isfinite(value) ? log(value) : ln; }

double ps_poisson_s_floor_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double eps, double wb)
{
    /* Each zero's value is at least 1 (b >= 1, eps < 1); with no zero there
     * is no Poisson constraint, and 0 (ln -inf) says so. */
    double best = -INFINITY;
    for (size_t j = 0; j < nz; j++) {
        if (z[j].im < 0)
            continue; /* one bound per complex pair */
        double lb = ln_of(ps_ms_single(&z[j], 1, p, np), ps_ms_single_ln(&z[j], 1, p, np)), th = band_angle(z[j], wb);
        /* ln of (1/eps)^(th/(pi-th)) * b^(pi/(pi-th)) */
        best = fmax(best, (th * log(1 / eps) + M_PI * lb) / (M_PI - th));
    }
    return best;
}

double ps_poisson_s_floor(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double eps, double wb)
{
    return exp(ps_poisson_s_floor_ln(z, nz, p, np, eps, wb));
}

double ps_poisson_t_floor_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta,
                             double eps_t, double wh)
{
    /* Reported as computed, below 1 too (eps_t > 1 when delta > 0.5), like
     * the band floor: a value below 1 is not binding. */
    double best = -INFINITY;
    for (size_t i = 0; i < np; i++) {
        if (p[i].im < 0)
            continue;
        double lb = ln_of(ps_mt_single(z, nz, &p[i], 1, theta), ps_mt_single_ln(z, nz, &p[i], 1, theta));
        double th = band_angle(p[i], wh);
        /* ln of (1/eps_t)^((pi-th)/th) * b^(pi/th) */
        best = fmax(best, ((M_PI - th) * log(1 / eps_t) + M_PI * lb) / th);
    }
    return best;
}

double ps_poisson_t_floor(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta,
                          double eps_t, double wh)
{
    return exp(ps_poisson_t_floor_ln(z, nz, p, np, theta, eps_t, wh));
}
