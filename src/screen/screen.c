/* screen.c - verdict, severity, cause and redesign targets of one plant, and
 * the ranked run (see screen.h; definitions in README "Verdicts"). */
#include "screen/screen.h"

#include <complex.h>
#include <errno.h>
#include <float.h>
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/types.h>
#include <time.h>
#include <unistd.h>

#include "core/complex_make.h"
#include "core/sha256.h"
#include "core/text.h"
#include "limits/limits.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#ifndef M_SQRT1_2
#define M_SQRT1_2 0.70710678118654752440
#endif

struct ps_screen_ws {
    ps_limits_ws *lws;
    ps_analysis work;   /* the plant with one thing changed, for the targets */
    ps_analysis base;   /* a plant whose zero sits on a pole, searched as a plant without hidden mode */
    ps_floors fl;
};

ps_screen_ws *ps_screen_ws_new(void)
{
    ps_screen_ws *ws = calloc(1, sizeof *ws);
    if (!ws)
        return NULL;
    if (!(ws->lws = ps_limits_ws_new())) {
        free(ws);
        return NULL;
    }
    return ws;
}

void ps_screen_ws_free(ps_screen_ws *ws)
{
    if (!ws)
        return;
    ps_limits_ws_free(ws->lws);
    free(ws);
}

const char *ps_verdict_name(ps_verdict v)
{
    static const char *const names[PS_VERDICT_COUNT] = {"clear", "marginal", "redesign", "not-stabilizable",
                                                        "needs-bandwidth", "input-error"};
    return (unsigned)v < PS_VERDICT_COUNT ? names[v] : "?";
}

const char *ps_target_key(ps_target_kind k)
{
    static const char *const keys[PS_TARGET_COUNT] = {"unstable_pole", "rhp_zero", "delay", "rolloff_start",
                                                      "band_edge", "effort_allowed", "sample_rate",
                                                      "compute_delay"};
    return (unsigned)k < PS_TARGET_COUNT ? keys[k] : "?";
}

const char *ps_target_state_name(ps_target_state s)
{
    switch (s) {
    case PS_TARGET_NA: return "not-applicable";
    case PS_TARGET_FOUND: return "found";
    case PS_TARGET_NONE: return "no-value-passes";
    case PS_TARGET_UNBOUNDED: return "unbounded";
    case PS_TARGET_NOT_MONOTONE: return "not-monotone";
    }
    return "?";
}

double ps_share_peak(double floor, double allowed)
{
    if (isnan(floor))
        return NAN;
    return log(fmax(floor, 1.0)) / log(allowed);
}

double ps_share_effort(double floor, double allowed)
{
    if (isnan(floor) || !(allowed > 0))
        return NAN;
    return log1p(floor) / log1p(allowed);
}

double ps_share_peak_ln(double floor, double floor_ln, double allowed)
{
    if (isinf(floor) && isfinite(floor_ln))
        return fmax(floor_ln, 0.0) / log(allowed);
    return ps_share_peak(floor, allowed);
}

double ps_share_effort_ln(double floor, double floor_ln, double allowed)
{
    /* ln(1 + e^L) = L + ln(1 + e^-L): past a double's range the second
     * term is below any rounding of L. */
    if (isinf(floor) && isfinite(floor_ln) && allowed > 0)
        return floor_ln / log1p(allowed);
    return ps_share_effort(floor, allowed);
}

ps_verdict ps_verdict_of(double severity, bool infinite, bool hidden, double marginal_at)
{
    if (infinite || hidden || isinf(severity))
        return PS_VERDICT_UNSTABILIZABLE;
    if (severity > 1.0)
        return PS_VERDICT_REDESIGN;
    if (severity >= marginal_at)
        return PS_VERDICT_MARGINAL;
    return PS_VERDICT_CLEAR;
}

static double severity_of(const ps_floors *fl, const ps_requirements *q, double *sm, double *st, double *se)
{
    *sm = ps_share_peak_ln(fl->ms, fl->ms_ln, q->ms_allowed);
    *st = ps_share_peak_ln(fl->mt, fl->mt_ln, q->mt_allowed);
    *se = q->effort_allowed > 0 ? ps_share_effort_ln(fl->effort, fl->effort_ln, q->effort_allowed) : NAN;
    if (fl->infinite)
        return INFINITY;
    double s = fmax(*sm, *st);
    if (!isnan(*se))
        s = fmax(s, *se);
    return s;
}

/* Whether the floors in ws->fl pass req (see ps_screen_passes). */
static bool judge(ps_screen_ws *ws, const ps_analysis *an, const ps_requirements *req, double *severity)
{
    double a, b, c;
    double s = severity_of(&ws->fl, req, &a, &b, &c);
    if (severity)
        *severity = s;
    return !ws->fl.infinite && !an->hidden_unstable && s <= 1.0;
}

bool ps_screen_passes(ps_screen_ws *ws, const ps_analysis *an, const ps_requirements *req, double *severity)
{
    ps_floors_compute(ws->lws, an, req, &ws->fl);
    return judge(ws, an, req, severity);
}

const ps_floors *ps_screen_last_floors(const ps_screen_ws *ws)
{
    return &ws->fl;
}

/* ---- the plant in numbers a cause sentence needs ---- */

static double dominant_pole(const ps_analysis *an)
{
    double m = 0;
    for (size_t i = 0; i < an->n_poles; i++)
        if (an->poles[i].region == PS_RHP)
            m = fmax(m, hypot(an->poles[i].v.re, an->poles[i].v.im));
    return m;
}

static double smallest_zero(const ps_analysis *an)
{
    double m = INFINITY;
    for (size_t i = 0; i < an->n_zeros; i++)
        if (an->zeros[i].region == PS_RHP)
            m = fmin(m, hypot(an->zeros[i].v.re, an->zeros[i].v.im));
    return m;
}

/* ---- redesign targets: monotone bisection along one quantity ---- */

typedef struct probe {
    ps_screen_ws *ws;
    const ps_analysis *base;
    ps_requirements req;
    ps_target_kind kind;
    double band_eps;
    ps_floors plant_fl; /* plant half of base's floors: the roll-off and band searches move only a requirement */
    ps_floors band_fl;  /* plant_fl applied to the requirements with band_eps: the band search moves only wb */
} probe;

/* How far x is from passing: <= 0 passes. The share of the allowed
 * log-peak minus 1 (the Ms share alone for the band target); +inf for an
 * infinite floor or a hidden mode. Monotone along each target's quantity,
 * which lets the root finder below use its values, not only its sign. */
/* The margin of a probe that passes (or not) with this severity. */
static double margin_of(bool pass, double sev)
{
    return pass ? fmin(sev - 1.0, 0.0) : fmax(sev - 1.0, DBL_MIN);
}

static double probe_margin(probe *pr, double x)
{
    ps_requirements q = pr->req;
    ps_floors *fl = &pr->ws->fl;
    if (pr->kind == PS_TARGET_ROLLOFF) { /* a requirement moves: the plant half is kept */
        if (!(x > q.wb) || (pr->base->h > 0 && !(x < M_PI / pr->base->h)))
            return INFINITY;
        q.wh = x;
        *fl = pr->plant_fl;
        ps_floors_apply(pr->ws->lws, pr->base, &q, fl);
        if (fl->infinite || pr->base->hidden_unstable)
            return INFINITY;
        double sev;
        bool pass = judge(pr->ws, pr->base, &q, &sev);
        return margin_of(pass, sev);
    }
    if (pr->kind == PS_TARGET_BAND) { /* only the band edge moves; every floor must pass */
        q.wb = x;
        q.eps = pr->band_eps;
        *fl = pr->band_fl;
        ps_floors_apply_band(pr->ws->lws, pr->base, &q, fl);
        if (fl->infinite || pr->base->hidden_unstable)
            return INFINITY;
        double sev;
        bool pass = judge(pr->ws, pr->base, &q, &sev);
        return margin_of(pass, sev);
    }
    ps_analysis *w = &pr->ws->work;
    memcpy(w, pr->base, sizeof *w);
    switch (pr->kind) {
    case PS_TARGET_POLE:
        for (size_t i = 0; i < w->n_poles; i++)
            if (w->poles[i].region == PS_RHP) {
                w->poles[i].v.re *= x;
                w->poles[i].v.im *= x;
            }
        break;
    case PS_TARGET_ZERO:
        for (size_t i = 0; i < w->n_zeros; i++)
            if (w->zeros[i].region == PS_RHP) {
                w->zeros[i].v.re *= x;
                w->zeros[i].v.im *= x;
            }
        break;
    case PS_TARGET_DELAY: w->delay = x; break;
    case PS_TARGET_SAMPLE_RATE:
        /* The Nyquist frequency must stay above the band edge and the
         * roll-off start (they are frequencies of the sampled loop). */
        if (!(M_PI * x > q.wb && M_PI * x > q.wh))
            return INFINITY;
        w->h = 1.0 / x;
        if (isfinite(w->compute_delay_samples))
            w->compute_delay = w->compute_delay_samples * w->h;
        break;
    case PS_TARGET_COMPUTE_DELAY: w->compute_delay = x; break;
    case PS_TARGET_ROLLOFF:
    case PS_TARGET_BAND:
    case PS_TARGET_EFFORT:
    case PS_TARGET_COUNT: break;
    }
    double sev;
    bool pass = ps_screen_passes(pr->ws, w, &q, &sev);
    if (fl->infinite || w->hidden_unstable)
        return INFINITY;
    return margin_of(pass, sev);
}

