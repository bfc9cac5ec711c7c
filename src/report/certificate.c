/* certificate.c - the bracket of one plant: floors beside the peaks of a
 * verified controller, in words and in JSON. Wording: a search that finds
 * nothing says so and never calls the plant infeasible; the best found is
 * an upper bound on the best achievable peaks, not the optimum. */
#include "report/certificate.h"

#include <math.h>
#include <string.h>

ps_bracket ps_bracket_of(const ps_summary *s, const ps_cert *c)
{
    if (s->verdict == PS_VERDICT_REDESIGN || s->verdict == PS_VERDICT_UNSTABILIZABLE)
        return PS_BRACKET_RULED_OUT;
    if (c->status == PS_CERT_DEMONSTRATED)
        return PS_BRACKET_DEMONSTRATED;
    if (c->status == PS_CERT_UNDECIDED)
        return PS_BRACKET_UNDECIDED;
    return PS_BRACKET_NOT_ATTEMPTED;
}

const char *ps_bracket_name(ps_bracket b)
{
    static const char *const names[PS_BRACKET_COUNT] = {"ruled out", "demonstrated", "undecided", "not attempted"};
    return (unsigned)b < PS_BRACKET_COUNT ? names[b] : "?";
}

void ps_poly_text(const double *p, size_t n, char *buf, size_t cap)
{
    size_t at = 0;
    buf[0] = '\0';
    bool first = true;
    for (size_t i = 0; i < n && at < cap; i++) {
        double v = p[i];
        if (v == 0.0)
            continue;
        size_t pw = n - 1 - i;
        const char *sign = v < 0 ? (first ? "-" : " - ") : (first ? "" : " + ");
        double a = fabs(v);
        int w;
        if (pw == 0)
            w = snprintf(buf + at, cap - at, "%s%.6g", sign, a);
        else if (a == 1.0)
            w = pw == 1 ? snprintf(buf + at, cap - at, "%ss", sign) : snprintf(buf + at, cap - at, "%ss^%zu", sign, pw);
        else
            w = pw == 1 ? snprintf(buf + at, cap - at, "%s%.6g s", sign, a)
                        : snprintf(buf + at, cap - at, "%s%.6g s^%zu", sign, a, pw);
        if (w < 0)
            return;
        at += (size_t)w;
        first = false;
    }
    if (first)
        snprintf(buf, cap, "0");
}

/* "PID with 2 roll-off poles: K -3.2, wn 1.5 rad/s, ..." */
void ps_controller_words(const ps_controller *c, char *buf, size_t cap)
{
    const double *p = c->param;
    int w = 0;
    switch (c->structure) {
    case PS_CTRL_PI:
        w = snprintf(buf, cap, "PI: K %.6g, integral corner %.6g rad/s", p[0], p[1]);
        break;
    case PS_CTRL_PID:
        w = snprintf(buf, cap, "PID: K %.6g, zeros at natural frequency %.6g rad/s with damping ratio %.4g", p[0],
                     p[1], p[2]);
        break;
    case PS_CTRL_LEADLAG:
        w = snprintf(buf, cap, "lead-lag: K %.6g, zeros -%.6g and -%.6g rad/s, poles -%.6g and -%.6g rad/s", p[0],
                     p[1], p[2], p[3], p[4]);
        break;
    case PS_CTRL_UNSTABLE:
        w = snprintf(buf, cap, "with an unstable pole: K %.6g, zeros -%.6g and -%.6g rad/s, RHP pole +%.6g rad/s",
                     p[0], p[1], p[2], p[3]);
        break;
    case PS_CTRL_NOTCH:
        w = snprintf(buf, cap,
                     "PID with a notch: K %.6g, zeros at natural frequency %.6g rad/s with damping ratio %.4g; notch "
                     "at %.6g rad/s, damping ratios %.4g (zeros) and %.4g (poles)",
                     p[0], p[1], p[2], p[3], p[4], p[5]);
        break;
    case PS_CTRL_FIXED:
        w = snprintf(buf, cap,
                     "fixed order 3: K %.6g, zeros at natural frequency %.6g rad/s with damping ratio %.4g and at "
                     "-%.6g rad/s, poles at natural frequency %.6g rad/s with damping ratio %.4g and at -%.6g rad/s",
                     p[0], p[1], p[2], p[5], p[3], p[4], p[6]);
        break;
    case PS_CTRL_INTERPOLATION:
        w = snprintf(buf, cap, "from the interpolation solution: %.6g / G(s), filter at %.6g rad/s", p[0], p[1]);
        break;
    default:
        w = snprintf(buf, cap, "?");
    }
    if (w > 0 && (size_t)w < cap && c->n_rolloff > 0)
        snprintf(buf + w, cap - (size_t)w, "; %zu roll-off pole%s at -%.6g rad/s", c->n_rolloff,
                 c->n_rolloff == 1 ? "" : "s", p[c->n_param - 1]);
}

