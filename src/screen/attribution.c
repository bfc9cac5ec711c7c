/* attribution.c - the binding floor of one plant taken apart: each factor
 * relaxed alone, the floor recomputed, the factors ranked (see attribution.h). */
#include "screen/attribution.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "core/text.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

const char *ps_peak_name(ps_peak p)
{
    switch (p) {
    case PS_PEAK_MS: return "Ms";
    case PS_PEAK_MT: return "Mt";
    case PS_PEAK_EFFORT: return "effort";
    case PS_PEAK_NONE: break;
    }
    return "none";
}

const char *ps_factor_key(ps_factor f)
{
    static const char *const keys[PS_FACTOR_COUNT] = {"delay",         "rhp_zeros",   "rolloff_start", "band",
                                                      "compute_delay", "sample_rate", "sampling_zeros"};
    return (unsigned)f < PS_FACTOR_COUNT ? keys[f] : "?";
}

const char *ps_factor_relaxed_words(ps_factor f)
{
    static const char *const words[PS_FACTOR_COUNT] = {
        "without the delay", "without the RHP zeros", "with unlimited bandwidth", "without the band requirement",
        "without the computation delay", "at 4 times the sample rate", "with the sampling zeros mirrored inside"};
    return (unsigned)f < PS_FACTOR_COUNT ? words[f] : "?";
}

ps_peak ps_peak_binding(double share_ms, double share_mt, double share_effort)
{
    ps_peak b = PS_PEAK_NONE;
    double best = 0.0;
    if (share_ms > best) {
        best = share_ms;
        b = PS_PEAK_MS;
    }
    if (share_mt > best) {
        best = share_mt;
        b = PS_PEAK_MT;
    }
    if (share_effort > best)
        b = PS_PEAK_EFFORT;
    return b;
}

double ps_peak_floor(const ps_floors *fl, ps_peak b)
{
    switch (b) {
    case PS_PEAK_MS: return fl->ms;
    case PS_PEAK_MT: return fl->mt;
    case PS_PEAK_EFFORT: return fl->effort;
    case PS_PEAK_NONE: break;
    }
    return NAN;
}

double ps_peak_floor_ln(const ps_floors *fl, ps_peak b)
{
    switch (b) {
    case PS_PEAK_MS: return fl->ms_ln;
    case PS_PEAK_MT: return fl->mt_ln;
    case PS_PEAK_EFFORT: return fl->effort_ln;
    case PS_PEAK_NONE: break;
    }
    return NAN;
}

/* Is a below b? By value while both are finite, else by logarithm. */
static bool below(double a, double a_ln, double b, double b_ln)
{
    return isfinite(a) && isfinite(b) ? a < b : a_ln < b_ln;
}

static double allowed_of(const ps_requirements *q, ps_peak b)
{
    switch (b) {
    case PS_PEAK_MS: return q->ms_allowed;
    case PS_PEAK_MT: return q->mt_allowed;
    case PS_PEAK_EFFORT: return q->effort_allowed;
    case PS_PEAK_NONE: break;
    }
    return NAN;
}

/* Sampling zeros outside the unit circle, among the roots fl keeps. */
static size_t sampling_outside(const ps_floors *fl)
{
    size_t k = 0;
    for (size_t j = 0; j < fl->n_zzeros && j < PS_ZMAP; j++)
        k += fl->zzero_sampling[j] && hypot(fl->zzeros[j].re, fl->zzeros[j].im) > 1.0;
    return k;
}

