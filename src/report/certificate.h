/* certificate.h - the bracket of one plant in words and in JSON: its floors
 * (what no controller can do) beside the peaks of the best controller the
 * search found and verified (what one controller does). */
#ifndef PS_CERTIFICATE_H
#define PS_CERTIFICATE_H

#include <jansson.h>
#include <stdio.h>

#include "certify/certify.h"
#include "screen/screen.h"

/* The three outcomes of a plant (and the cases the search does not take). */
typedef enum ps_bracket {
    PS_BRACKET_RULED_OUT = 0,  /* a floor exceeds what is allowed (verdict redesign or not stabilizable) */
    PS_BRACKET_DEMONSTRATED,   /* a verified controller meets every requirement */
    PS_BRACKET_UNDECIDED,      /* the floors pass; no controller found within the budget meets every requirement */
    PS_BRACKET_NOT_ATTEMPTED,  /* the search does not take this plant (the reason says why) */
    PS_BRACKET_COUNT
} ps_bracket;

ps_bracket ps_bracket_of(const ps_summary *s, const ps_cert *c);
const char *ps_bracket_name(ps_bracket b);

/* The polynomial p (descending, n coefficients) in s as text: "2.5 s^2 + 3 s - 1". */
void ps_poly_text(const double *p, size_t n, char *buf, size_t cap);

/* The text block of one plant (s its screened summary, c its certificate). */
void ps_certificate_text(FILE *out, const ps_summary *s, const ps_cert *c);

/* The same as a JSON object (new reference; NULL on no memory). */
json_t *ps_certificate_json(const ps_summary *s, const ps_cert *c);

/* The plant as analysed (gain, zeros, poles as [re, im], delay): what an
 * independent check needs to rebuild P(s) = gain prod(s - z) / prod(s - p) e^{-s delay}. */
json_t *ps_certificate_plant_json(const ps_analysis *an);

#endif