static void bracket_core(const ps_summary *s, const ps_screen_opts *opt, char *buf, size_t n);

void ps_bracket_text(const ps_summary *s, const ps_screen_opts *opt, char *buf, size_t n)
{
    bracket_core(s, opt, buf, n);
    const ps_attain *a = &s->cert[0].attain;
    size_t len = strlen(buf);
    if (len && s->n_cert && a->applies && a->within && len < n)
        snprintf(buf + len, n - len, "; with no roll-off required the floors are reached: a controller built from "
                 "the interpolation solution gives Ms %.4g (floor %.4g) and another Mt %.4g (floor %.4g)",
                 a->ms, a->floor_ms, a->mt, a->floor_mt);
}

static void bracket_core(const ps_summary *s, const ps_screen_opts *opt, char *buf, size_t n)
{
    ps_bracket b = ps_summary_bracket(s, opt);
    const ps_cert *c = &s->cert[0];
    char cw[320];
    buf[0] = '\0';
    switch (b) {
    case PS_BRACKET_NONE:
        return;
    case PS_BRACKET_RULED_OUT:
        if (!s->n_cert || !c->found) {
            snprintf(buf, n, "ruled out: a floor exceeds what is allowed, so no controller meets the requirements%s",
                     s->n_cert ? "" : " (no controller searched)");
            return;
        }
        ps_controller_words(&c->ctrl, cw, sizeof cw);
        snprintf(buf, n, "ruled out: a floor exceeds what is allowed; the best controller found reaches Ms %.4g and "
                         "Mt %.4g (floors %.4g and %.4g): %s",
                 c->chk.ms, c->chk.mt, s->fl.ms, s->fl.mt, cw);
        return;
    case PS_BRACKET_NOT_ATTEMPTED:
        snprintf(buf, n, "not attempted: %s", c->reason);
        return;
    case PS_BRACKET_DEMONSTRATED:
    case PS_BRACKET_UNDECIDED:
        break;
    }
    if (!c->found) {
        snprintf(buf, n, "undecided: the floors pass, and no stabilizing controller was found within %zu loop "
                         "evaluations; this does not show that none exists",
                 c->evaluations);
        return;
    }
    ps_controller_words(&c->ctrl, cw, sizeof cw);
    if (b == PS_BRACKET_DEMONSTRATED)
        snprintf(buf, n, "demonstrated: a verified controller meets every requirement with Ms %.4g and Mt %.4g "
                         "(floors %.4g and %.4g; the peaks found are an upper bound on the best achievable, not the "
                         "optimum): %s",
                 c->chk.ms, c->chk.mt, s->fl.ms, s->fl.mt, cw);
    else
        snprintf(buf, n, "undecided: the floors pass; the best controller found in %zu loop evaluations reaches Ms "
                         "%.4g and Mt %.4g (floors %.4g and %.4g, which hold for loops that meet every requirement) "
                         "but %s; this does not show that none exists: %s",
                 c->evaluations, c->chk.ms, c->chk.mt, s->fl.ms, s->fl.mt, c->chk.why, cw);
}