enum { STEP_MAX = 400, BISECT_MAX = 200 };
#define STEP 1.25
#define BISECT_RTOL 1e-10

/* Boundary between a passing x_pass and a failing x_fail (margins m_pass <=
 * 0 < m_fail known), to BISECT_RTOL relative; returns the passing end (the
 * conservative value). Illinois (regula falsi with the stale end's value
 * halved) on log x when both ends are positive, on x otherwise. A secant
 * point closer to an end than half the tolerance is moved that far inside,
 * so a step that lands on the boundary closes the bracket; a bisection step
 * is taken when a margin is infinite or the margins are not ordered. */
static double bisect(probe *pr, double x_pass, double m_pass, double x_fail, double m_fail)
{
    int stale = 0; /* +1: x_pass kept on the last step, -1: x_fail kept */
    /* a, b: the ends on the search axis (log x while both are positive),
     * carried along so that only the new point costs a logarithm. */
    bool logs = x_pass > 0 && x_fail > 0;
    double a = logs ? log(x_pass) : x_pass, b = logs ? log(x_fail) : x_fail;
    for (int i = 0; i < BISECT_MAX && fabs(x_fail - x_pass) > BISECT_RTOL * fmax(fabs(x_pass), fabs(x_fail));
         i++) {
        double u = 0.5 * (a + b);
        if (isfinite(m_pass) && isfinite(m_fail) && m_fail > m_pass) {
            double s = a + (b - a) * (0 - m_pass) / (m_fail - m_pass);
            double lo = fmin(a, b), hi = fmax(a, b);
            double tol = logs ? BISECT_RTOL : BISECT_RTOL * fmax(fabs(x_pass), fabs(x_fail));
            double guard = fmin(0.5 * tol, 0.25 * (hi - lo));
            if (s >= lo && s <= hi)
                u = fmin(fmax(s, lo + guard), hi - guard);
        }
        double mid = logs ? exp(u) : u, m = probe_margin(pr, mid);
        if (m <= 0) {
            x_pass = mid;
            a = u;
            m_pass = m;
            if (stale == 1) /* x_fail kept twice: halve its weight */
                m_fail *= 0.5;
            stale = 1;
        } else {
            x_fail = mid;
            b = u;
            m_fail = m;
            if (stale == -1)
                m_pass *= 0.5;
            stale = -1;
        }
    }
    return x_pass;
}

/* Why the easy end x of a search still fails, from the floors of its
 * probe: the peak with the largest share, its floor and what is allowed. */
static void failing_words(const probe *pr, double x, char *buf, size_t n)
{
    const ps_floors *fl = &pr->ws->fl;
    char at[64];
    switch (pr->kind) {
    case PS_TARGET_DELAY: snprintf(at, sizeof at, "even with no delay"); break;
    case PS_TARGET_COMPUTE_DELAY: snprintf(at, sizeof at, "even with no computation delay"); break;
    case PS_TARGET_SAMPLE_RATE: snprintf(at, sizeof at, "even at %.4g Hz", x); break;
    case PS_TARGET_BAND: snprintf(at, sizeof at, "even with a band edge of only %.3g rad/s", x); break;
    case PS_TARGET_POLE:
    case PS_TARGET_ZERO: snprintf(at, sizeof at, "even at %.3g times its present size", x); break;
    default: snprintf(at, sizeof at, "even at %.3g rad/s", x); break;
    }
    if (fl->infinite || pr->base->hidden_unstable) {
        snprintf(buf, n, "%s no controller stabilizes the plant", at);
        return;
    }
    if (isnan(fl->ms)) {
        ps_text t = ps_text_on(buf, n);
        ps_text_put(&t, "%s the held plant cannot be formed: %s", at, fl->note);
        return;
    }
    ps_requirements q = pr->req;
    double sm, st, se;
    severity_of(fl, &q, &sm, &st, &se);
    ps_peak b = ps_peak_binding(sm, st, se);
    char floor[48];
    ps_text_big(floor, sizeof floor, ps_peak_floor(fl, b), ps_peak_floor_ln(fl, b), 3);
    double allowed = b == PS_PEAK_MT ? q.mt_allowed : b == PS_PEAK_EFFORT ? q.effort_allowed : q.ms_allowed;
    ps_text t = ps_text_on(buf, n); /* cut quietly at the end of the room, as before */
    ps_text_put(&t, "%s the %s floor is %s against %.3g allowed", at,
             b == PS_PEAK_EFFORT ? "effort" : ps_peak_name(b), floor, allowed);
}

/* Search x in [lo, hi] for the pass/fail boundary, starting at x0.
 * worse_up: larger x is harder (passing set below the boundary). The
 * verdict is taken as monotone along x: when x0 passes, so does the easy
 * end, which is then not evaluated. */
static void search(probe *pr, ps_target *t, double x0, double lo, double hi, bool worse_up)
{
    double good_end = worse_up ? lo : hi, bad_end = worse_up ? hi : lo;
    double m0 = probe_margin(pr, x0);
    t->passes_now = m0 <= 0;
    double x = x0, m = m0, prev = x0, m_prev = m0;
    bool found = false;
    if (t->passes_now) { /* walk towards the hard end until it fails */
        double f = STEP; /* galloping: the step factor squares each time */
        for (int i = 0; i < STEP_MAX && !found; i++, f = fmin(f * f, 1e3)) {
            prev = x;
            m_prev = m;
            x = worse_up ? (x > 0 ? x * f : hi * 1e-12) : x / f;
            if (worse_up ? x >= bad_end : x <= bad_end)
                x = bad_end;
            m = probe_margin(pr, x);
            found = !(m <= 0);
            if (x == bad_end)
                break;
        }
        if (!found) {
            t->state = PS_TARGET_UNBOUNDED;
            t->searched = bad_end;
            snprintf(t->why, sizeof t->why, "passes up to the end of the searched range (%.3g)", bad_end);
            return;
        }
        t->limit = bisect(pr, prev, m_prev, x, m);
    } else { /* walk towards the easy end until it passes */
        double m_good = x0 == good_end ? m0 : probe_margin(pr, good_end);
        if (!(m_good <= 0)) {
            t->state = PS_TARGET_NONE;
            t->searched = good_end;
            failing_words(pr, good_end, t->why, sizeof t->why);
            return;
        }
        double f = STEP;
        for (int i = 0; i < STEP_MAX && !found; i++, f = fmin(f * f, 1e3)) {
            prev = x;
            m_prev = m;
            x = worse_up ? x / f : x * f;
            if (worse_up ? x <= good_end : x >= good_end) {
                x = good_end;
                m = m_good;
                found = true; /* passes: checked above */
            } else {
                m = probe_margin(pr, x);
                found = m <= 0;
            }
        }
        t->limit = bisect(pr, x, m, prev, m_prev);
    }
    t->state = PS_TARGET_FOUND;
}

