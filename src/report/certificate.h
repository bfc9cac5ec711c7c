/* certificate.h - the bracket of one plant in words and in JSON: its floors
 * (what no controller can do) beside the peaks of the best controller the
 * search found and verified (what one controller does). */
#ifndef PS_CERTIFICATE_H
#define PS_CERTIFICATE_H

#include <jansson.h>
#include <stdio.h>

#include "certify/certify.h"
#include "screen/screen.h"

ps_bracket ps_bracket_of(const ps_summary *s, const ps_cert *c);
const char *ps_bracket_name(ps_bracket b);

/* The bracket of a screened row in one sentence (empty when the row has
 * none): the outcome, the peaks of the verified controller beside the
 * floors, the controller in words, or why nothing was found. */
void ps_bracket_text(const ps_summary *s, const ps_screen_opts *opt, char *buf, size_t n);

/* The controller in words: "PID: K 3.2, ...; 2 roll-off poles at -150 rad/s". */
void ps_controller_words(const ps_controller *c, char *buf, size_t cap);

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
