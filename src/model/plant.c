/* plant.c - catalog entry bookkeeping and validation of the three model forms. */
#include "model/plant.h"

#include <math.h>
#include <stddef.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

static const char *const field_names[PS_F_COUNT] = {
    [PS_F_ID] = "id",           [PS_F_NOTE] = "note",   [PS_F_NUM] = "numerator",
    [PS_F_DEN] = "denominator", [PS_F_ZEROS] = "zeros", [PS_F_POLES] = "poles",
    [PS_F_GAIN] = "gain",       [PS_F_A] = "a",         [PS_F_B] = "b",
    [PS_F_C] = "c",             [PS_F_D] = "d",         [PS_F_DELAY] = "delay",
    [PS_F_MS_ALLOWED] = "peak_s_allowed",     [PS_F_MT_ALLOWED] = "peak_t_allowed",
    [PS_F_BAND_EDGE] = "band_edge",           [PS_F_BAND_ATTENUATION] = "band_attenuation",
    [PS_F_ROLLOFF_START] = "rolloff_start",   [PS_F_ROLLOFF_GAIN] = "rolloff_gain",
    [PS_F_ROLLOFF_SLOPE] = "rolloff_slope",   [PS_F_EFFORT_ALLOWED] = "effort_allowed",
    [PS_F_SAMPLE_RATE] = "sample_rate",       [PS_F_COMPUTE_DELAY] = "compute_delay",
    [PS_F_DOMAIN] = "domain",
};

ps_field_kind ps_field_kind_of(ps_field f)
{
    switch (f) {
    case PS_F_GAIN: case PS_F_D: case PS_F_DELAY: case PS_F_MS_ALLOWED: case PS_F_MT_ALLOWED:
    case PS_F_ROLLOFF_GAIN: case PS_F_ROLLOFF_SLOPE: case PS_F_EFFORT_ALLOWED:
        return PS_KIND_REAL;
    case PS_F_BAND_EDGE: case PS_F_ROLLOFF_START: return PS_KIND_FREQ;
    case PS_F_BAND_ATTENUATION: return PS_KIND_RATIO;
    default: return PS_KIND_OTHER;
    }
}

/* Offset of a single-valued real field in ps_plant, 0 when f is not one. */
static size_t scalar_offset(ps_field f)
{
    switch (f) {
    case PS_F_GAIN: return offsetof(ps_plant, gain);
    case PS_F_D: return offsetof(ps_plant, d);
    case PS_F_DELAY: return offsetof(ps_plant, delay);
    case PS_F_MS_ALLOWED: return offsetof(ps_plant, req.ms_allowed);
    case PS_F_MT_ALLOWED: return offsetof(ps_plant, req.mt_allowed);
    case PS_F_BAND_EDGE: return offsetof(ps_plant, req.wb);
    case PS_F_BAND_ATTENUATION: return offsetof(ps_plant, req.eps);
    case PS_F_ROLLOFF_START: return offsetof(ps_plant, req.wh);
    case PS_F_ROLLOFF_GAIN: return offsetof(ps_plant, req.delta);
    case PS_F_ROLLOFF_SLOPE: return offsetof(ps_plant, req.k);
    case PS_F_EFFORT_ALLOWED: return offsetof(ps_plant, req.effort_allowed);
    default: return 0;
    }
}

double *ps_plant_scalar(ps_plant *p, ps_field f)
{
    size_t off = scalar_offset(f);
    return off ? (double *)(void *)((char *)p + off) : NULL;
}

const char *ps_field_name(ps_field f)
{
    return f < PS_F_COUNT ? field_names[f] : "?";
}

ps_field ps_field_lookup(const char *key)
{
    for (int f = 0; f < PS_F_COUNT; f++)
        if (strcmp(key, field_names[f]) == 0)
            return (ps_field)f;
    return PS_F_COUNT;
}

const char *ps_form_name(ps_form f)
{
    switch (f) {
    case PS_FORM_POLY: return "polynomial";
    case PS_FORM_FACTORED: return "factored";
    case PS_FORM_SS: return "state_space";
    default: return "none";
    }
}