/* The sample-rate search takes the verdict as monotone in the rate. The
 * hold can break that (at a rate where two poles e^{p h} meet, the held
 * plant loses a mode; sampling zeros move with h): rates from the limit
 * up to hi on a log grid are checked, and the first that fails again
 * turns the target into PS_TARGET_NOT_MONOTONE instead of a boundary. */
enum { MONOTONE_CHECKS = 48 };
static void check_monotone(probe *pr, ps_target *t, double hi)
{
    double lo = t->limit, span = log(hi / lo);
    for (int i = 1; i <= MONOTONE_CHECKS; i++) {
        double x = lo * exp(span * i / MONOTONE_CHECKS);
        if (probe_margin(pr, x) > 0) {
            t->state = PS_TARGET_NOT_MONOTONE;
            snprintf(t->why, sizeof t->why, "passes at %.4g Hz but fails again at %.4g Hz", lo, x);
            return;
        }
    }
    /* The rates a grid misses: two unstable poles with one real part and
     * imaginary parts Delta apart meet at e^{p h} when Delta h = 2 pi k, and
     * the held plant loses that unstable mode (pathological sampling; a
     * complex pair at rates Im p / (pi k)). Each such rate above the limit
     * is probed. */
    const ps_analysis *an = pr->base;
    for (size_t i = 0; i < an->n_poles; i++)
        for (size_t j = i + 1; j < an->n_poles; j++) {
            const ps_root *a = &an->poles[i], *b = &an->poles[j];
            double delta = fabs(a->v.im - b->v.im);
            if (a->region != PS_RHP || b->region != PS_RHP || !(delta > 0) ||
                fabs(a->v.re - b->v.re) > 1e-9 * fmax(fabs(a->v.re), fabs(b->v.re)))
                continue;
            for (int k = 1; k <= 1000; k++) {
                double x = delta / (2 * M_PI * k);
                if (x <= lo)
                    break;
                if (x <= hi && probe_margin(pr, x) > 0) {
                    t->state = PS_TARGET_NOT_MONOTONE;
                    ps_text w = ps_text_on(t->why, sizeof t->why);
                    ps_text_put(&w, "passes at %.4g Hz, fails again at %.6g Hz: the poles %.3g+-%.3gj rad/s alias there",
                                lo, x, a->v.re, fabs(a->v.im));
                    return;
                }
            }
        }
}

/* The longest delay a digital loop's plant can be held with: the samples
 * of delay are states, at most PS_MAX_ORDER in all (INFINITY for a
 * continuous loop). The delay searches end there, so that no probe fails
 * for want of room instead of by its floors. */
static double held_delay_room(const ps_analysis *an)
{
    if (!(an->h > 0))
        return INFINITY;
    double states = (double)PS_MAX_ORDER - (double)an->n_poles - 1.0;
    return states > 0 ? states * an->h : 0.0;
}

/* The highest sample rate at which the plant's delay (and a computation
 * delay given in seconds) still fits the hold's PS_MAX_ORDER states, with
 * a computation delay given in samples counted at its number of samples.
 * The sample-rate search ends there (INFINITY without such a delay). */
static double held_rate_room(const ps_analysis *an)
{
    bool in_samples = isfinite(an->compute_delay_samples);
    double seconds = an->delay + (in_samples ? 0.0 : an->compute_delay);
    double states = (double)PS_MAX_ORDER - (double)an->n_poles - 2.0 -
                    (in_samples ? ceil(an->compute_delay_samples) : 0.0);
    if (!(seconds > 0))
        return INFINITY;
    return states > 1 ? states / seconds : 0.0;
}

/* Reference frequency of the plant: sets the searched ranges. */
static double plant_scale(const ps_analysis *an, const ps_requirements *q)
{
    double s = 0.0;
    if (an->in_z) { /* roots in z: their continuous-time sizes |ln z| / h */
        for (size_t i = 0; i < an->n_poles; i++)
            if (an->poles[i].region == PS_RHP)
                s = fmax(s, cabs(clog(ps_complex_make(an->poles[i].v.re, an->poles[i].v.im))) / an->h);
        for (size_t j = 0; j < an->n_zeros; j++)
            if (an->zeros[j].region == PS_RHP)
                s = fmax(s, cabs(clog(ps_complex_make(an->zeros[j].v.re, an->zeros[j].v.im))) / an->h);
    } else
        s = fmax(dominant_pole(an), isfinite(smallest_zero(an)) ? smallest_zero(an) : 0.0);
    s = fmax(s, q->wh);
    s = fmax(s, q->wb);
    if (an->delay > 0)
        s = fmax(s, 1.0 / an->delay);
    if (an->h > 0 && !(s > 0))
        s = 0.1 * M_PI / an->h;
    return s > 0 ? s : 1.0;
}

static void targets(ps_screen_ws *ws, const ps_analysis *an, const ps_requirements *q, ps_summary *s)
{
    probe pr = {.ws = ws, .base = an, .req = *q, .kind = PS_TARGET_POLE, .band_eps = s->band_eps};
    ps_limits_skip_effort(ws->lws, !(q->effort_allowed > 0));
    ps_floors_plant(ws->lws, an, &pr.plant_fl);
    ps_requirements qb = *q;
    qb.eps = s->band_eps;
    pr.band_fl = pr.plant_fl;
    ps_floors_apply(ws->lws, an, &qb, &pr.band_fl);
    double scale = plant_scale(an, q);
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        ps_target *t = &s->target[k];
        memset(t, 0, sizeof *t);
        t->limit = NAN;
        pr.kind = (ps_target_kind)k;
        if (an->in_z && (k == PS_TARGET_POLE || k == PS_TARGET_ZERO || k == PS_TARGET_DELAY)) {
            t->now = NAN;
            snprintf(t->why, sizeof t->why, "the plant is given in z: %s",
                     k == PS_TARGET_DELAY ? "its delay is part of the model (see the computation-delay target)"
                                          : "pole and zero targets are stated for plants in s");
            continue;
        }
        switch ((ps_target_kind)k) {
        case PS_TARGET_POLE: {
            double p = dominant_pole(an);
            t->now = p;
            if (an->n_rhp_poles == 0) {
                snprintf(t->why, sizeof t->why, "no unstable pole");
                break;
            }
            search(&pr, t, 1.0, 1e-6, 1e6, true);
            t->limit *= p;
            t->searched *= p;
            break;
        }
        case PS_TARGET_ZERO: {
            double z = smallest_zero(an);
            t->now = isfinite(z) ? z : NAN;
            if (an->n_rhp_zeros == 0) {
                snprintf(t->why, sizeof t->why, "no RHP zero");
                break;
            }
            search(&pr, t, 1.0, 1e-6, 1e6, false);
            t->limit *= z;
            t->searched *= z;
            break;
        }
        case PS_TARGET_DELAY:
            t->now = an->delay;
            if (an->n_rhp_poles == 0) {
                t->state = PS_TARGET_UNBOUNDED;
                t->passes_now = ps_screen_passes(ws, an, q, NULL);
                t->searched = INFINITY;
                snprintf(t->why, sizeof t->why, "no unstable pole: the delay raises no floor above 1");
                if (!t->passes_now) {
                    t->state = PS_TARGET_NONE;
                    snprintf(t->why, sizeof t->why, "no unstable pole: the delay raises no floor above 1, and the "
                                                    "plant fails without it");
                }
                break;
            }
            search(&pr, t, an->delay, 0.0, fmin(1e3 / dominant_pole(an), held_delay_room(an) - an->compute_delay),
                   true);
            break;
        case PS_TARGET_ROLLOFF:
            t->now = q->wh;
            if (!(q->wh > 0)) {
                snprintf(t->why, sizeof t->why, "no rolloff_start given");
                break;
            }
            search(&pr, t, q->wh, q->wb > 0 ? q->wb * (1 + 1e-9) : scale * 1e-6,
                   an->h > 0 ? M_PI / an->h * (1 - 1e-9) : scale * 1e6, false);
            break;
        case PS_TARGET_BAND: {
            t->now = q->wb > 0 ? q->wb : NAN;
            /* The band lies below the roll-off start: the range ends there,
             * and starts six decades below the plant's scale or below w_h,
             * whichever is lower (a plant far faster than w_h would
             * otherwise get a range that starts above its end). */
            double hi = q->wh > 0 ? q->wh * (1 - 1e-9) : an->h > 0 ? M_PI / an->h * (1 - 1e-9) : scale * 1e6;
            double lo = fmin(scale, hi) * 1e-6;
            search(&pr, t, q->wb > 0 ? q->wb : lo, lo, hi, true);
            if (!(q->wb > 0))
                t->passes_now = false;
            break;
        }
        case PS_TARGET_EFFORT: {
            /* The effort share passes exactly when the allowed peak of
             * |C S| reaches the effort floor: no search is needed. */
            t->now = q->effort_allowed > 0 ? q->effort_allowed : NAN;
            if (!(q->effort_allowed > 0)) {
                snprintf(t->why, sizeof t->why, "no effort_allowed given: effort is not counted");
                break;
            }
            double e = s->fl.effort;
            t->passes_now = e <= q->effort_allowed;
            if (!isfinite(e)) {
                t->state = PS_TARGET_NONE;
                t->searched = INFINITY;
                snprintf(t->why, sizeof t->why, "no controller stabilizes the plant");
            } else {
                t->state = PS_TARGET_FOUND;
                t->limit = e;
            }
            break;
        }
        case PS_TARGET_SAMPLE_RATE: {
            t->now = an->h > 0 ? 1.0 / an->h : NAN;
            if (!(an->h > 0)) {
                snprintf(t->why, sizeof t->why, "a continuous loop: no sample_rate given");
                break;
            }
            if (an->in_z) {
                snprintf(t->why, sizeof t->why, "the plant is given in z: it holds only at its own sample rate");
                break;
            }
            /* Rates at which the Nyquist frequency clears the band edge and
             * the roll-off start, up to four decades past the plant's scale. */
            double lo = fmax(fmax(q->wb, q->wh) / M_PI * (1 + 1e-9), scale * 1e-4);
            double hi = fmin(fmax(scale * 1e4, t->now * 1e2), held_rate_room(an));
            search(&pr, t, t->now, fmin(lo, t->now), hi, false);
            if (t->state == PS_TARGET_FOUND)
                check_monotone(&pr, t, hi);
            break;
        }
        case PS_TARGET_COMPUTE_DELAY: {
            t->now = an->h > 0 ? an->compute_delay : NAN;
            if (!(an->h > 0)) {
                snprintf(t->why, sizeof t->why, "a continuous loop: no sample_rate given");
                break;
            }
            search(&pr, t, an->compute_delay, 0.0, fmin(fmax(1e3 * an->h, 1e3 / scale), held_delay_room(an) - an->delay),
                   true);
            if (an->in_z && t->state == PS_TARGET_FOUND) /* a plant in z takes whole samples only */
                t->limit = floor(t->limit / an->h * (1 + 1e-9)) * an->h;
            break;
        }
        case PS_TARGET_COUNT: break;
        }
    }
    ps_limits_skip_effort(ws->lws, false);
}

