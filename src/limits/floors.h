/* floors.h - the floors one plant puts on every stabilizing controller that
 * need no requirement: Bode area, interpolation (joint, with delay), effort,
 * crossover window, and with requirements the band-forced and Poisson floors. */
#ifndef PS_FLOORS_H
#define PS_FLOORS_H

#include <stdbool.h>

#include "limits/limits.h"
#include "roots/roots.h"

/* RHP roots closer than this (relative) are one point of higher
 * multiplicity for the interpolation floors (confluent Pick). */
#define PS_MERGE_RTOL 1e-6

/* Roots of the digital loop kept in ps_floors for reports. */
enum { PS_ZMAP = 16 };

/* How an interpolation floor was computed (for the audit trail). */
typedef enum ps_route {
    PS_ROUTE_NONE = 0,   /* no RHP point to interpolate at: the value is what S or T is forced to (0 or 1) */
    PS_ROUTE_INFINITE,   /* an exact RHP cancellation or a hidden unstable mode */
    PS_ROUTE_ONE_POINT,  /* one RHP pole: the Pick value is |w| */
    PS_ROUTE_PICK,       /* Nevanlinna-Pick matrices at the RHP poles */
    PS_ROUTE_CHEN,       /* Chen's joint formula (Ms, no delay, several RHP poles and RHP zeros) */
    PS_ROUTE_CONFLUENT,  /* repeated RHP roots: confluent Pick */
    PS_ROUTE_SINGLE,     /* fallback: the single-point products */
    PS_ROUTE_EQUAL_MT,   /* Ms with delay: equal to the Mt floor */
    PS_ROUTE_JOINT_POLES /* Ms without delay: the joint floor (Chen's equality Ms_min = Mt_min) taken from the
                            Pick problem at the poles, better conditioned than the one at the zeros */
} ps_route;