/* Copy a text field up to its terminator (the rest of the buffer is never read). */
static void copy_text(char *dst, const char *src, size_t cap)
{
    size_t n = strnlen(src, cap - 1);
    memcpy(dst, src, n);
    dst[n] = '\0';
}

static size_t capped(size_t n, size_t cap) { return n < cap ? n : cap; }

/* Copy the first n items (at most cap) of an array field. */
static void copy_items(void *dst, const void *src, size_t n, size_t cap, size_t size)
{
    memcpy(dst, src, capped(n, cap) * size);
}

void ps_plant_copy(ps_plant *dst, const ps_plant *src)
{
    /* Arrays are copied up to their counts only. The reader copies every
     * plant once; copying the fixed blocks whole moved about 5 kB a plant. */
    copy_text(dst->id, src->id, sizeof dst->id);
    copy_text(dst->note, src->note, sizeof dst->note);
    dst->line = src->line;
    dst->present = src->present;
    memcpy(dst->field_line, src->field_line, sizeof dst->field_line);
    memcpy(dst->field_col, src->field_col, sizeof dst->field_col);
    dst->form = src->form;

    dst->n_num = src->n_num;
    dst->n_den = src->n_den;
    dst->n_zeros = src->n_zeros;
    dst->n_poles = src->n_poles;
    dst->a_rows = src->a_rows;
    dst->a_cols = src->a_cols;
    dst->n_b = src->n_b;
    dst->n_c = src->n_c;
    copy_items(dst->num, src->num, src->n_num, PS_MAX_ORDER + 1, sizeof src->num[0]);
    copy_items(dst->den, src->den, src->n_den, PS_MAX_ORDER + 1, sizeof src->den[0]);
    copy_items(dst->zeros, src->zeros, src->n_zeros, PS_MAX_ORDER, sizeof src->zeros[0]);
    copy_items(dst->poles, src->poles, src->n_poles, PS_MAX_ORDER, sizeof src->poles[0]);
    copy_items(dst->a, src->a, src->a_rows * src->a_cols, PS_MAX_ORDER * PS_MAX_ORDER, sizeof src->a[0]);
    copy_items(dst->b, src->b, src->n_b, PS_MAX_ORDER, sizeof src->b[0]);
    copy_items(dst->c, src->c, src->n_c, PS_MAX_ORDER, sizeof src->c[0]);
    dst->gain = src->gain;
    dst->d = src->d;
    dst->delay = src->delay;
    dst->req = src->req;
    dst->sample_period = src->sample_period;
    dst->compute_delay = src->compute_delay;
    dst->compute_delay_samples = src->compute_delay_samples;
    dst->in_z = src->in_z;
    dst->defaults_sample_period = src->defaults_sample_period;
    dst->n_warn = src->n_warn;
    for (size_t i = 0; i < capped(src->n_warn, PS_MAX_WARN); i++)
        copy_text(dst->warn[i], src->warn[i], sizeof dst->warn[i]);
}

void ps_plant_reset(ps_plant *p)
{
    /* Only the bookkeeping is cleared; arrays are valid up to their counts. */
    p->id[0] = p->note[0] = '\0';
    p->line = 0;
    p->present = 0;
    memset(p->field_line, 0, sizeof p->field_line);
    memset(p->field_col, 0, sizeof p->field_col);
    p->form = PS_FORM_NONE;
    p->n_num = p->n_den = p->n_zeros = p->n_poles = 0;
    p->a_rows = p->a_cols = p->n_b = p->n_c = 0;
    p->gain = 1.0;
    p->d = 0.0;
    p->delay = 0.0;
    p->req = (ps_requirements){.ms_allowed = 2.0, .mt_allowed = 1.25, .delta = 0.5, .k = 1.0};
    p->sample_period = 0.0;
    p->compute_delay = 0.0;
    p->compute_delay_samples = NAN;
    p->in_z = false;
    p->defaults_sample_period = 0.0;
    p->n_warn = 0;
}

void ps_plant_mark(ps_plant *p, ps_field f, size_t line, size_t col)
{
    p->present |= 1u << f;
    p->field_line[f] = line;
    p->field_col[f] = col;
}

