/* words.c - wording shared by every report: the caution, verdict meanings,
 * target sentences and the requirements line. */
#include "report/reports.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

const char ps_caution_text[] =
    "Caution: these floors are necessary conditions only. A variant that passes is not shown to be "
    "controllable with adequate robustness; one that fails cannot meet the stated requirements with any "
    "linear time-invariant controller under the stated assumptions. The results do not replace a full "
    "controller design and verification, the applicable codes and standards, or licensed engineering "
    "judgment; flight-, vehicle- and people-critical hardware needs a complete design and verification "
    "process.";

const char *ps_verdict_meaning(ps_verdict v)
{
    switch (v) {
    case PS_VERDICT_CLEAR: return "every floor is well inside the allowed peaks";
    case PS_VERDICT_MARGINAL: return "the floors already use most of the allowed log-peak";
    case PS_VERDICT_REDESIGN: return "some floor exceeds what the requirements allow: change the hardware";
    case PS_VERDICT_UNSTABILIZABLE: return "no controller can stabilize this plant as built";
    case PS_VERDICT_UNREAD: return "the entry could not be read or checked";
    case PS_VERDICT_COUNT: break;
    }
    return "?";
}

const char *ps_target_label(ps_target_kind k)
{
    switch (k) {
    case PS_TARGET_POLE: return "largest passing unstable pole";
    case PS_TARGET_ZERO: return "smallest passing RHP zero";
    case PS_TARGET_DELAY: return "largest passing delay";
    case PS_TARGET_ROLLOFF: return "smallest passing available bandwidth";
    case PS_TARGET_BAND: return "promise-able band edge";
    case PS_TARGET_COUNT: break;
    }
    return "?";
}

static void delay_text(double th, char *buf, size_t n)
{
    if (th < 1.0)
        snprintf(buf, n, "%.3g ms", th * 1e3);
    else
        snprintf(buf, n, "%.4g s", th);
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
    char now[48], lim[48];
    switch (k) {
    case PS_TARGET_POLE:
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "unstable pole: passes up to %.4g rad/s (searched); now %.4g rad/s", t->searched, t->now);
        else
            snprintf(buf, n, "dominant unstable pole must stay %s %.4g rad/s (time to double %.3g ms); now %.4g rad/s",
                     t->passes_now ? "at most" : "below", t->limit, 1e3 * log(2.0) / t->limit, t->now);
        break;
    case PS_TARGET_ZERO:
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "RHP zero: passes down to %.4g rad/s (searched); now %.4g rad/s", t->searched, t->now);
        else
            snprintf(buf, n, "smallest RHP zero must be at least %.4g rad/s; now %.4g rad/s", t->limit, t->now);
        break;
    case PS_TARGET_DELAY:
        delay_text(t->now, now, sizeof now);
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "delay: %s; now %s", t->why, now);
        else {
            delay_text(t->limit, lim, sizeof lim);
            snprintf(buf, n, "delay must stay below %s; now %s", lim, now);
        }
        break;
    case PS_TARGET_ROLLOFF:
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "available bandwidth: passes down to %.4g rad/s (searched); now %.4g rad/s", t->searched,
                     t->now);
        else
            snprintf(buf, n, "available bandwidth (roll-off start) must reach %.4g rad/s; now %.4g rad/s", t->limit,
                     t->now);
        break;
    case PS_TARGET_BAND:
        if (isnan(t->now))
            snprintf(now, sizeof now, "no band required");
        else
            snprintf(now, sizeof now, "required %.4g rad/s", t->now);
        if (t->state == PS_TARGET_UNBOUNDED)
            snprintf(buf, n, "band edge with |S| <= %.3g: any up to %.4g rad/s keeps Ms within allowed; %s",
                     s->band_eps, t->searched, now);
        else
            snprintf(buf, n, "widest band edge with |S| <= %.3g under the allowed Ms: %.4g rad/s; %s", s->band_eps,
                     t->limit, now);
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
