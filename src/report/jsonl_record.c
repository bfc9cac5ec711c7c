/* jsonl_record.c - every plant's full record as JSON Lines
 * (<stem>.screen.plants.jsonl, schema plantsieve-screening-plant.schema.json),
 * written straight to the stream: one compact object a line in rank order.
 * A million records are written without building a tree for each.
 *
 * The rules of a record (the schema says them too): numbers carry
 * PS_JSONL_DIGITS significant digits, a number that is whole at that
 * precision is written without a fraction; a member that is null or false is
 * left out (absent: no value, not applicable, or false), except the seven
 * top-level members rank, id, verdict, severity, file, line and note; array
 * items are kept in place (null where a value is not finite). */
#include "report/reports.h"

#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "core/numfmt.h"
#include "report/certificate.h"
#include "screen/attribution.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* ---- a small writer: members and items, separators where they belong ---- */

enum { JW_DEPTH = 8, JW_BUF = 1 << 16 };

/* A record is put together in buf and written with one fwrite (a stream's
 * lock taken per character costs more than the record's numbers). */
typedef struct jw {
    FILE *f;
    int depth;
    bool first[JW_DEPTH]; /* no member or item written yet at this depth */
    size_t len;
    bool failed;          /* a write to f failed */
    char buf[JW_BUF];
} jw;

static void jw_flush(jw *w)
{
    if (w->len && fwrite(w->buf, 1, w->len, w->f) != w->len)
        w->failed = true;
    w->len = 0;
}

static void jw_put(jw *w, const char *s, size_t n)
{
    if (w->len + n > sizeof w->buf) {
        jw_flush(w);
        if (n > sizeof w->buf) {
            if (fwrite(s, 1, n, w->f) != n)
                w->failed = true;
            return;
        }
    }
    memcpy(w->buf + w->len, s, n);
    w->len += n;
}

static void jw_puts(jw *w, const char *s)
{
    jw_put(w, s, strlen(s));
}

static void jw_putc(jw *w, char c)
{
    if (w->len == sizeof w->buf)
        jw_flush(w);
    w->buf[w->len++] = c;
}

static void jw_sep(jw *w)
{
    if (w->depth > 0) {
        if (!w->first[w->depth - 1])
            jw_putc(w, ',');
        w->first[w->depth - 1] = false;
    }
}

/* The member name, or nothing for an array item. */
static void jw_key(jw *w, const char *key)
{
    jw_sep(w);
    if (key) {
        jw_putc(w, '"');
        jw_puts(w, key); /* member names are our own ASCII words */
        jw_put(w, "\":", 2);
    }
}

static void jw_open(jw *w, const char *key, char c)
{
    jw_key(w, key);
    jw_putc(w, c);
    if (w->depth < JW_DEPTH)
        w->first[w->depth] = true;
    w->depth++;
}

static void jw_close(jw *w, char c)
{
    jw_putc(w, c);
    w->depth--;
}

/* Whether s is text JSON can carry: valid UTF-8 (no overlong forms, no
 * surrogates, nothing past U+10FFFF). */
static bool utf8_ok(const unsigned char *s)
{
    while (*s) {
        unsigned c = *s;
        size_t n = c < 0x80 ? 1 : c < 0xC2 ? 0 : c < 0xE0 ? 2 : c < 0xF0 ? 3 : c < 0xF5 ? 4 : 0;
        if (n == 0)
            return false;
        unsigned v = n == 1 ? c : n == 2 ? c & 0x1F : n == 3 ? c & 0x0F : c & 0x07;
        for (size_t i = 1; i < n; i++) {
            if ((s[i] & 0xC0) != 0x80)
                return false;
            v = (v << 6) | (s[i] & 0x3F);
        }
        if ((n == 3 && v < 0x800) || (n == 4 && v < 0x10000) || (v >= 0xD800 && v <= 0xDFFF) || v > 0x10FFFF)
            return false;
        s += n;
    }
    return true;
}