/* Relax the factors in mask on copies of the plant and requirements. */
static void relax(unsigned mask, ps_analysis *w, ps_requirements *q)
{
    if (mask & 1u << PS_FACTOR_DELAY)
        w->delay = 0.0;
    if (mask & 1u << PS_FACTOR_ZEROS) {
        /* The minimum-phase mirror: same |P(jw)|, no RHP zero; in z the
         * mirror 1/conj(a) in the unit circle, the gain times |a| (on the
         * circle |z - a| = |a| |z - 1/conj(a)|). */
        for (size_t j = 0; j < w->n_zeros; j++)
            if (w->zeros[j].region == PS_RHP) {
                if (w->in_z) {
                    double m2 = w->zeros[j].v.re * w->zeros[j].v.re + w->zeros[j].v.im * w->zeros[j].v.im;
                    w->gain *= sqrt(m2);
                    w->zeros[j].v.re /= m2;
                    w->zeros[j].v.im /= m2;
                } else
                    w->zeros[j].v.re = -w->zeros[j].v.re;
                w->zeros[j].region = PS_LHP;
            }
        w->n_rhp_zeros = 0;
    }
    if (mask & 1u << PS_FACTOR_ROLLOFF)
        q->wh = 0.0;
    if (mask & 1u << PS_FACTOR_BAND)
        q->wb = 0.0;
    if (mask & 1u << PS_FACTOR_COMPUTE)
        w->compute_delay = 0.0;
    if (mask & 1u << PS_FACTOR_RATE) {
        w->h /= PS_ATTR_RATE_UP;
        if (isfinite(w->compute_delay_samples) && !(mask & 1u << PS_FACTOR_COMPUTE))
            w->compute_delay = w->compute_delay_samples * w->h;
    }
    if (mask & 1u << PS_FACTOR_SAMPLING_ZEROS)
        w->relax_sampling_zeros = true;
}

/* The binding floor with the factors in mask relaxed; OUT: *ln its logarithm. */
static double relaxed_floor(ps_limits_ws *lws, ps_analysis *scratch, const ps_analysis *an,
                            const ps_requirements *q, ps_peak b, unsigned mask, double *ln)
{
    ps_requirements rq = *q;
    memcpy(scratch, an, sizeof *scratch);
    relax(mask, scratch, &rq);
    ps_floors fl;
    ps_floors_compute(lws, scratch, &rq, &fl);
    *ln = ps_peak_floor_ln(&fl, b);
    return ps_peak_floor(&fl, b);
}

void ps_attribution_compute(ps_limits_ws *lws, ps_analysis *scratch, const ps_analysis *an, const ps_requirements *q,
                            const ps_floors *fl, ps_peak binding, ps_attribution *out)
{
    memset(out, 0, sizeof *out);
    out->binding = binding;
    out->floor = ps_peak_floor(fl, binding);
    out->floor_ln = ps_peak_floor_ln(fl, binding);
    out->allowed = allowed_of(q, binding);
    out->all_relaxed = out->all_relaxed_ln = NAN;
    out->present[PS_FACTOR_DELAY] = an->delay > 0;
    out->present[PS_FACTOR_ZEROS] = an->n_rhp_zeros > 0;
    out->present[PS_FACTOR_ROLLOFF] = q->wh > 0;
    out->present[PS_FACTOR_BAND] = q->wb > 0;
    out->present[PS_FACTOR_COMPUTE] = an->h > 0 && an->compute_delay > 0;
    out->present[PS_FACTOR_RATE] = an->h > 0 && !an->in_z;
    out->present[PS_FACTOR_SAMPLING_ZEROS] = an->h > 0 && !an->in_z && sampling_outside(fl) > 0;
    for (int f = 0; f < PS_FACTOR_COUNT; f++)
        out->without[f] = out->without_ln[f] = NAN;
    /* An infinite floor (an exact cancellation) has nothing to take apart;
     * one past a double's range does, through its logarithm. */
    if (binding == PS_PEAK_NONE || !isfinite(out->floor_ln))
        return;
    bool skipped = ps_limits_effort_skipped(lws);
    ps_limits_skip_effort(lws, false);
    unsigned all = 0;
    for (int f = 0; f < PS_FACTOR_COUNT; f++) {
        if (!out->present[f])
            continue;
        all |= 1u << f;
        out->without[f] = relaxed_floor(lws, scratch, an, q, binding, 1u << f, &out->without_ln[f]);
        /* insertion by the relaxed floor, lowest first; ties keep enum order */
        size_t k = out->n_present++;
        while (k > 0 && below(out->without[f], out->without_ln[f], out->without[out->order[k - 1]],
                              out->without_ln[out->order[k - 1]])) {
            out->order[k] = out->order[k - 1];
            k--;
        }
        out->order[k] = (unsigned char)f;
    }
    /* floor * (1 - RTOL) with its logarithm (the product may overflow too) */
    double cut = out->floor * (1 - PS_ATTR_RTOL), cut_ln = out->floor_ln + log1p(-PS_ATTR_RTOL);
    for (size_t i = 0; i < out->n_present; i++)
        if (below(out->without[out->order[i]], out->without_ln[out->order[i]], cut, cut_ln))
            out->n_lowering = i + 1;
    if (out->n_present > 1)
        out->all_relaxed = relaxed_floor(lws, scratch, an, q, binding, all, &out->all_relaxed_ln);
    else if (out->n_present == 1) {
        out->all_relaxed = out->without[out->order[0]];
        out->all_relaxed_ln = out->without_ln[out->order[0]];
    }
    ps_limits_skip_effort(lws, skipped);
}

