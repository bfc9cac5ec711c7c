/* attribution.h - why a plant's binding floor is as high as it is: each
 * factor of the plant or its requirements relaxed alone to its benign limit,
 * the floor recomputed, and the factors ranked by how far that lowers it. */
#ifndef PS_ATTRIBUTION_H
#define PS_ATTRIBUTION_H

#include <stdbool.h>
#include <stddef.h>

#include "limits/floors.h"
#include "limits/limits.h"
#include "model/plant.h"
#include "roots/roots.h"

/* The peak whose share of its allowed value sets the verdict. */
typedef enum ps_peak { PS_PEAK_NONE = 0, PS_PEAK_MS, PS_PEAK_MT, PS_PEAK_EFFORT } ps_peak;

/* "Ms", "Mt", "effort" or "none" (the summary's `worst` words). */
const char *ps_peak_name(ps_peak p);

/* The factors relaxed one at a time, each to its benign limit. */
typedef enum ps_factor {
    PS_FACTOR_DELAY = 0, /* delay -> 0 */
    PS_FACTOR_ZEROS,     /* every RHP zero mirrored into the left half plane (same gain curve) */
    PS_FACTOR_ROLLOFF,   /* roll-off start -> unlimited (no roll-off requirement) */
    PS_FACTOR_BAND,      /* band requirement removed */
    /* the digital loop */
    PS_FACTOR_COMPUTE,   /* computation delay -> 0 */
    PS_FACTOR_RATE,      /* sample rate x PS_ATTR_RATE_UP (the hold's delay and the Nyquist limit shrink; a
                            computation delay given in samples shrinks with them) */
    PS_FACTOR_SAMPLING_ZEROS, /* the zeros the hold made outside the unit circle mirrored inside (same |P|
                                 on the circle) */
    PS_FACTOR_COUNT
} ps_factor;

/* Stable keys ("delay", "rhp_zeros", "rolloff_start", "band", "compute_delay", "sample_rate",
 * "sampling_zeros") used in JSON and CSV. */
const char *ps_factor_key(ps_factor f);
/* The relaxation in words ("without the delay", "with unlimited bandwidth", ...). */
const char *ps_factor_relaxed_words(ps_factor f);

/* A relaxation counts as lowering the floor when it takes it below
 * floor * (1 - PS_ATTR_RTOL): finer changes are rounding. */
#define PS_ATTR_RTOL 1e-6

/* The sample-rate factor's counterfactual: the rate this many times higher. */
#define PS_ATTR_RATE_UP 4.0

typedef struct ps_attribution {
    ps_peak binding;                 /* PS_PEAK_NONE: no floor uses any of its allowed peak */
    double floor;                    /* the binding floor (overall Ms, Mt or effort) */
    double allowed;                  /* its allowed value */
    bool present[PS_FACTOR_COUNT];   /* the plant or its requirements have this factor */
    double without[PS_FACTOR_COUNT]; /* the binding floor with that factor relaxed; NAN when absent */
    unsigned char order[PS_FACTOR_COUNT]; /* the present factors, lowest `without` first (ties: enum order) */
    size_t n_present;
    size_t n_lowering;               /* the first n_lowering of order lower the floor (the named factors) */
    double all_relaxed;              /* every present factor relaxed at once */
    /* The natural logarithms of floor, without[] and all_relaxed (ps_floors):
     * finite where the value overflowed a double; the ranking and the
     * lowering test compare these whenever a value is not finite. */
    double floor_ln, without_ln[PS_FACTOR_COUNT], all_relaxed_ln;
} ps_attribution;

/* The binding peak of a plant from its shares (NAN: not counted): the
 * largest positive share, Ms before Mt before effort on ties; NONE when no
 * share is above 0. */
ps_peak ps_peak_binding(double share_ms, double share_mt, double share_effort);

/* Fill out for an analysed plant an with requirements q and floors fl (as
 * ps_floors_compute gives them) and the binding peak. Every counterfactual
 * is a full ps_floors_compute on a changed copy: scratch is a caller-owned
 * analysis to hold it (no allocation). The effort floor is computed. */
void ps_attribution_compute(ps_limits_ws *lws, ps_analysis *scratch, const ps_analysis *an, const ps_requirements *q,
                            const ps_floors *fl, ps_peak binding, ps_attribution *out);

/* The binding floor of fl for peak b (NAN for NONE), and its natural
 * logarithm (finite where the floor overflowed a double). */
double ps_peak_floor(const ps_floors *fl, ps_peak b);
double ps_peak_floor_ln(const ps_floors *fl, ps_peak b);

/* The cause in one sentence, built from the attribution: the factors that
 * lower the binding floor, largest first, each with the floor its
 * relaxation leaves. Names no factor the plant lacks. realised: the plant
 * was given in state space (a hidden mode is then one of the realisation,
 * not a zero that could move). */
void ps_attribution_cause(const ps_attribution *a, const ps_analysis *an, const ps_requirements *q,
                          const ps_floors *fl, bool realised, char *buf, size_t n);

/* A hidden unstable mode of a rational plant is an RHP zero on an RHP pole:
 * moving either one makes the plant stabilizable (what the redesign targets
 * then search). False for state-space plants and for any other infinity. */
bool ps_cancellation_movable(const ps_analysis *an, const ps_floors *fl, bool realised);

#endif