size_t ps_bracket_rows(const ps_run *r, size_t max, void (*fn)(void *ctx, const ps_bracket_row *row), void *ctx)
{
    size_t told = 0;
    for (size_t i = 0; i < r->n_rows && told < max; i++) {
        ps_verdict v = ps_run_verdict(r, i);
        if (v == PS_VERDICT_UNREAD || v == PS_VERDICT_NEEDS_BANDWIDTH)
            continue;
        ps_bracket_row row = {.rank = i + 1, .s = ps_run_row(r, i)};
        row.b = ps_summary_bracket(row.s, &r->opt);
        if (row.b == PS_BRACKET_NONE)
            continue;
        const ps_cert *c = &row.s->cert[0];
        row.found = row.s->n_cert && c->found;
        if (row.found)
            snprintf(row.what, sizeof row.what, "%s, %zu roll-off pole%s%s%s%s", ps_ctrl_structure_name(c->ctrl.structure),
                     c->ctrl.n_rolloff, c->ctrl.n_rolloff == 1 ? "" : "s", c->chk.meets ? "" : " (misses ",
                     c->chk.meets ? "" : ps_loop_miss_word(&c->chk), c->chk.meets ? "" : ")");
        else
            snprintf(row.what, sizeof row.what, "%s",
                     row.s->n_cert && c->status != PS_CERT_NOT_ATTEMPTED ? "none found" : "not searched");
        told++;
        fn(ctx, &row);
    }
    return told;
}

size_t ps_bracket_count(const ps_run *r)
{
    const size_t *pb = r->per_bracket;
    return pb[PS_BRACKET_RULED_OUT] + pb[PS_BRACKET_DEMONSTRATED] + pb[PS_BRACKET_UNDECIDED] +
           pb[PS_BRACKET_NOT_ATTEMPTED];
}

const char *ps_loop_miss_word(const ps_loop_check *k)
{
    if (k->meets)
        return "";
    if (strstr(k->why, "on the band"))
        return "band";
    if (strstr(k->why, "roll-off"))
        return "roll-off";
    if (strstr(k->why, "|C S|"))
        return "effort";
    if (strstr(k->why, "peak |S|"))
        return "Ms";
    if (strstr(k->why, "peak |T|"))
        return "Mt";
    return "a check";
}

/* " (1.15 x the floor)" when the floor binds (>= 1), else "". */
static void ratio_words(double found, double floor, char *buf, size_t cap)
{
    if (floor >= 1 && isfinite(floor))
        snprintf(buf, cap, " (%.3g x the floor %.4g)", found / floor, floor);
    else
        snprintf(buf, cap, " (floor %.4g, not binding)", floor);
}

/* No roll-off required: the floors reached by the interpolation construction. */
static void attain_text(FILE *out, const ps_cert *c)
{
    const ps_attain *a = &c->attain;
    if (!a->applies)
        return;
    char num[400], den[400];
    if (!a->within) {
        fprintf(out, "  attained    the interpolation construction did not come within 1 %% of the floors (Ms %.4g "
                     "against %.4g, Mt %.4g against %.4g)\n",
                a->ms, a->floor_ms, a->mt, a->floor_mt);
        return;
    }
    fprintf(out, "  attained    no roll-off is required, and the floors are reached: C = c / (k G(s)), G the plant "
                 "without its RHP pole and zero, with a filter at %.4g rad/s\n", a->wf);
    ps_poly_text(a->for_ms.num, a->for_ms.n_num, num, sizeof num);
    ps_poly_text(a->for_ms.den, a->for_ms.n_den, den, sizeof den);
    fprintf(out, "              Ms %.6g (%.5g x the floor %.6g), verified stable: C(s) = (%s) / (%s)\n",
            a->ms, a->ms / a->floor_ms, a->floor_ms, num, den);
    ps_poly_text(a->for_mt.num, a->for_mt.n_num, num, sizeof num);
    ps_poly_text(a->for_mt.den, a->for_mt.n_den, den, sizeof den);
    fprintf(out, "              Mt %.6g (%.5g x the floor %.6g), verified stable: C(s) = (%s) / (%s)\n",
            a->mt, a->mt / a->floor_mt, a->floor_mt, num, den);
}