void ps_plant_warn(ps_plant *p, const char *fmt, ...)
{
    if (p->n_warn >= PS_MAX_WARN)
        return;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(p->warn[p->n_warn++], PS_WARN_TEXT, fmt, ap);
    va_end(ap);
}

void ps_plant_apply_defaults(ps_plant *p, const ps_plant *df)
{
    p->defaults_sample_period = ps_plant_has(df, PS_F_SAMPLE_RATE) ? df->sample_period : 0.0;
    for (int f = 0; f < PS_F_COUNT; f++) {
        if (f == PS_F_ID || !ps_plant_has(df, (ps_field)f) || ps_plant_has(p, (ps_field)f))
            continue;
        switch ((ps_field)f) {
        case PS_F_NOTE: memcpy(p->note, df->note, sizeof p->note); break;
        case PS_F_NUM:
            p->n_num = df->n_num;
            memcpy(p->num, df->num, df->n_num * sizeof *p->num);
            break;
        case PS_F_DEN:
            p->n_den = df->n_den;
            memcpy(p->den, df->den, df->n_den * sizeof *p->den);
            break;
        case PS_F_ZEROS:
            p->n_zeros = df->n_zeros;
            memcpy(p->zeros, df->zeros, df->n_zeros * sizeof *p->zeros);
            break;
        case PS_F_POLES:
            p->n_poles = df->n_poles;
            memcpy(p->poles, df->poles, df->n_poles * sizeof *p->poles);
            break;
        case PS_F_GAIN:
        case PS_F_MS_ALLOWED: case PS_F_MT_ALLOWED: case PS_F_BAND_EDGE: case PS_F_BAND_ATTENUATION:
        case PS_F_ROLLOFF_START: case PS_F_ROLLOFF_GAIN: case PS_F_ROLLOFF_SLOPE: case PS_F_EFFORT_ALLOWED:
            memcpy((char *)p + scalar_offset((ps_field)f), (const char *)df + scalar_offset((ps_field)f),
                   sizeof(double));
            break;
        case PS_F_A:
            p->a_rows = df->a_rows;
            p->a_cols = df->a_cols;
            memcpy(p->a, df->a, df->a_rows * df->a_cols * sizeof *p->a);
            break;
        case PS_F_B:
            p->n_b = df->n_b;
            memcpy(p->b, df->b, df->n_b * sizeof *p->b);
            break;
        case PS_F_C:
            p->n_c = df->n_c;
            memcpy(p->c, df->c, df->n_c * sizeof *p->c);
            break;
        case PS_F_D: p->d = df->d; break;
        case PS_F_DELAY: p->delay = df->delay; break;
        case PS_F_SAMPLE_RATE: p->sample_period = df->sample_period; break;
        case PS_F_COMPUTE_DELAY:
            p->compute_delay = df->compute_delay;
            p->compute_delay_samples = df->compute_delay_samples;
            break;
        case PS_F_DOMAIN: p->in_z = df->in_z; break;
        default: break;
        }
        ps_plant_mark(p, (ps_field)f, df->field_line[f], df->field_col[f]);
    }
}

static ps_status field_error(const ps_plant *p, ps_diag *d, ps_field f, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));

static ps_status field_error(const ps_plant *p, ps_diag *d, ps_field f, const char *fmt, ...)
{
    size_t line = ps_plant_has(p, f) ? p->field_line[f] : p->line;
    size_t col = ps_plant_has(p, f) ? p->field_col[f] : 0;
    va_list ap;
    va_start(ap, fmt);
    ps_status st = ps_diag_vset(d, PS_ERR_INPUT, line, col, ps_field_name(f), fmt, ap);
    va_end(ap);
    return st;
}

static bool all_finite(const double *x, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (!isfinite(x[i]))
            return false;
    return true;
}