/* Ms floor against the band edge (eps fixed), on a log grid. */
static void band_curve(ps_screen_ws *ws, const ps_analysis *an, const ps_requirements *q, ps_summary *s)
{
    double scale = plant_scale(an, q);
    double hi = q->wh > 0 ? q->wh * 0.999 : an->h > 0 ? M_PI / an->h * 0.999 : scale * 1e2;
    double lo = fmin(scale, hi) * 1e-3;
    ps_requirements r = *q;
    r.eps = s->band_eps;
    s->n_curve = PS_CURVE_N;
    ps_limits_skip_effort(ws->lws, true); /* the curve is the Ms floor alone */
    ps_floors base;
    ps_floors_plant(ws->lws, an, &base); /* only the band edge moves along the curve */
    ps_limits_skip_effort(ws->lws, false);
    r.wb = lo;
    ps_floors_apply(ws->lws, an, &r, &base);
    double span = log(hi / lo);
    for (size_t i = 0; i < PS_CURVE_N; i++) {
        double wb = lo * exp(span * (double)i / (PS_CURVE_N - 1));
        r.wb = wb;
        ws->fl = base;
        ps_floors_apply_band(ws->lws, an, &r, &ws->fl);
        s->curve_wb[i] = wb;
        s->curve_ms[i] = ws->fl.ms;
    }
}

/* The cause of a needs-bandwidth verdict: what is missing and why it matters. */
static void text_needs_bandwidth(const ps_analysis *an, const ps_floors *fl, char *buf, size_t n)
{
    double p = dominant_pole(an);
    char ms[48], mt[48];
    snprintf(buf, n,
             "unstable pole%s %.3g rad/s and no rolloff_start: without a bandwidth limit the floors (Ms %s, "
             "Mt %s) cannot rule the plant in or out; give rolloff_start, the bandwidth the actuator, sensor "
             "and sampling allow",
             an->n_rhp_poles > 1 ? "s, dominant" : "", p, ps_text_big(ms, sizeof ms, fl->ms, fl->ms_ln, 3),
             ps_text_big(mt, sizeof mt, fl->mt, fl->mt_ln, 3));
}

static void copy_roots(const ps_root *r, size_t n, ps_cplx *out, size_t *n_out)
{
    *n_out = n;
    for (size_t i = 0; i < n && i < PS_MAP_MAX; i++)
        out[i] = r[i].v;
}

ps_bracket ps_summary_bracket(const ps_summary *s, const ps_screen_opts *opt)
{
    if (opt->certify == PS_CERTIFY_NONE)
        return PS_BRACKET_NONE;
    if (s->verdict == PS_VERDICT_REDESIGN || s->verdict == PS_VERDICT_UNSTABILIZABLE)
        return PS_BRACKET_RULED_OUT;
    if (!s->n_cert)
        return PS_BRACKET_NONE;
    switch (s->cert[0].status) {
    case PS_CERT_DEMONSTRATED: return PS_BRACKET_DEMONSTRATED;
    case PS_CERT_UNDECIDED: return PS_BRACKET_UNDECIDED;
    default: return PS_BRACKET_NOT_ATTEMPTED;
    }
}

static bool certify_wanted(ps_cert_which which, ps_verdict v)
{
    bool passes = v == PS_VERDICT_CLEAR || v == PS_VERDICT_MARGINAL;
    bool ruled_out = v == PS_VERDICT_REDESIGN || v == PS_VERDICT_UNSTABILIZABLE;
    return (which == PS_CERTIFY_PASSING && passes) || (which == PS_CERTIFY_JUDGED && (passes || ruled_out));
}

/* The certificate controller of the plant into s, and the figure of its loop:
 * two decades either side of the peaks, the band edge and the roll-off start. */
static void certify_plant(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl, ps_summary *s,
                          size_t budget)
{
    ps_cert *c = &s->cert[0];
    ps_certify(an, q, fl, s->id, budget, c);
    s->n_cert = 1;
    if (!c->found)
        return;
    double lo = INFINITY, hi = 0;
    const double at[] = {c->chk.w_ms, c->chk.w_mt, q->wb, q->wh};
    for (size_t i = 0; i < sizeof at / sizeof at[0]; i++)
        if (isfinite(at[i]) && at[i] > 0) {
            lo = fmin(lo, at[i]);
            hi = fmax(hi, at[i]);
        }
    if (!(hi > 0))
        return;
    double w[PS_CERT_CURVE_N], sm[PS_CERT_CURVE_N], tm[PS_CERT_CURVE_N];
    ps_loop_curve(an, &c->ctrl, lo / 100, hi * 100, PS_CERT_CURVE_N, w, sm, tm);
    for (size_t i = 0; i < PS_CERT_CURVE_N; i++) {
        s->cert_s[i] = (float)sm[i];
        s->cert_t[i] = (float)tm[i];
    }
    s->cert_w_from = lo / 100;
    s->cert_w_to = hi * 100;
    s->n_cert_curve = PS_CERT_CURVE_N;
}

