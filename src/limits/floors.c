/* floors.c - requirement-free floors of one plant (see floors.h). */
#include "limits/floors.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <complex.h>

enum { NP = PS_MAX_ORDER };

static inline double complex cx(ps_cplx a) { return CMPLX(a.re, a.im); }

/* RHP roots as plain values (multiplicity kept: each member once). */
static size_t rhp(const ps_root *r, size_t n, ps_cplx *out)
{
    size_t k = 0;
    for (size_t i = 0; i < n; i++)
        if (r[i].region == PS_RHP)
            out[k++] = r[i].v;
    return k;
}

/* Are the points distinct (no repeated RHP root)? Pick/Chen need that. */
static bool distinct(const ps_cplx *s, size_t n)
{
    for (size_t i = 0; i < n; i++)
        for (size_t j = i + 1; j < n; j++)
            if (cabs(cx(s[i]) - cx(s[j])) <= 1e-9 * fmax(1.0, cabs(cx(s[i]))))
                return false;
    return true;
}

/* G_s(p) = k prod(p - z) / [prod_{non-RHP poles}(p - q) prod_{RHP i}(p + conj p_i)]:
 * the stable mirror of the plant, evaluated at an RHP pole (S&P 2nd ed. ch. 5). */
static double complex mirror_at(const ps_analysis *an, double complex p)
{
    double complex v = an->gain;
    for (size_t j = 0; j < an->n_zeros; j++)
        v *= p - cx(an->zeros[j].v);
    for (size_t i = 0; i < an->n_poles; i++) {
        double complex q = cx(an->poles[i].v);
        v /= an->poles[i].region == PS_RHP ? p + conj(q) : p - q;
    }
    return v;
}

