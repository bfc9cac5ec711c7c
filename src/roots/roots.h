/* roots.h - poles, zeros, gain, relative degree and structural checks of a
 * checked plant, with each root classified against the imaginary axis. */
#ifndef PS_ROOTS_H
#define PS_ROOTS_H

#include <stdbool.h>

#include "core/diag.h"
#include "model/discrete.h"
#include "model/plant.h"

/* Stated tolerances (documented in README and DEVELOPERS.md). */
#define PS_CLUSTER_RTOL 1e-3      /* cap: roots farther apart (relative) never merge into one multiple root */
#define PS_CANCEL_RTOL 1e-6       /* RHP zero and RHP pole closer than this cancel exactly */
#define PS_NEAR_CANCEL_RTOL 0.2   /* closer than this is reported as a near cancellation */
#define PS_PBH_RTOL 1e-9          /* smallest singular value / norm below this: rank lost */

typedef enum ps_region { PS_LHP = 0, PS_AXIS, PS_RHP } ps_region;

const char *ps_region_name(ps_region r);

typedef struct ps_root {
    ps_cplx v;
    ps_region region;
    unsigned mult;   /* multiplicity of the cluster this root belongs to */
    double tol;      /* |Re| <= tol counts as on the axis */
} ps_root;

typedef struct ps_analysis {
    size_t n_poles, n_zeros;
    ps_root poles[PS_MAX_ORDER];
    ps_root zeros[PS_MAX_ORDER];
    double gain;          /* k in k*prod(s-z)/prod(s-p): leading coefficient ratio */
    int rel_degree;       /* n_poles - n_zeros of the transfer function */
    double delay;
    /* The digital loop (from the plant): h the sample period in s, 0 for a
     * continuous loop; compute_delay in s (added to delay when the plant is
     * held; it scales with h when given in samples); in_z: the roots are in z, classified against the unit circle
     * (region PS_RHP outside, PS_AXIS on it, tol on | |z| - 1 |), delay 0. */
    double h, compute_delay;
    double compute_delay_samples; /* NAN when the computation delay was given in seconds */
    bool in_z;
    bool relax_sampling_zeros; /* a counterfactual (screen/attribution.c): the hold's zeros outside the circle
                                  are mirrored inside; false from ps_roots_analyse */
    bool hidden_unstable; /* an RHP mode no controller can reach or see */
    bool minimal;         /* state space: every mode controllable and observable (RHP only checked) */
    size_t n_rhp_poles, n_rhp_zeros, n_axis_poles;
} ps_analysis;

typedef struct ps_roots_ws ps_roots_ws;

/* Call once at start-up, before any thread: GSL's default error handler
 * aborts the process; this turns it off so failures come back as codes. */
void ps_roots_init(void);

/* Workspace for plants up to PS_MAX_ORDER; one per thread. NULL on no memory. */
ps_roots_ws *ps_roots_ws_new(void);
void ps_roots_ws_free(ps_roots_ws *ws);

/* Analyse a plant that passed ps_plant_check. Warnings (near cancellations,
 * hidden modes, non-minimal realisations) are appended to p. Returns PS_OK,
 * or PS_ERR_NUMERIC / PS_ERR_INPUT with d set when a solver fails or the
 * plant is identically zero. OUT: out. */
ps_status ps_roots_analyse(ps_roots_ws *ws, ps_plant *p, ps_analysis *out, ps_diag *d);

/* Roots of a real polynomial, DESCENDING coefficients c[0..n-1], c[0] != 0.
 * Roots polished by Newton steps on c, clustered (PS_CLUSTER_RTOL) and
 * classified. Returns the number of roots (n-1) or -1 with d set. OUT: out. */
int ps_roots_poly(ps_roots_ws *ws, const double *c, size_t n, ps_root *out, ps_diag *d);

/* Poles and zeros of a held plant's transfer function in z:
 * H(z) = gain prod(z - zeros) / prod(z - poles), rel_degree = n_poles - n_zeros. */
typedef struct ps_held_roots {
    size_t n_poles, n_zeros;
    ps_cplx poles[PS_MAX_ORDER], zeros[PS_MAX_ORDER];
    double gain;     /* first non-zero Markov parameter: D_d, or C_d Phi_d^(r-1) Gamma_d */
    int rel_degree;
} ps_held_roots;

/* Poles and zeros of the held plant made by ps_discrete_hold from the
 * continuous plant whose analysis is cont (ps_roots_analyse, same plant).
 * Poles: e^{p h} for each continuous pole p (the eigenvalues of Phi, without
 * rounding the defective zero eigenvalues of the delay chain) and one pole at
 * z = 0 per delay state. Zeros: finite generalized eigenvalues of the Rosenbrock
 * pencil of (Phi_d, Gamma_d, C_d, D_d), with the relative degree from the Markov
 * parameters (the same machinery as state-space plants in s); the sampling zeros
 * are among them. No classification (that is for the unit circle, later).
 * Returns PS_OK, PS_ERR_INPUT (cont does not match held, zero transfer function)
 * or PS_ERR_NUMERIC with d set. Allocates nothing beyond GSL 2.7's QZ vector
 * (see DEVELOPERS.md). OUT: out. */
ps_status ps_roots_held(ps_roots_ws *ws, const ps_held *held, const ps_analysis *cont, ps_held_roots *out,
                        ps_diag *d);

/* Evaluate a DESCENDING-coefficient polynomial at s. */
ps_cplx ps_poly_eval(const double *c, size_t n, ps_cplx s);

#endif