/* A string value: ", \ and control characters escaped; everything else as is. */
static void jw_quoted(jw *w, const char *s)
{
    jw_putc(w, '"');
    for (const unsigned char *c = (const unsigned char *)s; *c; c++) {
        switch (*c) {
        case '"': jw_put(w, "\\\"", 2); break;
        case '\\': jw_put(w, "\\\\", 2); break;
        case '\b': jw_put(w, "\\b", 2); break;
        case '\f': jw_put(w, "\\f", 2); break;
        case '\n': jw_put(w, "\\n", 2); break;
        case '\r': jw_put(w, "\\r", 2); break;
        case '\t': jw_put(w, "\\t", 2); break;
        default:
            if (*c < 0x20) {
                char u[8];
                snprintf(u, sizeof u, "\\u%04X", *c);
                jw_put(w, u, 6);
            } else
                jw_putc(w, (char)*c);
        }
    }
    jw_putc(w, '"');
}

/* A string member: left out when empty or not valid UTF-8. */
static void jw_str(jw *w, const char *key, const char *s)
{
    if (s && *s && utf8_ok((const unsigned char *)s)) {
        jw_key(w, key);
        jw_quoted(w, s);
    }
}

/* A member of our own words (a name, a state): written when it is there,
 * even empty; left out when NULL or not valid UTF-8. */
static void jw_text(jw *w, const char *key, const char *s)
{
    if (s && utf8_ok((const unsigned char *)s)) {
        jw_key(w, key);
        jw_quoted(w, s);
    }
}

/* A top-level string that is always written: null when empty or not UTF-8. */
static void jw_str_or_null(jw *w, const char *key, const char *s)
{
    jw_key(w, key);
    if (s && *s && utf8_ok((const unsigned char *)s))
        jw_quoted(w, s);
    else
        jw_put(w, "null", 4);
}

/* x at PS_JSONL_DIGITS significant digits: a whole number at that precision
 * without a fraction, otherwise %g with the exponent's '+' and leading
 * zeros dropped (1e20, 2.5e-7); a value with neither a point nor an
 * exponent (only -0) gets ".0". out holds at least 40 bytes. */
static void num_text(char *out, size_t n, double x)
{
    double w = nearbyint(x);
    if (fabs(x) < 1e9 && fabs(x - w) <= 1e-8 * fabs(x) && !(w == 0 && x != 0) && signbit(x) == signbit(w)) {
        if (x != w) { /* whole only if %g at that precision says so */
            char b[PS_NUMFMT_ROOM];
            ps_fmt_g(b, sizeof b, x, PS_JSONL_DIGITS);
            w = strpbrk(b, ".eEni") ? NAN : strtod(b, NULL);
        }
        if (!isnan(w) && !(w == 0 && signbit(w))) {
            ps_fmt_ll(out, (long long)w); /* |w| < 1e9: fits any n of 40 */
            return;
        }
    }
    ps_fmt_g(out, n, x, PS_JSONL_DIGITS);
    char *e = strchr(out, 'e');
    if (e) {
        char *d = e + 1, *from = e + 1;
        if (*from == '+')
            from++;
        else if (*from == '-')
            d = ++from;
        while (*from == '0' && from[1])
            from++;
        memmove(d, from, strlen(from) + 1);
    } else if (!strchr(out, '.'))
        strcat(out, ".0");
}

/* A number as an array item: null when not finite. */
static void jw_item(jw *w, double x)
{
    jw_key(w, NULL);
    if (!isfinite(x)) {
        jw_put(w, "null", 4);
        return;
    }
    char b[48];
    num_text(b, sizeof b, x);
    jw_puts(w, b);
}

/* A number member: left out when not finite. */
static void jw_num(jw *w, const char *key, double x)
{
    if (!isfinite(x))
        return;
    char b[48];
    num_text(b, sizeof b, x);
    jw_key(w, key);
    jw_puts(w, b);
}

static void jw_int(jw *w, const char *key, long long v)
{
    char b[24];
    size_t n = ps_fmt_ll(b, v);
    jw_key(w, key);
    jw_put(w, b, n);
}

/* A flag member: written only when true. */
static void jw_true(jw *w, const char *key, bool b)
{
    if (b) {
        jw_key(w, key);
        jw_put(w, "true", 4);
    }
}

/* ---- the parts of a record ---- */

