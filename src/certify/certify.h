/* certify.h - the other side of the bracket: a concrete controller for a
 * plant, searched within a budget and then verified (closed-loop stability
 * by the argument principle and, for a loop without delay, by the closed-loop
 * roots; peaks, roll-off, band and effort on a dense grid). Floors say what
 * no controller can do; a verified controller shows what one can.
 *
 * Continuous loops only (an->h == 0); a digital loop is "not attempted". */
#ifndef PS_CERTIFY_H
#define PS_CERTIFY_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "limits/floors.h"
#include "model/plant.h"
#include "roots/roots.h"

enum { PS_CTRL_MAX_ORDER = 6, PS_CTRL_MAX_PARAMS = 8 };

/* The rungs of the ladder, simple to richer (README "Certificate controllers"). */
typedef enum ps_ctrl_structure {
    PS_CTRL_PI = 0,     /* K (s + wi) / s, roll-off poles */
    PS_CTRL_PID,        /* K (s^2 + 2 z wn s + wn^2) / s, roll-off poles */
    PS_CTRL_LEADLAG,    /* K (s/z1 + 1)(s/z2 + 1) / ((s/p1 + 1)(s/p2 + 1)), roll-off poles */
    PS_CTRL_UNSTABLE,   /* K (s/z1 + 1)(s/z2 + 1) / (s/p1 - 1), roll-off poles: one real RHP controller
                           pole, for a plant only an unstable controller stabilizes */
    PS_CTRL_NOTCH,      /* the PID times (s^2 + 2 zz wm s + wm^2) / (s^2 + 2 zp wm s + wm^2), wm near the plant's
                           most lightly damped pole pair (damping ratio below 0.2), roll-off poles */
    PS_CTRL_FIXED,      /* the last rung, a fixed-order controller of order 3: K (s^2/wz^2 + 2 zz s/wz + 1)(s/z3 + 1)
                           / ((s^2/wp^2 + 2 zp s/wp + 1)(s/p3 + 1)), damping ratios 0.05 to 2 (real roots above 1),
                           roll-off poles */
    PS_CTRL_COUNT,
    PS_CTRL_INTERPOLATION = PS_CTRL_COUNT /* not a rung: C = c / (k G(s)) times a far filter, the floors'
                                             construction (ps_attain_floors) */
} ps_ctrl_structure;

const char *ps_ctrl_structure_name(ps_ctrl_structure s);

/* C(s) = num(s) / den(s), real coefficients in DESCENDING powers of s. */
typedef struct ps_controller {
    ps_ctrl_structure structure;
    size_t n_rolloff;                  /* roll-off poles (s/wf + 1) */
    size_t n_param;
    double param[PS_CTRL_MAX_PARAMS];  /* K, then the corner frequencies in rad/s (PID: wn, zeta; notch: wn, zeta,
                                          wm, zz, zp; fixed order: wz, zz, wp, zp, z3, p3), wf last */
    size_t n_num, n_den;               /* coefficient counts (degree + 1) */
    double num[PS_CTRL_MAX_ORDER + 1], den[PS_CTRL_MAX_ORDER + 1];
} ps_controller;

/* What the verification found for one plant and controller. */
typedef struct ps_loop_check {
    bool stable;           /* no closed-loop pole at or right of -decay_min (argument principle) */
    bool roots_checked;    /* the closed-loop roots were computed (a loop without delay) */
    bool roots_agree;      /* they give the same answer as the argument principle (true when not checked) */
    double decay_min;      /* the decay rate required of every closed-loop pole, 1/s */
    double decay;          /* roots checked: -max Re of the closed-loop poles; else decay_min when stable */
    double ms, mt, w_ms, w_mt;  /* peaks of |S| and |T| and where */
    double effort;         /* peak of |C S| */
    double rolloff_ratio;  /* max over w >= wh of |L| / (delta (wh/w)^(1+k)); NAN without a roll-off start */
    double band_peak;      /* max |S| on [0, wb]; NAN without a band */
    bool meets;            /* stable, agreed, and every requirement met with the margin PS_CERT_MARGIN */
    bool shape_met;        /* stable, and roll-off, band and effort met (all but the allowed peaks): only then
                              are its peaks an upper bound on the best peaks achievable under the requirements */
    char why[200];         /* the first requirement not met, or "" */
} ps_loop_check;

