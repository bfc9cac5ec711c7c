/* words.c - wording shared by every report: the caution, verdict meanings,
 * target sentences and the requirements line. */
#include "report/reports.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

const char ps_caution_text[] =
    "Caution: these floors are necessary conditions only. A variant that passes is not shown to be "
    "controllable with adequate robustness; one that fails cannot meet the stated requirements with any "
    "linear time-invariant controller under the stated assumptions. The results do not replace a full "
    "controller design and verification, the applicable codes and standards, or licensed engineering "
    "judgment; flight-, vehicle- and people-critical hardware needs a complete design and verification "
    "process.";

void ps_unread_text(size_t line, char *out, size_t n)
{
    if (line > 0)
        snprintf(out, n, "the entries after line %zu were not read; their number is not known, as the file "
                         "cannot be split into entries past a break in its structure", line);
    else
        snprintf(out, n, "the entries after the point where reading stopped were not read; that point has no "
                         "line number, and their number is not known");
}

const char *ps_verdict_mark(ps_verdict v)
{
    switch (v) {
    case PS_VERDICT_CLEAR: return "\u25CB";           /* white circle */
    case PS_VERDICT_MARGINAL: return "\u25D0";        /* circle, left half black */
    case PS_VERDICT_REDESIGN: return "\u25CF";        /* black circle */
    case PS_VERDICT_UNSTABILIZABLE: return "\u2716";  /* heavy multiplication x */
    case PS_VERDICT_NEEDS_BANDWIDTH: return "\u25B3"; /* white up-pointing triangle */
    case PS_VERDICT_UNREAD: return "\u25A1";          /* white square */
    case PS_VERDICT_COUNT: break;
    }
    return "?";
}

const char *ps_verdict_meaning(ps_verdict v)
{
    switch (v) {
    case PS_VERDICT_CLEAR: return "every floor is well inside the allowed peaks";
    case PS_VERDICT_MARGINAL: return "the floors already use most of the allowed log-peak";
    case PS_VERDICT_REDESIGN: return "some floor exceeds what the requirements allow: change the hardware";
    case PS_VERDICT_UNSTABILIZABLE: return "no controller can stabilize this plant as built";
    case PS_VERDICT_NEEDS_BANDWIDTH:
        return "an unstable plant with no rolloff_start: without a bandwidth limit it cannot be judged";
    case PS_VERDICT_UNREAD: return "the entry could not be read or checked";
    case PS_VERDICT_COUNT: break;
    }
    return "?";
}

const char *ps_target_label(ps_target_kind k)
{
    switch (k) {
    case PS_TARGET_POLE: return "dominant unstable pole";
    case PS_TARGET_ZERO: return "smallest RHP zero";
    case PS_TARGET_DELAY: return "delay";
    case PS_TARGET_ROLLOFF: return "available bandwidth (roll-off start)";
    case PS_TARGET_BAND: return "band edge";
    case PS_TARGET_EFFORT: return "allowed peak |C S|";
    case PS_TARGET_SAMPLE_RATE: return "sample rate";
    case PS_TARGET_COMPUTE_DELAY: return "computation delay";
    case PS_TARGET_COUNT: break;
    }
    return "?";
}

/* A time in ms below one second, in s from there on. */
static void time_text(double th, char *buf, size_t n)
{
    if (th < 1.0)
        snprintf(buf, n, "%.3g ms", th * 1e3);
    else
        snprintf(buf, n, "%.4g s", th);
}

/* Growth rate Re p per unit of |p| of the dominant RHP pole: the pole
 * target scales every RHP pole together, so the time to double at a
 * dominant magnitude m is ln 2 / (m * this). */
static double growth_per_magnitude(const ps_summary *s)
{
    double best = -1, ratio = 1;
    for (size_t i = 0; i < s->n_growth && i < PS_MAP_MAX; i++) {
        double m = hypot(s->growth[i].re, s->growth[i].im);
        if (m > best) {
            best = m;
            ratio = s->growth[i].re / m;
        }
    }
    return ratio;
}

/* The rule of thumb (not a law) on the crossover that this target's
 * quantity meets, appended when no floor limits the target. */
static void thumb_text(const ps_summary *s, char *buf, size_t n)
{
    buf[0] = '\0';
    if (isfinite(s->fl.crossover_max) && s->fl.crossover_max > 0)
        snprintf(buf, n, "; rule of thumb, not a law: crossover below %.3g rad/s (S&P 2nd ed. ch. 5)",
                 s->fl.crossover_max);
}