/* Strip leading (highest-power) zero coefficients; error when nothing is left. */
static ps_status normalise_poly(ps_plant *p, ps_field f, double *c, size_t *n, ps_diag *d)
{
    if (*n == 0)
        return field_error(p, d, f, "%s is empty: give coefficients in descending powers of %s",
                           ps_field_name(f), p->in_z ? "z" : "s");
    if (!all_finite(c, *n))
        return field_error(p, d, f, "%s has a non-finite coefficient", ps_field_name(f));
    size_t lead = 0;
    while (lead < *n && c[lead] == 0.0)
        lead++;
    if (lead == *n)
        return field_error(p, d, f, "%s is all zeros", ps_field_name(f));
    if (lead > 0) {
        memmove(c, c + lead, (*n - lead) * sizeof *c);
        *n -= lead;
        ps_plant_warn(p, "%s: %zu leading zero coefficient(s) removed", ps_field_name(f), lead);
    }
    return PS_OK;
}

/* Every complex root must appear with its conjugate (same multiplicity).
 * Matching uses a relative tolerance so a pair typed with rounding passes. */
static ps_status check_conjugates(const ps_plant *p, ps_field f, const ps_cplx *r, size_t n,
                                  ps_diag *d)
{
    bool used[PS_MAX_ORDER] = {false};
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(r[i].re) || !isfinite(r[i].im))
            return field_error(p, d, f, "%s has a non-finite value", ps_field_name(f));
        if (r[i].im == 0.0 || used[i])
            continue;
        double scale = hypot(r[i].re, r[i].im);
        size_t k = i + 1;
        for (; k < n; k++) {
            if (used[k] || r[k].im == 0.0)
                continue;
            if (fabs(r[k].re - r[i].re) <= 1e-9 * scale && fabs(r[k].im + r[i].im) <= 1e-9 * scale)
                break;
        }
        if (k == n)
            return field_error(p, d, f,
                               "%s: complex value with imaginary part %g has no conjugate "
                               "(list both, or write the pair once as re+-imj)",
                               ps_field_name(f), r[i].im);
        used[i] = used[k] = true;
    }
    return PS_OK;
}

static ps_status check_poly(ps_plant *p, ps_diag *d)
{
    if (!ps_plant_has(p, PS_F_DEN))
        return field_error(p, d, PS_F_DEN, "%s missing: a polynomial plant needs numerator and denominator",
                           ps_field_name(PS_F_DEN));
    if (!ps_plant_has(p, PS_F_NUM))
        return field_error(p, d, PS_F_NUM, "%s missing: a polynomial plant needs numerator and denominator",
                           ps_field_name(PS_F_NUM));
    ps_status st = normalise_poly(p, PS_F_NUM, p->num, &p->n_num, d);
    if (st == PS_OK)
        st = normalise_poly(p, PS_F_DEN, p->den, &p->n_den, d);
    if (st != PS_OK)
        return st;
    if (p->n_den - 1 > PS_MAX_ORDER)
        return field_error(p, d, PS_F_DEN, "%s order above the limit of %d", ps_field_name(PS_F_DEN),
                           PS_MAX_ORDER);
    if (p->n_den < 2)
        return field_error(p, d, PS_F_DEN, "%s is a constant: the plant has no dynamics (order 0)",
                           ps_field_name(PS_F_DEN));
    if (p->n_num > p->n_den)
        return field_error(p, d, PS_F_NUM,
                           p->in_z ? "improper plant in z (not causal: the output would lead the input): "
                                     "%s degree is above the denominator degree %g"
                                   : "improper plant: %s degree is above the denominator degree %g",
                           ps_field_name(PS_F_NUM), (double)(p->n_den - 1));
    return PS_OK;
}

