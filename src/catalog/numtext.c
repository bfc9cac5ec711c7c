/* numtext.c - strict number parsing for catalog text.
 * strtod alone accepts hex, inf, nan, overflows to inf and underflows to 0;
 * all are refused here. */
#include "catalog/numtext.h"

#include <ctype.h>
#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

/* True when the digits of the decimal s..end (before any exponent) are not
 * all zero. */
static bool mantissa_nonzero(const char *s, const char *end)
{
    for (const char *q = s; q < end && *q != 'e' && *q != 'E'; q++)
        if (*q >= '1' && *q <= '9')
            return true;
    return false;
}

/* Parse a real starting at s; *end gets the first unparsed byte.
 * Only decimal forms: [+-]digits[.digits][e[+-]digits]. */
static int real_prefix(const char *s, double *out, const char **end, const char **why)
{
    const char *q = s;
    if (*q == '+' || *q == '-')
        q++;
    if (!isdigit((unsigned char)*q) && !(*q == '.' && isdigit((unsigned char)q[1]))) {
        *why = "expected a decimal number";
        return -1;
    }
    if (q[0] == '0' && (q[1] == 'x' || q[1] == 'X')) {
        *why = "hexadecimal numbers are not accepted";
        return -1;
    }
    errno = 0;
    char *e;
    double v = strtod(s, &e);
    if (e == s) {
        *why = "expected a decimal number";
        return -1;
    }
    if (errno == ERANGE && fabs(v) > 1.0) {
        *why = "number out of range";
        return -1;
    }
    /* A nonzero decimal below the smallest normal double (DBL_MIN, about
     * 2.2e-308) would be read as 0 or as a subnormal with few significant
     * bits: a pole or a delay silently read as 0. Refused; an exact zero in
     * any spelling (0, 0.0e-400) is still 0. */
    if (fabs(v) < DBL_MIN && mantissa_nonzero(s, e)) {
        *why = "nonzero number too small: below 2.2e-308 it cannot be held (it would be read as 0)";
        return -1;
    }
    if (!isfinite(v)) {
        *why = "number is not finite";
        return -1;
    }
    *out = v;
    *end = e;
    return 0;
}

static const char *skip_blank(const char *s)
{
    while (*s == ' ' || *s == '\t')
        s++;
    return s;
}

int ps_text_real(const char *s, double *out, const char **why)
{
    const char *e;
    double v;
    s = skip_blank(s);
    if (real_prefix(s, &v, &e, why))
        return -1;
    if (*skip_blank(e) != '\0') {
        *why = "unexpected characters after the number";
        return -1;
    }
    *out = v; /* only on success: a rejected text leaves *out as it was */
    return 0;
}

static bool is_imag_unit(char c) { return c == 'j' || c == 'i'; }

int ps_text_complex(const char *s, ps_cplx out[2], const char **why)
{
    const char *e;
    double re, im;
    s = skip_blank(s);
    if (real_prefix(s, &re, &e, why))
        return -1;
    if (is_imag_unit(*e)) { /* pure imaginary "3j" */
        if (*skip_blank(e + 1) != '\0') {
            *why = "unexpected characters after the number";
            return -1;
        }
        out[0] = (ps_cplx){0.0, re};
        return 1;
    }
    e = skip_blank(e);
    if (*e == '\0') {
        out[0] = (ps_cplx){re, 0.0};
        return 1;
    }
    bool pair = false;
    if ((e[0] == '+' && e[1] == '-') || (e[0] == '+' && e[1] == '/' && e[2] == '-')) {
        pair = true;
        e += e[1] == '/' ? 3 : 2;
    } else if ((unsigned char)e[0] == 0xC2 && (unsigned char)e[1] == 0xB1) { /* U+00B1 */
        pair = true;
        e += 2;
    } else if (*e != '+' && *e != '-') {
        *why = "expected a complex number like -1.5+2j";
        return -1;
    }
    /* For the single form e still holds the sign of the imaginary part. */
    if (pair && (*e == '+' || *e == '-')) {
        *why = "expected a complex pair like -1.5+-2j";
        return -1;
    }
    if (real_prefix(skip_blank(e), &im, &e, why))
        return -1;
    if (!is_imag_unit(*e) || *skip_blank(e + 1) != '\0') {
        *why = "imaginary part must end in j";
        return -1;
    }
    if (pair) {
        out[0] = (ps_cplx){re, fabs(im)};
        out[1] = (ps_cplx){re, -fabs(im)};
        return 2;
    }
    out[0] = (ps_cplx){re, im};
    return 1;
}