void ps_target_text(const ps_summary *s, ps_target_kind k, char *buf, size_t n)
{
    const ps_target *t = &s->target[k];
    buf[0] = '\0';
    if (t->state == PS_TARGET_NA)
        return;
    if (t->state == PS_TARGET_NONE) {
        snprintf(buf, n, "%s: no value passes (%s)", ps_target_label(k), t->why);
        return;
    }
    if (t->state == PS_TARGET_NOT_MONOTONE) {
        snprintf(buf, n, "%s: no single boundary (%s)", ps_target_label(k), t->why);
        return;
    }
    char now[48], lim[48], ttd[48], thumb[120];
    switch (k) {
    case PS_TARGET_POLE:
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "dominant unstable pole: every value up to %.4g rad/s passes (the searched range); "
                             "now %.4g rad/s", t->searched, t->now);
        else {
            time_text(log(2.0) / (t->limit * growth_per_magnitude(s)), ttd, sizeof ttd);
            snprintf(buf, n, "dominant unstable pole must stay below %.4g rad/s (time to double %s); now %.4g rad/s",
                     t->limit, ttd, t->now);
        }
        break;
    case PS_TARGET_ZERO:
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "smallest RHP zero: every value down to %.4g rad/s passes (the searched range); "
                             "now %.4g rad/s", t->searched, t->now);
        else
            snprintf(buf, n, "smallest RHP zero must reach %.4g rad/s; now %.4g rad/s", t->limit, t->now);
        break;
    case PS_TARGET_DELAY:
        time_text(t->now, now, sizeof now);
        if (t->state == PS_TARGET_UNBOUNDED && isinf(t->searched)) {
            thumb_text(s, thumb, sizeof thumb);
            snprintf(buf, n, "delay: %s%s; now %s", t->why, thumb, now);
        } else if (t->state == PS_TARGET_UNBOUNDED) {
            time_text(t->searched, lim, sizeof lim);
            snprintf(buf, n, "delay: every value up to %s passes (the searched range); now %s", lim, now);
        } else {
            time_text(t->limit, lim, sizeof lim);
            snprintf(buf, n, "delay must stay below %s; now %s", lim, now);
        }
        break;
    case PS_TARGET_ROLLOFF:
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "available bandwidth (roll-off start): every value down to %.4g rad/s passes (the "
                             "searched range); now %.4g rad/s", t->searched, t->now);
        else
            snprintf(buf, n, "available bandwidth (roll-off start) must reach %.4g rad/s; now %.4g rad/s", t->limit,
                     t->now);
        break;
    case PS_TARGET_BAND:
        if (isnan(t->now))
            snprintf(now, sizeof now, "no band required");
        else
            snprintf(now, sizeof now, "required %.4g rad/s", t->now);
        if (t->state == PS_TARGET_UNBOUNDED) {
            thumb_text(s, thumb, sizeof thumb);
            snprintf(buf, n, "band edge with |S| <= %.3g: no floor limits it up to %.4g rad/s (the searched range)%s; %s",
                     s->band_eps, t->searched, thumb, now);
        } else
            snprintf(buf, n, "band edge with |S| <= %.3g must stay below %.4g rad/s; %s", s->band_eps, t->limit, now);
        break;
    case PS_TARGET_EFFORT:
        snprintf(buf, n, "allowed peak |C S| must reach %.4g (the effort floor); now %.4g", t->limit, t->now);
        break;
    case PS_TARGET_SAMPLE_RATE:
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "sample rate: every value down to %.4g Hz passes (the searched range); now %.4g Hz",
                     t->searched, t->now);
        else
            snprintf(buf, n, "sample rate must reach %.4g Hz (Nyquist frequency %.4g rad/s); now %.4g Hz", t->limit,
                     M_PI * t->limit, t->now);
        break;
    case PS_TARGET_COMPUTE_DELAY:
        time_text(t->now, now, sizeof now);
        if (t->state == PS_TARGET_UNBOUNDED) {
            time_text(t->searched, lim, sizeof lim);
            snprintf(buf, n, "computation delay: every value up to %s passes (the searched range); now %s", lim, now);
        } else {
            time_text(t->limit, lim, sizeof lim);
            if (s->in_z)
                snprintf(buf, n, "computation delay: at most %.0f whole sample%s (%s) pass%s; now %.0f", t->limit / s->h,
                         t->limit == s->h ? "" : "s", lim, t->limit == s->h ? "es" : "", t->now / s->h);
            else if (s->h > 0)
                snprintf(buf, n, "computation delay must stay below %s (%.3g sample%s); now %s (%.3g sample%s)", lim,
                         t->limit / s->h, t->limit == s->h ? "" : "s", now, t->now / s->h,
                         t->now == s->h ? "" : "s");
            else
                snprintf(buf, n, "computation delay must stay below %s; now %s", lim, now);
        }
        break;
    case PS_TARGET_COUNT: break;
    }
}