void ps_certificate_text(FILE *out, const ps_summary *s, const ps_cert *c)
{
    ps_bracket b = ps_bracket_of(s, c);
    fprintf(out, "%s  %s  (screen verdict %s)\n", s->id, ps_bracket_name(b), ps_verdict_name(s->verdict));
    fprintf(out, "  floors      Ms >= %.4g  Mt >= %.4g: no controller under the stated requirements does better; "
                 "allowed %.4g and %.4g\n", s->fl.ms,
            s->fl.mt, s->req.ms_allowed, s->req.mt_allowed);
    if (!c->found) {
        if (c->status == PS_CERT_NOT_ATTEMPTED)
            fprintf(out, "  search      not attempted: %s\n", c->reason);
        else
            fprintf(out, "  search      no stabilizing controller found within the budget (%zu loop evaluations); "
                         "this does not show that none exists\n",
                    c->evaluations);
        attain_text(out, c);
        fputc('\n', out);
        return;
    }
    const ps_loop_check *k = &c->chk;
    char rs[96], rt[96], cw[320], num[400], den[400];
    ratio_words(k->ms, s->fl.ms, rs, sizeof rs);
    ratio_words(k->mt, s->fl.mt, rt, sizeof rt);
    fprintf(out, "  best found  Ms %.4g%s  Mt %.4g%s\n", k->ms, rs, k->mt, rt);
    if (k->shape_met)
        fprintf(out, "              an upper bound on the best achievable peaks, not the optimum\n");
    else
        fprintf(out, "              it misses a requirement the floors assume (roll-off, band or effort), so its "
                     "peaks bound nothing\n");
    if (b == PS_BRACKET_UNDECIDED || (b == PS_BRACKET_RULED_OUT && !k->meets))
        fprintf(out, "              does not meet the requirements: %s\n", k->why);
    ps_controller_words(&c->ctrl, cw, sizeof cw);
    ps_poly_text(c->ctrl.num, c->ctrl.n_num, num, sizeof num);
    ps_poly_text(c->ctrl.den, c->ctrl.n_den, den, sizeof den);
    fprintf(out, "  controller  %s\n", cw);
    fprintf(out, "              C(s) = (%s) / (%s)\n", num, den);
    if (k->roots_checked)
        fprintf(out, "  checks      closed loop stable by the argument principle, the closed-loop roots agree; the "
                     "slowest closed-loop pole decays at %.4g 1/s\n",
                k->decay);
    else
        fprintf(out, "  checks      closed loop stable by the argument principle (with delay: no closed-loop roots to "
                     "compare): no closed-loop pole decays slower than %.4g 1/s\n",
                k->decay_min);
    if (isfinite(k->rolloff_ratio))
        fprintf(out, "              from %.4g rad/s on, |L| is at most %.3g times the roll-off bound\n", s->req.wh,
                k->rolloff_ratio);
    if (isfinite(k->band_peak))
        fprintf(out, "              |S| at most %.4g on the band [0, %.4g] rad/s (allowed %.4g)\n", k->band_peak,
                s->req.wb, s->req.eps);
    if (isfinite(k->w_ms))
        fprintf(out, "              peak |C S| %.4g; peaks at %.4g rad/s (|S|) and %.4g rad/s (|T|)\n", k->effort,
                k->w_ms, k->w_mt);
    else
        fprintf(out, "              peak |C S| %.4g; |S| stays below 1 and tends to 1 at high frequency; |T| peaks at "
                     "%.4g rad/s\n",
                k->effort, k->w_mt);
    fprintf(out, "  search      %zu loop evaluations, seed %016llx\n", c->evaluations, (unsigned long long)c->seed);
    attain_text(out, c);
    fputc('\n', out);
}

static json_t *num_or_null(double v)
{
    return isfinite(v) ? json_real(v) : json_null();
}

static json_t *coeffs(const double *p, size_t n)
{
    json_t *a = json_array();
    for (size_t i = 0; a && i < n; i++)
        json_array_append_new(a, json_real(p[i]));
    return a;
}