/* Copy the next blank-separated token of *s into buf; 0 when none is left. */
static int next_token(const char **s, char *buf, size_t cap, const char **why)
{
    const char *p = *s;
    while (*p == ' ' || *p == '\t' || *p == ',')
        p++;
    if (*p == '\0')
        return 0;
    size_t n = 0;
    while (p[n] && p[n] != ' ' && p[n] != '\t' && p[n] != ',')
        n++;
    if (n >= cap) {
        *why = "number token too long";
        return -1;
    }
    memcpy(buf, p, n);
    buf[n] = '\0';
    *s = p + n;
    return 1;
}

int ps_text_real_list(const char *s, double *out, size_t cap, size_t *bad_index,
                      const char **why)
{
    char tok[96];
    size_t n = 0;
    int r;
    while ((r = next_token(&s, tok, sizeof tok, why)) == 1) {
        if (n == cap) {
            *bad_index = n;
            *why = "too many values (order limit exceeded)";
            return -1;
        }
        if (ps_text_real(tok, &out[n], why)) {
            *bad_index = n;
            return -1;
        }
        n++;
    }
    if (r < 0) {
        *bad_index = n;
        return -1;
    }
    return (int)n;
}

int ps_text_complex_list(const char *s, ps_cplx *out, size_t cap, size_t *bad_index,
                         const char **why)
{
    /* bad_index is the TOKEN position (as the header promises), not the value
     * count: a pair "a+-bj" is one token but two values. */
    char tok[128];
    size_t n = 0, tokens = 0;
    int r;
    while ((r = next_token(&s, tok, sizeof tok, why)) == 1) {
        ps_cplx v[2];
        int k = ps_text_complex(tok, v, why);
        if (k < 0) {
            *bad_index = tokens;
            return -1;
        }
        if (n + (size_t)k > cap) {
            *bad_index = tokens;
            *why = "too many values (order limit exceeded)";
            return -1;
        }
        for (int i = 0; i < k; i++)
            out[n++] = v[i];
        tokens++;
    }
    if (r < 0) {
        *bad_index = tokens;
        return -1;
    }
    return (int)n;
}

typedef struct unit_word {
    const char *word;
    ps_text_unit unit;
    double scale;
} unit_word;

static const unit_word rate_units[] = {
    {"Hz", PS_UNIT_HZ, 1.0}, {"kHz", PS_UNIT_HZ, 1e3}, {"MHz", PS_UNIT_HZ, 1e6},
    {"s", PS_UNIT_SECONDS, 1.0}, {"ms", PS_UNIT_SECONDS, 1e-3}, {"us", PS_UNIT_SECONDS, 1e-6},
};
static const unit_word delay_units[] = {
    {"sample", PS_UNIT_SAMPLES, 1.0}, {"samples", PS_UNIT_SAMPLES, 1.0},
    {"s", PS_UNIT_SECONDS, 1.0}, {"ms", PS_UNIT_SECONDS, 1e-3}, {"us", PS_UNIT_SECONDS, 1e-6},
};

static const char *unit_expectation(ps_field f)
{
    return f == PS_F_SAMPLE_RATE
               ? "a sample rate needs its unit: a rate in Hz, kHz or MHz, or a period in s, ms or us "
                 "(\"1 kHz\", \"2 ms\"; a bare number could mean Hz or rad/s)"
               : "a computation delay needs its unit: samples (\"1 sample\", \"0.5 samples\") or "
                 "seconds in s, ms or us (\"300 us\"; a bare number could mean either)";
}

/* The unit word (whole, as listed) of field f, or NULL. */
static const unit_word *find_unit(ps_field f, const char *w, size_t n)
{
    const unit_word *u = f == PS_F_SAMPLE_RATE ? rate_units : delay_units;
    size_t count = f == PS_F_SAMPLE_RATE ? sizeof rate_units / sizeof *rate_units
                                         : sizeof delay_units / sizeof *delay_units;
    for (size_t i = 0; i < count; i++)
        if (strlen(u[i].word) == n && memcmp(u[i].word, w, n) == 0)
            return &u[i];
    return NULL;
}