void ps_requirements_text(const ps_summary *s, char *buf, size_t n)
{
    const ps_requirements *q = &s->req;
    const bool *g = s->req_overridden;
#define MARK(f) (g[f] ? "" : " (default)")
    int w = snprintf(buf, n, "Ms <= %g%s, Mt <= %g%s", q->ms_allowed, MARK(PS_F_MS_ALLOWED), q->mt_allowed,
                     MARK(PS_F_MT_ALLOWED));
    if (w < 0 || (size_t)w >= n)
        return;
    if (q->wb > 0)
        w += snprintf(buf + w, n - (size_t)w, ", |S| <= %g up to %g rad/s", q->eps, q->wb);
    else
        w += snprintf(buf + w, n - (size_t)w, ", no band");
    if ((size_t)w >= n)
        return;
    if (q->wh > 0)
        w += snprintf(buf + w, n - (size_t)w, ", |L| <= %g%s (w_h/w)^(1+%g%s) from w_h = %g rad/s", q->delta,
                      MARK(PS_F_ROLLOFF_GAIN), q->k, MARK(PS_F_ROLLOFF_SLOPE), q->wh);
    else
        w += snprintf(buf + w, n - (size_t)w, ", no roll-off start");
    if ((size_t)w >= n)
        return;
    if (q->effort_allowed > 0)
        snprintf(buf + w, n - (size_t)w, ", |C S| <= %g", q->effort_allowed);
#undef MARK
}

/* Bin ends of the severity distribution: a share of the allowed log-peak,
 * so 1 is the pass/fail edge (redesign above 1) and stays a bin end. */
static const double hist_edge[] = {0.0, 0.25, 0.5, 0.75, 1.0, 1.5, 2.0, 4.0};
enum { N_EDGES = sizeof hist_edge / sizeof hist_edge[0] };
_Static_assert(N_EDGES + 2 == PS_HIST_BINS, "finite bins, the infinite bin and the bin without a severity");

void ps_histogram_bin(int b, double *above, double *up_to)
{
    *above = b > 0 && b < N_EDGES ? hist_edge[b] : NAN;
    *up_to = b >= 0 && b + 1 < N_EDGES ? hist_edge[b + 1] : NAN;
}

const char *ps_histogram_label(int b)
{
    static const char *const label[PS_HIST_BINS] = {
        "0 to 0.25",  "0.25 to 0.5", "0.5 to 0.75",   "0.75 to 1",  "1 to 1.5",
        "1.5 to 2",   "2 to 4",      "above 4",       "infinite",   "none",
    };
    return b >= 0 && b < PS_HIST_BINS ? label[b] : "?";
}

void ps_severity_histogram(const ps_run *r, size_t count[PS_HIST_BINS])
{
    for (int b = 0; b < PS_HIST_BINS; b++)
        count[b] = 0;
    for (size_t i = 0; i < r->n_rows; i++) {
        ps_verdict v = ps_run_verdict(r, i);
        if (v == PS_VERDICT_UNREAD || v == PS_VERDICT_NEEDS_BANDWIDTH) {
            count[PS_HIST_BINS - 1]++;
            continue;
        }
        double s = ps_run_row(r, i)->severity;
        int b;
        if (isnan(s))
            b = PS_HIST_BINS - 1;
        else if (isinf(s))
            b = PS_HIST_BINS - 2;
        else {
            b = N_EDGES - 1; /* above the last finite edge */
            for (int k = 1; k < N_EDGES; k++)
                if (s <= hist_edge[k]) {
                    b = k - 1;
                    break;
                }
        }
        count[b]++;
    }
}

const char *ps_run_title(const ps_run *r)
{
    return r->n_catalogs && r->catalogs[0].title && r->catalogs[0].title[0] ? r->catalogs[0].title : NULL;
}

void ps_report_stem(const ps_run *r, char *out, size_t n)
{
    /* The same rule as the command line's report set (src/cli/main.c). */
    const char *path = r->n_catalogs && r->catalogs[0].file ? r->catalogs[0].file : "plantsieve";
    const char *base = strrchr(path, '/');
    base = base ? base + 1 : path;
    snprintf(out, n, "%s", base);
    char *dot = strrchr(out, '.');
    if (dot && dot != out)
        *dot = '\0';
}

const char ps_unstable_controller_text[] =
    "structure: every stabilizing controller is itself unstable (parity interlacing fails: an odd number of "
    "real unstable poles lies between two real zeros in the right half plane, infinity counted as one)";

bool ps_unstable_controller_claim(const ps_summary *s)
{
    return s->verdict != PS_VERDICT_UNREAD && s->verdict != PS_VERDICT_UNSTABILIZABLE && !s->fl.parity_interlacing;
}