/* ---- the sentence ---- */

/* A time in ms below one second, in s from there on. */
static void put_time(ps_text *t, double s)
{
    if (s < 1.0)
        ps_text_put(t, "%.3g ms", s * 1e3);
    else
        ps_text_put(t, "%.3g s", s);
}

/* A rate in Hz or kHz. */
static void put_rate(ps_text *t, double hz)
{
    if (hz >= 1e3)
        ps_text_put(t, "%.3g kHz", hz * 1e-3);
    else
        ps_text_put(t, "%.3g Hz", hz);
}

/* The RHP pole of largest magnitude (first of a pair: im >= 0). */
static const ps_root *dominant(const ps_analysis *an)
{
    const ps_root *d = NULL;
    for (size_t i = 0; i < an->n_poles; i++) {
        const ps_root *r = &an->poles[i];
        if (r->region != PS_RHP || r->v.im < 0)
            continue;
        if (!d || hypot(r->v.re, r->v.im) > hypot(d->v.re, d->v.im))
            d = r;
    }
    return d;
}

/* "the unstable pole 7 rad/s", "the unstable pole pair 0.5+-6j rad/s",
 * "the unstable poles, dominant 7 rad/s". */
static void put_poles(ps_text *t, const ps_analysis *an)
{
    const ps_root *d = dominant(an);
    if (!d)
        return;
    bool pair = d->v.im > 0;
    bool more = an->n_rhp_poles > (pair ? 2u : 1u);
    if (an->in_z) {
        ps_text_put(t, "%s", more ? "the poles outside the unit circle, largest z = "
                                  : pair ? "the pole pair outside the unit circle z = " : "the pole outside the unit circle z = ");
        if (pair)
            ps_text_put(t, "%.4g+-%.4gj", d->v.re, d->v.im);
        else
            ps_text_put(t, "%.4g", d->v.re);
        return;
    }
    ps_text_put(t, "%s", more ? "the unstable poles, dominant " : pair ? "the unstable pole pair " : "the unstable pole ");
    if (pair)
        ps_text_put(t, "%.3g+-%.3gj rad/s", d->v.re, d->v.im);
    else
        ps_text_put(t, "%.3g rad/s", d->v.re);
}

/* The RHP zero nearest an RHP pole (relative to the pole), for the zero's words. */
static double nearest_zero(const ps_analysis *an, const ps_root **zero, const ps_root **pole)
{
    double best = INFINITY;
    *zero = *pole = NULL;
    for (size_t j = 0; j < an->n_zeros; j++) {
        const ps_root *z = &an->zeros[j];
        if (z->region != PS_RHP || z->v.im < 0)
            continue;
        if (!*zero || hypot(z->v.re, z->v.im) < hypot((*zero)->v.re, (*zero)->v.im))
            *zero = z; /* smallest, when no pole is near */
        for (size_t i = 0; i < an->n_poles; i++) {
            const ps_root *p = &an->poles[i];
            if (p->region != PS_RHP || p->v.im < 0)
                continue;
            double rel = hypot(z->v.re - p->v.re, z->v.im - p->v.im) / hypot(p->v.re, p->v.im);
            if (rel < best) {
                best = rel;
                *pole = p;
            }
        }
    }
    if (*pole) /* name the zero that is near that pole */
        for (size_t j = 0; j < an->n_zeros; j++) {
            const ps_root *z = &an->zeros[j];
            if (z->region == PS_RHP && z->v.im >= 0 &&
                hypot(z->v.re - (*pole)->v.re, z->v.im - (*pole)->v.im) / hypot((*pole)->v.re, (*pole)->v.im) == best)
                *zero = z;
        }
    return best;
}