typedef struct ps_floors {
    double bode_area;        /* pi * sum Re p over RHP poles */
    double ms_interpolation; /* tight joint floor on ||S|| (Chen; with delay the Pick value); 1 when S is
                                forced to 1 only at an axis zero or at infinity (strictly proper or
                                delayed); 0 when nothing forces it (biproper, no delay, no RHP or axis zero) */
    double mt_interpolation; /* tight floor on ||T|| (Pick with delay); 1 for an axis pole alone; 0 with no
                                RHP or axis pole (C = 0 gives T = 0) */
    double effort;           /* floor on ||C S|| needed to stabilize (Pick, points p, values e^{p theta}/G_s(p)) */
    double ms_band;          /* band-forced floor on [wb, wh]; NAN when no roll-off start is given */
    double ms_poisson;       /* Poisson floor at the RHP zeros (0 without one); NAN without a band requirement */
    double mt_poisson;       /* Poisson floor at the RHP poles (0 without one); NAN without roll-off or with
                                delta = 0 */
    double ms, mt;           /* overall, with ||S|| >= ||T|| - 1 and the converse; a roll-off requirement
                                adds ||S|| >= 1 (the loop is then strictly proper) */
    const char *limiting;    /* which result sets ms: "interpolation", "band", "nyquist", "poisson", "complementary",
                                "none" (ms <= 1); or why no controller stabilizes: "hidden-mode" (a hidden
                                unstable mode), "cancellation" (an RHP zero on an RHP pole, not flagged as
                                a hidden mode: e.g. a search moved one onto the other) */
    bool infinite;           /* an exact RHP cancellation: no controller stabilizes */
    /* Natural logarithms of the floors above, kept beside them because a
     * finite floor can exceed what a double holds (e^{p theta} with a long
     * delay, the band floor of a pole far past the roll-off start): the value
     * is then +INFINITY while its log stays finite and `infinite` stays
     * false. log(value) wherever the value is finite; -INFINITY for 0; NAN
     * with a NAN value; +INFINITY only with infinite. */
    double ms_ln, mt_ln, ms_interpolation_ln, mt_interpolation_ln, effort_ln, ms_band_ln, ms_poisson_ln,
        mt_poisson_ln;
    double band_tail;        /* the log-area (rad/s) the roll-off bound lets the band floor take back past
                                wh: I = wh sum delta^n / (n (n (1+k) - 1)), for a digital loop each term cut
                                at pi/h; ln ms_band = (bode_area + wb ln(1/eps) - band_tail) / (wh - wb).
                                NAN when ms_band is NAN */
    double crossover_min, crossover_max; /* rules of thumb; max INFINITY when unbounded */
    bool window_open;
    double cond;             /* largest condition estimate of the interpolation matrices */
    bool parity_interlacing; /* even number of real unstable poles between every pair of real zeros in
                                [0, +inf] (inf a zero when strictly proper or delayed): a stable controller
                                can stabilize; false: every stabilizing controller is itself unstable */
    int bode_controller_rd;  /* smallest controller relative degree for which the loop has relative degree
                                >= 2, so the Bode area floor holds with no correction term */
    ps_route ms_route, mt_route; /* how ms_interpolation and mt_interpolation were computed */
    /* The digital loop (an->h > 0; README "Digital loops"). The
     * interpolation, effort and Poisson floors are those of the held plant
     * (or the plant given in z) mapped by w = (z - 1)/(z + 1) onto the right
     * half plane, where they are computed as for a continuous plant without
     * delay; bode_area is then (pi/h) sum ln|p_d| over the poles outside the
     * unit circle (rad/s; pi sum Re p for a held plant). All zero/empty for a
     * continuous loop (h == 0). */
    double h, nyquist;                 /* sample period s, pi/h rad/s */
    double ms_nyquist, ms_nyquist_ln;  /* floor on ||S|| over [wb, pi/h] from the discrete Bode area
                                          (wb = 0 without a band); NAN when L(inf) may be non-zero
                                          (the plant in z has direct feedthrough) */
    int z_rel_degree;                  /* relative degree in z: zeros at z = infinity (mapped to w = 1) */
    size_t n_zpoles, n_zzeros;         /* true counts of the plant's poles and finite zeros in z */
    ps_cplx zpoles[PS_ZMAP], zzeros[PS_ZMAP]; /* the first PS_ZMAP of each */
    bool zzero_sampling[PS_ZMAP];      /* a zero the hold created (not the image of a plant zero) */
    size_t n_sampling_zeros, n_zzeros_outside; /* sampling zeros; finite zeros outside the unit circle */
    char note[160];          /* a fallback taken, why a value is missing, or an assumption a value rests on */
    size_t note_plant;       /* length of the plant half's note; the requirement half writes after it */
} ps_floors;

/* Compute the floors from an analysed plant and its requirements (req may
 * be NULL: no band, no roll-off). Never fails: a numerical problem falls
 * back to the single-point products and says so in note. */
void ps_floors_compute(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out);

/* The two halves of ps_floors_compute. ps_floors_plant fills what depends
 * on the plant alone (Bode area, interpolation, effort, structure);
 * ps_floors_apply then sets, from out's plant half, what the requirements
 * add (band and Poisson floors, overall Ms and Mt, crossover window, and the
 * note's sentence when Ms >= 1 rests on the roll-off requirement alone). A
 * search that moves only a requirement computes the plant half once and
 * applies each candidate to a copy of it: the result is the same, bit for
 * bit, as a full ps_floors_compute. */
void ps_floors_plant(ps_limits_ws *ws, const ps_analysis *an, ps_floors *out);
void ps_floors_apply(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out);

/* Only the band edge (wb, eps) moved since out was last applied with the
 * same plant and otherwise the same requirements: recomputes the band-forced
 * and Poisson Ms floors, the overall Ms and Mt and the note's roll-off
 * sentence, and keeps the rest (the Poisson Mt floor and the crossover
 * window do not depend on the band).
 * Equal, bit for bit, to ps_floors_apply under those conditions. */
void ps_floors_apply_band(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out);

/* A digital loop whose held plant could not be formed (the hold's order
 * above PS_MAX_ORDER with the delay states, e^{A h} not finite) has every
 * floor NAN and the reason in fl->note: the plant cannot be screened.
 * Returns PS_OK otherwise (and for a continuous loop), else PS_ERR_INPUT
 * with d naming line and the sample_rate field. */
ps_status ps_floors_formed(const ps_analysis *an, const ps_floors *fl, size_t line, ps_diag *d);

#endif