void ps_screen_assess(ps_screen_ws *ws, const ps_outcome *o, const ps_screen_opts *opt, ps_summary *s)
{
    size_t order = s->order, file_index = s->file_index;
    memset(s, 0, sizeof *s);
    s->order = order;
    s->file_index = file_index;
    snprintf(s->id, sizeof s->id, "%s", o->p->id);
    snprintf(s->note, sizeof s->note, "%s", o->p->note);
    s->line = o->p->line;
    s->worst = "none";
    s->share_ms = s->share_mt = s->share_effort = NAN;
    if (o->err) {
        s->verdict = PS_VERDICT_UNREAD;
        s->severity = NAN;
        s->err_line = o->err->line;
        s->err_col = o->err->col;
        snprintf(s->err_field, sizeof s->err_field, "%s", o->err->field);
        snprintf(s->err_text, sizeof s->err_text, "%s", o->err->text);
        snprintf(s->cause, sizeof s->cause, "input error: %.200s", o->err->text);
        return;
    }
    const ps_analysis *an = o->an;
    const ps_requirements *q = &o->p->req;
    s->fl = *o->fl;
    s->req = *q;
    for (int f = PS_F_MS_ALLOWED; f <= PS_F_EFFORT_ALLOWED; f++)
        s->req_overridden[f] = ps_plant_has(o->p, (ps_field)f);
    s->severity = severity_of(o->fl, q, &s->share_ms, &s->share_mt, &s->share_effort);
    s->verdict = ps_verdict_of(s->severity, o->fl->infinite, an->hidden_unstable, opt->marginal_at);
    ps_peak binding = ps_peak_binding(s->share_ms, s->share_mt, s->share_effort);
    s->worst = ps_peak_name(binding);
    ps_attribution_compute(ws->lws, &ws->work, an, q, o->fl, binding, &s->attr);
    bool realised = o->p->form == PS_FORM_SS;
    ps_attribution_cause(&s->attr, an, q, o->fl, realised, s->cause, sizeof s->cause);
    /* An unstable plant given no bandwidth limit is judged only when a
     * bandwidth-free floor already fails it: with unlimited bandwidth the
     * Bode area costs no peak and the passing floors may all be 1. */
    bool passes = s->verdict == PS_VERDICT_CLEAR || s->verdict == PS_VERDICT_MARGINAL;
    if (passes && an->n_rhp_poles > 0 && !(q->wh > 0) && !(an->h > 0)) { /* a digital loop has the Nyquist limit */
        s->verdict = PS_VERDICT_NEEDS_BANDWIDTH;
        text_needs_bandwidth(an, o->fl, s->cause, sizeof s->cause);
    }
    copy_roots(an->poles, an->n_poles, s->poles, &s->n_poles);
    copy_roots(an->zeros, an->n_zeros, s->zeros, &s->n_zeros);
    for (size_t i = 0; i < an->n_poles && s->n_growth < PS_MAP_MAX; i++)
        if (an->poles[i].region == PS_RHP && an->poles[i].v.im >= 0)
            s->growth[s->n_growth++] = an->poles[i].v;
    s->n_rhp_poles = an->n_rhp_poles;
    s->n_rhp_zeros = an->n_rhp_zeros;
    s->delay = an->delay;
    s->gain = an->gain;
    s->rel_degree = an->rel_degree;
    s->h = an->h;
    s->compute_delay = an->compute_delay;
    s->in_z = an->in_z;
    s->hidden_unstable = an->hidden_unstable;
    if (certify_wanted(opt->certify, s->verdict))
        certify_plant(an, q, o->fl, s, opt->certify_budget);
    /* The band target and curve use the plant's attenuation, or the -3 dB
     * level that defines the sensitivity bandwidth (S&P 2nd ed. sec. 2.4.5, from memory). */
    s->band_eps = q->wb > 0 ? q->eps : M_SQRT1_2;
    if (ps_cancellation_movable(an, o->fl, realised)) {
        /* The hidden mode is a zero on a pole: the targets search the
         * plant with the two apart (the floors then say how far). */
        memcpy(&ws->base, an, sizeof ws->base);
        ws->base.hidden_unstable = false;
        an = &ws->base;
    } else if (an->hidden_unstable) {
        for (int k = 0; k < PS_TARGET_COUNT; k++) {
            s->target[k] = (ps_target){.state = PS_TARGET_NA, .limit = NAN, .now = NAN};
            snprintf(s->target[k].why, sizeof s->target[k].why,
                     "a hidden unstable mode: no change of this value makes the plant stabilizable");
        }
        return;
    }
    bool flagged = s->verdict == PS_VERDICT_MARGINAL || s->verdict == PS_VERDICT_REDESIGN ||
                   s->verdict == PS_VERDICT_UNSTABILIZABLE;
    if (opt->detail == PS_DETAIL_DEFERRED) {
        s->detail_deferred = true;
        return;
    }
    if (opt->detail == PS_DETAIL_NONE || (opt->detail == PS_DETAIL_FLAGGED && !flagged)) {
        for (int k = 0; k < PS_TARGET_COUNT; k++) {
            s->target[k] = (ps_target){.state = PS_TARGET_NA, .limit = NAN, .now = NAN};
            snprintf(s->target[k].why, sizeof s->target[k].why, "not computed (--detail %s)",
                     opt->detail == PS_DETAIL_NONE ? "none" : "flagged");
        }
        return;
    }
    targets(ws, an, q, s);
    band_curve(ws, an, q, s);
}

/* ---- the run ---- */

static char *dup_str(const char *s)
{
    size_t n = strlen(s) + 1;
    char *c = malloc(n);
    if (c)
        memcpy(c, s, n);
    return c;
}

void ps_run_init(ps_run *r, const ps_screen_opts *opt)
{
    memset(r, 0, sizeof *r);
    r->opt = *opt;
}

void ps_run_free(ps_run *r)
{
    for (size_t i = 0; i < r->n_catalogs; i++) {
        free(r->catalogs[i].file);
        free(r->catalogs[i].error);
        free(r->catalogs[i].title);
    }
    free(r->catalogs);
    free(r->meta.command_line);
    free(r->rows);
    free(r->families);
    if (r->store) {
        ps_run_store *st = r->store;
        if (st->file)
            fclose(st->file);
        free(st->file_buf);
        free(st->keys);
        for (size_t k = 0; k < st->n_slots; k++) {
            free(st->slot[k]);
            free(st->slot_plant[k]);
        }
        free(st->slot);
        free(st->slot_plant);
        free(st->slot_refs);
        free(st->free_slots);
        for (int h = 0; h < PS_RUN_LISTS; h++)
            free(st->heap[h]);
        free(st);
    }
    memset(r, 0, sizeof *r);
}

ps_status ps_run_catalog_failed(ps_run *r, const ps_diag *fdiag)
{
    ps_catalog_entry *e = &r->catalogs[r->n_catalogs - 1];
    e->failed = true;
    e->line = fdiag->line;
    e->col = fdiag->col;
    free(e->error);
    e->error = dup_str(fdiag->text);
    return e->error ? PS_OK : PS_ERR_NOMEM;
}

ps_status ps_run_catalog_title(ps_run *r, const char *title)
{
    if (!r->n_catalogs || !title || !title[0])
        return PS_OK;
    ps_catalog_entry *e = &r->catalogs[r->n_catalogs - 1];
    free(e->title);
    e->title = dup_str(title);
    return e->title ? PS_OK : PS_ERR_NOMEM;
}

void ps_run_digest_catalogs(ps_run *r)
{
    for (size_t i = 0; i < r->n_catalogs; i++) {
        ps_catalog_entry *e = &r->catalogs[i];
        if (ps_sha256_file(e->file, e->sha256, &e->bytes) != 0)
            e->sha256[0] = '\0';
    }
}

/* Append arg to t, in single quotes unless it is made only of characters a
 * POSIX shell takes literally. */
static void put_arg(ps_text *t, const char *arg)
{
    bool plain = arg[0] != '\0';
    for (const char *q = arg; *q && plain; q++)
        plain = strchr("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_./=:,+@%", *q) != NULL;
    if (plain) {
        ps_text_put(t, "%s", arg);
        return;
    }
    ps_text_put(t, "'");
    for (const char *q = arg; *q; q++) {
        if (*q == '\'')
            ps_text_put(t, "'\\''");
        else
            ps_text_put(t, "%c", *q);
    }
    ps_text_put(t, "'");
}

