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

#endif
