/* plant.h - one catalog entry as read, and its validation into a checked model.
 * Readers fill a ps_plant in place (fixed size, no allocation); ps_plant_check normalises it. */
#ifndef PS_PLANT_H
#define PS_PLANT_H

#include <stdbool.h>
#include <stddef.h>

#include "core/diag.h"

/* Highest model order accepted (documented in README). Fixed arrays keep the
 * per-plant path free of allocation; 64 states is far above any plant a
 * screening catalog holds, and polynomial roots are unreliable well before it. */
enum { PS_MAX_ORDER = 64, PS_ID_MAX = 96, PS_NOTE_MAX = 256,
       PS_MAX_WARN = 8, PS_WARN_TEXT = 200 };

typedef enum ps_form { PS_FORM_NONE = 0, PS_FORM_POLY, PS_FORM_FACTORED, PS_FORM_SS } ps_form;

typedef struct ps_cplx { double re, im; } ps_cplx;

/* Catalog fields. The names in ps_field_name() are the catalog keys (YAML) and
 * column headers (CSV). */
typedef enum ps_field {
    PS_F_ID, PS_F_NOTE, PS_F_NUM, PS_F_DEN, PS_F_ZEROS, PS_F_POLES, PS_F_GAIN,
    PS_F_A, PS_F_B, PS_F_C, PS_F_D, PS_F_DELAY,
    /* requirements (catalog defaults, overridable per plant) */
    PS_F_MS_ALLOWED, PS_F_MT_ALLOWED, PS_F_BAND_EDGE, PS_F_BAND_ATTENUATION,
    PS_F_ROLLOFF_START, PS_F_ROLLOFF_GAIN, PS_F_ROLLOFF_SLOPE, PS_F_EFFORT_ALLOWED,
    /* the digital loop (README "Digital loops") */
    PS_F_SAMPLE_RATE, PS_F_COMPUTE_DELAY, PS_F_DOMAIN,
    PS_F_COUNT
} ps_field;

/* How a single-valued field is written: a plain number, a frequency
 * (number = rad/s, or "12 rad/s", "3 Hz"), or a ratio (number, or "-20 dB"). */
typedef enum ps_field_kind { PS_KIND_OTHER, PS_KIND_REAL, PS_KIND_FREQ, PS_KIND_RATIO } ps_field_kind;
ps_field_kind ps_field_kind_of(ps_field f);

/* What the future loop must achieve, and what is assumed of the controller's
 * roll-off. wb = 0 means no band requirement; wh = 0 means no roll-off given. */
typedef struct ps_requirements {
    double ms_allowed;   /* allowed peak |S|; default 2.0 (common practice) */
    double mt_allowed;   /* allowed peak |T|; default 1.25 (S&P 2nd ed. ch. 2, from memory) */
    double wb;           /* |S| <= eps on [0, wb], rad/s */
    double eps;
    double wh;           /* from wh on, |L| <= delta (wh/w)^(1+k), rad/s */
    double delta;        /* default 0.5 (assumption about the controller) */
    double k;            /* default 1 (assumption about the controller) */
    double effort_allowed; /* allowed peak |C S|; 0 = not given */
} ps_requirements;

const char *ps_field_name(ps_field f);
/* Field for a key; returns PS_F_COUNT when the key is unknown. */
ps_field ps_field_lookup(const char *key);

/* A field added here must be added to ps_plant_copy too, which copies field
 * by field (test_plant: copy_carries_every_counted_item). */
typedef struct ps_plant {
    char id[PS_ID_MAX];
    char note[PS_NOTE_MAX];
    size_t line;                       /* line where the entry starts */
    unsigned present;                  /* bit (1u << ps_field) set when the field was given */
    size_t field_line[PS_F_COUNT];     /* line of each given field (for diagnostics) */
    size_t field_col[PS_F_COUNT];

    ps_form form;                      /* set by ps_plant_check */

    /* polynomial form, DESCENDING powers of s */
    size_t n_num, n_den;
    double num[PS_MAX_ORDER + 1], den[PS_MAX_ORDER + 1];

    /* factored form; a pair written once ("a+-bj") is stored as both members */
    size_t n_zeros, n_poles;
    ps_cplx zeros[PS_MAX_ORDER], poles[PS_MAX_ORDER];
    double gain;

    /* state space, A row-major; a_rows x a_cols as given (checked square) */
    size_t a_rows, a_cols, n_b, n_c;
    double a[PS_MAX_ORDER * PS_MAX_ORDER];
    double b[PS_MAX_ORDER], c[PS_MAX_ORDER];
    double d;

    double delay;                      /* seconds, input/output delay; 0 if absent */
    ps_requirements req;

    /* The digital loop. sample_period 0: a continuous loop. in_z: the model
     * fields (num/den, zeros/poles, a/b/c/d) are in z at sample_period (a
     * plant given in z needs a sample rate; its delay field is refused).
     * compute_delay: seconds from sampling to the output applied, set by
     * ps_plant_check from compute_delay_samples (samples, NAN when given in
     * seconds) or from the default of one sample; for a plant in z a whole
     * number of samples. */
    double sample_period;
    double compute_delay;
    double compute_delay_samples;
    bool in_z;
    /* The sample period the catalog defaults give (0: none), set by
     * ps_plant_apply_defaults even when the plant gives its own: a plant in
     * z must match it (ps_plant_check), a plant in s overrides it. */
    double defaults_sample_period;

    size_t n_warn;
    char warn[PS_MAX_WARN][PS_WARN_TEXT];
} ps_plant;

/* Address of a single-valued real field (gain, d, delay, requirements), NULL otherwise. */
double *ps_plant_scalar(ps_plant *p, ps_field f);

/* Copy src into dst up to the counts of its arrays (the rest of dst keeps
 * whatever it held: arrays are valid up to their counts). */
void ps_plant_copy(ps_plant *dst, const ps_plant *src);

/* Reset p to an empty entry (no fields present). */
void ps_plant_reset(ps_plant *p);

static inline bool ps_plant_has(const ps_plant *p, ps_field f)
{
    return (p->present >> f) & 1u;
}

/* Mark field f as given at line/col. */
void ps_plant_mark(ps_plant *p, ps_field f, size_t line, size_t col);

/* Append a warning (printf-style); silently keeps the first PS_MAX_WARN. */
void ps_plant_warn(ps_plant *p, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* Copy every field present in defaults and absent in p into p. */
void ps_plant_apply_defaults(ps_plant *p, const ps_plant *defaults);

/* Validate and normalise an entry as read: exactly one model form, finite
 * numbers, non-empty non-zero polynomials (leading zeros stripped with a
 * warning), proper (deg num <= deg den; in z: causal), conjugate-closed roots,
 * square A with matching B/C, non-negative delay, order <= PS_MAX_ORDER, and
 * the digital loop (README "Digital loops": a positive sample period; a
 * computation delay and a model in z only with a sample rate; in z no delay
 * field, a whole number of samples of computation delay and the defaults'
 * sample period if they give one; band_edge and rolloff_start below the
 * Nyquist frequency pi/h). Sets p->form, and with a sample rate
 * p->compute_delay in seconds (default one sample).
 * On failure returns PS_ERR_INPUT with d naming the line and field. */
ps_status ps_plant_check(ps_plant *p, ps_diag *d);

const char *ps_form_name(ps_form f);

#endif