bool ps_run_meta_date(ps_run_meta *m, const char *epoch, const char **why)
{
    m->date[0] = '\0';
    if (!epoch || !epoch[0]) {
        *why = "not set";
        return false;
    }
    char *end;
    errno = 0;
    long long secs = strtoll(epoch, &end, 10);
    if (*end || errno || secs < 0 || epoch[0] == '-' || epoch[0] == '+' || epoch[0] == ' ') {
        *why = "not a non-negative whole number of seconds";
        return false;
    }
    time_t tt = (time_t)secs;
    struct tm tm;
    if ((long long)tt != secs || !gmtime_r(&tt, &tm) || tm.tm_year > 9999 - 1900) {
        *why = "out of range";
        return false;
    }
    strftime(m->date, sizeof m->date, "%Y-%m-%dT%H:%M:%SZ", &tm);
    return true;
}

ps_status ps_run_set_meta(ps_run *r, int argc, char *const argv[])
{
    size_t need = 1;
    for (int i = 0; i < argc; i++)
        need += 4 * strlen(argv[i]) + 3;
    free(r->meta.command_line);
    r->meta.command_line = malloc(need);
    if (!r->meta.command_line)
        return PS_ERR_NOMEM;
    ps_text t = ps_text_on(r->meta.command_line, need);
    for (int i = 0; i < argc; i++) {
        if (i)
            ps_text_put(&t, " ");
        put_arg(&t, i == 0 ? "plantsieve" : argv[i]);
    }
    const char *why;
    ps_run_meta_date(&r->meta, getenv("SOURCE_DATE_EPOCH"), &why);
    return PS_OK;
}

ps_status ps_run_add_catalog(ps_run *r, const char *file, const ps_diag *fdiag)
{
    if (r->n_catalogs == r->cap_catalogs) {
        size_t cap = r->cap_catalogs ? 2 * r->cap_catalogs : 8;
        ps_catalog_entry *c = realloc(r->catalogs, cap * sizeof *c);
        if (!c)
            return PS_ERR_NOMEM;
        r->catalogs = c;
        r->cap_catalogs = cap;
    }
    ps_catalog_entry *e = &r->catalogs[r->n_catalogs];
    memset(e, 0, sizeof *e);
    e->file = dup_str(file);
    if (fdiag) {
        e->failed = true;
        e->line = fdiag->line;
        e->col = fdiag->col;
        e->error = dup_str(fdiag->text);
    }
    if (!e->file || (fdiag && !e->error)) {
        free(e->file);
        free(e->error);
        return PS_ERR_NOMEM;
    }
    r->n_catalogs++;
    return PS_OK;
}

static ps_status grow_rows(ps_run *r, size_t need)
{
    if (need <= r->cap_rows)
        return PS_OK;
    size_t cap = r->cap_rows ? r->cap_rows : 64;
    while (cap < need)
        cap *= 2;
    ps_summary *rows = realloc(r->rows, cap * sizeof *rows);
    if (!rows)
        return PS_ERR_NOMEM;
    r->rows = rows;
    r->cap_rows = cap;
    return PS_OK;
}

static int rank_class(const ps_summary *s);

/* ---- compact records in the run's file ----
 * A summary is mostly fixed-size text and lists that are seldom full. The
 * file keeps each text up to its terminating NUL and each list up to its
 * count, with the plain bytes between them as they are (a typical record is
 * a third of the struct or less). Spans are in field order; a list's count
 * field comes before the list, so it is known when the list is read back. */
typedef struct span {
    size_t at, cap;   /* offset and size of the field */
    size_t count_at;  /* lists: offset of their size_t count; texts: SIZE_MAX */
    size_t elem;      /* lists: bytes per element */
} span;

#define SUMMARY_FIELD(f) (((ps_summary *)0)->f)
#define TEXT(f) {offsetof(ps_summary, f), sizeof SUMMARY_FIELD(f), SIZE_MAX, 1}
#define LIST(f, n) {offsetof(ps_summary, f), sizeof SUMMARY_FIELD(f), offsetof(ps_summary, n), sizeof SUMMARY_FIELD(f)[0]}

static const span spans[] = {
    TEXT(id),           TEXT(note),           TEXT(cause),
    LIST(fl.zpoles, fl.n_zpoles), LIST(fl.zzeros, fl.n_zzeros), LIST(fl.zzero_sampling, fl.n_zzeros),
    TEXT(fl.note),        TEXT(target[0].why),  TEXT(target[1].why),
    TEXT(target[2].why), TEXT(target[3].why), TEXT(target[4].why),  TEXT(target[5].why), TEXT(target[6].why),
    TEXT(target[7].why),
    LIST(curve_wb, n_curve), LIST(curve_ms, n_curve),
    LIST(poles, n_poles), LIST(zeros, n_zeros), LIST(growth, n_growth),
    LIST(cert, n_cert), LIST(cert_s, n_cert_curve), LIST(cert_t, n_cert_curve),
    TEXT(err_field), TEXT(err_text),
};
_Static_assert(PS_TARGET_COUNT == 8, "one text span per target");

/* Bytes of span sp in use: a text at field (room bytes readable) up to and
 * with its NUL, a list up to the count that summary holds. */
static size_t span_bytes(const span *sp, const unsigned char *field, size_t room, const unsigned char *summary)
{
    if (sp->count_at == SIZE_MAX) {
        size_t n = strnlen((const char *)field, room < sp->cap ? room : sp->cap);
        return n < sp->cap ? n + 1 : sp->cap;
    }
    size_t count;
    memcpy(&count, summary + sp->count_at, sizeof count);
    size_t most = sp->cap / sp->elem;
    return (count < most ? count : most) * sp->elem;
}

/* Pack s into out (room for sizeof *s); returns the record's length. */
static size_t pack_summary(const ps_summary *s, unsigned char *out)
{
    const unsigned char *in = (const unsigned char *)s;
    size_t pos = 0, len = 0;
    for (size_t k = 0; k < sizeof spans / sizeof spans[0]; k++) {
        const span *sp = &spans[k];
        memcpy(out + len, in + pos, sp->at - pos);
        len += sp->at - pos;
        size_t used = span_bytes(sp, in + sp->at, sp->cap, in);
        memcpy(out + len, in + sp->at, used);
        len += used;
        pos = sp->at + sp->cap;
    }
    memcpy(out + len, in + pos, sizeof *s - pos);
    return len + sizeof *s - pos;
}

/* Inverse of pack_summary; false when the record is not one it wrote. */
static bool unpack_summary(const unsigned char *in, size_t len, ps_summary *s)
{
    unsigned char *out = (unsigned char *)s;
    memset(s, 0, sizeof *s);
    size_t pos = 0, at = 0;
    for (size_t k = 0; k < sizeof spans / sizeof spans[0]; k++) {
        const span *sp = &spans[k];
        size_t plain = sp->at - pos;
        if (len - at < plain)
            return false;
        memcpy(out + pos, in + at, plain);
        at += plain;
        size_t used = span_bytes(sp, in + at, len - at, out);
        if (len - at < used)
            return false;
        memcpy(out + sp->at, in + at, used);
        at += used;
        pos = sp->at + sp->cap;
    }
    if (len - at != sizeof *s - pos)
        return false;
    memcpy(out + pos, in + at, sizeof *s - pos);
    return true;
}

size_t ps_summary_pack(const ps_summary *s, unsigned char *out)
{
    return pack_summary(s, out);
}

bool ps_summary_unpack(const unsigned char *in, size_t len, ps_summary *s)
{
    return unpack_summary(in, len, s);
}

/* ---- keep_top runs: the records the cut listing can print ---- */

static int by_key(const void *a, const void *b);

/* Heap of row indices with the row that ranks last on top. */
static bool ranks_after(const ps_run_store *st, size_t a, size_t b)
{
    return by_key(&st->keys[a], &st->keys[b]) > 0;
}
static void heap_up(ps_run_store *st, size_t *h, size_t i)
{
    while (i > 0 && ranks_after(st, h[i], h[(i - 1) / 2])) {
        size_t p = (i - 1) / 2, t = h[p];
        h[p] = h[i];
        h[i] = t;
        i = p;
    }
}
static void heap_down(ps_run_store *st, size_t *h, size_t n)
{
    for (size_t i = 0;;) {
        size_t l = 2 * i + 1, r = l + 1, m = i;
        if (l < n && ranks_after(st, h[l], h[m]))
            m = l;
        if (r < n && ranks_after(st, h[r], h[m]))
            m = r;
        if (m == i)
            return;
        size_t t = h[m];
        h[m] = h[i];
        h[i] = t;
        i = m;
    }
}
static void slot_release(ps_run_store *st, size_t row)
{
    size_t k = (size_t)st->keys[row].at;
    if (--st->slot_refs[k] == 0) {
        free(st->slot[k]);
        st->slot[k] = NULL;
        free(st->slot_plant[k]);
        st->slot_plant[k] = NULL;
        st->free_slots[st->n_free++] = k;
        st->keys[row].len = 0;
    }
}
/* The lists a row of this verdict appears in (terminal_report.c): the
 * ranking, the redesign list, the passing list, the input errors, the
 * plants that need a bandwidth limit. */