/* Roots: a real root as its number, a complex one as [re, im]. */
static void roots(jw *w, const char *key, const ps_cplx *r, size_t n)
{
    jw_open(w, key, '[');
    for (size_t i = 0; i < n && i < PS_MAP_MAX; i++) {
        if (r[i].im == 0)
            jw_item(w, r[i].re);
        else {
            jw_open(w, NULL, '[');
            jw_item(w, r[i].re);
            jw_item(w, r[i].im);
            jw_close(w, ']');
        }
    }
    jw_close(w, ']');
}

static void plant_part(jw *w, const ps_summary *s)
{
    jw_open(w, "plant", '{');
    roots(w, "poles", s->poles, s->n_poles);
    roots(w, "zeros", s->zeros, s->n_zeros);
    jw_int(w, "n_poles", (long long)s->n_poles);
    jw_int(w, "n_zeros", (long long)s->n_zeros);
    jw_true(w, "roots_truncated", s->n_poles > PS_MAP_MAX || s->n_zeros > PS_MAP_MAX);
    jw_num(w, "gain", s->gain);
    jw_num(w, "delay", s->delay);
    jw_int(w, "relative_degree", s->rel_degree);
    jw_int(w, "rhp_poles", (long long)s->n_rhp_poles);
    jw_int(w, "rhp_zeros", (long long)s->n_rhp_zeros);
    jw_true(w, "hidden_unstable_mode", s->hidden_unstable);
    jw_close(w, '}');
}

/* A requirement as the summary's requirement_defaults has it: a value, or
 * none (a band, roll-off or effort requirement not given). */
static bool req_value(const ps_requirements *q, int k, double *v)
{
    switch (k) {
    case 0: *v = q->ms_allowed; break;
    case 1: *v = q->mt_allowed; break;
    case 2: *v = q->wb > 0 ? q->wb : NAN; break;
    case 3: *v = q->wb > 0 ? q->eps : NAN; break;
    case 4: *v = q->wh > 0 ? q->wh : NAN; break;
    case 5: *v = q->delta; break;
    case 6: *v = q->k; break;
    default: *v = q->effort_allowed > 0 ? q->effort_allowed : NAN; break;
    }
    return isfinite(*v);
}

/* The members that differ from the defaults (absent: the default), and the
 * fields the catalog gave. */
static void requirements_part(jw *w, const ps_summary *s, const ps_requirements *dflt)
{
    static const char *const key[] = {"peak_s_allowed", "peak_t_allowed", "band_edge", "band_attenuation",
                                      "rolloff_start", "rolloff_gain", "rolloff_slope", "effort_allowed"};
    jw_open(w, "requirements", '{');
    for (int k = 0; k < 8; k++) {
        double v, d;
        bool has = req_value(&s->req, k, &v), dhas = req_value(dflt, k, &d);
        if (has && !(dhas && v == d))
            jw_num(w, key[k], v);
    }
    jw_open(w, "given", '[');
    for (int f = PS_F_MS_ALLOWED; f <= PS_F_EFFORT_ALLOWED; f++)
        if (s->req_overridden[f]) {
            jw_key(w, NULL);
            jw_quoted(w, ps_field_name((ps_field)f));
        }
    jw_close(w, ']');
    jw_close(w, '}');
}

/* A floor: its number, or (past a double's range) its base-10 logarithm as
 * <key>_log10. Why it has no number goes to the reasons. */
typedef struct floor_why {
    const char *key;
    const char *text;
} floor_why;

enum { N_WHY = 12 };

static void floor_member(jw *w, floor_why *why, size_t *n_why, const char *key, double x, double ln,
                         const char *why_inf)
{
    static const char past[] = "finite but past a double's range (about 1.8e308): its base-10 logarithm is given "
                               "beside it";
    if (isfinite(x)) {
        jw_num(w, key, x);
        return;
    }
    if (isinf(x) && x > 0 && isfinite(ln)) {
        char k[64];
        snprintf(k, sizeof k, "%s_log10", key);
        jw_num(w, k, ln / log(10.0));
        why[(*n_why)++] = (floor_why){key, past};
        return;
    }
    why[(*n_why)++] = (floor_why){key, isinf(x) ? why_inf : "not computed"};
}