int ps_text_unit_split(ps_field f, const char *s, size_t *len, ps_text_unit *unit, double *scale,
                       const char **why)
{
    if (f != PS_F_SAMPLE_RATE && f != PS_F_COMPUTE_DELAY) {
        *why = "not a field with a unit";
        return -1;
    }
    size_t end = strlen(s);
    while (end > 0 && (s[end - 1] == ' ' || s[end - 1] == '\t'))
        end--;
    size_t start = end;
    while (start > 0 && s[start - 1] != ' ' && s[start - 1] != '\t')
        start--;
    size_t before = start;
    while (before > 0 && (s[before - 1] == ' ' || s[before - 1] == '\t'))
        before--;
    const unit_word *u = start > 0 && before > 0 ? find_unit(f, s + start, end - start) : NULL;
    if (!u) {
        *why = unit_expectation(f);
        return -1;
    }
    *len = before;
    *unit = u->unit;
    *scale = u->scale;
    return 0;
}

void ps_text_unit_store(ps_plant *p, ps_field f, double v, ps_text_unit unit, double scale)
{
    if (f == PS_F_SAMPLE_RATE) {
        p->sample_period = unit == PS_UNIT_HZ ? 1.0 / (v * scale) : v * scale;
    } else if (f == PS_F_COMPUTE_DELAY) {
        if (unit == PS_UNIT_SAMPLES) {
            p->compute_delay_samples = v;
            p->compute_delay = 0.0;
        } else {
            p->compute_delay = v * scale;
            p->compute_delay_samples = NAN;
        }
    }
}

/* sample_rate, compute_delay: a number, blanks or not, then its unit. */
static int unit_field(ps_plant *p, ps_field f, const char *s, const char **why)
{
    double v;
    const char *e;
    s = skip_blank(s);
    if (real_prefix(s, &v, &e, why))
        return -1;
    e = skip_blank(e);
    size_t n = strlen(e);
    while (n > 0 && (e[n - 1] == ' ' || e[n - 1] == '\t'))
        n--;
    const unit_word *u = find_unit(f, e, n);
    if (!u) {
        *why = unit_expectation(f);
        return -1;
    }
    if (f == PS_F_SAMPLE_RATE) {
        double x = v * u->scale, h = u->unit == PS_UNIT_HZ ? 1.0 / x : x;
        if (!(v > 0) || !isfinite(x) || !(h > 0) || !isfinite(h)) {
            *why = "a sample rate (or period) must be above 0 and finite in Hz and in seconds";
            return -1;
        }
    } else if (v < 0 || !isfinite(v * u->scale)) {
        *why = "a computation delay must be 0 or more";
        return -1;
    }
    ps_text_unit_store(p, f, v, u->unit, u->scale);
    return 0;
}

static int domain_field(ps_plant *p, const char *s, const char **why)
{
    s = skip_blank(s);
    size_t n = strlen(s);
    while (n > 0 && (s[n - 1] == ' ' || s[n - 1] == '\t'))
        n--;
    if (n == 1 && (s[0] == 's' || s[0] == 'z')) {
        p->in_z = s[0] == 'z';
        return 0;
    }
    *why = "expected s (a continuous-time model, the default) or z (a discrete-time model at sample_rate)";
    return -1;
}

int ps_text_scalar_field(ps_plant *p, ps_field f, const char *s, const char **why)
{
    if (f == PS_F_SAMPLE_RATE || f == PS_F_COMPUTE_DELAY)
        return unit_field(p, f, s, why);
    if (f == PS_F_DOMAIN)
        return domain_field(p, s, why);
    double *dst = ps_plant_scalar(p, f), v;
    ps_field_kind kind = ps_field_kind_of(f);
    if (!dst) {
        *why = "not a single-valued field";
        return -1;
    }
    if (kind == PS_KIND_REAL)
        return ps_text_real(s, dst, why);
    const char *e;
    s = skip_blank(s);
    if (real_prefix(s, &v, &e, why))
        return -1;
    e = skip_blank(e);
    double scale = 1.0;
    if (kind == PS_KIND_FREQ) {
        if (strcmp(e, "Hz") == 0)
            scale = 2 * 3.14159265358979323846;
        else if (*e && strcmp(e, "rad/s") != 0) {
            *why = "expected a frequency: a number in rad/s, or with the unit rad/s or Hz";
            return -1;
        }
        *dst = v * scale;
        return 0;
    }
    if (strcmp(e, "dB") == 0)
        v = pow(10.0, v / 20.0);
    else if (*e) {
        *why = "expected a ratio, or a level in dB";
        return -1;
    }
    *dst = v;
    return 0;
}