/* A zero near a pole is named with its distance when within half the pole's size. */
#define NEAR_ZERO_SHARE 0.5

static void put_cplx(ps_text *t, ps_cplx v)
{
    if (v.im != 0)
        ps_text_put(t, "%.3g+-%.3gj rad/s", v.re, fabs(v.im));
    else
        ps_text_put(t, "%.3g rad/s", v.re);
}

/* One factor with its value; returns whether the words named an unstable pole. */
static bool put_factor(ps_text *t, ps_factor f, const ps_analysis *an, const ps_requirements *q)
{
    switch (f) {
    case PS_FACTOR_DELAY:
        ps_text_put(t, "delay ");
        put_time(t, an->delay);
        return false;
    case PS_FACTOR_ZEROS: {
        const ps_root *z, *p;
        if (an->in_z) { /* in z the words of the s plane do not apply */
            z = NULL;
            for (size_t j = 0; j < an->n_zeros && !z; j++)
                if (an->zeros[j].region == PS_RHP && an->zeros[j].v.im >= 0)
                    z = &an->zeros[j];
            ps_text_put(t, "%s z = ", an->n_rhp_zeros > 1 ? "zeros outside the unit circle, among them"
                                                          : "the zero outside the unit circle");
            if (z && z->v.im != 0)
                ps_text_put(t, "%.4g+-%.4gj", z->v.re, z->v.im);
            else if (z)
                ps_text_put(t, "%.4g", z->v.re);
            return false;
        }
        double rel = nearest_zero(an, &z, &p);
        bool one = an->n_rhp_zeros == (z->v.im != 0 ? 2u : 1u);
        ps_text_put(t, "%s", one ? (z->v.im != 0 ? "RHP zero pair " : "RHP zero ") : "RHP zeros, among them ");
        put_cplx(t, z->v);
        if (p && rel < NEAR_ZERO_SHARE) {
            ps_text_put(t, " (%.2g %% from the unstable pole%s ", 100 * rel, p->v.im != 0 ? " pair" : "");
            put_cplx(t, p->v);
            ps_text_put(t, ")");
            return true;
        }
        return false;
    }
    case PS_FACTOR_ROLLOFF: ps_text_put(t, "available bandwidth %.3g rad/s", q->wh); return false;
    case PS_FACTOR_BAND: ps_text_put(t, "required band |S| <= %.3g up to %.3g rad/s", q->eps, q->wb); return false;
    case PS_FACTOR_COMPUTE:
        ps_text_put(t, "computation delay ");
        put_time(t, an->compute_delay);
        ps_text_put(t, " (%.3g sample%s)", an->compute_delay / an->h, an->compute_delay == an->h ? "" : "s");
        return false;
    case PS_FACTOR_RATE:
        ps_text_put(t, "sample rate ");
        put_rate(t, 1.0 / an->h);
        return false;
    case PS_FACTOR_SAMPLING_ZEROS: ps_text_put(t, "a sampling zero outside the unit circle"); return false;
    case PS_FACTOR_COUNT: break;
    }
    return false;
}

/* The relaxation in words, "zero" singular for one real zero or one pair. */
static const char *relaxed_words(ps_factor f, const ps_analysis *an)
{
    if (f == PS_FACTOR_ZEROS && an->in_z)
        return "with the zeros outside the circle mirrored inside";
    if (f == PS_FACTOR_RATE) { /* "at 4 kHz" */
        static _Thread_local char at[48];
        ps_text r = ps_text_on(at, sizeof at);
        ps_text_put(&r, "at ");
        put_rate(&r, PS_ATTR_RATE_UP / an->h);
        return at;
    }
    if (f == PS_FACTOR_ZEROS && an->n_rhp_zeros <= 2) {
        const ps_root *z, *p;
        nearest_zero(an, &z, &p);
        if (an->n_rhp_zeros == (z->v.im != 0 ? 2u : 1u))
            return z->v.im != 0 ? "without the RHP zero pair" : "without the RHP zero";
    }
    return ps_factor_relaxed_words(f);
}

