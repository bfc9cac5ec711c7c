/* loop_internal.h - the loop evaluation shared by the verification
 * (loop.c) and the search (search.c). */
#ifndef PS_LOOP_INTERNAL_H
#define PS_LOOP_INTERNAL_H

#include "certify/certify.h"

#include "core/complex_make.h"

/* L(s) = P(s) C(s) and C(s). */
void ps_loop_at(const ps_analysis *an, const ps_controller *c, double complex s, double complex *l, double complex *cv);

/* The frequency range [lo, hi] (rad/s) that holds every scale of the loop
 * (roots, corners, wh, wb, 1/delay) with three decades either side. */
void ps_loop_range(const ps_analysis *an, const ps_requirements *q, const ps_controller *c, double *lo, double *hi);

/* lo, lowered by decades (at most 30) until |S|, |T| and |C S| have settled
 * to their low-frequency limits (relative change below 1e-7 a decade). */
double ps_loop_bottom(const ps_analysis *an, const ps_controller *c, double lo);

/* hi, raised by decades (at most 24) until |L(j hi)| < 1e-3. */
double ps_loop_top(const ps_analysis *an, const ps_controller *c, double hi);

/* The controller's poles: roots of its denominator (those at the origin
 * exactly). 0, or -1 when they cannot be computed. */
int ps_ctrl_poles(const ps_controller *c, ps_root *out, size_t *n);

/* Closed-loop poles right of -alpha by the argument principle on Re s = -alpha
 * up to w = hi (the loop must be below 0.05 there), a log grid of per_decade
 * points a decade refined where arg(1 + L) turns fast; -1 when undecided. */
int ps_loop_winding(const ps_analysis *an, const ps_controller *c, const ps_root *cpoles, size_t ncp, double alpha,
                    double hi, int per_decade);

/* The largest real part of the closed-loop poles of a loop without delay
 * (roots of den_P den_C + num_P num_C). 0, or -1 when they cannot be computed. */
int ps_loop_closed_max_re(const ps_analysis *an, const ps_controller *c, double *max_re);

#endif