static ps_status check_factored(ps_plant *p, ps_diag *d)
{
    if (!ps_plant_has(p, PS_F_POLES))
        return field_error(p, d, PS_F_POLES, "%s missing: a factored plant needs poles (zeros may be empty)",
                           ps_field_name(PS_F_POLES));
    if (p->n_poles == 0)
        return field_error(p, d, PS_F_POLES, "%s is empty: the plant has no dynamics",
                           ps_field_name(PS_F_POLES));
    if (p->n_poles > PS_MAX_ORDER)
        return field_error(p, d, PS_F_POLES, "%s: order above the limit of %d",
                           ps_field_name(PS_F_POLES), PS_MAX_ORDER);
    ps_status st = check_conjugates(p, PS_F_ZEROS, p->zeros, p->n_zeros, d);
    if (st == PS_OK)
        st = check_conjugates(p, PS_F_POLES, p->poles, p->n_poles, d);
    if (st != PS_OK)
        return st;
    if (p->n_zeros > p->n_poles)
        return field_error(p, d, PS_F_ZEROS,
                           p->in_z ? "improper plant in z (not causal: the output would lead the input): "
                                     "more %s than poles (%g)"
                                   : "improper plant: more %s than poles (%g)",
                           ps_field_name(PS_F_ZEROS), (double)p->n_poles);
    if (!isfinite(p->gain))
        return field_error(p, d, PS_F_GAIN, "%s is not finite", ps_field_name(PS_F_GAIN));
    if (p->gain == 0.0)
        return field_error(p, d, PS_F_GAIN, "%s is zero: the plant is identically zero",
                           ps_field_name(PS_F_GAIN));
    return PS_OK;
}

static ps_status check_ss(ps_plant *p, ps_diag *d)
{
    for (ps_field f = PS_F_A; f <= PS_F_C; f++)
        if (!ps_plant_has(p, f))
            return field_error(p, d, f, "%s missing: a state-space plant needs a, b and c (d defaults to 0)",
                               ps_field_name(f));
    size_t n = p->a_rows;
    if (n == 0)
        return field_error(p, d, PS_F_A, "%s is empty", ps_field_name(PS_F_A));
    if (n > PS_MAX_ORDER || p->a_cols > PS_MAX_ORDER)
        return field_error(p, d, PS_F_A, "%s: order above the limit of %d", ps_field_name(PS_F_A),
                           PS_MAX_ORDER);
    if (p->a_cols != n)
        return field_error(p, d, PS_F_A, "%s must be square (it has %g columns per row)",
                           ps_field_name(PS_F_A), (double)p->a_cols);
    if (p->n_b != n)
        return field_error(p, d, PS_F_B, "%s must have one entry per state (%g)", ps_field_name(PS_F_B),
                           (double)n);
    if (p->n_c != n)
        return field_error(p, d, PS_F_C, "%s must have one entry per state (%g)", ps_field_name(PS_F_C),
                           (double)n);
    if (!all_finite(p->a, n * n))
        return field_error(p, d, PS_F_A, "%s has a non-finite entry", ps_field_name(PS_F_A));
    if (!all_finite(p->b, n))
        return field_error(p, d, PS_F_B, "%s has a non-finite entry", ps_field_name(PS_F_B));
    if (!all_finite(p->c, n))
        return field_error(p, d, PS_F_C, "%s has a non-finite entry", ps_field_name(PS_F_C));
    if (!isfinite(p->d))
        return field_error(p, d, PS_F_D, "%s is not finite", ps_field_name(PS_F_D));
    return PS_OK;
}

/* Requirement ranges: Ms, Mt > 1; eps in (0,1); delta in [0,1); k > 0;
 * wh > wb > 0 when both are given; effort > 0 when given. */