static const char *peak_words(ps_peak b)
{
    return b == PS_PEAK_EFFORT ? "effort floor (peak |C S|)" : b == PS_PEAK_MT ? "Mt floor" : "Ms floor";
}

/* Closer than this (relative to the pole) an RHP zero sits on the pole. */
#define ON_POLE_RTOL 1e-6

bool ps_cancellation_movable(const ps_analysis *an, const ps_floors *fl, bool realised)
{
    if (realised || !fl->infinite)
        return false;
    const ps_root *z, *p;
    return nearest_zero(an, &z, &p) <= ON_POLE_RTOL;
}

void ps_attribution_cause(const ps_attribution *a, const ps_analysis *an, const ps_requirements *q,
                          const ps_floors *fl, bool realised, char *buf, size_t n)
{
    ps_text t = ps_text_on(buf, n);
    if (ps_cancellation_movable(an, fl, realised)) {
        const ps_root *z, *p;
        nearest_zero(an, &z, &p);
        ps_text_put(&t, "RHP zero ");
        put_cplx(&t, z->v);
        ps_text_put(&t, " on the unstable pole ");
        put_cplx(&t, p->v);
        ps_text_put(&t, ": the mode is hidden from every controller, so none stabilizes the plant; a zero or pole moved "
                "off the other makes it stabilizable");
        return;
    }
    if (an->hidden_unstable) {
        ps_text_put(&t, "hidden unstable mode: no controller can reach or see it; the actuator or sensor must change so "
                "that it can");
        return;
    }
    if (fl->infinite) {
        ps_text_put(&t, "%s", fl->note[0] ? fl->note : "an infinite floor");
        return;
    }
    if (a->binding == PS_PEAK_NONE) {
        ps_text_put(&t, "no floor above 1: none of the allowed peaks is used");
        return;
    }
    /* The lead: the factors that lower the floor, largest first; when none
     * does alone, every present factor (they hold it together). */
    size_t n_lead = a->n_lowering ? a->n_lowering : a->n_present;
    bool pole_named = false;
    if (a->binding == PS_PEAK_EFFORT && a->n_lowering == 0) {
        ps_text_put(&t, "stabilizing ");
        put_poles(&t, an);
        ps_text_put(&t, " at plant gain %.3g", an->gain);
        pole_named = true;
        n_lead = 0;
    }
    for (size_t i = 0; i < n_lead; i++) {
        ps_text_put(&t, "%s", i == 0 ? "" : i + 1 == n_lead ? " and " : ", ");
        pole_named |= put_factor(&t, (ps_factor)a->order[i], an, q);
    }
    if (!pole_named && an->n_rhp_poles > 0) {
        ps_text_put(&t, n_lead ? " with " : "");
        put_poles(&t, an);
    }
    ps_text_put(&t, ": %s ", peak_words(a->binding));
    ps_text_put_big(&t, a->floor, a->floor_ln, 3);
    ps_text_put(&t, " against %.3g allowed", a->allowed);
    /* The figures: each present factor's relaxation. */
    const char *sep = " (";
    for (size_t i = 0; i < a->n_lowering; i++) {
        ps_factor f = (ps_factor)a->order[i];
        ps_text_put(&t, "%s", sep);
        ps_text_put_big(&t, a->without[f], a->without_ln[f], 3);
        ps_text_put(&t, " %s", relaxed_words(f, an));
        sep = "; ";
    }
    if (a->n_lowering == 0 && a->n_present > 1)
    {
        ps_text_put(&t, "%sno single relaxation lowers it; ", sep);
        ps_text_put_big(&t, a->all_relaxed, a->all_relaxed_ln, 3);
        ps_text_put(&t, " with all of them relaxed");
        sep = "; ";
    }
    for (size_t i = a->n_lowering; i < a->n_present; i++) {
        ps_factor f = (ps_factor)a->order[i];
        if (a->n_lowering == 0 && a->n_present > 1)
            break;
        ps_text_put(&t, "%sunchanged %s", sep, relaxed_words(f, an));
        sep = "; ";
    }
    if (sep[0] == ';')
        ps_text_put(&t, ")");
}