/* Requirements are met with this relative margin on every checked grid value. */
#define PS_CERT_MARGIN 1e-3

typedef enum ps_cert_status {
    PS_CERT_NOT_ATTEMPTED = 0, /* a digital loop, an order past the checks, a plant the floors rule out
                                  entirely (no controller stabilizes) */
    PS_CERT_DEMONSTRATED,      /* a verified controller meets every requirement */
    PS_CERT_UNDECIDED,         /* no controller found within the budget meets every requirement */
    PS_CERT_COUNT
} ps_cert_status;

const char *ps_cert_status_name(ps_cert_status s);

/* Where no roll-off is required, the floors attained: for a plant without
 * delay, P(s) = k (s - z)/(s - p) G(s) with one real RHP pole p, at most one
 * real RHP zero z > p (below p only an unstable controller stabilizes) and G
 * stable and minimum phase, the interpolation problem
 * has the all-pass solutions S = g (s - p)/(s + p), g = (z + p)/(z - p), and
 * T = -g (s - z)/(s + z) (|S| = |T| = |g|, the floor; without a zero S is
 * (s - p)/(s + p) and T = (p + a)/(s + a), a = 200 p). Each comes from the
 * controller C = c / (k G(s)) with c = (1 - g)/g, -g/(1 + g) (without a zero
 * 2 p and p + a), which cancels only the stable G. A first-order filter
 * (s/wf + 1)^-m, m = max(1, relative degree of P), wf raised a decade at a
 * time, makes C proper and the loop strictly proper for the verification. */
typedef struct ps_attain {
    bool applies;
    bool within;            /* both verified stable with peaks within 1 % of their floors */
    bool ms_stable, mt_stable; /* stable by the argument principle, the closed-loop roots agreeing */
    bool roots_checked;     /* the closed-loop roots were computed for both */
    char why[160];          /* when it does not apply: why */
    double floor_ms, floor_mt; /* the interpolation floors the peaks are measured against */
    double wf;              /* the filter's corner, rad/s */
    double ms, mt;          /* verified peaks of |S| with for_ms and of |T| with for_mt (no roll-off, band or
                               effort requirement) */
    ps_controller for_ms, for_mt;
} ps_attain;

void ps_attain_floors(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl, ps_attain *out);

typedef struct ps_cert {
    ps_cert_status status;
    bool found;            /* a stabilizing controller was found (ctrl, chk hold the best one) */
    ps_controller ctrl;
    ps_loop_check chk;
    size_t evaluations;    /* loop evaluations spent */
    uint64_t seed;         /* from the plant id */
    char reason[200];      /* not attempted or undecided: why */
    ps_attain attain;      /* no roll-off requirement: the floors attained (attain.applies) */
} ps_cert;

/* Verify controller c on the analysed plant an under requirements q. */
void ps_loop_verify(const ps_analysis *an, const ps_requirements *q, const ps_controller *c, ps_loop_check *out);

/* Search the ladder for a controller within budget loop evaluations (0: the
 * default PS_CERT_BUDGET), seeded from id; verify the best. Deterministic for
 * a given plant, id and budget. fl: the plant's floors (parity, crossover window). */
#define PS_CERT_BUDGET 4000
#define PS_CERT_BUDGET_TEXT "4000"
void ps_certify(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl, const char *id, size_t budget,
                ps_cert *out);

/* |S| and |T| of the loop of an and c at n frequencies log-spaced from lo to
 * hi (rad/s, 0 < lo < hi, n >= 2) into w, s_mag and t_mag: the figure of a
 * report. */
void ps_loop_curve(const ps_analysis *an, const ps_controller *c, double lo, double hi, size_t n, double *w,
                   double *s_mag, double *t_mag);

/* The value of C at s (for tests and writers). */
void ps_controller_eval(const ps_controller *c, double re, double im, double *out_re, double *out_im);

#endif