static unsigned row_lists(ps_verdict v)
{
    unsigned m = 1u;
    if (v == PS_VERDICT_REDESIGN || v == PS_VERDICT_UNSTABILIZABLE)
        m |= 2u;
    if (v == PS_VERDICT_CLEAR || v == PS_VERDICT_MARGINAL)
        m |= 4u;
    if (v == PS_VERDICT_UNREAD)
        m |= 8u;
    if (v == PS_VERDICT_NEEDS_BANDWIDTH)
        m |= 16u;
    return m;
}
/* The lists in which row (its key set) is among the first keep_top so far. */
static unsigned keep_wanted(const ps_run *r, size_t row)
{
    const ps_run_store *st = r->store;
    unsigned lists = row_lists((ps_verdict)st->keys[row].verdict), take = 0;
    for (int h = 0; h < PS_RUN_LISTS; h++)
        if ((lists >> h & 1u) && (st->heap_len[h] < r->opt.keep_top || ranks_after(st, st->heap[h][0], row)))
            take |= 1u << h;
    return take;
}
/* Keep the record of row for the lists in take, dropping the rows it
 * pushes out of them. */
static ps_status keep_put(ps_run *r, size_t row, unsigned take, const unsigned char *rec, size_t len,
                          const ps_plant *plant)
{
    ps_run_store *st = r->store;
    size_t n = r->opt.keep_top;
    ps_rank_key *key = &st->keys[row];
    if (st->n_free == 0 && st->n_slots == st->cap_slots) {
        size_t cap = st->cap_slots ? 2 * st->cap_slots : 64;
        unsigned char **sl = realloc(st->slot, cap * sizeof *sl);
        if (sl)
            st->slot = sl;
        ps_plant **pl = sl ? realloc(st->slot_plant, cap * sizeof *pl) : NULL;
        if (pl)
            st->slot_plant = pl;
        unsigned *rf = pl ? realloc(st->slot_refs, cap * sizeof *rf) : NULL;
        if (rf)
            st->slot_refs = rf;
        size_t *fr = rf ? realloc(st->free_slots, cap * sizeof *fr) : NULL;
        if (!fr)
            return PS_ERR_NOMEM;
        st->free_slots = fr;
        st->cap_slots = cap;
    }
    size_t k = st->n_free ? st->free_slots[--st->n_free] : st->n_slots++;
    if (!(st->slot[k] = malloc(len))) {
        st->free_slots[st->n_free++] = k;
        return PS_ERR_NOMEM;
    }
    memcpy(st->slot[k], rec, len);
    st->slot_plant[k] = NULL;
    if (plant) {
        if (!(st->slot_plant[k] = malloc(sizeof *plant))) {
            free(st->slot[k]);
            st->slot[k] = NULL;
            st->free_slots[st->n_free++] = k;
            return PS_ERR_NOMEM;
        }
        memcpy(st->slot_plant[k], plant, sizeof *plant);
    }
    st->slot_refs[k] = 0;
    key->at = k;
    key->len = (uint32_t)len;
    for (int h = 0; h < PS_RUN_LISTS; h++) {
        if (!(take >> h & 1u))
            continue;
        st->slot_refs[k]++;
        if (st->heap_len[h] < n) {
            st->heap[h][st->heap_len[h]] = row;
            heap_up(st, st->heap[h], st->heap_len[h]++);
        } else {
            size_t out = st->heap[h][0];
            st->heap[h][0] = row;
            heap_down(st, st->heap[h], n);
            slot_release(st, out);
        }
    }
    return PS_OK;
}

static void store_put(ps_run *r, const ps_summary *s, const ps_plant *plant)
{
    ps_run_store *st = r->store;
    st->keys[r->n_rows] = (ps_rank_key){s->severity, s->order, st->end, 0, (int16_t)rank_class(s), (int16_t)s->verdict};
    if (!st->file) { /* keep_top run: only a record some list still needs is packed */
        unsigned take = keep_wanted(r, r->n_rows);
        if (take && keep_put(r, r->n_rows, take, st->scratch, pack_summary(s, st->scratch),
                             s->detail_deferred ? plant : NULL) != PS_OK)
            st->failed = true;
        return;
    }
    size_t len = pack_summary(s, st->scratch);
    st->keys[r->n_rows].len = (uint32_t)len;
    if (fwrite(st->scratch, 1, len, st->file) != len)
        st->failed = true;
    st->end += len;
}

/* Move every row to a temporary file (tmpfile: unlinked, gone on exit);
 * from then on rows is only the staging area of the next commits. */
static ps_status spill(ps_run *r)
{
    ps_run_store *st = calloc(1, sizeof *st);
    if (!st)
        return PS_ERR_NOMEM;
    r->store = st; /* freed by ps_run_free from here on */
    if (r->opt.keep_top) {
        for (int h = 0; h < PS_RUN_LISTS; h++)
            if (!(st->heap[h] = malloc(r->opt.keep_top * sizeof *st->heap[h])))
                return PS_ERR_NOMEM;
    } else {
        if (!(st->file = tmpfile()))
            return PS_ERR_IO;
        /* Records go out in large writes (stdio's default buffer for a file
         * is a page: a system call every few records). Without the buffer
         * the default stays. */
        if ((st->file_buf = malloc(PS_RUN_WRITE_BUF)))
            setvbuf(st->file, st->file_buf, _IOFBF, PS_RUN_WRITE_BUF);
    }
    st->cap_keys = 2 * (r->n_rows + 1024);
    if (!(st->keys = malloc(st->cap_keys * sizeof *st->keys)))
        return PS_ERR_NOMEM;
    size_t n = r->n_rows;
    r->n_rows = 0;
    for (; r->n_rows < n; r->n_rows++)
        store_put(r, &r->rows[r->n_rows], NULL);
    /* From here rows is the staging place of one summary: the memory_rows
     * summaries (64 MiB by default) are given back. */
    ps_summary *one = realloc(r->rows, sizeof *one);
    if (one) {
        r->rows = one;
        r->cap_rows = 1;
    }
    return PS_OK;
}

static ps_status reserve(ps_run *r, size_t k)
{
    size_t limit = r->opt.memory_rows ? r->opt.memory_rows : PS_RUN_MEMORY_ROWS;
    if (!r->store && r->n_rows + k > limit) {
        ps_status s = spill(r);
        if (s != PS_OK)
            return s;
    }
    if (r->store) {
        ps_run_store *st = r->store;
        if (r->n_rows + k > st->cap_keys) {
            /* a quarter more each time (a key is 32 bytes: at 3M plants doubling
               could hold 6M keys, 192 MiB, where 3.75M suffice) */
            size_t need = r->n_rows + k, cap = need + need / 4 + 1024;
            ps_rank_key *keys = realloc(st->keys, cap * sizeof *keys);
            if (!keys)
                return PS_ERR_NOMEM;
            st->keys = keys;
            st->cap_keys = cap;
        }
        return grow_rows(r, k);
    }
    return grow_rows(r, r->n_rows + k);
}

/* The next row: in memory its place in rows, in a spilled run rows[0]. */
static ps_summary *staged(ps_run *r)
{
    return r->store ? &r->rows[0] : &r->rows[r->n_rows];
}

ps_summary *ps_run_next(ps_run *r)
{
    if (reserve(r, 1) != PS_OK)
        return NULL;
    ps_summary *s = staged(r);
    s->order = r->n_rows;
    s->file_index = r->n_catalogs ? r->n_catalogs - 1 : 0;
    return s;
}

