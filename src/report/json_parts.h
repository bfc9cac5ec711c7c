/* json_parts.h - pieces of the JSON documents shared by the survey listing
 * and the screening report (internal to src/report). */
#ifndef PS_JSON_PARTS_H
#define PS_JSON_PARTS_H

#include <jansson.h>

#include "screen/screen.h"

#include "limits/floors.h"
#include "model/plant.h"

/* A number, or null when it is not finite (JSON has no NaN or infinity). */
json_t *ps_json_num(double x);
/* A string, or null when empty or not valid UTF-8. */
json_t *ps_json_str(const char *s);
/* The `floors` object (schema $defs/floors) without the extras. */
json_t *ps_json_floors(const ps_floors *fl);

/* The family studies of a run as a JSON array (src/report/family_report.c). */
json_t *ps_json_families(const ps_run *r);

/* Which controllers the Bode area floor covers, in words, from the smallest
 * controller relative degree that gives the loop relative degree >= 2. */
const char *ps_bode_coverage_text(int controller_rd);
/* Add disk_margin_max, margins_from_allowed and time_to_double to fj. */
/* growth: the RHP poles, one per real pole or conjugate pair (im >= 0);
 * the time to double is ln 2 / Re p (a pair: an oscillation whose envelope
 * grows at Re p). */
void ps_json_floor_extras(json_t *fj, const ps_floors *fl, const ps_requirements *q, const ps_cplx *growth,
                          size_t n_growth);
/* The `sampling` object of a plant (schema $defs/sampling): rate, period,
 * Nyquist frequency, computation delay, domain and the roots in z with the
 * sampling zeros and the zeros outside the unit circle flagged; JSON null
 * for a continuous loop (h == 0). */
json_t *ps_json_sampling(const ps_floors *fl, double h, double compute_delay, bool in_z);
/* The `requirements` object. */
json_t *ps_json_requirements(const ps_requirements *q);

#endif
