/* numtext.h - numbers written in catalog text: reals, complex values, lists
 * and matrices. Shared by both readers; C locale, strict (no hex, inf, nan). */
#ifndef PS_NUMTEXT_H
#define PS_NUMTEXT_H

#include <stddef.h>

#include "model/plant.h"

/* Parse one finite real from the whole of s (surrounding blanks allowed).
 * Returns 0 on success, -1 otherwise (why: a short reason). */
int ps_text_real(const char *s, double *out, const char **why);

/* Parse one complex token: "2", "-1.5+2j", "3j", "-1.5-2j", or a pair written
 * once "-1.5+-2j" / "-1.5±2j". Writes 1 value (or 2 for a pair: +im then -im)
 * into out and returns the count, or -1 with why set. */
int ps_text_complex(const char *s, ps_cplx out[2], const char **why);

/* Space-separated list of reals into out (at most cap). Returns the count,
 * or -1 with why set (why names the bad token position via *bad_index). */
int ps_text_real_list(const char *s, double *out, size_t cap, size_t *bad_index,
                      const char **why);

/* Space-separated list of complex tokens. Pairs count as two. */
int ps_text_complex_list(const char *s, ps_cplx *out, size_t cap, size_t *bad_index,
                         const char **why);

/* Parse the text of a single-valued field f (ps_field_kind_of) into p:
 * REAL a number; FREQ a number in rad/s or "<x> rad/s" / "<x> Hz"; RATIO a
 * number or "<x> dB" (20 log10). Returns 0, or -1 with why set. */
int ps_text_scalar_field(ps_plant *p, ps_field f, const char *s, const char **why);

/* The digital-loop fields (README "Digital loops") need their unit: a bare
 * number is refused (a rate could be Hz or rad/s, a delay samples or
 * seconds). sample_rate: "<x> Hz|kHz|MHz" (a rate) or "<x> s|ms|us" (a
 * period), > 0; compute_delay: "<x> sample|samples" or "<x> s|ms|us", >= 0;
 * domain: "s" or "z". ps_text_scalar_field handles all three. */
typedef enum ps_text_unit { PS_UNIT_NONE = 0, PS_UNIT_HZ, PS_UNIT_SECONDS, PS_UNIT_SAMPLES } ps_text_unit;

/* The unit word that ends s for field f (sample_rate or compute_delay),
 * after at least one blank: sets *unit and *scale (to Hz or to s; 1 for
 * samples) and *len, the length of the text before the blanks. Returns 0,
 * or -1 with why (no unit, or one that f does not take). Families use it to
 * split "<expression> <unit>". */
int ps_text_unit_split(ps_field f, const char *s, size_t *len, ps_text_unit *unit, double *scale,
                       const char **why);

/* Store v, written in (unit, scale), into field f of p: sample_period in s;
 * compute_delay_samples (compute_delay 0 until ps_plant_check), or
 * compute_delay in s with compute_delay_samples NAN. Ranges are checked by
 * ps_plant_check (a family's expression may give any value). */
void ps_text_unit_store(ps_plant *p, ps_field f, double v, ps_text_unit unit, double scale);

#endif