/* The survey's floors without what is the same for every plant (the
 * assumptions and the window's basis are in the summary), with the Bode
 * coverage's controller degree and the times to double; reasons that only
 * say which requirement or sampling is missing follow from "requirements"
 * and "sampling" and are left out. */
static void floors_part(jw *w, const ps_summary *s)
{
    const ps_floors *fl = &s->fl;
    floor_why why[N_WHY];
    size_t n_why = 0;
    jw_open(w, "floors", '{');
    jw_num(w, "bode_area", fl->bode_area);
    floor_member(w, why, &n_why, "ms", fl->ms, fl->ms_ln, fl->note);
    floor_member(w, why, &n_why, "mt", fl->mt, fl->mt_ln, fl->note);
    floor_member(w, why, &n_why, "ms_interpolation", fl->ms_interpolation, fl->ms_interpolation_ln, fl->note);
    floor_member(w, why, &n_why, "mt_interpolation", fl->mt_interpolation, fl->mt_interpolation_ln, fl->note);
    struct { const char *key; double v, ln; } req_floors[] = {
        {"ms_band", fl->ms_band, fl->ms_band_ln},
        {"ms_poisson", fl->ms_poisson, fl->ms_poisson_ln},
        {"mt_poisson", fl->mt_poisson, fl->mt_poisson_ln},
    };
    for (size_t i = 0; i < 3; i++) /* NAN: a requirement is missing (a reason left out) */
        if (!isnan(req_floors[i].v))
            floor_member(w, why, &n_why, req_floors[i].key, req_floors[i].v, req_floors[i].ln, fl->note);
    floor_member(w, why, &n_why, "effort", fl->effort, fl->effort_ln, fl->note);
    if (!(fl->h > 0)) {
        /* a continuous loop: the reason is left out */
    } else if (isnan(fl->ms_nyquist))
        why[n_why++] = (floor_why){"ms_nyquist", "the plant in z has direct feedthrough: L(inf) may be non-zero, "
                                                 "so the discrete Bode area gives no floor"};
    else
        floor_member(w, why, &n_why, "ms_nyquist", fl->ms_nyquist, fl->ms_nyquist_ln, fl->note);
    jw_text(w, "limiting", fl->limiting);
    jw_true(w, "infinite", fl->infinite);
    jw_num(w, "condition_estimate", fl->cond);
    jw_open(w, "window", '{');
    jw_num(w, "crossover_min", fl->crossover_min);
    jw_num(w, "crossover_max", fl->crossover_max);
    jw_true(w, "open", fl->window_open);
    jw_close(w, '}');
    jw_str(w, "note", fl->note);
    size_t kept = 0;
    for (size_t i = 0; i < n_why; i++) {
        const char *t = why[i].text;
        if (!t || !utf8_ok((const unsigned char *)t) || strncmp(t, "needs ", 6) == 0)
            continue;
        if (kept++ == 0)
            jw_open(w, "reasons", '{');
        jw_text(w, why[i].key, t);
    }
    if (kept)
        jw_close(w, '}');
    jw_int(w, "bode_controller_relative_degree_min", fl->bode_controller_rd);
    jw_open(w, "time_to_double", '[');
    for (size_t i = 0; i < s->n_growth; i++) {
        jw_open(w, NULL, '[');
        jw_item(w, s->growth[i].re);
        jw_item(w, s->growth[i].im);
        jw_item(w, log(2.0) / s->growth[i].re);
        jw_close(w, ']');
    }
    jw_close(w, ']');
    jw_close(w, '}');
}

