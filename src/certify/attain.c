/* attain.c - see ps_attain_floors in certify.h: where no roll-off is
 * required, a controller built from the all-pass solution of the
 * interpolation problem shows the floor is reached (Ms, and separately Mt).
 * The single pole and zero closed form: S(p) = 0 and S(z) = 1 with |S| = g
 * on the axis (Zames and Francis, IEEE TAC 28(5), 1983; Stein, IEEE CSM
 * 23(4), 2003: pole 6, zero 26, g = 1.6). */
#include "certify/certify.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

enum { FILTER_DECADES = 9 };

/* p *= (s - r) for a real root, or (s^2 - 2 Re r s + |r|^2) for a pair (r, conj r). */
static bool times_root(double *p, size_t *n, ps_cplx r)
{
    double f[3];
    size_t nf;
    if (r.im == 0) {
        f[0] = 1, f[1] = -r.re, nf = 2;
    } else {
        f[0] = 1, f[1] = -2 * r.re, f[2] = r.re * r.re + r.im * r.im, nf = 3;
    }
    if (*n + nf - 1 > PS_CTRL_MAX_ORDER + 1)
        return false;
    double t[PS_CTRL_MAX_ORDER + 3] = {0};
    for (size_t i = 0; i < *n; i++)
        for (size_t j = 0; j < nf; j++)
            t[i + j] += p[i] * f[j];
    *n += nf - 1;
    memcpy(p, t, *n * sizeof *p);
    return true;
}

/* The product over the roots that are not in the right half plane (one
 * factor per real root or conjugate pair, im > 0 taking the pair). */
static bool stable_part(const ps_root *r, size_t n, double *p, size_t *np)
{
    p[0] = 1;
    *np = 1;
    for (size_t i = 0; i < n; i++) {
        if (r[i].region == PS_RHP || r[i].v.im < 0)
            continue;
        if (!times_root(p, np, r[i].v))
            return false;
    }
    return true;
}

/* C = c / (k G(s)) (s/wf + 1)^-m into out; false when its order is past the limit. */
static bool build(const ps_analysis *an, double c, double wf, int m, ps_controller *out)
{
    memset(out, 0, sizeof *out);
    out->structure = PS_CTRL_INTERPOLATION;
    out->n_rolloff = (size_t)m;
    out->n_param = 2;
    out->param[0] = c / an->gain;
    out->param[1] = wf;
    if (!stable_part(an->poles, an->n_poles, out->num, &out->n_num) ||
        !stable_part(an->zeros, an->n_zeros, out->den, &out->n_den))
        return false;
    for (size_t i = 0; i < out->n_num; i++)
        out->num[i] *= c / an->gain;
    for (int i = 0; i < m; i++) {
        if (out->n_den + 1 > PS_CTRL_MAX_ORDER + 1)
            return false;
        double t[PS_CTRL_MAX_ORDER + 2] = {0};
        for (size_t j = 0; j < out->n_den; j++) {
            t[j] += out->den[j] / wf;
            t[j + 1] += out->den[j];
        }
        out->n_den++;
        memcpy(out->den, t, out->n_den * sizeof *out->den);
    }
    return true;
}

static void verify(const ps_analysis *an, const ps_requirements *q, const ps_controller *c, ps_loop_check *chk)
{
    ps_requirements peaks = *q; /* the peaks only: no roll-off, band or effort requirement */
    peaks.wh = 0;
    peaks.wb = 0;
    peaks.effort_allowed = 0;
    peaks.ms_allowed = peaks.mt_allowed = INFINITY;
    ps_loop_verify(an, &peaks, c, chk);
}