void ps_floors_compute(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out)
{
    ps_cplx p[NP], z[NP], w[NP];
    size_t np = rhp(an->poles, an->n_poles, p), nz = rhp(an->zeros, an->n_zeros, z);
    double theta = an->delay;
    memset(out, 0, sizeof *out);
    out->bode_area = ps_bode_area(p, np);
    out->cond = 1.0;
    ps_diag d = {0};

    double ms_single = ps_ms_single(z, nz, p, np), mt_single = ps_mt_single(z, nz, p, np, theta);
    out->infinite = isinf(ms_single) || isinf(mt_single);
    bool ok_points = distinct(p, np) && distinct(z, nz);
    if (out->infinite) {
        out->ms_interpolation = out->mt_interpolation = INFINITY;
        snprintf(out->note, sizeof out->note, "%s",
                 an->hidden_unstable ? "hidden unstable mode: no controller can stabilize this plant"
                                     : "an RHP zero coincides with an RHP pole");
    } else if (np == 0) {
        out->ms_interpolation = ms_single; /* = 1: nothing to interpolate against */
        out->mt_interpolation = 1.0;
    } else if (!ok_points) {
        out->ms_interpolation = ms_single;
        out->mt_interpolation = mt_single;
        snprintf(out->note, sizeof out->note,
                 "repeated RHP roots: single-point products shown (joint floor needs the confluent form)");
    } else {
        /* Pick route: points p_i, values e^{p_i theta} / B_z(p_i). Without
         * delay this equals Chen's joint floor; with delay it is the floor on
         * ||T||, and on ||S|| by the commutant-lifting equality noted in the
         * README (held in every numerical check; labelled as such). */
        for (size_t i = 0; i < np; i++) {
            double complex v = cexp(cx(p[i]) * theta);
            for (size_t j = 0; j < nz; j++)
                v *= (cx(p[i]) + conj(cx(z[j]))) / (cx(p[i]) - cx(z[j]));
            w[i] = (ps_cplx){creal(v), cimag(v)};
        }
        double g, cond = 1.0;
        if (ps_pick_gamma(ws, p, w, np, &g, &cond, &d) == PS_OK) {
            out->mt_interpolation = fmax(g, mt_single);
            out->ms_interpolation = theta > 0 ? out->mt_interpolation : fmax(ms_single, 1.0);
            if (theta == 0 && nz > 0) {
                double chen, c2 = 1.0;
                if (ps_chen_floor(ws, z, nz, p, np, &chen, &c2, &d) == PS_OK)
                    out->ms_interpolation = fmax(chen, ms_single);
                cond = fmax(cond, c2);
            }
        } else {
            out->ms_interpolation = ms_single;
            out->mt_interpolation = mt_single;
            snprintf(out->note, sizeof out->note, "joint floor not computed (%.100s): single-point products shown",
                     d.text);
        }
        out->cond = cond;
    }

    /* Effort: Pick with points p_i and values e^{p_i theta} / G_s(p_i). */
    if (np == 0)
        out->effort = 0.0;
    else if (out->infinite)
        out->effort = INFINITY;
    else {
        double single = 0;
        for (size_t i = 0; i < np; i++) {
            double complex v = cexp(cx(p[i]) * theta) / mirror_at(an, cx(p[i]));
            w[i] = (ps_cplx){creal(v), cimag(v)};
            single = fmax(single, cabs(v));
        }
        double g, cond = 1.0;
        out->effort = (ok_points && ps_pick_gamma(ws, p, w, np, &g, &cond, &d) == PS_OK) ? fmax(g, single)
                                                                                           : single;
    }

    /* Requirement-dependent floors (README "Floors"). */
    out->ms_band = out->ms_poisson = out->mt_poisson = NAN;
    bool band = req && req->wb > 0, rolloff = req && req->wh > 0;
    if (rolloff)
        out->ms_band = ps_band_floor(out->bode_area, band ? req->wb : 0.0, band ? req->eps : 1.0, req->wh,
                                     req->delta, req->k);
    if (band)
        out->ms_poisson = out->infinite ? INFINITY : ps_poisson_s_floor(z, nz, p, np, req->eps, req->wb);
    if (rolloff && req->delta > 0)
        out->mt_poisson = out->infinite ? INFINITY
                                        : ps_poisson_t_floor(z, nz, p, np, theta, req->delta / (1 - req->delta), req->wh);

    /* Overall: the largest floor on each, with ||S|| >= ||T|| - 1 and ||T|| >= ||S|| - 1 (S + T = 1). */
    double s_only = out->ms_interpolation, t_only = out->mt_interpolation;
    const char *s_src = "interpolation";
    if (out->ms_band > s_only) {
        s_only = out->ms_band;
        s_src = "band";
    }
    if (out->ms_poisson > s_only) {
        s_only = out->ms_poisson;
        s_src = "poisson";
    }
    if (out->mt_poisson > t_only)
        t_only = out->mt_poisson;
    out->ms = fmax(s_only, t_only - 1.0);
    out->mt = fmax(t_only, s_only - 1.0);
    out->limiting = out->ms <= 1.0 ? "none" : out->ms == s_only ? s_src : "complementary";

    /* Crossover window, rules of thumb (S&P 2nd ed. ch. 5): w_c > 2 p for a
     * real RHP pole (|p| for complex), w_c < z/2 for a real RHP zero (|z|
     * for complex), w_c < 1/theta. */
    out->crossover_min = 0.0;
    for (size_t i = 0; i < np; i++)
        out->crossover_min = fmax(out->crossover_min, p[i].im == 0 ? 2 * p[i].re : cabs(cx(p[i])));
    out->crossover_max = INFINITY;
    for (size_t j = 0; j < nz; j++)
        out->crossover_max = fmin(out->crossover_max, z[j].im == 0 ? z[j].re / 2 : cabs(cx(z[j])));
    if (theta > 0)
        out->crossover_max = fmin(out->crossover_max, 1 / theta);
    if (rolloff)
        out->crossover_max = fmin(out->crossover_max, req->wh);
    out->window_open = out->crossover_min < out->crossover_max;
}