/* Keep s, already in its staged place when in memory, as the next row. */
static void keep_row(ps_run *r, const ps_summary *s, const ps_plant *plant)
{
    if (r->store)
        store_put(r, s, plant);
    r->per_verdict[s->verdict]++;
    r->per_bracket[ps_summary_bracket(s, &r->opt)]++;
    size_t len = strnlen(s->id, sizeof s->id);
    if (len > r->id_len_max)
        r->id_len_max = len;
    r->n_rows++;
}

void ps_run_commit(ps_run *r)
{
    keep_row(r, staged(r), NULL);
}

ps_status ps_run_put_deferred(ps_run *r, ps_summary *s, const ps_plant *p)
{
    ps_status st = reserve(r, 1);
    if (st != PS_OK)
        return st;
    if (s->detail_deferred && (!r->store || r->store->file || !p))
        return PS_ERR_INPUT; /* only a keep_top run past memory_rows computes deferred detail */
    if (!r->store)
        *staged(r) = *s;
    keep_row(r, s, p);
    return PS_OK;
}

ps_status ps_run_put(ps_run *r, ps_summary *s)
{
    return ps_run_put_deferred(r, s, NULL);
}

bool ps_run_defers(const ps_run *r)
{
    return r->opt.keep_top && r->store && !r->store->file;
}

/* The bytes of one record. Rows tied in the ranking (most often the many
 * plants with nothing binding) follow each other in the file, so a record
 * that starts where the last one ended is read with a window of the records
 * after it; any other is read alone. NULL when the file cannot be read. */
/* pread only: the file's offset is not moved, so threads may read at once. */
static const unsigned char *record_at(const ps_run_store *st, ps_run_cursor *c, const ps_rank_key *key)
{
    bool next = key->at == c->last_end;
    c->last_end = key->at + key->len;
    if (key->at >= c->win_at && key->at + key->len <= c->win_at + c->win_len)
        return c->window + (key->at - c->win_at);
    if (next && key->len <= PS_RUN_WINDOW) {
        ssize_t got = pread(fileno(st->file), c->window, PS_RUN_WINDOW, (off_t)key->at);
        if (got < (ssize_t)key->len)
            return NULL;
        c->win_at = key->at;
        c->win_len = (size_t)got;
        return c->window;
    }
    if (pread(fileno(st->file), c->scratch, key->len, (off_t)key->at) != (ssize_t)key->len)
        return NULL;
    return c->scratch;
}

/* The cursor of a thread that reads beside others (NULL: the store's own). */
static _Thread_local ps_run_cursor *thread_cursor;

ps_status ps_run_reader_begin(const ps_run *r)
{
    thread_cursor = NULL;
    if (!r->store)
        return PS_OK; /* rows in memory: nothing to keep per thread */
    thread_cursor = calloc(1, sizeof *thread_cursor);
    return thread_cursor ? PS_OK : PS_ERR_NOMEM;
}

bool ps_run_reader_end(void)
{
    bool failed = thread_cursor && thread_cursor->failed;
    free(thread_cursor);
    thread_cursor = NULL;
    return failed;
}

void ps_run_mark_failed(ps_run *r)
{
    if (r->store)
        r->store->failed = true;
}

const ps_summary *ps_run_row(const ps_run *r, size_t i)
{
    ps_run_store *st = r->store;
    if (!st)
        return &r->rows[i];
    ps_run_cursor *c = thread_cursor ? thread_cursor : &st->cur;
    ps_summary *s = &c->ring[c->ring_pos];
    c->ring_pos = (c->ring_pos + 1) % PS_RUN_RING;
    const ps_rank_key *key = &st->keys[i];
    const unsigned char *rec = !st->file ? (key->len ? st->slot[key->at] : NULL) : record_at(st, c, key);
    if (!rec || !unpack_summary(rec, key->len, s)) {
        if (c == &st->cur)
            st->failed = true;
        else
            c->failed = true;
        memset(s, 0, sizeof *s);
        snprintf(s->id, sizeof s->id, "(row %zu lost: spill file unreadable)", i);
        s->verdict = PS_VERDICT_UNREAD;
        s->worst = "none";
        s->fl.limiting = "none";
    }
    return s;
}

ps_verdict ps_run_verdict(const ps_run *r, size_t i)
{
    return r->store ? (ps_verdict)r->store->keys[i].verdict : r->rows[i].verdict;
}

bool ps_run_failed(const ps_run *r)
{
    return r->store && r->store->failed;
}

/* Rank key: 0 not stabilizable, 1 screened (by severity), 2 needs a
 * bandwidth limit, 3 input error. */
static int rank_class(const ps_summary *s)
{
    switch (s->verdict) {
    case PS_VERDICT_UNSTABILIZABLE: return 0;
    case PS_VERDICT_NEEDS_BANDWIDTH: return 2;
    case PS_VERDICT_UNREAD: return 3;
    default: return 1;
    }
}

static int by_rank(const void *a, const void *b)
{
    const ps_summary *x = a, *y = b;
    int cx = rank_class(x), cy = rank_class(y);
    if (cx != cy)
        return cx < cy ? -1 : 1;
    if (cx == 1 && x->severity != y->severity)
        return x->severity > y->severity ? -1 : 1;
    return x->order < y->order ? -1 : x->order > y->order;
}

static int by_key(const void *a, const void *b)
{
    const ps_rank_key *x = a, *y = b;
    if (x->cls != y->cls)
        return x->cls < y->cls ? -1 : 1;
    if (x->cls == 1 && x->severity != y->severity)
        return x->severity > y->severity ? -1 : 1;
    return x->order < y->order ? -1 : x->order > y->order;
}

/* The detail of the kept rows whose detail was deferred, from their
 * plants: the same root analysis, floors and assessment as in the pool. */
static void complete_detail(ps_run *r)
{
    ps_run_store *st = r->store;
    ps_roots_ws *rws = NULL;
    ps_limits_ws *lws = NULL;
    ps_screen_ws *sws = NULL;
    ps_analysis *an = malloc(sizeof *an);
    ps_floors *fl = malloc(sizeof *fl);
    ps_summary *s = malloc(sizeof *s);
    bool ok = an && fl && s && (rws = ps_roots_ws_new()) && (lws = ps_limits_ws_new()) && (sws = ps_screen_ws_new());
    for (int h = 0; h < PS_RUN_LISTS; h++)
        for (size_t i = 0; i < st->heap_len[h]; i++) {
            ps_rank_key *key = &st->keys[st->heap[h][i]];
            size_t k = (size_t)key->at;
            ps_plant *p = st->slot_plant[k];
            if (!p)
                continue;
            st->slot_plant[k] = NULL; /* once, whichever list holds it */
            ps_diag d = {0};
            size_t at = p->field_line[PS_F_SAMPLE_RATE] ? p->field_line[PS_F_SAMPLE_RATE] : p->line;
            if (!ok || !unpack_summary(st->slot[k], key->len, s) || ps_roots_analyse(rws, p, an, &d) != PS_OK) {
                st->failed = true;
                free(p);
                continue;
            }
            ps_floors_compute(lws, an, &p->req, fl);
            if (ps_floors_formed(an, fl, at, &d) != PS_OK) {
                st->failed = true;
                free(p);
                continue;
            }
            ps_outcome o = {NULL, p, an, fl, NULL, s->order};
            ps_screen_assess(sws, &o, &r->opt, s);
            free(p);
            size_t len = pack_summary(s, st->scratch);
            unsigned char *rec = realloc(st->slot[k], len);
            if (!rec) {
                st->failed = true;
                continue;
            }
            memcpy(rec, st->scratch, len);
            st->slot[k] = rec;
            key->len = (uint32_t)len;
        }
    ps_screen_ws_free(sws);
    ps_limits_ws_free(lws);
    ps_roots_ws_free(rws);
    free(s);
    free(fl);
    free(an);
}

void ps_run_rank(ps_run *r)
{
    if (r->store && !r->store->file && r->store->slot_plant)
        complete_detail(r);
    if (r->store) {
        if (r->n_rows > 1)
            qsort(r->store->keys, r->n_rows, sizeof *r->store->keys, by_key);
        if (r->store->file && fflush(r->store->file) != 0) /* ps_run_row reads with pread from here on */
            r->store->failed = true;
    } else if (r->n_rows > 1)
        qsort(r->rows, r->n_rows, sizeof *r->rows, by_rank);
}
