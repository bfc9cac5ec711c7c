/* sampled.c - the plant of a digital loop in z and in w = (z - 1)/(z + 1) (see sampled.h). */
#include "limits/sampled.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "core/complex_make.h"
#include "model/discrete.h"

struct ps_sampled_ws {
    ps_discrete_ws *dws;
    ps_roots_ws *rws;
    ps_plant cont;       /* the transfer function of the analysis, factored */
    ps_held held;
    ps_held_roots hr;
    ps_analysis key;     /* the analysis of the view kept */
    bool valid;
    ps_sampled_view view;
};

ps_sampled_ws *ps_sampled_ws_new(void)
{
    ps_sampled_ws *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    ws->dws = ps_discrete_ws_new();
    ws->rws = ps_roots_ws_new();
    if (!ws->dws || !ws->rws) {
        ps_sampled_ws_free(ws);
        return NULL;
    }
    return ws;
}

void ps_sampled_ws_free(ps_sampled_ws *ws)
{
    if (!ws)
        return;
    ps_discrete_ws_free(ws->dws);
    ps_roots_ws_free(ws->rws);
    free(ws);
}

static inline double complex cx(ps_cplx a) { return ps_complex_make(a.re, a.im); }
static inline ps_cplx pc(double complex a) { return (ps_cplx){creal(a), cimag(a)}; }

ps_cplx ps_sampled_w_of_s(ps_cplx p, double h)
{
    return pc(ctanh(cx(p) * (0.5 * h)));
}

/* Class of a root in z against the unit circle (PS_CIRCLE_RTOL, or the
 * root's own error estimate when larger). */
static ps_region circle_region(ps_cplx z, double tol)
{
    double r = cabs(cx(z)), t = fmax(tol, PS_CIRCLE_RTOL * fmax(1.0, r));
    return r > 1.0 + t ? PS_RHP : r < 1.0 - t ? PS_LHP : PS_AXIS;
}

static bool at_minus_one(ps_cplx z)
{
    return cabs(cx(z) + 1.0) <= PS_CIRCLE_RTOL * 4;
}

/* Mark which zeros in z are images e^{z_c h} of the plant's zeros z_c (the
 * nearest unclaimed one each); the others the hold made. */
static void mark_sampling(ps_sampled_view *v, const ps_analysis *an)
{
    bool claimed[PS_MAX_ORDER] = {false};
    for (size_t j = 0; j < an->n_zeros; j++) {
        double complex img = cexp(cx(an->zeros[j].v) * v->h);
        size_t best = SIZE_MAX;
        double bd = INFINITY;
        for (size_t i = 0; i < v->n_zz; i++)
            if (!claimed[i] && cabs(cx(v->zz[i]) - img) < bd) {
                bd = cabs(cx(v->zz[i]) - img);
                best = i;
            }
        if (best != SIZE_MAX)
            claimed[best] = true;
    }
    v->n_sampling = 0;
    for (size_t i = 0; i < v->n_zz; i++) {
        v->zz_sampling[i] = !claimed[i];
        v->n_sampling += !claimed[i];
    }
}

/* The plant in w from the roots in z (v->zp, v->zz with their classes,
 * poles classed in pole_region), gain and relative degree. Substituting
 * z = (1 + w)/(1 - w): z - a = (1 + a)(w - w_a)/(1 - w) with w_a = (a - 1)/(a + 1)
 * for a != -1, and z + 1 = 2/(1 - w); the r = n_p - n_z factors (1 - w)
 * left over are the zeros w = 1 of z = infinity, with (1 - w)^r = (-1)^r (w - 1)^r. */
static void map_to_w(ps_sampled_view *v, const ps_region *pole_region, const ps_cplx *pole_w, const ps_analysis *an)
{
    ps_analysis *w = &v->w;
    memset(w, 0, sizeof *w);
    double complex k = v->z_gain;
    int at_inf_p = 0, at_inf_z = 0;
    for (size_t i = 0; i < v->n_zp; i++) {
        ps_cplx a = v->zp[i];
        if (pole_region[i] == PS_AXIS)
            w->n_axis_poles++;
        if (at_minus_one(a)) {
            k /= 2.0;
            at_inf_p++;
            continue;
        }
        k /= 1.0 + cx(a);
        ps_cplx wa = pole_w ? pole_w[i] : pc((cx(a) - 1.0) / (cx(a) + 1.0));
        w->poles[w->n_poles++] = (ps_root){wa, pole_region[i], 1, 0.0};
        w->n_rhp_poles += pole_region[i] == PS_RHP;
    }
    for (size_t j = 0; j < v->n_zz; j++) {
        ps_cplx a = v->zz[j];
        if (at_minus_one(a)) {
            k *= 2.0;
            at_inf_z++;
            continue;
        }
        k *= 1.0 + cx(a);
        ps_cplx wa = pc((cx(a) - 1.0) / (cx(a) + 1.0));
        w->zeros[w->n_zeros++] = (ps_root){wa, v->zz_region[j], 1, 0.0};
        w->n_rhp_zeros += v->zz_region[j] == PS_RHP;
    }
    for (int r = 0; r < v->z_rel_degree; r++) {
        w->zeros[w->n_zeros++] = (ps_root){{1.0, 0.0}, PS_RHP, (unsigned)v->z_rel_degree, 0.0};
        w->n_rhp_zeros++;
        k = -k;
    }
    w->gain = creal(k);
    w->rel_degree = at_inf_z - at_inf_p;
    w->hidden_unstable = an->hidden_unstable;
    w->minimal = an->minimal;
}