static ps_status check_requirements(const ps_plant *p, ps_diag *d)
{
    const ps_requirements *q = &p->req;
    if (!(q->ms_allowed > 1.0))
        return field_error(p, d, PS_F_MS_ALLOWED, "%s must be above 1 (got %g)", ps_field_name(PS_F_MS_ALLOWED), q->ms_allowed);
    if (!(q->mt_allowed > 1.0))
        return field_error(p, d, PS_F_MT_ALLOWED, "%s must be above 1 (got %g)", ps_field_name(PS_F_MT_ALLOWED), q->mt_allowed);
    bool band = ps_plant_has(p, PS_F_BAND_EDGE), att = ps_plant_has(p, PS_F_BAND_ATTENUATION);
    if (band != att)
        return field_error(p, d, band ? PS_F_BAND_ATTENUATION : PS_F_BAND_EDGE,
                           "%s missing: a band requirement needs band_edge and band_attenuation",
                           ps_field_name(band ? PS_F_BAND_ATTENUATION : PS_F_BAND_EDGE));
    if (band && !(q->wb > 0))
        return field_error(p, d, PS_F_BAND_EDGE, "%s must be above 0 rad/s (got %g)", ps_field_name(PS_F_BAND_EDGE), q->wb);
    if (att && !(q->eps > 0 && q->eps < 1))
        return field_error(p, d, PS_F_BAND_ATTENUATION, "%s must be in (0, 1) as a ratio or below 0 dB (got %g)",
                           ps_field_name(PS_F_BAND_ATTENUATION), q->eps);
    if (!(q->delta >= 0 && q->delta < 1))
        return field_error(p, d, PS_F_ROLLOFF_GAIN, "%s must be in [0, 1) (got %g)", ps_field_name(PS_F_ROLLOFF_GAIN), q->delta);
    if (!(q->k > 0))
        return field_error(p, d, PS_F_ROLLOFF_SLOPE, "%s must be above 0 (got %g)", ps_field_name(PS_F_ROLLOFF_SLOPE), q->k);
    if (ps_plant_has(p, PS_F_ROLLOFF_START) && !(q->wh > q->wb && q->wh > 0))
        return field_error(p, d, PS_F_ROLLOFF_START, "%s must be above band_edge and 0 (got %g rad/s)",
                           ps_field_name(PS_F_ROLLOFF_START), q->wh);
    if (ps_plant_has(p, PS_F_EFFORT_ALLOWED) && !(q->effort_allowed > 0))
        return field_error(p, d, PS_F_EFFORT_ALLOWED, "%s must be above 0 (got %g)", ps_field_name(PS_F_EFFORT_ALLOWED),
                           q->effort_allowed);
    return PS_OK;
}

/* Two values equal within 1e-9 relative (the sample periods of a plant in z
 * and of the defaults; a computation delay and a whole number of periods). */
static bool close_rel(double a, double b, double scale)
{
    return fabs(a - b) <= 1e-9 * scale;
}

/* The digital loop (README "Digital loops"). The readers already refuse
 * non-positive rates and negative delays; a family's expression can give
 * any value, so the ranges are checked again here. With a sample rate and
 * no compute_delay the delay is one sample: the output computed from the
 * sample taken at tick k is applied at tick k + 1 (common practice). */