static void sampling_part(jw *w, const ps_summary *s)
{
    const ps_floors *fl = &s->fl;
    double h = s->h;
    if (!(h > 0))
        return;
    jw_open(w, "sampling", '{');
    jw_num(w, "rate_hz", 1.0 / h);
    jw_num(w, "period_s", h);
    jw_num(w, "nyquist_rad_s", M_PI / h);
    jw_num(w, "compute_delay_s", s->compute_delay);
    jw_num(w, "compute_delay_samples", s->compute_delay / h);
    jw_text(w, "domain", s->in_z ? "z" : "s");
    jw_int(w, "z_rel_degree", fl->z_rel_degree);
    jw_open(w, "poles_z", '[');
    for (size_t i = 0; i < fl->n_zpoles && i < PS_ZMAP; i++) {
        jw_open(w, NULL, '{');
        jw_num(w, "re", fl->zpoles[i].re);
        jw_num(w, "im", fl->zpoles[i].im);
        jw_close(w, '}');
    }
    jw_close(w, ']');
    jw_open(w, "zeros_z", '[');
    for (size_t i = 0; i < fl->n_zzeros && i < PS_ZMAP; i++) {
        jw_open(w, NULL, '{');
        jw_num(w, "re", fl->zzeros[i].re);
        jw_num(w, "im", fl->zzeros[i].im);
        jw_true(w, "sampling", ps_zzero_is_sampling(fl, s->in_z, i));
        jw_true(w, "outside", ps_zroot_outside(fl->zzeros[i]));
        jw_close(w, '}');
    }
    jw_close(w, ']');
    jw_int(w, "n_poles_z", (long long)fl->n_zpoles);
    jw_int(w, "n_zeros_z", (long long)fl->n_zzeros);
    jw_int(w, "n_sampling_zeros", (long long)(s->in_z ? 0 : fl->n_sampling_zeros));
    jw_int(w, "n_zeros_outside", (long long)fl->n_zzeros_outside);
    jw_close(w, '}');
}

/* A value past a double's range also as its base-10 logarithm. */
static void log10_member(jw *w, const char *key, double x, double ln)
{
    if (isinf(x) && x > 0 && isfinite(ln))
        jw_num(w, key, ln / log(10.0));
}

/* The binding floor taken apart (screen/attribution.h): the present
 * factors, lowest relaxed floor first. */
static void attribution_part(jw *w, const ps_attribution *a)
{
    jw_open(w, "attribution", '{');
    jw_text(w, "binding", ps_peak_name(a->binding));
    jw_num(w, "floor", a->floor);
    jw_num(w, "allowed", a->allowed);
    jw_open(w, "factors", '[');
    for (size_t i = 0; i < a->n_present; i++) {
        ps_factor f = (ps_factor)a->order[i];
        jw_open(w, NULL, '{');
        jw_text(w, "factor", ps_factor_key(f));
        jw_num(w, "floor_without", a->without[f]);
        jw_true(w, "lowers", i < a->n_lowering);
        log10_member(w, "floor_without_log10", a->without[f], a->without_ln[f]);
        jw_close(w, '}');
    }
    jw_close(w, ']');
    jw_num(w, "all_relaxed", a->all_relaxed);
    log10_member(w, "floor_log10", a->floor, a->floor_ln);
    log10_member(w, "all_relaxed_log10", a->all_relaxed, a->all_relaxed_ln);
    jw_close(w, '}');
}

/* The targets that apply, compact: members without a value are left out,
 * and the sentence the text reports build from a target is not repeated.
 * "why" is kept where it adds a figure (no value passes: the floor at the
 * end of the search), not where it only restates the state. */
static void targets_part(jw *w, const ps_summary *s)
{
    jw_open(w, "targets", '{');
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        const ps_target *t = &s->target[k];
        if (t->state == PS_TARGET_NA) /* absent: does not apply */
            continue;
        jw_open(w, ps_target_key((ps_target_kind)k), '{');
        jw_text(w, "state", ps_target_state_name(t->state));
        jw_num(w, "now", t->now);
        if (t->state == PS_TARGET_FOUND)
            jw_num(w, "limit", t->limit);
        if (t->state == PS_TARGET_UNBOUNDED || t->state == PS_TARGET_NONE)
            jw_num(w, "searched_to", t->searched);
        jw_true(w, "passes_now", t->passes_now);
        if (t->state != PS_TARGET_UNBOUNDED)
            jw_str(w, "why", t->why);
        jw_close(w, '}');
    }
    jw_close(w, '}');
}

/* The Ms floor against the band edge: the edges are a logarithmic grid
 * (screen.c: edge_i = from * (to / from)^(i / (points - 1))), so only its
 * ends are written; the floors, for plotting, at four significant digits. */
