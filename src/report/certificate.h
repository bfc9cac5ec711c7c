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

/* One row of a bracket table: a plant with a bracket, in rank order. */
typedef struct ps_bracket_row {
    size_t rank;          /* 1-based */
    const ps_summary *s;
    ps_bracket b;
    bool found;           /* a controller was found: cert[0].chk holds its peaks */
    char what[96];        /* "PID, 1 roll-off pole", "none found" or "not searched" */
} ps_bracket_row;

/* Call fn for at most max plants of r with a bracket, in rank order (input
 * errors and plants not judged have none); the number of calls. */
size_t ps_bracket_rows(const ps_run *r, size_t max, void (*fn)(void *ctx, const ps_bracket_row *row), void *ctx);

/* The number of plants of r with a bracket. */
size_t ps_bracket_count(const ps_run *r);

/* The first requirement a verified loop misses, in a word ("band",
 * "roll-off", "effort", "Ms", "Mt"); "" when it meets every one. */
const char *ps_loop_miss_word(const ps_loop_check *k);

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