json_t *ps_certificate_json(const ps_summary *s, const ps_cert *c)
{
    json_t *o = json_object();
    if (!o)
        return NULL;
    ps_bracket b = ps_bracket_of(s, c);
    json_object_set_new(o, "id", json_string(s->id));
    json_object_set_new(o, "outcome", json_string(ps_bracket_name(b)));
    json_object_set_new(o, "verdict", json_string(ps_verdict_name(s->verdict)));
    json_object_set_new(o, "ms_floor", num_or_null(s->fl.ms));
    json_object_set_new(o, "mt_floor", num_or_null(s->fl.mt));
    json_object_set_new(o, "ms_interpolation_floor", num_or_null(s->fl.ms_interpolation));
    json_object_set_new(o, "mt_interpolation_floor", num_or_null(s->fl.mt_interpolation));
    json_object_set_new(o, "effort_floor", num_or_null(s->fl.effort));
    json_object_set_new(o, "ms_allowed", json_real(s->req.ms_allowed));
    json_object_set_new(o, "mt_allowed", json_real(s->req.mt_allowed));
    json_object_set_new(o, "search", json_string(ps_cert_status_name(c->status)));
    json_object_set_new(o, "reason", json_string(c->reason));
    json_object_set_new(o, "evaluations", json_integer((json_int_t)c->evaluations));
    char seed[24];
    snprintf(seed, sizeof seed, "%016llx", (unsigned long long)c->seed);
    json_object_set_new(o, "seed", json_string(seed));
    const ps_attain *a = &c->attain;
    if (a->applies) {
        json_t *at = json_object();
        json_object_set_new(at, "within_1_percent", json_boolean(a->within));
        json_object_set_new(at, "filter_corner", num_or_null(a->wf));
        json_object_set_new(at, "ms", num_or_null(a->ms));
        json_object_set_new(at, "ms_floor", num_or_null(a->floor_ms));
        json_object_set_new(at, "ms_stable", json_boolean(a->ms_stable));
        json_object_set_new(at, "ms_num", coeffs(a->for_ms.num, a->for_ms.n_num));
        json_object_set_new(at, "ms_den", coeffs(a->for_ms.den, a->for_ms.n_den));
        json_object_set_new(at, "mt", num_or_null(a->mt));
        json_object_set_new(at, "mt_floor", num_or_null(a->floor_mt));
        json_object_set_new(at, "mt_stable", json_boolean(a->mt_stable));
        json_object_set_new(at, "mt_num", coeffs(a->for_mt.num, a->for_mt.n_num));
        json_object_set_new(at, "mt_den", coeffs(a->for_mt.den, a->for_mt.n_den));
        json_object_set_new(o, "attained", at);
    }
    if (!c->found) {
        json_object_set_new(o, "controller", json_null());
        return o;
    }
    const ps_loop_check *k = &c->chk;
    json_t *ct = json_object();
    json_object_set_new(ct, "structure", json_string(ps_ctrl_structure_name(c->ctrl.structure)));
    json_object_set_new(ct, "rolloff_poles", json_integer((json_int_t)c->ctrl.n_rolloff));
    json_object_set_new(ct, "parameters", coeffs(c->ctrl.param, c->ctrl.n_param));
    json_object_set_new(ct, "num", coeffs(c->ctrl.num, c->ctrl.n_num));
    json_object_set_new(ct, "den", coeffs(c->ctrl.den, c->ctrl.n_den));
    json_object_set_new(o, "controller", ct);
    json_t *ck = json_object();
    json_object_set_new(ck, "ms", num_or_null(k->ms));
    json_object_set_new(ck, "mt", num_or_null(k->mt));
    json_object_set_new(ck, "w_ms", num_or_null(k->w_ms));
    json_object_set_new(ck, "w_mt", num_or_null(k->w_mt));
    json_object_set_new(ck, "effort", num_or_null(k->effort));
    json_object_set_new(ck, "rolloff_ratio", num_or_null(k->rolloff_ratio));
    json_object_set_new(ck, "band_peak", num_or_null(k->band_peak));
    json_object_set_new(ck, "decay", num_or_null(k->decay));
    json_object_set_new(ck, "decay_min", num_or_null(k->decay_min));
    json_object_set_new(ck, "roots_checked", json_boolean(k->roots_checked));
    json_object_set_new(ck, "meets", json_boolean(k->meets));
    json_object_set_new(ck, "upper_bound", json_boolean(k->shape_met));
    json_object_set_new(ck, "why", json_string(k->why));
    json_object_set_new(o, "found", ck);
    return o;
}

static json_t *roots_json(const ps_root *r, size_t n)
{
    json_t *a = json_array();
    for (size_t i = 0; a && i < n; i++)
        json_array_append_new(a, json_pack("[f,f]", r[i].v.re, r[i].v.im));
    return a;
}

json_t *ps_certificate_plant_json(const ps_analysis *an)
{
    return json_pack("{s:f,s:o,s:o,s:f}", "gain", an->gain, "zeros", roots_json(an->zeros, an->n_zeros), "poles",
                     roots_json(an->poles, an->n_poles), "delay", an->delay);
}
