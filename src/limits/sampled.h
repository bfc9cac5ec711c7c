/* sampled.h - the plant of a digital loop as the floors see it: held with a
 * zero-order hold (or given in z), its roots in z, and the same plant in w = (z - 1)/(z + 1). */
#ifndef PS_SAMPLED_H
#define PS_SAMPLED_H

#include <stdbool.h>
#include <stddef.h>

#include "core/diag.h"
#include "model/plant.h"
#include "roots/roots.h"

/* A root of the plant in z on the unit circle when | |z| - 1 | <= this
 * (relative to max(1, |z|)): the axis class of the sampled loop. The
 * poles of a held plant take the class of their continuous pole instead
 * (e^{p h} is outside the circle exactly when Re p > 0). */
#define PS_CIRCLE_RTOL 1e-9

/* The plant of the digital loop. The bilinear map w = (z - 1)/(z + 1) takes
 * the outside of the unit circle onto the open right half plane and the
 * circle onto the imaginary axis (z = e^{jW}: w = j tan(W/2)), so a peak
 * over the circle is a peak over the axis and the interpolation floors of
 * the plant in w, a continuous plant without delay, are those of the
 * sampled loop. The zero of P(z) at z = infinity (multiplicity the relative
 * degree in z) is the zero w = 1; a root at z = -1 goes to w = infinity. */
typedef struct ps_sampled_view {
    ps_analysis w;              /* the plant in w: roots classified, gain, relative degree; delay 0, h 0 */
    double h;                   /* sample period, s */
    double theta;               /* delay held, s (plant + computation); whole samples for a plant in z */
    unsigned m;                 /* whole samples of it */
    double f;                   /* and the fraction of a sample */
    double sum_ln_out;          /* sum ln|p| over the poles outside the unit circle */
    bool feedthrough;           /* P(z) -> a non-zero value as z -> infinity: L(inf) may be non-zero */
    int z_rel_degree;           /* zeros at z = infinity */
    double z_gain;              /* P(z) = z_gain prod(z - zz) / prod(z - zp) */
    size_t n_zp, n_zz;
    ps_cplx zp[PS_MAX_ORDER], zz[PS_MAX_ORDER];
    ps_region zz_region[PS_MAX_ORDER];
    bool zz_sampling[PS_MAX_ORDER]; /* made by the hold: not the image e^{z h} of a plant zero */
    size_t n_sampling, n_zz_outside;
} ps_sampled_view;

typedef struct ps_sampled_ws ps_sampled_ws;

/* Workspace (about 1 MB: the hold's and the root finder's); NULL on no memory. */
ps_sampled_ws *ps_sampled_ws_new(void);
void ps_sampled_ws_free(ps_sampled_ws *ws);

/* The view of an analysis with an->h > 0: for a plant in s the transfer
 * function of an's roots and gain, held at an->h with the delay
 * an->delay + an->compute_delay (ps_discrete_hold, ps_roots_held); for a
 * plant in z (an->in_z) an's roots with round(compute_delay / h) poles at
 * z = 0 added. The last view is kept: the same analysis (byte for byte)
 * again costs a comparison. Returns NULL with d set when the hold fails
 * (order above PS_MAX_ORDER with the delay states, e^{A h} overflows). */
const ps_sampled_view *ps_sampled_view_of(ps_sampled_ws *ws, const ps_analysis *an, ps_diag *d);

/* w = (z - 1)/(z + 1) for a pole e^{p h} of a held plant: tanh(p h / 2), exact for small p h. */
ps_cplx ps_sampled_w_of_s(ps_cplx p, double h);

#endif
