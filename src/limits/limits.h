/* limits.h - floors that a plant's RHP poles, RHP zeros and delay put on the
 * achievable sensitivity, for every stabilizing controller. Formulas and
 * sources: docs/method.md "Floors" and the comments in limits.c. */
#ifndef PS_LIMITS_H
#define PS_LIMITS_H

#include <stdbool.h>
#include <stddef.h>

#include "core/diag.h"
#include "model/plant.h"
#include "roots/roots.h"

typedef struct ps_limits_ws ps_limits_ws;

ps_limits_ws *ps_limits_ws_new(void);
void ps_limits_ws_free(ps_limits_ws *ws);

/* While skip is set, ps_floors_compute leaves the effort floor NAN (not
 * computed): for searches whose verdict does not count effort. */
void ps_limits_skip_effort(ps_limits_ws *ws, bool skip);
bool ps_limits_effort_skipped(const ps_limits_ws *ws);

/* The workspace of the digital loop's plant (limits/sampled.h), made with ws. */
struct ps_sampled_ws *ps_limits_sampled(ps_limits_ws *ws);

/* Bode area floor F = pi * sum Re p over RHP poles (with multiplicity). */
double ps_bode_area(const ps_cplx *p, size_t np);

/* Exact roll-off tail I = integral_{wh}^inf -ln(1 - delta (wh/w)^(1+k)) dw
 * = wh * sum_{n>=1} delta^n / (n (n (1+k) - 1)), for 0 <= delta < 1, k > 0. */
double ps_rolloff_tail(double wh, double delta, double k);
/* The same value, with the series kept in ws between calls with the same
 * delta, k: the tail the band floor below subtracts. */
double ps_rolloff_tail_ws(ps_limits_ws *ws, double wh, double delta, double k);

/* Peak-sensitivity floor on [wb, wh] forced by |S| <= eps on [0, wb] and the
 * roll-off (DFT 1992, "Design Constraints"; delta = 0: Stein 2003):
 * exp([F + wb ln(1/eps) - I] / (wh - wb)). wb = 0 means no band. */
double ps_band_floor(double F, double wb, double eps, double wh, double delta, double k);
/* The same, with the tail series kept in ws between calls with the same delta, k. */
double ps_band_floor_ws(ps_limits_ws *ws, double F, double wb, double eps, double wh, double delta, double k);
/* Its natural logarithm, the exponent [F + wb ln(1/eps) - I] / (wh - wb):
 * finite where the floor itself overflows a double (e.g. an RHP pole far
 * beyond the roll-off start). ps_band_floor_ws is exp of this value. */
double ps_band_floor_ln_ws(ps_limits_ws *ws, double F, double wb, double eps, double wh, double delta, double k);

/* Single-point interpolation floors (S&P 2nd ed. 2005, ch. 5):
 *   ||S|| >= max_j prod_i |z_j + conj(p_i)| / |z_j - p_i|
 *   ||T|| >= max_i e^{Re(p_i) theta} prod_j |conj(z_j) + p_i| / |z_j - p_i|
 * Return 1 when there is nothing to bound; INFINITY for an exact cancellation. */
double ps_ms_single(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np);
double ps_mt_single(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta);
/* Their natural logarithms, summed factor by factor (Re(p) theta for the
 * delay): finite where the product overflows a double, +INFINITY only for
 * an exact cancellation, 0 when there is nothing to bound. */
double ps_ms_single_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np);
double ps_mt_single_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta);

/* Joint tight floor Ms_min = Mt_min = sqrt(1 + sigma_max^2(Qz^-1/2 Qzp Qp^-1/2))
 * (J. Chen, IEEE TAC 45(6), 2000), no delay; z and p distinct simple points.
 * Returns PS_OK with *out, or PS_ERR_NUMERIC (Cholesky failed: repeated or
 * near-coincident points) with d set. *cond gets the larger condition
 * estimate of Qz, Qp (ratio of extreme Cholesky pivots squared). */
ps_status ps_chen_floor(ps_limits_ws *ws, const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np,
                        double *out, double *cond, ps_diag *d);

/* Nevanlinna-Pick minimum norm: the smallest gamma such that a stable f with
 * ||f|| <= gamma and f(s_k) = w_k exists, gamma = sqrt(lambda_max(B, A)),
 * A_kl = 1/(conj s_k + s_l), B_kl = conj(w_k) w_l / (conj s_k + s_l).
 * Points in the open RHP, distinct. Same status contract as ps_chen_floor. */
ps_status ps_pick_gamma(ps_limits_ws *ws, const ps_cplx *s, const ps_cplx *w, size_t n, double *out,
                        double *cond, ps_diag *d);

/* Confluent Nevanlinna-Pick (Caratheodory-Fejer data): the smallest gamma
 * such that a stable f with ||f|| <= gamma and f - h = O((s - s_k)^{m_k})
 * exists, for distinct points s_k in the open RHP with multiplicities m_k.
 * taylor holds h's Taylor coefficients h^{(a)}(s_k)/a!, a = 0..m_k-1, point
 * after point (sum m_k <= PS_MAX_ORDER). The Pick matrices are the Taylor
 * coefficients of the kernels 1/(conj s + t) and conj h(s) h(t)/(conj s + t);
 * with every m_k = 1 this is ps_pick_gamma. Same status contract. */
ps_status ps_pick_confluent(ps_limits_ws *ws, const ps_cplx *s, const unsigned *mult, size_t npts,
                            const ps_cplx *taylor, double *out, double *cond, ps_diag *d);

/* Poisson floors (Freudenberg & Looze, IEEE TAC 30(6), 1985).
 * S at the RHP zeros z (one per real zero or complex pair) with |S| <= eps on
 * [0, wb]: Theta = atan((wb - y)/x) + atan((wb + y)/x), and
 *   sup_{w >= wb} |S| >= (1/eps)^{Theta/(pi-Theta)} * |B_p(z)^-1|^{pi/(pi-Theta)};
 * the largest over the zeros (0 when there is no RHP zero: nothing to bound).
 * T at the RHP poles p with delay theta and |T| <= eps_t beyond wh:
 *   sup_{w <= wh} |T| >= (1/eps_t)^{(pi-Theta)/Theta} * (|B_z(p)^-1| e^{x theta})^{pi/Theta},
 * Theta = Theta(p, wh); the largest over the poles, as computed (below 1 when
 * eps_t > 1: not binding); 0 when there is no RHP pole (nothing to bound:
 * C = 0 gives T = 0 for a stable plant). */
double ps_poisson_s_floor(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double eps, double wb);
double ps_poisson_t_floor(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta,
                          double eps_t, double wh);
/* Their natural logarithms (-INFINITY for the 0 of "nothing to bound"),
 * finite where the floors overflow a double; the two above are exp of these. */
double ps_poisson_s_floor_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double eps, double wb);
double ps_poisson_t_floor_ln(const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np, double theta,
                             double eps_t, double wh);

/* Margins guaranteed by a peak (exact inequalities; S&P 2nd ed. ch. 2):
 * from Ms: GM >= Ms/(Ms-1), PM >= 2 asin(1/(2 Ms)); from Mt: GM >= 1 + 1/Mt,
 * PM >= 2 asin(1/(2 Mt)). Phase margins in degrees. Peak must be > 1 for the
 * Ms forms (GM is infinite at Ms = 1) and >= 0.5 for the phase forms. */
double ps_gain_margin_from_ms(double ms);
double ps_phase_margin_from_ms(double ms);
double ps_gain_margin_from_mt(double mt);
double ps_phase_margin_from_mt(double mt);

#endif
