/* audit.h - the audit trail behind one plant's verdict: every floor with the
 * formula actually used, its inputs, its source and its assumption, for
 * `explain` and any report that shows the working. */
#ifndef PS_AUDIT_H
#define PS_AUDIT_H

#include <stddef.h>

#include "limits/floors.h"
#include "model/plant.h"
#include "roots/roots.h"

enum { PS_AUDIT_MAX = 12, PS_AUDIT_TEXT = 480 };

typedef struct ps_audit_item {
    const char *key;        /* stable key, the JSON name of the value ("bode_area", "ms_interpolation", ...) */
    const char *name;       /* in words ("Bode area F") */
    double value;           /* NAN: not applicable; INFINITY: infinite, or past a double's range */
    double value_ln;        /* its natural logarithm: finite when the value is past a double's range */
    char formula[PS_AUDIT_TEXT];    /* the formula of the route actually taken */
    char inputs[PS_AUDIT_TEXT];     /* its inputs, with their values */
    const char *source;     /* book, edition, section; or "common practice" / "from memory" */
    const char *assumption; /* under which the value holds */
} ps_audit_item;

typedef struct ps_audit {
    size_t n;
    ps_audit_item item[PS_AUDIT_MAX];
} ps_audit;

/* The floors fl of plant an under requirements q (as ps_floors_compute gave
 * them), item by item in the order they are checked by hand: Bode area,
 * interpolation (Ms, Mt), effort, band-forced, Poisson (Ms, Mt), overall Ms
 * and Mt. Fills out; never fails. */
void ps_audit_floors(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl, ps_audit *out);

#endif