static ps_status check_digital(ps_plant *p, ps_diag *d)
{
    bool rate = ps_plant_has(p, PS_F_SAMPLE_RATE), given = ps_plant_has(p, PS_F_COMPUTE_DELAY);
    double h = p->sample_period;
    if (rate && !(h > 0 && isfinite(h) && isfinite(1.0 / h)))
        return field_error(p, d, PS_F_SAMPLE_RATE,
                           "%s must give a rate and a period above 0 and finite (got a period of %g s)",
                           ps_field_name(PS_F_SAMPLE_RATE), h);
    if (p->in_z && !rate)
        return field_error(p, d, PS_F_DOMAIN,
                           "%s z needs sample_rate: a model in z holds only at its own sample period",
                           ps_field_name(PS_F_DOMAIN));
    if (p->in_z && ps_plant_has(p, PS_F_DELAY))
        return field_error(p, d, PS_F_DELAY,
                           "%s is not taken by a model in z (domain z): give the delay as poles at z = 0, "
                           "or as compute_delay in whole samples",
                           ps_field_name(PS_F_DELAY));
    if (given && !rate)
        return field_error(p, d, PS_F_COMPUTE_DELAY,
                           "%s needs sample_rate: a computation delay belongs to a sampled loop",
                           ps_field_name(PS_F_COMPUTE_DELAY));
    if (!rate) {
        p->compute_delay = 0.0;
        p->compute_delay_samples = NAN;
        return PS_OK;
    }
    double hd = p->defaults_sample_period;
    if (p->in_z && hd > 0 && !close_rel(h, hd, fmax(h, hd)))
        return field_error(p, d, PS_F_SAMPLE_RATE,
                           "%s %.9g Hz differs from the %.9g Hz of the catalog defaults: a model in z holds "
                           "only at its own period (give it the defaults' rate, or discretise it again)",
                           ps_field_name(PS_F_SAMPLE_RATE), 1.0 / h, 1.0 / hd);
    if (!given) {
        p->compute_delay_samples = 1.0;
    }
    double k = p->compute_delay_samples;
    if (isnan(k)) {
        double c = p->compute_delay;
        if (!(c >= 0 && isfinite(c)))
            return field_error(p, d, PS_F_COMPUTE_DELAY, "%s must be 0 or more and finite (got %g s)",
                               ps_field_name(PS_F_COMPUTE_DELAY), c);
        double m = round(c / h);
        if (p->in_z && !close_rel(c, m * h, fmax(c, h)))
            return field_error(p, d, PS_F_COMPUTE_DELAY,
                               "%s %g s is %.6g sample periods: a model in z takes only a whole number of "
                               "samples (within 1e-9 relative)",
                               ps_field_name(PS_F_COMPUTE_DELAY), c, c / h);
    } else {
        if (!(k >= 0 && isfinite(k)))
            return field_error(p, d, PS_F_COMPUTE_DELAY, "%s must be 0 or more samples and finite (got %g)",
                               ps_field_name(PS_F_COMPUTE_DELAY), k);
        if (p->in_z && !close_rel(k, round(k), fmax(k, 1.0)))
            return field_error(p, d, PS_F_COMPUTE_DELAY,
                               "%s %g samples: a model in z takes only a whole number of samples",
                               ps_field_name(PS_F_COMPUTE_DELAY), k);
        p->compute_delay = k * h;
    }
    double nyq = 3.14159265358979323846 / h;
    if (ps_plant_has(p, PS_F_BAND_EDGE) && !(p->req.wb < nyq))
        return field_error(p, d, PS_F_BAND_EDGE,
                           "%s %g rad/s must lie below the Nyquist frequency pi/h = %.6g rad/s (%.6g Hz) of "
                           "sample_rate",
                           ps_field_name(PS_F_BAND_EDGE), p->req.wb, nyq, 0.5 / h);
    if (ps_plant_has(p, PS_F_ROLLOFF_START) && !(p->req.wh < nyq))
        return field_error(p, d, PS_F_ROLLOFF_START,
                           "%s %g rad/s must lie below the Nyquist frequency pi/h = %.6g rad/s (%.6g Hz) of "
                           "sample_rate",
                           ps_field_name(PS_F_ROLLOFF_START), p->req.wh, nyq, 0.5 / h);
    return PS_OK;
}

ps_status ps_plant_check(ps_plant *p, ps_diag *d)
{
    if (!ps_plant_has(p, PS_F_ID) || p->id[0] == '\0')
        return field_error(p, d, PS_F_ID, "%s missing: every plant needs an id", "id");

    bool poly = ps_plant_has(p, PS_F_NUM) || ps_plant_has(p, PS_F_DEN);
    bool fact = ps_plant_has(p, PS_F_ZEROS) || ps_plant_has(p, PS_F_POLES) || ps_plant_has(p, PS_F_GAIN);
    bool ss = ps_plant_has(p, PS_F_A) || ps_plant_has(p, PS_F_B) || ps_plant_has(p, PS_F_C) ||
              ps_plant_has(p, PS_F_D);
    int forms = poly + fact + ss;
    if (forms != 1)
        return field_error(p, d, PS_F_ID,
                           forms == 0 ? "plant '%s' gives no model: use numerator/denominator, "
                                        "zeros/poles/gain, or a/b/c/d"
                                      : "plant '%s' mixes model forms: give exactly one of "
                                        "numerator/denominator, zeros/poles/gain, a/b/c/d",
                           p->id);

    if (!isfinite(p->delay) || p->delay < 0.0)
        return field_error(p, d, PS_F_DELAY, "%s must be a finite number of seconds >= 0",
                           ps_field_name(PS_F_DELAY));

    ps_status st = check_requirements(p, d);
    if (st == PS_OK)
        st = check_digital(p, d);
    if (st != PS_OK)
        return st;
    if (poly) {
        p->form = PS_FORM_POLY;
        st = check_poly(p, d);
    } else if (fact) {
        p->form = PS_FORM_FACTORED;
        st = check_factored(p, d);
    } else {
        p->form = PS_FORM_SS;
        st = check_ss(p, d);
    }
    return st;
}