/* A plant in s: hold the transfer function of an's roots. */
static ps_status view_held(ps_sampled_ws *ws, const ps_analysis *an, ps_diag *d)
{
    ps_sampled_view *v = &ws->view;
    ps_plant *c = &ws->cont;
    ps_plant_reset(c);
    c->form = PS_FORM_FACTORED;
    c->n_poles = an->n_poles;
    c->n_zeros = an->n_zeros;
    for (size_t i = 0; i < an->n_poles; i++)
        c->poles[i] = an->poles[i].v;
    for (size_t j = 0; j < an->n_zeros; j++)
        c->zeros[j] = an->zeros[j].v;
    c->gain = an->gain;
    v->theta = an->delay + an->compute_delay;
    ps_status st = ps_discrete_hold(ws->dws, c, an->h, v->theta, &ws->held, d);
    if (st != PS_OK)
        return st;
    if ((st = ps_roots_held(ws->rws, &ws->held, an, &ws->hr, d)) != PS_OK)
        return st;
    v->m = ws->held.m;
    v->f = ws->held.f;
    v->n_zp = ws->hr.n_poles;
    v->n_zz = ws->hr.n_zeros;
    memcpy(v->zp, ws->hr.poles, v->n_zp * sizeof v->zp[0]);
    memcpy(v->zz, ws->hr.zeros, v->n_zz * sizeof v->zz[0]);
    v->z_gain = ws->hr.gain;
    v->z_rel_degree = ws->hr.rel_degree;
    /* Poles: e^{p h} for the continuous poles (their class), then the delay states at z = 0. */
    ps_region pr[PS_MAX_ORDER];
    ps_cplx pw[PS_MAX_ORDER];
    v->sum_ln_out = 0.0;
    for (size_t i = 0; i < v->n_zp; i++) {
        if (i < an->n_poles) {
            pr[i] = an->poles[i].region;
            pw[i] = ps_sampled_w_of_s(an->poles[i].v, an->h);
            if (pr[i] == PS_RHP)
                v->sum_ln_out += an->poles[i].v.re * an->h;
        } else {
            pr[i] = PS_LHP;
            pw[i] = (ps_cplx){-1.0, 0.0};
        }
    }
    v->n_zz_outside = 0;
    for (size_t j = 0; j < v->n_zz; j++) {
        v->zz_region[j] = circle_region(v->zz[j], 0.0);
        v->n_zz_outside += v->zz_region[j] == PS_RHP;
    }
    mark_sampling(v, an);
    if (an->relax_sampling_zeros) /* |z - a| = |a| |z - 1/conj(a)| on the circle */
        for (size_t j = 0; j < v->n_zz; j++)
            if (v->zz_sampling[j] && v->zz_region[j] == PS_RHP) {
                double complex a = cx(v->zz[j]);
                v->z_gain *= cabs(a);
                v->zz[j] = pc(1.0 / conj(a));
                v->zz_region[j] = PS_LHP;
                v->n_zz_outside--;
            }
    map_to_w(v, pr, pw, an);
    return PS_OK;
}

/* A plant in z: its roots, with whole samples of computation delay as poles at 0. */
static ps_status view_z(ps_sampled_ws *ws, const ps_analysis *an, ps_diag *d)
{
    ps_sampled_view *v = &ws->view;
    double samples = an->compute_delay / an->h;
    unsigned k = (unsigned)lround(samples);
    if (!(samples >= 0) || fabs(samples - k) > 1e-9 * fmax(1.0, samples) || an->n_poles + k > PS_MAX_ORDER)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "compute_delay",
                           "a plant in z takes a whole number of samples of computation delay (got %.6g), order "
                           "with it at most %d",
                           samples, PS_MAX_ORDER);
    v->m = k;
    v->f = 0.0;
    v->theta = k * an->h;
    v->n_zp = an->n_poles + k;
    v->n_zz = an->n_zeros;
    ps_region pr[PS_MAX_ORDER];
    v->sum_ln_out = 0.0;
    for (size_t i = 0; i < v->n_zp; i++) {
        v->zp[i] = i < an->n_poles ? an->poles[i].v : (ps_cplx){0.0, 0.0};
        pr[i] = i < an->n_poles ? circle_region(v->zp[i], an->poles[i].tol) : PS_LHP;
        if (pr[i] == PS_RHP)
            v->sum_ln_out += log(cabs(cx(v->zp[i])));
    }
    v->n_zz_outside = 0;
    for (size_t j = 0; j < v->n_zz; j++) {
        v->zz[j] = an->zeros[j].v;
        v->zz_region[j] = circle_region(v->zz[j], an->zeros[j].tol);
        v->zz_sampling[j] = false;
        v->n_zz_outside += v->zz_region[j] == PS_RHP;
    }
    v->n_sampling = 0;
    v->z_gain = an->gain;
    v->z_rel_degree = an->rel_degree + (int)k;
    map_to_w(v, pr, NULL, an);
    return PS_OK;
}

const ps_sampled_view *ps_sampled_view_of(ps_sampled_ws *ws, const ps_analysis *an, ps_diag *d)
{
    if (ws->valid && memcmp(&ws->key, an, sizeof *an) == 0)
        return &ws->view;
    ws->valid = false;
    ps_sampled_view *v = &ws->view;
    v->h = an->h;
    ps_status st = an->in_z ? view_z(ws, an, d) : view_held(ws, an, d);
    if (st != PS_OK)
        return NULL;
    v->feedthrough = v->z_rel_degree == 0;
    memcpy(&ws->key, an, sizeof *an);
    ws->valid = true;
    return v;
}