static void band_curve_part(jw *w, const ps_summary *s)
{
    if (!s->n_curve)
        return;
    jw_open(w, "band_curve", '{');
    jw_num(w, "attenuation", s->band_eps);
    jw_num(w, "band_edge_from", s->curve_wb[0]);
    jw_num(w, "band_edge_to", s->curve_wb[s->n_curve - 1]);
    jw_int(w, "points", (long long)s->n_curve);
    jw_open(w, "ms_floor", '[');
    for (size_t i = 0; i < s->n_curve; i++) {
        double x = s->curve_ms[i];
        jw_item(w, isfinite(x) ? ps_round_sig(x, 4) : x);
    }
    jw_close(w, ']');
    jw_close(w, '}');
}

/* Controller coefficients at full precision (17 digits: they are pasted
 * into other tools, and the verification ran on these values). */
static void jw_coeffs(jw *w, const char *key, const double *p, size_t n)
{
    jw_open(w, key, '[');
    for (size_t i = 0; i < n; i++) {
        jw_key(w, NULL);
        char b[PS_NUMFMT_ROOM];
        if (isfinite(p[i])) {
            ps_fmt_g(b, sizeof b, p[i], 17);
            jw_puts(w, b);
        } else
            jw_put(w, "null", 4);
    }
    jw_close(w, ']');
}

/* screen --certify: the bracket of the plant (README "Certificate controllers"). */
static void certificate_part(jw *w, const ps_run *r, const ps_summary *s)
{
    ps_bracket b = ps_summary_bracket(s, &r->opt);
    if (b == PS_BRACKET_NONE)
        return;
    jw_open(w, "certificate", '{');
    jw_text(w, "outcome", ps_bracket_name(b));
    if (!s->n_cert) {
        jw_text(w, "search", "not run");
        jw_close(w, '}');
        return;
    }
    const ps_cert *c = &s->cert[0];
    jw_text(w, "search", ps_cert_status_name(c->status));
    jw_str(w, "reason", c->reason);
    jw_int(w, "evaluations", (long long)c->evaluations);
    char seed[24];
    snprintf(seed, sizeof seed, "%016llx", (unsigned long long)c->seed);
    jw_text(w, "seed", seed);
    if (c->attain.applies) {
        const ps_attain *a = &c->attain;
        jw_open(w, "attained", '{');
        jw_true(w, "within_1_percent", a->within);
        jw_num(w, "filter_corner", a->wf);
        jw_num(w, "ms", a->ms);
        jw_num(w, "ms_floor", a->floor_ms);
        jw_coeffs(w, "ms_num", a->for_ms.num, a->for_ms.n_num);
        jw_coeffs(w, "ms_den", a->for_ms.den, a->for_ms.n_den);
        jw_num(w, "mt", a->mt);
        jw_num(w, "mt_floor", a->floor_mt);
        jw_coeffs(w, "mt_num", a->for_mt.num, a->for_mt.n_num);
        jw_coeffs(w, "mt_den", a->for_mt.den, a->for_mt.n_den);
        jw_close(w, '}');
    }
    if (c->found) {
        const ps_loop_check *k = &c->chk;
        jw_open(w, "controller", '{');
        jw_text(w, "structure", ps_ctrl_structure_name(c->ctrl.structure));
        jw_int(w, "rolloff_poles", (long long)c->ctrl.n_rolloff);
        jw_coeffs(w, "parameters", c->ctrl.param, c->ctrl.n_param);
        jw_coeffs(w, "num", c->ctrl.num, c->ctrl.n_num);
        jw_coeffs(w, "den", c->ctrl.den, c->ctrl.n_den);
        jw_close(w, '}');
        jw_open(w, "found", '{');
        jw_num(w, "ms", k->ms);
        jw_num(w, "mt", k->mt);
        jw_num(w, "w_ms", k->w_ms);
        jw_num(w, "w_mt", k->w_mt);
        jw_num(w, "effort", k->effort);
        jw_num(w, "rolloff_ratio", k->rolloff_ratio);
        jw_num(w, "band_peak", k->band_peak);
        jw_num(w, "decay", k->decay);
        jw_num(w, "decay_min", k->decay_min);
        jw_true(w, "roots_checked", k->roots_checked);
        jw_true(w, "meets", k->meets);
        jw_true(w, "upper_bound", k->shape_met);
        jw_str(w, "why", k->why);
        jw_close(w, '}');
        if (s->n_cert_curve) {
            jw_open(w, "loop_curve", '{');
            jw_num(w, "w_from", s->cert_w_from);
            jw_num(w, "w_to", s->cert_w_to);
            jw_int(w, "points", (long long)s->n_cert_curve);
            jw_open(w, "s", '[');
            for (size_t i = 0; i < s->n_cert_curve; i++)
                jw_item(w, isfinite(s->cert_s[i]) ? ps_round_sig(s->cert_s[i], 4) : (double)s->cert_s[i]);
            jw_close(w, ']');
            jw_open(w, "t", '[');
            for (size_t i = 0; i < s->n_cert_curve; i++)
                jw_item(w, isfinite(s->cert_t[i]) ? ps_round_sig(s->cert_t[i], 4) : (double)s->cert_t[i]);
            jw_close(w, ']');
            jw_close(w, '}');
        }
    }
    jw_close(w, '}');
}

