/* discrete.h - exact zero-order-hold discretisation of a checked continuous plant,
 * whole-sample and fractional input delays included (groundwork: not yet used by the pipeline). */
#ifndef PS_DISCRETE_H
#define PS_DISCRETE_H

#include <stddef.h>

#include "core/diag.h"
#include "model/plant.h"

/* A delay within this fraction of a sample of a whole number of samples is
 * taken as that whole number: theta / h computed from seconds carries rounding
 * (7 samples of 0.1 s given as 0.7 s is 6.999999999999999 samples). */
#define PS_DELAY_SNAP 1e-9

/* The held plant. The continuous plant x' = A x + B u(t - theta), y = C x + D u(t - theta),
 * u piecewise constant on [k h, (k+1) h), theta = (m + f) h with m whole and 0 <= f < 1:
 *
 *   x[k+1] = Phi x[k] + Gamma0 u[k-m] + Gamma1 u[k-m-1],
 *   Phi = e^{A h},  Gamma0 = int_0^{(1-f)h} e^{A s} ds B,  Gamma1 = e^{A (1-f) h} int_0^{f h} e^{A s} ds B
 *
 * (Gamma1 = 0 when f = 0; Franklin, Powell & Workman, Digital Control of Dynamic Systems,
 * 3rd ed., sec. 4.3.4, from memory). The past inputs u[k-1], ..., u[k-L], L = m + (f > 0),
 * are the extra states, so ss holds the realisation of order n + L in z:
 * state [x; u[k-1]; ...; u[k-L]], a = Phi_d, b = Gamma_d, c = C_d, d = D_d. */
typedef struct ps_held {
    double h;            /* sample period, s */
    double theta;        /* total delay discretised, s */
    unsigned m;          /* whole samples of delay */
    double f;            /* fraction of a sample, 0 <= f < 1 (snapped, PS_DELAY_SNAP) */
    size_t n;            /* order of the continuous realisation */
    /* Blocks on the continuous state, n entries each (row-major n x n for phi). */
    double phi[PS_MAX_ORDER * PS_MAX_ORDER];
    double gamma0[PS_MAX_ORDER], gamma1[PS_MAX_ORDER];
    /* The held plant as a state-space plant in z (form PS_FORM_SS, order n + L,
     * id/line of the continuous plant; no catalog fields marked present). */
    ps_plant ss;
} ps_held;

typedef struct ps_discrete_ws ps_discrete_ws;

/* Workspace for plants up to PS_MAX_ORDER (about 0.5 MB); one per thread.
 * NULL on no memory. ps_discrete_ws_free(NULL) is a no-op. */
ps_discrete_ws *ps_discrete_ws_new(void);
void ps_discrete_ws_free(ps_discrete_ws *ws);

/* Hold-equivalent of the checked continuous plant p (ps_plant_check passed;
 * p->delay is NOT read: the caller passes the whole delay theta, e.g. the plant's
 * own plus the computation delay) at sample period h > 0, with input delay
 * theta >= 0 seconds. The continuous realisation is p's own for state space;
 * for polynomial and factored forms the controllable canonical form of num/den
 * (factored: the products expanded, pairs by real quadratics), order = deg den.
 * Returns PS_OK, PS_ERR_INPUT (h or theta not finite/positive, n + L above
 * PS_MAX_ORDER, form not checked) or PS_ERR_NUMERIC (e^{A h} overflows or the
 * Pade solve is singular), with d set. Allocates nothing. OUT: out. */
ps_status ps_discrete_hold(ps_discrete_ws *ws, const ps_plant *p, double h, double theta, ps_held *out,
                           ps_diag *d);

/* e^{M tau} of the k x k row-major matrix M (k <= PS_MAX_ORDER + 1) by scaling
 * and squaring with the degree-13 Pade approximant (Higham, SIAM J. Matrix Anal.
 * Appl. 26(4), 2005, alg. 2.3 with m = 13 always). Returns PS_OK or
 * PS_ERR_NUMERIC (not finite, singular denominator) with d set. OUT: out (k x k,
 * may not alias M). Allocates nothing. */
ps_status ps_discrete_expm(ps_discrete_ws *ws, const double *M, size_t k, double tau, double *out, ps_diag *d);

#endif