void ps_attain_floors(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl, ps_attain *out)
{
    memset(out, 0, sizeof *out);
    out->floor_ms = fl->ms_interpolation;
    out->floor_mt = fl->mt_interpolation;
    const char *why = NULL;
    const ps_root *pole = NULL, *zero = NULL;
    for (size_t i = 0; i < an->n_poles; i++)
        if (an->poles[i].region != PS_LHP) {
            if (an->poles[i].region == PS_AXIS || pole || an->poles[i].v.im != 0 || an->poles[i].mult > 1)
                why = "the construction takes one real RHP pole, none on the imaginary axis";
            pole = &an->poles[i];
        }
    for (size_t i = 0; i < an->n_zeros; i++)
        if (an->zeros[i].region != PS_LHP) {
            if (an->zeros[i].region == PS_AXIS || zero || an->zeros[i].v.im != 0 || an->zeros[i].mult > 1)
                why = "the construction takes at most one real RHP zero, none on the imaginary axis";
            zero = &an->zeros[i];
        }
    if (an->h > 0 || an->delay > 0)
        why = "a delay or a digital loop: the construction is for continuous loops without delay";
    else if (q->wh > 0)
        why = "a roll-off is required: the construction is for plants without one";
    else if (!pole && !why)
        why = "no RHP pole: the plant is stable, and C = 0 gives |S| = 1, |T| = 0";
    else if (!(an->gain != 0) || !isfinite(an->gain))
        why = "the plant's gain is zero or not finite";
    if (why) {
        snprintf(out->why, sizeof out->why, "%s", why);
        return;
    }
    if (zero && !(zero->v.re > pole->v.re)) {
        /* parity interlacing fails: only an unstable controller stabilizes, and the
           loop's roll-off from 1 + c to 1 (1 + c < 0) would add an encirclement */
        snprintf(out->why, sizeof out->why, "the RHP zero lies below the RHP pole: only an unstable controller "
                 "stabilizes, and the construction's controller is stable");
        return;
    }
    if (!(out->floor_ms >= 1 && out->floor_mt >= 1)) {
        snprintf(out->why, sizeof out->why, "an interpolation floor is below 1 (a biproper plant without an RHP "
                 "zero): there is no floor above 1 to reach");
        return;
    }
    out->applies = true;
    double p = pole->v.re, cs, ct;
    if (zero) {
        double z = zero->v.re, g = (z + p) / (z - p);
        cs = (1 - g) / g;
        ct = -g / (1 + g);
    } else {
        cs = 2 * p;
        ct = 201 * p; /* p + a with a = 200 p: T = (p + a)/(s + a) peaks at 1 + p/a */
    }
    double scale = fabs(p);
    for (size_t i = 0; i < an->n_poles; i++)
        scale = fmax(scale, hypot(an->poles[i].v.re, an->poles[i].v.im));
    for (size_t i = 0; i < an->n_zeros; i++)
        scale = fmax(scale, hypot(an->zeros[i].v.re, an->zeros[i].v.im));
    if (!zero)
        scale = fmax(scale, 201 * p); /* the loop's own corner */
    int m = an->rel_degree > 1 ? an->rel_degree : 1;
    for (int d = 1; d <= FILTER_DECADES; d++) {
        double wf = scale * pow(10.0, d);
        if (!build(an, cs, wf, m, &out->for_ms) || !build(an, ct, wf, m, &out->for_mt)) {
            out->applies = false;
            snprintf(out->why, sizeof out->why, "the controller 1/G(s) with its filter is above order %d",
                     PS_CTRL_MAX_ORDER);
            return;
        }
        ps_loop_check chk_ms, chk_mt;
        verify(an, q, &out->for_ms, &chk_ms);
        verify(an, q, &out->for_mt, &chk_mt);
        out->wf = wf;
        out->ms = chk_ms.ms;
        out->mt = chk_mt.mt;
        out->ms_stable = chk_ms.stable && chk_ms.roots_agree;
        out->mt_stable = chk_mt.stable && chk_mt.roots_agree;
        out->roots_checked = chk_ms.roots_checked && chk_mt.roots_checked;
        bool ms_ok = out->ms_stable && out->ms <= 1.01 * out->floor_ms;
        bool mt_ok = out->mt_stable && out->mt <= 1.01 * out->floor_mt;
        if (ms_ok && mt_ok) {
            out->within = true;
            return;
        }
    }
}