static void record(jw *w, const ps_run *r, const ps_summary *s, size_t rank, const ps_requirements *dflt)
{
    bool unread = s->verdict == PS_VERDICT_UNREAD;
    jw_open(w, NULL, '{');
    jw_int(w, "rank", (long long)rank);
    jw_str_or_null(w, "id", s->id);
    jw_text(w, "verdict", ps_verdict_name(s->verdict));
    jw_key(w, "severity");
    if (isfinite(s->severity)) {
        char b[48];
        num_text(b, sizeof b, s->severity);
        jw_puts(w, b);
    } else
        jw_put(w, "null", 4);
    jw_true(w, "severity_infinite", isinf(s->severity));
    jw_str_or_null(w, "file", s->file_index < r->n_catalogs ? r->catalogs[s->file_index].file : "");
    jw_int(w, "line", (long long)s->line);
    jw_str_or_null(w, "note", s->note);
    if (unread) {
        jw_open(w, "error", '{');
        jw_str(w, "message", s->err_text);
        jw_int(w, "line", (long long)s->err_line);
        jw_int(w, "column", (long long)s->err_col);
        jw_str(w, "field", s->err_field);
        jw_close(w, '}');
        jw_close(w, '}');
        return;
    }
    jw_true(w, "unstable_controller_required", !s->fl.parity_interlacing);
    jw_open(w, "shares", '{');
    jw_num(w, "ms", s->share_ms);
    jw_num(w, "mt", s->share_mt);
    jw_num(w, "effort", s->share_effort);
    jw_close(w, '}');
    jw_text(w, "worst", s->worst);
    jw_str(w, "cause", s->cause);
    plant_part(w, s);
    requirements_part(w, s, dflt);
    floors_part(w, s);
    sampling_part(w, s);
    attribution_part(w, &s->attr);
    targets_part(w, s);
    band_curve_part(w, s);
    certificate_part(w, r, s);
    jw_close(w, '}');
}

ps_status ps_write_plants_jsonl(FILE *f, const ps_run *r)
{
    ps_plant *p = calloc(1, sizeof *p);
    if (!p)
        return PS_ERR_NOMEM;
    ps_plant_reset(p); /* the requirements an entry gets when it gives none */
    ps_requirements dflt = p->req;
    free(p);
    jw *w = malloc(sizeof *w);
    if (!w)
        return PS_ERR_NOMEM;
    *w = (jw){.f = f};
    for (size_t i = 0; i < r->n_rows && !w->failed; i++) {
        w->depth = 0;
        record(w, r, ps_run_row(r, i), i + 1, &dflt);
        jw_putc(w, '\n');
        if (w->len > sizeof w->buf / 2)
            jw_flush(w);
    }
    jw_flush(w);
    bool failed = w->failed;
    free(w);
    return failed || ferror(f) ? PS_ERR_IO : PS_OK;
}
